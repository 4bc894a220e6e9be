"""A parametric quenchant model: h(T_surface) from the three stages of liquid quenching.

The stages (DOMAIN.md section 3; ASTM D6200 / ISO 9950 describe them as A, B and C):

- vapour blanket (film boiling): a low, nearly constant h_vapour down to the surface temperature
  at which the blanket collapses, T_collapse;
- nucleate boiling: right below the collapse h jumps to the boiling peak h_peak, which holds down
  to the peak position T_peak and then falls off as a half Gaussian of width w_peak towards the
  boiling point of the liquid;
- convection to the bath: h_convection, the floor reached near the bath.

    s(T) = smoothstep((T_collapse - T) / TRANSITION_K)           (0 in the blanket, 1 below it)
    h(T) = (1 - s) h_vapour + s B(T)

with B(T) = h_conv + (h_peak - h_conv) (1 above T_peak, exp(-((T - T_peak) / w_peak)^2 / 2) below).
Every parameter rises with flow velocity, so h rises with agitation at every temperature.

Each class (water, brine, conventional / fast / hot oil, polymer solution) has reference values
at a reference bath, still, and smooth rules for bath temperature, agitation velocity v [m/s]
and polymer concentration. Agitation thins and breaks the vapour blanket (T_collapse rises,
h_vapour rises), lifts convection most and the boiling peak least. A hotter water bath
stabilises the blanket (T_collapse falls) and lowers the peak; polymer adds a film that lowers
T_collapse and the peak as the concentration rises.

The parameter values are NOT measurements: they were set by hand so that each preset's figures
on the ISO 9950 probe (thermal.probe.probe_figures: maximum centre cooling rate, its temperature,
rate at 300 C, times to 600 / 400 / 200 C) fall in the ranges of published cooling-curve figures
listed, with their sources, in quenchant_data/probe_targets.csv; tests/thermal/
test_quenchant_model.py checks every preset against that file. The equivalent Grossmann H of each
curve is derived from the curve (thermal.severity) and was not a target.

Named agitation levels map to velocities (AGITATION_M_S): still 0, mild 0.25, moderate 0.5,
strong 1.0, violent 1.5 m/s (the flow past the part; the ASTM D6482 / D6549 rigs run about
0.5 m/s (memory)). Beyond 1.5 m/s the rules are extrapolated and the model refuses.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from ..errors import InputError

#: Named agitation levels [m/s] (flow velocity past the part).
AGITATION_M_S = {"still": 0.0, "mild": 0.25, "moderate": 0.5, "strong": 1.0, "violent": 1.5}
MAX_AGITATION_M_S = 1.5
#: Width of the collapse of the vapour blanket [K] (the transition-boiling stretch).
TRANSITION_K = 25.0
KINDS = ("water", "brine", "oil_conventional", "oil_fast", "oil_hot", "polymer", "air", "gas")
LIQUIDS = KINDS[:6]
#: Bath temperatures each class accepts [C] (outside them the rules are not meant to hold).
BATH_RANGE_C = {"water": (5.0, 90.0), "brine": (5.0, 60.0), "oil_conventional": (20.0, 100.0),
                "oil_fast": (20.0, 100.0), "oil_hot": (100.0, 220.0), "polymer": (15.0, 60.0),
                "air": (-20.0, 100.0), "gas": (-20.0, 100.0)}
POLYMER_RANGE_PCT = (2.0, 35.0)
#: Illustrative flash points of the oil classes [C] (invented; use the oil's data sheet).
FLASH_POINT_C = {"oil_conventional": 200.0, "oil_fast": 200.0, "oil_hot": 280.0}


@dataclass(frozen=True)
class QuenchSpec:
    """What a case or a preset says about a bath: class, bath temperature, flow, concentration."""

    kind: str
    bath_c: float
    agitation_m_s: float = 0.0
    concentration_pct: float = 0.0


@dataclass(frozen=True)
class Stages:
    """The six numbers of the three-stage curve (W/m2K and C)."""

    h_vapour: float
    t_collapse_c: float
    h_peak: float
    t_peak_c: float
    w_peak_k: float
    h_convection: float


# Reference stages (still bath at the reference temperature) and the rules' coefficients.
# ref_bath: reference bath [C]; collapse_per_m_s: rise of T_collapse per m/s of flow [K s/m];
# collapse_per_k: change of T_collapse per K of bath above the reference [K/K]; peak_per_m_s,
# conv_per_m_s, vap_per_m_s: fractional rise per m/s; peak_per_k: fractional change per K of bath.
#: Water's still vapour stage at 20 C: blanket h [W/m2K], collapse temperature [C], and the fall of
#: the collapse per K of a hotter bath [K/K]. Cold water's blanket is thin and breaks early; a hot
#: bath keeps it long (common practice, no source). Set so that the still 20 C preset's probe
#: figures sit in their sourced ranges and a 1/2 in 1045 bar hardens at the surface in still water
#: as the handbook bars do (benchmarks/data/mass_effect_bars.csv, memory); the first setting (450,
#: 640, -3.5) held the probe above 600 C for 10.6 s and left that bar at 43 HRC.
WATER_H_VAPOUR, WATER_T_COLLAPSE, WATER_COLLAPSE_PER_K = 900.0, 760.0, -5.0
#: Conventional oil's still vapour stage at 60 C: blanket h [W/m2K] and collapse temperature [C],
#: set with the rest on the probe. The probe's figures barely tell these two apart (a blanket that
#: conducts more and breaks later cools the probe as one that conducts less and breaks earlier).
#: Choosing them by the handbook as-quenched oil bars where the probe leaves them free
#: (benchmarks/calibrate_quenchant.py) found no better pair: the best one scores 41 of 60 readings
#: within 3 HRC as this one does, and 40 of 60 left out grade by grade. So the probe setting stays.
OIL_BLANKET = (420.0, 600.0)
_CLASSES = {
    "water": dict(ref_bath=20.0, stages=Stages(WATER_H_VAPOUR, WATER_T_COLLAPSE, 12000.0, 420.0, 170.0, 900.0),
                  collapse_per_m_s=260.0, collapse_per_k=WATER_COLLAPSE_PER_K, peak_per_m_s=0.45, conv_per_m_s=2.0,
                  vap_per_m_s=1.2, peak_per_k=-0.006),
    # Polymer solutions start from the water stages they were set on (module notes): a film of
    # polymer, not a steam blanket, governs their vapour stage.
    "polymer_base": dict(ref_bath=20.0, stages=Stages(450.0, 640.0, 12000.0, 420.0, 170.0, 900.0),
                         collapse_per_m_s=260.0, collapse_per_k=-3.5, peak_per_m_s=0.45, conv_per_m_s=2.0,
                         vap_per_m_s=1.2, peak_per_k=-0.006),
    "brine": dict(ref_bath=20.0, stages=Stages(1500.0, 900.0, 20000.0, 480.0, 220.0, 1100.0),
                  collapse_per_m_s=100.0, collapse_per_k=-1.5, peak_per_m_s=0.35, conv_per_m_s=2.0,
                  vap_per_m_s=1.0, peak_per_k=-0.004),
    "oil_conventional": dict(ref_bath=60.0, stages=Stages(*OIL_BLANKET, 2700.0, 530.0, 110.0, 200.0),
                             collapse_per_m_s=120.0, collapse_per_k=0.3, peak_per_m_s=0.55, conv_per_m_s=1.6,
                             vap_per_m_s=1.0, peak_per_k=0.0),
    "oil_fast": dict(ref_bath=60.0, stages=Stages(600.0, 720.0, 3500.0, 600.0, 160.0, 300.0),
                     collapse_per_m_s=100.0, collapse_per_k=0.3, peak_per_m_s=0.5, conv_per_m_s=1.6,
                     vap_per_m_s=1.0, peak_per_k=0.0),
    "oil_hot": dict(ref_bath=160.0, stages=Stages(550.0, 700.0, 3300.0, 580.0, 150.0, 330.0),
                    collapse_per_m_s=100.0, collapse_per_k=0.3, peak_per_m_s=0.5, conv_per_m_s=1.6,
                    vap_per_m_s=1.0, peak_per_k=0.0),
}
#: Polymer solution (PAG type) at 40 C: water's stages at that bath, then per % of polymer the
#: collapse falls by POLY_COLLAPSE_PER_PCT and the peak and blanket h shrink (film of polymer).
POLY_COLLAPSE_PER_PCT = -3.0
POLY_PEAK_PER_PCT = -0.022
POLY_VAPOUR_PER_PCT = -0.01
#: A viscous solution convects less than water (fractional change per % polymer).
POLY_CONVECTION_PER_PCT = -0.015
#: Agitation breaks a polymer film more than a steam blanket (more rise of T_collapse per m/s).
POLY_COLLAPSE_PER_M_S = 300.0
#: Boiling peak position of polymer solutions [C]: between water and the oils (DOMAIN.md section 3).
POLY_PEAK_C = 470.0


def agitation_velocity(value, key: str = "quench.agitation") -> float:
    """A flow velocity [m/s] from a named level or a number (0 to MAX_AGITATION_M_S).

    >>> agitation_velocity("moderate"), agitation_velocity(0.8)
    (0.5, 0.8)
    """
    if isinstance(value, str):
        if value in AGITATION_M_S:
            return AGITATION_M_S[value]
        raise InputError(key, value, "one of " + ", ".join(AGITATION_M_S) + f" or a velocity 0-{MAX_AGITATION_M_S:g} m/s")
    try:
        v = float(value)
    except (TypeError, ValueError):
        v = math.nan
    if isinstance(value, bool) or not (math.isfinite(v) and 0.0 <= v <= MAX_AGITATION_M_S):
        raise InputError(key, value, f"a flow velocity from 0 to {MAX_AGITATION_M_S:g} m/s, or one of "
                         + ", ".join(AGITATION_M_S))
    return v


def agitation_name(v: float) -> str:
    """The named level of a velocity, or the velocity itself ('0.6 m/s').

    >>> agitation_name(0.5), agitation_name(0.6)
    ('moderate', '0.6 m/s')
    """
    for name, level in AGITATION_M_S.items():
        if abs(level - v) < 1e-9:
            return name
    return f"{v:g} m/s"


def check_spec(spec: QuenchSpec, prefix: str = "quench.") -> QuenchSpec:
    """Raise InputError (one line, key named) unless the spec is inside the model's range."""
    if spec.kind not in KINDS:
        raise InputError(f"{prefix}kind", spec.kind, "one of " + ", ".join(KINDS))
    lo, hi = BATH_RANGE_C[spec.kind]
    if not (math.isfinite(spec.bath_c) and lo <= spec.bath_c <= hi):
        raise InputError(f"{prefix}bath_c", spec.bath_c, f"{lo:g} to {hi:g} C for kind {spec.kind}")
    agitation_velocity(spec.agitation_m_s, f"{prefix}agitation")
    if spec.kind == "polymer":
        clo, chi = POLYMER_RANGE_PCT
        if not (math.isfinite(spec.concentration_pct) and clo <= spec.concentration_pct <= chi):
            raise InputError(f"{prefix}concentration_pct", spec.concentration_pct,
                             f"{clo:g} to {chi:g} (% polymer by volume) for kind polymer")
    elif spec.concentration_pct:
        raise InputError(f"{prefix}concentration_pct", spec.concentration_pct, "only with kind = 'polymer'")
    return spec


