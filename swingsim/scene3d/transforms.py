"""4x4 homogeneous transforms (numpy) that move the drawn bodies each frame."""

from __future__ import annotations

import math

import numpy as np


def translate(x, y, z) -> np.ndarray:
    m = np.eye(4)
    m[:3, 3] = (x, y, z)
    return m


def rot_z(phi: float) -> np.ndarray:
    c, s = math.cos(phi), math.sin(phi)
    m = np.eye(4)
    m[0, 0], m[0, 1], m[1, 0], m[1, 1] = c, -s, s, c
    return m


def frame_from_axis(d: np.ndarray, axis: int = 2) -> np.ndarray:
    """Rotation (3x3) taking the local ``axis`` (0 = x, 2 = z) onto the unit vector ``d``.

    Uses the smallest rotation from the world axis (Rodrigues' formula), so a body
    hanging on a rope keeps its heading instead of spinning.
    """
    d = np.asarray(d, dtype=float)
    d = d / np.linalg.norm(d)
    a = np.zeros(3)
    a[axis] = 1.0
    v = np.cross(a, d)
    c = float(a @ d)
    if c < -1.0 + 1e-12:  # opposite: turn half a revolution about a perpendicular axis
        r = -np.eye(3)
        r[axis, axis] = -1.0
        r[(axis + 1) % 3, (axis + 1) % 3] = 1.0
        return r
    vx = np.array([[0.0, -v[2], v[1]], [v[2], 0.0, -v[0]], [-v[1], v[0], 0.0]])
    return np.eye(3) + vx + vx @ vx / (1.0 + c)


def frame_x_up(x, up) -> np.ndarray:
    """Rotation (3x3) whose local x runs along ``x`` and whose local z is ``up`` made square to it.

    Gram-Schmidt: z = (up - (up . x) x) / |...|, y = z cross x.  For a body
    (a lifting beam) whose length is ``x`` and that leans with the load's ``up``.
    """
    x = np.asarray(x, dtype=float)
    x = x / np.linalg.norm(x)
    z = np.asarray(up, dtype=float) - float(np.dot(up, x)) * x
    n = float(np.linalg.norm(z))
    if n < 1e-9:  # up along the body: any square frame will do
        z = np.array([0.0, 0.0, 1.0]) if abs(x[2]) < 0.9 else np.array([1.0, 0.0, 0.0])
        z = z - float(z @ x) * x
        n = float(np.linalg.norm(z))
    z = z / n
    return np.column_stack([x, np.cross(z, x), z])


def segment(a, b, axis: int = 2) -> np.ndarray:
    """Transform that maps a unit-length body along local ``axis`` (from 0 to 1) onto a -> b."""
    a = np.asarray(a, dtype=float)
    d = np.asarray(b, dtype=float) - a
    length = float(np.linalg.norm(d))
    m = np.eye(4)
    if length < 1e-9:
        m[:3, :3] *= 1e-6
        m[:3, 3] = a
        return m
    r = frame_from_axis(d / length, axis)
    s = np.ones(3)
    s[axis] = length
    m[:3, :3] = r * s  # scale the chosen local axis, then rotate
    m[:3, 3] = a
    return m


def pose(r: np.ndarray, origin) -> np.ndarray:
    m = np.eye(4)
    m[:3, :3] = r
    m[:3, 3] = origin
    return m
