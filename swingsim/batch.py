"""Integrate many variants of a scene at once: a vectorised fixed-step integrator.

The batch engine integrates the point-mass model (``dynamics/pendulum.py``)
for a whole chunk of variants together: every array operation acts on all the
variants of the chunk, so the Python-level cost of a step is paid once per
chunk, not once per variant.  Variants whose model the engine does not handle,
or whose run the model cannot carry on (slack rope, swing at the model's
limit, non-finite state), are solved one by one with :func:`swingsim.solve.simulate`
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
  measured on those samples by :func:`summaries_from_samples` (peaks refined by
  a parabola through the three samples around the largest one).

The default step (``steps_per_period = 12``) comes from a measurement against
``solve_ivp`` (DOP853, rtol 1e-12), see ``tests/test_batch.py`` and
``benchmarks/bench_batch.py``: rope-angle errors stay below 1e-4 deg for swings
up to 60 deg.

Memory is bounded by processing the variants in chunks of ``chunk_size``
(default: sized to keep each sampled array below about 4 million values).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from . import constants as C
from .dynamics.pendulum import (PointMassModel, accelerations, specific_force,
                                tension_per_mass)
from .motion import profiles as P
from .motion.build import build_motion
from .motion.crane import AXES

__all__ = ["run_batch", "run_chunk", "supported", "chunks", "SUMMARY_KEYS",
           "summaries_from_samples", "DEFAULT_STEPS_PER_PERIOD"]

#: Fixed steps per shortest swing period (see the module docstring).
DEFAULT_STEPS_PER_PERIOD = 12
#: Samples of the dense interpolant per step.
DEFAULT_SAMPLES_PER_STEP = 4
#: Target number of values per sampled array of a chunk.
_CHUNK_VALUES = 4_000_000

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
    from .solve import select_model

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
    motion = build_motion(scene)
    model = PointMassModel(scene)
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
    for ax, prof in motion.moves:
        # each profile is one cubic on each segment: read it off at two interior points
        p, v, a = prof.evaluate(tm)
        j = (prof.evaluate(t2)[2] - a) / (t2 - tm)
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
    grid = np.concatenate([np.linspace(cuts[j], cuts[j + 1], n[j] + 1)[:-1] for j in range(nseg)] + [[T]])
    seg = np.repeat(np.arange(nseg), n)
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
        self.slewing = bool(used[AXES.index("slew")] or used[AXES.index("radius")])
        self.used = used

    def __call__(self, c, tau):
        """c: (..., 5, 4) coefficients; tau: time from segment start, broadcast with c[..., 0, 0]."""

        def poly(a):
            k = c[..., a, :]
            k0, k1, k2, k3 = (k[..., i] for i in range(4))
            if k0.ndim < tau.ndim:
                k0, k1, k2, k3 = (x[..., None] for x in (k0, k1, k2, k3))
            pos = k0 + tau * (k1 + tau * (k2 + tau * k3))
            vel = k1 + tau * (2.0 * k2 + 3.0 * tau * k3)
            acc = 2.0 * k2 + 6.0 * tau * k3
            return pos, vel, acc

        zero = np.zeros_like(tau)
        ix, iy, isl, ir, ih = range(5)
        X = poly(ix) if self.used[ix] else (zero, zero, zero)
        Y = poly(iy) if self.used[iy] else (zero, zero, zero)
        if self.used[ih]:
            H, dH, ddH = poly(ih)
        else:
            H = dH = ddH = zero
        ext = (lambda a: a[..., None]) if tau.ndim > 1 else (lambda a: a)
        L = ext(self.L0) - H
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
        else:
            vx, vy, ax, ay = X[1], Y[1], X[2], Y[2]
        return vx, vy, ax, ay, L, -dH, -ddH


def _par(variants):
    keys = ("g", "zeta", "kd", "kr", "wx", "wy")
    out = {}
    for k in keys:
        a = np.array([v.model.par[k] for v in variants], dtype=float)
        # a scalar zero lets the force functions skip the term for the whole chunk
        out[k] = 0.0 if k != "g" and not np.any(a) else a
    return out


def _ext(par, ndim):
    if ndim == 1:
        return par
    return {k: (a[:, None] if isinstance(a, np.ndarray) else a) for k, a in par.items()}


def _rhs(y, kin, par):
    """Derivatives of the chunk's states y (4, ...) with kinematics tuple ``kin``."""
    u, v, du, dv = y
    vx, vy, ax, ay, L, dL, ddL = kin
    w = np.sqrt(1.0 - u * u - v * v)
    zero = 0.0
    fx, fy, fz = specific_force(u, v, w, du, dv, L, dL, vx, vy, zero, par)
    ddu, ddv = accelerations(u, v, du, dv, L, dL, ax, ay, zero, fx, fy, fz)
    return np.stack([du, dv, ddu, ddv])


