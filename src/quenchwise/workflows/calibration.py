"""The fit of the calibrated kinetics model "li1998-a255" (kinetics/calibrated.py).

It lives here, not beside the model, because it needs the case loader and the ideal-diameter
workflow (floors above kinetics/). Trial models are passed to the solve as model objects on the
cases (``Case.model``), so nothing patches the kinetics registry.

    PYTHONPATH=src python -m quenchwise.workflows.calibration     # repeats the fit (a minute or so)
"""

from __future__ import annotations

import tomllib
from dataclasses import replace

import numpy as np

from ..case import Case, parse_case
from ..hardness.hardenability import a255_ideal_diameter
from ..kinetics.calibrated import Li1998A255
from .ideal_diameter import physics_ideal_diameters

#: Fitted on (and only on) the ASTM A255 composition DI (memory) of these nominal chemistries.
FIT_GRADES = ("4140", "8620")
FIT_AUSTENITIZE_C = 845.0
FIT_GRAIN_SIZE = 7.0


def fit_cases() -> list[Case]:
    """The fit grades as 25 mm bar cases (the DI search replaces the bar and the quench)."""
    cases = []
    for g in FIT_GRADES:
        text = (f'[steel]\ngrade = "{g}"\ngrain_size = {FIT_GRAIN_SIZE}\naustenitize_c = {FIT_AUSTENITIZE_C}\n'
                '[part]\nshape = "bar"\ndiameter_mm = 25\n[quench]\nhtc_w_m2k = 1e6\nend_c = 40\n')
        cases.append(parse_case(tomllib.loads(text), text, f"{g}.toml"))
    return cases


def fit(iterations: int = 4, verbose: bool = True) -> tuple[float, float]:
    """Repeat the fit of kinetics/calibrated.py: for each fit grade find the multiplier m at its
    carbon for which the physics DI equals its A255 DI (Newton in ln m with DI ~ sqrt(K):
    ln m -= 2 ln(ratio)), then the straight line in ln m through the two.
    Returns (ln m at 0.40 %C, slope per wt% C)."""
    cases = fit_cases()
    carbon = np.array([c.composition.c for c in cases])
    target = np.array([a255_ideal_diameter(c.composition).inches for c in cases])
    ln_m = np.zeros(len(cases))
    for _ in range(iterations):
        slope = (ln_m[0] - ln_m[1]) / (carbon[0] - carbon[1])
        at04 = ln_m[0] + slope * (0.40 - carbon[0])
        trial = Li1998A255(ln_m_at_04c=float(at04), carbon_slope=float(slope))
        got = np.array([d.inches for d in physics_ideal_diameters([replace(c, model=trial) for c in cases])])
        ratio = got / target
        if verbose:
            print(f"ln m at 0.40 C {at04:+.4f}, slope {slope:+.3f}: DI {np.round(got, 3)} in, "
                  f"A255 {np.round(target, 3)} in, ratio {np.round(ratio, 3)}")
        ln_m = ln_m - 2.0 * np.log(ratio)
    slope = (ln_m[0] - ln_m[1]) / (carbon[0] - carbon[1])
    return float(ln_m[0] + slope * (0.40 - carbon[0])), float(slope)


if __name__ == "__main__":  # pragma: no cover
    a, b = fit()
    print(f"LN_M_AT_04C = {a:.4f}\nCARBON_SLOPE = {b:.3f}")
