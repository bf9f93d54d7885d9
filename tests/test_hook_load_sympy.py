"""Independent derivation of the hook-and-load equations with sympy.physics.mechanics.

Lagrange's equations (``LagrangesMethod``) of the hook block, the sling leg,
the rigid load and the elastic rope are derived here from nothing but the
positions of the bodies, with the suspension point and the rope length as
prescribed functions of time; the project's accelerations (Kane's method,
numerically, in ``swingsim.dynamics.hook_load``) must agree over random
states to 1e-9 relative.  Source of the method: Lagrange's equations of the
second kind (e.g. Goldstein, *Classical Mechanics*, ch. 1); the angular
velocity is taken from the skew matrix dR/dt R^T, not from the model's formula.
"""

from __future__ import annotations


import numpy as np
import pytest
import sympy as sp
from sympy.physics.mechanics import LagrangesMethod, dynamicsymbols

from swingsim.dynamics.hook_load import HookLoadModel
from swingsim.scene import scene_from_dict


def _scene(**over):
    d = {"title": "sympy check", "duration_s": 10.0, "crane": {"suspension_m": [12.0, 3.0, 30.0]},
         "rope": {"length_m": 9.0}, "load": {"mass_kg": 1500.0}}
    for k, v in over.items():
        d[k] = v
    return scene_from_dict(d)


def _derive(model):
    """Mass matrix and forcing of the model's coordinates, derived with LagrangesMethod."""
    t = sp.symbols("t")
    X, Y, Lf = dynamicsymbols("X Y Lf")
    Z = sp.Symbol("Z")
    g = sp.Float(model.gravity_m_s2)
    names = list(model.state_names[: model.n_coordinates])
    qs = dynamicsymbols(" ".join(names)) if len(names) > 1 else [dynamicsymbols(names[0])]
    qs = list(qs)
    Q = dict(zip(names, qs))

    def ndir(u, v):
        return sp.Matrix([u, v, -sp.sqrt(1 - u**2 - v**2)])

    p = sp.Matrix([X, Y, Z])
    n1 = ndir(Q["u1"], Q["v1"])
    if model.rope_is_elastic:
        ell = Q["rope_len"]
    else:
        ell = Lf
    H = p + (ell + model.rope_end_leg_m) * n1
    Tk = 0
    V = 0
    mH = model.hook_mass_kg + (0.0 if (model.rigid_load or model.leg_below_hook)
                               else model.load_mass_kg)
    Hd = H.diff(t)
    Tk += sp.Rational(1, 2) * mH * Hd.dot(Hd)
    V += mH * g * H[2]
    P = H
    if model.leg_below_hook:
        P = H + model.leg_below_hook_m * ndir(Q["u2"], Q["v2"])
    if model.rigid_load:
        a, b = Q["tilt_a"], Q["tilt_b"]
        Rx = sp.Matrix([[1, 0, 0], [0, sp.cos(a), -sp.sin(a)], [0, sp.sin(a), sp.cos(a)]])
        Ry = sp.Matrix([[sp.cos(b), 0, sp.sin(b)], [0, 1, 0], [-sp.sin(b), 0, sp.cos(b)]])
        R = Rx * Ry
        if "yaw" in Q:  # the heading about the vertical, turned last: Rz(c) Rx(a) Ry(b)
            c = Q["yaw"]
            R = sp.Matrix([[sp.cos(c), -sp.sin(c), 0], [sp.sin(c), sp.cos(c), 0], [0, 0, 1]]) * R
            # the reeving's torsion on a locked swivel: a spring about the start heading
            V += sp.Rational(1, 2) * sp.Float(model.yaw_stiffness_N_m_per_rad) * (c - sp.Float(model.yaw_start_rad)) ** 2
        elif model.yaw_start_rad:
            c = sp.Float(model.yaw_start_rad)
            R = sp.Matrix([[sp.cos(c), -sp.sin(c), 0], [sp.sin(c), sp.cos(c), 0], [0, 0, 1]]) * R
        G = P + R * sp.Matrix([sp.Float(c) for c in model.cg_from_pivot_b])
        W = sp.simplify(R.diff(t) * R.T)
        om = sp.Matrix([W[2, 1], W[0, 2], W[1, 0]])
        Ib = sp.diag(*[sp.Float(x) for x in model.inertia_b])
        Tk += sp.Rational(1, 2) * (om.T * R * Ib * R.T * om)[0, 0]
    else:
        G = P
    if model.rigid_load or model.leg_below_hook:
        Gd = G.diff(t)
        Tk += sp.Rational(1, 2) * model.load_mass_kg * Gd.dot(Gd)
        V += model.load_mass_kg * g * G[2]
    if model.rope_is_elastic:
        rp = model.elastic_rope
        lam = rp.lambda0_m + Lf - rp.loaded_length_m
        k = rp.K / (rp.falls * lam + rp.lead_length_m)
        V += sp.Rational(1, 2) * k * (ell - lam) ** 2
    lm = LagrangesMethod(Tk - V, qs)
    lm.form_lagranges_equations()
    MM, F = lm.mass_matrix, lm.forcing
    # prescribed functions: second derivatives first, then first, then the functions
    sX = sp.symbols("Xs dXs ddXs Ys dYs ddYs Ls dLs ddLs")
    subs_order = [
        {X.diff(t, 2): sX[2], Y.diff(t, 2): sX[5], Lf.diff(t, 2): sX[8]},
        {X.diff(t): sX[1], Y.diff(t): sX[4], Lf.diff(t): sX[7]},
        {X: sX[0], Y: sX[3], Lf: sX[6]},
    ]
    qv = sp.symbols(" ".join("q%d" % i for i in range(len(qs))))
    qdv = sp.symbols(" ".join("qd%d" % i for i in range(len(qs))))
    qv = qv if isinstance(qv, tuple) else (qv,)
    qdv = qdv if isinstance(qdv, tuple) else (qdv,)
    sub_q = [{q.diff(t): s for q, s in zip(qs, qdv)}, {q: s for q, s in zip(qs, qv)}]
    for d in subs_order + sub_q:
        MM = MM.xreplace(d)
        F = F.xreplace(d)
    args = list(sX) + [Z] + list(qv) + list(qdv)
    fM = sp.lambdify(args, MM, "numpy", cse=True)
    fF = sp.lambdify(args, F, "numpy", cse=True)
    return fM, fF


