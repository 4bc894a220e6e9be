"""Case-file validation: every problem is one InputError naming key, value and what is allowed."""

import tomllib

import pytest

from quenchwise.case import load_case, parse_case
from quenchwise.errors import InputError

GOOD = """
title = "t"
[steel]
c = 0.4
mn = 0.85
austenitize_c = 850
[part]
shape = "bar"
diameter_mm = 25
[quench]
htc_w_m2k = 2000
bath_c = 20
"""


def parse(text):
    return parse_case(tomllib.loads(text), text, "x.toml")


def test_good_case_parses_with_si_units():
    case = parse(GOOD)
    assert case.section.outer_m == pytest.approx(0.0125)
    assert case.composition.c == 0.4 and case.grain_size == 7.0 and case.end_c == 60.0
    assert case.outer.htc(500.0) == pytest.approx(2000.0)


@pytest.mark.parametrize("change, key", [
    (("c = 0.4", "c = -0.4"), "steel.c"),
    (("c = 0.4", "c = 2.5"), "steel.c"),
    (("c = 0.4", 'c = "lots"'), "steel.c"),
    (('shape = "bar"', 'shape = "cube"'), "part.shape"),
    (("diameter_mm = 25", "diameter_mm = 0"), "part.diameter_mm"),
    (("diameter_mm = 25", "diameter_mm = nan"), "part.diameter_mm"),
    (("diameter_mm = 25", "thickness_mm = 25"), "part.thickness_mm"),
    (("htc_w_m2k = 2000", "htc_w_m2k = -5"), "quench.htc_w_m2k"),
    (("htc_w_m2k = 2000", 'medium = "treacle"'), "quench.medium"),
    (("htc_w_m2k = 2000", "htc_w_m2k = 2000\nseverity_h = 1"), "quench.medium"),
    (("austenitize_c = 850", "austenitize_c = 700"), "steel.austenitize_c"),
    (("bath_c = 20", "bath_c = 20\nend_c = 10"), "quench.end_c"),
    (("[steel]", "[steel]\ncolour = 3"), "steel.colour"),
])
def test_bad_values_name_the_key(change, key):
    with pytest.raises(InputError) as err:
        parse(GOOD.replace(*change))
    assert err.value.key == key
    assert "allowed is" in str(err.value) and "\n" not in str(err.value)


def test_unknown_section_and_missing_section():
    with pytest.raises(InputError, match="extras"):
        parse(GOOD + "\n[extras]\na = 1\n")
    with pytest.raises(InputError, match="quench"):
        parse(GOOD.split("[quench]")[0])


def test_grade_loads_nominal_and_element_keys_override():
    case = parse(GOOD.replace("c = 0.4\nmn = 0.85\n", 'grade = "4140"\nmn = 1.0\n'))
    assert case.grade == "4140" and case.composition.mn == 1.0 and case.composition.cr > 0.8


def test_unreadable_files_are_one_line(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_bytes(b"title = \xff\xfe")
    with pytest.raises(InputError, match="UTF-8"):
        load_case(bad)
    bad.write_text("title = [unclosed")
    with pytest.raises(InputError, match="valid TOML"):
        load_case(bad)
    with pytest.raises(InputError, match="existing"):
        load_case(tmp_path / "missing.toml")
