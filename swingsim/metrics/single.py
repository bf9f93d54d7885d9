"""Trajectory -> Summary: peak and residual swing, excursion, tension, periods, settling.

What each number measures is defined once, in :mod:`swingsim.metrics.definitions`
(the batch engine measures with the same functions); this module samples a
single run's dense trajectory, calls them as a batch of one, and refines the
peaks on the trajectory itself (a bounded scalar search around the largest
sample), so they do not depend on the output sample rate.  Zone clearances are
in :mod:`swingsim.metrics.zones`, the numbers of the hook-and-load models in
:mod:`swingsim.metrics.models`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from swingsim._version import __version__
from swingsim.metrics import cautions, definitions
from swingsim.metrics.chart import chart_metrics, chart_warnings
from swingsim.metrics.definitions import angle_between, rope_angle_rad
from swingsim.metrics.contact import contact_metrics, contact_warnings
from swingsim.metrics.models import model_metrics, model_warnings
from swingsim.metrics.resonance import resonance_metrics
from swingsim.metrics.zones import zone_summaries
from swingsim.metrics.wind import gust_metrics, gust_warnings
from swingsim.scene.site import scene_wind_from_bearing_deg

__all__ = ["Summary", "summarize", "final_check", "metric_times", "rope_angle_rad", "angle_between"]

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
        """One summary number, or ``default`` when the run has no such key.

        Parameters
        ----------
        key : str
            A key of ``summary.json``, e.g. ``"peak_rope_angle_deg"``.
        default : object
            What to return when the key is absent.

        Returns
        -------
        object
            The value (in the unit its key names), or ``default``.
        """
        return self.data.get(key, default)

    @property
    def cautions(self) -> list[str]:
        return self.data["cautions"]


def metric_times(traj) -> np.ndarray:
    """Sample times of the metrics: fine enough for every swing period.

    Parameters
    ----------
    traj : Trajectory
        A solved run (:func:`swingsim.simulation.simulate`).

    Returns
    -------
    ndarray
        Times [s] at the finest of 50 Hz, the scene's sample rate and 200 samples per
        shortest swing period (shortest rope), plus every breakpoint of the motion up
        to the end of the run.
    """
    periods = traj.model.mode_periods_s()
    Lmin = float(np.min(traj.motion.evaluate(np.linspace(0, traj.scene.duration_s, 201))["L"]))
    Tmin = min(min(periods), 2 * math.pi * math.sqrt(Lmin / traj.scene.gravity_m_s2))
    rate = max(_MIN_RATE_HZ, traj.scene.sample_hz, _PER_PERIOD / Tmin)
    t = traj.sample_times(rate)
    breakpoints = [b for b in traj.motion.breakpoints if b <= traj.t_end_s]
    return np.union1d(t, np.asarray(breakpoints, dtype=float))


def _refine_max(f, t, vals, mask=None):
    """Refine the maximum of ``f`` near the largest sample ``vals`` (within ``mask``) on grid ``t``.

    Returns ``(time [s], value)``, or ``(None, None)`` when no sample counts.
    """
    if mask is not None and not mask.any():
        return None, None
    peak = definitions.peak_sample(t[None, :], vals[None, :], None if mask is None else mask[None, :])
    i = int(peak.index[0])
    first = 0 if mask is None else int(np.argmax(mask))
    best_t, best = float(t[i]), float(vals[i])
    a = t[max(i - 1, first)]
    b = t[min(i + 1, len(t) - 1)]
    if b > a:
        from scipy.optimize import minimize_scalar  # lazily: start-up time of every command

        res = minimize_scalar(lambda x: -f(x), bounds=(a, b), method="bounded",
                              options={"xatol": 1e-9})
        if res.success and -res.fun > best:
            best_t, best = float(res.x), float(-res.fun)
    return best_t, best


def summarize(traj) -> Summary:
    """Measure a solved run into its summary numbers.

    Parameters
    ----------
    traj : Trajectory
        A solved run (:func:`swingsim.simulation.simulate`), valid or stopped early.

    Returns
    -------
    Summary
        Every key of ``summary.json``: the numbers defined in
        :mod:`swingsim.metrics.definitions`, the moves, the zone clearances, the
        model's own numbers and the cautions.
    """
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
    # the run as a batch of one, for the shared definitions
    t_row = t[None, :]
    move_end = np.array([t_move_end])
    post = definitions.after_move(t_row, move_end)[0]

    def ang_at(x):
        return float(rope_angle_rad(traj.sample(np.array([x]))["rope_dir"])[0])

    def swing_at(x):
        return float(angle_between(traj.sample(np.array([x]))["rope_dir"], rest[None, :])[0])

    def swing_sample(row, idx):  # the sampled swing, for the shared definitions
        return swing[idx]

    pk_t, pk = _refine_max(ang_at, t, ang)
    res_t, res = _refine_max(ang_at, t, ang, post)
    rsw_t, rsw = _refine_max(swing_at, t, swing, post)

    hor = s["load"][:, :2] - s["suspension"][:, :2]
    exc = definitions.peak_sample(t_row, definitions.excursion_sq_m2(hor[None, :, 0], hor[None, :, 1]))
    T = s["rope_tension_N"]
    static = float(np.atleast_1d(s["static_rope_load_N"])[0])
    pkT_t, pkT = _refine_max(lambda x: float(traj.sample(np.array([x]))["rope_tension_N"][0]), t, T)
    load_vel, susp_vel = s["load_vel"][None], s["suspension_vel"][None]
    load_speed = definitions.peak_speed_m_s(load_vel[..., 0], load_vel[..., 1], load_vel[..., 2])
    susp_speed = definitions.peak_speed_m_s(susp_vel[..., 0], susp_vel[..., 1])

    periods = list(model.mode_periods_s())
    periods_end = list(model.mode_periods_s(L_end))
    # measured period: swing after the last move, projected on its principal axis
    offset = n - rest[None, :]
    measured = definitions.measured_period(t_row, offset[None, :, 0], offset[None, :, 1], post[None],
                                           np.array([traj.t_end_s - t_move_end]), np.array([periods[0]]))
    meas = float(measured.period_s[0]) if math.isfinite(measured.period_s[0]) else None
    amp_deg = float(np.degrees(np.max(swing[post]))) if measured.swinging[0] else None

    # settling
    settle_time = settled_at = None
    if traj.valid:
        cos_swing = definitions.cos_swing(n[None, :, 0], n[None, :, 1], n[None, :, 2], rest[None, :])
        at = definitions.settled_at_s(t_row, cos_swing, swing_sample,
                                      post[None], np.radians([scene.limits.settle_deg]),
                                      np.array([traj.t_end_s]), np.array([periods_end[0]]), move_end)[0]
        if math.isfinite(at):
            settled_at, settle_time = float(at), float(at - t_move_end)
    swing_end = (float(definitions.value_at_instant(t_row, swing_sample, move_end, post[None])[0])
                 if post.any() else None)

    # zones
    zones = zone_summaries(t, s, scene)

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
        "wind_onset": scene.wind.onset if scene.wind.speed_m_s > 0.0 else None,
        "start_rope_angle_deg": float(np.degrees(ang[0])),
        "peak_excursion_m": float(np.sqrt(exc.value[0])),
        "peak_excursion_time_s": float(exc.time_s[0]),
        "peak_hook_load_kN": pkT / 1e3,
        "peak_line_pull_kN": definitions.line_pull(pkT, scene.rope.falls, scene.rope.reeving_efficiency) / 1e3,
        "falls": scene.rope.falls,
        "reeving_efficiency": scene.rope.reeving_efficiency,
        "peak_rope_tension_kN": pkT / 1e3,
        "peak_rope_tension_time_s": pkT_t,
        "min_rope_tension_kN": float(np.min(T)) / 1e3,
        "static_rope_tension_kN": static / 1e3,
        "dynamic_factor": definitions.dynamic_factor(pkT, static),
        "peak_load_speed_m_s": float(load_speed[0]),
        "peak_suspension_speed_m_s": float(susp_speed[0]),
        "rope_length_start_m": L0,
        "rope_length_end_m": L_end,
        "natural_period_s": periods[0],
        "natural_period_end_s": periods_end[0],
        "mode_periods_s": periods,
        "measured_period_s": meas,
        "measured_amplitude_deg": amp_deg,
        "period_exact_at_amplitude_s": (definitions.exact_period_s(L_end, g, math.radians(amp_deg))
                                        if amp_deg is not None and model.name == "point-mass" else None),
        "period_difference_pct": (100.0 * (meas / periods_end[0] - 1.0) if meas else None),
        "settle_threshold_deg": scene.limits.settle_deg,
        "settle_time_s": settle_time,
        "settled_at_s": settled_at,
        "zones": zones,
        "wind_from_bearing_deg": scene_wind_from_bearing_deg(scene),
    }
    if not traj.valid:
        data["invalid_reason"] = traj.message
    # -- hook block, rigging, rigid load, elastic rope (metrics_models.py; empty for point mass) --
    data.update(model_metrics(traj, t, s))
    # -- tag lines, lift-off and landing (metrics/contact.py; empty without them) --
    data.update(contact_metrics(traj, t, s, np.degrees(swing)))
    # -- rated capacity chart: utilisation, side and out-load at the tip (metrics/chart.py; empty without a chart) --
    data.update(chart_metrics(traj, t, s))
    # -- the wind at the load: peak gust against the in-service limit (metrics/wind.py) --
    data.update(gust_metrics(traj, t, s))
    # -- frequency response, moves' rhythms and resonance (metrics/resonance.py) --
    data.update(resonance_metrics(traj))
    data["cautions"] = ([cautions.CAUTION] + cautions.scenario_warnings(data, scene)
                        + model_warnings(data, scene) + contact_warnings(data, scene) + chart_warnings(data, scene)
                        + gust_warnings(data, scene) + cautions.resonance_warnings(data))
    summary = Summary(data)
    final_check(traj, summary, s)
    return summary


def _first_non_finite(value, key: str = ""):
    """Key path of the first number in ``value`` (nested dicts and lists) that is not finite, or None."""
    if isinstance(value, dict):
        items = ((f"{key}.{k}" if key else str(k), v) for k, v in value.items())
    elif isinstance(value, (list, tuple)):
        items = ((f"{key}[{i}]", v) for i, v in enumerate(value))
    elif isinstance(value, (float, np.floating)) and not math.isfinite(value):
        return key
    else:
        return None
    for k, v in items:
        found = _first_non_finite(v, k)
        if found is not None:
            return found
    return None


def final_check(traj, summary: Summary, samples: dict | None = None) -> None:
    """The last word before a result is called valid: every sample and summary number finite.

    A run whose motion or numbers hold NaN or infinity (IEEE 754 non-finite values)
    is marked invalid in place, in the summary and in the trajectory (``status``
    ``"nonfinite"``), so every output and the exit code say so.

    Parameters
    ----------
    traj : Trajectory
        The solved run; its status and message are set when the check fails.
    summary : Summary
        Its summary; ``valid``, ``status`` and ``invalid_reason`` are set when the check fails.
    samples : dict, optional
        Outputs already sampled at the metric times (:meth:`Trajectory.sample`);
        the run is also sampled at its output times (``timeseries.csv``).
    """
    reason = None
    grids = [samples] if samples is not None else []
    grids.append(traj.sample(traj.sample_times()))
    for grid in grids:
        for name, values in grid.items():
            arr = np.asarray(values)
            if arr.dtype.kind in "fc" and not np.all(np.isfinite(arr)):
                bad = ~np.isfinite(arr.reshape(arr.shape[0], -1)).all(axis=1) if arr.ndim else np.array([True])
                t_bad = float(np.atleast_1d(grid["t"])[int(np.argmax(bad))]) if arr.ndim else 0.0
                reason = (f"the motion is not a finite number ({name} at t = {t_bad:.3f} s); "
                          "no result of this run can be trusted")
                break
        if reason:
            break
    if reason is None:
        key = _first_non_finite({k: v for k, v in summary.data.items() if k != "cautions"})
        if key is not None:
            reason = f"the summary number {key} is not a finite number; no result of this run can be trusted"
    if reason is None:
        return
    if traj.valid:
        traj.status, traj.message = "nonfinite", reason
    summary.data["valid"] = False
    summary.data["status"] = traj.status
    summary.data["invalid_reason"] = traj.message
