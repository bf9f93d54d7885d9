"""The plots of a comparison's report: aggregated, so they read (and draw fast) at any size.

Every figure is built from the variant table's columns and the summaries'
columns with numpy, and draws a bounded number of artists whatever the number
of variants:

* against each varied number: one line per value of the other compared keys
  when there are few combinations (at most :data:`MAX_LINES`), else the median
  and the band from best to worst over the other keys, per value of a
  category key (e.g. the profile) when there is one with few values;
* against a category (e.g. the profile): the spread (best, median, worst) per value;
* a heat map of the worst residual swing and of the move time over the two
  varied numbers with the most values (when both have at least
  :data:`HEATMAP_MIN_VALUES`);
* residual swing on a log axis when its values span more than two decades
  (shaped moves leave almost none), values below :data:`LOG_FLOOR_DEG` drawn at it.

Legends name only the keys that differ between the lines, never a key a
variant leaves unset.  Every figure carries the short caution.

The figures are drawn by :mod:`swingsim.report.raster` on a Pillow image, not by
matplotlib: importing matplotlib and drawing these four figures with it took
about 1.1 s of CPU, a fifth of a 10,000-variant comparison; now about 0.15 s.
"""

from __future__ import annotations

import math

import numpy as np

from swingsim.metrics import cautions
from swingsim.report import raster
from swingsim.report.style import GREY, INK, LIMIT, LOAD, ROPE

#: Lines drawn one per combination of the other keys up to this many; aggregated beyond.
MAX_LINES = 8
#: Values each of two varied numbers needs for a heat map.
HEATMAP_MIN_VALUES = 5
#: Residual swing below this is drawn at this value on a log axis [deg].
LOG_FLOOR_DEG = 1e-4

_COLOURS = [ROPE, LOAD, "#4f7d3a", "#7a4fa0", "#b08a1e", "#2d8f8f", INK, "#a0507a"]
RESIDUAL = "residual_rope_angle_deg"
MOVE_TIME = "last_move_end_s"
_LABELS = {RESIDUAL: "residual rope angle [deg]", MOVE_TIME: "move time: last move ends at [s]"}


def _figure(width=9.0, height=4.2):
    # drawn by the small raster plotter: no matplotlib (importing it and drawing four figures with it
    # cost a fifth of a 10,000-variant comparison)
    return raster.Figure(width, height)


def _png(fig) -> str:
    return fig.png_base64()


def _two_axes(fig, title, right=0.98):
    """Two axes side by side in the layout of every figure here, with the title and the caution."""
    top = 0.88 - 0.05 * title.count("\n")
    left, bottom, wspace = 0.09, 0.2, 0.32
    w = (right - left) / (2 + wspace)
    _finish(fig, title)
    return [fig.add_axes(left, bottom, left + w, top), fig.add_axes(right - w, bottom, right, top)]


def _finish(fig, title):
    # a fixed layout: the title on top, the short caution at the bottom
    y = (1 - 0.98) * fig.height
    for line in title.split("\n"):
        fig.text(fig.width / 2, y, line, 10, INK, anchor="mt")
        y += raster.font(10).size * 1.2
    fig.text(fig.width / 2, (1 - 0.005) * fig.height, cautions.CAUTION_SHORT, 7, LIMIT, anchor="md")


def is_numeric(values) -> bool:
    """Whether a column of values is numbers only (then it is drawn on a numeric axis).

    Parameters
    ----------
    values : ndarray
        A column of values (``VariantTable.effective``).

    Returns
    -------
    bool
        True for numbers (not booleans), all finite.
    """
    return values.dtype != object and bool(np.all(np.isfinite(values)))


def _distinct(table, keys):
    """Distinct combinations of ``keys`` (value tuples, in first-appearance order) and each row's code."""
    codes, first = table.codes(keys)
    cols = [table.effective(k) for k in keys]
    return [tuple(_plain(c[f]) for c in cols) for f in first], codes


def _plain(x):
    return x.item() if isinstance(x, np.generic) else x


def _short(key):
    return key.split(".")[-1]


def _show(x):
    if isinstance(x, float):
        return f"{x:.4g}"
    return str(x)


