"""Equivalent Grossmann H of the built-in curves against the handbook severity table.

Definition (thermal/severity.py): the constant h giving the same centre cooling time from 800 to
500 C in a 25 mm bar quenched from 850 C, pure conduction, k = 25 W/(m K); H = h / (2 k).

Outside check values: DOMAIN.md section 4, "ASM Handbook quench severity table (memory)". The
table gives ranges; each check accepts the range widened by 25 % at both ends (the issue's
tolerance), because the values are recalled and the table's own basis is not our definition.

Since the library became a model set to published probe figures (thermal/quenchant_model.py),
H is a derived number and a secondary check (DOMAIN.md section 4: where the H table and the
probe disagree, the probe decides). Where the derived H falls outside the widened table range the
check is a strict xfail with the reason: once cold water, agitation or salt breaks the vapour
blanket early (20 C water near 760 C), the 800->500 C window of a 25 mm bar sits in the boiling
peak of water and brine, where h of 10-30 kW/m2K gives H far above the table (the
definition cannot resolve severities above about 1.5: the centre of a 25 mm bar is then
conduction-limited). README "Quenchants" says so.
"""

import dataclasses

import numpy as np
import pytest

from quenchwise.thermal import severity
from quenchwise.thermal.quenchants import Quenchant, builtin_quenchants, htc_from_grossmann, load_quenchant

# (built-in curve, low, high [1/in], source)
_PEAK = ("derived H far above the table: the window lies in the boiling peak once the blanket is broken; the "
         "800->500 C definition does not resolve severities above about 1.5")
_OIL = ("derived H above the table: the probe figures of agitated oil (maximum 70-140 K/s, blanket broken near "
        "670 C) make the 800->500 C window of a 25 mm bar faster than the table's 'good agitation'")
ASM_CHECKS = [
    ("oil_conventional_60c_still", 0.25, 0.30, "ASM Handbook quench severity table (memory): oil, no agitation"),
    pytest.param("oil_conventional_60c_moderate", 0.40, 0.50, "ASM Handbook quench severity table (memory): oil, "
                 "good agitation", marks=pytest.mark.xfail(strict=True, reason=_OIL)),
    pytest.param("water_20c_still", 0.9, 1.0, "ASM Handbook quench severity table (memory): water, no agitation",
                 marks=pytest.mark.xfail(strict=True, reason=_PEAK)),
    pytest.param("water_20c_strong", 1.6, 2.0, "ASM Handbook quench severity table (memory): water, strong agitation",
                 marks=pytest.mark.xfail(strict=True, reason=_PEAK)),
    pytest.param("brine_10pct_20c_still", 2.0, 2.0, "ASM Handbook quench severity table (memory): brine, no "
                 "agitation, about 2.0", marks=pytest.mark.xfail(strict=True, reason=_PEAK)),
]
TOLERANCE = 0.25


@pytest.fixture(scope="module")
def library():
    """Every built-in curve and the constant-h sweep, one FiPy batch."""
    media = builtin_quenchants()
    return {s.name: s for s in severity.equivalent_severities(media)}


@pytest.mark.parametrize("name, low, high, source", ASM_CHECKS)
def test_builtin_curve_lands_in_the_handbook_range(library, name, low, high, source):
    s = library[name]
    assert s.note == ""
    assert (1 - TOLERANCE) * low <= s.grossmann_h <= (1 + TOLERANCE) * high, (
        f"{name}: H = {s.grossmann_h:.3f} 1/in, {source}: {low}-{high} +/- 25 %")


def test_still_air_is_about_two_hundredths(library):
    # DOMAIN.md section 4: still air about 0.02 1/in, ASM Handbook quench severity table (memory).
    # Our still air is natural convection plus radiation (emissivity 0.8, memory), which is strong
    # between 800 and 500 C: accept a factor of 2 (0.01-0.04), not the 25 % of the liquids.
    assert 0.01 <= library["air_20c_still"].grossmann_h <= 0.04


def test_every_builtin_gets_a_number_and_the_severity_orders_are_physical(library):
    assert all(np.isfinite(s.grossmann_h) and s.note == "" for s in library.values())
    h = {name: s.grossmann_h for name, s in library.items()}
    for family in ("water_20c", "water_40c", "water_70c", "brine_10pct_20c", "oil_conventional_60c", "oil_fast_60c",
                   "oil_hot_160c", "polymer_10pct_40c", "polymer_20pct_40c", "polymer_30pct_40c"):
        assert h[f"{family}_still"] < h[f"{family}_moderate"] < h[f"{family}_strong"], family
    for a in ("still", "moderate", "strong"):
        assert h[f"water_70c_{a}"] < h[f"water_40c_{a}"] < h[f"water_20c_{a}"] < h[f"brine_10pct_20c_{a}"]
        assert h[f"polymer_30pct_40c_{a}"] < h[f"polymer_20pct_40c_{a}"] < h[f"polymer_10pct_40c_{a}"]
        assert h[f"oil_conventional_60c_{a}"] < h[f"water_20c_{a}"]
    assert h["air_20c_still"] < h["gas_20c_forced"] < h["oil_conventional_60c_still"]


