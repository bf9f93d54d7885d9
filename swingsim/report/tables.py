"""summary.json, timeseries.csv and summary.txt.

Output is deterministic: the same scene gives byte-identical files (no time
stamps, no absolute paths, fixed float formatting).
"""

from __future__ import annotations

import io
import json
import math

import numpy as np

from swingsim.metrics import cautions
from swingsim.metrics.cautions import force_text
from swingsim.metrics.chart import chart_series
from swingsim.metrics.definitions import line_pull
from swingsim.metrics.single import angle_between, rope_angle_rad
from swingsim.metrics.models import model_summary_lines
from swingsim.metrics.wind import gust_lines, wind_series
from swingsim.scene.site import wind_words


def _clean(x):
    if isinstance(x, float):
        return x if math.isfinite(x) else None
    if isinstance(x, dict):
        return {k: _clean(v) for k, v in x.items()}
    if isinstance(x, (list, tuple)):
        return [_clean(v) for v in x]
    if isinstance(x, np.generic):
        return _clean(x.item())
    return x


def summary_json(summary) -> str:
    """The summary as JSON text (NaN and infinity become null).

    Parameters
    ----------
    summary : swingsim.metrics.Summary
        The run's measures.

    Returns
    -------
    str
        Indented JSON with a final newline.
    """
    return json.dumps(_clean(summary.data), indent=2, allow_nan=False) + "\n"


def timeseries_columns(traj, t=None) -> dict:
    """The time-series columns of a run, as timeseries.csv holds them.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run.
    t : array_like, optional
        Sample times [s]; the scene's sample rate by default.

    Returns
    -------
    dict
        Column name (with its unit, e.g. ``load_x_m``) -> 1-D array.
    """
    t = traj.sample_times() if t is None else t
    s = traj.sample(t)
    rope = traj.scene.rope
    n = s["rope_dir"]
    rest = np.asarray(traj.model.rest_direction(float(s["rope_length"][-1])))
    hor = s["load"][:, :2] - s["suspension"][:, :2]
    cols = {
        "t_s": t,
        "suspension_x_m": s["suspension"][:, 0],
        "suspension_y_m": s["suspension"][:, 1],
        "suspension_z_m": s["suspension"][:, 2],
        "rope_length_m": s["rope_length"],
    }
    if s.get("hook") is not None:
        cols["hook_x_m"] = s["hook"][:, 0]
        cols["hook_y_m"] = s["hook"][:, 1]
        cols["hook_z_m"] = s["hook"][:, 2]
    cols.update({
        "load_x_m": s["load"][:, 0],
        "load_y_m": s["load"][:, 1],
        "load_z_m": s["load"][:, 2],
        "rope_angle_deg": np.degrees(rope_angle_rad(n)),
        "rope_angle_xz_deg": np.degrees(np.arctan2(n[:, 0], -n[:, 2])),
        "rope_angle_yz_deg": np.degrees(np.arctan2(n[:, 1], -n[:, 2])),
        "swing_deg": np.degrees(angle_between(n, rest[None, :])),
        "excursion_m": np.hypot(hor[:, 0], hor[:, 1]),
        "load_speed_m_s": np.linalg.norm(s["load_vel"], axis=1),
        "suspension_speed_m_s": np.linalg.norm(s["suspension_vel"][:, :2], axis=1),
        # the hoist's own speed: the prescribed length's rate (not the stretching rope's)
        "hoist_speed_m_s": -traj.motion.evaluate(np.asarray(t, dtype=float))["dL"],
        "rope_tension_kN": s["rope_tension_N"] / 1e3,
        "hook_load_kN": s["rope_tension_N"] / 1e3,
        "line_pull_kN": line_pull(s["rope_tension_N"], rope.falls, rope.reeving_efficiency) / 1e3,
    })
    for key, arr in s.get("extra_columns", {}).items():
        cols[key] = arr
    # -- rated capacity chart (swingsim/metrics/chart.py) --
    chart = chart_series(traj, t, s)
    if chart is not None:
        cols["chart_radius_m"] = chart["governing_radius_m"]
        cols["chart_capacity_kg"] = chart["governing_capacity_kg"]
        cols["chart_utilisation_pct"] = chart["utilisation_pct"]
        cols["chart_static_utilisation_pct"] = chart["static_utilisation_pct"]
        cols["tip_side_load_kN"] = chart["side_N"] / 1e3
        cols["tip_out_load_kN"] = chart["out_N"] / 1e3
    # -- the wind at the load (swingsim/metrics/wind.py) --
    wind = wind_series(traj.scene, s)
    cols["wind_speed_m_s"] = wind["speed_m_s"]
    cols["wind_from_bearing_deg"] = wind["from_bearing_deg"]
    return cols


