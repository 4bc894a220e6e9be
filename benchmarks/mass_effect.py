"""Handbook as-quenched round bars (mass effect): a thin command line over the scorecard's one bar
scorer (benchmarks/accuracy.py: run_bars, bar_summary, bars_markdown), so this table and section (b)
of the scorecard are the same numbers.

Runs every bar of benchmarks/data/mass_effect_bars.csv (1/2-4 in, surface / half radius / centre,
water and oil) with the quenchants and the surface reading depth named in the file's '# key: value'
lines (or --water / --oil / --surface-depth-mm: a built-in preset name or the quenchant model's keys,
e.g. 'kind = "water", bath_c = 20, agitation = "mild"') and the default kinetics (or --model), and prints
handbook against simulated HRC bar by bar and the bias (simulated - handbook) by position,
quenchant and grade. The handbook values are recalled (memory, +/-5 HRC); see the file.

    PYTHONPATH=src python benchmarks/mass_effect.py [--water Q] [--oil Q] [--model li1998]
                                                    [--surface-depth-mm 0] [--markdown out.md]

A few seconds (28 bars in one batch).
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
import accuracy  # noqa: E402

DATA = accuracy.BARS_CSV
POSITIONS = tuple(accuracy.BAR_POSITIONS)


def main(argv=None) -> int:
    from quenchwise.case import DEFAULT_MODEL

    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--water")
    ap.add_argument("--oil")
    ap.add_argument("--model", default=DEFAULT_MODEL, help="kinetics model (default: the program's default)")
    ap.add_argument("--surface-depth-mm", type=float, default=None,
                    help="depth of the surface reading (default: the file's surface_reading_depth_mm)")
    ap.add_argument("--bars", type=Path, default=DATA)
    ap.add_argument("--markdown", type=Path)
    args = ap.parse_args(argv)
    presets = accuracy.bar_presets(args.bars)
    presets = {"water": args.water or presets["water"], "oil": args.oil or presets["oil"]}
    rows = accuracy.run_bars(args.model, args.bars, presets, args.surface_depth_mm)
    lines = [f"Handbook bars, kinetics {args.model}, water: {presets['water']}; oil: {presets['oil']}", ""]
    text = "\n".join(lines + accuracy.bars_markdown(rows, per_bar=True))
    print(text)
    if args.markdown:
        args.markdown.write_text(text + "\n", "utf-8")
    return 0


if __name__ == "__main__":
    sys.exit(main())
