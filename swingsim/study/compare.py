"""``swingsim compare SWEEP --out DIR``: run every variant of a sweep and compare them.

Writes into DIR:

``comparison.csv``
    One row per variant: ``variant`` (index), ``name``, the varied values in
    columns named by their dotted keys, then the summary numbers
    (:data:`swingsim.batch.SUMMARY_KEYS`).  Rows are appended as chunks of
    variants finish, so an interrupted run keeps what it finished and
    ``--resume`` runs only the rest; at the end the file is rewritten in
    variant order.
``ranking.csv``
    The variants in order of the sweep's objective (smallest first), ranked
    only when within the objective's limits.
``sensitivity.csv``
    Residual swing of the unshaped and shaped versions of the base scene's
    first travel move against rope-length error (-30% .. +30%).
``report.html``
    A self-contained page: the caution, the ranking table, plots of residual
    swing and move time against each varied quantity, the sensitivity plot.

Variants run in chunks on the batch engine (``swingsim.batch.engine``), in this
process or on Dask (``--workers N`` starts a local cluster on this machine,
``--cluster ADDRESS`` uses a running scheduler).  A chunk is the unit of work
either way, and the engine's result for a variant does not depend on the
other variants in its chunk, so every way of running gives the same numbers.
"""

from __future__ import annotations

import csv
import io
import math
import os
import sys
from pathlib import Path

import numpy as np

from swingsim.batch import engine as batch
from swingsim.errors import InputError
from swingsim.scene import scene_from_dict
from swingsim.study.variants import PLAUSIBLE_VARIANTS, get_dotted, load_sweep

CSV_NAME = "comparison.csv"
OUTPUTS = (CSV_NAME, "ranking.csv", "sensitivity.csv", "report.html")

#: Rope-length errors of the sensitivity study [-].
SENSITIVITY_ERRORS = tuple(float(x) for x in np.linspace(-0.3, 0.3, 13))


# ----------------------------------------------------------------------------
# CSV cells


def cell(x) -> str:
    """One CSV cell: exact for floats (repr round-trips), empty for None."""
    if x is None:
        return ""
    if isinstance(x, bool):
        return "true" if x else "false"
    if isinstance(x, float):
        return repr(x)
    if isinstance(x, (list, tuple)):
        return "[" + ", ".join(cell(v) for v in x) + "]"
    return str(x)


def parse_cell(s: str):
    if s == "":
        return None
    if s in ("true", "false"):
        return s == "true"
    try:
        return int(s)
    except ValueError:
        pass
    try:
        return float(s)
    except ValueError:
        return s


def header(sweep) -> list[str]:
    return ["variant", "name", *sweep.keys, *batch.SUMMARY_KEYS]


def row_cells(sweep, variant, summary) -> list[str]:
    vals = [cell(variant.values.get(k, get_dotted(sweep.base.raw, k))) for k in sweep.keys]
    return [str(variant.index), variant.name, *vals, *(cell(summary.get(k)) for k in batch.SUMMARY_KEYS)]


def _csv_line(cells) -> str:
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow(cells)
    return buf.getvalue()


def read_done(sweep, path: Path) -> dict:
    """Finished rows of an earlier run: variant index -> summary dict.

    Raises InputError when the file belongs to a different sweep.
    """
    text = path.read_text(encoding="utf-8")
    rows = list(csv.reader(io.StringIO(text)))
    want = header(sweep)
    if not rows or rows[0] != want:
        raise InputError(str(path), "header", "comes from a different sweep (its columns differ); "
                         "use another --out, or --force to start again")
    done = {}
    nkeys = 2 + len(sweep.keys)
    for r in rows[1:]:
        if len(r) != len(want) or not r[0].isdigit():
            continue  # a row cut short by an interruption: run that variant again
        i = int(r[0])
        if i >= len(sweep.variants):
            raise InputError(str(path), f"row of variant {i}", "not in this sweep; use another --out or --force")
        expect = row_cells(sweep, sweep.variants[i], {})[:nkeys]
        if r[:nkeys] != expect:
            raise InputError(str(path), f"row of variant {i}", "its varied values differ from this sweep's; "
                             "use another --out, or --force to start again")
        done[i] = {k: parse_cell(v) for k, v in zip(batch.SUMMARY_KEYS, r[nkeys:])}
    return done


# ----------------------------------------------------------------------------
# ranking