def _class_stages(kind: str, bath_c: float, v: float) -> tuple[Stages, float]:
    """Stages of an oil / water / brine class at a bath and flow, and T_collapse when still."""
    c = _CLASSES[kind]
    s, dk = c["stages"], bath_c - c["ref_bath"]
    still_collapse = s.t_collapse_c + c["collapse_per_k"] * dk
    peak = s.h_peak * max(0.2, 1.0 + c["peak_per_k"] * dk)
    stages = Stages(s.h_vapour * (1.0 + c["vap_per_m_s"] * v), still_collapse + c["collapse_per_m_s"] * v,
                    peak * (1.0 + c["peak_per_m_s"] * v), s.t_peak_c, s.w_peak_k,
                    s.h_convection * (1.0 + c["conv_per_m_s"] * v))
    return stages, still_collapse


def stages_of(spec: QuenchSpec) -> tuple[Stages, float]:
    """The six stage numbers of a liquid spec, and the still collapse temperature [C].

    >>> s, _ = stages_of(QuenchSpec("oil_conventional", 60.0, 0.5))
    >>> round(s.t_collapse_c), round(s.h_peak)
    (660, 3442)
    """
    if spec.kind == "polymer":
        water, water_still = _class_stages("polymer_base", spec.bath_c, 0.0)
        c = spec.concentration_pct
        v = spec.agitation_m_s
        still_collapse = water_still + POLY_COLLAPSE_PER_PCT * c
        cw = _CLASSES["polymer_base"]
        stages = Stages(water.h_vapour * max(0.3, 1.0 + POLY_VAPOUR_PER_PCT * c) * (1.0 + cw["vap_per_m_s"] * v),
                        still_collapse + POLY_COLLAPSE_PER_M_S * v,
                        water.h_peak * max(0.2, 1.0 + POLY_PEAK_PER_PCT * c) * (1.0 + cw["peak_per_m_s"] * v),
                        POLY_PEAK_C, water.w_peak_k,
                        water.h_convection * max(0.3, 1.0 + POLY_CONVECTION_PER_PCT * c) * (1.0 + cw["conv_per_m_s"] * v))
        return stages, still_collapse
    return _class_stages(spec.kind, spec.bath_c, spec.agitation_m_s)


