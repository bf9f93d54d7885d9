"""The words drawn over each frame: readouts, event labels and the caution.

Pure functions of a frame's time and sampled state, so the text of every frame
can be checked without rendering anything.
"""

from __future__ import annotations

import functools
import math

from dataclasses import dataclass

import numpy as np

try:  # one place for the caution wording once the core has it
    from swingsim.metrics.cautions import CAUTION as _CAUTION, CAUTION_SHORT as _CAUTION_SHORT
except ImportError:  # pragma: no cover - until swingsim.metrics.cautions is on main
    _CAUTION = ("Planning and training preview only. It does not replace the lift plan, the crane "
                "manufacturer's data, local regulations, or the competent person in charge of the lift.")
    _CAUTION_SHORT = "Preview only - the lift plan and the competent person decide."

#: Seconds of video at the start and at the end that carry the full caution banner.
BANNER_S = 3.0
#: Seconds of simulated time an event label stays on screen.
EVENT_HOLD_S = 2.5


def caution_line(max_chars: int = 200) -> str:
    """The small caution shown on every frame.

    Parameters
    ----------
    max_chars : int
        Longest line [characters].

    Returns
    -------
    str
        The short caution, wrapped.
    """
    return _wrap(_CAUTION_SHORT, max_chars)


def caution_banner_text() -> str:
    """The full caution, on one line (the video's caution band wraps it to its width).

    Returns
    -------
    str
        The caution of :mod:`swingsim.metrics.cautions`.
    """
    return _CAUTION


def _banner_text(max_chars: int = 70) -> str:
    """The caution banner of the first and last seconds (wrapped for the screen)."""
    return _wrap(_CAUTION, max_chars)


@functools.lru_cache(maxsize=32)
def _wrap(text: str, width: int) -> str:
    import textwrap

    return "\n".join(textwrap.wrap(text, width))


def _banner_on(video_t_s: float, video_len_s: float) -> bool:
    """Whether the banner shows at video time ``video_t_s`` of a clip ``video_len_s`` long."""
    if video_t_s is None:  # a still
        return False
    hold = min(BANNER_S, 0.25 * video_len_s) if video_len_s > 0 else BANNER_S
    return video_t_s < hold or video_t_s >= video_len_s - hold


@dataclass(frozen=True)
class FrameText:
    """All text of one frame."""

    clock: str
    readout: str
    event: str
    zone: str
    caution: str
    banner: str
    stopped: str = ""
    #: The run's cautions repeated in the notes (resonance, a gust over the limit), one entry a line.
    notes: str = ""

    def strings(self) -> list[str]:
        """All the frame's words, in drawing order.

        Returns
        -------
        list of str
            Clock, readout, event, zone, caution, banner, stopped, notes.
        """
        return [self.clock, self.readout, self.event, self.zone, self.caution, self.banner, self.stopped,
                self.notes]


def clock_text(t_s: float, speed: float) -> str:
    """The clock: simulated time, and slow motion or time-lapse when played so.

    Parameters
    ----------
    t_s : float
        Simulated time [s].
    speed : float
        Playback speed [-].

    Returns
    -------
    str
        E.g. ``"t =   3.00 s   slow motion x0.5"``.
    """
    tag = ""
    if speed < 0.999:
        tag = f"   slow motion x{speed:g}"
    elif speed > 1.001:
        tag = f"   time-lapse x{speed:g}"
    return f"t = {t_s:6.2f} s{tag}"


#: Tag lines given a readout row each; more are shown as one row, the largest pull (the picture's
#: colours say which line): the notes keep room for the cautions at 640x360 with the fullest readout.
TAG_LINE_ROWS = 1


def _contact_rows(contact: dict | None) -> list:
    """Readout rows of the tag lines' pulls [N] and the ground's reaction [t]."""
    from swingsim.constants import newton_to_tonnes_force

    rows = []
    c = contact or {}
    lines = c.get("tag_lines") or ()
    if len(lines) > TAG_LINE_ROWS:
        rows.append(("tag max", f"{max(pull for _name, pull, _limit in lines):6.0f}", "N"))
    else:
        # the panel's label is the line's number (its label would be cut off); the notes name it
        rows += [(f"tag line {j + 1}", f"{pull:6.0f}", "N") if pull > 0.0 else (f"tag line {j + 1}", " slack", "")
                 for j, (_name, pull, _limit) in enumerate(lines)]
    if c.get("ground_N") is not None:
        rows.append(("on ground", f"{newton_to_tonnes_force(c['ground_N']):6.2f}", "t"))
    return rows


def contact_notes(contact: dict | None) -> str:
    """The notes' lines for tag lines pulled beyond what one person can hold, one a line.

    Parameters
    ----------
    contact : dict or None
        As for :func:`frame_text`.

    Returns
    -------
    str
        E.g. ``TAG LINE 1 310 N > 250 N: let go`` (the person must let go, not be pulled); empty
        when every line is within its ``max_pull_N``.
    """
    out = []
    for name, pull, limit in (contact or {}).get("tag_lines") or ():
        if pull > limit:
            out.append(f"{name.upper()} {pull:.0f} N > {limit:.0f} N: let go")
    return "\n".join(out)


