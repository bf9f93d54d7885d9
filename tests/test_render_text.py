"""Render pieces that need no OpenGL: frame timing, overlay words, options, scene keys.

These run everywhere (no pyvista import); the drawing itself is tested in
``test_render_video.py``.
"""

import argparse
from pathlib import Path
import sys

import numpy as np
import pytest

from swingsim.metrics import cautions
from swingsim.errors import InputError, SceneError
from swingsim.render import overlay
from swingsim.render.api import check_options, frame_times, output_names, still_times
from swingsim.render.facts import collect, rope_angle_deg
from swingsim.simulation import simulate

from conftest import make_scene

MOVE = {"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 6.0, "speed_m_s": 1.0,
        "accel_m_s2": 0.5, "label": "travel east"}


def test_import_does_not_load_pyvista():
    import subprocess

    code = ("import sys; import swingsim, swingsim.render, swingsim.cli.render, swingsim.render.api; "
            "print(any(m.split('.')[0] in ('pyvista', 'vtk', 'vtkmodules') for m in sys.modules))")
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert r.stdout.strip() == "False"


@pytest.mark.parametrize("t0,t1,fps,speed", [(0, 2, 30, 1), (0, 2, 30, 0.5), (1.5, 4.0, 24, 2.0), (0, 1, 7, 0.3)])
def test_frame_times_count_and_spacing(t0, t1, fps, speed):
    t = frame_times(t0, t1, fps, speed)
    # Frames of a clip of (t1 - t0) simulated seconds played at `speed`: duration * fps / speed.
    assert len(t) == round((t1 - t0) * fps / speed)
    assert t[0] == t0
    np.testing.assert_allclose(np.diff(t), speed / fps, rtol=1e-12)
    assert t[-1] < t1


def test_caution_in_every_frame_and_banner_only_at_the_ends():
    s = make_scene(moves=[MOVE])
    traj = simulate(s)
    facts = collect(traj)
    times = frame_times(0, s.duration_s, 10, 1.0)
    video_len = len(times) / 10
    samp = traj.sample(times)
    banner = []
    for i, t in enumerate(times):
        row = {k: (v[i] if isinstance(v, np.ndarray) and v.ndim and len(v) == len(times) else v)
               for k, v in samp.items()}
        ft = overlay.frame_text(t, i / 10, video_len, 1.0, row, facts.events, [])
        text = " ".join(ft.strings())
        # The short caution (from swingsim.metrics.cautions, one place for the wording) is on every frame.
        assert " ".join(ft.caution.split()) == cautions.CAUTION_SHORT
        assert "competent person" in text
        banner.append(bool(ft.banner))
        if ft.banner:
            assert " ".join(ft.banner.split()) == cautions.CAUTION
    banner = np.array(banner)
    hold = int(overlay.BANNER_S * 10)
    assert banner[:hold].all() and banner[-hold:].all()
    assert not banner[hold:-hold].any()


def test_readout_matches_the_run():
    s = make_scene(moves=[MOVE])
    traj = simulate(s)
    row = {k: (v[0] if isinstance(v, np.ndarray) and v.ndim else v) for k, v in traj.sample([3.0]).items()}
    ft = overlay.frame_text(3.0, 3.0, 20.0, 1.0, row, (), [])
    n = row["rope_dir"]
    # Rope angle from the vertical: arccos of the downward component of the unit rope vector.
    ang = np.degrees(np.arccos(-n[2]))
    assert f"{ang:6.1f}" in ft.readout
    assert f"{np.linalg.norm(row['load_vel']):6.2f}" in ft.readout
    assert f"{row['rope_tension_N'] / 1000:6.1f}" in ft.readout
    assert ft.clock.startswith("t =") and "3.00 s" in ft.clock
    assert "slow motion x0.5" in overlay.clock_text(1.0, 0.5) and "time-lapse x2" in overlay.clock_text(1.0, 2.0)
    assert rope_angle_deg(np.array([0.0, np.sin(0.1), -np.cos(0.1)])) == pytest.approx(np.degrees(0.1))


