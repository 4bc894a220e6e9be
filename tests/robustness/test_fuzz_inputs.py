"""Fuzz of the inputs other than case-file values (those: test_fuzz_case_files.py) and probe
records (tests of the probe command): command-line options, band CSVs and case-file keys.

1,000 generated cases in all (the max_examples below: 400 + 300 + 300): 0 tracebacks, 0 internal
errors. Options go through the real console entry point in-process; the long computations are
replaced by a stand-in that stops the command with a marked InputError once every option has been
checked, so each case costs milliseconds.
"""

import string
import sys
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from quenchwise import cli as cli_module
from quenchwise import publish
from quenchwise.case import load_case
from quenchwise.errors import InputError
from quenchwise.workflows.jominy import read_band

CASES = Path(__file__).resolve().parents[2] / "cases"
REACHED = "REACHED-THE-COMPUTATION"


def _stop(*_args, **_kwargs):
    raise InputError(REACHED, 0, "(test stand-in)")


@pytest.fixture
def stubbed(monkeypatch):
    """The heavy workflows replaced by _stop (their option checks still run before them)."""
    import quenchwise.kinetics.diagrams
    import quenchwise.thermal.severity
    import quenchwise.workflows
    import quenchwise.workflows.band
    import quenchwise.workflows.compare
    import quenchwise.workflows.jominy
    import quenchwise.workflows.size

    for module, name in ((quenchwise.workflows, "simulate_case"), (quenchwise.workflows.band, "simulate"),
                         (quenchwise.workflows.compare, "compare"), (quenchwise.workflows.size, "size"),
                         (quenchwise.workflows.jominy, "jominy"), (quenchwise.kinetics.diagrams, "ttt_diagram"),
                         (quenchwise.kinetics.diagrams, "cct_diagram"),
                         (quenchwise.thermal.severity, "equivalent_severities")):
        monkeypatch.setattr(module, name, _stop)
    yield


NUMBERS = st.sampled_from(["-1", "0", "1", "2", "-0", "nan", "inf", "-inf", "1e309", "1e-320", "5001", "4999",
                           str(2 ** 63), str(2 ** 64), str(-2 ** 63), "10" * 20, "", " ", "abc", "0x10", "1_000",
                           "3.5", "-3.5", "45", "68", "100", "1000"])
TEXT = st.text(alphabet=string.printable, max_size=30)


def _paths(work: Path):
    (work / "afile").write_text("x")
    good = [str(work / "o")] * 10     # mostly a good folder, so that the other options get checked
    return st.sampled_from(good + [str(work / "afile"), str(work / "afile" / "sub"), "", ".", "/",
                            "/proc/qw-fuzz", str(work / "deep" / "er" / "o"), str(work / ("x" * 300)),
                            str(work / "o\nnewline")])


COMMANDS = {
    "run": {"--json": None, "--overwrite": None},
    "compare": {"--medium": "medium", "--json": None, "--overwrite": None},
    "size": {"--min-hrc": "num", "--min-martensite": "num", "--depth-mm": "num", "--json": None},
    "band": {"--samples": "num", "--seed": "num", "--json": None, "--overwrite": None},
    "sheet": {"--json": None},
    "jominy": {"--band": "bandfile", "--rz": None, "--no-physics-di": None, "--json": None},
    "diagram": {"--kind": "kind", "--json": None},
    "quenchants": {"--json": None},
}


@st.composite
def argv(draw, work: Path):
    command = draw(st.sampled_from(sorted(COMMANDS)))
    case = draw(st.sampled_from([str(CASES / "wear_plate.toml")] * 4 + [str(CASES / "shaft_water.toml"),
                                 str(CASES / "pin_sizing.toml"), str(work / "missing.toml"), str(work / "afile"), ""]))
    args = [command]
    if command == "quenchants":
        if draw(st.booleans()):
            args.append(draw(st.sampled_from(["water_20c_still", "nonexistent", "", str(work / "afile"),
                                              str(CASES / "probe_record_tank3.csv")])))
    else:
        args.append(case)
    if command != "quenchants" or (len(args) > 1 and draw(st.booleans())):
        if draw(st.integers(0, 9)):
            args += ["--out", draw(_paths(work))]
    for option in draw(st.lists(st.sampled_from(sorted(COMMANDS[command])), max_size=4, unique=True)):
        kind = COMMANDS[command][option]
        if kind is None:
            args.append(option)
        elif kind == "num":
            args += [option, draw(NUMBERS)]
        elif kind == "medium":
            args += [option, draw(st.sampled_from(["water_20c_still", "oil_fast_60c_still", "no_such", "",
                                                   str(work / "afile")]))]
        elif kind == "kind":
            args += [option, draw(st.sampled_from(["ttt", "cct", "TTT", " cct ", "xyz", ""]))]
        elif kind == "bandfile":
            args += [option, draw(st.sampled_from([str(work / "afile"), str(work / "nope.csv"), ""]))]
    if draw(st.integers(0, 19)) == 0:
        args.append(draw(st.sampled_from(["--bogus", "-x", "--out", "extra-argument"])))
    return args


