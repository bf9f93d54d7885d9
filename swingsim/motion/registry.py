"""Scene moves -> :class:`~swingsim.motion.kinematics.Motion`.

Profiles are looked up by name in :data:`PROFILE_BUILDERS`; a new profile is
added by registering a builder ``f(move, scene, scale) -> Profile`` there
(see DEVELOPERS.md).  ``scale`` converts the scene's unit to the internal one
(pi/180 for slew moves in degrees, 1 otherwise).
"""

from __future__ import annotations

import math

import numpy as np

from swingsim import constants as C
from swingsim.errors import SceneError
from swingsim.motion import profiles as P
from swingsim.motion.kinematics import Motion


def _trapezoid(move, scene, scale):
    return P.trapezoid(move.start_s, move.distance * scale, move.speed * scale,
                       move.accel * scale, None if move.decel is None else move.decel * scale)


def _s_curve(move, scene, scale):
    return P.s_curve(move.start_s, move.distance * scale, move.speed * scale, move.accel * scale,
                     move.jerk * scale, None if move.decel is None else move.decel * scale)


def _table(move, scene, scale):
    t, x = move.table
    return P.from_table(move.start_s, t, np.asarray(x) * scale)


PROFILE_BUILDERS = {"trapezoid": _trapezoid, "s-curve": _s_curve, "table": _table}

# input shaping (zv, zvd, ei, whole-period): swingsim/motion/shaping.py
from swingsim.motion import shaping as _shaping  # noqa: E402

PROFILE_BUILDERS.update({name: _shaping.build_shaped for name in _shaping.SHAPERS})
PROFILE_BUILDERS["whole-period"] = _shaping.build_whole_period


def move_key(move) -> str:
    return f"moves[{move.index}]"


def build_profile(move, scene) -> P.Profile:
    scale = math.pi / 180.0 if move.axis == "slew" else 1.0
    try:
        return PROFILE_BUILDERS[move.profile](move, scene, scale)
    except P.ProfileError as exc:
        raise SceneError(scene.file, move_key(move), str(exc)) from None
    except ArithmeticError:  # overflow or division by zero from extreme (valid-typed) numbers
        raise SceneError(scene.file, move_key(move), "its distance, speed, acceleration, jerk or "
                         "period are too extreme to build a motion profile from (a number overflows "
                         "or vanishes); check the values and units") from None


def build_motion(scene) -> Motion:
    """Build the suspension-point and rope-length motion of a scene.

    Raises
    ------
    SceneError
        When a profile cannot be built, or the hoist would make the rope
        shorter than the minimum or a move outlasts the simulation.
    """
    moves = []
    for m in scene.moves:
        prof = build_profile(m, scene)
        if prof.end_s > scene.duration_s + 1e-9:
            raise SceneError(scene.file, f"{move_key(m)}", f"ends at {prof.end_s:.3f} s, after the end of "
                             f"the simulation (duration_s = {scene.duration_s:g}); lengthen duration_s")
        moves.append((m.axis, prof))
    motion = Motion(tuple(scene.crane.suspension_m), scene.rope.length_m, tuple(moves))
    hoists = [p for a, p in moves if a == "hoist"]
    if hoists:
        pts = set(motion.breakpoints) | {0.0, scene.duration_s}
        ts = np.union1d(np.array(sorted(pts)), np.linspace(0.0, scene.duration_s, 2001))
        L = motion.evaluate(ts)["L"]
        if np.min(L) < C.MIN_ROPE_LENGTH_M:
            i = int(np.argmin(L))
            raise SceneError(scene.file, "moves", f"the hoist moves shorten the rope to {L[i]:.3f} m at "
                             f"t = {ts[i]:.2f} s; it must stay at least {C.MIN_ROPE_LENGTH_M:g} m")
    return motion
