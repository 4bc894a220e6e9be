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
from .hardness import hv_from_hrc  # noqa: E402

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
    fig.text(0.01, 0.01, text, fontsize=6.5, color="#555555", ha="left", va="bottom", wrap=True)


def hardness_figure(result, out_dir: Path) -> list[Path]:
    """Hardness vs depth below the quenched surface: HRC where the scale applies, HV always."""
    depth = result.depth_mm
    order = np.argsort(depth)
    fig, ax = plt.subplots(figsize=(7.0, 4.4))
    fig.subplots_adjust(bottom=0.2, right=0.86)
    ax.plot(depth[order], result.hv[order], color=INK, lw=2.0, label="HV (as quenched)")
    ax.set_xlabel("depth below quenched surface [mm]")
    ax.set_ylabel("Vickers hardness HV", color=INK)
    ax.grid(True, color="#e5e5e5", lw=0.6)
    ax.set_xlim(0, result.history.section.thickness_m * 1000.0)
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
    right.set_yticklabels([f"{t:.0f}" for t, k in zip(ticks, keep) if k])
    right.set_ylabel("HRC (ASTM E140)", color="#666666")
    for (label, r), colour in zip(result.points(), POINT_COLOURS):
        d = (result.history.section.outer_m - r) * 1000.0
        ax.axvline(d, color=colour, lw=0.8, ls=":")
        ax.annotate(label, (d, hv_hi), xytext=(2, -10), textcoords="offset points", fontsize=7, color=colour)
    ax.set_title(f"{result.case.title or 'case'}: hardness profile", fontsize=10, loc="left")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "hardness")


def cooling_figure(result, out_dir: Path) -> list[Path]:
    """Temperature vs time (log) at surface, half radius and centre, with Ae3, Ae1, Bs and Ms."""
    h = result.history
    t = np.maximum(h.time_s, 1e-3)
    fig, ax = plt.subplots(figsize=(7.0, 4.4))
    fig.subplots_adjust(bottom=0.2, right=0.86)
    for (label, r), colour in zip(result.points(), POINT_COLOURS):
        j = int(np.argmin(np.abs(h.radius_m - r)))
        ax.plot(t[1:], h.temperature_c[1:, j], color=colour, lw=1.8, label=label)
    ax.set_xscale("log")
    ax.set_xlabel("time since immersion [s]")
    ax.set_ylabel("temperature [C]")
    ax.grid(True, which="both", color="#eeeeee", lw=0.5)
    state = result.state
    lines = [("Ae3" if not state.hypereutectoid else "Acm", state.upper_critical), ("Ae1", state.ae1),
             ("Ms", result.ms_c)]
    x_right = t[-1]
    for name, value in lines:
        if value is not None and np.isfinite(value):
            ax.axhline(value, color="#8d8d8d", lw=0.8, ls="-.")
            ax.annotate(f"{name} {value:.0f} C", (x_right, value), xytext=(4, 0), textcoords="offset points",
                        fontsize=7, color="#666666", va="center", annotation_clip=False)
    ax.legend(frameon=False, fontsize=8, loc="lower left")
    ax.set_title(f"{result.case.title or 'case'}: cooling curves", fontsize=10, loc="left")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "cooling")


