"""benchmarks/commands.py times every command on its demo case: none may be left out, and every
demo file it names must exist (the timing itself is a benchmark, not a test)."""

import importlib.util
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def _commands_module():
    spec = importlib.util.spec_from_file_location("bench_commands", ROOT / "benchmarks" / "commands.py")
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module          # its dataclasses look their module up there
    spec.loader.exec_module(module)
    return module


def test_every_cli_command_has_a_timed_demo():
    from quenchwise.cli import app

    names = {c.name or c.callback.__name__.replace("_", "-") for c in app.registered_commands}
    timed = {c.args[0] for c in _commands_module().COMMANDS}
    assert names <= timed, sorted(names - timed)


def test_demo_files_exist_and_targets_are_those_of_the_issue():
    bench = _commands_module()
    for c in bench.COMMANDS:
        for a in c.args:
            if a.startswith("cases/"):
                assert (ROOT / a).is_file(), a
    targets = {c.name: c.target for c in bench.COMMANDS if c.target is not None}
    # issue 18: run and compare within 2.0 times the bare import, jominy (DI search) and size 5.0.
    assert targets == {"run": 2.0, "compare": 2.0, "jominy": 5.0, "size": 5.0}
    assert set(bench.QUICK) <= {c.name for c in bench.COMMANDS}
