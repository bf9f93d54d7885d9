"""Elastic hoist rope: stiffness of the reeving, unstretched length, tension.

Notes
-----
A rope of metallic area :math:`A = f \\pi d^2 / 4` (fill factor :math:`f`)
and effective modulus :math:`E`, reeved in :math:`n` falls between the
suspension point and the hook block, with a further lead length
:math:`L_\\text{lead}` (top sheave to drum) that carries the same line pull,
has at the hook the stiffness

.. math:: k = \\frac{n^2 E A}{L_r},\\qquad L_r = n\\,\\lambda + L_\\text{lead},

:math:`\\lambda` the unstretched length of one fall (common practice; the
line pull is :math:`T/n` and the hook moves :math:`1/n` of the rope's
stretch).  Effective moduli of steel wire rope on its metallic area are about
80-100 GPa (fibre core) and 100-110 GPa (steel core), fill factors about
0.58 (from memory; Feyrer, *Wire Ropes*): both are scene parameters.  A
stiffness given directly holds at the initial unstretched length and scales
the same way, :math:`k \\propto 1/L_r`, when hoisting changes the length.

The rope is a tension-only spring with an optional dashpot,

.. math:: T = k (\\ell - \\lambda) + c\\,(\\dot\\ell - \\dot\\lambda),\\qquad
          c = 2 \\zeta_b \\sqrt{k\\,m},

:math:`\\ell` the stretched length (a state of the model), :math:`m` the mass
hanging on the rope and :math:`\\zeta_b` the bounce damping ratio (Thomson &
Dahleh, *Theory of Vibration with Applications*).  The scene's rope length is
the loaded length at rest: :math:`L_0 = \\lambda_0 + W / k(\\lambda_0)`, so
the geometry of a scene does not change when the rope is made elastic.
Hoisting pays out or reels in unstretched rope:
:math:`\\lambda(t) = \\lambda_0 + L(t) - L_0`.  The rope's own mass is
neglected (it is a few percent of the load on crane ropes).
"""

from __future__ import annotations

import math
from dataclasses import dataclass


def reeving_efficiency(sheave_efficiency: float, falls: int) -> float:
    """Overall efficiency of a reeving of ``falls`` parts of line over sheaves of one efficiency.

    The line pull at the drum is the hook load / (falls * eta).  With each sheave passing on
    ``e`` of the pull it receives, the parts of line carry ``1, e, e^2, ... e^(n-1)`` times the
    line pull, so

    .. math:: \\eta = \\frac{1 - e^n}{n (1 - e)}

    (from memory; the usual textbook treatment of hoisting tackle, friction in the sheaves
    only).  ``e`` is about 0.98 for roller-bearing sheaves and about 0.96 for plain bearings
    (from memory); take the crane manufacturer's value.

    Parameters
    ----------
    sheave_efficiency : float
        Efficiency ``e`` of one sheave, 0 < e <= 1 [-].
    falls : int
        Number of parts of line ``n`` carrying the hook block [-].

    Returns
    -------
    float
        The reeving's overall efficiency eta [-] (1 for frictionless sheaves or one fall).
    """
    e, n = float(sheave_efficiency), int(falls)
    if e == 1.0:
        return 1.0
    return (1.0 - e**n) / (n * (1.0 - e))


def metallic_area_m2(diameter_m: float, fill_factor: float) -> float:
    """Metallic cross-section :math:`f \\pi d^2 / 4` of a wire rope (module Notes).

    Parameters
    ----------
    diameter_m : float
        Nominal rope diameter [m].
    fill_factor : float
        Metallic area over the area of the circle [-] (about 0.58).

    Returns
    -------
    float
        Metallic area [m^2].
    """
    return fill_factor * math.pi * diameter_m**2 / 4.0


def reeving_stiffness(modulus_Pa: float, area_m2: float, falls: int, fall_length_m: float,
                      lead_length_m: float = 0.0) -> float:
    """Stiffness at the hook of a reeving, :math:`k = n^2 E A / (n L + L_\\text{lead})`.

    Common practice (module Notes).

    Parameters
    ----------
    modulus_Pa : float
        Effective modulus of the rope on its metallic area [Pa].
    area_m2 : float
        Metallic area [m^2].
    falls : int
        Number of falls between the suspension point and the hook block [-].
    fall_length_m : float
        Unstretched length of one fall [m].
    lead_length_m : float
        Lead from the top sheave to the drum, carrying the same line pull [m].

    Returns
    -------
    float
        Stiffness [N/m].
    """
    return falls**2 * modulus_Pa * area_m2 / (falls * fall_length_m + lead_length_m)


