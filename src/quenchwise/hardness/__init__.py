"""Hardness: per-phase hardness from chemistry and cooling rate, mixed by fraction, converted
between scales."""

from .conversion import hb_from_hv, hrb_from_hv, hrc_from_hv, hv_from_hb, hv_from_hrc
from .phases import (
    hardness_hv,
    maynier_bainite_hv,
    maynier_ferrite_pearlite_hv,
    maynier_martensite_hv,
)

__all__ = ["hardness_hv", "maynier_bainite_hv", "maynier_ferrite_pearlite_hv", "maynier_martensite_hv",
           "hb_from_hv", "hv_from_hb", "hrb_from_hv", "hrc_from_hv", "hv_from_hrc"]
