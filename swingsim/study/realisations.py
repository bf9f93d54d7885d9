"""The answer in gusty wind as a distribution: N independent turbulence realisations of one scene.

``[wind] realisations = N`` runs the scene with the seeds ``seed, seed + 1, ...,
seed + N - 1`` (one turbulence realisation each; everything else equal) and reports
the mean, the 95th percentile and the largest of the peak rope angle, the peak
excursion and the peak hook load, and the mean, 5th percentile and least of each
zone's clearance (``summary.json`` ``gust_statistics``).  The realisations run on the
batch engine (``batch.engine.run_batch``: the point mass, and the hook block, rigid load
and elastic rope of ``batch/hook_engine.py``, the seeds of one scene integrated together;
a load resting for lift-off, a luffing boom and a realisation the batch cannot vouch for
fall back to the single-run solver per realisation).  Zone clearances are measured by the single-run path only, so a scene
with zones runs every realisation there.  The run's time series, plots and video are
those of the worst realisation (the largest peak rope angle).

Percentiles are numpy's default (linear interpolation between order statistics).
"""

from __future__ import annotations

import dataclasses

import numpy as np

from swingsim.batch.engine import run_batch
from swingsim.metrics.single import summarize
from swingsim.simulation import simulate

#: Summary keys whose realisations are reported as mean, 95th percentile and largest.
PEAK_KEYS = ("peak_rope_angle_deg", "peak_excursion_m", "peak_hook_load_kN")


def realisation_scenes(scene) -> list:
    """The scene once per realisation: seeds ``seed`` .. ``seed + N - 1``, one realisation each.

    Parameters
    ----------
    scene : Scene
        A validated scene (``wind.realisations`` = N, ``wind.seed``).

    Returns
    -------
    list of Scene
        N scenes differing only in ``wind.seed`` (and ``wind.realisations = 1``).
    """
    w = scene.wind
    return [dataclasses.replace(scene, wind=dataclasses.replace(w, seed=w.seed + i, realisations=1))
            for i in range(w.realisations)]


def _summaries(scenes) -> list:
    """The summaries of the realisations: batch engine without zones, single runs with them."""
    if scenes[0].zones:
        return [dict(summarize(simulate(s)).data) for s in scenes]
    out = run_batch(scenes)
    for d in out:
        d["peak_hook_load_kN"] = d.get("peak_rope_tension_kN")  # the same number (summary.json names both)
    return out


def gust_statistics(scene, summaries=None) -> dict:
    """Statistics of the peaks over the scene's turbulence realisations.

    Parameters
    ----------
    scene : Scene
        A validated scene with ``wind.realisations`` >= 1.
    summaries : list of dict, optional
        The realisations' summaries (as :func:`_summaries` gives them), when already run.

    Returns
    -------
    dict
        ``realisations``, ``seeds``, ``engine`` (engines used), for each key of
        :data:`PEAK_KEYS` a dict ``mean``, ``p95``, ``max`` and ``values`` (one per seed),
        ``zone_clearance_m`` (zone name -> ``mean``, ``p5``, ``min``, ``values``) [m],
        ``worst_seed`` (largest peak rope angle) and ``worst_index``.
    """
    scenes = realisation_scenes(scene)
    sums = _summaries(scenes) if summaries is None else summaries
    seeds = [s.wind.seed for s in scenes]
    out = {"realisations": len(scenes), "seeds": seeds,
           "engine": sorted({str(d.get("engine", "single")) for d in sums})}
    for key in PEAK_KEYS:
        vals = np.array([np.nan if d.get(key) is None else float(d[key]) for d in sums])
        if np.all(np.isnan(vals)):
            continue
        out[key] = {"mean": float(np.nanmean(vals)), "p95": float(np.nanpercentile(vals, 95.0)),
                    "max": float(np.nanmax(vals)), "values": vals.tolist()}
    zones = {}
    for d in sums:
        for z in d.get("zones") or []:
            if z.get("min_distance_m") is not None:
                zones.setdefault(z["name"], []).append(float(z["min_distance_m"]))
    out["zone_clearance_m"] = {name: {"mean": float(np.mean(v)), "p5": float(np.percentile(v, 5.0)),
                                      "min": float(np.min(v)), "values": v} for name, v in zones.items()}
    angles = np.array([-np.inf if d.get("peak_rope_angle_deg") is None else d["peak_rope_angle_deg"] for d in sums])
    worst = int(np.argmax(angles))
    out["worst_index"] = worst
    out["worst_seed"] = seeds[worst]
    return out


def run_scene(scene):
    """Simulate a scene and measure it; with realisations, the worst one plus the statistics.

    Parameters
    ----------
    scene : Scene
        A validated scene.

    Returns
    -------
    tuple
        ``(trajectory, summary)``: for ``wind.realisations`` > 1 the worst realisation's
        run, its summary holding ``gust_statistics`` (and a summary.txt section).
    """
    if scene.wind.realisations <= 1:
        traj = simulate(scene)
        return traj, summarize(traj)
    stats = gust_statistics(scene)
    worst = realisation_scenes(scene)[stats["worst_index"]]
    traj = simulate(worst)
    summary = summarize(traj)
    summary.data["gust_statistics"] = stats
    summary.data["cautions"].append(
        f"The time series, plots and video show the worst of {stats['realisations']} turbulence "
        f"realisations (seed {stats['worst_seed']}); another day's wind can be worse than any of them: "
        "plan on the statistics, not on one run.")
    return traj, summary
