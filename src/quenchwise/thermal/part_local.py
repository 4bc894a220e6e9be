"""A minimal local driver with the shared integrator's contract (INTEGRATOR.md), for finite parts.

``LocalIntegrator(geometry, settings).run(stepper, progress) -> Integration`` does what the shared
integrator (thermal/integrator.py, written on main) is specified to do, for the fields of
part_rz.PartGeometry, so the finite-part code can be built and verified before that lands and then
switched to it (workflows/finite.py picks the shared one when it exists).

Method (the same as solver.BatchSolver and endquench.EndQuenchSolver): variable-step BDF2 on the
sensible enthalpy, started with implicit Euler; coefficients at the temperatures extrapolated to
the end of the step (cp as the secant of the mixture's enthalpy); conduction enthalpy and latent
heat turned into temperature through the exact enthalpy of the phase mixture; the heat through
each surface row integrated by the same BDF2 rule, so heat_out_j = drop of sensible enthalpy +
latent_j to round-off. Each member has its own adaptive step (temperature, fraction and relative
limits, stepping.step_factor). Assembly: FiPy's own geometry of the mesh (scaledFaceAreas /
scaledCellDistances, cellVolumes) with the harmonic-mean k on each listed face; the symmetric
banded system (bandwidth = largest cell-index distance of a face) is solved by
scipy.linalg.solveh_banded. Non-solid cells and finished members are identity rows.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.linalg import solveh_banded

from ..errors import SolverError
from .properties import PropertyTables, group_weights
from .stepping import close_step, step_factor
from .quenchants import STEFAN_BOLTZMANN

GUARD_TOLERANCE_K = 2.0
FRACTION_TOLERANCE = 1e-9


@dataclass
class Integration:
    """Per member (INTEGRATOR.md)."""

    time_s: list
    temperature_c: list
    surface_c: list
    heat_out_j: np.ndarray
    heat_by_row: np.ndarray
    latent_j: np.ndarray
    steps: np.ndarray


class _Rows:
    """Surface rows as arrays (member, cell, area, half, bath, emissivity, padded h(T) tables)."""

    def __init__(self, rows):
        self.member = np.array([r[0] for r in rows], dtype=int)
        self.cell = np.array([r[1] for r in rows], dtype=int)
        self.area = np.array([r[2] for r in rows], dtype=float)
        self.half = np.array([r[3] for r in rows], dtype=float)
        qs = [r[4] for r in rows]
        self.bath = np.array([q.bath_c for q in qs], dtype=float)
        self.emissivity = np.array([q.emissivity for q in qs], dtype=float)
        width = max((len(q.surface_c) for q in qs), default=2)
        self.tt = np.empty((len(rows), width))
        self.th = np.empty((len(rows), width))
        for i, q in enumerate(qs):
            t, h = np.asarray(q.surface_c, dtype=float), np.asarray(q.htc_w_m2k, dtype=float)
            self.tt[i] = np.concatenate([t, np.full(width - t.size, t[-1])])
            self.th[i] = np.concatenate([h, np.full(width - h.size, h[-1])])

    def htc(self, surface_c):
        """h at each row's surface temperature: linear in the table, constant beyond, + radiation."""
        tt, th, x = self.tt, self.th, surface_c[:, None]
        j = np.clip((tt <= x).sum(axis=1), 1, tt.shape[1] - 1)
        r = np.arange(tt.shape[0])
        x0, x1, y0, y1 = tt[r, j - 1], tt[r, j], th[r, j - 1], th[r, j]
        span = x1 - x0
        frac = np.where(span > 0, np.clip((surface_c - x0) / np.where(span > 0, span, 1.0), 0.0, 1.0), 1.0)
        h = y0 + frac * (y1 - y0)
        if np.any(self.emissivity > 0):
            ts, ta = surface_c + 273.15, self.bath + 273.15
            h = h + self.emissivity * STEFAN_BOLTZMANN * (ts * ts + ta * ta) * (ts + ta)
        return h

    def coefficient(self, temperature, k):
        """Film in series with the half cell, h at the estimated surface temperature (one
        fixed-point pass): (g = area * h_eff, surface temperature)."""
        cond = k[self.cell] / self.half
        t_cell = temperature[self.cell]
        h = self.htc(t_cell)
        t_surf = (cond * t_cell + h * self.bath) / (cond + h)
        h = np.maximum(self.htc(t_surf), 1e-12)
        t_surf = (cond * t_cell + h * self.bath) / (cond + h)
        return self.area / (1.0 / h + 1.0 / cond), t_surf


