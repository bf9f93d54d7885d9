"""The point-mass swing model against results from outside the project.

Each test names its source.  Expected values are computed from the published
formula in the test, not copied from a run of the code.
"""

import math

import numpy as np
import pytest
from scipy.optimize import brentq
from scipy.special import ellipk, j1, y1

from swingsim import constants
from swingsim.metrics.single import rope_angle_rad, summarize
from swingsim.simulation import simulate

from conftest import make_scene

G = constants.STANDARD_GRAVITY


def _crossings(traj, comp=0, t_from=0.0, rate=100.0):
    """Upward zero crossings of state component ``comp`` refined on the dense output."""
    t = np.arange(t_from, traj.t_end_s, 1.0 / rate)
    x = traj.state(t)[:, comp]
    idx = np.nonzero((x[:-1] < 0) & (x[1:] >= 0))[0]
    f = lambda s: traj.state(np.array([s]))[0, comp]  # noqa: E731
    return np.array([brentq(f, t[i], t[i + 1], xtol=1e-13) for i in idx])


def test_standard_gravity_is_the_cgpm_value():
    # 3rd CGPM (1901), ISO 80000-3: g_n = 9.80665 m/s^2 exactly
    assert constants.STANDARD_GRAVITY == 9.80665
    assert make_scene().gravity_m_s2 == 9.80665


def test_scipy_ellipk_convention_matches_abramowitz_stegun():
    # Abramowitz & Stegun (1964), Table 17.1: K(m = 0.5) = 1.8540747, K(0.75) = 2.1565156
    assert ellipk(0.5) == pytest.approx(1.8540747, abs=1e-7)
    assert ellipk(0.75) == pytest.approx(2.1565156, abs=1e-7)


@pytest.mark.parametrize("theta0_deg", [10.0, 30.0, 60.0, 80.0])
def test_large_amplitude_period_elliptic_integral(theta0_deg):
    # Exact plane pendulum: T = 4 sqrt(L/g) K(m), m = sin^2(theta0/2) (any mechanics text,
    # e.g. Landau & Lifshitz, Mechanics, problem 11.1; K as in A&S 17.3).
    L = 10.0
    sc = make_scene({"start": {"swing_deg": [theta0_deg, 0.0]}}, duration_s=40.0)
    traj = simulate(sc)
    assert traj.valid
    tc = _crossings(traj)
    T_sim = np.mean(np.diff(tc))
    T_exact = 4 * math.sqrt(L / G) * ellipk(math.sin(math.radians(theta0_deg) / 2) ** 2)
    assert T_sim == pytest.approx(T_exact, rel=1e-8)


def test_small_angle_period():
    # Small-angle period 2 pi sqrt(L/g) (textbook); at 0.2 deg the exact period differs
    # by theta0^2/16 = 7.6e-7 relative, inside the tolerance.
    L = 10.0
    sc = make_scene({"start": {"swing_deg": [0.0, 0.2]}}, duration_s=30.0)
    traj = simulate(sc)
    T_sim = np.mean(np.diff(_crossings(traj, comp=1)))
    assert T_sim == pytest.approx(2 * math.pi * math.sqrt(L / G), rel=2e-6)
    assert summarize(traj)["natural_period_s"] == pytest.approx(2 * math.pi * math.sqrt(L / G), rel=1e-15)


def _accel_scene(a, ta_s, cruise_s=0.0, L=10.0, duration=None, zeta=0.0, start=1.0):
    v = a * ta_s
    D = a * ta_s**2 + v * cruise_s  # two ramps of a ta^2 / 2 each plus cruise
    end = start + 2 * ta_s + cruise_s
    mv = {"axis": "x", "profile": "trapezoid", "start_s": start, "distance_m": D,
          "speed_m_s": v, "accel_m_s2": a}
    return make_scene({"rope": {"length_m": L}, "damping": {"ratio": zeta}, "moves": [mv]},
                      duration_s=duration or end + 30.0)


def test_peak_swing_from_rest_under_constant_acceleration_is_twice_quasi_static():
    # Trolley at constant acceleration a: the load swings about the tilted effective
    # gravity, so from rest the peak is exactly 2 atan(a/g) (derived; REFERENCES.md).
    a, L = 1.5, 10.0
    T = 2 * math.pi * math.sqrt(L / math.hypot(G, a))
    sc = _accel_scene(a, ta_s=0.9 * T, L=L)
    traj = simulate(sc)
    t = np.linspace(1.0, 1.0 + 0.9 * T, 20001)
    ang = rope_angle_rad(traj.sample(t)["rope_dir"])
    assert np.max(ang) == pytest.approx(2 * math.atan(a / G), abs=1e-9)


