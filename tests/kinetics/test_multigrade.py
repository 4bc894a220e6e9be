"""The multi-grade kinetics correction (kinetics/multigrade.py): its data and its limits."""

import numpy as np

from quenchwise.kinetics import MODELS, Li1998, Li1998Multigrade
from quenchwise.kinetics.multigrade import PRODUCTS, TERMS, load_coefficients


def _chem(**kw):
    base = dict(c=0.40, mn=0.85, si=0.25, ni=0.0, cr=0.95, mo=0.20, cu=0.0, v=0.0, w=0.0, b=0.0)
    base.update(kw)
    return {k: np.array([v]) for k, v in base.items()}


def test_coefficient_file_has_every_product_and_term_and_a_fit_range():
    data = load_coefficients()
    for p in PRODUCTS:
        assert len(data["theta"][p]) == len(TERMS)
    assert data["fit_range"]["c"][0] < data["fit_range"]["c"][1]


def test_published_model_is_unchanged_and_both_are_registered():
    # The published coefficients stay selectable (issue 12 item 3); the correction is a separate model.
    assert MODELS["li1998"] is Li1998 and MODELS["li1998-multigrade"] is Li1998Multigrade
    chem = _chem()
    assert float(Li1998().factors(chem)["ferrite"][0]) == float(np.exp(1.00 + 6.31 * 0.40 + 1.78 * 0.85 + 0.31 * 0.25
                                                                       + 2.70 * 0.95 + 4.06 * 0.20))


def test_correction_fades_to_the_published_laws_far_outside_the_fitted_range():
    # A 1.0 %C bearing chemistry is 0.4 %C beyond the fitted grades: published laws exactly.
    chem = _chem(c=1.0, mn=0.35, cr=1.45, mo=0.0)
    a, b = Li1998().factors(chem), Li1998Multigrade().factors(chem)
    for p in PRODUCTS:
        assert float(a[p][0]) == float(b[p][0])


def test_trial_coefficients_do_not_touch_the_registry():
    before = dict(MODELS)
    trial = Li1998Multigrade(theta=tuple((p, (0.5,) + (0.0,) * 5) for p in PRODUCTS), fit_range=(("c", (0.2, 0.6)),))
    ratio = trial.factors(_chem())["ferrite"][0] / Li1998().factors(_chem())["ferrite"][0]
    assert abs(float(ratio) - np.exp(0.5)) < 1e-12
    assert MODELS == before


def test_bainite_temperature_term_also_fades_outside_the_fitted_range():
    # The temperature term of the bainite correction (fitted with the handbook bars) is part of the
    # correction: a 1.0 %C bearing chemistry gets the published bainite time constants at every
    # temperature, and inside the range the term is exactly exp(slope (T - 450) / 100).
    from quenchwise.kinetics.multigrade import bainite_temperature_multiplier
    temps = np.array([350.0, 450.0, 550.0])
    under = {"ferrite": 700.0 - temps, "cementite": -np.ones(3), "pearlite": 720.0 - temps, "bainite": 600.0 - temps}
    far = _chem(c=1.0, mn=0.35, cr=1.45, mo=0.0)
    trial = Li1998Multigrade(theta=tuple((p, (0.0,) * 6) for p in PRODUCTS), fit_range=(("c", (0.2, 0.6)),),
                             bainite_slope=-0.4)
    published = Li1998().time_constants(Li1998().factors(far), 7.0, temps, under)["bainite"]
    assert np.allclose(trial.time_constants(trial.factors(far), 7.0, temps, under)["bainite"], published, rtol=1e-12)
    near = _chem()
    ratio = (trial.time_constants(trial.factors(near), 7.0, temps, under)["bainite"]
             / Li1998().time_constants(Li1998().factors(near), 7.0, temps, under)["bainite"])
    assert np.allclose(ratio, bainite_temperature_multiplier(temps, -0.4), rtol=1e-12)
    assert np.allclose(ratio, np.exp(-0.4 * np.array([-1.0, 0.0, 1.0])), rtol=1e-12)