def spans_decades(values, decades=2.0) -> bool:
    """Whether positive values span more than ``decades`` powers of ten (then a log axis reads better).

    Parameters
    ----------
    values : ndarray
        The values drawn (NaN ignored).
    decades : float, optional
        How many powers of ten count as spanning.

    Returns
    -------
    bool
        True when the largest value exceeds the smallest positive one (floored at
        :data:`LOG_FLOOR_DEG`) by more than ``10**decades``.
    """
    v = np.asarray(values, dtype=float)
    v = v[np.isfinite(v)]
    if v.size == 0 or v.max() <= 0:
        return False
    lo = max(float(v[v > 0].min()), LOG_FLOOR_DEG)
    return v.max() / lo > 10.0**decades


def _group_stat(codes, x_codes, y, n_groups, n_x):
    """Min, median and max of y for every (group, x) cell (NaN where empty)."""
    cell = codes * n_x + x_codes
    order = np.lexsort((y, cell))
    cs, ys = cell[order], y[order]
    ok = np.isfinite(ys)
    cs, ys = cs[ok], ys[ok]
    lo = np.full(n_groups * n_x, np.nan)
    hi = np.full(n_groups * n_x, np.nan)
    med = np.full(n_groups * n_x, np.nan)
    if cs.size:
        starts = np.flatnonzero(np.r_[True, cs[1:] != cs[:-1]])
        ends = np.r_[starts[1:], cs.size]
        ids = cs[starts]
        lo[ids] = ys[starts]
        hi[ids] = ys[ends - 1]
        mid = (starts + ends - 1) / 2.0
        med[ids] = 0.5 * (ys[np.floor(mid).astype(int)] + ys[np.ceil(mid).astype(int)])
    shape = (n_groups, n_x)
    return lo.reshape(shape), med.reshape(shape), hi.reshape(shape)


def quantity_figure(table, results, key, keys) -> str:
    """Residual swing and move time against one compared key (PNG, base64).

    Parameters
    ----------
    table : swingsim.study.variants.VariantTable
        The variants.
    results : swingsim.study.compare.Results
        Their summaries by column.
    key : str
        The key on the horizontal axis.
    keys : sequence of str
        Every compared key.

    Returns
    -------
    str
        The PNG, base64-encoded.
    """
    fig = _figure()
    xs = table.effective(key)
    numeric = is_numeric(xs)
    x_labels, x_codes = _distinct(table, [key])
    x_labels = [x for (x,) in x_labels]
    if numeric:
        order = np.argsort(np.asarray(x_labels, dtype=float))
        rank_of = np.empty_like(order)
        rank_of[order] = np.arange(len(order))
        x_codes = rank_of[x_codes]
        x_pos = np.asarray(x_labels, dtype=float)[order]
    else:
        x_pos = np.arange(len(x_labels), dtype=float)
    others = [k for k in keys if k != key]
    other_cols = {k: table.effective(k) for k in others}
    # keys whose value varies (a key a variant leaves unset shows the base value, never None)
    varying = [k for k in others if len(table.codes([k])[1]) > 1]
    combo_labels, combo = _distinct(table, varying) if varying else ([()], np.zeros(table.n, dtype=np.intp))
    if len(combo_labels) <= MAX_LINES:
        lines, colour_keys, aggregated = combo, varying, False
        line_labels = combo_labels
    else:
        # aggregate over the other keys, one band per value of a category key with few values
        cat = next((k for k in varying if not is_numeric(other_cols[k])
                    and len(table.codes([k])[1]) <= MAX_LINES), None)
        if cat is None:
            lines, line_labels, colour_keys = np.zeros(table.n, dtype=np.intp), [()], []
        else:
            line_labels, lines = _distinct(table, [cat])
            colour_keys = [cat]
        aggregated = True
    # the aggregation said on a second line: on one line it ran past the figure's edges
    how = "\nline: median over the other compared values; band: best to worst" if aggregated else ""
    axes = _two_axes(fig, f"Residual swing and move time against {key}{how}")
    for ax, what in zip(axes, (RESIDUAL, MOVE_TIME)):
        y = results.column(what)
        lo, med, hi = _group_stat(lines, x_codes, y, len(line_labels), len(x_pos))
        log = what == RESIDUAL and spans_decades(y)
        for g, lab in enumerate(line_labels):
            col = _COLOURS[g % len(_COLOURS)]
            name = ", ".join(f"{_short(k)} = {_show(v)}" for k, v in zip(colour_keys, lab)) or None
            m = med[g]
            if log:
                m, lo_g, hi_g = (np.maximum(a, LOG_FLOOR_DEG) for a in (m, lo[g], hi[g]))
            else:
                lo_g, hi_g = lo[g], hi[g]
            if not numeric:
                # categories: the spread as a bar from best to worst, the median as a dot (no joining line)
                shift = (g - (len(line_labels) - 1) / 2) * min(0.8 / max(len(line_labels), 1), 0.15)
                xg = x_pos + shift
                okg = np.isfinite(m)
                ax.vlines(xg[okg], lo_g[okg], hi_g[okg], col, lw=3, alpha=0.35)
                ax.plot(xg[okg], m[okg], col, lw=0, marker="o", ms=4, label=name)
            elif aggregated:
                ax.fill_between(x_pos, lo_g, hi_g, col, alpha=0.18)
                ax.plot(x_pos, m, col, lw=1.4, marker="o" if len(x_pos) <= 30 else None, ms=3, label=name)
            else:
                ax.plot(x_pos, m, col, lw=1.2, marker="o", ms=4, label=name)
        ax.ylog = log
        ax.xlabel = key
        if not numeric:
            ax.xlim = (-0.6, len(x_pos) - 0.4)
        ax.ylabel = _LABELS[what] + (" (log)" if log else "")
        ax.ylabel_pt = 8.5
        ax.grid_colour = "#e3e7ea"
        if not numeric:
            ax.xticks = (x_pos, [_show(c) for c in x_labels], 20, 8)
    if len(line_labels) > 1:
        axes[1].legend_pt = 6.5
    return _png(fig)


