"""Issue 13 item 1: the heat's measured end-quench curve fits the steel (workflows.heat_fit)."""

from dataclasses import replace

import pytest

from quenchwise.case import load_case
from quenchwise.errors import InputError
from quenchwise.steel.composition import Composition
from quenchwise.workflows import simulate
from quenchwise.workflows.jominy import jominy

PART = '[steel]\ngrade = "4140"\n{extra}[part]\nshape = "bar"\ndiameter_mm = 40\n[quench]\nseverity_h = 0.5\n'
#: The lean edge of the 4140 specification (SAE J404, memory; steel/grades.toml ranges): C 0.38,
#: Mn 0.75, Cr 0.80, Mo 0.15 wt%.
LEAN = {"c": 0.38, "mn": 0.75, "cr": 0.80, "mo": 0.15}
#: ASTM A255 reading positions [1/16 in] of a typical certificate (common practice, no source).
READ_AT = (1, 2, 3, 4, 5, 6, 7, 8, 10, 12, 14, 16, 20, 24, 28, 32)


def test_lean_heat_curve_makes_nominal_grade_predict_the_lean_part(tmp_path):
    """Done-when 'Heat' (issue 13): a lean 4140 heat's end-quench curve, given to a case naming only
    the nominal grade, makes the part's predicted hardness match the lean chemistry's within 2 HRC
    at the surface, half radius and centre. The unfitted nominal grade misses by more than 2 HRC,
    so the check can fail."""
    (tmp_path / "nominal.toml").write_text(PART.format(extra=""))
    nominal = load_case(tmp_path / "nominal.toml")
    lean = replace(nominal, composition=Composition(**{**nominal.composition.as_dict(), **LEAN}))
    [test] = jominy([lean], physics_di=False)
    rows = ["distance_sixteenths,hrc"] + [f"{s:g},{h:.1f}" for s, h in zip(test.sixteenths, test.hrc) if s in READ_AT]
    (tmp_path / "heat.csv").write_text("\n".join(rows) + "\n")
    (tmp_path / "fitted.toml").write_text(PART.format(extra='measured_jominy = "heat.csv"\n'))
    fitted = load_case(tmp_path / "fitted.toml")
    r_lean, r_nom, r_fit = simulate([lean, nominal, fitted])
    points = [r for _, r in r_lean.points()]
    lean_hrc = [r_lean.at(r_lean.hrc, r) for r in points]
    fit_hrc = [r_fit.at(r_fit.hrc, r) for r in points]
    nom_hrc = [r_nom.at(r_nom.hrc, r) for r in points]
    assert max(abs(a - b) for a, b in zip(fit_hrc, lean_hrc)) <= 2.0, (fit_hrc, lean_hrc)
    assert max(abs(a - b) for a, b in zip(nom_hrc, lean_hrc)) > 2.0
    fit = r_fit.summary()["measured_jominy"]
    assert fit["points_used"] == len(READ_AT) and fit["rms_hrc"] < 1.0
    assert -1.3 < fit["position"] < -0.7       # the lean edge of the range is t = -1


@pytest.mark.parametrize("body, says", [
    ("distance_mm,hrc\n1.5,55\n3,54\n5,50\n", "at least 4"),
    ("distance_mm,hrc\n1.5,55\n3,54\n3,50\n9,40\n", "increase"),
    ("distance_mm,hrc\n1.5,55\n3,50\n5,54\n9,40\n", "scatter"),
    ("distance_mm,hrc\n1.5,71\n3,54\n5,50\n9,40\n", "0 to 70"),
    ("distance_mm,hrc\n1.5,55\n3,54\n5,50\n9,-1\n", "0 to 70"),
])
def test_bad_curves_are_one_line_errors(tmp_path, body, says):
    """Issue 13 item 5: fewer than 4 readings, distances not increasing, hardness rising by more
    than the test's scatter, HRC outside 0-70."""
    (tmp_path / "heat.csv").write_text(body)
    (tmp_path / "c.toml").write_text(PART.format(extra='measured_jominy = "heat.csv"\n'))
    with pytest.raises(InputError) as exc:
        load_case(tmp_path / "c.toml")
    msg = str(exc.value)
    assert "\n" not in msg and "steel.measured_jominy" in msg and says in msg and "c.toml" in msg


def test_hrb_readings_and_small_rises_are_accepted(tmp_path):
    """HRB readings (below HRC 20) as in the band CSV; a 1 HRC rise is within the test's scatter."""
    (tmp_path / "heat.csv").write_text("# invented\ndistance_sixteenths,hrc,hrb\n1,45,\n2,46,\n4,30,\n8,,95\n16,,88\n")
    (tmp_path / "c.toml").write_text(PART.format(extra='measured_jominy = "heat.csv"\n'))
    curve = load_case(tmp_path / "c.toml").measured_jominy
    assert curve.n == 5 and curve.scale[-1] == "HRB"
    # HRB 95 is about HV 210 and HRB 88 about HV 175 (ASTM E140, memory): below HRC 20 on the scale.
    assert curve.hrc[-2] < 20 and curve.hrc[-1] < curve.hrc[-2]
