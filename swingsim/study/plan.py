"""The fastest move whose residual swing stays under a bound over a range of rope lengths.

:func:`plan_move` searches a family of candidate profiles for one move of a
scene, all within the move's own speed, acceleration (and jerk) limits:

* the move's command (trapezoid, or s-curve when it has a jerk limit) at its
  acceleration and at lower ones;
* the same command with each acceleration phase a whole number of swing
  periods (``whole-period``), tuned across the range;
* the command convolved with a ZV, ZVD or EI shaper (several tolerances),
  tuned to periods across the range, and with two shapers in series tuned
  near both ends of the range (widens the band they cover).

A shaper's amplitudes are positive and sum to one, so a shaped move never
exceeds the speed or acceleration of its command.  Every candidate is
simulated with the full nonlinear model (batch engine) at rope lengths spread
over the range; of those whose residual swing stays under the bound at every
length, the one that ends first wins.

:func:`write_plan` then writes the winner as a ``table`` profile, verifies
that table by simulating it (batch engine at every length, the single-run
solver at the ends and the worst), and writes the comparison with the scene's
own move.  The command line is :mod:`swingsim.cli.plan`.
"""

from __future__ import annotations

import json
import math
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import NamedTuple

import numpy as np

from swingsim.batch import engine as batch
from swingsim.errors import InputError
from swingsim.io.files import atomic_write_text, staged_outputs
from swingsim.metrics import cautions
from swingsim.metrics.single import summarize
from swingsim.motion.profiles import from_table
from swingsim.scene.edit import with_move
from swingsim.simulation import prepare, simulate

__all__ = ["Candidate", "PlanSearch", "PlanReport", "TableLimits", "SEARCH_MARGIN", "plan_move",
           "candidate_moves", "rope_lengths", "check_request", "evaluate", "sample_profile",
           "verify_table", "table_limits", "write_plan"]

#: The search keeps this share of the bound in hand, for rope lengths between its samples.
SEARCH_MARGIN = 0.9

_TRAVEL = ("x", "y", "radius", "slew")
_ACCEL_FACTORS = (1.0, 0.7, 0.5, 0.35, 0.25, 0.18, 0.12, 0.08)
_EI_TOLERANCES = (0.05, 0.1, 0.2)


@dataclass
class Candidate:
    """One profile tried: its move table (scene keys), and how it did.

    ``end_s`` is when the move ends [s] (NaN until evaluated), ``residuals_deg``
    and ``peaks_deg`` the residual swing and peak rope angle [deg] at each rope
    length tried (``[inf]`` when the move is not a valid scene).
    """

    label: str
    move: dict
    end_s: float = math.nan
    residuals_deg: list = field(default_factory=list)
    peaks_deg: list = field(default_factory=list)

    @property
    def worst_residual_deg(self) -> float:
        """Largest residual swing over the rope lengths [deg] (inf when not evaluated)."""
        return max(self.residuals_deg) if self.residuals_deg else math.inf


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


def _period(g, L):
    """Small-angle period of a simple pendulum, 2 pi sqrt(L / g) [s]."""
    return 2.0 * math.pi * math.sqrt(L / g)


