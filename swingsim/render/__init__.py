"""3D briefing videos and stills of a run, rendered headless (PyVista + imageio-ffmpeg).

Importing this package is cheap: pyvista and VTK load on the first render, so
the core and the command line never need them.

>>> from swingsim.render import render_scene          # doctest: +SKIP
>>> render_scene(traj, summary, "out", view="side")    # doctest: +SKIP
"""

from __future__ import annotations

__all__ = ["render_scene", "RenderUnavailableError"]


def render_scene(traj, summary, out_dir, **options):
    """Render a run as a video and stills; see :func:`swingsim.render.api.render_scene`.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The solved run.
    summary : swingsim.metrics.Summary or dict or None
        Its measures; measured from ``traj`` when None.
    out_dir : str or pathlib.Path
        Folder to write into.
    **options
        The keyword options of :func:`swingsim.render.api.render_scene` (size, fps, fmt, view, ...).

    Returns
    -------
    list of pathlib.Path
        The video first, then the stills.
    """
    from swingsim.render.api import render_scene as _render

    return _render(traj, summary, out_dir, **options)


def __getattr__(name):
    if name == "RenderUnavailableError":
        from swingsim.render.gl import RenderUnavailableError

        return RenderUnavailableError
    raise AttributeError(name)
