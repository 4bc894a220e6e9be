"""The installed version, looked up once (a leaf module: the writers and the command line use it)."""

from importlib.metadata import PackageNotFoundError, version

try:
    __version__ = version("quenchwise")
except PackageNotFoundError:  # running from a source tree that was not installed
    __version__ = "0.0.0+unknown"
