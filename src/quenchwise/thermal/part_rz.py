"""Finite parts (bar, ring, stepped shaft) meshed in (r, z) as a Geometry of the shared integrator.

The members of a batch share one radial grid and are stacked along z on one
``fipy.CylindricalGrid2D`` (cell volumes r dr dz and face areas per radian, as FiPy computes them);
cells run r fastest within each member, so the matrix bandwidth is the number of radial cells.
No conducting face joins two members (each member's lower and upper rows are cooled end faces).
A stepped shaft lies in the bounding rectangle of its largest step: the cells outside its profile
are marked ``solid = False`` and get no faces. Every cooled face of a solid cell toward a
non-solid cell or the edge of the member's rectangle is listed once as a surface row, tagged by
the face it belongs to:

=========== ============================================================
tag         face
=========== ============================================================
side        outer cylindrical face of any step (r-normal)
bore        the bore of a ring (r-normal, at the bore radius)
lower_end   the end face at z = 0
upper_end   the end face at z = length
shoulder    an annular face between two steps (z-normal, inside the length)
=========== ============================================================

Each member gives a quenchant per tag (None: insulated). The mesh is graded: cells grow by the
settings' growth factor away from every cooled face (side, bore, each step's two ends).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import fipy as fp
import numpy as np

from .part_shape import FinitePart, PartSettings, first_width, widths_from_first
from .integrator import Geometry, Integrator
from .properties import DENSITY_KG_M3, ConstantOverrides
from .surfaces import Surfaces

TAGS = ("side", "bore", "lower_end", "upper_end", "shoulder")


@dataclass(frozen=True)
class PartMember:
    """One part to cool: its shape, the quenchant of each face tag (missing or None: insulated),
    start and end temperatures and optional constant properties (verification runs)."""

    name: str
    part: FinitePart
    media: dict
    initial_c: float
    end_c: float
    conductivity_w_mk: float | None = None
    density_kg_m3: float | None = None
    specific_heat_j_kgk: float | None = None


@dataclass(kw_only=True)
class PartGeometry(Geometry):
    """The integrator's Geometry plus what the results need: per member its cell-centre radii and
    heights, cell widths, the surface rows as given to Surfaces (member, cell, area, half_m,
    quenchant, tag) and each cooled face's centre."""

    surface_rows: list
    r_m: np.ndarray               # (nr,) cell-centre radii, shared by the members
    dr_m: np.ndarray
    z_m: list = field(default_factory=list)    # per member (nz,) cell-centre heights from its lower end
    dz_m: list = field(default_factory=list)
    surface_points: np.ndarray | None = None   # (n_rows, 2) r, z of each cooled face's centre (z from its member's lower end)

    @property
    def nr(self) -> int:
        return self.r_m.size


def integrate(geometry: PartGeometry, settings, stepper=None, progress=None, assembly: str = "banded"):
    """Run a batch of parts with the shared integrator: Integrator(geometry, settings).run(...)."""
    return Integrator(geometry, settings, assembly=assembly).run(stepper, progress)


def radial_faces(part: FinitePart, settings: PartSettings) -> np.ndarray:
    """Radial cell faces [m] from the axis (or the bore) to the largest radius: one segment per
    distinct step radius, each graded from every radius that is a cooled face with the first cell
    of part_shape.first_width."""
    bore = part.bore_m > 0.0
    first = first_width(part.outer_m - part.bore_m, settings.radial_cells, settings.growth, both=bore)
    breaks = np.unique(np.concatenate([[part.bore_m], np.asarray(part.radii_m, dtype=float)]))
    widths = [widths_from_first(b - a, first, settings.growth, at_start=(a > 0.0), at_end=True)
              for a, b in zip(breaks[:-1], breaks[1:])]
    faces = breaks[0] + np.concatenate([[0.0], np.cumsum(np.concatenate(widths))])
    faces[-1] = breaks[-1]
    return faces


def axial_widths(part: FinitePart, settings: PartSettings) -> np.ndarray:
    """Axial cell widths [m] from the lower end: each step graded towards both of its ends with
    the first cell of the whole length graded from both ends (part_shape.first_width)."""
    first = first_width(part.length_m, settings.axial_cells, settings.growth, both=True)
    return np.concatenate([widths_from_first(L, first, settings.growth, True, True) for L in part.lengths_m])


