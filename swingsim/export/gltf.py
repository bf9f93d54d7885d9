"""A run as an animated glTF 2.0 scene, written with numpy, json and struct.

:func:`build_gltf` turns the bodies and poses of :func:`swingsim.scene3d.build`
into a :class:`GltfAsset`: meshes, PBR metallic-roughness materials in the
project's palette, a node tree (``ground``, ``crane`` and its moving parts,
``rope``, ``hook``, ``sling_1``..., ``spreader``, ``load``, ``zone_<name>``)
and one animation of translation, rotation and scale keys sampled at true
simulated times.  :meth:`GltfAsset.to_glb` gives the binary file,
:meth:`GltfAsset.to_gltf` the JSON and its ``.bin``.

Axes: glTF is +Y up, metres, right-handed; the scene's (x, y, z) becomes
(x, z, -y), so a reader that converts back to Z-up gets the scene's own numbers.

References
----------
The Khronos Group, *glTF 2.0 Specification* (also ISO/IEC 12113:2022):
file layout (GLB header and chunks), accessors, node TRS, animation samplers.
"""

from __future__ import annotations

import io
import json
import struct
from dataclasses import dataclass, field

import numpy as np
from PIL import Image

from swingsim import scene3d
from swingsim._version import __version__
from swingsim.metrics.cautions import CAUTION
from swingsim.metrics.single import summarize
from swingsim.render.palette import PALETTE, STYLE, darker, envelope_image, ground_image, rgb
from swingsim.scene3d import ground

#: Scene (Z-up) to glTF (Y-up): (x, y, z) -> (x, z, -y).
Z_UP_TO_Y_UP = np.array([[1.0, 0.0, 0.0], [0.0, 0.0, 1.0], [0.0, -1.0, 0.0]])
#: Summary keys carried in the scene's ``extras``.
SUMMARY_KEYS = ("peak_rope_angle_deg", "peak_rope_angle_time_s", "peak_excursion_m", "swing_at_move_end_deg",
                "residual_swing_deg", "settle_time_s", "peak_rope_tension_kN", "dynamic_factor",
                "min_clearance_m", "cautions")
#: A channel whose keys all lie this close to the first is written as the node's still value.
_STILL_TOL = 1e-6

_GLB_MAGIC, _GLB_VERSION = 0x46546C67, 2
_CHUNK_JSON, _CHUNK_BIN = 0x4E4F534A, 0x004E4942
_FLOAT, _USHORT, _UINT, _UBYTE = 5126, 5123, 5125, 5121
_ARRAY_BUFFER, _ELEMENT_ARRAY_BUFFER = 34962, 34963
_TRIANGLES, _LINES = 4, 1
#: Metallic and roughness factors by material (not named: 0 and 0.8).
_PBR = {"crane": (0.3, 0.6), "crane_dark": (0.3, 0.6), "trolley": (0.3, 0.6), "hook": (0.5, 0.45),
        "spreader": (0.5, 0.45), "rope": (0.6, 0.5), "sling": (0.0, 0.7), "load": (0.0, 0.65)}
#: Bodies of scene3d not written (the ground's grid labels are text the format does not carry).
_LEFT_OUT = ()
#: Crane bodies carried by the crane node when scene3d gives them no carrier.
_CRANE_ROOT = "crane"


@dataclass
class GltfAsset:
    """A glTF 2.0 document and its one binary buffer.

    Attributes
    ----------
    document : dict
        The glTF JSON (without ``buffers[0].uri``; :meth:`to_glb` and
        :meth:`to_gltf` complete it).
    binary : bytes
        The buffer: vertices, indices, images and animation keys, 4-byte aligned.
    key_times_s : numpy.ndarray
        The animation's key times [s] (true simulated times).
    """

    document: dict
    binary: bytes
    key_times_s: np.ndarray = field(default_factory=lambda: np.zeros(0))

    def _json(self, uri: str | None) -> bytes:
        doc = json.loads(json.dumps(self.document))
        doc["buffers"] = [{"byteLength": len(self.binary)} | ({"uri": uri} if uri else {})]
        return json.dumps(doc, separators=(",", ":"), ensure_ascii=False).encode("utf-8")

    def to_glb(self) -> bytes:
        """The binary glTF file (``.glb``): a 12-byte header, the JSON chunk, the BIN chunk.

        Returns
        -------
        bytes
            The whole file.

        References
        ----------
        glTF 2.0 Specification, section "Binary glTF Layout".
        """
        js = self._json(None)
        js += b" " * (-len(js) % 4)
        binary = self.binary + b"\0" * (-len(self.binary) % 4)
        total = 12 + 8 + len(js) + 8 + len(binary)
        return b"".join([struct.pack("<III", _GLB_MAGIC, _GLB_VERSION, total),
                         struct.pack("<II", len(js), _CHUNK_JSON), js,
                         struct.pack("<II", len(binary), _CHUNK_BIN), binary])

    def to_gltf(self, bin_name: str) -> tuple:
        """The JSON form: the document text and the bytes of its ``.bin`` file.

        Parameters
        ----------
        bin_name : str
            The ``.bin`` file's name, as the JSON refers to it (beside the JSON file).

        Returns
        -------
        tuple
            ``(json_text, bin_bytes)``.
        """
        return self._json(bin_name).decode("utf-8"), self.binary


