"""Classical series solutions of transient conduction with convective cooling.

Reference solutions used to validate the numerical solver.  A body with
constant properties (conductivity ``k``, density ``rho``, specific heat
``cp``, diffusivity ``alpha = k / (rho cp)``) is initially at the uniform
temperature ``T_i`` and, from ``t = 0`` on, loses heat from its whole surface
to a fluid at ``T_inf`` through a constant heat-transfer coefficient ``h``.

Three one-dimensional geometries are covered (``shape``):

* ``"plate"``  -- infinite plane wall of half-thickness ``L``, both faces
  cooled (symmetric about the mid-plane ``x = 0``);
* ``"bar"``    -- infinitely long solid circular cylinder of radius ``r0``;
* ``"sphere"`` -- solid sphere of radius ``r0``.

With the characteristic length ``R`` (``L`` or ``r0``) the problem depends only
on the dimensionless groups::

    Fo     = alpha t / R**2                      (Fourier number)
    Bi     = h R / k                             (Biot number)
    theta* = (T - T_inf) / (T_i - T_inf)         (dimensionless temperature)

and the solution is the eigenfunction series::

    theta*(x*, Fo) = sum_n C_n exp(-z_n**2 Fo) X(z_n x*),     x* = x / R

==========  =========================  ===================================  =======================
shape       eigenvalue equation        C_n                                  X(z x*)
==========  =========================  ===================================  =======================
plate       z tan z = Bi               4 sin z / (2 z + sin 2z)             cos(z x*)
bar         z J1(z) / J0(z) = Bi       2 J1(z) / (z (J0(z)**2 + J1(z)**2))  J0(z x*)
sphere      1 - z cot z = Bi           4 (sin z - z cos z) / (2z - sin 2z)  sin(z x*) / (z x*)
==========  =========================  ===================================  =======================

References
----------
H. S. Carslaw and J. C. Jaeger, *Conduction of Heat in Solids*, 2nd ed.,
Oxford University Press, 1959: ch. III (slab with surface heat transfer),
ch. VII (infinite circular cylinder), ch. IX (sphere).

F. P. Incropera, D. P. DeWitt, T. L. Bergman and A. S. Lavine,
*Fundamentals of Heat and Mass Transfer*, 6th ed., Wiley, 2007: ch. 5
(plane wall and radial systems with convection; one-term coefficients in
Table 5.1).

Validity: ``Bi`` in about ``[1e-6, 1e6]`` (``Bi = inf``, a prescribed surface
temperature, is accepted too) and ``Fo > 0``.  At ``Fo = 0`` the initial
condition ``theta* = 1`` is returned.  For very small ``Fo`` the series needs
many terms; a ``RuntimeWarning`` is issued when the first neglected term may
still matter (see :func:`dimensionless_temperature`).

Only numpy and scipy are used.  This module is imported by tests; it contains
no test code itself apart from the doctest examples.
"""

from __future__ import annotations

import functools
import warnings

import numpy as np
from scipy import optimize, special

__all__ = [
    "SHAPES",
    "eigenvalues",
    "coefficients",
    "dimensionless_temperature",
    "temperature",
]

#: Accepted geometry names.
SHAPES = ("plate", "bar", "sphere")

# Root tolerance for brentq (absolute); the smallest first root of interest
# (Bi = 1e-6, plate) is ~1e-3, so this still gives ~1e-12 relative accuracy.
_XTOL = 1e-15
_RTOL = 4.0 * np.finfo(float).eps

# Magnitude of the first neglected series term above which a warning is issued.
_TRUNCATION_WARN = 1e-6


def _check_shape(shape: str) -> str:
    if shape not in SHAPES:
        raise ValueError(f"shape must be one of {SHAPES}, got {shape!r}")
    return shape


def _check_biot(biot: float) -> float:
    biot = float(biot)
    if not biot > 0.0:  # also rejects NaN
        raise ValueError(f"biot must be > 0 (np.inf allowed), got {biot!r}")
    return biot


def _check_n_terms(n_terms: int) -> int:
    n = int(n_terms)
    if n < 1 or n != n_terms:
        raise ValueError(f"n_terms must be a positive integer, got {n_terms!r}")
    return n


def _plate_roots(biot: float, n: int) -> np.ndarray:
    k = np.arange(n)
    if np.isinf(biot):
        return (k + 0.5) * np.pi
    # z tan z = Bi written without the pole: g(z) = z sin z - Bi cos z.
    # On [k pi, (k + 1/2) pi]: g(k pi) = -Bi (-1)^k, g((k+1/2) pi) = (k+1/2) pi (-1)^k.
    def g(z: float) -> float:
        return z * np.sin(z) - biot * np.cos(z)

    return np.array(
        [
            optimize.brentq(g, kk * np.pi, (kk + 0.5) * np.pi, xtol=_XTOL, rtol=_RTOL)
            for kk in k
        ]
    )


