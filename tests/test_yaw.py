"""The rigid load's heading (yaw) against sources outside the project.

Sources, named beside each check:

- conservation of angular momentum about a fixed axis when no external moment acts about
  it (any dynamics textbook, e.g. Meriam & Kraige, *Engineering Mechanics: Dynamics*,
  angular impulse and momentum);
- the ideal constraint: holding a coordinate by a constraint force is the same as removing
  it from the equations (Lagrange multipliers; Goldstein, *Classical Mechanics*, ch. 2);
- the bifilar (two-fall) suspension: a body of weight W on two vertical cords of length L
  at half-spacing r turns back with a moment W r^2 / L per radian, period
  T = 2 pi sqrt(I L / (m g r^2)) (textbook torsional pendulum, e.g. Thomson & Dahleh,
  *Theory of Vibration with Applications*, the bifilar suspension exercise; from memory);
- statics: the moment of a force about the centre of gravity is arm x force;
- scipy's solve_ivp (DOP853, through the single-run path) for the batch engine.

The full 3D equations with the heading against an independent sympy derivation are in
``tests/test_hook_load_sympy.py`` (cases with a free heading, a torsion spring and a
held turned heading).
"""

from __future__ import annotations

import csv
import math

import numpy as np
import pytest

from swingsim.batch import engine as batch
from swingsim.dynamics.hook_load import HookLoadModel
from swingsim.metrics.single import summarize
from swingsim.simulation import simulate

from conftest import make_scene

BRIDLE = {"kind": "bridle", "leg_length_m": 3.0, "attach_m": [[-1.8, 0.0, 0.5], [1.8, 0.0, 0.5]]}
PANEL = {"mass_kg": 2400.0, "size_m": [5.0, 1.2, 1.0]}


def _bridle_scene(duration_s=20.0, top=None, **update):
    """A level panel on a symmetric two-leg bridle (invented), tables of ``update`` merged in."""
    upd = {"load": dict(PANEL), "rigging": dict(BRIDLE), "rope": {"length_m": 8.0}}
    for k, v in update.items():
        upd[k] = dict(upd.get(k, {}), **v) if isinstance(v, dict) else v
    return make_scene(upd, duration_s=duration_s, **(top or {}))


def _angular_momentum_z(model, y):
    """Angular momentum of hook block and load about the vertical through the (fixed) support [kg m^2/s]."""
    ev = model._eval(np.asarray(y, float), (0.0,) * 9 + (model.initial_rope_length_m, 0.0, 0.0), full=True)
    h = model.load_mass_kg * float(np.cross(ev["G"], ev["Gd"])[2]) + float((ev["Iw"] @ ev["omega"])[2])
    if model.has_hook_block:
        h += model.hook_mass_kg * float(np.cross(ev["H"], ev["Hd"])[2])
    return h


def test_a_spinning_load_keeps_its_turn_rate():
    # textbook: no moment about the vertical (gravity and the rope pass through it) -> the
    # angular momentum about it is conserved; a symmetric load hanging plumb turns at its start rate
    sc = _bridle_scene(start={"yaw_rate_deg_s": 20.0})
    traj = simulate(sc)
    t = np.linspace(0.0, 20.0, 81)
    s = traj.sample(t)
    assert np.max(np.abs(s["load_yaw_deg"] - 20.0 * t)) < 1e-6 * 400.0
    # a swinging, tilting, spinning load with an off-centre CG under a hook block: the yaw exchanges
    # momentum with the swing, but the total about the support's vertical stays (to the solver's tolerance)
    sc = _bridle_scene(hook={"mass_kg": 300.0},
                       load={"cg_offset_m": [0.4, 0.1, -0.1]},
                       start={"swing_deg": [6.0, -4.0], "swing_rate_deg_s": [3.0, 5.0], "yaw_rate_deg_s": 15.0})
    traj = simulate(sc)
    model = traj.model
    Y = traj.state(np.linspace(0.0, 20.0, 41))
    h = np.array([_angular_momentum_z(model, y) for y in Y])
    assert abs(h[0]) > 100.0
    assert np.max(np.abs(h - h[0])) < 1e-6 * abs(h[0])
    # and the heading really moves with the swing (not a trivially fixed coordinate)
    assert np.ptp(Y[:, model.yaw_index]) > math.radians(30.0)


