"""Checks between the keys of a scene, and the assembly of the validated :class:`Scene`.

:mod:`swingsim.scene.read` checks each key on its own (type, bounds, choices);
here the keys are checked against each other: the camera of ``[view]``, the load
mesh, the hook block and rigging against the rope and the load (per-leg lists,
rigid-load data, an elastic rope that carries its load), each move against its
motion profile (:data:`swingsim.motion.registry.PROFILES`), and finally the
motion itself is built, as a run builds it, so that a move that cannot be made
is bad input.
"""

from __future__ import annotations

import copy
from dataclasses import replace
from pathlib import Path

import numpy as np

from swingsim.dynamics.registry import select_model
from swingsim.dynamics.rigging import RiggingError, rigging_geometry
from swingsim.dynamics.rope import elastic_rope, reeving_efficiency
from swingsim.errors import SceneError
from swingsim.motion.limits import SLEWING_KINDS
from swingsim.motion.registry import PROFILES, build_motion, needs_swing_period
from swingsim.scene import schema
from swingsim.scene.geometry import check_crane
from swingsim.scene.model import (Crane, Ground, Gust, Hook, Limits, Load, Move, Rigging, Rope, Scene, Site, Start,
                                  Swivel, TagLine, View, Wind, Zone, models_rigid_load, slew_centre)
from swingsim.scene.read import KeyReader, line_of_key, read_chart, read_document, read_table, suggest
from swingsim.scene.site import wind_toward_deg

__all__ = ["load_scene", "scene_from_dict", "MESH_SUFFIXES"]


def load_scene(path, *, validate_motion: bool = True) -> Scene:
    """Read and validate a scene file.

    Parameters
    ----------
    path : str or Path
        The TOML scene file.
    validate_motion : bool, optional
        Also build every move's motion (see :func:`scene_from_dict`).

    Returns
    -------
    Scene
        The frozen, validated scene; relative paths in it are relative to the
        file's folder.

    Raises
    ------
    SceneError
        With a one-line message naming file, key, value and what is allowed,
        and the key's line in the file where it can be found.
    """
    document = read_document(path)
    try:
        return scene_from_dict(document.data, file=document.file, base_dir=Path(path).parent,
                               validate_motion=validate_motion)
    except SceneError as exc:
        if exc.line is None and exc.file == document.file:
            exc.line = line_of_key(document.text, exc.key)
            exc.args = (exc.one_line(),)
        raise


#: Keys of a move's quantities on a linear axis (x, y, radius, hoist) and on slew.
_LINEAR = {"distance": "distance_m", "speed": "speed_m_s", "accel": "accel_m_s2",
           "decel": "decel_m_s2", "jerk": "jerk_m_s3"}
_ANGULAR = {"distance": "angle_deg", "speed": "speed_deg_s", "accel": "accel_deg_s2",
            "decel": "decel_deg_s2", "jerk": "jerk_deg_s3"}


