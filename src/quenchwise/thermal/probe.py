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
for alloy 600): density 8470 kg/m3; conductivity and specific heat in INCONEL600_* below.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable

import numpy as np
from scipy.linalg import solve_banded

from ..errors import InputError
from .quenchants import Quenchant

PROBE_DIAMETER_M = 0.0125
PROBE_LENGTH_M = 0.060
INCONEL600_DENSITY_KG_M3 = 8470.0  # (memory)
INCONEL600_T_C = np.array([20.0, 100.0, 200.0, 300.0, 400.0, 500.0, 600.0, 700.0, 800.0, 900.0, 1000.0])
INCONEL600_K_W_MK = np.array([14.9, 15.9, 17.3, 19.0, 20.5, 22.1, 23.9, 25.7, 27.5, 29.6, 31.7])  # (memory)
INCONEL600_CP_J_KGK = np.array([444.0, 465.0, 486.0, 502.0, 519.0, 536.0, 578.0, 595.0, 611.0, 628.0, 645.0])  # (memory)

#: Accepted start of a probe record [C]: ISO 9950 probes start at about 850 C.
START_RANGE_C = (700.0, 1000.0)
MIN_POINTS = 20
MIN_DROP_K = 200.0
#: A probe in a bath only cools: a rise above the lowest earlier reading by more than this [K]
#: (noise and the thermocouple's settling are a few K) is a broken or mixed-up record.
MAX_REHEAT_K = 10.0
#: Fastest centre cooling a record may show, over any 0.1 s (or between coarser samples) [K/s]:
#: the probe's conduction limit is about 320 K/s into a 20 C bath (h -> infinity,
#: tests/thermal/test_quenchant_model.py); noise and a margin allow 450.
MAX_RATE_K_S = 450.0
#: Sample spacing accepted [s]: the boiling stage lasts a few seconds, so a coarser record
#: cannot be inverted; finer than 0.1 ms is not a thermocouple record.
MAX_SPACING_S = 1.0
MAX_GAP_S = 5.0
MIN_SPACING_S = 1.0e-4
MIN_DURATION_S = 5.0
#: Below this sampling rate a fast quenchant's boiling peak is smoothed (warning) [Hz].
FAST_SAMPLING_HZ = 50.0
#: Refit residual above which the transitions are probably smoothed (warning) [K].
REFIT_WARN_K = 10.0

#: The inversion stops when the centre is this close to the bath (h = q / (T_s - T_bath) becomes
#: ill-conditioned near the bath temperature).
STOP_ABOVE_BATH_K = 30.0
#: The table of h(T_surface) starts this far above the bath; below it h is held constant.
TABLE_ABOVE_BATH_K = 25.0
#: The window's response (frozen properties) is renewed when the field has moved this far [K]
#: (alloy 600 properties change by about 0.2 % over 10 K).
REFRESH_K = 10.0


def inconel600_conductivity(temperature_c):
    """Thermal conductivity of alloy 600 [W/(m K)] (memory, producer's data sheet values).

    >>> round(float(inconel600_conductivity(800.0)), 1)
    27.5
    """
    return np.interp(temperature_c, INCONEL600_T_C, INCONEL600_K_W_MK)


def inconel600_specific_heat(temperature_c):
    """Specific heat of alloy 600 [J/(kg K)] (memory, producer's data sheet values).

    >>> round(float(inconel600_specific_heat(20.0)))
    444
    """
    return np.interp(temperature_c, INCONEL600_T_C, INCONEL600_CP_J_KGK)


# -- reading and checking a probe record -------------------------------------------------------
@dataclass(frozen=True)
class ProbeCurve:
    """A measured centre cooling curve: time [s] and temperature [C], plus '# key: value' metadata."""

    time_s: np.ndarray
    temperature_c: np.ndarray
    name: str = "probe"
    meta: dict = field(default_factory=dict)


