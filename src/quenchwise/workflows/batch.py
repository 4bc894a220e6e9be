"""Simulate cases: austenitize, conduct heat with FiPy while the phases transform, then hardness.

Cases are solved together as batches (one FiPy system per group of cases that share numerics and
model), so a list of cases costs little more than one.
"""

from __future__ import annotations

from typing import Callable

import numpy as np

from ..case import Case
from ..hardness import hardness_hv, hrc_from_hv
from ..hardness.hardenability import a255_ideal_diameter
from ..hardness.tempering import tempered_hardness_hv
from ..kinetics import PhaseStepper, SteelNodes, kinetics_model
from ..results import Result, surface_first
from ..steel import austenitize
from ..thermal.integrator import rate_through
from ..thermal.solver import BatchSolver, ThermalCase

#: Temperature the part reaches after the quench, when martensite formation ends [C].
ROOM_C = 20.0


def steel_stepper(cases, states, members, counts, initial_c, model, martensite):
    """The kinetics of a batch's members (PhaseStepper over all their nodes: each member's austenite
    state, grain size and node count), or None for model "none" (pure conduction)."""
    if model == "none":
        return None
    nodes = SteelNodes.from_states([states[i] for i in members], [cases[i].grain_size for i in members],
                                   list(counts), martensite_law=martensite)
    return PhaseStepper(nodes, kinetics_model(model), initial_c)


def _thermal_case(i: int, case: Case) -> ThermalCase:
    return ThermalCase(
        name=case.title or f"case {i}", section=case.section, outer=case.outer, inner=case.inner,
        initial_c=case.austenitize_c, end_c=case.end_c, conductivity_w_mk=case.conductivity_w_mk,
        density_kg_m3=case.density_kg_m3, specific_heat_j_kgk=case.specific_heat_j_kgk,
    )


def simulate(cases: list[Case], progress: Callable[[float], None] | None = None) -> list[Result]:
    """Results for every case, in order; cases with the same numerics and model share one solve.
    The steel is taken as the case states it: workflows.simulate first fits cases that carry a
    measured end-quench curve (workflows.heat_fit) and then calls this."""
    states = [austenitize(c.composition, c.austenitize_c) for c in cases]
    groups: dict[tuple, list[int]] = {}
    for i, c in enumerate(cases):
        groups.setdefault((c.settings, c.model, c.martensite), []).append(i)
    results: list[Result | None] = [None] * len(cases)
    done_weight = 0.0
    for (settings, model, martensite), members in groups.items():
        solver = BatchSolver([_thermal_case(i, cases[i]) for i in members], settings)
        stepper = steel_stepper(cases, states, members, solver.counts, solver.initial, model, martensite)
        share = len(members) / len(cases)
        report = None
        if progress is not None:
            base = done_weight
            report = lambda f, base=base, share=share: progress(base + share * f)  # noqa: E731
        histories = solver.run(stepper, progress=report)
        if stepper is not None:
            # After the quench the part is left to cool to room temperature (common practice): the
            # austenite still above it can only turn to martensite there (dt = 0: no diffusion).
            last = np.concatenate([h.temperature_c[-1] for h in histories])
            room = np.minimum(ROOM_C, last)
            stepper.advance(last, room, np.zeros_like(last))
        done_weight += share
        for j, (i, history) in enumerate(zip(members, histories)):
            a, n = solver.starts[j], solver.counts[j]
            sl = slice(a, a + n)
            case, state = cases[i], states[i]
            if stepper is None:
                fractions = {"ferrite": np.full(n, state.ferrite), "pearlite": np.zeros(n), "bainite": np.zeros(n),
                             "martensite": np.zeros(n), "austenite": np.full(n, state.austenite),
                             "cementite": np.full(n, state.cementite)}
                hv = np.full(n, np.nan)
                rate = rate_through(history.time_s, history.temperature_c, 700.0)
                ms = np.full(n, np.nan)
            else:
                fractions = {k: v[sl].copy() for k, v in stepper.fractions().items()}
                rate = stepper.cooling_rate_700()[sl].copy()
                chem = state.austenite_composition.as_dict()
                hv = hardness_hv(fractions, rate, chem, undissolved_cementite=state.cementite)
                ms = stepper.ms_at_start[sl].copy()
            # The solver's nodes run from the centre outward; a Result runs from the surface inward.
            # Ms of the austenite at the start, at the centre node (the solver's first).
            result = Result(case=case, state=state, history=surface_first(history),
                            fractions={k: v[::-1] for k, v in fractions.items()}, hv=hv[::-1],
                            hrc=hrc_from_hv(hv[::-1]), cooling_rate_700_c_s=rate[::-1],
                            ms_c=float(ms[0]) if n else np.nan)
            _add_hardness_extras(result)
            results[i] = result
    return results  # type: ignore[return-value]


def _add_hardness_extras(result: Result) -> None:
    """Tempered hardness when the case tempers, and the composition DI (ASTM A255) for the summary.

    Only the composition DI is added here: the tool's own DI from physics needs a sweep of extra
    bar solves (workflows.ideal_diameter) and is reported by the jominy command instead, so that a
    run costs what its one case costs.
    """
    case, state = result.case, result.state
    di = a255_ideal_diameter(case.composition)
    result.extra["di"] = {"a255": di.as_dict()}
    # Models far outside their range give numbers that are not credible: say so on the result.
    from ..sanity import result_warnings

    result.extra.setdefault("warnings", []).extend(result_warnings(result))
    temper = getattr(case, "temper", None)
    if temper is None or case.model == "none":
        return
    chem = state.austenite_composition.as_dict()
    hv_t, notes = tempered_hardness_hv(result.fractions, result.cooling_rate_700_c_s, chem, temper.temperature_c,
                                       temper.hours, undissolved_cementite=state.cementite)
    if temper.temperature_c >= state.ae1:
        notes.append(f"temper at {temper.temperature_c:g} C is at or above Ae1 ({state.ae1:.0f} C): austenite "
                     "re-forms, which the tempering relation does not cover")
    result.hv_tempered, result.hrc_tempered = hv_t, hrc_from_hv(hv_t)
    result.extra["temper"] = {"temperature_c": temper.temperature_c, "hours": temper.hours,
                              "method": "Hollomon & Jaffe (1945) parameter, C = 20; Grange, Hribal & Porter (1977) "
                                        "tempered martensite (table values: memory)"}
    result.extra.setdefault("warnings", []).extend(notes)


def attach_equivalent_severity(results: list[Result]) -> None:
    """Put the equivalent Grossmann H of each result's quenchants into result.extra
    ("equivalent_h": {"outer": H, "inner": H}; thermal.severity.grossmann_h_values)."""
    from ..thermal.severity import grossmann_h_values

    values = grossmann_h_values([q for r in results for q in (r.case.outer, r.case.inner)])
    for i, r in enumerate(results):
        r.extra["equivalent_h"] = {"outer": values[2 * i], "inner": values[2 * i + 1]}
