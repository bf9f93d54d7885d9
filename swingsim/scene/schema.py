"""The scene-file schema: every key, its type, unit, default, range and meaning.

This table is the single source of truth for validation (``read.py``, ``validate.py``) and for
the key reference in ``docs/scene-reference.md`` (``python -m swingsim.scene.schema``
regenerates it; a test checks that the two agree).  SI units everywhere; each
quantity's unit is in its key name.
"""

from __future__ import annotations

import difflib
import math
import re
from dataclasses import dataclass
from typing import Any

from swingsim import constants
from swingsim.dynamics import contact


@dataclass(frozen=True)
class Key:
    """One scene key.

    kind: ``float``, ``int``, ``str``, ``bool``, ``vec2``, ``vec3``,
    ``floats`` (list of numbers), ``floats_or_float`` (one number or a list),
    ``vec3s`` (list of [x, y, z] points), ``path`` (a file relative to the scene),
    ``strs`` (a list of distinct strings, each one of ``choices``).
    ``gt``/``ge``/``le``/``lt`` bound numbers (and each component of vectors).
    ``synonyms``: trade words for a choice, ``((words, choice, why), ...)``, for the
    did-you-mean of :meth:`did_you_mean` (e.g. ``"trolley"`` for the axis ``"radius"``).
    """

    kind: str
    doc: str
    required: bool = False
    default: Any = None
    gt: float | None = None
    ge: float | None = None
    lt: float | None = None
    le: float | None = None
    choices: tuple | None = None
    synonyms: tuple = ()

    def did_you_mean(self, value) -> str:
        """The hint for a value that is not one of ``choices``: a trade synonym, a spelling, a typo.

        Parameters
        ----------
        value : object
            The value as written in the scene.

        Returns
        -------
        str
            ``" (did you mean 'radius'? <why>)"`` for a trade word of :attr:`synonyms`,
            ``" (did you mean 's-curve'?)"`` for another spelling (case, ``_`` or spaces for
            ``-``) or a near miss (difflib), ``""`` when nothing is near.
        """
        if not self.choices:
            return ""
        text = str(value)
        spelled = _spelling(text)
        if spelled in self.choices:
            return f" (did you mean '{spelled}'?)"
        for words, choice, why in self.synonyms:
            if spelled in words or spelled.replace("-", "") in words:
                return f" (did you mean '{choice}'? {why})"
        near = difflib.get_close_matches(text, self.choices, n=1, cutoff=0.6)
        return f" (did you mean '{near[0]}'?)" if near else ""

    def allowed(self) -> str:
        """Human-readable statement of the allowed values, as errors and the key reference say it.

        Returns
        -------
        str
            E.g. ``a number > 0 (finite)`` or ``one of 'x', 'y'``.
        """
        if self.choices and self.kind == "strs":
            return "a list of distinct names, each one of " + ", ".join(repr(c) for c in self.choices)
        if self.choices:
            return "one of " + ", ".join(repr(c) for c in self.choices)
        what = {
            "float": "a number", "int": "an integer", "str": "a string",
            "bool": "true or false", "vec2": "a list of 2 numbers",
            "vec3": "a list of 3 numbers [x, y, z]", "floats": "a list of numbers",
            "path": "a path to a file (relative to the scene file)",
            "floats_or_float": "a number or a list of numbers",
            "vec3s": "a list of [x, y, z] points",
        }.get(self.kind, "a list of names")
        bounds = []
        if self.gt is not None:
            bounds.append(f"> {self.gt:g}")
        if self.ge is not None:
            bounds.append(f">= {self.ge:g}")
        if self.lt is not None:
            bounds.append(f"< {self.lt:g}")
        if self.le is not None:
            bounds.append(f"<= {self.le:g}")
        if bounds:
            what += " " + " and ".join(bounds)
        if self.kind in ("float", "vec2", "vec3", "floats", "floats_or_float", "vec3s"):
            what += " (finite)"
        return what

    def in_bounds(self, x: float) -> bool:
        """Whether a number is finite and within the key's bounds.

        Parameters
        ----------
        x : float
            The value (or one component of a vector), in the key's unit.

        Returns
        -------
        bool
            True when ``x`` is finite and keeps to ``gt``, ``ge``, ``lt`` and ``le``.
        """
        if not math.isfinite(x):
            return False
        if self.gt is not None and not x > self.gt:
            return False
        if self.ge is not None and not x >= self.ge:
            return False
        if self.lt is not None and not x < self.lt:
            return False
        if self.le is not None and not x <= self.le:
            return False
        return True


def _spelling(text: str) -> str:
    """A name as the choices spell it: lower case, runs of spaces, ``_`` and ``-`` as one ``-``."""
    return re.sub(r"[\s_\-]+", "-", text.strip().lower())


def synonyms(*entries) -> tuple:
    """Trade words for choices, as :class:`Key` takes them, with the words in :func:`_spelling`'s form.

    Parameters
    ----------
    *entries : tuple
        ``(words, choice, why)``: the trade words (str, space separated words allowed),
        the choice they mean, and one short clause saying why.

    Returns
    -------
    tuple
        ``((frozenset of words, choice, why), ...)``.
    """
    return tuple((frozenset(_spelling(w) for w in words) | frozenset(_spelling(w).replace("-", "") for w in words),
                  choice, why) for words, choice, why in entries)


