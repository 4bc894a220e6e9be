"""Command line: one function per command, no physics here.

Bad input of any kind ends with one line on stderr (file, key, value, what is allowed) and exit
status 2; results are computed before anything is written, then put in place file by file with
atomic renames, so existing results are never lost or half-replaced.
"""

from __future__ import annotations

import json
import os
import shutil
import signal
import sys
import tempfile
from contextlib import contextmanager
from pathlib import Path
from typing import Optional

import typer

from . import __version__
from .cautions import CAUTION
from .errors import InputError

app = typer.Typer(add_completion=False, no_args_is_help=True,
                  help="quenchwise: predict the hardness of a quenched steel part from surface to core.")

OUTPUT_MARKERS = ("result.h5", "profile.csv")


def _fail(message: str, code: int = 2) -> None:
    typer.echo(f"quenchwise: {message}", err=True)
    raise typer.Exit(code)


class _Interrupted(KeyboardInterrupt):
    """SIGINT or SIGTERM arrived; carries the exit status (128 + signal number)."""

    def __init__(self, status: int):
        super().__init__(status)
        self.status = status


#: What the command is doing now, for the message an interrupt prints.
_doing = ["starting"]


def _activity(text: str) -> None:
    _doing[0] = text


def _on_signal(signum, _frame):
    raise _Interrupted(128 + signum)


@contextmanager
def _guard():
    """One line and a clear status for everything that ends a command early:
    bad input -> 2; solver failure -> 1; SIGINT -> 130, SIGTERM -> 143 (saying what was being done;
    results are staged, so nothing is half-written and earlier results stay); anything unexpected
    -> 1 with the exception named (QUENCHWISE_DEBUG=1 shows the traceback)."""
    from .thermal.solver import SolverError

    previous = {sig: signal.getsignal(sig) for sig in (signal.SIGINT, signal.SIGTERM)}
    for sig in previous:
        signal.signal(sig, _on_signal)
    _activity("starting")
    try:
        yield
    except InputError as exc:
        _fail(str(exc))
    except SolverError as exc:
        _fail(f"solver stopped: {exc}", 1)
    except KeyboardInterrupt as exc:
        status = exc.status if isinstance(exc, _Interrupted) else 130
        _fail(f"interrupted while {_doing[0]}; no results were written and earlier results are untouched", status)
    except (typer.Exit, typer.Abort):
        raise
    except Exception as exc:  # noqa: BLE001 - the user gets one line, not a traceback
        if os.environ.get("QUENCHWISE_DEBUG"):
            raise
        _fail(f"internal error ({type(exc).__name__}: {exc}); please report it with the case file", 1)
    finally:
        for sig, handler in previous.items():
            signal.signal(sig, handler)


def _check_out_dir(out: Path, overwrite: bool, markers: tuple = OUTPUT_MARKERS) -> None:
    """Refuse a file as --out, and a folder that already holds this command's results (unless
    --overwrite)."""
    if out.exists() and not out.is_dir():
        raise InputError("--out", str(out), "a folder path (this is a file)")
    if out.is_dir() and not overwrite and any((out / m).exists() for m in markers):
        raise InputError("--out", str(out), "a new or empty folder; add --overwrite to replace the results in it")


@contextmanager
def _staged(out: Path):
    """A staging folder beside OUT; on success its files move into OUT one atomic rename each.

    Usage: ``with _staged(out) as (staging, placed): write files into staging``; afterwards
    ``placed`` lists the final paths. On any error the staging folder is removed and OUT is
    untouched.
    """
    out.parent.mkdir(parents=True, exist_ok=True)
    staging = Path(tempfile.mkdtemp(prefix=f".{out.name}.", dir=out.parent))
    placed: list[Path] = []
    try:
        _activity(f"writing results (staged in {staging.name})")
        yield staging, placed
        # No signal may split the move: block them until every file is in place.
        signal.pthread_sigmask(signal.SIG_BLOCK, {signal.SIGINT, signal.SIGTERM})
        try:
            placed.extend(_publish(staging, out))
        finally:
            signal.pthread_sigmask(signal.SIG_UNBLOCK, {signal.SIGINT, signal.SIGTERM})
    finally:
        shutil.rmtree(staging, ignore_errors=True)


