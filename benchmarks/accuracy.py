"""The accuracy scorecard: quenchwise against outside data, through the same code users run.

    python benchmarks/accuracy.py                        # all sections, default model, writes benchmarks/accuracy.md
    python benchmarks/accuracy.py --model li1998 --out /tmp/li1998.md
    python benchmarks/accuracy.py --sections endquench,di --quick

Sections
  (a) endquench  simulated end-quench test (workflows.jominy, the `jominy` command's code) of the
                 SAE J1268 H steels of data/hband_chemistry.csv (middle of each chemistry range, A255
                 test temperature) against their bands (data/hbands_sae_j1268.csv): points in band,
                 within +/-2 and +/-4 HRC of it, bias against the band middle at J1-4, J6-12, J16-32,
                 and the J position of 50 % martensite hardness (Hodge & Orehoski) against the band
                 middle's.
  (b) bars       handbook as-quenched round bars (data/mass_effect_bars.csv, if present): simulated
                 (workflows.simulate) against the readings at surface (read at the file's
                 surface_reading_depth_mm), half radius and centre, quenched as the file's
                 quench_water / quench_oil say; the one bar scorer (run_bars), also behind
                 benchmarks/mass_effect.py. The full run adds the score with other presets.
  (c) facts      CCT/TTT facts with their sources: Ms, the pearlite nose, critical cooling rates.
  (d) di         DI simulated (workflows.ideal_diameter) against ASTM A255 and against the DI implied
                 by the simulated end-quench curve (Grossmann's premise: the bar centre under an
                 infinite quench that cools at 700 C like the J position of 50 % martensite).
  cooling        the end-quench specimen's cooling rate at 705 C against the A255 scale.

The fast subset (``quick_endquench``) runs in the test suite (tests/validation/test_accuracy.py).
All reference values are recalled from the standards and handbooks ("memory" in the data files).
"""

from __future__ import annotations

import argparse
import csv
import math
import sys
import time
import tomllib
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from quenchwise.case import parse_case
from quenchwise.hardness import hrc_from_hv
from quenchwise.thermal.endquench import SIXTEENTH_M, EndQuenchSettings
from quenchwise.workflows.jominy import DEFAULT_SETTINGS, jominy

DATA = Path(__file__).resolve().parent / "data"
BANDS_CSV = DATA / "hbands_sae_j1268.csv"
CHEMISTRY_CSV = DATA / "hband_chemistry.csv"
RATES_CSV = DATA / "endquench_cooling_rate_a255.csv"
BARS_CSV = DATA / "mass_effect_bars.csv"
#: Coarse steps for the fast subset (tests/validation/test_jominy.py shows they read within 0.5 HRC).
COARSE = EndQuenchSettings(radial_cells=1, max_temperature_step_k=24.0, max_fraction_step=0.1)
#: Grades of the fast subset: one per family that the issue names as systematically off.
QUICK_GRADES = ("1045H", "4140H", "5160H", "8620H", "15B35H")
#: Below HRC 20 the scale ends: such readings count as 19.9 (soft) where a number is needed.
BELOW_SCALE_HRC = 19.9
ZONES = {"J1-4": (1, 4), "J6-12": (6, 12), "J16-32": (16, 32)}


# -- reading the data ---------------------------------------------------------------------------
def _rows(path: Path) -> list[dict]:
    lines = [ln for ln in path.read_text("utf-8").splitlines() if ln.strip() and not ln.startswith("#")]
    return list(csv.DictReader(lines))


def load_bands() -> dict[str, list[tuple[float, float | None, float]]]:
    """{grade: [(sixteenths, min HRC or None, max HRC)]} from data/hbands_sae_j1268.csv."""
    out: dict[str, list] = {}
    for r in _rows(BANDS_CSV):
        out.setdefault(r["grade"], []).append(
            (float(r["sixteenths"]), float(r["min_hrc"]) if r["min_hrc"] else None, float(r["max_hrc"])))
    return out


def load_chemistry() -> dict[str, dict]:
    """{grade: row} of data/hband_chemistry.csv with the nominal chemistry (middle of the ranges)."""
    out = {}
    for r in _rows(CHEMISTRY_CSV):
        chem = {}
        for el in ("c", "mn", "si", "ni", "cr", "mo", "v", "b"):
            lo, hi = float(r[f"{el}_min"]), float(r[f"{el}_max"])
            chem[el] = round(0.5 * (lo + hi), 5)
        for el in ("ni", "cr", "mo", "cu"):
            res = float(r[f"residual_{el}"])
            if res > 0 and chem.get(el, 0.0) == 0.0:
                chem[el] = res
        out[r["grade"]] = {"chem": chem, "austenitize_c": float(r["austenitize_c"]),
                           "grain_size": float(r["grain_size"]), "family": r["family"]}
    return out


