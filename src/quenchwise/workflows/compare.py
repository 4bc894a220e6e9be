"""The same part in several quenchants, solved as one batch."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

from ..case import Case
from ..thermal.quenchants import Quenchant
from .requirement import effective_depth_mm, final_hv, limit_hardness_hrc, meets
from .simulate import simulate
from .variants import with_quenchant


def crack_risk(carbon: float, severity_h: float | None) -> str:
    """A plain quench-crack note from the austenite carbon and the quench severity.

    Rule (common practice, no source): above about 0.35 %C a water or brine quench (H >= 0.9 1/in)
    cracks parts with sharp corners or section changes readily; above about 0.5 %C even an
    agitated oil (H >= 0.45) deserves care; plain oils, polymers and gas are low risk.

    >>> crack_risk(0.42, 1.0), crack_risk(0.42, 0.3), crack_risk(0.6, 0.5)
    ('high', 'low', 'elevated')
    """
    if severity_h is None:
        return "unknown"
    if (carbon >= 0.35 and severity_h >= 0.9) or (carbon >= 0.5 and severity_h >= 1.5):
        return "high"
    if (carbon >= 0.5 and severity_h >= 0.45) or (carbon >= 0.25 and severity_h >= 0.9):
        return "elevated"
    return "low"


@dataclass
class Comparison:
    case: Case
    media: list
    results: list
    severity_h: list
    rows: list

    def best(self):
        """The mildest medium that meets the requirement (None if none does or no requirement)."""
        ok = [r for r in self.rows if r["meets_requirement"]]
        return min(ok, key=lambda r: r["equivalent_h"] if r["equivalent_h"] is not None else float("inf")) if ok else None


def compare(case: Case, media: list[Quenchant], progress: Callable[[float], None] | None = None) -> Comparison:
    """Simulate the case once per medium, all in one batch; one summary row per medium."""
    results = simulate([with_quenchant(case, m) for m in media], progress)
    return comparison_from_results(case, media, results)


def comparison_from_results(case: Case, media: list[Quenchant], results: list) -> Comparison:
    """The comparison of the case's results in each medium (solved by the caller, e.g. within a
    larger batch as workflows.size does)."""
    from ..thermal.severity import grossmann_h_values

    severity = grossmann_h_values(media)     # equivalent H of each medium, None where none can be given
    rows = []
    for medium, res, h in zip(media, results, severity):
        pts = res.summary()["points"]
        limit = limit_hardness_hrc(res)
        rows.append({
            "medium": medium.name, "bath_c": medium.bath_c, "equivalent_h": None if h is None else round(h, 3),
            "surface_hrc": pts[0]["hrc"], "half_hrc": pts[1]["hrc"], "centre_hrc": pts[2]["hrc"],
            "surface_hv": pts[0]["hv"], "centre_hv": pts[2]["hv"],
            "centre_martensite_pct": pts[2]["martensite_pct"],
            "limit_hrc": round(limit, 1), "effective_depth_mm": round(effective_depth_mm(res, limit), 2),
            "meets_requirement": bool(case.requirement is not None and meets(res, case.requirement)),
            "crack_risk": crack_risk(res.state.carbon, h),
            "min_hv": round(float(final_hv(res).min()), 1),
        })
    return Comparison(case, list(media), results, severity, rows)