def test_quasi_static_angle_with_damping():
    # With damping, the swing under constant acceleration settles at atan(a/g) (textbook).
    a = 0.6
    sc = _accel_scene(a, ta_s=60.0, zeta=0.3, duration=130.0)
    traj = simulate(sc)
    n = traj.sample(np.array([59.0]))["rope_dir"][0]
    # the load trails the trolley: rope leans toward -x
    assert math.atan2(-n[0], -n[2]) == pytest.approx(math.atan(a / G), abs=1e-9)


def test_zero_residual_when_ramps_last_a_whole_period_linear():
    # Linear model, accelerate Ta, coast Tc, decelerate Ta: residual amplitude
    # (4a/g)|sin(w Ta/2) sin(w (Ta+Tc)/2)|, zero for Ta = whole periods (derived by
    # superposing acceleration steps; REFERENCES.md).  Small a keeps it linear.
    a, L = 0.02, 10.0
    T = 2 * math.pi * math.sqrt(L / G)
    for ta, expect_zero in ((T, True), (0.37 * T, False)):
        sc = _accel_scene(a, ta_s=ta, cruise_s=3.1, L=L)
        s = summarize(simulate(sc))
        w = 2 * math.pi / T
        lin = 4 * a / G * abs(math.sin(w * ta / 2) * math.sin(w * (ta + 3.1) / 2))
        res = math.radians(s["residual_rope_angle_deg"])
        if expect_zero:
            assert res < 0.005 * 2 * a / G
        else:
            assert res == pytest.approx(lin, rel=0.01)


def test_zero_residual_nonlinear_exact_ramp_time():
    # Nonlinear: the ramp leaves the load at rest when it lasts one exact period of
    # the pendulum about the tilted gravity: Ta = 4 sqrt(L/g_eff) K(sin^2(beta/2)),
    # beta = atan(a/g), g_eff = sqrt(g^2 + a^2) (derived; REFERENCES.md).
    a, L = 2.0, 10.0
    beta = math.atan(a / G)
    ta = 4 * math.sqrt(L / math.hypot(G, a)) * ellipk(math.sin(beta / 2) ** 2)
    sc = _accel_scene(a, ta_s=ta, cruise_s=2.0, L=L)
    s = summarize(simulate(sc))
    assert s["peak_rope_angle_deg"] == pytest.approx(math.degrees(2 * beta), rel=1e-6)
    assert s["residual_rope_angle_deg"] < 1e-5


@pytest.mark.parametrize("theta0_deg", [10.0, 30.0, 60.0, 80.0])
def test_peak_tension_at_bottom_of_swing(theta0_deg):
    # Fixed pivot, released from theta0: T_bottom = m g (3 - 2 cos theta0) (textbook).
    m = 1000.0
    sc = make_scene({"start": {"swing_deg": [theta0_deg, 0.0]}}, duration_s=8.0)
    s = summarize(simulate(sc))
    want = m * G * (3 - 2 * math.cos(math.radians(theta0_deg)))
    assert s["peak_rope_tension_kN"] * 1e3 == pytest.approx(want, rel=1e-7)
    assert s["dynamic_factor"] == pytest.approx(3 - 2 * math.cos(math.radians(theta0_deg)), rel=1e-7)


def test_steady_wind_offset_iso_2533_density():
    # q = rho v^2 / 2 with the ISO 2533:1975 sea-level density 1.225 kg/m^3; the load
    # settles at atan(q Cd A / (m g)) (drag equation; quasi-static balance).
    v, A, cd, m = 15.0, 4.0, 1.05, 1000.0
    sc = make_scene({"load": {"mass_kg": m, "wind_area_m2": A, "drag_coefficient": cd},
                     "wind": {"speed_m_s": v, "direction_deg": 30.0}, "damping": {"ratio": 0.3}},
                    duration_s=60.0)
    assert sc.wind.air_density_kg_m3 == 1.225
    traj = simulate(sc)
    n = traj.sample(np.array([59.0]))["rope_dir"][0]
    want = math.atan(0.5 * 1.225 * v**2 * cd * A / (m * G))
    assert rope_angle_rad(n) == pytest.approx(want, abs=1e-8)
    assert math.degrees(math.atan2(n[1], n[0])) == pytest.approx(30.0, abs=1e-6)
    assert summarize(traj)["rest_rope_angle_deg"] == pytest.approx(math.degrees(want), abs=1e-9)


def test_energy_conserved_without_damping_or_wind():
    # Conservative system (fixed pivot, gravity only): total energy is constant.
    # 3D swing with precession, 100 periods (~635 s).
    sc = make_scene({"start": {"swing_deg": [35.0, 10.0], "swing_rate_deg_s": [0.0, 12.0]}},
                    duration_s=635.0)
    traj = simulate(sc)
    s = traj.sample(np.linspace(0, 635.0, 5001))
    m, L = 1000.0, 10.0
    e = s["energy_J"] - m * G * (40.0 - L)  # energy above the lowest point of the swing
    assert e.min() > 0
    assert np.max(np.abs(e - e[0])) / e[0] < 1e-8