def scene_from_dict(data: dict, *, file: str = "<scene>", base_dir: Path | str = ".",
                    validate_motion: bool = True) -> Scene:
    """Validate a parsed scene document (a dict as ``tomllib`` returns it) into a :class:`Scene`.

    Parameters
    ----------
    data : dict
        The scene document, e.g. from ``tomllib.loads`` or built in code.
    file : str, optional
        The scene file's name as the user gave it, named in errors.
    base_dir : Path or str, optional
        Folder that relative paths in the scene (tables, meshes) are relative to.
    validate_motion : bool, optional
        Also build every move's motion, as a run will, so that a move that cannot
        be built is refused here.  Off only where the caller builds the motion
        itself right after.

    Returns
    -------
    Scene
        The frozen, validated scene (``raw`` holds a deep copy of ``data``).

    Raises
    ------
    SceneError
        One line naming the file, the key path, the value and what is allowed.
    """
    base_dir = Path(base_dir)
    r = KeyReader(file, base_dir)
    if not isinstance(data, dict):
        raise r.err("", "a scene must be a TOML document of tables")
    known = set(schema.TOP) | set(schema.TABLES) | set(schema.ARRAYS)
    for name in data:
        if name not in known:
            raise r.err(name, suggest(name, sorted(known)))
    top = {}
    for name, key in schema.TOP.items():
        top[name] = r.value(data, name, key, name)
    for name in schema.TABLES:
        if name in data and not isinstance(data[name], dict):
            raise r.err(name, f"expected a table [{name}]", data[name])
    crane = r.table(data, "crane", schema.TABLES["crane"], required=True)
    check_crane(r, data["crane"], crane)
    rope = r.table(data, "rope", schema.TABLES["rope"], required=True)
    load = r.table(data, "load", schema.TABLES["load"], required=True)
    start = r.table(data, "start", schema.TABLES["start"])
    damping = r.table(data, "damping", schema.TABLES["damping"])
    site = Site(**r.table(data, "site", schema.TABLES["site"]))
    wind = _read_wind(r, data, site)
    output = r.table(data, "output", schema.TABLES["output"])
    limits = r.table(data, "limits", schema.TABLES["limits"])
    view = _read_view(r, data)
    _check_mesh_file(r, load)

    moves = []
    raw_moves = data.get("moves", [])
    if not isinstance(raw_moves, list) or any(not isinstance(m, dict) for m in raw_moves):
        raise r.err("moves", "expected an array of tables [[moves]]", raw_moves)
    for i, m in enumerate(raw_moves):
        moves.append(_read_move(r, m, i, top["duration_s"]))

    zones = []
    raw_zones = data.get("zones", [])
    if not isinstance(raw_zones, list) or any(not isinstance(z, dict) for z in raw_zones):
        raise r.err("zones", "expected an array of tables [[zones]]", raw_zones)
    for i, z in enumerate(raw_zones):
        r.check_unknown(z, schema.ZONE, f"zones[{i}].")
        v = {k: r.value(z, k, key, f"zones[{i}].{k}") for k, key in schema.ZONE.items()}
        if any(a >= b for a, b in zip(v["min_m"], v["max_m"])):
            raise r.err(f"zones[{i}].max_m", "must exceed min_m in every coordinate", list(v["max_m"]))
        zones.append(Zone(**v))

    tag_lines = _read_tag_lines(r, data)
    ground = _read_ground(r, data)

    hook_t = r.table(data, "hook", schema.TABLES["hook"]) if "hook" in data else None
    swivel = _read_swivel(r, data, hook_t)
    if hook_t is not None:  # the hook block's own keys; without mass_kg there is no hook block
        hook_t = {k: v for k, v in hook_t.items() if k not in SWIVEL_KEYS}
        hook_t = hook_t if hook_t["mass_kg"] is not None else None
    rig_t = r.table(data, "rigging", schema.TABLES["rigging"]) if "rigging" in data else None
    _read_reeving(r, data, rope)
    rope_o, load_o, start_o = Rope(**rope), Load(**load), Start(**start)
    hook_o, rig_o = _read_hook_rigging(r, hook_t, rig_t, rope_o, load_o, start_o, top["gravity_m_s2"])

    scene = Scene(
        title=top["title"], duration_s=top["duration_s"], gravity_m_s2=top["gravity_m_s2"],
        notes=top["notes"],
        crane=_read_crane(r, crane), rope=rope_o, load=load_o,
        start=start_o, moves=tuple(moves), damping_ratio=damping["ratio"],
        wind=wind, sample_hz=output["sample_hz"], limits=Limits(**limits),
        zones=tuple(zones), file=file, base_dir=base_dir, raw=copy.deepcopy(data), view=view,
        hook=hook_o, rigging=rig_o, site=site, swivel=swivel, tag_lines=tag_lines, ground=ground,
    )
    _check_heading_keys(r, scene)
    _check_ground_and_lines(r, scene)
    if validate_motion:
        # a move that cannot be built is bad input; a profile tuned to the swing period is
        # built with the period of the model the scene selects, as the run will
        period = float(select_model(scene).mode_periods_s()[0]) if needs_swing_period(scene) else None
        motion = build_motion(scene, swing_period_s=period)
        _check_path_on_chart(r, scene, motion)
    return scene


#: File types a load mesh may have (read with pyvista).
MESH_SUFFIXES = (".stl", ".obj", ".ply")


