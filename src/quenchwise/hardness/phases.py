"""Hardness of each phase group from chemistry and cooling rate, and the mixture.

What is used by default (HARDNESS_METHOD), and why:

* martensite and bainite: Maynier, Jungmann & Dollet (1978) as published (martensite with its
  carbon capped at the plateau, below);
* ferrite-pearlite: Maynier's relation plus a pearlite cooling-rate correction
  (ferrite_pearlite_hv). Maynier's ferrite-pearlite relation has almost no cooling-rate term for
  a plain carbon steel (about 5 HV per decade), so pearlite formed at oil-quench rates came out
  as soft as normalized pearlite: 1080 bars quenched in oil read 27-28 HRC against about 40 HRC,
  the hardness of fine pearlite. The correction adds, in proportion to the lever-rule pearlite
  fraction, the difference between the hardness of eutectoid pearlite at the local cooling rate
  (pearlite_eutectoid_hv) and Maynier's value for a eutectoid steel at that rate;
* the mixture of the transformation products (martensite, bainite, ferrite-pearlite): the
  volume-weighted mean of the logarithms of their hardnesses (a geometric, "logarithmic" mean,
  mixture_hv), not the arithmetic mean; retained austenite is added by volume as before
  (combine_phases_hv). A hard phase among softer ones raises an indentation hardness less than
  in proportion to its volume, because the softer phase takes most of the plastic flow under the
  indenter; the arithmetic (iso-strain) and the harmonic (iso-stress) means bound the mixture,
  and the logarithmic rule (Lichtenecker 1926) lies between them. With the corrected fine
  pearlite the arithmetic mean puts 50 % martensite of a 0.4-0.6 %C steel 3.9-5.4 HRC above
  Hodge & Orehoski (1946, ASTM A255 table); the logarithmic mean is within 2.3 HRC at 0.3-0.6 %C
  and 3.2 HRC low at 0.2 %C (tests/validation/test_hardness_checks.py). With a bainite partner
  (alloy steels) it stays well above Hodge & Orehoski: Maynier's bainite value dominates.

The published functions stay available unchanged (maynier_*_hv; phase_hardness_hv(...,
relations="maynier1978"); hardness_hv(..., rule="linear"), the arithmetic mean Maynier et al. used).

Maynier, Jungmann & Dollet (1978), "Creusot-Loire system for the prediction of the mechanical
properties of low alloy steel products", in Hardenability Concepts with Applications to Steel,
TMS-AIME, 518-545 (coefficients: memory). Vr is the cooling rate at 700 C in C/h; the chemistry
is that of the austenite (its carbon, not the bulk carbon, after austenitizing).

How the mixture counts what Maynier's groups do not cover (hardness_hv):

* retained austenite: a phase of its own at RETAINED_AUSTENITE_HV (soft; memory);
* undissolved carbide (hypereutectoid steels austenitized below Acm): left out and the rest
  renormalized, because a hardness indent measures the matrix in which fine carbides sit and
  Maynier's martensite formula already rests on the carbon in solution, not the bulk carbon;
* proeutectoid cementite formed on cooling: counted with ferrite-pearlite;
* undissolved ferrite (intercritical austenitizing): counted with ferrite-pearlite.
"""

from __future__ import annotations

import numpy as np

from ..steel.critical import EUTECTOID_C_WT, FERRITE_C_WT

#: Carbon above which the hardness of martensite no longer rises [wt%]. Maynier's martensite
#: formula is linear in carbon and was fitted up to about 0.5 %C; as-quenched martensite hardness
#: levels off near 65 HRC from about 0.6 %C (Krauss, G. (1999), "Martensite in steel: strength and
#: structure", Mater. Sci. Eng. A 273-275, 40-57; memory). The formula is therefore evaluated with
#: the carbon capped here, which keeps eutectoid and bearing steels on the HRC scale.
MARTENSITE_CARBON_PLATEAU_WT = 0.6
#: Range of cooling rates the fits were made on, C/h (memory); rates are clipped to it.
RATE_RANGE_C_H = (1.0, 1.0e7)
#: Hardness counted for retained austenite [HV] (memory: quenched-steel retained austenite is
#: soft, about 200-300 HV).
RETAINED_AUSTENITE_HV = 250.0


def _log_rate(rate_c_h):
    return np.log10(np.clip(rate_c_h, *RATE_RANGE_C_H))


