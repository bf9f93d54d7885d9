"""Tag lines and ground contact in the video, the glTF export and the viewer.

An invented long beam lifted off the ground out of plumb, with a tag line that
goes taut and is pulled past what one person can hold.  The glTF is read back
with pygltflib (an independent reader) and composed by the glTF 2.0
specification's node transform rule (T * R * S); the video's pixels are found
where VTK's own camera projects the line's ends; the viewer runs in headless
Chromium.
"""

from __future__ import annotations

import functools
import math
import os
import shutil
import subprocess
import json

import numpy as np
import pytest

from swingsim.cli.main import main
from swingsim.constants import STANDARD_GRAVITY
from swingsim.render.palette import PALETTE, rgb
from swingsim.scene import load_scene
from swingsim.simulation import simulate

from test_export_gltf import JS, _read, _to_scene, _tracks, _validator_missing, _world

pygltflib = pytest.importorskip("pygltflib")

#: Invented scene: a gantry lifts a 10 m beam resting off plumb; the tag line goes taut at about 3.5 s.
SCENE = """
title = "Beam lift-off with a tag line (invented)"
duration_s = 6.0
notes = "Invented scenario for the tests; no real site, crane or company."
[crane]
kind = "gantry"
suspension_m = [0.0, 0.0, 20.0]
[rope]
length_m = 14.018
[hook]
mass_kg = 500.0
[load]
mass_kg = 6000.0
size_m = [10.0, 0.5, 0.8]
wind_area_m2 = 8.0
[rigging]
kind = "bridle"
leg_length_m = 6.0
attach_m = [[-3.0, 0.0, 0.4], [3.0, 0.0, 0.4]]
[ground]
z_m = 0.0
[start]
on_ground = true
load_offset_m = [0.5, 0.0]
[[moves]]
axis = "hoist"
profile = "trapezoid"
start_s = 1.0
distance_m = 1.2
speed_m_s = 0.3
accel_m_s2 = 0.3
[[tag_lines]]
attach_m = [5.0, 0.0, 0.0]
anchor_m = [9.0, 3.0, 1.0]
length_m = 5.0
"""
ANCHOR = np.array([9.0, 3.0, 1.0])
#: Instants: resting (line slack, on the ground) and lifted (line over its 250 N default).
T_REST, T_PULLED = 0.0, 5.0


