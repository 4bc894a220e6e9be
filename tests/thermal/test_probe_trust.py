"""Trusting a probe inversion: impossible records refused, the thermocouple lag, the warnings,
sharp curves (issue 11 item 6; the probe-record items of issue 14). All records are invented
data, synthesized on the 1-D probe model with a fixed seed.
"""

import json
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from quenchwise.errors import InputError
from quenchwise.thermal import quenchant_model as qm
from quenchwise.thermal.probe import (
    MAX_RATE_K_S, FIGURE_SEGMENTS_S, check_probe_curve, fit_probe, lag_corrected, parse_probe_curve,
    synthesize_probe_curve)
from quenchwise.thermal.quenchants import Quenchant, load_quenchant

T = np.linspace(0.0, 40.0, 401)
Y = 60.0 + 790.0 * np.exp(-T / 10.0)


def _text(t, y, meta="# bath_c: 60\n"):
    return meta + "time_s,temperature_c\n" + "".join(f"{float(a)!r},{float(b)!r}\n" for a, b in zip(t, y))


IMPOSSIBLE = {  # issue 14: each must be one line, naming what is allowed
    "reheats by 240 K": (T, np.where((T > 10) & (T < 12), Y + 240.0, Y), "only cools"),
    "850 to 100 C in 0.1 s": (T, np.where(T >= 5.0, 100.0 + 0 * Y, 850.0), "at most 450 K/s"),
    "1000 s spacing": (np.arange(25) * 1000.0, np.linspace(850.0, 60.0, 25), "too coarse"),
    "1 us spacing": (np.arange(400) * 1e-6, Y, "at least 0.0001 s apart"),
    "shorter than 5 s": (np.linspace(0.0, 2.0, 400), np.linspace(850.0, 300.0, 400), "at least 5 s"),
    "one gap of a minute": (np.concatenate([T[:200], T[200:] + 60.0]), Y, "no gap over 5 s"),
}


@pytest.mark.parametrize("label", sorted(IMPOSSIBLE))
def test_impossible_records_are_refused_in_one_line(label):
    t, y, expected = IMPOSSIBLE[label]
    with pytest.raises(InputError) as err:
        parse_probe_curve(_text(t, y), "bad.csv")
    assert expected in str(err.value) and "\n" not in str(err.value)


@pytest.mark.parametrize("label", ["reheats by 240 K", "850 to 100 C in 0.1 s", "1000 s spacing", "1 us spacing"])
def test_the_command_refuses_them_with_exit_2_and_writes_nothing(cli, tmp_path, label):
    t, y, expected = IMPOSSIBLE[label]
    record = tmp_path / "rec.csv"
    record.write_text(_text(t, y), "utf-8")
    code, stdout, stderr = cli("probe", record, "--out", tmp_path / "fit")
    lines = stderr.strip().splitlines()
    assert code == 2 and len(lines) == 1 and lines[0].startswith("quenchwise: ") and expected in lines[0], stderr
    assert "Warning" not in stderr and not (tmp_path / "fit").exists()


def test_real_fast_records_pass_the_checks():
    # The strongest presets sampled at 1 kHz with 1 K noise are not mistaken for jumps.
    for name in ("brine_10pct_20c_strong", "water_20c_strong"):
        r = synthesize_probe_curve(load_quenchant(name), finite=False, duration_s=15.0, sample_s=0.001, noise_k=1.0)
        check_probe_curve(r.time_s, r.temperature_c)
    assert MAX_RATE_K_S > 320.0     # the probe's conduction limit (test_quenchant_model.py)


def test_lag_correction_undoes_a_first_order_thermocouple():
    # A first-order lag y' = (T - y) / tau applied to a known curve is undone to within the
    # smoothing (exact for a straight line: T = y + tau dy/dt).
    t = np.linspace(0.0, 20.0, 2001)
    truth = 60.0 + 790.0 * np.exp(-t / 4.0)
    tau, dt = 0.15, t[1] - t[0]
    lagged = np.empty_like(truth)
    lagged[0] = truth[0]
    for i in range(1, t.size):
        lagged[i] = lagged[i - 1] + dt / (tau + dt) * (truth[i] - lagged[i - 1])
    back = lag_corrected(t, lagged, tau)
    assert np.max(np.abs(back - truth)[t > 0.5]) < 1.0 < np.max(np.abs(lagged - truth))