def effective_values(sweep, variant) -> dict:
    """The value of every compared key in a variant (the base scene's where the variant sets none)."""
    return {k: variant.values.get(k, get_dotted(sweep.base.raw, k)) for k in sweep.keys}


def rank(sweep, summaries: list) -> list[dict]:
    """Variants in objective order; ``rank`` None for those outside the limits."""
    key = sweep.minimize
    rows = []
    for v, s in zip(sweep.variants, summaries):
        note = ""
        val = s.get(key)
        if not s.get("valid", True):
            note = f"run stopped early ({s.get('status')})"
        elif val is None:
            note = f"no {key}" + (" (not settled by the end of the run)" if "settle" in key else "")
        else:
            for k, bound in sweep.limits.items():
                x = s.get(k)
                if x is None or x > bound:
                    note = f"{k} = {'n/a' if x is None else f'{x:.3g}'} > {bound:g}"
                    break
        rows.append({"index": v.index, "name": v.name, "values": effective_values(sweep, v),
                     "summary": s, "note": note,
                     "base_values": {k: get_dotted(sweep.base.raw, k) for k in sweep.keys}})
    ok = sorted((r for r in rows if not r["note"]), key=lambda r: (r["summary"][key], r["index"]))
    rest = [r for r in rows if r["note"]]
    for i, r in enumerate(ok, start=1):
        r["rank"] = i
    for r in rest:
        r["rank"] = None
    return ok + rest


def ranking_csv(sweep, ranking) -> str:
    key = sweep.minimize
    show = ["last_move_end_s", "peak_rope_angle_deg", "residual_rope_angle_deg", "settled_at_s"]
    cols = ["rank", "variant", "name", *sweep.keys, key, *[c for c in show if c != key], "note"]
    out = [_csv_line(cols)]
    for r in ranking:
        s = r["summary"]
        out.append(_csv_line([cell(r["rank"]), str(r["index"]), r["name"],
                              *(cell(r["values"].get(k, r["base_values"].get(k))) for k in sweep.keys),
                              cell(s.get(key)), *(cell(s.get(c)) for c in show if c != key), r["note"]]))
    return "".join(out)


# ----------------------------------------------------------------------------
# sensitivity of shapers to rope-length error

_TRAVEL = ("x", "y", "radius", "slew")
_SHAPEABLE = ("trapezoid", "s-curve", "zv", "zvd", "ei", "whole-period")


def sensitivity_scenes(base):
    """Scenes of the sensitivity study of the base scene's first travel move, or None.

    Returns (move label, design length, design period, [(profile, error, scene)]).
    """
    from swingsim.dynamics.registry import select_model

    idx = next((i for i, m in enumerate(base.moves) if m.axis in _TRAVEL and m.profile in _SHAPEABLE), None)
    if idx is None:
        return None
    raw_move = base.raw["moves"][idx]
    T = float(select_model(base).mode_periods_s()[0])
    L0 = base.rope.length_m
    jerk_key = "jerk_deg_s3" if raw_move["axis"] == "slew" else "jerk_m_s3"
    has_jerk = jerk_key in raw_move
    keep = {k: v for k, v in raw_move.items() if not k.startswith("shaper_") and k != "profile"}
    out = []
    for prof in ("s-curve" if has_jerk else "trapezoid", "whole-period", "zv", "zvd", "ei"):
        m = dict(keep, profile=prof)
        if prof == "whole-period":
            m.pop("decel_m_s2", None)
            m.pop("decel_deg_s2", None)
        if prof not in ("trapezoid", "s-curve"):
            m["shaper_period_s"] = T
        for e in SENSITIVITY_ERRORS:
            d = dict(base.raw)
            d["moves"] = list(base.raw["moves"])
            d["moves"][idx] = m
            d["rope"] = dict(base.raw["rope"], length_m=L0 * (1.0 + e))
            d["duration_s"] = base.duration_s + 1.5 * T
            try:
                sc = scene_from_dict(d, file=base.file, base_dir=base.base_dir)
            except InputError:
                continue  # e.g. a hoist that would shorten the short rope too far
            out.append((prof, e, sc))
    label = base.moves[idx].name
    return label, L0, T, out


def sensitivity_study(base, **kw):
    got = sensitivity_scenes(base)
    if got is None or not got[3]:
        return None
    label, L0, T, cases = got
    sums = batch.run_batch([c[2] for c in cases], **kw)
    curves = {}
    for (prof, e, _), s in zip(cases, sums):
        r = s.get("residual_swing_deg")
        curves.setdefault(prof, []).append((e, math.nan if r is None else r))
    return {"move": label, "design_length_m": L0, "design_period_s": T, "curves": curves}


