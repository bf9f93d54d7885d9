"""The crane layout to draw: its kind and sizes, and the ground it stands on, from the run's extent.

Dimensions follow the run (the jib reaches past the largest radius, the rails
cover the travel), so any scene gets a fitting, schematic crane.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Layout:
    """Sizes of the schematic crane and of the ground [m].

    Attributes
    ----------
    kind : str
        ``crane.kind``: "tower", "gantry", "bridge" or "mobile".
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
        The jib 12 % past the largest radius plus 2 m (8 m at least), the rails
        4 m past the suspension point's y range (10 m apart at least) and 8 m
        past its x range, the ground 8 m plus 15 % past everything.
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
    kind = scene.crane.kind
    if kind == "tower":  # the jib's sweep around the base's two extreme positions
        ang = np.linspace(0, 2 * np.pi, 33)
        bx, by = crane.travel_x_m, crane.travel_y_m
        for xb, yb in ((bx.min(), by.min()), (bx.max(), by.max())):
            pts.append(np.stack([xb + 0.35 * jib * np.cos(ang), yb + 0.35 * jib * np.sin(ang)], -1))
    allp = np.concatenate(pts)
    core = np.concatenate(pts[:3])
    axes_xy = tuple(float(v) for v in core.min(axis=0) - 5.0)
    y_lo = float(p[:, 1].min()) - 4.0
    y_hi = float(p[:, 1].max()) + 4.0
    if y_hi - y_lo < 10.0:
        mid = 0.5 * (y_lo + y_hi)
        y_lo, y_hi = mid - 5.0, mid + 5.0
    x_lo = float(p[:, 0].min()) - 8.0
    x_hi = float(p[:, 0].max()) + 8.0
    if kind in ("gantry", "bridge"):
        allp = np.concatenate([allp, [[x_lo, y_lo], [x_hi, y_hi]]])
    pad = 8.0 + 0.15 * float(np.max(allp.max(axis=0) - allp.min(axis=0)))
    lo = allp.min(axis=0) - pad
    hi = allp.max(axis=0) + pad
    return Layout(kind=kind, suspension_height_m=z0, jib_length_m=jib, counter_jib_length_m=max(4.0, 0.32 * jib),
                  rail_x_m=(x_lo, x_hi), rail_y_m=(y_lo, y_hi),
                  ground_m=(float(lo[0]), float(hi[0]), float(lo[1]), float(hi[1])),
                  load_size_m=tuple(load_size_m), load_shape=load_shape, axes_xy_m=axes_xy)