def test_the_locked_swivel_is_the_ideal_constraint_of_the_free_heading():
    # Lagrange multipliers: the held heading's accelerations are those of the free heading's
    # equations with its row and column removed (at zero turn rate), to rounding
    free = HookLoadModel(_bridle_scene(hook={"mass_kg": 300.0}, load={"cg_offset_m": [0.3, 0.2, -0.1]},
                                       start={"yaw_deg": 35.0}, wind={"speed_m_s": 9.0, "direction_deg": 20.0}))
    locked = HookLoadModel(_bridle_scene(hook={"mass_kg": 300.0, "swivel": "locked"},
                                         load={"cg_offset_m": [0.3, 0.2, -0.1]}, start={"yaw_deg": 35.0},
                                         wind={"speed_m_s": 9.0, "direction_deg": 20.0}))
    iy, nq = free.yaw_index, free.n_coordinates
    assert locked.yaw_index is None and locked.n_coordinates == nq - 1
    rng = np.random.default_rng(14)
    for _ in range(10):
        q = np.delete(free.rest_state()[:nq], iy) + rng.uniform(-0.3, 0.3, nq - 1)
        qd = rng.uniform(-0.6, 0.6, nq - 1)
        kin = tuple(rng.uniform(-1, 1, 9)) + (8.0, 0.2, -0.1, 0.05)
        y_free = np.concatenate([np.insert(q, iy, math.radians(35.0)), np.insert(qd, iy, 0.0)])
        ev = free._eval(y_free, kin, full=True)
        keep = [i for i in range(nq) if i != iy]
        expected = np.linalg.solve(ev["M"][np.ix_(keep, keep)], ev["Q"][keep])
        got = locked._qdd(np.concatenate([q, qd]), kin)
        assert np.max(np.abs(got - expected)) <= 1e-11 * np.max(np.abs(expected))


def test_nothing_turns_a_symmetric_load_so_free_and_locked_agree():
    # the fixed-yaw model as the limit: with nothing to turn the load (level, symmetric, the swing,
    # the travel and the wind in one vertical plane) the free heading stays put and the trajectories
    # are the held heading's.  (A swing out of that plane does turn a free load: the rope's pull at
    # the hook and the load's axis no longer share a vertical plane, a moment about the vertical.)
    upd = dict(hook={"mass_kg": 300.0}, start={"swing_deg": [5.0, 0.0]},
               wind={"speed_m_s": 8.0, "direction_deg": 0.0}, load={"wind_area_m2": 5.0},
               moves=[{"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 6.0, "speed_m_s": 1.0,
                       "accel_m_s2": 0.5}])
    free = simulate(_bridle_scene(**upd))
    locked = simulate(_bridle_scene(**dict(upd, hook={"mass_kg": 300.0, "swivel": "locked"})))
    t = np.linspace(0.0, 20.0, 201)
    a, b = free.sample(t), locked.sample(t)
    assert np.max(np.abs(a["load_yaw_deg"])) < 1e-9
    assert np.max(np.abs(b["load_yaw_deg"])) == 0.0
    assert np.max(np.abs(a["load"] - b["load"])) < 1e-7
    assert np.max(np.abs(a["rope_tension_N"] - b["rope_tension_N"])) < 1e-6 * 30e3


def test_the_leg_geometry_gives_no_restoring_moment_on_a_free_swivel():
    # all the bridle's legs meet at the hook: turning about the vertical through it moves the CG
    # on a circle of zero radius (no work by gravity), so a turned load stays turned (statics)
    traj = simulate(_bridle_scene(start={"yaw_deg": 40.0}))
    s = traj.sample(np.linspace(0.0, 20.0, 21))
    assert np.max(np.abs(s["load_yaw_deg"])) < 1e-8
    model = traj.model
    assert model.yaw_index not in model.swing_coordinate_indices()


