"""The glTF 2.0 export, checked by outside readers.

* The Khronos glTF-Validator (npm ``gltf-validator``, run with node by
  ``tests/js/validate.js``) must report 0 errors on every bundled scene's export.
* pygltflib, a reader independent of the writer, decodes the accessors: node
  translations composed up the node tree must equal the run's time series
  (``timeseries.csv`` columns) to 1 mm after the axis change of the glTF 2.0
  Specification (+Y up: the scene's (x, y, z) is stored as (x, z, -y)).
* Quaternions are checked with scipy.spatial.transform.Rotation (unit length,
  one hemisphere between keys); the GLB layout against the glTF 2.0
  Specification, section "Binary glTF Layout" (magic ``glTF``, version 2,
  JSON chunk then BIN chunk, each 4-byte aligned).
"""

from __future__ import annotations

import functools
import json
import os
import shutil
import struct
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy.spatial.transform import Rotation

from swingsim.cli.main import main
from swingsim.metrics.cautions import CAUTION
from swingsim.metrics.single import summarize
from swingsim.report.tables import timeseries_columns
from swingsim.scene import load_scene
from swingsim.simulation import simulate

from test_scene import scene_files

pygltflib = pytest.importorskip("pygltflib", reason="pygltflib (the 'test' extra) is not installed")

ROOT = Path(__file__).resolve().parent.parent
JS = ROOT / "tests" / "js"
DEMO = ROOT / "swingsim" / "data" / "demo.toml"
#: glTF (x, y, z) back to the scene's Z-up frame: (x, -z, y).
Y_UP_TO_Z_UP = np.array([[1.0, 0.0, 0.0], [0.0, 0.0, -1.0], [0.0, 1.0, 0.0]])
_COMPONENTS = {5126: np.float32, 5123: np.uint16, 5125: np.uint32, 5121: np.uint8}
_WIDTH = {"SCALAR": 1, "VEC2": 2, "VEC3": 3, "VEC4": 4, "MAT4": 16}


@functools.lru_cache(maxsize=None)
def _run(path: str):
    traj = simulate(load_scene(path))
    return traj, summarize(traj)


def _export(path, out: Path, *args) -> Path:
    assert main(["export", str(path), "--out", str(out), "--quiet", *args]) == 0
    return out


def _read(path: Path):
    """The document and its buffer, read with pygltflib."""
    gltf = pygltflib.GLTF2().load(str(path))
    if path.suffix == ".glb":
        blob = gltf.binary_blob()
    else:
        blob = (path.parent / gltf.buffers[0].uri).read_bytes()
    return gltf, blob


def _accessor(gltf, blob: bytes, index: int) -> np.ndarray:
    acc = gltf.accessors[index]
    view = gltf.bufferViews[acc.bufferView]
    width = _WIDTH[acc.type]
    dtype = np.dtype(_COMPONENTS[acc.componentType])
    start = (view.byteOffset or 0) + (acc.byteOffset or 0)
    data = np.frombuffer(blob, dtype=dtype, count=acc.count * width, offset=start)
    return data.reshape(acc.count, width) if width > 1 else data


def _tracks(gltf, blob):
    """Key times and, per node index, its (n, 3) translation, (n, 4) rotation and (n, 3) scale at the keys."""
    anim = gltf.animations[0]
    inputs = {s.input for s in anim.samplers}
    assert len(inputs) == 1  # every channel keyed at the same times
    t = _accessor(gltf, blob, inputs.pop())
    n = len(t)
    tracks = {}
    for i, node in enumerate(gltf.nodes):
        tracks[i] = {"translation": np.tile(node.translation or [0.0, 0.0, 0.0], (n, 1)),
                     "rotation": np.tile(node.rotation or [0.0, 0.0, 0.0, 1.0], (n, 1)),
                     "scale": np.tile(node.scale or [1.0, 1.0, 1.0], (n, 1))}
    for ch in anim.channels:
        tracks[ch.target.node][ch.target.path] = _accessor(gltf, blob, anim.samplers[ch.sampler].output)
    return t, tracks


