"""Cooling-curve probe: h(T_surface) of a quenchant from the centre cooling curve of the probe.

The probe is the ISO 9950 type: a cylinder of alloy 600 (Inconel 600), 12.5 mm in diameter and
60 mm long, with a thermocouple at its geometric centre, plunged from about 850 C into the bath.
The lab records the centre temperature against time; this module turns that record into a
quenchant curve h(T_surface) by inverse heat conduction, and runs the curve forward again to show
how well it reproduces the measurement.

Model: the inversion runs on 1-D radial conduction in an infinitely long cylinder of the probe's
radius, alloy 600 properties varying with temperature (INCONEL600_* tables below), uniform start
at the first measured temperature. The real probe is 60 mm long and its end faces lose heat too.
The thermocouple sits 30 mm (4.8 radii) from either end, so the ends' influence reaches it only by
axial diffusion; a 2-D axisymmetric model of the whole probe (FiniteProbeModel, same h on side and
ends) shows how much: in a slow (still) oil the centre of the finite probe runs cooler than an
infinitely long one by about 1 K at 700 C, 5 K at 500 C and 8 K at 300 C; in still water by about
2 K. Read with the 1-D model alone, that makes h of a slow oil 4-8 % high at 300-550 C (its own
end losses charged to the side). So 1-D alone is adequate for water, brine and fast quenchants,
and fit_probe adds an end correction for all (defect correction: see fit_probe), which brings the
slow-oil error back to that of the 1-D method itself (tests/thermal/test_quenchants_probe.py).

Inverse method: Beck's sequential function specification (J.V. Beck, B. Blackwell, C.R. St. Clair,
Inverse Heat Conduction: Ill-Posed Problems, Wiley 1985, ch. 4 and 7): at each time step the
surface heat flux q is taken constant over the next r "future" steps and chosen to match the r
future measurements in least squares, with a first-order (Tikhonov) penalty alpha (q - q_prev)^2
that damps noise; only the first step is kept and the procedure moves on. The properties are
frozen over each future window (at a reference field renewed every REFRESH_K), which makes the
window's response exactly linear in q: T_centre = T0 + X q, X the sensitivity coefficients. The
window length is chosen by the discrepancy principle from the record's own noise (invert). Then
h = -q / (T_surface - T_bath) at each step, and the pairs (T_surface, h) are reduced to bin
medians every 10 K of surface temperature, lightly smoothed, into the table written out.

Forward models (own numpy/scipy solvers, not FiPy): cell-centred finite volumes, BDF2 in time
(implicit Euler first step); 1-D: a tridiagonal system per step; 2-D: a sparse LU per step. The
inversion needs the response of the next r steps (r = 15-50) at each of about a thousand steps;
FiPy's fixed cost of about 10 ms per solve call would make one inversion take minutes, while the
window response here is a few small dense products, renewed only when the field has moved by
REFRESH_K. The same solvers with a surface film coefficient (in series with the half cell, h
lagged by one step) give the end correction, the refit and synthetic records.

Inconel 600 properties (memory; typical values as tabulated in the alloy producer's data sheet
for alloy 600): density 8470 kg/m3; conductivity and specific heat in INCONEL600_* (probe_model.py).

Files, by job: probe_record.py (reading and checking a record, thermocouple lag), probe_model.py
(the forward models and alloy 600 properties), this module (the inversion, fit_probe, synthetic
records), probe_figures.py (probe figures of a curve). Their public names are importable from here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from scipy.linalg import solve_banded

from ..errors import InputError
from .quenchants import Quenchant
from .probe_model import FiniteProbeModel, ProbeModel, end_effect
from .probe_record import FAST_SAMPLING_HZ, ProbeCurve, REFIT_WARN_K, lag_corrected
# The parts of the probe method, re-exported so thermal.probe stays the one place to import from.
from .probe_figures import (FIGURE_NAMES, FIGURE_SEGMENTS_S, cooling_curve_figures,  # noqa: F401,E402
                            probe_cooling, probe_figures)
from .probe_model import (INCONEL600_DENSITY_KG_M3, PROBE_DIAMETER_M, PROBE_LENGTH_M,  # noqa: F401,E402
                          inconel600_conductivity, inconel600_specific_heat)
from .probe_record import (MAX_RATE_K_S, MIN_DROP_K, START_RANGE_C, check_probe_curve,  # noqa: F401,E402
                           parse_probe_curve, read_probe_curve)


#: The inversion stops when the centre is this close to the bath (h = q / (T_s - T_bath) becomes
#: ill-conditioned near the bath temperature).
STOP_ABOVE_BATH_K = 30.0
#: The table of h(T_surface) starts this far above the bath; below it h is held constant.
TABLE_ABOVE_BATH_K = 25.0
#: The window's response (frozen properties) is renewed when the field has moved this far [K]
#: (alloy 600 properties change by about 0.2 % over 10 K).
REFRESH_K = 10.0


@dataclass
class ProbeFit:
    """Result of an inversion: the per-step estimates and the tabulated curve."""

    time_s: np.ndarray              # uniform time grid of the inversion
    measured_c: np.ndarray          # measurement on that grid
    flux_w_m2: np.ndarray           # surface heat flux into the probe (negative when cooling)
    surface_c: np.ndarray           # estimated surface temperature
    htc_w_m2k: np.ndarray           # h at each step (nan where not defined)
    table_surface_c: np.ndarray
    table_htc_w_m2k: np.ndarray
    bath_c: float
    future_steps: int
    regularization: float
    dt_s: float
    refit_c: np.ndarray | None = None
    rms_k: float = float("nan")
    max_k: float = float("nan")
    residual_k: float = float("nan")   # RMS of measured - model centre along the inversion
    noise_k: float = float("nan")      # noise level estimated from the record (discrepancy rule)
    end_correction_k: float = 0.0      # largest end-face correction applied to the record [K]
    tc_time_constant_s: float = 0.0    # thermocouple lag removed from the record [s]
    warnings: list = field(default_factory=list)


def _uniform(time_s, temperature_c, dt):
    """Samples on a uniform grid from the first sample: bin averages when the record is denser
    than dt, linear interpolation otherwise."""
    t0 = time_s[0]
    grid = t0 + np.arange(int(math.floor((time_s[-1] - t0) / dt)) + 1) * dt
    y = np.interp(grid, time_s, temperature_c)
    if np.median(np.diff(time_s)) < 0.5 * dt:
        idx = np.clip(np.round((time_s - t0) / dt).astype(int), 0, grid.size - 1)
        sums = np.bincount(idx, temperature_c, minlength=grid.size)
        counts = np.bincount(idx, minlength=grid.size)
        y = np.where(counts > 0, sums / np.maximum(counts, 1), y)
        y[0] = temperature_c[0]
    return grid - t0, y


#: Future windows tried by the discrepancy rule [s] (the centre answers a surface change after
#: about 0.1 R^2 / alpha, roughly 1 s in this probe).
FUTURE_WINDOWS_S = (0.8, 1.0, 1.25, 1.5, 2.0, 2.5)
#: Discrepancy rule: keep the longest window whose residual stays within this factor of the noise.
DISCREPANCY_FACTOR = 1.1


def noise_level(temperature_c) -> float:
    """Noise standard deviation of a smooth record sampled uniformly [K], from the median absolute
    deviation of second differences (var of y[i+1] - 2 y[i] + y[i-1] is 6 sigma^2 for white noise).

    >>> y = 800 - np.arange(400) * 0.5 + np.random.default_rng(3).normal(0, 1.0, 400)
    >>> round(noise_level(y), 1)
    1.0
    """
    d2 = np.diff(np.asarray(temperature_c, dtype=float), 2)
    return float(1.4826 * np.median(np.abs(d2 - np.median(d2))) / math.sqrt(6.0))


def invert(curve: ProbeCurve, bath_c: float, dt_s: float | None = None, future_s: float | None = None,
           regularization: float = 1.0, model: ProbeModel | None = None, bin_k: float = 10.0) -> ProbeFit:
    """Surface heat flux and h(T_surface) from a probe's centre curve (Beck's sequential function
    specification, see the module docstring).

    dt_s: time step of the inversion (default: the record's median sampling interval, bounded to
    0.02-0.25 s). future_s: length of the future window [s] (r = future_s / dt steps); None chooses
    it by the discrepancy principle (Beck et al. 1985, ch. 7; Morozov): the longest window of
    FUTURE_WINDOWS_S whose RMS residual (measured - model centre) stays within
    DISCREPANCY_FACTOR x the record's noise level (at least 0.2 K). Short windows follow noise
    (the flux oscillates), long ones smear sharp changes of h; the residual tells which.
    regularization: first-order penalty relative to the window's sensitivity, alpha = reg * sum X^2.
    """
    if future_s is None:
        t_raw = np.asarray(curve.time_s, float)
        step = dt_s if dt_s is not None else float(np.clip(np.median(np.diff(t_raw)), 0.02, 0.25))
        sigma = max(noise_level(_uniform(t_raw, np.asarray(curve.temperature_c, float), step)[1]), 0.2)
        chosen = None
        for window in FUTURE_WINDOWS_S:
            fit = _invert(curve, bath_c, dt_s, window, regularization, model, bin_k)
            if chosen is not None and fit.residual_k > DISCREPANCY_FACTOR * sigma:
                break
            chosen = fit
        chosen.noise_k = sigma
        return chosen
    return _invert(curve, bath_c, dt_s, future_s, regularization, model, bin_k)


def _invert(curve, bath_c, dt_s, future_s, regularization, model, bin_k) -> ProbeFit:
    # Too short a future window makes the sequential estimate oscillate and blow up: no numpy
    # warnings on the way, one clear line at the end (below).
    with np.errstate(all="ignore"):
        fit = _invert_steps(curve, bath_c, dt_s, future_s, regularization, model, bin_k)
    if not (np.all(np.isfinite(fit.flux_w_m2)) and math.isfinite(fit.residual_k)) or fit.residual_k > 1.0e3:
        raise InputError("--future-s", f"{fit.future_steps * fit.dt_s:.3g} s",
                         "a longer future window: the inversion diverged with this one", source=curve.name)
    return fit


def _invert_steps(curve, bath_c, dt_s, future_s, regularization, model, bin_k) -> ProbeFit:
    model = model or ProbeModel()
    t_raw, y_raw = np.asarray(curve.time_s, float), np.asarray(curve.temperature_c, float)
    if dt_s is None:
        dt_s = float(np.clip(np.median(np.diff(t_raw)), 0.02, 0.25))
    t, y = _uniform(t_raw, y_raw, dt_s)
    r = max(1, int(round(future_s / dt_s)))
    above = np.flatnonzero(y - bath_c < STOP_ABOVE_BATH_K)
    n_last = int(above[0]) if above.size else y.size
    n_steps = max(0, n_last - r)
    if n_steps < 5:
        raise InputError("probe curve", f"{y[0]:g} C -> {y.min():g} C",
                         f"a record that stays more than {STOP_ABOVE_BATH_K:g} K above the bath ({bath_c:g} C) "
                         f"for more than {r + 5} steps of {dt_s:g} s", source=curve.name)
    field_now = np.full(model.n, y[0])
    field_old = field_now.copy()
    q_prev = 0.0
    flux = np.zeros(n_steps + 1)
    surface = np.full(n_steps + 1, y[0])
    resid_sq = 0.0
    field_ref = None
    for m in range(n_steps):
        # Window response with the properties frozen at field_ref, renewed whenever the field has
        # moved more than REFRESH_K from it (and after the implicit Euler first step).
        if m <= 1 or np.max(np.abs(field_now - field_ref)) > REFRESH_K:
            field_ref = field_now.copy()
            rows, x = _window(model, field_ref, dt_s, r, first=m == 0)
        state = np.concatenate([field_now, field_old])
        resid = y[m + 1: m + 1 + r] - rows @ state
        sxx = float(x @ x)
        alpha = regularization * sxx
        q = (float(x @ resid) + alpha * q_prev) / (sxx + alpha)
        # Advance the state one step with that flux (properties of the current field).
        lead = 1.0 if m == 0 else 1.5
        ab, cap, _ = model._banded(field_now, lead, dt_s)
        rhs = cap * (field_now if m == 0 else 2.0 * field_now - 0.5 * field_old)
        rhs[-1] += model.radius * q
        new = solve_banded((1, 1), ab, rhs)
        field_old, field_now = field_now, new
        flux[m + 1] = q
        surface[m + 1] = model.surface_temperature(new, q, float(model.conductivity(new[-1])))
        resid_sq += (y[m + 1] - model.centre(new)) ** 2
        q_prev = q
    times = t[: n_steps + 1]
    with np.errstate(divide="ignore", invalid="ignore"):
        htc = np.where(surface - bath_c > 1.0, -flux / (surface - bath_c), np.nan)
    # Tabulate: skip the instants before the flux is established (surface within 5 K of the start)
    # and those with the surface near the bath, where h = q / (T_s - T_bath) mostly shows noise.
    ok = np.isfinite(htc) & (surface < y[0] - 5.0) & (surface - bath_c > TABLE_ABOVE_BATH_K)
    ok[0] = False
    table_t, table_h = _tabulate(surface[ok], flux[ok], bath_c, bin_k)
    fit = ProbeFit(times, y[: n_steps + 1], flux, surface, htc, table_t, table_h, float(bath_c), r,
                   float(regularization), float(dt_s))
    fit.residual_k = float(np.sqrt(resid_sq / n_steps))
    return fit


def _window(model: ProbeModel, field_ref: np.ndarray, dt: float, r: int, first: bool):
    """Rows O (r x 2n) and sensitivities X (r) with centre(step i) = O[i] @ [T_n, T_(n-1)] + X[i] q
    for a flux q held over the r steps, properties frozen at field_ref (linear, hence exact for
    that frozen system). The propagation carries the whole input basis at once."""
    n = model.n
    ab_bd, cap_bd, _ = model._banded(field_ref, 1.5, dt)
    inv_bd = np.linalg.inv(_dense(ab_bd))
    u_bd = inv_bd[:, -1] * model.radius
    cur = np.hstack([np.eye(n), np.zeros((n, n)), np.zeros((n, 1))])
    old = np.hstack([np.zeros((n, n)), np.eye(n), np.zeros((n, 1))])
    out = np.empty((r, 2 * n + 1))
    w = model.probe_weights
    for i in range(r):
        if first and i == 0:
            ab_ie, cap_ie, _ = model._banded(field_ref, 1.0, dt)
            inv_ie = np.linalg.inv(_dense(ab_ie))
            new = inv_ie @ (cap_ie[:, None] * cur)
            new[:, -1] += inv_ie[:, -1] * model.radius
        else:
            new = inv_bd @ (cap_bd[:, None] * (2.0 * cur - 0.5 * old))
            new[:, -1] += u_bd
        old, cur = cur, new
        out[i] = w[0] * new[0] + w[1] * new[1]
    return out[:, :-1], out[:, -1]


def _dense(ab):
    n = ab.shape[1]
    a = np.diag(ab[1])
    a[np.arange(n - 1), np.arange(1, n)] = ab[0, 1:]
    a[np.arange(1, n), np.arange(n - 1)] = ab[2, :-1]
    return a


def _tabulate(surface_c, flux_w_m2, bath_c, bin_k):
    """h on a grid of surface temperature (every bin_k K): in each bin the least-squares slope of
    the flux against the temperature difference, h = sum(-q d) / sum(d^2), d = T_s - T_bath (the
    ratio q / d of single steps is ruined by noise where d is small); gaps interpolated, smoothed
    over five bins (1-2-3-2-1), negative values clipped to zero."""
    if surface_c.size < 2:
        raise InputError("probe curve", f"{surface_c.size} usable steps", "a record long enough to fit h(T)")
    lo = math.ceil(surface_c.min() / bin_k) * bin_k
    hi = math.floor(surface_c.max() / bin_k) * bin_k
    grid = np.arange(lo, hi + 0.5 * bin_k, bin_k)
    idx = np.round((surface_c - lo) / bin_k).astype(int)
    keep = (idx >= 0) & (idx < grid.size)
    d = surface_c - bath_c
    num = np.bincount(idx[keep], (-flux_w_m2 * d)[keep], minlength=grid.size)
    den = np.bincount(idx[keep], (d * d)[keep], minlength=grid.size)
    have = den > 0
    values = np.interp(grid, grid[have], num[have] / den[have])
    if values.size >= 5:
        padded = np.pad(values, 2, mode="edge")
        values = np.convolve(padded, np.array([1.0, 2.0, 3.0, 2.0, 1.0]) / 9.0, mode="valid")
    return grid.astype(float), np.maximum(values, 0.0)


def _table_quenchant(fit: ProbeFit, name: str) -> Quenchant:
    return Quenchant(name, fit.bath_c, fit.table_surface_c, fit.table_htc_w_m2k)


def fit_probe(curve: ProbeCurve, bath_c: float, name: str | None = None, end_correction: bool = True,
              tc_time_constant_s: float = 0.0, kind: str | None = None, **options) -> tuple[Quenchant, ProbeFit]:
    """Invert the record, correct for the probe's end faces, build the quenchant and refit.

    End correction (defect correction, one pass): the 1-D fit h0 is run forward on the finite
    60 mm probe (FiniteProbeModel) and on an infinitely long one; their centre difference D(t) is
    what the end faces add to the reading. The record minus D is what an infinitely long probe
    would have shown, and its 1-D inversion (same future window) is the result. The refit runs the
    final curve on the finite probe against the measured record. Without the correction a slow
    oil reads h about 4-8 % high at 300-550 C (shown in tests/thermal/test_quenchants_probe.py).

    tc_time_constant_s: a first-order thermocouple lag removed from the record first
    (lag_corrected). kind: the fluid ('water', 'brine', 'polymer', 'oil', ...; default the record's
    '# kind:' line) for the sampling warning. fit.warnings lists what makes the result less
    trustworthy: sampling below FAST_SAMPLING_HZ for a fast quenchant, refit residual above
    REFIT_WARN_K (sharp transitions smoothed).
    """
    measured = curve
    if tc_time_constant_s > 0:
        curve = ProbeCurve(curve.time_s, lag_corrected(curve.time_s, curve.temperature_c, tc_time_constant_s),
                           curve.name, curve.meta)
    fit = invert(curve, bath_c, **options)
    if end_correction:
        # D(t) is smooth: steps of 0.1 s (or the record's, if coarser) are plenty.
        delta = end_effect(_table_quenchant(fit, "pass 1").htc, bath_c, float(fit.measured_c[0]), fit.time_s,
                           max(fit.dt_s, 0.1))
        t_raw = np.asarray(curve.time_s, float)
        corrected = ProbeCurve(t_raw, np.asarray(curve.temperature_c, float)
                               - np.interp(t_raw - t_raw[0], fit.time_s, delta, right=float(delta[-1])),
                               curve.name, curve.meta)
        options = {**options, "future_s": fit.future_steps * fit.dt_s}
        noise = fit.noise_k
        fit = invert(corrected, bath_c, **options)
        fit.noise_k = noise
        fit.end_correction_k = float(np.max(np.abs(delta[: fit.time_s.size])))
    # The refit is compared with what the thermocouple read (the lag, if any, put back below).
    t_raw = np.asarray(measured.time_s, float)
    fit.measured_c = np.interp(fit.time_s, t_raw - t_raw[0], np.asarray(measured.temperature_c, float))
    meta = curve.meta

    def num(key):
        try:
            return float(meta[key]) if key in meta else None
        except ValueError:
            raise InputError(f"# {key}", meta[key], "a number", source=curve.name) from None

    q = Quenchant(
        name=name or meta.get("name", curve.name), bath_c=float(bath_c), surface_c=fit.table_surface_c,
        htc_w_m2k=fit.table_htc_w_m2k, kind=meta.get("kind", "probe fit"), agitation=meta.get("agitation", ""),
        flash_point_c=num("flash_point_c"),
        description=meta.get("description", f"fitted from the probe record {curve.name}, bath {float(bath_c):g} C"),
        source=(f"fitted from the probe record {curve.name} by inverse conduction (Beck's sequential function "
                f"specification, {fit.future_steps} future steps of {fit.dt_s:.4g} s, regularization "
                f"{fit.regularization:g}{', end faces corrected' if end_correction else ''}); valid for surface "
                f"temperatures {fit.table_surface_c[0]:.0f}-{fit.table_surface_c[-1]:.0f} C, held constant beyond"),
    )
    if end_correction:
        refit = FiniteProbeModel().cool(q.htc, q.bath_c, float(fit.measured_c[0]), fit.time_s, fit.dt_s)
    else:
        refit, _ = ProbeModel().cool(q.htc, q.bath_c, float(fit.measured_c[0]), fit.time_s, fit.dt_s / 2.0)
    if tc_time_constant_s > 0:
        # What the lagging thermocouple would read from the refitted centre (implicit first-order lag).
        lagged = np.empty_like(refit)
        lagged[0] = refit[0]
        a = fit.dt_s / (tc_time_constant_s + fit.dt_s)
        for i in range(1, refit.size):
            lagged[i] = lagged[i - 1] + a * (refit[i] - lagged[i - 1])
        refit = lagged
        fit.tc_time_constant_s = float(tc_time_constant_s)
    fit.refit_c = refit
    err = refit - fit.measured_c
    fit.rms_k = float(np.sqrt(np.mean(err ** 2)))
    fit.max_k = float(np.max(np.abs(err)))
    spacing = float(np.median(np.diff(t_raw)))
    fluid = (kind or meta.get("kind", "")).lower()
    fastest = float(np.max(-np.diff(fit.measured_c) / fit.dt_s)) if fit.measured_c.size > 1 else 0.0
    if 1.0 / spacing < FAST_SAMPLING_HZ and (fluid in ("water", "brine", "polymer") or fastest > 100.0):
        fit.warnings.append(f"sampled at {1.0 / spacing:.3g} Hz: below {FAST_SAMPLING_HZ:g} Hz the boiling peak of "
                            f"{fluid or 'a fast quenchant'} is smoothed (peak h low, transitions broadened); record at "
                            f"{FAST_SAMPLING_HZ:g} Hz or more")
    if fit.rms_k > REFIT_WARN_K:
        fit.warnings.append(f"refit residual {fit.rms_k:.1f} K RMS (above {REFIT_WARN_K:g} K): the fitted curve smooths "
                            "sharp transitions (vapour collapse, boiling peak); compare the refit with the record")
    return q, fit


def synthesize_probe_curve(quenchant: Quenchant, initial_c: float = 850.0, duration_s: float = 60.0,
                           sample_s: float = 0.05, noise_k: float = 0.0, seed: int = 0, finite: bool = True,
                           dt_s: float = 0.01) -> ProbeCurve:
    """A probe record computed from a known curve, with optional Gaussian noise (seeded): for
    round-trip tests and demonstrations (invented data, labelled so). finite: the whole 60 mm probe
    (2-D, finer mesh than the fit's); else an infinitely long one (1-D, 60 cells)."""
    times = np.arange(0.0, duration_s + 0.5 * sample_s, sample_s)
    if finite:
        model = FiniteProbeModel(radial_cells=16, axial_cells=32, growth=1.08)
        centre = model.cool(quenchant.htc, quenchant.bath_c, initial_c, times, dt_s)
    else:
        centre, _ = ProbeModel(60).cool(quenchant.htc, quenchant.bath_c, initial_c, times, dt_s)
    if noise_k > 0:
        centre = centre + np.random.default_rng(seed).normal(0.0, noise_k, centre.size)
    return ProbeCurve(times, centre, name=f"synthetic probe record ({quenchant.name})",
                      meta={"bath_c": f"{quenchant.bath_c:g}", "source": "synthesized (invented data)"})
