"""Sweep files (TOML): a base scene and the quantities to vary -> a list of validated variants.

A sweep file::

    base = "tower_trolley.toml"          # the scene, relative to this file
    title = "Trolley profiles vs rope length"

    [objective]
    minimize = "settled_at_s"            # a summary number; smaller is better
    max = { last_move_end_s = 40.0 }     # optional limits a variant must keep to rank

    [vary]                               # dotted paths into the scene; the cartesian product
    "rope.length_m" = { from = 8.0, to = 30.0, count = 12 }
    "moves.0.profile" = ["trapezoid", "zv", "zvd", "ei", "whole-period"]

    [[variants]]                         # optional hand-picked cases, on top of the product
    name = "gentle"
    "moves.0.accel_m_s2" = 0.15

Every variant is validated as a scene (``scene_from_dict``); an error names the
sweep file, the sweep key and the variant.
"""

from __future__ import annotations

import copy
import difflib
import itertools
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import NamedTuple

from swingsim.errors import InputError, SceneError
from swingsim.io.failures import read_text_file
from swingsim.scene import load_scene, scene_from_dict, schema
from swingsim.scene.edit import list_index, set_dotted
from swingsim.scene.read import parse_toml
from swingsim.scene.plausibility import check_plausible, check_text
from swingsim.scene.model import Scene

__all__ = ["Sweep", "Variant", "load_sweep", "sweep_from_dict", "OBJECTIVE_KEYS", "MAX_VARIANTS"]

#: Summary numbers a sweep can rank by or limit (all: smaller is better / an upper bound).
OBJECTIVE_KEYS = (
    "settled_at_s", "settle_time_s", "residual_rope_angle_deg", "residual_swing_deg",
    "peak_rope_angle_deg", "peak_excursion_m", "peak_rope_tension_kN", "dynamic_factor",
    "last_move_end_s", "swing_at_move_end_deg", "peak_load_speed_m_s",
)

#: Largest number of variants a sweep may expand to.
MAX_VARIANTS = 1_000_000
#: Variants beyond which a sweep needs ``--allow-implausible`` (plausibility limit).
PLAUSIBLE_VARIANTS = 100_000

_TOP = {
    "base": "path of the base scene, relative to the sweep file",
    "title": "title of the comparison",
    "objective": "table: minimize = a summary key, max = {key = bound}",
    "vary": "table of dotted scene keys -> list of values or {from, to, count}",
    "variants": "array of tables [[variants]]: name and dotted scene keys",
    "sensitivity": "true or false: add the shaper rope-length sensitivity study to the report",
    "notes": "free text",
}
_RANGE = {"from", "to", "count"}


@dataclass(frozen=True)
class Variant:
    """One case of a sweep: its index, name, the values it sets, and its scene."""

    index: int
    name: str
    values: dict
    scene: Scene


@dataclass(frozen=True)
class Sweep:
    """A validated sweep: the base scene, the compared keys, the variants, the objective.

    ``keys`` are the dotted scene keys of the comparison's columns, in order;
    ``minimize`` the summary number the ranking sorts by and ``limits`` the upper
    bounds a variant must keep to be ranked.
    """

    file: str
    title: str
    base: Scene
    keys: tuple
    variants: tuple
    minimize: str = "settled_at_s"
    limits: dict = field(default_factory=dict)
    sensitivity: bool = True
    notes: str = ""

    @property
    def scenes(self) -> list:
        """The variants' scenes, in variant order."""
        return [v.scene for v in self.variants]


def load_sweep(path, *, allow_implausible: bool = False) -> Sweep:
    """Read and validate a sweep file (see the module docstring).

    Parameters
    ----------
    path : str or Path
        The TOML sweep file; its ``base`` scene is relative to its folder.
    allow_implausible : bool, optional
        Accept more than :data:`PLAUSIBLE_VARIANTS` variants (``--allow-implausible``).

    Returns
    -------
    Sweep
        The sweep with every variant expanded and validated as a scene.

    Raises
    ------
    InputError
        One line naming the sweep file, key, value and what is allowed.
    """
    path = Path(path)
    shown = str(path)
    if not path.exists():
        raise InputError(shown, "", "sweep file not found")
    text = read_text_file(path, lambda problem: InputError(shown, "", f"{problem} (a sweep is a TOML text file)"))
    data = parse_toml(text, shown, kind="sweep", error=InputError)
    return sweep_from_dict(data, file=shown, base_dir=path.parent, allow_implausible=allow_implausible)


