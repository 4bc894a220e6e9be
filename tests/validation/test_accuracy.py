"""The fast subset of the accuracy scorecard (benchmarks/accuracy.py): a regression in the default
chain (kinetics, hardness, end-quench specimen) fails here.

Reference: SAE J1268 H-bands (memory; benchmarks/data/hbands_sae_j1268.csv, +/-1-2 HRC per recalled
point) of one grade per family the end-quench scorecard found systematically off with the published
Li et al. (1998) coefficients: plain carbon (1045H), Cr-Mo (4140H), Cr at 0.6 %C (5160H), low-carbon
Ni-Cr-Mo (8620H), boron (15B35H). Coarse steps (they read within 0.5 HRC of the default ones,
tests/validation/test_jominy.py).

Measured with the default model (li1998-multigrade, fitted on top of the hardness relations of
issue 12 item 4) when written: 93.1 % of the 116 points in the band, 96.6 % within +/-2 HRC, 100 %
within +/-4; J of 50 % martensite hardness 2.8 / 13.5 / 10.8 / 3.9 / 6.4 against the band middles'
2.6 / 20.0 / 10.2 / 4.1 / 6.8 (4140H is the weak one: in the band but on its soft side beyond J16).
The published coefficients on the same subset: 82.8 % within +/-2 HRC, 1045H and 5160H with more
than 2 points outside +/-4 HRC, 5160H J50 at J21.6 (+112 %). The tolerances below leave about 2
points of slack for numerics.
"""

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "benchmarks"))
import accuracy  # noqa: E402


@pytest.fixture(scope="module")
def subset():
    return accuracy.quick_endquench()


def test_default_model_meets_the_bands_of_the_subset(subset):
    t = accuracy.totals(subset)
    assert t["within_2_pct"] >= 93.0, t
    assert t["within_4_pct"] >= 98.0, t
    assert not t["grades_over_2_outside_4"], t


def test_position_of_50_percent_martensite_follows_the_band_middle(subset):
    # Hodge & Orehoski (1946) 50 % martensite hardness on the band middle (memory, +/-3 HRC; on the flat
    # 4140H band middle 3 HRC moves that position from about J15 to J26): within 40 % of the band's J
    # position or 1.5 sixteenths, whichever is larger (measured: 4140H -33 %, the others within 10 %).
    for grade, s in subset.items():
        assert abs(s.j50_sim - s.j50_band) <= max(1.5, 0.4 * s.j50_band), (grade, s.j50_sim, s.j50_band)


def test_boron_grade_is_scored_and_hardens_like_its_band(subset):
    # 15B35H: without boron a 0.35C-0.95Mn steel reaches 50 % martensite near J3 (A255 DI about
    # 0.9 in); the band puts it near J7 (SAE J1268, memory).
    assert subset["15B35H"].j50_sim > 5.0


# -- handbook bars (scorecard section (b), the one bar scorer; about 6 s) ---------------------------
# Reference: handbook as-quenched round bars (benchmarks/data/mass_effect_bars.csv: 84 readings of
# 7 grades, 1/2-4 in, recalled, memory +/-5 HRC), quenched in mildly agitated water and oil and read
# where the handbook read them (surface 1.6 mm deep). Measured when written (default model): 47.6 %
# of the readings within 3 HRC (40 of 84), bias -0.1 / +1.2 / +2.9 HRC at surface / half radius /
# centre. The targets (70 %, every position within +/-2.5) are not met: the centre bias
# comes from the kinetics, which put more martensite at a bar centre than at the end-quench position
# of the same cooling rate at 700 C (scorecard section (d)). The guards hold the level reached, with
# one reading and a few tenths of HRC of slack for numerics.
@pytest.fixture(scope="module")
def bars():
    from quenchwise.case import DEFAULT_MODEL
    return accuracy.bar_summary(accuracy.run_bars(DEFAULT_MODEL))


def test_handbook_bars_hold_the_level_reached(bars):
    assert bars["readings"] == 84
    assert bars["within_3_pct"] >= 100.0 * 39 / 84, bars["within_3_pct"]
    assert bars["rms"] <= 5.4, bars["rms"]


@pytest.mark.parametrize("position, limit", [("surface", 0.6), ("half_radius", 1.6), ("centre", 3.3)])
def test_handbook_bar_bias_by_position(bars, position, limit):
    assert abs(bars["groups"][("position", position)]["bias"]) <= limit, bars["groups"][("position", position)]
