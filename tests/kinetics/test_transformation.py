"""The additivity stepper on prescribed histories: guarantees, exactness of Scheil's rule, carbon
balance, and the second kinetics model."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from quenchwise.kinetics import MODELS, Kirkaldy1983, Li1998, SteelNodes, follow_history
from quenchwise.kinetics.sigmoid import progress_integral
from quenchwise.kinetics.transformation import PRODUCTS, START_FRACTION
from quenchwise.steel import Composition, austenitize
from quenchwise.steel.critical import CEMENTITE_C_WT, FERRITE_C_WT

STEELS = {
    "hypoeutectoid Cr-Mo": (Composition(c=0.40, mn=0.85, si=0.25, cr=0.95, mo=0.20), 850.0),
    "intercritical low carbon": (Composition(c=0.20, mn=0.80, si=0.25, ni=0.55, cr=0.5, mo=0.2), 780.0),
    "eutectoid": (Composition(c=0.77, mn=0.75, si=0.25), 820.0),
    "hypereutectoid below Acm": (Composition(c=1.20, mn=0.30, si=0.20), 790.0),
    "bearing": (Composition(c=1.04, mn=0.35, si=0.25, cr=1.45), 845.0),
}


def _nodes(names, counts, law="koistinen_marburger"):
    states = [austenitize(*STEELS[n]) for n in names]
    return SteelNodes.from_states(states, [7.0] * len(states), counts, martensite_law=law), states


def _carbon_balance(nodes, f, carbon):
    """bulk C = 0.02 F + 6.67 Cm + C_a (P + B + M + A)  (transformation.py module docstring)."""
    rest = f["pearlite"] + f["bainite"] + f["martensite"] + f["austenite"]
    return FERRITE_C_WT * f["ferrite"] + CEMENTITE_C_WT * f["cementite"] + carbon * rest - nodes.bulk_carbon


history_segments = st.lists(
    st.tuples(st.floats(-200.0, 60.0), st.floats(0.05, 300.0)),   # (temperature change K, duration s)
    min_size=1, max_size=6)


@settings(max_examples=25, deadline=None)
@given(segments=history_segments, model=st.sampled_from(sorted(MODELS)), law=st.sampled_from(
    ["koistinen_marburger", "van_bohemen_sietsma"]))
def test_fractions_stay_in_0_1_sum_to_one_and_conserve_carbon_on_any_history(segments, model, law):
    # Any history: cooling, holding and reheating (never above the austenitizing temperature).
    names = list(STEELS)
    nodes, states = _nodes(names, [1] * len(names), law)
    start = np.array([s.austenitize_c for s in states])
    temps, times = [start], [0.0]
    t = start.copy()
    for change, duration in segments:
        n = max(2, int(duration / 2.0))
        for k in range(1, n + 1):
            temps.append(np.clip(t + change * k / n, 20.0, start))
            times.append(times[-1] + duration / n)
        t = temps[-1]
    run = follow_history(nodes, MODELS[model](), np.array(times), np.array(temps), record=True)
    f = run.fractions_at
    total = sum(f[name] for name in PRODUCTS)
    for name in PRODUCTS:
        assert np.all(f[name] >= -1e-12) and np.all(f[name] <= 1.0 + 1e-12)
    np.testing.assert_allclose(total, 1.0, atol=1e-9)
    np.testing.assert_allclose(_carbon_balance(nodes, run.fractions, run.stepper.carbon), 0.0, atol=1e-9)


def test_isothermal_start_is_exactly_k_times_s_at_one_percent():
    # Scheil additivity on the separable law: the start on a hold is K(T) S(0.01).
    nodes, _ = _nodes(["eutectoid"], [1])
    model = Li1998()
    t_hold = 550.0
    k = model.time_constants(model.factors(nodes.chem), nodes.grain_size, np.array([t_hold]),
                             {"ferrite": np.array([-1.0]), "cementite": np.array([-1.0]),
                              "pearlite": nodes.ae1 - t_hold, "bainite": np.array([-1.0])})["pearlite"][0]
    t_start = k * float(progress_integral(START_FRACTION, model.sigmoid_exponent))
    times = np.array([0.0, 0.999 * t_start, 1.001 * t_start])
    run = follow_history(nodes, model, times, np.full((3, 1), t_hold), record=True)
    assert run.fractions_at["pearlite"][1, 0] == 0.0
    assert run.fractions_at["pearlite"][2, 0] == pytest.approx(START_FRACTION, rel=0.01)


def test_scheil_sum_of_two_half_incubations_starts_the_reaction():
    # Half the incubation time at 600 C then half at 500 C: sum(dt/tau) = 1, so pearlite starts then.
    nodes, _ = _nodes(["eutectoid"], [1])
    model = Li1998()
    s01 = float(progress_integral(START_FRACTION, model.sigmoid_exponent))
    factors = model.factors(nodes.chem)

    def tau(t):
        under = {"ferrite": np.array([-1.0]), "cementite": np.array([-1.0]), "pearlite": nodes.ae1 - t,
                 "bainite": nodes.bs - t}
        return model.time_constants(factors, nodes.grain_size, np.array([t]), under)["pearlite"][0] * s01

    t1, t2 = 0.5 * tau(600.0), 0.5 * tau(500.0)
    times = np.array([0.0, t1, t1 + 1e-9, t1 + 0.99 * t2, t1 + 1.01 * t2])
    temps = np.array([600.0, 600.0, 500.0, 500.0, 500.0])[:, None]
    run = follow_history(nodes, model, times, temps, record=True)
    p = run.fractions_at["pearlite"][:, 0]
    assert p[3] == 0.0 and p[4] > 0.0


def test_vectorized_nodes_match_nodes_run_one_by_one():
    names = list(STEELS)
    temps = np.linspace(1.0, 0.0, 300)[:, None] * np.array([[830.0, 760.0, 800.0, 770.0, 825.0]]) + 20.0
    times = np.geomspace(1e-2, 500.0, 300)
    nodes, _ = _nodes(names, [1] * len(names))
    together = follow_history(nodes, Li1998(), times, temps).fractions
    for j, name in enumerate(names):
        alone = follow_history(_nodes([name], [1])[0], Li1998(), times, temps[:, j:j + 1]).fractions
        for product in PRODUCTS:
            assert together[product][j] == pytest.approx(alone[product][0], abs=1e-12)


def test_proeutectoid_ferrite_never_exceeds_equilibrium_and_enriches_the_austenite():
    nodes, states = _nodes(["hypoeutectoid Cr-Mo"], [1])
    times = np.linspace(0.0, 40000.0, 4001)                      # 0.02 K/s
    temps = (850.0 - 0.02 * times)[:, None]
    run = follow_history(nodes, Li1998(), times, temps, record=True)
    ferrite = run.fractions_at["ferrite"][:, 0]
    equilibrium = nodes.proeutectoid_equilibrium(temps[:, 0]) + nodes.ferrite0[0]
    assert np.all(ferrite <= equilibrium + 1e-9)
    assert ferrite[-1] > 0.4 and run.stepper.carbon[0] > 0.7
    assert float(run.stepper.nodes.ms(run.stepper.carbon)[0]) < float(run.stepper.ms_at_start[0])


def test_hypereutectoid_steel_forms_grain_boundary_cementite_only_when_cooled_slowly():
    # Common practice, no source: a carbide network forms in hypereutectoid steel on slow cooling
    # (furnace, air), not in a hardening quench.
    nodes, states = _nodes(["bearing", "bearing"], [1, 1])
    slow, fast = 0.05, 50.0
    temps = np.linspace(845.0, 25.0, 821)
    times = np.stack([(845.0 - temps) / slow, (845.0 - temps) / fast], axis=1)
    run = follow_history(nodes, Li1998(), times, np.stack([temps, temps], axis=1))
    formed = run.fractions["cementite"] - nodes.cementite0
    assert formed[0] > 0.01 and formed[1] < 1e-3
    assert run.fractions["pearlite"][0] > 0.8 and run.fractions["martensite"][1] > 0.7


def test_kirkaldy1983_is_registered_and_handles_an_alloy_free_ferrite_factor():
    assert MODELS["kirkaldy1983"] is Kirkaldy1983
    plain = austenitize(Composition(c=0.20), 900.0)             # F_ferrite = 0: instantaneous ferrite
    nodes = SteelNodes.from_states([plain], [7.0], [1])
    temps = np.linspace(900.0, 20.0, 881)[:, None]
    run = follow_history(nodes, Kirkaldy1983(), (900.0 - temps[:, 0]) / 50.0, temps)
    f = run.fractions
    assert all(np.isfinite(v[0]) for v in f.values())
    assert f["ferrite"][0] > 0.5 and sum(v[0] for v in f.values()) == pytest.approx(1.0, abs=1e-12)


def test_kirkaldy1983_bainite_retardation_slows_the_late_stage_only():
    model = Kirkaldy1983()
    chem = {k: np.array([v]) for k, v in dict(c=0.4, mn=0.85, si=0.25, ni=0.0, cr=0.95, mo=0.2).items()}
    factors = model.factors(chem)
    s_early = float(progress_integral(0.01, model.sigmoid_exponent))
    s_late = float(progress_integral(0.9, model.sigmoid_exponent))
    assert model.fraction("bainite", np.array([s_early]), factors)[0] == pytest.approx(0.01, rel=1e-3)
    assert model.fraction("bainite", np.array([s_late]), factors)[0] < 0.85
    assert model.fraction("pearlite", np.array([s_late]), factors)[0] == pytest.approx(0.9, rel=1e-6)


def test_follow_history_refuses_badly_shaped_or_backward_time():
    nodes, _ = _nodes(["eutectoid"], [1])
    with pytest.raises(ValueError):
        follow_history(nodes, Li1998(), np.array([0.0, 1.0]), np.array([800.0, 700.0]))
    with pytest.raises(ValueError):
        follow_history(nodes, Li1998(), np.array([0.0, -1.0]), np.array([[800.0], [700.0]]))


def test_progress_integral_table_against_adaptive_quadrature():
    # The table is built by Gauss-Legendre pieces and the end asymptotes (kinetics/sigmoid.py);
    # scipy.integrate.quad (QUADPACK, adaptive) on the same pieces is the outside reference.
    import warnings

    from scipy import integrate

    from quenchwise.kinetics import sigmoid

    for p, beta in [(0.4, 0.0), (2.0 / 3.0, 0.0), (2.0 / 3.0, 3.0)]:
        x, table = sigmoid._table(p, beta)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", integrate.IntegrationWarning)
            pieces = [integrate.quad(sigmoid._integrand, a, b, args=(p, beta))[0] for a, b in zip(x[:-1], x[1:])]
        reference = np.concatenate([[0.0], np.cumsum(pieces)])
        assert np.max(np.abs(table - reference) / np.maximum(reference, 1e-12)) < 1e-6