def _read_wind(r: KeyReader, data: dict, site: Site) -> Wind:
    """The ``[wind]`` table, its direction given as a compass bearing or as a mathematical angle, not both."""
    raw = data.get("wind", {})
    raw_gusts = raw.pop("gusts", []) if isinstance(raw, dict) else []
    try:
        wind = r.table(data, "wind", schema.TABLES["wind"])
    finally:
        if raw_gusts:
            raw["gusts"] = raw_gusts
    wind["gusts"] = _read_gusts(r, raw_gusts, site)
    if wind["turbulence_intensity"] > 0.0 and wind["speed_m_s"] == 0.0:
        raise r.err("wind.turbulence_intensity", "needs a mean wind (wind.speed_m_s > 0): turbulence "
                    "is given relative to it", wind["turbulence_intensity"])
    if wind["profile"] == "log" and wind["roughness_length_m"] >= wind["reference_height_m"]:
        raise r.err("wind.roughness_length_m", "must be below wind.reference_height_m "
                    f"({wind['reference_height_m']:g} m) for the log law", wind["roughness_length_m"])
    if wind["realisations"] > 1 and wind["turbulence_intensity"] == 0.0:
        raise r.err("wind.realisations", "needs turbulence (wind.turbulence_intensity > 0): without it "
                    "every realisation is the same", wind["realisations"])
    bearing = wind.pop("from_bearing_deg")
    if bearing is not None:
        if "direction_deg" in data.get("wind", {}):
            raise r.err("wind.direction_deg", "give either wind.from_bearing_deg (the compass bearing "
                        "the wind comes from) or wind.direction_deg (where it blows toward, from +x "
                        "toward +y), not both", wind["direction_deg"])
        wind["direction_deg"] = wind_toward_deg(bearing, site.north_deg)
    return Wind(**wind)


def _read_gusts(r: KeyReader, raw_gusts, site: Site) -> tuple:
    """The ``[[wind.gusts]]`` array: each gust's keys, its direction as a bearing or an angle."""
    if not isinstance(raw_gusts, list) or any(not isinstance(g, dict) for g in raw_gusts):
        raise r.err("wind.gusts", "expected an array of tables [[wind.gusts]]", raw_gusts)
    gusts = []
    for i, g in enumerate(raw_gusts):
        where = f"wind.gusts[{i}]."
        r.check_unknown(g, schema.GUST, where)
        v = {k: r.value(g, k, key, where + k) for k, key in schema.GUST.items()}
        bearing = v.pop("from_bearing_deg")
        if bearing is not None:
            if v["direction_deg"] is not None:
                raise r.err(where + "direction_deg", "give either from_bearing_deg or direction_deg, "
                            "not both", v["direction_deg"])
            v["direction_deg"] = wind_toward_deg(bearing, site.north_deg)
        gusts.append(Gust(**v))
    return tuple(gusts)


def _read_reeving(r: KeyReader, data: dict, rope: dict) -> None:
    """``rope.sheave_efficiency`` gives ``rope.reeving_efficiency`` (in place); never both."""
    if rope["sheave_efficiency"] is None:
        return
    if "reeving_efficiency" in data["rope"]:
        raise r.err("rope.sheave_efficiency", "give either rope.reeving_efficiency or "
                    "rope.sheave_efficiency, not both", rope["sheave_efficiency"])
    rope["reeving_efficiency"] = reeving_efficiency(rope["sheave_efficiency"], rope["falls"])


def _read_view(r: KeyReader, data: dict):
    """The optional ``[view]`` table; its position and focus are required when it is there."""
    if "view" not in data:
        return None
    v = r.table(data, "view", schema.TABLES["view"])
    pos, foc, up = (np.asarray(v[k]) for k in ("position_m", "focus_m", "up"))
    if np.linalg.norm(pos - foc) < 1e-6:
        raise r.err("view.focus_m", "must differ from view.position_m", list(v["focus_m"]))
    if np.linalg.norm(up) < 1e-9:
        raise r.err("view.up", "must not be the zero vector", list(v["up"]))
    d = (foc - pos) / np.linalg.norm(foc - pos)
    if np.linalg.norm(np.cross(d, up / np.linalg.norm(up))) < 1e-3:
        raise r.err("view.up", "must not point along the line of sight (position_m to focus_m)", list(v["up"]))
    return View(**v)


