"""Scene files (TOML) -> validated, frozen :class:`Scene` objects.

Every error names the file, the key path, the value and what is allowed, and
suggests the nearest known key when a key is unknown.  The schema lives in
``schema.py``.  Nothing in a scene file is evaluated: it is data only.
"""

from __future__ import annotations

import copy
import csv
import difflib
import math
import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np

from swingsim.scene import schema as S
from swingsim.dynamics.registry import select_model
from swingsim.errors import SceneError
from swingsim.motion.registry import PROFILES, build_motion, needs_swing_period

__all__ = ["Scene", "Move", "Zone", "View", "load_scene", "scene_from_dict", "read_table"]


@dataclass(frozen=True)
class Crane:
    suspension_m: tuple
    kind: str
    wind_limit_m_s: float


@dataclass(frozen=True)
class Rope:
    length_m: float
    diameter_m: float | None
    drag_coefficient: float
    wll_kN: float | None
    # elastic rope (hook-and-load models); inextensible when both are None
    stiffness_kN_per_m: float | None = None
    modulus_GPa: float | None = None
    fill_factor: float = 0.58
    falls: int = 1
    lead_length_m: float = 0.0
    bounce_damping_ratio: float = 0.0
    stiffness_source: str = ""

    @property
    def elastic(self) -> bool:
        return self.stiffness_kN_per_m is not None or self.modulus_GPa is not None


@dataclass(frozen=True)
class Load:
    mass_kg: float
    size_m: tuple | None
    wind_area_m2: float | None
    drag_coefficient: float
    shape: str = "box"
    mesh_file: str | None = None  # as written in the scene, relative to Scene.base_dir
    # rigid load (hook-and-load models); a point mass when both are None
    inertia_kg_m2: tuple | None = None
    cg_offset_m: tuple = (0.0, 0.0, 0.0)

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
    swing_deg: tuple
    swing_rate_deg_s: tuple
    rope_preload: str = "static"
    rope_slack_m: float = 0.0


@dataclass(frozen=True)
class Hook:
    """The hook block as a body of its own on the hoist rope."""

    mass_kg: float
    size_m: tuple | None
    drag_coefficient: float


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
        return len(self.attach_m)


@dataclass(frozen=True)
class Wind:
    speed_m_s: float
    direction_deg: float
    air_density_kg_m3: float


@dataclass(frozen=True)
class Limits:
    swing_caution_deg: float
    settle_deg: float
    clearance_m: float | None


@dataclass(frozen=True)
class Move:
    """One move of one axis, in the scene's own units (deg for slew)."""

    index: int
    axis: str
    profile: str
    start_s: float
    label: str
    distance: float | None = None  # m, or deg for slew
    speed: float | None = None
    accel: float | None = None
    decel: float | None = None
    jerk: float | None = None
    table: tuple | None = None  # (times_s, positions) when profile == "table"
    #: the keys only this move's profile takes (``ProfileSpec.keys``, e.g. ``shaper_period_s``)
    profile_keys: dict = field(default_factory=dict)

    @property
    def name(self) -> str:
        return self.label or f"move {self.index} ({self.axis})"


@dataclass(frozen=True)
class Zone:
    name: str
    kind: str
    min_m: tuple
    max_m: tuple
    margin_m: float


@dataclass(frozen=True, eq=False)
class Scene:
    """A validated lift scene (SI units; angles in degrees as in the file)."""

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

    @property
    def rigid_load(self) -> bool:
        """The load is modelled as a rigid body: ``load.inertia_kg_m2`` is given, or
        ``load.size_m`` together with a ``[hook]`` or ``[rigging]`` table.

        A ``size_m`` alone (no hook block, no rigging) keeps the core's meaning:
        the size of a point-mass load for drawing and clearance.
        """
        return _rigid(self.load, self.hook is not None, self.rigging is not None)

    @property
    def name(self) -> str:
        return Path(self.file).stem if self.file != "<scene>" else "scene"


# ----------------------------------------------------------------------------
# reading


