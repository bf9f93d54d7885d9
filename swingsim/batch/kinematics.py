"""The crane's motion over a chunk of variants: suspension-point rates and rope length.

Each variant's moves are cubic polynomials in time on each of its segments
(between breakpoints); :class:`ChunkKinematics` evaluates them for all the
variants of a chunk at once and turns the axes into the suspension point's
velocity and acceleration with :func:`swingsim.motion.kinematics.polar_suspension`
(the one implementation of the crane's polar kinematics).  Axes that move in no
variant of the chunk cost no array work (a scalar zero), which gives
bit-identical results to the general path.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from swingsim.motion.kinematics import AXES, polar_suspension

_X, _Y, _SLEW, _RADIUS, _HOIST = (AXES.index(a) for a in ("x", "y", "slew", "radius", "hoist"))


class SuspensionRates(NamedTuple):
    """What the point-mass equations read of the crane's motion, per variant and instant.

    Suspension-point velocity [m/s] and acceleration [m/s^2] (horizontal), rope
    length [m] and its rates [m/s, m/s^2], the jib's slew rate [rad/s].  Each is
    an array or a scalar zero (for an axis that moves in no variant).
    """

    vx: object
    vy: object
    ax: object
    ay: object
    rope_length: object
    rope_rate: object
    rope_accel: object
    slew_rate: object


class ChunkKinematics:
    """Vectorised suspension-point and rope-length kinematics of a chunk of variants.

    Parameters
    ----------
    origins_m : ndarray (B, 3)
        Suspension point of each variant at t = 0, relative to its slew centre [m]
        (only the suspension point's rates are evaluated, which the slew centre
        moves only through the polar coordinates it gives).
    rope_lengths_m : ndarray (B,)
        Rope length of each variant at t = 0 [m].
    axes_used : ndarray (5,) of bool
        Which of :data:`swingsim.motion.kinematics.AXES` move in some variant.
    """

    def __init__(self, origins_m, rope_lengths_m, axes_used):
        origins_m = np.asarray(origins_m, dtype=float)
        self.x0 = np.ascontiguousarray(origins_m[:, 0])
        self.y0 = np.ascontiguousarray(origins_m[:, 1])
        phi0 = np.arctan2(self.y0, self.x0)
        self.cos0, self.sin0 = np.cos(phi0), np.sin(phi0)
        self.L0 = np.asarray(rope_lengths_m, dtype=float)
        self.used = np.asarray(axes_used, dtype=bool)
        self.slewing = bool(self.used[_SLEW])
        self.radial = bool(self.used[_RADIUS]) and not self.slewing

    def rows(self, sel):
        """The same kinematics restricted to some variants of the chunk.

        Parameters
        ----------
        sel : ndarray of int
            Row indices of the variants to keep.

        Returns
        -------
        ChunkKinematics
            Kinematics of those rows (the chunk-level shortcuts unchanged).
        """
        k = object.__new__(ChunkKinematics)
        k.x0, k.y0, k.cos0, k.sin0, k.L0 = (a[sel] for a in (self.x0, self.y0, self.cos0, self.sin0, self.L0))
        k.used, k.slewing, k.radial = self.used, self.slewing, self.radial
        return k

    def __call__(self, coef, tau) -> SuspensionRates:
        """Kinematics at ``tau`` after each segment start.

        Parameters
        ----------
        coef : ndarray (B, ..., 5, 4)
            Cubic coefficients per axis about the segment start (constant first).
        tau : ndarray (B, ...) or (B, ..., S)
            Time since the segment start [s].

        Returns
        -------
        SuspensionRates
            Arrays shaped like ``tau`` (or broadcastable to it), scalar zeros for
            axes that do not move.
        """
        extra = tau.ndim - (coef.ndim - 2)

        def poly(a, need_pos=True):
            k = coef[..., a, :]
            k0, k1, k2, k3 = (k[..., i] for i in range(4))
            if extra:
                k0, k1, k2, k3 = (x[..., None] for x in (k0, k1, k2, k3))
            pos = k0 + tau * (k1 + tau * (k2 + tau * k3)) if need_pos else None
            vel = k1 + tau * (2.0 * k2 + 3.0 * tau * k3)
            acc = 2.0 * k2 + 6.0 * tau * k3
            return pos, vel, acc

        def ext(a):
            return a.reshape(a.shape + (1,) * (tau.ndim - 1))

        zero = 0.0  # a scalar: an axis that does not move costs no array work
        # travel positions are not needed: the point-mass model sees only p' and p''
        X = poly(_X, False) if self.used[_X] else (zero, zero, zero)
        Y = poly(_Y, False) if self.used[_Y] else (zero, zero, zero)
        if self.used[_HOIST]:
            H, dH, ddH = poly(_HOIST)
            L, dL, ddL = ext(self.L0) - H, -dH, -ddH
        else:
            L, dL, ddL = ext(self.L0), zero, zero
        if self.slewing:
            S, dS, ddS = poly(_SLEW)
            R, dR, ddR = poly(_RADIUS)
            _, _, vx, vy, ax, ay = polar_suspension(ext(self.x0), ext(self.y0), zero, X[1], X[2],
                                                    zero, Y[1], Y[2], S, dS, ddS, R, dR, ddR)
            return SuspensionRates(vx, vy, ax, ay, L, dL, ddL, dS)
        if self.radial:
            # radius moves without slewing: polar_suspension with a fixed jib angle
            # (dS = ddS = 0), written out so that the zero terms cost nothing
            _, dR, ddR = poly(_RADIUS, False)
            cs, sn = ext(self.cos0), ext(self.sin0)
            return SuspensionRates(X[1] + dR * cs, Y[1] + dR * sn, X[2] + ddR * cs, Y[2] + ddR * sn,
                                   L, dL, ddL, 0.0)
        return SuspensionRates(X[1], Y[1], X[2], Y[2], L, dL, ddL, 0.0)
