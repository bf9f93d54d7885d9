"""Rendering end to end, headless: videos read back, the load where the simulation puts it.

Small frames (at most 320x240) and clips of one or two seconds keep this quick.
The projection check uses its own pinhole camera (the gluLookAt / gluPerspective
model of the OpenGL Programming Guide), not the renderer's code.
"""

import argparse
from pathlib import Path

import imageio.v3 as iio
import imageio_ffmpeg
import numpy as np
import pytest

from swingsim.render import gl
from swingsim.render.api import render_scene
from swingsim.simulation import simulate

from conftest import make_scene
from test_scene import scene_files

SIZE = (320, 240)
TRAVEL = {"moves": [{"axis": "radius", "profile": "trapezoid", "start_s": 0.0, "distance_m": 8.0,
                     "speed_m_s": 4.0, "accel_m_s2": 2.0, "label": "travel"}],
          "load": {"mass_kg": 1000.0, "size_m": [2.0, 2.0, 2.0]}}


def _scene(**kw):
    return make_scene({"crane": {"kind": "tower", "suspension_m": [8.0, 0.0, 16.0]},
                       "rope": {"length_m": 9.0}, **TRAVEL}, duration_s=4.0, **kw)


def _frames_mp4(path):
    g = imageio_ffmpeg.read_frames(str(path))
    meta = next(g)
    w, h = meta["size"]
    frames = [np.frombuffer(b, np.uint8).reshape(h, w, 3) for b in g]
    return meta, frames


def _is_load_colour(px):
    """Signal orange of the load under any shading: red well above green, green well above blue."""
    px = np.asarray(px, dtype=float)
    r, g, b = px[..., 0], px[..., 1], px[..., 2]
    return (r > 90) & (r > 1.6 * g) & (g > 1.4 * b + 5)


def _pinhole(cam, points, size, box=None):
    """Pixel (column, row from top) of world points through a perspective camera.

    gluLookAt: forward f = (focus - eye)/|.|, side s = f x up, true up u = s x f;
    gluPerspective: x_ndc = cot(fovy/2)/aspect * x_c/depth, y_ndc = cot(fovy/2) * y_c/depth.
    ``box`` is the view's rectangle in the frame (the layout keeps the bands around it);
    the whole frame when None.
    """
    if box is not None:
        px = _pinhole(cam, points, (box.width, box.height))
        return px + np.array([box.x0, box.y0])
    eye, focus, up, fovy = (np.asarray(cam.GetPosition()), np.asarray(cam.GetFocalPoint()),
                            np.asarray(cam.GetViewUp()), np.radians(cam.GetViewAngle()))
    f = (focus - eye) / np.linalg.norm(focus - eye)
    s = np.cross(f, up)
    s /= np.linalg.norm(s)
    u = np.cross(s, f)
    d = np.asarray(points, dtype=float) - eye
    depth = d @ f
    w, h = size
    c = 1 / np.tan(fovy / 2)
    xn = c / (w / h) * (d @ s) / depth
    yn = c * (d @ u) / depth
    return np.column_stack([(xn + 1) / 2 * w, (1 - yn) / 2 * h])


@pytest.mark.parametrize("speed", [1.0, 0.5])
def test_mp4_read_back(tmp_path, speed):
    traj = simulate(_scene())
    paths = render_scene(traj, None, tmp_path, size=SIZE, fps=12, window=(0.0, 1.5), speed=speed,
                         view="side", quiet=True, stills=False, workers=1)
    assert paths == [tmp_path / "scene.mp4"]
    meta, frames = _frames_mp4(paths[0])
    # H.264 with yuv420p, as ordinary players need.
    assert meta["codec"] == "h264" and meta["pix_fmt"].startswith("yuv420p")
    assert len(frames) == round(1.5 * 12 / speed)
    assert frames[0].shape == (SIZE[1], SIZE[0], 3)
    for fr in frames[::5]:
        assert fr.std() > 20  # a picture, not a flat colour
    assert not list(tmp_path.glob(".swingsim-partial-*"))


