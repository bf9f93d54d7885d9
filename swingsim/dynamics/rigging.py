"""Rigging geometry and rigid-load inertia: where the load hangs from, and how it turns.

Everything here is in the load's own frame (x, y, z; z up when the load hangs
level), measured from its centre of gravity (CG), in metres.

Notes
-----
Inertia of uniform solids about their CG (any dynamics textbook, e.g. Meriam
& Kraige, *Engineering Mechanics: Dynamics*, table of mass moments):

.. math::
    \\text{box } a \\times b \\times c:\\quad I_{xx} = \\tfrac{m}{12}(b^2 + c^2),\\ \\dots

    \\text{solid cylinder, diameter } D, \\text{ length } \\ell:\\quad
    I_\\text{axis} = \\tfrac{m D^2}{8},\\quad
    I_\\perp = \\tfrac{m}{12}\\left(\\tfrac{3 D^2}{4} + \\ell^2\\right).

Hook point of a bridle (all legs meet at one point, the master link on the
hook).  Two legs of lengths :math:`l_1, l_2` from attachment points
:math:`A_1, A_2` a distance :math:`D` apart meet at

.. math:: H = A_1 + x\\,e + h\\,s,\\quad x = \\frac{l_1^2 - l_2^2 + D^2}{2D},\\quad h = \\sqrt{l_1^2 - x^2},

with :math:`e` along :math:`A_1A_2` and :math:`s` perpendicular to it in the
plane of :math:`A_1, A_2` and the CG, pointing away from the CG: the plane in
which the real two-leg sling hangs, since the load can turn about the line
:math:`A_1A_2` until its CG is under the hook.  Three or more legs: the point
at distance :math:`l_j` from every :math:`A_j` (least squares; the legs must
be consistent within a millimetre, else some would hang slack).

Spreader (lifting beam): the drop legs hang vertically (load axes) from beam
lugs :math:`S_j = A_j + l_j e_z`; the two lugs farthest apart are the beam's
end lugs, and two top slings of equal length run from them to the hook.

Orientation of a rigid load: :math:`R = R_z(c) R_x(\\alpha) R_y(\\beta)`: the
heading :math:`c` about the vertical (yaw), tilt :math:`\\alpha` about the turned
x axis after :math:`\\beta` about the load's y axis.  The chart is regular for
every heading and for tilts below 90 degrees; the hanging rest (CG under the
pivot) has the same tilts at every heading.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: Largest mismatch of bridle leg lengths accepted as one hook point [m].
LEG_LENGTH_TOLERANCE_M = 1e-3
#: Largest tilt of the hanging load at rest the tilt chart is used for [deg].
REST_TILT_LIMIT_DEG = 60.0


class RiggingError(ValueError):
    """The rigging geometry cannot hang: ``key`` names the rigging key to fix."""

    def __init__(self, key: str, problem: str):
        self.key = key
        super().__init__(problem)


def box_inertia(mass_kg: float, size_m) -> np.ndarray:
    """Principal moments of inertia of a uniform box about its centre (module Notes).

    Parameters
    ----------
    mass_kg : float
        Mass of the box, spread evenly through it [kg].
    size_m : sequence of float
        Side lengths along x, y, z [m].

    Returns
    -------
    ndarray
        ``[Ixx, Iyy, Izz]`` [kg m^2].
    """
    a, b, c = (float(s) for s in size_m)
    return mass_kg / 12.0 * np.array([b * b + c * c, a * a + c * c, a * a + b * b])


def cylinder_axis(size_m) -> tuple[int, float, float]:
    """Axis index, diameter and length of the cylinder a ``size_m`` box describes.

    The axis is the side that differs when the other two are equal (a drum
    standing on end as well as a pipe lying down), otherwise the longest side;
    the diameter is the larger of the other two.  One rule for the inertia and
    for the drawing.

    Parameters
    ----------
    size_m : sequence of float
        The bounding box's sides along x, y, z [m].

    Returns
    -------
    tuple
        ``(axis, diameter_m, length_m)``: axis index 0-2, diameter [m], length [m].
    """
    s = [float(v) for v in size_m]
    if s[1] == s[2] and s[0] != s[1]:
        ax = 0
    elif s[0] == s[2] and s[1] != s[0]:
        ax = 1
    elif s[0] == s[1] and s[2] != s[0]:
        ax = 2
    else:
        ax = int(np.argmax(s))
    D = max(v for i, v in enumerate(s) if i != ax)
    return ax, D, s[ax]


def cylinder_inertia(mass_kg: float, size_m) -> np.ndarray:
    """Principal moments of inertia of a uniform solid cylinder about its centre (module Notes).

    Parameters
    ----------
    mass_kg, size_m : float, sequence of float
        As for :func:`box_inertia` [kg, m]; the cylinder's axis, diameter and
        length as :func:`cylinder_axis` reads them from the box.

    Returns
    -------
    ndarray
        ``[Ixx, Iyy, Izz]`` [kg m^2].
    """
    ax, D, ell = cylinder_axis(size_m)
    I = np.full(3, mass_kg / 12.0 * (0.75 * D * D + ell * ell))
    I[ax] = mass_kg * D * D / 8.0
    return I


def load_inertia(load) -> np.ndarray | None:
    """The load's principal moments of inertia about its CG, load axes.

    Parameters
    ----------
    load : Load
        The scene's ``load`` table (``inertia_kg_m2`` wins over ``size_m``).

    Returns
    -------
    ndarray or None
        ``[Ixx, Iyy, Izz]`` [kg m^2]; None for a point mass.
    """
    if load.inertia_kg_m2 is not None:
        return np.array(load.inertia_kg_m2, dtype=float)
    if load.size_m is None:
        return None
    if load.shape == "cylinder":
        return cylinder_inertia(load.mass_kg, load.size_m)
    return box_inertia(load.mass_kg, load.size_m)


def rotation(a: float, b: float) -> np.ndarray:
    """The load's tilts :math:`R_x(a) R_y(b)`, its orientation at heading zero (module Notes).

    Parameters
    ----------
    a : float
        Tilt about the world x axis [rad].
    b : float
        Tilt about the load's y axis [rad].

    Returns
    -------
    ndarray
        Rotation matrix (3, 3), load axes to world axes [-].
    """
    ca, sa, cb, sb = math.cos(a), math.sin(a), math.cos(b), math.sin(b)
    return np.array([[cb, 0.0, sb], [sa * sb, ca, -sa * cb], [-ca * sb, sa, ca * cb]])


def rotation_z(c: float) -> np.ndarray:
    """A turn about the vertical :math:`R_z(c)` (the load's heading; module Notes).

    Parameters
    ----------
    c : float
        The turn, counter-clockwise seen from above [rad].

    Returns
    -------
    ndarray
        Rotation matrix (3, 3) [-].
    """
    cc, sc = math.cos(c), math.sin(c)
    return np.array([[cc, -sc, 0.0], [sc, cc, 0.0], [0.0, 0.0, 1.0]])


def tilt_to_align(c, d, guess=(0.0, 0.0)) -> tuple[float, float]:
    """Tilts (a, b) [rad] with R(a, b) c parallel to the unit vector d (closed form).

    Of the two solutions the one with the smaller tilt is returned.

    Parameters
    ----------
    c : array_like
        A load-axes vector (e.g. from the hook point to the CG) [m].
    d : array_like
        The world direction it must point along [-].
    guess : tuple of float
        Tilts returned when ``c`` is zero [rad].

    Returns
    -------
    tuple of float
        ``(a, b)`` [rad].
    """
    c = np.asarray(c, float)
    d = np.asarray(d, float) / np.linalg.norm(d)
    cn = np.linalg.norm(c)
    if cn == 0.0:
        return guess
    c = c / cn
    # Ry(b) c has x-component d_x (Rx leaves x alone): cx cos b + cz sin b = dx
    rho = math.hypot(c[0], c[2])
    best = None
    if rho < 1e-15:
        cands_b = [0.0]
    else:
        phi = math.atan2(c[2], c[0])
        arg = max(-1.0, min(1.0, d[0] / rho))
        base = math.acos(arg)
        cands_b = [phi + base, phi - base]
    for b in cands_b:
        b = math.remainder(b, 2 * math.pi)
        cb, sb = math.cos(b), math.sin(b)
        y, z = c[1], -c[0] * sb + c[2] * cb  # Ry(b) c (y, z)
        # Rx(a) (y, z) = (y ca - z sa, y sa + z ca) = (dy, dz)
        a = math.atan2(y * d[2] - z * d[1], y * d[1] + z * d[2])
        res = np.linalg.norm(rotation(a, b) @ c - d)
        score = (res > 1e-9, a * a + b * b)
        if best is None or score < best[0]:
            best = (score, (a, b))
    return best[1]


@dataclass(frozen=True)
class Geometry:
    """Rigging of a rigid load, load axes from its CG [m].

    Attributes
    ----------
    kind : str
        ``"single"``, ``"bridle"`` or ``"spreader"``.
    pivot_b : ndarray (3,)
        The load's point pinned to the hook (bridle, spreader) or to the end of
        a single leg.
    attach_b : ndarray (k, 3)
        Attachment points of the legs.
    hook_b : ndarray (3,) or None
        The hook point of a bridle or spreader (= pivot_b).
    lugs_b : ndarray (k, 3) or None
        Spreader: top ends of the drop legs on the beam.
    ends_b : ndarray (2, 3) or None
        Spreader: the beam's end lugs where the top slings attach.
    rest_tilt_rad : (float, float)
        Tilts at which the load hangs at rest (CG under the pivot).
    """

    kind: str
    pivot_b: np.ndarray
    attach_b: np.ndarray
    hook_b: np.ndarray | None
    lugs_b: np.ndarray | None
    ends_b: np.ndarray | None
    rest_tilt_rad: tuple

    @property
    def cg_from_pivot_b(self) -> np.ndarray:
        """The CG seen from the pivot, load axes [m]."""
        return -self.pivot_b


def _two_leg_apex(A1, A2, l1, l2, key="leg_length_m"):
    D = A2 - A1
    dist = float(np.linalg.norm(D))
    if dist < 1e-9:
        raise RiggingError("attach_m", "two attachment points coincide")
    e = D / dist
    if l1 + l2 <= dist * (1 + 1e-12) or abs(l1 - l2) >= dist:
        raise RiggingError(key, f"legs of {l1:g} m and {l2:g} m cannot meet over attachment points "
                           f"{dist:.3f} m apart")
    x = (l1 * l1 - l2 * l2 + dist * dist) / (2 * dist)
    h = math.sqrt(max(l1 * l1 - x * x, 0.0))
    F = A1 + x * e
    toward_cg = -F - np.dot(-F, e) * e
    if np.linalg.norm(toward_cg) < 1e-9 * max(dist, 1.0):
        up = np.array([0.0, 0.0, 1.0])
        s = up - np.dot(up, e) * e
        if np.linalg.norm(s) < 1e-9:
            raise RiggingError("attach_m", "attachment points one above the other on the CG's line: "
                               "the hook point is undefined")
    else:
        s = -toward_cg
    s = s / np.linalg.norm(s)
    return F + h * s


def _apex(A, L, key="leg_length_m"):
    """Point at distance L[j] from every A[j] (above the load)."""
    if len(A) == 2:
        return _two_leg_apex(A[0], A[1], L[0], L[1], key)
    from scipy.optimize import least_squares

    c = A.mean(axis=0)
    x0 = c + np.array([0.0, 0.0, float(np.mean(L))])
    sol = least_squares(lambda H: np.linalg.norm(A - H, axis=1) - L, x0, xtol=1e-14, ftol=1e-14, gtol=1e-14)
    H = sol.x
    mis = np.abs(np.linalg.norm(A - H, axis=1) - L)
    if mis.max() > LEG_LENGTH_TOLERANCE_M:
        j = int(np.argmax(mis))
        raise RiggingError(key, f"the legs cannot all reach one hook point (leg {j} misses by "
                           f"{1000 * mis.max():.0f} mm): some would hang slack; make the lengths "
                           "consistent with the attachment points")
    if H[2] <= c[2]:
        raise RiggingError(key, "the legs cannot meet above the attachment points")
    return H


def rigging_geometry(rig, load, rigid: bool = True) -> Geometry:
    """Geometry of the rigging of a scene (module Notes).

    Parameters
    ----------
    rig : Rigging
        The scene's ``rigging`` table (attachment points and leg lengths [m]).
    load : Load
        The scene's ``load`` table.
    rigid : bool
        Whether the load is modelled as a rigid body (``Scene.rigid_load``).

    Returns
    -------
    Geometry
        Pivot, attachment points, hook point, spreader lugs and rest tilts.

    Raises
    ------
    RiggingError
        When the rigging cannot hang as described.
    """
    A = np.array(rig.attach_m, dtype=float)
    L = np.array(rig.leg_length_m, dtype=float)
    lugs = ends = hook = None
    if rig.kind == "single":
        pivot = A[0].copy()
    elif rig.kind == "bridle":
        hook = _apex(A, L)
        pivot = hook
    else:  # spreader
        lugs = A + L[:, None] * np.array([0.0, 0.0, 1.0])
        dmax, pair = -1.0, (0, 1)
        for i in range(len(lugs)):
            for j in range(i + 1, len(lugs)):
                dd = float(np.linalg.norm(lugs[i] - lugs[j]))
                if dd > dmax:
                    dmax, pair = dd, (i, j)
        ends = lugs[list(pair)]
        axis = (ends[1] - ends[0]) / dmax
        off = lugs - ends[0] - np.outer((lugs - ends[0]) @ axis, axis)
        if np.max(np.linalg.norm(off, axis=1)) > LEG_LENGTH_TOLERANCE_M:
            raise RiggingError("attach_m", "a spreader here is a single lifting beam: the tops of its "
                               "drop legs must lie on one line (a spreader frame is not modelled; use "
                               "a bridle or two beams in separate runs)")
        top = rig.top_leg_length_m
        hook = _two_leg_apex(ends[0], ends[1], top, top, key="top_leg_length_m")
        pivot = hook
    c = -pivot
    if not rigid or np.linalg.norm(c) < 1e-12:
        rest = (0.0, 0.0)
    else:
        rest = tilt_to_align(c, (0.0, 0.0, -1.0))
        tilt = math.degrees(math.acos(max(-1.0, min(1.0, rotation(*rest)[2, 2]))))
        if tilt > REST_TILT_LIMIT_DEG:
            raise RiggingError("attach_m", f"the load would hang tilted {tilt:.0f} deg from level "
                               "(its centre of gravity is far off the line below the hook point, or "
                               f"above it); this model takes at most {REST_TILT_LIMIT_DEG:g} deg: "
                               "rig it so the centre of gravity hangs under the hook")
    geom = Geometry(rig.kind, pivot, A, hook, lugs, ends, rest)
    if rigid and rig.kind != "single":
        T = hanging_shares(geom)
        if np.min(T) < -1e-9:
            j = int(np.argmin(T))
            raise RiggingError("attach_m", f"leg {j + 1} would hang slack (it would have to push) with "
                               "the load at rest: the centre of gravity lies outside the attachment "
                               "points, so the load would hang from the other legs alone and turn; "
                               "rig it with the centre of gravity between the attachment points")
    return geom


def hanging_shares(geom: Geometry) -> np.ndarray:
    """Each leg's tension per unit weight with the load hanging at rest [-] (statics).

    Bridle: the weight resolved along the legs (least squares; minimum norm for four or
    more); spreader drop legs: parallel forces with no moment about the CG (lever rule).

    Parameters
    ----------
    geom : Geometry
        The rigging geometry of a rigid load (bridle or spreader).

    Returns
    -------
    ndarray
        Each leg's tension over the load's weight [-].
    """
    R = rotation(*geom.rest_tilt_rad)
    W = np.array([0.0, 0.0, 1.0])
    if geom.kind == "bridle":
        E = (geom.hook_b - geom.attach_b) @ R.T
        E = E / np.linalg.norm(E, axis=1)[:, None]
        return np.linalg.lstsq(E.T, W, rcond=None)[0]
    dz = R[:, 2]
    arms = geom.attach_b @ R.T
    A = np.vstack([np.ones(len(arms)), np.cross(arms, dz).T])
    rhs = np.array([dz @ W, 0.0, 0.0, 0.0])
    return np.linalg.lstsq(A, rhs, rcond=None)[0]
