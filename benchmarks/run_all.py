"""Timing harness for quenchwise (a script, not a test).

    python benchmarks/run_all.py                 # every benchmark, 3 repeats
    python benchmarks/run_all.py --only single_bar batch_200 --repeat 5
    python benchmarks/run_all.py --markdown      # also print the figures as a Markdown table
    python benchmarks/run_all.py --table benchmarks/latest.md   # and write that table to a file
    python benchmarks/run_all.py --profile       # cProfile of one 200-case batch solve
    python benchmarks/run_all.py --quick         # smoke run for CI (.ci/run): small sizes, 1 repeat
    python benchmarks/run_all.py --only commands # every command as its own process / the bare import

--quick runs every benchmark on small sizes (20 cases instead of 200, 20 heats instead of 200, one
repeat, no targets judged): it only shows that the benchmarks still run, so they cannot rot. The
figures table comes from the full run.

Each benchmark is a function registered with @benchmark(name); it receives the shared context
(a dict: earlier benchmarks may leave runs there for later ones, e.g. the batch run that the
banded reference replays) and returns a list of (figure, value, unit, target or None) rows.
Times are the best of --repeat runs (wall clock, time.perf_counter) measured side by side in one
process, after one untimed warm-up of FiPy; the median is shown too because the machine may be
shared. The `questions` benchmark times the chemistry band, the sizing search and the end-quench
test against one solve of the same case. The `commands` benchmark (commands.py) times every command
on its demo case as a separate process against the bare import of FiPy, matplotlib and h5py.
"""

from __future__ import annotations

import argparse
import os
import platform
import statistics
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))

from banded_reference import BandedReference  # noqa: E402

from quenchwise.kinetics import MODELS, PhaseStepper, SteelNodes  # noqa: E402
from quenchwise.steel import Composition, austenitize  # noqa: E402
from quenchwise.thermal import BatchSolver, Quenchant, Section, SolverSettings, load_quenchant  # noqa: E402
from quenchwise.thermal.quenchants import htc_from_grossmann  # noqa: E402
from quenchwise.thermal.solver import ThermalCase  # noqa: E402

BENCHMARKS: dict[str, callable] = {}

#: The steel of every benchmark: 0.40C-0.85Mn-0.25Si-0.95Cr-0.20Mo.
CR_MO = Composition(c=0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20)
OIL = "oil_conventional_60c_still"


def benchmark(name):
    def register(fn):
        BENCHMARKS[name] = fn
        return fn
    return register


def timed(fn, repeat):
    """(best wall time, median wall time, best CPU time of this process, last result) of repeat
    calls. On a shared machine the CPU time is the steadier figure."""
    times, cpu, result = [], [], None
    for _ in range(repeat):
        t0, c0 = time.perf_counter(), time.process_time()
        result = fn()
        times.append(time.perf_counter() - t0)
        cpu.append(time.process_time() - c0)
    return min(times), statistics.median(times), min(cpu), result


def solve(cases, settings=SolverSettings(), kinetics=True):
    """Build the batch and its phase stepper, run it; returns (solver, stepper, histories)."""
    solver = BatchSolver(cases, settings)
    stepper = None
    if kinetics:
        states = [austenitize(CR_MO, c.initial_c) for c in cases]
        nodes = SteelNodes.from_states(states, [7.0] * len(cases), list(solver.counts))
        stepper = PhaseStepper(nodes, MODELS["li1998"](), solver.initial)
    return solver, stepper, solver.run(stepper)


def fresh_stepper(cases, counts, initial):
    states = [austenitize(CR_MO, c.initial_c) for c in cases]
    nodes = SteelNodes.from_states(states, [7.0] * len(cases), list(counts))
    return PhaseStepper(nodes, MODELS["li1998"](), initial)


