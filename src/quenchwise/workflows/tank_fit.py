"""The tank's effective severity from a hardness traverse of a part quenched in it (``fit-tank``).

Adjustment: one factor s on the case's h(T) curve, h_tank(T) = s h_case(T) (radiation, if the
curve has any, is not scaled). The case describes the part, the steel and the tank's medium as
best known; the traverse (depth_mm, hrc) is from a cut section of that part quenched in the
plant's tank. s takes up what the case's curve misses about this tank: oil age, agitation, load.

Fit: the part is simulated at a grid of factors SCALES in one batch (workflows.simulate), the
hardness at the traverse depths is interpolated linearly in ln s between grid points, and s
minimizes the RMS difference on the extended HRC scale (measured.hrc_scale). The part is then
solved once more at the fitted s, which gives the RMS and the fitted traverse that are reported
(no interpolation in what is reported). Hardness is compared as the drawing reads it: tempered if
the case tempers ([temper]), else as quenched.

Not fitted: the temperature at which the vapour blanket collapses. A traverse is one number per
depth after the whole quench; how fast the surface went through the film stage and how strongly
it boiled are mixed in it, so a shift of the collapse temperature and a change of s give nearly the
same traverse over most of the range. A cooling curve of a probe in the same tank separates them
(``quenchwise probe``).

Ambiguity is reported: where every factor on the grid gives about the same traverse (a part
that hardens through at any severity, or one that never hardens), s is not determined; the
standard error se(ln s) = s_res / sqrt(sum (dHRC/d ln s)^2), s_res = max(RMS, SCATTER_HRC / 2), says
how well it is.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from ..case import Case
from ..thermal.quenchants import Quenchant
from ..measured import SCATTER_HRC, MeasuredCurve, hrc_scale
from .requirement import final_hv
from .simulate import _fit_measured, simulate
from .variants import with_quenchant

#: Factors on h(T) simulated for the fit.
SCALES = np.geomspace(0.125, 8.0, 13)
#: RMS above which the fit is reported as poor [HRC].
POOR_RMS_HRC = SCATTER_HRC
#: se(ln s) above which s is reported as poorly determined (a factor of about 1.5 either way).
LOOSE_SE_LN = 0.4


def scaled_quenchant(q: Quenchant, factor: float, name: str | None = None) -> Quenchant:
    """The same curve with h multiplied by factor (radiation unchanged; listed figures dropped).

    >>> q = scaled_quenchant(Quenchant.constant(1000.0, 20.0), 2.0)
    >>> float(q.htc(500.0))
    2000.0
    """
    # The table is cut to the -50..1400 C a curve file may hold (h is held constant beyond its
    # ends, so nothing changes): a constant curve's 0..2000 C table would not read back.
    t = np.clip(np.asarray(q.surface_c, dtype=float), -50.0, 1400.0)
    keep = np.concatenate([[True], np.diff(t) > 0])
    h = np.interp(t[keep], q.surface_c, q.htc_w_m2k) * float(factor)
    return replace(q, surface_c=t[keep], htc_w_m2k=h, name=name or f"{q.name} x {factor:.3g}",
                   listed_grossmann_h=None, listed_probe=None)


@dataclass
class TankFit:
    traverse: MeasuredCurve
    factor: float
    se_ln: float
    rms_hrc: float
    max_abs_hrc: float
    start_rms_hrc: float
    fitted_hrc: np.ndarray          # at the traverse depths, from the final solve
    start_hrc: np.ndarray           # the case's curve as given
    profile_depth_mm: np.ndarray    # whole fitted profile, surface to centre
    profile_hrc: np.ndarray
    quenchant: Quenchant
    warnings: list

    def summary(self) -> dict:
        return {"traverse": self.traverse.source, "points_used": self.traverse.n,
                "method": "one factor on the case's h(T), least squares on the hardness traverse",
                "factor": round(self.factor, 4),
                "factor_range_2se": [round(self.factor * math.exp(-2 * self.se_ln), 3),
                                     round(self.factor * math.exp(2 * self.se_ln), 3)],
                "rms_hrc": round(self.rms_hrc, 2), "max_abs_hrc": round(self.max_abs_hrc, 2),
                "start_rms_hrc": round(self.start_rms_hrc, 2), "quenchant": self.quenchant.name,
                "vapour_blanket_collapse": "not fitted (a traverse cannot separate it from the factor; "
                                           "a probe record can: quenchwise probe)",
                "equivalent_h_per_inch": self.equivalent_h_per_inch(), "warnings": list(self.warnings)}

    def equivalent_h_per_inch(self) -> float | None:
        """Equivalent Grossmann H of the fitted curve (thermal.severity); None where undefined."""
        from ..thermal.severity import equivalent_severities

        [sev] = equivalent_severities([self.quenchant])
        return None if sev.grossmann_h != sev.grossmann_h else round(sev.grossmann_h, 3)

    def rows(self) -> list[dict]:
        t = self.traverse
        return [{"depth_mm": float(d), "measured_hrc": float(m), "fitted_hrc": float(f), "start_hrc": float(s)}
                for d, m, f, s in zip(t.position_mm, t.hrc, self.fitted_hrc, self.start_hrc)]


def _at_depths(result, depth_mm) -> np.ndarray:
    """Final hardness (extended HRC) at depths below the outer surface, whatever the node order."""
    depth = result.depth_mm
    order = np.argsort(depth)
    return hrc_scale(np.interp(depth_mm, depth[order], final_hv(result)[order]))


def fit_tank(case: Case, traverse: MeasuredCurve, scales=SCALES, name: str | None = None) -> TankFit:
    """The factor on the case's h(T) that reproduces the traverse (module docstring)."""
    from ..errors import InputError

    thickness_mm = case.section.thickness_m * 1000.0
    if traverse.position_mm[-1] > thickness_mm + 1e-9:
        raise InputError("TRAVERSE", traverse.source, f"depths from 0 to {thickness_mm:g} mm (surface to centre "
                         f"of this part); the last is {traverse.position_mm[-1]:g} mm")
    # The heat's measured end-quench curve (if any) is fitted once, not at every solve below.
    [case], heat = _fit_measured([case])
    scales = np.asarray(scales, dtype=float)
    base = case.outer
    cases = [with_quenchant(case, scaled_quenchant(base, s)) for s in scales]
    results = simulate(cases)
    pred = np.array([_at_depths(r, traverse.position_mm) for r in results])   # (scales, n)
    ln = np.log(scales)
    fine = np.linspace(ln[0], ln[-1], 1201)
    interp = np.array([np.interp(fine, ln, pred[:, j]) for j in range(traverse.n)]).T
    rms = np.sqrt(np.mean((interp - traverse.hrc) ** 2, axis=1))
    k = int(np.argmin(rms))
    s = float(np.exp(fine[k]))
    slope = np.array([np.interp(fine[k], ln[:-1] + 0.5 * np.diff(ln), np.diff(pred[:, j]) / np.diff(ln))
                      for j in range(traverse.n)])
    se = max(float(rms[k]), SCATTER_HRC / 2.0) / math.sqrt(max(float(np.sum(slope ** 2)), 1e-12))
    q = scaled_quenchant(base, s, name=name or f"{base.name} x {s:.3g} (tank fit)")
    q = replace(q, source=f"fit-tank: {base.name} with h x {s:.4g}, fitted to the hardness traverse "
                          f"{traverse.source} ({traverse.n} readings)", kind=base.kind)
    [final, start] = simulate([with_quenchant(case, q), case])
    fitted = _at_depths(final, traverse.position_mm)
    start_hrc = _at_depths(start, traverse.position_mm)
    err = fitted - traverse.hrc
    rms_final = float(np.sqrt(np.mean(err ** 2)))
    warnings = list(heat[0].warnings) if heat else []
    if rms_final > POOR_RMS_HRC:
        warnings.append(f"fit-tank: poor fit, RMS {rms_final:.1f} HRC (more than the test's scatter of "
                        f"{SCATTER_HRC:g} HRC): one factor on h(T) does not reproduce this traverse; check the steel "
                        "(a measured_jominy of the heat helps) and the file")
    if k in (0, fine.size - 1):
        warnings.append(f"fit-tank: the factor stops at the end of its range ({s:.3g}); the tank is "
                        + ("more" if k == fine.size - 1 else "less") + " severe than the range covers")
    if se > LOOSE_SE_LN:
        warnings.append(f"fit-tank: the factor is poorly determined (x/÷ {math.exp(2 * se):.2g} at 2 standard "
                        "errors): this part's hardness hardly depends on the severity over the fitted range")
    depth = final.depth_mm
    order = np.argsort(depth)
    return TankFit(traverse, s, se, rms_final, float(np.max(np.abs(err))),
                   float(np.sqrt(np.mean((start_hrc - traverse.hrc) ** 2))), fitted, start_hrc, depth[order],
                   hrc_scale(final_hv(final)[order]), q, warnings)
