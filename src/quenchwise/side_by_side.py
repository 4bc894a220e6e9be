"""Independent pieces of output work (figures, data files) done in two processes at once.

Drawing a figure with matplotlib's Agg backend is pure-Python work under the interpreter lock, so
threads do not overlap it; a forked process does. After the solve, `run` draws one figure in a
forked child while this process writes the other figure and the data files: on two cores that
takes the figures' 0.2 s to about 0.1 s (benchmarks/commands.py). The child writes only into the
staging folder the parent publishes, so the staging rule holds: nothing is published unless every
piece succeeded.

Falls back to doing the work here, one piece after another, off Linux (Windows has no fork; on
macOS a forked child must not touch the system frameworks numpy's BLAS may use, which is why
Python's multiprocessing stopped forking there), where this process runs threads (fork would copy
held locks), on one core, or with QUENCHWISE_SERIAL=1.
"""

from __future__ import annotations

import os
import pickle
import signal
import sys
import threading

from .publish import fault


def _can_fork() -> bool:
    return (sys.platform.startswith("linux") and (os.cpu_count() or 1) > 1 and threading.active_count() == 1
            and not os.environ.get("QUENCHWISE_SERIAL"))


def run_side_by_side(tasks) -> None:
    """Call every zero-argument callable of ``tasks``: the first half in one forked child process,
    the rest here (two cores: the work parts in two). Returns when all are done; an exception in
    the child is raised here again (its type and message, pickled back through a pipe) after the
    child has ended. If this process fails or is interrupted, the child is killed.

    >>> out = []
    >>> run_side_by_side([lambda: None, lambda: out.append("here")])
    >>> out
    ['here']
    """
    tasks = list(tasks)
    if len(tasks) < 2 or not _can_fork():
        for task in tasks:
            task()
        return
    aside, here = tasks[: len(tasks) // 2], tasks[len(tasks) // 2:]
    child = _fork(aside)
    try:
        for task in here:
            task()
    except BaseException:
        _kill(child)
        raise
    _join(child)


def _fork(tasks):
    read_fd, write_fd = os.pipe()
    pid = os.fork()
    if pid == 0:   # the child: its own default signal handling, no cleanup of the parent's state
        status = 0
        try:
            os.close(read_fd)
            for sig in (signal.SIGINT, signal.SIGTERM):
                signal.signal(sig, signal.SIG_DFL)
            fault("side process")   # tests: a signal that ends only the child
            for task in tasks:
                task()
        except BaseException as exc:  # noqa: BLE001 - handed to the parent, which reports it
            status = 1
            text = f"{type(exc).__name__}: {exc}"
            try:
                payload = pickle.dumps((pickle.dumps(exc), text))
            except Exception:  # noqa: BLE001 - an unpicklable exception still reaches the parent
                payload = pickle.dumps((None, text))
            with os.fdopen(write_fd, "wb") as pipe:
                pipe.write(payload)
        os._exit(status)
    os.close(write_fd)
    return pid, read_fd


def _join(child) -> None:
    pid, read_fd = child
    with os.fdopen(read_fd, "rb") as pipe:
        payload = pipe.read()      # returns when the child has closed its end (ended)
    _, status = os.waitpid(pid, 0)
    if payload:
        raise _exception(*pickle.loads(payload))
    code = os.waitstatus_to_exitcode(status)
    if code != 0:
        how = f"signal {-code}" if code < 0 else f"status {code}"
        raise RuntimeError(f"the second process drawing the figures ended by {how}")


def _exception(pickled, text: str) -> BaseException:
    """The child's exception as it was raised there, or a RuntimeError with its text where it does
    not survive the trip (an exception class whose constructor needs other arguments)."""
    try:
        exc = pickle.loads(pickled) if pickled is not None else None
    except Exception:  # noqa: BLE001
        exc = None
    return exc if isinstance(exc, BaseException) else RuntimeError(text)


def _kill(child) -> None:
    pid, read_fd = child
    try:
        os.kill(pid, signal.SIGKILL)
        os.waitpid(pid, 0)
    except (ProcessLookupError, ChildProcessError):
        pass
    os.close(read_fd)
