"""Monotone piecewise-cubic interpolation (PCHIP) in numpy, without loading scipy.interpolate
(whose import, through scipy.special, costs a tenth of a second at every command's start)."""

from __future__ import annotations

import numpy as np


def _end_slope(h0, h1, d0, d1):
    # Three-point one-sided estimate, kept shape-preserving (Fritsch & Carlson 1980; the end rule
    # of Moler, Numerical Computing with MATLAB, 2004, ch. 3).
    m = ((2.0 * h0 + h1) * d0 - h0 * d1) / (h0 + h1)
    if np.sign(m) != np.sign(d0):
        return 0.0
    if np.sign(d0) != np.sign(d1) and abs(m) > abs(3.0 * d0):
        return 3.0 * d0
    return m


def pchip(x, y, at):
    """Monotone cubic Hermite interpolant through (x, y) evaluated at `at`: slopes by the weighted
    harmonic mean of the neighbouring secants (zero where they change sign), Fritsch & Carlson (1980),
    SIAM J. Numer. Anal. 17, 238-246, with Fritsch & Butland's weights. x strictly increasing, at
    least 2 points; `at` beyond the ends is extrapolated by the end cubics.

    >>> [round(float(v), 4) for v in pchip([0.0, 1.0, 2.0], [0.0, 1.0, 1.0], [0.5, 1.5])]
    [0.6875, 1.0]
    """
    x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    at = np.asarray(at, dtype=float)
    h = np.diff(x)
    d = np.diff(y) / h
    m = np.zeros_like(y)
    if x.size == 2:
        m[:] = d[0]
    else:
        w1, w2 = 2.0 * h[1:] + h[:-1], h[1:] + 2.0 * h[:-1]
        same = (np.sign(d[:-1]) * np.sign(d[1:])) > 0
        with np.errstate(divide="ignore", invalid="ignore"):
            harmonic = (w1 + w2) / (w1 / d[:-1] + w2 / d[1:])
        m[1:-1] = np.where(same, harmonic, 0.0)
        m[0] = _end_slope(h[0], h[1], d[0], d[1])
        m[-1] = _end_slope(h[-1], h[-2], d[-1], d[-2])
    k = np.clip(np.searchsorted(x, at, side="right") - 1, 0, x.size - 2)
    t = (at - x[k]) / h[k]
    h00, h10 = (1 + 2 * t) * (1 - t) ** 2, t * (1 - t) ** 2
    h01, h11 = t * t * (3 - 2 * t), t * t * (t - 1)
    return h00 * y[k] + h10 * h[k] * m[k] + h01 * y[k + 1] + h11 * h[k] * m[k + 1]
