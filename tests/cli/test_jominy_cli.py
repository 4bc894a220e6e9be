"""`quenchwise jominy` end to end, the band file format, and the DI in `run --json`."""

import csv
import json

import pytest

STEEL_ONLY = """title = "4140H bar stock, incoming check (invented scenario)"
[steel]
grade = "4140H"
austenitize_c = 845
"""
BAND = """# 4140H band, SAE J1268 (memory), four positions
distance_sixteenths,min_hrc,max_hrc
1,53,60
8,47,57
16,35,53
32,30,44
"""


@pytest.fixture(scope="module")
def jominy_run(tmp_path_factory):
    from typer.testing import CliRunner

    from quenchwise.cli import app
    tmp = tmp_path_factory.mktemp("jominy")
    (tmp / "steel.toml").write_text(STEEL_ONLY)
    (tmp / "band.csv").write_text(BAND)
    r = CliRunner().invoke(app, ["jominy", str(tmp / "steel.toml"), "--out", str(tmp / "out"), "--band",
                                 str(tmp / "band.csv"), "--no-physics-di", "--json"])
    return tmp, r


def test_jominy_writes_table_figure_and_json(jominy_run):
    tmp, r = jominy_run
    assert r.exit_code == 0, r.stderr
    out = tmp / "out"
    for name in ("jominy.csv", "jominy.png"):
        assert (out / name).is_file()
    assert not (out / "jominy.svg").exists()             # PNG only unless --figures asks for more
    rows = list(csv.DictReader((out / "jominy.csv").open()))
    assert list(rows[0])[:5] == ["distance_mm", "distance_sixteenths", "hrc", "hv", "cooling_rate_700_c_s"]
    assert len(rows) == 32 and float(rows[0]["distance_mm"]) == pytest.approx(1.5875, abs=1e-3)
    s = json.loads(r.stdout)
    # ASTM A255 DI of a 4140 chemistry: about 4.5-5 in (DOMAIN.md section 3, memory).
    assert 4.5 <= s["di"]["a255"]["in"] <= 5.0 and s["di"]["physics"] is None
    # Every reading inside the 4140H band of SAE J1268 widened by 4 HRC (DOMAIN.md section 4's
    # tolerance for that band, memory); the band file itself is the unwidened band.
    rows = {r["distance_mm"]: r["hrc"] for r in s["band"]["rows"]}
    assert s["band"]["of"] == 4 and len(rows) == 4
    for (j, lo, hi), hrc in zip(((1, 53, 60), (8, 47, 57), (16, 35, 53), (32, 30, 44)), rows.values()):
        assert lo - 4.0 <= hrc <= hi + 4.0, (j, hrc)
    assert s["test"]["model"] == "1-D axial" and "caution" in s


def test_soft_readings_are_given_in_a_valid_scale(jominy_run):
    tmp, _ = jominy_run
    for row in csv.DictReader((tmp / "out" / "jominy.csv").open()):
        assert row["hv"]                               # HV always
        if not row["hrc"]:
            # below HRC 20 (238 HV, ASTM E140) the Rockwell B scale applies: it must be given
            assert row["hrb"] and float(row["hv"]) < 240.0


@pytest.mark.parametrize("band, words", [
    ("distance,min,max\n1,50,60\n", "distance_mm"),
    ("distance_mm,min_hrc,max_hrc\n5,60,50\n", "min <= max"),
    ("distance_mm,min_hrc,max_hrc\nfive,40,50\n", "not numbers"),
])
def test_bad_band_file_is_one_line_exit_2(cli, tmp_path, band, words):
    (tmp_path / "s.toml").write_text(STEEL_ONLY)
    (tmp_path / "b.csv").write_text(band)
    code, _, stderr = cli("jominy", tmp_path / "s.toml", "--out", tmp_path / "o", "--band", tmp_path / "b.csv")
    assert code == 2 and len(stderr.strip().splitlines()) == 1 and words in stderr and "--band" in stderr
    assert not (tmp_path / "o").exists()


def test_no_kinetics_model_is_refused(cli, tmp_path):
    (tmp_path / "s.toml").write_text(STEEL_ONLY + '[transform]\nmodel = "none"\n')
    code, _, stderr = cli("jominy", tmp_path / "s.toml", "--out", tmp_path / "o")
    assert code == 2 and "transform.model" in stderr


def test_run_json_reports_the_composition_di(cli, cases_dir, tmp_path):
    code, stdout, _ = cli("run", cases_dir / "shaft_water.toml", "--out", tmp_path / "r", "--json")
    assert code == 0
    di = json.loads(stdout)["di"]
    assert set(di) == {"a255"} and di["a255"]["in"] > 0 and "A255" in di["a255"]["method"]


def test_run_text_shows_the_temper_and_the_di(cli, tmp_path):
    (tmp_path / "t.toml").write_text("""title = "4140 pin, oil, tempered (invented scenario)"
[steel]
grade = "4140"
[part]
shape = "bar"
diameter_mm = 20
[quench]
medium = "oil_conventional_60c_still"
end_c = 80
[temper]
temperature_c = 425
hours = 2
""")
    code, stdout, stderr = cli("run", tmp_path / "t.toml", "--out", tmp_path / "o")
    assert code == 0, stderr
    assert "temper  2 h at 425 C: surface" in stdout and "ASTM A255" in stdout
    header = (tmp_path / "o" / "profile.csv").read_text().splitlines()[0]
    assert header.endswith("cooling_rate_700_c_s,jominy_distance_mm,hv_tempered,hrc_tempered")
