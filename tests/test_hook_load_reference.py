"""Hook block, rigid load, elastic rope: checks against results from outside the project.

Each test names its source beside the check; expected values are computed in
the test from the published formula, not copied from a run of the code.
"""

import math

import numpy as np
import pytest
from scipy.linalg import eigh

from swingsim import constants
from swingsim.dynamics.hook_load import HookLoadModel
from swingsim.dynamics.rigging import box_inertia, cylinder_inertia
from swingsim.metrics.single import summarize
from swingsim.simulation import simulate

from conftest import make_scene

G = constants.STANDARD_GRAVITY


def _crossings(t, x):
    idx = np.nonzero((x[:-1] < 0) & (x[1:] >= 0))[0]
    return t[idx] - x[idx] * (t[idx + 1] - t[idx]) / (x[idx + 1] - x[idx])


def _two_body_MK(m1, m, L1, d, kG2):
    """Linearised rope + hook + body (REFERENCES: Rope L1 + hook m1 + rigid body)."""
    M = np.array([[(m1 + m) * L1**2, m * L1 * d], [m * L1 * d, m * (d * d + kG2)]])
    K = G * np.diag([(m1 + m) * L1, m * d])
    return M, K


# -- normal modes -------------------------------------------------------------------------

def test_double_pendulum_modes_closed_form():
    # Linear double pendulum, closed form (textbook; e.g. Goldstein, Classical Mechanics, ch. 6):
    # omega^2 = (g/2) [ (1+R) S -/+ sqrt((1+R)^2 S^2 - 4 (1+R)/(L1 L2)) ], R = m2/m1, S = 1/L1 + 1/L2
    m1, m2, L1, L2 = 100.0, 1000.0, 10.0, 2.0
    sc = make_scene({"hook": {"mass_kg": m1}, "rigging": {"leg_length_m": L2},
                     "load": {"mass_kg": m2}, "rope": {"length_m": L1}})
    R, S = m2 / m1, 1 / L1 + 1 / L2
    disc = math.sqrt((1 + R) ** 2 * S * S - 4 * (1 + R) / (L1 * L2))
    w = [math.sqrt(G / 2 * ((1 + R) * S - disc)), math.sqrt(G / 2 * ((1 + R) * S + disc))]
    got = HookLoadModel(sc).mode_periods_s()
    assert got == pytest.approx([2 * math.pi / w[0], 2 * math.pi / w[1]], rel=1e-8)


def test_equal_double_pendulum_modes():
    # Equal masses and lengths: omega^2 = (g/L)(2 -/+ sqrt 2) (textbook)
    sc = make_scene({"hook": {"mass_kg": 500.0}, "rigging": {"leg_length_m": 4.0},
                     "load": {"mass_kg": 500.0}, "rope": {"length_m": 4.0}})
    w2 = [G / 4.0 * (2 - math.sqrt(2)), G / 4.0 * (2 + math.sqrt(2))]
    assert HookLoadModel(sc).mode_periods_s() == pytest.approx([2 * math.pi / math.sqrt(x) for x in w2],
                                                               rel=1e-8)


def test_double_pendulum_simulated_against_linear_modal_solution():
    # Small-amplitude motion = superposition of the normal modes of the linearised system
    # (textbook modal analysis; M, K as in REFERENCES for a point load, k_G = 0, d = L2).
    m1, m2, L1, L2, th0 = 300.0, 1200.0, 8.0, 3.0, math.radians(0.3)
    sc = make_scene({"hook": {"mass_kg": m1}, "rigging": {"leg_length_m": L2},
                     "load": {"mass_kg": m2}, "rope": {"length_m": L1},
                     "start": {"swing_deg": [0.3, 0.0]}}, duration_s=20.0)
    traj = simulate(sc)
    assert traj.valid
    M, K = _two_body_MK(m1, m2, L1, L2, 0.0)
    w2, phi = eigh(K, M)
    c = np.linalg.solve(phi, np.array([th0, th0]))  # start: both angles th0, at rest
    t = np.linspace(0, 20, 801)
    lin = (phi @ (c[:, None] * np.cos(np.sqrt(w2)[:, None] * t[None, :])))
    Y = traj.state(t)
    th1, th2 = np.arcsin(Y[:, 0]), np.arcsin(Y[:, 2])
    # nonlinear corrections are O(theta^2) ~ 3e-5 of the amplitude
    assert np.max(np.abs(th1 - lin[0])) < 2e-3 * th0
    assert np.max(np.abs(th2 - lin[1])) < 2e-3 * th0