class _Buffer:
    """The binary buffer being filled, with its bufferViews and accessors."""

    def __init__(self, doc: dict):
        self.doc = doc
        self.parts: list = []
        self.length = 0

    def view(self, data: bytes, target: int | None = None) -> int:
        pad = -self.length % 4
        if pad:
            self.parts.append(b"\0" * pad)
            self.length += pad
        view = {"buffer": 0, "byteOffset": self.length, "byteLength": len(data)}
        if target is not None:
            view["target"] = target
        self.parts.append(data)
        self.length += len(data)
        self.doc["bufferViews"].append(view)
        return len(self.doc["bufferViews"]) - 1

    def accessor(self, array: np.ndarray, kind: str, target: int | None = None, bounds: bool = True) -> int:
        array = np.ascontiguousarray(array)
        component = {np.dtype(np.float32): _FLOAT, np.dtype(np.uint16): _USHORT,
                     np.dtype(np.uint32): _UINT}[array.dtype]
        acc = {"bufferView": self.view(array.tobytes(), target), "componentType": component,
               "count": int(array.shape[0]), "type": kind}
        if bounds:
            flat = array.reshape(array.shape[0], -1)
            cast = float if component == _FLOAT else int
            acc["min"] = [cast(v) for v in flat.min(axis=0)]
            acc["max"] = [cast(v) for v in flat.max(axis=0)]
        self.doc["accessors"].append(acc)
        return len(self.doc["accessors"]) - 1

    def bytes(self) -> bytes:
        return b"".join(self.parts)


def _linear(hex_colour: str) -> list:
    """sRGB hex colour -> linear RGB (glTF colour factors are linear).

    References
    ----------
    IEC 61966-2-1:1999 (sRGB), the inverse transfer function.
    """
    c = np.asarray(rgb(hex_colour))
    return [float(v) for v in np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)]


def _png(image: np.ndarray) -> bytes:
    out = io.BytesIO()
    Image.fromarray(np.ascontiguousarray(image)).save(out, format="PNG", optimize=True)
    return out.getvalue()


def _to_y_up(m: np.ndarray) -> np.ndarray:
    """4x4 transforms (..., 4, 4) from the scene's Z-up frame to glTF's Y-up: C M C^T."""
    c = np.eye(4)
    c[:3, :3] = Z_UP_TO_Y_UP
    return c @ m @ c.T


def _trs(m: np.ndarray) -> tuple:
    """Translation (n, 3), unit quaternions (n, 4) (x, y, z, w) on one hemisphere, scale (n, 3) of (n, 4, 4)."""
    t = m[:, :3, 3]
    lin = m[:, :3, :3]
    s = np.linalg.norm(lin, axis=1)  # column norms: the local axes' stretch
    hidden = np.all(s < 1e-5, axis=1)
    s = np.where(hidden[:, None], 0.0, s)
    r = np.where(hidden[:, None, None], np.eye(3), lin / np.where(s > 0, s, 1.0)[:, None, :])
    from scipy.spatial.transform import Rotation  # lazily: start-up time of every command

    q = Rotation.from_matrix(r).as_quat()
    flips = np.ones(len(q))
    flips[1:] = np.sign(np.sum(q[1:] * q[:-1], axis=1) + 1e-300)
    q *= np.cumprod(np.where(flips == 0, 1.0, flips))[:, None]
    return t, q, s


def _key_times(traj, fps: float, t_from, t_to) -> np.ndarray:
    start = 0.0 if t_from is None else float(t_from)
    end = traj.t_end_s if t_to is None else min(float(t_to), traj.t_end_s)
    n = int(np.floor((end - start) * fps + 1e-9))
    t = start + np.arange(n + 1) / fps
    if end - t[-1] > 0.5 / fps:
        t = np.append(t, end)
    return t


def _summary_extras(summary) -> dict:
    data = summary.data if hasattr(summary, "data") else dict(summary)
    return {k: data[k] for k in SUMMARY_KEYS if k in data}


