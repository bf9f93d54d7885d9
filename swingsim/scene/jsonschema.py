"""JSON Schemas (Draft 7) of the scene and sweep files, generated from :mod:`swingsim.scene.schema`.

The same table of keys that validates scenes and writes ``docs/scene-reference.md``
gives each key's JSON Schema: its type, its choices (``enum``), its bounds
(``minimum``, ``exclusiveMinimum``, ...), its default and its description with the
unit in brackets.  Editors that check TOML against a JSON Schema named in a
``#:schema ./path.json`` comment on a file's first line (the Taplo / Even Better
TOML convention) then check and complete scene files as they are typed.

The schemas hold what a schema can say about one key at a time; the rules that
tie keys together (a bridle needs attachment points, a move must stay inside
the crane's limits, ...) stay with ``swingsim check``.  ``swingsim schema``
writes them; the committed copies are in ``schemas/``.
"""

from __future__ import annotations

import json

from swingsim.scene import schema
from swingsim.scene.schema import Key

#: The JSON Schema dialect the files declare.
DRAFT_7 = "http://json-schema.org/draft-07/schema#"

#: Said in every schema's description (the project's caution, short).
_PREVIEW = ("swingsim is a planning and training preview: it does not replace the lift plan, the crane "
            "manufacturer's data, local regulations or the competent person.")


def _number(key: Key, integer: bool = False) -> dict:
    out = {"type": "integer" if integer else "number"}
    for bound, name in ((key.gt, "exclusiveMinimum"), (key.ge, "minimum"), (key.lt, "exclusiveMaximum"),
                        (key.le, "maximum")):
        if bound is not None:
            out[name] = bound
    return out


def _json_value(value):
    """A default as JSON holds it (tuples become lists)."""
    if isinstance(value, tuple):
        return [_json_value(v) for v in value]
    return value


def value_schema(key: Key) -> dict:
    """The JSON Schema of one key's value (no description): type, choices, bounds.

    Parameters
    ----------
    key : swingsim.scene.schema.Key
        The key's entry in the scene schema.

    Returns
    -------
    dict
        A Draft 7 schema.
    """
    k = key.kind
    if k == "float":
        return _number(key)
    if k == "int":
        return _number(key, integer=True)
    if k == "bool":
        return {"type": "boolean"}
    if k == "str":
        return {"type": "string", "enum": list(key.choices)} if key.choices else {"type": "string"}
    if k == "path":
        return {"type": "string", "minLength": 1}
    if k in ("vec2", "vec3"):
        n = 2 if k == "vec2" else 3
        return {"type": "array", "items": _number(key), "minItems": n, "maxItems": n}
    if k == "floats":
        return {"type": "array", "items": _number(key), "minItems": 1}
    if k == "floats_or_float":
        return {"anyOf": [_number(key), {"type": "array", "items": _number(key), "minItems": 1}]}
    if k == "vec3s":
        point = {"type": "array", "items": {"type": "number"}, "minItems": 3, "maxItems": 3}
        return {"type": "array", "items": point, "minItems": 1}
    if k == "strs":
        return {"type": "array", "items": {"type": "string", "enum": list(key.choices)}, "uniqueItems": True}
    raise AssertionError(k)  # pragma: no cover - every kind of schema.Key is above


def key_schema(key: Key) -> dict:
    """One key's JSON Schema with its description (unit in brackets), allowed values and default.

    Parameters
    ----------
    key : swingsim.scene.schema.Key
        The key: its ``doc`` and ``allowed()`` give the description, its ``default`` the default.

    Returns
    -------
    dict
        :func:`value_schema` with ``description`` and, when the key has one, ``default``.
    """
    out = {"description": f"{key.doc} Allowed: {key.allowed()}."}
    out.update(value_schema(key))
    if key.default is not None:
        out["default"] = _json_value(key.default)
    return out


