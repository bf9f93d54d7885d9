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

    [objective]                          # optional ranking rules
    robust_over = "rope.length_m"        # rank each other combination by its worst case over this key
    group_by = ["moves.0.profile"]       # and rank within each value of these keys

The variants are held by column (:class:`VariantTable`): the base scene once and
one array per varied key.  Each distinct value of a column is checked once
against its scene key (type, bounds, choices); an error names the sweep file,
the sweep key, the value and the first variant that has it.  Combinations are
then validated with as few scenes as that takes (one per distinct combination of
the keys outside the moves and one per distinct move, see
:func:`_check_combinations`); a full scene of a variant is built only where it is
needed (the single-run solver).

Where a variant sets a move's profile (``moves.0.profile`` varied), the move keys
that profile does not use are left out for that variant (counted in
:attr:`VariantTable.ignored` and said once in the report), so one sweep can
compare a trapezoid, an s-curve and the shapers with ``jerk_m_s3`` set.
"""

from __future__ import annotations

import copy
import dataclasses
import difflib
import math
from dataclasses import dataclass, field
from pathlib import Path
from collections.abc import Sequence

import numpy as np

from swingsim.dynamics.registry import select_model
from swingsim.errors import InputError, SceneError
from swingsim.io.failures import read_text_file
from swingsim.scene import load_scene, scene_from_dict, schema
from swingsim.motion.registry import PROFILES, build_profile, move_key, needs_swing_period
from swingsim.scene.edit import get_dotted, list_index
from swingsim.scene.read import KeyReader, parse_toml
from swingsim.scene.plausibility import check_plausible, check_text
from swingsim.scene.model import Scene

__all__ = ["Sweep", "Variant", "load_sweep", "sweep_from_dict", "OBJECTIVE_KEYS", "MAX_VARIANTS"]

#: Summary numbers a sweep can rank by or limit (all: smaller is better / an upper bound).
OBJECTIVE_KEYS = (
    "settled_at_s", "settle_time_s", "residual_rope_angle_deg", "residual_swing_deg",
    "peak_rope_angle_deg", "peak_excursion_m", "peak_rope_tension_kN", "dynamic_factor",
    "last_move_end_s", "swing_at_move_end_deg", "peak_load_speed_m_s",
    "peak_tag_line_pull_N", "drag_distance_m", "peak_swing_after_liftoff_deg", "touchdown_speed_m_s",
    "touchdown_swing_deg", "ground_drift_m",
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


class Variant:
    """One case of a sweep: its index, name, the values it sets, and its scene.

    The scene is built (and validated) only when asked for: a comparison reads
    the variant table's columns and builds a full scene only for a variant that
    goes to the single-run solver.
    """

    __slots__ = ("index", "name", "values", "_table")

    def __init__(self, index: int, name: str, values: dict, table=None):
        self.index = index
        self.name = name
        self.values = values
        self._table = table

    @property
    def scene(self) -> Scene:
        """The variant's validated scene (built on first use, cached by the table)."""
        return self._table.scene(self.index)

    def __eq__(self, other):
        return (isinstance(other, Variant) and (self.index, self.name, self.values)
                == (other.index, other.name, other.values))

    def __repr__(self):
        return f"Variant({self.index}, {self.name!r}, {self.values!r})"


class _Variants(Sequence):
    """The variants of a table as a sequence, made on demand (no list of objects is held)."""

    def __init__(self, table):
        self._table = table

    def __len__(self):
        return self._table.n

    def __getitem__(self, i):
        if isinstance(i, slice):
            return [self[j] for j in range(*i.indices(self._table.n))]
        n = self._table.n
        if i < 0:
            i += n
        if not 0 <= i < n:
            raise IndexError(i)
        return Variant(i, self._table.names[i], self._table.values(i), self._table)