def test_rigid_load_modes_match_linearised_two_body_matrices():
    # REFERENCES (rope L1 + hook m1 + rigid body, CG d below the hook, radius of gyration k_G):
    # M = [[(m1+m) L1^2, m L1 d], [m L1 d, m (d^2 + k_G^2)]], K = g diag((m1+m) L1, m d),
    # one pair per swing plane (x-z swings turn about y, y-z swings about x).
    m1, m, L1 = 600.0, 8000.0, 12.0
    size = (6.0, 0.3, 2.0)
    half, leg = 2.5, 4.0
    sc = make_scene({"hook": {"mass_kg": m1}, "rope": {"length_m": L1},
                     "load": {"mass_kg": m, "size_m": list(size)},
                     "rigging": {"kind": "bridle", "leg_length_m": leg,
                                 "attach_m": [[-half, 0.0, 1.0], [half, 0.0, 1.0]]}})
    d = 1.0 + math.sqrt(leg**2 - half**2)
    I = box_inertia(m, size)
    want = []
    for Iax in (I[1], I[0]):
        M, K = _two_body_MK(m1, m, L1, d, Iax / m)
        want += list(2 * math.pi / np.sqrt(eigh(K, M, eigvals_only=True)))
    assert HookLoadModel(sc).mode_periods_s() == pytest.approx(sorted(want, reverse=True), rel=1e-7)


@pytest.mark.parametrize("shape", ["rod", "box", "cylinder"])
def test_physical_pendulum_limit(shape):
    # Physical pendulum T = 2 pi sqrt(I_O / (m g d)) (Meriam & Kraige, Engineering Mechanics:
    # Dynamics). Uniform rod about one end: 2 pi sqrt(2 l / (3 g)); box pivot d above the
    # centre: equivalent length d + (b^2 + h^2) / (12 d).  Here the rope is 1e-5 m long, so
    # the rope's end is a fixed pivot to 1e-5; the longest mode is the physical pendulum.
    m = 1000.0
    if shape == "rod":
        l = 2.0
        load = {"mass_kg": m, "size_m": [0.001, 0.001, l]}
        attach = [[0.0, 0.0, l / 2]]
        want = 2 * math.pi * math.sqrt(2 * l / (3 * G))
    elif shape == "box":
        b, h, d = 1.6, 0.9, 1.2  # b along x (swing plane x-z), h vertical, pivot d above centre
        load = {"mass_kg": m, "size_m": [b, 0.5, h]}
        attach = [[0.0, 0.0, d]]
        want = 2 * math.pi * math.sqrt((d + (b * b + h * h) / (12 * d)) / G)
    else:
        D, ell, d = 0.6, 3.0, 0.8  # horizontal pipe along y, pivot d above its axis
        load = {"mass_kg": m, "size_m": [D, ell, D], "shape": "cylinder"}
        attach = [[0.0, 0.0, d]]
        Iy = cylinder_inertia(m, [D, ell, D])[0]  # about x: perpendicular to the axis (y)
        want_y = 2 * math.pi * math.sqrt((Iy + m * d * d) / (m * G * d))
        Ix = m * D * D / 8  # about the axis (swing in the x-z plane turns about y = the axis)
        want = 2 * math.pi * math.sqrt((Ix + m * d * d) / (m * G * d))
    sc = make_scene({"rope": {"length_m": 1e-5}, "load": load,
                     "rigging": {"kind": "single", "leg_length_m": 0.0, "attach_m": attach}})
    periods = HookLoadModel(sc).mode_periods_s()
    if shape == "cylinder":
        assert sorted(periods, reverse=True)[:2] == pytest.approx(sorted([want, want_y], reverse=True),
                                                                 rel=1e-4)
    else:
        assert periods[0] == pytest.approx(want, rel=1e-4)