# ----------------------------------------------------------------------------
# one chunk


def _integrate(variants, samples_per_step):
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
    par2 = _ext(par, 2)
    ar = np.arange(B)
    S = samples_per_step
    frac = np.arange(S) / S
    H, dH = _hermite_basis(frac)
    nsamp = N * S + 1
    out_t = np.empty((B, nsamp))
    out_y = np.empty((4, B, nsamp))
    out_kin = [np.empty((B, nsamp)) for _ in range(7)]
    y = np.stack([v.y0 for v in variants], axis=1)  # (4, B)
    K = np.empty((len(_B), 4, B))
    ok = np.ones(B, dtype=bool)
    with np.errstate(all="ignore"):
        for k in range(N):
            t0 = tg[:, k]
            h = tg[:, k + 1] - t0
            c = coef[ar, sg[:, k]]
            tau0 = t0 - t0s[ar, sg[:, k]]
            for s in range(len(_B)):
                ys = y if s == 0 else y + h * np.tensordot(_A[s, :s], K[:s], axes=1)
                K[s] = _rhs(ys, kin(c, tau0 + _C[s] * h), par)
            y1 = y + h * np.tensordot(_B, K, axes=1)
            # derivatives at the step's end on the step's own segment (left limit)
            f1 = _rhs(y1, kin(c, tau0 + h), par)
            f0 = K[0]
            # dense samples inside the step
            hh = h[:, None]
            comp = []
            for q in (0, 1):
                a0, a1 = y[q][:, None], y1[q][:, None]
                b0, b1 = f0[q][:, None], f1[q][:, None]
                c0, c1 = f0[q + 2][:, None], f1[q + 2][:, None]
                val = (H[0] * a0 + hh * H[1] * b0 + hh * hh * H[2] * c0
                       + H[3] * a1 + hh * H[4] * b1 + hh * hh * H[5] * c1)
                der = (dH[0] * a0 + hh * dH[1] * b0 + hh * hh * dH[2] * c0
                       + dH[3] * a1 + hh * dH[4] * b1 + hh * hh * dH[5] * c1)
                der = np.where(hh > 0, der / np.where(hh > 0, hh, 1.0), b0)
                comp += [val, der]
            u, du, v, dv = comp
            sl = slice(k * S, (k + 1) * S)
            ts = t0[:, None] + frac * hh
            out_t[:, sl] = ts
            out_y[0, :, sl], out_y[1, :, sl], out_y[2, :, sl], out_y[3, :, sl] = u, v, du, dv
            kk = kin(c, tau0[:, None] + frac * hh)
            for o, val in zip(out_kin, kk):
                o[:, sl] = val
            y = y1
            ok &= np.all(np.isfinite(y1), axis=0)
        # final sample: the end state on the last step's segment
        out_t[:, -1] = tg[:, -1]
        out_y[:, :, -1] = y
        kk = kin(c, tau0 + h)
        for o, val in zip(out_kin, kk):
            o[:, -1] = val
    return out_t, out_y, out_kin, par, ok


