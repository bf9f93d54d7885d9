"""Forces at points of the load: tag lines and contact with the ground.

Both act at points fixed on the load (:class:`~swingsim.dynamics.hook_load.LoadFrame`),
and :func:`~swingsim.dynamics.hook_load.equations_of_motion` takes them through its
``point_forces`` function, on one state (floats) or on many (arrays) alike.

Tag line
--------
A tension-only line from a point on the load to where a person holds it (the
anchor, fixed in the site).  It is slack while the distance ``d`` between the two
is at most the line's length ``l``; beyond, a spring and a dashpot in parallel,

.. math:: T = \\max\\bigl(0,\\; k (d - l) + c\\, \\dot d\\bigr), \\qquad d > l,

the force pulling the load toward the anchor.  ``k`` stands for the line's stretch
and the give of the person's arms and stance together, ``c`` for the person damping
the pull; their defaults (:data:`TAG_LINE_STIFFNESS_N_PER_M`,
:data:`TAG_LINE_DAMPING_N_S_PER_M`: a hold that gives about 0.15 m under 250 N) are our
choice, not measured values.  A person
can hold about 250 N on a tag line for a short time (common practice, from memory:
site guidance puts a steady pull of one person at 200-300 N); beyond ``max_pull_N``
the person must let go, and the model (which keeps holding) no longer says what
happens.

Ground contact
--------------
The ground is the plane ``z = z_g``.  A point of the load below it presses into a
compliant support (timber dunnage, mats, the soil) with a spring and a dashpot
(the Kelvin-Voigt contact law of penalty methods in multibody dynamics, e.g.
Gilardi and Sharf, "Literature survey of contact dynamics modelling", Mechanism and
Machine Theory 37, 2002):

.. math:: N = \\max\\bigl(0,\\; k_c \\delta - c_c \\dot z\\bigr), \\qquad \\delta = z_g - z > 0,

and friction opposes the point's sliding velocity :math:`v_t` (horizontal) with
Coulomb's law regularised at a small slip speed :math:`v_s` (the smoothed Coulomb
friction of the same survey):

.. math:: F_t = -\\mu N \\frac{v_t}{\\sqrt{|v_t|^2 + v_s^2}}.

At sliding speeds well above :math:`v_s` this is Coulomb's :math:`\\mu N` against the
motion; below it the friction grows in proportion to the speed, so a load pulled
sideways by less than :math:`\\mu N` creeps at about
:math:`v_s\\, p / \\sqrt{1 - p^2}` (``p`` the pull over :math:`\\mu N`) instead of
sticking: with the default :math:`v_s` of 2 mm/s, 1.2 mm/s at half the friction
limit.  The contact stiffness is shared by the load's contact points; its default
lets the load settle :data:`GROUND_SETTLEMENT_M` into the support under its own
weight, the damping is a fraction of the critical damping of the load's mass on
that stiffness: both are our choice, not measured values; give the site's own where
they matter (a soft support makes a landing last longer and bounce less).
"""

from __future__ import annotations

import math

import numpy as np

#: Default stiffness of a tag line with the person holding it [N/m] (our choice).
TAG_LINE_STIFFNESS_N_PER_M = 1500.0
#: Default damping of a tag line with the person holding it [N s/m] (our choice).
TAG_LINE_DAMPING_N_S_PER_M = 400.0
#: What one person can hold on a tag line [N] (common practice, from memory: 200-300 N).
TAG_LINE_MAX_PULL_N = 250.0
#: Default settlement of the load into its support under its own weight [m] (our choice).
GROUND_SETTLEMENT_M = 0.005
#: Default damping ratio of the load on the contact's stiffness [-] (our choice).
GROUND_DAMPING_RATIO = 0.5
#: Default slip speed that regularises Coulomb friction [m/s] (our choice).
GROUND_SLIP_SPEED_M_S = 0.002
#: Default friction coefficient between the load and its support [-] (from memory: steel
#: on dry timber about 0.4-0.6, concrete on timber about 0.6; take the site's value).
GROUND_FRICTION_COEFFICIENT = 0.5


def _positive(x):
    return np.maximum(x, 0.0) if isinstance(x, np.ndarray) else (x if x > 0.0 else 0.0)


def _sqrt(x):
    return np.sqrt(x) if isinstance(x, np.ndarray) else math.sqrt(x)


def tag_line_force(attach, attach_vel, anchor, length_m, stiffness_N_per_m, damping_N_s_per_m):
    """The pull of one tag line on the load (module Notes), one state or many.

    Parameters
    ----------
    attach, attach_vel : sequence of 3
        Position [m] and velocity [m/s] of the attachment point, site axes (floats or arrays).
    anchor : sequence of 3
        Where the person holds the line, site axes [m].
    length_m : float
        Length of the line between the two; slack at or below it [m].
    stiffness_N_per_m, damping_N_s_per_m : float
        The line and the person holding it: spring [N/m] and dashpot [N s/m].

    Returns
    -------
    tuple
        ``(force, tension)``: the force on the load, world axes [N] (3-tuple), and the
        line's tension [N] (zero while slack).
    """
    dx, dy, dz = anchor[0] - attach[0], anchor[1] - attach[1], anchor[2] - attach[2]
    d = _sqrt(dx * dx + dy * dy + dz * dz)
    dsafe = d + 1e-12
    ex, ey, ez = dx / dsafe, dy / dsafe, dz / dsafe
    # the distance's rate: the attachment moving away from the anchor lengthens it
    ddot = -(attach_vel[0] * ex + attach_vel[1] * ey + attach_vel[2] * ez)
    stretch = d - length_m
    taut = stretch > 0.0
    T = _positive(stiffness_N_per_m * stretch + damping_N_s_per_m * ddot) * taut
    return (T * ex, T * ey, T * ez), T