def test_box_swing_simulated_period():
    # Simulated small swing of a box on a short rope: its period must be the longest mode of
    # the linearised rope + rigid body (REFERENCES matrices, m1 = 0), measured from crossings.
    m, b, h, d, L1 = 1000.0, 1.6, 0.9, 1.2, 0.5
    sc = make_scene({"rope": {"length_m": L1}, "load": {"mass_kg": m, "size_m": [b, 0.5, h]},
                     "rigging": {"kind": "single", "leg_length_m": 0.0, "attach_m": [[0, 0, d]]},
                     "start": {"swing_deg": [0.5, 0.0]}}, duration_s=30.0)
    traj = simulate(sc)
    assert traj.valid
    M, K = _two_body_MK(0.0, m, L1, d, (b * b + h * h) / 12)
    w2, phi = eigh(K, M)
    want = 2 * math.pi / math.sqrt(w2[0])
    t = np.linspace(0, 30, 30001)
    Y = traj.state(t)
    theta = np.stack([np.arcsin(Y[:, 0]), -Y[:, 3]])  # CG line angle toward +x is -b (R = Ry(b))
    eta = phi[:, 0] @ M @ theta  # the slow mode's modal coordinate
    tc = _crossings(t, eta)
    assert len(tc) > 5
    assert np.mean(np.diff(tc)) == pytest.approx(want, rel=1e-4)


# -- elastic rope ----------------------------------------------------------------------------

def _bounce_scene(**rope):
    r = {"length_m": 10.0}
    r.update(rope)
    return make_scene({"rope": r, "load": {"mass_kg": 2000.0}, "start": {"rope_preload": "none"}},
                      duration_s=3.0)


def test_rope_stiffness_from_modulus_and_bounce_period():
    # k = n^2 E A / L_r for n falls (common practice), A = f pi d^2 / 4; E = 100 GPa and
    # f = 0.58 are typical values (from memory; Feyrer, Wire Ropes) used as parameters.
    # Bounce period 2 pi sqrt(m / k) (spring-mass, textbook).
    E, d, f, n, lead, L = 100e9, 0.016, 0.58, 4, 30.0, 10.0
    sc = _bounce_scene(modulus_GPa=E / 1e9, diameter_m=d, fill_factor=f, falls=n, lead_length_m=lead)
    traj = simulate(sc)
    assert traj.valid
    k = n * n * E * (f * math.pi * d * d / 4) / (n * L + lead)
    T = 2 * math.pi * math.sqrt(2000.0 / k)
    t = np.linspace(0, 3, 300001)
    # the stretched length (no hoisting: lambda constant)
    x = traj.state(t)[:, traj.model.rope_length_index]
    tc = _crossings(t, x - np.mean(x))
    # L_r uses the loaded length here; the model's unstretched length differs by n delta / L_r ~ 5e-4
    assert np.mean(np.diff(tc)) == pytest.approx(T, rel=1e-3)
    assert HookLoadModel(sc).bounce_period_s() == pytest.approx(T, rel=1e-3)


def test_suddenly_applied_load_dynamic_factor_two():
    # A load applied suddenly to an elastic member: peak force 2 W (Timoshenko & Gere,
    # Mechanics of Materials, impact loading); the stretch swings between 0 and 2 delta_st.
    sc = _bounce_scene(stiffness_kN_per_m=1500.0)
    traj = simulate(sc)
    assert traj.valid
    s = summarize(traj)
    W = 2000.0 * G
    assert s["peak_rope_tension_kN"] * 1e3 / W == pytest.approx(2.0, rel=1e-7)
    assert s["dynamic_factor"] == pytest.approx(2.0, rel=1e-7)
    stretch = traj.sample(np.linspace(0, 3, 3001))["rope_stretch_m"]
    assert np.max(stretch) == pytest.approx(2 * W / 1.5e6, rel=1e-5)


