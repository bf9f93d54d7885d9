"""3D briefing videos and stills of a run, rendered headless (PyVista + imageio-ffmpeg).

Importing this package is cheap: pyvista and VTK load on the first render, so
the core and the command line never need them.

>>> from swingsim.render import render_scene          # doctest: +SKIP
>>> render_scene(traj, summary, "out", view="side")    # doctest: +SKIP
"""

from __future__ import annotations

__all__ = ["render_scene", "RenderUnavailableError"]


def render_scene(traj, summary, out_dir, **options):
    """Render a run as a video and stills; see :func:`swingsim.render.api.render_scene`."""
    from swingsim.render.api import render_scene as _render

    return _render(traj, summary, out_dir, **options)


def __getattr__(name):
    if name == "RenderUnavailableError":
        from swingsim.render.gl import RenderUnavailableError

        return RenderUnavailableError
    raise AttributeError(name)
