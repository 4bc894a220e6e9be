"""Hardness: per-phase hardness from chemistry and cooling rate, mixed by fraction, converted
between scales; the equivalent end-quench distance of a cooling rate."""

from .conversion import hb_from_hv, hrb_from_hv, hrc_from_hv, hv_from_hb, hv_from_hrc
from .jominy_equivalent import equivalent_jominy_distance_mm
from .phases import (
    ferrite_pearlite_hv,
    hardness_hv,
    maynier_bainite_hv,
    maynier_ferrite_pearlite_hv,
    maynier_martensite_hv,
    mixture_hv,
    pearlite_eutectoid_hv,
)

__all__ = ["hardness_hv", "maynier_bainite_hv", "maynier_ferrite_pearlite_hv", "maynier_martensite_hv",
           "ferrite_pearlite_hv", "pearlite_eutectoid_hv", "mixture_hv", "equivalent_jominy_distance_mm",
           "hb_from_hv", "hv_from_hb", "hrb_from_hv", "hrc_from_hv", "hv_from_hrc"]
