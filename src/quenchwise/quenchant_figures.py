"""Figures of quenchant curves and of probe fits (same look as plots.py: ink-blue lines, ochre
for the second series, grey notes in the footer)."""

from __future__ import annotations

import textwrap
from pathlib import Path

import numpy as np

from .plots import INK, POINT_COLOURS, _footer, _save, plt

OCHRE = POINT_COLOURS[1]
BRICK = POINT_COLOURS[2]
GRID = "#e5e5e5"


def _wrap(text: str, width: int = 125) -> str:
    return "\n".join(textwrap.wrap(" ".join(text.split()), width))


def quenchant_figure(quenchant, severity, out_dir: Path, stem: str, probe=None) -> list[Path]:
    """h(T_surface) of one curve (radiation included where the curve has an emissivity), with the
    equivalent constant h of its Grossmann severity as a dashed line; with probe = (time_s,
    centre_c, figures) also the ISO 9950 probe's centre cooling curve and its cooling-rate curve
    (rate against centre temperature, the way cooling-curve reports draw it)."""
    q = quenchant
    t = np.linspace(min(q.bath_c, float(q.surface_c[0])), max(1000.0, float(q.surface_c[-1])), 600)
    if probe is None:
        fig, ax = plt.subplots(figsize=(7.0, 4.6))
        fig.subplots_adjust(bottom=0.25, top=0.9)
    else:
        fig, (ax, ax_t, ax_r) = plt.subplots(1, 3, figsize=(14.0, 4.8))
        fig.subplots_adjust(bottom=0.24, top=0.88, wspace=0.3, left=0.06, right=0.98)
    ax.plot(t, q.htc(t), color=INK, lw=2.0, label="h(T surface)" + (" incl. radiation" if q.emissivity > 0 else ""))
    ax.plot(q.surface_c, q.htc(q.surface_c), "o", color=INK, ms=2.0, alpha=0.5, label="table points")
    if severity is not None and np.isfinite(severity.htc_w_m2k):
        ax.axhline(severity.htc_w_m2k, color=OCHRE, ls="--", lw=1.2,
                   label=f"equivalent constant h {severity.htc_w_m2k:.0f} W/m2K (H = {severity.grossmann_h:.2f} 1/in)")
    ax.axvline(q.bath_c, color="#8d8d8d", ls="-.", lw=0.8)
    ax.text(q.bath_c, ax.get_ylim()[1], f" bath {q.bath_c:g} C", color="#8d8d8d", fontsize=7, va="top")
    ax.set_xlabel("surface temperature [°C]")
    ax.set_ylabel("heat-transfer coefficient h [W/(m2 K)]")
    ax.set_ylim(bottom=0)
    ax.grid(True, color=GRID, lw=0.6)
    if probe is None:
        ax.legend(fontsize=7.5, frameon=False, loc="best")
    else:  # a boxed legend: the curve may pass behind it
        ax.legend(fontsize=7, frameon=True, framealpha=0.92, edgecolor=GRID,
                  loc="upper left" if q.emissivity > 0 else "center right")
    title = q.description or q.name
    if probe is None:
        ax.set_title(f"{q.name}: {title}" if q.description else title, fontsize=9, color=INK)
    else:
        ax.set_title("h against surface temperature", fontsize=9, color=INK)
        fig.suptitle(f"{q.name}: {title}" if q.description else title, fontsize=10, color=INK)
        time_s, centre_c, fig_ = probe
        ax_t.plot(time_s, centre_c, color=INK, lw=1.8, label="probe centre")
        ax_t.axhline(q.bath_c, color="#8d8d8d", ls="-.", lw=0.8)
        for level, key in ((600.0, "time_600_s"), (400.0, "time_400_s"), (200.0, "time_200_s")):
            v = fig_.get(key)
            if v is not None and v == v:
                ax_t.plot([v], [level], "o", color=OCHRE, ms=4)
                ax_t.annotate(f"{level:.0f} C at {v:.1f} s", (v, level), textcoords="offset points", xytext=(6, 3),
                              fontsize=7, color="#555555")
        ax_t.set_xlim(0, 1.25 * float(time_s[-1]))
        ax_t.set_xlabel("time [s]")
        ax_t.set_ylabel("centre temperature [°C]")
        ax_t.set_title("cooling curve (ISO 9950 type probe, from 850 °C)", fontsize=9, color=INK)
        ax_t.grid(True, color=GRID, lw=0.6)
        mid_t = 0.5 * (centre_c[1:] + centre_c[:-1])
        rate = -np.diff(centre_c) / np.diff(time_s)
        ax_r.plot(rate, mid_t, color=INK, lw=1.4, label="cooling rate")
        mx, at = fig_.get("max_rate_k_s"), fig_.get("t_max_rate_c")
        if mx is not None and mx == mx:
            ax_r.plot([mx], [at], "o", color=BRICK, ms=5, label=f"max {mx:.0f} K/s at {at:.0f} C")
        r300 = fig_.get("rate_300_k_s")
        if r300 is not None and r300 == r300:
            ax_r.plot([r300], [300.0], "s", color=OCHRE, ms=4, label=f"{r300:.1f} K/s at 300 C")
        ax_r.set_xlim(left=0)
        ax_r.set_xlabel("cooling rate [K/s]")
        ax_r.set_ylabel("centre temperature [°C]")
        ax_r.set_title("cooling-rate curve", fontsize=9, color=INK)
        ax_r.grid(True, color=GRID, lw=0.6)
        ax_r.legend(fontsize=7.5, frameon=False, loc="lower right")
    note = f"source: {q.source or 'not given'}"
    if q.flash_point_c is not None:
        note += f" | flash point {q.flash_point_c:g} C"
    if probe is not None:
        note += " | probe: 12.5 mm alloy 600 cylinder, 1-D model (end faces neglected), centre reading"
    _footer(fig, _wrap(note, 125 if probe is None else 230))
    return _save(fig, out_dir, stem)