def grade_case(grade: str, info: dict, model: str):
    """A steel-only case through the case-file parser, exactly as a user would write it."""
    chem = "\n".join(f"{k} = {v!r}" for k, v in info["chem"].items() if v > 0)
    text = (f'title = "{grade} end-quench"\n[steel]\n{chem}\ngrain_size = {info["grain_size"]}\n'
            f'austenitize_c = {info["austenitize_c"]}\n[part]\nshape = "bar"\ndiameter_mm = 25\n'
            f'[quench]\nhtc_w_m2k = 3e4\nend_c = 40\n[transform]\nmodel = "{model}"\n')
    case = parse_case(tomllib.loads(text), text, f"{grade}.toml")
    return replace(case, grade=grade)


# -- (a) end-quench against the H-bands -------------------------------------------------------------
def hodge_orehoski_50_hrc(c):
    """HRC of 50 % martensite: 14 + 44 sqrt(C) (Hodge & Orehoski 1946 / Just; DOMAIN.md, memory, +/-3).

    >>> round(hodge_orehoski_50_hrc(0.40), 1)
    41.8
    """
    return 14.0 + 44.0 * math.sqrt(c)


def _crossing(j: np.ndarray, hrc: np.ndarray, level: float) -> float:
    """First J where a falling curve drops below level (linear interpolation); inf if never, 0 if at once."""
    below = np.flatnonzero(hrc < level)
    if below.size == 0:
        return math.inf
    i = int(below[0])
    if i == 0:
        return float(j[0])
    return float(j[i - 1] + (hrc[i - 1] - level) / (hrc[i - 1] - hrc[i]) * (j[i] - j[i - 1]))


@dataclass
class GradeScore:
    grade: str
    points: list = field(default_factory=list)   # (J, lo, hi, hrc, miss)
    j50_sim: float = math.nan
    j50_band: float = math.nan
    j50_martensite: float = math.nan
    rate_j50: float = math.nan
    rate_j50_martensite: float = math.nan
    history_j50: dict = field(default_factory=dict)   # cooling_figures at the 50 % martensite position

    @property
    def n(self):
        return len(self.points)

    def count(self, tol):
        return sum(p[4] <= tol + 1e-9 for p in self.points)

    def outside(self, tol):
        return self.n - self.count(tol)

    def bias(self, zone):
        lo, hi = ZONES[zone]
        d = [p[3] - 0.5 * (p[1] + p[2]) for p in self.points if lo <= p[0] <= hi and p[1] is not None]
        return float(np.mean(d)) if d else math.nan


def score_grade(grade: str, result, band, carbon: float) -> GradeScore:
    s = GradeScore(grade)
    for j, lo, hi in band:
        hrc = float(result.hrc_at([j * SIXTEENTH_M * 1000.0])[0])
        hrc = hrc if math.isfinite(hrc) else BELOW_SCALE_HRC
        miss = max(0.0, (lo - hrc) if lo is not None else 0.0, hrc - hi)
        s.points.append((j, lo, hi, hrc, miss))
    level = hodge_orehoski_50_hrc(carbon)
    fine = np.arange(1.0, 32.01, 0.25)
    hrc = result.hrc_at(fine * SIXTEENTH_M * 1000.0)
    s.j50_sim = _crossing(fine, np.where(np.isfinite(hrc), hrc, BELOW_SCALE_HRC), level)
    full = [(j, 0.5 * (lo + hi)) for j, lo, hi in band if lo is not None]
    if full:
        s.j50_band = _crossing(np.array([f[0] for f in full]), np.array([f[1] for f in full]), level)
        if math.isinf(s.j50_band) and len(full) < len(band):
            s.j50_band = math.nan          # the band middle is undefined where the minimum ends
    mart = result.read(result.fractions["martensite"], fine * SIXTEENTH_M * 1000.0)
    s.j50_martensite = _crossing(fine, mart, 0.5)
    if math.isfinite(s.j50_sim):
        s.rate_j50 = float(result.read(result.rate_cells, [s.j50_sim * SIXTEENTH_M * 1000.0])[0])
    if math.isfinite(s.j50_martensite):
        s.rate_j50_martensite = float(result.read(result.rate_cells, [s.j50_martensite * SIXTEENTH_M * 1000.0])[0])
        h = result.history
        nz, nr = h.shape
        iz = int(np.argmin(np.abs(h.z_m - s.j50_martensite * SIXTEENTH_M)))
        s.history_j50 = cooling_figures(h.time_s, h.temperature_c.reshape(h.time_s.size, nz, nr)[:, iz, -1])
    return s


def cooling_figures(time_s, temperature_c) -> dict:
    """Cooling rate at 700 C [K/s] (over 690-710 C) and the times 700 -> 500 C and 500 -> 300 C [s]
    of one falling temperature history (NaN where it does not get there).

    >>> f = cooling_figures(np.array([0.0, 100.0]), np.array([800.0, 300.0]))
    >>> round(f["rate_700"], 1), round(f["t_700_500"], 1), round(f["t_500_300"], 1)
    (5.0, 40.0, 40.0)
    """
    t, temp = np.asarray(time_s, float), np.asarray(temperature_c, float)

    def passing(x):
        i = int(np.argmax(temp <= x))
        if temp[i] > x or i == 0:
            return math.nan
        return float(t[i - 1] + (temp[i - 1] - x) / (temp[i - 1] - temp[i]) * (t[i] - t[i - 1]))

    return {"rate_700": 20.0 / (passing(690.0) - passing(710.0)), "t_700_500": passing(500.0) - passing(700.0),
            "t_500_300": passing(300.0) - passing(500.0)}


