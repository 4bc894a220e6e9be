"""quenchwise: quench hardening prediction for steel parts.

Python API (see README, "Python API"): load_case, simulate, compare, size, band, jominy, Result.

Data flow (one folder per stage):
    case.py -> steel/ -> thermal/ <-> kinetics/ -> hardness/ -> results.py -> plots.py, cli.py
"""

#: The public API (quenchwise.api), loaded on first use.
API = ("load_case", "simulate", "compare", "size", "band", "jominy", "Result", "Case")

__all__ = ["__version__", *API]


def __getattr__(name: str):
    # Everything is looked up on first use, so importing the package stays instant (the command
    # line installs its signal handlers right after it) and loads no FiPy nor matplotlib.
    if name == "__version__":
        from .version import __version__ as value
    elif name in API:
        from . import api

        value = getattr(api, name)
    else:
        raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
    globals()[name] = value
    return value
