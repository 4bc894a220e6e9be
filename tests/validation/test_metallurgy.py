"""Outside checks of the steel and kinetics layers, each with its source and tolerance beside it.

Values marked (memory) were written down from memory of the literature (see ../shared/DOMAIN.md);
"common practice, no source" marks facts of the trade.
"""

import numpy as np
import pytest

from quenchwise.case import parse_case
from quenchwise.kinetics import Kirkaldy1983, Li1998
from quenchwise.kinetics.diagrams import cct_diagram, ttt_diagram
from quenchwise.kinetics.transformation import PRODUCTS
from quenchwise.steel import Composition, austenitize
from quenchwise.steel.critical import acm_linear, andrews_ae3, andrews_ms, martensite_start
from quenchwise.workflows import simulate

MODELS = {"li1998": Li1998(), "kirkaldy1983": Kirkaldy1983()}
CRMO = Composition(c=0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20)
#: Eutectoid plain carbon steel of the isothermal transformation atlases: 0.79C-0.76Mn (memory).
EUTECTOID = Composition(c=0.79, mn=0.76, si=0.25)


# -- critical temperatures --------------------------------------------------------------------------
def test_ms_of_the_cr_mo_steel():
    # Ms of 0.40C-0.85Mn-0.95Cr-0.20Mo about 330-340 C: isothermal transformation atlases (memory, +/-30 C).
    # Default (Andrews 1965 product formula) 328 C; Andrews linear 331 C.
    ms = float(martensite_start(CRMO.c, CRMO.mn, CRMO.ni, CRMO.cr, CRMO.mo))
    assert 330.0 - 30.0 <= ms <= 340.0 + 30.0


def test_ms_of_a_eutectoid_plain_carbon_steel():
    # Ms of a eutectoid plain carbon steel about 220 C: isothermal transformation atlases (memory, +/-30 C).
    # Default (Andrews 1965 product formula, van Bohemen 2012 carbon term above 0.6 %C) 229 C; the product
    # formula alone 247 C. Andrews' linear formula gives 182 C here, outside the
    # tolerance (it was fitted below 0.6 %C): that is why the product formula is the default.
    ms = float(martensite_start(EUTECTOID.c, EUTECTOID.mn, EUTECTOID.ni, EUTECTOID.cr, EUTECTOID.mo))
    assert 220.0 - 30.0 <= ms <= 220.0 + 30.0
    assert float(andrews_ms(EUTECTOID.c, EUTECTOID.mn)) < 220.0 - 30.0


# -- austenitizing ----------------------------------------------------------------------------------
def test_eutectoid_point_of_plain_fe_c():
    # Eutectoid of plain Fe-C about 0.76-0.77 %C at 727 C (common practice, no source).
    # (1) The carbon that austenite holds just above 727 C is eutectoid.
    s = austenitize(Composition(c=1.0), 728.0)
    assert 0.76 <= s.carbon <= 0.78 and s.cementite > 0.0
    # (2) Independently, Andrews' Ae3 of plain Fe-C meets the Acm line near that point
    # (allow 0.015 %C and 5 K: Andrews' Ac3 is a fit, not the equilibrium line).
    c = np.linspace(0.70, 0.85, 15001)
    i = int(np.argmin(np.abs(andrews_ae3(c) - acm_linear(c))))
    assert abs(c[i] - 0.765) <= 0.02 and abs(float(acm_linear(c[i])) - 727.0) <= 5.0


def test_a_1_13_percent_carbon_steel_is_fully_austenitic_only_above_about_850_c():
    # 1.13 %C single-phase austenite only above about 850 C (common practice, no source; +/-25 C).
    steel = Composition(c=1.13, mn=0.3, si=0.2)
    temps = np.arange(760.0, 950.0, 0.5)
    undissolved = np.array([austenitize(steel, t).cementite for t in temps])
    fully = temps[undissolved == 0.0].min()
    assert 850.0 - 25.0 <= fully <= 850.0 + 25.0
    assert austenitize(steel, fully - 10.0).carbon < 1.13


@pytest.mark.xfail(strict=True, reason="known limitation: Acm has no alloy correction (steel/critical.py)")
def test_bearing_steel_hardened_from_845_c_keeps_carbide_and_about_0_65_percent_carbon_in_austenite():
    # 52100 (1.0C-1.45Cr) hardened from about 845 C: about 0.6-0.7 %C dissolved, some carbide left,
    # under about 15 % retained austenite after an oil quench (memory). The plain Fe-C Acm line puts
    # all 1.04 %C in solution; this test fails until a cited Cr correction of Acm exists.
    s = austenitize(Composition(c=1.04, mn=0.35, si=0.25, cr=1.45), 845.0)
    assert 0.55 <= s.carbon <= 0.75 and s.cementite > 0.02