def ground_force(point, point_vel, z_m, stiffness_N_per_m, damping_N_s_per_m, friction_coefficient,
                 slip_speed_m_s):
    """The ground's push and friction on one point of the load (module Notes), one state or many.

    Parameters
    ----------
    point, point_vel : sequence of 3
        Position [m] and velocity [m/s] of the point, site axes (floats or arrays).
    z_m : float
        Height of the ground [m].
    stiffness_N_per_m, damping_N_s_per_m : float
        The support under this point: spring [N/m] and dashpot [N s/m].
    friction_coefficient : float
        Coulomb friction coefficient [-].
    slip_speed_m_s : float
        Slip speed that regularises the friction [m/s].

    Returns
    -------
    tuple
        ``(force, normal)``: the force on the load, world axes [N] (3-tuple), and the
        normal force [N] (zero off the ground).
    """
    depth = z_m - point[2]
    touching = depth > 0.0
    N = _positive(stiffness_N_per_m * depth - damping_N_s_per_m * point_vel[2]) * touching
    vx, vy = point_vel[0], point_vel[1]
    f = friction_coefficient * N / _sqrt(vx * vx + vy * vy + slip_speed_m_s * slip_speed_m_s)
    return (-f * vx, -f * vy, N), N


class PointForces:
    """Tag lines and ground contact of one scene, as the equations of motion take them.

    Parameters
    ----------
    tag_lines : sequence
        The scene's tag lines (``attach_m``, ``anchor_m``, ``length_m``,
        ``stiffness_N_per_m``, ``damping_N_s_per_m``).
    ground : tuple or None
        ``(z_m, stiffness_N_per_m, damping_N_s_per_m, friction_coefficient,
        slip_speed_m_s, points_b)``, the stiffness and damping per contact point,
        ``points_b`` the load's contact points (load axes from the CG) [m]; None
        without ground.

    Attributes
    ----------
    points_b : tuple of tuple
        The load's points, tag line attachments first, then the contact points
        (load axes from the CG) [m]: ``Structure.load_points``.
    n_tag_lines, n_contacts : int
        How many of each.
    """

    def __init__(self, tag_lines, ground):
        self.tag_lines = tuple(tag_lines)
        self.ground = ground
        pts = [tuple(float(x) for x in line.attach_m) for line in self.tag_lines]
        contact_pts = [] if ground is None else [tuple(float(x) for x in p) for p in ground[5]]
        self.n_tag_lines, self.n_contacts = len(pts), len(contact_pts)
        self.points_b = tuple(pts + contact_pts)

    def at(self, support):
        """The ``point_forces`` function of :func:`equations_of_motion` for one suspension point.

        Parameters
        ----------
        support : sequence of 3
            The suspension point, site axes [m] (positions in the equations are relative to it).

        Returns
        -------
        callable
            ``(positions, velocities) -> forces`` (module Notes); its ``clear_of_ground(z)``
            says whether a load whose CG is at height ``z`` relative to the support is
            surely off the ground (then the contact points need not be evaluated, and the
            forces for the points not given are zero).
        """
        return _AtSupport(self, support)

    def split(self, forces):
        """Tag line tensions and the ground's normal force from the forces at the points.

        Parameters
        ----------
        forces : sequence
            The forces at :attr:`points_b` [N] (as the equations return them).

        Returns
        -------
        tuple
            ``(tensions, normal, friction)``: each tag line's tension [N] (list), the sum
            of the ground's normal forces [N] and the magnitude of the sum of its horizontal
            forces [N].
        """
        tensions = [math.sqrt(F[0] ** 2 + F[1] ** 2 + F[2] ** 2) for F in forces[:self.n_tag_lines]]
        ground = forces[self.n_tag_lines:]
        normal = sum(F[2] for F in ground) if ground else 0.0
        fx = sum(F[0] for F in ground) if ground else 0.0
        fy = sum(F[1] for F in ground) if ground else 0.0
        return tensions, normal, math.hypot(fx, fy)


class _AtSupport:
    """:meth:`PointForces.at`: the forces at the load's points with the support at one place."""

    def __init__(self, owner, support):
        self.owner = owner
        self.px, self.py, self.pz = (float(x) for x in support)
        self.n_tag_lines = owner.n_tag_lines
        g = owner.ground
        #: the farthest a contact point lies from the CG [m]
        self._reach = 0.0 if g is None else max(math.sqrt(sum(x * x for x in p)) for p in g[5])
        self._ground_z = None if g is None else g[0]

    def clear_of_ground(self, cg_z) -> bool:
        """Whether every contact point is surely above the ground (no forces there), for a float CG height."""
        return self._ground_z is None or cg_z + self.pz - self._reach > self._ground_z + 1e-9

    def __call__(self, positions, velocities):
        o, px, py, pz = self.owner, self.px, self.py, self.pz
        out = []
        for line, x, v in zip(o.tag_lines, positions, velocities):
            out.append(tag_line_force((x[0] + px, x[1] + py, x[2] + pz), v, line.anchor_m, line.length_m,
                                      line.stiffness_N_per_m, line.damping_N_s_per_m)[0])
        if o.ground is not None:
            z, k, c, mu, vs = o.ground[:5]
            for x, v in zip(positions[o.n_tag_lines:], velocities[o.n_tag_lines:]):
                out.append(ground_force((x[0] + px, x[1] + py, x[2] + pz), v, z, k, c, mu, vs)[0])
        zero = (0.0, 0.0, 0.0)
        out.extend(zero for _ in range(len(o.points_b) - len(out)))  # points left out: clear of the ground
        return out
