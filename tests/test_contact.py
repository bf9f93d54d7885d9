"""Tag lines and ground contact against sources outside the project.

Sources, named beside each check:

- statics: a body held still by a line against a moment M about an axis pulls the line with
  M / a, ``a`` the line's lever arm about that axis (any statics textbook, e.g. Meriam &
  Kraige, *Engineering Mechanics: Statics*, equilibrium of rigid bodies);
- Coulomb's law of friction: a block resting on a plane under its weight W stays put under a
  horizontal pull below mu W and slides under a larger pull P with m a = P - mu W (textbook);
  the sliding block's speed under the wind's drag is checked against scipy's solve_ivp on
  the one-dimensional equation of motion;
- kinematics: a load lowered at constant speed from a known height touches down when the
  hoist has paid out that height (the motion profile's own distance);
- lift-off: a plumb load leaves the ground when the rope's pull reaches its weight; the pull
  of an elastic rope is its stiffness times its stretch (Hooke's law), so the hoist has
  reeled in the weight's stretch plus the support's settlement by then.
"""

from __future__ import annotations

import csv
import json
import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from swingsim.dynamics.contact import ground_force, tag_line_force
from swingsim.dynamics.hook_load import HookLoadModel
from swingsim.errors import SceneError
from swingsim.metrics.single import summarize
from swingsim.simulation import simulate
from swingsim.simulation.integrate import prepare

from conftest import make_scene

G0 = 9.80665  # the scenes' gravity [m/s^2] (swingsim's default: standard gravity, CGPM 1901)
BLOCK = {"mass_kg": 1000.0, "size_m": [1.0, 1.0, 1.0]}  # a point load 1 m high: it stands on its bottom
SETTLE = 0.005  # the ground's default settlement under the load's weight [m]


def _resting(update=None, **top):
    """A 1 t block standing plumb on the ground at z = 0 below a support at 40 m (invented)."""
    upd = {"load": dict(BLOCK), "ground": {"z_m": 0.0}, "start": {"on_ground": True},
           "rope": {"length_m": 40.0 - 0.5 + SETTLE}}
    for k, v in (update or {}).items():
        upd[k] = dict(upd.get(k, {}), **v) if isinstance(v, dict) else v
    return make_scene(upd, **top)


# -- the force laws on their own ------------------------------------------------------------


def test_tag_line_is_slack_until_taut_then_a_spring():
    # Hooke's law on the stretch beyond the line's length; a line cannot push
    F, T = tag_line_force((0.0, 0.0, 0.0), (0.0, 0.0, 0.0), (3.0, 4.0, 0.0), 6.0, 1000.0, 0.0)
    assert T == 0.0 and F == (0.0, 0.0, 0.0)
    F, T = tag_line_force((0.0, 0.0, 0.0), (0.0, 0.0, 0.0), (3.0, 4.0, 0.0), 4.5, 1000.0, 0.0)
    assert T == pytest.approx(500.0)
    assert F[0] == pytest.approx(300.0) and F[1] == pytest.approx(400.0)  # toward the hand
    # moving toward the hand fast enough, the dashpot cannot make the line push
    F, T = tag_line_force((0.0, 0.0, 0.0), (3.0, 4.0, 0.0), (3.0, 4.0, 0.0), 4.9, 1000.0, 500.0)
    assert T == 0.0


def test_ground_force_is_coulomb_friction_when_sliding():
    # penalty contact N = k depth (still), friction mu N against a sliding speed far above the
    # slip speed (Coulomb), nothing above the ground
    F, N = ground_force((0.0, 0.0, -0.002), (0.0, 0.0, 0.0), 0.0, 1e6, 0.0, 0.4, 0.002)
    assert N == pytest.approx(2000.0) and F[0] == 0.0
    F, N = ground_force((0.0, 0.0, -0.002), (3.0, -4.0, 0.0), 0.0, 1e6, 0.0, 0.4, 0.002)
    assert math.hypot(F[0], F[1]) == pytest.approx(0.4 * 2000.0, rel=1e-6)
    assert F[0] / F[1] == pytest.approx(3.0 / -4.0)  # opposite to the sliding velocity
    assert F[0] < 0.0
    _, N = ground_force((0.0, 0.0, 0.001), (0.0, 0.0, -1.0), 0.0, 1e6, 1e4, 0.4, 0.002)
    assert N == 0.0


