"""What each summary number measures: one implementation, on arrays of runs.

Every function here takes the samples of B runs as arrays with a leading batch
axis, shape (B, n) (one row per run, samples in time order).  The single-run
summary (:func:`swingsim.metrics.single.summarize`) calls them as a batch of one
on its sampled trajectory; the batch engine (:mod:`swingsim.batch`) calls them
on the dense samples of a chunk of variants.  How a peak that falls between two
samples is refined depends on the dense solution each side has (a bounded search
on the trajectory, Newton's method on the batch interpolant); what is measured
is defined here.

Definitions
-----------
rope angle
    Angle of the hoist rope from the vertical, :math:`\\arctan2(|n_h|, -n_z)`
    for the unit rope direction :math:`n` (pointing down the rope).
swing
    Angle of the rope from its *rest direction* (vertical in still air, offset
    in a steady wind): what must die away before the load can be landed.
after the move
    Samples at or after the last move's end (within 1e-12 s).
peak, residual
    Largest rope angle over the run; largest rope angle (and swing) after the move.
swing at move end
    The swing at the last move's end (linear interpolation between the samples
    around it; the move's end is itself a sample on both sides).
excursion
    Horizontal distance of the load from the plumb line through the suspension point.
hook load
    The pull of the hoist rope on the hook block (or on the load without one): the
    sum over its falls, so everything below the sheaves, the block included
    (``peak_rope_tension_kN`` is its older synonym).
line pull
    The pull in one part of line: hook load / (falls * reeving efficiency) (common
    practice; the efficiency is the reeving's, from the sheave friction,
    :func:`swingsim.dynamics.rope.reeving_efficiency`).
dynamic factor
    Peak rope tension over the static rope load.
settle time
    Time after the last move's end until the swing stays below the settle
    threshold for the rest of the run; none when it never does, or when the run
    ends less than one swing period (at the final rope length) after it last
    exceeded the threshold (it cannot be confirmed).
measured period
    Mean interval between successive upward crossings of the rest position by
    the swing component along its principal axis (after the last move), measured when the
    run goes on for more than 1.5 natural periods after the move, with more than
    10 samples there and a swing above 0.02 deg.  Compared with the small-angle
    period :math:`2\\pi\\sqrt{L/g}` and with the exact plane-pendulum period
    :math:`4\\sqrt{L/g}\\,K(\\sin^2(\\theta_0/2))`.

A row's numbers never depend on the other rows: every operation is element-wise
or a reduction along the row, and sums along a row are sequential
(:func:`row_sum`), so trailing padding does not change them.

References
----------
M. Abramowitz, I.A. Stegun, *Handbook of Mathematical Functions*, 1964, 17.3
(the complete elliptic integral K(m) of the exact pendulum period;
``scipy.special.ellipk`` takes the parameter m).
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

#: Samples this close before the last move's end count as after it [s].
AFTER_MOVE_TOLERANCE_S = 1e-12
#: The measured period needs more than this many samples after the move.
PERIOD_MIN_SAMPLES = 10
#: ... and a run that goes on for more than this many natural periods after the move.
PERIOD_MIN_RUN_PERIODS = 1.5
#: ... and a swing (about the rest position) larger than this [rad].
PERIOD_MIN_AMPLITUDE_RAD = math.radians(0.02)


class PeakSample(NamedTuple):
    """The largest sample of each row: index, time [s] and value, arrays (B,)."""

    index: np.ndarray
    time_s: np.ndarray
    value: np.ndarray


class MeasuredPeriod(NamedTuple):
    """Swing period measured from zero crossings, arrays (B,).

    ``swinging`` says that the run after the move is long enough and swings
    enough to be measured; ``period_s`` is NaN where it is not, or where fewer
    than two upward crossings were seen; ``crossings`` counts them.
    """

    period_s: np.ndarray
    crossings: np.ndarray
    swinging: np.ndarray


def rope_angle_rad(n: np.ndarray) -> np.ndarray:
    """Angle of the rope from the vertical.

    Parameters
    ----------
    n : ndarray (..., 3)
        Unit rope directions, pointing down the rope [-].

    Returns
    -------
    ndarray (...)
        :math:`\\arctan2(|n_h|, -n_z)` [rad], accurate at small and large angles.
    """
    return np.arctan2(np.hypot(n[..., 0], n[..., 1]), -n[..., 2])


def rope_angle_from_horizontal_sq(horizontal_sq: np.ndarray) -> np.ndarray:
    """Rope angle of unit directions given by the square of their horizontal part.

    Parameters
    ----------
    horizontal_sq : ndarray
        :math:`|n_h|^2` of unit rope directions hanging below the suspension point
        [-]; clipped to [0, 1].

    Returns
    -------
    ndarray
        The rope angle [rad], by :func:`rope_angle_rad` on the direction
        :math:`(|n_h|, 0, -\\sqrt{1 - |n_h|^2})`.
    """
    q = np.clip(horizontal_sq, 0.0, 1.0)
    h = np.sqrt(q)
    return rope_angle_rad(np.stack([h, np.zeros_like(h), -np.sqrt(1.0 - q)], axis=-1))


def angle_between(n: np.ndarray, m: np.ndarray) -> np.ndarray:
    """Angle between unit vectors, accurate at small angles.

    Parameters
    ----------
    n, m : ndarray (..., 3)
        Unit vectors (broadcast against each other) [-].

    Returns
    -------
    ndarray (...)
        :math:`\\arctan2(|n \\times m|, n \\cdot m)` [rad]; the swing when ``m`` is
        the rest direction.
    """
    c = np.cross(n, m)
    return np.arctan2(np.linalg.norm(c, axis=-1), np.sum(n * m, axis=-1))


def cos_swing(nx: np.ndarray, ny: np.ndarray, nz: np.ndarray, rest: np.ndarray) -> np.ndarray:
    """Cosine of the swing: the rope direction dotted with its rest direction.

    Parameters
    ----------
    nx, ny, nz : ndarray (B, n)
        Components of the unit rope direction [-].
    rest : ndarray (B, 3)
        Unit rest direction of each run [-].

    Returns
    -------
    ndarray (B, n)
        :math:`n \\cdot n_{rest}` [-]; it falls as the swing grows.
    """
    return nx * rest[:, None, 0] + ny * rest[:, None, 1] + nz * rest[:, None, 2]


def row_sum(x: np.ndarray) -> np.ndarray:
    """Sum along each row, sequentially, so trailing zeros (padding) do not change it.

    ``np.sum`` adds pairwise in blocks whose layout depends on the row length; a
    sequential sum gives a row the same float however many zeros follow it.

    Parameters
    ----------
    x : ndarray (B, n)
        Values to add along each row.

    Returns
    -------
    ndarray (B,)
        The row sums.
    """
    return np.cumsum(x, axis=1)[:, -1]


def after_move(t: np.ndarray, move_end_s: np.ndarray) -> np.ndarray:
    """Which samples lie at or after the last move's end.

    Parameters
    ----------
    t : ndarray (B, n)
        Sample times [s].
    move_end_s : ndarray (B,)
        End of each run's last move [s].

    Returns
    -------
    ndarray (B, n) of bool
        True from the move's end on (within :data:`AFTER_MOVE_TOLERANCE_S`).
    """
    return t >= np.asarray(move_end_s)[:, None] - AFTER_MOVE_TOLERANCE_S


def peak_sample(t: np.ndarray, x: np.ndarray, mask: np.ndarray | None = None) -> PeakSample:
    """The largest sample of each row, the start of every peak refinement.

    Parameters
    ----------
    t : ndarray (B, n)
        Sample times [s].
    x : ndarray (B, n)
        Sampled quantity (any unit).
    mask : ndarray (B, n) of bool, optional
        Samples that count (all when omitted); a row without any gives -inf.

    Returns
    -------
    PeakSample
        Index, time [s] and value of the largest counted sample of each row.
    """
    xm = x if mask is None else np.where(mask, x, -np.inf)
    i = np.argmax(xm, axis=1)
    r = np.arange(x.shape[0])
    return PeakSample(i, t[r, i], xm[r, i])


def value_at_instant(t: np.ndarray, value_at, instant_s: np.ndarray, after: np.ndarray) -> np.ndarray:
    """A sampled quantity at one instant per row, by linear interpolation.

    Parameters
    ----------
    t : ndarray (B, n)
        Sample times [s].
    value_at : callable
        ``value_at(rows, idx) -> ndarray (B,)``: the quantity at sample ``idx[b]``
        of row ``rows[b]``, so that it is evaluated at two samples per row only.
    instant_s : ndarray (B,)
        The instant of each row [s].
    after : ndarray (B, n) of bool
        Samples at or after the instant (:func:`after_move` for the move's end).

    Returns
    -------
    ndarray (B,)
        The quantity interpolated between the last sample before the instant and
        the first one at or after it (that sample's value when it is the instant).
    """
    B, M = t.shape
    r = np.arange(B)
    if M < 2:  # a single sample: its value
        return value_at(r, np.zeros(B, dtype=int))
    j = np.clip(np.argmax(after, axis=1), 1, M - 1)
    ta, tb = t[r, j - 1], t[r, j]
    xa, xb = value_at(r, j - 1), value_at(r, j)
    step = np.where(tb > ta, tb - ta, 1.0)
    weight = np.clip(np.where(tb > ta, (instant_s - ta) / step, 1.0), 0.0, 1.0)
    return xa + weight * (xb - xa)


def excursion_sq_m2(dx_m: np.ndarray, dy_m: np.ndarray) -> np.ndarray:
    """Squared horizontal excursion of the load from the plumb line.

    Parameters
    ----------
    dx_m, dy_m : ndarray
        Horizontal offset of the load from the suspension point [m].

    Returns
    -------
    ndarray
        :math:`dx^2 + dy^2` [m^2]; the excursion is its square root (peaks are
        found on the square, which is smooth).
    """
    return dx_m * dx_m + dy_m * dy_m


def peak_speed_m_s(vx: np.ndarray, vy: np.ndarray, vz=0.0) -> np.ndarray:
    """Largest speed of each row.

    Parameters
    ----------
    vx, vy : ndarray (B, n)
        Velocity components [m/s].
    vz : ndarray (B, n) or float
        Vertical velocity component [m/s] (0 for a horizontal speed).

    Returns
    -------
    ndarray (B,)
        The largest :math:`|v|` over the row's samples [m/s].
    """
    return np.sqrt(np.max(vx * vx + vy * vy + vz * vz, axis=1))


def dynamic_factor(peak_tension_N, static_tension_N):
    """Peak rope tension over the static rope load.

    Parameters
    ----------
    peak_tension_N : float or ndarray
        Largest rope tension of the run [N].
    static_tension_N : float or ndarray
        Rope tension with the load hanging at rest (m g for a point mass) [N].

    Returns
    -------
    float or ndarray
        The dynamic factor [-] (1 for a load that never swings or bounces).
    """
    return peak_tension_N / static_tension_N


def line_pull(hook_load, falls, reeving_efficiency=1.0):
    """The pull in one part of line of a reeving (module Definitions).

    Parameters
    ----------
    hook_load : float or ndarray
        Load on the hook block from the rope, all falls together [any force unit].
    falls : int or ndarray
        Number of falls (parts of line) carrying the hook block [-].
    reeving_efficiency : float or ndarray
        Overall efficiency of the reeving, 1 without sheave friction [-].

    Returns
    -------
    float or ndarray
        :math:`F_\\text{hook} / (n \\eta)` [the unit of ``hook_load``].
    """
    return hook_load / (falls * reeving_efficiency)


def measured_period(t: np.ndarray, off_x: np.ndarray, off_y: np.ndarray, mask: np.ndarray,
                    run_after_move_s: np.ndarray, natural_period_s: np.ndarray) -> MeasuredPeriod:
    """Swing period measured from upward zero crossings after the move.

    Parameters
    ----------
    t : ndarray (B, n)
        Sample times [s].
    off_x, off_y : ndarray (B, n)
        Horizontal components of the rope direction minus its rest direction [-].
    mask : ndarray (B, n) of bool
        Samples after the move (and real, not padding); a suffix of each row.
    run_after_move_s : ndarray (B,)
        Time from the last move's end to the end of the run [s].
    natural_period_s : ndarray (B,)
        Small-amplitude period at the start [s]: the run must go on for more than
        :data:`PERIOD_MIN_RUN_PERIODS` of them.

    Returns
    -------
    MeasuredPeriod
        The swing about the rest direction is projected on its axis of largest
        second moment, :math:`\\theta = \\tfrac12 \\operatorname{atan2}(2 s_{xy}, s_{xx} - s_{yy})`;
        the mean interval between its upward crossings (linear interpolation of each
        crossing) [s], the number of crossings and whether the run was measurable.
    """
    B, M = t.shape
    r = np.arange(B)
    if M < 2:  # a run stopped at its first sample: nothing to measure
        return MeasuredPeriod(np.full(B, np.nan), np.zeros(B, dtype=int), np.zeros(B, dtype=bool))
    count = mask.sum(axis=1)
    # about the rest position, not the record's mean: a damped record's mean lies off the
    # rest and would shift every crossing (the period came out long)
    ox, oy = np.where(mask, off_x, 0.0), np.where(mask, off_y, 0.0)
    # the principal axis of the swing (largest variance), with a definite sign
    theta = 0.5 * np.arctan2(2.0 * row_sum(ox * oy), row_sum(ox * ox) - row_sum(oy * oy))
    x = ox * np.cos(theta)[:, None] + oy * np.sin(theta)[:, None]
    below = np.signbit(x)
    up = below[:, :-1] & ~below[:, 1:] & mask[:, :-1] & mask[:, 1:]
    crossings = up.sum(axis=1)
    first = np.argmax(up, axis=1)
    last = M - 2 - np.argmax(up[:, ::-1], axis=1)

    def crossing_time(i):
        x0, x1 = x[r, i], x[r, i + 1]
        with np.errstate(all="ignore"):
            return t[r, i] - x0 * (t[r, i + 1] - t[r, i]) / (x1 - x0)

    amplitude = np.max(np.maximum(np.abs(ox), np.abs(oy)), axis=1)
    swinging = ((count > PERIOD_MIN_SAMPLES)
                & (run_after_move_s > PERIOD_MIN_RUN_PERIODS * natural_period_s)
                & (amplitude > PERIOD_MIN_AMPLITUDE_RAD))
    ok = swinging & (crossings >= 2)
    period = np.where(ok, (crossing_time(last) - crossing_time(first)) / np.maximum(crossings - 1, 1),
                      np.nan)
    return MeasuredPeriod(period, crossings, swinging)


def settled_at_s(t: np.ndarray, cos_swing: np.ndarray, swing_at, mask: np.ndarray,
                 threshold_rad: np.ndarray, run_end_s: np.ndarray, period_end_s: np.ndarray,
                 move_end_s: np.ndarray) -> np.ndarray:
    """When the swing falls below the settle threshold for good.

    Parameters
    ----------
    t : ndarray (B, n)
        Sample times [s].
    cos_swing : ndarray (B, n)
        Cosine of the swing, :math:`n \\cdot n_{rest}` [-] (the swing exceeds the
        threshold where it is below the threshold's cosine).
    swing_at : callable
        ``swing_at(rows, idx) -> ndarray (B,)``: the swing [rad] at sample ``idx[b]``
        of row ``rows[b]`` (evaluated at two samples per row only).
    mask : ndarray (B, n) of bool
        Samples after the move (and real, not padding).
    threshold_rad : ndarray (B,)
        Settle threshold [rad].
    run_end_s : ndarray (B,)
        End of each run [s].
    period_end_s : ndarray (B,)
        Small-amplitude swing period at the final rope length [s]: the run must go
        on for one of them after the last sample above the threshold.
    move_end_s : ndarray (B,)
        End of the last move [s] (the answer when the swing never exceeds the
        threshold after it).

    Returns
    -------
    ndarray (B,)
        The instant the swing last falls through the threshold (linear
        interpolation between the samples around it) [s]; NaN where that is not
        confirmed or where no sample follows the move.
    """
    B, M = t.shape
    r = np.arange(B)
    above = mask & (cos_swing < np.cos(threshold_rad)[:, None])
    last = M - 1 - np.argmax(above[:, ::-1], axis=1)
    nxt = np.clip(last + 1, 0, M - 1)
    a = swing_at(r, last) - threshold_rad
    b = swing_at(r, nxt) - threshold_rad
    with np.errstate(all="ignore"):
        crossing = np.where(a != b, t[r, last] + (t[r, nxt] - t[r, last]) * a / (a - b), t[r, nxt])
    confirmed = (last + 1 < M) & (run_end_s - t[r, last] >= period_end_s)
    out = np.where(~above.any(axis=1), move_end_s, np.where(confirmed, crossing, np.nan))
    return np.where(mask.any(axis=1), out, np.nan)


def exact_period_s(rope_length_m: float, gravity_m_s2: float, amplitude_rad: float) -> float:
    """Period of the plane pendulum at a finite amplitude.

    Parameters
    ----------
    rope_length_m : float
        Pendulum length [m].
    gravity_m_s2 : float
        Gravitational acceleration [m/s^2].
    amplitude_rad : float
        Swing amplitude theta0 [rad].

    Returns
    -------
    float
        :math:`4\\sqrt{L/g}\\,K(\\sin^2(\\theta_0/2))` [s].

    References
    ----------
    Abramowitz & Stegun 17.3 (``scipy.special.ellipk`` takes the parameter m).
    """
    from scipy.special import ellipk  # lazily: start-up time of every command

    return 4.0 * math.sqrt(rope_length_m / gravity_m_s2) * float(ellipk(math.sin(amplitude_rad / 2.0) ** 2))
