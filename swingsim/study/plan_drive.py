"""The planned move as a drive's speed reference: time, position, speed and acceleration at a fixed rate.

Values are rounded to what a drive's table typically accepts (common practice:
1 ms, 1 mm, 1 mm/s and 1 mm/s^2; 0.001 deg, 0.001 deg/s and 0.001 deg/s^2 for a
slew).  The rows run from the move's start at ``1 / rate`` spacing up to the
first sample at or after the move's end; that last row holds the target
position, zero speed and zero acceleration exactly.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from swingsim.metrics import cautions

__all__ = ["DECIMALS", "MAX_RATE_HZ", "SpeedReference", "speed_reference", "speed_reference_csv"]

#: Decimals kept in each column (1 ms, 1 mm or 0.001 deg, and so on; common practice for drive tables).
DECIMALS = 3
#: Highest rate accepted: one row per millisecond, the time column's precision.
MAX_RATE_HZ = 1000.0


class SpeedReference(NamedTuple):
    """A sampled and rounded move, from its start (time 0, position 0)."""

    #: Times from the move's start [s].
    t_s: np.ndarray
    #: Displacement from the move's start [m], or [deg] for slew.
    position: np.ndarray
    #: Speed [m/s], or [deg/s].
    speed: np.ndarray
    #: Acceleration [m/s^2], or [deg/s^2].
    accel: np.ndarray
    #: Column names with units, e.g. ``("t_s", "position_m", "speed_m_s", "accel_m_s2")``.
    header: tuple


def _round(x):
    return np.round(np.asarray(x, dtype=float), DECIMALS) + 0.0  # + 0.0 turns -0.0 into 0.0


def speed_reference(profile, rate_hz: float, distance: float, slew: bool) -> SpeedReference:
    """Sample a move's profile at ``rate_hz`` and round it for a drive.

    Parameters
    ----------
    profile : swingsim.motion.profiles.Profile
        The move (internal units: metres, or radians for slew).
    rate_hz : float
        Rows per second [Hz], at most :data:`MAX_RATE_HZ`.
    distance : float
        The move's travel as the scene gives it [m], or [deg] for slew: the last row's position.
    slew : bool
        True for a slew (columns in degrees).

    Returns
    -------
    SpeedReference
        The rounded columns; the last row is (end time, ``distance``, 0, 0).
    """
    dt = 1.0 / float(rate_hz)
    length = profile.end_s - profile.start_s
    n = max(1, int(math.ceil(length / dt - 1e-9)))
    t = np.arange(n + 1) * dt
    pos, vel, acc = (np.asarray(a, dtype=float) for a in profile.evaluate(profile.start_s + np.minimum(t, length)))
    pos = pos - float(profile.evaluate(np.array([profile.start_s]))[0][0])
    if slew:
        pos, vel, acc = np.degrees(pos), np.degrees(vel), np.degrees(acc)
    done = t >= length - 1e-12
    pos[done], vel[done], acc[done] = distance, 0.0, 0.0
    header = (("t_s", "angle_deg", "speed_deg_s", "accel_deg_s2") if slew
              else ("t_s", "position_m", "speed_m_s", "accel_m_s2"))
    return SpeedReference(_round(t), _round(pos), _round(vel), _round(acc), header)


def speed_reference_csv(ref: SpeedReference, what: str) -> str:
    """The speed reference as CSV: two comment lines (what it is, the caution), the header, the rows.

    Parameters
    ----------
    ref : SpeedReference
        The table.
    what : str
        What it is, for the first comment line (e.g. "move 0 (travel to bay C), 20 Hz").

    Returns
    -------
    str
        The file's text; comment lines start with ``#``.
    """
    fmt = f"{{:.{DECIMALS}f}}"
    lines = [f"# swingsim plan-move speed reference: {what}; rounded to {DECIMALS} decimals "
             "(1 ms, 1 mm or 0.001 deg; a common precision for drive tables)",
             "# " + cautions.CAUTION,
             ",".join(ref.header)]
    for row in zip(ref.t_s.tolist(), ref.position.tolist(), ref.speed.tolist(), ref.accel.tolist()):
        lines.append(",".join(fmt.format(x) for x in row))
    return "\n".join(lines) + "\n"
