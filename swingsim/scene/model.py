"""The lift scene as frozen dataclasses: what a validated scene file holds.

No I/O and no validation here: :mod:`swingsim.scene.read` reads the keys,
:mod:`swingsim.scene.validate` checks them against each other and builds these
objects.  SI units; angles in degrees as in the scene file; every key's meaning
is in :mod:`swingsim.scene.schema` (and ``docs/scene-reference.md``).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import NamedTuple

import numpy as np

from swingsim.motion.limits import RAIL_KINDS, SLEWING_KINDS

__all__ = ["RatedChart", "Crane", "Rope", "Load", "View", "Start", "Hook", "Rigging", "Wind", "Gust", "Limits",
           "MoveTable", "Move", "Zone", "Site", "Scene", "models_rigid_load", "slew_centre"]


class RatedChart(NamedTuple):
    """A rated capacity chart (``crane.chart_file``): capacity against radius.

    The rule: linear interpolation between the listed radii, never
    extrapolated; outside ``[radius_m[0], radius_m[-1]]`` the chart gives no
    capacity.
    """

    #: Radii from the slew axis [m], strictly increasing.
    radius_m: tuple
    #: Rated capacity at each radius [kg], all > 0.
    capacity_kg: tuple

    def capacity_at(self, radius_m):
        """Rated capacity at the given radii, linear between the chart's points.

        Parameters
        ----------
        radius_m : float or array_like
            Horizontal distance(s) from the slew axis [m].

        Returns
        -------
        ndarray
            Capacity [kg] at each radius; NaN outside the chart's radii (never
            extrapolated).
        """
        return np.interp(np.asarray(radius_m, dtype=float), self.radius_m, self.capacity_kg,
                         left=np.nan, right=np.nan)


@dataclass(frozen=True)
class Crane:
    """The crane (``[crane]``): where the rope hangs from, its type, its wind limit, its geometry.

    ``chart`` is the rated capacity chart read from ``chart_file`` (None without one).
    """

    suspension_m: tuple
    kind: str
    wind_limit_m_s: float
    # -- crane geometry per kind (slew axis, radius limits, boom, rails) --
    slew_center_m: tuple = (0.0, 0.0)
    min_radius_m: float | None = None
    max_radius_m: float | None = None
    boom_length_m: float | None = None
    boom_foot_m: tuple | None = None
    level_luffing: bool = False
    rail_span_m: float | None = None
    travel_limits_m: tuple | None = None
    cross_limits_m: tuple | None = None
    # -- rated capacity chart --
    chart_file: str | None = None
    chart_includes: tuple = ("hook", "rigging")
    chart: RatedChart | None = None

    @property
    def slewing(self) -> bool:
        """Whether the crane slews about a slew axis (tower, luffing or mobile)."""
        return self.kind in SLEWING_KINDS

    @property
    def on_rails(self) -> bool:
        """Whether the crane travels on rails (gantry or bridge)."""
        return self.kind in RAIL_KINDS

    @property
    def has_boom(self) -> bool:
        """Whether a radius move luffs a boom (``boom_length_m`` is given)."""
        return self.boom_length_m is not None


@dataclass(frozen=True)
class Rope:
    """The hoist rope (``[rope]``); inextensible unless a stiffness or modulus is given."""

    length_m: float
    diameter_m: float | None
    drag_coefficient: float
    wll_kN: float | None
    stiffness_kN_per_m: float | None = None
    modulus_GPa: float | None = None
    fill_factor: float = 0.58
    falls: int = 1
    lead_length_m: float = 0.0
    bounce_damping_ratio: float = 0.0
    stiffness_source: str = ""
    # -- hook load and line pull --
    reeving_efficiency: float = 1.0
    sheave_efficiency: float | None = None

    @property
    def elastic(self) -> bool:
        """Whether the rope stretches (``stiffness_kN_per_m`` or ``modulus_GPa`` is given)."""
        return self.stiffness_kN_per_m is not None or self.modulus_GPa is not None


@dataclass(frozen=True)
class Load:
    """The suspended load (``[load]``); a point mass unless it has a size or inertia.

    ``mesh_file`` is as written in the scene, relative to :attr:`Scene.base_dir`.
    """

    mass_kg: float
    size_m: tuple | None
    wind_area_m2: float | None
    drag_coefficient: float
    shape: str = "box"
    mesh_file: str | None = None
    inertia_kg_m2: tuple | None = None
    cg_offset_m: tuple = (0.0, 0.0, 0.0)
    wind_center_m: tuple = (0.0, 0.0, 0.0)

    @property
    def rigid(self) -> bool:
        """Whether the load has the data of a rigid body (size or inertia).

        Whether it is *modelled* as one is :attr:`Scene.rigid_load`.
        """
        return self.size_m is not None or self.inertia_kg_m2 is not None


@dataclass(frozen=True)
class View:
    """The scene's custom camera (``[view]``), for drawing only."""

    position_m: tuple
    focus_m: tuple
    up: tuple
    view_angle_deg: float