def _world(gltf, tracks, name: str) -> np.ndarray:
    """(n, 4, 4) world transforms of a node: the product of the local TRS matrices up the tree."""
    index = {node.name: i for i, node in enumerate(gltf.nodes)}
    parent = {c: i for i, node in enumerate(gltf.nodes) for c in (node.children or [])}
    i = index[name]
    out = None
    while i is not None:
        tr = tracks[i]
        n = len(tr["translation"])
        m = np.tile(np.eye(4), (n, 1, 1))
        m[:, :3, :3] = Rotation.from_quat(tr["rotation"]).as_matrix() * tr["scale"][:, None, :]
        m[:, :3, 3] = tr["translation"]
        out = m if out is None else m @ out
        i = parent.get(i)
    return out


def _to_scene(points_y_up: np.ndarray) -> np.ndarray:
    return points_y_up @ Y_UP_TO_Z_UP.T


# --------------------------------------------------------------------------- independent reader


@pytest.mark.parametrize("scene, bodies", [
    (DEMO, ("load", "trolley")),
    (ROOT / "scenes" / "panel_bridle_hook_block.toml", ("load", "hook", "trolley")),
    (ROOT / "scenes" / "gantry_beam_yard.toml", ("load", "trolley")),
], ids=lambda v: v.name if isinstance(v, Path) else "+".join(v))
def test_translations_equal_time_series(scene, bodies, tmp_path):
    """Node origins at the key times = the time series' columns, to 1 mm (pygltflib decodes)."""
    out = _export(scene, tmp_path / "x", "--fps", "10")
    gltf, blob = _read(out / "lift.glb")
    t, tracks = _tracks(gltf, blob)
    traj, _ = _run(str(scene))
    picks = np.unique(np.linspace(0, len(t) - 1, 9).astype(int))
    cols = timeseries_columns(traj, t[picks].astype(float))
    column = {"load": "load", "hook": "hook", "trolley": "suspension"}
    for name in bodies:
        got = _to_scene(_world(gltf, tracks, name)[picks, :3, 3])
        want = np.column_stack([cols[f"{column[name]}_{a}_m"] for a in "xyz"])
        np.testing.assert_allclose(got, want, atol=1e-3, rtol=0, err_msg=name)
    if "hook" not in bodies:
        assert "hook" not in [n.name for n in gltf.nodes]  # no hook block, no hook node


def test_rope_and_slings_follow_their_ends(tmp_path):
    """Rope and sling legs: translation, rotation and scale keyed at every key; the rope starts at the suspension point."""
    out = _export(DEMO, tmp_path / "x", "--fps", "5")
    gltf, blob = _read(out / "lift.glb")
    t, tracks = _tracks(gltf, blob)
    keyed = {}
    for ch in gltf.animations[0].channels:
        keyed.setdefault(gltf.nodes[ch.target.node].name, set()).add(ch.target.path)
    legs = [n.name for n in gltf.nodes if n.name == "rope" or n.name.startswith("sling_")]
    assert len(legs) >= 2
    for name in legs:
        assert keyed[name] == {"translation", "rotation", "scale"}, name
    traj, _ = _run(str(DEMO))
    cols = timeseries_columns(traj, t.astype(float))
    rope = _world(gltf, tracks, "rope")
    want = np.column_stack([cols[f"suspension_{a}_m"] for a in "xyz"])
    np.testing.assert_allclose(_to_scene(rope[:, :3, 3]), want, atol=1e-3, rtol=0)
    # the unit rod's far end (local +z of the scene, +y in the file) lies below the suspension point
    end = _to_scene(np.einsum("nij,j->ni", rope, [0.0, 1.0, 0.0, 1.0])[:, :3])
    assert np.all(end[:, 2] < want[:, 2] - 1.0)