# -- (a) one bar ------------------------------------------------------------------------------
@benchmark("single_bar")
def single_bar(ctx, repeat):
    """One 60 mm bar of 0.40C-0.85Mn-0.25Si-0.95Cr-0.20Mo from 850 C in the built-in still oil until
    the centre is below 60 C, kinetics on. The built-in oil's bath is 60 C, where the centre can
    never get below 60 C, so its curve is used with the bath at 40 C; the same oil at its own
    60 C bath until the centre is below 61 C is timed as a second line."""
    oil = load_quenchant(OIL)
    rows = []
    for label, quenchant, end_c in (("bath 40 C, to 60 C", oil.at_bath(40.0), 60.0),
                                    ("own bath 60 C, to 61 C", oil, 61.0)):
        case = ThermalCase("bar 60", Section.bar(0.060), quenchant, 850.0, end_c)
        best, median, cpu, (_, _, [h]) = timed(lambda: solve([case]), repeat)
        target = 3.0 if label.startswith("bath 40") else None
        rows += [(f"(a) 60 mm bar in oil, {label}: wall time", best, "s", target),
                 (f"(a) ... median of {repeat}", median, "s", None),
                 (f"(a) ... CPU time", cpu, "s", None),
                 (f"(a) ... steps", h.steps, "", None),
                 (f"(a) ... quench time simulated", h.time_s[-1], "s", None)]
    return rows


# -- (b) 200 cases in one batch -----------------------------------------------------------------
def batch_cases(quick=False):
    """50 diameters (5 with quick) from 10 to 150 mm x 4 quenchants: the built-in still oil and still water
    curves, a constant h of 3000 W/m2K at 30 C and Grossmann H = 0.35 1/in at 40 C (h from
    H = h / 2k, k = 25 W/mK). Until the centre is below 100 C."""
    quenchants = [load_quenchant(OIL), load_quenchant("water_20c_still"),
                  Quenchant.constant(3000.0, 30.0),
                  Quenchant.constant(float(htc_from_grossmann(0.35)), 40.0, name="Grossmann H 0.35")]
    return [ThermalCase(f"bar {d:.0f} mm, {q.name}", Section.bar(d / 1000.0), q, 850.0, 100.0)
            for d in np.linspace(10.0, 150.0, 5 if quick else 50) for q in quenchants]


@benchmark("batch_200")
def batch_200(ctx, repeat):
    cases = batch_cases(ctx.get("quick", False))
    best, median, cpu, (solver, _, histories) = timed(lambda: solve(cases), repeat)
    steps = np.array([h.steps for h in histories])
    node_steps = int(np.sum(steps * solver.counts))
    ctx["batch"] = dict(cases=cases, solver=solver, histories=histories, wall=best, cpu=cpu, node_steps=node_steps)
    return [(f"(b) {len(cases)} cases in one batch: wall time per case", best / len(cases), "s", 0.3),
            ("(b) ... wall time of the batch", best, "s", None),
            ("(b) ... median of the batch", median, "s", None),
            ("(b) ... CPU time of the batch", cpu, "s", None),
            ("(b) ... global steps (one banded solve each)", int(steps.max()), "", None),
            ("(b) ... steps per case, min / mean / max", f"{steps.min()} / {steps.mean():.0f} / {steps.max()}", "", None),
            ("(b) ... nodes in the batch", int(solver.n_nodes), "", None),
            ("(b) ... active node-steps", node_steps, "", None),
            ("(b) ... per node-step", 1e6 * best / node_steps, "us", None)]


# -- (c) bare banded reference on the same node-steps ------------------------------------------
@benchmark("banded_reference")
def banded_reference(ctx, repeat):
    if "batch" not in ctx:
        raise SystemExit("banded_reference replays the batch_200 run: run batch_200 first")
    b = ctx["batch"]
    ref = BandedReference(b["cases"], b["solver"].settings)
    rows = []
    best_lin, _, cpu_lin, (node_steps, _) = timed(lambda: ref.replay(b["histories"], "linear"), repeat)

    def full():
        stepper = fresh_stepper(b["cases"], ref.counts, ref.initial)
        return ref.replay(b["histories"], "full", stepper)

    best_full, _, cpu_full, (node_steps_full, diff) = timed(full, repeat)
    assert node_steps == node_steps_full == b["node_steps"]
    per_b = b["wall"] / node_steps
    rows += [("(c) full reference (same physics, solve_banded): wall", best_full, "s", None),
             ("(c) ... CPU time", cpu_full, "s", None),
             ("(c) ... per node-step", 1e6 * best_full / node_steps, "us", None),
             ("(c) ... final temperatures vs the FiPy run, largest difference", diff, "K", None),
             ("(b)/(c) per node-step, full reference", per_b / (best_full / node_steps), "", 15.0),
             ("(b)/(c) ... on CPU time", b["cpu"] / cpu_full, "", None),
             ("(c') linear-algebra-only reference (bands + solve_banded): wall", best_lin, "s", None),
             ("(c') ... per node-step", 1e6 * best_lin / node_steps, "us", None),
             ("(b)/(c') per node-step, linear-algebra-only reference", per_b / (best_lin / node_steps), "", None),
             ("(b)/(c') ... on CPU time", b["cpu"] / cpu_lin, "", None)]
    return rows