#: Trade words for the axes (common practice on sites).
AXIS_SYNONYMS = synonyms(
    (("trolley", "trolleying", "trolley travel", "trolley in", "trolley out", "trolley-in", "trolley-out"),
     "radius", 'a tower crane\'s trolley runs along the jib: axis = "radius"; a gantry or bridge crane\'s '
     'trolley crosses the span: axis = "y"'),
    (("luff", "luffing", "luff in", "luff out", "boom", "boom up", "boom down", "derrick", "derricking",
      "reach", "jib"), "radius", 'luffing the boom or jib changes the radius: axis = "radius"'),
    (("swing", "rotate", "rotation", "turn", "slewing", "slue", "swivel", "yaw"), "slew",
     'turning the crane about its slew axis: axis = "slew"'),
    (("hoisting", "lift", "lifting", "raise", "lower", "lowering", "hook", "winch", "up", "down", "z",
      "vertical"), "hoist", 'raising or lowering the hook: axis = "hoist" (a positive distance_m raises)'),
    (("travel", "long travel", "gantry", "gantry travel", "bridge", "bridge travel", "long", "rail"), "x",
     'travel along the rails: axis = "x"'),
    (("cross travel", "cross", "traverse", "cross traverse", "across"), "y",
     'travel across the span (a gantry or bridge crane\'s trolley): axis = "y"'),
)

#: Trade words for the motion profiles.
PROFILE_SYNONYMS = synonyms(
    (("scurve", "s shaped", "s shape", "jerk limited", "jerk", "smooth", "s", "soft start"), "s-curve",
     "a jerk-limited move is profile = \"s-curve\""),
    (("trapezoidal", "trapezium", "trapeze", "trap", "ramp", "linear ramp", "bang coast bang",
      "constant acceleration"), "trapezoid", "a constant-acceleration ramp is profile = \"trapezoid\""),
    (("recorded", "record", "recording", "csv", "spline", "operator record", "measured", "file", "log"),
     "table", "a recorded move from a CSV file is profile = \"table\""),
    (("zero vibration", "input shaped", "input shaping", "shaped", "shaper", "anti sway", "antisway",
      "sway control"), "zv", "input-shaped moves are profile = \"zv\", \"zvd\" or \"ei\""),
    (("zero vibration derivative",), "zvd", "profile = \"zvd\""),
    (("extra insensitive",), "ei", "profile = \"ei\""),
    (("period", "full period", "whole periods", "whole swing period", "multiple period"), "whole-period",
     "acceleration phases of whole swing periods are profile = \"whole-period\""),
)

#: Trade words for the crane kinds.
CRANE_KIND_SYNONYMS = synonyms(
    (("overhead", "overhead crane", "eot", "overhead travelling", "bridge crane", "workshop crane"), "bridge",
     "an overhead travelling crane is kind = \"bridge\""),
    (("goliath", "portal", "semi gantry", "gantry crane", "rmg", "rtg"), "gantry",
     "a crane on legs running on ground rails is kind = \"gantry\""),
    (("crawler", "truck", "all terrain", "rough terrain", "mobile crane", "telescopic", "lattice boom",
      "boom truck"), "mobile", "a crane with a boom on a carrier is kind = \"mobile\""),
    (("luffer", "luffing jib", "luffing tower", "luffing crane"), "luffing",
     "a tower crane with a luffing jib is kind = \"luffing\""),
    (("hammerhead", "flat top", "flattop", "saddle jib", "topless", "tower crane", "self erecting"), "tower",
     "a tower crane with a trolley jib is kind = \"tower\""),
)

#: Trade words for the rigging kinds.
RIGGING_KIND_SYNONYMS = synonyms(
    (("leg", "single leg", "one leg", "1 leg", "sling", "choker", "eye"), "single",
     "one leg from the hook is kind = \"single\""),
    (("two leg", "2 leg", "three leg", "3 leg", "four leg", "4 leg", "multi leg", "chain sling", "legs",
      "two leg bridle", "four leg bridle"), "bridle", "two or more legs from the hook are kind = \"bridle\""),
    (("lifting beam", "beam", "spreader beam", "spreader bar", "bar"), "spreader",
     "a lifting beam on top slings is kind = \"spreader\""),
)

#: Trade words for the zone kinds.
ZONE_KIND_SYNONYMS = synonyms(
    (("no go", "nogo", "exclusion zone", "keep out", "keepout", "restricted", "people", "danger", "drop zone",
      "barrier", "barricade"), "exclusion", "an area to keep the load out of is kind = \"exclusion\""),
    (("structure", "building", "obstruction", "wall", "scaffold", "solid", "hut"), "obstacle",
     "a structure the load must not touch is kind = \"obstacle\""),
)

TOP = {
    "title": Key("str", "Title of the lift, shown on every output.", required=True),
    "duration_s": Key("float", "Simulated time from t = 0 [s].", required=True, gt=0.0),
    "gravity_m_s2": Key("float", "Gravitational acceleration [m/s^2]; standard gravity by default.",
                        default=constants.STANDARD_GRAVITY, gt=0.0),
    "notes": Key("str", "Free text about the lift (not used in the calculation).", default=""),
}

