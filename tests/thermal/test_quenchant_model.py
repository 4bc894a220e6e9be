"""The three-stage quenchant model and its presets on the ISO 9950 type probe.

Outside check values: quenchant_data/probe_targets.csv, one row per preset and figure with its
source (published probe figures, recalled: "(memory)", ranges widened as stated there). The
tolerance of each check is the row's range itself.
"""

import math

import numpy as np
import pytest

from quenchwise.errors import InputError
from quenchwise.thermal import quenchant_model as qm
from quenchwise.thermal.probe import FIGURE_NAMES, ProbeModel, cooling_curve_figures, probe_cooling, probe_figures
from quenchwise.thermal.quenchants import Quenchant, builtin_names, load_quenchant

TARGETS = qm.probe_targets()


def test_every_liquid_preset_has_sourced_max_rate_and_its_temperature():
    have = {(t["preset"], t["figure"]) for t in TARGETS}
    for name in qm.PRESETS:
        assert (name, "max_rate_k_s") in have and (name, "t_max_rate_c") in have, name
    for t in TARGETS:
        assert t["source"] and "(memory" in t["source"], t          # recalled values say so
        assert t["low"] < t["high"] and t["figure"] in FIGURE_NAMES and t["preset"] in builtin_names()
    # Every oil class has all six ISO 9950 / ASTM D6200 numbers for its still bath (hot oil: five).
    for name, n in (("oil_conventional_60c_still", 6), ("oil_fast_60c_still", 6), ("oil_hot_160c_still", 5)):
        assert sum(t["preset"] == name for t in TARGETS) == n


@pytest.mark.parametrize("target", TARGETS, ids=lambda t: f"{t['preset']}-{t['figure']}")
def test_preset_probe_figure_inside_its_sourced_range(target):
    # The listed (cached) figures; test_cached_figures_match_the_model keeps them honest.
    value = load_quenchant(target["preset"]).listed_probe[target["figure"]]
    assert target["low"] <= value <= target["high"], (target, value)


# One preset per class and bath, plus the hand-written air curve: recomputed on every run.
SAMPLE = ("water_20c_still", "water_70c_moderate", "brine_10pct_20c_still", "oil_conventional_60c_still",
          "oil_fast_60c_strong", "oil_hot_160c_still", "polymer_20pct_40c_moderate", "gas_20c_forced")


@pytest.mark.parametrize("name", SAMPLE)
def test_cached_figures_match_the_model(name):
    q = load_quenchant(name)
    again = probe_figures(q)
    for key in FIGURE_NAMES:
        a, b = q.listed_probe[key], again[key]
        assert (math.isnan(a) and math.isnan(b)) or a == pytest.approx(b, rel=2e-3, abs=1e-3), (key, a, b)


def test_preset_tables_are_the_model_curves():
    for name, spec in qm.PRESETS.items():
        q, m = load_quenchant(name), qm.model_quenchant(spec, name)
        t = np.linspace(spec.bath_c, 1050.0, 400)
        np.testing.assert_allclose(q.htc(t), m.htc(t), rtol=1e-3, err_msg=name)
        assert (q.kind, q.bath_c, q.description) == (m.kind, m.bath_c, m.description)


def test_probe_figures_are_converged_in_the_time_step():
    # Halving every step of the forward run moves no figure of a sharp (water) and a slow (oil)
    # curve by more than 1 %.
    fine = tuple((end, dt / 2.0) for end, dt in __import__("quenchwise.thermal.probe", fromlist=["x"]).FIGURE_SEGMENTS_S)
    for name in ("water_20c_still", "oil_conventional_60c_still"):
        q = load_quenchant(name)
        a = q.listed_probe
        b = cooling_curve_figures(*probe_cooling(q, segments=fine))
        for key in FIGURE_NAMES:
            assert a[key] == pytest.approx(b[key], rel=0.01), (name, key)


def test_figures_of_an_analytic_lumped_curve():
    # A lumped body T = Tb + (T0 - Tb) exp(-t / tau): max rate (T0 - Tb) / tau at the start, the
    # rate at 300 C is (300 - Tb) / tau, the times follow from the logarithm (analytic).
    t = np.linspace(0.0, 200.0, 200001)
    y = 20.0 + 830.0 * np.exp(-t / 20.0)
    f = cooling_curve_figures(t, y)
    assert f["max_rate_k_s"] == pytest.approx(830.0 / 20.0, rel=0.01)
    assert f["rate_300_k_s"] == pytest.approx(280.0 / 20.0, rel=1e-3)
    for level, key in ((600.0, "time_600_s"), (400.0, "time_400_s"), (200.0, "time_200_s")):
        assert f[key] == pytest.approx(20.0 * math.log(830.0 / (level - 20.0)), rel=1e-4)


