"""Headless OpenGL: pick VTK's offscreen window and fail with one clear line when none works.

VTK chooses its render window class at run time.  Without a display, EGL (Mesa's
``libEGL`` with the software ``llvmpipe`` driver, from ``libegl1`` and
``libgl1-mesa-dri`` on Debian/Ubuntu) renders offscreen with no X server; asking
for it up front (``VTK_DEFAULT_OPENGL_WINDOW=vtkEGLRenderWindow``) also avoids
VTK's "bad X server connection" warning.  OSMesa is the other offscreen path.
"""

from __future__ import annotations

import ctypes.util
import os

from swingsim.errors import SimulationError

#: System packages that provide offscreen OpenGL on Debian/Ubuntu.
SYSTEM_PACKAGES = "libegl1 libgl1-mesa-dri"


class RenderUnavailableError(SimulationError):
    """No OpenGL to render with (the command line prints one line and exits with 1)."""


def _message(detail: str) -> str:
    return (f"cannot render: {detail}; install the offscreen OpenGL libraries "
            f"(Debian/Ubuntu: sudo apt-get install {SYSTEM_PACKAGES})")


def find_gl_libraries() -> dict:
    """Which OpenGL client libraries the dynamic loader can find.

    Returns
    -------
    dict
        ``{"EGL": bool, "OSMesa": bool, "GL": bool}``.
    """
    return {name: ctypes.util.find_library(name) is not None for name in ("EGL", "OSMesa", "GL")}


def prepare_environment(environ=None) -> str | None:
    """Choose VTK's offscreen window before VTK makes its first window.

    With no ``DISPLAY`` and no explicit choice, asks for EGL when ``libEGL``
    is present, else for OSMesa when ``libOSMesa`` is.

    Parameters
    ----------
    environ : dict, optional
        The environment to read and set (``os.environ`` by default).

    Returns
    -------
    str or None
        The window class chosen (or the user's own setting), or None when nothing can work.
    """
    env = os.environ if environ is None else environ
    libs = find_gl_libraries()
    if env.get("VTK_DEFAULT_OPENGL_WINDOW"):
        return env["VTK_DEFAULT_OPENGL_WINDOW"]
    if env.get("DISPLAY") and libs["GL"]:
        return "vtkXOpenGLRenderWindow"
    if libs["EGL"]:
        env["VTK_DEFAULT_OPENGL_WINDOW"] = "vtkEGLRenderWindow"
        return "vtkEGLRenderWindow"
    if libs["OSMesa"]:
        env["VTK_DEFAULT_OPENGL_WINDOW"] = "vtkOSMesaRenderWindow"
        return "vtkOSMesaRenderWindow"
    return None


def require_opengl(environ=None) -> str:
    """Make sure an offscreen OpenGL context can be made, or raise one clear line.

    Parameters
    ----------
    environ : dict, optional
        As for :func:`prepare_environment`, which chooses the window class first.

    Returns
    -------
    str
        The VTK window class in use.

    Raises
    ------
    RenderUnavailableError
        Naming the Debian/Ubuntu packages to install.
    """
    choice = prepare_environment(environ)
    if choice is None:
        raise RenderUnavailableError(_message("no OpenGL library found (neither libEGL nor libOSMesa)"))
    try:
        import pyvista  # noqa: F401  (imports VTK's rendering modules)
    except ImportError as exc:  # pragma: no cover - depends on the machine
        raise RenderUnavailableError(_message(f"pyvista/VTK could not load ({exc})")) from None
    return choice
