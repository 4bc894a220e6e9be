"""Steel chemistry in wt%, with hard limits (errors) and model ranges (warnings)."""

from __future__ import annotations

import math
from dataclasses import dataclass, fields, replace

from ..errors import InputError

#: Elements the models use, in wt%.
ELEMENTS = ("c", "mn", "si", "ni", "cr", "mo", "cu", "v", "w", "b")

#: Largest value accepted per element (wt%): beyond it the steel is not one these models address.
HARD_LIMIT = {"c": 2.1, "mn": 3.0, "si": 3.0, "ni": 10.0, "cr": 12.0, "mo": 2.0, "cu": 2.0, "v": 1.0, "w": 3.0,
              # Boron: boron-treated steels carry 0.0005-0.003 wt% (SAE J1268 / J404 B grades, memory);
              # above about 0.01 wt% boron embrittles the steel (ASM Handbook Vol. 4D, heat treating
              # of boron steels, memory), so larger values are refused as a likely unit slip (ppm).
              "b": 0.01}

#: Composition range (wt%) of the steels each correlation was fitted on, per element. Outside it a
#: result carries a warning; it is not an error. All limits are recalled (memory) and approximate:
#:
#: * li1998 -- Li, Niebuhr, Meekisho & Atteridge (1998), Metall. Mater. Trans. B 29B, 661: refitted on
#:   the isothermal diagrams of carbon and low-alloy steels of the published atlases; the paper says
#:   it widened the composition range of the earlier model (memory).
#: * kirkaldy1983 -- Kirkaldy & Venugopalan (1983), Phase Transformations in Ferrous Alloys,
#:   TMS-AIME, 125: low-alloy steels of the same atlases, most reliable for the less hardenable
#:   ones (memory); the same limits are used.
#: * andrews1965 -- Andrews (1965), J. Iron Steel Inst. 203, 721: Ae1, Ae3 and Ms fitted on steels
#:   below about 0.6 %C (memory); above it the formulas are extrapolated. Alloy limits of his data set
#:   reach beyond our hard limits for Mn and Mo; they are capped at those.
MODEL_RANGES = {
    "li1998": {"c": (0.10, 1.10), "mn": (0.20, 2.00), "si": (0.0, 1.00), "ni": (0.0, 3.50), "cr": (0.0, 2.00),
               "mo": (0.0, 0.70), "cu": (0.0, 0.50), "v": (0.0, 0.20), "w": (0.0, 0.50),
               "b": (0.0, 0.005)},
    "kirkaldy1983": {"c": (0.10, 1.10), "mn": (0.20, 2.00), "si": (0.0, 1.00), "ni": (0.0, 3.50),
                     "cr": (0.0, 2.00), "mo": (0.0, 0.70), "cu": (0.0, 0.50), "v": (0.0, 0.20), "w": (0.0, 0.50),
                     "b": (0.0, 0.005)},
    "andrews1965": {"c": (0.0, 0.60), "mn": (0.0, 3.0), "si": (0.0, 1.5), "ni": (0.0, 5.0), "cr": (0.0, 4.5),
                    "mo": (0.0, 2.0)},
}
# The multi-grade correction (kinetics/multigrade.py) fades to the published laws outside its own
# narrower fitted range, so the published model's range applies to it as well.
MODEL_RANGES["li1998-multigrade"] = MODEL_RANGES["li1998"]
MODEL_LABELS = {
    "li1998": "the Li et al. (1998) kinetics",
    "li1998-multigrade": "the Li et al. (1998) kinetics",
    "kirkaldy1983": "the Kirkaldy & Venugopalan (1983) kinetics",
    "andrews1965": "the Andrews (1965) critical-temperature formulas",
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
    b: float = 0.0      # boron; its effect on the kinetics: kinetics/boron.py

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

    def range_warnings(self, model: str = "li1998") -> list[str]:
        """Elements outside the fitted range of the kinetics model and of the Andrews formulas.

        model: a key of MODEL_RANGES ("li1998", "kirkaldy1983"); any other name ("none")
        checks the critical-temperature formulas only.

        >>> print(*Composition(c=0.4, mn=0.7, mo=1.2).range_warnings())
        mo = 1.2 wt% is outside the range of the Li et al. (1998) kinetics (0-0.7 wt%); treat results as extrapolation
        >>> len(Composition(c=0.8, mn=0.7).range_warnings("none"))
        1
        """
        out = []
        for key in ((model,) if model in MODEL_RANGES else ()) + ("andrews1965",):
            for name, (lo, hi) in MODEL_RANGES[key].items():
                value = getattr(self, name)
                if value < lo or value > hi:
                    out.append(f"{name} = {value:g} wt% is outside the range of {MODEL_LABELS[key]} "
                               f"({lo:g}-{hi:g} wt%); treat results as extrapolation")
        return out
