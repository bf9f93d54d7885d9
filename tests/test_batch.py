"""The batch engine against scipy's solve_ivp (DOP853 at tight tolerance) and the single-run metrics.

Reference: scipy.integrate.solve_ivp, method DOP853, rtol 1e-12, atol 1e-14, restarted
at every breakpoint (swingsim.simulation.simulate), and swingsim.metrics.summarize on it.
Random variants cover large nonlinear swings (up to 60 deg), wind and drag, damping,
slewing, radius, hoisting, s-curves, shaped moves and table profiles.
"""


import math
from pathlib import Path

import numpy as np
import pytest

from swingsim.batch import dense, rk8
from swingsim.batch import engine as batch
from swingsim.metrics.single import summarize
from swingsim.simulation import simulate

from conftest import make_scene


def _random_scene(rng, i, tmp_path):
    moves = []
    kind = i % 6
    T = 40.0
    if kind == 0:    # trolley, trapezoid, large initial swing in 3D
        moves.append({"axis": "radius", "profile": "trapezoid", "start_s": 1.0,
                      "distance_m": float(rng.uniform(-15, 15)) or 5.0, "speed_m_s": float(rng.uniform(0.5, 2)),
                      "accel_m_s2": float(rng.uniform(0.2, 2.0))})
        start = {"swing_deg": [float(rng.uniform(-60, 60)), float(rng.uniform(-25, 25))]}
    elif kind == 1:  # slew with an s-curve, damping
        moves.append({"axis": "slew", "profile": "s-curve", "start_s": 0.5, "angle_deg": float(rng.uniform(20, 120)),
                      "speed_deg_s": float(rng.uniform(3, 10)), "accel_deg_s2": float(rng.uniform(1, 4)),
                      "jerk_deg_s3": float(rng.uniform(1, 5))})
        start = {"swing_deg": [float(rng.uniform(-10, 10)), 0.0]}
    elif kind == 2:  # gantry travel, shaped, in wind with rope drag
        moves.append({"axis": "x", "profile": str(rng.choice(["zv", "zvd", "ei"])), "start_s": 2.0,
                      "distance_m": float(rng.uniform(5, 20)), "speed_m_s": float(rng.uniform(0.5, 1.5)),
                      "accel_m_s2": float(rng.uniform(0.2, 1.0))})
        start = {}
    elif kind == 3:  # hoisting while travelling in y
        moves.append({"axis": "hoist", "profile": "trapezoid", "start_s": 1.0,
                      "distance_m": float(rng.uniform(-6, 6)) or 2.0, "speed_m_s": 0.5, "accel_m_s2": 0.3})
        moves.append({"axis": "y", "profile": "trapezoid", "start_s": 3.0, "distance_m": 8.0,
                      "speed_m_s": 1.0, "accel_m_s2": float(rng.uniform(0.3, 2.0))})
        start = {"swing_deg": [5.0, -3.0]}
    elif kind == 4:  # a recorded table (spline with many knots)
        t = np.linspace(0, 12, 25)
        x = 6.0 * (1 - np.cos(np.pi * t / 12)) + 0.3 * np.sin(2 * np.pi * t / 5)
        p = tmp_path / f"rec{i}.csv"
        p.write_text("t_s,position_m\n" + "".join(f"{a!r},{b!r}\n" for a, b in zip(t.tolist(), x.tolist())))
        moves.append({"axis": "x", "profile": "table", "start_s": 1.0, "table_file": str(p)})
        start = {"swing_rate_deg_s": [float(rng.uniform(-20, 20)), 4.0]}
    else:            # slew and radius together (Coriolis), near 45 deg swings
        moves.append({"axis": "slew", "profile": "trapezoid", "start_s": 0.0, "angle_deg": 60.0,
                      "speed_deg_s": 8.0, "accel_deg_s2": float(rng.uniform(2, 8))})
        moves.append({"axis": "radius", "profile": "whole-period", "start_s": 2.0, "distance_m": -6.0,
                      "speed_m_s": 1.0, "accel_m_s2": 0.8})
        start = {"swing_deg": [40.0, 20.0]}
    upd = {"rope": {"length_m": float(rng.uniform(4, 30))}, "moves": moves, "start": start,
           "crane": {"suspension_m": [20.0, 0.0, 40.0]}}
    if kind in (1, 5):
        upd["damping"] = {"ratio": float(rng.uniform(0.0, 0.08))}
    if kind == 2:
        upd["wind"] = {"speed_m_s": float(rng.uniform(3, 15)), "direction_deg": float(rng.uniform(0, 360))}
        upd["load"] = {"wind_area_m2": 8.0}
        upd["rope"]["diameter_m"] = 0.02
    return make_scene(upd, duration_s=T)


