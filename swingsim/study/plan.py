"""The quickest move whose residual swing stays under a bound over a range of rope lengths.

:func:`plan_move` searches a family of candidate profiles for one travel move
of a scene (x, y, radius or slew), all within the move's own speed,
acceleration (and jerk) limits, with the scene's other moves kept as given
(a hoist during the travel included):

* the move's command (trapezoid, or s-curve when it has a jerk limit) at its
  acceleration and at lower ones;
* the same command with each acceleration phase a whole number of swing
  periods (``whole-period``), tuned across the range;
* the command convolved with a ZV, ZVD or EI shaper (several tolerances),
  tuned to periods across the range, and with two shapers in series tuned
  near both ends of the range (widens the band they cover).

A shaper's amplitudes are positive and sum to one, so a shaped move never
exceeds the speed or acceleration of its command.

The rope range is the rope length **at the searched move's start**: when the
scene hoists before it, each run starts with the rope that reaches that length
then.  Every candidate's profile is built once (it does not depend on the rope
length: each candidate names its tuning periods) and its move time is known
before anything is simulated, so the search goes best-first: candidates in
order of move time, a block at a time, all rope lengths of a block integrated
together on the batch engine (:func:`swingsim.batch.engine.run_batch`).  The
first block holding a candidate within the bound at every length ends the
search (every candidate not simulated is slower); the winner is then refined
(a little more acceleration, its tuning 3 % either way).

:func:`write_plan` verifies the winner at four times as many rope lengths
(batch engine at all, the single-run solver at both ends and the worst),
writes the scene snippet, the drive's speed reference
(:mod:`swingsim.study.plan_drive`), the plot
(:mod:`swingsim.report.plots_plan`), ``plan.txt`` and ``plan.json``.  The
words come from :mod:`swingsim.study.plan_words`.  The command line is
:mod:`swingsim.cli.plan`.
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import NamedTuple

import numpy as np

from swingsim import constants
from swingsim.batch import engine as batch
from swingsim.dynamics.registry import select_model
from swingsim.errors import InputError
from swingsim.io.files import atomic_write_bytes, atomic_write_text, staged_outputs
from swingsim.metrics import cautions
from swingsim.motion.registry import build_motion, needs_swing_period
from swingsim.report.plots_plan import PlanCurves, plan_figure_png
from swingsim.scene.edit import with_move
from swingsim.simulation import prepare, simulate
from swingsim.study import plan_reduced, plan_words
from swingsim.study.plan_drive import MAX_RATE_HZ, speed_reference, speed_reference_csv

__all__ = ["Candidate", "MoveKeys", "PlanSearch", "PlanReport", "SEARCH_MARGIN", "LINEAR_SCREEN", "SEARCH_RUN_ON_PERIODS", "linear_residual_deg", "linear_residual_hoisting_deg",
           "VERIFY_RUN_ON_PERIODS", "FULL_MODEL_CANDIDATES", "check_rate", "unshaped_candidate", "plan_move", "candidate_moves", "rope_lengths", "check_request",
           "hoist_before", "swing_without_move", "build_candidate", "evaluate", "verify", "move_keys", "write_plan"]

#: The search keeps this share of the bound in hand, for rope lengths between its samples.
SEARCH_MARGIN = 0.9
#: Swing periods of the longest rope simulated after the last move in the search (the residual
#: swing is the largest swing after the move: reached within half a period of a free swing).
SEARCH_RUN_ON_PERIODS = 1.5
#: The same for the verification and the reported numbers.
VERIFY_RUN_ON_PERIODS = 2.5

_TRAVEL = ("x", "y", "radius", "slew")
_ACCEL_FACTORS = (1.0, 0.7, 0.5, 0.35, 0.25, 0.18, 0.12, 0.08)
_EI_TOLERANCES = (0.05, 0.1, 0.2)
#: Candidates whose linearised residual swing (:func:`linear_residual_deg`) exceeds this many
#: times the bound at some rope length are not simulated: at the small swings concerned the
#: nonlinear residual differs from the linear one by far less, and damping only lowers it.
LINEAR_SCREEN = 2.0
#: For a rigged scene (:mod:`swingsim.study.plan_reduced`): how many of the search model's passing
#: candidates, quickest first, the full model verifies at most before the plan gives up.
FULL_MODEL_CANDIDATES = 12
#: Variants (candidates x rope lengths) integrated together in one block of the best-first search.
_BLOCK_RUNS = 120


class MoveKeys(NamedTuple):
    """The scene keys of a travel move's quantities (``_deg`` ones for slew)."""

    distance: str
    speed: str
    accel: str
    decel: str
    jerk: str
    unit: str


def move_keys(axis: str) -> MoveKeys:
    """The scene keys of a move's quantities on ``axis``.

    Parameters
    ----------
    axis : str
        The move's axis.

    Returns
    -------
    MoveKeys
        Key names and the position unit (``m``, or ``deg`` for slew).
    """
    if axis == "slew":
        return MoveKeys("angle_deg", "speed_deg_s", "accel_deg_s2", "decel_deg_s2", "jerk_deg_s3", "deg")
    return MoveKeys("distance_m", "speed_m_s", "accel_m_s2", "decel_m_s2", "jerk_m_s3", "m")


@dataclass
class Candidate:
    """One profile tried: what it is, its move table (scene keys), and how it did.

    ``kind`` is ``command``, ``whole-period`` or ``shaped``; ``base`` the command
    (``trapezoid`` or ``s-curve``); ``shaper`` and ``tolerance`` the shaper (``zv``,
    ``zvd``, ``ei``); ``periods_s`` the tuning periods [s]; ``accel`` the command's
    acceleration [m/s^2 or deg/s^2].  :func:`build_candidate` fills in the profile,
    ``start_s``, ``end_s``, ``ramp_up_s``, ``ramp_down_s`` [s] and ``run_s`` (simulated
    time [s]); :func:`evaluate` the residual swing and peak rope angle [deg] at each
    rope length (``[inf]`` when the move is not a valid scene); :func:`verify` the number
    of runs it made (``runs``).
    """

    kind: str
    base: str
    move: dict
    accel: float
    shaper: str | None = None
    tolerance: float | None = None
    periods_s: tuple = ()
    profile: object = None
    start_s: float = math.nan
    end_s: float = math.nan
    ramp_up_s: float = math.nan
    ramp_down_s: float = math.nan
    run_s: float = math.nan
    residuals_deg: list = field(default_factory=list)
    peaks_deg: list = field(default_factory=list)
    linear_deg: list | None = None
    peak_accel: float = math.nan
    last_s: float = math.nan
    motion: object = None
    runs: int = 0

    @property
    def duration_s(self) -> float:
        """How long the move takes [s] (NaN until built)."""
        return self.end_s - self.start_s

    @property
    def worst_residual_deg(self) -> float:
        """Largest residual swing over the rope lengths [deg] (inf when not evaluated)."""
        return max(self.residuals_deg) if self.residuals_deg else math.inf

    @property
    def usable(self) -> bool:
        """Whether the candidate was built (a valid move of the scene)."""
        return self.profile is not None


