"""The simulated end-quench (Jominy) test against published bands and cooling rates.

Settings: the 1-D axial model with coarse steps (24 K, 0.1 fraction per step) for speed. Verified:
against the default steps (12 K, 0.05) and against a fine run (96 axial cells, 6 K, 0.025) the
readings at 1-32/16 in of 4140H and 8620H differ by at most 0.5 HRC (measured when the settings
were chosen; test_coarse_settings_agree_with_the_default keeps the first comparison live).
"""

import numpy as np
import pytest

from quenchwise.case import parse_case
from quenchwise.thermal.endquench import SIXTEENTH_M, EndQuenchSettings
from quenchwise.workflows.jominy import DEFAULT_SETTINGS, jominy

COARSE = EndQuenchSettings(radial_cells=1, max_temperature_step_k=24.0, max_fraction_step=0.1)
RZ_COARSE = EndQuenchSettings(radial_cells=4, axial_cells=40, max_temperature_step_k=24.0, max_fraction_step=0.1)

# SAE J1268 H-bands (memory; DOMAIN.md section 4), checked with the band widened by 4 HRC.
# None = no bound. Test austenitizing temperatures: 845 C for 4140H, 925 C for the carburizing
# grade 8620H (ASTM A255 standard temperatures, memory).
BANDS = {
    "4140H": (845.0, {1: (53, 60), 8: (47, 57), 16: (35, 53), 32: (30, 44)}),
    "8620H": (925.0, {1: (41, 48), 4: (27, 41), 8: (None, 30)}),
}
WIDEN_HRC = 4.0


def _case(grade, austenitize_c):
    import tomllib
    text = f'title = "{grade} end-quench"\n[steel]\ngrade = "{grade}"\naustenitize_c = {austenitize_c}\n' \
           '[part]\nshape = "bar"\ndiameter_mm = 25\n[quench]\nhtc_w_m2k = 3e4\nend_c = 40\n'
    return parse_case(tomllib.loads(text), text, f"{grade}.toml")


@pytest.fixture(scope="module")
def band_runs():
    cases = [_case(g, t) for g, (t, _) in BANDS.items()]
    return dict(zip(BANDS, jominy(cases, COARSE, physics_di=False)))


def _hrc_at(result, sixteenths):
    hrc = float(result.hrc_at([sixteenths * SIXTEENTH_M * 1000.0])[0])
    return hrc if np.isfinite(hrc) else 19.9      # below the HRC scale: counts as "under 20"


def test_h_bands_at_least_80_percent_inside_widened(band_runs):
    inside, total, lines = 0, 0, []
    for grade, (_, band) in BANDS.items():
        for j, (lo, hi) in band.items():
            hrc = _hrc_at(band_runs[grade], j)
            ok = (lo is None or hrc >= lo - WIDEN_HRC) and (hi is None or hrc <= hi + WIDEN_HRC)
            inside += ok
            total += 1
            lines.append(f"{grade} J{j}: {hrc:.1f} in [{lo}, {hi}] +/-4 -> {ok}")
    assert inside >= 0.8 * total, "\n".join(lines)


def test_every_listed_position_inside_the_widened_bands(band_runs):
    # Measured: all 7 positions inside (4140H 58.1 / 56.0 / 49.7 / 32.1, 8620H 46.0 / 27.1 / <20 HRC).
    for grade, (_, band) in BANDS.items():
        for j, (lo, hi) in band.items():
            hrc = _hrc_at(band_runs[grade], j)
            assert (lo is None or hrc >= lo - WIDEN_HRC) and (hi is None or hrc <= hi + WIDEN_HRC), (grade, j, hrc)


def test_cooling_rates_follow_the_published_scale(band_runs):
    # Cooling rate at 700 C on published end-quench charts, about 170 / 70 / 31 / 18 / 9 / 5.6 C/s
    # at 2 / 4 / 6 / 8 / 12 / 16 sixteenths (e.g. the cooling-rate scale of the hardenability
    # charts in Callister, Materials Science and Engineering, memory; +/-30 %). These rates are the
    # data the jet's boiling curve was chosen on (thermal/endquench.py, JET_BOILING_CURVE; the whole
    # A255 scale: test_endquench_cooling_rate.py), so this shows the fit, it does not validate it.
    # 4140H: no transformation above 700 C to disturb the reading.
    chart = {2: 170.0, 4: 70.0, 6: 31.0, 8: 18.0, 12: 9.0, 16: 5.6}
    r = band_runs["4140H"]
    for j, rate in chart.items():
        got = float(r.read(r.rate_cells, [j * SIXTEENTH_M * 1000.0])[0])
        assert got == pytest.approx(rate, rel=0.30), (j, got)


def test_hardness_falls_along_the_bar(band_runs):
    for r in band_runs.values():
        hv = r.hv
        assert np.all(np.diff(hv) <= 1.0)          # monotone within rounding
        assert r.phases["martensite"][0] > 0.9


def test_coarse_settings_agree_with_the_default(band_runs):
    # Live on 8620H, the steel whose readings move most with the numerics (ferrite and bainite
    # form along most of the bar); measured 0.5 HRC at most for both steels.
    fine = jominy([_case("8620H", BANDS["8620H"][0])], DEFAULT_SETTINGS, physics_di=False)[0]
    a, b = band_runs["8620H"], fine
    assert np.max(np.abs(a.hv - b.hv)) < 12.0       # HV; about 0.5-1 HRC
    ok = np.isfinite(a.hrc) & np.isfinite(b.hrc)
    assert np.max(np.abs(a.hrc[ok] - b.hrc[ok])) < 1.0


def test_axial_and_rz_models_agree(band_runs):
    # The model choice (workflows/jominy.py): the (r, z) model reads the same hardness as the
    # 1-D axial model to well within the band tolerance, so the cheaper axial model is the default.
    cases = [_case(g, t) for g, (t, _) in BANDS.items()]
    rz = dict(zip(BANDS, jominy(cases, RZ_COARSE, physics_di=False)))
    for grade in BANDS:
        a, b = band_runs[grade], rz[grade]
        ok = np.isfinite(a.hrc) & np.isfinite(b.hrc)
        assert np.max(np.abs(a.hrc[ok] - b.hrc[ok])) < 1.0
        assert np.max(np.abs(a.hv - b.hv)) < 15.0


def test_calibrated_model_bands():
    # The calibrated model (kinetics/calibrated.py) was fitted on A255 DI of 4140 and 8620, not
    # on these bands. Measured (jet boiling curve, thermal/endquench.py): 4140H 58.1 / 54.3 / 36.6 /
    # 30.0 and 8620H 46.3 / 31.0 / <20 HRC: all 7 positions inside the bands within 1 HRC, the
    # recall uncertainty of the band values (memory); 4140H J32 sits on the band minimum.
    from dataclasses import replace
    cases = [replace(_case(g, t), model="li1998-a255") for g, (t, _) in BANDS.items()]
    runs = dict(zip(BANDS, jominy(cases, COARSE, physics_di=False)))
    for grade, (_, band) in BANDS.items():
        for j, (lo, hi) in band.items():
            hrc = _hrc_at(runs[grade], j)
            assert (lo is None or hrc >= lo - 1.0) and (hi is None or hrc <= hi + 1.0), (grade, j, hrc)
