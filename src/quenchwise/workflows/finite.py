"""Finite parts (bar, ring, stepped shaft) solved in (r, z): austenitize, conduct heat while the
phases transform on every cell, then hardness, as workflows.batch does for the 1-D sections.

Parts that share numerics, model and radial grid (the same radii: compare, band, a length sweep)
are stacked along z on one mesh and solved as one batch; each keeps its own step sequence, so its
answer does not depend on what else is in the batch.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Callable

import numpy as np

from ..hardness import hardness_hv, hrc_from_hv
from ..hardness.tempering import tempered_hardness_hv
from ..results import surface_first
from ..results_rz import PartField, PartResult
from ..steel import austenitize
from ..thermal.integrator import rate_through
from ..thermal.part_rz import PartMember, build_geometry, integrate, radial_faces
from ..thermal.solver import CaseHistory
from .batch import ROOM_C, _add_hardness_extras, steel_stepper


#: Largest number of cells solved as one batch (a band of 200 heats of a 50 x 100 mm bar would keep
#: about 0.5 GB of temperature histories in one); larger batches are split, which costs little since
#: the step cost grows with the cells anyway.
MAX_BATCH_CELLS = 40000


def _cells(case, settings) -> int:
    from ..thermal.part_rz import axial_widths

    return (radial_faces(case.finite.part, settings).size - 1) * axial_widths(case.finite.part, settings).size


def is_finite(case) -> bool:
    return getattr(case, "finite", None) is not None


def part_member(i: int, case) -> PartMember:
    """The (r, z) member of a finite case: the outer medium on the sides and shoulders, the bore's
    on the bore of a ring, the end faces' own where [quench] gives them."""
    outer = case.outer
    media = {"side": outer, "shoulder": outer, "lower_end": outer, "upper_end": outer}
    if case.finite.part.bore_m > 0 and case.section.inner_quenched:
        media["bore"] = case.inner
    media.update(case.finite.end_media(outer))
    return PartMember(name=f"case {case.title or i!r}", part=case.finite.part, media=media, initial_c=case.austenitize_c,
                      end_c=case.end_c, conductivity_w_mk=case.conductivity_w_mk, density_kg_m3=case.density_kg_m3,
                      specific_heat_j_kgk=case.specific_heat_j_kgk)


def part_settings(case):
    """The (r, z) numerics of a finite case: its mesh ([mesh] radial_cells, axial_cells, growth)
    with the step limits of its SolverSettings (so run --fine and [mesh] step keys apply)."""
    s = case.settings
    return replace(case.finite.settings, max_temperature_step_k=s.max_temperature_step_k,
                   max_fraction_step=s.max_fraction_step, max_relative_step=s.max_relative_step)


