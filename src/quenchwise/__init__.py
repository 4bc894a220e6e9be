"""quenchwise: quench hardening prediction for steel parts.

Data flow (one folder per stage):
    case.py -> steel/ -> thermal/ <-> kinetics/ -> hardness/ -> results.py -> plots.py, cli.py
"""

from importlib.metadata import PackageNotFoundError, version

try:
    __version__ = version("quenchwise")
except PackageNotFoundError:  # running from a source tree that was not installed
    __version__ = "0.0.0+unknown"

__all__ = ["__version__"]