def sensitivity_csv(sens) -> str:
    out = [_csv_line(["profile", "rope_length_error", "rope_length_m", "residual_swing_deg"])]
    for prof, pts in sens["curves"].items():
        for e, r in pts:
            out.append(_csv_line([prof, cell(float(e)), cell(sens["design_length_m"] * (1 + e)),
                                  cell(None if math.isnan(r) else float(r))]))
    return "".join(out)


# ----------------------------------------------------------------------------
# running the chunks


class _Cluster:
    """A Dask client (and the local cluster it started, if any)."""

    def __init__(self, workers=None, address=None):
        try:
            from dask.distributed import Client, LocalCluster
        except ImportError:
            raise InputError("--workers" if workers else "--cluster", "",
                             "needs dask.distributed (pip install 'swingsim[cluster]')") from None
        self.local = None
        if address:
            try:
                self.client = Client(address, timeout="20s")
            except (OSError, TimeoutError, ValueError) as exc:
                raise InputError("--cluster", "", f"cannot reach the Dask scheduler at {address}: {exc}") from None
        else:
            self.local = LocalCluster(n_workers=int(workers), threads_per_worker=1, processes=True,
                                      host="127.0.0.1", dashboard_address=None)
            self.client = Client(self.local)

    def close(self):
        self.client.close()
        if self.local is not None:
            self.local.close()


def run_chunks(scenes, chunk_ranges, *, workers=None, cluster=None, engine="batch", on_result=None):
    """Run ``batch.run_chunk`` on every chunk; ``on_result(range, summaries)`` as each finishes.

    In-process when neither ``workers`` nor ``cluster`` is given.
    """
    if not workers and not cluster:
        for r in chunk_ranges:
            res = batch.run_chunk([scenes[i] for i in r], engine=engine)
            if on_result:
                on_result(r, res)
        return
    from dask.distributed import as_completed

    cl = _Cluster(workers, cluster)
    try:
        futs = {}
        for r in chunk_ranges:
            f = cl.client.submit(batch.run_chunk, [scenes[i] for i in r], engine=engine, pure=False)
            futs[f] = r
        for f in as_completed(list(futs)):
            res = f.result()
            if on_result:
                on_result(futs[f], res)
    finally:
        cl.close()


def compare(sweep, out: Path, *, resume=False, force=False, workers=None, cluster=None,
            engine="batch", chunk_size=None, progress=None, sensitivity=None) -> dict:
    """Run a sweep and write the comparison files (see the module docstring).

    Returns a dict with ``summaries`` (variant order), ``ranking``, ``ran``
    (variants run now) and ``reused`` (taken from an earlier run).
    """
    from swingsim.io.files import atomic_write_text, check_out_dir, clean_partials
    from swingsim.report.html import comparison_html

    out = Path(out)
    csv_path = out / CSV_NAME
    done = {}
    if resume and csv_path.exists():
        if out.exists() and not out.is_dir():
            raise InputError(str(out), "", "--out names an existing file, not a folder")
        done = read_done(sweep, csv_path)
    else:
        check_out_dir(out, force)
    clean_partials(out)
    scenes = sweep.scenes
    todo = [i for i in range(len(scenes)) if i not in done]
    size = chunk_size or batch.chunk_size_for([scenes[i] for i in todo] or scenes)
    ranges = [[todo[j] for j in r] for r in batch.chunks(len(todo), size)]
    hdr = header(sweep)
    out.mkdir(parents=True, exist_ok=True)
    # start (or restart) the running CSV with the finished rows only
    lines = [_csv_line(hdr)] + [_csv_line(row_cells(sweep, sweep.variants[i], done[i])) for i in sorted(done)]
    atomic_write_text(csv_path, "".join(lines))
    results = dict(done)
    with open(csv_path, "a", encoding="utf-8", newline="") as fh:
        def on_result(r, res):
            for i, s in zip(r, res):
                results[i] = s
                fh.write(_csv_line(row_cells(sweep, sweep.variants[i], s)))
            fh.flush()
            os.fsync(fh.fileno())
            if progress:
                progress(len(r))

        run_chunks(scenes, ranges, workers=workers, cluster=cluster, engine=engine, on_result=on_result)
    summaries = [results[i] for i in range(len(scenes))]
    lines = [_csv_line(hdr)] + [_csv_line(row_cells(sweep, v, s)) for v, s in zip(sweep.variants, summaries)]
    atomic_write_text(csv_path, "".join(lines))
    ranking = rank(sweep, summaries)
    atomic_write_text(out / "ranking.csv", ranking_csv(sweep, ranking))
    do_sens = sweep.sensitivity if sensitivity is None else sensitivity
    sens = sensitivity_study(sweep.base) if do_sens else None
    if sens:
        atomic_write_text(out / "sensitivity.csv", sensitivity_csv(sens))
    rows = [{"index": v.index, "name": v.name, "values": effective_values(sweep, v), "summary": s}
            for v, s in zip(sweep.variants, summaries)]
    atomic_write_text(out / "report.html", comparison_html(sweep, rows, ranking, sens))
    return {"summaries": summaries, "ranking": ranking, "ran": len(todo), "reused": len(done),
            "sensitivity": sens}


