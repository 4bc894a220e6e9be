"""Ideal critical diameter DI: the ASTM A255 composition value and the tool's own, simulated one.

Measured when the calibration was made (grain size 7, each grade's usual austenitizing
temperature; physics DI / A255 DI):

grade   C      published li1998   li1998-a255 (calibrated)
1020   0.205   1.27               1.40
1045   0.465   1.51               1.00
1080   0.815   2.04               0.67
4130   0.305   1.11               1.01
4140   0.405   1.35               1.00  (fit)
4150   0.505   2.17               1.33
4340   0.405   1.83               1.37  (Ni 1.8 beyond the A255 Ni factor's range)
5120   0.195   1.12               1.28
5140   0.405   1.49               1.11
5160   0.600   1.85               0.94
6150   0.505   1.33               0.81
8620   0.205   0.90               1.00  (fit)
8640   0.405   1.36               1.01
4320   0.195   1.21               1.37  (Ni beyond range)
9260   0.600   0.68               0.35  (Si 2.0)

Within +/-30 %: published 5 of 15 (the low-carbon grades); calibrated 7 of the 13 grades not used
to fit it. The test below takes six common through-hardening grades, one or two per alloy
family, none used in the fit.
"""

import tomllib

import pytest

from quenchwise.case import parse_case
from quenchwise.hardness.hardenability import a255_ideal_diameter
from quenchwise.steel import Composition
from quenchwise.thermal.solver import SolverSettings
from quenchwise.workflows.ideal_diameter import physics_ideal_diameters

# Coarse steps for speed (24 K and 0.1 fraction per step, 20 cells): measured on these six grades
# the DI differs from the default DI numerics by less than 3 %.
COARSE = SolverSettings(cells=20, max_temperature_step_k=24.0, max_fraction_step=0.1)


def test_a255_di_of_a_4140_chemistry():
    # DOMAIN.md section 3: a 4140 chemistry gives about 4.5-5 in (ASTM A255 factors, memory).
    di = a255_ideal_diameter(Composition(c=0.40, mn=0.875, si=0.25, cr=0.95, mo=0.20))
    assert 4.5 <= di.inches <= 5.0 and di.notes == ()


def test_a255_factor_ranges_are_flagged():
    di = a255_ideal_diameter(Composition(c=0.40, mn=0.7, ni=1.8, cr=0.8, mo=0.25))
    assert any("ni" in n and "extrapolated" in n for n in di.notes)


def _case(grade, model):
    text = (f'[steel]\ngrade = "{grade}"\ngrain_size = 7\n[part]\nshape = "bar"\ndiameter_mm = 25\n'
            f'[quench]\nhtc_w_m2k = 1e6\nend_c = 40\n[transform]\nmodel = "{model}"\n')
    return parse_case(tomllib.loads(text), text, f"{grade}.toml")


HELD_OUT = ("1045", "4130", "5140", "6150", "8640", "4340")


@pytest.fixture(scope="module")
def physics():
    cases = [_case(g, "li1998-a255") for g in HELD_OUT] + [_case("4140", "li1998"), _case("4140", "li1998-a255")]
    dis = physics_ideal_diameters(cases, settings=COARSE)
    return {(c.grade, c.model): (d.inches, a255_ideal_diameter(c.composition).inches) for c, d in zip(cases, dis)}


def test_calibrated_physics_di_within_30_percent_of_a255_for_five_held_out_grades(physics):
    ratios = {g: physics[(g, "li1998-a255")][0] / physics[(g, "li1998-a255")][1] for g in HELD_OUT}
    inside = [g for g, r in ratios.items() if 0.7 <= r <= 1.3]
    assert len(inside) >= 5, ratios
    # 4340 was measured at 1.37 (Ni 1.8 %, beyond the A255 Ni factor's range): recorded, not hidden.
    assert all(0.6 <= r <= 1.5 for r in ratios.values()), ratios


#: DI of a 4140 chemistry: 4.5-5.0 in (ASTM A255 factors; DOMAIN.md, memory). Tolerance: the coarse
#: numerics' 3 % (COARSE above).
DI_4140_IN = (4.5, 5.0)
COARSE_TOL = 0.03


def test_published_li1998_is_too_hardenable_at_medium_carbon(physics):
    # Why the calibration exists (kinetics/calibrated.py; DOMAIN.md: the published coefficients
    # come out more hardenable than end-quench data): the simulated DI of 4140 with them lies above
    # the 4140 DI range by more than the numerics' tolerance.
    di, _ = physics[("4140", "li1998")]
    assert di > DI_4140_IN[1] * (1.0 + COARSE_TOL), di


def test_calibrated_4140_di_is_in_the_4140_range(physics):
    # The calibrated model was fitted on 4140's A255 DI: its simulated DI lies in the 4140 range.
    di, _ = physics[("4140", "li1998-a255")]
    assert DI_4140_IN[0] * (1.0 - COARSE_TOL) <= di <= DI_4140_IN[1] * (1.0 + COARSE_TOL), di
