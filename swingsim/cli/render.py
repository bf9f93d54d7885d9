"""``swingsim render SCENE --out DIR``: a 3D briefing video and stills of a scene.

An extension subcommand: ``add_arguments(parser)`` fills an argparse parser and
``main(args) -> int`` runs it.  Importing this module does not import pyvista.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from swingsim.cli.options import (add_allow_implausible, add_output_arguments, add_scene_argument, add_video_arguments,
                                  finish_written, out_folder, time_window, video_view)

HELP = "render a 3D video (MP4/GIF/PNG frames) and stills of a scene"


def add_arguments(parser: argparse.ArgumentParser, *, scene: bool = True) -> None:
    """Options of ``swingsim render`` (also used by ``swingsim run --video``).

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The parser, filled in place.
    scene : bool, optional
        Also add the scene, ``--out``, ``--force``, ``--quiet`` and
        ``--allow-implausible`` (False for ``run``, which has its own).
    """
    if scene:
        add_scene_argument(parser, metavar="SCENE")
        add_output_arguments(parser, "folder for the video and stills (default: <scene name>-video)",
                             "this render's files", quiet_help="no progress bar, no list of files")
        add_allow_implausible(parser, "very long runs or videos")
    add_video_arguments(parser)


def parse_size(text: str):
    """``"1280x720"`` -> (1280, 720); raises InputError on anything else.

    Parameters
    ----------
    text : str
        The ``--size`` option, ``WIDTHxHEIGHT``.

    Returns
    -------
    tuple of int
        Width and height [pixels].
    """
    from swingsim.errors import InputError

    try:
        w, h = (int(x) for x in str(text).lower().split("x"))
    except ValueError:
        raise InputError("render", "--size", "expected WIDTHxHEIGHT in pixels, e.g. 1280x720", text) from None
    return w, h


def options(args, scene) -> dict:
    """Keyword arguments of :func:`render_scene` from parsed arguments.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed video options of :func:`add_arguments`.
    scene : Scene
        The scene (its duration ends an open ``--from`` window; ``--to`` past it is refused).

    Returns
    -------
    dict
        ``size``, ``fps`` [1/s], ``fmt``, ``view``, ``speed`` [-], ``window``
        (start and end [s], or None), ``split``, ``stills`` and ``quality``.
    """
    source = getattr(args, "command", None) or "render"
    window = time_window(args, scene, source)
    view, split = video_view(args, source)
    return dict(size=parse_size(args.size), fps=args.fps, fmt=args.fmt, view=view, speed=args.speed,
                window=window, split=split, stills=getattr(args, "stills", True),
                quality=getattr(args, "quality", "standard"))


def main(args) -> int:
    """Run ``swingsim render``: simulate the scene, render the video and stills, list the files.

    Parameters
    ----------
    args : argparse.Namespace
        The scene file, the output options and the video options (see :func:`options`)
        parsed by :func:`add_arguments`.

    Returns
    -------
    int
        The exit code: 0 done, 1 the run or the renderer failed, 2 bad input.
    """
    from swingsim.errors import InputError, SimulationError
    from swingsim.scene import load_scene
    from swingsim.simulation import simulate
    from swingsim.render.api import check_options
    from swingsim.render.gl import RenderUnavailableError

    from swingsim.io.files import check_out_dir, output_run

    try:
        scene = load_scene(args.scene)
        opts = options(args, scene)
        check_options(scene, **{k: v for k, v in opts.items() if k != "stills"})
        from swingsim.scene.plausibility import check_frames, check_plausible

        check_plausible(scene, allow=args.allow_implausible)
        check_frames(scene, opts["fps"], opts["speed"], opts["window"], allow=args.allow_implausible)
        out = check_out_dir(out_folder(args, f"{Path(args.scene).stem}-video"), args.force)
    except InputError as exc:
        print(f"swingsim: error: {exc.one_line()}", file=sys.stderr)
        return 2
    try:
        traj = simulate(scene)
        summary = _summary(traj)
        from swingsim.render.api import render_scene

        with output_run(out, args.force) as stage:  # locked; the files appear only when all are done
            paths = [stage.final(p) for p in render_scene(traj, summary, stage.path, quiet=args.quiet, **opts)]
    except InputError as exc:
        print(f"swingsim: error: {exc.one_line()}", file=sys.stderr)
        return 2
    except (RenderUnavailableError, SimulationError) as exc:
        print(f"swingsim: {exc}", file=sys.stderr)
        return 1
    except OSError as exc:
        print(f"swingsim: cannot write to {out}: {exc.strerror or exc}", file=sys.stderr)
        return 1
    except RuntimeError as exc:  # encoder or worker failure, already one line
        print(f"swingsim: {exc}", file=sys.stderr)
        return 1
    return finish_written(paths, traj, args.quiet, "the video")


def _summary(traj):
    from swingsim.metrics.single import summarize

    return summarize(traj)
