"""Equivalent Grossmann severity H of any quenchant curve.

Definition used throughout quenchwise
-------------------------------------
The equivalent severity of a curve h(T_surface) at its bath temperature is the Grossmann H of
the *constant* heat-transfer coefficient that gives the same centre cooling time from 800 C to
500 C in a long round bar of 25 mm (1 inch) diameter, quenched from a uniform 850 C into the
same bath, with pure conduction (no transformation, no latent heat) and a fixed property set:

    conductivity k = 25 W/(m K)   (GROSSMANN_CONDUCTIVITY_W_MK, the same k as in H = h / (2 k))
    density      rho = 7800 kg/m3, specific heat cp = 600 J/(kg K)

H = h_eq / (2 k) with H in 1/inch (Grossmann, Asimow & Urban 1939, Hardenability of Alloy
Steels, ASM). With constant properties the problem depends only on the Biot number h R / k and
the Fourier number k t / (rho cp R^2): rho and cp rescale every time alike and cancel from the
equivalence, so only k and the bar size define the number (a test checks this). Taking k equal
to the k of the H <-> h conversion makes a constant-h quench return exactly its own H.

Why 800 -> 500 C at the centre of a 25 mm bar: it is the range where the diffusional products
form in hardenable steels, and 25 mm is the size of the end-quench bar and of Grossmann's inch.
The number is a summary for comparison and listing: the simulations always use the whole
curve. Other definitions (another bar size or window) give other numbers for the same curve,
because a real curve is not a constant.

How it is computed (fast): every curve plus a geometric sweep of constant h values are solved
together in ONE FiPy batch (thermal.solver.BatchSolver, stepper None). A constant-h quench
with constant properties is linear, so the sweep is run once into a bath at 0 C and its
dimensionless centre history theta(t) = (T_c - T_bath) / (850 - T_bath) serves every bath
temperature; for a curve with bath T_b the reference time is t(theta_500) - t(theta_800) with
theta_x = (x - T_b) / (850 - T_b). The equivalent h is then interpolated (monotone cubic in
log h against log time). Curves and references share the mesh and time stepping, so their
discretization errors largely cancel.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..interpolation import pchip
from .geometry import Section
from .quenchants import GROSSMANN_CONDUCTIVITY_W_MK, Quenchant, grossmann_from_htc, htc_from_grossmann
from .solver import BatchSolver, SolverSettings, ThermalCase

REFERENCE_DIAMETER_M = 0.025
START_C = 850.0
UPPER_C = 800.0
LOWER_C = 500.0
DENSITY_KG_M3 = 7800.0
SPECIFIC_HEAT_J_KGK = 600.0
#: Constant-h sweep, Grossmann H [1/inch]: from well below still air to well above violently
#: agitated brine.
SWEEP_H = np.geomspace(0.004, 12.0, 36)
#: Numerics of the definition (fixed, so the numbers do not move with the solver defaults).
SETTINGS = SolverSettings(cells=30, growth=1.08, max_temperature_step_k=10.0, first_step_s=0.002,
                          max_time_s=20000.0)
#: A curve weaker than this anywhere between 480 and 850 C gets no number (it would take hours;
#: the sweep's weakest member is about 8 W/(m2 K)).
MIN_HTC_W_M2K = 5.0
DEFINITION = ("constant h giving the same centre cooling time 800->500 C in a 25 mm bar from 850 C "
              "(pure conduction, k = 25 W/mK); H = h/(2k)")


@dataclass(frozen=True)
class Severity:
    """Equivalent severity of one curve."""

    name: str
    bath_c: float
    time_800_500_s: float          # centre cooling time of the curve itself (nan if not reached)
    htc_w_m2k: float               # equivalent constant h (nan if outside the sweep)
    grossmann_h: float             # H [1/inch]
    note: str = ""                 # why a number is missing, or "" when all is well


def _case(name: str, q: Quenchant, end_c: float, k: float) -> ThermalCase:
    return ThermalCase(name=name, section=Section.bar(REFERENCE_DIAMETER_M), outer=q, initial_c=START_C,
                       end_c=end_c, conductivity_w_mk=k, density_kg_m3=DENSITY_KG_M3,
                       specific_heat_j_kgk=SPECIFIC_HEAT_J_KGK)


def _crossing(time_s: np.ndarray, values: np.ndarray, level: float) -> float:
    """First time a falling history passes below level (linear between samples); nan if never."""
    below = np.flatnonzero(values <= level)
    if below.size == 0:
        return float("nan")
    i = below[0]
    if i == 0:
        return float(time_s[0])
    v0, v1 = values[i - 1], values[i]
    return float(time_s[i - 1] + (v0 - level) / (v0 - v1) * (time_s[i] - time_s[i - 1]))


def _can_finish(q: Quenchant) -> bool:
    """A curve that (nearly) stops removing heat somewhere in the window would never end the run."""
    t = np.linspace(LOWER_C - 20.0, START_C, 88)
    return bool(q.bath_c < LOWER_C - 20.0 and np.min(q.htc(t)) >= MIN_HTC_W_M2K)


def equivalent_severities(quenchants: list[Quenchant], conductivity_w_mk: float = GROSSMANN_CONDUCTIVITY_W_MK,
                          sweep_h: np.ndarray = SWEEP_H) -> list[Severity]:
    """Equivalent Grossmann H of every curve, all curves and the constant-h sweep in one batch.

    A constant h returns its own H (short sweep here, to keep the example quick):

    >>> s = equivalent_severities([Quenchant.constant(float(htc_from_grossmann(0.5)), 40.0)],
    ...                           sweep_h=np.geomspace(0.2, 1.0, 6))[0]
    >>> round(s.grossmann_h, 2), s.note
    (0.5, '')
    """
    k = float(conductivity_w_mk)
    sweep_h = np.asarray(sweep_h, dtype=float)
    sweep_htc = 2.0 * k * sweep_h / 0.0254
    lowest_theta = min([(LOWER_C - q.bath_c) / (START_C - q.bath_c) for q in quenchants] + [LOWER_C / START_C])
    ref_end = START_C * lowest_theta - 10.0
    cases = [_case(f"constant {h:.4g}", Quenchant.constant(h, 0.0), ref_end, k) for h in sweep_htc]
    usable = [i for i, q in enumerate(quenchants) if _can_finish(q)]
    cases += [_case(quenchants[i].name, quenchants[i], LOWER_C - 10.0, k) for i in usable]
    histories = BatchSolver(cases, SETTINGS).run(None)
    refs, curves = histories[: len(sweep_htc)], histories[len(sweep_htc):]
    curve_of = dict(zip(usable, curves))

    out = []
    for i, q in enumerate(quenchants):
        if i not in curve_of:
            out.append(Severity(q.name, q.bath_c, float("nan"), float("nan"), float("nan"),
                                f"h below {MIN_HTC_W_M2K:g} W/m2K somewhere between 480 and 850 C, or bath above 480 C"))
            continue
        hist = curve_of[i]
        centre = hist.temperature_c[:, 0]
        t_curve = _crossing(hist.time_s, centre, LOWER_C) - _crossing(hist.time_s, centre, UPPER_C)
        th_hi = (UPPER_C - q.bath_c) / (START_C - q.bath_c)
        th_lo = (LOWER_C - q.bath_c) / (START_C - q.bath_c)
        t_ref = np.array([_crossing(r.time_s, r.temperature_c[:, 0] / START_C, th_lo)
                          - _crossing(r.time_s, r.temperature_c[:, 0] / START_C, th_hi) for r in refs])
        h_eq, note = _invert(t_ref, sweep_htc, t_curve)
        out.append(Severity(q.name, q.bath_c, t_curve, h_eq, float(grossmann_from_htc(h_eq, k)), note))
    return out


def _invert(t_ref: np.ndarray, htc: np.ndarray, t_curve: float) -> tuple[float, str]:
    """Constant h whose reference time equals t_curve (times fall as h rises)."""
    x = np.log(t_ref[::-1])
    y = np.log(htc[::-1])
    if not np.all(np.diff(x) > 0):
        raise RuntimeError("reference cooling times are not monotonic in h; refine SETTINGS")
    lt = np.log(t_curve)
    if lt < x[0]:
        return float("nan"), f"faster than the sweep's top (H > {grossmann_from_htc(htc[-1]):.3g} 1/in)"
    if lt > x[-1]:
        return float("nan"), f"slower than the sweep's bottom (H < {grossmann_from_htc(htc[0]):.3g} 1/in)"
    return float(np.exp(pchip(x, y, lt))), ""


def grossmann_h_values(quenchants: list) -> list[float | None]:
    """Equivalent Grossmann H [1/inch] of each quenchant (None entries pass through, and None where
    no number can be given): constants exactly (H = h / 2k), built-in curves at their own bath
    from their listed value, every other curve computed, all of those in one batch.

    >>> grossmann_h_values([Quenchant.constant(float(htc_from_grossmann(0.5)), 40.0), None])
    [0.5, None]
    """
    todo = [q for q in quenchants if q is not None and q.kind != "constant" and q.listed_grossmann_h is None]
    found = {id(q): s.grossmann_h for q, s in zip(todo, equivalent_severities(todo))} if todo else {}
    out = []
    for q in quenchants:
        if q is None:
            out.append(None)
            continue
        if q.kind == "constant":
            h = float(grossmann_from_htc(q.htc_w_m2k[0]))
        elif q.listed_grossmann_h is not None:
            h = q.listed_grossmann_h
        else:
            h = found[id(q)]
        out.append(float(h) if np.isfinite(h) else None)
    return out
