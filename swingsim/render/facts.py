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
    kind: str  # "move_start", "move_end", "peak", "liftoff", "touchdown", "settled", "stopped"


@dataclass(frozen=True)
class Note:
    """A caution of the run shown in the video's notes from ``t_s`` [s] to the end, above the events."""

    t_s: float
    text: str


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
    #: The run's cautions the video repeats in its notes (:class:`Note`), in the summary's order.
    notes: tuple = field(default_factory=tuple)
    #: The crane's in-service wind limit [m/s] when the summary cautions that a gust exceeds it
    #: (the notes then flag every frame whose wind at the load is above it); else None.
    gust_limit_m_s: float | None = None

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
        Move starts and ends, the peak swing, lift-off and touch-down, settling (not for a
        load landed at the end) and an early stop, in time order.
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
    for key, word, kind in (("liftoff_time_s", "Lift-off", "liftoff"), ("touchdown_time_s", "Touch-down", "touchdown")):
        at = _get(summary, key)
        if at is not None:
            events.append(Event(float(at), word, kind))
    landed = _get(summary, "on_ground_at_end") and _get(summary, "touchdown_time_s") is not None
    if settled is not None and math.isfinite(settled) and not landed:
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
    data = getattr(summary, "data", summary)
    notes = resonance_notes(data)
    limit = None
    gust = data.get("peak_gust_m_s")
    if gust is not None and data.get("wind_varies") and gust > data["wind_limit_m_s"]:
        limit = float(data["wind_limit_m_s"])  # the summary's gust caution (metrics.wind.gust_warnings)
        notes.append(Note(float(data["peak_gust_time_s"]), gust_note(gust, limit, data["peak_gust_time_s"])))
    return Facts(notes=tuple(notes), gust_limit_m_s=limit, zone_entries=entries, t_end_s=float(traj.t_end_s), peak_angle_deg=float(peak), peak_time_s=float(peak_t),
                 last_move_end_s=float(last), settled_at_s=settled, status=traj.status,
                 message=traj.message, events=tuple(events))


#: Short names of the crane axes in the video's resonance note.
_AXIS_SHORT = {"x": "x travel", "y": "y travel", "slew": "slew", "radius": "radius"}


def resonance_notes(data: dict) -> list:
    """The video's short form of each resonance caution of the summary.

    One note for every rhythm :func:`swingsim.metrics.cautions.resonance_warnings`
    cautions about (the same rule, so the video warns exactly when the summary does),
    shown from the second repetition (one rhythm after the moves begin) to the end.

    Parameters
    ----------
    data : dict
        The summary's data (``move_rhythms``, ``response_modes``).

    Returns
    -------
    list of Note
        E.g. ``RESONANCE: radius moves every 5.00 s, swing period 4.91 s`` and, as a second
        entry the notes drop first when short of room, ``Each repetition adds swing.``; empty
        when the summary has no resonance caution.
    """
    from swingsim.metrics.cautions import resonance_warnings

    if not resonance_warnings(data):
        return []
    modes = {m["mode"]: m for m in data.get("response_modes", [])}
    out = []
    for r in data.get("move_rhythms", []):
        if not r.get("resonant_modes"):
            continue
        what = "input" if r["source"] == "recorded input" else "moves"
        periods = " / ".join(f"{modes[k]['period_s']:.2f}" for k in r["resonant_modes"])
        start = min(float(r["from_s"]) + float(r["rhythm_s"]), float(r["to_s"]))
        out.append(Note(start, f"RESONANCE: {_AXIS_SHORT.get(r['axis'], r['axis'])} {what} every "
                               f"{r['rhythm_s']:.2f} s, swing period {periods} s\nEach repetition adds swing."))
    return out


def gust_note(speed_m_s: float, limit_m_s: float, t_s: float | None = None) -> str:
    """The video's short form of the gust caution: the wind at the load above the in-service limit.

    Parameters
    ----------
    speed_m_s : float
        Wind speed at the load [m/s].
    limit_m_s : float
        The crane's in-service wind limit [m/s].
    t_s : float, optional
        When the peak gust came [s] (the summary's ``peak_gust_time_s``); None for the
        wind of the frame itself.

    Returns
    -------
    str
        Two entries (one a line), the first the one kept when short of room: e.g. ``GUST
        20.8 m/s at the load, above the 20 m/s limit`` and ``(t = 41.7 s): lifting should
        not go ahead``.
    """
    head = "GUST" if t_s is not None else "WIND"
    when = f"(t = {t_s:.1f} s): " if t_s is not None else ""
    return (f"{head} {speed_m_s:.1f} m/s at the load, above the {limit_m_s:g} m/s limit\n"
            f"{when}lifting should not go ahead")
