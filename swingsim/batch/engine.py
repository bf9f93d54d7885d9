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

from swingsim.batch import dense, hook_engine
from swingsim.batch.measure import VariantFacts, measure_block, variant_facts
from swingsim.batch.segments import chunk_kinematics, integrate_steps, parameter_rows, segment_cubics
from swingsim.dynamics.pendulum import PointMassModel, accelerations, specific_force, wind_terms
from swingsim.dynamics.wind import BatchWind, WindField
from swingsim.dynamics.registry import select_model
from swingsim.metrics.single import summarize
from swingsim.motion.kinematics import AXES, Motion
from swingsim.motion.registry import build_profile, crane_boom, needs_swing_period
from swingsim.simulation import simulate

__all__ = ["run_batch", "run_chunk", "run_table_chunk", "SceneList", "supported", "chunks", "chunk_size_for", "SUMMARY_KEYS",
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
    "peak_hook_load_kN", "peak_line_pull_kN", "peak_leg_tension_kN", "peak_utilisation_pct",
    # tag lines and the ground (single-run solver only; empty for other rows)
    "peak_tag_line_pull_N", "liftoff_time_s", "drag_distance_m", "peak_swing_after_liftoff_deg",
    "touchdown_time_s", "touchdown_speed_m_s", "touchdown_swing_deg", "ground_drift_m",
)

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
        True when the suspension point stays at its height and the scene's model
        is the point-mass model or the hook-and-load model (``hook_engine.py``,
        unless its load rests for lift-off or its wind varies); other models (and
        a model extension that cannot be built), and a boom crane that luffs (its
        tip moves on an arc, which the vectorised kinematics leave out), go to the
        single-run solver.
    """
    return _point_mass(scene) or hook_engine.supported(scene)


def _point_mass(scene) -> bool:
    """Whether the point-mass path of this module integrates the scene."""
    if scene.crane.has_boom and any(m.axis == "radius" for m in scene.moves):
        return False
    try:
        return type(select_model(scene)) is PointMassModel
    except Exception:  # a model extension that cannot build: leave it to simulate
        return False


def _period(scene, L):
    return 2.0 * math.pi * math.sqrt(L / scene.gravity_m_s2)


@dataclass
class _Variant:
    scene: object
    motion: object
    model: object
    cuts: np.ndarray        # segment boundaries, 0 .. duration
    coef: np.ndarray        # (nseg, 5, 4) cubic coefficients per axis about each segment start
    hmax: float             # longest step [s]
    y0: np.ndarray
    rest: np.ndarray
    period0: float
    period_end: float
    L_end: float
    move_end: float
    suspension_z: float = 0.0  # height of the suspension point (the batch keeps it level) [m]


class _Cache:
    """What a chunk's preparation builds once and reuses: models per group, profiles per distinct move."""

    def __init__(self):
        self.models = {}
        self.profiles = {}
        self.cuts = {}
        self.at_start = {}   # profile key -> every move's (axis, position, velocity, acceleration) at t = 0
        self.starts = {}     # (group, moves at t = 0) -> (initial state, suspension height)
        self.ends = {}       # (group, final rope length) -> (rest direction, periods at start and end)


def _profiles_of(table, g, m, cache, model):
    """The move profiles of move combination ``m`` in group ``g`` (built once per distinct move)."""
    gs, ms = table.group_scene(g), table.move_scene(m)
    period = float(model.mode_periods_s()[0]) if needs_swing_period(ms) else None
    key = (m, period, gs.damping_ratio, gs.duration_s)
    got = cache.profiles.get(key)
    if got is None:
        got = tuple((mv.axis, build_profile(mv, gs, period)) for mv in ms.moves)
        cache.profiles[key] = got
    return key, got


def _cuts_and_coefficients(key, moves, T, cache, breakpoints=()):
    """Segment boundaries of a run and each axis's cubic coefficients on them (once per distinct move).

    ``breakpoints`` are the model's own (the wind's gust starts and ends) [s].
    """
    key = (key, tuple(breakpoints))
    got = cache.cuts.get(key)
    if got is not None:
        return got
    cuts, coef = segment_cubics(moves, T, breakpoints)
    cache.cuts[key] = (cuts, coef)
    return cuts, coef