TABLES: dict[str, dict[str, Key]] = {
    "crane": {
        "suspension_m": Key("vec3", "Suspension point (trolley sheave or boom tip) at t = 0, [x, y, z], z up [m].",
                            required=True),
        "kind": Key("str", "Crane type, for drawing, wording and geometry: tower (mast, jib with a "
                    "trolley, counter-jib), luffing (tower crane with a luffing jib: boom_length_m "
                    "and boom_foot_m needed), gantry or bridge (beam on rails), mobile (boom).",
                    default="tower", choices=("tower", "gantry", "bridge", "mobile", "luffing"),
                    synonyms=CRANE_KIND_SYNONYMS),
        "wind_limit_m_s": Key("float", "In-service wind speed limit of this crane [m/s]; "
                              f"default {constants.IN_SERVICE_WIND_LIMIT_M_S:g} m/s is a rule of thumb only: "
                              "take the real value from the crane manufacturer.",
                              default=constants.IN_SERVICE_WIND_LIMIT_M_S, gt=0.0),
        # -- crane geometry per kind (slew axis, radius limits, boom, rails) --
        "slew_center_m": Key("vec2", "Slewing cranes (tower, luffing, mobile): where the slew axis "
                             "(the mast or the slewing ring's centre) stands at t = 0, [x, y] [m]; "
                             "slewing turns the jib or boom about it and radius moves are measured "
                             "from it. Default the origin (common practice for a site grid set out "
                             "from the crane).", default=(0.0, 0.0)),
        "min_radius_m": Key("float", "Slewing cranes: smallest working radius, slew axis to hook [m] "
                            "(the crane's chart or data sheet); a move that would go inside it is "
                            "refused. Without it only a move through the slew axis is refused.",
                            ge=0.0),
        "max_radius_m": Key("float", "Slewing cranes: largest working radius, slew axis to hook [m] "
                            "(the crane's chart or data sheet for this configuration); a move that "
                            "would go beyond it is refused.", gt=0.0),
        "boom_length_m": Key("float", "Boom (luffing) cranes, kind mobile or luffing: boom or luffing "
                             "jib length, foot pin to tip sheave [m]. With it a radius move luffs: "
                             "the tip moves on the arc about the foot pin. A mobile crane without "
                             "it keeps the suspension height on radius moves (a schematic boom).",
                             gt=0.0),
        "boom_foot_m": Key("vec2", "Boom cranes: the boom foot pin's horizontal offset from the slew "
                           "axis (toward the boom) and its height above the ground datum z = 0, "
                           "[offset, height] [m]; needed with boom_length_m."),
        "level_luffing": Key("bool", "Boom cranes: the crane keeps the hook's height while luffing "
                             "(the rope is paid out or taken in as the tip rises or falls), as "
                             "level-luffing cranes do; false: the load rises and falls with the tip.",
                             default=False),
        "rail_span_m": Key("float", "Gantry and bridge cranes: distance between the two rails, "
                           "centre to centre [m]. The rails run along x; the span is across them, "
                           "centred on cross_limits_m (or on the suspension point without them).",
                           gt=0.0),
        "travel_limits_m": Key("vec2", "Gantry and bridge cranes: the suspension point's range along "
                               "the rails (x), [min, max] [m] (end stops less the buffer); a move "
                               "beyond it is refused."),
        "cross_limits_m": Key("vec2", "Gantry and bridge cranes: the trolley's range across the span "
                              "(y), [min, max] [m] (the hook's approach to each rail); a move beyond "
                              "it is refused."),
        # -- rated capacity chart (swingsim/metrics/chart.py) --
        "chart_file": Key("path", "The crane's rated capacity chart for this configuration, as its "
                          "manufacturer's chart gives it: a CSV with the header radius_m,capacity_kg, "
                          "radii strictly increasing, capacities > 0 ('#' lines are comments). Read "
                          "linearly between the listed radii and never beyond them: a planned path "
                          "that takes the hook outside the chart's radii is bad input. Radius is "
                          "measured horizontally from the slew axis. Never use a chart of another "
                          "crane or configuration."),
        "chart_includes": Key("strs", "Masses the chart's capacity must carry besides the load, per "
                              "the chart's notes: hook (the [hook] block's mass_kg) and rigging "
                              "(always counted: load.mass_kg includes the rigging). Default both, "
                              "the cautious reading; leave out hook only when the chart's notes say "
                              "its capacities already allow for the hook block.",
                              default=("hook", "rigging"), choices=("hook", "rigging")),
    },
    "rope": {
        "length_m": Key("float", "Hoist rope length from the suspension point to the hook, "
                        "or to the load when there is no hook block [m].", required=True, gt=0.0),
        "diameter_m": Key("float", "Rope diameter [m]; when set, wind acts on the rope too.", gt=0.0, lt=1.0),
        "drag_coefficient": Key("float", "Drag coefficient of the rope across the wind [-] "
                                "(default: circular cylinder, from memory).",
                                default=constants.ROPE_DRAG_COEFFICIENT, gt=0.0, le=5.0),
        "wll_kN": Key("float", "Working load limit of the line: one part of the hoist rope [kN]; a caution "
                      "is raised when the peak line pull (hook load / (falls * reeving_efficiency)) "
                      "exceeds it. The hook block's own rating is hook.wll_kN.", gt=0.0),
        # -- elastic hoist rope (hook-and-load models) --
        "stiffness_kN_per_m": Key("float", "Axial stiffness of the hoist rope reeving at the hook, at the "
                                  "initial rope length [kN/m]; makes the rope elastic. Scales inversely "
                                  "with the stretching rope length when hoisting.", gt=0.0),
        "modulus_GPa": Key("float", "Effective modulus of the wire rope on its metallic area [GPa]; with "
                           "diameter_m, fill_factor and falls gives the stiffness n^2 E A / L_r "
                           "(common practice) and makes the rope elastic. Typical 80-110 GPa "
                           "(from memory, Feyrer, Wire Ropes): take the rope maker's value.",
                           gt=0.0, le=250.0),
        "fill_factor": Key("float", "Metallic area of the rope over the area of its circle [-] "
                           "(default 0.58 from memory, Feyrer, Wire Ropes).",
                           default=constants.ROPE_FILL_FACTOR, gt=0.0, le=1.0),
        "falls": Key("int", "Number of falls (parts of line) between the suspension point and the "
                     "hook block [-].", default=1, ge=1, le=64),
        "lead_length_m": Key("float", "Rope beyond the falls that also stretches (from the top sheave "
                             "to the drum) [m].", default=0.0, ge=0.0),
        "bounce_damping_ratio": Key("float", "Equivalent viscous damping ratio of the vertical bounce "
                                    "on the elastic rope [-].", default=0.0, ge=0.0, lt=1.0),
        "stiffness_source": Key("str", "Where the stiffness or modulus value comes from (rope maker's "
                                "data sheet, test, estimate); repeated in the summary.", default=""),
        # -- hook load and line pull --
        "reeving_efficiency": Key("float", "Overall efficiency eta of the reeving [-]: the line pull is the "
                                  "hook load / (falls * eta). Default 1: no sheave friction. For n parts of "
                                  "line on sheaves of efficiency e, eta = (1 - e^n) / (n (1 - e)) (from "
                                  "memory); or give sheave_efficiency instead. Take the value from the "
                                  "crane manufacturer.", default=1.0, gt=0.0, le=1.0),
        "sheave_efficiency": Key("float", "Efficiency e of one sheave [-], about 0.98 for roller-bearing "
                                 "sheaves (from memory); gives reeving_efficiency = (1 - e^n) / (n (1 - e)) "
                                 "for n = falls. Not together with reeving_efficiency.", gt=0.0, le=1.0),
    },
    "load": {
        "mass_kg": Key("float", "Mass of the load including its rigging [kg].", required=True, gt=0.0),
        "size_m": Key("vec3", "Overall size of the load [lx, ly, lz] [m], for drawing and clearance.", gt=0.0),
        "wind_area_m2": Key("float", "Projected area of the load facing the wind [m^2]; no wind "
                            "force on the load when unset.", ge=0.0),
        "drag_coefficient": Key("float", "Drag (force) coefficient of the load [-].",
                                default=constants.LOAD_DRAG_COEFFICIENT, gt=0.0, le=5.0),
        # -- rigid load (hook-and-load models) --
        "inertia_kg_m2": Key("vec3", "Moments of inertia [Ixx, Iyy, Izz] about the centre of gravity, "
                             "load axes [kg m^2]; with it (or with size_m) the load is a rigid body.",
                             gt=0.0),
        "shape": Key("str", "Shape of the load: box (size_m), or cylinder: its axis is the side of "
                     "size_m that differs when the other two are equal, else the longest side; its "
                     "diameter the larger of the other two. Drawing, and the inertia of a rigid load "
                     "(uniform solid).", default="box", choices=("box", "cylinder"), synonyms=synonyms(
                         (("drum", "pipe", "tube", "coil", "cylindrical", "round", "spool", "tank"), "cylinder",
                          "a round load is shape = \"cylinder\""),
                         (("crate", "container", "block", "rectangular", "cuboid", "panel", "skip", "cube"), "box",
                          "a load with flat sides is shape = \"box\""))),
        "mesh_file": Key("path", "Surface mesh drawn as the load instead of the box (STL, OBJ or PLY; "
                         "metres, origin at the load's centre of gravity, z up). Drawing only."),
        "cg_offset_m": Key("vec3", "Centre of gravity relative to the centre of the size_m box, load "
                           "axes [m] (drawing, and the default attachment point).",
                           default=(0.0, 0.0, 0.0)),
        "wind_center_m": Key("vec3", "Rigid load: centre of pressure, where the wind's drag on the load "
                             "acts, load axes from the centre of gravity [m]; away from it the wind "
                             "turns the load (a yaw moment). Default: at the centre of gravity.",
                             default=(0.0, 0.0, 0.0)),
    },
    # -- hook block and rigging (hook-and-load models) --
    "hook": {
        "mass_kg": Key("float", "Mass of the hook block [kg]; makes the hook a body of its own on "
                       "the hoist rope, with the load hung below it on the rigging. Required for a "
                       "hook block; a [hook] table with only swivel and torsion_stiffness_N_m_per_rad "
                       "sets the swivel at the rope's end of a load without one.", gt=0.0),
        "size_m": Key("vec3", "Overall size of the hook block [lx, ly, lz] [m], for drawing; "
                      "lx * lz is its area facing the wind.", gt=0.0),
        "drag_coefficient": Key("float", "Drag (force) coefficient of the hook block [-].",
                                default=constants.LOAD_DRAG_COEFFICIENT, gt=0.0, le=5.0),
        # -- hook load and line pull --
        "wll_kN": Key("float", "Working load limit (rating) of the hook block [kN]; a caution is raised "
                      "when the peak hook load (everything the block carries, its own weight included) "
                      "exceeds it.", gt=0.0),
        # -- the load's heading (rigid loads) --
        "swivel": Key("str", "Rigid load: free: the hook swivel lets the load turn about the vertical "
                      "(its heading is a degree of freedom: it keeps its turn in space while the jib "
                      "slews, the wind at an offset centre of pressure turns it); locked: the load's "
                      "heading follows the hook block and the rope, which do not turn in this model: "
                      "held at start.yaw_deg, or on the reeving's torsion_stiffness_N_m_per_rad.",
                      default="free", choices=("free", "locked")),
        "torsion_stiffness_N_m_per_rad": Key("float", "swivel = locked only: torsional stiffness of the "
                                             "reeving about the vertical [N m/rad], a spring on the load's "
                                             "heading about start.yaw_deg; 0 (default) holds the heading. "
                                             "Two falls of length L at half-spacing r under a weight W give "
                                             "about W r^2 / L (bifilar suspension).", default=0.0, ge=0.0),
    },
    "rigging": {
        "kind": Key("str", "single: one leg from the hook to one attachment point, the load pivots "
                    "about it; bridle: two or more legs from the hook, legs and load one rigid body "
                    "pinned at the hook; spreader: a lifting beam on two top slings with vertical "
                    "drop legs to the load, all one rigid body pinned at the hook.",
                    default="single", choices=("single", "bridle", "spreader"), synonyms=RIGGING_KIND_SYNONYMS),
        "leg_length_m": Key("floats_or_float", "Length of each leg, pin to pin [m]: one value for all "
                            "legs or one per leg (drop legs for a spreader).", required=True, ge=0.0),
        "attach_m": Key("vec3s", "Attachment points on the load [[x, y, z], ...], load axes, from its "
                        "centre of gravity [m]; default for single: the top centre of size_m; "
                        "required for bridle and spreader."),
        "wll_kN": Key("floats_or_float", "Working load limit of each leg [kN] (one value for all or one "
                      "per leg); a caution is raised when a leg's dynamic tension exceeds it.", gt=0.0),
        "top_leg_length_m": Key("float", "Spreader only: length of each of the two top slings from "
                                "the hook to the beam's end lugs [m].", gt=0.0),
        "top_wll_kN": Key("float", "Spreader only: working load limit of each top sling [kN].", gt=0.0),
    },
    "start": {
        "swing_deg": Key("vec2", "Initial rope angle from vertical [in_xz, in_yz]: projected on the x-z plane "
                         "(positive toward +x) and on the y-z plane (positive toward +y) [deg].",
                         default=(0.0, 0.0), gt=-89.0, lt=89.0),
        "swing_rate_deg_s": Key("vec2", "Initial rate of those two projected angles [deg/s].",
                                default=(0.0, 0.0)),
        "rope_preload": Key("str", "Elastic rope only: static (the rope starts stretched by the "
                            "hanging weight), none (the weight comes onto an unstretched rope at "
                            "t = 0, a suddenly applied load) or lift-off (hook, rigging and load rest "
                            "supported, the rope slack by rope_slack_m, until the hoist has pulled "
                            "their weight into the rope).", default="static",
                            choices=("static", "none", "lift-off"), synonyms=synonyms(
                                (("slack", "liftoff", "pick", "pick up", "from ground", "ground"), "lift-off",
                                 "a load picked off its support is rope_preload = \"lift-off\""),
                                (("snatch", "sudden", "unstretched", "drop"), "none",
                                 "weight coming suddenly onto an unstretched rope is rope_preload = \"none\""))),
        "rope_slack_m": Key("float", "rope_preload = lift-off only: slack rope the hoist takes up "
                            "before the rope starts to stretch [m].", default=0.0, ge=0.0),
        "yaw_deg": Key("float", "Rigid load: heading at t = 0, a turn about the vertical from the load "
                       "axes' alignment with the site axes, counter-clockwise seen from above [deg].",
                       default=0.0, ge=-360.0, le=360.0),
        "yaw_rate_deg_s": Key("float", "Rigid load with a free swivel (or a torsion spring): rate of turn "
                              "about the vertical at t = 0, counter-clockwise seen from above [deg/s].",
                              default=0.0, ge=-360.0, le=360.0),
        "on_ground": Key("bool", "The load starts resting on the [ground], level, the hoist rope just taut "
                         "(slack by rope_slack_m) and unstretched: the hoist loads the rope, the load "
                         "drags, slides or lifts as the forces say. rope.length_m must then be the "
                         "length that reaches the resting load (swingsim check says it).", default=False),
        "load_offset_m": Key("vec2", "start.on_ground only: the load's centre of gravity in plan from the "
                             "plumb below the suspension point [dx, dy] [m]: a hook not plumb over the "
                             "load makes it drag and swing as it lifts off.", default=(0.0, 0.0)),
    },
    "ground": {
        "z_m": Key("float", "Height of the surface the load starts on or lands on [m] (site axes); with "
                   "[ground] the hoist rope is elastic (it goes slack over a landed load) and the load's "
                   "corners touch the ground.", default=0.0),
        "friction_coefficient": Key("float", "Coulomb friction coefficient between the load and the "
                                    "ground [-] (default 0.5; from memory, steel on dry timber about "
                                    "0.4-0.6: take the site's value).", default=contact.GROUND_FRICTION_COEFFICIENT,
                                    ge=0.0, le=2.0),
        "stiffness_kN_per_m": Key("float", "Vertical stiffness of the support under the whole load "
                                  "[kN/m], shared by its contact points; default from settlement_m.",
                                  gt=0.0),
        "settlement_m": Key("float", "How far the load settles into its support under its own weight "
                            "[m] when stiffness_kN_per_m is not given (default 5 mm: our choice, about "
                            "timber dunnage).", default=contact.GROUND_SETTLEMENT_M, gt=0.0, le=0.5),
        "damping_ratio": Key("float", "Damping of the load bouncing on its support, a fraction of "
                             "critical [-] (default 0.5, our choice).", default=contact.GROUND_DAMPING_RATIO,
                             ge=0.0, le=2.0),
        "slip_speed_m_s": Key("float", "Sliding speed below which friction is taken as growing with "
                              "the speed (regularised Coulomb friction) [m/s]; a pull below the "
                              "friction limit creeps at about this speed times the pull's fraction of "
                              "it (see docs/models.md).", default=contact.GROUND_SLIP_SPEED_M_S, gt=0.0, le=0.1),
    },
    "damping": {
        "ratio": Key("float", "Equivalent viscous damping ratio of the swing [-].", default=0.0, ge=0.0, lt=1.0),
    },
    "wind": {
        "speed_m_s": Key("float", "Steady wind speed at load height [m/s].", default=0.0, ge=0.0),
        "direction_deg": Key("float", "Mathematical alternative to from_bearing_deg: the direction the wind "
                             "blows toward, counter-clockwise from +x toward +y [deg]. Give this or "
                             "from_bearing_deg, not both.", default=0.0),
        "air_density_kg_m3": Key("float", "Air density [kg/m^3]; ISO 2533 sea level by default.",
                                 default=constants.AIR_DENSITY_SEA_LEVEL, gt=0.0, le=2.0),
        # -- site bearings (swingsim/scene/site.py) --
        "from_bearing_deg": Key("float", "Compass bearing the wind comes from, clockwise from site north "
                                "([site] north_deg) [deg], as weather reports and anemometers give it "
                                "(meteorological convention: 270 is a west wind, blowing toward the east). "
                                "Give this or direction_deg, not both.", ge=0.0, le=360.0),
        # -- wind onset --
        "onset": Key("str", "steady: hook, rigging and load start hanging at rest in the steady wind (the "
                     "lean it gives them, solved exactly), so the run swings only from what the crane "
                     "does; step: they start plumb and the wind arrives at t = 0 as a sudden step, for "
                     "studying a gust. start.swing_deg is measured from the start the onset gives.",
                     default="steady", choices=("steady", "step"), synonyms=synonyms(
                         (("gust", "gusty", "sudden", "squall"), "step", "a wind arriving suddenly at t = 0 is "
                          "onset = \"step\"; gusts during the run are [[wind.gusts]]"),
                         (("constant", "static", "mean", "already blowing"), "steady",
                          "a wind already blowing at the start is onset = \"steady\""))),
        # -- gusts, turbulence, profile (swingsim/dynamics/wind.py) --
        "profile": Key("str", "How the wind grows with height: uniform (speed_m_s at every height), "
                       "power (power law, shear_exponent) or log (logarithmic law, roughness_length_m); "
                       "speed_m_s, the turbulence and the gusts are then given at reference_height_m "
                       "and every body sees the wind at its own height.",
                       default="uniform", choices=("uniform", "power", "log")),
        "reference_height_m": Key("float", "Height above the ground the wind speeds are given at "
                                  "(an anemometer's height) [m]; 10 m as in wind codes (common practice).",
                                  default=10.0, gt=0.0, le=500.0),
        "shear_exponent": Key("float", "Power-law exponent of the profile [-]; default 1/7, the classic "
                              "open-terrain value (from memory).", default=1.0 / 7.0, ge=0.0, le=1.0),
        "roughness_length_m": Key("float", "Roughness length of the log-law profile [m]; default 0.05, "
                                  "EN 1991-1-4 terrain category II (from memory).",
                                  default=0.05, gt=0.0, le=2.0),
        "turbulence_intensity": Key("float", "Turbulence intensity: standard deviation of the along-wind "
                                    "speed over the mean speed_m_s [-]; 0 for no turbulence. Needs "
                                    "speed_m_s > 0.", default=0.0, ge=0.0, le=1.0),
        "spectrum": Key("str", "Turbulence spectrum: kaimal (IEC 61400-1 ed. 3), von-karman (IEC 61400-1 "
                        "ed. 2 form) or davenport (Davenport 1961), each with its published length scale "
                        "(docs/models.md).", default="kaimal", choices=("kaimal", "von-karman", "davenport")),
        "length_scale_m": Key("float", "Along-wind length scale of the spectrum [m], instead of its "
                              "published default.", gt=0.0, le=10000.0),
        "lateral_intensity_ratio": Key("float", "Across-wind over along-wind turbulence standard "
                                       "deviation [-]; 0.8 as IEC 61400-1 ed. 3 (from memory); 0 for "
                                       "along-wind turbulence only.", default=0.8, ge=0.0, le=1.5),
        "seed": Key("int", "Seed of the turbulence's random phases [-]: the same seed gives the same "
                    "wind.", default=0, ge=0),
        "realisations": Key("int", "Number of independent turbulence realisations (seeds seed, seed+1, "
                            "...) to run; above 1 the summary gives their statistics (gust_statistics) "
                            "and the worst one's time series.", default=1, ge=1, le=10000),
    },
    "output": {
        "sample_hz": Key("float", "Sample rate of timeseries.csv [Hz].", default=constants.SAMPLE_HZ, ge=1.0, le=1000.0),
    },
    "limits": {
        "swing_caution_deg": Key("float", "Rope angle that raises a swing caution [deg] (rule of thumb default).",
                                 default=constants.SWING_CAUTION_DEG, gt=0.0, lt=90.0),
        "settle_deg": Key("float", "Swing about the rest position below which the load counts as settled "
                          "for landing [deg] (rule of thumb default).", default=constants.SETTLE_SWING_DEG,
                          gt=0.0, lt=45.0),
        "clearance_m": Key("float", "Largest allowed horizontal excursion of the load from the plumb line "
                           "below the suspension point [m].", gt=0.0),
        # -- rated capacity chart (swingsim/metrics/chart.py) --
        "chart_review_pct": Key("float", "Chart utilisation above which the lift is flagged for extra "
                                "review [%]; lifts above 75% of the chart commonly need it (common "
                                "practice; varies by company and jurisdiction: follow the lift plan).",
                                default=75.0, gt=0.0, le=100.0),
        "chart_limit_pct": Key("float", "Chart utilisation above which the lift is flagged as close "
                               "to the chart [%]; lifts above 90% of the chart commonly need extra "
                               "review and sign-off (common practice; varies by company and "
                               "jurisdiction: follow the lift plan).",
                               default=90.0, gt=0.0, le=100.0),
    },
    # Camera of `swingsim render --view custom`; the whole table is optional, and
    # position_m and focus_m are required when it is given (checked in validate.py).
    "view": {
        "position_m": Key("vec3", "Camera position [x, y, z] [m] of the custom view.", required=True),
        "focus_m": Key("vec3", "Point the custom view looks at [x, y, z] [m].", required=True),
        "up": Key("vec3", "Direction that is up in the picture [-].", default=(0.0, 0.0, 1.0)),
        "view_angle_deg": Key("float", "Vertical field of view of the custom view [deg].",
                              default=30.0, gt=1.0, lt=120.0),
    },
    # -- site bearings (swingsim/scene/site.py) --
    "site": {
        "north_deg": Key("float", "Direction of site north in the scene's axes, measured from +x toward +y "
                         "[deg]; default 90: +y is north and +x is east. Wind bearings "
                         "(wind.from_bearing_deg) and the north arrow on plots and video use it.",
                         default=90.0, ge=-360.0, le=360.0),
    },
}