def _readout_text(angle_deg: float, speed_m_s: float, hook_load_kN: float, rope_m: float,
                  chart_pct: float | None = None, crane: dict | None = None, contact: dict | None = None) -> str:
    """The numbers panel: one row each of READOUT_CHARS (label 11, value 7, space, unit 3)."""
    from swingsim.constants import newton_to_tonnes_force

    rows = []
    c = crane or {}
    if c.get("radius_m") is not None:
        rows.append(("radius", f"{c['radius_m']:6.1f}", "m"))
    if c.get("slew_deg") is not None:
        rows.append(("slew", f"{c['slew_deg']:+6.1f}", "deg"))
    if c.get("hook_height_m") is not None:
        rows.append((c.get("height_label", "hook height"), f"{c['hook_height_m']:6.1f}", "m"))
    rows += [("rope angle", f"{angle_deg:6.1f}", "deg"), ("load speed", f"{speed_m_s:6.2f}", "m/s"),
             ("hook load", f"{newton_to_tonnes_force(1000.0 * hook_load_kN):6.2f}", "t"),
             ("", f"{hook_load_kN:6.1f}", "kN"), ("rope length", f"{rope_m:6.1f}", "m")]
    if c.get("wind_m_s") is not None:
        # one row: a wind is named by where it comes from (WMO), "wind SW" is a wind from the
        # south-west; a compass point has at most 3 letters, so the label keeps its 11 characters
        rows.append((f"wind {c['wind_from']}" if c.get("wind_from") else "wind", f"{c['wind_m_s']:6.1f}", "m/s"))
    if chart_pct is not None:
        rows.append(("of chart", f"{chart_pct:6.1f}" if math.isfinite(chart_pct) else "   off", "%"))
    rows += _contact_rows(contact)
    return "\n".join(f"{a:<11}{b:>7} {c_:<3}".rstrip() for a, b, c_ in rows)


def readout_rows(crane_kind: str, wind: bool, chart: bool, tag_lines: int = 0, ground: bool = False) -> int:
    """How many rows the numbers panel has for a lift (the layout sizes the panel from it).

    Parameters
    ----------
    crane_kind : str
        ``crane.kind``: a tower or mobile crane also shows radius and slew.
    wind : bool
        Whether the wind rows are shown.
    chart : bool
        Whether the scene has a capacity chart.
    tag_lines : int
        Number of tag lines: a row each, or one row when more than :data:`TAG_LINE_ROWS`.
    ground : bool
        Whether the scene has a ``[ground]`` (a row of its reaction on the load).

    Returns
    -------
    int
        Rows.
    """
    n = 1 + 5  # height; angle, speed, load in t, load in kN, rope length
    n += 2 if crane_kind in SLEWING_KINDS else 0
    n += 1 if wind else 0  # speed and where it comes from in one row
    n += 1 if chart else 0
    n += tag_lines if tag_lines <= TAG_LINE_ROWS else 1
    n += 1 if ground else 0
    return n


#: Crane kinds with a slewing part: their readout has radius and slew angle.
SLEWING_KINDS = ("tower", "mobile")


def wind_at_load_m_s(row: dict, scene) -> float:
    """The wind speed at the load at one instant [m/s].

    The model's own output when it gives one (``wind_speed_m_s``, or the
    ``wind_at_load`` vector of a gusty or sheared wind), else the scene's steady wind.

    Parameters
    ----------
    row : dict
        The run's outputs at one instant.
    scene : Scene
        The scene (its ``[wind]``).

    Returns
    -------
    float
        Wind speed [m/s].
    """
    v = row.get("wind_speed_m_s")
    if v is not None and np.ndim(v) == 0:
        return float(v)
    wxy = row.get("wind_at_load")  # the model's wind at the load (x, y) [m/s]: gusts, turbulence, profile
    if wxy is not None and np.ndim(wxy) == 1:
        return float(np.hypot(float(wxy[0]), float(wxy[1])))
    return float(scene.wind.speed_m_s)


def event_text(t_s: float, events) -> str:
    """Labels of the events of the last EVENT_HOLD_S seconds, newest last (three at most).

    Parameters
    ----------
    t_s : float
        Simulated time [s].
    events : sequence of swingsim.render.facts.Event
        The run's events.

    Returns
    -------
    str
        One label a line.
    """
    on = [e.label for e in events if e.t_s <= t_s + 1e-9 and t_s - e.t_s < EVENT_HOLD_S]
    return "\n".join(on[-3:])


def zone_text(states) -> str:
    """The zone lines of a frame: which parts of the suspended system are in or near which zone.

    Parameters
    ----------
    states : sequence of tuple
        ``(zone name, state, body names)`` of the zones not clear at this instant, the
        state being the summary's verdict (:func:`swingsim.metrics.zones.verdict`).

    Returns
    -------
    str
        One line a zone, e.g. ``Load, rope IN zone: footpath`` or ``Load near zone: hut``;
        empty when every zone is clear.
    """
    lines = []
    for name, state, bodies in states:
        who = ", ".join(bodies).replace("_", " ")
        who = who[:1].upper() + who[1:]
        lines.append(f"{who} {'IN' if state == 'entered' else 'near'} zone: {name}")
    return "\n".join(lines)