def table_schema(keys: dict, description: str) -> dict:
    """A TOML table of the scene: its keys, the required ones, no others.

    Parameters
    ----------
    keys : dict
        Key name -> :class:`~swingsim.scene.schema.Key`.
    description : str
        What the table is.

    Returns
    -------
    dict
        An ``object`` schema with ``additionalProperties: false`` (the reader refuses unknown keys).
    """
    out = {"type": "object", "description": description,
           "properties": {name: key_schema(k) for name, k in keys.items()}, "additionalProperties": False}
    required = [name for name, k in keys.items() if k.required]
    if required:
        out["required"] = required
    return out


def scene_schema() -> dict:
    """The JSON Schema of a scene file.

    Returns
    -------
    dict
        Draft 7: the top-level keys, one object per table (``[crane]``, ``[rope]``, ...),
        the arrays of tables ``[[moves]]`` and ``[[zones]]``; the required ones required.
    """
    props = {name: key_schema(k) for name, k in schema.TOP.items()}
    for name, keys in schema.TABLES.items():
        props[name] = table_schema(keys, f"[{name}] table of the scene.")
    for name, keys in schema.ARRAYS.items():
        props[name] = {"type": "array", "description": f"[[{name}]]: an array of tables, one per entry.",
                       "items": table_schema(keys, f"One entry of [[{name}]].")}
    for (table, name), keys in schema.NESTED_ARRAYS.items():
        props[table]["properties"][name] = {
            "type": "array", "description": f"[[{table}.{name}]]: an array of tables inside [{table}].",
            "items": table_schema(keys, f"One entry of [[{table}.{name}]].")}
    required = [name for name, k in schema.TOP.items() if k.required] + list(schema.REQUIRED_TABLES)
    return {"$schema": DRAFT_7, "title": "swingsim scene file",
            "description": ("A lift to simulate: crane, rope, load, moves, wind, zones. SI units; every "
                            "quantity's unit is in its key's name. Generated from swingsim/scene/schema.py; "
                            "the cross-checks between keys are made by 'swingsim check'. " + _PREVIEW),
            "type": "object", "properties": props, "required": required, "additionalProperties": False}


def _vary_value(key: Key) -> dict:
    """A [vary] entry of one scene key: a list of its values, or a range of numbers."""
    listed = {"type": "array", "minItems": 1, "items": value_schema(key),
              "description": f"The values to compare. {key.doc}"}
    if key.kind not in ("float", "int"):
        return listed
    ranged = {"type": "object", "description": "count values evenly spaced from 'from' to 'to'.",
              "properties": {"from": {"type": "number"}, "to": {"type": "number"},
                             "count": {"type": "integer", "minimum": 1}},
              "required": ["from", "to", "count"], "additionalProperties": False}
    return {"anyOf": [listed, ranged]}


def _scene_keys():
    """Every scene key as (path for errors and definitions, name, table or array or None, Key)."""
    for name, k in schema.TOP.items():
        yield name, name, None, k
    for table, keys in schema.TABLES.items():
        for name, k in keys.items():
            yield f"{table}.{name}", name, table, k
    for array, keys in schema.ARRAYS.items():
        for name, k in keys.items():
            yield f"{array}.N.{name}", name, array, k


def _dotted_keys(prefix: str) -> dict:
    """Every way a sweep names a scene key, each a ``$ref`` to ``#/definitions/<prefix>:<key path>``.

    Dotted (``"rope.length_m"``, ``"moves.0.profile"``, as the bundled sweeps write
    them) and nested (``[vary.rope]``, or ``rope.length_m`` unquoted, which TOML
    reads as a table), the array entries by index.
    """
    def ref(path):
        return {"$ref": f"#/definitions/{prefix}:{path}"}

    props, patterns, nested = {}, {}, {}
    for path, name, owner, _k in _scene_keys():
        if owner is None:
            props[name] = ref(path)
        elif owner in schema.TABLES:
            props[path] = ref(path)
            nested.setdefault(owner, {})[name] = ref(path)
        else:
            patterns[rf"^{owner}\.[0-9]+\.{name}$"] = ref(path)
            nested.setdefault(owner, {})[name] = ref(path)
    for owner, inner in nested.items():
        entry = {"type": "object", "properties": inner, "additionalProperties": False}
        if owner in schema.ARRAYS:
            patterns[rf"^{owner}\.[0-9]+$"] = entry
            entry = {"type": "object", "patternProperties": {"^[0-9]+$": entry}, "additionalProperties": False}
        props[owner] = entry
    return {"properties": props, "patternProperties": patterns, "additionalProperties": False}