def _sphere_roots(biot: float, n: int) -> np.ndarray:
    k = np.arange(n)
    if np.isinf(biot):
        return (k + 1.0) * np.pi
    # 1 - z cot z = Bi multiplied by sin z: g(z) = (1 - Bi) sin z - z cos z.
    # On [k pi, (k+1) pi], k >= 1: g(k pi) = -k pi (-1)^k, g((k+1) pi) = (k+1) pi (-1)^k.
    # For k = 0, g(0) = 0 is the trivial root; start at a > 0 where
    # 1 - a cot a < Bi (1 - z cot z ~ z^2/3 for small z, and 1 - cot 1 = 0.358).
    def g(z: float) -> float:
        return (1.0 - biot) * np.sin(z) - z * np.cos(z)

    a0 = min(0.5 * np.sqrt(3.0 * biot), 1.0)
    if not 1.0 - a0 / np.tan(a0) < biot:  # pragma: no cover - safety net
        a0 *= 1e-3
    lows = np.where(k == 0, a0, k * np.pi)
    return np.array(
        [
            optimize.brentq(g, lo, (kk + 1.0) * np.pi, xtol=_XTOL, rtol=_RTOL)
            for lo, kk in zip(lows, k)
        ]
    )


def _bar_roots(biot: float, n: int) -> np.ndarray:
    j0_zeros = special.jn_zeros(0, n)
    if np.isinf(biot):
        return j0_zeros
    # z J1/J0 = Bi written without the pole: g(z) = z J1(z) - Bi J0(z).
    # z J1/J0 increases monotonically between consecutive zeros of J0
    # (derivative z (J0^2 + J1^2) / J0^2 > 0), so exactly one root lies in
    # (j_{0,k-1}, j_{0,k}) with j_{0,0} := 0; g(0) = -Bi, g(j_{0,k}) = j_{0,k} J1(j_{0,k}).
    def g(z: float) -> float:
        return z * special.j1(z) - biot * special.j0(z)

    edges = np.concatenate(([0.0], j0_zeros))
    return np.array(
        [
            optimize.brentq(g, lo, hi, xtol=_XTOL, rtol=_RTOL)
            for lo, hi in zip(edges[:-1], edges[1:])
        ]
    )


@functools.lru_cache(maxsize=256)
def _eigenvalues_cached(shape: str, biot: float, n_terms: int) -> np.ndarray:
    roots = {"plate": _plate_roots, "bar": _bar_roots, "sphere": _sphere_roots}[shape]
    z = roots(biot, n_terms)
    z.setflags(write=False)
    return z


def eigenvalues(shape: str, biot: float, n_terms: int = 200) -> np.ndarray:
    """First ``n_terms`` positive eigenvalues ``z_n`` (dimensionless, ascending).

    Roots of the transcendental equations (``Bi = h R / k``)::

        plate : z tan z = Bi            one root in (n pi, (n + 1/2) pi)
        bar   : z J1(z) / J0(z) = Bi    one root between consecutive zeros of J0
        sphere: 1 - z cot z = Bi        one root in (n pi, (n + 1) pi)

    Each root is bracketed in its own interval and refined with
    :func:`scipy.optimize.brentq`, using pole-free forms of the equations
    (``z sin z - Bi cos z``, ``z J1 - Bi J0``, ``(1 - Bi) sin z - z cos z``).
    Robust for ``Bi`` from 1e-6 to 1e6; ``Bi = np.inf`` gives the limits
    ``(n + 1/2) pi``, the zeros of ``J0`` and ``(n + 1) pi``.

    Reference: Carslaw & Jaeger (1959), chs. III, VII, IX; Incropera et al.,
    *Fundamentals of Heat and Mass Transfer*, ch. 5.

    Parameters
    ----------
    shape : {"plate", "bar", "sphere"}
    biot : float
        Biot number ``h R / k`` (> 0), ``R`` = half-thickness or radius.
    n_terms : int
        Number of eigenvalues.

    Returns
    -------
    numpy.ndarray of shape ``(n_terms,)``.

    Examples
    --------
    >>> import numpy as np
    >>> print(np.round(eigenvalues("plate", 1.0, n_terms=3), 4))
    [0.8603 3.4256 6.4373]
    >>> print(np.round(eigenvalues("sphere", 1.0, n_terms=2), 4))
    [1.5708 4.7124]
    """
    z = _eigenvalues_cached(_check_shape(shape), _check_biot(biot), _check_n_terms(n_terms))
    return z.copy()


