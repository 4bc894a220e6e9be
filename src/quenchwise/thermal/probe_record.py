"""Probe records: reading a measured centre cooling curve (CSV with '# key: value' metadata),
checking that it is a plausible ISO 9950 type probe record, and the thermocouple lag correction."""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..csvmeta import read_commented_csv
from ..errors import InputError


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
    meta, rows = read_commented_csv(text)
    rows = [[c.strip() for c in row] for row in rows]
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
