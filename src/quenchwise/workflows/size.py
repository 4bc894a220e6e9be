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
from .variants import case_size_mm, size_label, with_quenchant, with_size

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


@dataclass
class SizingAnswer:
    case: Case
    requirement: Requirement
    severity: Bracket
    quenchants: list          # rows of compare() for the built-ins, mildest first, meeting flag
    size: Bracket
    size_label: str
    case_size_mm: float

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
        }


def size(case: Case, requirement: Requirement | None = None, media: list[Quenchant] | None = None,
         progress: Callable[[float], None] | None = None) -> SizingAnswer:
    """All three sizing answers for a case and a requirement (the case's own if none is given).

    Two batches in all: the coarse severity and size sweeps and every quenchant together, then
    both refinements together (a batch costs about as much as its slowest case, not the sum).
    Each case is solved exactly as it would be alone, so the answers are those of three separate
    searches."""
    req = requirement or case.requirement
    if req is None:
        raise InputError("requirement", "(missing)", "a [requirement] table in the case or --min-hrc / --min-martensite")
    media = media if media is not None else [load_quenchant(n) for n in builtin_names()]
    severity, sizes = _severity_sweep(case), _size_sweep(case, req)
    with_req = replace(case, requirement=req)
    first = severity.coarse_cases() + [with_quenchant(with_req, m) for m in media] + sizes.coarse_cases()
    # Progress: the first batch is the larger and slower one.
    results = simulate(first, None if progress is None else (lambda f: progress(0.8 * f)))
    a, b = len(severity.values), len(severity.values) + len(media)
    margins = [requirement_margin(r, req) for r in results]
    rows = sorted(comparison_from_results(with_req, media, results[a:b]).rows,
                  key=lambda r: (r["equivalent_h"] is None, r["equivalent_h"] or 0.0))
    fine_severity = severity.fine_cases(margins[:a])
    fine_size = sizes.fine_cases(margins[b:])
    fine = _margins(fine_severity + fine_size, req,
                    None if progress is None else (lambda f: progress(0.8 + 0.2 * f))) if fine_severity or fine_size else []
    if progress is not None:
        progress(1.0)
    k = len(fine_severity)
    return SizingAnswer(case, req, severity.bracket(fine[:k]), rows, sizes.bracket(fine[k:]), size_label(case),
                        case_size_mm(case))