def test_fast_path_and_reference_path_agree_with_lines_and_ground():
    # the solver's float path and the matrix path of the outputs (two codings of one law),
    # with the support lowered so that the corners press into the ground and the line is taut
    from dataclasses import replace

    sc = _bridle({"tag_lines": [{"attach_m": [2.5, 0.0, 0.0], "anchor_m": [2.5, -9.0, 25.0],
                                 "length_m": 12.0}], "ground": {"z_m": 20.0},
                  "wind": {"speed_m_s": 8.0, "direction_deg": 90.0}})
    model = HookLoadModel(sc)
    y0 = model.rest_state()
    up = (0.0, 0.0, 40.0) + (0.0,) * 6 + (8.0, 0.0, 0.0)
    ev = model._eval(y0, up, full=True)
    corners = ev["G"] + (ev["R"] @ model.contact_points_b().T).T
    drop = float(np.min(corners[:, 2])) - 20.0 + 0.003  # 3 mm into the ground
    end = ev["G"] + ev["R"] @ np.array([2.5, 0.0, 0.0]) - (0.0, 0.0, drop)
    line = model.contacts.tag_lines[0]
    model.contacts.tag_lines = (replace(line, length_m=float(np.linalg.norm(np.asarray(line.anchor_m) - end))
                                        - 0.4),)
    rng = np.random.default_rng(7)
    n = model.n_coordinates
    kin = (0.3, -0.2, 40.0 - drop, 0.1, 0.0, 0.0, 0.2, 0.1, 0.0, 8.0, 0.0, 0.0)
    touching = taut = 0
    for _ in range(20):
        y = y0 + np.concatenate([rng.normal(0, 0.002, n), rng.normal(0, 0.05, n)])
        a, b = model._qdd(y, kin), model._eval(y, kin)
        np.testing.assert_allclose(a, b, rtol=1e-9, atol=1e-9)
        F = model._eval(y, kin, full=True)["point_forces"]
        taut += F[0].any()
        touching += any(f[2] > 0 for f in F[1:])
    assert taut and touching  # the forces were there to compare


# -- tag lines --------------------------------------------------------------------------------

PANEL = {"mass_kg": 2400.0, "size_m": [5.0, 1.2, 1.0]}
BRIDLE = {"kind": "bridle", "leg_length_m": 3.0, "attach_m": [[-1.8, 0.0, 0.5], [1.8, 0.0, 0.5]]}


def _bridle(update, **top):
    upd = {"load": dict(PANEL), "rigging": dict(BRIDLE), "rope": {"length_m": 8.0}}
    for k, v in update.items():
        upd[k] = dict(upd.get(k, {}), **v) if isinstance(v, dict) else v
    return make_scene(upd, **top)


