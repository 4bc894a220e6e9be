"""Kirkaldy & Venugopalan (1983) austenite decomposition kinetics, the older form of the law that
Li et al. (1998) refitted; selectable as [transform] model = "kirkaldy1983".

    tau(X, T) = F / (2^((G - 1)/2) dT^n rate(T)) * S(X),   R = 1.987 cal/mol/K, T in K,

with S(X) = integral_0^X dx / (x^(2(1-x)/3) (1-x)^(2x/3)) (sigmoid exponent p = 2/3), G the ASTM grain
size number and, per product (elements in wt%):

    ferrite   F = 59.6Mn + 1.45Ni + 67.7Cr + 244Mo,           dT = Ae3 - T, n = 3, rate = exp(-23 500/RT)
    pearlite  F = 1.79 + 5.42(Cr + Mo + 4 Mo Ni),             dT = Ae1 - T, n = 3,
              1/rate = exp(27 500/RT) + (0.01Cr + 0.52Mo) exp(37 500/RT)
    bainite   F = (2.34 + 10.1C + 3.8Cr + 19Mo) 1e-4,         dT = Bs - T,  n = 2, rate = exp(-27 500/RT)
              and the integrand of S carries exp(beta X^2), beta = 1.9C + 2.5Mn + 0.9Ni + 1.7Cr + 4Mo - 2.6
              (the late stage of bainite slows down in richer steels).
    Bs = 656 - 58C - 35Mn - 75Si - 15Ni - 34Cr - 41Mo.

Reference: Kirkaldy, J.S. & Venugopalan, D. (1983), "Prediction of microstructure and hardenability in
low alloy steels", in Phase Transformations in Ferrous Alloys (Marder & Goldstein, eds.), TMS-AIME,
125-148 (coefficients: memory; the shared domain notes round the ferrite factor to
60Mn + 2Ni + 68Cr + 244Mo). Li et al. (1998) report that this model does well for the less
hardenable steels and too fast for the more hardenable ones; carbon enters the ferrite and pearlite
laws only through Ae3 and Ae1. Proeutectoid cementite: the pearlite law with its undercooling below
Acm, as in li1998.py.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..steel.critical import kirkaldy_venugopalan_bs
from .li1998 import kirkaldy_time_constant
from .sigmoid import fraction_from_progress

SIGMOID_EXPONENT = 2.0 / 3.0
#: Grain factor 2^((G-1)/2) = 2^(G/2) / sqrt(2): the sqrt(2) is folded into the composition factors.
_GRAIN_EXPONENT = 0.5
_SQRT2 = float(np.sqrt(2.0))


def kv_ferrite_factor(mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Composition factor of the ferrite law [s K^3]: 59.6Mn + 1.45Ni + 67.7Cr + 244Mo (wt%).

    Reference: Kirkaldy & Venugopalan (1983), TMS-AIME, 125 (memory).

    >>> round(float(kv_ferrite_factor(mn=0.85, cr=0.95, mo=0.20)), 1)
    163.8
    """
    return 59.6 * mn + 1.45 * ni + 67.7 * cr + 244.0 * mo


def kv_pearlite_factor(ni=0.0, cr=0.0, mo=0.0):
    """Composition factor of the pearlite law [s K^3]: 1.79 + 5.42(Cr + Mo + 4 Mo Ni) (wt%).

    Reference: Kirkaldy & Venugopalan (1983), TMS-AIME, 125 (memory).

    >>> round(float(kv_pearlite_factor(cr=0.95, mo=0.20)), 3)
    8.023
    """
    return 1.79 + 5.42 * (cr + mo + 4.0 * mo * ni)


def kv_bainite_factor(c, cr=0.0, mo=0.0):
    """Composition factor of the bainite law [s K^2]: (2.34 + 10.1C + 3.8Cr + 19Mo) 1e-4 (wt%).

    Reference: Kirkaldy & Venugopalan (1983), TMS-AIME, 125 (memory).

    >>> round(float(kv_bainite_factor(0.40, cr=0.95, mo=0.20)) * 1e4, 3)
    13.79
    """
    return (2.34 + 10.1 * c + 3.8 * cr + 19.0 * mo) * 1.0e-4


