"""plan-move's search model for a rigged scene, and the light rope-angle check of a single run.

A hook block with its load, a rigid load on a bridle or an elastic rope swings
mainly in its first mode (hook and load together); a planned travel move is
tuned to that mode's period.  The candidate search therefore runs on the
**search model** (:func:`search_scene`): a point mass on a rope of the
*equivalent length* ``L_eq = g (T1 / 2 pi)^2`` (``T1`` the full model's first
swing period, :meth:`~swingsim.dynamics.base.SwingModel.mode_periods_s`), with
the scene's damping, wind and other moves as given; the batch engine integrates
it vectorised.  A luffing boom's radius move becomes the same radius move of a
trolley along the jib (the point on the boom's arc moves horizontally as the
boom luffs; its small rise and fall is left to the verification).  The rope
range maps to the equivalent lengths at its ends (:func:`equivalent_length`).

Whatever the search finds is verified with the scene's full model
(:mod:`swingsim.study.plan`), and only a move the full model verified is written.

:func:`rope_angles` measures the two numbers the verification needs, the residual
swing and the peak rope angle, from a solved run's hoist-rope direction alone
(its chart coordinates in the state), with the shared definitions of
:mod:`swingsim.metrics.definitions` on the same sample times as
:func:`swingsim.metrics.single.summarize`: the same numbers without the model's
per-sample outputs (forces, legs, energy) a full summary evaluates.
"""

from __future__ import annotations

import copy
import math

import numpy as np

from swingsim.batch import engine as batch
from swingsim.dynamics.registry import select_model
from swingsim.metrics import definitions
from swingsim.metrics.single import _refine_max, metric_times
from swingsim.scene import scene_from_dict

__all__ = ["SEARCH_MODEL_WORDS", "needs_search_model", "equivalent_length", "search_scene", "rope_angles"]

#: How plan.txt names the search model.
SEARCH_MODEL_WORDS = ("a point mass on a rope of the equivalent length (the full model's first swing period), "
                      "batch engine")

# rope keys that make it elastic, and the start keys of a load resting before lift-off
_ELASTIC_ROPE = ("diameter_m", "falls", "modulus_GPa", "fill_factor", "lead_length_m", "stiffness_N_per_m",
                 "bounce_damping_ratio", "stiffness_source", "area_mm2", "reeving_efficiency")


def needs_search_model(scene) -> bool:
    """Whether plan-move searches on the reduced model: a scene the batch engine's point-mass path does not take.

    Parameters
    ----------
    scene : Scene
        The scene.

    Returns
    -------
    bool
        True for a hook block, a rigid load, rigging or an elastic rope, and for a
        luffing boom's radius move (which the batch engine leaves to the single-run solver).
    """
    return select_model(scene).name != "point-mass" or not batch.supported(scene)


def equivalent_length(scene, rope_length_m: float) -> float:
    """The simple pendulum's length with the full model's first swing period at a rope length [m].

    Parameters
    ----------
    scene : Scene
        The scene (its model is built).
    rope_length_m : float
        Hoist rope length [m].

    Returns
    -------
    float
        ``g (T1 / 2 pi)^2`` [m], ``T1`` the longest small-amplitude period about hanging rest.
    """
    period = max(select_model(scene).mode_periods_s(rope_length_m))
    return scene.gravity_m_s2 * (period / (2.0 * math.pi)) ** 2


def search_scene(scene):
    """The search model of a rigged scene: a point mass at the equivalent length, moves and damping as given.

    Parameters
    ----------
    scene : Scene
        The full scene.

    Returns
    -------
    Scene
        The point-mass scene; its rope is the equivalent length of the scene's rope,
        a luffing boom is a trolley jib at the same radius limits.
    """
    d = copy.deepcopy(scene.raw)
    for key in ("hook", "rigging"):
        d.pop(key, None)
    d["rope"] = {k: v for k, v in d["rope"].items() if k not in _ELASTIC_ROPE}
    d["rope"]["length_m"] = equivalent_length(scene, float(scene.rope.length_m))
    d["load"] = {k: v for k, v in d["load"].items() if k not in ("size_m", "inertia_kg_m2", "cg_offset_m", "shape")}
    if "start" in d:
        d["start"] = {k: v for k, v in d["start"].items() if k not in ("rope_preload", "rope_slack_m")}
    crane = d["crane"]
    if scene.crane.has_boom:
        crane["kind"] = "tower"
        for k in ("boom_length_m", "boom_foot_m", "level_luffing"):
            crane.pop(k, None)
    crane.pop("chart_file", None)
    crane.pop("chart_includes", None)
    return scene_from_dict(d, file=scene.file, base_dir=scene.base_dir)


def _direction_index(model) -> int:
    """Index in the state of the hoist rope's chart coordinate ``u`` (``u1`` below a hook block)."""
    names = model.state_names
    return names.index("u1") if "u1" in names else names.index("u")


def rope_angles(traj) -> dict:
    """Residual swing and peak rope angle of a solved run, from the hoist rope's direction alone.

    The hoist rope's direction is ``(u, v, -sqrt(1 - u^2 - v^2))`` of its chart
    coordinates; the numbers are those of ``summary.json`` (same samples, same
    definitions, the same refinement of each maximum).

    Parameters
    ----------
    traj : Trajectory
        A solved run (:func:`swingsim.simulation.simulate`).

    Returns
    -------
    dict
        ``residual_swing_deg`` [deg] (None when the run stopped before the moves ended),
        ``peak_rope_angle_deg`` [deg], ``valid``.
    """
    model, motion, scene = traj.model, traj.motion, traj.scene
    i = _direction_index(model)

    def directions(t):
        y = traj.state(np.asarray(t, dtype=float))
        u, v = y[:, i], y[:, i + 1]
        return np.stack([u, v, -np.sqrt(np.clip(1.0 - u * u - v * v, 0.0, None))], axis=-1)

    t = metric_times(traj)
    n = directions(t)
    L_end = float(motion.evaluate(np.array([scene.duration_s]))["L"][0])
    rest = np.asarray(model.rest_direction(L_end))
    post = definitions.after_move(t[None, :], np.array([motion.last_move_end_s]))[0]
    _, peak = _refine_max(lambda x: float(definitions.rope_angle_rad(directions([x]))[0]), t,
                          definitions.rope_angle_rad(n))
    _, residual = _refine_max(lambda x: float(definitions.angle_between(directions([x]), rest[None, :])[0]), t,
                              definitions.angle_between(n, rest[None, :]), post)
    return {"residual_swing_deg": None if residual is None else math.degrees(residual),
            "peak_rope_angle_deg": math.degrees(peak), "valid": traj.valid}
