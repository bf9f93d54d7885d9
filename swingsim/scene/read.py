"""Reading scene files: the TOML document, the CSV tables of recorded moves and capacity charts, key by key.

Every error names the file, the key path, the value and what is allowed, and
suggests the nearest known key when a key is unknown.  The keys are those of
:mod:`swingsim.scene.schema`; checks between keys live in
:mod:`swingsim.scene.validate`.  Nothing in a scene file is evaluated: it is
data only.
"""

from __future__ import annotations

import copy
import csv
import difflib
import math
import re
import tomllib
import unicodedata
from pathlib import Path
from typing import NamedTuple

from swingsim.errors import SceneError, quote
from swingsim.io.failures import read_text_file
from swingsim.scene import schema
from swingsim.scene.plausibility import MAX_TABLE_BYTES, MAX_NOTES_CHARS, MAX_TABLE_ROWS, check_text
from swingsim.scene.model import MoveTable, RatedChart

__all__ = ["SceneDocument", "MAX_NESTING", "parse_toml", "read_document", "line_of_key", "KeyReader", "read_table", "read_chart", "suggest"]


class SceneDocument(NamedTuple):
    """A scene file parsed as TOML, not yet validated."""

    #: The parsed document, as ``tomllib`` returns it.
    data: dict
    #: The file's text (for the line numbers of keys).
    text: str
    #: The file's name as the user gave it (never resolved to an absolute path).
    file: str


def _toml_error_line(exc: tomllib.TOMLDecodeError) -> int | None:
    lineno = getattr(exc, "lineno", None)
    if lineno:
        return int(lineno)
    m = re.search(r"line (\d+)", str(exc))
    return int(m.group(1)) if m else None


#: Deepest nesting of tables and arrays in a scene or sweep file (a scene needs 5:
#: the document, ``[[zones]]``, one zone, its list of points, one point).
MAX_NESTING = 8


def _nesting_depth(data) -> int:
    """Deepest nesting of dicts and lists in ``data`` (the document itself is 1), without recursion."""
    deepest = 0
    stack = [(data, 1)]
    while stack:
        node, depth = stack.pop()
        deepest = max(deepest, depth)
        if depth > MAX_NESTING:
            break
        children = node.values() if isinstance(node, dict) else node
        stack.extend((c, depth + 1) for c in children if isinstance(c, (dict, list)))
    return deepest


def parse_toml(text: str, file: str, kind: str = "scene", error=SceneError) -> dict:
    """Parse a TOML scene or sweep file's text, refusing syntax errors and deep nesting in one line.

    Parameters
    ----------
    text : str
        The file's text.
    file : str
        The file's name as the user gave it, for errors.
    kind : str, optional
        What the file is (``scene``, ``sweep``), for errors.
    error : type, optional
        The :class:`~swingsim.errors.InputError` subclass to raise.

    Returns
    -------
    dict
        The document, as ``tomllib`` returns it.

    Raises
    ------
    InputError
        For a TOML syntax error (with its line) or tables and arrays nested
        more than :data:`MAX_NESTING` deep.
    """
    too_deep = f"tables and arrays nested more than {MAX_NESTING} deep; a {kind} file needs far fewer"
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        msg = str(exc).split(" (at ")[0]
        raise error(file, "", f"TOML syntax error: {msg}", line=_toml_error_line(exc)) from None
    except RecursionError:
        raise error(file, "", too_deep) from None
    if _nesting_depth(data) > MAX_NESTING:
        raise error(file, "", too_deep)
    return data


def read_document(path) -> SceneDocument:
    """Read a scene file as a TOML document.

    Parameters
    ----------
    path : str or Path
        The TOML scene file, as the user gave it.

    Returns
    -------
    SceneDocument
        The parsed document, its text and the file's name.

    Raises
    ------
    SceneError
        When the file is missing, not a regular file, unreadable, not UTF-8
        text (a leading byte-order mark is removed) or not valid TOML (with the
        line of a syntax error), or nested too deeply.
    """
    shown = str(path)
    text = read_text_file(path, lambda problem: SceneError(shown, "", f"{problem} (a scene is a TOML text file)"))
    return SceneDocument(parse_toml(text, shown), text, shown)


