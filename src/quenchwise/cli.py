"""Command line: one function per command, no physics here.

Bad input of any kind ends with one line on stderr (file, key, value, what is allowed) and exit
status 2; results are computed before anything is written, then published as a whole folder by
publish.py (lock per folder, staging folder, atomic swap), so existing results are never lost,
mixed or half-replaced.
"""

from __future__ import annotations

import json
import os
import signal
import sys
from contextlib import contextmanager
from pathlib import Path
from typing import Optional

import typer

from . import __version__
from . import publish
from .cautions import CAUTION
from .errors import InputError

# rich_markup_mode=None: help texts are plain text, so "[requirement]" or "[C]" is printed, not eaten as markup.
app = typer.Typer(add_completion=False, no_args_is_help=True, rich_markup_mode=None,
                  help="quenchwise: predict the hardness of a quenched steel part from surface to core.")

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
    from .thermal.solver import SolverError

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


def _summary_text(summary: dict, files: list[Path], units=None) -> str:
    from .text_output import run_summary_text

    return run_summary_text(summary, files, units)


def _units_option(value: str):
    from .units import Units

    return Units(value.strip().lower())


def _refined(case, fine: bool):
    """With fine: the kinetics time step limited to 1 % of a phase per step (unless the case asks
    for finer), which removes the few-tenths-HRC wiggles the default 5 % leaves in profiles."""
    from dataclasses import replace

    if not fine or case.settings.max_fraction_step <= 0.01:
        return case, ""
    return (replace(case, settings=replace(case.settings, max_fraction_step=0.01)),
            "Numerics refined for this record: at most 1 % of a phase forms per time step.")


