"""text_output: pure renderings of summaries (the numbers here are made up to exercise the text)."""

from quenchwise.text_output import SEVERITY_NOTE, compare_text, size_text, yes_no_na


def _row(name, h, meets):
    return {"medium": name, "equivalent_h": h, "surface_hrc": 50.0, "half_hrc": 45.0, "centre_hrc": 40.0,
            "centre_martensite_pct": 50.0, "effective_depth_mm": 5.0, "meets_requirement": meets,
            "crack_risk": "low", "limit_hrc": 45.0}


def test_meets_column_is_n_a_without_a_requirement():
    text = compare_text("t", [_row("a", 0.3, None), _row("b", 1.0, None)], None, [], None, False)
    table = [ln for ln in text.splitlines() if ln.startswith(("a ", "b "))]
    assert len(table) == 2 and all(ln.split()[-2] == "n/a" for ln in table)
    assert yes_no_na(False, True) == "no"


def test_sizing_text_lists_failing_real_curves_with_their_h_and_explains_constant_severity():
    """The case the issue reported: the mildest constant H is 0.2, yet a still oil of equivalent H 0.28
    fails; the text must show that curve with its H and say why a constant severity differs."""
    d = {"requirement": "at least 45 HRC down to 5 mm depth",
         "mildest_severity": {"grossmann_h_per_inch": 0.2, "htc_w_m2k": 394.0, "next_milder_h_per_inch": 0.189,
                              "reachable": True},
         "quenchants_meeting": ["water_70c_still"],
         "quenchants": [_row("water_70c_still", 0.30, True), _row("oil_conventional_60c_still", 0.28, False)],
         "largest_size": {"dimension": "diameter_mm", "largest_passing_mm": 48.9, "next_larger_failing_mm": 50.5,
                          "case_size_mm": 50.0}}
    text = size_text("pin", d, "oil_conventional_60c_still", [])
    assert "real curves that do not: oil_conventional_60c_still (H 0.28)" in text
    assert "water_70c_still (H 0.30)" in text and SEVERITY_NOTE in text
    assert "largest diameter in" in text and "diameter_mm" not in text
