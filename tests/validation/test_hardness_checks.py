"""Outside checks of the per-phase hardness, the mixture and the scale conversions.

Each check names its source and tolerance beside the number."""

import numpy as np
import pytest

from quenchwise.hardness import hardness_hv, hrb_from_hv, hrc_from_hv, hv_from_hrc
from quenchwise.hardness.conversion import hv_from_hb
from quenchwise.hardness.phases import phase_hardness_hv
from quenchwise.steel import Composition, austenitize
from quenchwise.steel.grades import find_grade

PLAIN = dict(mn=0.8, si=0.25)   # a plain carbon base, the kind of steel Hodge & Orehoski measured


def _hrc(fractions, rate_k_s, chem):
    f = {k: np.array([v]) for k, v in fractions.items()}
    return float(hrc_from_hv(hardness_hv(f, np.array([rate_k_s]), chem))[0])


# Hodge & Orehoski (1946), Trans. AIME 167, 627, as tabulated in ASTM A255 (hardness against carbon
# for 99.9 % and 50 % martensite; memory, +/-3 HRC): 50 % martensite reads 31.5 / 36.6 / 41.6 /
# 45.8 / 49.2 HRC at 0.2 / 0.3 / 0.4 / 0.5 / 0.6 %C. DOMAIN.md's 14 + 44 sqrt(C) and 20 + 60 sqrt(C)
# are fits of that table; the 50 % fit reads 2.2 HRC above the table at 0.2 %C, so the 50 % check
# uses the table and the 99 % check the formula.
# The mixture is run at 100 K/s at 700 C (a position about 2/16-3/16 in from the quenched end of
# an end-quench bar) with the non-martensitic part as (fine) ferrite-pearlite, what plain carbon
# steels form there.
HO_50_TABLE = {0.2: 31.5, 0.3: 36.6, 0.4: 41.6, 0.5: 45.8, 0.6: 49.2}


@pytest.mark.parametrize("carbon", [0.2, 0.3, 0.4, 0.5, 0.6])
def test_hodge_orehoski_99_percent_martensite(carbon):
    got = _hrc({"martensite": 0.99, "pearlite": 0.01}, 100.0, dict(c=carbon, **PLAIN))
    assert got == pytest.approx(20.0 + 60.0 * np.sqrt(carbon), abs=3.0)


# Measured: -3.2 HRC at 0.2 %C (logarithmic mixture; the linear mixture with the pearlite correction
# reads +0.4 there but +3.9 to +5.4 at 0.4-0.6 %C). At 0.2 %C the partner is mostly soft ferrite
# (187 HV) and the mean of logarithms gives it much weight. Kept as a strict expected failure so a
# change shows.
_LOW_C = pytest.mark.xfail(strict=True, reason="logarithmic mixture, soft ferrite partner: -3.2 HRC at 0.2 %C (measured)")


@pytest.mark.parametrize("carbon", [pytest.param(0.2, marks=_LOW_C), 0.3, 0.4, 0.5, 0.6])
def test_hodge_orehoski_50_percent_martensite(carbon):
    got = _hrc({"martensite": 0.50, "pearlite": 0.50}, 100.0, dict(c=carbon, **PLAIN))
    assert got == pytest.approx(HO_50_TABLE[carbon], abs=3.0)


def test_hodge_orehoski_50_percent_is_no_target_for_martensite_with_bainite():
    # Issue 12: 50 % martensite + 50 % bainite of a 4140 reads about +7 HRC over Hodge & Orehoski.
    # Checked against the band it must also meet: at J32 of the 4140H band (30-44 HRC, SAE J1268,
    # memory) the structure is mostly bainite, and the cooling rate there is about 2 K/s at 700 C
    # (ASTM A255 scale, 1.94 K/s, memory). Maynier's bainite at that rate reads inside that band, so
    # it is not too hard. With it, 50/50 martensite and bainite at 10 K/s reads at least the harmonic
    # (iso-stress) mean, the softest a two-phase mixture can read, and that is still more than 3 HRC
    # over the A255 table's 41.6 HRC at 0.4 %C: the 50 % martensite hardness of Hodge & Orehoski
    # (measured where the other half is fine pearlite and ferrite) cannot be met by any mixture rule
    # with this bainite; the mixture stays as it is and the bar centres' excess is in the fractions.
    chem = find_grade("4140").nominal
    bainite_tail = float(hrc_from_hv(phase_hardness_hv(np.array([1.94]), chem)["bainite"][0]))
    assert 30.0 <= bainite_tail <= 44.0, bainite_tail
    h = phase_hardness_hv(np.array([10.0]), chem)
    m, b = float(h["martensite"][0]), float(h["bainite"][0])
    harmonic = float(hrc_from_hv(2.0 / (1.0 / m + 1.0 / b)))
    ours = _hrc({"martensite": 0.5, "bainite": 0.5}, 10.0, chem)
    assert harmonic - HO_50_TABLE[0.4] > 3.0, harmonic
    assert harmonic <= ours <= float(hrc_from_hv(0.5 * (m + b))), ours