_KEY_PATH = re.compile(r"^(?P<table>[A-Za-z_][\w-]*)(\[(?P<index>[0-9]+)\])?(\.(?P<key>[\w-]+))?")


def line_of_key(text: str, key_path: str) -> int | None:
    """Best-effort line number of a key path like ``moves[1].accel_m_s2`` in TOML text.

    Parameters
    ----------
    text : str
        The scene file's text.
    key_path : str
        A key path as errors name it: ``duration_s``, ``rope.length_m``,
        ``[rigging]``, ``moves[1].accel_m_s2``.

    Returns
    -------
    int or None
        The 1-based line of the key, else of its table's header; None when
        neither is found.
    """
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


def suggest(name: str, allowed) -> str:
    """The problem text for an unknown key, with the nearest allowed key when there is one.

    Parameters
    ----------
    name : str
        The unknown key as written.
    allowed : iterable of str
        The keys allowed at that place, in the order to list them.

    Returns
    -------
    str
        ``unknown key (did you mean '...'?); allowed: ...``.
    """
    near = difflib.get_close_matches(name, list(allowed), n=1, cutoff=0.6)
    hint = f" (did you mean '{near[0]}'?)" if near else ""
    return f"unknown key{hint}; allowed: {', '.join(allowed)}"


class KeyReader:
    """Reads the keys of one scene document against the schema, one key at a time.

    Parameters
    ----------
    file : str
        The scene file's name as the user gave it (named in every error).
    base_dir : Path
        Folder that relative paths in the scene are relative to.
    """

    def __init__(self, file: str, base_dir: Path):
        self.file = file
        self.base_dir = base_dir

    def err(self, key, problem, value=SceneError._MISSING):
        """A :class:`SceneError` about one key of this scene.

        Parameters
        ----------
        key : str
            Key path, e.g. ``moves[0].accel_m_s2`` (may be empty).
        problem : str
            What is wrong and what is allowed.
        value : object, optional
            The offending value, shown in the message.

        Returns
        -------
        SceneError
            The error, for the caller to raise.
        """
        return SceneError(self.file, key, problem, value)

    def check_unknown(self, table: dict, keys: dict, prefix: str) -> None:
        """Refuse the first key of ``table`` that ``keys`` does not name.

        Parameters
        ----------
        table : dict
            A table of the document.
        keys : dict
            The schema's keys of that table (name -> :class:`~swingsim.scene.schema.Key`).
        prefix : str
            Key path of the table with a trailing dot, e.g. ``rope.`` or ``moves[1].``.

        Raises
        ------
        SceneError
            For an unknown key, with the nearest known one.
        """
        for name in table:
            if name not in keys:
                raise self.err(f"{prefix}{name}", suggest(name, keys))

    def value(self, table: dict, name: str, key: schema.Key, where: str):
        """One key's value, checked against its schema entry (type, bounds, choices).

        Parameters
        ----------
        table : dict
            The table (or document) that holds the key.
        name : str
            The key's name in ``table``.
        key : swingsim.scene.schema.Key
            The key's schema entry.
        where : str
            The key's full path for errors, e.g. ``rope.length_m``.

        Returns
        -------
        object
            The value: a float for numbers, a tuple of floats for vectors, a
            tuple of points for point lists, a string or bool as given; a copy
            of the default when the key is absent.

        Raises
        ------
        SceneError
            When a required key is missing or the value is not allowed.
        """
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
            problem = check_text(v, **({"limit": MAX_NOTES_CHARS, "allow": "\n\t"} if name == "notes" else {}))
            if problem:
                raise self.err(where, problem, v[:80])
            if key.choices and v not in key.choices:
                raise self.err(where, f"expected {key.allowed()}{key.did_you_mean(v)}", v)
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
            return self.value({name: v}, name, schema.Key("floats", key.doc, gt=key.gt, ge=key.ge,
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
        if k == "strs":
            if (not isinstance(v, list) or any(not isinstance(x, str) for x in v)
                    or len(set(v)) != len(v)):
                raise bad()
            for x in v:
                if key.choices and x not in key.choices:
                    raise self.err(where, f"expected {key.allowed()}{key.did_you_mean(x)}; '{x}' is not one", v)
            return tuple(v)
        if k == "path":
            if not isinstance(v, str) or not v or "\x00" in v:
                raise bad()
            return v
        raise AssertionError(k)  # pragma: no cover

    def table(self, data: dict, name: str, keys: dict, required: bool = False) -> dict:
        """Every key of one table of the document, checked (defaults for the absent ones).

        Parameters
        ----------
        data : dict
            The whole scene document.
        name : str
            The table's name, e.g. ``rope``.
        keys : dict
            The schema's keys of the table (name -> :class:`~swingsim.scene.schema.Key`).
        required : bool, optional
            Whether the table must be present.

        Returns
        -------
        dict
            Key name -> value (see :meth:`value`), for every key of the schema.

        Raises
        ------
        SceneError
            For a missing required table, a value that is not a table, an
            unknown key or a value that is not allowed.
        """
        t = data.get(name, {})
        if name not in data and required:
            raise self.err(f"[{name}]", "missing required table")
        if not isinstance(t, dict):
            raise self.err(name, "expected a table ([" + name + "])", t)
        self.check_unknown(t, keys, f"{name}.")
        return {k: self.value(t, k, key, f"{name}.{k}") for k, key in keys.items()}


class _Row(NamedTuple):
    """One data row of a two-column CSV file."""

    #: 1-based number of the row among the data rows.
    number: int
    #: 1-based line of the row in the file.
    line: int
    first: float
    second: float


def _read_two_columns(file: str, base_dir: Path, header: tuple, noun: str, err, row_name,
                      header_hint: str = "") -> list:
    """The data rows of a two-column CSV file with an exact header (``#`` lines are comments).

    Shared by the move tables and the capacity chart: the checks every such file
    needs (found, readable text, the header, two finite numbers a row, at least
    two rows); the caller checks what its columns mean.  ``err(problem)`` makes the
    caller's error; ``row_name(row)`` names a row in it (e.g. ``line 4 of the chart``).
    """
    p = Path(file)
    full = p if p.is_absolute() else base_dir / p
    if not full.exists():
        raise err(f"{noun} file not found (paths are relative to the scene file's folder)")
    if full.is_file() and full.stat().st_size > MAX_TABLE_BYTES:
        raise err(f"the {noun} file is larger than {MAX_TABLE_BYTES // 1_000_000} MB (at most "
                  f"{MAX_TABLE_ROWS} rows are read)")
    text = read_text_file(full, err)
    lines = [(i, r) for i, r in enumerate(csv.reader(text.splitlines()), start=1)
             if r and not r[0].lstrip().startswith("#")]
    want = ",".join(header)
    if not lines:
        raise err(f"empty {noun}; expected a header {want}")
    found = [h.strip() for h in lines[0][1]]
    if found != list(header):
        raise err(f"the {noun}'s header must be exactly '{want}'{header_hint} ({_found_header(found)})")
    if len(lines) - 1 > MAX_TABLE_ROWS:
        raise err(f"the {noun} has {len(lines) - 1} data rows; at most {MAX_TABLE_ROWS} are allowed")
    rows = []
    for number, (line, r) in enumerate(lines[1:], start=1):
        here = row_name(_Row(number, line, math.nan, math.nan))
        if len(r) != 2:
            raise err(f"{here}: expected 2 columns, found {len(r)}")
        numbers = []
        for column, cell in zip(header, r):
            if not PLAIN_NUMBER.fullmatch(cell.strip()):  # plain decimals only: no 1_0.0, no inf
                raise err(f"{here}: expected a number in column {column}, found {quote(cell.strip())}")
            numbers.append(float(cell))
        a, b = numbers
        if not (math.isfinite(a) and math.isfinite(b)):
            raise err(f"{here}: values must be finite numbers")
        rows.append(_Row(number, line, a, b))
    if len(rows) < 2:
        raise err(f"a {noun} needs at least two data rows")
    return rows


def _found_header(cells: list) -> str:
    """What a wrong header is shown as: its names quoted when it is a header of names, else not at all.

    A first line that is not a short list of column names (another kind of
    file: a password file, an environment dump, JSON) is never quoted.
    """
    def name_like(cell):
        return 0 < len(cell) <= 40 and all(
            ch.isalnum() or ch in "_ .()-" or unicodedata.category(ch) == "Cf" for ch in cell)

    if len(cells) <= 4 and all(name_like(c) for c in cells):
        return f"found {quote(','.join(cells))}"
    return "its first line is not a header of column names"


#: A plain decimal number (no digit separators, no non-ASCII digits, no inf or nan words).
PLAIN_NUMBER = re.compile(r"[+-]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?", re.ASCII)

#: Smallest interval between two times of a recorded move [s]: a record sampled faster than 10 kHz,
#: or times in the wrong unit, would make the spline's accelerations overflow.
MIN_TABLE_STEP_S = 1e-4


def _check_increasing(rows: list, what: str, err, row_name) -> None:
    """Refuse the first row whose first column does not exceed the row before (``what`` names it)."""
    for before, row in zip(rows, rows[1:]):
        if row.first <= before.first:
            raise err(f"{row_name(row)}: {what} must increase strictly ({before.first:g} then {row.first:g})")


def read_table(file: str, base_dir: Path, key: str, axis: str, scene_file: str = "<scene>") -> MoveTable:
    """Read a table profile's CSV: header ``t_s,position_m`` (``t_s,angle_deg`` for slew).

    Errors name the scene file and the key that names the table, with the
    table's row where it applies.

    Parameters
    ----------
    file : str
        The CSV file as the scene names it (``table_file``).
    base_dir : Path
        Folder a relative ``file`` is relative to (the scene file's).
    key : str
        Key path of ``table_file`` in the scene, e.g. ``moves[0].table_file``.
    axis : str
        The move's axis; ``slew`` tables are in degrees, the others in metres.
    scene_file : str, optional
        The scene file's name, for errors.

    Returns
    -------
    MoveTable
        Times from the move's start [s] (from 0, strictly increasing) and
        displacements [m], or [deg] for slew.

    Raises
    ------
    SceneError
        When the file is missing or unreadable, or its header, rows or times
        are not those of a table profile.
    """
    want = "angle_deg" if axis == "slew" else "position_m"

    def err(problem):
        return SceneError(scene_file, key, problem, file)

    def row_name(row):
        return f"data row {row.number} of the table"

    rows = _read_two_columns(file, base_dir, ("t_s", want), "table", err, row_name,
                             header_hint=f" for axis {axis}")
    if rows[0].first != 0.0:
        raise err(f"the table's first time must be 0 (times count from the move's start), found {rows[0].first:g}")
    _check_increasing(rows, "times", err, row_name)
    for before, row in zip(rows, rows[1:]):
        if row.first - before.first < MIN_TABLE_STEP_S:
            raise err(f"{row_name(before)} and the next are {row.first - before.first:.3g} s apart; times must "
                      f"be at least {MIN_TABLE_STEP_S:g} s apart (times in seconds, a record of at most 10 kHz)")
    return MoveTable(tuple(r.first for r in rows), tuple(r.second for r in rows))


def read_chart(file: str, base_dir: Path, key: str = "crane.chart_file", scene_file: str = "<scene>") -> RatedChart:
    """Read a rated capacity chart: a CSV with the header ``radius_m,capacity_kg``.

    Errors name the scene file, the key that names the chart and the line of
    the chart file where it applies.

    Parameters
    ----------
    file : str
        The CSV file as the scene names it (``crane.chart_file``).
    base_dir : Path
        Folder a relative ``file`` is relative to (the scene file's).
    key : str, optional
        Key path of the chart file in the scene.
    scene_file : str, optional
        The scene file's name, for errors.

    Returns
    -------
    RatedChart
        Radii [m] (>= 0, strictly increasing) and capacities [kg] (> 0).

    Raises
    ------
    SceneError
        When the file is missing or unreadable, or its header, radii or
        capacities are not those of a chart.
    """
    def err(problem):
        return SceneError(scene_file, key, problem, file)

    def row_name(row):
        return f"line {row.line} of the chart"

    rows = _read_two_columns(file, base_dir, ("radius_m", "capacity_kg"), "chart", err, row_name)
    for row in rows:
        if row.first < 0.0:
            raise err(f"{row_name(row)}: radius {row.first:g} m must be >= 0")
        if row.second <= 0.0:
            raise err(f"{row_name(row)}: capacity {row.second:g} kg must be > 0")
    _check_increasing(rows, "radii", err, row_name)
    return RatedChart(tuple(r.first for r in rows), tuple(r.second for r in rows))
