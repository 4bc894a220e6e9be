"""The one-page hardening sheet (PDF and PNG) for the drawing or the process record.

Layout of our own: an ink-blue title strip; the part sketch with its dimension and the process
block side by side; the hardness-depth curve with the requirement drawn in; a table at standard
depths; key numbers; models, version, case hash and the cautions along the foot.
"""

from __future__ import annotations

import textwrap
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
from matplotlib.patches import Circle, Rectangle, Wedge  # noqa: E402

from .version import __version__  # noqa: E402
from .cautions import CAUTION  # noqa: E402
from .text_output import chemistry_text  # noqa: E402
from .hardness import hrc_from_hv, hv_from_hrc  # noqa: E402
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


def _sketch(ax, result, units=None) -> None:
    if getattr(result, "finite", False):   # a finite part in (r, z): its hardness map (part_maps)
        from .part_maps import sheet_map

        return sheet_map(ax, result, units)
    s = result.history.section
    dims = result.case.dimensions_mm
    ax.set_aspect("equal")
    ax.axis("off")
    steel = "#b9c4d0"
    if units is not None and units.us:
        dims = {k: (round(units.length(v), 3) if k.endswith("_mm") else v) for k, v in dims.items()}
    mm = units.length_unit if units is not None else "mm"
    if s.shape in ("bar", "sphere"):
        ax.add_patch(Circle((0, 0), 1.0, fc=steel, ec=INK, lw=1.5))
        if s.shape == "sphere":
            ax.add_patch(Wedge((0, 0), 1.0, 200, 340, width=0.0, ec=INK, lw=0.6, ls="--"))
        label = f"\u2300 {dims['diameter_mm']:g} {mm} {s.shape}"
        ax.annotate("", (-1, -1.25), (1, -1.25), arrowprops=dict(arrowstyle="<->", color=INK))
    elif s.shape == "tube":
        ro, ri = 1.0, s.inner_m / s.outer_m
        ax.add_patch(Circle((0, 0), ro, fc=steel, ec=INK, lw=1.5))
        ax.add_patch(Circle((0, 0), ri, fc="white", ec=INK, lw=1.2))
        label = f"tube \u2300 {dims['outer_diameter_mm']:g} / {dims['inner_diameter_mm']:g} {mm}"
        ax.annotate("", (-1, -1.25), (1, -1.25), arrowprops=dict(arrowstyle="<->", color=INK))
    else:
        ax.add_patch(Rectangle((-1.2, -0.35), 2.4, 0.7, fc=steel, ec=INK, lw=1.5))
        faces = "both faces quenched" if dims.get("faces", "both") == "both" else "one face quenched"
        label = f"plate {dims['thickness_mm']:g} {mm} thick, {faces}"
        ax.annotate("", (1.35, -0.35), (1.35, 0.35), arrowprops=dict(arrowstyle="<->", color=INK))
    ax.set_xlim(-1.5, 1.5)
    ax.set_ylim(-1.6, 1.2)
    ax.text(0, -1.55, label, ha="center", va="bottom", fontsize=8.5, color=INK)


#: Page sizes [inch] (ISO 216 A4 210 x 297 mm; US Letter 8.5 x 11 in).
PAGE_SIZES = {"a4": (8.27, 11.69), "letter": (8.5, 11.0)}

#: The kinetics and martensite laws each case value names, with their published sources.
KINETICS_TEXT = {
    "li1998": "Li, Niebuhr, Meekisho & Atteridge (1998) with Scheil additivity",
    "li1998-a255": "Li et al. (1998), carbon-dependent multiplier fitted to ASTM A255 end-quench data "
                   "(kinetics/calibrated.py), with Scheil additivity",
    "li1998-multigrade": "Li et al. (1998) with composition-dependent correction factors per product fitted on "
                         "16 SAE J1268 H-bands and handbook as-quenched bars (kinetics/multigrade.py), with "
                         "Scheil additivity",
    "kirkaldy1983": "Kirkaldy & Venugopalan (1983) with Scheil additivity",
    "none": "none (heat conduction only)",
}
MARTENSITE_TEXT = {"koistinen_marburger": "Koistinen & Marburger (1959)",
                   "van_bohemen_sietsma": "van Bohemen & Sietsma (2009)"}