@pytest.fixture(scope="module")
def variants(tmp_path_factory):
    rng = np.random.default_rng(20261201)
    tmp = tmp_path_factory.mktemp("tables")
    scenes = [_random_scene(rng, i, tmp) for i in range(18)]
    refs = [simulate(sc, rtol=1e-12, atol=1e-14) for sc in scenes]
    return scenes, refs


def test_states_match_solve_ivp(variants):
    # the dense batch states against DOP853 at rtol 1e-12 (scipy), at every batch sample
    scenes, refs = variants
    vs = [batch._prepare(sc, batch.DEFAULT_STEPS_PER_PERIOD) for sc in scenes]
    run = batch._integrate(vs)
    samples = dense.sample(run, np.arange(len(vs)), batch.DEFAULT_SAMPLES_PER_STEP)
    t, u, v, du = samples.time_s, samples.u, samples.v, samples.du
    worst = 0.0
    for i, tr in enumerate(refs):
        assert tr.valid
        Y = tr.state(t[i])
        a = np.degrees(np.arcsin(np.hypot(u[i], v[i])))
        ar = np.degrees(np.arcsin(np.hypot(Y[:, 0], Y[:, 1])))
        worst = max(worst, float(np.max(np.abs(a - ar))))
        # rates too: relative to the largest rate of the run
        rate = np.hypot(Y[:, 2], Y[:, 3]).max()
        assert np.max(np.abs(du[i] - Y[:, 2])) < 1e-4 * rate
    assert worst < 3e-3  # [deg]; measured about 1e-3 at 60 deg swings, 1e-4 typical


def test_summaries_match_single_run(variants):
    # the batch summary against swingsim.metrics.summarize of the tight single run
    scenes, refs = variants
    got = batch.run_chunk(scenes)
    for sc, tr, g in zip(scenes, refs, got):
        s = summarize(tr).data
        assert g["engine"] == "batch"
        for k in ("peak_rope_angle_deg", "residual_rope_angle_deg", "residual_swing_deg", "swing_at_move_end_deg"):
            assert g[k] == pytest.approx(s[k], abs=5e-3), k
        assert g["peak_excursion_m"] == pytest.approx(s["peak_excursion_m"], rel=1e-4, abs=1e-5)
        # tension peaks are sampled (not refined) in the batch: 0.2 %
        assert g["peak_rope_tension_kN"] == pytest.approx(s["peak_rope_tension_kN"], rel=2e-3)
        assert g["dynamic_factor"] == pytest.approx(s["dynamic_factor"], rel=2e-3)
        assert g["last_move_end_s"] == pytest.approx(s["last_move_end_s"], abs=1e-9)
        assert g["natural_period_s"] == pytest.approx(s["natural_period_s"], rel=1e-12)
        for k in ("measured_period_s", "settled_at_s"):
            if s[k] is None:
                assert g[k] is None, k
            else:
                assert g[k] == pytest.approx(s[k], rel=2e-3, abs=0.1), k


def test_result_does_not_depend_on_the_chunk(variants):
    # a variant's numbers are the same alone, in any chunk, in any order (identical floats):
    # what makes in-process and Dask runs agree exactly
    scenes, _ = variants
    together = batch.run_chunk(scenes)
    alone = [batch.run_chunk([sc])[0] for sc in scenes[:6]]
    rev = batch.run_chunk(scenes[::-1])[::-1]
    assert together[:6] == alone
    assert together == rev


