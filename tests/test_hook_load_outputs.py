"""Hook-and-load outputs: summary keys, time-series columns, cautions, tensions under hoisting."""

import json
import math
from pathlib import Path

import numpy as np
import pytest

from swingsim import constants
from swingsim import load_scene
from swingsim.cli.main import main
from swingsim.dynamics.hook_load import HookLoadModel
from swingsim.metrics.single import summarize
from swingsim.report.tables import timeseries_columns
from swingsim.dynamics.registry import MODELS, SELECTORS as MODEL_SELECTORS
from swingsim.simulation import simulate

from conftest import make_scene

G = constants.STANDARD_GRAVITY
ROOT = Path(__file__).resolve().parent.parent
DEMOS = ["panel_bridle_hook_block", "compact_load_short_sling", "springy_multifall_rope"]


def test_models_are_registered_on_import_of_solve():
    for name in ("hook-load", "rigid-load", "elastic-rope", "sling-load"):
        assert MODELS[name] is HookLoadModel
    assert any(getattr(f, "__name__", "") == "model_name" for f in MODEL_SELECTORS)
    assert simulate(make_scene(duration_s=1.0)).model.name == "point-mass"


def test_size_alone_keeps_the_point_mass_model():
    # the core's meaning of load.size_m (drawing, clearance) without a hook block or rigging
    sc = make_scene({"load": {"mass_kg": 900.0, "size_m": [2.0, 1.0, 1.0]}}, duration_s=1.0)
    assert not sc.rigid_load
    assert simulate(sc).model.name == "point-mass"


@pytest.mark.parametrize("name", DEMOS)
def test_demo_scenes_summary(name):
    sc = load_scene(ROOT / "scenes" / f"{name}.toml")
    traj = simulate(sc)
    assert traj.valid, traj.message
    s = summarize(traj)
    mp = s["mode_periods_s"]
    assert mp == sorted(mp, reverse=True) and len(mp) >= 2
    assert s["natural_period_s"] == mp[0]
    rows = s["leg_tensions"]
    assert len(rows) == sc.rigging.legs
    for r in rows:
        assert r["peak_kN"] >= r["hanging_kN"] > 0
        assert r["dynamic_factor"] == pytest.approx(r["peak_kN"] / r["hanging_kN"])
    assert s["peak_leg_tension_kN"] == max(r["peak_kN"] for r in rows)
    cols = timeseries_columns(traj)
    for c in ("hook_x_m", "hook_y_m", "hook_z_m", "load_tilt_x_deg", "load_tilt_y_deg", "load_tilt_deg",
              "leg_1_tension_kN"):
        assert c in cols, c
    t = traj.sample_times()
    hook = traj.sample(t)["hook"]
    assert np.array_equal(cols["hook_z_m"], hook[:, 2])
    # the hook hangs below the suspension point by the rope length
    d = np.linalg.norm(hook - traj.sample(t)["suspension"], axis=1)
    assert np.allclose(d, traj.sample(t)["rope_length"], rtol=1e-12)


def test_wll_caution_only_when_exceeded():
    base = {"hook": {"mass_kg": 300.0}, "load": {"mass_kg": 4000.0, "size_m": [4.0, 0.3, 1.0]},
            "moves": [{"axis": "x", "profile": "trapezoid", "distance_m": 6.0, "speed_m_s": 1.0,
                       "accel_m_s2": 0.6}]}
    rig = {"kind": "bridle", "leg_length_m": 3.0, "attach_m": [[-1.5, 0, 0.5], [1.5, 0, 0.5]]}
    hang = 4000.0 * G / 2 / (math.sqrt(9 - 2.25) / 3) / 1e3
    low = summarize(simulate(make_scene({**base, "rigging": {**rig, "wll_kN": hang * 1.001}})))
    high = summarize(simulate(make_scene({**base, "rigging": {**rig, "wll_kN": hang * 2}})))
    assert low["leg_tensions"][0]["peak_kN"] > hang * 1.001
    assert sum("working load limit" in c and "Sling leg" in c for c in low["cautions"]) == 2
    assert not any("working load limit" in c and "Sling leg" in c for c in high["cautions"])
    assert all("rigging plan" in c for c in low["cautions"] if "Sling leg" in c)


def test_hoist_acceleration_tensions():
    # Vertical hoisting at constant acceleration a, no swing: T = m (g + a) (Newton, textbook),
    # for the hoist rope (hook + load) and the sling leg (load only).
    a, mh, m = 0.4, 300.0, 2000.0
    sc = make_scene({"hook": {"mass_kg": mh}, "rigging": {"leg_length_m": 2.0}, "load": {"mass_kg": m},
                     "moves": [{"axis": "hoist", "profile": "trapezoid", "start_s": 1.0, "distance_m": 3.0,
                                "speed_m_s": 0.8, "accel_m_s2": a}]}, duration_s=10.0)
    traj = simulate(sc)
    s = traj.sample(np.array([1.5, 2.5]))  # inside the acceleration phase (1 s to 3 s)
    assert s["rope_tension_N"] == pytest.approx([(mh + m) * (G + a)] * 2, rel=1e-9)
    assert s["leg_tension_N"][:, 0] == pytest.approx([m * (G + a)] * 2, rel=1e-9)


