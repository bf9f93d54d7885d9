"""Point-mass load on an inextensible rope of varying length from a moving support.

State ``y = (u, v, du, dv)``: the horizontal components of the unit rope
direction :math:`n = (u, v, -w)`, :math:`w = \\sqrt{1 - u^2 - v^2}` (pointing
from the suspension point down to the load), and their rates.  The chart is
regular at the vertical (u = v = 0) -- no gimbal singularity at rest -- and
covers every rope angle below 90 degrees.

Notes
-----
With load position :math:`r = p(t) + L(t)\\,n`, the Newton equation
:math:`m\\ddot r = m f - T n` (``f``: gravity, damping, drag and wind per unit
mass; ``T``: rope tension) is projected on the tangent plane with
:math:`J = \\partial n / \\partial (u, v)`, which removes ``T``:

.. math::
    L\\, J^T J\\, \\ddot q = J^T\\left(f - \\ddot p - 2\\dot L J\\dot q - L h\\right),
    \\qquad h = (0, 0, \\frac{\\dot u^2 + \\dot v^2}{w} + \\frac{(u\\dot u + v\\dot v)^2}{w^3}),

and :math:`(J^T J)^{-1} = I - q q^T` (Sherman-Morrison, since
:math:`w^2 + |q|^2 = 1`).  Along the rope,

.. math:: T = m\\left[n\\cdot(f - \\ddot p) - \\ddot L + L|\\dot n|^2\\right].

Both follow from Lagrange's equations of the constrained point mass in an
inertial frame (e.g. Goldstein, *Classical Mechanics*, ch. 1-2), so slewing's
centripetal and Coriolis effects come in through :math:`\\ddot p` by
themselves.  The equations are checked in the tests against an independent
sympy derivation and against the published results listed there.

References
----------
.. [1] H. Goldstein, C. Poole and J. Safko, *Classical Mechanics*, 3rd ed.,
   Addison-Wesley, 2002, ch. 1-2 (Lagrange's equations with constraints).
"""

from __future__ import annotations

import math

import numpy as np

from swingsim import constants
from swingsim.dynamics.base import ModelDefaults, SwingModel
from swingsim.dynamics.forces import drag_coefficient_per_mass
from swingsim.dynamics.wind import wind_field


def _zero(x) -> bool:
    """True for a scalar (not an array) equal to zero."""
    return isinstance(x, (int, float)) and x == 0.0


def specific_force(u, v, w, du, dv, L, dL, vpx, vpy, vpz, par, slew_rate=0.0, wind=None):
    r"""Applied force per unit mass on the load, gravity included.

    Every argument may be a float or a numpy array (broadcastable): the single run
    passes floats, the batch engine arrays over variants.

    Parameters
    ----------
    u, v : float or ndarray
        Horizontal components of the unit rope direction [-].
    w : float or ndarray
        Its downward component, :math:`\sqrt{1 - u^2 - v^2}` [-].
    du, dv : float or ndarray
        Rates of ``u`` and ``v`` [1/s].
    L, dL : float or ndarray
        Rope length and its rate [m, m/s].
    vpx, vpy, vpz : float or ndarray
        Velocity of the suspension point [m/s].
    par : dict
        The model's parameters (:func:`model_params`): ``g`` gravity [m/s^2],
        ``zeta`` swing damping ratio [-], ``kd`` load drag and ``kr`` rope drag per
        unit length per unit mass [1/m, 1/m^2], ``wx``, ``wy`` wind velocity [m/s].
    slew_rate : float or ndarray
        The jib's rotation rate [rad/s]: the equivalent viscous damping acts on the
        swing relative to the crane (sheave and rope friction turn with the jib),
        i.e. on :math:`L(\dot n - \Omega \hat z \times n)`, so that steady
        slewing has the undamped steady angle.
    wind : tuple, optional
        ``(wx, wy, rope_factor)``: the wind velocity at the load [m/s] and the wind at
        the rope's mid-height over the wind at the load [-], from the run's
        :class:`~swingsim.dynamics.wind.WindField` (:func:`wind_terms`); the steady
        ``par["wx"]``, ``par["wy"]`` at every height when None.

    Returns
    -------
    tuple
        ``(fx, fy, fz)`` [m/s^2]: gravity, damping, load drag and half the rope's
        drag (module Notes of :mod:`swingsim.dynamics.forces`).
    """
    s1 = u * du + v * dv
    ndz = s1 / w
    g = par["g"]
    # A term whose coefficient is a plain scalar zero (not an array) is skipped:
    # it would add exactly zero.  The batch engine passes scalar zeros for a
    # whole chunk without damping, drag or wind.
    zeta = par["zeta"]
    if _zero(zeta):
        zero = 0.0 * ndz
        fx, fy, fz = zero, zero, zero - g
    else:
        c = 2.0 * zeta * (g / L) ** 0.5 * L
        fx = -c * (du + slew_rate * v)
        fy = -c * (dv - slew_rate * u)
        fz = -g - c * ndz
    kd = par["kd"]
    kr = par["kr"]
    if _zero(kd) and _zero(kr):
        return fx, fy, fz
    if wind is None:
        wx, wy = par["wx"], par["wy"]
        rwx, rwy = wx, wy
    else:
        wx, wy, rf = wind
        rwx, rwy = wx * rf, wy * rf
    # velocity of the load
    rvx = vpx + dL * u + L * du
    rvy = vpy + dL * v + L * dv
    rvz = vpz - dL * w + L * ndz
    ax_ = rvx - wx
    ay_ = rvy - wy
    sp = (ax_ * ax_ + ay_ * ay_ + rvz * rvz) ** 0.5
    fx = fx - kd * sp * ax_
    fy = fy - kd * sp * ay_
    fz = fz - kd * sp * rvz
    # rope: drag of the cross-flow at the rope's mid-point velocity; half the
    # total acts at the load (the distributed force's moment about the top).
    mx = 0.5 * (vpx + rvx) - rwx
    my = 0.5 * (vpy + rvy) - rwy
    mz = 0.5 * (vpz + rvz)
    along = mx * u + my * v - mz * w
    nx_ = mx - along * u
    ny_ = my - along * v
    nz_ = mz + along * w
    spn = (nx_ * nx_ + ny_ * ny_ + nz_ * nz_) ** 0.5
    kr_L = 0.5 * kr * L * spn
    fx = fx - kr_L * nx_
    fy = fy - kr_L * ny_
    fz = fz - kr_L * nz_
    return fx, fy, fz


