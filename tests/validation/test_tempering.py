"""Tempered hardness: Hollomon-Jaffe parameter with the Grange-Hribal-Porter (1977) relation.

Check values: 4140 oil-quenched, tempered 1 h at 205 / 425 / 540 / 650 C gives about
53 / 43 / 32 / 24 HRC (handbook tempering curves, memory, +/-4 HRC; DOMAIN.md section 4).

Honesty note: the tempering table (hardness/tempering_ghp1977.csv) is recalled from memory, and
its Fe-C base line was written down with these typical 4140 values known, so this is a
consistency check of the chain, not an independent validation of the table.
"""

import numpy as np
import pytest

from quenchwise.case import parse_case
from quenchwise.hardness import hrc_from_hv
from quenchwise.hardness.tempering import (
    one_hour_equivalent_c,
    tempered_hardness_hv,
)
from quenchwise.workflows import simulate

CASE = """
title = "4140 shaft, oil quench then temper (invented scenario)"
[steel]
grade = "4140"
[part]
shape = "bar"
diameter_mm = 25
[quench]
medium = "oil_conventional_60c_moderate"
end_c = 80
[temper]
temperature_c = {t}
hours = 1
"""
HANDBOOK_4140 = {205.0: 53.0, 425.0: 43.0, 540.0: 32.0, 650.0: 24.0}


@pytest.fixture(scope="module")
def tempered_4140():
    import tomllib
    cases = [parse_case(tomllib.loads(CASE.format(t=t)), CASE.format(t=t), "4140.toml") for t in HANDBOOK_4140]
    return dict(zip(HANDBOOK_4140, simulate(cases)))


@pytest.mark.parametrize("temper_c", list(HANDBOOK_4140))
def test_4140_oil_quenched_and_tempered_1h(tempered_4140, temper_c):
    r = tempered_4140[temper_c]
    surface = int(np.argmin(r.depth_mm))
    # The as-quenched surface is hardened (handbook tempering curves start from 4140 oil-quenched to
    # about 52-57 HRC, memory). Hardness, not the martensite fraction, is checked. The agitated oil:
    # the built-in still-oil curve cools this bar's surface at only about 11 C/s at 700 C (near J10
    # of the end-quench bar, where the 4140H band allows 42-56 HRC and the default kinetics give
    # 47 HRC), slower than a handbook oil quench of a 25 mm bar; the moderate curve gives 29 C/s
    # (near J6) and 53 HRC.
    assert r.hrc[surface] >= 50.0
    assert float(r.hrc_tempered[surface]) == pytest.approx(HANDBOOK_4140[temper_c], abs=4.0)


def test_tempering_only_softens_and_softens_more_when_hotter(tempered_4140):
    hot = [float(np.nanmean(tempered_4140[t].hv_tempered)) for t in sorted(HANDBOOK_4140)]
    assert all(a > b for a, b in zip(hot, hot[1:]))
    for r in tempered_4140.values():
        assert np.all(r.hv_tempered <= r.hv + 1e-9)


def test_hollomon_jaffe_trades_time_for_temperature():
    # Same P, same hardness (Hollomon & Jaffe 1945): ten times the time is worth about 30-50 K of
    # temperature in the usual tempering range (common practice, no source), so 10 h at 500 C
    # tempers like 1 h at about 530-550 C.
    t1 = one_hour_equivalent_c(500.0, 10.0)
    assert 530.0 <= float(t1) <= 550.0
    f = {"martensite": np.array([1.0])}
    chem = dict(c=0.4, mn=0.8, si=0.25, cr=1.0, mo=0.2)
    a, _ = tempered_hardness_hv(f, np.array([50.0]), chem, 500.0, 10.0)
    b, _ = tempered_hardness_hv(f, np.array([50.0]), chem, float(t1), 1.0)
    assert float(a[0]) == pytest.approx(float(b[0]))
    # A longer temper at the same temperature is softer.
    c, _ = tempered_hardness_hv(f, np.array([50.0]), chem, 500.0, 1.0)
    assert float(a[0]) < float(c[0])


def test_tempered_outputs_reach_the_files(tmp_path, tempered_4140):
    from quenchwise.results import read_result_h5, write_profile_csv, write_result_h5
    r = tempered_4140[540.0]
    write_profile_csv(r, tmp_path / "profile.csv")
    write_result_h5(r, tmp_path / "result.h5")
    header = (tmp_path / "profile.csv").read_text().splitlines()[0].split(",")
    assert header[-2:] == ["hv_tempered", "hrc_tempered"]
    assert header[: header.index("cooling_rate_700_c_s") + 1][-3:] == ["hv", "hrc", "cooling_rate_700_c_s"]
    data = read_result_h5(tmp_path / "result.h5")
    assert np.allclose(data["hrc_tempered"], r.hrc_tempered[::-1], equal_nan=True)   # file: centre first
    s = r.summary()
    assert s["temper"]["temperature_c"] == 540.0 and s["points"][0]["hrc_tempered"] is not None
    assert float(hrc_from_hv(s["points"][0]["hv_tempered"])) == pytest.approx(s["points"][0]["hrc_tempered"], abs=0.2)