def test_measured_mode_periods_of_a_double_pendulum():
    # The spectrum of the free swing shows both normal modes at the linearised periods
    # (small amplitude; textbook modal analysis).
    sc = make_scene({"hook": {"mass_kg": 400.0}, "rigging": {"leg_length_m": 3.0},
                     "load": {"mass_kg": 1000.0}, "start": {"swing_deg": [1.0, 0.0],
                                                           "swing_rate_deg_s": [0.0, 0.0]},
                     "moves": [{"axis": "x", "profile": "trapezoid", "distance_m": 0.5,
                                "speed_m_s": 0.5, "accel_m_s2": 2.0}]}, duration_s=120.0)
    s = summarize(simulate(sc))
    mm, mp = s["measured_mode_periods_s"], s["mode_periods_s"]
    assert len(mm) == 2 and None not in mm
    assert mm == pytest.approx(mp, rel=5e-3)


def test_elastic_summary_keys_and_stiffness_source():
    sc = make_scene({"rope": {"length_m": 20.0, "modulus_GPa": 100.0, "diameter_m": 0.02, "falls": 2,
                              "stiffness_source": "rope maker's sheet (invented)"},
                     "load": {"mass_kg": 3000.0}}, duration_s=5.0)
    s = summarize(simulate(sc))
    assert s["model"] == "elastic-rope"
    assert "n^2 E A / L_r" in s["rope_stiffness_from"] and "invented" in s["rope_stiffness_from"]
    A = 0.58 * math.pi * 0.02**2 / 4
    k_loaded = 4 * 100e9 * A / (2 * 20.0)  # k = n^2 E A / (n L) (common practice)
    assert s["rope_stiffness_kN_per_m"] * 1e3 == pytest.approx(k_loaded, rel=1e-3)
    assert s["bounce_period_s"] == pytest.approx(2 * math.pi * math.sqrt(3000.0 / k_loaded), rel=1e-3)


def test_cli_run_writes_hook_columns(tmp_path):
    out = tmp_path / "out"
    assert main(["run", str(ROOT / "scenes" / "compact_load_short_sling.toml"), "--out", str(out),
                 "--quiet", "--no-plots"]) == 0
    s = json.loads((out / "summary.json").read_text())
    assert s["model"] == "hook-load" and s["leg_tensions"][0]["wll_kN"] == 40.0
    header = (out / "timeseries.csv").read_text().splitlines()[0].split(",")
    assert {"hook_x_m", "hook_y_m", "hook_z_m", "load_tilt_x_deg", "leg_1_tension_kN"} <= set(header)
    assert "Hook block and rigging" in (out / "summary.txt").read_text()


@pytest.mark.parametrize("case", ["bridle", "single"])
def test_start_swing_tilts_the_whole_system_rigidly(case):
    # issue interface: suspension point, hook and the load's CG on one straight line at the
    # swing angle, everything at rest relative to the suspension point
    rig = ({"kind": "bridle", "leg_length_m": 3.0, "attach_m": [[-1.5, 0, 0.5], [1.6, 0.1, 0.5]]}
           if case == "bridle" else {"kind": "single", "leg_length_m": 1.5})
    sc = make_scene({"hook": {"mass_kg": 300.0}, "rigging": rig,
                     "load": {"mass_kg": 3000.0, "size_m": [4.0, 0.4, 1.0]},
                     "start": {"swing_deg": [12.0, -7.0]}}, duration_s=2.0)
    s = simulate(sc).sample(np.array([0.0]))
    p, h, g = s["suspension"][0], s["hook"][0], s["load"][0]
    u = (g - p) / np.linalg.norm(g - p)
    assert np.linalg.norm(np.cross(h - p, u)) < 1e-9  # the hook on the line to the CG
    assert math.degrees(math.atan2(u[0], -u[2])) == pytest.approx(12.0, abs=1e-9)
    assert math.degrees(math.atan2(u[1], -u[2])) == pytest.approx(-7.0, abs=1e-9)
    assert np.allclose(s["load_vel"][0], 0.0, atol=1e-12)


def test_spreader_top_slings_static_rule():
    # symmetric lifting beam: each top sling carries W / 2 / cos(its angle from vertical)
    # (common practice sling angle factor); the drop legs W / 2 each.
    m, half, top = 6000.0, 2.0, 3.2
    sc = make_scene({"load": {"mass_kg": m, "size_m": [5.0, 1.0, 1.0]}, "hook": {"mass_kg": 200.0},
                     "rigging": {"kind": "spreader", "leg_length_m": 1.0, "top_leg_length_m": top,
                                 "attach_m": [[-half, 0, 0.5], [half, 0, 0.5]]}}, duration_s=1.0)
    s = simulate(sc).sample(np.array([0.5]))
    cos = math.sqrt(top**2 - half**2) / top
    assert s["top_sling_tension_N"][0] == pytest.approx([m * G / 2 / cos] * 2, rel=1e-9)
    assert s["leg_tension_N"][0] == pytest.approx([m * G / 2] * 2, rel=1e-9)


