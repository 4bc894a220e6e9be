"""Probe figures of a quenchant curve (ISO 9950 / ASTM D6200 numbers): the probe's centre cooling
curve run forward with the curve, its maximum rate and where, the rate at 300 C, times to 600/400/200 C."""

from __future__ import annotations

import numpy as np

from .quenchants import Quenchant
from .probe_model import ProbeModel


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
            new, surface = model.film_step(field_now, field_old, surface, quenchant.htc, bath, dt, first)
            field_old, field_now = field_now, new
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
