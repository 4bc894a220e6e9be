"""A bare reference for the FiPy batch solver: the same node-steps solved with a banded
tridiagonal implicit solver (numpy + scipy.linalg.solve_banded).

It replays a finished BatchSolver run: the same cases, the same mesh (Section.mesh with the same
settings), the same sequence of time steps per case (taken from the run's CaseHistory.time_s), the
same active set at every iteration. Two levels of work per step:

* ``"linear"``  -- assemble the tridiagonal bands of the active sections from per-node coefficient
  arrays and solve them with solve_banded. Nothing else: the coefficients (conductivity, specific
  heat, surface coefficient) are those of the initial state and are not re-evaluated. This is the
  floor of any implicit 1-D solver with these node-steps.
* ``"full"``    -- everything the FiPy solver does per step except FiPy itself: properties and
  surface coefficients at the extrapolated temperatures (same property tables, own vectorized
  h(T) interpolation), BDF2 assembly, solve_banded, surface heat bookkeeping, enthalpy-to-
  temperature conversion, the kinetics stepper (a fresh PhaseStepper when one is given) and the
  latent-heat recovery. It records no histories and does no step control (steps are given). Its
  final temperatures must agree with the FiPy run's (same algorithm, same steps): ``replay``
  returns that difference as a check that the reference does the same work.
"""

from __future__ import annotations

import numpy as np
from scipy.linalg import solve_banded

from quenchwise.thermal.properties import DENSITY_KG_M3, PropertyTables, group_weights
from quenchwise.thermal.quenchants import STEFAN_BOLTZMANN


