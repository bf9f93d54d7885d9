"""Independent derivation of the point-mass equations with sympy.physics.mechanics.

Lagrange's equations of a point mass on a rope of prescribed length L(t) from a
suspension point with prescribed path p(t), in the same chart (u, v), are
derived symbolically at test time (sympy's ``LagrangesMethod``) and compared
numerically with the project's hand-derived accelerations over random states.
A second, independent check of the tension: the Cartesian formulation with the
constraint |r - p|^2 = L^2, whose Lagrange multiplier is the tension
(REFERENCES.md, "Independent equations of motion").
"""

import numpy as np
import pytest
import sympy as sp
from sympy.physics.mechanics import LagrangesMethod, dynamicsymbols

from swingsim.dynamics.pendulum import accelerations, tension_per_mass


@pytest.fixture(scope="module")
def derived():
    t = sp.symbols("t")
    g, m = sp.symbols("g m", positive=True)
    u, v = dynamicsymbols("u v")
    ud, vd = dynamicsymbols("u v", 1)
    px, py, pz, L = dynamicsymbols("p_x p_y p_z L")
    w = sp.sqrt(1 - u**2 - v**2)
    r = sp.Matrix([px + L * u, py + L * v, pz - L * w])
    rd = r.diff(t)
    lag = sp.Rational(1, 2) * m * (rd.T * rd)[0] - m * g * r[2]
    lm = LagrangesMethod(lag, [u, v])
    lm.form_lagranges_equations()
    M, F = lm.mass_matrix, lm.forcing
    # replace the prescribed functions and their derivatives by plain symbols,
    # derivatives first (else L' silently becomes 0)
    names = {}
    subs = {}
    for f in (px, py, pz, L):
        for k in (2, 1):
            s = sp.Symbol(f"{f.func.__name__}_d{k}")
            subs[f.diff(t, k)] = s
            names[(f.func.__name__, k)] = s
    state = sp.symbols("U V Ud Vd")
    for f, s in ((ud, state[2]), (vd, state[3])):
        subs[f] = s
    M = M.subs(subs)
    F = F.subs(subs)
    sub2 = {u: state[0], v: state[1], L: sp.Symbol("L0")}
    M = M.subs(sub2)
    F = F.subs(sub2)
    args = [*state, sp.Symbol("L0"), names[("L", 1)], names[("L", 2)],
            names[("p_x", 2)], names[("p_y", 2)], names[("p_z", 2)], g, m,
            names[("p_x", 1)], names[("p_y", 1)], names[("p_z", 1)]]
    qdd = M.LUsolve(F)
    f = sp.lambdify(args, [qdd[0], qdd[1]], "numpy")
    return f


def test_accelerations_match_lagrange(derived):
    rng = np.random.default_rng(7)
    g, m = 9.80665, 1300.0
    for _ in range(200):
        th = rng.uniform(0, 1.3)
        ph = rng.uniform(0, 2 * np.pi)
        u, v = np.sin(th) * np.cos(ph), np.sin(th) * np.sin(ph)
        du, dv = rng.normal(0, 0.5, 2)
        L, dL, ddL = rng.uniform(2, 40), rng.normal(0, 0.5), rng.normal(0, 0.3)
        ax, ay, az = rng.normal(0, 0.8, 3)
        # the suspension point's velocity must drop out (Galilean invariance): random too
        want = derived(u, v, du, dv, L, dL, ddL, ax, ay, az, g, m, *rng.normal(0, 2.0, 3))
        got = accelerations(u, v, du, dv, L, dL, ax, ay, az, 0.0, 0.0, -g)
        assert np.allclose(got, want, rtol=1e-9, atol=1e-12 * (1 + np.max(np.abs(want))))


def test_tension_matches_cartesian_multiplier():
    # Cartesian coordinates with the constraint C = |r - p|^2 - L^2 = 0: the tension is
    # the multiplier force magnitude.  Solve m r'' = m f - T n together with C'' = 0
    # as a linear system for (r'', T) and compare with the project's closed form.
    rng = np.random.default_rng(11)
    g = 9.80665
    for _ in range(200):
        th, ph = rng.uniform(0, 1.3), rng.uniform(0, 2 * np.pi)
        n = np.array([np.sin(th) * np.cos(ph), np.sin(th) * np.sin(ph), -np.cos(th)])
        L, dL, ddL = rng.uniform(2, 40), rng.normal(0, 0.5), rng.normal(0, 0.3)
        # a random tangent rate of the direction
        tang = rng.normal(0, 0.5, 3)
        nd = tang - np.dot(tang, n) * n
        app = rng.normal(0, 0.8, 3)
        f = np.array([0.0, 0.0, -g]) + rng.normal(0, 0.3, 3)
        d, dd = L * n, dL * n + L * nd  # r - p and its rate
        # unknowns x = (a_r (3), T/m):  a_r + (T/m) n = f ;  d . (a_r - app) = L ddL + dL^2 - |dd|^2
        A = np.zeros((4, 4))
        A[:3, :3] = np.eye(3)
        A[:3, 3] = n
        A[3, :3] = d
        b = np.concatenate([f, [L * ddL + dL**2 - dd @ dd + d @ app]])
        x = np.linalg.solve(A, b)
        u, v = n[0], n[1]
        du, dv = nd[0], nd[1]
        got = tension_per_mass(u, v, du, dv, L, ddL, *app, *f)
        assert got == pytest.approx(x[3], rel=1e-9, abs=1e-10)