def maynier_martensite_hv(rate_c_h, c, si=0.0, mn=0.0, ni=0.0, cr=0.0):
    """HV of martensite: 127 + 949C + 27Si + 11Mn + 8Ni + 16Cr + 21 log10(Vr).

    Vr [C/h] cooling rate at 700 C; elements wt%. Valid for low-alloy steels, C up to about 0.5 %.
    Reference: Maynier, Jungmann & Dollet (1978), TMS-AIME, 518 (memory).

    Parameters
    ----------
    rate_c_h : float or array_like
        Cooling rate at 700 C, Vr [C/h].
    c, si, mn, ni, cr : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Hardness of martensite [HV].

    >>> round(float(maynier_martensite_hv(3.6e5, 0.40, si=0.25, mn=0.85, cr=0.95)))
    655
    """
    return 127.0 + 949.0 * c + 27.0 * si + 11.0 * mn + 8.0 * ni + 16.0 * cr + 21.0 * _log_rate(rate_c_h)


def maynier_bainite_hv(rate_c_h, c, si=0.0, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """HV of bainite: -323 + 185C + 330Si + 153Mn + 65Ni + 144Cr + 191Mo
    + log10(Vr)(89 + 53C - 55Si - 22Mn - 10Ni - 20Cr - 33Mo).

    Reference: Maynier, Jungmann & Dollet (1978), TMS-AIME, 518 (memory).

    Valid for low-alloy steels of about 0.1-0.5 %C, Mn < 2, Si < 1, Ni < 4, Cr < 3, Mo < 1, V < 0.2
    [wt%] (Maynier et al.'s data, memory); Vr is clipped to RATE_RANGE_C_H.

    Parameters
    ----------
    rate_c_h : float or array_like
        Cooling rate at 700 C, Vr [C/h].
    c, si, mn, ni, cr, mo : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Hardness of bainite [HV].

    >>> round(float(maynier_bainite_hv(3.6e4, 0.40, si=0.25, mn=0.85, cr=0.95, mo=0.2)))
    376
    """
    return (-323.0 + 185.0 * c + 330.0 * si + 153.0 * mn + 65.0 * ni + 144.0 * cr + 191.0 * mo
            + _log_rate(rate_c_h) * (89.0 + 53.0 * c - 55.0 * si - 22.0 * mn - 10.0 * ni - 20.0 * cr - 33.0 * mo))


def maynier_ferrite_pearlite_hv(rate_c_h, c, si=0.0, mn=0.0, ni=0.0, cr=0.0, mo=0.0, v=0.0):
    """HV of ferrite-pearlite: 42 + 223C + 53Si + 30Mn + 12.6Ni + 7Cr + 19Mo
    + log10(Vr)(10 - 19Si + 4Ni + 8Cr + 130V).

    Reference: Maynier, Jungmann & Dollet (1978), TMS-AIME, 518 (memory).

    Valid for low-alloy steels of about 0.1-0.5 %C, Mn < 2, Si < 1, Ni < 4, Cr < 3, Mo < 1, V < 0.2
    [wt%] (Maynier et al.'s data, memory); Vr is clipped to RATE_RANGE_C_H.

    Parameters
    ----------
    rate_c_h : float or array_like
        Cooling rate at 700 C, Vr [C/h].
    c, si, mn, ni, cr, mo, v : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Hardness of ferrite-pearlite [HV].

    >>> round(float(maynier_ferrite_pearlite_hv(3.6e3, 0.40, si=0.25, mn=0.85, cr=0.95, mo=0.2)))
    226
    """
    return (42.0 + 223.0 * c + 53.0 * si + 30.0 * mn + 12.6 * ni + 7.0 * cr + 19.0 * mo
            + _log_rate(rate_c_h) * (10.0 - 19.0 * si + 4.0 * ni + 8.0 * cr + 130.0 * v))


#: Pearlite correction (pearlite_eutectoid_hv): hardness of the coarsest and the finest pearlite
#: of a eutectoid steel [HV]. Coarse (furnace-cooled) pearlite about 190 HV (annealed 1080/1095
#: read 174-192 HB, ASM Handbook Vol. 1 (1990), memory); the finest pearlite, formed near the nose
#: at about 550 C, about 43 HRC = 430 HV (isothermal transformation atlases, eutectoid steel,
#: hardness of the products against transformation temperature; memory).
PEARLITE_COARSE_HV = 190.0
PEARLITE_FINEST_HV = 430.0
#: The two anchors that fix the curve between those ends: (cooling rate at 700 C [K/s], HV).
#: Normalized 1080 and 1095, 25 mm rounds cooled in still air: 293 HB = 309 HV (ASM Handbook
#: Vol. 1 (1990), properties of normalized carbon steels; memory), at 1.67 K/s (quenchwise's own
#: still-air solution of a 25 mm bar); 1080 bars quenched in oil: about 40 HRC = 392 HV (issue 12;
#: handbook mass-effect data, memory) at about 15 K/s (oil-quenched 25-50 mm bars at 700 C).
PEARLITE_ANCHORS = ((1.67, 309.0), (15.0, 392.0))
#: The eutectoid steel on which the correction is referred to Maynier's relation [wt%].
_EUTECTOID_REFERENCE = dict(c=0.80, si=0.25, mn=0.75)


def _logistic_constants():
    (r1, h1), (r2, h2) = PEARLITE_ANCHORS
    span = PEARLITE_FINEST_HV - PEARLITE_COARSE_HV
    logit = [np.log((h - PEARLITE_COARSE_HV) / (PEARLITE_FINEST_HV - h)) for h in (h1, h2)]
    width = (np.log10(r2) - np.log10(r1)) / (logit[1] - logit[0])
    return span, np.log10(r1) - width * logit[0], width


def pearlite_eutectoid_hv(rate_700_c_s):
    """HV of the pearlite of a eutectoid plain carbon steel against the cooling rate at 700 C.

    HV = 190 + 240 / (1 + exp(-(log10(v) - x0) / w)),  v [K/s] cooling rate at 700 C,
    x0 = 0.232, w = 0.565 (fixed by PEARLITE_ANCHORS; see the constants for their sources).

    A logistic in log10(v) between coarse (190 HV) and the finest pearlite (430 HV): faster cooling
    transforms at larger undercooling into finer, harder pearlite, up to the nose, below which
    bainite forms instead. Valid for about 0.01-300 K/s (furnace cooling to end-quench rates).
    A quenchwise correction fitted on the recalled anchors above; not a published relation.

    Parameters
    ----------
    rate_700_c_s : float or array_like
        Cooling rate at 700 C [K/s].

    Returns
    -------
    float or numpy.ndarray
        Hardness of eutectoid pearlite [HV].

    >>> [round(float(x)) for x in pearlite_eutectoid_hv(np.array([0.01, 1.67, 15.0, 100.0]))]
    [195, 309, 392, 420]
    """
    span, x0, width = _logistic_constants()
    x = np.log10(np.clip(np.asarray(rate_700_c_s, dtype=float), 1e-4, 1e4))
    return PEARLITE_COARSE_HV + span / (1.0 + np.exp(-(x - x0) / width))


def pearlite_fraction_lever(c):
    """Pearlite fraction of a slowly cooled plain carbon steel by the lever rule [-].

    f_P = (C - 0.02) / (0.77 - 0.02), clipped to 0-1; C [wt%] (hypereutectoid steels: 1).
    Reference: Fe-C phase diagram (eutectoid 0.77 %C, ferrite 0.02 %C; memory).

    Valid for hypoeutectoid steels (0.02-0.77 %C); clipped to 0-1 outside.

    Parameters
    ----------
    c : float or array_like
        Carbon [wt%].

    Returns
    -------
    float or numpy.ndarray
        Pearlite share of a ferrite-pearlite structure [-].

    >>> round(float(pearlite_fraction_lever(0.40)), 3)
    0.507
    """
    return np.clip((np.asarray(c, dtype=float) - FERRITE_C_WT) / (EUTECTOID_C_WT - FERRITE_C_WT), 0.0, 1.0)


def ferrite_pearlite_hv(rate_c_h, c, si=0.0, mn=0.0, ni=0.0, cr=0.0, mo=0.0, v=0.0):
    """HV of ferrite-pearlite: Maynier's relation with the pearlite cooling-rate correction.

    HV = HV_FP,Maynier(Vr, chem) + f_P(C) [HV_P,eut(Vr) - HV_FP,Maynier(Vr, 0.80C-0.75Mn-0.25Si)]

    Vr [C/h] cooling rate at 700 C; elements wt%; f_P: pearlite_fraction_lever; HV_P,eut:
    pearlite_eutectoid_hv. A quenchwise correction (module docstring), checked against normalized
    and annealed hardness of carbon and low-alloy steels and oil-quenched 1080 bars
    (tests/validation/test_hardness_checks.py). Same validity as Maynier's relation.

    Parameters
    ----------
    rate_c_h : float or array_like
        Cooling rate at 700 C, Vr [C/h].
    c, si, mn, ni, cr, mo, v : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Hardness of ferrite-pearlite [HV].

    >>> round(float(ferrite_pearlite_hv(15.0 * 3600, 0.80, si=0.25, mn=0.75)))   # eutectoid: the pearlite curve
    392
    >>> round(float(ferrite_pearlite_hv(1.67 * 3600, 0.205, si=0.25, mn=0.45)))  # 1020 normalized
    142
    """
    rate_k_s = np.asarray(rate_c_h, dtype=float) / 3600.0
    ref = maynier_ferrite_pearlite_hv(rate_c_h, **_EUTECTOID_REFERENCE)
    correction = pearlite_fraction_lever(c) * (pearlite_eutectoid_hv(rate_k_s) - ref)
    return maynier_ferrite_pearlite_hv(rate_c_h, c, si, mn, ni, cr, mo, v) + correction


#: The per-phase relations and the mixture rule used by default, named in every summary.
HARDNESS_METHOD = ("Maynier, Jungmann & Dollet (1978) martensite, bainite, ferrite-pearlite + pearlite rate "
                   "correction; logarithmic mixture")
RELATIONS = ("corrected", "maynier1978")
MIXTURE_RULES = ("logarithmic", "linear")


def phase_hardness_hv(rate_700_c_s, chem: dict, relations: str = "corrected") -> dict:
    """HV of each phase group at each node: keys martensite, bainite, ferrite_pearlite.

    rate_700_c_s [K/s] cooling rate at 700 C; chem: austenite chemistry, element -> wt%;
    relations: "corrected" (default: ferrite_pearlite_hv) or "maynier1978" (the published
    ferrite-pearlite relation). Martensite and bainite are Maynier's in both.

    >>> h = phase_hardness_hv(np.array([100.0]), dict(c=0.4, si=0.25, mn=0.85, cr=0.95, mo=0.2))
    >>> {k: round(float(v[0])) for k, v in h.items()}
    {'martensite': 655, 'bainite': 428, 'ferrite_pearlite': 320}
    >>> round(float(phase_hardness_hv(np.array([100.0]), dict(c=0.4, si=0.25, mn=0.85, cr=0.95, mo=0.2),
    ...                               relations="maynier1978")["ferrite_pearlite"][0]))
    252
    >>> h = phase_hardness_hv(np.array([100.0]), dict(c=1.0, si=0.25, mn=0.35, cr=1.45))   # 52100: plateau
    >>> round(float(h["martensite"][0]))
    847
    """
    if relations not in RELATIONS:
        raise ValueError(f"relations = {relations!r}; allowed: {', '.join(RELATIONS)}")
    rate_c_h = np.asarray(rate_700_c_s, dtype=float) * 3600.0
    e = {k: chem.get(k, 0.0) for k in ("c", "si", "mn", "ni", "cr", "mo", "v")}
    fp = ferrite_pearlite_hv if relations == "corrected" else maynier_ferrite_pearlite_hv
    return {
        "martensite": maynier_martensite_hv(rate_c_h, np.minimum(e["c"], MARTENSITE_CARBON_PLATEAU_WT),
                                            e["si"], e["mn"], e["ni"], e["cr"]),
        "bainite": maynier_bainite_hv(rate_c_h, e["c"], e["si"], e["mn"], e["ni"], e["cr"], e["mo"]),
        "ferrite_pearlite": fp(rate_c_h, **e),
    }


def mixture_hv(weights, values, rule: str = "logarithmic"):
    """Hardness of a mixture of phases from their volume fractions and hardnesses [HV].

    logarithmic: HV = exp(sum f_i ln HV_i / sum f_i)  (Lichtenecker's logarithmic mixture rule,
    Lichtenecker, K. (1926), Physikalische Zeitschrift 27, 115; memory);
    linear:      HV = sum f_i HV_i / sum f_i          (the rule Maynier et al. (1978) used).
    weights, values: sequences of equal length of arrays (or floats) [-], [HV]; nodes with no
    weight at all give NaN. The logarithmic mean lies between the harmonic (iso-stress) and the
    arithmetic (iso-strain) bounds; it is what the default chain uses (module docstring).

    >>> round(float(mixture_hv([0.5, 0.5], [800.0, 200.0])))
    400
    >>> round(float(mixture_hv([0.5, 0.5], [800.0, 200.0], rule="linear")))
    500
    >>> round(float(mixture_hv([1.0, 0.0], [200.0, -50.0])))   # an absent phase never matters
    200
    """
    if rule not in MIXTURE_RULES:
        raise ValueError(f"rule = {rule!r}; allowed: {', '.join(MIXTURE_RULES)}")
    w = [np.asarray(x, dtype=float) for x in weights]
    h = [np.asarray(x, dtype=float) for x in values]
    total = sum(w)
    safe = np.where(total > 0, total, np.nan)
    if rule == "linear":
        return sum(wi * hi for wi, hi in zip(w, h)) / safe
    # A phase that is absent contributes nothing even where its relation has no meaning (Maynier's
    # bainite goes negative at furnace rates, where no bainite forms); present phases are floored
    # at 1 HV so the logarithm is defined.
    terms = [np.where(wi > 0, wi * np.log(np.maximum(hi, 1.0)), 0.0) for wi, hi in zip(w, h)]
    return np.exp(sum(terms) / safe)


def combine_phases_hv(fractions: dict, martensite_hv, bainite_hv, ferrite_pearlite_hv, austenite_hv,
                      undissolved_cementite=0.0, rule: str = "logarithmic"):
    """Hardness of each node from its phase fractions and the hardness of each phase group [HV].

    The transformation products (martensite, bainite, ferrite-pearlite) are mixed by mixture_hv
    with the given rule; retained austenite is then added by volume (linearly) in both rules: it
    sits as films and blocks between martensite plates, constrained by them, and does not form the
    soft continuous path of a ferrite-pearlite network. Ferrite, pearlite and proeutectoid
    cementite formed on cooling count as ferrite-pearlite; carbide left undissolved at
    austenitizing is left out and the rest renormalized (the indent measures the matrix around
    fine carbides). With rule="linear" this is the arithmetic mean of all phases.

    >>> f = {"martensite": np.array([0.45]), "bainite": np.array([0.45]), "austenite": np.array([0.1])}
    >>> round(float(combine_phases_hv(f, 800.0, 200.0, 150.0, 250.0)[0]))   # 0.9 x 400 + 0.1 x 250
    385
    """
    zero = np.zeros(np.shape(martensite_hv))
    get = lambda name: np.asarray(fractions.get(name, zero), dtype=float)  # noqa: E731
    diffusional = get("ferrite") + get("pearlite") + np.maximum(get("cementite") - undissolved_cementite, 0.0)
    products = get("martensite") + get("bainite") + diffusional
    matrix = mixture_hv([get("martensite"), get("bainite"), diffusional],
                        [martensite_hv, bainite_hv, ferrite_pearlite_hv], rule)
    ra = get("austenite")
    total = products + ra
    hv = (np.where(products > 0, products * np.nan_to_num(matrix), 0.0) + ra * austenite_hv)
    return hv / np.where(total > 0, total, np.nan)


def hardness_hv(fractions: dict, rate_700_c_s, chem: dict, undissolved_cementite=0.0,
                relations: str = "corrected", rule: str = "logarithmic"):
    """As-quenched Vickers hardness of each node, the mixture of its phases (combine_phases_hv).

    Ferrite, pearlite and proeutectoid cementite formed on cooling take the ferrite-pearlite
    value; bainite and martensite their own; retained austenite RETAINED_AUSTENITE_HV.
    relations, rule: see phase_hardness_hv and mixture_hv (defaults: the corrected relations and
    the logarithmic mixture of the transformation products).

    >>> f = {"martensite": np.array([1.0]), "austenite": np.array([0.0])}
    >>> chem = dict(c=0.4, si=0.25, mn=0.85, ni=0.0, cr=0.95, mo=0.2, v=0.0)
    >>> round(float(hardness_hv(f, np.array([100.0]), chem)[0]))
    655
    >>> f = {"martensite": np.array([0.9]), "cementite": np.array([0.05]), "austenite": np.array([0.05])}
    >>> round(float(hardness_hv(f, np.array([100.0]), chem, undissolved_cementite=0.05)[0]))   # (0.9 x 655 + 0.05 x 250) / 0.95
    633
    >>> f = {"martensite": np.array([0.5]), "pearlite": np.array([0.5])}
    >>> round(float(hardness_hv(f, np.array([100.0]), chem)[0])), round(float(hardness_hv(f, np.array([100.0]), chem, rule="linear")[0]))
    (458, 487)
    """
    h = phase_hardness_hv(rate_700_c_s, chem, relations)
    return combine_phases_hv(fractions, h["martensite"], h["bainite"], h["ferrite_pearlite"],
                             np.full_like(h["martensite"], RETAINED_AUSTENITE_HV), undissolved_cementite, rule)
