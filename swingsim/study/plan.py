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
length, the one that ends first wins.  The caller verifies the winner once
more, written as a table, with the single-run solver (see ``plan_cli.py``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from swingsim.batch import engine as batch
from swingsim.errors import InputError
from swingsim.scene import scene_from_dict

__all__ = ["Candidate", "plan_move", "candidate_moves", "rope_lengths"]

_TRAVEL = ("x", "y", "radius", "slew")
_ACCEL_FACTORS = (1.0, 0.7, 0.5, 0.35, 0.25, 0.18, 0.12, 0.08)
_EI_TOLERANCES = (0.05, 0.1, 0.2)


@dataclass
class Candidate:
    """One profile tried: its move table (scene keys), and how it did."""

    label: str
    move: dict
    end_s: float = math.nan
    residuals_deg: list = field(default_factory=list)
    peaks_deg: list = field(default_factory=list)

    @property
    def worst_residual_deg(self) -> float:
        return max(self.residuals_deg) if self.residuals_deg else math.inf


def rope_lengths(low: float, high: float, n: int) -> list[float]:
    """n rope lengths spread evenly over [low, high] (both ends included)."""
    if high == low:
        return [float(low)]
    return [float(x) for x in np.linspace(low, high, n)]


def _period(g, L):
    return 2.0 * math.pi * math.sqrt(L / g)


def candidate_moves(scene, index: int, low: float, high: float, n_periods: int = 7) -> list[Candidate]:
    """Candidate move tables for move ``index`` (see the module docstring)."""
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


def _scene_with(scene, index, move, L, extra_s):
    d = dict(scene.raw)
    d["moves"] = list(scene.raw["moves"])
    d["moves"][index] = move
    d["rope"] = dict(scene.raw["rope"], length_m=float(L))
    d["duration_s"] = scene.duration_s + extra_s
    return scene_from_dict(d, file=scene.file, base_dir=scene.base_dir)


def check_request(scene, index, max_residual_deg, low, high, where="--move"):
    """Refuse a request the planner cannot answer (InputError, one line)."""
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
    """Simulate every candidate at every rope length (batch engine); fill in the results."""
    g = scene.gravity_m_s2
    extra = 2.5 * _period(g, max(lengths)) + 2.0 * _period(g, max(lengths))
    scenes, owner = [], []
    for ci, c in enumerate(candidates):
        for L in lengths:
            try:
                scenes.append(_scene_with(scene, index, c.move, L, extra))
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
    from swingsim.simulation import prepare

    return float(dict(enumerate(prepare(scene)[1].moves))[index][1].end_s)


def plan_move(scene, index: int, max_residual_deg: float, low: float, high: float,
              n_lengths: int = 9, **kw):
    """Search the candidates; return (best or None, all candidates sorted by end time, lengths)."""
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
    return (ok[0] if ok else None), order(cands), lengths


def sample_profile(scene, index, move, dt_max=0.02):
    """Times from the move's start [s] and displacements [m or deg] of a candidate, for a table.

    Samples every ``dt_max`` seconds at most, plus every breakpoint, so the
    table's spline follows the profile closely.
    """
    from swingsim.simulation import prepare

    d = dict(scene.raw)
    d["moves"] = list(scene.raw["moves"])
    d["moves"][index] = move
    d["duration_s"] = scene.duration_s + 1e4
    sc = scene_from_dict(d, file=scene.file, base_dir=scene.base_dir, validate_motion=False)
    prof = prepare(sc)[1].moves[index][1]
    t0, t1 = prof.start_s, prof.end_s
    n = int(math.ceil((t1 - t0) / dt_max))
    t = np.union1d(np.linspace(t0, t1, n + 1), [b for b in prof.breakpoints if t0 <= b <= t1])
    t = t[np.concatenate([[True], np.diff(t) > 1e-6])]
    t[-1] = t1
    pos = prof.evaluate(t)[0]
    if move["axis"] == "slew":
        pos = np.degrees(pos)
    return t - t0, pos