def heatmap_keys(table, keys):
    """The two compared numbers with the most values, when both have enough for a heat map.

    Parameters
    ----------
    table : swingsim.study.variants.VariantTable
        The variants.
    keys : sequence of str
        The compared keys.

    Returns
    -------
    tuple of str or None
        ``(x_key, y_key)``, or None.
    """
    counts = []
    for k in keys:
        col = table.effective(k)
        if is_numeric(col):
            counts.append((len(np.unique(col)), k))
    counts.sort(key=lambda c: -c[0])
    if len(counts) >= 2 and counts[1][0] >= HEATMAP_MIN_VALUES:
        return counts[0][1], counts[1][1]
    return None


def heatmap_figure(table, results, x_key, y_key) -> str:
    """Heat maps of the worst residual swing and the longest move time over two compared numbers (PNG).

    Every other compared value is folded in by its worst case (largest), so a
    cell shows what the whole range of the other values can give.

    Parameters
    ----------
    table : swingsim.study.variants.VariantTable
        The variants.
    results : swingsim.study.compare.Results
        Their summaries by column.
    x_key, y_key : str
        The compared numbers on the two axes.

    Returns
    -------
    str
        The PNG, base64-encoded.
    """
    fig = _figure(9.0, 4.0)
    axes = _two_axes(fig, f"Over {x_key} and {y_key} (worst case over the other compared values)", right=0.95)
    xv, yv = table.effective(x_key), table.effective(y_key)
    xs, xi = np.unique(xv, return_inverse=True)
    ys, yi = np.unique(yv, return_inverse=True)
    for p, what in enumerate((RESIDUAL, MOVE_TIME)):
        ax = axes[p]
        v = results.column(what)
        grid = np.full(len(ys) * len(xs), -np.inf)
        np.maximum.at(grid, yi.reshape(-1) * len(xs) + xi.reshape(-1), np.where(np.isfinite(v), v, -np.inf))
        grid[~np.isfinite(grid)] = np.nan
        grid = grid.reshape(len(ys), len(xs))
        log = what == RESIDUAL and spans_decades(grid)
        if log:
            grid = np.maximum(grid, LOG_FLOOR_DEG)
        scale = ax.mesh(_edges(xs), _edges(ys), grid, log=log)  # viridis, NaN cells left empty
        ax.colour_bar(scale, ("worst " if what == RESIDUAL else "longest ") + _LABELS[what], 8)
        ax.xlabel, ax.ylabel = x_key, y_key
        ax.xlabel_pt = ax.ylabel_pt = 8.5
    return _png(fig)


