"""The quenched surfaces of a batch as arrays, for the section solver (thermal/solver.py)."""

from __future__ import annotations

import numpy as np

from .quenchants import STEFAN_BOLTZMANN


class Surfaces:
    """Every quenched surface of a batch as arrays: node, area weight, bath, emissivity and the
    h(T) tables padded to a common length (the last point repeated)."""

    def __init__(self, entries):
        # entries: (case index, node, area weight, quenchant, is_outer)
        self.case = np.array([e[0] for e in entries], dtype=int)
        self.node = np.array([e[1] for e in entries], dtype=int)
        self.area = np.array([e[2] for e in entries], dtype=float)
        self.outer = np.array([e[4] for e in entries], dtype=bool)
        quenchants = [e[3] for e in entries]
        self.bath = np.array([q.bath_c for q in quenchants], dtype=float)
        self.emissivity = np.array([q.emissivity for q in quenchants], dtype=float)
        width = max(len(q.surface_c) for q in quenchants)
        self.table_t = np.empty((len(entries), width))
        self.table_h = np.empty((len(entries), width))
        for i, q in enumerate(quenchants):
            t, h = np.asarray(q.surface_c, dtype=float), np.asarray(q.htc_w_m2k, dtype=float)
            self.table_t[i] = np.concatenate([t, np.full(width - t.size, t[-1])])
            self.table_h[i] = np.concatenate([h, np.full(width - h.size, h[-1])])
        self.rows = np.arange(len(entries))

    def htc(self, surface_c, rows):
        """h of each listed surface at its surface temperature: the same as Quenchant.htc (linear
        between table points, constant beyond the ends, plus linearized radiation)."""
        tt, th = self.table_t[rows], self.table_h[rows]
        x = surface_c[:, None]
        j = np.clip((tt <= x).sum(axis=1), 1, tt.shape[1] - 1)
        r = np.arange(rows.size)
        x0, x1, y0, y1 = tt[r, j - 1], tt[r, j], th[r, j - 1], th[r, j]
        span = x1 - x0
        frac = np.clip((surface_c - x0) / np.where(span > 0, span, 1.0), 0.0, 1.0)
        frac = np.where(span > 0, frac, 1.0)
        h = y0 + frac * (y1 - y0)
        eps = self.emissivity[rows]
        if np.any(eps > 0):
            ts, ta = surface_c + 273.15, self.bath[rows] + 273.15
            h = h + eps * STEFAN_BOLTZMANN * (ts * ts + ta * ta) * (ts + ta)
        return h
