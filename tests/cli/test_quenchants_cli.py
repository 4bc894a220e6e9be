"""`quenchwise quenchants` and `quenchwise probe` end to end, user curves in `run`, and the
flash-point caution. All records and cases here are invented data."""

import json

import numpy as np
import pytest

from quenchwise.thermal.probe import synthesize_probe_curve
from quenchwise.thermal.quenchants import builtin_names, load_quenchant

CASE = """title = "invented: {title}"
[steel]
c = 0.40
mn = 0.85
cr = 0.95
mo = 0.20
austenitize_c = 850
[part]
shape = "bar"
diameter_mm = 10
[quench]
medium = "{medium}"
{extra}
[transform]
model = "none"
"""


def _case(tmp_path, medium, extra="end_c = 200", title="quenchant check", name="case.toml"):
    p = tmp_path / name
    p.write_text(CASE.format(medium=medium, extra=extra, title=title), "utf-8")
    return p


def _one_line(stderr):
    lines = stderr.strip().splitlines()
    return len(lines) == 1 and lines[0].startswith("quenchwise: ")


def test_list_shows_every_builtin_with_its_equivalent_severity(cli):
    code, stdout, stderr = cli("quenchants", "--json")
    assert code == 0, stderr
    data = json.loads(stdout)
    rows = {r["name"]: r for r in data["quenchants"]}
    assert set(rows) == set(builtin_names())
    assert "800->500" in data["severity_definition"] and "caution" in data
    for r in rows.values():
        assert r["equivalent_h_per_inch"] > 0 and r["bath_c"] is not None and r["agitation"]
    assert rows["oil_hot_160c_still"]["flash_point_c"] == 280 and rows["water_20c_still"]["flash_point_c"] is None
    assert rows["water_20c_still"]["equivalent_h_per_inch"] > rows["oil_conventional_60c_still"]["equivalent_h_per_inch"]


def test_list_shows_the_cached_probe_figures_quickly(cli):
    # Issue 11: the listing with probe figures in under 3 s (the figures are cached in the files;
    # tests/thermal/test_quenchant_model.py recomputes them).
    import time

    start = time.perf_counter()
    code, stdout, stderr = cli("quenchants", "--json")
    elapsed = time.perf_counter() - start
    assert code == 0, stderr
    assert elapsed < 3.0
    rows = {r["name"]: r for r in json.loads(stdout)["quenchants"]}
    for name in builtin_names():
        listed = load_quenchant(name).listed_probe
        assert rows[name]["probe"]["max_rate_k_s"] == pytest.approx(listed["max_rate_k_s"], abs=0.01)
    assert "ISO 9950" in json.loads(stdout)["probe_definition"]


def test_one_curve_prints_its_table_and_writes_table_and_plot(cli, tmp_path):
    code, stdout, stderr = cli("quenchants", "polymer_20pct_40c_moderate")
    assert code == 0, stderr
    assert "equivalent H" in stdout and "surface_c  htc_w_m2k" in stdout and "not measured data" in stdout
    assert "probe   max" in stdout and "K/s" in stdout
    out = tmp_path / "poly"
    code, stdout, stderr = cli("quenchants", "polymer_20pct_40c_moderate", "--out", out, "--figures", "png,svg")
    assert code == 0, stderr
    for f in ("polymer_20pct_40c_moderate.csv", "polymer_20pct_40c_moderate_htc.png",
              "polymer_20pct_40c_moderate_htc.svg"):
        assert (out / f).is_file(), f
    # --figures none: the table only
    code, _, stderr = cli("quenchants", "polymer_20pct_40c_moderate", "--out", tmp_path / "bare", "--figures", "none")
    assert code == 0, stderr
    assert sorted(p.name for p in (tmp_path / "bare").iterdir() if not p.name.startswith(".")) == [
        "polymer_20pct_40c_moderate.csv"]
    # The written table is a user curve that loads to the same h(T).
    again = load_quenchant(str(out / "polymer_20pct_40c_moderate.csv"))
    ref = load_quenchant("polymer_20pct_40c_moderate")
    np.testing.assert_allclose(again.htc(np.arange(40.0, 1000.0, 7.0)), ref.htc(np.arange(40.0, 1000.0, 7.0)))
    code, _, stderr = cli("quenchants", "polymer_20pct_40c_moderate", "--out", out)
    assert code == 2 and "--overwrite" in stderr and _one_line(stderr)


def test_bad_quenchants_arguments_are_one_line(cli, tmp_path):
    code, _, stderr = cli("quenchants", "oil_slow")
    assert code == 2 and _one_line(stderr) and "quenchwise quenchants" in stderr
    code, _, stderr = cli("quenchants", "--out", tmp_path / "x")
    assert code == 2 and _one_line(stderr) and "NAME" in stderr


def test_run_accepts_a_user_curve_by_path(cli, tmp_path):
    (tmp_path / "tank.csv").write_text("# name: tank 4 (invented)\n# bath_c: 35\nsurface_c,htc_w_m2k\n"
                                       "35,400\n300,900\n550,2500\n750,600\n900,350\n", "utf-8")
    code, stdout, stderr = cli("run", _case(tmp_path, "tank.csv"), "--out", tmp_path / "r", "--json")
    assert code == 0, stderr
    assert json.loads(stdout)["quench"]["outer"] == "tank 4 (invented)"


