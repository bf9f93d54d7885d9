"""``swingsim run`` and ``swingsim demo``: their arguments, and what they print.

``run`` and ``demo`` simulate a scene and write the run's outputs
(:func:`swingsim.report.outputs.write_run_outputs`, and the video with
``--video``).  ``check`` is :mod:`swingsim.cli.check`.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from swingsim.cli.export import load_mesh_of
from swingsim.cli.options import (add_allow_implausible, add_output_arguments, add_scene_argument, out_folder,
                                  time_window)
from swingsim.cli.render import add_arguments as add_render_arguments
from swingsim.cli.render import options as render_options
from swingsim.errors import InputError
from swingsim.io.files import check_out_dir, output_run
from swingsim.metrics.cautions import force_text
from swingsim.scene import load_scene
from swingsim.scene.plausibility import check_frames, check_plausible
from swingsim.study.realisations import run_scene

#: The bundled demo scene.
DEMO_SCENE = Path(__file__).parent.parent / "data" / "demo.toml"
#: The folder ``swingsim demo`` writes when ``--out`` is not given (in the current folder).
DEMO_OUT = "swingsim-demo"


def _add_output_arguments(p, scene=True):
    """Options shared by ``run`` and ``demo``: the scene (run), -o/-f/-q, the plots, the limits."""
    if scene:
        add_scene_argument(p)
    add_output_arguments(p, "output folder (default: <scene name>-results, in the current folder)" if scene
                         else f"output folder (default: {DEMO_OUT}, in the current folder)", "this run's files",
                         quiet_help="print nothing but errors (no headline, no list of files)")
    p.add_argument("--no-plots", action="store_true", help="skip the plot files (the briefing keeps its plots)")
    p.add_argument("--plots", choices=("png", "svg", "both"), default="png",
                   help="plot files as PNG (for screens and slides), SVG (vector, for print) or both (default: png)")
    p.add_argument("--paper", choices=("a4", "letter"), default="a4",
                   help="paper size of briefing.pdf: ISO A4 or US Letter (default: a4)")
    p.add_argument("--no-briefing", action="store_true",
                   help="skip briefing.pdf, the printable briefing sheet (a faster run)")
    add_allow_implausible(p, "e.g. very long runs")


def add_run_arguments(p: argparse.ArgumentParser) -> None:
    """Options of ``swingsim run``: the scene, the outputs, and the video options of ``--video``.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The ``run`` parser, filled in place; the video options go in its ``video`` group.
    """
    _add_output_arguments(p)
    p.add_argument("--video", action="store_true", help="also render the 3D video and stills")
    p.add_argument("--export", action="store_true",
                   help="also write the animated 3D scene lift.glb and viewer.html "
                        "(keys at --fps over --from/--to, as 'swingsim export')")
    add_render_arguments(p, scene=False)  # the render options (no pyvista import)


def add_demo_arguments(p: argparse.ArgumentParser) -> None:
    """Options of ``swingsim demo``.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The subcommand's parser, filled in place.
    """
    _add_output_arguments(p, scene=False)
    p.add_argument("--no-video", action="store_true", help="skip the demo video and stills")


def _print(args, text):
    if not getattr(args, "quiet", False):
        print(text)


def _headline(summary) -> str:
    """The few lines ``run`` prints: peaks, swing at the end of the moves, tension, cautions."""
    d = summary.data
    st = d["settle_time_s"]
    lines = [
        f"{d['title']}",
        f"  peak rope angle {d['peak_rope_angle_deg']:.1f} deg at {d['peak_rope_angle_time_s']:.1f} s; "
        f"peak excursion {d['peak_excursion_m']:.2f} m",
        f"  swing at end of moves {d['swing_at_move_end_deg'] or 0:.1f} deg; "
        + (f"landed at {d['touchdown_time_s']:.1f} s" if d.get("on_ground_at_end") and d.get("touchdown_time_s")
           else f"settles in {st:.1f} s" if st is not None else "does not settle within the run"),
        f"  peak hook load {force_text(d['peak_hook_load_kN'])}, line pull {force_text(d['peak_line_pull_kN'])} "
        f"(dynamic factor {d['dynamic_factor']:.2f})",
    ]
    for c in d["cautions"]:
        lines.append("  ! " + c)
    return "\n".join(lines)


def _do_run(args, scene_path, default_out) -> int:
    """Simulate a scene and write its outputs (and video); shared by ``run`` and ``demo``."""
    from swingsim.report.outputs import write_run_outputs  # matplotlib, only when a run writes plots

    scene = load_scene(scene_path)
    check_plausible(scene, allow=args.allow_implausible)
    out = check_out_dir(out_folder(args, default_out), args.force)
    want_video = getattr(args, "video", False)
    _refuse_unused_video_options(args, want_video)
    if want_video:
        _require_renderer()
        from swingsim.render.api import check_options  # bad video options: one line, before anything is written

        o = dict(size=(1280, 720), fps=30.0, fmt="mp4", view="oblique", speed=1.0, window=None, split=None)
        o.update({k: v for k, v in _video_options(args, scene).items() if k in o})
        check_options(scene, **o)
        check_frames(scene, o["fps"], o["speed"], o["window"], allow=args.allow_implausible)
        load_mesh_of(scene)  # a file that is not a mesh: refused before anything is written
    export = _export_options(args, scene)
    with output_run(out, args.force) as stage:
        traj, summary = run_scene(scene)  # with wind.realisations: the worst one and the statistics
        formats = ("png", "svg") if args.plots == "both" else (args.plots,)
        written = write_run_outputs(traj, summary, stage.path, plots=not args.no_plots, plot_formats=formats)
        stills = []
        if want_video and traj.valid:
            from swingsim.render import render_scene

            rendered = render_scene(traj, summary, stage.path, **_video_options(args, scene))
            written += rendered
            stills = [p for p in rendered[1:] if p.suffix == ".png" and p.is_file()]
        if not args.no_briefing:  # after the video, so the sheet shows its stills
            from swingsim.report.briefing import write_briefing

            written += write_briefing(traj, summary, stage.path, paper=args.paper, stills=stills)
        if export is not None:
            from swingsim.export.write import write_export

            written += write_export(traj, summary, stage.path, **export)
    _print(args, _headline(summary))
    _print(args, f"wrote {len(written)} files to {out}")
    if not traj.valid:
        sys.stderr.write(f"swingsim: run invalid: {traj.message}\n")
        return 1
    return 0


#: Options of the video group that ``run --export`` uses too (the glTF keys' rate and time window).
_EXPORT_SHARES = ("fps", "t_from", "t_to")


def _refuse_unused_video_options(args, want_video: bool) -> None:
    """A video option given to ``run`` without ``--video`` would be ignored: refuse it instead."""
    if want_video or getattr(args, "command", "") != "run":
        return
    defaults = argparse.ArgumentParser(add_help=False)
    add_render_arguments(defaults, scene=False)
    for action in defaults._actions:
        if getattr(args, action.dest, action.default) == action.default:
            continue
        if getattr(args, "export", False) and action.dest in _EXPORT_SHARES:
            continue
        raise InputError(action.option_strings[0], "", "is a video option and would be ignored; add --video "
                         "(or leave it out)", getattr(args, action.dest))


def _export_options(args, scene):
    """Keyword arguments of ``write_export`` for ``run --export`` and ``demo`` (checked), or None."""
    from swingsim.export.write import check_export_options

    if getattr(args, "command", "") == "demo":
        fps, t_from, t_to = 30.0, None, None
    elif getattr(args, "export", False):
        time_window(args, scene, "run")  # --to past the run's end: refused, not cut
        fps, t_from, t_to = args.fps, args.t_from, args.t_to
    else:
        return None
    t0, t1 = check_export_options(scene, fps=fps, t_from=t_from, t_to=t_to, allow=args.allow_implausible,
                                  source=getattr(args, "command", "run"))
    return dict(fps=fps, t_from=t0, t_to=t1, fmt="glb", load_mesh=load_mesh_of(scene))


def _video_options(args, scene=None) -> dict:
    """Keyword arguments of ``render_scene`` for ``run --video`` and ``demo``."""
    opts = {"quiet": getattr(args, "quiet", False)}
    if getattr(args, "command", "") == "demo":
        # short and modest, so the first command stays quick: the moves and the start of settling
        opts.update(size=(854, 480), fps=24, window=(0.0, 24.0))
    elif scene is not None:
        opts.update(render_options(args, scene))
    return opts


def _require_renderer():
    """No OpenGL: one line naming the packages to install, before any file is written."""
    from swingsim.render.gl import require_opengl

    require_opengl()


def run(args: argparse.Namespace) -> int:
    """Run ``swingsim run``: simulate the scene, write the outputs, print the headline.

    Parameters
    ----------
    args : argparse.Namespace
        The scene file, the output options, and ``video`` with the video options,
        parsed by :func:`add_run_arguments`.

    Returns
    -------
    int
        The exit code: 0 done, 1 the run stopped early (its outputs say why).
    """
    stem = Path(args.scene).stem
    return _do_run(args, args.scene, f"{stem}-results")


def demo(args: argparse.Namespace) -> int:
    """Run ``swingsim demo``: the bundled demo scene, with a short video when OpenGL is there.

    Parameters
    ----------
    args : argparse.Namespace
        The output options and ``no_video`` (:func:`add_demo_arguments`).

    Returns
    -------
    int
        The exit code, as :func:`run`.
    """
    args.video = False
    if not args.no_video:
        from swingsim.render.gl import RenderUnavailableError

        try:
            _require_renderer()
            args.video = True
        except RenderUnavailableError as exc:  # the demo goes on without its video, and says why
            sys.stderr.write(f"swingsim: note: no demo video: {exc}\n")
    return _do_run(args, DEMO_SCENE, DEMO_OUT)