# ----------------------------------------------------------------------------
# rated capacity chart (swingsim/metrics/chart.py measures the lift against it)


def _read_crane(r: KeyReader, crane: dict) -> Crane:
    """The ``[crane]`` table, with its capacity chart read and its chart keys checked."""
    includes = crane["chart_includes"]
    if "rigging" not in includes:
        raise r.err("crane.chart_includes", "must list 'rigging': load.mass_kg includes the rigging, "
                    "and a chart's capacity always carries it", list(includes))
    if crane["chart_file"] is None:
        return Crane(**crane)
    if crane["kind"] not in SLEWING_KINDS:
        raise r.err("crane.chart_file", f"a capacity chart by radius needs a slewing crane, not kind "
                    f"'{crane['kind']}'", crane["chart_file"])
    chart = read_chart(crane["chart_file"], r.base_dir, "crane.chart_file", r.file)
    return Crane(**crane, chart=chart)


def _check_path_on_chart(r: KeyReader, scene: Scene, motion) -> None:
    """Refuse a planned path that takes the hook (the suspension point's plumb line) off the chart.

    The chart is never extrapolated: every radius the crane's motion reaches must
    lie within the chart's listed radii.
    """
    chart = scene.crane.chart
    if chart is None:
        return
    t = np.union1d(np.linspace(0.0, scene.duration_s, 4001),
                   [b for b in motion.breakpoints if b <= scene.duration_s])
    radius = np.hypot(*(motion.evaluate(t)["p"][:, :2] - slew_centre(scene)).T)
    off = ~np.isfinite(chart.capacity_at(radius))
    if not off.any():
        return
    low, high = chart.radius_m[0], chart.radius_m[-1]
    rule = (f"outside the chart's radii {low:g} to {high:g} m ({scene.crane.chart_file}); "
            "the chart is never extrapolated")
    first = int(np.argmax(off))
    if first == 0:
        raise r.err("crane.suspension_m", f"the hook starts at radius {radius[0]:.2f} m, {rule}",
                    list(scene.crane.suspension_m))
    t_off = t[first]
    # the move under way when the path leaves the chart (else the last one started before)
    started = [i for i, (_axis, prof) in enumerate(motion.moves) if prof.start_s < t_off]
    during = [i for i in started if motion.moves[i][1].end_s >= t_off]
    index = (during or started)[-1]
    prof = motion.moves[index][1]
    in_move = (t >= prof.start_s) & (t <= prof.end_s) & off
    beyond = radius[in_move] if in_move.any() else radius[off]
    reach = float(np.max(beyond)) if float(np.max(beyond)) > high else float(np.min(beyond))
    move = scene.moves[index]
    raise r.err(f"moves[{index}]", f"{move.name} takes the hook to radius {reach:.2f} m (leaving the chart at "
                f"t = {t_off:.2f} s), {rule}")


def _check_mesh_file(r: KeyReader, load: dict) -> None:
    name = load.get("mesh_file")
    if name is None:
        return
    if Path(name).suffix.lower() not in MESH_SUFFIXES:
        raise r.err("load.mesh_file", "expected an STL, OBJ or PLY file (.stl, .obj, .ply)", name)
    p = Path(name)
    full = p if p.is_absolute() else r.base_dir / p
    if not full.is_file():
        raise r.err("load.mesh_file", "file not found (relative to the scene file's folder)", name)



# ----------------------------------------------------------------------------
# hook block, rigging, rigid load, elastic rope (hook-and-load models)


def _per_leg(r, values, n, key):
    if values is None:
        return None
    if isinstance(values, float):
        return (values,) * n
    if len(values) == 1:
        return tuple(values) * n
    if len(values) != n:
        raise r.err(key, f"expected one value or one per leg ({n} legs)", list(values))
    return tuple(values)


#: keys of [hook] that set the swivel, not the hook block
SWIVEL_KEYS = ("swivel", "torsion_stiffness_N_m_per_rad")