@pytest.mark.parametrize("content", [
    "surface_c,htc_w_m2k\n20,500\n",                           # one data row
    "20,500\n600,2000\n900,400\n",                             # no header
    "surface_c,htc_w_m2k\n20,500\n600,-1\n900,400\n",          # negative h
    "surface_c,htc_w_m2k\n20,500\n600,nan\n900,400\n",         # NaN
])
def test_run_refuses_a_malformed_user_curve_in_one_line(cli, tmp_path, content):
    (tmp_path / "bad.csv").write_text(content, "utf-8")
    out = tmp_path / "r"
    code, _, stderr = cli("run", _case(tmp_path, "bad.csv"), "--out", out)
    assert code == 2 and _one_line(stderr) and "quench.medium" in stderr
    assert not out.exists()


def test_flash_point_caution_for_a_hot_oil_near_its_flash_point(cli, tmp_path):
    # Built-in hot oil: flash point 280 C (illustrative). Margin 55 K (results.FLASH_MARGIN_K,
    # common practice, no source): a bath at 240 C must warn, the curve's own 160 C must not.
    near = _case(tmp_path, "oil_hot_160c_still", "bath_c = 240\nend_c = 260", "hot oil near flash", "near.toml")
    code, stdout, stderr = cli("run", near, "--out", tmp_path / "near")
    assert code == 0, stderr
    warning = [line for line in stdout.splitlines() if line.startswith("warning oil_hot_160c_still: bath at 240 C")]
    assert len(warning) == 1 and "55 K" in warning[0] and "flash point (280 C)" in warning[0] and "fire risk" in warning[0]
    safe = _case(tmp_path, "oil_hot_160c_still", "end_c = 200", "hot oil at its own bath", "safe.toml")
    code, stdout, stderr = cli("run", safe, "--out", tmp_path / "safe", "--json")
    assert code == 0, stderr
    assert not any("flash" in w for w in json.loads(stdout)["warnings"])


def _write_record(path, time_s, temperature_c, meta="# bath_c: 60\n"):
    path.write_text("# invented data\n" + meta + "time_s,temperature_c\n"
                    + "".join(f"{a:.3f},{b:.3f}\n" for a, b in zip(time_s, temperature_c)), "utf-8")
    return path


def test_probe_fit_writes_a_curve_that_run_accepts(cli, tmp_path):
    truth = load_quenchant("oil_fast_60c_moderate")
    rec = synthesize_probe_curve(truth, noise_k=1.0, seed=3, finite=False, duration_s=45.0)
    record = _write_record(tmp_path / "tank2_probe.csv", rec.time_s, rec.temperature_c)
    out = tmp_path / "fit"
    code, stdout, stderr = cli("probe", record, "--out", out, "--json")
    assert code == 0, stderr
    summary = json.loads(stdout)
    for f in ("quenchant.csv", "probe_fit.csv", "probe_fit.png"):
        assert (out / f).is_file(), f
    assert not (out / "probe_fit.svg").exists()          # PNG only unless --figures asks for more
    assert summary["bath_c"] == 60 and summary["refit_rms_k"] < 3.0 and summary["future_steps"] >= 1
    fitted = load_quenchant(str(out / "quenchant.csv"))
    assert fitted.name == "tank2_probe_fit" and fitted.bath_c == 60.0 and "Beck" in fitted.source
    # The curve goes straight into a case file.
    code, stdout, stderr = cli("run", _case(tmp_path, str(out / "quenchant.csv")), "--out", tmp_path / "r", "--json")
    assert code == 0, stderr
    assert json.loads(stdout)["quench"]["outer"] == "tank2_probe_fit"
    # No silent replacement of an earlier fit.
    code, _, stderr = cli("probe", record, "--out", out)
    assert code == 2 and _one_line(stderr) and "--overwrite" in stderr


T = np.linspace(0.0, 40.0, 201)
Y = 60.0 + 790.0 * np.exp(-T / 10.0)
BAD = {
    "time not increasing": (np.where(np.arange(201) == 50, T[48], T), Y, "# bath_c: 60\n", "times must increase"),
    "too few points": (T[:12], Y[:12], "# bath_c: 60\n", "at least 20 data rows"),
    "kelvin": (T, Y + 273.15, "# bath_c: 60\n", "kelvin or Fahrenheit"),
    "fahrenheit": (T, 1.8 * Y + 32.0, "# bath_c: 60\n", "kelvin or Fahrenheit"),
    "NaN": (T, np.where(np.arange(201) == 9, np.nan, Y), "# bath_c: 60\n", "no NaN"),
    "no bath": (T, Y, "", "--bath-c"),
    "bath above the record": (T, Y, "# bath_c: 250\n", "coolest measured"),
}


@pytest.mark.parametrize("label", sorted(BAD))
def test_probe_refuses_malformed_records_in_one_line(cli, tmp_path, label):
    t, y, meta, expected = BAD[label]
    record = _write_record(tmp_path / "rec.csv", t, y, meta)
    out = tmp_path / "fit"
    code, _, stderr = cli("probe", record, "--out", out)
    assert code == 2 and _one_line(stderr) and expected in stderr, stderr
    assert not out.exists()


def test_probe_refuses_a_missing_file_and_a_header_without_the_columns(cli, tmp_path):
    code, _, stderr = cli("probe", tmp_path / "nope.csv", "--out", tmp_path / "o")
    assert code == 2 and _one_line(stderr)
    (tmp_path / "h.csv").write_text("t,T\n0,850\n1,800\n", "utf-8")
    code, _, stderr = cli("probe", tmp_path / "h.csv", "--out", tmp_path / "o", "--bath-c", "60")
    assert code == 2 and _one_line(stderr) and "time_s and temperature_c" in stderr
