"""Thermal properties of steel by phase, mixed by volume fraction.

Tables are typical values for low-alloy steels (memory; shapes as in handbook property data for
carbon and low-alloy steels): austenite conducts about half as well as the ferritic products.
Density is constant (7 800 kg/m3): the 1-4 % volume change of the transformations is neglected
so mass and volume fractions coincide and the mesh does not move.

Between the table points the values are linear in temperature and held constant beyond the ends
(as numpy.interp does). The sensible enthalpy of a phase group, h(T) = integral from 0 C to T of
cp dT, is then piecewise quadratic and is evaluated exactly (``PropertyTables``); the solver
converts each step's energy to temperature through it, which keeps its energy balance exact.
"""

from __future__ import annotations

import numpy as np

DENSITY_KG_M3 = 7800.0

# Temperature grid [C] and values per phase group (memory).
_T = np.array([0.0, 200.0, 400.0, 600.0, 800.0, 1000.0, 1200.0])
_CONDUCTIVITY = {  # W/(m K)
    "austenite": np.array([15.0, 17.5, 20.0, 22.5, 25.0, 27.5, 30.0]),
    "ferritic": np.array([49.0, 45.0, 40.0, 34.0, 27.0, 27.0, 27.0]),
    "martensite": np.array([43.0, 40.5, 37.5, 33.5, 27.0, 27.0, 27.0]),
}
_SPECIFIC_HEAT = {  # J/(kg K)
    "austenite": np.array([480.0, 507.0, 533.0, 560.0, 587.0, 613.0, 640.0]),
    "ferritic": np.array([450.0, 500.0, 560.0, 660.0, 760.0, 760.0, 760.0]),
    "martensite": np.array([450.0, 500.0, 560.0, 660.0, 760.0, 760.0, 760.0]),
}
# Which table each product uses.
_GROUP = {"austenite": "austenite", "martensite": "martensite", "ferrite": "ferritic", "pearlite": "ferritic",
          "bainite": "ferritic", "cementite": "ferritic"}


def phase_conductivity(group: str, temperature_c):
    """Conductivity of a phase group at T [W/(m K)] (memory tables above).

    >>> float(phase_conductivity("austenite", 800.0)), float(phase_conductivity("ferritic", 20.0))
    (25.0, 48.6)
    """
    return np.interp(temperature_c, _T, _CONDUCTIVITY[group])


def phase_specific_heat(group: str, temperature_c):
    """Specific heat of a phase group at T [J/(kg K)] (memory tables above).

    >>> float(phase_specific_heat("austenite", 600.0))
    560.0
    """
    return np.interp(temperature_c, _T, _SPECIFIC_HEAT[group])


def mixed_properties(temperature_c: np.ndarray, fractions: dict[str, np.ndarray]):
    """(conductivity, specific heat) of each node, linear in the volume fractions.

    >>> k, cp = mixed_properties(np.array([800.0]), {"austenite": np.array([1.0])})
    >>> float(k[0]), float(cp[0])
    (25.0, 587.0)
    """
    k = np.zeros_like(temperature_c, dtype=float)
    cp = np.zeros_like(temperature_c, dtype=float)
    total = np.zeros_like(temperature_c, dtype=float)
    for name, frac in fractions.items():
        group = _GROUP[name]
        k += frac * phase_conductivity(group, temperature_c)
        cp += frac * phase_specific_heat(group, temperature_c)
        total += frac
    total = np.where(total > 0, total, 1.0)
    return k / total, cp / total


#: Phase groups with their own tables, in a fixed order (rows of the weight arrays below).
GROUPS = ("austenite", "ferritic", "martensite")


def group_weights(fractions: dict[str, np.ndarray], n: int | None = None) -> np.ndarray:
    """Volume fraction of each phase group (rows in GROUPS order), normalized to sum 1 per node.

    >>> w = group_weights({"austenite": np.array([0.25]), "pearlite": np.array([0.5]),
    ...                    "bainite": np.array([0.25])})
    >>> w[:, 0].tolist()
    [0.25, 0.75, 0.0]
    """
    if n is None:
        n = len(next(iter(fractions.values())))
    w = np.zeros((len(GROUPS), n))
    for name, frac in fractions.items():
        w[GROUPS.index(_GROUP[name])] += frac
    total = w.sum(axis=0)
    return w / np.where(total > 0, total, 1.0)


class PropertyTables:
    """The tables above for many nodes at once: conductivity, specific heat and sensible enthalpy
    of phase mixtures.

    h(T) of a group is the exact integral of its piecewise-linear cp from 0 C; beyond the table
    ends cp is constant, so h continues linearly. All three are linear in the group weights, so
    the tables of a node's mixture are formed once (``mixture``) and then looked up with one
    shared segment index.

    >>> tab = PropertyTables()
    >>> mix = tab.mixture(group_weights({"austenite": np.array([1.0, 1.0])}))
    >>> k, cp, h = mix.evaluate(np.array([200.0, 800.0]))
    >>> cp.tolist(), round(float(h[0]), 1)      # h(200) = (480 + 507) / 2 * 200
    ([507.0, 587.0], 98700.0)
    >>> np.round(mix.temperature_for_enthalpy(h, np.array([150.0, 900.0])), 9).tolist()
    [200.0, 800.0]
    """

    def __init__(self):
        self.grid = _T
        self.k = np.array([_CONDUCTIVITY[g] for g in GROUPS])
        self.cp = np.array([_SPECIFIC_HEAT[g] for g in GROUPS])
        width = np.diff(self.grid)
        # Exact enthalpy at the grid points (the trapezoid rule is exact for linear cp), h(0 C) = 0.
        steps = 0.5 * (self.cp[:, 1:] + self.cp[:, :-1]) * width
        h = np.concatenate([np.zeros((len(GROUPS), 1)), np.cumsum(steps, axis=1)], axis=1)
        self.h = h - np.array([np.interp(0.0, self.grid, row) for row in h])[:, None]
        self.k_slope = np.diff(self.k, axis=1) / width
        self.cp_slope = np.diff(self.cp, axis=1) / width

    def mixture(self, weights: np.ndarray, out: "MixedProperties | None" = None) -> "MixedProperties":
        """Tables of each node's phase mixture; weights from group_weights (rows in GROUPS order).
        With out (a mixture of the same nodes), its arrays are overwritten instead of allocated."""
        w = weights.T
        if out is None:
            return MixedProperties(self.grid, w @ self.k, w @ self.k_slope, w @ self.cp, w @ self.cp_slope, w @ self.h)
        for table, target in ((self.k, out.k_table), (self.k_slope, out.k_slope_table), (self.cp, out.cp_table),
                              (self.cp_slope, out.cp_slope_table), (self.h, out.h_table)):
            np.matmul(w, table, out=target)
        return out