class VariantTable:
    """The variants of a sweep held by column: the base scene once, one array per varied key.

    Row ``i`` is variant ``i``.  A column holds the values the variants set
    (numbers as float arrays, text as object arrays) and a mask of the rows that
    set the key at all (a named variant may leave a key at the base scene's
    value).  ``group_ids`` number the distinct combinations of the keys outside
    the moves, ``move_ids`` the distinct combinations of the move keys: the batch
    engine builds a model per group and the motion profiles per distinct move,
    and a full :class:`Scene` only for a variant that falls back to the
    single-run solver (:meth:`scene`).

    Parameters
    ----------
    base : Scene
        The base scene.
    columns : dict
        Dotted key -> ndarray (n,) of the values (float, int or object).
    given : dict
        Dotted key -> ndarray (n,) of bool: the rows that set the key.
    names : list of str
        Each variant's name ("" for the product's).
    file : str, optional
        The sweep file's name, named in errors.
    allow_implausible : bool, optional
        Accept values beyond the plausibility limits when a scene is built.
    """

    def __init__(self, base: Scene, columns: dict, given: dict, names, file: str = "<sweep>",
                 allow_implausible: bool = False):
        self.base = base
        self.keys = tuple(columns)
        self.columns = columns
        self.given = given
        self.names = list(names)
        self.n = len(self.names)
        self.file = file
        self.allow_implausible = allow_implausible
        self.move_keys = tuple(k for k in self.keys if k.startswith("moves."))
        self.other_keys = tuple(k for k in self.keys if not k.startswith("moves."))
        self.group_ids, self._group_first = self.codes(self.other_keys, effective=False)
        self.move_ids, self._move_first = self.codes(self.move_keys, effective=False)
        self._scenes: dict = {}        # scenes built and validated from their documents
        self._group_scenes: dict = {}  # group -> a validated scene with its values
        self._move_scenes: dict = {}   # move combination -> a validated scene with its moves
        #: What the batch engine builds once per table and reuses from chunk to chunk (its own cache).
        self.engine_cache = None
        #: (dotted move key, profile) -> number of variants where the key was left out.
        self.ignored: dict = {}

    def effective(self, key: str) -> np.ndarray:
        """Every variant's value of a compared key (the base scene's where a variant sets none).

        Parameters
        ----------
        key : str
            A compared dotted key.

        Returns
        -------
        ndarray (n,)
            Floats for a key whose values are all numbers (not booleans), objects otherwise.
        """
        col, given = self.columns[key], self.given[key]
        if not given.all():
            col = col.astype(object)
            col[~given] = get_dotted(self.base.raw, key)
        if col.dtype == object and _numeric(col.tolist()):
            col = col.astype(float)
        return col

    def codes(self, keys, effective: bool = True):
        """Number the distinct combinations of some compared keys, in order of first appearance.

        The one implementation of "which variants share these values", for the
        engine's groups and move combinations, the rankings and the report's plots.

        Parameters
        ----------
        keys : sequence of str
            Compared dotted keys (none: every variant in one combination).
        effective : bool, optional
            Compare the values variants have (a key left unset has the base scene's);
            False tells a set key from an unset one too (the engine's groups, whose
            documents differ).

        Returns
        -------
        codes : ndarray of int (n,)
            Each variant's combination, 0 for the first to appear.
        first : ndarray of int
            The first variant of each combination.
        """
        if not keys or self.n == 0:
            return np.zeros(self.n, dtype=np.intp), np.zeros(min(self.n, 1), dtype=np.intp)
        parts = []
        for k in keys:
            col = self.effective(k) if effective else self.columns[k]
            if col.dtype == object:
                lookup: dict = {}
                inv = np.array([lookup.setdefault(repr(x), len(lookup)) for x in col.tolist()], dtype=np.intp)
            else:
                _, inv = np.unique(col, return_inverse=True)
            inv = inv.reshape(-1) + 1
            parts.append(inv if effective else np.where(self.given[k], inv, 0))
        _, first, inv = np.unique(np.stack(parts, axis=1), axis=0, return_index=True, return_inverse=True)
        order = np.argsort(first, kind="stable")
        renum = np.empty_like(order)
        renum[order] = np.arange(len(order))
        return renum[inv.reshape(-1)].astype(np.intp), first[order].astype(np.intp)

    def values(self, i: int) -> dict:
        """The values variant ``i`` sets (dotted key -> value, as the sweep file gave it).

        Parameters
        ----------
        i : int
            Row (variant index).

        Returns
        -------
        dict
            Only the keys the variant sets.
        """
        return {k: _plain(self.columns[k][i]) for k in self.keys if self.given[k][i]}

    def value(self, i: int, key: str):
        """The value of a compared key in variant ``i`` (the base scene's where the variant sets none).

        Parameters
        ----------
        i : int
            Row (variant index).
        key : str
            A dotted key of :attr:`keys`.

        Returns
        -------
        object
            The value.
        """
        if self.given[key][i]:
            return _plain(self.columns[key][i])
        return get_dotted(self.base.raw, key)

    def document(self, i: int) -> dict:
        """The scene document of variant ``i``: the base scene's with the variant's values.

        Keys a move's profile does not use are left out when the variant sets the
        profile (see the module docstring).

        Parameters
        ----------
        i : int
            Row (variant index).

        Returns
        -------
        dict
            A new document (the base scene's is not changed).
        """
        d = copy.deepcopy(self.base.raw)
        vals = self.values(i)
        for k, val in vals.items():
            _set_in_place(d, k, val)
        for idx in {int(k.split(".")[1]) for k in vals if k.startswith("moves.") and k.endswith(".profile")}:
            _drop_unused(d["moves"][idx])
        return d

    def scene(self, i: int) -> Scene:
        """The scene of variant ``i``.

        Composed from its group's scene (every key outside the moves) and its
        move combination's scene (the moves), both validated, with the variant's
        own document as ``raw``: no file is read again (a Dask worker gets the two
        scenes with its column slice).  The load validated every combination
        (:func:`_check_combinations`).

        Parameters
        ----------
        i : int
            Row (variant index).

        Returns
        -------
        Scene
            The scene.

        Raises
        ------
        InputError
            When a scene it is composed from is not valid (naming the sweep file and the variant).
        """
        sc = self._scenes.get(i)
        if sc is not None:
            return sc
        gs = self.group_scene(int(self.group_ids[i]))
        ms = self.move_scene(int(self.move_ids[i]))
        return dataclasses.replace(gs, moves=ms.moves, raw=self.document(i))

    def built(self, i: int) -> Scene:
        """The scene of variant ``i`` built from its document and validated (cached).

        Parameters
        ----------
        i : int
            Row (variant index).

        Returns
        -------
        Scene
            The validated scene.

        Raises
        ------
        InputError
            When the variant is not a valid scene.
        """
        sc = self._scenes.get(i)
        if sc is None:
            sc = self._scenes[i] = self._build(i)
        return sc

    def _build(self, i):
        try:
            sc = scene_from_dict(self.document(i), file=self.base.file, base_dir=self.base.base_dir)
            check_plausible(sc, allow=self.allow_implausible)
        except SceneError as exc:
            label = f"variant {i}" + (f" '{self.names[i]}'" if self.names[i] else "")
            raise InputError(self.file, "variants" if self.names[i] else "vary",
                             f"{label} ({_describe(self.values(i))}) is not a valid scene: "
                             f"{exc.one_line()}") from None
        return sc

    def group_scene(self, g: int) -> Scene:
        """A validated scene with the values of group ``g`` (the keys outside the moves).

        Parameters
        ----------
        g : int
            A value of :attr:`group_ids`.

        Returns
        -------
        Scene
            The scene of the group's first variant.
        """
        sc = self._group_scenes.get(g)
        if sc is None:
            sc = self._group_scenes[g] = self.built(int(self._group_first[g]))
        return sc

    def move_scene(self, m: int) -> Scene:
        """A validated scene with the move values of combination ``m``.

        Parameters
        ----------
        m : int
            A value of :attr:`move_ids`.

        Returns
        -------
        Scene
            The scene of the combination's first variant (its ``moves`` are the combination's).
        """
        sc = self._move_scenes.get(m)
        if sc is None:
            sc = self._move_scenes[m] = self.built(int(self._move_first[m]))
        return sc

    def take(self, rows) -> "VariantTable":
        """The table of some rows only (column slices), e.g. one chunk for a Dask worker.

        Parameters
        ----------
        rows : sequence of int
            Row indices.

        Returns
        -------
        VariantTable
            A table whose row ``j`` is this table's row ``rows[j]``; its scenes are
            built again where they are needed.
        """
        rows = np.asarray(rows, dtype=np.intp)
        t = VariantTable(self.base, {k: c[rows] for k, c in self.columns.items()},
                         {k: g[rows] for k, g in self.given.items()}, [self.names[i] for i in rows],
                         self.file, self.allow_implausible)
        # the validated scenes its rows are composed from travel with the slice (no file is read again)
        for g, first in enumerate(t._group_first):
            t._group_scenes[g] = self.group_scene(int(self.group_ids[rows[first]]))
        for m, first in enumerate(t._move_first):
            t._move_scenes[m] = self.move_scene(int(self.move_ids[rows[first]]))
        return t

    def __getstate__(self):
        d = dict(self.__dict__)
        d["engine_cache"] = None
        d["_scenes"] = {}  # scenes are rebuilt where they are needed (small pickles to workers)
        return d