class BandedReference:
    def __init__(self, cases, settings):
        self.cases = cases
        widths, weights, face_w = [], [], []
        for c in cases:
            dx, _, w, fw = c.section.mesh(settings.cells, settings.growth)
            widths.append(dx), weights.append(w), face_w.append(fw)
        self.counts = np.array([len(d) for d in widths])
        self.starts = np.concatenate([[0], np.cumsum(self.counts)[:-1]]).astype(int)
        self.case_of_node = np.repeat(np.arange(len(cases)), self.counts)
        self.dx = np.concatenate(widths)
        self.weight = np.concatenate(weights)
        n = self.n = self.dx.size
        # Radius weight of the face between node j-1 and node j (0 between sections and at the ends).
        self.face_weight = np.zeros(n + 1)
        for s, fw in zip(self.starts, face_w):
            self.face_weight[s + 1: s + len(fw) - 1] = fw[1:-1]
        # Surfaces: node, area weight, bath, emissivity, table.
        rows = []
        for i, (c, fw) in enumerate(zip(cases, face_w)):
            if c.outer is not None:
                rows.append((i, self.starts[i] + self.counts[i] - 1, fw[-1], c.outer))
            if c.inner is not None:
                rows.append((i, self.starts[i], fw[0], c.inner))
        self.s_case = np.array([r[0] for r in rows])
        self.s_node = np.array([r[1] for r in rows])
        self.s_area = np.array([r[2] for r in rows])
        self.s_bath = np.array([r[3].bath_c for r in rows])
        self.s_eps = np.array([r[3].emissivity for r in rows])
        self.s_tables = [(np.asarray(r[3].surface_c, float), np.asarray(r[3].htc_w_m2k, float)) for r in rows]
        self.density = np.repeat([c.density_kg_m3 or DENSITY_KG_M3 for c in cases], self.counts).astype(float)
        self.k_fix = np.repeat([np.nan if c.conductivity_w_mk is None else c.conductivity_w_mk for c in cases],
                               self.counts).astype(float)
        self.cp_fix = np.repeat([np.nan if c.specific_heat_j_kgk is None else c.specific_heat_j_kgk for c in cases],
                                self.counts).astype(float)
        self.initial = np.repeat([c.initial_c for c in cases], self.counts).astype(float)
        self.tables = PropertyTables()
        # Padded h(T) tables for a vectorized lookup.
        width = max(t.size for t, _ in self.s_tables)
        self.tab_t = np.array([np.concatenate([t, np.full(width - t.size, t[-1])]) for t, _ in self.s_tables])
        self.tab_h = np.array([np.concatenate([h, np.full(width - h.size, h[-1])]) for _, h in self.s_tables])

    # -- per-step pieces -------------------------------------------------------------------------
    def _htc(self, ts, rows):
        tt, th = self.tab_t[rows], self.tab_h[rows]
        j = np.clip((tt <= ts[:, None]).sum(axis=1), 1, tt.shape[1] - 1)
        r = np.arange(rows.size)
        x0, x1 = tt[r, j - 1], tt[r, j]
        span = x1 - x0
        f = np.where(span > 0, np.clip((ts - x0) / np.where(span > 0, span, 1.0), 0.0, 1.0), 1.0)
        h = th[r, j - 1] + f * (th[r, j] - th[r, j - 1])
        eps = self.s_eps[rows]
        if np.any(eps > 0):
            a, b = ts + 273.15, self.s_bath[rows] + 273.15
            h = h + eps * STEFAN_BOLTZMANN * (a * a + b * b) * (a + b)
        return h

    def _g(self, temperature, k, rows):
        node, bath = self.s_node[rows], self.s_bath[rows]
        cond = k[node] / (0.5 * self.dx[node])
        tc = temperature[node]
        h = self._htc(tc, rows)
        h = self._htc((cond * tc + h * bath) / (cond + h), rows)
        return self.s_area[rows] / (1.0 / np.maximum(h, 1e-12) + 1.0 / cond)

    def _props(self, t, mixture):
        k, cp, h = mixture.evaluate(t)
        fixed = ~np.isnan(self.cp_fix)
        return (np.where(np.isnan(self.k_fix), k, self.k_fix), np.where(fixed, self.cp_fix, cp),
                np.where(fixed, self.cp_fix * t, h))

    def _to_temperature(self, h, mixture, guess):
        fixed = ~np.isnan(self.cp_fix)
        t = mixture.temperature_for_enthalpy(h, guess)
        return np.where(fixed, h / np.where(fixed, self.cp_fix, 1.0), t)

    def _solve(self, idx, diag_coeff, rhs, k):
        """Tridiagonal solve on the active nodes idx: diag_coeff T + conduction = rhs."""
        j = idx[1:]
        adjacent = j == idx[:-1] + 1
        face = np.where(adjacent, self.face_weight[j] / (0.5 * self.dx[j - 1] / k[j - 1] + 0.5 * self.dx[j] / k[j]), 0.0)
        ab = np.zeros((3, idx.size))
        ab[1] = diag_coeff[idx] * self.dx[idx]
        ab[1, 1:] += face
        ab[1, :-1] += face
        ab[0, 1:] = -face
        ab[2, :-1] = -face
        return solve_banded((1, 1), ab, rhs[idx] * self.dx[idx], overwrite_ab=True, check_finite=False)

    # -- replays ----------------------------------------------------------------------------------
    def replay(self, histories, level="full", stepper=None):
        """Re-solve the node-steps of a finished run. Returns (node-steps, largest difference of the
        final temperatures from the run's [K]; None for "linear")."""
        dts = [np.diff(h.time_s) for h in histories]
        n_iter = max(len(d) for d in dts)
        dt_table = np.zeros((n_iter, len(self.cases)))
        for i, d in enumerate(dts):
            dt_table[:len(d), i] = d
        node_steps = int(sum(len(d) * c for d, c in zip(dts, self.counts)))
        if level == "linear":
            self._linear(dt_table)
            return node_steps, None
        final = self._full(dt_table, stepper)
        ref = np.concatenate([h.temperature_c[-1] for h in histories])
        return node_steps, float(np.max(np.abs(final - ref)))

    def _linear(self, dt_table):
        fractions = {"austenite": np.ones(self.n)}
        mixture = self.tables.mixture(group_weights(fractions, self.n))
        t = self.initial.copy()
        k, cp, _ = self._props(t, mixture)
        rho_cp_w = self.density * cp * self.weight
        g_all = self._g(t, k, np.arange(self.s_node.size))
        for dt in dt_table:
            active = dt > 0
            idx = np.flatnonzero(active[self.case_of_node])
            rows = np.flatnonzero(active[self.s_case])
            coeff = rho_cp_w / np.where(dt[self.case_of_node] > 0, dt[self.case_of_node], 1.0)
            sink = np.bincount(self.s_node[rows], g_all[rows], minlength=self.n) / self.dx
            rhs = coeff * t + np.bincount(self.s_node[rows], g_all[rows] * self.s_bath[rows], minlength=self.n) / self.dx
            t[idx] = self._solve(idx, coeff + sink, rhs, k)

    def _full(self, dt_table, stepper):
        n = self.n
        fractions = stepper.fractions() if stepper is not None else {"austenite": np.ones(n)}
        mixture = self.tables.mixture(group_weights(fractions, n))
        t = self.initial.copy()
        k, cp, enthalpy = self._props(t, mixture)
        e_prev = np.zeros(n)
        last_change = np.zeros(n)
        dt_prev = np.zeros(len(self.cases))
        q_prev = np.zeros(self.s_node.size)
        heat = np.zeros(self.s_node.size)
        rho_w = self.density * self.weight
        for dt in dt_table:
            active = dt > 0
            active_node = active[self.case_of_node]
            idx = np.flatnonzero(active_node)
            rows = np.flatnonzero(active[self.s_case])
            dt_node = dt[self.case_of_node]
            w = np.where(dt_prev > 0, dt / np.where(dt_prev > 0, dt_prev, 1.0), 0.0)
            a0c, bc = (1 + 2 * w) / (1 + w), w * w / (1 + w)
            a0, b = a0c[self.case_of_node], bc[self.case_of_node]
            ext = t + w[self.case_of_node] * last_change
            k, cp_end, h_end = self._props(ext, mixture)
            rise = ext - t
            moved = np.abs(rise) > 1e-6
            cp = np.where(moved, (h_end - enthalpy) / np.where(moved, rise, 1.0), cp)
            coeff = a0 * rho_w * cp / np.where(active_node, dt_node, 1.0)
            old_eff = t + b * e_prev / (a0 * cp)
            g = self._g(ext, k, rows)
            nodes = self.s_node[rows]
            sink = np.bincount(nodes, g, minlength=n) / self.dx
            rhs = coeff * old_eff + np.bincount(nodes, g * self.s_bath[rows], minlength=n) / self.dx
            solved = t.copy()
            solved[idx] = self._solve(idx, coeff + sink, rhs, k)
            cr = self.s_case[rows]
            q = (dt[cr] * g * (solved[nodes] - self.s_bath[rows]) + bc[cr] * q_prev[rows]) / a0c[cr]
            q_prev[rows] = q
            heat[rows] += q
            e_now = np.where(active_node, cp * (solved - t), 0.0)
            new = np.where(active_node, self._to_temperature(enthalpy + e_now, mixture, solved), t)
            if stepper is not None:
                latent, _ = stepper.advance(t, new, np.where(active_node, dt_node, 0.0))
                latent = np.where(active_node, latent, 0.0)
                self.tables.mixture(group_weights(stepper.fractions(), n), out=mixture)
                if np.any(latent != 0.0):
                    _, cp_new, h_new = self._props(new, mixture)
                    new = np.where(latent != 0.0, self._to_temperature(h_new + latent, mixture, new + latent / cp_new), new)
            last_change = np.where(active_node, new - t, last_change)
            e_prev = np.where(active_node, e_now, e_prev)
            dt_prev = np.where(active, dt, dt_prev)
            t = new
            k, cp, enthalpy = self._props(t, mixture)
        return t
