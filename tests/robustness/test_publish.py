"""Publishing a result folder as a whole (quenchwise.publish): at every instant --out holds one
complete result, old or new; a second run into the same folder is refused naming the lock; what
killed runs leave behind is cleaned up by the next run.

Faults are injected deterministically (a patched publish.fault, real signals sent to this process
with os.kill, OSErrors), so no test depends on timing. Requirements from issue 14 (no source
needed: these are the program's own guarantees).
"""

import errno
import json
import os
import random
import signal
import subprocess
import sys
import threading
from pathlib import Path

import pytest

from quenchwise import publish
from quenchwise.errors import InputError

OLD = {"result.h5": "old h5", "profile.csv": "old csv", "hardness.png": "old png", "extra_old.png": "old extra"}
NEW = {"result.h5": "new h5", "profile.csv": "new csv", "hardness.png": "new png", "cooling.png": "new cooling"}
MARKERS = ("result.h5", "profile.csv")
SRC = str(Path(publish.__file__).resolve().parents[1])


@pytest.fixture(autouse=True)
def _clean_state():
    publish._held.clear()
    publish._depth[0] = 0
    yield
    publish.release_all()
    publish._held.clear()
    publish._depth[0] = 0


def _write(folder: Path, files: dict) -> None:
    for name, text in files.items():
        (folder / name).write_text(text)


def _publish_new(out: Path, files: dict = NEW, overwrite: bool = True, markers=MARKERS) -> list:
    publish.claim(out, overwrite, markers)
    try:
        with publish.staged(out) as (staging, placed):
            for name, text in files.items():
                publish.fault(f"write:{name}")
                (staging / name).write_text(text)
        return placed
    finally:
        publish.release_all()


def _old_result(tmp_path: Path) -> Path:
    """A folder holding a complete previous result (with its manifest) and a file of the user's."""
    out = tmp_path / "res"
    _publish_new(out, OLD, overwrite=False)
    (out / "notes.txt").write_text("the user's own notes")
    return out


def _contents(folder: Path) -> dict:
    return {p.name: p.read_text() for p in folder.iterdir() if p.is_file() and p.name != publish.MANIFEST}


def _state(out: Path) -> str:
    """'old' or 'new' when the folder holds exactly one complete result (and the user's file);
    anything else is a mixed or broken folder."""
    files = _contents(out)
    if files.pop("notes.txt", None) != "the user's own notes":
        return "user file lost"
    if files == OLD:
        return "old"
    if files == NEW:
        return "new"
    return f"mixed: {sorted(files.items())}"


def _leftovers(tmp_path: Path) -> list:
    return sorted(p.name for p in tmp_path.iterdir() if p.name not in ("res",))


def test_new_folder_gets_the_files_and_a_manifest(tmp_path):
    out = tmp_path / "a" / "b" / "res"
    placed = _publish_new(out)
    assert sorted(p.name for p in placed) == sorted(NEW)
    assert _contents(out) == NEW
    assert json.loads((out / publish.MANIFEST).read_text()) == {"+".join(MARKERS): sorted(NEW)}
    assert sorted(p.name for p in out.parent.iterdir()) == ["res"]     # no staging folder, no lock file


def test_rerun_replaces_the_whole_previous_result_and_keeps_other_files(tmp_path):
    out = _old_result(tmp_path)
    _publish_new(out)
    assert _state(out) == "new"                       # extra_old.png of the old result is gone
    assert _leftovers(tmp_path) == []


def test_results_of_other_commands_stay(tmp_path):
    out = _old_result(tmp_path)
    _publish_new(out, {"ttt.csv": "diagram"}, markers=("ttt.csv",))
    files = _contents(out)
    assert files["ttt.csv"] == "diagram" and _state(out.parent / "res") != "user file lost"
    assert {k: files[k] for k in OLD} == OLD


