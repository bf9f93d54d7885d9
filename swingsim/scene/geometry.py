"""Checks of the crane's geometry keys against its kind and against each other.

Which keys belong to which kind (slew axis and radius limits for slewing cranes,
the boom for mobile and luffing cranes, rails for gantry and bridge cranes),
that the limits hold the suspension point at t = 0, and that a boom crane's
suspension point lies on its boom's arc.  The checks over the run's time (a
move that would leave the limits) are
:func:`swingsim.motion.limits.check_reach`, run when the motion is built.
"""

from __future__ import annotations

import math

from swingsim.motion.limits import RAIL_KINDS, SLEWING_KINDS
from swingsim.scene.read import KeyReader

__all__ = ["check_crane", "ARC_TOLERANCE_M"]

#: How far the stated suspension height may be from the boom's arc [m].
ARC_TOLERANCE_M = 0.01

_SLEW_KEYS = ("slew_center_m", "min_radius_m", "max_radius_m")
_BOOM_KEYS = ("boom_length_m", "boom_foot_m", "level_luffing")
_RAIL_KEYS = ("rail_span_m", "travel_limits_m", "cross_limits_m")


def _only_for(r: KeyReader, given: dict, crane: dict, keys, kinds, what: str) -> None:
    for k in keys:
        if k in given and crane["kind"] not in kinds:
            raise r.err(f"crane.{k}", f"only for {what} (kind {', '.join(repr(x) for x in kinds)}), "
                        f"not kind '{crane['kind']}'", given[k])


def _range(r: KeyReader, crane: dict, key: str) -> None:
    lo, hi = crane[key]
    if not lo < hi:
        raise r.err(f"crane.{key}", "must be [min, max] with min < max", list(crane[key]))


def check_crane(r: KeyReader, given: dict, crane: dict) -> None:
    """Refuse crane geometry keys that do not fit the crane's kind or each other.

    Parameters
    ----------
    r : KeyReader
        The scene's key reader (file name, line numbers).
    given : dict
        The ``[crane]`` table as written (to tell given keys from defaults).
    crane : dict
        The ``[crane]`` values after the key checks, defaults filled in.

    Raises
    ------
    SceneError
        One line naming the key, its value and what is allowed.
    """
    _only_for(r, given, crane, _SLEW_KEYS, SLEWING_KINDS, "slewing cranes")
    _only_for(r, given, crane, _BOOM_KEYS, ("mobile", "luffing"), "boom cranes")
    _only_for(r, given, crane, _RAIL_KEYS, RAIL_KINDS, "cranes on rails")
    x0, y0, z0 = crane["suspension_m"]
    if crane["kind"] in SLEWING_KINDS:
        cx, cy = crane["slew_center_m"]
        radius = math.hypot(x0 - cx, y0 - cy)
        lo, hi = crane["min_radius_m"], crane["max_radius_m"]
        if lo is not None and hi is not None and not lo < hi:
            raise r.err("crane.max_radius_m", f"must exceed crane.min_radius_m = {lo:g}", hi)
        if lo is not None and radius < lo - 1e-9:
            raise r.err("crane.min_radius_m", f"the suspension point starts at radius {radius:.2f} m "
                        "from the slew centre, inside the smallest radius", lo)
        if hi is not None and radius > hi + 1e-9:
            raise r.err("crane.max_radius_m", f"the suspension point starts at radius {radius:.2f} m "
                        "from the slew centre, beyond the largest radius", hi)
        _check_boom(r, crane, radius, z0)
    if crane["kind"] in RAIL_KINDS:
        _check_rails(r, crane, x0, y0)


def _check_boom(r: KeyReader, crane: dict, radius: float, z0: float) -> None:
    length, foot = crane["boom_length_m"], crane["boom_foot_m"]
    if crane["kind"] == "luffing" and (length is None or foot is None):
        raise r.err("crane.boom_length_m" if length is None else "crane.boom_foot_m",
                    "missing; kind 'luffing' needs boom_length_m and boom_foot_m")
    if (length is None) != (foot is None):
        raise r.err("crane.boom_foot_m" if foot is None else "crane.boom_length_m",
                    "missing; a boom needs both boom_length_m and boom_foot_m")
    if length is None:
        if crane["level_luffing"]:
            raise r.err("crane.level_luffing", "needs the boom (boom_length_m and boom_foot_m)", True)
        return
    offset, height = foot
    reach = radius - offset
    if abs(reach) >= length:
        raise r.err("crane.suspension_m", f"at radius {radius:.2f} m from the slew centre it is beyond "
                    f"the boom's reach: |radius - boom_foot_m[0]| = {abs(reach):.2f} m must be less "
                    f"than boom_length_m = {length:g} m", list(crane["suspension_m"]))
    tip = height + math.sqrt(length * length - reach * reach)
    if abs(tip - z0) > ARC_TOLERANCE_M:
        raise r.err("crane.suspension_m", f"height {z0:g} m is not on the boom's arc: a "
                    f"{length:g} m boom with its foot pin at [{offset:g}, {height:g}] m puts the tip at "
                    f"radius {radius:.2f} m at z = {tip:.3f} m; set suspension_m[2] to that (within "
                    f"{100 * ARC_TOLERANCE_M:g} cm) or correct the boom keys", list(crane["suspension_m"]))


def _check_rails(r: KeyReader, crane: dict, x0: float, y0: float) -> None:
    for key, value, axis in (("travel_limits_m", x0, "x"), ("cross_limits_m", y0, "y")):
        if crane[key] is None:
            continue
        _range(r, crane, key)
        lo, hi = crane[key]
        if not lo - 1e-9 <= value <= hi + 1e-9:
            raise r.err(f"crane.{key}", f"the suspension point starts at {axis} = {value:g} m, "
                        "outside this range", list(crane[key]))
    span, cross = crane["rail_span_m"], crane["cross_limits_m"]
    if span is not None and cross is not None and cross[1] - cross[0] > span + 1e-9:
        raise r.err("crane.cross_limits_m", f"the trolley's range ({cross[1] - cross[0]:g} m) is wider "
                    f"than the rail span (rail_span_m = {span:g} m)", list(cross))
