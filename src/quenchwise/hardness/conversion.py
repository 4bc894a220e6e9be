"""Conversion between hardness scales by interpolation in the ASTM E140 table for
non-austenitic steels (astm_e140.csv, values recalled from the standard: memory).

Outside a scale's range the result is NaN: never extrapolated. Callers report such values in
a scale where they are valid (HV always is).
"""

from __future__ import annotations

from ..csvmeta import commented_csv_dicts
from functools import lru_cache
from importlib import resources

import numpy as np


@lru_cache(maxsize=1)
def _table() -> dict[str, np.ndarray]:
    text = (resources.files("quenchwise.hardness") / "astm_e140.csv").read_text("utf-8")
    rows = commented_csv_dicts(text)
    return {k: np.array([float(r[k]) if r[k] else np.nan for r in rows]) for k in ("hv", "hrc", "hb", "hrb")}


def _convert(values, src: str, dst: str):
    t = _table()
    ok = ~np.isnan(t[src]) & ~np.isnan(t[dst])
    x, y = t[src][ok], t[dst][ok]
    v = np.asarray(values, dtype=float)
    out = np.interp(v, x, y)
    return np.where((v >= x[0]) & (v <= x[-1]), out, np.nan)


def hrc_from_hv(hv):
    """Rockwell C from Vickers (ASTM E140, memory); NaN outside HRC 20-68.

    Covers HRC 20-68 (the table's Rockwell C range); NaN outside, never extrapolated.

    Parameters
    ----------
    hv : float or array_like
        Vickers hardness [HV].

    Returns
    -------
    float or numpy.ndarray
        Rockwell C hardness [HRC], NaN outside the table.

    >>> float(hrc_from_hv(513.0)), bool(np.isnan(hrc_from_hv(200.0)))
    (50.0, True)
    """
    return _convert(hv, "hv", "hrc")


def hv_from_hrc(hrc):
    """Vickers from Rockwell C (ASTM E140, memory); NaN outside HRC 20-68.

    Covers HRC 20-68 (the table's Rockwell C range); NaN outside, never extrapolated.

    Parameters
    ----------
    hrc : float or array_like
        Rockwell C hardness [HRC].

    Returns
    -------
    float or numpy.ndarray
        Vickers hardness [HV], NaN outside the table.

    >>> float(hv_from_hrc(60.0))
    697.0
    """
    return _convert(hrc, "hrc", "hv")


def hb_from_hv(hv):
    """Brinell (10 mm carbide ball, 3000 kgf) from Vickers (ASTM E140, memory); NaN outside its range.

    Parameters
    ----------
    hv : float or array_like
        Vickers hardness [HV].

    Returns
    -------
    float or numpy.ndarray
        Brinell hardness [HB], NaN outside the table.

    >>> bool(np.isfinite(hb_from_hv(300.0)))
    True
    """
    return _convert(hv, "hv", "hb")


def hv_from_hb(hb):
    """Vickers from Brinell (10 mm carbide ball, 3000 kgf; ASTM E140, memory); NaN outside the table.

    Covers the table's Brinell range; NaN outside, never extrapolated.

    Parameters
    ----------
    hb : float or array_like
        Brinell hardness [HB].

    Returns
    -------
    float or numpy.ndarray
        Vickers hardness [HV], NaN outside the table.

    >>> float(hv_from_hb(226.0)), float(hv_from_hb(131.0))
    (238.0, 131.0)
    """
    return _convert(hb, "hb", "hv")


def hrb_from_hv(hv):
    """Rockwell B from Vickers (ASTM E140, memory); NaN above HRB 100 or below the table.

    Parameters
    ----------
    hv : float or array_like
        Vickers hardness [HV].

    Returns
    -------
    float or numpy.ndarray
        Rockwell B hardness [HRB], NaN outside the table.

    >>> bool(np.isnan(hrb_from_hv(500.0)))
    True
    """
    return _convert(hv, "hv", "hrb")