def _plain(x):
    """A column cell as the sweep file gave it (numpy scalars to Python numbers)."""
    if isinstance(x, np.generic):
        return x.item()
    return x


def _set_in_place(d: dict, dotted: str, value) -> None:
    parts = dotted.split(".")
    cur = d
    for part in parts[:-1]:
        if isinstance(cur, list):
            cur = cur[list_index(part)]
        else:
            cur = cur.setdefault(part, {})
    if isinstance(cur, list):
        cur[list_index(parts[-1])] = copy.deepcopy(value)
    else:
        cur[parts[-1]] = copy.deepcopy(value)


def _unused_keys(move: dict) -> list:
    """Keys of a move table that its profile does not take (quantities and profile-specific keys)."""
    prof = move.get("profile")
    spec = PROFILES.get(prof)
    if spec is None:
        return []
    slew = move.get("axis") == "slew"
    names = _ANGULAR_KEYS if slew else _LINEAR_KEYS
    out = []
    for q, key in names.items():
        if key in move and q not in spec.needs and q not in spec.optional:
            out.append(key)
    own = set(spec.keys)
    for key in sorted({k for sp in PROFILES.values() for k in sp.keys}):
        if key in move and key not in own:
            out.append(key)
    return out


def _drop_unused(move: dict) -> list:
    dropped = _unused_keys(move)
    for k in dropped:
        del move[k]
    return dropped


