"""Motion profiles of one crane axis: displacement, velocity and acceleration in time.

Every profile here is exact: position, velocity and acceleration are the
analytic values of a piecewise polynomial (or of a C2 cubic spline for
``table``), evaluated at any instant, breakpoints included.  Each profile lists
its breakpoints, the instants where a derivative of the acceleration jumps, so
that the integrator can stop and restart there instead of smearing the jump.

Units are the axis's own: metres for linear axes, radians for ``slew``.

All profiles start from rest at ``start_s`` and end at rest at ``end_s``, after
which they hold their final displacement.

References
----------
.. [1] L. Biagiotti and C. Melchiorri, *Trajectory Planning for Automatic
   Machines and Robots*, Springer, 2008, ch. 3 (trapezoidal and double-S
   velocity profiles).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

__all__ = [
    "Profile",
    "PiecewiseCubic",
    "SplineProfile",
    "SumProfile",
    "trapezoid",
    "s_curve",
    "from_table",
    "ProfileError",
]


class ProfileError(ValueError):
    """A profile's parameters cannot describe a valid move."""


class Profile:
    """Base class of a one-axis motion profile.

    Subclasses implement :meth:`evaluate` and set ``start_s``, ``end_s``,
    ``breakpoints`` and ``distance``; they inherit the docstrings of
    :meth:`evaluate` and :meth:`local_poly`, whose contract is written here once.
    """

    start_s: float
    end_s: float
    distance: float
    breakpoints: tuple[float, ...]

    def evaluate(self, t):
        """Displacement, velocity and acceleration at time(s) ``t``.

        Parameters
        ----------
        t : float or array_like
            Time(s) [s]; before ``start_s`` the profile rests at 0, from ``end_s``
            on at ``distance``.

        Returns
        -------
        pos, vel, acc : ndarray
            Same shape as ``t`` [axis unit, unit/s, unit/s^2].
        """
        raise NotImplementedError

    def local_poly(self, t0: float, t1: float):
        """Coefficients ``c`` with pos = c0 + c1 tau + c2 tau^2 + c3 tau^3, tau = t - t0.

        Valid on [t0, t1] when the profile is one cubic there; ``None`` otherwise.
        Used by the single-run solver for fast scalar evaluation.

        Parameters
        ----------
        t0, t1 : float
            The interval [s].

        Returns
        -------
        tuple of float or None
            ``(c0, c1, c2, c3)`` [unit, unit/s, unit/s^2, unit/s^3], or None when the
            profile is not one cubic on [t0, t1].
        """
        return None

    @property
    def duration_s(self) -> float:
        return self.end_s - self.start_s


@dataclass(frozen=True)
class PiecewiseCubic(Profile):
    """Piecewise constant-jerk profile (each piece a cubic in time).

    Parameters
    ----------
    knots : ndarray
        Start time of each piece [s]; the last entry is the end of the move.
    p, v, a, j : ndarray
        Position, velocity, acceleration at the start of each piece and the
        constant jerk on it (one fewer entry than ``knots``).
    """

    knots: np.ndarray
    p: np.ndarray
    v: np.ndarray
    a: np.ndarray
    j: np.ndarray
    breakpoints: tuple = field(default=())

    def __post_init__(self):
        object.__setattr__(self, "breakpoints", tuple(float(k) for k in self.knots))

    @property
    def start_s(self) -> float:
        return float(self.knots[0])

    @property
    def end_s(self) -> float:
        return float(self.knots[-1])

    @property
    def distance(self) -> float:
        return float(self._final()[0])

    def _final(self):
        dt = self.knots[-1] - self.knots[-2]
        i = -1
        p = self.p[i] + self.v[i] * dt + self.a[i] * dt**2 / 2 + self.j[i] * dt**3 / 6
        return p, 0.0, 0.0

    def evaluate(self, t):
        t = np.asarray(t, dtype=float)
        k = np.clip(np.searchsorted(self.knots, t, side="right") - 1, 0, len(self.j) - 1)
        tau = t - self.knots[k]
        p = self.p[k] + self.v[k] * tau + self.a[k] * tau**2 / 2 + self.j[k] * tau**3 / 6
        v = self.v[k] + self.a[k] * tau + self.j[k] * tau**2 / 2
        a = self.a[k] + self.j[k] * tau
        before = t < self.knots[0]
        after = t >= self.knots[-1]
        pf = self._final()[0]
        p = np.where(before, 0.0, np.where(after, pf, p))
        v = np.where(before | after, 0.0, v)
        a = np.where(before | after, 0.0, a)
        return p, v, a

    def local_poly(self, t0, t1):
        if t1 <= self.knots[0]:
            return (0.0, 0.0, 0.0, 0.0)
        # t0 may sit a rounding error below a knot (a shaped copy's knots are shifted and shifted back)
        if t0 + 1e-12 >= self.knots[-1]:
            return (float(self._final()[0]), 0.0, 0.0, 0.0)
        k = int(np.searchsorted(self.knots, t0 + 1e-12, side="right") - 1)
        if k < 0 or t1 > self.knots[k + 1] + 1e-12:
            return None
        d = t0 - self.knots[k]
        p, v, a, j = self.p[k], self.v[k], self.a[k], self.j[k]
        # re-expand about t0
        c0 = p + v * d + a * d**2 / 2 + j * d**3 / 6
        c1 = v + a * d + j * d**2 / 2
        c2 = (a + j * d) / 2
        c3 = j / 6
        return (float(c0), float(c1), float(c2), float(c3))


