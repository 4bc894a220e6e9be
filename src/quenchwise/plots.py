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
from .hardness import hrc_from_hv, hv_from_hrc  # noqa: E402

POINT_COLOURS = ("#1d3557", "#c77d1a", "#a4343a")
INK = "#1d3557"


def _save(fig, out_dir: Path, stem: str) -> list[Path]:
    paths = []
    for ext in ("png", "svg"):
        p = Path(out_dir) / f"{stem}.{ext}"
        tmp = p.with_name(f".{p.name}.part")
        fig.savefig(tmp, dpi=130, format=ext)
        tmp.replace(p)
        paths.append(p)
    plt.close(fig)
    return paths


def _footer(fig, text: str) -> None:
    import textwrap

    # Wrapped to the figure's width (about 17 characters per inch at 6.5 pt), so it never runs off.
    fig.text(0.01, 0.01, textwrap.fill(text, int(fig.get_figwidth() * 17)), fontsize=6.5, color="#555555",
             ha="left", va="bottom")


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
    from scipy.interpolate import PchipInterpolator

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
    return x, PchipInterpolator(d, v)(x)


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
    label = f"required: {req.describe()}"
    if units is not None and units.us and req.depth_mm is not None:
        label = label.replace(f"{req.depth_mm:g} mm", f"{units.length(req.depth_mm):.3g} in")
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
        j = int(np.argmin(np.abs(h.radius_m - r)))
        ax.plot(t[1:], [u.temperature(v) for v in h.temperature_c[1:, j]], color=colour, lw=1.8, label=label)
    ax.set_xscale("log")
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


def compare_figures(comparison, out_dir: Path, units=None) -> list[Path]:
    """Overlay of hardness profiles and of centre cooling curves, one line per quenchant; the
    legends sit outside the plotting area, the requirement stops at its depth."""
    from .workflows.requirement import final_hv

    u = _units(units)
    palette = ("#1d3557", "#c77d1a", "#a4343a", "#2a9d8f", "#6d597a", "#8a817c", "#e9c46a", "#264653")
    paths = []
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
    paths += _save(fig, out_dir, "compare_hardness")
    fig, ax = plt.subplots(figsize=(8.6, 4.6))
    fig.subplots_adjust(bottom=0.2, right=0.66, left=0.09)
    for i, (m, r) in enumerate(zip(comparison.media, comparison.results)):
        h = r.history
        ax.plot(np.maximum(h.time_s[1:], 1e-3), [u.temperature(v) for v in h.temperature_c[1:, 0]],
                color=palette[i % len(palette)], lw=1.6, label=m.name)
    ax.set_xscale("log")
    ax.set_xlabel("time since immersion [s]")
    ax.set_ylabel(f"centre temperature [{u.temp_unit}]")
    ax.grid(True, which="both", color="#eeeeee", lw=0.5)
    ax.legend(frameon=False, fontsize=7.5, loc="upper left", bbox_to_anchor=(1.02, 1.0))
    ax.set_title(f"{comparison.case.title or 'case'}: centre cooling by quenchant", fontsize=10, loc="left")
    _footer(fig, SHORT_CAUTION)
    paths += _save(fig, out_dir, "compare_cooling")
    return paths


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
    fig.text(0.5, 0.955, f"{answer.case.title or 'case'}: {answer.requirement.describe()}", ha="center", fontsize=9.5)
    _footer(fig, "A constant severity is one h for the whole quench; real quenchants differ (see the text output). "
            + SHORT_CAUTION)
    return _save(fig, out_dir, "sizing")


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
    chem = ", ".join(f"{k.capitalize()} {v:g}" for k, v in state.composition.as_dict().items() if v > 0)
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
