"""Li, Niebuhr, Meekisho & Atteridge (1998) austenite decomposition kinetics.

tau(X, T) = F / (2^(a G) dT^n exp(-Q / (R T))) * S(X),   R = 1.987 cal/mol/K, T in K,
G = ASTM grain size number, S(X) with exponent 0.4 (see sigmoid.py).

Reference: Li, M.V., Niebuhr, D.V., Meekisho, L.L., Atteridge, D.G. (1998),
"A computational model for the prediction of steel hardenability", Metall. Mater. Trans. B 29B,
661-672 (coefficients: memory). Fitted on low-alloy steels of the isothermal transformation
atlases; the composition range is steel.composition.MODEL_RANGES["li1998"].

Activation energy of ferrite: the paper is read two ways, Q = 27 500 or 23 500 cal/mol. With
27 500 the ferrite start of a 0.40C-0.9Cr-0.2Mo steel at 650 C comes out near 70 s, an order of
magnitude slower than the isothermal diagrams of that steel show (a few seconds, memory); 23 500
gives about 7 s. The default is 23 500 (the Kirkaldy & Venugopalan value for ferrite);
``Li1998(ferrite_activation_cal_mol=27500)`` selects the other reading.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..steel.boron import a255_boron_factor
from ..steel.critical import li_bs
from .sigmoid import fraction_from_progress

GAS_CONSTANT_CAL_MOL_K = 1.987
SIGMOID_EXPONENT = 0.4


def li_ferrite_factor(c, mn=0.0, si=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Composition factor of the ferrite law [s K^3 ...]: exp(1.00 + 6.31C + 1.78Mn + 0.31Si + 1.12Ni + 2.70Cr + 4.06Mo).

    Reference: Li et al. (1998), Metall. Mater. Trans. B 29B, 661 (memory). Elements in wt%.

    >>> round(float(li_ferrite_factor(0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20)), -1)
    4870.0
    """
    return np.exp(1.00 + 6.31 * c + 1.78 * mn + 0.31 * si + 1.12 * ni + 2.70 * cr + 4.06 * mo)


