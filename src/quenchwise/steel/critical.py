"""Critical temperatures from chemistry: one published correlation per function.

All take element contents in wt% (floats or numpy arrays) and return degrees C.
"""

from __future__ import annotations

import numpy as np

#: Fe-C eutectoid and the end of the Acm solvus at the eutectic temperature (memory).
EUTECTOID_C_WT = 0.77
EUTECTOID_T_C = 727.0
ACM_END_C_WT = 2.11
ACM_END_T_C = 1148.0
#: Carbon in ferrite and in cementite (wt%), for lever-rule balances.
FERRITE_C_WT = 0.02
CEMENTITE_C_WT = 6.67


def andrews_ae1(mn=0.0, ni=0.0, si=0.0, cr=0.0, w=0.0, as_=0.0):
    """Lower critical temperature (Andrews 1965 Ac1, used as Ae1).

    Ae1 = 723 - 10.7Mn - 16.9Ni + 29.1Si + 16.9Cr + 290As + 6.38W   [C, wt%]

    Valid for low-alloy steels below about 0.6 %C (Andrews' data set).
    Reference: Andrews, K.W. (1965), J. Iron Steel Inst. 203, 721 (memory).

    Parameters
    ----------
    mn, ni, si, cr, w, as_ : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Ae1 [C].

    >>> round(float(andrews_ae1(mn=0.85, si=0.25, cr=0.95)), 1)
    737.2
    """
    return 723.0 - 10.7 * mn - 16.9 * ni + 29.1 * si + 16.9 * cr + 290.0 * as_ + 6.38 * w


def andrews_ae3(c, ni=0.0, si=0.0, v=0.0, mo=0.0, w=0.0):
    """Upper critical temperature (Andrews 1965 Ac3, used as Ae3).

    Ae3 = 910 - 203 sqrt(C) - 15.2Ni + 44.7Si + 104V + 31.5Mo + 13.1W   [C, wt%]

    Valid for hypoeutectoid low-alloy steels (C below about 0.6 %).
    Reference: Andrews, K.W. (1965), J. Iron Steel Inst. 203, 721 (memory).

    Parameters
    ----------
    c, ni, si, v, mo, w : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Ae3 [C].

    >>> round(float(andrews_ae3(0.40, si=0.25, mo=0.20)), 1)
    799.1
    """
    return 910.0 - 203.0 * np.sqrt(c) - 15.2 * ni + 44.7 * si + 104.0 * v + 31.5 * mo + 13.1 * w


