"""Frequency response of the swing to the suspension point's acceleration.

From a model's linearised equations about hanging rest
(:class:`~swingsim.dynamics.base.LinearSwing`),

.. math:: M \\ddot q + C \\dot q + K q = F a_p(t),

a harmonic acceleration :math:`a_p = A\\, e\\, \\cos\\omega t` along a horizontal unit
vector :math:`e` gives the steady state :math:`q = \\mathrm{Re}(X e^{i\\omega t})` with
the complex receptance

.. math:: X / A = (K - \\omega^2 M + i\\omega C)^{-1} F e

(e.g. W. T. Thomson and M. D. Dahleh, *Theory of Vibration with Applications*,
5th ed., 1998, ch. 3 and 6).  A body's direction is a pair of coordinates
(projected angles); its swing amplitude is the largest angle over the cycle, the
semi-major axis of the ellipse :math:`\\mathrm{Re}(z e^{i\\omega t})`,
:math:`\\sqrt{(|z|^2 + |z^T z|) / 2}` for the complex pair :math:`z`.  For the
point mass in its plane of travel this is the support-excited oscillator,
:math:`(1/g) / \\sqrt{(1 - r^2)^2 + (2\\zeta r)^2}` rad per m/s^2.

Each mode's numbers come from its own single-degree-of-freedom equation in modal
coordinates (mass-normalised shapes :math:`\\phi` of :math:`K\\phi = \\omega_n^2 M \\phi`,
classical modal damping ratio :math:`\\zeta = \\phi^T C \\phi / (2\\omega_n)`, exact when
the damping is proportional to the mass, as for a point load; L. Meirovitch,
*Fundamentals of Vibrations*, 2001, ch. 7):

peak amplification
    The peak of the steady response over the static one,
    :math:`1 / (2\\zeta\\sqrt{1 - \\zeta^2})` (at :math:`r^2 = 1 - 2\\zeta^2`; no peak
    for :math:`\\zeta \\ge 1/\\sqrt 2`).
half-power band
    The forcing frequencies where the response is the peak over :math:`\\sqrt 2`,
    :math:`r^2 = 1 - 2\\zeta^2 \\pm 2\\zeta\\sqrt{1 - \\zeta^2}`; as periods, and as the
    fraction :math:`(\\omega_2 - \\omega_1) / \\omega_n` (about :math:`2\\zeta`).

numpy and scipy only.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

#: Points of the log-spaced period grid over its whole span.
GRID_POINTS = 400
#: Points of the dense grid around each mode (even: the period itself is added apart).
MODE_GRID_POINTS = 240
#: The grid spans from this fraction of the shortest mode period ...
GRID_SHORTEST = 0.2
#: ... to this multiple of the longest [-].
GRID_LONGEST = 5.0


@dataclass(frozen=True)
class SwingMode:
    """One swing mode's numbers (module docstring).

    Attributes
    ----------
    period_s : float
        Undamped natural period [s].
    damping_ratio : float
        Modal damping ratio [-].
    peak_amplification : float or None
        Peak steady response over the static one [-]; None without damping (unbounded).
    half_power_periods_s : tuple
        ``(shorter, longer)`` forcing periods where the response is the peak over
        :math:`\\sqrt 2` [s]; an entry is None where it does not exist.
    half_power_fraction : float or None
        :math:`(\\omega_2 - \\omega_1) / \\omega_n` [-]; None where the band is open.
    shape : ndarray
        Mass-normalised mode shape over the swing coordinates [chart units].
    degenerate : bool
        A pair of equal modes (the same swing in both horizontal directions), listed once.
    """

    period_s: float
    damping_ratio: float
    peak_amplification: float | None
    half_power_periods_s: tuple
    half_power_fraction: float | None
    shape: np.ndarray
    degenerate: bool


def modal_resonance(omega_n: float, zeta: float) -> tuple:
    """Peak amplification and half-power band of a damped single-degree-of-freedom oscillator.

    Parameters
    ----------
    omega_n : float
        Undamped natural circular frequency [rad/s].
    zeta : float
        Damping ratio [-].

    Returns
    -------
    tuple
        ``(peak_amplification, (shorter_period_s, longer_period_s), fraction)``
        (module docstring): amplification None without damping, a period None and the
        fraction None where the half-power band is open on that side.
    """
    T = 2.0 * math.pi / omega_n
    if zeta <= 0.0:
        return None, (T, T), 0.0
    amp = 1.0 / (2.0 * zeta * math.sqrt(1.0 - zeta * zeta)) if zeta < math.sqrt(0.5) else 1.0
    if zeta >= 1.0:
        return amp, (None, None), None
    root = 2.0 * zeta * math.sqrt(1.0 - zeta * zeta)
    hi2, lo2 = 1.0 - 2.0 * zeta * zeta + root, 1.0 - 2.0 * zeta * zeta - root
    shorter = T / math.sqrt(hi2)
    if lo2 <= 0.0:
        return amp, (shorter, None), None
    return amp, (shorter, T / math.sqrt(lo2)), math.sqrt(hi2) - math.sqrt(lo2)


def swing_modes(lin) -> list:
    """The swing modes of linearised equations, longest period first, a degenerate pair once.

    Parameters
    ----------
    lin : LinearSwing
        The model's linearised swing (:meth:`SwingModel.linear_swing`).

    Returns
    -------
    list of SwingMode
        One per distinct natural frequency.
    """
    from scipy.linalg import eigh

    omega_sq, shapes = eigh(lin.stiffness, lin.mass)
    out = []
    i = 0
    while i < len(omega_sq):
        w2 = float(omega_sq[i])
        pair = i + 1 < len(omega_sq) and abs(float(omega_sq[i + 1]) - w2) <= 1e-9 * abs(w2)
        if w2 > 0.0:
            wn = math.sqrt(w2)
            phi = shapes[:, i]
            zeta = max(float(phi @ lin.damping @ phi) / (2.0 * wn), 0.0)
            amp, band, frac = modal_resonance(wn, zeta)
            out.append(SwingMode(2.0 * math.pi / wn, zeta, amp, band, frac, phi.copy(), pair))
        i += 2 if pair else 1
    return out


def period_grid(periods_s, half_power_fractions=()) -> np.ndarray:
    """Forcing periods for the response curves: log-spaced, dense around each mode.

    Parameters
    ----------
    periods_s : sequence of float
        The modes' natural periods [s].
    half_power_fractions : sequence of float or None
        Each mode's half-power fraction [-]: the dense grid spans at least eight half
        bands so the peak and its half-power points are resolved.  A mode's own period
        is on the grid unless its fraction is 0 (no damping: the response is infinite
        there).

    Returns
    -------
    ndarray
        Ascending periods [s].
    """
    periods = [float(p) for p in periods_s]
    grid = [np.geomspace(GRID_SHORTEST * min(periods), GRID_LONGEST * max(periods), GRID_POINTS)]
    fracs = list(half_power_fractions) + [None] * (len(periods) - len(half_power_fractions))
    for T, f in zip(periods, fracs):
        half = max(0.25, 4.0 * (f or 0.0))
        # denser at the centre: a tanh-stretched grid in log period
        s = np.tanh(np.linspace(-2.5, 2.5, MODE_GRID_POINTS)) / math.tanh(2.5)
        grid.append(T * np.exp(s * math.log1p(half)))
        if f != 0.0:
            grid.append(np.array([T]))
    return np.unique(np.concatenate(grid))


def receptance(lin, periods_s, direction) -> np.ndarray:
    """Complex steady-state amplitude of every swing coordinate per unit support acceleration.

    Parameters
    ----------
    lin : LinearSwing
        The linearised swing.
    periods_s : array_like
        Forcing periods (k,) [s].
    direction : array_like
        Unit vector (3,) of the suspension point's acceleration [-].

    Returns
    -------
    ndarray
        Complex amplitudes (k, n) [chart units per m/s^2].
    """
    omega = 2.0 * math.pi / np.asarray(periods_s, float)
    force = lin.base_influence @ np.asarray(direction, float)
    dyn = (lin.stiffness[None] - omega[:, None, None] ** 2 * lin.mass[None]
           + 1j * omega[:, None, None] * lin.damping[None])
    rhs = np.broadcast_to(force.astype(complex), (len(omega), len(force)))[..., None]
    return np.linalg.solve(dyn, rhs)[..., 0]


def largest_over_cycle(z) -> np.ndarray:
    """Largest magnitude over a cycle of ``Re(z e^{i w t})`` for complex vectors ``z``.

    Parameters
    ----------
    z : ndarray
        Complex amplitudes (k, d) [any unit].

    Returns
    -------
    ndarray
        The ellipse's semi-major axis (k,) [same unit].
    """
    z = np.asarray(z)
    a = np.sum(np.abs(z) ** 2, axis=-1)
    b = np.abs(np.sum(z * z, axis=-1))
    return np.sqrt(0.5 * (a + b))


def response_columns(lin, periods_s, directions: dict) -> dict:
    """The response curves: every body's swing per unit support acceleration, per direction.

    Parameters
    ----------
    lin : LinearSwing
        The linearised swing.
    periods_s : array_like
        Forcing periods [s].
    directions : dict
        Name -> unit vector (3,) of the support's acceleration (``"x"``, ``"y"``, ...).

    Returns
    -------
    dict
        ``(body, direction) -> ndarray``: for each angle pair of ``lin.angles`` the
        largest angle over the cycle [deg per m/s^2]; for each point of ``lin.points``
        the largest horizontal offset from the suspension point over the cycle
        [m per m/s^2].
    """
    out = {}
    for dname, e in directions.items():
        X = receptance(lin, periods_s, e)
        for body, (i, j) in lin.angles.items():
            out[(body, dname)] = np.degrees(largest_over_cycle(X[:, [i, j]]))
        for body, J in lin.points.items():
            out[(body, dname)] = largest_over_cycle(X @ J[:2].T)
    return out
