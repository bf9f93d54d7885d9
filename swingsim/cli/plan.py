"""``swingsim plan-move SCENE --move N --max-residual-deg X --rope-range LOW:HIGH``.

Finds the shortest move (see :mod:`swingsim.study.plan`) whose residual swing
stays under X degrees for every rope length from LOW to HIGH metres, writes it
as a ``table`` profile the scene can use, verifies that table by simulating it
with the single-run solver at rope lengths between and at the search lengths,
and compares it with the move as the scene has it.  This module parses the
arguments and prints; :func:`swingsim.study.plan.write_plan` does the rest.

Writes into ``--out`` (default ``<scene>-plan``):

``move<N>-plan.csv``
    The profile: header ``t_s,position_m`` (``t_s,angle_deg`` for slew), time
    from the move's start, displacement from its start.
``move<N>-plan.toml``
    A ``[[moves]]`` snippet to paste into the scene in place of move N.
``plan.txt``, ``plan.json``
    The comparison with the scene's own move, the verification, the caution.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from swingsim.cli.options import add_allow_implausible, add_output_arguments, add_scene_argument, out_folder
from swingsim.errors import InputError
from swingsim.io.files import locked_out_dir, reported_write_errors
from swingsim.scene import load_scene
from swingsim.scene.plausibility import check_limit, check_plausible
from swingsim.scene.read import PLAIN_NUMBER
from swingsim.study import plan as planning


def _parse_range(text: str):
    """``"8:20"`` -> (8.0, 20.0); InputError naming ``--rope-range`` otherwise."""
    parts = text.split(":")
    if len(parts) != 2 or not all(PLAIN_NUMBER.fullmatch(x.strip()) for x in parts):
        raise InputError("--rope-range", "value", "expected LOW:HIGH in metres as plain numbers, e.g. 8:20", text)
    lo, hi = (float(x) for x in parts)
    return lo, hi


def add_arguments(p: argparse.ArgumentParser) -> None:
    """Options of ``swingsim plan-move``: the scene, which move, the swing bound, the rope lengths, the output.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The subcommand's parser, filled in place.
    """
    add_scene_argument(p)
    p.add_argument("--move", type=int, required=True, metavar="N", help="index of the move to plan (from 0)")
    p.add_argument("--max-residual-deg", type=float, required=True, metavar="X",
                   help="largest residual swing allowed after the move [deg]")
    p.add_argument("--rope-range", required=True, metavar="LOW:HIGH",
                   help="rope lengths the plan must cover [m], e.g. 8:20")
    add_output_arguments(p, "output folder (default: <scene name>-plan)", "this command's files")
    add_allow_implausible(p, "a very long rope or heavy load")


def main(args: argparse.Namespace) -> int:
    """Run ``swingsim plan-move``: check the request, plan and verify, print the result.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed request of :func:`add_arguments`: ``scene`` (file), ``move`` (index),
        ``max_residual_deg`` [deg], ``rope_range`` (``LOW:HIGH`` [m]), and ``out``,
        ``force``, ``quiet``, ``allow_implausible``.

    Returns
    -------
    int
        The exit code: 0 a verified plan was written, 1 no profile in the search
        meets the bound.

    Raises
    ------
    InputError
        For a bad scene, request or output folder, before anything is written.
    """
    scene = load_scene(args.scene)
    check_plausible(scene, allow=getattr(args, "allow_implausible", False))
    low, high = _parse_range(args.rope_range)
    check_limit("--rope-range", "rope.length_m", high, allow=getattr(args, "allow_implausible", False))
    bound_deg = float(args.max_residual_deg)
    planning.check_request(scene, args.move, bound_deg, low, high)
    out = Path(out_folder(args, Path(args.scene).stem + "-plan"))
    with locked_out_dir(out, args.force) as folder, reported_write_errors(folder):
        report = planning.write_plan(scene, args.move, bound_deg, low, high, folder)
    if not args.quiet:
        print("\n".join(report.lines[2:]))
        print(f"-> {out}/")
    return 0 if report.planned else 1
