"""Forces on a swinging body: gravity, equivalent viscous damping, air drag, wind.

All functions work component-wise on Python floats or on numpy arrays of any
(broadcastable) shape, so that the single-run solver (floats, fast) and the
batch engine (arrays over variants) share one implementation.

Notes
-----
Quadratic drag of a body moving at velocity :math:`v` in a wind :math:`w`:

.. math:: F = -\\tfrac12 \\rho C_d A \\, |v - w| (v - w)

(the drag equation; force coefficients from Hoerner, *Fluid-Dynamic Drag*,
1965).

Equivalent viscous damping of the swing with ratio :math:`\\zeta`: a force
:math:`-2 \\zeta \\omega_0 m \\, v_t` on the velocity :math:`v_t` of the load
relative to the suspension point, with :math:`\\omega_0 = \\sqrt{g / L}`, so
that the linearised swing obeys
:math:`\\ddot\\theta + 2\\zeta\\omega_0\\dot\\theta + \\omega_0^2\\theta = 0`
(Thomson & Dahleh, *Theory of Vibration with Applications*).
"""

from __future__ import annotations


def drag_coefficient_per_mass(air_density, cd, area, mass):
    """Drag coefficient per unit mass :math:`k = \\rho C_d A / (2 m)` (module Notes).

    The drag acceleration of a body moving at ``v_rel`` relative to the air is
    :math:`-k |v_\\text{rel}| v_\\text{rel}`.  Works on floats and arrays alike.

    Parameters
    ----------
    air_density : float or ndarray
        Air density [kg/m^3].
    cd : float or ndarray
        Drag coefficient [-].
    area : float or ndarray
        Area facing the wind [m^2] (or, for a rope, its diameter [m]: drag per unit
        length).
    mass : float or ndarray
        Mass the drag acts on [kg].

    Returns
    -------
    float or ndarray
        :math:`k` [1/m] (per unit length for a rope [1/m^2]).

    References
    ----------
    .. [1] S. F. Hoerner, *Fluid-Dynamic Drag*, 1965 (the drag equation).
    """
    return 0.5 * air_density * cd * area / mass
