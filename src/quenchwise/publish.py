"""Publishing a result folder as a whole, one run per folder, and clean ends on SIGINT / SIGTERM.

How a command puts its files in ``--out`` (standard library only, so it is usable before the heavy
imports):

1. ``claim(out, overwrite, markers)`` at the start: takes an exclusive lock on ``.NAME.lock``
   beside ``out`` (``flock``: the kernel drops it when the process dies, even by SIGKILL), removes
   folders that killed runs left beside ``out`` (``.NAME.qw-stage-*``, ``.NAME.qw-old-*``; nobody
   else can own them while we hold the lock) and refuses a folder that already holds this command's
   results unless ``overwrite``. A second run into the same folder gets an InputError naming the lock.
2. ``staged(out)``: the command writes every file into a staging folder beside ``out``. The files of
   ``out`` that are not part of this command's previous result (the user's own files, other commands'
   results) are hard-linked into the staging folder, then the two folders are exchanged in one
   ``renameat2(RENAME_EXCHANGE)`` call, and only then is the previous result removed. At every
   instant ``out`` holds one complete result, old or new. Where the exchange is not supported the
   swap is two renames (``out`` -> ``.NAME.qw-old-*``, staging -> ``out``) and the next run puts the
   old folder back if a kill fell between them.
3. SIGINT / SIGTERM: ``on_signal`` raises ``Interrupted`` (status 128 + signal) in the main thread,
   where Python runs every signal handler whichever thread the kernel picked; inside ``critical()``
   (the swap and the clean-up) the signal is held back and raised right after, so no signal can
   split a publication. Publishing happens in the main thread only.

Which files belong to a command's result is kept in ``.quenchwise.json`` in the folder (the file
names per command), so a re-run never leaves a figure of the previous result beside new files.
"""

from __future__ import annotations

import errno
import json
import os
import re
import shutil
import signal
import stat
import sys
import tempfile
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path

MANIFEST = ".quenchwise.json"
SIGNALS = (signal.SIGINT, signal.SIGTERM)


class Interrupted(KeyboardInterrupt):
    """SIGINT or SIGTERM arrived; carries the exit status (128 + signal number)."""

    def __init__(self, status: int):
        super().__init__(status)
        self.status = status


# -- signals -----------------------------------------------------------------------------------
_held: list[int] = []      # signals that arrived inside critical()
_depth = [0]               # nesting of critical()


def on_signal(signum, _frame):
    """The SIGINT / SIGTERM handler: raise Interrupted now, or after the critical section."""
    if _depth[0]:
        _held.append(signum)
        return
    raise Interrupted(128 + signum)


def install_handlers() -> dict:
    """Install on_signal for SIGINT and SIGTERM (main thread only); return the previous handlers."""
    previous = {sig: signal.getsignal(sig) for sig in SIGNALS}
    for sig in SIGNALS:
        signal.signal(sig, on_signal)
    return previous


@contextmanager
def critical():
    """Hold SIGINT / SIGTERM back while the block runs; raise Interrupted right after if one came.

    Python runs signal handlers in the main thread only, so this covers signals the kernel delivered
    to any thread (pthread_sigmask in the main thread would not)."""
    _depth[0] += 1
    try:
        yield
    finally:
        _depth[0] -= 1
        if not _depth[0] and _held:
            signum = _held[0]
            _held.clear()
            raise Interrupted(128 + signum)  # noqa: B012 - the signal outranks what the block raised


def fault(point: str) -> None:
    """Deterministic fault injection for the tests: QUENCHWISE_FAULT="POINT=SIG" (e.g.
    "solving=TERM", "publish:exchanged=KILL") sends the process that signal when it reaches a point
    starting with POINT. Costs one dictionary look-up when unset."""
    spec = os.environ.get("QUENCHWISE_FAULT")
    if not spec:
        return
    where, _, sig = spec.rpartition("=")
    if where and point.startswith(where):
        os.kill(os.getpid(), getattr(signal, "SIG" + sig.upper()))


# -- the exchange of two folders ---------------------------------------------------------------
_RENAME_EXCHANGE = 2
_AT_FDCWD = -100