def timeseries_csv(traj, cols=None) -> str:
    """timeseries.csv: one row per sample time, fixed float formatting.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run, sampled only when ``cols`` is None.
    cols : dict, optional
        Its columns (:func:`timeseries_columns`), when already sampled.

    Returns
    -------
    str
        The CSV text, header first.
    """
    cols = timeseries_columns(traj) if cols is None else cols
    names = list(cols)
    data = np.column_stack([np.asarray(cols[k], dtype=float) for k in names])
    buf = io.StringIO()
    buf.write(",".join(names) + "\n")
    np.savetxt(buf, data, delimiter=",", fmt="%.9g")
    return buf.getvalue()


def _fmt(x, unit="", nd=2):
    if x is None:
        return "n/a"
    return f"{x:.{nd}f}{(' ' + unit) if unit else ''}"


def _chart_lines(d: dict) -> list:
    """The summary.txt section on the rated capacity chart; empty without a chart."""
    if "peak_utilisation_pct" not in d:
        return []
    low, high = d["chart_radius_range_m"]
    counted = " and ".join(["load (with its rigging)"] + (["hook block"] if "hook" in d["chart_includes"] else []))
    w = ["", f"Rated capacity chart ({d['chart_file']}, {low:g} to {high:g} m, read linearly between its radii, "
         "never beyond)",
         f"  Counted against the chart       {d['chart_counted_mass_kg']:.0f} kg: {counted}",
         f"  Static (load hanging plumb)     {d['static_utilisation_pct']:.1f}% of the chart at radius "
         f"{d['static_utilisation_radius_m']:.2f} m",
         f"  Peak while swinging             {d['peak_utilisation_pct']:.1f}% at t = {d['peak_utilisation_time_s']:.1f} s: "
         f"hook load {force_text(d['peak_counted_hook_load_kN'])}, as "
         f"{d['chart_capacity_at_peak_kg'] - d['chart_margin_kg']:.0f} kg, against "
         f"{d['chart_capacity_at_peak_kg']:.0f} kg at the {d['chart_radius_at_peak_of']}'s radius "
         f"{d['chart_radius_at_peak_m']:.2f} m",
         f"  Margin to the chart at the peak {d['chart_margin_kg']:.0f} kg ({d['chart_margin_pct']:.1f}% of the chart)",
         f"  Review thresholds               {d['chart_review_pct']:g}% extra review, {d['chart_limit_pct']:g}% "
         "close to the chart (common practice; varies by company and jurisdiction)"]
    if d["off_chart_from_s"] is not None:
        w.append(f"  OFF THE CHART                   the swinging load leaves the chart's radii from t = "
                 f"{d['off_chart_from_s']:.1f} s (largest load radius {d['largest_load_radius_m']:.2f} m)")
    w += [f"  Side load on the tip (peak)     {force_text(d['peak_side_load_kN'])} at t = "
          f"{d['peak_side_load_time_s']:.1f} s (rope {d['peak_side_angle_deg']:.1f} deg off vertical across the jib)",
          f"  Out-load on the tip (peak)      {force_text(d['peak_out_load_kN'])} outward at t = "
          f"{d['peak_out_load_time_s']:.1f} s, {force_text(d['peak_in_load_kN'])} inward at t = "
          f"{d['peak_in_load_time_s']:.1f} s (rope up to {d['peak_out_angle_deg']:.1f} deg out)",
          "  Compare the side and out-load with the manufacturer's allowable off-vertical for this crane.",
          "  The manufacturer's chart and its notes, the lift plan, local rules and the competent person",
          "  decide whether the lift may go ahead; these figures are for planning only."]
    return w


