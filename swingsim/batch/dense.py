"""Dense output of the batch engine: the state between step ends, and peak refinement.

Between two step ends each direction component is the quintic Hermite
polynomial that matches its value, rate and acceleration at both ends (the end
acceleration evaluated on the step's own segment, so a step that ends at a
breakpoint uses its own side of the jump).  :func:`sample` evaluates it at equal
fractions of every step; :func:`refine_peak_sq` refines a maximum of
:math:`|n_h|^2` by Newton's method on the polynomial of its step.  Sums are
written out element by element (no BLAS), so a variant's samples do not depend
on the other variants of its chunk.

References
----------
Quintic Hermite interpolation: e.g. E. Hairer, S.P. Norsett, G. Wanner, *Solving
Ordinary Differential Equations I*, 2nd ed., Springer 1993, sec. II.6 (dense output
by Hermite interpolation).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from swingsim.batch.kinematics import ChunkKinematics, SuspensionRates

#: Quintic Hermite basis as polynomial coefficients in s (rows: basis function, cols: power),
#: for value, rate and acceleration at s = 0, then at s = 1.
_HP = np.array([[1, 0, 0, -10, 15, -6], [0, 1, 0, -6, 8, -3], [0, 0, 0.5, -1.5, 1.5, -0.5],
                [0, 0, 0, 10, -15, 6], [0, 0, 0, -4, 7, -3], [0, 0, 0, 0.5, -1, 0.5]], dtype=float)


@dataclass
class IntegratedChunk:
    """A chunk integrated by the batch engine: states at step ends and what the dense output needs.

    B variants, N steps (shorter runs padded with zero-length steps), nseg segments.
    """

    step_times: np.ndarray       # (B, N+1) step end times [s]
    step_segment: np.ndarray     # (B, N) segment of each step
    segment_coef: np.ndarray     # (B, nseg, 5, 4) cubic coefficients per axis about each segment start
    segment_start: np.ndarray    # (B, nseg) segment start times [s]
    states: np.ndarray           # (N+1, 4, B) u, v, du, dv at step ends
    accel_start: np.ndarray      # (N, 2, B) ddu, ddv at each step's start (right limit)
    accel_end: np.ndarray        # (N, 2, B) ddu, ddv at each step's end (left limit)
    kinematics: ChunkKinematics
    forces: dict                 # force parameters of the chunk (see engine._force_parameters)


class DenseSamples(NamedTuple):
    """Dense samples of some rows of a chunk, arrays (B, M) with M = N S + 1.

    ``u, v`` are the horizontal components of the unit rope direction, ``du, dv``
    their rates [1/s]; ``kinematics`` the crane's motion at the same instants;
    ``segment_start`` marks samples that open a segment after a breakpoint;
    ``real`` is False for the samples of padding steps.
    """

    time_s: np.ndarray
    u: np.ndarray
    v: np.ndarray
    du: np.ndarray
    dv: np.ndarray
    kinematics: SuspensionRates
    segment_start: np.ndarray
    real: np.ndarray


def _hermite_basis(s):
    """Quintic Hermite basis on [0, 1] and its derivative (value, rate, accel at both ends)."""
    s2, s3, s4, s5 = s**2, s**3, s**4, s**5
    H = np.stack([1 - 10 * s3 + 15 * s4 - 6 * s5,
                  s - 6 * s3 + 8 * s4 - 3 * s5,
                  0.5 * s2 - 1.5 * s3 + 1.5 * s4 - 0.5 * s5,
                  10 * s3 - 15 * s4 + 6 * s5,
                  -4 * s3 + 7 * s4 - 3 * s5,
                  0.5 * s3 - s4 + 0.5 * s5])
    dH = np.stack([-30 * s2 + 60 * s3 - 30 * s4,
                   1 - 18 * s2 + 32 * s3 - 15 * s4,
                   s - 4.5 * s2 + 6 * s3 - 2.5 * s4,
                   30 * s2 - 60 * s3 + 30 * s4,
                   -12 * s2 + 28 * s3 - 15 * s4,
                   1.5 * s2 - 4 * s3 + 2.5 * s4])
    return H, dH


def refine_peak_sq(run: IntegratedChunk, rows, t0, iterations=6):
    """Refine a maximum of :math:`|n_h|^2` on the dense interpolant, one per row.

    Newton's method on :math:`d(|n_h|^2)/dt = 0` with the quintic Hermite
    polynomial of the step containing ``t0`` (kept inside that step: a breakpoint
    is always a step end).

    Parameters
    ----------
    run : IntegratedChunk
        The integrated chunk.
    rows : ndarray of int
        Rows of the chunk to refine.
    t0 : ndarray (len(rows),) or (len(rows), K)
        Starting times, one or K per row [s] (K candidates refined in one pass).
    iterations : int
        Newton steps.

    Returns
    -------
    tuple of ndarray
        ``(time_s, horizontal_sq)``, shaped like ``t0``: where the iteration ended [s]
        and :math:`|n_h|^2` there [-] (-inf where the step has zero length or the
        state is not finite).
    """
    t0 = np.asarray(t0, dtype=float)
    flat = t0.ndim == 1
    if flat:
        t0 = t0[:, None]
    tg = run.step_times[rows]
    B, N1 = tg.shape
    r = np.arange(B)[:, None]
    t_end = tg[:, -1]
    k = np.minimum(np.sum(tg[:, None, 1:] <= t0[..., None], axis=2),
                   np.sum(tg[:, 1:] < t_end[:, None], axis=1)[:, None])
    k = np.clip(k, 0, N1 - 2)
    ta = tg[r, k]
    h = tg[r, k + 1] - ta
    hs = np.where(h > 0, h, 1.0)
    Y, A0, A1 = run.states, run.accel_start, run.accel_end
    rows = np.asarray(rows)[:, None]
    polys = []
    for q in (0, 1):
        c = (Y[k, q, rows], h * Y[k, q + 2, rows], h * h * A0[k, q, rows],
             Y[k + 1, q, rows], h * Y[k + 1, q + 2, rows], h * h * A1[k, q, rows])
        p = []
        for j in range(6):
            acc = c[0] * _HP[0, j]
            for m in range(1, 6):
                acc = acc + c[m] * _HP[m, j]
            p.append(acc)
        polys.append(p)

    def ev(p, s):
        val = p[5]
        d1 = 5.0 * p[5]
        d2 = 20.0 * p[5]
        for j in (4, 3, 2, 1, 0):
            val = val * s + p[j]
        for j in (4, 3, 2, 1):
            d1 = d1 * s + j * p[j]
        for j in (4, 3, 2):
            d2 = d2 * s + j * (j - 1) * p[j]
        return val, d1, d2

    s = np.clip((t0 - ta) / hs, 0.0, 1.0)
    with np.errstate(all="ignore"):
        for _ in range(iterations):
            u, u1, u2 = ev(polys[0], s)
            v, v1, v2 = ev(polys[1], s)
            g1 = u * u1 + v * v1
            g2 = u1 * u1 + u * u2 + v1 * v1 + v * v2
            step = np.where(g2 < 0, g1 / g2, 0.0)
            s = np.clip(s - step, 0.0, 1.0)
        u = ev(polys[0], s)[0]
        v = ev(polys[1], s)[0]
    good = (h > 0) & np.isfinite(u) & np.isfinite(v)
    t_out, x_out = ta + s * h, np.where(good, u * u + v * v, -np.inf)
    return (t_out[:, 0], x_out[:, 0]) if flat else (t_out, x_out)


def sample(run: IntegratedChunk, sel, samples_per_step: int) -> DenseSamples:
    """Dense samples of some rows of the chunk, with the crane's motion at the same instants.

    Parameters
    ----------
    run : IntegratedChunk
        The integrated chunk.
    sel : ndarray of int
        Rows to sample.
    samples_per_step : int
        Samples per step, at equal fractions of it (the step start included); the
        run's end is the last sample.

    Returns
    -------
    DenseSamples
        Times, states and kinematics, arrays (len(sel), N samples_per_step + 1).
    """
    S = samples_per_step
    Bs = len(sel)
    tg = run.step_times[sel]
    h = np.diff(tg, axis=1)[..., None]          # (b, N, 1)
    frac = np.arange(S) / S
    H, dH = _hermite_basis(frac)                # (6, S)
    # rows of this block, each quantity contiguous along time
    Y = np.ascontiguousarray(run.states[:, :, sel].transpose(2, 1, 0))       # (b, 4, N+1)
    A0 = np.ascontiguousarray(run.accel_start[:, :, sel].transpose(2, 1, 0))  # (b, 2, N)
    A1 = np.ascontiguousarray(run.accel_end[:, :, sel].transpose(2, 1, 0))
    h2 = h[..., 0]
    hs = np.where(h2 > 0, h2, 1.0)
    hh = h2 * h2
    moving = h2 > 0
    N = h2.shape[1]
    out = []
    for q in (0, 1):
        b0 = Y[:, q + 2, :-1]
        coefs = (Y[:, q, :-1], h2 * b0, hh * A0[:, q], Y[:, q, 1:], h2 * Y[:, q + 2, 1:], hh * A1[:, q])
        val = np.empty((Bs, N * S + 1))
        der = np.empty((Bs, N * S + 1))
        val_s = val[:, :-1].reshape(Bs, N, S)
        der_s = der[:, :-1].reshape(Bs, N, S)
        # one fraction at a time on contiguous (b, N) arrays, the basis weights as scalars;
        # explicit sums (not matmul/BLAS): the same rounding for every element
        for j in range(S):
            vj = coefs[0] * H[0, j]
            dj = coefs[0] * dH[0, j]
            for m in range(1, 6):
                vj = vj + coefs[m] * H[m, j]
                dj = dj + coefs[m] * dH[m, j]
            val_s[..., j] = vj
            der_s[..., j] = np.where(moving, dj / hs, b0)
        val[:, -1] = Y[:, q, -1]
        der[:, -1] = Y[:, q + 2, -1]
        out.extend((val, der))
    u, du, v, dv = out
    ts = np.concatenate([(tg[:, :-1, None] + frac * h).reshape(Bs, -1), tg[:, -1:]], axis=1)
    # kinematics at the samples, on each step's own segment
    ar = np.arange(Bs)[:, None]
    sg = run.step_segment[sel]
    cs = run.segment_coef[sel]
    c = np.zeros(sg.shape + cs.shape[2:])          # (b, N, 5, 4): only the axes that move
    for a in np.nonzero(run.kinematics.used)[0]:
        c[:, :, a, :] = cs[:, :, a, :][ar, sg]
    tau = (tg[:, :-1] - run.segment_start[sel][ar, sg])[..., None] + frac * h
    kin = run.kinematics.rows(sel)
    inside = kin(c, tau)
    last = kin(c[:, -1], (tg[:, -1] - run.segment_start[sel][ar[:, 0], sg[:, -1]]))
    kin_s = []
    for a, b in zip(inside, last):
        if np.ndim(a) == 0:
            kin_s.append(a)              # zero for every sample
        elif np.shape(a) != tau.shape:
            kin_s.append(np.reshape(a, (Bs, 1)))  # constant in time (a rope that is not hoisted)
        else:
            kin_s.append(np.concatenate([a.reshape(Bs, -1), np.asarray(b)[:, None]], axis=1))
    # samples at a step start that begins a new segment sit on a breakpoint
    kink = np.zeros(ts.shape, dtype=bool)
    kink[:, S:-1:S] = sg[:, 1:] != sg[:, :-1]
    # samples of the zero-length steps that pad a short run repeat its end: not real
    real = np.ones(ts.shape, dtype=bool)
    real[:, 1:] = ts[:, 1:] > ts[:, :-1]
    return DenseSamples(ts, u, v, du, dv, SuspensionRates(*kin_s), kink, real)
