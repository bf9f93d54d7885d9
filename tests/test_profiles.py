"""Motion profiles: exact distance, limits and derivatives at every instant.

References: trapezoidal and double-S profiles as in Biagiotti & Melchiorri,
*Trajectory Planning for Automatic Machines and Robots* (2008), ch. 3; the
kinematic identities (v = dx/dt, a = dv/dt) are checked against numerical
differentiation, and the exact values at breakpoints against the closed forms.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from swingsim.motion import profiles


def test_trapezoid_closed_form():
    # D = 20 m, v = 1 m/s, a = 0.5 m/s^2: ta = 2 s, 1 m each ramp, cruise 18 s
    p = profiles.trapezoid(1.0, 20.0, 1.0, 0.5)
    assert p.breakpoints == pytest.approx((1.0, 3.0, 21.0, 23.0), abs=1e-12)
    pos, vel, acc = p.evaluate(np.array([1.0, 2.0, 3.0, 12.0, 23.0, 30.0]))
    assert pos == pytest.approx([0.0, 0.25, 1.0, 10.0, 20.0, 20.0], abs=1e-12)
    assert vel == pytest.approx([0.0, 0.5, 1.0, 1.0, 0.0, 0.0], abs=1e-12)
    assert acc[:2] == pytest.approx([0.5, 0.5])
    assert p.distance == pytest.approx(20.0, rel=1e-15)


def test_trapezoid_triangular_peak_speed():
    # peak speed sqrt(2 D a d / (a + d)) when the cruise speed cannot be reached
    D, a, d = 2.0, 0.5, 0.25
    p = profiles.trapezoid(0.0, D, 10.0, a, d)
    vpk = math.sqrt(2 * D * a * d / (a + d))
    assert p.evaluate(np.array([vpk / a]))[1][0] == pytest.approx(vpk, rel=1e-14)
    assert p.end_s == pytest.approx(vpk / a + vpk / d, rel=1e-14)
    assert p.distance == pytest.approx(D, rel=1e-14)


def test_negative_distance_mirrors():
    a = profiles.trapezoid(0.0, 5.0, 1.0, 0.3)
    b = profiles.trapezoid(0.0, -5.0, 1.0, 0.3)
    t = np.linspace(-1, 30, 777)
    for x, y in zip(a.evaluate(t), b.evaluate(t)):
        assert np.allclose(x, -y, atol=1e-15)


@pytest.mark.parametrize("D", [0.05, 0.4, 3.0, 40.0])
def test_s_curve_limits_and_distance(D):
    v, a, j = 1.2, 0.5, 0.8
    p = profiles.s_curve(0.0, D, v, a, j)
    t = np.linspace(0, p.end_s, 40001)
    pos, vel, acc = p.evaluate(t)
    assert p.distance == pytest.approx(D, rel=1e-12)
    assert np.max(vel) <= v * (1 + 1e-12)
    assert np.max(np.abs(acc)) <= a * (1 + 1e-12)
    jerk = np.diff(acc) / np.diff(t)
    assert np.max(np.abs(jerk)) <= j * (1 + 1e-6)
    # continuous acceleration (jerk-limited): no jump larger than j * dt
    assert np.max(np.abs(np.diff(acc))) <= j * (t[1] - t[0]) * 1.0001


def _check_derivatives(p, t):
    pos, vel, acc = p.evaluate(t)
    h = 1e-6
    pp, vp, _ = p.evaluate(t + h)
    pm, vm, _ = p.evaluate(t - h)
    assert np.allclose((pp - pm) / (2 * h), vel, atol=1e-6)
    assert np.allclose((vp - vm) / (2 * h), acc, atol=1e-5)


@settings(max_examples=60, deadline=None)
@given(D=st.floats(0.01, 80.0), v=st.floats(0.05, 3.0), a=st.floats(0.02, 2.0),
       j=st.floats(0.05, 5.0), dec=st.floats(0.02, 2.0))
def test_profiles_consistent_derivatives(D, v, a, j, dec):
    for p in (profiles.trapezoid(0.5, D, v, a, dec), profiles.s_curve(0.5, D, v, a, j, dec)):
        assert p.distance == pytest.approx(D, rel=1e-9)
        kn = np.array(p.breakpoints)
        # away from the breakpoints the central differences are exact to O(h^2)
        mid = (kn[:-1] + kn[1:]) / 2
        _check_derivatives(p, mid)


def test_local_poly_matches_evaluate():
    p = profiles.s_curve(1.0, 7.0, 1.0, 0.4, 0.6)
    kn = p.breakpoints
    for t0, t1 in zip(kn[:-1], kn[1:]):
        c = p.local_poly(t0, t1)
        tt = np.linspace(t0, t1, 9)
        tau = tt - t0
        assert np.allclose(c[0] + c[1] * tau + c[2] * tau**2 + c[3] * tau**3, p.evaluate(tt)[0],
                           atol=1e-12)
    assert p.local_poly(kn[0], kn[-1]) is None


def test_table_spline_is_clamped_and_exact():
    t = np.linspace(0, 10, 41)
    x = 5 * (1 - np.cos(np.pi * t / 10)) / 2 * 2  # smooth 0 -> 10 m
    p = profiles.from_table(2.0, t, x + 3.0)  # offset: displacement relative to the first row
    pos, vel, acc = p.evaluate(np.array([2.0, 12.0, 20.0]))
    assert pos == pytest.approx([0.0, 10.0, 10.0], abs=1e-12)
    assert vel == pytest.approx([0.0, 0.0, 0.0], abs=1e-12)
    # reproduces the data at the knots
    assert np.allclose(p.evaluate(2.0 + t)[0][:-1], x[:-1], atol=1e-12)
    _check_derivatives(p, np.linspace(2.1, 11.9, 50))


def test_table_rejects_bad_rows():
    with pytest.raises(profiles.ProfileError):
        profiles.from_table(0.0, [0.0, 1.0, 1.0], [0, 1, 2])
    with pytest.raises(profiles.ProfileError):
        profiles.from_table(0.0, [0.5, 1.0], [0, 1])


def test_sum_profile_shifted_copies():
    base = profiles.trapezoid(0.0, 4.0, 1.0, 0.5)
    s = profiles.SumProfile(((0.5, 0.0, base), (0.5, 1.3, base)))
    t = np.linspace(-1, 15, 300)
    want = 0.5 * base.evaluate(t)[0] + 0.5 * base.evaluate(t - 1.3)[0]
    assert np.allclose(s.evaluate(t)[0], want, atol=1e-14)
    assert s.distance == pytest.approx(4.0)
    assert 1.3 in s.breakpoints