def three_stage_htc(surface_c, h_vapour, t_collapse_c, h_peak, t_peak_c, w_peak_k, h_convection,
                    transition_k=TRANSITION_K):
    """Heat-transfer coefficient [W/(m2 K)] of the three-stage model at surface temperatures [C].

    h = (1 - s) h_vapour + s B(T): s = smoothstep((T_collapse - T) / transition) is 0 in the
    vapour blanket and 1 below it; B(T) = h_conv + (h_peak - h_conv) g(T) with g = 1 above the
    peak position T_peak and exp(-((T - T_peak) / w_peak)^2 / 2) below it (a blanket that
    collapses below T_peak cuts the peak: the highest h is then right below the collapse). Valid for any T; all h in W/(m2 K), T in C.
    The model's own construction (module docstring), not a published correlation.

    >>> h = three_stage_htc(np.array([800.0, 500.0, 60.0]), 400.0, 600.0, 3000.0, 520.0, 150.0, 300.0)
    >>> [round(float(x)) for x in h]
    [400, 2976, 325]
    """
    t = np.asarray(surface_c, dtype=float)
    g = np.where(t >= t_peak_c, 1.0, np.exp(-0.5 * ((t - t_peak_c) / w_peak_k) ** 2))
    boiling = h_convection + (h_peak - h_convection) * g
    x = np.clip((t_collapse_c - t) / transition_k, 0.0, 1.0)
    s = x * x * (3.0 - 2.0 * x)
    return (1.0 - s) * h_vapour + s * boiling


