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
fixes m at 0.405 %C, the other at 0.205 %C). ``python -m quenchwise.kinetics.calibrated``
repeats the fit and prints the constants.

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


# -- the fit ------------------------------------------------------------------------------------
FIT_GRADES = ("4140", "8620")
FIT_AUSTENITIZE_C = 845.0
FIT_GRAIN_SIZE = 7.0


def fit(iterations: int = 4, verbose: bool = True) -> tuple[float, float]:
    """Repeat the fit: for each fit grade find the multiplier m at its carbon for which the
    physics DI equals its A255 DI (Newton in ln m with DI ~ sqrt(K): ln m -= 2 ln(ratio)), then
    the straight line in ln m through the two. Takes a minute or so."""
    import tomllib
    from functools import partial

    from ..case import parse_case
    from ..hardness.hardenability import a255_ideal_diameter
    from ..workflows.ideal_diameter import physics_ideal_diameters
    from . import MODELS

    cases = []
    for g in FIT_GRADES:
        text = (f'[steel]\ngrade = "{g}"\ngrain_size = {FIT_GRAIN_SIZE}\naustenitize_c = {FIT_AUSTENITIZE_C}\n'
                '[part]\nshape = "bar"\ndiameter_mm = 25\n[quench]\nhtc_w_m2k = 1e6\nend_c = 40\n')
        cases.append(parse_case(tomllib.loads(text), text, f"{g}.toml"))
    carbon = np.array([c.composition.c for c in cases])
    target = np.array([a255_ideal_diameter(c.composition).inches for c in cases])
    ln_m = np.zeros(len(cases))
    key = "_li1998_a255_fit"
    try:
        for _ in range(iterations):
            slope = (ln_m[0] - ln_m[1]) / (carbon[0] - carbon[1])
            at04 = ln_m[0] + slope * (0.40 - carbon[0])
            MODELS[key] = partial(Li1998A255, ln_m_at_04c=float(at04), carbon_slope=float(slope))
            from dataclasses import replace
            got = np.array([d.inches for d in physics_ideal_diameters([replace(c, model=key) for c in cases])])
            ratio = got / target
            if verbose:
                print(f"ln m at 0.40 C {at04:+.4f}, slope {slope:+.3f}: DI {np.round(got, 3)} in, "
                      f"A255 {np.round(target, 3)} in, ratio {np.round(ratio, 3)}")
            ln_m = ln_m - 2.0 * np.log(ratio)
    finally:
        MODELS.pop(key, None)
    slope = (ln_m[0] - ln_m[1]) / (carbon[0] - carbon[1])
    return float(ln_m[0] + slope * (0.40 - carbon[0])), float(slope)


if __name__ == "__main__":  # pragma: no cover
    a, b = fit()
    print(f"LN_M_AT_04C = {a:.4f}\nCARBON_SLOPE = {b:.3f}")
