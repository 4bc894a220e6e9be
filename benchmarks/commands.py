"""Every command on its demo case, timed as a separate process beside the bare library import.

    python benchmarks/commands.py                  # every command, best of 3, ratio table
    python benchmarks/commands.py --repeat 5 --only run compare
    python benchmarks/commands.py --quick          # 4 commands, one repeat (CI smoke run)
    python benchmarks/run_all.py --only commands   # the same through the harness

What an engineer waits for is the whole process: interpreter start, imports, the solve, the files
and figures. So each command runs as its own process (`python -m quenchwise ...`, the entry point's
code) into a fresh output folder, and so does the bare process that only imports the libraries
every command needs (FiPy, matplotlib.pyplot, h5py). The rounds are interleaved (bare, then every
command, then again), so a change of load on a shared machine reaches all of them alike; the best
wall time of the rounds is reported, with the CPU time of that process (user + system, from
resource.getrusage of the children) beside it. Ratio = best wall time of the command / best wall
time of the bare import in the same run.

Targets (issue 18): run and compare at most 2.0 times the bare import, jominy with its DI search
and size at most 5.0 times.
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"
BARE = ("bare import", ["-c", "import fipy, matplotlib.pyplot, h5py"], None)


@dataclass(frozen=True)
class Command:
    name: str
    args: tuple          # after `python -m quenchwise`; "{out}" is replaced by a fresh folder
    target: float | None = None


#: The demo case of every command (README and cases/).
COMMANDS = (
    Command("run", ("run", "cases/shaft_water.toml", "--out", "{out}"), 2.0),
    Command("compare", ("compare", "cases/axle_oil_vs_polymer.toml", "--out", "{out}"), 2.0),
    Command("size", ("size", "cases/pin_sizing.toml", "--out", "{out}"), 5.0),
    Command("band", ("band", "cases/pin_sizing.toml", "--out", "{out}")),
    Command("jominy", ("jominy", "cases/pin_heat_4711.toml", "--out", "{out}"), 5.0),
    Command("jominy --no-physics-di", ("jominy", "cases/pin_heat_4711.toml", "--no-physics-di", "--out", "{out}")),
    Command("sheet", ("sheet", "cases/shaft_water.toml", "--out", "{out}")),
    Command("diagram --kind ttt", ("diagram", "cases/spring_pin_eutectoid.toml", "--kind", "ttt", "--out", "{out}")),
    Command("diagram --kind cct", ("diagram", "cases/spring_pin_eutectoid.toml", "--kind", "cct", "--out", "{out}")),
    Command("quenchants", ("quenchants",)),
    Command("quenchants NAME", ("quenchants", "oil_conventional_60c_still", "--out", "{out}")),
    Command("probe", ("probe", "cases/probe_record_tank3.csv", "--out", "{out}")),
    Command("fit-tank", ("fit-tank", "cases/test_bar_tank2.toml", "cases/test_bar_tank2_traverse.csv", "--out", "{out}")),
    Command("steels", ("steels",)),
)
#: The CI smoke run: short commands only.
QUICK = ("run", "compare", "quenchants", "steels")


def _children_cpu() -> float:
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime


def run_process(argv: list[str], cwd: Path) -> tuple[float, float]:
    """(wall time, CPU time) of one process; stops with its stderr if it fails."""
    c0, t0 = _children_cpu(), time.perf_counter()
    done = subprocess.run(argv, cwd=cwd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    wall, cpu = time.perf_counter() - t0, _children_cpu() - c0
    if done.returncode != 0:
        raise SystemExit(f"{' '.join(argv)} failed with status {done.returncode}:\n{done.stderr}")
    return wall, cpu


def command_line(command: Command) -> str:
    return "quenchwise " + " ".join(a.replace("{out}", "DIR") for a in command.args)


def time_commands(names=None, repeat: int = 3, quick: bool = False) -> list[dict]:
    """One row per command (the bare import first): best wall time, its CPU time, the ratio to
    the bare import, the target. Rounds are interleaved (module docstring)."""
    chosen = [c for c in COMMANDS if (names is None or c.name in names) and (not quick or c.name in QUICK)]
    python = sys.executable
    best: dict[str, tuple[float, float]] = {}
    with tempfile.TemporaryDirectory(prefix="qw-bench-") as tmp:
        for round_ in range(repeat):
            jobs = [(BARE[0], [python, *BARE[1]])]
            for c in chosen:
                out = str(Path(tmp) / f"{c.name.replace(' ', '_')}-{round_}")
                jobs.append((c.name, [python, "-m", "quenchwise", *(a.replace("{out}", out) for a in c.args)]))
            for name, argv in jobs:
                wall, cpu = run_process(argv, ROOT)
                if name not in best or wall < best[name][0]:
                    best[name] = (wall, cpu)
    bare = best[BARE[0]][0]
    rows = [{"command": "python -c 'import fipy, matplotlib.pyplot, h5py'", "name": BARE[0], "wall_s": bare,
             "cpu_s": best[BARE[0]][1], "ratio": 1.0, "target": None}]
    for c in chosen:
        wall, cpu = best[c.name]
        rows.append({"command": command_line(c), "name": c.name, "wall_s": wall, "cpu_s": cpu,
                     "ratio": wall / bare, "target": c.target})
    return rows


def markdown(rows: list[dict]) -> list[str]:
    out = ["| command (demo case) | wall s | CPU s | / bare import | target |", "| --- | ---: | ---: | ---: | --- |"]
    for r in rows:
        verdict = "" if r["target"] is None else f"<= {r['target']:g}: {'met' if r['ratio'] <= r['target'] else 'missed'}"
        out.append(f"| `{r['command']}` | {r['wall_s']:.2f} | {r['cpu_s']:.2f} | {r['ratio']:.2f} | {verdict} |")
    return out


def benchmark_rows(repeat: int, quick: bool) -> list[tuple]:
    """The rows of run_all.py's `commands` benchmark: (figure, value, unit, target)."""
    rows = time_commands(repeat=repeat, quick=quick)
    out = [(f"(p) bare import process (fipy, matplotlib.pyplot, h5py): wall time", rows[0]["wall_s"], "s", None)]
    for r in rows[1:]:
        out += [(f"(p) {r['command']}: wall time / bare import", r["ratio"], "", r["target"]),
                (f"(p) ... wall time / CPU time", f"{r['wall_s']:.2f} / {r['cpu_s']:.2f}", "s", None)]
    return out


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", nargs="*", choices=[c.name for c in COMMANDS], metavar="NAME",
                        help="commands to time (default: all): " + ", ".join(c.name for c in COMMANDS))
    parser.add_argument("--repeat", type=int, default=3, help="interleaved rounds; the best is reported")
    parser.add_argument("--quick", action="store_true", help="CI smoke run: " + ", ".join(QUICK) + ", one round")
    args = parser.parse_args(argv)
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(f"nproc {os.cpu_count()}, load average at start {load:.2f}, {time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())}")
    rows = time_commands(args.only, 1 if args.quick else args.repeat, args.quick)
    print("\n".join(markdown(rows)))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
