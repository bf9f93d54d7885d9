"""Crane axes -> suspension-point path and hoist-rope length over time.

Axes
----
``x``, ``y``
    Travel of the whole crane (gantry, bridge or rail-mounted base) [m].
``slew``
    Rotation of the jib or boom about the vertical slew axis [rad]; the axis
    stands at the slew centre (``[crane] slew_center_m``, default the origin)
    plus the ``x``/``y`` travel.
``radius``
    Change of the suspension point's horizontal distance from the slew axis [m]:
    a trolley along a jib (the suspension height is held), or, on a crane with a
    :class:`Boom`, luffing: the tip moves on the boom's arc.
``hoist``
    Rope shortening [m]: a positive move raises the load.

The suspension point is

.. math::
    p(t) = (X(t), Y(t), z_0) + \\rho(t) (\\cos\\varphi(t), \\sin\\varphi(t), 0),

with :math:`(X, Y)` the slew centre plus the travel, :math:`\\rho = \\rho_0 + R(t)`,
:math:`\\varphi = \\varphi_0 + S(t)` and :math:`(\\rho_0, \\varphi_0)` the polar
coordinates of the initial point about the slew centre, so

.. math::
    \\ddot p_h = (\\ddot X, \\ddot Y) + (\\ddot\\rho - \\rho\\dot\\varphi^2) e_\\rho
                + (\\rho\\ddot\\varphi + 2\\dot\\rho\\dot\\varphi) e_\\varphi ,

which carries the centripetal and Coriolis terms of slewing exactly.

Luffing (a crane with a :class:`Boom`): the boom, of length :math:`B`, pivots on its
foot pin at horizontal offset :math:`a` from the slew axis and height :math:`h`; its
tip is at height :math:`z = h + s` with :math:`d = \\rho - a` and
:math:`s = \\sqrt{B^2 - d^2}`, so (differentiating the circle)

.. math::
    \\dot z = -\\frac{d \\dot\\rho}{s}, \\qquad
    \\ddot z = -\\frac{\\dot\\rho^2 + d \\ddot\\rho}{s} - \\frac{d^2 \\dot\\rho^2}{s^3}.

The arc is taken through the scene's suspension point (``z_0 + s(t) - s(0)``; the
scene reader holds the stated point within 1 cm of the boom's own arc).  A
level-luffing crane pays out rope as the tip rises, :math:`L = L_0 - H + z - z_0`,
so the hook keeps its height.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from swingsim.motion.profiles import SumProfile

AXES = ("x", "y", "slew", "radius", "hoist")


class SuspensionState(NamedTuple):
    """The prescribed motion at one instant, as the equations of motion read it.

    Positions [m], velocities [m/s], accelerations [m/s^2] of the suspension point,
    the rope length and its rates, and the jib's slew rate [rad/s].
    """

    px: float
    py: float
    pz: float
    vx: float
    vy: float
    vz: float
    ax: float
    ay: float
    az: float
    rope_length: float
    rope_rate: float
    rope_accel: float
    slew_rate: float


class CranePose(NamedTuple):
    """Axis positions of the crane: where its slew axis stands (slew centre plus travel) [m],
    jib or boom angle [rad], radius about the slew axis [m]."""

    travel_x_m: np.ndarray
    travel_y_m: np.ndarray
    jib_angle_rad: np.ndarray
    radius_m: np.ndarray


class Boom(NamedTuple):
    """A luffing boom or jib: the tip moves on an arc about the foot pin as the radius changes."""

    #: Foot pin to tip [m].
    length_m: float
    #: Foot pin's horizontal offset from the slew axis [m].
    foot_offset_m: float
    #: Foot pin's height above the ground datum z = 0 [m].
    foot_height_m: float
    #: Whether the rope is paid out to keep the hook's height while luffing.
    level_luffing: bool = False

    def tip_height(self, radius_m, radius_rate=0.0, radius_accel=0.0, sqrt=np.sqrt):
        """Height of the boom tip at a radius, and its rates (the circle's exact derivatives).

        Parameters
        ----------
        radius_m : float or array
            Horizontal distance of the tip from the slew axis [m].
        radius_rate, radius_accel : float or array
            Its first and second time derivatives [m/s, m/s^2].
        sqrt : callable
            The square root to use (numpy's by default; ``math.sqrt`` for floats).

        Returns
        -------
        tuple
            ``(z, dz, ddz)``: tip height [m] and its rates [m/s, m/s^2].
        """
        d = radius_m - self.foot_offset_m
        s = sqrt(self.length_m * self.length_m - d * d)
        dz = -d * radius_rate / s
        ddz = -(radius_rate * radius_rate + d * radius_accel) / s - d * d * radius_rate * radius_rate / (s * s * s)
        return self.foot_height_m + s, dz, ddz


def polar_suspension(x0, y0, X, dX, ddX, Y, dY, ddY, S, dS, ddS, R, dR, ddR, cos=np.cos, sin=np.sin,
                     center_x=0.0, center_y=0.0):
    """Horizontal position, velocity and acceleration of the suspension point.

    The one implementation of the crane's polar kinematics (module docstring); written
    component-wise so that it works on floats (pass ``math.cos``, ``math.sin``) and on
    numpy arrays of any shape alike.

    Parameters
    ----------
    x0, y0 : float or array
        Suspension point at t = 0 [m] (its polar coordinates about the slew centre give
        the initial radius and jib angle).
    X, dX, ddX, Y, dY, ddY : float or array
        Travel of the crane's base along x and y and its rates [m, m/s, m/s^2].
    S, dS, ddS : float or array
        Slew angle from the start and its rates [rad, rad/s, rad/s^2].
    R, dR, ddR : float or array
        Radius change from the start and its rates [m, m/s, m/s^2].
    cos, sin : callable
        The cosine and sine to use (numpy's by default).
    center_x, center_y : float
        The slew centre: where the slew axis stands before any travel [m].

    Returns
    -------
    tuple
        ``(px, py, vx, vy, ax, ay)`` [m, m/s, m/s^2].
    """
    rx, ry = x0 - center_x, y0 - center_y
    rho = math.hypot(rx, ry) + R if isinstance(rx, float) else np.hypot(rx, ry) + R
    phi = (math.atan2(ry, rx) if isinstance(rx, float) else np.arctan2(ry, rx)) + S
    c, s = cos(phi), sin(phi)
    ar = ddR - rho * dS * dS
    at = rho * ddS + 2.0 * dR * dS
    return (center_x + X + rho * c, center_y + Y + rho * s,
            dX + dR * c - rho * dS * s, dY + dR * s + rho * dS * c,
            ddX + ar * c - at * s, ddY + ar * s + at * c)


@dataclass(frozen=True)
class Motion:
    """Prescribed motion of the suspension point and of the rope length.

    Parameters
    ----------
    origin_m : tuple of float
        Suspension point at t = 0 [m].
    rope_length_m : float
        Rope length at t = 0 [m].
    moves : tuple of (axis, Profile)
        The moves; several moves on one axis add up.
    slew_center_m : tuple of float
        Where the slew axis stands before any travel, [x, y] [m].
    boom : Boom, optional
        The luffing boom; without it a radius move holds the suspension height.
    """

    origin_m: tuple
    rope_length_m: float
    moves: tuple
    slew_center_m: tuple = (0.0, 0.0)
    boom: Boom | None = None

    @property
    def initial_radius_m(self) -> float:
        """Horizontal distance of the suspension point from the slew axis at t = 0 [m]."""
        return math.hypot(float(self.origin_m[0]) - float(self.slew_center_m[0]),
                          float(self.origin_m[1]) - float(self.slew_center_m[1]))

    @property
    def luffs(self) -> bool:
        """Whether the suspension point moves vertically (a boom and a radius move)."""
        return self.boom is not None and any(ax == "radius" for ax, _ in self.moves)

    def _vertical(self, rho, dR, ddR, sqrt=np.sqrt):
        """Suspension height, its rates, and the rope paid out by level luffing (with its rates)."""
        z0 = float(self.origin_m[2])
        zt0 = self.boom.tip_height(self.initial_radius_m, sqrt=math.sqrt)[0]
        z, dz, ddz = self.boom.tip_height(rho, dR, ddR, sqrt)
        z = z0 + (z - zt0)
        if self.boom.level_luffing:
            return z, dz, ddz, z - z0, dz, ddz
        return z, dz, ddz, 0.0, 0.0, 0.0
    @property
    def breakpoints(self) -> tuple[float, ...]:
        """Instants where some axis's acceleration or jerk jumps [s] (rounding twins merged)."""
        pts = sorted({b for _, p in self.moves for b in p.breakpoints})
        merged: list[float] = []
        for b in pts:  # knots that differ by rounding only are one breakpoint
            if merged and b - merged[-1] < 1e-9:
                merged[-1] = b
            else:
                merged.append(b)
        return tuple(merged)

    @property
    def last_move_end_s(self) -> float:
        """End of the last move [s] (0 without moves)."""
        return max((p.end_s for _, p in self.moves), default=0.0)

    @property
    def first_move_start_s(self) -> float:
        """Start of the first move [s] (0 without moves)."""
        return min((p.start_s for _, p in self.moves), default=0.0)

    def axis(self, name: str, t):
        """Summed displacement, velocity and acceleration of one axis (its moves add up).

        Parameters
        ----------
        name : str
            One of :data:`AXES`.
        t : float or array_like
            Time(s) from the start of the scene [s].

        Returns
        -------
        tuple of ndarray
            ``(pos, vel, acc)`` shaped like ``t`` [m or rad, per s, per s^2].
        """
        return SumProfile(tuple((1.0, 0.0, prof) for ax, prof in self.moves if ax == name)).evaluate(t)

    def evaluate(self, t):
        """Suspension point and rope length with derivatives at time(s) ``t``.

        Parameters
        ----------
        t : float or array_like
            Time(s) from the start of the scene [s]; any shape.

        Returns
        -------
        dict
            ``p``, ``dp``, ``ddp``: arrays ``t.shape + (3,)`` [m, m/s, m/s^2];
            ``L``, ``dL``, ``ddL``: rope length and derivatives [m, m/s, m/s^2];
            ``slew_rate``: the jib's rotation rate [rad/s].
        """
        t = np.asarray(t, dtype=float)
        X, dX, ddX = self.axis("x", t)
        Y, dY, ddY = self.axis("y", t)
        S, dS, ddS = self.axis("slew", t)
        R, dR, ddR = self.axis("radius", t)
        H, dH, ddH = self.axis("hoist", t)
        x0, y0, z0 = self.origin_m
        cx, cy = (float(v) for v in self.slew_center_m)
        px, py, vx, vy, ax, ay = polar_suspension(float(x0), float(y0), X, dX, ddX, Y, dY, ddY,
                                                  S, dS, ddS, R, dR, ddR, center_x=cx, center_y=cy)
        zero = np.zeros_like(t)
        if self.luffs:
            pz, vz, az, paid, dpaid, ddpaid = self._vertical(self.initial_radius_m + R, dR, ddR)
        else:
            pz, vz, az, paid, dpaid, ddpaid = float(z0), 0.0, 0.0, 0.0, 0.0, 0.0
        p = np.stack([px + zero, py + zero, pz + zero], axis=-1)
        dp = np.stack([vx + zero, vy + zero, vz + zero], axis=-1)
        ddp = np.stack([ax + zero, ay + zero, az + zero], axis=-1)
        return {"p": p, "dp": dp, "ddp": ddp,
                "L": self.rope_length_m - H + paid + zero, "dL": -dH + dpaid + zero,
                "ddL": -ddH + ddpaid + zero, "slew_rate": dS}

    def pose(self, t) -> CranePose:
        """Axis positions of the crane.

        Parameters
        ----------
        t : float or array_like
            As for :meth:`evaluate` [s].

        Returns
        -------
        CranePose
            Where the slew axis stands (slew centre plus travel) x, y [m], jib angle
            [rad] and radius [m], shaped like ``t``.
        """
        t = np.asarray(t, dtype=float)
        x0, y0, _ = self.origin_m
        cx, cy = (float(v) for v in self.slew_center_m)
        return CranePose(cx + self.axis("x", t)[0], cy + self.axis("y", t)[0],
                         math.atan2(y0 - cy, x0 - cx) + self.axis("slew", t)[0],
                         self.initial_radius_m + self.axis("radius", t)[0])

    def local(self, t0: float, t1: float):
        """A fast scalar evaluator valid on [t0, t1], between two breakpoints.

        Parameters
        ----------
        t0, t1 : float
            The interval [s]; no profile may have a breakpoint inside it.

        Returns
        -------
        callable
            ``f(t) -> SuspensionState`` using pure-Python arithmetic on each axis's
            local cubic (a measured 10x faster than the array path for single
            instants, and tested equal to :meth:`evaluate`), or the general
            evaluator when some profile is not one cubic on the interval.
        """
        polys = {}
        for name in AXES:
            tot = [0.0, 0.0, 0.0, 0.0]
            for ax, prof in self.moves:
                if ax != name:
                    continue
                c = prof.local_poly(t0, t1)
                if c is None:
                    polys = None
                    break
                for i in range(4):
                    tot[i] += c[i]
            if polys is None:
                break
            polys[name] = tuple(tot)
        if polys is None:
            def general(t):
                e = self.evaluate(np.array(t))
                p, dp, ddp = e["p"], e["dp"], e["ddp"]
                return SuspensionState(float(p[0]), float(p[1]), float(p[2]), float(dp[0]),
                                       float(dp[1]), float(dp[2]), float(ddp[0]), float(ddp[1]),
                                       float(ddp[2]),
                                       float(e["L"]), float(e["dL"]), float(e["ddL"]),
                                       float(e["slew_rate"]))
            return general

        x0, y0, z0 = (float(v) for v in self.origin_m)
        L0 = self.rope_length_m
        cx, cy, cs, cr, ch = (polys[a] for a in AXES)
        slewing = any(cs[1:]) or any(cr[1:]) or cs[0] != 0.0 or cr[0] != 0.0
        centre_x, centre_y = (float(v) for v in self.slew_center_m)
        luffs, rho0 = self.luffs, self.initial_radius_m
        cos, sin, sqrt = math.cos, math.sin, math.sqrt

        def fast(t):
            tau = t - t0
            X = cx[0] + tau * (cx[1] + tau * (cx[2] + tau * cx[3]))
            dX = cx[1] + tau * (2 * cx[2] + 3 * tau * cx[3])
            ddX = 2 * cx[2] + 6 * tau * cx[3]
            Y = cy[0] + tau * (cy[1] + tau * (cy[2] + tau * cy[3]))
            dY = cy[1] + tau * (2 * cy[2] + 3 * tau * cy[3])
            ddY = 2 * cy[2] + 6 * tau * cy[3]
            H = ch[0] + tau * (ch[1] + tau * (ch[2] + tau * ch[3]))
            dH = ch[1] + tau * (2 * ch[2] + 3 * tau * ch[3])
            ddH = 2 * ch[2] + 6 * tau * ch[3]
            if slewing:
                S = cs[0] + tau * (cs[1] + tau * (cs[2] + tau * cs[3]))
                dS = cs[1] + tau * (2 * cs[2] + 3 * tau * cs[3])
                ddS = 2 * cs[2] + 6 * tau * cs[3]
                R = cr[0] + tau * (cr[1] + tau * (cr[2] + tau * cr[3]))
                dR = cr[1] + tau * (2 * cr[2] + 3 * tau * cr[3])
                ddR = 2 * cr[2] + 6 * tau * cr[3]
                px, py, vx, vy, ax, ay = polar_suspension(x0, y0, X, dX, ddX, Y, dY, ddY,
                                                          S, dS, ddS, R, dR, ddR, cos, sin,
                                                          centre_x, centre_y)
                if luffs:
                    pz, vz, az, paid, dpaid, ddpaid = self._vertical(rho0 + R, dR, ddR, sqrt)
                    return SuspensionState(px, py, pz, vx, vy, vz, ax, ay, az, L0 - H + paid,
                                           dpaid - dH, ddpaid - ddH, dS)
                return SuspensionState(px, py, z0, vx, vy, 0.0, ax, ay, 0.0, L0 - H, -dH, -ddH, dS)
            return SuspensionState(x0 + X, y0 + Y, z0, dX, dY, 0.0, ddX, ddY, 0.0,
                                   L0 - H, -dH, -ddH, 0.0)

        return fast
