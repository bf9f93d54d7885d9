"""``swingsim plan-move SCENE --move N --max-residual-deg X --rope-range LOW:HIGH [--rate-hz R]``.

Finds the shortest move (see :mod:`swingsim.study.plan`) whose residual swing
stays under X degrees for every rope length from LOW to HIGH metres at the
move's start (the scene's other moves, a hoist included, kept as given),
verifies it by simulation and compares it with the unshaped move.  A progress
bar shows on stderr (not with ``--quiet``).  This module parses the arguments
and prints; :func:`swingsim.study.plan.write_plan` does the rest.

Writes into ``--out`` (default ``<scene>-plan``):

``move<N>-plan.toml``
    A ``[[moves]]`` snippet (the planned move as scene keys) to paste into the scene in place of move N.
``move<N>-speed-reference.csv``
    The drive's speed reference: ``t_s,position_m,speed_m_s,accel_m_s2`` (degrees for slew) at R rows
    a second, rounded to 3 decimals; comment lines start with ``#``.
``move<N>-plan.png``
    The planned profile against the unshaped move, and the residual swing across the rope range.
``plan.txt``, ``plan.json``, ``candidates.csv``
    The plan in words, the verification, the candidates simulated, the caution.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from swingsim.cli.options import add_allow_implausible, add_output_arguments, add_scene_argument, out_folder
from swingsim.errors import InputError
from swingsim.io.files import locked_out_dir, reported_write_errors
from swingsim.scene import load_scene
from swingsim.scene.plausibility import check_limit, check_plausible
from swingsim.scene.read import PLAIN_NUMBER
from swingsim.study import plan as planning
from swingsim.study import plan_reduced


def _parse_range(text: str):
    """``"8:20"`` -> (8.0, 20.0); InputError naming ``--rope-range`` otherwise."""
    parts = text.split(":")
    if len(parts) != 2 or not all(PLAIN_NUMBER.fullmatch(x.strip()) for x in parts):
        raise InputError("--rope-range", "value", "expected LOW:HIGH in metres as plain numbers, e.g. 8:20", text)
    lo, hi = (float(x) for x in parts)
    return lo, hi


def _parse_rate(value) -> float:
    """``--rate-hz`` as a float (20 when not given); InputError naming it for text that is not a plain number."""
    if value is None:
        return 20.0
    if isinstance(value, str) and not PLAIN_NUMBER.fullmatch(value.strip()):
        raise InputError("--rate-hz", "value", "expected a plain number of rows per second, e.g. 20", value)
    return float(value)


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
                   help="rope lengths at the move's start the plan must cover [m], e.g. 8:20")
    p.add_argument("--rate-hz", default=None, metavar="R",
                   help="rows per second of the drive's speed reference [Hz] (default 20, at most 1000)")
    add_output_arguments(p, "output folder (default: <scene name>-plan)", "this command's files",
                         quiet_help="print nothing but errors (no progress bar either)")
    add_allow_implausible(p, "a very long rope or heavy load")


def main(args: argparse.Namespace) -> int:
    """Run ``swingsim plan-move``: check the request, plan and verify, print the result.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed request of :func:`add_arguments`: ``scene`` (file), ``move`` (index),
        ``max_residual_deg`` [deg], ``rope_range`` (``LOW:HIGH`` [m]), ``rate_hz`` [Hz], and
        ``out``, ``force``, ``quiet``, ``allow_implausible``.

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
    rate = _parse_rate(getattr(args, "rate_hz", None))
    planning.check_rate(rate)
    out = Path(out_folder(args, Path(args.scene).stem + "-plan"))
    bar = None
    if not args.quiet:
        from tqdm import tqdm

        if plan_reduced.needs_search_model(scene):
            print("swingsim: note: the search runs on the load's equivalent pendulum (batch engine); its best "
                  "candidates are then verified in turn with the scene's full model", file=sys.stderr)
        bar = tqdm(total=0, unit="run", desc="plan-move", file=sys.stderr, mininterval=0.5)
    try:
        with locked_out_dir(out, args.force) as folder, reported_write_errors(folder):
            report = planning.write_plan(scene, args.move, bound_deg, low, high, folder, rate_hz=rate,
                                         progress=bar)
    finally:
        if bar is not None:
            bar.close()
    if not args.quiet:
        print("\n".join(report.lines[2:]))
        print(f"Files in {out}/:")
        for name, what in zip(report.files, report.file_notes):
            print(f"  {name:<32} {what}")
    return 0 if report.planned else 1