def run_endquench(model: str, grades=None, settings: EndQuenchSettings = DEFAULT_SETTINGS):
    """Simulate and score the H-band grades; returns ({grade: GradeScore}, {grade: JominyResult})."""
    bands, chem = load_bands(), load_chemistry()
    names = [g for g in (grades or list(bands)) if g in bands]
    cases = [grade_case(g, chem[g], model) for g in names]
    results = jominy(cases, settings, physics_di=False)
    scores = {g: score_grade(g, r, bands[g], chem[g]["chem"]["c"]) for g, r in zip(names, results)}
    return scores, dict(zip(names, results))


def quick_endquench(model: str = None):
    """The fast subset for the test suite: QUICK_GRADES with coarse steps."""
    from quenchwise.case import DEFAULT_MODEL
    return run_endquench(model or DEFAULT_MODEL, QUICK_GRADES, COARSE)[0]


def totals(scores: dict) -> dict:
    n = sum(s.n for s in scores.values())
    return {"grades": len(scores), "points": n,
            "in_band_pct": 100.0 * sum(s.count(0) for s in scores.values()) / n,
            "within_2_pct": 100.0 * sum(s.count(2) for s in scores.values()) / n,
            "within_4_pct": 100.0 * sum(s.count(4) for s in scores.values()) / n,
            "grades_over_2_outside_4": [g for g, s in scores.items() if s.outside(4) > 2],
            **{f"bias_{z}": float(np.nanmean([s.bias(z) for s in scores.values()])) for z in ZONES}}


def _f(v, fmt="{:+.1f}"):
    return "" if v is None or (isinstance(v, float) and not math.isfinite(v)) else fmt.format(v)


def _j(v):
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return "n/a"
    return ">J32" if math.isinf(v) else f"J{v:.1f}"


def endquench_markdown(scores: dict) -> list[str]:
    t = totals(scores)
    out = ["| grade | points | in band | within 2 | within 4 | bias J1-4 | bias J6-12 | bias J16-32 | "
           "J50 sim | J50 band middle |", "| --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |"]
    for g, s in scores.items():
        out.append(f"| {g} | {s.n} | {s.count(0)} | {s.count(2)} | {s.count(4)} | {_f(s.bias('J1-4'))} | "
                   f"{_f(s.bias('J6-12'))} | {_f(s.bias('J16-32'))} | {_j(s.j50_sim)} | {_j(s.j50_band)} |")
    out.append(f"| **all {t['grades']}** | {t['points']} | {t['in_band_pct']:.1f} % | {t['within_2_pct']:.1f} % | "
               f"{t['within_4_pct']:.1f} % | {_f(t['bias_J1-4'])} | {_f(t['bias_J6-12'])} | {_f(t['bias_J16-32'])} | | |")
    out.append("")
    out.append(f"Done-when figures: points within the band +/-2 HRC: **{t['within_2_pct']:.1f} %** (target >= 95 %); "
               f"grades with more than 2 points outside +/-4 HRC: **{', '.join(t['grades_over_2_outside_4']) or 'none'}** "
               "(target none).")
    return out


def compare_markdown(before: dict, after: dict, name_before: str, name_after: str) -> list[str]:
    out = [f"| grade | within 2 HRC: {name_before} | {name_after} | outside 4 HRC: {name_before} | {name_after} |",
           "| --- | ---: | ---: | ---: | ---: |"]
    for g in after:
        b, s = before[g], after[g]
        out.append(f"| {g} | {b.count(2)} / {b.n} | {s.count(2)} / {s.n} | {b.outside(4)} | {s.outside(4)} |")
    tb, ta = totals(before), totals(after)
    out.append(f"| **all** | {tb['within_2_pct']:.1f} % | {ta['within_2_pct']:.1f} % | "
               f"{sum(x.outside(4) for x in before.values())} | {sum(x.outside(4) for x in after.values())} |")
    return out


# -- cooling rate along the specimen ----------------------------------------------------------------
def load_rates() -> list[tuple[float, float]]:
    return [(float(r["sixteenths"]), float(r["rate_c_s"])) for r in _rows(RATES_CSV)]