CASES = {
    # hook block + point load on a single leg: the double spherical pendulum
    "hook+point": dict(hook={"mass_kg": 300.0}, rigging={"leg_length_m": 2.5}),
    # hook block + rigid box on a two-leg bridle, elastic multi-fall rope
    "hook+bridle+elastic": dict(
        hook={"mass_kg": 400.0},
        load={"mass_kg": 5000.0, "size_m": [5.0, 0.3, 1.6], "cg_offset_m": [0.2, 0.0, -0.1]},
        rigging={"kind": "bridle", "leg_length_m": [3.5, 3.8], "attach_m": [[-2.0, 0.0, 0.8], [2.2, 0.0, 0.8]]},
        rope={"length_m": 9.0, "stiffness_kN_per_m": 3000.0, "falls": 2, "lead_length_m": 20.0}),
    # hook block + rigid cylinder pivoting on a single leg (six coordinates)
    "hook+single+rigid": dict(
        hook={"mass_kg": 250.0},
        load={"mass_kg": 1200.0, "size_m": [0.8, 0.8, 2.0], "shape": "cylinder"},
        rigging={"kind": "single", "leg_length_m": 1.5}),
    # no hook: rigid load on the rope's end through a short sling, elastic rope
    "rigid+sling+elastic": dict(
        load={"mass_kg": 900.0, "size_m": [1.2, 0.8, 0.6], "inertia_kg_m2": [70.0, 120.0, 150.0]},
        rigging={"kind": "single", "leg_length_m": 0.7, "attach_m": [[0.1, -0.05, 0.3]]},
        rope={"length_m": 9.0, "modulus_GPa": 95.0, "diameter_m": 0.016, "falls": 1}),
    # the yaw's variants: a locked swivel on the reeving's torsion spring (free heading with a
    # spring), and a locked one holding a turned heading (no coordinate of its own)
    "rigid+bridle+torsion": dict(
        hook={"swivel": "locked", "torsion_stiffness_N_m_per_rad": 2500.0},
        load={"mass_kg": 3000.0, "size_m": [4.0, 0.5, 1.0], "cg_offset_m": [0.3, 0.1, -0.1]},
        rigging={"kind": "bridle", "leg_length_m": [3.0, 3.2], "attach_m": [[-1.6, 0.1, 0.5], [1.8, -0.1, 0.5]]},
        start={"yaw_deg": 25.0}),
    "hook+spreader+locked-turned": dict(
        hook={"mass_kg": 350.0, "swivel": "locked"},
        load={"mass_kg": 2500.0, "size_m": [0.8, 5.0, 0.8], "shape": "cylinder", "cg_offset_m": [0.05, 0.2, 0.0]},
        rigging={"kind": "spreader", "leg_length_m": 2.0, "attach_m": [[0.0, -2.0, 0.4], [0.0, 2.0, 0.4]],
                 "top_leg_length_m": 3.0},
        start={"yaw_deg": -40.0}),
}


