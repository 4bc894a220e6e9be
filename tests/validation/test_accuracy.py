"""The fast subset of the accuracy scorecard (benchmarks/accuracy.py): a regression in the default
chain (kinetics, hardness, end-quench specimen) fails here.

Reference: SAE J1268 H-bands (memory; benchmarks/data/hbands_sae_j1268.csv, +/-1-2 HRC per recalled
point) of one grade per family the end-quench scorecard found systematically off with the published
Li et al. (1998) coefficients: plain carbon (1045H), Cr-Mo (4140H), Cr at 0.6 %C (5160H), low-carbon
Ni-Cr-Mo (8620H), boron (15B35H). Coarse steps (they read within 0.5 HRC of the default ones,
tests/validation/test_jominy.py).

Measured with the default model (li1998-multigrade, fitted on the H-bands and the handbook bars,
issue 12) when written: 93.1 % of the 116 points in the band, 99.1 % within +/-2 HRC, 100 % within
+/-4; J of 50 % martensite hardness 2.1 / 11.8 / 11.1 / 4.0 / 6.6 against the band middles'
2.6 / 20.0 / 10.2 / 4.1 / 6.8 (4140H is the weak one: in the band but on its soft side beyond J16;
the end-quench-only fit before it read J13.5, -33 %; now -41 %, see the strict expected failure).
The published coefficients on the same subset: 82.8 % within +/-2 HRC, 1045H and 5160H with more
than 2 points outside +/-4 HRC, 5160H J50 at J21.6 (+112 %). The tolerances below leave about 1
point of slack for numerics.
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
    assert t["within_2_pct"] >= 98.0, t
    assert t["within_4_pct"] >= 98.0, t
    assert not t["grades_over_2_outside_4"], t


def test_position_of_50_percent_martensite_follows_the_band_middle(subset):
    # Hodge & Orehoski (1946) 50 % martensite hardness on the band middle (memory, +/-3 HRC; on the flat
    # 4140H band middle 3 HRC moves that position from about J15 to J26): within 40 % of the band's J
    # position or 1.5 sixteenths, whichever is larger (measured: 4140H -33 %, the others within 10 %).
    # 4140H: the strict expected failure below.
    for grade, s in subset.items():
        if grade != "4140H":
            assert abs(s.j50_sim - s.j50_band) <= max(1.5, 0.4 * s.j50_band), (grade, s.j50_sim, s.j50_band)


@pytest.mark.xfail(strict=True, reason="the bar-constrained calibration moved 4140H's 50 % martensite hardness from "
                   "J13.5 (-33 %) to J11.8-11.9 (-41 %) against the band middle's J20; same tolerance as above, not loosened")
def test_4140h_position_of_50_percent_martensite(subset):
    s = subset["4140H"]
    assert abs(s.j50_sim - s.j50_band) <= max(1.5, 0.4 * s.j50_band), (s.j50_sim, s.j50_band)


def test_boron_grade_is_scored_and_hardens_like_its_band(subset):
    # 15B35H: without boron a 0.35C-0.95Mn steel reaches 50 % martensite near J3 (A255 DI about
    # 0.9 in); the band puts it near J7 (SAE J1268, memory).
    assert subset["15B35H"].j50_sim > 5.0


# -- handbook bars (scorecard section (b), the one bar scorer; about 6 s) ---------------------------
# Reference: handbook as-quenched round bars (benchmarks/data/mass_effect_bars.csv: 84 readings of
# 7 grades, 1/2-4 in, recalled, memory +/-5 HRC), quenched in mildly agitated water and oil and read
# where the handbook read them (surface 1.6 mm deep). Measured when written (default model, calibrated
# on the H-bands and these bars, benchmarks/calibrate_kinetics.py): 66.7 % of the readings within
# 3 HRC (56 of 84; 47.6 % with the end-quench-only fit before), bias -1.7 / +0.1 / +2.0 HRC at
# surface / half radius / centre (before -0.1 / +1.2 / +2.9: the surface moved away from zero, the
# centre into the issue's +/-2.5). With 6150's undissolved vanadium carbide (steel/austenite.py) and
# the refit: still 56 of 84, RMS 3.7 -> 3.5 HRC, bias -1.7 / -0.2 / +1.6. The 70 % is not met.
# These bars were used in the fit (their held-out score is in the coefficient file's header); the
# guards hold the level reached, with one reading and a few tenths of HRC of slack for numerics.
@pytest.fixture(scope="module")
def bars():
    from quenchwise.case import DEFAULT_MODEL
    return accuracy.bar_summary(accuracy.run_bars(DEFAULT_MODEL))


def test_handbook_bars_hold_the_level_reached(bars):
    assert bars["readings"] == 84
    assert bars["within_3_pct"] >= 100.0 * 55 / 84, bars["within_3_pct"]
    assert bars["rms"] <= 3.7, bars["rms"]


@pytest.mark.parametrize("position, limit", [("surface", 2.0), ("half_radius", 0.5), ("centre", 1.9)])
def test_handbook_bar_bias_by_position(bars, position, limit):
    assert abs(bars["groups"][("position", position)]["bias"]) <= limit, bars["groups"][("position", position)]