def test_bifilar_suspension_period():
    # two falls of length Lf at half-spacing r carry the load (locked swivel, the reeving's
    # torsion): k = m g r^2 / Lf; textbook period T = 2 pi sqrt(I Lf / (m g r^2))
    m, g = PANEL["mass_kg"], 9.80665
    r, Lf = 0.6, 8.0
    k = m * g * r * r / Lf
    sc = _bridle_scene(hook={"swivel": "locked", "torsion_stiffness_N_m_per_rad": k},
                       start={"yaw_rate_deg_s": 3.0}, duration_s=100.0, top={"gravity_m_s2": g})
    traj = simulate(sc)
    I_zz = m / 12.0 * (5.0 ** 2 + 1.2 ** 2)  # box about its vertical axis (Meriam & Kraige table)
    expected = 2 * math.pi * math.sqrt(I_zz * Lf / (m * g * r * r))
    t = np.linspace(0.0, 100.0, 100001)
    yaw = traj.sample(t)["load_yaw_deg"]
    up = np.where((yaw[:-1] < 0.0) & (yaw[1:] >= 0.0))[0]
    crossings = t[up] - yaw[up] * (t[up + 1] - t[up]) / (yaw[up + 1] - yaw[up])
    measured = float(np.mean(np.diff(crossings)))
    assert len(crossings) >= 3
    assert measured == pytest.approx(expected, rel=1e-4)
    # and it is a swing mode of the small-oscillation analysis
    assert min(abs(p - expected) for p in traj.model.mode_periods_s()) < 1e-4 * expected


def test_wind_at_an_offset_centre_of_pressure_turns_the_load():
    # statics: the drag F at the arm rho from the CG is a moment rho x F about it; the load
    # hanging plumb and still in a wind toward +y with the centre of pressure 1.5 m along +x
    # turns counter-clockwise (seen from above) with yaw'' = arm F / I_zz
    v, area, cd, rho_air, arm = 10.0, 6.0, 1.2, 1.225, 1.5
    sc = _bridle_scene(load={"wind_area_m2": area, "drag_coefficient": cd, "wind_center_m": [arm, 0.0, 0.0]},
                       wind={"speed_m_s": v, "direction_deg": 90.0, "air_density_kg_m3": rho_air,
                             "onset": "step"})
    model = HookLoadModel(sc)
    F = 0.5 * rho_air * cd * area * v * v
    I_zz = PANEL["mass_kg"] / 12.0 * (5.0 ** 2 + 1.2 ** 2)
    qdd = model.accelerations(0.0, model.rest_state(), (0.0,) * 9 + (8.0, 0.0, 0.0))
    assert qdd[model.yaw_index] == pytest.approx(arm * F / I_zz, rel=1e-9)
    # the same arm on the other side turns it the other way
    sc2 = _bridle_scene(load={"wind_area_m2": area, "drag_coefficient": cd, "wind_center_m": [-arm, 0.0, 0.0]},
                        wind={"speed_m_s": v, "direction_deg": 90.0, "air_density_kg_m3": rho_air,
                              "onset": "step"})
    m2 = HookLoadModel(sc2)
    assert m2.accelerations(0.0, m2.rest_state(), (0.0,) * 9 + (8.0, 0.0, 0.0))[m2.yaw_index] == \
        pytest.approx(-arm * F / I_zz, rel=1e-9)
    # over the run the load weathervanes: it turns toward putting the centre of pressure downwind
    s = simulate(sc).sample(np.linspace(0.0, 4.0, 41))
    assert s["load_yaw_deg"][-1] > 10.0