# -- why the surface conditions are vectorized ----------------------------------------------------
@benchmark("surface_conditions")
def surface_conditions(ctx, repeat):
    """Cost per solver step of the surface conditions of the 200-case batch: a Python loop over the
    cases calling Quenchant.htc (the solver's first version, reproduced here) against the solver's
    vectorized evaluation. The loop version ran twice per step (sink, then the recorded surface
    temperature)."""
    cases = batch_cases(ctx.get("quick", False))
    solver = BatchSolver(cases)
    temperature = solver.initial.copy()
    mixture = solver.tables.mixture(np.ones((3, solver.n_nodes)) * np.array([[1.0], [0.0], [0.0]]))
    k, _, _ = solver.geometry.overrides.properties(temperature, mixture)
    dx = solver.dx

    def one_surface(q, node, area):
        g = k[node] / (0.5 * dx[node])
        t_cell = temperature[node]
        h = q.htc(t_cell)
        t_surf = (g * t_cell + h * q.bath_c) / (g + h)
        h = q.htc(t_surf)
        return area * 1.0 / (1.0 / max(h, 1e-12) + 1.0 / g), (g * t_cell + h * q.bath_c) / (g + h)

    sf = solver.surfaces

    def loop():
        sink = np.zeros(solver.n_nodes)
        for i, case in enumerate(cases):
            g, _ = one_surface(case.outer, solver.outer_nodes[i], sf.area[i])
            sink[solver.outer_nodes[i]] -= g / dx[solver.outer_nodes[i]]
        for i, case in enumerate(cases):
            one_surface(case.outer, solver.outer_nodes[i], sf.area[i])
        return sink

    def vectorized():
        g, _ = solver.integrator.surface_coefficients(temperature, k, sf.rows)
        solver.integrator.surface_coefficients(temperature, k, sf.rows)
        return np.bincount(sf.cell, g, minlength=solver.n_nodes) / dx

    np.testing.assert_allclose(-loop(), vectorized(), rtol=1e-12)
    reps = 20 * repeat
    t_loop = timed(lambda: [loop() for _ in range(reps)], 1)[0] / reps
    t_vec = timed(lambda: [vectorized() for _ in range(reps)], 1)[0] / reps
    rows = [(f"surface conditions per step, per-case loop ({len(cases)} cases)", 1e3 * t_loop, "ms", None),
            ("surface conditions per step, vectorized", 1e3 * t_vec, "ms", None)]
    if "batch" in ctx:
        steps = max(h.steps for h in ctx["batch"]["histories"])
        rows += [(f"... per-case loop over the batch's {steps} steps", t_loop * steps, "s", None),
                 (f"... vectorized over the batch's {steps} steps", t_vec * steps, "s", None)]
    return rows


# -- harness ---------------------------------------------------------------------------------
# -- the engineer's questions, each against the same case solved alone ---------------------------
CASES_DIR = Path(__file__).resolve().parents[1] / "cases"


def _pin_case():
    from quenchwise.case import load_case

    return load_case(CASES_DIR / "pin_sizing.toml")