def _parabola_peak(t, x, i, mask=None):
    """Vertex of the parabola through samples i-1, i, i+1 of each row (clipped to the samples).

    Rows whose neighbours fall outside ``mask`` keep the sample value.
    """
    B, n = x.shape
    r = np.arange(B)
    i0 = np.clip(i - 1, 0, n - 1)
    i2 = np.clip(i + 1, 0, n - 1)
    ta, tb, tc = t[r, i0], t[r, i], t[r, i2]
    xa, xb, xc = x[r, i0], x[r, i], x[r, i2]
    with np.errstate(all="ignore"):
        d1 = (xb - xa) / (tb - ta)
        d2 = (xc - xb) / (tc - tb)
        curv = (d2 - d1) / (tc - ta)
        good = (i0 < i) & (i2 > i) & (tb > ta) & (tc > tb) & (curv < 0)
        if mask is not None:
            good &= mask[r, i0] & mask[r, i2]
        tv = 0.5 * (ta + tb) - d1 / (2 * curv)
        good &= (tv > ta) & (tv < tc)
        # value of the interpolating parabola at tv (Newton form)
        xv = xa + d1 * (tv - ta) + curv * (tv - ta) * (tv - tb)
    best = np.where(good & (xv > xb), xv, xb)
    tbest = np.where(good & (xv > xb), tv, tb)
    return tbest, best


