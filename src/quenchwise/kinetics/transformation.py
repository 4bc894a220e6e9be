"""Phase state of every node and its advance over one time step (Scheil additivity).

Method, per node (all nodes at once with numpy):

* Each diffusional product p has an isothermal law tau_p(X, T) = K_p(T) S_p(X) (Li et al. 1998, or
  Kirkaldy & Venugopalan 1983). Because the law is separable, Scheil's additivity rule
  sum(dt / tau_p(X, T)) = 1 is exact when the node carries the running sum s_p = sum(dt / K_p(T)) and
  X_p = S_p^-1(s_p); the start of a product (X_p = 0.01) is then the Scheil incubation criterion
  sum(dt / tau_p(0.01, T)) = 1, and growth is the isothermal-equivalent (fictitious) time method.
  Sums accrue only below the product's start temperature (Ae3 of the austenite for ferrite, Acm for
  proeutectoid cementite, Ae1 for pearlite, the model's Bs for bainite) and above Ms.
* What X is normalized to: proeutectoid ferrite (cementite) -- the equilibrium fraction at the
  current temperature by the lever rule on the steel's A3 (Acm) line, so it never exceeds
  equilibrium; pearlite and bainite -- the austenite left when that product started.
* Proeutectoid cementite (hypereutectoid austenite): neither paper gives it a law. It is given the
  pearlite law of the model (composition factor, grain exponent, activation energy) with the
  undercooling below the Acm of the austenite, and normalized to the lever-rule amount on the Acm
  line. Basis: both are grain-boundary nucleated carbide reactions controlled by carbon diffusion in
  austenite, and cementite is the leading phase of pearlite; the choice is ours, not the papers'.
  It gives grain-boundary cementite on slow cooling only, as practice shows (common practice, no
  source).
* Sequence: ferrite (or cementite), then pearlite, then bainite. A product stops growing when a
  later one starts (its incubation sum has run concurrently) or when Ms is reached.
* Carbon balance: proeutectoid ferrite (0.02 %C) or cementite (6.67 %C) forming from austenite
  of carbon C_a changes the carbon of the austenite left, C_a' = (A0 C0 - f C_product) / (A0 - f),
  with A0 and C0 the austenite fraction and carbon after austenitizing and f the proeutectoid
  fraction formed on cooling. Pearlite and bainite take austenite at its current carbon (their
  own ferrite and carbide in the overall proportion of that austenite), and martensite inherits it,
  so at every step  bulk C = 0.02 F + 6.67 Cm + C_a (P + B + M + A)  holds exactly
  (F, Cm: all ferrite and cementite, undissolved or formed; tested). The Ms of the austenite left
  follows its carbon (steel.critical.martensite_start).
* Martensite: when T first falls below the Ms of the austenite left, the diffusional reactions stop
  and f_M = A_Ms (1 - exp(-alpha (Ms - T_min))) (Koistinen & Marburger 1959), with A_Ms the
  austenite at that moment and T_min the lowest temperature reached. What is left is retained
  austenite.
* Fractions: austenite is 1 minus the sum of the products, each of which only grows and is bounded
  by the austenite it draws on, so every node's fractions lie in [0, 1] and sum to 1 (tested).
* Latent heat released: sum over products of (fraction formed) x (enthalpy of that reaction).

The stepper does not care where temperatures come from: the thermal solver drives it, and
follow_history() drives it along prescribed histories (diagrams, end-quench positions, tests).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from ..steel.austenite import AusteniteState, a3_line_carbon, a3_line_temperature
from ..steel.critical import (
    CEMENTITE_C_WT,
    EUTECTOID_C_WT,
    FERRITE_C_WT,
    acm_linear,
    carbon_on_acm,
    li_bs,
    martensite_start,
)
from .martensite import koistinen_marburger, van_bohemen_sietsma_alpha

#: Final phases reported, in this order.
PRODUCTS = ("ferrite", "cementite", "pearlite", "bainite", "martensite", "austenite")

#: Enthalpy released per kg of product formed [J/kg]. Pearlite of a eutectoid plain carbon steel:
#: 19.6 cal/g = 82 J/g (Hagel, Pound & Mehl 1956, Acta Metall., calorimetry). The same value is used
#: for ferrite, cementite and bainite (an approximation; no separate measurement cited). Martensite
#: 84 J/g (memory).
LATENT_HEAT_J_KG = {"ferrite": 82e3, "cementite": 82e3, "pearlite": 82e3, "bainite": 82e3, "martensite": 84e3}

#: Normalized fraction at which a product counts as started (Scheil incubation end).
START_FRACTION = 0.01
#: Temperature at which the cooling rate is recorded for hardness (Maynier et al. 1978) [C].
RATE_TEMPERATURE_C = 700.0
#: Smallest time constant used in dt / K [s]: a zero composition factor (e.g. the Kirkaldy-Venugopalan
#: ferrite law of an alloy-free steel) means an instantaneous reaction, not a division by zero.
_MIN_TIME_CONSTANT_S = 1e-12


@dataclass(frozen=True)
class SteelNodes:
    """Per-node constants of the steel, built once: every array has one entry per node."""

    austenite0: np.ndarray      # austenite fraction after austenitizing
    ferrite0: np.ndarray        # undissolved ferrite
    cementite0: np.ndarray      # undissolved cementite
    carbon0: np.ndarray         # carbon of that austenite [wt%]
    bulk_carbon: np.ndarray
    hyper: np.ndarray           # austenite carbon above the eutectoid
    ae1: np.ndarray
    ae3_bulk: np.ndarray
    pro_start: np.ndarray       # A3 (or Acm) temperature of the austenite's carbon [C]
    bs: np.ndarray              # Li et al. (1998) Bs; PhaseStepper replaces it by its model's Bs
    grain_size: np.ndarray
    alpha: np.ndarray           # Koistinen-Marburger rate [1/K]
    chem: dict                  # austenite chemistry, element -> array [wt%]

    @classmethod
    def from_states(cls, states: list[AusteniteState], grain_sizes: list[float], counts: list[int],
                    martensite_law: str = "koistinen_marburger") -> "SteelNodes":
        """Repeat each case's austenitized state over its nodes."""
        def rep(values):
            return np.repeat(np.asarray(values, dtype=float), counts)

        chem = {k: rep([getattr(s.austenite_composition, k) for s in states])
                for k in ("c", "mn", "si", "ni", "cr", "mo", "cu", "v", "w", "b")}
        carbon0 = chem["c"]
        hyper = carbon0 > EUTECTOID_C_WT + 1e-12
        ae1 = rep([s.ae1 for s in states])
        ae3_bulk = rep([s.ae3 for s in states])
        bulk = rep([s.composition.c for s in states])
        pro_start = np.where(hyper, acm_linear(np.maximum(carbon0, EUTECTOID_C_WT)),
                             a3_line_temperature(np.minimum(carbon0, EUTECTOID_C_WT), ae1, ae3_bulk,
                                                 np.minimum(bulk, EUTECTOID_C_WT)))
        if martensite_law == "van_bohemen_sietsma":
            alpha = van_bohemen_sietsma_alpha(carbon0, chem["mn"], chem["ni"], chem["cr"], chem["mo"])
        else:
            alpha = np.full_like(carbon0, 0.011)
        return cls(
            austenite0=rep([s.austenite for s in states]), ferrite0=rep([s.ferrite for s in states]),
            cementite0=rep([s.cementite for s in states]), carbon0=carbon0, bulk_carbon=bulk, hyper=hyper,
            ae1=ae1, ae3_bulk=ae3_bulk, pro_start=pro_start,
            bs=li_bs(carbon0, chem["mn"], chem["ni"], chem["cr"], chem["mo"]),
            grain_size=rep(grain_sizes), alpha=alpha, chem=chem,
        )

    def ms(self, carbon):
        """Ms of austenite of the given carbon and this alloy (steel.critical.martensite_start) [C]."""
        c = self.chem
        return martensite_start(carbon, c["mn"], c["ni"], c["cr"], c["mo"])

    def proeutectoid_equilibrium(self, temperature_c):
        """Equilibrium fraction of proeutectoid ferrite (or cementite) formed from the austenite at T,
        lever rule on the bulk steel, less what stayed undissolved."""
        t = np.asarray(temperature_c, dtype=float)
        bulk_hypo = np.minimum(self.bulk_carbon, EUTECTOID_C_WT)
        x_a3 = a3_line_carbon(np.maximum(t, self.ae1), self.ae1, self.ae3_bulk, bulk_hypo)
        ferrite_total = np.minimum(np.maximum((x_a3 - self.bulk_carbon) / np.maximum(x_a3 - FERRITE_C_WT, 1e-9), 0.0), 1.0)
        x_acm = np.maximum(carbon_on_acm(np.maximum(t, self.ae1)), EUTECTOID_C_WT)
        cementite_total = np.minimum(np.maximum((self.bulk_carbon - x_acm) / (CEMENTITE_C_WT - x_acm), 0.0), 1.0)
        return np.where(self.hyper, np.maximum(cementite_total - self.cementite0, 0.0),
                        np.maximum(ferrite_total - self.ferrite0, 0.0))


