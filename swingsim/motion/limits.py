"""The crane's reach over a run: radius limits, the slew axis, the boom's reach, rail limits.

A move is bad input when it would take the suspension point where the crane
cannot put it: a slewing crane's radius outside ``[crane] min_radius_m`` /
``max_radius_m``, through the slew axis (a trolley running past the mast), or
beyond a luffing boom's reach; a gantry or bridge crane's suspension point
outside ``travel_limits_m`` (along the rails, x) or ``cross_limits_m`` (across
the span, y).  The motion is evaluated at every breakpoint and on a fine grid,
and the error names the move that was running and the value it would reach.
"""

from __future__ import annotations

import numpy as np

from swingsim.errors import SceneError

#: Crane kinds that slew about a slew axis (the scene's ``crane.kind``).
SLEWING_KINDS = ("tower", "luffing", "mobile")
#: Crane kinds that travel on rails.
RAIL_KINDS = ("gantry", "bridge")
#: Samples of the run's motion between its breakpoints [-].
GRID_SAMPLES = 2001


def sample_times(motion, duration_s: float) -> np.ndarray:
    """Instants at which a run's motion is checked: every breakpoint and a fine grid.

    Parameters
    ----------
    motion : Motion
        The run's motion.
    duration_s : float
        The run's length [s].

    Returns
    -------
    numpy.ndarray
        Sorted instants from 0 to ``duration_s`` [s].
    """
    pts = set(motion.breakpoints) | {0.0, duration_s}
    return np.union1d(np.array(sorted(pts)), np.linspace(0.0, duration_s, GRID_SAMPLES))


def _running_move(scene, axes, t_s: float):
    """The move on one of ``axes`` that was last started at ``t_s`` (the one that drove it there)."""
    started = [m for m in scene.moves if m.axis in axes and m.start_s <= t_s + 1e-9]
    return max(started, key=lambda m: m.start_s) if started else None


def _refuse(scene, axes, t_s: float, reach: str, why: str):
    move = _running_move(scene, axes, t_s)
    key = "moves" if move is None else f"moves[{move.index}]"
    name = "" if move is None else f"'{move.name}' "
    raise SceneError(scene.file, key, f"{name}would take {reach} at t = {t_s:.2f} s, {why}")


def check_reach(scene, motion, times_s=None) -> None:
    """Refuse a motion that takes the suspension point beyond the crane's geometry.

    Parameters
    ----------
    scene : Scene
        The scene (its ``crane`` keys, its moves for the message, its file).
    motion : Motion
        The motion built from it.
    times_s : array_like, optional
        Instants to check [s]; default :func:`sample_times`.

    Raises
    ------
    SceneError
        Naming the move and the radius or position it would reach.
    """
    crane = scene.crane
    ts = sample_times(motion, scene.duration_s) if times_s is None else np.asarray(times_s, dtype=float)
    if crane.kind in SLEWING_KINDS and any(a == "radius" for a, _ in motion.moves):
        radius = motion.pose(ts).radius_m
        axes = ("radius",)
        i = int(np.argmin(radius))
        if radius[i] < -1e-9:
            _refuse(scene, axes, float(ts[i]), f"the radius to {radius[i]:.2f} m",
                    "through the slew axis (the hook cannot pass the mast or the slewing ring); "
                    "slew instead, or shorten the move")
        if crane.min_radius_m is not None and radius[i] < crane.min_radius_m - 1e-9:
            _refuse(scene, axes, float(ts[i]), f"the radius to {radius[i]:.2f} m", "inside "
                    f"crane.min_radius_m = {crane.min_radius_m:g} m")
        j = int(np.argmax(radius))
        if crane.max_radius_m is not None and radius[j] > crane.max_radius_m + 1e-9:
            _refuse(scene, axes, float(ts[j]), f"the radius to {radius[j]:.2f} m", "beyond "
                    f"crane.max_radius_m = {crane.max_radius_m:g} m")
        if motion.boom is not None:
            reach = np.abs(radius - motion.boom.foot_offset_m)
            k = int(np.argmax(reach))
            if reach[k] >= motion.boom.length_m:
                _refuse(scene, axes, float(ts[k]), f"the radius to {radius[k]:.2f} m", "beyond the boom's "
                        f"reach (boom_length_m = {motion.boom.length_m:g} m from the foot pin at "
                        f"{motion.boom.foot_offset_m:g} m)")
    if crane.kind in RAIL_KINDS and (crane.travel_limits_m is not None or crane.cross_limits_m is not None):
        p = motion.evaluate(ts)["p"]
        for limits, column, axis, name in ((crane.travel_limits_m, 0, "x", "travel_limits_m"),
                                           (crane.cross_limits_m, 1, "y", "cross_limits_m")):
            if limits is None:
                continue
            lo, hi = limits
            i, j = int(np.argmin(p[:, column])), int(np.argmax(p[:, column]))
            for k, bad in ((i, p[i, column] < lo - 1e-9), (j, p[j, column] > hi + 1e-9)):
                if bad:
                    _refuse(scene, (axis,), float(ts[k]), f"the suspension point to {axis} = "
                            f"{p[k, column]:.2f} m", f"outside crane.{name} = [{lo:g}, {hi:g}]")
