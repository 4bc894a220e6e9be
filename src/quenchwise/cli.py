"""Command line: one function per command, no physics here.

Bad input of any kind ends with one line on stderr (file, key, value, what is allowed) and exit
status 2; results are computed before anything is written, then published as a whole folder by
publish.py (lock per folder, staging folder, atomic swap), so existing results are never lost,
mixed or half-replaced.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Optional

import typer

from . import publish
from .cautions import CAUTION
from .cli_support import (_activity, _check_out_dir, _emit, _guard, _page, _publish, _quench, _refined,  # noqa: F401
                          _requirement_from_options, _run_case, _run_files, _sheet_note, _solve, _units_option,
                          _write_csv, _figures, _figures_option, _json_option, _overwrite_option, _units_choice,
                          interrupted)
from .errors import InputError
from .side_by_side import run_side_by_side
from .version import __version__

# rich_markup_mode=None: help texts are plain text, so "[requirement]" or "[C]" is printed, not eaten as markup.
app = typer.Typer(add_completion=False, no_args_is_help=True, rich_markup_mode=None,
                  help="quenchwise: predict the hardness of a quenched steel part from surface to core.")


@app.command()
def run(
    case_file: Optional[Path] = typer.Argument(None, help="Case file (TOML); or leave it out and give --grade, "
                                                           "a section (--bar, --plate or --sphere) and --medium."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="Folder for result.h5, profile.csv and figures "
                                                                 "(leave it out to print the summary and write nothing)."),
    json_out: bool = _json_option(),
    overwrite: bool = _overwrite_option(),
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
    figures: str = _figures_option(),
) -> None:
    """Simulate the quench of one part and print its hardness profile; with --out also write it."""
    with _guard(), _figures(figures):
        from .plots import cooling_figure, hardness_figure
        from .results import profile_csv_text, write_result_h5
        from .text_output import run_summary_text
        from .units import us_csv_text

        u = _units_option(units)
        quick = {"grade": grade, "bar_mm": bar, "plate_mm": plate, "sphere_mm": sphere, "medium": medium,
                 "austenitize_c": austenitize_c}
        case, _ = _refined(_run_case(case_file, quick, out, overwrite), fine)
        result = _quench(case, json_out, f"solving the quench of {case_file or 'the quick case'}")

        def data_files(staging):
            write_result_h5(result, staging / "result.h5")
            text = profile_csv_text(result)
            (staging / "profile.csv").write_text(us_csv_text(text) if u.us else text, "utf-8")

        def write(staging):   # one figure drawn in a second process meanwhile (side_by_side.py)
            run_side_by_side([lambda: hardness_figure(result, staging, u), lambda: cooling_figure(result, staging, u),
                              lambda: data_files(staging)])

        files = _publish(out, _run_files(result, write, u)) if out is not None else []
        summary = result.summary()
        if json_out:
            typer.echo(json.dumps({**summary, "files": [str(f) for f in files], "caution": CAUTION}))
        else:
            typer.echo(run_summary_text(summary, files, u))


@app.command()
def steels(json_out: bool = typer.Option(False, "--json", help="Print the list as JSON.")) -> None:
    """List the built-in steel grades with their nominal chemistry."""
    from .steel.grades import grades
    from .text_output import steels_text

    table = grades()
    if json_out:
        typer.echo(json.dumps({g.name: {"family": g.family, "en": g.en, "nominal_wt_pct": g.nominal,
                                        "range_wt_pct": g.range, "austenitize_c": g.austenitize_c,
                                        "grain_size": g.grain_size, "standard": g.standard}
                               for g in table.values()}))
        return
    typer.echo(steels_text(table))


@app.callback(invoke_without_command=True)
def main(version: Optional[bool] = typer.Option(None, "--version", help="Print the version and exit.")) -> None:
    if version:
        typer.echo(f"quenchwise {__version__}")
        raise typer.Exit(0)


@app.command()
def compare(
    case_file: Path = typer.Argument(..., help="Case file (TOML)."),
    medium: list[str] = typer.Option([], "--medium", "-m", help="Quenchant name or CSV path; repeat for each."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for compare.csv and figures."),
    json_out: bool = _json_option("the table"),
    overwrite: bool = _overwrite_option(),
    units: str = _units_choice("compare.csv"),
    figures: str = _figures_option(),
) -> None:
    """The same part in several quenchants, solved as one batch."""
    with _guard(), _figures(figures):
        from .case import load_case
        from .plots import compare_cooling_figure, compare_hardness_figure
        from .text_output import compare_text
        from .thermal.quenchants import load_quenchant
        from .workflows.compare import compare as compare_media

        u = _units_option(units)
        _check_out_dir(out, overwrite, markers=("compare.csv",))
        case = load_case(case_file)
        media = [load_quenchant(m, key="--medium") for m in medium] or list(case.compare_media)
        if len(media) < 1:
            raise InputError("--medium", "(none)", "one or more quenchants (--medium NAME, or [compare] media in the case)")
        result = _solve(json_out, "comparing", f"solving {len(media)} quenches of {case_file}",
                        lambda progress: compare_media(case, media, progress))
        if case.requirement is None:  # nothing to meet: the table and JSON say n/a (empty) instead of false
            for r in result.rows:
                r["meets_requirement"] = None
        files = _publish(out, lambda staging: run_side_by_side([
            lambda: compare_hardness_figure(result, staging, u), lambda: compare_cooling_figure(result, staging, u),
            lambda: _write_csv(staging / "compare.csv", result.rows, u)]))
        best = result.best()
        best = best["medium"] if best else None
        text = compare_text(case.title, result.rows, case.requirement.describe(u) if case.requirement else None, files,
                            best, bool(case.requirement and case.requirement.min_hrc), u)
        _emit(json_out, {"title": case.title, "rows": result.rows, "mildest_meeting": best}, text, files)


@app.command()
def size(
    case_file: Path = typer.Argument(..., help="Case file (TOML) with a [requirement], or give one below."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for sizing.json and figures."),
    min_hrc: Optional[float] = typer.Option(None, "--min-hrc", help="Required hardness, HRC."),
    min_martensite: Optional[float] = typer.Option(None, "--min-martensite", help="Required martensite, %."),
    depth_mm: Optional[float] = typer.Option(None, "--depth-mm", help="Down to this depth (default: centre)."),
    json_out: bool = _json_option("the answers"),
    overwrite: bool = _overwrite_option(),
    units: str = _units_choice(),
    figures: str = _figures_option(),
) -> None:
    """Mildest severity, the quenchants that do it, and the largest section that meets a requirement."""
    with _guard(), _figures(figures):
        from .case import load_case
        from .plots import sizing_figure
        from .text_output import SEVERITY_NOTE, size_text
        from .workflows.size import size as size_answer

        u = _units_option(units)
        _check_out_dir(out, overwrite, markers=("sizing.json",))
        case = load_case(case_file)
        req = _requirement_from_options(case, min_hrc, min_martensite, depth_mm)
        if req is not None and req.depth_mm is not None and req.depth_mm > case.section.thickness_m * 1000.0:
            raise InputError("--depth-mm", req.depth_mm, f"a depth from 0 to {case.section.thickness_m * 1000.0:g} mm")
        answer = _solve(json_out, "sizing", f"running the sizing sweeps of {case_file}",
                        lambda progress: size_answer(case, req, progress=progress))
        payload = {"title": case.title, **answer.as_dict()}
        files = _publish(out, lambda staging: ((staging / "sizing.json").write_text(json.dumps(payload, indent=2), "utf-8"),
                                               sizing_figure(answer, staging, u)))
        payload["severity_note"] = SEVERITY_NOTE
        text = size_text(case.title, {**payload, "requirement": answer.requirement.describe(u)}, case.outer.name, files, u)
        _emit(json_out, payload, text, files)


@app.command()
def band(
    case_file: Path = typer.Argument(..., help="Case file (TOML) naming a built-in grade."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for band.csv and band figure."),
    samples: int = typer.Option(200, "--samples", min=2, max=5000, help="Number of sampled heats."),
    seed: int = typer.Option(1, "--seed", help="Random seed (same seed, same answer)."),
    json_out: bool = _json_option("the band summary"),
    overwrite: bool = _overwrite_option(),
    units: str = _units_choice(),
    figures: str = _figures_option(),
) -> None:
    """Hardness band over the grade's chemistry range (seeded Monte Carlo, one batch)."""
    with _guard(), _figures(figures):
        import math

        from .case import load_case
        from .plots import band_figure
        from .text_output import band_text
        from .workflows.band import band as band_run, band_rows

        u = _units_option(units)
        _check_out_dir(out, overwrite, markers=("band.csv",))
        case = load_case(case_file)
        b = _solve(json_out, "sampling chemistry", f"solving {samples} sampled heats of {case_file}",
                   lambda progress: band_run(case, samples, seed, progress))
        rows = band_rows(b)
        files = _publish(out, lambda staging: (_write_csv(staging / "band.csv", rows, u), band_figure(b, staging, u)))
        share = b.share_meeting()
        text = band_text(case.title, b.sampled, samples, seed, rows, share,
                         case.requirement.describe(u) if share is not None else None, files)
        clean = [{k: (None if isinstance(v, float) and not math.isfinite(v) else v) for k, v in r.items()} for r in rows]
        _emit(json_out, {"title": case.title, "grade": case.grade, "samples": samples, "seed": seed,
                         "sampled": b.sampled, "measured_jominy": b.heat_fit,
                         "share_meeting_requirement": share, "profile": clean}, text, files)