def test_user_load_mesh_embedded(tmp_path):
    """A load given as an STL file (ASCII STL, a tetrahedron) is the load node's mesh."""
    stl = tmp_path / "part.stl"
    tri = [((0, 0, 0), (1, 0, 0), (0, 1, 0)), ((0, 0, 0), (0, 1, 0), (0, 0, 1)),
           ((0, 0, 0), (0, 0, 1), (1, 0, 0)), ((1, 0, 0), (0, 0, 1), (0, 1, 0))]
    text = ["solid part"]
    for a, b, c in tri:
        text += ["facet normal 0 0 0", " outer loop", *(f"  vertex {x} {y} {z}" for x, y, z in (a, b, c)),
                 " endloop", "endfacet"]
    stl.write_text("\n".join(text + ["endsolid part", ""]))
    scene = tmp_path / "s.toml"
    scene.write_text(DEMO.read_text().replace("[load]\n", '[load]\nmesh_file = "part.stl"\n', 1))
    for extra in DEMO.parent.glob("*.csv"):  # files the demo names beside it (its chart)
        (tmp_path / extra.name).write_bytes(extra.read_bytes())
    out = _export(scene, tmp_path / "x", "--fps", "2")
    gltf, blob = _read(out / "lift.glb")
    node = next(n for n in gltf.nodes if n.name == "load")
    prim = gltf.meshes[node.mesh].primitives[0]
    pos = _accessor(gltf, blob, prim.attributes.POSITION)
    assert len(_accessor(gltf, blob, prim.indices)) == 3 * 4  # four triangles
    # the tetrahedron's corners, back in the scene's axes
    assert {tuple(np.round(_to_scene(p.astype(float)), 6) + 0.0) for p in pos} == \
        {(0.0, 0.0, 0.0), (1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0)}


def test_load_rotation_carries_tilt(tmp_path):
    """The load node's world rotation is the model's load rotation (tilt and yaw) after the axis change."""
    scene = ROOT / "scenes" / "panel_bridle_hook_block.toml"
    out = _export(scene, tmp_path / "x", "--fps", "5")
    gltf, blob = _read(out / "lift.glb")
    t, tracks = _tracks(gltf, blob)
    traj, _ = _run(str(scene))
    rot = traj.sample(t.astype(float))["load_rotation"]
    world = _world(gltf, tracks, "load")[:, :3, :3]
    # back to Z-up: C^T R C, with C the Z-up -> Y-up matrix
    np.testing.assert_allclose(Y_UP_TO_Z_UP @ world @ Y_UP_TO_Z_UP.T, rot, atol=2e-6)
    assert np.max(np.degrees(np.arccos(np.clip(rot[:, 2, 2], -1, 1)))) > 0.5  # the panel does tilt


def test_animation_keys(tmp_path):
    """Times float32, strictly increasing from the run's start; unit quaternions on one hemisphere; LINEAR."""
    out = _export(DEMO, tmp_path / "x")
    gltf, blob = _read(out / "lift.glb")
    assert len(gltf.animations) == 1
    anim = gltf.animations[0]
    assert anim.name == load_scene(DEMO).title
    t = _accessor(gltf, blob, anim.samplers[0].input)
    assert t.dtype == np.float32
    assert t[0] == 0.0 and np.all(np.diff(t) > 0)
    assert len(t) == 60 * 30 + 1 and abs(float(t[-1]) - 60.0) < 1e-5
    acc = gltf.accessors[anim.samplers[0].input]
    assert acc.min == [float(t.min())] and acc.max == [float(t.max())]
    for s in anim.samplers:
        assert s.interpolation == "LINEAR"
    for ch in anim.channels:
        if ch.target.path == "rotation":
            q = _accessor(gltf, blob, anim.samplers[ch.sampler].output).astype(float)
            np.testing.assert_allclose(np.linalg.norm(q, axis=1), 1.0, atol=1e-6)
            assert np.all(np.sum(q[1:] * q[:-1], axis=1) >= 0.0)
    # 60 s at 30 keys a second stays under 2 MB
    assert (out / "lift.glb").stat().st_size < 2_000_000