class LocalIntegrator:
    """Contract of thermal.integrator.Integrator for a part_rz.PartGeometry (see module docstring)."""

    def __init__(self, geometry, settings):
        g = self.g = geometry
        self.settings = settings
        self.n = n = g.initial_c.size
        self.member_of = np.repeat(np.arange(g.member_counts.size), g.member_counts)
        self.solid = np.ones(n, dtype=bool) if g.solid is None else np.asarray(g.solid, dtype=bool)
        self.volume = np.asarray(g.mesh.cellVolumes, dtype=float) * g.capacity
        ids = g.face_ids
        self.geo = (np.asarray(g.mesh.scaledFaceAreas, dtype=float)[ids]
                    / np.asarray(g.mesh.scaledCellDistances, dtype=float)[ids]) * g.face_weight
        a, b = g.face_cells[:, 0], g.face_cells[:, 1]
        self.lo, self.hi = np.minimum(a, b), np.maximum(a, b)
        self.offset = self.hi - self.lo
        self.band = int(self.offset.max()) if self.offset.size else 0
        self.rows = _Rows(g.surface_rows)
        self.tables = PropertyTables()
        bath = np.full(g.member_counts.size, np.inf)
        np.minimum.at(bath, self.rows.member, self.rows.bath)
        self.bath_of = bath[self.member_of]

    def _solve(self, diag, face_c, rhs):
        ab = np.zeros((self.band + 1, self.n))
        ab[0] = diag
        np.add.at(ab, (self.offset, self.lo), -face_c)
        return solveh_banded(ab, rhs, lower=True, check_finite=False)

    def run(self, stepper=None, progress: Callable[[float], None] | None = None) -> Integration:
        s, g, n = self.settings, self.g, self.n
        nb = g.member_counts.size
        member_of, solid, rows = self.member_of, self.solid, self.rows
        starts = g.member_starts
        temperature = g.initial_c.copy()
        fractions = stepper.fractions() if stepper is not None else {"austenite": np.ones(n)}
        mixture = self.tables.mixture(group_weights(fractions, n))
        k, cp, enthalpy = g.overrides.properties(temperature, mixture)
        dt_m = np.full(nb, s.first_step_s)
        t_m = np.zeros(nb)
        active = np.ones(nb, dtype=bool)
        steps = np.zeros(nb, dtype=int)
        rec = np.asarray(g.record_surface_row)
        surface_now = np.where(rec >= 0, temperature[rows.cell[np.maximum(rec, 0)]] if rows.cell.size else np.nan, np.nan)
        times = [[0.0] for _ in range(nb)]
        temps = [[temperature[a:a + c].copy()] for a, c in zip(starts, g.member_counts)]
        surf = [[surface_now[i]] for i in range(nb)]
        heat_row = np.zeros(rows.cell.size)
        q_prev = np.zeros(rows.cell.size)
        latent_total = np.zeros(nb)
        start_hot = np.array([g.initial_c[a:a + c][solid[a:a + c]].max() for a, c in zip(starts, g.member_counts)])
        start_span = np.maximum(start_hot - g.end_c, 1e-9)
        e_prev = np.zeros(n)
        dt_prev = np.zeros(nb)
        last_change = np.zeros(n)
        mass = g.density_kg_m3 * self.volume
        face_member = member_of[self.lo]
        while active.any():
            live = active[member_of] & solid
            dt_cell = np.where(live, dt_m[member_of], 0.0)
            w = np.where(dt_prev > 0, dt_m / np.where(dt_prev > 0, dt_prev, 1.0), 0.0)
            a0_m, b_m = (1.0 + 2.0 * w) / (1.0 + w), w * w / (1.0 + w)
            a0, bb = a0_m[member_of], b_m[member_of]
            extrapolated = temperature + w[member_of] * last_change
            k, _, h_end = g.overrides.properties(extrapolated, mixture)
            rise = extrapolated - temperature
            moved = np.abs(rise) > 1e-6
            cp_step = np.where(moved, (h_end - enthalpy) / np.where(moved, rise, 1.0), cp)
            transient = np.where(live, a0 * g.density_kg_m3 * cp_step * self.volume / np.where(live, dt_cell, 1.0), 1.0)
            old_eff = np.where(live, temperature + bb * e_prev / (a0 * cp_step), temperature)
            a, b = g.face_cells[:, 0], g.face_cells[:, 1]
            ha, hb = g.face_half_m[:, 0], g.face_half_m[:, 1]
            face_c = np.where(active[face_member], self.geo * (ha + hb) / (ha / k[a] + hb / k[b]), 0.0)
            row_on = active[rows.member]
            gcoef, _ = rows.coefficient(extrapolated, k)
            gcoef = np.where(row_on, gcoef, 0.0)
            diag = transient + np.bincount(rows.cell, gcoef, minlength=n)
            diag += np.bincount(a, face_c, minlength=n) + np.bincount(b, face_c, minlength=n)
            rhs = transient * old_eff + np.bincount(rows.cell, gcoef * rows.bath, minlength=n)
            solved = np.where(live, self._solve(diag, face_c, rhs), temperature)
            mr = rows.member
            q = (dt_m[mr] * gcoef * (solved[rows.cell] - rows.bath) + b_m[mr] * q_prev) / a0_m[mr]
            q = np.where(row_on, q, 0.0)
            q_prev = np.where(row_on, q, q_prev)
            heat_row += q
            e_now = np.where(live, cp_step * (solved - temperature), 0.0)
            new = np.where(live, g.overrides.temperature_for(enthalpy + e_now, mixture, solved), temperature)
            change = np.zeros(n)
            if stepper is not None:
                latent, change = stepper.advance(temperature, new, dt_cell)
                latent = np.where(live, latent, 0.0)
                change = np.where(live, change, 0.0)
                latent_total += np.bincount(member_of, latent * mass, minlength=nb)
                fractions = stepper.fractions()
                self.tables.mixture(group_weights(fractions, n), out=mixture)
                if np.any(latent != 0.0):
                    _, cp_new, h_new = g.overrides.properties(new, mixture)
                    guess = new + latent / cp_new
                    new = np.where(latent != 0.0, g.overrides.temperature_for(h_new + latent, mixture, guess), new)
            self._guard(new, live, fractions if stepper is not None else None, t_m + dt_m)
            d_temp = np.where(live, np.abs(new - temperature), 0.0)
            d_rel = d_temp / np.maximum(np.abs(temperature - self.bath_of), 1.0)
            last_change = np.where(live, new - temperature, last_change)
            e_prev = np.where(live, e_now, e_prev)
            dt_prev = np.where(active, dt_m, dt_prev)
            temperature = new
            k, cp, enthalpy = g.overrides.properties(temperature, mixture)
            t_m = np.where(active, t_m + dt_m, t_m)
            steps += active
            hottest = np.maximum.reduceat(np.where(solid, temperature, -np.inf), starts)
            record = active & (rec >= 0)
            if record.any():
                _, t_surf = rows.coefficient(temperature, k)
                surface_now[record] = t_surf[rec[record]]
            for i in np.flatnonzero(active):
                a_, c_ = starts[i], g.member_counts[i]
                times[i].append(t_m[i])
                temps[i].append(temperature[a_:a_ + c_].copy())
                surf[i].append(surface_now[i])
            factor = step_factor(s, np.maximum.reduceat(d_temp, starts), np.maximum.reduceat(change, starts),
                                 np.maximum.reduceat(d_rel, starts))
            dt_m = np.where(active, dt_m * factor, dt_m)
            active = close_step(
                active, hottest, g.end_c, steps, t_m, s, start_hot, start_span, progress,
                lambda i: (f"{g.names[i]}: not below end_c = {g.end_c[i]:g} C after {steps[i]} steps, "
                           f"t = {t_m[i]:.4g} s (hottest cell {hottest[i]:.1f} C); check the quench and end_c"))
        return Integration(
            time_s=[np.array(t) for t in times], temperature_c=[np.array(t) for t in temps],
            surface_c=[np.array(x) for x in surf], heat_out_j=np.bincount(rows.member, heat_row, minlength=nb),
            heat_by_row=heat_row, latent_j=latent_total, steps=steps)

    def _guard(self, temperature, live, fractions, time_s):
        g = self.g
        if not np.all(np.isfinite(temperature[live])):
            i = int(self.member_of[np.flatnonzero(live & ~np.isfinite(temperature))[0]])
            raise SolverError(f"{g.names[i]}: temperature not finite at t = {time_s[i]:.4g} s")
        outside = live & ((temperature < self.bath_of - GUARD_TOLERANCE_K) | (temperature > g.initial_c + GUARD_TOLERANCE_K))
        if outside.any():
            j = int(np.flatnonzero(outside)[0])
            i = int(self.member_of[j])
            raise SolverError(f"{g.names[i]}: temperature {temperature[j]:.1f} C left the range from the bath "
                              f"({self.bath_of[j]:g} C) to the start ({g.initial_c[j]:g} C) at t = {time_s[i]:.4g} s")
        if fractions is None:
            return
        values = np.array([np.asarray(v, dtype=float) for v in fractions.values()])
        total = values.sum(axis=0)
        broken = live & ((values.min(axis=0) < -FRACTION_TOLERANCE) | (values.max(axis=0) > 1 + FRACTION_TOLERANCE)
                         | (np.abs(total - 1.0) > FRACTION_TOLERANCE))
        if broken.any():
            j = int(np.flatnonzero(broken)[0])
            i = int(self.member_of[j])
            raise SolverError(f"{g.names[i]}: phase fractions at cell {j - g.member_starts[i]} sum to {total[j]:.12g} "
                              f"at t = {time_s[i]:.4g} s")