def coefficients(shape: str, biot: float, n_terms: int = 200) -> tuple[np.ndarray, np.ndarray]:
    """Eigenvalues ``z_n`` and series coefficients ``C_n`` (both dimensionless).

    ::

        plate : C_n = 4 sin z_n / (2 z_n + sin 2 z_n)
        bar   : C_n = 2 J1(z_n) / (z_n (J0(z_n)**2 + J1(z_n)**2))
        sphere: C_n = 4 (sin z_n - z_n cos z_n) / (2 z_n - sin 2 z_n)

    ``C_1`` and ``z_1`` are the "one-term" constants tabulated by
    Incropera et al., *Fundamentals of Heat and Mass Transfer*, Table 5.1;
    see also Carslaw & Jaeger (1959), chs. III, VII, IX.

    Parameters
    ----------
    shape : {"plate", "bar", "sphere"}
    biot : float
        Biot number ``h R / k`` (> 0).
    n_terms : int
        Number of terms.

    Returns
    -------
    (z, C) : tuple of numpy.ndarray, each of shape ``(n_terms,)``.

    Examples
    --------
    >>> z, c = coefficients("sphere", 1.0, n_terms=1)
    >>> print(f"{z[0]:.4f} {c[0]:.4f}")
    1.5708 1.2732
    >>> z, c = coefficients("bar", 1.0, n_terms=1)
    >>> print(f"{z[0]:.4f} {c[0]:.4f}")
    1.2558 1.2071
    """
    z = eigenvalues(shape, biot, n_terms)
    if shape == "plate":
        c = 4.0 * np.sin(z) / (2.0 * z + np.sin(2.0 * z))
    elif shape == "bar":
        j0, j1 = special.j0(z), special.j1(z)
        c = 2.0 * j1 / (z * (j0**2 + j1**2))
    else:  # sphere
        c = 4.0 * (np.sin(z) - z * np.cos(z)) / (2.0 * z - np.sin(2.0 * z))
    return z, c


def _spatial(shape: str, z: np.ndarray, x: np.ndarray) -> np.ndarray:
    """Eigenfunctions X(z_n x*) as an array of shape (len(z), len(x))."""
    arg = np.outer(z, x)
    if shape == "plate":
        return np.cos(arg)
    if shape == "bar":
        return special.j0(arg)
    return np.sinc(arg / np.pi)  # sin(u)/u with the limit 1 at u = 0


def dimensionless_temperature(
    shape: str,
    biot: float,
    fourier,
    rel_position,
    n_terms: int = 200,
) -> np.ndarray:
    """Dimensionless temperature ``theta* = (T - T_inf) / (T_i - T_inf)``.

    ::

        theta*(x*, Fo) = sum_{n=1}^{n_terms} C_n exp(-z_n**2 Fo) X(z_n x*)

    with ``X = cos`` (plate), ``J0`` (bar) or ``sin(u)/u`` (sphere, 1 at the
    centre), ``Fo = alpha t / R**2``, ``x* = x / R``, and ``z_n``, ``C_n``
    from :func:`coefficients`.  Reference: Carslaw & Jaeger (1959), chs. III,
    VII, IX; Incropera et al., *Fundamentals of Heat and Mass Transfer*, ch. 5.

    ``Fo`` must be ``>= 0``.  Entries with ``Fo == 0`` return the initial
    condition, 1, at every position (the series converges only slowly
    there).  Results are clipped to ``[0, 1]`` (which the exact solution
    satisfies) to remove truncation ripple.  A ``RuntimeWarning`` is issued if
    the first neglected term, ``|C_{N+1}| exp(-z_{N+1}**2 Fo)``, exceeds 1e-6
    for the smallest positive ``Fo``; raise ``n_terms`` then.  With the default
    200 terms this happens below ``Fo`` of about 3e-5.

    Parameters
    ----------
    shape : {"plate", "bar", "sphere"}
    biot : float
        Biot number ``h R / k`` (> 0; ``np.inf`` = prescribed surface temperature).
    fourier : float or array_like
        Fourier numbers ``alpha t / R**2`` (>= 0), flattened to 1-D.
    rel_position : float or array_like
        Positions ``x / R`` measured from the centre (mid-plane / axis /
        centre), in ``[0, 1]``, flattened to 1-D.
    n_terms : int
        Number of series terms.

    Returns
    -------
    numpy.ndarray of shape ``(len(fourier), len(rel_position))``.

    Examples
    --------
    >>> import numpy as np
    >>> th = dimensionless_temperature("plate", 1.0, [0.0, 0.5, 2.0], [0.0, 1.0])
    >>> print(np.round(th, 4))
    [[1.     1.    ]
     [0.7725 0.5045]
     [0.2547 0.1661]]
    """
    shape = _check_shape(shape)
    fo = np.atleast_1d(np.asarray(fourier, dtype=float)).ravel()
    xs = np.atleast_1d(np.asarray(rel_position, dtype=float)).ravel()
    if np.any(~np.isfinite(fo)) or np.any(fo < 0.0):
        raise ValueError("fourier must be finite and >= 0")
    if np.any(~np.isfinite(xs)) or np.any(xs < 0.0) or np.any(xs > 1.0 + 1e-12):
        raise ValueError("rel_position must lie in [0, 1] (measured from the centre)")
    xs = np.minimum(xs, 1.0)  # absorb round-off such as x / R = 1 + 2e-16

    n = _check_n_terms(n_terms)
    # One extra term to estimate the truncation error.
    z_all, c_all = coefficients(shape, biot, n + 1)
    z, c = z_all[:n], c_all[:n]

    positive = fo > 0.0
    if np.any(positive):
        first_dropped = abs(c_all[n]) * np.exp(-z_all[n] ** 2 * fo[positive].min())
        if first_dropped > _TRUNCATION_WARN:
            warnings.warn(
                f"series truncated at {n} terms is not converged for "
                f"Fo = {fo[positive].min():.3g} (first neglected term "
                f"{first_dropped:.2e}); increase n_terms",
                RuntimeWarning,
                stacklevel=2,
            )

    decay = c[np.newaxis, :] * np.exp(-np.outer(fo, z**2))  # (nF, N)
    theta = decay @ _spatial(shape, z, xs)  # (nF, nX)
    theta[~positive, :] = 1.0
    return np.clip(theta, 0.0, 1.0)


