"""Maps of a finite part's half-section: hardness (HRC) and martensite, in the program's own look.

The half-section lies with its axis along the bottom edge (z to the right, from the lower end; r
up), drawn to scale. Hardness: a sequential scale from pale sand (soft) through ochre to ink blue
(hard), the palette of the other figures; cells below HRC 20 (where HRC does not apply, ASTM E140)
in flat grey; thin contours every 5 HRC and a heavy one at the requirement's HRC. Martensite: pale
to deep teal, with the 50 % line (the trade's usual hardened-depth boundary). The softest surface
and section points and the profile line (mid-length) are marked.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
from matplotlib.colors import LinearSegmentedColormap

from .cautions import SHORT_CAUTION
from .plots import INK, _footer, _save, _units, plt

HARDNESS_COLOURS = LinearSegmentedColormap.from_list("quenchwise_hardness", ["#f4ead5", "#d9a441", "#8c5a2b", INK])
MARTENSITE_COLOURS = LinearSegmentedColormap.from_list("quenchwise_martensite", ["#f7f4ee", "#9cc5c0", "#2a6f6f", "#123c3c"])
BELOW_SCALE = "#c9c9c9"
REQUIREMENT_COLOUR = "#a4343a"


def _faces(result):
    f = result.field
    r_faces = np.concatenate([[f.r_m[0] - 0.5 * f.dr_m[0]], f.r_m + 0.5 * f.dr_m]) * 1000.0
    z_faces = np.concatenate([[0.0], np.cumsum(f.dz_m)]) * 1000.0
    return r_faces, z_faces


def _outline(ax, result, length) -> None:
    """The part's profile (steps, bore), drawn as a thin ink line."""
    part = result.field.part
    ends = np.asarray(part.step_ends_m) * 1000.0
    radii = np.asarray(part.radii_m) * 1000.0
    zs, rs = [0.0], [part.bore_m * 1000.0]
    for i, r in enumerate(radii):
        zs += [ends[i], ends[i + 1]]
        rs += [r, r]
    zs += [ends[-1], ends[-1]]
    rs += [part.bore_m * 1000.0, part.bore_m * 1000.0]
    ax.plot(length(np.array(zs)), length(np.array(rs)), color=INK, lw=0.9)
    ax.plot(length(np.array([0.0, ends[-1]])), length(np.array([part.bore_m, part.bore_m]) * 1000.0), color=INK, lw=0.9,
            ls="-." if part.bore_m == 0 else "-")


def _figure(result, u):
    """A figure laid out in inches around a to-scale axes: title and legend above, the colour bar
    below the z label, the caution at the foot."""
    part = result.field.part
    length_mm, radius_mm = part.length_m * 1000.0, part.outer_m * 1000.0
    ax_w = 6.4
    ax_h = ax_w * radius_mm / length_mm
    if ax_h > 3.6:                       # a short, wide part (a disc): limit the height
        ax_h = 3.6
        ax_w = ax_h * length_mm / radius_mm
    top, bottom, left = 1.1, 1.45, 0.8
    fig_w, fig_h = 8.0, ax_h + top + bottom
    fig = plt.figure(figsize=(fig_w, fig_h))
    ax = fig.add_axes([left / fig_w, bottom / fig_h, ax_w / fig_w, ax_h / fig_h])
    k = u.length(1.0)
    ax.set_xlim(0.0, k * length_mm)
    ax.set_ylim(0.0, k * radius_mm)
    ax.set_aspect("equal", adjustable="box")
    ax.set_xlabel(f"z from the lower end [{u.length_unit}]")
    ax.set_ylabel(f"r [{u.length_unit}]")
    cax = fig.add_axes([left / fig_w, 0.72 / fig_h, 0.45 * min(ax_w, 6.4) / fig_w, 0.12 / fig_h])
    fig.text(0.02, 1.0 - 0.12 / fig_h, f"{result.case.title or 'part'}", fontsize=10, ha="left", va="top")
    return fig, ax, cax


def _colour_bar(fig, mesh, cax, label: str) -> None:
    fig.colorbar(mesh, cax=cax, orientation="horizontal")
    cax.tick_params(labelsize=7)
    box = cax.get_position()
    fig.text(box.x1 + 0.015, box.y0 + 0.5 * box.height, label, fontsize=8, ha="left", va="center")


def _marks(ax, result, u) -> None:
    soft = result.softest()
    zp = result.field.part.profile_z_m * 1000.0
    ax.axvline(u.length(zp), color="#555555", lw=0.8, ls="--")
    ax.annotate("profile line", (u.length(zp), 0), xytext=(3, 3), textcoords="offset points", fontsize=7, color="#555555")
    for key, marker, label in (("surface", "v", "softest surface"), ("section", "X", "softest in the section")):
        if key in soft:
            p = soft[key]
            hrc = f"{p['hrc']:.1f} HRC" if p["hrc"] is not None else f"{p['hv']:.0f} HV"
            ax.plot(u.length(p["z_mm"]), u.length(p["r_mm"]), marker=marker, ms=7, color="white", mec="black", mew=0.8,
                    ls="none", label=f"{label}: {hrc} at r {u.fmt_length(p['r_mm'])}, z {u.fmt_length(p['z_mm'])}")
    ax.legend(frameon=False, fontsize=7, loc="lower left", bbox_to_anchor=(0.0, 1.02), ncol=1, borderaxespad=0.0)