def _flatten(table: dict, prefix: str = "", leaf_range: bool = True, file: str = "<sweep>",
             where: str = "vary") -> dict:
    """{"rope": {"length_m": [..]}} -> {"rope.length_m": [..]}; a range table (or ``{}``) is a leaf.

    A scene key given twice (as a table and as a dotted key) is an error: neither is dropped silently.
    """
    out = {}
    for k, v in table.items():
        key = f"{prefix}{k}"
        if isinstance(v, dict) and not (leaf_range and set(v) <= _RANGE):
            found = _flatten(v, key + ".", leaf_range, file, where)
        else:
            found = {key: v}
        for dotted, value in found.items():
            if dotted in out:
                raise InputError(file, f'{where}."{dotted}"', "the scene key is given twice (as a table and as "
                                 "a dotted key); give it once")
            out[dotted] = value
    return out


def _check_path(file: str, where: str, dotted: str, base_raw: dict):
    """A dotted key must name a scene key of the schema (moves / zones by index)."""
    parts = dotted.split(".")

    def bad(problem):
        return InputError(file, where, problem, dotted)

    head = parts[0]
    if head in schema.TOP:
        if len(parts) != 1:
            raise bad(f"'{head}' is a top-level scene key; use \"{head}\"")
        return schema.TOP[head]
    if head in schema.TABLES:
        if len(parts) != 2:
            raise bad(f"expected \"{head}.<key>\" with one of: {', '.join(schema.TABLES[head])}")
        if parts[1] not in schema.TABLES[head]:
            near = difflib.get_close_matches(parts[1], list(schema.TABLES[head]), n=1, cutoff=0.6)
            hint = f" (did you mean '{head}.{near[0]}'?)" if near else ""
            raise bad(f"unknown scene key{hint}; [{head}] has: {', '.join(schema.TABLES[head])}")
        return schema.TABLES[head][parts[1]]
    if head in schema.ARRAYS:
        keys = schema.ARRAYS[head]
        n = len(base_raw.get(head, []) or [])
        i = list_index(parts[1]) if len(parts) == 3 else None
        if i is None:
            raise bad(f"expected \"{head}.<index>.<key>\" with the index in ASCII digits 0-9, "
                      f"e.g. \"{head}.0.{next(iter(keys))}\"")
        if i >= n:
            raise bad(f"the base scene has {n} {head}; index {i} does not exist (indices from 0)")
        if parts[2] not in keys:
            near = difflib.get_close_matches(parts[2], list(keys), n=1, cutoff=0.6)
            hint = f" (did you mean '{head}.{i}.{near[0]}'?)" if near else ""
            raise bad(f"unknown key of [[{head}]]{hint}")
        return keys[parts[2]]
    near = difflib.get_close_matches(head, list(schema.TOP) + list(schema.TABLES) + list(schema.ARRAYS),
                                     n=1, cutoff=0.6)
    hint = f" (did you mean '{near[0]}'?)" if near else ""
    raise bad(f"not a scene key{hint}")