@dataclass(frozen=True)
class Start:
    """The state at t = 0 (``[start]``): rope angles, their rates, the rope's preload."""

    swing_deg: tuple
    swing_rate_deg_s: tuple
    rope_preload: str = "static"
    rope_slack_m: float = 0.0
    yaw_deg: float = 0.0
    yaw_rate_deg_s: float = 0.0
    on_ground: bool = False
    load_offset_m: tuple = (0.0, 0.0)


@dataclass(frozen=True)
class Hook:
    """The hook block as a body of its own on the hoist rope."""

    mass_kg: float
    size_m: tuple | None
    drag_coefficient: float
    # -- hook load and line pull --
    wll_kN: float | None = None


@dataclass(frozen=True)
class Swivel:
    """How the rigid load turns about the vertical (``[hook] swivel``, ``torsion_stiffness_N_m_per_rad``).

    ``kind`` is ``"free"`` (the heading is a degree of freedom) or ``"locked"`` (held at the
    start heading, or on the reeving's torsion spring when its stiffness is given).
    """

    kind: str = "free"
    torsion_stiffness_N_m_per_rad: float = 0.0


@dataclass(frozen=True)
class Rigging:
    """Slings between the hook and the load (load axes, from the load's centre of gravity).

    ``leg_length_m`` and ``wll_kN`` have one entry per leg (drop legs for a
    spreader); ``attach_m`` one point per leg.
    """

    kind: str
    leg_length_m: tuple
    attach_m: tuple
    wll_kN: tuple | None
    top_leg_length_m: float | None = None
    top_wll_kN: float | None = None

    @property
    def legs(self) -> int:
        """Number of legs (one per attachment point)."""
        return len(self.attach_m)


@dataclass(frozen=True)
class Wind:
    """Steady wind (``[wind]``).

    ``direction_deg`` is always the direction it blows toward, from +x toward +y:
    a wind given by ``from_bearing_deg`` is converted on reading
    (:func:`swingsim.scene.site.wind_toward_deg`).
    """

    speed_m_s: float
    direction_deg: float
    air_density_kg_m3: float
    # -- wind onset --
    onset: str = "steady"
    # -- gusts, turbulence, profile (swingsim/dynamics/wind.py) --
    profile: str = "uniform"
    reference_height_m: float = 10.0
    shear_exponent: float = 1.0 / 7.0
    roughness_length_m: float = 0.05
    turbulence_intensity: float = 0.0
    spectrum: str = "kaimal"
    length_scale_m: float | None = None
    lateral_intensity_ratio: float = 0.8
    seed: int = 0
    realisations: int = 1
    gusts: tuple = ()


@dataclass(frozen=True)
class Gust:
    """One discrete 1 - cosine gust (``[[wind.gusts]]``).

    ``direction_deg`` is where it blows toward, from +x toward +y (converted from
    ``from_bearing_deg`` on reading); None blows with the mean wind.
    """

    start_s: float
    peak_m_s: float
    duration_s: float
    direction_deg: float | None = None


@dataclass(frozen=True)
class Site:
    """The site's bearings (``[site]``): where north is in the scene's axes."""

    #: Direction of site north, from +x toward +y [deg].
    north_deg: float = 90.0


@dataclass(frozen=True)
class Limits:
    """Thresholds of the cautions and of settling (``[limits]``)."""

    swing_caution_deg: float
    settle_deg: float
    clearance_m: float | None
    # -- rated capacity chart --
    chart_review_pct: float = 75.0
    chart_limit_pct: float = 90.0


class MoveTable(NamedTuple):
    """A recorded move (profile ``table``): times from the move's start and displacements."""

    #: Times from the move's start [s], strictly increasing from 0.
    times_s: tuple
    #: Displacement from the move's start at each time [m], or [deg] for slew.
    positions: tuple