def accelerations(u, v, du, dv, L, dL, apx, apy, apz, fx, fy, fz):
    """Second derivatives of the rope direction chart (module Notes).

    Parameters
    ----------
    u, v : float or ndarray
        Horizontal components of the unit rope direction [-].
    du, dv : float or ndarray
        Their rates [1/s].
    L, dL : float or ndarray
        Rope length and its rate [m, m/s].
    apx, apy, apz : float or ndarray
        Acceleration of the suspension point [m/s^2].
    fx, fy, fz : float or ndarray
        Applied force per unit mass on the load (:func:`specific_force`) [m/s^2].

    Returns
    -------
    tuple
        ``(ddu, ddv)`` [1/s^2].
    """
    w = (1.0 - u * u - v * v) ** 0.5
    s1 = u * du + v * dv
    hz = (du * du + dv * dv) / w + s1 * s1 / (w * w * w)
    x0 = fx - apx - 2.0 * dL * du
    x1 = fy - apy - 2.0 * dL * dv
    x2 = fz - apz - 2.0 * dL * s1 / w - L * hz
    g0 = x0 + u / w * x2
    g1 = x1 + v / w * x2
    k = u * g0 + v * g1
    return (g0 - u * k) / L, (g1 - v * k) / L


def tension_per_mass(u, v, du, dv, L, ddL, apx, apy, apz, fx, fy, fz):
    """Rope tension divided by the load's mass (module Notes).

    Parameters
    ----------
    u, v, du, dv, L : float or ndarray
        Rope direction chart, its rates and the rope length, as for
        :func:`accelerations` [-, 1/s, m].
    ddL : float or ndarray
        Second derivative of the rope length [m/s^2].
    apx, apy, apz, fx, fy, fz : float or ndarray
        Acceleration of the suspension point and applied force per unit mass on
        the load, as for :func:`accelerations` [m/s^2].

    Returns
    -------
    float or ndarray
        Tension per unit mass [m/s^2]; zero or below means the rope goes slack.
    """
    w = (1.0 - u * u - v * v) ** 0.5
    s1 = u * du + v * dv
    nd2 = du * du + dv * dv + (s1 / w) ** 2
    return u * (fx - apx) + v * (fy - apy) - w * (fz - apz) - ddL + L * nd2


