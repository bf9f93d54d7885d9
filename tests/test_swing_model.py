"""Every registered model follows the written SwingModel protocol.

Source of the check: ``typing.runtime_checkable`` (PEP 544) -- ``isinstance`` against
a runtime-checkable protocol is true only when every member the protocol names is
present on the object; the required output keys are those the protocol's docstring
lists (``swingsim.dynamics.base.REQUIRED_OUTPUTS``).
"""

from __future__ import annotations

import numpy as np
import pytest

from swingsim.dynamics.base import REQUIRED_OUTPUTS, ModelDefaults, SwingModel
from swingsim.dynamics.hook_load import HookLoadModel
from swingsim.dynamics.pendulum import PointMassModel
from swingsim.dynamics.registry import MODELS
from swingsim.scene import scene_from_dict
from swingsim.simulation import prepare

BASE = {"title": "protocol check", "duration_s": 8.0, "crane": {"suspension_m": [10.0, 0.0, 25.0]},
        "rope": {"length_m": 8.0}, "load": {"mass_kg": 1000.0},
        "moves": [{"axis": "x", "profile": "trapezoid", "start_s": 0.5, "distance_m": 2.0,
                   "speed_m_s": 1.0, "accel_m_s2": 0.5}]}

SCENES = {
    "point-mass": {},
    "hook-load": {"hook": {"mass_kg": 200.0}, "rigging": {"leg_length_m": 2.0}},
    "elastic-rope": {"rope": {"length_m": 8.0, "stiffness_kN_per_m": 800.0}},
}


def _scene(name):
    return scene_from_dict({**BASE, **SCENES[name]})


@pytest.mark.parametrize("name", list(SCENES))
def test_registered_models_satisfy_the_protocol(name):
    model, motion = prepare(_scene(name))
    assert model.name == name
    assert isinstance(model, SwingModel)
    assert isinstance(model, ModelDefaults)
    t = np.linspace(0.0, 1.0, 5)
    y0 = model.initial_state(motion)
    assert y0.shape == (len(model.state_names),)
    out = model.outputs(t, np.tile(y0, (len(t), 1)), motion)
    missing = [k for k in REQUIRED_OUTPUTS if k not in out]
    assert not missing, missing
    rest = np.asarray(model.rest_direction(8.0))
    assert np.linalg.norm(rest) == pytest.approx(1.0, abs=1e-12)


def test_every_registered_class_subclasses_the_defaults():
    assert {PointMassModel, HookLoadModel} == set(MODELS.values())
    for cls in MODELS.values():
        assert issubclass(cls, ModelDefaults)


def test_an_object_missing_a_member_is_not_a_swing_model():
    class Partial(ModelDefaults):
        name = "partial"
        state_names = ("u",)

        def initial_state(self, motion):
            return np.zeros(1)

    assert not isinstance(Partial(), SwingModel)


def test_defaults_are_neutral():
    model = PointMassModel(_scene("point-mass"))
    assert model.extra_breakpoints == ()
    assert model.event_message("slack", 1.0) is None
    assert model.bounce_period_s() is None
    np.testing.assert_array_equal(ModelDefaults().rest_direction(5.0), [0.0, 0.0, -1.0])
