"""Boron: the hardenability factor of ASTM A255 and the share of the boron that acts.

A few parts per million of boron dissolved in austenite segregate to its grain boundaries and
delay the nucleation of ferrite there (and of the pearlite that follows it); bainite and
martensite are hardly touched. The effect is largest in low-carbon, lean steels and fades as the
carbon content rises (carbon itself already delays ferrite, and boron carbides form), vanishing
near the eutectoid; it also shrinks as the alloy content (the other multiplying factors) rises.
It saturates at about 0.001-0.003 wt% boron and needs the boron "free" (protected from nitrogen
and oxygen, e.g. by titanium and aluminium). Sources: ASM Handbook Vol. 4D (2014), Heat Treating
of Boron Steels (Deva & Jha); Kramer, Siegel & Brooks (1946), Trans. AIME 167, 670 (the carbon
dependence of the boron factor); ASTM A255, boron factors against carbon and alloy factor (memory).

ASTM A255 tabulates the boron factor (the multiplier on the DI of the same steel without boron)
against carbon and the alloy factor (the product of the Mn, Si, Ni, Cr, Mo, Cu factors). The
function below is a smooth stand-in for that table, recalled (memory) at these anchor values:
about 2.7 at 0.20 %C and 2.2 at 0.40 %C in a lean steel (alloy factor 4), about 1.6-1.7 at
0.60 %C, 1 near 0.87 %C; about 40 % less boron effect at an alloy factor of 18 (a 86B45-type
steel). Treat it as +/-20 % on the factor.
"""

from __future__ import annotations

import numpy as np

#: Boron from which the full effect is taken [wt%]; below it the effect rises linearly from 0.
BORON_SATURATION_WT = 0.0005
#: Carbon at which the boron effect vanishes [wt%] and the factor's slope with carbon (lean steel).
BORON_FADE_C = 0.87
BORON_SLOPE_PER_C = 2.55
#: Alloy factor of the lean reference steel and the exponent of the attenuation with alloy factor.
LEAN_ALLOY_FACTOR = 4.0
ALLOY_EXPONENT = 0.35


def boron_activity(b):
    """Share of the full boron effect [0-1] for a boron content b [wt%]: b / 0.0005, capped at 1.

    The effect saturates at a few ppm of free boron (ASM Handbook Vol. 4D, memory); more boron
    adds nothing (and above about 0.003 wt% it is usually bound as borocarbide, not modelled).

    >>> [float(x) for x in boron_activity([0.0, 0.00025, 0.002])]
    [0.0, 0.5, 1.0]
    """
    return np.clip(np.asarray(b, dtype=float) / BORON_SATURATION_WT, 0.0, 1.0)


def a255_boron_factor(c, b, alloy_factor=LEAN_ALLOY_FACTOR):
    """ASTM A255 boron factor (multiplier on DI) [-] of a steel of carbon c [wt%], boron b [wt%]
    and alloy factor (product of the other A255 multiplying factors) [-]:

        BF = 1 + 2.55 (0.87 - C) (alloy_factor / 4)^-0.35 * activity(b),  C <= 0.87; 1 above

    Valid 0.10-0.85 %C, alloy factor 2-25 (the range of the A255 table, memory); a smooth stand-in
    for the table (module docstring; memory, +/-20 %).

    >>> [round(float(a255_boron_factor(c, 0.002)), 2) for c in (0.20, 0.40, 0.60, 0.90)]
    [2.71, 2.2, 1.69, 1.0]
    >>> round(float(a255_boron_factor(0.45, 0.002, alloy_factor=18.0)), 2)
    1.63
    >>> float(a255_boron_factor(0.20, 0.0))
    1.0
    """
    c = np.asarray(c, dtype=float)
    reach = np.clip(BORON_FADE_C - c, 0.0, None) * BORON_SLOPE_PER_C
    attenuation = (np.maximum(np.asarray(alloy_factor, dtype=float), 1.0) / LEAN_ALLOY_FACTOR) ** -ALLOY_EXPONENT
    return 1.0 + reach * attenuation * boron_activity(b)