# ----------------------------------------------------------------------------
# command line


def add_arguments(p):
    p.add_argument("sweep", help="sweep file (TOML): a base scene and the quantities to vary")
    p.add_argument("--out", metavar="DIR", help="output folder (default: <sweep name>-comparison)")
    p.add_argument("--resume", action="store_true",
                   help="keep the finished rows of an interrupted run in DIR and run only the rest")
    p.add_argument("--force", action="store_true",
                   help="write into a non-empty output folder, replacing only this command's files")
    g = p.add_mutually_exclusive_group()
    g.add_argument("--workers", type=int, metavar="N",
                   help="start a local Dask cluster with N worker processes (needs dask.distributed)")
    g.add_argument("--cluster", metavar="ADDRESS",
                   help="send the chunks to a running Dask scheduler, e.g. tcp://10.0.0.5:8786")
    p.add_argument("--engine", choices=("batch", "single"), default="batch",
                   help="batch: vectorised engine (default); single: one solve_ivp run per variant")
    p.add_argument("--chunk", type=int, metavar="N", help="variants per chunk (default: sized for memory)")
    p.add_argument("--no-sensitivity", action="store_true", help="skip the shaper sensitivity study")
    p.add_argument("--quiet", action="store_true", help="print nothing but errors")
    p.add_argument("--allow-implausible", action="store_true",
                   help=f"accept more than {PLAUSIBLE_VARIANTS:,} variants")


def main(args) -> int:
    if args.workers is not None and args.workers < 1:
        raise InputError("--workers", "value", "expected a whole number >= 1", args.workers)
    if args.chunk is not None and args.chunk < 1:
        raise InputError("--chunk", "value", "expected a whole number >= 1", args.chunk)
    if args.cluster is not None and not args.cluster.strip():
        raise InputError("--cluster", "", "expected the scheduler's address, e.g. tcp://10.0.0.5:8786", args.cluster)
    if args.resume and args.force:
        raise InputError("--resume", "", "cannot be combined with --force (which starts again)")
    sweep = load_sweep(args.sweep, allow_implausible=getattr(args, "allow_implausible", False))
    out = Path(args.out) if args.out else Path(Path(args.sweep).stem + "-comparison")
    quiet = getattr(args, "quiet", False)
    bar = None
    if not quiet and sys.stderr.isatty():
        from tqdm import tqdm

        bar = tqdm(total=len(sweep.variants), unit="variant", desc="compare", file=sys.stderr)
    try:
        res = compare(sweep, out, resume=args.resume, force=args.force, workers=args.workers,
                      cluster=args.cluster, engine=args.engine, chunk_size=args.chunk,
                      progress=bar.update if bar else None,
                      sensitivity=False if args.no_sensitivity else None)
    finally:
        if bar:
            bar.close()
    if not quiet:
        from swingsim.metrics import cautions

        print(f"{len(sweep.variants)} variants ({res['ran']} run now"
              + (f", {res['reused']} from the earlier run" if res["reused"] else "") + f") -> {out}/")
        key = sweep.minimize
        ranked = [r for r in res["ranking"] if r["rank"] is not None]
        print(f"best by smallest {key}:" if ranked else f"no variant has a {key} within the limits")
        for r in ranked[:5]:
            vals = ", ".join(f"{k} = {cell(v)}" for k, v in sweep.variants[r["index"]].values.items())
            label = f" '{r['name']}'" if r["name"] else ""
            print(f"  {r['rank']}. variant {r['index']}{label}: {key} = {r['summary'][key]:.3g} ({vals})")
        print(cautions.CAUTION_SHORT)
    return 0
