"""Hardness of each phase group from chemistry and cooling rate, and the mixture.

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

    >>> round(float(maynier_martensite_hv(3.6e5, 0.40, si=0.25, mn=0.85, cr=0.95)))
    655
    """
    return 127.0 + 949.0 * c + 27.0 * si + 11.0 * mn + 8.0 * ni + 16.0 * cr + 21.0 * _log_rate(rate_c_h)


def maynier_bainite_hv(rate_c_h, c, si=0.0, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """HV of bainite: -323 + 185C + 330Si + 153Mn + 65Ni + 144Cr + 191Mo
    + log10(Vr)(89 + 53C - 55Si - 22Mn - 10Ni - 20Cr - 33Mo).

    Reference: Maynier, Jungmann & Dollet (1978), TMS-AIME, 518 (memory).

    >>> round(float(maynier_bainite_hv(3.6e4, 0.40, si=0.25, mn=0.85, cr=0.95, mo=0.2)))
    376
    """
    return (-323.0 + 185.0 * c + 330.0 * si + 153.0 * mn + 65.0 * ni + 144.0 * cr + 191.0 * mo
            + _log_rate(rate_c_h) * (89.0 + 53.0 * c - 55.0 * si - 22.0 * mn - 10.0 * ni - 20.0 * cr - 33.0 * mo))


def maynier_ferrite_pearlite_hv(rate_c_h, c, si=0.0, mn=0.0, ni=0.0, cr=0.0, mo=0.0, v=0.0):
    """HV of ferrite-pearlite: 42 + 223C + 53Si + 30Mn + 12.6Ni + 7Cr + 19Mo
    + log10(Vr)(10 - 19Si + 4Ni + 8Cr + 130V).

    Reference: Maynier, Jungmann & Dollet (1978), TMS-AIME, 518 (memory).

    >>> round(float(maynier_ferrite_pearlite_hv(3.6e3, 0.40, si=0.25, mn=0.85, cr=0.95, mo=0.2)))
    226
    """
    return (42.0 + 223.0 * c + 53.0 * si + 30.0 * mn + 12.6 * ni + 7.0 * cr + 19.0 * mo
            + _log_rate(rate_c_h) * (10.0 - 19.0 * si + 4.0 * ni + 8.0 * cr + 130.0 * v))


def phase_hardness_hv(rate_700_c_s, chem: dict) -> dict:
    """HV of each Maynier phase group at each node: keys martensite, bainite, ferrite_pearlite.

    rate_700_c_s [K/s] cooling rate at 700 C; chem: austenite chemistry, element -> wt%.

    >>> h = phase_hardness_hv(np.array([100.0]), dict(c=0.4, si=0.25, mn=0.85, cr=0.95, mo=0.2))
    >>> {k: round(float(v[0])) for k, v in h.items()}
    {'martensite': 655, 'bainite': 428, 'ferrite_pearlite': 252}
    >>> h = phase_hardness_hv(np.array([100.0]), dict(c=1.0, si=0.25, mn=0.35, cr=1.45))   # 52100: plateau
    >>> round(float(h["martensite"][0]))
    847
    """
    rate_c_h = np.asarray(rate_700_c_s, dtype=float) * 3600.0
    e = {k: chem.get(k, 0.0) for k in ("c", "si", "mn", "ni", "cr", "mo", "v")}
    return {
        "martensite": maynier_martensite_hv(rate_c_h, np.minimum(e["c"], MARTENSITE_CARBON_PLATEAU_WT),
                                            e["si"], e["mn"], e["ni"], e["cr"]),
        "bainite": maynier_bainite_hv(rate_c_h, e["c"], e["si"], e["mn"], e["ni"], e["cr"], e["mo"]),
        "ferrite_pearlite": maynier_ferrite_pearlite_hv(rate_c_h, **e),
    }


def hardness_hv(fractions: dict, rate_700_c_s, chem: dict, undissolved_cementite=0.0):
    """As-quenched Vickers hardness of each node, the volume-weighted mean of its phases.

    Ferrite, pearlite and proeutectoid cementite formed on cooling take the ferrite-pearlite
    value; bainite and martensite their own; retained austenite RETAINED_AUSTENITE_HV.
    Carbide left undissolved at austenitizing is left out and the rest renormalized (the
    indent measures the matrix around fine carbides).

    >>> f = {"martensite": np.array([1.0]), "austenite": np.array([0.0])}
    >>> chem = dict(c=0.4, si=0.25, mn=0.85, ni=0.0, cr=0.95, mo=0.2, v=0.0)
    >>> round(float(hardness_hv(f, np.array([100.0]), chem)[0]))
    655
    >>> f = {"martensite": np.array([0.9]), "cementite": np.array([0.05]), "austenite": np.array([0.05])}
    >>> round(float(hardness_hv(f, np.array([100.0]), chem, undissolved_cementite=0.05)[0]))   # (0.9 x 655 + 0.05 x 250) / 0.95
    633
    """
    h = phase_hardness_hv(rate_700_c_s, chem)
    zero = np.zeros_like(h["martensite"])
    get = lambda name: fractions.get(name, zero)  # noqa: E731
    diffusional = get("ferrite") + get("pearlite") + np.maximum(get("cementite") - undissolved_cementite, 0.0)
    total = diffusional + get("bainite") + get("martensite") + get("austenite")
    hv = (get("martensite") * h["martensite"] + get("bainite") * h["bainite"] + diffusional * h["ferrite_pearlite"]
          + get("austenite") * RETAINED_AUSTENITE_HV)
    return hv / np.where(total > 0, total, 1.0)
