"""Sizing questions, each answered by batched sweeps (one FiPy system per sweep):

(a) the mildest constant severity (Grossmann H and h) that meets the requirement;
(b) the built-in quenchants that meet it, mildest first;
(c) the largest section that meets it in the case's own quenchant.

Each sweep brackets the answer on a coarse geometric grid, then refines the bracket with a second
batch. The answer reported always meets the requirement and the neighbouring step on the milder
(or larger) side does not, both taken from solved cases.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Callable

import numpy as np

from ..case import Case, Requirement
from ..errors import InputError
from ..formatting import rounded
from ..thermal.quenchants import Quenchant, builtin_names, htc_from_grossmann, load_quenchant
from .compare import compare
from .requirement import requirement_margin
from .simulate import simulate
from .variants import case_size_mm, size_label, with_length, with_quenchant, with_size

SEVERITY_RANGE_PER_INCH = (0.02, 20.0)
COARSE_POINTS = 14
FINE_POINTS = 8


@dataclass
class Bracket:
    """The answer of a sweep: `passing` meets the requirement, `failing` is its neighbour that does not."""

    passing: float | None
    failing: float | None
    passing_margin: float | None = None
    failing_margin: float | None = None
    evaluated: list = field(default_factory=list)   # (value, margin) of every solved case


def _margins(cases: list[Case], requirement: Requirement, progress=None) -> list[float]:
    return [requirement_margin(r, requirement) for r in simulate(cases, progress)]


def _refine(values: np.ndarray, margins: list[float], make_case, requirement, increasing_is_better: bool,
            geometric: bool, progress=None) -> Bracket:
    """Find the boundary between failing and passing values, then refine it once."""
    evaluated = list(zip(values.tolist(), margins))
    ok = np.array(margins) >= 0.0
    if increasing_is_better:
        if not ok.any():
            return Bracket(None, float(values[-1]), None, margins[-1], evaluated)
        i = int(np.argmax(ok))           # first passing value from the mild end
        if i == 0:
            return Bracket(float(values[0]), None, margins[0], None, evaluated)
        lo, hi = values[i - 1], values[i]
    else:
        if not ok.any():
            return Bracket(None, float(values[0]), None, margins[0], evaluated)
        i = len(ok) - 1 - int(np.argmax(ok[::-1]))   # last passing value (largest size)
        if i == len(ok) - 1:
            return Bracket(float(values[-1]), None, margins[-1], None, evaluated)
        lo, hi = values[i], values[i + 1]
    inner = (np.geomspace(lo, hi, FINE_POINTS + 2) if geometric else np.linspace(lo, hi, FINE_POINTS + 2))[1:-1]
    fine_margins = _margins([make_case(v) for v in inner], requirement, progress)
    evaluated += list(zip(inner.tolist(), fine_margins))
    grid = np.concatenate([[lo], inner, [hi]])
    m = np.concatenate([[margins[i - 1] if increasing_is_better else margins[i]], fine_margins,
                        [margins[i] if increasing_is_better else margins[i + 1]]])
    ok = m >= 0.0
    if increasing_is_better:
        j = int(np.argmax(ok))
        return Bracket(float(grid[j]), float(grid[j - 1]), float(m[j]), float(m[j - 1]), evaluated)
    j = len(ok) - 1 - int(np.argmax(ok[::-1]))
    return Bracket(float(grid[j]), float(grid[j + 1]), float(m[j]), float(m[j + 1]), evaluated)


def mildest_severity(case: Case, requirement: Requirement, progress=None) -> Bracket:
    """(a) Smallest constant Grossmann H [1/in] that meets the requirement (bath as the case's)."""
    bath = case.outer.bath_c

    def make(h_per_inch):
        return with_quenchant(case, Quenchant.constant(float(htc_from_grossmann(h_per_inch)), bath,
                                                       name=f"Grossmann H = {h_per_inch:.3g} 1/in"))

    grid = np.geomspace(*SEVERITY_RANGE_PER_INCH, COARSE_POINTS)
    return _refine(grid, _margins([make(h) for h in grid], requirement, progress), make, requirement, True, True, progress)


def largest_size(case: Case, requirement: Requirement, progress=None) -> Bracket:
    """(c) Largest size (see variants.size_label) that meets the requirement in the case's quenchant."""
    smallest = 2.0
    if requirement.depth_mm is not None:
        # The requirement's depth must lie inside the section: radius / half thickness / wall.
        factor = 1.0 if case.section.shape == "tube" or case.dimensions_mm.get("faces") == "one" else 2.0
        smallest = max(smallest, factor * requirement.depth_mm * 1.02)
    grid = np.geomspace(smallest, max(400.0, 4 * smallest), COARSE_POINTS)
    return _refine(grid, _margins([with_size(case, s) for s in grid], requirement, progress),
                   lambda s: with_size(case, s), requirement, False, True, progress)


def largest_length(case: Case, requirement: Requirement, progress=None) -> Bracket:
    """(c') A finite part: the largest length (its section kept; a stepped shaft's steps scaled
    alike) that meets the requirement along its profile line, from 0.5 to 20 diameters. The ends
    harden the middle of a short part, so lengths below the answer meet it; passing at the longest
    length means any does. The parts share one radial grid, so each sweep is one stacked batch."""
    grid = np.geomspace(1000.0 * case.finite.part.outer_m, 40000.0 * case.finite.part.outer_m, COARSE_POINTS)
    return _refine(grid, _margins([with_length(case, x) for x in grid], requirement, progress),
                   lambda x: with_length(case, x), requirement, False, True, progress)


@dataclass
class SizingAnswer:
    case: Case
    requirement: Requirement
    severity: Bracket
    quenchants: list          # rows of compare() for the built-ins, mildest first, meeting flag
    size: Bracket
    size_label: str
    case_size_mm: float
    length: Bracket | None = None     # a finite part: its largest length (workflows.finite.largest_length)

    def as_dict(self) -> dict:
        sev = self.severity
        return {
            "requirement": self.requirement.describe(),
            "mildest_severity": {
                "grossmann_h_per_inch": rounded(sev.passing), "htc_w_m2k": rounded(None if sev.passing is None else float(htc_from_grossmann(sev.passing)), 0),
                "next_milder_h_per_inch": rounded(sev.failing), "reachable": sev.passing is not None,
            },
            "quenchants_meeting": [q["medium"] for q in self.quenchants if q["meets_requirement"]],
            "quenchants": self.quenchants,
            "largest_size": {"dimension": self.size_label, "largest_passing_mm": rounded(self.size.passing, 2),
                             "next_larger_failing_mm": rounded(self.size.failing, 2), "case_size_mm": rounded(self.case_size_mm, 2)},
            **({} if self.length is None else {"largest_length": {
                "largest_passing_mm": rounded(self.length.passing, 2), "next_longer_failing_mm": rounded(self.length.failing, 2),
                "case_length_mm": rounded(1000.0 * self.case.finite.part.length_m, 2)}}),
        }


def size(case: Case, requirement: Requirement | None = None, media: list[Quenchant] | None = None,
         progress: Callable[[float], None] | None = None) -> SizingAnswer:
    """All three sizing answers for a case and a requirement (the case's own if none is given)."""
    req = requirement or case.requirement
    if req is None:
        raise InputError("requirement", "(missing)", "a [requirement] table in the case or --min-hrc / --min-martensite")
    stage = [0]

    def sub(f):
        if progress is not None:
            progress(min(1.0, (stage[0] + f) / 3.0))

    severity = mildest_severity(case, req, sub)
    stage[0] = 1
    media = media if media is not None else [load_quenchant(n) for n in builtin_names()]
    comparison = compare(replace(case, requirement=req), media, sub)
    rows = sorted(comparison.rows, key=lambda r: (r["equivalent_h"] is None, r["equivalent_h"] or 0.0))
    stage[0] = 2
    biggest = largest_size(case, req, sub)
    length = largest_length(case, req, sub) if getattr(case, "finite", None) is not None else None
    return SizingAnswer(case, req, severity, rows, biggest, size_label(case), case_size_mm(case), length)

