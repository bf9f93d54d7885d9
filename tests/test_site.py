"""Site bearings: compass bearings and the meteorological wind convention against the scene's axes.

Sources: the meteorological convention (WMO: wind direction is the bearing the wind
blows *from*, clockwise from true north; a "north wind" blows toward the south) and
the 16-point compass rose (22.5 deg apart), both common practice.
"""

import math

import numpy as np
import pytest

from conftest import make_scene
from swingsim.errors import SceneError
from swingsim.scene.site import (compass_point, wind_from_bearing_deg, wind_toward_deg, wind_words)


def _toward(bearing, north):
    d = math.radians(wind_toward_deg(bearing, north))
    return np.array([math.cos(d), math.sin(d)])


@pytest.mark.parametrize("bearing, north, blows_toward", [
    # meteorological convention (WMO): a wind from the north blows toward the south
    (0.0, 90.0, (0.0, -1.0)),     # +y is north: toward -y
    (90.0, 90.0, (-1.0, 0.0)),    # from the east: toward the west, -x
    (180.0, 90.0, (0.0, 1.0)),    # from the south: toward +y
    (270.0, 90.0, (1.0, 0.0)),    # a west wind blows toward the east, +x
    (0.0, 0.0, (-1.0, 0.0)),      # +x is north: a north wind blows toward -x
    (90.0, 0.0, (0.0, 1.0)),      # +x north, so east is -y (clockwise from north): an east wind blows toward +y
    (45.0, 90.0, (-math.sqrt(0.5), -math.sqrt(0.5))),  # from the north-east: toward the south-west
])
def test_wind_bearing_to_scene_direction(bearing, north, blows_toward):
    np.testing.assert_allclose(_toward(bearing, north), blows_toward, atol=1e-12)
    # and back (the inverse)
    assert wind_from_bearing_deg(wind_toward_deg(bearing, north), north) == pytest.approx(bearing, abs=1e-9)


@pytest.mark.parametrize("bearing, point", [
    # the 16-point compass rose, 22.5 deg apart (common practice)
    (0.0, "N"), (11.2, "N"), (11.3, "NNE"), (22.5, "NNE"), (45.0, "NE"), (90.0, "E"), (135.0, "SE"),
    (180.0, "S"), (202.5, "SSW"), (225.0, "SW"), (270.0, "W"), (315.0, "NW"), (348.7, "NNW"), (348.8, "N"), (360.0, "N"),
])
def test_compass_points(bearing, point):
    assert compass_point(bearing) == point


def test_scene_reads_bearing_and_shows_it():
    s = make_scene({"wind": {"speed_m_s": 8.0, "from_bearing_deg": 225.0}})
    # from the south-west with +y north: toward the north-east, +x +y at 45 deg (WMO convention)
    assert s.wind.direction_deg == pytest.approx(45.0)
    assert wind_words(s) == "from 225 deg (SW)"
    # the mathematical direction given instead: shown as the bearing it comes from
    s = make_scene({"wind": {"speed_m_s": 8.0, "direction_deg": 0.0}})  # toward +x: a west wind
    assert wind_words(s) == "from 270 deg (W)"
    s = make_scene({"wind": {"speed_m_s": 8.0, "from_bearing_deg": 0.0}, "site": {"north_deg": 0.0}})
    assert s.wind.direction_deg == pytest.approx(180.0)


def test_bearing_and_direction_both_is_an_error():
    with pytest.raises(SceneError, match="give either wind.from_bearing_deg"):
        make_scene({"wind": {"speed_m_s": 8.0, "from_bearing_deg": 0.0, "direction_deg": 0.0}})


@pytest.mark.parametrize("model_keys", [{}, {"hook": {"mass_kg": 200.0}, "rigging": {"leg_length_m": 2.0}}])
def test_north_wind_pushes_the_load_south(model_keys):
    # a steady north wind on a hanging load leans it toward the south (-y with the default north):
    # the drag force points downwind (meteorological convention, WMO)
    from swingsim import simulate

    upd = {"wind": {"speed_m_s": 12.0, "from_bearing_deg": 0.0},
           "load": {"mass_kg": 1000.0, "wind_area_m2": 6.0}, "damping": {"ratio": 0.2}}
    upd.update(model_keys)
    traj = simulate(make_scene(upd, duration_s=2.0))
    d = traj.sample([2.0])
    offset = d["load"][0] - d["suspension"][0]
    assert offset[1] < -1e-3 and abs(offset[0]) < 1e-9