#: What a node is doing (PhaseStepper.stage): forming its proeutectoid product (ferrite or, above
#: the eutectoid, cementite), pearlite, bainite, or past its Ms (martensite). A node only moves on.
PROEUTECTOID, PEARLITE, BAINITE, MARTENSITE = 0, 1, 2, 3


class PhaseStepper:
    """Advances the phase state of all nodes over a time step; the thermal solver drives it."""

    def __init__(self, nodes: SteelNodes, model, initial_c: np.ndarray):
        nodes = replace(nodes, bs=np.asarray(model.bainite_start(nodes.chem), dtype=float) + np.zeros_like(nodes.carbon0))
        self.nodes, self.model = nodes, model
        n = nodes.carbon0.size
        self.factors = model.factors(nodes.chem)
        self.f = {name: np.zeros(n) for name in PRODUCTS}
        self.f["ferrite"] = nodes.ferrite0.copy()
        self.f["cementite"] = nodes.cementite0.copy()
        self.f["austenite"] = nodes.austenite0.copy()
        self.progress = {name: np.zeros(n) for name in ("proeutectoid", "pearlite", "bainite")}
        self.stage = np.full(n, PROEUTECTOID, dtype=np.int8)
        self.base = {"pearlite": np.zeros(n), "bainite": np.zeros(n)}
        self.carbon = nodes.carbon0.copy()
        self.ms_at_start = nodes.ms(nodes.carbon0)
        self.ms = np.full(n, np.nan)               # Ms fixed when a node crosses it
        self.austenite_at_ms = np.zeros(n)
        self.t_min = np.asarray(initial_c, dtype=float).copy()
        self.rate_700_c_s = np.full(n, np.nan)
        self._first_rate = np.full(n, np.nan)
        self._prev_mid = np.full(n, np.nan)        # mid temperature and secant rate of the last step
        self._prev_rate = np.full(n, np.nan)

    def fractions(self) -> dict[str, np.ndarray]:
        return self.f

    def advance(self, t_old: np.ndarray, t_new: np.ndarray, dt: np.ndarray):
        """Advance every node from t_old to t_new [C] over dt [s] (per node).

        Returns (latent heat released [J/kg], largest fraction change of any product) per node.
        """
        nodes, f = self.nodes, self.f
        before = {k: v.copy() for k, v in f.items()}
        t_mid = 0.5 * (t_old + t_new)
        self._record_rate(t_old, t_new, dt)

        diffusional = self.stage < MARTENSITE
        under = {
            "ferrite": np.where(nodes.hyper, -1.0, nodes.pro_start - t_mid),
            "cementite": np.where(nodes.hyper, nodes.pro_start - t_mid, -1.0),
            "pearlite": nodes.ae1 - t_mid,
            "bainite": nodes.bs - t_mid,
        }
        k = self.model.time_constants(self.factors, nodes.grain_size, t_mid, under)
        k_pro = np.where(nodes.hyper, k["cementite"], k["ferrite"])
        dt = np.broadcast_to(np.asarray(dt, dtype=float), t_mid.shape)
        for name, k_p, stages in (("proeutectoid", k_pro, self.stage == PROEUTECTOID),
                                  ("pearlite", k["pearlite"], self.stage <= PEARLITE),
                                  ("bainite", k["bainite"], self.stage <= BAINITE)):
            self.progress[name] += np.where(diffusional & stages & (dt > 0),
                                            dt / np.maximum(k_p, _MIN_TIME_CONSTANT_S), 0.0)

        # Proeutectoid ferrite / cementite, capped by equilibrium at the current temperature.
        grow = diffusional & (self.stage == PROEUTECTOID)
        if grow.any():
            x = self.model.fraction("proeutectoid", self.progress["proeutectoid"], self.factors)
            target = x * nodes.proeutectoid_equilibrium(t_new)
            formed_f = np.where(grow & ~nodes.hyper, np.maximum(f["ferrite"] - nodes.ferrite0, target), f["ferrite"] - nodes.ferrite0)
            formed_c = np.where(grow & nodes.hyper, np.maximum(f["cementite"] - nodes.cementite0, target), f["cementite"] - nodes.cementite0)
            f["ferrite"] = nodes.ferrite0 + formed_f
            f["cementite"] = nodes.cementite0 + formed_c
            self._update_austenite()
            # Carbon left in the austenite after the proeutectoid product (mass balance; frozen
            # once a later product starts, since pearlite and bainite take it at its carbon).
            formed = formed_f + formed_c
            left = np.maximum(nodes.austenite0 - formed, 1e-9)
            carbon = (nodes.austenite0 * nodes.carbon0 - formed_f * FERRITE_C_WT - formed_c * CEMENTITE_C_WT) / left
            self.carbon = np.where(grow, np.minimum(np.maximum(carbon, 0.0), 2.1), self.carbon)

        # Pearlite, then bainite: start when the incubation sum reaches X = 0.01.
        x_p = self.model.fraction("pearlite", self.progress["pearlite"], self.factors)
        x_b = self.model.fraction("bainite", self.progress["bainite"], self.factors)
        start_b = diffusional & (self.stage < BAINITE) & (x_b >= START_FRACTION)
        start_p = diffusional & (self.stage < PEARLITE) & (x_p >= START_FRACTION) & ~start_b
        self.base["pearlite"] = np.where(start_p, f["austenite"], self.base["pearlite"])
        self.stage[start_p] = PEARLITE
        on = diffusional & (self.stage == PEARLITE)
        f["pearlite"] = np.where(on, np.maximum(f["pearlite"], x_p * self.base["pearlite"]), f["pearlite"])
        self._update_austenite()
        self.base["bainite"] = np.where(start_b, f["austenite"], self.base["bainite"])
        self.stage[start_b] = BAINITE
        on = diffusional & (self.stage == BAINITE)
        f["bainite"] = np.where(on, np.maximum(f["bainite"], x_b * self.base["bainite"]), f["bainite"])
        self._update_austenite()

        # Martensite below the Ms of the austenite left.
        ms_now = nodes.ms(self.carbon)
        cross = (self.stage < MARTENSITE) & (t_new <= ms_now)
        if cross.any():
            self.ms = np.where(cross, ms_now, self.ms)
            self.austenite_at_ms = np.where(cross, f["austenite"], self.austenite_at_ms)
            self.stage[cross] = MARTENSITE
        np.minimum(self.t_min, t_new, out=self.t_min)
        below = self.stage == MARTENSITE
        if below.any():
            fm = self.austenite_at_ms * koistinen_marburger(np.where(below, self.ms, 0.0), self.t_min, nodes.alpha)
            f["martensite"] = np.where(below, np.maximum(f["martensite"], fm), f["martensite"])
            self._update_austenite()

        latent = np.zeros_like(t_new)
        change = np.zeros_like(t_new)
        for name, heat in LATENT_HEAT_J_KG.items():
            d = f[name] - before[name]
            latent += heat * d
            np.maximum(change, np.abs(d), out=change)
        return latent, change

    def _update_austenite(self) -> None:
        f = self.f
        solid = f["ferrite"] + f["cementite"] + f["pearlite"] + f["bainite"] + f["martensite"]
        f["austenite"] = np.minimum(np.maximum(1.0 - solid, 0.0), 1.0)

    def _record_rate(self, t_old, t_new, dt) -> None:
        """The cooling rate at 700 C: each step's secant rate belongs to its mid temperature, and
        the rate at 700 C is interpolated between the two step midpoints that bracket it (a step's
        secant alone would jitter from node to node with where 700 C falls inside the step)."""
        dt = np.broadcast_to(np.asarray(dt, dtype=float), t_new.shape)
        valid = dt > 0
        with np.errstate(divide="ignore", invalid="ignore"):
            rate = np.where(valid, (t_old - t_new) / np.where(valid, dt, 1.0), np.nan)
        mid = 0.5 * (t_old + t_new)
        first = np.isnan(self._first_rate) & valid
        self._first_rate[first] = rate[first]
        cross = valid & np.isnan(self.rate_700_c_s) & (mid <= RATE_TEMPERATURE_C)
        bracketed = cross & (self._prev_mid > RATE_TEMPERATURE_C)
        with np.errstate(divide="ignore", invalid="ignore"):
            w = (self._prev_mid - RATE_TEMPERATURE_C) / (self._prev_mid - mid)
            self.rate_700_c_s = np.where(bracketed, self._prev_rate + w * (rate - self._prev_rate),
                                         np.where(cross, rate, self.rate_700_c_s))
        self._prev_mid = np.where(valid, mid, self._prev_mid)
        self._prev_rate = np.where(valid, rate, self._prev_rate)

    def cooling_rate_700(self) -> np.ndarray:
        """Cooling rate as each node passed 700 C [K/s]; nodes that started below 700 C give their
        first-step rate."""
        return np.where(np.isnan(self.rate_700_c_s), self._first_rate, self.rate_700_c_s)