def peak_text(mode: dict) -> str:
    """A swing mode's peak amplification in words ("50 x static"), as summary.txt and the briefing give it.

    Parameters
    ----------
    mode : dict
        An entry of ``response_modes`` (:func:`swingsim.metrics.resonance.resonance_metrics`).

    Returns
    -------
    str
        The steady swing at resonance over the static swing, or "unbounded (no damping)".
    """
    if mode["peak_amplification"] is None:
        return "unbounded (no damping)"
    return f"{mode['peak_amplification']:.0f} x static"


def half_power_text(mode: dict) -> str:
    """A swing mode's half-power band in words ("4.87 to 4.97 s (2.0%)").

    Parameters
    ----------
    mode : dict
        An entry of ``response_modes``: ``half_power_periods_s`` [s] and ``half_power_fraction`` [-].

    Returns
    -------
    str
        The band's periods and its width over the mode's period, or "none".
    """
    short, long_ = mode["half_power_periods_s"]
    if short is None or long_ is None or mode["half_power_fraction"] is None:
        return "none"
    return f"{short:.2f} to {long_:.2f} s ({100 * mode['half_power_fraction']:.1f}%)"


def rhythm_sentences(d: dict) -> list:
    """One sentence per rhythm of repeated moves or a recorded input: in or clear of a mode's band.

    Parameters
    ----------
    d : dict
        The summary's data (``move_rhythms``).

    Returns
    -------
    list of str
        E.g. ``Rhythm of the radius moves (repeated moves, 2.0 to 21.1 s) 5.00 s: IN RESONANCE with mode 1``.
    """
    out = []
    for r in d.get("move_rhythms") or []:
        hit = ("IN RESONANCE with mode " + ", ".join(str(k) for k in r["resonant_modes"])
               if r["resonant_modes"] else "clear of every mode's band")
        out.append(f"Rhythm of the {r['axis']} moves ({r['source']}, {r['from_s']:.1f} to {r['to_s']:.1f} s) "
                   f"{r['rhythm_s']:.2f} s: {hit}")
    return out


def _resonance_lines(d: dict) -> list:
    """The "Resonance" section: each mode's sharpness and the moves' rhythms (response.csv, response.png)."""
    modes = d.get("response_modes") or []
    if not modes:
        return []
    w = ["", f"Resonance (steady swing per m/s2 of suspension-point acceleration: response.csv, response.png; "
             f"band: half-power band widened to +-{100 * d['resonance_band_fraction']:.0f}%, our rule)"]
    for m in modes:
        amp = peak_text(m)
        amp = amp if amp.startswith("unbounded") else "peak " + amp
        band = half_power_text(m)
        band = "no half-power band" if band == "none" else "half-power " + band
        w.append(f"  Mode {m['mode']} {m['period_s']:7.3f} s  {m['label']}: damping {100 * m['damping_ratio']:.2f}%, "
                 f"{amp}, {band}")
    w.extend("  " + line for line in rhythm_sentences(d))
    return w