def test_linear_mixture_with_fine_pearlite_is_too_hard_at_50_percent_martensite():
    # Why the default mixture is logarithmic: with the corrected (fine) pearlite the arithmetic
    # mean reads 50 % martensite of a 0.5 %C steel more than 3 HRC above Hodge & Orehoski (A255
    # table, memory); the logarithmic mean is within 3 HRC.
    chem = dict(c=0.5, **PLAIN)
    f = {"martensite": np.array([0.5]), "pearlite": np.array([0.5])}
    linear = float(hrc_from_hv(hardness_hv(f, np.array([100.0]), chem, rule="linear"))[0])
    assert linear - HO_50_TABLE[0.5] > 3.0
    assert abs(_hrc({"martensite": 0.5, "pearlite": 0.5}, 100.0, chem) - HO_50_TABLE[0.5]) <= 3.0


# Normalized and annealed carbon steels, 25 mm (1 in) rounds: ASM Handbook Vol. 1 (1990), table of
# properties of carbon steels normalized and annealed (memory). Normalized HB 131 / 149 / 170 / 217 /
# 229 / 293 / 293, annealed HB 111 / 126 / 149 / 187 / 179 / 174 / 192 for 1020 / 1030 / 1040 /
# 1050 / 1060 / 1080 / 1095. Chemistries: middles of the SAE J403 ranges (memory). The structure
# is ferrite-pearlite; a 25 mm bar in still air cools at 1.67 K/s at 700 C (quenchwise's own
# still-air solution), a furnace cool at about 0.01 K/s (20-40 C/h; common practice, no source).
# Tolerance +/-35 HV: handbook HB of different heats scatter by about 10 % (memory); HB = HV below
# 226 HB (ASTM E140, hardness/astm_e140.csv).
CARBON_STEELS = {  # grade: (chemistry, normalized HB, annealed HB)
    "1020": (dict(c=0.20, mn=0.45, si=0.25), 131, 111),
    "1030": (dict(c=0.30, mn=0.75, si=0.25), 149, 126),
    "1040": (dict(c=0.40, mn=0.75, si=0.25), 170, 149),
    "1050": (dict(c=0.50, mn=0.75, si=0.25), 217, 187),
    "1060": (dict(c=0.60, mn=0.75, si=0.25), 229, 179),
    "1080": (dict(c=0.80, mn=0.75, si=0.25), 293, 174),
    "1095": (dict(c=0.95, mn=0.40, si=0.25), 293, 192),
}


def _fp_hv(rate_k_s, chem, relations="corrected"):
    return float(phase_hardness_hv(np.array([rate_k_s]), chem, relations)["ferrite_pearlite"][0])


@pytest.mark.parametrize("grade", list(CARBON_STEELS))
def test_normalized_carbon_steels(grade):
    chem, hb, _ = CARBON_STEELS[grade]
    assert _fp_hv(1.67, chem) == pytest.approx(float(hv_from_hb(hb)), abs=35.0)


@pytest.mark.parametrize("grade", list(CARBON_STEELS))
def test_annealed_carbon_steels(grade):
    chem, _, hb = CARBON_STEELS[grade]
    assert _fp_hv(0.01, chem) == pytest.approx(float(hv_from_hb(hb)), abs=35.0)


def test_annealed_eutectoid_is_too_hard_with_the_published_relation():
    # What the correction is for: Maynier's relation has almost no cooling-rate term for a plain
    # carbon steel, so furnace-cooled 1080 reads about 90 HV above the handbook's 174 HB.
    chem, _, hb = CARBON_STEELS["1080"]
    assert _fp_hv(0.01, chem, "maynier1978") - float(hv_from_hb(hb)) > 60.0


# Normalized low-alloy steels whose normalized structure is ferrite-pearlite (memory): 5140 229 HB,
# 5160 269 HB, 8620 183 HB, 4130 197 HB (ASM Handbook Vol. 1 (1990), memory); grade nominals of the
# built-in library. Same rate and tolerance as above.
@pytest.mark.parametrize("grade,hb", [("5140", 229), ("5160", 269), ("8620", 183), ("4130", 197)])
def test_normalized_low_alloy_ferrite_pearlite_steels(grade, hb):
    assert _fp_hv(1.67, find_grade(grade).nominal) == pytest.approx(float(hv_from_hb(hb)), abs=35.0)


