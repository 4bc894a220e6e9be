"""TTT / CCT diagram of a case's steel with the case's kinetics model, and its summary."""

from __future__ import annotations

from ..case import Case
from ..errors import InputError

DIAGRAM_KINDS = ("ttt", "cct")


def diagram(case: Case, kind: str):
    """(diagram, summary) for kind "ttt" (isothermal holds) or "cct" (continuous cooling, to the
    bath temperature of the case's quench). The summary is the diagram's own plus the steel,
    the critical-temperature methods and the range warnings."""
    from ..kinetics import MODELS, critical_temperature_note
    from ..kinetics import diagrams
    from ..steel import austenitize

    if kind not in DIAGRAM_KINDS:
        raise InputError("--kind", kind, "ttt or cct")
    if case.model not in MODELS:
        raise InputError("transform.model", case.model, "a kinetics model for a diagram: " + ", ".join(MODELS))
    state = austenitize(case.composition, case.austenitize_c)
    model = MODELS[case.model]()
    if kind == "ttt":
        d = diagrams.ttt_diagram(state, case.grain_size, model, martensite_law=case.martensite)
    else:
        d = diagrams.cct_diagram(state, case.grain_size, model, bath_c=case.outer.bath_c,
                                 martensite_law=case.martensite)
    summary = {"title": case.title, **d.summary(),
               "steel": {"grade": case.grade, "composition_wt_pct": case.composition.as_dict(),
                         "critical_temperatures": critical_temperature_note(case.model)},
               "warnings": case.composition.range_warnings(case.model) + state.warnings()}
    if kind == "cct":
        summary["critical_rate_meaning"] = diagrams.CRITICAL_RATE_MEANING
    return d, summary
