"""4x4 homogeneous transforms and 3x3 rotations (numpy) that place the bodies.

Every function takes arrays with any leading shape (one instant, or many
instants at once) and returns matrices with that leading shape:
``(..., 4, 4)`` transforms or ``(..., 3, 3)`` rotations.  A transform maps a
point of a body's own frame to the world: ``world = M @ [x, y, z, 1]``.
"""

from __future__ import annotations

import numpy as np

#: Lengths below this count as zero [m].
TINY_M = 1e-9


def identity(shape=()) -> np.ndarray:
    """Identity transforms.

    Parameters
    ----------
    shape : tuple of int
        Leading shape, e.g. ``(n,)`` for n instants.

    Returns
    -------
    numpy.ndarray
        ``shape + (4, 4)`` identity matrices.
    """
    return np.broadcast_to(np.eye(4), tuple(shape) + (4, 4)).copy()


def translation(offset_m) -> np.ndarray:
    """Transforms that shift by ``offset_m``.

    Parameters
    ----------
    offset_m : array_like, shape (..., 3)
        Translation [m].

    Returns
    -------
    numpy.ndarray
        ``(..., 4, 4)`` transforms.
    """
    offset = np.asarray(offset_m, dtype=float)
    m = identity(offset.shape[:-1])
    m[..., :3, 3] = offset
    return m


def rotation_z(angle_rad) -> np.ndarray:
    """Transforms that turn about the world z axis (anticlockwise seen from above).

    Parameters
    ----------
    angle_rad : array_like
        Turning angle [rad].

    Returns
    -------
    numpy.ndarray
        ``angle.shape + (4, 4)`` transforms.
    """
    angle = np.asarray(angle_rad, dtype=float)
    c, s = np.cos(angle), np.sin(angle)
    m = identity(angle.shape)
    m[..., 0, 0], m[..., 0, 1], m[..., 1, 0], m[..., 1, 1] = c, -s, s, c
    return m


def rigid(rotation, origin_m) -> np.ndarray:
    """Transforms from a rotation and the position of the body's origin.

    Parameters
    ----------
    rotation : array_like, shape (..., 3, 3)
        Rotation of the body's frame; its columns are the body's axes in world coordinates.
    origin_m : array_like, shape (..., 3)
        Where the body's origin is [m].

    Returns
    -------
    numpy.ndarray
        ``(..., 4, 4)`` transforms.
    """
    rotation = np.asarray(rotation, dtype=float)
    origin = np.asarray(origin_m, dtype=float)
    m = identity(np.broadcast_shapes(rotation.shape[:-2], origin.shape[:-1]))
    m[..., :3, :3] = rotation
    m[..., :3, 3] = origin
    return m


def hidden(at_m) -> np.ndarray:
    """Transforms that shrink a body to the point ``at_m``: how a pose says "not shown".

    A scale of zero is how animated scene formats (glTF) hide a node; the
    renderer turns such a body's visibility off.

    Parameters
    ----------
    at_m : array_like, shape (..., 3)
        Where the shrunken body sits [m].

    Returns
    -------
    numpy.ndarray
        ``(..., 4, 4)`` transforms with a zero 3x3 part.
    """
    m = translation(at_m)
    m[..., :3, :3] = 0.0
    return m


def is_shown(transform) -> np.ndarray:
    """Whether transforms show their body (see :func:`hidden`).

    Parameters
    ----------
    transform : array_like, shape (..., 4, 4)
        Body transforms.

    Returns
    -------
    numpy.ndarray of bool
        False where the 3x3 part is all zeros.
    """
    return np.any(np.asarray(transform)[..., :3, :3] != 0.0, axis=(-2, -1))


def _unit(v):
    v = np.asarray(v, dtype=float)
    return v / np.linalg.norm(v, axis=-1, keepdims=True)


