"""Hook block and load: two-body swing, rigid loads on rigging, elastic hoist rope.

One model class covers every combination the scene can describe:

- a hook block (``[hook]``) of its own mass on the hoist rope, or none;
- the load as a point mass or as a rigid body (``load.size_m`` /
  ``load.inertia_kg_m2``) hung on a single leg, a bridle or a spreader
  (``[rigging]``);
- an inextensible hoist rope (length prescribed by the hoist motion) or an
  elastic one (``rope.stiffness_kN_per_m`` / ``rope.modulus_GPa``), whose
  stretched length is then a state.

Generalised coordinates (all regular at hanging rest)
------------------------------------------------------
``u1, v1``
    Horizontal components of the unit rope direction
    :math:`n_1 = (u_1, v_1, -w_1)`, the chart of the point-mass model.
``u2, v2``
    Same for the sling leg below a hook block (single leg only).
``a, b``
    Tilt of a rigid load.
``yaw``
    Heading ``c`` of a rigid load about the vertical, turned last:
    :math:`R = R_z(c) R_x(a) R_y(b)`, regular for every heading and singular only
    at 90 degrees of tilt.  A coordinate on a free swivel (``[hook] swivel``) and on a
    locked one with the reeving's torsion spring (:math:`-k (c - c_0)` about the start
    heading); a locked swivel without it holds ``c = c_0`` by an ideal constraint
    torque (then the equations are exactly the fixed-heading ones).
``ell``
    Stretched rope length of an elastic rope.

Notes
-----
Positions: hook :math:`H = p(t) + \\ell n_1` (plus the leg below for a hook
that is only the rope's end), leg end :math:`A = H + l_2 n_2`, load CG
:math:`G = P + R c` with :math:`P` the pivot (:math:`A` or :math:`H`) and
:math:`c` the CG seen from the pivot in load axes.  Every point's acceleration
is linear in :math:`\\ddot q`: :math:`\\ddot r_i = J_i \\ddot q + b_i(q, \\dot q, t)`,
and the angular acceleration :math:`\\dot\\omega = J_\\omega \\ddot q + b_\\omega`,
with :math:`\\omega = \\dot c\\, e_z + R_z(c)(\\dot a\\, e_x + \\dot b\\, R_x(a) e_y)`
(:class:`LoadFrame`; in load axes the yaw adds :math:`\\dot c\\,(-\\sin b \\cos a, \\sin a,
\\cos b \\cos a)`, the rest of Euler's equations unchanged).  Kane's equations
(the principle of virtual power; Kane & Levinson, *Dynamics: Theory and
Applications*, 1985) give

.. math::
    M(q)\\,\\ddot q = Q, \\qquad
    M = \\sum_i m_i J_i^T J_i + J_\\omega^T I_w J_\\omega,

    Q = \\sum_i J_i^T (F_i - m_i b_i)
        - J_\\omega^T\\left(I_w b_\\omega + \\omega \\times I_w \\omega\\right),

:math:`I_w = R\\, I\\, R^T`, :math:`F_i` the applied forces (gravity,
equivalent viscous damping of the swing, air drag and wind, the elastic
rope's tension).  The inextensible rope's and the legs' tensions are
constraint forces: they come out afterwards from each body's momentum balance
(hoist rope :math:`T = n_1 \\cdot \\sum_i (F_i - m_i \\ddot r_i)`; single leg
:math:`T_2 = n_2 \\cdot (F_G - m \\ddot r_G)`; bridle legs: the force the hook
exerts on the load, :math:`m \\ddot r_G - F_G`, resolved along the legs, least
squares, minimum norm for four legs).  The same equations are derived
independently with ``sympy.physics.mechanics`` in the tests.

Damping: a force :math:`-2\\zeta\\omega_d m_i (\\dot r_i - \\dot p - \\dot\\ell n_1
- \\Omega \\hat z \\times (r_i - p))` on every mass (relative to the slewing jib,
:math:`\\Omega` its slew rate, as in the point-mass model),
:math:`\\omega_d = \\sqrt{g / (\\ell + d)}` with :math:`d` the hanging distance
from the rope's end to the load's CG: the core model's damping in the
point-mass limit (mass-proportional, so faster modes are damped less); it acts on
translation only, so it exerts no moment: a load on a free swivel keeps its heading
in space while the jib slews.  The load's drag acts at its centre of pressure
(``load.wind_center_m``, the CG by default; away from the CG it turns the load), the
hook block's at its centre when it has a size, and half the rope's drag acts at the
rope's end as in the point-mass model.  The legs of a bridle or spreader meet at one
point, so turning the load about the vertical through it does no work against
gravity: nothing but a torsion spring restores the heading.

References
----------
.. [1] T. R. Kane and D. A. Levinson, *Dynamics: Theory and Applications*,
   McGraw-Hill, 1985 (Kane's equations).
.. [2] W. T. Thomson and M. D. Dahleh, *Theory of Vibration with Applications*,
   5th ed., Prentice Hall, 1998 (equivalent viscous damping).
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import NamedTuple

import numpy as np

from swingsim import constants
from swingsim.dynamics.base import LinearSwing, ModelDefaults, SwingModel
from swingsim.dynamics.contact import PointForces
from swingsim.dynamics.pendulum import direction_from_projected, projected_angles, starts_in_steady_wind
from swingsim.dynamics.wind import rope_end_wind, wind_field
from swingsim.dynamics.rigging import load_inertia, rigging_geometry, rotation, rotation_z, tilt_to_align
from swingsim.dynamics.rope import elastic_rope


def _cx(a, b):
    """Cross product of two 3-sequences as a tuple (np.cross is slow on single vectors)."""
    return (a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0])


def _turn(cc, sc, v):
    """A 3-sequence turned about the vertical by the angle whose cosine and sine are ``cc, sc``."""
    return (cc * v[0] - sc * v[1], sc * v[0] + cc * v[1], v[2])


#: Names under which this model is listed in ``swingsim.dynamics.registry.MODELS``.
MODEL_NAMES = ("hook-load", "rigid-load", "elastic-rope", "sling-load", "point-load")


def model_name(scene) -> str | None:
    """Which variant of this model a scene needs; None when the point-mass model fits.

    Parameters
    ----------
    scene : Scene
        A validated scene; its hook, rigid load, elastic rope and rigging decide.

    Returns
    -------
    str or None
        ``hook-load``: a hook block; ``rigid-load``: a rigid load on the rope's end;
        ``elastic-rope``: a point load on an elastic rope; ``sling-load``: a point
        load on a sling leg below the rope's end (no hook block); ``point-load``: a
        point load on the rope's end held by tag lines; None otherwise.  A scene with
        ``[ground]`` has an elastic rope (it goes slack over a landed load).
    """
    if scene.hook is not None:
        return "hook-load"
    if scene.rigid_load:
        return "rigid-load"
    if scene.rope.elastic or getattr(scene, "ground", None) is not None:
        return "elastic-rope"
    if scene.rigging is not None:
        return "sling-load"
    if getattr(scene, "tag_lines", ()):
        return "point-load"
    return None


# -- the equations of motion, for one state (floats) or many (arrays) -------------------


def _on(coefficient) -> bool:
    """False only for a coefficient that is a plain zero (a term that is off everywhere)."""
    return not (isinstance(coefficient, (int, float)) and coefficient == 0.0)


class FloatArithmetic:
    """Arithmetic of the equations on one state of plain floats (the single-run fast path)."""

    sqrt = staticmethod(math.sqrt)
    cos = staticmethod(math.cos)
    sin = staticmethod(math.sin)

    @staticmethod
    def positive(x):
        """The positive part of ``x``.

        Parameters
        ----------
        x : float
            A value [any unit].

        Returns
        -------
        float
            ``max(x, 0)`` [the unit of ``x``].
        """
        return x if x > 0.0 else 0.0

    @staticmethod
    def solve(rows, forces, masses, inertial, generalised):
        """Generalised accelerations from the stacked Jacobian: ``M qdd = Q``.

        :math:`M = B^T \\operatorname{diag}(m) B + D`, :math:`Q = B^T f + g`.

        Parameters
        ----------
        rows : list of list
            Rows of the stacked point Jacobians (3 per point) [m per chart unit].
        forces : list
            Applied force less mass times bias acceleration, per row [N].
        masses : list
            Mass of each row's point [kg].
        inertial : dict
            Additions to entries of ``M`` (a rigid load's rotation), by ``(i, j)`` with
            ``i >= j``, added to both ``(i, j)`` and ``(j, i)`` [kg m^2 per chart unit^2].
        generalised : dict
            Additions to entries of ``Q``, by index [N m per chart unit].

        Returns
        -------
        ndarray (n,)
            Accelerations [chart units / s^2].
        """
        B = np.array(rows)
        mw = np.array(masses)
        M = B.T @ (mw[:, None] * B)
        Q = B.T @ np.array(forces)
        for (i, j), x in inertial.items():
            M[i, j] += x
            if i != j:
                M[j, i] += x
        for i, x in generalised.items():
            Q[i] += x
        return np.linalg.solve(M, Q)


class ArrayArithmetic(FloatArithmetic):
    """Arithmetic of the equations on many states at once (every quantity an array or a float).

    Element by element with a fixed order of sums (no BLAS, no LAPACK): ``M`` is
    summed entry by entry, skipping the Jacobian's structural zeros, and factored
    as :math:`L D L^T` (``M`` is symmetric positive definite), so the result for
    one state does not depend on the other states of the array (see
    ``batch/engine.py``).
    """

    sqrt = staticmethod(np.sqrt)
    cos = staticmethod(np.cos)
    sin = staticmethod(np.sin)

    @staticmethod
    def positive(x):
        return np.maximum(x, 0.0)

    @staticmethod
    def solve(rows, forces, masses, inertial, generalised):
        n = len(rows[0])
        # every force holds a state, so together they have the states' full shape
        shape = np.broadcast_shapes(*(np.shape(x) for x in forces))
        weighted = [[m * x if _on(x) else 0.0 for x in r] for r, m in zip(rows, masses)]
        M = [[0.0] * n for _ in range(n)]  # lower triangle
        for i in range(n):
            for j in range(i + 1):
                acc = 0.0
                for r, mr in zip(rows, weighted):
                    if _on(mr[i]) and _on(r[j]):
                        acc = acc + mr[i] * r[j]
                M[i][j] = acc
        Q = []
        for i in range(n):
            acc = 0.0
            for r, f in zip(rows, forces):
                if _on(r[i]):
                    acc = acc + r[i] * f
            Q.append(acc)
        for (i, j), x in inertial.items():
            M[i][j] = M[i][j] + x
        for i, x in generalised.items():
            Q[i] = Q[i] + x
        # M = L D L^T (Golub & Van Loan, Matrix Computations, sec. 4.1), then two triangular solves
        L = [[0.0] * n for _ in range(n)]
        D = [0.0] * n
        for j in range(n):
            d = M[j][j]
            for k in range(j):
                if _on(L[j][k]):
                    d = d - L[j][k] * L[j][k] * D[k]
            D[j] = d
            for i in range(j + 1, n):
                s = M[i][j]
                for k in range(j):
                    if _on(L[i][k]) and _on(L[j][k]):
                        s = s - L[i][k] * L[j][k] * D[k]
                L[i][j] = s / d if _on(s) else 0.0
        z = list(Q)
        for i in range(n):
            for k in range(i):
                if _on(L[i][k]):
                    z[i] = z[i] - L[i][k] * z[k]
        x = [z[i] / D[i] for i in range(n)]
        for i in reversed(range(n)):
            for k in range(i + 1, n):
                if _on(L[k][i]):
                    x[i] = x[i] - L[k][i] * x[k]
        return np.stack([np.broadcast_to(v, shape) for v in x], axis=-1)


class LoadFrame:
    r"""The rigid load's attitude at one state, and points fixed on the load (one state or many).

    :math:`R = R_z(c) R_x(a) R_y(b)` (module Notes) and its world angular velocity
    :math:`\omega = J_\omega \dot q`.  :meth:`offset` gives a point fixed on the load, its offset from the
    CG and that offset's velocity; :meth:`generalised_force` the generalised force of a force
    applied there, and :attr:`columns` carry a moment about the CG into the coordinates: a
    force at any point of the load (the wind's centre of pressure, a tag line's attachment, a
    corner on the ground) is one term.  Works on floats and on arrays alike (``ops``).

    Parameters
    ----------
    ops : type
        :class:`FloatArithmetic` or :class:`ArrayArithmetic`.
    tilt, tilt_rate : tuple
        ``(a, b)`` [rad] and their rates [rad/s].
    yaw, yaw_rate : float or ndarray
        The heading ``c`` about the vertical [rad] and its rate [rad/s] (0 when held).
    tilt_index : int
        Index of ``a`` in the coordinates (``b`` follows).
    yaw_index : int or None
        Index of ``c`` (None when the heading is held: no coordinate of its own).
    """

    def __init__(self, ops, tilt, tilt_rate, yaw, yaw_rate, tilt_index, yaw_index):
        a, b = tilt
        da, db = tilt_rate
        ca, sa, cb, sb = ops.cos(a), ops.sin(a), ops.cos(b), ops.sin(b)
        cc, sc = ops.cos(yaw), ops.sin(yaw)
        r0 = (cb, 0.0 * cb, sb)
        r1 = (sa * sb, ca, -sa * cb)
        #: rows of R (load axes to world) [-]
        self.rows = ((cc * r0[0] - sc * r1[0], -sc * r1[1], cc * r0[2] - sc * r1[2]),
                     (sc * r0[0] + cc * r1[0], cc * r1[1], sc * r0[2] + cc * r1[2]),
                     (-ca * sb, sa, ca * cb))
        #: world angular velocity per unit rate of each coordinate (columns of J_omega) [rad per chart unit]
        self.columns = {tilt_index: (cc, sc, 0.0 * cc), tilt_index + 1: (-sc * ca, cc * ca, sa)}
        if yaw_index is not None:
            self.columns[yaw_index] = (0.0, 0.0, 1.0)
        tilts = (cc * da - sc * db * ca, sc * da + cc * db * ca, db * sa)  # Rz (da ex + db Rx ey)
        #: world angular velocity [rad/s]
        self.omega = (tilts[0], tilts[1], tilts[2] + yaw_rate)

    def offset(self, p_b):
        r"""A point fixed on the load: its world offset from the CG and that offset's rate.

        Parameters
        ----------
        p_b : sequence of 3
            The point in load axes, from the CG [m].

        Returns
        -------
        tuple
            ``(rho, rho_dot)``: world offset from the CG [m] and its rate
            :math:`\omega \times \rho` [m/s].
        """
        rho = tuple(row[0] * p_b[0] + row[1] * p_b[1] + row[2] * p_b[2] for row in self.rows)
        return rho, _cx(self.omega, rho)

    def generalised_force(self, rho, force):
        """The rotational generalised forces of a force applied at a point of the load.

        Parameters
        ----------
        rho : sequence of 3
            The point's world offset from the CG [m] (:meth:`offset`).
        force : sequence of 3
            The force, world axes [N].

        Returns
        -------
        dict
            ``{index: J_omega_k . (rho x F)}`` [N m per chart unit]; the force itself acts
            on the CG's coordinates as any force at the CG does.
        """
        moment = _cx(rho, force)
        return {k: col[0] * moment[0] + col[1] * moment[1] + col[2] * moment[2]
                for k, col in self.columns.items()}


class Structure(NamedTuple):
    """What fixes the coordinates and the terms of the equations (shared by a batch group).

    Attributes
    ----------
    n_coordinates : int
        Number of generalised coordinates.
    tilt_index : int or None
        Index of the tilt ``a`` of a rigid load (``b`` follows).
    rope_length_index : int or None
        Index of the elastic rope's stretched length.
    leg_below_hook : bool
        A single leg swinging on its own below the hook block.
    rope_end_mass : bool
        A mass at the rope's end (hook block, or the point load itself).
    rope_end_is_hook : bool
        That mass is a hook block (its drag uses the hook's coefficient).
    yaw_index : int or None
        Index of the rigid load's yaw (free swivel, or a locked one on a torsion spring);
        None when the heading is held (locked, no torsion stiffness).
    wind_center : bool
        The load's wind drag acts at a centre of pressure away from its CG.
    load_points : tuple of tuple
        Points of the load where applied forces act (tag line attachments, the corners
        that touch the ground), load axes from the CG [m]; for a point load, offsets
        from it that do not turn.  Their forces come from the ``point_forces`` function
        of :func:`equations_of_motion`.
    """

    n_coordinates: int
    tilt_index: object
    rope_length_index: object
    leg_below_hook: bool
    rope_end_mass: bool
    rope_end_is_hook: bool
    yaw_index: object = None
    wind_center: bool = False
    load_points: tuple = ()


#: Parameters of :func:`equations_of_motion` (see :meth:`HookLoadModel.equation_parameters`).
PARAMETER_NAMES = ("g", "zeta", "rope_drag_k", "end_drag_k", "load_drag_k", "end_mass_kg", "load_mass_kg",
                   "rope_end_leg_m", "leg_below_hook_m", "cg_below_rope_end_m", "c0", "c1", "c2",
                   "I0", "I1", "I2", "yaw_start_rad", "yaw_stiffness_N_m_per_rad", "wc0", "wc1", "wc2")


def equations_of_motion(q, qd, kin, par, rope, wind, structure, ops=FloatArithmetic, details=False,
                        point_forces=None):
    """Generalised accelerations of the hook-and-load model (module Notes), one state or many.

    The single-run solver calls it with floats (:class:`FloatArithmetic`), the batch
    engine with arrays of variants (:class:`ArrayArithmetic`): one set of equations.
    Positions are taken relative to the suspension point (the equations only need
    differences of positions).

    Parameters
    ----------
    q, qd : sequence
        Generalised coordinates and their rates (floats, or arrays of one shape)
        [chart units, chart units/s].
    kin : tuple
        ``(vx, vy, vz, ax, ay, az, L, dL, ddL, slew_rate)``: suspension-point velocity
        [m/s] and acceleration [m/s^2], rope length [m] and its rates [m/s, m/s^2], the
        jib's slew rate [rad/s].
    par : dict
        The parameters :data:`PARAMETER_NAMES` (floats or arrays that broadcast with
        the states): gravity [m/s^2], swing damping ratio [-], drag coefficients
        ``0.5 rho Cd A`` [kg/m] (the rope's per metre [kg/m^2]), masses [kg], lengths [m],
        the CG from its pivot in load axes [m], the principal inertias [kg m^2].
    rope : ElasticRope or None
        The elastic reeving (its fields floats or arrays); None for an inextensible rope.
    wind : tuple or callable
        ``(wx, wy)``: the wind velocity the bodies and the rope see [m/s] (the one
        place the wind enters the equations); a wind varying in time or height is
        :func:`~swingsim.dynamics.wind.rope_end_wind` (floats or arrays alike).
    structure : Structure
        Which coordinates and terms the model has.
    ops : type
        :class:`FloatArithmetic` or :class:`ArrayArithmetic`.
    details : bool
        Also return the hoist rope's tension, the leg's (below a hook block), the
        load's position and velocity.
    point_forces : callable, optional
        ``point_forces(positions, velocities) -> forces``: the forces [N] (world axes,
        one 3-sequence per point) at the points ``structure.load_points``, given their
        positions relative to the suspension point [m] and their velocities [m/s]
        (3-sequences of floats or arrays): tag lines and ground contact
        (:mod:`swingsim.dynamics.contact`).  Each acts on the load at its point: on the
        CG's coordinates and, through the load's frame, on its rotation.

    Returns
    -------
    ndarray or dict
        The accelerations [chart units / s^2] (shape ``(n,)``, or the states' shape
        plus ``(n,)``); with ``details`` a dict with ``qdd``, ``rope_tension_N`` (the
        elastic rope's clamped at zero), ``rope_tension_raw_N`` (elastic: before the
        clamp), ``leg_tension_N`` (leg below a hook block, else None), ``load_pos_m``
        (relative to the suspension point), ``load_vel_m_s`` (tuples of 3) and
        ``point_forces_N`` (the forces at ``structure.load_points``, or None).
    """
    nq, ia, il, link2 = structure.n_coordinates, structure.tilt_index, structure.rope_length_index, \
        structure.leg_below_hook
    body = ia is not None
    iy = structure.yaw_index
    # the load's heading: the yaw coordinate (free swivel, or a locked one on a torsion spring), or
    # the start's heading held (locked); turned: R = Rz(yaw) Rx(a) Ry(b) differs from Rx(a) Ry(b)
    if iy is not None:
        yaw, dyaw = q[iy], qd[iy]
    else:
        yaw, dyaw = par["yaw_start_rad"], 0.0
    turned = body and (iy is not None or _on(yaw))
    vx, vy, vz, ax, ay, az, L, dL, ddL, om_s = kin
    g = par["g"]
    sqrt = ops.sqrt
    u1, v1, du1, dv1 = q[0], q[1], qd[0], qd[1]
    w1 = sqrt(1.0 - u1 * u1 - v1 * v1)
    s1 = u1 * du1 + v1 * dv1
    n1z_d = s1 / w1
    h1 = (du1 * du1 + dv1 * dv1) / w1 + s1 * s1 / (w1 * w1 * w1)
    T_raw = None
    if il is not None:
        ell, dell = q[il], qd[il]
        T_raw = rope.tension(ell, dell, L, dL)
        T = ops.positive(T_raw)
        ddL_b = 0.0
    else:
        ell, dell = L, dL
        T = 0.0
        ddL_b = ddL
    le = ell + par["rope_end_leg_m"]
    Hx, Hy, Hz = le * u1, le * v1, -le * w1  # relative to the suspension point
    Hdx = vx + dell * u1 + le * du1
    Hdy = vy + dell * v1 + le * dv1
    Hdz = vz - dell * w1 + le * n1z_d
    z = [0.0] * nq
    Jx, Jy, Jz = z[:], z[:], z[:]
    Jx[0] = le
    Jy[1] = le
    Jz[0] = le * u1 / w1
    Jz[1] = le * v1 / w1
    if il is not None:
        Jx[il], Jy[il], Jz[il] = u1, v1, -w1
    bx = ax + ddL_b * u1 + 2 * dell * du1
    by = ay + ddL_b * v1 + 2 * dell * dv1
    bz = az - ddL_b * w1 + 2 * dell * n1z_d + le * h1
    rfx, rfy, rfz = vx + dell * u1, vy + dell * v1, vz - dell * w1
    Ld = ell + par["cg_below_rope_end_m"]
    cdamp = 2.0 * par["zeta"] * sqrt(ops.positive(g / Ld))
    if callable(wind):  # a wind varying in time or height: at the rope end's height
        wx, wy, rope_factor, load_factor = wind(Hz)
    else:
        (wx, wy), rope_factor, load_factor = wind, 1.0, None
    # forces at the rope's end
    Fx = -T * u1
    Fy = -T * v1
    Fz = T * w1
    k_rope = par["rope_drag_k"]
    if _on(k_rope):
        mx = 0.5 * (vx + Hdx) - rope_factor * wx
        my = 0.5 * (vy + Hdy) - rope_factor * wy
        mz = 0.5 * (vz + Hdz)
        al = mx * u1 + my * v1 - mz * w1
        nx_, ny_, nz_ = mx - al * u1, my - al * v1, mz + al * w1
        f = 0.5 * k_rope * ell * sqrt(nx_ * nx_ + ny_ * ny_ + nz_ * nz_)
        Fx -= f * nx_
        Fy -= f * ny_
        Fz -= f * nz_
    mH = par["end_mass_kg"]
    if structure.rope_end_mass:
        cm = cdamp * mH
        Fx -= cm * (Hdx - rfx + om_s * Hy)
        Fy -= cm * (Hdy - rfy - om_s * Hx)
        Fz -= cm * (Hdz - rfz) + mH * g
        kd = par["end_drag_k"]
        if _on(kd):
            rx, ry, rz = Hdx - wx, Hdy - wy, Hdz
            sp = kd * sqrt(rx * rx + ry * ry + rz * rz)
            Fx -= sp * rx
            Fy -= sp * ry
            Fz -= sp * rz
    rows = [Jx, Jy, Jz]
    load_moments = {}
    fvec = [Fx - mH * bx, Fy - mH * by, Fz - mH * bz]
    masses = [mH, mH, mH]
    Gx, Gy, Gz, Gdx, Gdy, Gdz = Hx, Hy, Hz, Hdx, Hdy, Hdz
    n2 = None
    if body or link2:
        Px, Py, Pz, Pdx, Pdy, Pdz = Hx, Hy, Hz, Hdx, Hdy, Hdz
        Gx_, Gy_, Gz_ = Jx[:], Jy[:], Jz[:]
        gbx, gby, gbz = bx, by, bz
        if link2:
            l2 = par["leg_below_hook_m"]
            u2, v2, du2, dv2 = q[2], q[3], qd[2], qd[3]
            w2 = sqrt(1.0 - u2 * u2 - v2 * v2)
            s2 = u2 * du2 + v2 * dv2
            n2 = (u2, v2, -w2)
            Px, Py, Pz = Hx + l2 * u2, Hy + l2 * v2, Hz - l2 * w2
            Pdx, Pdy, Pdz = Hdx + l2 * du2, Hdy + l2 * dv2, Hdz + l2 * s2 / w2
            Gx_[2] = Gx_[2] + l2
            Gy_[3] = Gy_[3] + l2
            Gz_[2] = Gz_[2] + l2 * u2 / w2
            Gz_[3] = Gz_[3] + l2 * v2 / w2
            gbz = gbz + l2 * ((du2 * du2 + dv2 * dv2) / w2 + s2 * s2 / (w2 * w2 * w2))
        if body:
            a, b, da, db = q[ia], q[ia + 1], qd[ia], qd[ia + 1]
            ca, sa, cb, sb = ops.cos(a), ops.sin(a), ops.cos(b), ops.sin(b)
            c0, c1, c2 = par["c0"], par["c1"], par["c2"]
            # in the frame turned by the yaw c: R0 = Rx(a) Ry(b) (the whole rotation without yaw)
            r0 = cb * c0 + sb * c2
            r1 = sa * sb * c0 + ca * c1 - sa * cb * c2
            r2 = -ca * sb * c0 + sa * c1 + ca * cb * c2
            o0, o1, o2 = da, db * ca, db * sa  # angular velocity of the tilts
            wr0, wr1, wr2 = o1 * r2 - o2 * r1, o2 * r0 - o0 * r2, o0 * r1 - o1 * r0
            # columns of a, b: ex x r, ey' x r
            colA = (0.0, -r2, r1)
            colB = (ca * r2 - sa * r1, sa * r0, -ca * r0)
            # bias: bw x r + w x (w x r), bw = da db (0, -sa, ca)
            k_ = da * db
            bw1, bw2 = -k_ * sa, k_ * ca
            br = (bw1 * r2 - bw2 * r1 + (o1 * wr2 - o2 * wr1), bw2 * r0 + (o2 * wr0 - o0 * wr2),
                  -bw1 * r0 + (o0 * wr1 - o1 * wr0))
            wr = (wr0, wr1, wr2)
            r = (r0, r1, r2)
            if turned:  # R = Rz(c) R0: turn every vector about the vertical, add the yaw's own terms
                cc, sc = ops.cos(yaw), ops.sin(yaw)
                r, wr, colA, colB, br = (_turn(cc, sc, x) for x in (r, wr, colA, colB, br))
                if iy is not None:  # d/dt (Rz v) = dc ez x Rz v + Rz dv/dt
                    wr = (wr[0] - dyaw * r[1], wr[1] + dyaw * r[0], wr[2])
                    Gx_[iy], Gy_[iy] = -r[1], r[0]  # ez x r
                    e_ = dyaw * dyaw
                    br = (br[0] - 2.0 * dyaw * (wr[1] - dyaw * r[0]) - e_ * r[0],
                          br[1] + 2.0 * dyaw * (wr[0] + dyaw * r[1]) - e_ * r[1], br[2])
            Gx, Gy, Gz = Px + r[0], Py + r[1], Pz + r[2]
            Gdx, Gdy, Gdz = Pdx + wr[0], Pdy + wr[1], Pdz + wr[2]
            Gy_[ia] = Gy_[ia] + colA[1]
            Gz_[ia] = Gz_[ia] + colA[2]
            if turned:
                Gx_[ia] = Gx_[ia] + colA[0]
            Gx_[ia + 1] = Gx_[ia + 1] + colB[0]
            Gy_[ia + 1] = Gy_[ia + 1] + colB[1]
            Gz_[ia + 1] = Gz_[ia + 1] + colB[2]
            gbx, gby, gbz = gbx + br[0], gby + br[1], gbz + br[2]
        else:
            Gx, Gy, Gz, Gdx, Gdy, Gdz = Px, Py, Pz, Pdx, Pdy, Pdz
        m = par["load_mass_kg"]
        cm = cdamp * m
        FGx = -cm * (Gdx - rfx + om_s * Gy)
        FGy = -cm * (Gdy - rfy - om_s * Gx)
        FGz = -cm * (Gdz - rfz) - m * g
        k_load = par["load_drag_k"]
        if _on(k_load) and body and structure.wind_center:
            # the drag at the centre of pressure: its force on the CG, its moment through the load's frame
            frame = LoadFrame(ops, (a, b), (da, db), yaw, dyaw, ia, iy)
            rho, rho_d = frame.offset((par["wc0"], par["wc1"], par["wc2"]))
            lwf = 1.0 if load_factor is None else load_factor(Gz + rho[2])
            rx, ry, rz = Gdx + rho_d[0] - lwf * wx, Gdy + rho_d[1] - lwf * wy, Gdz + rho_d[2]
            sp = k_load * sqrt(rx * rx + ry * ry + rz * rz)
            FGx = FGx - sp * rx
            FGy = FGy - sp * ry
            FGz = FGz - sp * rz
            load_moments = frame.generalised_force(rho, (-sp * rx, -sp * ry, -sp * rz))
        elif _on(k_load):
            lwf = 1.0 if load_factor is None else load_factor(Gz)
            rx, ry, rz = Gdx - lwf * wx, Gdy - lwf * wy, Gdz
            sp = k_load * sqrt(rx * rx + ry * ry + rz * rz)
            FGx = FGx - sp * rx
            FGy = FGy - sp * ry
            FGz = FGz - sp * rz
        rows += [Gx_, Gy_, Gz_]
        fvec += [FGx - m * gbx, FGy - m * gby, FGz - m * gbz]
        masses += [m, m, m]
    applied_at_points = None
    if structure.load_points and point_forces is not None:
        # forces at points of the load (tag lines, ground contact): on the load's rows (the
        # rope's end for a point load hanging there), their moment about the CG through the
        # load's frame
        at_points = LoadFrame(ops, (a, b), (da, db), yaw, dyaw, ia, iy) if body else None
        points = structure.load_points
        if ops is FloatArithmetic and getattr(point_forces, "clear_of_ground", None) is not None \
                and point_forces.clear_of_ground(Gz):
            points = points[:point_forces.n_tag_lines]  # the contact points are surely off the ground
        pos, vel, rhos = [], [], []
        for p_b in points:
            if body:
                rho, rho_d = at_points.offset(p_b)
            else:
                rho, rho_d = p_b, (0.0, 0.0, 0.0)
            rhos.append(rho)
            pos.append((Gx + rho[0], Gy + rho[1], Gz + rho[2]))
            vel.append((Gdx + rho_d[0], Gdy + rho_d[1], Gdz + rho_d[2]))
        applied_at_points = point_forces(pos, vel)
        row = 3 if (body or link2) else 0
        mx = my = mz = 0.0
        for rho, F in zip(rhos, applied_at_points):
            fvec[row] = fvec[row] + F[0]
            fvec[row + 1] = fvec[row + 1] + F[1]
            fvec[row + 2] = fvec[row + 2] + F[2]
            if body:
                mx = mx + rho[1] * F[2] - rho[2] * F[1]
                my = my + rho[2] * F[0] - rho[0] * F[2]
                mz = mz + rho[0] * F[1] - rho[1] * F[0]
        if body:  # the moment about the CG, through the angular velocity's Jacobian
            for k, col in at_points.columns.items():
                load_moments[k] = load_moments.get(k, 0.0) + col[0] * mx + col[1] * my + col[2] * mz
    inertial, generalised = {}, {}
    n_points = len(rows) // 3  # the bodies' rows (x, y, z of each), before any rotation's
    if body:
        I0, I1, I2 = par["I0"], par["I1"], par["I2"]
        # body-frame angular velocity and its bias; Euler's equations about the CG
        # (the yaw about the vertical does not change the body-frame terms: Rz^T ez = ez)
        wb0, wb1, wb2 = da * cb, db, da * sb
        ab0, ab2 = -da * db * sb, da * db * cb
        if iy is None:
            h0 = I0 * ab0 + (wb1 * I2 * wb2 - wb2 * I1 * wb1)
            h1_ = wb2 * I0 * wb0 - wb0 * I2 * wb2
            h2 = I2 * ab2 + (wb0 * I1 * wb1 - wb1 * I0 * wb0)
            inertial = {(ia, ia): I0 * cb * cb + I2 * sb * sb, (ia + 1, ia + 1): I1}
            generalised = {ia: -(cb * h0 + sb * h2), ia + 1: -h1_}
        else:
            # the yaw's column in load axes, ez seen from the load: (-sb ca, sa, cb ca)
            e0, e1, e2 = -sb * ca, sa, cb * ca
            wb0, wb1, wb2 = wb0 + dyaw * e0, wb1 + dyaw * e1, wb2 + dyaw * e2
            ab0 = ab0 + dyaw * (da * sb * sa - db * cb * ca)
            ab1 = dyaw * da * ca
            ab2 = ab2 - dyaw * (db * sb * ca + da * cb * sa)
            h0 = I0 * ab0 + (wb1 * I2 * wb2 - wb2 * I1 * wb1)
            h1_ = I1 * ab1 + (wb2 * I0 * wb0 - wb0 * I2 * wb2)
            h2 = I2 * ab2 + (wb0 * I1 * wb1 - wb1 * I0 * wb0)
            # the body-frame angular velocity is linear in the rates like a point's velocity: three
            # rows of the stacked Jacobian weighted by the principal inertias add J_b^T I J_b to M
            # and -J_b^T (I alpha_bias + w x I w) to Q
            za = [0.0] * nq
            ra, rb, rc = za[:], za[:], za[:]
            ra[ia], ra[iy] = cb, e0
            rb[ia + 1], rb[iy] = 1.0, e1
            rc[ia], rc[iy] = sb, e2
            rows += [ra, rb, rc]
            fvec += [-h0, -h1_, -h2]
            masses += [I0, I1, I2]
            generalised = {iy: 0.0}
            k_yaw = par["yaw_stiffness_N_m_per_rad"]
            if _on(k_yaw):  # the reeving's torsion (locked swivel): a spring about the start heading
                generalised[iy] = generalised[iy] - k_yaw * (yaw - par["yaw_start_rad"])
        for k, x in load_moments.items():
            generalised[k] = generalised.get(k, 0.0) + x
    qdd = ops.solve(rows, fvec, masses, inertial, generalised)
    if not details:
        return qdd
    # what is left of each point's momentum balance: the constraint forces (module Notes)
    acc = [qdd[..., i] for i in range(nq)]
    rest = []
    for r, f, mr in zip(rows[:3 * n_points], fvec, masses):
        s = f
        for i, x in enumerate(r):
            if _on(x):
                s = s - mr * x * acc[i]
        rest.append(s)
    if il is not None:
        rope_T = T
    else:  # massless rope: T n1 = sum over the bodies of (F - m a)
        tot = [sum(rest[c::3]) for c in range(3)]
        rope_T = u1 * tot[0] + v1 * tot[1] - w1 * tot[2]
    leg_T = None
    if link2:  # the leg pulls the load along -n2: T2 = n2 . (F_G - m a_G)
        leg_T = n2[0] * rest[3] + n2[1] * rest[4] + n2[2] * rest[5]
    return {"qdd": qdd, "rope_tension_N": rope_T, "rope_tension_raw_N": T_raw, "leg_tension_N": leg_T,
            "load_pos_m": (Gx, Gy, Gz), "load_vel_m_s": (Gdx, Gdy, Gdz), "point_forces_N": applied_at_points}


class HookLoadModel(ModelDefaults, SwingModel):
    """Hook block, rigid or point load on rigging, inextensible or elastic rope.

    Implements :class:`swingsim.dynamics.base.SwingModel` (whose members document
    the methods; what differs is in the Notes below); the equations are in the
    module Notes.  The attributes below are what the metrics and the tests read;
    everything else is internal.

    Parameters
    ----------
    scene : Scene
        A validated scene that :func:`model_name` assigns to this model.

    Attributes
    ----------
    name : str
        The variant (:func:`model_name`).
    state_names : tuple of str
        The generalised coordinates (module docstring), then their rates.
    n_coordinates : int
        Number of generalised coordinates (half the state's length).
    tilt_index : int or None
        Index of the rigid load's tilt ``a`` in the coordinates (``b`` follows);
        None for a point load.
    rope_length_index : int or None
        Index of the elastic rope's stretched length in the coordinates; None for
        an inextensible rope.
    gravity_m_s2 : float
        Gravitational acceleration [m/s^2].
    load_mass_kg, hook_mass_kg, hanging_mass_kg : float
        Mass of the load, of the hook block (0 without one) and of both [kg].
    has_hook_block : bool
        Whether a hook block of its own mass hangs on the rope.
    rigid_load : bool
        Whether the load is a rigid body (else a point mass).
    rigging_kind : str
        ``"single"``, ``"bridle"`` or ``"spreader"`` (``"single"`` without rigging).
    leg_below_hook : bool
        A single sling leg swinging on its own below the hook block.
    leg_below_hook_m : float
        Its length [m] (0 otherwise).
    rope_end_leg_m : float
        Without a hook block, a single leg's length added to the hoist rope: the
        leg hangs straight on from the rope's end [m] (0 otherwise).
    geometry : Geometry or None
        Rigging geometry of a rigid load (:func:`~swingsim.dynamics.rigging.rigging_geometry`).
    inertia_b : ndarray or None
        Principal moments of inertia of a rigid load about its CG, load axes [kg m^2].
    cg_from_pivot_b : ndarray
        The load's CG seen from its pivot, load axes [m] (zeros for a point load).
    attach_points_b : ndarray
        Leg attachment points (k, 3), load axes from the CG [m].
    n_legs : int
        Number of sling legs whose tensions are output.
    leg_wll_N : ndarray or None
        Declared working load limit of each leg [N].
    elastic_rope : ElasticRope or None
        The elastic reeving (:mod:`swingsim.dynamics.rope`); None when inextensible.
    hanging_rope : ElasticRope or None
        The reeving with the system hanging, lifted: ``elastic_rope`` itself, except for a
        lift-off, whose ``elastic_rope`` starts unstretched and slack.
    rope_is_elastic : bool
        Whether the rope's stretched length is a state.
    starts_resting : bool
        ``start.rope_preload = "lift-off"``: the load rests, supported, until the
        rope's pull reaches its weight.
    lift_off_time_s : float or None
        The instant of lift-off [s] (inf if never), set by :meth:`initial_state`.
    initial_rope_length_m : float
        The scene's rope length (loaded, at rest) [m].
    extra_breakpoints : tuple of float
        The lift-off instant, where the equations change [s].

    Notes
    -----
    What this model adds to the protocol:

    - initial state: the whole hanging system tilted rigidly to
      ``start.swing_deg``, at rest relative to the support (suspension point, hook
      and load CG on one straight line); ``start.swing_rate_deg_s`` turns it
      rigidly about the suspension point (yaw part dropped for a rigid load).
      With ``wind.onset = "steady"`` (the default) the system starts from its rest in
      the steady wind instead (:meth:`wind_rest_state`), ``start.swing_deg`` added to
      the projected angles of the rope, the leg and the CG's direction from its pivot;
      a load resting for lift-off starts plumb (it rests on its support; the wind
      takes it as it lifts off).
      With ``rope_preload = "lift-off"`` it also finds :attr:`lift_off_time_s`,
      and nothing moves before that instant;
    - events ``slack`` (hoist rope), ``leg_slack`` (a leg below a hook block only)
      and ``overswing`` (rope, leg or tilt at the chart's limit), with a message
      of its own for a slack elastic rope or sling leg;
    - swing periods linearised about rest with the support fixed,
      :math:`K \\phi = \\omega^2 M \\phi` (generalised eigenproblem, scipy); a
      degenerate pair (both swing planes alike) is listed once, a rigid load's
      distinct modes all; the elastic rope's bounce, :math:`2\\pi\\sqrt{m / k}`,
      is left out of them (it does not couple with the swing at rest);
    - at rest the hoist rope carries the sum of the forces below it (gravity,
      wind drag on load and hook, half the rope's own drag; fixed-point
      iteration, as for the point-mass model);
    - besides the required outputs: ``hook_vel`` (N, 3) [m/s], ``leg_tension_N``
      (N, k) [N], ``attach_points`` (N, k, 3) [m], ``load_rotation`` (N, 3, 3),
      ``load_tilt_deg`` (N, 2) (None for a point load), ``top_sling_tension_N``
      (N, 2) [N], ``spreader_lugs`` (N, k, 3) and ``spreader_ends`` (N, 2, 3) [m]
      for a spreader, ``rope_stretch_m`` (N,) [m] for an elastic rope, the static
      leg loads [N] and ``extra_columns`` for the CSV.
    """

    def __init__(self, scene):
        self.scene = scene
        load, rope, wind = scene.load, scene.rope, scene.wind
        rig, hook = scene.rigging, scene.hook
        self.gravity_m_s2 = g = scene.gravity_m_s2
        self._swing_damping_ratio = scene.damping_ratio
        d = math.radians(wind.direction_deg)
        self._wind_x_m_s, self._wind_y_m_s = wind.speed_m_s * math.cos(d), wind.speed_m_s * math.sin(d)
        #: the wind when it changes in time or with height (None: the steady, uniform wind above)
        self.wind = wind_field(scene)
        if self.wind is not None:
            self.max_step_s = self.wind.max_step_s
        rho = wind.air_density_kg_m3
        self.load_mass_kg = load.mass_kg
        self._load_drag_k = 0.5 * rho * load.drag_coefficient * load.wind_area_m2 if load.wind_area_m2 else 0.0
        self._rope_drag_k = 0.5 * rho * rope.drag_coefficient * rope.diameter_m if rope.diameter_m else 0.0
        self.has_hook_block = hook is not None
        self.hook_mass_kg = hook.mass_kg if hook else 0.0
        self._hook_drag_k = 0.0
        if hook and hook.size_m:
            self._hook_drag_k = 0.5 * rho * hook.drag_coefficient * hook.size_m[0] * hook.size_m[2]
        self.rigid_load = scene.rigid_load
        self.rigging_kind = rig.kind if rig else "single"
        legs = rig.leg_length_m if rig else (0.0,)
        # a leg with a direction of its own only below a hook block
        self.leg_below_hook = self.has_hook_block and self.rigging_kind == "single"
        self.leg_below_hook_m = legs[0] if self.leg_below_hook else 0.0
        self.rope_end_leg_m = (legs[0] if (not self.has_hook_block and self.rigging_kind == "single")
                               else 0.0)
        self.geometry = rigging_geometry(rig, load) if (rig is not None and self.rigid_load) else None
        if self.rigid_load:
            self.inertia_b = load_inertia(load)
            self.cg_from_pivot_b = self.geometry.cg_from_pivot_b.copy()
            self.attach_points_b = self.geometry.attach_b
        else:
            self.inertia_b = None
            self.cg_from_pivot_b = np.zeros(3)
            self.attach_points_b = np.zeros((1, 3))
        self.hanging_mass_kg = self.load_mass_kg + self.hook_mass_kg
        self.ground = getattr(scene, "ground", None)
        #: the rope's stiffness is this model's assumption (a scene with [ground] and a rope without one)
        self.rope_stiffness_assumed = False
        if self.ground is not None and not rope.elastic:
            # ground contact needs a rope that can go slack: the hanging weight stretches it by
            # constants.ASSUMED_ROPE_STRAIN (said in the summary)
            rope = replace(rope, stiffness_kN_per_m=self.hanging_mass_kg * g
                           / (constants.ASSUMED_ROPE_STRAIN * rope.length_m) / 1e3)
            self.rope_stiffness_assumed = True
        self.elastic_rope = elastic_rope(rope, self.hanging_mass_kg * g, self.hanging_mass_kg)
        self.rope_is_elastic = self.elastic_rope is not None
        self.starts_resting = self.rope_is_elastic and scene.start.rope_preload == "lift-off"
        #: the load starts resting on the ground (start.on_ground) and lifts off as the forces say
        self.starts_on_ground = bool(getattr(scene.start, "on_ground", False))
        #: instant the load lifts off [s] (rope_preload = lift-off); set by initial_state
        self.lift_off_time_s = None
        #: instants where the solver must restart (read by swingsim.simulation.simulate)
        self.extra_breakpoints = self.wind.breakpoints if self.wind is not None else ()
        #: the reeving as it hangs with the load lifted (its unstretched length at the scene's
        #: rope length is the loaded one's); the same as elastic_rope unless resting for lift-off
        self.hanging_rope = self.elastic_rope
        if self.starts_resting:
            # at t = 0 the rope is unstretched and slack by rope_slack_m
            self.elastic_rope = replace(self.elastic_rope,
                                        lambda0_m=rope.length_m + scene.start.rope_slack_m)
        self.initial_rope_length_m = rope.length_m
        # hanging distance from the rope's end to the CG (for the damping frequency)
        self._cg_below_rope_end_m = (self.rope_end_leg_m + self.leg_below_hook_m
                                     + float(np.linalg.norm(self.cg_from_pivot_b)))
        names = ["u1", "v1"]
        if self.leg_below_hook:
            names += ["u2", "v2"]
        self.tilt_index = None
        swivel = getattr(scene, "swivel", None)
        self.swivel = swivel.kind if swivel is not None else "free"
        self.yaw_stiffness_N_m_per_rad = swivel.torsion_stiffness_N_m_per_rad if swivel is not None else 0.0
        self.yaw_start_rad = math.radians(getattr(scene.start, "yaw_deg", 0.0)) if self.rigid_load else 0.0
        self.wind_center_b = np.array(getattr(load, "wind_center_m", (0.0, 0.0, 0.0)), dtype=float)
        self.yaw_index = None
        if self.rigid_load:
            self.tilt_index = len(names)
            names += ["tilt_a", "tilt_b"]
            # the heading is a coordinate unless a locked swivel holds it (no torsion spring)
            if self.swivel == "free" or self.yaw_stiffness_N_m_per_rad > 0.0:
                self.yaw_index = len(names)
                names += ["yaw"]
        self.rope_length_index = None
        if self.rope_is_elastic:
            self.rope_length_index = len(names)
            names += ["rope_len"]
        self.n_coordinates = len(names)
        self.state_names = tuple(names) + tuple("d" + n for n in names)
        self.angle_limit_rad = math.radians(constants.MODEL_ANGLE_LIMIT_DEG)
        self._wlim = math.cos(self.angle_limit_rad)
        self.n_legs = 1 if self.rigging_kind == "single" else len(self.attach_points_b)
        self.leg_wll_N = None
        if rig is not None and rig.wll_kN is not None:
            self.leg_wll_N = np.array(rig.wll_kN) * 1e3
        self.name = model_name(scene)
        self._out_cache = []
        self._hanging_cache = None
        #: the coordinates and terms of the equations (a batch group shares them)
        self.structure = Structure(self.n_coordinates, self.tilt_index, self.rope_length_index,
                                   self.leg_below_hook, self.hook_mass_kg + (
                                       0.0 if (self.rigid_load or self.leg_below_hook) else self.load_mass_kg) > 0.0,
                                   self.has_hook_block, self.yaw_index,
                                   bool(self.rigid_load and self._load_drag_k and np.any(self.wind_center_b)))
        #: tag lines and ground contact (None without either): forces at points of the load
        self.contacts = self._point_force_set(scene)
        if self.contacts is not None:
            self.structure = self.structure._replace(load_points=self.contacts.points_b)
        #: scipy's method for this model: the ground's friction is stiff, so LSODA (switching to BDF
        #: while the load stands on the ground) with ground contact, DOP853 otherwise
        self.solver_method = "LSODA" if (self.contacts is not None and self.contacts.n_contacts) else "DOP853"
        self._par = self.equation_parameters()

    def _point_force_set(self, scene):
        """The scene's tag lines and ground contact as one :class:`PointForces` (None without either)."""
        lines = tuple(getattr(scene, "tag_lines", ()))
        if not lines and self.ground is None:
            return None
        ground = None
        if self.ground is not None:
            gr = self.ground
            points = self.contact_points_b()
            n_bottom = 4 if len(points) == 8 else 1
            m = self.load_mass_kg if (self.rigid_load or self.leg_below_hook) else self.hanging_mass_kg
            K = gr.stiffness_kN_per_m * 1e3 if gr.stiffness_kN_per_m else m * self.gravity_m_s2 / gr.settlement_m
            C = 2.0 * gr.damping_ratio * math.sqrt(K * m)
            #: the support's whole stiffness [N/m] and damping [N s/m] under the load
            self.ground_stiffness_N_per_m, self.ground_damping_N_s_per_m = K, C
            ground = (gr.z_m, K / n_bottom, C / n_bottom, gr.friction_coefficient, gr.slip_speed_m_s, points)
        return PointForces(lines, ground)

    def contact_points_b(self) -> np.ndarray:
        """The load's points that touch the ground: a box's 8 corners, a point load's bottom.

        Returns
        -------
        ndarray (k, 3)
            Load axes from the CG [m] (a point load: its bottom, half its size_m height below it).
        """
        corners = self.load_corners_b()
        if corners is not None:
            return corners
        size = self.scene.load.size_m
        return np.array([[0.0, 0.0, -0.5 * size[2] if size else 0.0]])

    def _point_forces(self, t, support):
        """The ``point_forces`` function of the equations at one instant (None without any)."""
        return None if self.contacts is None else self.contacts.at(support)

    # -- set-up ------------------------------------------------------------------
    def initial_state(self, motion) -> np.ndarray:
        sw = self.scene.start
        if self.starts_on_ground:
            return self._resting_on_ground_state(motion)
        e0 = motion.evaluate(np.array([0.0]))
        L0 = float(e0["L"][0])
        self._rest_support_z = float(e0["p"][0][2])  # where the rest in the mean wind hangs from
        # lift-off: the load rests on its support, plumb below the suspension point, until the
        # rope lifts it; the wind then takes it as it leaves the ground
        in_wind = starts_in_steady_wind(self.scene) and not self.starts_resting
        rest = self.wind_rest_state(L0)[:self.n_coordinates] if in_wind else None
        # the swing of [start] is added to the projected angles of the rest (plumb in still air)
        lean1 = projected_angles(self._direction(rest, 0)) if in_wind else (0.0, 0.0)
        u, v, du, dv = direction_from_projected(
            lean1[0] + math.radians(sw.swing_deg[0]), lean1[1] + math.radians(sw.swing_deg[1]),
            math.radians(sw.swing_rate_deg_s[0]), math.radians(sw.swing_rate_deg_s[1]))
        w = math.sqrt(1.0 - u * u - v * v)
        n1 = np.array([u, v, -w])
        n1d = np.array([du, dv, (u * du + v * dv) / w])
        Om = np.cross(n1, n1d)

        def turned(direction):  # a rest direction with the start's swing added
            if not in_wind:
                return n1
            lean = projected_angles(direction)
            return np.array(direction_from_projected(lean[0] - lean1[0] + math.atan2(u, w),
                                                     lean[1] - lean1[1] + math.atan2(v, w))[:2])

        q = [u, v]
        qd = [du, dv]
        if self.leg_below_hook:
            n2 = turned(self._direction(rest, 2)) if in_wind else n1
            n2 = np.array([n2[0], n2[1], -math.sqrt(max(1.0 - n2[0] ** 2 - n2[1] ** 2, 0.0))])
            n2d = np.cross(Om, n2)
            q += [float(n2[0]), float(n2[1])]
            qd += [float(n2d[0]), float(n2d[1])]
        if self.rigid_load:
            a0, b0 = self.geometry.rest_tilt_rad
            target = n1
            if in_wind:  # the CG's direction from its pivot at rest, turned by the start's swing
                ia = self.tilt_index
                a0, b0 = rest[ia], rest[ia + 1]
                cg = rotation_z(self.yaw_start_rad) @ rotation(a0, b0) @ self.cg_from_pivot_b
                norm = float(np.linalg.norm(cg))
                if norm > 0.0:
                    t2 = turned(cg / norm)
                    target = np.array([t2[0], t2[1], -math.sqrt(max(1.0 - t2[0] ** 2 - t2[1] ** 2, 0.0))])
            c0 = self.yaw_start_rad
            a, b = tilt_to_align(self.cg_from_pivot_b, rotation_z(-c0) @ target, guess=(a0, b0))
            if in_wind and not any(sw.swing_deg):
                a, b = rest[self.tilt_index], rest[self.tilt_index + 1]  # exactly the rest
            q += [a, b]
            Jw = rotation_z(c0) @ np.array([[1.0, 0.0], [0.0, math.cos(a)], [0.0, math.sin(a)]])
            rates = np.linalg.lstsq(Jw, Om, rcond=None)[0]
            qd += [float(rates[0]), float(rates[1])]
            if self.yaw_index is not None:  # the heading and its rate of [start]
                q.append(c0)
                qd.append(math.radians(sw.yaw_rate_deg_s))
        if in_wind and not any(sw.swing_deg):  # exactly the rest (no round trip through angles)
            q[:2] = [float(rest[0]), float(rest[1])]
            if self.leg_below_hook:
                q[2:4] = [float(rest[2]), float(rest[3])]
        if self.rope_is_elastic:
            if sw.rope_preload == "none":
                q.append(self.elastic_rope.lambda0_m)
            elif in_wind:  # statically stretched by the pull at rest in the wind
                q.append(float(rest[self.rope_length_index]))
            else:  # static stretch, or resting at the hanging position (lift-off)
                q.append(self.initial_rope_length_m)
            qd.append(0.0)
        if self.starts_resting:
            self.lift_off_time_s = self._find_lift_off_time(motion)
            # the solver restarts there: the equations change at lift-off
            self.extra_breakpoints = tuple(sorted(set(self.extra_breakpoints) | (
                {self.lift_off_time_s} if math.isfinite(self.lift_off_time_s) else set())))
        return np.array(q + qd, dtype=float)

    # -- the load on the ground, tag lines ----------------------------------------------
    def _resting_geometry(self, support) -> dict:
        """The system with the load resting level on the ground at t = 0 (``start.on_ground``).

        The load's CG stands ``start.load_offset_m`` in plan from the plumb below the
        suspension point, its lowest contact points on the ground pressed in by its weight;
        the rigging and the rope run straight from the load's pivot to the suspension point.
        """
        p = np.asarray(support, float)
        dx, dy = self.scene.start.load_offset_m
        R = rotation_z(self.yaw_start_rad) if self.rigid_load else np.eye(3)
        low = float(np.min((self.contact_points_b() @ R.T)[:, 2]))
        m = self.load_mass_kg if (self.rigid_load or self.leg_below_hook) else self.hanging_mass_kg
        settle = m * self.gravity_m_s2 / self.ground_stiffness_N_per_m
        G = np.array([p[0] + dx, p[1] + dy, self.ground.z_m - low - settle])
        P = G - R @ self.cg_from_pivot_b
        le = float(np.linalg.norm(P - p))
        n1 = (P - p) / le
        return {"G": G, "P": P, "n1": n1, "ell": le - self.rope_end_leg_m}

    def resting_rope_length_m(self, support) -> float:
        """The rope length (as ``rope.length_m`` counts it) that reaches the load resting on the ground.

        Parameters
        ----------
        support : sequence of 3
            The suspension point at t = 0, site axes [m].

        Returns
        -------
        float
            From the suspension point to the hook (or the rope's end) [m].
        """
        return self._resting_geometry(support)["ell"]

    def _resting_on_ground_state(self, motion) -> np.ndarray:
        """Initial state of ``start.on_ground``: at rest, the rope just taut and unstretched by the load.

        The rope carries only a hook block's weight (the load rests on the ground);
        ``start.rope_slack_m`` more rope is paid out.  Sets the unstretched rope length
        the hoist then reels in.
        """
        e0 = motion.evaluate(np.array([0.0]))
        support = e0["p"][0]
        self._rest_support_z = float(support[2])
        geo = self._resting_geometry(support)
        n1, ell = geo["n1"], geo["ell"]
        k = self.hanging_rope.stiffness(self.hanging_rope.unstretched(float(e0["L"][0])))
        carried = self.hook_mass_kg * self.gravity_m_s2 if (self.rigid_load or self.leg_below_hook) else 0.0
        lam_start = ell - carried / k + self.scene.start.rope_slack_m
        self.elastic_rope = replace(self.hanging_rope,
                                    lambda0_m=lam_start - (float(e0["L"][0]) - self.hanging_rope.loaded_length_m))
        q = [float(n1[0]), float(n1[1])]
        if self.leg_below_hook:
            q += [float(n1[0]), float(n1[1])]
        if self.rigid_load:
            q += [0.0, 0.0]
            if self.yaw_index is not None:
                q.append(self.yaw_start_rad)
        q.append(ell)
        qd = [0.0] * len(q)
        if self.yaw_index is not None:
            qd[self.yaw_index] = math.radians(self.scene.start.yaw_rate_deg_s)
        return np.array(q + qd, dtype=float)

    def _points_at(self, y, kin_state, t=0.0):
        """World positions of the load's points (tag line attachments, contact points) at one state."""
        ev = self._eval(np.asarray(y, float), kin_state, full=True, t=t)
        R = ev["R"]
        pts = np.asarray(self.structure.load_points, float).reshape(-1, 3)
        rel = pts @ R.T if self.rigid_load else pts
        return ev["G"][None, :] + rel

    def _start_points(self, motion) -> np.ndarray:
        y0 = self.initial_state(motion)
        e = motion.evaluate(np.array([0.0]))
        kin_state = tuple(float(e[k][0, j]) for k in ("p", "dp", "ddp") for j in range(3)) + (
            float(e["L"][0]), float(e["dL"][0]), float(e["ddL"][0]), float(e["slew_rate"][0]))
        return self._points_at(y0, kin_state)

    def lowest_point_at_start_m(self, motion) -> float:
        """Height of the load's lowest contact point at t = 0 [m] (inf without ground contact).

        Parameters
        ----------
        motion : Motion
            The scene's motion (its position at t = 0 counts).

        Returns
        -------
        float
            The lowest of the points :meth:`contact_points_b` at the start [m].
        """
        if self.contacts is None or self.contacts.n_contacts == 0:
            return math.inf
        return float(np.min(self._start_points(motion)[self.contacts.n_tag_lines:, 2]))

    def tag_line_distances_at_start_m(self, motion) -> list:
        """Distance from each tag line's attachment to its anchor at t = 0 [m].

        Parameters
        ----------
        motion : Motion
            The scene's motion.

        Returns
        -------
        list of float
            One per tag line [m].
        """
        if self.contacts is None or not self.contacts.n_tag_lines:
            return []
        pts = self._start_points(motion)
        return [float(np.linalg.norm(np.asarray(line.anchor_m, float) - pts[j]))
                for j, line in enumerate(self.contacts.tag_lines)]

    def touches_ground(self, t, y, kin_state) -> bool:
        """Whether any contact point of the load is on (in) the ground at one state.

        Parameters
        ----------
        t : float
            Time [s].
        y : array_like
            State, ordered as :attr:`state_names`.
        kin_state : tuple
            The suspension point's state (``Motion.local``'s ``kin(t)``).

        Returns
        -------
        bool
            True when a point of :meth:`contact_points_b` is below ``ground.z_m``.
        """
        if self.contacts is None or not self.contacts.n_contacts:
            return False
        pts = self._points_at(y, kin_state, t)[self.contacts.n_tag_lines:]
        return bool(np.any(pts[:, 2] < self.ground.z_m))

    def _find_lift_off_time(self, motion) -> float:
        """First instant the rope's pull reaches the weight of everything it lifts [s] (inf if never).

        While the load rests, the rope's stretched length stays the hanging length
        and the hoist reels in unstretched rope: T(t) = k (L0 - lambda(t)) + c lambda'(t)
        when taut.
        """
        from scipy.optimize import brentq

        W = self.hanging_mass_kg * self.gravity_m_s2
        T_end = self.scene.duration_s

        def excess(t):
            e = motion.evaluate(np.array([t]))
            T = self.elastic_rope.tension(self.initial_rope_length_m, 0.0, float(e["L"][0]),
                                          float(e["dL"][0]))
            lam = self.elastic_rope.unstretched(float(e["L"][0]))
            return (T if self.initial_rope_length_m > lam else 0.0) - W

        ts = np.union1d(np.linspace(0.0, T_end, 4001), [b for b in motion.breakpoints if b <= T_end])
        prev_t, prev = ts[0], excess(ts[0])
        if prev >= 0:
            return 0.0
        for t in ts[1:]:
            v = excess(t)
            if v >= 0:
                return float(brentq(excess, prev_t, t, xtol=1e-13))
            prev_t, prev = t, v
        return math.inf

    def rest_direction(self, rope_length_m: float) -> np.ndarray:
        wv = np.array([self._wind_x_m_s, self._wind_y_m_s, 0.0])
        sp = float(np.linalg.norm(wv))
        F0 = (np.array([0.0, 0.0, -self.hanging_mass_kg * self.gravity_m_s2])
              + (self._load_drag_k + self._hook_drag_k) * sp * wv)
        n = F0 / np.linalg.norm(F0)
        for _ in range(60):
            wn = wv - (wv @ n) * n
            F = F0 + 0.5 * self._rope_drag_k * rope_length_m * float(np.linalg.norm(wn)) * wn
            n_new = F / np.linalg.norm(F)
            if np.abs(n_new - n).sum() < 1e-15:
                return n_new
            n = n_new
        return n

    @staticmethod
    def _direction(coordinates, index) -> np.ndarray:
        """The unit direction whose chart ``(u, v)`` starts at ``coordinates[index]``."""
        u, v = float(coordinates[index]), float(coordinates[index + 1])
        return np.array([u, v, -math.sqrt(max(1.0 - u * u - v * v, 0.0))])

    def wind_rest_state(self, rope_length_m: float) -> np.ndarray:
        """State of the whole system hanging at rest in the steady wind (support fixed).

        The static equilibrium of the model's own equations (every generalised
        acceleration zero at zero rates), solved by scipy's ``root`` (MINPACK hybrd) from
        the force balance: the hoist rope along the sum of the forces below it
        (:meth:`rest_direction`), a leg below the hook and a rigid load's CG from its pivot
        along the load's weight and drag, the elastic rope stretched by that pull.

        Parameters
        ----------
        rope_length_m : float
            Rope length the hoist gives at the start [m] (the loaded length of an
            elastic rope in still air).

        Returns
        -------
        ndarray
            Coordinates at rest in the wind and zero rates [chart units]; the still-air
            rest (:meth:`rest_state`) without wind.
        """
        from scipy.optimize import root

        y_still = self.rest_state(rope_length_m)
        nq = self.n_coordinates
        wind = np.array([self._wind_x_m_s, self._wind_y_m_s, 0.0])
        speed = float(np.linalg.norm(wind))
        if speed == 0.0:
            return y_still
        n1 = self.rest_direction(rope_length_m)
        load_force = (np.array([0.0, 0.0, -self.load_mass_kg * self.gravity_m_s2])
                      + self._load_drag_k * speed * wind)
        n_load = load_force / np.linalg.norm(load_force)
        guess = list(n1[:2])
        if self.leg_below_hook:
            guess += list(n_load[:2])
        if self.rigid_load:
            turn = rotation_z(-self.yaw_start_rad)
            guess += list(tilt_to_align(self.cg_from_pivot_b, turn @ n_load, guess=self.geometry.rest_tilt_rad))
        if self.rope_is_elastic:
            guess.append(float(y_still[self.rope_length_index]))
        kin_state = self._hanging_support(rope_length_m)
        zeros = np.zeros(nq)
        iy = self.yaw_index
        if iy is None:
            def residual(q):
                return self._qdd(np.concatenate([q, zeros]), kin_state, None)
        else:  # the heading stays the start's; the other coordinates balance (zero generalised forces)
            def residual(q):
                full = np.insert(q, iy, self.yaw_start_rad)
                Q = self._eval(np.concatenate([full, zeros]), kin_state, full=True, t=None,
                               contacts=False)["Q"]
                return np.delete(Q, iy)

        solution = root(residual, np.array(guess), method="hybr", options={"xtol": 1e-15})
        q = solution.x if np.max(np.abs(residual(solution.x))) <= np.max(np.abs(residual(np.array(guess)))) \
            else np.array(guess)
        if iy is not None:
            q = np.insert(q, iy, self.yaw_start_rad)
        return np.concatenate([q, zeros])

    def rest_state(self, rope_length_m=None) -> np.ndarray:
        """State of the hanging system at rest (fixed support, no wind).

        Parameters
        ----------
        rope_length_m : float, optional
            Rope length the system hangs on [m] (it sets the elastic rope's static
            stretch); the scene's initial length by default.

        Returns
        -------
        ndarray
            Coordinates at hanging rest (the elastic rope statically stretched) and
            zero rates [chart units].
        """
        q = [0.0, 0.0]
        if self.leg_below_hook:
            q += [0.0, 0.0]
        if self.rigid_load:
            q += list(self.geometry.rest_tilt_rad)  # the CG under the pivot, whatever the heading
        if self.yaw_index is not None:
            q.append(self.yaw_start_rad)
        if self.rope_is_elastic:
            L = self.initial_rope_length_m if rope_length_m is None else rope_length_m
            lam = self.hanging_rope.unstretched(L)
            q.append(lam + self.hanging_mass_kg * self.gravity_m_s2 / self.hanging_rope.stiffness(lam))
        return np.array(q + [0.0] * self.n_coordinates)

    def _hanging_support(self, rope_length_m: float) -> tuple:
        """A still support holding the system hanging, lifted, at a (loaded) rope length.

        The rope length the equations read sets the elastic rope's unstretched length; for a
        lift-off it is shifted so that this is the hanging rope's, not the slack start's.
        """
        L = rope_length_m
        if self.rope_is_elastic:
            L += self.hanging_rope.lambda0_m - self.elastic_rope.lambda0_m
        return (0.0,) * 9 + (L, 0.0, 0.0)

    def hanging_stiffness_N_per_m(self, rope_length_m: float | None = None) -> float | None:
        """Stiffness of the elastic reeving with the system hanging (lifted) at a rope length.

        Parameters
        ----------
        rope_length_m : float, optional
            Loaded rope length [m]; the scene's by default.

        Returns
        -------
        float or None
            :math:`k` at the hanging unstretched length [N/m] (for a lift-off, the length
            at lift-off, not the slack starting one); None for an inextensible rope.
        """
        if not self.rope_is_elastic:
            return None
        L = self.initial_rope_length_m if rope_length_m is None else rope_length_m
        return self.hanging_rope.stiffness(self.hanging_rope.unstretched(L))

    # -- the equations -------------------------------------------------------------
    def _wind_terms(self, t, pz, Hz):
        """The wind the equations take at one instant: the one place they read a wind field.

        Returns ``(wx, wy, rope_factor)``: the wind at the rope's end (height ``Hz``) [m/s]
        and the wind at the rope's mid-height over it [-].  ``t = None`` is the steady mean
        wind at the reference height (the rest the run starts from).
        """
        if self.wind is None:
            return self._wind_x_m_s, self._wind_y_m_s, 1.0
        if t is None:  # at rest in the mean wind, below the support of t = 0 (pz = 0 in the rest's frame)
            z0 = getattr(self, "_rest_support_z", None)
            if z0 is None or not self.wind.sheared:
                return self._wind_x_m_s, self._wind_y_m_s, 1.0
            wx, wy = self.wind.mean_velocity_at(z0 + Hz)
            return wx, wy, self._height_factor(z0 + 0.5 * (pz + Hz), z0 + Hz)
        return self.wind.terms(t, Hz, 0.5 * (pz + Hz))

    def _height_factor(self, z, z_ref, t=0.0):
        """Wind at height ``z`` over the wind at ``z_ref`` (1 without a profile) [-]; at rest (``t = None``)
        both heights are below the support of t = 0."""
        if self.wind is None or not self.wind.sheared:
            return 1.0
        if t is None:
            z0 = getattr(self, "_rest_support_z", None)
            if z0 is None:
                return 1.0
            z, z_ref = z + z0, z_ref + z0
        return float(self.wind.profile_factor(z)) / float(self.wind.profile_factor(z_ref))

    def equation_parameters(self) -> dict:
        """The parameters the equations read (:data:`PARAMETER_NAMES`), as floats.

        Returns
        -------
        dict
            Gravity [m/s^2], swing damping ratio [-], drag coefficients ``0.5 rho Cd A``
            [kg/m] (the rope's per metre of rope [kg/m^2]), the rope end's and the
            load's masses [kg], the leg lengths and the CG's hanging distance below the
            rope's end [m], the CG from its pivot in load axes ``c0, c1, c2`` [m], the
            principal inertias ``I0, I1, I2`` [kg m^2] (zeros for a point load), the start
            heading [rad], the reeving's torsion stiffness on the yaw [N m/rad] (locked swivel)
            and the wind's centre of pressure from the CG ``wc0, wc1, wc2``, load axes [m].
        """
        body_or_leg = self.rigid_load or self.leg_below_hook
        c = self.cg_from_pivot_b
        inertia = self.inertia_b if self.inertia_b is not None else (0.0, 0.0, 0.0)
        return {
            "g": self.gravity_m_s2, "zeta": self._swing_damping_ratio, "rope_drag_k": self._rope_drag_k,
            "end_drag_k": self._hook_drag_k if self.has_hook_block else self._load_drag_k,
            "load_drag_k": self._load_drag_k,
            "end_mass_kg": self.hook_mass_kg + (0.0 if body_or_leg else self.load_mass_kg),
            "load_mass_kg": self.load_mass_kg, "rope_end_leg_m": self.rope_end_leg_m,
            "leg_below_hook_m": self.leg_below_hook_m, "cg_below_rope_end_m": self._cg_below_rope_end_m,
            "c0": float(c[0]), "c1": float(c[1]), "c2": float(c[2]),
            "I0": float(inertia[0]), "I1": float(inertia[1]), "I2": float(inertia[2]),
            "yaw_start_rad": self.yaw_start_rad,
            "yaw_stiffness_N_m_per_rad": self.yaw_stiffness_N_m_per_rad if self.yaw_index is not None else 0.0,
            "wc0": float(self.wind_center_b[0]), "wc1": float(self.wind_center_b[1]),
            "wc2": float(self.wind_center_b[2]),
        }

    def _qdd(self, y, kin_state, t=0.0):
        """Generalised accelerations only: the solver's fast path (same equations as :meth:`_eval`).

        :func:`equations_of_motion` on plain floats (the batch engine calls the same
        function on arrays); the load's rotation in its own axes, where the angular
        velocity is :math:`\\omega_b = (\\dot a \\cos b, \\dot b, \\dot a \\sin b)` and the
        inertia is diagonal.  Checked against :meth:`_eval` and the sympy derivation
        in the tests.
        """
        nq = self.n_coordinates
        yl = y.tolist()
        om_s = kin_state[12] if len(kin_state) > 12 else 0.0
        kin = (kin_state[3], kin_state[4], kin_state[5], kin_state[6], kin_state[7], kin_state[8],
               kin_state[9], kin_state[10], kin_state[11], om_s)
        return equations_of_motion(yl[:nq], yl[nq:], kin, self._par, self.elastic_rope,
                                   self.wind_velocity_m_s() if self.wind is None
                                   else self._varying_wind(t, float(kin_state[2])), self.structure,
                                   point_forces=None if self.contacts is None
                                   else self.contacts.at((kin_state[0], kin_state[1], kin_state[2])))

    def _varying_wind(self, t, pz):
        """The wind for :func:`equations_of_motion` when it varies: a function of the rope end's height.

        ``t`` is the time [s] (None: at rest in the mean wind), ``pz`` the suspension
        point's height [m]; heights inside the equations are relative to it.  In a run
        it is :func:`~swingsim.dynamics.wind.rope_end_wind`, which the batch engine calls
        on arrays of variants.
        """
        if t is not None:
            return rope_end_wind(self.wind, t, pz)

        def at(hz):
            end_z = pz + hz
            wx, wy, rope_factor = self._wind_terms(t, pz, end_z)
            return wx, wy, rope_factor, lambda gz: self._height_factor(pz + gz, end_z, t)

        return at

    def wind_velocity_m_s(self) -> tuple:
        """The steady wind velocity the equations of motion see (the single run and the batch engine).

        Returns
        -------
        tuple of float
            ``(wx, wy)``: horizontal components [m/s] (the scene's mean wind; a wind that
            varies in time or with height, :attr:`wind`, is passed as a function instead).
        """
        return self._wind_x_m_s, self._wind_y_m_s

    def _eval(self, y, kin_state, full=False, applied=True, t=0.0, contacts=True):
        """Accelerations (and, with ``full``, everything the outputs need) at one instant.

        ``kin_state`` is a :class:`~swingsim.motion.kinematics.SuspensionState` (or its
        first 12 entries, slew rate then 0); ``applied=False`` leaves out damping,
        drag and wind (for the linearisation), and with them (or ``contacts=False``) the
        tag lines and the ground: the swing hanging free.
        """
        nq = self.n_coordinates
        q, qd = y[:nq], y[nq:]
        px, py, pz, vx, vy, vz, ax, ay, az, L, dL, ddL = kin_state[:12]
        om_s = kin_state[12] if len(kin_state) > 12 else 0.0  # the jib's slew rate (damping reference)
        g = self.gravity_m_s2
        u1, v1, du1, dv1 = q[0], q[1], qd[0], qd[1]
        w1 = math.sqrt(1.0 - u1 * u1 - v1 * v1)
        s1 = u1 * du1 + v1 * dv1
        n1z_d = s1 / w1
        h1 = (du1 * du1 + dv1 * dv1) / w1 + s1 * s1 / (w1 * w1 * w1)
        if self.rope_is_elastic:
            ell, dell = q[self.rope_length_index], qd[self.rope_length_index]
            rope_T = self.elastic_rope.tension(ell, dell, L, dL)
            rope_Tc = rope_T if rope_T > 0.0 else 0.0
            ddL_b = 0.0
        else:
            ell, dell = L, dL
            ddL_b = ddL
        le = ell + self.rope_end_leg_m
        # hook (rope end)
        H = (px + le * u1, py + le * v1, pz - le * w1)
        Hd = (vx + dell * u1 + le * du1, vy + dell * v1 + le * dv1, vz - dell * w1 + le * n1z_d)
        JH = np.zeros((3, nq))
        JH[0, 0] = le
        JH[1, 1] = le
        JH[2, 0] = le * u1 / w1
        JH[2, 1] = le * v1 / w1
        if self.rope_is_elastic:
            JH[:, self.rope_length_index] = (u1, v1, -w1)
        bH = np.array([ax + ddL_b * u1 + 2 * dell * du1,
                       ay + ddL_b * v1 + 2 * dell * dv1,
                       az - ddL_b * w1 + 2 * dell * n1z_d + le * h1])
        # relative-velocity reference for damping: support + rope pay-out
        ref = (vx + dell * u1, vy + dell * v1, vz - dell * w1)
        Ld = ell + self._cg_below_rope_end_m
        cdamp = 2.0 * self._swing_damping_ratio * math.sqrt(g / Ld) if (applied and Ld > 0.0) else 0.0
        wx, wy, rwf = self._wind_terms(t, pz, H[2]) if applied else (0.0, 0.0, 1.0)

        pts_m, pts_J, pts_b, pts_F = [], [], [], []
        # forces at the rope's end: rope drag (half the rope's), elastic tension
        FH = np.zeros(3)
        if applied and self._rope_drag_k:
            mx = 0.5 * (vx + Hd[0]) - rwf * wx
            my = 0.5 * (vy + Hd[1]) - rwf * wy
            mz = 0.5 * (vz + Hd[2])
            al = mx * u1 + my * v1 - mz * w1
            nx_, ny_, nz_ = mx - al * u1, my - al * v1, mz + al * w1
            spn = math.sqrt(nx_ * nx_ + ny_ * ny_ + nz_ * nz_)
            f = 0.5 * self._rope_drag_k * ell * spn
            FH -= (f * nx_, f * ny_, f * nz_)
        if self.rope_is_elastic:
            FH -= (rope_Tc * u1, rope_Tc * v1, -rope_Tc * w1)
        mH = self.hook_mass_kg + (0.0 if (self.rigid_load or self.leg_below_hook) else self.load_mass_kg)
        if mH > 0.0:
            FH[2] -= mH * g
            cm = cdamp * mH
            FH -= (cm * (Hd[0] - ref[0] + om_s * (H[1] - py)), cm * (Hd[1] - ref[1] - om_s * (H[0] - px)),
                   cm * (Hd[2] - ref[2]))
            kd = self._hook_drag_k if self.has_hook_block else self._load_drag_k
            if applied and kd:
                rx, ry, rz = Hd[0] - wx, Hd[1] - wy, Hd[2]
                sp = math.sqrt(rx * rx + ry * ry + rz * rz)
                FH -= (kd * sp * rx, kd * sp * ry, kd * sp * rz)
        pts_m.append(mH)
        pts_J.append(JH)
        pts_b.append(bH)
        pts_F.append(FH)
        P, Pd, JP, bP = H, Hd, JH, bH
        n2 = None
        if self.leg_below_hook:
            l2 = self.leg_below_hook_m
            u2, v2, du2, dv2 = q[2], q[3], qd[2], qd[3]
            w2 = math.sqrt(1.0 - u2 * u2 - v2 * v2)
            s2 = u2 * du2 + v2 * dv2
            h2 = (du2 * du2 + dv2 * dv2) / w2 + s2 * s2 / (w2 * w2 * w2)
            n2 = (u2, v2, -w2)
            P = (H[0] + l2 * u2, H[1] + l2 * v2, H[2] - l2 * w2)
            Pd = (Hd[0] + l2 * du2, Hd[1] + l2 * dv2, Hd[2] + l2 * s2 / w2)
            JP = JH.copy()
            JP[0, 2] += l2
            JP[1, 3] += l2
            JP[2, 2] += l2 * u2 / w2
            JP[2, 3] += l2 * v2 / w2
            bP = bH + (0.0, 0.0, l2 * h2)
        m = self.load_mass_kg
        if self.rigid_load:
            # R = Rz(c) Rx(a) Ry(b) as matrices; the angular velocity's Jacobian J_w and its
            # bias b_w = dJ_w/dt qd from the derivative of each column (module Notes)
            ia, iy = self.tilt_index, self.yaw_index
            a, b, da = q[ia], q[ia + 1], qd[ia]
            c, dc = (q[iy], qd[iy]) if iy is not None else (self.yaw_start_rad, 0.0)
            ca, sa = math.cos(a), math.sin(a)
            Rz = rotation_z(c)
            R = Rz @ rotation(a, b)
            Jw = np.zeros((3, nq))
            Jw[:, ia] = Rz[:, 0]  # Rz ex
            Jw[:, ia + 1] = Rz @ (0.0, ca, sa)  # Rz Rx(a) ey
            dJ = np.zeros((3, nq))
            dJ[:, ia] = dc * Rz[:, 1]  # d/dt Rz ex = dc Rz ey
            dJ[:, ia + 1] = Rz @ (-dc * ca, -da * sa, da * ca)
            if iy is not None:
                Jw[2, iy] = 1.0
            om = Jw @ qd
            bw = dJ @ qd
            r = R @ self.cg_from_pivot_b
            G = np.array(P) + r
            wxr = np.array(_cx(om, r))
            Gd = np.array(Pd) + wxr
            JG = JP.copy()
            for k in (ia, ia + 1) if iy is None else (ia, ia + 1, iy):  # column k: J_w,k x r
                JG[:, k] += _cx(Jw[:, k], r)
            bG = bP + _cx(bw, r) + _cx(om, wxr)
            Iw = (R * self.inertia_b) @ R.T
        else:
            G, Gd, JG, bG = np.array(P), np.array(Pd), JP, bP
        if self.rigid_load or self.leg_below_hook:
            FG = np.array([0.0, 0.0, -m * g])
            FG -= cdamp * m * (Gd - ref + om_s * np.array([G[1] - py, px - G[0], 0.0]))
            moment = np.zeros(3)  # about the CG, of forces applied away from it
            if applied and self._load_drag_k:
                rho = R @ self.wind_center_b if self.rigid_load else np.zeros(3)
                lwf = self._height_factor(G[2] + rho[2], H[2], t)
                rel = Gd + _cx(om, rho) - (lwf * wx, lwf * wy, 0.0) if self.rigid_load \
                    else Gd - (lwf * wx, lwf * wy, 0.0)
                drag = -self._load_drag_k * math.sqrt(rel @ rel) * rel
                FG += drag
                if self.structure.wind_center:
                    moment += _cx(rho, drag)
            pts_m.append(m)
            pts_J.append(JG)
            pts_b.append(bG)
            pts_F.append(FG)
        point_F = None
        if applied and contacts and self.contacts is not None:
            # tag lines and ground contact at points of the load (the same law as the fast path)
            on = FG if (self.rigid_load or self.leg_below_hook) else FH  # the load's own force vector
            rhos = [R @ np.asarray(p_b, float) if self.rigid_load else np.asarray(p_b, float)
                    for p_b in self.structure.load_points]
            spin = om if self.rigid_load else np.zeros(3)
            rel = np.array((px, py, pz))
            point_F = self._point_forces(t, (px, py, pz))(
                [tuple(G - rel + r) for r in rhos], [tuple(Gd + np.array(_cx(spin, r))) for r in rhos])
            point_F = [np.asarray(F, float) for F in point_F]
            for r, F in zip(rhos, point_F):
                on += F
                if self.rigid_load:
                    moment += _cx(r, F)
        if len(pts_m) == 1:
            J0 = pts_J[0]
            M = pts_m[0] * (J0.T @ J0)
            Qv = J0.T @ (pts_F[0] - pts_m[0] * pts_b[0])
        else:
            J0, J1 = pts_J
            m0, m1 = pts_m
            M = (m0 * J0.T) @ J0 + (m1 * J1.T) @ J1
            Qv = J0.T @ (pts_F[0] - m0 * pts_b[0]) + J1.T @ (pts_F[1] - m1 * pts_b[1])
        if self.rigid_load:
            Iom = Iw @ om
            M += Jw.T @ Iw @ Jw
            Qv -= Jw.T @ (Iw @ bw + _cx(om, Iom))
            Qv += Jw.T @ moment
            if iy is not None and self.yaw_stiffness_N_m_per_rad:  # the reeving's torsion (locked swivel)
                Qv[iy] -= self.yaw_stiffness_N_m_per_rad * (c - self.yaw_start_rad)
        qdd = np.linalg.solve(M, Qv)
        if not full:
            return qdd
        out = {"qdd": qdd, "M": M, "Q": Qv, "H": np.array(H), "Hd": np.array(Hd), "G": G, "Gd": Gd,
               "n1": np.array([u1, v1, -w1]), "ell": ell, "dell": dell, "point_forces": point_F}
        aH = JH @ qdd + bH
        aG = JG @ qdd + bG
        if self.rope_is_elastic:
            out["rope_T"] = rope_Tc
            out["rope_T_raw"] = rope_T
        else:
            # massless rope: T n1 = sum(F) - sum(m a) over all bodies (FH holds no tension here)
            tot = FH - mH * aH
            if self.rigid_load or self.leg_below_hook:
                tot = tot + FG - m * aG
            out["rope_T"] = float(out["n1"] @ tot)
        R_out = R if self.rigid_load else np.eye(3)
        out["R"] = R_out
        if self.rigid_load:
            out["tilt"] = (a, b)
            out["yaw"] = c
            out["omega"] = om
            out["Iw"] = Iw
            out["Jw"] = Jw
            out["bw"] = bw
        # force the rigging exerts on the load
        if self.rigid_load or self.leg_below_hook:
            Pload = m * aG - FG
        else:
            Pload = None
        out["P_load"] = Pload
        out["A"] = np.array(P)
        out["legs_T"] = self._leg_tensions(out, n2, Pload)
        out["top_T"] = self._top_tensions(out, Pload) if self.rigging_kind == "spreader" else None
        e = 0.5 * mH * (np.dot(Hd, Hd)) + mH * g * H[2]
        if self.rigid_load or self.leg_below_hook:
            e += 0.5 * m * float(Gd @ Gd) + m * g * float(G[2])
        if self.rigid_load:
            e += 0.5 * float(om @ (Iw @ om))
            if iy is not None and self.yaw_stiffness_N_m_per_rad:
                e += 0.5 * self.yaw_stiffness_N_m_per_rad * (c - self.yaw_start_rad) ** 2
        if self.rope_is_elastic:
            e += self.elastic_rope.energy(ell, L)
        out["energy"] = e
        return out

    def _leg_tensions(self, evaluation, n2, Pload):
        """Tension in each sling leg [N] (see module Notes)."""
        if self.rigging_kind == "single":
            if self.leg_below_hook:
                return np.array([-float(np.dot(n2, Pload))])
            return np.array([evaluation["rope_T"]])
        R, G = evaluation["R"], evaluation["G"]
        Aw = G + self.attach_points_b @ R.T
        if self.rigging_kind == "bridle":
            E = evaluation["A"] - Aw
            E = E / np.linalg.norm(E, axis=1)[:, None]
            return np.linalg.lstsq(E.T, Pload, rcond=None)[0]
        # spreader drop legs, parallel to the load's z axis: the force along them and the
        # moment about G the load needs (I_w alpha + omega x I_w omega), least squares
        dz = R[:, 2]
        A_mat = np.vstack([np.ones(len(Aw)), np.cross(Aw - G, dz).T])  # (4, k)
        alpha = evaluation["Jw"] @ evaluation["qdd"] + evaluation["bw"]
        Iw, om = evaluation["Iw"], evaluation["omega"]
        need = Iw @ alpha + np.cross(om, Iw @ om)
        rhs = np.concatenate([[float(dz @ Pload)], need])
        return np.linalg.lstsq(A_mat, rhs, rcond=None)[0]

    def _resting_tensions(self, evaluation):
        """While resting: the rope's pull, and the legs' share of what it lifts beyond the hook block."""
        T = max(evaluation["rope_T"], 0.0)
        g = self.gravity_m_s2
        share = min(max((T - self.hook_mass_kg * g) / (self.load_mass_kg * g), 0.0), 1.0)
        evaluation["legs_T"] = np.asarray(self._hanging()["legs_T"], float) * share
        if evaluation.get("top_T") is not None:
            evaluation["top_T"] = self._hanging()["top_T"] * share

    def _top_tensions(self, evaluation, Pload):
        R = evaluation["R"]
        ends = evaluation["G"] + self.geometry.ends_b @ R.T
        E = evaluation["A"] - ends
        E = E / np.linalg.norm(E, axis=1)[:, None]
        return np.linalg.lstsq(E.T, Pload, rcond=None)[0]

    def accelerations(self, t, y, motion_or_kin, applied=True):
        """Generalised accelerations at one state (for tests and cross-checks).

        Parameters
        ----------
        t : float
            Time [s].
        y : array_like
            State, ordered as :attr:`state_names`.
        motion_or_kin : callable or tuple
            ``kin(t)`` from ``Motion.local``, or a SuspensionState itself.
        applied : bool
            With damping, drag and wind (the solver's fast path) or without them
            (the reference path, for comparing with a conservative derivation).

        Returns
        -------
        ndarray
            Second derivatives of the coordinates [chart units / s^2].
        """
        kin_state = motion_or_kin(t) if callable(motion_or_kin) else motion_or_kin
        y = np.asarray(y, float)
        if applied:
            return self._qdd(y, kin_state, t)
        return self._eval(y, kin_state, applied=False)

    def make_rhs(self, kin):
        nq = self.n_coordinates
        t_lift = self.lift_off_time_s if self.starts_resting else None

        fast = self._qdd

        def rhs(t, y):
            out = np.empty(2 * nq)
            out[:nq] = y[nq:]
            if t_lift is not None and t < t_lift:
                out[nq:] = 0.0  # resting, supported: nothing moves until lift-off
                return out
            out[nq:] = fast(y, kin(t), t)
            return out

        return rhs

    def make_events(self, kin):
        wlim = self._wlim
        ev = self._eval

        # an elastic rope may start just taut (rope_preload = "none"): zero tension then is
        # not slack; slack is a tension below a billionth of the weight
        eps = 1e-9 * self.hanging_mass_kg * self.gravity_m_s2 if self.rope_is_elastic else 0.0

        t_lift = self.lift_off_time_s if self.starts_resting else None

        il, nq, rope = self.rope_length_index, self.n_coordinates, self.elastic_rope

        grounded = self.contacts is not None and self.contacts.n_contacts > 0

        def slack(t, y):
            if t_lift is not None and t <= t_lift:
                return 1.0  # a slack rope before lift-off is the set-up, not a failure
            if self.rope_is_elastic:  # the spring law alone, no dynamics needed
                k = kin(t)
                value = rope.tension(y[il], y[nq + il], k[9], k[10]) + eps
            else:
                value = ev(y, kin(t), full=True, t=t)["rope_T"]
            if value <= 0.0 and grounded and self.touches_ground(t, y, kin(t)):
                return 1.0  # a slack rope over a load resting on the ground is normal practice
            return value

        slack.terminal = True
        slack.direction = -1
        events = {"slack": slack}
        if self.leg_below_hook:
            leg_eps = 1e-9 * self.load_mass_kg * self.gravity_m_s2

            def leg_slack(t, y):
                if t_lift is not None and t <= t_lift:
                    return 1.0
                return float(ev(y, kin(t), full=True, t=t)["legs_T"][0]) + leg_eps

            leg_slack.terminal = True
            leg_slack.direction = -1
            events["leg_slack"] = leg_slack

        def overswing(t, y):
            u, v = y[0], y[1]
            val = math.sqrt(max(1.0 - u * u - v * v, 0.0)) - wlim
            if self.leg_below_hook:
                val = min(val, math.sqrt(max(1.0 - y[2] ** 2 - y[3] ** 2, 0.0)) - wlim)
            if self.rigid_load:
                ia = self.tilt_index
                c = math.cos(y[ia]) * math.cos(y[ia + 1])  # R[2,2]: cosine of the tilt
                val = min(val, c - wlim)
            return val

        overswing.terminal = True
        overswing.direction = -1
        events["overswing"] = overswing
        return events

    def event_message(self, name: str, t: float) -> str | None:
        if name == "slack" and self.rope_is_elastic:
            return (f"the elastic hoist rope would go slack at t = {t:.3f} s (its tension falls to "
                    "zero): the load would be thrown upward and snatch the rope on the way down; "
                    "the results stop there")
        if name == "leg_slack":
            return (f"the sling leg would go slack at t = {t:.3f} s (its tension falls to zero): "
                    "the load would snatch the sling; the results stop there")
        return None

    # -- small oscillations ----------------------------------------------------------
    def _linear_MK(self, rope_length_m=None):
        """Mass and stiffness matrices of the swing about hanging rest (fixed support)."""
        L = self.initial_rope_length_m if rope_length_m is None else rope_length_m
        y0 = self.rest_state(L)
        kin_state = self._hanging_support(L)
        nq = self.n_coordinates
        M = self._eval(y0, kin_state, full=True, applied=False)["M"]
        K = np.zeros((nq, nq))
        h = 1e-6
        for j in range(nq):
            yp, ym = y0.copy(), y0.copy()
            yp[j] += h
            ym[j] -= h
            Qp = self._eval(yp, kin_state, full=True, applied=False)["Q"]
            Qm = self._eval(ym, kin_state, full=True, applied=False)["Q"]
            K[:, j] = -(Qp - Qm) / (2 * h)
        iy = self.yaw_index
        if iy is not None and not self.yaw_stiffness_N_m_per_rad:
            # a free swivel: no stiffness on the heading, so its small-oscillation equation is
            # M_yy yaw'' + M_yx x'' = 0; eliminating it (Schur complement) keeps its inertia coupling
            M = M - np.outer(M[:, iy], M[iy, :]) / M[iy, iy]
        return M, 0.5 * (K + K.T)

    def linear_swing(self, rope_length_m: float | None = None) -> LinearSwing:
        """The swing linearised about hanging rest (support fixed), over the swing coordinates.

        Mass and stiffness as for :meth:`swing_modes`; the damping matrix is
        :math:`-\\partial Q / \\partial \\dot q` with the applied forces on (the scene's
        swing damping, and the drag linearised about the steady wind), the support
        acceleration's influence :math:`\\partial Q / \\partial a_p` (exactly linear), the
        points' Jacobians from the positions of :meth:`_eval` (central differences).  The
        elastic rope's stretch is left out: it does not couple with the swing at rest.

        Parameters
        ----------
        rope_length_m : float, optional
            Loaded rope length [m]; the scene's initial length by default.

        Returns
        -------
        LinearSwing
            Over :meth:`swing_coordinate_indices`; angles ``"hoist rope"``, ``"sling leg"``
            (a leg below a hook block) and ``"load tilt"`` (a rigid load); points, top
            first: ``"hook block"`` (with one) or ``"rope end"`` (a rigid load without
            one), then ``"load"`` (its CG).
        """
        L = self.initial_rope_length_m if rope_length_m is None else rope_length_m
        M, K = self._linear_MK(L)
        y0 = self.rest_state(L)
        kin_state = np.asarray(self._hanging_support(L), float)
        nq = self.n_coordinates
        ev = self._eval
        h = 1e-6
        C = np.zeros((nq, nq))
        JH, JG = np.zeros((3, nq)), np.zeros((3, nq))
        for j in range(nq):
            yp, ym = y0.copy(), y0.copy()
            yp[nq + j] += h
            ym[nq + j] -= h
            # the swing hanging free: tag lines and the ground left out
            C[:, j] = -(ev(yp, kin_state, full=True, contacts=False)["Q"]
                        - ev(ym, kin_state, full=True, contacts=False)["Q"]) / (2 * h)
            yp, ym = y0.copy(), y0.copy()
            yp[j] += h
            ym[j] -= h
            op, om = ev(yp, kin_state, full=True, applied=False), ev(ym, kin_state, full=True, applied=False)
            JH[:, j] = (op["H"] - om["H"]) / (2 * h)
            JG[:, j] = (op["G"] - om["G"]) / (2 * h)
        F = np.zeros((nq, 3))
        for j in range(3):  # Q is exactly linear in the support's acceleration
            kp, km = kin_state.copy(), kin_state.copy()
            kp[6 + j] += 1.0
            km[6 + j] -= 1.0
            F[:, j] = (ev(y0, kp, full=True, applied=False)["Q"] - ev(y0, km, full=True, applied=False)["Q"]) / 2.0
        keep = self.swing_coordinate_indices()
        sub = np.ix_(keep, keep)
        angles = {"hoist rope": (0, 1)}
        if self.leg_below_hook:
            angles["sling leg"] = (2, 3)
        if self.rigid_load:
            angles["load tilt"] = (self.tilt_index, self.tilt_index + 1)
        points = {}
        if self.has_hook_block:
            points["hook block"] = JH[:, keep]
        elif self.rigid_load:  # the rope's end, where the rigging hangs, moves apart from the CG
            points["rope end"] = JH[:, keep]
        points["load"] = JG[:, keep]
        return LinearSwing(coordinates=tuple(self.state_names[i] for i in keep), mass=M[sub],
                           stiffness=K[sub], damping=0.5 * (C[sub] + C[sub].T), base_influence=F[keep],
                           angles=angles, points=points)

    def swing_modes(self, rope_length_m: float | None = None):
        """Normal modes of the swing about hanging rest (support fixed, small amplitude).

        Parameters
        ----------
        rope_length_m : float, optional
            Loaded rope length [m] the system hangs on; when omitted, the
            scene's initial length (the length :meth:`mode_periods_s` takes).

        Returns
        -------
        tuple
            ``(omega_sq, shapes, mass)``: squared circular frequencies (k,) [1/s^2],
            ascending; mode shapes (n, k) over the swing coordinates
            (:meth:`swing_coordinate_indices`), mass-normalised
            (``shapes.T @ mass @ shapes = I``); the mass matrix (n, n) of those
            coordinates [chart units].  From scipy's generalised symmetric eigensolver.
        """
        from scipy.linalg import eigh

        M, K = self._linear_MK(rope_length_m)
        keep = self.swing_coordinate_indices()
        mass = M[np.ix_(keep, keep)]
        omega_sq, shapes = eigh(K[np.ix_(keep, keep)], mass)
        return omega_sq, shapes, mass

    def mode_periods_s(self, rope_length_m: float | None = None) -> list[float]:
        w2 = self.swing_modes(rope_length_m)[0]
        w2 = np.sort(w2[w2 > 0])
        out = []
        for x in w2:  # a degenerate pair (both swing planes alike) counts once
            if out and abs(x - out[-1]) <= 1e-9 * x:
                continue
            out.append(float(x))
        return [2 * math.pi / math.sqrt(x) for x in out]

    def bounce_period_s(self, rope_length_m: float | None = None) -> float | None:
        if not self.rope_is_elastic:
            return None
        return 2 * math.pi * math.sqrt(self.hanging_mass_kg / self.hanging_stiffness_N_per_m(rope_length_m))

    # -- outputs -----------------------------------------------------------------------
    def outputs(self, t, Y, motion) -> dict:
        t = np.asarray(t, dtype=float)
        Y = np.asarray(Y, dtype=float)
        key = (hash(t.tobytes()), hash(Y.tobytes()), t.shape, id(motion))
        for k_, v_ in self._out_cache:  # plots, tables and metrics ask for the same samples
            if k_ == key:
                return dict(v_)
        out = self._outputs(t, Y, motion)
        self._out_cache = ([(key, out)] + self._out_cache)[:4]
        return dict(out)

    def _outputs(self, t, Y, motion) -> dict:
        e = motion.evaluate(t)
        N = len(t)
        k = self.n_legs
        keys = ("p", "dp", "ddp")
        res = {n: np.empty((N, 3)) for n in ("H", "Hd", "G", "Gd", "n1")}
        rope_T = np.empty(N)
        legs = np.empty((N, k))
        tops = np.empty((N, 2)) if self.rigging_kind == "spreader" else None
        rot = np.empty((N, 3, 3))
        tilt = np.empty((N, 2)) if self.rigid_load else None
        yaw = np.empty(N) if self.rigid_load else None
        ell = np.empty(N)
        energy = np.empty(N)
        point_F = np.zeros((N, len(self.structure.load_points), 3))
        for i in range(N):
            kin_state = tuple(float(e[kk][i, j]) for kk in keys for j in range(3)) + (
                float(e["L"][i]), float(e["dL"][i]), float(e["ddL"][i]), float(e["slew_rate"][i]))
            evaluation = self._eval(Y[i], kin_state, full=True, t=float(t[i]))
            if self.starts_resting and t[i] < self.lift_off_time_s:
                self._resting_tensions(evaluation)
            for n in res:
                res[n][i] = evaluation[n]
            rope_T[i] = evaluation["rope_T"]
            legs[i] = evaluation["legs_T"]
            if tops is not None:
                tops[i] = evaluation["top_T"]
            rot[i] = evaluation["R"]
            if tilt is not None:
                tilt[i] = np.degrees(evaluation["tilt"])
                yaw[i] = evaluation["yaw"]
            ell[i] = evaluation["ell"]
            energy[i] = evaluation["energy"]
            if evaluation.get("point_forces") is not None:
                point_F[i] = evaluation["point_forces"]
        attach = res["G"][:, None, :] + np.einsum("nij,kj->nki", rot, self.attach_points_b) if self.rigid_load \
            else res["G"][:, None, :].copy()
        out = {
            "suspension": e["p"], "suspension_vel": e["dp"], "rope_length": ell,
            "load": res["G"], "load_vel": res["Gd"],
            "hook": res["H"] if self.has_hook_block else None,
            "hook_vel": res["Hd"] if self.has_hook_block else None,
            "rope_dir": res["n1"], "rope_tension_N": rope_T, "energy_J": energy,
            "static_rope_load_N": self.hanging_mass_kg * self.gravity_m_s2,
            "leg_tension_N": legs, "attach_points": attach, "load_rotation": rot,
            "load_tilt_deg": tilt,
            "rope_end": res["H"],
            "load_yaw_deg": None if yaw is None else np.degrees(yaw - self.yaw_start_rad),
            "load_corners": None,
            "static_leg_tension_N": self.static_leg_tension_N(),
            "hanging_leg_tension_N": self.hanging_leg_tension_N(),
        }
        out["wind_at_load"] = (self.wind.velocities(t, res["G"][:, 2]) if self.wind is not None
                               else np.tile([self._wind_x_m_s, self._wind_y_m_s], (N, 1)))
        columns = {}
        if tilt is not None:
            columns["load_tilt_deg"] = np.degrees(np.arccos(np.clip(rot[:, 2, 2], -1.0, 1.0)))
            columns["load_tilt_x_deg"] = tilt[:, 0]
            columns["load_tilt_y_deg"] = tilt[:, 1]
            # the turn about the vertical from the start heading (the coordinate itself: unwrapped)
            columns["load_yaw_deg"] = out["load_yaw_deg"]
            corners = self.load_corners_b()
            if corners is not None:  # the box's corners, as the load turns and tilts
                out["load_corners"] = res["G"][:, None, :] + np.einsum("nij,kj->nki", rot, corners)
        for j in range(k):
            columns[f"leg_{j + 1}_tension_kN"] = legs[:, j] / 1e3
        if self.rigging_kind == "spreader" and self.rigid_load:
            # world positions of the beam's drop-leg lugs and end lugs (for drawing the beam)
            out["spreader_lugs"] = res["G"][:, None, :] + np.einsum("nij,kj->nki", rot, self.geometry.lugs_b)
            out["spreader_ends"] = res["G"][:, None, :] + np.einsum("nij,kj->nki", rot, self.geometry.ends_b)
        if tops is not None:
            out["top_sling_tension_N"] = tops
            for j in range(2):
                columns[f"top_sling_{j + 1}_tension_kN"] = tops[:, j] / 1e3
        if self.rope_is_elastic:
            lam = np.array([self.elastic_rope.unstretched(x) for x in e["L"]])
            out["rope_stretch_m"] = ell - lam
            columns["rope_stretch_m"] = out["rope_stretch_m"]
        if self.contacts is not None:
            nl = self.contacts.n_tag_lines
            pts = np.asarray(self.structure.load_points, float).reshape(-1, 3)
            world = (res["G"][:, None, :] + np.einsum("nij,kj->nki", rot, pts)) if self.rigid_load \
                else res["G"][:, None, :] + pts[None, :, :]
            if nl:
                tension = np.linalg.norm(point_F[:, :nl], axis=2)
                out["tag_line_tension_N"] = tension
                out["tag_line_attach"] = world[:, :nl]
                out["tag_line_anchor"] = np.array([line.anchor_m for line in self.contacts.tag_lines], float)
                for j in range(nl):
                    columns[f"tag_line_{j + 1}_N"] = tension[:, j]
            if self.contacts.n_contacts:
                ground = point_F[:, nl:]
                out["ground_normal_N"] = ground[:, :, 2].sum(axis=1)
                out["ground_friction_N"] = np.hypot(ground[:, :, 0].sum(axis=1), ground[:, :, 1].sum(axis=1))
                out["contact_points"] = world[:, nl:]
                out["contact_normal_N"] = ground[:, :, 2]
                columns["ground_reaction_kN"] = out["ground_normal_N"] / 1e3
                columns["ground_friction_kN"] = out["ground_friction_N"] / 1e3
        out["extra_columns"] = columns
        return out

    def load_corners_b(self):
        """The corners of the load's box (``load.size_m``), load axes from the CG.

        Returns
        -------
        ndarray or None
            Corners (8, 3) [m]; None for a point load or a load without a size.
        """
        load = self.scene.load
        if not self.rigid_load or load.size_m is None:
            return None
        half = 0.5 * np.array(load.size_m, float)
        signs = np.array([[sx, sy, sz] for sx in (-1, 1) for sy in (-1, 1) for sz in (-1, 1)], float)
        return signs * half - np.array(load.cg_offset_m, float)

    # -- static leg loads ------------------------------------------------------------------
    def _hanging(self) -> dict:
        if self._hanging_cache is None:
            y0 = self.rest_state()
            kin_state = self._hanging_support(self.initial_rope_length_m)
            self._hanging_cache = self._eval(y0, kin_state, full=True, applied=False)
        return self._hanging_cache

    def hanging_leg_tension_N(self) -> np.ndarray:
        """Leg tensions with the system hanging at rest (static equilibrium of this model).

        Returns
        -------
        ndarray
            Tension of each leg [N].
        """
        return np.asarray(self._hanging()["legs_T"], float).copy()

    def static_leg_tension_N(self) -> np.ndarray:
        """Rigging rule: the load's weight shared equally over the legs, over cos(leg angle).

        Common practice (sling angle factor); the leg angle from vertical at rest.
        Exact for a symmetric bridle; the hanging value of this model
        (:meth:`hanging_leg_tension_N`) also holds for an off-centre CG.

        Returns
        -------
        ndarray
            Tension of each leg [N].
        """
        W = self.load_mass_kg * self.gravity_m_s2
        if self.rigging_kind == "single":
            return np.array([W])
        return W / self.n_legs / self._leg_cosines_at_rest()

    def _leg_cosines_at_rest(self) -> np.ndarray:
        """Cosine of each leg's angle from vertical with the load hanging at rest (rigid rigging)."""
        R = self.rest_rotation()
        if self.rigging_kind == "bridle":
            d = (self.geometry.hook_b - self.attach_points_b) @ R.T
            return d[:, 2] / np.linalg.norm(d, axis=1)
        return np.full(self.n_legs, R[2, 2])  # spreader drop legs: along the load's z axis

    def leg_angles_at_rest_deg(self) -> list:
        """Each sling leg's angle from vertical with the system hanging at rest.

        Returns
        -------
        list of float
            Angles [deg]; ``[0.0]`` for a single leg or a point load (the leg hangs
            plumb).
        """
        if self.rigging_kind == "single" or self.geometry is None:
            return [0.0]
        cos = np.clip(self._leg_cosines_at_rest(), -1, 1)
        return [float(x) for x in np.degrees(np.arccos(cos))]

    def rest_rotation(self) -> np.ndarray:
        """Orientation of the load hanging at rest (its CG under the pivot).

        Returns
        -------
        ndarray
            Rotation matrix (3, 3) from load axes to world axes [-]; the identity for
            a point load.
        """
        if self.geometry is None:
            return np.eye(3)
        return rotation_z(self.yaw_start_rad) @ rotation(*self.geometry.rest_tilt_rad)

    def swing_coordinate_indices(self) -> list:
        """Indices of the swing coordinates: every coordinate but the elastic rope's length
        and a free swivel's heading (which has no stiffness to swing about).

        Returns
        -------
        list of int
            Indices into the coordinates (the first :attr:`n_coordinates` state
            entries).
        """
        free_yaw = self.yaw_index if not self.yaw_stiffness_N_m_per_rad else None
        return [i for i in range(self.n_coordinates) if i not in (self.rope_length_index, free_yaw)]