_LINEAR_KEYS = {"distance": "distance_m", "speed": "speed_m_s", "accel": "accel_m_s2",
                "decel": "decel_m_s2", "jerk": "jerk_m_s3"}
_ANGULAR_KEYS = {"distance": "distance_deg", "speed": "speed_deg_s", "accel": "accel_deg_s2",
                 "decel": "decel_deg_s2", "jerk": "jerk_deg_s3"}


@dataclass(frozen=True)
class Sweep:
    """A validated sweep: the base scene, the compared keys, the variant table, the objective.

    ``keys`` are the dotted scene keys of the comparison's columns, in order;
    ``minimize`` the summary number the ranking sorts by and ``limits`` the upper
    bounds a variant must keep to be ranked; ``robust_over`` a compared key the
    ranking takes the worst case over (None: every variant on its own) and
    ``group_by`` compared keys to rank within each of their combinations.
    ``table`` holds the variants by column (:class:`VariantTable`); ``variants``
    reads them as :class:`Variant` objects made on demand.
    """

    file: str
    title: str
    base: Scene
    keys: tuple
    table: VariantTable
    minimize: str = "settled_at_s"
    limits: dict = field(default_factory=dict)
    sensitivity: bool = True
    notes: str = ""
    robust_over: str | None = None
    group_by: tuple = ()

    @property
    def variants(self) -> Sequence:
        """The variants in order (made on demand from the table)."""
        return _Variants(self.table)

    @property
    def scenes(self) -> list:
        """The variants' scenes, in variant order (each built and validated on first use)."""
        return [self.table.scene(i) for i in range(self.table.n)]


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
        if k not in ("minimize", "max", "robust_over", "group_by"):
            raise InputError(file, f"objective.{k}", "unknown key; allowed: minimize, max, robust_over, group_by")
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

    keys = list(lists)
    extra = []  # (where, dotted key -> value) of the named variants
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
            if k not in keys:
                keys.append(k)
        extra.append((name, vals))

    # the columns: the product's values by index arithmetic (first key slowest), then the named rows
    n = n_prod + len(extra)
    columns, given = {}, {}
    sizes = [len(v) for v in lists.values()]
    for pos, k in enumerate(keys):
        vals = lists.get(k)
        if vals is not None:
            inner = math.prod(sizes[pos + 1:])
            codes = (np.arange(n_prod) // inner) % len(vals)
            floats = _numeric(vals) and not all(isinstance(x, int) for x in vals)
            prod_vals = np.asarray(vals, float)[codes] if floats else [vals[c] for c in codes]
        else:
            prod_vals = [None] * n_prod
        named_vals = [v.get(k) for _, v in extra]
        cells = list(prod_vals) + named_vals
        mask = np.array([vals is not None] * n_prod + [k in v for _, v in extra], dtype=bool)
        if _numeric([c for c, m in zip(cells, mask) if m]):
            col = np.array([float(c) if m else math.nan for c, m in zip(cells, mask)], dtype=float)
            if all(isinstance(c, int) and not isinstance(c, bool) for c, m in zip(cells, mask) if m):
                col = col.astype(object)
                col[mask] = [c for c, m in zip(cells, mask) if m]
        else:
            col = np.empty(n, dtype=object)
            col[:] = cells
        columns[k], given[k] = col, mask
    _check_columns(file, base, keys, lists, extra, n_prod)
    table = VariantTable(base, columns, given, [""] * n_prod + [nm for nm, _ in extra], file, allow_implausible)
    _check_combinations(table)
    _count_ignored(table)

    # ranking rules that name compared keys
    robust = obj.get("robust_over")
    if robust is not None and (not isinstance(robust, str) or robust not in keys):
        raise InputError(file, "objective.robust_over", "expected one of the compared keys: "
                         + ", ".join(keys), robust)
    group_by = obj.get("group_by", [])
    if isinstance(group_by, str):
        group_by = [group_by]
    if not isinstance(group_by, list) or any(not isinstance(g, str) or g not in keys for g in group_by):
        raise InputError(file, "objective.group_by", "expected a compared key or a list of them: "
                         + ", ".join(keys), group_by)
    if robust is not None and robust in group_by:
        raise InputError(file, "objective.group_by", "cannot also be objective.robust_over", robust)
    return Sweep(file=file, title=title, base=base, keys=tuple(keys), table=table,
                 minimize=minimize, limits=limits, sensitivity=sens, notes=notes,
                 robust_over=robust, group_by=tuple(group_by))


def _numeric(values) -> bool:
    return bool(len(values)) and all(isinstance(x, (int, float)) and not isinstance(x, bool) for x in values)


def _check_columns(file, base, keys, lists, extra, n_prod):
    """Each distinct value of each column against its scene key (type, bounds, choices), once.

    The error names the sweep key, the value and the first variant that has it.
    """
    reader = KeyReader(base.file, base.base_dir)
    for k in keys:
        key = _schema_key(k)
        seen = set()
        checks = []
        if k in lists:
            sizes = [len(v) for v in lists.values()]
            pos = list(lists).index(k)
            inner = math.prod(sizes[pos + 1:])
            checks += [(f'vary."{k}"', v, j * inner) for j, v in enumerate(lists[k])]
        checks += [(f'variants[{i}]."{k}"', v[k], n_prod + i) for i, (_, v) in enumerate(extra) if k in v]
        for where, value, row in checks:
            tag = repr(value)
            if tag in seen:
                continue
            seen.add(tag)
            try:
                reader.value({"v": value}, "v", key, k)
            except SceneError as exc:
                raise InputError(file, where, f"{exc.problem} (first in variant {row})", value) from None


def _schema_key(dotted: str):
    parts = dotted.split(".")
    if parts[0] in schema.TOP:
        return schema.TOP[parts[0]]
    if parts[0] in schema.TABLES:
        return schema.TABLES[parts[0]][parts[1]]
    return schema.ARRAYS[parts[0]][parts[2]]


def _separable(table: VariantTable) -> bool:
    """Whether the move keys and the other keys can be validated apart (see :func:`_check_combinations`).

    They can when nothing couples a move to the other varied keys beyond the
    swing period a shaped move is tuned to: no crane key, duration or move axis
    varies, no move hoists, and no boom luffs.
    """
    if any(k.startswith("crane.") or k == "duration_s" for k in table.other_keys):
        return False
    if any(k.endswith(".axis") for k in table.move_keys):
        return False
    axes = {m.axis for m in table.base.moves}
    if "hoist" in axes or (table.base.crane.has_boom and "radius" in axes):
        return False
    return True


def _check_combinations(table: VariantTable) -> None:
    """Validate every variant as a scene, building as few scenes as that takes.

    When the move keys and the other keys are separable (:func:`_separable`), a
    variant is valid when the first variant of its group (other keys) and the
    first of its move combination are valid scenes, and each shaped move tuned to
    the swing period still ends within the run at each group's period: so one
    scene per group and per move combination is built, not one per variant.
    Otherwise every variant is built and validated (and not kept).
    """
    if not _separable(table):
        for i in range(table.n):
            table._build(i)
        return
    for i in sorted(set(table._group_first.tolist()) | set(table._move_first.tolist())):
        table.built(i)
    tuned = [m for m in range(len(table._move_first)) if needs_swing_period(table.move_scene(m))]
    if not tuned:
        return
    for g in range(len(table._group_first)):
        gs = table.group_scene(g)
        period = float(select_model(gs).mode_periods_s()[0])
        for m in tuned:
            ms = table.move_scene(m)
            for mv in ms.moves:
                try:
                    prof = build_profile(mv, gs, period)
                    late = prof.end_s > gs.duration_s + 1e-9
                except SceneError as exc:
                    late, why = True, exc.problem
                else:
                    why = (f"{move_key(mv)} ends at {prof.end_s:.3f} s, after the end of the simulation "
                           f"(duration_s = {gs.duration_s:g}); lengthen duration_s")
                if late:
                    i = int(np.flatnonzero((table.group_ids == g) & (table.move_ids == m))[0])
                    raise InputError(table.file, "vary", f"variant {i} ({_describe(table.values(i))}) is not a "
                                     f"valid scene: {why}")


def _count_ignored(table: VariantTable) -> None:
    """Count the move keys left out because the variant's profile does not use them (said in the report)."""
    for m in range(len(table._move_first)):
        i = int(table._move_first[m])
        vals = table.values(i)
        count = int(np.count_nonzero(table.move_ids == m))
        for idx in {int(k.split(".")[1]) for k in vals if k.startswith("moves.") and k.endswith(".profile")}:
            raw = copy.deepcopy(table.base.raw["moves"][idx])
            for k, v in vals.items():
                if k.startswith(f"moves.{idx}."):
                    raw[k.split(".")[2]] = v
            for key in _unused_keys(raw):
                tag = (f"moves.{idx}.{key}", raw["profile"])
                table.ignored[tag] = table.ignored.get(tag, 0) + count
