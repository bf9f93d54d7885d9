"""Hostile and careless input, second round: results that cannot be trusted, limits
applied before anything is expanded, careless input refused rather than guessed.

Each test names what it checks against: a finite-number check is IEEE 754's
definition (``math.isfinite``); the strict number pattern is the grammar of a
decimal floating-point literal without digit separators (Python's own
``float()`` accepts ``1_0.0``, PEP 515, which a data table must not).
"""

import json
import math
import os
import subprocess
import sys
from pathlib import Path

import pytest

from swingsim.errors import InputError, SceneError
from swingsim.scene import load_scene, scene_from_dict
from swingsim.study.variants import sweep_from_dict

HERE = Path(__file__).resolve().parent
ENV = dict(os.environ, PYTHONPATH=str(HERE.parent))

SCENE = """title = "hostile"
duration_s = 5.0
[crane]
suspension_m = [0.0, 0.0, 30.0]
[rope]
length_m = 12.0
[load]
mass_kg = 800.0
[[moves]]
axis = "x"
profile = "table"
table_file = "move.csv"
"""

BASE = {
    "title": "hostile", "duration_s": 20.0,
    "crane": {"suspension_m": [0.0, 0.0, 30.0]},
    "rope": {"length_m": 10.0},
    "load": {"mass_kg": 500.0},
    "moves": [{"axis": "x", "profile": "trapezoid", "distance_m": 2.0, "speed_m_s": 0.5,
               "accel_m_s2": 0.3}],
}


def _cli(*args, cwd=None):
    return subprocess.run([sys.executable, "-m", "swingsim", *map(str, args)], capture_output=True,
                          text=True, env=ENV, timeout=300, cwd=cwd)


def _table_scene(tmp_path, rows):
    (tmp_path / "move.csv").write_text("t_s,position_m\n" + "\n".join(rows) + "\n")
    (tmp_path / "scene.toml").write_text(SCENE)
    return tmp_path / "scene.toml"


# -- class 1: a result that cannot be trusted is never called valid ----------------

def test_table_with_absurdly_small_intervals_is_refused(tmp_path):
    # times 1e-300 s apart: valid numbers, but a cubic spline through them overflows
    # (its coefficients divide by the interval; IEEE 754 doubles overflow beyond 1.8e308)
    scene = _table_scene(tmp_path, ["0,0", "1e-300,1", "2e-300,2"])
    with pytest.raises(SceneError) as ei:
        load_scene(scene)
    assert "apart" in ei.value.one_line() and "data row 1" in ei.value.one_line()
    r = _cli("check", scene)
    assert r.returncode == 2 and "apart" in r.stderr, r.stderr


def test_final_check_marks_non_finite_summary_invalid():
    # IEEE 754: NaN and infinity are not finite (math.isfinite); a summary holding one is not valid
    from swingsim import simulate, summarize
    from swingsim.metrics.single import final_check

    scene = scene_from_dict(BASE)
    traj = simulate(scene)
    summary = summarize(traj)
    assert summary["valid"] is True
    summary.data["peak_excursion_m"] = math.nan
    final_check(traj, summary)
    assert summary["valid"] is False and traj.valid is False
    assert "peak_excursion_m" in summary["invalid_reason"]


def test_final_check_catches_non_finite_motion(monkeypatch):
    # a motion that evaluates to NaN at some sample: the run is invalid, not "valid, nan m"
    from swingsim import simulate, summarize

    scene = scene_from_dict(BASE)
    traj = simulate(scene)
    real = traj.model.outputs

    def poisoned(t, state, motion):
        out = real(t, state, motion)
        out["load"] = out["load"].copy()
        out["load"][t > 3.0] = math.nan
        return out

    monkeypatch.setattr(traj.model, "outputs", poisoned)
    summary = summarize(traj)
    assert summary["valid"] is False and traj.status == "nonfinite"
    assert "not a finite number" in summary["invalid_reason"]


# -- class 9: careless input is refused, not guessed --------------------------------

@pytest.mark.parametrize("cell", ["1_0.0", "١", "0x10", " 1e3 3", "infinity", "1__0"])
def test_table_cells_must_be_plain_decimal_numbers(tmp_path, cell):
    scene = _table_scene(tmp_path, ["0,0", f"{cell},1", "20,2"])
    with pytest.raises(SceneError) as ei:
        load_scene(scene)
    assert "expected a number in column t_s" in ei.value.one_line()


@pytest.mark.parametrize("text", ["a\x1b[2Jb", "crane \u202e lift", "two\nlines", "tab\there", "del\x7f"])
def test_control_and_bidi_characters_in_text_are_refused(text):
    doc = json.loads(json.dumps(BASE))
    doc["title"] = text
    with pytest.raises(SceneError) as ei:
        scene_from_dict(doc)
    msg = ei.value.one_line()
    assert "control" in msg and "\x1b" not in msg and "\u202e" not in msg and "\n" not in msg
    doc = json.loads(json.dumps(BASE))
    doc["moves"][0]["label"] = text
    with pytest.raises(SceneError):
        scene_from_dict(doc)


BASE_TOML = """title = "hostile"
duration_s = 20.0
[crane]
suspension_m = [0.0, 0.0, 30.0]
[rope]
length_m = 10.0
[load]
mass_kg = 500.0
[[moves]]
axis = "x"
profile = "trapezoid"
distance_m = 2.0
speed_m_s = 0.5
accel_m_s2 = 0.3
"""


