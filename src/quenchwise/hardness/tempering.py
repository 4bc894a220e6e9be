"""Tempering: the hardness a node keeps after a temper of given temperature and time.

Method
------
1. Time and temperature are combined by the Hollomon-Jaffe parameter P = T_K (C + log10 t_h)
   (Hollomon & Jaffe 1945): tempers with the same P give the same hardness. A temper of t hours at
   T is replaced by the 1-hour temper of equal P, at T1 = P / C - 273.15 (C).
2. The hardness of tempered martensite after 1 h at T1 follows Grange, Hribal & Porter (1977):
   a base line of Fe-C martensite (carbon of the austenite) plus additive alloy increments,
   interpolated linearly in T1 between the tabulated tempering temperatures (package data
   tempering_ghp1977.csv; values recalled from memory, see that file). It is never above the
   as-quenched martensite hardness (Maynier et al. 1978, phases.py): tempering does not harden
   these steels (secondary hardening of high-Mo/V steels is outside the table).
   Below 205 C the value is blended linearly from the as-quenched hardness at 100 C (no
   measurable tempering, common practice, no source) to the 205 C value.
3. The mixture: martensite takes the tempered-martensite value; bainite and ferrite-pearlite keep
   their as-quenched value unless the tempered martensite has become softer (then they take that
   value: they soften no further than martensite of the same temper; common practice, no
   source); retained austenite is counted at phases.RETAINED_AUSTENITE_HV below a 1-h equivalent
   of 250 C and as tempered martensite above it (it decomposes in the second stage of tempering,
   about 200-300 C; common practice, no source); undissolved carbide is left out, and the
   phases are mixed by the same rule as the as-quenched hardness (phases.combine_phases_hv).

4. Low-temperature tempering of high-carbon martensite (first stage: transition-carbide
   precipitation from the supersaturated martensite, about 100-250 C). The table above starts at
   205 C and is fitted up to about 0.6 %C, so for a 1 %C steel it gives no drop at 150-200 C,
   where bearing and tool steels are tempered and do lose a few HRC. On the as-quenched mixture the
   drop low_temper_drop_hrc(T1, C) x martensite fraction (HRC) is therefore applied as a ceiling.
   The drop is a piecewise-linear relation written to match the handbook tempering response of
   52100 (ASM Handbook Vol. 4 / Heat Treater's Guide, memory: as quenched 64-67 HRC; tempered
   150-230 C for 2-4 h, 58-64 HRC) and of 1095 (same sources, memory: about 2-4 HRC lost by 1 h at
   205 C): 0 at 100 C, 2.0 HRC at 150 C, 4.0 HRC at 205 C and above (1-h equivalent, full for
   1.0 %C austenite), scaled linearly with the austenite carbon from 0 at 0.25 %C (low-carbon
   martensite has little carbon to precipitate; common practice, no source).

Validity: low-alloy steels of about 0.1-0.6 %C (the paper's range, memory) tempered between about
205 and 650 C for 1-h equivalents; outside that the result is held at the nearest table row and
a warning is returned.

References: Hollomon, J.H. & Jaffe, L.D. (1945), "Time-temperature relations in tempering steel",
Trans. AIME 162, 223-249. Grange, R.A., Hribal, C.R. & Porter, L.F. (1977), "Hardness of tempered
martensite in carbon and low-alloy steels", Metall. Trans. A 8, 1775-1785.
"""

from __future__ import annotations

from ..csvmeta import commented_csv_dicts
from functools import lru_cache
from importlib import resources

import numpy as np

from .phases import RETAINED_AUSTENITE_HV, combine_phases_hv, phase_hardness_hv

#: Hollomon-Jaffe constant used when none is given (hours): "about 20" for low-alloy steels.
DEFAULT_HJ_CONSTANT = 20.0
#: 1-h equivalent temperature above which retained austenite counts as decomposed [C].
RETAINED_AUSTENITE_DECOMPOSES_C = 250.0
#: Temper below which no softening is counted [C].
NO_TEMPERING_BELOW_C = 100.0
_ELEMENTS = ("mn", "si", "ni", "cr", "mo", "v")
#: First-stage drop of high-carbon martensite (module docstring, step 4): (1-h equivalent C, HRC).
LOW_TEMPER_DROP = ((100.0, 0.0), (150.0, 2.0), (205.0, 4.0))
#: Austenite carbon [wt%] at which the drop is zero / full.
LOW_TEMPER_CARBON = (0.25, 1.0)


