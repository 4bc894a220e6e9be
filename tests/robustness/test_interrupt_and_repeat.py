"""Interrupted runs leave nothing behind and say what they were doing; the same input gives the
same profile.csv byte for byte."""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

CASES = Path(__file__).resolve().parents[2] / "cases"


@pytest.mark.parametrize("sig, status", [(signal.SIGTERM, 143), (signal.SIGINT, 130)])
def test_signal_stops_cleanly_and_keeps_earlier_results(tmp_path, sig, status):
    slow = tmp_path / "slow.toml"    # a deliberately long solve: fine mesh, small steps
    slow.write_text((CASES / "roll_oil.toml").read_text() + "\n[mesh]\ncells = 300\nmax_temperature_step_k = 1.0\n")
    out = tmp_path / "res"
    out.mkdir()
    (out / "result.h5").write_bytes(b"earlier result")
    proc = subprocess.Popen(
        [sys.executable, "-m", "quenchwise", "run", str(slow), "--out", str(out), "--overwrite"],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    time.sleep(4.0)    # imports done, well inside the quench (the case takes longer than this)
    proc.send_signal(sig)
    _, stderr = proc.communicate(timeout=60)
    assert proc.returncode == status, stderr
    line = stderr.strip()
    assert "\n" not in line and "interrupted while" in line and "Traceback" not in stderr
    assert (out / "result.h5").read_bytes() == b"earlier result"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["res", "slow.toml"]   # no staging folder left


def test_same_input_same_profile_bytes(cli, tmp_path):
    for name in ("a", "b"):
        code, _, err = cli("run", CASES / "shaft_water.toml", "--out", tmp_path / name)
        assert code == 0, err
    assert (tmp_path / "a" / "profile.csv").read_bytes() == (tmp_path / "b" / "profile.csv").read_bytes()
