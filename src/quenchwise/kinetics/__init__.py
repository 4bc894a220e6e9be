"""Austenite decomposition: published kinetics laws, the additivity integrator and martensite.

A kinetics model is a small frozen dataclass with
    name, sigmoid_exponent, bs_reference,
    bainite_start(chem) -> Bs [C],
    factors(chem) -> dict of per-node composition factors (computed once),
    time_constants(factors, grain_size, temperature_c, undercooling) -> K(T) per product [s]
        (tau(X, T) = K(T) S(X); products ferrite, cementite, pearlite, bainite),
    fraction(product, progress, factors) -> X = S^-1(sum dt/K) ("proeutectoid", "pearlite", "bainite").
"""

from ..steel.critical import ACM_METHOD, AE_METHOD, MS_METHOD
from .calibrated import Li1998A255
from .kirkaldy1983 import Kirkaldy1983
from .li1998 import Li1998
from .multigrade import Li1998Multigrade
from .martensite import koistinen_marburger, van_bohemen_sietsma_alpha
from .transformation import PRODUCTS, HistoryRun, PhaseStepper, SteelNodes, follow_history

MODELS = {"li1998": Li1998, "kirkaldy1983": Kirkaldy1983,
          "li1998-a255": Li1998A255,   # calibrated variant, selectable (kinetics/calibrated.py)
          "li1998-multigrade": Li1998Multigrade}   # multi-grade correction (kinetics/multigrade.py)


def critical_temperature_note(model: str) -> str:
    """The critical-temperature methods a run with this kinetics model uses, for summaries.

    >>> critical_temperature_note("kirkaldy1983")
    'Andrews (1965) Ae1/Ae3; Andrews (1965) product Ms (above 0.6 %C: van Bohemen (2012) carbon term); straight Fe-C Acm (no alloy correction); Kirkaldy & Venugopalan (1983) Bs'
    """
    parts = [AE_METHOD, MS_METHOD, ACM_METHOD]
    if model in MODELS:
        parts.append(MODELS[model].bs_reference)
    return "; ".join(parts)


__all__ = ["MODELS", "PRODUCTS", "HistoryRun", "Kirkaldy1983", "Li1998", "Li1998A255", "Li1998Multigrade", "PhaseStepper", "SteelNodes",
           "critical_temperature_note", "follow_history", "koistinen_marburger", "van_bohemen_sietsma_alpha"]
