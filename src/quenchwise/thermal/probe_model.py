"""Forward models of the ISO 9950 type probe (12.5 mm alloy 600 cylinder): 1-D radial (ProbeModel) and
2-D axisymmetric with its end faces (FiniteProbeModel), own numpy/scipy solvers; alloy 600 properties.

Method and property sources: see thermal/probe.py (the inversion) and the docstrings below.
"""

from __future__ import annotations

import math
from typing import Callable

import numpy as np
from scipy.linalg import solve_banded




PROBE_DIAMETER_M = 0.0125
PROBE_LENGTH_M = 0.060
INCONEL600_DENSITY_KG_M3 = 8470.0  # (memory)
INCONEL600_T_C = np.array([20.0, 100.0, 200.0, 300.0, 400.0, 500.0, 600.0, 700.0, 800.0, 900.0, 1000.0])
INCONEL600_K_W_MK = np.array([14.9, 15.9, 17.3, 19.0, 20.5, 22.1, 23.9, 25.7, 27.5, 29.6, 31.7])  # (memory)
INCONEL600_CP_J_KGK = np.array([444.0, 465.0, 486.0, 502.0, 519.0, 536.0, 578.0, 595.0, 611.0, 628.0, 645.0])  # (memory)


def inconel600_conductivity(temperature_c):
    """Thermal conductivity of alloy 600 [W/(m K)] (memory, producer's data sheet values).

    >>> round(float(inconel600_conductivity(800.0)), 1)
    27.5
    """
    return np.interp(temperature_c, INCONEL600_T_C, INCONEL600_K_W_MK)


def inconel600_specific_heat(temperature_c):
    """Specific heat of alloy 600 [J/(kg K)] (memory, producer's data sheet values).

    >>> round(float(inconel600_specific_heat(20.0)))
    444
    """
    return np.interp(temperature_c, INCONEL600_T_C, INCONEL600_CP_J_KGK)


# -- the probe model -----------------------------------------------------------------------
class ProbeModel:
    """1-D radial finite-volume model of the probe: uniform cells, BDF2 steps, banded solves."""

    def __init__(self, cells: int = 30, radius_m: float = PROBE_DIAMETER_M / 2.0,
                 conductivity: Callable = inconel600_conductivity, specific_heat: Callable = inconel600_specific_heat,
                 density_kg_m3: float = INCONEL600_DENSITY_KG_M3):
        self.n = int(cells)
        self.radius = float(radius_m)
        self.dx = self.radius / self.n
        faces = np.linspace(0.0, self.radius, self.n + 1)
        self.volume = 0.5 * (faces[1:] ** 2 - faces[:-1] ** 2)   # per radian and unit length
        self.face_r = faces[1:-1]                                 # inner faces
        self.conductivity, self.specific_heat, self.density = conductivity, specific_heat, density_kg_m3
        # Centre value from the first two cells, T = a + b r^2 near the axis.
        self.probe_weights = np.array([9.0 / 8.0, -1.0 / 8.0])

    def centre(self, field_c: np.ndarray) -> np.ndarray:
        return self.probe_weights[0] * field_c[..., 0] + self.probe_weights[1] * field_c[..., 1]

    def _banded(self, field_c, lead: float, dt: float, surface_g: float = 0.0):
        """Banded matrix of  lead * C / dt * T - div(k grad T) (+ surface_g at the last cell)."""
        k = self.conductivity(field_c)
        cap = self.density * self.specific_heat(field_c) * self.volume / dt
        kf = 2.0 * k[:-1] * k[1:] / (k[:-1] + k[1:])
        g = self.face_r * kf / self.dx
        ab = np.zeros((3, self.n))
        ab[1] = lead * cap
        ab[1, :-1] += g
        ab[1, 1:] += g
        ab[0, 1:] = -g
        ab[2, :-1] = -g
        ab[1, -1] += surface_g
        return ab, cap, k

    def film_step(self, field_now, field_old, surface_c: float, htc: Callable, bath_c: float, dt: float,
                  first: bool):
        """One forward step with the surface film h(T_surface) in series with the half cell (h at the
        last step's surface temperature): BDF2, implicit Euler when `first`. Returns the new field and
        the new surface temperature."""
        lead, c_now, c_old = (1.0, 1.0, 0.0) if first else (1.5, 2.0, 0.5)
        half = float(self.conductivity(field_now[-1])) / (0.5 * self.dx)
        h = float(htc(surface_c))
        g = self.radius / (1.0 / max(h, 1e-12) + 1.0 / half)
        ab, cap, _ = self._banded(field_now, lead, dt, g)
        rhs = cap * (c_now * field_now - c_old * field_old)
        rhs[-1] += g * bath_c
        new = solve_banded((1, 1), ab, rhs)
        return new, (half * new[-1] + h * bath_c) / (half + h)

    def surface_temperature(self, field_c, flux_w_m2, k_last):
        """Surface temperature from the last cell and the flux into the body (half-cell gradient)."""
        return field_c[..., -1] + flux_w_m2 * 0.5 * self.dx / k_last

    def cool(self, htc: Callable, bath_c: float, initial_c: float, times_s: np.ndarray, dt: float):
        """Forward run with a surface film h(T_surface) [W/(m2 K)]: centre temperature at times_s
        and the surface temperature; h in series with the half cell, lagged by one step."""
        n_steps = int(math.ceil(times_s[-1] / dt))
        t_grid = np.arange(n_steps + 1) * dt
        field_now = np.full(self.n, float(initial_c))
        field_old = field_now.copy()
        centre = [self.centre(field_now)]
        surface = [float(initial_c)]
        for step in range(n_steps):
            new, ts = self.film_step(field_now, field_old, surface[-1], htc, bath_c, dt, step == 0)
            field_old, field_now = field_now, new
            centre.append(self.centre(new))
            surface.append(ts)
        centre, surface = np.array(centre), np.array(surface)
        return np.interp(times_s, t_grid, centre), np.interp(times_s, t_grid, surface)