#: Tables every scene must have (``scene/validate.py`` reads them with ``required=True``).
REQUIRED_TABLES = ("crane", "rope", "load")

MOVE = {
    "axis": Key("str", "Axis that moves: x and y travel (along the rails and across the span of a gantry or "
                "bridge crane), slew, radius (trolley travel along a jib, or luffing), hoist.", required=True,
                choices=("x", "y", "slew", "radius", "hoist"), synonyms=AXIS_SYNONYMS),
    "profile": Key("str", "Motion profile: trapezoid, s-curve, table, or an input-shaped move: zv, zvd, ei "
                   "(the trapezoid or s-curve convolved with a zero-vibration, zero-vibration-derivative or "
                   "extra-insensitive shaper tuned to the swing) or whole-period (acceleration phases "
                   "lasting whole swing periods); see docs/compare.md.", required=True,
                   choices=("trapezoid", "s-curve", "table", "zv", "zvd", "ei", "whole-period"),
                   synonyms=PROFILE_SYNONYMS),
    "start_s": Key("float", "Start time of the move [s].", default=0.0, ge=0.0),
    "distance_m": Key("float", "Signed travel of a linear axis (x, y, radius, hoist) [m]; "
                      "a positive hoist raises the load."),
    "speed_m_s": Key("float", "Speed limit of a linear axis [m/s].", gt=0.0),
    "accel_m_s2": Key("float", "Acceleration of a linear axis [m/s^2].", gt=0.0),
    "decel_m_s2": Key("float", "Deceleration of a linear axis [m/s^2]; default equal to accel_m_s2.", gt=0.0),
    "jerk_m_s3": Key("float", "Jerk limit of a linear s-curve move [m/s^3].", gt=0.0),
    "angle_deg": Key("float", "Signed slew angle, counter-clockwise seen from above [deg]."),
    "speed_deg_s": Key("float", "Slew speed limit [deg/s].", gt=0.0),
    "accel_deg_s2": Key("float", "Slew acceleration [deg/s^2].", gt=0.0),
    "decel_deg_s2": Key("float", "Slew deceleration [deg/s^2]; default equal to accel_deg_s2.", gt=0.0),
    "jerk_deg_s3": Key("float", "Slew jerk limit of an s-curve move [deg/s^3].", gt=0.0),
    "table_file": Key("path", "CSV of a recorded move for profile = \"table\": header t_s,position_m "
                      "(or t_s,angle_deg for slew), time from the move's start, displacement relative "
                      "to the first row; interpolated by a clamped C2 cubic spline."),
    "label": Key("str", "Name of the move on plots and in the summary.", default=""),
    # -- input shaping (profiles zv, zvd, ei, whole-period; swingsim/motion/shaping.py) --
    "shaper_base": Key("str", "Command that a zv / zvd / ei shaper is applied to; default s-curve when "
                       "the move gives a jerk limit, trapezoid otherwise.", choices=("trapezoid", "s-curve"),
                       synonyms=PROFILE_SYNONYMS[:2]),
    "shaper_period_s": Key("float", "Undamped swing period a shaped or whole-period move is tuned to [s]; "
                           "default the scene's own first swing mode at the initial rope length.", gt=0.0),
    "shaper_second_period_s": Key("float", "Second swing period [s]: the zv / zvd / ei shaper is convolved "
                                  "with a second one tuned to it, cancelling two modes (hook and load) or "
                                  "covering a range of rope lengths.", gt=0.0),
    "shaper_damping_ratio": Key("float", "Damping ratio a zv / zvd / ei shaper is tuned to [-]; default "
                                "the scene's damping.ratio.", ge=0.0, lt=1.0),
    "shaper_tolerance": Key("float", "Residual vibration allowed at the design frequency by an ei shaper "
                            "(fraction of the unshaped move's) [-].", gt=0.0, lt=0.5),
}