def test_runs_the_model_cannot_carry_on_go_to_the_single_run_solver():
    # a violent stop throws the load over: the single-run solver stops at the event, and the
    # batch hands that variant to it (same status and message as a single run)
    sc = make_scene({"rope": {"length_m": 3.0}, "start": {"swing_deg": [85.0, 0.0],
                                                          "swing_rate_deg_s": [120.0, 0.0]}},
                    duration_s=10.0)
    calm = make_scene({}, duration_s=10.0)
    r = batch.run_chunk([sc, calm])
    ref = simulate(sc)
    assert not ref.valid
    assert r[0]["engine"] == "single" and r[0]["status"] == ref.status and r[0]["valid"] is False
    assert r[1]["engine"] == "batch" and r[1]["peak_rope_angle_deg"] < 1e-9


def test_engine_single_matches_summarize():
    sc = make_scene({"moves": [{"axis": "x", "profile": "trapezoid", "distance_m": 5.0, "speed_m_s": 1.0,
                                "accel_m_s2": 0.5}]})
    r = batch.run_chunk([sc], engine="single")[0]
    s = summarize(simulate(sc)).data
    assert r["engine"] == "single"
    assert r["peak_rope_angle_deg"] == s["peak_rope_angle_deg"]


def test_chunking_bounds():
    sc = make_scene({}, duration_s=60.0)
    n = batch.chunk_size_for([sc])
    assert 16 <= n <= 2048
    assert [list(r) for r in batch.chunks(5, 2)] == [[0, 1], [2, 3], [4]]


def test_vendored_tableau_is_scipys_dop853():
    # the coefficients copied into swingsim/batch/rk8.py equal scipy's own DOP853 table
    # (scipy/integrate/_ivp/dop853_coefficients.py, a private module) to the last bit
    scipy_table = pytest.importorskip("scipy.integrate._ivp.dop853_coefficients")
    n = scipy_table.N_STAGES
    assert n == rk8.N_STAGES
    assert np.array_equal(rk8.A, scipy_table.A[:n, :n])
    assert np.array_equal(rk8.B, scipy_table.B)
    assert np.array_equal(rk8.C, scipy_table.C[:n])


def test_vendored_tableau_order_conditions():
    # Hairer, Norsett & Wanner, Solving ODEs I, 2nd ed. 1993, sec. II.2: an explicit method
    # has c_i = sum_j a_ij (row-sum condition), and order p needs sum_i b_i c_i^k = 1/(k+1)
    # for k < p (the bushy-tree conditions) and sum_i b_i (A c^k)_i = 1/((k+1)(k+2)) for k < p - 1
    A, b, c = rk8.A, rk8.B, rk8.C
    assert np.allclose(np.tril(A, -1), A, rtol=0, atol=0)  # explicit: strictly lower triangular
    assert np.sum(b) == pytest.approx(1.0, abs=1e-14)
    assert np.allclose(A.sum(axis=1), c, rtol=0, atol=1e-14)
    for k in range(rk8.ORDER):
        assert float(b @ c**k) == pytest.approx(1.0 / (k + 1), abs=1e-14), k
    for k in range(rk8.ORDER - 1):
        assert float(b @ (A @ c**k)) == pytest.approx(1.0 / ((k + 1) * (k + 2)), abs=1e-14), k


def test_non_finite_batch_number_goes_to_the_single_run_solver(monkeypatch):
    """A batch summary holding a non-finite number is never reported as valid from the batch:
    the variant is run again by the single-run solver, whose final check decides (issue: nothing
    wrong passes as right)."""
    from swingsim.batch import engine

    real = engine.measure_block

    def poisoned(*args, **kw):
        block = real(*args, **kw)
        block.summaries[0]["peak_excursion_m"] = float("nan")
        return block

    monkeypatch.setattr(engine, "measure_block", poisoned)
    sc = make_scene({"moves": [{"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 5.0,
                                "speed_m_s": 1.0, "accel_m_s2": 0.5}]}, duration_s=30.0)
    out = engine.run_chunk([sc, sc])
    assert out[0]["engine"] == "single" and math.isfinite(out[0]["peak_excursion_m"])
    assert out[1]["engine"] == "batch"