def _toml_error_line(exc: tomllib.TOMLDecodeError) -> int | None:
    lineno = getattr(exc, "lineno", None)
    if lineno:
        return int(lineno)
    m = re.search(r"line (\d+)", str(exc))
    return int(m.group(1)) if m else None


def load_scene(path, *, validate_motion: bool = True) -> Scene:
    """Read and validate a scene file.

    Parameters
    ----------
    path : str or Path
        The TOML scene file.

    Raises
    ------
    SceneError
        With a one-line message naming file, key, value and what is allowed.
    """
    path = Path(path)
    shown = str(path)
    if not path.exists():
        raise SceneError(shown, "", "file not found")
    if not path.is_file():
        raise SceneError(shown, "", "not a file")
    try:
        raw_bytes = path.read_bytes()
    except OSError as exc:
        raise SceneError(shown, "", f"cannot read: {exc.strerror}") from None
    try:
        text = raw_bytes.decode("utf-8")
    except UnicodeDecodeError:
        raise SceneError(shown, "", "not a UTF-8 text file (a scene is a TOML text file)") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        msg = str(exc).split(" (at ")[0]
        raise SceneError(shown, "", f"TOML syntax error: {msg}", line=_toml_error_line(exc)) from None
    try:
        return scene_from_dict(data, file=shown, base_dir=path.parent, validate_motion=validate_motion)
    except SceneError as exc:
        if exc.line is None and exc.file == shown:
            exc.line = line_of_key(text, exc.key)
            exc.args = (exc.one_line(),)
        raise


_KEY_PATH = re.compile(r"^(?P<table>[A-Za-z_][\w-]*)(\[(?P<index>\d+)\])?(\.(?P<key>[\w-]+))?")


def line_of_key(text: str, key_path: str) -> int | None:
    """Best-effort line number of a key path like ``moves[1].accel_m_s2`` in TOML text."""
    if not key_path:
        return None
    m = _KEY_PATH.match(key_path.strip("[]"))
    if not m:
        return None
    table, index, key = m.group("table"), m.group("index"), m.group("key")
    lines = text.splitlines()
    header = re.compile(r"^\s*\[")

    def find_key(start, name):
        pat = re.compile(rf"^\s*{re.escape(name)}\s*=")
        for i in range(start, len(lines)):
            if i > start and header.match(lines[i]):
                return None
            if pat.match(lines[i]):
                return i + 1
        return None

    if key is None and index is None:
        # a top-level key, or a table name
        top_end = next((i for i, x in enumerate(lines) if header.match(x)), len(lines))
        pat = re.compile(rf"^\s*{re.escape(table)}\s*=")
        for i in range(top_end):
            if pat.match(lines[i]):
                return i + 1
        pat = re.compile(rf"^\s*\[\[?\s*{re.escape(table)}\s*\]")
        for i, x in enumerate(lines):
            if pat.match(x):
                return i + 1
        return None
    if index is not None:
        pat = re.compile(rf"^\s*\[\[\s*{re.escape(table)}\s*\]\]")
        starts = [i for i, x in enumerate(lines) if pat.match(x)]
        if int(index) >= len(starts):
            return None
        start = starts[int(index)]
    else:
        pat = re.compile(rf"^\s*\[\s*{re.escape(table)}\s*\]")
        start = next((i for i, x in enumerate(lines) if pat.match(x)), None)
        if start is None:
            return None
    if key is None:
        return start + 1
    return find_key(start, key) or start + 1


def _suggest(name: str, allowed) -> str:
    near = difflib.get_close_matches(name, list(allowed), n=1, cutoff=0.6)
    hint = f" (did you mean '{near[0]}'?)" if near else ""
    return f"unknown key{hint}; allowed: {', '.join(allowed)}"