@app.command()
def sheet(
    case_file: Path = typer.Argument(..., help="Case file (TOML)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for sheet.pdf and sheet.png."),
    json_out: bool = _json_option("the sheet's numbers"),
    overwrite: bool = _overwrite_option(),
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
        from .text_output import sheet_text

        page, u = _page(page), _units_option(units)
        _check_out_dir(out, overwrite, markers=("sheet.pdf",))
        case, refined_note = _refined(load_case(case_file), fine)
        result = _quench(case, json_out, f"solving the quench of {case_file}")
        note = _sheet_note(refined_note, result)
        files = _publish(out, lambda staging: write_sheet(result, staging, page=page, units=u, refined=note))
        keys = key_numbers(result)
        _emit(json_out, {"title": case.title, "record": case.record, "key_numbers": keys, "depths": sheet_rows(result),
                         "measured_jominy": result.extra.get("measured_jominy"), "warnings": result.warnings(),
                         "case_sha256": case.source_sha256},
              sheet_text(case.title, keys, files, u, case.requirement and case.requirement.describe(u)), files)


@app.command()
def jominy(
    case_file: Path = typer.Argument(..., help="Case file (TOML); its [steel] is tested, [part] and [quench] are not needed."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for jominy.csv and the figure."),
    band: Optional[Path] = typer.Option(None, "--band", help="Band CSV: distance_mm or distance_sixteenths, min_hrc, max_hrc."),
    rz: bool = typer.Option(False, "--rz", help="Solve the specimen in (r, z) instead of the 1-D axial model."),
    physics_di: bool = typer.Option(True, "--physics-di/--no-physics-di",
                                    help="Also find the DI by simulating bars (a few seconds more)."),
    json_out: bool = _json_option(),
    overwrite: bool = _overwrite_option(),
    figures: str = _figures_option(),
) -> None:
    """Simulate the end-quench (Jominy) test of the case's steel, with its ideal critical diameter."""
    with _guard(), _figures(figures):
        from .steel_figures import jominy_figure
        from .text_output import jominy_text
        from .workflows.jominy import DEFAULT_SETTINGS, RZ_SETTINGS, load_steel_case, read_band
        from .workflows.jominy import jominy as run_jominy

        _check_out_dir(out, overwrite, markers=("jominy.csv",))
        case = load_steel_case(case_file)
        rows = read_band(band) if band is not None else None
        result = _solve(json_out, "end-quench test", f"solving the end-quench test of {case_file}",
                        lambda progress: run_jominy([case], RZ_SETTINGS if rz else DEFAULT_SETTINGS, physics_di,
                                                    progress)[0])
        files = _publish(out, lambda staging: ((staging / "jominy.csv").write_text(result.csv_text(), "utf-8"),
                                               jominy_figure(result, staging, rows)))
        summary = result.summary(rows)
        _emit(json_out, summary, jominy_text(summary, files), files)


@app.command()
def diagram(
    case_file: Path = typer.Argument(..., help="Case file (TOML): its [steel] and [transform] tables, and for "
                                               "CCT the bath temperature of its quench."),
    kind: str = typer.Option(..., "--kind", "-k", help="ttt (isothermal holds) or cct (continuous cooling)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for the figure (PNG; --figures for SVG, PDF), the curve data (CSV) "
                                                      "and the summary (JSON)."),
    json_out: bool = _json_option(),
    overwrite: bool = _overwrite_option("a diagram already in --out"),
    figures: str = _figures_option(),
) -> None:
    """TTT or CCT diagram of the case's steel with the case's kinetics model."""
    with _guard(), _figures(figures):
        from .case import load_case
        from .steel_figures import cct_figure, ttt_figure
        from .results import write_table_csv
        from .text_output import diagram_text
        from .workflows.diagram import DIAGRAM_KINDS, diagram as make_diagram

        kind = kind.strip().lower()
        if kind not in DIAGRAM_KINDS:
            raise InputError("--kind", kind, "ttt or cct")
        _check_out_dir(out, overwrite, markers=(f"{kind}.csv",))
        case = load_case(case_file)
        _activity(f"computing the {kind.upper()} diagram of {case_file}")
        d, summary = make_diagram(case, kind)

        def write(staging):
            write_table_csv(staging / f"{kind}.csv", d.rows())
            (staging / f"{kind}_summary.json").write_text(json.dumps({**summary, "caution": CAUTION}, indent=1), "utf-8")
            (ttt_figure if kind == "ttt" else cct_figure)(d, staging)

        files = _publish(out, write)
        _emit(json_out, summary, diagram_text(case.title, summary, files), files)


@app.command()
def quenchants(
    name: Optional[str] = typer.Argument(None, help="A built-in curve name or a curve CSV path: show that one."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="With NAME: folder for its table (CSV) and the "
                                       "figure (h(T), probe cooling curve and cooling-rate curve)."),
    json_out: bool = typer.Option(False, "--json", help="Print the list (or the one curve) as one JSON object."),
    overwrite: bool = _overwrite_option("a table already in --out"),
    figures: str = _figures_option(),
) -> None:
    """List the built-in quenchants with bath, agitation, flash point, ISO 9950 probe figures and
    equivalent Grossmann H; or show one curve (NAME), and with --out write its table and figure."""
    with _guard(), _figures(figures):
        from .text_output import quenchant_list_text, quenchant_text
        from .thermal.quenchants import builtin_quenchants, load_quenchant, quenchant_csv_text
        from .thermal.severity import DEFINITION
        from .workflows.probe import PROBE_NOTE, file_stem, quenchant_detail, quenchant_rows

        if name is None:
            if out is not None:
                raise InputError("--out", str(out), "only together with a curve NAME")
            rows = quenchant_rows(builtin_quenchants())
            _emit(json_out, {"severity_definition": DEFINITION, "probe_definition": PROBE_NOTE, "quenchants": rows},
                  quenchant_list_text(rows, PROBE_NOTE, DEFINITION))
            return
        q = load_quenchant(name, Path.cwd(), key="NAME")
        stem = file_stem(q.name)
        if out is not None:
            _check_out_dir(out, overwrite, markers=(f"{stem}.csv",))
        s, (t_probe, c_probe, figures), row = quenchant_detail(q)
        files = None
        if out is not None:
            from .quenchant_figures import quenchant_figure

            files = _publish(out, lambda staging: ((staging / f"{stem}.csv").write_text(quenchant_csv_text(q), "utf-8"),
                                                   quenchant_figure(q, s, staging, f"{stem}_htc",
                                                                    probe=(t_probe, c_probe, figures))))
        payload = {**row, "severity_definition": DEFINITION, "probe_definition": PROBE_NOTE,
                   "table": {"surface_c": q.surface_c.tolist(), "htc_w_m2k": q.htc_w_m2k.tolist()}}
        _emit(json_out, payload, quenchant_text(q, row, s.note, DEFINITION, files), files or [])


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
    json_out: bool = _json_option(),
    overwrite: bool = _overwrite_option("a fit already in --out"),
    figures: str = _figures_option(),
) -> None:
    """Fit h(T_surface) of a bath from a cooling-curve probe record (inverse conduction) and write it
    as a quenchant CSV that `run` accepts in [quench] medium."""
    with _guard(), _figures(figures):
        from .quenchant_figures import write_probe_fit
        from .text_output import probe_fit_text
        from .workflows.probe import fit_probe_record

        _check_out_dir(out, overwrite, markers=("quenchant.csv", "probe_fit.csv"))
        _activity(f"fitting the probe record {curve}")
        a = fit_probe_record(curve, bath_c, name, future_s, tc_time_constant, not no_end_correction)

        files = _publish(out, lambda staging: write_probe_fit(a, staging))
        summary = a.summary(curve, not no_end_correction)
        _emit(json_out, summary, probe_fit_text(a.quenchant, a.fit, a.record, curve, a.bath_c, summary, out, files),
              files)


@app.command("fit-tank")
def fit_tank(
    case_file: Path = typer.Argument(..., help="Case file (TOML) of the part, its steel and the tank's medium as best known."),
    traverse: Path = typer.Argument(..., help="Hardness traverse CSV of a cut section: depth_mm,hrc (optional hrb column)."),
    out: Path = typer.Option(..., "--out", "-o", help="Folder for quenchant.csv, tank_fit.csv and the figure."),
    json_out: bool = _json_option(),
    overwrite: bool = _overwrite_option("a fit already in --out"),
    figures: str = _figures_option(),
) -> None:
    """Fit the tank's effective severity (a factor on the case's h(T)) to a measured hardness
    traverse and write it as a quenchant CSV that `run` accepts in [quench] medium."""
    with _guard(), _figures(figures):
        from .case import load_case
        from .measured import read_traverse
        from .tank_figures import write_tank_fit
        from .text_output import tank_fit_text
        from .workflows.tank_fit import fit_tank as run_fit

        _check_out_dir(out, overwrite, markers=("quenchant.csv", "tank_fit.csv"))
        case, curve = load_case(case_file), read_traverse(traverse)
        _activity(f"fitting the tank's severity to {traverse}")
        fit = run_fit(case, curve)
        files = _publish(out, lambda staging: write_tank_fit(fit, staging))
        summary = {**fit.summary(), "files": [str(f) for f in files]}
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


if __name__ == "__main__":  # pragma: no cover
    entry()