def low_temper_drop_hrc(one_hour_c, carbon):
    """HRC lost by fully martensitic high-carbon steel in the first tempering stage (step 4 of the
    module docstring): piecewise linear in the 1-h equivalent temperature one_hour_c [C] through
    (100, 0), (150, 2.0), (205, 4.0) and held beyond, times (C - 0.25) / 0.75 clipped to 0-1 for the
    austenite carbon C [wt%]. Written to match the handbook tempering response of 52100 and 1095
    (ASM Handbook Vol. 4 / Heat Treater's Guide, memory); valid about 0.25-1.1 %C, 100-250 C.

    Parameters
    ----------
    one_hour_c : float or array_like
        One-hour equivalent tempering temperature [C].
    carbon : float or array_like
        Carbon [wt%].

    Returns
    -------
    float or numpy.ndarray
        Drop in hardness from the as-quenched value [HRC].

    >>> [round(float(low_temper_drop_hrc(t, 1.0)), 2) for t in (90.0, 150.0, 166.5, 205.0, 300.0)]
    [0.0, 2.0, 2.6, 4.0, 4.0]
    >>> round(float(low_temper_drop_hrc(166.5, 0.40)), 2), float(low_temper_drop_hrc(166.5, 0.2))
    (0.52, 0.0)
    """
    temps, drops = zip(*LOW_TEMPER_DROP)
    share = np.clip((np.asarray(carbon, dtype=float) - LOW_TEMPER_CARBON[0])
                    / (LOW_TEMPER_CARBON[1] - LOW_TEMPER_CARBON[0]), 0.0, 1.0)
    return np.interp(np.asarray(one_hour_c, dtype=float), temps, drops) * share


def hollomon_jaffe_parameter(temperature_c, hours, constant=DEFAULT_HJ_CONSTANT):
    """Hollomon-Jaffe tempering parameter P = T_K (C + log10 t_h) [K].

    temperature_c [C], hours [h] (> 0), constant C [-] (about 20 for t in hours).
    Reference: Hollomon & Jaffe (1945), Trans. AIME 162, 223 (memory).

    Valid for tempering of martensite from about 150 to 700 C and 0.1-100 h (memory).

    Parameters
    ----------
    temperature_c : float or array_like
        Tempering temperature [C].
    hours : float or array_like
        Time at temperature [h].
    constant : float or array_like
        Hollomon-Jaffe constant C [-].

    Returns
    -------
    float or numpy.ndarray
        P = T [K] (C + log10 t [h]) [K].

    >>> round(float(hollomon_jaffe_parameter(540.0, 1.0)))
    16263
    >>> round(float(hollomon_jaffe_parameter(540.0, 10.0)))
    17076
    """
    t_k = np.asarray(temperature_c, dtype=float) + 273.15
    return t_k * (constant + np.log10(np.asarray(hours, dtype=float)))


def hollomon_jaffe_constant(carbon):
    """Constant C of the Hollomon-Jaffe parameter from the carbon content: C = 21.3 - 5.8 C(wt%).

    Hollomon & Jaffe found C to fall with carbon in plain carbon steels; 0.4 %C gives about 19.
    Reference: Hollomon & Jaffe (1945), Trans. AIME 162, 223 (memory).

    Valid for plain carbon and low-alloy steels of about 0.1-1.2 %C (memory).

    Parameters
    ----------
    carbon : float or array_like
        Carbon [wt%].

    Returns
    -------
    float or numpy.ndarray
        Hollomon-Jaffe constant C [-].

    >>> round(float(hollomon_jaffe_constant(0.40)), 2)
    18.98
    """
    return 21.3 - 5.8 * np.asarray(carbon, dtype=float)


def one_hour_equivalent_c(temperature_c, hours, constant=DEFAULT_HJ_CONSTANT):
    """The 1-hour temper with the same Hollomon-Jaffe parameter: T1 = P / C - 273.15 [C].

    Valid where hollomon_jaffe_parameter is (tempering of martensite, about 150-700 C, memory).

    Parameters
    ----------
    temperature_c : float or array_like
        Tempering temperature [C].
    hours : float or array_like
        Time at temperature [h].
    constant : float or array_like
        Hollomon-Jaffe constant C [-].

    Returns
    -------
    float or numpy.ndarray
        Temperature of a 1 h temper with the same parameter [C].

    >>> round(float(one_hour_equivalent_c(540.0, 1.0)), 6)
    540.0
    >>> round(float(one_hour_equivalent_c(500.0, 10.0)), 1)   # 10 h at 500 C ~ 1 h at 539 C
    538.7
    """
    return hollomon_jaffe_parameter(temperature_c, hours, constant) / constant - 273.15


@lru_cache(maxsize=1)
def _table() -> dict[str, np.ndarray]:
    text = (resources.files("quenchwise.hardness") / "tempering_ghp1977.csv").read_text("utf-8")
    rows = commented_csv_dicts(text)
    return {k: np.array([float(r[k]) for r in rows]) for k in rows[0]}


def ghp_tempered_martensite_hv(one_hour_c, c, mn=0.0, si=0.0, ni=0.0, cr=0.0, mo=0.0, v=0.0):
    """HV of martensite tempered 1 h at one_hour_c [C] (Grange, Hribal & Porter 1977 form):
    HV = HV_base(C, T) + sum_i dHV_i(T) x_i, table tempering_ghp1977.csv (memory), linear in T
    between rows and held at the end rows outside 205-650 C. Elements in wt%.

    Reference: Grange, Hribal & Porter (1977), Metall. Trans. A 8, 1775 (table values: memory).

    Parameters
    ----------
    one_hour_c : float or array_like
        One-hour equivalent tempering temperature [C].
    c, mn, si, ni, cr, mo, v : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Hardness of tempered martensite [HV].

    >>> round(float(ghp_tempered_martensite_hv(540.0, 0.40, mn=0.875, si=0.25, cr=0.95, mo=0.2)))
    336
    """
    t = _table()
    temps = t["temper_c"]
    x = np.asarray(one_hour_c, dtype=float)
    lo = np.interp(x, temps, t["base_c020_hv"])
    hi = np.interp(x, temps, t["base_c060_hv"])
    hv = lo + (hi - lo) * (np.asarray(c, dtype=float) - 0.20) / 0.40
    for name, amount in zip(_ELEMENTS, (mn, si, ni, cr, mo, v)):
        hv = hv + np.interp(x, temps, t[name]) * amount
    return hv


