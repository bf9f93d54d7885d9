"""Crane kinematics: slewing, radius and travel combine exactly.

Reference: the polar-coordinate acceleration
a = (rho'' - rho phi'^2) e_rho + (rho phi'' + 2 rho' phi') e_phi (any dynamics
textbook, e.g. Meriam & Kraige, *Engineering Mechanics: Dynamics*, 2/6),
checked against numerical differentiation of the position.
"""

import math

import numpy as np
import pytest

from swingsim.motion import profiles
from swingsim.motion.kinematics import Motion


def _motion():
    return Motion((20.0, 5.0, 30.0), 15.0, (
        ("slew", profiles.s_curve(1.0, math.radians(60), math.radians(5), math.radians(2), math.radians(3))),
        ("radius", profiles.trapezoid(3.0, -6.0, 0.8, 0.4)),
        ("x", profiles.trapezoid(2.0, 4.0, 0.5, 0.2)),
        ("hoist", profiles.trapezoid(0.5, 3.0, 0.3, 0.2)),
    ))


def test_derivatives_match_finite_differences():
    m = _motion()
    kn = np.array(m.breakpoints)
    t = kn[:-1] + 0.37 * np.diff(kn)
    h = 1e-5
    t = t[np.min(np.abs(t[:, None] - kn[None, :]), axis=1) > 10 * h]  # stay off the jumps
    e, ep, em = m.evaluate(t), m.evaluate(t + h), m.evaluate(t - h)
    assert np.allclose((ep["p"] - em["p"]) / (2 * h), e["dp"], atol=1e-7)
    assert np.allclose((ep["dp"] - em["dp"]) / (2 * h), e["ddp"], atol=1e-6)
    assert np.allclose((ep["L"] - em["L"]) / (2 * h), e["dL"], atol=1e-8)


def test_local_evaluator_equals_general():
    m = _motion()
    kn = m.breakpoints
    for t0, t1 in zip(kn[:-1], kn[1:]):
        f = m.local(t0, t1)
        for t in np.linspace(t0, t1, 7)[1:-1]:  # at t1 the evaluator gives the left limit
            e = m.evaluate(np.array([t]))
            want = (*e["p"][0], *e["dp"][0], *e["ddp"][0], e["L"][0], e["dL"][0], e["ddL"][0],
                    e["slew_rate"][0])
            # the float fast path against the array path: the same numbers to rounding
            assert np.allclose(f(t), want, atol=1e-11)


def test_steady_slew_centripetal():
    # constant slew rate Omega at radius R: |a| = R Omega^2 toward the mast (textbook)
    R, Om = 25.0, 0.1
    prof = profiles.trapezoid(0.0, 10.0, Om, 0.05)
    m = Motion((R, 0.0, 30.0), 10.0, (("slew", prof),))
    t = np.array([50.0])
    e = m.evaluate(t)
    assert np.linalg.norm(e["ddp"][0]) == pytest.approx(R * Om**2, rel=1e-12)
    assert np.dot(e["ddp"][0], e["p"][0] * [1, 1, 0]) < 0
    assert np.linalg.norm(e["dp"][0]) == pytest.approx(R * Om, rel=1e-12)


def test_hoist_raises_load():
    m = Motion((0.0, 0.0, 30.0), 15.0, (("hoist", profiles.trapezoid(0.0, 5.0, 0.5, 0.5)),))
    assert m.evaluate(np.array([100.0]))["L"][0] == pytest.approx(10.0)