def test_given_stiffness_bounce_period():
    # 2 pi sqrt(m / k) with the given k (textbook spring-mass); hook + load on one leg bounce as
    # one mass since the leg is inextensible.
    k = 800e3
    sc = make_scene({"rope": {"stiffness_kN_per_m": k / 1e3}, "hook": {"mass_kg": 300.0},
                     "rigging": {"leg_length_m": 2.0}, "load": {"mass_kg": 1700.0},
                     "start": {"rope_preload": "none"}}, duration_s=3.0)
    traj = simulate(sc)
    assert traj.valid
    t = np.linspace(0, 3, 300001)
    x = traj.state(t)[:, traj.model.rope_length_index]
    tc = _crossings(t, x - np.mean(x))
    assert np.mean(np.diff(tc)) == pytest.approx(2 * math.pi * math.sqrt(2000.0 / k), rel=1e-5)


def test_slack_rope_is_reported():
    # A hoist start so hard that the load outruns the rope: tension would fall to zero.
    sc = make_scene({"rope": {"stiffness_kN_per_m": 300.0}, "load": {"mass_kg": 500.0},
                     "moves": [{"axis": "hoist", "profile": "trapezoid", "distance_m": -3.0,
                                "speed_m_s": 3.0, "accel_m_s2": 15.0}]}, duration_s=5.0)
    traj = simulate(sc)
    assert traj.status == "slack"
    assert "slack" in traj.message and "elastic" in traj.message


# -- energy ------------------------------------------------------------------------------------

@pytest.mark.parametrize("case", ["hook+point", "hook+bridle+elastic", "hook+single+rigid"])
def test_energy_conserved_without_damping_and_wind(case):
    # Conservative system (fixed support, constant rope length, no damping, no wind): total
    # energy is constant (Lagrange / Noether, textbook).  DOP853 at rtol 1e-10.
    up = {"start": {"swing_deg": [20.0, -12.0], "swing_rate_deg_s": [3.0, 5.0]}}
    if case == "hook+point":
        up.update(hook={"mass_kg": 300.0}, rigging={"leg_length_m": 3.0})
    elif case == "hook+bridle+elastic":
        up.update(hook={"mass_kg": 400.0}, rope={"length_m": 10.0, "stiffness_kN_per_m": 4000.0},
                  load={"mass_kg": 5000.0, "size_m": [5.0, 0.4, 1.6]},
                  rigging={"kind": "bridle", "leg_length_m": 3.5,
                           "attach_m": [[-2.0, 0.0, 0.8], [2.0, 0.0, 0.8]]})
    else:
        up.update(hook={"mass_kg": 250.0}, load={"mass_kg": 1200.0, "size_m": [0.8, 1.2, 2.0]},
                  rigging={"kind": "single", "leg_length_m": 1.5})
    traj = simulate(make_scene(up, duration_s=20.0))
    assert traj.valid, traj.message
    E = traj.sample(np.linspace(0, 20, 401))["energy_J"]
    model = traj.model
    # the swing's energy scale, independent of the datum
    scale = model.hanging_mass_kg * G * model.initial_rope_length_m
    assert np.max(np.abs(E - E[0])) < 1e-8 * scale
    assert np.ptp(E) < 1e-8 * scale


# -- point-mass limits -----------------------------------------------------------------------

MOVE = {"moves": [{"axis": "x", "profile": "trapezoid", "distance_m": 8.0, "speed_m_s": 1.0,
                   "accel_m_s2": 0.4}]}


def _core(L, **extra):
    up = {"rope": {"length_m": L}}
    up.update(MOVE)
    up.update(extra)
    return simulate(make_scene(up, duration_s=25.0))


def _angle_err(a, b, t):
    na, nb = a.sample(t)["rope_dir"], b.sample(t)["rope_dir"]
    return float(np.max(np.linalg.norm(na - nb, axis=1)))


