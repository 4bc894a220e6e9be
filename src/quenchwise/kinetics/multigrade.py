"""Li et al. (1998) kinetics with composition-dependent correction factors fitted on many grades
("li1998-multigrade").

What: each product's time constant of the published laws (li1998.py) is multiplied by a factor
that depends on the austenite chemistry,

    K_p = m_p(chem) K_p,Li,    ln m_p = sum_k theta_p,k x_k,
    x = (1, C - 0.4, Mn - 0.8, Cr - 0.5, Ni - 0.5, Mo - 0.2)          (wt%, austenite chemistry)

for p = ferrite, pearlite (also used for proeutectoid cementite, which borrows the pearlite law),
bainite; the bainite factor also carries a temperature term,

    K_b = m_b(chem) exp(w s (T' - 450) / 100) K_b,Li,    T' = T clipped to 300-600 C,

with one fitted slope s [1 per 100 K] (``[temperature] bainite`` in the coefficient file; 0 where the
file has none). It lets the handbook bars, whose centres pass 500-300 C much faster than an
end-quench position of the same cooling rate at 700 C, weigh the bainite that forms high against the
bainite that forms low; an empirical term of this calibration, not a published law. The correction
is never extrapolated: each x_k (k >= 1) is clipped to the range of the grades the coefficients
were fitted on (``fit_range`` in the coefficient file), and outside that range the whole correction,
temperature term included, fades linearly to none (ln m_p x w, w falling from 1 on the range's edge
to 0 at TAPER_WT beyond it, the farthest element deciding): a chemistry far from the fitted grades (a
eutectoid or bearing steel, a 3.5 %Ni steel) gets the published laws. Nothing else changes (Bs, Ms,
S(X), grain size and undercooling dependence, the boron delay of li1998.py).

Fit (benchmarks/calibrate_kinetics.py, which writes multigrade_coefficients.toml beside this module;
method, data and scores also in the file's header): the SAE J1268 H-bands (memory) of 16 grades,
376 band points (1045H, 1541H, 1340H, 4130H, 4140H, 4150H, 4340H, 5140H, 5160H, 6150H, 8620H, 8640H,
4320H, 4620H, 15B35H, 86B45H: middle of each chemistry range, A255 test temperature, grain size 7),
and the 84 readings of the handbook as-quenched round bars (benchmarks/data/mass_effect_bars.csv:
1045, 4130, 4140, 4340, 5140, 6150, 8620, 1/2-4 in, water and oil; memory, +/-5 HRC); least squares
on the HRC outside each band plus 0.3 x the distance from the band middle, plus 0.5 x (simulated -
handbook) per bar reading, ridge 0.3 on the coefficients. Range: austenite C 0.20-0.60, Mn 0.50-1.75,
Cr 0-0.98, Ni 0-1.78, Mo 0-0.25 wt% (Si about 0.25, V up to 0.2, B 0-0.003 in the data); bainite
temperature term 300-600 C. Surrogate scores, leave-one-grade-out (a grade's band and its bars held
out together): band points within +/-2 HRC 99.5 % (published coefficients 94.1 %, the earlier
end-quench-only fit 97.6 % held out; 99.2 % since the vanadium-carbide refit), bar readings within
3 HRC 68 % (61 % before the vanadium-carbide refit; published 38 %, end-quench-only fit 50 % held out); scores with full simulations in the README's Accuracy section
(benchmarks/accuracy.py). The coefficients are large where the bars pull (ferrite's carbon term
-9.6, bainite's slope +1.69 per 100 K: bainite slower near Bs, faster low); they are a fit to these
23 steels, not a metallurgical law. The published coefficients stay selectable and unchanged as "li1998".
This module holds only the data and pure functions; it imports nothing above kinetics/.
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import numpy as np

from .li1998 import Li1998

PRODUCTS = ("ferrite", "pearlite", "bainite")
#: Terms of the correction: name, element, centre [wt%] (None: the constant term).
TERMS = (("1", None, 0.0), ("c", "c", 0.4), ("mn", "mn", 0.8), ("cr", "cr", 0.5), ("ni", "ni", 0.5),
         ("mo", "mo", 0.2))
COEFFICIENT_FILE = "multigrade_coefficients.toml"
#: Distance beyond the fitted range over which the correction fades to none [wt%].
TAPER_WT = {"c": 0.2, "mn": 0.5, "cr": 0.5, "ni": 1.0, "mo": 0.2}
#: Reference temperature and clip range of the bainite temperature term [C].
T_REF = 450.0
BAINITE_T_RANGE = (300.0, 600.0)


@lru_cache(maxsize=1)
def load_coefficients() -> dict:
    """The fitted coefficients: {"theta": {product: [6 floats]}, "fit_range": {element: [lo, hi]}, ...}."""
    text = (resources.files("quenchwise.kinetics") / COEFFICIENT_FILE).read_text("utf-8")
    return tomllib.loads(text)


def correction_terms(chem: dict, fit_range: dict) -> np.ndarray:
    """The regressors x_k of the correction, (len(TERMS), n) for element arrays in wt%, each
    clipped to fit_range (module docstring).

    >>> x = correction_terms({"c": [0.4, 0.9], "mn": [0.8, 0.8], "cr": [0.0, 0.0], "ni": [0.0, 0.0],
    ...                       "mo": [0.0, 0.0]}, {"c": [0.2, 0.6]})
    >>> x[:2].round(2).tolist()
    [[1.0, 1.0], [0.0, 0.2]]
    """
    n = np.broadcast(*[np.asarray(chem[e], dtype=float) for _, e, _ in TERMS if e]).shape
    rows = []
    for _, element, centre in TERMS:
        if element is None:
            rows.append(np.ones(n))
            continue
        v = np.asarray(chem[element], dtype=float) + np.zeros(n)
        lo, hi = fit_range.get(element, (-np.inf, np.inf))
        rows.append(np.clip(v, lo, hi) - centre)
    return np.array(rows)


def range_weight(chem: dict, fit_range: dict):
    """Weight w of the correction [0-1]: 1 inside fit_range, falling linearly to 0 at TAPER_WT
    beyond it (the element farthest out decides).

    >>> [round(float(range_weight({"c": c}, {"c": [0.2, 0.6]})), 3) for c in (0.5, 0.7, 0.9)]
    [1.0, 0.5, 0.0]
    """
    w = 1.0
    for element, (lo, hi) in fit_range.items():
        if element not in chem or element not in TAPER_WT:
            continue
        v = np.asarray(chem[element], dtype=float)
        out = np.maximum(np.maximum(lo - v, v - hi), 0.0)
        w = np.minimum(w, np.clip(1.0 - out / TAPER_WT[element], 0.0, 1.0))
    return w


def correction_multipliers(chem: dict, theta: dict, fit_range: dict) -> dict:
    """m_p = exp(w theta_p . x) per product (module docstring); theta: {product: 6 coefficients}.

    >>> chem = {"c": 0.4, "mn": 0.8, "cr": 0.5, "ni": 0.5, "mo": 0.2}
    >>> m = correction_multipliers(chem, {"ferrite": [0.5, 1, 0, 0, 0, 0], "pearlite": [0] * 6,
    ...                                   "bainite": [0] * 6}, {})
    >>> round(float(m["ferrite"]), 4), float(m["pearlite"])
    (1.6487, 1.0)
    """
    x = correction_terms(chem, fit_range)
    w = range_weight(chem, fit_range)
    return {p: np.exp(w * np.tensordot(np.asarray(theta[p], dtype=float), x, axes=1)) for p in PRODUCTS}


def bainite_temperature_multiplier(temperature_c, slope):
    """Temperature term of the bainite correction: exp(slope (T' - T_REF) / 100), T' = T clipped to
    BAINITE_T_RANGE [C]; slope [1 per 100 K] as fitted (coefficient file, [temperature] bainite).

    slope < 0 makes bainite faster in its upper range (near Bs) and slower in its lower range, at
    a fixed K at T_REF = 450 C; outside 300-600 C the term holds its end value. An empirical term
    of this calibration, not a published law (module docstring).

    >>> [round(float(m), 3) for m in bainite_temperature_multiplier([250.0, 450.0, 550.0], -0.5)]
    [2.117, 1.0, 0.607]
    """
    t = np.clip(np.asarray(temperature_c, dtype=float), *BAINITE_T_RANGE)
    return np.exp(np.asarray(slope, dtype=float) * (t - T_REF) / 100.0)


@dataclass(frozen=True)
class Li1998Multigrade(Li1998):
    """Li et al. (1998) with the fitted multi-grade correction of this module on every K.

    theta: {product: 6 coefficients} (None: the fitted file's); fit_range likewise. The fitting
    script passes trial coefficients here; nothing touches the MODELS registry.
    """

    name: str = "li1998-multigrade"
    theta: tuple | None = None          # ((product, (6 floats)), ...) to stay hashable
    fit_range: tuple | None = None      # ((element, (lo, hi)), ...)
    bainite_slope: float | None = None  # temperature term of bainite [1 per 100 K] (None: the file's)

    def _theta(self) -> tuple[dict, dict, float]:
        if self.theta is None or self.fit_range is None or self.bainite_slope is None:
            data = load_coefficients()
        theta = dict(self.theta) if self.theta is not None else data["theta"]
        rng = dict(self.fit_range) if self.fit_range is not None else data["fit_range"]
        slope = (self.bainite_slope if self.bainite_slope is not None
                 else float(data.get("temperature", {}).get("bainite", 0.0)))
        return theta, rng, slope

    def factors(self, chem: dict) -> dict:
        theta, rng, slope = self._theta()
        m = correction_multipliers(chem, theta, rng)
        out = {k: v * m[k] for k, v in super().factors(chem).items()}
        # The temperature term fades with the composition correction outside the fitted range.
        out["bainite_slope"] = slope * range_weight(chem, rng) + 0.0 * out["bainite"]
        return out

    def time_constants(self, factors: dict, grain_size, temperature_c, undercooling: dict) -> dict:
        k = super().time_constants(factors, grain_size, temperature_c, undercooling)
        k["bainite"] = k["bainite"] * bainite_temperature_multiplier(temperature_c, factors["bainite_slope"])
        return k