def summaries_from_samples(t, n, load_vel, tension_N, static_N, exc, susp_speed, rest, info):
    """Summary numbers of many runs from sampled arrays (rows = runs).

    Parameters
    ----------
    t : ndarray (B, N)
        Sample times, non-decreasing along each row [s] (repeated end samples allowed).
    n : ndarray (B, N, 3)
        Unit rope directions.
    load_vel : ndarray (B, N, 3)
        Load velocity [m/s].
    tension_N : ndarray (B, N)
        Rope tension [N].
    static_N : ndarray (B,)
        Static rope load m g [N].
    exc : ndarray (B, N)
        Horizontal excursion of the load from the plumb line [m].
    susp_speed : ndarray (B, N)
        Horizontal speed of the suspension point [m/s] (unused in the keys, kept for callers).
    rest : ndarray (B, 3)
        Rest rope direction of each run.
    info : dict of ndarray (B,)
        ``move_end``, ``t_end``, ``period0``, ``period_end``, ``settle_rad``, ``L0``, ``L_end``.

    Returns
    -------
    list of dict
        One dict per row with the keys of :data:`SUMMARY_KEYS` that are numbers.

    Notes
    -----
    Definitions as in :mod:`swingsim.metrics`: the rope angle is
    :math:`\\arctan2(|n_h|, -n_z)`, the swing the angle between ``n`` and
    the rest direction, the residual the largest after the last move's end,
    the settle time the instant after which the swing stays below
    ``limits.settle_deg`` (linear interpolation of the crossing), confirmed by
    at least one swing period of run after it, and the measured period the mean
    interval of upward zero crossings of the swing along its principal axis
    after the last move.
    """
    B, N = t.shape
    r = np.arange(B)
    ang = np.arctan2(np.hypot(n[..., 0], n[..., 1]), -n[..., 2])
    q = rest[:, None, :]
    cx = n[..., 1] * q[..., 2] - n[..., 2] * q[..., 1]
    cy = n[..., 2] * q[..., 0] - n[..., 0] * q[..., 2]
    cz = n[..., 0] * q[..., 1] - n[..., 1] * q[..., 0]
    swing = np.arctan2(np.sqrt(cx * cx + cy * cy + cz * cz),
                       n[..., 0] * q[..., 0] + n[..., 1] * q[..., 1] + n[..., 2] * q[..., 2])
    move_end = info["move_end"]
    post = t >= move_end[:, None] - 1e-12
    i_pk = np.argmax(ang, axis=1)
    pk_t, pk = _parabola_peak(t, ang, i_pk)
    anyp = post.any(axis=1)
    a_post = np.where(post, ang, -np.inf)
    i_res = np.argmax(a_post, axis=1)
    _, res = _parabola_peak(t, ang, i_res, post)
    s_post = np.where(post, swing, -np.inf)
    i_rs = np.argmax(s_post, axis=1)
    _, rsw = _parabola_peak(t, swing, i_rs, post)
    # swing at the move's end (linear interpolation between samples)
    j = np.clip(np.argmax(post, axis=1), 1, N - 1)
    ta, tb = t[r, j - 1], t[r, j]
    wgt = np.where(tb > ta, (move_end - ta) / np.where(tb > ta, tb - ta, 1.0), 1.0)
    wgt = np.clip(wgt, 0.0, 1.0)
    sw_end = swing[r, j - 1] + wgt * (swing[r, j] - swing[r, j - 1])
    i_exc = np.argmax(exc, axis=1)
    i_T = np.argmax(tension_N, axis=1)
    Tmax = tension_N[r, i_T]
    Tmin = np.min(tension_N, axis=1)
    speed = np.sqrt(np.max(load_vel[..., 0] ** 2 + load_vel[..., 1] ** 2 + load_vel[..., 2] ** 2, axis=1))

    # measured period
    off = (n - rest[:, None, :])[..., :2]
    cnt = post.sum(axis=1)
    mean = np.where(cnt[:, None] > 0, np.sum(np.where(post[..., None], off, 0.0), axis=1)
                    / np.maximum(cnt, 1)[:, None], 0.0)
    off = np.where(post[..., None], off - mean[:, None, :], 0.0)
    sxx = np.sum(off[..., 0] ** 2, axis=1)
    syy = np.sum(off[..., 1] ** 2, axis=1)
    sxy = np.sum(off[..., 0] * off[..., 1], axis=1)
    theta = 0.5 * np.arctan2(2 * sxy, sxx - syy)
    x = off[..., 0] * np.cos(theta)[:, None] + off[..., 1] * np.sin(theta)[:, None]
    sb = np.signbit(x)
    up = sb[:, :-1] & ~sb[:, 1:] & post[:, :-1] & post[:, 1:]
    with np.errstate(all="ignore"):
        tc = t[:, :-1] - x[:, :-1] * (t[:, 1:] - t[:, :-1]) / (x[:, 1:] - x[:, :-1])
    ncross = up.sum(axis=1)
    first = np.where(up.any(axis=1), tc[r, np.argmax(up, axis=1)], np.nan)
    last_i = N - 2 - np.argmax(up[:, ::-1], axis=1)
    lastc = tc[r, last_i]
    meas_ok = ((cnt > 10) & (info["t_end"] - move_end > 1.5 * info["period0"])
               & (np.max(np.abs(off), axis=(1, 2)) > math.radians(0.02)) & (ncross >= 2))
    meas = np.where(meas_ok, (lastc - first) / np.maximum(ncross - 1, 1), np.nan)

    # settling
    thr = info["settle_rad"]
    above = post & (swing > thr[:, None])
    has_above = above.any(axis=1)
    kl = N - 1 - np.argmax(above[:, ::-1], axis=1)
    k1 = np.clip(kl + 1, 0, N - 1)
    a_ = swing[r, kl] - thr
    b_ = swing[r, k1] - thr
    with np.errstate(all="ignore"):
        tcross = np.where(a_ != b_, t[r, kl] + (t[r, k1] - t[r, kl]) * a_ / (a_ - b_), t[r, k1])
    confirm = (kl + 1 < N) & (info["t_end"] - t[r, kl] >= info["period_end"])
    settled_at = np.where(~has_above, move_end, np.where(confirm, tcross, np.nan))
    settled_at = np.where(anyp, settled_at, np.nan)

    out = []
    deg = math.degrees
    for b in range(B):
        def num(x):
            x = float(x)
            return x if math.isfinite(x) else None

        st_at = num(settled_at[b])
        out.append({
            "last_move_end_s": float(move_end[b]),
            "peak_rope_angle_deg": deg(pk[b]),
            "peak_rope_angle_time_s": float(pk_t[b]),
            "residual_rope_angle_deg": deg(res[b]) if anyp[b] else None,
            "residual_swing_deg": deg(rsw[b]) if anyp[b] else None,
            "swing_at_move_end_deg": deg(sw_end[b]) if anyp[b] else None,
            "peak_excursion_m": float(exc[b, i_exc[b]]),
            "peak_rope_tension_kN": float(Tmax[b]) / 1e3,
            "min_rope_tension_kN": float(Tmin[b]) / 1e3,
            "static_rope_tension_kN": float(static_N[b]) / 1e3,
            "dynamic_factor": float(Tmax[b] / static_N[b]),
            "peak_load_speed_m_s": float(speed[b]),
            "rope_length_start_m": float(info["L0"][b]),
            "rope_length_end_m": float(info["L_end"][b]),
            "natural_period_s": float(info["period0"][b]),
            "measured_period_s": num(meas[b]),
            "settle_time_s": None if st_at is None else st_at - float(move_end[b]),
            "settled_at_s": st_at,
        })
    return out


