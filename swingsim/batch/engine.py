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
* Explicit Runge-Kutta of order 8, the 12-stage Dormand-Prince 8(5,3) tableau
  of scipy's ``DOP853`` (Hairer, Norsett & Wanner, *Solving Ordinary
  Differential Equations I*, 2nd ed., Springer 1993, sec. II.10), taken at a
  fixed step without error control.
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
  ``samples_per_step`` equal fractions of each step.  The summary numbers are
  measured on those samples by :func:`summaries_from_samples`: the rope-angle
  peaks are found from parabolas through three samples within one segment,
  then refined by Newton's method on the Hermite polynomial of their step;
  tension and excursion peaks by the parabolas.
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

from swingsim import constants as C
from swingsim.dynamics.pendulum import (PointMassModel, accelerations, specific_force,
                                tension_per_mass)
from swingsim.motion import profiles as P
from swingsim.motion.kinematics import AXES
from swingsim.simulation import prepare

__all__ = ["run_batch", "run_chunk", "supported", "chunks", "SUMMARY_KEYS",
           "summaries_from_samples", "DEFAULT_STEPS_PER_PERIOD"]

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


def _tableau():
    # The Dormand-Prince 8(5,3) coefficients as scipy ships them (scipy's own
    # DOP853 uses exactly these), so the batch engine and solve_ivp share them.
    from scipy.integrate._ivp import dop853_coefficients as d

    n = d.N_STAGES
    return np.array(d.A[:n, :n]), np.array(d.B), np.array(d.C[:n])


_A, _B, _C = _tableau()
# the non-zero weights of each stage, in a fixed order
_A_NZ = [[(j, float(_A[s, j])) for j in range(s) if _A[s, j] != 0.0] for s in range(len(_B))]
_B_NZ = [(j, float(_B[j])) for j in range(len(_B)) if _B[j] != 0.0]


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


# ----------------------------------------------------------------------------
# which variants the engine takes


def supported(scene) -> bool:
    """True when the batch engine integrates this scene (point-mass model)."""
    from swingsim.dynamics.registry import select_model

    try:
        return type(select_model(scene)) is PointMassModel
    except Exception:  # a model extension that cannot build: leave it to simulate
        return False


def _segment_times(prof) -> set:
    """Instants where a profile stops being one cubic (breakpoints and spline knots)."""
    if isinstance(prof, P.SumProfile):
        out = set()
        for _, s, p in prof.parts:
            out |= {b + s for b in _segment_times(p)}
        return out
    if isinstance(prof, P.SplineProfile):
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


def _prepare(scene, steps_per_period) -> _Variant:
    model, motion = prepare(scene, PointMassModel(scene))
    T = scene.duration_s
    pts = {0.0, T}
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
    hmax = _period(scene, Lmin) / steps_per_period
    n = np.maximum(1, np.ceil(np.diff(cuts) / hmax - 1e-9)).astype(int)
    seg = np.repeat(np.arange(nseg), n)
    first = np.repeat(np.cumsum(n) - n, n)
    k = np.arange(len(seg)) - first
    grid = np.append(cuts[seg] + (cuts[seg + 1] - cuts[seg]) * (k / n[seg]), T)
    rest = np.asarray(model.rest_direction(L_end)) if hasattr(model, "rest_direction") \
        else np.array([0.0, 0.0, -1.0])
    return _Variant(scene, motion, model, cuts, coef, grid, seg,
                    np.asarray(model.initial_state(motion), dtype=float), rest,
                    float(model.mode_periods_s()[0]), float(model.mode_periods_s(L_end)[0]),
                    L_end, motion.last_move_end_s)


# ----------------------------------------------------------------------------
# kinematics and right-hand side over a chunk


