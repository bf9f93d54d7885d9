"""Plan-move's candidates described in plain words, as a lift planner or drive engineer reads them.

A candidate is described by what the crane does ("speed-up and slow-down each
ZV-shaped, tuned to a 9.4 s swing period ..."), never by the search's internal
labels.  The same words head ``plan.txt`` and fill its candidates table.
"""

from __future__ import annotations

import math

__all__ = ["SHAPER_WORDS", "rope_for_period", "describe", "summary_sentence"]

#: How each shaper is named to a reader (the published names, with their abbreviations).
SHAPER_WORDS = {
    "zv": "ZV (zero-vibration)",
    "zvd": "ZVD (zero-vibration-and-derivative)",
    "ei": "EI (extra-insensitive)",
}


def rope_for_period(period_s: float, g: float) -> float:
    """Rope length whose small-angle simple-pendulum period is ``period_s``: L = g (T / 2 pi)^2 [m].

    Parameters
    ----------
    period_s : float
        Swing period [s].
    g : float
        Gravity [m/s^2].

    Returns
    -------
    float
        The rope length [m].
    """
    return g * (period_s / (2.0 * math.pi)) ** 2


def _a(number_text: str) -> str:
    """The article before a number as read aloud: "an 8.0 m", "an 11.0 s", "a 9.4 s"."""
    whole = number_text.split(".")[0]
    return "an" if whole.startswith("8") or whole in ("11", "18") or (len(whole) in (5, 6) and whole[:2] in ("11", "18")) else "a"


def _ramps(c) -> str:
    """"each 8.1 s long" or "8.1 s to speed up, 7.9 s to slow down"."""
    up, down = c.ramp_up_s, c.ramp_down_s
    if abs(up - down) < 0.05:
        return f"each {up:.1f} s long"
    return f"{up:.1f} s to speed up and {down:.1f} s to slow down"


def describe(c, accel_limit: float, unit: str, g: float, rope_for=None) -> str:
    """One candidate in plain words (without its move time, which the tables give apart).

    Parameters
    ----------
    c : swingsim.study.plan.Candidate
        A built candidate (``kind``, ``shaper``, ``tolerance``, ``periods_s``,
        ``peak_accel``, ``ramp_up_s`` and ``ramp_down_s`` filled in).
    accel_limit : float
        The move's acceleration limit [m/s^2], or [deg/s^2] for slew.
    unit : str
        ``"m"``, or ``"deg"`` for slew.
    g : float
        Gravity [m/s^2], for the rope length a period stands for.
    rope_for : callable, optional
        Swing period [s] -> the hoist rope length [m] at which the scene swings
        with that period; the simple pendulum's (:func:`rope_for_period`) by default.
        A rigged scene passes its first swing mode's.

    Returns
    -------
    str
        E.g. ``"speed-up and slow-down each ZV (zero-vibration)-shaped, tuned to a
        9.4 s swing period (the swing of a 22.0 m rope), each 8.1 s long; peak
        acceleration 0.28 m/s^2 (80 % of the limit)"``.
    """
    peak = c.peak_accel if math.isfinite(c.peak_accel) else c.accel
    share = peak / accel_limit if accel_limit > 0 else 1.0
    acc = f"peak acceleration {peak:.3g} {unit}/s^2 (" + (
        "the full limit)" if share > 0.9995 else f"{100.0 * share:.0f} % of the limit)")
    if c.kind == "command":
        return f"plain {c.base} speed ramps, {_ramps(c)}; {acc}"
    periods = c.periods_s
    rope_for = rope_for or (lambda T: rope_for_period(T, g))
    ropes = " and ".join(f"{rope_for(T):.1f} m" for T in periods)
    if c.kind == "whole-period":
        T = periods[0]
        n = max(1, round(c.ramp_up_s / T)) if c.base == "trapezoid" else None
        whole = f"{n} x {T:.1f} s" if n else f"whole multiples of {T:.1f} s"
        return (f"{c.base} speed ramps each lasting a whole number of swing periods ({whole}, "
                f"the swing of {_a(ropes)} {ropes} rope), {_ramps(c)}; {acc}")
    name = SHAPER_WORDS[c.shaper]
    if c.shaper == "ei":
        name = f"EI (extra-insensitive, {100.0 * c.tolerance:.0f} % swing tolerance)"
    if len(periods) == 1:
        period = f"{periods[0]:.1f}"
        tuned = f"tuned to {_a(period)} {period} s swing period (the swing of {_a(ropes)} {ropes} rope)"
        shaped = f"{name}-shaped"
    else:
        tuned = (f"tuned to {periods[0]:.1f} s and {periods[1]:.1f} s swing periods "
                 f"(the swing of {ropes} ropes)")
        shaped = f"shaped by two {name} shapers in series"
    return f"speed-up and slow-down each {shaped}, {tuned}, {_ramps(c)}; {acc}"


def summary_sentence(c, unshaped_s: float, accel_limit: float, unit: str, g: float, rope_for=None) -> str:
    """The winner in one sentence, with its move time against the unshaped move's.

    Parameters
    ----------
    c : swingsim.study.plan.Candidate
        The chosen candidate (built).
    unshaped_s : float
        How long the unshaped move takes [s].
    accel_limit, unit, g, rope_for
        As for :func:`describe` ([m/s^2 or deg/s^2], -, [m/s^2], [s] -> [m]).

    Returns
    -------
    str
        The description, then "the move takes 31.2 s, 2.1 s more than the unshaped move (29.1 s)".
    """
    d = c.duration_s - unshaped_s
    more = (f"{d:.1f} s more than" if d >= 0.05 else f"{-d:.1f} s less than" if d <= -0.05
            else "as long as")
    return (f"{describe(c, accel_limit, unit, g, rope_for)}. The move takes {c.duration_s:.1f} s, "
            f"{more} the unshaped move ({unshaped_s:.1f} s).")
