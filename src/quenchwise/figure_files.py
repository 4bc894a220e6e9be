"""Which files a figure is written to: PNG by default, SVG and PDF on request (the commands'
--figures option), each file put in place atomically. No matplotlib import here: the option is
checked before anything heavy loads."""

from __future__ import annotations

from contextlib import contextmanager
from contextvars import ContextVar
from pathlib import Path

#: Formats a figure may be written in; PNG unless asked otherwise.
FIGURE_FORMATS = ("png", "svg", "pdf")
DEFAULT_FIGURE_FORMATS = ("png",)
_formats: ContextVar[tuple[str, ...]] = ContextVar("figure_formats", default=DEFAULT_FIGURE_FORMATS)
#: Fixed file metadata: no creation date, so the same input gives the same bytes.
_METADATA = {"png": None, "svg": {"Date": None}, "pdf": {"CreationDate": None}}


@contextmanager
def figure_formats(formats):
    """``with figure_formats(("png", "svg")):`` every figure written inside goes out in these
    formats (an empty tuple: no figure files at all).

    >>> with figure_formats(["svg", "pdf"]):
    ...     current_formats()
    ('svg', 'pdf')
    >>> current_formats()
    ('png',)
    """
    formats = tuple(formats)
    unknown = [f for f in formats if f not in FIGURE_FORMATS]
    if unknown:
        raise ValueError(f"figure formats {unknown}: allowed {', '.join(FIGURE_FORMATS)}")
    token = _formats.set(formats)
    try:
        yield formats
    finally:
        _formats.reset(token)


def current_formats() -> tuple[str, ...]:
    return _formats.get()


def save_figure(fig, out_dir: Path, stem: str, dpi: int = 130) -> list[Path]:
    """Write the figure once per requested format (figure_formats), each file atomically, then
    close it; the paths written."""
    import matplotlib.pyplot as plt

    paths = []
    for ext in _formats.get():
        p = Path(out_dir) / f"{stem}.{ext}"
        tmp = p.with_name(f".{p.name}.part")
        fig.savefig(tmp, dpi=dpi, format=ext, metadata=_METADATA[ext])
        tmp.replace(p)
        paths.append(p)
    plt.close(fig)
    return paths
