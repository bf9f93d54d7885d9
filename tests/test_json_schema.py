"""The JSON Schemas of the scene and sweep files (``swingsim schema``, ``schemas/``).

The independent judge is the ``jsonschema`` library (the reference Python
implementation of JSON Schema, https://python-jsonschema.readthedocs.io): it
checks the schemas against the Draft 7 meta-schema and validates every bundled
scene and sweep; known-bad scenes of ``tests/bad_scenes`` whose fault is a
type, a choice, a range or a missing or unknown key must be rejected by it too.
"""

import json
import tomllib
from pathlib import Path

import pytest

from swingsim.cli.main import main
from swingsim.cli.schema import SCENE_FILE, SWEEP_FILE, schemas
from swingsim.scene import schema
from test_scene import GOOD, scene_files

ROOT = Path(__file__).resolve().parent.parent
COMMITTED = ROOT / "schemas"
BAD = ROOT / "tests" / "bad_scenes"


def _jsonschema():
    # the test extra (pyproject.toml); the staleness and command tests below run without it
    return pytest.importorskip("jsonschema")


def _validator(name):
    return _jsonschema().Draft7Validator(json.loads((COMMITTED / name).read_text(encoding="utf-8")))


def _sweep_files():
    return [p for p in sorted((ROOT / "scenes").glob("*.toml")) if "base" in tomllib.loads(p.read_text())]


def test_committed_schemas_are_current():
    # regenerate from swingsim/scene/schema.py and compare byte for byte: a stale file fails here
    for name, text in schemas().items():
        committed = (COMMITTED / name).read_text(encoding="utf-8")
        assert committed == text, (f"schemas/{name} is stale: run 'swingsim schema -o schemas -f' and "
                                   "commit the result")


@pytest.mark.parametrize("name", [SCENE_FILE, SWEEP_FILE])
def test_schemas_are_valid_draft_7(name):
    # the JSON Schema Draft 7 meta-schema, as the jsonschema library ships it
    doc = json.loads((COMMITTED / name).read_text(encoding="utf-8"))
    assert doc["$schema"] == "http://json-schema.org/draft-07/schema#"
    _jsonschema().Draft7Validator.check_schema(doc)
    assert "competent person" in doc["description"]  # the caution travels with the schema


@pytest.mark.parametrize("path", scene_files(), ids=lambda p: p.name)
def test_every_bundled_scene_is_valid_against_the_schema(path):
    errors = [e.message for e in _validator(SCENE_FILE).iter_errors(tomllib.loads(path.read_text()))]
    assert errors == []


@pytest.mark.parametrize("path", _sweep_files(), ids=lambda p: p.name)
def test_every_bundled_sweep_is_valid_against_the_schema(path):
    errors = [e.message for e in _validator(SWEEP_FILE).iter_errors(tomllib.loads(path.read_text()))]
    assert errors == []


@pytest.mark.parametrize("path", scene_files() + _sweep_files(), ids=lambda p: p.name)
def test_bundled_files_name_their_schema_on_the_first_line(path):
    # Taplo's convention: '#:schema <path relative to the file>' as the first line
    first = path.read_text().splitlines()[0]
    assert first.startswith("#:schema "), first
    target = (path.parent / first.split(" ", 1)[1].strip()).resolve()
    is_sweep = "base" in tomllib.loads(path.read_text())
    assert target == (COMMITTED / (SWEEP_FILE if is_sweep else SCENE_FILE)).resolve()


#: Bad scenes whose fault a schema can say (type, choice, range, length, required or unknown key),
#: with the JSON Schema keyword that must catch it.
REJECTED = {
    "axis_unknown.toml": "enum", "crane_kind_unknown.toml": "enum", "rigging_kind_unknown.toml": "enum",
    "wind_onset_unknown.toml": "enum", "chart_includes_unknown.toml": "enum",
    "negative_rope.toml": "exclusiveMinimum", "damping_too_big.toml": "exclusiveMaximum",
    "start_swing_too_big.toml": "exclusiveMaximum", "wind_bearing_out_of_range.toml": "maximum",
    "string_for_number.toml": "type", "site_north_not_a_number.toml": "type", "moves_not_array.toml": "type",
    "vector_wrong_length.toml": "maxItems", "missing_crane.toml": "required", "missing_title.toml": "required",
    "unknown_key_rope.toml": "additionalProperties", "unknown_top_table.toml": "additionalProperties",
    "rigging_unknown_key.toml": "additionalProperties",
}


@pytest.mark.parametrize("name, keyword", sorted(REJECTED.items()))
def test_known_bad_scenes_are_rejected_by_the_schema(name, keyword):
    doc = tomllib.loads((BAD / name).read_text())
    errors = list(_validator(SCENE_FILE).iter_errors(doc))
    assert errors, f"{name} passes the schema"
    assert keyword in {e.validator for e in errors}, [(e.validator, e.message) for e in errors]


