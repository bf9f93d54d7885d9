"""Crane geometry per kind: slewing about the slew centre, luffing on the boom's arc, reach limits.

Sources named beside each check:
- the boom tip's height on the circle z = h + sqrt(B^2 - (r - a)^2) about the foot pin
  (plane geometry), its time derivatives by the chain rule, differentiated
  symbolically with sympy;
- the polar-coordinate acceleration a = (rho'' - rho phi'^2) e_rho + ... (Meriam & Kraige,
  *Engineering Mechanics: Dynamics*, 2/6): steady slewing gives R Omega^2 toward the axis;
- a load hanging at rest is plumb below the tip at the rope's length (statics).
"""

import math

import numpy as np
import pytest
import sympy

from swingsim.batch.engine import supported
from swingsim.errors import SceneError
from swingsim.motion import profiles
from swingsim.motion.kinematics import Boom, Motion
from swingsim.scene import scene_from_dict
from swingsim.simulation import simulate

BOOM = Boom(length_m=30.0, foot_offset_m=1.5, foot_height_m=2.5)


def _tip(radius_m, boom=BOOM):
    """The boom tip's height by plane geometry [m]."""
    return boom.foot_height_m + math.sqrt(boom.length_m**2 - (radius_m - boom.foot_offset_m)**2)


def _luff_motion(level=False, distance=8.0, centre=(3.0, -2.0)):
    boom = BOOM._replace(level_luffing=level)
    r0 = 12.0
    origin = (centre[0] + r0 * math.cos(0.4), centre[1] + r0 * math.sin(0.4), _tip(r0, boom))
    return Motion(origin, 14.0, (
        ("radius", profiles.s_curve(1.0, distance, 0.5, 0.2, 0.3)),
        ("slew", profiles.trapezoid(4.0, math.radians(30), math.radians(3), math.radians(1))),
        ("hoist", profiles.trapezoid(2.0, 2.0, 0.3, 0.2)),
    ), slew_center_m=centre, boom=boom)


def _symbolic_tip():
    """z(r), z'(r), z''(r) of the circle about the foot pin, differentiated by sympy."""
    r, B, a, h = sympy.symbols("r B a h", real=True)
    z = h + sympy.sqrt(B**2 - (r - a)**2)
    args = (r, B, a, h)
    return (sympy.lambdify(args, z), sympy.lambdify(args, sympy.diff(z, r)),
            sympy.lambdify(args, sympy.diff(z, r, 2)))


def test_luffing_tip_on_the_arc_with_exact_rates():
    # geometry: z(t) = z(r(t)); dz = z'(r) r'; ddz = z''(r) r'^2 + z'(r) r'' (chain rule), via sympy
    z, dz_dr, d2z_dr2 = _symbolic_tip()
    m = _luff_motion()
    t = np.linspace(0.0, 40.0, 301)
    e = m.evaluate(t)
    r, dr, ddr = m.axis("radius", t)
    rho = m.initial_radius_m + r
    par = (BOOM.length_m, BOOM.foot_offset_m, BOOM.foot_height_m)
    assert np.allclose(e["p"][:, 2], z(rho, *par), atol=1e-12)
    assert np.allclose(e["dp"][:, 2], dz_dr(rho, *par) * dr, atol=1e-12)
    assert np.allclose(e["ddp"][:, 2], d2z_dr2(rho, *par) * dr**2 + dz_dr(rho, *par) * ddr, atol=1e-12)
    # the horizontal radius about the slew centre is the one the arc is evaluated at
    horizontal = np.hypot(e["p"][:, 0] - 3.0, e["p"][:, 1] + 2.0)
    assert np.allclose(horizontal, rho, atol=1e-12)
    # luffing out lowers the tip (the arc falls away from the top)
    assert e["p"][-1, 2] < e["p"][0, 2] - 1.0