@app.command()
def run(
    case_file: Optional[Path] = typer.Argument(None, help="Case file (TOML); or leave it out and give --grade, "
                                                           "a section (--bar, --plate or --sphere) and --medium."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="Folder for result.h5, profile.csv and figures "
                                                                 "(leave it out to print the summary and write nothing)."),
    json_out: bool = typer.Option(False, "--json", help="Print the summary as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
    grade: Optional[str] = typer.Option(None, "--grade", help="Quick run: a built-in grade or its EN name (no case file)."),
    bar: Optional[float] = typer.Option(None, "--bar", help="Quick run: bar diameter [mm]."),
    plate: Optional[float] = typer.Option(None, "--plate", help="Quick run: plate thickness [mm], both faces quenched."),
    sphere: Optional[float] = typer.Option(None, "--sphere", help="Quick run: sphere diameter [mm]."),
    medium: Optional[str] = typer.Option(None, "--medium", "-m", help="Quick run: quenchant name or curve CSV path."),
    austenitize_c: Optional[float] = typer.Option(None, "--austenitize-c", help="Quick run: austenitizing "
                                                  "temperature [C] (default: the grade's)."),
    units: str = typer.Option("si", "--units", help="Output units: si (mm, C) or us (in, F) for the text, the "
                                                    "CSV columns and the figures; result.h5 stays SI."),
    fine: bool = typer.Option(False, "--fine", help="Finer time steps in the kinetics (smoother profile, "
                                                    "about 2-3 times the time)."),
) -> None:
    """Simulate the quench of one part and print its hardness profile; with --out also write it."""
    with _guard():
        from .case import load_case
        from .plots import cooling_figure, hardness_figure
        from .results import profile_csv_text, write_result_h5
        from .units import us_csv_text
        from .workflows import attach_equivalent_severity, simulate_case

        u = _units_option(units)
        quick = {"grade": grade, "bar_mm": bar, "plate_mm": plate, "sphere_mm": sphere, "medium": medium,
                 "austenitize_c": austenitize_c}
        given = [f"--{k.replace('_mm', '').replace('_', '-')}" for k, v in quick.items() if v is not None]
        if case_file is not None and given:
            raise InputError(given[0], "(with a case file)", "either a case file or the quick-run options, not both")
        if out is not None:
            _check_out_dir(out, overwrite)
        if case_file is None:
            from .quick import quick_case

            case = quick_case(**quick)
        else:
            case = load_case(case_file)
        case, _ = _refined(case, fine)
        _activity(f"solving the quench of {case_file or 'the quick case'}")
        with _Progress(not json_out, "quenching") as progress:
            result = simulate_case(case, progress)
            attach_equivalent_severity([result])
        files: list[Path] = []
        if out is not None:
            with _staged(out) as (staging, files):
                write_result_h5(result, staging / "result.h5")
                text = profile_csv_text(result)
                (staging / "profile.csv").write_text(us_csv_text(text) if u.us else text, "utf-8")
                hardness_figure(result, staging, u)
                cooling_figure(result, staging, u)
        summary = result.summary()
        if json_out:
            summary["files"] = [str(f) for f in files]
            summary["caution"] = CAUTION
            typer.echo(json.dumps(summary))
        else:
            typer.echo(_summary_text(summary, files, u))


@app.command()
def steels(json_out: bool = typer.Option(False, "--json", help="Print the list as JSON.")) -> None:
    """List the built-in steel grades with their nominal chemistry."""
    from .steel.grades import grades

    table = grades()
    if json_out:
        typer.echo(json.dumps({g.name: {"family": g.family, "en": g.en, "nominal_wt_pct": g.nominal,
                                        "range_wt_pct": g.range, "austenitize_c": g.austenitize_c,
                                        "grain_size": g.grain_size, "standard": g.standard}
                               for g in table.values()}))
        return
    typer.echo(f"{'grade':<8}{'EN':<10}{'family':<30}{'C':>6}{'Mn':>6}{'Si':>6}{'Ni':>6}{'Cr':>6}{'Mo':>6}{'V':>6}{'aust C':>8}")
    for g in table.values():
        n = g.nominal
        typer.echo(f"{g.name:<8}{g.en or '-':<10}{g.family:<30}" + "".join(f"{n.get(e, 0):>6.2f}" for e in ("c", "mn", "si", "ni", "cr", "mo", "v"))
                   + f"{g.austenitize_c:>8.0f}")
    typer.echo("Nominal chemistry in wt% (midpoints of the specification ranges, recalled from SAE/EN standards: check "
               "against the current standard and the mill certificate). A grade may be given by the EN name listed "
               "here (e.g. grade = \"42CrMo4\").")


@app.callback(invoke_without_command=True)
def main(version: Optional[bool] = typer.Option(None, "--version", help="Print the version and exit.")) -> None:
    if version:
        typer.echo(f"quenchwise {__version__}")
        raise typer.Exit(0)


def _emit(json_out: bool, payload: dict, text: str) -> None:
    """--json: the payload (with the caution) as one JSON object; else the text and the caution."""
    if json_out:
        typer.echo(json.dumps({**payload, "caution": CAUTION}))
    else:
        typer.echo(text + "\n\n" + CAUTION)


def _fmt(v, pattern="{:.1f}") -> str:
    return "-" if v is None else pattern.format(v)


@app.command()
def compare(
    case_file: Path = typer.Argument(..., help="Case file (TOML)."),
    medium: list[str] = typer.Option([], "--medium", "-m", help="Quenchant name or CSV path; repeat for each."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for compare.csv and figures."),
    json_out: bool = typer.Option(False, "--json", help="Print the table as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
    units: str = typer.Option("si", "--units", help="Output units: si (mm, C) or us (in, F) for the text, "
                                                    "compare.csv and the figures; --json stays SI."),
) -> None:
    """The same part in several quenchants, solved as one batch."""
    with _guard():
        from .case import load_case
        from .plots import compare_figures
        from .results import write_table_csv
        from .thermal.quenchants import load_quenchant
        from .workflows.compare import compare as compare_media

        u = _units_option(units)
        _check_out_dir(out, overwrite, markers=("compare.csv",))
        case = load_case(case_file)
        media = [load_quenchant(m, key="--medium") for m in medium] or list(case.compare_media)
        if len(media) < 1:
            raise InputError("--medium", "(none)", "one or more quenchants (--medium NAME, or [compare] media in the case)")
        _activity(f"solving {len(media)} quenches of {case_file}")
        with _Progress(not json_out, "comparing") as progress:
            result = compare_media(case, media, progress)
        if case.requirement is None:  # nothing to meet: the table and JSON say n/a (empty) instead of false
            for r in result.rows:
                r["meets_requirement"] = None
        with _staged(out) as (staging, files):
            write_table_csv(staging / "compare.csv", result.rows)
            if u.us:
                from .units import us_csv_text

                (staging / "compare.csv").write_text(us_csv_text((staging / "compare.csv").read_text("utf-8")), "utf-8")
            compare_figures(result, staging, u)
        from .text_output import compare_text

        best = result.best()
        text = compare_text(case.title, result.rows, case.requirement.describe() if case.requirement else None, files,
                            best["medium"] if best else None,
                            bool(case.requirement and case.requirement.min_hrc), u)
        _emit(json_out, {"title": case.title, "rows": result.rows, "mildest_meeting": best["medium"] if best else None,
                         "files": [str(f) for f in files]}, text)


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


@app.command()
def size(
    case_file: Path = typer.Argument(..., help="Case file (TOML) with a [requirement], or give one below."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for sizing.json and figures."),
    min_hrc: Optional[float] = typer.Option(None, "--min-hrc", help="Required hardness, HRC."),
    min_martensite: Optional[float] = typer.Option(None, "--min-martensite", help="Required martensite, %."),
    depth_mm: Optional[float] = typer.Option(None, "--depth-mm", help="Down to this depth (default: centre)."),
    json_out: bool = typer.Option(False, "--json", help="Print the answers as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
    units: str = typer.Option("si", "--units", help="Output units: si (mm, C) or us (in, F) for the text, "
                                                    "the CSV and the figures; --json stays SI."),
) -> None:
    """Mildest severity, the quenchants that do it, and the largest section that meets a requirement."""
    with _guard():
        from .case import load_case
        from .plots import sizing_figure
        from .workflows.size import size as size_answer

        u = _units_option(units)
        _check_out_dir(out, overwrite, markers=("sizing.json",))
        case = load_case(case_file)
        req = _requirement_from_options(case, min_hrc, min_martensite, depth_mm)
        if req is not None and req.depth_mm is not None and req.depth_mm > case.section.thickness_m * 1000.0:
            raise InputError("--depth-mm", req.depth_mm, f"a depth from 0 to {case.section.thickness_m * 1000.0:g} mm")
        _activity(f"running the sizing sweeps of {case_file}")
        with _Progress(not json_out, "sizing") as progress:
            answer = size_answer(case, req, progress=progress)
        payload = {"title": case.title, **answer.as_dict()}
        with _staged(out) as (staging, files):
            (staging / "sizing.json").write_text(json.dumps(payload, indent=2), "utf-8")
            sizing_figure(answer, staging, u)
        from .text_output import SEVERITY_NOTE, size_text

        payload["severity_note"] = SEVERITY_NOTE
        text = size_text(case.title, payload, case.outer.name, files, u)
        _emit(json_out, {**payload, "files": [str(f) for f in files]}, text)


@app.command()
def band(
    case_file: Path = typer.Argument(..., help="Case file (TOML) naming a built-in grade."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for band.csv and band figure."),
    samples: int = typer.Option(200, "--samples", min=2, max=5000, help="Number of sampled heats."),
    seed: int = typer.Option(1, "--seed", help="Random seed (same seed, same answer)."),
    json_out: bool = typer.Option(False, "--json", help="Print the band summary as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
    units: str = typer.Option("si", "--units", help="Output units: si (mm, C) or us (in, F) for the text, "
                                                    "the CSV and the figures; --json stays SI."),
) -> None:
    """Hardness band over the grade's chemistry range (seeded Monte Carlo, one batch)."""
    with _guard():
        import numpy as np

        from .case import load_case
        from .plots import band_figure
        from .results import write_table_csv
        from .workflows.band import band as band_run

        u = _units_option(units)
        _check_out_dir(out, overwrite, markers=("band.csv",))
        case = load_case(case_file)
        _activity(f"solving {samples} sampled heats of {case_file}")
        with _Progress(not json_out, "sampling chemistry") as progress:
            b = band_run(case, samples, seed, progress)
        q_hv, q_hrc = b.quantiles(b.hv), b.hrc_quantiles()
        rows = [{"depth_mm": float(d), "hv_min": float(q_hv["min"][i]), "hv_median": float(q_hv["median"][i]),
                 "hv_max": float(q_hv["max"][i]), "hrc_min": float(q_hrc["min"][i]),
                 "hrc_median": float(q_hrc["median"][i]), "hrc_max": float(q_hrc["max"][i])}
                for i, d in enumerate(b.depth_mm)]
        with _staged(out) as (staging, files):
            write_table_csv(staging / "band.csv", rows)
            if u.us:
                from .units import us_csv_text

                (staging / "band.csv").write_text(us_csv_text((staging / "band.csv").read_text("utf-8")), "utf-8")
            band_figure(b, staging, u)
        share = b.share_meeting()
        surface, centre = rows[0], rows[-1]
        lines = [f"{case.title or 'case'}: {samples} heats (seed {seed}), one batch; sampled: {b.sampled}",
                 f"{'':<10}{'HRC min':>9}{'median':>9}{'max':>9}",
                 *(_band_line(label, row) for label, row in (("surface", surface), ("centre", centre)))]
        if any(not np.isfinite(r[f"hrc_{k}"]) for r in (surface, centre) for k in ("min", "median", "max")):
            lines.append("HV: below HRC 20, where the Rockwell C scale ends (ASTM E140)")
        if share is not None:
            lines.append(f"share of heats meeting '{case.requirement.describe()}': {100 * share:.1f} %")
        lines.append("wrote   " + ", ".join(str(f) for f in files))
        clean = [{k: (None if isinstance(v, float) and not np.isfinite(v) else v) for k, v in r.items()} for r in rows]
        _emit(json_out, {"title": case.title, "grade": case.grade, "samples": samples, "seed": seed,
                         "sampled": b.sampled, "measured_jominy": b.heat_fit,
                         "share_meeting_requirement": share, "profile": clean, "files": [str(f) for f in files]},
              "\n".join(lines))


def _band_line(label: str, row: dict) -> str:
    """HRC min / median / max at one position; HV where below HRC 20 (never 'nan')."""
    ks = ("min", "median", "max")
    if all(row[f"hrc_{k}"] != row[f"hrc_{k}"] for k in ks):
        return f"{label:<10}below HRC 20 for every heat ({row['hv_min']:.0f}-{row['hv_max']:.0f} HV)"
    cells = [f"{row[f'hrc_{k}']:.1f}" if row[f"hrc_{k}"] == row[f"hrc_{k}"] else f"{row[f'hv_{k}']:.0f} HV" for k in ks]
    return f"{label:<10}" + "".join(f"{c:>9}" for c in cells)


@app.command()
def sheet(
    case_file: Path = typer.Argument(..., help="Case file (TOML)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for sheet.pdf and sheet.png."),
    json_out: bool = typer.Option(False, "--json", help="Print the sheet's numbers as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
    page: str = typer.Option("a4", "--page", help="Page size: a4 or letter."),
    units: str = typer.Option("si", "--units", help="Units on the sheet: si (mm, C) or us (in, F)."),
    fine: bool = typer.Option(True, "--fine/--default-steps", help="Finer kinetics time steps for the record "
                                                                  "(default; the sheet says so)."),
) -> None:
    """A one-page hardening sheet (PDF and PNG) for the drawing or the process record; its [record]
    table fills the part, drawing, revision and sign-off fields."""
    with _guard():
        from .case import load_case
        from .report import key_numbers, sheet_rows, write_sheet
        from .workflows import attach_equivalent_severity, simulate_case

        page = page.strip().lower()
        if page not in ("a4", "letter"):
            raise InputError("--page", page, "a4 or letter")
        u = _units_option(units)
        _check_out_dir(out, overwrite, markers=("sheet.pdf",))
        case = load_case(case_file)
        case, refined_note = _refined(case, fine)
        _activity(f"solving the quench of {case_file}")
        with _Progress(not json_out, "quenching") as progress:
            result = simulate_case(case, progress)
            attach_equivalent_severity([result])
        fit = result.extra.get("measured_jominy")
        if fit:
            from .text_output import heat_fit_line

            refined_note = f"{refined_note} Steel fitted to the heat's end-quench curve: {heat_fit_line(fit)[8:]}.".strip()
        with _staged(out) as (staging, files):
            write_sheet(result, staging, page=page, units=u, refined=refined_note)
        keys = key_numbers(result)
        rows = sheet_rows(result)
        lines = [f"{case.title or 'case'}: hardening sheet",
                 f"effective depth {keys['effective_depth_mm']:g} mm to {keys['limit_hrc']:g} HRC; centre martensite "
                 f"{keys['centre_martensite_pct']:g} %; retained austenite up to {keys['max_retained_austenite_pct']:g} %"]
        if keys["requirement"]:
            lines.append(("MET: " if keys["meets_requirement"] else "NOT MET: ") + keys["requirement"])
        lines.append("wrote   " + ", ".join(str(f) for f in files))
        _emit(json_out, {"title": case.title, "record": case.record, "key_numbers": keys, "depths": rows,
                         "measured_jominy": fit, "warnings": result.warnings(), "case_sha256": case.source_sha256,
                         "files": [str(f) for f in files]}, "\n".join(lines))


def _jominy_text(summary: dict, files: list[Path]) -> str:
    s = summary
    steel = s["steel"]
    chem = ", ".join(f"{k.capitalize()} {v:g}" for k, v in steel["composition_wt_pct"].items() if v > 0)
    di = s["di"]
    lines = [f"quenchwise {__version__}  |  {s['title'] or 'end-quench test'}",
             f"steel   {steel['grade'] or 'custom'} ({chem} wt%), grain size {steel['grain_size']:g}, "
             f"austenitized at {steel['austenitize_c']:g} C",
             f"test    {s['test']['specimen']}; {s['test']['model']} model, jet peak h {s['test']['jet_htc_w_m2k']:g} W/m2K; "
             f"{s['test']['time_s']:g} s, {s['test']['steps']} steps",
             f"DI      ASTM A255 {di['a255']['in']:.2f} in ({di['a255']['mm']:.0f} mm)"
             + (f"; simulated {di['physics']['in']:.2f} in ({di['physics']['mm']:.0f} mm), ratio "
                f"{di['physics_over_a255']:.2f}" if di.get("physics") else ""),
             "",
             f"{'1/16 in':>8}{'mm':>8}{'HRC':>7}{'HV':>7}{'C/s at 700 C':>14}{'martensite %':>14}"]
    for r in s["readings"]:
        if r["sixteenths"] <= 16 or r["sixteenths"] % 4 == 0:
            lines.append(f"{r['sixteenths']:>8}{r['distance_mm']:>8.1f}{_fmt(r['hrc']):>7}{_fmt(r['hv'], '{:.0f}'):>7}"
                         f"{_fmt(r['cooling_rate_700_c_s'], '{:.3g}'):>14}{_fmt(r['martensite_pct']):>14}")
    if "band" in s:
        b = s["band"]
        lines.append(f"band    {b['inside']} of {b['of']} band rows inside: "
                     + ", ".join(f"{r['distance_mm']:g} mm {_fmt(r['hrc'])} HRC in [{_fmt(r['min_hrc'], '{:g}')}, "
                                 f"{_fmt(r['max_hrc'], '{:g}')}]{'' if r['inside'] else ' OUT'}" for r in b["rows"]))
    for w in s["warnings"]:
        lines.append(f"warning {w}")
    if files:
        lines.append("wrote   " + ", ".join(str(f) for f in files))
    return "\n".join(lines)


@app.command()
def jominy(
    case_file: Path = typer.Argument(..., help="Case file (TOML); its [steel] is tested, [part] and [quench] are not needed."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for jominy.csv and the figure."),
    band: Optional[Path] = typer.Option(None, "--band", help="Band CSV: distance_mm or distance_sixteenths, min_hrc, max_hrc."),
    rz: bool = typer.Option(False, "--rz", help="Solve the specimen in (r, z) instead of the 1-D axial model."),
    physics_di: bool = typer.Option(True, "--physics-di/--no-physics-di",
                                    help="Also find the DI by simulating bars (a few seconds more)."),
    json_out: bool = typer.Option(False, "--json", help="Print the summary as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
) -> None:
    """Simulate the end-quench (Jominy) test of the case's steel, with its ideal critical diameter."""
    with _guard():
        from .plots import jominy_figure
        from .workflows.jominy import DEFAULT_SETTINGS, RZ_SETTINGS, load_steel_case, read_band
        from .workflows.jominy import jominy as run_jominy

        _check_out_dir(out, overwrite, markers=("jominy.csv",))
        case = load_steel_case(case_file)
        rows = read_band(band) if band is not None else None
        _activity(f"solving the end-quench test of {case_file}")
        with _Progress(not json_out, "end-quench test") as progress:
            result = run_jominy([case], RZ_SETTINGS if rz else DEFAULT_SETTINGS, physics_di, progress)[0]
        with _staged(out) as (staging, files):
            (staging / "jominy.csv").write_text(result.csv_text(), "utf-8")
            jominy_figure(result, staging, rows)
        summary = result.summary(rows)
        _emit(json_out, {**summary, "files": [str(f) for f in files]}, _jominy_text(summary, files))


# -- diagram: TTT / CCT of the case's steel ------------------------------------------------------
DIAGRAM_KINDS = ("ttt", "cct")


def _diagram_text(case, summary: dict, files: list[Path]) -> str:
    s = summary
    steel = s["steel"]
    chem = ", ".join(f"{k.capitalize()} {v:g}" for k, v in steel["composition_wt_pct"].items() if v > 0)
    levels = ", ".join(f"{k} {v:.0f} C" for k, v in s["levels_c"].items())
    lines = [f"{case.title or 'case'}: {s['kind'].upper()} diagram, kinetics {s['model']}",
             f"steel   {steel['grade'] or 'custom'} ({chem} wt%), austenitized {s['austenitize_c']:g} C, "
             f"{s['austenite_carbon_wt_pct']:.2f} %C in austenite, grain size {s['grain_size']:g}",
             f"levels  {levels}  ({steel['critical_temperatures']})"]
    if s["kind"] == "ttt":
        noses = "; ".join(f"{p} {n['time_s']:.3g} s at {n['temperature_c']:.0f} C"
                          for p, n in s["noses"].items() if n is not None)
        lines.append(f"noses   {noses or 'none within 11 days'}")
        bay = s["bay"]
        lines.append("bay     " + (f"{bay['time_s']:.3g} s at {bay['temperature_c']:.0f} C (longest start between the "
                                   "upper and the bainite nose)" if bay else "none (no local maximum of the start "
                                                                               "between the noses)"))
    else:
        for family, label in (("constant_rate", "constant rates"), ("newtonian", "Newtonian, rate at 700 C")):
            c = s["critical_rates_k_s"][family]
            lines.append(f"critical ({label}): " + "; ".join(
                f"{k.replace('_', ' ')} {'-' if v is None else f'{v:.3g} K/s'}" for k, v in c.items()))
        lines.append(f"{'path':<14}{'K/s at 700':>11}{'F %':>6}{'C %':>6}{'P %':>6}{'B %':>6}{'M %':>6}{'A %':>6}"
                     f"{'HV':>7}{'HRC':>6}")
        for p in s["paths"]:
            pct = p["final_pct"]
            lines.append(f"{p['label']:<14}{p['rate_700_c_s']:>11.3g}" + "".join(
                f"{pct.get(k, 0.0):>6.0f}" for k in ("ferrite", "cementite", "pearlite", "bainite", "martensite",
                                                     "austenite"))
                + f"{_fmt(p['hv'], '{:.0f}'):>7}{_fmt(p['hrc'], '{:.0f}'):>6}")
    for w in s["warnings"]:
        lines.append(f"warning {w}")
    lines.append("wrote   " + ", ".join(str(f) for f in files))
    return "\n".join(lines)


@app.command()
def diagram(
    case_file: Path = typer.Argument(..., help="Case file (TOML): its [steel] and [transform] tables, and for "
                                               "CCT the bath temperature of its quench."),
    kind: str = typer.Option(..., "--kind", "-k", help="ttt (isothermal holds) or cct (continuous cooling)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for the figure (PNG, SVG), the curve data (CSV) "
                                                      "and the summary (JSON)."),
    json_out: bool = typer.Option(False, "--json", help="Print the summary as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace a diagram already in --out."),
) -> None:
    """TTT or CCT diagram of the case's steel with the case's kinetics model."""
    with _guard():
        from .case import load_case
        from .kinetics import MODELS, critical_temperature_note
        from .kinetics.diagrams import CRITICAL_RATE_MEANING, cct_diagram, ttt_diagram
        from .plots import cct_figure, ttt_figure
        from .results import write_table_csv
        from .steel import austenitize

        kind = kind.strip().lower()
        if kind not in DIAGRAM_KINDS:
            raise InputError("--kind", kind, "ttt or cct")
        _check_out_dir(out, overwrite, markers=(f"{kind}.csv",))
        case = load_case(case_file)
        if case.model not in MODELS:
            raise InputError("transform.model", case.model, "a kinetics model for a diagram: " + ", ".join(MODELS))
        state = austenitize(case.composition, case.austenitize_c)
        model = MODELS[case.model]()
        _activity(f"computing the {kind.upper()} diagram of {case_file}")
        if kind == "ttt":
            d = ttt_diagram(state, case.grain_size, model, martensite_law=case.martensite)
        else:
            d = cct_diagram(state, case.grain_size, model, bath_c=case.outer.bath_c, martensite_law=case.martensite)
        summary = {"title": case.title, **d.summary(),
                   "steel": {"grade": case.grade, "composition_wt_pct": case.composition.as_dict(),
                             "critical_temperatures": critical_temperature_note(case.model)},
                   "warnings": case.composition.range_warnings(case.model) + state.warnings()}
        if kind == "cct":
            summary["critical_rate_meaning"] = CRITICAL_RATE_MEANING
        with _staged(out) as (staging, files):
            write_table_csv(staging / f"{kind}.csv", d.rows())
            (staging / f"{kind}_summary.json").write_text(json.dumps({**summary, "caution": CAUTION}, indent=1),
                                                          "utf-8")
            (ttt_figure if kind == "ttt" else cct_figure)(d, staging)
        _emit(json_out, {**summary, "files": [str(f) for f in files]}, _diagram_text(case, summary, files))


# -- quenchants and probe fits -------------------------------------------------------------------
def _file_stem(name: str) -> str:
    """A file-name-safe version of a curve name."""
    import re

    return re.sub(r"[^A-Za-z0-9_.-]+", "_", name).strip("._") or "quenchant"


def _severity_row(q, s, figures: dict | None = None) -> dict:
    row = {"name": q.name, "description": q.description, "kind": q.kind, "bath_c": q.bath_c,
           "agitation": q.agitation or None, "flash_point_c": q.flash_point_c, "emissivity": q.emissivity,
           "equivalent_h_per_inch": None if s.grossmann_h != s.grossmann_h else round(s.grossmann_h, 3),
           "equivalent_htc_w_m2k": None if s.htc_w_m2k != s.htc_w_m2k else round(s.htc_w_m2k, 1),
           "centre_800_500_s": None if s.time_800_500_s != s.time_800_500_s else round(s.time_800_500_s, 2),
           "severity_note": s.note or None, "source": q.source}
    if figures is not None:
        row["probe"] = {k: (None if v != v else round(v, 2)) for k, v in figures.items()}
    return row


def _listed_severity(q):
    """Severity of a built-in curve from its listed H (no solve; centre time not listed)."""
    from .thermal.quenchants import htc_from_grossmann
    from .thermal.severity import Severity

    h = q.listed_grossmann_h
    return Severity(q.name, q.bath_c, float("nan"), float(htc_from_grossmann(h)), float(h))


PROBE_NOTE = ("probe: ISO 9950 type probe (12.5 mm alloy 600, from 850 C, centre), 1-D model (thermal/probe.py): "
              "max cooling rate K/s at centre temperature C, rate at 300 C, times to 600/400/200 C")


@app.command()
def quenchants(
    name: Optional[str] = typer.Argument(None, help="A built-in curve name or a curve CSV path: show that one."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="With NAME: folder for its table (CSV) and the "
                                       "figure (h(T), probe cooling curve and cooling-rate curve)."),
    json_out: bool = typer.Option(False, "--json", help="Print the list (or the one curve) as one JSON object."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace a table already in --out."),
) -> None:
    """List the built-in quenchants with bath, agitation, flash point, ISO 9950 probe figures and
    equivalent Grossmann H; or show one curve (NAME), and with --out write its table and figure."""
    with _guard():
        from .thermal.probe import probe_cooling, probe_figures
        from .thermal.quenchants import builtin_quenchants, load_quenchant, quenchant_csv_text
        from .thermal.severity import DEFINITION, equivalent_severities

        if name is None:
            if out is not None:
                raise InputError("--out", str(out), "only together with a curve NAME")
            media = builtin_quenchants()
            # Built-ins list their probe figures and H (computed once, thermal/quenchant_model.py).
            todo = [q for q in media if q.listed_grossmann_h is None]
            computed = dict(zip((q.name for q in todo), equivalent_severities(todo))) if todo else {}
            rows = [_severity_row(q, computed.get(q.name) or _listed_severity(q), q.listed_probe or probe_figures(q))
                    for q in media]
            lines = [f"{'name':<30}{'bath C':>7}  {'agitation':<9}{'flash C':>8}  {'max K/s':>7}{'at C':>6}"
                     f"{'@300':>6}{'t600':>6}{'t400':>6}{'t200':>6}{'H 1/in':>8}  kind"]
            for r in rows:
                p = r["probe"]
                lines.append(f"{r['name']:<30}{r['bath_c']:>7g}  {r['agitation'] or '-':<9}"
                             f"{_fmt(r['flash_point_c'], '{:.0f}'):>8}  {_fmt(p['max_rate_k_s'], '{:.0f}'):>7}"
                             f"{_fmt(p['t_max_rate_c'], '{:.0f}'):>6}{_fmt(p['rate_300_k_s'], '{:.0f}'):>6}"
                             f"{_fmt(p['time_600_s'], '{:.1f}'):>6}{_fmt(p['time_400_s'], '{:.1f}'):>6}"
                             f"{_fmt(p['time_200_s'], '{:.0f}'):>6}{_fmt(r['equivalent_h_per_inch'], '{:.2f}'):>8}  {r['kind']}")
            lines += [PROBE_NOTE + ".",
                      f"H: equivalent Grossmann severity, derived from the curve: {DEFINITION}.",
                      "Liquid curves: presets of the three-stage model set to published probe figures (not measured "
                      "data; sources in quenchant_data/probe_targets.csv); a case can ask for any bath, flow and "
                      "concentration with [quench] kind / agitation / concentration_pct. Fit your own bath with "
                      "`quenchwise probe`. Flash points are illustrative: use your oil's data sheet."]
            _emit(json_out, {"severity_definition": DEFINITION, "probe_definition": PROBE_NOTE, "quenchants": rows},
                  "\n".join(lines))
            return
        q = load_quenchant(name, Path.cwd(), key="NAME")
        stem = _file_stem(q.name)
        if out is not None:
            _check_out_dir(out, overwrite, markers=(f"{stem}.csv",))
        [s] = [_listed_severity(q)] if q.listed_grossmann_h is not None else equivalent_severities([q])
        t_probe, c_probe = probe_cooling(q)
        from .thermal.probe import cooling_curve_figures

        figures = q.listed_probe or cooling_curve_figures(t_probe, c_probe)
        row = _severity_row(q, s, figures)
        files: list[Path] = []
        if out is not None:
            from .quenchant_figures import quenchant_figure

            with _staged(out) as (staging, files):
                (staging / f"{stem}.csv").write_text(quenchant_csv_text(q), "utf-8")
                quenchant_figure(q, s, staging, f"{stem}_htc", probe=(t_probe, c_probe, figures))
        p = row["probe"]
        lines = [f"{q.name}" + (f": {q.description}" if q.description else ""),
                 f"kind {q.kind}, bath {q.bath_c:g} C, agitation {q.agitation or '-'}, flash point "
                 f"{_fmt(q.flash_point_c, '{:.0f} C')}" + (f", emissivity {q.emissivity:g} (radiation added)" if q.emissivity else ""),
                 f"probe   max {_fmt(p['max_rate_k_s'], '{:.0f} K/s')} at {_fmt(p['t_max_rate_c'], '{:.0f} C')}, "
                 f"{_fmt(p['rate_300_k_s'], '{:.1f} K/s')} at 300 C; to 600 / 400 / 200 C in "
                 f"{_fmt(p['time_600_s'], '{:.1f}')} / {_fmt(p['time_400_s'], '{:.1f}')} / {_fmt(p['time_200_s'], '{:.1f}')} s"
                 " (ISO 9950 type probe, 1-D model)",
                 f"equivalent H {_fmt(row['equivalent_h_per_inch'], '{:.2f} 1/in')} "
                 f"(h {_fmt(row['equivalent_htc_w_m2k'], '{:.0f} W/m2K')}; {DEFINITION})" + (f"; {s.note}" if s.note else ""),
                 f"source  {q.source or 'not given'}"]
        if out is None:
            lines += ["surface_c  htc_w_m2k"] + [f"{t:>9g}  {h:>9g}" for t, h in zip(q.surface_c, q.htc_w_m2k)]
        else:
            lines.append("wrote   " + ", ".join(str(f) for f in files))
        payload = {**row, "severity_definition": DEFINITION, "probe_definition": PROBE_NOTE,
                   "table": {"surface_c": q.surface_c.tolist(), "htc_w_m2k": q.htc_w_m2k.tolist()},
                   "files": [str(f) for f in files]}
        _emit(json_out, payload, "\n".join(lines))


@app.command()
def probe(
    curve: Path = typer.Argument(..., help="Probe record CSV: header with time_s and temperature_c (centre of an "
                                           "ISO 9950 type 12.5 mm alloy 600 probe)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for quenchant.csv, probe_fit.csv and the figure."),
    bath_c: Optional[float] = typer.Option(None, "--bath-c", help="Bath temperature [C] (else a '# bath_c:' line in the record)."),
    name: Optional[str] = typer.Option(None, "--name", help="Name of the fitted curve (default: from the record)."),
    future_s: Optional[float] = typer.Option(None, "--future-s", help="Future window of the inversion [s] "
                                             "(default: chosen from the record's noise)."),
    tc_time_constant: float = typer.Option(0.0, "--tc-time-constant", help="Thermocouple time constant [s] to "
                                           "remove from the record (first-order lag; 0: none)."),
    no_end_correction: bool = typer.Option(False, "--no-end-correction", help="Skip the correction for the "
                                           "probe's end faces (1-D reading only)."),
    json_out: bool = typer.Option(False, "--json", help="Print the summary as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace a fit already in --out."),
) -> None:
    """Fit h(T_surface) of a bath from a cooling-curve probe record (inverse conduction) and write it
    as a quenchant CSV that `run` accepts in [quench] medium."""
    with _guard():
        import csv as _csv
        import io as _io

        from .quenchant_figures import probe_figure
        from .thermal.probe import fit_probe, read_probe_curve
        from .thermal.quenchants import quenchant_csv_text
        from .thermal.severity import DEFINITION, equivalent_severities

        _check_out_dir(out, overwrite, markers=("quenchant.csv", "probe_fit.csv"))
        record = read_probe_curve(curve)
        if bath_c is None:
            if "bath_c" not in record.meta:
                raise InputError("--bath-c", "(missing)", "the bath temperature in C (option --bath-c, or a "
                                 "'# bath_c: ...' line in the record)")
            try:
                bath_c = float(record.meta["bath_c"])
            except ValueError:
                raise InputError("# bath_c", record.meta["bath_c"], "a number (C)", source=str(curve)) from None
        if not (-20.0 <= bath_c <= 300.0) or bath_c != bath_c:
            raise InputError("--bath-c", bath_c, "a number from -20 to 300 (C)")
        if bath_c > float(record.temperature_c.min()) + 5.0:
            raise InputError("--bath-c", bath_c, f"a bath not above the coolest measured temperature "
                             f"({record.temperature_c.min():g} C)")
        if future_s is not None and not (0.05 <= future_s <= 10.0):
            raise InputError("--future-s", future_s, "a number from 0.05 to 10 (s)")
        if not (0.0 <= tc_time_constant <= 2.0):
            raise InputError("--tc-time-constant", tc_time_constant, "a number from 0 to 2 (s)")
        _activity(f"fitting the probe record {curve}")
        q, fit = fit_probe(record, bath_c, name=name or f"{_file_stem(record.name)}_fit", future_s=future_s,
                           end_correction=not no_end_correction, tc_time_constant_s=tc_time_constant)
        [s] = equivalent_severities([q])
        table = _io.StringIO()
        w = _csv.writer(table, lineterminator="\n")
        w.writerow(["time_s", "measured_c", "refit_c", "surface_c", "flux_w_m2", "htc_w_m2k"])
        for row in zip(fit.time_s, fit.measured_c, fit.refit_c, fit.surface_c, fit.flux_w_m2, fit.htc_w_m2k):
            w.writerow([f"{row[0]:.4f}", f"{row[1]:.2f}", f"{row[2]:.2f}", f"{row[3]:.2f}", f"{row[4]:.1f}",
                        "" if row[5] != row[5] else f"{row[5]:.1f}"])
        with _staged(out) as (staging, files):
            (staging / "quenchant.csv").write_text(quenchant_csv_text(q), "utf-8")
            (staging / "probe_fit.csv").write_text(table.getvalue(), "utf-8")
            probe_figure(fit, q, staging)
        summary = {"name": q.name, "record": str(curve), "samples": int(record.time_s.size), "bath_c": bath_c,
                   "method": "Beck's sequential function specification, 1-D alloy 600 cylinder 12.5 mm",
                   "time_step_s": round(fit.dt_s, 6), "future_steps": fit.future_steps, "regularization": fit.regularization,
                   "noise_k": None if fit.noise_k != fit.noise_k else round(fit.noise_k, 3),
                   "refit_rms_k": round(fit.rms_k, 2), "refit_max_k": round(fit.max_k, 2),
                   "surface_range_c": [float(q.surface_c[0]), float(q.surface_c[-1])],
                   "equivalent_h_per_inch": None if s.grossmann_h != s.grossmann_h else round(s.grossmann_h, 3),
                   "tc_time_constant_s": fit.tc_time_constant_s, "end_correction": not no_end_correction,
                   "warnings": list(fit.warnings),
                   "severity_definition": DEFINITION, "files": [str(f) for f in files]}
        lines = [f"probe fit {q.name}: {record.time_s.size} samples from {curve}, bath {bath_c:g} C",
                 f"method  Beck's sequential function specification on a 1-D alloy 600 cylinder (12.5 mm), "
                 f"{fit.future_steps} future steps of {fit.dt_s:.4g} s" + (f" (noise {fit.noise_k:.2f} K)" if fit.noise_k == fit.noise_k else "")
                 + (f"; end faces corrected (up to {fit.end_correction_k:.1f} K)" if fit.end_correction_k else ""),
                 f"refit   RMS {fit.rms_k:.2f} K, max {fit.max_k:.2f} K (measured centre vs the fitted curve run forward)",
                 f"curve   surface {q.surface_c[0]:.0f}-{q.surface_c[-1]:.0f} C (held constant beyond), peak h "
                 f"{q.htc_w_m2k.max():.0f} W/m2K at {q.surface_c[int(q.htc_w_m2k.argmax())]:.0f} C; equivalent H "
                 f"{_fmt(summary['equivalent_h_per_inch'], '{:.2f} 1/in')}",
                 f"use     [quench] medium = \"{out / 'quenchant.csv'}\"",
                 "wrote   " + ", ".join(str(f) for f in files)] + [f"warning {w}" for w in fit.warnings]
        _emit(json_out, summary, "\n".join(line for line in lines if line))


@app.command("fit-tank")
def fit_tank(
    case_file: Path = typer.Argument(..., help="Case file (TOML) of the part, its steel and the tank's medium as best known."),
    traverse: Path = typer.Argument(..., help="Hardness traverse CSV of a cut section: depth_mm,hrc (optional hrb column)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for quenchant.csv, tank_fit.csv and the figure."),
    json_out: bool = typer.Option(False, "--json", help="Print the summary as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace a fit already in --out."),
) -> None:
    """Fit the tank's effective severity (a factor on the case's h(T)) to a measured hardness
    traverse and write it as a quenchant CSV that `run` accepts in [quench] medium."""
    with _guard():
        from .case import load_case
        from .results import write_table_csv
        from .tank_figures import tank_fit_figure
        from .text_output import tank_fit_text
        from .thermal.quenchants import quenchant_csv_text
        from .thermal.severity import equivalent_severities
        from .measured import read_traverse
        from .workflows.tank_fit import fit_tank as run_fit

        _check_out_dir(out, overwrite, markers=("quenchant.csv", "tank_fit.csv"))
        case = load_case(case_file)
        curve = read_traverse(traverse)
        _activity(f"fitting the tank's severity to {traverse}")
        fit = run_fit(case, curve)
        [sev] = equivalent_severities([fit.quenchant])
        with _staged(out) as (staging, files):
            (staging / "quenchant.csv").write_text(quenchant_csv_text(fit.quenchant), "utf-8")
            write_table_csv(staging / "tank_fit.csv", fit.rows())
            tank_fit_figure(fit, staging)
        summary = {**fit.summary(), "equivalent_h_per_inch": None if sev.grossmann_h != sev.grossmann_h
                   else round(sev.grossmann_h, 3), "files": [str(f) for f in files]}
        if json_out:
            summary["caution"] = CAUTION
        _emit(json_out, summary, tank_fit_text(summary, str(out / "quenchant.csv")))


def entry() -> None:
    """The `quenchwise` console script: the typer app, with every usage error (unknown option, bad
    or missing value) as one line on stderr and exit status 2, like bad input in a case file."""
    try:  # recent typer carries its own copy of click
        from typer._click import exceptions as click_errors
    except ImportError:  # pragma: no cover - older typer on top of click
        from click import exceptions as click_errors

    command = typer.main.get_command(app)
    publish.install_handlers()   # until the process ends, not only inside a command
    try:
        status = command.main(prog_name="quenchwise", standalone_mode=False)
    except click_errors.NoArgsIsHelpError as exc:
        typer.echo(exc.ctx.get_help())
        raise SystemExit(0) from None
    except click_errors.UsageError as exc:
        where = exc.ctx.command_path if exc.ctx is not None else "quenchwise"
        message = " ".join(exc.format_message().split())
        typer.echo(f"{where}: {message} (see '{where} --help')", err=True)
        raise SystemExit(2) from None
    except click_errors.ClickException as exc:
        typer.echo(f"quenchwise: {' '.join(exc.format_message().split())}", err=True)
        raise SystemExit(exc.exit_code) from None
    except typer.Abort as exc:
        if isinstance(exc.__cause__, KeyboardInterrupt):   # click turns a signal outside _guard into Abort
            interrupted(exc.__cause__)
        typer.echo("quenchwise: aborted", err=True)
        raise SystemExit(130) from None
    except KeyboardInterrupt as exc:   # a signal outside a command's guard (option parsing, the end)
        interrupted(exc)
    raise SystemExit(status if isinstance(status, int) else 0)


def interrupted(exc: BaseException) -> None:
    """One line and the status of the signal (130 SIGINT, 143 SIGTERM), for signals outside _guard."""
    for sig in publish.SIGNALS:
        signal.signal(sig, signal.SIG_IGN)
    sys.stderr.write(f"quenchwise: interrupted while {_doing[0]}; "
                     + publish.state_note("no results were written and earlier results are untouched") + "\n")
    raise SystemExit(getattr(exc, "status", 130)) from None


if __name__ == "__main__":  # pragma: no cover
    entry()