#: Hardness test methods by scale (test forces from the standards, memory). The depth profile is
#: read as a Vickers traverse on a cross-section (common practice, no source).
TEST_METHODS = {
    "HRC": "Rockwell C (HRC) per ASTM E18 / ISO 6508-1: diamond cone, total test force 150 kgf (1471 N)",
    "HRB": "Rockwell B (HRB) per ASTM E18 / ISO 6508-1: 1/16 in (1.588 mm) ball, total test force 100 kgf (980.7 N)",
    "HV": "Vickers HV10 per ASTM E92 / ISO 6507-1: test force 10 kgf (98.07 N)",
}
TRAVERSE_METHOD = "depth profile: Vickers HV1 traverse on a polished cross-section per ASTM E384 / ISO 6507-1 (9.807 N)"

#: The record fields shown at the top of the sheet, with their labels.
RECORD_FIELDS = (("part_number", "Part no."), ("drawing_number", "Drawing no."), ("revision", "Revision"),
                 ("customer", "Customer"), ("order_number", "Order no."), ("material_spec", "Material spec."),
                 ("heat_number", "Heat no."), ("date", "Date"))


def models_used(case) -> list[str]:
    """The published models this case actually used, in words, for the sheet and the summary.

    >>> from types import SimpleNamespace as N
    >>> models_used(N(model="kirkaldy1983", martensite="van_bohemen_sietsma", temper=None))[:2]
    ['kinetics: Kirkaldy & Venugopalan (1983) with Scheil additivity', 'martensite: van Bohemen & Sietsma (2009)']
    """
    from .kinetics import critical_temperature_note

    out = [f"kinetics: {KINETICS_TEXT.get(case.model, case.model)}",
           f"martensite: {MARTENSITE_TEXT.get(case.martensite, case.martensite)}"]
    if case.model != "none":
        out.append(f"critical temperatures: {critical_temperature_note(case.model)}")
        out.append("phase hardness: Maynier, Jungmann & Dollet (1978); scales: ASTM E140")
        if case.temper is not None:
            out.append("tempering: Hollomon & Jaffe (1945) parameter, Grange, Hribal & Porter (1977) "
                       "tempered martensite; first-stage drop of high-carbon martensite written to the handbook 52100 and 1095 tempering response (hardness/tempering.py)")
    out.append("heat conduction: FiPy finite volumes, temperature- and phase-dependent properties")
    return out


def hardness_test_method(rows: list[dict], record: dict | None = None) -> list[str]:
    """How to check the sheet: the record's own hardness_test if given, else the scale the surface
    reading falls in (HRC from HRC 20 up, HRB below it, HV beyond both), and the depth traverse.

    >>> hardness_test_method([{"hrc": 55.0, "hv": 595.0}])[0].startswith("surface: Rockwell C")
    True
    >>> hardness_test_method([{"hrc": None, "hv": 200.0}])[0].startswith("surface: Rockwell B")
    True
    """
    from .hardness import hrb_from_hv

    if record and record.get("hardness_test"):
        return [record["hardness_test"]]
    surface = rows[0]
    if surface.get("hrc") is not None:
        scale = "HRC"
    elif np.isfinite(hrb_from_hv(surface["hv"])):
        scale = "HRB"
    else:
        scale = "HV"
    return [f"surface: {TEST_METHODS[scale]}", TRAVERSE_METHOD]


def _field(ax, x, y, label, value, w=0.23, h=0.42, size=8.0):
    ax.add_patch(Rectangle((x, y), w, h, transform=ax.transAxes, fc="white", ec="#b8c4d0", lw=0.7))
    ax.text(x + 0.008, y + h - 0.06, label, transform=ax.transAxes, fontsize=6.3, color="#666666", va="top")
    ax.text(x + 0.008, y + 0.08, value or "", transform=ax.transAxes, fontsize=size, va="bottom")


