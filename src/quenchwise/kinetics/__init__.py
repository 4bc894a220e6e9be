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


def kinetics_model(model):
    """The model object for a case's ``model``: a name of MODELS gives a fresh default instance; a
    model object (trial coefficients of a fit, a model of your own) is used as it is, so nothing
    needs to patch the MODELS registry.

    >>> kinetics_model("li1998").name, kinetics_model(Li1998A255(carbon_slope=-4.0)).carbon_slope
    ('li1998', -4.0)
    """
    return MODELS[model]() if isinstance(model, str) else model


def model_name(model) -> str:
    """The name of a case's ``model`` (a name of MODELS, "none", or a model object's ``name``).

    >>> model_name("none"), model_name(Li1998Multigrade())
    ('none', 'li1998-multigrade')
    """
    return model if isinstance(model, str) else str(model.name)


def critical_temperature_note(model) -> str:
    """The critical-temperature methods a run with this kinetics model (name or object) uses, for
    summaries.

    >>> critical_temperature_note("kirkaldy1983")
    'Andrews (1965) Ae1/Ae3; Andrews (1965) product Ms (above 0.6 %C: van Bohemen (2012) carbon term); straight Fe-C Acm (no alloy correction); Kirkaldy & Venugopalan (1983) Bs'
    """
    parts = [AE_METHOD, MS_METHOD, ACM_METHOD]
    if not isinstance(model, str):
        parts.append(model.bs_reference)
    elif model in MODELS:
        parts.append(MODELS[model].bs_reference)
    return "; ".join(parts)


__all__ = ["MODELS", "PRODUCTS", "HistoryRun", "Kirkaldy1983", "Li1998", "Li1998A255", "Li1998Multigrade", "PhaseStepper", "SteelNodes",
           "critical_temperature_note", "follow_history", "kinetics_model", "model_name", "koistinen_marburger", "van_bohemen_sietsma_alpha"]