def _values(file: str, where: str, v, kind: str = "float") -> list:
    """A [vary] entry -> its list of values; a range's count is checked before it is expanded.

    ``kind`` is the schema kind of the varied key: a range of an ``int`` key must give whole numbers.
    """
    if isinstance(v, list):
        if not v:
            raise InputError(file, where, "empty list; give at least one value", v)
        return v
    if isinstance(v, dict) and not v:
        raise InputError(file, where, "empty range {}; give from, to and count, or a list of values")
    if isinstance(v, dict) and set(v) <= _RANGE:
        missing = _RANGE - set(v)
        if missing:
            raise InputError(file, where, "a range needs from, to and count; missing "
                             + ", ".join(sorted(missing)), v)
        a, b, n = v["from"], v["to"], v["count"]
        for name, x in (("from", a), ("to", b)):
            if isinstance(x, bool) or not isinstance(x, (int, float)) or not math.isfinite(x):
                raise InputError(file, f"{where}.{name}", "expected a finite number", x)
        if isinstance(n, bool) or not isinstance(n, int) or n < 1:
            raise InputError(file, f"{where}.count", "expected a whole number >= 1", n)
        if n > MAX_VARIANTS:
            raise InputError(file, f"{where}.count", f"a range of more than {MAX_VARIANTS} values; at most "
                             f"{MAX_VARIANTS} variants are allowed (split the study)", n)
        if n == 1:
            values = [float(a)]
        else:
            values = [float(a + (b - a) * k / (n - 1)) for k in range(n)]
        if kind == "int":
            if any(not x.is_integer() for x in values):
                raise InputError(file, where, "the key takes whole numbers and this range gives fractions; "
                                 "choose from, to and count so that every step is a whole number, or list "
                                 "the values", v)
            values = [int(x) for x in values]
        return values
    raise InputError(file, where, "expected a list of values or a range { from = .., to = .., "
                     "count = .. }", v)


class _Case(NamedTuple):
    """A variant before it is validated: its name, the dotted keys it sets, where it was given."""

    name: str
    values: dict
    where: str


def _describe(values: dict) -> str:
    return ", ".join(f"{k} = {v!r}" for k, v in values.items())