def direction_from_projected(ax_rad, ay_rad, rx=0.0, ry=0.0):
    """Chart state from the rope's projected angles and their rates.

    Parameters
    ----------
    ax_rad, ay_rad : float
        Rope angle from vertical projected on the x-z and on the y-z plane [rad].
    rx, ry : float
        Their rates [rad/s].

    Returns
    -------
    tuple
        ``(u, v, du, dv)``: horizontal components of the unit rope direction [-] and
        their rates [1/s].
    """
    tx, ty = math.tan(ax_rad), math.tan(ay_rad)
    N = math.sqrt(1.0 + tx * tx + ty * ty)
    dtx = rx / math.cos(ax_rad) ** 2
    dty = ry / math.cos(ay_rad) ** 2
    dN = (tx * dtx + ty * dty) / N
    u, v = tx / N, ty / N
    du = dtx / N - tx * dN / N**2
    dv = dty / N - ty * dN / N**2
    return u, v, du, dv


def projected_angles(direction) -> tuple[float, float]:
    """Projected angles of a rope direction: the inverse of :func:`direction_from_projected`.

    Parameters
    ----------
    direction : array_like
        Unit vector (3,) down the rope [-].

    Returns
    -------
    tuple of float
        Angle from vertical projected on the x-z plane and on the y-z plane [rad].
    """
    ux, uy, uz = (float(c) for c in direction)
    return math.atan2(ux, -uz), math.atan2(uy, -uz)


def wind_terms(field, t, pz, L, w):
    """The wind the point-mass equations take at one instant: the one place they read a wind field.

    Parameters
    ----------
    field : WindField or BatchWind
        The run's wind (:mod:`swingsim.dynamics.wind`); a :class:`BatchWind` takes arrays.
    t : float or ndarray
        Time [s].
    pz : float or ndarray
        Height of the suspension point above the ground [m].
    L : float or ndarray
        Rope length [m].
    w : float or ndarray
        Downward component of the unit rope direction [-].

    Returns
    -------
    tuple
        ``(wx, wy, rope_factor)``: wind velocity at the load [m/s] and the wind at the
        rope's mid-height over the wind at the load [-] (the ``wind`` argument of
        :func:`specific_force`).
    """
    return field.terms(t, pz - L * w, pz - 0.5 * L * w)


def starts_in_steady_wind(scene) -> bool:
    """Whether a run starts hanging at rest in the steady wind (``wind.onset = "steady"``).

    Parameters
    ----------
    scene : Scene
        A validated scene.

    Returns
    -------
    bool
        True when there is wind and its onset is ``"steady"``; False in still air or with
        ``onset = "step"`` (the run starts plumb and the wind arrives at t = 0).
    """
    return scene.wind.speed_m_s > 0.0 and scene.wind.onset == "steady"


def model_params(scene) -> dict:
    r"""Physical parameters of the point-mass model as plain floats.

    Parameters
    ----------
    scene : Scene
        A validated scene (its gravity, damping ratio, load, rope and wind).

    Returns
    -------
    dict
        ``g`` gravity [m/s^2], ``zeta`` swing damping ratio [-], ``kd`` load drag
        :math:`\rho C_d A / (2 m)` [1/m], ``kr`` rope drag per unit length
        :math:`\rho C_d d / (2 m)` [1/m^2], ``wx``, ``wy`` wind velocity [m/s],
        ``m`` load mass [kg].
    """
    load, wind = scene.load, scene.wind
    kd = 0.0
    if load.wind_area_m2:
        kd = drag_coefficient_per_mass(wind.air_density_kg_m3, load.drag_coefficient,
                                       load.wind_area_m2, load.mass_kg)
    kr = 0.0
    if scene.rope.diameter_m:
        kr = drag_coefficient_per_mass(wind.air_density_kg_m3, scene.rope.drag_coefficient,
                                       scene.rope.diameter_m, load.mass_kg)
    d = math.radians(wind.direction_deg)
    return {"g": scene.gravity_m_s2, "zeta": scene.damping_ratio, "kd": kd, "kr": kr,
            "wx": wind.speed_m_s * math.cos(d), "wy": wind.speed_m_s * math.sin(d),
            "m": load.mass_kg}


