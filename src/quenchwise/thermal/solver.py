"""FiPy heat conduction for a batch of independent sections solved as one system.

All sections of a batch are laid end to end on one 1-D FiPy mesh and cut apart by zero
conductance on the faces between them. Each carries its own radius weights (slab, cylinder,
sphere), its own surface conditions, its own properties and its own time step: the transient
coefficient of a section is rho cp w / dt_case and FiPy is asked for a unit step, so every section
follows its own adaptive step sequence. A section's answer therefore does not depend on what else
is in the batch; a single case is a batch of one. A section that has reached its end temperature
is frozen (identity rows).

Python API (a batch directly, no case file)::

    from quenchwise.thermal import BatchSolver, Quenchant, Section, load_quenchant
    from quenchwise.thermal.solver import ThermalCase

    oil = load_quenchant("oil_conventional_60c_still")
    cases = [ThermalCase(f"bar {d} mm", Section.bar(d / 1000), oil, initial_c=850.0, end_c=100.0)
             for d in (20, 40, 80)]
    cases.append(ThermalCase("tube 80/40", Section.tube(0.08, 0.04), oil, 850.0, 100.0, inner=oil))
    histories = BatchSolver(cases).run()          # stepper=None: conduction only
    centre = [h.temperature_c[:, 0] for h in histories]

With transformations, pass a stepper built on the batch's nodes (quenchwise.kinetics.PhaseStepper
with SteelNodes.from_states(..., counts=list(solver.counts))); workflows.simulate does this.

The time loop (enthalpy BDF2, coefficients at extrapolated temperatures, latent-heat recovery,
surface-heat integration, step control and the step guard) is the shared one of
thermal/integrator.py; this module only lays the sections out on one 1-D FiPy mesh: a Cartesian
Grid1D carries slab, cylinder or sphere through the radius weights of Section.mesh (capacity V/dx
per cell, r^m on the faces). All surfaces of a batch are evaluated at once (the quenchant tables
are padded into one array), with no Python loop over cases.

Accuracy notes. Lagging the nonlinear coefficients by one step left the centre history of a 60 mm
bar in oil 1.6 % of the span off the converged answer; evaluating them at the extrapolated
temperatures brings it to about 0.5 %, mostly from the kinetics. The energy balance
heat_out_j = drop of sensible enthalpy + latent_j holds to round-off;
tests/validation/test_conduction_analytic.py checks it independently.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import fipy as fp
import numpy as np

from .geometry import Section
from .integrator import FRACTION_TOLERANCE, GUARD_TOLERANCE_K, CoolingHistory, Geometry, Integrator  # noqa: F401
from .properties import DENSITY_KG_M3, ConstantOverrides
from .quenchants import Quenchant
from ..errors import SolverError  # noqa: F401  (re-exported: callers catch it from here too)
from .settings import MAX_CELL_RATIO, SolverSettings, mesh_growth  # noqa: F401
from .surfaces import Surfaces


@dataclass(frozen=True)
class ThermalCase:
    """One section to cool: geometry, surface conditions, start and end temperatures.

    outer / inner: quenchant on the outer surface / on the inner surface. The section says which
    ends are quenched (Section.outer_quenched, Section.inner_quenched): a quenchant must be given
    for each quenched end and for no other (the others are symmetry planes or insulated).
    conductivity, density, specific_heat: constant overrides (None: tables).
    """

    name: str
    section: Section
    outer: Quenchant | None
    initial_c: float
    end_c: float
    inner: Quenchant | None = None
    conductivity_w_mk: float | None = None
    density_kg_m3: float | None = None
    specific_heat_j_kgk: float | None = None

    def __post_init__(self):
        s = self.section
        if (self.outer is not None) != s.outer_quenched:
            raise ValueError(f"case {self.name!r}: outer quenchant given = {self.outer is not None} but the section's "
                             f"outer_quenched = {s.outer_quenched}")
        if (self.inner is not None) != s.inner_quenched:
            raise ValueError(f"case {self.name!r}: inner quenchant given = {self.inner is not None} but the section's "
                             f"inner_quenched = {s.inner_quenched}")
        if s.inner_quenched and s.m > 0 and s.inner_m <= 0:
            raise ValueError(f"case {self.name!r}: a quenched inner surface needs a bore (inner radius > 0)")
        if not (s.inner_quenched or s.outer_quenched):
            raise ValueError(f"case {self.name!r}: no quenched surface, the section would never cool")


@dataclass(kw_only=True)
class CaseHistory(CoolingHistory):
    """Cooling history of one section (integrator.CoolingHistory) with its nodes, inner end first.

    Energies are per unit angle (radian) of a cylinder or sphere and per metre of length of a
    cylinder, per square metre of a plate: multiply by the section's measure for totals.
    extra: "heat_out_outer_j", "heat_out_inner_j" (the two surfaces separately).
    """

    section: Section
    radius_m: np.ndarray            # cell centres, from the inner end
    cell_width_m: np.ndarray
    volume_weight: np.ndarray       # cell volume per unit angle / cell width
    surface_c: np.ndarray           # (n_t,) outer surface temperature estimate


class BatchSolver:
    """Solve many independent sections in one FiPy system (see the module docstring for the
    method and a Python example). assembly: see thermal/integrator.py ("banded" or "fipy")."""

    def __init__(self, cases: list[ThermalCase], settings: SolverSettings = SolverSettings(),
                 assembly: str = "banded"):
        if not cases:
            raise ValueError("a batch needs at least one case")
        self.cases, self.settings = list(cases), settings
        widths, radii, weights, face_w = [], [], [], []
        for case in self.cases:
            both = case.section.inner_quenched and case.section.outer_quenched   # graded from both ends
            growth = mesh_growth(settings.cells, settings.growth, settings.cells // 2 if both else None)
            dx, centres, w, fw = case.section.mesh(settings.cells, growth)
            widths.append(dx), radii.append(centres), weights.append(w), face_w.append(fw)
        self.counts = np.array([len(d) for d in widths])
        self.starts = np.concatenate([[0], np.cumsum(self.counts)[:-1]]).astype(int)
        self.case_of_node = np.repeat(np.arange(len(cases)), self.counts)
        self.dx = np.concatenate(widths)
        self.radius = radii
        self.node_weights, self.node_widths = weights, widths
        n = self.n_nodes = self.dx.size
        # Face j of the Grid1D lies between nodes j-1 and j; the faces between cases carry no flux.
        inner = np.ones(n + 1, dtype=bool)
        inner[[0, n]] = False
        inner[self.starts[1:]] = False
        faces = np.flatnonzero(inner)
        face_weight = np.zeros(n + 1)
        for s0, fw in zip(self.starts, face_w):
            face_weight[s0 + 1: s0 + len(fw) - 1] = fw[1:-1]
        self.outer_nodes = self.starts + self.counts - 1
        self.inner_nodes = self.starts
        rows = []
        for i, (case, fw) in enumerate(zip(self.cases, face_w)):
            if case.outer is not None:
                node = self.outer_nodes[i]
                rows.append((i, node, fw[-1], 0.5 * self.dx[node], case.outer, "outer"))
            if case.inner is not None:
                node = self.inner_nodes[i]
                rows.append((i, node, fw[0], 0.5 * self.dx[node], case.inner, "inner"))
        self.surfaces = Surfaces(rows)
        outer_row = np.full(len(cases), -1)
        is_outer = self.surfaces.tag == "outer"
        outer_row[self.surfaces.member[is_outer]] = np.flatnonzero(is_outer)

        def per_node(attr, default):
            vals = [getattr(c, attr) for c in self.cases]
            return np.repeat(np.array([default if v is None else v for v in vals], dtype=float), self.counts)

        self.density = per_node("density_kg_m3", DENSITY_KG_M3)
        self.initial = per_node("initial_c", np.nan)
        self.weight = np.concatenate(weights)
        self.mass = self.density * self.weight * self.dx          # kg per unit measure, per node
        self.geometry = Geometry(
            mesh=fp.Grid1D(dx=self.dx), member_starts=self.starts, member_counts=self.counts,
            capacity=self.weight, density_kg_m3=self.density, initial_c=self.initial,
            end_c=np.array([c.end_c for c in self.cases], dtype=float),
            overrides=ConstantOverrides(per_node("conductivity_w_mk", np.nan), per_node("specific_heat_j_kgk", np.nan)),
            face_cells=np.column_stack([faces - 1, faces]), face_ids=faces,
            face_half_m=np.column_stack([0.5 * self.dx[faces - 1], 0.5 * self.dx[faces]]),
            face_weight=face_weight[faces], surfaces=self.surfaces,
            names=[f"case {c.name!r}" for c in self.cases], record_surface_row=outer_row)
        self.integrator = Integrator(self.geometry, settings, assembly)
        self.tables = self.integrator.tables

    def run(self, stepper=None, progress: Callable[[float], None] | None = None) -> list[CaseHistory]:
        """Integrate every case until its hottest node is below its end temperature.

        stepper: None (pure conduction) or an object with fractions() -> {phase: array per node}
        and advance(t_old, t_new, dt) -> (latent heat released [J/kg], largest fraction change)
        per node. progress: called with the fraction done (0..1) after each step.
        """
        out = self.integrator.run(stepper, progress)
        sf = self.surfaces
        n_cases = len(self.cases)
        outer = sf.tag == "outer"
        heat_outer = np.bincount(sf.member[outer], out.heat_by_row[outer], minlength=n_cases)
        heat_inner = np.bincount(sf.member[~outer], out.heat_by_row[~outer], minlength=n_cases)
        return [
            CaseHistory(
                name=c.name, section=c.section, radius_m=self.radius[i], cell_width_m=self.node_widths[i],
                volume_weight=self.node_weights[i], time_s=out.time_s[i], temperature_c=out.temperature_c[i],
                surface_c=out.surface_c[i], heat_out_j=float(out.heat_out_j[i]),
                latent_j=float(out.latent_j[i]), steps=int(out.steps[i]),
                extra={"heat_out_outer_j": float(heat_outer[i]), "heat_out_inner_j": float(heat_inner[i])},
            )
            for i, c in enumerate(self.cases)
        ]