def sweep_from_dict(data: dict, *, file: str = "<sweep>", base_dir: Path | str = ".",
                    allow_implausible: bool = False) -> Sweep:
    """Validate a parsed sweep document and expand its variants (validated scenes).

    Parameters
    ----------
    data : dict
        The sweep document, as ``tomllib`` returns it.
    file : str, optional
        The sweep file's name as the user gave it, named in errors.
    base_dir : Path or str, optional
        Folder the ``base`` scene is relative to.
    allow_implausible : bool, optional
        Accept more than :data:`PLAUSIBLE_VARIANTS` variants, and variants beyond the
        scene plausibility limits (:mod:`swingsim.scene.plausibility`).

    Returns
    -------
    Sweep
        The variants in order: the cartesian product of ``[vary]`` (the first key
        varying slowest), then the ``[[variants]]``.

    Raises
    ------
    InputError
        One line naming the sweep file, the sweep key and, for a variant that is
        not a valid scene, the variant and the scene's own error.
    """
    base_dir = Path(base_dir)
    for k in data:
        if k not in _TOP:
            near = difflib.get_close_matches(k, list(_TOP), n=1, cutoff=0.6)
            hint = f" (did you mean '{near[0]}'?)" if near else ""
            raise InputError(file, k, f"unknown sweep key{hint}; allowed: {', '.join(_TOP)}")
    if "base" not in data:
        raise InputError(file, "base", "missing: the base scene file, relative to the sweep file")
    if not isinstance(data["base"], str) or not data["base"]:
        raise InputError(file, "base", "expected the path of a scene file (a string)", data["base"])
    base_path = base_dir / data["base"]
    try:
        base = load_scene(base_path)
    except SceneError as exc:
        raise InputError(file, "base", f"the base scene is invalid: {exc.one_line()}") from None
    title = data.get("title", base.title)
    if not isinstance(title, str):
        raise InputError(file, "title", "expected a string", title)
    if check_text(title):
        raise InputError(file, "title", check_text(title), title[:80])
    notes = data.get("notes", "")
    if not isinstance(notes, str):
        raise InputError(file, "notes", "expected a string", notes)
    sens = data.get("sensitivity", True)
    if not isinstance(sens, bool):
        raise InputError(file, "sensitivity", "expected true or false", sens)

    # objective
    obj = data.get("objective", {})
    if not isinstance(obj, dict):
        raise InputError(file, "objective", "expected a table [objective]", obj)
    for k in obj:
        if k not in ("minimize", "max"):
            raise InputError(file, f"objective.{k}", "unknown key; allowed: minimize, max")
    minimize = obj.get("minimize", "settled_at_s")
    if minimize not in OBJECTIVE_KEYS:
        near = difflib.get_close_matches(str(minimize), OBJECTIVE_KEYS, n=1, cutoff=0.6)
        hint = f" (did you mean '{near[0]}'?)" if near else ""
        raise InputError(file, "objective.minimize", f"expected one of {', '.join(OBJECTIVE_KEYS)}{hint}",
                         minimize)
    limits = obj.get("max", {})
    if not isinstance(limits, dict):
        raise InputError(file, "objective.max", "expected a table of summary key = upper bound", limits)
    for k, v in limits.items():
        if k not in OBJECTIVE_KEYS:
            raise InputError(file, f"objective.max.{k}", f"expected one of {', '.join(OBJECTIVE_KEYS)}")
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
            raise InputError(file, f"objective.max.{k}", "expected a finite number", v)
    limits = {k: float(v) for k, v in limits.items()}

    # vary
    vary = data.get("vary", {})
    if not isinstance(vary, dict):
        raise InputError(file, "vary", "expected a table [vary]", vary)
    vary = _flatten(vary, file=file)
    lists = {}
    for k, v in vary.items():
        where = f'vary."{k}"'
        key = _check_path(file, where, k, base.raw)
        lists[k] = _values(file, where, v, key.kind)
    named = data.get("variants", [])
    if not isinstance(named, list) or any(not isinstance(x, dict) for x in named):
        raise InputError(file, "variants", "expected an array of tables [[variants]]", named)
    n_prod = math.prod(len(v) for v in lists.values()) if lists else 0
    if n_prod + len(named) == 0:
        raise InputError(file, "vary", "nothing to compare: give [vary] keys or [[variants]]")
    if n_prod + len(named) > MAX_VARIANTS:
        raise InputError(file, "vary", f"expands to {n_prod + len(named)} variants; at most "
                         f"{MAX_VARIANTS} are allowed (split the study)")
    if n_prod + len(named) > PLAUSIBLE_VARIANTS and not allow_implausible:
        raise InputError(file, "vary", f"expands to {n_prod + len(named)} variants, beyond the plausibility "
                         f"limit of {PLAUSIBLE_VARIANTS}; pass --allow-implausible to run it anyway")

    cases = []
    for combo in itertools.product(*lists.values()) if lists else ():
        cases.append(_Case("", dict(zip(lists, combo)), "vary"))
    names = set()
    for i, x in enumerate(named):
        where = f"variants[{i}]"
        name = x.get("name")
        if not isinstance(name, str) or not name:
            raise InputError(file, f"{where}.name", "missing or empty; each named variant needs a name",
                             name if "name" in x else InputError._MISSING)
        if name in names:
            raise InputError(file, f"{where}.name", "duplicate name", name)
        names.add(name)
        vals = _flatten({k: v for k, v in x.items() if k != "name"}, leaf_range=False, file=file, where=where)
        for k in vals:
            _check_path(file, f'{where}."{k}"', k, base.raw)
        cases.append(_Case(name, vals, where))

    keys = list(lists)
    for case in cases:
        for k in case.values:
            if k not in keys:
                keys.append(k)
    variants = []
    for idx, case in enumerate(cases):
        d = base.raw
        for k, val in case.values.items():
            d = set_dotted(d, k, copy.deepcopy(val))
        try:
            sc = scene_from_dict(d, file=base.file, base_dir=base.base_dir)
            check_plausible(sc, allow=allow_implausible)
        except SceneError as exc:
            label = f"variant {idx}" + (f" '{case.name}'" if case.name else "")
            raise InputError(file, case.where, f"{label} ({_describe(case.values)}) is not a valid scene: "
                             f"{exc.one_line()}") from None
        variants.append(Variant(idx, case.name, case.values, sc))
    return Sweep(file=file, title=title, base=base, keys=tuple(keys), variants=tuple(variants),
                 minimize=minimize, limits=limits, sensitivity=sens, notes=notes)
