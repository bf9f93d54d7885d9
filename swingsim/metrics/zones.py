"""Zones as people and structures see them: one verdict for the summary, the plots and the video.

Every part of the suspended system counts, not only the load: the hoist rope and
the slings (and a spreader beam) as straight segments, the hook block as the
sphere that holds its box in any orientation, and the load as its box, turned
with its tilt for a rigid load (a point when it has no size).  The bodies come
from the model's outputs (``Trajectory.sample``), the same ones the video draws.

- An **obstacle** (``kind = "obstacle"``) is a solid volume: its clearance is the
  smallest 3D distance from any body to its box; zero is a touch.
- An **exclusion** zone (``kind = "exclusion"``) is a plan area where people may
  be: anything over it, at any height, is an entry.  Its clearance is the
  horizontal distance from any body's plan footprint to the zone's plan area;
  while a body is over it, its height above the zone's top (``max_m[2]``, the
  height of what is in the zone) is reported.

At each instant a zone is ``entered`` (clearance 0), ``near`` (within its margin)
or ``clear``: :func:`verdict`, used by ``summary.json``, ``summary.txt``,
``plan.png`` and the video alike.

The distances are exact: a segment against an axis-aligned box by minimising the
convex piecewise-quadratic squared distance along the segment, piece by piece
(:func:`segment_box_distance`); two boxes by their 24 edges, since two convex
polytopes that meet or come closest do so on an edge of one of them
(:func:`box_box_distance`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["zone_distance", "load_half_size_m", "segment_box_distance", "box_box_distance",
           "SuspendedBodies", "suspended_bodies", "zone_clearances", "verdict", "zone_verdicts_at",
           "zone_summaries", "ENTERED", "NEAR", "CLEAR"]

#: The three states of a zone at an instant (:func:`verdict`).
ENTERED, NEAR, CLEAR = "entered", "near", "clear"

#: A box's 8 corners as signs of its half sizes, and its 12 edges as pairs of corners.
_CORNER_SIGNS = np.array([[sx, sy, sz] for sx in (-1, 1) for sy in (-1, 1) for sz in (-1, 1)], dtype=float)
_EDGES = np.array([(i, j) for i in range(8) for j in range(i + 1, 8)
                   if np.sum(_CORNER_SIGNS[i] != _CORNER_SIGNS[j]) == 1])


def zone_distance(points: np.ndarray, lo, hi) -> np.ndarray:
    """Distance from points to an axis-aligned box, 0 inside it.

    Parameters
    ----------
    points : ndarray (N, D)
        Points, e.g. the load's centre over time [m].
    lo, hi : array_like (D,)
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
    """Half the load's size along its own x, y, z (zeros for a load without a size).

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


def segment_box_distance(start, end, lo, hi):
    """Exact distance between straight segments and an axis-aligned box, in any dimension.

    The squared distance of the point ``start + s (end - start)`` to the box is
    convex and piecewise quadratic in ``s``: it changes form only where a
    coordinate crosses a face's plane.  Between those breakpoints it is one
    quadratic, minimised in closed form; the smallest of those minima is the
    distance.

    Parameters
    ----------
    start, end : array_like (..., D)
        End points of the segments [m]; equal end points make a point.
    lo, hi : array_like (D,) or (..., D)
        Lowest and highest corner of the box [m].

    Returns
    -------
    distance : ndarray (...)
        Distance of each segment to the box, 0 where it touches or crosses it [m].
    along : ndarray (...)
        Where on the segment the closest point is, 0 at ``start`` and 1 at ``end`` [-].
    """
    a = np.asarray(start, dtype=float)
    b = np.asarray(end, dtype=float)
    lo = np.asarray(lo, dtype=float)
    hi = np.asarray(hi, dtype=float)
    a, b, lo, hi = np.broadcast_arrays(a, b, lo, hi)
    d = b - a
    with np.errstate(divide="ignore", invalid="ignore"):
        crossings = np.concatenate([(lo - a) / d, (hi - a) / d], axis=-1)
    crossings = np.where(np.isfinite(crossings), crossings, 0.0)
    ends = np.zeros(a.shape[:-1] + (2,))
    ends[..., 1] = 1.0
    cuts = np.sort(np.clip(np.concatenate([ends, crossings], axis=-1), 0.0, 1.0), axis=-1)
    s0, s1 = cuts[..., :-1], cuts[..., 1:]
    # which faces bind on each piece: read at its middle (constant inside the piece)
    mid = a[..., None, :] + (0.5 * (s0 + s1))[..., None] * d[..., None, :]
    lo_k, hi_k = lo[..., None, :], hi[..., None, :]
    target = np.where(mid < lo_k, lo_k, np.where(mid > hi_k, hi_k, np.nan))
    active = np.isfinite(target)
    dk = np.broadcast_to(d[..., None, :], mid.shape)
    offset = np.where(active, a[..., None, :] - np.where(active, target, 0.0), 0.0)
    slope = np.where(active, dk, 0.0)
    den = np.sum(slope * slope, axis=-1)
    num = -np.sum(slope * offset, axis=-1)
    with np.errstate(divide="ignore", invalid="ignore"):
        s_star = np.where(den > 0.0, num / np.where(den > 0.0, den, 1.0), s0)
    s_star = np.clip(s_star, s0, s1)
    x = a[..., None, :] + s_star[..., None] * d[..., None, :]
    gap = np.linalg.norm(np.maximum(np.maximum(lo_k - x, x - hi_k), 0.0), axis=-1)
    k = np.argmin(gap, axis=-1)
    distance = np.take_along_axis(gap, k[..., None], axis=-1)[..., 0]
    along = np.take_along_axis(s_star, k[..., None], axis=-1)[..., 0]
    return distance, along


def _box_corners(centre, rotation, half) -> np.ndarray:
    """World corners (N, 8, 3) of boxes with the given centres (N, 3), rotations (N, 3, 3) and half sizes (3,)."""
    local = _CORNER_SIGNS * half
    return centre[:, None, :] + np.einsum("nij,kj->nki", rotation, local)


def box_box_distance(centre, rotation, half, lo, hi) -> np.ndarray:
    """Exact distance between turned boxes and one axis-aligned box.

    Two convex polytopes that touch or come closest do so with a point on an
    edge of one of them, so the distance is the smallest of the 12 edges of
    each box against the other box (each taken in the other's own axes, where
    it is axis-aligned).

    Parameters
    ----------
    centre : array_like (N, 3)
        Centres of the turned boxes [m].
    rotation : array_like (N, 3, 3)
        Their rotations, own axes to world (columns: own x, y, z in world) [-].
    half : array_like (3,)
        Their half sizes along their own axes [m].
    lo, hi : array_like (3,)
        Lowest and highest corner of the axis-aligned box [m].

    Returns
    -------
    ndarray (N,)
        Distance [m]; 0 where the boxes touch or overlap.
    """
    centre = np.asarray(centre, dtype=float).reshape(-1, 3)
    rotation = np.asarray(rotation, dtype=float).reshape(-1, 3, 3)
    half = np.asarray(half, dtype=float)
    lo, hi = np.asarray(lo, dtype=float), np.asarray(hi, dtype=float)
    corners = _box_corners(centre, rotation, half)
    mine, _ = segment_box_distance(corners[:, _EDGES[:, 0]], corners[:, _EDGES[:, 1]], lo, hi)
    zone_centre = 0.5 * (lo + hi)
    zone_world = zone_centre + _CORNER_SIGNS * 0.5 * (hi - lo)
    zone_own = np.einsum("nji,nkj->nki", rotation, zone_world[None, :, :] - centre[:, None, :])
    theirs, _ = segment_box_distance(zone_own[:, _EDGES[:, 0]], zone_own[:, _EDGES[:, 1]], -half, half)
    return np.minimum(mine.min(axis=-1), theirs.min(axis=-1))


def _clip_to_area(start, end, lo2, hi2):
    """Where segments (..., 3) run over a plan rectangle: the parameter range [s0, s1] and whether it is not empty."""
    a, d = start[..., :2], end[..., :2] - start[..., :2]
    s0 = np.zeros(a.shape[:-1])
    s1 = np.ones(a.shape[:-1])
    inside = np.ones(a.shape[:-1], dtype=bool)
    for i in range(2):
        flat = np.abs(d[..., i]) <= 1e-15
        inside &= ~flat | ((a[..., i] >= lo2[i]) & (a[..., i] <= hi2[i]))
        with np.errstate(divide="ignore", invalid="ignore"):
            t1 = (lo2[i] - a[..., i]) / d[..., i]
            t2 = (hi2[i] - a[..., i]) / d[..., i]
        s0 = np.where(flat, s0, np.maximum(s0, np.minimum(t1, t2)))
        s1 = np.where(flat, s1, np.minimum(s1, np.maximum(t1, t2)))
    return s0, s1, inside & (s0 <= s1)


def _lowest_over_area(start, end, lo2, hi2) -> np.ndarray:
    """Lowest height (...) of segments (..., 3) where they run over a plan rectangle; +inf where they do not [m]."""
    s0, s1, over = _clip_to_area(start, end, lo2, hi2)
    z0 = start[..., 2] + s0 * (end[..., 2] - start[..., 2])
    z1 = start[..., 2] + s1 * (end[..., 2] - start[..., 2])
    return np.where(over, np.minimum(z0, z1), np.inf)


@dataclass(frozen=True)
class SuspendedBodies:
    """Every part of the suspended system at N instants, as the zone checks see them.

    Attributes
    ----------
    segments : dict
        ``"rope"``, ``"sling_1"``... (and ``"spreader"``) -> (N, 2, 3) end points [m].
    load_centre_m : numpy.ndarray
        (N, 3) centre of the load's box [m].
    load_rotation : numpy.ndarray
        (N, 3, 3) the load's own axes in the world [-].
    load_half_m : numpy.ndarray
        (3,) half sizes of the load's box, zeros for a point load [m].
    hook_m : numpy.ndarray or None
        (N, 3) centre of the hook block, None without one [m].
    hook_radius_m : float
        Radius of the sphere that holds the hook block's box [m].
    """

    segments: dict
    load_centre_m: np.ndarray
    load_rotation: np.ndarray
    load_half_m: np.ndarray
    hook_m: np.ndarray | None
    hook_radius_m: float

    @property
    def names(self) -> list:
        """Body names in report order: ``load``, ``hook`` (with a hook block), ``rope``, then the rigging."""
        return ["load"] + (["hook"] if self.hook_m is not None else []) + list(self.segments)


def suspended_bodies(samples: dict, scene) -> SuspendedBodies:
    """The suspended system's bodies from a model's outputs.

    Parameters
    ----------
    samples : dict
        ``Trajectory.sample`` at N instants: ``suspension``, ``load``, ``hook``,
        ``rope_dir``, ``rope_length`` and, where the model has them,
        ``load_rotation``, ``attach_points``, ``spreader_ends``, ``spreader_lugs``.
        Arrays for one instant without the leading axis are accepted.
    scene : Scene
        The validated scene (load size and centre of gravity, hook block size).

    Returns
    -------
    SuspendedBodies
        The rope from the suspension point to the hook block (or to the rigging's
        pin, or to the load's centre for the point-mass model), the slings from
        the hook (or pin) to the lifting points (a spreader: its two top slings,
        the beam and the drop legs), the hook block and the load's box.
    """
    p = np.asarray(samples["suspension"], dtype=float).reshape(-1, 3)
    n = len(p)
    load = np.asarray(samples["load"], dtype=float).reshape(n, 3)
    hook = samples.get("hook")
    hook = None if hook is None else np.asarray(hook, dtype=float).reshape(n, 3)
    rot = samples.get("load_rotation")
    rot = np.broadcast_to(np.eye(3), (n, 3, 3)) if rot is None else np.asarray(rot, dtype=float).reshape(n, 3, 3)
    attach = samples.get("attach_points")
    attach = None if attach is None else np.asarray(attach, dtype=float).reshape(n, -1, 3)
    if hook is not None:
        apex = hook
    elif attach is not None:  # no hook block: the rope ends at the rigging's pin
        apex = p + np.asarray(samples["rope_length"], dtype=float).reshape(n, 1) * \
            np.asarray(samples["rope_dir"], dtype=float).reshape(n, 3)
    else:  # the point-mass model: the rope runs to the load
        apex = load
    segments = {"rope": np.stack([p, apex], axis=1)}
    legs = []
    ends = samples.get("spreader_ends")
    if ends is not None and attach is not None:
        ends = np.asarray(ends, dtype=float).reshape(n, 2, 3)
        lugs = np.asarray(samples["spreader_lugs"], dtype=float).reshape(n, -1, 3)
        legs = [(apex, ends[:, 0]), (apex, ends[:, 1])] + \
            [(lugs[:, j], attach[:, j]) for j in range(min(lugs.shape[1], attach.shape[1]))]
        segments["spreader"] = np.stack([ends[:, 0], ends[:, 1]], axis=1)
    elif attach is not None:
        legs = [(apex, attach[:, j]) for j in range(attach.shape[1])]
    for i, (a, b) in enumerate(legs):
        segments[f"sling_{i + 1}"] = np.stack([a, b], axis=1)
    # the box is centred on its size_m box; the model's load point is the centre of gravity
    cg = np.asarray(scene.load.cg_offset_m, dtype=float)
    centre = load - np.einsum("nij,j->ni", rot, cg)
    hook_radius = 0.0
    if hook is not None and scene.hook is not None and scene.hook.size_m is not None:
        hook_radius = 0.5 * float(np.linalg.norm(scene.hook.size_m))
    return SuspendedBodies(segments=segments, load_centre_m=centre, load_rotation=np.asarray(rot),
                           load_half_m=load_half_size_m(scene), hook_m=hook, hook_radius_m=hook_radius)


def _load_plan(bodies: SuspendedBodies, lo, hi):
    """Plan distance (N,) of the load's footprint to a zone's plan area, and its lowest height over it (N,)."""
    corners = _box_corners(bodies.load_centre_m, bodies.load_rotation, bodies.load_half_m)
    a, b = corners[:, _EDGES[:, 0]], corners[:, _EDGES[:, 1]]
    edge_d, _ = segment_box_distance(a[..., :2], b[..., :2], lo[:2], hi[:2])
    lowest = _lowest_over_area(a, b, lo[:2], hi[:2]).min(axis=-1)
    # a zone smaller than the footprint: the vertical lines at its corners run through the box
    half = bodies.load_half_m
    up_own = bodies.load_rotation[:, 2, :]  # world z in the load's own axes
    under = np.zeros(len(corners), dtype=bool)
    for x in (lo[0], hi[0]):
        for y in (lo[1], hi[1]):
            origin = np.einsum("nji,nj->ni", bodies.load_rotation,
                               np.array([x, y, 0.0]) - bodies.load_centre_m)
            enter = np.full(len(corners), -np.inf)
            leave = np.full(len(corners), np.inf)
            ok = np.ones(len(corners), dtype=bool)
            for i in range(3):
                flat = np.abs(up_own[:, i]) <= 1e-15
                ok &= ~flat | (np.abs(origin[:, i]) <= half[i])
                with np.errstate(divide="ignore", invalid="ignore"):
                    t1 = (-half[i] - origin[:, i]) / up_own[:, i]
                    t2 = (half[i] - origin[:, i]) / up_own[:, i]
                enter = np.where(flat, enter, np.maximum(enter, np.minimum(t1, t2)))
                leave = np.where(flat, leave, np.minimum(leave, np.maximum(t1, t2)))
            hit = ok & (enter <= leave)
            under |= hit
            lowest = np.where(hit, np.minimum(lowest, enter), lowest)
    return np.where(under, 0.0, edge_d.min(axis=-1)), lowest


def zone_clearances(bodies: SuspendedBodies, zone) -> tuple:
    """Clearance of every body to one zone at every instant, by the zone's kind.

    Parameters
    ----------
    bodies : SuspendedBodies
        The suspended system at N instants.
    zone : Zone
        The zone (``kind``, ``min_m``, ``max_m``).

    Returns
    -------
    distance : dict
        Body name -> (N,) clearance [m]: the 3D distance to an obstacle's box, the
        plan distance to an exclusion zone's area; 0 is a touch or an entry.
    lowest : dict
        Exclusion zones only (empty for an obstacle): body name -> (N,) height of
        the body's lowest point over the area [m], +inf while it is not over it.
    """
    lo, hi = np.asarray(zone.min_m, dtype=float), np.asarray(zone.max_m, dtype=float)
    distance, lowest = {}, {}
    n = len(bodies.load_centre_m)
    if zone.kind == "exclusion":
        distance["load"], lowest["load"] = _load_plan(bodies, lo, hi)
        if bodies.hook_m is not None:
            r = bodies.hook_radius_m
            distance["hook"] = np.maximum(zone_distance(bodies.hook_m[:, :2], lo[:2], hi[:2]) - r, 0.0)
            lowest["hook"] = np.where(distance["hook"] <= 0.0, bodies.hook_m[:, 2] - r, np.inf)
        for name, seg in bodies.segments.items():
            distance[name], _ = segment_box_distance(seg[:, 0, :2], seg[:, 1, :2], lo[:2], hi[:2])
            lowest[name] = _lowest_over_area(seg[:, 0], seg[:, 1], lo[:2], hi[:2])
    else:
        distance["load"] = box_box_distance(bodies.load_centre_m, bodies.load_rotation, bodies.load_half_m,
                                            lo, hi).reshape(n)
        if bodies.hook_m is not None:
            distance["hook"] = np.maximum(zone_distance(bodies.hook_m, lo, hi) - bodies.hook_radius_m, 0.0)
        for name, seg in bodies.segments.items():
            distance[name], _ = segment_box_distance(seg[:, 0], seg[:, 1], lo, hi)
    return distance, lowest


def verdict(distance_m: float, margin_m: float) -> str:
    """A zone's state at an instant from the smallest clearance of any body to it.

    Parameters
    ----------
    distance_m : float
        Smallest clearance of any part of the suspended system [m] (:func:`zone_clearances`).
    margin_m : float
        The zone's margin [m].

    Returns
    -------
    str
        :data:`ENTERED` (0: touching or over it), :data:`NEAR` (within the margin)
        or :data:`CLEAR`.
    """
    if distance_m <= 0.0:
        return ENTERED
    return NEAR if distance_m <= margin_m else CLEAR


def zone_verdicts_at(samples: dict, scene) -> list:
    """Each zone's state at one instant, for the video: the summary's own rule.

    Parameters
    ----------
    samples : dict
        The model's outputs at one instant (a row of ``Trajectory.sample``).
    scene : Scene
        The validated scene.

    Returns
    -------
    list of tuple
        Per zone: ``(state, bodies)``, the :func:`verdict` and the names of the
        bodies inside (entered) or within the margin (near).
    """
    bodies = suspended_bodies(samples, scene)
    out = []
    for zone in scene.zones:
        distance, _ = zone_clearances(bodies, zone)
        state = verdict(min(float(d[0]) for d in distance.values()), zone.margin_m)
        limit = 0.0 if state == ENTERED else zone.margin_m
        out.append((state, [name for name in bodies.names if float(distance[name][0]) <= limit]))
    return out


def _runs(flag):
    """First and last index of each run of consecutive samples where ``flag`` holds."""
    out = []
    i = 0
    while i < len(flag):
        if flag[i]:
            j = i
            while j + 1 < len(flag) and flag[j + 1]:
                j += 1
            out.append((i, j))
            i = j + 1
        else:
            i += 1
    return out


def zone_summaries(t: np.ndarray, samples: dict, scene) -> list[dict]:
    """The ``zones`` entries of ``summary.json``: the verdict over the run for each zone.

    Parameters
    ----------
    t : ndarray (N,)
        Sample times [s].
    samples : dict
        The model's outputs at those times (``Trajectory.sample``).
    scene : Scene
        The validated scene (its zones, load and hook block).

    Returns
    -------
    list of dict
        Per zone: name, kind, margin [m]; ``min_distance_m`` (smallest clearance
        of any body: 3D for an obstacle, in plan for an exclusion zone) with its
        time [s] and body; ``entered`` and ``entered_by`` (body names);
        ``entries`` (each: start, end, duration [s], bodies and, for an exclusion
        zone, the lowest height above the zone's top [m]); ``first_entry_s``,
        ``time_entered_s``; ``min_height_above_zone_m`` (exclusion zones);
        ``inside`` (the same as ``entered``), ``within_margin``,
        ``first_within_margin_s`` and ``time_within_margin_s``.
    """
    bodies = suspended_bodies(samples, scene)
    names = bodies.names
    dt = np.diff(t)
    out = []
    for z in scene.zones:
        distance, lowest = zone_clearances(bodies, z)
        table = np.stack([distance[name] for name in names], axis=-1)  # (N, bodies)
        d = table.min(axis=-1)
        k = int(np.argmin(d))
        entered_rows = table <= 0.0
        entered = d <= 0.0
        within = d <= z.margin_m
        entries = []
        for i, j in _runs(entered):
            duration = float(np.sum(dt[i:j + 1]))  # until the first sample outside (as time_entered_s counts)
            entry = {"start_s": float(t[i]), "end_s": float(t[i]) + duration, "duration_s": duration,
                     "bodies": [name for c, name in enumerate(names) if entered_rows[i:j + 1, c].any()]}
            if z.kind == "exclusion":
                low = min(float(np.min(lowest[name][i:j + 1])) for name in lowest)
                entry["min_height_above_zone_m"] = low - float(z.max_m[2])
            entries.append(entry)
        height = None
        if z.kind == "exclusion" and entries:
            height = min(e["min_height_above_zone_m"] for e in entries)
        out.append({
            "name": z.name, "kind": z.kind, "margin_m": z.margin_m,
            "min_distance_m": float(d[k]), "min_distance_time_s": float(t[k]),
            "min_distance_body": names[int(np.argmin(table[k]))],
            "entered": bool(entered.any()),
            "entered_by": [name for c, name in enumerate(names) if entered_rows[:, c].any()],
            "first_entry_s": entries[0]["start_s"] if entries else None,
            "time_entered_s": float(np.sum(dt[entered[:-1]])) if len(t) > 1 else 0.0,
            "min_height_above_zone_m": height,
            "entries": entries,
            "inside": bool(entered.any()), "within_margin": bool(np.any(within)),
            "first_within_margin_s": float(t[int(np.argmax(within))]) if np.any(within) else None,
            "time_within_margin_s": float(np.sum(dt[within[:-1]])) if len(t) > 1 else 0.0,
        })
    return out
