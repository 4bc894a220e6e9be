"""Figures of the steel itself: the end-quench (Jominy) curve with its band, and the TTT and CCT
diagrams (kinetics.diagrams data: product regions, start and finish lines, critical-temperature
levels, cooling paths with their events and final hardness).

Same look as plots.py (its ink colour, footer, hardness scales and file writer).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .cautions import SHORT_CAUTION
from .plots import INK, POINT_COLOURS, _footer, _save, plt

# -- end-quench test --------------------------------------------------------------------------
BAND_FILL = "#e9d9b8"
BAND_EDGE = "#b08a3e"


def jominy_figure(result, out_dir: Path, band=None, stem: str = "jominy") -> list[Path]:
    """Hardness along the end-quench bar (HRC; points below HRC 20 marked at the axis floor and
    given in HV / HRB in jominy.csv), the cooling rate at 700 C on a log right axis, an optional
    band (rows with distance_mm, min_hrc, max_hrc) as a shaded corridor, and the two DI values."""
    d = result.distance_mm
    hrc = result.hrc
    fig, ax = plt.subplots(figsize=(7.2, 4.6))
    fig.subplots_adjust(bottom=0.2, right=0.84, top=0.78)
    if band:
        bd = np.array([r.distance_mm for r in band])
        lo = np.array([np.nan if r.min_hrc is None else r.min_hrc for r in band])
        hi = np.array([np.nan if r.max_hrc is None else r.max_hrc for r in band])
        order = np.argsort(bd)
        bd, lo, hi = bd[order], lo[order], hi[order]
        floor = np.where(np.isnan(lo), 20.0, lo)
        ceil = np.where(np.isnan(hi), 70.0, hi)
        ax.fill_between(bd, floor, ceil, color=BAND_FILL, alpha=0.8, lw=0, label="band")
        ax.plot(bd, lo, color=BAND_EDGE, lw=1.0, ls="--")
        ax.plot(bd, hi, color=BAND_EDGE, lw=1.0, ls="--")
    ok = np.isfinite(hrc)
    ax.plot(d[ok], hrc[ok], color=INK, lw=2.0, marker="o", ms=3.0, label="predicted HRC")
    if (~ok).any():
        ax.plot(d[~ok], np.full((~ok).sum(), 20.0), ls="none", marker="v", ms=4.0, mfc="white", mec=INK,
                label="below HRC 20 (HV, HRB in jominy.csv)")
    ax.set_xlim(0.0, float(d[-1]) + 1.0)
    ax.set_ylim(18.0, 70.0)
    ax.set_xlabel("distance from the quenched end [mm]")
    ax.set_ylabel("Rockwell C (ASTM E140)", color=INK)
    ax.grid(True, color="#e5e5e5", lw=0.6)
    top = ax.secondary_xaxis("top", functions=(lambda x: x / 1.5875, lambda s: s * 1.5875))
    top.set_xlabel("distance [1/16 in]", fontsize=8)
    rate_ax = ax.twinx()
    rate_line, = rate_ax.plot(d, result.cooling_rate_700_c_s, color=POINT_COLOURS[2], lw=1.0, ls="-.",
                              label="cooling rate at 700 °C (right)")
    rate_ax.set_yscale("log")
    rate_ax.set_ylabel("cooling rate at 700 °C [°C/s]", color=POINT_COLOURS[2])
    di = f"DI: A255 {result.di_a255.inches:.2f} in"
    if result.di_physics is not None:
        di += f", simulated {result.di_physics.inches:.2f} in"
    handles, labels = ax.get_legend_handles_labels()
    ax.legend(handles + [rate_line], labels + [rate_line.get_label()], frameon=False, fontsize=7.5, loc="upper right")
    steel = result.case.grade or "custom steel"
    ax.set_title(f"{result.case.title or steel}: end-quench test ({steel}, {result.case.austenitize_c:g} °C)\n{di}",
                 fontsize=9.5, loc="left", pad=22)
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, stem)



# -- TTT and CCT diagrams -----------------------------------------------------------------------
#: Our own palette for the transformation products (documented in each figure's legend).
PRODUCT_COLOURS = {"ferrite": "#3a7d44", "cementite": "#7b4b94", "pearlite": "#c98b12", "bainite": "#b23a48",
                   "martensite": "#2f4858", "total": INK}
_LEVEL_STYLE = {"Ae3": ("#8d8d8d", "-."), "Acm": ("#8d8d8d", "-."), "Ae1": ("#8d8d8d", "-."),
                "Bs": ("#b23a48", (0, (6, 3))), "Ms": ("#2f4858", "-"), "M50": ("#2f4858", (0, (2, 2))),
                "M90": ("#2f4858", (0, (1, 3)))}


def _steel_line(state, grain_size: float, model: str) -> str:
    from .text_output import chemistry_text

    chem = chemistry_text(state.composition.as_dict())
    extra = ""
    if state.ferrite > 1e-4:
        extra = f"; {100 * state.ferrite:.0f} % ferrite undissolved"
    if state.cementite > 1e-4:
        extra = f"; {100 * state.cementite:.1f} % carbide undissolved"
    return (f"{chem} wt%, austenitized {state.austenitize_c:g} C ({state.carbon:.2f} %C in austenite{extra}), "
            f"grain size {grain_size:g}, kinetics {model}")


def _levels(ax, levels: dict, x_right: float) -> None:
    lo, hi = ax.get_ylim()
    gap = 0.03 * (hi - lo)  # labels closer than this would overprint: the upper one moves up
    placed = []
    for name, value in sorted(levels.items(), key=lambda kv: kv[1] if np.isfinite(kv[1]) else -1e9):
        if not np.isfinite(value) or not lo < value < hi:
            continue
        colour, style = _LEVEL_STYLE.get(name, ("#8d8d8d", "-."))
        ax.axhline(value, color=colour, lw=0.8, ls=style, alpha=0.8)
        y = max([value] + [p + gap for p in placed if p > value - gap])
        placed.append(y)
        height_pt = ax.get_position().height * ax.figure.get_figheight() * 72.0
        ax.annotate(f"{name} {value:.0f}", (x_right, value), xytext=(3, (y - value) / (hi - lo) * height_pt),
                    textcoords="offset points", fontsize=6.5, color=colour, va="center", annotation_clip=False)


def _style_legend(ax, products, extra=(), drawn=None) -> None:
    """Legend of the product lines; drawn: {(product, "start"/"finish"): bool}, so that only curves
    that appear in the figure are listed (None: all)."""
    from matplotlib.lines import Line2D

    handles = []
    for p in products:
        if drawn is None or drawn.get((p, "start")):
            handles.append(Line2D([], [], color=PRODUCT_COLOURS[p], lw=1.8, label=f"{p} start (1 %)"))
        if drawn is None or drawn.get((p, "finish")):
            handles.append(Line2D([], [], color=PRODUCT_COLOURS[p], lw=1.3, ls="--", label=f"{p} finish (99 %)"))
    handles.extend(extra)
    ax.legend(handles=handles, frameon=False, fontsize=6.5, loc="upper left", bbox_to_anchor=(1.08, 1.0))


def ttt_figure(diagram, out_dir: Path) -> list[Path]:
    """Isothermal diagram: start (solid) and finish (dashed) per product, total finish (dotted ink),
    critical temperatures as labelled horizontal lines, noses marked with open diamonds."""
    from matplotlib.lines import Line2D

    d = diagram
    fig, ax = plt.subplots(figsize=(9.4, 5.6))
    fig.subplots_adjust(left=0.08, right=0.68, bottom=0.16, top=0.86)
    times = [v for p in d.products for v in (d.start_s[p], d.finish_s[p])] + [d.total_finish_s]
    finite = np.concatenate([t[np.isfinite(t)] for t in times]) if times else np.array([1.0])
    finite = finite if finite.size else np.array([1.0])
    x_lo = 10 ** np.floor(np.log10(max(np.min(finite) / 3.0, 1e-3)))
    x_hi = 10 ** np.ceil(np.log10(min(np.max(finite) * 3.0, 1e6)))
    t_lo = d.levels_c["M90"] if np.isfinite(d.levels_c["M90"]) else d.levels_c["Ms"] - 150.0
    ax.set_ylim(max(t_lo - 20.0, -50.0), d.state.upper_critical + 40.0)
    ax.set_xlim(x_lo, x_hi)
    ax.set_xscale("log")
    temps = d.temperature_c
    drawn = {}
    for p in d.products:
        drawn[(p, "start")] = bool(np.isfinite(d.start_s[p]).any())
        drawn[(p, "finish")] = bool(np.isfinite(d.finish_s[p]).any())
        c = PRODUCT_COLOURS[p]
        ax.plot(d.start_s[p], temps, color=c, lw=1.8)
        ax.plot(d.finish_s[p], temps, color=c, lw=1.3, ls="--")
        nose = d.nose(p)
        if nose is not None:
            ax.plot(*nose, marker="D", mfc="white", mec=c, ms=5, zorder=5)
            ax.annotate(f"{nose[0]:.3g} s, {nose[1]:.0f} °C", nose, xytext=(-6, -3), textcoords="offset points",
                        fontsize=6.5, color=c, ha="right", va="top")
    ax.plot(d.total_finish_s, temps, color=INK, lw=1.0, ls=":")
    bay = d.bay()
    if bay is not None:
        ax.annotate(f"bay: {bay[0]:.3g} s at {bay[1]:.0f} °C", bay, xytext=(8, 0), textcoords="offset points",
                    fontsize=6.5, color=INK, va="center")
    _levels(ax, d.levels_c, x_hi)
    ax.set_xlabel("holding time [s] (log)")
    ax.set_ylabel("temperature [°C]")
    ax.grid(True, which="both", color="#eeeeee", lw=0.5)
    _style_legend(ax, d.products, drawn=drawn, extra=[
        Line2D([], [], color=INK, lw=1.0, ls=":", label="99 % of the austenite transformed"),
        Line2D([], [], color="white", marker="D", mfc="white", mec=INK, ms=5, label="nose (shortest start)"),
        Line2D([], [], color="#8d8d8d", lw=0.8, ls="-.", label="Ae3 / Acm, Ae1"),
        Line2D([], [], color="#b23a48", lw=0.8, ls=(0, (6, 3)), label="Bs"),
        Line2D([], [], color="#2f4858", lw=0.8, label="Ms; M50, M90 (the case's martensite law)")])
    fig.suptitle("Isothermal transformation (TTT)", fontsize=10, x=0.08, y=0.975, ha="left")
    fig.text(0.08, 0.905, _steel_line(d.state, d.grain_size, d.model), fontsize=6.5, color="#444444")
    _footer(fig, "Start: 1 % of the product's reach (proeutectoid: its lever-rule amount; pearlite, bainite: "
                 "the austenite left when it began); finish: 99 %. " + SHORT_CAUTION)
    return _save(fig, out_dir, "ttt")


def _path_note(path) -> str:
    short = {"ferrite": "F", "cementite": "C", "pearlite": "P", "bainite": "B", "martensite": "M", "austenite": "A"}
    parts = [f"{short[k]}{100 * v:.0f}" for k, v in path.final.items() if v >= 0.005]
    hard = f"{path.hv:.0f} HV" + (f" {path.hrc:.0f} HRC" if np.isfinite(path.hrc) else "")
    return f"{path.label}\n{' '.join(parts)}\n{hard}"


def _event_lines(ax, paths, products) -> None:
    """Connect the start (and finish) points of successive paths of one family, per product."""
    order = sorted(paths, key=lambda p: -p.rate_700_c_s)
    for product in products:
        for kind, style, width in (("start", "-", 1.8), ("finish", "--", 1.3)):
            xs, ys = [], []
            for p in order:
                ev = p.events.get((product, kind))
                if ev is None:
                    if xs:
                        ax.plot(xs, ys, color=PRODUCT_COLOURS[product], ls=style, lw=width)
                    xs, ys = [], []
                    continue
                xs.append(ev[0])
                ys.append(ev[1])
            if xs:
                ax.plot(xs, ys, color=PRODUCT_COLOURS[product], ls=style, lw=width)
            if kind == "start" and xs and len(xs) > 1:
                # The start line stops at the slowest path computed that forms this product: mark it so
                # the end reads as an end of the data, not a line left hanging.
                ax.plot(xs[-1], ys[-1], marker="o", ms=3.5, mfc="white", mec=PRODUCT_COLOURS[product], zorder=5)


def cct_figure(diagram, out_dir: Path) -> list[Path]:
    """Continuous cooling diagram, two panels: constant rates and Newtonian cooling to the bath.

    Thin grey: the cooling paths drawn; coloured solid / dashed: start (1 % of the part) / finish
    (99 % of what that path forms) of each product; slate line with dots: martensite start on each path
    (the Ms of the austenite left). Below each path's end, rotated: its label, final phases in %
    (F ferrite, C cementite, P pearlite, B bainite, M martensite, A retained austenite) and hardness.
    """
    from matplotlib.lines import Line2D

    d = diagram
    fig, axes = plt.subplots(1, 2, figsize=(12.5, 6.2), sharey=True)
    fig.subplots_adjust(left=0.06, right=0.8, bottom=0.14, top=0.85, wspace=0.1)
    products = [p for p in ("ferrite", "cementite", "pearlite", "bainite")
                if any((p, "start") in path.events for path in d.paths)]
    y_lo, y_hi = d.bath_c - 300.0, d.state.austenitize_c + 20.0
    titles = {"constant_rate": "constant cooling rates",
              "newtonian": f"Newtonian cooling to {d.bath_c:g} C (label: time constant)"}
    for ax, family in zip(axes, ("constant_rate", "newtonian")):
        paths = d.family(family)
        shown = [p for p in paths if p.shown]
        ax.set_xscale("log")
        ends = [p.time_s[-1] for p in shown]
        firsts = [ev[0] for p in paths for ev in p.events.values() if ev[0] > 0]
        x_lo = 10 ** np.floor(np.log10(max(min(firsts + [1.0]) / 3.0, 1e-2)))
        x_hi = 10 ** np.ceil(np.log10(max(ends) * 1.5))
        ax.set_xlim(x_lo, x_hi)
        ax.set_ylim(y_lo, y_hi)
        ax.axhspan(y_lo, d.bath_c - 5.0, color="#f4f1ea", lw=0)
        for p in shown:
            t = np.maximum(p.time_s, x_lo)
            ax.plot(t, p.temperature_c, color="#9aa5b1", lw=0.7)
            ax.annotate(_path_note(p), (p.time_s[-1], p.temperature_c[-1]), xytext=(0, -4),
                        textcoords="offset points", rotation=90, fontsize=5.3, color="#333333",
                        ha="center", va="top", annotation_clip=False)
        _event_lines(ax, paths, products)
        ms_pts = sorted((p.events[("martensite", "start")] for p in paths if ("martensite", "start") in p.events),
                        key=lambda e: e[0])
        if ms_pts:
            ax.plot(*zip(*ms_pts), color=PRODUCT_COLOURS["martensite"], lw=1.2, marker=".", ms=3)
        ax.grid(True, which="both", color="#eeeeee", lw=0.5)
        ax.set_xlabel("time from the austenitizing temperature [s] (log)")
        # The panels share the temperature axis: drop the left panel's last and the right panel's first
        # time label, which would otherwise touch at the gap.
        ticks = [t for t in ax.get_xticks() if x_lo <= t <= x_hi]
        ax.set_xticks(ticks)
        ax.set_xticklabels([("" if (family == "constant_rate" and t == ticks[-1])
                             or (family == "newtonian" and t == ticks[0]) else f"$10^{{{int(round(np.log10(t)))}}}$")
                            for t in ticks])
        ax.set_title(titles[family], fontsize=9, loc="left")
    axes[0].set_ylabel("temperature [°C]")
    axes[0].set_yticks(np.arange(100.0 * np.ceil(max(d.bath_c, 0.0) / 100.0), y_hi, 100.0))
    _levels(axes[1], {k: v for k, v in d.levels_c.items() if k in ("Ae3", "Acm", "Ae1", "Bs", "Ms")},
            axes[1].get_xlim()[1])
    for name in ("Ae3", "Acm", "Ae1", "Bs", "Ms"):
        if name in d.levels_c:
            colour, style = _LEVEL_STYLE[name]
            axes[0].axhline(d.levels_c[name], color=colour, lw=0.8, ls=style, alpha=0.8)
    crit = d.critical_rates_k_s["constant_rate"]
    notes = [f"{k.replace('_', ' ')}: {v:.3g} K/s" for k, v in crit.items() if np.isfinite(v)]
    extra = [Line2D([], [], color=PRODUCT_COLOURS["martensite"], lw=1.2, marker=".", ms=3,
                    label="martensite start\n(Ms of the austenite left)"),
             Line2D([], [], color="#9aa5b1", lw=0.7, label="cooling path"),
             Line2D([], [], color="#555555", lw=0, marker="o", ms=3.5, mfc="white",
                    label="line ends: slowest path\nthat forms the product"),
             Line2D([], [], color="#8d8d8d", lw=0.8, ls="-.", label="Ae3 / Acm, Ae1"),
             Line2D([], [], color="#b23a48", lw=0.8, ls=(0, (6, 3)), label="Bs")]
    _style_legend(axes[1], products, extra=extra)
    fig.text(0.835, 0.42, "critical constant rates\n" + ("\n".join(notes) if notes else "(off the computed range)")
             + "\n\nbelow each path: final % (F ferrite,\nC cementite, P pearlite, B bainite,\nM martensite, "
             "A retained austenite)\nand as-quenched hardness\n(Maynier et al. 1978, rate at 700 C)",
             fontsize=6.3, color="#333333", va="top")
    fig.suptitle("Continuous cooling transformation (CCT)", fontsize=10, x=0.06, y=0.975, ha="left")
    fig.text(0.06, 0.925, _steel_line(d.state, d.grain_size, d.model), fontsize=6.5, color="#444444")
    _footer(fig, "Start: 1 % of the part; finish: 99 % of what the path forms. " + SHORT_CAUTION)
    return _save(fig, out_dir, "cct")
