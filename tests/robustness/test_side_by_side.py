"""Output work done in two processes (side_by_side.py): every piece runs, the files of both land
in the staging folder, a failure on either side ends the command with one line and leaves earlier
results untouched. Checks of the program's own contract (no outside reference applies)."""

import os
import subprocess
import sys
from pathlib import Path

import pytest

from quenchwise import side_by_side
from quenchwise.side_by_side import run_side_by_side

ROOT = Path(__file__).resolve().parents[2]
CASES = ROOT / "cases"
forks = pytest.mark.skipif(not side_by_side._can_fork(), reason="needs fork and two cores")


@forks
def test_both_processes_write_their_files(tmp_path):
    pids = tmp_path / "pids"
    pids.mkdir()
    tasks = [lambda i=i: (pids / f"{i}-{os.getpid()}").write_text("x") for i in range(3)]
    run_side_by_side(tasks)
    written = sorted(p.name.split("-") for p in pids.iterdir())
    assert [i for i, _ in written] == ["0", "1", "2"]
    assert {pid for _, pid in written} == {str(os.getpid()), written[0][1]} and written[0][1] != str(os.getpid())


@forks
def test_a_failure_in_the_child_is_raised_here_with_its_type_and_message():
    def fails():
        raise ValueError("figure could not be drawn")

    with pytest.raises(ValueError, match="figure could not be drawn"):
        run_side_by_side([fails, lambda: None])


class _NeedsTwoArguments(Exception):
    def __init__(self, what, why):
        super().__init__(f"{what}: {why}")


@forks
def test_an_exception_that_cannot_be_rebuilt_arrives_as_its_text():
    def fails():
        raise _NeedsTwoArguments("figure", "font missing")

    with pytest.raises(RuntimeError, match="_NeedsTwoArguments: figure: font missing"):
        run_side_by_side([fails, lambda: None])


@forks
def test_a_failure_here_stops_and_reaps_the_child(tmp_path):
    def fails():
        raise OSError("disk full")

    with pytest.raises(OSError, match="disk full"):
        run_side_by_side([lambda: __import__("time").sleep(30), fails])
    with pytest.raises(ChildProcessError):     # no child left behind
        os.waitpid(-1, os.WNOHANG)


def test_serial_when_asked(monkeypatch):
    monkeypatch.setenv("QUENCHWISE_SERIAL", "1")
    seen = []
    run_side_by_side([lambda: seen.append(os.getpid()), lambda: seen.append(os.getpid())])
    assert seen == [os.getpid()] * 2


@forks
def test_run_writes_all_files_and_a_killed_figure_process_keeps_earlier_results(tmp_path):
    out = tmp_path / "res"
    env = {**os.environ, "PYTHONPATH": str(ROOT / "src")}
    env.pop("QUENCHWISE_FAULT", None)
    args = [sys.executable, "-m", "quenchwise", "run", str(CASES / "shaft_water.toml"), "--out", str(out)]
    done = subprocess.run(args, capture_output=True, text=True, env=env)
    assert done.returncode == 0, done.stderr
    names = sorted(p.name for p in out.iterdir() if not p.name.startswith("."))
    assert names == ["cooling.png", "hardness.png", "profile.csv", "result.h5"]
    before = {p.name: p.read_bytes() for p in out.iterdir() if p.is_file()}
    serial = tmp_path / "serial"
    done = subprocess.run(args[:-1] + [str(serial)], capture_output=True, text=True, env={**env, "QUENCHWISE_SERIAL": "1"})
    assert done.returncode == 0, done.stderr
    for name in ("cooling.png", "hardness.png", "profile.csv"):   # same bytes side by side or not (result.h5 dates itself)
        assert (serial / name).read_bytes() == before[name], name

    killed = subprocess.run(args + ["--overwrite"], capture_output=True, text=True,
                            env={**env, "QUENCHWISE_FAULT": "side process=KILL"})
    assert killed.returncode == 1
    assert killed.stderr.count("\n") == 1 and "signal 9" in killed.stderr, killed.stderr
    assert {p.name: p.read_bytes() for p in out.iterdir() if p.is_file()} == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["res", "serial"]