def probe_figure(fit, quenchant, out_dir: Path, stem: str = "probe_fit") -> list[Path]:
    """Left: measured centre curve, the refit with the fitted h(T) and the estimated surface
    temperature. Right: h against surface temperature, step estimates and the table."""
    fig, (left, right) = plt.subplots(1, 2, figsize=(11.0, 4.6))
    fig.subplots_adjust(bottom=0.22, wspace=0.28, top=0.9)
    left.plot(fit.time_s, fit.measured_c, ".", color="#555555", ms=2.5, label="measured centre")
    if fit.refit_c is not None:
        left.plot(fit.time_s, fit.refit_c, color=INK, lw=1.8,
                  label=f"refit with the fitted curve (RMS {fit.rms_k:.1f} K, max {fit.max_k:.1f} K)")
    left.plot(fit.time_s, fit.surface_c, color=OCHRE, lw=1.0, ls="--", label="surface (estimated)")
    left.axhline(fit.bath_c, color="#8d8d8d", ls="-.", lw=0.8)
    left.set_xlabel("time [s]")
    left.set_ylabel("temperature [°C]")
    left.grid(True, color=GRID, lw=0.6)
    left.legend(fontsize=7.5, frameon=False)
    left.set_title("probe centre: measured and refitted", fontsize=9, color=INK)
    ok = np.isfinite(fit.htc_w_m2k)
    right.plot(fit.surface_c[ok], fit.htc_w_m2k[ok], ".", color="#9a9a9a", ms=2, label="each step")
    right.plot(quenchant.surface_c, quenchant.htc_w_m2k, color=INK, lw=2.0, label="fitted table")
    top = np.nanpercentile(fit.htc_w_m2k[ok], 99.5) if ok.any() else 1.0
    right.set_ylim(0, 1.15 * max(top, float(np.max(quenchant.htc_w_m2k))))
    right.set_xlabel("surface temperature [°C]")
    right.set_ylabel("h [W/(m2 K)]")
    right.grid(True, color=GRID, lw=0.6)
    right.legend(fontsize=7.5, frameon=False)
    right.set_title(f"fitted quenchant {quenchant.name} (bath {quenchant.bath_c:g} C)", fontsize=9, color=INK)
    _footer(fig, _wrap(f"Inverse conduction on a 1-D alloy 600 cylinder, 12.5 mm diameter (ISO 9950 type probe): "
                       f"Beck's sequential function specification, {fit.future_steps} future steps of {fit.dt_s:.4g} s, "
                       f"first-order regularization {fit.regularization:g}"
                       + (f", end faces corrected (2-D model, up to {fit.end_correction_k:.1f} K)" if fit.end_correction_k else "")
                       + ". Alloy properties from memory of "
                       "published data: check them against your probe's certificate.", 160))
    return _save(fig, out_dir, stem)


def write_probe_fit(analysis, folder: Path) -> None:
    """The probe command's outputs: quenchant.csv (for [quench] medium), probe_fit.csv and the figure."""
    from .thermal.quenchants import quenchant_csv_text

    (folder / "quenchant.csv").write_text(quenchant_csv_text(analysis.quenchant), "utf-8")
    (folder / "probe_fit.csv").write_text(analysis.fit_csv_text(), "utf-8")
    probe_figure(analysis.fit, analysis.quenchant, folder)