class MixedProperties:
    """Per-node property tables of a phase mixture on the common temperature grid: values at the
    grid points (n, m) and slopes of the segments (n, m - 1)."""

    def __init__(self, grid, k, k_slope, cp, cp_slope, h):
        self.grid = grid
        n, m = cp.shape
        # (n, m) tables, one row per node; the flat views below are what the lookups index
        self.k_table, self.k_slope_table, self.cp_table, self.cp_slope_table, self.h_table = k, k_slope, cp, cp_slope, h
        # Flat views of the same memory (updated in place by PropertyTables.mixture(out=...)).
        self.k, self.k_slope, self.cp, self.cp_slope, self.h = (a.reshape(-1) for a in (k, k_slope, cp, cp_slope, h))
        self.cp_first, self.cp_last = cp[:, 0], cp[:, -1]
        self.row = np.arange(n) * m
        self.row_slope = np.arange(n) * (m - 1)

    def _locate(self, temperature_c):
        t = np.asarray(temperature_c, dtype=float)
        lo, hi = self.grid[0], self.grid[-1]
        # np.minimum/np.maximum: np.clip's Python wrapper costs more than the work on these small arrays.
        tc = np.minimum(np.maximum(t, lo), hi)
        j = np.minimum(np.maximum(np.searchsorted(self.grid, tc, side="right") - 1, 0), self.grid.size - 2)
        return t, tc - self.grid[j], self.row + j, self.row_slope + j

    def _cp_h(self, t, u, at, at_slope):
        cp0, slope = self.cp[at], self.cp_slope[at_slope]
        cp = cp0 + slope * u
        h = (self.h[at] + (cp0 + 0.5 * slope * u) * u
             + self.cp_first * np.minimum(t - self.grid[0], 0.0) + self.cp_last * np.maximum(t - self.grid[-1], 0.0))
        return cp, h

    def evaluate(self, temperature_c):
        """(conductivity [W/(m K)], specific heat [J/(kg K)], enthalpy [J/kg]) of each node."""
        t, u, at, at_slope = self._locate(temperature_c)
        k = self.k[at] + self.k_slope[at_slope] * u
        cp, h = self._cp_h(t, u, at, at_slope)
        return k, cp, h

    def enthalpy(self, temperature_c):
        """(specific heat [J/(kg K)], enthalpy [J/kg]) of each node."""
        return self._cp_h(*self._locate(temperature_c))

    def temperature_for_enthalpy(self, enthalpy, guess, iterations: int = 3):
        """Temperature [C] at which each node's mixture has the given enthalpy [J/kg].

        Newton's method from guess: h is increasing (cp > 0) and piecewise quadratic, so from a
        guess within a time step's change (error e) each iteration leaves about
        e^2 |dcp/dT| / (2 cp) (1e-3 K -> 1e-10 K); the fixed count (not "until converged over
        all nodes") keeps a node's answer independent of the other nodes solved with it."""
        t = np.array(guess, dtype=float)
        for _ in range(iterations):
            cp, h = self.enthalpy(t)
            t -= (h - enthalpy) / cp
        return t


class ConstantOverrides:
    """Constant conductivity / specific heat per node that replace the tables where given (NaN:
    use the phase tables), for verification runs against analytic solutions. Shared by the
    section solver and the end-quench solver."""

    def __init__(self, conductivity_w_mk: np.ndarray, specific_heat_j_kgk: np.ndarray):
        self.k = np.asarray(conductivity_w_mk, dtype=float)
        self.cp = np.asarray(specific_heat_j_kgk, dtype=float)
        self.k_fixed = ~np.isnan(self.k)
        self.cp_fixed = ~np.isnan(self.cp)

    def properties(self, temperature, mixture: "MixedProperties"):
        """Conductivity, specific heat and sensible enthalpy per node."""
        k, cp, h = mixture.evaluate(temperature)
        k = np.where(self.k_fixed, self.k, k)
        cp = np.where(self.cp_fixed, self.cp, cp)
        h = np.where(self.cp_fixed, self.cp * temperature, h)
        return k, cp, h

    def temperature_for(self, enthalpy, mixture: "MixedProperties", guess):
        """Temperature of each node holding the given sensible enthalpy."""
        t = mixture.temperature_for_enthalpy(enthalpy, guess)
        return np.where(self.cp_fixed, enthalpy / np.where(self.cp_fixed, self.cp, 1.0), t)