def caution_notes(t_s: float, facts, wind_m_s: float | None = None) -> str:
    """The run's cautions the notes repeat at simulated time ``t_s`` (before events and zones).

    The notes of :attr:`swingsim.render.facts.Facts.notes` whose time has come (a
    resonance from its second repetition, the peak gust from its instant), and, before
    the peak gust, a flag whenever the wind at the load is above the in-service limit.

    Parameters
    ----------
    t_s : float
        Simulated time [s].
    facts : swingsim.render.facts.Facts or None
        The run's facts.
    wind_m_s : float, optional
        The wind speed at the load at ``t_s`` [m/s].

    Returns
    -------
    str
        Entries one a line (the most important first); empty when there is nothing to say.
    """
    if facts is None:
        return ""
    from swingsim.render.facts import gust_note

    out = [n.text for n in facts.notes if n.t_s <= t_s + 1e-9]
    limit = facts.gust_limit_m_s
    gust_shown = any(n.text.startswith("GUST") for n in facts.notes if n.t_s <= t_s + 1e-9)
    if limit is not None and wind_m_s is not None and wind_m_s > limit and not gust_shown:
        out.append(gust_note(wind_m_s, limit))
    return "\n".join(out)


def _stopped_text(t_s: float, facts, hold_s: float = 1.5) -> str:
    """Near the end of a run that stopped early: when and why (the results stop there)."""
    if facts is None or facts.status == "ok" or t_s < facts.t_end_s - hold_s:
        return ""
    why = facts.message.split(" at t = ")[0].split(":")[0] if facts.message else facts.status
    return f"RUN STOPPED at t = {facts.t_end_s:.2f} s: {why}.\nNothing after this instant can be shown."


def frame_text(t_s: float, video_t_s: float, video_len_s: float, speed: float, row: dict,
               events, zone_states, line_chars: int = 200, banner_chars: int = 70, facts=None,
               chart_pct: float | None = None, crane: dict | None = None,
               contact: dict | None = None) -> FrameText:
    """All the words of the frame at simulated time ``t_s``.

    Parameters
    ----------
    t_s : float
        Simulated time [s].
    video_t_s : float or None
        Time in the video [s]; None for a still (no banner).
    video_len_s : float
        Length of the video [s].
    speed : float
        Playback speed [-].
    row : dict
        The run's outputs at ``t_s`` (one instant of ``Trajectory.sample``).
    events : sequence of swingsim.render.facts.Event
        The run's events.
    zone_states : sequence of tuple
        ``(zone name, state, body names)`` of the zones not clear at ``t_s`` (see :func:`zone_text`).
    line_chars : int
        Longest caution line [characters].
    banner_chars : int
        Longest banner line [characters].
    facts : swingsim.render.facts.Facts, optional
        The run's facts, for the notice of an early stop.
    chart_pct : float, optional
        The swinging lift's utilisation of the rated capacity chart at this instant [%]
        (``metrics.chart``); shown when the scene has a chart.
    crane : dict, optional
        Numbers of the crane and site at this instant: ``radius_m``, ``slew_deg`` (from the
        start), ``hook_height_m`` with its ``height_label``, ``wind_m_s`` and ``wind_from``
        (a compass point); each shown when present.
    contact : dict, optional
        Forces at points of the load at this instant: ``tag_lines``, a list of
        ``(name, pull [N], max_pull_N [N])`` per tag line, and ``ground_N``, the
        ground's reaction on the load [N] (None without ``[ground]``).

    Returns
    -------
    FrameText
        Clock, readout (radius, slew, hook height, rope angle, load speed, hook load in t and kN,
        rope length, wind, chart utilisation, tag line pulls in N, the load's weight on the
        ground in t), events, zones, caution, banner, stop notice, and the run's cautions for the
        notes (:func:`caution_notes`, then a tag line pulled over its limit: :func:`contact_notes`).
    """
    from swingsim.render.facts import rope_angle_deg

    ang = float(rope_angle_deg(row["rope_dir"]))
    spd = float(np.linalg.norm(row["load_vel"]))
    ten = float(row["rope_tension_N"]) / 1000.0
    return FrameText(
        clock=clock_text(t_s, speed),
        readout=_readout_text(ang, spd, ten, float(row["rope_length"]), chart_pct, crane, contact),
        event=event_text(t_s, events),
        zone=zone_text(zone_states),
        caution=caution_line(line_chars),
        banner=_banner_text(banner_chars) if _banner_on(video_t_s, video_len_s) else "",
        stopped=_stopped_text(t_s, facts),
        notes="\n".join(x for x in (caution_notes(t_s, facts, (crane or {}).get("wind_m_s")),
                                     contact_notes(contact)) if x),
    )
