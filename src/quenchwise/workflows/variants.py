"""Variations of a case for the batched questions: another quenchant, size or chemistry."""

from __future__ import annotations

from dataclasses import replace

from ..case import Case
from ..thermal.geometry import Section
from ..thermal.quenchants import Quenchant


#: A bath at or above the case's end temperature (hot oil, salt) ends the quench this far above
#: the bath; the part then cools to room temperature in air, where the remaining austenite can
#: still turn to martensite (workflows.simulate.ROOM_C).
HOT_BATH_END_MARGIN_K = 20.0


def with_quenchant(case: Case, quenchant: Quenchant) -> Case:
    """The same part in another quenchant; a tube bore that shared the outer medium follows it.
    The quench ends at the case's end_c, or HOT_BATH_END_MARGIN_K above a hotter bath."""
    inner = case.inner
    if inner is not None and inner is case.outer:
        inner = quenchant
    baths = [q.bath_c for q in (quenchant, inner) if q is not None]
    end_c = max(case.end_c, max(baths) + HOT_BATH_END_MARGIN_K)
    return replace(case, outer=quenchant, inner=inner, end_c=end_c)


def size_label(case: Case) -> str:
    """What 'size' means for this shape: the dimension a sizing search varies."""
    if getattr(case, "finite", None) is not None and case.finite.part.kind == "stepped_shaft":
        return "largest_step_diameter_mm"
    return {"plate": "thickness_mm", "bar": "diameter_mm", "sphere": "diameter_mm", "tube": "wall_mm"}[case.section.shape]


def case_size_mm(case: Case) -> float:
    s = case.section
    if s.shape == "tube":
        return (s.outer_m - s.inner_m) * 1000.0
    if s.shape == "plate":
        return case.dimensions_mm["thickness_mm"]
    return 2.0 * s.outer_m * 1000.0


def with_size(case: Case, size_mm: float) -> Case:
    """The same case at another size: plate thickness, bar or sphere diameter, or tube wall
    (bore kept, outer diameter grows)."""
    s, dims = case.section, dict(case.dimensions_mm)
    size_m = size_mm / 1000.0
    if s.shape == "plate":
        section = Section.plate(size_m, dims.get("faces", "both"))
        dims["thickness_mm"] = size_mm
    elif s.shape in ("bar", "sphere"):
        section = (Section.bar if s.shape == "bar" else Section.sphere)(size_m)
        dims["diameter_mm"] = size_mm
    else:
        section = Section("tube", s.inner_m, s.inner_m + size_m, inner_quenched=s.inner_quenched)
        dims["outer_diameter_mm"] = round(2000.0 * (s.inner_m + size_m), 6)
    if getattr(case, "finite", None) is not None:     # a finite part: the same length, the new section
        return _finite_variant(replace(case, section=section, dimensions_mm=dims), size_mm=size_mm)
    return replace(case, section=section, dimensions_mm=dims)


def with_length(case: Case, length_mm: float) -> Case:
    """A finite bar or ring at another length (its section kept); a stepped shaft's steps all
    scaled in length."""
    return _finite_variant(case, length_mm=length_mm)


def _finite_variant(case: Case, size_mm: float | None = None, length_mm: float | None = None) -> Case:
    """The finite part of a case rebuilt after with_size (diameter of a bar, wall of a ring, the
    largest diameter of a stepped shaft with every step scaled alike) or at another length."""
    from ..thermal.part_shape import FinitePart

    part, dims = case.finite.part, dict(case.dimensions_mm)
    radii, lengths = part.radii_m, part.lengths_m
    if length_mm is not None:
        lengths = tuple(x * length_mm / 1000.0 / part.length_m for x in lengths)
        dims["length_mm"] = length_mm
    if size_mm is not None:
        if part.kind == "ring":
            radii = (case.section.outer_m,)
        else:
            radii = tuple(r * case.section.outer_m / part.outer_m for r in radii)
    if part.kind == "stepped_shaft":
        dims.pop("diameter_mm", None)
        dims["step_diameters_mm"] = [round(2000.0 * r, 6) for r in radii]
        dims["step_lengths_mm"] = [round(1000.0 * x, 6) for x in lengths]
    fillet = min(part.fillet_m, *[abs(a - b) for a, b in zip(radii[:-1], radii[1:]) if a != b], *lengths) \
        if part.fillet_m > 0 else 0.0
    new = FinitePart(part.kind, tuple(radii), tuple(lengths), part.bore_m, fillet)
    return replace(case, dimensions_mm=dims, finite=replace(case.finite, part=new))
