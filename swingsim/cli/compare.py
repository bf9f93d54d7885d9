"""``swingsim compare SWEEP --out DIR``: the arguments, and what is printed.

The comparison itself (running the variants, the files it writes) is
:mod:`swingsim.study.compare`.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from swingsim.cli.options import add_output_arguments, out_folder
from swingsim.errors import InputError
from swingsim.metrics import cautions
from swingsim.report.plots_compare import format_number
from swingsim.study.compare import cell, compare
from swingsim.study.variants import PLAUSIBLE_VARIANTS, load_sweep

def add_arguments(p: argparse.ArgumentParser) -> None:
    """Options of ``swingsim compare``: the sweep file, the output folder, where and how to run the variants.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The subcommand's parser, filled in place.
    """
    p.add_argument("sweep", help="sweep file (TOML): a base scene and the quantities to vary")
    add_output_arguments(p, "output folder (default: <sweep name>-comparison)", "this command's files")
    p.add_argument("--resume", action="store_true",
                   help="keep the finished rows of an interrupted run in DIR and run only the rest")
    g = p.add_mutually_exclusive_group()
    g.add_argument("--workers", type=int, metavar="N",
                   help="start a local Dask cluster with N worker processes (needs dask.distributed)")
    g.add_argument("--cluster", metavar="ADDRESS",
                   help="send the chunks to a running Dask scheduler, e.g. tcp://10.0.0.5:8786")
    p.add_argument("--engine", choices=("batch", "single"), default="batch",
                   help="batch: vectorised engine (default); single: one solve_ivp run per variant")
    p.add_argument("--chunk", type=int, metavar="N", help="variants per chunk (default: sized for memory)")
    p.add_argument("--no-sensitivity", action="store_true", help="skip the shaper sensitivity study")
    p.add_argument("--allow-implausible", action="store_true",
                   help=f"accept more than {PLAUSIBLE_VARIANTS:,} variants")


def main(args: argparse.Namespace) -> int:
    """Run ``swingsim compare``: check the options, run the sweep, print the best variants.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed options of :func:`add_arguments`: the sweep file, the output folder
        (``out``, ``resume``, ``force``), where and how to run (``workers`` or ``cluster``,
        ``engine``, ``chunk``), ``no_sensitivity`` and ``quiet``.

    Returns
    -------
    int
        The exit code: 0 done (bad input raises instead).

    Raises
    ------
    InputError
        For a bad option, sweep file or output folder (exit code 2, see
        :func:`swingsim.cli.main.main`).
    """
    if args.workers is not None and args.workers < 1:
        raise InputError("--workers", "value", "expected a whole number >= 1", args.workers)
    if args.chunk is not None and args.chunk < 1:
        raise InputError("--chunk", "value", "expected a whole number >= 1", args.chunk)
    if args.cluster is not None and not args.cluster.strip():
        raise InputError("--cluster", "", "expected the scheduler's address, e.g. tcp://10.0.0.5:8786", args.cluster)
    if args.resume and args.force:
        raise InputError("--resume", "", "cannot be combined with --force (which starts again)")
    sweep = load_sweep(args.sweep, allow_implausible=getattr(args, "allow_implausible", False))
    out = Path(out_folder(args, Path(args.sweep).stem + "-comparison"))
    quiet = getattr(args, "quiet", False)
    bar = None
    if not quiet and sys.stderr.isatty():
        from tqdm import tqdm

        bar = tqdm(total=sweep.table.n, unit="variant", desc="compare", file=sys.stderr)
    try:
        result = compare(sweep, out, resume=args.resume, force=args.force, workers=args.workers,
                         cluster=args.cluster, engine=args.engine, chunk_size=args.chunk,
                         progress=bar.update if bar else None,
                         sensitivity=False if args.no_sensitivity else None)
    finally:
        if bar:
            bar.close()
    if not quiet:
        n = sweep.table.n
        print(f"{n} variants ({result.ran} run now"
              + (f", {result.reused} from the earlier run" if result.reused else "") + f") -> {out}/")
        key = sweep.minimize
        rk = result.ranking
        print(f"objective: smallest {key}; rule: {rk.rule}")
        ranked = rk.ranked()
        if not ranked:
            print(f"no variant has a {key} within the limits")
        groups = sorted({int(rk.group[e]) for e in ranked})
        for g in groups:
            top = [e for e in ranked if rk.group[e] == g][:5]
            if sweep.group_by:
                i = int(rk.first[top[0]])
                print("  " + ", ".join(f"{k} = {cell(sweep.table.value(i, k))}" for k in sweep.group_by) + ":")
            for e in top:
                i = int(rk.first[e])
                label = f" '{sweep.table.names[i]}'" if sweep.table.names[i] else ""
                shown = [k for k in sweep.keys if k != sweep.robust_over and k not in sweep.group_by]
                vals = ", ".join(f"{k} = {cell(sweep.table.value(i, k))}" for k in shown)
                if sweep.robust_over:
                    f = [format_number(float(x), key) for x in (rk.worst[e], rk.best[e], rk.mean[e])]
                    print(f"  {rk.rank[e]}. {vals}: worst {key} = {f[0]} over {sweep.robust_over} "
                          f"(best {f[1]}, mean {f[2]})")
                else:
                    print(f"  {rk.rank[e]}. variant {i}{label}: {key} = {format_number(float(rk.worst[e]), key)} "
                          f"({vals})")
        print(cautions.CAUTION_SHORT)
    return 0