def _read_tag_lines(r: KeyReader, data: dict) -> tuple:
    """The ``[[tag_lines]]`` array, each line's keys read on their own."""
    raw = data.get("tag_lines", [])
    if not isinstance(raw, list) or any(not isinstance(t, dict) for t in raw):
        raise r.err("tag_lines", "expected an array of tables [[tag_lines]]", raw)
    lines = []
    for i, t in enumerate(raw):
        where = f"tag_lines[{i}]."
        r.check_unknown(t, schema.TAG_LINE, where)
        lines.append(TagLine(**{k: r.value(t, k, key, where + k) for k, key in schema.TAG_LINE.items()}))
    return tuple(lines)


def _read_ground(r: KeyReader, data: dict):
    """The ``[ground]`` table, or None without one."""
    if "ground" not in data:
        return None
    return Ground(**r.table(data, "ground", schema.TABLES["ground"]))


def _check_ground_and_lines(r: KeyReader, scene: Scene) -> None:
    """Ground contact and tag lines against the load, the rigging and the start.

    The geometry of the load resting on the ground, or hanging above it, comes from the
    model the scene selects (the one place that knows the rigging's geometry).
    """
    start, ground = scene.start, scene.ground
    if start.on_ground and ground is None:
        raise r.err("start.on_ground", "needs a [ground] table (at least ground.z_m) for the load to rest on",
                    True)
    if any(start.load_offset_m) and not start.on_ground:
        raise r.err("start.load_offset_m", "only with start.on_ground = true (where the load rests from the "
                    "plumb)", list(start.load_offset_m))
    if start.on_ground:
        if start.rope_preload == "lift-off":
            raise r.err("start.rope_preload", "give either start.on_ground = true (the load rests on the "
                        "[ground] and lifts off as the forces say) or rope_preload = \"lift-off\" (held "
                        "plumb until the rope carries it), not both", start.rope_preload)
        for k in ("swing_deg", "swing_rate_deg_s"):
            if any(getattr(start, k)):
                raise r.err(f"start.{k}", "must be zero with start.on_ground = true (the load rests on the "
                            "ground)", list(getattr(start, k)))
        if scene.hook is not None and scene.rigid_load is False and scene.rigging is not None \
                and scene.rigging.kind == "single":
            raise r.err("start.on_ground", "a hook block on a single sling leg over a load resting on the "
                        "ground is not modelled (the block would stand on the leg); hang the load on a "
                        "bridle, give it load.size_m as a rigid load, or start it hanging", True)
    if ground is not None and scene.rigid_load and scene.load.size_m is None:
        raise r.err("ground", "a rigid load touches the ground with the corners of its box: give load.size_m")
    if ground is None and not scene.tag_lines:
        return
    if ground is not None and scene.hook is not None and not scene.rigid_load and scene.rigging is not None \
            and scene.rigging.kind == "single":
        raise r.err("ground", "landing a point load on a single leg below a hook block is not modelled (the "
                    "block would stand on the leg); give the load load.size_m (a rigid load) or a bridle")
    model = select_model(scene)
    still = build_motion(replace(scene, moves=()))  # where the suspension point is at t = 0
    if ground is not None:
        if start.on_ground:
            need = model.resting_rope_length_m(still.evaluate(np.array([0.0]))["p"][0])
            if abs(need - scene.rope.length_m) > max(0.02, 0.002 * need):
                raise r.err("rope.length_m", f"with start.on_ground the rope must reach the load resting on the "
                            f"ground at z = {ground.z_m:g} m: set rope.length_m = {need:.3f} (or move ground.z_m)",
                            scene.rope.length_m)
        else:
            low = model.lowest_point_at_start_m(still)
            if low < ground.z_m:
                raise r.err("ground.z_m", f"the load hangs with its lowest point at z = {low:.3f} m at t = 0, "
                            "below the ground; lower ground.z_m, shorten rope.length_m, or start it "
                            "resting with start.on_ground = true", ground.z_m)
    for i, (line, d) in enumerate(zip(scene.tag_lines, model.tag_line_distances_at_start_m(still))):
        if scene.rigid_load and scene.load.size_m is not None:
            half = 0.5 * np.asarray(scene.load.size_m, float) + 0.01
            box = np.asarray(line.attach_m, float) + np.asarray(scene.load.cg_offset_m, float)
            if np.any(np.abs(box) > half):
                raise r.err(f"tag_lines[{i}].attach_m", "must lie on the load: inside its size_m box, in load "
                            "axes from the centre of gravity", list(line.attach_m))
        pull = line.stiffness_N_per_m * (d - line.length_m)
        if pull > line.max_pull_N:
            raise r.err(f"tag_lines[{i}].length_m", f"the line is {d - line.length_m:.2f} m too short to reach "
                        f"the load at t = 0 (it would pull {pull / 1e3:.1f} kN at once); give at least "
                        f"{d:.2f} m", line.length_m)


