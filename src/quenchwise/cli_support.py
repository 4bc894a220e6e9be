"""The command helper of the command line: one error / interrupt guard, the output folder's lock
and staging (publish.py), a progress bar, and the emit step (text or one JSON object).

Every command of cli.py is built from these: guard, check --out, load, solve with progress,
stage the files, emit.
"""

from __future__ import annotations

import json
import os
import signal
import sys
from contextlib import contextmanager
from pathlib import Path

import typer

from . import publish
from .cautions import CAUTION
from .errors import InputError

OUTPUT_MARKERS = ("result.h5", "profile.csv")


def _fail(message: str, code: int = 2) -> None:
    typer.echo(f"quenchwise: {message}", err=True)
    raise typer.Exit(code)


_Interrupted = publish.Interrupted   # SIGINT or SIGTERM arrived; carries the exit status


#: What the command is doing now, for the message an interrupt prints.
_doing = ["starting"]


def _activity(text: str) -> None:
    _doing[0] = text
    publish.fault(text)


_on_signal = publish.on_signal


@contextmanager
def _guard():
    """One line and a clear status for everything that ends a command early:
    bad input -> 2; solver failure -> 1; SIGINT -> 130, SIGTERM -> 143 (saying what was being done;
    results are staged, so nothing is half-written and earlier results stay); anything unexpected
    -> 1 with the exception named (QUENCHWISE_DEBUG=1 shows the traceback)."""
    from .errors import SolverError

    previous = publish.install_handlers()
    _activity("starting")
    try:
        yield
    except InputError as exc:
        _fail(str(exc))
    except SolverError as exc:
        _fail(f"solver stopped: {exc}", 1)
    except KeyboardInterrupt as exc:
        status = exc.status if isinstance(exc, _Interrupted) else 130
        for sig in publish.SIGNALS:   # a second signal must not cut the one line short
            signal.signal(sig, signal.SIG_IGN)
        _fail(f"interrupted while {_doing[0]}; " + publish.state_note(
            "no results were written and earlier results are untouched"), status)
    except (typer.Exit, typer.Abort):
        raise
    except Exception as exc:  # noqa: BLE001 - the user gets one line, not a traceback
        if os.environ.get("QUENCHWISE_DEBUG"):
            raise
        _fail(f"internal error ({type(exc).__name__}: {exc}); please report it with the case file", 1)
    finally:
        publish.release_all()
        for sig, handler in previous.items():
            signal.signal(sig, handler)


def _check_out_dir(out: Path, overwrite: bool, markers: tuple = OUTPUT_MARKERS) -> None:
    """Lock --out for this run (a second run into it: exit 2 naming the lock), clean up after killed
    runs, refuse a file or an unwritable place, and a folder that already holds this command's
    results (unless --overwrite). See publish.claim."""
    publish.claim(out, overwrite, markers)


@contextmanager
def _staged(out: Path):
    """``with _staged(out) as (staging, placed): write files into staging``; afterwards ``placed``
    lists the final paths. The folder is published as a whole (publish.staged); on any error the
    staging folder is removed and OUT is untouched."""
    with publish.staged(out) as (staging, placed):
        _activity(f"writing results (staged in {staging.name})")
        yield staging, placed


class _Progress:
    """A rich progress bar on a terminal; silent otherwise."""

    def __init__(self, enabled: bool, label: str):
        self.enabled = enabled and sys.stdout.isatty()
        self.label = label

    def __enter__(self):
        if self.enabled:
            from rich.progress import Progress
            self.bar = Progress(transient=True)
            self.bar.start()
            self.task = self.bar.add_task(self.label, total=1.0)
        return self

    def __call__(self, fraction: float) -> None:
        if self.enabled:
            self.bar.update(self.task, completed=fraction)

    def __exit__(self, *exc):
        if self.enabled:
            self.bar.stop()
        return False


def _units_option(value: str):
    from .units import Units

    return Units(value.strip().lower())


# -- the command helper: every command checks --out, loads, solves with progress, stages, emits ----
def _solve(json_out: bool, label: str, doing: str, work):
    """work(progress) under a progress bar (not with --json), saying what is being done."""
    _activity(doing)
    with _Progress(not json_out, label) as progress:
        return work(progress)


def _publish(out: Path, write) -> list[Path]:
    """write(staging) into a staging folder, published as a whole (publish.staged); the final paths."""
    with _staged(out) as (staging, files):
        write(staging)
    return files


def _write_csv(path: Path, rows: list[dict], units) -> None:
    """A table as CSV, its columns in US units with --units us."""
    from .results import write_table_csv

    write_table_csv(path, rows)
    if units.us:
        from .units import us_csv_text

        path.write_text(us_csv_text(path.read_text("utf-8")), "utf-8")


def _emit(json_out: bool, payload: dict, text: str, files: list[Path] | None = None) -> None:
    """--json: the payload (with the files and the caution) as one JSON object; else the text and
    the caution."""
    if files is not None:
        payload = {**payload, "files": [str(f) for f in files]}
    if json_out:
        typer.echo(json.dumps({**payload, "caution": CAUTION}))
    else:
        typer.echo(text + "\n\n" + CAUTION)