class PointMassModel(ModelDefaults, SwingModel):
    """The load as a point mass at the end of the hoist rope (no hook block).

    Implements :class:`swingsim.dynamics.base.SwingModel` (whose members document
    the methods); the equations are in the module Notes.

    Parameters
    ----------
    scene : Scene
        A validated scene.

    Notes
    -----
    What this model adds to the protocol:

    - the state is ``(u, v, du, dv)`` [-, -, 1/s, 1/s], at t = 0 from
      ``start.swing_deg`` and ``start.swing_rate_deg_s``;
    - with ``wind.onset = "steady"`` (the default) the rope starts along its rest
      direction in the steady wind (:func:`rest_direction` at the rope length of
      t = 0), ``start.swing_deg`` added to its projected angles; with ``"step"`` it
      starts from the vertical and the wind arrives at t = 0;
    - one swing period, the textbook pendulum's :math:`2\\pi\\sqrt{L / g}`;
    - events ``slack`` (rope tension reaches zero) and ``overswing`` (the rope
      reaches the model's angle limit);
    - at rest the rope leans with the steady wind (:func:`rest_direction`);
    - the outputs' ``hook`` is None.
    """

    name = "point-mass"
    state_names = ("u", "v", "du", "dv")

    def __init__(self, scene):
        self.scene = scene
        self.par = model_params(scene)
        #: the wind when it changes in time or with height (None: steady and uniform, par's wx, wy)
        self.wind = wind_field(scene)
        if self.wind is not None:
            self.extra_breakpoints = self.wind.breakpoints
            self.max_step_s = self.wind.max_step_s
        #: height of the suspension point at t = 0 [m] (set by initial_state; for the rest lean)
        self._suspension_height_m = None
        self.angle_limit_rad = math.radians(constants.MODEL_ANGLE_LIMIT_DEG)
        self._wlim = math.cos(self.angle_limit_rad)

    # -- set-up --------------------------------------------------------------
    def initial_state(self, motion) -> np.ndarray:
        sw = self.scene.start
        lean = (0.0, 0.0)
        e0 = motion.evaluate(np.array([0.0]))
        self._suspension_height_m = float(e0["p"][0][2])
        if starts_in_steady_wind(self.scene):
            L0 = float(e0["L"][0])
            lean = projected_angles(self.rest_direction(L0))
        return np.array(direction_from_projected(
            lean[0] + math.radians(sw.swing_deg[0]), lean[1] + math.radians(sw.swing_deg[1]),
            math.radians(sw.swing_rate_deg_s[0]), math.radians(sw.swing_rate_deg_s[1])))

    def mode_periods_s(self, rope_length_m: float | None = None) -> list[float]:
        L = self.scene.rope.length_m if rope_length_m is None else rope_length_m
        return [2.0 * math.pi * math.sqrt(L / self.par["g"])]

    # -- the equations -------------------------------------------------------

    def make_rhs(self, kin):
        par = self.par
        sf, acc = specific_force, accelerations
        field = self.wind

        def rhs(t, y):
            u, v, du, dv = y
            px, py, pz, vx, vy, vz, ax, ay, az, L, dL, ddL, om = kin(t)
            w = (1.0 - u * u - v * v) ** 0.5
            wind = None if field is None else wind_terms(field, t, pz, L, w)
            fx, fy, fz = sf(u, v, w, du, dv, L, dL, vx, vy, vz, par, om, wind)
            ddu, ddv = acc(u, v, du, dv, L, dL, ax, ay, az, fx, fy, fz)
            return [du, dv, ddu, ddv]

        return rhs

    def make_events(self, kin):
        par = self.par
        wlim = self._wlim
        field = self.wind

        def slack(t, y):
            u, v, du, dv = y
            px, py, pz, vx, vy, vz, ax, ay, az, L, dL, ddL, om = kin(t)
            w = max(1.0 - u * u - v * v, 1e-300) ** 0.5
            wind = None if field is None else wind_terms(field, t, pz, L, w)
            fx, fy, fz = specific_force(u, v, w, du, dv, L, dL, vx, vy, vz, par, om, wind)
            return tension_per_mass(u, v, du, dv, L, ddL, ax, ay, az, fx, fy, fz)

        slack.terminal = True
        slack.direction = -1

        def overswing(t, y):
            u, v = y[0], y[1]
            return max(1.0 - u * u - v * v, 0.0) ** 0.5 - wlim

        overswing.terminal = True
        overswing.direction = -1
        return {"slack": slack, "overswing": overswing}

    def rest_direction(self, rope_length_m: float) -> np.ndarray:
        z0 = self._suspension_height_m
        if self.wind is None or not self.wind.sheared or z0 is None:
            return rest_direction(self.par, rope_length_m)
        # the mean wind at the load's and the rope's heights as they hang, leaning, below the
        # start's suspension point (the heights depend on the lean: a few passes settle it)
        f, L = self.wind, rope_length_m
        n = np.array([0.0, 0.0, -1.0])
        for _ in range(8):
            z_load, z_mid = z0 + L * n[2], z0 + 0.5 * L * n[2]
            wx, wy = f.mean_velocity_at(z_load)
            new = rest_direction(self.par, L, wind=(wx, wy, float(f.profile_factor(z_mid) / f.profile_factor(z_load))))
            if np.max(np.abs(new - n)) < 1e-15:
                return new
            n = new
        return n

    # -- outputs ---------------------------------------------------------------
    def outputs(self, t, Y, motion) -> dict:
        e = motion.evaluate(t)
        u, v, du, dv = Y[:, 0], Y[:, 1], Y[:, 2], Y[:, 3]
        w = np.sqrt(np.clip(1.0 - u * u - v * v, 0.0, None))
        p, dp, ddp = e["p"], e["dp"], e["ddp"]
        L, dL, ddL = e["L"], e["dL"], e["ddL"]
        n = np.stack([u, v, -w], axis=-1)
        nd = np.stack([du, dv, (u * du + v * dv) / w], axis=-1)
        load = p + L[:, None] * n
        load_vel = dp + dL[:, None] * n + L[:, None] * nd
        wind = None if self.wind is None else self.wind_at_load(t, p, L, w)
        fx, fy, fz = specific_force(u, v, w, du, dv, L, dL, dp[:, 0], dp[:, 1], dp[:, 2], self.par,
                                    e["slew_rate"], wind)
        tpm = tension_per_mass(u, v, du, dv, L, ddL, ddp[:, 0], ddp[:, 1], ddp[:, 2], fx, fy, fz)
        m, g = self.par["m"], self.par["g"]
        energy = 0.5 * m * np.sum(load_vel**2, axis=1) + m * g * load[:, 2]
        wind_xy = self._wind_columns(t, load[:, 2], wind)
        return {
            "suspension": p, "suspension_vel": dp, "rope_length": L, "wind_at_load": wind_xy,
            "load": load, "load_vel": load_vel, "hook": None,
            "rope_dir": n, "rope_tension_N": m * tpm, "energy_J": energy,
            "static_rope_load_N": m * g,
        }


    def wind_at_load(self, t, p, L, w) -> tuple:
        """The wind terms of :func:`specific_force` at many samples (arrays).

        Parameters
        ----------
        t : ndarray
            Times (N,) [s].
        p : ndarray
            Suspension points (N, 3) [m].
        L : ndarray
            Rope lengths (N,) [m].
        w : ndarray
            Downward components of the rope direction (N,) [-].

        Returns
        -------
        tuple of ndarray
            ``(wx, wy, rope_factor)`` [m/s, m/s, -].
        """
        z_load, z_mid = p[:, 2] - L * w, p[:, 2] - 0.5 * L * w
        v = self.wind.velocities(t, z_load)
        rf = self.wind.profile_factor(z_mid) / self.wind.profile_factor(z_load)
        return v[:, 0], v[:, 1], rf

    def _wind_columns(self, t, z_load, wind) -> np.ndarray:
        """Wind velocity at the load (N, 2) [m/s], for the outputs."""
        if wind is not None:
            return np.stack([wind[0], wind[1]], axis=-1)
        return np.tile([self.par["wx"], self.par["wy"]], (len(t), 1))