def build_geometry(members: list[PartMember], settings: PartSettings = PartSettings()) -> PartGeometry:
    """The (r, z) Geometry of a batch of parts that share one radial grid (see the module docstring)."""
    if not members:
        raise ValueError("a batch needs at least one part")
    r_faces = radial_faces(members[0].part, settings)
    for m in members[1:]:
        other = radial_faces(m.part, settings)
        if other.shape != r_faces.shape or not np.allclose(other, r_faces, rtol=0, atol=1e-12):
            raise ValueError("the parts of one batch share one radial grid (group them by radial_faces)")
    dr = np.diff(r_faces)
    r_c = 0.5 * (r_faces[:-1] + r_faces[1:])
    nr = dr.size
    dz_members = [axial_widths(m.part, settings) for m in members]
    nz_members = np.array([d.size for d in dz_members])
    dz_all = np.concatenate(dz_members)
    NZ = dz_all.size
    mesh = fp.CylindricalGrid2D(dr=dr, dz=dz_all, origin=((r_faces[0],), (0.0,)))
    counts = nz_members * nr
    starts = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(int)
    row_start = np.concatenate([[0], np.cumsum(nz_members)[:-1]]).astype(int)
    n = int(counts.sum())
    z_members = []
    solid = np.zeros(n, dtype=bool)
    for b, (m, dz) in enumerate(zip(members, dz_members)):
        zf = np.concatenate([[0.0], np.cumsum(dz)])
        zc = 0.5 * (zf[:-1] + zf[1:])
        z_members.append(zc)
        rr, zz = np.meshgrid(r_c, zc)                      # (nz, nr), r fastest when flattened
        solid[starts[b]:starts[b] + counts[b]] = m.part.is_solid(rr, zz).ravel()
    member_of_cell = np.repeat(np.arange(len(members)), counts)
    dr_cell = np.tile(dr, NZ)
    dz_cell = np.repeat(dz_all, nr)
    r_cell = np.tile(r_c, NZ)
    grid = np.arange(n).reshape(NZ, nr)
    n_zfaces = nr * (NZ + 1)

    # Interior conducting faces: both cells solid and of the same member.
    lower, upper = grid[:-1, :].ravel(), grid[1:, :].ravel()
    keep = solid[lower] & solid[upper] & (member_of_cell[lower] == member_of_cell[upper])
    zf_ids = (np.arange(1, NZ)[:, None] * nr + np.arange(nr)[None, :]).ravel()[keep]
    za, zb = lower[keep], upper[keep]
    left, right = grid[:, :-1].ravel(), grid[:, 1:].ravel()
    keep_r = solid[left] & solid[right]
    rf_ids = (n_zfaces + np.arange(NZ)[:, None] * (nr + 1) + np.arange(1, nr)[None, :]).ravel()[keep_r]
    ra, rb = left[keep_r], right[keep_r]
    face_cells = np.concatenate([np.stack([za, zb], axis=1), np.stack([ra, rb], axis=1)]).astype(int)
    face_ids = np.concatenate([zf_ids, rf_ids]).astype(int)
    face_half = np.concatenate([np.stack([0.5 * dz_cell[za], 0.5 * dz_cell[zb]], axis=1),
                                np.stack([0.5 * dr_cell[ra], 0.5 * dr_cell[rb]], axis=1)])

    # Cooled faces: a solid cell's face towards a non-solid cell or the edge of its member.
    rows = []
    record = np.full(len(members), -1)
    for b, m in enumerate(members):
        block = grid[row_start[b]:row_start[b] + nz_members[b], :]
        s = solid[block]
        nz = block.shape[0]
        pad = np.zeros((nz + 2, nr + 2), dtype=bool)
        pad[1:-1, 1:-1] = s
        bore = m.part.bore_m
        zc = z_members[b]
        best_side, best_dist = -1, np.inf
        for j in range(nz):
            for i in range(nr):
                if not s[j, i]:
                    continue
                c = int(block[j, i])
                half_z = 0.5 * dz_cell[c]
                if not pad[j + 2, i + 1]:          # face above
                    tag = "upper_end" if j == nz - 1 else "shoulder"
                    rows.append((b, c, r_c[i] * dr[i], half_z, tag, (r_c[i], zc[j] + half_z)))
                if not pad[j, i + 1]:              # face below
                    tag = "lower_end" if j == 0 else "shoulder"
                    rows.append((b, c, r_c[i] * dr[i], half_z, tag, (r_c[i], zc[j] - half_z)))
                if not pad[j + 1, i + 2]:          # outer face
                    rows.append((b, c, r_faces[i + 1] * dz_cell[c], 0.5 * dr[i], "side", (r_faces[i + 1], zc[j])))
                    dist = abs(zc[j] - m.part.profile_z_m)
                    if i == nr - 1 and dist < best_dist:
                        best_side, best_dist = len(rows) - 1, dist
                if i == 0 and bore > 0.0:          # bore face (the mesh starts at the bore)
                    rows.append((b, c, r_faces[0] * dz_cell[c], 0.5 * dr[i], "bore", (r_faces[0], zc[j])))
                elif i > 0 and not pad[j + 1, i]:  # inner face towards a non-solid cell
                    rows.append((b, c, r_faces[i] * dz_cell[c], 0.5 * dr[i], "side", (r_faces[i], zc[j])))
        record[b] = best_side
    surface_rows, surface_points = [], []
    kept_index = {}
    for k, (b, c, area, half, tag, point) in enumerate(rows):
        q = members[b].media.get(tag)
        if q is None:
            continue          # insulated face
        kept_index[k] = len(surface_rows)
        surface_rows.append((b, c, float(area), float(half), q, tag))
        surface_points.append(point)
    record = np.array([kept_index.get(int(k), -1) for k in record])

    def per_cell(attr, default):
        vals = [getattr(m, attr) for m in members]
        return np.repeat(np.array([default if v is None else v for v in vals], dtype=float), counts)

    return PartGeometry(
        mesh=mesh, member_starts=starts, member_counts=counts, capacity=np.ones(n),
        density_kg_m3=per_cell("density_kg_m3", DENSITY_KG_M3), initial_c=per_cell("initial_c", np.nan),
        end_c=np.array([m.end_c for m in members], dtype=float),
        overrides=ConstantOverrides(per_cell("conductivity_w_mk", np.nan), per_cell("specific_heat_j_kgk", np.nan)),
        face_cells=face_cells, face_ids=face_ids, face_half_m=face_half, face_weight=np.ones(face_ids.size),
        surfaces=Surfaces(surface_rows), surface_rows=surface_rows, names=[m.name for m in members], solid=solid, record_surface_row=record,
        r_m=r_c, dr_m=dr, z_m=z_members, dz_m=dz_members, surface_points=np.array(surface_points, dtype=float),
    )