def cooling_section(results: dict) -> list[str]:
    """The specimen's cooling rate at 705 C of a steel that does not transform above it (4140H)."""
    r = results.get("4140H") or next(iter(results.values()))
    out = [f"Cooling rate at 705 C along the specimen ({r.case.grade}) against the ASTM A255 scale (memory):", "",
           "| J | A255 C/s | simulated C/s | ratio |", "| ---: | ---: | ---: | ---: |"]
    for j, ref in load_rates():
        got = float(r.read(r.rate_cells, [j * SIXTEENTH_M * 1000.0])[0])
        out.append(f"| {j:g} | {ref:.3g} | {got:.3g} | {got / ref:.2f} |")
    return out


# -- (b) handbook bars ------------------------------------------------------------------------------
#: Reading positions of the bar file and the labels of Result.points() they map to.
BAR_POSITIONS = {"surface": "surface", "half_radius": "half radius", "centre": "centre"}
#: Defaults where the bar file names no quenchant or reading depth. A quenchant is a built-in preset
#: name or the quenchant model's [quench] keys, e.g. 'kind = "water", bath_c = 20, agitation = "mild"'.
BAR_DEFAULTS = {"quench_water": "water_20c_moderate", "quench_oil": "oil_conventional_60c_moderate",
                "surface_reading_depth_mm": "0"}


def bar_settings(path: Path = BARS_CSV) -> dict:
    """The file's '# key: value' lines that say how its bars were quenched and read (quenchants,
    surface reading depth), over BAR_DEFAULTS."""
    out = dict(BAR_DEFAULTS)
    for ln in Path(path).read_text("utf-8").splitlines():
        if ln.startswith("#") and ":" in ln:
            key, _, value = ln.lstrip("# ").partition(":")
            if key.strip() in BAR_DEFAULTS:
                out[key.strip()] = value.strip()
    return out


def bar_presets(path: Path = BARS_CSV) -> dict:
    """{"water": quenchant, "oil": quenchant} of the bar file (preset names or model keys)."""
    s = bar_settings(path)
    return {"water": s["quench_water"], "oil": s["quench_oil"]}


def run_bars(model: str, path: Path = BARS_CSV, presets: dict | None = None,
             surface_depth_mm: float | None = None):
    """The one bar scorer (section (b) and benchmarks/mass_effect.py): every reading of the bar file
    against the bar simulated through workflows.simulate, as a user's case would run.

    Each distinct bar (grade, chemistry, quenchant, diameter, austenitizing) is one case, all in one
    batch, quenched with the file's preset (or ``presets``) until its centre is 20 K above the bath
    (the handbook bars went to the bath; martensite then complete to within a few %). A reading is
    taken where the file says it was measured: half radius and centre at R/2 and 0, the surface at
    the file's surface reading depth (or ``surface_depth_mm``) below the surface. HRC below the scale
    counts as BELOW_SCALE_HRC. Returns the rows with sim_hrc (and sim_rate_700_c_s), or None if the
    file is absent.
    """
    if not Path(path).exists():
        return None
    from quenchwise.workflows import simulate
    rows, keys, cases, depth_m = bar_cases(model, path, presets, surface_depth_mm)
    results = simulate(cases)
    out = []
    for r in rows:
        res = results[keys[_bar_key(r)]]
        radius = bar_reading_radius(res, r, depth_m)
        hrc = float(hrc_from_hv(res.at(res.hv, radius)))
        out.append({**r, "sim_hrc": hrc if math.isfinite(hrc) else BELOW_SCALE_HRC,
                    "sim_rate_700_c_s": res.at(res.cooling_rate_700_c_s, radius)})
    return out


def bar_reading_radius(res, row: dict, depth_m: float) -> float:
    """Radius [m] of a bar file row's reading in its simulated bar (run_bars)."""
    radius = dict(res.points())[BAR_POSITIONS[row["position"]]]
    return radius - depth_m if row["position"] == "surface" else radius


def bar_cases(model, path: Path = BARS_CSV, presets: dict | None = None, surface_depth_mm: float | None = None):
    """(rows, {bar key: case index}, cases, surface reading depth [m]) of the bar file (run_bars;
    benchmarks/calibrate_kinetics.py keeps the bars' histories from them)."""
    presets = presets or bar_presets(Path(path))
    depth_m = (float(bar_settings(path)["surface_reading_depth_mm"]) if surface_depth_mm is None
               else float(surface_depth_mm)) / 1000.0
    end_c = {k: _bath_c(v) + 20.0 for k, v in presets.items()}
    rows = _rows(Path(path))
    keys, cases = {}, []
    for r in rows:
        k = _bar_key(r)
        if k in keys:
            continue
        chem = "\n".join(f"{el} = {float(r[el])!r}" for el in ("c", "mn", "si", "ni", "cr", "mo", "v") if float(r.get(el) or 0) > 0)
        text = (f'title = "{r["grade"]} {r["quenchant"]} {float(r["diameter_in"]):g} in"\n[steel]\n{chem}\n'
                f'austenitize_c = {float(r["austenitize_c"])}\n[part]\nshape = "bar"\n'
                f'diameter_mm = {float(r["diameter_in"]) * 25.4}\n[quench]\n{_quench_keys(presets[r["quenchant"]])}\n'
                f'end_c = {end_c[r["quenchant"]]}\n[transform]\nmodel = "{model}"\n')
        keys[k] = len(cases)
        cases.append(parse_case(tomllib.loads(text), text, "bar.toml"))
    return rows, keys, cases, depth_m