def test_tag_line_holds_the_wind_moment_with_moment_over_arm():
    # statics: the wind's drag F at 1.5 m from the CG turns the panel with M = 1.5 F about the
    # vertical; a line at the panel's end (2.5 m), pulling across it, holds it with T = M / 2.5
    v, area, cd, rho_air, arm_w, arm_t = 10.0, 6.0, 1.2, 1.225, 1.5, 2.5
    wind = {"speed_m_s": v, "direction_deg": 90.0, "air_density_kg_m3": rho_air}
    load = dict(PANEL, wind_area_m2=area, drag_coefficient=cd, wind_center_m=[arm_w, 0.0, 0.0])
    free = _bridle({"load": load, "wind": wind})
    m0, motion = prepare(free)
    e0 = m0._eval(m0.initial_state(motion), (0.0, 0.0, 40.0) + (0.0,) * 6 + (8.0, 0.0, 0.0), full=True)
    end = e0["G"] + e0["R"] @ np.array([arm_t, 0.0, 0.0])  # the panel's end at rest in the wind
    anchor = [float(end[0]), float(end[1]) - 10.0, float(end[2])]
    sc = _bridle({"load": load, "wind": wind, "damping": {"ratio": 0.3},
                  "tag_lines": [{"attach_m": [arm_t, 0.0, 0.0], "anchor_m": anchor, "length_m": 10.0,
                                 "max_pull_N": 1000.0}]}, duration_s=60.0)
    traj = simulate(sc)
    assert traj.valid
    s = traj.sample(np.linspace(40.0, 60.0, 201))
    T = s["tag_line_tension_N"][:, 0]
    F = 0.5 * rho_air * cd * area * v * v
    assert np.ptp(T) < 0.03 * T.mean()  # held nearly still (what is left of the swing)
    # the line's moment about the vertical through the CG, as the panel now stands, on average
    d = np.asarray(anchor)[None, :] - s["tag_line_attach"][:, 0]
    r = s["tag_line_attach"][:, 0] - s["load"]
    moment_line = np.cross(r, T[:, None] * d / np.linalg.norm(d, axis=1)[:, None])[:, 2]
    assert -moment_line.mean() == pytest.approx(arm_w * F, rel=0.01)
    assert T.mean() == pytest.approx(arm_w * F / arm_t, rel=0.01)


def test_tag_line_columns_summary_and_pull_caution(tmp_path):
    load = dict(PANEL, wind_area_m2=6.0, wind_center_m=[1.5, 0.0, 0.0])
    wind = {"speed_m_s": 14.0, "direction_deg": 90.0}
    m0, motion = prepare(_bridle({"load": load, "wind": wind}))
    e0 = m0._eval(m0.initial_state(motion), (0.0, 0.0, 40.0) + (0.0,) * 6 + (8.0, 0.0, 0.0), full=True)
    end = e0["G"] + e0["R"] @ np.array([2.5, 0.0, 0.0])
    sc = _bridle({"load": load, "wind": wind,
                  "tag_lines": [{"attach_m": [2.5, 0.0, 0.0], "anchor_m": [float(end[0]), float(end[1]) - 10.0,
                                                                           float(end[2])], "length_m": 10.0,
                                 "label": "rigger north"}]}, duration_s=20.0)
    traj = simulate(sc)
    summ = summarize(traj)
    row = summ["tag_lines"][0]
    s = traj.sample(np.linspace(0.0, 20.0, 2001))
    assert row["peak_pull_N"] == pytest.approx(float(np.max(s["tag_line_tension_N"][:, 0])), rel=0.02)
    assert row["peak_pull_N"] > 250.0  # more than the default a person can hold
    assert any("Rigger north pulls up to" in c and "must let go" in c for c in summ.cautions)
    cols = traj.model.outputs(np.array([0.0, 1.0]), traj.state(np.array([0.0, 1.0])), traj.motion)["extra_columns"]
    assert "tag_line_1_N" in cols


def test_person_under_the_load_is_a_caution():
    # the hand right below the panel: nobody stands under a suspended load (common practice)
    sc = _bridle({"tag_lines": [{"attach_m": [0.0, 0.0, -0.5], "anchor_m": [0.3, 0.2, 20.0],
                                 "length_m": 30.0}]}, duration_s=2.0)
    summ = summarize(simulate(sc))
    assert summ["tag_lines"][0]["person_under_load_from_s"] == 0.0
    assert any("runs under the load, or the person holding it stands there" in c for c in summ.cautions)


