"""Run every variant of a sweep and compare them (``swingsim compare SWEEP --out DIR``).

:func:`compare` writes into DIR:

``comparison.csv``
    One row per variant: ``variant`` (index), ``name``, the varied values in
    columns named by their dotted keys, then the summary numbers
    (:data:`swingsim.batch.SUMMARY_KEYS`), and last ``crc32``: the CRC-32 (as
    eight hex digits) of the row's other fields as written (comma-separated,
    CSV-quoted), so a row cut short by a full disk or a kill is never taken as
    finished.  Rows are appended as chunks of variants finish, so an
    interrupted run keeps what it finished and ``--resume`` runs only the
    rest (a row whose field count, numbers or checksum do not hold runs
    again); at the end the file is rewritten in variant order.
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
The command line (arguments and printing) is :mod:`swingsim.cli.compare`.
"""

from __future__ import annotations

import csv
import io
import math
import os
import zlib
from dataclasses import dataclass
from pathlib import Path
from typing import NamedTuple

import numpy as np

from swingsim.batch import engine as batch
from swingsim.dynamics.registry import select_model
from swingsim.errors import InputError
from swingsim.io.failures import read_text_file
from swingsim.io.files import atomic_write_text, locked_out_dir, reported_write_errors, staged_outputs
from swingsim.scene.edit import get_dotted, with_move

CSV_NAME = "comparison.csv"
#: The last column of ``comparison.csv``: CRC-32 of the row's other fields.
CHECK_COLUMN = "crc32"
#: Summary keys whose cells are text (every other summary cell is a number, a bool or empty).
TEXT_KEYS = ("status", "model", "engine")
OUTPUTS = (CSV_NAME, "ranking.csv", "sensitivity.csv", "report.html")

#: Rope-length errors of the sensitivity study [-].
SENSITIVITY_ERRORS = tuple(float(x) for x in np.linspace(-0.3, 0.3, 13))


# ----------------------------------------------------------------------------
# CSV cells


def cell(x) -> str:
    """One CSV cell: exact for floats (repr round-trips), empty for None.

    Parameters
    ----------
    x : object
        A value of a summary or of a scene key: None, bool, int, float, str,
        or a list or tuple of them.

    Returns
    -------
    str
        ``repr`` of a float, ``true``/``false``, ``[a, b]`` for a list, ``""`` for None.
    """
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
    """A value back from a CSV cell written by :func:`cell` (lists stay text).

    Parameters
    ----------
    s : str
        The cell.

    Returns
    -------
    object
        None for an empty cell, a bool, int or float where the text is one, else the text.
    """
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
    """Columns of ``comparison.csv``: variant, name, the compared keys, the summary keys.

    Parameters
    ----------
    sweep : Sweep
        The sweep.

    Returns
    -------
    list of str
        The column names, the checksum column last.
    """
    return ["variant", "name", *sweep.keys, *batch.SUMMARY_KEYS, CHECK_COLUMN]


def row_cells(sweep, variant, summary) -> list[str]:
    """One row of ``comparison.csv``, as cells.

    Parameters
    ----------
    sweep : Sweep
        The sweep.
    variant : Variant
        The variant of the row.
    summary : dict
        Its summary numbers (summary key -> value); missing keys give empty cells.

    Returns
    -------
    list of str
        The cells in the order of :func:`header`.
    """
    vals = [cell(variant.values.get(k, get_dotted(sweep.base.raw, k))) for k in sweep.keys]
    return [str(variant.index), variant.name, *vals, *(cell(summary.get(k)) for k in batch.SUMMARY_KEYS)]


def _csv_line(cells) -> str:
    buf = io.StringIO()
    csv.writer(buf, lineterminator="\n").writerow(cells)
    return buf.getvalue()


def row_checksum(cells) -> str:
    """The ``crc32`` cell of a row of ``comparison.csv``.

    Parameters
    ----------
    cells : sequence of str
        The row's other cells, in column order.

    Returns
    -------
    str
        CRC-32 (``zlib.crc32``) of the cells written as one CSV line without its
        line end, encoded as UTF-8, as eight lowercase hex digits.
    """
    return f"{zlib.crc32(_csv_line(cells)[:-1].encode('utf-8')):08x}"


