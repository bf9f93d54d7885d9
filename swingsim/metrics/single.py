"""Trajectory -> Summary: peak and residual swing, excursion, tension, periods, settling.

Definitions
-----------
rope angle
    Angle of the hoist rope from the vertical, :math:`\\arctan2(|n_h|, -n_z)`.
swing
    Angle of the rope from its *rest direction* (vertical in still air, offset
    in a steady wind): what must die away before the load can be landed.
residual
    Largest rope angle (and swing) after the last move has ended.
settle time
    Time after the last move's end until the swing stays below
    ``limits.settle_deg`` for the rest of the run; ``None`` when it never does,
    or when the run ends less than one swing period after it last exceeded the
    threshold (it cannot be confirmed).
measured period
    Mean interval between successive upward zero crossings of the swing
    component along its principal axis (after the last move, constant rope).
    Compared with the small-angle period :math:`2\\pi\\sqrt{L/g}` and with the
    exact plane-pendulum period :math:`4\\sqrt{L/g}\\,K(\\sin^2(\\theta_0/2))`
    (``scipy.special.ellipk`` takes the parameter m; Abramowitz & Stegun 17.3).

Peaks are refined on the dense interpolant (bounded scalar search around the
largest sample), so they do not depend on the output sample rate.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from scipy.optimize import minimize_scalar
from scipy.special import ellipk

from swingsim._version import __version__
from swingsim.metrics import cautions
from swingsim.metrics.models import model_metrics, model_warnings

#: Metric sample rate floor [Hz] and samples per natural period (whichever is finer).
_MIN_RATE_HZ = 50.0
_PER_PERIOD = 200


@dataclass
class Summary:
    """Result numbers of one run, as an ordered dict in ``data`` (see ``summary.json``)."""

    data: dict = field(default_factory=dict)

    def __getitem__(self, key):
        return self.data[key]

    def get(self, key, default=None):
        return self.data.get(key, default)

    @property
    def cautions(self) -> list[str]:
        return self.data["cautions"]


def rope_angle_rad(n: np.ndarray) -> np.ndarray:
    """Angle from vertical of unit rope directions ``n`` (..., 3) [rad]."""
    return np.arctan2(np.hypot(n[..., 0], n[..., 1]), -n[..., 2])


def angle_between(n: np.ndarray, m: np.ndarray) -> np.ndarray:
    """Angle between unit vectors (..., 3) [rad], accurate at small angles."""
    c = np.cross(n, m)
    return np.arctan2(np.linalg.norm(c, axis=-1), np.sum(n * m, axis=-1))


def metric_times(traj) -> np.ndarray:
    """Sample times used for metrics: fine enough for every swing period."""
    periods = traj.model.mode_periods_s()
    Lmin = float(np.min(traj.motion.evaluate(np.linspace(0, traj.scene.duration_s, 201))["L"]))
    Tmin = min(min(periods), 2 * math.pi * math.sqrt(Lmin / traj.scene.gravity_m_s2))
    rate = max(_MIN_RATE_HZ, traj.scene.sample_hz, _PER_PERIOD / Tmin)
    t = traj.sample_times(rate)
    extra = [b for b in traj.motion.breakpoints if b <= traj.t_end_s]
    return np.union1d(t, np.asarray(extra, dtype=float))


def _refine_max(f, t, vals, lo_t=None):
    """Refine the maximum of ``f`` near the largest sample ``vals`` on grid ``t``."""
    sel = np.arange(len(t)) if lo_t is None else np.nonzero(t >= lo_t - 1e-12)[0]
    if sel.size == 0:
        return None, None
    i = sel[int(np.argmax(vals[sel]))]
    best_t, best = float(t[i]), float(vals[i])
    a = t[max(i - 1, sel[0])]
    b = t[min(i + 1, len(t) - 1)]
    if b > a:
        res = minimize_scalar(lambda x: -f(x), bounds=(a, b), method="bounded",
                              options={"xatol": 1e-9})
        if res.success and -res.fun > best:
            best_t, best = float(res.x), float(-res.fun)
    return best_t, best


def crossings_period(t: np.ndarray, x: np.ndarray) -> tuple[float | None, int]:
    """Mean period from upward zero crossings of ``x(t)`` (linear interpolation)."""
    s = np.signbit(x)
    idx = np.nonzero(s[:-1] & ~s[1:])[0]
    if idx.size < 2:
        return None, int(idx.size)
    tc = t[idx] - x[idx] * (t[idx + 1] - t[idx]) / (x[idx + 1] - x[idx])
    return float(np.mean(np.diff(tc))), int(idx.size)


def exact_period_s(L: float, g: float, amplitude_rad: float) -> float:
    """Plane pendulum period at amplitude theta0: 4 sqrt(L/g) K(sin^2(theta0/2))."""
    return 4.0 * math.sqrt(L / g) * float(ellipk(math.sin(amplitude_rad / 2.0) ** 2))


def zone_distance(points: np.ndarray, lo, hi) -> np.ndarray:
    """Distance from points (N, 3) to an axis-aligned box [m]; 0 inside."""
    lo, hi = np.asarray(lo), np.asarray(hi)
    d = np.maximum(np.maximum(lo - points, points - hi), 0.0)
    return np.linalg.norm(d, axis=-1)


def load_half_size_m(scene) -> np.ndarray:
    """Half the load's size along x, y, z (zeros for a point load) [m].

    The point-mass load keeps its orientation, so its box is axis-aligned and
    the clearance to a zone is the distance from the load's centre to the zone
    box grown by these half sizes (exact for boxes).
    """
    if scene.load.size_m is None:
        return np.zeros(3)
    return 0.5 * np.asarray(scene.load.size_m, dtype=float)


def summarize(traj) -> Summary:
    """Measure a :class:`~swingsim.simulation.Trajectory` into a :class:`Summary`."""
    scene, model, motion = traj.scene, traj.model, traj.motion
    g = scene.gravity_m_s2
    t = metric_times(traj)
    s = traj.sample(t)
    n = s["rope_dir"]
    ang = rope_angle_rad(n)
    t_move_end = motion.last_move_end_s
    L_end = float(motion.evaluate(np.array([scene.duration_s]))["L"][0])
    L0 = scene.rope.length_m
    rest = np.asarray(model.rest_direction(L_end))
    swing = angle_between(n, rest[None, :])

    def ang_at(x):
        return float(rope_angle_rad(traj.sample(np.array([x]))["rope_dir"])[0])

    def swing_at(x):
        return float(angle_between(traj.sample(np.array([x]))["rope_dir"], rest[None, :])[0])

    pk_t, pk = _refine_max(ang_at, t, ang)
    post = t >= t_move_end - 1e-12
    res_t, res = _refine_max(ang_at, t, ang, lo_t=t_move_end) if post.any() else (None, None)
    rsw_t, rsw = _refine_max(swing_at, t, swing, lo_t=t_move_end) if post.any() else (None, None)

    hor = s["load"][:, :2] - s["suspension"][:, :2]
    exc = np.hypot(hor[:, 0], hor[:, 1])
    i_exc = int(np.argmax(exc))
    T = s["rope_tension_N"]
    static = float(np.atleast_1d(s["static_rope_load_N"])[0])
    pkT_t, pkT = _refine_max(lambda x: float(traj.sample(np.array([x]))["rope_tension_N"][0]), t, T)
    load_speed = np.linalg.norm(s["load_vel"], axis=1)
    susp_speed = np.linalg.norm(s["suspension_vel"][:, :2], axis=1)

    periods = list(model.mode_periods_s())
    periods_end = list(model.mode_periods_s(L_end))
    # measured period: swing after the last move, projected on its principal axis
    meas, amp_deg, n_cross = None, None, 0
    if post.sum() > 10 and traj.t_end_s - t_move_end > 1.5 * periods[0]:
        off = (n - rest[None, :])[post][:, :2]
        off = off - off.mean(axis=0)
        if np.max(np.abs(off)) > math.radians(0.02):
            # principal axis of the swing, with a definite sign (the batch engine uses the same)
            sxx, syy, sxy = (float(np.sum(a * b)) for a, b in
                             ((off[:, 0], off[:, 0]), (off[:, 1], off[:, 1]), (off[:, 0], off[:, 1])))
            th = 0.5 * math.atan2(2.0 * sxy, sxx - syy)
            x = off[:, 0] * math.cos(th) + off[:, 1] * math.sin(th)
            meas, n_cross = crossings_period(t[post], x)
            amp_deg = float(np.degrees(np.max(swing[post])))

    # settling
    thr = math.radians(scene.limits.settle_deg)
    settle_time = settled_at = None
    if traj.valid and post.any():
        above = np.nonzero(post & (swing > thr))[0]
        if above.size == 0:
            settled_at, settle_time = t_move_end, 0.0
        else:
            k = above[-1]
            if k + 1 < len(t) and traj.t_end_s - t[k] >= periods_end[0]:
                # interpolate the crossing between samples k and k+1
                a, b = swing[k] - thr, swing[k + 1] - thr
                tc = t[k] + (t[k + 1] - t[k]) * a / (a - b) if a != b else t[k + 1]
                settled_at = float(tc)
                settle_time = float(tc - t_move_end)
    swing_end = swing_at(t_move_end) if t_move_end <= traj.t_end_s else None

    # zones
    zones = []
    half = load_half_size_m(scene)
    for z in scene.zones:
        d = zone_distance(s["load"], np.asarray(z.min_m) - half, np.asarray(z.max_m) + half)
        within = d <= z.margin_m
        zones.append({
            "name": z.name, "kind": z.kind, "margin_m": z.margin_m,
            "min_distance_m": float(np.min(d)), "min_distance_time_s": float(t[int(np.argmin(d))]),
            "inside": bool(np.any(d <= 0.0)), "within_margin": bool(np.any(within)),
            "first_within_margin_s": float(t[int(np.argmax(within))]) if np.any(within) else None,
            "time_within_margin_s": float(np.sum(np.diff(t)[within[:-1]])) if len(t) > 1 else 0.0,
        })

    pos_moves = [m for m in scene.moves]
    move_list = []
    for m, (axis, prof) in zip(scene.moves, motion.moves):
        tt = np.linspace(prof.start_s, prof.end_s, 401)
        vmax = float(np.max(np.abs(prof.evaluate(tt)[1])))
        slew = axis == "slew"
        move_list.append({
            "name": m.name, "axis": axis, "profile": m.profile,
            "start_s": prof.start_s, "end_s": prof.end_s,
            "distance": math.degrees(prof.distance) if slew else prof.distance,
            "peak_speed": math.degrees(vmax) if slew else vmax,
            "unit": "deg" if slew else "m",
        })
    data = {
        "swingsim_version": __version__,
        "title": scene.title,
        "scene_file": scene.name + ".toml" if scene.file != "<scene>" else None,
        "model": model.name,
        "valid": traj.valid,
        "status": traj.status,
        "duration_s": scene.duration_s,
        "simulated_until_s": traj.t_end_s,
        "moves": len(pos_moves),
        "move_list": move_list,
        "first_move_start_s": motion.first_move_start_s,
        "last_move_end_s": t_move_end,
        "peak_rope_angle_deg": math.degrees(pk),
        "peak_rope_angle_time_s": pk_t,
        "residual_rope_angle_deg": None if res is None else math.degrees(res),
        "residual_swing_deg": None if rsw is None else math.degrees(rsw),
        "swing_at_move_end_deg": None if swing_end is None else math.degrees(swing_end),
        "rest_rope_angle_deg": float(np.degrees(rope_angle_rad(rest))),
        "peak_excursion_m": float(exc[i_exc]),
        "peak_excursion_time_s": float(t[i_exc]),
        "peak_rope_tension_kN": pkT / 1e3,
        "peak_rope_tension_time_s": pkT_t,
        "min_rope_tension_kN": float(np.min(T)) / 1e3,
        "static_rope_tension_kN": static / 1e3,
        "dynamic_factor": pkT / static,
        "peak_load_speed_m_s": float(np.max(load_speed)),
        "peak_suspension_speed_m_s": float(np.max(susp_speed)),
        "rope_length_start_m": L0,
        "rope_length_end_m": L_end,
        "natural_period_s": periods[0],
        "natural_period_end_s": periods_end[0],
        "mode_periods_s": periods,
        "measured_period_s": meas,
        "measured_amplitude_deg": amp_deg,
        "period_exact_at_amplitude_s": (exact_period_s(L_end, g, math.radians(amp_deg))
                                        if amp_deg is not None and model.name == "point-mass" else None),
        "period_difference_pct": (100.0 * (meas / periods_end[0] - 1.0) if meas else None),
        "settle_threshold_deg": scene.limits.settle_deg,
        "settle_time_s": settle_time,
        "settled_at_s": settled_at,
        "zones": zones,
    }
    if not traj.valid:
        data["invalid_reason"] = traj.message
    # -- hook block, rigging, rigid load, elastic rope (metrics_models.py; empty for point mass) --
    data.update(model_metrics(traj, t, s))
    data["cautions"] = ([cautions.CAUTION] + cautions.scenario_warnings(data, scene)
                        + model_warnings(data, scene))
    return Summary(data)
