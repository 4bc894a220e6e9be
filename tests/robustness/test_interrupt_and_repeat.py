"""Interrupted runs leave nothing behind and say what they were doing; the same input gives the
same profile.csv byte for byte.

The signals are sent by the process to itself at a named point (QUENCHWISE_FAULT, see
publish.fault), so the tests do not depend on timing: imports, the start of the solve, the
writing of the staged files, the swap itself."""

import os
import signal
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
CASES = ROOT / "cases"
SRC = str(ROOT / "src")


def _run(args, fault=None, **kw):
    env = {**os.environ, "PYTHONPATH": SRC}
    env.pop("QUENCHWISE_FAULT", None)
    if fault:
        env["QUENCHWISE_FAULT"] = fault
    return subprocess.Popen([sys.executable, "-m", "quenchwise", *map(str, args)], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE, text=True, env=env, **kw)


@pytest.mark.parametrize("point, sig, status", [
    ("importing", "INT", 130),            # during the imports (a traceback before)
    ("importing", "TERM", 143),           # the first second (silent before)
    ("solving", "TERM", 143),
    ("writing results", "TERM", 143),     # while the staged files are written
])
def test_signal_stops_cleanly_and_keeps_earlier_results(tmp_path, point, sig, status):
    out = tmp_path / "res"
    out.mkdir()
    (out / "result.h5").write_bytes(b"earlier result")
    proc = _run(["run", CASES / "shaft_water.toml", "--out", out, "--overwrite"], fault=f"{point}={sig}")
    _, stderr = proc.communicate(timeout=120)
    assert proc.returncode == status, stderr
    line = stderr.strip()
    assert "\n" not in line and "interrupted while" in line and "Traceback" not in stderr, stderr
    assert (out / "result.h5").read_bytes() == b"earlier result"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["res"]   # no staging folder, no lock file left


def test_signal_during_the_swap_finishes_the_swap(tmp_path):
    out = tmp_path / "res"
    proc = _run(["run", CASES / "shaft_water.toml", "--out", out], fault="publish:exchanged=TERM")
    _, stderr = proc.communicate(timeout=120)
    assert proc.returncode == 143 and "new results were already complete" in stderr, stderr
    assert (out / "profile.csv").exists() and (out / "result.h5").exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["res"]


def test_kill_9_then_rerun(tmp_path):
    """SIGKILL after the result was staged, before the swap: the next run into the same folder
    takes over the dead run's lock, removes its staging folder and publishes."""
    out = tmp_path / "res"
    proc = _run(["run", CASES / "shaft_water.toml", "--out", out], fault="publish:ready=KILL")
    proc.communicate(timeout=120)
    assert proc.returncode == -signal.SIGKILL
    assert any(".res.qw-stage-" in p.name for p in tmp_path.iterdir()) and not out.exists()
    proc = _run(["run", CASES / "shaft_water.toml", "--out", out])
    _, stderr = proc.communicate(timeout=120)
    assert proc.returncode == 0, stderr
    assert "left by an interrupted run" in stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["res"]
    assert (out / "profile.csv").exists()


def _stopped(pid: int) -> bool:
    with open(f"/proc/{pid}/stat") as f:
        return f.read().rsplit(")", 1)[1].split()[0] == "T"


def test_concurrent_runs_into_one_folder(tmp_path):
    """Run A stops itself (SIGSTOP) in the middle of its solve, holding the lock; run B into the same
    folder is refused with exit 2 naming the lock; A then finishes with its complete result."""
    out = tmp_path / "res"
    a = _run(["run", CASES / "shaft_water.toml", "--out", out, "--json"], fault="solving=STOP")
    while not _stopped(a.pid):          # wait for A to reach the point (no fixed sleep)
        if a.poll() is not None:
            pytest.fail(a.stderr.read())
        os.sched_yield()
    b = _run(["run", CASES / "roll_oil.toml", "--out", out])
    _, err_b = b.communicate(timeout=120)
    a.send_signal(signal.SIGCONT)
    out_a, err_a = a.communicate(timeout=120)
    assert b.returncode == 2 and ".res.lock" in err_b and len(err_b.strip().splitlines()) == 1, err_b
    assert a.returncode == 0, err_a
    assert "Pinion shaft" in out_a and (out / "profile.csv").exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["res"]


def test_same_input_same_profile_bytes(cli, tmp_path):
    for name in ("a", "b"):
        code, _, err = cli("run", CASES / "shaft_water.toml", "--out", tmp_path / name)
        assert code == 0, err
    assert (tmp_path / "a" / "profile.csv").read_bytes() == (tmp_path / "b" / "profile.csv").read_bytes()