def _checked_line(cells) -> str:
    """A row of ``comparison.csv`` with its checksum cell last."""
    return _csv_line([*cells, row_checksum(cells)])


def _row_is_whole(row, n_columns) -> bool:
    """Whether a row read back is complete: field count, checksum, every summary cell of its kind."""
    if len(row) != n_columns or not row[0].isdigit() or row[-1] != row_checksum(row[:-1]):
        return False
    summary_cells = row[-1 - len(batch.SUMMARY_KEYS):-1]
    for key, text in zip(batch.SUMMARY_KEYS, summary_cells):
        value = parse_cell(text)
        if key not in TEXT_KEYS and isinstance(value, str):
            return False  # a number that does not parse
    return True


def read_done(sweep, path: Path) -> dict:
    """Finished rows of an earlier run's ``comparison.csv``.

    A row that is not whole (cut short by an interruption or a full disk, a
    number that does not parse, a checksum that does not match) is skipped:
    that variant runs again.

    Parameters
    ----------
    sweep : Sweep
        The sweep being resumed.
    path : Path
        The earlier ``comparison.csv``.

    Returns
    -------
    dict
        Variant index -> summary dict, for every complete row.

    Raises
    ------
    InputError
        When the file belongs to a different sweep (other columns, variants or values).
    """
    text = read_text_file(path, lambda problem: InputError(str(path), "", f"cannot resume from it: {problem}"))
    rows = list(csv.reader(io.StringIO(text)))
    want = header(sweep)
    if not rows or rows[0] != want:
        raise InputError(str(path), "header", "comes from a different sweep (its columns differ); "
                         "use another --out, or --force to start again")
    done = {}
    nkeys = 2 + len(sweep.keys)
    for r in rows[1:]:
        if not _row_is_whole(r, len(want)) or not (r[0].isascii() and r[0].isdigit()):
            continue  # a cut, damaged or foreign row: run that variant again
        i = int(r[0])
        if i >= len(sweep.variants):
            raise InputError(str(path), f"row of variant {i}", "not in this sweep; use another --out or --force")
        expect = row_cells(sweep, sweep.variants[i], {})[:nkeys]
        if r[:nkeys] != expect:
            raise InputError(str(path), f"row of variant {i}", "its varied values differ from this sweep's; "
                             "use another --out, or --force to start again")
        done[i] = {k: parse_cell(v) for k, v in zip(batch.SUMMARY_KEYS, r[nkeys:-1])}
    return done


# ----------------------------------------------------------------------------
# ranking


def effective_values(sweep, variant) -> dict:
    """The value of every compared key in a variant (the base scene's where the variant sets none).

    Parameters
    ----------
    sweep : Sweep
        The sweep.
    variant : Variant
        One of its variants.

    Returns
    -------
    dict
        Dotted key -> value, for every key of ``sweep.keys``.
    """
    return {k: variant.values.get(k, get_dotted(sweep.base.raw, k)) for k in sweep.keys}


def rank(sweep, summaries: list) -> list[dict]:
    """Variants in objective order; ``rank`` None for those outside the limits.

    A variant is ranked when its run is valid, it has a value of the objective,
    and it keeps to every limit of the sweep; ranked variants come first, by
    the objective (ties by index), the others after them in variant order.

    Parameters
    ----------
    sweep : Sweep
        The sweep (its objective ``minimize`` and its ``limits``).
    summaries : list of dict
        The variants' summaries, in variant order.

    Returns
    -------
    list of dict
        One row per variant: ``index``, ``name``, ``values`` (the compared keys),
        ``base_values`` (the base scene's), ``summary``, ``note`` (why it is not
        ranked, else empty) and ``rank`` (from 1, or None).
    """
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
    """The text of ``ranking.csv``.

    Parameters
    ----------
    sweep : Sweep
        The sweep.
    ranking : list of dict
        The rows of :func:`rank`.

    Returns
    -------
    str
        CSV: rank, variant, name, the compared keys, the objective, the move's end,
        peak and residual rope angles, settling time, and the note.
    """
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