def _publish(staging: Path, out: Path) -> list[Path]:
    """Move finished files from the staging folder into out, each by an atomic rename."""
    out.mkdir(parents=True, exist_ok=True)
    placed = []
    for f in sorted(staging.iterdir()):
        target = out / f.name
        f.replace(target)
        placed.append(target)
    return placed


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


def _summary_text(summary: dict, files: list[Path]) -> str:
    s = summary
    steel = s["steel"]
    chem = ", ".join(f"{k.capitalize()} {v:g}" for k, v in steel["composition_wt_pct"].items() if v > 0)
    lines = [
        f"quenchwise {__version__}  |  {s['title'] or 'untitled case'}",
        f"steel   {steel['grade'] or 'custom'} ({chem} wt%), grain size {steel['grain_size']:g}, "
        f"austenitized at {steel['austenitize_c']:g} C",
        f"        Ae1 {steel['ae1_c']:.0f} C, Ae3 {steel['ae3_c']:.0f} C"
        + (f", Acm {steel['acm_c']:.0f} C" if steel["acm_c"] else "")
        + (f", Ms {steel['ms_c']:.0f} C" if steel["ms_c"] is not None else "")
        + f"  ({steel['critical_temperatures']})",
        f"part    {s['part']['shape']} " + ", ".join(f"{k} {v}" for k, v in s["part"].items() if k != "shape"),
        f"quench  {s['quench']['outer']} at {s['quench']['bath_c']:g} C"
        + (f" (equivalent Grossmann H {s['quench']['equivalent_h_per_inch']:.2f} 1/in)"
           if s["quench"].get("equivalent_h_per_inch") is not None else "")
        + (f"; bore: {s['quench']['inner']}" if s["quench"]["inner"] else "")
        + f"; until the hottest point is below {s['quench']['end_c']:g} C ({s['time_to_end_s']:.1f} s, {s['steps']} steps)",
        "",
        f"{'location':<20}{'depth mm':>9}{'HRC':>7}{'HV':>7}{'martensite %':>14}{'bainite %':>11}{'ferr+pearl %':>14}{'ret. aust %':>13}{'Jominy mm':>11}",
    ]
    for p in s["points"]:
        hrc = "-" if p["hrc"] is None else f"{p['hrc']:.1f}"
        hv = "-" if p["hv"] is None else f"{p['hv']:.0f}"
        lines.append(f"{p['location']:<20}{p['depth_mm']:>9.2f}{hrc:>7}{hv:>7}{p['martensite_pct']:>14.1f}"
                     f"{p['bainite_pct']:>11.1f}{p['ferrite_pearlite_pct']:>14.1f}{p['retained_austenite_pct']:>13.1f}"
                     f"{_fmt(p.get('jominy_distance_mm'), '{:.1f}'):>11}")
    if "temper" in s:
        t = s["temper"]
        lines.append(f"temper  {t['hours']:g} h at {t['temperature_c']:g} C: " + ", ".join(
            f"{p['location']} " + (f"{p['hrc_tempered']:.1f} HRC" if p.get("hrc_tempered") is not None
                                   else f"{_fmt(p.get('hrb_tempered'))} HRB") + f" ({_fmt(p.get('hv_tempered'), '{:.0f}')} HV)"
            for p in s["points"]) + f"  ({t['method']})")
    if "di" in s:
        lines.append(f"DI      {s['di']['a255']['in']:.2f} in ({s['di']['a255']['mm']:.0f} mm) from composition, "
                     "ASTM A255; the simulated DI: quenchwise jominy")
    lines.append(f"models  kinetics {s['models']['kinetics']}, martensite {s['models']['martensite']}, "
                 f"hardness {s['models']['hardness']}")
    for w in s["warnings"]:
        lines.append(f"warning {w}")
    if files:
        lines.append("wrote   " + ", ".join(str(f) for f in files))
    lines.append("")
    lines.append(CAUTION)
    return "\n".join(lines)


