"""The one place numbers are rounded and formatted for output (summaries, JSON, CSV cells, text)."""

from __future__ import annotations

import math


def rounded(v, nd: int = 3):
    """v rounded to nd decimals as a float, None where there is no value (None, NaN, infinite):
    JSON and the summaries show null, never NaN.

    >>> rounded(3.14159, 2), rounded(float("nan"), 1), rounded(None)
    (3.14, None, None)
    """
    return None if v is None or not math.isfinite(v) else round(float(v), nd)


def fmt(v, pattern: str = "{:.1f}") -> str:
    """A number with the pattern, or '-' for a missing value (text output).

    >>> fmt(None), fmt(3.14159, "{:.2f}")
    ('-', '3.14')
    """
    return "-" if v is None else pattern.format(v)


def csv_cell(v, pattern: str) -> str:
    """A CSV cell: the number with the pattern, empty where it is NaN or infinite.

    >>> csv_cell(2.5, "{:.1f}"), csv_cell(float("nan"), "{:.1f}")
    ('2.5', '')
    """
    return pattern.format(v) if math.isfinite(v) else ""
