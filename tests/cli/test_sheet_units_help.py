"""Issue 15: the sheet as a controlled record, help texts, quick runs, n/a, HRB, inch/Fahrenheit keys."""

import hashlib
import re
import shutil
import subprocess
import tomllib

import numpy as np
import pytest
import typer

from quenchwise.case import parse_case

RECORD_CASE = """\
# Invented scenario: Harrowgate Gearworks (invented) keeps the sheet of a pin as a controlled record.
title = "Record pin, 20 mm bar"

[steel]
grade = "42CrMo4"

[part]
shape = "bar"
diameter_mm = 20

[quench]
medium = "oil_conventional_60c_moderate"
end_c = 90

[transform]
model = "kirkaldy1983"
martensite = "van_bohemen_sietsma"

[requirement]
min_hrc = 45
depth_mm = 3

[record]
part_number = "HG-PN-4471"
drawing_number = "DWG-20-118"
revision = "rev-C2"
customer = "Invented Pump Co."
material_spec = "EN 10083-3 42CrMo4"
prepared_by = "A. Fielding"
checked_by = "B. Okoro"
approved_by = "C. Lindqvist"
date = 2026-11-30
"""


# -- help texts ---------------------------------------------------------------------------------
def _commands():
    return typer.main.get_command(__import__("quenchwise.cli", fromlist=["app"]).app).commands


def test_every_help_keeps_its_bracketed_words(cli):
    """Every '[word]' written in a command's docstring or option help shows in its --help (rich
    markup once ate them: 'Case file (TOML) with a , or give one below')."""
    checked = 0
    for name, command in _commands().items():
        code, out, _ = cli(name, "--help")
        assert code == 0, name
        flat = " ".join(out.split())
        sources = [command.help or ""] + [getattr(p, "help", None) or "" for p in command.params]
        for text in sources:
            for word in re.findall(r"\[[^\]]+\]", text):
                assert word in flat, f"{name} --help lost {word}"
                checked += 1
    assert checked >= 5  # the texts do carry bracketed units and table names
    _, out, _ = cli("size", "--help")
    assert "with a [requirement], or give one below" in " ".join(out.split())


