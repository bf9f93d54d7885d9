"""The lift against the crane's rated capacity chart, and the horizontal pull of the rope on the tip.

Definitions (the scene key reference and the README say the same):

- *Radius*: horizontal distance from the slew axis (:func:`swingsim.scene.model.slew_centre`)
  to the suspension point's plumb line (the chart's own radius), to the hook block and to
  the load.  A swinging load's out-swing counts: at each instant the capacity is the
  lowest the chart gives at any of these radii.
- *Chart*: linear between its listed radii, never extrapolated
  (:meth:`swingsim.scene.model.RatedChart.capacity_at`); an instant at which a radius
  lies outside the chart is reported, never given an invented capacity.
- *Counted mass*: the load (which includes its rigging) plus the hook block when
  ``crane.chart_includes`` lists ``hook`` and the scene has one.
- *Static utilisation*: counted mass over the capacity at the suspension point's radius,
  the largest along the planned path.
- *Dynamic utilisation*: the hook load that counts against the chart (the hoist rope's
  tension at the hook block, less the static weight of a hook block the chart does not
  count) over ``g`` times the capacity at the radius; its peak over the metric samples.
- *Side load and out-load*: the horizontal component of the hook load at the
  suspension point (the pull the swinging rope puts on the jib or boom tip), across the
  jib (side) and along it (out: away from the slew axis; in: toward it).
"""

from __future__ import annotations

import numpy as np

from swingsim.scene.model import slew_centre

__all__ = ["chart_series", "chart_metrics", "chart_warnings", "counted_mass_kg", "tip_pull_N"]


def counted_mass_kg(scene) -> float:
    """The mass that counts against the chart: the load (with its rigging), and the hook block if the chart counts it.

    Parameters
    ----------
    scene : Scene
        The validated scene (``crane.chart_includes``, ``load``, ``hook``).

    Returns
    -------
    float
        Mass [kg].
    """
    hook = scene.hook.mass_kg if scene.hook is not None and "hook" in scene.crane.chart_includes else 0.0
    return scene.load.mass_kg + hook


def tip_pull_N(suspension_m, rope_dir, tension_N, centre_m) -> dict:
    """The horizontal pull of the hoist rope on the suspension point, across and along the jib.

    Parameters
    ----------
    suspension_m : ndarray (N, 3)
        Suspension point (trolley sheave or boom tip) [m].
    rope_dir : ndarray (N, 3)
        Unit vectors down the hoist rope, from the suspension point [-].
    tension_N : ndarray (N,)
        Hook load: the hoist rope's total tension at the hook block [N].
    centre_m : array_like (2,)
        The slew axis in plan [m].

    Returns
    -------
    dict
        ``side_N`` (across the jib, positive counter-clockwise seen from above),
        ``out_N`` (along the jib, positive away from the slew axis) and
        ``vertical_N`` (downward), each (N,) [N].
    """
    radial = np.asarray(suspension_m)[:, :2] - np.asarray(centre_m)[None, :]
    length = np.hypot(radial[:, 0], radial[:, 1])
    on_axis = length < 1e-9  # on the slew axis the jib's direction is taken as +x
    unit = np.where(on_axis[:, None], [1.0, 0.0], radial / np.where(on_axis, 1.0, length)[:, None])
    pull = np.asarray(tension_N)[:, None] * np.asarray(rope_dir)
    return {"side_N": -unit[:, 1] * pull[:, 0] + unit[:, 0] * pull[:, 1],
            "out_N": unit[:, 0] * pull[:, 0] + unit[:, 1] * pull[:, 1],
            "vertical_N": -pull[:, 2]}


def _peak(t, values):
    """(largest value, its time) of a sampled series (NaN samples ignored)."""
    i = int(np.nanargmax(values))
    return float(values[i]), float(t[i])


