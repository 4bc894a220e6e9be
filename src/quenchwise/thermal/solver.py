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

Surface conditions. At a quenched surface the film coefficient h(T_surface) acts in series with
the conductance of the half cell between the surface and the cell centre, 2k/dx; the surface
temperature is estimated from that series pair (one fixed-point pass for h). The resulting
coefficient g multiplies (T_cell - T_bath) as an implicit sink. All surfaces of a batch are
evaluated at once (the quenchant tables are padded into one array), with no Python loop over cases.

Nonlinear coefficients (conductivity, h, specific heat) are not iterated: each step evaluates them
at the temperatures extrapolated to the end of the step, T_n + w (T_n - T_(n-1)), which keeps the
scheme second order (merely lagging them by one step left the centre history of a 60 mm bar in
oil 1.6 % of the span off the converged answer; now about 0.5 %, mostly from the kinetics).
The specific heat used is the secant of the mixture's enthalpy from T_n to the extrapolated
temperature.

Step control, per case: the next step is the last one scaled by 0.9 times the smallest of
max_temperature_step_k / (largest temperature change), max_fraction_step / (largest fraction
change) and max_relative_step / (largest change relative to the node's distance from the bath),
clipped to [0.3, max_step_growth]. The relative limit keeps the slow approach to the bath accurate.

Time discretization: variable-step BDF2 (second order, A-stable), started with one implicit Euler
step. With step ratio w = dt_n / dt_(n-1), a0 = (1 + 2w) / (1 + w), b = w^2 / (1 + w) and
C = rho w_r (w_r the radius weight), each node solves

    C [a0 cp (T - T_n) - b e_(n-1)] = dt_n (conduction + surface terms at T),

where e_(n-1) [J/kg] is the sensible enthalpy the node gained by conduction in the previous step.
FiPy carries this as one transient coefficient acting on T - T_old with the implicit surface sink
folded in (one term fewer to build per step).

Energy is conserved exactly, step by step:

* the conduction increment is converted to temperature through the exact enthalpy of the phase
  mixture, h(T_new) = h(T_n) + cp (T - T_n), instead of taking T itself (cp is only an estimate
  of the secant over the step; without this, its error would create or destroy sensible heat
  wherever cp varies with temperature);
* the history term is the previous step's conduction enthalpy only, not the temperature change
  including the latent jump (otherwise BDF2 would extrapolate each latent release into the next
  step and create heat: about 6 % of the heat removed in a 60 mm oil-quenched bar);
* latent heat L [J/kg] from the stepper is put back by temperature recovery through the enthalpy of
  the new phase mixture, h(T_(n+1)) = h(T) + L, which conserves energy exactly;
* the heat through each surface is integrated by the same BDF2 rule, q_n = (dt_n S + b q_(n-1)) / a0
  with S = g (T_cell - T_bath) at the new time; summed over the nodes of a section the discrete
  equations give exactly that the sensible enthalpy lost by conduction equals the sum of q.
  (Summing dt_n S instead, as implicit Euler would, is inconsistent with BDF2 whenever the step
  changes and is only first order.)

Hence heat_out_j = drop of sensible enthalpy (the integral of cp dT along each node's path) +
latent_j to round-off; tests/validation/test_conduction_analytic.py checks it independently.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import fipy as fp
import numpy as np
from fipy.solvers.scipy import LinearLUSolver
from scipy.linalg import solve_banded

from .geometry import Section
from .properties import DENSITY_KG_M3, ConstantOverrides, PropertyTables, group_weights
from .quenchants import Quenchant
from ..errors import SolverError  # noqa: F401  (re-exported: callers catch it from here too)
from .settings import MAX_CELL_RATIO, SolverSettings, mesh_growth  # noqa: F401
from .stepping import close_step, step_factor
from .surfaces import Surfaces


#: Numerical guards checked at every step (see BatchSolver._guard).
GUARD_TOLERANCE_K = 2.0
FRACTION_TOLERANCE = 1e-9


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


@dataclass
class CaseHistory:
    """Cooling history of one section: times, node temperatures and surface energy.

    Energies are per unit angle (radian) of a cylinder or sphere and per metre of length of a
    cylinder, per square metre of a plate: multiply by the section's measure for totals.
    extra: "heat_out_outer_j", "heat_out_inner_j" (the two surfaces separately).
    """

    name: str
    section: Section
    radius_m: np.ndarray            # cell centres, from the inner end
    cell_width_m: np.ndarray
    volume_weight: np.ndarray       # cell volume per unit angle / cell width
    time_s: np.ndarray
    temperature_c: np.ndarray       # (n_t, n_x)
    surface_c: np.ndarray           # (n_t,) outer surface temperature estimate
    heat_out_j: float = 0.0         # energy through the surfaces (measure: see class docstring)
    latent_j: float = 0.0           # latent heat released, same measure
    steps: int = 0
    extra: dict = field(default_factory=dict)


class _TridiagonalSolver(LinearLUSolver):
    """FiPy's direct solver specialized to the matrices of a 1-D mesh, which are tridiagonal:
    the three diagonals of the matrix FiPy assembled go to LAPACK's banded LU (scipy.linalg.
    solve_banded) instead of a general sparse LU with fill-reducing ordering. One exact solve; the
    residual is checked and, should the matrix ever not be tridiagonal, FiPy's general LU solve
    takes over. Rows of different sections never mix, so each section's answer is the same
    whatever else is in the batch."""

    def _solve_(self, L, x, b):
        n = L.shape[0]
        if n < 3:
            return super()._solve_(L, x, b)
        ab = np.zeros((3, n))
        ab[0, 1:] = L.diagonal(1)
        ab[1] = L.diagonal()
        ab[2, :-1] = L.diagonal(-1)
        solution = solve_banded((1, 1), ab, b, overwrite_ab=True, check_finite=False)
        residual = np.abs(L @ solution - b)
        scale = np.abs(ab[1] * solution) + np.abs(b) + 1e-300
        if not np.all(residual <= 1e-9 * scale):
            return super()._solve_(L, x, b)
        x[:] = solution
        self._setConvergence(suite="scipy", code=0, iterations=1, residual=float(np.max(residual)))
        return x


class BatchSolver:
    """Solve many independent sections in one FiPy system (see the module docstring for the
    method and a Python example)."""

    def __init__(self, cases: list[ThermalCase], settings: SolverSettings = SolverSettings()):
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
        self.outer_nodes = self.starts + self.counts - 1
        self.inner_nodes = self.starts
        entries = []
        for i, (case, fw) in enumerate(zip(self.cases, face_w)):
            if case.outer is not None:
                entries.append((i, self.outer_nodes[i], fw[-1], case.outer, True))
            if case.inner is not None:
                entries.append((i, self.inner_nodes[i], fw[0], case.inner, False))
        self.surfaces = Surfaces(entries)
        # Per case: the row of its outer surface (for the recorded surface temperature), or -1.
        self.outer_row = np.full(len(cases), -1)
        self.outer_row[self.surfaces.case[self.surfaces.outer]] = np.flatnonzero(self.surfaces.outer)
        self.node_weights = weights
        self.node_widths = widths

        def per_node(attr, default):
            vals = [getattr(c, attr) for c in self.cases]
            return np.repeat(np.array([default if v is None else v for v in vals], dtype=float), self.counts)

        self.density = per_node("density_kg_m3", DENSITY_KG_M3)
        self.overrides = ConstantOverrides(per_node("conductivity_w_mk", np.nan), per_node("specific_heat_j_kgk", np.nan))
        self.initial = per_node("initial_c", np.nan)
        self.end_c = np.array([c.end_c for c in self.cases], dtype=float)
        self.mass = self.density * self.weight * self.dx          # kg per unit measure, per node
        # Lowest bath temperature of each case's surfaces, per node (relative step limit).
        bath = np.full(len(cases), np.inf)
        np.minimum.at(bath, self.surfaces.case, self.surfaces.bath)
        self.bath_of_node = bath[self.case_of_node]
        self.tables = PropertyTables()

        self.mesh = fp.Grid1D(dx=self.dx)
        self.T = fp.CellVariable(mesh=self.mesh, value=self.initial.copy(), hasOld=True)
        self.transient = fp.CellVariable(mesh=self.mesh, value=1.0)
        self.conductance = fp.FaceVariable(mesh=self.mesh, value=0.0)
        # The implicit surface sink G (T - T_bath) is folded into the transient term:
        # A (T - T_old) + G (T - T_bath) = (A + G) (T - (A T_old + G T_bath) / (A + G)).
        self.equation = fp.TransientTerm(coeff=self.transient) == fp.DiffusionTerm(coeff=self.conductance)
        # A direct solve every step (a section's answer must not depend on the batch's residual
        # norms); "initial" with a tiny tolerance applies to the general LU fallback.
        self.linear_solver = _TridiagonalSolver(tolerance=1e-12, criterion="initial")
        # Distance between neighbouring cell centres at each inner face.
        j = self.inner_faces
        self.centre_distance = 0.5 * (self.dx[j - 1] + self.dx[j])

    # -- pieces of one step -------------------------------------------------------------------
    def _surface(self, temperature, k, rows):
        """Effective coefficient times area (surface film in series with the half cell) and
        surface temperature estimate, for the listed surface rows."""
        sf = self.surfaces
        node, bath = sf.node[rows], sf.bath[rows]
        g = k[node] / (0.5 * self.dx[node])
        t_cell = temperature[node]
        h = sf.htc(t_cell, rows)
        t_surf = (g * t_cell + h * bath) / (g + h)
        h = sf.htc(t_surf, rows)                     # one fixed-point pass on the surface temperature
        h_eff = 1.0 / (1.0 / np.maximum(h, 1e-12) + 1.0 / g)
        t_surf = (g * t_cell + h * bath) / (g + h)
        return sf.area[rows] * h_eff, t_surf

    def _guard(self, temperature, active_node, fractions, time_s) -> None:
        """Stop with a SolverError naming the case and the time when the state stops being physical:
        a temperature outside [coldest bath, start temperature] by more than GUARD_TOLERANCE_K, or
        phase fractions outside [0, 1] or not summing to 1 within FRACTION_TOLERANCE."""
        outside = active_node & ((temperature < self.bath_of_node - GUARD_TOLERANCE_K)
                                 | (temperature > self.initial + GUARD_TOLERANCE_K))
        if outside.any():
            j = int(np.flatnonzero(outside)[0])
            i = int(self.case_of_node[j])
            raise SolverError(f"case {self.cases[i].name!r}: temperature {temperature[j]:.1f} C left the range from the "
                              f"bath ({self.bath_of_node[j]:g} C) to the start ({self.initial[j]:g} C) at t = {time_s[i]:.4g} s")
        if fractions is None:
            return
        values = np.array([np.asarray(v, dtype=float) for v in fractions.values()])
        total = values.sum(axis=0)
        broken = active_node & ((values.min(axis=0) < -FRACTION_TOLERANCE) | (values.max(axis=0) > 1 + FRACTION_TOLERANCE)
                                | (np.abs(total - 1.0) > FRACTION_TOLERANCE))
        if broken.any():
            j = int(np.flatnonzero(broken)[0])
            i = int(self.case_of_node[j])
            raise SolverError(f"case {self.cases[i].name!r}: phase fractions at node {j - self.starts[i]} sum to "
                              f"{total[j]:.12g} (must be 1 within {FRACTION_TOLERANCE:g}) at t = {time_s[i]:.4g} s")

    def run(self, stepper=None, progress: Callable[[float], None] | None = None) -> list[CaseHistory]:
        """Integrate every case until its hottest node is below its end temperature.

        stepper: None (pure conduction) or an object with fractions() -> {phase: array per node}
        and advance(t_old, t_new, dt) -> (latent heat released [J/kg], largest fraction change)
        per node. progress: called with the fraction done (0..1) after each step.
        """
        s = self.settings
        n_cases = len(self.cases)
        sf = self.surfaces
        temperature = self.initial.copy()
        fractions = stepper.fractions() if stepper is not None else {"austenite": np.ones(self.n_nodes)}
        mixture = self.tables.mixture(group_weights(fractions, self.n_nodes))
        dt_case = np.full(n_cases, s.first_step_s)
        t_case = np.zeros(n_cases)
        active = np.ones(n_cases, dtype=bool)
        steps = np.zeros(n_cases, dtype=int)
        k, cp, enthalpy = self.overrides.properties(temperature, mixture)
        # At t = 0 the outer surface is at the initial temperature: the half-cell estimate used
        # afterwards assumes a flux already established through the surface half cell.
        has_outer = self.outer_row >= 0
        surface_now = np.where(has_outer, temperature[self.outer_nodes], math.nan)
        times = [[0.0] for _ in range(n_cases)]
        temps = [[temperature[a:a + c].copy()] for a, c in zip(self.starts, self.counts)]
        surf = [[surface_now[i]] for i in range(n_cases)]
        latent_total = np.zeros(n_cases)
        heat_surface = np.zeros(sf.rows.size)        # integrated heat through each surface
        q_prev = np.zeros(sf.rows.size)              # that surface's heat in the previous step
        start_span = np.maximum(self.initial[self.starts] - self.end_c, 1e-9)
        e_prev = np.zeros(self.n_nodes)              # conduction enthalpy gained last step [J/kg]
        dt_prev = np.zeros(n_cases)                  # 0: no previous step yet -> implicit Euler
        last_change = np.zeros(self.n_nodes)         # T(n) - T(n-1), for the extrapolated coefficients
        j = self.inner_faces

        while active.any():
            active_node = active[self.case_of_node]
            dt_node = np.where(active_node, dt_case[self.case_of_node], 0.0)
            w_case = np.where(dt_prev > 0, dt_case / np.where(dt_prev > 0, dt_prev, 1.0), 0.0)
            a0_case = (1.0 + 2.0 * w_case) / (1.0 + w_case)
            b_case = w_case * w_case / (1.0 + w_case)
            a0, b = a0_case[self.case_of_node], b_case[self.case_of_node]
            # Coefficients at the temperatures extrapolated to the end of the step (second order,
            # as BDF2 itself): conductivity and h there, cp as the secant of the enthalpy from
            # T(n) to there. Any cp > 0 keeps the energy exact (see above); the secant makes the
            # solved temperature agree with the enthalpy-converted one to second order.
            extrapolated = temperature + w_case[self.case_of_node] * last_change
            k, cp_end, h_end = self.overrides.properties(extrapolated, mixture)
            rise = extrapolated - temperature
            moved = np.abs(rise) > 1e-6
            cp = np.where(moved, (h_end - enthalpy) / np.where(moved, rise, 1.0), cp)
            rho_w = self.density * self.weight
            coeff = np.where(active_node, a0 * rho_w * cp / np.where(active_node, dt_node, 1.0), rho_w * cp)
            old_eff = np.where(active_node, temperature + b * e_prev / (a0 * cp), temperature)
            # Surface sinks of the active cases.
            rows = sf.rows[active[sf.case]]
            g, _ = self._surface(extrapolated, k, rows)
            nodes = sf.node[rows]
            sink = np.bincount(nodes, g, minlength=self.n_nodes) / self.dx
            sink_bath = np.bincount(nodes, g * sf.bath[rows], minlength=self.n_nodes) / self.dx
            total = coeff + sink
            self.transient.setValue(total)
            self.T.setValue((coeff * old_eff + sink_bath) / total)
            self.T.updateOld()
            face = self.face_weight[j] * self.centre_distance / (
                0.5 * self.dx[j - 1] / k[j - 1] + 0.5 * self.dx[j] / k[j])
            values = np.zeros(self.n_nodes + 1)
            values[j] = np.where(active[self.face_case], face, 0.0)
            self.conductance.setValue(values)
            self.equation.solve(var=self.T, dt=1.0, solver=self.linear_solver)
            solved = np.array(self.T.value, dtype=float)
            solved = np.where(active_node, solved, temperature)

            # Heat through each surface, BDF2-integrated (see the module docstring).
            case_of_row = sf.case[rows]
            flux = g * (solved[nodes] - sf.bath[rows])
            q = (dt_case[case_of_row] * flux + b_case[case_of_row] * q_prev[rows]) / a0_case[case_of_row]
            q_prev[rows] = q
            heat_surface[rows] += q

            # Conduction enthalpy -> temperature through the exact enthalpy of the mixture.
            e_now = np.where(active_node, cp * (solved - temperature), 0.0)
            new = np.where(active_node, self.overrides.temperature_for(enthalpy + e_now, mixture, solved), temperature)
            change = np.zeros(self.n_nodes)
            if stepper is not None:
                latent, change = stepper.advance(temperature, new, dt_node)
                latent = np.where(active_node, latent, 0.0)
                change = np.where(active_node, change, 0.0)
                latent_total += np.bincount(self.case_of_node, latent * self.mass, minlength=n_cases)
                fractions = stepper.fractions()
                self.tables.mixture(group_weights(fractions, self.n_nodes), out=mixture)
                if np.any(latent != 0.0):     # temperature recovery at the new phase mixture
                    _, cp_new, h_new = self.overrides.properties(new, mixture)
                    guess = new + latent / cp_new
                    new = np.where(latent != 0.0, self.overrides.temperature_for(h_new + latent, mixture, guess), new)
            if not np.all(np.isfinite(new)):
                bad = int(self.case_of_node[np.flatnonzero(~np.isfinite(new))[0]])
                raise SolverError(f"case {self.cases[bad].name!r}: temperature not finite at t = {t_case[bad]:.3g} s")
            self._guard(new, active_node, fractions if stepper is not None else None, t_case + dt_case)
            d_temp = np.abs(new - temperature)
            previous_t = temperature
            last_change = np.where(active_node, new - temperature, last_change)
            e_prev = np.where(active_node, e_now, e_prev)
            dt_prev = np.where(active, dt_case, dt_prev)
            temperature = new
            k, cp, enthalpy = self.overrides.properties(temperature, mixture)
            t_case = np.where(active, t_case + dt_case, t_case)
            steps += active
            hottest = np.maximum.reduceat(temperature, self.starts)
            record = active & has_outer
            surface_now[record] = self._surface(temperature, k, self.outer_row[record])[1]
            for i in np.flatnonzero(active):
                a, c = self.starts[i], self.counts[i]
                times[i].append(t_case[i])
                temps[i].append(temperature[a:a + c].copy())
                surf[i].append(surface_now[i])
            # Next step of each case from its own largest changes.
            d_t_case = np.maximum.reduceat(d_temp, self.starts)
            d_f_case = np.maximum.reduceat(change, self.starts)
            d_r_case = np.maximum.reduceat(d_temp / np.maximum(np.abs(previous_t - self.bath_of_node), 1.0), self.starts)
            dt_case = np.where(active, dt_case * step_factor(s, d_t_case, d_f_case, d_r_case), dt_case)
            active = close_step(
                active, hottest, self.end_c, steps, t_case, s, self.initial[self.starts], start_span, progress,
                lambda i: (f"case {self.cases[i].name!r}: not below end_c = {self.end_c[i]:g} C after {steps[i]} steps, "
                           f"t = {t_case[i]:.4g} s (hottest node {hottest[i]:.1f} C); check the quench and end_c"))

        heat_outer = np.bincount(sf.case[sf.outer], heat_surface[sf.outer], minlength=n_cases)
        heat_inner = np.bincount(sf.case[~sf.outer], heat_surface[~sf.outer], minlength=n_cases)
        return [
            CaseHistory(
                name=c.name, section=c.section, radius_m=self.radius[i], cell_width_m=self.node_widths[i],
                volume_weight=self.node_weights[i], time_s=np.array(times[i]), temperature_c=np.array(temps[i]),
                surface_c=np.array(surf[i]), heat_out_j=float(heat_outer[i] + heat_inner[i]),
                latent_j=float(latent_total[i]), steps=int(steps[i]),
                extra={"heat_out_outer_j": float(heat_outer[i]), "heat_out_inner_j": float(heat_inner[i])},
            )
            for i, c in enumerate(self.cases)
        ]
