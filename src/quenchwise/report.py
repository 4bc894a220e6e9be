"""The one-page hardening sheet (PDF and PNG) for the drawing or the process record.

Layout of our own: an ink-blue title strip; the part sketch with its dimension and the process
block side by side; the hardness-depth curve with the requirement drawn in; a table at standard
depths; key numbers; models, version, case hash and the cautions along the foot.
"""

from __future__ import annotations

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
from matplotlib.patches import Circle, Rectangle, Wedge  # noqa: E402

from . import __version__  # noqa: E402
from .cautions import CAUTION  # noqa: E402
from .hardness import hrc_from_hv, hv_from_hrc  # noqa: E402
from .plots import add_hrc_scale  # noqa: E402
from .workflows.requirement import (  # noqa: E402
    effective_depth_mm,
    final_hv,
    limit_hardness_hrc,
    meets,
    value_at_depths,
)

INK = "#1d3557"
ACCENT = "#c77d1a"
STANDARD_DEPTHS_MM = (0.0, 0.5, 1.0, 2.0, 3.0, 5.0, 8.0, 10.0, 15.0, 20.0, 25.0, 30.0, 40.0, 50.0, 75.0, 100.0)


def sheet_depths(total_mm: float) -> list[float]:
    """Standard reading depths inside the section, ending at the centre / through the wall.

    >>> sheet_depths(12.5)
    [0.0, 0.5, 1.0, 2.0, 3.0, 5.0, 8.0, 10.0, 12.5]
    """
    out = [d for d in STANDARD_DEPTHS_MM if d < total_mm - 1e-9]
    return out + [round(total_mm, 3)]


def _severity_text(result) -> str:
    h = result.extra.get("equivalent_h", {}).get("outer")
    return "" if h is None else f" (equivalent H {h:.2f} 1/in)"


def sheet_rows(result) -> list[dict]:
    total = result.history.section.thickness_m * 1000.0
    depths = np.array(sheet_depths(total))
    hv = value_at_depths(result, final_hv(result), depths)
    frac = {k: 100.0 * value_at_depths(result, result.fractions[k], depths)
            for k in ("martensite", "bainite", "ferrite", "pearlite", "austenite")}
    hrc = hrc_from_hv(hv)
    return [{"depth_mm": float(d), "hv": float(hv[i]), "hrc": None if not np.isfinite(hrc[i]) else float(hrc[i]),
             "martensite_pct": float(frac["martensite"][i]), "bainite_pct": float(frac["bainite"][i]),
             "ferrite_pearlite_pct": float(frac["ferrite"][i] + frac["pearlite"][i]),
             "retained_austenite_pct": float(frac["austenite"][i])} for i, d in enumerate(depths)]


def key_numbers(result) -> dict:
    limit = limit_hardness_hrc(result)
    centre = result.points()[-1][1]
    req = result.case.requirement
    return {
        "limit_hrc": round(limit, 1),
        "effective_depth_mm": round(effective_depth_mm(result, limit), 2),
        "centre_martensite_pct": round(100.0 * result.at(result.fractions["martensite"], centre), 1),
        "max_retained_austenite_pct": round(100.0 * float(np.max(result.fractions["austenite"])), 1),
        "ms_c": None if not np.isfinite(result.ms_c) else round(result.ms_c, 0),
        "meets_requirement": None if req is None else bool(meets(result, req)),
        "requirement": None if req is None else req.describe(),
    }