def test_a_previous_file_that_cannot_be_replaced_file_by_file_is_swapped_with_its_folder(tmp_path):
    # The old publisher moved files one by one: a directory where profile.csv goes stopped it
    # half-way (new figures beside the old profile). The folder swap replaces it with the rest.
    out = _old_result(tmp_path)
    (out / "profile.csv").unlink()
    (out / "profile.csv").mkdir()
    (out / "profile.csv" / "inside").write_text("x")
    _publish_new(out)
    assert (out / "profile.csv").read_text() == "new csv" and _contents(out)["hardness.png"] == "new png"
    assert _leftovers(tmp_path) == []


def test_a_file_that_cannot_be_carried_over_fails_cleanly(tmp_path, monkeypatch):
    # The user's file cannot be linked nor copied into the new folder (e.g. a permission the
    # process lacks): the run fails with one line naming --out, the old result stays complete.
    out = _old_result(tmp_path)
    real_link = publish._link_tree

    def refuse(src, dst):
        if src.name == "notes.txt":
            raise PermissionError(errno.EACCES, "Permission denied", str(src))
        real_link(src, dst)

    monkeypatch.setattr(publish, "_link_tree", refuse)
    with pytest.raises(InputError) as err:
        _publish_new(out)
    assert "--out" in str(err.value) and "Permission denied" in str(err.value) and "\n" not in str(err.value)
    assert _state(out) == "old" and _leftovers(tmp_path) == []


def test_full_file_system_while_writing_is_one_line_on_out(tmp_path, monkeypatch):
    out = _old_result(tmp_path)

    def full(point):
        if point == "write:profile.csv":
            raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(publish, "fault", full)
    with pytest.raises(InputError, match="No space left on device"):
        _publish_new(out)
    assert _state(out) == "old" and _leftovers(tmp_path) == []


POINTS = ["write:result.h5", "write:profile.csv", "write:cooling.png", "publish:staging", "publish:carry",
          "publish:ready", "publish:exchanged", "publish:moved-old"]


@pytest.mark.parametrize("seed", range(50))
def test_randomized_interruptions_never_leave_a_mixed_folder(tmp_path, monkeypatch, seed):
    """50 randomized interruptions: a real SIGINT or SIGTERM (from this thread or another one) or an
    OSError at a random point of writing and publishing, with or without the atomic exchange."""
    rnd = random.Random(seed)
    out = _old_result(tmp_path)
    point = rnd.choice(POINTS)
    kind = rnd.choice(["SIGINT", "SIGTERM", "thread", "oserror"])
    if rnd.random() < 0.3 or point == "publish:moved-old":
        monkeypatch.setattr(publish, "_exchange", lambda a, b: False)   # file systems without it
    fired = []

    def inject(where):
        if where != point or fired:
            return
        fired.append(where)
        if kind == "oserror":
            raise OSError(errno.EIO, "Input/output error (injected)")
        sig = signal.SIGTERM if kind == "SIGTERM" else signal.SIGINT
        if kind == "thread":
            t = threading.Thread(target=os.kill, args=(os.getpid(), sig))
            t.start()
            t.join()
        else:
            os.kill(os.getpid(), sig)

    previous = publish.install_handlers()
    monkeypatch.setattr(publish, "fault", inject)
    try:
        try:
            _publish_new(out)
            outcome = "completed"
        except publish.Interrupted as exc:
            outcome = f"interrupted {exc.status}"
        except InputError:
            outcome = "error"
    finally:
        for sig, handler in previous.items():
            signal.signal(sig, handler)
    state = _state(out)
    assert state in ("old", "new"), (point, kind, outcome, state)
    # A signal inside the swap is held until the swap is done (the new result is then complete);
    # anything before it, and an error between the two renames, leaves the old result.
    held = point == "publish:exchanged" or (point == "publish:moved-old" and kind != "oserror")
    if outcome != "completed" and fired:
        assert state == ("new" if held else "old"), (point, kind, outcome)
    if outcome == "completed":
        assert state == "new"
    assert _leftovers(tmp_path) == [], (point, kind, outcome)


