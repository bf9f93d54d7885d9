"""Summary numbers of a chunk of variants from the batch engine's dense samples.

What is measured is defined once, in :mod:`swingsim.metrics.definitions`
(the single-run summary calls the same functions).  This module computes the
sampled quantities of the point-mass model (tension, load velocity, swing) and
refines peaks the batch way: parabolas through three samples within one
segment, then, for the rope angle, Newton's method on the dense interpolant
(:func:`swingsim.batch.dense.refine_peak_sq`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from types import SimpleNamespace
from typing import Callable, NamedTuple

import numpy as np

from swingsim import constants
from swingsim.batch.dense import DenseSamples
from swingsim.dynamics.pendulum import specific_force, tension_per_mass, wind_terms
from swingsim.metrics import definitions
from swingsim.metrics.chart import chart_series


@dataclass(frozen=True)
class VariantFacts:
    """What the summary needs to know of each variant of a block, arrays (B,).

    Attributes
    ----------
    move_end_s : ndarray
        End of the last move [s].
    run_end_s : ndarray
        End of the run (the scene's duration) [s].
    natural_period_s, natural_period_end_s : ndarray
        Small-amplitude swing period at the start and at the final rope length [s].
    settle_threshold_rad : ndarray
        Swing below which the load counts as settled [rad].
    rope_length_start_m, rope_length_end_m : ndarray
        Rope length at the start and at the end [m].
    fixed_length : ndarray of bool
        True where the rope is not hoisted (the excursion is then L |n_h|).
    rest_direction : ndarray (B, 3)
        Unit rope direction at rest (vertical, or offset by a steady wind).
    mass_kg : ndarray
        Load mass [kg].
    gravity_m_s2 : ndarray
        Gravitational acceleration [m/s^2].
    falls : ndarray, optional
        Falls of the reeving [-] (1 when not given).
    reeving_efficiency : ndarray, optional
        Overall efficiency of the reeving [-] (1 when not given).
    charted : tuple, optional
        Per variant ``(scene, motion)`` when its crane has a rated capacity chart, else
        None (None for the whole block: no chart in it).
    """

    move_end_s: np.ndarray
    run_end_s: np.ndarray
    natural_period_s: np.ndarray
    natural_period_end_s: np.ndarray
    settle_threshold_rad: np.ndarray
    rope_length_start_m: np.ndarray
    rope_length_end_m: np.ndarray
    fixed_length: np.ndarray
    rest_direction: np.ndarray
    mass_kg: np.ndarray
    gravity_m_s2: np.ndarray
    falls: np.ndarray | None = None
    reeving_efficiency: np.ndarray | None = None
    charted: tuple | None = None


def variant_facts(vs, mass_kg, gravity_m_s2, fixed_length) -> VariantFacts:
    """What the summary needs to know of prepared variants (``segments.PreparedVariant``).

    Parameters
    ----------
    vs : list of PreparedVariant
        The variants.
    mass_kg : ndarray
        Mass hanging on the hoist rope of each [kg].
    gravity_m_s2 : ndarray
        Gravitational acceleration of each [m/s^2].
    fixed_length : ndarray of bool
        Where the excursion is the rope length times :math:`|n_h|` (point mass, not hoisted).

    Returns
    -------
    VariantFacts
        Arrays (B,).
    """
    return VariantFacts(
        move_end_s=np.array([x.move_end for x in vs]),
        run_end_s=np.array([x.scene.duration_s for x in vs]),
        natural_period_s=np.array([x.period0 for x in vs]),
        natural_period_end_s=np.array([x.period_end for x in vs]),
        settle_threshold_rad=np.radians([x.scene.limits.settle_deg for x in vs]),
        rope_length_start_m=np.array([x.scene.rope.length_m for x in vs]),
        rope_length_end_m=np.array([x.L_end for x in vs]),
        fixed_length=np.asarray(fixed_length, dtype=bool),
        rest_direction=np.stack([x.rest for x in vs]),
        mass_kg=np.asarray(mass_kg, dtype=float),
        gravity_m_s2=np.asarray(gravity_m_s2, dtype=float),
        falls=np.array([x.scene.rope.falls for x in vs], dtype=float),
        reeving_efficiency=np.array([x.scene.rope.reeving_efficiency for x in vs]),
        charted=(tuple((x.scene, x.motion) if x.scene.crane.chart is not None else None for x in vs)
                 if any(x.scene.crane.chart is not None for x in vs) else None),
    )


@dataclass(frozen=True)
class SampledRuns:
    """The sampled quantities of a block of runs, arrays (B, M), one row per run.

    Attributes
    ----------
    time_s : ndarray
        Sample times, non-decreasing along each row [s] (padding repeats the end).
    horizontal_sq : ndarray
        :math:`|n_h|^2` of the unit rope direction [-] (the rope angle grows with it).
    cos_swing : ndarray
        :math:`n \\cdot n_{rest}` [-] (the swing shrinks as it grows).
    swing_at : callable
        ``swing_at(rows, idx) -> ndarray``: the swing [rad] at given samples.
    offset_x, offset_y : ndarray
        Horizontal components of :math:`n - n_{rest}` [-].
    tension_N : ndarray
        Rope tension [N].
    excursion_sq_m2 : ndarray
        Squared horizontal excursion of the load from the plumb line [m^2].
    load_vel_x, load_vel_y, load_vel_z : ndarray
        Load velocity [m/s].
    segment_start : ndarray of bool
        First sample of a segment after a breakpoint (parabolas do not reach across).
    real : ndarray of bool
        False for the samples of padding steps.
    peaks_only : dict
        Quantities of which only the peak is reported, by summary key: ``peak_leg_tension_kN``
        (the most loaded sling leg's tension [N]) and ``peak_utilisation_pct`` (the dynamic
        chart utilisation [%], :func:`swingsim.metrics.chart.chart_series`), each (B, M) with
        NaN rows where not measured (:data:`PEAK_SCALE` turns them into the key's unit).
    """

    time_s: np.ndarray
    horizontal_sq: np.ndarray
    cos_swing: np.ndarray
    swing_at: Callable
    offset_x: np.ndarray
    offset_y: np.ndarray
    tension_N: np.ndarray
    excursion_sq_m2: np.ndarray
    load_vel_x: np.ndarray
    load_vel_y: np.ndarray
    load_vel_z: np.ndarray
    segment_start: np.ndarray
    real: np.ndarray
    peaks_only: dict = field(default_factory=dict)


#: The summary keys of ``SampledRuns.peaks_only`` and the factor from their samples' unit to the key's.
PEAK_SCALE = {"peak_leg_tension_kN": 1e-3, "peak_utilisation_pct": 1.0}


class MeasuredBlock(NamedTuple):
    """Summaries of a block of variants and, per variant, whether the batch run holds."""

    summaries: list
    ok: np.ndarray


def measure_block(samples: DenseSamples, facts: VariantFacts, forces: dict, refine_peak_sq=None) -> MeasuredBlock:
    """Summaries of a block of variants from their dense samples.

    Parameters
    ----------
    samples : DenseSamples
        Dense samples of the block (:func:`swingsim.batch.dense.sample`).
    facts : VariantFacts
        What the summary needs to know of each variant.
    forces : dict
        Force parameters of the point-mass model for these rows (arrays (B, 1) or
        scalar zeros), as :func:`swingsim.dynamics.pendulum.specific_force` reads them.
    refine_peak_sq : callable, optional
        ``refine_peak_sq(t0) -> (time_s, horizontal_sq)``: a local maximiser of
        :math:`|n_h|^2` on the dense interpolant, from starting times (B, K) [s].

    Returns
    -------
    MeasuredBlock
        One dict per variant (the numeric keys of ``engine.SUMMARY_KEYS``) and an
        ``ok`` flag: False for a run the model cannot carry on (slack rope, swing
        at the model's limit, non-finite state), which the engine hands to the
        single-run solver.
    """
    u, v, du, dv = samples.u, samples.v, samples.du, samples.dv
    kin = samples.kinematics
    L, dL = kin.rope_length, kin.rope_rate
    with np.errstate(all="ignore"):
        r2 = u * u + v * v
        w = np.sqrt(np.clip(1.0 - r2, 0.0, None))
        wind = (wind_terms(forces["wind"], samples.time_s, forces["pz"], L, w) if "wind" in forces
                else None)  # gusts, turbulence or a profile
        fx, fy, fz = specific_force(u, v, w, du, dv, L, dL, kin.vx, kin.vy, 0.0, forces, kin.slew_rate, wind)
        tpm = tension_per_mass(u, v, du, dv, L, kin.rope_accel, kin.ax, kin.ay, 0.0, fx, fy, fz)
        ndz = (u * du + v * dv) / w
        load_vel_x = kin.vx + dL * u + L * du
        load_vel_y = kin.vy + dL * v + L * dv
        load_vel_z = -dL * w + L * ndz
    wlim = math.cos(math.radians(constants.MODEL_ANGLE_LIMIT_DEG))
    # a run the model cannot carry on goes to the single-run solver (events, exact stop)
    ok = np.all(np.isfinite(r2) & np.isfinite(tpm), axis=1)
    ok &= np.all(tpm > 0.0, axis=1) & np.all(w > wlim, axis=1)
    tension = facts.mass_kg[:, None] * tpm
    runs = direction_runs(samples, u, v, w, facts.rest_direction, tension,
                          L * u, L * v, (load_vel_x, load_vel_y, load_vel_z),
                          utilisation_pct=chart_utilisation_pct(facts, samples.time_s, (u, v, -w), tension,
                                                                (L * u, L * v)))
    return MeasuredBlock(summaries_from_samples(runs, facts, refine_peak_sq), ok)


def chart_utilisation_pct(facts: VariantFacts, time_s, rope_dir, tension_N, load_xy, hook_xy=None):
    """The dynamic chart utilisation at each sample, through the single run's definition.

    :func:`swingsim.metrics.chart.chart_series` (radii of the suspension point, the hook
    block and the load from the slew axis, the lowest capacity among them, the counted
    hook load over ``g`` times it), called once per charted variant on its samples.

    Parameters
    ----------
    facts : VariantFacts
        The block's variants (``charted``: their scenes and motions).
    time_s : ndarray (B, M)
        Sample times [s].
    rope_dir : tuple of ndarray
        Unit rope direction ``(nx, ny, nz)``, each (B, M) [-].
    tension_N : ndarray (B, M)
        Hoist rope tension at the hook block [N].
    load_xy : tuple of ndarray
        The load's horizontal offset from the suspension point, each (B, M) [m].
    hook_xy : tuple of ndarray, optional
        The hook block's horizontal offset from the suspension point [m] (None: no hook
        block in the block's model).

    Returns
    -------
    ndarray or None
        Utilisation (B, M) [%], NaN rows for variants without a chart; None when no
        variant of the block has one.
    """
    if facts.charted is None:
        return None
    out = np.full(np.shape(time_s), np.nan)
    for b, got in enumerate(facts.charted):
        if got is None:
            continue
        scene, motion = got
        t = time_s[b]
        p = np.asarray(motion.evaluate(t)["p"], dtype=float)

        def at(xy, p=p, b=b):
            q = p.copy()
            q[:, 0] += xy[0][b]
            q[:, 1] += xy[1][b]
            return q

        s = {"suspension": p, "load": at(load_xy), "rope_tension_N": tension_N[b],
             "rope_dir": np.stack([rope_dir[0][b], rope_dir[1][b], rope_dir[2][b]], axis=-1),
             "hook": at(hook_xy) if hook_xy is not None and scene.hook is not None else None}
        with np.errstate(all="ignore"):
            out[b] = chart_series(SimpleNamespace(scene=scene), t, s)["utilisation_pct"]
    return out


def direction_runs(samples: DenseSamples, u, v, w, rest, tension_N, excursion_x, excursion_y,
                   load_vel, leg_tension_N=None, utilisation_pct=None) -> SampledRuns:
    """The sampled quantities of a block of runs from its hoist rope's direction.

    Parameters
    ----------
    samples : DenseSamples
        Dense samples of the block (times, segment starts, padding).
    u, v, w : ndarray (B, M)
        The unit rope direction :math:`n = (u, v, -w)` at the samples [-].
    rest : ndarray (B, 3)
        Unit rope direction at rest [-].
    tension_N : ndarray (B, M)
        Hoist rope tension [N].
    excursion_x, excursion_y : ndarray (B, M)
        The load's horizontal offset from the suspension point [m].
    load_vel : tuple of ndarray
        The load's velocity components (B, M) [m/s].
    leg_tension_N : ndarray (B, M), optional
        Tension of the most loaded sling leg [N] (NaN rows: not measured).
    utilisation_pct : ndarray (B, M), optional
        Dynamic chart utilisation [%] (:func:`chart_utilisation_pct`).

    Returns
    -------
    SampledRuns
        What :func:`summaries_from_samples` measures.
    """
    nz = -w

    def swing_at(rows, idx):
        n = np.stack([u[rows, idx], v[rows, idx], nz[rows, idx]], axis=-1)
        return definitions.angle_between(n, rest[rows])

    with np.errstate(all="ignore"):
        horizontal_sq = u * u + v * v
    return SampledRuns(
        time_s=samples.time_s, horizontal_sq=horizontal_sq, cos_swing=definitions.cos_swing(u, v, nz, rest),
        swing_at=swing_at, offset_x=u - rest[:, None, 0], offset_y=v - rest[:, None, 1],
        tension_N=tension_N, excursion_sq_m2=definitions.excursion_sq_m2(excursion_x, excursion_y),
        load_vel_x=load_vel[0], load_vel_y=load_vel[1], load_vel_z=load_vel[2],
        segment_start=samples.segment_start, real=samples.real,
        peaks_only={k: x for k, x in (("peak_leg_tension_kN", leg_tension_N),
                                      ("peak_utilisation_pct", utilisation_pct)) if x is not None})


def _windows(t, x, kink=None):
    """Parabola vertices of every three-sample window within one segment (see _best_peak)."""
    xa, xb, xc = x[:, :-2], x[:, 1:-1], x[:, 2:]
    ta, tb, tc = t[:, :-2], t[:, 1:-1], t[:, 2:]
    with np.errstate(all="ignore"):
        d1 = (xb - xa) / (tb - ta)
        d2 = (xc - xb) / (tc - tb)
        curv = (d2 - d1) / (tc - ta)
        tv = 0.5 * (ta + tb) - d1 / (2.0 * curv)
        xv = xa + d1 * (tv - ta) + curv * (tv - ta) * (tv - tb)
        right = tc
        if kink is not None:
            # the interval just before a breakpoint is no window's middle: let the window
            # ending one sample earlier reach across it (extrapolating its own segment)
            nxt = np.zeros_like(kink[:, 2:])
            nxt[:, :-1] = kink[:, 3:]
            tn = np.empty_like(tc)
            tn[:, :-1] = t[:, 3:]
            tn[:, -1] = tc[:, -1]
            right = np.where(nxt, tn, tc)
        ok = (tb > ta) & (tc > tb) & (curv < 0) & (tv > ta) & (tv < right)
    if kink is not None:  # a kink sample opens a segment: it may only start a window
        ok &= ~kink[:, 1:-1] & ~kink[:, 2:]
    return tv, xv, ok


def _best_peak(t, x, mask=None, kink=None, top=0, win=None):
    """Largest value of each row of ``x`` over ``mask``, refined at every local maximum.

    Every window of three consecutive samples (all within ``mask``) that lies
    within one segment (``kink`` marks the first sample of each segment after
    a profile breakpoint, where the curvature or the tension jumps) gives the
    vertex of its parabola when that vertex is a maximum inside the window; the
    best vertex or raw sample of the row is returned with its time.  Looking at
    every window, not only the one around the largest sample, finds the true
    peak when another swing's sample happens to lie higher, and windows never
    straddle a breakpoint.

    Returns ``(idx, t_peak, x_peak)`` (B,) and, with ``top``, the times (B, top + 1)
    of the ``top`` best vertices and of the largest sample (starting points for a
    finer search).
    """
    B, M = x.shape
    r = np.arange(B)
    i, best_t, best = definitions.peak_sample(t, x, mask)
    if M >= 3:
        tv, xv, ok = _windows(t, x, kink) if win is None else win
        if mask is not None:
            ok = ok & mask[:, :-2] & mask[:, 1:-1] & mask[:, 2:]
        xv = np.where(ok, xv, -np.inf)
        j = np.argmax(xv, axis=1)
        vj = xv[r, j]
        better = vj > best
        sample_t = best_t
        best = np.where(better, vj, best)
        best_t = np.where(better, tv[r, j], best_t)
        i = np.where(better, j + 1, i)
        if top:
            k = min(top, xv.shape[1])
            idx = np.argpartition(-xv, k - 1, axis=1)[:, :k]
            ct = np.where(np.isfinite(xv[r[:, None], idx]), tv[r[:, None], idx], sample_t[:, None])
            return i, best_t, best, np.concatenate([ct, sample_t[:, None]], axis=1)
    if top:
        return i, best_t, best, best_t[:, None]
    return i, best_t, best


def summaries_from_samples(runs: SampledRuns, facts: VariantFacts, refine_peak_sq=None) -> list[dict]:
    """Summary numbers of many runs from their sampled quantities (one row per run).

    Parameters
    ----------
    runs : SampledRuns
        The sampled quantities, arrays (B, M).
    facts : VariantFacts
        What the summary needs to know of each run, arrays (B,).
    refine_peak_sq : callable, optional
        ``refine_peak_sq(t0) -> (time_s, horizontal_sq)``: a local maximiser of
        :math:`|n_h|^2` on the dense interpolant from starting times (B, K) [s];
        without it the rope-angle peaks are the parabola vertices.

    Returns
    -------
    list of dict
        One dict per row with the numeric keys of ``engine.SUMMARY_KEYS``.

    Notes
    -----
    The definitions are those of :mod:`swingsim.metrics.definitions`.  Peaks are
    refined by parabolas through three samples within one segment and, for the
    rope angle, by ``refine_peak_sq`` on the dense interpolant (as the single-run
    metrics refine on their trajectory).
    """
    t, r2, kink = runs.time_s, runs.horizontal_sq, runs.segment_start
    B, M = t.shape
    move_end = facts.move_end_s
    post = definitions.after_move(t, move_end) & runs.real
    anyp = post.any(axis=1)

    win = _windows(t, r2, kink) if M >= 3 else None
    _, pk_t, pk, cand = _best_peak(t, r2, None, kink, top=3, win=win)
    _, _, res, cand_r = _best_peak(t, r2, post, kink, top=3, win=win)
    if refine_peak_sq is not None:
        # finer: Newton on the dense interpolant from the best few candidates; the parabolas
        # only give the starting points (their own vertex can overshoot beside a breakpoint)
        _, pk_t, pk = definitions.peak_sample(t, r2)
        res = definitions.peak_sample(t, r2, post).value
        # every candidate refined in one pass (the same arithmetic per element as one by one)
        nc = cand.shape[1]
        tn_all, xn_all = refine_peak_sq(np.concatenate([cand, np.maximum(cand_r, move_end[:, None])], axis=1))
        for j in range(nc):
            tn, xn = tn_all[:, j], xn_all[:, j]
            better = xn > pk
            pk = np.where(better, xn, pk)
            pk_t = np.where(better, tn, pk_t)
        lo = move_end - definitions.AFTER_MOVE_TOLERANCE_S
        for j in range(cand_r.shape[1]):
            tn, xn = tn_all[:, nc + j], xn_all[:, nc + j]
            better = (xn > res) & (tn >= lo) & anyp
            res = np.where(better, xn, res)
    pk_r2 = pk
    pk = definitions.rope_angle_from_horizontal_sq(pk)
    res = definitions.rope_angle_from_horizontal_sq(res)
    vertical = np.all(facts.rest_direction[:, :2] == 0.0, axis=1)
    rsw = res
    if not np.all(vertical):
        # the swing shrinks as cos_swing grows: the peaks of 1 - cos_swing = 2 sin^2(swing / 2);
        # rows hanging plumb at rest keep the rope angle (identical to the swing there)
        _, _, q = _best_peak(t, 1.0 - runs.cos_swing, post, kink)
        rsw = np.where(vertical, res, 2.0 * np.arcsin(np.sqrt(np.clip(q / 2.0, 0.0, 1.0))))
    sw_end = definitions.value_at_instant(t, runs.swing_at, move_end, post)
    # excursion: with a constant rope its peak is L times the refined peak of |n_h|
    fixed = facts.fixed_length
    exc = facts.rope_length_start_m * np.sqrt(np.clip(pk_r2, 0.0, 1.0))
    if not np.all(fixed):
        exc = np.where(fixed, exc, np.sqrt(np.maximum(_best_peak(t, runs.excursion_sq_m2, None, kink)[2], 0.0)))
    t_max = _best_peak(t, runs.tension_N, None, kink)[2]
    # the largest leg's and the chart's peaks: the same parabolas as the tension's (NaN rows: not measured)
    extra = {k: _optional_peak(t, runs.peaks_only.get(k), kink) * PEAK_SCALE[k] for k in PEAK_SCALE}
    t_min = np.min(runs.tension_N, axis=1)
    static = facts.mass_kg * facts.gravity_m_s2
    # the hook load is the hoist rope's tension; the line pull its share per fall
    falls = 1.0 if facts.falls is None else facts.falls
    efficiency = 1.0 if facts.reeving_efficiency is None else facts.reeving_efficiency
    line_pull = definitions.line_pull(t_max, falls, efficiency)
    with np.errstate(all="ignore"):
        speed = definitions.peak_speed_m_s(runs.load_vel_x, runs.load_vel_y, runs.load_vel_z)
    measured = definitions.measured_period(t, runs.offset_x, runs.offset_y, post,
                                           facts.run_end_s - move_end, facts.natural_period_s)
    settled_at = definitions.settled_at_s(t, runs.cos_swing, runs.swing_at, post, facts.settle_threshold_rad,
                                          facts.run_end_s, facts.natural_period_end_s, move_end)

    deg = 180.0 / math.pi
    cols = {
        "pk": pk * deg, "pk_t": pk_t, "res": res * deg, "rsw": rsw * deg, "swe": sw_end * deg,
        "exc": exc, "Tmax": t_max / 1e3, "pull": line_pull / 1e3, "Tmin": t_min / 1e3, "stat": static / 1e3,
        "df": definitions.dynamic_factor(t_max, static), "speed": speed, "meas": measured.period_s,
        "set": settled_at, "me": move_end, "L0": facts.rope_length_start_m,
        "Le": facts.rope_length_end_m, "p0": facts.natural_period_s,
        **extra,
    }
    cols = {k: a.tolist() for k, a in cols.items()}
    fin = math.isfinite
    ap = anyp.tolist()
    out = []
    for b in range(B):
        st_at = cols["set"][b] if fin(cols["set"][b]) else None
        me = cols["me"][b]
        out.append({
            "last_move_end_s": me,
            "peak_rope_angle_deg": cols["pk"][b],
            "peak_rope_angle_time_s": cols["pk_t"][b],
            "residual_rope_angle_deg": cols["res"][b] if ap[b] else None,
            "residual_swing_deg": cols["rsw"][b] if ap[b] else None,
            "swing_at_move_end_deg": cols["swe"][b] if ap[b] else None,
            "peak_excursion_m": cols["exc"][b],
            "peak_rope_tension_kN": cols["Tmax"][b],
            "peak_hook_load_kN": cols["Tmax"][b],
            "peak_line_pull_kN": cols["pull"][b],
            "min_rope_tension_kN": cols["Tmin"][b],
            "static_rope_tension_kN": cols["stat"][b],
            "dynamic_factor": cols["df"][b],
            "peak_load_speed_m_s": cols["speed"][b],
            "rope_length_start_m": cols["L0"][b],
            "rope_length_end_m": cols["Le"][b],
            "natural_period_s": cols["p0"][b],
            "measured_period_s": cols["meas"][b] if fin(cols["meas"][b]) else None,
            "settle_time_s": None if st_at is None else st_at - me,
            "settled_at_s": st_at,
            **{k: cols[k][b] if fin(cols[k][b]) else None for k in PEAK_SCALE},
        })
    return out


def _optional_peak(t, x, kink):
    """:func:`_best_peak` of a sampled quantity some rows lack (NaN rows; None: no row has it) -> (B,), NaN where absent."""
    B = t.shape[0]
    if x is None:
        return np.full(B, np.nan)
    have = ~np.all(np.isnan(x), axis=1)
    out = np.full(B, np.nan)
    if have.any():
        rows = np.flatnonzero(have)
        out[rows] = _best_peak(t[rows], x[rows], None, kink[rows])[2]
    return out
