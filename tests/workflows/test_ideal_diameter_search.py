"""The DI search's plumbing: one sweep, the extension beyond it, and the centre read in either order.

The physics of the simulated DI is checked in tests/validation/test_ideal_diameter.py; these tests
need no solve.
"""

from types import SimpleNamespace

import numpy as np

from quenchwise.workflows import ideal_diameter as idm


def test_sweep_is_centred_on_the_guess_and_clipped_to_the_search_limits():
    d = idm._sweep(100.0)
    assert d.size == idm.SWEEP_POINTS
    assert abs(np.sqrt(d[0] * d[-1]) - 100.0) < 1e-9 and abs(d[-1] / d[0] - idm.SWEEP_SPAN ** 2) < 1e-9
    small = idm._sweep(2.0)
    assert small[0] == idm.SMALLEST_MM and small[-1] > small[0]
    big = idm._sweep(1000.0)
    assert big[-1] == idm.LARGEST_MM


def test_extension_goes_beyond_the_side_the_answer_lies_on():
    d = np.geomspace(40.0, 120.0, 13)              # far enough inside the search limits
    hard = idm._Sweep(d, np.full(13, 0.9))          # every bar above 50 %: DI is larger
    more = idm._extension(hard)
    assert more[0] > d[-1] and abs(more[-1] - d[-1] * idm.EXTEND_FACTOR) < 1e-9
    soft = idm._Sweep(d, np.full(13, 0.1))          # none: DI is smaller
    less = idm._extension(soft)
    assert less.max() < d[0] and abs(less.min() - d[0] / idm.EXTEND_FACTOR) < 1e-9
    at_limit = idm._Sweep(np.geomspace(100.0, idm.LARGEST_MM, 13), np.full(13, 0.9))
    assert idm._extension(at_limit) is None


def test_centre_martensite_reads_the_deepest_node_in_either_order(monkeypatch):
    # A Result's arrays may run centre-outward or surface-inward (api lane); the centre is the
    # node deepest below the surface either way.
    def fake_simulate(bars, progress=None):
        out = []
        for i, _ in enumerate(bars):
            depth = np.array([0.0, 5.0, 10.0])               # surface first
            mart = np.array([1.0, 0.8, 0.3 + 0.1 * i])       # centre value 0.3, 0.4, ...
            if i % 2:
                depth, mart = depth[::-1], mart[::-1]        # centre first
            out.append(SimpleNamespace(depth_mm=depth, fractions={"martensite": mart}))
        return out

    monkeypatch.setattr(idm, "simulate", fake_simulate)
    case = SimpleNamespace(title="t")
    monkeypatch.setattr(idm, "_bar_case", lambda c, d, s: (c, d))
    [m] = idm._centre_martensite([case], [np.array([10.0, 20.0, 30.0, 40.0])], idm.DI_SETTINGS)
    assert np.allclose(m, [0.3, 0.4, 0.5, 0.6])
