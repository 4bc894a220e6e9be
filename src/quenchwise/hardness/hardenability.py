"""Ideal critical diameter DI from composition (ASTM A255 multiplying factors).

DI is the diameter of the bar whose centre holds 50 % martensite after a quench of infinite
severity (Grossmann). ASTM A255 computes it as a base DI from carbon (at ASTM grain size 7)
times one multiplying factor per alloying element (values recalled from the standard: memory):

    base DI [in] = 0.54 C                              C <= 0.39
                   0.171 + 0.001 C + 0.265 C^2         0.39 < C <= 0.55
                   0.115 + 0.268 C - 0.038 C^2         0.55 < C <= 0.65
                   0.143 + 0.2 C                       0.65 < C <= 0.75
                   0.062 + 0.409 C - 0.135 C^2         0.75 < C <= 0.90
    Mn: 1 + 3.3333 Mn (Mn <= 1.20), 5.10 Mn - 1.12 (1.20 < Mn <= 1.95)
    Si: 1 + 0.7 Si;  Ni: 1 + 0.3636 Ni (Ni <= 1.5);  Cr: 1 + 2.16 Cr;  Mo: 1 + 3.0 Mo;
    Cu: 1 + 0.365 Cu;  V: 1 + 1.73 V                  (all wt%)

Boron (b > 0): times the A255 boron factor of steel/boron.py (carbon and alloy factor, memory).

Outside the ranges above the same expressions are used and the result says so (``notes``).
Reference: ASTM A255, Standard Test Methods for Determining Hardenability of Steel, the
calculation of DI from composition (memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..steel.boron import a255_boron_factor

METRES_PER_INCH = 0.0254
#: Ranges of the factors (wt%) as the standard states them (memory); beyond them: extrapolated.
A255_RANGES = {"c": (0.0, 0.90), "mn": (0.0, 1.95), "si": (0.0, 2.0), "ni": (0.0, 1.5), "cr": (0.0, 2.5),
               "mo": (0.0, 0.55), "cu": (0.0, 0.55), "v": (0.0, 0.2)}


def a255_base_di_in(c):
    """Base ideal diameter from carbon at grain size 7 [in] (ASTM A255, memory); C in wt%.

    >>> [round(float(a255_base_di_in(c)), 4) for c in (0.20, 0.405, 0.60, 0.80)]
    [0.108, 0.2149, 0.2621, 0.3028]
    """
    c = np.asarray(c, dtype=float)
    return np.select(
        [c <= 0.39, c <= 0.55, c <= 0.65, c <= 0.75],
        [0.54 * c, 0.171 + 0.001 * c + 0.265 * c * c, 0.115 + 0.268 * c - 0.038 * c * c, 0.143 + 0.2 * c],
        0.062 + 0.409 * c - 0.135 * c * c,
    )


def a255_factors(mn=0.0, si=0.0, ni=0.0, cr=0.0, mo=0.0, cu=0.0, v=0.0) -> dict:
    """Multiplying factor of each element (ASTM A255, memory); elements in wt%.

    >>> {k: round(float(f), 3) for k, f in a255_factors(mn=0.875, si=0.25, cr=0.95, mo=0.2).items()}
    {'mn': 3.917, 'si': 1.175, 'ni': 1.0, 'cr': 3.052, 'mo': 1.6, 'cu': 1.0, 'v': 1.0}
    """
    mn = np.asarray(mn, dtype=float)
    return {
        "mn": np.where(mn <= 1.20, 1.0 + 3.3333 * mn, 5.10 * mn - 1.12),
        "si": 1.0 + 0.7 * np.asarray(si, dtype=float),
        "ni": 1.0 + 0.3636 * np.asarray(ni, dtype=float),
        "cr": 1.0 + 2.16 * np.asarray(cr, dtype=float),
        "mo": 1.0 + 3.0 * np.asarray(mo, dtype=float),
        "cu": 1.0 + 0.365 * np.asarray(cu, dtype=float),
        "v": 1.0 + 1.73 * np.asarray(v, dtype=float),
    }


@dataclass(frozen=True)
class IdealDiameter:
    """A DI with its basis: value in inches and mm, and notes (extrapolation, grain size)."""

    inches: float
    method: str
    notes: tuple[str, ...] = ()

    @property
    def mm(self) -> float:
        return self.inches * METRES_PER_INCH * 1000.0

    def as_dict(self) -> dict:
        return {"in": round(self.inches, 3), "mm": round(self.mm, 1), "method": self.method,
                "notes": list(self.notes)}


def a255_ideal_diameter(composition) -> IdealDiameter:
    """DI of a chemistry (anything with c, mn, si, ni, cr, mo, cu, v attributes in wt%).

    Grain size 7 basis (the standard's base). A 4140 chemistry gives about 4.8 in
    (check value 4.5-5 in, DOMAIN.md section 3, memory).

    >>> from quenchwise.steel import Composition
    >>> round(a255_ideal_diameter(Composition(c=0.405, mn=0.875, si=0.25, cr=0.95, mo=0.2)).inches, 2)
    4.83
    >>> round(a255_ideal_diameter(Composition(c=0.35, mn=0.95, si=0.25, b=0.002)).inches, 2)   # 15B35H-type
    2.07
    """
    e = {k: float(getattr(composition, k, 0.0)) for k in ("c", "mn", "si", "ni", "cr", "mo", "cu", "v")}
    di = float(a255_base_di_in(e["c"]))
    alloy = 1.0
    for name, f in a255_factors(**{k: v for k, v in e.items() if k != "c"}).items():
        alloy *= float(f)
    di *= alloy
    b = float(getattr(composition, "b", 0.0))
    if b > 0:
        di *= float(a255_boron_factor(e["c"], b, alloy_factor=alloy / float(a255_factors(v=e["v"])["v"])))
    notes = [f"{k} = {e[k]:g} wt% is outside the A255 factor range {lo:g}-{hi:g}: extrapolated"
             for k, (lo, hi) in A255_RANGES.items() if not lo <= e[k] <= hi]
    if float(getattr(composition, "w", 0.0)) > 0:
        notes.append("tungsten has no A255 factor: not counted")
    return IdealDiameter(di, "ASTM A255 multiplying factors, grain size 7 (memory)", tuple(notes))
