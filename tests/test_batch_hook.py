"""The batch engine on the hook-and-load model against scipy's solve_ivp through the single-run path.

Reference: swingsim.simulation.simulate -- scipy.integrate.solve_ivp, method DOP853, rtol 1e-10,
atol 1e-12, restarted at every breakpoint, with its terminal events -- and
swingsim.metrics.summarize on it.  Random variants of every structure the model has: a rigid
load on a bridle under a hook block, a spreader, a single leg swinging below a hook block (with
a rigid load, and with a point load in wind while hoisting), a rigid load on the rope's end, a
point load on a sling leg without a hook block, and the elastic rope (alone while hoisting, and
under a hook block with a bridle).  A hook block always has rigging below it (the scene reader
refuses one without), so there is no "hook block with the load on it" structure of its own.
"""

import math

import numpy as np
import pytest

from swingsim.batch import engine as batch
from swingsim.batch import hook_engine
from swingsim.dynamics.hook_load import ArrayArithmetic, HookLoadModel, equations_of_motion
from swingsim.metrics.single import summarize
from swingsim.motion.kinematics import SuspensionState
from swingsim.simulation import simulate

from conftest import make_scene

STRUCTURES = ("hook_bridle", "spreader", "hook_leg_rigid", "hook_leg_point",
              "rigid_on_rope", "sling_point", "elastic_point", "elastic_hook_bridle")


def _scene(kind, rng):
    """A random variant of one structure (invented loads and cranes)."""
    L = float(rng.uniform(6.0, 20.0))
    travel = {"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": float(rng.uniform(4, 10)),
              "speed_m_s": float(rng.uniform(0.5, 1.2)), "accel_m_s2": float(rng.uniform(0.2, 0.8))}
    upd = {"rope": {"length_m": L}, "load": {"mass_kg": float(rng.uniform(1500, 8000))},
           "moves": [travel], "damping": {"ratio": float(rng.uniform(0.0, 0.03))},
           "crane": {"suspension_m": [20.0, 0.0, 45.0]},
           "start": {"swing_deg": [float(rng.uniform(-8, 8)), float(rng.uniform(-8, 8))]}}
    hook = {"mass_kg": float(rng.uniform(200, 900)), "size_m": [0.5, 0.4, 0.9]}
    bridle = {"kind": "bridle", "leg_length_m": float(rng.uniform(3, 5)),
              "attach_m": [[-1.5, 0.0, 0.5], [1.5, 0.0, 0.5]]}
    if kind == "hook_bridle":
        upd["hook"] = hook
        upd["load"].update({"size_m": [4.0, 0.3, 1.0], "wind_area_m2": 4.0})
        upd["rigging"] = bridle
        upd["wind"] = {"speed_m_s": float(rng.uniform(2, 8)), "direction_deg": float(rng.uniform(0, 360))}
        upd["moves"] = [{"axis": "slew", "profile": "s-curve", "start_s": 0.5,
                         "angle_deg": float(rng.uniform(20, 60)), "speed_deg_s": 4.0, "accel_deg_s2": 2.0,
                         "jerk_deg_s3": 2.0}]
    elif kind == "spreader":
        upd["hook"] = hook
        upd["load"].update({"size_m": [0.8, 5.0, 0.8], "shape": "cylinder"})
        upd["rigging"] = {"kind": "spreader", "leg_length_m": 2.0, "attach_m": [[0.0, -2.0, 0.4], [0.0, 2.0, 0.4]],
                          "top_leg_length_m": 3.0}
        upd["moves"] = [dict(travel, axis="radius")]
    elif kind == "hook_leg_rigid":
        upd["hook"] = hook
        upd["load"].update({"size_m": [1.6, 1.0, 1.2], "cg_offset_m": [0.1, 0.0, -0.1]})
        upd["rigging"] = {"kind": "single", "leg_length_m": float(rng.uniform(1.0, 3.0)),
                          "attach_m": [[0.0, 0.0, 0.7]]}
    elif kind == "hook_leg_point":  # a hook block always has rigging below it: here one leg to a point load
        upd["hook"] = hook
        upd["rigging"] = {"kind": "single", "leg_length_m": float(rng.uniform(1.0, 4.0))}
        upd["wind"] = {"speed_m_s": float(rng.uniform(3, 12)), "direction_deg": float(rng.uniform(0, 360))}
        upd["rope"]["diameter_m"] = 0.02
        upd["moves"].append({"axis": "hoist", "profile": "trapezoid", "start_s": 2.0,
                             "distance_m": float(rng.uniform(-3, 3)) or 1.0, "speed_m_s": 0.4, "accel_m_s2": 0.3})
    elif kind == "rigid_on_rope":  # no hook block: the leg hangs straight on from the rope's end
        upd["load"].update({"size_m": [2.0, 1.0, 1.0], "wind_area_m2": 2.0})
        upd["rigging"] = {"kind": "single", "leg_length_m": float(rng.uniform(0.5, 2.0)),
                          "attach_m": [[0.3, 0.0, 0.5]]}
        upd["wind"] = {"speed_m_s": float(rng.uniform(3, 10)), "direction_deg": float(rng.uniform(0, 360))}
    elif kind == "sling_point":
        upd["rigging"] = {"kind": "single", "leg_length_m": float(rng.uniform(1.0, 4.0))}
    elif kind == "elastic_point":
        upd["rope"].update({"stiffness_kN_per_m": float(rng.uniform(400, 2000)), "bounce_damping_ratio": 0.02})
        upd["moves"].append({"axis": "hoist", "profile": "trapezoid", "start_s": 3.0,
                             "distance_m": float(rng.uniform(1, 4)), "speed_m_s": 0.5, "accel_m_s2": 0.5})
    elif kind == "elastic_hook_bridle":
        upd["hook"] = hook
        upd["load"].update({"size_m": [4.0, 0.3, 1.0]})
        upd["rigging"] = bridle
        upd["rope"].update({"stiffness_kN_per_m": float(rng.uniform(800, 3000)), "falls": 2,
                            "bounce_damping_ratio": 0.05})
    return make_scene(upd, duration_s=25.0)