def _smooth_water():
    from pathlib import Path

    return load_quenchant(str(Path(__file__).parent / "data" / "smooth_water_invented.csv"))


def test_time_constant_round_trip():
    # A 0.3 s thermocouple on a fast (smooth, invented) water curve. The lag mostly shifts the
    # record in time, which the inversion partly takes for conduction: read as it is, h stays
    # within about 6 % but the refit misses the record by several noise levels; with the time
    # constant given the refit is back at the noise (0.5 K) and h within 8 %.
    truth = _smooth_water()
    rec = synthesize_probe_curve(truth, noise_k=0.5, seed=11, finite=False, duration_s=20.0, sample_s=0.01)
    tau, dt = 0.3, 0.01
    y = rec.temperature_c.copy()
    for i in range(1, y.size):
        y[i] = y[i - 1] + dt / (tau + dt) * (rec.temperature_c[i] - y[i - 1])
    lagged = type(rec)(rec.time_s, y, rec.name, rec.meta)
    window = np.arange(300.0, 801.0, 10.0)
    plain, fit_plain = fit_probe(lagged, truth.bath_c, end_correction=False)
    fixed, fit = fit_probe(lagged, truth.bath_c, end_correction=False, tc_time_constant_s=tau)
    err_fixed = np.max(np.abs(fixed.htc(window) / truth.htc(window) - 1.0))
    assert err_fixed <= 0.08
    assert fit.tc_time_constant_s == tau and fit.rms_k < 1.5 and fit_plain.rms_k > 2.0 * fit.rms_k


def _collapse(q):
    """Highest surface temperature where h is above half-way between the blanket and the peak."""
    t = np.arange(250.0, 900.0, 1.0)
    h = q.htc(t)
    return float(t[h >= 0.5 * (q.htc(880.0) + h.max())].max())


def test_sharp_kink_round_trip_vapour_to_boiling():
    # The conventional-oil preset: blanket 420 W/m2K collapsing within 25 K at 600 C onto a
    # 2700 W/m2K peak. The sequential method smears the kink over about 70 K (h up to 50 % off
    # there); farther away h within 10 %; the kink's position within 30 K; the peak within 10 %;
    # the refit within 10 K (no warning).
    truth = load_quenchant("oil_conventional_60c_still")
    rec = synthesize_probe_curve(truth, noise_k=0.5, seed=3, finite=False, duration_s=40.0, sample_s=0.05, dt_s=0.002)
    fitted, fit = fit_probe(rec, truth.bath_c, end_correction=False)
    kink = _collapse(truth)
    window = np.arange(250.0, 801.0, 10.0)
    away = window[np.abs(window - kink) > 70.0]
    assert np.max(np.abs(fitted.htc(away) / truth.htc(away) - 1.0)) <= 0.10
    assert abs(_collapse(fitted) - kink) <= 30.0
    assert np.max(fitted.htc(window)) == pytest.approx(np.max(truth.htc(window)), rel=0.10)
    assert fit.rms_k < 10.0 and not fit.warnings


def test_narrow_water_peak_is_smoothed_and_the_fit_says_so():
    # A narrow water peak (invented: 15 kW/m2K, 60 K wide, blanket collapsing at 560 C) recorded
    # at 100 Hz. Sequential function specification needs a future window of about 0.8 s to stay
    # stable; the surface crosses the peak in less, so the peak is smoothed: the blanket above
    # the kink is right (5 %), but the peak comes out lower and the kink lower. The fit must say so
    # (refit residual warning) rather than pass it silently.
    t = np.arange(20.0, 1100.0, 2.0)
    truth = Quenchant("narrow water peak (invented)", 20.0, t, qm.three_stage_htc(t, 400.0, 560.0, 15000.0, 420.0,
                                                                                   60.0, 900.0), kind="water")
    rec = synthesize_probe_curve(truth, noise_k=0.5, seed=3, finite=False, duration_s=25.0, sample_s=0.01, dt_s=0.002)
    fitted, fit = fit_probe(rec, truth.bath_c, end_correction=False)
    above = np.arange(620.0, 801.0, 10.0)
    assert np.max(np.abs(fitted.htc(above) / truth.htc(above) - 1.0)) <= 0.05
    assert 0.3 * 15000.0 < np.max(fitted.htc(t[t < 700])) < 15000.0
    assert any("refit residual" in w for w in fit.warnings) and fit.rms_k > 10.0