def frame_from_axis(direction, axis: int = 2) -> np.ndarray:
    """Rotations taking the local ``axis`` (0 = x, 2 = z) onto ``direction``.

    The smallest rotation from the world axis (Rodrigues' formula), so a body
    hanging on a rope keeps its heading instead of spinning.

    Parameters
    ----------
    direction : array_like, shape (..., 3)
        Target direction (any length but zero).
    axis : int
        The local axis to turn onto it: 0 (x), 1 (y) or 2 (z).

    Returns
    -------
    numpy.ndarray
        ``(..., 3, 3)`` rotations; column ``axis`` of each is the unit ``direction``.

    References
    ----------
    Rodrigues' rotation formula, e.g. R. M. Murray, Z. Li and S. S. Sastry, *A
    Mathematical Introduction to Robotic Manipulation*, CRC Press 1994, eq. 2.14.
    """
    d = _unit(direction)
    a = np.zeros(3)
    a[axis] = 1.0
    v = np.cross(a, d)
    c = d[..., axis]
    opposite = c < -1.0 + 1e-12
    zero = np.zeros_like(c)
    vx = np.stack([np.stack([zero, -v[..., 2], v[..., 1]], -1),
                   np.stack([v[..., 2], zero, -v[..., 0]], -1),
                   np.stack([-v[..., 1], v[..., 0], zero], -1)], -2)
    denominator = np.where(opposite, 1.0, 1.0 + c)[..., None, None]
    r = np.eye(3) + vx + vx @ vx / denominator
    if np.any(opposite):  # half a revolution about a perpendicular axis
        flip = -np.eye(3)
        flip[axis, axis] = -1.0
        flip[(axis + 1) % 3, (axis + 1) % 3] = 1.0
        r[opposite] = flip
    return r


def frame_x_up(x, up) -> np.ndarray:
    """Rotations whose local x runs along ``x`` and whose local z is ``up`` made square to it.

    Gram-Schmidt: z = (up - (up . x) x) / |...|, y = z cross x.  For a body
    (a lifting beam) whose length is ``x`` and that leans with the load's ``up``.

    Parameters
    ----------
    x : array_like, shape (..., 3)
        Direction of the body's length (any length but zero).
    up : array_like, shape (..., 3)
        The direction the body's local z should lean toward.

    Returns
    -------
    numpy.ndarray
        ``(..., 3, 3)`` rotations; columns are the body's local x, y, z in the world.

    References
    ----------
    Gram-Schmidt orthogonalisation, e.g. G. Strang, *Introduction to Linear
    Algebra*, 5th ed., Wellesley-Cambridge Press 2016, section 4.4.
    """
    x = _unit(x)
    up = np.broadcast_to(np.asarray(up, dtype=float), x.shape)
    z = up - np.sum(up * x, axis=-1, keepdims=True) * x
    norm = np.linalg.norm(z, axis=-1)
    along = norm < TINY_M
    if np.any(along):  # up along the body: any square frame will do
        xa = x[along]
        fallback = np.where((np.abs(xa[:, 2]) < 0.9)[:, None], [0.0, 0.0, 1.0], [1.0, 0.0, 0.0])
        fallback = fallback - np.sum(fallback * xa, axis=-1, keepdims=True) * xa
        z = z.copy()
        z[along] = fallback
        norm = np.linalg.norm(z, axis=-1)
    z = z / norm[..., None]
    return np.stack([x, np.cross(z, x), z], axis=-1)


def segment(start_m, end_m, axis: int = 2) -> np.ndarray:
    """Transforms that map a unit-length body along local ``axis`` (0 to 1) onto start -> end.

    The chosen local axis is stretched to the segment's length and turned onto
    it (:func:`frame_from_axis`); a segment of no length shrinks the body to a
    millionth at ``start_m``.

    Parameters
    ----------
    start_m, end_m : array_like, shape (..., 3)
        The segment's ends [m].
    axis : int
        The body's length axis: 0 (x), 1 (y) or 2 (z).

    Returns
    -------
    numpy.ndarray
        ``(..., 4, 4)`` transforms.
    """
    start = np.asarray(start_m, dtype=float)
    d = np.asarray(end_m, dtype=float) - start
    start = np.broadcast_to(start, d.shape)
    length = np.linalg.norm(d, axis=-1)
    short = length < TINY_M
    safe = np.where(short, 1.0, length)
    direction = np.where(short[..., None], np.eye(3)[axis], d / safe[..., None])
    scale = np.ones(d.shape)
    scale[..., axis] = length
    m = rigid(frame_from_axis(direction, axis) * scale[..., None, :], start)  # scale the local axis, then rotate
    m[short, :3, :3] = 1e-6 * np.eye(3)
    return m


def yaw_only(rotation) -> np.ndarray:
    """The turn about z alone of rotations: the heading of their local x seen from above.

    Parameters
    ----------
    rotation : array_like, shape (..., 3, 3)
        Rotations.

    Returns
    -------
    numpy.ndarray
        ``(..., 3, 3)`` rotations about z (none where local x points straight up or down).
    """
    x = np.asarray(rotation, dtype=float)[..., :, 0]
    flat = np.hypot(x[..., 0], x[..., 1])
    heading = np.where(flat > TINY_M, np.arctan2(x[..., 1], x[..., 0]), 0.0)
    return rotation_z(heading)[..., :3, :3]
