"""The numpy monotone cubic (interpolation.pchip) against scipy's PchipInterpolator, the outside
reference implementation of Fritsch & Carlson (1980) with Fritsch & Butland's weights."""

import numpy as np
from scipy.interpolate import PchipInterpolator

from quenchwise.interpolation import pchip


def test_pchip_matches_scipy_on_random_data():
    rng = np.random.default_rng(7)
    for _ in range(100):
        n = int(rng.integers(2, 12))
        x = np.cumsum(rng.uniform(0.05, 2.0, n))
        y = rng.normal(size=n) if rng.random() < 0.5 else np.cumsum(rng.uniform(0.0, 1.0, n))
        at = np.linspace(x[0], x[-1], 41)
        assert np.allclose(pchip(x, y, at), PchipInterpolator(x, y)(at), rtol=0, atol=1e-12)


def test_pchip_does_not_overshoot_monotone_data():
    x = np.array([0.0, 1.0, 2.0, 3.0])
    y = np.array([0.0, 0.0, 1.0, 1.0])
    v = pchip(x, y, np.linspace(0.0, 3.0, 301))
    assert v.min() >= 0.0 and v.max() <= 1.0 and np.all(np.diff(v) >= -1e-15)