def test_load_is_where_the_simulation_says(tmp_path):
    from swingsim.render.facts import collect
    from swingsim.render.stage import Stage

    traj = simulate(_scene())
    render_scene(traj, None, tmp_path, size=SIZE, fps=10, fmt="png", view="side", quiet=True, stills=False)
    files = sorted((tmp_path / "scene_frames").glob("frame_*.png"))
    assert len(files) == 40
    stage = Stage(traj, collect(traj), size=SIZE, views=("side",))
    try:
        cam = stage.renderers[0].GetActiveCamera()
        stage._apply_camera(stage.renderers[0], stage.cams[0])
        ks = [0, 8, 16, 24, 39]
        t = ks and np.array(ks) / 10.0
        load = traj.sample(t)["load"]
        px = _pinhole(cam, load, SIZE, stage.layout.views[0])
        np.testing.assert_allclose(stage.project(load), px, atol=0.5)  # the renderer agrees
    finally:
        stage.close()
    assert px[-1, 0] - px[0, 0] > 40  # the load crosses the picture: a moving, not a static, check
    for k, (c, r) in zip(ks, px):
        img = iio.imread(files[k])
        r, c = int(round(r)), int(round(c))
        patch = img[r - 2:r + 3, c - 2:c + 3]
        assert _is_load_colour(patch).mean() > 0.6, (k, patch.reshape(-1, 3)[:3])
    # ...and where the load was at the start there is no load colour at the end.
    c0, r0 = (int(round(v)) for v in px[0])
    last = iio.imread(files[ks[-1]])
    assert _is_load_colour(last[r0 - 2:r0 + 3, c0 - 2:c0 + 3]).mean() == 0.0


def test_gif_and_stills(tmp_path):
    s = make_scene({"crane": {"kind": "tower", "suspension_m": [12.0, 0.0, 25.0]}, "rope": {"length_m": 8.0},
                    "damping": {"ratio": 0.15},
                    "moves": [{"axis": "slew", "profile": "trapezoid", "start_s": 0.0, "angle_deg": 20.0,
                               "speed_deg_s": 10.0, "accel_deg_s2": 10.0}]}, duration_s=40.0)
    traj = simulate(s)
    paths = render_scene(traj, None, tmp_path, size=(160, 120), fps=8, fmt="gif", window=(0, 2.0),
                         quiet=True)
    names = [p.name for p in paths]
    assert names == ["scene.gif", "scene_peak_swing.png", "scene_end_of_moves.png", "scene_settled.png"]
    gif = iio.imread(paths[0], index=None)
    assert gif.shape[:3] == (16, 120, 160)
    stills = [iio.imread(p) for p in paths[1:]]
    for im in stills:
        assert im.shape == (120, 160, 3) and im.std() > 20
    # peak swing and settled are different moments: different pictures
    assert np.abs(stills[0].astype(int) - stills[2].astype(int)).mean() > 0.5


