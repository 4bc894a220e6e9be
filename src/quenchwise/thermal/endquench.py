"""The end-quench (Jominy) specimen: FiPy heat conduction in (r, z), batched like BatchSolver.

Specimen (ASTM A255 / ISO 642, memory): a round bar 25 mm (1 in) in diameter and 100 mm (4 in)
long, austenitized, then sprayed on one end by a water jet while the rest of it stands in air.
The bar is axisymmetric, so the field is solved on a ``fipy.CylindricalGrid2D`` (r, z): cell
volumes and face areas carry the radius, the axis needs no condition. ``radial_cells = 1`` lumps
the cross-section into one cell per slice, which is the classic 1-D axial (fin) model of the bar:
conduction along z with the side loss of each slice; the same code serves both, so they can be
compared with everything else equal.

Boundaries: on the quenched end face the jet's h(T_surface); on the side and the far end, air
(convection plus radiation, any Quenchant). Every surface enters as an implicit source on its
cell: the film in series with the half cell, h_eff = 1 / (1/h + d/k), d the distance from the
cell centre to the face; h is evaluated at the estimated surface temperature (one fixed-point
pass) and lagged by one step, as in solver.BatchSolver.

Batching: several specimens are laid one above the other on one mesh and cut apart by zero
conductance on the faces between them; each has its own initial temperature, surface media,
properties and time step (its transient coefficient carries 1/dt of that specimen, FiPy is asked
for a unit step), so a specimen's answer does not depend on what else is in the batch. A specimen
whose hottest cell is below end_c is frozen (identity rows).

The time loop (enthalpy BDF2, latent-heat recovery, exact energy balance, step control and the
step guard) is the shared one of thermal/integrator.py; this module only builds the specimen's
Geometry. It does not import the kinetics package: it drives any object with
``advance(t_old, t_new, dt) -> (latent J/kg, largest fraction change)`` and ``fractions()``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import fipy as fp
import numpy as np

from .integrator import CoolingHistory, Geometry, Integrator, rate_through
from .properties import DENSITY_KG_M3, ConstantOverrides
from .quenchants import Quenchant
from .settings import StepControl
from .surfaces import Surfaces

#: ASTM A255 reading depth: hardness is read on two flats ground 0.015 in (0.38 mm) deep along
#: the bar (memory); ISO 642 asks for 0.4-0.5 mm (memory). Readings are taken 0.4 mm below the side.
READING_DEPTH_M = 0.4e-3
#: 1/16 inch, the standard reading step along the bar [m].
SIXTEENTH_M = 0.0254 / 16.0

#: Water jet on the quenched end: h against the end-face temperature [C -> W/(m2 K)], the boiling
#: curve of a subcooled impinging water jet (12.7 mm orifice, 63.5 mm free height, water 5-30 C;
#: ASTM A255 / ISO 642, memory). Shape: single-phase forced convection of the jet below 100 C (of the
#: order of 5e3: impinging-jet stagnation Nusselt correlations, Nu ~ Re^0.5 Pr^0.4 at Re ~ 2e4,
#: memory); the nucleate-boiling peak near the critical heat flux at a low wall superheat (about 30 K
#: for water at 1 atm: the boiling curve in Incropera et al., Fundamentals of Heat and Mass Transfer,
#: memory; the subcooled jet raises the heat flux, peak h of several 1e4); transition boiling, h
#: falling as the face gets hotter, up to the vapour-film regime above about 600 C. A constant h cannot
#: reproduce the published cooling rates at both J1 and J3-J8 (the J1 position passes 700 C within a
#: fraction of a second, while the face is still in transition boiling; J4 passes it after about 3 s,
#: with the face near the nucleate peak): a constant 3e4 gave twice the published rate at J1.
#: The table values were chosen against the ASTM A255 cooling-rate scale (rate at 705 C against
#: distance, memory; benchmarks/data/endquench_cooling_rate_a255.csv) on the 4140H specimen, which
#: does not transform above 705 C: J1-J16 within +/-10 %, J20-J32 within +20 %
#: (tests/validation/test_endquench_cooling_rate.py). Fitted on cooling rates only, never on hardness.
JET_BOILING_CURVE = (
    (20.0, 80.0, 110.0, 150.0, 250.0, 350.0, 500.0, 650.0, 900.0),
    (4.0e3, 5.0e3, 1.5e4, 5.0e4, 3.0e4, 1.5e4, 1.0e4, 5.0e3, 3.0e3),
)
#: The former constant jet h (kept for studies: end_quench_jet(htc_w_m2k=JET_HTC_W_M2K)).
JET_HTC_W_M2K = 3.0e4
#: Still air on the side and the far end: natural convection (memory: about 10-15 W/(m2 K) for a
#: hot vertical cylinder of this size) plus radiation. Emissivity 0.4: ASTM A255 has the specimen
#: austenitized protected against scaling and decarburization (in a closed container or a protective
#: atmosphere; memory), so its surface is lightly oxidized, emissivity about 0.3-0.5 (tables of
#: total emissivity of lightly oxidized steel, e.g. Incropera et al. Table A.11, memory), not the
#: 0.8 of a scaled surface. With 0.8 the rates beyond J16 came out 1.3-1.45 times the A255 scale.
AIR_CONVECTION_W_M2K = 12.0
AIR_EMISSIVITY = 0.4


def end_quench_jet(water_c: float = 20.0, htc_w_m2k: float | None = None) -> Quenchant:
    """The water jet on the quenched end: the boiling curve JET_BOILING_CURVE, or a constant h
    when htc_w_m2k is given.

    >>> jet = end_quench_jet()
    >>> [round(float(jet.htc(t))) for t in (50.0, 150.0, 700.0)]
    [4500, 50000, 4600]
    """
    if htc_w_m2k is not None:
        return Quenchant("end-quench water jet (constant h)", float(water_c), np.array([0.0, 2000.0]),
                         np.array([htc_w_m2k, htc_w_m2k]), kind="water jet", source="constant h")
    t, h = JET_BOILING_CURVE
    return Quenchant("end-quench water jet", float(water_c), np.array(t), np.array(h), kind="water jet",
                     source="boiling curve of a subcooled impinging jet, matched to the ASTM A255 cooling-rate "
                            "scale (memory)")


def still_air(ambient_c: float = 20.0) -> Quenchant:
    """Still air: natural convection plus radiation (linearized, Quenchant.emissivity).

    >>> round(float(still_air().htc(700.0)), 1)
    41.7
    """
    return Quenchant("still air", float(ambient_c), np.array([0.0, 2000.0]),
                     np.array([AIR_CONVECTION_W_M2K, AIR_CONVECTION_W_M2K]), kind="gas",
                     emissivity=AIR_EMISSIVITY, source="natural convection and radiation (memory)")


@dataclass(frozen=True)
class EndQuenchSettings(StepControl):
    """Mesh of the specimen, with the step limits of StepControl. radial_cells = 1 is the 1-D axial
    model (cross-section lumped)."""

    radial_cells: int = 6
    axial_cells: int = 48
    first_axial_m: float = 0.25e-3      # first cell at the quenched end; geometric growth to the far end
    radial_growth: float = 1.2          # cell width ratio from the side towards the axis
    first_step_s: float = 0.002
    max_steps: int = 20000
    max_time_s: float = 3.0e4


@dataclass(frozen=True)
class EndQuenchBar:
    """One specimen: its geometry, start and end temperatures, jet and air, optional constant
    property overrides (verification runs)."""

    name: str
    initial_c: float
    jet: Quenchant
    air: Quenchant | None
    end_c: float = 100.0
    diameter_m: float = 0.025
    length_m: float = 0.100
    conductivity_w_mk: float | None = None
    density_kg_m3: float | None = None
    specific_heat_j_kgk: float | None = None


@dataclass(kw_only=True)
class EndQuenchHistory(CoolingHistory):
    """Cooling history of one specimen (integrator.CoolingHistory; energies per radian) on its
    (r, z) cells, r fastest in the flat cell order: temperature_c is (n_t, nz * nr)."""

    r_m: np.ndarray                 # (nr,) cell-centre radii
    z_m: np.ndarray                 # (nz,) cell-centre distances from the quenched end
    dr_m: np.ndarray
    dz_m: np.ndarray

    @property
    def shape(self) -> tuple[int, int]:
        return self.z_m.size, self.r_m.size

    def field(self, values: np.ndarray) -> np.ndarray:
        """A flat per-cell array of this specimen as (nz, nr)."""
        return np.asarray(values).reshape(self.shape)

    def along_bar(self, values: np.ndarray, distance_m, depth_m: float = READING_DEPTH_M) -> np.ndarray:
        """Values read at the given distances from the quenched end, depth_m below the side
        (bilinear in the cell centres, held constant beyond the first and last centres)."""
        grid = self.field(values)
        radius = self.r_m[-1] + 0.5 * self.dr_m[-1] - depth_m
        if self.r_m.size > 1:
            column = np.array([np.interp(radius, self.r_m, row) for row in grid])
        else:
            column = grid[:, 0]
        return np.interp(np.asarray(distance_m, dtype=float), self.z_m, column)


def graded_widths(total_m: float, cells: int, first_m: float) -> np.ndarray:
    """Cell widths growing geometrically from first_m so that they sum to total_m.

    >>> w = graded_widths(0.1, 40, 0.0005)
    >>> round(float(w.sum()), 12), round(float(w[0]), 6), bool(w[-1] > w[0])
    (0.1, 0.0005, True)
    """
    if cells * first_m >= total_m:
        return np.full(cells, total_m / cells)
    # The sum first_m (q^n - 1) / (q - 1) grows with the ratio q: bisect for it (60 halvings of
    # [1, 10] leave q exact to round-off).
    low, high = 1.0 + 1e-12, 10.0
    for _ in range(60):
        g = 0.5 * (low + high)
        low, high = (g, high) if first_m * (g ** cells - 1.0) / (g - 1.0) < total_m else (low, g)
    w = first_m * g ** np.arange(cells)
    return w * (total_m / w.sum())


class EndQuenchSolver:
    """Solve a batch of end-quench specimens in one FiPy system (see module docstring)."""

    def __init__(self, bars: list[EndQuenchBar], settings: EndQuenchSettings = EndQuenchSettings(),
                 assembly: str = "banded"):
        if not bars:
            raise ValueError("a batch needs at least one specimen")
        d0, l0 = bars[0].diameter_m, bars[0].length_m
        if any(b.diameter_m != d0 or b.length_m != l0 for b in bars):
            raise ValueError("all specimens of a batch share one geometry")
        self.bars, self.settings = list(bars), settings
        s = settings
        nr, nz, nb = s.radial_cells, s.axial_cells, len(bars)
        self.nr, self.nz, self.nb = nr, nz, nb
        radius = d0 / 2.0
        raw = s.radial_growth ** np.arange(nr)[::-1]
        self.dr = raw * (radius / raw.sum())
        self.dz = graded_widths(l0, nz, s.first_axial_m)
        r_faces = np.concatenate([[0.0], np.cumsum(self.dr)])
        r_faces[-1] = radius
        self.r_c = 0.5 * (r_faces[:-1] + r_faces[1:])
        z_faces = np.concatenate([[0.0], np.cumsum(self.dz)])
        self.z_c = 0.5 * (z_faces[:-1] + z_faces[1:])
        self.mesh = fp.CylindricalGrid2D(dr=self.dr, dz=np.tile(self.dz, nb))
        n = nr * nz * nb
        self.n_cells, self.cells_per_bar = n, nr * nz
        self.bar_of_cell = np.repeat(np.arange(nb), nr * nz)
        self.starts = np.arange(nb) * nr * nz
        # Geometry per cell (per radian): volume r dr dz; flat order r fastest, then z.
        dr_cell = np.tile(self.dr, nz * nb)
        dz_cell = np.repeat(np.tile(self.dz, nb), nr)
        r_cell = np.tile(self.r_c, nz * nb)
        self.volume = r_cell * dr_cell * dz_cell
        self.dz_cell, self.dr_cell = dz_cell, dr_cell
        cell = np.arange(n).reshape(nb * nz, nr)
        # Interior faces with conduction: z-faces between slices of one bar, r-faces between rings.
        lower = cell[:-1, :].ravel()
        upper = cell[1:, :].ravel()
        same_bar = self.bar_of_cell[lower] == self.bar_of_cell[upper]
        self.zf_a, self.zf_b = lower[same_bar], upper[same_bar]
        self.zf_area = r_cell[self.zf_a] * dr_cell[self.zf_a]
        # FiPy face ids: z-normal faces first (row j = 0..nb*nz, nr per row), then r-normal faces.
        rows = np.arange(nb * nz + 1)
        zface_id = (rows[:, None] * nr + np.arange(nr)[None, :])
        self.zf_id = zface_id[1:-1, :].ravel()[same_bar]
        n_zfaces = nr * (nb * nz + 1)
        if nr > 1:
            inner = cell[:, :-1].ravel()
            outer = cell[:, 1:].ravel()
            self.rf_a, self.rf_b = inner, outer
            j = np.repeat(np.arange(nb * nz), nr - 1)
            i = np.tile(np.arange(1, nr), nb * nz)
            self.rf_id = n_zfaces + j * (nr + 1) + i
            self.rf_area = r_faces[i] * dz_cell[inner]
        else:
            self.rf_a = self.rf_b = self.rf_id = np.zeros(0, dtype=int)
            self.rf_area = np.zeros(0)
        # Boundary faces: quenched end (bottom row of each bar), far end (top row), side (outer ring).
        self.end_cells = np.concatenate([cell[b * nz, :] for b in range(nb)])
        self.top_cells = np.concatenate([cell[(b + 1) * nz - 1, :] for b in range(nb)])
        self.side_cells = cell[:, -1].copy()
        self.end_area = r_cell[self.end_cells] * dr_cell[self.end_cells]
        self.side_area = radius * dz_cell[self.side_cells]

        def per_cell(attr, default):
            vals = [getattr(b, attr) for b in self.bars]
            return np.repeat(np.array([default if v is None else v for v in vals], dtype=float), nr * nz)

        self.density = per_cell("density_kg_m3", DENSITY_KG_M3)
        self.overrides = ConstantOverrides(per_cell("conductivity_w_mk", np.nan), per_cell("specific_heat_j_kgk", np.nan))
        self.initial = per_cell("initial_c", np.nan)
        self.end_c = np.array([b.end_c for b in self.bars], dtype=float)

        rows = []
        for b, spec in enumerate(self.bars):
            ends = slice(b * nr, (b + 1) * nr)
            faces = [(self.end_cells[ends], self.end_area[ends], self.dz_cell, spec.jet, "end")]
            if spec.air is not None:
                faces.append((self.top_cells[ends], self.end_area[ends], self.dz_cell, spec.air, "far end"))
                faces.append((self.side_cells[b * nz:(b + 1) * nz], self.side_area[b * nz:(b + 1) * nz], self.dr_cell,
                              spec.air, "side"))
            for cells, areas, widths, medium, tag in faces:
                rows += [(b, c, a, 0.5 * widths[c], medium, tag) for c, a in zip(cells, areas)]
        self.surfaces = Surfaces(rows)
        z_half = 0.5 * self.dz_cell
        r_half = 0.5 * self.dr_cell
        face_cells = np.concatenate([np.column_stack([self.zf_a, self.zf_b]), np.column_stack([self.rf_a, self.rf_b])])
        face_half = np.concatenate([np.column_stack([z_half[self.zf_a], z_half[self.zf_b]]),
                                    np.column_stack([r_half[self.rf_a], r_half[self.rf_b]])])
        self.geometry = Geometry(
            mesh=self.mesh, member_starts=self.starts, member_counts=np.full(nb, nr * nz),
            capacity=np.ones(n), density_kg_m3=self.density, initial_c=self.initial, end_c=self.end_c,
            overrides=self.overrides, face_cells=face_cells.astype(int),
            face_ids=np.concatenate([self.zf_id, self.rf_id]).astype(int), face_half_m=face_half,
            face_weight=np.ones(len(face_cells)), surfaces=self.surfaces,
            names=[f"specimen {b.name!r}" for b in self.bars])
        self.integrator = Integrator(self.geometry, settings, assembly)

    def run(self, stepper=None, progress: Callable[[float], None] | None = None) -> list[EndQuenchHistory]:
        """Integrate every specimen until its hottest cell is below its end temperature (the shared
        integrator: heat_out_j = drop of sensible enthalpy + latent_j to round-off)."""
        out = self.integrator.run(stepper, progress)
        return [
            EndQuenchHistory(name=bar.name, r_m=self.r_c.copy(), z_m=self.z_c.copy(), dr_m=self.dr.copy(),
                             dz_m=self.dz.copy(), time_s=out.time_s[b], temperature_c=out.temperature_c[b],
                             heat_out_j=float(out.heat_out_j[b]), latent_j=float(out.latent_j[b]),
                             steps=int(out.steps[b]))
            for b, bar in enumerate(self.bars)
        ]


def rate_at(history: EndQuenchHistory, temperature_c: float = 700.0) -> np.ndarray:
    """Cooling rate of every cell as it first passed temperature_c [K/s], from the stored history
    (runs without a stepper); NaN where the cell never crossed it."""
    return rate_through(history.time_s, history.temperature_c, temperature_c)
