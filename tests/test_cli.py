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
