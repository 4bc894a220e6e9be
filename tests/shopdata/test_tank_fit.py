"""Issue 13 item 2: the tank's severity from a hardness traverse (workflows.tank_fit, fit-tank)."""

import json

import numpy as np
import pytest
from typer.testing import CliRunner

from quenchwise.case import load_case
from quenchwise.cli import app
from quenchwise.thermal.quenchants import htc_from_grossmann, load_quenchant
from quenchwise.workflows import simulate
from quenchwise.measured import read_traverse
from quenchwise.workflows.tank_fit import _at_depths, fit_tank

CASE = '[steel]\ngrade = "{grade}"\n[part]\nshape = "bar"\ndiameter_mm = 40\n[quench]\nseverity_h = {h}\n'


def _traverse(tmp_path, grade):
    """The traverse of the 40 mm bar quenched at Grossmann H 0.6, every 2 mm surface to centre."""
    (tmp_path / "tank.toml").write_text(CASE.format(grade=grade, h=0.6))
    [truth] = simulate([load_case(tmp_path / "tank.toml")])
    depths = np.arange(0.0, 20.01, 2.0)
    hrc = _at_depths(truth, depths)
    (tmp_path / "traverse.csv").write_text("depth_mm,hrc\n" + "".join(f"{d:g},{h:.1f}\n" for d, h in zip(depths, hrc)))
    (tmp_path / "start.toml").write_text(CASE.format(grade=grade, h=0.3))
    return hrc


@pytest.mark.parametrize("grade", ["4140", "1045"])
def test_traverse_at_h06_fitted_from_h03(tmp_path, grade):
    """Done-when 'Tank' (issue 13): the traverse of a 40 mm bar quenched at H 0.6, fitted from a case
    at H 0.3, is reproduced within 1.5 HRC at every depth; the case as given misses it by more
    (so the check can fail), and the factor found is the ratio of the two severities, 2 (h = 2 k H,
    Grossmann, Asimow & Urban 1939), within its reported range."""
    hrc = _traverse(tmp_path, grade)
    fit = fit_tank(load_case(tmp_path / "start.toml"), read_traverse(tmp_path / "traverse.csv"))
    assert np.max(np.abs(fit.fitted_hrc - hrc)) <= 1.5
    assert np.max(np.abs(fit.start_hrc - hrc)) > 1.5
    lo, hi = fit.summary()["factor_range_2se"]
    assert lo <= 2.0 <= hi and abs(fit.factor - 2.0) < 0.3


def test_fit_tank_cli_writes_a_curve_run_accepts(tmp_path):
    """fit-tank writes quenchant.csv (read back by [quench] medium), tank_fit.csv and the figure;
    its constant h is twice the H 0.3 one."""
    _traverse(tmp_path, "4140")
    out = tmp_path / "fit"
    res = CliRunner().invoke(app, ["fit-tank", str(tmp_path / "start.toml"), str(tmp_path / "traverse.csv"),
                                   "--out", str(out), "--json"])
    assert res.exit_code == 0, res.output
    summary = json.loads(res.output)
    assert {p.split("/")[-1] for p in summary["files"]} >= {"quenchant.csv", "tank_fit.csv", "tank_fit.png"}
    q = load_quenchant(str(out / "quenchant.csv"))
    assert abs(float(q.htc(600.0)) / float(htc_from_grossmann(0.3)) - 2.0) < 0.3
    assert abs(summary["equivalent_h_per_inch"] - 0.6) < 0.1


@pytest.mark.parametrize("body, says", [
    ("depth_mm,hrc\n0,55\n2,54\n4,50\n", "at least 4"),
    ("depth_mm,hrc\n0,55\n4,54\n2,50\n6,40\n", "increase"),
    ("depth_mm,hrc\n0,45\n2,50\n4,44\n6,40\n", "scatter"),
    ("depth_mm,hrc\n0,75\n2,54\n4,50\n6,40\n", "0 to 70"),
    ("depth_mm,hrc\n0,55\n2,54\n4,50\n30,40\n", "depths from 0 to 20"),
])
def test_bad_traverse_exit_2_nothing_written(tmp_path, body, says):
    (tmp_path / "start.toml").write_text(CASE.format(grade="4140", h=0.3))
    (tmp_path / "traverse.csv").write_text(body)
    out = tmp_path / "fit"
    res = CliRunner().invoke(app, ["fit-tank", str(tmp_path / "start.toml"), str(tmp_path / "traverse.csv"),
                                   "--out", str(out)])
    assert res.exit_code == 2
    lines = [ln for ln in res.output.splitlines() if ln.strip()]
    assert len(lines) == 1 and says in lines[0] and "Traceback" not in res.output
    assert not out.exists() or not any(out.iterdir())