def _exchange(a: Path, b: Path) -> bool:
    """Swap two paths atomically (Linux renameat2 RENAME_EXCHANGE); False where not supported."""
    import ctypes    # here, not at the top: the module is imported before the signal handlers exist

    try:
        libc = ctypes.CDLL(None, use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    renameat2.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
    if renameat2(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return True
    err = ctypes.get_errno()
    if err in (errno.EINVAL, errno.ENOSYS, errno.ENOTSUP, errno.EOPNOTSUPP):
        return False
    raise OSError(err, os.strerror(err), str(b))


# -- the claim on a folder ---------------------------------------------------------------------
@dataclass
class Claim:
    out: Path                    # as the user wrote it (for messages and the "wrote" list)
    real: Path                   # symlinks resolved: what is swapped
    markers: tuple
    lock_path: Path
    fd: int
    made_dirs: list = field(default_factory=list)   # parent folders this run created
    published: bool = False


_claims: dict[Path, Claim] = {}


def _input_error(out: Path, allowed: str):
    from .errors import InputError

    return InputError("--out", str(out), allowed)


def _lock(lock_path: Path, out: Path) -> int:
    """An exclusive flock on lock_path, the file still being the one at that path (a run that
    finished may unlink it between our open and our flock)."""
    import fcntl

    while True:
        try:
            fd = os.open(lock_path, os.O_RDWR | os.O_CREAT, 0o644)
        except OSError as exc:
            raise _input_error(out, f"a folder that can be written ({exc.strerror}: {lock_path})") from None
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            try:
                holder = os.read(fd, 64).decode("ascii", "replace").strip()
            finally:
                os.close(fd)
            raise _input_error(out, "a folder no other run is writing to (another quenchwise run"
                               + (f", process {holder}," if holder else "") + f" holds the lock {lock_path})") from None
        try:
            same = os.fstat(fd).st_ino == os.stat(lock_path).st_ino
        except FileNotFoundError:
            same = False
        if same:
            os.ftruncate(fd, 0)
            os.write(fd, str(os.getpid()).encode())
            return fd
        os.close(fd)


def _leftovers(real: Path) -> list[Path]:
    pattern = re.compile(r"\." + re.escape(real.name) + r"\.qw-(stage|old)-[a-z0-9_]+$")
    try:
        return sorted(p for p in real.parent.iterdir() if pattern.match(p.name))
    except OSError:
        return []


def _recover(real: Path) -> list[str]:
    """Under the lock: folders beside `real` left by killed runs. A kept previous result (qw-old)
    goes back in place if `real` is missing; everything else is removed. Returns what was done."""
    notes = []
    for p in _leftovers(real):
        if "qw-old-" in p.name and not os.path.lexists(real):
            os.rename(p, real)
            notes.append(f"put back the previous result {real} from {p.name}")
            continue
        shutil.rmtree(p, ignore_errors=True)
        notes.append(f"removed {p.name}" if not os.path.lexists(p) else f"could not remove {p}")
    # Versions before publish.py staged in ".NAME.XXXXXXXX" (8 random characters): named, not
    # removed, since such a name could also be the user's.
    legacy = re.compile(r"\." + re.escape(real.name) + r"\.[a-z0-9_]{8}$")
    try:
        old_style = sorted(p for p in real.parent.iterdir() if legacy.match(p.name) and p.is_dir())
    except OSError:
        old_style = []
    notes += [f"{p} looks like a staging folder of an earlier version; remove it if it is" for p in old_style]
    return notes


def claim(out: Path, overwrite: bool, markers: tuple = ()) -> Claim:
    """Lock the folder `out` for this process and check it may take this command's results.

    Raises InputError (one line, exit 2) for a path that cannot be a result folder, a folder locked
    by another run, or results already there without `overwrite`."""
    out = Path(out)
    try:
        return _claim(out, overwrite, markers)
    except OSError as exc:    # a name too long, a loop of links, an I/O error...
        raise _input_error(out, f"a usable folder path ({exc.strerror or exc})") from None


def _claim(out: Path, overwrite: bool, markers: tuple) -> Claim:
    real = Path(os.path.realpath(out))
    if real in _claims:
        return _claims[real]
    cwd = Path(os.path.realpath(os.getcwd()))
    if real == cwd or real in cwd.parents or real.parent == real:
        raise _input_error(out, "a folder other than the working folder, its parents or the root "
                                "(the result replaces the folder as a whole)")
    if os.path.lexists(real) and not real.is_dir():
        raise _input_error(out, "a folder path (this is a file)")
    if real.is_dir() and os.path.ismount(real):
        raise _input_error(out, "a folder that is not a mount point (give a folder inside it)")
    made = []
    parent = real.parent
    missing = []
    while not parent.exists():
        missing.append(parent)
        parent = parent.parent
    if not parent.is_dir():
        raise _input_error(out, f"a folder path ({parent} is a file)")
    for d in reversed(missing):
        try:
            d.mkdir()
        except OSError as exc:
            _remove_dirs(made)
            raise _input_error(out, f"a folder that can be created ({exc.strerror}: {d})") from None
        made.append(d)
    if not os.access(real.parent, os.W_OK | os.X_OK):
        _remove_dirs(made)
        raise _input_error(out, f"a folder in a writable place ({real.parent} is not writable)")
    lock_path = real.parent / f".{real.name}.lock"
    try:
        fd = _lock(lock_path, out)
    except BaseException:
        _remove_dirs(made)
        raise
    c = Claim(out=out, real=real, markers=tuple(markers), lock_path=lock_path, fd=fd, made_dirs=made)
    _claims[real] = c
    try:
        with critical():
            for note in _recover(real):
                print(f"quenchwise: {note} (left by an interrupted run)", file=sys.stderr)
        if real.is_dir() and not overwrite and any((real / m).exists() for m in markers):
            raise _input_error(out, "a new or empty folder; add --overwrite to replace the results in it")
    except BaseException:
        release(c)
        raise
    return c


def _remove_dirs(dirs: list) -> None:
    for d in reversed(dirs):
        try:
            d.rmdir()
        except OSError:
            pass


def release(c: Claim) -> None:
    """Unlock (and remove the lock file); remove parent folders this run made if nothing was published."""
    _claims.pop(c.real, None)
    if c.fd < 0:
        return
    try:
        os.unlink(c.lock_path)    # unlink before unlocking: the next run re-checks the inode
    except OSError:
        pass
    os.close(c.fd)
    c.fd = -1
    if not c.published:
        _remove_dirs(c.made_dirs)


def release_all() -> None:
    for c in list(_claims.values()):
        release(c)


def state_note(default: str) -> str:
    """What an interrupt message should say about the results."""
    done = [str(c.out) for c in _claims.values() if c.published]
    if done:
        return f"the new results were already complete in {', '.join(done)}"
    return default


# -- the publication ---------------------------------------------------------------------------
def _manifest(folder: Path) -> dict:
    try:
        data = json.loads((folder / MANIFEST).read_text("utf-8"))
    except (OSError, ValueError):
        return {}
    if not isinstance(data, dict):
        return {}
    return {k: [n for n in v if isinstance(n, str)] for k, v in data.items() if isinstance(v, list)}


def _link_tree(src: Path, dst: Path) -> None:
    """Carry an entry of the old folder into the new one: hard links (no copy of the data)."""
    st = os.lstat(src)
    if stat.S_ISDIR(st.st_mode):
        os.mkdir(dst, stat.S_IMODE(st.st_mode) | stat.S_IWUSR | stat.S_IXUSR)
        for child in os.listdir(src):
            _link_tree(src / child, dst / child)
        os.chmod(dst, stat.S_IMODE(st.st_mode))
    elif stat.S_ISLNK(st.st_mode):
        os.symlink(os.readlink(src), dst)
    else:
        try:
            os.link(src, dst, follow_symlinks=False)
        except OSError:
            shutil.copy2(src, dst, follow_symlinks=False)


def _publish(c: Claim, staging: Path) -> list[Path]:
    """Complete the staging folder (previous unrelated files, manifest) and swap it in."""
    tag = "+".join(c.markers) or "files"
    new_names = sorted(p.name for p in staging.iterdir())
    manifest = _manifest(c.real) if c.real.is_dir() else {}
    drop = set(new_names) | set(manifest.get(tag, ())) | {MANIFEST}
    if c.real.is_dir():
        for entry in sorted(os.listdir(c.real)):
            if entry not in drop:
                fault("publish:carry")
                _link_tree(c.real / entry, staging / entry)
        os.chmod(staging, stat.S_IMODE(os.stat(c.real).st_mode))
    else:
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(staging, 0o777 & ~umask)
    manifest[tag] = new_names
    (staging / MANIFEST).write_text(json.dumps(manifest, indent=1, sort_keys=True), "utf-8")
    fault("publish:ready")
    with critical():
        if not os.path.lexists(c.real):
            os.rename(staging, c.real)
            c.published = True
            fault("publish:exchanged")
        elif _exchange(staging, c.real):
            c.published = True   # staging now holds the previous result (removed by staged())
            fault("publish:exchanged")
        else:
            old = Path(tempfile.mkdtemp(prefix=f".{c.real.name}.qw-old-", dir=c.real.parent))
            os.rename(c.real, old)      # onto the empty folder mkdtemp made
            try:
                fault("publish:moved-old")
                os.rename(staging, c.real)
            except BaseException:
                if not os.path.lexists(c.real):
                    os.rename(old, c.real)      # the previous result goes back
                raise
            c.published = True
            try:
                fault("publish:exchanged")
            finally:
                _remove_old(old)
    return [c.out / n for n in new_names]


def _remove_old(folder: Path) -> None:
    shutil.rmtree(folder, ignore_errors=True)
    if os.path.lexists(folder):
        print(f"quenchwise: the previous result could not be removed completely: {folder}", file=sys.stderr)


@contextmanager
def staged(out: Path):
    """``with staged(out) as (staging, placed): write files into staging``; on leaving the block
    the folder is published as a whole and ``placed`` lists the new files (as paths in ``out``).
    On any error or signal the staging folder is removed and ``out`` is untouched. A failure to
    write (full or read-only file system...) is an InputError on --out."""
    c = _claims.get(Path(os.path.realpath(out))) or claim(out, overwrite=True)
    try:
        staging = Path(tempfile.mkdtemp(prefix=f".{c.real.name}.qw-stage-", dir=c.real.parent))
    except OSError as exc:
        raise _input_error(c.out, f"a folder that can be written ({exc.strerror})") from None
    placed: list[Path] = []
    try:
        fault("publish:staging")
        try:
            yield staging, placed
            placed.extend(_publish(c, staging))
        except OSError as exc:
            raise _input_error(c.out, f"a folder that can be written ({exc.strerror or exc}"
                                      + (f": {exc.filename}" if exc.filename else "") + ")") from None
    finally:
        if os.path.lexists(staging):
            with critical():
                _remove_old(staging) if c.published else shutil.rmtree(staging, ignore_errors=True)
