"""Steel: chemistry, critical temperatures, the austenitized state and the grade library."""

from .composition import ELEMENTS, Composition
from .critical import (
    acm_linear,
    andrews_ae1,
    andrews_ae3,
    andrews_ms,
    carbon_on_acm,
    kirkaldy_venugopalan_bs,
    li_bs,
    steven_haynes_bs,
)
from .austenite import AusteniteState, austenitize

__all__ = [
    "ELEMENTS", "Composition", "AusteniteState", "austenitize",
    "acm_linear", "andrews_ae1", "andrews_ae3", "andrews_ms", "carbon_on_acm",
    "kirkaldy_venugopalan_bs", "li_bs", "steven_haynes_bs",
]