def andrews_ms(c, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Martensite start temperature, Andrews' linear formula.

    Ms = 539 - 423C - 30.4Mn - 17.7Ni - 12.1Cr - 7.5Mo   [C, wt%]

    Valid for C 0.11-0.6 %, low-alloy steels; used beyond that with care.
    Reference: Andrews, K.W. (1965), J. Iron Steel Inst. 203, 721 (memory).

    Parameters
    ----------
    c, mn, ni, cr, mo : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Ms [C].

    >>> round(float(andrews_ms(0.40, mn=0.85, cr=0.95, mo=0.20)), 1)
    331.0
    """
    return 539.0 - 423.0 * c - 30.4 * mn - 17.7 * ni - 12.1 * cr - 7.5 * mo


def andrews_ms_product(c, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Martensite start temperature, Andrews' product (non-linear) formula.

    Ms = 512 - 453C - 16.9Ni + 15Cr - 9.5Mo + 217C^2 - 71.5C Mn - 67.6C Cr   [C, wt%]

    Fitted on the same data as the linear formula; the C^2 and C x alloy terms keep it close to
    measured values at high carbon, where the linear form runs 40-50 K low (eutectoid plain
    carbon steel: product 247 C, linear 182 C, atlases about 220 C (memory)). Above about 1.1 %C
    its C^2 term makes Ms rise with carbon again, so the default Ms (martensite_start) uses it only
    up to 0.6 %C (ms_andrews_joined).
    Reference: Andrews, K.W. (1965), J. Iron Steel Inst. 203, 721 (memory).

    Valid for low-alloy steels of about 0.1-0.6 %C (Andrews' data set, memory).

    Parameters
    ----------
    c, mn, ni, cr, mo : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Ms [C].

    >>> round(float(andrews_ms_product(0.40, mn=0.85, cr=0.95, mo=0.20)), 1)
    327.9
    >>> round(float(andrews_ms_product(0.79, mn=0.76)), 1)
    246.6
    """
    return (512.0 - 453.0 * c - 16.9 * ni + 15.0 * cr - 9.5 * mo + 217.0 * c * c
            - 71.5 * c * mn - 67.6 * c * cr)


def van_bohemen_ms(c, mn=0.0, si=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Martensite start temperature with an exponential carbon dependence (van Bohemen 2012).

    Ms = 565 - (31Mn + 13Si + 18Ni + 10Cr + 12Mo) - 600 (1 - exp(-0.96 C))   [C, wt%]

    Falls with carbon at every carbon content (slope -576 exp(-0.96 C) K per wt%), and was fitted
    on low-alloy steels and Fe-C data up to about 2 %C (memory).
    Reference: van Bohemen, S.M.C. (2012), "Bainite and martensite start temperature calculated
    with exponential carbon dependence", Mater. Sci. Technol. 28, 487-495 (memory).

    Parameters
    ----------
    c, mn, si, ni, cr, mo : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Ms [C].

    >>> round(float(van_bohemen_ms(0.79, mn=0.76, si=0.25)), 1)
    219.2
    >>> round(float(van_bohemen_ms(1.4)), 1)
    121.5
    """
    return (565.0 - (31.0 * mn + 13.0 * si + 18.0 * ni + 10.0 * cr + 12.0 * mo)
            - 600.0 * (1.0 - np.exp(-0.96 * np.asarray(c, dtype=float))))


#: Carbon up to which Andrews' product formula is used as it stands [wt%]: its data set ends near
#: 0.6 %C (memory), and above about 1.1 %C its C^2 term makes Ms rise with carbon.
MS_JOIN_C_WT = 0.6


def ms_andrews_joined(c, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Default Ms: Andrews' product formula up to 0.6 %C, continued with van Bohemen's carbon term.

    Ms = andrews_ms_product(C, alloy)                                          for C <= 0.6
    Ms = andrews_ms_product(0.6, alloy) - 600 (exp(-0.96 x 0.6) - exp(-0.96 C))  for C > 0.6
    [C, wt%]. Continuous at 0.6 %C and falling with carbon everywhere (for non-negative Mn and Cr),
    where the product formula alone rises again above about 1.1 %C (a 1.4 %C steel with 0.35 Mn: 268 C
    against 249 C at 1.1 %C). Below 0.6 %C it is Andrews' product formula unchanged. The
    continuation takes only the carbon dependence of van_bohemen_ms; the alloy terms stay
    Andrews' at 0.6 %C. Eutectoid plain carbon steel 229 C (atlases about 220 C, memory);
    1.4 %C with 0.35 Mn 122 C. A quenchwise join of two published formulas.

    Parameters
    ----------
    c, mn, ni, cr, mo : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Ms [C].

    >>> round(float(ms_andrews_joined(0.40, mn=0.85, cr=0.95, mo=0.20)), 1)   # = andrews_ms_product
    327.9
    >>> round(float(ms_andrews_joined(0.79, mn=0.76)), 1)
    229.5
    >>> round(float(ms_andrews_joined(1.4, mn=0.35)), 1)
    122.5
    """
    c = np.asarray(c, dtype=float)
    below = andrews_ms_product(np.minimum(c, MS_JOIN_C_WT), mn, ni, cr, mo)
    tail = 600.0 * (np.exp(-0.96 * MS_JOIN_C_WT) - np.exp(-0.96 * np.maximum(c, MS_JOIN_C_WT)))
    return below - tail


#: The Ms used throughout (kinetics, retained austenite, diagrams) and its name in the output.
martensite_start = ms_andrews_joined
MS_METHOD = "Andrews (1965) product Ms (above 0.6 %C: van Bohemen (2012) carbon term)"
#: Names of the other default critical-temperature methods, shown in every summary.
AE_METHOD = "Andrews (1965) Ae1/Ae3"
ACM_METHOD = "straight Fe-C Acm (no alloy correction)"


def steven_haynes_bs(c, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Bainite start temperature, Steven & Haynes.

    Bs = 830 - 270C - 90Mn - 37Ni - 70Cr - 83Mo   [C, wt%]

    Reference: Steven, W. & Haynes, A.G. (1956), J. Iron Steel Inst. 183, 349 (memory).

    Fitted on low-alloy hypoeutectoid steels (about 0.1-0.6 %C, memory); beyond that with care.

    Parameters
    ----------
    c, mn, ni, cr, mo : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Bs [C].

    >>> round(float(steven_haynes_bs(0.40, mn=0.85, cr=0.95, mo=0.20)), 1)
    562.4
    """
    return 830.0 - 270.0 * c - 90.0 * mn - 37.0 * ni - 70.0 * cr - 83.0 * mo


def li_bs(c, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Bainite start temperature used with the Li et al. kinetics.

    Bs = 637 - 58C - 35Mn - 15Ni - 34Cr - 41Mo   [C, wt%]

    Reference: Li, M.V., Niebuhr, D.V., Meekisho, L.L., Atteridge, D.G. (1998),
    Metall. Mater. Trans. B 29B, 661 (memory).

    Fitted on low-alloy hypoeutectoid steels (about 0.1-0.6 %C, memory); beyond that with care.

    Parameters
    ----------
    c, mn, ni, cr, mo : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Bs [C].

    >>> round(float(li_bs(0.40, mn=0.85, cr=0.95, mo=0.20)), 1)
    543.5
    """
    return 637.0 - 58.0 * c - 35.0 * mn - 15.0 * ni - 34.0 * cr - 41.0 * mo


def kirkaldy_venugopalan_bs(c, mn=0.0, si=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Bainite start temperature, Kirkaldy & Venugopalan.

    Bs = 656 - 58C - 35Mn - 75Si - 15Ni - 34Cr - 41Mo   [C, wt%]

    Reference: Kirkaldy, J.S. & Venugopalan, D. (1983), in Phase Transformations in
    Ferrous Alloys, TMS-AIME, 125 (memory).

    Fitted on low-alloy hypoeutectoid steels (about 0.1-0.6 %C, memory); beyond that with care.

    Parameters
    ----------
    c, mn, si, ni, cr, mo : float or array_like
        Element contents [wt%], 0 where absent (floats or numpy arrays).

    Returns
    -------
    float or numpy.ndarray
        Bs [C].

    >>> round(float(kirkaldy_venugopalan_bs(0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20)), 1)
    543.8
    """
    return 656.0 - 58.0 * c - 35.0 * mn - 75.0 * si - 15.0 * ni - 34.0 * cr - 41.0 * mo


def acm_linear(c):
    """Acm (cementite solvus) of plain Fe-C as a straight line.

    Acm = 727 + (1148 - 727) (C - 0.77) / (2.11 - 0.77)   [C, wt%], for 0.77 <= C <= 2.11.
    A fair first approximation of the curved solvus.
    Reference: Fe-C phase diagram, eutectoid (0.77 %C, 727 C) and eutectic end of the
    solvus (2.11 %C, 1148 C) (memory).

    Limitation: no alloy correction. Chromium (and Mo, V, W) raise the cementite solvus and lower
    the carbon austenite takes up below it, but no published correction could be checked, so none
    is applied. For a 1.0C-1.45Cr bearing steel (52100) hardened from 845 C this line puts all
    carbide in solution and 1.0 %C in the austenite, whereas practice shows about 0.6-0.7 %C in
    the austenite with some carbide undissolved (memory); Ms then comes out low and retained
    austenite high. AusteniteState.warnings() says so for hypereutectoid alloy steels.

    Parameters
    ----------
    c : float or array_like
        Carbon [wt%].

    Returns
    -------
    float or numpy.ndarray
        Acm [C].

    >>> round(float(acm_linear(1.13)), 1)
    840.1
    """
    slope = (ACM_END_T_C - EUTECTOID_T_C) / (ACM_END_C_WT - EUTECTOID_C_WT)
    return EUTECTOID_T_C + slope * (np.asarray(c, dtype=float) - EUTECTOID_C_WT)


def carbon_on_acm(temperature_c):
    """Carbon (wt%) of austenite in equilibrium with cementite: the inverse of acm_linear.

    Valid from 727 to 1148 C, the ends of the line (straight Fe-C Acm between the eutectoid (0.77 %C,
    727 C) and the eutectic end (2.11 %C, 1148 C), memory).

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [C].

    Returns
    -------
    float or numpy.ndarray
        Carbon that austenite holds on the Acm line [wt%].

    >>> round(float(carbon_on_acm(840.1)), 3)
    1.13
    """
    slope = (ACM_END_T_C - EUTECTOID_T_C) / (ACM_END_C_WT - EUTECTOID_C_WT)
    return EUTECTOID_C_WT + (np.asarray(temperature_c, dtype=float) - EUTECTOID_T_C) / slope
