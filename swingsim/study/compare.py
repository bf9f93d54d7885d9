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
    again); at the end the file is rewritten in variant order when the rows
    came out of order (Dask, ``--resume``), and kept as written otherwise.
``ranking.csv``
    The variants in order of the sweep's objective (smallest first), ranked
    only when within the objective's limits; with ``robust_over`` one row per
    combination of the other compared values, ranked by its worst case over
    that key (with best, mean and where the worst occurs); with ``group_by``
    ranked within each group (:func:`rank`).
``sensitivity.csv``
    Residual swing of the unshaped and shaped versions of the base scene's
    first travel move against rope-length error (-30% .. +30%).
``report.html``
    A self-contained page: the caution, the objective and the ranking rule,
    the ranking table(s), a heat map over two varied numbers, plots of residual
    swing and move time against each varied quantity, the sensitivity plot
    (:mod:`swingsim.report.html`).

The summaries are held by column (:class:`Results`), never as one dict per
variant, so a 100,000-variant study runs in bounded memory.

Variants run in chunks on the batch engine (``swingsim.batch.engine``), in this
process or on Dask (``--workers N`` starts a local cluster on this machine,
``--cluster ADDRESS`` uses a running scheduler; a chunk travels as the column
slices of its rows, :meth:`~swingsim.study.variants.VariantTable.take`).  A chunk is the unit of work
either way, and the engine's result for a variant does not depend on the
other variants in its chunk, so every way of running gives the same numbers.
The command line (arguments and printing) is :mod:`swingsim.cli.compare`.
"""

from __future__ import annotations

import csv
import io
import math
import os
import re
import zlib
from dataclasses import dataclass
from pathlib import Path
from typing import NamedTuple

import numpy as np

from swingsim.batch import engine as batch
from swingsim.dynamics.registry import select_model
from swingsim.errors import InputError
from swingsim.io.failures import read_text_file
from swingsim.io.files import atomic_path, atomic_write_text, locked_out_dir, reported_write_errors, staged_outputs
from swingsim.scene.edit import with_move

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
    if type(x) is float:  # the common case first (a summary is mostly floats)
        return repr(x)
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
    variant : Variant or int
        The variant of the row (or its index).
    summary : dict
        Its summary numbers (summary key -> value); missing keys give empty cells.

    Returns
    -------
    list of str
        The cells in the order of :func:`header`.
    """
    i = variant if isinstance(variant, (int, np.integer)) else variant.index
    t = sweep.table
    vals = [cell(t.value(i, k)) for k in sweep.keys]
    # a summary is mostly floats: repr them here, without a call of cell() each (10,000 rows x 24 cells)
    return [str(i), t.names[i], *vals,
            *[repr(x) if type(x) is float else cell(x) for x in map(summary.get, batch.SUMMARY_KEYS)]]


#: Characters that make ``csv.writer`` (QUOTE_MINIMAL) quote a cell.
_QUOTED = re.compile(r'[,"\r\n]')


def _csv_line(cells) -> str:
    # the common row (numbers, plain names) needs no quoting: the same text csv.writer writes,
    # joined directly (a lone empty cell is the one unquoted cell csv.writer still quotes)
    if len(cells) > 1:
        text = ",".join(cells)
        if not _QUOTED.search(text):
            return text + "\n"
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
    """A row of ``comparison.csv`` with its checksum cell last (the same text as ``_csv_line`` of all cells)."""
    if len(cells) < 2:  # a lone empty cell is quoted alone but not beside the checksum
        return _csv_line([*cells, row_checksum(cells)])
    line = _csv_line(cells)[:-1]
    return f"{line},{zlib.crc32(line.encode('utf-8')):08x}\n"


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
        if i >= sweep.table.n:
            raise InputError(str(path), f"row of variant {i}", "not in this sweep; use another --out or --force")
        expect = row_cells(sweep, i, {})[:nkeys]
        if r[:nkeys] != expect:
            raise InputError(str(path), f"row of variant {i}", "its varied values differ from this sweep's; "
                             "use another --out, or --force to start again")
        done[i] = {k: parse_cell(v) for k, v in zip(batch.SUMMARY_KEYS, r[nkeys:-1])}
    return done


# ----------------------------------------------------------------------------
# results held by column


#: Summary keys held as numbers (every other one is text or a bool).
NUMBER_KEYS = tuple(k for k in batch.SUMMARY_KEYS if k not in TEXT_KEYS and k != "valid")


