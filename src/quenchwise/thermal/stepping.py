"""Adaptive time-step control shared by the section solver and the end-quench solver."""

from __future__ import annotations

import numpy as np


def step_factor(settings, largest_temperature_change, largest_fraction_change, largest_relative_change=None):
    """Factor for each case's next time step from its largest changes over the last step.

    The step grows or shrinks so that the next step would change a temperature by about
    settings.max_temperature_step_k, a phase fraction by settings.max_fraction_step and (if given)
    a temperature by settings.max_relative_step of its distance from the bath; with a 0.9 safety
    margin, never below 0.3 nor above settings.max_step_growth.

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