def sweep_schema(top: dict, objective_keys, default_minimize: str) -> dict:
    """The JSON Schema of a sweep file (``swingsim compare``).

    Parameters
    ----------
    top : dict
        The sweep's top-level keys -> what each holds (from :mod:`swingsim.study.variants`).
    objective_keys : sequence of str
        The summary numbers a sweep can rank by or limit.
    default_minimize : str
        The objective when ``minimize`` is not given.

    Returns
    -------
    dict
        Draft 7: ``base`` (required), ``title``, ``notes``, ``sensitivity``, ``[objective]``,
        ``[vary]`` (scene keys -> lists or ranges) and ``[[variants]]`` (name and scene keys).
    """
    docs = {name: f"{what}." for name, what in top.items()}
    definitions = {}
    for path, _name, _owner, k in _scene_keys():
        definitions[f"value:{path}"] = key_schema(k)
        definitions[f"vary:{path}"] = _vary_value(k)
    objective = {"type": "object", "description": docs.get("objective", ""), "additionalProperties": False,
                 "properties": {
                     "minimize": {"type": "string", "enum": list(objective_keys), "default": default_minimize,
                                  "description": "The summary number to rank by; smaller is better."},
                     "max": {"type": "object", "description": "Upper bounds a variant must keep to be ranked: "
                             "summary number = bound (in the number's unit).",
                             "propertyNames": {"enum": list(objective_keys)},
                             "additionalProperties": {"type": "number"}}}}
    vary = {"type": "object", "description": docs.get("vary", ""), **_dotted_keys("vary")}
    variant = {"type": "object", "description": "A hand-picked variant: its name and the scene keys it sets.",
               **_dotted_keys("value"), "required": ["name"]}
    variant["properties"] = {"name": {"type": "string", "minLength": 1, "description": "The variant's name."},
                             **variant["properties"]}
    props = {
        "base": {"type": "string", "minLength": 1, "description": docs.get("base", "")},
        "title": {"type": "string", "description": docs.get("title", "")},
        "notes": {"type": "string", "description": docs.get("notes", "")},
        "sensitivity": {"type": "boolean", "default": True, "description": docs.get("sensitivity", "")},
        "objective": objective,
        "vary": vary,
        "variants": {"type": "array", "items": variant, "description": docs.get("variants", "")},
    }
    if set(props) != set(top):  # pragma: no cover - the sweep reader and this schema name the same keys
        raise AssertionError(f"sweep keys differ from the sweep reader's: {sorted(set(props) ^ set(top))}")
    return {"$schema": DRAFT_7, "title": "swingsim sweep file",
            "description": ("A comparison for 'swingsim compare': a base scene and the scene keys to vary. "
                            "Generated from swingsim/scene/schema.py. " + _PREVIEW),
            "type": "object", "properties": {k: props[k] for k in top if k in props}, "required": ["base"],
            "additionalProperties": False, "definitions": definitions}


def dumps(document: dict) -> str:
    """A schema as the committed files hold it: JSON, two-space indent, a final newline.

    Parameters
    ----------
    document : dict
        A schema of :func:`scene_schema` or :func:`sweep_schema`.

    Returns
    -------
    str
        The text (the same bytes for the same schema module).
    """
    return json.dumps(document, indent=2, ensure_ascii=False) + "\n"