def test_events_from_the_summary():
    s = make_scene({"damping": {"ratio": 0.08}}, moves=[MOVE], duration_s=40.0)
    traj = simulate(s)
    from swingsim.metrics.single import summarize

    sm = summarize(traj)
    facts = collect(traj, sm)
    kinds = [e.kind for e in facts.events]
    assert kinds.count("move_start") == 1 and kinds.count("move_end") == 1
    assert facts.peak_time_s == pytest.approx(sm.data["peak_rope_angle_time_s"])
    assert facts.settled_at_s == pytest.approx(sm.data["settled_at_s"])
    assert "settled" in kinds
    st = still_times(facts)
    assert set(st) == {"peak_swing", "end_of_moves", "settled"}
    assert st["end_of_moves"] == pytest.approx(traj.motion.last_move_end_s)
    t_start = [e.t_s for e in facts.events if e.kind == "move_start"][0]
    assert overlay.event_text(t_start + 0.5, facts.events) == "travel east: starts"
    assert "travel east: starts" not in overlay.event_text(t_start + overlay.EVENT_HOLD_S + 0.1, facts.events)
    assert overlay.event_text(facts.peak_time_s + 0.1, facts.events).endswith(f"Peak swing {facts.peak_angle_deg:.1f} deg")


def test_no_settled_still_when_it_never_settles():
    s = make_scene(moves=[MOVE], duration_s=12.0)
    facts = collect(simulate(s))
    assert facts.settled_at_s is None
    assert set(still_times(facts)) == {"peak_swing", "end_of_moves"}


@pytest.mark.parametrize("kw,key", [
    (dict(size=(641, 360)), "--size"), (dict(size=(20, 20)), "--size"), (dict(fps=0), "--fps"),
    (dict(fmt="avi"), "--format"), (dict(view="top"), "--view"), (dict(split=("side",)), "--split"),
    (dict(split=("side", "sky")), "--split"), (dict(speed=0.0), "--speed"), (dict(window=(3.0, 1.0)), "--from/--to"),
    (dict(window=(25.0, 30.0)), "--from"), (dict(view="custom"), "[view]"),
])
def test_bad_options_are_one_line(kw, key):
    s = make_scene()
    opts = dict(size=(320, 240), fps=10, fmt="mp4", view="side", speed=1.0, window=None, split=None)
    opts.update(kw)
    with pytest.raises(InputError) as e:
        check_options(s, **opts)
    assert key in str(e.value) and "\n" not in str(e.value)


def test_output_names():
    s = make_scene()
    n = output_names(s, "out", "mp4")
    assert n["video"].name == "scene.mp4"
    assert sorted(p.name for p in n["stills"].values()) == ["scene_end_of_moves.png", "scene_peak_swing.png",
                                                            "scene_settled.png", "scene_stopped.png"]
    assert output_names(s, "out", "png")["video"].name == "scene_frames"


def test_view_table_is_read_and_checked():
    s = make_scene({"view": {"position_m": [30, -20, 10], "focus_m": [0, 0, 20]}})
    assert s.view.position_m == (30.0, -20.0, 10.0) and s.view.up == (0.0, 0.0, 1.0)
    assert s.view.view_angle_deg == 30.0
    assert make_scene().view is None
    with pytest.raises(SceneError, match=r"view.focus_m.*missing"):
        make_scene({"view": {"position_m": [30, -20, 10]}})
    with pytest.raises(SceneError, match=r"view.up.*line of sight"):
        make_scene({"view": {"position_m": [0, 0, 50], "focus_m": [0, 0, 0]}})
    with pytest.raises(SceneError, match=r"view.fov_deg: unknown key.*view_angle_deg"):
        make_scene({"view": {"position_m": [1, 0, 0], "focus_m": [0, 0, 0], "fov_deg": 20}})


def test_load_mesh_file_is_checked(tmp_path):
    from swingsim.scene import scene_from_dict

    from conftest import BASE

    def scene(name):
        d = dict(BASE, load={"mass_kg": 1000.0, "mesh_file": name})
        return scene_from_dict(d, file="s.toml", base_dir=tmp_path)

    with pytest.raises(SceneError, match=r"s.toml: load.mesh_file = 'part.step': expected an STL, OBJ or PLY"):
        scene("part.step")
    with pytest.raises(SceneError, match=r"load.mesh_file = 'missing.stl': file not found"):
        scene("missing.stl")
    (tmp_path / "ok.STL").write_bytes(b"solid x\nendsolid x\n")
    assert scene("ok.STL").load.mesh_file == "ok.STL"
    with pytest.raises(SceneError, match="load.shape"):
        scene_from_dict(dict(BASE, load={"mass_kg": 1.0, "shape": "sphere"}))


