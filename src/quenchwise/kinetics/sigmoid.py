"""The reaction-progress integral S(X) of the Kirkaldy-type laws and its inverse.

    S(X) = integral_0^X exp(beta x^2) dx / ( x^(p(1-x)) (1-x)^(p x) )

p = 0.4 in Li et al. (1998), p = 2/3 in Kirkaldy & Venugopalan (1983); beta = 0 except for the
Kirkaldy & Venugopalan bainite law, whose integrand carries exp(beta X^2) with a chemistry-dependent
beta (a retardation of the late stage of bainite). The isothermal time to reach fraction X is
tau(X, T) = K(T) S(X), so under Scheil's additivity the state of a node is the running sum
sum(dt / K(T)) and X = S^-1(that sum).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

#: Gauss-Legendre rule used on each piece of the table (nodes and weights on [-1, 1]).
_GL_NODES, _GL_WEIGHTS = np.polynomial.legendre.leggauss(12)


def _integrand(x, p: float, beta: float):
    return np.exp(beta * x * x) / (x ** (p * (1.0 - x)) * (1.0 - x) ** (p * x))


@lru_cache(maxsize=64)
def _table(p: float, beta: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
    # Dense near both ends where the integrand is singular (integrable, like x^-p and (1-x)^-p).
    u = np.linspace(0.0, 1.0, 2001)
    x = 0.5 - 0.5 * np.cos(np.pi * u)
    x = np.concatenate([np.geomspace(1e-9, x[1], 40)[:-1], x[1:]])
    x = np.concatenate([[0.0], x])
    # Interior pieces: 12-point Gauss-Legendre (no piece touches a singular end, and each spans at
    # most a factor of a few in distance to it, so the rule is exact to about 1e-10 relative).
    a, b = x[1:-2], x[2:-1]
    half, mid = 0.5 * (b - a), 0.5 * (b + a)
    nodes = mid[:, None] + half[:, None] * _GL_NODES[None, :]
    interior = half * (_integrand(nodes, p, beta) @ _GL_WEIGHTS)
    # End pieces from the asymptotes: near 0 the integrand is x^-p, near 1 it is exp(beta) (1-x)^-p,
    # each to a relative error of the order of the piece's width (1e-9 and 6e-7).
    first = x[1] ** (1.0 - p) / (1.0 - p)
    last = np.exp(beta) * (1.0 - x[-2]) ** (1.0 - p) / (1.0 - p)
    pieces = np.concatenate([[first], interior, [last]])
    return x, np.concatenate([[0.0], np.cumsum(pieces)])


def _beta_key(beta) -> float:
    # Tables are cached per beta rounded to 1e-3 (S changes by < 0.1 % per 1e-3 of beta).
    return round(float(beta), 3)


def progress_integral(x, p: float = 0.4, beta: float = 0.0):
    """S(X) for fractions X in [0, 1] [dimensionless].

    >>> round(float(progress_integral(0.01)), 4)   # about 0.01**0.6 / 0.6 for small X
    0.1043
    >>> bool(progress_integral(0.99, 2 / 3, beta=2.0) > 2 * progress_integral(0.99, 2 / 3))
    True
    """
    xs, ss = _table(float(p), _beta_key(beta))
    return np.interp(np.minimum(np.maximum(x, 0.0), 1.0), xs, ss)


def fraction_from_progress(s, p: float = 0.4, beta=0.0):
    """X = S^-1(s); s at or above S(1) gives 1. beta may be one value or one per entry of s.

    >>> round(float(fraction_from_progress(progress_integral(0.5))), 6)
    0.5
    >>> x = fraction_from_progress(np.array([0.5, 0.5]), 2 / 3, beta=np.array([0.0, 3.0]))
    >>> bool(x[1] < x[0])
    True
    """
    s = np.asarray(s, dtype=float)
    beta = np.asarray(beta, dtype=float)
    if beta.ndim == 0:
        xs, ss = _table(float(p), _beta_key(beta))
        return np.interp(s, ss, xs)
    out = np.empty(np.broadcast(s, beta).shape)
    s_b = np.broadcast_to(s, out.shape)
    beta_b = np.broadcast_to(beta, out.shape)
    for b in np.unique(beta_b):
        mask = beta_b == b
        xs, ss = _table(float(p), _beta_key(b))
        out[mask] = np.interp(s_b[mask], ss, xs)
    return out
