"""`python -m quenchwise ...` runs the command line; `main` is also the `quenchwise` script.

The SIGINT / SIGTERM handlers go in before the heavy imports, so a signal during them ends with one
line and the signal's status (130 / 143) too, not a traceback or a silent exit."""

import gc
import sys

from .publish import fault, install_handlers


def main() -> None:
    install_handlers()
    # No cyclic garbage collection while about a thousand modules load (about 40 ms of every
    # command's start, benchmarks/commands.py); what they built is frozen out of later collections,
    # and the youngest generation is collected every 10 000 allocations instead of 700 (drawing a
    # figure allocates hundreds of thousands of small objects; about 30 ms more on `run`).
    gc.disable()
    try:
        fault("importing")      # tests: a signal at this instant lands in the imports below
        from .cli import entry
    except KeyboardInterrupt as exc:
        import signal

        signal.signal(signal.SIGINT, signal.SIG_IGN)
        signal.signal(signal.SIGTERM, signal.SIG_IGN)
        sys.stderr.write("quenchwise: interrupted while starting; no results were written and earlier "
                         "results are untouched\n")
        raise SystemExit(getattr(exc, "status", 130)) from None
    gc.freeze()
    gc.set_threshold(10_000, 20, 20)
    gc.enable()
    entry()


if __name__ == "__main__":
    main()