def _read_swivel(r, data, hook_t) -> Swivel:
    """The swivel of ``[hook]``, and a hook block's mass required when its other keys are given."""
    if hook_t is None:
        return Swivel()
    given = data["hook"] if isinstance(data.get("hook"), dict) else {}
    if hook_t["mass_kg"] is None:
        block_keys = [k for k in given if k not in SWIVEL_KEYS]
        if block_keys:
            raise r.err("hook.mass_kg", f"missing required key; a hook block (hook.{block_keys[0]}) needs "
                        "its mass (a [hook] table with only swivel and torsion_stiffness_N_m_per_rad sets "
                        "the swivel of a load without a hook block)")
    if hook_t["torsion_stiffness_N_m_per_rad"] and hook_t["swivel"] != "locked":
        raise r.err("hook.torsion_stiffness_N_m_per_rad", "only with hook.swivel = \"locked\" (a free "
                    "swivel turns without twisting the reeving)", hook_t["torsion_stiffness_N_m_per_rad"])
    return Swivel(hook_t["swivel"], hook_t["torsion_stiffness_N_m_per_rad"])


def _check_heading_keys(r, scene) -> None:
    """The heading's keys only where a rigid load turns."""
    if scene.rigid_load:
        if scene.start.yaw_rate_deg_s and scene.swivel.kind == "locked" \
                and not scene.swivel.torsion_stiffness_N_m_per_rad:
            raise r.err("start.yaw_rate_deg_s", "must be zero with hook.swivel = \"locked\" and no "
                        "hook.torsion_stiffness_N_m_per_rad (the heading is held)", scene.start.yaw_rate_deg_s)
        if any(scene.load.wind_center_m) and not scene.load.wind_area_m2:
            raise r.err("load.wind_center_m", "needs load.wind_area_m2 (no wind force on the load without it)",
                        list(scene.load.wind_center_m))
        return
    why = ("only a rigid load turns (give load.size_m with [rigging] or a [hook] block, or "
           "load.inertia_kg_m2)")
    for key, value in (("start.yaw_deg", scene.start.yaw_deg), ("start.yaw_rate_deg_s", scene.start.yaw_rate_deg_s)):
        if value:
            raise r.err(key, why, value)
    if any(scene.load.wind_center_m):
        raise r.err("load.wind_center_m", why, list(scene.load.wind_center_m))
    given = scene.raw.get("hook", {}) if isinstance(scene.raw.get("hook"), dict) else {}
    for key in SWIVEL_KEYS:
        if key in given:
            raise r.err(f"hook.{key}", why, given[key])