def candidate_moves(scene, index: int, low: float, high: float, n_periods: int = 7) -> list[Candidate]:
    """Candidate move tables for move ``index`` (see the module docstring).

    Parameters
    ----------
    scene : Scene
        The scene; its move ``index`` gives the travel and the limits.
    index : int
        Index of the move to plan (from 0).
    low : float
        Shortest rope length of the range [m].
    high : float
        Longest rope length of the range [m].
    n_periods : int, optional
        Number of swing periods across the range that the shaped and
        whole-period candidates are tuned to.

    Returns
    -------
    list of Candidate
        Not yet evaluated.

    References
    ----------
    Singer, N. C. and Seering, W. P., "Preshaping command inputs to reduce
    system vibration", J. Dyn. Sys., Meas., Control 112 (1990): ZV and ZVD
    shapers.  Singhose, W., Seering, W. and Singer, N., "Residual vibration
    reduction using vector diagrams to generate shaped inputs", J. Mech. Des.
    116 (1994): the EI shaper.
    """
    raw = dict(scene.raw["moves"][index])
    slew = raw["axis"] == "slew"
    acc_key = "accel_deg_s2" if slew else "accel_m_s2"
    dec_key = "decel_deg_s2" if slew else "decel_m_s2"
    jerk_key = "jerk_deg_s3" if slew else "jerk_m_s3"
    keep = {k: v for k, v in raw.items()
            if k in ("axis", "label", "start_s", "distance_m", "angle_deg", "speed_m_s", "speed_deg_s",
                     acc_key, jerk_key)}
    a_max = float(raw[acc_key])
    if dec_key in raw:  # one acceleration for both phases: the smaller limit
        a_max = min(a_max, float(raw[dec_key]))
    keep[acc_key] = a_max
    base = "s-curve" if jerk_key in raw else "trapezoid"
    g = scene.gravity_m_s2
    periods = [float(T) for T in np.linspace(_period(g, low), _period(g, high), n_periods)]
    out = []
    for f in _ACCEL_FACTORS:
        m = dict(keep, profile=base)
        m[acc_key] = a_max * f
        out.append(Candidate(f"{base}, acceleration x {f:g}", m))
    for f in _ACCEL_FACTORS[:4]:
        for T in periods:
            m = dict(keep, profile="whole-period", shaper_period_s=T)
            m[acc_key] = a_max * f
            out.append(Candidate(f"whole-period at {T:.2f} s, acceleration x {f:g}", m))
    shapers = [("zv", None), ("zvd", None)] + [("ei", V) for V in _EI_TOLERANCES]
    for f in _ACCEL_FACTORS[:5]:
        for name, V in shapers:
            for T in periods:
                m = dict(keep, profile=name, shaper_period_s=T)
                m[acc_key] = a_max * f
                if V is not None:
                    m["shaper_tolerance"] = V
                lab = f"{name}{'' if V is None else f' (V = {V:g})'} at {T:.2f} s, acceleration x {f:g}"
                out.append(Candidate(lab, m))
            # two in series, tuned inside both ends of the range
            k = max(1, len(periods) // 4)
            for T1, T2 in ((periods[0], periods[-1]), (periods[k], periods[-1 - k])):
                if T2 <= T1:
                    continue
                m = dict(keep, profile=name, shaper_period_s=T1, shaper_second_period_s=T2)
                m[acc_key] = a_max * f
                if V is not None:
                    m["shaper_tolerance"] = V
                lab = (f"{name}{'' if V is None else f' (V = {V:g})'} x2 at {T1:.2f} s and {T2:.2f} s, "
                       f"acceleration x {f:g}")
                out.append(Candidate(lab, m))
    return out


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
        Shortest rope length [m] (``--rope-range``).
    high : float
        Longest rope length [m].

    Raises
    ------
    InputError
        When the move does not exist, is a hoist or a recorded table, the bound
        or the range is not positive, or the scene also hoists.
    """
    if not 0 <= index < len(scene.moves):
        raise InputError(scene.file, "--move", f"the scene has {len(scene.moves)} moves (indices from 0)", index)
    m = scene.moves[index]
    if m.axis not in _TRAVEL:
        raise InputError(scene.file, f"moves[{index}].axis", "plan-move plans a travel move (x, y, radius "
                         "or slew), not a hoist", m.axis)
    if m.profile == "table":
        raise InputError(scene.file, f"moves[{index}].profile", "plan-move needs a move with distance, speed "
                         "and acceleration limits, not a recorded table", m.profile)
    if not (max_residual_deg > 0 and math.isfinite(max_residual_deg)):
        raise InputError("--max-residual-deg", "value", "expected a positive number of degrees", max_residual_deg)
    if not (0 < low <= high and math.isfinite(high)):
        raise InputError("--rope-range", "value", "expected LOW:HIGH rope lengths in metres with 0 < LOW <= HIGH",
                         f"{low}:{high}")
    if any(mm.axis == "hoist" for mm in scene.moves):
        raise InputError(scene.file, "moves", "plan-move plans with a fixed rope length over the range; "
                         "the scene also hoists, which changes the length during the run")


def evaluate(scene, index, candidates, lengths, **kw):
    """Simulate every candidate at every rope length (batch engine); fill in the results.

    Each run goes on after the scene's duration for four and a half swing
    periods of the longest rope, so that the residual swing is measured.

    Parameters
    ----------
    scene : Scene
        The scene.
    index : int
        Index of the move the candidates replace.
    candidates : list of Candidate
        Filled in place: ``end_s``, ``residuals_deg``, ``peaks_deg``.
    lengths : list of float
        Rope lengths to simulate at [m].
    **kw
        Passed on to :func:`swingsim.batch.engine.run_batch`.

    Returns
    -------
    list of Candidate
        ``candidates``, evaluated.
    """
    g = scene.gravity_m_s2
    run_on_s = 2.5 * _period(g, max(lengths)) + 2.0 * _period(g, max(lengths))
    scenes, owner = [], []
    for ci, c in enumerate(candidates):
        for L in lengths:
            try:
                scenes.append(with_move(scene, index, c.move, rope_length_m=L,
                                        duration_s=scene.duration_s + run_on_s))
            except InputError:
                c.residuals_deg = [math.inf]
                break
            owner.append(ci)
    sums = batch.run_batch(scenes, **kw)
    for c in candidates:
        if c.residuals_deg != [math.inf]:
            c.residuals_deg, c.peaks_deg = [], []
    for ci, sc, s in zip(owner, scenes, sums):
        c = candidates[ci]
        if c.residuals_deg == [math.inf]:
            continue
        r = s.get("residual_swing_deg")
        c.residuals_deg.append(math.inf if (r is None or not s.get("valid", True)) else r)
        c.peaks_deg.append(s.get("peak_rope_angle_deg") or math.inf)
        c.end_s = _move_end(sc, index)
    return candidates


def _move_end(scene, index):
    """When move ``index`` of a scene ends [s]."""
    _, motion = prepare(scene)
    return float(motion.moves[index][1].end_s)


class PlanSearch(NamedTuple):
    """The result of :func:`plan_move`."""

    #: The quickest candidate within the bound at every rope length, or None.
    best: Candidate | None
    #: Every candidate tried, quickest first.
    candidates: list
    #: The rope lengths the candidates were simulated at [m].
    rope_lengths_m: list


def plan_move(scene, index: int, max_residual_deg: float, low: float, high: float,
              n_lengths: int = 9, **kw) -> PlanSearch:
    """Search the candidates for the quickest move within the bound over the rope range.

    After the first search the winner is refined: accelerations between its own
    and the next larger one tried, and its tuning 3 % shorter and longer.

    Parameters
    ----------
    scene, index, max_residual_deg, low, high
        The request: the scene, the move (index from 0), the residual swing allowed
        at every rope length [deg] and the rope range [m], as for :func:`check_request`.
    n_lengths : int, optional
        Number of rope lengths simulated over the range.
    **kw
        Passed on to :func:`swingsim.batch.engine.run_batch`.

    Returns
    -------
    PlanSearch
        The best candidate (or None), all candidates sorted by end time, the lengths.

    Raises
    ------
    InputError
        For a request the planner cannot answer (see :func:`check_request`).
    """
    check_request(scene, index, max_residual_deg, low, high)
    lengths = rope_lengths(low, high, n_lengths)
    cands = evaluate(scene, index, candidate_moves(scene, index, low, high), lengths, **kw)

    def order(cs):
        return sorted(cs, key=lambda c: (c.end_s if math.isfinite(c.end_s) else math.inf,
                                         c.worst_residual_deg))

    ok = order([c for c in cands if c.worst_residual_deg <= max_residual_deg])
    if ok:
        # refine around the winner: a little more acceleration, a slightly different tuning
        best = ok[0]
        raw = scene.raw["moves"][index]
        acc_key = "accel_deg_s2" if raw["axis"] == "slew" else "accel_m_s2"
        a_lim = float(raw[acc_key])
        dec_key = "decel_deg_s2" if raw["axis"] == "slew" else "decel_m_s2"
        if dec_key in raw:
            a_lim = min(a_lim, float(raw[dec_key]))
        a0 = float(best.move[acc_key])
        # between the winner's acceleration and the next larger one tried (which failed or was slower)
        ups = [a_lim * f for f in _ACCEL_FACTORS if a_lim * f > a0 * (1 + 1e-9)]
        a_up = min(ups) if ups else a0
        more = []
        for a in (np.linspace(a0, a_up, 7)[1:] if a_up > a0 else [a0]):
            for sc_T in (1.0, 0.97, 1.03):
                m = dict(best.move)
                m[acc_key] = float(a)
                for k in ("shaper_period_s", "shaper_second_period_s"):
                    if k in m:
                        m[k] = float(m[k]) * sc_T
                if sc_T != 1.0 and "shaper_period_s" not in m:
                    continue
                more.append(Candidate(f"{best.label.split(', acceleration')[0]} (tuning x {sc_T:g}), "
                                      f"acceleration {a / a_lim:.3f} of the limit", m))
        if more:
            more = evaluate(scene, index, more, lengths, **kw)
            cands = cands + more
            ok = order([c for c in cands if c.worst_residual_deg <= max_residual_deg])
    return PlanSearch(ok[0] if ok else None, order(cands), lengths)


def sample_profile(scene, index, move, dt_max=0.02):
    """Times from the move's start [s] and displacements [m or deg] of a candidate, for a table.

    Samples every ``dt_max`` seconds at most, plus every breakpoint, so the
    table's spline follows the profile closely.

    Parameters
    ----------
    scene, index : Scene, int
        The scene, and the move the candidate replaces (index from 0).
    move : dict
        The candidate's move table (scene keys).
    dt_max : float, optional
        Largest time between samples [s].

    Returns
    -------
    tuple of numpy.ndarray
        Times from the move's start [s] (from 0) and the displacement from the
        move's start at each [m], or [deg] for slew.
    """
    sc = with_move(scene, index, move, duration_s=scene.duration_s + 1e4, validate_motion=False)
    _, motion = prepare(sc)
    prof = motion.moves[index][1]
    t0, t1 = prof.start_s, prof.end_s
    n = int(math.ceil((t1 - t0) / dt_max))
    t = np.union1d(np.linspace(t0, t1, n + 1), [b for b in prof.breakpoints if t0 <= b <= t1])
    t = t[np.concatenate([[True], np.diff(t) > 1e-6])]
    t[-1] = t1
    pos = prof.evaluate(t)[0]
    if move["axis"] == "slew":
        pos = np.degrees(pos)
    return t - t0, pos


def verify_table(scene, index, table_name, out_dir, lengths, table_move):
    """Simulate the scene with a written table in place of move ``index``, at each rope length.

    Every length with the batch engine; the two ends and the worst length
    once more with the single-run solver (scipy DOP853 at tight tolerance),
    whose result is then the one reported for that length.  Each run goes on
    for two and a half swing periods of the longest rope after the scene's
    duration.

    Parameters
    ----------
    scene, index : Scene, int
        As for :func:`sample_profile`, with the table in place of the candidate.
    table_name : str
        The table's CSV file, relative to ``out_dir``.
    out_dir : Path
        Folder the table was written to.
    lengths : list of float
        Rope lengths to simulate at [m].
    table_move : dict
        The move's keys other than ``table_file`` (label, axis, start_s, profile).

    Returns
    -------
    list of dict
        One per length: ``rope_length_m`` [m], ``residual_swing_deg`` [deg],
        ``peak_rope_angle_deg`` [deg], ``valid``, and ``solver`` (the engine
        that gave them: ``single`` for the single-run solver).
    """
    g = scene.gravity_m_s2
    run_on_s = 2.5 * 2 * math.pi * math.sqrt(max(lengths) / g)
    scenes = [with_move(scene, index, dict(table_move, table_file=table_name), rope_length_m=L,
                        duration_s=scene.duration_s + run_on_s, base_dir=out_dir)
              for L in lengths]
    res = []
    for L, s in zip(lengths, batch.run_batch(scenes)):
        res.append({"rope_length_m": L, "residual_swing_deg": s["residual_swing_deg"],
                    "peak_rope_angle_deg": s["peak_rope_angle_deg"], "valid": s["valid"],
                    "solver": s["engine"]})
    worst = max(range(len(res)), key=lambda k: -1.0 if res[k]["residual_swing_deg"] is None
                else res[k]["residual_swing_deg"])
    for k in sorted({0, len(res) - 1, worst}):
        s = summarize(simulate(scenes[k])).data
        res[k].update({"residual_swing_deg": s["residual_swing_deg"], "valid": s["valid"],
                       "peak_rope_angle_deg": s["peak_rope_angle_deg"], "solver": "single"})
    return res


class TableLimits(NamedTuple):
    """Peaks of a table profile as the scene interpolates it."""

    #: Largest speed [m/s], or [deg/s] for slew.
    peak_speed: float
    #: Largest acceleration [m/s^2], or [deg/s^2] for slew.
    peak_accel: float


def table_limits(t, x) -> TableLimits:
    """Peak speed and acceleration of a table profile as the scene will interpolate it.

    Parameters
    ----------
    t : array_like
        Times from the move's start [s].
    x : array_like
        Displacements [m], or [deg] for slew.

    Returns
    -------
    TableLimits
        Largest absolute speed and acceleration of the interpolating spline,
        sampled 20 times per table interval.
    """
    p = from_table(0.0, t, x)
    tt = np.linspace(0.0, float(t[-1]), 20 * len(t) + 1)
    _, v, a = p.evaluate(tt)
    return TableLimits(float(np.max(np.abs(v))), float(np.max(np.abs(a))))


class PlanReport(NamedTuple):
    """What :func:`write_plan` wrote."""

    #: The lines of ``plan.txt`` (the caution first and last).
    lines: list
    #: Whether a verified plan was found (``move<N>-plan.csv`` and ``.toml`` written).
    planned: bool


def write_plan(scene, index, max_residual_deg, low, high, out) -> PlanReport:
    """Plan move ``index``, verify the written table, and write the plan files into ``out``.

    The search (:func:`plan_move`) keeps :data:`SEARCH_MARGIN` of the bound in
    hand; its five quickest candidates are written as a table in turn and
    verified (:func:`verify_table`) at four times as many rope lengths, until
    one keeps to the bound at all of them.  Writes ``move<N>-plan.csv`` and
    ``move<N>-plan.toml`` (when a plan is found), ``plan.txt`` and ``plan.json``.

    Parameters
    ----------
    scene, index, max_residual_deg, low, high
        The request, as for :func:`plan_move`; the scene as read from its file
        (``table_file`` in the snippet is relative to ``scene.base_dir``).
    out : Path
        Output folder (checked by the caller).

    Returns
    -------
    PlanReport
        The lines of ``plan.txt`` and whether a plan was found.
    """
    out = Path(out)
    # every file is staged: a stopped or failed plan never leaves an unverified table under its final name
    with staged_outputs(out) as stage:
        staged = stage.path
        bound_deg = float(max_residual_deg)
        search = plan_move(scene, index, bound_deg * SEARCH_MARGIN, low, high)
        fine = rope_lengths(low, high, 4 * len(search.rope_lengths_m) - 3)
        raw = scene.raw["moves"][index]
        slew = raw["axis"] == "slew"
        unit = "deg" if slew else "m"
        # the scene's own move, for comparison
        own = Candidate("the scene's move as given", dict(raw))
        evaluate(scene, index, [own], fine)
        table_name = f"move{index}-plan.csv"
        snippet = {k: raw[k] for k in ("label", "axis", "start_s") if k in raw}
        snippet["profile"] = "table"
        verified, chosen = None, None
        tried = [c for c in search.candidates if c.worst_residual_deg <= bound_deg * SEARCH_MARGIN][:5]
        for c in tried:
            t, x = sample_profile(scene, index, c.move)
            head = "t_s,angle_deg" if slew else "t_s,position_m"
            text = head + "\n" + "".join(f"{a!r},{b!r}\n" for a, b in zip(t.tolist(), x.tolist()))
            atomic_write_text(staged / table_name, text)
            ver = verify_table(scene, index, table_name, staged, fine, snippet)
            peaks = table_limits(t, x)
            if all(v["valid"] and v["residual_swing_deg"] is not None and v["residual_swing_deg"] <= bound_deg
                   for v in ver):
                verified, chosen = ver, c
                break
        lines = [cautions.CAUTION, "",
                 f"Plan for move {index} ({scene.moves[index].name}) of {scene.name}: residual swing at most "
                 f"{bound_deg:g} deg for rope lengths {low:g} to {high:g} m.", ""]
        result = {"scene": scene.name, "move": index, "max_residual_deg": bound_deg, "rope_range_m": [low, high],
                  "caution": cautions.CAUTION}
        own_d = own.end_s - float(raw.get("start_s", 0.0))
        lines.append(f"Scene's move as given ({raw['profile']}): {own_d:.2f} s, residual swing "
                     f"{min(own.residuals_deg):.3f} to {max(own.residuals_deg):.3f} deg over the range.")
        result["given"] = {"profile": raw["profile"], "duration_s": own_d,
                           "residual_swing_deg": dict(zip(fine, own.residuals_deg))}
        if chosen is None:
            if (staged / table_name).exists():
                (staged / table_name).unlink()
            lines.append("")
            lines.append(f"No profile in the search meets {bound_deg:g} deg over the whole range within the "
                         "move's limits. Narrow the rope range, allow more residual swing, or plan the move in stages.")
            result["plan"] = None
        else:
            dur = chosen.end_s - float(raw.get("start_s", 0.0))
            speed_key = "speed_deg_s" if slew else "speed_m_s"
            acc_key = "accel_deg_s2" if slew else "accel_m_s2"
            lines += [f"Planned: {chosen.label}: {dur:.2f} s ({dur - own_d:+.2f} s against the given move).",
                      f"Verified by simulating the written table (nonlinear model) at {len(verified)} rope "
                      "lengths: batch engine at all, single-run solver (*) at both ends and the worst:"]
            for v in verified:
                star = "*" if v["solver"] == "single" else " "
                lines.append(f"  rope {v['rope_length_m']:7.2f} m{star} residual swing "
                             f"{v['residual_swing_deg']:.3f} deg, peak rope angle {v['peak_rope_angle_deg']:.2f} deg")
            lines.append(f"The table as the scene interpolates it: peak speed {peaks.peak_speed:.6g} {unit}/s "
                         f"(limit {raw[speed_key]:g}), peak acceleration {peaks.peak_accel:.4g} {unit}/s^2 "
                         f"(limit {raw[acc_key]:g}).")
            toml = [f"# Planned by swingsim plan-move: {chosen.label}.",
                    f"# Residual swing <= {bound_deg:g} deg for rope lengths {low:g} to {high:g} m "
                    "(verified by simulation).",
                    "# " + cautions.CAUTION_SHORT,
                    "# Replace move " + str(index) + " of the scene with this table (table_file is relative to "
                    "the scene file: copy the CSV beside it, or adjust the path).",
                    "[[moves]]"]
            for k, v in snippet.items():
                toml.append(f"{k} = {json.dumps(v)}")
            rel = os.path.relpath(out / table_name, scene.base_dir)
            toml.append(f"table_file = {json.dumps(Path(rel).as_posix())}")
            atomic_write_text(staged / f"move{index}-plan.toml", "\n".join(toml) + "\n")
            result["plan"] = {"label": chosen.label, "duration_s": dur, "move": chosen.move,
                              "table_file": table_name, "verified": verified,
                              "table_peak_speed": peaks.peak_speed, "table_peak_accel": peaks.peak_accel}
        lines += ["", cautions.CAUTION]
        atomic_write_text(staged / "plan.txt", "\n".join(lines) + "\n")
        atomic_write_text(staged / "plan.json", json.dumps(result, indent=2, default=float) + "\n")
    return PlanReport(lines, chosen is not None)
