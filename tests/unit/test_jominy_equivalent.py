"""Equivalent end-quench distance (issue 12 item 7): the Jominy distance with the same cooling rate
at 700 C as each node, from the published end-quench cooling-rate curve (ASTM A255 scale, memory)."""

import numpy as np
import pytest

from quenchwise.hardness.jominy_equivalent import (
    SIXTEENTH_MM,
    endquench_rate_curve,
    equivalent_jominy_distance_mm,
    equivalent_jominy_sixteenths,
)


def test_curve_falls_monotonically_over_1_to_32_sixteenths():
    d, v = endquench_rate_curve()
    assert d[0] == pytest.approx(SIXTEENTH_MM) and d[-1] == pytest.approx(32 * SIXTEENTH_MM)
    assert np.all(np.diff(d) > 0) and np.all(np.diff(v) < 0)


def test_rates_printed_on_published_end_quench_charts_map_back_to_their_positions():
    # About 170 / 70 / 31 / 18 / 9 / 5.6 C/s at 2 / 4 / 6 / 8 / 12 / 16 sixteenths (the end-quench
    # cooling-rate scale, memory; the same values thermal/endquench.py names for its jet h).
    rates = np.array([170.0, 70.0, 31.0, 18.0, 9.0, 5.6])
    np.testing.assert_allclose(equivalent_jominy_sixteenths(rates), [2, 4, 6, 8, 12, 16], atol=0.15)


def test_faster_cooling_is_closer_to_the_quenched_end_and_nothing_is_extrapolated():
    rates = np.geomspace(2.0, 270.0, 50)
    d = equivalent_jominy_distance_mm(rates)
    assert np.all(np.isfinite(d)) and np.all(np.diff(d) < 0)
    out = equivalent_jominy_distance_mm(np.array([300.0, 1.5, 0.0, -1.0, np.nan, np.inf]))
    assert np.all(np.isnan(out))


def test_profile_csv_result_h5_and_summary_carry_the_equivalent_distance(tmp_path):
    import csv
    import tomllib

    from quenchwise.case import parse_case
    from quenchwise.results import read_result_h5, write_profile_csv, write_result_h5
    from quenchwise.workflows import simulate

    text = ('title = "t"\n[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_mm = 40\n'
            '[quench]\nseverity_h = 0.5\nend_c = 150\n')
    r = simulate([parse_case(tomllib.loads(text), text, "t.toml")])[0]
    write_profile_csv(r, tmp_path / "profile.csv")
    write_result_h5(r, tmp_path / "result.h5")
    rows = list(csv.DictReader((tmp_path / "profile.csv").open()))
    assert list(rows[0])[9:11] == ["cooling_rate_700_c_s", "jominy_distance_mm"]
    for row in rows:
        want = float(equivalent_jominy_distance_mm(float(row["cooling_rate_700_c_s"])))
        assert float(row["jominy_distance_mm"]) == pytest.approx(want, rel=1e-3, abs=0.01)
    h5 = read_result_h5(tmp_path / "result.h5")
    np.testing.assert_allclose(h5["jominy_distance_mm"], r.jominy_distance_mm[::-1], equal_nan=True)  # file: centre first
    surface, _, centre = r.summary()["points"]
    # With a constant h the surface passes 700 C fastest (the premise of the trade's equivalence
    # charts, common practice, no source). A real oil curve need not: its vapour blanket can hold
    # the surface to a slow rate at 700 C while the interior passes 700 C later, while boiling.
    assert surface["jominy_distance_mm"] < centre["jominy_distance_mm"]
