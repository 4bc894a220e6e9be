"""Li et al. (1998) kinetics with a documented hardenability calibration ("li1998-a255").

Why: with the published coefficients (li1998.py) the simulated ideal critical diameter DI
(workflows/ideal_diameter.py: 50 % martensite at the centre, infinite severity) of common
grades comes out larger than the ASTM A255 composition DI, and more so the more carbon the steel
has (measured, grain size 7, each grade's usual austenitizing temperature): 8620 0.90, 4130 1.10,
4140 1.34, 8640 1.36, 6150 1.33, 5140 1.50, 1045 1.51, 4340 1.83 times the A255 value. The
published model is kept unchanged and stays the default; this is a separate, selectable model.

What: every time constant of the published laws (ferrite, pearlite, bainite, and proeutectoid
cementite, which borrows the pearlite law) is multiplied by one carbon-dependent factor,

    K_cal = m(C) K_Li,    ln m(C) = LN_M_AT_04C + CARBON_SLOPE (C - 0.40)     (C: austenite carbon, wt%)

applied through the composition factors (K is proportional to them). Nothing else changes (Bs,
Ms, the S(X) law, grain size and undercooling dependence).

Fitted on (and only on): the ASTM A255 composition DI (memory) of the nominal 4140 and 8620
chemistries at grain size 7, austenitized at 845 C, matched exactly by the physics DI (one grade
fixes m at 0.405 %C, the other at 0.205 %C). The fit is workflows/calibration.py (it needs the
case loader and the ideal-diameter search, floors above this one):
``python -m quenchwise.workflows.calibration`` repeats it and prints the constants.

Shown against data not used to fit it (tests/validation/test_ideal_diameter.py and
test_jominy.py): the A255 DI of other grades (1045, 4130, 5140, 6150, 8640, 4340, ...) and the
SAE J1268 end-quench bands of 4140H and 8620H (memory). The bands are not independent of the
fit in the strict sense (A255 factors and H-bands both summarize end-quench data of such steels),
but they are different numbers for different chemistries and test temperatures.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .li1998 import Li1998

#: ln of the multiplier at 0.40 %C and its slope per wt% carbon (fit: see module docstring; the
#: Newton iterations settle within +/-0.005 of these values, the DI interpolation's own scatter,
#: with the fit grades' DI within 0.5 % of A255).
LN_M_AT_04C = -0.565
CARBON_SLOPE = -3.97


def calibration_multiplier(carbon, ln_m_at_04c: float = LN_M_AT_04C, carbon_slope: float = CARBON_SLOPE):
    """Multiplier m(C) on the Li et al. (1998) time constants: exp(ln_m + slope (C - 0.40)).

    >>> [round(float(calibration_multiplier(c)), 3) for c in (0.2, 0.4, 0.6)]
    [1.257, 0.568, 0.257]
    """
    return np.exp(ln_m_at_04c + carbon_slope * (np.asarray(carbon, dtype=float) - 0.40))


@dataclass(frozen=True)
class Li1998A255(Li1998):
    """Li et al. (1998) with the carbon-dependent multiplier of this module on every K."""

    name: str = "li1998-a255"
    ln_m_at_04c: float = LN_M_AT_04C
    carbon_slope: float = CARBON_SLOPE

    def factors(self, chem: dict) -> dict:
        m = calibration_multiplier(chem["c"], self.ln_m_at_04c, self.carbon_slope)
        return {k: v * m for k, v in super().factors(chem).items()}
