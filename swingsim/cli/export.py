"""``swingsim export SCENE --out DIR``: the lift as an animated glTF 2.0 scene and a viewer page.

An extension subcommand: ``add_arguments(parser)`` fills an argparse parser and
``main(args) -> int`` runs it.  Needs neither VTK nor OpenGL.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from swingsim.export.write import FORMATS, check_export_options, write_export
from swingsim.cli.options import (add_allow_implausible, add_output_arguments, add_scene_argument,
                                  add_time_window_arguments, finish_written, out_folder, time_window)
from swingsim.errors import InputError, SimulationError
from swingsim.io.files import check_out_dir, output_run

HELP = "export the lift as an animated 3D scene (glTF 2.0 .glb) and a self-contained viewer.html"


def add_arguments(parser: argparse.ArgumentParser) -> None:
    """Options of ``swingsim export``.

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The subcommand's parser, filled in place.
    """
    add_scene_argument(parser, "SCENE")
    add_output_arguments(parser, "output folder (default: <scene name>-export)", "this export's files")
    parser.add_argument("--fps", type=float, default=30.0,
                        help="animation keys per second of simulated time (default 30)")
    add_time_window_arguments(parser, "exported time window")
    parser.add_argument("--format", dest="fmt", choices=FORMATS, default="glb",
                        help="glb (one binary file, default) or gltf (JSON text and a .bin)")
    add_allow_implausible(parser, "very long runs or many keys")


def load_mesh_of(scene):
    """The user's load mesh named by the scene (``load.mesh_file``), or None.

    Parameters
    ----------
    scene : swingsim.scene.Scene
        The scene.

    Returns
    -------
    swingsim.scene3d.Mesh or None
        The mesh [m], read with the video renderer's reader (only when the scene names a file).
    """
    if scene.load.mesh_file is None:
        return None
    from swingsim.render.frames import read_load_mesh

    return read_load_mesh(scene)


def main(args) -> int:
    """Run ``swingsim export``: check the options, simulate, write the glTF file and the viewer.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed options of :func:`add_arguments`.

    Returns
    -------
    int
        The exit code: 0 done, 1 the run stopped early or a file could not be
        written, 2 bad input (one line on stderr, nothing written).
    """
    from swingsim.metrics.single import summarize
    from swingsim.scene import load_scene
    from swingsim.scene.plausibility import check_plausible
    from swingsim.simulation import simulate

    try:
        scene = load_scene(args.scene)
        check_plausible(scene, allow=args.allow_implausible)
        time_window(args, scene, "export")  # --to past the run's end: refused, not cut
        t0, t1 = check_export_options(scene, fps=args.fps, t_from=args.t_from, t_to=args.t_to, fmt=args.fmt,
                                      allow=args.allow_implausible)
        out = check_out_dir(out_folder(args, f"{Path(args.scene).stem}-export"), args.force)
        mesh = load_mesh_of(scene)
    except InputError as exc:
        print(f"swingsim: error: {exc.one_line()}", file=sys.stderr)
        return 2
    try:
        traj = simulate(scene)
        summary = summarize(traj)
        with output_run(out, args.force) as stage:  # locked; the files appear only when all are done
            paths = [stage.final(p) for p in write_export(traj, summary, stage.path, fps=args.fps, t_from=t0,
                                                          t_to=t1, fmt=args.fmt, load_mesh=mesh)]
    except InputError as exc:
        print(f"swingsim: error: {exc.one_line()}", file=sys.stderr)
        return 2
    except SimulationError as exc:
        print(f"swingsim: {exc}", file=sys.stderr)
        return 1
    except OSError as exc:
        print(f"swingsim: cannot write to {out}: {exc.strerror or exc}", file=sys.stderr)
        return 1
    return finish_written(paths, traj, args.quiet, "the animation")