@pytest.fixture
def sweep(tmp_path):
    (tmp_path / "base.toml").write_text(BASE_TOML)

    def make(vary, **extra):
        return sweep_from_dict({"base": "base.toml", "vary": vary, **extra}, file="s.toml", base_dir=tmp_path)
    return make


def test_empty_range_is_an_error(sweep):
    with pytest.raises(InputError) as ei:
        sweep({"rope.length_m": {}})
    assert "empty" in ei.value.one_line()


def test_key_given_as_table_and_dotted_is_an_error(sweep):
    # TOML itself allows {"rope": {...}} beside "rope.length_m" as distinct keys; they name one scene key
    with pytest.raises(InputError) as ei:
        sweep({"rope": {"length_m": [8.0, 9.0]}, "rope.length_m": [10.0, 11.0]})
    assert "twice" in ei.value.one_line()


def test_integer_key_range_needs_integers(sweep):
    ok = sweep({"rope.falls": {"from": 1, "to": 3, "count": 3}})
    assert [v.values["rope.falls"] for v in ok.variants] == [1, 2, 3]
    assert all(isinstance(v.values["rope.falls"], int) for v in ok.variants)
    with pytest.raises(InputError) as ei:
        sweep({"rope.falls": {"from": 1, "to": 4, "count": 3}})
    assert "whole number" in ei.value.one_line()


# -- class 5: limits in one place, before any expansion ---------------------------

def test_astronomical_range_count_refused_before_expansion(sweep):
    # 10**18 values would need exabytes; the count is checked before one is made
    with pytest.raises(InputError) as ei:
        sweep({"rope.length_m": {"from": 5.0, "to": 20.0, "count": 10**18}})
    assert "count" in ei.value.one_line()
    with pytest.raises(InputError):
        sweep({"rope.length_m": {"from": 5.0, "to": 20.0, "count": 10**6},
               "load.mass_kg": {"from": 100.0, "to": 200.0, "count": 10**6}})


def test_sweep_variants_are_held_to_plausibility_limits(sweep):
    with pytest.raises(InputError) as ei:
        sweep({"rope.length_m": [10.0, 700.0]})
    assert "plausibility" in ei.value.one_line() and "rope.length_m" in ei.value.one_line()


def test_long_title_is_refused():
    doc = json.loads(json.dumps(BASE))
    doc["title"] = "x" * 10_000_000
    with pytest.raises(SceneError) as ei:
        scene_from_dict(doc)
    assert "characters" in ei.value.one_line() and len(ei.value.one_line()) < 500


def test_table_rows_limited(tmp_path):
    from swingsim.scene.plausibility import MAX_TABLE_ROWS
    rows = [f"{k * 0.001:.3f},0" for k in range(MAX_TABLE_ROWS + 1)]
    scene = _table_scene(tmp_path, rows)
    with pytest.raises(SceneError) as ei:
        load_scene(scene)
    assert "rows" in ei.value.one_line()


# -- class 9 through the command line --------------------------------------------

def test_empty_out_and_ignored_render_options(tmp_path):
    (tmp_path / "s.toml").write_text(BASE_TOML)
    r = _cli("run", "s.toml", "--out", "", cwd=tmp_path)
    assert r.returncode == 2 and "--out" in r.stderr and "empty" in r.stderr, r.stderr
    assert sorted(p.name for p in tmp_path.iterdir()) == ["s.toml"]
    r = _cli("run", "s.toml", "--out", "o", "--fps", "60", "--no-plots", cwd=tmp_path)
    assert r.returncode == 2 and "--video" in r.stderr, r.stderr
    assert not (tmp_path / "o").exists()


def test_plan_move_holds_the_rope_range_to_the_plausibility_limit(tmp_path):
    (tmp_path / "s.toml").write_text(BASE_TOML)
    r = _cli("plan-move", "s.toml", "--move", "0", "--max-residual-deg", "1", "--rope-range", "8:700",
             "--out", "p", cwd=tmp_path)
    assert r.returncode == 2 and "plausibility" in r.stderr and "--rope-range" in r.stderr, r.stderr
    assert not (tmp_path / "p").exists()


def test_sweep_title_is_held_to_the_text_rules(sweep):
    with pytest.raises(InputError) as ei:
        sweep({"rope.length_m": [8.0, 9.0]}, title="study \x1b]0;x\x07")
    assert "control character" in ei.value.one_line() and "\x1b" not in ei.value.one_line()


@pytest.mark.parametrize("text", ["1_0:20", "8:2_0", "٨:20", "inf:20", "8:20:30"])
def test_rope_range_takes_plain_numbers_only(tmp_path, text):
    # Python's float() reads "1_0" as 10 and "٨" as 8: a careless range must be refused, not guessed
    (tmp_path / "s.toml").write_text(BASE_TOML)
    r = _cli("plan-move", "s.toml", "--move", "0", "--max-residual-deg", "1", "--rope-range", text,
             "--out", "p", cwd=tmp_path)
    assert r.returncode == 2 and "--rope-range" in r.stderr and len(r.stderr.strip().splitlines()) == 1, r.stderr
    assert not (tmp_path / "p").exists()