def _read_hook_rigging(r, hook_t, rig_t, rope, load, start, g):
    """Cross-checks of the hook-and-load keys; returns (Hook or None, Rigging or None)."""
    if rope.stiffness_kN_per_m is not None and rope.modulus_GPa is not None:
        raise r.err("rope.modulus_GPa", "give either rope.stiffness_kN_per_m or rope.modulus_GPa, "
                    "not both", rope.modulus_GPa)
    if rope.modulus_GPa is not None and rope.diameter_m is None:
        raise r.err("rope.modulus_GPa", "needs rope.diameter_m to derive the rope stiffness",
                    rope.modulus_GPa)
    if start.rope_preload != "static" and not rope.elastic:
        raise r.err("start.rope_preload", "only for an elastic rope (set rope.stiffness_kN_per_m "
                    "or rope.modulus_GPa)", start.rope_preload)
    if start.rope_slack_m and start.rope_preload != "lift-off" and not start.on_ground:
        raise r.err("start.rope_slack_m", "only with start.rope_preload = 'lift-off' or start.on_ground = true",
                    start.rope_slack_m)
    if start.rope_preload == "lift-off":
        for k in ("swing_deg", "swing_rate_deg_s"):
            if any(getattr(start, k)):
                raise r.err(f"start.{k}", "must be zero with rope_preload = 'lift-off' (the load rests "
                            "supported until it lifts off)", list(getattr(start, k)))
    if load.shape == "cylinder" and load.size_m is None and load.inertia_kg_m2 is None \
            and (hook_t is not None or rig_t is not None):
        raise r.err("load.shape", "a cylinder needs load.size_m (or give load.inertia_kg_m2)", "cylinder")
    if load.inertia_kg_m2 is not None:
        i1, i2, i3 = load.inertia_kg_m2
        if i1 + i2 < i3 * (1 - 1e-9) or i2 + i3 < i1 * (1 - 1e-9) or i1 + i3 < i2 * (1 - 1e-9):
            raise r.err("load.inertia_kg_m2", "not a real body: each moment must not exceed the sum "
                        "of the other two (triangle inequality of principal moments)",
                        list(load.inertia_kg_m2))
    if load.cg_offset_m != (0.0, 0.0, 0.0) and load.size_m is None:
        raise r.err("load.cg_offset_m", "needs load.size_m (it is measured from the box centre)",
                    list(load.cg_offset_m))
    hook = Hook(**hook_t) if hook_t is not None else None
    if rope.elastic:
        m = load.mass_kg + (hook.mass_kg if hook else 0.0)
        try:
            elastic_rope(rope, m * g, m)
        except ValueError:
            key = "rope.stiffness_kN_per_m" if rope.stiffness_kN_per_m is not None else "rope.modulus_GPa"
            raise r.err(key, f"the rope would stretch more than its length ({rope.length_m:g} m) "
                        f"under the {m:g} kg it carries; check the value and its unit",
                        rope.stiffness_kN_per_m or rope.modulus_GPa) from None
    rigid = models_rigid_load(load, hook_t is not None, rig_t is not None)
    if rig_t is None:
        if hook is not None:
            raise r.err("[rigging]", "missing; a hook block needs the rigging below it "
                        "(at least rigging.leg_length_m)")
        if not rigid:
            return None, None
        if load.size_m is None:
            raise r.err("[rigging]", "missing; a load given by inertia_kg_m2 without size_m needs "
                        "rigging.attach_m (where the rope is attached)")
        rig_t = {"kind": "single", "leg_length_m": 0.0, "attach_m": None, "wll_kN": None,
                 "top_leg_length_m": None, "top_wll_kN": None}
    kind = rig_t["kind"]
    attach = rig_t["attach_m"]
    if attach is not None and len(attach) == 3 and all(isinstance(x, float) for x in attach):
        attach = (attach,)  # pragma: no cover  (vec3s always gives points)
    if kind == "single":
        if attach is None:
            if not rigid:
                attach = ((0.0, 0.0, 0.0),)
            elif load.size_m is None:
                raise r.err("rigging.attach_m", "missing; with no load.size_m the top centre of the "
                            "load is unknown")
            else:
                ox, oy, oz = load.cg_offset_m
                attach = ((-ox, -oy, -oz + 0.5 * load.size_m[2]),)
        elif len(attach) != 1:
            raise r.err("rigging.attach_m", "kind 'single' has one attachment point", [list(a) for a in attach])
        elif not rigid and any(attach[0]):
            raise r.err("rigging.attach_m", "a point-mass load has no attachment offset; give "
                        "load.size_m or load.inertia_kg_m2 for a rigid load", [list(a) for a in attach])
    else:
        if not rigid:
            raise r.err("rigging.kind", f"a {kind} needs a rigid load (load.size_m or "
                        "load.inertia_kg_m2)", kind)
        if attach is None:
            raise r.err("rigging.attach_m", f"missing; kind '{kind}' needs one attachment point per leg")
        if len(attach) < 2:
            raise r.err("rigging.attach_m", f"kind '{kind}' needs at least two attachment points",
                        [list(a) for a in attach])
    n = len(attach)
    legs = _per_leg(r, rig_t["leg_length_m"], n, "rigging.leg_length_m")
    wll = _per_leg(r, rig_t["wll_kN"], n, "rigging.wll_kN")
    if hook is not None or kind != "single":
        for L in legs:
            if L <= 0.0:
                raise r.err("rigging.leg_length_m", "must be > 0 (only a single leg without a hook "
                            "block may have length 0: the rope attached to the load directly)",
                            list(legs) if n > 1 else L)
    if kind == "spreader":
        if rig_t["top_leg_length_m"] is None:
            raise r.err("rigging.top_leg_length_m", "missing; kind 'spreader' needs the length of "
                        "its two top slings")
    else:
        for k in ("top_leg_length_m", "top_wll_kN"):
            if rig_t[k] is not None:
                raise r.err(f"rigging.{k}", f"only for kind 'spreader', not '{kind}'", rig_t[k])
    rig = Rigging(kind=kind, leg_length_m=legs, attach_m=tuple(tuple(a) for a in attach), wll_kN=wll,
                  top_leg_length_m=rig_t["top_leg_length_m"], top_wll_kN=rig_t["top_wll_kN"])
    try:
        rigging_geometry(rig, load, rigid)
    except RiggingError as exc:
        raise r.err(f"rigging.{exc.key}", str(exc)) from None
    return hook, rig