class _Kin:
    """Vectorised suspension-point and rope-length kinematics of a chunk."""

    def __init__(self, variants):
        self.x0 = np.array([v.motion.origin_m[0] for v in variants])
        self.y0 = np.array([v.motion.origin_m[1] for v in variants])
        self.rho0 = np.hypot(self.x0, self.y0)
        self.phi0 = np.arctan2(self.y0, self.x0)
        self.L0 = np.array([v.motion.rope_length_m for v in variants])
        used = np.zeros(len(AXES), dtype=bool)
        for v in variants:
            used |= np.any(v.coef != 0.0, axis=(0, 2))
        self.slewing = bool(used[AXES.index("slew")])
        self.radial = bool(used[AXES.index("radius")]) and not self.slewing
        self.cos0, self.sin0 = np.cos(self.phi0), np.sin(self.phi0)
        self.used = used

    def rows(self, sel):
        """The same kinematics restricted to rows ``sel`` of the chunk."""
        k = object.__new__(_Kin)
        k.x0, k.y0, k.rho0, k.phi0, k.L0, k.cos0, k.sin0 = (
            a[sel] for a in (self.x0, self.y0, self.rho0, self.phi0, self.L0, self.cos0, self.sin0))
        k.slewing, k.radial, k.used = self.slewing, self.radial, self.used
        return k

    def __call__(self, c, tau):
        """Kinematics at ``tau`` [s] after each segment start.

        ``c``: (B, ..., 5, 4) cubic coefficients per axis; ``tau``: (B, ...) or
        (B, ..., S).  Returns vx, vy, ax, ay (suspension point velocity and
        acceleration), L, dL, ddL (rope length) and the slew rate.
        """
        extra = tau.ndim - (c.ndim - 2)

        def poly(a, need_pos=True):
            k = c[..., a, :]
            k0, k1, k2, k3 = (k[..., i] for i in range(4))
            if extra:
                k0, k1, k2, k3 = (x[..., None] for x in (k0, k1, k2, k3))
            pos = k0 + tau * (k1 + tau * (k2 + tau * k3)) if need_pos else None
            vel = k1 + tau * (2.0 * k2 + 3.0 * tau * k3)
            acc = 2.0 * k2 + 6.0 * tau * k3
            return pos, vel, acc

        def ext(a):
            return a.reshape(a.shape + (1,) * (tau.ndim - 1))

        zero = 0.0  # a scalar: an axis that does not move costs no array work
        ix, iy, isl, ir, ih = range(5)
        # travel positions are not needed: the point-mass model sees only p' and p''
        X = poly(ix, False) if self.used[ix] else (zero, zero, zero)
        Y = poly(iy, False) if self.used[iy] else (zero, zero, zero)
        if self.used[ih]:
            H, dH, ddH = poly(ih)
            L, dL, ddL = ext(self.L0) - H, -dH, -ddH
        else:
            L, dL, ddL = ext(self.L0), zero, zero
        if self.slewing:
            S, dS, ddS = poly(isl)
            R, dR, ddR = poly(ir)
            rho = ext(self.rho0) + R
            phi = ext(self.phi0) + S
            cs, sn = np.cos(phi), np.sin(phi)
            ar = ddR - rho * dS * dS
            at = rho * ddS + 2.0 * dR * dS
            vx = X[1] + dR * cs - rho * dS * sn
            vy = Y[1] + dR * sn + rho * dS * cs
            ax = X[2] + ar * cs - at * sn
            ay = Y[2] + ar * sn + at * cs
            return vx, vy, ax, ay, L, dL, ddL, dS
        if self.radial:  # radius moves without slewing: a fixed direction
            R, dR, ddR = poly(ir, False)
            cs, sn = ext(self.cos0), ext(self.sin0)
            return (X[1] + dR * cs, Y[1] + dR * sn, X[2] + ddR * cs, Y[2] + ddR * sn,
                    L, dL, ddL, 0.0)
        return X[1], Y[1], X[2], Y[2], L, dL, ddL, 0.0


def _par(variants):
    keys = ("g", "zeta", "kd", "kr", "wx", "wy")
    out = {}
    for k in keys:
        a = np.array([v.model.par[k] for v in variants], dtype=float)
        # a scalar zero lets the force functions skip the term for the whole chunk
        out[k] = 0.0 if k != "g" and not np.any(a) else a
    return out


