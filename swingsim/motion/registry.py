"""Scene moves -> :class:`~swingsim.motion.kinematics.Motion`.

Profiles are looked up by name in :data:`PROFILES`; a new profile is added
as one :class:`ProfileSpec` there, whose builder is
``f(move, scene, scale, swing_period_s) -> Profile`` (see DEVELOPERS.md).  ``scale`` converts the scene's unit to the internal one
(pi/180 for slew moves in degrees, 1 otherwise).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np

from swingsim import constants
from swingsim.errors import SceneError
from swingsim.motion import profiles, shaping
from swingsim.motion.kinematics import Boom, Motion
from swingsim.motion.limits import check_reach, sample_times


@dataclass(frozen=True)
class ProfileSpec:
    """A motion profile as the scene and the builder know it.

    Attributes
    ----------
    build : callable
        ``f(move, scene, scale, swing_period_s) -> Profile``.
    needs : tuple of str
        Quantities the profile needs (``distance``, ``speed``, ``accel``, ``jerk``);
        ``table`` needs a file instead.
    optional : tuple of str
        Quantities it may take.
    keys : tuple of str
        Scene keys only this profile (and others listing them) takes; every other
        profile refuses them.
    needs_swing_period : bool
        True when the profile is tuned to the lift's swing period unless the move
        gives ``shaper_period_s``; :func:`build_motion` then needs ``swing_period_s``.
    """

    build: Callable
    needs: tuple = ()
    optional: tuple = ()
    keys: tuple = ()
    needs_swing_period: bool = False


def _trapezoid(move, scene, scale, swing_period_s=None):
    return profiles.trapezoid(move.start_s, move.distance * scale, move.speed * scale,
                       move.accel * scale, None if move.decel is None else move.decel * scale)


def _s_curve(move, scene, scale, swing_period_s=None):
    return profiles.s_curve(move.start_s, move.distance * scale, move.speed * scale, move.accel * scale,
                     move.jerk * scale, None if move.decel is None else move.decel * scale)


def _table(move, scene, scale, swing_period_s=None):
    t, x = move.table
    return profiles.from_table(move.start_s, t, np.asarray(x) * scale)


_SHAPER_KEYS = ("shaper_base", "shaper_period_s", "shaper_second_period_s", "shaper_damping_ratio")
_MOTION = ("distance", "speed", "accel")

#: Every motion profile by name (input shaping: swingsim/motion/shaping.py).
PROFILES: dict[str, ProfileSpec] = {
    "trapezoid": ProfileSpec(_trapezoid, _MOTION, ("decel",)),
    "s-curve": ProfileSpec(_s_curve, _MOTION + ("jerk",), ("decel",)),
    "table": ProfileSpec(_table),
    "zv": ProfileSpec(shaping.build_shaped, _MOTION, ("decel", "jerk"), _SHAPER_KEYS, True),
    "zvd": ProfileSpec(shaping.build_shaped, _MOTION, ("decel", "jerk"), _SHAPER_KEYS, True),
    "ei": ProfileSpec(shaping.build_shaped, _MOTION, ("decel", "jerk"),
                      _SHAPER_KEYS + ("shaper_tolerance",), True),
    "whole-period": ProfileSpec(shaping.build_whole_period, _MOTION, ("jerk",),
                                ("shaper_period_s",), True),
}


def needs_swing_period(scene) -> bool:
    """Whether the scene's motion must be built with the lift's swing period.

    Parameters
    ----------
    scene : Scene
        A scene whose keys are valid; its moves' profiles and shaper keys decide.

    Returns
    -------
    bool
        True when some move is tuned to the swing period (input shaping) and does
        not give ``shaper_period_s``.
    """
    return any(PROFILES[m.profile].needs_swing_period and m.profile_keys.get("shaper_period_s") is None
               for m in scene.moves)


def move_key(move) -> str:
    """The scene key of a move, for error messages.

    Parameters
    ----------
    move : Move
        One of the scene's moves.

    Returns
    -------
    str
        ``moves[i]``.
    """
    return f"moves[{move.index}]"


def build_profile(move, scene, swing_period_s: float | None = None) -> profiles.Profile:
    """Build one move's profile in internal units (rad for slew).

    Parameters
    ----------
    move : Move
        The scene's move.
    scene : Scene
        The scene it belongs to (for its file name in errors and its damping ratio).
    swing_period_s : float, optional
        The lift's first swing period [s], for profiles tuned to it.

    Returns
    -------
    Profile

    Raises
    ------
    SceneError
        When the profile cannot be built from the move's values.
    """
    scale = math.pi / 180.0 if move.axis == "slew" else 1.0
    try:
        return PROFILES[move.profile].build(move, scene, scale, swing_period_s)
    except profiles.ProfileError as exc:
        raise SceneError(scene.file, move_key(move), str(exc)) from None
    except ArithmeticError:  # overflow or division by zero from extreme (valid-typed) numbers
        raise SceneError(scene.file, move_key(move), "its distance, speed, acceleration, jerk or "
                         "period are too extreme to build a motion profile from (a number overflows "
                         "or vanishes); check the values and units") from None


def crane_boom(crane) -> Boom | None:
    """The crane's luffing boom, or None when a radius move holds the suspension height.

    Parameters
    ----------
    crane : Crane
        The scene's ``[crane]`` (its ``boom_length_m``, ``boom_foot_m`` and ``level_luffing``).

    Returns
    -------
    Boom or None
        The boom when ``boom_length_m`` is given.
    """
    if crane.boom_length_m is None:
        return None
    offset, height = crane.boom_foot_m
    return Boom(float(crane.boom_length_m), float(offset), float(height), bool(crane.level_luffing))


def build_motion(scene, swing_period_s: float | None = None) -> Motion:
    """Build the suspension-point and rope-length motion of a scene.

    Parameters
    ----------
    scene : Scene
        A scene whose keys are valid.
    swing_period_s : float, optional
        The lift's first swing period [s] (from the model, chosen first); needed when
        :func:`needs_swing_period` is true.

    Returns
    -------
    Motion

    Raises
    ------
    SceneError
        When a profile cannot be built, the hoist (or level luffing) would make
        the rope shorter than the minimum, a move outlasts the simulation, or a
        move takes the suspension point beyond the crane's reach
        (:func:`swingsim.motion.limits.check_reach`).
    """
    moves = []
    for m in scene.moves:
        prof = build_profile(m, scene, swing_period_s)
        if prof.end_s > scene.duration_s + 1e-9:
            raise SceneError(scene.file, f"{move_key(m)}", f"ends at {prof.end_s:.3f} s, after the end of "
                             f"the simulation (duration_s = {scene.duration_s:g}); lengthen duration_s")
        moves.append((m.axis, prof))
    motion = Motion(tuple(scene.crane.suspension_m), scene.rope.length_m, tuple(moves),
                    slew_center_m=tuple(scene.crane.slew_center_m), boom=crane_boom(scene.crane))
    ts = sample_times(motion, scene.duration_s)
    check_reach(scene, motion, ts)
    if any(a == "hoist" for a, _ in moves) or motion.luffs:
        L = motion.evaluate(ts)["L"]
        if np.min(L) < constants.MIN_ROPE_LENGTH_M:
            i = int(np.argmin(L))
            raise SceneError(scene.file, "moves", f"the hoist moves shorten the rope to {L[i]:.3f} m at "
                             f"t = {ts[i]:.2f} s; it must stay at least {constants.MIN_ROPE_LENGTH_M:g} m")
    return motion
