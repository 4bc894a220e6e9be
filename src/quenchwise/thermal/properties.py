"""Thermal properties of steel by phase, mixed by volume fraction.

Tables are typical values for low-alloy steels (memory; shapes as in handbook property data for
carbon and low-alloy steels): austenite conducts about half as well as the ferritic products.
Density is constant (7 800 kg/m3): the 1-4 % volume change of the transformations is neglected
so mass and volume fractions coincide and the mesh does not move.
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
