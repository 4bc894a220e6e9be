"""Case-file keys of finite parts in (r, z) (issue 17), parsed for case.py: [part] length_mm on a
bar or tube, shape = "stepped_shaft" (step_diameters_mm, step_lengths_mm, fillet_radius_mm),
[quench] end_faces_medium / end_face_h_scale / lower_end_h_scale, [mesh] radial_cells /
axial_cells. Every problem is one InputError naming the key, the value and what is allowed.
"""

from __future__ import annotations

import math
from pathlib import Path

from dataclasses import dataclass

from .errors import InputError
from .thermal.geometry import Section
from .thermal.part_shape import FinitePart, PartSettings, scaled
from .thermal.quenchants import load_quenchant

#: The keys this module adds to case.SECTIONS.
FINITE_KEYS = {"part": {"length_mm", "step_diameters_mm", "step_lengths_mm", "fillet_radius_mm"},
               "quench": {"end_faces_medium", "end_face_h_scale", "lower_end_h_scale"},
               "mesh": {"radial_cells", "axial_cells"}}


@dataclass(frozen=True)
class FiniteSpec:
    """What a case adds for a finite part: its shape, its end faces' quench and its (r, z) mesh
    (PartSettings; the step limits come from the case's SolverSettings at solve time).

    The end faces take end_medium (None: the case's outer medium, whatever it is, so compare and
    size vary them with it) with its h times end_scale, and the lower end (z = 0) also times
    lower_scale."""

    part: FinitePart
    end_medium: object = None
    end_scale: float = 1.0
    lower_scale: float = 1.0
    settings: PartSettings = PartSettings()

    def end_media(self, outer) -> dict:
        """{"lower_end": Quenchant, "upper_end": Quenchant} for the given outer medium."""
        end = outer if self.end_medium is None else self.end_medium.at_bath(outer.bath_c)
        return {"lower_end": scaled(end, self.end_scale * self.lower_scale), "upper_end": scaled(end, self.end_scale)}

    @property
    def has_own_ends(self) -> bool:
        return self.end_medium is not None or self.end_scale != 1.0 or self.lower_scale != 1.0


def parse_part(data: dict, section, number, base_dir: Path):
    """(Section, dimensions, FiniteSpec or None) of [part], with [quench]'s end-face keys and
    [mesh]'s radial_cells / axial_cells; section and number are case._section and case._number.
    The 1-D section refuses the finite-part keys."""
    p, q, m = data["part"], data["quench"], data.get("mesh", {})
    shape = p.get("shape")
    if shape != "stepped_shaft" and "length_mm" not in p:
        sec, dims = section(p)
        for table, keys in (("quench", ("end_faces_medium", "end_face_h_scale", "lower_end_h_scale")),
                            ("mesh", ("radial_cells", "axial_cells"))):
            given = [k for k in keys if k in data.get(table, {})]
            if given:
                raise InputError(f"{table}.{given[0]}", data[table][given[0]],
                                 "only for a finite part ([part] length_mm or shape = 'stepped_shaft')")
        return sec, dims, None
    sec, dims = finite_section(p, shape, section, number)
    part = dims.pop("_finite")
    medium, scale, lower = end_faces(q, base_dir, number)
    d = PartSettings()
    settings = PartSettings(
        radial_cells=number(m, "mesh", "radial_cells", 6, 200, default=d.radial_cells, integer=True),
        axial_cells=number(m, "mesh", "axial_cells", 8, 400, default=d.axial_cells, integer=True),
        growth=number(m, "mesh", "growth", 1.0, 1.5, default=d.growth))
    return sec, dims, FiniteSpec(part, medium, scale, lower, settings)


#: Largest number of steps of a stepped shaft.
MAX_STEPS = 12


def finite_section(p: dict, shape: str, section, number) -> tuple[Section, dict]:
    """A finite part ([part] length_mm on a bar or tube, or a stepped shaft): its radial Section
    at the profile line, and its dimensions with the FinitePart under "_finite"."""
    size = (0.5, 2000.0)
    if shape in ("plate", "sphere"):
        raise InputError("part.length_mm", p["length_mm"], "length_mm only for shape = 'bar' or 'tube' (or use "
                         "shape = 'stepped_shaft')")
    if shape not in ("bar", "tube", "stepped_shaft"):
        section(p)          # the shape's own one-line error
    if shape in ("bar", "tube"):
        sec, dims = section({k: v for k, v in p.items() if k != "length_mm"})
        length = number(p, "part", "length_mm", *size, required=True)
        if sec.shape == "bar":
            part = FinitePart.bar(sec.outer_m * 2.0, length / 1000.0)
        else:
            part = FinitePart.ring(sec.outer_m * 2.0, sec.inner_m * 2.0, length / 1000.0)
        return sec, {**dims, "length_mm": length, "_finite": part}
    allowed = {"step_diameters_mm", "step_lengths_mm", "fillet_radius_mm"}
    for key in p:
        if key != "shape" and key not in allowed:
            raise InputError(f"part.{key}", p[key], "for shape = 'stepped_shaft' only " + ", ".join(sorted(allowed)))
    lists = {}
    for key in ("step_diameters_mm", "step_lengths_mm"):
        v = p.get(key)
        if (not isinstance(v, list) or not 1 <= len(v) <= MAX_STEPS
                or not all(isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x)
                           and size[0] <= x <= size[1] for x in v)):
            raise InputError(f"part.{key}", "(missing)" if v is None else v,
                             f"a list of 1 to {MAX_STEPS} numbers from {size[0]:g} to {size[1]:g} [mm], "
                             "one per step from the lower end up")
        lists[key] = [float(x) for x in v]
    d, L = lists["step_diameters_mm"], lists["step_lengths_mm"]
    if len(d) != len(L):
        raise InputError("part.step_lengths_mm", L, f"one length per diameter ({len(d)} diameters given)")
    fillet = number(p, "part", "fillet_radius_mm", 0.0, 100.0, default=0.0)
    shoulders = [abs(a - b) / 2.0 for a, b in zip(d[:-1], d[1:]) if a != b]
    if fillet > 0.0 and (not shoulders or fillet > min(shoulders) or fillet > min(L)):
        raise InputError("part.fillet_radius_mm", fillet, "a radius no larger than the smallest shoulder height "
                         f"({min(shoulders) if shoulders else 0:g} mm) and the shortest step ({min(L):g} mm)")
    part = FinitePart.stepped([x / 1000.0 for x in d], [x / 1000.0 for x in L], fillet / 1000.0)
    dims = {"step_diameters_mm": d, "step_lengths_mm": L, "length_mm": float(sum(L)), "fillet_radius_mm": fillet,
            "_finite": part}
    return Section.bar(max(d) / 1000.0), dims


def end_faces(q: dict, base_dir: Path, number) -> tuple:
    """[quench] end_faces_medium (a built-in name or CSV, run at the outer medium's bath: one
    tank), end_face_h_scale (both end faces) and lower_end_h_scale (the lower end, z = 0, e.g. the
    face that enters the bath first): (medium or None, scale, lower scale)."""
    end = None
    if "end_faces_medium" in q:
        v = q["end_faces_medium"]
        if not isinstance(v, str) or not v.strip():
            raise InputError("quench.end_faces_medium", v, "a built-in quenchant name or a CSV path")
        end = load_quenchant(v, base_dir, key="quench.end_faces_medium")
    scale = number(q, "quench", "end_face_h_scale", 0.0, 20.0, lo_open=True, default=1.0)
    lower = number(q, "quench", "lower_end_h_scale", 0.0, 20.0, lo_open=True, default=1.0)
    return end, scale, lower
