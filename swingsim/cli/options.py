"""Options several commands share: where they write (``--out``, ``--force``) and ``--quiet``."""

from __future__ import annotations

import argparse
import sys

from swingsim.errors import InputError


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


def add_output_arguments(parser: argparse.ArgumentParser, out_help: str, replaced: str, *,
                         quiet_help: str = "print nothing but errors", short_flags: bool = False) -> None:
    """Add ``--out DIR``, ``--force`` and ``--quiet`` to a command's parser.

    Parameters
    ----------
    parser : argparse.ArgumentParser
        The command's parser, filled in place.
    out_help : str
        Help of ``--out``: what the folder holds and its default name.
    replaced : str
        What ``--force`` replaces in a non-empty folder, e.g. ``"this command's files"``.
    quiet_help : str, optional
        Help of ``--quiet``.
    short_flags : bool, optional
        Also accept ``-o`` for ``--out`` and ``-q`` for ``--quiet``.
    """
    parser.add_argument("--out", *(["-o"] if short_flags else []), metavar="DIR", default=None, help=out_help)
    parser.add_argument("--force", action="store_true",
                        help=f"write into a non-empty output folder, replacing only {replaced}")
    parser.add_argument("--quiet", *(["-q"] if short_flags else []), action="store_true", help=quiet_help)


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
