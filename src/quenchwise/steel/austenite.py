"""The austenitized state: how much austenite the part holds at the austenitizing
temperature and how much carbon that austenite carries.

Equal densities of the phases are assumed, so mass and volume fractions coincide.

Hypoeutectoid steels use the steel's own A3 line (Andrews 1965 Ae3 and Ae1, see a3_line_carbon);
hypereutectoid steels use the straight plain Fe-C Acm line (critical.acm_linear) with no alloy
correction: no published correction for chromium could be checked. For chromium bearing steels
(52100: 1.0C-1.45Cr, hardened from about 845 C) this overstates the carbon dissolved (1.0 % where
practice shows about 0.6-0.7 %, memory) and understates the carbide left undissolved, so Ms comes
out low and retained austenite high. AusteniteState.warnings() reports it with every result.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ..errors import InputError
from .composition import Composition
from .critical import (
    CEMENTITE_C_WT,
    EUTECTOID_C_WT,
    FERRITE_C_WT,
    acm_linear,
    andrews_ae1,
    andrews_ae3,
    carbon_on_acm,
)

#: Highest austenitizing temperature accepted (C): well below the solidus of steels.
MAX_AUSTENITIZE_C = 1250.0
#: Carbide formers (Cr+Mo+V+W, wt%) from which a hypereutectoid result warns that the plain Fe-C Acm
#: line overstates the carbon dissolved (judgement: about a third of a percent of chromium already
#: shifts the solvus by tens of kelvin in the isopleths, memory).
ALLOY_ACM_WARNING_WT = 0.3
#: Solubility product of vanadium carbide in austenite, log10([V][C]) = A - B / T ([wt%], T [K]):
#: Narita (1975), as compiled by Gladman, The Physical Metallurgy of Microalloyed Steels (Institute of
#: Materials, 1997) (memory; the compiled products differ by up to a factor of 3 at 870 C).
VC_SOLUBILITY_A, VC_SOLUBILITY_B = 6.72, 9500.0
#: Carbon bound in VC per unit of vanadium (atomic masses 12.011 / 50.942).
VC_CARBON_PER_V = 12.011 / 50.942
#: Undissolved vanadium [wt%] from which the state warns.
VANADIUM_WARNING_WT = 0.01


def a3_line_carbon(temperature_c, ae1_c, ae3_c, bulk_c):
    """Carbon (wt%) of austenite in equilibrium with ferrite at a temperature between Ae1 and Ae3.

    The A3 line of the steel is taken through (bulk C, Ae3) and (0.77 %C, Ae1) and linear in
    sqrt(C), the shape of the Andrews (1965) Ae3 formula; so it honours both computed critical
    temperatures of this steel.

    >>> round(float(a3_line_carbon(770.0, 737.4, 799.9, 0.40)), 3)
    0.562
    """
    s_bulk, s_eut = np.sqrt(bulk_c), np.sqrt(EUTECTOID_C_WT)
    frac = np.clip((ae3_c - np.asarray(temperature_c, dtype=float)) / np.maximum(ae3_c - ae1_c, 1e-9), 0.0, 1.0)
    return (s_bulk + frac * (s_eut - s_bulk)) ** 2


def a3_line_temperature(carbon, ae1_c, ae3_c, bulk_c):
    """Inverse of a3_line_carbon: the temperature (C) at which austenite of this carbon meets ferrite.

    >>> round(float(a3_line_temperature(0.561, 737.4, 799.9, 0.40)), 0)
    770.0
    """
    s_bulk, s_eut = np.sqrt(bulk_c), np.sqrt(EUTECTOID_C_WT)
    span = s_eut - s_bulk
    safe = np.where(np.abs(span) > 1e-12, span, 1.0)
    frac = np.where(np.abs(span) > 1e-12, (np.sqrt(np.asarray(carbon, dtype=float)) - s_bulk) / safe, 1.0)
    return ae3_c - frac * (ae3_c - ae1_c)


def vanadium_carbide_balance(c, v, temperature_c):
    """Vanadium and carbon left in solution in austenite that holds vanadium carbide VC in equilibrium.

    [V][C] = 10^(A - B / T) with A = VC_SOLUBILITY_A, B = VC_SOLUBILITY_B (Narita 1975, as compiled
    by Gladman 1997; memory) and the mass balance V = v - x, C = c - (12.011 / 50.942) x, x the
    vanadium bound in VC (the smaller root of the quadratic; x = 0 where v c is below the product).

    Units: c, v [wt%]; temperature_c [C]. Returns (dissolved V [wt%], dissolved C [wt%]).
    Validity: austenite of carbon and low-alloy steels, about 0.1-1 %C and V up to 0.3 %,
    850-1250 C (the range of the compiled measurements, memory); other carbide formers (Cr, Mo)
    are not counted.

    In a 0.50 %C, 0.20 %V steel (6150) hardened from 870 C most of the vanadium stays as carbide;
    from 1100 C it is all in solution:

    >>> [round(float(x), 3) for x in vanadium_carbide_balance(0.50, 0.20, 870.0)]
    [0.055, 0.466]
    >>> [round(float(x), 3) for x in vanadium_carbide_balance(0.50, 0.20, 1100.0)]
    [0.2, 0.5]
    """
    c, v = np.asarray(c, dtype=float), np.asarray(v, dtype=float)
    k_sp = 10.0 ** (VC_SOLUBILITY_A - VC_SOLUBILITY_B / (np.asarray(temperature_c, dtype=float) + 273.15))
    k = VC_CARBON_PER_V
    b = k * v + c
    disc = np.maximum(b * b - 4.0 * k * (v * c - k_sp), 0.0)
    x = np.where(v * c > k_sp, (b - np.sqrt(disc)) / (2.0 * k), 0.0)
    x = np.clip(x, 0.0, v)
    return v - x, c - k * x


@dataclass(frozen=True)
class AusteniteState:
    """What the part is at the austenitizing temperature.

    austenite: volume fraction of austenite; ferrite / cementite: undissolved fractions;
    carbon: wt% carbon in the austenite; ae1, ae3, acm: the steel's critical temperatures (C);
    upper_critical: Ae3 (hypoeutectoid) or Acm (hypereutectoid) of the bulk steel.
    """

    composition: Composition
    austenitize_c: float
    austenite: float
    ferrite: float
    cementite: float
    carbon: float
    ae1: float
    ae3: float
    acm: float
    hypereutectoid: bool
    #: Vanadium in solution in the austenite [wt%] (the rest is undissolved VC); None: all of it.
    vanadium: float | None = None

    @property
    def upper_critical(self) -> float:
        return self.acm if self.hypereutectoid else self.ae3

    @property
    def austenite_composition(self) -> Composition:
        """The chemistry that drives kinetics, Ms and martensite hardness: the carbon and the
        vanadium in solution in the austenite."""
        out = self.composition.with_carbon(self.carbon)
        return out if self.vanadium is None else replace(out, v=self.vanadium)

    def warnings(self) -> list[str]:
        """What the engineer must know about this austenitized state (one line each).

        >>> s = austenitize(Composition(c=1.04, mn=0.35, si=0.25, cr=1.45), 845.0)
        >>> print(s.warnings()[0][:59])
        Acm is the plain Fe-C line (no alloy correction): with 1.45
        """
        out = []
        if self.ferrite > 1e-4:
            out.append(f"austenitized below Ae3 ({self.ae3:.0f} C): {100 * self.ferrite:.1f} % ferrite "
                       "stays untransformed (intercritical)")
        if self.cementite > 1e-4:
            out.append(f"austenitized below Acm ({self.acm:.0f} C): {100 * self.cementite:.1f} % carbide "
                       f"stays undissolved; austenite carries {self.carbon:.2f} %C")
        c = self.composition
        if self.vanadium is not None and c.v - self.vanadium >= VANADIUM_WARNING_WT:
            out.append(f"{c.v - self.vanadium:.2f} of the {c.v:g} % vanadium stays as undissolved carbide at "
                       f"{self.austenitize_c:.0f} C (VC solubility, Narita 1975): the austenite carries "
                       f"{self.vanadium:.2f} % V and {self.carbon:.2f} %C, which Ae3, the kinetics and the hardness use")
        carbide_formers = c.cr + c.mo + c.v + c.w
        if self.hypereutectoid and carbide_formers >= ALLOY_ACM_WARNING_WT:
            out.append(
                f"Acm is the plain Fe-C line (no alloy correction): with {carbide_formers:g} % Cr+Mo+V+W the real "
                f"austenite likely holds less than the computed {self.carbon:.2f} %C and more carbide stays "
                "undissolved, so Ms is likely higher and retained austenite lower than shown")
        return out


def austenitize(composition: Composition, austenitize_c: float) -> AusteniteState:
    """Equilibrium state at the austenitizing temperature (lever rule on the steel's A3 or Acm line).

    Hypoeutectoid steels between Ae1 and Ae3 keep ferrite; hypereutectoid steels below Acm keep
    cementite and their austenite carries the carbon on the Acm line.

    >>> s = austenitize(Composition(c=1.13, mn=0.3, si=0.2), 800.0)
    >>> round(s.carbon, 3), round(s.cementite, 3)
    (1.002, 0.023)
    """
    bulk = composition
    ae1 = float(andrews_ae1(mn=bulk.mn, ni=bulk.ni, si=bulk.si, cr=bulk.cr, w=bulk.w))
    t = float(austenitize_c)
    if not np.isfinite(t) or t > MAX_AUSTENITIZE_C or t <= ae1:
        raise InputError(
            "steel.austenitize_c", austenitize_c,
            f"a temperature above Ae1 ({ae1:.0f} C) of this steel and at most {MAX_AUSTENITIZE_C:.0f} C",
        )
    # Vanadium carbide left undissolved binds vanadium and some carbon: the rest of the
    # austenitized state is that of the matrix (its volume, about 0.3 % per 0.2 % V, is neglected).
    v_sol, c_sol = (float(x) for x in vanadium_carbide_balance(bulk.c, bulk.v, t))
    c = replace(bulk, c=c_sol, v=v_sol) if bulk.v > 0.0 else bulk
    ae3 = float(andrews_ae3(min(c.c, EUTECTOID_C_WT), ni=c.ni, si=c.si, v=c.v, mo=c.mo, w=c.w))
    ae3 = max(ae3, ae1)
    acm = float(acm_linear(max(c.c, EUTECTOID_C_WT)))
    hyper = c.c > EUTECTOID_C_WT
    ferrite = cementite = 0.0
    carbon = c.c
    if hyper and t < acm:
        carbon = float(np.clip(carbon_on_acm(t), EUTECTOID_C_WT, c.c))
        cementite = (c.c - carbon) / (CEMENTITE_C_WT - carbon)
    elif not hyper and t < ae3:
        carbon = float(a3_line_carbon(t, ae1, ae3, c.c))
        ferrite = float(np.clip((carbon - c.c) / (carbon - FERRITE_C_WT), 0.0, 1.0))
    austenite = 1.0 - ferrite - cementite
    return AusteniteState(bulk, t, austenite, ferrite, cementite, carbon, ae1, ae3, acm, hyper,
                          vanadium=v_sol if bulk.v > 0.0 else None)
