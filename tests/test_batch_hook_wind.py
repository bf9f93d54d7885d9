"""The hook-and-load batch engine in a wind that varies: gusts, turbulence, a profile with height.

Reference: scipy's ``solve_ivp`` (DOP853, rtol 1e-10) through the single-run path
(``swingsim.simulation.simulate`` + ``metrics.single.summarize``), which reads the same
wind field (``dynamics/wind.py``).  Rope angles agree to 1e-3 deg (the tolerance
``tests/test_batch_hook.py`` holds in steady wind); tension and excursion peaks from
the batch's parabolas to 0.2 % (as there).  Statistics over realisations: numpy's mean,
95th percentile and max of single runs of the same seeds.
"""

import dataclasses

import numpy as np
import pytest

from swingsim.batch import engine as batch
from swingsim.batch import hook_engine
from swingsim.dynamics.registry import select_model
from swingsim.metrics.single import summarize
from swingsim.simulation import simulate
from swingsim.study.realisations import gust_statistics, realisation_scenes

from conftest import make_scene

_HOOK = {"mass_kg": 400.0, "size_m": [0.5, 0.4, 0.9]}
#: Invented riggings, one per structure family of the model.
KINDS = {
    "hook_bridle": {"hook": _HOOK, "load": {"mass_kg": 3000.0, "size_m": [4.0, 0.3, 1.0], "wind_area_m2": 4.0},
                    "rigging": {"kind": "bridle", "leg_length_m": 4.0,
                                "attach_m": [[-1.5, 0.0, 0.5], [1.5, 0.0, 0.5]]}},
    "hook_leg_point": {"hook": _HOOK, "load": {"mass_kg": 2000.0, "wind_area_m2": 3.0},
                       "rigging": {"kind": "single", "leg_length_m": 2.5}},
    "rigid_on_rope": {"load": {"mass_kg": 2500.0, "size_m": [2.0, 1.0, 1.0], "wind_area_m2": 2.0},
                      "rigging": {"kind": "single", "leg_length_m": 1.0, "attach_m": [[0.3, 0.0, 0.5]]}},
    "elastic_rope": {"load": {"mass_kg": 2000.0, "wind_area_m2": 3.0},
                     "rope": {"stiffness_kN_per_m": 900.0, "bounce_damping_ratio": 0.02}},
}
PROFILES = ("power", "log", "uniform", "power")


def _scene(kind, profile="power", seed=3, duration_s=12.0, **wind):
    upd = {"rope": {"length_m": 14.0, "diameter_m": 0.02}, "damping": {"ratio": 0.01},
           "crane": {"suspension_m": [20.0, 0.0, 45.0]},
           "moves": [{"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 6.0,
                      "speed_m_s": 1.0, "accel_m_s2": 0.5}],
           "wind": {"speed_m_s": 8.0, "direction_deg": 30.0, "profile": profile, "turbulence_intensity": 0.18,
                    "seed": seed, "gusts": [{"start_s": 4.0, "peak_m_s": 5.0, "duration_s": 3.0,
                                             "direction_deg": 100.0}], **wind}}
    for key, value in KINDS[kind].items():
        upd[key] = {**upd.get(key, {}), **value}
    return make_scene(upd, duration_s=duration_s)


def _assert_matches(got, ref, label):
    assert got["engine"] == "batch", label
    assert ref["valid"], label
    for k in ("peak_rope_angle_deg", "residual_rope_angle_deg", "residual_swing_deg"):
        assert got[k] == pytest.approx(ref[k], abs=1e-3), (label, k)
    for k in ("peak_hook_load_kN", "peak_line_pull_kN", "peak_rope_tension_kN"):
        assert got[k] == pytest.approx(ref[k], rel=2e-3), (label, k)
    assert got["peak_excursion_m"] == pytest.approx(ref["peak_excursion_m"], rel=1e-3, abs=1e-4), label


@pytest.fixture(scope="module")
def gusty():
    scenes = [_scene(kind, profile, seed=3 + i) for i, (kind, profile) in enumerate(zip(KINDS, PROFILES))]
    return scenes, batch.run_chunk(scenes)


def test_varying_wind_is_taken_by_the_hook_batch_engine(gusty):
    scenes, _ = gusty
    for sc in scenes:
        model = select_model(sc)
        assert model.wind is not None and model.wind.varies
        assert hook_engine.supported(sc)


def test_gusts_and_turbulence_match_the_single_run(gusty):
    # each structure in turbulence, a 1 - cosine gust across the mean wind and a power, log
    # or no profile, against DOP853 through the single-run path (module docstring)
    scenes, got = gusty
    for kind, sc, g in zip(KINDS, scenes, got):
        _assert_matches(g, summarize(simulate(sc)).data, kind)


def test_the_wind_moves_the_load():
    # the check above could pass with the wind ignored on both sides: the same lift in still
    # air must differ (a 5 m/s gust on 4 m^2 is some 70 N, drag equation, Hoerner 1965)
    windy = _scene("hook_bridle")
    calm = make_scene({k: v for k, v in windy.raw.items() if k != "wind"}, duration_s=windy.duration_s)
    a, b = batch.run_chunk([windy, calm])
    assert a["engine"] == b["engine"] == "batch"
    assert abs(a["peak_rope_angle_deg"] - b["peak_rope_angle_deg"]) > 0.01


def test_a_variant_does_not_depend_on_its_chunk():
    # identical floats alone and among others (steady, other seeds, another profile): what makes
    # Dask, resumed and in-process runs agree
    sc = _scene("hook_leg_point", duration_s=10.0)
    steady = make_scene({k: v for k, v in sc.raw.items() if k != "wind"} | {"wind": {"speed_m_s": 6.0}},
                        duration_s=10.0)
    other = dataclasses.replace(sc, wind=dataclasses.replace(sc.wind, seed=11, profile="log"))
    alone = batch.run_chunk([sc])[0]
    steady_alone = batch.run_chunk([steady])[0]
    mixed = batch.run_chunk([other, steady, sc])
    assert mixed[2] == alone
    assert mixed[1] == steady_alone


def test_realisations_of_a_hook_scene_are_single_runs_of_the_same_seeds():
    # gust_statistics of a hook block and bridle on the batch engine against numpy's mean,
    # 95th percentile and max of single runs (DOP853) of seeds seed .. seed + N - 1
    sc = _scene("hook_bridle", realisations=4, duration_s=10.0)
    stats = gust_statistics(sc)
    assert stats["engine"] == ["batch"]
    assert stats["seeds"] == [3, 4, 5, 6]
    singles = [summarize(simulate(s)).data for s in realisation_scenes(sc)]
    for key, tol in (("peak_rope_angle_deg", {"abs": 1e-3}), ("peak_excursion_m", {"rel": 1e-3}),
                     ("peak_hook_load_kN", {"rel": 2e-3})):
        vals = np.array([d[key] for d in singles])
        assert np.allclose(stats[key]["values"], vals, rtol=tol.get("rel", 0.0), atol=tol.get("abs", 0.0)), key
        assert stats[key]["mean"] == pytest.approx(np.mean(vals), **tol), key
        assert stats[key]["p95"] == pytest.approx(np.percentile(vals, 95.0), **tol), key
        assert stats[key]["max"] == pytest.approx(np.max(vals), **tol), key
    assert len(set(np.round(stats["peak_rope_angle_deg"]["values"], 6))) == 4  # the seeds differ
    assert stats["worst_seed"] == 3 + int(np.argmax([d["peak_rope_angle_deg"] for d in singles]))
