"""TTT and CCT diagrams as data: consistency of curves, levels, paths and critical rates."""

import numpy as np
import pytest

from quenchwise.kinetics import Kirkaldy1983, Li1998
from quenchwise.kinetics.diagrams import CCT_RATES_SHOWN, CCT_TAUS_SHOWN, cct_diagram, ttt_diagram
from quenchwise.kinetics.transformation import PRODUCTS
from quenchwise.steel import Composition, austenitize

CRMO = austenitize(Composition(c=0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20), 850.0)
BEARING = austenitize(Composition(c=1.04, mn=0.35, si=0.25, cr=1.45), 845.0)


@pytest.fixture(scope="module", params=["li1998", "kirkaldy1983"])
def crmo_ttt(request):
    model = Li1998() if request.param == "li1998" else Kirkaldy1983()
    return ttt_diagram(CRMO, 7.0, model)


def test_ttt_levels_are_in_metallurgical_order(crmo_ttt):
    lv = crmo_ttt.levels_c
    assert lv["Ae3"] > lv["Ae1"] > lv["Bs"] > lv["Ms"] > lv["M50"] > lv["M90"]
    assert crmo_ttt.temperature_c.max() < lv["Ae3"] and crmo_ttt.temperature_c.min() > lv["Ms"]


def test_ttt_finish_follows_start_and_products_live_below_their_start_temperature(crmo_ttt):
    d = crmo_ttt
    assert d.products == ("ferrite", "pearlite", "bainite")
    for p in d.products:
        both = np.isfinite(d.start_s[p]) & np.isfinite(d.finish_s[p])
        assert np.all(d.finish_s[p][both] > d.start_s[p][both])
    assert np.all(d.temperature_c[np.isfinite(d.start_s["pearlite"])] < d.levels_c["Ae1"])
    assert np.all(d.temperature_c[np.isfinite(d.start_s["bainite"])] < d.levels_c["Bs"])
    # Between Ae1 and Ae3 only ferrite forms, up to its lever-rule amount: no total finish there.
    intercritical = d.temperature_c > d.levels_c["Ae1"] + 1.0
    assert np.all(np.isnan(d.total_finish_s[intercritical]))
    assert np.isfinite(d.start_s["ferrite"][intercritical]).any()


def test_ttt_rows_hold_every_temperature_and_product(crmo_ttt):
    rows = crmo_ttt.rows()
    assert len(rows) == crmo_ttt.temperature_c.size
    assert {"temperature_c", "ferrite_start_s", "bainite_finish_s", "total_finish_s"} <= set(rows[0])


def test_hypereutectoid_ttt_draws_proeutectoid_cementite_between_acm_and_ae1():
    d = ttt_diagram(BEARING, 8.0, Li1998())
    assert d.products[0] == "cementite" and "Acm" in d.levels_c
    hot = (d.temperature_c < d.levels_c["Acm"]) & (d.temperature_c > d.levels_c["Ae1"])
    assert np.isfinite(d.start_s["cementite"][hot]).any()


@pytest.fixture(scope="module")
def crmo_cct():
    return cct_diagram(CRMO, 7.0, Li1998(), bath_c=20.0)


def test_cct_paths_end_with_fractions_summing_to_one_and_hardness(crmo_cct):
    for p in crmo_cct.paths:
        assert sum(p.final[k] for k in PRODUCTS) == pytest.approx(1.0, abs=1e-9)
        assert np.isfinite(p.hv)
        for (product, kind), (t, temp) in p.events.items():
            assert t >= 0.0 and crmo_cct.bath_c < temp <= CRMO.austenitize_c
        for product in ("ferrite", "pearlite", "bainite"):
            if (product, "finish") in p.events:
                assert p.events[(product, "finish")][0] >= p.events[(product, "start")][0]


def test_cct_shown_paths_are_the_documented_sets(crmo_cct):
    shown = [p for p in crmo_cct.paths if p.shown]
    assert sorted(p.parameter for p in shown if p.family == "constant_rate") == pytest.approx(sorted(CCT_RATES_SHOWN))
    assert sorted(p.parameter for p in shown if p.family == "newtonian") == pytest.approx(sorted(CCT_TAUS_SHOWN))


def test_cct_newtonian_paths_follow_the_exponential_and_report_their_700_c_rate(crmo_cct):
    p = next(p for p in crmo_cct.family("newtonian") if p.parameter == 20.0)
    t = p.time_s
    expected = 20.0 + (850.0 - 20.0) * np.exp(-t / 20.0)
    np.testing.assert_allclose(p.temperature_c, expected, atol=1e-6)
    assert p.rate_700_c_s == pytest.approx((700.0 - 20.0) / 20.0)


def test_cct_critical_rates_are_ordered_and_bracket_the_paths(crmo_cct):
    c = crmo_cct.critical_rates_k_s["constant_rate"]
    assert c["first_martensite"] < c["no_ferrite_pearlite"] <= c["martensite_only"]
    for p in crmo_cct.family("constant_rate"):
        diffusional = sum(p.final[k] for k in ("ferrite", "pearlite", "bainite"))
        if p.parameter > 1.2 * c["martensite_only"]:
            assert diffusional < 0.01
        if p.parameter < 0.8 * c["first_martensite"]:
            assert p.final["martensite"] < 0.01


def test_cct_rows_and_summary_are_complete(crmo_cct):
    rows = crmo_cct.rows()
    assert len(rows) == len(crmo_cct.paths)
    assert "martensite_finish_s" not in rows[0] and "bainite_start_c" in rows[0]
    s = crmo_cct.summary()
    assert len(s["paths"]) == len(CCT_RATES_SHOWN) + len(CCT_TAUS_SHOWN)
    assert set(s["critical_rates_k_s"]) == {"constant_rate", "newtonian"}