@dataclass(frozen=True)
class Move:
    """One move of one axis, in the scene's own units ([m], or [deg] for slew).

    ``distance``, ``speed``, ``accel``, ``decel`` and ``jerk`` come from the
    axis's own keys (``distance_m`` or ``angle_deg`` and so on); ``table`` is set
    for profile ``table`` only; ``profile_keys`` holds the keys only this move's
    profile takes (``ProfileSpec.keys``, e.g. ``shaper_period_s``).
    """

    index: int
    axis: str
    profile: str
    start_s: float
    label: str
    distance: float | None = None
    speed: float | None = None
    accel: float | None = None
    decel: float | None = None
    jerk: float | None = None
    table: MoveTable | None = None
    profile_keys: dict = field(default_factory=dict)

    @property
    def name(self) -> str:
        """The move's label, or ``move <index> (<axis>)`` when it has none."""
        return self.label or f"move {self.index} ({self.axis})"


@dataclass(frozen=True)
class Zone:
    """An obstacle or exclusion zone (``[[zones]]``): a box and the margin around it."""

    name: str
    kind: str
    min_m: tuple
    max_m: tuple
    margin_m: float


@dataclass(frozen=True)
class TagLine:
    """A tag line (``[[tag_lines]]``): from a point on the load to where a person holds it."""

    attach_m: tuple
    anchor_m: tuple
    length_m: float
    max_pull_N: float
    stiffness_N_per_m: float
    damping_N_s_per_m: float
    label: str = ""

    def name(self, index: int) -> str:
        """The line's label, or ``tag line <index + 1>``.

        Parameters
        ----------
        index : int
            The line's place in ``[[tag_lines]]``, from 0.

        Returns
        -------
        str
            What the summary, plots and video call it.
        """
        return self.label or f"tag line {index + 1}"


@dataclass(frozen=True)
class Ground:
    """The surface the load starts on or lands on (``[ground]``); stiffness None: from the settlement."""

    z_m: float
    friction_coefficient: float
    stiffness_kN_per_m: float | None
    settlement_m: float
    damping_ratio: float
    slip_speed_m_s: float


@dataclass(frozen=True, eq=False)
class Scene:
    """A validated lift scene (SI units; angles in degrees as in the file).

    ``raw`` is the scene document as read (a deep copy), ``file`` the file name as
    the user gave it and ``base_dir`` the folder that relative paths in it
    (tables, meshes) are relative to.
    """

    title: str
    duration_s: float
    gravity_m_s2: float
    crane: Crane
    rope: Rope
    load: Load
    start: Start
    moves: tuple
    damping_ratio: float
    wind: Wind
    sample_hz: float
    limits: Limits
    zones: tuple
    notes: str = ""
    view: View | None = None
    file: str = "<scene>"
    base_dir: Path = field(default_factory=Path)
    raw: dict = field(default_factory=dict)
    hook: Hook | None = None
    rigging: Rigging | None = None
    site: Site = field(default_factory=Site)
    swivel: Swivel = field(default_factory=Swivel)
    tag_lines: tuple = ()
    ground: Ground | None = None

    @property
    def rigid_load(self) -> bool:
        """The load is modelled as a rigid body: ``load.inertia_kg_m2`` is given, or
        ``load.size_m`` together with a ``[hook]`` or ``[rigging]`` table.

        A ``size_m`` alone (no hook block, no rigging) keeps the core's meaning:
        the size of a point-mass load for drawing and clearance.
        """
        return models_rigid_load(self.load, self.hook is not None, self.rigging is not None)

    @property
    def name(self) -> str:
        """The scene file's name without its suffix (``scene`` when built in code)."""
        return Path(self.file).stem if self.file != "<scene>" else "scene"


def models_rigid_load(load: Load, has_hook: bool, has_rigging: bool) -> bool:
    """Whether a load is modelled as a rigid body rather than a point mass.

    Parameters
    ----------
    load : Load
        The scene's load.
    has_hook : bool
        Whether the scene has a ``[hook]`` table (a hook block of its own).
    has_rigging : bool
        Whether the scene has a ``[rigging]`` table.

    Returns
    -------
    bool
        True when ``load.inertia_kg_m2`` is given, or ``load.size_m`` together
        with a hook block or rigging.
    """
    return load.inertia_kg_m2 is not None or (load.size_m is not None and (has_hook or has_rigging))


def slew_centre(scene) -> np.ndarray:
    """Where the slew axis stands in plan: the centre that radii are measured from.

    Parameters
    ----------
    scene : Scene
        The validated scene.

    Returns
    -------
    ndarray (2,)
        [x, y] of the slew axis [m] (``crane.slew_center_m``), about which slewing turns.
    """
    return np.asarray(scene.crane.slew_center_m, dtype=float)