def _quench_keys(preset: str) -> str:
    """[quench] lines of a bar: a built-in preset name, or the quenchant model's keys written as
    'kind = "oil_conventional", bath_c = 60, agitation = "mild"'."""
    return preset.replace(", ", "\n") if "=" in preset else f'medium = "{preset}"'


def _quenchant(preset: str):
    """The Quenchant a bar file's quenchant names (built-in preset or model keys)."""
    from quenchwise.thermal.quenchant_model import quenchant_from_case
    from quenchwise.thermal.quenchants import load_quenchant
    if "=" not in preset:
        return load_quenchant(preset)
    q = tomllib.loads(_quench_keys(preset))
    return quenchant_from_case(q, q.get("bath_c"))


def _bath_c(preset: str) -> float:
    return _quenchant(preset).bath_c


def _bar_key(r: dict) -> tuple:
    return (r["grade"], r["quenchant"], float(r["diameter_in"]), float(r["austenitize_c"]),
            tuple(float(r.get(e) or 0) for e in ("c", "mn", "si", "ni", "cr", "mo", "v")))


def bar_summary(rows) -> dict:
    """Share within 3 HRC and mean bias (simulated - handbook) overall, by position, quenchant and grade."""
    d = np.array([r["sim_hrc"] - float(r["hrc"]) for r in rows])
    out = {"readings": len(rows), "within_3_pct": 100.0 * float(np.mean(np.abs(d) <= 3.0)),
           "rms": float(np.sqrt(np.mean(d * d))), "groups": {}}
    for field_, values in (("position", BAR_POSITIONS), ("quenchant", ("water", "oil")),
                           ("grade", dict.fromkeys(r["grade"] for r in rows))):
        for v in values:
            m = np.array([r[field_] == v for r in rows])
            if m.any():
                out["groups"][(field_, v)] = {"n": int(m.sum()), "bias": float(d[m].mean()),
                                              "rms": float(np.sqrt(np.mean(d[m] ** 2))),
                                              "within_3_pct": 100.0 * float(np.mean(np.abs(d[m]) <= 3.0))}
    return out


def bars_markdown(rows, per_bar: bool = False) -> list[str]:
    if rows is None:
        return ["data/mass_effect_bars.csv is not present: section skipped."]
    s = bar_summary(rows)
    out = [f"{s['readings']} readings; within 3 HRC: **{s['within_3_pct']:.0f} %** (target >= 70 %); "
           f"RMS {s['rms']:.1f} HRC. Simulated HRC below the scale counts as {BELOW_SCALE_HRC}.", "",
           "| group | readings | mean bias HRC | RMS HRC | within 3 HRC |", "| --- | ---: | ---: | ---: | ---: |"]
    for (field_, v), g in s["groups"].items():
        out.append(f"| {field_} {v} | {g['n']} | {g['bias']:+.1f} | {g['rms']:.1f} | {g['within_3_pct']:.0f} % |")
    if per_bar:
        from quenchwise.hardness.jominy_equivalent import SIXTEENTH_MM, equivalent_jominy_distance_mm
        out += ["", "| grade | quench | d in | surface hb / sim | half radius hb / sim | centre hb / sim | "
                "equivalent J surface / half radius / centre |", "| --- | --- | ---: | --- | --- | --- | --- |"]
        bars: dict = {}
        for r in rows:
            bars.setdefault((r["grade"], r["quenchant"], float(r["diameter_in"])), {})[r["position"]] = r
        for (g, q, d), v in bars.items():
            cells = [f"{float(v[p]['hrc']):.0f} / {v[p]['sim_hrc']:.1f}" if p in v else "" for p in BAR_POSITIONS]
            jeq = [float(equivalent_jominy_distance_mm(v[p]["sim_rate_700_c_s"])) / SIXTEENTH_MM if p in v else math.nan
                   for p in BAR_POSITIONS]
            cells.append(" / ".join(f"J{x:.1f}" if math.isfinite(x) else "<J1" for x in jeq))
            out.append(f"| {g} | {q} | {d:g} | " + " | ".join(cells) + " |")
        out += ["", "Equivalent J: the end-quench position, in 1/16 in, that cools at 700 C as fast as the simulated "
                "reading (ASTM A255 cooling-rate scale, memory; the trade's bar-to-end-quench convention; '<J1': "
                "faster than J1). In oil every simulated bar passes 700 C in the vapour blanket of the quenchant "
                "model: the 1/2 in bars sit near J7 through their section and the surfaces of the 2-4 in bars "
                "cool more slowly at 700 C than their half radius. The trade's bar-to-end-quench charts for mildly "
                "agitated oil put the centre of a 1/2 in bar at about J3-5 (memory): the small oil bars are slower "
                "at 700 C than the charts, which is where 8620's 1/2-1 in bars, hardening on the steep part of its "
                "curve, read 6-10 HRC soft (a matter of the quenchant model's vapour stage, not of the kinetics: "
                "the simulated end-quench curve of the same steel reads the handbook's 38-43 HRC at J3-4)."]
    return out


