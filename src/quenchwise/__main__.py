"""`python -m quenchwise ...` runs the command line (same as the `quenchwise` script)."""

from .cli import app

app(prog_name="quenchwise")
