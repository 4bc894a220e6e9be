"""Figures: hardness from surface to core, and cooling curves at the reading positions.

Our own look: ink-blue, ochre and brick for surface / middle / core; critical temperatures as
thin grey dash-dot lines labelled at the right edge.
"""

from __future__ import annotations

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402

from .cautions import SHORT_CAUTION  # noqa: E402
from .figure_files import figure_formats, save_figure as _save  # noqa: E402, F401  (PNG unless asked)
from .hardness import hrc_from_hv, hv_from_hrc  # noqa: E402

POINT_COLOURS = ("#1d3557", "#c77d1a", "#a4343a")
INK = "#1d3557"


def _footer(fig, text: str) -> None:
    import textwrap

    # Wrapped to the figure's width (about 17 characters per inch at 6.5 pt), so it never runs off.
    fig.text(0.01, 0.01, textwrap.fill(text, int(fig.get_figwidth() * 17)), fontsize=6.5, color="#555555",
             ha="left", va="bottom")


def plain_log_ticks(axis) -> None:
    """Plain decimal labels (0.01, 1, 100) on a log axis spanning several decades. Why: the default
    labels (10 to the power n) go through mathtext, whose parser and fonts cost about 0.1 s to set
    up in every fresh process, as long as the rest of the figure."""
    from matplotlib.ticker import FuncFormatter, NullFormatter

    axis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    axis.set_minor_formatter(NullFormatter())


def add_hrc_scale(ax, label: str = "HRC (ASTM E140)"):
    """A right-hand HRC scale matching the HV axis of ax (ticks at whole HRC, every 1, 2 or 5 so
    that a handful show; none where the HV range is below HRC 20)."""
    right = ax.twinx()
    hv_lo, hv_hi = ax.get_ylim()
    ticks = np.arange(20.0, 69.0, 1.0)
    hv_ticks = hv_from_hrc(ticks)
    inside = (hv_ticks >= hv_lo) & (hv_ticks <= hv_hi)
    step = 1 if inside.sum() <= 10 else (2 if inside.sum() <= 20 else 5)
    ticks, hv_ticks = ticks[::step], hv_ticks[::step]
    keep = (hv_ticks >= hv_lo) & (hv_ticks <= hv_hi)
    right.set_ylim(hv_lo, hv_hi)
    right.set_yticks(hv_ticks[keep])
    right.set_yticklabels([f"{t:.0f}" for t in ticks[keep]])
    right.set_ylabel(label, color="#666666")
    return right


# -- hardness axes: the drawing's scale first, a minimum span, both scales ticked -------------------
#: Smallest hardness span drawn, so that a flat profile looks flat (20 HRC; in HV about the same
#: height at mid hardness).
MIN_HRC_SPAN = 20.0
MIN_HV_SPAN = 200.0
HV_AT_HRC20 = float(hv_from_hrc(20.0))


def hardness_scale(*hv_arrays) -> str:
    """'HRC' when every finite value is inside the Rockwell C range (HRC 20 and up, ASTM E140), else
    'HV' (Vickers applies everywhere; the right-hand scale then shows HRC or HRB where they apply).

    >>> hardness_scale(np.array([630.0, 700.0])), hardness_scale(np.array([630.0, 200.0]))
    ('HRC', 'HV')
    """
    vals = np.concatenate([np.ravel(np.asarray(a, dtype=float)) for a in hv_arrays if a is not None])
    vals = vals[np.isfinite(vals)]
    return "HRC" if vals.size and float(vals.min()) >= HV_AT_HRC20 - 1e-9 else "HV"


def in_scale(hv, scale: str):
    """HV values expressed in the plotting scale."""
    return hrc_from_hv(hv) if scale == "HRC" else np.asarray(hv, dtype=float)


