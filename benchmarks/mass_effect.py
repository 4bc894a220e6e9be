"""Part-level check of the quenchant curves: handbook as-quenched round bars (mass effect).

Runs every bar of benchmarks/data/mass_effect_bars.csv (1/2-4 in, surface / half radius /
centre, water and oil) with the built-in presets named in the file's '# preset_water:' and
'# preset_oil:' lines (or --water / --oil) and the default kinetics (or --model), and prints the table of
handbook against predicted HRC and the bias (predicted - handbook) by position. The handbook
values are recalled (memory, +/-5 HRC); see the file.

    PYTHONPATH=src python benchmarks/mass_effect.py [--water NAME] [--oil NAME] [--model li1998]
                                                    [--markdown out.md]

About a minute on a quiet machine (28 bars in a few batches).
"""

from __future__ import annotations

import argparse
import csv
import re
import sys
from collections import defaultdict
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parent
DATA = ROOT / "data" / "mass_effect_bars.csv"
POSITIONS = ("surface", "half_radius", "centre")


def read_bars(path: Path = DATA):
    text = path.read_text("utf-8")
    presets = {k: v.strip() for k, v in re.findall(r"^#\s*preset_(water|oil):\s*(\S+)", text, re.MULTILINE)}
    rows = list(csv.DictReader(line for line in text.splitlines() if line and not line.startswith("#")))
    bars = defaultdict(dict)
    for r in rows:
        key = (r["grade"], r["quenchant"], float(r["diameter_in"]), float(r["austenitize_c"]),
               tuple(float(r[e]) for e in ("c", "mn", "si", "ni", "cr", "mo")))
        bars[key][r["position"]] = float(r["hrc"])
    return presets, bars


def predict(bars: dict, presets: dict, model: str | None = None) -> dict:
    """Predicted HRC at surface, half radius and centre of every bar (one batch per run); model None:
    the program's default kinetics (case.DEFAULT_MODEL)."""
    from quenchwise.case import DEFAULT_MODEL, parse_case
    from quenchwise.workflows.simulate import simulate

    cases, keys = [], []
    for key in bars:
        grade, quench, d_in, aust, chem = key
        steel = dict(zip(("c", "mn", "si", "ni", "cr", "mo"), chem), austenitize_c=aust)
        medium = presets[quench]
        from quenchwise.thermal.quenchants import load_quenchant

        bath = load_quenchant(medium).bath_c
        data = {"title": f"{grade} {d_in:g} in {quench}", "steel": steel,
                "part": {"shape": "bar", "diameter_mm": d_in * 25.4},
                "quench": {"medium": medium, "end_c": max(100.0, bath + 40.0)}, "transform": {"model": model}}
        data["transform"]["model"] = model or DEFAULT_MODEL
        cases.append(parse_case(data, source_name="mass_effect_bars.csv"))
        keys.append(key)
    out = {}
    for key, res in zip(keys, simulate(cases)):
        labels = dict(res.points())
        r_s, r_h, r_c = labels["surface"], labels["half radius"], labels["centre"]
        out[key] = {p: float(res.at(res.hrc, r)) for p, r in zip(POSITIONS, (r_s, r_h, r_c))}
    return out


def table(bars, predicted, presets) -> tuple[list[str], dict]:
    lines = [f"| grade | quench ({presets['water']} / {presets['oil']}) | d in | surface hb / pred | "
             "half radius hb / pred | centre hb / pred |", "| --- | --- | --- | --- | --- | --- |"]
    bias = defaultdict(list)
    for key in sorted(bars, key=lambda k: (k[0], k[1], k[2])):
        grade, quench, d_in, *_ = key
        cells = []
        for p in POSITIONS:
            hb, pr = bars[key].get(p), predicted[key][p]
            cells.append(f"{hb:.0f} / " + (f"{pr:.1f}" if pr == pr else "<20"))
            bias[(quench, p)].append(pr - hb)
            bias[("all", p)].append(pr - hb)
        lines.append(f"| {grade} | {quench} | {d_in:g} | " + " | ".join(cells) + " |")
    return lines, bias


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--water")
    ap.add_argument("--oil")
    ap.add_argument("--model", default=None, help="kinetics model (default: the program's default)")
    ap.add_argument("--markdown", type=Path)
    args = ap.parse_args(argv)
    presets, bars = read_bars()
    presets = {"water": args.water or presets.get("water", "water_20c_moderate"),
               "oil": args.oil or presets.get("oil", "oil_conventional_60c_moderate")}
    predicted = predict(bars, presets, args.model)
    lines, bias = table(bars, predicted, presets)
    from quenchwise.case import DEFAULT_MODEL

    lines += ["", f"Bias, predicted - handbook HRC (kinetics {args.model or DEFAULT_MODEL}):", "",
              "| bars | position | mean | RMS | n | predicted below HRC 20 (not in the mean) |",
              "| --- | --- | --- | --- | --- | --- |"]
    for (group, p), v in sorted(bias.items(), key=lambda kv: (kv[0][0], POSITIONS.index(kv[0][1]))):
        v = np.array(v)
        ok = v[np.isfinite(v)]
        lines.append(f"| {group} | {p} | {ok.mean():+.1f} | {np.sqrt(np.mean(ok * ok)):.1f} | {ok.size} | "
                     f"{v.size - ok.size} |")
    text = "\n".join(lines)
    print(text)
    if args.markdown:
        args.markdown.write_text(text + "\n", "utf-8")
    return 0


if __name__ == "__main__":
    sys.exit(main())
