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

import numpy as np

from swingsim.batch import rk8
from swingsim.batch.kinematics import ChunkKinematics
from swingsim.motion import profiles
from swingsim.motion.kinematics import AXES

__all__ = ["segment_times", "motion_segments", "step_grid", "rope_lengths", "combine", "A_NZ", "B_NZ",
           "chunk_kinematics", "pack_grids", "parameter_rows"]

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


def motion_segments(motion, duration_s: float):
    """A run cut into segments on which every axis is one cubic, with the cubics.

    Parameters
    ----------
    motion : Motion
        The variant's crane motion.
    duration_s : float
        End of the run [s].

    Returns
    -------
    tuple
        ``(cuts, coef)``: segment boundaries ``0 .. duration_s`` [s] and the cubic
        coefficients (nseg, 5, 4) per axis of :data:`~swingsim.motion.kinematics.AXES`
        about each segment's start (constant first) [axis units, per s^k].
    """
    T = duration_s
    pts = {0.0, T}
    for _, prof in motion.moves:
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
    for ax, prof in motion.moves:
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
        Parameters, each an array (B,) or a scalar (the same for every variant).
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
        if isinstance(a, np.ndarray):
            a = a[sel]
            a = a.reshape(a.shape + (1,) * (ndim - 1))
        out[k] = a
    return out