@app.command()
def run(
    case_file: Path = typer.Argument(..., help="Case file (TOML)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for result.h5, profile.csv and figures."),
    json_out: bool = typer.Option(False, "--json", help="Print the summary as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
) -> None:
    """Simulate the quench of one part and write its hardness profile."""
    with _guard():
        from .case import load_case
        from .plots import cooling_figure, hardness_figure
        from .results import write_profile_csv, write_result_h5
        from .workflows import attach_equivalent_severity, simulate_case

        _check_out_dir(out, overwrite)
        case = load_case(case_file)
        _activity(f"solving the quench of {case_file}")
        with _Progress(not json_out, "quenching") as progress:
            result = simulate_case(case, progress)
            attach_equivalent_severity([result])
        with _staged(out) as (staging, files):
            write_result_h5(result, staging / "result.h5")
            write_profile_csv(result, staging / "profile.csv")
            hardness_figure(result, staging)
            cooling_figure(result, staging)
        summary = result.summary()
        if json_out:
            summary["files"] = [str(f) for f in files]
            summary["caution"] = CAUTION
            typer.echo(json.dumps(summary))
        else:
            typer.echo(_summary_text(summary, files))


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
               "against the current standard and the mill certificate).")


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
) -> None:
    """The same part in several quenchants, solved as one batch."""
    with _guard():
        from .case import load_case
        from .plots import compare_figures
        from .results import write_table_csv
        from .thermal.quenchants import load_quenchant
        from .workflows.compare import compare as compare_media

        _check_out_dir(out, overwrite, markers=("compare.csv",))
        case = load_case(case_file)
        media = [load_quenchant(m, key="--medium") for m in medium] or list(case.compare_media)
        if len(media) < 1:
            raise InputError("--medium", "(none)", "one or more quenchants (--medium NAME, or [compare] media in the case)")
        _activity(f"solving {len(media)} quenches of {case_file}")
        with _Progress(not json_out, "comparing") as progress:
            result = compare_media(case, media, progress)
        with _staged(out) as (staging, files):
            write_table_csv(staging / "compare.csv", result.rows)
            compare_figures(result, staging)
        best = result.best()
        lines = [f"{case.title or 'case'}: {len(media)} quenchants, one batch",
                 f"{'medium':<30}{'H 1/in':>8}{'surf HRC':>10}{'half HRC':>10}{'ctr HRC':>9}{'ctr M %':>9}"
                 f"{'eff. depth mm':>15}{'meets':>7}  crack risk"]
        for r in result.rows:
            lines.append(f"{r['medium']:<30}{_fmt(r['equivalent_h'], '{:.2f}'):>8}{_fmt(r['surface_hrc']):>10}"
                         f"{_fmt(r['half_hrc']):>10}{_fmt(r['centre_hrc']):>9}{r['centre_martensite_pct']:>9.1f}"
                         f"{r['effective_depth_mm']:>15.2f}{('yes' if r['meets_requirement'] else 'no'):>7}  {r['crack_risk']}")
        lines.append(f"effective depth: to {result.rows[0]['limit_hrc']:g} HRC "
                     + ("(the requirement)" if case.requirement and case.requirement.min_hrc else "(50 % martensite, Hodge & Orehoski)"))
        if case.requirement is not None:
            lines.append(f"requirement: {case.requirement.describe()}; mildest that meets it: "
                         + (best["medium"] if best else "none of these"))
        lines.append("crack risk: common-practice rule on austenite carbon and severity (see workflows/compare.py)")
        lines.append("wrote   " + ", ".join(str(f) for f in files))
        _emit(json_out, {"title": case.title, "rows": result.rows, "mildest_meeting": best["medium"] if best else None,
                         "files": [str(f) for f in files]}, "\n".join(lines))


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
) -> None:
    """Mildest severity, the quenchants that do it, and the largest section that meets a requirement."""
    with _guard():
        from .case import load_case
        from .plots import sizing_figure
        from .workflows.size import size as size_answer

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
            sizing_figure(answer, staging)
        d = payload
        sev, big = d["mildest_severity"], d["largest_size"]
        lines = [f"{case.title or 'case'}: {d['requirement']}",
                 ("mildest constant severity: H = {:.3g} 1/in (h = {:.0f} W/m2K); H = {:.3g} does not meet it".format(
                     sev["grossmann_h_per_inch"], sev["htc_w_m2k"], sev["next_milder_h_per_inch"])
                  if sev["reachable"] and sev["next_milder_h_per_inch"] is not None else
                  ("met even by the mildest severity tried" if sev["reachable"] else
                   "not reachable by quench severity alone: choose a more hardenable steel or a smaller section")),
                 "built-in quenchants that meet it, mildest first: " + (", ".join(d["quenchants_meeting"]) or "none"),
                 (f"largest {big['dimension']} in {case.outer.name}: {big['largest_passing_mm']:g} mm "
                  + (f"({big['next_larger_failing_mm']:g} mm does not meet it)" if big["next_larger_failing_mm"] else "(largest tried)")
                  if big["largest_passing_mm"] is not None else f"no {big['dimension']} tried meets it in {case.outer.name}")
                 + f"; this part: {big['case_size_mm']:g} mm",
                 "wrote   " + ", ".join(str(f) for f in files)]
        _emit(json_out, {**payload, "files": [str(f) for f in files]}, "\n".join(lines))