@dataclass
class HistoryRun:
    """The stepper after following prescribed histories, and (optionally) fractions at every time.

    fractions_at[name] has shape (n_times, n_nodes): the fraction after each step (row 0: the start).
    """

    stepper: PhaseStepper
    time_s: np.ndarray
    temperature_c: np.ndarray
    fractions_at: dict = field(default_factory=dict)

    @property
    def fractions(self) -> dict[str, np.ndarray]:
        return self.stepper.fractions()


def follow_history(nodes: SteelNodes, model, time_s, temperature_c, record: bool = False) -> HistoryRun:
    """Drive the stepper along prescribed temperature histories, one per node.

    time_s: (n_times,) shared by all nodes, or (n_times, n_nodes); temperature_c: (n_times, n_nodes)
    in C. Any history is accepted (cooling, holding, reheating below the austenitizing temperature).

    >>> from quenchwise.steel import Composition, austenitize
    >>> from quenchwise.kinetics import Li1998
    >>> state = austenitize(Composition(c=0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20), 850.0)
    >>> nodes = SteelNodes.from_states([state], [7.0], [1])
    >>> t = np.linspace(0.0, 27.5, 826)                     # 30 K/s from 850 C to 25 C
    >>> run = follow_history(nodes, Li1998(), t, (850.0 - 30.0 * t)[:, None])
    >>> print({k: round(float(v[0]), 3) for k, v in run.fractions.items() if v[0] > 0})
    {'ferrite': 0.006, 'martensite': 0.958, 'austenite': 0.036}
    """
    temperature_c = np.asarray(temperature_c, dtype=float)
    if temperature_c.ndim != 2 or temperature_c.shape[1] != nodes.carbon0.size:
        raise ValueError("temperature_c must have shape (n_times, n_nodes)")
    time_s = np.asarray(time_s, dtype=float)
    if time_s.ndim == 1:
        time_s = np.broadcast_to(time_s[:, None], temperature_c.shape)
    if time_s.shape != temperature_c.shape:
        raise ValueError("time_s must have shape (n_times,) or that of temperature_c")
    if np.any(np.diff(time_s, axis=0) < 0):
        raise ValueError("time_s must not decrease")
    stepper = PhaseStepper(nodes, model, temperature_c[0])
    recorded = {}
    if record:
        recorded = {name: np.empty_like(temperature_c) for name in PRODUCTS}
        for name in PRODUCTS:
            recorded[name][0] = stepper.f[name]
    for i in range(temperature_c.shape[0] - 1):
        stepper.advance(temperature_c[i], temperature_c[i + 1], time_s[i + 1] - time_s[i])
        if record:
            for name in PRODUCTS:
                recorded[name][i + 1] = stepper.f[name]
    return HistoryRun(stepper, time_s, temperature_c, recorded)
