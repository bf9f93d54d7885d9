"""The wind a run saw: the peak gust at load height against the crane's in-service limit.

The in-service wind limit of a crane applies to the gust speed at the height of the
crane and load, not to a 10-minute mean (common practice), so the summary gives the
largest wind speed the load met and compares it with ``crane.wind_limit_m_s``.
"""

from __future__ import annotations

import numpy as np

from swingsim.constants import newton_to_tonnes_force
from swingsim.scene.site import wind_from_bearing_deg


def wind_series(scene, samples: dict) -> dict:
    """Wind speed and the bearing it comes from at the load, per sample.

    Parameters
    ----------
    scene : Scene
        The run's scene (its wind and site north).
    samples : dict
        The model's outputs at the sample times (``wind_at_load`` (N, 2) [m/s] when the
        model gives it; otherwise the steady wind).

    Returns
    -------
    dict
        ``speed_m_s`` (N,) [m/s] and ``from_bearing_deg`` (N,) [deg], the bearing of the
        mean wind where the speed is zero.
    """
    n = len(samples["load"])
    wxy = samples.get("wind_at_load")
    if wxy is None:
        d = np.radians(scene.wind.direction_deg)
        wxy = np.tile([scene.wind.speed_m_s * np.cos(d), scene.wind.speed_m_s * np.sin(d)], (n, 1))
    wxy = np.asarray(wxy, dtype=float)
    speed = np.hypot(wxy[:, 0], wxy[:, 1])
    toward = np.where(speed > 0.0, np.degrees(np.arctan2(wxy[:, 1], wxy[:, 0])), scene.wind.direction_deg)
    bearing = np.array([wind_from_bearing_deg(float(a), scene.site.north_deg) for a in toward])
    return {"speed_m_s": speed, "from_bearing_deg": bearing}


def gust_metrics(traj, t, samples) -> dict:
    """Summary numbers of the wind at the load: the peak gust and when it came.

    Parameters
    ----------
    traj : Trajectory
        The run.
    t : ndarray
        The metrics' sample times [s].
    samples : dict
        The model's outputs at ``t``.

    Returns
    -------
    dict
        ``peak_gust_m_s`` (largest wind speed at the load's height) [m/s],
        ``peak_gust_time_s`` [s], ``wind_limit_m_s`` (the crane's in-service limit)
        [m/s], ``wind_varies`` (gusts, turbulence or a profile); empty in still air.
    """
    scene = traj.scene
    wind = scene.wind
    if wind.speed_m_s == 0.0 and not wind.gusts:
        return {}
    series = wind_series(scene, samples)
    i = int(np.argmax(series["speed_m_s"]))
    return {
        "peak_gust_m_s": float(series["speed_m_s"][i]),
        "peak_gust_time_s": float(t[i]),
        "wind_limit_m_s": scene.crane.wind_limit_m_s,
        "wind_varies": bool(wind.gusts or wind.turbulence_intensity > 0.0 or wind.profile != "uniform"),
    }


def gust_warnings(data: dict, scene) -> list[str]:
    """The caution when the peak gust at load height reaches the crane's in-service limit.

    Parameters
    ----------
    data : dict
        The summary's data (``peak_gust_m_s`` [m/s], ``peak_gust_time_s`` [s]).
    scene : Scene
        Its scene (the crane's ``wind_limit_m_s`` [m/s] and the mean wind).

    Returns
    -------
    list of str
        One sentence, or none (also none for a steady uniform wind: the mean-wind
        check of :func:`swingsim.metrics.cautions.scenario_warnings` covers it).
    """
    gust = data.get("peak_gust_m_s")
    if gust is None or not data.get("wind_varies"):
        return []
    limit = scene.crane.wind_limit_m_s
    src = ("" if "wind_limit_m_s" in scene.raw.get("crane", {})
           else " (a rule-of-thumb default: set crane.wind_limit_m_s from the manufacturer's data)")
    if gust > limit:
        return [f"Peak gust {gust:.1f} m/s at load height (t = {data['peak_gust_time_s']:.1f} s) exceeds the "
                f"crane's in-service wind limit of {limit:g} m/s{src}; the limit applies to gusts, not to "
                "the mean wind: lifting should not go ahead in this wind."]
    if gust > 0.8 * limit:
        return [f"Peak gust {gust:.1f} m/s at load height is within 20% of the crane's in-service wind limit "
                f"of {limit:g} m/s{src}; follow the lift plan's wind procedure."]
    return []


def gust_lines(data: dict, scene) -> list[str]:
    """summary.txt lines of the wind at the load (peak gust, the limit, the realisations).

    Parameters
    ----------
    data : dict
        The summary's data.
    scene : Scene
        Its scene.

    Returns
    -------
    list of str
        The lines (none in still air).
    """
    if data.get("peak_gust_m_s") is None:
        return []
    w = scene.wind
    out = ["", "Wind at the load"]
    parts = []
    if w.profile != "uniform":
        parts.append(f"{w.profile} profile, speeds given at {w.reference_height_m:g} m")
    if w.turbulence_intensity > 0.0:
        parts.append(f"turbulence intensity {w.turbulence_intensity:g} ({w.spectrum} spectrum, seed {w.seed})")
    if w.gusts:
        parts.append(f"{len(w.gusts)} discrete gust(s)")
    if parts:
        out.append("  " + "; ".join(parts))
    if data.get("wind_varies"):
        out.append(f"  Peak gust at load height         {data['peak_gust_m_s']:.2f} m/s  at t = "
                   f"{data['peak_gust_time_s']:.1f} s (in-service limit {data['wind_limit_m_s']:g} m/s, "
                   "which applies to gusts)")
    else:  # a steady, uniform wind has no gust: say what the figure is and what it leaves out
        out.append(f"  Steady wind at the load          {data['peak_gust_m_s']:.2f} m/s (in-service limit "
                   f"{data['wind_limit_m_s']:g} m/s, which applies to gusts; a steady wind has none, "
                   "see [wind] turbulence_intensity and [[wind.gusts]])")
    stats = data.get("gust_statistics")
    if stats:
        out.append(f"  Over {stats['realisations']} turbulence realisations (seeds {stats['seeds'][0]}.."
                   f"{stats['seeds'][-1]}): mean / 95th percentile / largest")
        for key, label, unit in _STAT_LINES:
            s = stats.get(key)
            if s is not None:
                line = f"    {label:<31}{s['mean']:8.2f} / {s['p95']:8.2f} / {s['max']:8.2f} {unit}"
                if unit == "kN":  # forces also in tonnes-force (1 t = 9.80665 kN)
                    line += " (" + " / ".join(f"{newton_to_tonnes_force(1e3 * s[k]):.2f}"
                                              for k in ("mean", "p95", "max")) + " t)"
                out.append(line)
        for name, s in stats.get("zone_clearance_m", {}).items():
            out.append(f"    {'clearance to ' + name:<31}{s['mean']:8.2f} / {s['p5']:8.2f} (5th pct) / "
                       f"{s['min']:8.2f} (least) m")
        out.append(f"  Time series and video: the worst realisation (seed {stats['worst_seed']}, "
                   "largest peak swing)")
    return out


#: The statistics summary.txt lists: key, label, unit.
_STAT_LINES = (("peak_rope_angle_deg", "peak rope angle", "deg"),
               ("peak_excursion_m", "peak excursion", "m"),
               ("peak_hook_load_kN", "peak hook load", "kN"))
