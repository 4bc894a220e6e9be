"""Finite axisymmetric parts (bar, ring, stepped shaft) and their (r, z) numerics, free of FiPy.

The case loader builds these (it must not import FiPy); thermal/part_rz.py meshes them.

A part is a stack of steps along its axis, from the lower end (z = 0) up: each step is a cylinder
of its own outer radius and length; a ring has a bore through its whole length. A shoulder (a
change of radius between two steps) may carry a fillet of radius fillet_m in the corner on the
thinner step's side. The fillet is approximated on the grid (see FinitePart.is_solid).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from .settings import StepControl

#: Kinds of finite part: a bar with ends, a ring (tube with ends), a stepped shaft.
KINDS = ("bar", "ring", "stepped_shaft")


@dataclass(frozen=True)
class FinitePart:
    """An axisymmetric part in (r, z): steps (outer radius, length) from z = 0 up, an optional bore
    radius through the whole length and an optional shoulder fillet radius [m]."""

    kind: str
    radii_m: tuple
    lengths_m: tuple
    bore_m: float = 0.0
    fillet_m: float = 0.0

    def __post_init__(self):
        if self.kind not in KINDS:
            raise ValueError(f"kind {self.kind!r}: one of {KINDS}")
        if len(self.radii_m) != len(self.lengths_m) or not self.radii_m:
            raise ValueError("one radius per step length, at least one step")
        if min(self.radii_m) <= self.bore_m or min(self.lengths_m) <= 0.0:
            raise ValueError("steps must be longer than 0 and wider than the bore")

    @classmethod
    def bar(cls, diameter_m: float, length_m: float) -> "FinitePart":
        return cls("bar", (diameter_m / 2.0,), (length_m,))

    @classmethod
    def ring(cls, outer_diameter_m: float, inner_diameter_m: float, length_m: float) -> "FinitePart":
        return cls("ring", (outer_diameter_m / 2.0,), (length_m,), bore_m=inner_diameter_m / 2.0)

    @classmethod
    def stepped(cls, diameters_m, lengths_m, fillet_m: float = 0.0) -> "FinitePart":
        return cls("stepped_shaft", tuple(d / 2.0 for d in diameters_m), tuple(lengths_m), fillet_m=fillet_m)

    @property
    def length_m(self) -> float:
        return float(sum(self.lengths_m))

    @property
    def outer_m(self) -> float:
        return float(max(self.radii_m))

    @property
    def step_ends_m(self) -> np.ndarray:
        """z of the step boundaries, 0 .. length (n_steps + 1)."""
        return np.concatenate([[0.0], np.cumsum(self.lengths_m)])

    @property
    def profile_step(self) -> int:
        """The step whose mid-length radius is the profile line: the thickest step (the slowest
        section; the first of equals), i.e. the whole part for a bar or ring."""
        return int(np.argmax(self.radii_m))

    @property
    def profile_z_m(self) -> float:
        """z of the mid-length radial profile line (middle of profile_step)."""
        ends = self.step_ends_m
        i = self.profile_step
        return 0.5 * float(ends[i] + ends[i + 1])

    def radius_at(self, z_m) -> np.ndarray:
        """Outer radius of the step at each z (no fillet) [m]."""
        z = np.asarray(z_m, dtype=float)
        i = np.clip(np.searchsorted(self.step_ends_m, z, side="right") - 1, 0, len(self.radii_m) - 1)
        return np.asarray(self.radii_m)[i]

    def is_solid(self, r_m, z_m) -> np.ndarray:
        """Whether the points (r, z) lie inside the part, fillets included.

        A fillet of radius rho at a shoulder at z_s between a thinner step (radius a) and a thicker
        one adds the material between the two faces outside the quarter circle of radius rho
        centred at (a + rho, z_s -+ rho) on the thinner step's side. On the grid a cell belongs to
        the part when its centre does, so the fillet becomes a staircase of cells: its volume is
        right to within the cells cut by the arc, its cooled area (the stair treads and risers) is
        up to 4/pi of the arc's.
        """
        r, z = np.broadcast_arrays(np.asarray(r_m, dtype=float), np.asarray(z_m, dtype=float))
        inside = (r <= self.radius_at(z)) & (r >= self.bore_m) & (z >= 0.0) & (z <= self.length_m)
        rho = self.fillet_m
        if rho <= 0.0:
            return inside
        ends, radii = self.step_ends_m, self.radii_m
        for j in range(1, len(radii)):
            zs, lower, upper = ends[j], radii[j - 1], radii[j]
            if lower == upper:
                continue
            a = min(lower, upper)
            rr = min(rho, abs(upper - lower), self.lengths_m[j - 1 if lower < upper else j])
            side = -1.0 if lower < upper else 1.0      # the thinner step lies below (-) or above (+)
            zc = zs + side * rr
            band = (r > a) & (r <= a + rr) & (side * (z - zs) >= 0.0) & (side * (z - zs) <= rr)
            outside_arc = (r - (a + rr)) ** 2 + (z - zc) ** 2 >= rr * rr
            inside |= band & outside_arc
        return inside


@dataclass(frozen=True)
class PartSettings(StepControl):
    """Numerics of a finite part: cells across the largest radius (or the wall of a ring) and along
    the length, geometric growth of cell size away from each cooled face, and the step limits
    (the same meaning as SolverSettings').

    radial_cells and axial_cells set the size of the first cell at a cooled face: that of a bar of
    the largest radius (or of the ring's wall, graded from both faces) with radial_cells cells, and
    of the whole length graded from both ends with axial_cells cells. Every cooled face (each
    step's side and ends, shoulders, bore) gets that first cell, growing by `growth` inwards, so a
    stepped shaft has more cells than a bar of its largest step. Defaults: 24 radial and 48 axial
    cells, growth 1.12: a first cell of 0.21 mm at the side and 0.42 mm at the ends of a 50 x 100
    mm bar."""

    radial_cells: int = 24
    axial_cells: int = 48
    growth: float = 1.12

    def refined(self, times: int = 1) -> "PartSettings":
        """Cells doubled, growth rooted and the step limits halved `times` times."""
        f = 2 ** times
        return replace(self, radial_cells=self.radial_cells * f, axial_cells=self.axial_cells * f,
                       growth=self.growth ** (1.0 / f), **self.refined_steps(times))


def first_width(length_m: float, cells: int, growth: float, both: bool) -> float:
    """Width of the cell at a graded end when `cells` cells grow by `growth` over length_m from one
    end (both=False) or from both ends (both=True).

    >>> round(first_width(0.025, 24, 1.12, False) * 1000, 4)
    0.2116
    """
    n = max(cells // 2 if both else cells, 1)
    span = length_m / 2.0 if both else length_m
    return span / n if growth == 1.0 else span * (growth - 1.0) / (growth ** n - 1.0)


def widths_from_first(length_m: float, first_m: float, growth: float, at_start: bool, at_end: bool) -> np.ndarray:
    """Cell widths over length_m that start at first_m at each graded end and grow by `growth`,
    as many cells as that takes (at least 2 per graded run), scaled to fill the length exactly.

    >>> w = widths_from_first(0.025, 0.0002116, 1.12, False, True)
    >>> w.size, round(float(w.sum()), 12), round(float(w[-1]) * 1000, 3)
    (24, 0.025, 0.212)
    """
    both = at_start and at_end
    span = length_m / 2.0 if both else length_m
    if growth == 1.0:
        n = int(np.ceil(span / first_m - 1e-9))
    else:
        n = int(np.ceil(np.log(1.0 + span * (growth - 1.0) / first_m) / np.log(growth) - 1e-9))
    n = max(n, 2)
    run = growth ** np.arange(n)
    if both:
        raw = np.concatenate([run, run[::-1]])
    elif at_start:
        raw = run
    elif at_end:
        raw = run[::-1]
    else:
        raw = np.ones(n)
    return raw * (length_m / raw.sum())


def scaled(q, factor: float):
    """The same medium (a quenchants.Quenchant) with its table h multiplied by factor (radiation
    unchanged): an end face's own severity, e.g. under a longer or shorter vapour blanket."""
    from dataclasses import replace

    if factor == 1.0:
        return q
    return replace(q, name=f"{q.name} (h x {factor:g})", htc_w_m2k=np.asarray(q.htc_w_m2k, dtype=float) * factor,
                   listed_grossmann_h=None, listed_probe=None)
