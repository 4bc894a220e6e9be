"""compare, size and band on finite parts (issue 17)."""

import numpy as np
import pytest

from quenchwise.case import load_case
from quenchwise.thermal.quenchants import load_quenchant
from quenchwise.workflows import simulate
from quenchwise.workflows.band import band
from quenchwise.workflows.compare import compare
from quenchwise.workflows.requirement import meets
from quenchwise.workflows.size import largest_length
from quenchwise.workflows.variants import with_length, with_size

# Coarse (r, z) meshes keep these fast; the physics checks do not need the default resolution.
BASE = {"title": "short 4140 bar (invented)", "steel": {"grade": "4140"},
        "part": {"shape": "bar", "diameter_mm": 60, "length_mm": 60},
        "quench": {"medium": "oil_conventional_60c_moderate"}, "requirement": {"min_hrc": 45},
        "mesh": {"radial_cells": 12, "axial_cells": 24}}


@pytest.fixture(scope="module")
def case():
    return load_case(BASE)


def test_compare_finite_part_in_two_media(case):
    # Common practice, no source: agitated water hardens the middle of a 4140 part more than oil.
    media = [load_quenchant("oil_conventional_60c_moderate"), load_quenchant("water_20c_moderate")]
    c = compare(case, media)
    assert all(getattr(r, "finite", False) for r in c.results)
    oil, water = c.rows
    assert water["centre_hrc"] > oil["centre_hrc"] and water["centre_martensite_pct"] > oil["centre_martensite_pct"]
    # the end faces follow the medium compared (no own end-face quench in this case)
    assert c.results[1].case.finite.end_media(c.results[1].case.outer)["lower_end"] is c.results[1].case.outer


def test_end_face_scale_follows_the_compared_medium():
    c = load_case({**BASE, "quench": {"medium": "oil_conventional_60c_moderate", "end_face_h_scale": 0.5}})
    water = load_quenchant("water_20c_moderate")
    [r] = compare(c, [water]).results
    end = r.case.finite.end_media(r.case.outer)["upper_end"]
    assert end.name.startswith(water.name) and np.allclose(end.htc_w_m2k, 0.5 * water.htc_w_m2k)


def test_largest_length_meets_and_the_next_longer_does_not(case):
    # The 60 mm bar's middle is below 45 HRC when long (the 1-D bar) and above it when short:
    # the ends harden the middle of a short part (common practice, no source).
    infinite = load_case({k: v for k, v in BASE.items() if k != "mesh"} | {"part": {"shape": "bar", "diameter_mm": 60}})
    assert not meets(simulate([infinite])[0], infinite.requirement)
    b = largest_length(case, case.requirement)
    assert b.passing is not None and b.failing is not None and b.passing < b.failing
    passing, failing = simulate([with_length(case, b.passing), with_length(case, b.failing)])
    assert meets(passing, case.requirement) and not meets(failing, case.requirement)
    assert b.failing / b.passing < 1.2                  # the refined bracket is tight


def test_with_size_keeps_the_length_and_the_steps_in_proportion(cases_dir):
    shaft = load_case(cases_dir / "stepped_shaft_oil.toml")
    bigger = with_size(shaft, 80.0)
    assert bigger.finite.part.length_m == shaft.finite.part.length_m
    assert 2000 * bigger.finite.part.outer_m == pytest.approx(80.0)
    assert np.allclose(np.array(bigger.finite.part.radii_m) / np.array(shaft.finite.part.radii_m), 80.0 / 65.0)
    ring = load_case({**BASE, "part": {"shape": "tube", "outer_diameter_mm": 80, "inner_diameter_mm": 40,
                                       "length_mm": 30}})
    thicker = with_size(ring, 30.0)                         # a tube's size is its wall
    assert thicker.finite.part.bore_m == pytest.approx(0.020) and thicker.finite.part.outer_m == pytest.approx(0.050)


def test_band_on_a_finite_part(case):
    b = band(case, samples=3, seed=2)
    assert len(b.results) == 3 and all(getattr(r, "finite", False) for r in b.results)
    assert np.all(np.nanmax(b.hv, axis=0) >= np.nanmin(b.hv, axis=0))
