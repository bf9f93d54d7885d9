"""What the renderer needs to know about a run: event times and the quantities shown.

Reads them from the run's :class:`~swingsim.metrics.Summary` (``summary.data``;
made with :func:`swingsim.metrics.summarize` when none is given), so the video
labels the same peak and settling instants as the report.  No drawing here.
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
    #: Per zone of the scene, the summary's entries: ((start [s], end [s]), ...).
    zone_entries: tuple = field(default_factory=tuple)

    def zone_entered_at(self, index: int, t_s: float) -> bool:
        """Whether the summary counts zone ``index`` as entered at time ``t_s``.

        Parameters
        ----------
        index : int
            The zone's position in the scene's ``zones``.
        t_s : float
            Simulated time [s].

        Returns
        -------
        bool
            True inside one of the summary's entries of that zone.
        """
        if index >= len(self.zone_entries):
            return False
        return any(a - 1e-9 <= t_s <= b + 1e-9 for a, b in self.zone_entries[index])


def rope_angle_deg(rope_dir) -> np.ndarray:
    """Rope angle from the vertical of unit rope directions, by the summary's own definition.

    Parameters
    ----------
    rope_dir : array_like, shape (..., 3)
        Unit vectors along the rope, pointing down from the suspension point.

    Returns
    -------
    numpy.ndarray
        Angles [deg].
    """
    from swingsim.metrics.single import rope_angle_rad  # the summary's own definition, so the overlay agrees with it

    return np.degrees(rope_angle_rad(np.asarray(rope_dir, dtype=float)))


def _get(summary, name):
    if summary is None:
        return None
    data = getattr(summary, "data", summary)
    try:
        return data.get(name)
    except AttributeError:
        return None


def collect(traj, summary=None) -> Facts:
    """The events and peak swing of a run, as its summary measured them.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run.
    summary : swingsim.metrics.Summary or dict, optional
        Its measures (``swingsim.metrics.summarize``); measured here when None.

    Returns
    -------
    Facts
        Move starts and ends, the peak swing, settling and an early stop, in time order.
    """
    if summary is None:
        from swingsim.metrics.single import summarize

        summary = summarize(traj)
    peak = float(_get(summary, "peak_rope_angle_deg"))
    peak_t = float(_get(summary, "peak_rope_angle_time_s"))
    last = _get(summary, "last_move_end_s")
    last = float(traj.motion.last_move_end_s if last is None else last)
    settled = _get(summary, "settled_at_s")
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
    zones = _get(summary, "zones") or []
    entries = tuple(tuple((float(e["start_s"]), float(e["end_s"])) for e in z.get("entries", ()))
                    for z in zones)
    return Facts(zone_entries=entries, t_end_s=float(traj.t_end_s), peak_angle_deg=float(peak), peak_time_s=float(peak_t),
                 last_move_end_s=float(last), settled_at_s=settled, status=traj.status,
                 message=traj.message, events=tuple(events))