#: Other baths scored beside the file's presets (sensitivity only; the score uses the file's presets).
BAR_SENSITIVITY = ({"water": "water_20c_still", "oil": "oil_conventional_60c_still"},
                   {"water": "water_20c_moderate", "oil": "oil_conventional_60c_moderate"},
                   {"water": "water_20c_strong", "oil": "oil_conventional_60c_strong"})


def bar_sensitivity_markdown(model: str, path: Path = BARS_CSV) -> list[str]:
    """The bar scores with other presets: how much the unknown agitation of the handbook's bath moves them."""
    out = ["How much the handbook's bath (water / oil, agitation not recalled) moves the score: the same readings "
           "with other presets (sensitivity only).", "",
           "| water / oil preset | equivalent H water / oil | within 3 HRC | bias surface / half radius / centre | "
           "bias water / oil |", "| --- | --- | ---: | --- | --- |"]
    from quenchwise.thermal.severity import equivalent_severities
    for presets in (bar_presets(path),) + BAR_SENSITIVITY:
        s = bar_summary(run_bars(model, path, presets))
        g = s["groups"]
        h = " / ".join(f"{x.grossmann_h:.2f}" for x in equivalent_severities([_quenchant(presets[k]) for k in ("water", "oil")]))
        out.append(f"| {presets['water']} / {presets['oil']} | {h} | {s['within_3_pct']:.0f} % | "
                   + " / ".join(f"{g[('position', p)]['bias']:+.1f}" for p in BAR_POSITIONS) + " | "
                   + " / ".join(f"{g[('quenchant', q)]['bias']:+.1f}" for q in ("water", "oil")) + " |")
    return out


# -- (c) CCT/TTT facts ----------------------------------------------------------------------------
#: (label, chemistry, austenitize C, quantity, low, high, source)
FACTS = [
    ("Ms, 0.40C-0.85Mn-0.95Cr-0.20Mo", dict(c=0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20), 845.0, "ms", 300.0, 370.0,
     "isothermal transformation atlases, 330-340 C (memory, +/-30 C)"),
    ("Ms, eutectoid plain carbon", dict(c=0.78, mn=0.75, si=0.20), 800.0, "ms", 190.0, 250.0,
     "isothermal transformation atlases, about 220 C (memory, +/-30 C)"),
    ("pearlite nose time, eutectoid plain carbon [s]", dict(c=0.78, mn=0.75, si=0.20), 800.0, "nose_s", 1.0 / 3, 3.0,
     "isothermal atlases: start near 1 s (memory, factor 3)"),
    ("pearlite nose temperature, eutectoid plain carbon [C]", dict(c=0.78, mn=0.75, si=0.20), 800.0, "nose_c",
     520.0, 580.0, "isothermal atlases: 540-560 C (memory, +/-20 C)"),
    ("critical cooling rate for martensite, eutectoid plain carbon [C/s]", dict(c=0.78, mn=0.75, si=0.20), 800.0,
     "critical", 70.0, 280.0, "CCT of a eutectoid steel, about 140 C/s (Callister, Materials Science and "
     "Engineering, memory; factor 2)"),
    ("critical cooling rate for martensite, 4340 [C/s]", dict(c=0.40, mn=0.70, si=0.25, ni=1.80, cr=0.80, mo=0.25),
     845.0, "critical", 8.3 / 2.5, 8.3 * 2.5, "CCT of 4340, about 8.3 C/s (Callister, memory; factor 2.5)"),
]


def run_facts(model: str) -> list[dict]:
    from quenchwise.kinetics import MODELS
    from quenchwise.kinetics.diagrams import cct_diagram, ttt_diagram
    from quenchwise.steel import Composition, austenitize
    from quenchwise.steel.critical import martensite_start
    out = []
    for label, chem, aust, what, lo, hi, source in FACTS:
        state = austenitize(Composition(**chem), aust)
        if what == "ms":
            a = state.austenite_composition
            v = float(martensite_start(a.c, a.mn, a.ni, a.cr, a.mo))
        elif what.startswith("nose"):
            nose = ttt_diagram(state, 7.0, MODELS[model]()).nose("pearlite")
            v = math.nan if nose is None else (nose[0] if what == "nose_s" else nose[1])
        else:
            v = cct_diagram(state, 7.0, MODELS[model]()).critical_rates_k_s["constant_rate"]["martensite_only"]
        out.append({"fact": label, "value": v, "low": lo, "high": hi, "ok": bool(lo <= v <= hi), "source": source})
    return out