def test_sling_load_is_the_point_mass_model_on_the_longer_rope():
    # Massless knot between rope and sling: the pair is one straight rope (exact limit).
    t = np.linspace(0, 25, 501)
    sl = simulate(make_scene({"rope": {"length_m": 8.0}, "rigging": {"leg_length_m": 2.0}, **MOVE},
                             duration_s=25.0))
    assert sl.model.name == "sling-load"
    core = _core(10.0)
    assert core.model.name == "point-mass"
    assert _angle_err(sl, core, t) < 1e-8
    assert np.max(np.abs(sl.sample(t)["rope_tension_N"] - core.sample(t)["rope_tension_N"])) < 1e-6 * 1e4


def test_hook_load_converges_to_point_mass_as_hook_and_leg_vanish():
    # Limit hook mass -> 0 with the leg fixed: rope and leg one straight line (the point mass on
    # L1 + L2); the difference must shrink in proportion to the hook's mass.
    t = np.linspace(0, 25, 501)
    core = _core(10.0)
    errs = []
    for mh in (20.0, 5.0):
        tr = simulate(make_scene({"rope": {"length_m": 9.5}, "hook": {"mass_kg": mh},
                                  "rigging": {"leg_length_m": 0.5}, **MOVE}, duration_s=25.0))
        assert tr.valid
        errs.append(_angle_err(tr, core, t))
    # peak swing here is 0.11 rad: the 5 kg hook block changes the swing by 0.2% of it
    assert errs[1] < 5e-4
    assert errs[1] < errs[0] / 3  # first order in the hook's mass (4x for 4x lighter)


def test_rigid_load_converges_to_point_mass_as_it_shrinks():
    # Inertia -> 0 and CG offset -> 0: a tiny cube on the rope's end is a point mass on L + s/2.
    t = np.linspace(0, 25, 501)
    errs = []
    for s in (0.2, 0.05):
        tr = simulate(make_scene({"rope": {"length_m": 10.0 - s / 2},
                                  "load": {"mass_kg": 1000.0, "size_m": [s, s, s]},
                                  "rigging": {"kind": "single", "leg_length_m": 0.0}, **MOVE},
                                 duration_s=25.0))
        assert tr.valid and tr.model.name == "rigid-load"
        errs.append(_angle_err(tr, _core(10.0), t))
    assert errs[1] < 1e-5
    assert errs[1] < errs[0] / 10  # second order in the size (16x for 4x smaller)


def test_elastic_rope_converges_to_inextensible_as_stiffness_grows():
    # Stiffness -> infinity: the spring pendulum becomes the rigid-rope pendulum.
    t = np.linspace(0, 25, 501)
    core = _core(10.0)
    errs = []
    for k in (2e3, 2e4):
        tr = simulate(make_scene({"rope": {"length_m": 10.0, "stiffness_kN_per_m": k}, **MOVE},
                                 duration_s=25.0))
        assert tr.valid and tr.model.name == "elastic-rope"
        errs.append(_angle_err(tr, core, t))
    assert errs[1] < 2e-6
    assert errs[1] < errs[0] / 8  # first order in the compliance (10x for 10x stiffer)


def test_point_mass_summary_has_one_mode_period():
    s = summarize(_core(10.0))
    assert s["mode_periods_s"] == pytest.approx([2 * math.pi * math.sqrt(10.0 / G)], rel=1e-12)


# -- leg tensions: statics ---------------------------------------------------------------------

def test_symmetric_bridle_static_leg_tension_rule():
    # Common practice rigging rule: each of n legs carries W / n / cos(angle from vertical).
    m, half, leg = 6000.0, 2.0, 5.0
    sc = make_scene({"load": {"mass_kg": m, "size_m": [5.0, 0.3, 1.2]}, "hook": {"mass_kg": 300.0},
                     "rigging": {"kind": "bridle", "leg_length_m": leg,
                                 "attach_m": [[-half, 0, 0.6], [half, 0, 0.6]]}})
    model = HookLoadModel(sc)
    rule = m * G / 2 / (math.sqrt(leg**2 - half**2) / leg)
    assert model.static_leg_tension_N() == pytest.approx([rule, rule], rel=1e-12)
    assert model.hanging_leg_tension_N() == pytest.approx([rule, rule], rel=1e-9)
    traj = simulate(sc)
    assert traj.sample(np.array([0.0]))["leg_tension_N"][0] == pytest.approx([rule, rule], rel=1e-9)