def test_cli_bad_size_is_exit_2_and_writes_nothing(tmp_path, capsys):
    from swingsim.cli import render as cli

    p = argparse.ArgumentParser()
    cli.add_arguments(p)
    scene = tmp_path / "s.toml"
    scene.write_text('title = "t"\nduration_s = 5.0\n[crane]\nsuspension_m = [0.0, 0.0, 20.0]\n'
                     '[rope]\nlength_m = 8.0\n[load]\nmass_kg = 500.0\n')
    out = tmp_path / "out"
    for bad in (["--size", "big"], ["--size", "321x240"], ["--split", "side"], ["--view", "custom"],
                ["--from", "9"], ["--format", "gif", "--fps", "60"]):
        rc = cli.main(p.parse_args([str(scene), "--out", str(out), *bad]))
        err = capsys.readouterr().err
        assert rc == 2, bad
        assert err.count("\n") == 1 and err.startswith("swingsim: error: "), err
    assert not out.exists()
    rc = cli.main(p.parse_args([str(tmp_path / "nope.toml"), "--out", str(out)]))
    assert rc == 2 and "file not found" in capsys.readouterr().err


def test_quality_option_defaults_to_standard_and_is_checked():
    from swingsim.cli import render as cli

    p = argparse.ArgumentParser()
    cli.add_arguments(p)
    s = make_scene(moves=[MOVE])
    assert cli.options(p.parse_args(["s.toml"]), s)["quality"] == "standard"
    assert cli.options(p.parse_args(["s.toml", "--quality", "high"]), s)["quality"] == "high"
    with pytest.raises(SystemExit):  # argparse refuses other words (exit 2, its one-line usage error)
        p.parse_args(["s.toml", "--quality", "ultra"])
    with pytest.raises(InputError, match="--quality"):
        check_options(s, size=(640, 360), fps=30, fmt="mp4", view="side", speed=1.0, window=None, split=None,
                      quality="ultra")


def test_readout_has_radius_slew_wind_and_tonnes():
    s = make_scene(moves=[MOVE])
    traj = simulate(s)
    row = {k: (v[0] if isinstance(v, np.ndarray) and v.ndim else v) for k, v in traj.sample([3.0]).items()}
    crane = {"radius_m": 18.25, "slew_deg": 35.0, "hook_height_m": 22.1, "height_label": "hook height",
             "wind_m_s": 9.0, "wind_from": "SSW"}
    ft = overlay.frame_text(3.0, 3.0, 20.0, 1.0, row, (), [], crane=crane)
    lines = ft.readout.split("\n")
    assert "radius" in lines[0] and "18.2 m" in lines[0]  # 18.25 to one decimal (round half to even)
    assert "+35.0 deg" in ft.readout and "22.1 m" in ft.readout and "SSW" in ft.readout
    # 1 t-force = 1000 kg x 9.80665 m/s^2 (standard gravity, 3rd CGPM 1901)
    tonnes = row["rope_tension_N"] / 9806.65
    assert f"{tonnes:6.2f} t" in ft.readout and f"{row['rope_tension_N'] / 1000:6.1f} kN" in ft.readout
    assert all(len(line) <= 22 for line in lines)  # layout.READOUT_CHARS: the panel's width


def test_a_run_that_stops_early_says_so_at_its_end():
    # hoisting down at 12 m/s^2, more than g: the rope goes slack when the move starts
    s = make_scene(moves=[{"axis": "hoist", "profile": "trapezoid", "start_s": 2.0, "distance_m": -6.0,
                           "speed_m_s": 8.0, "accel_m_s2": 12.0}], duration_s=8.0)
    traj = simulate(s)
    assert traj.status == "slack"
    facts = collect(traj)
    assert set(still_times(facts)) == {"peak_swing", "stopped"}
    row = {k: (v[0] if isinstance(v, np.ndarray) and v.ndim else v) for k, v in traj.sample([1.9]).items()}
    late = overlay.frame_text(traj.t_end_s - 0.1, 5.0, 10.0, 1.0, row, facts.events, [], facts=facts)
    early = overlay.frame_text(0.2, 5.0, 10.0, 1.0, row, facts.events, [], facts=facts)
    assert late.stopped.startswith(f"RUN STOPPED at t = {traj.t_end_s:.2f} s: the hoist rope would go slack.")
    assert early.stopped == ""