def test_luffing_rates_match_finite_differences():
    # the derivatives are those of the positions (central differences, O(h^2))
    m = _luff_motion(level=True)
    kn = np.array(m.breakpoints)
    t = kn[:-1] + 0.41 * np.diff(kn)
    h = 1e-5
    e, ep, em = m.evaluate(t), m.evaluate(t + h), m.evaluate(t - h)
    assert np.allclose((ep["p"] - em["p"]) / (2 * h), e["dp"], atol=1e-7)
    assert np.allclose((ep["dp"] - em["dp"]) / (2 * h), e["ddp"], atol=1e-6)
    assert np.allclose((ep["L"] - em["L"]) / (2 * h), e["dL"], atol=1e-7)
    assert np.allclose((ep["dL"] - em["dL"]) / (2 * h), e["ddL"], atol=1e-6)


@pytest.mark.parametrize("level", [False, True])
def test_local_fast_path_equals_array_path_while_luffing(level):
    m = _luff_motion(level=level)
    kn = m.breakpoints
    for t0, t1 in zip(kn[:-1], kn[1:]):
        f = m.local(t0, t1)
        for t in np.linspace(t0, t1, 6)[1:-1]:
            e = m.evaluate(np.array([t]))
            want = (*e["p"][0], *e["dp"][0], *e["ddp"][0], e["L"][0], e["dL"][0], e["ddL"][0],
                    e["slew_rate"][0])
            assert np.allclose(f(t), want, atol=1e-11)


def test_level_luffing_keeps_the_hook_height():
    # level luffing: L(t) = L0 - H(t) + z_tip(t) - z_tip(0), so z_tip - L moves with the hoist only
    m = _luff_motion(level=True)
    t = np.linspace(0.0, 40.0, 201)
    e = m.evaluate(t)
    hoist = m.axis("hoist", t)[0]
    hook = e["p"][:, 2] - e["L"]
    assert np.allclose(hook, hook[0] + hoist, atol=1e-12)
    assert np.ptp(e["p"][:, 2]) > 1.0  # while the tip itself moves


def _scene(**crane):
    r0, boom = 14.0, dict(boom_length_m=30.0, boom_foot_m=[1.5, 2.5])
    base = {"kind": "mobile", "suspension_m": [r0, 0.0, _tip(r0)], **boom}
    base.update(crane)
    return {"title": "t", "duration_s": 60.0, "crane": base, "rope": {"length_m": 12.0},
            "load": {"mass_kg": 1000.0}, "damping": {"ratio": 0.2},
            "moves": [{"axis": "radius", "profile": "s-curve", "start_s": 1.0, "distance_m": 6.0,
                       "speed_m_s": 0.4, "accel_m_s2": 0.2, "jerk_m_s3": 0.3, "label": "luff out"}]}


@pytest.mark.parametrize("level", [False, True])
def test_load_follows_the_tip_at_constant_rope_length(level):
    # statics: at rest the load hangs plumb a rope length below the tip; luffing out from 14 m
    # to 20 m on a 30 m boom lowers the tip by z(14) - z(20); the load falls with it, or with
    # level luffing keeps its height
    scene = scene_from_dict(_scene(level_luffing=level))
    assert not supported(scene)  # the batch engine leaves luffing to the single-run solver
    traj = simulate(scene)
    out = traj.sample(np.array([0.0, 60.0]))
    drop = _tip(20.0) - _tip(14.0)
    assert drop < -0.5
    assert out["suspension"][1, 2] - out["suspension"][0, 2] == pytest.approx(drop, abs=1e-9)
    load_rise = out["load"][1, 2] - out["load"][0, 2]
    assert load_rise == pytest.approx(0.0 if level else drop, abs=0.01)


def _error(data):
    with pytest.raises(SceneError) as ei:
        scene_from_dict(data)
    return ei.value.one_line()


def test_off_the_arc_gives_the_height_that_would_be():
    # geometry: the tip at radius 14 m of a 30 m boom with its foot at [1.5, 2.5] is at z(14)
    msg = _error(_scene(suspension_m=[14.0, 0.0, _tip(14.0) + 0.05]))
    assert "crane.suspension_m" in msg and f"z = {_tip(14.0):.3f} m" in msg
    scene_from_dict(_scene(suspension_m=[14.0, 0.0, _tip(14.0) + 0.009]))  # within 1 cm: accepted