def smooth_profile(depth_mm, values, n: int = 300):
    """(x, y) for drawing a profile through the cell-centre values: a monotone cubic (PCHIP,
    Fritsch & Carlson 1980) interpolant, so coarse interior cells give no kinks or stair-steps and
    no overshoot between nodes; drawn only between the first and last node (no extrapolation).

    >>> x, y = smooth_profile(np.array([2.0, 0.0, 1.0]), np.array([3.0, 1.0, 2.0]), n=5)
    >>> [round(float(v), 3) for v in y]
    [1.0, 1.5, 2.0, 2.5, 3.0]
    """
    from .interpolation import pchip   # numpy (scipy.interpolate's import costs 0.1 s per process)

    d = np.asarray(depth_mm, dtype=float)
    v = np.asarray(values, dtype=float)
    o = np.argsort(d, kind="stable")
    d, v = d[o], v[o]
    ok = np.isfinite(v)
    if ok.sum() < 3:
        return d, v
    d, v = d[ok], v[ok]
    keep = np.concatenate([[True], np.diff(d) > 0])
    d, v = d[keep], v[keep]
    x = np.linspace(d[0], d[-1], n)
    return x, pchip(d, v, x)


def _nice_step(span: float, target: int = 6) -> float:
    raw = span / max(target, 1)
    mag = 10 ** np.floor(np.log10(raw))
    return float(min((m * mag for m in (1, 2, 2.5, 5, 10) if m * mag >= raw), default=10 * mag))


def finish_hardness_axis(ax, scale: str, values, label: str | None = None, outer_hrb: bool = True):
    """Limits with the minimum span (centred on the data), the main label, and a right-hand axis
    ticked in the other scale (HV when HRC is the main scale; HRC where it applies, else HRB, when
    HV is; both when the data span the two). values: the drawn values in the main scale. Returns the
    right-hand axis."""
    v = np.asarray(values, dtype=float)
    v = v[np.isfinite(v)]
    lo, hi = (float(v.min()), float(v.max())) if v.size else (40.0, 60.0)
    span = MIN_HRC_SPAN if scale == "HRC" else MIN_HV_SPAN
    pad = 0.08 * (hi - lo)
    lo, hi = lo - pad, hi + pad
    if hi - lo < span:
        mid = 0.5 * (lo + hi)
        lo, hi = mid - span / 2, mid + span / 2
    if scale == "HRC":
        if hi > 70.0:
            lo, hi = lo - (hi - 70.0), 70.0
        if lo < 20.0:
            lo, hi = 20.0, min(hi + (20.0 - lo), 70.0)
    elif lo < 0.0:
        lo, hi = 0.0, hi - lo
    ax.set_ylim(lo, hi)
    ax.set_ylabel(label or ("Rockwell C hardness HRC" if scale == "HRC" else "Vickers hardness HV"), color=INK)
    right = ax.twinx()
    right.set_ylim(lo, hi)
    if scale == "HRC":
        hv_lo, hv_hi = (float(hv_from_hrc(min(max(x, 20.0), 68.0))) for x in (lo, hi))
        step = _nice_step(hv_hi - hv_lo)
        ticks = np.arange(np.ceil(hv_lo / step) * step, hv_hi + 1e-9, step)
        pos = hrc_from_hv(ticks)
        ok = np.isfinite(pos)
        right.set_yticks(pos[ok])
        right.set_yticklabels([f"{t:.0f}" for t in ticks[ok]])
        right.set_ylabel("Vickers HV (ASTM E140)", color="#666666")
        return right
    hrc = np.arange(20.0, 69.0, 1.0)
    pos = hv_from_hrc(hrc)
    inside = (pos >= lo) & (pos <= hi)
    has_hrc = inside.sum() >= 2
    if has_hrc:
        # As many HRC ticks as the share of the axis they cover allows (about 6 over the full height).
        room = max(1, int(6 * float(np.ptp(pos[inside])) / (hi - lo)))
        step = int(max(1, _nice_step(float(np.ptp(hrc[inside])) or 1.0, room)))
        sel = inside & (hrc % step == 0)
        right.set_yticks(pos[sel])
        right.set_yticklabels([f"{t:.0f}" for t in hrc[sel]])
        right.set_ylabel("Rockwell C HRC (ASTM E140)", color="#666666")
    if v.size and float(v.min()) < HV_AT_HRC20:
        # Part of the data lies below HRC 20: Rockwell B there (on its own outer axis if HRC has one).
        target = right
        if has_hrc and outer_hrb:
            target = ax.twinx()
            target.spines["right"].set_position(("outward", 34))
            target.set_ylim(lo, hi)
        if (not has_hrc or outer_hrb) and not _hrb_ticks(target, lo, hi, short=has_hrc) and not has_hrc:
            right.set_yticks([])
            right.set_ylabel("(HRC, HRB do not apply here)", color="#666666")
    elif not has_hrc:
        right.set_yticks([])
        right.set_ylabel("(HRC does not apply here)", color="#666666")
    return right


