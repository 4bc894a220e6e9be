"""The energy check of a run with transformations, shared by the 1-D and the (r, z) tests: a
stepper wrapper that records each step, and the sensible enthalpy each node gained along the path
it took, integrated independently of the solver's enthalpy tables."""

import numpy as np

from quenchwise.thermal.properties import mixed_properties


class StepRecorder:
    """Passes every call to the stepper and keeps what the energy check needs: the temperatures
    before and after each conduction solve and the phase fractions before and after each step."""

    def __init__(self, inner):
        self.inner, self.steps = inner, []

    def fractions(self):
        return self.inner.fractions()

    def advance(self, t_old, t_new, dt):
        before = {k: v.copy() for k, v in self.inner.fractions().items()}
        out = self.inner.advance(t_old, t_new, dt)
        after = {k: v.copy() for k, v in self.inner.fractions().items()}
        self.steps.append((np.array(t_old), np.array(t_new), before, after))
        return out


def sensible_path_integral(t0, t1, fractions, points=9):
    """Integral of cp(T, phases) dT from t0 to t1 per node [J/kg], composite Simpson on
    thermal.properties.mixed_properties (numpy.interp of the tables, not the solver's code)."""
    s = np.linspace(0.0, 1.0, points)
    w = np.ones(points)
    w[1:-1:2], w[2:-1:2] = 4.0, 2.0
    total = np.zeros_like(t0)
    for si, wi in zip(s, w):
        total += wi * mixed_properties(t0 + (t1 - t0) * si, fractions)[1]
    return (t1 - t0) * total / (3.0 * (points - 1))


def sensible_gain(recorder: StepRecorder, final) -> np.ndarray:
    """Sensible enthalpy gained per node over the run [J/kg] (negative on cooling): each step's
    conduction solve at the fractions before the step, then the latent-heat recovery at the
    fractions after it, up to the next step's start (the run's final temperatures after the last)."""
    gained = np.zeros(np.asarray(final).size)
    for n, (t_old, t_solved, before, after) in enumerate(recorder.steps):
        t_next = recorder.steps[n + 1][0] if n + 1 < len(recorder.steps) else final
        gained += sensible_path_integral(t_old, t_solved, before) + sensible_path_integral(t_solved, t_next, after)
    return gained