# -- options shared by the commands ---------------------------------------------------------------
def _json_option(what: str = "the summary"):
    return typer.Option(False, "--json", help=f"Print {what} as one JSON object, nothing else.")


def _overwrite_option(what: str = "results already in --out"):
    return typer.Option(False, "--overwrite", help=f"Replace {what}.")


def _units_choice(what: str = "the CSV"):
    return typer.Option("si", "--units", help=f"Output units: si (mm, C) or us (in, F) for the text, {what} and "
                                              "the figures; --json stays SI.")


def _figures_option():
    return typer.Option("png", "--figures", help="Figure files to write: png (the default), svg, pdf, several "
                                                 "comma-separated (png,svg,pdf), or none.")


@contextmanager
def _figures(value: str):
    """The --figures option: every figure the command writes goes out in these formats (plots.
    figure_formats); a bad value is one line, exit 2 (under _guard)."""
    from .figure_files import FIGURE_FORMATS, figure_formats

    names = list(dict.fromkeys(v.strip().lower() for v in value.split(",") if v.strip()))
    if names != ["none"] and (not names or any(n not in FIGURE_FORMATS for n in names)):
        raise InputError("--figures", value, "png, svg or pdf, several comma-separated (e.g. png,svg), or none")
    with figure_formats(() if names == ["none"] else names):
        yield


def _page(page: str) -> str:
    """The --page option: a4 or letter."""
    page = page.strip().lower()
    if page not in ("a4", "letter"):
        raise InputError("--page", page, "a4 or letter")
    return page


def _sheet_note(refined_note: str, result) -> str:
    """The sheet's numerics note, with the heat fit when the steel was fitted to its end-quench curve."""
    fit = result.extra.get("measured_jominy")
    if not fit:
        return refined_note
    from .text_output import heat_fit_line

    return f"{refined_note} Steel fitted to the heat's end-quench curve: {heat_fit_line(fit)[8:]}.".strip()


def _refined(case, fine: bool):
    """With fine: the kinetics time step limited to 1 % of a phase per step (unless the case asks
    for finer), which removes the few-tenths-HRC wiggles the default 5 % leaves in profiles."""
    from dataclasses import replace

    if not fine or case.settings.max_fraction_step <= 0.01:
        return case, ""
    return (replace(case, settings=replace(case.settings, max_fraction_step=0.01)),
            "Numerics refined for this record: at most 1 % of a phase forms per time step.")


def _quench(case, json_out: bool, doing: str):
    """One case solved with its equivalent H attached (run, sheet)."""
    from .workflows import attach_equivalent_severity, simulate_case

    def work(progress):
        result = simulate_case(case, progress)
        attach_equivalent_severity([result])
        return result

    return _solve(json_out, "quenching", doing, work)


def _run_case(case_file, quick: dict, out, overwrite: bool):
    """The case file, or a case written from the quick-run options (not both); --out is checked
    once the options are known to be consistent."""
    given = [f"--{k.replace('_mm', '').replace('_', '-')}" for k, v in quick.items() if v is not None]
    if case_file is not None and given:
        raise InputError(given[0], "(with a case file)", "either a case file or the quick-run options, not both")
    if out is not None:
        _check_out_dir(out, overwrite)
    if case_file is None:
        from .quick import quick_case

        return quick_case(**quick)
    from .case import load_case

    return load_case(case_file)


def _run_files(result, write, units):
    """The writer of `run`'s output folder: `write` for a 1-D section; for a finite part in (r, z)
    its own files (part_maps.write_part_files: result.h5 per cell, profile.csv along the mid-length
    radius, profile_axial.csv, the hardness and martensite maps)."""
    if not getattr(result, "finite", False):
        return write
    from .part_maps import write_part_files

    return lambda staging: write_part_files(result, staging, units)


def _requirement_from_options(case, min_hrc, min_martensite, depth_mm):
    from .case import parse_requirement

    if min_hrc is None and min_martensite is None:
        if depth_mm is not None and case.requirement is not None:
            from dataclasses import replace
            return replace(case.requirement, depth_mm=depth_mm)
        return case.requirement
    table = {"depth_mm": depth_mm} if depth_mm is not None else {}
    if min_hrc is not None:
        table["min_hrc"] = min_hrc
    if min_martensite is not None:
        table["min_martensite_pct"] = min_martensite
    return parse_requirement(table, section="option")


def interrupted(exc: BaseException) -> None:
    """One line and the status of the signal (130 SIGINT, 143 SIGTERM), for signals outside _guard."""
    for sig in publish.SIGNALS:
        signal.signal(sig, signal.SIG_IGN)
    sys.stderr.write(f"quenchwise: interrupted while {_doing[0]}; "
                     + publish.state_note("no results were written and earlier results are untouched") + "\n")
    raise SystemExit(getattr(exc, "status", 130)) from None