def test_signal_inside_the_swap_is_held_until_it_is_done(tmp_path, monkeypatch):
    out = _old_result(tmp_path)
    monkeypatch.setattr(publish, "fault", lambda p: p == "publish:exchanged" and os.kill(os.getpid(), signal.SIGTERM))
    previous = publish.install_handlers()
    try:
        with pytest.raises(publish.Interrupted) as err:
            _publish_new(out)
    finally:
        for sig, handler in previous.items():
            signal.signal(sig, handler)
    assert err.value.status == 143 and _state(out) == "new" and _leftovers(tmp_path) == []


def test_second_claim_on_the_same_folder_is_refused_naming_the_lock(tmp_path):
    out = tmp_path / "res"
    publish.claim(out, False, MARKERS)
    r = subprocess.run([sys.executable, "-c", "import sys; from quenchwise import publish; "
                        "publish.claim(sys.argv[1], False, ('result.h5',))", str(out)],
                       capture_output=True, text=True, env={**os.environ, "PYTHONPATH": SRC}, timeout=60)
    assert r.returncode != 0 and ".res.lock" in r.stderr and "another quenchwise run" in r.stderr
    publish.release_all()
    assert not (tmp_path / ".res.lock").exists()


KILL_SCRIPT = """
import sys
from pathlib import Path
from quenchwise import publish
out = Path(sys.argv[1])
if sys.argv[2] == "noexchange":
    publish._exchange = lambda a, b: False
publish.claim(out, True, ("result.h5", "profile.csv"))
with publish.staged(out) as (staging, placed):
    for name, text in %r.items():
        publish.fault("write:" + name)
        (staging / name).write_text(text)
""" % NEW


@pytest.mark.parametrize("point, exchange", [("write:profile.csv", "exchange"), ("publish:carry", "exchange"),
                                             ("publish:ready", "exchange"), ("publish:exchanged", "exchange"),
                                             ("publish:moved-old", "noexchange"), ("publish:exchanged", "noexchange")])
def test_kill_9_then_rerun_recovers(tmp_path, point, exchange):
    """SIGKILL at a point of the publication (no clean-up can run), then the next run: the folder
    holds one complete result, the lock is free and the folders the killed run left are gone."""
    out = _old_result(tmp_path)
    r = subprocess.run([sys.executable, "-c", KILL_SCRIPT, str(out), exchange], capture_output=True, text=True,
                       env={**os.environ, "PYTHONPATH": SRC, "QUENCHWISE_FAULT": f"{point}=KILL"}, timeout=60)
    assert r.returncode == -signal.SIGKILL, r.stderr
    left = _leftovers(tmp_path)
    assert any(".qw-" in n for n in left) or point == "publish:exchanged"   # something was left behind
    # the next run: it takes the lock of the dead process and cleans up before anything else
    publish.claim(out, True, MARKERS)
    publish.release_all()
    assert _state(out) in ("old", "new")
    assert _state(out) == ("new" if point == "publish:exchanged" else "old")
    assert _leftovers(tmp_path) == []


def test_out_paths_that_cannot_hold_a_result(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "file").write_text("x")
    for bad, words in ((Path(""), "working folder"), (Path("."), "working folder"), (tmp_path / "file", "this is a file"),
                       (tmp_path / "file" / "sub", "is a file"), (Path("/"), "root"),
                       (Path("/proc/quenchwise-test-out"), "can be written")):
        with pytest.raises(InputError) as err:
            publish.claim(bad, False, MARKERS)
        assert words in str(err.value) and "--out" in str(err.value), str(err.value)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["file"]


def test_staging_folders_of_earlier_versions_are_named(tmp_path, capsys):
    """Before publish.py a killed run left '.NAME.XXXXXXXX' (mkdtemp) that no run removed: the next
    run names it (it is not removed: such a name could be the user's)."""
    out = tmp_path / "res"
    (tmp_path / ".res.ab12cd_9").mkdir()
    publish.claim(out, False, MARKERS)
    publish.release_all()
    err = capsys.readouterr().err
    assert ".res.ab12cd_9 looks like a staging folder of an earlier version" in err
    assert (tmp_path / ".res.ab12cd_9").is_dir()
