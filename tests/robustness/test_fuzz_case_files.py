"""Property-based fuzzing of case files: every malformed file is one InputError line (exit 2
through the command line), never a traceback, and quickly.

At least 1,000 generated files go through load_case (the counts are the max_examples below);
a fixed set of malformed files goes through the real command line.
"""

import math
import subprocess
import sys

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from quenchwise.case import SECTIONS, load_case
from quenchwise.errors import InputError

VALID = {
    "title": "fuzz",
    "steel": {"c": 0.4, "mn": 0.85, "si": 0.25, "cr": 0.95, "mo": 0.2, "grain_size": 7, "austenitize_c": 850},
    "part": {"shape": "bar", "diameter_mm": 25},
    "quench": {"medium": "water_20c_still", "bath_c": 20, "end_c": 60},
    "transform": {"model": "li1998"},
}


def _toml_value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float):
        if math.isnan(v):
            return "nan"
        if math.isinf(v):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, int):
        return str(v)
    if isinstance(v, str):
        return '"' + v.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n") + '"'
    if isinstance(v, list):
        return "[" + ", ".join(_toml_value(x) for x in v) + "]"
    raise TypeError(v)


def to_toml(data: dict) -> str:
    lines = [f"{k} = {_toml_value(v)}" for k, v in data.items() if not isinstance(v, dict)]
    for name, table in data.items():
        if isinstance(table, dict):
            lines.append(f"[{name}]")
            lines += [f"{k} = {_toml_value(v)}" for k, v in table.items()]
    return "\n".join(lines) + "\n"


bad_numbers = st.sampled_from([0, -1, -0.0, 1e308, -1e308, float("nan"), float("inf"), float("-inf"), 10**30,
                               True, "12", "", [], [1, 2], 3.5e-320])
any_value = st.one_of(bad_numbers, st.text(max_size=12), st.integers(-10**6, 10**6),
                      st.floats(allow_nan=True, allow_infinity=True), st.lists(st.integers(), max_size=3))
keys = st.sampled_from([(s, k) for s, ks in SECTIONS.items() if s != "title" for k in sorted(ks)])


def _table(data: dict, name: str) -> dict:
    if not isinstance(data.get(name), dict):
        data[name] = {}
    return data[name]


@st.composite
def mutated_case(draw):
    data = {k: (dict(v) if isinstance(v, dict) else v) for k, v in VALID.items()}
    for _ in range(draw(st.integers(1, 3))):
        kind = draw(st.sampled_from(["delete", "unknown_key", "value", "unknown_section", "name", "table_type"]))
        if kind == "delete":
            section = draw(st.sampled_from(sorted(k for k in data if isinstance(data[k], dict))))
            if data[section]:
                data[section].pop(draw(st.sampled_from(sorted(data[section]))))
            else:
                data.pop(section)
        elif kind == "unknown_key":
            section = draw(st.sampled_from(sorted(k for k in data if isinstance(data[k], dict))))
            data[section][draw(st.text("abcxyz_", min_size=1, max_size=8))] = draw(any_value)
        elif kind == "value":
            section, key = draw(keys)
            _table(data, section)[key] = draw(any_value)
        elif kind == "unknown_section":
            data[draw(st.text("qrstuv", min_size=1, max_size=6))] = {"a": 1}
        elif kind == "name":
            target = draw(st.sampled_from([("steel", "grade"), ("quench", "medium"), ("part", "shape"),
                                           ("transform", "model"), ("quench", "medium")]))
            _table(data, target[0])[target[1]] = draw(st.sampled_from(
                ["", "unobtainium", "4140x", "no/such/file.csv", "/dev/null", "water_20c_still.csv", "../x.csv"]))
        else:
            data[draw(st.sampled_from(["steel", "part", "quench"]))] = draw(any_value)
    return data