class SensitivityCase(NamedTuple):
    """One run of the sensitivity study."""

    #: The move's profile in this run.
    profile: str
    #: Relative error of the rope length against the design length [-].
    rope_length_error: float
    #: The base scene with that profile and rope length.
    scene: object


class SensitivityScenes(NamedTuple):
    """The runs of the sensitivity study of one move."""

    #: The move's name.
    move: str
    #: Rope length the shapers are tuned for: the base scene's [m].
    design_length_m: float
    #: First swing period of the base scene, the shapers' tuning [s].
    design_period_s: float
    #: The runs, profile by profile.
    cases: list


def sensitivity_scenes(base):
    """Scenes of the sensitivity study of the base scene's first travel move, or None.

    The move is run as its unshaped command (s-curve with a jerk limit, else
    trapezoid), whole-period, ZV, ZVD and EI, the shaped ones tuned to the base
    scene's first swing period, at rope lengths from -30 % to +30 % of the base
    scene's (:data:`SENSITIVITY_ERRORS`).

    Parameters
    ----------
    base : Scene
        The sweep's base scene.

    Returns
    -------
    SensitivityScenes or None
        None when the scene has no travel move with a shapeable profile.  A rope
        length at which a profile is not a valid scene is left out.

    References
    ----------
    Singer, N. C. and Seering, W. P., "Preshaping command inputs to reduce
    system vibration", J. Dyn. Sys., Meas., Control 112 (1990): the ZV and ZVD
    shapers and their robustness to a modelling error.
    """
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
            try:
                sc = with_move(base, idx, m, rope_length_m=L0 * (1.0 + e), duration_s=base.duration_s + 1.5 * T)
            except InputError:
                continue  # e.g. a hoist that would shorten the short rope too far
            out.append(SensitivityCase(prof, e, sc))
    return SensitivityScenes(base.moves[idx].name, L0, T, out)


def sensitivity_study(base, **kw):
    """Residual swing of the base scene's first travel move against rope-length error, per profile.

    Parameters
    ----------
    base : Scene
        The sweep's base scene.
    **kw
        Passed on to :func:`swingsim.batch.engine.run_batch`.

    Returns
    -------
    dict or None
        ``move`` (its name), ``design_length_m`` [m], ``design_period_s`` [s] and
        ``curves``: profile -> list of (rope-length error [-], residual swing
        [deg], NaN where the run has none); None when there is nothing to study
        (see :func:`sensitivity_scenes`).
    """
    study = sensitivity_scenes(base)
    if study is None or not study.cases:
        return None
    sums = batch.run_batch([case.scene for case in study.cases], **kw)
    curves = {}
    for case, s in zip(study.cases, sums):
        r = s.get("residual_swing_deg")
        curves.setdefault(case.profile, []).append((case.rope_length_error, math.nan if r is None else r))
    return {"move": study.move, "design_length_m": study.design_length_m,
            "design_period_s": study.design_period_s, "curves": curves}


def sensitivity_csv(sens) -> str:
    """The text of ``sensitivity.csv``.

    Parameters
    ----------
    sens : dict
        The result of :func:`sensitivity_study`.

    Returns
    -------
    str
        CSV: profile, rope_length_error [-], rope_length_m [m], residual_swing_deg [deg].
    """
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

    Parameters
    ----------
    scenes : list of Scene
        Every variant's scene.
    chunk_ranges : list of list of int
        Indices into ``scenes``, one list per chunk.
    workers : int, optional
        Start a local Dask cluster with this many worker processes.
    cluster : str, optional
        Address of a running Dask scheduler.
    engine : str, optional
        ``batch`` or ``single`` (see :func:`swingsim.batch.engine.run_chunk`).
    on_result : callable, optional
        Called as ``on_result(indices, summaries)`` when a chunk finishes (in
        the order chunks finish on Dask).

    Raises
    ------
    InputError
        When Dask is needed but not installed, or the scheduler cannot be reached.
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


@dataclass(frozen=True)
class Comparison:
    """What :func:`compare` did.

    ``summaries`` are the variants' summary dicts in variant order, ``ranking``
    the rows of :func:`rank`, ``ran`` the number of variants run now, ``reused``
    the number taken from an earlier run, ``sensitivity`` the result of
    :func:`sensitivity_study` (None when not run).
    """

    summaries: list
    ranking: list
    ran: int
    reused: int
    sensitivity: dict | None


