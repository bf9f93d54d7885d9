"""The batch engine for the hook-and-load model: hook block, rigid loads on rigging, elastic rope.

The same method as the point-mass batch engine (``engine.py``): the 12-stage
order-8 Dormand-Prince tableau (``rk8.py``) at fixed steps, each variant on its
own grid cut at its profile breakpoints and spline knots (``segments.py``), the
state between steps the quintic Hermite interpolant (``dense.py``) of every
coordinate, the summary measured through :mod:`swingsim.metrics.definitions`
(``measure.py``).  The right-hand side is
:func:`swingsim.dynamics.hook_load.equations_of_motion`, the function the
single-run solver calls, here on arrays of variants
(:class:`~swingsim.dynamics.hook_load.ArrayArithmetic`): one set of equations.

Groups and steps
----------------
Variants of one batch share the model's structure
(:attr:`~swingsim.dynamics.hook_load.HookLoadModel.structure`: the same
coordinates and terms); :func:`run_variants` groups them by it.  The step is at
most ``T / steps_per_period`` with T the variant's shortest period: the
shortest swing mode at the shortest rope of the run (a rigid load's tilt or the
whip of a load under its hook block is often much faster than the pendulum) and,
for an elastic rope, its bounce.

What goes to the single-run solver
----------------------------------
A variant whose run the model cannot carry on: the hoist rope going slack (or an
elastic rope's pull falling to zero), the leg below a hook block going slack, the
rope, that leg or the load's tilt reaching the model's angle limit, or a state
that is not finite, as seen on the dense samples.  The single-run solver then
stops at the event and reports it.  A load that rests for lift-off
(``start.rope_preload = "lift-off"``; its equations change at an instant found by
root finding), a boom that luffs, and a scene with tag lines or ground contact (the
ground's friction is stiff) are not taken at all (:func:`supported`).

Memory is bounded by integrating a group in slices of at most about 6 million
stored step values and measuring it a few rows at a time.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields

import numpy as np

from swingsim import constants
from swingsim.batch import dense
from swingsim.batch.measure import (VariantFacts, chart_utilisation_pct, direction_runs, summaries_from_samples,
                                    variant_facts)
from swingsim.batch.segments import (PreparedVariant, chunk_kinematics, integrate_steps, motion_segments,
                                     pack_grids, parameter_rows, rope_lengths, step_grid)
from swingsim.dynamics.hook_load import PARAMETER_NAMES, ArrayArithmetic, HookLoadModel, equations_of_motion
from swingsim.dynamics.registry import select_model
from swingsim.dynamics.rope import ElasticRope
from swingsim.dynamics.wind import BatchWind, WindField, rope_end_wind
from swingsim.simulation import prepare

__all__ = ["supported", "run_variants"]

#: Stored step values (steps x states x variants) per integrated slice of a group.
_SLICE_VALUES = 6_000_000
#: Sample points evaluated together when measuring (bounds the equations' temporaries).
_MEASURE_POINTS = 40_000
#: Drag, wind and heading terms: a scalar zero when zero in the whole slice (the term is skipped).
_SKIPPABLE = ("rope_drag_k", "end_drag_k", "load_drag_k", "yaw_start_rad", "yaw_stiffness_N_m_per_rad",
              "wc0", "wc1", "wc2")


def supported(scene) -> bool:
    """Whether this engine integrates the scene.

    Parameters
    ----------
    scene : Scene
        A validated scene.

    Returns
    -------
    bool
        True for a scene of the hook-and-load model (hook block, rigid load,
        elastic rope, sling leg), unless its load rests for lift-off, a boom
        crane luffs, or it has tag lines or ground contact (these go to the
        single-run solver).  A wind varying in time
        or height (gusts, turbulence, a profile) is taken.
    """
    if scene.crane.has_boom and any(m.axis == "radius" for m in scene.moves):
        return False
    try:
        model = select_model(scene)
    except Exception:  # a model that cannot build: leave it to simulate, which reports it
        return False
    # tag lines and ground contact go to the single-run solver: the ground's friction is stiff
    # (LSODA there), and the lines' geometry is not among the swept parameters
    return isinstance(model, HookLoadModel) and not model.starts_resting and model.contacts is None


def _prepare(scene, steps_per_period) -> PreparedVariant:
    model, motion = prepare(scene)
    cuts, coef = motion_segments(motion, scene.duration_s, model.extra_breakpoints)
    Lmin, L_end = rope_lengths(motion, cuts)
    L0 = float(motion.rope_length_m)
    periods0 = model.mode_periods_s()
    shortest = min(periods0 if Lmin == L0 else model.mode_periods_s(Lmin))
    if model.rope_is_elastic:
        shortest = min(shortest, model.bounce_period_s(Lmin))
    # turbulence bounds the step too (the model's max_step_s, as the single run's solver obeys it)
    grid, seg = step_grid(cuts, min(shortest / steps_per_period, model.max_step_s))
    y0 = np.asarray(model.initial_state(motion), dtype=float)
    period_end = periods0[0] if L_end == L0 else model.mode_periods_s(L_end)[0]
    # the suspension point's height sets the wind's heights (only a varying wind needs it)
    pz = float(motion.evaluate(np.array([0.0]))["p"][0][2]) if model.wind is not None else 0.0
    return PreparedVariant(scene, motion, model, cuts, coef, grid, seg, y0, np.asarray(model.rest_direction(L_end)),
                           float(periods0[0]), float(period_end), L_end, motion.last_move_end_s, pz)


# ----------------------------------------------------------------------------
# the equations over a slice of variants


@dataclass
class _Equations:
    """What the equations read of a slice of variants, arrays (B,) or shared scalars.

    ``wind`` is the steady wind ``(wx, wy)``; ``field`` (a :class:`BatchWind`, or None
    when no variant's wind varies) and ``pz`` (the suspension points' heights [m]) give
    a varying one, read through :func:`~swingsim.dynamics.wind.rope_end_wind` as the
    single run reads it.
    """

    structure: object
    par: dict
    rope: object
    wind: tuple
    field: object = None
    pz: object = 0.0

    def rows(self, sel, ndim):
        """The same for some rows, shaped to broadcast over ``ndim`` axes."""
        rope = None
        if self.rope is not None:
            rope = ElasticRope(**{f.name: (parameter_rows({"x": getattr(self.rope, f.name)}, sel, ndim)["x"]
                                           if f.name != "source" else "") for f in fields(ElasticRope)})
        wind = parameter_rows({"x": self.wind[0], "y": self.wind[1], "field": self.field, "pz": self.pz}, sel, ndim)
        return _Equations(self.structure, parameter_rows(self.par, sel, ndim), rope, (wind["x"], wind["y"]),
                          wind["field"], wind["pz"])

    def evaluate(self, q, qd, kin, t=None, details=False):
        """Accelerations (or details) at states ``q, qd`` with the crane's motion ``kin`` (SuspensionRates)
        at times ``t`` (shaped as the states; a varying wind reads them)."""
        k = (kin.vx, kin.vy, 0.0, kin.ax, kin.ay, 0.0, kin.rope_length, kin.rope_rate, kin.rope_accel,
             kin.slew_rate)
        wind = self.wind if self.field is None else rope_end_wind(self.field, t, self.pz)
        return equations_of_motion(q, qd, k, self.par, self.rope, wind, self.structure, ArrayArithmetic,
                                   details)


def _equations(variants) -> _Equations:
    models = [v.model for v in variants]
    given = [m.equation_parameters() for m in models]
    par = {}
    for k in PARAMETER_NAMES:
        a = np.array([p[k] for p in given], dtype=float)
        par[k] = 0.0 if (k in _SKIPPABLE and not np.any(a)) else a
    wind = []
    for j in range(2):
        a = np.array([m.wind_velocity_m_s()[j] for m in models], dtype=float)
        wind.append(a if np.any(a) else 0.0)
    rope = None
    if models[0].rope_is_elastic:
        rope = ElasticRope(**{f.name: (np.array([getattr(m.elastic_rope, f.name) for m in models], dtype=float)
                                       if f.name != "source" else "") for f in fields(ElasticRope)})
    field, pz = None, 0.0
    if any(m.wind is not None for m in models):
        # gusts, turbulence or a profile: every variant's wind field (steady ones included)
        field = BatchWind([v.model.wind or WindField(v.scene.wind, v.scene.duration_s) for v in variants])
        pz = np.array([v.suspension_z for v in variants])
    return _Equations(models[0].structure, par, rope, tuple(wind), field, pz)


def _rhs(y, kin, eq, t):
    nq = eq.structure.n_coordinates
    qdd = eq.evaluate([y[i] for i in range(nq)], [y[nq + i] for i in range(nq)], kin, t)
    return np.concatenate([y[nq:], qdd.T])


@dataclass
class _Run:
    step_times: np.ndarray
    step_segment: np.ndarray
    segment_coef: np.ndarray
    segment_start: np.ndarray
    states: np.ndarray       # (N+1, 2 nq, B)
    accel_start: np.ndarray  # (N, nq, B)
    accel_end: np.ndarray    # (N, nq, B)
    kinematics: object
    equations: _Equations


def _integrate(variants) -> _Run:
    grids = pack_grids(variants)
    kin = chunk_kinematics(variants)
    eq = _equations(variants)
    Y, A0, A1 = integrate_steps(np.stack([v.y0 for v in variants], axis=1), grids, kin,
                                lambda y, k, t: _rhs(y, k, eq, t))
    tg, sg, coef, t0s = grids
    return _Run(tg, sg, coef, t0s, Y, A0, A1, kin, eq)


def _pair(run: _Run, sel, i, j) -> dense.IntegratedChunk:
    """Rows ``sel`` of the run as the dense output of coordinates i and j."""
    nq = run.equations.structure.n_coordinates
    return dense.IntegratedChunk(
        run.step_times[sel], run.step_segment[sel], run.segment_coef[sel], run.segment_start[sel],
        run.states[:, :, sel][:, [i, j, nq + i, nq + j]], run.accel_start[:, :, sel][:, [i, j]],
        run.accel_end[:, :, sel][:, [i, j]], run.kinematics.rows(sel), {})


# ----------------------------------------------------------------------------
# measuring


def _facts(vs) -> VariantFacts:
    # the load's excursion is measured, not L |n_h|
    return variant_facts(vs, [x.model.hanging_mass_kg for x in vs], [x.model.gravity_m_s2 for x in vs],
                         np.zeros(len(vs), dtype=bool))


def _details(eq: _Equations, q, qd, kin, sel, t):
    """The equations' details at the samples of rows ``sel`` (arrays (b, M)) at times ``t``, a few points at a time."""
    b, M = q[0].shape
    out = {k: np.empty((b, M)) for k in ("T", "T_raw", "leg", "gx", "gy", "gvx", "gvy", "gvz")}
    step = max(1, _MEASURE_POINTS // M)
    for r0 in range(0, b, step):
        r = slice(r0, min(r0 + step, b))
        rows = np.arange(r.start, r.stop)
        sub = eq.rows(sel[rows], 2)
        k = type(kin)(*(x[r] if np.ndim(x) == 2 else x for x in kin))
        d = sub.evaluate([x[r] for x in q], [x[r] for x in qd], k, t[r], details=True)
        out["T"][r] = d["rope_tension_N"]
        out["T_raw"][r] = d["rope_tension_raw_N"] if d["rope_tension_raw_N"] is not None else d["rope_tension_N"]
        out["leg"][r] = d["leg_tension_N"] if d["leg_tension_N"] is not None else np.inf
        out["gx"][r], out["gy"][r] = d["load_pos_m"][0], d["load_pos_m"][1]
        out["gvx"][r], out["gvy"][r], out["gvz"][r] = d["load_vel_m_s"]
    return out


def _measure(run: _Run, variants, sel, samples_per_step):
    """Summaries of rows ``sel`` of an integrated slice, and whether each run holds."""
    st = run.equations.structure
    nq = st.n_coordinates
    local = np.arange(len(sel))
    first = _pair(run, sel, 0, 1)
    s01 = dense.sample(first, local, samples_per_step)
    q, qd = [s01.u, s01.v], [s01.du, s01.dv]
    for i in range(2, nq, 2):
        j = min(i + 1, nq - 1)
        s = dense.sample(_pair(run, sel, i, j), local, samples_per_step)
        q += [s.u, s.v][: j - i + 1]
        qd += [s.du, s.dv][: j - i + 1]
    kin = s01.kinematics
    u1, v1 = q[0], q[1]
    vs = [variants[i] for i in sel]
    facts = _facts(vs)
    with np.errstate(all="ignore"):
        d = _details(run.equations, q, qd, kin, sel, s01.time_s)
        r2 = u1 * u1 + v1 * v1
        w1 = np.sqrt(np.clip(1.0 - r2, 0.0, None))
        # a run the model cannot carry on goes to the single-run solver (events, exact stop)
        wlim = math.cos(math.radians(constants.MODEL_ANGLE_LIMIT_DEG))
        ok = np.all(np.isfinite(np.stack(q + qd)), axis=(0, 2)) & np.all(np.isfinite(d["T"]), axis=1)
        ok &= np.all(w1 > wlim, axis=1)
        weight = facts.mass_kg * facts.gravity_m_s2
        if st.rope_length_index is not None:  # as the single run's slack event
            ok &= np.all(d["T_raw"] + 1e-9 * weight[:, None] > 0.0, axis=1)
        else:
            ok &= np.all(d["T"] > 0.0, axis=1)
        if st.leg_below_hook:
            load_weight = np.array([v.model.load_mass_kg * v.model.gravity_m_s2 for v in vs])
            ok &= np.all(d["leg"] + 1e-9 * load_weight[:, None] > 0.0, axis=1)
            ok &= np.all(1.0 - q[2] ** 2 - q[3] ** 2 > wlim * wlim, axis=1)
        if st.tilt_index is not None:
            ia = st.tilt_index
            ok &= np.all(np.cos(q[ia]) * np.cos(q[ia + 1]) > wlim, axis=1)
    # the sling leg's tension as the model defines it for a single leg: the leg's own below a
    # hook block, the hoist rope's when the leg hangs straight on from the rope's end; a bridle's
    # or spreader's legs (resolved by the model's rigging geometry) are left to the single run
    single = np.array([v.model.rigging_kind == "single" for v in vs])
    leg = np.where(single[:, None], d["leg"] if st.leg_below_hook else d["T"], np.nan)
    ell = q[st.rope_length_index] if st.rope_length_index is not None else kin.rope_length
    hook = (ell * u1, ell * v1) if st.rope_end_is_hook else None  # the hook block hangs at the rope's end
    util = chart_utilisation_pct(facts, s01.time_s, (u1, v1, -w1), d["T"], (d["gx"], d["gy"]), hook)
    runs = direction_runs(s01, u1, v1, w1, facts.rest_direction, d["T"], d["gx"], d["gy"],
                          (d["gvx"], d["gvy"], d["gvz"]), leg_tension_N=leg, utilisation_pct=util)
    sums = summaries_from_samples(runs, facts, lambda t0: dense.refine_peak_sq(first, local, t0))
    for v, s in zip(vs, sums):
        s.update({"valid": True, "status": "ok", "model": v.model.name, "engine": "batch"})
    return sums, ok


def _slices(variants):
    """Consecutive slices of a group whose stored steps stay within the memory bound."""
    out, cur, longest = [], [], 0
    nq = variants[0].model.n_coordinates
    for i, v in enumerate(variants):
        if cur and max(longest, len(v.grid)) * 2 * nq * (len(cur) + 1) > _SLICE_VALUES:
            out.append(cur)
            cur, longest = [], 0
        cur.append(i)
        longest = max(longest, len(v.grid))
    if cur:
        out.append(cur)
    return out


#: Rows of a slice measured together.
_MEASURE_ROWS = 64


def run_variants(scenes, *, steps_per_period, samples_per_step):
    """Summaries of scenes this engine supports (:func:`supported`), grouped by structure.

    Parameters
    ----------
    scenes : list of Scene
        Validated scenes of the hook-and-load model.
    steps_per_period : int
        Fixed steps per shortest period of each variant (module docstring).
    samples_per_step : int
        Dense samples per step for the summary.

    Returns
    -------
    tuple of list
        ``(summaries, ok)`` in the order of ``scenes``: one dict per scene (the keys of
        the batch summary) and whether the batch run holds (False: hand the scene to the
        single-run solver, which stops at the event and reports it).
    """
    variants = [_prepare(sc, steps_per_period) for sc in scenes]
    sums: list = [None] * len(scenes)
    oks = [False] * len(scenes)
    groups: dict = {}
    for i, v in enumerate(variants):
        groups.setdefault(v.model.structure, []).append(i)
    for idx in groups.values():
        members = [variants[i] for i in idx]
        for part in _slices(members):
            vs = [members[k] for k in part]
            run = _integrate(vs)
            for r0 in range(0, len(vs), _MEASURE_ROWS):
                sel = np.arange(r0, min(r0 + _MEASURE_ROWS, len(vs)))
                block, ok = _measure(run, vs, sel, samples_per_step)
                for k, s, good in zip(sel, block, ok):
                    i = idx[part[k]]
                    sums[i], oks[i] = s, bool(good)
    return sums, oks