# -- isothermal diagrams --------------------------------------------------------------------------------
@pytest.mark.parametrize("model", sorted(MODELS))
def test_pearlite_nose_of_a_eutectoid_plain_carbon_steel(model):
    # Start near 1 s at 540-560 C: isothermal transformation atlases (memory, factor 3 on time).
    d = ttt_diagram(austenitize(EUTECTOID, 820.0), 7.0, MODELS[model])
    for t in (540.0, 550.0, 560.0):
        start = float(np.interp(t, d.temperature_c[::-1], d.start_s["pearlite"][::-1]))
        assert 1.0 / 3.0 <= start <= 3.0, (t, start)
    nose_t = d.nose("pearlite")[1]
    assert 520.0 <= nose_t <= 590.0


@pytest.mark.parametrize("model", sorted(MODELS))
def test_cr_mo_steel_shows_a_bainite_bay_below_the_pearlite_nose(model):
    # Isothermal diagrams of 0.40C-Cr-Mo steels show the bainite C-curve separated from the
    # ferrite-pearlite one by a bay (isothermal transformation atlases, memory; qualitative).
    d = ttt_diagram(austenitize(CRMO, 850.0), 7.0, MODELS[model])
    pearlite, bainite = d.nose("pearlite"), d.nose("bainite")
    assert pearlite[1] - bainite[1] >= 50.0                 # two distinct C-curves
    bay = d.bay()
    assert bay is not None and bainite[1] < bay[1] < pearlite[1]
    upper_start = float(np.interp(pearlite[1], d.temperature_c[::-1], d.total_start_s[::-1]))
    assert bay[0] > upper_start and bay[0] > bainite[0]      # a local maximum of the overall start


# -- continuous cooling: more undercooling gives finer pearlite, then bainite ---------------------------------
def test_pearlite_gets_harder_as_the_eutectoid_steel_cools_faster():
    # Finer, harder pearlite with more undercooling (common practice, no source): on fully pearlitic
    # paths the hardness (Maynier et al. 1978, rising with the rate at 700 C) rises with the rate.
    d = cct_diagram(austenitize(EUTECTOID, 820.0), 7.0, Li1998())
    pearlitic = sorted((p for p in d.family("constant_rate") if p.final["pearlite"] > 0.99),
                       key=lambda p: p.parameter)
    assert len(pearlitic) >= 10
    hv = np.array([p.hv for p in pearlitic])
    assert np.all(np.diff(hv) > 0.0)
    # ...and the pearlite forms at lower temperatures (more undercooling) the faster the cooling.
    starts = np.array([p.events[("pearlite", "start")][1] for p in pearlitic])
    assert np.all(np.diff(starts) < 0.0)


@pytest.mark.parametrize("model", sorted(MODELS))
def test_bainite_appears_at_faster_cooling_than_ferrite_pearlite(model):
    # Then bainite (common practice, no source): slow paths give ferrite-pearlite only, bainite
    # appears only on faster paths, and martensite on faster ones still.
    d = cct_diagram(austenitize(CRMO, 850.0), 7.0, MODELS[model])
    paths = sorted(d.family("constant_rate"), key=lambda p: p.parameter)
    with_bainite = [p.parameter for p in paths if p.final["bainite"] >= 0.01]
    with_martensite = [p.parameter for p in paths if p.final["martensite"] >= 0.01]
    assert paths[0].final["ferrite"] + paths[0].final["pearlite"] > 0.99
    assert with_bainite and max(p.final["bainite"] for p in paths) >= 0.3
    assert min(with_bainite) > paths[0].parameter and min(with_martensite) > min(with_bainite)


# -- mass conservation ------------------------------------------------------------------------------------
BEARING_RUN = """
title = "invented: 20 mm bearing-steel bar in still oil"
[steel]
grade = "52100"
[part]
shape = "bar"
diameter_mm = 20
[quench]
medium = "oil_conventional_60c_still"
end_c = 80
[transform]
model = "kirkaldy1983"
"""


def test_fractions_sum_to_one_everywhere():
    # Mass conservation: every node's fractions sum to 1 within 1e-9 (a property of the method).
    for steel, t_aus in ((CRMO, 850.0), (EUTECTOID, 820.0), (Composition(c=1.2, mn=0.3), 790.0)):
        for p in cct_diagram(austenitize(steel, t_aus), 7.0, Li1998()).paths:
            assert sum(p.final[k] for k in PRODUCTS) == pytest.approx(1.0, abs=1e-9)
    result = simulate([parse_case(__import__("tomllib").loads(BEARING_RUN), BEARING_RUN)])[0]
    total = sum(result.fractions[k] for k in PRODUCTS)
    np.testing.assert_allclose(total, 1.0, atol=1e-9)
    assert any("no alloy correction" in w for w in result.warnings())