def test_steady_wind_offset_of_hook_and_rigid_load():
    # Steady wind: the rope leans at atan(F / (m g)), F = q Cf A, q = rho v^2 / 2 (ISO 2533 air,
    # the drag equation; REFERENCES), with m the total mass on the rope; a damped run settles there.
    rho, v, cf, A, m, mh = 1.225, 12.0, 1.2, 10.0, 3000.0, 400.0
    sc = make_scene({"hook": {"mass_kg": mh}, "wind": {"speed_m_s": v},
                     "load": {"mass_kg": m, "size_m": [4.0, 0.3, 2.5], "wind_area_m2": A,
                              "drag_coefficient": cf},
                     "rigging": {"kind": "bridle", "leg_length_m": 3.0,
                                 "attach_m": [[-1.5, 0, 1.25], [1.5, 0, 1.25]]},
                     "damping": {"ratio": 0.3}}, duration_s=150.0)
    want = math.atan(0.5 * rho * v * v * cf * A / ((m + mh) * G))
    traj = simulate(sc)
    n_rest = traj.model.rest_direction(10.0)
    assert math.atan2(n_rest[0], -n_rest[2]) == pytest.approx(want, rel=1e-12)
    n_end = traj.sample(np.array([150.0]))["rope_dir"][0]
    assert math.atan2(n_end[0], -n_end[2]) == pytest.approx(want, rel=1e-4)


def test_implausibly_stiff_rope_is_refused_unless_allowed():
    from swingsim.errors import SceneError
    from swingsim.scene.plausibility import check_plausible

    sc = make_scene({"rope": {"stiffness_kN_per_m": 1e8}})  # bounce near 1.6 kHz for a tonne
    with pytest.raises(SceneError) as ei:
        check_plausible(sc)
    msg = ei.value.one_line()
    assert "rope.stiffness_kN_per_m = 100000000.0" in msg and "Hz" in msg
    assert check_plausible(sc, allow=True)
    assert check_plausible(make_scene({"rope": {"stiffness_kN_per_m": 1e3}})) == []


def test_spreader_geometry_outputs_hang_from_the_hook():
    # the top slings' end lugs lie at top_leg_length_m from the hook, the drop legs at
    # leg_length_m from their attachment points (rigid assembly: at every instant)
    sc = load_scene(ROOT / "scenes" / "springy_multifall_rope.toml")
    traj = simulate(sc)
    s = traj.sample(np.linspace(0, traj.t_end_s, 50))
    d_top = np.linalg.norm(s["spreader_ends"] - s["hook"][:, None, :], axis=2)
    assert np.allclose(d_top, sc.rigging.top_leg_length_m, atol=1e-9)
    d_drop = np.linalg.norm(s["spreader_lugs"] - s["attach_points"], axis=2)
    assert np.allclose(d_drop, sc.rigging.leg_length_m[0], atol=1e-9)


def test_planar_bridle_swing_measures_exactly_the_in_plane_modes():
    # A bridle along x swung in the x-z plane moves only the two x-z modes: the hook on the
    # rope and the load turning about y. Their periods from the textbook two-body pendulum
    # (rope L1 + hook m1 + rigid body of radius of gyration k_G, CG d below the hook):
    # M = [[(m1+m) L1^2, m L1 d], [m L1 d, m (d^2 + k_G^2)]], K = g diag((m1+m) L1, m d);
    # the y-z modes hold no energy and are not reported (modal analysis, Meirovitch).
    from scipy.linalg import eigh

    m1, m, L1, size, half, leg = 600.0, 8000.0, 12.0, (6.0, 0.3, 2.0), 2.5, 4.0
    sc = make_scene({"hook": {"mass_kg": m1}, "rope": {"length_m": L1},
                     "load": {"mass_kg": m, "size_m": list(size)},
                     "start": {"swing_deg": [2.0, 0.0]},
                     "rigging": {"kind": "bridle", "leg_length_m": leg,
                                 "attach_m": [[-half, 0.0, 1.0], [half, 0.0, 1.0]]}}, duration_s=150.0)
    d = 1.0 + math.sqrt(leg**2 - half**2)
    kG2 = (size[0] ** 2 + size[2] ** 2) / 12.0  # uniform box about y (textbook)
    M = np.array([[(m1 + m) * L1**2, m * L1 * d], [m * L1 * d, m * (d**2 + kG2)]])
    K = G * np.diag([(m1 + m) * L1, m * d])
    in_plane = sorted(2 * math.pi / np.sqrt(eigh(K, M, eigvals_only=True)), reverse=True)
    s = summarize(simulate(sc))
    mp, mm, why = s["mode_periods_s"], s["measured_mode_periods_s"], s["mode_measurement_notes"]
    assert len(mp) == 4
    measured = [(p, x) for p, x in zip(mp, mm) if x is not None]
    assert [p for p, _ in measured] == pytest.approx(in_plane, rel=1e-7)
    for p, x in measured:
        assert x == pytest.approx(p, rel=5e-3)
    for p, x, reason in zip(mp, mm, why):
        if x is None:
            assert "no real energy" in reason