def test_no_preset_asks_more_than_the_probe_conduction_limit():
    # With h -> infinity the surface is at the bath at once; the centre cannot cool faster than
    # that (analytic bound of conduction; computed on the same probe model with h = 1e7).
    limits = {}
    for name in builtin_names():
        q = load_quenchant(name)
        if q.bath_c not in limits:
            t, y = probe_cooling(Quenchant.constant(1.0e7, q.bath_c), segments=((6.0, 0.002),))
            limits[q.bath_c] = cooling_curve_figures(t, y)["max_rate_k_s"]
        assert q.listed_probe["max_rate_k_s"] < limits[q.bath_c], name
    # the bound itself: about 320 K/s into a 20 C bath (a 12.5 mm alloy 600 cylinder, alpha ~ 4e-6 m2/s)
    assert 250.0 < limits[20.0] < 400.0


FAMILIES = [("water", 20.0, 0.0), ("water", 70.0, 0.0), ("brine", 20.0, 0.0), ("oil_conventional", 60.0, 0.0),
            ("oil_fast", 60.0, 0.0), ("oil_hot", 160.0, 0.0), ("polymer", 40.0, 10.0), ("polymer", 40.0, 30.0)]


@pytest.mark.parametrize("kind, bath, conc", FAMILIES)
def test_stronger_agitation_never_cools_slower(kind, bath, conc):
    # h rises with flow at every surface temperature (so the probe cools faster at every instant;
    # comparison principle of the heat equation), checked on a fine grid of velocities.
    t = np.linspace(bath, 1100.0, 500)
    last = None
    for v in np.linspace(0.0, qm.MAX_AGITATION_M_S, 13):
        h = qm.model_quenchant(qm.QuenchSpec(kind, bath, float(v), conc)).htc(t)
        if last is not None:
            assert np.all(h >= last - 1e-6), (kind, v)
        last = h


def test_stronger_agitation_never_cools_slower_on_the_probe():
    # Named levels of two fluids on the probe: faster maximum, shorter times, level by level.
    for kind, bath, conc in (("water", 20.0, 0.0), ("polymer", 40.0, 20.0)):
        figs = [probe_figures(qm.model_quenchant(qm.QuenchSpec(kind, bath, v, conc)))
                for v in qm.AGITATION_M_S.values()]
        for a, b in zip(figs, figs[1:]):
            assert b["max_rate_k_s"] >= a["max_rate_k_s"]
            for key in ("time_600_s", "time_400_s", "time_200_s"):
                assert b[key] <= a[key] + 1e-6, (kind, key)


def test_parameters_are_continuous_in_bath_flow_and_concentration():
    t = np.linspace(60.0, 1000.0, 300)
    base = qm.QuenchSpec("polymer", 35.0, 0.6, 15.0)

    def h_of(spec):  # the model function itself (a table's grid moves with the collapse)
        stages, _ = qm.stages_of(spec)
        return qm.three_stage_htc(t, *(getattr(stages, f) for f in qm.Stages.__dataclass_fields__))

    h0 = h_of(base)
    # A small nudge of each input moves h by little anywhere (no jumps between the named levels
    # or presets): 1e-5 of a unit moves h by less than 0.1 % of its peak (the collapse is steep: about
    # 500 W/m2K per K of surface temperature).
    for nudge in (dict(bath_c=35.00001), dict(agitation_m_s=0.60001), dict(concentration_pct=15.00001)):
        h1 = h_of(qm.QuenchSpec(**{**base.__dict__, **nudge}))
        assert np.max(np.abs(h1 - h0)) < 1e-3 * h0.max(), nudge