def li_pearlite_factor(c, mn=0.0, si=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Composition factor of the pearlite law: exp(-4.25 + 4.12C + 4.36Mn + 0.44Si + 1.71Ni + 3.33Cr + 5.19 sqrt(Mo)).

    Reference: Li et al. (1998), Metall. Mater. Trans. B 29B, 661 (memory). Elements in wt%.

    >>> round(float(li_pearlite_factor(0.77, mn=0.75, si=0.20)), 2)
    9.78
    """
    return np.exp(-4.25 + 4.12 * c + 4.36 * mn + 0.44 * si + 1.71 * ni + 3.33 * cr + 5.19 * np.sqrt(mo))


def li_bainite_factor(c, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Composition factor of the bainite law: exp(-10.23 + 10.18C + 0.85Mn + 0.55Ni + 0.90Cr + 0.36Mo).

    Reference: Li et al. (1998), Metall. Mater. Trans. B 29B, 661 (memory). Elements in wt%.

    >>> round(float(li_bainite_factor(0.40, mn=0.85, cr=0.95, mo=0.20)), 4)
    0.011
    """
    return np.exp(-10.23 + 10.18 * c + 0.85 * mn + 0.55 * ni + 0.90 * cr + 0.36 * mo)


def boron_delay(c, b):
    """Multiplier on the ferrite and pearlite time constants of a boron-treated steel [-]:
    the square of the ASTM A255 boron factor of a lean steel (steel/boron.py), 1 without boron.

    Boron delays ferrite nucleation at the austenite grain boundaries (and the pearlite that
    follows it), the less the more carbon (ASM Handbook Vol. 4D, Heat Treating of Boron Steels;
    Kramer, Siegel & Brooks 1946; memory). The Li et al. (1998) laws have no boron term. Under
    Grossmann's premise DI grows about as the square root of the time constants (a bar's centre
    cooling time scales as D^2), so K x BF^2 gives DI x BF. Alloy attenuation is left to the A255
    factor (lean-steel form here). Valid 0.10-0.85 %C, b 0-0.005 wt%.

    >>> [round(float(boron_delay(c, 0.002)), 2) for c in (0.20, 0.40, 0.90)]
    [7.34, 4.83, 1.0]
    >>> float(boron_delay(0.40, 0.0))
    1.0
    """
    return a255_boron_factor(c, b) ** 2


def kirkaldy_time_constant(factor, grain_exponent, grain_size, undercooling_k, undercooling_power,
                           activation_cal_mol, temperature_c):
    """K(T) in tau(X, T) = K(T) S(X):  K = F / (2^(a G) dT^n exp(-Q / (R T)))  [s].

    Infinite where the undercooling dT is not positive (the product cannot form there).

    >>> round(float(kirkaldy_time_constant(9.78, 0.32, 7.0, 171.0, 3, 27500.0, 550.0)), 1)
    8.3
    """
    dt = np.asarray(undercooling_k, dtype=float)
    t_k = np.asarray(temperature_c, dtype=float) + 273.15
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        k = factor * np.exp(activation_cal_mol / (GAS_CONSTANT_CAL_MOL_K * t_k)) / (
            2.0 ** (grain_exponent * grain_size) * dt ** undercooling_power)
    return np.where(dt > 0.0, k, np.inf)


@dataclass(frozen=True)
class Li1998:
    """Li et al. (1998) laws for ferrite, pearlite and bainite (cementite: see time_constants).

    The interface every kinetics model offers (see kinetics/__init__.py): name, sigmoid_exponent,
    bs_reference, bainite_start(chem), factors(chem), time_constants(...), fraction(...).
    """

    ferrite_activation_cal_mol: float = 23500.0
    activation_cal_mol: float = 27500.0
    name: str = "li1998"
    sigmoid_exponent: float = SIGMOID_EXPONENT
    bs_reference: str = "Li et al. (1998) Bs"

    def bainite_start(self, chem: dict):
        """Bs [C] of austenite of this chemistry (element arrays, wt%): Li et al. (1998) form."""
        return li_bs(chem["c"], chem["mn"], chem["ni"], chem["cr"], chem["mo"])

    def factors(self, chem: dict) -> dict:
        """Per-node composition factors, computed once per run (chem: element arrays, wt%)."""
        g = {k: chem[k] for k in ("c", "mn", "si", "ni", "cr", "mo")}
        boron = boron_delay(g["c"], chem.get("b", 0.0))     # 1 without boron: the published laws
        return {
            "ferrite": li_ferrite_factor(**g) * boron,
            "pearlite": li_pearlite_factor(**g) * boron,
            "bainite": li_bainite_factor(g["c"], g["mn"], g["ni"], g["cr"], g["mo"]),
        }

    def time_constants(self, factors: dict, grain_size, temperature_c, undercooling: dict) -> dict:
        """K(T) per product [s] for nodes at temperature_c with the given undercoolings [K].

        Proeutectoid cementite has no law of its own in the paper; it is given the pearlite law
        with its undercooling below Acm (an assumption: both are grain-boundary carbide reactions
        controlled by carbon diffusion).
        """
        q = self.activation_cal_mol
        return {
            "ferrite": kirkaldy_time_constant(factors["ferrite"], 0.41, grain_size, undercooling["ferrite"], 3,
                                              self.ferrite_activation_cal_mol, temperature_c),
            "cementite": kirkaldy_time_constant(factors["pearlite"], 0.32, grain_size, undercooling["cementite"], 3,
                                                q, temperature_c),
            "pearlite": kirkaldy_time_constant(factors["pearlite"], 0.32, grain_size, undercooling["pearlite"], 3,
                                               q, temperature_c),
            "bainite": kirkaldy_time_constant(factors["bainite"], 0.29, grain_size, undercooling["bainite"], 2,
                                              q, temperature_c),
        }

    def fraction(self, product: str, progress, factors: dict):
        """Normalized fraction X = S^-1(sum dt/K) of a product (the same S(X) for every product)."""
        return fraction_from_progress(progress, self.sigmoid_exponent)
