"""The built-in quenchant library and the curve file format (built-in and user CSVs).

Shape checks are the physics of DOMAIN.md section 3 (common practice, no source): a vapour
blanket (low h) at high surface temperature, a nucleate-boiling peak (water and brine near
300-500 C, oils near 500-650 C, polymer solutions between, with longer vapour stages as the
concentration rises) and convection near the bath. The liquid curves are presets of the
three-stage model (thermal/quenchant_model.py), set to published probe figures, not measured
curves, and their files must say so.
"""

import numpy as np
import pytest

from quenchwise.errors import InputError
from quenchwise.thermal.quenchants import (
    Quenchant, _parse, builtin_names, builtin_quenchants, load_quenchant, quenchant_csv_text)

AGITATIONS = ("still", "moderate", "strong")
FAMILIES = {  # family -> (kind, bath C)
    "water_20c": ("water", 20), "water_40c": ("water", 40), "water_70c": ("water", 70),
    "brine_10pct_20c": ("brine", 20),
    "oil_conventional_60c": ("oil", 60), "oil_fast_60c": ("oil", 60), "oil_hot_160c": ("oil", 160),
    "polymer_10pct_40c": ("polymer", 40), "polymer_20pct_40c": ("polymer", 40), "polymer_30pct_40c": ("polymer", 40),
}
PEAK_RANGE_C = {"water": (300, 500), "brine": (300, 500), "oil": (500, 650), "polymer": (400, 550)}


def _h(q, t):
    return np.interp(t, q.surface_c, q.htc_w_m2k)


def test_library_holds_every_family_and_agitation_plus_air_and_gas():
    names = set(builtin_names())
    expected = {f"{f}_{a}" for f in FAMILIES for a in AGITATIONS} | {"air_20c_still", "gas_20c_forced"}
    assert expected <= names
    # The two names that case files and tests already use keep working.
    assert {"water_20c_still", "oil_conventional_60c_still"} <= names


def test_every_curve_says_where_it_comes_from_and_carries_its_metadata():
    for q in builtin_quenchants():
        assert q.source, q.name
        assert q.description, q.name
        assert q.name in builtin_names()
        if q.kind in ("water", "brine", "oil", "polymer"):
            # Model curves are labelled as such, never as measurements.
            assert q.source.startswith("three-stage quenchant model") and "not measured data" in q.source, q.name
        family, agitation = q.name.rsplit("_", 1)
        if family in FAMILIES:
            kind, bath = FAMILIES[family]
            assert (q.kind, q.bath_c, q.agitation) == (kind, bath, agitation)
        if q.kind == "oil":
            assert q.flash_point_c is not None and q.flash_point_c > q.bath_c + 55.0, q.name
        else:
            assert q.flash_point_c is None, q.name
    gas = load_quenchant("gas_20c_forced")
    air = load_quenchant("air_20c_still")
    assert air.emissivity == gas.emissivity == 0.8   # radiation added by the program (memory, oxidized steel)


@pytest.mark.parametrize("family", sorted(FAMILIES))
def test_liquid_shapes_vapour_blanket_peak_and_convection(family):
    kind, bath = FAMILIES[family]
    lo, hi = PEAK_RANGE_C[kind]
    t = np.arange(bath, 1000.0, 5.0)
    for agitation in AGITATIONS:
        q = load_quenchant(f"{family}_{agitation}")
        h = _h(q, t)
        peak_t, peak = t[h.argmax()], h.max()
        assert lo <= peak_t <= hi, (q.name, peak_t)
        if agitation == "still" and kind != "brine":
            # Vapour blanket: low h at high temperature (brine and strong flow break it at once,
            # ASM Handbook Vol. 4 (1991) Quenching of Steel, memory).
            assert _h(q, 850.0) < 0.5 * peak, q.name
        assert h[0] < 0.5 * peak, q.name                  # convection near the bath
        assert np.all(q.htc_w_m2k > 0)


def _vapour_end(q):
    """Highest surface temperature where h is still above half-way between film and peak."""
    t = np.arange(q.bath_c, 1000.0, 5.0)
    h = _h(q, t)
    return t[h >= 0.5 * (h.max() + _h(q, 900.0))].max()


def _below_everywhere(weaker, stronger):
    a, b = load_quenchant(weaker), load_quenchant(stronger)
    t = np.arange(max(a.bath_c, b.bath_c), 1000.0, 5.0)
    return bool(np.all(a.htc(t) <= b.htc(t) + 1e-9))


@pytest.mark.parametrize("family", sorted(FAMILIES))
def test_agitation_raises_h_everywhere_and_ends_the_vapour_stage_earlier(family):
    assert _below_everywhere(f"{family}_still", f"{family}_moderate")
    assert _below_everywhere(f"{family}_moderate", f"{family}_strong")
    ends = [_vapour_end(load_quenchant(f"{family}_{a}")) for a in AGITATIONS]
    assert ends[0] <= ends[1] <= ends[2] and ends[0] < ends[2]