def chart_series(traj, t: np.ndarray, s: dict) -> dict:
    """The chart quantities of a run at each sample time; None without a chart.

    Parameters
    ----------
    traj : Trajectory
        The run (its scene's chart, masses and gravity).
    t : ndarray (N,)
        Sample times [s].
    s : dict
        The run sampled at ``t`` (:meth:`swingsim.simulation.Trajectory.sample`).

    Returns
    -------
    dict or None
        ``bodies`` (names whose radii are measured), ``radius_m`` (bodies, N),
        ``capacity_kg`` (bodies, N; NaN off the chart), ``governing`` (N,) index of
        the body whose radius gives the lowest capacity, ``governing_radius_m`` and
        ``governing_capacity_kg`` (N,) (inf when every radius is off the chart),
        ``off_chart`` (N,) bool, ``counted_load_N`` (N,) the hook load that counts
        against the chart, ``utilisation_pct`` and ``static_utilisation_pct`` (N,),
        and the tip pull of :func:`tip_pull_N` (N,) [N].
    """
    scene = traj.scene
    chart = scene.crane.chart
    if chart is None:
        return None
    g = scene.gravity_m_s2
    centre = slew_centre(scene)
    bodies = {"suspension point": s["suspension"], "load": s["load"]}
    if s.get("hook") is not None:
        bodies["hook"] = s["hook"]
    names = list(bodies)
    radius = np.stack([np.hypot(*(bodies[b][:, :2] - centre).T) for b in names])  # (bodies, N)
    capacity = chart.capacity_at(radius)
    # the lowest capacity on the chart at each instant, and which body's radius gives it
    lowest = np.where(np.isfinite(capacity), capacity, np.inf)
    governing = np.argmin(lowest, axis=0)
    cols = np.arange(len(t))
    cap_min = lowest[governing, cols]
    not_counted = (scene.hook.mass_kg if scene.hook is not None and "hook" not in scene.crane.chart_includes
                   else 0.0)
    load_N = s["rope_tension_N"] - not_counted * g
    return {"bodies": names, "radius_m": radius, "capacity_kg": capacity, "governing": governing,
            "governing_radius_m": radius[governing, cols], "governing_capacity_kg": cap_min,
            "off_chart": ~np.isfinite(capacity).all(axis=0), "counted_load_N": load_N,
            "utilisation_pct": 100.0 * load_N / (g * cap_min),
            # the suspension point's radius: the load hanging plumb
            "static_utilisation_pct": 100.0 * counted_mass_kg(scene) / capacity[0],
            **tip_pull_N(s["suspension"], s["rope_dir"], s["rope_tension_N"], centre)}


def chart_metrics(traj, t: np.ndarray, s: dict) -> dict:
    """The chart utilisation and the tip's side and out-load of a run, as ``summary.json`` keys.

    Parameters
    ----------
    traj, t, s
        The run, its metric sample times [s] and the run sampled at them, as for
        :func:`chart_series`.

    Returns
    -------
    dict
        Empty without ``crane.chart_file``; else the chart keys (see the module
        docstring and the README): utilisations [%], times [s], radii [m],
        capacities and masses [kg], side, out- and in-load [kN] and the rope's
        lean across and along the jib [deg].
    """
    c = chart_series(traj, t, s)
    if c is None:
        return {}
    scene = traj.scene
    chart = scene.crane.chart
    g = scene.gravity_m_s2
    static, static_t = _peak(t, c["static_utilisation_pct"])
    peak, peak_t = _peak(t, c["utilisation_pct"])
    i = int(np.argmax(c["utilisation_pct"]))
    side, side_t = _peak(t, np.abs(c["side_N"]))
    out, out_t = _peak(t, np.maximum(c["out_N"], 0.0))
    inward, in_t = _peak(t, np.maximum(-c["out_N"], 0.0))
    side_deg = np.degrees(np.arctan2(np.abs(c["side_N"]), c["vertical_N"]))
    out_deg = np.degrees(np.arctan2(c["out_N"], c["vertical_N"]))
    off = c["off_chart"]
    load_N, cap = c["counted_load_N"][i], c["governing_capacity_kg"][i]
    return {
        "chart_file": scene.crane.chart_file,
        "chart_includes": list(scene.crane.chart_includes),
        "chart_radius_range_m": [chart.radius_m[0], chart.radius_m[-1]],
        "chart_counted_mass_kg": counted_mass_kg(scene),
        "static_utilisation_pct": static,
        "static_utilisation_time_s": static_t,
        "static_utilisation_radius_m": float(c["radius_m"][0, int(np.nanargmax(c["static_utilisation_pct"]))]),
        "peak_utilisation_pct": peak,
        "peak_utilisation_time_s": peak_t,
        "chart_radius_at_peak_m": float(c["governing_radius_m"][i]),
        "chart_radius_at_peak_of": c["bodies"][c["governing"][i]],
        "chart_capacity_at_peak_kg": float(cap),
        "peak_counted_hook_load_kN": float(load_N) / 1e3,
        "chart_margin_pct": 100.0 - peak,
        "chart_margin_kg": float(cap - load_N / g),
        "chart_review_pct": scene.limits.chart_review_pct,
        "chart_limit_pct": scene.limits.chart_limit_pct,
        "largest_load_radius_m": float(np.max(c["radius_m"][c["bodies"].index("load")])),
        "off_chart_from_s": float(t[int(np.argmax(off))]) if off.any() else None,
        "off_chart_time_s": float(np.sum(np.diff(t)[off[:-1]])) if len(t) > 1 else 0.0,
        "peak_side_load_kN": side / 1e3,
        "peak_side_load_time_s": side_t,
        "peak_out_load_kN": out / 1e3,
        "peak_out_load_time_s": out_t,
        "peak_in_load_kN": inward / 1e3,
        "peak_in_load_time_s": in_t,
        "peak_side_angle_deg": float(np.max(side_deg)),
        "peak_out_angle_deg": float(np.max(out_deg)),
    }