def compare(sweep, out: Path, *, resume=False, force=False, workers=None, cluster=None,
            engine="batch", chunk_size=None, progress=None, sensitivity=None) -> dict:
    """Run a sweep and write the comparison files (see the module docstring).

    Parameters
    ----------
    sweep : Sweep
        The validated sweep (:func:`swingsim.study.variants.load_sweep`).
    out : Path or str
        Output folder.
    resume : bool, optional
        Keep the finished rows of an earlier run's ``comparison.csv`` in ``out``
        and run only the other variants.
    force : bool, optional
        Write into a folder that already holds files (only this command's are replaced).
    workers : int, optional
        Run the chunks on a local Dask cluster with this many worker processes.
    cluster : str, optional
        Address of a running Dask scheduler to send the chunks to.
    engine : str, optional
        ``batch`` (the vectorised engine) or ``single`` (one solver run per variant).
    chunk_size : int, optional
        Variants per chunk; sized for memory when None.
    progress : callable, optional
        Called with the number of variants of each chunk as it finishes.
    sensitivity : bool, optional
        Run the shaper sensitivity study; the sweep's ``sensitivity`` key when None.

    Returns
    -------
    Comparison
        The summaries in variant order, the ranking, how many variants ran now
        and how many were reused, the sensitivity study.

    Raises
    ------
    InputError
        When ``out`` is a file, is not empty (without ``force``), or holds the
        comparison of another sweep (with ``resume``).
    """
    from swingsim.report.html import comparison_html  # matplotlib, only when a report is written

    out = Path(out)
    csv_path = out / CSV_NAME
    resuming = resume and csv_path.exists()  # read_done refuses what is not a regular text file
    with locked_out_dir(out, force or resuming) as out, reported_write_errors(out):
        done = read_done(sweep, csv_path) if resuming else {}
        scenes = sweep.scenes
        todo = [i for i in range(len(scenes)) if i not in done]
        size = chunk_size or batch.chunk_size_for([scenes[i] for i in todo] or scenes)
        ranges = [[todo[j] for j in r] for r in batch.chunks(len(todo), size)]
        hdr = header(sweep)
        # the running CSV (what --resume reads) starts again with the finished rows only
        lines = [_csv_line(hdr)] + [_checked_line(row_cells(sweep, sweep.variants[i], done[i]))
                                    for i in sorted(done)]
        atomic_write_text(csv_path, "".join(lines))
        results = dict(done)
        with open(csv_path, "a", encoding="utf-8", newline="") as fh:
            def on_result(r, res):
                for i, s in zip(r, res):
                    results[i] = s
                    fh.write(_checked_line(row_cells(sweep, sweep.variants[i], s)))
                fh.flush()
                os.fsync(fh.fileno())
                if progress:
                    progress(len(r))

            run_chunks(scenes, ranges, workers=workers, cluster=cluster, engine=engine, on_result=on_result)
        summaries = [results[i] for i in range(len(scenes))]
        ranking = rank(sweep, summaries)
        do_sens = sweep.sensitivity if sensitivity is None else sensitivity
        sens = sensitivity_study(sweep.base) if do_sens else None
        rows = [{"index": v.index, "name": v.name, "values": effective_values(sweep, v), "summary": s}
                for v, s in zip(sweep.variants, summaries)]
        # the finished files appear together, and only when all of them are complete
        with staged_outputs(out) as stage:
            lines = [_csv_line(hdr)] + [_checked_line(row_cells(sweep, v, s))
                                        for v, s in zip(sweep.variants, summaries)]
            atomic_write_text(stage.path / CSV_NAME, "".join(lines))
            atomic_write_text(stage.path / "ranking.csv", ranking_csv(sweep, ranking))
            if sens:
                atomic_write_text(stage.path / "sensitivity.csv", sensitivity_csv(sens))
            atomic_write_text(stage.path / "report.html", comparison_html(sweep, rows, ranking, sens))
    return Comparison(summaries=summaries, ranking=ranking, ran=len(todo), reused=len(done),
                      sensitivity=sens)