def test_off_centre_bridle_hanging_tensions_satisfy_statics():
    # Statics (textbook): the leg forces balance the weight, and the CG hangs under the hook.
    m = 4000.0
    sc = make_scene({"load": {"mass_kg": m, "size_m": [4.0, 0.4, 1.0], "cg_offset_m": [0.6, 0, 0]},
                     "rigging": {"kind": "bridle", "leg_length_m": 3.0,
                                 "attach_m": [[-2.6, 0, 0.5], [1.4, 0, 0.5]]}})
    model = HookLoadModel(sc)
    T = model.hanging_leg_tension_N()
    from swingsim.dynamics.rigging import rotation
    R = rotation(*model.geometry.rest_tilt_rad)
    H = model.geometry.hook_b @ R.T
    assert abs(H[0]) < 1e-9 and abs(H[1]) < 1e-9  # hook straight above the CG
    e = (model.geometry.hook_b - model.attach_points_b) @ R.T
    e /= np.linalg.norm(e, axis=1)[:, None]
    assert T @ e == pytest.approx([0.0, 0.0, m * G], abs=1e-6)
    assert T[0] < T[1]  # the leg nearer the CG carries more


def test_spreader_drop_legs_lever_rule():
    # Vertical drop legs of a lifting beam share the weight by the lever rule (statics):
    # T1 = W b / (a + b), a, b the CG's distances from the legs.
    m, a, b = 5000.0, 1.5, 2.5
    sc = make_scene({"load": {"mass_kg": m, "size_m": [5.0, 1.0, 1.0]}, "hook": {"mass_kg": 200.0},
                     "rigging": {"kind": "spreader", "leg_length_m": 1.0, "top_leg_length_m": 3.0,
                                 "attach_m": [[-a, 0, 0.5], [b, 0, 0.5]]}})
    model = HookLoadModel(sc)
    T = model.hanging_leg_tension_N()
    # the rigid assembly tilts by phi until the CG is under the hook and the drop legs tilt
    # with it: the legs share the weight's component along them, W cos(phi), by the lever rule
    from swingsim.dynamics.rigging import rotation
    cphi = rotation(*model.geometry.rest_tilt_rad)[2, 2]
    assert cphi < 0.999  # it does tilt
    assert T == pytest.approx([m * G * cphi * b / (a + b), m * G * cphi * a / (a + b)], rel=1e-9)


