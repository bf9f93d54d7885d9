"""The crane layout to draw: its kind and sizes, and the ground it stands on, from the run's extent.

Dimensions follow the run (the jib reaches past the largest radius, the rails
cover the travel), so any scene gets a fitting, schematic crane.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


#: Where a mobile crane's boom foot pivots when the scene gives no boom, in the turret's frame [m].
SCHEMATIC_BOOM_FOOT_M = (-1.2, 0.0, 3.2)


@dataclass(frozen=True)
class Layout:
    """Sizes of the schematic crane and of the ground [m].

    Attributes
    ----------
    kind : str
        ``crane.kind``: "tower", "luffing", "gantry", "bridge" or "mobile".
    suspension_height_m : float
        Height of the suspension point (the jib or beam's underside) [m].
    jib_length_m, counter_jib_length_m : float
        A tower crane's jib and counter-jib [m].
    rail_x_m : tuple of float
        (start, end) of a gantry's rails or a bridge crane's runway along x [m].
    rail_y_m : tuple of float
        (low, high) y of the two rail lines [m].
    ground_m : tuple of float
        (xmin, xmax, ymin, ymax) the ground must cover [m].
    load_size_m : tuple of float
        The drawn load's size along x, y, z [m].
    load_shape : str
        "box", "cylinder" or "mesh" (a user's mesh file).
    axes_xy_m : tuple of float
        Where the +x/+y arrows stand: just off the lift's own area [m].
    boom_foot_m : tuple of float
        A boom crane's foot pin in the slewing part's frame, (along the boom, 0,
        height above the ground) [m]: the scene's ``crane.boom_foot_m``, or a
        schematic pin when the scene gives no boom.
    ground_z_m : float
        Height of the drawn ground: the scene's ``[ground] z_m`` (the surface the load
        starts on or lands on), 0 without a ``[ground]`` [m].
    """

    kind: str
    suspension_height_m: float
    jib_length_m: float
    counter_jib_length_m: float
    rail_x_m: tuple
    rail_y_m: tuple
    ground_m: tuple
    load_size_m: tuple
    load_shape: str
    axes_xy_m: tuple = (0.0, 0.0)
    boom_foot_m: tuple = SCHEMATIC_BOOM_FOOT_M
    ground_z_m: float = 0.0


def default_load_size(mass_kg: float) -> tuple:
    """A plausible block for a load with no size given: density 2000 kg/m^3, 0.5 to 3 m a side.

    Parameters
    ----------
    mass_kg : float
        The load's mass [kg].

    Returns
    -------
    tuple of float
        A cube's size along x, y, z [m].
    """
    a = min(3.0, max(0.5, (mass_kg / 2000.0) ** (1.0 / 3.0)))
    return (a, a, a)


def make_layout(traj, load_size_m, load_shape: str = "box") -> Layout:
    """The layout of a run: crane sizes from its reach and travel, ground around all of it.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The solved run (its motion, its load path over 400 instants, its zones).
    load_size_m : sequence of 3 float
        The drawn load's size [m].
    load_shape : str
        "box", "cylinder" or "mesh".

    Returns
    -------
    Layout
        The jib 12 % past the largest radius plus 2 m (8 m at least); the rails
        along x, ``crane.rail_span_m`` apart about the middle of
        ``crane.cross_limits_m`` (or 4 m past the suspension point's y range, 10 m
        apart at least), from 8 m before to 8 m past the suspension point's x
        range or ``crane.travel_limits_m``; a boom crane's foot pin where the
        scene puts it; the ground 8 m plus 15 % past everything (tag line anchors
        included), at the height of ``[ground] z_m``.
    """
    scene = traj.scene
    t = np.linspace(0.0, traj.t_end_s, 400)
    p = traj.motion.evaluate(t)["p"]
    z0 = float(p[0, 2])
    crane = traj.motion.pose(t)
    jib = max(8.0, 1.12 * float(np.max(np.abs(crane.radius_m))) + 2.0)
    load = traj.sample(t)["load"]
    pts = [p[:, :2], load[:, :2], np.stack([crane.travel_x_m, crane.travel_y_m], -1)]
    for z in scene.zones:
        pts.append(np.array([z.min_m[:2], z.max_m[:2]]))
    for line in getattr(scene, "tag_lines", ()):  # the people holding the tag lines stand on the ground too
        pts.append(np.array([line.anchor_m[:2]], dtype=float))
    crane_keys = scene.crane
    kind = crane_keys.kind
    if kind in ("tower", "luffing"):  # the jib's sweep around the base's two extreme positions
        ang = np.linspace(0, 2 * np.pi, 33)
        bx, by = crane.travel_x_m, crane.travel_y_m
        for xb, yb in ((bx.min(), by.min()), (bx.max(), by.max())):
            pts.append(np.stack([xb + 0.35 * jib * np.cos(ang), yb + 0.35 * jib * np.sin(ang)], -1))
    allp = np.concatenate(pts)
    core = np.concatenate(pts[:3])
    axes_xy = tuple(float(v) for v in core.min(axis=0) - 5.0)
    y_lo, y_hi = _rail_lines(p, crane_keys)
    x_lo, x_hi = _rail_ends(p, crane_keys)
    if kind in ("gantry", "bridge"):
        allp = np.concatenate([allp, [[x_lo, y_lo], [x_hi, y_hi]]])
    pad = 8.0 + 0.15 * float(np.max(allp.max(axis=0) - allp.min(axis=0)))
    lo = allp.min(axis=0) - pad
    hi = allp.max(axis=0) + pad
    return Layout(kind=kind, suspension_height_m=z0, jib_length_m=jib, counter_jib_length_m=max(4.0, 0.32 * jib),
                  rail_x_m=(x_lo, x_hi), rail_y_m=(y_lo, y_hi),
                  ground_m=(float(lo[0]), float(hi[0]), float(lo[1]), float(hi[1])),
                  load_size_m=tuple(load_size_m), load_shape=load_shape, axes_xy_m=axes_xy,
                  boom_foot_m=_boom_foot(crane_keys), ground_z_m=ground_height_m(scene))


def ground_height_m(scene) -> float:
    """Height of the ground the lift is drawn on: ``[ground] z_m``, or 0 without a ``[ground]`` [m].

    Parameters
    ----------
    scene : swingsim.scene.Scene
        The scene.

    Returns
    -------
    float
        The ground's height [m].
    """
    gr = getattr(scene, "ground", None)
    return 0.0 if gr is None else float(gr.z_m)


def _boom_foot(crane) -> tuple:
    """The boom's foot pin in the slewing part's frame [m] (the scene's, or the schematic one)."""
    if crane.boom_foot_m is None:
        return SCHEMATIC_BOOM_FOOT_M
    offset, height = crane.boom_foot_m
    return (float(offset), 0.0, float(height))


def _rail_lines(p, crane) -> tuple:
    """The two rails' y: the scene's span about its cross range, or a span fitted to the run."""
    if crane.rail_span_m is not None:
        limits = crane.cross_limits_m
        mid = 0.5 * (limits[0] + limits[1]) if limits is not None else float(p[0, 1])
        return mid - 0.5 * crane.rail_span_m, mid + 0.5 * crane.rail_span_m
    y_lo = float(p[:, 1].min()) - 4.0
    y_hi = float(p[:, 1].max()) + 4.0
    if y_hi - y_lo < 10.0:
        mid = 0.5 * (y_lo + y_hi)
        y_lo, y_hi = mid - 5.0, mid + 5.0
    return y_lo, y_hi


def _rail_ends(p, crane) -> tuple:
    """Where the rails start and end along x: 8 m past the travel limits, or past the run's x range."""
    lo, hi = float(p[:, 0].min()), float(p[:, 0].max())
    if crane.travel_limits_m is not None:
        lo, hi = min(lo, crane.travel_limits_m[0]), max(hi, crane.travel_limits_m[1])
    return lo - 8.0, hi + 8.0