class FiniteProbeModel:
    """2-D axisymmetric model of the whole probe (radius x half-length, symmetric about the
    mid-plane), quenched on its side and on its end face with the same h(T_surface): finite
    volumes, BDF2 steps (implicit Euler first), a sparse LU solve per step. Used for the end
    correction of the 1-D fit and for synthesizing realistic records; not inside the inversion."""

    def __init__(self, radial_cells: int = 12, axial_cells: int = 24, growth: float = 1.12,
                 radius_m: float = PROBE_DIAMETER_M / 2.0, half_length_m: float = PROBE_LENGTH_M / 2.0,
                 conductivity: Callable = inconel600_conductivity, specific_heat: Callable = inconel600_specific_heat,
                 density_kg_m3: float = INCONEL600_DENSITY_KG_M3):
        nr, nz = int(radial_cells), int(axial_cells)
        self.nr, self.nz, self.radius = nr, nz, float(radius_m)
        self.dr = self.radius / nr
        w = growth ** np.arange(nz)[::-1]               # finer towards the quenched end face
        self.dz = w / w.sum() * half_length_m
        rf = np.linspace(0.0, self.radius, nr + 1)
        self.ring = 0.5 * (rf[1:] ** 2 - rf[:-1] ** 2)   # cross-section of each ring per radian
        self.volume = np.outer(self.ring, self.dz).ravel()
        idx = np.arange(nr * nz).reshape(nr, nz)
        self.rad_a, self.rad_b = idx[:-1, :].ravel(), idx[1:, :].ravel()
        self.rad_w = np.outer(rf[1:-1] / self.dr, self.dz).ravel()          # r_f dz / dr
        self.ax_a, self.ax_b = idx[:, :-1].ravel(), idx[:, 1:].ravel()
        dzc = 0.5 * (self.dz[:-1] + self.dz[1:])
        self.ax_w = np.outer(self.ring, 1.0 / dzc).ravel()                   # ring / dz_c
        self.side = idx[-1, :]
        self.side_area, self.side_half = self.radius * self.dz, 0.5 * self.dr
        self.end = idx[:, -1]
        self.end_area, self.end_half = self.ring, 0.5 * self.dz[-1]
        n = nr * nz
        a, b = np.concatenate([self.rad_a, self.ax_a]), np.concatenate([self.rad_b, self.ax_b])
        self._rows = np.concatenate([a, b, np.arange(n)])
        self._cols = np.concatenate([b, a, np.arange(n)])
        self._a, self._b = a, b
        self.conductivity, self.specific_heat, self.density = conductivity, specific_heat, density_kg_m3
        # Centre (r = 0, z = 0) from the cells next to it: T = a + b r^2 + c z^2.
        z0, z1 = 0.5 * self.dz[0], self.dz[0] + 0.5 * self.dz[1]
        self._cz = z0 * z0 / (z1 * z1 - z0 * z0)
        self._i00, self._i10, self._i01 = idx[0, 0], idx[1, 0], idx[0, 1]

    def centre(self, field_c):
        t00 = field_c[self._i00]
        return t00 - (field_c[self._i10] - t00) / 8.0 - (field_c[self._i01] - t00) * self._cz

    def cool(self, htc: Callable, bath_c: float, initial_c: float, times_s: np.ndarray, dt: float) -> np.ndarray:
        """Centre temperature at times_s of the finite probe quenched with h(T_surface)."""
        from scipy.sparse import csc_matrix
        from scipy.sparse.linalg import splu

        n = self.nr * self.nz
        n_steps = int(math.ceil(times_s[-1] / dt))
        field_now = np.full(n, float(initial_c))
        field_old = field_now.copy()
        centre = [self.centre(field_now)]
        w_all = np.concatenate([self.rad_w, self.ax_w])
        for step in range(n_steps):
            lead, c_now, c_old = (1.0, 1.0, 0.0) if step == 0 else (1.5, 2.0, 0.5)
            k = self.conductivity(field_now)
            cap = self.density * self.specific_heat(field_now) * self.volume / dt
            g = w_all * 2.0 * k[self._a] * k[self._b] / (k[self._a] + k[self._b])
            diag = lead * cap + np.bincount(self._a, g, n) + np.bincount(self._b, g, n)
            rhs = cap * (c_now * field_now - c_old * field_old)
            for cells, area, half in ((self.side, self.side_area, self.side_half),
                                      (self.end, self.end_area, self.end_half)):
                tc = field_now[cells]
                gh = k[cells] / half
                h = htc(tc)
                h = htc((gh * tc + h * bath_c) / (gh + h))
                geff = area / (1.0 / np.maximum(h, 1e-12) + 1.0 / gh)
                np.add.at(diag, cells, geff)
                np.add.at(rhs, cells, geff * bath_c)
            a = csc_matrix((np.concatenate([-g, -g, diag]), (self._rows, self._cols)), shape=(n, n))
            new = splu(a).solve(rhs)
            field_old, field_now = field_now, new
            centre.append(self.centre(new))
        t_grid = np.arange(n_steps + 1) * dt
        return np.interp(times_s, t_grid, np.array(centre))


def end_effect(htc: Callable, bath_c: float, initial_c: float, times_s: np.ndarray, dt: float,
               model: FiniteProbeModel | None = None) -> np.ndarray:
    """Centre temperature of the finite probe minus that of an infinitely long one [K], both with
    the same h(T_surface) and the same radial mesh and steps (so only the end faces differ)."""
    model = model or FiniteProbeModel()
    finite = model.cool(htc, bath_c, initial_c, times_s, dt)
    long_probe = ProbeModel(cells=model.nr, radius_m=model.radius, conductivity=model.conductivity,
                            specific_heat=model.specific_heat, density_kg_m3=model.density)
    infinite, _ = long_probe.cool(htc, bath_c, initial_c, times_s, dt)
    return finite - infinite
