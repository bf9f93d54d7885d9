"""Write a run's 3D export: ``lift.glb`` (or ``lift.gltf`` + ``lift.bin``) and ``viewer.html``.

Every file is written atomically (:mod:`swingsim.io.files`).
"""

from __future__ import annotations

import math
from pathlib import Path

from swingsim.errors import InputError, SceneError
from swingsim import scene3d
from swingsim.export.gltf import build_gltf
from swingsim.export.viewer import viewer_html
from swingsim.io.files import atomic_write_bytes, atomic_write_text
from swingsim.metrics.single import summarize
from swingsim.scene.plausibility import MAX_FRAMES

#: File names of the export.
GLB_NAME, GLTF_NAME, BIN_NAME, VIEWER_NAME = "lift.glb", "lift.gltf", "lift.bin", "viewer.html"
#: The two forms of the glTF file.
FORMATS = ("glb", "gltf")
#: Animation key rates accepted [1/s].
MIN_FPS, MAX_FPS = 1.0, 120.0
#: Keys per animated property beyond which an export is implausible (an hour at 30 keys a second).
MAX_KEYS = MAX_FRAMES


def check_export_options(scene, *, fps: float, t_from=None, t_to=None, fmt: str = "glb", allow: bool = False,
                         source: str = "export") -> tuple:
    """Refuse bad export options with one line, before anything is simulated or written.

    Parameters
    ----------
    scene : swingsim.scene.Scene
        The scene to export (its duration bounds the window).
    fps : float
        Animation key rate [1/s], from 1 to 120.
    t_from, t_to : float, optional
        The window of simulated time [s]: 0 <= from < to, from before the run's end.
    fmt : str
        "glb" or "gltf".
    allow : bool
        Accept more than :data:`MAX_KEYS` keys (``--allow-implausible``).
    source : str
        The command, for the message.

    Returns
    -------
    tuple of float
        The window (start, end) [s], the end clipped to the run's duration.

    Raises
    ------
    InputError
        One line naming the option and what is allowed.
    """
    if not (isinstance(fps, (int, float)) and math.isfinite(fps) and MIN_FPS <= fps <= MAX_FPS):
        raise InputError(source, "--fps", f"expected an animation key rate from {MIN_FPS:g} to {MAX_FPS:g} "
                         "keys a second", fps)
    if fmt not in FORMATS:
        raise InputError(source, "--format", "expected one of " + ", ".join(FORMATS), fmt)
    t0 = 0.0 if t_from is None else float(t_from)
    t1 = scene.duration_s if t_to is None else float(t_to)
    if not (math.isfinite(t0) and math.isfinite(t1)) or t0 < 0 or t1 <= t0:
        raise InputError(source, "--from/--to", "expected 0 <= from < to (seconds)", f"{t0:g}..{t1:g}")
    if t0 >= scene.duration_s:
        raise InputError(source, "--from", f"must be before the end of the run (duration_s = "
                         f"{scene.duration_s:g})", t0)
    t1 = min(t1, scene.duration_s)
    keys = int(round((t1 - t0) * fps))
    if keys > MAX_KEYS and not allow:
        raise SceneError(source, "--fps", f"the animation would have {keys} keys, beyond the plausibility "
                         f"limit of {MAX_KEYS} (an hour at 30 keys a second); pass --allow-implausible "
                         "to export it anyway", fps)
    return t0, t1


def write_export(traj, summary, out_dir, *, fps: float = 30.0, t_from=None, t_to=None, fmt: str = "glb",
                 load_mesh=None) -> list:
    """Write the animated glTF scene of a run and its viewer page into ``out_dir``.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The solved run.
    summary : swingsim.metrics.Summary or dict or None
        Its measures; measured from ``traj`` when None.
    out_dir : str or pathlib.Path
        The output folder (created when missing; its other files are left alone).
    fps : float
        Animation key rate [1/s].
    t_from, t_to : float, optional
        The window of simulated time exported [s]; the whole run by default.
    fmt : {"glb", "gltf"}
        ``glb``: one binary file; ``gltf``: JSON text and a ``.bin`` beside it.
    load_mesh : swingsim.scene3d.Mesh, optional
        The user's mesh of the load, embedded instead of the drawn box [m].

    Returns
    -------
    list of pathlib.Path
        The files written: the glTF file(s), then ``viewer.html``.
    """
    out = Path(out_dir)
    summary = summarize(traj) if summary is None else summary
    built = scene3d.build(traj, load_mesh=load_mesh)  # one 3D scene for the file and the page
    asset = build_gltf(traj, summary, fps=fps, t_from=t_from, t_to=t_to, scene3d_built=built)
    glb = asset.to_glb()
    if fmt == "gltf":
        text, binary = asset.to_gltf(BIN_NAME)
        written = [atomic_write_bytes(out / BIN_NAME, binary), atomic_write_text(out / GLTF_NAME, text)]
    else:
        written = [atomic_write_bytes(out / GLB_NAME, glb)]
    written.append(atomic_write_text(out / VIEWER_NAME, viewer_html(glb, traj, summary, scene3d=built)))
    return written