class Results:
    """The summaries of a comparison, by column: a float array per number (NaN: none), arrays for the rest.

    A 100,000-variant study holds about 20 MB here instead of 100,000 dicts.

    Parameters
    ----------
    n : int
        Number of variants.
    """

    def __init__(self, n: int):
        self.n = n
        self.numbers = {k: np.full(n, np.nan) for k in NUMBER_KEYS}
        self.valid = np.ones(n, dtype=bool)
        self.text = {k: np.full(n, "", dtype=object) for k in TEXT_KEYS}
        self.done = np.zeros(n, dtype=bool)

    def put(self, i: int, summary: dict) -> None:
        """Store the summary of variant ``i``.

        Parameters
        ----------
        i : int
            Variant index.
        summary : dict
            Its summary (keys of :data:`swingsim.batch.engine.SUMMARY_KEYS`).
        """
        for k in NUMBER_KEYS:
            x = summary.get(k)
            self.numbers[k][i] = np.nan if x is None or isinstance(x, (str, bool)) else float(x)
        self.valid[i] = bool(summary.get("valid", True))
        for k in TEXT_KEYS:
            self.text[k][i] = summary.get(k) or ""
        self.done[i] = True

    def put_many(self, rows, summaries) -> None:
        """Store the summaries of several variants (a chunk) at once.

        Parameters
        ----------
        rows : sequence of int
            Variant indices.
        summaries : sequence of dict
            Their summaries, in the same order.
        """
        rows = np.asarray(rows, dtype=np.intp)
        for k in NUMBER_KEYS:
            vals = [s.get(k) for s in summaries]
            self.numbers[k][rows] = [np.nan if x is None or isinstance(x, (str, bool)) else float(x) for x in vals]
        self.valid[rows] = [bool(s.get("valid", True)) for s in summaries]
        for k in TEXT_KEYS:
            self.text[k][rows] = [s.get(k) or "" for s in summaries]
        self.done[rows] = True

    def summary(self, i: int) -> dict:
        """The summary of variant ``i`` as a dict (None for a number it has not).

        Parameters
        ----------
        i : int
            Variant index.

        Returns
        -------
        dict
            Summary key -> value.
        """
        out = {}
        for k in batch.SUMMARY_KEYS:
            if k == "valid":
                out[k] = bool(self.valid[i])
            elif k in TEXT_KEYS:
                out[k] = self.text[k][i] or None
            else:
                x = self.numbers[k][i]
                out[k] = None if math.isnan(x) else float(x)
        return out

    def column(self, key: str) -> np.ndarray:
        """One summary number of every variant.

        Parameters
        ----------
        key : str
            A key of :data:`NUMBER_KEYS`.

        Returns
        -------
        ndarray
            Values [the key's unit]; NaN where a variant has none.
        """
        return self.numbers[key]


# ----------------------------------------------------------------------------
# ranking


def effective_values(sweep, variant) -> dict:
    """The value of every compared key in a variant (the base scene's where the variant sets none).

    Parameters
    ----------
    sweep : Sweep
        The sweep.
    variant : Variant or int
        One of its variants (or its index).

    Returns
    -------
    dict
        Dotted key -> value, for every key of ``sweep.keys``.
    """
    i = variant if isinstance(variant, (int, np.integer)) else variant.index
    return {k: sweep.table.value(i, k) for k in sweep.keys}


@dataclass(frozen=True)
class Ranking:
    """The ranking of a comparison.

    An *entry* is one variant, or with ``robust_over`` one combination of the
    other compared keys (its variants differ only in that key) ranked by its
    worst case.  Arrays are per entry: ``first`` (its first variant), ``worst``,
    ``best``, ``mean`` (the objective over its variants; equal for a single
    variant), ``worst_at`` (the variant giving the worst case), ``count``
    (variants), ``group`` (code of the ``group_by`` combination), ``rank`` (from
    1 within its group; 0 when not ranked) and ``note`` (why not). ``order``
    lists the entries as the report shows them: group by group, ranked first.
    ``entry`` gives each variant's entry.
    """

    objective: str
    rule: str
    robust_over: str | None
    group_by: tuple
    entry: np.ndarray
    first: np.ndarray
    worst: np.ndarray
    best: np.ndarray
    mean: np.ndarray
    worst_at: np.ndarray
    count: np.ndarray
    group: np.ndarray
    rank: np.ndarray
    note: list
    order: np.ndarray

    def ranked(self) -> list:
        """Entries that are ranked, in order.

        Returns
        -------
        list of int
            Entry indices.
        """
        return [int(e) for e in self.order if self.rank[e]]