def _sketch(ax, result) -> None:
    s = result.history.section
    dims = result.case.dimensions_mm
    ax.set_aspect("equal")
    ax.axis("off")
    steel = "#b9c4d0"
    if s.shape in ("bar", "sphere"):
        ax.add_patch(Circle((0, 0), 1.0, fc=steel, ec=INK, lw=1.5))
        if s.shape == "sphere":
            ax.add_patch(Wedge((0, 0), 1.0, 200, 340, width=0.0, ec=INK, lw=0.6, ls="--"))
        label = f"\u2300 {dims['diameter_mm']:g} mm {s.shape}"
        ax.annotate("", (-1, -1.25), (1, -1.25), arrowprops=dict(arrowstyle="<->", color=INK))
    elif s.shape == "tube":
        ro, ri = 1.0, s.inner_m / s.outer_m
        ax.add_patch(Circle((0, 0), ro, fc=steel, ec=INK, lw=1.5))
        ax.add_patch(Circle((0, 0), ri, fc="white", ec=INK, lw=1.2))
        label = f"tube \u2300 {dims['outer_diameter_mm']:g} / {dims['inner_diameter_mm']:g} mm"
        ax.annotate("", (-1, -1.25), (1, -1.25), arrowprops=dict(arrowstyle="<->", color=INK))
    else:
        ax.add_patch(Rectangle((-1.2, -0.35), 2.4, 0.7, fc=steel, ec=INK, lw=1.5))
        faces = "both faces quenched" if dims.get("faces", "both") == "both" else "one face quenched"
        label = f"plate {dims['thickness_mm']:g} mm thick, {faces}"
        ax.annotate("", (1.35, -0.35), (1.35, 0.35), arrowprops=dict(arrowstyle="<->", color=INK))
    ax.set_xlim(-1.5, 1.5)
    ax.set_ylim(-1.6, 1.2)
    ax.text(0, -1.55, label, ha="center", va="bottom", fontsize=8.5, color=INK)