def _read_move(r: KeyReader, m: dict, i: int, duration_s: float) -> Move:
    where = f"moves[{i}]"
    r.check_unknown(m, schema.MOVE, f"{where}.")
    v = {k: r.value(m, k, key, f"{where}.{k}") for k, key in schema.MOVE.items()}
    axis, profile = v["axis"], v["profile"]
    names = _ANGULAR if axis == "slew" else _LINEAR
    other = _LINEAR if axis == "slew" else _ANGULAR
    for q, key in other.items():
        if key in m:
            kind = "a slew move" if axis == "slew" else f"a linear ({axis}) move"
            raise r.err(f"{where}.{key}", f"not a key of {kind}; use {names[q]}", m[key])
    spec = PROFILES[profile]
    needs, optional = spec.needs, spec.optional
    for q in names:
        key = names[q]
        if q in needs and v[key] is None:
            raise r.err(f"{where}.{key}", f"missing; profile '{profile}' needs "
                        + ", ".join(names[n] for n in needs))
        if q not in needs and q not in optional and key in m:
            raise r.err(f"{where}.{key}", f"not used by profile '{profile}'", m[key])
    own = spec.keys
    for key in sorted({k for sp in PROFILES.values() for k in sp.keys}):
        if key in m and key not in own:
            users = ", ".join(p for p, sp in PROFILES.items() if key in sp.keys)
            raise r.err(f"{where}.{key}", f"not used by profile '{profile}' (only by {users})", m[key])
    if profile == "table":
        if v["table_file"] is None:
            raise r.err(f"{where}.table_file", "missing; profile 'table' needs a CSV file")
        table = read_table(v["table_file"], r.base_dir, f"{where}.table_file", axis, r.file)
    else:
        if v["table_file"] is not None:
            raise r.err(f"{where}.table_file", f"only for profile 'table', not '{profile}'", v["table_file"])
        table = None
        if v[names["distance"]] == 0.0:
            raise r.err(f"{where}.{names['distance']}", "must not be zero", 0.0)
    if v["start_s"] >= duration_s:
        raise r.err(f"{where}.start_s", f"must be before the end of the simulation (duration_s = "
                    f"{duration_s:g})", v["start_s"])
    profile_keys = {k: m[k] for k in spec.keys if k in m}
    return Move(index=i, axis=axis, profile=profile, start_s=v["start_s"], label=v["label"],
                distance=v[names["distance"]], speed=v[names["speed"]], accel=v[names["accel"]],
                decel=v[names["decel"]], jerk=v[names["jerk"]], table=table, profile_keys=profile_keys)