def ranking_rule(sweep) -> str:
    """The ranking rule in words, as the report and the command print it at the top.

    Parameters
    ----------
    sweep : Sweep
        The sweep (objective, limits, robust_over, group_by).

    Returns
    -------
    str
        One sentence.
    """
    obj = sweep.minimize
    if sweep.robust_over:
        text = (f"each combination of the other compared values ranked by its worst (largest) {obj} "
                f"over every {sweep.robust_over}; smallest worst case first")
    else:
        text = f"every variant ranked by its {obj}; smallest first"
    if sweep.limits:
        text += "; only " + ("combinations whose variants all keep " if sweep.robust_over else "variants with ") \
            + " and ".join(f"{k} <= {v:g}" for k, v in sweep.limits.items())
    if sweep.group_by:
        text += "; ranked separately for each " + " and ".join(sweep.group_by)
    return text


def rank(sweep, results) -> Ranking:
    """Rank a comparison's variants (or, with ``robust_over``, their combinations by the worst case).

    A variant counts when its run is valid, it has a value of the objective and
    keeps to every limit; a combination is ranked only when all its variants
    count.  Ties go by the mean, then by the first variant's index.

    Parameters
    ----------
    sweep : Sweep
        The sweep (``minimize``, ``limits``, ``robust_over``, ``group_by``).
    results : Results or list of dict
        The variants' summaries, in variant order.

    Returns
    -------
    Ranking
        The entries, their numbers, ranks and notes.
    """
    if not isinstance(results, Results):
        res = Results(len(results))
        for i, s in enumerate(results):
            res.put(i, s)
        results = res
    key = sweep.minimize
    n = sweep.table.n
    val = results.column(key)
    fail = np.full(n, "", dtype=object)
    bad = ~results.valid
    for i in np.flatnonzero(bad):
        fail[i] = f"run stopped early ({results.text['status'][i]})"
    missing = ~bad & np.isnan(val)
    for i in np.flatnonzero(missing):
        fail[i] = f"no {key}" + (" (not settled by the end of the run)" if "settle" in key else "")
    for k, bound in sweep.limits.items():
        x = results.column(k)
        over = (fail == "") & ~(x <= bound)
        for i in np.flatnonzero(over):
            fail[i] = f"{k} = {'n/a' if math.isnan(x[i]) else f'{x[i]:.3g}'} > {bound:g}"
    ok = fail == ""
    others = [k for k in sweep.keys if k != sweep.robust_over] if sweep.robust_over else None
    entry = sweep.table.codes(others)[0] if sweep.robust_over else np.arange(n)
    ne = int(entry.max()) + 1 if n else 0
    count = np.bincount(entry, minlength=ne)
    n_ok = np.bincount(entry, weights=ok, minlength=ne)
    v = np.where(ok, val, np.nan)
    worst = np.full(ne, -np.inf)
    np.maximum.at(worst, entry, np.where(ok, val, -np.inf))
    best = np.full(ne, np.inf)
    np.minimum.at(best, entry, np.where(ok, val, np.inf))
    mean = np.bincount(entry, weights=np.where(ok, val, 0.0), minlength=ne) / np.maximum(n_ok, 1)
    first = np.full(ne, n, dtype=np.intp)
    np.minimum.at(first, entry, np.arange(n))
    cand = np.where(ok & (v == worst[entry]), np.arange(n), n)
    worst_at = np.full(ne, n, dtype=np.intp)
    np.minimum.at(worst_at, entry, cand)
    good = n_ok == count
    worst[~good] = np.nan
    best[n_ok == 0] = np.nan
    mean[n_ok == 0] = np.nan
    notes = [""] * ne
    for e in np.flatnonzero(~good):
        rows = np.flatnonzero(entry == e) if sweep.robust_over else [e]
        reasons = [fail[i] for i in rows if fail[i]]
        if sweep.robust_over:
            notes[e] = f"{len(reasons)} of {count[e]} variants over {sweep.robust_over} do not count: {reasons[0]}"
        else:
            notes[e] = reasons[0]
    group = sweep.table.codes(list(sweep.group_by))[0][first] if sweep.group_by else np.zeros(ne, dtype=np.intp)
    rank_ = np.zeros(ne, dtype=np.intp)
    order = []
    for g in range(int(group.max()) + 1 if ne else 0):
        members = np.flatnonzero(group == g)
        ranked = members[good[members]]
        ranked = ranked[np.lexsort((first[ranked], mean[ranked], worst[ranked]))]
        rank_[ranked] = np.arange(1, len(ranked) + 1)
        rest = members[~good[members]]
        order.extend(ranked.tolist() + rest.tolist())
    return Ranking(key, ranking_rule(sweep), sweep.robust_over, tuple(sweep.group_by), entry, first, worst,
                   best, mean, worst_at, count, group, rank_, notes, np.array(order, dtype=np.intp))


