"""Bad input: a corpus of hand-written bad scenes, and random documents (hypothesis).

Every bad scene must end with one line naming the file and the problem (and,
from the command line, exit code 2, no traceback, nothing written).  Each
corpus file starts with ``# expect: FRAGMENT``, the text its message must hold.
"""

import math
import os
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from swingsim.scene import schema
from swingsim.errors import SceneError
from swingsim.scene import load_scene, scene_from_dict

HERE = Path(__file__).resolve().parent
CORPUS = sorted((HERE / "bad_scenes").glob("*.toml"))


def _expect(path):
    first = path.read_text().splitlines()[0]
    assert first.startswith("# expect: ")
    return first[len("# expect: "):]


@pytest.mark.parametrize("path", CORPUS, ids=lambda p: p.stem)
def test_corpus_message(path):
    with pytest.raises(SceneError) as ei:
        load_scene(path)
    msg = ei.value.one_line()
    assert "\n" not in msg
    assert msg.startswith(str(path))
    assert _expect(path) in msg, msg


def test_corpus_through_cli_exit_2(tmp_path):
    # one subprocess for a sample of the corpus: exit 2, one line, no traceback, nothing written
    env = dict(os.environ, PYTHONPATH=str(HERE.parent))
    for path in CORPUS[::4]:
        out = tmp_path / path.stem
        r = subprocess.run([sys.executable, "-m", "swingsim", "run", str(path), "--out", str(out)],
                           capture_output=True, text=True, env=env, timeout=120)
        assert r.returncode == 2, (path, r.stderr)
        assert len(r.stderr.strip().splitlines()) == 1 and "Traceback" not in r.stderr
        assert _expect(path) in r.stderr
        assert not out.exists()


def test_corpus_messages_carry_line_numbers_where_known():
    # key errors are located in the file (best effort): the line holds the key
    for path in CORPUS:
        try:
            load_scene(path)
        except SceneError as exc:
            if exc.line and exc.key and "." in exc.key and "syntax" not in exc.problem:
                line = path.read_text().splitlines()[exc.line - 1]
                assert exc.key.split(".")[-1] in line or line.strip().startswith("["), (path, line)


# ---------------------------------------------------------------------------
# property-based: random documents and random values reach the loader; the only
# outcomes allowed are a valid scene or a SceneError with a one-line message

VALID = {
    "title": "fuzz", "duration_s": 20.0,
    "crane": {"suspension_m": [0.0, 0.0, 30.0]},
    "rope": {"length_m": 10.0},
    "load": {"mass_kg": 500.0},
    "moves": [{"axis": "x", "profile": "trapezoid", "distance_m": 2.0, "speed_m_s": 0.5,
               "accel_m_s2": 0.3}],
}

toml_scalars = st.one_of(
    st.none(), st.booleans(), st.integers(-10**6, 10**6),
    st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=12),
)
toml_values = st.recursive(
    toml_scalars,
    lambda ch: st.one_of(st.lists(ch, max_size=4), st.dictionaries(st.text(max_size=8), ch, max_size=4)),
    max_leaves=10,
)


def _all_paths():
    paths = [(k,) for k in schema.TOP]
    paths += [(t, k) for t, keys in schema.TABLES.items() for k in keys]
    paths += [("moves", 0, k) for k in schema.MOVE]
    paths += [("zones", 0, k) for k in schema.ZONE]
    return paths


def _set(doc, path, value):
    import copy

    d = copy.deepcopy(doc)
    cur = d
    for p in path[:-1]:
        if isinstance(p, int):
            while len(cur) <= p:
                cur.append({"name": "z", "min_m": [0, 0, 0], "max_m": [1, 1, 1]})
            cur = cur[p]
        else:
            cur = cur.setdefault(p, [] if p in ("moves", "zones") else {})
    if value is None:
        if isinstance(cur, dict):
            cur.pop(path[-1], None)
    else:
        cur[path[-1]] = value
    return d


def _outcome_ok(doc):
    try:
        sc = scene_from_dict(doc, file="fuzz.toml")
    except SceneError as exc:
        msg = exc.one_line()
        assert msg.startswith("fuzz.toml") and "\n" not in msg
        return
    assert math.isfinite(sc.duration_s) and sc.duration_s > 0
    assert sc.rope.length_m > 0 and sc.load.mass_kg > 0


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(path=st.sampled_from(_all_paths()), value=toml_values)
def test_random_value_for_every_key(path, value):
    _outcome_ok(_set(VALID, path, value))


@settings(max_examples=200, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(doc=st.dictionaries(st.sampled_from([*schema.TOP, *schema.TABLES, "moves", "zones", "extra"]),
                           toml_values, max_size=8))
def test_random_documents(doc):
    _outcome_ok(doc)


@settings(max_examples=150, deadline=None)
@given(text=st.text(max_size=200))
def test_random_text_files(tmp_path_factory, text):
    p = tmp_path_factory.mktemp("fuzz") / "f.toml"
    p.write_text(text, encoding="utf-8")
    try:
        tomllib.loads(text)
    except tomllib.TOMLDecodeError:
        pass
    try:
        load_scene(p)
    except SceneError as exc:
        assert "\n" not in exc.one_line()