def _material(doc: dict, name: str, cache: dict, texture: int | None = None) -> int:
    key = (name, texture)
    if key in cache:
        return cache[key]
    base = name.removesuffix("_edge")
    style = STYLE.get(base, {"colour": base if base in PALETTE else "crane", "opacity": 1.0})
    hex_colour, opacity = PALETTE[style["colour"]], float(style["opacity"])
    if name != base:  # a zone's outline: its colour, darker and opaque
        hex_colour, opacity = darker(hex_colour), 1.0
    metal, rough = _PBR.get(base, (0.0, 0.8))
    pbr = {"baseColorFactor": _linear(hex_colour) + [opacity],
           "metallicFactor": metal, "roughnessFactor": rough}
    mat = {"name": name, "pbrMetallicRoughness": pbr}
    if texture is not None:
        pbr["baseColorTexture"] = {"index": texture}
        pbr["baseColorFactor"] = [1.0, 1.0, 1.0, 1.0]
    if name == "envelope" or opacity < 1.0:
        mat["alphaMode"] = "BLEND"
        mat["doubleSided"] = True
    if name in ("ground", "envelope"):
        mat["doubleSided"] = True
    doc["materials"].append(mat)
    cache[key] = len(doc["materials"]) - 1
    return cache[key]


def _texture(doc: dict, buf: _Buffer, image: np.ndarray, repeat: bool) -> int:
    doc["images"].append({"bufferView": buf.view(_png(image)), "mimeType": "image/png"})
    wrap = 10497 if repeat else 33071  # REPEAT, CLAMP_TO_EDGE
    doc["samplers"].append({"magFilter": 9729, "minFilter": 9987, "wrapS": wrap, "wrapT": wrap})
    doc["textures"].append({"sampler": len(doc["samplers"]) - 1, "source": len(doc["images"]) - 1})
    return len(doc["textures"]) - 1


def _mesh(doc: dict, buf: _Buffer, name: str, mesh, material: int, line_material: int | None, uv=None) -> int:
    pos = (np.asarray(mesh.vertices, dtype=float) @ Z_UP_TO_Y_UP.T).astype(np.float32)
    attrs = {"POSITION": buf.accessor(pos, "VEC3", _ARRAY_BUFFER)}
    if uv is not None:
        attrs["TEXCOORD_0"] = buf.accessor(np.asarray(uv, dtype=np.float32), "VEC2", _ARRAY_BUFFER, bounds=False)
    index_type = np.uint16 if len(pos) < 65535 else np.uint32
    prims = []
    if len(mesh.faces):
        prims.append({"attributes": attrs, "material": material, "mode": _TRIANGLES,
                      "indices": buf.accessor(np.asarray(mesh.faces, dtype=index_type).ravel(), "SCALAR",
                                              _ELEMENT_ARRAY_BUFFER)})
    if len(mesh.lines) and line_material is not None:
        prims.append({"attributes": attrs, "material": line_material, "mode": _LINES,
                      "indices": buf.accessor(np.asarray(mesh.lines, dtype=index_type).ravel(), "SCALAR",
                                              _ELEMENT_ARRAY_BUFFER)})
    doc["meshes"].append({"name": name, "primitives": prims})
    return len(doc["meshes"]) - 1


def _ground_tile(grid) -> tuple:
    """One major square of the metre grid as a repeating image, and the ground's uv scale."""
    tile = ground.GroundGrid(0.0, grid.major_m, 0.0, grid.major_m, grid.minor_m, grid.major_m)
    scale = ((grid.x1 - grid.x0) / grid.major_m, (grid.y1 - grid.y0) / grid.major_m)
    return ground_image(ground.ground_texture(tile)), scale


def _parents(s3d, names) -> dict:
    """glTF parent of each written body: crane parts keep scene3d's carrier, everything else is a root."""
    out = {}
    for name in names:
        if name in s3d.crane_roles and name != _CRANE_ROOT:
            parent = s3d.bodies[name].parent
            out[name] = parent if parent in names else _CRANE_ROOT
        else:
            out[name] = None
    return out