def test_columnar_table_gives_the_same_summaries_as_one_scene_per_variant(tmp_path):
    # the columnar data path (a model per group, profiles once per distinct move, composed scenes) must
    # give bit-identical summaries to the engine fed one fully validated scene per variant
    from swingsim.study.variants import load_sweep

    root = Path(__file__).resolve().parent.parent
    (tmp_path / "s.toml").write_text(
        f'base = "{(root / "scenes" / "yard_gantry_travel.toml").as_posix()}"\nsensitivity = false\n'
        '[vary]\n"rope.length_m" = [6.0, 9.5, 13.0]\n"moves.0.profile" = ["trapezoid", "s-curve", "zvd", "ei"]\n'
        '"moves.0.jerk_m_s3" = [0.6]\n"damping.ratio" = [0.0, 0.03]\n')
    table = load_sweep(tmp_path / "s.toml").table
    fresh = load_sweep(tmp_path / "s.toml").table
    composed = {i: fresh.scene(i) for i in (7, 13, fresh.n - 1)}  # before any of them is built
    assert not any(i in fresh._scenes for i in composed)  # really composed, not taken from the cache
    columnar = batch.run_table_chunk(table)
    one_by_one = batch.run_chunk([table.built(i) for i in range(table.n)])
    assert columnar == one_by_one
    assert {s["engine"] for s in columnar} == {"batch"}
    # the scene a variant is composed from equals the one built from its document (the fallback's input)
    import dataclasses

    for i, sc in composed.items():  # Scene compares by identity: compare its fields
        built = fresh._build(i)
        assert [f.name for f in dataclasses.fields(sc) if getattr(sc, f.name) != getattr(built, f.name)] == []


# one scene per registered model: the batch engine takes every model (the hook-and-load model's
# structures in detail: tests/test_batch_hook.py)
_EVERY_MODEL = {
    "point-mass": {},
    "hook-load": {"hook": {"mass_kg": 400.0}, "rigging": {"kind": "single", "leg_length_m": 2.0}},
    "rigid-load": {"load": {"size_m": [2.0, 1.0, 1.0]}, "rigging": {"kind": "single", "leg_length_m": 1.0}},
    "elastic-rope": {"rope": {"stiffness_kN_per_m": 900.0, "bounce_damping_ratio": 0.02}},
    "sling-load": {"rigging": {"kind": "single", "leg_length_m": 2.0}},
    "point-load": {"tag_lines": [{"attach_m": [0.0, 0.0, 0.0], "anchor_m": [-9.0, 0.0, 29.0], "length_m": 10.0}]},
}
#: Models the batch engine leaves to the single-run solver (tag lines and ground contact:
#: ``hook_engine.supported``); their rows must still come back, from it.
_SINGLE_RUN_ONLY = {"point-load"}


def test_every_model_on_the_batch_engine_matches_solve_ivp():
    from swingsim.dynamics.registry import MODELS

    assert set(_EVERY_MODEL) == set(MODELS)  # a new model needs a scene here
    move = {"moves": [{"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 6.0, "speed_m_s": 1.0,
                       "accel_m_s2": 0.6}], "start": {"swing_deg": [4.0, -2.0]}}
    scenes = [make_scene(dict(move, **upd), duration_s=20.0) for upd in _EVERY_MODEL.values()]
    got = batch.run_chunk(scenes)
    for name, sc, g in zip(_EVERY_MODEL, scenes, got):
        # reference: scipy solve_ivp, DOP853 at rtol 1e-10 (swingsim.simulation.simulate), summarised
        s = summarize(simulate(sc)).data
        assert s["model"] == name and g["model"] == name, name
        assert g["engine"] == ("single" if name in _SINGLE_RUN_ONLY else "batch"), name
        for k in ("peak_rope_angle_deg", "residual_rope_angle_deg"):
            assert g[k] == pytest.approx(s[k], abs=1e-3), (name, k)  # 1e-3 deg: ten times the study's goal
        assert g["peak_hook_load_kN"] == pytest.approx(s["peak_hook_load_kN"], rel=2e-3), name


