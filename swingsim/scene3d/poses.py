"""Where each body is at given instants, vectorised over the instants.

The crane's bodies follow the crane's axes (:meth:`swingsim.motion.Motion.pose`,
the one crane kinematics) and the suspension point; the rope, hook block,
slings, spreader, load and its shadow follow the model's outputs
(``Trajectory.sample``).  Every transform is a 4x4 matrix from the body's own
frame to the world; a body not shown at an instant has a zero-scale transform
(:func:`swingsim.scene3d.transforms.hidden`).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from swingsim.motion.limits import SLEWING_KINDS
from swingsim.scene3d import transforms

#: The model outputs the rigging's poses are made from (``Trajectory.sample`` keys).
SAMPLE_KEYS = ("suspension", "load", "hook", "load_rotation", "attach_points", "spreader_ends",
               "spreader_lugs", "rope_length", "rope_dir", "tag_line_attach", "contact_points", "contact_normal_N")
#: How far the hook block's top and bottom are from its centre, as a share of its width [-].
HOOK_HALF_HEIGHT = 0.7


class Rigging(NamedTuple):
    """The fixed facts the rigging's poses need.

    Attributes
    ----------
    attach_local_m : numpy.ndarray
        (k, 3) lifting points in the load's own frame, for models that give none [m].
    apex_height_m : float
        Height of the sling apex above the lifting points when the model has no hook or rigging [m].
    hook_size_m : float
        Width of the drawn hook block [m].
    sling_count : int
        Number of sling bodies (legs not in use are hidden).
    spreader : bool
        Whether the model has a spreader beam (``spreader_ends`` in its outputs).
    ground_z_m : float
        Height of the drawn ground (``[ground] z_m``, else 0) [m]: the shadow and the
        contact marks lie on it.
    tag_anchors_m : numpy.ndarray
        (k, 3) where each tag line is held (``[[tag_lines]] anchor_m``) [m]; (0, 3) without tag lines.
    contact_count : int
        Number of contact marks (the load's points that can touch the ground).
    """

    attach_local_m: np.ndarray
    apex_height_m: float
    hook_size_m: float
    sling_count: int
    spreader: bool
    ground_z_m: float = 0.0
    tag_anchors_m: np.ndarray = np.zeros((0, 3))
    contact_count: int = 0


class Frames(NamedTuple):
    """Poses of the moving bodies at n instants.

    Attributes
    ----------
    transforms : dict
        Body name -> (n, 4, 4) transforms (own frame to world).
    segments : dict
        ``"rope"``, ``"sling_1"``... and ``"tag_line_1"``... -> (n, 2, 3) end
        points [m]; a hidden sling's two ends are both at the sling apex.
    """

    transforms: dict
    segments: dict


def crane_transforms(roles: dict, layout, crane, suspension_m) -> dict:
    """Transforms of the crane's moving bodies at n instants.

    Parameters
    ----------
    roles : dict
        Body name -> role ("fixed", "base", "slew", "trolley", "bridge" or "boom";
        see :class:`swingsim.scene3d.meshes.CranePart`).
    layout : swingsim.scene3d.layout.Layout
        The crane's kind (the trolley turns with the jib of a slewing crane only)
        and a boom's foot pin in the slewing part's frame.
    crane : swingsim.motion.kinematics.CranePose
        Where the slew axis stands x, y [m], jib angle [rad] and radius [m] at the n instants.
    suspension_m : array_like, shape (n, 3)
        The suspension point [m].

    Returns
    -------
    dict
        Body name -> (n, 4, 4) transforms; fixed bodies are left out (their mesh is in world coordinates).
    """
    p = np.asarray(suspension_m, dtype=float).reshape(-1, 3)
    n = len(p)
    x, y, phi = (np.broadcast_to(np.asarray(v, dtype=float), (n,)) for v in crane[:3])
    base = transforms.translation(np.stack([x, y, np.zeros(n)], -1))
    slew = base @ transforms.rotation_z(phi)
    out = {}
    for name, role in roles.items():
        if role == "base":
            out[name] = base
        elif role == "slew":
            out[name] = slew
        elif role == "trolley":
            heading = phi if layout.kind in SLEWING_KINDS else np.zeros(n)
            out[name] = transforms.translation(p) @ transforms.rotation_z(heading)
        elif role == "bridge":
            out[name] = transforms.translation(np.stack([p[:, 0], np.zeros(n), np.zeros(n)], -1))
        elif role == "boom":
            # from the foot pin to the tip sheave, at every instant (the boom luffs with the radius)
            pivot = (slew @ np.array([*layout.boom_foot_m, 1.0]))[:, :3]
            out[name] = transforms.segment(pivot, p + (0.0, 0.0, 0.3), axis=0)
    return out


def _unit_or(v, fallback):
    """Unit vectors of ``v``, and a mask of those too short to have a direction (given ``fallback``)."""
    norm = np.linalg.norm(v, axis=-1)
    short = norm <= transforms.TINY_M
    return np.where(short[:, None], fallback, v / np.where(short, 1.0, norm)[:, None]), short


def rigging_frames(rigging: Rigging, samples: dict) -> Frames:
    """Poses of the rope, hook block, spreader, slings, load and shadow at n instants.

    Parameters
    ----------
    rigging : Rigging
        The rigging's fixed facts.
    samples : dict
        Model outputs at the n instants (``Trajectory.sample``; keys in
        :data:`SAMPLE_KEYS`, each with a leading axis of n): the suspension
        point and load (n, 3) [m]; where the model has them, the hook block
        (n, 3) [m], the load's rotation (n, 3, 3), its lifting points
        (n, k, 3) [m], a spreader's end lugs (n, 2, 3) and drop-leg lugs
        (n, m, 3) [m]; the rope's length (n,) [m] and unit direction (n, 3).

    Returns
    -------
    Frames
        Transforms of ``rope``, ``hook``, ``spreader`` (with one), ``sling_1``...,
        ``load`` and ``shadow``; segments of the rope and slings.

    Notes
    -----
    Without a hook block in the model the hook is hidden and the slings meet
    at the rope's end: the model's pin when the model gives its rigging,
    otherwise a point above the load (the last part of the rope's modelled
    length, drawn as rigging).
    """
    p = np.asarray(samples["suspension"], dtype=float).reshape(-1, 3)
    n = len(p)
    load = np.asarray(samples["load"], dtype=float).reshape(n, 3)
    hook = samples.get("hook")
    hook = None if hook is None else np.asarray(hook, dtype=float).reshape(n, 3)
    anchor = p if hook is None else hook
    rot = samples.get("load_rotation")
    if rot is None:  # hanging straight below its anchor, its heading kept
        down, short = _unit_or(load - anchor, (0.0, 0.0, 1.0))
        rot = np.where(short[:, None, None], np.eye(3), transforms.frame_from_axis(-down))
    rot = np.asarray(rot, dtype=float).reshape(n, 3, 3)
    up = rot[:, :, 2]
    given = samples.get("attach_points")
    if given is None:
        attach = load[:, None, :] + np.einsum("kj,nij->nki", rigging.attach_local_m, rot)
    else:
        attach = np.asarray(given, dtype=float).reshape(n, -1, 3)
    ends = samples.get("spreader_ends") if rigging.spreader else None
    out = {"load": transforms.rigid(rot, load)}
    hs = rigging.hook_size_m
    if hook is None and (ends is not None or given is not None):
        # rigging from the model but no hook block: the legs meet at the rope's end, the model's pin
        apex = p + np.asarray(samples["rope_length"], dtype=float).reshape(n, 1) * \
            np.asarray(samples["rope_dir"], dtype=float).reshape(n, 3)
        rope_end = apex
    elif hook is None:
        # the rope's modelled length runs to the load's centre of gravity; its last part is drawn as rigging
        top = float(rigging.attach_local_m[:, 2].max())
        room = np.maximum(0.0, np.linalg.norm(load - p, axis=1) - top - 0.3)
        apex = load + up * (top + np.minimum(rigging.apex_height_m, room))[:, None]
        rope_end = apex
    else:
        apex = hook - up * HOOK_HALF_HEIGHT * hs
        to_top, short = _unit_or(p - hook, (0.0, 0.0, 1.0))
        out["hook"] = transforms.rigid(np.where(short[:, None, None], np.eye(3),
                                                transforms.frame_from_axis(to_top)), hook)
        rope_end = hook + to_top * HOOK_HALF_HEIGHT * hs
    if hook is None:
        out["hook"] = transforms.hidden(apex)
    out["rope"] = transforms.segment(p, rope_end)
    segments = {"rope": np.stack([p, rope_end], 1)}
    if ends is not None:
        ends = np.asarray(ends, dtype=float).reshape(n, 2, 3)
        lugs = np.asarray(samples["spreader_lugs"], dtype=float).reshape(n, -1, 3)
        out["spreader"] = transforms.rigid(transforms.frame_x_up(ends[:, 1] - ends[:, 0], up),
                                           0.5 * (ends[:, 0] + ends[:, 1]))
        # two top slings, hook to end lugs, then the drop legs, lugs to lifting points
        legs = [(apex, ends[:, 0]), (apex, ends[:, 1])] + \
            [(lugs[:, j], attach[:, j]) for j in range(min(lugs.shape[1], attach.shape[1]))]
    else:
        legs = [(apex, attach[:, j]) for j in range(attach.shape[1])]
    for i in range(rigging.sling_count):
        name = f"sling_{i + 1}"
        if i < len(legs):
            out[name] = transforms.segment(*legs[i])
            segments[name] = np.stack(legs[i], 1)
        else:
            out[name] = transforms.hidden(apex)
            segments[name] = np.stack([apex, apex], 1)
    out["shadow"] = transforms.rigid(transforms.yaw_only(rot),
                                     np.column_stack([load[:, :2], np.full(n, rigging.ground_z_m + 0.05)]))
    _contact_frames(rigging, samples, n, load, out, segments)
    return Frames(out, segments)


#: Height of the contact marks' underside above the ground: over the envelope and the shadow [m].
CONTACT_MARK_LIFT_M = 0.065


def _contact_frames(rigging: Rigging, samples: dict, n: int, load, out: dict, segments: dict) -> None:
    """Tag lines (attachment on the load to the hand holding it) and the contact marks, into ``out``.

    A tag line is ``tag_line_<j>``, a unit rod from the model's ``tag_line_attach``
    to the scene's anchor; a contact mark ``contact_<i>`` sits on the ground under
    the load's contact point ``i`` while the ground pushes on it
    (``contact_normal_N`` above zero) and is hidden otherwise.  Without the
    model's outputs (a model without these forces) the lines and marks are hidden.
    """
    k = len(rigging.tag_anchors_m)
    if k:
        attach = samples.get("tag_line_attach")
        anchors = np.broadcast_to(np.asarray(rigging.tag_anchors_m, dtype=float), (n, k, 3))
        if attach is None:
            attach = anchors
        attach = np.asarray(attach, dtype=float).reshape(n, k, 3)
        for j in range(k):
            name = f"tag_line_{j + 1}"
            segments[name] = np.stack([attach[:, j], anchors[:, j]], 1)
            out[name] = transforms.segment(attach[:, j], anchors[:, j])
    if rigging.contact_count:
        pts = samples.get("contact_points")
        force = samples.get("contact_normal_N")
        if pts is None or force is None:
            pts = np.broadcast_to(load[:, None, :], (n, rigging.contact_count, 3))
            force = np.zeros((n, rigging.contact_count))
        pts = np.asarray(pts, dtype=float).reshape(n, -1, 3)
        force = np.asarray(force, dtype=float).reshape(n, -1)
        for i in range(rigging.contact_count):
            if i < pts.shape[1]:
                at = np.column_stack([pts[:, i, :2], np.full(n, rigging.ground_z_m + CONTACT_MARK_LIFT_M)])
                on = force[:, i] > 0.0
            else:
                at, on = load, np.zeros(n, dtype=bool)
            out[f"contact_{i + 1}"] = np.where(on[:, None, None], transforms.translation(at), transforms.hidden(at))
