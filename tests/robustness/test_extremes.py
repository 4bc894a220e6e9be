"""Extreme but legal inputs complete without error in bounded time, and stay physical.

All five run as one batch (the solver's batching keeps this affordable)."""

import time

import numpy as np

from quenchwise.case import load_case
from quenchwise.workflows import simulate

BASE = """
title = "{title}"
[steel]
{steel}
austenitize_c = {aust}
[part]
{part}
[quench]
medium = "{medium}"
end_c = {end}
"""
STEEL_4140 = "grade = \"4140\""
# Every element at the top of the kinetics models' range (steel.composition.MODEL_RANGE).
STEEL_EDGE = "c = 1.1\nmn = 2.0\nsi = 1.0\nni = 3.5\ncr = 2.0\nmo = 0.7\ncu = 0.5\nv = 0.2"

EXTREMES = {
    "1 mm plate in water": (STEEL_4140, 845, 'shape = "plate"\nthickness_mm = 1', "water_20c_still", 60),
    "500 mm bar in oil": (STEEL_4140, 845, 'shape = "bar"\ndiameter_mm = 500', "oil_conventional_60c_still", 100),
    "5 mm bar in brine": (STEEL_4140, 845, 'shape = "bar"\ndiameter_mm = 5', "brine_10pct_20c_still", 40),
    "300 mm bar in still air": (STEEL_4140, 845, 'shape = "bar"\ndiameter_mm = 300', "air_20c_still", 100),
    "steel at the edge of the ranges": (STEEL_EDGE, 1000, 'shape = "bar"\ndiameter_mm = 30', "oil_conventional_60c_still", 100),
}


def test_extremes_finish_and_stay_physical(tmp_path):
    cases = []
    for i, (title, (steel, aust, part, medium, end)) in enumerate(EXTREMES.items()):
        p = tmp_path / f"x{i}.toml"
        p.write_text(BASE.format(title=title, steel=steel, aust=aust, part=part, medium=medium, end=end))
        cases.append(load_case(p))
    start = time.perf_counter()
    results = simulate(cases)
    assert time.perf_counter() - start < 240.0
    for case, r in zip(cases, results):
        names = ("ferrite", "pearlite", "bainite", "martensite", "austenite", "cementite")
        total = sum(r.fractions[n] for n in names)
        np.testing.assert_allclose(total, 1.0, atol=1e-9, err_msg=case.title)
        for n in names:
            assert np.all((r.fractions[n] >= -1e-12) & (r.fractions[n] <= 1 + 1e-12)), (case.title, n)
        temps = r.history.temperature_c
        assert temps.max() <= case.austenitize_c + 1e-6, case.title
        assert temps.min() >= min(case.outer.bath_c, 20.0) - 1.0, case.title
        assert np.all(np.isfinite(r.hv)) and r.hv.min() > 100.0, case.title
    thin, big_oil, brine, air, edge = results
    assert thin.summary()["points"][0]["martensite_pct"] > 80.0     # thin section hardens through
    assert air.summary()["points"][2]["martensite_pct"] < 5.0        # air-cooled 300 mm bar does not
    assert big_oil.hv[np.argmin(big_oil.depth_mm)] > big_oil.hv[np.argmax(big_oil.depth_mm)]   # 500 mm bar: surface harder than centre