@pytest.fixture(scope="module")
def scene_path(tmp_path_factory):
    path = tmp_path_factory.mktemp("tag") / "tag.toml"
    path.write_text(SCENE, encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def traj(scene_path):
    return simulate(load_scene(scene_path))


@pytest.fixture(scope="module")
def exported(scene_path, tmp_path_factory):
    out = tmp_path_factory.mktemp("tag-export")
    assert main(["export", str(scene_path), "--out", str(out), "--quiet", "--fps", "5"]) == 0
    return out


def test_the_scene_has_what_the_checks_need(traj):
    s = traj.sample(np.array([T_REST, T_PULLED]))
    assert s["tag_line_tension_N"][0, 0] == 0.0 and s["tag_line_tension_N"][1, 0] > 250.0
    assert s["ground_normal_N"][0] > 0.0 and s["ground_normal_N"][1] == 0.0


def test_gltf_tag_line_follows_the_attachment_to_the_hand(traj, exported):
    gltf, blob = _read(exported / "lift.glb")
    t, tracks = _tracks(gltf, blob)
    names = [n.name for n in gltf.nodes]
    assert names.count("tag_line_1") == 1 and names.count("tag_person_1") == 1
    line = _world(gltf, tracks, "tag_line_1")
    want = traj.sample(t.astype(float))["tag_line_attach"][:, 0]
    # the unit rod's start is the node's origin, its far end local +y of the file (+z of the scene)
    np.testing.assert_allclose(_to_scene(line[:, :3, 3]), want, atol=1e-3, rtol=0)
    far = _to_scene(np.einsum("nij,j->ni", line, [0.0, 1.0, 0.0, 1.0])[:, :3])
    np.testing.assert_allclose(far, np.tile(ANCHOR, (len(t), 1)), atol=1e-3, rtol=0)
    keyed = {gltf.nodes[c.target.node].name + "." + c.target.path for c in gltf.animations[0].channels}
    assert {"tag_line_1.translation", "tag_line_1.rotation", "tag_line_1.scale"} <= keyed


def test_gltf_person_stands_at_the_anchor_on_the_ground(exported):
    gltf, blob = _read(exported / "lift.glb")
    node = next(n for n in gltf.nodes if n.name == "tag_person_1")
    acc = gltf.accessors[gltf.meshes[node.mesh].primitives[0].attributes.POSITION]
    lo, hi = _to_scene(np.array(acc.min)), _to_scene(np.array(acc.max))
    lo, hi = np.minimum(lo, hi), np.maximum(lo, hi)
    assert lo[0] < ANCHOR[0] < hi[0] and lo[1] < ANCHOR[1] < hi[1]
    # the feet on the ground (z 0 here), the head above the hand: a standing adult (common practice, about 1.7 m)
    assert lo[2] == pytest.approx(0.0, abs=0.03) and 1.5 < hi[2] < 2.0


def test_gltf_contact_marks_show_while_the_ground_pushes(traj, exported):
    gltf, blob = _read(exported / "lift.glb")
    t, tracks = _tracks(gltf, blob)
    s = traj.sample(t.astype(float))
    force, pts = s["contact_normal_N"], s["contact_points"]
    assert force[0].max() > 0.0 and np.all(force[-1] == 0.0)  # resting first, lifted at the end
    for i in range(force.shape[1]):
        m = _world(gltf, tracks, f"contact_{i + 1}")
        shown = np.abs(m[:, :3, :3]).max(axis=(1, 2)) > 1e-6
        np.testing.assert_array_equal(shown, force[:, i] > 0.0)
        # under its corner, in plan
        np.testing.assert_allclose(_to_scene(m[shown, :3, 3])[:, :2], pts[shown, i, :2], atol=1e-3)


def test_gltf_load_turns_with_the_model(traj, exported):
    # the turn of the rigid load (its yaw, as the model's load_rotation gives it) still reaches the file
    gltf, blob = _read(exported / "lift.glb")
    t, tracks = _tracks(gltf, blob)
    m = _world(gltf, tracks, "load")
    back = np.array([[1.0, 0, 0], [0, 0, -1.0], [0, 1.0, 0]])  # glTF (x, y, z) -> the scene's
    r = np.einsum("ij,njk,lk->nil", back, m[:, :3, :3], back)
    s = traj.sample(t.astype(float))
    assert np.max(np.abs(s["load_yaw_deg"])) > 2.0  # the line's pull turns the beam
    np.testing.assert_allclose(r, s["load_rotation"], atol=1e-5)


def test_khronos_validator_on_tag_lines_and_contact(exported):
    missing = _validator_missing()
    if missing and os.environ.get("CI"):
        pytest.fail(f"the glTF-Validator must run in CI: {missing}")
    if missing:
        pytest.skip(missing)
    r = subprocess.run(["node", str(JS / "validate.js"), str(exported / "lift.glb")], capture_output=True,
                       text=True, timeout=300)
    assert r.returncode == 0, r.stderr
    issues = json.loads(r.stdout.splitlines()[0])["issues"]
    assert issues["numErrors"] == 0 and issues["numWarnings"] == 0, issues["messages"]


def test_ground_is_drawn_at_its_height(tmp_path):
    from swingsim import scene3d
    from swingsim.export.gltf import build_gltf

    text = SCENE.replace("z_m = 0.0", "z_m = 1.5").replace("on_ground = true\nload_offset_m = [0.5, 0.0]", "on_ground = false")
    text = text.replace("duration_s = 6.0", "duration_s = 1.0").replace("[rope]\n", "[rope]\nstiffness_kN_per_m = 20000.0\n")
    text = text.replace("length_m = 14.018", "length_m = 10.0")
    text = text[:text.index("[[moves]]")]  # hanging still: no move, no tag line
    path = tmp_path / "raised.toml"
    path.write_text(text, encoding="utf-8")
    traj = simulate(load_scene(path))
    s3d = scene3d.build(traj)
    for name in ("ground", "envelope"):
        z = s3d.bodies[name].mesh.vertices[:, 2]
        assert z.min() >= 1.5 and z.max() < 1.6, name
    assert np.all(s3d.poses([0.5])["shadow"][:, 2, 3] > 1.5)
    asset = build_gltf(traj, fps=2.0, scene3d_built=s3d)
    i = next(k for k, n in enumerate(asset.document["nodes"]) if n["name"] == "ground")
    acc = asset.document["accessors"][asset.document["meshes"][asset.document["nodes"][i]["mesh"]]["primitives"][0]
                                      ["attributes"]["POSITION"]]
    assert acc["min"][1] == pytest.approx(1.5) and acc["max"][1] == pytest.approx(1.5)  # glTF's +Y is up


# ----------------------------------------------------------------------------- the video
def _near_colour(img, col, row, colour, tol=40, reach=2):
    r0, c0 = int(round(row)), int(round(col))
    patch = img[max(0, r0 - reach):r0 + reach + 1, max(0, c0 - reach):c0 + reach + 1].astype(int)
    want = np.array(rgb(colour)) * 255
    return bool(np.any(np.abs(patch - want).max(axis=-1) <= tol))


@functools.lru_cache(maxsize=None)
def _stage_frames(path):
    from swingsim.render.facts import collect
    from swingsim.render.frames import draw_frames
    from swingsim.render.stage import Stage

    traj = simulate(load_scene(path))
    stage = Stage(traj, collect(traj), size=(320, 240), views=("side",), video_len_s=6.0)
    out = {}
    try:
        for k, t in enumerate((T_REST, T_PULLED)):
            list(draw_frames(stage, traj, np.array([t]), video_t0_index=10 * k, fps=1.0))
            s = traj.sample(np.array([t]))
            ends = np.array([s["tag_line_attach"][0, 0], ANCHOR])
            out[t] = (stage.grab(overlay=False), stage.project(ends), dict(stage.texts), s)
    finally:
        stage.close()
    return out


@pytest.fixture(scope="module")
def frames(scene_path):
    pytest.importorskip("pyvista")
    from swingsim.render.gl import RenderUnavailableError

    try:
        return _stage_frames(str(scene_path))
    except RenderUnavailableError as exc:
        pytest.skip(str(exc))


@pytest.mark.parametrize("t, colour", [(T_REST, "tag_line"), (T_PULLED, "warn")])
def test_video_tag_line_between_its_ends_in_the_colour_of_its_pull(frames, t, colour):
    img, ends, _texts, _s = frames[t]
    # a slack line is the palette's tag line colour, one pulled past max_pull_N the palette's red
    hits = [_near_colour(img, *(ends[0] + f * (ends[1] - ends[0])), PALETTE[colour]) for f in np.linspace(0.2, 0.8, 7)]
    assert sum(hits) >= 6, hits
    other = "warn" if colour == "tag_line" else "tag_line"
    mid = ends[0] + 0.5 * (ends[1] - ends[0])
    assert not _near_colour(img, *mid, PALETTE[other], tol=25, reach=1)


def test_video_readout_gives_the_pull_and_the_weight_on_the_ground(frames):
    _img, _ends, rest, s0 = frames[T_REST]
    _img, _ends, pulled, s1 = frames[T_PULLED]
    assert "tag line 1   slack" in rest["readout"]
    # the ground carries the load: its reaction in tonnes-force (1 tf = 1000 kg x 9.80665 m/s^2, 3rd CGPM 1901)
    assert f"on ground  {s0['ground_normal_N'][0] / (1000 * STANDARD_GRAVITY):7.2f} t" in rest["readout"]
    pull = s1["tag_line_tension_N"][0, 0]
    assert f"tag line 1 {pull:7.0f} N" in pulled["readout"]
    assert "on ground     0.00 t" in pulled["readout"]
    assert f"TAG LINE 1 {pull:.0f} N > 250 N: let go" in " ".join(pulled["notes"].split())
    assert "TAG LINE" not in rest["notes"]


# ----------------------------------------------------------------------------- the viewer
from test_export_viewer import browser  # noqa: E402,F401  (the shared headless-Chromium fixture)


def test_viewer_shows_the_pull_and_colours_the_line(browser, exported, traj):
    from test_export_viewer import _open

    status, _ = _open(browser, exported, f"t={T_REST}", "tag_rest.png")
    assert status["tag_readouts"] == ["slack"] and status["tag_colours"] == [PALETTE["tag_line"]]
    status, _ = _open(browser, exported, f"t={T_PULLED}", "tag_pulled.png")
    pull = float(traj.sample(np.array([T_PULLED]))["tag_line_tension_N"][0, 0])
    shown = float(status["tag_readouts"][0].split()[0])
    # the page interpolates the embedded series (20 per second) between samples: within 2 %
    assert math.isclose(shown, pull, rel_tol=0.02) and "over limit" in status["tag_readouts"][0]
    assert status["tag_colours"] == [PALETTE["warn"]]
    assert status["readouts"]["ground"] == "0.00 t"


@pytest.mark.parametrize("size", [(640, 360), (1280, 720)], ids=lambda s: f"{s[0]}x{s[1]}")
def test_the_tag_line_note_fits_the_notes_with_the_fullest_panel(size):
    from swingsim.metrics.cautions import CAUTION
    from swingsim.render import layout as L
    from swingsim.render.overlay import contact_notes, readout_rows
    from swingsim.render.stage import LEGEND_MAX

    # a gantry in wind with a chart, three tag lines and the ground; the legend at its most
    lay = L.compute_layout(size, 1, CAUTION, readout_rows=readout_rows("gantry", True, True, 3, True),
                           legend_rows=LEGEND_MAX)
    pad = lay.text_boxes["pad"]
    chars = L.chars_per_line(lay.notes.width - 2 * pad, lay.fonts["notes"])
    note = contact_notes({"tag_lines": [("tag line 3", 1654.0, 250.0)]})
    kept = L.fit_lines(note + "\nmove 0 (hoist): ends", chars, lay.notes_lines)
    assert kept.split("\n")[0].startswith("TAG LINE 3 1654 N") and "let go" in kept