@settings(max_examples=800, deadline=2000, suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(data=mutated_case())
def test_mutated_case_files_give_one_line_errors(tmp_path, data):
    path = tmp_path / "case.toml"
    path.write_text(to_toml(data), encoding="utf-8")
    try:
        load_case(path)
    except InputError as exc:
        message = str(exc)
        assert "\n" not in message and "allowed is" in message and str(path) in message


@settings(max_examples=250, deadline=2000, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(raw=st.binary(max_size=300))
def test_random_bytes_give_one_line_errors(tmp_path, raw):
    path = tmp_path / "case.toml"
    path.write_bytes(raw)
    with pytest.raises(InputError) as err:
        load_case(path)
    assert "\n" not in str(err.value)


MALFORMED = {
    "not_toml": "title = [",
    "non_utf8": b"title = \"\xff\xfe\"\n",
    "negative_size": to_toml({**VALID, "part": {"shape": "bar", "diameter_mm": -25}}),
    "nan_carbon": to_toml({**VALID, "steel": {**VALID["steel"], "c": float("nan")}}),
    "unknown_grade": to_toml({**VALID, "steel": {"grade": "unobtainium"}}),
    "unknown_medium": to_toml({**VALID, "quench": {"medium": "treacle"}}),
    "missing_csv": to_toml({**VALID, "quench": {"medium": "nowhere/curve.csv"}}),
    "huge_plate": to_toml({**VALID, "part": {"shape": "plate", "thickness_mm": 1e9}}),
    "carbon_over_limit": to_toml({**VALID, "steel": {**VALID["steel"], "c": 2.5}}),
    "below_ae1": to_toml({**VALID, "steel": {**VALID["steel"], "austenitize_c": 650}}),
    "wrong_type_table": 'steel = 3\n[part]\nshape = "bar"\n',
    "unknown_model": to_toml({**VALID, "transform": {"model": "magic"}}),
}


@pytest.mark.parametrize("name", sorted(MALFORMED))
def test_malformed_files_through_the_command_line(tmp_path, name):
    text = MALFORMED[name]
    path = tmp_path / f"{name}.toml"
    path.write_bytes(text if isinstance(text, bytes) else text.encode("utf-8"))
    out = tmp_path / "out"
    r = subprocess.run([sys.executable, "-m", "quenchwise", "run", str(path), "--out", str(out)],
                       capture_output=True, text=True, timeout=60)
    assert r.returncode == 2, r.stderr
    assert len(r.stderr.strip().splitlines()) == 1 and "Traceback" not in r.stderr
    assert not out.exists()


def test_missing_case_file_through_the_command_line(tmp_path):
    r = subprocess.run([sys.executable, "-m", "quenchwise", "run", str(tmp_path / "nope.toml"), "--out",
                        str(tmp_path / "o")], capture_output=True, text=True, timeout=60)
    assert r.returncode == 2 and "nope.toml" in r.stderr and len(r.stderr.strip().splitlines()) == 1


@pytest.mark.parametrize("args", [
    ["run"],                                                   # missing argument
    ["run", "CASE", "--out", "o", "--bogus"],                  # unknown option
    ["band", "CASE", "--out", "o", "--samples", "0"],          # value out of its range
    ["band", "CASE", "--out", "o", "--samples", "many"],       # wrong type
    ["size", "CASE", "--out", "o", "--min-hrc", "nan"],        # not a number the requirement allows
    ["diagram", "CASE", "--out", "o", "--kind", "xyz"],        # not one of the choices
    ["nosuchcommand"],
])
def test_bad_options_are_one_line_and_status_2(tmp_path, args):
    case = tmp_path / "case.toml"
    case.write_text(to_toml(VALID))
    argv = [str(case) if a == "CASE" else (str(tmp_path / a) if a == "o" else a) for a in args]
    r = subprocess.run([sys.executable, "-m", "quenchwise", *argv], capture_output=True, text=True, timeout=60)
    assert r.returncode == 2, r.stderr
    assert len(r.stderr.strip().splitlines()) == 1 and "Traceback" not in r.stderr, r.stderr
    assert not (tmp_path / "o").exists()
