"""The command line end to end: files, exit codes, refusals, determinism."""

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from swingsim.cli.main import main

from test_scene import GOOD, scene_files

ROOT = Path(__file__).resolve().parent.parent
RUN_FILES = ["summary.json", "timeseries.csv", "summary.txt", "swing.png", "speed.png", "plan.png"]


def _cli(*args, cwd=None):
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    return subprocess.run([sys.executable, "-m", "swingsim", *args], capture_output=True, text=True,
                          cwd=cwd or ROOT, env=env, timeout=300)


@pytest.mark.parametrize("path", [p for p in scene_files() if p.name != "demo.toml"], ids=lambda p: p.name)
def test_run_every_scene(path, tmp_path):
    out = tmp_path / "out"
    assert main(["run", str(path), "--out", str(out), "--quiet"]) == 0
    for name in RUN_FILES:
        assert (out / name).stat().st_size > 0, name
    s = json.loads((out / "summary.json").read_text())
    for key in ("peak_rope_angle_deg", "residual_rope_angle_deg", "peak_excursion_m", "peak_rope_tension_kN",
                "dynamic_factor", "natural_period_s", "measured_period_s", "settle_time_s", "cautions",
                "mode_periods_s"):
        assert key in s
    assert s["valid"] is True
    assert s["cautions"][0].startswith("CAUTION")
    assert "competent person" in s["cautions"][0]
    header = (out / "timeseries.csv").read_text().splitlines()[0].split(",")
    for col in ("t_s", "suspension_x_m", "suspension_y_m", "suspension_z_m", "load_x_m", "load_y_m",
                "load_z_m", "rope_angle_deg", "rope_tension_kN"):
        assert col in header
    assert "competent person" in (out / "summary.txt").read_text()


def test_demo_command(tmp_path):
    r = _cli("demo", "--out", str(tmp_path / "demo"), "--no-video")
    assert r.returncode == 0, r.stderr
    assert "peak rope angle" in r.stdout
    assert (tmp_path / "demo" / "summary.txt").exists()


