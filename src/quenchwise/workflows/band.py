"""Hardness band over a grade's chemistry range: seeded Monte Carlo sampling of the composition
within each element's specification min/max, all samples solved as one batch.

With [steel] measured_jominy the heat's end-quench curve has fixed where in the range this heat
lies (workflows.heat_fit), so the range is not sampled: what remains is the fit's own uncertainty,
sampled as the chemistry position t drawn from a normal distribution with the fit's standard error
(from the readings' scatter and the curve's sensitivity to t). The tank and the part's size are
not sampled (they are the case's, as in a band without a measured curve)."""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Callable

import numpy as np

from ..case import Case
from ..errors import InputError
from ..steel.composition import Composition
from ..steel.grades import find_grade
from .requirement import final_hv, meets
from .simulate import simulate

DEFAULT_SAMPLES = 200


def sample_compositions(ranges: dict, nominal: dict, samples: int, seed: int) -> list[Composition]:
    """Compositions drawn uniformly and independently within each element's [min, max] (a
    conservative spread: real heats cluster near the aim); elements without a range keep the
    nominal value.

    >>> cs = sample_compositions({"c": (0.38, 0.43)}, {"c": 0.405, "mn": 0.9}, 5, seed=1)
    >>> all(0.38 <= c.c <= 0.43 and c.mn == 0.9 for c in cs)
    True
    """
    rng = np.random.default_rng(seed)
    names = sorted(k for k, (lo, hi) in ranges.items() if hi > lo)
    draws = {k: rng.uniform(ranges[k][0], ranges[k][1], samples) for k in names}
    return [Composition(**{**nominal, **{k: float(draws[k][i]) for k in names}}) for i in range(samples)]


@dataclass
class Band:
    case: Case
    compositions: list
    results: list
    depth_mm: np.ndarray
    hv: np.ndarray          # (samples, nodes), final (tempered if the case tempers)
    hrc: np.ndarray
    seed: int
    #: What was sampled, in words (the band's first line and --json "sampled").
    sampled: str = ""
    heat_fit: dict | None = None

    def quantiles(self, values: np.ndarray) -> dict:
        """min, median and max over the heats at each depth; NaN (no warning) where every heat is NaN."""
        v = np.asarray(values, dtype=float)
        some = np.isfinite(v).any(axis=0)
        out = {}
        for name, f in (("min", np.nanmin), ("median", np.nanmedian), ("max", np.nanmax)):
            q = np.full(v.shape[1], np.nan)
            if some.any():
                q[some] = f(np.where(np.isfinite(v), v, np.nan)[:, some], axis=0)
            out[name] = q
        return out

    def hrc_quantiles(self) -> dict:
        """HRC of the HV quantiles (the ASTM E140 conversion is monotonic, so the HRC of the softest
        heat is the softest HRC): NaN where that heat is below HRC 20, which the HV then tells. Taking
        quantiles of the HRC values themselves would drop the heats below HRC 20 and overstate the
        minimum."""
        from ..hardness import hrc_from_hv

        return {k: hrc_from_hv(v) for k, v in self.quantiles(self.hv).items()}

    def share_meeting(self) -> float | None:
        req = self.case.requirement
        if req is None:
            return None
        return float(np.mean([meets(r, req) for r in self.results]))


def band(case: Case, samples: int = DEFAULT_SAMPLES, seed: int = 1,
         progress: Callable[[float], None] | None = None) -> Band:
    """Sample the grade's chemistry range and simulate every sample in one batch."""
    if isinstance(seed, bool) or not isinstance(seed, (int, np.integer)) or not 0 <= seed < 2**63:
        raise InputError("--seed", seed, "a whole number from 0 to 2**63 - 1")
    if isinstance(samples, bool) or not isinstance(samples, (int, np.integer)) or not 2 <= samples <= 5000:
        raise InputError("--samples", samples, "a whole number from 2 to 5000")
    fit = None
    if case.measured_jominy is not None:
        from .heat_fit import chemistry_at, fit_heats

        [fit] = fit_heats([case])
        ts = np.random.default_rng(seed).normal(fit.position, fit.position_se, samples)
        compositions = [Composition(**chemistry_at(case, float(t))) for t in ts]
        case = replace(case, measured_jominy=None)
        sampled = (f"the fit's remaining uncertainty: chemistry position t = {fit.position:.2f} +/- "
                   f"{fit.position_se:.2f} (normal; the measured end-quench curve fixes the heat in its range)")
    else:
        if case.grade is None:
            raise InputError("steel.grade", "(missing)", "a built-in grade with specification ranges (see `quenchwise steels`)")
        grade = find_grade(case.grade)
        compositions = sample_compositions(grade.range, case.composition.as_dict(), samples, seed)
        sampled = f"{case.grade} chemistry range (uniform within each element's min-max)"
    from ..hardness import hrc_from_hv

    results = simulate([replace(case, composition=c) for c in compositions], progress)
    order = np.argsort(results[0].depth_mm)
    hv = np.array([final_hv(r)[order] for r in results])
    return Band(case, compositions, results, results[0].depth_mm[order], hv, hrc_from_hv(hv), seed, sampled,
                fit.summary() if fit is not None else None)


def band_rows(b: Band) -> list[dict]:
    """One row per depth: HV and HRC minimum, median and maximum over the heats (band.csv)."""
    q_hv, q_hrc = b.quantiles(b.hv), b.hrc_quantiles()
    return [{"depth_mm": float(d), "hv_min": float(q_hv["min"][i]), "hv_median": float(q_hv["median"][i]),
             "hv_max": float(q_hv["max"][i]), "hrc_min": float(q_hrc["min"][i]),
             "hrc_median": float(q_hrc["median"][i]), "hrc_max": float(q_hrc["max"][i])}
            for i, d in enumerate(b.depth_mm)]