def _step_grids(variants):
    """Every variant's step grid, for the whole chunk at once (padded with zero-length steps at the end).

    Each segment ``[c_j, c_j+1]`` of a variant gets ``n_j = max(1, ceil((c_j+1 - c_j) / hmax))``
    equal steps; step ``k`` of segment ``j`` ends at ``c_j + (c_j+1 - c_j) * (k / n_j)``, the same
    arithmetic for every variant, so a variant's grid does not depend on the others of its chunk.

    Returns
    -------
    tg : ndarray (B, N + 1)
        Step start times (the last column and the padding: the run's end) [s].
    sg : ndarray (B, N)
        Segment of each step (the padding: the last segment).
    total : ndarray of int (B,)
        Each variant's number of real steps.
    """
    B = len(variants)
    S = max(len(v.cuts) - 1 for v in variants)
    cuts = np.empty((B, S + 1))
    nseg = np.empty(B, dtype=np.intp)
    hmax = np.empty(B)
    for i, v in enumerate(variants):
        k = len(v.cuts)
        cuts[i, :k] = v.cuts
        cuts[i, k:] = v.cuts[-1]
        nseg[i] = k - 1
        hmax[i] = v.hmax
    real = np.arange(S)[None, :] < nseg[:, None]
    n = np.where(real, np.maximum(1, np.ceil(np.diff(cuts, axis=1) / hmax[:, None] - 1e-9)), 0).astype(np.intp)
    total = n.sum(axis=1)
    N = int(total.max())
    cum = np.cumsum(n, axis=1)
    k = np.arange(N)
    seg = np.zeros((B, N), dtype=np.intp)
    for j in range(S - 1):  # segment of each step: how many segment ends lie at or before it
        seg += k[None, :] >= cum[:, j:j + 1]
    inside = k[None, :] < total[:, None]
    seg = np.where(inside, seg, nseg[:, None] - 1)
    rows = np.arange(B)[:, None]
    first = (cum - n)[rows, seg]
    nn = n[rows, seg]
    c0, c1 = cuts[rows, seg], cuts[rows, seg + 1]
    with np.errstate(invalid="ignore", divide="ignore"):
        t = c0 + (c1 - c0) * ((k[None, :] - first) / nn)
    end = cuts[np.arange(B), nseg][:, None]
    tg = np.concatenate([np.where(inside, t, end), end], axis=1)
    return tg, seg, total


def _prepare_row(table, i, steps_per_period, cache) -> _Variant:
    """One variant of a columnar table, from its group's scene and its move combination's profiles.

    What depends only on the group and the crane's motion at t = 0 (the initial state) or
    at the end (the rest direction and the periods) is computed once per distinct value
    (``cache``) by the model's own methods, so rows that share it get the same floats.
    """
    g, m = int(table.group_ids[i]), int(table.move_ids[i])
    gs = table.group_scene(g)
    model = cache.models.get(g)
    if model is None:
        model = cache.models[g] = PointMassModel(gs)
    key, moves = _profiles_of(table, g, m, cache, model)
    motion = Motion(tuple(gs.crane.suspension_m), gs.rope.length_m, moves,
                    slew_center_m=tuple(gs.crane.slew_center_m), boom=crane_boom(gs.crane))
    T = gs.duration_s
    cuts, coef = _cuts_and_coefficients(key, moves, T, cache, model.extra_breakpoints)
    # shortest rope over the run -> shortest period -> step bound
    if any(ax == "hoist" for ax, _ in moves):
        Ls = motion.evaluate(np.union1d(cuts, np.linspace(0.0, T, 201)))["L"]
        Lmin = float(np.min(Ls))
        L_end = float(motion.evaluate(np.array([T]))["L"][0])
    else:
        Lmin = L_end = float(motion.rope_length_m)
    hmax = min(_period(gs, Lmin) / steps_per_period, model.max_step_s)
    # the initial state reads the motion at t = 0 only (Motion.evaluate sums the moves' values there)
    zero = cache.at_start.get(key)
    if zero is None:
        zero = cache.at_start[key] = tuple((ax, *(float(x) for x in prof.evaluate(0.0))) for ax, prof in moves)
    start = cache.starts.get((g, zero))
    if start is None:
        y0 = np.asarray(model.initial_state(motion), dtype=float)
        # the suspension point's height sets the wind's height (only a varying wind needs it)
        z0 = float(motion.evaluate(np.array([0.0]))["p"][0][2]) if model.wind is not None else 0.0
        start = cache.starts[(g, zero)] = (y0, z0)
    end = cache.ends.get((g, L_end))
    if end is None:
        # after initial_state: a sheared wind's rest lean reads the suspension height it set
        end = cache.ends[(g, L_end)] = (np.asarray(model.rest_direction(L_end)),
                                        float(model.mode_periods_s()[0]), float(model.mode_periods_s(L_end)[0]))
    return _Variant(gs, motion, model, cuts, coef, hmax, start[0], end[0], end[1], end[2],
                    L_end, motion.last_move_end_s, start[1])


def _prepare(scene, steps_per_period) -> _Variant:
    """One scene prepared for the batch (the data path of :func:`run_table_chunk`)."""
    return _prepare_row(SceneList([scene]), 0, steps_per_period, _Cache())


