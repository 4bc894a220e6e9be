"""`python -m quenchwise ...` runs the command line (same as the `quenchwise` script)."""

from .cli import entry

entry()
