"""Plain geometry of the drawn scene: crane bodies, rigging, load, ground, zones.

Every body is built once, in its own local frame; :mod:`.stage` moves it each
frame with a 4x4 transform.  Dimensions follow the run (the jib reaches past
the largest radius, the rails cover the travel), so any scene gets a fitting,
schematic crane: it shows where things are, not a particular crane's design.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pyvista as pv

from swingsim.scene3d import transforms as T


@dataclass(frozen=True)
class Layout:
    """Sizes of the schematic crane and of the ground, from the run's extent [m]."""

    kind: str
    z0: float  # suspension height
    jib_len: float
    counter_len: float
    y_lo: float  # gantry/bridge: rail lines
    y_hi: float
    x_lo: float
    x_hi: float
    ground: tuple  # (xmin, xmax, ymin, ymax)
    load_size: tuple
    load_shape: str
    axes_xy: tuple = (0.0, 0.0)  # where the +x/+y arrows stand: just off the lift's own area


def crane_pose(motion, t):
    """Axis positions at times ``t``: base x, y [m], jib angle phi [rad], radius rho [m] (``Motion.pose``)."""
    return motion.pose(t)


def default_load_size(mass_kg: float) -> tuple:
    """A plausible block for a load with no size given: density 2000 kg/m^3, 0.5 to 3 m a side."""
    a = min(3.0, max(0.5, (mass_kg / 2000.0) ** (1.0 / 3.0)))
    return (a, a, a)


def make_layout(traj, load_size, load_shape="box") -> Layout:
    scene = traj.scene
    t = np.linspace(0.0, traj.t_end_s, 400)
    e = traj.motion.evaluate(t)
    p = e["p"]
    z0 = float(p[0, 2])
    X, Y, phi, rho = crane_pose(traj.motion, t)
    rmax = float(np.max(np.abs(rho)))
    jib = max(8.0, 1.12 * rmax + 2.0)
    load = traj.sample(t)["load"]
    pts = [p[:, :2], load[:, :2], np.stack([X, Y], -1)]
    for z in scene.zones:
        pts.append(np.array([z.min_m[:2], z.max_m[:2]]))
    kind = scene.crane.kind
    if kind == "tower":
        ang = np.linspace(0, 2 * np.pi, 33)
        for xb, yb in ((X.min(), Y.min()), (X.max(), Y.max())):
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
    return Layout(kind=kind, z0=z0, jib_len=jib, counter_len=max(4.0, 0.32 * jib), y_lo=y_lo, y_hi=y_hi,
                  x_lo=x_lo, x_hi=x_hi, ground=(float(lo[0]), float(hi[0]), float(lo[1]), float(hi[1])),
                  load_size=tuple(load_size), load_shape=load_shape, axes_xy=axes_xy)


def box(xmin, xmax, ymin, ymax, zmin, zmax) -> pv.PolyData:
    return pv.Box(bounds=(xmin, xmax, ymin, ymax, zmin, zmax))


def merge(meshes) -> pv.PolyData:
    """One surface mesh from several (one actor draws faster than many)."""
    out = pv.merge([m.triangulate() for m in meshes])
    if not isinstance(out, pv.PolyData):
        out = out.extract_surface()
    return out


def tie(a, b, r=0.06) -> pv.PolyData:
    return pv.Tube(pointa=a, pointb=b, radius=r, n_sides=8)


# --------------------------------------------------------------------------- crane bodies
# Each returns {name: (mesh, role)}: role "fixed" (world frame), "base" (moves with the x/y
# travel), "slew" (base + jib angle), "trolley" (at the suspension point, jib heading),
# "bridge" (moves with the suspension point's x), "boom" (unit body along x, pivot to tip).


def tower_bodies(lay: Layout) -> dict:
    z0, J, C = lay.z0, lay.jib_len, lay.counter_len
    w = 1.6
    top = z0 + 1.6
    mast = box(-w / 2, w / 2, -w / 2, w / 2, 0.0, z0 + 0.4)
    footing = box(-2.5, 2.5, -2.5, 2.5, 0.0, 0.6)
    jib = box(0.0, J, -0.5, 0.5, z0 + 0.4, top)
    counter = box(-C, 0.0, -0.7, 0.7, z0 + 0.6, top)
    weight = box(-C, -C + 2.2, -1.1, 1.1, z0 - 1.2, z0 + 0.6)
    head = box(-0.5, 0.5, -0.5, 0.5, top, top + 0.16 * J + 3.0)
    apex = (0.0, 0.0, top + 0.16 * J + 3.0)
    ties = [tie(apex, (0.62 * J, 0.0, top)), tie(apex, (-C + 1.0, 0.0, top))]
    cab = box(0.8, 2.6, -1.9, -0.6, z0 - 1.8, z0 + 0.2)
    slewing = merge([jib, counter, head, cab] + ties)
    trolley = box(-0.6, 0.6, -0.6, 0.6, 0.0, 0.4)
    return {"mast": (merge([mast, footing]), "base"), "jib": (slewing, "slew"),
            "weight": (weight, "slew"), "trolley": (trolley, "trolley")}