def test_beyond_the_booms_reach():
    msg = _error(_scene(suspension_m=[32.0, 0.0, 2.5]))
    assert "beyond the boom's reach" in msg
    data = _scene()
    data["moves"][0]["distance_m"] = 20.0  # 14 + 20 - 1.5 > 30
    data["moves"][0]["speed_m_s"] = 1.0
    msg = _error(data)
    assert "moves[0]" in msg and "'luff out'" in msg and "beyond the boom's reach" in msg


def test_radius_limits_and_the_slew_axis():
    # a trolley move of -40 m from a 30 m radius would pass through the mast to -10 m
    data = {"title": "t", "duration_s": 120.0,
            "crane": {"kind": "tower", "suspension_m": [30.0, 0.0, 40.0]},
            "rope": {"length_m": 12.0}, "load": {"mass_kg": 1000.0},
            "moves": [{"axis": "radius", "profile": "trapezoid", "distance_m": -40.0,
                       "speed_m_s": 1.0, "accel_m_s2": 0.5, "label": "trolley in"}]}
    msg = _error(data)
    assert "moves[0]" in msg and "through the slew axis" in msg and "radius to -10.00 m" in msg
    data["moves"][0]["distance_m"] = -25.0
    data["crane"]["min_radius_m"] = 6.0
    msg = _error(data)
    assert "5.00 m" in msg and "min_radius_m" in msg
    data["moves"][0]["distance_m"] = 15.0
    data["crane"]["max_radius_m"] = 42.0
    msg = _error(data)
    assert "45.00 m" in msg and "max_radius_m" in msg
    data["moves"][0]["distance_m"] = 12.0
    scene_from_dict(data)  # to 42 m exactly: allowed


def test_rail_limits():
    data = {"title": "t", "duration_s": 90.0,
            "crane": {"kind": "gantry", "suspension_m": [5.0, 2.0, 12.0], "rail_span_m": 20.0,
                      "travel_limits_m": [0.0, 40.0], "cross_limits_m": [-6.0, 8.0]},
            "rope": {"length_m": 8.0}, "load": {"mass_kg": 1000.0},
            "moves": [{"axis": "x", "profile": "trapezoid", "distance_m": 30.0, "speed_m_s": 1.0,
                       "accel_m_s2": 0.5, "label": "long travel"},
                      {"axis": "y", "profile": "trapezoid", "distance_m": 7.0, "speed_m_s": 0.5,
                       "accel_m_s2": 0.3, "start_s": 40.0, "label": "cross travel"}]}
    msg = _error(data)
    assert "'cross travel'" in msg and "y = 9.00 m" in msg and "cross_limits_m" in msg
    data["moves"][1]["distance_m"] = 6.0
    data["moves"][0]["distance_m"] = 36.0
    msg = _error(data)
    assert "'long travel'" in msg and "x = 41.00 m" in msg
    data["moves"][0]["distance_m"] = 35.0
    scene_from_dict(data)


def test_keys_belong_to_their_kind():
    assert "only for boom cranes" in _error(_scene(kind="tower"))
    d = _scene(kind="luffing")
    del d["crane"]["boom_length_m"]
    assert "kind 'luffing' needs" in _error(d)
    d = _scene()
    d["crane"]["rail_span_m"] = 10.0
    assert "only for cranes on rails" in _error(d)