def hardness_map(result, out_dir: Path, units=None) -> list[Path]:
    """hardness_map.png/.svg: HRC over the half-section (see the module docstring)."""
    u = _units(units)
    f = result.field
    r_faces, z_faces = _faces(result)
    zz, rr = u.length(1.0) * z_faces, u.length(1.0) * r_faces
    hrc = f.grid(f.hrc).T                     # (nr, nz): r up, z right
    below = f.grid(np.where(np.isfinite(f.hrc), np.nan, 1.0)).T
    fig, ax, cax = _figure(result, u)
    finite = hrc[np.isfinite(hrc)]
    lo, hi = (float(finite.min()), float(finite.max())) if finite.size else (20.0, 68.0)
    lo, hi = min(lo, hi - 5.0), max(hi, lo + 5.0)
    mesh = ax.pcolormesh(zz, rr, np.ma.masked_invalid(hrc), cmap=HARDNESS_COLOURS, vmin=lo, vmax=hi, shading="flat")
    if np.isfinite(below).any():
        ax.pcolormesh(zz, rr, np.ma.masked_invalid(below), cmap=LinearSegmentedColormap.from_list("g", [BELOW_SCALE] * 2),
                      shading="flat")
    zc, rc = u.length(1.0) * f.z_m * 1000.0, u.length(1.0) * f.r_m * 1000.0
    step = 1.0 if hi - lo <= 6.0 else (2.0 if hi - lo <= 12.0 else 5.0)
    levels = np.arange(np.ceil(lo / step) * step, hi, step)
    if finite.size and levels.size:
        cs = ax.contour(zc, rc, np.ma.masked_invalid(hrc), levels=levels, colors="#ffffff", linewidths=0.5, alpha=0.8)
        ax.clabel(cs, fontsize=6, fmt="%.0f")
    req = result.case.requirement
    title_req = ""
    if req is not None and req.min_hrc is not None and finite.size and lo < req.min_hrc < hi:
        ax.contour(zc, rc, np.ma.masked_invalid(hrc), levels=[req.min_hrc], colors=REQUIREMENT_COLOUR, linewidths=1.8)
        title_req = f"; heavy line: the requirement's {req.min_hrc:g} HRC"
    elif req is not None and req.min_hrc is not None:
        title_req = f"; requirement {req.min_hrc:g} HRC: " + ("met everywhere" if finite.size and lo >= req.min_hrc
                                                               else "not met anywhere")
    _outline(ax, result, lambda v: u.length(1.0) * np.asarray(v))
    _marks(ax, result, u)
    _colour_bar(fig, mesh, cax, "HRC as quenched (ASTM E140)")
    h = fig.get_figheight()
    fig.text(0.02, 1.0 - 0.36 / h, f"hardness over the half-section (axis at the bottom edge); grey: below HRC 20; "
             f"white lines every {step:g} HRC" + title_req, fontsize=7, color="#555555", ha="left", va="top")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "hardness_map")


def martensite_map(result, out_dir: Path, units=None) -> list[Path]:
    """martensite_map.png/.svg: martensite % over the half-section with the 50 % line."""
    u = _units(units)
    f = result.field
    r_faces, z_faces = _faces(result)
    zz, rr = u.length(1.0) * z_faces, u.length(1.0) * r_faces
    m = 100.0 * f.grid(f.fractions["martensite"]).T
    fig, ax, cax = _figure(result, u)
    mesh = ax.pcolormesh(zz, rr, np.ma.masked_invalid(m), cmap=MARTENSITE_COLOURS, vmin=0.0, vmax=100.0, shading="flat")
    zc, rc = u.length(1.0) * f.z_m * 1000.0, u.length(1.0) * f.r_m * 1000.0
    ok = m[np.isfinite(m)]
    if ok.size and ok.min() < 50.0 < ok.max():
        cs = ax.contour(zc, rc, np.ma.masked_invalid(m), levels=[50.0], colors=REQUIREMENT_COLOUR, linewidths=1.6)
        ax.clabel(cs, fontsize=6.5, fmt="50 %%")
    _outline(ax, result, lambda v: u.length(1.0) * np.asarray(v))
    _marks(ax, result, u)
    _colour_bar(fig, mesh, cax, "martensite [%]")
    h = fig.get_figheight()
    fig.text(0.02, 1.0 - 0.36 / h, "martensite over the half-section (axis at the bottom edge); red line: 50 % martensite",
             fontsize=7, color="#555555", ha="left", va="top")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "martensite_map")