def gantry_bodies(lay: Layout, bridge: bool) -> dict:
    z0 = lay.z0
    y_lo, y_hi = lay.y_lo, lay.y_hi
    beam = box(-0.6, 0.6, y_lo - 0.6, y_hi + 0.6, z0 + 0.4, z0 + 1.6)
    out = {}
    if bridge:
        h = z0 + 0.4
        runway = [box(lay.x_lo, lay.x_hi, y - 0.4, y + 0.4, h - 0.8, h) for y in (y_lo, y_hi)]
        cols = []
        for x in np.arange(lay.x_lo, lay.x_hi + 0.1, 8.0):
            for y in (y_lo, y_hi):
                cols.append(box(x - 0.3, x + 0.3, y - 0.3, y + 0.3, 0.0, h - 0.8))
        out["runway"] = (merge(runway + cols), "fixed")
        ends = [box(-1.5, 1.5, y - 0.5, y + 0.5, z0 + 0.4, z0 + 1.0) for y in (y_lo, y_hi)]
        out["beam"] = (merge([beam] + ends), "bridge")
    else:
        rails = [box(lay.x_lo, lay.x_hi, y - 0.25, y + 0.25, 0.0, 0.25) for y in (y_lo, y_hi)]
        out["rails"] = (merge(rails), "fixed")
        legs = []
        for y in (y_lo, y_hi):
            for dx in (-2.5, 2.5):
                legs.append(tie((dx, y, 0.3), (0.0, y, z0 + 0.5), r=0.35))
            legs.append(box(-3.0, 3.0, y - 0.4, y + 0.4, 0.25, 0.9))
        out["beam"] = (merge([beam] + legs), "bridge")
    out["trolley"] = (box(-0.9, 0.9, -0.7, 0.7, 0.0, 0.4), "trolley")
    return out


def mobile_bodies(lay: Layout) -> dict:
    carrier = box(-5.0, 5.0, -1.4, 1.4, 0.5, 2.0)
    wheels = [pv.Cylinder(center=(x, y, 0.55), direction=(0, 1, 0), radius=0.55, height=0.5, resolution=16)
              for x in (-3.5, -1.8, 1.8, 3.5) for y in (-1.3, 1.3)]
    pads = [box(x - 0.4, x + 0.4, y - 0.4, y + 0.4, 0.0, 0.15) for x in (-4.2, 4.2) for y in (-3.2, 3.2)]
    beams = [box(x - 0.2, x + 0.2, -3.2, 3.2, 0.9, 1.3) for x in (-4.2, 4.2)]
    turret = box(-3.2, 1.6, -1.3, 1.3, 2.0, 3.2)
    cab = box(0.4, 2.2, -2.3, -1.35, 2.0, 3.8)
    boom = box(0.0, 1.0, -0.45, 0.45, -0.45, 0.45)
    return {"carrier": (merge([carrier] + wheels + pads + beams), "base"),
            "turret": (merge([turret, cab]), "slew"), "boom": (boom, "boom")}


BOOM_PIVOT = (-1.2, 0.0, 3.2)  # in the turret's frame [m]


def crane_bodies(lay: Layout) -> dict:
    if lay.kind == "tower":
        return tower_bodies(lay)
    if lay.kind in ("gantry", "bridge"):
        return gantry_bodies(lay, bridge=lay.kind == "bridge")
    return mobile_bodies(lay)


def crane_matrices(lay: Layout, roles: dict, X, Y, phi, rho, p) -> dict:
    """Transforms of the crane bodies for one instant (``p``: suspension point)."""
    base = T.translate(X, Y, 0.0)
    slew = base @ T.rot_z(phi)
    out = {}
    for name, role in roles.items():
        if role == "fixed":
            continue
        if role == "base":
            out[name] = base
        elif role == "slew":
            out[name] = slew
        elif role == "trolley":
            heading = phi if lay.kind in ("tower", "mobile") else 0.0
            out[name] = T.translate(p[0], p[1], p[2]) @ T.rot_z(heading)
        elif role == "bridge":
            out[name] = T.translate(p[0], 0.0, 0.0)
        elif role == "boom":
            pivot = slew @ np.array([*BOOM_PIVOT, 1.0])
            tip = np.array([p[0], p[1], p[2] + 0.3])
            out[name] = T.segment(pivot[:3], tip, axis=0)
    return out


# --------------------------------------------------------------------------- load, rigging


