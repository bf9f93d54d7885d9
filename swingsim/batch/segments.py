"""A variant's step grid for the batch engines, and the Runge-Kutta stage sums.

Each variant's crane motion is cut at its profile breakpoints and spline knots
into segments on which every axis is one cubic polynomial in time
(:func:`motion_segments`); each segment is divided into equal steps no longer
than a bound (:func:`step_grid`), so no step straddles a jump in the crane's
acceleration.  :func:`combine` forms the stage sums of the order-8 tableau
(``rk8.py``) element by element in a fixed order.  The point-mass engine
(``engine.py``) and the hook-and-load engine (``hook_engine.py``) share them.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from swingsim.batch import rk8
from swingsim.batch.kinematics import ChunkKinematics
from swingsim.motion import profiles
from swingsim.motion.kinematics import AXES

__all__ = ["segment_times", "motion_segments", "step_grid", "rope_lengths", "combine", "A_NZ", "B_NZ",
           "chunk_kinematics", "pack_grids", "parameter_rows", "integrate_steps", "PreparedVariant"]


@dataclass
class PreparedVariant:
    """One variant made ready for a batch engine: its model, motion, segments and step grid.

    Attributes
    ----------
    scene, motion, model : object
        The validated scene, its Motion and its model.
    cuts : ndarray
        Segment boundaries, 0 .. duration [s].
    coef : ndarray (nseg, 5, 4)
        Cubic coefficients per axis about each segment start.
    grid : ndarray
        Step end times [s].
    seg : ndarray
        Segment index of each step.
    y0 : ndarray
        Initial state.
    rest : ndarray (3,)
        Unit rope direction at rest at the final rope length.
    period0, period_end : float
        First swing period at the start and at the final rope length [s].
    L_end : float
        Rope length at the end [m].
    move_end : float
        End of the last move [s].
    suspension_z : float
        Height of the suspension point above the ground [m] (a varying wind's height;
        the batch engines take no crane whose tip changes height).
    """

    scene: object
    motion: object
    model: object
    cuts: np.ndarray
    coef: np.ndarray
    grid: np.ndarray
    seg: np.ndarray
    y0: np.ndarray
    rest: np.ndarray
    period0: float
    period_end: float
    L_end: float
    move_end: float
    suspension_z: float = 0.0

#: The non-zero weights of each stage of the tableau, in a fixed order.
A_NZ = [[(j, float(rk8.A[s, j])) for j in range(s) if rk8.A[s, j] != 0.0] for s in range(rk8.N_STAGES)]
#: The non-zero weights of the order-8 solution, in a fixed order.
B_NZ = [(j, float(rk8.B[j])) for j in range(rk8.N_STAGES) if rk8.B[j] != 0.0]


def combine(weights, K):
    """sum_j w_j K[j], element by element in a fixed order.

    Not ``tensordot`` (BLAS): a BLAS kernel may round an element differently
    depending on where it sits in the array, and a variant's result must not
    depend on the other variants of its chunk.

    Parameters
    ----------
    weights : list of tuple
        ``(stage j, weight w_j)`` pairs (:data:`A_NZ` row or :data:`B_NZ`) [-].
    K : ndarray (stages, ...)
        Stage derivatives [state units / s].

    Returns
    -------
    ndarray
        The weighted sum, shaped like one stage [state units / s].
    """
    j, w = weights[0]
    acc = w * K[j]
    for j, w in weights[1:]:
        acc += w * K[j]
    return acc


def segment_times(prof) -> set:
    """Instants where a profile stops being one cubic (breakpoints and spline knots).

    Parameters
    ----------
    prof : Profile
        A motion profile (:mod:`swingsim.motion.profiles`).

    Returns
    -------
    set of float
        The instants [s].
    """
    if isinstance(prof, profiles.SumProfile):
        out = set()
        for _, s, p in prof.parts:
            out |= {b + s for b in segment_times(p)}
        return out
    if isinstance(prof, profiles.SplineProfile):
        return {prof.start_s + float(x) for x in prof.spline.x}
    return set(float(b) for b in prof.breakpoints)


def motion_segments(motion, duration_s: float, breakpoints=()):
    """A run cut into segments on which every axis is one cubic, with the cubics.

    Parameters
    ----------
    motion : Motion
        The variant's crane motion.
    duration_s : float
        End of the run [s].
    breakpoints : sequence of float
        The model's own cuts (a gust's start and end: ``extra_breakpoints``) [s].

    Returns
    -------
    tuple
        ``(cuts, coef)``: see :func:`segment_cubics`.
    """
    return segment_cubics(motion.moves, duration_s, breakpoints)


def segment_cubics(moves, duration_s: float, breakpoints=()):
    """Segments on which every axis of some moves is one cubic, with the cubics.

    Parameters
    ----------
    moves : sequence of tuple
        ``(axis, profile)`` of each move (``Motion.moves``).
    duration_s : float
        End of the run [s].
    breakpoints : sequence of float
        The model's own cuts (a gust's start and end: ``extra_breakpoints``) [s].

    Returns
    -------
    tuple
        ``(cuts, coef)``: segment boundaries ``0 .. duration_s`` [s] and the cubic
        coefficients (nseg, 5, 4) per axis of :data:`~swingsim.motion.kinematics.AXES`
        about each segment's start (constant first) [axis units, per s^k].
    """
    T = duration_s
    pts = {0.0, T} | {float(b) for b in breakpoints if 0.0 < b < T}
    for _, prof in moves:
        pts |= {b for b in segment_times(prof) if 0.0 < b < T}
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
    for ax, prof in moves:
        # each profile is one cubic on each segment: read it off at two interior points
        pp, vv, aa = prof.evaluate(both)
        p, v, a = pp[:nseg], vv[:nseg], aa[:nseg]
        j = (aa[nseg:] - a) / (t2 - tm)
        c = np.stack([p - v * d + a * d**2 / 2 - j * d**3 / 6, v - a * d + j * d**2 / 2,
                      (a - j * d) / 2, j / 6], axis=-1)
        coef[:, AXES.index(ax)] += c
    return cuts, coef


def rope_lengths(motion, cuts):
    """Shortest rope length over a run and the length at its end.

    Parameters
    ----------
    motion : Motion
        The variant's crane motion.
    cuts : ndarray
        Its segment boundaries (:func:`motion_segments`) [s].

    Returns
    -------
    tuple of float
        ``(shortest, at_end)`` [m].
    """
    if any(ax == "hoist" for ax, _ in motion.moves):
        T = float(cuts[-1])
        Ls = motion.evaluate(np.union1d(cuts, np.linspace(0.0, T, 201)))["L"]
        return float(np.min(Ls)), float(motion.evaluate(np.array([T]))["L"][0])
    return float(motion.rope_length_m), float(motion.rope_length_m)


def step_grid(cuts, max_step_s: float):
    """Equal steps within each segment, none longer than ``max_step_s``.

    Parameters
    ----------
    cuts : ndarray
        Segment boundaries [s].
    max_step_s : float
        Longest step [s].

    Returns
    -------
    tuple of ndarray
        ``(grid, seg)``: step end times, the run's start and end included [s], and the
        segment of each step.
    """
    nseg = len(cuts) - 1
    n = np.maximum(1, np.ceil(np.diff(cuts) / max_step_s - 1e-9)).astype(int)
    seg = np.repeat(np.arange(nseg), n)
    first = np.repeat(np.cumsum(n) - n, n)
    k = np.arange(len(seg)) - first
    grid = np.append(cuts[seg] + (cuts[seg + 1] - cuts[seg]) * (k / n[seg]), cuts[-1])
    return grid, seg


def chunk_kinematics(variants) -> ChunkKinematics:
    """The crane's motion over a chunk of prepared variants.

    Parameters
    ----------
    variants : list
        Prepared variants, each with ``motion`` (its Motion) and ``coef`` (its
        segments' cubics, :func:`motion_segments`).

    Returns
    -------
    ChunkKinematics
        The chunk's vectorised kinematics (axes that move in no variant cost nothing).
    """
    used = np.zeros(len(AXES), dtype=bool)
    for v in variants:
        used |= np.any(v.coef != 0.0, axis=(0, 2))
    # the polar coordinates are taken about each variant's slew centre (only rates are needed)
    return ChunkKinematics([np.subtract(v.motion.origin_m, (*v.motion.slew_center_m, 0.0)) for v in variants],
                           [v.motion.rope_length_m for v in variants], used)


def pack_grids(variants):
    """The variants' step grids and segment cubics as chunk arrays (short runs padded).

    Parameters
    ----------
    variants : list
        Prepared variants, each with ``grid``, ``seg`` (:func:`step_grid`), ``cuts`` and
        ``coef`` (:func:`motion_segments`).

    Returns
    -------
    tuple of ndarray
        ``(step_times (B, N+1) [s], step_segment (B, N), segment_coef (B, nseg, 5, 4),
        segment_start (B, nseg) [s])``; a shorter run is padded with zero-length steps
        at its end.
    """
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
    return tg, sg, coef, t0s


def parameter_rows(par: dict, sel, ndim: int) -> dict:
    """Some rows of a chunk's parameters, shaped to broadcast over ``ndim`` axes.

    Parameters
    ----------
    par : dict
        Parameters, each an array (B,), a scalar (the same for every variant) or an
        object with ``select(rows)`` (a chunk's wind fields).
    sel : ndarray of int
        Rows to keep.
    ndim : int
        Dimensions of the arrays they will meet (rows first).

    Returns
    -------
    dict
        The same keys; arrays (len(sel), 1, ...), scalars unchanged.
    """
    out = {}
    for k, a in par.items():
        if hasattr(a, "select"):  # a per-variant object (the wind of swingsim.dynamics.wind.BatchWind)
            out[k] = a.select(sel)
            continue
        if isinstance(a, np.ndarray):
            a = a[sel]
            a = a.reshape(a.shape + (1,) * (ndim - 1))
        out[k] = a
    return out


def integrate_steps(y0, grids, kinematics, rhs, active=None, restrict=None):
    """Fixed steps of the order-8 tableau over a chunk, each variant on its own grid.

    Parameters
    ----------
    y0 : ndarray (2 n, B)
        Initial states: n coordinates, then their rates [state units].
    grids : tuple of ndarray
        The chunk's :func:`pack_grids`.
    kinematics : ChunkKinematics
        The chunk's crane motion (:func:`chunk_kinematics`).
    rhs : callable
        ``rhs(y, kin, t) -> dy/dt`` for states (2 n, B), the motion ``kin`` at the same
        instants (SuspensionRates) and those instants ``t`` (B,) [s] (a varying wind
        reads them) [state units / s].
    active : ndarray of int (N,), optional
        Rows that still have a real step at each step (non-increasing): the chunk's
        rows sorted by their number of steps, longest first.  Step ``k`` then
        integrates only the first ``active[k]`` rows; the others (their zero-length
        padding) keep their state, and their accelerations repeat their last end
        acceleration (the padding has zero length: the dense output never reads them).
        Every row is integrated at every step when None.
    restrict : callable, optional
        ``restrict(m) -> (kinematics, rhs)`` for the first ``m`` rows (needed with ``active``).

    Returns
    -------
    tuple of ndarray
        ``(states (N+1, 2 n, B), accel_start (N, n, B), accel_end (N, n, B))``: the
        states at the step ends, the accelerations at each step's start (right limit)
        and end (left limit, on the step's own segment) [state units, per s^2].
    """
    tg, sg, coef, t0s = grids
    n2, B = y0.shape
    nq = n2 // 2
    N = tg.shape[1] - 1
    ar = np.arange(B)
    nst = rk8.N_STAGES
    Y = np.empty((N + 1, n2, B))
    A0 = np.empty((N, nq, B))
    A1 = np.empty((N, nq, B))
    y = y0
    Y[0] = y
    K = np.empty((nst, n2, B))
    parts = {B: (kinematics, rhs)}  # the first m rows' kinematics and right-hand side, per m
    with np.errstate(all="ignore"):
        for k in range(N):
            m = B if active is None else int(active[k])
            if m < B:
                # rows m.. have finished (their padding): they keep their state
                if m == 0:
                    Y[k + 1] = Y[k]
                    A0[k] = A1[k] = A1[k - 1]
                    continue
                Y[k + 1, :, m:] = Y[k, :, m:]
                A0[k, :, m:] = A1[k, :, m:] = A1[k - 1, :, m:]
                if m not in parts:
                    parts[m] = restrict(m)
                y = Y[k, :, :m]
            kin_m, rhs_m = parts[m]
            Km = K if m == B else K[:, :, :m]
            arm = ar if m == B else ar[:m]
            seg = sg[:m, k]
            t0 = tg[:m, k]
            h = tg[:m, k + 1] - t0
            c = coef[arm, seg]
            tau0 = t0 - t0s[arm, seg]
            for s in range(nst):
                ys = y if s == 0 else y + h * combine(A_NZ[s], Km)
                Km[s] = rhs_m(ys, kin_m(c, tau0 + rk8.C[s] * h), t0 + rk8.C[s] * h)
            y = y + h * combine(B_NZ, Km)
            Y[k + 1, :, :m] = y
            A0[k, :, :m] = Km[0, nq:]
            # accelerations at the step's end on the step's own segment (left limit)
            A1[k, :, :m] = rhs_m(y, kin_m(c, tau0 + h), t0 + h)[nq:]
    return Y, A0, A1
