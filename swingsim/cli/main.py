"""The ``swingsim`` command line: parses arguments and calls the public API.

No physics here.  Exit codes: 0 done; 1 the run could not give a trustworthy
result or an internal fault; 2 bad input (one line on stderr, nothing
written); 130 interrupted.
"""

from __future__ import annotations

import argparse
import importlib
import os
import signal
import sys
from pathlib import Path

from swingsim._version import __version__
from swingsim.errors import InputError, SimulationError

#: Extension subcommands: name -> (module, help).  Each module exposes
#: ``add_arguments(parser)`` and ``main(args) -> int``.
COMMANDS: dict[str, tuple[str, str]] = {
    "render": ("swingsim.cli.render", "render a 3D briefing video (MP4/GIF/PNG frames) and stills of a scene"),
}

# -- batch comparisons and move planning (issue 4) --
COMMANDS["compare"] = ("swingsim.study.compare", "run every variant of a sweep file and rank them "
                       "(comparison.csv, report.html)")
COMMANDS["plan-move"] = ("swingsim.cli.plan", "find the fastest move whose residual swing stays "
                         "under a bound over a range of rope lengths")

DEMO_SCENE = Path(__file__).parent.parent / "data" / "demo.toml"


class _Parser(argparse.ArgumentParser):
    def error(self, message):  # one line, exit 2
        sys.stderr.write(f"swingsim: error: {message} (see 'swingsim --help')\n")
        raise SystemExit(2)


