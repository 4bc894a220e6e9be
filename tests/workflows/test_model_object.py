"""simulate() takes a kinetics model as a name or as an object, so fits pass trial models without
patching the kinetics.MODELS registry (issue 16: no back arrow from kinetics/calibrated.py)."""

import tomllib

import numpy as np

from quenchwise import kinetics
from quenchwise.case import parse_case
from quenchwise.kinetics import Li1998, Li1998A255
from quenchwise.workflows.simulate import simulate

# A 60 mm 4140 bar in moderate oil: part martensite, part bainite at the centre, so a change of the
# kinetics shows in the hardness (invented example).
TEXT = """
[steel]
grade = "4140"
[part]
shape = "bar"
diameter_mm = 60
[quench]
medium = "oil_conventional_60c_moderate"
end_c = 150
[mesh]
cells = 16
[transform]
model = "li1998"
"""


def test_a_model_object_solves_like_its_name_and_a_trial_model_is_used():
    case = parse_case(tomllib.loads(TEXT), TEXT, "bar.toml")
    registry = dict(kinetics.MODELS)
    by_name, = simulate([case])
    by_object, = simulate([case], model=Li1998())
    # 4x slower kinetics everywhere (multiplier exp(ln 4)): more martensite, harder core
    slow, = simulate([case], model=Li1998A255(ln_m_at_04c=float(np.log(4.0)), carbon_slope=0.0))
    np.testing.assert_array_equal(by_object.hv, by_name.hv)
    centre = int(np.argmax(by_name.depth_mm))
    assert slow.fractions["martensite"][centre] > by_name.fractions["martensite"][centre] + 0.05
    assert slow.summary()["models"]["kinetics"] == "li1998-a255"
    assert kinetics.MODELS == registry
