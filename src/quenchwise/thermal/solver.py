"""FiPy heat conduction for a batch of independent sections solved as one system.

All sections of a batch are laid end to end on one 1-D FiPy mesh and cut apart by zero
conductance on the faces between them. Each carries its own radius weights (slab, cylinder,
sphere), its own surface conditions (implicit source terms on its surface cells), its own
properties and its own time step: the transient coefficient of a section is rho cp w / dt_case
and FiPy is asked for a unit step, so every section follows its own adaptive step sequence.
A section's answer therefore does not depend on what else is in the batch; a single case is a
batch of one. A section that has reached its end temperature is frozen (identity rows).

Coupling to transformations: after each conduction solve the stepper advances the phase state
from the old to the new temperatures and returns the latent heat released [J/kg]; it is put back
into the same step as a local temperature rise L / cp (the temperature-recovery method), which
conserves energy exactly. Properties and the surface coefficient are lagged by one step; the
step is limited by the largest temperature change and the largest fraction change per step.

Time discretization: variable-step BDF2 (second order, A-stable), started with one implicit
Euler step. With step ratio w = dt_n / dt_(n-1) it reads
    a0 T(n+1) - (1 + w) T(n) + w^2 / (1 + w) T(n-1) = dt_n * (conduction + surface terms at n+1),
a0 = (1 + 2w) / (1 + w); FiPy's transient term carries it as coefficient a0 rho cp w / dt_n acting
on T - T_old with T_old = ((1 + w) T(n) - w^2 / (1 + w) T(n-1)) / a0.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import fipy as fp
import numpy as np
from fipy.solvers.scipy import LinearLUSolver

from .geometry import Section
from .properties import DENSITY_KG_M3, mixed_properties
from .quenchants import Quenchant


class SolverError(RuntimeError):
    """The time integration could not finish a case (names the case and the time reached)."""


@dataclass(frozen=True)
class SolverSettings:
    """Numerics: mesh cells per section, geometric growth of cell width away from quenched
    surfaces, and the per-step limits of the adaptive time step."""

    cells: int = 40
    growth: float = 1.08
    max_temperature_step_k: float = 12.0
    max_fraction_step: float = 0.05
    first_step_s: float = 0.005
    max_step_growth: float = 1.5
    max_steps: int = 50000
    max_time_s: float = 1.0e6


@dataclass(frozen=True)
class ThermalCase:
    """One section to cool: geometry, surface conditions, start and end temperatures.

    outer / inner: quenchant on the outer surface / on the inner surface (None: symmetry or
    insulated). conductivity, density, specific_heat: constant overrides (None: tables).
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


@dataclass
class CaseHistory:
    """Cooling history of one section: times, node temperatures and surface energy."""

    name: str
    section: Section
    radius_m: np.ndarray            # cell centres, from the inner end
    cell_width_m: np.ndarray
    volume_weight: np.ndarray       # cell volume per unit angle / cell width
    time_s: np.ndarray
    temperature_c: np.ndarray       # (n_t, n_x)
    surface_c: np.ndarray           # (n_t,) outer surface temperature estimate
    heat_out_j: float = 0.0         # energy through the surfaces per unit angle (and length / area)
    latent_j: float = 0.0           # latent heat released, same measure
    steps: int = 0
    extra: dict = field(default_factory=dict)