def summary_text(summary, scene, mode_names=None) -> str:
    """summary.txt: a plain-text summary for a lift planner, caution first.

    Fixed decimals throughout: angles 0.1 deg, distances 0.01 m, forces 0.1 kN
    and 0.01 t, times 0.1 s, periods 0.001 s, ratios 0.01, percentages 0.1%.

    Parameters
    ----------
    summary : swingsim.metrics.Summary
        The run's measures.
    scene : swingsim.scene.Scene
        The scene (load, rope, wind).
    mode_names : list of str, optional
        What each swing mode is (:func:`swingsim.metrics.modes.mode_names`), in the
        order of ``mode_periods_s``; the modes are listed by period only when None.

    Returns
    -------
    str
        The text.
    """
    d = summary.data
    w = []
    w.append(f"swingsim {d['swingsim_version']} - {d['title']}")
    w.append("=" * min(78, len(w[0])))
    w.append("")
    w.append(cautions.CAUTION)
    w.append("")
    if not d["valid"]:
        w.append("!! RESULT INVALID: " + d.get("invalid_reason", ""))
        w.append("")
    w.append(f"Model: {d['model']}; load {scene.load.mass_kg:.0f} kg on {scene.rope.length_m:.2f} m of rope"
             + (f" (rope ends at {d['rope_length_end_m']:.2f} m)" if abs(d['rope_length_end_m'] - scene.rope.length_m) > 1e-9 else "")
             + f"; {d['moves']} move(s), last ending at {d['last_move_end_s']:.1f} s; simulated {d['simulated_until_s']:.1f} s.")
    if scene.wind.speed_m_s:
        at = "" if scene.wind.profile == "uniform" else f" at {scene.wind.reference_height_m:.1f} m"
        w.append(f"Wind {scene.wind.speed_m_s:.1f} m/s{at} {wind_words(scene)}, site north at "
                 f"{scene.site.north_deg:.1f} deg from +x; rope at rest leans {d['rest_rope_angle_deg']:.1f} deg "
                 "downwind; " + _wind_start(d, scene))
    w.append(cautions.TONNE_FORCE_NOTE)
    if d.get("move_list"):
        w.append("")
        w.append("Moves")
        for m in d["move_list"]:
            u = m["unit"]
            nd = 1 if u.startswith("deg") else 2
            w.append(f"  {m['name']:<28} {m['axis']:<6} {m['profile']:<10} {m['start_s']:6.1f} -> {m['end_s']:6.1f} s"
                     f"  {m['distance']:+8.{nd}f} {u}, peak {m['peak_speed']:.2f} {u}/s")
    w.append("")
    w.append("Swing")
    w.append(f"  Peak rope angle from vertical    {_fmt(d['peak_rope_angle_deg'], 'deg', 1)}  at t = {_fmt(d['peak_rope_angle_time_s'], 's', 1)}")
    w.append(f"  Peak excursion from plumb line   {_fmt(d['peak_excursion_m'], 'm')}")
    w.append(f"  Swing when the last move ends    {_fmt(d['swing_at_move_end_deg'], 'deg', 1)}")
    w.append(f"  Residual rope angle after moves  {_fmt(d['residual_rope_angle_deg'], 'deg', 1)}")
    if d.get("on_ground_at_end") and d.get("touchdown_time_s") is not None:
        w.append(f"  {'Landed':<33}at t = {_fmt(d['touchdown_time_s'], 's', 1)} (on the ground at the end)")
    elif d["settle_time_s"] is None:
        w.append(f"  {'Settles below %g deg' % d['settle_threshold_deg']:<33}not within the simulated time")
    else:
        w.append(f"  {'Settles below %g deg' % d['settle_threshold_deg']:<33}{_fmt(d['settle_time_s'], 's', 1)} after the last move (t = {_fmt(d['settled_at_s'], 's', 1)})")
    w.append("")
    w.extend(_hook_load_lines(d, scene))
    # -- hook block, rigging, rigid load, elastic rope (swingsim/metrics/models.py) --
    w.extend(model_summary_lines(d))
    w.append("")
    w.append("Swing period")
    mp = d["mode_periods_s"]
    label = "Small-angle (2 pi sqrt(L/g))" if d["model"] == "point-mass" else "Longest mode (small angle)"
    w.append(f"  {label:<33}{_fmt(d['natural_period_s'], 's', 3)}"
             + (f"; at the final rope length {_fmt(d['natural_period_end_s'], 's', 3)}" if abs(d['natural_period_end_s'] - d['natural_period_s']) > 1e-9 else ""))
    if len(mp) == 1 and mode_names:  # one mode: named on the period's own line
        w[-1] += f": {mode_names[0]}"
    elif len(mp) > 1:
        w.append("  Modes (small amplitude)")
        names = list(mode_names or [])
        for k, period in enumerate(mp):
            w.append(f"    {k + 1}. {period:7.3f} s  " + (names[k] if k < len(names) else ""))
    if d["measured_period_s"] is None:
        w.append("  Measured from the simulation     n/a (too little swing after the last move to measure)")
    else:
        w.append(f"  Measured from the simulation     {_fmt(d['measured_period_s'], 's', 3)} at {d['measured_amplitude_deg']:.1f} deg amplitude: "
                 f"{d['period_difference_pct']:+.2f}% against small-angle")
        if d.get("period_exact_at_amplitude_s"):
            w.append(f"  Exact plane swing at that amplitude {_fmt(d['period_exact_at_amplitude_s'], 's', 3)} (elliptic integral)")
    # -- the wind at the load, gust statistics (swingsim/metrics/wind.py) --
    w.extend(gust_lines(d, scene))
    # -- frequency response and the moves' rhythms (swingsim/metrics/resonance.py) --
    w.extend(_resonance_lines(d))
    # -- rated capacity chart (swingsim/metrics/chart.py) --
    w.extend(_chart_lines(d))
    if d["zones"]:
        w.append("")
        w.append("Obstacles and exclusion zones")
        w.extend(zone_lines(d["zones"]))
    w.append("")
    w.append("What the model leaves out (check these against the lift plan)")
    for limit in cautions.model_limits(scene):
        w.append("  - " + limit)
    w.append("")
    w.append("Cautions")
    for c in d["cautions"][1:] or ["(no scenario warnings)"]:
        w.append("  - " + c)
    w.append("")
    return "\n".join(w) + "\n"