def chart_warnings(d: dict, scene) -> list[str]:
    """The chart's cautions, from a run's summary; empty without a chart.

    Parameters
    ----------
    d : dict
        The summary's data with the keys of :func:`chart_metrics` (utilisations [%],
        radii [m], times [s]).
    scene : Scene
        Its scene (``limits.chart_review_pct``, ``limits.chart_limit_pct``, the hook).

    Returns
    -------
    list of str
        One sentence per caution.
    """
    if "peak_utilisation_pct" not in d:
        return []
    out = []
    lim = scene.limits
    peak, static = d["peak_utilisation_pct"], d["static_utilisation_pct"]
    where = (f"at t = {d['peak_utilisation_time_s']:.1f} s, radius {d['chart_radius_at_peak_m']:.2f} m "
             f"({d['chart_radius_at_peak_of']})")
    defer = ("check the lift against the manufacturer's chart and its notes, the lift plan and local "
             "rules with the competent person")
    given = scene.raw.get("limits", {})
    if static > 100.0:
        out.append(f"The load hanging plumb needs {static:.1f}% of the rated capacity chart: the lift as "
                   f"planned is over the chart at radius {d['static_utilisation_radius_m']:.2f} m; "
                   "it must not go ahead as planned.")
    if peak > 100.0:
        out.append(f"The swinging lift reaches {peak:.1f}% of the rated capacity chart {where}: over "
                   f"the chart; {defer}.")
    elif peak > lim.chart_limit_pct:
        src = "set in the scene" if "chart_limit_pct" in given else "a common-practice default"
        out.append(f"The swinging lift reaches {peak:.1f}% of the rated capacity chart {where}, above "
                   f"{lim.chart_limit_pct:g}% ({src}): lifts this close to the chart commonly need "
                   f"extra review and sign-off (varies by company and jurisdiction); {defer}.")
    elif peak > lim.chart_review_pct:
        src = "set in the scene" if "chart_review_pct" in given else "a common-practice default"
        out.append(f"The swinging lift reaches {peak:.1f}% of the rated capacity chart {where}, above "
                   f"{lim.chart_review_pct:g}% ({src}): such lifts commonly need extra review (varies "
                   f"by company and jurisdiction); {defer}.")
    if d["off_chart_from_s"] is not None:
        low, high = d["chart_radius_range_m"]
        out.append(f"The swinging load leaves the chart's radii ({low:g} to {high:g} m) from t = "
                   f"{d['off_chart_from_s']:.1f} s for {d['off_chart_time_s']:.1f} s (largest load "
                   f"radius {d['largest_load_radius_m']:.2f} m): the chart gives no capacity there and is "
                   "not extrapolated; reduce the swing or the radius.")
    if "hook" in scene.crane.chart_includes and scene.hook is None:
        out.append("The chart counts the hook block (crane.chart_includes) but the scene has no [hook] "
                   "table: its mass is not in the chart figures; add it to load.mass_kg or give [hook].")
    return out
