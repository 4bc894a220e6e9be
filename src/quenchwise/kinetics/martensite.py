"""Athermal martensite."""

from __future__ import annotations

import numpy as np


def koistinen_marburger(ms_c, temperature_c, alpha_per_k=0.011):
    """Fraction of the austenite present at Ms that has become martensite at T.

    f = 1 - exp(-alpha (Ms - T)) for T < Ms, else 0. alpha = 0.011 1/K in the original fit.
    Valid for plain carbon and low-alloy steels quenched below Ms.
    Reference: Koistinen, D.P. & Marburger, R.E. (1959), Acta Metall. 7, 59 (memory).

    >>> round(float(koistinen_marburger(330.0, 230.0)), 3)
    0.667
    """
    undercooling = np.maximum(np.asarray(ms_c, dtype=float) - temperature_c, 0.0)
    return -np.expm1(-alpha_per_k * undercooling)


def van_bohemen_sietsma_alpha(c, mn=0.0, ni=0.0, cr=0.0, mo=0.0):
    """Composition-dependent rate parameter alpha of the Koistinen-Marburger law [1/K].

    alpha = 0.0224 - 0.0107C - 0.0007Mn - 0.00005Ni - 0.00012Cr - 0.0001Mo   (wt%)
    Valid for C 0.1-1.1 wt% in low-alloy steels.
    Reference: van Bohemen, S.M.C. & Sietsma, J. (2009), Mater. Sci. Technol. 25, 1009 (memory).

    >>> round(float(van_bohemen_sietsma_alpha(0.40, mn=0.85, cr=0.95, mo=0.20)), 5)
    0.01739
    """
    return 0.0224 - 0.0107 * c - 0.0007 * mn - 0.00005 * ni - 0.00012 * cr - 0.0001 * mo
