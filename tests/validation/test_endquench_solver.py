"""The end-quench solver (thermal/endquench.py) against an analytic solution, energy balance and
batch independence, with constant properties and no transformation."""

import numpy as np
import pytest

from quenchwise.thermal.endquench import EndQuenchBar, EndQuenchSettings, EndQuenchSolver, rate_at, still_air
from quenchwise.thermal.quenchants import Quenchant

from analytic_conduction import temperature as series_temperature

K, RHO, CP = 30.0, 7800.0, 600.0
H_END = 5000.0


def _bar(name="bar", initial=850.0, end_c=700.0, air=None, h=H_END):
    return EndQuenchBar(name, initial, Quenchant.constant(h, 20.0), air, end_c=end_c,
                        conductivity_w_mk=K, density_kg_m3=RHO, specific_heat_j_kgk=CP)


@pytest.fixture(scope="module")
def insulated_runs():
    out = {}
    for nr in (1, 4):
        solver = EndQuenchSolver([_bar()], EndQuenchSettings(radial_cells=nr))
        out[nr] = (solver, solver.run()[0])
    return out


def test_insulated_side_matches_the_slab_series(insulated_runs):
    # With the side and far end insulated the bar is a slab of thickness L cooled on one face:
    # the plane wall of half-thickness L (Carslaw & Jaeger 1959, ch. III; Incropera et al. ch. 5),
    # x measured from the insulated face. Tolerance 1 % of (initial - bath).
    solver, h = insulated_runs[1]
    length = 0.100
    pick = np.searchsorted(h.time_s, [2.0, 20.0, 200.0])
    x = length - h.z_m
    for i in pick:
        exact = series_temperature("plate", length, K, RHO, CP, H_END, 850.0, 20.0, [h.time_s[i]], x)[0]
        got = h.field(h.temperature_c[i])[:, 0]
        assert np.max(np.abs(got - exact)) < 0.01 * 830.0


def test_axial_and_rz_models_agree_without_side_losses(insulated_runs):
    (_, h1), (_, h4) = insulated_runs[1], insulated_runs[4]
    t = h1.time_s[-1] * 0.5
    a = np.array([np.interp(t, h1.time_s, h1.temperature_c[:, j]) for j in range(h1.temperature_c.shape[1])])
    b4 = np.array([np.interp(t, h4.time_s, h4.temperature_c[:, j]) for j in range(h4.temperature_c.shape[1])])
    b = h4.field(b4)
    assert np.ptp(b, axis=1).max() < 1e-6 * 830.0          # no radial gradient to make
    assert np.max(np.abs(b[:, -1] - a)) < 0.002 * 830.0


@pytest.mark.parametrize("radial_cells", [1, 3])
def test_energy_balance_with_air_on_the_side(radial_cells):
    # Heat through all surfaces = drop in enthalpy (constant rho cp, no latent heat): exact to
    # round-off, since the surface heat is integrated by the same BDF2 rule as the enthalpy.
    solver = EndQuenchSolver([_bar(air=still_air(), end_c=600.0)], EndQuenchSettings(radial_cells=radial_cells))
    h = solver.run()[0]
    drop = np.sum(RHO * CP * solver.volume * (h.temperature_c[0] - h.temperature_c[-1]))
    assert h.heat_out_j == pytest.approx(drop, rel=1e-9)


def test_a_specimen_does_not_feel_its_batch_mates():
    alone = EndQuenchSolver([_bar("a", 850.0, end_c=800.0)]).run()[0]
    both = EndQuenchSolver([_bar("b", 900.0, end_c=800.0, h=2e4), _bar("a", 850.0, end_c=800.0)]).run()
    assert both[1].time_s.shape == alone.time_s.shape
    assert np.allclose(both[1].temperature_c, alone.temperature_c, atol=1e-6)
    assert np.allclose(rate_at(both[1]), rate_at(alone), equal_nan=True)
