"""Command line: one function per command, no physics here.

Bad input of any kind ends with one line on stderr (file, key, value, what is allowed) and exit
status 2; results are computed before anything is written, then put in place file by file with
atomic renames, so existing results are never lost or half-replaced.
"""

from __future__ import annotations

import json
import shutil
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


@contextmanager
def _guard():
    """Turn input errors into one line and exit 2; an interrupt into one line and exit 130."""
    try:
        yield
    except InputError as exc:
        _fail(str(exc))
    except KeyboardInterrupt:
        _fail("interrupted; no results were written", 130)


def _check_out_dir(out: Path, overwrite: bool) -> None:
    if out.exists() and not out.is_dir():
        raise InputError("--out", str(out), "a folder path (this is a file)")
    if out.is_dir() and not overwrite and any((out / m).exists() for m in OUTPUT_MARKERS):
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
        yield staging, placed
        placed.extend(_publish(staging, out))
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
        + (f"; bore: {s['quench']['inner']}" if s["quench"]["inner"] else "")
        + f"; until the hottest point is below {s['quench']['end_c']:g} C ({s['time_to_end_s']:.1f} s, {s['steps']} steps)",
        "",
        f"{'location':<20}{'depth mm':>9}{'HRC':>7}{'HV':>7}{'martensite %':>14}{'bainite %':>11}{'ferr+pearl %':>14}{'ret. aust %':>13}",
    ]
    for p in s["points"]:
        hrc = "-" if p["hrc"] is None else f"{p['hrc']:.1f}"
        hv = "-" if p["hv"] is None else f"{p['hv']:.0f}"
        lines.append(f"{p['location']:<20}{p['depth_mm']:>9.2f}{hrc:>7}{hv:>7}{p['martensite_pct']:>14.1f}"
                     f"{p['bainite_pct']:>11.1f}{p['ferrite_pearlite_pct']:>14.1f}{p['retained_austenite_pct']:>13.1f}")
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
        from .workflows import simulate_case

        _check_out_dir(out, overwrite)
        case = load_case(case_file)
        with _Progress(not json_out, "quenching") as progress:
            result = simulate_case(case, progress)
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


if __name__ == "__main__":  # pragma: no cover
    app()