def test_adiabatic_hoisting_amplitude():
    # Slow hoisting conserves E/omega: angular amplitude ~ L^(-3/4) (Landau & Lifshitz,
    # Mechanics, sec. 49; from memory; REFERENCES.md says about 1 % at 0.1 m/s, 20 -> 5 m).
    L0, L1, th0 = 20.0, 5.0, 2.0
    hoist = {"axis": "hoist", "profile": "trapezoid", "start_s": 2.0, "distance_m": L0 - L1,
             "speed_m_s": 0.05, "accel_m_s2": 0.05}
    sc = make_scene({"rope": {"length_m": L0}, "start": {"swing_deg": [th0, 0.0]}, "moves": [hoist]},
                    duration_s=2.0 + 301.0 + 10.0)
    s = summarize(simulate(sc))
    want = th0 * (L0 / L1) ** 0.75
    assert s["residual_rope_angle_deg"] == pytest.approx(want, rel=0.01)


def test_lengthening_pendulum_bessel_solution():
    # Rope paid out at constant speed v, small angle: theta = L^(-1/2) [C1 J1(z) + C2 Y1(z)],
    # z = 2 sqrt(g L) / v (Boas, Mathematical Methods in the Physical Sciences; Brearley,
    # Proc. Edinburgh Math. Soc. 15, 1966).  C1, C2 are fitted at the end of the ramp.
    L0, v = 5.0, 0.5
    hoist = {"axis": "hoist", "profile": "trapezoid", "start_s": 0.0, "distance_m": -15.0,
             "speed_m_s": v, "accel_m_s2": 5.0}
    sc = make_scene({"rope": {"length_m": L0}, "start": {"swing_deg": [0.05, 0.0]}, "moves": [hoist]},
                    duration_s=31.0)
    traj = simulate(sc)
    t1 = v / 5.0  # end of the acceleration ramp
    t = np.linspace(t1, 29.0, 400)
    st = traj.state(t)
    th = np.arcsin(st[:, 0])
    L = traj.motion.evaluate(t)["L"]

    def basis(Lx):
        z = 2 * np.sqrt(G * Lx) / v
        return Lx**-0.5 * j1(z), Lx**-0.5 * y1(z)

    # fit C1, C2 from theta and its rate at t1 (finite-difference the basis in L)
    h = 1e-6
    b0 = np.array(basis(L[0]))
    db = (np.array(basis(L[0] + h)) - np.array(basis(L[0] - h))) / (2 * h) * v
    thd0 = st[0, 2] / math.cos(th[0])
    C = np.linalg.solve(np.array([b0, db]), np.array([th[0], thd0]))
    pred = C[0] * basis(L)[0] + C[1] * basis(L)[1]
    # small-angle model error is O(theta^3) ~ 1e-7 relative at 0.05 deg
    assert np.max(np.abs(th - pred)) < 1e-6 * np.max(np.abs(th))


def test_conical_pendulum():
    # Conical (spherical) pendulum: phi_dot^2 = g / (L cos theta) keeps theta constant (textbook).
    L, th = 10.0, math.radians(25.0)
    phid = math.sqrt(G / (L * math.cos(th)))
    rate_y = math.degrees(math.tan(th) * phid)
    sc = make_scene({"start": {"swing_deg": [25.0, 0.0], "swing_rate_deg_s": [0.0, rate_y]}},
                    duration_s=30.0)
    traj = simulate(sc)
    ang = rope_angle_rad(traj.sample(np.linspace(0, 30, 3001))["rope_dir"])
    assert np.max(np.abs(ang - th)) < 1e-8
    # one revolution takes 2 pi / phi_dot
    tc = _crossings(traj, comp=1)
    assert np.mean(np.diff(tc)) == pytest.approx(2 * math.pi / phid, rel=1e-9)


def test_steady_slewing_angle():
    # Steady slew at Omega, suspension radius R: tan theta = Omega^2 (R + L sin theta) / g
    # (derived; REFERENCES.md gives 1.186486 deg for R = 20 m, L = 15 m, Omega = 0.1 rad/s).
    R, L, Om = 20.0, 15.0, 0.1
    mv = {"axis": "slew", "profile": "trapezoid", "start_s": 0.0, "angle_deg": 3000.0,
          "speed_deg_s": math.degrees(Om), "accel_deg_s2": math.degrees(0.02)}
    sc = make_scene({"crane": {"suspension_m": [R, 0.0, 40.0]}, "rope": {"length_m": L},
                     "damping": {"ratio": 0.4}, "moves": [mv]}, duration_s=530.0)
    traj = simulate(sc)
    th = float(rope_angle_rad(traj.sample(np.array([400.0]))["rope_dir"])[0])
    want = brentq(lambda x: math.tan(x) - Om**2 * (R + L * math.sin(x)) / G, 0, 0.5)
    assert math.degrees(want) == pytest.approx(1.186486, abs=1e-6)
    assert th == pytest.approx(want, abs=1e-9)


