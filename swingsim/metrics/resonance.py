"""Resonance of the lift: its frequency response, the moves' rhythms, and which ones meet.

Definitions
-----------
frequency response
    For every swing mode at the starting configuration (the scene's rope length, hanging
    at rest, support still), the steady swing per unit amplitude of a harmonic
    acceleration of the suspension point, against the forcing period, from the model's
    linearised equations with the scene's damping (:mod:`swingsim.dynamics.response`).
    Directions: travel along x and y; for a slewing crane also the tangential
    direction (slewing) and the radial one (trolley or luffing radius moves) at the
    jib's starting angle.
move rhythm
    Moves of one axis that repeat (two or more moves of the axis: inching, back and
    forth corrections), and every recorded operator input (``table`` profile): the
    axis's speed over the span of those moves, its spectrum (Hann window,
    zero-padded FFT, parabolic peak interpolation; F. J. Harris, Proc. IEEE 66(1),
    1978), the dominant peak's period.  The speed, not the acceleration: each move is
    one pulse of speed, so the speed's spectrum peaks at the rhythm the moves repeat
    with, while the acceleration's (the speed's times the frequency) favours the
    harmonics of the short start and stop pulses.  Its number of cycles is the span over the
    rhythm; a rhythm that does not fit at least :data:`MIN_CYCLES` cycles in the
    span is not a repetition and is not reported.
resonance band (our rule)
    A rhythm is in resonance with a mode when it lies within the mode's half-power
    band of periods widened to at least :data:`RESONANCE_BAND` (+-15 %) of the mode's
    period.  Why wider than the half-power band: at site damping (1-2 % of critical)
    that band is only a few per cent wide, but it describes the steady state after
    many cycles; an operator repeats a move a handful of times, and those pushes keep
    adding to the swing while their phase slips by less than half a swing, which for
    three repetitions is a detuning of about 15 %.  The rope length, and so the real
    period, is rarely known to better than that either.  This is swingsim's rule, not
    a published limit.
excited mode
    A mode counts for a direction when it carries at least :data:`MIN_PARTICIPATION` of
    the effective mass that direction's acceleration drives (modal participation,
    :math:`(\\phi^T F e)^2 / (e^T F^T M^{-1} F e)`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from swingsim.dynamics import response
from swingsim.metrics.modes import mode_name

#: The resonance band's least half-width [fraction of the mode's period]: our rule (module Definitions).
RESONANCE_BAND = 0.15
#: Fewest cycles of a rhythm within its moves' span for it to count as a repetition [-].
MIN_CYCLES = 1.5
#: Least share of the driven effective mass for a mode to count for a direction [-].
MIN_PARTICIPATION = 0.01
#: Shortest rhythm searched [s]: faster than this is jerk, not a rhythm an operator keeps.
SHORTEST_RHYTHM_S = 0.5

#: Column names of the bodies in response.csv: (name stem, unit suffix).
_BODY_COLUMNS = {"hoist rope": ("swing", "deg"), "sling leg": ("sling_leg", "deg"),
                 "load tilt": ("load_tilt", "deg"), "hook block": ("hook_block_offset", "m"),
                 "rope end": ("rope_end_offset", "m"), "load": ("load_offset", "m")}
#: The response's direction of each crane axis.
_AXIS_DIRECTION = {"x": "x", "y": "y", "slew": "tangential", "radius": "radial"}


def column_name(body: str, direction: str) -> str:
    """The response.csv column of a body's response to travel in a direction.

    Parameters
    ----------
    body : str
        A key of ``LinearSwing.angles`` or ``LinearSwing.points``.
    direction : str
        ``"x"``, ``"y"``, ``"tangential"`` or ``"radial"``.

    Returns
    -------
    str
        E.g. ``swing_deg_per_m_s2`` (the hoist rope, travel along x: the public name),
        ``swing_y_deg_per_m_s2``, ``load_tilt_x_deg_per_m_s2``, ``load_offset_radial_m_per_m_s2``.
    """
    stem, unit = _BODY_COLUMNS[body]
    if body == "hoist rope" and direction == "x":
        return f"{stem}_{unit}_per_m_s2"
    return f"{stem}_{direction}_{unit}_per_m_s2"


def response_directions(scene, motion) -> dict:
    """Unit vectors of the suspension point's acceleration the response is given for.

    Parameters
    ----------
    scene : Scene
        The scene (is the crane slewing).
    motion : Motion
        The motion (the jib's angle at t = 0).

    Returns
    -------
    dict
        ``"x"``, ``"y"`` and, for a slewing crane, ``"tangential"`` and ``"radial"``
        -> unit vector (3,) [-].
    """
    out = {"x": np.array([1.0, 0.0, 0.0]), "y": np.array([0.0, 1.0, 0.0])}
    if scene.crane.slewing and motion.initial_radius_m > 0.0:
        jib = float(motion.pose(0.0).jib_angle_rad)
        c, s = math.cos(jib), math.sin(jib)
        out["tangential"] = np.array([-s, c, 0.0])
        out["radial"] = np.array([c, s, 0.0])
    return out


@dataclass(frozen=True)
class LiftResponse:
    """The lift's frequency response (module Definitions).

    Attributes
    ----------
    period_s : ndarray
        Forcing periods, ascending [s].
    columns : dict
        response.csv column name -> values over ``period_s``.
    modes : list of SwingMode
        The swing modes, longest period first.
    labels : list of str
        What each mode is.
    directions : dict
        Direction name -> unit vector (3,).
    linear : LinearSwing
        The linearised swing it comes from.
    """

    period_s: np.ndarray
    columns: dict
    modes: list
    labels: list
    directions: dict
    linear: object

    def at(self, direction: str, periods_s) -> np.ndarray:
        """The hoist rope's swing per unit support acceleration at given periods.

        Parameters
        ----------
        direction : str
            A key of :attr:`directions`.
        periods_s : array_like
            Forcing periods [s].

        Returns
        -------
        ndarray
            Largest rope angle over the cycle [deg per m/s^2].
        """
        cols = response.response_columns(self.linear, np.atleast_1d(periods_s),
                                          {direction: self.directions[direction]})
        return cols[("hoist rope", direction)]

    def participation(self, direction: str) -> np.ndarray:
        """Each mode's share of the effective mass a direction's acceleration drives.

        Parameters
        ----------
        direction : str
            A key of :attr:`directions`.

        Returns
        -------
        ndarray
            Shares (k,) [-], one per mode; a degenerate pair's share is the pair's.
        """
        lin = self.linear
        f = lin.base_influence @ self.directions[direction]
        total = float(f @ np.linalg.solve(lin.mass, f))
        if total <= 0.0:
            return np.zeros(len(self.modes))
        from scipy.linalg import eigh

        w2, shapes = eigh(lin.stiffness, lin.mass)
        shares = []
        for mode in self.modes:
            same = np.abs(w2 - (2 * math.pi / mode.period_s) ** 2) <= 1e-6 * w2.max()
            shares.append(float(np.sum((shapes[:, same].T @ f) ** 2)) / total)
        return np.array(shares)


def lift_response(model, scene, motion) -> LiftResponse:
    """The frequency response of a lift at its starting configuration.

    Parameters
    ----------
    model : SwingModel
        The run's model (its :meth:`linear_swing`).
    scene : Scene
        The scene.
    motion : Motion
        The motion (the starting configuration's directions).

    Returns
    -------
    LiftResponse
        The curves over a log-spaced grid, dense around each mode.
    """
    lin = model.linear_swing()
    modes = response.swing_modes(lin)
    periods = response.period_grid([m.period_s for m in modes], [m.half_power_fraction for m in modes])
    directions = response_directions(scene, motion)
    raw = response.response_columns(lin, periods, directions)
    cols = {"period_s": periods}
    for (body, direction), values in sorted(((k, v) for k, v in raw.items() if k[0] in _BODY_COLUMNS), key=lambda kv: (list(_BODY_COLUMNS).index(kv[0][0]),
                                                                          list(directions).index(kv[0][1]))):
        cols[column_name(body, direction)] = values
    return LiftResponse(periods, cols, modes, [mode_name(model, m.period_s) for m in modes], directions, lin)


def resonance_band_s(mode) -> tuple:
    """The periods a rhythm must fall between to be in resonance with a mode (our rule).

    Parameters
    ----------
    mode : SwingMode
        The mode (its period and half-power periods).

    Returns
    -------
    tuple of float
        ``(shortest, longest)`` [s]: the half-power band, widened to at least
        :data:`RESONANCE_BAND` either side of the period.
    """
    T = mode.period_s
    short, long_ = mode.half_power_periods_s
    lo = min(T * (1.0 - RESONANCE_BAND), short if short is not None else 0.0)
    hi = max(T * (1.0 + RESONANCE_BAND), long_ if long_ is not None else math.inf)
    return lo, hi


def dominant_rhythm_s(t, speed) -> float | None:
    """The period of the dominant peak of a speed record's spectrum.

    Parameters
    ----------
    t : ndarray
        Evenly spaced sample times (N,) [s].
    speed : ndarray
        The axis's speed at those times (N,) [m/s or rad/s].

    Returns
    -------
    float or None
        The period [s] (Hann window, zero-padded FFT, parabolic interpolation of the
        peak); None for a record without motion or too short to hold a rhythm.
    """
    v = np.asarray(speed, float) - float(np.mean(speed))
    if len(t) < 16 or not np.any(np.abs(v) > 0.0):
        return None
    dt = float(t[1] - t[0])
    nfft = 1 << int(math.ceil(math.log2(len(t) * 16)))
    spec = np.abs(np.fft.rfft(v * np.hanning(len(t)), nfft))
    f = np.fft.rfftfreq(nfft, dt)
    span = float(t[-1] - t[0])
    ok = (f >= 1.0 / span) & (f <= 1.0 / SHORTEST_RHYTHM_S)
    if not ok.any():
        return None
    idx = np.flatnonzero(ok)
    i = int(idx[np.argmax(spec[idx])])
    if 0 < i < len(spec) - 1:  # parabolic interpolation of the peak on the log spectrum
        a, b, c = np.log(spec[i - 1:i + 2] + 1e-300)
        den = a - 2 * b + c
        shift = 0.5 * (a - c) / den if den < 0 else 0.0
        fi = f[i] + shift * (f[1] - f[0])
    else:
        fi = f[i]
    return 1.0 / fi if fi > 0 else None


def move_rhythms(scene, motion) -> list:
    """The rhythms of the scene's repeated moves and recorded inputs (module Definitions).

    Parameters
    ----------
    scene : Scene
        The scene (the moves' names and profiles).
    motion : Motion
        The motion (each move's axis and span, the axes' accelerations).

    Returns
    -------
    list of dict
        One per axis with a rhythm: ``axis``, ``direction`` (of the response),
        ``moves`` (their names), ``source`` (``"repeated moves"`` or
        ``"recorded input"``), ``from_s``, ``to_s`` [s], ``rhythm_s`` [s] and
        ``cycles`` [-].
    """
    out = []
    for axis in ("x", "y", "slew", "radius"):
        group = [(m, prof) for m, (ax, prof) in zip(scene.moves, motion.moves) if ax == axis]
        recorded = any(m.profile == "table" for m, _ in group)
        if len(group) < 2 and not recorded:
            continue
        t0 = min(p.start_s for _, p in group)
        t1 = max(p.end_s for _, p in group)
        if t1 - t0 <= 0.0:
            continue
        n = int(min(max(2048, (t1 - t0) / 0.01), 20000))
        t = np.linspace(t0, t1, n)
        rhythm = dominant_rhythm_s(t, motion.axis(axis, t)[1])
        if rhythm is None or (t1 - t0) / rhythm < MIN_CYCLES:
            continue
        out.append({"axis": axis, "direction": _AXIS_DIRECTION[axis], "moves": [m.name for m, _ in group],
                    "source": "recorded input" if recorded else "repeated moves",
                    "from_s": t0, "to_s": t1, "rhythm_s": float(rhythm), "cycles": float((t1 - t0) / rhythm)})
    return out


def resonance_metrics(traj) -> dict:
    """The summary.json keys of the frequency response and the moves' rhythms.

    Parameters
    ----------
    traj : Trajectory
        The run (its model, scene and motion).

    Returns
    -------
    dict
        ``response_modes``: per mode ``mode``, ``label``, ``period_s``,
        ``damping_ratio``, ``peak_amplification`` (None without damping),
        ``half_power_periods_s``, ``half_power_bandwidth_s``, ``half_power_fraction``,
        ``resonance_band_s``; ``resonance_band_fraction``; ``move_rhythms``: the
        entries of :func:`move_rhythms` with ``resonant_modes`` (mode numbers) and
        ``amplification_at_rhythm`` (steady swing at the rhythm over the static swing
        in that direction [-]).
    """
    lr = lift_response(traj.model, traj.scene, traj.motion)
    modes = []
    for k, (m, label) in enumerate(zip(lr.modes, lr.labels), start=1):
        short, long_ = m.half_power_periods_s
        modes.append({
            "mode": k, "label": label, "period_s": m.period_s, "damping_ratio": m.damping_ratio,
            "peak_amplification": m.peak_amplification,
            "half_power_periods_s": [short, long_],
            "half_power_bandwidth_s": (long_ - short) if (short is not None and long_ is not None) else None,
            "half_power_fraction": m.half_power_fraction,
            "resonance_band_s": list(resonance_band_s(m)),
        })
    rhythms = []
    for r in move_rhythms(traj.scene, traj.motion):
        direction = r["direction"]
        if direction not in lr.directions:
            continue
        share = lr.participation(direction)
        resonant = [k for k, m in enumerate(lr.modes, start=1)
                    if share[k - 1] >= MIN_PARTICIPATION
                    and resonance_band_s(m)[0] <= r["rhythm_s"] <= resonance_band_s(m)[1]]
        static = float(lr.at(direction, [1e3 * lr.modes[0].period_s])[0]) if lr.modes else 0.0
        at = float(lr.at(direction, [r["rhythm_s"]])[0])
        rhythms.append(dict(r, resonant_modes=resonant,
                            amplification_at_rhythm=at / static if static > 0.0 else None))
    return {"response_modes": modes, "resonance_band_fraction": RESONANCE_BAND, "move_rhythms": rhythms}
