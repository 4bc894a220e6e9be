"""Equivalent end-quench (Jominy) distance: the distance along the standard end-quench specimen
that cools at the same rate at 700 C as a point of the part.

Matching a point of a part to the end-quench position of equal cooling rate at 700 C (1300 F) is a
convention of the trade (Grossmann's premise behind bar-to-Jominy correlation charts; ASTM A255,
memory): the steel's end-quench hardness at that distance is then an estimate of the point's
hardness. The curve is the published end-quench cooling-rate scale (endquench_cooling_rates.csv,
ASTM A255, memory), not the simulated specimen, so the equivalent distance does not move when
the specimen model is changed.
"""

from __future__ import annotations

from ..csvmeta import commented_csv_dicts
from functools import lru_cache
from importlib import resources

import numpy as np

#: 1/16 inch [mm].
SIXTEENTH_MM = 25.4 / 16.0
#: The convention's temperature [C] (1300 F; the rate the solver records, cooling_rate_700_c_s).
RATE_TEMPERATURE_C = 700.0


@lru_cache(maxsize=1)
def endquench_rate_curve() -> tuple[np.ndarray, np.ndarray]:
    """(distance [mm], cooling rate at 700 C [K/s]) of the published end-quench curve, by distance.

    >>> d, v = endquench_rate_curve()
    >>> round(float(d[0]), 3), float(v[0]), round(float(d[-1]), 1), float(v[-1])
    (1.587, 272.2, 50.8, 1.94)
    """
    text = (resources.files("quenchwise.hardness") / "endquench_cooling_rates.csv").read_text("utf-8")
    rows = commented_csv_dicts(text)
    d = np.array([float(r["distance_sixteenths"]) for r in rows]) * SIXTEENTH_MM
    v = np.array([float(r["rate_c_s"]) for r in rows])
    return d, v


def equivalent_jominy_distance_mm(rate_700_c_s):
    """End-quench distance [mm] with the same cooling rate at 700 C as the given rate [K/s].

    Log-log interpolation in the published curve (endquench_rate_curve): rates between J1 and J32
    (272 and 1.94 K/s) map to 1.6-50.8 mm; faster or slower rates, and non-finite ones, give NaN
    (beyond the curve's range: no extrapolation).
    Reference: ASTM A255, end-quench cooling-rate scale (memory); the equal-rate-at-700 C
    convention (Grossmann; memory).

    Parameters
    ----------
    rate_700_c_s : float or array_like
        Cooling rate at 700 C [K/s].

    Returns
    -------
    float or numpy.ndarray
        Equivalent end-quench distance [mm], NaN beyond the curve.

    >>> [round(float(x), 2) for x in equivalent_jominy_distance_mm(np.array([169.4, 18.3, 10.0, 1000.0, 1.0]))]
    [3.17, 12.7, 17.83, nan, nan]
    """
    d, v = endquench_rate_curve()
    rate = np.asarray(rate_700_c_s, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = np.log(rate)
    # np.interp needs increasing abscissae: the rate falls with distance, so run the curve backwards.
    out = np.exp(np.interp(x, np.log(v[::-1]), np.log(d[::-1])))
    inside = np.isfinite(x) & (rate >= v[-1]) & (rate <= v[0])
    return np.where(inside, out, np.nan)


def equivalent_jominy_sixteenths(rate_700_c_s):
    """The same as equivalent_jominy_distance_mm, in sixteenths of an inch (J number).

    Same range as equivalent_jominy_distance_mm (the published end-quench curve,
    hardness/endquench_cooling_rates.csv).

    Parameters
    ----------
    rate_700_c_s : float or array_like
        Cooling rate at 700 C [K/s].

    Returns
    -------
    float or numpy.ndarray
        Equivalent end-quench distance [1/16 in], NaN beyond the curve.

    >>> round(float(equivalent_jominy_sixteenths(18.3)), 2)
    8.0
    """
    return equivalent_jominy_distance_mm(rate_700_c_s) / SIXTEENTH_MM
