"""Sizing questions, answered by batched sweeps:

(a) the mildest constant severity (Grossmann H and h) that meets the requirement;
(b) the built-in quenchants that meet it, mildest first;
(c) the largest section that meets it in the case's own quenchant.

Each sweep brackets the answer on a coarse geometric grid, then refines the bracket with a second
grid inside it. The answer reported always meets the requirement and the neighbouring step on the
milder (or larger) side does not, both taken from solved cases. size() solves the three questions
in two batches: the coarse grids of (a) and (c) with every quenchant of (b), then both
refinements (about 2.5 times faster than a batch per sweep on the demo pin; the answers are the
same, since a case's solution does not depend on the rest of its batch).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Callable

import numpy as np

from ..case import Case, Requirement
from ..errors import InputError
from ..formatting import rounded
from ..thermal.quenchants import Quenchant, builtin_names, htc_from_grossmann, load_quenchant
from .compare import comparison_from_results
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


@dataclass
class _Sweep:
    """One sizing question as two rounds: a coarse grid, then a finer grid inside its bracket."""

    values: np.ndarray
    make: Callable[[float], Case]
    increasing_is_better: bool       # True: severity (larger passes); False: size (smaller passes)
    geometric: bool = True
    margins: list = field(default_factory=list)
    inner: np.ndarray | None = None  # the second round's values (None: answered by the first)
    at: int = 0                      # index of the coarse value on the passing side of the bracket

    def coarse_cases(self) -> list[Case]:
        return [self.make(v) for v in self.values]

    def fine_cases(self, margins: list[float]) -> list[Case]:
        """The second round's cases after the first round's margins (empty when it is answered)."""
        self.margins = list(margins)
        ok = np.array(margins) >= 0.0
        if not ok.any():
            return []
        if self.increasing_is_better:
            i = int(np.argmax(ok))                   # first passing value from the mild end
            if i == 0:
                return []
            lo, hi = self.values[i - 1], self.values[i]
        else:
            i = len(ok) - 1 - int(np.argmax(ok[::-1]))   # last passing value (largest size)
            if i == len(ok) - 1:
                return []
            lo, hi = self.values[i], self.values[i + 1]
        self.at = i
        spaced = np.geomspace if self.geometric else np.linspace
        self.inner = spaced(lo, hi, FINE_POINTS + 2)[1:-1]
        return [self.make(v) for v in self.inner]

    def bracket(self, fine_margins: list[float]) -> Bracket:
        """The answer from both rounds (fine_margins: those of fine_cases, empty if there were none)."""
        values, margins = self.values, self.margins
        evaluated = list(zip(values.tolist(), margins))
        ok = np.array(margins) >= 0.0
        better = self.increasing_is_better
        if not ok.any():
            edge = -1 if better else 0
            return Bracket(None, float(values[edge]), None, margins[edge], evaluated)
        if self.inner is None:
            edge = 0 if better else -1
            return Bracket(float(values[edge]), None, margins[edge], None, evaluated)
        i, inner = self.at, self.inner
        evaluated += list(zip(inner.tolist(), fine_margins))
        if better:
            grid = np.concatenate([[values[i - 1]], inner, [values[i]]])
            m = np.concatenate([[margins[i - 1]], fine_margins, [margins[i]]])
            j = int(np.argmax(m >= 0.0))
            return Bracket(float(grid[j]), float(grid[j - 1]), float(m[j]), float(m[j - 1]), evaluated)
        grid = np.concatenate([[values[i]], inner, [values[i + 1]]])
        m = np.concatenate([[margins[i]], fine_margins, [margins[i + 1]]])
        j = len(m) - 1 - int(np.argmax((m >= 0.0)[::-1]))
        return Bracket(float(grid[j]), float(grid[j + 1]), float(m[j]), float(m[j + 1]), evaluated)


def _answer(sweep: _Sweep, requirement: Requirement, progress=None) -> Bracket:
    """One question on its own: two batches (size() batches the three questions together)."""
    half = (lambda f: progress(0.5 * f)) if progress is not None else None
    fine = sweep.fine_cases(_margins(sweep.coarse_cases(), requirement, half))
    rest = (lambda f: progress(0.5 + 0.5 * f)) if progress is not None else None
    return sweep.bracket(_margins(fine, requirement, rest) if fine else [])


def _severity_sweep(case: Case) -> _Sweep:
    bath = case.outer.bath_c

    def make(h_per_inch):
        return with_quenchant(case, Quenchant.constant(float(htc_from_grossmann(h_per_inch)), bath,
                                                       name=f"Grossmann H = {h_per_inch:.3g} 1/in"))

    return _Sweep(np.geomspace(*SEVERITY_RANGE_PER_INCH, COARSE_POINTS), make, True)


def _size_sweep(case: Case, requirement: Requirement) -> _Sweep:
    smallest = 2.0
    if requirement.depth_mm is not None:
        # The requirement's depth must lie inside the section: radius / half thickness / wall.
        factor = 1.0 if case.section.shape == "tube" or case.dimensions_mm.get("faces") == "one" else 2.0
        smallest = max(smallest, factor * requirement.depth_mm * 1.02)
    grid = np.geomspace(smallest, max(400.0, 4 * smallest), COARSE_POINTS)
    return _Sweep(grid, lambda s: with_size(case, s), False)


def mildest_severity(case: Case, requirement: Requirement, progress=None) -> Bracket:
    """(a) Smallest constant Grossmann H [1/in] that meets the requirement (bath as the case's)."""
    return _answer(_severity_sweep(case), requirement, progress)


def largest_size(case: Case, requirement: Requirement, progress=None) -> Bracket:
    """(c) Largest size (see variants.size_label) that meets the requirement in the case's quenchant."""
    return _answer(_size_sweep(case, requirement), requirement, progress)


def _length_sweep(case: Case) -> _Sweep:
    grid = np.geomspace(1000.0 * case.finite.part.outer_m, 40000.0 * case.finite.part.outer_m, COARSE_POINTS)
    return _Sweep(grid, lambda x: with_length(case, x), False)


def largest_length(case: Case, requirement: Requirement, progress=None) -> Bracket:
    """(c') A finite part: the largest length (its section kept; a stepped shaft's steps scaled
    alike) that meets the requirement along its profile line, from 0.5 to 20 diameters. The ends
    harden the middle of a short part, so lengths below the answer meet it; passing at the longest
    length means any does. The parts share one radial grid, so each sweep is one stacked batch."""
    return _answer(_length_sweep(case), requirement, progress)


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
    """All three sizing answers for a case and a requirement (the case's own if none is given).

    Two batches in all: the coarse severity and size sweeps (and a finite part's length sweep) with
    every quenchant, then the refinements (a batch costs about as much as its slowest case, not
    the sum). Each case is solved exactly as it would be alone, so the answers are those of the
    separate searches."""
    req = requirement or case.requirement
    if req is None:
        raise InputError("requirement", "(missing)", "a [requirement] table in the case or --min-hrc / --min-martensite")
    media = media if media is not None else [load_quenchant(n) for n in builtin_names()]
    severity, sizes = _severity_sweep(case), _size_sweep(case, req)
    lengths = _length_sweep(case) if getattr(case, "finite", None) is not None else None
    sweeps = [severity, sizes] + ([lengths] if lengths is not None else [])
    with_req = replace(case, requirement=req)
    coarse = [sw.coarse_cases() for sw in sweeps]
    first = coarse[0] + [with_quenchant(with_req, m) for m in media] + [c for cs in coarse[1:] for c in cs]
    # Progress: the first batch is the larger and slower one.
    results = simulate(first, None if progress is None else (lambda f: progress(0.8 * f)))
    a, b = len(coarse[0]), len(coarse[0]) + len(media)
    margins = [requirement_margin(r, req) for r in results]
    rows = sorted(comparison_from_results(with_req, media, results[a:b]).rows,
                  key=lambda r: (r["equivalent_h"] is None, r["equivalent_h"] or 0.0))
    per_sweep, at = [margins[:a]], b
    for cs in coarse[1:]:
        per_sweep.append(margins[at:at + len(cs)])
        at += len(cs)
    fine_cases = [sw.fine_cases(m) for sw, m in zip(sweeps, per_sweep)]
    todo = [c for cs in fine_cases for c in cs]
    fine = _margins(todo, req, None if progress is None else (lambda f: progress(0.8 + 0.2 * f))) if todo else []
    if progress is not None:
        progress(1.0)
    brackets, at = [], 0
    for sw, cs in zip(sweeps, fine_cases):
        brackets.append(sw.bracket(fine[at:at + len(cs)]))
        at += len(cs)
    return SizingAnswer(case, req, brackets[0], rows, brackets[1], size_label(case), case_size_mm(case),
                        brackets[2] if lengths is not None else None)

