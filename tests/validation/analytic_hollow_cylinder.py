"""Series solution of transient conduction in a long hollow cylinder (tube) with convective
surfaces: the reference for the solver's tube sections.

A tube a <= r <= b with constant properties (k, rho, cp, alpha = k / (rho cp)), initially at T_i,
loses heat from t = 0 on through its outer surface (coefficient h_o) and its bore (h_i; 0 means an
insulated bore) to a fluid at T_inf. Separation of variables gives (Carslaw & Jaeger, Conduction
of Heat in Solids, 2nd ed., 1959, ch. VII, the region a < r < b; the same construction as their
solid-cylinder series)::

    theta(r, t) = (T - T_inf) / (T_i - T_inf) = sum_n c_n R_n(r) exp(-alpha l_n^2 t)
    R_n(r) = A_n J0(l_n r) + B_n Y0(l_n r)

with the boundary conditions at the bore, k R'(a) = h_i R(a), and at the outer surface,
-k R'(b) = h_o R(b). With R' = -l (A J1 + B Y1) the two conditions are a 2 x 2 homogeneous system
for (A, B); the eigenvalues l_n are the positive zeros of its determinant, found here by
bracketing sign changes on a fine grid (spacing a small fraction of pi / (b - a), the asymptotic
spacing of the zeros) and refining with brentq. The R_n are orthogonal with weight r, so for a
uniform initial temperature c_n = int R_n r dr / int R_n^2 r dr (composite Gauss-Legendre
quadrature, 16 points per half-wave of the highest mode).

Only numpy and scipy; imported by the validation tests.
"""

from __future__ import annotations

import numpy as np
from scipy import optimize, special


def _rows(lam, a, b, k, h_i, h_o):
    """Coefficients of (A, B) in the bore and outer conditions."""
    j0a, y0a, j1a, y1a = special.j0(lam * a), special.y0(lam * a), special.j1(lam * a), special.y1(lam * a)
    j0b, y0b, j1b, y1b = special.j0(lam * b), special.y0(lam * b), special.j1(lam * b), special.y1(lam * b)
    bore = (-k * lam * j1a - h_i * j0a, -k * lam * y1a - h_i * y0a)
    outer = (k * lam * j1b - h_o * j0b, k * lam * y1b - h_o * y0b)
    return bore, outer


def _determinant(lam, a, b, k, h_i, h_o):
    (p, q), (r, s) = _rows(lam, a, b, k, h_i, h_o)
    # Scaled by lam * a so that it neither vanishes nor blows up at small lam (Y0, Y1 are singular at 0).
    return (p * s - q * r) * lam * a


def eigenvalues(a, b, k, h_i, h_o, n_terms):
    """The first n_terms eigenvalues l_n [1/m] of the tube."""
    spacing = np.pi / (b - a)
    grid = np.linspace(1e-6 * spacing, (n_terms + 2) * spacing, 40 * (n_terms + 2))
    d = _determinant(grid, a, b, k, h_i, h_o)
    sign_change = np.flatnonzero(np.sign(d[:-1]) * np.sign(d[1:]) < 0)
    roots = [optimize.brentq(_determinant, grid[i], grid[i + 1], args=(a, b, k, h_i, h_o), xtol=1e-14, rtol=1e-14)
             for i in sign_change[:n_terms]]
    if len(roots) < n_terms:
        raise RuntimeError(f"found {len(roots)} of {n_terms} eigenvalues")
    return np.array(roots)


def _modes(lam, r, a, b, k, h_i, h_o):
    """R_n(r) for each eigenvalue (rows) at the radii r (columns), from the bore condition."""
    (p, q), _ = _rows(lam, a, b, k, h_i, h_o)
    # (A, B) orthogonal to the bore row (p, q): A = q, B = -p, scaled to unit size.
    A, B = q / np.hypot(p, q), -p / np.hypot(p, q)
    x = np.outer(lam, r)
    return A[:, None] * special.j0(x) + B[:, None] * special.y0(x)


def theta(r, t, a, b, k, rho, cp, h_i, h_o, n_terms=300):
    """Dimensionless temperature (T - T_inf) / (T_i - T_inf), shape (len(t), len(r)).

    Accurate where the first neglected mode is negligible: alpha l_N^2 t above about 30, i.e.
    alpha t / (b - a)^2 above about 3 / N^2 (3e-5 with the default 300 terms).
    """
    r = np.atleast_1d(np.asarray(r, dtype=float))
    t = np.atleast_1d(np.asarray(t, dtype=float))
    lam = eigenvalues(a, b, k, h_i, h_o, n_terms)
    # Composite Gauss-Legendre: one 16-point panel per half-wave of the highest mode.
    nodes, weights = np.polynomial.legendre.leggauss(16)
    edges = np.linspace(a, b, n_terms + 11)
    half = 0.5 * np.diff(edges)
    rq = ((edges[:-1] + half)[:, None] + half[:, None] * nodes[None, :]).ravel()
    wq = (half[:, None] * weights[None, :]).ravel() * rq
    modes_q = _modes(lam, rq, a, b, k, h_i, h_o)
    c = (modes_q @ wq) / ((modes_q ** 2) @ wq)
    alpha = k / (rho * cp)
    decay = c[None, :] * np.exp(-alpha * np.outer(t, lam ** 2))
    out = decay @ _modes(lam, r, a, b, k, h_i, h_o)
    out[t <= 0.0, :] = 1.0
    return out
