"""Self-check of the analytic reference module against independent values.

The module ``analytic_conduction`` is the yardstick for the solver's
validation tests, so it is checked here against values that do not come from
its own code: published one-term coefficients, the lumped-capacitance limit,
the large-Biot limit and closed-form error-function solutions.
"""

import warnings

import numpy as np
import pytest
from scipy import special

from analytic_conduction import (
    SHAPES,
    coefficients,
    dimensionless_temperature,
    eigenvalues,
    temperature,
)

# One-term coefficients (z1, C1), Incropera et al., Fundamentals of Heat and
# Mass Transfer, Table 5.1 -- values quoted from memory, 4 significant digits.
TABLE_5_1 = [
    # shape,   Bi,   z1,     C1
    ("plate", 1.0, 0.8603, 1.1191),  # Incropera et al. Table 5.1 (memory)
    ("bar", 1.0, 1.2558, 1.2071),  # Incropera et al. Table 5.1 (memory)
    ("sphere", 1.0, 1.5708, 1.2732),  # Incropera et al. Table 5.1 (memory)
    ("plate", 0.1, 0.3111, 1.0161),  # Incropera et al. Table 5.1 (memory)
    ("bar", 0.1, 0.4417, 1.0246),  # Incropera et al. Table 5.1 (memory)
    ("sphere", 0.1, 0.5423, 1.0298),  # Incropera et al. Table 5.1 (memory)
]


@pytest.mark.parametrize("shape, biot, z1_ref, c1_ref", TABLE_5_1)
def test_one_term_coefficients_match_incropera_table_5_1(shape, biot, z1_ref, c1_ref):
    z, c = coefficients(shape, biot, n_terms=5)
    assert z[0] == pytest.approx(z1_ref, rel=2e-3)
    assert c[0] == pytest.approx(c1_ref, rel=2e-3)


@pytest.mark.parametrize("shape", SHAPES)
@pytest.mark.parametrize("biot", [1e-3, 0.1, 1.0, 10.0, 1e3])
def test_eigenvalues_are_ordered_roots_one_per_interval(shape, biot):
    z = eigenvalues(shape, biot, n_terms=200)
    assert z.shape == (200,)
    assert np.all(z > 0) and np.all(np.diff(z) > 0)
    n = np.arange(200)
    if shape == "plate":
        resid = z * np.sin(z) - biot * np.cos(z)
        lo, hi = n * np.pi, (n + 0.5) * np.pi
    elif shape == "sphere":
        resid = (1.0 - biot) * np.sin(z) - z * np.cos(z)
        lo, hi = n * np.pi, (n + 1.0) * np.pi
    else:
        resid = z * special.j1(z) - biot * special.j0(z)
        j0z = special.jn_zeros(0, 200)
        lo, hi = np.concatenate(([0.0], j0z[:-1])), j0z
    assert np.all((z > lo) & (z < hi))
    assert np.max(np.abs(resid)) < 1e-9 * max(1.0, biot)


@pytest.mark.parametrize("m, shape", list(enumerate(SHAPES)))
def test_lumped_capacitance_limit_at_small_biot(m, shape):
    # Bi -> 0: uniform temperature, theta* = exp(-(m + 1) Bi Fo) with m = 0, 1, 2
    # for plate, cylinder, sphere (volume/area = R / (m + 1)).
    biot = 1e-3
    bi_fo = np.array([0.01, 0.1, 0.5, 1.0, 2.0])
    centre = dimensionless_temperature(shape, biot, bi_fo / biot, [0.0])[:, 0]
    np.testing.assert_allclose(centre, np.exp(-(m + 1) * bi_fo), rtol=2e-3)


@pytest.mark.parametrize("shape", SHAPES)
def test_surface_tends_to_bath_temperature_at_large_biot(shape):
    fo = [0.01, 0.1, 1.0]
    surface = np.array(
        [dimensionless_temperature(shape, bi, fo, [1.0])[:, 0] for bi in (10.0, 100.0, 1e3, 1e4)]
    )
    assert np.all(np.diff(surface, axis=0) < 0)  # decreasing with Bi
    assert np.all(surface[-1] < 1e-3)
    # Bi = inf: prescribed surface temperature, theta* = 0 at the surface
    assert np.all(dimensionless_temperature(shape, np.inf, fo, [1.0]) < 1e-12)
    # and the interior converges to the Bi = inf solution
    interior = [dimensionless_temperature(shape, bi, fo, [0.0, 0.5]) for bi in (1e4, np.inf)]
    np.testing.assert_allclose(interior[0], interior[1], atol=1e-3)