def _add_run_args(p, scene=True):
    if scene:
        p.add_argument("scene", help="scene file (TOML)")
    p.add_argument("--out", metavar="DIR", help="output folder (default: <scene name>-results)")
    p.add_argument("--force", action="store_true",
                   help="write into a non-empty output folder, replacing only this run's files")
    p.add_argument("--no-plots", action="store_true", help="skip the PNG plots")
    p.add_argument("--quiet", action="store_true", help="print nothing but errors")
    p.add_argument("--allow-implausible", action="store_true",
                   help="accept values beyond the plausibility limits (e.g. very long runs)")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="swingsim", description=(
        "Simulate how a crane's hook and load swing during a lift: peak and residual swing, "
        "excursion, rope tension, settling time. A planning and training preview: it does not "
        "replace the lift plan, the manufacturer's data or the competent person."))
    parser.add_argument("--version", action="version", version=f"swingsim {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    p = sub.add_parser("run", help="simulate a scene and write summary, time series and plots")
    _add_run_args(p)
    _run_video_args(p)
    p = sub.add_parser("demo", help="run the bundled demo scene")
    _add_run_args(p, scene=False)
    p.add_argument("--no-video", action="store_true", help="skip the demo video and stills")
    p = sub.add_parser("check", help="validate a scene file without running it")
    p.add_argument("scene", help="scene file (TOML)")
    for name, (mod, help_) in COMMANDS.items():
        try:
            m = importlib.import_module(mod)
        except ImportError:  # pragma: no cover - an optional part not installed
            continue
        p = sub.add_parser(name, help=help_)
        m.add_arguments(p)
        p.set_defaults(_module=m)
    return parser


def _run_video_args(p):
    p.add_argument("--video", action="store_true", help="also render the 3D video and stills")
    from swingsim.cli.render import add_arguments  # the render options (no pyvista import)

    add_arguments(p, scene=False)


def _print(args, text):
    if not getattr(args, "quiet", False):
        print(text)


def _headline(summary) -> str:
    d = summary.data
    st = d["settle_time_s"]
    lines = [
        f"{d['title']}",
        f"  peak rope angle {d['peak_rope_angle_deg']:.2f} deg at {d['peak_rope_angle_time_s']:.1f} s; "
        f"peak excursion {d['peak_excursion_m']:.2f} m",
        f"  swing at end of moves {d['swing_at_move_end_deg'] or 0:.2f} deg; "
        + (f"settles in {st:.1f} s" if st is not None else "does not settle within the run"),
        f"  peak rope tension {d['peak_rope_tension_kN']:.1f} kN (dynamic factor {d['dynamic_factor']:.3f})",
    ]
    for c in d["cautions"]:
        lines.append("  ! " + c)
    return "\n".join(lines)


def cmd_check(args) -> int:
    from swingsim.scene import load_scene

    scene = load_scene(args.scene)
    from swingsim.scene.plausibility import check_plausible

    notes = check_plausible(scene, allow=True)
    print(f"{args.scene}: ok ({len(scene.moves)} moves, {scene.duration_s:g} s)")
    for n in notes:
        print(f"  note: {n}")
    return 0


def _do_run(args, scene_path, default_out) -> int:
    from swingsim.scene.plausibility import check_plausible
    from swingsim.io.files import check_out_dir, clean_partials
    from swingsim.report.outputs import write_run_outputs
    from swingsim.scene import load_scene

    scene = load_scene(scene_path)
    check_plausible(scene, allow=args.allow_implausible)
    out = check_out_dir(args.out or default_out, args.force)
    want_video = getattr(args, "video", False)
    if want_video:
        _require_renderer()
        from swingsim.scene.plausibility import check_frames
        from swingsim.render.api import check_options  # bad video options: one line, before anything is written

        o = dict(size=(1280, 720), fps=30.0, fmt="mp4", view="oblique", speed=1.0, window=None, split=None)
        o.update({k: v for k, v in _video_options(args, scene).items() if k in o})
        check_options(scene, **o)
        check_frames(scene, o["fps"], o["speed"], o["window"], allow=args.allow_implausible)
    from swingsim.metrics.single import summarize
    from swingsim.simulation import simulate

    traj = simulate(scene)
    summary = summarize(traj)
    clean_partials(out)
    written = write_run_outputs(traj, summary, out, plots=not args.no_plots)
    if want_video and traj.valid:
        from swingsim.render import render_scene

        written += render_scene(traj, summary, out, **_video_options(args, scene))
    _print(args, _headline(summary))
    _print(args, f"wrote {len(written)} files to {out}")
    if not traj.valid:
        sys.stderr.write(f"swingsim: run invalid: {traj.message}\n")
        return 1
    return 0


def _video_options(args, scene=None) -> dict:
    opts = {"quiet": getattr(args, "quiet", False)}
    if getattr(args, "command", "") == "demo":
        # short and modest, so the first command stays quick: the moves and the start of settling
        opts.update(size=(854, 480), fps=24, window=(0.0, 24.0))
    elif scene is not None:
        from swingsim.cli.render import options

        opts.update(options(args, scene))
    return opts


def _require_renderer():
    """No OpenGL: one line naming the packages to install, before any file is written."""
    from swingsim.render.gl import require_opengl

    require_opengl()


def cmd_run(args) -> int:
    stem = Path(args.scene).stem
    return _do_run(args, args.scene, f"{stem}-results")


def cmd_demo(args) -> int:
    args.video = False
    if not args.no_video:
        from swingsim.render.gl import RenderUnavailableError

        try:
            _require_renderer()
            args.video = True
        except RenderUnavailableError as exc:  # the demo goes on without its video, and says why
            sys.stderr.write(f"swingsim: note: no demo video: {exc}\n")
    return _do_run(args, DEMO_SCENE, "swingsim-demo")


def _on_sigterm(signum, frame):
    raise KeyboardInterrupt


def main(argv=None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not args.command:
        parser.print_help()
        return 2
    old = signal.signal(signal.SIGTERM, _on_sigterm)
    try:
        if hasattr(args, "_module"):
            return int(args._module.main(args) or 0)
        return {"run": cmd_run, "demo": cmd_demo, "check": cmd_check}[args.command](args)
    except InputError as exc:
        sys.stderr.write(f"swingsim: error: {exc.one_line()}\n")
        return 2
    except SimulationError as exc:
        sys.stderr.write(f"swingsim: {exc}\n")
        return 1
    except KeyboardInterrupt:
        from swingsim.io.files import WRITTEN

        done = ", ".join(p.name for p in WRITTEN) or "none"
        sys.stderr.write(f"swingsim: interrupted; files finished before the stop: {done}; "
                         "no partial file was left under a final name\n")
        return 130
    except Exception as exc:  # an internal fault: one line, traceback on request
        if os.environ.get("SWINGSIM_DEBUG"):
            raise
        sys.stderr.write(f"swingsim: internal error: {type(exc).__name__}: {exc} "
                         "(set SWINGSIM_DEBUG=1 for the traceback; please report it)\n")
        return 1
    finally:
        signal.signal(signal.SIGTERM, old)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