def test_a_constant_h_returns_its_own_severity():
    # The definition's consistency: a constant h in any bath gives back H = h / (2 k), to the
    # interpolation accuracy of the sweep (0.5 %).
    cases = [(0.05, 20.0), (0.35, 60.0), (1.0, 20.0), (2.5, 180.0)]
    media = [Quenchant.constant(float(htc_from_grossmann(g)), bath) for g, bath in cases]
    got = [s.grossmann_h for s in severity.equivalent_severities(media, sweep_h=np.geomspace(0.03, 4.0, 14))]
    np.testing.assert_allclose(got, [g for g, _ in cases], rtol=0.005)


def test_density_and_specific_heat_do_not_change_the_number(monkeypatch):
    # With constant properties only the Biot number and the Fourier number matter: rho cp rescales
    # every time alike, so the equivalence (and H) does not depend on it.
    media = [load_quenchant(n) for n in ("water_20c_still", "oil_hot_160c_moderate", "polymer_20pct_40c_still")]
    sweep = np.geomspace(0.15, 2.0, 12)
    before = [s.grossmann_h for s in severity.equivalent_severities(media, sweep_h=sweep)]
    monkeypatch.setattr(severity, "SPECIFIC_HEAT_J_KGK", 450.0)
    monkeypatch.setattr(severity, "DENSITY_KG_M3", 7000.0)
    after = [s.grossmann_h for s in severity.equivalent_severities(media, sweep_h=sweep)]
    np.testing.assert_allclose(after, before, rtol=0.01)


def test_the_definition_settings_are_converged_enough():
    # Halving the cell size and the step limit moves no built-in check curve by more than 2 % (was 1 % with
    # the old smooth shapes; the model curves collapse within 25 K, and still water and hot oil move 1.4 %).
    media = [load_quenchant(n) for n in ("oil_conventional_60c_still", "oil_conventional_60c_moderate",
                                         "water_20c_still", "polymer_20pct_40c_moderate", "oil_hot_160c_still")]
    sweep = np.geomspace(0.15, 3.5, 14)
    coarse = [s.grossmann_h for s in severity.equivalent_severities(media, sweep_h=sweep)]
    fine_settings = dataclasses.replace(severity.SETTINGS, cells=2 * severity.SETTINGS.cells, growth=1.04,
                                        max_temperature_step_k=severity.SETTINGS.max_temperature_step_k / 2,
                                        first_step_s=severity.SETTINGS.first_step_s / 2)
    original = severity.SETTINGS
    try:
        severity.SETTINGS = fine_settings
        fine = [s.grossmann_h for s in severity.equivalent_severities(media, sweep_h=sweep)]
    finally:
        severity.SETTINGS = original
    np.testing.assert_allclose(coarse, fine, rtol=0.02)


def test_curves_that_cannot_be_rated_get_a_note_not_an_error():
    dead = Quenchant("dead band (invented)", 20.0, np.array([20.0, 400.0, 450.0, 900.0]),
                     np.array([500.0, 500.0, 0.0, 0.0]))
    weak = Quenchant.constant(5000.0, 20.0)
    s_dead, s_fast = severity.equivalent_severities([dead, weak], sweep_h=np.geomspace(0.1, 1.0, 6))
    assert np.isnan(s_dead.grossmann_h) and "below" in s_dead.note
    assert np.isnan(s_fast.grossmann_h) and "faster than the sweep" in s_fast.note


def test_listed_severity_of_every_builtin_matches_the_computed_one(library):
    # Each built-in CSV lists its equivalent H ('# equivalent_h:') so that a run need not solve the
    # severity sweep again; this keeps the listed numbers honest (0.5 %: the sweep's interpolation).
    for q in builtin_quenchants():
        assert q.listed_grossmann_h is not None, q.name
        assert q.listed_grossmann_h == pytest.approx(library[q.name].grossmann_h, rel=0.005), q.name
    moved = load_quenchant("water_20c_still").at_bath(35.0)
    assert moved.listed_grossmann_h is None          # another bath: computed, never the listed value
