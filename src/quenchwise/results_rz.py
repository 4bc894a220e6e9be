"""Result of a finite part solved in (r, z): the whole half-section, and its writers.

A PartResult is a Result whose own per-node arrays (history, fractions, hv, ...) are the radial
profile line at the part's mid-length (the thickest step's mid-length for a stepped shaft), so
everything that reads a 1-D Result (summary points, profile.csv, the hardness and cooling figures,
compare, size, band) reads that line; the whole half-section is in `field` (PartField). The summary
adds the softest point of the cooled surface and of the whole section with its location.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .formatting import csv_cell, rounded
from .hardness.jominy_equivalent import equivalent_jominy_distance_mm
from .results import H5_LONG_NAMES, H5_UNITS, Result, _CSV_FORMATS, write_fields_h5


@dataclass
class PartField:
    """Everything per cell of one part on its (nz, nr) grid (flat, r fastest); non-solid cells
    (outside a stepped profile) carry NaN."""

    part: object                   # thermal.part_shape.FinitePart
    r_m: np.ndarray                # (nr,) cell-centre radii
    z_m: np.ndarray                # (nz,) cell-centre heights from the lower end
    dr_m: np.ndarray
    dz_m: np.ndarray
    solid: np.ndarray              # (nz * nr,) bool
    surface_cells: np.ndarray      # indices of solid cells with a cooled face
    surface_tags: dict             # cell index -> comma-joined face tags
    time_s: np.ndarray
    temperature_c: np.ndarray      # (n_t, nz * nr)
    fractions: dict
    hv: np.ndarray
    hrc: np.ndarray
    cooling_rate_700_c_s: np.ndarray
    hv_tempered: np.ndarray | None = None
    hrc_tempered: np.ndarray | None = None
    heat_out_j: float = 0.0        # per radian, through all faces
    latent_j: float = 0.0
    steps: int = 0
    depth_m: np.ndarray | None = None   # distance of each cell centre to the nearest cooled face centre

    @property
    def shape(self) -> tuple[int, int]:
        return self.z_m.size, self.r_m.size

    def grid(self, values) -> np.ndarray:
        """A flat per-cell array as (nz, nr), NaN outside the part."""
        v = np.where(self.solid, np.asarray(values, dtype=float), np.nan)
        return v.reshape(self.shape)

    @property
    def r_cell_mm(self) -> np.ndarray:
        return np.tile(self.r_m, self.z_m.size) * 1000.0

    @property
    def z_cell_mm(self) -> np.ndarray:
        return np.repeat(self.z_m, self.r_m.size) * 1000.0


class PartResult(Result):
    """A Result along the profile line plus the (r, z) field (see the module docstring)."""

    field: PartField

    def __init__(self, *args, field: PartField, **kwargs):
        super().__init__(*args, **kwargs)
        self.field = field

    finite = True

    def location(self, cell: int) -> dict:
        """Where a cell lies: radius and height, and the faces it touches."""
        f = self.field
        return {"r_mm": round(float(f.r_cell_mm[cell]), 2), "z_mm": round(float(f.z_cell_mm[cell]), 2),
                "faces": f.surface_tags.get(int(cell), "")}

    def softest(self) -> dict:
        """The softest cell of the cooled surface and of the whole section (lowest HV, as quenched)."""
        f = self.field
        hv = np.where(f.solid & np.isfinite(f.hv), f.hv, np.inf)
        out = {}
        for key, cells in (("surface", f.surface_cells), ("section", np.flatnonzero(f.solid))):
            if cells.size == 0 or not np.isfinite(hv[cells]).any():
                continue
            c = int(cells[np.argmin(hv[cells])])
            out[key] = {**self.location(c), "hv": rounded(float(f.hv[c]), 0), "hrc": rounded(float(f.hrc[c]), 1),
                        "martensite_pct": rounded(100.0 * float(f.fractions["martensite"][c]), 1)}
        return out

    def whole_part_requirement(self) -> dict | None:
        """The case's requirement checked on every cell of the part within its depth of a cooled
        face (every cell when it asks for the centre), not only along the profile line: met or
        not, the share of those cells (by volume) that meet it and the worst cell with its place."""
        req = getattr(self.case, "requirement", None)
        f = self.field
        if req is None or f.depth_m is None:
            return None
        from .hardness import hv_from_hrc

        depth_mm = 1000.0 * f.depth_m
        inside = f.solid & (True if req.depth_mm is None else depth_mm <= req.depth_mm)
        if req.min_hrc is not None:
            hv = f.hv if f.hv_tempered is None else f.hv_tempered
            margin = hv - float(hv_from_hrc(req.min_hrc))
        else:
            margin = 100.0 * np.asarray(f.fractions["martensite"]) - req.min_martensite_pct
        margin = np.where(inside & np.isfinite(margin), margin, np.inf)
        if not inside.any():
            return None
        volume = np.outer(f.dz_m, f.r_m * f.dr_m).ravel()
        c = int(np.argmin(margin))
        ok = inside & (margin >= 0.0)
        return {"requirement": req.describe(), "met": bool(margin[c] >= 0.0),
                "share_met_pct": rounded(100.0 * float(volume[ok].sum() / volume[inside].sum()), 1),
                "worst": {**self.location(c), "depth_mm": rounded(float(depth_mm[c]), 2),
                          "hv": rounded(float(f.hv[c]), 0), "hrc": rounded(float(f.hrc[c]), 1),
                          "martensite_pct": rounded(100.0 * float(f.fractions["martensite"][c]), 1)}}

    def summary(self) -> dict:
        s = super().summary()
        part = self.field.part
        s["part"] = {"shape": {"bar": "bar", "ring": "tube", "stepped_shaft": "stepped_shaft"}[part.kind],
                     **{k: v for k, v in self.case.dimensions_mm.items()}}
        s["profile_line"] = {"z_mm": round(part.profile_z_m * 1000.0, 3),
                             "what": "radius at mid-length" if part.kind != "stepped_shaft"
                             else "radius at the mid-length of the thickest step"}
        if self.case.finite.has_own_ends:
            ends = self.case.finite.end_media(self.case.outer)
            s["quench"]["lower_end"] = ends["lower_end"].name
            s["quench"]["upper_end"] = ends["upper_end"].name
        s["softest"] = self.softest()
        whole = self.whole_part_requirement()
        if whole is not None:
            s["requirement_whole_part"] = whole
        s["cells"] = int(self.field.solid.sum())
        return s


# -- writers ----------------------------------------------------------------------------------
H5_UNITS_RZ = {**H5_UNITS, "r_mm": "mm", "z_mm": "mm", "surface": "1"}
H5_LONG_NAMES_RZ = {**H5_LONG_NAMES, "r_mm": "radius of the cell centre", "z_mm": "height of the cell centre above the lower end",
                    "surface": "1 where the cell has a cooled face", "node": "cell index (solid cells of the half-section)",
                    "depth_mm": "distance from the cell centre to the nearest cooled face centre"}


def _by_node(result: PartResult, cells: np.ndarray) -> dict:
    f = result.field
    out = {"r_mm": f.r_cell_mm[cells], "z_mm": f.z_cell_mm[cells],
           "surface": np.isin(cells, f.surface_cells).astype(np.int8)}
    if f.depth_m is not None:
        out["depth_mm"] = 1000.0 * f.depth_m[cells]
    out.update({name: np.asarray(f.fractions[name])[cells] for name in result.fraction_names})
    out.update(hv=f.hv[cells], hrc=f.hrc[cells])
    if f.hv_tempered is not None:
        out.update(hv_tempered=f.hv_tempered[cells], hrc_tempered=f.hrc_tempered[cells])
    out.update(cooling_rate_700_c_s=f.cooling_rate_700_c_s[cells],
               jominy_distance_mm=equivalent_jominy_distance_mm(f.cooling_rate_700_c_s[cells]))
    return out


def write_part_h5(result: PartResult, path: Path) -> None:
    """result.h5 of a finite part: one node per solid cell of the half-section, `r_mm` and `z_mm`
    per node, `temperature_c` (n_t x n_nodes) and the final fields, with units and long names and
    the dimension scales `time` and `node`, as results.write_result_h5 writes the 1-D sections."""
    f = result.field
    cells = np.flatnonzero(f.solid)

    write_fields_h5(path, result.case, f.time_s, f.temperature_c[:, cells], cells, _by_node(result, cells),
                    H5_UNITS_RZ, H5_LONG_NAMES_RZ,
                    {"geometry": "axisymmetric (r, z) half-section, finite part", "profile_z_mm": f.part.profile_z_m * 1000.0})


def axial_lines(result: PartResult) -> list[tuple[str, np.ndarray]]:
    """The two lines of profile_axial.csv as (name, cells, lower end up): `axis` (the innermost
    cell column: the axis of a bar or shaft, the bore side of a ring, named `bore` there) and
    `surface` (the outermost solid cell of each row: the side, following a stepped profile)."""
    f = result.field
    nz, nr = f.shape
    grid = np.arange(nz * nr).reshape(nz, nr)
    solid = f.solid.reshape(nz, nr)
    outer = nr - 1 - np.argmax(solid[:, ::-1], axis=1)
    inner_name = "bore" if f.part.bore_m > 0 else "axis"
    return [(inner_name, grid[:, 0]), ("surface", grid[np.arange(nz), outer])]


def axial_csv_text(result: PartResult) -> str:
    """profile_axial.csv: one row per cell along the axis (or bore) and along the surface, from the
    lower end up: `line`, `z_mm`, `r_mm`, the fractions, `hv`, `hrc` (empty below HRC 20),
    `cooling_rate_700_c_s`, `jominy_distance_mm`."""
    out = io.StringIO()
    w = csv.writer(out, lineterminator="\n")
    names = ["z_mm", "r_mm", *result.fraction_names, "hv", "hrc", "cooling_rate_700_c_s", "jominy_distance_mm"]
    tempered = result.field.hv_tempered is not None
    if tempered:
        names += ["hv_tempered", "hrc_tempered"]
    w.writerow(["line", *names])
    for line, cells in axial_lines(result):
        cols = _by_node(result, cells)
        for i in range(cells.size):
            w.writerow([line] + [csv_cell(cols[n][i], _CSV_FORMATS.get(n, "{:.4f}" if n.endswith("_mm") else "{:.5f}"))
                                 for n in names])
    return out.getvalue()
