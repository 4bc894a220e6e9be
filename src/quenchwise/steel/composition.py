"""Steel chemistry in wt%, with hard limits (errors) and model ranges (warnings)."""

from __future__ import annotations

import math
from dataclasses import dataclass, fields, replace

from ..errors import InputError

#: Elements the models use, in wt%.
ELEMENTS = ("c", "mn", "si", "ni", "cr", "mo", "cu", "v", "w")

#: Largest value accepted per element (wt%): beyond it the steel is not one these models address.
HARD_LIMIT = {"c": 2.1, "mn": 3.0, "si": 3.0, "ni": 10.0, "cr": 12.0, "mo": 2.0, "cu": 2.0, "v": 1.0, "w": 3.0}

#: Composition range of the steels behind the Li et al. (1998) / Kirkaldy & Venugopalan (1983)
#: fits, per element (wt%) (memory: low-alloy steels of the isothermal transformation atlases).
#: Outside it the result carries a warning; it is not an error.
MODEL_RANGE = {
    "c": (0.10, 1.10), "mn": (0.20, 2.00), "si": (0.0, 1.00), "ni": (0.0, 3.50), "cr": (0.0, 2.00),
    "mo": (0.0, 0.70), "cu": (0.0, 0.50), "v": (0.0, 0.20), "w": (0.0, 0.50),
}


@dataclass(frozen=True)
class Composition:
    """Chemistry of one steel heat in wt% (iron is the balance).

    >>> Composition(c=0.40, mn=0.85, cr=0.95, mo=0.20).cr
    0.95
    """

    c: float
    mn: float = 0.0
    si: float = 0.0
    ni: float = 0.0
    cr: float = 0.0
    mo: float = 0.0
    cu: float = 0.0
    v: float = 0.0
    w: float = 0.0

    def __post_init__(self) -> None:
        total = 0.0
        for f in fields(self):
            value = getattr(self, f.name)
            if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
                raise InputError(f"steel.{f.name}", value, "a finite number in wt%")
            if not 0.0 <= value <= HARD_LIMIT[f.name]:
                raise InputError(f"steel.{f.name}", value, f"a number from 0 to {HARD_LIMIT[f.name]} (wt%)")
            object.__setattr__(self, f.name, float(value))
            total += value
        if total > 100.0:  # unreachable with the limits above; kept because the rule is the physics
            raise InputError("steel", total, "a total of alloying elements at most 100 wt%")

    def as_dict(self) -> dict[str, float]:
        return {name: getattr(self, name) for name in ELEMENTS}

    def with_carbon(self, carbon: float) -> "Composition":
        """The same alloy with another carbon content (e.g. the carbon dissolved in austenite)."""
        return replace(self, c=min(max(carbon, 0.0), HARD_LIMIT["c"]))

    def range_warnings(self) -> list[str]:
        """Elements outside the range the kinetics models were fitted on.

        >>> print(*Composition(c=0.4, mn=0.7, mo=1.2).range_warnings())
        mo = 1.2 wt% is outside the kinetics models' range 0-0.7 wt%; treat results as extrapolation
        """
        out = []
        for name, (lo, hi) in MODEL_RANGE.items():
            value = getattr(self, name)
            if value < lo or value > hi:
                out.append(
                    f"{name} = {value:g} wt% is outside the kinetics models' range {lo:g}-{hi:g} wt%; "
                    "treat results as extrapolation"
                )
        return out
