"""Issue 13 item 3: with measured_jominy, `band` samples only the uncertainty the curve leaves."""

import json
import shutil
from pathlib import Path

from typer.testing import CliRunner

from quenchwise.cli import app

CASES = Path(__file__).resolve().parents[2] / "cases"


def test_measured_curve_narrows_the_band(tmp_path):
    """The invented heat 4711 curve (cases/) fixes the heat in the 4140 range: the band of the fitted
    heat is narrower at the centre than the band over the whole chemistry range, and it says what
    it sampled. Coarse: 4 heats each."""
    shutil.copy(CASES / "heat_4711_endquench.csv", tmp_path)
    text = (CASES / "pin_heat_4711.toml").read_text()
    (tmp_path / "measured.toml").write_text(text)
    (tmp_path / "range.toml").write_text(text.replace('measured_jominy = "heat_4711_endquench.csv"\n', ""))
    spread, sampled = {}, {}
    for name in ("measured", "range"):
        res = CliRunner().invoke(app, ["band", str(tmp_path / f"{name}.toml"), "--out", str(tmp_path / name),
                                       "--samples", "4", "--json"])
        assert res.exit_code == 0, res.output
        d = json.loads(res.output)
        centre = d["profile"][-1]
        spread[name] = centre["hv_max"] - centre["hv_min"]
        sampled[name] = d["sampled"]
    assert spread["measured"] < 0.5 * spread["range"], spread
    assert "remaining uncertainty" in sampled["measured"] and "chemistry range" in sampled["range"]
