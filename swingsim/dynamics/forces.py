"""Forces on a swinging body: gravity, equivalent viscous damping, air drag, wind.

All functions work component-wise on Python floats or on numpy arrays of any
(broadcastable) shape, so that the single-run solver (floats, fast) and the
batch engine (arrays over variants) share one implementation.

Notes
-----
Quadratic drag of a body moving at velocity :math:`v` in a wind :math:`w`:

.. math:: F = -\\tfrac12 \\rho C_d A \\, |v - w| (v - w)

(the drag equation; force coefficients from Hoerner, *Fluid-Dynamic Drag*,
1965).  A steady wind alone gives the dynamic pressure
:math:`q = \\rho w^2 / 2` and, on a hanging load, the offset angle
:math:`\\arctan(q C_d A / (m g))`.

Equivalent viscous damping of the swing with ratio :math:`\\zeta`: a force
:math:`-2 \\zeta \\omega_0 m \\, v_t` on the velocity :math:`v_t` of the load
relative to the suspension point, with :math:`\\omega_0 = \\sqrt{g / L}`, so
that the linearised swing obeys
:math:`\\ddot\\theta + 2\\zeta\\omega_0\\dot\\theta + \\omega_0^2\\theta = 0`
(Thomson & Dahleh, *Theory of Vibration with Applications*).
"""

from __future__ import annotations


def drag_coefficient_per_mass(air_density, cd, area, mass):
    """k = rho Cd A / (2 m) [1/m]: drag acceleration is -k |v_rel| v_rel."""
    return 0.5 * air_density * cd * area / mass


def quadratic_drag(k, rx, ry, rz):
    """Drag acceleration components for relative-air velocity (rx, ry, rz) [m/s^2]."""
    sp = (rx * rx + ry * ry + rz * rz) ** 0.5
    return -k * sp * rx, -k * sp * ry, -k * sp * rz


def steady_wind_offset_rad(air_density, speed, cd, area, mass, g):
    """Rope angle from vertical of a load held in a steady wind [rad] (quasi-static)."""
    import math

    q = 0.5 * air_density * speed**2
    return math.atan2(q * cd * area, mass * g)
