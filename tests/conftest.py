"""Shared test helpers: paths to the demo cases and a CLI runner."""

from pathlib import Path

import pytest
from typer.testing import CliRunner

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"


@pytest.fixture
def cases_dir() -> Path:
    return CASES


@pytest.fixture
def cli():
    """Invoke the quenchwise command line in-process: cli(args) -> (exit_code, stdout, stderr)."""
    from quenchwise.cli import app

    runner = CliRunner()

    def invoke(*args):
        r = runner.invoke(app, [str(a) for a in args])
        return r.exit_code, r.stdout, r.stderr

    return invoke
