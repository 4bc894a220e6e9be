"""quenchwise: quench hardening prediction for steel parts.

Data flow (one folder per stage):
    case.py -> steel/ -> thermal/ <-> kinetics/ -> hardness/ -> results.py -> plots.py, cli.py
"""

__all__ = ["__version__"]


def __getattr__(name: str):
    # The version is looked up on first use, so importing the package stays instant (the command
    # line installs its signal handlers right after it).
    if name != "__version__":
        raise AttributeError(name)
    from .version import __version__

    globals()["__version__"] = __version__
    return __version__