def _supported_row(table, i, verdicts) -> bool:
    """:func:`supported` for a row of a columnar table (decided once per group and move combination)."""
    key = (int(table.group_ids[i]), int(table.move_ids[i]))
    got = verdicts.get(key)
    if got is None:
        gs, ms = table.group_scene(key[0]), table.move_scene(key[1])
        if gs.crane.has_boom and any(mv.axis == "radius" for mv in ms.moves):
            got = False
        else:
            # the model depends on the group only: built once per group, not per move combination
            got = verdicts.get(("group", key[0]))
            if got is None:
                got = verdicts[("group", key[0])] = _point_mass(gs)
        verdicts[key] = got
    return got


# ----------------------------------------------------------------------------
# kinematics and right-hand side over a chunk


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


def _integrate(variants, grids=None) -> dense.IntegratedChunk:
    """Integrate a chunk; ``grids`` are its :func:`_step_grids` when already made.

    When the variants come longest run first (as :func:`_chunk_batch` orders them), a
    step integrates only the variants that still have a real step (no work on padding).
    """
    B = len(variants)
    tg, sg, total = _step_grids(variants) if grids is None else grids
    nseg = max(len(v.cuts) - 1 for v in variants)
    coef = np.zeros((B, nseg, len(AXES), 4))
    t0s = np.zeros((B, nseg))
    for i, v in enumerate(variants):
        k = len(v.cuts) - 1
        coef[i, :k] = v.coef
        t0s[i, :k] = v.cuts[:-1]
    kin = chunk_kinematics(variants)
    par = _force_parameters(variants)
    y0 = np.stack([v.y0 for v in variants], axis=1)  # (4, B)
    active = restrict = None
    if B > 1 and np.all(total[1:] <= total[:-1]):
        active = np.count_nonzero(total[None, :] > np.arange(tg.shape[1] - 1)[:, None], axis=1)

        def restrict(m):
            rows = np.arange(m)
            par_m = parameter_rows(par, rows, 1)
            return kin.rows(rows), lambda y, k, t: _rhs(y, k, par_m, t)

    Y, A0, A1 = integrate_steps(y0, (tg, sg, coef, t0s), kin, lambda y, k, t: _rhs(y, k, par, t),
                                active, restrict)
    return dense.IntegratedChunk(tg, sg, coef, t0s, Y, A0, A1, kin, par)


def _steps_upto(run: dense.IntegratedChunk, n: int) -> dense.IntegratedChunk:
    """The first ``n`` steps of a chunk (views): every row of interest has at most ``n`` real steps."""
    return dense.IntegratedChunk(run.step_times[:, :n + 1], run.step_segment[:, :n], run.segment_coef,
                                 run.segment_start, run.states[:n + 1], run.accel_start[:n], run.accel_end[:n],
                                 run.kinematics, run.forces)


def _facts(vs) -> VariantFacts:
    """What the summary needs to know of the variants ``vs``."""
    return variant_facts(vs, [x.model.par["m"] for x in vs], [x.model.par["g"] for x in vs],
                         [not bool(x.coef[:, AXES.index("hoist")].any()) for x in vs])


#: Rows of a chunk measured together (bounds the memory of the dense samples).
_MEASURE_ROWS = 256


def _chunk_batch(variants, samples_per_step):
    # longest runs first: a step integrates only the variants that still have one, and a block
    # of rows is measured over its own longest run (the padding of shorter runs costs nothing);
    # a variant's numbers do not depend on its place in the chunk
    grids = _step_grids(variants)
    order = np.argsort(-grids[2], kind="stable")
    vs = [variants[j] for j in order]
    tg, sg, total = (a[order] for a in grids)
    run = _integrate(vs, (tg, sg, total))
    sums, oks = [None] * len(vs), []
    for i in range(0, len(vs), _MEASURE_ROWS):
        sel = np.arange(i, min(i + _MEASURE_ROWS, len(vs)))
        part = _steps_upto(run, int(total[sel].max()))
        block = measure_block(dense.sample(part, sel, samples_per_step), _facts([vs[j] for j in sel]),
                              parameter_rows(run.forces, sel, 2),
                              lambda t0, sel=sel, part=part: dense.refine_peak_sq(part, sel, t0))
        for j, s in zip(sel, block.summaries):
            sums[order[j]] = s
        oks.append(block.ok)
    ok = np.empty(len(vs), dtype=bool)
    ok[order] = np.concatenate(oks)
    for k, s in enumerate(sums):
        s.update({"valid": True, "status": "ok", "model": "point-mass", "engine": "batch"})
        if not _all_finite(s):
            ok[k] = False  # a number the batch cannot vouch for: the single-run solver (and its final check) decides
    return sums, ok