def check_probe_curve(time_s, temperature_c, source: str = "probe curve") -> None:
    """Raise InputError (one line) unless the record is a plausible probe centre curve in C.

    >>> check_probe_curve(np.linspace(0, 30, 5), np.linspace(850, 100, 5))
    Traceback (most recent call last):
    ...
    quenchwise.errors.InputError: probe curve: rows = 5: allowed is at least 20 data rows (time_s, temperature_c)
    """
    t = np.asarray(time_s, dtype=float)
    y = np.asarray(temperature_c, dtype=float)
    if t.size < MIN_POINTS:
        raise InputError("rows", t.size, f"at least {MIN_POINTS} data rows (time_s, temperature_c)", source=source)
    bad = np.flatnonzero(~(np.isfinite(t) & np.isfinite(y)))
    if bad.size:
        i = int(bad[0])
        raise InputError(f"data row {i + 1}", f"{t[i]}, {y[i]}", "finite numbers (no NaN or inf)", source=source)
    # Bound the magnitudes before any arithmetic (differences of numbers near 1e308 overflow).
    huge = np.flatnonzero((np.abs(t) > 1.0e6) | (np.abs(y) > 1.0e4))
    if huge.size:
        i = int(huge[0])
        raise InputError(f"data row {i + 1}", f"{t[i]:g}, {y[i]:g}", "times within 1e6 s and temperatures in "
                         "degrees C (an ISO 9950 probe record runs about a minute from about 850 C)", source=source)
    step = np.diff(t)
    if np.any(step <= 0):
        i = int(np.flatnonzero(step <= 0)[0])
        raise InputError(f"time_s at data row {i + 2}", float(t[i + 1]),
                         f"a time greater than the row before ({t[i]:g} s): times must increase", source=source)
    lo, hi = START_RANGE_C
    if y.max() > hi or y[0] > hi:
        raise InputError("temperature_c", float(max(y.max(), y[0])),
                         f"degrees C not above {hi:g} (an ISO 9950 probe starts near 850 C; values like "
                         "1100-1600 look like kelvin or Fahrenheit)", source=source)
    if y[0] < lo:
        raise InputError("temperature_c (first row)", float(y[0]),
                         f"a start from {lo:g} to {hi:g} C (the probe is quenched from about 850 C)", source=source)
    if y.min() < -50.0:
        raise InputError("temperature_c", float(y.min()), "degrees C above -50", source=source)
    if y[0] - y.min() < MIN_DROP_K:
        raise InputError("temperature_c", f"{y[0]:g} -> {y.min():g}",
                         f"a record that cools by at least {MIN_DROP_K:g} K", source=source)
    spacing = float(np.median(step))
    if spacing < MIN_SPACING_S:
        raise InputError("time_s", f"median spacing {spacing:.3g} s",
                         f"samples at least {MIN_SPACING_S:g} s apart (seconds, not ms or ticks?)", source=source)
    if t[-1] - t[0] < MIN_DURATION_S:
        raise InputError("time_s", f"{t[0]:g} -> {t[-1]:g} s",
                         f"a record of at least {MIN_DURATION_S:g} s (times in seconds)", source=source)
    if spacing > MAX_SPACING_S or step.max() > MAX_GAP_S:
        raise InputError("time_s", f"spacing {spacing:.3g} s (largest gap {step.max():.3g} s)",
                         f"samples at most {MAX_SPACING_S:g} s apart, no gap over {MAX_GAP_S:g} s (the boiling "
                         "stage lasts a few seconds: a coarser record is too coarse for the fit)", source=source)
    low = np.minimum.accumulate(y)
    rise = y - low
    if rise.max() > MAX_REHEAT_K:
        i = int(np.argmax(rise))
        raise InputError(f"temperature_c at data row {i + 1}", float(y[i]),
                         f"a record that only cools (it rises {rise[i]:.0f} K above the {low[i]:g} C read before; "
                         f"at most {MAX_REHEAT_K:g} K of noise allowed)", source=source)
    # Fastest drop over 0.1 s (or between neighbours where samples are coarser).
    j = np.maximum(np.searchsorted(t, t + 0.1), np.arange(t.size) + 1)
    ok = j < t.size
    if ok.any():
        i_idx, j_idx = np.flatnonzero(ok), j[ok]
        rates = (y[i_idx] - y[j_idx]) / (t[j_idx] - t[i_idx])
        k = int(np.argmax(rates))
        if rates[k] > MAX_RATE_K_S:
            a, b = int(i_idx[k]), int(j_idx[k])
            raise InputError(f"temperature_c at data rows {a + 1}-{b + 1}", f"{y[a]:g} -> {y[b]:g} C in {t[b] - t[a]:.3g} s",
                             f"a cooling rate of at most {MAX_RATE_K_S:g} K/s (the probe cannot cool faster than "
                             "about 320 K/s even in brine: a jump, a spike or a unit error)", source=source)


