"""Whether a result meets the drawing's requirement, and the depths an engineer reads off."""

from __future__ import annotations

import numpy as np

from ..hardness import hv_from_hrc

#: Points per mm... the requirement is checked on this many depths from the surface to its depth.
_CHECK_POINTS = 64


def final_hv(result) -> np.ndarray:
    """The hardness the drawing refers to: tempered if the case tempers, else as quenched [HV]."""
    tempered = getattr(result, "hv_tempered", None)
    return result.hv if tempered is None else tempered


def _depth_profile(result, values):
    depth = result.depth_mm
    order = np.argsort(depth)
    return depth[order], np.asarray(values)[order]


def value_at_depths(result, values, depths_mm):
    """Interpolate a node quantity at depths below the quenched surface [mm]."""
    d, v = _depth_profile(result, values)
    return np.interp(depths_mm, d, v)


def requirement_margin(result, requirement) -> float:
    """Smallest margin over the required depth range: HV above the HV of min_hrc, or martensite
    percentage points above min_martensite_pct. Non-negative means the requirement is met."""
    depth = result.history.section.thickness_m * 1000.0 if requirement.depth_mm is None else requirement.depth_mm
    depths = np.linspace(0.0, depth, _CHECK_POINTS)
    if requirement.min_hrc is not None:
        limit = float(hv_from_hrc(requirement.min_hrc))
        return float(np.min(value_at_depths(result, final_hv(result), depths)) - limit)
    martensite = 100.0 * value_at_depths(result, result.fractions["martensite"], depths)
    return float(np.min(martensite) - requirement.min_martensite_pct)


def meets(result, requirement) -> bool:
    return requirement_margin(result, requirement) >= 0.0


def hodge_orehoski_50_martensite_hrc(carbon):
    """Hardness of 50 % martensite structures: about 14 + 44 sqrt(C) HRC (C wt%, up to about 0.6).

    Reference: Hodge, J.M. & Orehoski, M.A. (1946), Trans. AIME 167, 627 (memory, +/-3 HRC).

    Parameters
    ----------
    carbon : float or array_like
        Carbon [wt%].

    Returns
    -------
    float or numpy.ndarray
        Hardness of 50 % martensite [HRC].

    >>> round(float(hodge_orehoski_50_martensite_hrc(0.40)), 1)
    41.8
    """
    return 14.0 + 44.0 * np.sqrt(carbon)


def effective_depth_mm(result, limit_hrc: float) -> float:
    """Depth below the surface at which the hardness first falls to limit_hrc [mm]; the full
    depth (centre / wall) if it never does; 0 if the surface is already below it."""
    d, hv = _depth_profile(result, final_hv(result))
    limit = float(hv_from_hrc(limit_hrc))
    below = np.flatnonzero(hv < limit)
    if below.size == 0:
        return float(result.history.section.thickness_m * 1000.0)
    i = below[0]
    if i == 0:
        return 0.0
    # Linear between the last node above and the first below.
    return float(d[i - 1] + (hv[i - 1] - limit) / (hv[i - 1] - hv[i]) * (d[i] - d[i - 1]))


def limit_hardness_hrc(result) -> float:
    """The hardness that defines the effective depth: the requirement's min_hrc if it has one,
    else the 50 % martensite hardness of the austenite's carbon (Hodge & Orehoski)."""
    req = getattr(result.case, "requirement", None)
    if req is not None and req.min_hrc is not None:
        return req.min_hrc
    return float(hodge_orehoski_50_martensite_hrc(min(result.state.carbon, 0.6)))