def _par_view(par, sel, ndim):
    out = {}
    for k, a in par.items():
        if isinstance(a, np.ndarray):
            a = a[sel]
            a = a.reshape(a.shape + (1,) * (ndim - 1))
        out[k] = a
    return out


def _rhs(y, kin, par):
    """Derivatives of the chunk's states y (4, B) with kinematics tuple ``kin``."""
    u, v, du, dv = y
    vx, vy, ax, ay, L, dL, ddL, om = kin
    w = np.sqrt(1.0 - u * u - v * v)
    fx, fy, fz = specific_force(u, v, w, du, dv, L, dL, vx, vy, 0.0, par, om)
    ddu, ddv = accelerations(u, v, du, dv, L, dL, ax, ay, 0.0, fx, fy, fz)
    return du, dv, ddu, ddv


# ----------------------------------------------------------------------------
# one chunk


@dataclass
class _Run:
    """The integrated chunk: states at step ends plus what the dense samples need."""

    tg: np.ndarray      # (B, N+1) step end times
    sg: np.ndarray      # (B, N) segment of each step
    coef: np.ndarray    # (B, nseg, 5, 4)
    t0s: np.ndarray     # (B, nseg) segment starts
    Y: np.ndarray       # (N+1, 4, B) states at step ends
    A0: np.ndarray      # (N, 2, B) ddu, ddv at each step's start (right limit)
    A1: np.ndarray      # (N, 2, B) ddu, ddv at each step's end (left limit)
    kin: _Kin
    par: dict