class _Reader:
    def __init__(self, file: str, base_dir: Path):
        self.file = file
        self.base_dir = base_dir

    def err(self, key, problem, value=SceneError._MISSING):
        return SceneError(self.file, key, problem, value)

    def check_unknown(self, table: dict, keys: dict, prefix: str):
        for name in table:
            if name not in keys:
                raise self.err(f"{prefix}{name}", _suggest(name, keys))

    def value(self, table: dict, name: str, key: S.Key, where: str):
        if name not in table:
            if key.required:
                raise self.err(where, f"missing required key; expected {key.allowed()}")
            return copy.copy(key.default)
        v = table[name]
        k = key.kind

        def bad():
            return self.err(where, f"expected {key.allowed()}", v)

        if k == "str":
            if not isinstance(v, str):
                raise bad()
            if key.choices and v not in key.choices:
                near = difflib.get_close_matches(v, key.choices, n=1, cutoff=0.6)
                hint = f" (did you mean '{near[0]}'?)" if near else ""
                raise self.err(where, f"expected {key.allowed()}{hint}", v)
            return v
        if k == "bool":
            if not isinstance(v, bool):
                raise bad()
            return v
        if k == "int":
            if isinstance(v, bool) or not isinstance(v, int) or not key.in_bounds(float(v)):
                raise bad()
            return v
        if k == "float":
            if isinstance(v, bool) or not isinstance(v, (int, float)):
                raise bad()
            x = float(v)
            if not key.in_bounds(x):
                raise bad()
            return x
        if k in ("vec2", "vec3", "floats"):
            n = {"vec2": 2, "vec3": 3}.get(k)
            if not isinstance(v, list) or (n is not None and len(v) != n) or (n is None and not v):
                raise bad()
            out = []
            for x in v:
                if isinstance(x, bool) or not isinstance(x, (int, float)) or not key.in_bounds(float(x)):
                    raise bad()
                out.append(float(x))
            return tuple(out)
        if k == "floats_or_float":
            if isinstance(v, (int, float)) and not isinstance(v, bool):
                if not key.in_bounds(float(v)):
                    raise bad()
                return float(v)
            return self.value({name: v}, name, S.Key("floats", key.doc, gt=key.gt, ge=key.ge,
                                                      lt=key.lt, le=key.le), where)
        if k == "vec3s":
            if not isinstance(v, list) or not v:
                raise bad()
            pts = []
            for p in v:
                if (not isinstance(p, list) or len(p) != 3 or
                        any(isinstance(x, bool) or not isinstance(x, (int, float))
                            or not math.isfinite(float(x)) for x in p)):
                    raise bad()
                pts.append(tuple(float(x) for x in p))
            return tuple(pts)
        if k == "path":
            if not isinstance(v, str) or not v or "\x00" in v:
                raise bad()
            return v
        raise AssertionError(k)  # pragma: no cover

    def table(self, data: dict, name: str, keys: dict, required: bool = False) -> dict:
        t = data.get(name, {})
        if name not in data and required:
            raise self.err(f"[{name}]", "missing required table")
        if not isinstance(t, dict):
            raise self.err(name, "expected a table ([" + name + "])", t)
        self.check_unknown(t, keys, f"{name}.")
        return {k: self.value(t, k, key, f"{name}.{k}") for k, key in keys.items()}


_LINEAR = {"distance": "distance_m", "speed": "speed_m_s", "accel": "accel_m_s2",
           "decel": "decel_m_s2", "jerk": "jerk_m_s3"}
_ANGULAR = {"distance": "angle_deg", "speed": "speed_deg_s", "accel": "accel_deg_s2",
            "decel": "decel_deg_s2", "jerk": "jerk_deg_s3"}