def test_steady_slew_about_a_centre_away_from_the_origin():
    # textbook: constant slew rate Omega at radius R: |a| = R Omega^2, pointing at the slew axis
    R, Om, centre = 25.0, 0.1, (-7.0, 11.0)
    m = Motion((centre[0], centre[1] + R, 30.0), 10.0,
               (("slew", profiles.trapezoid(0.0, 10.0, Om, 0.05)),), slew_center_m=centre)
    e = m.evaluate(np.array([50.0, 60.0]))
    for p, a, v in zip(e["p"], e["ddp"], e["dp"]):
        radial = np.array([p[0] - centre[0], p[1] - centre[1], 0.0])
        assert np.linalg.norm(radial) == pytest.approx(R, rel=1e-12)
        assert np.linalg.norm(a) == pytest.approx(R * Om**2, rel=1e-12)
        assert np.allclose(a / np.linalg.norm(a), -radial / R, atol=1e-12)
        assert np.linalg.norm(v) == pytest.approx(R * Om, rel=1e-12)
    pose = m.pose(np.array([50.0]))
    assert pose.travel_x_m[0] == centre[0] and pose.travel_y_m[0] == centre[1]
    assert pose.radius_m[0] == pytest.approx(R, rel=1e-12)


def test_batch_engine_slews_about_the_same_centre():
    # the vectorised kinematics against the single run (scipy DOP853 via swingsim.simulate):
    # slewing and trolleying about a centre away from the origin give the same swing
    from swingsim.batch import engine as batch
    from swingsim.metrics.single import summarize

    data = {"title": "t", "duration_s": 40.0,
            "crane": {"kind": "tower", "suspension_m": [20.0, 0.0, 40.0], "slew_center_m": [6.0, -9.0]},
            "rope": {"length_m": 15.0}, "load": {"mass_kg": 1000.0},
            "moves": [{"axis": "slew", "profile": "trapezoid", "angle_deg": 60.0, "speed_deg_s": 8.0,
                       "accel_deg_s2": 4.0},
                      {"axis": "radius", "profile": "trapezoid", "start_s": 2.0, "distance_m": -6.0,
                       "speed_m_s": 1.0, "accel_m_s2": 0.8}]}
    scene = scene_from_dict(data)
    got = batch.run_chunk([scene])[0]
    want = summarize(simulate(scene, rtol=1e-12, atol=1e-14)).data
    assert got["engine"] == "batch"
    for key in ("peak_rope_angle_deg", "residual_swing_deg"):
        assert got[key] == pytest.approx(want[key], abs=5e-3), key
    # and about the origin the swing differs (the centre matters)
    data["crane"]["slew_center_m"] = [0.0, 0.0]
    other = summarize(simulate(scene_from_dict(data))).data
    assert abs(other["peak_rope_angle_deg"] - want["peak_rope_angle_deg"]) > 0.05


def test_drawn_boom_runs_from_the_foot_pin_to_the_tip():
    # the drawing and the simulation share the numbers: the boom body's ends are the foot pin
    # (turned about the slew centre with the slew angle, geometry) and the tip sheave
    from pathlib import Path

    from swingsim.scene import load_scene
    from swingsim.scene3d import build

    scene = load_scene(Path(__file__).parent / "data" / "render_luffing.toml")
    traj = simulate(scene)
    view = build(traj)
    t = np.array([0.0, 10.0, 25.0, 39.0])
    boom = view.poses(t)["boom"]
    pose = traj.motion.pose(t)
    tip = traj.motion.evaluate(t)["p"]
    offset, height = scene.crane.boom_foot_m
    foot = np.stack([pose.travel_x_m + offset * np.cos(pose.jib_angle_rad),
                     pose.travel_y_m + offset * np.sin(pose.jib_angle_rad), np.full(len(t), height)], -1)
    assert np.allclose(pose.travel_x_m, 4.0) and np.allclose(pose.travel_y_m, 4.0)  # the mast
    assert np.allclose(np.einsum("nij,j->ni", boom, [0.0, 0.0, 0.0, 1.0])[:, :3], foot, atol=1e-9)
    assert np.allclose(np.einsum("nij,j->ni", boom, [1.0, 0.0, 0.0, 1.0])[:, :3], tip + [0.0, 0.0, 0.3],
                       atol=1e-9)
    assert tip[-1, 2] < tip[0, 2] - 5.0  # luffed out: the tip came down