def test_logarithmic_decrement_of_damping_ratio():
    # Viscous damping: successive peaks fall by delta = 2 pi zeta / sqrt(1 - zeta^2)
    # (Thomson & Dahleh, Theory of Vibration with Applications).  Small angle: linear.
    zeta = 0.05
    sc = make_scene({"start": {"swing_deg": [0.5, 0.0]}, "damping": {"ratio": zeta}}, duration_s=20.0)
    traj = simulate(sc)
    t = np.linspace(0, 20, 200001)
    x = traj.state(t)[:, 0]
    pk = np.nonzero((x[1:-1] > x[:-2]) & (x[1:-1] >= x[2:]))[0] + 1
    dec = np.log(x[pk][:-1] / x[pk][1:])
    assert np.mean(dec) == pytest.approx(2 * math.pi * zeta / math.sqrt(1 - zeta**2), rel=2e-4)


def test_tolerance_convergence():
    # Tightening the tolerances tenfold changes the results by < 1e-6 rad (convergence check).
    sc = make_scene({"start": {"swing_deg": [3.0, -2.0]}, "wind": {"speed_m_s": 12.0},
                     "load": {"wind_area_m2": 3.0}, "damping": {"ratio": 0.02},
                     "moves": [{"axis": "x", "profile": "s-curve", "distance_m": 12.0, "speed_m_s": 1.0,
                                "accel_m_s2": 0.4, "jerk_m_s3": 0.5, "start_s": 1.0},
                               {"axis": "slew", "profile": "trapezoid", "angle_deg": 30.0,
                                "speed_deg_s": 3.0, "accel_deg_s2": 1.0, "start_s": 4.0}]},
                    crane={"suspension_m": [15.0, 0.0, 40.0]}, duration_s=40.0)
    a = summarize(simulate(sc))
    b = summarize(simulate(sc, rtol=constants.RTOL / 10, atol=constants.ATOL / 10))
    for k in ("peak_rope_angle_deg", "residual_rope_angle_deg"):
        assert abs(math.radians(a[k] - b[k])) < 1e-6
    ta, tb = simulate(sc), simulate(sc, rtol=constants.RTOL / 10, atol=constants.ATOL / 10)
    t = np.linspace(0, 40, 801)
    assert np.max(np.abs(ta.state(t)[:, :2] - tb.state(t)[:, :2])) < 1e-6


def test_summary_measured_period_at_large_amplitude():
    # The summary's measured period against the exact elliptic-integral period at 30 deg;
    # REFERENCES.md gives T/T0 = 1.017409 at 30 deg (A&S 17.3 / scipy.special.ellipk).
    sc = make_scene({"start": {"swing_deg": [30.0, 0.0]}}, duration_s=40.0)
    s = summarize(simulate(sc))
    T0 = 2 * math.pi * math.sqrt(10.0 / G)
    exact = 4 * math.sqrt(10.0 / G) * ellipk(math.sin(math.radians(15.0)) ** 2)
    assert s["measured_period_s"] == pytest.approx(exact, rel=1e-6)
    assert s["period_difference_pct"] == pytest.approx(100 * (exact / T0 - 1), abs=1e-3)
    assert exact / T0 == pytest.approx(1.017409, abs=1e-6)
    assert s["period_exact_at_amplitude_s"] == pytest.approx(exact, rel=1e-5)


@pytest.mark.parametrize("zeta", [0.02, 0.05, 0.1])
def test_measured_period_of_a_damped_swing(zeta):
    # Damped free vibration: zero crossings of the rest position follow each other at the
    # damped period 2 pi / (omega_n sqrt(1 - zeta^2)) (Thomson & Dahleh, Theory of Vibration
    # with Applications, 5th ed., sec. 2.6); small amplitude, so the pendulum is linear.
    L = 10.0
    sc = make_scene({"rope": {"length_m": L}, "start": {"swing_deg": [0.5, 0.0]},
                     "damping": {"ratio": zeta}}, duration_s=40.0)
    s = summarize(simulate(sc))
    omega_n = math.sqrt(sc.gravity_m_s2 / L)
    damped = 2.0 * math.pi / (omega_n * math.sqrt(1.0 - zeta**2))
    assert s["measured_period_s"] == pytest.approx(damped, rel=2e-5)
