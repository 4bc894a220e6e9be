"""The README's demo outputs are what the commands print now (a model refit must update them).

Each README block is matched line by line against the command's output: the same words, and every
number within one unit of its last printed digit (a different CPU's last bits may move a rounding).
Checks of the documentation against the program itself (no outside reference applies)."""

import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
README = (ROOT / "README.md").read_text(encoding="utf-8")
NUMBER = re.compile(r"^[-+]?\d+(\.\d+)?$")

#: (command line as in the README, the first line of its output block there)
DEMOS = [
    (["run", "cases/shaft_water.toml"], "quenchwise 0.1.0  |  Pinion shaft"),
    (["compare", "cases/axle_oil_vs_polymer.toml", "--out", "{tmp}/axle"], "Axle, 60 mm bar, 5140"),
    (["run", "cases/pin_heat_4711.toml"], "location             depth mm    HRC     HV    HRB    HB  martensite %  bainite %  "
                                          "ferr+pearl %  ret. aust %  Jominy mm\nsurface                  0.00   51"),
    (["fit-tank", "cases/test_bar_tank2.toml", "cases/test_bar_tank2_traverse.csv", "--out", "{tmp}/tank2"], "tank fit "),
    (["run", "cases/stepped_shaft_oil.toml"], "location             depth mm    HRC     HV    HRB    HB  martensite %  bainite %  "
                                              "ferr+pearl %  ret. aust %  Jominy mm\nsurface                  0.00   46"),
]


def readme_block(first: str) -> list[str]:
    start = README.index(first)
    return [line for line in README[start:README.index("```", start)].splitlines() if line.strip()]


def _words(line: str):
    return [("#" if NUMBER.match(w.rstrip(",;)%")) else w) for w in re.sub(r"[(),;/]", " ", line).split()]


def _numbers(line: str):
    return [w.rstrip(",;)%") for w in re.sub(r"[(),;/]", " ", line).split() if NUMBER.match(w.rstrip(",;)%"))]


def same_line(shown: str, printed: str) -> bool:
    if _words(shown) != _words(printed):
        return False
    for a, b in zip(_numbers(shown), _numbers(printed)):
        step = 10.0 ** -(len(a.split(".")[1]) if "." in a else 0)
        if abs(float(a) - float(b)) > 1.01 * step:
            return False
    return True


@pytest.mark.parametrize("args, first", DEMOS, ids=[" ".join(a[:2]) for a, _ in DEMOS])
def test_readme_demo_output_is_current(cli, monkeypatch, tmp_path, args, first):
    monkeypatch.chdir(ROOT)
    status, out, err = cli(*[a.format(tmp=tmp_path) for a in args])
    assert status == 0, err
    printed = out.splitlines()
    for shown in readme_block(first):
        assert any(same_line(shown, p) for p in printed), f"README line not printed by {args[:2]}: {shown!r}"


def test_a_changed_number_is_caught():
    assert same_line("centre   12.50   57.0", "centre   12.50   57.1")
    assert not same_line("centre   12.50   57.0", "centre   12.50   57.3")
    assert not same_line("centre   12.50   57.0", "center   12.50   57.0")