@pytest.mark.parametrize("fps", [15, 12, 30])
def test_gif_frame_delays_average_to_the_frame_rate(tmp_path, fps):
    """GIF stores each frame's delay in hundredths of a second (GIF89a, Graphic Control Extension):
    at 15 fps the delays must alternate (7, 7, 6 cs...) so the clip plays at 15 fps on average."""
    from PIL import Image

    from swingsim.render.writers import GifWriter

    frames = [np.full((16, 16, 3), (5 * i) % 250, np.uint8) for i in range(3 * fps)]
    w = GifWriter(tmp_path / "t.gif", (16, 16), fps, frames[:4])
    for f in frames:
        w.write(f)
    w.close()
    with Image.open(tmp_path / "t.gif") as im:
        delays = []
        for i in range(im.n_frames):
            im.seek(i)
            delays.append(im.info["duration"])  # Pillow reports milliseconds (centiseconds x 10)
    assert len(delays) == len(frames)
    # each delay is one of the two whole centiseconds around 100/fps...
    lo = 10 * int(100 // fps)
    assert set(delays) <= {lo, lo + 10}
    # ...and the total is within one centisecond of the clip's length, so the mean is 1/fps
    assert abs(sum(delays) - 1000 * len(frames) / fps) <= 10
    assert np.mean(delays) == pytest.approx(1000 / fps, abs=10 / len(frames))


def _layout(traj, views, size=SIZE):
    """The frame layout a render of ``traj`` uses (from a stage built the same way)."""
    from swingsim.render.facts import collect
    from swingsim.render.stage import Stage

    stage = Stage(traj, collect(traj), size=size, views=views)
    try:
        return stage.layout
    finally:
        stage.close()


def test_split_views_side_by_side(tmp_path):
    traj = simulate(_scene())
    render_scene(traj, None, tmp_path, size=SIZE, fps=4, fmt="png", split=("side", "plan"), window=(1.0, 1.5),
                 quiet=True, stills=False)
    img = iio.imread(tmp_path / "scene_frames" / "frame_00000.png")
    assert img.shape == (240, 320, 3)
    lay = _layout(traj, ("side", "plan"))
    (a, b), (d,) = lay.views, lay.dividers
    left = img[int(a.y0):int(a.y1), int(a.x0):int(a.x1)].astype(int)
    right = img[int(b.y0):int(b.y1), int(b.x0):int(b.x1)].astype(int)
    assert left.std() > 20 and right.std() > 20
    # the divider between the halves is a dark line
    mid = int(0.5 * (d.y0 + d.y1))
    assert img[mid - 20:mid + 20, int(d.x0):int(d.x1)].mean() < 80
    # two different views, not one picture twice
    n = min(left.shape[1], right.shape[1])
    assert np.abs(left[:, :n] - right[:, :n]).mean() > 10


def test_zone_turns_warning_colour_near_the_load():
    from swingsim.render.facts import collect
    from swingsim.render.palette import PALETTE, rgb
    from swingsim.render.stage import Stage

    zone = {"name": "hut", "kind": "obstacle", "min_m": [15.5, -2.0, 0.0], "max_m": [18.0, 2.0, 5.5],
            "margin_m": 1.0}
    traj = simulate(_scene(zones=[zone]))
    stage = Stage(traj, collect(traj), size=(160, 120), views=("side",))
    try:
        from swingsim.render.frames import draw_frames

        for t, near in ((0.0, False), (3.9, True)):
            next(draw_frames(stage, traj, np.array([t])))
            # the load's 2 m box against the zone's box: within the 1 m margin?
            load = traj.sample([t])["load"][0]
            gap_x = max(0.0, 15.5 - (load[0] + 1.0))
            gap_z = max(0.0, (load[2] - 1.0) - 5.5)
            assert (np.hypot(gap_x, gap_z) <= 1.0) == near
            # the same moment the summary counts as within the margin
            from swingsim.metrics.single import summarize

            first = summarize(traj).data["zones"][0]["first_within_margin_s"]
            assert (t >= first) == near
            assert stage.near_zones == (["hut"] if near else [])
            colour = stage.zones[0][1].GetProperty().GetColor()
            want = PALETTE["near"] if near else PALETTE["obstacle"]  # amber within the margin
            np.testing.assert_allclose(colour, rgb(want), atol=1e-6)
            assert ("Load near zone: hut" in stage.last_text.zone) == near
    finally:
        stage.close()


def test_user_mesh_load(tmp_path):
    import pyvista as pv

    pv.Sphere(radius=1.5, theta_resolution=16, phi_resolution=16).save(tmp_path / "tank.stl")
    from swingsim.scene import scene_from_dict

    from conftest import BASE

    d = dict(BASE, crane={"kind": "mobile", "suspension_m": [10.0, 0.0, 18.0]}, rope={"length_m": 8.0},
             load={"mass_kg": 900.0, "mesh_file": "tank.stl"}, duration_s=3.0,
             view={"position_m": [10.0, -14.0, 9.0], "focus_m": [10.0, 0.0, 9.0]})
    traj = simulate(scene_from_dict(d, file="tank.toml", base_dir=tmp_path))
    paths = render_scene(traj, None, tmp_path / "out", size=SIZE, fps=2, fmt="png", view="custom",
                         window=(0, 1), quiet=True)
    img = iio.imread(paths[1])
    # the sphere fills the middle of this close custom view, in the load colour
    box = _layout(traj, ("custom",)).views[0]
    c, r = int(0.5 * (box.x0 + box.x1)), int(0.5 * (box.y0 + box.y1))
    k = int(box.height / 12)  # the middle sixth of the view's height, as a square
    assert _is_load_colour(img[r - k:r + k, c - k:c + k]).mean() > 0.8
    (tmp_path / "bad.ply").write_text("not a mesh")
    d["load"] = {"mass_kg": 900.0, "mesh_file": "bad.ply"}
    traj = simulate(scene_from_dict(d, file="tank.toml", base_dir=tmp_path))
    from swingsim.errors import SceneError

    with pytest.raises(SceneError, match="load.mesh_file = 'bad.ply': (cannot be read as a mesh|the mesh has no points)"):
        render_scene(traj, None, tmp_path / "out2", size=SIZE, fps=2, window=(0, 1), quiet=True)
    assert not (tmp_path / "out2" / "tank.mp4").exists()


def test_parallel_segments_join_to_the_same_video(tmp_path):
    traj = simulate(_scene())
    kw = dict(size=(160, 120), fps=8, window=(0.0, 3.0), view="follow", quiet=True, stills=False)
    one = render_scene(traj, None, tmp_path / "one", workers=1, **kw)[0]
    two = render_scene(traj, None, tmp_path / "two", workers=2, **kw)[0]
    _, a = _frames_mp4(one)
    _, b = _frames_mp4(two)
    assert len(a) == len(b) == 24
    diff = [np.abs(x.astype(int) - y.astype(int)).mean() for x, y in zip(a, b)]
    assert max(diff) < 3.0  # same pictures, up to the encoder's rounding at the segment seam


DATA = Path(__file__).parent / "data"
# every bundled scene, and the render test scenes (a cylinder load, a custom [view]), through all views
CASES = [(p, ("side", "plan")) for p in scene_files()] + [
    (DATA / "render_tower.toml", ("oblique", "end")), (DATA / "render_gantry.toml", ("follow", "side")),
    (DATA / "render_mobile.toml", ("custom", "follow"))]


@pytest.mark.parametrize("path,views", CASES, ids=lambda c: c.name if isinstance(c, Path) else ",".join(c))
def test_every_scene_renders(path, views, tmp_path):
    from swingsim.scene import load_scene

    traj = simulate(load_scene(path))
    paths = render_scene(traj, None, tmp_path, size=(320, 180), fps=4, fmt="png", window=(0.0, 0.5),
                         split=views, quiet=True)
    assert len(paths) >= 3
    still = iio.imread(paths[1])
    assert still.std() > 15
    assert _is_load_colour(still).any()  # the load is in the picture


def test_no_opengl_is_one_clear_line(monkeypatch, tmp_path, capsys):
    monkeypatch.setattr(gl, "find_gl_libraries", lambda: {"EGL": False, "OSMesa": False, "GL": False})
    monkeypatch.delenv("VTK_DEFAULT_OPENGL_WINDOW", raising=False)
    monkeypatch.delenv("DISPLAY", raising=False)
    with pytest.raises(gl.RenderUnavailableError) as e:
        gl.require_opengl()
    assert "libegl1 libgl1-mesa-dri" in str(e.value) and "\n" not in str(e.value)
    from swingsim.cli import render as cli

    p = argparse.ArgumentParser()
    cli.add_arguments(p)
    scene = tmp_path / "s.toml"
    scene.write_text('title = "t"\nduration_s = 2.0\n[crane]\nsuspension_m = [0.0, 0.0, 20.0]\n'
                     '[rope]\nlength_m = 8.0\n[load]\nmass_kg = 500.0\n')
    rc = cli.main(p.parse_args([str(scene), "--out", str(tmp_path / "out")]))
    err = capsys.readouterr().err
    assert rc == 1 and err.count("\n") == 1 and "apt-get install libegl1 libgl1-mesa-dri" in err
    assert not (tmp_path / "out").exists()


def test_egl_chosen_without_a_display(monkeypatch):
    env = {}
    monkeypatch.setattr(gl, "find_gl_libraries", lambda: {"EGL": True, "OSMesa": False, "GL": True})
    assert gl.prepare_environment(env) == "vtkEGLRenderWindow"
    assert env["VTK_DEFAULT_OPENGL_WINDOW"] == "vtkEGLRenderWindow"
    env = {"DISPLAY": ":0"}
    assert gl.prepare_environment(env) == "vtkXOpenGLRenderWindow" and "VTK_DEFAULT_OPENGL_WINDOW" not in env


def test_envelope_covers_the_load_path_and_nothing_far():
    from swingsim.render.palette import envelope_image
    from swingsim.scene3d.ground import envelope

    # a quarter circle of radius 10 m, as a slew would sweep
    a = np.linspace(0, np.pi / 2, 200)
    path = np.column_stack([10 * np.cos(a), 10 * np.sin(a), np.zeros_like(a)])
    plane, classes = envelope(path, (1.0, 1.0))  # a 2 m x 2 m footprint
    rgba = envelope_image(classes, (0.2, 0.4, 0.6))
    b = plane.bounds
    ny, nx = rgba.shape[:2]

    def filled(x, y):
        i = int((y - b[2]) / (b[3] - b[2]) * ny)
        j = int((x - b[0]) / (b[1] - b[0]) * nx)
        return rgba[i, j, 3] > 0

    assert all(filled(10 * np.cos(t), 10 * np.sin(t)) for t in np.linspace(0, np.pi / 2, 17))
    assert all(filled(10.6 * np.cos(t), 10.6 * np.sin(t)) for t in np.linspace(0.1, 1.4, 9))  # within 1 m
    # 1.5 m inside the arc no upright 2 m square reaches (the nearest is 1.06 m off at 45 deg in x and y)
    assert not any(filled(8.5 * np.cos(t), 8.5 * np.sin(t)) for t in np.linspace(0.1, 1.4, 9))
    # the footprint is a square, not a disc: its corner reaches sqrt(2) m diagonally from the path's end
    assert filled(10.0 + 0.9, -0.9) and not filled(10.0 + 1.2, 0.0)
    assert not filled(2.0, 2.0)


def test_hook_block_and_sling_legs_from_model_outputs():
    """A model with a hook block gives outputs["hook"]; one with rigging gives attach_points (N, k, 3)."""
    from swingsim.render.facts import collect
    from swingsim.render.stage import Stage

    traj = simulate(_scene())
    stage = Stage(traj, collect(traj), size=(160, 120), views=("side",))
    try:
        row = {k: (v[0] if isinstance(v, np.ndarray) and v.ndim else v) for k, v in traj.sample([1.0]).items()}
        X, Y, phi, rho = (float(v[0]) for v in traj.motion.pose(np.array([1.0])))
        stage.pose(1.0, row, (X, Y, phi, rho), 1.0)
        assert not stage.hook_actor.GetVisibility()  # the point-mass model has no hook block
        assert sum(s.GetVisibility() for s in stage.slings) == 4  # four legs to the box's top corners
        hook = row["suspension"] + 0.7 * (row["load"] - row["suspension"])
        row2 = dict(row, hook=hook, attach_points=np.array([row["load"] + [-0.8, 0, 1.0], row["load"] + [0.8, 0, 1.0]]))
        stage.pose(1.0, row2, (X, Y, phi, rho), 1.0)
        assert stage.hook_actor.GetVisibility()
        assert sum(s.GetVisibility() for s in stage.slings) == 2
        np.testing.assert_allclose(stage.hook_actor.user_matrix[:3, 3], hook)
        # the rope runs from the suspension point to the hook block, not to the load
        np.testing.assert_allclose(stage.rope_line.points[0], row["suspension"])
        assert np.linalg.norm(stage.rope_line.points[1] - hook) < stage.hook_size
        legs = stage.sling_lines.points.reshape(8, 2, 3)
        np.testing.assert_allclose(legs[:2, 1], row2["attach_points"])
    finally:
        stage.close()


def test_swingsim_render_command(tmp_path, capsys):
    from swingsim.cli.main import main

    scene = tmp_path / "lift.toml"
    scene.write_text('title = "t"\nduration_s = 3.0\n[crane]\nkind = "bridge"\nsuspension_m = [0.0, 0.0, 12.0]\n'
                     '[rope]\nlength_m = 6.0\n[load]\nmass_kg = 500.0\n')
    out = tmp_path / "out"
    assert main(["render", str(scene), "--out", str(out), "--size", "160x120", "--fps", "5", "--to", "1",
                 "--format", "gif"]) == 0
    printed = capsys.readouterr().out.split()
    assert printed[0].endswith("lift.gif") and len(printed) == 3
    assert iio.imread(out / "lift.gif", index=None).shape[0] == 5
    # a second render into the same folder needs --force (the core's output-folder rule)
    assert main(["render", str(scene), "--out", str(out), "--size", "160x120"]) == 2
    assert "--force" in capsys.readouterr().err
    # run --video with a bad video option: one line, exit 2, nothing written
    assert main(["run", str(scene), "--out", str(tmp_path / "r"), "--video", "--split", "side"]) == 2
    assert not (tmp_path / "r").exists()


def test_progress_bar_only_on_a_terminal(monkeypatch):
    import sys

    from swingsim.render.frames import progress_bar

    monkeypatch.setattr(sys.stderr, "isatty", lambda: False, raising=False)
    assert progress_bar(10, False, "x").disable
    monkeypatch.setattr(sys.stderr, "isatty", lambda: True, raising=False)
    bar = progress_bar(10, False, "x")
    assert not bar.disable
    bar.close()
    assert progress_bar(10, True, "x").disable


def test_run_video_without_opengl_writes_nothing(monkeypatch, tmp_path, capsys):
    from swingsim.cli.main import main

    monkeypatch.setattr(gl, "find_gl_libraries", lambda: {"EGL": False, "OSMesa": False, "GL": False})
    monkeypatch.delenv("VTK_DEFAULT_OPENGL_WINDOW", raising=False)
    monkeypatch.delenv("DISPLAY", raising=False)
    scene = tmp_path / "s.toml"
    scene.write_text('title = "t"\nduration_s = 2.0\n[crane]\nsuspension_m = [0.0, 0.0, 20.0]\n'
                     '[rope]\nlength_m = 8.0\n[load]\nmass_kg = 500.0\n')
    assert main(["run", str(scene), "--out", str(tmp_path / "r"), "--video"]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "libegl1 libgl1-mesa-dri" in err
    assert not (tmp_path / "r").exists()
    # the demo goes on without its video and says why
    assert main(["demo", "--out", str(tmp_path / "d"), "--quiet"]) == 0
    assert "no demo video" in capsys.readouterr().err
    assert (tmp_path / "d" / "summary.json").exists() and not (tmp_path / "d" / "demo.mp4").exists()


def test_custom_view_is_the_scenes_camera():
    from swingsim.render.facts import collect
    from swingsim.render.stage import Stage

    traj = simulate(_scene(view={"position_m": [30.0, -25.0, 12.0], "focus_m": [10.0, 0.0, 8.0],
                                 "view_angle_deg": 42.0}))
    stage = Stage(traj, collect(traj), size=(160, 120), views=("custom",))
    try:
        from swingsim.render.frames import draw_frames

        next(draw_frames(stage, traj, np.array([0.5])))
        cam = stage.renderers[0].GetActiveCamera()
        np.testing.assert_allclose(cam.GetPosition(), (30.0, -25.0, 12.0))
        np.testing.assert_allclose(cam.GetFocalPoint(), (10.0, 0.0, 8.0))
        assert cam.GetViewAngle() == pytest.approx(42.0)
        # a still (no video time) carries the caution line but not the banner
        stage.pose(0.1, {k: (v[0] if isinstance(v, np.ndarray) and v.ndim else v)
                         for k, v in traj.sample([0.1]).items()}, (0.0, 0.0, 0.0, 8.0), video_t=None)
        assert stage.last_text.banner == "" and "competent person" in stage.last_text.caution
    finally:
        stage.close()


def _is_beam_colour(px):
    """The lifting beam's yellow (the hook block's colour) under any shading: red and green high, blue low."""
    px = np.asarray(px, dtype=float)
    r, g, b = px[..., 0], px[..., 1], px[..., 2]
    return (r > 90) & (g > 0.6 * r) & (g < 0.97 * r) & (b < 0.6 * g)


def test_spreader_beam_is_where_the_model_says(tmp_path):
    """The beam of a spreader scene: drawn between the model's end lugs, moved (not rebuilt) each frame."""
    import tomllib

    from swingsim.render.frames import draw_frames
    from swingsim.render.facts import collect
    from swingsim.render.stage import Stage
    from swingsim.scene import scene_from_dict

    path = next(p for p in scene_files() if 'kind = "spreader"' in p.read_text())
    d = tomllib.loads(path.read_text())
    # a close camera square to the beam (which runs along y), so the beam is many pixels deep
    d["view"] = {"position_m": [13.0, -5.0, 9.0], "focus_m": [28.0, 0.0, 6.5]}
    traj = simulate(scene_from_dict(d, file=path.name, base_dir=path.parent))
    render_scene(traj, None, tmp_path, size=SIZE, fps=5, fmt="png", view="custom", window=(0.0, 3.0),
                 quiet=True, stills=False)
    files = sorted((tmp_path / f"{path.stem}_frames").glob("frame_*.png"))
    assert len(files) == 15
    ks = [0, 10, 14]
    t = np.array(ks) / 5.0
    s = traj.sample(t)
    mid = s["spreader_ends"].mean(axis=1)  # the beam's midpoint, from the model
    stage = Stage(traj, collect(traj), size=SIZE, views=("custom",))
    try:
        beam, beam_line = stage.beam_actors
        local = np.array(beam.GetMapper().GetInput().points)
        for i, frame in enumerate(draw_frames(stage, traj, t)):
            # the beam's end lugs (local x = -+span/2) land on the model's end lugs
            m = beam.user_matrix
            for j, x in enumerate((-stage.beam_span / 2, stage.beam_span / 2)):
                np.testing.assert_allclose(m[:3, :3] @ (x, 0, 0) + m[:3, 3], s["spreader_ends"][i, j], atol=1e-9)
            np.testing.assert_allclose(beam_line.user_matrix, m)
            # top slings from the hook block to the end lugs, drop legs from the lugs to the load
            legs = stage.sling_lines.points.reshape(-1, 2, 3)
            np.testing.assert_allclose(legs[:2, 1], s["spreader_ends"][i], atol=1e-9)
            assert np.linalg.norm(legs[0, 0] - s["hook"][i]) < stage.hook_size
            np.testing.assert_allclose(legs[2:4], np.stack([s["spreader_lugs"][i], s["attach_points"][i]], 1),
                                       atol=1e-9)
            assert sum(a.GetVisibility() for a in stage.slings) == 4
        # posed by its transform, never rebuilt
        np.testing.assert_array_equal(np.array(beam.GetMapper().GetInput().points), local)
        cam = stage.renderers[0].GetActiveCamera()
        px = _pinhole(cam, mid, SIZE, stage.layout.views[0])
        np.testing.assert_allclose(stage.project(mid), px, atol=0.5)  # the renderer agrees
    finally:
        stage.close()
    # the beam rises with the spool after lift-off: a moving check, not a fixed spot
    assert px[0, 1] - px[-1, 1] > 12, px
    for k, (c, r) in zip(ks, px):
        img = iio.imread(files[k])
        r, c = int(round(r)), int(round(c))
        assert _is_beam_colour(img[r - 1:r + 2, c - 2:c + 3]).mean() > 0.6, (k, img[r, c])
    # where the beam was at the start there is no beam colour at the end
    c0, r0 = (int(round(v)) for v in px[0])
    assert _is_beam_colour(iio.imread(files[ks[-1]])[r0 - 1:r0 + 2, c0 - 2:c0 + 3]).mean() == 0.0


def test_bridle_legs_without_hook_meet_at_the_models_pin():
    """A bridle hung straight on the rope: the drawn legs run from the rope's end to the attachment points."""
    import tomllib

    from swingsim.render.frames import draw_frames
    from swingsim.render.facts import collect
    from swingsim.render.stage import Stage
    from swingsim.scene import scene_from_dict

    path = next(p for p in scene_files() if 'kind = "bridle"' in p.read_text())
    d = tomllib.loads(path.read_text())
    d.pop("hook", None)
    traj = simulate(scene_from_dict(d, file=path.name, base_dir=path.parent))
    assert traj.model.name == "rigid-load"
    t = np.array([0.0, 10.0, 20.0])
    s = traj.sample(t)
    pin = s["suspension"] + s["rope_length"][:, None] * s["rope_dir"]
    stage = Stage(traj, collect(traj), size=SIZE, views=("oblique",))
    try:
        for i, _ in enumerate(draw_frames(stage, traj, t)):
            legs = stage.sling_lines.points.reshape(-1, 2, 3)
            k = s["attach_points"].shape[1]
            np.testing.assert_allclose(legs[:k, 0], np.repeat(pin[i][None], k, 0), atol=1e-9)
            np.testing.assert_allclose(legs[:k, 1], s["attach_points"][i], atol=1e-9)
            # the model's legs have their declared length (6 m in the bridle scene)
            leg = np.linalg.norm(legs[:k, 1] - legs[:k, 0], axis=1)
            np.testing.assert_allclose(leg, traj.scene.rigging.leg_length_m, rtol=1e-9)
    finally:
        stage.close()


def test_mp4_writer_feeds_every_frame_in_order(tmp_path):
    """Frames go to ffmpeg from a feeder thread: read back with ffmpeg's own decoder
    (imageio-ffmpeg), every frame is there, in the order written, with its grey level
    (H.264 at CRF 20 keeps flat grey within a few levels: common practice)."""
    from swingsim.render.writers import Mp4Writer

    levels = [int(v) for v in np.linspace(16, 235, 25)]
    w = Mp4Writer(tmp_path / "grey.mp4", (64, 48), 25.0)
    for v in levels:
        w.write(np.full((48, 64, 3), v, dtype=np.uint8))
    path = w.close()
    _meta, frames = _frames_mp4(path)
    assert len(frames) == len(levels)
    means = [float(f.mean()) for f in frames]
    assert np.allclose(means, levels, atol=3.0)


def test_mp4_writer_encoder_failure_is_one_clear_error(tmp_path):
    """libx264 refuses odd frame sizes for yuv420p (4:2:0 halves both sides; ffmpeg's
    libx264 wrapper reports it): the error surfaces from the feeder thread as one
    RuntimeError naming ffmpeg, and no file or temporary is left."""
    from swingsim.render.writers import Mp4Writer

    w = Mp4Writer(tmp_path / "odd.mp4", (65, 49), 25.0)
    with pytest.raises(RuntimeError, match="ffmpeg"):
        for _ in range(200):
            w.write(np.zeros((49, 65, 3), dtype=np.uint8))
        w.close()
    assert list(tmp_path.iterdir()) == []
