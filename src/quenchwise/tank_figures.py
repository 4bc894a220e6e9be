"""Figure of a tank fit: the measured hardness traverse against the fitted and the starting one
(same look as plots.py)."""

from __future__ import annotations

from pathlib import Path

from .cautions import SHORT_CAUTION
from .plots import INK, POINT_COLOURS, _footer, _save, plt


def tank_fit_figure(fit, out_dir: Path, stem: str = "tank_fit") -> list[Path]:
    """Measured traverse (points), the part solved with the fitted h(T) (line) and with the case's
    curve as given (dashed), HRC against depth below the quenched surface."""
    fig, ax = plt.subplots(figsize=(7.0, 4.6))
    fig.subplots_adjust(bottom=0.27, top=0.9)
    t = fit.traverse
    ax.plot(fit.profile_depth_mm, fit.profile_hrc, color=INK, lw=2.0,
            label=f"fitted: h x {fit.factor:.3g} (RMS {fit.rms_hrc:.2f} HRC)")
    ax.plot(t.position_mm, fit.start_hrc, color=POINT_COLOURS[1], ls="--", lw=1.3,
            label=f"case as given (RMS {fit.start_rms_hrc:.2f} HRC)")
    ax.plot(t.position_mm, t.hrc, "o", color=POINT_COLOURS[2], ms=5, label=f"measured traverse ({t.n} readings)")
    ax.set_xlabel("depth below the quenched surface [mm]")
    ax.set_ylabel("hardness [HRC]")
    ax.set_title(f"Tank severity fitted to a hardness traverse: {fit.quenchant.name}", fontsize=9.5, color=INK)
    ax.grid(color="#e5e5e5")
    ax.legend(fontsize=7.5, loc="best")
    _footer(fig, "HRC below 20 continued linearly in HV (HRC-sized steps), as the fit counts it. "
                 "The vapour-blanket collapse temperature is not fitted. " + SHORT_CAUTION)
    paths = _save(fig, out_dir, stem)
    plt.close(fig)
    return paths


def write_tank_fit(fit, folder: Path) -> None:
    """The fit-tank outputs: quenchant.csv (for [quench] medium), tank_fit.csv and the figure."""
    from .results import write_table_csv
    from .thermal.quenchants import quenchant_csv_text

    (folder / "quenchant.csv").write_text(quenchant_csv_text(fit.quenchant), "utf-8")
    write_table_csv(folder / "tank_fit.csv", fit.rows())
    tank_fit_figure(fit, folder)
