"""Integrate many variants of a scene at once: a vectorised fixed-step integrator.

The batch engine integrates the point-mass model (``dynamics/pendulum.py``)
for a whole chunk of variants together: every array operation acts on all the
variants of the chunk, so the Python-level cost of a step is paid once per
chunk, not once per variant.  Variants whose model the engine does not handle,
or whose run the model cannot carry on (slack rope, swing at the model's
limit, non-finite state), are solved one by one with :func:`swingsim.simulation.simulate`
instead, so every result is one a single run would give.

Method
------
* Explicit Runge-Kutta of order 8, the 12-stage Dormand-Prince tableau of
  ``DOP853`` (``rk8.py``; Hairer, Norsett & Wanner, *Solving Ordinary
  Differential Equations I*, 2nd ed., Springer 1993, sec. II.10), taken at a
  fixed step without error control.  The crane's motion over the chunk is
  ``kinematics.py``.
* Each variant has its own step grid.  Its profile breakpoints (where the
  crane's acceleration or jerk jumps) and spline knots cut its run into
  segments on which the suspension point and the rope length are cubic
  polynomials in time; each segment is divided into equal steps no longer
  than ``T / steps_per_period`` (T: the variant's shortest swing period), so
  no step straddles a jump and the method keeps its full order.  Variants
  with fewer steps are padded with zero-length steps, which leave the state
  unchanged exactly.
* Between step ends the state is the quintic Hermite interpolant of the
  direction components (value, rate and acceleration at both ends, the end
  acceleration evaluated on the step's own segment), sampled at
  ``samples_per_step`` equal fractions of each step.  (``dense.py``).  The summary numbers are measured on those samples
  (``measure.py``) with the definitions of :mod:`swingsim.metrics.definitions`,
  the same functions the single-run summary calls: the rope-angle peaks are
  found from parabolas through three samples within one segment, then refined
  by Newton's method on the Hermite polynomial of their step; tension and
  excursion peaks by the parabolas.
* A variant's numbers do not depend on the other variants of its chunk: the
  stages are combined element by element in a fixed order (no BLAS), row sums
  are sequential, and padding samples are masked.  So in-process and Dask
  runs, and resumed runs, give identical floats.

The default step (``steps_per_period = 12``) comes from a measurement against
``solve_ivp`` (DOP853, rtol 1e-12) on random variants (``tests/test_batch.py``):
the largest rope-angle error was about 1e-3 deg for swings near 60 deg, about
1e-4 deg typically; at 8 steps per period it was 1e-2 deg, at 16 about 2e-4
deg.  ``benchmarks/bench_batch.py`` measures speed and accuracy on 10,000
variants.

Memory is bounded by processing the variants in chunks (default: at most 2048
variants, about 400,000 step states per chunk) and measuring each chunk in
blocks of 256 variants.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from swingsim.batch import dense, rk8
from swingsim.batch.kinematics import ChunkKinematics
from swingsim.batch.measure import VariantFacts, measure_block
from swingsim.dynamics.pendulum import PointMassModel, accelerations, specific_force, wind_terms
from swingsim.dynamics.wind import BatchWind, WindField
from swingsim.dynamics.registry import select_model
from swingsim.metrics.single import summarize
from swingsim.motion import profiles
from swingsim.motion.kinematics import AXES
from swingsim.simulation import prepare, simulate

__all__ = ["run_batch", "run_chunk", "supported", "chunks", "chunk_size_for", "SUMMARY_KEYS",
           "DEFAULT_STEPS_PER_PERIOD", "DEFAULT_SAMPLES_PER_STEP"]

#: Fixed steps per shortest swing period (see the module docstring).
DEFAULT_STEPS_PER_PERIOD = 12
#: Samples of the dense interpolant per step.
DEFAULT_SAMPLES_PER_STEP = 3
#: Target number of values per sampled array of a chunk.
_CHUNK_VALUES = 400_000

#: Summary keys the batch engine measures (the same names as ``summary.json``).
SUMMARY_KEYS = (
    "valid", "status", "model", "engine", "last_move_end_s",
    "peak_rope_angle_deg", "peak_rope_angle_time_s", "residual_rope_angle_deg",
    "residual_swing_deg", "swing_at_move_end_deg", "peak_excursion_m",
    "peak_rope_tension_kN", "min_rope_tension_kN", "static_rope_tension_kN", "dynamic_factor",
    "peak_load_speed_m_s", "rope_length_start_m", "rope_length_end_m",
    "natural_period_s", "measured_period_s", "settle_time_s", "settled_at_s",
)

# the non-zero weights of each stage, in a fixed order
_A_NZ = [[(j, float(rk8.A[s, j])) for j in range(s) if rk8.A[s, j] != 0.0] for s in range(rk8.N_STAGES)]
_B_NZ = [(j, float(rk8.B[j])) for j in range(rk8.N_STAGES) if rk8.B[j] != 0.0]


def _combine(weights, K):
    """sum_j w_j K[j], element by element in a fixed order.

    Not ``tensordot`` (BLAS): a BLAS kernel may round an element differently
    depending on where it sits in the array, and a variant's result must not
    depend on the other variants of its chunk.
    """
    j, w = weights[0]
    acc = w * K[j]
    for j, w in weights[1:]:
        acc += w * K[j]
    return acc


# ----------------------------------------------------------------------------
# which variants the engine takes


def supported(scene) -> bool:
    """Whether the batch engine integrates this scene.

    Parameters
    ----------
    scene : Scene
        A validated scene; only the model it selects decides.

    Returns
    -------
    bool
        True when the scene's model is the point-mass model and the suspension
        point stays at its height; other models (and a model extension that cannot
        be built), and a boom crane that luffs (its tip moves on an arc, which
        the vectorised kinematics leave out), go to the single-run solver.
    """
    if scene.crane.has_boom and any(m.axis == "radius" for m in scene.moves):
        return False
    try:
        return type(select_model(scene)) is PointMassModel
    except Exception:  # a model extension that cannot build: leave it to simulate
        return False


def _segment_times(prof) -> set:
    """Instants where a profile stops being one cubic (breakpoints and spline knots)."""
    if isinstance(prof, profiles.SumProfile):
        out = set()
        for _, s, p in prof.parts:
            out |= {b + s for b in _segment_times(p)}
        return out
    if isinstance(prof, profiles.SplineProfile):
        return {prof.start_s + float(x) for x in prof.spline.x}
    return set(float(b) for b in prof.breakpoints)


def _period(scene, L):
    return 2.0 * math.pi * math.sqrt(L / scene.gravity_m_s2)


@dataclass
class _Variant:
    scene: object
    motion: object
    model: object
    cuts: np.ndarray        # segment boundaries, 0 .. duration
    coef: np.ndarray        # (nseg, 5, 4) cubic coefficients per axis about each segment start
    grid: np.ndarray        # step end times
    seg: np.ndarray         # segment index of each step
    y0: np.ndarray
    rest: np.ndarray
    period0: float
    period_end: float
    L_end: float
    move_end: float
    suspension_z: float = 0.0  # height of the suspension point (the batch keeps it level) [m]


def _prepare(scene, steps_per_period) -> _Variant:
    model, motion = prepare(scene, PointMassModel(scene))
    T = scene.duration_s
    # the wind's breakpoints (gust starts and ends) too
    pts = {0.0, T} | {b for b in model.extra_breakpoints if 0.0 < b < T}
    for _, prof in motion.moves:
        pts |= {b for b in _segment_times(prof) if 0.0 < b < T}
    cuts = np.array(sorted(pts))
    cuts = cuts[np.concatenate([[True], np.diff(cuts) > 1e-12])]
    if cuts[-1] != T:
        cuts[-1] = T
    nseg = len(cuts) - 1
    coef = np.zeros((nseg, len(AXES), 4))
    a0, a1 = cuts[:-1], cuts[1:]
    tm = 0.5 * (a0 + a1)
    t2 = a0 + 0.75 * (a1 - a0)
    d = tm - a0
    both = np.concatenate([tm, t2])
    for ax, prof in motion.moves:
        # each profile is one cubic on each segment: read it off at two interior points
        pp, vv, aa = prof.evaluate(both)
        p, v, a = pp[:nseg], vv[:nseg], aa[:nseg]
        j = (aa[nseg:] - a) / (t2 - tm)
        c = np.stack([p - v * d + a * d**2 / 2 - j * d**3 / 6, v - a * d + j * d**2 / 2,
                      (a - j * d) / 2, j / 6], axis=-1)
        coef[:, AXES.index(ax)] += c
    # shortest rope over the run -> shortest period -> step bound
    if any(ax == "hoist" for ax, _ in motion.moves):
        Ls = motion.evaluate(np.union1d(cuts, np.linspace(0.0, T, 201)))["L"]
        Lmin = float(np.min(Ls))
        L_end = float(motion.evaluate(np.array([T]))["L"][0])
    else:
        Lmin = L_end = float(motion.rope_length_m)
    hmax = min(_period(scene, Lmin) / steps_per_period, model.max_step_s)
    n = np.maximum(1, np.ceil(np.diff(cuts) / hmax - 1e-9)).astype(int)
    seg = np.repeat(np.arange(nseg), n)
    first = np.repeat(np.cumsum(n) - n, n)
    k = np.arange(len(seg)) - first
    grid = np.append(cuts[seg] + (cuts[seg + 1] - cuts[seg]) * (k / n[seg]), T)
    y0 = np.asarray(model.initial_state(motion), dtype=float)
    rest = np.asarray(model.rest_direction(L_end))
    return _Variant(scene, motion, model, cuts, coef, grid, seg, y0, rest,
                    float(model.mode_periods_s()[0]), float(model.mode_periods_s(L_end)[0]),
                    L_end, motion.last_move_end_s, float(motion.evaluate(np.array([0.0]))["p"][0][2]))


# ----------------------------------------------------------------------------
# kinematics and right-hand side over a chunk


def _kinematics(variants) -> ChunkKinematics:
    used = np.zeros(len(AXES), dtype=bool)
    for v in variants:
        used |= np.any(v.coef != 0.0, axis=(0, 2))
    # the polar coordinates are taken about each variant's slew centre (only rates are needed)
    return ChunkKinematics([np.subtract(v.motion.origin_m, (*v.motion.slew_center_m, 0.0)) for v in variants],
                           [v.motion.rope_length_m for v in variants], used)


def _force_parameters(variants):
    keys = ("g", "zeta", "kd", "kr", "wx", "wy")
    out = {}
    for k in keys:
        a = np.array([v.model.par[k] for v in variants], dtype=float)
        # a scalar zero lets the force functions skip the term for the whole chunk
        out[k] = 0.0 if k != "g" and not np.any(a) else a
    if any(v.model.wind is not None for v in variants):
        # gusts, turbulence or a profile: every variant's wind field (steady ones included)
        out["wind"] = BatchWind([v.model.wind or WindField(v.scene.wind, v.scene.duration_s) for v in variants])
        out["pz"] = np.array([v.suspension_z for v in variants])
    return out


def _wind(par, t, L, w, pz=None):
    """The wind terms of specific_force for the chunk (None for a steady uniform wind)."""
    field = par.get("wind")
    if field is None:
        return None
    return wind_terms(field, t, par["pz"] if pz is None else pz, L, w)


def _force_rows(par, sel, ndim):
    out = {}
    for k, a in par.items():
        if isinstance(a, BatchWind):
            out[k] = a.select(sel)
            continue
        if isinstance(a, np.ndarray):
            a = a[sel]
            a = a.reshape(a.shape + (1,) * (ndim - 1))
        out[k] = a
    return out


def _rhs(y, kin, par, t=None):
    """Derivatives of the chunk's states y (4, B) with the crane's motion ``kin`` (SuspensionRates) at times t (B,)."""
    u, v, du, dv = y
    w = np.sqrt(1.0 - u * u - v * v)
    wind = _wind(par, t, kin.rope_length, w)
    fx, fy, fz = specific_force(u, v, w, du, dv, kin.rope_length, kin.rope_rate, kin.vx, kin.vy, 0.0,
                                par, kin.slew_rate, wind)
    ddu, ddv = accelerations(u, v, du, dv, kin.rope_length, kin.rope_rate, kin.ax, kin.ay, 0.0, fx, fy, fz)
    return du, dv, ddu, ddv


# ----------------------------------------------------------------------------
# one chunk


def _integrate(variants) -> dense.IntegratedChunk:
    B = len(variants)
    N = max(len(v.grid) - 1 for v in variants)
    tg = np.empty((B, N + 1))
    sg = np.zeros((B, N), dtype=np.intp)
    nseg = max(len(v.cuts) - 1 for v in variants)
    coef = np.zeros((B, nseg, len(AXES), 4))
    t0s = np.zeros((B, nseg))
    for i, v in enumerate(variants):
        n = len(v.grid)
        tg[i, :n] = v.grid
        tg[i, n:] = v.grid[-1]
        sg[i, :n - 1] = v.seg
        sg[i, n - 1:] = v.seg[-1]
        k = len(v.cuts) - 1
        coef[i, :k] = v.coef
        t0s[i, :k] = v.cuts[:-1]
    kin = _kinematics(variants)
    par = _force_parameters(variants)
    ar = np.arange(B)
    nst = rk8.N_STAGES
    Y = np.empty((N + 1, 4, B))
    A0 = np.empty((N, 2, B))
    A1 = np.empty((N, 2, B))
    y = np.stack([v.y0 for v in variants], axis=1)  # (4, B)
    Y[0] = y
    K = np.empty((nst, 4, B))
    with np.errstate(all="ignore"):
        for k in range(N):
            t0 = tg[:, k]
            h = tg[:, k + 1] - t0
            c = coef[ar, sg[:, k]]
            tau0 = t0 - t0s[ar, sg[:, k]]
            for s in range(nst):
                ys = y if s == 0 else y + h * _combine(_A_NZ[s], K)
                K[s] = _rhs(ys, kin(c, tau0 + rk8.C[s] * h), par, t0 + rk8.C[s] * h)
            y = y + h * _combine(_B_NZ, K)
            Y[k + 1] = y
            A0[k] = K[0, 2:]
            # accelerations at the step's end on the step's own segment (left limit)
            A1[k] = _rhs(y, kin(c, tau0 + h), par, t0 + h)[2:]
    return dense.IntegratedChunk(tg, sg, coef, t0s, Y, A0, A1, kin, par)


def _facts(vs) -> VariantFacts:
    """What the summary needs to know of the variants ``vs``."""
    return VariantFacts(
        move_end_s=np.array([x.move_end for x in vs]),
        run_end_s=np.array([x.scene.duration_s for x in vs]),
        natural_period_s=np.array([x.period0 for x in vs]),
        natural_period_end_s=np.array([x.period_end for x in vs]),
        settle_threshold_rad=np.radians([x.scene.limits.settle_deg for x in vs]),
        rope_length_start_m=np.array([x.scene.rope.length_m for x in vs]),
        rope_length_end_m=np.array([x.L_end for x in vs]),
        fixed_length=np.array([not bool(x.coef[:, AXES.index("hoist")].any()) for x in vs]),
        rest_direction=np.stack([x.rest for x in vs]),
        mass_kg=np.array([x.model.par["m"] for x in vs]),
        gravity_m_s2=np.array([x.model.par["g"] for x in vs]),
    )


#: Rows of a chunk measured together (bounds the memory of the dense samples).
_MEASURE_ROWS = 128


def _chunk_batch(variants, samples_per_step):
    run = _integrate(variants)
    sums, oks = [], []
    for i in range(0, len(variants), _MEASURE_ROWS):
        sel = np.arange(i, min(i + _MEASURE_ROWS, len(variants)))
        block = measure_block(dense.sample(run, sel, samples_per_step), _facts([variants[j] for j in sel]),
                              _force_rows(run.forces, sel, 2),
                              lambda t0, sel=sel: dense.refine_peak_sq(run, sel, t0))
        sums.extend(block.summaries)
        oks.append(block.ok)
    ok = np.concatenate(oks)
    for k, s in enumerate(sums):
        s.update({"valid": True, "status": "ok", "model": "point-mass", "engine": "batch"})
        if not _all_finite(s):
            ok[k] = False  # a number the batch cannot vouch for: the single-run solver (and its final check) decides
    return sums, ok


def _all_finite(summary: dict) -> bool:
    """True when every number of a summary is finite (None stands for "not measured" and passes)."""
    return all(math.isfinite(v) for v in summary.values()
               if isinstance(v, (float, np.floating)) and not isinstance(v, bool))


def _single(scene) -> dict:
    """Summary of one scene by the single-run solver (the reference path)."""
    d = dict(summarize(simulate(scene)).data)
    d["engine"] = "single"
    return {k: d.get(k) for k in SUMMARY_KEYS}


def run_chunk(scenes, *, steps_per_period=DEFAULT_STEPS_PER_PERIOD,
              samples_per_step=DEFAULT_SAMPLES_PER_STEP, engine="batch") -> list[dict]:
    """Summaries of a list of validated scenes (one chunk), in order.

    Parameters
    ----------
    scenes : list of Scene
        Validated scenes (variants of one study, typically).
    steps_per_period : int
        Fixed steps per shortest swing period of each variant.
    samples_per_step : int
        Dense samples per step for the summary.
    engine : {"batch", "single"}
        ``"single"`` solves every scene with :func:`swingsim.simulation.simulate`.

    Returns
    -------
    list of dict
        Keys :data:`SUMMARY_KEYS`; ``engine`` says which solver produced it.
    """
    out: list = [None] * len(scenes)
    todo = []
    if engine == "batch":
        for i, sc in enumerate(scenes):
            if supported(sc):
                todo.append(i)
    if todo:
        variants = [_prepare(scenes[i], steps_per_period) for i in todo]
        sums, ok = _chunk_batch(variants, samples_per_step)
        for i, s, good in zip(todo, sums, ok):
            if good:
                out[i] = {k: s.get(k) for k in SUMMARY_KEYS}
    for i, sc in enumerate(scenes):
        if out[i] is None:
            out[i] = _single(sc)
    return out


def chunk_size_for(scenes, steps_per_period=DEFAULT_STEPS_PER_PERIOD) -> int:
    """Variants per chunk: about 400,000 step states, at most 2048 variants.

    Arrays of about 2000 values keep numpy's loops in cache; more variants per
    chunk save little Python overhead and cost memory.

    Parameters
    ----------
    scenes : list of Scene
        The variants; the first one's duration and rope length set the estimate.
    steps_per_period : int
        Fixed steps per swing period (as in :func:`run_chunk`).

    Returns
    -------
    int
        Chunk size, between 16 and 2048 (1 for no scenes).
    """
    if not scenes:
        return 1
    sc = scenes[0]
    per = sc.duration_s / _period(sc, sc.rope.length_m) * steps_per_period
    return int(max(16, min(2048, _CHUNK_VALUES // max(per, 1.0))))


def chunks(n: int, size: int) -> list[range]:
    """Index ranges of consecutive chunks (the unit of work in-process and on Dask).

    Parameters
    ----------
    n : int
        Number of variants.
    size : int
        Variants per chunk.

    Returns
    -------
    list of range
        Consecutive ranges covering ``0 .. n - 1``, each at most ``size`` long.
    """
    return [range(i, min(i + size, n)) for i in range(0, n, size)]


def run_batch(scenes, *, chunk_size=None, progress=None, **kw) -> list[dict]:
    """Summaries of many scenes, in chunks (see :func:`run_chunk`).

    Parameters
    ----------
    scenes : iterable of Scene
        Validated scenes.
    chunk_size : int, optional
        Variants per chunk (default :func:`chunk_size_for`).
    progress : callable, optional
        ``progress(n_done)``, called after each chunk with its number of variants.
    **kw
        Passed on to :func:`run_chunk` (``steps_per_period``, ``samples_per_step``, ``engine``).

    Returns
    -------
    list of dict
        One summary per scene, in order (see :func:`run_chunk`).
    """
    scenes = list(scenes)
    size = chunk_size or chunk_size_for(scenes)
    out = []
    for r in chunks(len(scenes), size):
        out.extend(run_chunk([scenes[i] for i in r], **kw))
        if progress:
            progress(len(r))
    return out