def read_table(file: str, base_dir: Path, key: str, axis: str, scene_file: str = "<scene>"):
    """Read a table profile's CSV: header ``t_s,position_m`` (``t_s,angle_deg`` for slew).

    Errors name the scene file and the key that names the table, with the
    table's row where it applies.
    """
    p = Path(file)
    full = p if p.is_absolute() else base_dir / p
    want = "angle_deg" if axis == "slew" else "position_m"

    def err(problem):
        return SceneError(scene_file, key, problem, file)

    if not full.exists():
        raise err("table file not found (paths are relative to the scene file's folder)")
    if not full.is_file():
        raise err("not a file")
    try:
        text = full.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        raise err("cannot be read as UTF-8 text (expected a CSV table)") from None
    rows = [r for r in csv.reader(text.splitlines()) if r and not r[0].lstrip().startswith("#")]
    if not rows:
        raise err(f"empty table; expected a header t_s,{want}")
    header = [h.strip() for h in rows[0]]
    if header != ["t_s", want]:
        raise err(f"the table's header must be exactly 't_s,{want}' for axis {axis} "
                  f"(found '{','.join(header)}')")
    ts, xs = [], []
    for i, r in enumerate(rows[1:], start=2):
        if len(r) != 2:
            raise err(f"data row {i - 1} of the table: expected 2 columns, found '{','.join(r)}'")
        try:
            t, x = float(r[0]), float(r[1])
        except ValueError:
            raise err(f"data row {i - 1} of the table: expected two numbers, found '{','.join(r)}'") from None
        if not (math.isfinite(t) and math.isfinite(x)):
            raise err(f"data row {i - 1} of the table: values must be finite numbers")
        ts.append(t)
        xs.append(x)
    if len(ts) < 2:
        raise err("a table needs at least two data rows")
    if ts[0] != 0.0:
        raise err(f"the table's first time must be 0 (times count from the move's start), found {ts[0]:g}")
    for i in range(1, len(ts)):
        if ts[i] <= ts[i - 1]:
            raise err(f"data row {i + 1} of the table: times must increase strictly "
                      f"({ts[i - 1]:g} then {ts[i]:g})")
    return tuple(ts), tuple(xs)


def scene_from_dict(data: dict, *, file: str = "<scene>", base_dir: Path | str = ".",
                    validate_motion: bool = True) -> Scene:
    """Validate a parsed scene document (a dict as ``tomllib`` returns it)."""
    base_dir = Path(base_dir)
    r = _Reader(file, base_dir)
    if not isinstance(data, dict):
        raise r.err("", "a scene must be a TOML document of tables")
    known = set(S.TOP) | set(S.TABLES) | set(S.ARRAYS)
    for name in data:
        if name not in known:
            raise r.err(name, _suggest(name, sorted(known)))
    top = {}
    for name, key in S.TOP.items():
        top[name] = r.value(data, name, key, name)
    for name in S.TABLES:
        if name in data and not isinstance(data[name], dict):
            raise r.err(name, f"expected a table [{name}]", data[name])
    crane = r.table(data, "crane", S.TABLES["crane"], required=True)
    rope = r.table(data, "rope", S.TABLES["rope"], required=True)
    load = r.table(data, "load", S.TABLES["load"], required=True)
    start = r.table(data, "start", S.TABLES["start"])
    damping = r.table(data, "damping", S.TABLES["damping"])
    wind = r.table(data, "wind", S.TABLES["wind"])
    output = r.table(data, "output", S.TABLES["output"])
    limits = r.table(data, "limits", S.TABLES["limits"])
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
        r.check_unknown(z, S.ZONE, f"zones[{i}].")
        v = {k: r.value(z, k, key, f"zones[{i}].{k}") for k, key in S.ZONE.items()}
        if any(a >= b for a, b in zip(v["min_m"], v["max_m"])):
            raise r.err(f"zones[{i}].max_m", "must exceed min_m in every coordinate", list(v["max_m"]))
        zones.append(Zone(**v))

    hook_t = r.table(data, "hook", S.TABLES["hook"]) if "hook" in data else None
    rig_t = r.table(data, "rigging", S.TABLES["rigging"]) if "rigging" in data else None
    rope_o, load_o, start_o = Rope(**rope), Load(**load), Start(**start)
    hook_o, rig_o = _read_hook_rigging(r, hook_t, rig_t, rope_o, load_o, start_o, top["gravity_m_s2"])

    scene = Scene(
        title=top["title"], duration_s=top["duration_s"], gravity_m_s2=top["gravity_m_s2"],
        notes=top["notes"],
        crane=Crane(**crane), rope=rope_o, load=load_o,
        start=start_o, moves=tuple(moves), damping_ratio=damping["ratio"],
        wind=Wind(**wind), sample_hz=output["sample_hz"], limits=Limits(**limits),
        zones=tuple(zones), file=file, base_dir=base_dir, raw=copy.deepcopy(data), view=view,
        hook=hook_o, rigging=rig_o,
    )
    if validate_motion:
        # a move that cannot be built is bad input; a profile tuned to the swing period is
        # built with the period of the model the scene selects, as the run will
        period = float(select_model(scene).mode_periods_s()[0]) if needs_swing_period(scene) else None
        build_motion(scene, swing_period_s=period)
    return scene