def test_window_keys_at_true_time(tmp_path):
    out = _export(DEMO, tmp_path / "x", "--from", "10", "--to", "20.05", "--fps", "20")
    gltf, blob = _read(out / "lift.glb")
    t, _ = _tracks(gltf, blob)
    np.testing.assert_allclose(t[:3], [10.0, 10.05, 10.1], atol=1e-6)
    assert abs(float(t[-1]) - 20.05) < 1e-5


def test_node_tree_materials_extras(tmp_path):
    out = _export(DEMO, tmp_path / "x", "--fps", "5")
    gltf, blob = _read(out / "lift.glb")
    names = [n.name for n in gltf.nodes]
    by_name = {n.name: n for n in gltf.nodes}
    scene = load_scene(DEMO)
    for name in ("ground", "crane", "rope", "sling_1", "load", *(f"zone_{z.name}" for z in scene.zones)):
        assert name in names, name
    kids = lambda name: {gltf.nodes[i].name for i in (by_name[name].children or [])}  # noqa: E731
    assert {"slewing_part", "jib"} <= kids("crane")
    assert "trolley" in kids("jib")
    roots = {gltf.nodes[i].name for i in gltf.scenes[gltf.scene].nodes}
    assert {"ground", "crane", "rope", "load"} <= roots
    # no children under a node that is ever scaled
    _, tracks = _tracks(gltf, blob)
    for i, node in enumerate(gltf.nodes):
        if not np.allclose(tracks[i]["scale"], 1.0, atol=1e-6):
            assert not node.children, node.name
    mats = {m.name: m for m in gltf.materials}
    for z in scene.zones:
        m = mats[z.kind]
        assert m.alphaMode == "BLEND" and m.doubleSided is True and m.pbrMetallicRoughness.baseColorFactor[3] < 1
    extras = gltf.scenes[gltf.scene].extras
    assert extras["caution"] == CAUTION
    assert extras["title"] == scene.title
    from swingsim import __version__

    assert extras["swingsim_version"] == __version__
    _, summary = _run(str(DEMO))
    assert extras["summary"]["peak_rope_angle_deg"] == pytest.approx(summary["peak_rope_angle_deg"])


def test_glb_layout_and_gltf_form_agree(tmp_path):
    """GLB header and chunks per the glTF 2.0 Specification; the .gltf + .bin form decodes to the same keys."""
    glb = _export(DEMO, tmp_path / "a", "--fps", "5") / "lift.glb"
    data = glb.read_bytes()
    magic, version, length = struct.unpack_from("<4sII", data)
    assert (magic, version, length) == (b"glTF", 2, len(data))
    json_len, json_type = struct.unpack_from("<I4s", data, 12)
    assert json_type == b"JSON" and json_len % 4 == 0
    bin_len, bin_type = struct.unpack_from("<I4s", data, 20 + json_len)
    assert bin_type == b"BIN\0" and 28 + json_len + bin_len == len(data)
    out = _export(DEMO, tmp_path / "b", "--fps", "5", "--format", "gltf")
    assert (out / "lift.bin").exists() and not (out / "lift.glb").exists()
    doc = json.loads((out / "lift.gltf").read_text())
    assert doc["buffers"][0]["uri"] == "lift.bin"
    a, b = _read(glb), _read(out / "lift.gltf")
    ta, tracks_a = _tracks(*a)
    tb, tracks_b = _tracks(*b)
    np.testing.assert_array_equal(ta, tb)
    np.testing.assert_array_equal(_world(a[0], tracks_a, "load"), _world(b[0], tracks_b, "load"))


# --------------------------------------------------------------------------- Khronos glTF-Validator


def _validator_missing() -> str | None:
    if shutil.which("node") is None:
        return "node is not installed (.ci/run installs it)"
    if not (JS / "node_modules" / "gltf-validator").is_dir():
        return "gltf-validator is not installed: run 'npm ci' in tests/js (.ci/run does)"
    return None


