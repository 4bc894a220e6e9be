"""The reaction-progress integral S(X) of the Kirkaldy-type laws and its inverse.

    S(X) = integral_0^X dx / ( x^(p(1-x)) (1-x)^(p x) )

p = 0.4 in Li et al. (1998), p = 2/3 in Kirkaldy & Venugopalan (1983). The isothermal time to
reach fraction X is tau(X, T) = K(T) S(X), so under Scheil's additivity the state of a node is the
running sum sum(dt / K(T)) and X = S^-1(that sum).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np
from scipy import integrate


def _integrand(x: float, p: float) -> float:
    return 1.0 / (x ** (p * (1.0 - x)) * (1.0 - x) ** (p * x))


@lru_cache(maxsize=8)
def _table(p: float) -> tuple[np.ndarray, np.ndarray]:
    # Dense near both ends where the integrand is singular (integrable, like x^-p and (1-x)^-p).
    u = np.linspace(0.0, 1.0, 2001)
    x = 0.5 - 0.5 * np.cos(np.pi * u)
    x = np.concatenate([np.geomspace(1e-9, x[1], 40)[:-1], x[1:]])
    x = np.concatenate([[0.0], x])
    pieces = [integrate.quad(_integrand, a, b, args=(p,))[0] for a, b in zip(x[:-1], x[1:])]
    return x, np.concatenate([[0.0], np.cumsum(pieces)])


def progress_integral(x, p: float = 0.4):
    """S(X) for fractions X in [0, 1] [dimensionless].

    >>> round(float(progress_integral(0.01)), 4)   # about 0.01**0.6 / 0.6 for small X
    0.1043
    """
    xs, ss = _table(float(p))
    return np.interp(np.clip(x, 0.0, 1.0), xs, ss)


def fraction_from_progress(s, p: float = 0.4):
    """X = S^-1(s); s at or above S(1) gives 1.

    >>> round(float(fraction_from_progress(progress_integral(0.5))), 6)
    0.5
    """
    xs, ss = _table(float(p))
    return np.interp(s, ss, xs)