def _build(start_s: float, pieces, sign: float) -> PiecewiseCubic:
    """Integrate (duration, accel_at_start, jerk) pieces exactly from rest."""
    knots = [start_s]
    ps, vs, as_, js = [], [], [], []
    p = v = 0.0
    for dur, a0, jerk in pieces:
        if dur <= 0.0:
            continue
        ps.append(sign * p)
        vs.append(sign * v)
        as_.append(sign * a0)
        js.append(sign * jerk)
        p = p + v * dur + a0 * dur**2 / 2 + jerk * dur**3 / 6
        v = v + a0 * dur + jerk * dur**2 / 2
        knots.append(knots[-1] + dur)
    if not js:
        raise ProfileError("the move has zero duration")
    return PiecewiseCubic(
        np.array(knots), np.array(ps), np.array(vs), np.array(as_), np.array(js)
    )


def _check_positive(**kw):
    for name, val in kw.items():
        if not (val > 0 and math.isfinite(val)):
            raise ProfileError(f"{name} must be a positive finite number, got {val!r}")


def trapezoid(start_s: float, distance: float, speed: float, accel: float,
              decel: float | None = None) -> PiecewiseCubic:
    """Acceleration-limited (trapezoidal velocity) move.

    Accelerates at ``accel`` to ``speed``, cruises, decelerates at ``decel``
    and covers exactly ``distance``; triangular when the distance is too short
    to reach ``speed`` (peak speed sqrt(2 D a d / (a + d))) [1]_.

    Parameters
    ----------
    start_s : float
        Start of the move [s].
    distance : float
        Signed displacement [m or rad].
    speed, accel, decel : float
        Speed limit [unit/s], acceleration and deceleration [unit/s^2], all > 0
        (``decel`` defaults to ``accel``).

    Returns
    -------
    PiecewiseCubic
        The move, in the axis's unit.
    """
    decel = accel if decel is None else decel
    _check_positive(speed=speed, accel=accel, decel=decel)
    D = abs(distance)
    if D == 0:
        raise ProfileError("distance must not be zero")
    sign = 1.0 if distance > 0 else -1.0
    vpk = speed
    if vpk**2 / (2 * accel) + vpk**2 / (2 * decel) > D:
        vpk = math.sqrt(2 * D * accel * decel / (accel + decel))
    ta, td = vpk / accel, vpk / decel
    tc = (D - vpk**2 / (2 * accel) - vpk**2 / (2 * decel)) / vpk
    tc = max(tc, 0.0)
    if tc < 1e-12:
        tc = 0.0
    return _build(start_s, [(ta, accel, 0.0), (tc, 0.0, 0.0), (td, -decel, 0.0)], sign)


def _scurve_ramp(v: float, a: float, j: float):
    """Pieces and distance of a jerk-limited ramp from rest to speed ``v``."""
    if v >= a * a / j:
        tj = a / j
        tconst = v / a - tj
        pieces = [(tj, 0.0, j), (tconst, a, 0.0), (tj, a, -j)]
        T = v / a + tj
    else:
        ap = math.sqrt(v * j)
        tj = ap / j
        pieces = [(tj, 0.0, j), (tj, ap, -j)]
        T = 2 * tj
    return pieces, v * T / 2


def s_curve(start_s: float, distance: float, speed: float, accel: float,
            jerk: float, decel: float | None = None) -> PiecewiseCubic:
    """Jerk-limited (double-S) move: constant-jerk pieces, exact distance.

    Peak speed is ``speed`` when the distance allows it, else the largest
    speed whose jerk-limited ramps up and down fit in ``distance`` [1]_.

    Parameters
    ----------
    start_s, distance, speed, accel : float
        As for :func:`trapezoid` [s, m or rad, unit/s, unit/s^2].
    jerk : float
        Jerk limit [unit/s^3].
    decel : float, optional
        As for :func:`trapezoid` [unit/s^2].

    Returns
    -------
    PiecewiseCubic
        The move, in the axis's unit.
    """
    decel = accel if decel is None else decel
    _check_positive(speed=speed, accel=accel, decel=decel, jerk=jerk)
    D = abs(distance)
    if D == 0:
        raise ProfileError("distance must not be zero")
    sign = 1.0 if distance > 0 else -1.0

    def need(v):
        return _scurve_ramp(v, accel, jerk)[1] + _scurve_ramp(v, decel, jerk)[1]

    vpk = speed
    if need(vpk) > D:
        from scipy.optimize import brentq  # lazily: scipy.optimize costs start-up time

        vpk = brentq(lambda v: need(v) - D, 1e-300, speed, xtol=1e-15, rtol=1e-15)
    up, dup = _scurve_ramp(vpk, accel, jerk)
    dn, ddn = _scurve_ramp(vpk, decel, jerk)
    tc = max((D - dup - ddn) / vpk, 0.0)
    if tc < 1e-12:
        tc = 0.0
    down = [(dur, -a0, -jj) for dur, a0, jj in dn]
    return _build(start_s, up + [(tc, 0.0, 0.0)] + down, sign)