def _hrb_ticks(axis, lo: float, hi: float, short: bool = False) -> bool:
    """Rockwell B ticks (ASTM E140, where the table covers them) on axis; False if fewer than two fit."""
    from .hardness import hrb_from_hv

    grid = np.linspace(max(lo, 1.0), hi, 400)
    hrb = hrb_from_hv(grid)
    ok = np.isfinite(hrb)
    if ok.sum() < 2:
        return False
    b_lo, b_hi = float(hrb[ok].min()), float(hrb[ok].max())
    step = _nice_step(max(b_hi - b_lo, 1.0), 5)
    ticks = np.arange(np.ceil(b_lo / step) * step, b_hi + 1e-9, step)
    if ticks.size < 2:
        return False
    axis.set_yticks(np.interp(ticks, hrb[ok], grid[ok]))
    axis.set_yticklabels([f"{t:.0f}" for t in ticks])
    axis.set_ylabel("HRB" if short else "Rockwell B HRB (ASTM E140)", color="#666666")
    return True


def requirement_line(ax, req, scale: str, total_mm: float, colour: str = "#c77d1a", length=None,
                     wrap: int | None = None, units=None) -> None:
    """The drawing's requirement, drawn only down to its depth (through the section when it asks
    for the centre) and ended by a short vertical tick at that depth."""
    if req is None or req.min_hrc is None:
        return
    y = req.min_hrc if scale == "HRC" else float(hv_from_hrc(req.min_hrc))
    depth = total_mm if req.depth_mm is None else req.depth_mm
    x = depth if length is None else length(depth)
    label = f"required: {req.describe(units)}"
    if wrap:
        import textwrap

        label = textwrap.fill(label, wrap)
    ax.plot([0.0, x], [y, y], color=colour, lw=1.6, label=label, zorder=4)
    ax.plot([x, x], [y - 0.03 * np.ptp(ax.get_ylim()), y + 0.03 * np.ptp(ax.get_ylim())], color=colour, lw=1.6,
            zorder=4)


def _units(units):
    from .units import Units

    return units if units is not None else Units("si")