def test_a_line_led_under_the_load_is_a_caution():
    # tied at the west end's bottom, held east of the panel and below it: the line runs under it
    sc = _bridle({"tag_lines": [{"attach_m": [-2.5, 0.0, -0.5], "anchor_m": [6.0, 0.0, 20.0],
                                 "length_m": 14.0}]}, duration_s=2.0)
    summ = summarize(simulate(sc))
    assert summ["tag_lines"][0]["person_under_load_from_s"] == 0.0
    # the same line led away from the load, to the west: no caution
    sc = _bridle({"tag_lines": [{"attach_m": [-2.5, 0.0, -0.5], "anchor_m": [-8.0, 0.0, 20.0],
                                 "length_m": 14.0}]}, duration_s=2.0)
    assert summarize(simulate(sc))["tag_lines"][0]["person_under_load_from_s"] is None


# -- the ground --------------------------------------------------------------------------------


def test_block_rests_under_its_weight():
    # a block on the ground, the rope slack: the ground carries its weight and nothing moves
    traj = simulate(_resting({"start": {"rope_slack_m": 0.5}}, duration_s=5.0))
    assert traj.valid  # a slack rope over a load on the ground is no fault
    s = traj.sample(np.linspace(1.0, 5.0, 41))
    assert s["ground_normal_N"] == pytest.approx(1000.0 * G0, rel=1e-6)
    assert np.ptp(s["load"], axis=0).max() < 1e-6


@pytest.mark.parametrize("pull_over_friction", [0.5, 1.6])
def test_block_under_a_horizontal_pull_sticks_below_mu_n_and_slides_above(pull_over_friction):
    # Coulomb: the wind's drag P on the block (onset at t = 0, rope slack) against mu W
    mu, m, cd, area, rho_air = 0.3, 1000.0, 2.0, 4.0, 1.225
    P = pull_over_friction * mu * m * G0
    w = math.sqrt(P / (0.5 * rho_air * cd * area))
    sc = _resting({"start": {"rope_slack_m": 2.0}, "ground": {"friction_coefficient": mu},
                   "load": {"wind_area_m2": area, "drag_coefficient": cd},
                   "wind": {"speed_m_s": w, "direction_deg": 0.0, "air_density_kg_m3": rho_air,
                            "onset": "step"}}, duration_s=3.0)
    traj = simulate(sc)
    assert traj.valid
    x = traj.sample(np.array([0.0, 3.0]))["load"][:, 0]
    if pull_over_friction < 1.0:
        # below the limit it sticks, apart from the regularised law's creep v_s p / sqrt(1 - p^2)
        vs = sc.ground.slip_speed_m_s
        creep = vs * pull_over_friction / math.sqrt(1.0 - pull_over_friction ** 2) * 3.0
        assert abs(x[1] - x[0]) < 1.2 * creep
        return
    k = 0.5 * rho_air * cd * area

    def slide(t, y):  # m v' = k (w - v)^2 - mu m g (the block slides along +x)
        return [y[1], (k * (w - y[1]) ** 2 - mu * m * G0) / m]

    ref = solve_ivp(slide, (0.0, 3.0), [0.0, 0.0], method="DOP853", rtol=1e-10, atol=1e-12)
    assert x[1] - x[0] == pytest.approx(ref.y[0, -1], rel=0.01)


def test_touch_down_when_the_hoist_has_paid_out_the_height():
    # hanging with its bottom 9.5 m above the ground, lowered at 0.5 m/s: the hoist pays out
    # 9.5 m at t = 1 + 0.25 + (9.5 - 0.0625) / 0.5 (trapezoid: 0.25 s at 2 m/s^2, then 0.5 m/s)
    sc = make_scene({"load": dict(BLOCK), "rope": {"length_m": 30.0, "bounce_damping_ratio": 0.3,
                                                   "stiffness_kN_per_m": 400.0},
                     "ground": {"z_m": 0.0},
                     "moves": [{"axis": "hoist", "profile": "trapezoid", "start_s": 1.0, "distance_m": -10.5,
                                "speed_m_s": 0.5, "accel_m_s2": 2.0}]}, duration_s=26.0)
    traj = simulate(sc)
    assert traj.valid  # the rope goes slack over the landed load: normal, the run holds
    summ = summarize(traj)
    expected = 1.0 + 0.25 + (9.5 - 0.0625) / 0.5
    assert summ["touchdown_time_s"] == pytest.approx(expected, abs=0.05)
    assert summ["touchdown_vertical_speed_m_s"] == pytest.approx(0.5, rel=0.05)
    assert summ["liftoff_time_s"] is None


