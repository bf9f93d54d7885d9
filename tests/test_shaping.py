"""Input shapers and shaped moves against published values and textbook linear results.

Sources, named beside each check:
* Singer & Seering, "Preshaping command inputs to reduce system vibration",
  ASME J. Dyn. Sys., Meas., Control 112, 1990 (ZV, ZVD amplitudes and times;
  residual vibration formula; insensitivity curves).
* Singhose, Seering & Singer, ASME J. Mech. Design 116, 1994 (EI, undamped;
  from memory, as listed in the project's REFERENCES.md).
* Linearised pendulum under a moving support: theta'' + 2 zeta w theta' +
  w^2 theta = -a(t) / L (textbook; the damping model of dynamics/forces.py).
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from swingsim.errors import SceneError
from swingsim.motion import profiles
from swingsim.motion import shaping
from swingsim.simulation import prepare

from conftest import make_scene

G = 9.80665


# ---------------------------------------------------------------------------
# shapers themselves


def test_zv_zvd_amplitudes_and_times_damped():
    # Singer & Seering 1990, Eqs. 7-8: K = exp(-zeta pi / sqrt(1 - zeta^2)),
    # ZV [1, K]/(1+K), ZVD [1, 2K, K^2]/(1+K)^2, impulses half a damped period apart.
    zeta, T = 0.05, 4.0
    K = math.exp(-zeta * math.pi / math.sqrt(1 - zeta**2))
    zv = shaping.zv(T, zeta)
    zvd = shaping.zvd(T, zeta)
    assert zv.amplitudes == pytest.approx([1 / (1 + K), K / (1 + K)], rel=1e-14)
    assert zvd.amplitudes == pytest.approx([1 / (1 + K) ** 2, 2 * K / (1 + K) ** 2, K**2 / (1 + K) ** 2],
                                           rel=1e-14)
    Td = T / math.sqrt(1 - zeta**2)
    assert zv.times_s == pytest.approx([0.0, Td / 2], rel=1e-14)
    assert zvd.times_s == pytest.approx([0.0, Td / 2, Td], rel=1e-14)
    # the same numbers as quoted in REFERENCES.md (computed there with scipy), 6 digits
    assert zv.amplitudes == pytest.approx([0.539238, 0.460762], abs=5e-7)
    assert zv.times_s[1] / T == pytest.approx(0.500626, abs=5e-7)
    assert zvd.amplitudes == pytest.approx([0.290778, 0.496921, 0.212301], abs=5e-7)


@pytest.mark.parametrize("zeta", [0.0, 0.02, 0.1, 0.3])
def test_zero_residual_at_exact_tuning(zeta):
    # Singer & Seering 1990, Eq. 3: the residual of ZV and ZVD vanishes at the design frequency
    w = 2 * math.pi / 5.0
    for s in (shaping.zv(5.0, zeta), shaping.zvd(5.0, zeta)):
        assert float(shaping.residual_vibration(s, w, zeta)) < 1e-12
        assert sum(s.amplitudes) == pytest.approx(1.0, rel=1e-15)


@pytest.mark.parametrize("eps", [-0.3, -0.1, 0.05, 0.2, 0.4])
def test_undamped_insensitivity_curves(eps):
    # Singer & Seering 1990 (undamped): ZV |sin(pi eps / 2)|, ZVD sin^2(pi eps / 2),
    # eps = relative frequency error
    T = 3.0
    w = 2 * math.pi / T * (1 + eps)
    assert float(shaping.residual_vibration(shaping.zv(T), w)) == pytest.approx(abs(math.sin(math.pi * eps / 2)), abs=1e-13)
    assert float(shaping.residual_vibration(shaping.zvd(T), w)) == pytest.approx(math.sin(math.pi * eps / 2) ** 2, abs=1e-13)


def test_published_percentages_at_frequency_ratio_0_8():
    # REFERENCES.md (Singer & Seering 1990; EI: Singhose et al. 1994): at actual/design
    # frequency 0.8 the residual is ZV 30.902 %, ZVD 9.549 %, EI (V = 5 %) 5.027 %
    T = 2.0
    w = 0.8 * 2 * math.pi / T
    assert 100 * float(shaping.residual_vibration(shaping.zv(T), w)) == pytest.approx(30.902, abs=5e-4)
    assert 100 * float(shaping.residual_vibration(shaping.zvd(T), w)) == pytest.approx(9.549, abs=5e-4)
    assert 100 * float(shaping.residual_vibration(shaping.ei(T, 0.0, 0.05), w)) == pytest.approx(5.027, abs=5e-4)


@pytest.mark.parametrize("V", [0.03, 0.05, 0.1])
def test_ei_undamped(V):
    # Singhose, Seering & Singer 1994 (from memory, REFERENCES.md): [(1+V)/4, (1-V)/2, (1+V)/4]
    # at [0, T/2, T]; residual V at the design frequency, stationary there, zero on both sides
    T = 4.0
    s = shaping.ei(T, 0.0, V)
    assert s.amplitudes == pytest.approx([(1 + V) / 4, (1 - V) / 2, (1 + V) / 4], rel=1e-14)
    assert s.times_s == pytest.approx([0.0, T / 2, T], rel=1e-14)
    w = 2 * math.pi / T
    assert float(shaping.residual_vibration(s, w)) == pytest.approx(V, rel=1e-12)
    ratio = np.linspace(0.7, 1.3, 6001)
    r = shaping.residual_vibration(s, w * ratio)
    lo = int(np.argmin(np.where(ratio < 1, r, np.inf)))
    hi = int(np.argmin(np.where(ratio > 1, r, np.inf)))
    assert r[lo] < 1e-3 and r[hi] < 1e-3  # it dips to zero on both sides of the design frequency
    assert float(r[lo:hi + 1].max()) <= V * (1 + 1e-9)  # and between those zeros it stays below V


def test_ei_damped_meets_its_conditions():
    # the EI conditions (Singhose et al. 1994) solved numerically with damping:
    # V(w) = Vtol and dV/dw = 0 at the design frequency, amplitudes positive, sum 1
    T, zeta, V = 5.0, 0.08, 0.05
    s = shaping.ei(T, zeta, V)
    w = 2 * math.pi / T
    assert sum(s.amplitudes) == pytest.approx(1.0, rel=1e-14) and min(s.amplitudes) > 0
    assert float(shaping.residual_vibration(s, w, zeta)) == pytest.approx(V, rel=1e-9)
    d = shaping.residual_vibration(s, w * np.array([0.999, 1.001]), zeta)
    assert abs(d[1] - d[0]) < 1e-5


def test_two_shapers_in_series_cancel_both_modes():
    # REFERENCES.md: a command convolved with shapers tuned to both modes cancels both
    s = shaping.convolve(shaping.zv(6.0, 0.02), shaping.zv(1.5, 0.02))
    assert sum(s.amplitudes) == pytest.approx(1.0, rel=1e-14)
    for T in (6.0, 1.5):
        assert float(shaping.residual_vibration(s, 2 * math.pi / T, 0.02)) < 1e-12
    assert float(shaping.residual_vibration(s, 2 * math.pi / 3.0, 0.02)) > 0.1  # a third mode is not


# ---------------------------------------------------------------------------
# shaped moves


def _linear_residual(profile, L, zeta, t_end):
    """Residual amplitude of the linearised pendulum after a support move.

    theta'' + 2 zeta w theta' + w^2 theta = -a(t) / L  (textbook), integrated with
    DOP853 restarted at every breakpoint; amplitude from the state at t_end, undamped
    form sqrt(theta^2 + (theta' / w)^2) rescaled to the end of the move by exp(zeta w dt).
    """
    w = math.sqrt(G / L)

    def rhs(t, y):
        a = float(profile.evaluate(np.array([t]))[2][0])
        return [y[1], -2 * zeta * w * y[1] - w * w * y[0] - a / L]

    y = [0.0, 0.0]
    cuts = sorted({0.0, t_end} | {b for b in profile.breakpoints if 0 < b < t_end})
    for a, b in zip(cuts[:-1], cuts[1:]):
        y = solve_ivp(rhs, (a, b), y, method="DOP853", rtol=1e-12, atol=1e-14).y[:, -1]
    wd = w * math.sqrt(1 - zeta**2)
    # free damped oscillation: amplitude of the envelope at t_end, carried back to the move's end
    amp = math.hypot(y[0], (y[1] + zeta * w * y[0]) / wd)
    return amp * math.exp(zeta * w * (t_end - profile.end_s))


@pytest.mark.parametrize("zeta", [0.0, 0.05])
@pytest.mark.parametrize("name", ["zv", "zvd"])
def test_shaped_trapezoid_residual_below_one_percent(name, zeta):
    # Singer & Seering 1990: at exact tuning the shaped command leaves (almost) no residual
    # vibration of the linear system; required here: below 1 % of the unshaped command's.
    L = 12.0
    T = 2 * math.pi * math.sqrt(L / G)
    base = profiles.trapezoid(0.5, 9.0, 1.0, 0.6)
    shaped = shaping.shaped(base, shaping.SHAPERS[name](T, zeta, 0.05))
    r0 = _linear_residual(base, L, zeta, 40.0)
    r1 = _linear_residual(shaped, L, zeta, 40.0)
    assert r0 > 0.01  # the unshaped move leaves a clear swing [rad]
    assert r1 < 0.01 * r0


def test_linear_residual_matches_textbook_formula():
    # REFERENCES.md (derived by superposing acceleration steps): accelerate Ta, coast Tc,
    # decelerate Ta: residual (4 a / g) |sin(w Ta / 2) sin(w (Ta + Tc) / 2)| [rad], undamped,
    # with theta measured as x / L for small angles (a / L instead of a / g per unit
    # acceleration: the formula's a/g times w^2 L / g = 1).
    L, a, v, D = 8.0, 0.5, 1.0, 10.0
    w = math.sqrt(G / L)
    p = profiles.trapezoid(0.0, D, v, a)
    Ta, Tc = v / a, D / v - v / a
    expect = 4 * a / G * abs(math.sin(w * Ta / 2) * math.sin(w * (Ta + Tc) / 2))
    assert _linear_residual(p, L, 0.0, 30.0) == pytest.approx(expect, rel=1e-8)


@pytest.mark.parametrize("L", [5.0, 11.0, 23.0])
def test_whole_period_rule_zero_residual(L):
    # textbook linear result: an acceleration phase of a whole number of periods leaves no swing
    T = 2 * math.pi * math.sqrt(L / G)
    p = shaping.whole_period_trapezoid(0.0, 15.0, 1.2, 0.5, T)
    ta = p.breakpoints[1] - p.breakpoints[0]
    n = ta / T
    assert abs(n - round(n)) < 1e-9 and round(n) >= 1
    assert float(np.max(np.abs(p.evaluate(np.linspace(0, p.end_s, 2001))[2]))) <= 0.5 * (1 + 1e-12)
    ref = _linear_residual(profiles.trapezoid(0.0, 15.0, 1.2, 0.5), L, 0.0, p.end_s + 30)
    assert _linear_residual(p, L, 0.0, p.end_s + 30) < 1e-7 * max(ref, 1e-3)


def test_whole_period_s_curve_zero_residual():
    # each jerk-limited phase is a rectangle of length v/a convolved with one of a/j: with
    # v/a = n T it leaves no linear swing (convolution of the textbook rectangle result)
    L = 9.0
    T = 2 * math.pi * math.sqrt(L / G)
    p = shaping.whole_period_s_curve(0.0, 20.0, 1.0, 0.4, 0.5, T)
    assert _linear_residual(p, L, 0.0, p.end_s + 30) < 1e-7


@settings(max_examples=40, deadline=None)
@given(D=st.floats(0.5, 40), v=st.floats(0.2, 3), a=st.floats(0.05, 2), T=st.floats(1, 12),
       zeta=st.floats(0, 0.3), name=st.sampled_from(["zv", "zvd", "ei"]))
def test_shaped_move_keeps_distance_and_limits(D, v, a, T, zeta, name):
    # positive amplitudes summing to one: the shaped command covers the same distance and
    # never exceeds the command's speed or acceleration (a convex combination)
    base = profiles.trapezoid(0.0, D, v, a)
    s = shaping.shaped(base, shaping.SHAPERS[name](T, zeta, 0.05))
    t = np.linspace(0.0, s.end_s, 3001)
    pos, vel, acc = s.evaluate(t)
    assert s.distance == pytest.approx(D, rel=1e-12)
    assert float(np.max(np.abs(vel))) <= v * (1 + 1e-12)
    assert float(np.max(np.abs(acc))) <= a * (1 + 1e-12)
    assert s.end_s == pytest.approx(base.end_s + shaping.SHAPERS[name](T, zeta, 0.05).duration_s, rel=1e-12)


# ---------------------------------------------------------------------------
# scene keys


def _move(**kw):
    m = {"axis": "x", "distance_m": 10.0, "speed_m_s": 1.0, "accel_m_s2": 0.5}
    m.update(kw)
    return m


def test_scene_tunes_to_its_own_period_and_damping():
    sc = make_scene({"moves": [_move(profile="zvd")], "damping": {"ratio": 0.04}}, duration_s=40.0)
    prof = prepare(sc)[1].moves[0][1]
    T = 2 * math.pi * math.sqrt(10.0 / G)  # the scene's small-angle period (textbook)
    ref = shaping.zvd(T, 0.04)
    assert [w for w, _, _ in prof.parts] == pytest.approx(ref.amplitudes, rel=1e-14)
    assert [s for _, s, _ in prof.parts] == pytest.approx(ref.times_s, rel=1e-14)


def test_scene_shaper_keys():
    sc = make_scene({"moves": [_move(profile="ei", shaper_period_s=5.0, shaper_tolerance=0.1,
                                     shaper_damping_ratio=0.0, jerk_m_s3=1.0)]}, duration_s=40.0)
    prof = prepare(sc)[1].moves[0][1]
    assert [w for w, _, _ in prof.parts] == pytest.approx([0.275, 0.45, 0.275], rel=1e-14)
    assert isinstance(prof.parts[0][2], profiles.PiecewiseCubic)
    # with a jerk limit the base is the s-curve: its acceleration is continuous
    base = prof.parts[0][2]
    a = base.evaluate(np.array([1e-6]))[2][0]
    assert abs(a) < 1e-5


@pytest.mark.parametrize("move, key, text", [
    (_move(profile="trapezoid", shaper_period_s=4.0), "moves[0].shaper_period_s", "not used by profile"),
    (_move(profile="zv", shaper_base="s-curve"), "moves[0]", "needs jerk_m_s3"),
    (_move(profile="zv", shaper_base="bang-bang"), "moves[0].shaper_base", "one of"),
    (_move(profile="whole-period", decel_m_s2=0.3), "moves[0].decel_m_s2", "not used by profile"),
    (_move(profile="ei", shaper_tolerance=0.7), "moves[0].shaper_tolerance", "< 0.5"),
])
def test_scene_shaper_errors(move, key, text):
    with pytest.raises(SceneError) as e:
        make_scene({"moves": [move]}, duration_s=40.0)
    assert e.value.key == key
    assert text in str(e.value)