_SHOW = ["last_move_end_s", "peak_rope_angle_deg", "residual_rope_angle_deg", "settled_at_s"]


def ranking_columns(sweep) -> list[str]:
    """Columns of ``ranking.csv``.

    Parameters
    ----------
    sweep : Sweep
        The sweep.

    Returns
    -------
    list of str
        With ``robust_over``: rank, the group keys, variant (the combination's
        first), name, the other compared keys, the worst / best / mean objective,
        the value of ``robust_over`` at the worst case, the number of variants and
        the note; otherwise rank, variant, name, the compared keys, the
        objective, the move's end, peak and residual rope angles, settling time
        and the note (``group`` first when ``group_by`` is given).
    """
    key = sweep.minimize
    grp = ["group"] if sweep.group_by else []
    if sweep.robust_over:
        others = [k for k in sweep.keys if k != sweep.robust_over]
        return ["rank", *grp, "variant", "name", *others, f"worst_{key}", f"best_{key}", f"mean_{key}",
                f"worst_at_{sweep.robust_over}", "variants", "note"]
    return ["rank", *grp, "variant", "name", *sweep.keys, key, *[c for c in _SHOW if c != key], "note"]


def ranking_cells(sweep, ranking: Ranking, results: Results, e: int) -> list[str]:
    """One row of ``ranking.csv`` (see :func:`ranking_columns`).

    Parameters
    ----------
    sweep : Sweep
        The sweep.
    ranking : Ranking
        The ranking.
    results : Results
        The summaries.
    e : int
        The entry.

    Returns
    -------
    list of str
        The cells.
    """
    key = sweep.minimize
    t = sweep.table
    i = int(ranking.first[e])
    rk = cell(int(ranking.rank[e]) if ranking.rank[e] else None)
    grp = [", ".join(f"{k} = {cell(t.value(i, k))}" for k in sweep.group_by)] if sweep.group_by else []

    def num(x):
        return cell(None if not math.isfinite(x) else float(x))

    if sweep.robust_over:
        others = [k for k in sweep.keys if k != sweep.robust_over]
        w = int(ranking.worst_at[e])
        at = cell(t.value(w, sweep.robust_over)) if w < t.n else ""
        return [rk, *grp, str(i), t.names[i], *(cell(t.value(i, k)) for k in others), num(ranking.worst[e]),
                num(ranking.best[e]), num(ranking.mean[e]), at, str(int(ranking.count[e])), ranking.note[e]]
    nums = [results.numbers[c][i] for c in (key, *[c for c in _SHOW if c != key])]
    return [rk, *grp, str(i), t.names[i], *(cell(t.value(i, k)) for k in sweep.keys),
            *("" if x != x else repr(float(x)) for x in nums), ranking.note[e]]


def write_ranking_csv(path, sweep, ranking: Ranking, results: Results) -> None:
    """Write ``ranking.csv`` row by row (entries in :attr:`Ranking.order`).

    Parameters
    ----------
    path : Path
        The file (written atomically).
    sweep : Sweep
        The sweep.
    ranking : Ranking
        The ranking.
    results : Results
        The summaries.
    """
    with atomic_path(path) as tmp, open(tmp, "w", encoding="utf-8", newline="") as fh:
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(ranking_columns(sweep))
        w.writerows(ranking_cells(sweep, ranking, results, int(e)) for e in ranking.order)


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


