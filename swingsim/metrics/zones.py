"""Clearance of the load to the scene's zones (boxes it must keep away from).

One rule for the summary and for the video's zone warnings: the distance from
the load's centre to the zone box grown by the load's half sizes.
"""

from __future__ import annotations

import numpy as np


def zone_distance(points: np.ndarray, lo, hi) -> np.ndarray:
    """Distance from points to an axis-aligned box, 0 inside it.

    Parameters
    ----------
    points : ndarray (N, 3)
        Points, e.g. the load's centre over time [m].
    lo, hi : array_like (3,)
        Lowest and highest corner of the box [m].

    Returns
    -------
    ndarray (N,)
        Euclidean distance of each point to the box [m]; 0 on or inside it.
    """
    lo, hi = np.asarray(lo), np.asarray(hi)
    d = np.maximum(np.maximum(lo - points, points - hi), 0.0)
    return np.linalg.norm(d, axis=-1)


def load_half_size_m(scene) -> np.ndarray:
    """Half the load's size along x, y, z (zeros for a point load).

    The point-mass load keeps its orientation, so its box is axis-aligned and
    the clearance to a zone is the distance from the load's centre to the zone
    box grown by these half sizes (exact for boxes).

    Parameters
    ----------
    scene : Scene
        The validated scene; ``scene.load.size_m`` is the load's box [m] or None.

    Returns
    -------
    ndarray (3,)
        Half sizes [m].
    """
    if scene.load.size_m is None:
        return np.zeros(3)
    return 0.5 * np.asarray(scene.load.size_m, dtype=float)


def zone_summaries(t: np.ndarray, load_m: np.ndarray, scene) -> list[dict]:
    """The ``zones`` entries of ``summary.json``: closest approach and time near each zone.

    Parameters
    ----------
    t : ndarray (N,)
        Sample times [s].
    load_m : ndarray (N, 3)
        Load centre at those times [m].
    scene : Scene
        The validated scene (its zones and load size).

    Returns
    -------
    list of dict
        Per zone: name, kind, margin [m], the smallest clearance [m] and its time
        [s], whether the load entered the zone or its margin, when it first came
        within the margin [s] and for how long [s].
    """
    out = []
    half = load_half_size_m(scene)
    for z in scene.zones:
        d = zone_distance(load_m, np.asarray(z.min_m) - half, np.asarray(z.max_m) + half)
        within = d <= z.margin_m
        out.append({
            "name": z.name, "kind": z.kind, "margin_m": z.margin_m,
            "min_distance_m": float(np.min(d)), "min_distance_time_s": float(t[int(np.argmin(d))]),
            "inside": bool(np.any(d <= 0.0)), "within_margin": bool(np.any(within)),
            "first_within_margin_s": float(t[int(np.argmax(within))]) if np.any(within) else None,
            "time_within_margin_s": float(np.sum(np.diff(t)[within[:-1]])) if len(t) > 1 else 0.0,
        })
    return out
