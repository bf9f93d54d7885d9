"""Input shaping: ZV, ZVD and EI shapers, and the whole-number-of-periods rule.

A shaper is a short train of impulses (amplitudes :math:`A_i`, times
:math:`t_i`, :math:`\\sum A_i = 1`).  Convolving a crane command with it gives
a command that covers the same distance, never exceeds the original speed or
acceleration (the amplitudes are positive and sum to one), and leaves a
linear oscillator of the tuned frequency and damping with (almost) no residual
vibration.  Here the command is a trapezoid or s-curve move of one axis and the
oscillator is the load swinging on the hoist rope.

Profile names (``moves[].profile``)
-----------------------------------
``zv``, ``zvd``, ``ei``
    The move's trapezoid (or, with ``jerk_m_s3``, s-curve) convolved with the
    shaper.  Keys: ``shaper_base`` (``"trapezoid"`` or ``"s-curve"``; default
    s-curve when ``jerk_m_s3`` is given, trapezoid otherwise),
    ``shaper_period_s`` (undamped swing period the shaper is tuned to; default
    the scene's own first mode: :math:`2\\pi\\sqrt{L/g}` of the point-mass
    model at the initial rope length, or the first mode of a multi-body model
    when one is selected), ``shaper_second_period_s`` (convolve with a second
    shaper of the same kind tuned to this period: cancels two modes, or widens
    the band of rope lengths covered), ``shaper_damping_ratio`` (default the
    scene's ``damping.ratio``), ``shaper_tolerance`` (EI only: the residual
    vibration V allowed at the design frequency, default 0.05).
``whole-period``
    A trapezoid (or s-curve) whose acceleration and deceleration phases each
    last a whole number of swing periods: the acceleration is lowered to the
    largest value within the move's limit that makes it so.  Zero residual
    swing in the linear undamped model, with no added delay.

Notes
-----
Residual vibration of a damped oscillator (natural frequency
:math:`\\omega`, damping ratio :math:`\\zeta`, damped frequency
:math:`\\omega_d = \\omega\\sqrt{1-\\zeta^2}`) after an impulse train, as a
fraction of that left by one unit impulse at the last impulse time
:math:`t_N` (Eq. 3 in [1]_):

.. math::
    V(\\omega, \\zeta) = e^{-\\zeta\\omega t_N}
    \\left|\\sum_i A_i\\, e^{\\zeta\\omega t_i}\\, e^{j\\omega_d t_i}\\right| .

ZV and ZVD (Eqs. 7-8 in [1]_), with
:math:`K = \\exp(-\\zeta\\pi/\\sqrt{1-\\zeta^2})` and impulses half a damped
period :math:`T_d/2 = \\pi/\\omega_d` apart:

.. math::
    A_{ZV} = \\frac{[1, K]}{1 + K}, \\qquad
    A_{ZVD} = \\frac{[1, 2K, K^2]}{(1 + K)^2} .

EI (extra-insensitive, [2]_): three impulses at :math:`0, T_d/2, T_d` whose
residual vibration equals the tolerance :math:`V_{tol}` at the design
frequency and is stationary there (:math:`\\partial V/\\partial\\omega = 0`), so
that it dips to zero on both sides and stays below :math:`V_{tol}` over a wide
band.  Undamped this is :math:`A = [(1+V)/4, (1-V)/2, (1+V)/4]` [2]_; with
damping the same three conditions are solved numerically here (the published
damped EI uses curve fits that are not reproduced), so the amplitudes differ
slightly from the published fitted ones.

Whole-period rule: a constant acceleration :math:`a` over :math:`T_a` leaves
the linear pendulum with residual amplitude
:math:`(2a/g)\\,|\\sin(\\omega T_a/2)|`, zero for :math:`T_a = nT`
(textbook result, derived by superposing two acceleration steps).  The
jerk-limited phase of an s-curve is a rectangle of length :math:`v/a`
convolved with a rectangle of length :math:`a/j`, so it also leaves no swing
when :math:`v/a = nT`.

References
----------
.. [1] N. C. Singer and W. P. Seering, "Preshaping command inputs to reduce
   system vibration", *ASME J. Dyn. Sys., Meas., Control* 112(1), 76-82, 1990.
   doi:10.1115/1.2894142
.. [2] W. Singhose, W. Seering and N. Singer, "Residual vibration reduction
   using vector diagrams to generate shaped inputs", *ASME J. Mech. Design*
   116(2), 654-659, 1994. doi:10.1115/1.2919428
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from swingsim.motion.profiles import (PiecewiseCubic, Profile, ProfileError, SumProfile, s_curve,
                                      trapezoid)

__all__ = ["Shaper", "zv", "zvd", "ei", "convolve", "residual_vibration", "shaped",
           "whole_period_trapezoid", "whole_period_s_curve", "SHAPERS"]


@dataclass(frozen=True)
class Shaper:
    """An impulse train: ``amplitudes`` (sum 1) at ``times_s`` (first 0) [s]."""

    name: str
    amplitudes: tuple
    times_s: tuple

    @property
    def duration_s(self) -> float:
        """Time of the last impulse [s]: the delay the shaper adds to a move."""
        return float(self.times_s[-1])


def _check(period_s: float, zeta: float):
    if not (period_s > 0 and math.isfinite(period_s)):
        raise ProfileError(f"the shaper period must be a positive number of seconds, got {period_s!r}")
    if not (0.0 <= zeta < 1.0):
        raise ProfileError(f"the shaper damping ratio must be in [0, 1), got {zeta!r}")


def _checked_terms(period_s: float, zeta: float) -> tuple[float, float]:
    """Check the tuning; the impulse ratio K [-] and half the damped period [s].

    :math:`K = e^{-\\zeta\\pi/\\sqrt{1-\\zeta^2}}` (Singer & Seering 1990, module
    References).
    """
    _check(period_s, zeta)
    return (math.exp(-zeta * math.pi / math.sqrt(1.0 - zeta * zeta)),
            0.5 * period_s / math.sqrt(1.0 - zeta * zeta))


def zv(period_s: float, zeta: float = 0.0) -> Shaper:
    """Zero-vibration shaper (two impulses; Eq. 7 in Singer & Seering 1990).

    Parameters
    ----------
    period_s : float
        Undamped natural period of the mode to cancel [s].
    zeta : float
        Damping ratio of that mode [-].

    Returns
    -------
    Shaper
        Amplitudes :math:`[1, K] / (1 + K)` half a damped period apart.

    References
    ----------
    .. [1] N. C. Singer and W. P. Seering, 1990 (module References).
    """
    K, h = _checked_terms(period_s, zeta)
    return Shaper("zv", (1.0 / (1.0 + K), K / (1.0 + K)), (0.0, h))


def zvd(period_s: float, zeta: float = 0.0) -> Shaper:
    """Zero-vibration-and-derivative shaper (three impulses; Eq. 8 in Singer & Seering 1990).

    Parameters
    ----------
    period_s, zeta : float
        Period [s] and damping ratio [-] of the mode to cancel, as for :func:`zv`.

    Returns
    -------
    Shaper
        Amplitudes :math:`[1, 2K, K^2] / (1 + K)^2` half a damped period apart.

    References
    ----------
    .. [1] N. C. Singer and W. P. Seering, 1990 (module References).
    """
    K, h = _checked_terms(period_s, zeta)
    d = (1.0 + K) ** 2
    return Shaper("zvd", (1.0 / d, 2.0 * K / d, K * K / d), (0.0, h, 2.0 * h))


def residual_vibration(shaper: Shaper, omega, zeta: float = 0.0):
    """Residual vibration V of a damped oscillator after the shaper [-] (Eq. 3 in [1]).

    Normalised to a unit impulse applied at the shaper's last impulse time.

    Parameters
    ----------
    shaper : Shaper
        The impulse train.
    omega : float or ndarray
        Actual natural frequency of the oscillator [rad/s].
    zeta : float
        Actual damping ratio [-].

    Returns
    -------
    float or ndarray
        V [-], shaped like ``omega``; 1 for an unshaped step.

    References
    ----------
    .. [1] N. C. Singer and W. P. Seering, 1990, Eq. 3 (module References).
    """
    omega = np.asarray(omega, dtype=float)
    A = np.asarray(shaper.amplitudes)
    t = np.asarray(shaper.times_s)
    wd = omega[..., None] * math.sqrt(1.0 - zeta * zeta)
    e = np.exp(zeta * omega[..., None] * (t - t[-1]))
    c = np.sum(A * e * np.cos(wd * t), axis=-1)
    s = np.sum(A * e * np.sin(wd * t), axis=-1)
    return np.hypot(c, s)


def ei(period_s: float, zeta: float = 0.0, tolerance: float = 0.05) -> Shaper:
    """Extra-insensitive shaper (three impulses; Singhose, Seering & Singer 1994).

    Parameters
    ----------
    period_s, zeta : float
        As for :func:`zv` [s, -]; for zeta > 0 the EI conditions are solved
        numerically (see the module Notes).
    tolerance : float
        Residual vibration V allowed at the design frequency [-], 0 < V < 1.

    Returns
    -------
    Shaper
        Three impulses at :math:`0, T_d/2, T_d`.

    Raises
    ------
    ProfileError
        When no EI shaper exists for the damping ratio and tolerance.

    Notes
    -----
    Undamped: :math:`A = [(1+V)/4, (1-V)/2, (1+V)/4]` at :math:`0, T/2, T`.

    References
    ----------
    .. [2] W. Singhose, W. Seering and N. Singer, 1994 (module References).
    """
    K, h = _checked_terms(period_s, zeta)
    V = float(tolerance)
    if not (0.0 < V < 1.0):
        raise ProfileError(f"the EI tolerance must be between 0 and 1, got {tolerance!r}")
    times = (0.0, h, 2.0 * h)
    A0 = np.array([(1 + V) / 4, (1 - V) / 2, (1 + V) / 4])
    if zeta == 0.0:
        return Shaper("ei", tuple(float(a) for a in A0), times)
    w = 2.0 * math.pi / period_s
    t = np.asarray(times)
    sq = math.sqrt(1.0 - zeta * zeta)
    e = np.exp(zeta * w * (t - t[-1])) * np.exp(1j * w * sq * t)   # S = sum A_i e_i
    de = e * (zeta * (t - t[-1]) + 1j * sq * t)                    # dS/dw = sum A_i de_i

    def eqs(x):
        A = np.array([x[0], x[1], 1.0 - x[0] - x[1]])
        S, dS = np.sum(A * e), np.sum(A * de)
        # |S| = V and d|S|^2/dw = 2 Re(conj(S) dS/dw) = 0 at the design frequency
        return [abs(S) ** 2 - V * V, float(np.real(np.conj(S) * dS)) * w]

    guess = np.array([A0[0], A0[1] * K]) / (A0[0] + A0[1] * K + A0[2] * K * K)
    from scipy.optimize import fsolve  # lazily: start-up time of every command

    x, info, ok, _ = fsolve(eqs, guess, full_output=True, xtol=1e-14)
    A = (float(x[0]), float(x[1]), float(1.0 - x[0] - x[1]))
    if min(A) <= 0 or max(abs(r) for r in eqs(x)) > 1e-12:
        raise ProfileError(f"no EI shaper for damping ratio {zeta:g} and tolerance {V:g}")
    return Shaper("ei", A, times)


def convolve(a: Shaper, b: Shaper) -> Shaper:
    """Shaper of two shapers in series (cancels both their modes).

    Parameters
    ----------
    a, b : Shaper
        The two impulse trains.

    Returns
    -------
    Shaper
        Their convolution: impulses at every sum of times [s], amplitudes multiplied
        (coinciding times merged).

    References
    ----------
    .. [1] N. C. Singer and W. P. Seering, 1990 (module References).
    """
    pairs = {}
    for x, s in zip(a.amplitudes, a.times_s):
        for y, t in zip(b.amplitudes, b.times_s):
            key = round(s + t, 12)
            pairs[key] = pairs.get(key, 0.0) + x * y
    ts = sorted(pairs)
    return Shaper(f"{a.name}*{b.name}", tuple(pairs[t] for t in ts), tuple(float(t) for t in ts))


def shaped(profile: Profile, shaper: Shaper) -> SumProfile:
    """The profile convolved with the shaper: sum of A_i * profile(t - t_i).

    Parameters
    ----------
    profile : Profile
        The unshaped move.
    shaper : Shaper
        The impulse train.

    Returns
    -------
    SumProfile
        The shaped move (same distance; longer by ``shaper.duration_s`` [s]).
    """
    return SumProfile(tuple((float(A), float(t), profile)
                              for A, t in zip(shaper.amplitudes, shaper.times_s)))


#: Shaper constructors by profile name: f(period_s, zeta, tolerance) -> Shaper.
SHAPERS = {
    "zv": lambda T, z, tol: zv(T, z),
    "zvd": lambda T, z, tol: zvd(T, z),
    "ei": lambda T, z, tol: ei(T, z, tol),
}

_MAX_PERIODS = 1000


def _first_fitting(period_s: float, fit):
    """Speed and acceleration of the smallest whole number n >= 1 of periods that fits.

    ``fit(n T)`` gives ``(speed, accel)`` when n periods fit the move's limits, else
    None; :class:`ProfileError` when no n up to :data:`_MAX_PERIODS` fits.
    """
    _check(period_s, 0.0)
    for n in range(1, _MAX_PERIODS + 1):
        found = fit(n * period_s)
        if found is not None:
            return found
    raise ProfileError("no whole number of swing periods fits the move's limits")


def whole_period_trapezoid(start_s: float, distance: float, speed: float, accel: float,
                           period_s: float) -> PiecewiseCubic:
    """Trapezoid whose acceleration and deceleration each last n whole periods.

    The smallest n >= 1 is taken for which the needed acceleration
    ``min(speed / (n T), |D| / (n T)^2)`` stays within ``accel``.

    Parameters
    ----------
    start_s : float
        Start of the move [s].
    distance, speed, accel : float
        Signed travel [m or rad], speed limit [unit/s], acceleration limit [unit/s^2].
    period_s : float
        Swing period [s].

    Returns
    -------
    PiecewiseCubic
        The move: a trapezoid at the fitted speed and acceleration.

    Raises
    ------
    ProfileError
        When no whole number of periods up to 1000 fits the limits.
    """
    D = abs(distance)

    def fit(Ta):
        vp = min(speed, D / Ta)
        a = vp / Ta
        return (vp, a) if a <= accel * (1 + 1e-12) else None

    vp, a = _first_fitting(period_s, fit)
    return trapezoid(start_s, distance, vp, a)


def whole_period_s_curve(start_s: float, distance: float, speed: float, accel: float,
                         jerk: float, period_s: float) -> PiecewiseCubic:
    """S-curve whose acceleration phases have v/a equal to n whole periods.

    Each jerk-limited phase is a constant-acceleration pulse of length v/a
    smoothed by a jerk ramp of length a/j; it leaves no linear swing when
    v/a = n T.  The smallest n >= 1 is taken that keeps the acceleration within
    ``accel`` and the phase reaching it (v >= a^2 / j).

    Parameters
    ----------
    start_s, distance, speed, accel, period_s : float
        As for :func:`whole_period_trapezoid` [s, m or rad, unit/s, unit/s^2, s].
    jerk : float
        Jerk of the ramps [unit/s^3], used as given (not a limit).

    Returns
    -------
    PiecewiseCubic
        The move: an s-curve at the fitted speed and acceleration, with ``jerk``.

    Raises
    ------
    ProfileError
        As for :func:`whole_period_trapezoid`.
    """
    D = abs(distance)

    def fit(nT):
        v = speed
        if v * (nT + v / (nT * jerk)) > D:  # ramps up and down need more than D
            # v^2 / (nT j) + v nT - D = 0
            qa, qb = 1.0 / (nT * jerk), nT
            v = (-qb + math.sqrt(qb * qb + 4 * qa * D)) / (2 * qa)
        a = v / nT
        return (v, a) if a <= accel * (1 + 1e-12) and v >= a * a / jerk else None

    v, a = _first_fitting(period_s, fit)
    return s_curve(start_s, distance, v, a, jerk)


def tuning(move, scene, swing_period_s: float | None = None) -> tuple[float, float]:
    """Undamped period [s] and damping ratio [-] a shaped move is tuned to.

    Parameters
    ----------
    move : Move
        The move; its ``shaper_period_s`` and ``shaper_damping_ratio`` win when given.
    scene : Scene
        Its scene (the damping ratio otherwise).
    swing_period_s : float, optional
        The lift's first swing period [s] (the model's, passed down by whoever built the
        model first); used when the move gives no period.

    Returns
    -------
    tuple of float
        ``(period_s, damping_ratio)``.
    """
    T = move.profile_keys.get("shaper_period_s")
    if T is None:
        if swing_period_s is None:
            raise ProfileError("needs the lift's swing period (build the motion with the model's "
                                 "period, or give shaper_period_s)")
        T = float(swing_period_s)
    z = move.profile_keys.get("shaper_damping_ratio")
    if z is None:
        z = scene.damping_ratio
    return float(T), float(z)


def _base_name(move) -> str:
    base = move.profile_keys.get("shaper_base")
    if base is None:
        base = "s-curve" if move.jerk is not None else "trapezoid"
    if base == "trapezoid" and move.jerk is not None:
        raise ProfileError("jerk_m_s3 is only used with shaper_base = 's-curve'")
    if base == "s-curve" and move.jerk is None:
        raise ProfileError("shaper_base = 's-curve' needs jerk_m_s3 (or jerk_deg_s3 for slew)")
    return base


def build_shaped(move, scene, scale, swing_period_s=None) -> Profile:
    """Profile builder for ``zv``, ``zvd``, ``ei`` (see :data:`swingsim.motion.registry.PROFILES`).

    Parameters
    ----------
    move : Move
        The scene's move (its distance, speed, acceleration and shaper keys).
    scene : Scene
        Its scene (the damping ratio when the move gives none).
    scale : float
        Scene unit to internal unit (pi/180 for slew moves in degrees, else 1) [-].
    swing_period_s : float, optional
        The lift's first swing period [s], used when the move gives no
        ``shaper_period_s``.

    Returns
    -------
    Profile
        The move in internal units.
    """
    T, z = tuning(move, scene, swing_period_s)
    decel = None if move.decel is None else move.decel * scale
    if _base_name(move) == "s-curve":
        base = s_curve(move.start_s, move.distance * scale, move.speed * scale,
                         move.accel * scale, move.jerk * scale, decel)
    else:
        base = trapezoid(move.start_s, move.distance * scale, move.speed * scale,
                           move.accel * scale, decel)
    tol = float(move.profile_keys.get("shaper_tolerance", 0.05))
    sh = SHAPERS[move.profile](T, z, tol)
    T2 = move.profile_keys.get("shaper_second_period_s")
    if T2 is not None:
        sh = convolve(sh, SHAPERS[move.profile](float(T2), z, tol))
    return shaped(base, sh)


def build_whole_period(move, scene, scale, swing_period_s=None) -> Profile:
    """Profile builder for ``whole-period``: a trapezoid, or an s-curve when the move has a jerk.

    Parameters
    ----------
    move, scene, scale, swing_period_s
        As for :func:`build_shaped` (scale [-], period [s]); the damping ratio is
        not used: whole periods of acceleration leave no swing at any damping.

    Returns
    -------
    PiecewiseCubic
        The move in internal units.
    """
    T, _ = tuning(move, scene, swing_period_s)
    if move.jerk is not None:
        return whole_period_s_curve(move.start_s, move.distance * scale, move.speed * scale,
                                    move.accel * scale, move.jerk * scale, T)
    return whole_period_trapezoid(move.start_s, move.distance * scale, move.speed * scale,
                                  move.accel * scale, T)