def test_schema_carries_choices_bounds_defaults_and_units():
    doc = json.loads((COMMITTED / SCENE_FILE).read_text(encoding="utf-8"))
    props = doc["properties"]
    move = props["moves"]["items"]["properties"]
    assert move["axis"]["enum"] == list(schema.MOVE["axis"].choices)
    assert move["profile"]["enum"] == list(schema.MOVE["profile"].choices)
    rope = props["rope"]["properties"]
    assert rope["length_m"]["exclusiveMinimum"] == schema.TABLES["rope"]["length_m"].gt
    assert rope["falls"]["type"] == "integer" and rope["falls"]["minimum"] == 1 and rope["falls"]["maximum"] == 64
    assert props["gravity_m_s2"]["default"] == pytest.approx(9.80665)  # standard gravity (CGPM 1901)
    assert "[m]" in rope["length_m"]["description"]
    assert set(doc["required"]) >= {"title", "duration_s", "crane", "rope", "load"}


def _good():
    return tomllib.loads(GOOD)


@pytest.mark.parametrize("edit, keyword", [
    (lambda d: d["moves"][0].update(axis="trolley"), "enum"),
    (lambda d: d["rope"].update(falls=1.5), "type"),
    (lambda d: d["rope"].update(falls=0), "minimum"),
    (lambda d: d["load"].update(size_m=[1.0, 2.0]), "minItems"),
    (lambda d: d["crane"].update(chart_includes=["hook", "hook"]), "uniqueItems"),
    (lambda d: d.update(duration_s=0.0), "exclusiveMinimum"),
])
def test_edits_the_loader_refuses_are_refused_by_the_schema(edit, keyword):
    from swingsim.errors import SceneError
    from swingsim.scene import scene_from_dict

    doc = _good()
    assert not list(_validator(SCENE_FILE).iter_errors(doc))
    edit(doc)
    with pytest.raises(SceneError):  # the reader refuses it ...
        scene_from_dict(doc)
    assert keyword in {e.validator for e in _validator(SCENE_FILE).iter_errors(doc)}  # ... and so does the schema


def test_bad_sweeps_are_rejected():
    base = tomllib.loads((_sweep_files()[0]).read_text())
    v = _validator(SWEEP_FILE)
    for edit, keyword in [
        (lambda d: d["objective"].update(minimize="fastest"), "enum"),
        (lambda d: d["vary"].update({"rope.lenght_m": [5.0]}), "additionalProperties"),
        (lambda d: d["vary"].update({"moves.0.profile": ["scurve"]}), "enum"),
        (lambda d: d["vary"].update({"rope.length_m": {"from": 6.0, "to": 9.0}}), "anyOf"),
        (lambda d: d.pop("base"), "required"),
    ]:
        doc = json.loads(json.dumps(base))
        edit(doc)
        assert keyword in {e.validator for e in v.iter_errors(doc)}, keyword
    nested = json.loads(json.dumps(base))  # unquoted dotted keys in TOML are nested tables: also accepted
    nested["vary"] = {"rope": {"length_m": [6.0, 8.0]}, "moves": {"0": {"profile": ["zv", "zvd"]}}}
    assert not list(v.iter_errors(nested))


def test_schema_command_writes_the_committed_files(tmp_path, capsys):
    out = tmp_path / "s"
    assert main(["schema", "-o", str(out)]) == 0
    for name in (SCENE_FILE, SWEEP_FILE):
        assert (out / name).read_bytes() == (COMMITTED / name).read_bytes()
    said = capsys.readouterr().out
    assert "#:schema" in said and SCENE_FILE in said
    # again without --force: refused, exit 2, nothing changed; with -f: replaced; -q: silent
    (out / SCENE_FILE).write_text("{}")
    assert main(["schema", "-o", str(out)]) == 2
    assert (out / SCENE_FILE).read_text() == "{}"
    capsys.readouterr()
    assert main(["schema", "-o", str(out), "-f", "-q"]) == 0
    assert capsys.readouterr().out == ""
    assert (out / SCENE_FILE).read_bytes() == (COMMITTED / SCENE_FILE).read_bytes()


def test_every_default_and_choice_passes_its_own_key_schema():
    # a default or a choice the schema refused would mark a correct scene red in the editor
    doc = json.loads((COMMITTED / SCENE_FILE).read_text(encoding="utf-8"))
    js = _jsonschema()
    places = [(doc["properties"], schema.TOP)]
    places += [(doc["properties"][t]["properties"], keys) for t, keys in schema.TABLES.items()]
    places += [(doc["properties"][a]["items"]["properties"], keys) for a, keys in schema.ARRAYS.items()]
    checked = 0
    for props, keys in places:
        for name, key in keys.items():
            sub = js.Draft7Validator(props[name])
            values = ([] if key.default is None else [json.loads(json.dumps(key.default))])
            if key.choices and key.kind == "str":
                values += list(key.choices)
            for value in values:
                assert not list(sub.iter_errors(value)), (name, value)
                checked += 1
    assert checked > 40