@pytest.mark.parametrize("agitation", AGITATIONS)
def test_hotter_water_and_more_polymer_quench_less_with_longer_vapour_stages(agitation):
    assert _below_everywhere(f"water_40c_{agitation}", f"water_20c_{agitation}")
    assert _below_everywhere(f"water_70c_{agitation}", f"water_40c_{agitation}")
    polymers = [load_quenchant(f"polymer_{c}pct_40c_{agitation}") for c in (10, 20, 30)]
    ends = [_vapour_end(q) for q in polymers]
    assert ends[0] > ends[1] > ends[2]
    assert _below_everywhere(f"polymer_30pct_40c_{agitation}", f"polymer_20pct_40c_{agitation}")
    assert _below_everywhere(f"polymer_20pct_40c_{agitation}", f"polymer_10pct_40c_{agitation}")
    # Peaks: polymer between water/brine and the oils (DOMAIN.md section 3).
    t = np.arange(40.0, 1000.0, 5.0)
    water_peak = t[_h(load_quenchant(f"water_20c_{agitation}"), t).argmax()]
    oil_peak = t[_h(load_quenchant(f"oil_conventional_60c_{agitation}"), t).argmax()]
    for q in polymers:
        assert water_peak < t[_h(q, t).argmax()] < oil_peak


def test_csv_writer_round_trips_through_the_reader():
    for name in ("oil_hot_160c_moderate", "air_20c_still", "polymer_20pct_40c_still"):
        q = load_quenchant(name)
        again = _parse(quenchant_csv_text(q), "again.csv", "k")
        np.testing.assert_allclose(again.surface_c, q.surface_c)
        np.testing.assert_allclose(again.htc_w_m2k, q.htc_w_m2k, rtol=1e-4)
        for attr in ("name", "description", "kind", "bath_c", "agitation", "flash_point_c", "emissivity", "source"):
            assert getattr(again, attr) == getattr(q, attr), attr


def test_user_curve_by_relative_path_with_metadata(tmp_path):
    (tmp_path / "bath.csv").write_text("# name: shop tank 3 (invented)\n# bath_c: 45\n# flash_point_c: 190\n"
                                       "surface_c,htc_w_m2k\n45,300\n600,2000\n850,400\n", "utf-8")
    q = load_quenchant("bath.csv", tmp_path)
    assert (q.name, q.bath_c, q.flash_point_c) == ("shop tank 3 (invented)", 45.0, 190.0)
    assert q.htc(700.0) == pytest.approx(1360.0)       # linear between 600 and 850 C
    assert q.htc(2000.0) == pytest.approx(400.0)      # held constant beyond the table


MALFORMED = {
    "header missing": "20,500\n600,2000\n900,400\n",
    "one column": "surface_c\n20\n600\n900\n",
    "text in a row": "surface_c,htc_w_m2k\n20,500\n600,lots\n900,400\n",
    "negative h": "surface_c,htc_w_m2k\n20,500\n600,-5\n900,400\n",
    "NaN": "surface_c,htc_w_m2k\n20,500\n600,nan\n900,400\n",
    "kelvin-like temperature": "surface_c,htc_w_m2k\n293,500\n873,2000\n1773,400\n",
    "repeated temperature": "surface_c,htc_w_m2k\n20,500\n600,2000\n600,1000\n",
    "too few rows": "surface_c,htc_w_m2k\n20,500\n",
    "empty": "",
    "all zero": "surface_c,htc_w_m2k\n20,0\n600,0\n",
    "bad bath metadata": "# bath_c: warm\nsurface_c,htc_w_m2k\n20,500\n600,2000\n",
    "bath out of range": "# bath_c: 900\nsurface_c,htc_w_m2k\n20,500\n600,2000\n",
    "emissivity above 1": "# emissivity: 3\nsurface_c,htc_w_m2k\n20,500\n600,2000\n",
}


@pytest.mark.parametrize("label", sorted(MALFORMED))
def test_malformed_user_curve_is_one_clear_line(tmp_path, label):
    p = tmp_path / "curve.csv"
    p.write_text(MALFORMED[label], "utf-8")
    with pytest.raises(InputError) as err:
        load_quenchant(str(p))
    message = str(err.value)
    assert "\n" not in message and "quench.medium" in message and "allowed is" in message


def test_unknown_name_suggests_close_built_ins_and_non_utf8_is_refused(tmp_path):
    with pytest.raises(InputError, match="closest: water_20c_still"):
        load_quenchant("water_20c_stil")
    p = tmp_path / "latin.csv"
    p.write_bytes(b"# name: \xe9\nsurface_c,htc_w_m2k\n20,500\n600,2000\n")
    with pytest.raises(InputError, match="UTF-8"):
        load_quenchant(str(p))
    with pytest.raises(InputError):
        load_quenchant(str(tmp_path / "missing.csv"))


def test_constant_quenchant_is_flat():
    q = Quenchant.constant(750.0, 30.0)
    assert np.allclose(q.htc(np.array([0.0, 500.0, 1500.0])), 750.0)