def write_sheet(result, out_dir: Path, stem: str = "sheet") -> list[Path]:
    """Write DIR/sheet.pdf and DIR/sheet.png; returns the paths."""
    case = result.case
    fig = plt.figure(figsize=(8.27, 11.69))
    fig.patch.set_facecolor("white")
    strip = fig.add_axes([0.0, 0.94, 1.0, 0.06])
    strip.axis("off")
    strip.add_patch(Rectangle((0, 0), 1, 1, transform=strip.transAxes, fc=INK))
    strip.text(0.03, 0.55, "HARDENING SHEET", color="white", fontsize=15, weight="bold", va="center")
    strip.text(0.03, 0.18, case.title or "untitled case", color="#dfe7ef", fontsize=9.5, va="center")
    strip.text(0.97, 0.55, f"quenchwise {__version__}", color="white", fontsize=9, ha="right", va="center")

    _sketch(fig.add_axes([0.04, 0.70, 0.34, 0.22]), result)

    c = case.composition.as_dict()
    chem = "  ".join(f"{k.capitalize()} {v:.2f}" for k, v in c.items() if v > 0)
    st = result.state
    lines = [
        ("Steel", f"{case.grade or 'custom chemistry'}   grain size ASTM {case.grain_size:g}"),
        ("Chemistry, wt%", chem),
        ("Austenitize", f"{case.austenitize_c:g} C   (Ae1 {st.ae1:.0f} C, {'Acm' if st.hypereutectoid else 'Ae3'} {st.upper_critical:.0f} C;"
                        f" austenite {st.carbon:.2f} %C)"),
        ("Quench", f"{case.outer.name} at {case.outer.bath_c:g} C" + _severity_text(result)
                   + (f"; bore {case.inner.name}" if case.inner else "")),
        ("Quench ends", f"hottest point below {case.end_c:g} C after {result.history.time_s[-1]:.0f} s"),
        ("Temper", "none (as quenched)" if case.temper is None else f"{case.temper.temperature_c:g} C for {case.temper.hours:g} h"),
    ]
    info = fig.add_axes([0.42, 0.70, 0.55, 0.22])
    info.axis("off")
    for i, (k, v) in enumerate(lines):
        y = 0.95 - i * 0.16
        info.text(0.0, y, k, fontsize=8, color="#666666", va="top")
        info.text(0.30, y, v, fontsize=8.5, color="black", va="top", wrap=True)

    ax = fig.add_axes([0.10, 0.42, 0.80, 0.25])
    order = np.argsort(result.depth_mm)
    hv = final_hv(result)
    ax.plot(result.depth_mm[order], hv[order], color=INK, lw=2.2,
            label="hardness" + (" after tempering" if case.temper else " as quenched"))
    if case.temper is not None:
        ax.plot(result.depth_mm[order], result.hv[order], color=INK, lw=1.0, ls="--", label="as quenched")
    req = case.requirement
    if req is not None and req.min_hrc is not None:
        lim = float(hv_from_hrc(req.min_hrc))
        depth = result.history.section.thickness_m * 1000.0 if req.depth_mm is None else req.depth_mm
        ax.plot([0, depth], [lim, lim], color=ACCENT, lw=1.6, label=f"required: {req.describe()}")
        ax.plot([depth, depth], [ax.get_ylim()[0], lim], color=ACCENT, lw=0.8, ls=":")
    ax.set_xlim(0, result.history.section.thickness_m * 1000.0)
    ax.set_xlabel("depth below quenched surface [mm]")
    ax.set_ylabel("HV")
    ax.grid(True, color="#e6e6e6", lw=0.6)
    ax.legend(frameon=False, fontsize=7.5, loc="lower left")
    add_hrc_scale(ax, "HRC")

    rows = sheet_rows(result)
    table_ax = fig.add_axes([0.06, 0.16, 0.55, 0.22])
    table_ax.axis("off")
    cells = [[f"{r['depth_mm']:g}", f"{r['hv']:.0f}", "-" if r["hrc"] is None else f"{r['hrc']:.1f}",
              f"{r['martensite_pct']:.0f}", f"{r['bainite_pct']:.0f}", f"{r['ferrite_pearlite_pct']:.0f}",
              f"{r['retained_austenite_pct']:.0f}"] for r in rows]
    table = table_ax.table(cellText=cells, colLabels=["depth mm", "HV", "HRC", "M %", "B %", "F+P %", "RA %"],
                           loc="upper left", cellLoc="center")
    table.auto_set_font_size(False)
    table.set_fontsize(7.5)
    table.scale(1.0, 1.05)
    for (r, _), cell in table.get_celld().items():
        cell.set_edgecolor("#c9d2dc")
        if r == 0:
            cell.set_facecolor("#e8eef4")

    k = key_numbers(result)
    keys = [
        ("Effective depth", f"{k['effective_depth_mm']:g} mm to {k['limit_hrc']:g} HRC"),
        ("Centre martensite", f"{k['centre_martensite_pct']:g} %"),
        ("Retained austenite", f"up to {k['max_retained_austenite_pct']:g} %"),
        ("Ms", "-" if k["ms_c"] is None else f"{k['ms_c']:.0f} C"),
    ]
    if k["requirement"]:
        keys.append(("Requirement", ("MET: " if k["meets_requirement"] else "NOT MET: ") + k["requirement"]))
    kn = fig.add_axes([0.64, 0.16, 0.33, 0.22])
    kn.axis("off")
    kn.text(0.0, 1.0, "Key numbers", fontsize=10, color=INK, weight="bold", va="top")
    for i, (a, b) in enumerate(keys):
        kn.text(0.0, 0.86 - i * 0.15, a, fontsize=7.5, color="#666666", va="top")
        kn.text(0.0, 0.80 - i * 0.15, b, fontsize=8.5, va="top", wrap=True)

    foot = fig.add_axes([0.04, 0.01, 0.92, 0.13])
    foot.axis("off")
    models = (f"Models: kinetics {case.model} (Li et al. 1998, Scheil additivity); martensite {case.martensite} "
              "(Koistinen & Marburger 1959); hardness Maynier, Jungmann & Dollet (1978); ASTM E140 conversion; "
              "heat conduction FiPy, temperature-dependent properties.")
    foot.text(0.0, 0.98, models, fontsize=6.8, va="top", wrap=True)
    foot.text(0.0, 0.62, f"Case file {case.source_name or '-'}  SHA-256 {case.source_sha256[:16]}",
              fontsize=6.8, va="top", family="monospace")
    foot.text(0.0, 0.45, CAUTION, fontsize=6.8, va="top", wrap=True, color="#7a1f1f")

    out_dir = Path(out_dir)
    paths = []
    for ext in ("pdf", "png"):
        p = out_dir / f"{stem}.{ext}"
        tmp = p.with_name(f".{p.name}.part")
        fig.savefig(tmp, format=ext, dpi=110, metadata={"Creator": f"quenchwise {__version__}"} if ext == "pdf" else None)
        tmp.replace(p)
        paths.append(p)
    plt.close(fig)
    return paths