#: An invented rated capacity chart (radius_m, capacity_kg).
_CHART_CSV = "# invented test chart\nradius_m,capacity_kg\n2,9000\n10,9000\n20,5000\n30,3000\n"


def test_leg_tension_and_chart_utilisation_peaks_match_the_single_run(tmp_path):
    # The batch summaries' peak_leg_tension_kN (largest leg) and peak_utilisation_pct (dynamic
    # chart utilisation) against the single run's summary of DOP853 at rtol 1e-10
    # (swingsim.simulation.simulate + summarize), which defines them (metrics/models.py,
    # metrics/chart.py): 0.2 %, as the tension peaks above.  A slew and a trolley run out move
    # the load across the chart's sloping part, so the radius counts, not only the tension.
    from swingsim.scene import scene_from_dict

    (tmp_path / "chart.csv").write_text(_CHART_CSV)
    hook = {"mass_kg": 400.0, "size_m": [0.5, 0.4, 0.9]}
    riggings = {
        "point-mass": {},
        "leg below a hook block": {"hook": hook, "rigging": {"kind": "single", "leg_length_m": 2.5}},
        "rigid load on a leg": {"load": {"mass_kg": 2500.0, "size_m": [2.0, 1.0, 1.0]},
                                "rigging": {"kind": "single", "leg_length_m": 1.0, "attach_m": [[0.3, 0.0, 0.5]]}},
        "elastic rope": {"rope": {"length_m": 14.0, "stiffness_kN_per_m": 900.0, "bounce_damping_ratio": 0.02}},
        "bridle under a hook block": {"hook": hook, "load": {"mass_kg": 3000.0, "size_m": [4.0, 0.3, 1.0]},
                                      "rigging": {"kind": "bridle", "leg_length_m": 4.0,
                                                  "attach_m": [[-1.5, 0.0, 0.5], [1.5, 0.0, 0.5]]}},
    }
    scenes = []
    for upd in riggings.values():
        d = {"title": "chart and legs", "duration_s": 20.0,
             "crane": {"kind": "tower", "suspension_m": [18.0, 0.0, 40.0], "slew_center_m": [0.0, 0.0],
                       "chart_file": "chart.csv", "chart_includes": ["rigging", "hook"]},
             "rope": {"length_m": 14.0}, "load": {"mass_kg": 2000.0},
             "moves": [{"axis": "slew", "profile": "trapezoid", "start_s": 1.0, "angle_deg": 30.0,
                        "speed_deg_s": 5.0, "accel_deg_s2": 2.0},
                       {"axis": "radius", "profile": "trapezoid", "start_s": 1.0, "distance_m": 6.0,
                        "speed_m_s": 1.0, "accel_m_s2": 0.5}]}
        for key, value in upd.items():
            d[key] = {**d.get(key, {}), **value}
        scenes.append(scene_from_dict(d, file="chart_and_legs.toml", base_dir=tmp_path))
    got = batch.run_chunk(scenes)
    for name, sc, g in zip(riggings, scenes, got):
        s = summarize(simulate(sc)).data
        assert g["engine"] == "batch", name
        assert s["peak_utilisation_pct"] > 40.0, name  # the chart is in play
        assert g["peak_utilisation_pct"] == pytest.approx(s["peak_utilisation_pct"], rel=2e-3), name
        if name == "point-mass":  # no sling legs in the model: neither run reports them
            assert g["peak_leg_tension_kN"] is None and s.get("peak_leg_tension_kN") is None
        elif name.startswith("bridle"):  # resolved by the model's rigging geometry: single run only
            assert g["peak_leg_tension_kN"] is None and s["peak_leg_tension_kN"] > 0.0
        else:
            assert g["peak_leg_tension_kN"] == pytest.approx(s["peak_leg_tension_kN"], rel=2e-3), name
    # without a chart the key stays empty on both paths
    plain = batch.run_chunk([make_scene(duration_s=10.0)])[0]
    assert plain["peak_utilisation_pct"] is None