#: Surface temperatures of a generated table [C]: 5 K steps, 2 K around the collapse.
def _grid(bath_c: float, collapse_c: float) -> np.ndarray:
    coarse = np.arange(math.floor(bath_c / 5.0) * 5.0, 1105.0, 5.0)
    fine = np.arange(collapse_c - 40.0, collapse_c + 4.0, 2.0)
    grid = np.unique(np.round(np.concatenate([coarse, fine[(fine > bath_c) & (fine < 1100.0)], [bath_c]]), 3))
    return grid[grid >= bath_c]


def _kind_label(kind: str) -> str:
    return {"oil_conventional": "oil", "oil_fast": "oil", "oil_hot": "oil"}.get(kind, kind)


def describe(spec: QuenchSpec) -> str:
    """Plain description of a spec, e.g. 'polymer solution (PAG type) 15 % at 35 C, 0.6 m/s'."""
    what = {"water": "water", "brine": "brine (10 % NaCl)", "oil_conventional": "conventional (unaccelerated) quench oil",
            "oil_fast": "fast (accelerated) quench oil", "oil_hot": "hot (marquench) oil",
            "polymer": f"polymer solution (PAG type) {spec.concentration_pct:g} %", "air": "air", "gas": "gas"}[spec.kind]
    flow = agitation_name(spec.agitation_m_s)
    flow = "still bath" if flow == "still" else f"{flow} agitation" if flow in AGITATION_M_S else f"flow {flow}"
    return f"{what} at {spec.bath_c:g} C, {flow}"