def compare_figures(comparison, out_dir: Path) -> list[Path]:
    """Overlay of hardness profiles and of centre cooling curves, one line per quenchant."""
    from .workflows.requirement import final_hv

    palette = ("#1d3557", "#c77d1a", "#a4343a", "#2a9d8f", "#6d597a", "#8a817c", "#e9c46a", "#264653")
    paths = []
    fig, ax = plt.subplots(figsize=(7.0, 4.4))
    fig.subplots_adjust(bottom=0.2)
    for i, (m, r) in enumerate(zip(comparison.media, comparison.results)):
        o = np.argsort(r.depth_mm)
        ax.plot(r.depth_mm[o], final_hv(r)[o], color=palette[i % len(palette)], lw=1.8, label=m.name)
    req = comparison.case.requirement
    if req is not None and req.min_hrc is not None:
        ax.axhline(float(hv_from_hrc(req.min_hrc)), color="#555555", lw=1.0, ls="--", label=f"{req.min_hrc:g} HRC required")
    ax.set_xlabel("depth below quenched surface [mm]")
    ax.set_ylabel("HV")
    ax.grid(True, color="#e5e5e5", lw=0.6)
    ax.legend(frameon=False, fontsize=7.5)
    ax.set_title(f"{comparison.case.title or 'case'}: hardness by quenchant", fontsize=10, loc="left")
    _footer(fig, SHORT_CAUTION)
    paths += _save(fig, out_dir, "compare_hardness")
    fig, ax = plt.subplots(figsize=(7.0, 4.4))
    fig.subplots_adjust(bottom=0.2)
    for i, (m, r) in enumerate(zip(comparison.media, comparison.results)):
        h = r.history
        ax.plot(np.maximum(h.time_s[1:], 1e-3), h.temperature_c[1:, 0], color=palette[i % len(palette)], lw=1.6, label=m.name)
    ax.set_xscale("log")
    ax.set_xlabel("time since immersion [s]")
    ax.set_ylabel("centre temperature [C]")
    ax.grid(True, which="both", color="#eeeeee", lw=0.5)
    ax.legend(frameon=False, fontsize=7.5)
    ax.set_title(f"{comparison.case.title or 'case'}: centre cooling by quenchant", fontsize=10, loc="left")
    _footer(fig, SHORT_CAUTION)
    paths += _save(fig, out_dir, "compare_cooling")
    return paths


def band_figure(band, out_dir: Path) -> list[Path]:
    """Min-median-max hardness over the sampled chemistry range."""
    q = band.quantiles(band.hv)
    fig, ax = plt.subplots(figsize=(7.0, 4.4))
    fig.subplots_adjust(bottom=0.2)
    ax.fill_between(band.depth_mm, q["min"], q["max"], color="#c9d6e3", label=f"min-max of {len(band.results)} heats")
    ax.plot(band.depth_mm, q["median"], color=INK, lw=2.0, label="median")
    req = band.case.requirement
    if req is not None and req.min_hrc is not None:
        ax.axhline(float(hv_from_hrc(req.min_hrc)), color="#c77d1a", lw=1.2, ls="--", label=f"{req.min_hrc:g} HRC required")
    ax.set_xlabel("depth below quenched surface [mm]")
    ax.set_ylabel("HV")
    ax.grid(True, color="#e5e5e5", lw=0.6)
    ax.legend(frameon=False, fontsize=8)
    ax.set_title(f"{band.case.title or 'case'}: hardness over the {band.case.grade} chemistry range (seed {band.seed})",
                 fontsize=9.5, loc="left")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "band")


def sizing_figure(answer, out_dir: Path) -> list[Path]:
    """Requirement margin against severity and against size, from every solved case."""
    fig, (a, b) = plt.subplots(1, 2, figsize=(9.0, 4.0))
    fig.subplots_adjust(bottom=0.22, wspace=0.3)
    unit = "HV" if answer.requirement.min_hrc is not None else "% martensite"
    for ax, bracket, xlabel in ((a, answer.severity, "Grossmann H [1/in]"), (b, answer.size, f"{answer.size_label} [mm]")):
        pts = sorted(bracket.evaluated)
        if pts:
            x, y = zip(*pts)
            ax.plot(x, y, "o-", color=INK, ms=3, lw=1.2)
        ax.axhline(0.0, color="#a4343a", lw=1.0)
        if bracket.passing is not None:
            ax.axvline(bracket.passing, color="#c77d1a", lw=1.0, ls="--")
        ax.set_xscale("log")
        ax.set_xlabel(xlabel)
        ax.set_ylabel(f"margin to requirement [{unit}]")
        ax.grid(True, which="both", color="#eeeeee", lw=0.5)
    a.set_title("mildest severity", fontsize=9, loc="left")
    b.set_title("largest section in the case's quenchant", fontsize=9, loc="left")
    _footer(fig, SHORT_CAUTION)
    return _save(fig, out_dir, "sizing")