@dataclass(frozen=True)
class SplineProfile(Profile):
    """A recorded displacement history, interpolated by a C2 cubic spline.

    The spline is clamped (zero velocity) at both ends, so the move starts and
    ends at rest; position, velocity and acceleration are the spline's own
    values and derivatives (scipy.interpolate.CubicSpline).
    """

    spline: CubicSpline
    start_s: float
    end_s: float
    breakpoints: tuple = ()

    @property
    def distance(self) -> float:
        return float(self.spline(self.end_s - self.start_s))

    def evaluate(self, t):
        t = np.asarray(t, dtype=float)
        tau = np.clip(t - self.start_s, 0.0, self.end_s - self.start_s)
        inside = (t >= self.start_s) & (t < self.end_s)
        p = self.spline(tau)
        v = np.where(inside, self.spline(tau, 1), 0.0)
        a = np.where(inside, self.spline(tau, 2), 0.0)
        return p, v, a

    def local_poly(self, t0, t1):
        if t1 <= self.start_s:
            return (0.0, 0.0, 0.0, 0.0)
        if t0 >= self.end_s:
            return (self.distance, 0.0, 0.0, 0.0)
        x = self.spline.x
        k = int(np.searchsorted(x, t0 - self.start_s, side="right") - 1)
        k = min(max(k, 0), len(x) - 2)
        if t1 - self.start_s > x[k + 1] + 1e-12:
            return None
        c = self.spline.c[:, k]  # highest power first, about x[k]
        d = t0 - self.start_s - x[k]
        c3, c2, c1, c0 = c
        return (
            float(c0 + c1 * d + c2 * d**2 + c3 * d**3),
            float(c1 + 2 * c2 * d + 3 * c3 * d**2),
            float(c2 + 3 * c3 * d),
            float(c3),
        )


def from_table(start_s: float, times_s, positions) -> SplineProfile:
    """Profile from a recorded table of times (from the move's start) and positions.

    Displacement is taken relative to the first row.  Times must start at 0
    and increase strictly; at least two rows.

    Parameters
    ----------
    start_s : float
        Start of the move [s].
    times_s : array_like
        Times from the move's start [s].
    positions : array_like
        Axis positions at those times [m or rad].

    Returns
    -------
    SplineProfile
        The clamped C2 spline through the table.
    """
    t = np.asarray(times_s, dtype=float)
    x = np.asarray(positions, dtype=float)
    if t.ndim != 1 or t.size < 2 or t.size != x.size:
        raise ProfileError("a table needs at least two rows of time and position")
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(x))):
        raise ProfileError("a table holds a value that is not a finite number")
    if t[0] != 0.0:
        raise ProfileError(f"the table's first time must be 0, got {t[0]!r}")
    if np.any(np.diff(t) <= 0):
        i = int(np.argmax(np.diff(t) <= 0)) + 1
        raise ProfileError(f"table times must increase strictly (row {i + 1}: {t[i]!r})")
    from scipy.interpolate import CubicSpline  # lazily: start-up time of every command

    spline = CubicSpline(t, x - x[0], bc_type="clamped")
    return SplineProfile(spline, float(start_s), float(start_s + t[-1]),
                         (float(start_s), float(start_s + t[-1])))


@dataclass(frozen=True)
class SumProfile(Profile):
    """Weighted sum of time-shifted copies of profiles (e.g. a shaped command).

    ``pos(t) = sum_i w_i * base_i.pos(t - shift_i)``.
    """

    parts: tuple  # of (weight, shift_s, Profile)

    @property
    def start_s(self):
        return min(p.start_s + s for _, s, p in self.parts)

    @property
    def end_s(self):
        return max(p.end_s + s for _, s, p in self.parts)

    @property
    def distance(self):
        return float(sum(w * p.distance for w, _, p in self.parts))

    @property
    def breakpoints(self):
        pts = {float(b + s) for _, s, p in self.parts for b in p.breakpoints}
        return tuple(sorted(pts))

    def evaluate(self, t):
        t = np.asarray(t, dtype=float)
        out = [np.zeros_like(t), np.zeros_like(t), np.zeros_like(t)]
        for w, s, p in self.parts:
            for o, val in zip(out, p.evaluate(t - s)):
                o += w * val
        return tuple(out)

    def local_poly(self, t0, t1):
        total = [0.0, 0.0, 0.0, 0.0]
        for w, s, p in self.parts:
            c = p.local_poly(t0 - s, t1 - s)
            if c is None:
                return None
            for i in range(4):
                total[i] += w * c[i]
        return tuple(total)