def model_quenchant(spec: QuenchSpec, name: str | None = None):
    """The Quenchant of a spec: a table of the three-stage h(T) from the bath to 1100 C.

    Air and gas are the built-in curves (natural convection plus radiation; forced gas) moved to
    the spec's bath; agitation does not apply to them.
    """
    from .quenchants import load_quenchant

    check_spec(spec)
    if spec.kind in ("air", "gas"):
        if spec.agitation_m_s:
            raise InputError("quench.agitation", spec.agitation_m_s, "still (0) for kind air or gas "
                             "(use kind = 'gas' for forced gas)")
        base = load_quenchant("air_20c_still" if spec.kind == "air" else "gas_20c_forced")
        return base.at_bath(spec.bath_c) if name is None else replace(base.at_bath(spec.bath_c), name=name)
    from .quenchants import Quenchant

    stages, _ = stages_of(spec)
    t = _grid(spec.bath_c, stages.t_collapse_c)
    h = three_stage_htc(t, *[getattr(stages, f) for f in Stages.__dataclass_fields__])
    label = name or _default_name(spec)
    return Quenchant(label, float(spec.bath_c), t, np.round(h, 1), kind=_kind_label(spec.kind),
                     agitation=agitation_name(spec.agitation_m_s), flash_point_c=FLASH_POINT_C.get(spec.kind),
                     source=model_source(spec, stages), description=describe(spec))


def _default_name(spec: QuenchSpec) -> str:
    conc = f"_{spec.concentration_pct:g}pct" if spec.kind == "polymer" else ""
    return f"{spec.kind}{conc}_{spec.bath_c:g}c_{spec.agitation_m_s:g}m_s"


def model_source(spec: QuenchSpec, stages: Stages) -> str:
    return ("three-stage quenchant model (thermal/quenchant_model.py), parameters set to published ISO 9950 / "
            "ASTM D6200 / D6482 type probe figures (quenchant_data/probe_targets.csv), not measured data: "
            f"vapour blanket h {stages.h_vapour:.0f} W/m2K down to {stages.t_collapse_c:.0f} C, boiling peak "
            f"{stages.h_peak:.0f} W/m2K from {stages.t_peak_c:.0f} C (width {stages.w_peak_k:.0f} K), convection "
            f"{stages.h_convection:.0f} W/m2K" + ("; flash point illustrative (invented): use the open-cup flash point "
                                                  "on your oil's data sheet" if spec.kind in FLASH_POINT_C else ""))


#: The built-in presets: name -> spec (the 30 liquid names the library had; a case reaches any
#: other bath, flow or concentration through [quench] kind). air_20c_still and gas_20c_forced
#: stay hand-written curves (not from this model).
def _presets() -> dict[str, QuenchSpec]:
    out = {}
    levels = ("still", "moderate", "strong")
    for bath in (20, 40, 70):
        for a in levels:
            out[f"water_{bath}c_{a}"] = QuenchSpec("water", bath, AGITATION_M_S[a])
    for a in levels:
        out[f"brine_10pct_20c_{a}"] = QuenchSpec("brine", 20, AGITATION_M_S[a])
        out[f"oil_conventional_60c_{a}"] = QuenchSpec("oil_conventional", 60, AGITATION_M_S[a])
        out[f"oil_fast_60c_{a}"] = QuenchSpec("oil_fast", 60, AGITATION_M_S[a])
        out[f"oil_hot_160c_{a}"] = QuenchSpec("oil_hot", 160, AGITATION_M_S[a])
        for c in (10, 20, 30):
            out[f"polymer_{c}pct_40c_{a}"] = QuenchSpec("polymer", 40, AGITATION_M_S[a], c)
    return out


PRESETS = _presets()