@pytest.fixture(scope="module")
def variants():
    rng = np.random.default_rng(20261202)
    scenes = [_scene(kind, rng) for kind in STRUCTURES]
    return scenes, [summarize(simulate(sc)).data for sc in scenes]


def test_every_structure_is_taken_and_grouped(variants):
    scenes, _ = variants
    assert all(hook_engine.supported(sc) for sc in scenes)
    structures = [HookLoadModel(sc).structure for sc in scenes]
    # a bridle and a spreader under a hook block have the same coordinates (one group);
    # every other variant is a structure of its own
    assert structures[STRUCTURES.index("hook_bridle")] == structures[STRUCTURES.index("spreader")]
    assert len(set(structures)) == len(STRUCTURES) - 1


def test_summaries_match_solve_ivp(variants):
    # every structure against DOP853 at rtol 1e-10 (scipy, through the single-run path)
    scenes, refs = variants
    got = batch.run_chunk(scenes)
    for kind, g, s in zip(STRUCTURES, got, refs):
        assert s["valid"] and g["engine"] == "batch", kind
        assert g["model"] == s["model"], kind
        # rope angles: 1e-3 deg (ten times tighter than the study's 0.01 deg)
        for k in ("peak_rope_angle_deg", "residual_rope_angle_deg", "residual_swing_deg", "swing_at_move_end_deg"):
            assert g[k] == pytest.approx(s[k], abs=1e-3), (kind, k)
        # tension peaks from parabolas through the batch samples: 0.2 %, as for the point mass
        for k in ("peak_rope_tension_kN", "peak_hook_load_kN", "peak_line_pull_kN", "dynamic_factor"):
            assert g[k] == pytest.approx(s[k], rel=2e-3), (kind, k)
        assert g["min_rope_tension_kN"] == pytest.approx(s["min_rope_tension_kN"], rel=2e-3), kind
        assert g["static_rope_tension_kN"] == pytest.approx(s["static_rope_tension_kN"], rel=1e-12), kind
        assert g["peak_excursion_m"] == pytest.approx(s["peak_excursion_m"], rel=1e-3, abs=1e-4), kind
        assert g["peak_load_speed_m_s"] == pytest.approx(s["peak_load_speed_m_s"], rel=1e-3, abs=1e-4), kind
        assert g["natural_period_s"] == pytest.approx(s["natural_period_s"], rel=1e-12), kind
        assert g["rope_length_end_m"] == pytest.approx(s["rope_length_end_m"], abs=1e-9), kind
        for k in ("measured_period_s", "settled_at_s"):
            if s[k] is None:
                assert g[k] is None, (kind, k)
            else:
                assert g[k] == pytest.approx(s[k], rel=2e-3, abs=0.1), (kind, k)