def rest_direction(par: dict, L: float, iterations: int = 60, wind=None) -> np.ndarray:
    """Unit rope direction of the load hanging at rest in the steady wind.

    At rest relative to a still suspension point the rope lies along the
    applied force per unit mass (tension balances it); the rope's own drag
    depends on its direction, so a fixed-point iteration is used (it contracts
    quickly because the wind force is small against gravity).

    Parameters
    ----------
    par : dict
        The model's parameters (:func:`model_params`).
    L : float
        Rope length [m].
    iterations : int
        Most fixed-point iterations.
    wind : tuple, optional
        The mean wind as :func:`specific_force` takes it (``(wx, wy, rope_factor)`` [m/s, m/s, -]);
        ``par``'s steady wind when None.

    Returns
    -------
    ndarray
        Unit vector (3,) down the rope [-].
    """
    u = v = 0.0
    for _ in range(iterations):
        w = max(1.0 - u * u - v * v, 1e-12) ** 0.5
        fx, fy, fz = specific_force(u, v, w, 0.0, 0.0, L, 0.0, 0.0, 0.0, 0.0, par, 0.0, wind)
        n = math.sqrt(fx * fx + fy * fy + fz * fz)
        u_new, v_new = fx / n, fy / n
        if abs(u_new - u) + abs(v_new - v) < 1e-15:
            u, v = u_new, v_new
            break
        u, v = u_new, v_new
    w = max(1.0 - u * u - v * v, 0.0) ** 0.5
    return np.array([u, v, -w])
