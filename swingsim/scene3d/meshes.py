"""Triangle meshes as numpy arrays, each in its body's own frame, and the simple solids they are built from.

A :class:`Mesh` holds vertices (n, 3) [m] and triangles (m, 3) (vertex
indices, counter-clockwise seen from outside), and may hold line segments
(drawn a pixel or two wide however far the camera) and texture coordinates.
The crane parts, the hook block, the load, the spreader and the zones are
built here; the ground and the envelope are in :mod:`.ground`.  Shapes are
schematic: they show where things are, not a particular design.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from swingsim.dynamics.rigging import cylinder_axis

_NO_INDEX = np.zeros((0, 3), dtype=np.int64)
_NO_LINES = np.zeros((0, 2), dtype=np.int64)

#: Triangles of a box whose 8 corners are numbered x + 2 y + 4 z (each 0 low, 1 high).
_BOX_FACES = np.array([[0, 2, 3], [0, 3, 1], [4, 5, 7], [4, 7, 6], [0, 1, 5], [0, 5, 4],
                       [2, 6, 7], [2, 7, 3], [0, 4, 6], [0, 6, 2], [1, 3, 7], [1, 7, 5]])
#: The 12 edges of that box.
_BOX_EDGES = np.array([[0, 1], [2, 3], [4, 5], [6, 7], [0, 2], [1, 3], [4, 6], [5, 7],
                       [0, 4], [1, 5], [2, 6], [3, 7]])


@dataclass(frozen=True)
class Mesh:
    """A body's shape in its own frame [m].

    Attributes
    ----------
    vertices : numpy.ndarray
        (n, 3) float vertex positions [m].
    faces : numpy.ndarray
        (m, 3) int triangles (vertex indices).
    lines : numpy.ndarray
        (k, 2) int line segments (vertex indices) drawn as thin lines.
    uv : numpy.ndarray or None
        (n, 2) texture coordinates in [0, 1] (u along local x, v along local y), or None.
    """

    vertices: np.ndarray
    faces: np.ndarray = field(default_factory=lambda: _NO_INDEX)
    lines: np.ndarray = field(default_factory=lambda: _NO_LINES)
    uv: np.ndarray | None = None

    @property
    def bounds(self) -> tuple:
        """(xmin, xmax, ymin, ymax, zmin, zmax) of the vertices [m]."""
        lo, hi = self.vertices.min(axis=0), self.vertices.max(axis=0)
        return tuple(float(v) for pair in zip(lo, hi) for v in pair)

    def corners(self) -> np.ndarray:
        """The 8 corners of the axis-aligned box around the mesh.

        Returns
        -------
        numpy.ndarray
            (8, 3) corner positions in the body's frame [m].
        """
        b = self.bounds
        return np.array([[x, y, z] for x in b[:2] for y in b[2:4] for z in b[4:]])


def merge(meshes) -> Mesh:
    """One mesh from several (one drawn object is cheaper than many).

    Parameters
    ----------
    meshes : iterable of Mesh
        The parts, in one frame; their texture coordinates are dropped.

    Returns
    -------
    Mesh
        All vertices, triangles and lines, with indices renumbered.
    """
    parts = list(meshes)
    offsets = np.cumsum([0] + [len(m.vertices) for m in parts[:-1]])
    return Mesh(np.concatenate([m.vertices for m in parts]),
                np.concatenate([m.faces + k for m, k in zip(parts, offsets)]),
                np.concatenate([m.lines + k for m, k in zip(parts, offsets)]))


def box(xmin, xmax, ymin, ymax, zmin, zmax, *, edges: bool = False) -> Mesh:
    """An axis-aligned box [m].

    Parameters
    ----------
    xmin, xmax, ymin, ymax, zmin, zmax : float
        Its extent along each axis [m].
    edges : bool
        Also hold its 12 edges as lines (for outlined zones).

    Returns
    -------
    Mesh
        8 vertices and 12 triangles.
    """
    v = np.array([[x, y, z] for z in (zmin, zmax) for y in (ymin, ymax) for x in (xmin, xmax)], dtype=float)
    return Mesh(v, _BOX_FACES.copy(), _BOX_EDGES.copy() if edges else _NO_LINES)


def cylinder(start_m, end_m, radius_m: float, sides: int, *, caps: bool = True) -> Mesh:
    """A straight cylinder (a prism of ``sides`` faces) from ``start_m`` to ``end_m``.

    Parameters
    ----------
    start_m, end_m : array_like, shape (3,)
        Centres of its two ends [m].
    radius_m : float
        Radius [m].
    sides : int
        Number of side faces.
    caps : bool
        Close the two ends.

    Returns
    -------
    Mesh
        ``2 sides`` rim vertices (plus two centres when capped).
    """
    a, b = np.asarray(start_m, dtype=float), np.asarray(end_m, dtype=float)
    axis = (b - a) / np.linalg.norm(b - a)
    helper = np.array([1.0, 0.0, 0.0]) if abs(axis[0]) < 0.9 else np.array([0.0, 1.0, 0.0])
    u = np.cross(axis, helper)
    u /= np.linalg.norm(u)
    w = np.cross(axis, u)
    ang = 2.0 * np.pi * np.arange(sides) / sides
    ring = radius_m * (np.cos(ang)[:, None] * u + np.sin(ang)[:, None] * w)
    v = np.concatenate([a + ring, b + ring])
    i = np.arange(sides)
    j = (i + 1) % sides
    faces = [np.column_stack([i, j, sides + j]), np.column_stack([i, sides + j, sides + i])]
    if caps:
        v = np.concatenate([v, [a, b]])
        faces += [np.column_stack([np.full(sides, 2 * sides), j, i]),
                  np.column_stack([np.full(sides, 2 * sides + 1), sides + i, sides + j])]
    return Mesh(v, np.concatenate(faces))


def cone(base_m, tip_m, radius_m: float, sides: int) -> Mesh:
    """A cone with a closed base.

    Parameters
    ----------
    base_m, tip_m : array_like, shape (3,)
        Centre of its base and its tip [m].
    radius_m : float
        Base radius [m].
    sides : int
        Number of side faces.

    Returns
    -------
    Mesh
        A rim, the tip and the base centre.
    """
    rim = cylinder(base_m, tip_m, radius_m, sides, caps=False).vertices[:sides]
    v = np.concatenate([rim, [tip_m, base_m]])
    i = np.arange(sides)
    j = (i + 1) % sides
    return Mesh(v, np.concatenate([np.column_stack([i, j, np.full(sides, sides)]),
                                   np.column_stack([np.full(sides, sides + 1), j, i])]))


def unit_rod(radius_m: float, sides: int) -> Mesh:
    """An open tube from z = 0 to z = 1: a rope or sling leg, stretched onto its ends by its pose.

    Parameters
    ----------
    radius_m : float
        Radius [m].
    sides : int
        Number of side faces.

    Returns
    -------
    Mesh
        The tube, without end caps.
    """
    return cylinder((0.0, 0.0, 0.0), (0.0, 0.0, 1.0), radius_m, sides, caps=False)


def arrow(start_m, direction, length_m: float, *, tip_fraction=0.25, tip_radius=0.08, shaft_radius=0.03,
          sides: int = 20) -> Mesh:
    """An arrow: a shaft and a cone tip.

    Parameters
    ----------
    start_m : array_like, shape (3,)
        Foot of the shaft [m].
    direction : array_like, shape (3,)
        Where it points (any length but zero).
    length_m : float
        Overall length [m].
    tip_fraction : float
        The tip's share of the length [-].
    tip_radius, shaft_radius : float
        Radii as fractions of the length [-].
    sides : int
        Number of side faces of shaft and tip.

    Returns
    -------
    Mesh
        Shaft and tip merged.
    """
    a = np.asarray(start_m, dtype=float)
    d = np.asarray(direction, dtype=float) / np.linalg.norm(direction)
    neck = a + (1.0 - tip_fraction) * length_m * d
    return merge([cylinder(a, neck, shaft_radius * length_m, sides),
                  cone(neck, a + length_m * d, tip_radius * length_m, sides)])


def plane(x0, x1, y0, y1, z_m: float = 0.0) -> Mesh:
    """A horizontal rectangle with texture coordinates (u along x, v along y, 0 at the low edge).

    Parameters
    ----------
    x0, x1, y0, y1 : float
        Its extent [m].
    z_m : float
        Its height [m].

    Returns
    -------
    Mesh
        4 vertices, 2 triangles, ``uv``.
    """
    v = np.array([[x0, y0, z_m], [x1, y0, z_m], [x0, y1, z_m], [x1, y1, z_m]], dtype=float)
    uv = np.array([[0.0, 0.0], [1.0, 0.0], [0.0, 1.0], [1.0, 1.0]])
    return Mesh(v, np.array([[0, 1, 3], [0, 3, 2]]), uv=uv)


def polyline(points_m) -> Mesh:
    """A line through ``points_m`` in order, and no triangles.

    Parameters
    ----------
    points_m : array_like, shape (n, 3)
        The points [m].

    Returns
    -------
    Mesh
        ``n - 1`` line segments.
    """
    p = np.asarray(points_m, dtype=float)
    i = np.arange(len(p) - 1)
    return Mesh(p, lines=np.column_stack([i, i + 1]))


# --------------------------------------------------------------------------- crane parts


def _tie(a, b, radius_m=0.06) -> Mesh:
    return cylinder(a, b, radius_m, 8, caps=False)


@dataclass(frozen=True)
class CranePart:
    """A crane body: its mesh, its material name and how it moves.

    ``role`` is one of "fixed" (world frame), "base" (moves with the x/y travel),
    "slew" (base plus jib angle), "trolley" (at the suspension point, along the
    jib), "bridge" (moves with the suspension point's x), "boom" (a unit body
    along x, from its foot to its tip).
    """

    mesh: Mesh
    material: str
    role: str


def crane_parts(layout) -> dict:
    """The schematic crane of a layout, one part per moving body.

    Parameters
    ----------
    layout : swingsim.scene3d.layout.Layout
        Crane kind and sizes.

    Returns
    -------
    dict
        Body name (``crane``, ``slewing_part``, ``jib``, ``counterweight``,
        ``gantry``, ``bridge``, ``boom``, ``trolley``) -> :class:`CranePart`; a
        luffing tower crane has a mast, a slewing part and its luffing jib named
        ``boom``.
    """
    if layout.kind == "tower":
        return _tower(layout)
    if layout.kind == "luffing":
        return _luffing_tower(layout)
    if layout.kind in ("gantry", "bridge"):
        return _gantry(layout)
    return _mobile()


def _tower(lay) -> dict:
    z0, jib, counter = lay.suspension_height_m, lay.jib_length_m, lay.counter_jib_length_m
    w = 1.6
    top = z0 + 1.6
    apex = (0.0, 0.0, top + 0.16 * jib + 3.0)
    head = box(-0.5, 0.5, -0.5, 0.5, top, apex[2])
    ties = [_tie(apex, (0.62 * jib, 0.0, top)), _tie(apex, (-counter + 1.0, 0.0, top))]
    cab = box(0.8, 2.6, -1.9, -0.6, z0 - 1.8, z0 + 0.2)
    return {
        "crane": CranePart(merge([box(-w / 2, w / 2, -w / 2, w / 2, 0.0, z0 + 0.4),
                                  box(-2.5, 2.5, -2.5, 2.5, 0.0, 0.6)]), "crane", "base"),
        "slewing_part": CranePart(merge([box(-counter, 0.0, -0.7, 0.7, z0 + 0.6, top), head, cab] + ties),
                                  "crane", "slew"),
        "jib": CranePart(box(0.0, jib, -0.5, 0.5, z0 + 0.4, top), "crane", "slew"),
        "counterweight": CranePart(box(-counter, -counter + 2.2, -1.1, 1.1, z0 - 1.2, z0 + 0.6), "crane_dark", "slew"),
        "trolley": CranePart(box(-0.6, 0.6, -0.6, 0.6, 0.0, 0.4), "trolley", "trolley"),
    }


def _luffing_tower(lay) -> dict:
    """Mast to the slewing part's floor just below the boom's foot pin, counter-jib and A-frame."""
    offset, _, foot = lay.boom_foot_m
    counter = lay.counter_jib_length_m
    w = 1.6
    floor = foot - 1.2
    apex = (-1.0, 0.0, foot + 7.0)
    ties = [_tie(apex, (offset, 0.0, foot)), _tie(apex, (-counter + 1.0, 0.0, floor + 1.0))]
    return {
        "crane": CranePart(merge([box(-w / 2, w / 2, -w / 2, w / 2, 0.0, floor),
                                  box(-2.5, 2.5, -2.5, 2.5, 0.0, 0.6)]), "crane", "base"),
        "slewing_part": CranePart(merge([box(-counter, offset + 0.6, -1.2, 1.2, floor, floor + 1.0),
                                         box(-1.4, -0.6, -0.5, 0.5, floor + 1.0, apex[2]),
                                         box(offset - 0.6, offset + 0.6, -1.2, 1.2, floor + 1.0, foot + 0.2),
                                         box(0.8, 2.6, -2.6, -1.3, floor - 1.6, floor + 0.6)] + ties),
                                  "crane", "slew"),
        "counterweight": CranePart(box(-counter, -counter + 2.2, -1.1, 1.1, floor - 1.6, floor + 1.0),
                                   "crane_dark", "slew"),
        "boom": CranePart(box(0.0, 1.0, -0.45, 0.45, -0.45, 0.45), "crane", "boom"),
    }


def _gantry(lay) -> dict:
    z0 = lay.suspension_height_m
    (x_lo, x_hi), (y_lo, y_hi) = lay.rail_x_m, lay.rail_y_m
    beam = box(-0.6, 0.6, y_lo - 0.6, y_hi + 0.6, z0 + 0.4, z0 + 1.6)
    if lay.kind == "bridge":
        h = z0 + 0.4
        runway = [box(x_lo, x_hi, y - 0.4, y + 0.4, h - 0.8, h) for y in (y_lo, y_hi)]
        columns = [box(x - 0.3, x + 0.3, y - 0.3, y + 0.3, 0.0, h - 0.8)
                   for x in np.arange(x_lo, x_hi + 0.1, 8.0) for y in (y_lo, y_hi)]
        ends = [box(-1.5, 1.5, y - 0.5, y + 0.5, z0 + 0.4, z0 + 1.0) for y in (y_lo, y_hi)]
        fixed, moving = merge(runway + columns), merge([beam] + ends)
    else:
        fixed = merge([box(x_lo, x_hi, y - 0.25, y + 0.25, 0.0, 0.25) for y in (y_lo, y_hi)])
        legs = []
        for y in (y_lo, y_hi):
            legs += [_tie((dx, y, 0.3), (0.0, y, z0 + 0.5), radius_m=0.35) for dx in (-2.5, 2.5)]
            legs.append(box(-3.0, 3.0, y - 0.4, y + 0.4, 0.25, 0.9))
        moving = merge([beam] + legs)
    return {"crane": CranePart(fixed, "crane", "fixed"), lay.kind: CranePart(moving, "crane", "bridge"),
            "trolley": CranePart(box(-0.9, 0.9, -0.7, 0.7, 0.0, 0.4), "trolley", "trolley")}


def _mobile() -> dict:
    wheels = [cylinder((x, y - 0.25, 0.55), (x, y + 0.25, 0.55), 0.55, 16)
              for x in (-3.5, -1.8, 1.8, 3.5) for y in (-1.3, 1.3)]
    pads = [box(x - 0.4, x + 0.4, y - 0.4, y + 0.4, 0.0, 0.15) for x in (-4.2, 4.2) for y in (-3.2, 3.2)]
    outriggers = [box(x - 0.2, x + 0.2, -3.2, 3.2, 0.9, 1.3) for x in (-4.2, 4.2)]
    return {
        "crane": CranePart(merge([box(-5.0, 5.0, -1.4, 1.4, 0.5, 2.0)] + wheels + pads + outriggers),
                           "crane_dark", "base"),
        "slewing_part": CranePart(merge([box(-3.2, 1.6, -1.3, 1.3, 2.0, 3.2), box(0.4, 2.2, -2.3, -1.35, 2.0, 3.8)]),
                                  "crane", "slew"),
        "boom": CranePart(box(0.0, 1.0, -0.45, 0.45, -0.45, 0.45), "crane", "boom"),
    }


# --------------------------------------------------------------------------- load, rigging, zones


def load_mesh(shape: str, size_m) -> Mesh:
    """The load in its own frame: centre of gravity at the origin, z up.

    Parameters
    ----------
    shape : {"box", "cylinder"}
        Its shape; a cylinder's axis follows :func:`swingsim.dynamics.rigging.cylinder_axis`
        (one rule for the drawing and the inertia).
    size_m : sequence of 3 float
        Its size along x, y, z [m].

    Returns
    -------
    Mesh
        A box, or a closed 32-sided cylinder.
    """
    lx, ly, lz = (float(v) for v in size_m)
    if shape == "cylinder":
        axis, diameter, _ = cylinder_axis(size_m)
        half = np.zeros(3)
        half[axis] = 0.5 * float(size_m[axis])
        return cylinder(-half, half, diameter / 2, 32)
    return box(-lx / 2, lx / 2, -ly / 2, ly / 2, -lz / 2, lz / 2)


def top_attach_points(mesh: Mesh, shape: str) -> np.ndarray:
    """Lifting points on the top of the load, in its own frame [m].

    Parameters
    ----------
    mesh : Mesh
        The load's mesh.
    shape : str
        "cylinder" for two points along a lying cylinder's axis; anything else
        for four points near the top corners.

    Returns
    -------
    numpy.ndarray
        (2, 3) or (4, 3) points [m].
    """
    xmin, xmax, ymin, ymax, zmin, zmax = mesh.bounds
    if shape == "cylinder":
        axis = int(np.argmax((xmax - xmin, ymax - ymin, zmax - zmin)))
        if axis == 0:
            return np.array([[xmin * 0.7, 0, zmax], [xmax * 0.7, 0, zmax]])
        if axis == 1:
            return np.array([[0, ymin * 0.7, zmax], [0, ymax * 0.7, zmax]])
    f = 0.8
    return np.array([[xmin * f, ymin * f, zmax], [xmax * f, ymin * f, zmax],
                     [xmax * f, ymax * f, zmax], [xmin * f, ymax * f, zmax]])


def rigging_height(attach_m) -> float:
    """Height of the sling apex above the lifting points for legs about 55 deg from horizontal [m].

    Parameters
    ----------
    attach_m : numpy.ndarray
        (k, 3) lifting points in the load's frame [m].

    Returns
    -------
    float
        At least 0.4 m.
    """
    d = float(np.max(np.linalg.norm(np.asarray(attach_m)[:, :2], axis=1)))
    return max(0.4, 1.4 * d)


def spreader_mesh(span_m: float) -> Mesh:
    """A lifting beam in its own frame: along x, centred on the origin [m].

    The beam reaches a little past its end lugs (which lie at x = +-span/2 on
    its centre line); its depth follows the span (7 %, 0.2 m to 1 m; a
    schematic proportion, not a design).  Its centre line is held as a line,
    which stays a pixel or two wide however far the camera.

    Parameters
    ----------
    span_m : float
        Distance between the end lugs [m]; drawn at least 0.1 m.

    Returns
    -------
    Mesh
        The beam's box and its centre line.
    """
    span = max(float(span_m), 0.1)
    depth = min(1.0, max(0.2, 0.07 * span))
    width, over = 0.6 * depth, 0.5 * depth
    solid = box(-span / 2 - over, span / 2 + over, -width / 2, width / 2, -depth / 2, depth / 2)
    line = polyline([[-span / 2 - over, 0.0, 0.0], [span / 2 + over, 0.0, 0.0]])
    return merge([solid, line])


def hook_mesh(size_m: float) -> Mesh:
    """The hook block: a box ``size_m`` wide, two thirds as deep, 1.4 times as tall, centred.

    Parameters
    ----------
    size_m : float
        Its width [m].

    Returns
    -------
    Mesh
        The box.
    """
    hs = size_m
    return box(-hs / 2, hs / 2, -hs / 3, hs / 3, -hs * 0.7, hs * 0.7)


def zone_mesh(zone) -> Mesh:
    """A zone's box with its 12 edges, in world coordinates.

    Parameters
    ----------
    zone : swingsim.scene.Zone
        The zone (``min_m``, ``max_m`` corners [m]).

    Returns
    -------
    Mesh
        The box's triangles and edges.
    """
    (a, b, c), (d, e, f) = zone.min_m, zone.max_m
    return box(a, d, b, e, c, f, edges=True)


#: Height of the figure drawn for a person holding a tag line [m] (a schematic adult).
PERSON_HEIGHT_M = 1.75
#: Height of a hand holding a tag line above the feet, when the anchor gives no ground to stand on [m].
HAND_HEIGHT_M = 1.0


def person_mesh(hand_m, ground_z_m: float) -> Mesh:
    """A schematic standing person holding a tag line at ``hand_m``, in world coordinates.

    The figure stands on the ground (at ``ground_z_m``) when the hand is a standing
    person's reach above it (0.3 to 2.2 m), else with its feet
    :data:`HAND_HEIGHT_M` below the hand (on a deck or a stack the scene does not
    draw).  Legs, body and head are boxes; a flat disc under the feet marks the
    standing place, seen from far off.

    Parameters
    ----------
    hand_m : sequence of 3 float
        Where the person holds the line: the tag line's ``anchor_m`` [m].
    ground_z_m : float
        The drawn ground's height [m].

    Returns
    -------
    Mesh
        The figure [m].
    """
    x, y, z = (float(v) for v in hand_m)
    feet = ground_z_m if 0.3 <= z - ground_z_m <= 2.2 else z - HAND_HEIGHT_M
    h = PERSON_HEIGHT_M
    parts = [box(x - 0.15, x + 0.15, y - 0.1, y + 0.1, feet, feet + 0.48 * h),
             box(x - 0.21, x + 0.21, y - 0.13, y + 0.13, feet + 0.48 * h, feet + 0.84 * h),
             box(x - 0.11, x + 0.11, y - 0.11, y + 0.11, feet + 0.86 * h, feet + h),
             cylinder((x, y, feet + 0.02), (x, y, feet + 0.05), 0.55, 16)]
    return merge(parts)


def contact_marker(size_m: float) -> Mesh:
    """A flat square marking where a corner of the load bears on the ground, centred, 4 cm thick.

    Parameters
    ----------
    size_m : float
        Its side [m].

    Returns
    -------
    Mesh
        The square slab (bottom at z = 0).
    """
    s = 0.5 * size_m
    return box(-s, s, -s, s, 0.0, 0.04)