def _chunk_batch(variants, samples_per_step):
    t, Y, kin, par, ok = _integrate(variants, samples_per_step)
    u, v, du, dv = Y
    vx, vy, ax, ay, L, dL, ddL = kin
    with np.errstate(all="ignore"):
        w = np.sqrt(np.clip(1.0 - u * u - v * v, 0.0, None))
        p2 = _ext(par, 2)
        fx, fy, fz = specific_force(u, v, w, du, dv, L, dL, vx, vy, 0.0, p2)
        tpm = tension_per_mass(u, v, du, dv, L, ddL, ax, ay, 0.0, fx, fy, fz)
    m = np.array([vv.model.par["m"] for vv in variants])
    g = par["g"]
    n = np.stack([u, v, -w], axis=-1)
    ndz = (u * du + v * dv) / np.where(w > 0, w, 1.0)
    load_vel = np.stack([vx + dL * u + L * du, vy + dL * v + L * dv, -dL * w + L * ndz], axis=-1)
    exc = L * np.hypot(u, v)
    wlim = math.cos(math.radians(C.MODEL_ANGLE_LIMIT_DEG))
    # a run the model cannot carry on goes to the single-run solver (events, exact stop)
    ok &= np.all(np.isfinite(u) & np.isfinite(v), axis=1)
    ok &= np.all(tpm > 0.0, axis=1) & np.all(w > wlim, axis=1)
    info = {
        "move_end": np.array([vv.move_end for vv in variants]),
        "t_end": np.array([vv.scene.duration_s for vv in variants]),
        "period0": np.array([vv.period0 for vv in variants]),
        "period_end": np.array([vv.period_end for vv in variants]),
        "settle_rad": np.radians([vv.scene.limits.settle_deg for vv in variants]),
        "L0": np.array([vv.scene.rope.length_m for vv in variants]),
        "L_end": np.array([vv.L_end for vv in variants]),
    }
    rest = np.stack([vv.rest for vv in variants])
    sums = summaries_from_samples(t, n, load_vel, m[:, None] * tpm, m * g, exc, None, rest, info)
    for s in sums:
        s.update({"valid": True, "status": "ok", "model": "point-mass", "engine": "batch"})
    return sums, ok


def _single(scene) -> dict:
    """Summary of one scene by the single-run solver (the reference path)."""
    from .solve import simulate

    traj = simulate(scene)
    try:
        from .metrics import summarize
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
        ``"single"`` solves every scene with :func:`swingsim.solve.simulate`.

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


def chunk_size_for(scenes, samples_per_step=DEFAULT_SAMPLES_PER_STEP,
                   steps_per_period=DEFAULT_STEPS_PER_PERIOD) -> int:
    """Variants per chunk that keep each sampled array near :data:`_CHUNK_VALUES` values."""
    if not scenes:
        return 1
    sc = scenes[0]
    per = sc.duration_s / _period(sc, sc.rope.length_m) * steps_per_period * samples_per_step
    return int(max(16, min(4096, _CHUNK_VALUES // max(per, 1.0))))


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
