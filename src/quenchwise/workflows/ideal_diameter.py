"""The tool's own ideal critical diameter DI: found by simulation, not by a composition formula.

Grossmann's definition: DI is the diameter of the round bar whose centre holds 50 % martensite
after a quench of infinite severity. Here "infinite severity" is a constant h of
INFINITE_SEVERITY_HTC_W_M2K (Grossmann H of about 500 1/in, far beyond brine's 2): the surface
follows the bath within a fraction of a degree. Martensite is counted at the end of the quench
(centre below END_C; Koistinen-Marburger to that temperature).

Search: one batched sweep. Every steel gets SWEEP_POINTS bar diameters, geometric from its ASTM A255
DI divided by SWEEP_SPAN to the A255 DI times it; all bars of all steels go into one batched
simulate() call, and DI is the log-linear interpolation between the two diameters that bracket
50 % centre martensite. Only a steel whose DI lies outside its sweep gets a second batch
(EXTEND_POINTS diameters beyond the end of the sweep, EXTEND_FACTOR times further out).

Why one wide sweep rather than a coarse sweep and a refinement: a batch costs about the same
whatever the number of bars in it (thermal/solver.py), so 13 bars in one batch cost half as much
as 5 + 3 bars in two. The span covers the simulated DI of all 16 SAE J1268 H-band grades with both
the default and the published kinetics (simulated / A255 DI 0.88-2.18, measured). Against a
reference interpolated on a local grid 2.8 % apart, the one-sweep DI of those 32 steels is within
1.1 % (RMS 0.5 %), as the former two-round search was (5 + 3 bars: within 1.3 %, RMS 0.5 %).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Callable

import numpy as np

from ..case import Case
from ..hardness.hardenability import METRES_PER_INCH, IdealDiameter, a255_ideal_diameter
from ..thermal.geometry import Section
from ..thermal.quenchants import Quenchant
from ..thermal.solver import SolverSettings
from .batch import simulate

INFINITE_SEVERITY_HTC_W_M2K = 1.0e6
END_C = 40.0
BATH_C = 20.0
#: The sweep: from the A255 DI divided by SWEEP_SPAN to the A255 DI times it, SWEEP_POINTS bars
#: (16.5 % apart).
SWEEP_SPAN = 2.5
SWEEP_POINTS = 13
#: Beyond the sweep (DI not bracketed): EXTEND_POINTS more bars out to EXTEND_FACTOR times its end.
EXTEND_FACTOR = 4.0
EXTEND_POINTS = 7
#: Numerics of the DI bars: 20 cells instead of 40 (measured on six grades: DI changes by less than
#: 1 %, at half the cost).
DI_SETTINGS = SolverSettings(cells=20)
#: Diameters searched at most [mm].
SMALLEST_MM, LARGEST_MM = 4.0, 600.0
METHOD = ("simulated: 50 % martensite at the centre of a bar quenched with h = 1e6 W/(m2 K), "
          "one batched sweep of bar diameters")


@dataclass(frozen=True)
class _Sweep:
    diameters_mm: np.ndarray
    martensite: np.ndarray


def _bar_case(case: Case, diameter_mm: float, settings: SolverSettings) -> Case:
    quench = Quenchant.constant(INFINITE_SEVERITY_HTC_W_M2K, BATH_C, name="infinite severity (h = 1e6 W/m2K)")
    return replace(case, title=f"{case.title or 'steel'}: DI bar {diameter_mm:.1f} mm",
                   section=Section.bar(diameter_mm / 1000.0), outer=quench, inner=None, end_c=END_C,
                   temper=None, dimensions_mm={"diameter_mm": float(diameter_mm)}, settings=settings)


def _centre_martensite(cases: list[Case], diameters: list[np.ndarray], settings: SolverSettings,
                       progress=None) -> list[np.ndarray]:
    bars = [_bar_case(c, d, settings) for c, ds in zip(cases, diameters) for d in ds]
    results = simulate(bars, progress)
    out, k = [], 0
    for ds in diameters:
        # The centre is the node deepest below the surface (right in either array order of Result).
        out.append(np.array([float(r.fractions["martensite"][np.argmax(r.depth_mm)]) for r in results[k:k + len(ds)]]))
        k += len(ds)
    return out


def _bracket(d: np.ndarray, m: np.ndarray) -> tuple[int, int] | None:
    """Indices (i, i+1) with m[i] >= 0.5 > m[i+1] (the last such crossing), or None."""
    above = m >= 0.5
    idx = [i for i in range(len(d) - 1) if above[i] and not above[i + 1]]
    return (idx[-1], idx[-1] + 1) if idx else None


def _interpolate(d0, m0, d1, m1) -> float:
    """Diameter where centre martensite is 0.5, linear in log(diameter).

    >>> round(_interpolate(100.0, 0.7, 200.0, 0.3), 1)
    141.4
    """
    w = (m0 - 0.5) / (m0 - m1)
    return float(np.exp(np.log(d0) + w * (np.log(d1) - np.log(d0))))


def _sweep(guess_mm: float) -> np.ndarray:
    """Diameters of the first batch around a guess of DI [mm].

    >>> d = _sweep(100.0)
    >>> round(float(d[0]), 1), round(float(d[-1]), 1), len(d)
    (40.0, 250.0, 13)
    """
    lo = max(SMALLEST_MM, guess_mm / SWEEP_SPAN)
    hi = min(LARGEST_MM, guess_mm * SWEEP_SPAN)
    return np.geomspace(lo, max(hi, lo * 1.5), SWEEP_POINTS)


def _extension(s: _Sweep) -> np.ndarray | None:
    """Diameters beyond the end of a sweep that did not bracket 50 % (None at the search limits)."""
    if s.martensite[-1] >= 0.5:          # every bar hardened: DI is larger
        end, far = s.diameters_mm[-1], min(LARGEST_MM, s.diameters_mm[-1] * EXTEND_FACTOR)
    else:                                # none did: DI is smaller
        end, far = s.diameters_mm[0], max(SMALLEST_MM, s.diameters_mm[0] / EXTEND_FACTOR)
    if abs(np.log(far / end)) < 1e-9:
        return None
    return np.geomspace(end, far, EXTEND_POINTS + 1)[1:]


def physics_ideal_diameters(cases: list[Case], progress: Callable[[float], None] | None = None,
                            settings: SolverSettings = DI_SETTINGS) -> list[IdealDiameter]:
    """DI of each case's steel (chemistry, grain size, austenitizing, kinetics model) by simulation;
    the bars use ``settings`` (not the case's mesh numerics)."""
    if not cases:
        return []
    first = [_sweep(a255_ideal_diameter(c.composition).mm) for c in cases]
    m1 = _centre_martensite(cases, first, settings, progress)
    sweeps = [_Sweep(d, m) for d, m in zip(first, m1)]
    todo = [i for i, s in enumerate(sweeps) if _bracket(s.diameters_mm, s.martensite) is None
            and _extension(s) is not None]
    if todo:
        more = [_extension(sweeps[i]) for i in todo]
        for i, d, m in zip(todo, more, _centre_martensite([cases[i] for i in todo], more, settings)):
            s = sweeps[i]
            order = np.argsort(np.concatenate([s.diameters_mm, d]))
            sweeps[i] = _Sweep(np.concatenate([s.diameters_mm, d])[order], np.concatenate([s.martensite, m])[order])
    out = []
    for s in sweeps:
        b = _bracket(s.diameters_mm, s.martensite)
        if b is None:
            d = s.diameters_mm[0] if s.martensite[0] < 0.5 else s.diameters_mm[-1]
            side = "below" if s.martensite[0] < 0.5 else "above"
            out.append(IdealDiameter(d / 1000.0 / METRES_PER_INCH, METHOD,
                                     (f"50 % centre martensite not bracketed: DI is {side} {d:.0f} mm",)))
            continue
        i, j = b
        d = _interpolate(s.diameters_mm[i], s.martensite[i], s.diameters_mm[j], s.martensite[j])
        out.append(IdealDiameter(d / 1000.0 / METRES_PER_INCH, METHOD,
                                 (f"bracketed by {s.diameters_mm[i]:.1f} mm ({100 * s.martensite[i]:.0f} % martensite) "
                                  f"and {s.diameters_mm[j]:.1f} mm ({100 * s.martensite[j]:.0f} %)",)))
    return out