def test_lift_off_with_hoist_at_speed_dynamic_factor():
    # Load picked up by a rope that tightens with the hoist already at speed v: peak force
    # W (1 + v / sqrt(g delta_st)) (derived: after lift-off the load starts from rest with the
    # static stretch and the stretch rate v, so the amplitude about delta_st is v / omega,
    # omega^2 = k / m = g / delta_st; cf. Timoshenko & Gere's impact factors).
    m, k, v = 2000.0, 2.0e6, 0.2
    W = m * G
    dst = W / k
    # the hoist reaches v in 0.02 s; 0.1 m of slack is taken up at full speed, so the rope
    # starts to stretch, and the load lifts off, while the hoist runs at constant speed.
    # A long lead (2 km of rope to the drum) keeps k constant while the hoist reels in (the
    # formula assumes constant k; k ~ 1 / L_r changes by 2e-6 over the quarter period here).
    sc = make_scene({"rope": {"stiffness_kN_per_m": k / 1e3, "lead_length_m": 2000.0},
                     "load": {"mass_kg": m},
                     "start": {"rope_preload": "lift-off", "rope_slack_m": 0.1},
                     "moves": [{"axis": "hoist", "profile": "trapezoid", "distance_m": 1.0,
                                "speed_m_s": v, "accel_m_s2": 10.0, "decel_m_s2": 0.05}]},
                    duration_s=8.0)
    traj = simulate(sc)
    assert traj.valid, traj.message
    t_lift = traj.model.lift_off_time_s
    assert t_lift == pytest.approx(0.02 + (0.1 + dst - 0.002) / v, rel=1e-9)
    w = math.sqrt(k / m)
    t = np.linspace(t_lift, t_lift + 2 * math.pi / w, 4001)
    T = traj.sample(t)["rope_tension_N"]
    assert np.max(T) / W == pytest.approx(1 + v / math.sqrt(G * dst), rel=1e-5)
    assert np.min(T) / W == pytest.approx(1 - v / math.sqrt(G * dst), rel=1e-4)
    before = traj.sample(np.array([0.5 * t_lift, 0.99 * t_lift]))
    assert np.allclose(before["load_vel"], 0.0)
    assert before["rope_tension_N"][0] == 0.0 < before["rope_tension_N"][1] < W  # slack, then taut


def test_lift_off_too_fast_goes_slack():
    # v / sqrt(g delta_st) > 1: the load overshoots its static stretch by more than delta_st,
    # the rope would go slack on the rebound (derived from the same solution): reported, not hidden
    sc = make_scene({"rope": {"stiffness_kN_per_m": 2000.0}, "load": {"mass_kg": 2000.0},
                     "start": {"rope_preload": "lift-off"},
                     "moves": [{"axis": "hoist", "profile": "trapezoid", "distance_m": 1.0,
                                "speed_m_s": 0.5, "accel_m_s2": 10.0}]}, duration_s=4.0)
    traj = simulate(sc)
    assert traj.status == "slack" and not traj.valid
    assert traj.t_end_s > traj.model.lift_off_time_s


def test_four_leg_bridle_symmetric_shares_and_three_leg_statics():
    # Four equal legs to the corners of a symmetric load: by symmetry each takes W / 4 / cos
    # (common practice rule); three legs: statically determinate, the legs balance the weight
    # exactly (statics, textbook).
    m = 8000.0
    four = make_scene({"load": {"mass_kg": m, "size_m": [4.0, 2.0, 1.0]},
                       "rigging": {"kind": "bridle", "leg_length_m": 4.0,
                                   "attach_m": [[-1.8, -0.9, 0.5], [1.8, -0.9, 0.5],
                                                [-1.8, 0.9, 0.5], [1.8, 0.9, 0.5]]}})
    model = HookLoadModel(four)
    cos = math.sqrt(16.0 - 1.8**2 - 0.9**2) / 4.0
    assert model.hanging_leg_tension_N() == pytest.approx([m * G / 4 / cos] * 4, rel=1e-9)
    assert model.static_leg_tension_N() == pytest.approx([m * G / 4 / cos] * 4, rel=1e-12)
    three = make_scene({"load": {"mass_kg": m, "size_m": [4.0, 2.0, 1.0]},
                        "rigging": {"kind": "bridle", "leg_length_m": [4.0, 4.2, 3.9],
                                    "attach_m": [[-1.8, -0.9, 0.5], [1.8, -0.6, 0.5], [0.2, 0.9, 0.5]]}})
    model = HookLoadModel(three)
    T = model.hanging_leg_tension_N()
    from swingsim.dynamics.rigging import rotation
    R = rotation(*model.geometry.rest_tilt_rad)
    e = (model.geometry.hook_b - model.attach_points_b) @ R.T
    e /= np.linalg.norm(e, axis=1)[:, None]
    assert T @ e == pytest.approx([0.0, 0.0, m * G], abs=1e-6)
    assert np.all(T > 0)
    assert np.linalg.norm(model.geometry.hook_b - model.attach_points_b, axis=1) == pytest.approx([4.0, 4.2, 3.9],
                                                                                      abs=1e-9)
