"""Section shapes reduced to one coordinate through the thickness, and their graded meshes."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: Shape name -> exponent m of the radial coordinate (slab 0, cylinder 1, sphere 2).
SHAPES = {"plate": 0, "bar": 1, "tube": 1, "sphere": 2}


@dataclass(frozen=True)
class Section:
    """One section through the thickness, from its inner end to its outer (quenched) surface.

    inner_m, outer_m: coordinates of the ends [m] (centre line, mid-plane or bore radius at inner_m).
    inner_quenched: whether the inner end is a quenched surface (tube bore, or the second face of
    a plate meshed over its full thickness); otherwise it is a symmetry plane or insulated.
    """

    shape: str
    inner_m: float
    outer_m: float
    inner_quenched: bool = False
    outer_quenched: bool = True

    @property
    def m(self) -> int:
        return SHAPES[self.shape]

    @property
    def thickness_m(self) -> float:
        return self.outer_m - self.inner_m

    @classmethod
    def plate(cls, thickness_m: float, faces: str = "both") -> "Section":
        """faces = "both": symmetric, the half thickness is meshed; "one": full thickness,
        quenched at the outer face, insulated at the other."""
        if faces == "both":
            return cls("plate", 0.0, thickness_m / 2.0)
        return cls("plate", 0.0, thickness_m)

    @classmethod
    def bar(cls, diameter_m: float) -> "Section":
        return cls("bar", 0.0, diameter_m / 2.0)

    @classmethod
    def sphere(cls, diameter_m: float) -> "Section":
        return cls("sphere", 0.0, diameter_m / 2.0)

    @classmethod
    def tube(cls, outer_diameter_m: float, inner_diameter_m: float, bore_quenched: bool = True) -> "Section":
        return cls("tube", inner_diameter_m / 2.0, outer_diameter_m / 2.0, inner_quenched=bore_quenched)

    def cell_widths(self, cells: int, growth: float) -> np.ndarray:
        """Cell widths [m], inner to outer: geometric growth away from each quenched surface.

        >>> w = Section.bar(0.02).cell_widths(20, 1.1)
        >>> bool(w[-1] < w[0]), round(float(w.sum()), 12)
        (True, 0.01)
        """
        if self.inner_quenched and self.outer_quenched:
            half = cells // 2
            left = growth ** np.arange(half)
            right = growth ** np.arange(cells - half)[::-1]
            raw = np.concatenate([left, right])
        elif self.inner_quenched:
            raw = growth ** np.arange(cells)
        else:
            raw = growth ** np.arange(cells)[::-1]
        return raw * (self.thickness_m / raw.sum())

    def mesh(self, cells: int, growth: float):
        """Cell widths, cell-centre radii, volume weights per unit width, and face radii weights.

        With V_c the exact cell volume per unit angle, (r_e^(m+1) - r_w^(m+1)) / (m+1), the
        weights are V_c / dx_c for the transient term and r_f^m at the faces, so a Cartesian 1-D
        finite-volume mesh carries slab, cylinder or sphere exactly.
        """
        dx = self.cell_widths(cells, growth)
        faces = self.inner_m + np.concatenate([[0.0], np.cumsum(dx)])
        faces[-1] = self.outer_m
        m = self.m
        centres = 0.5 * (faces[:-1] + faces[1:])
        volume = (faces[1:] ** (m + 1) - faces[:-1] ** (m + 1)) / (m + 1)
        return dx, centres, volume / dx, faces ** m
