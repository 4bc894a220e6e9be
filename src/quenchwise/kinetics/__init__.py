"""Austenite decomposition: published kinetics laws, the additivity integrator and martensite."""

from .li1998 import Li1998
from .martensite import koistinen_marburger, van_bohemen_sietsma_alpha
from .transformation import PRODUCTS, PhaseStepper, SteelNodes

MODELS = {"li1998": Li1998}

__all__ = ["MODELS", "PRODUCTS", "Li1998", "PhaseStepper", "SteelNodes",
           "koistinen_marburger", "van_bohemen_sietsma_alpha"]