def parse_probe_curve(text: str, source: str = "probe curve") -> ProbeCurve:
    """A probe record from CSV text: optional '# key: value' lines, a header naming time_s and
    temperature_c (any order, other columns ignored), then one row per sample."""
    meta: dict[str, str] = {}
    rows: list[list[str]] = []
    for line in text.splitlines():
        s = line.strip()
        if not s:
            continue
        if s.startswith("#"):
            body = s.lstrip("#").strip()
            if ":" in body:
                k, v = body.split(":", 1)
                meta[k.strip().lower()] = v.strip()
            continue
        rows.append([c.strip() for c in next(csv.reader(io.StringIO(s)))])
    if not rows:
        raise InputError("header", "(missing)", "a header row with columns time_s and temperature_c", source=source)
    header = [c.lower() for c in rows[0]]
    if "time_s" not in header or "temperature_c" not in header:
        raise InputError("header", ",".join(rows[0]), "a header row with columns time_s and temperature_c "
                         "(time in seconds, centre temperature in degrees C)", source=source)
    it, iy = header.index("time_s"), header.index("temperature_c")
    t, y = [], []
    for n, row in enumerate(rows[1:], start=1):
        try:
            t.append(float(row[it]))
            y.append(float(row[iy]))
        except (ValueError, IndexError):
            raise InputError(f"data row {n}", ",".join(row), "two numbers: time_s, temperature_c", source=source) from None
    t_arr, y_arr = np.array(t), np.array(y)
    check_probe_curve(t_arr, y_arr, source)
    return ProbeCurve(t_arr, y_arr, meta.get("name", Path(source).stem), meta)


