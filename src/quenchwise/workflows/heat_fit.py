"""The heat's own hardenability: fit the steel to its measured end-quench curve.

Adjustment (one number): the heat's effective position t in its grade's chemistry range. Every
specified element moves together, from the nominal (t = 0) towards the range's upper limits
(t = +1) or lower limits (t = -1), linearly (beyond +/-1 the same line continues); without a
grade, each element moves by RELATIVE_SPAN of its value per unit t. This is the basis of the
H-band itself: SAE J1268 bands are the end-quench curves of a grade's chemistry range, the lean
edge giving the band's minimum (ASTM A255 computes hardenability from the chemistry the same
way). Moving the chemistry, rather than only a time scale, keeps what the curve says about both
the kinetics (the Li et al. 1998 time constants) and the hardness of the products
(Maynier et al. 1978): a lean heat's bainite is softer as well as earlier. The fitted t is an
effective number, not a chemical analysis: it absorbs residual elements, grain size and the
model's own error for this heat.

Fit: the end-quench test (workflows.jominy, 1-D axial) of the case's steel is simulated at a grid
of t values in one batch; hardness is interpolated linearly in t between grid points, and t
minimizes the RMS difference from the readings on the extended HRC scale (measured.hrc_scale:
HRB and soft readings count in HRC-sized steps). Its standard error comes from the slope of the
predictions with t: se = s / sqrt(sum (dHRC/dt)^2), s = max(RMS, SCATTER_HRC / 2).

Warnings: RMS above POOR_RMS_HRC (the curve's shape is not one of this grade's: another grade, a
mixed-up file), t at the end of GRID, and readings outside the grade's SAE J1268 H-band by more
than the test's scatter (hardness/hbands_sae_j1268.csv, memory).
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass, replace
from functools import lru_cache
from importlib import resources

import numpy as np

from ..case import Case
from ..steel.composition import Composition
from ..steel.grades import find_grade
from ..measured import SCATTER_HRC, SIXTEENTH_MM, MeasuredCurve, hrc_scale

#: Positions t in the chemistry range simulated for the fit (2 = twice the range's half-width).
GRID = np.linspace(-2.0, 2.0, 9)
#: Without a grade: relative change of every element per unit t (a typical half-range of an
#: alloy-steel specification, e.g. Cr 0.80-1.10 about 0.95: +/-16 %; choice, no source).
RELATIVE_SPAN = 0.15
#: Elements that move with t.
ELEMENTS = ("c", "mn", "si", "ni", "cr", "mo", "v", "cu")
#: RMS above which the fit is reported as poor [HRC]: the ASTM A255 scatter (measured.SCATTER_HRC).
POOR_RMS_HRC = SCATTER_HRC
METHOD = ("effective position t of the heat in its grade's chemistry range (0 nominal, -1 lower limits, "
          "+1 upper limits, all elements together), fitted by least squares to the measured end-quench curve")


@dataclass
class HeatFit:
    source: str
    position: float              # t
    position_se: float
    composition: dict            # effective chemistry at t [wt%]
    rms_hrc: float
    max_abs_hrc: float
    points_used: int
    distance_mm: np.ndarray
    measured_hrc: np.ndarray
    fitted_hrc: np.ndarray
    nominal_hrc: np.ndarray
    warnings: list

    def summary(self) -> dict:
        return {"file": self.source, "method": METHOD, "position": round(self.position, 3),
                "position_se": round(self.position_se, 3),
                "composition_wt_pct": {k: round(v, 4) for k, v in self.composition.items()}, "rms_hrc": round(self.rms_hrc, 2),
                "max_abs_hrc": round(self.max_abs_hrc, 2), "points_used": self.points_used,
                "rms_hrc_nominal": round(float(np.sqrt(np.mean((self.nominal_hrc - self.measured_hrc) ** 2))), 2),
                "warnings": list(self.warnings)}


def chemistry_at(case: Case, t: float) -> dict:
    """The case's chemistry moved to position t of its grade's range (module docstring) [wt%].

    Elements are kept at or above zero; a grade's unranged element (min = max) stays put.
    """
    nominal = case.composition.as_dict()
    ranges = find_grade(case.grade).range if case.grade else {}
    out = dict(nominal)
    for e in ELEMENTS:
        v = nominal.get(e, 0.0)
        if e in ranges:
            lo, hi = ranges[e]
            step = (hi - v) if t >= 0 else (v - lo)
        else:
            step = RELATIVE_SPAN * v if not ranges else 0.0
        out[e] = max(0.0, v + t * step)
    return out


def _grid_curves(cases: list[Case], curves: list[MeasuredCurve], grid) -> list[np.ndarray]:
    """Predicted hardness (extended HRC) at each curve's distances, (len(grid), n) per case; all
    end-quench bars of all cases in one batch."""
    from .jominy import jominy

    bars = [replace(c, composition=Composition(**chemistry_at(c, float(t))), measured_jominy=None)
            for c in cases for t in grid]
    results = jominy(bars, physics_di=False)
    out = []
    for i, curve in enumerate(curves):
        rs = results[i * len(grid):(i + 1) * len(grid)]
        out.append(np.array([hrc_scale(r.read(r.hv_cells, curve.position_mm)) for r in rs]))
    return out


def fit_heats(cases: list[Case], grid=GRID) -> list[HeatFit]:
    """The effective chemistry position of every case's steel from its measured_jominy (module docstring)."""
    grid = np.asarray(grid, dtype=float)
    curves = [c.measured_jominy for c in cases]
    fine = np.arange(grid[0], grid[-1] + 1e-9, 0.01)
    fits = []
    for case, curve, pred in zip(cases, curves, _grid_curves(cases, curves, grid)):
        # Linear interpolation in G of every reading's prediction, then the RMS on the fine grid.
        interp = np.array([np.interp(fine, grid, pred[:, j]) for j in range(curve.n)]).T
        rms = np.sqrt(np.mean((interp - curve.hrc) ** 2, axis=1))
        k = int(np.argmin(rms))
        g = float(fine[k])
        slope = np.array([np.interp(g, grid[:-1] + 0.5 * np.diff(grid), np.diff(pred[:, j]) / np.diff(grid))
                          for j in range(curve.n)])
        s = max(float(rms[k]), SCATTER_HRC / 2.0)
        se = s / math.sqrt(max(float(np.sum(slope ** 2)), 1e-12))
        nominal = np.array([np.interp(0.0, grid, pred[:, j]) for j in range(curve.n)])
        fitted = interp[k]
        warnings = []
        if rms[k] > POOR_RMS_HRC:
            warnings.append(f"measured_jominy: poor fit, RMS {rms[k]:.1f} HRC over {curve.n} readings (more than the "
                            f"test's scatter of {SCATTER_HRC:g} HRC): the one-number adjustment does not follow this "
                            "curve; check the grade and the file")
        if k in (0, fine.size - 1):
            warnings.append(f"measured_jominy: the fitted chemistry position stops at the end of its range ({g:g}); the "
                            "heat hardens " + ("more" if k == fine.size - 1 else "less") + " than the adjustment can follow")
        warnings += hband_warnings(case.grade, curve)
        fits.append(HeatFit(curve.source, g, se, chemistry_at(case, g), float(rms[k]),
                            float(np.max(np.abs(fitted - curve.hrc))), curve.n, curve.position_mm, curve.hrc,
                            fitted, nominal, warnings))
    return fits