def _integrate(variants) -> _Run:
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
    kin = _Kin(variants)
    par = _par(variants)
    ar = np.arange(B)
    nst = len(_B)
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
                K[s] = _rhs(ys, kin(c, tau0 + _C[s] * h), par)
            y = y + h * _combine(_B_NZ, K)
            Y[k + 1] = y
            A0[k] = K[0, 2:]
            # accelerations at the step's end on the step's own segment (left limit)
            A1[k] = _rhs(y, kin(c, tau0 + h), par)[2:]
    return _Run(tg, sg, coef, t0s, Y, A0, A1, kin, par)


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
    vertex of its parabola when that vertex is a maximum inside the window; the best vertex or raw sample of the row is
    returned with its time.  Looking at every window, not only the one around
    the largest sample, finds the true peak when another swing's sample
    happens to lie higher, and windows never straddle a breakpoint.

    Returns
    -------
    idx, t_peak, x_peak : ndarray (B,)
        Sample index nearest the peak, its time [s] and value.
    cand : ndarray (B, top + 1)
        Only with ``top``: times of the ``top`` best vertices and of the largest
        sample, starting points for a finer search.
    """
    B, M = x.shape
    r = np.arange(B)
    xm = x if mask is None else np.where(mask, x, -np.inf)
    i = np.argmax(xm, axis=1)
    best_t, best = t[r, i], xm[r, i]
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


#: Quintic Hermite basis as polynomial coefficients in s (rows: basis function, cols: power).
_HP = np.array([[1, 0, 0, -10, 15, -6], [0, 1, 0, -6, 8, -3], [0, 0, 0.5, -1.5, 1.5, -0.5],
                [0, 0, 0, 10, -15, 6], [0, 0, 0, -4, 7, -3], [0, 0, 0, 0.5, -1, 0.5]], dtype=float)


def _newton_r2(run: _Run, rows, t0, iterations=6):
    """Refine a maximum of |n_h|^2 from ``t0`` on the dense interpolant of each row's step.

    Newton's method on d(|n_h|^2)/dt = 0 with the quintic Hermite polynomial of
    the step containing ``t0`` (kept inside that step: a breakpoint is always a
    step end).  Returns the time and the value reached.
    """
    tg = run.tg[rows]
    B, N1 = tg.shape
    r = np.arange(B)
    t_end = tg[:, -1]
    k = np.minimum(np.sum(tg[:, 1:] <= t0[:, None], axis=1), np.sum(tg[:, 1:] < t_end[:, None], axis=1))
    k = np.clip(k, 0, N1 - 2)
    ta = tg[r, k]
    h = tg[r, k + 1] - ta
    hs = np.where(h > 0, h, 1.0)
    polys = []
    for q in (0, 1):
        c = (run.Y[k, q, rows], h * run.Y[k, q + 2, rows], h * h * run.A0[k, q, rows],
             run.Y[k + 1, q, rows], h * run.Y[k + 1, q + 2, rows], h * h * run.A1[k, q, rows])
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
    return ta + s * h, np.where(good, u * u + v * v, -np.inf)


def _dense(run: _Run, sel, S: int):
    """Dense samples of rows ``sel``: times and states (B, M) with M = N S + 1."""
    Bs = len(sel)
    tg = run.tg[sel]
    h = np.diff(tg, axis=1)[..., None]          # (b, N, 1)
    frac = np.arange(S) / S
    H, dH = _hermite_basis(frac)                # (6, S)
    # rows of this block, each quantity contiguous along time
    Y = np.ascontiguousarray(run.Y[:, :, sel].transpose(2, 1, 0))     # (b, 4, N+1)
    A0 = np.ascontiguousarray(run.A0[:, :, sel].transpose(2, 1, 0))   # (b, 2, N)
    A1 = np.ascontiguousarray(run.A1[:, :, sel].transpose(2, 1, 0))
    out = []
    h2 = h[..., 0]
    hs = np.where(h2 > 0, h2, 1.0)[..., None]
    hh = h2 * h2
    for q in (0, 1):
        b0 = Y[:, q + 2, :-1]
        coefs = np.stack([Y[:, q, :-1], h2 * b0, hh * A0[:, q],
                          Y[:, q, 1:], h2 * Y[:, q + 2, 1:], hh * A1[:, q]], axis=-1)
        # explicit sums (not matmul/BLAS, see _combine): the same rounding for every element
        val = coefs[..., 0, None] * H[0]
        der = coefs[..., 0, None] * dH[0]
        for m in range(1, 6):
            val = val + coefs[..., m, None] * H[m]
            der = der + coefs[..., m, None] * dH[m]
        der = np.where(h > 0, der / hs, b0[..., None])
        out.append(np.concatenate([val.reshape(Bs, -1), Y[:, q, -1:]], axis=1))
        out.append(np.concatenate([der.reshape(Bs, -1), Y[:, q + 2, -1:]], axis=1))
    u, du, v, dv = out
    ts = np.concatenate([(tg[:, :-1, None] + frac * h).reshape(Bs, -1), tg[:, -1:]], axis=1)
    # kinematics at the samples, on each step's own segment
    ar = np.arange(Bs)[:, None]
    sg = run.sg[sel]
    cs = run.coef[sel]
    c = np.zeros(sg.shape + cs.shape[2:])          # (b, N, 5, 4): only the axes that move
    for a in np.nonzero(run.kin.used)[0]:
        c[:, :, a, :] = cs[:, :, a, :][ar, sg]
    tau = (tg[:, :-1] - run.t0s[sel][ar, sg])[..., None] + frac * h
    kin = run.kin.rows(sel)
    kk = kin(c, tau)
    kl = kin(c[:, -1], (tg[:, -1] - run.t0s[sel][ar[:, 0], sg[:, -1]]))
    kin_s = []
    for a, b in zip(kk, kl):
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
    return ts, (u, v, du, dv), kin_s, kink, real


def _measure(variants, run: _Run, sel, S: int):
    """Summary numbers and an ok flag for rows ``sel`` of the chunk."""
    vs = [variants[i] for i in sel]
    t, (u, v, du, dv), (vx, vy, ax, ay, L, dL, ddL, om), kink, real = _dense(run, sel, S)
    B, M = t.shape
    r = np.arange(B)
    par = _par_view(run.par, sel, 2)
    with np.errstate(all="ignore"):
        r2 = u * u + v * v
        w = np.sqrt(np.clip(1.0 - r2, 0.0, None))
        fx, fy, fz = specific_force(u, v, w, du, dv, L, dL, vx, vy, 0.0, par, om)
        tpm = tension_per_mass(u, v, du, dv, L, ddL, ax, ay, 0.0, fx, fy, fz)
        ndz = (u * du + v * dv) / w
        lvx = vx + dL * u + L * du
        lvy = vy + dL * v + L * dv
        lvz = -dL * w + L * ndz
        speed2 = lvx * lvx + lvy * lvy + lvz * lvz
    m = np.array([x.model.par["m"] for x in vs])
    g = np.array([x.model.par["g"] for x in vs])
    rest = np.stack([x.rest for x in vs])
    wlim = math.cos(math.radians(C.MODEL_ANGLE_LIMIT_DEG))
    # a run the model cannot carry on goes to the single-run solver (events, exact stop)
    ok = np.all(np.isfinite(r2) & np.isfinite(tpm), axis=1)
    ok &= np.all(tpm > 0.0, axis=1) & np.all(w > wlim, axis=1)
    n = (u, v, -w)

    def swing_at(rows, idx):
        a = [c[rows, idx] for c in n]
        q = rest[rows]
        cx = a[1] * q[:, 2] - a[2] * q[:, 1]
        cy = a[2] * q[:, 0] - a[0] * q[:, 2]
        cz = a[0] * q[:, 1] - a[1] * q[:, 0]
        return np.arctan2(np.sqrt(cx * cx + cy * cy + cz * cz),
                          a[0] * q[:, 0] + a[1] * q[:, 1] + a[2] * q[:, 2])

    info = {
        "move_end": np.array([x.move_end for x in vs]),
        "t_end": np.array([x.scene.duration_s for x in vs]),
        "period0": np.array([x.period0 for x in vs]),
        "period_end": np.array([x.period_end for x in vs]),
        "settle_rad": np.radians([x.scene.limits.settle_deg for x in vs]),
        "L0": np.array([x.scene.rope.length_m for x in vs]),
        "L_end": np.array([x.L_end for x in vs]),
        "fixed_length": np.array([not bool(x.coef[:, AXES.index("hoist")].any()) for x in vs]),
        "rest_vertical": np.all(rest[:, :2] == 0.0, axis=1),
        "kink": kink,
        "real": real,
        "newton": lambda t0: _newton_r2(run, sel, t0),
    }
    dot = u * rest[:, None, 0] + v * rest[:, None, 1] - w * rest[:, None, 2]
    sums = summaries_from_samples(t, r2, dot, swing_at, (u - rest[:, None, 0], v - rest[:, None, 1]),
                                  m[:, None] * tpm, m * g, L * L * r2, speed2, info)
    return sums, ok


def _row_sum(x):
    """Sum along each row, sequentially: trailing zeros (padding) do not change it.

    (``np.sum`` sums pairwise in blocks that depend on the row length.)
    """
    return np.cumsum(x, axis=1)[:, -1]


def summaries_from_samples(t, r2, dot, swing_at, off, tension_N, static_N, exc2, speed2, info):
    r"""Summary numbers of many runs from sampled arrays (one row per run).

    Parameters
    ----------
    t : ndarray (B, M)
        Sample times, non-decreasing along each row [s] (repeated samples allowed).
    r2 : ndarray (B, M)
        Squared horizontal part of the unit rope direction, |n_h|^2 (the rope
        angle grows with it).
    dot : ndarray (B, M)
        n . rest (the swing from the rest direction shrinks as it grows).
    swing_at : callable (rows, idx) -> ndarray
        Swing from the rest direction [rad] at the given samples.
    off : tuple of ndarray (B, M)
        Horizontal components of n - rest.
    tension_N : ndarray (B, M)
        Rope tension [N].
    static_N : ndarray (B,)
        Static rope load m g [N].
    exc2 : ndarray (B, M)
        Squared horizontal excursion of the load from the plumb line [m^2].
    speed2 : ndarray (B, M)
        Squared load speed [m^2/s^2].
    info : dict
        Arrays (B,): ``move_end``, ``t_end``, ``period0``, ``period_end``, ``settle_rad``,
        ``L0``, ``L_end``, ``rest_vertical``, ``fixed_length`` (no hoisting); optional arrays (B, N): ``kink`` (first sample
        of a segment after a breakpoint), ``real`` (False for padding samples); optional
        ``newton(t0) -> (t, r2)``, a local maximiser of ``r2`` on the dense interpolant.

    Returns
    -------
    list of dict
        One dict per row with the numeric keys of :data:`SUMMARY_KEYS`.

    Notes
    -----
    Definitions as in :mod:`swingsim.metrics.single`: the rope angle is
    :math:`\arctan2(|n_h|, -n_z)`; the swing is the angle between ``n`` and
    the rest direction; the residual is the largest after the last move's
    end; the settle time is when the swing last falls below
    ``limits.settle_deg`` (linear interpolation of the crossing), confirmed by
    at least one swing period of run after it; the measured period is the mean
    interval between upward zero crossings of the swing along its principal
    axis after the last move.  Peaks are refined by parabolas through three
    samples within one segment and, for the rope angle, by ``newton`` on the
    dense interpolant (as the single-run metrics refine on theirs).
    """
    B, M = t.shape
    r = np.arange(B)
    move_end = info["move_end"]
    post = t >= move_end[:, None] - 1e-12
    if "real" in info:
        post &= info["real"]
    anyp = post.any(axis=1)

    kink = info.get("kink")
    newton = info.get("newton")
    win = _windows(t, r2, kink) if M >= 3 else None
    i_pk, pk_t, pk, cand = _best_peak(t, r2, None, kink, top=3, win=win)
    i_res, _, res, cand_r = _best_peak(t, r2, post, kink, top=3, win=win)
    if newton is not None:
        # finer: Newton on the dense interpolant from the best few candidates; the parabolas
        # only give the starting points (their own vertex can overshoot beside a breakpoint)
        i_pk = np.argmax(r2, axis=1)
        pk, pk_t = r2[r, i_pk], t[r, i_pk]
        i_res = np.argmax(np.where(post, r2, -1.0), axis=1)
        res = np.where(post, r2, -1.0)[r, i_res]
        for j in range(cand.shape[1]):
            tn, xn = newton(cand[:, j])
            better = xn > pk
            pk = np.where(better, xn, pk)
            pk_t = np.where(better, tn, pk_t)
        lo = move_end - 1e-12
        for j in range(cand_r.shape[1]):
            tn, xn = newton(np.maximum(cand_r[:, j], move_end))
            better = (xn > res) & (tn >= lo) & anyp
            res = np.where(better, xn, res)
    pk_r2 = pk
    pk = np.arcsin(np.sqrt(np.clip(pk, 0.0, 1.0)))
    res = np.arcsin(np.sqrt(np.clip(res, 0.0, 1.0)))
    vertical = np.asarray(info.get("rest_vertical", np.zeros(B, dtype=bool)))
    rsw = res
    if not np.all(vertical):
        # the swing shrinks as dot grows: the peaks of 1 - dot, with 1 - dot = 2 sin^2(swing / 2);
        # rows hanging plumb at rest keep the rope angle (identical to the swing there)
        _, _, q = _best_peak(t, 1.0 - dot, post, kink)
        rsw = np.where(vertical, res, 2.0 * np.arcsin(np.sqrt(np.clip(q / 2.0, 0.0, 1.0))))
    # swing at the move's end (linear interpolation between the samples around it)
    j = np.clip(np.argmax(post, axis=1), 1, M - 1)
    ta, tb = t[r, j - 1], t[r, j]
    sa, sb_ = swing_at(r, j - 1), swing_at(r, j)
    wgt = np.clip(np.where(tb > ta, (move_end - ta) / np.where(tb > ta, tb - ta, 1.0), 1.0), 0.0, 1.0)
    sw_end = sa + wgt * (sb_ - sa)
    # excursion L |n_h|: with a constant rope its peak is L times the refined peak of |n_h|
    fixed = np.asarray(info.get("fixed_length", np.zeros(B, dtype=bool)))
    exc = info["L0"] * np.sqrt(np.clip(pk_r2, 0.0, 1.0))
    if not np.all(fixed):
        exc = np.where(fixed, exc, np.sqrt(np.maximum(_best_peak(t, exc2, None, kink)[2], 0.0)))
    Tmax = _best_peak(t, tension_N, None, kink)[2]
    Tmin = np.min(tension_N, axis=1)
    speed = np.sqrt(np.max(speed2, axis=1))

    # measured period
    ox, oy = off
    cnt = post.sum(axis=1)
    den = np.maximum(cnt, 1)
    mx = _row_sum(np.where(post, ox, 0.0)) / den
    my = _row_sum(np.where(post, oy, 0.0)) / den
    ox = np.where(post, ox - mx[:, None], 0.0)
    oy = np.where(post, oy - my[:, None], 0.0)
    sxx = _row_sum(ox * ox)
    syy = _row_sum(oy * oy)
    sxy = _row_sum(ox * oy)
    th = 0.5 * np.arctan2(2 * sxy, sxx - syy)
    x = ox * np.cos(th)[:, None] + oy * np.sin(th)[:, None]
    sgn = np.signbit(x)
    up = sgn[:, :-1] & ~sgn[:, 1:] & post[:, :-1] & post[:, 1:]
    ncross = up.sum(axis=1)
    i_first = np.argmax(up, axis=1)
    i_last = M - 2 - np.argmax(up[:, ::-1], axis=1)

    def cross_t(i):
        x0, x1 = x[r, i], x[r, i + 1]
        with np.errstate(all="ignore"):
            return t[r, i] - x0 * (t[r, i + 1] - t[r, i]) / (x1 - x0)

    amp = np.max(np.maximum(np.abs(ox), np.abs(oy)), axis=1)
    meas_ok = ((cnt > 10) & (info["t_end"] - move_end > 1.5 * info["period0"])
               & (amp > math.radians(0.02)) & (ncross >= 2))
    meas = np.where(meas_ok, (cross_t(i_last) - cross_t(i_first)) / np.maximum(ncross - 1, 1), np.nan)

    # settling
    thr = info["settle_rad"]
    above = post & (dot < np.cos(thr)[:, None])
    has_above = above.any(axis=1)
    kl = M - 1 - np.argmax(above[:, ::-1], axis=1)
    k1 = np.clip(kl + 1, 0, M - 1)
    a_ = swing_at(r, kl) - thr
    b_ = swing_at(r, k1) - thr
    with np.errstate(all="ignore"):
        tcross = np.where(a_ != b_, t[r, kl] + (t[r, k1] - t[r, kl]) * a_ / (a_ - b_), t[r, k1])
    confirm = (kl + 1 < M) & (info["t_end"] - t[r, kl] >= info["period_end"])
    settled_at = np.where(~has_above, move_end, np.where(confirm, tcross, np.nan))
    settled_at = np.where(anyp, settled_at, np.nan)

    out = []
    deg = 180.0 / math.pi
    cols = {
        "pk": pk * deg, "pk_t": pk_t, "res": res * deg, "rsw": rsw * deg, "swe": sw_end * deg,
        "exc": exc, "Tmax": Tmax / 1e3, "Tmin": Tmin / 1e3, "stat": static_N / 1e3,
        "df": Tmax / static_N, "speed": speed, "meas": meas, "set": settled_at,
    }
    cols = {k: a.tolist() for k, a in cols.items()}
    fin = math.isfinite
    me, L0, Le, p0 = move_end.tolist(), info["L0"].tolist(), info["L_end"].tolist(), info["period0"].tolist()
    ap = anyp.tolist()
    for b in range(B):
        st_at = cols["set"][b] if fin(cols["set"][b]) else None
        out.append({
            "last_move_end_s": me[b],
            "peak_rope_angle_deg": cols["pk"][b],
            "peak_rope_angle_time_s": cols["pk_t"][b],
            "residual_rope_angle_deg": cols["res"][b] if ap[b] else None,
            "residual_swing_deg": cols["rsw"][b] if ap[b] else None,
            "swing_at_move_end_deg": cols["swe"][b] if ap[b] else None,
            "peak_excursion_m": cols["exc"][b],
            "peak_rope_tension_kN": cols["Tmax"][b],
            "min_rope_tension_kN": cols["Tmin"][b],
            "static_rope_tension_kN": cols["stat"][b],
            "dynamic_factor": cols["df"][b],
            "peak_load_speed_m_s": cols["speed"][b],
            "rope_length_start_m": L0[b],
            "rope_length_end_m": Le[b],
            "natural_period_s": p0[b],
            "measured_period_s": cols["meas"][b] if fin(cols["meas"][b]) else None,
            "settle_time_s": None if st_at is None else st_at - me[b],
            "settled_at_s": st_at,
        })
    return out


#: Rows of a chunk measured together (bounds the memory of the dense samples).
_MEASURE_ROWS = 128


def _chunk_batch(variants, samples_per_step):
    run = _integrate(variants)
    sums, oks = [], []
    for i in range(0, len(variants), _MEASURE_ROWS):
        sel = np.arange(i, min(i + _MEASURE_ROWS, len(variants)))
        s, ok = _measure(variants, run, sel, samples_per_step)
        sums.extend(s)
        oks.append(ok)
    for s in sums:
        s.update({"valid": True, "status": "ok", "model": "point-mass", "engine": "batch"})
    return sums, np.concatenate(oks)


def _single(scene) -> dict:
    """Summary of one scene by the single-run solver (the reference path)."""
    from swingsim.simulation import simulate

    traj = simulate(scene)
    try:
        from swingsim.metrics.single import summarize
    except ImportError:  # pragma: no cover - metrics is part of the core
        summarize = None
    if summarize is not None:
        d = dict(summarize(traj).data)
    else:  # pragma: no cover
        d = {"valid": traj.valid, "status": traj.status}
    d["engine"] = "single"
    return {k: d.get(k) for k in SUMMARY_KEYS}


def run_chunk(scenes, *, steps_per_period=DEFAULT_STEPS_PER_PERIOD,
              samples_per_step=DEFAULT_SAMPLES_PER_STEP, engine="batch") -> list[dict]:
    """Summaries of a list of validated scenes (one chunk), in order.

    Parameters
    ----------
    scenes : list of Scene
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
    """Variants per chunk: about :data:`_CHUNK_VALUES` step states, at most 2048 variants.

    Arrays of about 2000 values keep numpy's loops in cache; more variants per
    chunk save little Python overhead and cost memory.
    """
    if not scenes:
        return 1
    sc = scenes[0]
    per = sc.duration_s / _period(sc, sc.rope.length_m) * steps_per_period
    return int(max(16, min(2048, _CHUNK_VALUES // max(per, 1.0))))


def chunks(n: int, size: int) -> list[range]:
    """Index ranges of consecutive chunks (the unit of work in-process and on Dask)."""
    return [range(i, min(i + size, n)) for i in range(0, n, size)]


def run_batch(scenes, *, chunk_size=None, progress=None, **kw) -> list[dict]:
    """Summaries of many scenes, in chunks (see :func:`run_chunk`).

    ``progress(n_done)`` is called after each chunk.
    """
    scenes = list(scenes)
    size = chunk_size or chunk_size_for(scenes)
    out = []
    for r in chunks(len(scenes), size):
        out.extend(run_chunk([scenes[i] for i in r], **kw))
        if progress:
            progress(len(r))
    return out
