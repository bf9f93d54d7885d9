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


def fit(name: str, bounds, aspect: float) -> Camera:
    """Camera of a preset that shows the box ``bounds`` (xmin, xmax, ymin, ymax, zmin, zmax)."""
    b = np.asarray(bounds, dtype=float).reshape(3, 2)
    centre = b.mean(axis=1)
    half = (b[:, 1] - b[:, 0]) / 2
    d, up = (np.asarray(v, dtype=float) for v in DIRECTIONS[name])
    d /= np.linalg.norm(d)
    up = up - (up @ d) * d
    up /= np.linalg.norm(up)
    right = np.cross(d, up)
    # Extent of the box across and up the picture (its 8 corners projected).
    corners = centre + half * np.array([[sx, sy, sz] for sx in (-1, 1) for sy in (-1, 1) for sz in (-1, 1)])
    rel = corners - centre
    w = np.max(np.abs(rel @ right))
    h = np.max(np.abs(rel @ up))
    depth = np.max(np.abs(rel @ d))
    need_h = max(h, w / aspect) * 1.06
    if name == "plan":
        return Camera(tuple(centre + d * (depth + 50.0)), tuple(centre), tuple(up),
                      parallel_scale=float(need_h))
    t = math.tan(math.radians(VIEW_ANGLE_DEG) / 2)
    dist = need_h / t + depth
    return Camera(tuple(centre + d * dist), tuple(centre), tuple(up))


def follow(focus, span: float, aspect: float) -> Camera:
    """Camera of the ``follow`` view: the same direction as ``oblique``, ``span`` metres high in view."""
    d, up = (np.asarray(v, dtype=float) for v in DIRECTIONS["follow"])
    d /= np.linalg.norm(d)
    t = math.tan(math.radians(VIEW_ANGLE_DEG) / 2)
    dist = 0.5 * span / t * 1.1
    f = np.asarray(focus, dtype=float)
    return Camera(tuple(f + d * dist), tuple(f), tuple(up))


def custom(view) -> Camera:
    """Camera of a scene's ``[view]`` table."""
    return Camera(tuple(view.position_m), tuple(view.focus_m), tuple(view.up), view.view_angle_deg)
