"""Ms at high carbon (issue 12 item 6): the default Ms must fall with carbon up to 1.4 %C.

Andrews' product formula (1965) rises with carbon above about 1.1 %C (its C^2 term); the default
(steel.critical.ms_andrews_joined) continues it above 0.6 %C with the carbon term of van Bohemen
(2012), which falls everywhere. Each check names its source and tolerance."""

import numpy as np
import pytest

from quenchwise.steel.critical import andrews_ms_product, martensite_start, van_bohemen_ms

ALLOYS = [dict(), dict(mn=0.35), dict(mn=0.8), dict(mn=0.35, cr=1.45), dict(mn=0.6, ni=1.8, cr=0.8, mo=0.25),
          dict(mn=1.2, cr=0.5, mo=0.5)]


@pytest.mark.parametrize("alloy", ALLOYS)
def test_default_ms_falls_with_carbon_from_0_to_1_4_percent(alloy):
    c = np.linspace(0.0, 1.4, 281)
    assert np.all(np.diff(martensite_start(c, **alloy)) < 0.0)


@pytest.mark.parametrize("alloy", ALLOYS)
def test_van_bohemen_ms_falls_with_carbon_up_to_2_percent(alloy):
    c = np.linspace(0.0, 2.0, 201)
    assert np.all(np.diff(van_bohemen_ms(c, **alloy)) < 0.0)


def test_the_published_product_formula_alone_rises_above_about_1_1_percent_carbon():
    # Why the default is joined: Andrews' product Ms of a 0.35 Mn steel at 1.4 %C is above its 1.1 %C value.
    assert float(andrews_ms_product(1.4, mn=0.35)) > float(andrews_ms_product(1.1, mn=0.35))


# Ms of plain Fe-C (Mn about 0) at high carbon: about 210 / 170 / 130 C at 1.0 / 1.2 / 1.4 %C
# (compilations of measured Ms against carbon, e.g. Krauss, Steels: Processing, Structure, and
# Performance, ASM International (2005), Ms-carbon figure; memory, +/-40 C).
@pytest.mark.parametrize("carbon,ms", [(1.0, 210.0), (1.2, 170.0), (1.4, 130.0)])
def test_high_carbon_ms_of_plain_fe_c(carbon, ms):
    assert float(martensite_start(carbon)) == pytest.approx(ms, abs=40.0)


def test_joined_ms_is_continuous_at_the_join():
    # No step at 0.6 %C (the join of the two published formulas).
    lo, hi = martensite_start(np.array([0.6 - 1e-9, 0.6 + 1e-9]), mn=0.8, cr=0.9)
    assert abs(float(hi) - float(lo)) < 1e-6