def load_mesh(shape: str, size, mesh=None) -> pv.PolyData:
    """The load in its own frame: centre of gravity at the origin, z up."""
    if mesh is not None:
        return mesh
    lx, ly, lz = size
    if shape == "cylinder":
        from swingsim.dynamics.rigging import cylinder_axis  # one rule for the drawing and the inertia

        axis, d, _ = cylinder_axis(size)
        direction = [0.0, 0.0, 0.0]
        direction[axis] = 1.0
        return pv.Cylinder(center=(0, 0, 0), direction=direction, radius=d / 2, height=size[axis],
                           resolution=32).triangulate()
    return box(-lx / 2, lx / 2, -ly / 2, ly / 2, -lz / 2, lz / 2)


def top_attach_points(mesh: pv.PolyData, shape: str) -> np.ndarray:
    """Four lifting points on the top of the load, in its own frame [m]."""
    b = mesh.bounds
    xmin, xmax, ymin, ymax, zmax = b[0], b[1], b[2], b[3], b[5]
    if shape == "cylinder":
        # Two points along a horizontal cylinder's axis, or a ring on a standing one.
        ext = (xmax - xmin, ymax - ymin, b[5] - b[4])
        axis = int(np.argmax(ext))
        if axis == 0:
            return np.array([[xmin * 0.7, 0, zmax], [xmax * 0.7, 0, zmax]])
        if axis == 1:
            return np.array([[0, ymin * 0.7, zmax], [0, ymax * 0.7, zmax]])
    fx, fy = 0.8, 0.8
    return np.array([[xmin * fx, ymin * fy, zmax], [xmax * fx, ymin * fy, zmax],
                     [xmax * fx, ymax * fy, zmax], [xmin * fx, ymax * fy, zmax]])


def spreader_beam(span_m: float):
    """A lifting beam in its own frame: along x, centred on the origin [m].

    The beam reaches a little past its end lugs (which lie at x = +-span/2 on
    its centre line); its depth follows the span (7 %, 0.2 m to 1 m; a
    schematic proportion, not a design).  Returns ``(solid, centre_line)``: the
    box, and a line along it that stays a pixel or two wide however far the camera.
    """
    span = max(float(span_m), 0.1)
    depth = min(1.0, max(0.2, 0.07 * span))
    width, over = 0.6 * depth, 0.5 * depth
    solid = box(-span / 2 - over, span / 2 + over, -width / 2, width / 2, -depth / 2, depth / 2)
    line = polyline(np.array([[-span / 2 - over, 0.0, 0.0], [span / 2 + over, 0.0, 0.0]]))
    return solid, line


def rigging_height(attach: np.ndarray) -> float:
    """Height of the sling apex above the lifting points for legs about 55 deg from horizontal."""
    d = float(np.max(np.linalg.norm(attach[:, :2], axis=1)))
    return max(0.4, 1.4 * d)


# --------------------------------------------------------------------------- ground, zones


def ground_meshes(lay: Layout, ground_rgb, minor_rgb, major_rgb):
    """Ground plane with its metre grid drawn into a texture, and the grid's labels.

    One textured rectangle draws faster than hundreds of grid lines in software
    OpenGL (about a quarter of a split frame's cost saved).
    Returns ``(plane, rgb_image, labels, (x0, x1, y0, y1))``; image row 0 at the low-y edge.
    """
    x0, x1, y0, y1 = lay.ground
    span = max(x1 - x0, y1 - y0)
    minor = 1.0 if span <= 150 else 5.0
    major = 10.0 if span <= 300 else 50.0
    x0, x1 = math.floor(x0 / major) * major, math.ceil(x1 / major) * major
    y0, y1 = math.floor(y0 / major) * major, math.ceil(y1 / major) * major
    plane = pv.Plane(center=((x0 + x1) / 2, (y0 + y1) / 2, 0.0), direction=(0, 0, 1),
                     i_size=x1 - x0, j_size=y1 - y0, i_resolution=1, j_resolution=1)
    ppm = max(2, min(8, int(4096 / max(x1 - x0, y1 - y0) * minor)))  # pixels a minor square
    nx, ny = int(round((x1 - x0) / minor)) * ppm, int(round((y1 - y0) / minor)) * ppm
    img = np.empty((ny, nx, 3), dtype=np.uint8)
    img[:] = np.asarray(ground_rgb) * 255
    k = int(round(major / minor))
    for axis, n in ((1, nx), (0, ny)):
        idx = np.arange(n)
        on_minor = idx % ppm == 0
        on_major = (idx % (ppm * k) == 0) | (idx % (ppm * k) == 1) | (idx % (ppm * k) == ppm * k - 1)
        sel_minor = (slice(None), on_minor) if axis == 1 else (on_minor, slice(None))
        sel_major = (slice(None), on_major) if axis == 1 else (on_major, slice(None))
        img[sel_minor] = np.asarray(minor_rgb) * 255
        img[sel_major] = np.asarray(major_rgb) * 255
    labels = []
    xs = np.arange(x0, x1 + 1e-6, major)
    ys = np.arange(y0 + major, y1 + 1e-6, major)
    # at most about five labels an edge (each label costs a little every frame)
    for x in xs[::max(1, int(np.ceil(len(xs) / 5)))]:
        labels.append(((x, y0 - 0.02 * span, 0.05), f"x {x:g} m"))
    for y in ys[::max(1, int(np.ceil(len(ys) / 5)))]:
        labels.append(((x0 - 0.02 * span, y, 0.05), f"y {y:g} m"))
    return plane, img, labels, (x0, x1, y0, y1)