def test_result_does_not_depend_on_the_chunk(variants):
    # identical floats alone, together and in reverse order (what makes Dask and resumed runs agree)
    scenes, _ = variants
    rng = np.random.default_rng(5)
    same = [scenes[1]] + [_scene("hook_bridle", rng) for _ in range(2)]
    together = batch.run_chunk(same + scenes[:3])
    alone = [batch.run_chunk([sc])[0] for sc in same]
    assert together[:3] == alone
    assert batch.run_chunk(same[::-1])[::-1] == alone


def test_a_thrown_load_goes_to_the_single_run_solver():
    # a hook block thrown over at 85 deg on a short rope: the rope goes slack or the swing reaches
    # the model's limit; the single-run solver stops at that event and reports it, and the other
    # variant of the chunk stays on the batch engine
    hook = {"hook": {"mass_kg": 300.0}, "rope": {"length_m": 3.0},
            "rigging": {"kind": "single", "leg_length_m": 1.0}}
    wild = make_scene(dict(hook, start={"swing_deg": [85.0, 0.0], "swing_rate_deg_s": [120.0, 0.0]}),
                      duration_s=10.0)
    calm = make_scene(dict(hook, start={"swing_deg": [5.0, 0.0]}), duration_s=10.0)
    ref = simulate(wild)
    assert not ref.valid
    r = batch.run_chunk([wild, calm])
    assert r[0]["engine"] == "single" and r[0]["status"] == ref.status and r[0]["valid"] is False
    assert r[1]["engine"] == "batch" and r[1]["valid"] is True


def test_lift_off_and_luffing_are_left_to_the_single_run_solver():
    lift = make_scene({"rope": {"length_m": 10.0, "stiffness_kN_per_m": 800.0}, "start": {"rope_preload": "lift-off"},
                       "moves": [{"axis": "hoist", "profile": "trapezoid", "start_s": 1.0, "distance_m": 2.0,
                                  "speed_m_s": 0.5, "accel_m_s2": 0.5}]})
    assert not hook_engine.supported(lift)
    assert batch.run_chunk([lift])[0]["engine"] == "single"


def test_array_arithmetic_is_the_float_path(variants):
    # the batch engine's arithmetic (arrays of states) against the single run's (one state of
    # floats) through the one function: the same numbers to rounding, on random states
    scenes, _ = variants
    rng = np.random.default_rng(11)
    for sc in scenes:
        model = HookLoadModel(sc)
        nq = model.n_coordinates
        Y = np.tile(model.rest_state(), (6, 1))
        Y[:, :nq] += rng.uniform(-0.2, 0.2, (6, nq))
        Y[:, nq:] += rng.uniform(-0.3, 0.3, (6, nq))
        kins = [SuspensionState(0.0, 0.0, 0.0, *rng.uniform(-1, 1, 2), 0.0, *rng.uniform(-1, 1, 2), 0.0,
                                float(sc.rope.length_m), float(rng.uniform(-0.5, 0.5)), float(rng.uniform(-0.3, 0.3)),
                                float(rng.uniform(-0.1, 0.1))) for _ in range(6)]
        expected = np.array([model._qdd(y, k) for y, k in zip(Y, kins)])
        k_arr = tuple(np.array([k[i] for k in kins]) for i in (3, 4, 5, 6, 7, 8, 9, 10, 11, 12))
        par = {k: np.full(6, v) for k, v in model.equation_parameters().items()}
        got = equations_of_motion(list(Y[:, :nq].T), list(Y[:, nq:].T), k_arr, par, model.elastic_rope,
                                  model.wind_velocity_m_s(), model.structure, ArrayArithmetic)
        scale = np.max(np.abs(expected)) + 1.0
        assert np.max(np.abs(got - expected)) < 1e-12 * scale, model.name
        assert math.isfinite(scale)