@dataclass(frozen=True)
class ElasticRope:
    """A tension-only elastic reeving: k(lambda) = K / (n lambda + L_lead).

    Attributes
    ----------
    K : float
        n^2 E A [N] (or its equivalent from a given stiffness).
    falls : int
        Number of falls [-].
    lead_length_m : float
        Lead from the top sheave to the drum [m].
    lambda0_m : float
        Unstretched length of one fall at t = 0 [m].
    loaded_length_m : float
        The scene's rope length (loaded, at rest) [m].
    damping_ratio : float
        Bounce damping ratio of the dashpot [-].
    mass_kg : float
        Mass hanging on the rope (for the dashpot) [kg].
    source : str
        How the stiffness was obtained.
    """

    K: float
    falls: int
    lead_length_m: float
    lambda0_m: float
    loaded_length_m: float
    damping_ratio: float
    mass_kg: float
    source: str

    def stiffness(self, lam: float) -> float:
        """Stiffness at the hook for a given unstretched fall length.

        Parameters
        ----------
        lam : float
            Unstretched length of one fall [m].

        Returns
        -------
        float
            Stiffness [N/m].
        """
        return self.K / (self.falls * lam + self.lead_length_m)

    def unstretched(self, L: float) -> float:
        """Unstretched fall length when the hoist motion sets the rope length.

        Parameters
        ----------
        L : float
            Rope length the hoist motion prescribes (loaded length) [m].

        Returns
        -------
        float
            :math:`\\lambda = \\lambda_0 + L - L_0` [m].
        """
        return self.lambda0_m + (L - self.loaded_length_m)

    def _spring(self, L: float) -> tuple[float, float]:
        """Unstretched fall length [m] and stiffness [N/m] at prescribed rope length ``L`` [m]."""
        lam = self.unstretched(L)
        return lam, self.stiffness(lam)

    def tension(self, ell, dell, L, dL):
        """Rope tension of the spring and dashpot, before the tension-only clamp.

        Parameters
        ----------
        ell : float
            Stretched rope length (the model's state) [m].
        dell : float
            Its rate [m/s].
        L : float
            Rope length the hoist motion prescribes [m].
        dL : float
            Its rate [m/s].

        Returns
        -------
        float
            Tension [N]; negative means slack.
        """
        lam, k = self._spring(L)
        c = 2.0 * self.damping_ratio * (k * self.mass_kg) ** 0.5  # floats or arrays (batch engine)
        return k * (ell - lam) + c * (dell - dL)

    def energy(self, ell, L):
        """Strain energy of the stretched rope.

        Parameters
        ----------
        ell, L : float
            Stretched rope length and the length the hoist motion prescribes, as
            for :meth:`tension` [m].

        Returns
        -------
        float
            Energy [J]; zero when slack.
        """
        lam, k = self._spring(L)
        x = ell - lam
        return 0.5 * k * x * x if x > 0 else 0.0


def elastic_rope(rope, weight_N: float, mass_kg: float) -> ElasticRope | None:
    """The elastic reeving of a scene's rope.

    Parameters
    ----------
    rope : Rope
        The scene's ``rope`` table.
    weight_N : float
        Weight the rope carries at rest [N] (sets the unstretched length).
    mass_kg : float
        Mass hanging on the rope [kg] (for the dashpot).

    Returns
    -------
    ElasticRope or None
        None for an inextensible rope.

    Raises
    ------
    ValueError
        When the load would stretch the rope by more than its length.
    """
    if not rope.elastic:
        return None
    n, lead, L0 = rope.falls, rope.lead_length_m, rope.length_m
    if rope.stiffness_kN_per_m is not None:
        k0 = rope.stiffness_kN_per_m * 1e3
        lam0 = L0 - weight_N / k0
        K = k0 * (n * lam0 + lead)
        src = f"given: {rope.stiffness_kN_per_m:g} kN/m at the initial length"
    else:
        A = metallic_area_m2(rope.diameter_m, rope.fill_factor)
        K = n * n * rope.modulus_GPa * 1e9 * A
        # L0 = lam0 + W (n lam0 + lead) / K
        lam0 = (L0 - weight_N * lead / K) / (1.0 + weight_N * n / K)
        src = (f"n^2 E A / L_r (common practice) with E = {rope.modulus_GPa:g} GPa, d = "
               f"{1000 * rope.diameter_m:g} mm, fill factor {rope.fill_factor:g}, {n} fall(s), "
               f"lead {lead:g} m")
    if rope.stiffness_source:
        src += f"; source: {rope.stiffness_source}"
    if lam0 <= 0.0:
        raise ValueError("the rope would stretch more than its length under the load")
    return ElasticRope(K, n, lead, lam0, L0, rope.bounce_damping_ratio, mass_kg, src)