def test_bad_scene_exit_2_one_line_nothing_written(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text(GOOD.replace("length_m = 12.0", "lenght_m = 12.0"))
    out = tmp_path / "never"
    r = _cli("run", str(bad), "--out", str(out))
    assert r.returncode == 2
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1, r.stderr
    assert "Traceback" not in r.stderr
    assert "bad.toml" in lines[0] and "rope.lenght_m" in lines[0] and "length_m" in lines[0]
    assert not out.exists()


def test_check_command(tmp_path):
    good = tmp_path / "good.toml"
    good.write_text(GOOD)
    r = _cli("check", str(good))
    assert r.returncode == 0 and "ok" in r.stdout
    r = _cli("check", str(tmp_path / "missing.toml"))
    assert r.returncode == 2 and "file not found" in r.stderr


def test_usage_error_exit_2():
    r = _cli("run")
    assert r.returncode == 2
    assert "Traceback" not in r.stderr


def test_non_empty_out_needs_force(tmp_path):
    good = tmp_path / "good.toml"
    good.write_text(GOOD)
    out = tmp_path / "out"
    out.mkdir()
    (out / "notes.txt").write_text("keep me")
    assert main(["run", str(good), "--out", str(out), "--quiet"]) == 2
    assert sorted(p.name for p in out.iterdir()) == ["notes.txt"]
    assert main(["run", str(good), "--out", str(out), "--quiet", "--force"]) == 0
    assert (out / "notes.txt").read_text() == "keep me"
    assert (out / "summary.json").exists()


def test_implausible_needs_override(tmp_path):
    p = tmp_path / "long.toml"
    p.write_text(GOOD.replace("duration_s = 30.0", "duration_s = 7200.0"))
    assert main(["run", str(p), "--out", str(tmp_path / "o"), "--quiet", "--no-plots"]) == 2
    assert not (tmp_path / "o").exists()


def test_repeated_runs_byte_identical(tmp_path):
    scene = ROOT / "scenes" / "tower_slew_hoist.toml"
    for d in ("a", "b"):
        assert main(["run", str(scene), "--out", str(tmp_path / d), "--quiet", "--no-plots"]) == 0
    for name in ("summary.json", "timeseries.csv", "summary.txt"):
        assert (tmp_path / "a" / name).read_bytes() == (tmp_path / "b" / name).read_bytes(), name


def test_invalid_run_is_marked_and_exit_1(tmp_path):
    # lowering at 1 g of deceleration... a hoist raising faster than gravity lets the rope go slack:
    # a downward hoist acceleration of 12 m/s^2 (> g) pays rope out faster than the load can fall.
    p = tmp_path / "slack.toml"
    p.write_text(GOOD.replace('axis = "x"', 'axis = "hoist"').replace("distance_m = 5.0", "distance_m = -5.0")
                 .replace("speed_m_s = 0.5", "speed_m_s = 3.0").replace("accel_m_s2 = 0.2", "accel_m_s2 = 12.0"))
    out = tmp_path / "o"
    assert main(["run", str(p), "--out", str(out), "--quiet"]) == 1
    s = json.loads((out / "summary.json").read_text())
    assert s["valid"] is False and s["status"] == "slack"
    assert "slack" in s["invalid_reason"]
    assert any("RESULT INVALID" in c for c in s["cautions"])
    assert "RESULT INVALID" in (out / "summary.txt").read_text()


# -- the same -o/-f/-q on every command, true defaults, conflicts refused ------------------------------

#: Every command that writes files, with the arguments it needs besides -o/-f/-q.
WRITERS = {
    "run": lambda scene, sweep: ["run", scene, "--no-plots"],
    "demo": lambda scene, sweep: ["demo", "--no-video", "--no-plots"],
    "render": lambda scene, sweep: ["render", scene, "--size", "160x120", "--fps", "5"],
    "export": lambda scene, sweep: ["export", scene, "--fps", "5"],
    "compare": lambda scene, sweep: ["compare", sweep, "--no-sensitivity"],
    "plan-move": lambda scene, sweep: ["plan-move", scene, "--move", "0", "--max-residual-deg", "1",
                                       "--rope-range", "10:12"],
    "schema": lambda scene, sweep: ["schema"],
}


def _subparser(name):
    from swingsim.cli.main import build_parser

    parser = build_parser()
    sub = next(a for a in parser._actions if a.__class__.__name__ == "_SubParsersAction")
    return sub.choices[name]


@pytest.mark.parametrize("command", sorted(WRITERS))
def test_every_writing_command_takes_o_f_q_the_same_way(command):
    from swingsim.cli.options import FORCE_HELP

    flags = {}
    for action in _subparser(command)._actions:
        for s in action.option_strings:
            flags[s] = action
    for short, long in (("-o", "--out"), ("-f", "--force"), ("-q", "--quiet")):
        assert flags[short] is flags[long], (command, short)
    prefix = FORCE_HELP.split("{")[0]
    assert flags["--force"].help.startswith(prefix), flags["--force"].help  # -f says what it does, once
    assert "default" in flags["--out"].help


def test_check_takes_quiet_and_writes_nothing():
    flags = {s for a in _subparser("check")._actions for s in a.option_strings}
    assert {"-q", "--quiet"} <= flags
    assert not flags & {"-o", "--out", "-f", "--force"}  # check writes nothing: no output options


@pytest.mark.parametrize("command", sorted(WRITERS))
def test_every_writing_command_refuses_a_non_empty_folder_without_f(command, tmp_path):
    scene = tmp_path / "good.toml"
    scene.write_text(GOOD)
    sweep = tmp_path / "sweep.toml"
    sweep.write_text('base = "good.toml"\n[vary]\n"rope.length_m" = [10.0, 12.0]\n')
    out = tmp_path / "out"
    out.mkdir()
    (out / "notes.txt").write_text("keep me")
    r = _cli(*WRITERS[command](str(scene), str(sweep)), "-o", str(out), "-q", cwd=tmp_path)
    assert r.returncode == 2, (command, r.stderr)
    assert "--force" in r.stderr and len(r.stderr.strip().splitlines()) == 1, r.stderr
    assert sorted(p.name for p in out.iterdir()) == ["notes.txt"]


def test_run_q_prints_nothing_and_f_keeps_other_files(tmp_path, capsys):
    good = tmp_path / "good.toml"
    good.write_text(GOOD)
    out = tmp_path / "out"
    out.mkdir()
    (out / "notes.txt").write_text("keep me")
    assert main(["run", str(good), "-o", str(out), "-q", "-f", "--no-plots"]) == 0
    assert capsys.readouterr().out == ""
    assert (out / "notes.txt").read_text() == "keep me" and (out / "summary.json").exists()


def test_demo_help_names_the_folder_it_uses(tmp_path):
    r = _cli("demo", "--help")
    assert "swingsim-demo" in r.stdout and "<scene name>" not in r.stdout, r.stdout
    r = _cli("demo", "--no-video", "--no-plots", "-q", cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    assert (tmp_path / "swingsim-demo" / "summary.json").exists()  # the folder the help names


def test_view_default_is_what_the_help_says():
    from swingsim.cli.render import options
    from swingsim.scene import scene_from_dict
    import tomllib

    p = _subparser("render")
    view = next(a for a in p._actions if "--view" in a.option_strings)
    assert "default oblique" in view.help
    args = p.parse_args(["s.toml"])
    assert options(args, scene_from_dict(tomllib.loads(GOOD)))["view"] == "oblique"


@pytest.mark.parametrize("argv, said", [
    (["render", "{scene}", "--view", "side", "--split", "side,plan"], "--split"),
    (["render", "{scene}", "--to", "45"], "past the end of the run"),
    (["render", "{scene}", "--from", "5", "--to", "3"], "--from before --to"),
    (["export", "{scene}", "--to", "30.5"], "past the end of the run"),
    (["run", "{scene}", "--export", "--to", "31"], "past the end of the run"),
    (["run", "{scene}", "--split", "side,plan"], "--video"),
])
def test_conflicting_or_out_of_range_options_are_errors(argv, said, tmp_path):
    scene = tmp_path / "good.toml"  # duration_s = 30
    scene.write_text(GOOD)
    out = tmp_path / "out"
    r = _cli(*[a.format(scene=scene) for a in argv], "-o", str(out), cwd=tmp_path)
    assert r.returncode == 2, r.stderr
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and said in lines[0] and "Traceback" not in r.stderr, r.stderr
    assert not out.exists()


# -- did you mean: trade words and spellings of the choices ---------------------------------------------

@pytest.mark.parametrize("old, new, key, suggestion", [
    ('axis = "x"', 'axis = "trolley"', "moves[0].axis", "did you mean 'radius'?"),
    ('axis = "x"', 'axis = "luff"', "moves[0].axis", "did you mean 'radius'?"),
    ('axis = "x"', 'axis = "Luffing"', "moves[0].axis", "did you mean 'radius'?"),
    ('axis = "x"', 'axis = "slewing"', "moves[0].axis", "did you mean 'slew'?"),
    ('axis = "x"', 'axis = "long travel"', "moves[0].axis", "did you mean 'x'?"),
    ('profile = "trapezoid"', 'profile = "s_curve"', "moves[0].profile", "did you mean 's-curve'?"),
    ('profile = "trapezoid"', 'profile = "scurve"', "moves[0].profile", "did you mean 's-curve'?"),
    ('profile = "trapezoid"', 'profile = "S-Curve"', "moves[0].profile", "did you mean 's-curve'?"),
    ('profile = "trapezoid"', 'profile = "trapezoidal"', "moves[0].profile", "did you mean 'trapezoid'?"),
    ('profile = "trapezoid"', 'profile = "recorded"', "moves[0].profile", "did you mean 'table'?"),
    ("[crane]", '[crane]\nkind = "overhead"', "crane.kind", "did you mean 'bridge'?"),
    ("[crane]", '[crane]\nkind = "crawler"', "crane.kind", "did you mean 'mobile'?"),
    ("[load]", '[[zones]]\nname = "hut"\nkind = "no-go"\nmin_m = [1.0, 1.0, 0.0]\nmax_m = [2.0, 2.0, 3.0]\n[load]',
     "zones[0].kind", "did you mean 'exclusion'?"),
])
def test_trade_synonyms_get_a_did_you_mean(old, new, key, suggestion, tmp_path):
    p = tmp_path / "syn.toml"
    p.write_text(GOOD.replace(old, new, 1))
    r = _cli("check", str(p))
    assert r.returncode == 2
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and "Traceback" not in r.stderr, r.stderr
    line = lines[0]
    value = new.split("=")[-1].strip().strip('"').splitlines()[0] if "zones" not in key else "no-go"
    # one line naming the file, the key, the value, the allowed values and the suggestion
    assert "syn.toml" in line and key in line and repr(value) in line and "expected one of" in line, line
    assert suggestion in line, line


def test_a_trolley_hint_also_names_the_gantry_axis(tmp_path):
    # a gantry or bridge crane's trolley crosses the span (y), a tower crane's runs along the jib
    # (radius): common practice in the trade's words, so the hint names both
    p = tmp_path / "syn.toml"
    p.write_text(GOOD.replace('axis = "x"', 'axis = "trolley"'))
    line = _cli("check", str(p)).stderr
    assert 'axis = "radius"' in line and 'axis = "y"' in line


def test_every_synonym_names_a_real_choice_and_is_not_one():
    from swingsim.scene import schema

    keys = [k for t in [schema.TOP, *schema.TABLES.values(), *schema.ARRAYS.values()] for k in t.values()]
    with_synonyms = [k for k in keys if k.synonyms]
    assert len(with_synonyms) >= 6
    for k in with_synonyms:
        for words, choice, why in k.synonyms:
            assert choice in k.choices and why
            assert not set(words) & set(k.choices), words
    # a plain typo still gets difflib's nearest choice, with nothing added
    assert schema.MOVE["axis"].did_you_mean("radious") == " (did you mean 'radius'?)"
    assert schema.MOVE["axis"].did_you_mean("banana") == ""


# -- check says what a run would do --------------------------------------------------------------------

def test_check_prints_model_moves_and_warnings_then_ok(tmp_path):
    # the GOOD move: 5 m at 0.5 m/s, 0.2 m/s^2 reaches full speed, so a trapezoid lasts
    # d/v + v/a = 10 + 2.5 = 12.5 s (textbook kinematics of the trapezoidal velocity profile)
    p = tmp_path / "good.toml"
    p.write_text(GOOD.replace("length_m = 12.0", "length_m = 12.0\nwll_kN = 5.0")
                 .replace("duration_s = 30.0", "duration_s = 14.0")
                 .replace("[load]", "[wind]\nspeed_m_s = 25.0\n[load]"))
    r = _cli("check", str(p), cwd=tmp_path)
    assert r.returncode == 0, r.stderr
    out = r.stdout
    assert "model: point-mass" in out and "why:" in out
    # small-angle period 2 pi sqrt(L/g) at L = 12 m, g = 9.80665: 6.95 s (textbook pendulum)
    assert "6.95 s" in out
    assert "0.0 s ->   12.5 s" in out and "+5.00 m" in out
    # 800 kg * 9.80665 = 7.85 kN on one fall, over the line's WLL of 5 kN, already at rest
    assert "Even hanging at rest" in out and "7.85 kN" in out
    assert "25 m/s exceeds the in-service limit" in out
    assert "less than two swing periods" in out  # 14 - 12.5 = 1.5 s left to see the swing
    assert "competent person" in out
    assert out.strip().splitlines()[-1].endswith("ok (1 move, 14 s)")
    assert sorted(x.name for x in tmp_path.iterdir()) == ["good.toml"]  # nothing written
    r = _cli("check", str(p), "-q")
    assert r.returncode == 0 and r.stdout.strip().splitlines() == [f"{p}: ok (1 move, 14 s)"]


def test_check_names_hook_rigging_and_elastic_rope():
    r = _cli("check", str(ROOT / "scenes" / "springy_multifall_rope.toml"))
    assert r.returncode == 0, r.stderr
    assert "model: hook-load" in r.stdout and "hook block" in r.stdout and "spreader" in r.stdout
    assert "elastic rope" in r.stdout and "4 falls" in r.stdout and "bounce" in r.stdout


def test_a_reader_that_closes_the_pipe_early_gets_no_error_line():
    # `swingsim check ... | head -1`: the reader closes the pipe; like any Unix tool we stop
    # quietly (exit 141, SIGPIPE's), not with a "disk or system fault" line
    scene = ROOT / "scenes" / "beam_liftoff_tagline_landing.toml"
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    p = subprocess.Popen([sys.executable, "-m", "swingsim", "check", str(scene)], stdout=subprocess.PIPE,
                         stderr=subprocess.PIPE, env=env)
    p.stdout.readline()
    p.stdout.close()  # the reader goes away after one line
    err = p.stderr.read().decode()
    p.stderr.close()
    code = p.wait(timeout=120)
    assert err == "", err
    assert code in (0, 141)  # 0 when everything fitted in the pipe's buffer before it closed