@benchmark("questions")
def questions(ctx, repeat):
    """Chemistry band (N = 200), the sizing search and the end-quench test on the demo pin
    (4140, 50 mm bar, still oil, 45 HRC at 5 mm), each beside one solve of the pin alone:
    the ratio says how many single solves each answer costs."""
    from quenchwise.workflows import simulate
    from quenchwise.workflows.band import band
    from quenchwise.workflows.jominy import jominy
    from quenchwise.workflows.size import size

    case = _pin_case()
    heats = 20 if ctx.get("quick") else 200
    single, _, single_cpu, _ = timed(lambda: simulate([case]), repeat)
    band_t, _, band_cpu, _ = timed(lambda: band(case, samples=heats, seed=1), repeat)
    size_t, _, size_cpu, answer = timed(lambda: size(case), 1)
    solved = len(answer.severity.evaluated) + len(answer.quenchants) + len(answer.size.evaluated)
    jom_t, _, jom_cpu, _ = timed(lambda: jominy([case], physics_di=False), repeat)
    rows = [("(q) demo pin solved alone: wall time", single, "s", None),
            (f"(q) chemistry band, {heats} heats in one batch: wall time", band_t, "s", None),
            ("(q) ... per heat / single solve", band_t / heats / single, "", None),
            ("(q) ... CPU per heat / single CPU", band_cpu / heats / single_cpu, "", None),
            ("(q) sizing search (severity, all built-in quenchants, size): wall time", size_t, "s", None),
            ("(q) ... cases solved / wall time in single solves", f"{solved} / {size_t / single:.1f}", "", None),
            ("(q) end-quench test, 1-D axial, no DI search: wall time", jom_t, "s", None),
            ("(q) ... / single solve", jom_t / single, "", None)]
    if ctx.get("quick"):
        return rows
    jdi_t, _, _, _ = timed(lambda: jominy([case], physics_di=True), 1)
    return rows + [("(q) end-quench test with the simulated DI search: wall time", jdi_t, "s", None)]


@benchmark("commands")
def commands(ctx, repeat):
    """Every command on its demo case as a separate process, as a ratio to the bare import of the
    libraries in the same run (commands.py; --quick: 4 short commands, one round)."""
    from commands import benchmark_rows

    return benchmark_rows(repeat, bool(ctx.get("quick")))


@benchmark("finite_bar")
def finite_bar(ctx, repeat):
    """Issue 17: one 50 x 100 mm bar of 4140 in (r, z) (24 x 48 cells, all faces in moderately agitated
    conventional oil) with kinetics and hardness on every cell, through workflows.simulate, beside
    the 1-D 50 mm bar of the same case in the same run; and the same (r, z) solve with OpenBLAS's
    threads left at the library default (part_rz.integrate limits them to one)."""
    from quenchwise.case import load_case
    from quenchwise.thermal.integrator import Integrator
    from quenchwise.thermal.part_rz import build_geometry
    from quenchwise.workflows import simulate
    from quenchwise.workflows.finite import part_member, part_settings

    base = {"title": "4140 bar (benchmark)", "steel": {"grade": "4140"},
            "quench": {"medium": "oil_conventional_60c_moderate"}}
    finite = load_case({**base, "part": {"shape": "bar", "diameter_mm": 50, "length_mm": 100}})
    flat = load_case({**base, "part": {"shape": "bar", "diameter_mm": 50}})
    rz_t, rz_med, rz_cpu, [rz] = timed(lambda: simulate([finite]), repeat)
    one_t, _, one_cpu, [one] = timed(lambda: simulate([flat]), repeat)
    rows = [("(r) 50 x 100 mm bar in (r, z), kinetics + hardness: wall time", rz_t, "s", 10.0),
            (f"(r) ... median of {repeat}", rz_med, "s", None),
            ("(r) ... CPU time", rz_cpu, "s", None),
            ("(r) ... cells / steps", f"{int(rz.field.solid.sum())} / {rz.history.steps}", "", None),
            ("(r) 50 mm bar in 1-D, same case: wall time", one_t, "s", None),
            ("(r) ... nodes / steps", f"{one.history.radius_m.size} / {one.history.steps}", "", None),
            ("(r) (r, z) / 1-D wall time", rz_t / one_t, "", None),
            ("(r) ... on CPU time", rz_cpu / one_cpu, "", None),
            ("(r) mid-length centre HRC (r, z) / 1-D centre", f"{rz.summary()['points'][2]['hrc']} / "
                                                                f"{one.summary()['points'][2]['hrc']}", "", None)]
    if ctx.get("quick"):
        return rows
    settings = part_settings(finite)
    geometry = build_geometry([part_member(0, finite)], settings)
    free_t, _, _, run = timed(lambda: Integrator(geometry, settings).run(), 1)
    return rows + [("(r) (r, z) conduction only, BLAS threads at the library default: wall", free_t, "s", None),
                   ("(r) ... steps", int(run.steps[0]), "", None)]