def tempered_martensite_hv(one_hour_c, as_quenched_hv, chem: dict):
    """Tempered martensite per node: the GHP value, never above the as-quenched hardness,
    blended from the as-quenched value at 100 C to the 205 C value below 205 C [HV].

    >>> chem = dict(c=0.4, mn=0.875, si=0.25, cr=0.95, mo=0.2)
    >>> [round(float(tempered_martensite_hv(t, 650.0, chem))) for t in (90.0, 540.0)]
    [650, 336]
    """
    e = {k: chem.get(k, 0.0) for k in ("c", *_ELEMENTS)}
    t1 = np.asarray(one_hour_c, dtype=float)
    hv_q = np.asarray(as_quenched_hv, dtype=float)
    first = float(_table()["temper_c"][0])
    ghp = np.minimum(ghp_tempered_martensite_hv(np.maximum(t1, first), **e), hv_q)
    w = np.clip((t1 - NO_TEMPERING_BELOW_C) / (first - NO_TEMPERING_BELOW_C), 0.0, 1.0)
    return np.where(t1 < first, hv_q + w * (ghp - hv_q), ghp)


def tempered_hardness_hv(fractions: dict, rate_700_c_s, chem: dict, temperature_c: float, hours: float,
                         undissolved_cementite=0.0, constant: float | None = None):
    """Tempered Vickers hardness of each node (module docstring, step 3) and the warnings that apply.

    fractions: as-quenched phase fractions per node; rate_700_c_s: cooling rate at 700 C [K/s];
    chem: austenite chemistry [wt%]; temperature_c [C], hours [h]: the temper; constant: the
    Hollomon-Jaffe C (None: DEFAULT_HJ_CONSTANT).

    >>> f = {"martensite": np.array([1.0, 0.0]), "bainite": np.array([0.0, 1.0]), "austenite": np.zeros(2)}
    >>> chem = dict(c=0.405, mn=0.875, si=0.25, cr=0.95, mo=0.2)
    >>> hv, notes = tempered_hardness_hv(f, np.array([100.0, 5.0]), chem, 650.0, 1.0)
    >>> [round(float(x)) for x in hv], notes
    ([268, 268], [])
    """
    constant = DEFAULT_HJ_CONSTANT if constant is None else float(constant)
    t1 = float(one_hour_equivalent_c(temperature_c, hours, constant))
    notes = []
    temps = _table()["temper_c"]
    if t1 > temps[-1]:
        notes.append(f"temper equivalent to {t1:.0f} C for 1 h is above the tempering table ({temps[-1]:.0f} C): "
                     "hardness held at the table's last row")
    phases = phase_hardness_hv(rate_700_c_s, chem)
    hv_tm = tempered_martensite_hv(t1, phases["martensite"], chem)
    ra_hv = hv_tm if t1 >= RETAINED_AUSTENITE_DECOMPOSES_C else np.full_like(hv_tm, RETAINED_AUSTENITE_HV)
    # Mixed by the same rule as the as-quenched hardness, so a temper never reads harder than it.
    hv = combine_phases_hv(fractions, hv_tm, np.minimum(phases["bainite"], hv_tm),
                           np.minimum(phases["ferrite_pearlite"], hv_tm), ra_hv, undissolved_cementite)
    # Step 4: the first-stage drop of high-carbon martensite, on the as-quenched mixture, in HRC.
    zero = np.zeros_like(phases["martensite"])
    martensite = np.asarray(fractions.get("martensite", zero), dtype=float)
    # share of martensite in the matrix (undissolved carbide left out, as in the mixture)
    total = sum(np.asarray(fractions.get(k, zero), dtype=float) for k in fractions) - undissolved_cementite
    drop = low_temper_drop_hrc(t1, chem.get("c", 0.0)) * martensite / np.where(total > 0, total, 1.0)
    if np.any(drop > 0):
        from .conversion import hrc_from_hv, hv_from_hrc

        as_quenched = combine_phases_hv(fractions, phases["martensite"], phases["bainite"],
                                        phases["ferrite_pearlite"], RETAINED_AUSTENITE_HV, undissolved_cementite)
        hrc0 = hrc_from_hv(as_quenched)
        ceiling = hv_from_hrc(np.clip(hrc0 - drop, 20.0, 68.0))
        hv = np.where(np.isfinite(hrc0) & np.isfinite(ceiling), np.minimum(hv, ceiling), hv)
    return hv, notes