def _edges(centres):
    c = np.asarray(centres, dtype=float)
    if c.size == 1:
        return np.array([c[0] - 0.5, c[0] + 0.5])
    mid = 0.5 * (c[1:] + c[:-1])
    return np.concatenate([[c[0] - (mid[0] - c[0])], mid, [c[-1] + (c[-1] - mid[-1])]])


def sensitivity_figure(sens) -> str:
    """Residual swing against rope-length error for each profile (PNG, base64).

    Parameters
    ----------
    sens : dict
        The sensitivity study: ``curves`` {profile: [(error, residual_deg), ...]},
        ``design_length_m`` [m], ``design_period_s`` [s].

    Returns
    -------
    str
        The PNG, base64-encoded; log axis when the residuals span more than two decades.
    """
    fig = _figure()
    title = (f"Sensitivity to rope length (design {sens['design_length_m']:g} m, "
             f"period {sens['design_period_s']:.2f} s)")
    _finish(fig, title)
    ax = fig.add_axes(0.09, 0.2, 0.98, 0.88)
    allv = np.array([r for pts in sens["curves"].values() for _, r in pts], dtype=float)
    log = spans_decades(allv)
    for i, (name, pts) in enumerate(sens["curves"].items()):
        r = np.array([r for _, r in pts], dtype=float)
        ax.plot([100 * e for e, _ in pts], np.maximum(r, LOG_FLOOR_DEG) if log else r,
                _COLOURS[i % len(_COLOURS)], marker="o", ms=3, label=name)
    ax.ylog = log
    ax.axvline(0.0, GREY, lw=0.8)
    ax.xlabel = "rope length error: actual / design - 1 [%]"
    ax.ylabel = "residual rope angle [deg]" + (" (log)" if log else "")
    ax.ylabel_pt = 8.5
    ax.grid_colour = "#e3e7ea"
    ax.legend_pt = 8
    return _png(fig)


def format_number(x, key: str = "", digits: int = 3) -> str:
    """A summary or compared number as the report prints it: sensible decimals, never ``7.21e-06``.

    Angles in degrees below 0.01 print as ``< 0.01`` (below what the models
    resolve for a plan); other numbers with 3 significant digits (whole numbers
    as they are); very large or very small ones in engineering notation
    (``12.3×10^6``).

    Parameters
    ----------
    x : object
        The value: a number, a bool, text, or None / NaN for none.
    key : str, optional
        The key it belongs to (its unit suffix chooses the rule, e.g. ``_deg``).
    digits : int, optional
        Significant digits (4 for the compared values a user typed, so 13.75 stays 13.75).

    Returns
    -------
    str
        The text (plain, not HTML-escaped).
    """
    if x is None or (isinstance(x, float) and math.isnan(x)):
        return "–"
    if isinstance(x, bool):
        return "yes" if x else "no"
    if isinstance(x, (int, np.integer)):
        return str(int(x))
    if not isinstance(x, (float, np.floating)):
        return str(x)
    x = float(x)
    if math.isinf(x):
        return "∞" if x > 0 else "-∞"
    if key.endswith("_deg") and abs(x) < 0.01 and digits <= 3:
        return "< 0.01" if x >= 0 else "> -0.01"
    if x == 0.0:
        return "0"
    mag = math.floor(math.log10(abs(x)))
    if -3 <= mag < 6:
        decimals = max(0, digits - 1 - mag)
        text = f"{x:.{decimals}f}"
        return text.rstrip("0").rstrip(".") if "." in text else text
    exp3 = 3 * (mag // 3)
    return f"{x / 10.0**exp3:.{digits}g}×10^{exp3}"