# Normalized 6150 (Cr-V): 269 HB, normalized from 870 C (ASM Handbook Vol. 1 (1990), normalized alloy
# steels; memory), as hard as 5160 although it has less carbon. Maynier's ferrite-pearlite relation adds
# 130 V HV per decade of cooling rate (precipitation of vanadium carbide in the ferrite), which only the
# vanadium in solution in the austenite can give: at 870 C most of 6150's 0.20 % V stays as undissolved
# carbide (steel.austenite.vanadium_carbide_balance, Narita 1975). Same rate and tolerance as above.
def _normalized_6150_hv(vanadium_in_solution: bool) -> float:
    steel = find_grade("6150")
    state = austenitize(Composition(**steel.nominal), 870.0)
    chem = state.austenite_composition.as_dict() if vanadium_in_solution else steel.nominal
    return _fp_hv(1.67, chem)


def test_normalized_6150_reads_its_handbook_hardness_with_the_vanadium_in_solution():
    assert _normalized_6150_hv(True) == pytest.approx(float(hv_from_hb(269)), abs=35.0)


def test_normalized_6150_was_too_hard_with_all_its_vanadium_counted():
    # The symptom: with the bulk 0.20 % V the relation reads about 80 HV above the handbook.
    assert _normalized_6150_hv(False) - float(hv_from_hb(269)) > 60.0


@pytest.mark.parametrize("rate_k_s", [5.0, 10.0, 15.0, 25.0])
def test_oil_quenched_1080_pearlite_reads_about_40_hrc(rate_k_s):
    # 1080 bars quenched in oil read about 40 HRC where they are pearlitic (issue 12; handbook
    # mass-effect data, memory, +/-3 HRC), i.e. at 5-25 K/s at 700 C (25-100 mm bars in oil).
    # Fine pearlite of a eutectoid steel is about 40 HRC (isothermal atlases, memory).
    got = float(hrc_from_hv(_fp_hv(rate_k_s, find_grade("1080").nominal)))
    assert got == pytest.approx(40.0, abs=3.0)


def test_oil_quenched_1080_was_too_soft_with_the_published_relation():
    # The symptom of issue 12: Maynier's relation gives 27-28 HRC there.
    assert float(hrc_from_hv(_fp_hv(15.0, find_grade("1080").nominal, "maynier1978"))) < 30.0


@pytest.mark.parametrize("grade", ["1045", "4140", "5140", "8620", "4340", "1080"])
def test_order_of_product_hardness(grade):
    # martensite > bainite > fine pearlite > coarse pearlite (common practice, no source).
    # Martensite and bainite as formed in a fast quench (100 and 10 K/s at 700 C), fine pearlite
    # on air cooling of a small section (3 K/s), coarse pearlite in a furnace cool (0.01 K/s).
    chem = find_grade(grade).nominal
    m = phase_hardness_hv(np.array([100.0]), chem)["martensite"][0]
    b = phase_hardness_hv(np.array([10.0]), chem)["bainite"][0]
    fine = phase_hardness_hv(np.array([3.0]), chem)["ferrite_pearlite"][0]
    coarse = phase_hardness_hv(np.array([0.01]), chem)["ferrite_pearlite"][0]
    assert m > b > fine > coarse


def test_each_product_is_ranked_the_same_at_one_cooling_rate():
    # At any one cooling rate the groups keep the order martensite > bainite > ferrite-pearlite
    # (common practice, no source), for a 0.4C-Cr-Mo steel over 0.3-300 K/s.
    chem = find_grade("4140").nominal
    h = phase_hardness_hv(np.geomspace(0.3, 300.0, 12), chem)
    assert np.all(h["martensite"] > h["bainite"]) and np.all(h["bainite"] > h["ferrite_pearlite"])


