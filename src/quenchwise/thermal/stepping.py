"""Adaptive time-step control and end-of-step bookkeeping of the integrator (thermal/integrator.py)."""

from __future__ import annotations

import numpy as np

from ..errors import SolverError


def step_factor(settings, largest_temperature_change, largest_fraction_change, largest_relative_change=None):
    """Factor for each case's next time step from its largest changes over the last step.

    The step grows or shrinks so that the next step would change a temperature by about
    settings.max_temperature_step_k, a phase fraction by settings.max_fraction_step and (if given)
    a temperature by settings.max_relative_step of its distance from the bath; with a 0.9 safety
    margin, never below 0.3 nor above settings.max_step_growth. (The film coefficient's limit,
    settings.max_film_step, is applied before each step: Integrator._film_step_limit.)

    >>> from types import SimpleNamespace
    >>> s = SimpleNamespace(max_temperature_step_k=10.0, max_fraction_step=0.05, max_step_growth=1.5)
    >>> step_factor(s, np.array([20.0, 1.0]), np.array([0.0, 0.0])).round(2).tolist()
    [0.45, 1.5]
    """
    with np.errstate(divide="ignore"):
        factor = np.minimum(settings.max_temperature_step_k / largest_temperature_change,
                            settings.max_fraction_step / largest_fraction_change)
        if largest_relative_change is not None:
            factor = np.minimum(factor, settings.max_relative_step / largest_relative_change)
    return np.clip(0.9 * factor, 0.3, settings.max_step_growth)


#: Shortenings tried per step by the film-coefficient limit (film_step_factor).
FILM_STEP_TRIES = 4


def film_step_factor(limit, predicted_rise, n_bodies: int, tries: int = FILM_STEP_TRIES):
    """Factor (<= 1) on each body's coming step so that its surfaces' film coefficient rises by at
    most 0.9 x limit (ln ratio) over it; limit 0 or None: ones.

    predicted_rise(factor) -> per body, the largest ln(h_end / h_now) of its surfaces for the steps
    scaled by factor. Only a rise counts: where h falls as the surface cools the flux linearization
    holds the step; where it rises (a blanket breaking) nothing else does. The rise is not linear in
    the step (a step that lands past the break sees all of it), so the factor is found by up to
    `tries` shortenings, each re-predicted, down to 1/100. A body is shortened from 0.9 x limit on,
    by 0.9 limit / rise, which is 1 there: continuous in the temperatures, so round-off cannot
    flip a body's step between a batch and the body alone.

    >>> film_step_factor(0.1, lambda f: np.array([1.0, 0.02]) * f, 2).round(3).tolist()   # rise in proportion
    [0.09, 1.0]
    >>> film_step_factor(0.1, lambda f: np.array([2.3]) * np.minimum(f * 20.0, 1.0), 1).tolist()  # a jump: floor
    [0.01]
    """
    factor = np.ones(n_bodies)
    if not limit:
        return factor
    for _ in range(tries):
        rise = predicted_rise(factor)
        over = rise > 0.9 * limit
        if not over.any():
            break
        factor = np.where(over, np.maximum(factor * 0.9 * limit / np.where(over, rise, 1.0), 0.01), factor)
    return factor


def close_step(active, hottest, end_c, steps, time_s, settings, start_hottest, start_span, progress, stuck_message):
    """End-of-step bookkeeping shared by the solvers: which cases are still running.

    A case finishes when its hottest point is below its end temperature. One that has neither
    finished nor stays within settings.max_steps and settings.max_time_s stops the solve with a
    SolverError whose text stuck_message(index) gives. progress (if given) gets the mean share of
    the cooling done.
    """
    finished = active & (hottest < end_c)
    stuck = active & ~finished & ((steps >= settings.max_steps) | (time_s >= settings.max_time_s))
    if stuck.any():
        raise SolverError(stuck_message(int(np.flatnonzero(stuck)[0])))
    still = active & ~finished
    if progress is not None:
        done = np.clip((start_hottest - hottest) / start_span, 0.0, 1.0)
        progress(float(np.mean(np.where(still, done, 1.0))))
    return still