def run_chunks(variants, chunk_ranges, *, workers=None, cluster=None, engine="batch", on_result=None):
    """Run the batch engine on every chunk; ``on_result(range, summaries)`` as each finishes.

    In-process when neither ``workers`` nor ``cluster`` is given.  On Dask each
    chunk goes to a worker as the column slices of its rows
    (:meth:`~swingsim.study.variants.VariantTable.take`): the base scene once and
    a few arrays, never a list of scenes.

    Parameters
    ----------
    variants : VariantTable or list of Scene
        The sweep's variant table (or every variant's scene).
    chunk_ranges : list of list of int
        Row indices, one list per chunk.
    workers : int, optional
        Start a local Dask cluster with this many worker processes.
    cluster : str or dask.distributed.Client, optional
        Address of a running Dask scheduler (or a client already connected).
    engine : str, optional
        ``batch`` or ``single`` (see :func:`swingsim.batch.engine.run_table_chunk`).
    on_result : callable, optional
        Called as ``on_result(indices, summaries)`` when a chunk finishes (in
        the order chunks finish on Dask).

    Raises
    ------
    InputError
        When Dask is needed but not installed, or the scheduler cannot be reached.
    """
    table = batch.SceneList(variants) if isinstance(variants, (list, tuple)) else variants

    def piece(r):
        if isinstance(table, batch.SceneList):
            return batch.SceneList([table.scenes[i] for i in r])
        return table.take(r)

    if not workers and not cluster:
        for r in chunk_ranges:
            res = batch.run_table_chunk(table, r, engine=engine)
            if on_result:
                on_result(r, res)
        return
    from dask.distributed import as_completed

    own = not (cluster is not None and not isinstance(cluster, str))
    cl = _Cluster(workers, cluster) if own else None
    client = cl.client if own else cluster
    try:
        futs = {}
        for r in chunk_ranges:
            f = client.submit(batch.run_table_chunk, piece(r), engine=engine, pure=False)
            futs[f] = r
        for f in as_completed(list(futs)):
            res = f.result()
            if on_result:
                on_result(futs[f], res)
    finally:
        if cl is not None:
            cl.close()


@dataclass(frozen=True)
class Comparison:
    """What :func:`compare` did.

    ``results`` holds the variants' summaries by column (:class:`Results`),
    ``ranking`` the :class:`Ranking`, ``ran`` the number of variants run now,
    ``reused`` the number taken from an earlier run, ``sensitivity`` the result of
    :func:`sensitivity_study` (None when not run).
    """

    results: Results
    ranking: Ranking
    ran: int
    reused: int
    sensitivity: dict | None

    @property
    def summaries(self) -> list:
        """The summaries as dicts, in variant order (made on demand)."""
        return [self.results.summary(i) for i in range(self.results.n)]


def _write_table(path, sweep, results) -> None:
    """Write ``comparison.csv`` in variant order, row by row."""
    with atomic_path(path) as tmp, open(tmp, "w", encoding="utf-8", newline="") as fh:
        fh.write(_csv_line(header(sweep)))
        for i in range(sweep.table.n):
            fh.write(_checked_line(row_cells(sweep, i, results.summary(i))))


def compare(sweep, out: Path, *, resume=False, force=False, workers=None, cluster=None,
            engine="batch", chunk_size=None, progress=None, sensitivity=None) -> Comparison:
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
        The summaries by column, the ranking, how many variants ran now and how
        many were reused, the sensitivity study.

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
    table = sweep.table
    with locked_out_dir(out, force or resuming) as out, reported_write_errors(out):
        done = read_done(sweep, csv_path) if resuming else {}
        results = Results(table.n)
        for i, s in done.items():
            results.put(i, s)
        todo = [i for i in range(table.n) if i not in done]
        first = table.scene(todo[0] if todo else 0)
        size = chunk_size or batch.chunk_size_for([first])
        ranges = [[todo[j] for j in r] for r in batch.chunks(len(todo), size)]
        hdr = header(sweep)
        # the running CSV (what --resume reads) starts again with the finished rows only
        lines = [_csv_line(hdr)] + [_checked_line(row_cells(sweep, i, done[i])) for i in sorted(done)]
        atomic_write_text(csv_path, "".join(lines))
        written = [] if not done else None  # row order of the running CSV (None: not variant order)
        with open(csv_path, "a", encoding="utf-8", newline="") as fh:
            def on_result(r, res):
                if written is not None:
                    written.extend(r)
                fh.write("".join(_checked_line(row_cells(sweep, i, s)) for i, s in zip(r, res)))
                results.put_many(r, res)
                fh.flush()
                os.fsync(fh.fileno())
                if progress:
                    progress(len(r))

            run_chunks(table, ranges, workers=workers, cluster=cluster, engine=engine, on_result=on_result)
        ranking = rank(sweep, results)
        do_sens = sweep.sensitivity if sensitivity is None else sensitivity
        sens = sensitivity_study(sweep.base) if do_sens else None
        # the finished files appear together, and only when all of them are complete
        with staged_outputs(out) as stage:
            if written != list(range(table.n)):  # rows came out of order (Dask, --resume): sort them
                _write_table(stage.path / CSV_NAME, sweep, results)
            write_ranking_csv(stage.path / "ranking.csv", sweep, ranking, results)
            if sens:
                atomic_write_text(stage.path / "sensitivity.csv", sensitivity_csv(sens))
            atomic_write_text(stage.path / "report.html", comparison_html(sweep, results, ranking, sens))
    return Comparison(results=results, ranking=ranking, ran=len(todo), reused=len(done), sensitivity=sens)
