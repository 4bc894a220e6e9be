"""`quenchwise diagram`: files, summary, JSON, errors."""

import csv
import json


def test_ttt_writes_figure_csv_and_summary(cli, cases_dir, tmp_path):
    out = tmp_path / "ttt"
    code, stdout, stderr = cli("diagram", cases_dir / "shaft_water.toml", "--kind", "ttt", "--out", out)
    assert code == 0, stderr
    for name in ("ttt.png", "ttt.csv", "ttt_summary.json"):
        assert (out / name).is_file(), name
    assert not (out / "ttt.svg").exists()                # PNG only unless --figures asks for more
    assert "noses" in stdout and "bainite" in stdout and "Caution" in stdout
    rows = list(csv.DictReader((out / "ttt.csv").open()))
    assert float(rows[0]["temperature_c"]) > float(rows[-1]["temperature_c"])
    summary = json.loads((out / "ttt_summary.json").read_text())
    assert summary["kind"] == "ttt" and summary["noses"]["bainite"]["time_s"] > 0
    # An existing diagram is never replaced silently.
    code, _, stderr = cli("diagram", cases_dir / "shaft_water.toml", "--kind", "ttt", "--out", out)
    assert code == 2 and "--overwrite" in stderr and len(stderr.strip().splitlines()) == 1


def test_cct_json_is_one_object_with_paths_and_critical_rates(cli, cases_dir, tmp_path):
    out = tmp_path / "cct"
    code, stdout, stderr = cli("diagram", cases_dir / "shaft_water.toml", "--kind", "CCT", "--out", out, "--json",
                               "--figures", "PNG, pdf")
    assert code == 0, stderr
    s = json.loads(stdout)
    assert s["kind"] == "cct" and s["caution"] and len(s["paths"]) >= 10
    assert s["critical_rates_k_s"]["constant_rate"]["martensite_only"] > 1.0
    assert all(p["hv"] > 0 for p in s["paths"])
    for name in ("cct.png", "cct.pdf", "cct.csv", "cct_summary.json"):
        assert (out / name).is_file()
    assert (out / "cct.pdf").read_bytes()[:5] == b"%PDF-" and not (out / "cct.svg").exists()


def test_bad_kind_and_model_none_get_one_line_and_status_2(cli, cases_dir, tmp_path):
    code, stdout, stderr = cli("diagram", cases_dir / "shaft_water.toml", "--kind", "jominy", "--out", tmp_path / "x")
    assert code == 2 and "--kind = 'jominy'" in stderr and stderr.strip().count("\n") == 0
    case = tmp_path / "none.toml"
    case.write_text((cases_dir / "shaft_water.toml").read_text() + '\n[transform]\nmodel = "none"\n')
    code, _, stderr = cli("diagram", case, "--kind", "ttt", "--out", tmp_path / "y")
    assert code == 2 and "transform.model = 'none'" in stderr
    assert not (tmp_path / "x").exists() and not (tmp_path / "y").exists()
