"""What the renderer needs to know about a run: event times and the quantities shown.

Reads them from the run's :class:`~swingsim.metrics.Summary` when one is given
(``summary.data``), and otherwise measures them from the trajectory itself, so
that rendering works on a bare :class:`~swingsim.solve.Trajectory` too.  Pure
numpy: no drawing here.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np


@dataclass(frozen=True)
class Event:
    """A labelled instant of the lift [s]."""

    t_s: float
    label: str
    kind: str  # "move_start", "move_end", "peak", "settled", "stopped"


@dataclass(frozen=True)
class Facts:
    """Event times of a run [s] and the peak swing [deg]."""

    t_end_s: float
    peak_angle_deg: float
    peak_time_s: float
    last_move_end_s: float
    settled_at_s: float | None
    status: str
    message: str
    events: tuple = field(default_factory=tuple)


def rope_angle_deg(rope_dir) -> np.ndarray:
    """Rope angle from the vertical [deg] of unit rope directions (N, 3) pointing down."""
    n = np.asarray(rope_dir, dtype=float)
    return np.degrees(np.arccos(np.clip(-n[..., 2], -1.0, 1.0)))


def _get(summary, name):
    if summary is None:
        return None
    data = getattr(summary, "data", summary)
    try:
        return data.get(name)
    except AttributeError:
        return None


def _measure(traj):
    """Peak swing and settling measured from the trajectory (used without a Summary)."""
    scene = traj.scene
    rate = max(50.0, scene.sample_hz)
    t = traj.sample_times(rate)
    s = traj.sample(t)
    ang = rope_angle_deg(s["rope_dir"])
    i = int(np.argmax(ang))
    peak, peak_t = float(ang[i]), float(t[i])
    last = float(traj.motion.last_move_end_s)
    settled = None
    # Settled: from some instant after the last move on, the rope stays within
    # limits.settle_deg of its final rest direction (the mean direction over the
    # last second, which includes any steady wind offset).
    tail = t >= t[-1] - 1.0
    rest = s["rope_dir"][tail].mean(axis=0)
    rest /= np.linalg.norm(rest)
    dev = np.degrees(np.arccos(np.clip(s["rope_dir"] @ rest, -1.0, 1.0)))
    after = t >= last
    if traj.status == "ok" and after.any() and t[-1] - last > 1.0:
        bad = np.nonzero(after & (dev > scene.limits.settle_deg))[0]
        if len(bad) == 0:
            settled = last
        elif bad[-1] < len(t) - 1 and t[-1] - t[bad[-1] + 1] >= 1.0:
            settled = float(t[bad[-1] + 1])
    return peak, peak_t, last, settled


def collect(traj, summary=None) -> Facts:
    """Facts of a run, from ``summary`` where it has them, else measured from ``traj``."""
    peak = _get(summary, "peak_rope_angle_deg")
    peak_t = _get(summary, "peak_rope_angle_time_s")
    last = _get(summary, "last_move_end_s")
    settled = _get(summary, "settled_at_s")
    if peak is None or peak_t is None or last is None:
        peak, peak_t, last, settled_m = _measure(traj)
        if _get(summary, "settled_at_s") is None:
            settled = settled_m
    events = []
    scene = traj.scene
    for (axis, prof), move in zip(traj.motion.moves, scene.moves):
        events.append(Event(float(prof.start_s), f"{move.name}: starts", "move_start"))
        events.append(Event(float(prof.end_s), f"{move.name}: ends", "move_end"))
    events.append(Event(float(peak_t), f"Peak swing {float(peak):.1f} deg", "peak"))
    if settled is not None and math.isfinite(settled):
        events.append(Event(float(settled), "Settled: swing below "
                            f"{scene.limits.settle_deg:g} deg", "settled"))
    else:
        settled = None
    if traj.status != "ok":
        events.append(Event(float(traj.t_end_s), f"Run stopped: {traj.status}", "stopped"))
    events.sort(key=lambda e: e.t_s)
    return Facts(t_end_s=float(traj.t_end_s), peak_angle_deg=float(peak), peak_time_s=float(peak_t),
                 last_move_end_s=float(last), settled_at_s=settled, status=traj.status,
                 message=traj.message, events=tuple(events))
