"""Options the commands share, each defined once here.

Every command that writes files takes ``-o/--out DIR``, ``-f/--force`` and
``-q/--quiet`` the same way (:func:`add_output_arguments`); ``check`` writes
nothing and takes ``-q/--quiet`` only (:func:`add_quiet_argument`).  The video
options of ``render`` and ``run --video`` are :func:`add_video_arguments`; the
time window they and ``export`` take is checked by :func:`time_window`.
"""

from __future__ import annotations

import argparse
import math
import sys

from swingsim.errors import InputError

#: What ``-f/--force`` does, said the same way in every command's help.
FORCE_HELP = ("write into an output folder that already holds files: replace only {replaced} "
              "and keep every other file (without it a non-empty folder is refused)")


def add_scene_argument(parser: argparse.ArgumentParser, metavar: str | None = None) -> None:
    """Add the positional ``scene`` (the scene file a command reads) to a command's parser.

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The command's parser, filled in place.
    metavar : str, optional
        How usage and help name it (``scene`` when None).
    """
    parser.add_argument("scene", metavar=metavar, help="scene file (TOML)")


def add_quiet_argument(parser: argparse.ArgumentParser, quiet_help: str = "print nothing but errors") -> None:
    """Add ``-q/--quiet`` to a command's parser.

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The command's parser, filled in place.
    quiet_help : str, optional
        Help of ``--quiet``: what the command leaves unprinted.
    """
    parser.add_argument("-q", "--quiet", action="store_true", help=quiet_help)


def add_output_arguments(parser: argparse.ArgumentParser, out_help: str, replaced: str, *,
                         quiet_help: str = "print nothing but errors") -> None:
    """Add ``-o/--out DIR``, ``-f/--force`` and ``-q/--quiet`` to a command's parser.

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The command's parser, filled in place.
    out_help : str
        Help of ``--out``: what the folder holds and its true default.
    replaced : str
        What ``--force`` replaces in a non-empty folder, e.g. ``"this command's files"``.
    quiet_help : str, optional
        Help of ``--quiet``.
    """
    parser.add_argument("-o", "--out", metavar="DIR", default=None, help=out_help)
    parser.add_argument("-f", "--force", action="store_true", help=FORCE_HELP.format(replaced=replaced))
    add_quiet_argument(parser, quiet_help)


def out_folder(args: argparse.Namespace, default: str) -> str:
    """The output folder a command writes: ``--out``, or ``default`` when it is not given.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed options (``out``).
    default : str
        The folder when ``--out`` is not given.

    Returns
    -------
    str
        The folder's path as given.

    Raises
    ------
    InputError
        For ``--out ''`` (an empty path names no folder; it is never taken as the default).
    """
    if args.out is None:
        return default
    if not args.out.strip():
        raise InputError("--out", "", "empty path; name the output folder, or leave --out out for "
                         f"the default ({default})")
    return args.out


def add_allow_implausible(parser, examples: str) -> None:
    """``--allow-implausible``: accept values beyond the plausibility limits.

    Parameters
    ----------
    parser : argparse.ArgumentParser or argparse._ArgumentGroup
        Where the option goes.
    examples : str
        What the limits catch for this command, for its help text.
    """
    parser.add_argument("--allow-implausible", action="store_true",
                        help=f"accept values beyond the plausibility limits ({examples})")


# -- the time window (render, run --video, export) --------------------------------

def add_time_window_arguments(parser, what: str) -> None:
    """``--from SECONDS`` and ``--to SECONDS``: the window of simulated time shown or exported.

    Parameters
    ----------
    parser : argparse.ArgumentParser or argparse._ArgumentGroup
        Where the options go.
    what : str
        What the window bounds, for the help, e.g. ``"time window shown"``.
    """
    parser.add_argument("--from", dest="t_from", type=float, default=None, metavar="SECONDS",
                        help=f"start of the {what} [s] (default: the run's start, 0)")
    parser.add_argument("--to", dest="t_to", type=float, default=None, metavar="SECONDS",
                        help=f"end of the {what} [s] (default: the run's end, the scene's duration_s; "
                             "a time past it is refused)")


