"""Part-level check of the quenchant curves: handbook as-quenched round bars (issue 11 item 5).

benchmarks/data/mass_effect_bars.csv holds the handbook readings, each row with its source
(recalled: "(memory, +/-5 HRC)"); benchmarks/mass_effect.py runs them. Here: the file's form, the
bias by position with stated tolerances, and the surface-to-centre gradient of oil-quenched 4140
(common practice, no source: a 2 in 4140 bar quenched in oil is clearly harder at the surface
than at the centre).
"""

import sys
from pathlib import Path

import numpy as np
import pytest

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT / "benchmarks"))
import accuracy  # noqa: E402  (the one bar scorer; benchmarks/mass_effect.py is its command line)

POSITIONS = tuple(accuracy.BAR_POSITIONS)


def _bars(rows):
    """{(grade, quenchant, diameter in): {position: row}}"""
    out = {}
    for r in rows:
        out.setdefault((r["grade"], r["quenchant"], float(r["diameter_in"])), {})[r["position"]] = r
    return out


def test_the_bar_file_follows_the_contract():
    text = accuracy.BARS_CSV.read_text("utf-8")
    header = [line for line in text.splitlines() if line and not line.startswith("#")][0]
    assert header == "grade,c,mn,si,ni,cr,mo,v,austenitize_c,quenchant,diameter_in,position,hrc,source"
    presets = accuracy.bar_presets()
    assert set(presets) == {"water", "oil"}
    # Each names a quenchant the program knows (built-in preset or the quenchant model's keys), of its kind.
    assert accuracy._quenchant(presets["water"]).kind == "water"
    assert accuracy._quenchant(presets["oil"]).kind == "oil"
    bars = _bars(accuracy._rows(accuracy.BARS_CSV))
    assert len({k[0] for k in bars}) >= 5 and {k[1] for k in bars} == {"water", "oil"}
    assert {k[2] for k in bars} == {0.5, 1.0, 2.0, 4.0}
    for key, readings in bars.items():
        assert set(readings) == set(POSITIONS), key
        assert all(r["source"] and "(memory" in r["source"] for r in readings.values()), key


@pytest.fixture(scope="module")
def rows():
    from quenchwise.case import DEFAULT_MODEL

    return accuracy.run_bars(DEFAULT_MODEL)


@pytest.fixture(scope="module")
def table(rows):
    return _bars(rows)


def test_the_command_line_prints_the_scorecard_numbers(rows, tmp_path, capsys):
    # benchmarks/mass_effect.py is a thin command line over the scorecard's scorer: its summary line
    # and bias table are those of section (b) (issue 12: one bar scorer, the same numbers).
    import importlib.util

    spec = importlib.util.spec_from_file_location("mass_effect", ROOT / "benchmarks" / "mass_effect.py")
    mass_effect = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mass_effect)
    assert mass_effect.main(["--markdown", str(tmp_path / "bars.md")]) == 0
    printed = (tmp_path / "bars.md").read_text("utf-8")
    for line in accuracy.bars_markdown(rows):
        assert line in printed, line


def test_bias_by_position_within_stated_tolerances(table):
    # Handbook values recalled to +/-5 HRC and composition taken as the grade's nominal (not the
    # tested heat): mean bias within 4.5 HRC and RMS within 7.5 HRC at each position (simulated HRC
    # below the scale read as 19.9). The scorecard's own targets (benchmarks/accuracy.md section (b))
    # are tighter; tests/validation/test_accuracy.py guards the level reached.
    for p in POSITIONS:
        d = np.array([v[p]["sim_hrc"] - float(v[p]["hrc"]) for v in table.values()])
        assert abs(d.mean()) <= 4.5 and np.sqrt(np.mean(d * d)) <= 7.5, (p, d.mean())


def test_hardness_falls_from_surface_to_centre_and_with_size(table):
    # Common practice, no source: in every bar the surface is not softer than the centre (0.5 HRC
    # numerical slack), and a bigger bar of the same steel is not harder at the centre.
    for k, v in table.items():
        assert v["surface"]["sim_hrc"] >= v["centre"]["sim_hrc"] - 0.5, k
    for k in table:
        for b in [b for b in table if b[:2] == k[:2] and b[2] > k[2]]:
            assert table[b]["centre"]["sim_hrc"] <= table[k]["centre"]["sim_hrc"] + 0.5, (k, b)


def _bar(diameter_mm, medium, model):
    from quenchwise.case import parse_case
    from quenchwise.workflows.simulate import simulate

    case = parse_case({"title": "4140 bar", "steel": {"grade": "4140"}, "part": {"shape": "bar", "diameter_mm": diameter_mm},
                       "quench": {"medium": medium, "end_c": 100.0}, "transform": {"model": model}})
    [res] = simulate([case])
    points = dict(res.points())
    return float(res.at(res.hrc, points["surface"])), float(res.at(res.hrc, points["centre"]))


_KINETICS = ("the published li1998 coefficients make 4140 too hardenable for this (A255 DI 4.8 in): the 2 in bar comes "
             "out nearly through-hardened, about 1.5 HRC from surface to centre; the quenchant curve is not the "
             "limit (the calibrated li1998-a255 shows 4-5 HRC with the same curve)")


@pytest.mark.parametrize("model", [pytest.param("li1998", marks=pytest.mark.xfail(strict=True, reason=_KINETICS)),
                                   "li1998-a255", "li1998-multigrade"])
@pytest.mark.parametrize("diameter_mm, medium", [(50.8, "oil_conventional_60c_moderate"),
                                                 (50.0, "oil_conventional_60c_still")])
def test_oil_quenched_2in_4140_is_clearly_harder_at_the_surface(model, diameter_mm, medium):
    # Common practice, no source; handbook bars read about 49 at the surface and 38 at the centre
    # (memory). "Clearly": at least 3 HRC.
    surface, centre = _bar(diameter_mm, medium, model)
    assert surface - centre >= 3.0, (surface, centre)


def test_a_half_inch_1045_bar_hardens_in_still_cold_water():
    # Handbook as-quenched 1/2 in 1045 bar, water: 59 HRC at the surface (mass_effect_bars.csv,
    # memory, +/-5 HRC). Cold water's vapour blanket is thin and short (common practice, no
    # source): a still 20 C bath must harden this bar's surface, not leave it near 43 HRC as the
    # first water curve (blanket to 640 C, probe above 600 C for 10.6 s) did.
    from quenchwise.case import parse_case
    from quenchwise.workflows.simulate import simulate

    case = parse_case({"steel": {"grade": "1045"}, "part": {"shape": "bar", "diameter_mm": 12.7},
                       "quench": {"medium": "water_20c_still"}})
    [res] = simulate([case])
    surface = float(res.at(res.hrc, dict(res.points())["surface"]))
    assert surface >= 59.0 - 5.0, surface
