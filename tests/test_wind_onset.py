"""Wind onset: a run in steady wind starts hanging at rest in it (``wind.onset = "steady"``).

Reference: the static force balance of a body hanging in a steady wind, the rope along the
resultant of weight and drag, angle ``atan(F / (m g))`` with ``F = rho Cd A v^2 / 2`` (the
drag equation, Hoerner, *Fluid-Dynamic Drag*, 1965) and ``rho = 1.225 kg/m^3`` (ISO 2533
standard atmosphere at sea level).
"""

import math

import numpy as np
import pytest

from swingsim import constants
from swingsim.metrics.definitions import rope_angle_rad
from swingsim.simulation import simulate

from conftest import make_scene

G = constants.STANDARD_GRAVITY
RHO_ISO_2533 = 1.225  # kg/m^3, ISO 2533 sea level
SPEED, CD, AREA, MASS = 12.0, 1.2, 6.0, 1000.0


def _drag_N(area=AREA, cd=CD, speed=SPEED):
    return 0.5 * RHO_ISO_2533 * cd * area * speed**2  # the drag equation (Hoerner 1965)


WIND = {"wind": {"speed_m_s": SPEED, "direction_deg": 30.0},
        "load": {"mass_kg": MASS, "wind_area_m2": AREA, "drag_coefficient": CD}}

HOOK = {"hook": {"mass_kg": 200.0, "size_m": [0.5, 0.4, 0.8], "drag_coefficient": 1.0},
        "rigging": {"kind": "single", "leg_length_m": 3.0}}

BRIDLE = {"load": {"size_m": [4.0, 2.0, 1.0]},
          "hook": {"mass_kg": 200.0},
          "rigging": {"kind": "bridle", "leg_length_m": 3.0,
                      "attach_m": [[-1.5, -0.8, 0.5], [1.5, -0.8, 0.5], [1.5, 0.8, 0.5], [-1.5, 0.8, 0.5]]}}


def _merge(*parts):
    out = {}
    for p in parts:
        for k, v in p.items():
            out.setdefault(k, {}).update(v)
    return out


CASES = {
    # total horizontal drag over total weight hanging on the hoist rope (static force balance)
    "point-mass": (WIND, _drag_N() / (MASS * G)),
    "hook-load": (_merge(WIND, HOOK), (_drag_N() + _drag_N(0.5 * 0.8, 1.0)) / ((MASS + 200.0) * G)),
    "rigid-load": (_merge(WIND, BRIDLE), _drag_N() / ((MASS + 200.0) * G)),
    "elastic-rope": (_merge(WIND, {"rope": {"stiffness_kN_per_m": 400.0}}), _drag_N() / (MASS * G)),
}


@pytest.mark.parametrize("name", CASES)
def test_steady_start_is_the_static_force_balance(name):
    update, tan_lean = CASES[name]
    scene = make_scene(update, duration_s=8.0)
    traj = simulate(scene)
    assert traj.valid, traj.message
    t = np.linspace(0.0, 8.0, 401)
    s = traj.sample(t)
    angle = rope_angle_rad(s["rope_dir"])
    # the static force balance: atan(F / (m g)), ISO 2533 air density
    assert angle[0] == pytest.approx(math.atan(tan_lean), rel=1e-9, abs=1e-12)
    # the rope leans the way the wind blows (direction 30 deg from +x)
    n0 = s["rope_dir"][0]
    assert math.degrees(math.atan2(n0[1], n0[0])) == pytest.approx(30.0, abs=1e-6)
    # no crane motion: it stays there
    assert np.max(np.abs(angle - angle[0])) < 1e-9
    # and so does the load (rigid and leg coordinates included)
    assert np.max(np.abs(s["load"] - s["load"][0])) < 1e-8


def test_rigid_load_cg_hangs_along_its_own_weight_and_drag():
    # the load and its bridle pinned at the hook: its CG lies on the line of the load's own
    # force (weight and drag) through the pin (moment balance about the pin)
    scene = make_scene(_merge(WIND, BRIDLE), duration_s=1.0)
    traj = simulate(scene)
    s = traj.sample(np.array([0.0]))
    cg_from_hook = s["load"][0] - s["hook"][0]
    lean = math.atan2(math.hypot(cg_from_hook[0], cg_from_hook[1]), -cg_from_hook[2])
    assert lean == pytest.approx(math.atan(_drag_N() / (MASS * G)), rel=1e-9)


def test_elastic_rope_starts_stretched_by_the_pull_in_the_wind():
    # Hooke's law: the stretch grows with the rope's pull, sqrt(W^2 + F^2) at rest in the wind
    k = 400.0e3
    scene = make_scene(_merge(WIND, {"rope": {"stiffness_kN_per_m": k / 1e3}}), duration_s=1.0)
    traj = simulate(scene)
    s = traj.sample(np.array([0.0]))
    pull = math.hypot(MASS * G, _drag_N())
    assert s["rope_tension_N"][0] == pytest.approx(pull, rel=1e-9)


def test_step_onset_starts_plumb_and_swings():
    update = _merge(WIND, {"wind": {"onset": "step"}})
    traj = simulate(make_scene(update, duration_s=8.0))
    s = traj.sample(np.linspace(0.0, 8.0, 801))
    angle = rope_angle_rad(s["rope_dir"])
    assert angle[0] == 0.0
    # a step force on an undamped oscillator overshoots to twice the static deflection
    # (Thomson & Dahleh, step response); drag on the moving load only damps it, so the peak
    # lies between the static lean and twice it
    lean = math.atan(_drag_N() / (MASS * G))
    assert 1.5 * lean < np.max(angle) <= 2.0 * lean * (1 + 1e-3)


def test_start_swing_is_measured_from_the_rest_in_the_wind():
    update = _merge(WIND, {"wind": {"direction_deg": 0.0}, "start": {"swing_deg": [2.0, 0.0]}})
    traj = simulate(make_scene(update, duration_s=1.0))
    n0 = traj.sample(np.array([0.0]))["rope_dir"][0]
    lean = math.degrees(math.atan(_drag_N() / (MASS * G)))
    assert math.degrees(math.atan2(n0[0], -n0[2])) == pytest.approx(lean + 2.0, abs=1e-9)
