"""The one time integrator of every thermal solve: enthalpy BDF2 with step control and guard.

A solver (thermal/solver.py for sections, thermal/endquench.py for the end-quench specimen, a
finite part in (r, z)) only describes its space: a ``Geometry`` (the FiPy mesh of a batch of
independent bodies, its conducting faces, its cooled faces, capacities and start temperatures).
``Integrator(geometry, settings).run(stepper)`` owns the time loop.

Time discretization: variable-step BDF2 (second order, A-stable), started with one implicit Euler
step. With step ratio w = dt_n / dt_(n-1), a0 = (1 + 2w) / (1 + w), b = w^2 / (1 + w) and the
capacity C = rho c_w (c_w the geometry's capacity weight), each cell solves

    C [a0 cp (T - T_n) - b e_(n-1)] = dt_n (conduction + surface terms at T),

where e_(n-1) [J/kg] is the sensible enthalpy the cell gained by conduction in the previous step.
Conductivity, h and cp are not iterated: they are evaluated at the temperatures extrapolated to
the end of the step, T_n + w (T_n - T_(n-1)), which keeps the scheme second order; cp is the secant
of the phase mixture's enthalpy from T_n to there.

Energy is conserved exactly, step by step: the conduction increment is turned into temperature
through the exact enthalpy of the mixture, h(T_new) = h(T_n) + cp (T - T_n); the history term is the
previous step's conduction enthalpy only (extrapolating latent jumps would create heat); the latent
heat L [J/kg] the stepper returns is put back by temperature recovery through the enthalpy of the
new mixture, h(T_(n+1)) = h(T) + L; the heat through each surface is integrated by the same BDF2
rule, q_n = (dt_n S + b q_(n-1)) / a0 with S = g (T_cell - T_bath) at the new time. Summed over a
body, the heat out equals the drop of sensible enthalpy plus the latent heat to round-off.

Surfaces: h(T_surface) in series with the conductance of the half cell, k/d (d the distance from the
cell centre to the face); the surface temperature is estimated from that pair with one fixed-point
pass for h; the effective coefficient g = A h_eff multiplies (T_cell - T_bath) as an implicit sink.

Step control, per body: the next step is the last one scaled by 0.9 times the smallest of
max_temperature_step_k / (largest temperature change), max_fraction_step / (largest fraction change)
and max_relative_step / (largest change relative to the cell's distance from the bath), clipped to
[0.3, max_step_growth]. Before each step it is shortened further (down to 1/100) so that no surface's
h rises by more than max_film_step (ln ratio; 0: off) between its surface temperature now and the one
extrapolated to the step's end: a vapour blanket's break is resolved as the surface comes to it,
not seen once it is over. The guard stops the solve with a SolverError naming the body and the time
when a temperature leaves [coldest bath - GUARD_TOLERANCE_K, start + GUARD_TOLERANCE_K] or the phase
fractions leave [0, 1] or stop summing to 1 within FRACTION_TOLERANCE.

Linear algebra. The matrix of one step is C V a0 cp / dt + G V on the diagonal (V the FiPy cell
volume, G the surface sinks) minus the diffusion operator with face coefficients c_f. FiPy's
discretization of that operator is linear in c_f: entry (a, b) is c_f A_f / d_f. With
assembly = "banded" (the default) FiPy assembles the operator once, with unit face coefficients,
and each step only rescales those entries by c_f and solves the symmetric positive-definite banded
system (LAPACK's banded Cholesky through scipy.linalg.solveh_banded; the bandwidth is the largest
cell-index distance of a face, 1 on a 1-D mesh, nr on an (r, z) grid numbered r fastest). With
assembly = "fipy", FiPy rebuilds and solves its equation every step (the reference; tests check
the two agree to round-off). Re-assembling FiPy's term objects each step cost about 8 ms a step and
was most of the run time of a single part.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Sequence

import fipy as fp
import numpy as np
from fipy.solvers.scipy import LinearLUSolver

from ..errors import SolverError
from .banded import BandedDiffusion, unit_face_conductances
from .properties import ConstantOverrides, PropertyTables, group_weights
from .stepping import close_step, film_step_factor, step_factor
from .surfaces import Surfaces

#: Numerical guards checked at every step.
GUARD_TOLERANCE_K = 2.0
FRACTION_TOLERANCE = 1e-9
#: Temperature step [K] of the one-sided difference for the slope of the surface heat flow.
SURFACE_SLOPE_STEP_K = 1.0
ASSEMBLIES = ("banded", "fipy")


@dataclass
class Geometry:
    """A batch of independent bodies ("members") on one FiPy mesh (see thermal/integrator.py).

    A member's cells are contiguous: member i owns cells member_starts[i] .. + member_counts[i].
    capacity multiplies rho cp (FiPy cell volume) in the transient term (1-D sections: the radius
    weight V/dx of a Cartesian 1-D mesh; FiPy cylindrical grids: 1). face_weight multiplies the
    harmonic-mean conductivity on a face in the same way (1-D: r^m; FiPy grids: 1). Surface areas
    are in the mesh's own measure (consistent with mesh.cellVolumes). Non-solid cells (solid False,
    e.g. outside a stepped profile) are frozen and must have no faces and no surfaces.
    """

    mesh: object
    member_starts: np.ndarray
    member_counts: np.ndarray
    capacity: np.ndarray
    density_kg_m3: np.ndarray
    initial_c: np.ndarray
    end_c: np.ndarray
    overrides: ConstantOverrides
    face_cells: np.ndarray
    face_ids: np.ndarray
    face_half_m: np.ndarray
    face_weight: np.ndarray
    surfaces: Surfaces
    names: Sequence[str]
    solid: np.ndarray | None = None
    record_surface_row: np.ndarray | None = None

    @property
    def n_cells(self) -> int:
        return int(np.sum(self.member_counts))

    @property
    def member_of_cell(self) -> np.ndarray:
        return np.repeat(np.arange(len(self.member_counts)), self.member_counts)


@dataclass(kw_only=True)
class CoolingHistory:
    """Cooling history of one body: times, cell temperatures (n_t, cells) and the energies through
    its surfaces and released as latent heat, in the mesh's measure. The solvers extend it with
    their geometry (solver.CaseHistory, endquench.EndQuenchHistory)."""

    name: str
    time_s: np.ndarray
    temperature_c: np.ndarray
    heat_out_j: float = 0.0
    latent_j: float = 0.0
    steps: int = 0
    extra: dict = field(default_factory=dict)


@dataclass
class Integration:
    """What the integrator returns, per member (energies in the mesh's measure)."""

    time_s: list
    temperature_c: list             # (n_t, member cells) per member
    surface_c: list                 # (n_t,) per member, NaN where no surface is recorded
    heat_out_j: np.ndarray
    heat_by_row: np.ndarray         # per surface row
    latent_j: np.ndarray
    steps: np.ndarray
    extra: dict = field(default_factory=dict)


class Integrator:
    """Integrate a Geometry's bodies from their start temperatures until each is below its end
    temperature (module docstring: method, energy balance, step control, guard, assembly)."""

    def __init__(self, geometry: Geometry, settings, assembly: str = "banded"):
        if assembly not in ASSEMBLIES:
            raise ValueError(f"assembly {assembly!r}: allowed {', '.join(ASSEMBLIES)}")
        g = geometry
        self.geometry, self.settings, self.assembly = g, settings, assembly
        self.n = g.n_cells
        self.member = g.member_of_cell
        self.starts = np.asarray(g.member_starts, dtype=int)
        self.solid = np.ones(self.n, dtype=bool) if g.solid is None else np.asarray(g.solid, dtype=bool)
        self.face_a, self.face_b = g.face_cells[:, 0], g.face_cells[:, 1]
        self.face_member = self.member[self.face_a]
        self.volume = np.asarray(g.mesh.cellVolumes, dtype=float)
        self.mass = g.density_kg_m3 * g.capacity * self.volume     # kg per cell (mesh measure)
        sf = g.surfaces
        n_members = len(g.member_counts)
        bath = np.full(n_members, np.inf)
        np.minimum.at(bath, sf.member, sf.bath)
        if not np.all(np.isfinite(bath)):
            i = int(np.flatnonzero(~np.isfinite(bath))[0])
            raise ValueError(f"{g.names[i]}: no cooled surface, it would never cool")
        self.bath_of_cell = bath[self.member]
        self.tables = PropertyTables()
        if assembly == "banded":
            self.banded = BandedDiffusion(self.n, g.face_cells, unit_face_conductances(g.mesh, g.face_ids, g.face_cells))
        else:
            self.T = fp.CellVariable(mesh=g.mesh, value=np.array(g.initial_c, dtype=float), hasOld=True)
            self.transient = fp.CellVariable(mesh=g.mesh, value=1.0)
            self.conductance = fp.FaceVariable(mesh=g.mesh, value=0.0)
            self.equation = fp.TransientTerm(coeff=self.transient) == fp.DiffusionTerm(coeff=self.conductance)
            # A direct solve every step (a body's answer must not depend on the batch's residual norms).
            self.linear_solver = LinearLUSolver(tolerance=1e-12, criterion="initial")

    # -- pieces of one step -------------------------------------------------------------------
    def surface_coefficients(self, temperature, k, rows):
        """Effective coefficient times area (the film in series with the half cell) and the surface
        temperature estimate of the listed surface rows."""
        cell = self.geometry.surfaces.cell[rows]
        return self._film(temperature[cell], k[cell], rows)

    def _film(self, t_cell, k_cell, rows):
        sf = self.geometry.surfaces
        bath = sf.bath[rows]
        g = k_cell / sf.half_m[rows]
        h = sf.htc(t_cell, rows)
        t_surf = (g * t_cell + h * bath) / (g + h)
        h = sf.htc(t_surf, rows)                     # one fixed-point pass on the surface temperature
        h_eff = 1.0 / (1.0 / np.maximum(h, 1e-12) + 1.0 / g)
        t_surf = (g * t_cell + h * bath) / (g + h)
        return sf.area[rows] * h_eff, t_surf

    def surface_sinks(self, temperature, k, rows):
        """The surface heat flow of the listed rows linearized about `temperature` (the temperatures
        extrapolated to the end of the step), as G (T_cell - T_ref): q(T) ~ q* + D (T - T*) with
        D = max(dq/dT, q*/(T* - T_bath)) >= the secant g_eff. Where h rises steeply with the surface
        temperature (the nucleate-boiling flank of a boiling curve) the rise of the flux is then
        implicit; taking h at T* alone left it explicit, and the end-quench face oscillated by
        about 10 K a step on the jet's flank, holding the step down. For a constant h, G = g_eff and
        T_ref = T_bath exactly. T_ref lies between T_bath and T*, so the implicit sink never
        drives a cell past the bath."""
        sf = self.geometry.surfaces
        cell = sf.cell[rows]
        t_cell, k_cell, n = temperature[cell], k[cell], rows.size
        # Both temperatures in one evaluation (the table lookups cost per call, not per row).
        g_both, _ = self._film(np.concatenate([t_cell, t_cell + SURFACE_SLOPE_STEP_K]),
                               np.concatenate([k_cell, k_cell]), np.concatenate([rows, rows]))
        g_eff, g_up = g_both[:n], g_both[n:]
        bath = sf.bath[rows]
        q_now = g_eff * (t_cell - bath)
        slope = (g_up * (t_cell + SURFACE_SLOPE_STEP_K - bath) - q_now) / SURFACE_SLOPE_STEP_K
        sink = np.maximum(slope, g_eff)
        return sink, t_cell - q_now / sink

    def face_conductances(self, k, active):
        """Harmonic-mean conductivity of each face times its weight; 0 on faces of frozen bodies."""
        g = self.geometry
        da, db = g.face_half_m[:, 0], g.face_half_m[:, 1]
        c = g.face_weight * (da + db) / (da / k[self.face_a] + db / k[self.face_b])
        return np.where(active[self.face_member], c, 0.0)

    def _solve(self, coeff, old_eff, sink_g, sink_gb, conductance, temperature):
        """Solve coeff V (T - old_eff) + G (T - T_bath) = div(c grad T) for T."""
        if self.assembly == "banded":
            diagonal = coeff * self.volume + sink_g
            return self.banded.solve(diagonal, conductance, coeff * self.volume * old_eff + sink_gb)
        # The implicit sink G (T - T_bath) is folded into the transient term:
        # A (T - T_old) + G (T - T_bath) = (A + G) (T - (A T_old + G T_bath) / (A + G)).
        total = coeff + sink_g / self.volume
        self.transient.setValue(total)
        self.T.setValue((coeff * old_eff + sink_gb / self.volume) / total)
        self.T.updateOld()
        values = np.zeros(self.geometry.mesh.numberOfFaces)
        values[self.geometry.face_ids] = conductance
        self.conductance.setValue(values)
        self.equation.solve(var=self.T, dt=1.0, solver=self.linear_solver)
        return np.array(self.T.value, dtype=float)

    def _film_step_limit(self, temperature, k, last_change, dt_m, dt_prev, rows):
        """Factor (<= 1) on each body's coming step from the rise of its surfaces' h over it
        (stepping.film_step_factor), predicted from the temperatures extrapolated to the step's end
        as the step itself does: the step control after a step would see a blanket's break only
        once it is over (two 12 K steps through a ten-fold rise of h). Ones where the limit is off."""
        limit = getattr(self.settings, "max_film_step", 0.0)
        if not limit:
            return np.ones(dt_m.size)
        sf = self.geometry.surfaces
        cell, body = sf.cell[rows], sf.member[rows]
        t_cell, k_cell, both_rows = temperature[cell], np.concatenate([k[cell], k[cell]]), np.concatenate([rows, rows])
        ratio = np.where(dt_prev > 0, dt_m / np.where(dt_prev > 0, dt_prev, 1.0), 0.0)

        def rise(factor):
            t_end = t_cell + (ratio * factor)[body] * last_change[cell]
            # h at the surface temperature estimates (film in series with the half cell), as used.
            h = np.maximum(sf.htc(self._film(np.concatenate([t_cell, t_end]), k_cell, both_rows)[1], both_rows), 1e-30)
            per_body = np.zeros(dt_m.size)
            np.maximum.at(per_body, body, np.log(h[rows.size:] / h[:rows.size]))
            return per_body

        return film_step_factor(limit, rise, dt_m.size)

    def _guard(self, temperature, active_cell, fractions, time_s) -> None:
        """SolverError naming the body and the time when the state stops being physical."""
        g = self.geometry
        outside = active_cell & ((temperature < self.bath_of_cell - GUARD_TOLERANCE_K)
                                 | (temperature > g.initial_c + GUARD_TOLERANCE_K))
        if not np.all(np.isfinite(temperature[active_cell])):
            j = int(np.flatnonzero(active_cell & ~np.isfinite(temperature))[0])
            i = int(self.member[j])
            raise SolverError(f"{g.names[i]}: temperature not finite at t = {time_s[i]:.3g} s")
        if outside.any():
            j = int(np.flatnonzero(outside)[0])
            i = int(self.member[j])
            raise SolverError(f"{g.names[i]}: temperature {temperature[j]:.1f} C left the range from the bath "
                              f"({self.bath_of_cell[j]:g} C) to the start ({g.initial_c[j]:g} C) at t = {time_s[i]:.4g} s")
        if fractions is None:
            return
        values = np.array([np.asarray(v, dtype=float) for v in fractions.values()])
        total = values.sum(axis=0)
        broken = active_cell & ((values.min(axis=0) < -FRACTION_TOLERANCE) | (values.max(axis=0) > 1 + FRACTION_TOLERANCE)
                                | (np.abs(total - 1.0) > FRACTION_TOLERANCE))
        if broken.any():
            j = int(np.flatnonzero(broken)[0])
            i = int(self.member[j])
            raise SolverError(f"{g.names[i]}: phase fractions at cell {j - self.starts[i]} sum to "
                              f"{total[j]:.12g} (must be 1 within {FRACTION_TOLERANCE:g}) at t = {time_s[i]:.4g} s")

    def run(self, stepper=None, progress: Callable[[float], None] | None = None) -> Integration:
        """Integrate every body until its hottest solid cell is below its end temperature.

        stepper: None (pure conduction) or an object with fractions() -> {phase: array per cell}
        and advance(t_old, t_new, dt) -> (latent heat released [J/kg], largest fraction change)
        per cell (dt 0: frozen cell). progress: called with the fraction done (0..1) each step.

        BLAS runs on one thread during the solve: the banded systems are small, and OpenBLAS's
        threads made the (r, z) Cholesky of a 50 x 100 mm bar 15-30 times slower on a busy 2-core
        machine (12.8 ms instead of 0.4 ms per solve).
        """
        from threadpoolctl import threadpool_limits

        with threadpool_limits(limits=1, user_api="blas"):
            return self._run(stepper, progress)

    def _run(self, stepper, progress) -> Integration:
        g, s = self.geometry, self.settings
        sf = g.surfaces
        n, member, starts = self.n, self.member, self.starts
        n_members = len(starts)
        density_capacity = g.density_kg_m3 * g.capacity
        temperature = np.array(g.initial_c, dtype=float)
        fractions = stepper.fractions() if stepper is not None else {"austenite": np.ones(n)}
        mixture = self.tables.mixture(group_weights(fractions, n))
        k, cp, enthalpy = g.overrides.properties(temperature, mixture)
        dt_m = np.full(n_members, s.first_step_s)
        t_m = np.zeros(n_members)
        active = np.ones(n_members, dtype=bool)
        steps = np.zeros(n_members, dtype=int)
        record_row = (np.full(n_members, -1) if g.record_surface_row is None
                      else np.asarray(g.record_surface_row, dtype=int))
        has_record = record_row >= 0
        # At t = 0 the surface is at the start temperature: the half-cell estimate used afterwards
        # assumes a flux already established through the surface half cell.
        surface_now = np.full(n_members, np.nan)
        surface_now[has_record] = temperature[sf.cell[record_row[has_record]]]
        log_t, log_temp, log_surface, log_active = [], [], [], []
        initial_temperature, initial_surface = temperature.copy(), surface_now.copy()
        latent_total = np.zeros(n_members)
        heat_row = np.zeros(sf.rows.size)           # integrated heat through each surface row
        q_prev = np.zeros(sf.rows.size)             # that row's heat in the previous step
        solid_initial = np.where(self.solid, g.initial_c, -np.inf)
        start_hottest = np.maximum.reduceat(solid_initial, starts)
        start_span = np.maximum(start_hottest - g.end_c, 1e-9)
        e_prev = np.zeros(n)                        # conduction enthalpy gained last step [J/kg]
        dt_prev = np.zeros(n_members)               # 0: no previous step yet -> implicit Euler
        last_change = np.zeros(n)                   # T(n) - T(n-1), for the extrapolated coefficients

        while active.any():
            active_cell = active[member] & self.solid
            rows = sf.rows[active[sf.member]]
            dt_m = dt_m * self._film_step_limit(temperature, k, last_change, dt_m, dt_prev, rows)
            dt_cell = np.where(active_cell, dt_m[member], 0.0)
            w_m = np.where(dt_prev > 0, dt_m / np.where(dt_prev > 0, dt_prev, 1.0), 0.0)
            a0_m = (1.0 + 2.0 * w_m) / (1.0 + w_m)
            b_m = w_m * w_m / (1.0 + w_m)
            a0, b = a0_m[member], b_m[member]
            # Coefficients at the temperatures extrapolated to the end of the step (second order,
            # as BDF2 itself); cp as the secant of the enthalpy from T(n) to there.
            extrapolated = temperature + w_m[member] * last_change
            k, _, h_end = g.overrides.properties(extrapolated, mixture)
            rise = extrapolated - temperature
            moved = np.abs(rise) > 1e-6
            cp_step = np.where(moved, (h_end - enthalpy) / np.where(moved, rise, 1.0), cp)
            rho_c = density_capacity * cp_step
            coeff = np.where(active_cell, a0 * rho_c / np.where(active_cell, dt_cell, 1.0),
                             np.where(self.solid, rho_c, 1.0))
            old_eff = np.where(active_cell, temperature + b * e_prev / (a0 * cp_step), temperature)
            g_rows, t_ref = self.surface_sinks(extrapolated, k, rows)
            cells = sf.cell[rows]
            sink_g = np.bincount(cells, g_rows, minlength=n)
            sink_gb = np.bincount(cells, g_rows * t_ref, minlength=n)
            solved = self._solve(coeff, old_eff, sink_g, sink_gb, self.face_conductances(k, active), temperature)
            solved = np.where(active_cell, solved, temperature)

            # Heat through each surface row, BDF2-integrated (module docstring).
            m_rows = sf.member[rows]
            flux = g_rows * (solved[cells] - t_ref)
            q = (dt_m[m_rows] * flux + b_m[m_rows] * q_prev[rows]) / a0_m[m_rows]
            q_prev[rows] = q
            heat_row[rows] += q

            # Conduction enthalpy -> temperature through the exact enthalpy of the mixture.
            e_now = np.where(active_cell, cp_step * (solved - temperature), 0.0)
            new = np.where(active_cell, g.overrides.temperature_for(enthalpy + e_now, mixture, solved), temperature)
            change = np.zeros(n)
            if stepper is not None:
                latent, change = stepper.advance(temperature, new, dt_cell)
                latent = np.where(active_cell, latent, 0.0)
                change = np.where(active_cell, change, 0.0)
                latent_total += np.bincount(member, latent * self.mass, minlength=n_members)
                fractions = stepper.fractions()
                self.tables.mixture(group_weights(fractions, n), out=mixture)
                if np.any(latent != 0.0):     # temperature recovery at the new phase mixture
                    _, cp_new, h_new = g.overrides.properties(new, mixture)
                    guess = new + latent / cp_new
                    new = np.where(latent != 0.0, g.overrides.temperature_for(h_new + latent, mixture, guess), new)
            self._guard(new, active_cell, fractions if stepper is not None else None, t_m + dt_m)
            d_temp = np.abs(new - temperature)
            d_rel = d_temp / np.maximum(np.abs(temperature - self.bath_of_cell), 1.0)
            last_change = np.where(active_cell, new - temperature, last_change)
            e_prev = np.where(active_cell, e_now, e_prev)
            dt_prev = np.where(active, dt_m, dt_prev)
            temperature = new
            k, cp, enthalpy = g.overrides.properties(temperature, mixture)
            t_m = np.where(active, t_m + dt_m, t_m)
            steps += active
            hottest = np.maximum.reduceat(np.where(self.solid, temperature, -np.inf), starts)
            record = active & has_record
            if record.any():
                surface_now[record] = self.surface_coefficients(temperature, k, record_row[record])[1]
            log_t.append(t_m.copy())
            log_temp.append(temperature.copy())
            log_surface.append(surface_now.copy())
            log_active.append(active.copy())
            # Next step of each body from its own largest changes.
            d_t = np.maximum.reduceat(d_temp, starts)
            d_f = np.maximum.reduceat(change, starts)
            d_r = np.maximum.reduceat(d_rel, starts)
            dt_m = np.where(active, dt_m * step_factor(s, d_t, d_f, d_r), dt_m)
            active = close_step(
                active, hottest, g.end_c, steps, t_m, s, start_hottest, start_span, progress,
                lambda i: (f"{g.names[i]}: not below end_c = {g.end_c[i]:g} C after {steps[i]} steps, "
                           f"t = {t_m[i]:.4g} s (hottest point {hottest[i]:.1f} C); check the quench and end_c"))

        heat_out = np.bincount(sf.member, heat_row, minlength=n_members)
        stepped = np.array(log_active)
        all_t, all_temp, all_surface = np.array(log_t), np.array(log_temp), np.array(log_surface)
        times, temps, surfaces = [], [], []
        for i, (a, c) in enumerate(zip(starts, g.member_counts)):
            took = np.flatnonzero(stepped[:, i])
            times.append(np.concatenate([[0.0], all_t[took, i]]))
            temps.append(np.vstack([initial_temperature[a:a + c], all_temp[took, a:a + c]]))
            surfaces.append(np.concatenate([[initial_surface[i]], all_surface[took, i]]))
        return Integration(time_s=times, temperature_c=temps, surface_c=surfaces, heat_out_j=heat_out,
                           heat_by_row=heat_row, latent_j=latent_total, steps=steps)


def rate_through(time_s: np.ndarray, temperature_c: np.ndarray, at_c: float = 700.0) -> np.ndarray:
    """Cooling rate of each cell as it first passes at_c [K/s], over the step in which it does;
    NaN where it never does. temperature_c is (n_t, n_cells).

    >>> rate_through(np.array([0.0, 1.0, 2.0]), np.array([[800.0], [710.0], [650.0]])).tolist()
    [60.0]
    """
    t, temp = np.asarray(time_s, dtype=float), np.asarray(temperature_c, dtype=float)
    out = np.full(temp.shape[1], np.nan)
    if temp.shape[0] < 2:
        return out
    crossed = (temp[:-1] > at_c) & (temp[1:] <= at_c)          # (steps, cells)
    has = crossed.any(axis=0)
    i, j = np.argmax(crossed, axis=0)[has], np.flatnonzero(has)
    out[has] = (temp[i, j] - temp[i + 1, j]) / (t[i + 1] - t[i])
    return out