@app.command()
def band(
    case_file: Path = typer.Argument(..., help="Case file (TOML) naming a built-in grade."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for band.csv and band figure."),
    samples: int = typer.Option(200, "--samples", min=2, max=5000, help="Number of sampled heats."),
    seed: int = typer.Option(1, "--seed", help="Random seed (same seed, same answer)."),
    json_out: bool = typer.Option(False, "--json", help="Print the band summary as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
) -> None:
    """Hardness band over the grade's chemistry range (seeded Monte Carlo, one batch)."""
    with _guard():
        import numpy as np

        from .case import load_case
        from .plots import band_figure
        from .results import write_table_csv
        from .workflows.band import band as band_run

        _check_out_dir(out, overwrite, markers=("band.csv",))
        case = load_case(case_file)
        _activity(f"solving {samples} sampled heats of {case_file}")
        with _Progress(not json_out, "sampling chemistry") as progress:
            b = band_run(case, samples, seed, progress)
        q_hv, q_hrc = b.quantiles(b.hv), b.quantiles(b.hrc)
        rows = [{"depth_mm": float(d), "hv_min": float(q_hv["min"][i]), "hv_median": float(q_hv["median"][i]),
                 "hv_max": float(q_hv["max"][i]), "hrc_min": float(q_hrc["min"][i]),
                 "hrc_median": float(q_hrc["median"][i]), "hrc_max": float(q_hrc["max"][i])}
                for i, d in enumerate(b.depth_mm)]
        with _staged(out) as (staging, files):
            write_table_csv(staging / "band.csv", rows)
            band_figure(b, staging)
        share = b.share_meeting()
        surface, centre = rows[0], rows[-1]
        lines = [f"{case.title or 'case'}: {case.grade} chemistry range, {samples} heats (seed {seed}), one batch",
                 f"{'':<10}{'HRC min':>9}{'median':>9}{'max':>9}",
                 f"{'surface':<10}{_fmt(surface['hrc_min']):>9}{_fmt(surface['hrc_median']):>9}{_fmt(surface['hrc_max']):>9}",
                 f"{'centre':<10}{_fmt(centre['hrc_min']):>9}{_fmt(centre['hrc_median']):>9}{_fmt(centre['hrc_max']):>9}"]
        if share is not None:
            lines.append(f"share of heats meeting '{case.requirement.describe()}': {100 * share:.1f} %")
        lines.append("wrote   " + ", ".join(str(f) for f in files))
        clean = [{k: (None if isinstance(v, float) and not np.isfinite(v) else v) for k, v in r.items()} for r in rows]
        _emit(json_out, {"title": case.title, "grade": case.grade, "samples": samples, "seed": seed,
                         "share_meeting_requirement": share, "profile": clean, "files": [str(f) for f in files]},
              "\n".join(lines))


@app.command()
def sheet(
    case_file: Path = typer.Argument(..., help="Case file (TOML)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for sheet.pdf and sheet.png."),
    json_out: bool = typer.Option(False, "--json", help="Print the sheet's numbers as one JSON object, nothing else."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace results already in --out."),
) -> None:
    """A one-page hardening sheet (PDF and PNG) for the drawing or the process record."""
    with _guard():
        from .case import load_case
        from .report import key_numbers, sheet_rows, write_sheet
        from .workflows import attach_equivalent_severity, simulate_case

        _check_out_dir(out, overwrite, markers=("sheet.pdf",))
        case = load_case(case_file)
        _activity(f"solving the quench of {case_file}")
        with _Progress(not json_out, "quenching") as progress:
            result = simulate_case(case, progress)
            attach_equivalent_severity([result])
        with _staged(out) as (staging, files):
            write_sheet(result, staging)
        keys = key_numbers(result)
        rows = sheet_rows(result)
        lines = [f"{case.title or 'case'}: hardening sheet",
                 f"effective depth {keys['effective_depth_mm']:g} mm to {keys['limit_hrc']:g} HRC; centre martensite "
                 f"{keys['centre_martensite_pct']:g} %; retained austenite up to {keys['max_retained_austenite_pct']:g} %"]
        if keys["requirement"]:
            lines.append(("MET: " if keys["meets_requirement"] else "NOT MET: ") + keys["requirement"])
        lines.append("wrote   " + ", ".join(str(f) for f in files))
        _emit(json_out, {"title": case.title, "key_numbers": keys, "depths": rows, "case_sha256": case.source_sha256,
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


def _severity_row(q, s) -> dict:
    return {"name": q.name, "description": q.description, "kind": q.kind, "bath_c": q.bath_c,
            "agitation": q.agitation or None, "flash_point_c": q.flash_point_c, "emissivity": q.emissivity,
            "equivalent_h_per_inch": None if s.grossmann_h != s.grossmann_h else round(s.grossmann_h, 3),
            "equivalent_htc_w_m2k": None if s.htc_w_m2k != s.htc_w_m2k else round(s.htc_w_m2k, 1),
            "centre_800_500_s": None if s.time_800_500_s != s.time_800_500_s else round(s.time_800_500_s, 2),
            "severity_note": s.note or None, "source": q.source}


@app.command()
def quenchants(
    name: Optional[str] = typer.Argument(None, help="A built-in curve name or a curve CSV path: show that one."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="With NAME: folder for its table (CSV) and h(T) plot."),
    json_out: bool = typer.Option(False, "--json", help="Print the list (or the one curve) as one JSON object."),
    overwrite: bool = typer.Option(False, "--overwrite", help="Replace a table already in --out."),
) -> None:
    """List the built-in quenchants with bath, agitation, flash point and equivalent Grossmann H;
    or show one curve (NAME), and with --out write its table and plot."""
    with _guard():
        from .thermal.quenchants import builtin_quenchants, load_quenchant, quenchant_csv_text
        from .thermal.severity import DEFINITION, equivalent_severities

        if name is None:
            if out is not None:
                raise InputError("--out", str(out), "only together with a curve NAME")
            media = builtin_quenchants()
            _activity(f"computing the equivalent severity of {len(media)} curves")
            rows = [_severity_row(q, s) for q, s in zip(media, equivalent_severities(media))]
            lines = [f"{'name':<30}{'bath C':>7}  {'agitation':<10}{'flash C':>8}{'H 1/in':>8}{'h eq W/m2K':>12}  kind"]
            for r in rows:
                lines.append(f"{r['name']:<30}{r['bath_c']:>7g}  {r['agitation'] or '-':<10}"
                             f"{_fmt(r['flash_point_c'], '{:.0f}'):>8}{_fmt(r['equivalent_h_per_inch'], '{:.2f}'):>8}"
                             f"{_fmt(r['equivalent_htc_w_m2k'], '{:.0f}'):>12}  {r['kind']}")
            illustrative = sum(r["source"].startswith("illustrative") for r in rows)
            lines += [f"H: equivalent Grossmann severity, {DEFINITION}.",
                      f"{illustrative} of {len(rows)} curves are illustrative shapes (invented), not measured data; "
                      "fit your own bath with `quenchwise probe`. Flash points are illustrative: use your oil's data sheet."]
            _emit(json_out, {"severity_definition": DEFINITION, "quenchants": rows}, "\n".join(lines))
            return
        q = load_quenchant(name, Path.cwd(), key="NAME")
        stem = _file_stem(q.name)
        if out is not None:
            _check_out_dir(out, overwrite, markers=(f"{stem}.csv",))
        [s] = equivalent_severities([q])
        row = _severity_row(q, s)
        files: list[Path] = []
        if out is not None:
            from .quenchant_figures import quenchant_figure

            with _staged(out) as (staging, files):
                (staging / f"{stem}.csv").write_text(quenchant_csv_text(q), "utf-8")
                quenchant_figure(q, s, staging, f"{stem}_htc")
        lines = [f"{q.name}" + (f": {q.description}" if q.description else ""),
                 f"kind {q.kind}, bath {q.bath_c:g} C, agitation {q.agitation or '-'}, flash point "
                 f"{_fmt(q.flash_point_c, '{:.0f} C')}" + (f", emissivity {q.emissivity:g} (radiation added)" if q.emissivity else ""),
                 f"equivalent H {_fmt(row['equivalent_h_per_inch'], '{:.2f} 1/in')} "
                 f"(h {_fmt(row['equivalent_htc_w_m2k'], '{:.0f} W/m2K')}; {DEFINITION})" + (f"; {s.note}" if s.note else ""),
                 f"source  {q.source or 'not given'}"]
        if out is None:
            lines += ["surface_c  htc_w_m2k"] + [f"{t:>9g}  {h:>9g}" for t, h in zip(q.surface_c, q.htc_w_m2k)]
        else:
            lines.append("wrote   " + ", ".join(str(f) for f in files))
        payload = {**row, "severity_definition": DEFINITION,
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
        _activity(f"fitting the probe record {curve}")
        q, fit = fit_probe(record, bath_c, name=name or f"{_file_stem(record.name)}_fit", future_s=future_s)
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
                 "wrote   " + ", ".join(str(f) for f in files)]
        _emit(json_out, summary, "\n".join(line for line in lines if line))


def entry() -> None:
    """The `quenchwise` console script: the typer app, with every usage error (unknown option, bad
    or missing value) as one line on stderr and exit status 2, like bad input in a case file."""
    try:  # recent typer carries its own copy of click
        from typer._click import exceptions as click_errors
    except ImportError:  # pragma: no cover - older typer on top of click
        from click import exceptions as click_errors

    command = typer.main.get_command(app)
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
    except typer.Abort:
        typer.echo("quenchwise: aborted", err=True)
        raise SystemExit(130) from None
    raise SystemExit(status if isinstance(status, int) else 0)


if __name__ == "__main__":  # pragma: no cover
    entry()