def test_lift_off_when_the_rope_pull_reaches_the_weight(tmp_path):
    # the plumb block on the ground, the rope just taut: the hoist (0.05 m/s) must reel in the
    # rope's stretch under the weight, W / k, plus the support's settlement, before it lifts
    k = 500e3
    sc = _resting({"rope": {"stiffness_kN_per_m": k / 1e3},
                   "moves": [{"axis": "hoist", "profile": "trapezoid", "start_s": 1.0, "distance_m": 0.5,
                              "speed_m_s": 0.05, "accel_m_s2": 0.5}]}, duration_s=12.0)
    traj = simulate(sc)
    summ = summarize(traj)
    reel = 1000.0 * G0 / k + SETTLE
    expected = 1.0 + 0.1 + (reel - 0.0025) / 0.05
    assert summ["liftoff_time_s"] == pytest.approx(expected, abs=0.02)
    assert summ["drag_distance_m"] < 1e-4  # plumb: no drag
    # hanging free afterwards: the rope carries the weight (on average over its bounce)
    s = traj.sample(np.linspace(summ["liftoff_time_s"] + 1.0, summ["liftoff_time_s"] + 3.0, 401))
    assert s["rope_tension_N"].mean() == pytest.approx(1000.0 * G0, rel=0.01)
    assert s["ground_normal_N"].max() == 0.0


def test_out_of_plumb_lift_off_drags_or_swings_and_is_cautioned():
    sc = _resting({"rope": {"length_m": math.hypot(40.0 - 0.5 + SETTLE, 1.0)},
                   "start": {"load_offset_m": [1.0, 0.0]},
                   "ground": {"friction_coefficient": 0.3},
                   "moves": [{"axis": "hoist", "profile": "trapezoid", "start_s": 1.0, "distance_m": 1.0,
                              "speed_m_s": 0.2, "accel_m_s2": 0.5}]}, duration_s=12.0)
    summ = summarize(simulate(sc))
    assert summ["liftoff_time_s"] is not None
    # the rope leans 1.4 deg; once lifted, the load swings through the plumb: about as far again
    assert summ["peak_swing_after_liftoff_deg"] > 1.0
    assert any("out of plumb" in c for c in summ.cautions)


def test_outputs_and_summary_names(tmp_path):
    from swingsim.cli.main import main

    sc_text = """
title = "block lifted and landed (invented)"
duration_s = 30.0
[crane]
suspension_m = [0.0, 0.0, 40.0]
[rope]
length_m = 39.505
[load]
mass_kg = 1000.0
size_m = [1.0, 1.0, 1.0]
[ground]
z_m = 0.0
[start]
on_ground = true
[[tag_lines]]
attach_m = [0.5, 0.0, 0.0]
anchor_m = [6.0, 0.0, 1.0]
length_m = 6.0
[[moves]]
axis = "hoist"
profile = "trapezoid"
start_s = 1.0
distance_m = 2.0
speed_m_s = 0.4
accel_m_s2 = 0.4
[[moves]]
axis = "hoist"
profile = "trapezoid"
start_s = 14.0
distance_m = -2.5
speed_m_s = 0.3
accel_m_s2 = 0.3
"""
    path = tmp_path / "block.toml"
    path.write_text(sc_text)
    out = tmp_path / "out"
    assert main(["run", str(path), "-o", str(out), "-q"]) == 0
    d = json.loads((out / "summary.json").read_text())
    assert d["valid"] is True
    assert 1.0 < d["liftoff_time_s"] < 3.0
    assert d["touchdown_time_s"] > 14.0
    with open(out / "timeseries.csv") as f:
        rows = list(csv.DictReader(f))
    assert "tag_line_1_N" in rows[0] and "ground_reaction_kN" in rows[0]
    text = (out / "summary.txt").read_text()
    assert "Lift-off: t =" in text and "Touch-down: t =" in text