def time_window(args: argparse.Namespace, scene, source: str):
    """The ``--from/--to`` window, checked against the run, or None when neither is given.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed ``t_from`` and ``t_to`` [s] (either may be None).
    scene : swingsim.scene.Scene
        The scene (its ``duration_s`` ends the run).
    source : str
        The command, named in an error.

    Returns
    -------
    tuple of float or None
        (start, end) [s]: 0 <= start < end <= the scene's duration; None when neither option is given.

    Raises
    ------
    InputError
        For a window outside the run or the wrong way round (never cut silently).
    """
    t_from, t_to = getattr(args, "t_from", None), getattr(args, "t_to", None)
    if t_from is None and t_to is None:
        return None
    end = scene.duration_s
    t0 = 0.0 if t_from is None else float(t_from)
    t1 = end if t_to is None else float(t_to)
    for name, value in (("--from", t0), ("--to", t1)):
        if not math.isfinite(value) or value < 0:
            raise InputError(source, name, "expected a time in seconds from 0 to the run's end "
                             f"({end:g} s, duration_s of {scene.file})", value)
    if t1 > end:
        raise InputError(source, "--to", f"is past the end of the run ({end:g} s, duration_s of {scene.file}); "
                         f"give --to {end:g} or less, or leave it out for the run's end", t1)
    if t0 >= end:
        raise InputError(source, "--from", f"must be before the end of the run ({end:g} s, duration_s of "
                         f"{scene.file})", t0)
    if t1 <= t0:
        raise InputError(source, "--from/--to", "expected --from before --to (seconds)", f"{t0:g}..{t1:g}")
    return t0, t1


# -- the video options (render, run --video) --------------------------------------

#: The video options' defaults, as their help states them.
VIDEO_DEFAULTS = dict(size="1280x720", fps=30.0, fmt="mp4", view="oblique", speed=1.0)


def add_video_arguments(parser: argparse.ArgumentParser) -> None:
    """The ``video`` option group of ``swingsim render`` and ``swingsim run --video``.

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The parser, filled in place (a group named ``video``).
    """
    from swingsim.render.views import VIEWS  # names only; no pyvista

    g = parser.add_argument_group("video")
    d = VIDEO_DEFAULTS
    g.add_argument("--size", metavar="WxH", default=d["size"], help=f"frame size in pixels (default {d['size']})")
    g.add_argument("--fps", type=float, default=d["fps"], help=f"frames per second (default {d['fps']:g})")
    g.add_argument("--format", dest="fmt", choices=("mp4", "gif", "png"), default=d["fmt"],
                   help=f"mp4 (H.264), gif, or png (a folder of numbered frames); default {d['fmt']}")
    g.add_argument("--view", default=None, metavar="VIEW",
                   help="camera: " + ", ".join(VIEWS) + f" (custom: the scene's [view]); default {d['view']}; "
                        "not together with --split")
    g.add_argument("--split", metavar="VIEW1,VIEW2", default=None,
                   help="two views side by side, e.g. side,plan (instead of --view)")
    g.add_argument("--speed", type=float, default=d["speed"],
                   help=f"playback speed: 0.5 slow motion, 2 time-lapse (default {d['speed']:g})")
    add_time_window_arguments(g, "time window shown")
    g.add_argument("--no-stills", dest="stills", action="store_false",
                   help="do not write the PNG stills")
    g.add_argument("--quality", choices=("standard", "high"), default="standard",
                   help="standard (fast, for checking) or high (smooth, supersampled edges for the final "
                        "cut, about four times slower); default standard")


def video_view(args: argparse.Namespace, source: str) -> tuple:
    """The camera of ``--view`` and the two views of ``--split``, refusing both together.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed ``view`` and ``split``.
    source : str
        The command, named in an error.

    Returns
    -------
    tuple
        ``(view, split)``: the view name (the default when not given) and the two
        split views as a tuple, or None.

    Raises
    ------
    InputError
        When ``--view`` and ``--split`` are both given (the split would override the view).
    """
    split = tuple(v.strip() for v in args.split.split(",")) if args.split else None
    if split is not None and args.view is not None:
        raise InputError(source, "--view", f"cannot be combined with --split (which draws its own two views, "
                         f"{args.split}); give one of them", args.view)
    return (args.view or VIDEO_DEFAULTS["view"]), split


def finish_written(paths, traj, quiet: bool, what_stops: str) -> int:
    """Print the files a command wrote (unless quiet) and its exit code for the run's validity.

    Parameters
    ----------
    paths : list of pathlib.Path
        The files written.
    traj : swingsim.simulation.Trajectory
        The run they were made from.
    quiet : bool
        Print nothing on success.
    what_stops : str
        What the output is, for the notice of an invalid run (e.g. "the video").

    Returns
    -------
    int
        0, or 1 when the run is not valid (its reason printed on stderr).
    """
    if not quiet:
        for path in paths:
            print(path)
    if not traj.valid:
        print(f"swingsim: run invalid: {traj.message}; {what_stops} stops there", file=sys.stderr)
        return 1
    return 0
