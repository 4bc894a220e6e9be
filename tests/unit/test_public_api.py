"""The public API: top-level names, case from a mapping, and the README's example runs."""

from __future__ import annotations

import re
import tomllib
from pathlib import Path

import numpy as np
import pytest

import quenchwise

README = Path(__file__).resolve().parents[2] / "README.md"


def readme_example() -> str:
    section = README.read_text(encoding="utf-8").split("## Python API", 1)[1].split("\n## ", 1)[0]
    blocks = re.findall(r"```python\n(.*?)```", section, re.S)
    assert len(blocks) == 1
    return blocks[0]


def test_the_readme_example_runs(capsys):
    pytest.importorskip("pandas")
    exec(compile(readme_example(), "README.md (Python API)", "exec"), {})
    lines = capsys.readouterr().out.splitlines()
    surface_hrc, centre_hrc, centre_martensite = map(float, lines[0].split())
    # A water-quenched plain 0.45 % C bar of 1-2 in hardens at the surface only: handbook bars of
    # 1045 read 58 / 32 / 29 HRC (1 in) and 52 / 27 / 24 HRC (2 in) at surface / half radius /
    # centre (benchmarks/data/mass_effect_bars.csv, memory): hard surface, soft core.
    assert surface_hrc > centre_hrc + 10 and centre_martensite < 50


def test_top_level_names():
    from quenchwise import api

    for name in ("load_case", "simulate", "compare", "size", "band", "jominy", "Result"):
        assert getattr(quenchwise, name) is getattr(api, name)
    with pytest.raises(AttributeError):
        quenchwise.no_such_name  # noqa: B018


def test_a_mapping_is_the_same_case_as_its_file(tmp_path):
    text = ('title = "t"\n[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_mm = 40\n'
            '[quench]\nseverity_h = 0.5\nend_c = 150\n')
    path = tmp_path / "t.toml"
    path.write_text(text)
    from_file = quenchwise.load_case(path)
    from_mapping = quenchwise.load_case(tomllib.loads(text))
    assert from_mapping.source_text == text          # the mapping written back as the same case text
    assert from_mapping.source_sha256 == from_file.source_sha256
    assert from_mapping.section == from_file.section and from_mapping.outer.name == from_file.outer.name
    np.testing.assert_array_equal(from_mapping.outer.htc_w_m2k, from_file.outer.htc_w_m2k)


def test_a_bad_mapping_is_one_input_error():
    from quenchwise.errors import InputError

    with pytest.raises(InputError, match=r"^\(mapping\): part.diameter_mm = -4"):
        quenchwise.load_case({"steel": {"grade": "4140"}, "part": {"shape": "bar", "diameter_mm": -4},
                              "quench": {"severity_h": 0.5}})


def test_to_dataframe_matches_profile_csv(tmp_path):
    pd = pytest.importorskip("pandas")
    from quenchwise.results import write_profile_csv

    case = quenchwise.load_case({"steel": {"grade": "4140"}, "part": {"shape": "bar", "diameter_mm": 30},
                                 "quench": {"severity_h": 0.5, "end_c": 150}})
    result = quenchwise.simulate(case)
    write_profile_csv(result, tmp_path / "profile.csv")
    csv = pd.read_csv(tmp_path / "profile.csv")
    frame = result.to_dataframe()
    assert list(frame.columns) == list(csv.columns)
    assert frame["depth_mm"].is_monotonic_increasing                  # from the quenched surface inward
    np.testing.assert_allclose(frame["hv"], csv["hv"], atol=0.05)
    np.testing.assert_allclose(frame["martensite"], csv["martensite"], atol=5e-6)