@pytest.mark.parametrize("update, words", [
    ({"start": {"on_ground": True}}, "start.on_ground"),
    ({"start": {"load_offset_m": [0.5, 0.0]}}, "start.load_offset_m"),
    ({"ground": {"z_m": 35.0}}, "below the ground"),
    ({"ground": {"friction_coefficient": -0.1}}, "ground.friction_coefficient"),
    ({"tag_lines": [{"attach_m": [0.0, 0.0, 0.0], "anchor_m": [30.0, 0.0, 30.0], "length_m": 2.0}]},
     "too short"),
    ({"tag_lines": [{"attach_m": [0.0, 0.0, 0.0], "anchor_m": [3.0, 0.0, 30.0]}]}, "length_m"),
])
def test_bad_ground_and_tag_line_keys_are_one_clear_line(update, words):
    with pytest.raises(SceneError) as e:
        make_scene(update)
    msg = str(e.value)
    assert words in msg and "\n" not in msg


def test_on_ground_needs_the_resting_rope_length():
    with pytest.raises(SceneError) as e:
        _resting({"rope": {"length_m": 35.0}})
    assert "set rope.length_m = 39.505" in str(e.value)


def test_contact_figure_draws_the_pulls_the_limit_and_the_ground():
    from swingsim.report.plots_contact import contact_figure

    sc = _resting({"tag_lines": [{"attach_m": [0.5, 0.0, 0.0], "anchor_m": [6.0, 0.0, 1.0], "length_m": 6.0,
                                  "max_pull_N": 180.0}],
                   "moves": [{"axis": "hoist", "profile": "trapezoid", "start_s": 1.0, "distance_m": 2.0,
                              "speed_m_s": 0.4, "accel_m_s2": 0.4}]}, duration_s=10.0)
    traj = simulate(sc)
    summ = summarize(traj)
    fig = contact_figure(traj, summ)
    lines_ax, ground_ax = [a for a in fig.axes if a.get_ylabel() in ("tag line pull [N]", "force [kN]")]
    limit = [ln for ln in lines_ax.get_lines() if "holds" in (ln.get_label() or "")]
    assert limit and limit[0].get_ydata()[0] == 180.0
    # the ground panel's curve is the summary's weight on the ground: the block's weight at t = 0
    curve = [ln for ln in ground_ax.get_lines() if ln.get_label() == "load's weight on the ground"][0]
    assert curve.get_ydata()[0] == pytest.approx(1000.0 * G0 / 1e3, rel=1e-6)
    assert contact_figure(simulate(make_scene()), summarize(simulate(make_scene()))) is None


def test_landing_while_swinging_is_cautioned_and_the_load_slides():
    # a block swinging 6 deg is lowered onto the ground: it lands moving sideways and Coulomb
    # friction (mu g deceleration) stops it within v^2 / (2 mu g) of where it lands
    mu = 0.4
    sc = make_scene({"load": dict(BLOCK), "rope": {"length_m": 20.0, "bounce_damping_ratio": 0.3,
                                                   "stiffness_kN_per_m": 400.0},
                     "ground": {"z_m": 0.0, "friction_coefficient": mu}, "start": {"swing_deg": [6.0, 0.0]},
                     "moves": [{"axis": "hoist", "profile": "trapezoid", "start_s": 0.5, "distance_m": -20.0,
                                "speed_m_s": 1.5, "accel_m_s2": 3.0}]}, duration_s=20.0)
    traj = simulate(sc)
    assert traj.valid
    summ = summarize(traj)
    assert summ["touchdown_time_s"] is not None
    assert summ["touchdown_swing_deg"] > sc.limits.settle_deg
    assert any("touches down" in c and "still swinging" in c for c in summ.cautions)
    v = summ["touchdown_horizontal_speed_m_s"]
    assert v > 0.05
    assert summ["ground_drift_m"] <= 1.1 * v * v / (2.0 * mu * G0) + 0.01