def read_probe_curve(path: str | Path) -> ProbeCurve:
    """Read a probe record file (see parse_probe_curve); any problem is one InputError line."""
    p = Path(path)
    try:
        text = p.read_text("utf-8")
    except FileNotFoundError:
        raise InputError("probe curve", str(path), "an existing CSV file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError("probe curve", str(path), f"a readable UTF-8 CSV file ({type(exc).__name__})") from None
    return parse_probe_curve(text, str(path))


# -- the probe model -----------------------------------------------------------------------
class ProbeModel:
    """1-D radial finite-volume model of the probe: uniform cells, BDF2 steps, banded solves."""

    def __init__(self, cells: int = 30, radius_m: float = PROBE_DIAMETER_M / 2.0,
                 conductivity: Callable = inconel600_conductivity, specific_heat: Callable = inconel600_specific_heat,
                 density_kg_m3: float = INCONEL600_DENSITY_KG_M3):
        self.n = int(cells)
        self.radius = float(radius_m)
        self.dx = self.radius / self.n
        faces = np.linspace(0.0, self.radius, self.n + 1)
        self.volume = 0.5 * (faces[1:] ** 2 - faces[:-1] ** 2)   # per radian and unit length
        self.face_r = faces[1:-1]                                 # inner faces
        self.conductivity, self.specific_heat, self.density = conductivity, specific_heat, density_kg_m3
        # Centre value from the first two cells, T = a + b r^2 near the axis.
        self.probe_weights = np.array([9.0 / 8.0, -1.0 / 8.0])

    def centre(self, field_c: np.ndarray) -> np.ndarray:
        return self.probe_weights[0] * field_c[..., 0] + self.probe_weights[1] * field_c[..., 1]

    def _banded(self, field_c, lead: float, dt: float, surface_g: float = 0.0):
        """Banded matrix of  lead * C / dt * T - div(k grad T) (+ surface_g at the last cell)."""
        k = self.conductivity(field_c)
        cap = self.density * self.specific_heat(field_c) * self.volume / dt
        kf = 2.0 * k[:-1] * k[1:] / (k[:-1] + k[1:])
        g = self.face_r * kf / self.dx
        ab = np.zeros((3, self.n))
        ab[1] = lead * cap
        ab[1, :-1] += g
        ab[1, 1:] += g
        ab[0, 1:] = -g
        ab[2, :-1] = -g
        ab[1, -1] += surface_g
        return ab, cap, k

    def surface_temperature(self, field_c, flux_w_m2, k_last):
        """Surface temperature from the last cell and the flux into the body (half-cell gradient)."""
        return field_c[..., -1] + flux_w_m2 * 0.5 * self.dx / k_last

    def cool(self, htc: Callable, bath_c: float, initial_c: float, times_s: np.ndarray, dt: float):
        """Forward run with a surface film h(T_surface) [W/(m2 K)]: centre temperature at times_s
        and the surface temperature; h in series with the half cell, lagged by one step."""
        n_steps = int(math.ceil(times_s[-1] / dt))
        t_grid = np.arange(n_steps + 1) * dt
        field_now = np.full(self.n, float(initial_c))
        field_old = field_now.copy()
        centre = [self.centre(field_now)]
        surface = [float(initial_c)]
        for step in range(n_steps):
            lead, c_now, c_old = (1.0, 1.0, 0.0) if step == 0 else (1.5, 2.0, 0.5)
            k_last = float(self.conductivity(field_now[-1]))
            half = k_last / (0.5 * self.dx)
            ts = surface[-1]
            h = float(htc(ts))
            g = self.radius / (1.0 / max(h, 1e-12) + 1.0 / half)
            ab, cap, _ = self._banded(field_now, lead, dt, g)
            rhs = cap * (c_now * field_now - c_old * field_old)
            rhs[-1] += g * bath_c
            new = solve_banded((1, 1), ab, rhs)
            field_old, field_now = field_now, new
            centre.append(self.centre(new))
            surface.append((half * new[-1] + h * bath_c) / (half + h))
        centre, surface = np.array(centre), np.array(surface)
        return np.interp(times_s, t_grid, centre), np.interp(times_s, t_grid, surface)


class FiniteProbeModel:
    """2-D axisymmetric model of the whole probe (radius x half-length, symmetric about the
    mid-plane), quenched on its side and on its end face with the same h(T_surface): finite
    volumes, BDF2 steps (implicit Euler first), a sparse LU solve per step. Used for the end
    correction of the 1-D fit and for synthesizing realistic records; not inside the inversion."""

    def __init__(self, radial_cells: int = 12, axial_cells: int = 24, growth: float = 1.12,
                 radius_m: float = PROBE_DIAMETER_M / 2.0, half_length_m: float = PROBE_LENGTH_M / 2.0,
                 conductivity: Callable = inconel600_conductivity, specific_heat: Callable = inconel600_specific_heat,
                 density_kg_m3: float = INCONEL600_DENSITY_KG_M3):
        nr, nz = int(radial_cells), int(axial_cells)
        self.nr, self.nz, self.radius = nr, nz, float(radius_m)
        self.dr = self.radius / nr
        w = growth ** np.arange(nz)[::-1]               # finer towards the quenched end face
        self.dz = w / w.sum() * half_length_m
        rf = np.linspace(0.0, self.radius, nr + 1)
        self.ring = 0.5 * (rf[1:] ** 2 - rf[:-1] ** 2)   # cross-section of each ring per radian
        self.volume = np.outer(self.ring, self.dz).ravel()
        idx = np.arange(nr * nz).reshape(nr, nz)
        self.rad_a, self.rad_b = idx[:-1, :].ravel(), idx[1:, :].ravel()
        self.rad_w = np.outer(rf[1:-1] / self.dr, self.dz).ravel()          # r_f dz / dr
        self.ax_a, self.ax_b = idx[:, :-1].ravel(), idx[:, 1:].ravel()
        dzc = 0.5 * (self.dz[:-1] + self.dz[1:])
        self.ax_w = np.outer(self.ring, 1.0 / dzc).ravel()                   # ring / dz_c
        self.side = idx[-1, :]
        self.side_area, self.side_half = self.radius * self.dz, 0.5 * self.dr
        self.end = idx[:, -1]
        self.end_area, self.end_half = self.ring, 0.5 * self.dz[-1]
        n = nr * nz
        a, b = np.concatenate([self.rad_a, self.ax_a]), np.concatenate([self.rad_b, self.ax_b])
        self._rows = np.concatenate([a, b, np.arange(n)])
        self._cols = np.concatenate([b, a, np.arange(n)])
        self._a, self._b = a, b
        self.conductivity, self.specific_heat, self.density = conductivity, specific_heat, density_kg_m3
        # Centre (r = 0, z = 0) from the cells next to it: T = a + b r^2 + c z^2.
        z0, z1 = 0.5 * self.dz[0], self.dz[0] + 0.5 * self.dz[1]
        self._cz = z0 * z0 / (z1 * z1 - z0 * z0)
        self._i00, self._i10, self._i01 = idx[0, 0], idx[1, 0], idx[0, 1]

    def centre(self, field_c):
        t00 = field_c[self._i00]
        return t00 - (field_c[self._i10] - t00) / 8.0 - (field_c[self._i01] - t00) * self._cz

    def cool(self, htc: Callable, bath_c: float, initial_c: float, times_s: np.ndarray, dt: float) -> np.ndarray:
        """Centre temperature at times_s of the finite probe quenched with h(T_surface)."""
        from scipy.sparse import csc_matrix
        from scipy.sparse.linalg import splu

        n = self.nr * self.nz
        n_steps = int(math.ceil(times_s[-1] / dt))
        field_now = np.full(n, float(initial_c))
        field_old = field_now.copy()
        centre = [self.centre(field_now)]
        w_all = np.concatenate([self.rad_w, self.ax_w])
        for step in range(n_steps):
            lead, c_now, c_old = (1.0, 1.0, 0.0) if step == 0 else (1.5, 2.0, 0.5)
            k = self.conductivity(field_now)
            cap = self.density * self.specific_heat(field_now) * self.volume / dt
            g = w_all * 2.0 * k[self._a] * k[self._b] / (k[self._a] + k[self._b])
            diag = lead * cap + np.bincount(self._a, g, n) + np.bincount(self._b, g, n)
            rhs = cap * (c_now * field_now - c_old * field_old)
            for cells, area, half in ((self.side, self.side_area, self.side_half),
                                      (self.end, self.end_area, self.end_half)):
                tc = field_now[cells]
                gh = k[cells] / half
                h = htc(tc)
                h = htc((gh * tc + h * bath_c) / (gh + h))
                geff = area / (1.0 / np.maximum(h, 1e-12) + 1.0 / gh)
                np.add.at(diag, cells, geff)
                np.add.at(rhs, cells, geff * bath_c)
            a = csc_matrix((np.concatenate([-g, -g, diag]), (self._rows, self._cols)), shape=(n, n))
            new = splu(a).solve(rhs)
            field_old, field_now = field_now, new
            centre.append(self.centre(new))
        t_grid = np.arange(n_steps + 1) * dt
        return np.interp(times_s, t_grid, np.array(centre))


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


def end_effect(htc: Callable, bath_c: float, initial_c: float, times_s: np.ndarray, dt: float,
               model: FiniteProbeModel | None = None) -> np.ndarray:
    """Centre temperature of the finite probe minus that of an infinitely long one [K], both with
    the same h(T_surface) and the same radial mesh and steps (so only the end faces differ)."""
    model = model or FiniteProbeModel()
    finite = model.cool(htc, bath_c, initial_c, times_s, dt)
    long_probe = ProbeModel(cells=model.nr, radius_m=model.radius, conductivity=model.conductivity,
                            specific_heat=model.specific_heat, density_kg_m3=model.density)
    infinite, _ = long_probe.cool(htc, bath_c, initial_c, times_s, dt)
    return finite - infinite


def _table_quenchant(fit: ProbeFit, name: str) -> Quenchant:
    return Quenchant(name, fit.bath_c, fit.table_surface_c, fit.table_htc_w_m2k)


def lag_corrected(time_s, temperature_c, time_constant_s: float) -> np.ndarray:
    """The temperature a first-order thermocouple with time constant tau [s] was lagging behind:
    T = y + tau dy/dt (dy/dt from the record smoothed over about 0.05 s, so noise is not
    amplified sample by sample). A sheathed 1.5 mm type K thermocouple has tau of order 0.05-0.2 s
    in a quench (memory); use the value of your probe's certificate.

    >>> t = np.linspace(0.0, 10.0, 1001); y = 100.0 - 5.0 * t
    >>> round(float(lag_corrected(t, y, 0.2)[500]), 3)
    74.0
    """
    t = np.asarray(time_s, dtype=float)
    y = np.asarray(temperature_c, dtype=float)
    if time_constant_s <= 0:
        return y.copy()
    width = int(max(1, round(0.05 / max(float(np.median(np.diff(t))), 1e-9))))
    if width > 1:
        pad = width // 2
        ys = np.convolve(np.pad(y, pad, mode="edge"), np.ones(2 * pad + 1) / (2 * pad + 1), mode="valid")
    else:
        ys = y
    return y + time_constant_s * np.gradient(ys, t)


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


# -- probe figures of a curve (ISO 9950 / ASTM D6200 numbers) -----------------------------------
#: Forward-run steps [s] for the probe figures: fine through the vapour collapse and the boiling
#: peak, coarser in the slow convection tail (each segment restarts BDF2 with an implicit Euler
#: step). A step study (tests/thermal/test_quenchant_model.py) shows the figures converged.
FIGURE_SEGMENTS_S = ((25.0, 0.004), (80.0, 0.02), (600.0, 0.1))
FIGURE_NAMES = ("max_rate_k_s", "t_max_rate_c", "rate_300_k_s", "time_600_s", "time_400_s", "time_200_s")


def probe_cooling(quenchant: Quenchant, initial_c: float = 850.0, stop_c: float | None = None,
                  model: ProbeModel | None = None, segments=FIGURE_SEGMENTS_S):
    """Centre temperature of the ISO 9950 probe (1-D model, ProbeModel) quenched with the curve:
    (time_s, centre_c, rate_k_s) with rate = -dT/dt of each step at the step's mid-time. Runs
    until the centre is below stop_c (default: 200 C, or 10 K above a bath hotter than 190 C) or
    the last segment ends."""
    model = model or ProbeModel()
    bath = quenchant.bath_c
    stop = stop_c if stop_c is not None else max(195.0, bath + 10.0)
    field_now = np.full(model.n, float(initial_c))
    field_old = field_now.copy()
    times, centre = [0.0], [float(initial_c)]
    surface = float(initial_c)
    t = 0.0
    for end, dt in segments:
        first = True
        while t < end - 1e-9 and centre[-1] > stop:
            lead, c_now, c_old = (1.0, 1.0, 0.0) if first else (1.5, 2.0, 0.5)
            k_last = float(model.conductivity(field_now[-1]))
            half = k_last / (0.5 * model.dx)
            h = float(quenchant.htc(surface))
            g = model.radius / (1.0 / max(h, 1e-12) + 1.0 / half)
            ab, cap, _ = model._banded(field_now, lead, dt, g)
            rhs = cap * (c_now * field_now - c_old * field_old)
            rhs[-1] += g * bath
            new = solve_banded((1, 1), ab, rhs)
            field_old, field_now = field_now, new
            surface = (half * new[-1] + h * bath) / (half + h)
            t += dt
            times.append(t)
            centre.append(float(model.centre(new)))
            first = False
    times, centre = np.array(times), np.array(centre)
    return times, centre


def cooling_curve_figures(time_s, centre_c) -> dict:
    """The six ISO 9950 / ASTM D6200 figures of a centre cooling curve: maximum cooling rate
    [K/s] and the centre temperature where it occurs [C], cooling rate at 300 C [K/s], and the
    times to 600, 400 and 200 C [s] (nan where the curve does not get there). Rates are taken on
    the step mid-points, smoothed over 0.1 s like a lab's derivative.

    >>> t = np.linspace(0.0, 100.0, 10001); y = 20.0 + 830.0 * np.exp(-t / 10.0)
    >>> f = cooling_curve_figures(t, y); round(f["max_rate_k_s"], 1), round(f["time_400_s"], 2)
    (83.0, 7.81)
    """
    t = np.asarray(time_s, dtype=float)
    y = np.asarray(centre_c, dtype=float)
    tm = 0.5 * (t[1:] + t[:-1])
    ym = 0.5 * (y[1:] + y[:-1])
    rate = -np.diff(y) / np.diff(t)
    # Smooth over 0.1 s (on the fine part of the run) so that one step's noise is not the maximum.
    width = max(1, int(round(0.1 / max(float(np.min(np.diff(t))), 1e-6))))
    if width > 1 and rate.size > width:
        kernel = np.ones(width) / width
        rate_s = np.convolve(rate, kernel, mode="same")
        edge = width // 2
        rate_s[:edge], rate_s[-edge:] = rate[:edge], rate[-edge:]
    else:
        rate_s = rate
    i = int(np.argmax(rate_s))

    def time_to(level):
        below = np.flatnonzero(y <= level)
        if below.size == 0 or below[0] == 0:
            return float("nan")
        j = below[0]
        return float(t[j - 1] + (y[j - 1] - level) / (y[j - 1] - y[j]) * (t[j] - t[j - 1]))

    order = np.argsort(ym)
    rate_300 = float(np.interp(300.0, ym[order], rate_s[order])) if ym.min() <= 300.0 <= ym.max() else float("nan")
    return {"max_rate_k_s": float(rate_s[i]), "t_max_rate_c": float(ym[i]), "rate_300_k_s": rate_300,
            "time_600_s": time_to(600.0), "time_400_s": time_to(400.0), "time_200_s": time_to(200.0)}


def probe_figures(quenchant: Quenchant, initial_c: float = 850.0) -> dict:
    """The six ISO 9950 figures of a curve run forward on the probe from 850 C (probe_cooling)."""
    t, y = probe_cooling(quenchant, initial_c)
    return cooling_curve_figures(t, y)