def test_khronos_validator_every_bundled_scene(tmp_path):
    missing = _validator_missing()
    if missing and os.environ.get("CI"):
        pytest.fail(f"the glTF-Validator must run in CI: {missing}")
    if missing:
        pytest.skip(missing)
    files = []
    for i, path in enumerate(scene_files()):
        files.append(_export(path, tmp_path / f"{i}-{path.stem}", "--fps", "4") / "lift.glb")
    files.append(_export(DEMO, tmp_path / "gltf-form", "--fps", "4", "--format", "gltf") / "lift.gltf")
    r = subprocess.run(["node", str(JS / "validate.js"), *map(str, files)], capture_output=True, text=True,
                       timeout=300)
    assert r.returncode == 0, r.stderr
    reports = [json.loads(line) for line in r.stdout.splitlines()]
    assert len(reports) == len(files)
    for rep in reports:
        issues = rep["issues"]
        errors = [m for m in issues["messages"] if m["severity"] == 0]
        assert issues["numErrors"] == 0, (rep["file"], errors)
        assert issues["numWarnings"] == 0, (rep["file"], issues["messages"])
        assert rep["info"]["animationCount"] == 1


# --------------------------------------------------------------------------- command line


def test_export_refuses_bad_input_nothing_written(tmp_path, capsys):
    out = tmp_path / "never"
    for args in (["--fps", "0"], ["--fps", "nan"], ["--fps", "500"], ["--from", "5", "--to", "3"],
                 ["--from", "1000"], ["--from", "-1"], ["--format", "obj"]):
        try:
            code = main(["export", str(DEMO), "--out", str(out), *args])
        except SystemExit as exc:  # argparse's refusal, also one line
            code = exc.code
        assert code == 2, args
        err = capsys.readouterr().err.strip().splitlines()
        assert len(err) == 1 and err[0].startswith("swingsim: error:"), (args, err)
        assert not out.exists()
    busy = tmp_path / "busy"
    busy.mkdir()
    (busy / "keep.txt").write_text("x")
    assert main(["export", str(DEMO), "--out", str(busy)]) == 2
    assert sorted(p.name for p in busy.iterdir()) == ["keep.txt"]
    assert main(["export", str(DEMO), "--out", str(busy), "--force", "--quiet", "--fps", "2"]) == 0
    assert (busy / "lift.glb").exists() and (busy / "keep.txt").read_text() == "x"


def test_many_keys_implausible(scene_factory):
    """More keys than an hour at 30 a second needs --allow-implausible."""
    from swingsim.errors import SceneError
    from swingsim.export.write import MAX_KEYS, check_export_options

    scene = scene_factory(duration_s=1000.0)
    with pytest.raises(SceneError, match="plausibility limit"):
        check_export_options(scene, fps=120.0)
    assert check_export_options(scene, fps=120.0, allow=True) == (0.0, 1000.0)
    assert check_export_options(scene, fps=MAX_KEYS / 1000.0) == (0.0, 1000.0)


def test_run_export_writes_run_outputs_and_glb(tmp_path):
    out = tmp_path / "r"
    scene = ROOT / "scenes" / "mobile_luff_wind.toml"
    assert main(["run", str(scene), "--out", str(out), "--export", "--fps", "5", "--no-plots", "--quiet"]) == 0
    assert (out / "summary.json").exists() and (out / "lift.glb").stat().st_size > 1000
    gltf, _ = _read(out / "lift.glb")
    assert "boom" in [n.name for n in gltf.nodes]


def test_export_needs_no_vtk():
    """Exporting imports neither pyvista nor vtk (it runs where there is no OpenGL)."""
    code = ("import sys; from swingsim.cli.main import build_parser; build_parser(); "
            "from swingsim.scene import load_scene; from swingsim.simulation import simulate; "
            "from swingsim.export import build_gltf; "
            f"build_gltf(simulate(load_scene({str(DEMO)!r})), fps=2).to_glb(); "
            "bad = [m for m in ('pyvista', 'vtk', 'vtkmodules') if m in sys.modules]; "
            "assert not bad, bad")
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=300)
    assert r.returncode == 0, r.stderr