ZONE = {
    "name": Key("str", "Name of the obstacle or zone.", required=True),
    "kind": Key("str", "obstacle (a structure the load must not touch) or exclusion (an area to keep "
                "the load out of, e.g. where people work).", default="obstacle",
                choices=("obstacle", "exclusion"), synonyms=ZONE_KIND_SYNONYMS),
    "min_m": Key("vec3", "Lower corner of the zone's box [x, y, z] [m].", required=True),
    "max_m": Key("vec3", "Upper corner of the zone's box [x, y, z] [m].", required=True),
    "margin_m": Key("float", "Distance from the zone within which a caution is raised [m].",
                    default=1.0, ge=0.0),
}

#: One discrete gust (``[[wind.gusts]]``, an array inside ``[wind]``).
GUST = {
    "start_s": Key("float", "When the gust starts [s].", required=True, ge=0.0),
    "peak_m_s": Key("float", "Speed the gust adds at its peak [m/s], with the 1 - cosine shape of "
                    "gust-load practice (at reference_height_m with a profile).", required=True, gt=0.0,
                    le=60.0),
    "duration_s": Key("float", "Length of the gust from start to end [s].", required=True, gt=0.0),
    "from_bearing_deg": Key("float", "Compass bearing the gust comes from [deg]; the mean wind's by "
                            "default.", ge=0.0, le=360.0),
    "direction_deg": Key("float", "Mathematical alternative to from_bearing_deg: where the gust blows "
                         "toward, from +x toward +y [deg]; the mean wind's by default."),
}

