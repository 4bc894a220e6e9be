"""The film-coefficient step limit (thermal/settings.py SolverSettings.max_film_step): a vapour blanket
that breaks sharply must not be stepped over.

Reference: the same 1-D solve with the steps and cells refined twice (refined(2): cells x 4, every
step limit / 4), a numerical convergence check, no outside data.
"""

from dataclasses import replace

import numpy as np
import pytest

from quenchwise.case import load_case
from quenchwise.thermal import quenchant_model as qm
from quenchwise.thermal.quenchants import Quenchant
from quenchwise.thermal.settings import SolverSettings
from quenchwise.workflows.simulate import simulate

# An oil whose blanket (375 W/m2K) breaks within 25 K at 730 C onto a 3440 W/m2K peak: a
# conventional oil's stages with a thin blanket that breaks early (invented for this check).
_T = np.arange(60.0, 1100.0, 2.0)
SHARP_OIL = Quenchant("sharply breaking oil (invented)", 60.0, _T,
                      qm.three_stage_htc(_T, 375.0, 730.0, 3442.0, 530.0, 110.0, 360.0), kind="oil")


def _surface_hrc(settings_list):
    base = load_case({"title": "4140 bar", "steel": {"grade": "4140"}, "part": {"shape": "bar", "diameter_mm": 40},
                      "quench": {"medium": "oil_conventional_60c_moderate"}})
    base = replace(base, outer=SHARP_OIL)
    cases = [replace(base, settings=s) for s in settings_list]
    return [(float(r.at(r.hrc, dict(r.points())["surface"])), r.history.steps) for r in simulate(cases)]


def test_a_sharp_blanket_break_is_resolved_at_the_default_steps():
    d = SolverSettings()
    (limited, n_limited), (off, n_off), (fine, _) = _surface_hrc([d, replace(d, max_film_step=0.0), d.refined(2)])
    # With the limit the surface is within 0.5 HRC of the refined solve; without it, the break is
    # taken late and the surface reads more than 1 HRC soft. The limit costs under a third more steps.
    assert limited == pytest.approx(fine, abs=0.5), (limited, fine)
    assert fine - off > 1.0, (off, fine)
    assert n_limited <= 1.33 * n_off, (n_limited, n_off)