def machine() -> list[str]:
    cpu = "unknown"
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    import fipy
    import scipy
    load = os.getloadavg() if hasattr(os, "getloadavg") else ("?",)
    return [f"nproc {os.cpu_count()}, CPU {cpu}, load average at start {load[0]:.2f}",
            f"Python {platform.python_version()}, numpy {np.__version__}, scipy {scipy.__version__}, "
            f"FiPy {fipy.__version__}, {platform.system()} {platform.release()}"]


def warm_up():
    """One small untimed solve, so FiPy's first-call costs do not land on the first benchmark."""
    solve([ThermalCase("warm-up", Section.bar(0.01), Quenchant.constant(1000.0, 20.0), 850.0, 400.0)],
          SolverSettings(cells=10), kinetics=True)


def fmt(value) -> str:
    if isinstance(value, str):
        return value
    if isinstance(value, (int, np.integer)):
        return f"{value:d}"
    return f"{value:.3g}" if abs(value) < 1e4 else f"{value:.0f}"


def profile_batch():
    """Where the time of one 200-case batch solve goes (profiler overhead included)."""
    import cProfile
    import pstats

    cases = batch_cases()
    warm_up()
    profiler = cProfile.Profile()
    profiler.enable()
    solve(cases)
    profiler.disable()
    stats = pstats.Stats(profiler)
    parts = {("solver.py", "run"): "BatchSolver.run (everything)",
             ("integrator.py", "_solve"): "linear system (banded assembly and solve)",
             ("fipy/terms/term.py", "solve"): "FiPy Term.solve (assembly='fipy' only)",
             ("transformation.py", "advance"): "kinetics PhaseStepper.advance",
             ("properties.py", "evaluate"): "property tables (k, cp, h)",
             ("properties.py", "temperature_for_enthalpy"): "enthalpy -> temperature",
             ("integrator.py", "surface_coefficients"): "surface conditions"}
    found = {}
    for (path, _, name), (_, _, _, cumulative, _) in stats.stats.items():
        for (suffix, fn), label in parts.items():
            if name == fn and path.endswith(suffix):
                found[label] = found.get(label, 0.0) + cumulative
    total = found.get("BatchSolver.run (everything)", float("nan"))
    for label in parts.values():
        if label in found:
            print(f"{label:40s} {found[label]:7.2f} s  {100 * found[label] / total:5.1f} %")
    stats.sort_stats("tottime").print_stats(15)
    return 0


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", nargs="*", choices=list(BENCHMARKS), help="benchmarks to run (default: all)")
    parser.add_argument("--repeat", type=int, default=3, help="timed runs per figure; the best is reported")
    parser.add_argument("--quick", action="store_true",
                        help="smoke run (CI): small sizes, one repeat, no targets judged")
    parser.add_argument("--markdown", action="store_true", help="print a Markdown table as well")
    parser.add_argument("--table", type=Path, default=None,
                        help="also write the Markdown table, with the machine and command, to this file")
    parser.add_argument("--profile", action="store_true",
                        help="instead: cProfile one solve of the 200-case batch, with the shares of its parts")
    args = parser.parse_args(argv)
    if args.profile:
        return profile_batch()
    names = args.only or list(BENCHMARKS)
    print("\n".join(machine()))
    command = "python " + " ".join([Path(sys.argv[0]).as_posix()] + (argv if argv is not None else sys.argv[1:]))
    print("command: " + command)
    warm_up()
    ctx, rows = {"quick": args.quick}, []
    repeat = 1 if args.quick else args.repeat
    for name in names:
        t0 = time.perf_counter()
        new = BENCHMARKS[name](ctx, repeat)
        rows += new
        for label, value, unit, target in new:
            verdict = "" if target is None or args.quick else ("  target <= %s: %s" % (fmt(target), "met" if value <= target else "MISSED"))
            print(f"{label:70s} {fmt(value):>14s} {unit:3s}{verdict}")
        print(f"[{name}: {time.perf_counter() - t0:.1f} s]")
    table = ["| figure | value | unit | target |", "| --- | ---: | --- | --- |"]
    table += [f"| {label} | {fmt(value)} | {unit} | {'' if target is None else '<= ' + fmt(target)} |"
              for label, value, unit, target in rows]
    if args.markdown:
        print("\n" + "\n".join(table))
    if args.table is not None:
        header = [f"- {line}" for line in machine()] + [f"- command: {command}", ""]
        args.table.write_text("\n".join(header + table) + "\n", encoding="utf-8")
        print(f"wrote {args.table}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