#: One tag line (``[[tag_lines]]``).
TAG_LINE = {
    "attach_m": Key("vec3", "Where the line is tied to the load, load axes from its centre of gravity "
                    "[m] (a point load: an offset that does not turn).", required=True),
    "anchor_m": Key("vec3", "Where the person holding the line stands, site axes [m] (the hand's "
                    "height: about 1 m above the ground).", required=True),
    "length_m": Key("float", "Length of line between the load and the hand [m]; slack while the two "
                    "are closer.", required=True, gt=0.0),
    "max_pull_N": Key("float", "Pull one person can hold [N] (default 250 N: common practice, from "
                      "memory, 200-300 N); a caution when the line pulls harder: the person must let "
                      "go, never be pulled along.", default=contact.TAG_LINE_MAX_PULL_N, gt=0.0),
    "stiffness_N_per_m": Key("float", "Stiffness of the line with the person holding it [N/m] (default: "
                             "our choice: the hold gives about 0.15 m under 250 N).", default=contact.TAG_LINE_STIFFNESS_N_PER_M, gt=0.0),
    "damping_N_s_per_m": Key("float", "Damping of the line with the person holding it [N s/m] "
                             "(default: our choice).", default=contact.TAG_LINE_DAMPING_N_S_PER_M, ge=0.0),
    "label": Key("str", "Name of the line (who holds it) on plots and in the summary.", default=""),
}