def fitted_case(case: Case, fit: HeatFit) -> Case:
    """The case's steel with its fitted hardenability (measured_jominy consumed)."""
    return replace(case, composition=Composition(**fit.composition), measured_jominy=None)


@lru_cache(maxsize=1)
def _hbands() -> dict:
    text = (resources.files("quenchwise.hardness") / "hbands_sae_j1268.csv").read_text("utf-8")
    rows = csv.DictReader([ln for ln in text.splitlines() if ln.strip() and not ln.startswith("#")])
    out: dict = {}
    for r in rows:
        out.setdefault(r["grade"], []).append((float(r["sixteenths"]) * SIXTEENTH_MM,
                                               float(r["min_hrc"]) if r["min_hrc"] else -math.inf,
                                               float(r["max_hrc"]) if r["max_hrc"] else math.inf))
    return {k: np.array(v) for k, v in out.items()}


def hband_warnings(grade: str | None, curve: MeasuredCurve) -> list[str]:
    """A warning when readings lie outside the grade's H-band by more than the test's scatter
    (bands interpolated linearly between their positions; readings beyond the band not checked)."""
    if not grade:
        return []
    name = grade if grade.upper().endswith("H") else f"{grade}H"
    band = _hbands().get(name)
    if band is None:
        return []
    inside = (curve.position_mm >= band[0, 0]) & (curve.position_mm <= band[-1, 0])
    lo = np.interp(curve.position_mm, band[:, 0], np.where(np.isfinite(band[:, 1]), band[:, 1], -1e9))
    hi = np.interp(curve.position_mm, band[:, 0], np.where(np.isfinite(band[:, 2]), band[:, 2], 1e9))
    out = inside & ((curve.hrc < lo - SCATTER_HRC) | (curve.hrc > hi + SCATTER_HRC))
    if not out.any():
        return []
    where = ", ".join(f"{d:.1f} mm" for d in curve.position_mm[out][:4]) + (" ..." if out.sum() > 4 else "")
    return [f"measured_jominy: {int(out.sum())} of {curve.n} readings lie outside the {name} band of SAE J1268 "
            f"(memory) by more than {SCATTER_HRC:g} HRC (at {where}): is this heat the grade the case names?"]
