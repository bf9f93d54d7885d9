"""Write a run's 3D export: ``lift.glb`` (or ``lift.gltf`` + ``lift.bin``) and ``viewer.html``.

Every file is written atomically (:mod:`swingsim.io.files`).  The viewer page
is written when :mod:`swingsim.export.viewer` is installed.
"""

from __future__ import annotations

import importlib.util
from pathlib import Path

from swingsim.export.gltf import build_gltf
from swingsim.io.files import atomic_write_bytes, atomic_write_text

#: File names of the export.
GLB_NAME, GLTF_NAME, BIN_NAME, VIEWER_NAME = "lift.glb", "lift.gltf", "lift.bin", "viewer.html"
#: The two forms of the glTF file.
FORMATS = ("glb", "gltf")


def _viewer_module():
    """The viewer page's module, or None when this install has no viewer."""
    if importlib.util.find_spec("swingsim.export.viewer") is None:
        return None
    from swingsim.export import viewer

    return viewer


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
        The files written: the glTF file(s), then ``viewer.html`` when there is a viewer.
    """
    out = Path(out_dir)
    asset = build_gltf(traj, summary, fps=fps, t_from=t_from, t_to=t_to, load_mesh=load_mesh)
    glb = asset.to_glb()
    if fmt == "gltf":
        text, binary = asset.to_gltf(BIN_NAME)
        written = [atomic_write_bytes(out / BIN_NAME, binary), atomic_write_text(out / GLTF_NAME, text)]
    else:
        written = [atomic_write_bytes(out / GLB_NAME, glb)]
    viewer = _viewer_module()
    if viewer is not None:
        written.append(atomic_write_text(out / VIEWER_NAME, viewer.viewer_html(glb, traj, summary)))
    return written