def rope_lengths(low: float, high: float, n: int) -> list[float]:
    """n rope lengths spread evenly over [low, high] (both ends included).

    Parameters
    ----------
    low : float
        Shortest rope length [m].
    high : float
        Longest rope length [m].
    n : int
        Number of lengths.

    Returns
    -------
    list of float
        The lengths [m]; just ``[low]`` when ``low == high``.
    """
    if high == low:
        return [float(low)]
    return [float(x) for x in np.linspace(low, high, n)]


def _motion_of(scene):
    """A scene's motion; its model is built too only when a profile needs the swing period.

    (A model can be costly to build, e.g. turbulent wind synthesised over the whole run.)
    """
    return prepare(scene)[1] if needs_swing_period(scene) else build_motion(scene)


def _period(g, L):
    """Small-angle period of a simple pendulum, 2 pi sqrt(L / g) [s]."""
    return 2.0 * math.pi * math.sqrt(L / g)


def _first_mode_period(scene):
    """Rope length [m] -> the full model's first swing period [s] (the model built once)."""
    model = select_model(scene)
    return lambda L: max(model.mode_periods_s(L))


def _accel_limit(raw, k: MoveKeys) -> float:
    """The move's acceleration limit: one value for both phases, the smaller of accel and decel."""
    a = float(raw[k.accel])
    return min(a, float(raw[k.decel])) if k.decel in raw else a


def _command(scene, index):
    """The move's unshaped command at its limits: (keys to keep, base profile name, acceleration limit)."""
    raw = dict(scene.raw["moves"][index])
    k = move_keys(raw["axis"])
    keep = {key: v for key, v in raw.items()
            if key in ("axis", "label", "start_s", k.distance, k.speed, k.accel, k.jerk)}
    a_max = _accel_limit(raw, k)
    keep[k.accel] = a_max
    base = raw.get("shaper_base") or ("s-curve" if k.jerk in raw else "trapezoid")
    if base == "s-curve" and k.jerk not in raw:
        base = "trapezoid"
    return keep, base, a_max


def _short(x):
    """A float kept to 6 significant digits, so the scene snippet shows exactly the move simulated."""
    return float(f"{x:.6g}") if isinstance(x, float) else x


def unshaped_candidate(scene, index) -> Candidate:
    """The move's command at its own limits with no shaping: what the plan is compared with.

    Parameters
    ----------
    scene : Scene
        The scene.
    index : int
        Index of the move (from 0).

    Returns
    -------
    Candidate
        Not yet built.
    """
    keep, base, a_max = _command(scene, index)
    return Candidate("command", base, dict(keep, profile=base), a_max)


