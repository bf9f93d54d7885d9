"""Camera presets: where the camera stands and looks, for each named view.

Pure numpy.  Preset views fit the scene's bounding box; ``follow`` keeps the
hoist rope in view as the crane moves; ``custom`` is the scene's ``[view]``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

PRESETS = ("side", "end", "plan", "oblique", "follow")
VIEWS = PRESETS + ("custom",)

#: Direction from the focus to the camera, and the up vector, of the fitted presets.
DIRECTIONS = {
    "side": ((0.0, -1.0, 0.12), (0.0, 0.0, 1.0)),
    "end": ((1.0, 0.0, 0.12), (0.0, 0.0, 1.0)),
    "plan": ((0.0, 0.0, 1.0), (0.0, 1.0, 0.0)),
    "oblique": ((0.62, -1.0, 0.58), (0.0, 0.0, 1.0)),
    "follow": ((0.62, -1.0, 0.45), (0.0, 0.0, 1.0)),
}
#: Vertical field of view of the presets [deg].
VIEW_ANGLE_DEG = 30.0


@dataclass(frozen=True)
class Camera:
    position: tuple
    focus: tuple
    up: tuple
    view_angle_deg: float = VIEW_ANGLE_DEG
    parallel_scale: float | None = None  # orthographic when set: half the visible height [m]


def fit(name: str, points, aspect: float, margin: float = 0.92) -> Camera:
    """Camera of a preset that shows all ``points``, as large as they fit.

    The camera looks along the preset's direction; its distance (or, for the
    orthographic plan view, its scale) is the smallest at which every point
    projects inside ``margin`` of the picture's half-width and half-height,
    found by bisection on the perspective projection itself, then the aim is
    re-centred on the points' picture and fitted again.

    Parameters
    ----------
    name : str
        A preset of :data:`DIRECTIONS`.
    points : array_like, shape (n, 3)
        Points that must be in view [m].
    aspect : float
        Picture width over height [-].
    margin : float
        Share of the half-width and half-height the points may fill [-].

    Returns
    -------
    Camera
        Position, focus and up; a parallel scale for the plan view.
    """
    pts = np.asarray(points, dtype=float).reshape(-1, 3)
    d, up = (np.asarray(v, dtype=float) for v in DIRECTIONS[name])
    d /= np.linalg.norm(d)
    up = up - (up @ d) * d
    up /= np.linalg.norm(up)
    right = np.cross(-d, up)
    focus = 0.5 * (pts.min(axis=0) + pts.max(axis=0))
    if name == "plan":
        for _ in range(2):
            rel = pts - focus
            x, y = rel @ right, rel @ up
            focus = focus + right * 0.5 * (x.max() + x.min()) + up * 0.5 * (y.max() + y.min())
        rel = pts - focus
        half_h = max(np.max(np.abs(rel @ up)), np.max(np.abs(rel @ right)) / aspect) / margin
        depth = np.max(np.abs(rel @ d))
        return Camera(tuple(focus + d * (depth + 50.0)), tuple(focus), tuple(up),
                      parallel_scale=float(max(half_h, 1.0)))
    t = math.tan(math.radians(VIEW_ANGLE_DEG) / 2)

    def worst(focus, dist):
        eye = focus + d * dist
        rel = pts - eye
        depth = rel @ -d
        if np.any(depth <= 0.5):
            return np.inf, 0.0, 0.0
        x = (rel @ right) / (depth * t * aspect)
        y = (rel @ up) / (depth * t)
        return max(np.max(np.abs(x)), np.max(np.abs(y))), 0.5 * (x.max() + x.min()), 0.5 * (y.max() + y.min())

    def fit_dist(focus):
        lo, hi = 1.0, 1.0
        while worst(focus, hi)[0] > margin:
            hi *= 2.0
        for _ in range(40):
            mid = 0.5 * (lo + hi)
            if worst(focus, mid)[0] > margin:
                lo = mid
            else:
                hi = mid
        return hi

    dist = fit_dist(focus)
    for _ in range(3):  # aim at the middle of the points' picture
        _, cx, cy = worst(focus, dist)
        focus = focus + (right * cx * aspect + up * cy) * t * dist
        dist = fit_dist(focus)
    return Camera(tuple(focus + d * dist), tuple(focus), tuple(up))


def follow_span(longest_rope_m: float, load_size_m) -> float:
    """The width of ground the follow view keeps in frame: the rope's swing room and the load [m].

    Parameters
    ----------
    longest_rope_m : float
        The longest rope length of the run [m].
    load_size_m : sequence of 3 float
        The load's size [m].

    Returns
    -------
    float
        ``0.35 L + 2.5 * largest load side + 3`` [m] (a framing rule of our own).
    """
    return 0.35 * float(longest_rope_m) + 2.5 * max(load_size_m) + 3.0


def follow(focus, span: float, aspect: float) -> Camera:
    """Camera of the ``follow`` view: the same direction as ``oblique``, ``span`` metres high in view.

    Parameters
    ----------
    focus : sequence of 3 float
        The point looked at [m].
    span : float
        Height of the scene shown at the focus [m].
    aspect : float
        Picture width over height [-] (unused: the height sets the distance).

    Returns
    -------
    Camera
        The camera.
    """
    d, up = (np.asarray(v, dtype=float) for v in DIRECTIONS["follow"])
    d /= np.linalg.norm(d)
    t = math.tan(math.radians(VIEW_ANGLE_DEG) / 2)
    dist = 0.5 * span / t * 1.1
    f = np.asarray(focus, dtype=float)
    return Camera(tuple(f + d * dist), tuple(f), tuple(up))


def custom(view) -> Camera:
    """Camera of a scene's ``[view]`` table.

    Parameters
    ----------
    view : swingsim.scene.View
        Position, focus, up [m] and vertical field of view [deg].

    Returns
    -------
    Camera
        The camera.
    """
    return Camera(tuple(view.position_m), tuple(view.focus_m), tuple(view.up), view.view_angle_deg)
