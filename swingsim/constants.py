"""Defaults and thresholds, each with its source or marked as a rule of thumb.

Everything that a scene can override is a default here, never a hard limit.
"""

#: Standard gravity [m/s^2]; exact by definition (3rd CGPM 1901; ISO 80000-3).
STANDARD_GRAVITY = 9.80665

#: The same, named with its unit: the one factor between kilonewtons and tonnes-force
#: (1 t = 9.80665 kN, the weight of 1000 kg under standard gravity).
STANDARD_GRAVITY_M_S2 = STANDARD_GRAVITY


def newton_to_tonnes_force(force_N):
    """A force in tonnes-force, the unit crews speak in (1 t = 9.80665 kN, standard gravity, CGPM 1901).

    Parameters
    ----------
    force_N : float or numpy.ndarray
        Force [N].

    Returns
    -------
    float or ndarray
        The same force [t] (tonnes-force: the weight of that many tonnes under
        :data:`STANDARD_GRAVITY_M_S2`).
    """
    return force_N / (1000.0 * STANDARD_GRAVITY_M_S2)

#: Sea-level air density [kg/m^3] of the ISO 2533:1975 standard atmosphere (15 degC).
AIR_DENSITY_SEA_LEVEL = 1.225

#: Drag coefficient of a bare load when the scene gives none [-]; about that of
#: a cube broadside on (Hoerner, Fluid-Dynamic Drag, 1965; from memory).
LOAD_DRAG_COEFFICIENT = 1.05

#: Drag coefficient of a wire rope across the flow [-]; circular cylinder at
#: subcritical Reynolds number (Hoerner, 1965; from memory).
ROPE_DRAG_COEFFICIENT = 1.2

#: In-service wind limit used for the caution when the crane gives none [m/s].
#: Rule of thumb: many cranes are designed to about 250 Pa in service, i.e.
#: about 20 m/s (from memory).  The crane's manufacturer sets the real limit.
IN_SERVICE_WIND_LIMIT_M_S = 20.0

#: Rope angle from vertical above which a caution is raised [deg].  Rule of
#: thumb: side loading of a jib or boom is usually limited to a few degrees.
SWING_CAUTION_DEG = 5.0

#: Swing below which the load counts as settled for landing [deg] (rule of thumb).
SETTLE_SWING_DEG = 0.5

#: Largest rope angle the point-mass model integrates to [deg].  Beyond it the
#: rope is near horizontal: outside any crane's working range, and the
#: coordinate chart of the model (horizontal components of the rope direction)
#: becomes singular at 90 deg.
MODEL_ANGLE_LIMIT_DEG = 89.0

#: Shortest rope the motion may reach [m].
MIN_ROPE_LENGTH_M = 0.2

#: Integrator settings of the single-run solver (DOP853, scipy).
RTOL = 1e-10
ATOL = 1e-12

#: Default output sample rate [Hz].
SAMPLE_HZ = 50.0

#: Metallic area of a stranded wire rope over the area of its circle [-] (from
#: memory; Feyrer, *Wire Ropes*, typical 0.5-0.65).  Only a default.
ROPE_FILL_FACTOR = 0.58
#: Elastic stretch of a hoist rope under the hanging weight, assumed when a scene with
#: ground contact gives no rope stiffness [-] (our assumption: steel wire rope at its
#: working load stretches elastically by some tenths of a percent, from memory).
ASSUMED_ROPE_STRAIN = 0.004