# -- run without --out, quick runs ----------------------------------------------------------------
def test_run_without_out_prints_and_writes_nothing(cli, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    code, out, err = cli("run", "--grade", "4140", "--bar", "20", "--medium", "water_20c_still")
    assert code == 0, err
    assert list(tmp_path.iterdir()) == []
    assert "surface" in out and "centre" in out and "no --out given" in out and "Caution" in out


def test_quick_run_and_case_file_are_exclusive(cli, cases_dir):
    code, _, err = cli("run", cases_dir / "shaft_water.toml", "--grade", "4140")
    assert code == 2 and "--grade" in err


# -- compare n/a, HRB below HRC 20 ------------------------------------------------------------------
def test_compare_without_requirement_says_n_a(cli, cases_dir, tmp_path):
    code, out, err = cli("compare", cases_dir / "shaft_water.toml", "-m", "water_20c_still", "-m",
                         "oil_conventional_60c_still", "--out", tmp_path / "c")
    assert code == 0, err
    rows = [ln for ln in out.splitlines() if ln.startswith(("water_20c_still", "oil_conventional_60c_still"))]
    assert len(rows) == 2 and all(" n/a " in r for r in rows) and not any(" no " in r for r in rows)
    csv_text = (tmp_path / "c" / "compare.csv").read_text()
    assert "False" not in csv_text and "True" not in csv_text


def test_soft_part_reads_in_hrb(cli):
    """A plain 0.2 %C bar in still oil stays ferrite-pearlite (common practice, no source): HRC does not
    apply, the table gives HRB. ASTM E140 (memory): HV 125 / 137 / 150 / 165 read HRB 70 / 75 / 80 / 85."""
    code, out, err = cli("run", "--grade", "1020", "--bar", "30", "--medium", "oil_conventional_60c_still")
    assert code == 0, err
    header = next(ln for ln in out.splitlines() if ln.startswith("location"))
    assert "HRB" in header.split()
    centre = next(ln for ln in out.splitlines() if ln.startswith("centre")).split()
    hrc, hv, hrb = centre[2], float(centre[3]), float(centre[4])
    assert "HB" in header.split() and float(centre[5]) > 0
    assert hrc == "-" and 120.0 <= hv <= 170.0
    assert hrb == pytest.approx(float(np.interp(hv, [125.0, 137.0, 150.0, 165.0], [70.0, 75.0, 80.0, 85.0])), abs=1.0)


# -- did you mean, EN names ----------------------------------------------------------------------
def test_did_you_mean_for_keys_grades_and_media(cli, tmp_path):
    bad = tmp_path / "typo.toml"
    bad.write_text('[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiamter_mm = 20\n[quench]\nmedium = "water_20c_still"\n')
    code, _, err = cli("run", bad)
    assert code == 2 and "did you mean 'diameter_mm'?" in err and len(err.strip().splitlines()) == 1
    code, _, err = cli("run", "--grade", "4104", "--bar", "20", "--medium", "water_20c_still")
    assert code == 2 and "did you mean" in err
    code, _, err = cli("run", "--grade", "4140", "--bar", "20", "--medium", "water_20c_stil")
    assert code == 2 and "water_20c_still" in err


def test_en_name_gives_the_listed_grade():
    """4140 and 42CrMo4 are counterparts (EN 10083-3 / SAE J404, memory): the table lists it."""
    base = {"part": {"shape": "bar", "diameter_mm": 20.0}, "quench": {"medium": "water_20c_still"}}
    en = parse_case({"steel": {"grade": "42CrMo4"}, **base})
    sae = parse_case({"steel": {"grade": "4140"}, **base})
    assert en.grade == "4140" and en.composition == sae.composition


# -- inch and Fahrenheit -------------------------------------------------------------------------
def test_same_answer_in_inch_and_mm():
    """1 in = 25.4 mm exactly and F = 9/5 C + 32 (international yard of 1959; NIST SP 811): the same
    part given in inches and Fahrenheit solves to the same profile as in mm and C."""
    from quenchwise.workflows import simulate_case

    si = parse_case(tomllib.loads('[steel]\ngrade = "4140"\naustenitize_c = 850\n[part]\nshape = "bar"\n'
                                  'diameter_mm = 25.4\n[quench]\nmedium = "oil_conventional_60c_still"\nbath_c = 40\n'
                                  'end_c = 100\n[requirement]\nmin_hrc = 40\ndepth_mm = 6.35\n'))
    us = parse_case(tomllib.loads('[steel]\ngrade = "4140"\naustenitize_f = 1562\n[part]\nshape = "bar"\n'
                                  'diameter_in = 1.0\n[quench]\nmedium = "oil_conventional_60c_still"\nbath_f = 104\n'
                                  'end_f = 212\n[requirement]\nmin_hrc = 40\ndepth_in = 0.25\n'))
    assert us.austenitize_c == pytest.approx(850.0, abs=1e-9) and us.outer.bath_c == pytest.approx(40.0, abs=1e-9)
    assert us.end_c == pytest.approx(100.0, abs=1e-9) and us.requirement.depth_mm == pytest.approx(6.35, abs=1e-9)
    assert us.section.outer_m == pytest.approx(0.0127, abs=1e-12)
    a, b = simulate_case(si), simulate_case(us)
    np.testing.assert_allclose(a.hv, b.hv, rtol=0, atol=1e-6)


def test_both_unit_keys_is_an_error():
    from quenchwise.errors import InputError

    with pytest.raises(InputError, match="either diameter_in or diameter_mm"):
        parse_case({"steel": {"grade": "4140"}, "part": {"shape": "bar", "diameter_mm": 20.0, "diameter_in": 1.0},
                    "quench": {"medium": "water_20c_still"}})


def test_units_us_output_columns_and_values(cli, cases_dir, tmp_path):
    """--units us: profile.csv in inches (depth_in = depth_mm / 25.4), the text in in and F."""
    import csv

    from quenchwise.case import load_case
    from quenchwise.results import profile_csv_text
    from quenchwise.workflows import simulate_case

    code, out, err = cli("run", cases_dir / "shaft_water.toml", "--units", "us", "--out", tmp_path / "us")
    assert code == 0, err
    us = list(csv.DictReader((tmp_path / "us" / "profile.csv").open()))
    si = list(csv.DictReader(profile_csv_text(simulate_case(load_case(cases_dir / "shaft_water.toml"))).splitlines()))
    assert "depth_in" in us[0] and "depth_mm" not in us[0]
    for a, b in zip(us, si):
        assert float(a["depth_in"]) == pytest.approx(float(b["depth_mm"]) / 25.4, abs=1e-4)
        assert a["hv"] == b["hv"]
    assert "depth in" in out and "austenitized at 1562 F" in out  # 850 C = 1562 F


# -- the sheet as a controlled record, read back from the PDF ------------------------------------
needs_pdftotext = pytest.mark.skipif(shutil.which("pdftotext") is None, reason="pdftotext (poppler-utils) not installed")


@needs_pdftotext
@pytest.mark.parametrize("page, size_pt, steps", [("letter", (612, 792), "--default-steps"), ("a4", (595, 842), "--default-steps")])
def test_sheet_record_fields_read_back_from_the_pdf(cli, tmp_path, page, size_pt, steps):
    """Letter is 8.5 x 11 in = 612 x 792 pt; A4 210 x 297 mm = 595 x 842 pt (ISO 216)."""
    case = tmp_path / "pin.toml"
    case.write_text(RECORD_CASE)
    out = tmp_path / "sheet"
    code, _, err = cli("sheet", case, "--out", out, "--page", page, steps)
    assert code == 0, err
    text = subprocess.run(["pdftotext", "-layout", str(out / "sheet.pdf"), "-"], capture_output=True, text=True,
                          check=True).stdout
    flat = " ".join(text.split())
    for value in ("HG-PN-4471", "DWG-20-118", "Invented Pump Co.", "EN 10083-3 42CrMo4", "A. Fielding", "B. Okoro",
                  "C. Lindqvist", "2026-11-30", "Prepared by", "Checked by", "Approved by"):
        assert value in flat, value
    assert "rev-C2" in flat
    assert hashlib.sha256(RECORD_CASE.encode()).hexdigest() in flat
    assert "Kirkaldy & Venugopalan (1983)" in flat and "van Bohemen & Sietsma (2009)" in flat
    assert "Li, Niebuhr" not in flat and "Koistinen" not in flat
    assert "ASTM E18" in flat and "ISO 6508" in flat and "150 kgf" in flat
    assert "Warnings of this run:" in flat
    info = subprocess.run(["pdfinfo", str(out / "sheet.pdf")], capture_output=True, text=True).stdout
    w, h = (float(v) for v in re.search(r"Page size:\s+([\d.]+) x ([\d.]+)", info).groups())
    assert (round(w), round(h)) == size_pt


@needs_pdftotext
def test_sheet_lists_every_warning_of_the_run(cli, cases_dir, tmp_path):
    """The 52100 ball is austenitized below Acm and is outside the Andrews carbon range: each warning the
    run reports appears on the sheet."""
    import json

    out = tmp_path / "ball"
    code, stdout, err = cli("sheet", cases_dir / "bearing_ball_below_acm.toml", "--out", out, "--json", "--default-steps")
    assert code == 0, err
    warnings = json.loads(stdout)["warnings"]
    assert len(warnings) >= 2
    text = " ".join(subprocess.run(["pdftotext", str(out / "sheet.pdf"), "-"], capture_output=True, text=True,
                                   check=True).stdout.split())
    for w in warnings:
        assert " ".join(w.split()[:6]) in text, w


@needs_pdftotext
def test_sheet_shows_the_equivalent_jominy_distance_when_the_result_has_it(tmp_path):
    """Contract (TEAM.md): Result.jominy_distance_mm per node; the sheet's depth table gains a J column."""
    from quenchwise.report import write_sheet
    from quenchwise.workflows import simulate_case

    case = parse_case(tomllib.loads('[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_mm = 12\n'
                                    '[quench]\nmedium = "water_20c_still"\n'), "x", "inline")
    r = simulate_case(case)
    write_sheet(r, tmp_path)
    text = " ".join(subprocess.run(["pdftotext", "-layout", str(tmp_path / "sheet.pdf"), "-"], capture_output=True,
                                   text=True, check=True).stdout.split())
    from quenchwise.workflows.requirement import value_at_depths

    from quenchwise.report import sheet_rows

    depths = [row["depth_mm"] for row in sheet_rows(r)]
    values = value_at_depths(r, r.jominy_distance_mm, depths)
    shown = [f"{v:.3g}" for v in values if np.isfinite(v)]   # beyond the A255 scale the cell reads '-'
    assert "J mm" in text and shown and all(v in text for v in shown)


def test_sheet_refines_the_kinetics_step_only_when_coarser():
    """The sheet's record solves with at most 1 % of a phase per step; a finer [mesh] setting stays."""
    from dataclasses import replace

    from quenchwise.cli import _refined

    case = parse_case({"steel": {"grade": "4140"}, "part": {"shape": "bar", "diameter_mm": 20.0},
                       "quench": {"medium": "water_20c_still"}})
    fine, note = _refined(case, True)
    assert fine.settings.max_fraction_step == 0.01 and "1 %" in note
    finer = replace(case, settings=replace(case.settings, max_fraction_step=0.005))
    assert _refined(finer, True)[0].settings.max_fraction_step == 0.005
    assert _refined(case, False) == (case, "")


def test_a_bad_inch_value_is_reported_on_the_key_the_user_wrote(cli, tmp_path):
    bad = tmp_path / "inch.toml"
    bad.write_text('[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_in = -1\n[quench]\nmedium = "water_20c_still"\n')
    code, _, err = cli("run", bad)
    assert code == 2 and "part.diameter_in = -1" in err and "part.diameter_mm = -25.4" in err
    assert len(err.strip().splitlines()) == 1


def test_requirement_reads_in_inches_with_us_units(cli, tmp_path):
    """--units us: the requirement's depth in inches in the compare text (1 in = 25.4 mm exactly)."""
    case = tmp_path / "us.toml"
    case.write_text('[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_in = 1\n'
                    '[quench]\nmedium = "water_20c_moderate"\n[requirement]\nmin_hrc = 45\ndepth_in = 0.25\n')
    code, out, err = cli("compare", case, "-m", "water_20c_moderate", "--out", tmp_path / "c", "--units", "us")
    assert code == 0, err
    assert "at least 45 HRC down to 0.25 in depth" in out and "6.35 mm" not in out