def build_gltf(traj, summary=None, *, fps: float = 30.0, t_from=None, t_to=None, load_mesh=None,
               scene3d_built=None) -> GltfAsset:
    """The animated glTF scene of a run.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The solved run.
    summary : swingsim.metrics.Summary or dict, optional
        Its measures (for the scene's ``extras``); measured from ``traj`` when None.
    fps : float
        Animation key rate [1/s]: keys every ``1 / fps`` seconds of simulated time,
        and one at the end of the window.
    t_from, t_to : float, optional
        The window of simulated time the animation covers [s]; the whole run by default.
        Key times stay true simulated times.
    load_mesh : swingsim.scene3d.Mesh, optional
        A user's mesh of the load (centre of gravity at its origin, z up) [m].
    scene3d_built : swingsim.scene3d.Scene3D, optional
        The run's 3D scene when the caller has built it already (the viewer uses the same).

    Returns
    -------
    GltfAsset
        The document and its buffer.

    References
    ----------
    The Khronos Group, *glTF 2.0 Specification*, sections "Nodes and Hierarchy",
    "Animations" and "Materials" (metallic-roughness).  Rotation matrix to
    quaternion: scipy.spatial.transform.Rotation.from_matrix.
    """
    summary = summarize(traj) if summary is None else summary
    s3d = scene3d.build(traj, load_mesh=load_mesh) if scene3d_built is None else scene3d_built
    t = _key_times(traj, fps, t_from, t_to)
    samples = traj.sample(t)
    has_hook = samples.get("hook") is not None
    frames = s3d.frames_from_samples(samples, traj.motion.pose(t))
    world = {k: _to_y_up(v) for k, v in frames.transforms.items()}

    names = [k for k in s3d.bodies if k not in _LEFT_OUT and (k != "hook" or has_hook)]
    used_slings = {k for k in names if k.startswith("sling_")
                   and np.any(np.linalg.norm(np.diff(frames.segments[k], axis=1), axis=-1) > 1e-6)}
    names = [k for k in names if not k.startswith("sling_") or k in used_slings]
    parents = _parents(s3d, names)
    title = traj.scene.title
    doc = {"asset": {"version": "2.0", "generator": f"swingsim {__version__}"},
           "scene": 0, "scenes": [], "nodes": [], "meshes": [], "materials": [], "accessors": [],
           "bufferViews": [], "images": [], "samplers": [], "textures": [], "animations": []}
    buf = _Buffer(doc)
    mats: dict = {}
    index = {name: i for i, name in enumerate(names)}
    grid = ground.GroundGrid.covering(s3d.layout.ground_m)

    for name in names:
        body = s3d.bodies[name]
        uv, texture = None, None
        if name == "ground":
            image, scale = _ground_tile(grid)
            texture = _texture(doc, buf, image, repeat=True)
            uv = np.asarray(body.mesh.uv) * scale
        elif body.texture is not None and body.material == "envelope":
            texture = _texture(doc, buf, envelope_image(body.texture), repeat=False)
            uv = body.mesh.uv
        mat = _material(doc, body.material, mats, texture)
        line_mat = _material(doc, body.material + "_edge", mats) if len(body.mesh.lines) else None
        node = {"name": name, "mesh": _mesh(doc, buf, name, body.mesh, mat, line_mat, uv)}
        doc["nodes"].append(node)
    for name in names:
        kids = [index[k] for k in names if parents[k] == name]
        if kids:
            doc["nodes"][index[name]]["children"] = kids
    roots = [index[k] for k in names if parents[k] is None]
    extras = {"title": title, "caution": CAUTION, "summary": _summary_extras(summary),
              "swingsim_version": __version__, "scene_file": traj.scene.name,
              "start_s": float(t[0]), "end_s": float(t[-1]), "key_rate_hz": float(fps)}
    doc["scenes"].append({"name": title, "nodes": roots, "extras": extras})

    time_acc = buf.accessor(t.astype(np.float32), "SCALAR")
    channels, samplers = [], []
    outputs: dict = {}  # identical key arrays (e.g. the jib's and the slewing part's turn) are stored once
    for name in names:
        if name not in world:
            continue
        m = world[name]
        parent = parents[name]
        if parent is not None and parent in world:
            m = np.linalg.inv(world[parent]) @ m
        trs = dict(zip(("translation", "rotation", "scale"), _trs(m)))
        node = doc["nodes"][index[name]]
        for path, values in trs.items():
            # a rope or sling leg follows its two end points at every key, even when one part stays still
            still = name not in frames.segments and np.all(np.abs(values - values[0]) <= _STILL_TOL)
            if still:
                default = {"translation": [0, 0, 0], "rotation": [0, 0, 0, 1], "scale": [1, 1, 1]}[path]
                v = [float(x) for x in values[0]]
                if not np.allclose(v, default, atol=_STILL_TOL):
                    node[path] = v
                continue
            node[path] = [float(x) for x in values[0]]
            kind = "VEC4" if path == "rotation" else "VEC3"
            keys = values.astype(np.float32)
            if keys.tobytes() not in outputs:
                outputs[keys.tobytes()] = buf.accessor(keys, kind)
            samplers.append({"input": time_acc, "interpolation": "LINEAR", "output": outputs[keys.tobytes()]})
            channels.append({"sampler": len(samplers) - 1, "target": {"node": index[name], "path": path}})
    if channels:
        doc["animations"].append({"name": title, "channels": channels, "samplers": samplers})
    for key in ("images", "samplers", "textures", "animations"):
        if not doc[key]:
            del doc[key]
    return GltfAsset(doc, buf.bytes(), t)