def test_render_refuses_implausible_frame_count(tmp_path, capsys):
    # 60 s at 120 fps in slow motion 0.05: 144,000 frames, beyond the limit
    from swingsim.cli.main import main

    demo = Path(__file__).resolve().parent.parent / "swingsim" / "data" / "demo.toml"
    rc = main(["render", str(demo), "--out", str(tmp_path / "v"), "--fps", "120", "--speed", "0.05"])
    err = capsys.readouterr().err
    assert rc == 2 and "plausibility limit" in err and "--allow-implausible" in err
    assert not (tmp_path / "v").exists()


def test_the_notes_repeat_the_resonance_caution_of_the_inching_scene():
    from pathlib import Path

    from swingsim import load_scene
    from swingsim.metrics.single import summarize

    scene = load_scene(Path(__file__).resolve().parents[1] / "scenes" / "inching_resonance.toml")
    traj = simulate(scene)
    sm = summarize(traj)
    facts = collect(traj, sm)
    caution = [c for c in sm.data["cautions"] if "resonance" in c]
    assert caution  # the summary cautions (tests/test_response.py checks why)
    rhythm = sm.data["move_rhythms"][0]
    period = sm.data["response_modes"][0]["period_s"]
    # the same rhythm and period as the summary's caution, worded short for the notes panel
    assert f"{rhythm['rhythm_s']:.2f} s" in caution[0] and f"{period:.2f} s" in caution[0]
    start = rhythm["from_s"] + rhythm["rhythm_s"]  # from the second repetition
    assert overlay.caution_notes(start - 0.1, facts) == ""
    late = overlay.caution_notes(start + 0.1, facts)
    assert late.startswith("RESONANCE:") and f"every {rhythm['rhythm_s']:.2f} s" in late
    assert f"swing period {period:.2f} s" in late and "Each repetition adds swing." in late
    assert overlay.caution_notes(traj.t_end_s, facts) == late  # kept to the end
    # a lift without repeated moves has no such note (a single move: tests/test_response.py)
    single = simulate(make_scene(moves=[MOVE], duration_s=20.0))
    assert collect(single).notes == ()


def test_the_notes_flag_a_gust_over_the_in_service_limit():
    from swingsim.metrics.single import summarize

    # one 1 - cosine gust (gust-load practice; issue text): peak added speed 14 m/s at
    # start + duration / 2 on a steady 10 m/s, so 24 m/s at the load against a 20 m/s limit
    s = make_scene({"crane": {"wind_limit_m_s": 20.0},
                    "wind": {"speed_m_s": 10.0, "direction_deg": 90.0,
                             "gusts": [{"start_s": 4.0, "peak_m_s": 14.0, "duration_s": 4.0}]}},
                   moves=[MOVE], duration_s=12.0)
    traj = simulate(s)
    facts = collect(traj, summarize(traj))
    assert facts.gust_limit_m_s == 20.0
    assert overlay.caution_notes(3.0, facts, 10.0) == ""  # the mean wind, under the limit
    # before the peak: flagged while the wind at the load is above the limit (our rule: the frame's wind)
    assert overlay.caution_notes(5.8, facts, 21.0).startswith("WIND 21.0 m/s at the load, above the 20 m/s limit")
    peak = overlay.caution_notes(6.01, facts, 23.9)
    assert peak.startswith("GUST 24.0 m/s at the load, above the 20 m/s limit")
    assert "(t = 6.0 s)" in peak and "WIND" not in peak
    # a steady wind under the limit: no note
    calm = simulate(make_scene({"wind": {"speed_m_s": 10.0, "direction_deg": 90.0}}, moves=[MOVE], duration_s=10.0))
    assert collect(calm).gust_limit_m_s is None and collect(calm).notes == ()
