"""Drawing frames on a stage: shared by the one-process render (``api``) and its workers (``parallel``).

Frames are drawn at their true simulated times: the run is sampled in chunks,
the bodies' poses of a whole chunk come from :mod:`swingsim.scene3d` at once,
and the stage shows and photographs them one by one.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

from swingsim.errors import SceneError
from swingsim.scene3d import Mesh

#: Frames drawn per sampling call: bounds memory for any clip length.
CHUNK = 64


def read_load_mesh(scene) -> Mesh | None:
    """The user's mesh of the load (``load.mesh_file``; STL, OBJ or PLY), triangulated.

    Parameters
    ----------
    scene : swingsim.scene.Scene
        The scene; a relative ``load.mesh_file`` is read from the scene's folder.

    Returns
    -------
    swingsim.scene3d.Mesh or None
        Its surface in metres, or None when the scene names no mesh.

    Raises
    ------
    SceneError
        The file cannot be read as a mesh, or the mesh has no points.
    """
    if scene.load.mesh_file is None:
        return None
    import warnings

    import pyvista as pv
    from vtkmodules.vtkCommonCore import vtkObject

    p = Path(scene.load.mesh_file)
    full = p if p.is_absolute() else Path(scene.base_dir) / p
    shown = vtkObject.GetGlobalWarningDisplay()
    vtkObject.GlobalWarningDisplayOff()  # a bad file is reported once, below, not by VTK too
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            mesh = pv.read(full)
    except Exception as exc:  # noqa: BLE001 - any reader failure is bad input
        raise SceneError(scene.file, "load.mesh_file", f"cannot be read as a mesh ({type(exc).__name__})",
                         scene.load.mesh_file) from None
    finally:
        vtkObject.SetGlobalWarningDisplay(shown)
    if not isinstance(mesh, pv.PolyData):
        mesh = mesh.extract_surface()
    if mesh.n_points == 0:
        raise SceneError(scene.file, "load.mesh_file", "the mesh has no points", scene.load.mesh_file)
    mesh = mesh.triangulate()
    return Mesh(np.array(mesh.points, dtype=float), np.asarray(mesh.regular_faces, dtype=np.int64))


def build_stage(traj, facts, size, views, load_mesh, speed, video_len_s, quality="standard"):
    """The stage of a run, built once (``pyvista`` loads here).

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run.
    facts : swingsim.render.facts.Facts
        Its events.
    size : tuple of int
        Frame width and height [px].
    views : sequence of str
        One view, or two side by side.
    load_mesh : swingsim.scene3d.Mesh or None
        The user's load mesh (:func:`read_load_mesh`).
    speed : float
        Playback speed [-].
    video_len_s : float
        Length of the video [s].
    quality : {"standard", "high"}
        ``high`` supersamples (see :class:`swingsim.render.stage.Stage`).

    Returns
    -------
    swingsim.render.stage.Stage
        The stage, ready to pose.
    """
    from swingsim.render.stage import Stage

    return Stage(traj, facts, size=size, views=views, load_mesh=load_mesh, speed=speed, video_len_s=video_len_s,
                 quality=quality)


def progress_bar(total: int, quiet: bool, desc: str):
    """A frames progress bar on stderr, shown only on a terminal.

    Parameters
    ----------
    total : int
        Frames to draw.
    quiet : bool
        Never show it.
    desc : str
        Its label (the output's name).

    Returns
    -------
    tqdm.tqdm
        The bar (disabled when quiet or when stderr is not a terminal).
    """
    from tqdm import tqdm

    return tqdm(total=total, unit="frame", desc=desc, disable=quiet or not sys.stderr.isatty(),
                leave=False, dynamic_ncols=True)


def rows(samples: dict, n: int):
    """Split sampled outputs (arrays with a leading axis of n) into one dict per instant.

    Parameters
    ----------
    samples : dict
        ``Trajectory.sample`` at n instants; entries without that leading axis are shared.
    n : int
        Number of instants.

    Yields
    ------
    dict
        The outputs at one instant.
    """
    keys = [k for k, v in samples.items() if isinstance(v, np.ndarray) and v.ndim and len(v) == n]
    const = {k: v for k, v in samples.items() if k not in keys}
    for i in range(n):
        row = dict(const)
        for k in keys:
            row[k] = samples[k][i]
        yield row


def draw_frames(stage, traj, times, video_t0_index: int = 0, fps: float = 30.0, on_frame=None):
    """Pose and photograph ``stage`` at each of ``times``, yielding frames one by one.

    Parameters
    ----------
    stage : swingsim.render.stage.Stage
        The built stage.
    traj : swingsim.simulation.Trajectory
        The run.
    times : numpy.ndarray
        Simulated times of the frames [s].
    video_t0_index : int
        Index of the first frame in the whole video (sets each frame's video time).
    fps : float
        Frames per second of the video [1/s].
    on_frame : callable, optional
        Called after each frame (progress).

    Yields
    ------
    numpy.ndarray
        (height, width, 3) uint8 frames, top row first.
    """
    for c0 in range(0, len(times), CHUNK):
        ts = times[c0:c0 + CHUNK]
        samples = traj.sample(ts)
        frames = stage.scene3d.frames_from_samples(samples, traj.motion.pose(ts))
        stage.begin_chunk(samples)
        for i, row in enumerate(rows(samples, len(ts))):
            stage.show(float(ts[i]), frames, i, row, video_t=(video_t0_index + c0 + i) / fps)
            yield stage.grab()
            if on_frame:
                on_frame()