def test_fuzz_command_line_options(stubbed, capsys, monkeypatch):
    """400 generated command lines: exit 0 or 2 (never 1: no internal error), no traceback, and
    every error one line; nothing left beside --out (lock, staging folders)."""
    work = Path(tempfile.mkdtemp(prefix="qw-fuzz-"))
    monkeypatch.chdir(work)
    seen = {"reached": 0, "refused": 0}

    @settings(max_examples=400, deadline=None, database=None, derandomize=True,
              suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow])
    @given(args=argv(work))
    def one(args):
        monkeypatch.setattr(sys, "argv", ["quenchwise", *args])
        with pytest.raises(SystemExit) as done:
            cli_module.entry()
        out, err = capsys.readouterr()
        status = done.value.code
        assert status in (0, 2), (args, status, err)
        assert "Traceback" not in out + err and "internal error" not in err, (args, err)
        if status == 2:
            assert len(err.strip().splitlines()) == 1, (args, err)
            seen["reached" if REACHED in err else "refused"] += 1
        assert not publish._claims, args                      # every lock released
        left = [p.name for p in work.iterdir() if ".lock" in p.name or ".qw-" in p.name]
        assert not left, (args, left)

    one()
    assert seen["reached"] > 40 and seen["refused"] > 40, seen     # both kinds were exercised


# -- band CSVs -----------------------------------------------------------------------------------
CELL = st.one_of(st.sampled_from(["", " ", "nan", "inf", "-1", "0", "0.5", "1e308", "70", "70.1", "-0", "20", "65",
                                  "100", "100.1", "x", '"3"', "1,5"]),
                 st.floats(allow_nan=True, allow_infinity=True).map(repr), st.text(max_size=6))
HEADER = st.sampled_from(["distance_mm,min_hrc,max_hrc", "distance_sixteenths,min_hrc,max_hrc",
                          "DISTANCE_MM , MIN_HRC , MAX_HRC", "distance_mm,max_hrc,min_hrc", "mm,lo,hi", "",
                          "distance_mm,min_hrc", "\ufeffdistance_mm,min_hrc,max_hrc"])


@st.composite
def band_text(draw):
    rows = draw(st.lists(st.lists(CELL, min_size=0, max_size=5), max_size=8))
    text = draw(HEADER) + "\n" + "\n".join(",".join(r) for r in rows)
    if draw(st.booleans()):
        text = "# a comment\n" + text
    return text


@settings(max_examples=300, deadline=None, database=None, derandomize=True, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(text=band_text(), raw=st.booleans())
def test_fuzz_band_csv(tmp_path, text, raw):
    """300 generated band CSVs: rows within the allowed ranges, or one InputError line naming --band."""
    p = tmp_path / "band.csv"
    if raw:
        p.write_bytes(text.encode("utf-8", "surrogatepass")[:200] + b"\xff")
    else:
        p.write_text(text, encoding="utf-8", errors="surrogatepass")
    try:
        rows = read_band(p)
    except InputError as exc:
        assert "\n" not in str(exc) and "--band" in str(exc)
        return
    assert rows
    for r in rows:
        assert 0.0 < r.distance_mm <= 100.0
        assert all(b is None or 0.0 <= b <= 70.0 for b in (r.min_hrc, r.max_hrc))


# -- case-file keys ------------------------------------------------------------------------------
VALID = ('[steel]\ngrade = "4140"\n[part]\nshape = "bar"\ndiameter_mm = 25\n[quench]\nmedium = "water_20c_still"\n')
KEY = st.one_of(st.text(alphabet=string.ascii_letters + string.digits + "_-", min_size=1, max_size=40),
                st.integers(1, 6000).map(lambda n: "k" * n), st.text(min_size=1, max_size=20))


@settings(max_examples=300, deadline=None, database=None, derandomize=True, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(key=KEY, where=st.sampled_from(["top", "steel", "part", "quench", "mesh", "new", "dotted"]),
       bom=st.booleans())
def test_fuzz_case_keys(tmp_path, key, where, bom):
    """300 generated keys (long, unicode, any section): one short InputError line or a valid case."""
    quoted = '"' + key.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if where == "top":
        text = f"{quoted} = 1\n" + VALID
    elif where == "new":
        text = VALID + f"[{quoted}]\na = 1\n"
    elif where == "dotted":
        text = VALID.replace("[quench]\n", f"[quench]\n{quoted}.x = 1\n")
    else:
        text = VALID.replace(f"[{where}]\n", f"[{where}]\n{quoted} = 1\n") if f"[{where}]" in VALID \
            else VALID + f"[{where}]\n{quoted} = 1\n"
    p = tmp_path / "case.toml"
    p.write_bytes((b"\xef\xbb\xbf" if bom else b"") + text.encode("utf-8", "surrogatepass"))
    try:
        load_case(p)
    except InputError as exc:
        message = str(exc)
        assert "\n" not in message and "allowed is" in message
        assert len(message) < 600, len(message)