def axis_arrows(lay: Layout, length: float):
    """Arrows along +x and +y on the ground beside the lift, with their label positions."""
    o = np.array([lay.axes_xy[0], lay.axes_xy[1], 0.1])
    ax = pv.Arrow(start=o, direction=(1, 0, 0), scale=length, tip_length=0.25, tip_radius=0.08,
                  shaft_radius=0.03)
    ay = pv.Arrow(start=o, direction=(0, 1, 0), scale=length, tip_length=0.25, tip_radius=0.08,
                  shaft_radius=0.03)
    return ax, ay, o + (1.15 * length, 0, 0), o + (0, 1.15 * length, 0)


def zone_box(zone) -> pv.PolyData:
    (a, b, c), (d, e, f) = zone.min_m, zone.max_m
    return box(a, d, b, e, c, f)


def polyline(points: np.ndarray) -> pv.PolyData:
    n = len(points)
    return pv.PolyData(np.asarray(points, dtype=float), lines=np.concatenate([[n], np.arange(n)]))


def envelope_image(points: np.ndarray, half_xy, rgb, alpha: int = 120):
    """Plan-view swing envelope as a ground texture: the ground the load passes over [m].

    A ground cell is filled when it lies under the load's upright footprint (half
    sizes ``half_xy`` along x and y) at some instant of its plan path: the union of
    the footprints, as the summary's zone clearances count the load.  The filled
    region's edge is drawn darker.  Returns ``(plane, rgba)``: a ground rectangle
    and its texture (row 0 at the rectangle's low-y edge).
    """
    from scipy.ndimage import binary_erosion
    from scipy.spatial import cKDTree

    hx, hy = (max(0.05, float(h)) for h in half_xy)
    xy = np.asarray(points, dtype=float)[:, :2]
    lo = xy.min(axis=0) - (hx + 1.0, hy + 1.0)
    hi = xy.max(axis=0) + (hx + 1.0, hy + 1.0)
    cell = max(0.05, float(np.max(hi - lo)) / 500.0)
    # densify the path so no gap between samples exceeds half a cell
    seg = np.linalg.norm(np.diff(xy, axis=0), axis=1)
    parts = [xy[:1]]
    for i, d in enumerate(seg):
        k = int(np.ceil(d / (0.5 * cell)))
        if k > 0:
            f = (np.arange(1, k + 1) / k)[:, None]
            parts.append(xy[i] + f * (xy[i + 1] - xy[i]))
    path = np.concatenate(parts)
    nx, ny = (int(np.ceil(v)) for v in (hi - lo) / cell)
    gx = lo[0] + (np.arange(nx) + 0.5) * cell
    gy = lo[1] + (np.arange(ny) + 0.5) * cell
    X, Y = np.meshgrid(gx, gy)  # rows along y
    # footprint test in units of the half sizes: max(|dx|/hx, |dy|/hy) <= 1 (the inf-norm)
    scale = np.array([1.0 / hx, 1.0 / hy])
    dist, _ = cKDTree(path * scale).query(np.column_stack([X.ravel(), Y.ravel()]) * scale,
                                          distance_upper_bound=1.0 + 1e-9, p=np.inf)
    inside = np.isfinite(dist).reshape(ny, nx)
    edge = inside & ~binary_erosion(inside, iterations=2)
    rgba = np.zeros((ny, nx, 4), dtype=np.uint8)
    rgba[..., :3] = np.asarray(rgb, dtype=float) * 255
    rgba[inside, 3] = alpha
    rgba[edge, :3] = (np.asarray(rgb) * 0.6 * 255).astype(np.uint8)
    rgba[edge, 3] = 230
    size = (nx * cell, ny * cell)
    plane = pv.Plane(center=(lo[0] + size[0] / 2, lo[1] + size[1] / 2, 0.035), direction=(0, 0, 1),
                     i_size=size[0], j_size=size[1], i_resolution=1, j_resolution=1)
    return plane, rgba
