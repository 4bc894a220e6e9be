"""Steel layer: composition limits and model ranges, critical temperatures, austenitizing, grades."""

import json

import numpy as np
import pytest

from quenchwise.errors import InputError
from quenchwise.steel import Composition, austenitize
from quenchwise.steel.composition import HARD_LIMIT, MODEL_RANGES
from quenchwise.steel.critical import (
    CEMENTITE_C_WT,
    acm_linear,
    andrews_ms,
    andrews_ms_product,
    carbon_on_acm,
    martensite_start,
)
from quenchwise.steel.grades import find_grade, grades


# -- composition --------------------------------------------------------------------------------
@pytest.mark.parametrize("element, value", [("c", -0.01), ("c", 2.2), ("cr", 12.5), ("mn", float("nan"))])
def test_impossible_chemistry_is_an_error_naming_the_element(element, value):
    with pytest.raises(InputError) as e:
        Composition(**{"c": 0.4, element: value})
    assert f"steel.{element}" in str(e.value)


def test_hard_limits_keep_the_total_below_100_percent():
    assert sum(HARD_LIMIT.values()) < 100.0


def test_range_warnings_name_the_model_and_the_limits():
    steel = Composition(c=0.40, mn=0.85, mo=0.9)
    li = steel.range_warnings("li1998")
    kv = steel.range_warnings("kirkaldy1983")
    assert len(li) == 1 and "Li et al. (1998)" in li[0] and "0-0.7 wt%" in li[0]
    assert len(kv) == 1 and "Kirkaldy & Venugopalan (1983)" in kv[0]
    assert steel.range_warnings("none") == []


def test_high_carbon_is_flagged_as_beyond_the_andrews_formulas():
    # Andrews (1965) fitted steels below about 0.6 %C (memory): Ms and Ae3 are extrapolated above.
    warnings = Composition(c=0.80, mn=0.75).range_warnings("li1998")
    assert any("Andrews (1965)" in w and w.startswith("c = 0.8") for w in warnings)


def test_every_model_range_is_an_ordered_interval_inside_the_hard_limits():
    for table in MODEL_RANGES.values():
        for element, (lo, hi) in table.items():
            assert 0.0 <= lo < hi <= HARD_LIMIT[element]


# -- critical temperatures --------------------------------------------------------------------------
def test_default_ms_is_the_andrews_product_formula_and_tracks_the_linear_one_at_medium_carbon():
    # Up to 0.6 %C the default Ms is Andrews' product formula unchanged (ms_andrews_joined).
    c = np.linspace(0.0, 0.6, 13)
    np.testing.assert_allclose(martensite_start(c, 0.8, 0.5, 0.9, 0.2), andrews_ms_product(c, 0.8, 0.5, 0.9, 0.2))
    for c in (0.2, 0.3, 0.45):
        assert abs(float(andrews_ms_product(c, mn=0.8)) - float(andrews_ms(c, mn=0.8))) < 15.0


def test_acm_line_and_its_inverse_agree():
    c = np.linspace(0.77, 2.1, 20)
    np.testing.assert_allclose(carbon_on_acm(acm_linear(c)), c, atol=1e-12)


# -- austenitizing ------------------------------------------------------------------------------------
def test_intercritical_state_keeps_ferrite_and_enriches_the_austenite():
    s = austenitize(Composition(c=0.20, mn=0.8), 780.0)
    assert 0.2 < s.ferrite < 0.8 and s.carbon > 0.20
    # Lever rule: bulk carbon = ferrite x 0.02 + austenite x its carbon.
    assert s.ferrite * 0.02 + s.austenite * s.carbon == pytest.approx(0.20, abs=1e-9)
    assert any("intercritical" in w for w in s.warnings())