def temperature(
    shape: str,
    radius_m: float,
    conductivity_w_mk: float,
    density_kg_m3: float,
    specific_heat_j_kgk: float,
    htc_w_m2k: float,
    initial_c: float,
    bath_c: float,
    times_s,
    positions_m,
    n_terms: int = 200,
) -> np.ndarray:
    """Temperature field in degrees C for dimensional inputs (SI units).

    ::

        alpha = k / (rho cp)   [m^2/s]
        Fo = alpha t / R**2,  Bi = h R / k,  x* = x / R
        T(x, t) = T_inf + (T_i - T_inf) theta*(x*, Fo)

    with ``theta*`` from :func:`dimensionless_temperature`.  Reference:
    Carslaw & Jaeger (1959), chs. III, VII, IX; Incropera et al.,
    *Fundamentals of Heat and Mass Transfer*, ch. 5.

    Parameters
    ----------
    shape : {"plate", "bar", "sphere"}
    radius_m : float
        Half-thickness (plate) or radius (bar, sphere) ``R`` [m].
    conductivity_w_mk : float
        Thermal conductivity ``k`` [W/(m K)].
    density_kg_m3 : float
        Density ``rho`` [kg/m^3].
    specific_heat_j_kgk : float
        Specific heat ``cp`` [J/(kg K)].
    htc_w_m2k : float
        Heat-transfer coefficient ``h`` [W/(m^2 K)] (``np.inf`` allowed).
    initial_c, bath_c : float
        Initial uniform temperature ``T_i`` and fluid temperature ``T_inf`` [deg C].
    times_s : float or array_like
        Times since immersion [s], >= 0.
    positions_m : float or array_like
        Distances from the centre [m], ``0 <= x <= R``; for the plate, which
        is symmetric, negative ``x`` (the other half) is accepted too.
    n_terms : int
        Number of series terms.

    Returns
    -------
    numpy.ndarray of shape ``(len(times_s), len(positions_m))`` [deg C].

    Examples
    --------
    Steel-like bar, 25 mm radius, quenched from 850 C into a 50 C bath
    (Bi = 500 * 0.025 / 25 = 0.5):

    >>> import numpy as np
    >>> T = temperature("bar", 0.025, 25.0, 7800.0, 600.0, 500.0, 850.0, 50.0,
    ...                 times_s=[0.0, 60.0], positions_m=[0.0, 0.025])
    >>> print(np.round(T, 1))
    [[850.  850. ]
     [616.1 497.7]]
    """
    r = float(radius_m)
    k = float(conductivity_w_mk)
    rho = float(density_kg_m3)
    cp = float(specific_heat_j_kgk)
    h = float(htc_w_m2k)
    if not (r > 0 and k > 0 and rho > 0 and cp > 0 and h > 0) or not np.isfinite([r, k, rho, cp]).all():
        raise ValueError("radius, conductivity, density, specific heat and htc must be > 0")
    alpha = k / (rho * cp)
    t = np.atleast_1d(np.asarray(times_s, dtype=float)).ravel()
    x = np.atleast_1d(np.asarray(positions_m, dtype=float)).ravel()
    if shape == "plate":
        x = np.abs(x)
    theta = dimensionless_temperature(shape, h * r / k, alpha * t / r**2, x / r, n_terms)
    return float(bath_c) + (float(initial_c) - float(bath_c)) * theta
