"""Sanity limits on results: where a published model is used so far outside its range that the
number it gives is not credible, the result carries a warning that says so and why.

The checks call the models' own functions (hardness.phases, hardness.hardenability) and compare
what they give with facts that do not depend on those fits:

* no ferrite-pearlite or bainite is harder than the martensite of the same steel at the same
  cooling rate (martensite is the hardest product of austenite; common practice, no source);
* ferrite-pearlite is not harder than FERRITE_PEARLITE_MAX_HV: fine pearlite of a eutectoid plain
  carbon steel, the hardest ferrite-pearlite, is about 40 HRC (~390 HV) (memory; e.g. the
  as-rolled and normalized hardness of rail and eutectoid wire steels);
* the ASTM A255 DI is a product of tabulated factors; beyond the tables the product is an
  extrapolation that grows without bound (5 Cr and 4 Ni give tens of inches).

The checks warn; they never change a number.
"""

from __future__ import annotations

import numpy as np

from .hardness.hardenability import A255_RANGES
from .hardness.phases import phase_hardness_hv

#: Upper bound for the hardness of a ferrite-pearlite product [HV] (fine eutectoid pearlite about
#: 390 HV, memory; 60 HV of margin for the scatter of the fits).
FERRITE_PEARLITE_MAX_HV = 450.0
#: An element beyond this multiple of the end of its A255 table makes the DI unusable (below it:
#: approximate). A judgement, common practice, no source.
FAR_BEYOND = 1.5
#: Smallest share of a phase at a node for its hardness to be checked (a trace does not matter).
PRESENT = 0.05


def phase_hardness_warnings(fractions: dict, rate_700_c_s, chem: dict, depth_mm=None) -> list[str]:
    """Warnings where the Maynier hardness of a phase that is present (>= 5 %) is not credible.

    fractions: phase -> fraction per node; rate_700_c_s: cooling rate at 700 C per node [K/s];
    chem: austenite chemistry (element -> wt%); depth_mm: per node, for the message.

    >>> chem = dict(c=0.40, mn=0.8, si=0.25, v=1.0)
    >>> f = {"ferrite": np.array([0.7]), "pearlite": np.array([0.3]), "martensite": np.array([0.0])}
    >>> # Maynier: 42 + 223(0.4) + 53(0.25) + 30(0.8) + log10(25 x 3600)(10 - 19(0.25) + 130(1.0))
    >>> # = 839 HV, plus the pearlite cooling-rate correction of hardness.phases: 900 HV
    >>> print(*phase_hardness_warnings(f, np.array([25.0]), chem))  # doctest: +ELLIPSIS
    ferrite-pearlite at 0 mm depth would be 900 HV by the hardness relations (Maynier et al. 1978), harder than the martensite ...
    >>> phase_hardness_warnings(f, np.array([25.0]), dict(c=0.40, mn=0.8, si=0.25))
    []
    """
    rate = np.asarray(rate_700_c_s, dtype=float)
    ok = np.isfinite(rate)
    if not ok.any():
        return []
    h = phase_hardness_hv(np.where(ok, rate, 1.0), chem)
    zero = np.zeros(rate.shape)
    get = lambda name: np.asarray(fractions.get(name, zero), dtype=float)  # noqa: E731
    depth = np.zeros(rate.shape) if depth_mm is None else np.asarray(depth_mm, dtype=float)
    loud = [f"{k} = {chem[k]:g} wt%" for k in ("v", "si", "mn", "ni", "cr", "mo") if chem.get(k, 0.0) > 0]
    why = ("outside the range of the hardness equations" + (f" (chemistry {', '.join(loud)})" if loud else "")
           + ": the hardness there is not credible")
    out = []
    for name, share, limit, what in (
            ("ferrite-pearlite", get("ferrite") + get("pearlite"), np.minimum(h["martensite"], FERRITE_PEARLITE_MAX_HV),
             "the martensite of this steel or the hardest fine pearlite"),
            ("bainite", get("bainite"), h["martensite"], "the martensite of this steel")):
        phase_hv = h["ferrite_pearlite" if name == "ferrite-pearlite" else "bainite"]
        bad = ok & (share >= PRESENT) & (phase_hv > limit)
        if bad.any():
            j = int(np.flatnonzero(bad)[np.argmax(phase_hv[bad])])
            out.append(f"{name} at {depth[j]:.3g} mm depth would be {phase_hv[j]:.0f} HV by the hardness relations (Maynier et al. 1978), "
                       f"harder than {what} ({limit[j]:.0f} HV): {why}")
    return out


def di_warnings(composition, di_inches: float) -> list[str]:
    """A warning when the ASTM A255 DI rests on factors beyond the standard's tables.

    >>> from quenchwise.steel import Composition
    >>> print(*di_warnings(Composition(c=0.4, mn=0.5, ni=4.0, cr=5.0), 44.0))  # doctest: +ELLIPSIS
    ASTM A255 DI 44 in is not a usable figure: its factors are extrapolated beyond the standard's tables (ni 4 > 1.5 wt%, cr 5 > 2.5 wt%)...
    >>> di_warnings(Composition(c=0.405, mn=0.875, si=0.25, cr=0.95, mo=0.2), 4.83)
    []
    """
    beyond = [f"{k} {getattr(composition, k):g} > {hi:g} wt%" for k, (lo, hi) in A255_RANGES.items()
              if getattr(composition, k, 0.0) > hi]
    if not beyond:
        return []
    far = any(getattr(composition, k, 0.0) > FAR_BEYOND * hi for k, (lo, hi) in A255_RANGES.items())
    return [f"ASTM A255 DI {di_inches:.3g} in " + ("is not a usable figure" if far else "is approximate")
            + f": its factors are extrapolated beyond the standard's tables ({', '.join(beyond)}); use the "
            "simulated DI (quenchwise jominy) or a measured end-quench curve"]


def result_warnings(result) -> list[str]:
    """Every sanity warning of a simulated Result (hardness per node, A255 DI)."""
    out = []
    if result.case.model != "none" and result.fractions is not None:
        chem = result.state.austenite_composition.as_dict()
        out += phase_hardness_warnings(result.fractions, result.cooling_rate_700_c_s, chem, result.depth_mm)
    di = result.extra.get("di", {}).get("a255")
    if di is not None:
        out += di_warnings(result.case.composition, di["in"])
    return out