@pytest.mark.parametrize("biot", [0.5, 5.0, 50.0])
def test_plate_surface_at_short_time_matches_semi_infinite_solid(biot):
    # Before the mid-plane feels the cooling, the face of the plate behaves as a
    # semi-infinite solid with surface convection (Carslaw & Jaeger 1959, ch. II;
    # Incropera et al., ch. 5): theta*_s = exp(Bi^2 Fo) erfc(Bi sqrt(Fo)).
    fo = np.array([1e-3, 3e-3, 1e-2])
    surface = dimensionless_temperature("plate", biot, fo, [1.0])[:, 0]
    np.testing.assert_allclose(surface, special.erfcx(biot * np.sqrt(fo)), atol=1e-9)


def test_plate_with_prescribed_surface_matches_image_series():
    # Bi = inf, centre of the slab by the method of images (Carslaw & Jaeger
    # 1959, ch. III): theta*(0, Fo) = 1 - 2 sum_n (-1)^n erfc((2n + 1) / (2 sqrt(Fo))).
    fo = np.array([0.005, 0.05, 0.2, 0.5, 1.0])
    n = np.arange(60)[:, None]
    images = 1.0 - 2.0 * np.sum((-1.0) ** n * special.erfc((2 * n + 1) / (2 * np.sqrt(fo))), axis=0)
    centre = dimensionless_temperature("plate", np.inf, fo, [0.0])[:, 0]
    np.testing.assert_allclose(centre, images, atol=1e-10)


def test_shapes_fo_zero_and_bounds():
    th = dimensionless_temperature("sphere", 2.0, [0.0, 0.1, 0.3], np.linspace(0, 1, 7))
    assert th.shape == (3, 7)
    assert np.all(th[0] == 1.0)
    assert np.all((th >= 0.0) & (th <= 1.0))
    assert np.all(np.diff(th[1:], axis=1) <= 0)  # coldest at the surface
    assert np.all(np.diff(th, axis=0) <= 0)  # cooling with time
    scalar = dimensionless_temperature("bar", 1.0, 0.2, 0.5)
    assert scalar.shape == (1, 1)


def test_truncation_warning_and_invalid_input():
    with pytest.warns(RuntimeWarning):
        dimensionless_temperature("plate", 1.0, [1e-7], [0.5], n_terms=50)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        dimensionless_temperature("plate", 1.0, [1e-3], [0.5])
    with pytest.raises(ValueError):
        dimensionless_temperature("cube", 1.0, [0.1], [0.5])
    with pytest.raises(ValueError):
        dimensionless_temperature("plate", 0.0, [0.1], [0.5])
    with pytest.raises(ValueError):
        dimensionless_temperature("plate", 1.0, [-0.1], [0.5])
    with pytest.raises(ValueError):
        dimensionless_temperature("plate", 1.0, [0.1], [1.5])


def test_dimensional_wrapper_is_consistent():
    r, k, rho, cp, h = 0.02, 30.0, 7800.0, 500.0, 3000.0
    times = np.array([0.0, 5.0, 30.0, 120.0])
    x = np.array([0.0, 0.01, 0.02])
    temps = temperature("sphere", r, k, rho, cp, h, 850.0, 60.0, times, x)
    alpha = k / (rho * cp)
    theta = dimensionless_temperature("sphere", h * r / k, alpha * times / r**2, x / r)
    np.testing.assert_allclose(temps, 60.0 + 790.0 * theta)
    assert temps.shape == (4, 3)
    # plate is symmetric: -x and +x give the same temperature
    plate = temperature("plate", r, k, rho, cp, h, 850.0, 60.0, times[1:], [-0.015, 0.015])
    np.testing.assert_allclose(plate[:, 0], plate[:, 1])