def _all_finite(summary: dict) -> bool:
    """True when every number of a summary is finite (None stands for "not measured" and passes)."""
    for v in summary.values():
        if type(v) is float:
            if v - v != 0.0:  # inf - inf and nan - nan are nan
                return False
        elif isinstance(v, (float, np.floating)) and not isinstance(v, bool) and not math.isfinite(v):
            return False
    return True


def _single(scene) -> dict:
    """Summary of one scene by the single-run solver (the reference path)."""
    d = dict(summarize(simulate(scene)).data)
    d["engine"] = "single"
    return {k: d.get(k) for k in SUMMARY_KEYS}


class SceneList:
    """A list of scenes seen as a columnar table (each scene its own group and move combination).

    The batch engine's data path reads a *variant table*: ``n`` rows,
    ``group_ids`` and ``move_ids`` (int arrays numbering the distinct
    combinations of the keys outside the moves and of the move keys),
    ``group_scene(g)`` (a validated scene with group ``g``'s values: the model,
    crane, rope, duration and limits are read from it), ``move_scene(m)`` (a
    validated scene whose ``moves`` are combination ``m``'s) and ``scene(i)``
    (the full scene of row ``i``, for the single-run solver).  A sweep's
    :class:`swingsim.study.variants.VariantTable` is one; this class makes a
    plain list of scenes one.

    Parameters
    ----------
    scenes : sequence of Scene
        Validated scenes.
    """

    def __init__(self, scenes):
        self.scenes = list(scenes)
        self.n = len(self.scenes)
        self.group_ids = self.move_ids = np.arange(self.n)

    def group_scene(self, g):
        """The scene of row ``g``.

        Parameters
        ----------
        g : int
            Row.

        Returns
        -------
        Scene
            The scene.
        """
        return self.scenes[g]

    move_scene = scene = group_scene


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
    return run_table_chunk(SceneList(scenes), steps_per_period=steps_per_period,
                           samples_per_step=samples_per_step, engine=engine)


def run_table_chunk(table, rows=None, *, steps_per_period=DEFAULT_STEPS_PER_PERIOD,
                    samples_per_step=DEFAULT_SAMPLES_PER_STEP, engine="batch") -> list[dict]:
    """Summaries of rows of a columnar variant table (one chunk), in order.

    The table is read by column (see :class:`SceneList` for what it provides):
    a model is built once per group, the motion profiles and their cubic
    coefficients once per distinct move, and a full scene only for a row that
    goes to the single-run solver.

    Parameters
    ----------
    table : VariantTable or SceneList
        The variants.
    rows : sequence of int, optional
        Rows to run (default: every row).
    steps_per_period : int
        Fixed steps per shortest swing period of each variant.
    samples_per_step : int
        Dense samples per step for the summary.
    engine : {"batch", "single"}
        ``"single"`` solves every row with :func:`swingsim.simulation.simulate`.

    Returns
    -------
    list of dict
        One summary per row (keys :data:`SUMMARY_KEYS`; ``engine`` says which solver produced it).
    """
    rows = list(range(table.n)) if rows is None else [int(i) for i in rows]
    out: list = [None] * len(rows)
    todo = []
    if engine == "batch":
        verdicts: dict = {}
        todo = [k for k, i in enumerate(rows) if _supported_row(table, i, verdicts)]
    if todo:
        cache = getattr(table, "engine_cache", None)
        if not isinstance(cache, _Cache):
            cache = _Cache()
            if hasattr(table, "engine_cache"):
                table.engine_cache = cache  # profiles and grids reused by the next chunk of the same table
        variants = [_prepare_row(table, rows[k], steps_per_period, cache) for k in todo]
        sums, ok = _chunk_batch(variants, samples_per_step)
        for k, s, good in zip(todo, sums, ok):
            if good:
                out[k] = {key: s.get(key) for key in SUMMARY_KEYS}
    if engine == "batch":
        # the hook-and-load model (hook_engine.py, grouped by structure there), from full scenes
        hook = [k for k, i in enumerate(rows) if out[k] is None and hook_engine.supported(table.scene(i))]
        if hook:
            sums, ok = hook_engine.run_variants([table.scene(rows[k]) for k in hook],
                                                steps_per_period=steps_per_period,
                                                samples_per_step=samples_per_step)
            for k, s, good in zip(hook, sums, ok):
                if good and _all_finite(s):
                    out[k] = {key: s.get(key) for key in SUMMARY_KEYS}
    for k, i in enumerate(rows):
        if out[k] is None:
            out[k] = _single(table.scene(i))
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
