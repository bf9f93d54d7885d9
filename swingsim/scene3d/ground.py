"""What lies on the ground: the metre grid, the +x/+y arrows and the swing envelope.

Textures are class images (uint8, row 0 at the low-y edge): the drawing side
gives each class its colour, so the renderer and a file exporter can use their
own palettes.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from swingsim.scene3d.meshes import Mesh, arrow, plane

#: Classes of the ground texture.
GROUND, MINOR_LINE, MAJOR_LINE = 0, 1, 2
#: Classes of the envelope texture.
OUTSIDE, INSIDE, EDGE = 0, 1, 2


class Label(NamedTuple):
    """Text anchored at a point of the scene, facing the camera.

    ``role`` says what it labels, for its style: "grid", "axis_x", "axis_y",
    or a zone's kind ("obstacle", "exclusion").
    """

    position_m: tuple
    text: str
    role: str


class GroundGrid(NamedTuple):
    """The ground rectangle [m] and its grid spacing [m]; the rectangle ends on major lines."""

    x0: float
    x1: float
    y0: float
    y1: float
    minor_m: float
    major_m: float

    @classmethod
    def covering(cls, extent_m) -> GroundGrid:
        """The grid for a ground extent: 1 m lines (5 m past 150 m), major every 10 m (50 m past 300 m).

        Parameters
        ----------
        extent_m : sequence of 4 float
            (xmin, xmax, ymin, ymax) the ground must cover [m].

        Returns
        -------
        GroundGrid
            The extent grown out to whole major squares, and the spacings.
        """
        x0, x1, y0, y1 = extent_m
        span = max(x1 - x0, y1 - y0)
        minor = 1.0 if span <= 150 else 5.0
        major = 10.0 if span <= 300 else 50.0
        return cls(math.floor(x0 / major) * major, math.ceil(x1 / major) * major,
                   math.floor(y0 / major) * major, math.ceil(y1 / major) * major, minor, major)


def ground_mesh(grid: GroundGrid, z_m: float = 0.0) -> Mesh:
    """The ground rectangle at height ``z_m``, textured by :func:`ground_texture`.

    Parameters
    ----------
    grid : GroundGrid
        The ground's extent.
    z_m : float
        Its height: ``[ground] z_m`` when the scene has one [m].

    Returns
    -------
    Mesh
        A rectangle with texture coordinates.
    """
    return plane(grid.x0, grid.x1, grid.y0, grid.y1, float(z_m))


def ground_texture(grid: GroundGrid) -> np.ndarray:
    """The metre grid drawn into a class image: GROUND, MINOR_LINE or MAJOR_LINE per pixel.

    One textured rectangle draws faster than hundreds of grid lines in software
    OpenGL.  Major lines are three pixels wide, minor lines one.

    Parameters
    ----------
    grid : GroundGrid
        The ground's extent and spacing.

    Returns
    -------
    numpy.ndarray
        (rows, columns) uint8, at 2 to 8 pixels a minor square; row 0 at the low-y edge.
    """
    w, h = grid.x1 - grid.x0, grid.y1 - grid.y0
    ppm = max(2, min(8, int(4096 / max(w, h) * grid.minor_m)))  # pixels a minor square
    nx, ny = int(round(w / grid.minor_m)) * ppm, int(round(h / grid.minor_m)) * ppm
    img = np.full((ny, nx), GROUND, dtype=np.uint8)
    k = int(round(grid.major_m / grid.minor_m))
    for axis, n in ((1, nx), (0, ny)):
        idx = np.arange(n)
        on_minor = idx % ppm == 0
        on_major = (idx % (ppm * k) == 0) | (idx % (ppm * k) == 1) | (idx % (ppm * k) == ppm * k - 1)
        img[(slice(None), on_minor) if axis == 1 else (on_minor, slice(None))] = MINOR_LINE
        img[(slice(None), on_major) if axis == 1 else (on_major, slice(None))] = MAJOR_LINE
    return img


def grid_labels(grid: GroundGrid, z_m: float = 0.0) -> list:
    """Labels of the major lines along the low-x and low-y edges: at most about five an edge.

    Parameters
    ----------
    grid : GroundGrid
        The ground's extent and its major spacing (the lines labelled).
    z_m : float
        The ground's height [m].

    Returns
    -------
    list of Label
        "x 10 m" ... along the low-y edge, "y 10 m" ... along the low-x edge.
    """
    span = max(grid.x1 - grid.x0, grid.y1 - grid.y0)
    xs = np.arange(grid.x0, grid.x1 + 1e-6, grid.major_m)
    ys = np.arange(grid.y0 + grid.major_m, grid.y1 + 1e-6, grid.major_m)
    labels = [Label((x, grid.y0 - 0.02 * span, z_m + 0.05), f"x {x:g} m", "grid")
              for x in xs[::max(1, int(np.ceil(len(xs) / 5)))]]
    labels += [Label((grid.x0 - 0.02 * span, y, z_m + 0.05), f"y {y:g} m", "grid")
               for y in ys[::max(1, int(np.ceil(len(ys) / 5)))]]
    return labels


def axis_arrows(origin_xy, length_m: float, z_m: float = 0.0) -> tuple:
    """Arrows along +x and +y on the ground at ``origin_xy``, and their labels.

    Parameters
    ----------
    origin_xy : sequence of 2 float
        Where the arrows start [m].
    length_m : float
        Arrow length [m].
    z_m : float
        The ground's height [m].

    Returns
    -------
    tuple
        ``(x_arrow, y_arrow, labels)``: two meshes and two :class:`Label`.
    """
    o = np.array([origin_xy[0], origin_xy[1], z_m + 0.1])
    ax = arrow(o, (1.0, 0.0, 0.0), length_m)
    ay = arrow(o, (0.0, 1.0, 0.0), length_m)
    labels = [Label(tuple(o + (1.15 * length_m, 0, 0)), "+x", "axis_x"),
              Label(tuple(o + (0, 1.15 * length_m, 0)), "+y", "axis_y")]
    return ax, ay, labels


def envelope(points_m, half_xy_m, z_m: float = 0.0) -> tuple:
    """Plan-view swing envelope: the ground the load passes over, as a class image [m].

    A ground cell is INSIDE when it lies under the load's upright footprint
    (half sizes ``half_xy_m`` along x and y) at some instant of its plan path:
    the union of the footprints, as the summary's zone clearances count the
    load.  The region's rim, two cells wide, is EDGE.

    Parameters
    ----------
    points_m : array_like, shape (n, 3) or (n, 2)
        The load's path [m] (z ignored).
    half_xy_m : sequence of 2 float
        Half the load's footprint along x and y [m] (at least 5 cm).
    z_m : float
        The ground's height [m].

    Returns
    -------
    tuple
        ``(mesh, classes)``: a rectangle 3.5 cm above the ground with
        texture coordinates, and its (rows, columns) uint8 class image (row 0
        at the low-y edge).

    References
    ----------
    The footprint test is a nearest-neighbour query in the Chebyshev (max) norm
    with scipy.spatial.cKDTree (``p=inf``); the rim is the region minus its
    binary erosion (scipy.ndimage.binary_erosion).
    """
    hx, hy = (max(0.05, float(h)) for h in half_xy_m)
    xy = np.asarray(points_m, dtype=float)[:, :2]
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
    grid_x, grid_y = np.meshgrid(gx, gy)  # rows along y
    # footprint test in units of the half sizes: max(|dx|/hx, |dy|/hy) <= 1 (the inf-norm)
    scale = np.array([1.0 / hx, 1.0 / hy])
    from scipy.ndimage import binary_erosion  # lazily: start-up time of every command
    from scipy.spatial import cKDTree

    dist, _ = cKDTree(path * scale).query(np.column_stack([grid_x.ravel(), grid_y.ravel()]) * scale,
                                          distance_upper_bound=1.0 + 1e-9, p=np.inf)
    inside = np.isfinite(dist).reshape(ny, nx)
    classes = np.where(inside, INSIDE, OUTSIDE).astype(np.uint8)
    classes[inside & ~binary_erosion(inside, iterations=2)] = EDGE
    return plane(lo[0], lo[0] + nx * cell, lo[1], lo[1] + ny * cell, z_m + 0.035), classes