def write_part_files(result, out_dir: Path, units=None) -> None:
    """The `run` output of a finite part: result.h5 (every cell, r_mm and z_mm per node),
    profile.csv (the mid-length radius, the contract's columns), profile_axial.csv (axis and
    surface), the hardness and cooling figures of the profile line and the two maps."""
    from .plots import cooling_figure, hardness_figure
    from .results import profile_csv_text
    from .results_rz import axial_csv_text, write_part_h5
    from .units import us_csv_text

    u = _units(units)
    out_dir = Path(out_dir)
    write_part_h5(result, out_dir / "result.h5")
    for name, text in (("profile.csv", profile_csv_text(result)), ("profile_axial.csv", axial_csv_text(result))):
        (out_dir / name).write_text(us_csv_text(text) if u.us else text, "utf-8")
    hardness_figure(result, out_dir, u)
    cooling_figure(result, out_dir, u)
    hardness_map(result, out_dir, u)
    martensite_map(result, out_dir, u)


def sheet_map(ax, result, units=None) -> None:
    """The part block of the hardening sheet for a finite part: its HRC map in the half-section
    (to scale, the requirement's contour), the profile line the sheet's curve and table follow,
    the softest section point and the part's dimensions below."""
    u = _units(units)
    f = result.field
    part = f.part
    k = u.length(1.0)
    r_faces, z_faces = _faces(result)
    hrc = f.grid(f.hrc).T
    finite = hrc[np.isfinite(hrc)]
    lo, hi = (float(finite.min()), float(finite.max())) if finite.size else (20.0, 68.0)
    lo, hi = min(lo, hi - 5.0), max(hi, lo + 5.0)
    mesh = ax.pcolormesh(k * z_faces, k * r_faces, np.ma.masked_invalid(hrc), cmap=HARDNESS_COLOURS, vmin=lo, vmax=hi,
                         shading="flat")
    below = f.grid(np.where(np.isfinite(f.hrc), np.nan, 1.0)).T
    if np.isfinite(below).any():
        ax.pcolormesh(k * z_faces, k * r_faces, np.ma.masked_invalid(below),
                      cmap=LinearSegmentedColormap.from_list("g", [BELOW_SCALE] * 2), shading="flat")
    req = result.case.requirement
    if req is not None and req.min_hrc is not None and finite.size and lo < req.min_hrc < hi:
        ax.contour(k * f.z_m * 1000.0, k * f.r_m * 1000.0, np.ma.masked_invalid(hrc), levels=[req.min_hrc],
                   colors=REQUIREMENT_COLOUR, linewidths=1.2)
    _outline(ax, result, lambda v: k * np.asarray(v))
    ax.axvline(k * part.profile_z_m * 1000.0, color="#555555", lw=0.7, ls="--")
    soft = result.softest().get("section")
    if soft:
        ax.plot(k * soft["z_mm"], k * soft["r_mm"], marker="X", ms=6, color="white", mec="black", mew=0.7)
    ax.set_xlim(0.0, k * part.length_m * 1000.0)
    ax.set_ylim(0.0, k * part.outer_m * 1000.0)
    ax.set_aspect("equal", adjustable="box")
    ax.tick_params(labelsize=6)
    # The colour bar below the tick labels, placed in inches: the map is drawn to scale, so its
    # height (and with it any offset in axes units) depends on the part's proportions.
    fig, pos = ax.figure, ax.get_position()
    width_in = pos.width * fig.get_figwidth()
    height_in = min(pos.height * fig.get_figheight(), width_in * part.outer_m / part.length_m)
    drop_in, thick_in = 0.27, 0.07
    bar = ax.inset_axes([0.0, -(drop_in + thick_in) / height_in, 0.6, thick_in / height_in])
    ax.figure.colorbar(mesh, cax=bar, orientation="horizontal")
    bar.tick_params(labelsize=5.5)
    dims = result.case.dimensions_mm
    what = {"bar": f"bar \u2300 {u.fmt_length(dims.get('diameter_mm', 0), 1)}",
            "ring": f"ring \u2300 {u.fmt_length(dims.get('outer_diameter_mm', 0), 1)} / "
                    f"{u.fmt_length(dims.get('inner_diameter_mm', 0), 1)}",
            "stepped_shaft": "stepped shaft \u2300 " + " / ".join(f"{u.length(d):g}" for d in dims.get("step_diameters_mm", []))
                             + f" {u.length_unit}"}[part.kind]
    import textwrap

    ax.set_title(textwrap.fill(f"{what} x {u.fmt_length(part.length_m * 1000.0, 1)}: HRC in the half-section; "
                               "dashed: the profile line of the curve and table; X: softest", 58),
                 fontsize=6.5, color=INK, loc="left")