def write_sheet(result, out_dir: Path, stem: str = "sheet", page: str = "a4", units=None,
                warnings: list[str] | None = None, refined: str = "") -> list[Path]:
    """Write DIR/sheet.pdf and DIR/sheet.png; returns the paths.

    page: "a4" or "letter"; units: a units.Units (None: mm and C); warnings: every warning of the
    run (None: result.warnings()); refined: a note on the numerics used for drawing, if any."""
    from .plots import finish_hardness_axis, hardness_scale, in_scale, requirement_line, smooth_profile
    from .units import Units

    u = units or Units("si")
    case = result.case
    record = dict(getattr(case, "record", {}) or {})
    if page not in PAGE_SIZES:
        raise ValueError(page)
    width, height = PAGE_SIZES[page]
    fig = plt.figure(figsize=(width, height))
    fig.patch.set_facecolor("white")
    strip = fig.add_axes([0.0, 0.95, 1.0, 0.05])
    strip.axis("off")
    strip.add_patch(Rectangle((0, 0), 1, 1, transform=strip.transAxes, fc=INK))
    strip.text(0.03, 0.6, "HARDENING SHEET", color="white", fontsize=15, weight="bold", va="center")
    strip.text(0.03, 0.2, case.title or "untitled case", color="#dfe7ef", fontsize=9.5, va="center")
    strip.text(0.97, 0.6, f"quenchwise {__version__}", color="white", fontsize=9, ha="right", va="center")
    strip.text(0.97, 0.2, f"page size {page.upper() if page == 'a4' else 'Letter'}", color="#dfe7ef", fontsize=7,
               ha="right", va="center")

    # Record block: two rows of four boxed fields; blank boxes are left for the hand.
    rec = fig.add_axes([0.03, 0.865, 0.94, 0.08])
    rec.axis("off")
    if "date" not in record:
        from datetime import date

        record["date"] = date.today().isoformat()
    for i, (key, label) in enumerate(RECORD_FIELDS):
        _field(rec, 0.005 + (i % 4) * 0.2475, 0.52 - (i // 4) * 0.5, label, record.get(key, ""), w=0.24, h=0.45)

    _sketch(fig.add_axes([0.04, 0.70, 0.30, 0.15]), result, u)

    c = case.composition.as_dict()
    chem = chemistry_text(c, "  ", "{:.2f}")
    st = result.state
    T = u.fmt_temperature
    lines = [
        ("Steel", f"{case.grade or 'custom chemistry'}   grain size ASTM {case.grain_size:g}"),
        ("Chemistry, wt%", chem),
        ("Austenitize", f"{T(case.austenitize_c)}   (Ae1 {T(st.ae1)}, {'Acm' if st.hypereutectoid else 'Ae3'} "
                        f"{T(st.upper_critical)}; austenite {st.carbon:.2f} %C)"),
        ("Quench", f"{case.outer.name} at {T(case.outer.bath_c)}" + _severity_text(result)
                   + (("; bore the same" if case.inner.name == case.outer.name else f"; bore {case.inner.name}")
                      if case.inner else "")),
        ("Quench ends", f"hottest point below {T(case.end_c)} after {result.history.time_s[-1]:.0f} s"),
        ("Temper", "none (as quenched)" if case.temper is None
                   else f"{T(case.temper.temperature_c)} for {case.temper.hours:g} h"),
    ]
    info = fig.add_axes([0.38, 0.70, 0.59, 0.15])
    info.axis("off")
    y = 0.97
    for k, v in lines:
        v = textwrap.fill(v, 66)
        info.text(0.0, y, k, fontsize=7.5, color="#666666", va="top")
        info.text(0.24, y, v, fontsize=8, color="black", va="top")
        y -= 0.165 + 0.1 * v.count("\n")  # a wrapped value pushes the next line down

    ax = fig.add_axes([0.10, 0.475, 0.74, 0.19])  # room on the right for HRC and an outer HRB scale
    hv = final_hv(result)
    scale = hardness_scale(hv, result.hv)
    total = result.history.section.thickness_m * 1000.0
    drawn = []
    for values, label, style, lw in ((hv, "hardness" + (" after tempering" if case.temper else " as quenched"), "-", 2.2),
                                     *(((result.hv, "as quenched", "--", 1.1),) if case.temper is not None else ())):
        y = in_scale(values, scale)
        x, ys = smooth_profile(result.depth_mm, y)
        ax.plot(u.length(1.0) * x, ys, color=INK, lw=lw, ls=style, label=label)
        drawn.append(y)
    req = case.requirement
    if req is not None and req.min_hrc is not None:
        drawn.append(np.array([req.min_hrc if scale == "HRC" else float(hv_from_hrc(req.min_hrc))]))
    ax.set_xlim(0, u.length(total))
    ax.set_xlabel(f"depth below the quenched surface [{u.length_unit}]", fontsize=8)
    ax.grid(True, color="#e6e6e6", lw=0.6)
    right = finish_hardness_axis(ax, scale, np.concatenate(drawn))
    requirement_line(ax, req, scale, total, colour=ACCENT, length=u.length, units=u)
    for a in [ax, right] + [t for t in fig.axes if t not in (ax, right) and t.get_position().bounds == ax.get_position().bounds]:
        a.tick_params(labelsize=7.5)  # the main axis and its twins (HRC / HV, an outer HRB scale)
        a.yaxis.label.set_size(8)
    ax.legend(frameon=False, fontsize=7, loc="lower left", bbox_to_anchor=(0.0, 1.0), ncol=3)

    rows = sheet_rows(result)
    jominy = getattr(result, "jominy_distance_mm", None)
    if jominy is not None:
        j = value_at_depths(result, np.where(np.isfinite(jominy), jominy, np.nan), [r["depth_mm"] for r in rows])
        for r, v in zip(rows, j):
            r["jominy_distance_mm"] = None if not np.isfinite(v) else float(v)
    table_ax = fig.add_axes([0.04, 0.215, 0.58, 0.21])
    table_ax.axis("off")
    labels = [f"depth {u.length_unit}", "HV", "HRC", "HRB", "M %", "B %", "F+P %", "RA %"]
    if jominy is not None:
        labels.append(f"J {u.length_unit}")
    cells = []
    for r in rows:
        hrb = None if r["hrc"] is not None else _hrb(r["hv"])
        cell = [f"{u.length(r['depth_mm']):.3g}" if u.us else f"{r['depth_mm']:g}", f"{r['hv']:.0f}",
                "-" if r["hrc"] is None else f"{r['hrc']:.1f}", "-" if hrb is None else f"{hrb:.0f}",
                f"{r['martensite_pct']:.0f}", f"{r['bainite_pct']:.0f}", f"{r['ferrite_pearlite_pct']:.0f}",
                f"{r['retained_austenite_pct']:.0f}"]
        if jominy is not None:
            jd = r.get("jominy_distance_mm")
            cell.append("-" if jd is None else f"{u.length(jd):.3g}")
        cells.append(cell)
    table = table_ax.table(cellText=cells, colLabels=labels, loc="upper left", cellLoc="center")
    table.auto_set_font_size(False)
    table.set_fontsize(7)
    for (r, _), cell in table.get_celld().items():
        cell.set_height(min(0.085, 1.0 / (len(rows) + 1)))  # every row fits above the sign-off boxes
        cell.set_edgecolor("#c9d2dc")
        if r == 0:
            cell.set_facecolor("#e8eef4")

    k = key_numbers(result)
    keys = [
        ("Effective depth", f"{u.fmt_length(k['effective_depth_mm'])} to {k['limit_hrc']:g} HRC"),
        ("Centre martensite", f"{k['centre_martensite_pct']:g} %"),
        ("Retained austenite", f"up to {k['max_retained_austenite_pct']:g} %"),
        ("Ms", "-" if k["ms_c"] is None else T(k["ms_c"])),
    ]
    if k["requirement"]:
        keys.append(("Requirement", ("MET: " if k["meets_requirement"] else "NOT MET: ") + req.describe(u)))
    kn = fig.add_axes([0.65, 0.215, 0.32, 0.215])
    kn.axis("off")
    kn.text(0.0, 1.0, "Key numbers", fontsize=9.5, color=INK, weight="bold", va="top")
    for i, (a, b) in enumerate(keys):
        kn.text(0.0, 0.88 - i * 0.12, a, fontsize=6.8, color="#666666", va="top")
        kn.text(0.0, 0.83 - i * 0.12, b, fontsize=7.8, va="top", wrap=True)
    test_lines = hardness_test_method(rows, record)
    kn.text(0.0, 0.88 - len(keys) * 0.12, "Hardness test", fontsize=6.8, color="#666666", va="top")
    kn.text(0.0, 0.83 - len(keys) * 0.12, "\n".join(textwrap.fill(t, 52) for t in test_lines), fontsize=6.3,
            va="top")

    # Sign-off: prepared / checked / approved, name (from [record] if given), date and signature blank.
    sign = fig.add_axes([0.03, 0.145, 0.94, 0.06])
    sign.axis("off")
    for i, (key, label) in enumerate((("prepared_by", "Prepared by"), ("checked_by", "Checked by"),
                                      ("approved_by", "Approved by"))):
        x0 = 0.005 + i * 0.3317
        sign.add_patch(Rectangle((x0, 0.02), 0.325, 0.96, transform=sign.transAxes, fc="white", ec=INK, lw=0.9))
        sign.text(x0 + 0.008, 0.9, label, transform=sign.transAxes, fontsize=7.5, color=INK, weight="bold", va="top")
        sign.text(x0 + 0.008, 0.55, f"name: {record.get(key, '')}", transform=sign.transAxes, fontsize=7.3, va="top")
        sign.text(x0 + 0.008, 0.22, "date:", transform=sign.transAxes, fontsize=7.3, va="top")
        sign.text(x0 + 0.16, 0.22, "signature:", transform=sign.transAxes, fontsize=7.3, va="top")

    foot = fig.add_axes([0.04, 0.005, 0.92, 0.135])
    foot.axis("off")
    warns = result.warnings() if warnings is None else list(warnings)
    text = ["Models: " + "; ".join(models_used(case)) + "." + (f" {refined}" if refined else "")]
    text.append("Warnings of this run: " + (" | ".join(warns) if warns else "none."))
    if record.get("notes"):
        text.append("Notes: " + record["notes"])
    body = "\n".join(textwrap.fill(t, 170) for t in text)
    foot.text(0.0, 1.0, body, fontsize=5.6, va="top", linespacing=1.25)
    # Anchored at the bottom, so long model / warning text above can never push them off the page.
    foot.text(0.0, 0.0, textwrap.fill(CAUTION, 165), fontsize=5.6, va="bottom", color="#7a1f1f")
    foot.text(0.0, 0.2, f"Case file {case.source_name or '-'}\nSHA-256 {case.source_sha256}", fontsize=6,
              va="bottom", family="monospace")

    from .side_by_side import run_side_by_side

    paths = [Path(out_dir) / f"{stem}.{ext}" for ext in ("pdf", "png")]

    def save(p: Path) -> None:
        tmp = p.with_name(f".{p.name}.part")
        pdf = p.suffix == ".pdf"
        fig.savefig(tmp, format=p.suffix[1:], dpi=110, metadata={"Creator": f"quenchwise {__version__}"} if pdf else None)
        tmp.replace(p)

    run_side_by_side([lambda: save(paths[1]), lambda: save(paths[0])])   # the PNG drawn in a second process
    plt.close(fig)
    return paths


def _hrb(hv: float):
    from .hardness import hrb_from_hv

    v = float(hrb_from_hv(hv))
    return v if np.isfinite(v) else None
