"""The cooled surfaces of a batch as arrays, for the integrator (thermal/integrator.py)."""

from __future__ import annotations

import numpy as np

from .quenchants import STEFAN_BOLTZMANN


class Surfaces:
    """Every cooled boundary face of a batch once, as arrays: member (body), cell, area (in the
    mesh's measure), distance from the cell centre to the face, tag (e.g. "outer", "inner", "end",
    "side"), bath, emissivity and the h(T) tables padded to a common length (the last point
    repeated).

    rows: (member, cell, area, half_m, quenchant, tag) per face.
    """

    def __init__(self, rows):
        rows = list(rows)
        if not rows:
            raise ValueError("a batch needs at least one cooled surface")
        self.member = np.array([r[0] for r in rows], dtype=int)
        self.cell = np.array([r[1] for r in rows], dtype=int)
        self.area = np.array([r[2] for r in rows], dtype=float)
        self.half_m = np.array([r[3] for r in rows], dtype=float)
        self.tag = np.array([r[5] for r in rows])
        quenchants = [r[4] for r in rows]
        self.bath = np.array([q.bath_c for q in quenchants], dtype=float)
        self.emissivity = np.array([q.emissivity for q in quenchants], dtype=float)
        width = max(len(q.surface_c) for q in quenchants)
        self.table_t = np.empty((len(rows), width))
        self.table_h = np.empty((len(rows), width))
        # Quenchants are shared by many faces: pad each distinct table once.
        padded = {}
        for i, q in enumerate(quenchants):
            if id(q) not in padded:
                t, h = np.asarray(q.surface_c, dtype=float), np.asarray(q.htc_w_m2k, dtype=float)
                padded[id(q)] = (np.concatenate([t, np.full(width - t.size, t[-1])]),
                                 np.concatenate([h, np.full(width - h.size, h[-1])]))
            self.table_t[i], self.table_h[i] = padded[id(q)]
        self.rows = np.arange(len(rows))

    def htc(self, surface_c, rows):
        """h of each listed surface at its surface temperature: the same as Quenchant.htc (linear
        between table points, constant beyond the ends, plus linearized radiation)."""
        tt, th = self.table_t[rows], self.table_h[rows]
        x = surface_c[:, None]
        j = np.minimum(np.maximum((tt <= x).sum(axis=1), 1), tt.shape[1] - 1)
        r = np.arange(rows.size)
        x0, x1, y0, y1 = tt[r, j - 1], tt[r, j], th[r, j - 1], th[r, j]
        span = x1 - x0
        frac = np.minimum(np.maximum((surface_c - x0) / np.where(span > 0, span, 1.0), 0.0), 1.0)
        frac = np.where(span > 0, frac, 1.0)
        h = y0 + frac * (y1 - y0)
        eps = self.emissivity[rows]
        if np.any(eps > 0):
            ts, ta = surface_c + 273.15, self.bath[rows] + 273.15
            h = h + eps * STEFAN_BOLTZMANN * (ts * ts + ta * ta) * (ts + ta)
        return h