def kv_bainite_retardation(c, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """beta of the bainite progress integrand exp(beta X^2): 1.9C + 2.5Mn + 0.9Ni + 1.7Cr + 4Mo - 2.6.

    Reference: Kirkaldy & Venugopalan (1983), TMS-AIME, 125 (memory).

    >>> round(float(kv_bainite_retardation(0.40, mn=0.85, cr=0.95, mo=0.20)), 3)
    2.7
    """
    return 1.9 * c + 2.5 * mn + 0.9 * ni + 1.7 * cr + 4.0 * mo - 2.6


@dataclass(frozen=True)
class Kirkaldy1983:
    """Kirkaldy & Venugopalan (1983) laws for ferrite, pearlite and bainite (same interface as Li1998)."""

    name: str = "kirkaldy1983"
    sigmoid_exponent: float = SIGMOID_EXPONENT
    bs_reference: str = "Kirkaldy & Venugopalan (1983) Bs"
    ferrite_activation_cal_mol: float = 23500.0
    activation_cal_mol: float = 27500.0
    pearlite_alloy_activation_cal_mol: float = 37500.0

    def bainite_start(self, chem: dict):
        """Bs [C] of austenite of this chemistry (element arrays, wt%)."""
        return kirkaldy_venugopalan_bs(chem["c"], chem["mn"], chem["si"], chem["ni"], chem["cr"], chem["mo"])

    def factors(self, chem: dict) -> dict:
        """Per-node composition factors (grain factor's sqrt(2) included) and the bainite beta."""
        c, mn, ni, cr, mo = (chem[k] for k in ("c", "mn", "ni", "cr", "mo"))
        return {
            "ferrite": _SQRT2 * kv_ferrite_factor(mn, ni, cr, mo),
            "pearlite": _SQRT2 * kv_pearlite_factor(ni, cr, mo),
            "pearlite_alloy": _SQRT2 * kv_pearlite_factor(ni, cr, mo) * (0.01 * cr + 0.52 * mo),
            "bainite": _SQRT2 * kv_bainite_factor(c, cr, mo),
            "bainite_beta": np.asarray(kv_bainite_retardation(c, mn, ni, cr, mo), dtype=float),
        }

    def time_constants(self, factors: dict, grain_size, temperature_c, undercooling: dict) -> dict:
        """K(T) per product [s]; proeutectoid cementite takes the pearlite law below Acm.

        >>> m = Kirkaldy1983()
        >>> chem = {k: np.array([v]) for k, v in dict(c=0.77, mn=0.75, si=0.25, ni=0.0, cr=0.0, mo=0.0).items()}
        >>> k = m.time_constants(m.factors(chem), 7.0, np.array([550.0]),
        ...                      {"ferrite": -1.0, "cementite": -1.0, "pearlite": 172.0, "bainite": -1.0})
        >>> round(float(k["pearlite"][0]), 2), bool(np.isinf(k["bainite"][0]))
        (0.88, True)
        """
        g, t = grain_size, temperature_c

        def law(factor, dt, n, q):
            return kirkaldy_time_constant(factor, _GRAIN_EXPONENT, g, dt, n, q, t)

        def pearlite(dt):
            return (law(factors["pearlite"], dt, 3, self.activation_cal_mol)
                    + law(factors["pearlite_alloy"], dt, 3, self.pearlite_alloy_activation_cal_mol))

        return {
            "ferrite": law(factors["ferrite"], undercooling["ferrite"], 3, self.ferrite_activation_cal_mol),
            "cementite": pearlite(undercooling["cementite"]),
            "pearlite": pearlite(undercooling["pearlite"]),
            "bainite": law(factors["bainite"], undercooling["bainite"], 2, self.activation_cal_mol),
        }

    def fraction(self, product: str, progress, factors: dict):
        """X = S^-1(sum dt/K); bainite uses its own S with the exp(beta X^2) retardation."""
        if product == "bainite":
            return fraction_from_progress(progress, self.sigmoid_exponent, factors["bainite_beta"])
        return fraction_from_progress(progress, self.sigmoid_exponent)