def probe_targets() -> list[dict]:
    """The calibration targets (quenchant_data/probe_targets.csv): preset, figure, low, high, source."""
    from importlib import resources

    from ..csvmeta import commented_csv_dicts

    text = (resources.files("quenchwise.thermal") / "quenchant_data" / "probe_targets.csv").read_text("utf-8")
    return [{**r, "low": float(r["low"]), "high": float(r["high"])} for r in commented_csv_dicts(text)]


#: Curves of the library that are not from this model (kept as hand-written files).
HAND_WRITTEN = ("air_20c_still", "gas_20c_forced")


def preset_text(q, figures: dict, grossmann_h: float) -> str:
    """The built-in CSV of a curve with its cached probe figures and equivalent H."""
    from .quenchants import quenchant_csv_text

    lines = quenchant_csv_text(q).splitlines()
    head = lines.index("surface_c,htc_w_m2k")
    cached = [f"# probe_{k}: {v:.4g}" for k, v in figures.items()] + [f"# equivalent_h: {grossmann_h:.4g}"]
    return "\n".join(lines[:head] + cached + lines[head:]) + "\n"


def write_presets(folder=None) -> list[str]:
    """(Re)write every built-in curve file: the model's presets from PRESETS, and the cached probe
    figures and equivalent H of all of them (the hand-written air and gas curves keep their table).
    Run after changing the model: python -m quenchwise.thermal.quenchant_model"""
    from importlib import resources
    from pathlib import Path

    from .probe_figures import probe_figures
    from .quenchants import _parse
    from .severity import equivalent_severities

    folder = Path(folder or (resources.files("quenchwise.thermal") / "quenchants"))
    curves = [model_quenchant(spec, name) for name, spec in PRESETS.items()]
    curves += [_parse((folder / f"{n}.csv").read_text("utf-8"), n, n) for n in HAND_WRITTEN]
    severities = equivalent_severities(curves)
    written = []
    for q, s in zip(curves, severities):
        figures = probe_figures(q)
        (folder / f"{q.name}.csv").write_text(preset_text(q, figures, s.grossmann_h), "utf-8")
        written.append(q.name)
    return written


if __name__ == "__main__":  # pragma: no cover - maintenance entry point
    print("\n".join(write_presets()))


#: Default bath of each class when a case gives none [C] (the presets' baths).
DEFAULT_BATH_C = {"water": 20.0, "brine": 20.0, "oil_conventional": 60.0, "oil_fast": 60.0, "oil_hot": 160.0,
                  "polymer": 40.0, "air": 20.0, "gas": 20.0}
#: [quench] keys of the model (besides bath_c): kind, agitation (level or m/s), concentration_pct.
CASE_KEYS = ("kind", "agitation", "concentration_pct")


def quenchant_from_case(q: dict, bath_c: float | None):
    """The Quenchant of a case's [quench] table that names a class (kind = ...), e.g.
    kind = "polymer", concentration_pct = 15, bath_c = 35, agitation = 0.6 (m/s) or "moderate".

    >>> quenchant_from_case({"kind": "polymer", "concentration_pct": 15, "agitation": 0.6}, 35.0).description
    'polymer solution (PAG type) 15 % at 35 C, flow 0.6 m/s'
    """
    kind = q.get("kind")
    if not isinstance(kind, str) or kind not in KINDS:
        raise InputError("quench.kind", kind, "one of " + ", ".join(KINDS))
    for other in ("medium", "htc_w_m2k", "severity_h"):
        if other in q:
            raise InputError(f"quench.{other}", q[other], "not together with quench.kind (one way to name the quenchant)")
    agitation = agitation_velocity(q.get("agitation", "still"), "quench.agitation")
    conc = q.get("concentration_pct", 0.0)
    if isinstance(conc, bool) or not isinstance(conc, (int, float)):
        raise InputError("quench.concentration_pct", conc, "a number (% polymer) for kind polymer")
    if kind == "polymer" and "concentration_pct" not in q:
        raise InputError("quench.concentration_pct", "(missing)", "the polymer concentration in % for kind polymer "
                         f"({POLYMER_RANGE_PCT[0]:g} to {POLYMER_RANGE_PCT[1]:g})")
    spec = QuenchSpec(kind, DEFAULT_BATH_C[kind] if bath_c is None else float(bath_c), agitation, float(conc))
    return model_quenchant(check_spec(spec))