def facts_markdown(rows) -> list[str]:
    out = ["| fact | simulated | accepted | inside | source |", "| --- | ---: | --- | --- | --- |"]
    for r in rows:
        out.append(f"| {r['fact']} | {r['value']:.3g} | {r['low']:.3g}-{r['high']:.3g} | {'yes' if r['ok'] else 'NO'} | "
                   f"{r['source']} |")
    out.append(f"\n{sum(r['ok'] for r in rows)} of {len(rows)} facts inside their tolerance.")
    return out


# -- (d) DI --------------------------------------------------------------------------------------
def centre_rates(diameters_mm: np.ndarray) -> np.ndarray:
    """Centre cooling rate at 700 C of bars under an infinite quench (pure conduction, austenite
    properties: the curve Grossmann's premise maps J positions onto) [C/s]."""
    from quenchwise.thermal.geometry import Section
    from quenchwise.thermal.quenchants import Quenchant
    from quenchwise.thermal.solver import BatchSolver, SolverSettings, ThermalCase
    cases = [ThermalCase(name=f"{d:.0f} mm", section=Section.bar(d / 1000.0), initial_c=845.0,
                         outer=Quenchant.constant(1.0e6, 20.0, name="infinite"), end_c=650.0) for d in diameters_mm]
    hist = BatchSolver(cases, SolverSettings(cells=20)).run()
    out = []
    for h in hist:
        t, temp = h.time_s, h.temperature_c[:, 0]
        i = int(np.argmax(temp <= 700.0))
        out.append((temp[i - 1] - temp[i]) / (t[i] - t[i - 1]))
    return np.array(out)


def run_di(model: str, scores: dict, results: dict) -> list[dict]:
    from quenchwise.hardness.hardenability import a255_ideal_diameter
    from quenchwise.workflows.ideal_diameter import physics_ideal_diameters
    names = list(results)
    sim = physics_ideal_diameters([results[g].case for g in names])
    diam = np.geomspace(5.0, 400.0, 40)
    rates = centre_rates(diam)
    from quenchwise.workflows import simulate
    from quenchwise.workflows.ideal_diameter import DI_SETTINGS, _bar_case
    di_bars = simulate([_bar_case(results[g].case, d.mm, DI_SETTINGS) for g, d in zip(names, sim)])
    out = []
    for g, d, bar in zip(names, sim, di_bars):
        s = scores[g]
        ic = int(np.argmin(bar.history.radius_m))
        centre = cooling_figures(bar.history.time_s, bar.history.temperature_c[:, ic])
        def implied(rate):
            if not math.isfinite(rate):
                return math.nan
            return float(np.exp(np.interp(np.log(rate), np.log(rates[::-1]), np.log(diam[::-1])))) / 25.4
        out.append({"grade": g, "a255_in": a255_ideal_diameter(results[g].case.composition).inches,
                    "sim_in": d.inches, "implied_in": implied(s.rate_j50),
                    "implied_m_in": implied(s.rate_j50_martensite), "j50_m": s.j50_martensite, "jominy": s.history_j50,
                    "bar": centre, "bar_martensite": float(bar.at(bar.fractions["martensite"], 0.0))})
    return out


