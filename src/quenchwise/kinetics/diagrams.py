"""TTT and CCT diagrams of a steel as data, computed by the same stepper the quench simulation uses.

Pure: chemistry and austenitizing state in, data objects out (figures: plots.ttt_figure and
plots.cct_figure; files: the diagram command).

TTT (isothermal): the austenite is taken instantly to each hold temperature between the upper
critical temperature and Ms and held there (follow_history on constant histories, all temperatures
at once). For each product the start is the time its normalized fraction X reaches 1 % and the
finish the time it reaches 99 %; X is normalized as in the stepper (proeutectoid ferrite or
cementite: to its lever-rule amount at that temperature; pearlite, bainite: to the austenite left
when it started). A product pre-empted by a later one (ferrite by pearlite, pearlite by bainite)
has no finish there. The total start and finish are 1 % and 99 % of the austenite transformed by any
product. Lines: Ae3 (or Acm), Ae1, the model's Bs, Ms and the Koistinen-Marburger M50 and M90.

CCT (continuous cooling): two families of cooling paths from the austenitizing temperature to just
above the bath: constant rates, and Newtonian cooling T = T_bath + (T_aus - T_bath) exp(-t / tau)
(a body of small Biot number in a bath with constant h). On each path the start of a product is where
1 % of the part has become that product, its finish where it has reached 99 % of what it reaches on
that path; martensite starts at the Ms of the austenite then left. Each path ends with its final
fractions and as-quenched hardness (Maynier et al. 1978 with the path's cooling rate at 700 C).
Critical rates are read on a dense set of paths by log-linear interpolation.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..hardness import hardness_hv, hrc_from_hv
from ..steel.austenite import AusteniteState
from .martensite import van_bohemen_sietsma_alpha
from .transformation import PRODUCTS, RATE_TEMPERATURE_C, SteelNodes, follow_history

#: Diffusional products drawn on the diagrams, in order of appearance on cooling.
DIFFUSIONAL = ("ferrite", "cementite", "pearlite", "bainite")
START, FINISH = 0.01, 0.99
#: Isothermal hold times: log-spaced from 1 ms to 11.6 days, 50 per decade.
TTT_TIMES_S = np.concatenate([[0.0], np.logspace(-3.0, 6.0, 451)])
#: Temperature spacing of the TTT holds [K].
TTT_STEP_K = 2.5
#: Constant cooling rates [K/s]: a dense set for lines and critical rates, and those drawn.
CCT_RATES_K_S = np.unique(np.round(np.concatenate([np.logspace(-2.0, 3.0, 41),
                                                    [0.03, 0.1, 0.3, 1.0, 3.0, 10.0, 30.0, 100.0, 300.0]]), 6))
CCT_RATES_SHOWN = (0.03, 0.1, 0.3, 1.0, 3.0, 10.0, 30.0, 100.0, 300.0)
#: Newtonian time constants tau [s], dense and drawn.
CCT_TAUS_S = np.unique(np.round(np.concatenate([np.logspace(0.0, 4.5, 37),
                                                 [2.0, 6.0, 20.0, 60.0, 200.0, 600.0, 2000.0, 6000.0]]), 6))
CCT_TAUS_SHOWN = (2.0, 6.0, 20.0, 60.0, 200.0, 600.0, 2000.0, 6000.0)
#: Temperature step along the cooling paths [K] and how far above the bath they end [K].
CCT_STEP_K = 1.0
CCT_END_ABOVE_BATH_K = 2.0


def _levels(state: AusteniteState, nodes: SteelNodes, bs: float) -> dict:
    ms = float(nodes.ms(nodes.carbon0)[0])
    alpha = float(nodes.alpha[0])
    levels = {"Acm" if state.hypereutectoid else "Ae3": state.upper_critical, "Ae1": state.ae1}
    levels.update({"Bs": bs, "Ms": ms, "M50": ms - np.log(2.0) / alpha, "M90": ms - np.log(10.0) / alpha})
    return levels


def _nodes(state: AusteniteState, grain_size: float, count: int, martensite_law: str) -> SteelNodes:
    return SteelNodes.from_states([state], [grain_size], [count], martensite_law=martensite_law)


def _first_crossing(t: np.ndarray, y: np.ndarray, level: np.ndarray, log_time: bool = False):
    """Per column of y (n_t, n): the time at which y first reaches level (linear interpolation
    between the bracketing rows, in log t if asked); NaN where it never does."""
    reached = y >= level[None, :]
    any_ = reached.any(axis=0)
    i = np.argmax(reached, axis=0)
    cols = np.arange(y.shape[1])
    i0 = np.maximum(i - 1, 0)
    y0, y1 = y[i0, cols], y[i, cols]
    t_2d = t if t.ndim == 2 else t[:, None] * np.ones((1, y.shape[1]))
    t0, t1 = t_2d[i0, cols], t_2d[i, cols]
    with np.errstate(divide="ignore", invalid="ignore"):
        w = np.clip((level - y0) / np.where(y1 > y0, y1 - y0, 1.0), 0.0, 1.0)
        if log_time:
            lt0, lt1 = np.log(np.maximum(t0, 1e-12)), np.log(np.maximum(t1, 1e-12))
            out = np.where(t0 > 0, np.exp(lt0 + w * (lt1 - lt0)), t1)
        else:
            out = t0 + w * (t1 - t0)
    return np.where(any_, out, np.nan), np.where(any_, i, -1), w


# -- TTT ------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class TTTDiagram:
    """Isothermal start and finish times per product [s] (NaN: not reached) at each temperature."""

    model: str
    state: AusteniteState
    grain_size: float
    temperature_c: np.ndarray
    start_s: dict
    finish_s: dict
    total_start_s: np.ndarray
    total_finish_s: np.ndarray
    levels_c: dict
    products: tuple

    def nose(self, product: str) -> tuple[float, float] | None:
        """(time s, temperature C) of the shortest start of a product, None if it never starts."""
        t = self.start_s[product]
        if not np.isfinite(t).any():
            return None
        i = int(np.nanargmin(t))
        return float(t[i]), float(self.temperature_c[i])

    def bay(self) -> tuple[float, float] | None:
        """(time s, temperature C) of the longest total start between the pearlite (or ferrite) nose
        and the bainite nose: the bay. None if the total start has no local maximum there."""
        upper = self.nose("pearlite") or self.nose("cementite") or self.nose("ferrite")
        lower = self.nose("bainite")
        if upper is None or lower is None or not upper[1] > lower[1]:
            return None
        between = (self.temperature_c < upper[1]) & (self.temperature_c > lower[1]) & np.isfinite(self.total_start_s)
        if not between.any():
            return None
        i = np.flatnonzero(between)[int(np.argmax(self.total_start_s[between]))]
        t_bay = self.total_start_s[i]
        at_upper = float(np.interp(upper[1], self.temperature_c[::-1], self.total_start_s[::-1]))
        if not (t_bay > at_upper and t_bay > lower[0]):
            return None
        return float(t_bay), float(self.temperature_c[i])

    def summary(self) -> dict:
        noses = {p: self.nose(p) for p in self.products}
        bay = self.bay()
        return {
            "kind": "ttt", "model": self.model, "grain_size": self.grain_size,
            "austenitize_c": self.state.austenitize_c, "austenite_carbon_wt_pct": round(self.state.carbon, 4),
            "levels_c": {k: round(float(v), 1) for k, v in self.levels_c.items()},
            "noses": {p: (None if n is None else {"time_s": _sig(n[0]), "temperature_c": round(n[1], 1)})
                      for p, n in noses.items()},
            "bay": None if bay is None else {"time_s": _sig(bay[0]), "temperature_c": round(bay[1], 1)},
        }

    def rows(self) -> list[dict]:
        """One row per hold temperature: start and finish of each product and of the total [s]."""
        out = []
        for j, t in enumerate(self.temperature_c):
            row = {"temperature_c": round(float(t), 2)}
            for p in self.products:
                row[f"{p}_start_s"] = _cell(self.start_s[p][j])
                row[f"{p}_finish_s"] = _cell(self.finish_s[p][j])
            row["total_start_s"] = _cell(self.total_start_s[j])
            row["total_finish_s"] = _cell(self.total_finish_s[j])
            out.append(row)
        return out


def ttt_diagram(state: AusteniteState, grain_size: float, model, martensite_law: str = "koistinen_marburger",
                step_k: float = TTT_STEP_K) -> TTTDiagram:
    """Isothermal transformation diagram of the austenitized state with a kinetics model.

    >>> from quenchwise.steel import Composition, austenitize
    >>> from quenchwise.kinetics import Li1998
    >>> d = ttt_diagram(austenitize(Composition(c=0.77, mn=0.75, si=0.25), 820.0), 7.0, Li1998())
    >>> t, temp = d.nose("pearlite")
    >>> 0.3 < t < 3.0 and 530 < temp < 600
    True
    """
    probe = _nodes(state, grain_size, 1, martensite_law)
    bs = float(np.asarray(model.bainite_start(probe.chem))[0])
    ms = float(probe.ms(probe.carbon0)[0])
    top = state.upper_critical - 0.5
    temps = np.arange(top, ms, -step_k)
    temps = np.unique(np.concatenate([temps, [state.ae1 - 0.5, bs - 0.5]]))[::-1]
    temps = temps[(temps > ms + 0.5) & (temps <= top)]
    nodes = _nodes(state, grain_size, temps.size, martensite_law)
    history = np.broadcast_to(temps[None, :], (TTT_TIMES_S.size, temps.size))
    run = follow_history(nodes, model, TTT_TIMES_S, history, record=True)
    st = run.stepper
    f = run.fractions_at
    eq_pro = nodes.proeutectoid_equilibrium(temps)
    products = [p for p in DIFFUSIONAL if p not in ("ferrite", "cementite")]
    pro = "cementite" if state.hypereutectoid else "ferrite"
    if np.max(eq_pro) > 0.005:
        products.insert(0, pro)
    normalized = {}
    with np.errstate(divide="ignore", invalid="ignore"):
        if pro in products:
            base0 = nodes.cementite0 if pro == "cementite" else nodes.ferrite0
            normalized[pro] = np.where(eq_pro > 0.005, (f[pro] - base0) / eq_pro, 0.0)
        for p in ("pearlite", "bainite"):
            base = st.base[p]
            normalized[p] = np.where(base > 0, f[p] / np.where(base > 0, base, 1.0), 0.0)
    start = {p: _first_crossing(TTT_TIMES_S, normalized[p], np.full(temps.size, START), log_time=True)[0]
             for p in products}
    finish = {p: _first_crossing(TTT_TIMES_S, normalized[p], np.full(temps.size, FINISH), log_time=True)[0]
              for p in products}
    transformed = 1.0 - f["austenite"] / nodes.austenite0[None, :]
    total_start = _first_crossing(TTT_TIMES_S, transformed, np.full(temps.size, START), log_time=True)[0]
    total_finish = _first_crossing(TTT_TIMES_S, transformed, np.full(temps.size, FINISH), log_time=True)[0]
    return TTTDiagram(model=model.name, state=state, grain_size=float(grain_size), temperature_c=temps,
                      start_s=start, finish_s=finish, total_start_s=total_start, total_finish_s=total_finish,
                      levels_c=_levels(state, nodes, bs), products=tuple(products))


# -- CCT ------------------------------------------------------------------------------------------
@dataclass(frozen=True)
class CoolingPath:
    """One cooling path of a CCT diagram and what it produced."""

    family: str                    # "constant_rate" | "newtonian"
    parameter: float               # rate [K/s] or tau [s]
    rate_700_c_s: float
    time_s: np.ndarray
    temperature_c: np.ndarray
    events: dict                   # (product, "start"|"finish") -> (time s, temperature C)
    final: dict                    # product -> fraction
    hv: float
    hrc: float
    shown: bool

    @property
    def label(self) -> str:
        if self.family == "constant_rate":
            return f"{_sig(self.parameter):g} K/s"
        return f"tau {_sig(self.parameter):g} s"


@dataclass(frozen=True)
class CCTDiagram:
    model: str
    state: AusteniteState
    grain_size: float
    bath_c: float
    levels_c: dict
    paths: list = field(default_factory=list)
    critical_rates_k_s: dict = field(default_factory=dict)

    def family(self, name: str) -> list[CoolingPath]:
        return [p for p in self.paths if p.family == name]

    def summary(self) -> dict:
        return {
            "kind": "cct", "model": self.model, "grain_size": self.grain_size,
            "austenitize_c": self.state.austenitize_c, "bath_c": self.bath_c,
            "austenite_carbon_wt_pct": round(self.state.carbon, 4),
            "levels_c": {k: round(float(v), 1) for k, v in self.levels_c.items()},
            "critical_rates_k_s": {fam: {k: (None if not np.isfinite(v) else _sig(v)) for k, v in d.items()}
                                   for fam, d in self.critical_rates_k_s.items()},
            "paths": [_path_summary(p) for p in self.paths if p.shown],
        }

    def rows(self) -> list[dict]:
        """One row per cooling path (dense set): parameters, events, final fractions, hardness."""
        out = []
        for p in self.paths:
            row = {"family": p.family, "parameter": p.parameter,
                   "parameter_unit": "K/s" if p.family == "constant_rate" else "s (tau)",
                   "rate_700_c_s": _cell(p.rate_700_c_s), "shown": int(p.shown)}
            for product, kinds in [(q, ("start", "finish")) for q in DIFFUSIONAL] + [("martensite", ("start",))]:
                for kind in kinds:
                    ev = p.events.get((product, kind))
                    row[f"{product}_{kind}_s"] = _cell(ev[0] if ev else np.nan)
                    row[f"{product}_{kind}_c"] = _cell(ev[1] if ev else np.nan)
            for name in PRODUCTS:
                row[f"final_{name}"] = round(float(p.final[name]), 5)
            row["hv"] = _cell(p.hv)
            row["hrc"] = _cell(p.hrc)
            out.append(row)
        return out


def _path_summary(p: CoolingPath) -> dict:
    return {"family": p.family, "label": p.label, "rate_700_c_s": _sig(p.rate_700_c_s),
            "final_pct": {k: round(100.0 * float(v), 1) for k, v in p.final.items() if v >= 0.0005},
            "hv": None if not np.isfinite(p.hv) else round(float(p.hv)),
            "hrc": None if not np.isfinite(p.hrc) else round(float(p.hrc), 1),
            "events": {f"{k[0]}_{k[1]}": {"time_s": _sig(v[0]), "temperature_c": round(float(v[1]), 1)}
                       for k, v in p.events.items()}}


def _paths(t0: float, t_end: float, rates, taus, bath_c: float):
    """Times (n_T, n_paths) along a common temperature grid for every path."""
    temps = np.append(np.arange(t0, t_end, -CCT_STEP_K), t_end)
    rates, taus = np.asarray(rates, dtype=float), np.asarray(taus, dtype=float)
    t_const = (t0 - temps)[:, None] / rates[None, :]
    t_newton = np.log((t0 - bath_c) / (temps - bath_c))[:, None] * taus[None, :]
    return temps, np.concatenate([t_const, t_newton], axis=1)


def _critical_rate(rates: np.ndarray, values: np.ndarray, level: float, above: bool) -> float:
    """Rate (log-linear interpolation) where values cross level: above=True gives the smallest rate
    beyond which values stay below level; above=False the largest rate below which values stay
    below level (values rising with rate). NaN when the crossing is off the grid."""
    order = np.argsort(rates)
    r, v = np.log(rates[order]), values[order]
    if above:   # values fall with rate (diffusional products): last index still above level
        high = np.flatnonzero(v >= level)
        if high.size == 0 or high[-1] == v.size - 1:
            return float("nan")
        i = high[-1]
    else:       # values rise with rate (martensite): last index still below level
        low = np.flatnonzero(v < level)
        if low.size == 0 or low[-1] == v.size - 1:
            return float("nan")
        i = low[-1]
    w = (level - v[i]) / (v[i + 1] - v[i]) if v[i + 1] != v[i] else 0.0
    return float(np.exp(r[i] + w * (r[i + 1] - r[i])))


def cct_diagram(state: AusteniteState, grain_size: float, model, bath_c: float = 20.0,
                martensite_law: str = "koistinen_marburger") -> CCTDiagram:
    """Continuous cooling diagram: constant-rate and Newtonian paths from the austenitizing temperature.

    >>> from quenchwise.steel import Composition, austenitize
    >>> from quenchwise.kinetics import Li1998
    >>> d = cct_diagram(austenitize(Composition(c=0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20), 850.0), 7.0, Li1998())
    >>> slow, fast = d.family("constant_rate")[0], d.family("constant_rate")[-1]
    >>> slow.final["martensite"] < 0.01 < 0.9 < fast.final["martensite"]
    True
    """
    t0 = state.austenitize_c
    t_end = bath_c + CCT_END_ABOVE_BATH_K
    rates, taus = CCT_RATES_K_S, CCT_TAUS_S
    temps, times = _paths(t0, t_end, rates, taus, bath_c)
    n = times.shape[1]
    nodes = _nodes(state, grain_size, n, martensite_law)
    history = np.broadcast_to(temps[:, None], times.shape)
    run = follow_history(nodes, model, times, history, record=True)
    st, f = run.stepper, run.fractions_at
    rate_700 = np.concatenate([rates, (RATE_TEMPERATURE_C - bath_c) / taus])
    final = {k: v.copy() for k, v in st.fractions().items()}
    chem = state.austenite_composition.as_dict()
    hv = hardness_hv(final, rate_700, chem, undissolved_cementite=state.cementite)
    hrc = hrc_from_hv(hv)

    formed = {"ferrite": f["ferrite"] - nodes.ferrite0[None, :], "cementite": f["cementite"] - nodes.cementite0[None, :],
              "pearlite": f["pearlite"], "bainite": f["bainite"], "martensite": f["martensite"]}
    events = [dict() for _ in range(n)]
    for product, y in formed.items():
        total = y[-1]
        t_s, i_s, w_s = _first_crossing(times, y, np.full(n, START))
        t_f, i_f, w_f = _first_crossing(times, y, np.maximum(FINISH * total, START))
        for j in range(n):
            if total[j] < START:
                continue
            for kind, tt, ii, ww in (("start", t_s, i_s, w_s), ("finish", t_f, i_f, w_f)):
                if product == "martensite" and kind == "finish":
                    continue
                if ii[j] >= 0:
                    k0 = max(ii[j] - 1, 0)
                    temp = temps[k0] + ww[j] * (temps[ii[j]] - temps[k0])
                    events[j][(product, kind)] = (float(tt[j]), float(temp))
    shown_r = np.isin(np.round(rates, 6), np.round(CCT_RATES_SHOWN, 6))
    shown_t = np.isin(np.round(taus, 6), np.round(CCT_TAUS_SHOWN, 6))
    shown = np.concatenate([shown_r, shown_t])
    families = ["constant_rate"] * rates.size + ["newtonian"] * taus.size
    params = np.concatenate([rates, taus])
    paths = [CoolingPath(family=families[j], parameter=float(params[j]), rate_700_c_s=float(rate_700[j]),
                         time_s=times[:, j].copy(), temperature_c=temps,
                         events=events[j], final={k: float(v[j]) for k, v in final.items()},
                         hv=float(hv[j]), hrc=float(hrc[j]), shown=bool(shown[j]))
             for j in range(n)]
    diffusional = (formed["ferrite"][-1] + formed["cementite"][-1] + formed["pearlite"][-1])
    critical = {}
    for fam, sl in (("constant_rate", slice(0, rates.size)), ("newtonian", slice(rates.size, n))):
        r = rate_700[sl]
        critical[fam] = {
            "martensite_only": _critical_rate(r, (diffusional + formed["bainite"][-1])[sl], START, above=True),
            "no_ferrite_pearlite": _critical_rate(r, diffusional[sl], START, above=True),
            "first_martensite": _critical_rate(r, formed["martensite"][-1][sl], START, above=False),
        }
    return CCTDiagram(model=model.name, state=state, grain_size=float(grain_size), bath_c=float(bath_c),
                      levels_c=_levels(state, nodes, float(st.nodes.bs[0])), paths=paths, critical_rates_k_s=critical)


#: What each critical rate means (for summaries and the README).
CRITICAL_RATE_MEANING = {
    "martensite_only": "slowest cooling that leaves under 1 % ferrite, cementite, pearlite and bainite",
    "no_ferrite_pearlite": "slowest cooling that leaves under 1 % ferrite, cementite and pearlite",
    "first_martensite": "fastest cooling that still gives under 1 % martensite",
}


def _sig(v: float, digits: int = 3) -> float:
    v = float(v)
    if not np.isfinite(v) or v == 0.0:
        return v
    return float(f"{v:.{digits}g}")


def _cell(v) -> float | None:
    v = float(v)
    return None if not np.isfinite(v) else _sig(v, 5)


__all__ = ["CCTDiagram", "CRITICAL_RATE_MEANING", "CoolingPath", "TTTDiagram", "cct_diagram", "ttt_diagram"]