def hardness_figure(result, out_dir: Path, units=None) -> list[Path]:
    """Hardness vs depth below the quenched surface, in HRC where it applies everywhere (else HV),
    the other scale on the right; the line is a PCHIP interpolation through the cell-centre values
    (the dots)."""
    u = _units(units)
    depth = result.depth_mm
    tempered = getattr(result, "hv_tempered", None)
    scale = hardness_scale(result.hv, tempered)
    total = result.history.section.thickness_m * 1000.0
    fig, ax = plt.subplots(figsize=(7.0, 4.6))
    fig.subplots_adjust(bottom=0.2, right=0.8, top=0.8)  # room for HV/HRC and an outer HRB scale
    curves = [(result.hv, "as quenched", "-", 2.0)]
    if tempered is not None:
        t = result.extra.get("temper", {})
        curves.append((tempered, f"after {t.get('hours', 0):g} h at {u.fmt_temperature(t.get('temperature_c', 0))}",
                       "--", 1.8))
    drawn = []
    for hv, label, style, width in curves:
        y = in_scale(hv, scale)
        x, ys = smooth_profile(depth, y)
        ax.plot(u.length(1.0) * x, ys, color=INK, lw=width, ls=style, label=label)
        ax.plot(u.length(1.0) * depth, y, ls="none", marker="o", ms=2.2, color=INK, alpha=0.6)
        drawn.append(y)
    req = result.case.requirement
    ax.set_xlim(0, u.length(total))
    ax.set_xlabel(f"depth below the quenched surface [{u.length_unit}]")
    ax.grid(True, color="#e5e5e5", lw=0.6)
    finish_hardness_axis(ax, scale, np.concatenate(drawn + ([np.array([req.min_hrc if scale == "HRC" else
                                                                       float(hv_from_hrc(req.min_hrc))])]
                                                             if req is not None and req.min_hrc is not None else [])))
    requirement_line(ax, req, scale, total, length=u.length, units=u)
    lo, hi = ax.get_ylim()
    for (label, r), colour in zip(result.points(), POINT_COLOURS):
        d = u.length((result.history.section.outer_m - r) * 1000.0)
        ax.axvline(d, color=colour, lw=0.8, ls=":")
        ax.annotate(label, (d, lo), xytext=(3 if d < 0.9 * u.length(total) else -3, 3), textcoords="offset points",
                    fontsize=7, color=colour, ha="left" if d < 0.9 * u.length(total) else "right")
    fig.text(0.125, 0.945, f"{result.case.title or 'case'}: hardness profile", fontsize=10, ha="left")
    ax.legend(frameon=False, fontsize=7.5, loc="lower left", bbox_to_anchor=(0.0, 1.0), ncol=3,
              title="line: PCHIP through the cell values (dots); small steps come from the kinetics time step (run --fine refines it)", title_fontsize=6.5, alignment="left")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "hardness")


def cooling_figure(result, out_dir: Path, units=None) -> list[Path]:
    """Temperature vs time (log) at surface, half radius and centre, with Ae3, Ae1 and Ms labelled
    inside the frame at the right, where the curves have long passed them."""
    u = _units(units)
    h = result.history
    t = np.maximum(h.time_s, 1e-3)
    fig, ax = plt.subplots(figsize=(7.0, 4.4))
    fig.subplots_adjust(bottom=0.2, right=0.95)
    for (label, r), colour in zip(result.points(), POINT_COLOURS):
        j = result.node_at(r)
        ax.plot(t[1:], [u.temperature(v) for v in h.temperature_c[1:, j]], color=colour, lw=1.8, label=label)
    ax.set_xscale("log")
    plain_log_ticks(ax.xaxis)
    ax.set_xlabel("time since immersion [s]")
    ax.set_ylabel(f"temperature [{u.temp_unit}]")
    ax.grid(True, which="both", color="#eeeeee", lw=0.5)
    state = result.state
    lines = [("Ae3" if not state.hypereutectoid else "Acm", state.upper_critical), ("Ae1", state.ae1),
             ("Ms", result.ms_c)]
    ax.set_xlim(t[1], t[-1])
    top = max([float(np.max(h.temperature_c))] + [v for _, v in lines if v is not None and np.isfinite(v)])
    ax.set_ylim(top=u.temperature(top + 45.0))  # room above the highest level's label
    for name, value in lines:
        if value is not None and np.isfinite(value):
            y = u.temperature(value)
            ax.axhline(y, color="#8d8d8d", lw=0.8, ls="-.")
            ax.annotate(f"{name} {y:.0f} {u.temp_unit}", (t[-1], y), xytext=(-4, 2), textcoords="offset points",
                        fontsize=7, color="#555555", ha="right", va="bottom")
    ax.legend(frameon=False, fontsize=8, loc="center left")  # early times, below the start: no data there
    ax.set_title(f"{result.case.title or 'case'}: cooling curves", fontsize=10, loc="left")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "cooling")


#: One colour per quenchant in the comparison figures.
_COMPARE_PALETTE = ("#1d3557", "#c77d1a", "#a4343a", "#2a9d8f", "#6d597a", "#8a817c", "#e9c46a", "#264653")