def test_slow_sampling_of_a_fast_bath_is_warned(cli, tmp_path):
    truth = _smooth_water()
    rec = synthesize_probe_curve(truth, noise_k=0.5, seed=5, finite=False, duration_s=20.0, sample_s=0.04)
    record = tmp_path / "slow.csv"
    record.write_text(_text(rec.time_s, rec.temperature_c, "# bath_c: 20\n# kind: water\n"), "utf-8")
    code, stdout, stderr = cli("probe", record, "--out", tmp_path / "fit", "--json", "--no-end-correction")
    assert code == 0, stderr
    summary = json.loads(stdout)
    assert any("25 Hz" in w and "below 50 Hz" in w for w in summary["warnings"])
    assert summary["end_correction"] is False and "end faces corrected" not in open(tmp_path / "fit" / "quenchant.csv").read()


def test_bad_time_constant_is_one_line(cli, tmp_path):
    record = tmp_path / "r.csv"
    record.write_text(_text(T, Y), "utf-8")
    for bad in ("-1", "5", "nan"):
        code, _, stderr = cli("probe", record, "--out", tmp_path / "o", "--tc-time-constant", bad)
        assert code == 2 and len(stderr.strip().splitlines()) == 1 and "--tc-time-constant" in stderr
        assert not (tmp_path / "o").exists()


# -- fuzz: generated records, every one either accepted or refused in one line ---------------
_floats = st.floats(allow_nan=True, allow_infinity=True, width=64)


@st.composite
def records(draw):
    n = draw(st.integers(0, 60))
    kind = draw(st.sampled_from(["random", "cooling", "spaced"]))
    if kind == "random":
        t = [draw(_floats) for _ in range(n)]
        y = [draw(_floats) for _ in range(n)]
    else:
        spacing = draw(st.sampled_from([1e-7, 1e-6, 1e-3, 0.05, 0.5, 3.0, 1000.0, 1e12]))
        t = list(np.arange(n) * spacing)
        start = draw(st.floats(-300.0, 2000.0))
        tau = draw(st.floats(0.01, 1e6))
        y = list(start - (start - 60.0) * (1.0 - np.exp(-np.arange(n) * spacing / tau)))
        if n and draw(st.booleans()):  # one corrupted sample: a spike, a jump or a NaN
            y[draw(st.integers(0, n - 1))] = draw(st.sampled_from([float("nan"), 2000.0, -400.0, 100.0, 1e300]))
    return t, y


@settings(max_examples=1000, deadline=None, suppress_health_check=list(HealthCheck))
@given(records())
def test_fuzz_probe_records_validate_or_refuse_in_one_line(rec):
    t, y = rec
    text = "time_s,temperature_c\n" + "".join(f"{float(a)!r},{float(b)!r}\n" for a, b in zip(t, y))
    with np.errstate(all="raise"):   # a numpy warning would be a message before the message
        try:
            curve = parse_probe_curve(text, "fuzz.csv")
        except InputError as err:
            assert "\n" not in str(err)
            return
    # Accepted: a plausible record (the checks' promises hold).
    assert curve.time_s.size >= 20 and np.all(np.diff(curve.time_s) > 0)
    assert 700.0 <= curve.temperature_c[0] <= 1000.0


FUZZ_CLI = [  # a handful of real command runs from the fuzz's corner cases
    (np.arange(30) * 1e12, np.linspace(850.0, 60.0, 30)),
    (np.arange(30) * 1e-7, np.linspace(850.0, 60.0, 30)),
    (T, np.where(T > 3, 1e300, Y)),
    (T, np.where(T > 3, -400.0, Y)),
    (T[:3], Y[:3]),
]


@pytest.mark.parametrize("i", range(len(FUZZ_CLI)))
def test_fuzz_corner_cases_through_the_command(cli, tmp_path, i):
    t, y = FUZZ_CLI[i]
    record = tmp_path / "rec.csv"
    record.write_text(_text(t, y), "utf-8")
    code, _, stderr = cli("probe", record, "--out", tmp_path / "fit")
    lines = stderr.strip().splitlines()
    assert code == 2 and len(lines) == 1 and lines[0].startswith("quenchwise: ") and "internal" not in stderr
    assert not (tmp_path / "fit").exists()