ARRAYS: dict[str, dict[str, Key]] = {"moves": MOVE, "zones": ZONE, "tag_lines": TAG_LINE}

#: Arrays of tables inside a table: (table, key) -> the entry's keys.
NESTED_ARRAYS: dict[tuple[str, str], dict[str, Key]] = {("wind", "gusts"): GUST}


def reference_markdown() -> str:
    """The scene key reference as Markdown (docs/scene-reference.md).

    Returns
    -------
    str
        One table per scene table: key, required, default, allowed values, meaning.
    """
    out = ["# Scene file reference", "",
           "Generated from `swingsim/scene/schema.py` by `python -m swingsim.scene.schema`; do not edit by hand.",
           "SI units; every quantity's unit is in its key name.", ""]

    def table(title, keys):
        out.extend([f"## {title}", "", "| key | required | default | allowed | meaning |",
                    "|---|---|---|---|---|"])
        for name, k in keys.items():
            d = "" if k.default is None else repr(k.default) if not isinstance(k.default, float) else f"{k.default:g}"
            out.append(f"| `{name}` | {'yes' if k.required else 'no'} | {d} | {k.allowed()} | {k.doc} |")
        out.append("")

    table("Top level", TOP)
    for name, keys in TABLES.items():
        table(f"[{name}]", keys)
    for name, keys in ARRAYS.items():
        table(f"[[{name}]]", keys)
    for (owner, name), keys in NESTED_ARRAYS.items():
        table(f"[[{owner}.{name}]]", keys)
    return "\n".join(out)


if __name__ == "__main__":  # pragma: no cover
    print(reference_markdown())
