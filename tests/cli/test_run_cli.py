"""`quenchwise run` end to end: files, columns, summary, JSON, errors."""

import csv
import json
import subprocess
import sys

import h5py
import numpy as np

CONTRACT_COLUMNS = ["depth_mm", "position_mm", "ferrite", "pearlite", "bainite", "martensite", "austenite",
                    "hv", "hrc", "cooling_rate_700_c_s", "jominy_distance_mm"]


def test_run_writes_the_contract_files(cli, cases_dir, tmp_path):
    out = tmp_path / "shaft"
    code, stdout, stderr = cli("run", cases_dir / "shaft_water.toml", "--out", out)
    assert code == 0, stderr
    for name in ("result.h5", "profile.csv", "hardness.png", "cooling.png"):
        assert (out / name).is_file(), name
    assert not list(out.glob("*.svg")) and not list(out.glob("*.pdf"))   # PNG only unless --figures asks
    assert "surface" in stdout and "half radius" in stdout and "centre" in stdout and "Caution" in stdout
    rows = list(csv.DictReader((out / "profile.csv").open()))
    assert list(rows[0].keys()) == CONTRACT_COLUMNS
    assert float(rows[0]["depth_mm"]) < float(rows[-1]["depth_mm"])
    with h5py.File(out / "result.h5") as f:
        n_t, n_x = f["temperature_c"].shape
        assert f["time_s"].shape == (n_t,) and f["position_mm"].shape == (n_x,) and len(rows) == n_x
        for name in ("ferrite", "pearlite", "bainite", "martensite", "austenite", "hv", "hrc"):
            assert f[name].shape == (n_x,)
        total = sum(f[k][()] for k in ("ferrite", "pearlite", "bainite", "martensite", "austenite"))
        np.testing.assert_allclose(total, 1.0, atol=1e-9)
        assert "diameter_mm = 25" in f.attrs["case"] and f.attrs["version"]
    # An existing result is never replaced silently.
    code, _, stderr = cli("run", cases_dir / "shaft_water.toml", "--out", out)
    assert code == 2 and "--overwrite" in stderr and len(stderr.strip().splitlines()) == 1


def test_json_prints_one_object_only(cli, cases_dir, tmp_path):
    code, stdout, _ = cli("run", cases_dir / "shaft_water.toml", "--out", tmp_path / "j", "--json")
    assert code == 0
    summary = json.loads(stdout)
    assert [p["location"] for p in summary["points"]] == ["surface", "half radius", "centre"]
    assert summary["caution"]


def test_a_bad_figures_value_gets_one_line_and_status_2(cli, cases_dir, tmp_path):
    out = tmp_path / "never"
    code, stdout, stderr = cli("run", cases_dir / "shaft_water.toml", "--out", out, "--figures", "png,gif")
    assert code == 2 and stdout == "" and len(stderr.strip().splitlines()) == 1
    assert "--figures" in stderr and "png,gif" in stderr and "svg" in stderr
    assert not out.exists()


def test_malformed_case_gets_one_line_and_status_2(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text('[steel]\nc = 0.4\naustenitize_c = 850\n[part]\nshape = "bar"\ndiameter_mm = -3\n[quench]\nhtc_w_m2k = 1000\n')
    out = tmp_path / "never"
    r = subprocess.run([sys.executable, "-m", "quenchwise", "run", str(bad), "--out", str(out)],
                       capture_output=True, text=True)
    assert r.returncode == 2
    assert r.stderr.strip().count("\n") == 0 and "part.diameter_mm = -3" in r.stderr
    assert "Traceback" not in r.stderr and r.stdout == ""
    assert not out.exists()
