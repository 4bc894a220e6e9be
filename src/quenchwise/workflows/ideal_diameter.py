"""The tool's own ideal critical diameter DI: found by simulation, not by a composition formula.

Grossmann's definition: DI is the diameter of the round bar whose centre holds 50 % martensite
after a quench of infinite severity. Here "infinite severity" is a constant h of
INFINITE_SEVERITY_HTC_W_M2K (Grossmann H of about 500 1/in, far beyond brine's 2): the surface
follows the bath within a fraction of a degree. Martensite is counted at the end of the quench
(centre below END_C; Koistinen-Marburger to that temperature).

Search: every steel gets a sweep of bar diameters around its ASTM A255 DI (ROUND1_SPAN, geometric),
all bars of all steels in one batched simulate() call; the two diameters that bracket 50 %
centre martensite are then refined by a second batched sweep inside the bracket, and DI is the
log-linear interpolation between the last bracketing pair. Two batched solves per call,
whatever the number of steels.
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
#: First sweep: from the A255 DI divided by this factor to the A255 DI times it.
ROUND1_SPAN = 3.0
ROUND1_POINTS = 5
ROUND2_POINTS = 3
#: Numerics of the DI bars: 20 cells instead of 40 (measured on six grades: DI changes by less than
#: 1 %, at half the cost); 5 + 3 diameters instead of 7 + 4 change it by less than 1 % as well.
DI_SETTINGS = SolverSettings(cells=20)
#: Diameters searched at most [mm].
SMALLEST_MM, LARGEST_MM = 4.0, 600.0
METHOD = ("simulated: 50 % martensite at the centre of a bar quenched with h = 1e6 W/(m2 K), "
          "batched two-round search")


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


def physics_ideal_diameters(cases: list[Case], progress: Callable[[float], None] | None = None,
                            settings: SolverSettings = DI_SETTINGS) -> list[IdealDiameter]:
    """DI of each case's steel (chemistry, grain size, austenitizing, kinetics model) by simulation;
    the bars use ``settings`` (not the case's mesh numerics)."""
    if not cases:
        return []
    first = []
    for c in cases:
        guess = a255_ideal_diameter(c.composition).mm
        lo = max(SMALLEST_MM, guess / ROUND1_SPAN)
        hi = min(LARGEST_MM, guess * ROUND1_SPAN)
        first.append(np.geomspace(lo, max(hi, lo * 1.5), ROUND1_POINTS))
    half = (lambda f: progress(0.5 * f)) if progress is not None else None
    m1 = _centre_martensite(cases, first, settings, half)
    sweeps = [_Sweep(d, m) for d, m in zip(first, m1)]
    second, todo = [], []
    for i, s in enumerate(sweeps):
        b = _bracket(s.diameters_mm, s.martensite)
        if b is not None:
            second.append(np.geomspace(s.diameters_mm[b[0]], s.diameters_mm[b[1]], ROUND2_POINTS + 2)[1:-1])
            todo.append(i)
    if todo:
        rest = (lambda f: progress(0.5 + 0.5 * f)) if progress is not None else None
        m2 = _centre_martensite([cases[i] for i in todo], second, settings, rest)
        for i, d, m in zip(todo, second, m2):
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