def simulate_finite(cases: list, progress: Callable[[float], None] | None = None) -> list[PartResult]:
    """A PartResult for every finite case, in order (see the module docstring)."""
    states = [austenitize(c.composition, c.austenitize_c) for c in cases]
    groups: dict[tuple, list[int]] = {}
    for i, c in enumerate(cases):
        settings = part_settings(c)
        key = (settings, c.model, c.martensite, radial_faces(c.finite.part, settings).tobytes())
        groups.setdefault(key, []).append(i)
    # Batches bounded in cells: the integrator keeps every member's temperature history.
    chunks: dict[tuple, list[int]] = {}
    for key, members in groups.items():
        per = max(1, MAX_BATCH_CELLS // _cells(cases[members[0]], key[0]))
        for k in range(0, len(members), per):
            chunks[key + (k,)] = members[k:k + per]
    groups = chunks
    results: list = [None] * len(cases)
    done = 0.0
    for (settings, model, martensite, _, _), members in groups.items():
        geometry = build_geometry([part_member(i, cases[i]) for i in members], settings)
        stepper = steel_stepper(cases, states, members, geometry.member_counts, geometry.initial_c, model, martensite)
        share = len(members) / len(cases)
        report = None if progress is None else (lambda f, base=done, share=share: progress(base + share * f))
        run = integrate(geometry, settings, stepper, report)
        done += share
        if stepper is not None:
            # Left to cool to room temperature after the quench (as workflows.batch): only the
            # austenite below Ms turns to martensite there. Cells outside the part stay as they are.
            last = np.concatenate([t[-1] for t in run.temperature_c])
            room = np.where(geometry.solid, np.minimum(ROOM_C, last), last)
            stepper.advance(last, room, np.zeros_like(last))
        for j, i in enumerate(members):
            results[i] = _part_result(cases[i], states[i], geometry, j, run, stepper)
    return results


def _depth(geometry, j: int) -> np.ndarray:
    """Distance of each cell centre of member j to the nearest centre of its cooled faces [m]."""
    rows = np.array([m == j for m, *_ in geometry.surface_rows])
    points = geometry.surface_points[rows]
    r = np.tile(geometry.r_m, geometry.z_m[j].size)
    z = np.repeat(geometry.z_m[j], geometry.nr)
    out = np.full(r.size, np.inf)
    for k in range(0, points.shape[0], 256):         # in blocks: cells x faces stays small
        p = points[k:k + 256]
        d = np.hypot(r[:, None] - p[None, :, 0], z[:, None] - p[None, :, 1])
        out = np.minimum(out, d.min(axis=1))
    return out


def _surface_cells(geometry, j: int) -> tuple[np.ndarray, dict]:
    start = geometry.member_starts[j]
    tags: dict = {}
    for member, cell, _, _, _, tag in geometry.surface_rows:
        if member == j:
            c = int(cell - start)
            tags[c] = tag if c not in tags else ",".join(sorted(set(tags[c].split(",")) | {tag}))
    return np.array(sorted(tags), dtype=int), tags


def _part_result(case, state, geometry, j: int, run, stepper) -> PartResult:
    a, n = geometry.member_starts[j], geometry.member_counts[j]
    sl = slice(a, a + n)
    solid = geometry.solid[sl]
    if stepper is None:
        fractions = {"ferrite": np.full(n, state.ferrite), "pearlite": np.zeros(n), "bainite": np.zeros(n),
                     "martensite": np.zeros(n), "austenite": np.full(n, state.austenite),
                     "cementite": np.full(n, state.cementite)}
        hv = np.full(n, np.nan)
        rate = rate_through(run.time_s[j], run.temperature_c[j], 700.0)
        ms = np.nan
    else:
        fractions = {k: np.asarray(v[sl], dtype=float).copy() for k, v in stepper.fractions().items()}
        rate = stepper.cooling_rate_700()[sl].copy()
        hv = hardness_hv(fractions, rate, state.austenite_composition.as_dict(), undissolved_cementite=state.cementite)
        ms = float(stepper.ms_at_start[a])
    hv = np.where(solid, hv, np.nan)
    surface_cells, tags = _surface_cells(geometry, j)
    temperature = np.where(solid, run.temperature_c[j], np.nan)
    field = PartField(part=case.finite.part, r_m=geometry.r_m, z_m=geometry.z_m[j], dr_m=geometry.dr_m,
                      dz_m=geometry.dz_m[j], solid=solid, surface_cells=surface_cells, surface_tags=tags,
                      time_s=run.time_s[j], temperature_c=temperature, fractions=fractions, hv=hv,
                      hrc=hrc_from_hv(hv), cooling_rate_700_c_s=rate, heat_out_j=float(run.heat_out_j[j]),
                      latent_j=float(run.latent_j[j]), steps=int(run.steps[j]),
                      depth_m=np.where(solid, _depth(geometry, j), np.nan))
    # The profile line: the radial row(s) at the profile height, linear in z between the two rows.
    z, nr = field.z_m, field.r_m.size
    zp = case.finite.part.profile_z_m
    hi = int(np.clip(np.searchsorted(z, zp), 1, z.size - 1))
    w = float(np.clip((zp - z[hi - 1]) / (z[hi] - z[hi - 1]), 0.0, 1.0))

    def line(values):
        g = np.asarray(values, dtype=float).reshape(-1, nr) if np.ndim(values) == 1 else None
        if g is not None:
            return (1.0 - w) * g[hi - 1] + w * g[hi]
        t = np.asarray(values, dtype=float).reshape(values.shape[0], -1, nr)
        return (1.0 - w) * t[:, hi - 1] + w * t[:, hi]

    history = CaseHistory(name=case.title, section=case.section, radius_m=field.r_m.copy(), cell_width_m=field.dr_m.copy(),
                          volume_weight=field.r_m.copy(), time_s=field.time_s, temperature_c=line(temperature),
                          surface_c=run.surface_c[j], heat_out_j=field.heat_out_j, latent_j=field.latent_j,
                          steps=field.steps, extra={"geometry": "rz"})
    # The grid's radial rows run from the axis outward; a Result runs from the surface inward.
    line_fr = {k: line(v)[::-1] for k, v in fractions.items()}
    line_hv = line(hv)[::-1]
    result = PartResult(case=case, state=state, history=surface_first(history), fractions=line_fr, hv=line_hv,
                        hrc=hrc_from_hv(line_hv), cooling_rate_700_c_s=line(rate)[::-1], ms_c=ms, field=field)
    _add_hardness_extras(result)
    temper = getattr(case, "temper", None)
    if temper is not None and stepper is not None:
        hv_t, _ = tempered_hardness_hv(fractions, rate, state.austenite_composition.as_dict(), temper.temperature_c,
                                       temper.hours, undissolved_cementite=state.cementite)
        field.hv_tempered = np.where(solid, hv_t, np.nan)
        field.hrc_tempered = hrc_from_hv(field.hv_tempered)
    return result