def di_markdown(rows) -> list[str]:
    out = ["Implied DI: the bar whose centre, under an infinite quench (pure conduction from 845 C), cools at "
           "700 C as fast as the end-quench position of 50 % martensite hardness (Hodge & Orehoski), or of "
           "50 % martensite by fraction (the simulated DI's own criterion).", "",
           "| grade | A255 DI in | simulated DI in | implied DI in (hardness) | implied DI in (fraction) | "
           "sim / A255 | sim / implied (hardness) |", "| --- | ---: | ---: | ---: | ---: | ---: | ---: |"]
    for r in rows:
        out.append(f"| {r['grade']} | {r['a255_in']:.2f} | {r['sim_in']:.2f} | {_f(r['implied_in'], '{:.2f}')} | "
                   f"{_f(r['implied_m_in'], '{:.2f}')} | "
                   f"{r['sim_in'] / r['a255_in']:.2f} | {_f(r['sim_in'] / r['implied_in'], '{:.2f}')} |")
    a = np.array([r["sim_in"] / r["a255_in"] for r in rows])
    b = np.array([r["sim_in"] / r["implied_in"] for r in rows if math.isfinite(r["implied_in"])])
    m = np.array([r["sim_in"] / r["implied_m_in"] for r in rows if math.isfinite(r["implied_m_in"])])
    out += ["", "Why the simulated DI exceeds the implied one: the cooling history of the two points that hold "
            "50 % martensite (by fraction), the end-quench position and the centre of the simulated DI bar "
            "(rate at 700 C in K/s, times 700->500 C and 500->300 C in s):", "",
            "| grade | J50 (fraction) | end-quench: rate 700 / t 700-500 / t 500-300 | DI bar centre: rate 700 / "
            "t 700-500 / t 500-300 | centre martensite |", "| --- | ---: | --- | --- | ---: |"]
    fig = lambda f: " / ".join(_f(f.get(k, math.nan), "{:.3g}") for k in ("rate_700", "t_700_500", "t_500_300"))  # noqa: E731
    for r in rows:
        out.append(f"| {r['grade']} | {_j(r['j50_m'])} | {fig(r['jominy'])} | {fig(r['bar'])} | "
                   f"{100 * r['bar_martensite']:.0f} % |")
    out += ["", "Reading: at the same martensite fraction the DI bar centre cools at 700 C at 0.4-0.6 times the rate of "
            "the end-quench position, but passes 500 -> 300 C 1.4-4.5 times faster. An end-quench position cools "
            "like a semi-infinite rod whose quenched end is held at the bath: its rate falls steeply as it cools "
            "(about 5 times from 700 to 400 C), while the centre of a round bar under an infinite quench keeps "
            "cooling at a rate close to its 700 C rate down to about 400 C. Grossmann's premise (equal cooling rate "
            "at 700 C, equal hardness) holds only where the products that decide 50 % martensite form near 700 C. "
            "In the model the bainite (and, in plain carbon steels, the late pearlite) that decides the 50 % point "
            "forms at 550-350 C, where the end-quench position is much slower; hence the simulated DI (a bar "
            "computed in full) exceeds the DI implied by the end-quench curve by 1.4 (hardness) to 1.6 "
            "(fraction). The kinetics are now calibrated on the handbook bars as well as the end-quench curves "
            "(benchmarks/calibrate_kinetics.py, with a temperature term on bainite): that took most of the bar "
            "centres' excess hardness away (section (b)) but left this ratio where it was, so the bars are "
            "matched through the composition and temperature terms rather than by moving the 50 % point of "
            "the DI bar. Not a numerical error: the end-quench specimen's rates "
            "match the A255 scale at 705 C along J1-J32 and the DI bars use the same solver."]
    out.append(f"\nGeometric mean sim / A255 **{np.exp(np.mean(np.log(a))):.2f}**, sim / implied (hardness) "
               f"**{np.exp(np.mean(np.log(b))):.2f}** ({len(b)} grades with a J50 on the bar), sim / implied "
               f"(fraction) **{np.exp(np.mean(np.log(m))):.2f}** ({len(m)} grades).")
    return out


# -- driver -----------------------------------------------------------------------------------------
def main(argv=None) -> int:
    from quenchwise.case import DEFAULT_MODEL
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--model", default=DEFAULT_MODEL)
    ap.add_argument("--sections", default="endquench,cooling,bars,facts,di")
    ap.add_argument("--baseline", default="li1998",
                    help="model scored beside the chosen one, grade by grade ('' for none)")
    ap.add_argument("--quick", action="store_true", help="the fast subset of grades with coarse steps")
    ap.add_argument("--bars", default=str(BARS_CSV), help="mass-effect bar readings CSV")
    ap.add_argument("--out", default=str(Path(__file__).resolve().parent / "accuracy.md"))
    a = ap.parse_args(argv)
    sections = set(a.sections.split(","))
    t0 = time.perf_counter()
    md = [f"# Accuracy scorecard: model `{a.model}`", "",
          f"`python benchmarks/accuracy.py --model {a.model}{' --quick' if a.quick else ''}`; reference values "
          "recalled from the standards and handbooks (memory), see benchmarks/data/.", ""]
    scores = results = None
    if sections & {"endquench", "cooling", "di"}:
        grades = QUICK_GRADES if a.quick else None
        scores, results = run_endquench(a.model, grades, COARSE if a.quick else DEFAULT_SETTINGS)
        if "endquench" in sections:
            md += ["## (a) End-quench against SAE J1268 H-bands", ""] + endquench_markdown(scores) + [""]
            if a.baseline and a.baseline != a.model:
                base, _ = run_endquench(a.baseline, grades, COARSE if a.quick else DEFAULT_SETTINGS)
                md += [f"Grade by grade against `{a.baseline}`:", ""] + compare_markdown(base, scores, a.baseline,
                                                                                           a.model) + [""]
        if "cooling" in sections:
            md += ["## End-quench specimen: cooling rate at 705 C", ""] + cooling_section(results) + [""]
    if "bars" in sections:
        md += ["## (b) Handbook as-quenched bars", ""] + bars_markdown(run_bars(a.model, Path(a.bars)), per_bar=True) + [""]
        if not a.quick:
            md += bar_sensitivity_markdown(a.model, Path(a.bars)) + [""]
    if "facts" in sections:
        md += ["## (c) CCT and TTT facts", ""] + facts_markdown(run_facts(a.model)) + [""]
    if "di" in sections:
        md += ["## (d) Ideal critical diameter", ""] + di_markdown(run_di(a.model, scores, results)) + [""]
    md.append(f"Run time {time.perf_counter() - t0:.0f} s.")
    text = "\n".join(md) + "\n"
    Path(a.out).write_text(text, "utf-8")
    print(text)
    return 0


if __name__ == "__main__":
    sys.exit(main())