def test_outputs_timeseries_and_summary(tmp_path):
    # a panel spun at 30 deg/s: the CSV column, the summary's peak turn and the reach of its ends
    sc = _bridle_scene(start={"yaw_rate_deg_s": 30.0}, duration_s=5.0)
    traj = simulate(sc)
    d = summarize(traj).data
    assert d["peak_load_yaw_deg"] == pytest.approx(150.0, rel=1e-6)
    # the box's far corners: half-diagonal of the 5.0 x 1.2 plan from the hook's vertical (geometry)
    assert d["load_end_sweep_radius_m"] == pytest.approx(math.hypot(2.5, 0.6), rel=1e-6)
    # zones and drawings read the turned rotation: after a quarter turn the load's x axis is along y
    s = traj.sample(np.array([3.0]))
    assert s["load_rotation"][0][:, 0] == pytest.approx([0.0, 1.0, 0.0], abs=1e-6)
    from swingsim.cli.main import main

    scene_file = tmp_path / "spin.toml"
    scene_file.write_text(
        'title = "spinning panel"\nduration_s = 4.0\n[crane]\nsuspension_m = [0.0, 0.0, 30.0]\n'
        '[rope]\nlength_m = 8.0\n[load]\nmass_kg = 2400.0\nsize_m = [5.0, 1.2, 1.0]\n'
        '[rigging]\nkind = "bridle"\nleg_length_m = 3.0\nattach_m = [[-1.8, 0.0, 0.5], [1.8, 0.0, 0.5]]\n'
        '[start]\nyaw_rate_deg_s = -45.0\n', encoding="utf-8")
    out = tmp_path / "out"
    assert main(["run", str(scene_file), "-o", str(out), "-q", "--no-plots", "--no-briefing"]) in (0, None)
    with open(out / "timeseries.csv", newline="", encoding="utf-8") as f:
        rows = list(csv.DictReader(row for row in f if not row.startswith("#")))
    last = rows[-1]
    assert float(last["load_yaw_deg"]) == pytest.approx(-45.0 * float(last["t_s"]), rel=1e-6)
    text = (out / "summary.txt").read_text(encoding="utf-8")
    assert "Load turn (swivel free)" in text


@pytest.mark.parametrize("key,value,words", [
    ("hook", {"swivel": "spinning"}, "hook.swivel"),
    ("hook", {"torsion_stiffness_N_m_per_rad": 500.0}, "only with hook.swivel"),
    ("hook", {"size_m": [0.4, 0.4, 0.8]}, "hook.mass_kg"),
    ("start", {"yaw_deg": 400.0}, "start.yaw_deg"),
    ("load", {"wind_center_m": [1.0, 0.0]}, "load.wind_center_m"),
])
def test_bad_heading_keys_are_one_clear_line(key, value, words):
    from swingsim.errors import SceneError

    with pytest.raises(SceneError) as err:
        _bridle_scene(**{key: value})
    assert words in str(err.value) and "\n" not in str(err.value)


def test_heading_keys_on_a_point_load_are_refused():
    from swingsim.errors import SceneError

    with pytest.raises(SceneError, match="only a rigid load turns"):
        make_scene({"start": {"yaw_deg": 10.0}})


def test_batch_engine_with_a_turning_load_matches_solve_ivp():
    # the batch engine's array arithmetic against DOP853 at rtol 1e-10 (scipy, single-run path):
    # spinning, weathervaning and spring-held headings coupled to the swing by an off-centre CG
    base = dict(hook={"mass_kg": 350.0, "size_m": [0.5, 0.4, 0.9]},
                load={"cg_offset_m": [0.3, 0.1, -0.1], "wind_area_m2": 5.0},
                moves=[{"axis": "slew", "profile": "s-curve", "start_s": 0.5, "angle_deg": 40.0, "speed_deg_s": 4.0,
                        "accel_deg_s2": 2.0, "jerk_deg_s3": 2.0}],
                crane={"suspension_m": [20.0, 0.0, 45.0]})
    scenes = [
        _bridle_scene(**dict(base, start={"yaw_rate_deg_s": 12.0, "swing_deg": [4.0, 0.0]})),
        _bridle_scene(**dict(base, load=dict(base["load"], wind_center_m=[1.2, 0.0, 0.2]),
                             wind={"speed_m_s": 9.0, "direction_deg": 60.0})),
        _bridle_scene(**dict(base, hook=dict(base["hook"], swivel="locked", torsion_stiffness_N_m_per_rad=4000.0),
                             start={"yaw_deg": 20.0, "yaw_rate_deg_s": -10.0})),
    ]
    refs = [summarize(simulate(sc)).data for sc in scenes]
    got = batch.run_chunk(scenes)
    for g, s in zip(got, refs):
        assert s["valid"] and g["engine"] == "batch"
        for k in ("peak_rope_angle_deg", "residual_rope_angle_deg", "swing_at_move_end_deg"):
            assert g[k] == pytest.approx(s[k], abs=1e-3), k
        assert g["peak_excursion_m"] == pytest.approx(s["peak_excursion_m"], rel=1e-3, abs=1e-4)
        assert g["peak_rope_tension_kN"] == pytest.approx(s["peak_rope_tension_kN"], rel=2e-3)