class BatchSolver:
    """Solve many independent sections in one FiPy system (see module docstring)."""

    def __init__(self, cases: list[ThermalCase], settings: SolverSettings = SolverSettings()):
        if not cases:
            raise ValueError("a batch needs at least one case")
        self.cases, self.settings = list(cases), settings
        widths, radii, weights, face_w = [], [], [], []
        for case in self.cases:
            dx, centres, w, fw = case.section.mesh(settings.cells, settings.growth)
            widths.append(dx), radii.append(centres), weights.append(w), face_w.append(fw)
        self.counts = np.array([len(d) for d in widths])
        self.starts = np.concatenate([[0], np.cumsum(self.counts)[:-1]])
        self.case_of_node = np.repeat(np.arange(len(cases)), self.counts)
        self.dx = np.concatenate(widths)
        self.radius = radii
        self.weight = np.concatenate(weights)
        n = self.dx.size
        self.n_nodes = n
        # Face j lies between nodes j-1 and j; faces between cases and the two mesh ends carry no flux.
        self.face_weight = np.zeros(n + 1)
        inner_faces = np.ones(n + 1, dtype=bool)
        inner_faces[[0, n]] = False
        inner_faces[self.starts[1:]] = False
        self.inner_faces = np.flatnonzero(inner_faces)
        for s, fw in zip(self.starts, face_w):
            self.face_weight[s + 1: s + len(fw) - 1] = fw[1:-1]
        self.face_case = self.case_of_node[self.inner_faces]
        # Surface cells: outer = last node of each case; inner = first node where quenched.
        self.outer_nodes = self.starts + self.counts - 1
        self.outer_area = np.array([fw[-1] for fw in face_w])
        self.inner_nodes = self.starts
        self.inner_area = np.array([fw[0] for fw in face_w])
        self.node_weights = weights
        self.node_widths = widths

        def per_node(attr, default):
            vals = [getattr(c, attr) for c in self.cases]
            return np.repeat(np.array([default if v is None else v for v in vals], dtype=float), self.counts)

        self.density = per_node("density_kg_m3", DENSITY_KG_M3)
        self.k_override = per_node("conductivity_w_mk", np.nan)
        self.cp_override = per_node("specific_heat_j_kgk", np.nan)
        self.initial = per_node("initial_c", np.nan)
        self.end_c = np.array([c.end_c for c in self.cases], dtype=float)

        self.mesh = fp.Grid1D(dx=self.dx)
        self.T = fp.CellVariable(mesh=self.mesh, value=self.initial.copy(), hasOld=True)
        self.transient = fp.CellVariable(mesh=self.mesh, value=1.0)
        self.conductance = fp.FaceVariable(mesh=self.mesh, value=0.0)
        self.sink = fp.CellVariable(mesh=self.mesh, value=0.0)
        self.source = fp.CellVariable(mesh=self.mesh, value=0.0)
        self.equation = (fp.TransientTerm(coeff=self.transient)
                         == fp.DiffusionTerm(coeff=self.conductance) + fp.ImplicitSourceTerm(coeff=self.sink)
                         + self.source)
        # A direct solve every step: with FiPy's default criteria the residual is scaled by the
        # whole batch, so a nearly settled section in a large batch could be skipped. "initial"
        # with a tiny tolerance forces at least one LU solve, which is exact block by block.
        self.linear_solver = LinearLUSolver(tolerance=1e-12, criterion="initial")
        # Distance between neighbouring cell centres at each inner face.
        j = self.inner_faces
        self.centre_distance = 0.5 * (self.dx[j - 1] + self.dx[j])

    # -- pieces of one step -------------------------------------------------------------------
    def _properties(self, temperature, fractions):
        k, cp = mixed_properties(temperature, fractions)
        k = np.where(np.isnan(self.k_override), k, self.k_override)
        cp = np.where(np.isnan(self.cp_override), cp, self.cp_override)
        return k, cp

    def _surface(self, quenchant: Quenchant, node: int, area: float, temperature, k):
        """Effective coefficient (surface film in series with the half cell) and surface temperature."""
        half = 0.5 * self.dx[node]
        t_cell = temperature[node]
        g = k[node] / half
        h = quenchant.htc(t_cell)
        t_surf = (g * t_cell + h * quenchant.bath_c) / (g + h)
        h = quenchant.htc(t_surf)                     # one fixed-point pass on the surface temperature
        h_eff = 1.0 / (1.0 / max(h, 1e-12) + 1.0 / g)
        t_surf = (g * t_cell + h * quenchant.bath_c) / (g + h)
        return area * h_eff, t_surf

    def run(self, stepper=None, progress: Callable[[float], None] | None = None) -> list[CaseHistory]:
        """Integrate every case until its hottest node is below its end temperature."""
        s = self.settings
        n_cases = len(self.cases)
        temperature = self.initial.copy()
        fractions = stepper.fractions() if stepper is not None else {"austenite": np.ones(self.n_nodes)}
        dt_case = np.full(n_cases, s.first_step_s)
        t_case = np.zeros(n_cases)
        active = np.ones(n_cases, dtype=bool)
        steps = np.zeros(n_cases, dtype=int)
        times = [[0.0] for _ in range(n_cases)]
        temps = [[temperature[a:a + c].copy()] for a, c in zip(self.starts, self.counts)]
        heat_out = np.zeros(n_cases)
        latent_total = np.zeros(n_cases)
        k, cp = self._properties(temperature, fractions)
        surf = [[self._surface(c.outer, o, a, temperature, k)[1]] if c.outer else [math.nan]
                for c, o, a in zip(self.cases, self.outer_nodes, self.outer_area)]
        start_span = np.maximum(self.initial[self.starts] - self.end_c, 1e-9)
        previous = temperature.copy()           # T(n-1) for BDF2
        dt_prev = np.zeros(n_cases)              # 0: no previous step yet -> implicit Euler

        while active.any():
            k, cp = self._properties(temperature, fractions)
            active_node = active[self.case_of_node]
            dt_node = np.where(active_node, dt_case[self.case_of_node], 0.0)
            rho_cp_w = self.density * cp * self.weight
            ratio = np.where(dt_prev > 0, dt_case / np.where(dt_prev > 0, dt_prev, 1.0), 0.0)[self.case_of_node]
            a0 = (1.0 + 2.0 * ratio) / (1.0 + ratio)
            old_eff = ((1.0 + ratio) * temperature - ratio * ratio / (1.0 + ratio) * previous) / a0
            self.transient.setValue(np.where(active_node, a0 * rho_cp_w / np.where(active_node, dt_node, 1.0), rho_cp_w))
            j = self.inner_faces
            face = self.face_weight[j] * self.centre_distance / (
                0.5 * self.dx[j - 1] / k[j - 1] + 0.5 * self.dx[j] / k[j])
            values = np.zeros(self.n_nodes + 1)
            values[j] = np.where(active[self.face_case], face, 0.0)
            self.conductance.setValue(values)
            sink = np.zeros(self.n_nodes)
            source = np.zeros(self.n_nodes)
            surface_terms = []
            for i in np.flatnonzero(active):
                case = self.cases[i]
                for q, node, area in ((case.outer, self.outer_nodes[i], self.outer_area[i]),
                                      (case.inner, self.inner_nodes[i], self.inner_area[i])):
                    if q is None:
                        continue
                    g, _ = self._surface(q, node, area, temperature, k)
                    sink[node] -= g / self.dx[node]
                    source[node] += g * q.bath_c / self.dx[node]
                    surface_terms.append((i, node, g, q.bath_c))
            self.sink.setValue(sink)
            self.source.setValue(source)
            self.T.setValue(np.where(active_node, old_eff, temperature))
            self.T.updateOld()
            self.equation.solve(var=self.T, dt=1.0, solver=self.linear_solver)
            new = np.array(self.T.value, dtype=float)
            for i, node, g, bath in surface_terms:
                heat_out[i] += g * (new[node] - bath) * dt_case[i]
            change = np.zeros(self.n_nodes)
            if stepper is not None:
                latent, change = stepper.advance(temperature, new, dt_node)
                latent = np.where(active_node, latent, 0.0)
                new = new + latent / cp
                latent_total += np.bincount(self.case_of_node, latent * self.density * self.weight * self.dx,
                                            minlength=n_cases)
            if not np.all(np.isfinite(new)):
                bad = int(self.case_of_node[np.flatnonzero(~np.isfinite(new))[0]])
                raise SolverError(f"case {self.cases[bad].name!r}: temperature not finite at t = {t_case[bad]:.3g} s")
            d_temp = np.abs(new - temperature)
            previous = np.where(active_node, temperature, previous)
            dt_prev = np.where(active, dt_case, dt_prev)
            temperature = new
            t_case = np.where(active, t_case + dt_case, t_case)
            steps += active
            hottest = np.maximum.reduceat(temperature, self.starts)
            for i in np.flatnonzero(active):
                a, c = self.starts[i], self.counts[i]
                times[i].append(t_case[i])
                temps[i].append(temperature[a:a + c].copy())
                case = self.cases[i]
                surf[i].append(self._surface(case.outer, self.outer_nodes[i], self.outer_area[i], temperature, k)[1]
                               if case.outer else math.nan)
            # Next step of each case from its own largest changes.
            d_t_case = np.maximum.reduceat(d_temp, self.starts)
            d_f_case = np.maximum.reduceat(change, self.starts)
            with np.errstate(divide="ignore"):
                factor = np.minimum(s.max_temperature_step_k / d_t_case, s.max_fraction_step / d_f_case)
            factor = np.clip(0.9 * factor, 0.3, s.max_step_growth)
            dt_case = np.where(active, dt_case * factor, dt_case)
            finished = active & (hottest < self.end_c)
            stuck = active & ~finished & ((steps >= s.max_steps) | (t_case >= s.max_time_s))
            if stuck.any():
                i = int(np.flatnonzero(stuck)[0])
                raise SolverError(
                    f"case {self.cases[i].name!r}: not below end_c = {self.end_c[i]:g} C after {steps[i]} steps, "
                    f"t = {t_case[i]:.4g} s (hottest node {hottest[i]:.1f} C); check the quench and end_c")
            active &= ~finished
            if progress is not None:
                done = np.clip((self.initial[self.starts] - hottest) / start_span, 0.0, 1.0)
                progress(float(np.mean(np.where(active, done, 1.0))))

        return [
            CaseHistory(
                name=c.name, section=c.section, radius_m=self.radius[i], cell_width_m=self.node_widths[i],
                volume_weight=self.node_weights[i], time_s=np.array(times[i]), temperature_c=np.array(temps[i]),
                surface_c=np.array(surf[i]), heat_out_j=float(heat_out[i] * 1.0), latent_j=float(latent_total[i]),
                steps=int(steps[i]),
            )
            for i, c in enumerate(self.cases)
        ]
