"""Numerical guards: a broken state stops the solve with a SolverError naming the case and time."""

import numpy as np
import pytest

from quenchwise.thermal import Quenchant, Section
from quenchwise.thermal.solver import BatchSolver, SolverError, SolverSettings, ThermalCase


class FakeStepper:
    """Stands in for the kinetics: returns whatever latent heat and fractions it is told to."""

    def __init__(self, n, latent_j_kg=0.0, leak=0.0):
        self.f = {"austenite": np.ones(n), "martensite": np.zeros(n)}
        self.latent, self.leak = latent_j_kg, leak

    def fractions(self):
        return self.f

    def advance(self, t_old, t_new, dt):
        self.f["martensite"] = np.full_like(t_new, self.leak)    # austenite not reduced: sum > 1
        return np.full_like(t_new, self.latent), np.zeros_like(t_new)


def _solver():
    case = ThermalCase("guarded bar", Section.bar(0.02), Quenchant.constant(2000.0, 20.0), 850.0, 100.0)
    return BatchSolver([case], SolverSettings(cells=12))


def test_fractions_that_do_not_sum_to_one_stop_the_solve():
    solver = _solver()
    with pytest.raises(SolverError, match="guarded bar.*sum to"):
        solver.run(FakeStepper(solver.n_nodes, leak=1e-6))


def test_temperature_above_the_start_stops_the_solve():
    solver = _solver()
    with pytest.raises(SolverError, match="guarded bar.*left the range"):
        solver.run(FakeStepper(solver.n_nodes, latent_j_kg=5e6))


def test_a_sound_stepper_passes_the_guards():
    solver = _solver()
    history = solver.run(FakeStepper(solver.n_nodes))[0]
    assert history.temperature_c[-1].max() < 100.0
