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


def quenchant_figure(quenchant, severity, out_dir: Path, stem: str) -> list[Path]:
    """h(T_surface) of one curve (radiation included where the curve has an emissivity), with the
    equivalent constant h of its Grossmann severity as a dashed line."""
    q = quenchant
    t = np.linspace(min(q.bath_c, float(q.surface_c[0])), max(1000.0, float(q.surface_c[-1])), 600)
    fig, ax = plt.subplots(figsize=(7.0, 4.6))
    fig.subplots_adjust(bottom=0.25, top=0.9)
    ax.plot(t, q.htc(t), color=INK, lw=2.0, label="h(T surface)" + (" incl. radiation" if q.emissivity > 0 else ""))
    ax.plot(q.surface_c, q.htc(q.surface_c), "o", color=INK, ms=2.5, alpha=0.6, label="table points")
    if severity is not None and np.isfinite(severity.htc_w_m2k):
        ax.axhline(severity.htc_w_m2k, color=OCHRE, ls="--", lw=1.2,
                   label=f"equivalent constant h {severity.htc_w_m2k:.0f} W/m2K (H = {severity.grossmann_h:.2f} 1/in)")
    ax.axvline(q.bath_c, color="#8d8d8d", ls="-.", lw=0.8)
    ax.text(q.bath_c, ax.get_ylim()[1], f" bath {q.bath_c:g} C", color="#8d8d8d", fontsize=7, va="top")
    ax.set_xlabel("surface temperature [C]")
    ax.set_ylabel("heat-transfer coefficient h [W/(m2 K)]")
    ax.set_ylim(bottom=0)
    ax.grid(True, color=GRID, lw=0.6)
    ax.legend(fontsize=7.5, frameon=False, loc="best")
    title = q.description or q.name
    ax.set_title(f"{q.name}: {title}" if q.description else title, fontsize=9, color=INK)
    note = f"source: {q.source or 'not given'}"
    if q.flash_point_c is not None:
        note += f" | flash point {q.flash_point_c:g} C"
    _footer(fig, _wrap(note))
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
    left.set_ylabel("temperature [C]")
    left.grid(True, color=GRID, lw=0.6)
    left.legend(fontsize=7.5, frameon=False)
    left.set_title("probe centre: measured and refitted", fontsize=9, color=INK)
    ok = np.isfinite(fit.htc_w_m2k)
    right.plot(fit.surface_c[ok], fit.htc_w_m2k[ok], ".", color="#9a9a9a", ms=2, label="each step")
    right.plot(quenchant.surface_c, quenchant.htc_w_m2k, color=INK, lw=2.0, label="fitted table")
    top = np.nanpercentile(fit.htc_w_m2k[ok], 99.5) if ok.any() else 1.0
    right.set_ylim(0, 1.15 * max(top, float(np.max(quenchant.htc_w_m2k))))
    right.set_xlabel("surface temperature [C]")
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