@pytest.mark.parametrize("case", list(CASES))
def test_accelerations_match_lagrange(case):
    model = HookLoadModel(_scene(**CASES[case]))
    fM, fF = _derive(model)
    rng = np.random.default_rng(7)
    nq = model.n_coordinates
    worst = 0.0
    for _ in range(12):
        q = np.empty(nq)
        qd = rng.uniform(-0.8, 0.8, nq)
        q[:2] = rng.uniform(-0.35, 0.35, 2)
        if model.leg_below_hook:
            q[2:4] = rng.uniform(-0.35, 0.35, 2)
        if model.rigid_load:
            q[model.tilt_index:model.tilt_index + 2] = rng.uniform(-0.5, 0.5, 2)
        if model.yaw_index is not None:  # any heading: the chart is regular about the vertical
            q[model.yaw_index] = rng.uniform(-3.0, 3.0)
        X, dX, ddX, Y_, dY, ddY = rng.uniform(-2, 2, 6)
        L, dL, ddL = 9.0 + rng.uniform(-1, 1), rng.uniform(-0.5, 0.5), rng.uniform(-0.3, 0.3)
        if model.rope_is_elastic:  # a stretched rope (slack, the model's rope pushes nothing)
            q[model.rope_length_index] = model.elastic_rope.unstretched(L) + rng.uniform(0.001, 0.02)
            qd[model.rope_length_index] = rng.uniform(-0.2, 0.2)
        Z = 30.0
        kt = (X, Y_, Z, dX, dY, 0.0, ddX, ddY, 0.0, L, dL, ddL)
        mine = model.accelerations(0.0, np.concatenate([q, qd]), kt, applied=False)
        args = [X, dX, ddX, Y_, dY, ddY, L, dL, ddL, Z] + list(q) + list(qd)
        ref = np.linalg.solve(np.array(fM(*args), float), np.array(fF(*args), float).ravel())
        worst = max(worst, np.max(np.abs(mine - ref)) / np.max(np.abs(ref)))
    assert worst < 1e-9, worst


@pytest.mark.parametrize("case", list(CASES) + ["elastic-only"])
def test_fast_path_matches_reference_path_with_damping_wind_and_slewing(case):
    # the solver's float path (_qdd) and the array path (_eval, used for outputs and checked
    # against sympy above) must be one set of equations, forces included
    over = dict(CASES.get(case, {"rope": {"length_m": 9.0, "stiffness_kN_per_m": 900.0,
                                          "diameter_m": 0.02, "bounce_damping_ratio": 0.03}}))
    over["damping"] = {"ratio": 0.04}
    over["wind"] = {"speed_m_s": 11.0, "direction_deg": 35.0}
    over["load"] = dict(over.get("load", {"mass_kg": 1500.0}), wind_area_m2=6.0)
    over["rope"] = dict(over.get("rope", {"length_m": 9.0}), diameter_m=0.02)
    if "mass_kg" in over.get("hook", {}):  # a hook block (not a [hook] table with a swivel only)
        over["hook"] = dict(over["hook"], size_m=[0.5, 0.4, 0.9])
    model = HookLoadModel(_scene(**over))
    rng = np.random.default_rng(3)
    nq = model.n_coordinates
    for _ in range(20):
        q = np.zeros(nq)
        q[:2] = rng.uniform(-0.3, 0.3, 2)
        if model.leg_below_hook:
            q[2:4] = rng.uniform(-0.3, 0.3, 2)
        if model.rigid_load:
            q[model.tilt_index:model.tilt_index + 2] = rng.uniform(-0.4, 0.4, 2)
        if model.yaw_index is not None:
            q[model.yaw_index] = rng.uniform(-3.0, 3.0)
        qd = rng.uniform(-0.7, 0.7, nq)
        kt = tuple(rng.uniform(-2, 2, 9)) + (9.0, 0.3, -0.2, rng.uniform(-0.1, 0.1))
        kt = kt[:2] + (30.0,) + kt[3:5] + (0.0,) + kt[6:8] + (0.0,) + kt[9:]
        if model.rope_is_elastic:
            q[model.rope_length_index] = model.elastic_rope.unstretched(9.0) + rng.uniform(0.001, 0.02)
        y = np.concatenate([q, qd])
        a, b = model._qdd(y, kt), model._eval(y, kt)
        assert np.max(np.abs(a - b)) <= 1e-11 * np.max(np.abs(b))