def test_the_classes_rank_as_the_trade_knows():
    # Common practice, no source: brine > water > polymer > oil at the same flow; hotter water
    # and more polymer quench less; a hot bath has the longer convection tail.
    f = {n: load_quenchant(n).listed_probe for n in qm.PRESETS}
    for a in ("still", "moderate", "strong"):
        assert f[f"brine_10pct_20c_{a}"]["max_rate_k_s"] > f[f"water_20c_{a}"]["max_rate_k_s"]
        assert f[f"water_20c_{a}"]["max_rate_k_s"] > f[f"water_40c_{a}"]["max_rate_k_s"] > f[f"water_70c_{a}"]["max_rate_k_s"]
        assert (f[f"polymer_10pct_40c_{a}"]["max_rate_k_s"] > f[f"polymer_20pct_40c_{a}"]["max_rate_k_s"]
                > f[f"polymer_30pct_40c_{a}"]["max_rate_k_s"])
        assert f[f"oil_fast_60c_{a}"]["max_rate_k_s"] > f[f"oil_conventional_60c_{a}"]["max_rate_k_s"]
        assert f[f"oil_hot_160c_{a}"]["time_200_s"] > f[f"oil_fast_60c_{a}"]["time_200_s"]


def test_every_oil_preset_keeps_a_flash_point_for_the_caution():
    from quenchwise.results import FLASH_MARGIN_K

    for name in qm.PRESETS:
        q = load_quenchant(name)
        if q.kind == "oil":
            assert q.flash_point_c is not None and q.flash_point_c > q.bath_c + FLASH_MARGIN_K, name
            assert "flash point illustrative" in q.source


BAD = [
    ({"kind": "milk"}, "quench.kind"),
    ({"kind": "water", "agitation": "fast"}, "quench.agitation"),
    ({"kind": "water", "agitation": 3.0}, "quench.agitation"),
    ({"kind": "water", "agitation": -0.1}, "quench.agitation"),
    ({"kind": "water", "agitation": True}, "quench.agitation"),
    ({"kind": "polymer"}, "quench.concentration_pct"),
    ({"kind": "polymer", "concentration_pct": 60}, "quench.concentration_pct"),
    ({"kind": "polymer", "concentration_pct": "ten"}, "quench.concentration_pct"),
    ({"kind": "water", "concentration_pct": 10}, "quench.concentration_pct"),
    ({"kind": "oil_hot", "bath_c": 40.0}, "quench.bath_c"),
    ({"kind": "water", "medium": "water_20c_still"}, "quench.medium"),
    ({"kind": "air", "agitation": 1.0}, "quench.agitation"),
]


@pytest.mark.parametrize("table, key", BAD)
def test_bad_model_keys_are_one_line_naming_the_key(table, key):
    with pytest.raises(InputError) as err:
        qm.quenchant_from_case(table, table.get("bath_c"))
    assert key in str(err.value) and "\n" not in str(err.value)


def test_case_keys_build_the_model_curve(tmp_path):
    from quenchwise.case import load_case

    p = tmp_path / "c.toml"
    p.write_text('title = "t"\n[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_mm = 20\n'
                 '[quench]\nkind = "polymer"\nconcentration_pct = 15\nbath_c = 35\nagitation = 0.6\n', "utf-8")
    case = load_case(p)
    q = case.outer if hasattr(case, "outer") else case.quench.outer
    ref = qm.model_quenchant(qm.QuenchSpec("polymer", 35.0, 0.6, 15.0))
    np.testing.assert_allclose(q.htc(np.arange(40.0, 1000.0, 10.0)), ref.htc(np.arange(40.0, 1000.0, 10.0)))
    # a named level is the same as its velocity
    moderate = qm.quenchant_from_case({"kind": "oil_conventional", "agitation": "moderate"}, None)
    np.testing.assert_allclose(moderate.htc_w_m2k, load_quenchant("oil_conventional_60c_moderate").htc_w_m2k)


def test_run_with_model_keys_end_to_end(cli, tmp_path):
    # A case that names the bath by class, concentration, temperature and flow runs and reports
    # the model's curve; a bad flow is one line with exit 2 and nothing written.
    import json

    case = tmp_path / "c.toml"
    body = ('title = "invented: polymer bath"\n[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_mm = 12\n'
            '[quench]\nkind = "polymer"\nconcentration_pct = 15\nbath_c = 35\nagitation = {a}\n'
            '[transform]\nmodel = "none"\n')
    case.write_text(body.format(a="0.6"), "utf-8")
    code, stdout, stderr = cli("run", case, "--out", tmp_path / "o", "--json")
    assert code == 0, stderr
    assert json.loads(stdout)["quench"]["outer"].startswith("polymer_15pct_35c_0.6m_s")
    case.write_text(body.format(a='"fast"'), "utf-8")
    code, _, stderr = cli("run", case, "--out", tmp_path / "o2")
    assert code == 2 and "quench.agitation" in stderr and len(stderr.strip().splitlines()) == 1
    assert not (tmp_path / "o2").exists()
