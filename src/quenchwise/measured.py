"""Measured hardness curves from the shop: a heat's end-quench curve (``[steel] measured_jominy``)
and a hardness traverse of a cut section (``fit-tank``).

CSV with a header row; the first column is the position (end-quench: ``distance_mm`` or
``distance_sixteenths``; traverse: ``depth_mm``), then ``hrc``; an optional ``hrb`` column takes
readings below the C scale (a row gives hrc or hrb). Lines starting with '#' are comments.

Checks (one InputError line each, nothing written): at least MIN_READINGS readings; positions
increasing; HRC 0-70, HRB 0-100; hardness that rises with the position by more than the test's
scatter (SCATTER_HRC) is refused, because a quenched bar only softens inward / away from the end.
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .errors import InputError
from .hardness.conversion import _convert, hrc_from_hv, hv_from_hrc

MIN_READINGS = 4
#: Scatter of Rockwell C readings on one test bar / section [HRC]: about +/-1 HRC within a
#: laboratory and up to 2 HRC between laboratories on end-quench bars (ASTM A255 precision
#: statement, memory). A rise by more than this is a reading error or a mixed-up column.
SCATTER_HRC = 2.0
SIXTEENTH_MM = 25.4 / 16.0


def csv_rows(path: str | Path, key: str) -> list[list[str]]:
    """The rows of a small CSV file (UTF-8, a byte-order mark allowed), blank and "#" lines left out;
    an unreadable file is an InputError naming the key and the file."""
    try:
        text = Path(path).read_text("utf-8-sig")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(key, str(path), f"a readable UTF-8 CSV file ({type(exc).__name__})") from None
    return list(csv.reader(ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")))


def numeric_rows(rows, key: str, path, allowed: str, scale_mm: float):
    """The data rows of a distance-and-two-readings CSV (measured curves, end-quench bands):
    (row, distance [mm], second, third), empty cells as None; one line, exit 2, for a row that is
    not numbers."""
    for row in rows:
        cells = [c.strip() for c in row] + ["", ""]
        try:
            yield (row, float(cells[0]) * scale_mm, float(cells[1]) if cells[1] else None,
                   float(cells[2]) if cells[2] else None)
        except ValueError:
            raise InputError(key, str(path), allowed + f"; row {row!r} is not numbers") from None

def hrc_scale(hv):
    """HRC on an extended scale [HRC]: ASTM E140 within HRC 20-68, continued linearly in HV beyond
    (so softer readings still count in a fit, in HRC-sized steps).

    >>> [round(float(v), 1) for v in hrc_scale([513.0, 238.0, 200.0])]
    [50.0, 20.0, 12.4]
    """
    hv = np.asarray(hv, dtype=float)
    lo_hv, lo_next = float(hv_from_hrc(20.0)), float(hv_from_hrc(21.0))
    hi_hv, hi_prev = float(hv_from_hrc(68.0)), float(hv_from_hrc(67.0))
    out = hrc_from_hv(np.clip(hv, lo_hv, hi_hv))
    out = np.where(hv < lo_hv, 20.0 + (hv - lo_hv) / (lo_next - lo_hv), out)
    return np.where(hv > hi_hv, 68.0 + (hv - hi_hv) / (hi_hv - hi_prev), out)


def hv_from_scale(hrc):
    """Inverse of hrc_scale [HV] (HRC 0-70 in, extended beyond ASTM E140's HRC 20-68 linearly).

    >>> [round(float(v)) for v in hv_from_scale([50.0, 12.4])]
    [513, 200]
    """
    h = np.asarray(hrc, dtype=float)
    lo_hv, lo_next = float(hv_from_hrc(20.0)), float(hv_from_hrc(21.0))
    hi_hv, hi_prev = float(hv_from_hrc(68.0)), float(hv_from_hrc(67.0))
    out = hv_from_hrc(np.clip(h, 20.0, 68.0))
    out = np.where(h < 20.0, lo_hv + (h - 20.0) * (lo_next - lo_hv), out)
    return np.where(h > 68.0, hi_hv + (h - 68.0) * (hi_hv - hi_prev), out)


@dataclass(frozen=True)
class MeasuredCurve:
    """Readings along a bar or section: position [mm], hardness as HV and on the HRC scale."""

    source: str
    position_mm: np.ndarray
    hrc: np.ndarray             # extended HRC scale (hrc_scale), HRB readings converted
    hv: np.ndarray
    scale: tuple                # "HRC" / "HRB" per reading, as measured

    @property
    def n(self) -> int:
        return int(self.position_mm.size)


def read_measured(path: str | Path, key: str, columns: tuple[str, ...], max_mm: float = 100.0) -> MeasuredCurve:
    """Read a measured curve (module docstring); errors name the key, the file and what is allowed."""
    allowed = (f"a CSV with a header row {' or '.join(columns)}, hrc (optional hrb column for readings below "
               f"HRC 20) and at least {MIN_READINGS} readings")
    rows = csv_rows(path, key)
    if not rows:
        raise InputError(key, str(path), allowed)
    header = [h.strip().lower() for h in rows[0]]
    if len(header) < 2 or header[0] not in columns or header[1] != "hrc" or (len(header) > 2 and header[2] not in ("hrb", "")):
        raise InputError(key, str(path), allowed + f"; header is {','.join(header)}")
    scale_mm = SIXTEENTH_MM if header[0] == "distance_sixteenths" else 1.0
    pos, hrc, scales = [], [], []
    for row, x, c, b in numeric_rows(rows[1:], key, path, allowed, scale_mm):
        if (c is None) == (b is None):
            raise InputError(key, str(path), allowed + f"; row {row!r} needs one reading, hrc or hrb")
        if not (math.isfinite(x) and 0.0 <= x <= max_mm):
            raise InputError(key, str(path), allowed + f"; row {row!r}: position from 0 to {max_mm:g} mm")
        if c is not None and not (math.isfinite(c) and 0.0 <= c <= 70.0):
            raise InputError(key, str(path), f"HRC readings from 0 to 70; row {row!r} has {c:g}")
        if b is not None and not (math.isfinite(b) and 0.0 <= b <= 100.0):
            raise InputError(key, str(path), f"HRB readings from 0 to 100; row {row!r} has {b:g}")
        if b is not None:
            hv_b = float(_convert(b, "hrb", "hv"))
            if not math.isfinite(hv_b):
                raise InputError(key, str(path), f"HRB readings within the ASTM E140 table; row {row!r} has {b:g}")
            c = float(hrc_scale(hv_b))
        pos.append(x)
        hrc.append(c)
        scales.append("HRB" if b is not None else "HRC")
    if len(pos) < MIN_READINGS:
        raise InputError(key, str(path), allowed + f"; it has {len(pos)}")
    p, h = np.array(pos), np.array(hrc)
    if np.any(np.diff(p) <= 0.0):
        i = int(np.flatnonzero(np.diff(p) <= 0.0)[0]) + 1
        raise InputError(key, str(path), f"positions that increase row by row; {p[i]:g} mm follows {p[i - 1]:g} mm")
    rise = h - np.minimum.accumulate(h)
    if np.any(rise > SCATTER_HRC):
        i = int(np.argmax(rise > SCATTER_HRC))
        raise InputError(key, str(path), f"hardness that does not rise with distance by more than the test's "
                         f"scatter ({SCATTER_HRC:g} HRC); at {p[i]:g} mm it is {rise[i]:.1f} HRC above a reading before it")
    return MeasuredCurve(str(path), p, h, hv_from_scale(h), tuple(scales))


def read_measured_jominy(path: str | Path, key: str = "steel.measured_jominy") -> MeasuredCurve:
    """A heat's end-quench curve (distance from the quenched end, ASTM A255 / ISO 642)."""
    return read_measured(path, key, ("distance_mm", "distance_sixteenths"), max_mm=100.0)


def read_traverse(path: str | Path, key: str = "TRAVERSE") -> MeasuredCurve:
    """A hardness traverse of a cut section: depth below the quenched surface [mm]."""
    return read_measured(path, key, ("depth_mm",), max_mm=2000.0)