def test_hypereutectoid_state_below_acm_keeps_carbide_by_the_lever_rule():
    s = austenitize(Composition(c=1.2, mn=0.3), 800.0)
    assert s.cementite > 0.0 and s.carbon == pytest.approx(float(carbon_on_acm(800.0)))
    assert s.cementite * CEMENTITE_C_WT + s.austenite * s.carbon == pytest.approx(1.2, abs=1e-9)
    assert any("undissolved" in w for w in s.warnings())


def test_austenitizing_at_or_below_ae1_is_refused():
    with pytest.raises(InputError) as e:
        austenitize(Composition(c=0.4, mn=0.8), 700.0)
    assert "steel.austenitize_c" in str(e.value)


def test_alloyed_hypereutectoid_steel_warns_about_the_plain_fe_c_acm():
    s = austenitize(Composition(c=1.04, mn=0.35, si=0.25, cr=1.45), 845.0)
    assert any("no alloy correction" in w for w in s.warnings())
    plain = austenitize(Composition(c=1.04, mn=0.35, si=0.25), 845.0)
    assert not any("no alloy correction" in w for w in plain.warnings())


# -- grade library ----------------------------------------------------------------------------------
def test_grade_library_covers_the_families_with_consistent_ranges():
    table = grades()
    assert len(table) >= 12
    assert {"plain carbon", "low-alloy through-hardening", "carburizing", "bearing"} <= {g.family for g in table.values()}
    for g in table.values():
        for element, value in g.nominal.items():
            lo, hi = g.range[element]
            if hi > 0:
                assert lo - 1e-9 <= value <= hi + 1e-9, (g.name, element)
        Composition(**g.nominal)   # every nominal chemistry is accepted


def test_find_grade_is_case_insensitive_and_names_the_choices_when_unknown():
    assert find_grade("4140h").name == "4140H"
    with pytest.raises(InputError) as e:
        find_grade("unobtainium")
    assert "52100" in str(e.value)


def test_steels_command_lists_every_grade(cli):
    code, out, _ = cli("steels")
    assert code == 0
    for name in grades():
        assert name in out
    code, out, _ = cli("steels", "--json")
    data = json.loads(out)
    assert data["52100"]["en"] == "100Cr6" and data["4140"]["nominal_wt_pct"]["cr"] > 0.8


def test_case_with_a_grade_takes_its_chemistry_grain_size_and_austenitizing(tmp_path):
    from quenchwise.case import load_case

    p = tmp_path / "g.toml"
    p.write_text('[steel]\ngrade = "52100"\ncr = 1.5\n[part]\nshape = "bar"\ndiameter_mm = 20\n'
                 '[quench]\nhtc_w_m2k = 2000\n[transform]\nmodel = "kirkaldy1983"\n')
    case = load_case(p)
    g = find_grade("52100")
    assert case.grade == "52100" and case.composition.cr == 1.5 and case.composition.c == g.nominal["c"]
    assert case.grain_size == g.grain_size and case.austenitize_c == g.austenitize_c
    assert case.model == "kirkaldy1983"


def test_vanadium_carbide_holds_most_of_6150s_vanadium_at_its_hardening_temperature():
    # A low-carbon microalloyed steel (0.2C-0.1V) has all its vanadium in solution at about 900 C,
    # while in a 0.5 %C steel vanadium carbide survives the usual hardening temperatures (Gladman,
    # The Physical Metallurgy of Microalloyed Steels, 1997; memory).
    micro = austenitize(Composition(c=0.20, mn=1.2, si=0.3, v=0.10), 920.0)
    assert micro.austenite_composition.v == pytest.approx(0.10)
    assert not micro.warnings()
    s = austenitize(Composition(**find_grade("6150").nominal), 870.0)
    aus = s.austenite_composition
    assert aus.v < 0.5 * s.composition.v                   # most of the 0.20 % V stays as carbide
    assert aus.c < s.composition.c                          # with the carbon it binds
    assert s.composition.v == 0.20                          # the bulk chemistry stays as entered
    assert any("undissolved carbide" in w for w in s.warnings())