def compare_hardness_figure(comparison, out_dir: Path, units=None) -> list[Path]:
    """The hardness profiles of the comparison, one line per quenchant; the legend sits outside the
    plotting area, the requirement stops at its depth (compare_cooling_figure: the centres)."""
    from .workflows.requirement import final_hv

    u = _units(units)
    palette = _COMPARE_PALETTE
    hvs = [final_hv(r) for r in comparison.results]
    scale = hardness_scale(*hvs)
    total = comparison.case.section.thickness_m * 1000.0
    fig, ax = plt.subplots(figsize=(8.6, 4.6))
    fig.subplots_adjust(bottom=0.2, right=0.62, left=0.09)
    drawn = []
    for i, (m, r, hv) in enumerate(zip(comparison.media, comparison.results, hvs)):
        y = in_scale(hv, scale)
        x, ys = smooth_profile(r.depth_mm, y)
        ax.plot(u.length(1.0) * x, ys, color=palette[i % len(palette)], lw=1.8, label=m.name)
        drawn.append(y)
    req = comparison.case.requirement
    if req is not None and req.min_hrc is not None:
        drawn.append(np.array([req.min_hrc if scale == "HRC" else float(hv_from_hrc(req.min_hrc))]))
    ax.set_xlim(0, u.length(total))
    ax.set_xlabel(f"depth below the quenched surface [{u.length_unit}]")
    ax.grid(True, color="#e5e5e5", lw=0.6)
    finish_hardness_axis(ax, scale, np.concatenate(drawn), outer_hrb=False)
    requirement_line(ax, req, scale, total, colour="#555555", length=u.length, wrap=32, units=u)
    ax.legend(frameon=False, fontsize=7.5, loc="upper left", bbox_to_anchor=(1.13, 1.0))
    ax.set_title(f"{comparison.case.title or 'case'}: hardness by quenchant", fontsize=10, loc="left")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "compare_hardness")


def compare_cooling_figure(comparison, out_dir: Path, units=None) -> list[Path]:
    """The centre cooling curves of the comparison, one line per quenchant."""
    u = _units(units)
    palette = _COMPARE_PALETTE
    fig, ax = plt.subplots(figsize=(8.6, 4.6))
    fig.subplots_adjust(bottom=0.2, right=0.66, left=0.09)
    for i, (m, r) in enumerate(zip(comparison.media, comparison.results)):
        h, centre = r.history, int(np.argmax(r.depth_mm))
        ax.plot(np.maximum(h.time_s[1:], 1e-3), [u.temperature(v) for v in h.temperature_c[1:, centre]],
                color=palette[i % len(palette)], lw=1.6, label=m.name)
    ax.set_xscale("log")
    plain_log_ticks(ax.xaxis)
    ax.set_xlabel("time since immersion [s]")
    ax.set_ylabel(f"centre temperature [{u.temp_unit}]")
    ax.grid(True, which="both", color="#eeeeee", lw=0.5)
    ax.legend(frameon=False, fontsize=7.5, loc="upper left", bbox_to_anchor=(1.02, 1.0))
    ax.set_title(f"{comparison.case.title or 'case'}: centre cooling by quenchant", fontsize=10, loc="left")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "compare_cooling")