#: File types a load mesh may have (read with pyvista).
MESH_SUFFIXES = (".stl", ".obj", ".ply")


def _read_view(r: _Reader, data: dict):
    """The optional ``[view]`` table; its position and focus are required when it is there."""
    if "view" not in data:
        return None
    v = r.table(data, "view", S.TABLES["view"])
    pos, foc, up = (np.asarray(v[k]) for k in ("position_m", "focus_m", "up"))
    if np.linalg.norm(pos - foc) < 1e-6:
        raise r.err("view.focus_m", "must differ from view.position_m", list(v["focus_m"]))
    if np.linalg.norm(up) < 1e-9:
        raise r.err("view.up", "must not be the zero vector", list(v["up"]))
    d = (foc - pos) / np.linalg.norm(foc - pos)
    if np.linalg.norm(np.cross(d, up / np.linalg.norm(up))) < 1e-3:
        raise r.err("view.up", "must not point along the line of sight (position_m to focus_m)", list(v["up"]))
    return View(**v)


def _check_mesh_file(r: _Reader, load: dict) -> None:
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


def _rigid(load, has_hook: bool, has_rigging: bool) -> bool:
    return load.inertia_kg_m2 is not None or (load.size_m is not None and (has_hook or has_rigging))


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
    if start.rope_slack_m and start.rope_preload != "lift-off":
        raise r.err("start.rope_slack_m", "only with start.rope_preload = 'lift-off'", start.rope_slack_m)
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
        from swingsim.dynamics.rope import elastic_rope  # local: pure physics

        m = load.mass_kg + (hook.mass_kg if hook else 0.0)
        try:
            elastic_rope(rope, m * g, m)
        except ValueError:
            key = "rope.stiffness_kN_per_m" if rope.stiffness_kN_per_m is not None else "rope.modulus_GPa"
            raise r.err(key, f"the rope would stretch more than its length ({rope.length_m:g} m) "
                        f"under the {m:g} kg it carries; check the value and its unit",
                        rope.stiffness_kN_per_m or rope.modulus_GPa) from None
    rigid = _rigid(load, hook_t is not None, rig_t is not None)
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
    from swingsim.dynamics.rigging import RiggingError, rigging_geometry  # local: pure physics

    try:
        rigging_geometry(rig, load, rigid)
    except RiggingError as exc:
        raise r.err(f"rigging.{exc.key}", str(exc)) from None
    return hook, rig


def _read_move(r: _Reader, m: dict, i: int, duration_s: float) -> Move:
    where = f"moves[{i}]"
    r.check_unknown(m, S.MOVE, f"{where}.")
    v = {k: r.value(m, k, key, f"{where}.{k}") for k, key in S.MOVE.items()}
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


def set_dotted(data: dict, dotted: str, value: Any) -> dict:
    """Return a deep copy of ``data`` with ``dotted`` (e.g. ``moves.0.accel_m_s2``) set."""
    out = copy.deepcopy(data)
    parts = dotted.split(".")
    cur: Any = out
    for j, part in enumerate(parts[:-1]):
        if isinstance(cur, list):
            idx = int(part)
            cur = cur[idx]
        else:
            if part not in cur:
                cur[part] = {}
            cur = cur[part]
    last = parts[-1]
    if isinstance(cur, list):
        cur[int(last)] = value
    else:
        cur[last] = value
    return out
