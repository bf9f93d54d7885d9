"""A run's 3D scene: every body's mesh, built once, and the bodies' poses at any time.

>>> scene = build(traj)                       # doctest: +SKIP
>>> scene.bodies["load"].mesh.vertices        # doctest: +SKIP
>>> scene.poses([0.0, 0.5])["load"].shape     # doctest: +SKIP
(2, 4, 4)
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from swingsim.scene3d import ground, meshes, poses, transforms
from swingsim.scene3d.layout import Layout, default_load_size, make_layout

#: Spacing of the stored load path (trail and envelope) [s].
PATH_STEP_S = 0.1
#: Sling bodies at least (legs not in use are hidden).
MIN_SLINGS = 8
#: Which body each crane role rides on.
_PARENT_OF_ROLE = {"fixed": None, "base": None, "bridge": None, "slew": "crane", "boom": "slewing_part"}


@dataclass(frozen=True)
class Body:
    """One drawn body.

    Attributes
    ----------
    mesh : swingsim.scene3d.meshes.Mesh
        Its shape in its own frame [m] (in world coordinates for a body that never moves).
    material : str
        What it is made of, for its colour: "ground", "axis_x", "axis_y", "crane",
        "crane_dark", "trolley", "obstacle", "exclusion", "envelope", "rope",
        "spreader", "sling", "load", "hook", "shadow", "tag_line" (a tag line),
        "person" (who holds it) or "contact" (a corner of the load bearing on the ground).
    parent : str or None
        The body it is carried by (for grouping; poses are world transforms).
    texture : numpy.ndarray or None
        A uint8 class image over the mesh's texture coordinates (see
        :mod:`swingsim.scene3d.ground`), row 0 at v = 0.
    moves : bool
        Whether it has a pose at each instant (:meth:`Scene3D.poses`).
    """

    mesh: meshes.Mesh
    material: str
    parent: str | None = None
    texture: np.ndarray | None = None
    moves: bool = False


@dataclass
class Scene3D:
    """The bodies of a run and their poses.

    Attributes
    ----------
    traj : swingsim.simulation.Trajectory
        The run.
    layout : swingsim.scene3d.layout.Layout
        The crane's kind and sizes.
    bodies : dict
        Body name -> :class:`Body`, in drawing order.
    labels : list of swingsim.scene3d.ground.Label
        Grid, axis and zone labels.
    rigging : swingsim.scene3d.poses.Rigging
        What the rigging's poses need.
    crane_roles : dict
        Crane body name -> role (see :class:`swingsim.scene3d.meshes.CranePart`).
    path_t_s, path_load_m : numpy.ndarray
        The load's path every :data:`PATH_STEP_S` seconds: times (p,) [s] and positions (p, 3) [m].
    spreader_span_m : float or None
        Distance between the spreader's end lugs [m], when there is one.
    """

    traj: object
    layout: Layout
    bodies: dict
    labels: list
    rigging: poses.Rigging
    crane_roles: dict
    path_t_s: np.ndarray
    path_load_m: np.ndarray
    spreader_span_m: float | None = None
    _crane_groups: list = field(default_factory=list, repr=False)

    def frames(self, t) -> poses.Frames:
        """Poses and rope and sling segments at times ``t``.

        Parameters
        ----------
        t : array_like
            Simulated times [s] (one or many).

        Returns
        -------
        swingsim.scene3d.poses.Frames
            Transforms (n, 4, 4) of every moving body and segments (n, 2, 3).
        """
        t = np.atleast_1d(np.asarray(t, dtype=float))
        return self.frames_from_samples(self.traj.sample(t), self.traj.motion.pose(t))

    def frames_from_samples(self, samples: dict, crane) -> poses.Frames:
        """Poses from model outputs already sampled (saves sampling twice).

        Parameters
        ----------
        samples : dict
            ``Trajectory.sample`` at n instants (or the same keys with a leading axis of n).
        crane : swingsim.motion.kinematics.CranePose
            ``Motion.pose`` at the same instants.

        Returns
        -------
        swingsim.scene3d.poses.Frames
            Transforms (n, 4, 4) of every moving body and segments (n, 2, 3).
        """
        found = poses.rigging_frames(self.rigging, samples)
        found.transforms.update(poses.crane_transforms(self.crane_roles, self.layout, crane,
                                                       samples["suspension"]))
        return found

    def poses(self, t) -> dict:
        """Where every moving body is at times ``t``.

        Parameters
        ----------
        t : array_like
            Simulated times [s].

        Returns
        -------
        dict
            Body name -> (n, 4, 4) transforms, own frame to world; a zero 3x3
            part means the body is not shown then.  Bodies that never move are
            left out.
        """
        return self.frames(t).transforms

    def segments(self, t) -> dict:
        """End points of the rope and each sling leg at times ``t``.

        Parameters
        ----------
        t : array_like
            Simulated times [s], one or many, as for :meth:`frames`.

        Returns
        -------
        dict
            ``"rope"``, ``"sling_1"``... -> (n, 2, 3) end points [m].
        """
        return self.frames(t).segments

    def interest_points(self, instants: int = 25) -> np.ndarray:
        """Points a fitted camera must show: the load's path, the zones, the crane wherever it goes,
        the people holding tag lines [m].

        Bodies that move together and share a material are boxed together, so
        the framing does not depend on how a part is split into bodies.

        Parameters
        ----------
        instants : int
            Number of instants, evenly over the run, at which the crane is boxed.

        Returns
        -------
        numpy.ndarray
            (N, 3) points [m].
        """
        t = np.linspace(0.0, self.traj.t_end_s, instants)
        mats = poses.crane_transforms(self.crane_roles, self.layout, self.traj.motion.pose(t),
                                      self.traj.motion.evaluate(t)["p"])
        pts = [self.path_load_m]
        for names in self._crane_groups:
            corners = meshes.merge([self.bodies[k].mesh for k in names]).corners()
            m = mats.get(names[0], transforms.identity((len(t),)))
            pts.append(np.einsum("nij,kj->nki", m[:, :3, :3], corners).reshape(-1, 3)
                       + np.repeat(m[:, :3, 3], len(corners), axis=0))
        # the people holding the tag lines, whole
        pts += [body.mesh.corners() for name, body in self.bodies.items() if name.startswith("tag_person_")]
        for z in self.traj.scene.zones:
            pts.append([[x, y, h] for x in (z.min_m[0], z.max_m[0]) for y in (z.min_m[1], z.max_m[1])
                        for h in (z.min_m[2], z.max_m[2])])
        return np.concatenate([np.asarray(p, dtype=float).reshape(-1, 3) for p in pts])


def build(traj, *, load_mesh: meshes.Mesh | None = None) -> Scene3D:
    """The 3D scene of a run.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The solved run.
    load_mesh : swingsim.scene3d.meshes.Mesh, optional
        A user's mesh of the load (its own frame: centre of gravity at the origin, z up);
        a box or cylinder of ``load.size_m`` otherwise.

    Returns
    -------
    Scene3D
        Bodies named ``ground``, ``axis_x``, ``axis_y``, the crane's (``crane``,
        ``slewing_part``, ``jib``, ``counterweight``, ``gantry``, ``bridge``,
        ``boom``, ``trolley`` as the kind has them), ``zone_<name>``,
        ``envelope``, ``rope``, ``spreader`` (with one), ``sling_1``...,
        ``load``, ``hook``, ``shadow``; with ``[[tag_lines]]`` ``tag_line_1``...
        (moving) and ``tag_person_1``... (the person holding each, still); with
        ``[ground]`` ``contact_1``... (a mark under each of the load's contact
        points, shown while it bears on the ground).  The ground and everything on
        it lie at ``[ground] z_m`` when the scene has one.
    """
    scene = traj.scene
    size = scene.load.size_m or default_load_size(scene.load.mass_kg)
    layout = make_layout(traj, size, scene.load.shape if load_mesh is None else "mesh")
    bodies = {}
    gz = layout.ground_z_m
    grid = ground.GroundGrid.covering(layout.ground_m)
    bodies["ground"] = Body(ground.ground_mesh(grid, gz), "ground", texture=ground.ground_texture(grid))
    labels = ground.grid_labels(grid, gz)
    arrow_x, arrow_y, arrow_labels = ground.axis_arrows(
        layout.axes_xy_m, max(2.0, 0.04 * max(grid.x1 - grid.x0, grid.y1 - grid.y0)), gz)
    bodies["axis_x"], bodies["axis_y"] = Body(arrow_x, "axis_x"), Body(arrow_y, "axis_y")
    labels += arrow_labels

    parts = meshes.crane_parts(layout)
    carrier = "jib" if "jib" in parts else next((k for k in ("gantry", "bridge", "boom") if k in parts), None)
    groups = {}
    for name, part in parts.items():
        parent = carrier if part.role == "trolley" else _PARENT_OF_ROLE[part.role]
        bodies[name] = Body(part.mesh, part.material, parent, moves=part.role != "fixed")
        groups.setdefault((part.role, part.material), []).append(name)

    for z in scene.zones:
        bodies[f"zone_{z.name}"] = Body(meshes.zone_mesh(z), z.kind)
        # the name just above the zone, or inside a tall one, where the jib will not hide it
        labels.append(ground.Label(((z.min_m[0] + z.max_m[0]) / 2, (z.min_m[1] + z.max_m[1]) / 2,
                                    min(z.max_m[2] + 0.6, max(z.min_m[2] + 3.0, 10.0))), z.name, z.kind))

    path_t = np.arange(0.0, traj.t_end_s + 1e-9, PATH_STEP_S)
    path = traj.sample(path_t)
    load = meshes.load_mesh(scene.load.shape, layout.load_size_m) if load_mesh is None else load_mesh
    lb = load.bounds
    plane, classes = ground.envelope(path["load"], (0.5 * (lb[1] - lb[0]), 0.5 * (lb[3] - lb[2])), gz)
    bodies["envelope"] = Body(plane, "envelope", texture=classes)

    rope_r = max(0.03, 0.006 * scene.rope.length_m) if scene.rope.diameter_m is None \
        else max(0.03, scene.rope.diameter_m * 1.5)
    bodies["rope"] = Body(meshes.unit_rod(rope_r, 12), "rope", parent="trolley" if "trolley" in parts else "boom",
                          moves=True)
    sling_count, span = MIN_SLINGS, None
    if path.get("spreader_ends") is not None:
        ends0 = np.asarray(path["spreader_ends"][0], dtype=float)
        span = float(np.linalg.norm(ends0[1] - ends0[0]))
        bodies["spreader"] = Body(meshes.spreader_mesh(span), "spreader", "hook", moves=True)
        sling_count = max(MIN_SLINGS, np.asarray(path["spreader_lugs"]).shape[1] + 2)
    for i in range(sling_count):
        bodies[f"sling_{i + 1}"] = Body(meshes.unit_rod(max(0.02, 0.6 * rope_r), 8), "sling", "hook", moves=True)
    bodies["load"] = Body(load, "load", moves=True)
    hook_size = max(0.25, 0.35 * min(layout.load_size_m))
    bodies["hook"] = Body(meshes.hook_mesh(hook_size), "hook", "rope", moves=True)
    bodies["shadow"] = Body(meshes.box(lb[0], lb[1], lb[2], lb[3], 0.0, 0.01), "shadow", "load", moves=True)
    lines = tuple(getattr(scene, "tag_lines", ()))
    anchors = np.array([line.anchor_m for line in lines], dtype=float).reshape(-1, 3)
    for j, hand in enumerate(anchors):
        bodies[f"tag_line_{j + 1}"] = Body(meshes.unit_rod(max(0.02, 0.5 * rope_r), 8), "tag_line", moves=True)
        bodies[f"tag_person_{j + 1}"] = Body(meshes.person_mesh(hand, gz), "person")
    contacts = path.get("contact_points")
    n_contacts = 0 if contacts is None else int(np.asarray(contacts).shape[1])
    mark = max(0.2, 0.04 * max(layout.load_size_m))
    for i in range(n_contacts):
        bodies[f"contact_{i + 1}"] = Body(meshes.contact_marker(mark), "contact", "load", moves=True)

    attach = meshes.top_attach_points(load, scene.load.shape if load_mesh is None else "box")
    rigging = poses.Rigging(attach, meshes.rigging_height(attach), hook_size, sling_count, span is not None,
                            gz, anchors, n_contacts)
    return Scene3D(traj, layout, bodies, labels, rigging, {k: p.role for k, p in parts.items()},
                   path_t, np.asarray(path["load"], dtype=float), span, list(groups.values()))