def band_figure(band, out_dir: Path, units=None) -> list[Path]:
    """Min-median-max hardness over the sampled chemistry range (HRC where it applies)."""
    from matplotlib.patches import Patch

    u = _units(units)
    x = u.length(1.0) * np.asarray(band.depth_mm, dtype=float)
    q = band.quantiles(band.hv)
    scale = hardness_scale(q["min"], q["max"])
    lo, med, hi = (in_scale(q[k], scale) for k in ("min", "median", "max"))
    total = band.case.section.thickness_m * 1000.0
    fig, ax = plt.subplots(figsize=(7.4, 4.8))
    fig.subplots_adjust(bottom=0.2, right=0.86, top=0.78)
    ax.fill_between(x, lo, hi, color="#c9d6e3", lw=0)
    ax.plot(x, lo, color="#7d93ab", lw=0.8)
    ax.plot(x, hi, color="#7d93ab", lw=0.8)
    ax.plot(x, med, color=INK, lw=2.0, label="median")
    req = band.case.requirement
    drawn = [lo, hi] + ([np.array([req.min_hrc if scale == "HRC" else float(hv_from_hrc(req.min_hrc))])]
                        if req is not None and req.min_hrc is not None else [])
    ax.set_xlim(0, u.length(total))
    ax.set_xlabel(f"depth below the quenched surface [{u.length_unit}]")
    ax.grid(True, color="#e5e5e5", lw=0.6)
    finish_hardness_axis(ax, scale, np.concatenate(drawn))
    requirement_line(ax, req, scale, total, length=u.length, units=u)
    handles, labels = ax.get_legend_handles_labels()
    handles.insert(0, Patch(fc="#c9d6e3", ec="#7d93ab", lw=0.8))
    labels.insert(0, f"min-max of {len(band.results)} heats")
    ax.legend(handles, labels, frameon=False, fontsize=7.5, loc="lower left", bbox_to_anchor=(0.0, 1.0), ncol=3)
    fig.text(0.125, 0.955, f"{band.case.title or 'case'}", fontsize=10, ha="left")
    what = (f"hardness over the {band.case.grade} chemistry range" if band.heat_fit is None else
            "hardness over the heat fit's remaining uncertainty (measured end-quench curve)")
    fig.text(0.125, 0.915, f"{what}, {len(band.results)} sampled heats "
             f"(seed {band.seed})", fontsize=8.5, ha="left", color="#444444")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "band")


def sizing_figure(answer, out_dir: Path, units=None) -> list[Path]:
    """Requirement margin against severity and against size, from every solved case."""
    from matplotlib.lines import Line2D

    u = _units(units)
    fig, (a, b) = plt.subplots(1, 2, figsize=(9.0, 4.3))
    fig.subplots_adjust(bottom=0.27, wspace=0.3, top=0.88)
    unit = "HV" if answer.requirement.min_hrc is not None else "% martensite"
    dimension = answer.size_label.replace("_mm", "").replace("_", " ")
    for ax, bracket, xlabel, k in ((a, answer.severity, "constant severity, Grossmann H [1/in]", 1.0),
                                   (b, answer.size, f"{dimension} [{u.length_unit}]", u.length(1.0))):
        pts = sorted(bracket.evaluated)
        if pts:
            x, y = zip(*pts)
            ax.plot(k * np.asarray(x), y, "o-", color=INK, ms=3, lw=1.2)
        ax.axhline(0.0, color="#a4343a", lw=1.0)
        if bracket.passing is not None:
            ax.axvline(k * bracket.passing, color="#c77d1a", lw=1.0, ls="--")
        ax.set_xscale("log")
        ax.set_xlabel(xlabel)
        ax.set_ylabel(f"margin to the requirement [{unit}]")
        ax.grid(True, which="both", color="#eeeeee", lw=0.5)
    a.set_title("mildest constant severity", fontsize=9, loc="left")
    b.set_title("largest section in the case's quenchant", fontsize=9, loc="left")
    fig.legend(handles=[Line2D([], [], color=INK, marker="o", ms=3, lw=1.2, label="solved cases"),
                        Line2D([], [], color="#a4343a", lw=1.0, label="requirement just met"),
                        Line2D([], [], color="#c77d1a", lw=1.0, ls="--", label="answer")],
               loc="lower center", bbox_to_anchor=(0.5, 0.07), ncol=3, frameon=False, fontsize=7.5)
    fig.text(0.5, 0.955, f"{answer.case.title or 'case'}: {answer.requirement.describe(units)}", ha="center", fontsize=9.5)
    _footer(fig, "A constant severity is one h for the whole quench; real quenchants differ (see the text output). "
            + SHORT_CAUTION)
    return _save(fig, out_dir, "sizing")