def test_retained_austenite_and_undissolved_carbide_are_counted_as_documented():
    # Retained austenite is a phase at RETAINED_AUSTENITE_HV; undissolved carbide is left out and
    # the rest renormalized (phases.py docstring).
    chem = dict(c=1.0, mn=0.35, si=0.25, cr=1.45)
    rate = np.array([100.0])
    hv_m = phase_hardness_hv(rate, chem)["martensite"][0]
    f = {"martensite": np.array([0.80]), "austenite": np.array([0.15]), "cementite": np.array([0.05])}
    # Retained austenite is added by volume in both mixture rules (combine_phases_hv), so with only
    # martensite beside it the two rules agree. A through-hardened 52100-type steel with 10-20 %
    # retained austenite reads 60-66 HRC as quenched (bearing-steel practice, common practice, no
    # source), softer than its martensite alone.
    got = [hardness_hv(f, rate, chem, undissolved_cementite=0.05, rule=rule)[0] for rule in ("logarithmic", "linear")]
    assert got[0] == pytest.approx(got[1], rel=1e-9)
    assert 60.0 <= float(hrc_from_hv(got[0])) <= 66.0 and got[0] < hv_m


def test_conversion_anchors_of_astm_e140():
    # ASTM E140 Table 1 rows: HRC 20 = HV 238, 30 = 302, 40 = 392, 50 = 513, 60 = 697 (memory).
    # These are rows of the table, so the conversion must return them exactly (to the rounding of
    # the table), both ways; between rows it interpolates.
    for hrc, hv in ((20, 238), (30, 302), (40, 392), (50, 513), (60, 697)):
        assert float(hrc_from_hv(hv)) == pytest.approx(hrc, abs=0.05)
        assert float(hv_from_hrc(hrc)) == pytest.approx(hv, abs=0.5)


def test_no_silent_extrapolation_soft_values_go_to_hrb():
    # Below HRC 20 the conversion gives NaN (never extrapolated) and HRB covers the value.
    assert np.isnan(hrc_from_hv(200.0)) and 90.0 < float(hrb_from_hv(200.0)) < 95.0
    assert np.isnan(hrb_from_hv(400.0)) and np.isnan(hrc_from_hv(1200.0))


def test_high_carbon_martensite_levels_off_near_65_hrc():
    # As-quenched martensite hardness levels off near 65 HRC from about 0.6 %C (Krauss, G. (1999),
    # Mater. Sci. Eng. A 273-275, 40; memory, +/-3 HRC): eutectoid and 52100-type austenite.
    import numpy as np

    from quenchwise.hardness import hardness_hv, hrc_from_hv

    for chem in (dict(c=0.77, mn=0.75, si=0.2), dict(c=1.0, mn=0.35, si=0.25, cr=1.45)):
        hv = hardness_hv({"martensite": np.array([1.0])}, np.array([150.0]), chem)
        assert 62.0 <= float(hrc_from_hv(hv)[0]) <= 68.0, chem


def test_mixture_is_finite_where_an_absent_phase_has_no_meaningful_hardness():
    # Maynier's bainite relation is negative for a plain low-carbon steel cooled in a furnace, where
    # no bainite forms; the mixture of the phases present must not turn NaN because of it.
    chem = dict(c=0.2, mn=0.45, si=0.25)
    rate = np.array([0.003])
    assert phase_hardness_hv(rate, chem)["bainite"][0] < 0.0
    f = {"ferrite": np.array([0.75]), "pearlite": np.array([0.25]), "bainite": np.array([0.0])}
    assert np.isfinite(hardness_hv(f, rate, chem)).all()


@pytest.mark.parametrize("temper_c", [120.0, 160.0, 205.0, 400.0])
def test_a_temper_never_reads_harder_than_as_quenched_in_a_mixed_zone(temper_c):
    # Tempering does not harden low-alloy steels (common practice, no source; tempering.py): the
    # tempered mixture uses the as-quenched mixture rule, so a half-martensitic, half-bainitic node
    # with some ferrite-pearlite and retained austenite only softens.
    from quenchwise.hardness.tempering import tempered_hardness_hv

    chem = find_grade("4140").nominal
    f = {"martensite": np.array([0.45]), "bainite": np.array([0.40]), "pearlite": np.array([0.1]),
         "austenite": np.array([0.05])}
    rate = np.array([8.0])
    tempered, _ = tempered_hardness_hv(f, rate, chem, temper_c, 1.0)
    assert float(tempered[0]) <= float(hardness_hv(f, rate, chem)[0]) + 1e-9


def test_normalized_4340_reads_as_maynier_bainite():
    # A normalized 25 mm round of 4340 is essentially bainitic (its air-cooled structure; memory) and
    # reads 363 HB (ASM Handbook Vol. 1 (1990), normalized alloy steels; memory); Maynier's bainite
    # relation at the still-air rate (1.67 K/s, as above) within +/-35 HV of it.
    hv = float(phase_hardness_hv(np.array([1.67]), find_grade("4340").nominal)["bainite"][0])
    assert hv == pytest.approx(float(hv_from_hb(363.0)), abs=35.0)
