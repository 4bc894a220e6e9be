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
    from importlib.metadata import PackageNotFoundError, version

    try:
        value = version("quenchwise")
    except PackageNotFoundError:  # running from a source tree that was not installed
        value = "0.0.0+unknown"
    globals()["__version__"] = value
    return value