def zone_lines(zones) -> list:
    """The zone lines of ``summary.txt``: each zone's verdict as a lift planner reads it.

    Parameters
    ----------
    zones : list of dict
        The ``zones`` entries of ``summary.json`` (:func:`swingsim.metrics.zones.zone_summaries`).

    Returns
    -------
    list of str
        Per zone: its verdict, closest approach and, when entered, when, for how long,
        by which parts and (exclusion zones) how high above the zone's top.
    """
    w = []
    for z in zones:
        state = ("ENTERED" if z["entered"] else "inside margin" if z["within_margin"] else "clear")
        how = "in plan" if z["kind"] == "exclusion" else ""
        w.append(f"  {z['kind']:<9} {z['name']:<24} closest {z['min_distance_m']:.2f} m {how + ' ' if how else ''}"
                 f"({z['min_distance_body']}) at t = {z['min_distance_time_s']:.1f} s  [{state}]")
        for e in z["entries"]:
            line = (f"    {'over it' if z['kind'] == 'exclusion' else 'touching'} from t = {e['start_s']:.1f} s "
                    f"for {e['duration_s']:.1f} s: {', '.join(e['bodies'])}")
            if "min_height_above_zone_m" in e:
                line += f"; lowest {e['min_height_above_zone_m']:.2f} m above the zone's top"
            w.append(line)
    if any(z["kind"] == "exclusion" and z["entered"] for z in zones):
        w.append("  An exclusion zone counts as entered when any part of the suspended load, rigging or rope")
        w.append("  is over it at any height: clear it of people as the lift plan, local rules and the")
        w.append("  competent person require; the height above it is no protection from a falling load.")
    return w


def _wind_start(d, scene) -> str:
    """How the run starts in the wind, as summary.txt says it."""
    if getattr(scene.start, "on_ground", False):
        return "the load starts resting on the ground, and the wind takes it as it lifts off."
    if scene.start.rope_preload == "lift-off":
        return "the load starts plumb, resting for lift-off, and the wind takes it as it lifts off."
    if scene.wind.onset == "step":
        return ("the run starts plumb and the wind arrives as a sudden step at t = 0 (onset = step): "
                "the swing includes that gust's.")
    return "the run starts hanging at that lean (onset = steady)."


def _hook_load_lines(d, scene) -> list:
    """The hook load and line pull block of summary.txt."""
    rope = scene.rope
    w = ["Hook load and line pull"]
    w.append(f"  Static hook load                 {force_text(d['static_rope_tension_kN'])}")
    w.append(f"  Peak hook load                   {force_text(d['peak_hook_load_kN'])}  at t = {_fmt(d['peak_rope_tension_time_s'], 's', 1)}"
             + (f"; hook block rated {force_text(scene.hook.wll_kN)}"
                if scene.hook is not None and scene.hook.wll_kN is not None else ""))
    reeving = f"{rope.falls} fall(s)" + (f", reeving efficiency {rope.reeving_efficiency:.3f}"
                                         if rope.reeving_efficiency != 1.0 else ", no sheave friction")
    w.append(f"  Peak line pull                   {force_text(d['peak_line_pull_kN'])}  ({reeving})"
             + (f"; line WLL {force_text(rope.wll_kN)}" if rope.wll_kN is not None else ""))
    w.append(f"  Dynamic factor (peak / static)   {_fmt(d['dynamic_factor'], '', 2)}")
    return w