def candidate_moves(scene, index: int, low: float, high: float, n_periods: int = 7) -> list[Candidate]:
    """Candidate move tables for move ``index`` (see the module docstring).

    Parameters
    ----------
    scene : Scene
        The scene; its move ``index`` gives the travel and the limits.
    index : int
        Index of the move to plan (from 0).
    low : float
        Shortest rope length of the range [m] (at the move's start).
    high : float
        Longest rope length of the range [m].
    n_periods : int, optional
        Number of swing periods across the range that the shaped and
        whole-period candidates are tuned to.

    Returns
    -------
    list of Candidate
        Not yet built.

    References
    ----------
    Singer, N. C. and Seering, W. P., "Preshaping command inputs to reduce
    system vibration", J. Dyn. Sys., Meas., Control 112 (1990): ZV and ZVD
    shapers.  Singhose, W., Seering, W. and Singer, N., "Residual vibration
    reduction using vector diagrams to generate shaped inputs", J. Mech. Des.
    116 (1994): the EI shaper.
    """
    keep, base, a_max = _command(scene, index)
    acc_key = move_keys(keep["axis"]).accel
    g = scene.gravity_m_s2
    periods = [float(T) for T in np.linspace(_period(g, low), _period(g, high), n_periods)]
    out = []

    def add(kind, f, shaper=None, tol=None, tuned=(), **keys):
        m = dict(keep, **{key: _short(v) for key, v in keys.items()})
        m[acc_key] = _short(a_max * f)
        if tol is not None:
            m["shaper_tolerance"] = tol
        out.append(Candidate(kind, base, m, m[acc_key], shaper, tol, tuple(_short(T) for T in tuned)))

    for f in _ACCEL_FACTORS:
        add("command", f, profile=base)
    for f in _ACCEL_FACTORS[:4]:
        for T in periods:
            add("whole-period", f, tuned=(T,), profile="whole-period", shaper_period_s=T)
    shapers = [("zv", None), ("zvd", None)] + [("ei", V) for V in _EI_TOLERANCES]
    k = max(1, len(periods) // 4)
    for f in _ACCEL_FACTORS[:5]:
        for name, V in shapers:
            for T in periods:
                add("shaped", f, name, V, (T,), profile=name, shaper_period_s=T)
            # two in series, tuned inside both ends of the range
            for T1, T2 in ((periods[0], periods[-1]), (periods[k], periods[-1 - k])):
                if T2 > T1:
                    add("shaped", f, name, V, (T1, T2), profile=name, shaper_period_s=T1,
                        shaper_second_period_s=T2)
    return out


def hoist_before(scene, index: int) -> float:
    """How much the rope lengthens from the run's start to move ``index``'s start [m] (negative: shortens).

    Parameters
    ----------
    scene : Scene
        The scene, its other moves as given.
    index : int
        The searched move (from 0).

    Returns
    -------
    float
        The rope length at the move's start minus the length at t = 0 [m].
    """
    if not any(m.axis == "hoist" for m in scene.moves):
        return 0.0
    motion = _motion_of(scene)
    start = float(scene.moves[index].start_s)
    return float(motion.evaluate(np.array([start]))["L"][0]) - float(scene.rope.length_m)


def check_request(scene, index, max_residual_deg, low, high) -> None:
    """Refuse a request the planner cannot answer (InputError, one line).

    Parameters
    ----------
    scene : Scene
        The scene.
    index : int
        Index of the move to plan (``--move``).
    max_residual_deg : float
        Largest residual swing allowed [deg] (``--max-residual-deg``).
    low : float
        Shortest rope length at the move's start [m] (``--rope-range``).
    high : float
        Longest rope length at the move's start [m].

    Raises
    ------
    InputError
        When the move does not exist, is a hoist or a recorded table, the bound
        or the range is not positive, or a hoist before the move would need a
        rope shorter than the minimum at the run's start.
    """
    if not 0 <= index < len(scene.moves):
        raise InputError(scene.file, "--move", f"the scene has {len(scene.moves)} moves (indices from 0)", index)
    m = scene.moves[index]
    if m.axis not in _TRAVEL:
        raise InputError(scene.file, f"moves[{index}].axis", "plan-move plans a travel move (x, y, radius "
                         "or slew), not a hoist; the hoist moves are kept as given", m.axis)
    if m.profile == "table":
        raise InputError(scene.file, f"moves[{index}].profile", "plan-move needs a move with distance, speed "
                         "and acceleration limits, not a recorded table", m.profile)
    if not (max_residual_deg > 0 and math.isfinite(max_residual_deg)):
        raise InputError("--max-residual-deg", "value", "expected a positive number of degrees", max_residual_deg)
    if not (0 < low <= high and math.isfinite(high)):
        raise InputError("--rope-range", "value", "expected LOW:HIGH rope lengths in metres with 0 < LOW <= HIGH",
                         f"{low}:{high}")
    delta = hoist_before(scene, index)
    if low - delta < constants.MIN_ROPE_LENGTH_M:
        raise InputError("--rope-range", "value", f"the rope is {low:g} m at the move's start (t = {m.start_s:g} s) "
                         f"only if it starts at {low - delta:.2f} m, since the scene hoists {-delta:.2f} m before "
                         f"then; the rope must be at least {constants.MIN_ROPE_LENGTH_M:g} m", f"{low}:{high}")


def linear_residual_deg(t, accel, lengths, g: float, zeta: float = 0.0) -> list[float]:
    """Residual swing of the linearised pendulum after the crane's motion ends, at each rope length [deg].

    For ``theta'' + 2 zeta omega theta' + omega^2 theta = -a(t) / L`` (small swing, fixed
    rope, ``omega = sqrt(g / L)``) the free swing left when the suspension point's
    acceleration ``a`` ends at ``t_e`` has the amplitude
    ``exp(-zeta omega t_e) |integral a(t) exp((zeta omega - i omega_d) t) dt| / (L omega_d)``
    with ``omega_d = omega sqrt(1 - zeta^2)``; both horizontal components together give
    the largest swing of the ellipse they trace.  The integral is taken by the trapezoid
    rule on the samples given.

    Parameters
    ----------
    t : numpy.ndarray
        Sample times from the run's start to the end of the last move [s], increasing.
    accel : numpy.ndarray
        The suspension point's horizontal acceleration at those times, shape (n, 2) [m/s^2].
    lengths : list of float
        Rope lengths [m].
    g : float
        Gravity [m/s^2].
    zeta : float, optional
        Damping ratio of the swing [-].

    Returns
    -------
    list of float
        The residual swing amplitude at each length [deg].

    References
    ----------
    Singer, N. C. and Seering, W. P. (1990), the residual vibration of a damped
    linear oscillator after a sequence of impulses (their Eqs. 1-3), here in
    integral form for a continuous acceleration.
    """
    L = np.asarray(lengths, dtype=float)
    w = np.sqrt(g / L)
    wd = w * math.sqrt(max(1.0 - zeta * zeta, 1e-12))
    dt = np.diff(t)
    wts = np.zeros_like(t)
    wts[:-1] += dt / 2.0
    wts[1:] += dt / 2.0
    tau = t - t[-1]  # times before the end: exp(zeta omega tau) <= 1, no overflow
    E = np.exp(np.outer(tau, zeta * w - 1j * wd))  # (n, lengths)
    A = E.T @ (accel * wts[:, None])  # (lengths, 2)
    amp = np.sqrt(np.sum(np.abs(A) ** 2, axis=1)) / (L * wd)
    return [float(x) for x in np.degrees(amp)]


def linear_residual_hoisting_deg(cands, lengths, low: float, g: float, zeta: float = 0.0,
                                 steps_per_period: int = 60) -> np.ndarray:
    """Residual swing of the linearised pendulum whose rope length changes (a hoist), for many candidates.

    Integrates ``theta'' + (2 L'/L + 2 zeta omega) theta' + (g/L) theta = -a(t) / L``
    (small swing, ``omega = sqrt(g / L)``; the varying-length pendulum linearised about the
    vertical) for every candidate at every rope length together, with the classical
    4th-order Runge-Kutta method at a fixed step of ``1 / steps_per_period`` of the
    shortest swing period, and takes the swing amplitude
    ``sqrt(theta^2 + (theta' / omega)^2)`` (both horizontal components) when the
    candidate's last move has ended.  With a fixed rope it is the equation that
    :func:`linear_residual_deg` solves in closed form.  Where the acceleration jumps inside
    a step the method loses its order: at 60 steps per period the estimate is within a few
    hundredths of a degree of the closed form on shaped moves, well inside the screen's
    factor of :data:`LINEAR_SCREEN`.

    Parameters
    ----------
    cands : list of Candidate
        Built candidates (``motion`` and ``last_s``, the motion built at the rope length ``low``).
    lengths : list of float
        Rope lengths at the planned move's start [m].
    low : float
        The rope length at the move's start the motions were built with [m].
    g : float
        Gravity [m/s^2].
    zeta : float, optional
        Damping ratio of the swing [-].
    steps_per_period : int, optional
        Steps per shortest swing period [-].

    Returns
    -------
    numpy.ndarray
        Shape (candidates, lengths): the residual swing [deg].
    """
    offsets = np.asarray(lengths, dtype=float) - low
    t_end = max(c.last_s for c in cands)
    probe = np.linspace(0.0, t_end, 401)
    L_min = min(float(np.min(c.motion.evaluate(probe)["L"])) for c in cands) + float(offsets.min())
    h = _period(g, max(L_min, constants.MIN_ROPE_LENGTH_M)) / steps_per_period
    n = int(math.ceil(t_end / h))
    th = np.linspace(0.0, n * h, 2 * n + 1)  # step ends and midpoints
    acc = np.empty((len(cands), th.size, 2))
    L = np.empty((len(cands), th.size))
    dL = np.empty((len(cands), th.size))
    for i, c in enumerate(cands):
        e = c.motion.evaluate(th)
        acc[i], L[i], dL[i] = e["ddp"][:, :2], e["L"], e["dL"]
    last_k = np.array([int(math.ceil(c.last_s / h - 1e-9)) for c in cands])

    def rates(q, w, k2):  # q, w: (C, K, 2); k2: index into the half-step grid
        Lk = L[:, k2][:, None] + offsets[None, :]
        om = np.sqrt(g / Lk)
        damp = 2.0 * dL[:, k2][:, None] / Lk + 2.0 * zeta * om
        return w, -damp[..., None] * w - (om * om)[..., None] * q - acc[:, k2][:, None, :] / Lk[..., None]

    q = np.zeros((len(cands), len(offsets), 2))
    w = np.zeros_like(q)
    out = np.full((len(cands), len(offsets)), np.nan)
    for k in range(n):
        a1, b1 = rates(q, w, 2 * k)
        a2, b2 = rates(q + 0.5 * h * a1, w + 0.5 * h * b1, 2 * k + 1)
        a3, b3 = rates(q + 0.5 * h * a2, w + 0.5 * h * b2, 2 * k + 1)
        a4, b4 = rates(q + h * a3, w + h * b3, 2 * k + 2)
        q = q + h / 6.0 * (a1 + 2 * a2 + 2 * a3 + a4)
        w = w + h / 6.0 * (b1 + 2 * b2 + 2 * b3 + b4)
        done = last_k == k + 1
        if done.any():
            Le = L[done, 2 * k + 2][:, None] + offsets[None, :]
            om = np.sqrt(g / Le)[..., None]
            out[done] = np.sqrt(np.sum(q[done] ** 2 + (w[done] / om) ** 2, axis=-1))
    out[last_k == 0] = 0.0
    return np.degrees(out)


def build_candidate(scene, index, c: Candidate, low: float, high: float, run_on_periods: float,
                    lengths=None, swing_period=None) -> Candidate:
    """Build a candidate's profile once: its times, ramps, the time to simulate and a linear estimate.

    Parameters
    ----------
    scene : Scene
        The scene.
    index : int
        The move the candidate replaces (from 0).
    c : Candidate
        Filled in place (``profile`` stays None when the move is not valid).
    low, high : float
        The rope range at the move's start [m].
    run_on_periods : float
        Swing periods of the longest rope over the run simulated after the last move.
    lengths : list of float, optional
        Rope lengths [m] at which to estimate the residual swing of the linearised
        pendulum (:func:`linear_residual_deg`), for a point-mass scene that does not
        hoist; ``c.linear_deg`` stays None otherwise.
    swing_period : callable, optional
        Rope length [m] -> the swing period the run goes on for [s]; the simple
        pendulum's by default (a rigged scene passes its first mode's).

    Returns
    -------
    Candidate
        ``c``.
    """
    delta = hoist_before(scene, index)
    try:
        sc = with_move(scene, index, c.move, rope_length_m=low - delta, duration_s=scene.duration_s + 1e4,
                       validate_motion=False)
        motion = _motion_of(sc)
    except InputError:
        c.residuals_deg = [math.inf]
        return c
    g = scene.gravity_m_s2
    prof = motion.moves[index][1]
    c.profile, c.start_s, c.end_s = prof, float(prof.start_s), float(prof.end_s)
    tp = np.linspace(c.start_s, c.end_s, 2001)
    _, v, acc = (np.abs(np.asarray(x, dtype=float)) for x in prof.evaluate(tp))
    c.peak_accel = float(np.max(acc)) * (180.0 / math.pi if c.move["axis"] == "slew" else 1.0)
    top = np.flatnonzero(v >= v.max() * (1.0 - 1e-6))
    c.ramp_up_s, c.ramp_down_s = float(tp[top[0]] - c.start_s), float(c.end_s - tp[top[-1]])
    last = max(float(p.end_s) for _, p in motion.moves)
    hoists = any(ax == "hoist" for ax, _ in motion.moves)
    longest = high
    if hoists:
        longest = float(np.max(motion.evaluate(np.linspace(0.0, last, 401))["L"])) + (high - low)
    c.run_s = last + run_on_periods * (swing_period(longest) if swing_period else _period(g, longest))
    c.last_s, c.motion = last, motion
    if lengths is not None and not hoists and batch.supported(sc):
        n = int(max(501, math.ceil(last / (_period(g, min(lengths)) / 100.0)) + 1))
        # samples just either side of every breakpoint: the trapezoid rule then sees each jump of
        # the acceleration exactly, not smeared over a sample interval
        cuts = np.array([b for b in motion.breakpoints if 0.0 < b < last])
        t = np.union1d(np.linspace(0.0, last, n), np.concatenate([cuts - 1e-9, cuts + 1e-9]))
        c.linear_deg = linear_residual_deg(t, motion.evaluate(t)["ddp"][:, :2], lengths, g, scene.damping_ratio)
    return c


def _scenes(scene, index, c, lengths, delta):
    """The candidate at each rope length (validated in full at the shortest, where the hoist matters)."""
    out = []
    for i, L in enumerate(lengths):
        out.append(with_move(scene, index, c.move, rope_length_m=L - delta, duration_s=c.run_s,
                             validate_motion=(i == 0)))
    return out


def evaluate(scene, index, candidates, lengths, progress=None, **kw):
    """Simulate every built candidate at every rope length together (batch engine); fill in the results.

    Parameters
    ----------
    scene : Scene
        The scene.
    index : int
        Index of the move the candidates replace.
    candidates : list of Candidate
        Built (:func:`build_candidate`); filled in place: ``residuals_deg``, ``peaks_deg``.
    lengths : list of float
        Rope lengths at the move's start to simulate at [m].
    progress : tqdm.tqdm, optional
        A progress bar (anything with ``update(n)``), advanced after each chunk of n runs.
    **kw
        Passed on to :func:`swingsim.batch.engine.run_batch`.

    Returns
    -------
    list of Candidate
        ``candidates``, evaluated.
    """
    delta = hoist_before(scene, index)
    step = progress.update if progress is not None else (lambda n: None)
    scenes, owner = [], []
    for ci, c in enumerate(candidates):
        if not c.usable:
            step(len(lengths))
            continue
        try:
            scs = _scenes(scene, index, c, lengths, delta)
        except InputError:
            c.residuals_deg = [math.inf]
            step(len(lengths))
            continue
        scenes.extend(scs)
        owner.extend([ci] * len(scs))
        c.residuals_deg, c.peaks_deg = [], []
    for s_i, s in enumerate(batch.run_batch(scenes, progress=step, **kw)):
        c = candidates[owner[s_i]]
        r = s.get("residual_swing_deg")
        c.residuals_deg.append(math.inf if (r is None or not s.get("valid", True)) else float(r))
        p = s.get("peak_rope_angle_deg")
        c.peaks_deg.append(math.inf if p is None else float(p))
    return candidates


class PlanSearch(NamedTuple):
    """The result of :func:`plan_move`."""

    #: The quickest candidate within the bound at every rope length, or None.
    best: Candidate | None
    #: Every candidate simulated, quickest first.
    candidates: list
    #: The rope lengths (at the move's start) the candidates were simulated at [m].
    rope_lengths_m: list
    #: How many candidates were never simulated (slower than the winner).
    skipped: int
    #: How many the linear estimate left out (:data:`LINEAR_SCREEN`).
    screened_out: int
    #: The candidates within the bound, quickest first.
    passed: list
    #: The smallest worst-case residual swing of the linearised pendulum over the candidates [deg] (inf: none).
    least_linear_deg: float = math.inf
    #: The residual swing without the planned move (:func:`swing_without_move`) at each length [deg],
    #: when it stopped the search (else None).
    without_move_deg: list | None = None


#: A stand-in for the planned move when measuring the swing without it: this many metres
#: (degrees for slew), far too little to swing the load.
_NULL_TRAVEL = 1e-4


def swing_without_move(scene, index: int, cands, lengths, **kw) -> list[float] | None:
    """Residual swing at each rope length with the planned move taken out: what no profile of it removes.

    The move is replaced by a stand-in of :data:`_NULL_TRAVEL` ending when the slowest
    candidate ends, so the residual swing is measured over the window that every
    candidate's own window holds (after the slowest move's end).  What swings the load
    then is the wind and the scene's other moves.

    Parameters
    ----------
    scene, index
        The scene and the planned move (from 0).
    cands : list of Candidate
        Built candidates (the slowest sets the window and the run's length).
    lengths : list of float
        Rope lengths at the move's start [m].
    **kw
        Passed on to :func:`swingsim.batch.engine.run_batch`.

    Returns
    -------
    list of float or None
        The residual swing at each length [deg]; None when the scene has no wind and no
        other move (nothing else swings the load) or no candidate was built.
    """
    usable = [c for c in cands if c.usable]
    if not usable or (len(scene.moves) == 1 and scene.wind.speed_m_s <= 0.0):
        return None
    slowest = max(usable, key=lambda c: c.end_s)
    keep, _, a_max = _command(scene, index)
    k = move_keys(keep["axis"])
    d = math.copysign(_NULL_TRAVEL, float(keep[k.distance]))
    a = a_max * (math.pi / 180.0 if keep["axis"] == "slew" else 1.0)
    ramp = 2.0 * math.sqrt(_NULL_TRAVEL * (math.pi / 180.0 if keep["axis"] == "slew" else 1.0) / a)
    null = {key: v for key, v in keep.items() if key != k.jerk}
    null.update({k.distance: d, "profile": "trapezoid", "start_s": max(0.0, slowest.end_s - ramp)})
    stand_in = Candidate("command", "trapezoid", null, a_max)
    stand_in.run_s = slowest.run_s
    try:
        scenes = _scenes(scene, index, stand_in, lengths, hoist_before(scene, index))
    except InputError:
        return None
    return [math.inf if s.get("residual_swing_deg") is None or not s.get("valid", True) else
            float(s["residual_swing_deg"]) for s in batch.run_batch(scenes, **kw)]


def _quickest_first(cands):
    return sorted(cands, key=lambda c: (c.duration_s if math.isfinite(c.duration_s) else math.inf,
                                        c.worst_residual_deg))


def plan_move(scene, index: int, max_residual_deg: float, low: float, high: float,
              n_lengths: int = 9, progress=None, exhaustive: bool = False, **kw) -> PlanSearch:
    """Best-first search for the quickest move within the bound over the rope range.

    Candidates are simulated in order of move time, a block at a time; the first
    block with a candidate within the bound at every rope length ends it, and the
    winner is refined: accelerations between its own and the next larger one
    tried, and its tuning 3 % shorter and longer.

    Parameters
    ----------
    scene, index, max_residual_deg, low, high
        The request: the scene, the move (index from 0), the residual swing allowed
        at every rope length [deg] and the rope range at the move's start [m], as
        for :func:`check_request`.
    n_lengths : int, optional
        Number of rope lengths simulated over the range.
    progress : tqdm.tqdm, optional
        A progress bar: its ``total`` grows by the runs each search stage may need,
        ``update(n)`` after each chunk of n runs.
    exhaustive : bool, optional
        Simulate every candidate the linear screen keeps, not only up to the first
        block with one within the bound: ``passed`` then ranks them all (the search
        model of a rigged scene, whose winners the full model verifies in turn).
    **kw
        Passed on to :func:`swingsim.batch.engine.run_batch`.

    Returns
    -------
    PlanSearch
        The best candidate (or None), the simulated candidates sorted by move time,
        the lengths, how many were skipped.

    Raises
    ------
    InputError
        For a request the planner cannot answer (see :func:`check_request`).
    """
    check_request(scene, index, max_residual_deg, low, high)
    lengths = rope_lengths(low, high, n_lengths)
    cands = candidate_moves(scene, index, low, high)
    seen = set()
    for c in cands:
        build_candidate(scene, index, c, low, high, SEARCH_RUN_ON_PERIODS, lengths)
        # a whole-period move sets its own acceleration: lower limits can give the same profile
        key = (_same(c)[:5], round(c.end_s, 6), round(c.peak_accel, 9)) if c.usable else None
        if key in seen:
            c.profile = None
        seen.add(key)
    hoisting = [c for c in cands if c.usable and c.linear_deg is None
                and any(ax == "hoist" for ax, _ in c.motion.moves)]
    if hoisting and batch.supported(scene):
        for c, row in zip(hoisting, linear_residual_hoisting_deg(hoisting, lengths, low, scene.gravity_m_s2,
                                                                  scene.damping_ratio)):
            c.linear_deg = [float(x) for x in row]
    # the linear estimate leaves out what is sure to fail: more than LINEAR_SCREEN times the bound
    screened = [c for c in cands if c.usable and (c.linear_deg is None
                                                  or max(c.linear_deg) <= LINEAR_SCREEN * max_residual_deg)]
    todo = _quickest_first(screened)
    linear = [max(c.linear_deg) for c in cands if c.usable and c.linear_deg is not None]
    # the wind and the other moves alone: when they leave more than the screen's factor times the
    # bound after every candidate would end, no profile of this move meets it
    others = swing_without_move(scene, index, cands, lengths, **kw) if todo else None
    if others is not None and max(others) > LINEAR_SCREEN * max_residual_deg:
        return PlanSearch(None, [], lengths, len(todo), sum(1 for c in cands if c.usable) - len(screened), [],
                          min(linear, default=math.inf), others)
    _grow(progress, len(todo) * len(lengths))
    block = max(1, len(todo)) if exhaustive else max(4, _BLOCK_RUNS // len(lengths))
    done: list = []
    passed = []
    while todo and (exhaustive or not passed):
        now, todo = todo[:block], todo[block:]
        evaluate(scene, index, now, lengths, progress, **kw)
        done += now
        passed += [c for c in now if c.worst_residual_deg <= max_residual_deg]
    if passed:
        done += _refine(scene, index, _quickest_first(passed)[0], low, high, lengths, max_residual_deg,
                        done, progress, **kw)
    ok = _quickest_first([c for c in done if c.worst_residual_deg <= max_residual_deg])
    _grow(progress, -len(todo) * len(lengths))  # the slower candidates are not needed
    return PlanSearch(ok[0] if ok else None, _quickest_first(done), lengths, len(todo),
                      sum(1 for c in cands if c.usable) - len(screened), ok, min(linear, default=math.inf))


def _grow(progress, n_runs):
    """Add n_runs to a progress bar's total (the bar may be None)."""
    if progress is not None and n_runs:
        progress.total = (progress.total or 0) + n_runs
        progress.refresh()


def check_rate(rate_hz: float) -> None:
    """Refuse a speed-reference rate outside (0, 1000] Hz (InputError naming ``--rate-hz``).

    Parameters
    ----------
    rate_hz : float
        Rows per second [Hz].

    Raises
    ------
    InputError
        When the rate is not a number above 0 and at most :data:`~swingsim.study.plan_drive.MAX_RATE_HZ`.
    """
    if not (math.isfinite(rate_hz) and 0 < rate_hz <= MAX_RATE_HZ):
        raise InputError("--rate-hz", "value", f"expected a rate in Hz above 0 and at most {MAX_RATE_HZ:g} "
                         "(the table's times are rounded to 1 ms)", rate_hz)


def _same(c) -> tuple:
    """What makes two candidates practically the same (tuning within 0.05 s, acceleration within 0.1 %)."""
    return (c.kind, c.base, c.shaper, c.tolerance, tuple(round(T / 0.05) for T in c.periods_s),
            round(math.log(c.accel) / 1e-3) if c.accel > 0 else 0)


def _refine(scene, index, best, low, high, lengths, bound, done, progress, **kw):
    """Candidates near the winner: a little more acceleration, a slightly different tuning."""
    raw = scene.raw["moves"][index]
    k = move_keys(raw["axis"])
    a_lim = _accel_limit(raw, k)
    a0 = best.accel
    ups = [a_lim * f for f in _ACCEL_FACTORS if a_lim * f > a0 * (1 + 1e-9)]
    a_up = min(ups) if ups else a0
    more = []
    for a in (np.linspace(a0, a_up, 7)[1:] if a_up > a0 else [a0]):
        for scale in ((1.0, 0.97, 1.03) if best.periods_s else (1.0,)):
            if a == a0 and scale == 1.0:
                continue
            m = dict(best.move)
            m[k.accel] = _short(float(a))
            for key in ("shaper_period_s", "shaper_second_period_s"):
                if key in m:
                    m[key] = _short(float(m[key]) * scale)
            more.append(Candidate(best.kind, best.base, m, m[k.accel], best.shaper, best.tolerance,
                                  tuple(_short(T * scale) for T in best.periods_s)))
    for c in more:
        build_candidate(scene, index, c, low, high, SEARCH_RUN_ON_PERIODS, lengths)
    seen = {_same(c) for c in done}
    more = [c for c in more if c.usable and c.duration_s < best.duration_s + 1e-9 and _same(c) not in seen
            and (c.linear_deg is None or max(c.linear_deg) <= LINEAR_SCREEN * bound)]
    _grow(progress, len(more) * len(lengths))
    return evaluate(scene, index, more, lengths, progress, **kw)


def verify(scene, index, c: Candidate, low: float, high: float, lengths, single: bool = True,
           swing_period=None, order=None, stop_over: float | None = None, progress=None,
           use_batch: bool = True) -> list[dict]:
    """Simulate a candidate at each rope length with the scene's own model.

    Where the batch engine integrates the scene it runs every length, and the
    single-run solver (scipy DOP853 at tight tolerance) runs again at both ends and
    the worst; otherwise the single-run solver runs every length.  Runs go on for
    :data:`VERIFY_RUN_ON_PERIODS` swing periods of the longest rope after the last
    move.  A single run is measured from its rope direction alone
    (:func:`swingsim.study.plan_reduced.rope_angles`: the numbers of ``summary.json``).
    Where the single-run solver ran, its numbers are the ones reported.

    Parameters
    ----------
    scene, index
        The scene and the move the candidate replaces (from 0).
    c : Candidate
        The candidate.
    low, high : float
        The rope range at the move's start [m].
    lengths : list of float
        Rope lengths at the move's start to simulate at [m].
    single : bool, optional
        Also run the single-run solver at both ends and the worst length (batch engine only).
    swing_period : callable, optional
        Rope length [m] -> swing period [s] the runs go on for (see :func:`build_candidate`).
    order : list of int, optional
        The order to run the lengths in with the single-run solver (most at risk first).
    stop_over : float, optional
        Stop at the first single run whose residual swing exceeds this [deg] (the batch engine
        is not run then); the lengths not run are reported with ``solver`` ``not run`` and
        ``valid`` False.
    progress : tqdm.tqdm, optional
        Advanced by one after each single run.
    use_batch : bool, optional
        Use the batch engine where it takes the scene (with ``stop_over``, after a single run at
        the first length of ``order`` within it); False: the single-run solver at every length.

    Returns
    -------
    list of dict
        One per length: ``rope_length_m`` [m, at the move's start], ``residual_swing_deg``
        [deg], ``peak_rope_angle_deg`` [deg], ``valid``, ``solver`` (``batch``, ``single``
        or ``not run``) and ``simulated_s`` (the run's length [s]).
    """
    build_candidate(scene, index, c, low, high, VERIFY_RUN_ON_PERIODS, swing_period=swing_period)
    delta = hoist_before(scene, index)
    scenes = _scenes(scene, index, c, lengths, delta)
    c.runs = 0
    res = [{"rope_length_m": L, "residual_swing_deg": None, "peak_rope_angle_deg": math.nan, "valid": False,
            "solver": "not run", "simulated_s": c.run_s} for L in lengths]
    order = list(order) if order is not None else list(range(len(lengths)))

    def run_single(i) -> bool:
        """The single-run solver at length i; whether the search may go on (False: over stop_over)."""
        s = plan_reduced.rope_angles(simulate(scenes[i]))
        c.runs += 1
        res[i].update(s, solver="single")
        if progress is not None:
            progress.update(1)
        r = s["residual_swing_deg"]
        return stop_over is None or (r is not None and s["valid"] and r <= stop_over)

    if use_batch and batch.supported(scenes[0]):
        # with a bound to stop at, the length most at risk first on its own: a failing candidate costs one run
        if stop_over is not None and not run_single(order[0]):
            rerun = []
        else:
            c.runs += len(scenes)
            for i, s in enumerate(batch.run_batch(scenes)):
                if res[i]["solver"] != "single":
                    res[i].update({"residual_swing_deg": s["residual_swing_deg"],
                                   "peak_rope_angle_deg": s["peak_rope_angle_deg"], "valid": s["valid"],
                                   "solver": s["engine"]})
            worst = max(range(len(res)), key=lambda i: -1.0 if res[i]["residual_swing_deg"] is None
                        else res[i]["residual_swing_deg"])
            rerun = sorted({0, len(res) - 1, worst}) if single else []
    else:
        rerun = order
    for i in rerun:
        if res[i]["solver"] != "single" and not run_single(i):
            break
    c.residuals_deg = [math.inf if r["residual_swing_deg"] is None or not r["valid"] else r["residual_swing_deg"]
                       for r in res]
    c.peaks_deg = [r["peak_rope_angle_deg"] for r in res]
    return res


class PlanReport(NamedTuple):
    """What :func:`write_plan` wrote."""

    #: The lines of ``plan.txt`` (the caution first and last).
    lines: list
    #: Whether a verified plan was found (the snippet, the speed reference and the plot written).
    planned: bool
    #: Names of the files written, in the order they are listed.
    files: list
    #: What each file holds, one short line each.
    file_notes: list


def _finite(x):
    """x, or None when it is not a finite number (JSON has no infinity)."""
    return x if isinstance(x, (int, float)) and math.isfinite(x) else None


def _fmt_res(x) -> str:
    return "-" if x is None or not math.isfinite(x) else f"{x:.3f}"


def write_plan(scene, index, max_residual_deg, low, high, out, *, rate_hz: float = 20.0,
               progress=None) -> PlanReport:
    """Plan move ``index``, verify it, and write the plan files into ``out``.

    The search (:func:`plan_move`) keeps :data:`SEARCH_MARGIN` of the bound in
    hand; its winner is verified (:func:`verify`) at four times as many rope
    lengths; should it fail there, the search runs again without it (at most
    five times).  Writes ``move<N>-plan.toml`` (the scene snippet),
    ``move<N>-speed-reference.csv`` and ``move<N>-plan.png`` when a plan is
    found, and always ``plan.txt``, ``plan.json`` and ``candidates.csv``.

    Parameters
    ----------
    scene, index, max_residual_deg, low, high
        The request, as for :func:`plan_move` ([deg], [m]).
    out : Path
        Output folder (checked by the caller).
    rate_hz : float, optional
        Rows per second of the speed reference [Hz].
    progress : tqdm.tqdm, optional
        As for :func:`plan_move`.

    Returns
    -------
    PlanReport
        The lines of ``plan.txt``, whether a plan was found, the files written.

    Raises
    ------
    InputError
        For a rate outside (0, 1000] Hz, or a request :func:`check_request` refuses.
    """
    check_rate(rate_hz)
    out = Path(out)
    raw = scene.raw["moves"][index]
    k = move_keys(raw["axis"])
    slew = raw["axis"] == "slew"
    bound = float(max_residual_deg)
    g = scene.gravity_m_s2
    a_lim = _accel_limit(raw, k)
    with staged_outputs(out) as stage:
        staged = stage.path
        chosen = verified = None
        rejected = []  # (candidate, its verification) the full model refused, rigged scenes

        def within(ver):
            return all(v["valid"] and v["residual_swing_deg"] is not None and v["residual_swing_deg"] <= bound
                       for v in ver)

        if plan_reduced.needs_search_model(scene):
            # search on the reduced model, verify its best in turn with the full model
            model_name = select_model(scene).name
            search_sc = plan_reduced.search_scene(scene)
            swing_period = _first_mode_period(scene)
            search = plan_move(search_sc, index, bound * SEARCH_MARGIN, plan_reduced.equivalent_length(scene, low),
                               plan_reduced.equivalent_length(scene, high), progress=progress, exhaustive=True)
            fine = rope_lengths(low, high, len(search.rope_lengths_m))
            for c in search.passed[:FULL_MODEL_CANDIDATES]:
                trial = replace(c, residuals_deg=[], peaks_deg=[])
                # the lengths most at risk on the search model first: a failing candidate stops early
                order = sorted(range(len(fine)), key=lambda i: -c.residuals_deg[i])
                _grow(progress, len(fine))
                ver = verify(scene, index, trial, low, high, fine, swing_period=swing_period, order=order,
                             stop_over=bound, progress=progress)
                if within(ver):
                    chosen, verified = trial, ver
                    break
                rejected.append((trial, ver))
            unshaped = unshaped_candidate(scene, index)
            _grow(progress, len(fine))
            unshaped_ver = verify(scene, index, unshaped, low, high, fine, single=False, swing_period=swing_period,
                                  progress=progress, use_batch=False)
            search_words = plan_reduced.SEARCH_MODEL_WORDS
            # a tuning period read as the hoist rope length at which the full model swings with it
            eq = [plan_reduced.equivalent_length(scene, x) for x in fine]

            def rope_for(T):  # piecewise linear in the equivalent length, straight on past the ends
                x = plan_words.rope_for_period(T, g)
                if len(fine) == 1 or eq[-1] <= eq[0]:
                    return fine[0] + x - eq[0]
                i = min(max(int(np.searchsorted(eq, x)) - 1, 0), len(eq) - 2)
                return fine[i] + (x - eq[i]) * (fine[i + 1] - fine[i]) / (eq[i + 1] - eq[i])
            verify_words = f"the scene's full model ({model_name})"
        else:
            search = plan_move(scene, index, bound * SEARCH_MARGIN, low, high, progress=progress)
            fine = rope_lengths(low, high, 4 * len(search.rope_lengths_m) - 3)
            for c in search.passed[:5]:
                ver = verify(scene, index, c, low, high, fine)
                if within(ver):
                    chosen, verified = c, ver
                    break
            unshaped = unshaped_candidate(scene, index)
            unshaped_ver = verify(scene, index, unshaped, low, high, fine, single=False)
            search_words = "the scene's own model (point mass), batch engine"
            rope_for = None
            verify_words = "the same model"
        full_runs = unshaped.runs + sum(c.runs for c in [chosen] + [c for c, _ in rejected] if c is not None)

        def words(c):
            return plan_words.describe(c, a_lim, k.unit, g, rope_for)

        head = [cautions.CAUTION, "",
                f"Plan for move {index} ({scene.moves[index].name}) of {scene.name}: residual swing at most "
                f"{bound:g} deg for rope lengths {low:g} to {high:g} m at the move's start "
                f"(t = {float(raw.get('start_s', 0.0)):g} s).", ""]
        others = [m.name for i, m in enumerate(scene.moves) if i != index]
        if others:
            head.append("The scene's other moves are kept as given: " + ", ".join(others) + ".")
        lines = list(head)
        lines.append(f"Search model: {search_words}, at {len(search.rope_lengths_m)} rope lengths. Verifying "
                     f"model: {verify_words}; only a move it verified is written.")
        lines.append(f"Unshaped move ({words(unshaped)}): {unshaped.duration_s:.1f} s, residual swing "
                     f"{min(unshaped.residuals_deg):.3f} to {max(unshaped.residuals_deg):.3f} deg over the range.")
        result = {"scene": scene.name, "move": index, "max_residual_deg": bound, "rope_range_m": [low, high],
                  "search_model": search_words, "verifying_model": verify_words,
                  "search_rope_lengths_m": search.rope_lengths_m,
                  "rejected_by_verification": [{"description": words(c), "duration_s": c.duration_s,
                                                "verified": ver} for c, ver in rejected],
                  "rope_range_at": "the planned move's start", "caution": cautions.CAUTION,
                  "unshaped": {"description": words(unshaped), "duration_s": unshaped.duration_s,
                               "move": unshaped.move, "verified": unshaped_ver}}
        files = []
        if rejected:
            lines += ["", f"Passed the search model but not the full model ({len(rejected)}, quickest first; "
                      "each stops at its first length over the bound):"]
            for c, ver in rejected:
                over = [v for v in ver if v["solver"] != "not run" and not within([v])]
                at = (f"{_fmt_res(over[0]['residual_swing_deg'])} deg at {over[0]['rope_length_m']:.2f} m"
                      if over else "-")
                lines.append(f"  {c.duration_s:6.1f} s  {at}  {words(c)}")
        result["full_model_runs"] = full_runs
        if chosen is None:
            lines += ["", f"No profile in the search meets {bound:g} deg over the whole range within the move's "
                      "limits. Narrow the rope range, allow more residual swing, or plan the move in stages."]
            least = min((c.worst_residual_deg for c in search.candidates), default=math.inf)
            if search.without_move_deg is not None:
                w = search.without_move_deg
                i = int(np.argmax(w))
                ls = fine if len(fine) == len(w) else search.rope_lengths_m
                lines.append(f"Without this move (a {_NULL_TRAVEL:g} {k.unit} stand-in ending when the slowest "
                             f"candidate would end) the load still swings {_fmt_res(w[i])} deg after it at "
                             f"{ls[i]:.2f} m rope: the wind and the scene's other moves, which no profile of this "
                             f"move removes (more than {LINEAR_SCREEN:g} x the search bound). The search "
                             "stopped there.")
                result["swing_without_move_deg"] = [_finite(x) for x in w]
            elif math.isfinite(least):
                lines.append(f"The least worst-case residual swing simulated: {least:.3f} deg.")
            elif math.isfinite(search.least_linear_deg):
                lines.append(f"By the linearised pendulum the least worst-case residual swing of any candidate is "
                             f"{search.least_linear_deg:.2f} deg.")
            if others:
                lines.append("The other moves' own swing counts too: a move that is not shaped can leave more "
                             "than the bound by itself; plan it first (plan-move --move on it).")
            result["plan"] = None
        else:
            sentence = plan_words.summary_sentence(chosen, unshaped.duration_s, a_lim, k.unit, g, rope_for)
            engines = ("single-run solver (*) at each" if all(v["solver"] == "single" for v in verified)
                       else "batch engine at all, single-run solver (*) at both ends and the worst")
            lines += ["", "Planned: " + sentence,
                      f"Verified by simulating it (nonlinear, {select_model(scene).name} model) at {len(verified)} "
                      "rope lengths: "
                      f"{engines}:"]
            for v in verified:
                star = "*" if v["solver"] == "single" else " "
                lines.append(f"  rope {v['rope_length_m']:7.2f} m{star} residual swing "
                             f"{_fmt_res(v['residual_swing_deg'])} deg, peak rope angle "
                             f"{v['peak_rope_angle_deg']:.2f} deg")
            # the scene snippet: the planned move as scene keys (exact; the scene rebuilds the profile)
            snippet = dict(chosen.move)
            toml = [f"# Planned by swingsim plan-move: {words(chosen)}.",
                    f"# Residual swing <= {bound:g} deg for rope lengths {low:g} to {high:g} m at the move's start "
                    "(verified by simulation).",
                    "# " + cautions.CAUTION_SHORT,
                    f"# Replace move {index} of the scene with this move.",
                    "[[moves]]"]
            toml += [f"{key} = {json.dumps(v)}" for key, v in snippet.items()]
            name_toml = f"move{index}-plan.toml"
            atomic_write_text(staged / name_toml, "\n".join(toml) + "\n")
            ref = speed_reference(chosen.profile, rate_hz, float(raw[k.distance]), slew)
            name_csv = f"move{index}-speed-reference.csv"
            atomic_write_text(staged / name_csv, speed_reference_csv(
                ref, f"move {index} ({scene.moves[index].name}), {rate_hz:g} Hz, {len(ref.t_s)} rows"))
            uref = speed_reference(unshaped.profile, rate_hz, float(raw[k.distance]), slew)
            name_png = f"move{index}-plan.png"
            curves = PlanCurves(ref.t_s, ref.position, ref.speed, ref.accel, uref.t_s, uref.position, uref.speed,
                                uref.accel, k.unit, [v["rope_length_m"] for v in verified],
                                [v["residual_swing_deg"] for v in verified],
                                [v["residual_swing_deg"] for v in unshaped_ver], bound)
            atomic_write_bytes(staged / name_png, plan_figure_png(
                curves, f"plan-move: {scene.moves[index].name} ({scene.name})",
                "planned: " + words(chosen)))
            lines += ["", f"Speed reference for the drive: {name_csv} ({len(ref.t_s)} rows at {rate_hz:g} Hz; "
                      f"{', '.join(ref.header)}; the last row at {ref.t_s[-1]:.3f} s holds the target and zero "
                      "speed). Check it against the crane's drive and its own limits before use.",
                      f"Peak speed {np.max(np.abs(ref.speed)):.3f} {k.unit}/s (limit {float(raw[k.speed]):g}), "
                      f"peak acceleration {np.max(np.abs(ref.accel)):.3f} {k.unit}/s^2 (limit {a_lim:g})."]
            files += [(name_toml, f"the planned move as scene keys, to replace move {index}"),
                      (name_csv, f"speed reference for the drive, {rate_hz:g} Hz"),
                      (name_png, "plot: planned vs unshaped profile, residual swing across the rope range")]
            result["plan"] = {"description": words(chosen), "sentence": sentence,
                              "duration_s": chosen.duration_s, "move": chosen.move, "verified": verified,
                              "speed_reference_file": name_csv, "rate_hz": rate_hz, "plot_file": name_png,
                              "snippet_file": name_toml}
        # the candidates simulated, in the same words
        inner = bound * SEARCH_MARGIN
        table = [f"# the search bound is {inner:.3g} deg ({100 * SEARCH_MARGIN:.0f} % of {bound:g} deg, for rope "
                 "lengths between those simulated)",
                 "description,move_time_s,worst_residual_deg,within_search_bound"]
        lines += ["", f"Candidates simulated on the search model ({len(search.candidates)}, quickest first; "
                  f"{search.skipped} slower "
                  f"ones not needed; {search.screened_out} left out because the linearised swing exceeds "
                  f"{LINEAR_SCREEN:g} x the bound), worst residual swing at {len(search.rope_lengths_m)} rope "
                  f"lengths against the search bound {inner:.3g} deg ({100 * SEARCH_MARGIN:.0f} % of {bound:g} deg)"
                  + (":" if search.candidates else ".")]
        if search.candidates:
            lines.append(f"  {'move':>8}  {'worst':>9}  verdict  what it is")
        for i, c in enumerate(search.candidates):
            ok = c.worst_residual_deg <= inner
            table.append(f"\"{words(c)}\",{c.duration_s:.2f},{_fmt_res(c.worst_residual_deg)},{'yes' if ok else 'no'}")
            if i < 12:
                lines.append(f"  {c.duration_s:6.1f} s  {_fmt_res(c.worst_residual_deg):>5} deg  "
                             f"{'within ' if ok else 'over   '}  {words(c)}")
        if len(search.candidates) > 12:
            lines.append(f"  ... all {len(search.candidates)} in candidates.csv")
        atomic_write_text(staged / "candidates.csv", "# " + cautions.CAUTION + "\n" + "\n".join(table) + "\n")
        result["candidates"] = [{"description": words(c), "move_time_s": c.duration_s,
                                 "worst_residual_deg": _finite(c.worst_residual_deg)} for c in search.candidates]
        files += [("plan.txt", "the plan in words, its verification, the caution"),
                  ("plan.json", "the same, for programs"),
                  ("candidates.csv", "every candidate simulated, in the same words")]
        lines += ["", cautions.CAUTION]
        atomic_write_text(staged / "plan.txt", "\n".join(lines) + "\n")
        atomic_write_text(staged / "plan.json", json.dumps(result, indent=2, default=float) + "\n")
    return PlanReport(lines, chosen is not None, [f for f, _ in files], [w for _, w in files])
