"""Boron: the b key, the ASTM A255 boron factor and boron's delay of ferrite in the kinetics."""

import tomllib

import numpy as np
import pytest

from quenchwise.case import parse_case
from quenchwise.errors import InputError
from quenchwise.hardness.hardenability import a255_ideal_diameter
from quenchwise.kinetics import Li1998
from quenchwise.kinetics.diagrams import ttt_diagram
from quenchwise.steel import Composition, austenitize
from quenchwise.steel.boron import a255_boron_factor
from quenchwise.steel.grades import find_grade

CASE = '[steel]\nc = 0.35\nmn = 0.95\nb = {b}\naustenitize_c = 870\n[part]\nshape = "bar"\ndiameter_mm = 25\n[quench]\nhtc_w_m2k = 3e4\n'


def _parse(b):
    text = CASE.format(b=b)
    return parse_case(tomllib.loads(text), text, "b.toml")


def test_b_key_is_read_in_wt_pct_and_its_range_is_enforced():
    assert _parse(0.002).composition.b == 0.002
    with pytest.raises(InputError) as e:      # 20 ppm typed as 20: refused with the allowed range
        _parse(20)
    assert "steel.b" in str(e.value) and "0.01" in str(e.value)
    with pytest.raises(InputError):
        _parse(-0.001)


def test_boron_grades_are_in_the_library_with_boron():
    for name in ("15B35H", "86B45H"):
        g = find_grade(name)
        assert 0.0005 <= g.composition().b <= 0.003


def test_a255_boron_factor_falls_with_carbon_and_alloy():
    # ASTM A255 boron factors (memory): about 2.7 at 0.20 %C, 2.2 at 0.40 %C in a lean steel (alloy
    # factor about 4), falling towards 1 near the eutectoid, smaller in richer steels; +/-20 %.
    assert float(a255_boron_factor(0.20, 0.002)) == pytest.approx(2.7, rel=0.2)
    assert float(a255_boron_factor(0.40, 0.002)) == pytest.approx(2.2, rel=0.2)
    assert float(a255_boron_factor(0.85, 0.002)) < 1.1
    assert a255_boron_factor(0.40, 0.002, 20.0) < a255_boron_factor(0.40, 0.002, 4.0)
    assert float(a255_boron_factor(0.40, 0.0)) == 1.0


def test_boron_raises_the_a255_di_of_15b35():
    # The boron grade 15B35H has the hardenability of a lean alloy steel: its band reaches 50 %
    # martensite near J6-J7 (SAE J1268, memory), about DI 2 in, against about 1 in without boron.
    plain = a255_ideal_diameter(Composition(c=0.35, mn=0.95, si=0.25)).inches
    boron = a255_ideal_diameter(Composition(c=0.35, mn=0.95, si=0.25, b=0.0015)).inches
    assert plain == pytest.approx(0.93, abs=0.1)
    assert 1.8 <= boron <= 2.6


def _ferrite_start(c, b):
    state = austenitize(Composition(c=c, mn=0.9, si=0.25, b=b), 900.0)
    d = ttt_diagram(state, 7.0, Li1998())
    return d.nose("ferrite")[0]


def test_boron_delays_ferrite_and_the_delay_fades_with_carbon():
    # Boron delays the nucleation of ferrite at the austenite grain boundaries, the less the more
    # carbon (ASM Handbook Vol. 4D, Heat Treating of Boron Steels; Kramer, Siegel & Brooks 1946;
    # memory). Common practice, no source, for the size: several times at low carbon.
    low = _ferrite_start(0.20, 0.002) / _ferrite_start(0.20, 0.0)
    high = _ferrite_start(0.60, 0.002) / _ferrite_start(0.60, 0.0)
    assert low > 3.0
    assert 1.0 < high < low
