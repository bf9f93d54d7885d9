"""report.html of a comparison: one self-contained page (no external files or scripts).

The page holds the caution, the objective and the ranking rule, the ranking
table(s) (one per ``group_by`` combination; scrolling inside their box with a
sticky header, numbers by :func:`swingsim.report.plots_compare.format_number`),
the keys a profile did not use, a heat map over the two varied numbers with the
most values, plots of residual swing and move time against each varied quantity,
the shaper sensitivity to rope-length error, and how to read them.  Plots
(:mod:`swingsim.report.plots_compare`) are PNG images embedded as base64 data
URIs, drawn by the small raster plotter :mod:`swingsim.report.raster` (no
matplotlib), aggregated so that they draw fast at any number of variants.
"""

from __future__ import annotations

import html
import math

from swingsim.constants import newton_to_tonnes_force
from swingsim.metrics import cautions
from swingsim.report.plots_compare import (format_number, heatmap_figure, heatmap_keys, quantity_figure,
                                           sensitivity_figure)

_CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;margin:1.5rem auto;max-width:72rem;
color:#1d2731;padding:0 1rem;line-height:1.4}
h1{font-size:1.5rem;margin-bottom:.2rem}h2{font-size:1.15rem;margin-top:2rem;border-bottom:1px solid #ccd;}
h3{font-size:1rem;margin:1.2rem 0 .3rem}
.caution{border:2px solid #8a1c1c;background:#fbeeee;padding:.6rem .9rem;color:#5a1010;font-weight:600}
.rule{border-left:4px solid #0b6e99;background:#eef5f9;padding:.5rem .8rem}
.wide{overflow:auto;max-height:28rem;max-width:100%;border:1px solid #ccd3da}
table{border-collapse:separate;border-spacing:0;font-size:.8rem;width:max-content;min-width:100%}
th,td{border-right:1px solid #e1e6ea;border-bottom:1px solid #e1e6ea;padding:.25rem .5rem;text-align:right;
white-space:nowrap;font-variant-numeric:tabular-nums}
thead th{background:#eef2f5;position:sticky;top:0;z-index:1;border-bottom:1px solid #ccd3da}
td.l,th.l{text-align:left}
tr.out td{color:#8c959f}
.meta{color:#555;font-size:.9rem}
figure{margin:1rem 0}figcaption{font-size:.85rem;color:#444}
img{max-width:100%;height:auto;border:1px solid #e0e4e8}
"""

_UNITS = (("_deg_s", "deg/s"), ("_deg", "deg"), ("_m_s", "m/s"), ("_kN", "kN"), ("_s", "s"),
          ("_m", "m"), ("_kg", "kg"), ("_m_s2", "m/s²"), ("_t", "t"), ("_N", "N"))


def _head(key: str) -> str:
    """A column heading: the key, with its unit on a second line when its name carries one."""
    e = html.escape
    for suffix, unit in sorted(_UNITS, key=lambda u: -len(u[0])):
        if key.endswith(suffix):
            return f"{e(key)}<br><small>[{e(unit)}]</small>"
    return e(key)


def _fmt(x, key="", digits=3) -> str:
    return html.escape(format_number(x, key, digits))


_SHOW = ["last_move_end_s", "peak_rope_angle_deg", "residual_rope_angle_deg", "settled_at_s",
         "peak_rope_tension_kN", "peak_hook_load_kN", "dynamic_factor"]
#: Shown when some variant has them: sling legs (hook-and-load model), a rated capacity chart.
_SHOW_WHEN_MEASURED = ["peak_leg_tension_kN", "peak_utilisation_pct"]


def _tonnes_column(key: str) -> str:
    """The header of the tonnes-force column beside a ``..._kN`` column, e.g. ``peak_rope_tension_t``."""
    return key[: -len("_kN")] + "_t"


def _force_cells(key: str, value) -> str:
    """The cell of a summary number, and beside a force [kN] its tonnes-force [t]."""
    cell = f"<td>{_fmt(value, key)}</td>"
    if not key.endswith("_kN"):
        return cell
    ok = isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)
    t = newton_to_tonnes_force(1e3 * value) if ok else None
    return cell + f"<td>{html.escape(format_number(t, _tonnes_column(key), 3))}</td>"


def _force_heads(key: str) -> str:
    """The heading of a summary number, and beside a force its tonnes-force column's."""
    return f"<th>{_head(key)}</th>" + (f"<th>{_head(_tonnes_column(key))}</th>" if key.endswith("_kN") else "")


def _variant_table(sweep, results, ranking, entries, max_rows):
    """The ranking table of plain (one variant per entry) rankings."""
    e = html.escape
    obj = sweep.minimize
    t = sweep.table
    cols = list(sweep.keys)
    show = list(_SHOW) + [k for k in _SHOW_WHEN_MEASURED
                          if any(v == v for v in results.numbers.get(k, ()))]  # a number somewhere (NaN != NaN)
    if obj not in show:
        show.insert(0, obj)
    named = any(t.names)
    parts = ['<div class="wide"><table><thead><tr><th>rank</th><th>variant</th>'
             + ('<th class="l">name</th>' if named else "") + "".join(f"<th>{_head(c)}</th>" for c in cols)
             + "".join(_force_heads(c) for c in show) + '<th class="l">not ranked because</th></tr>'
             "</thead><tbody>"]
    for en in entries[:max_rows]:
        i = int(ranking.first[en])
        s = results.summary(i)
        rk = int(ranking.rank[en])
        cls = "" if rk else ' class="out"'
        parts.append(f"<tr{cls}><td>{rk if rk else '&ndash;'}</td><td>{i}</td>"
                     + (f'<td class="l">{e(t.names[i])}</td>' if named else "")
                     + "".join(f"<td>{_fmt(t.value(i, c), c, 4)}</td>" for c in cols)
                     + "".join(_force_cells(c, s.get(c)) for c in show)
                     + f'<td class="l">{e(ranking.note[en])}</td></tr>')
    parts.append("</tbody></table></div>")
    return parts


def _robust_table(sweep, ranking, entries, max_rows):
    """The ranking table of a worst-case ranking: one row per combination, with the spread."""
    e = html.escape
    obj = sweep.minimize
    t = sweep.table
    over = sweep.robust_over
    others = [k for k in sweep.keys if k != over]
    parts = ['<div class="wide"><table><thead><tr><th>rank</th><th>first variant</th>'
             + "".join(f"<th>{_head(c)}</th>" for c in others)
             + f"<th>worst {_head(obj)}</th><th>best</th><th>mean</th><th>worst at {_head(over)}</th>"
             '<th>variants</th><th class="l">not ranked because</th></tr></thead><tbody>']
    for en in entries[:max_rows]:
        i = int(ranking.first[en])
        rk = int(ranking.rank[en])
        w = int(ranking.worst_at[en])
        cls = "" if rk else ' class="out"'
        parts.append(f"<tr{cls}><td>{rk if rk else '&ndash;'}</td><td>{i}</td>"
                     + "".join(f"<td>{_fmt(t.value(i, c), c, 4)}</td>" for c in others)
                     + f"<td>{_fmt(float(ranking.worst[en]), obj)}</td><td>{_fmt(float(ranking.best[en]), obj)}</td>"
                     + f"<td>{_fmt(float(ranking.mean[en]), obj)}</td>"
                     + f"<td>{_fmt(t.value(w, over), over) if w < t.n else '&ndash;'}</td>"
                     + f"<td>{int(ranking.count[en])}</td><td class=\"l\">{e(ranking.note[en])}</td></tr>")
    parts.append("</tbody></table></div>")
    return parts


def comparison_html(sweep, results, ranking, sensitivity=None, max_rows=100) -> str:
    """The comparison's report page: one self-contained HTML file (plots embedded, no scripts).

    Parameters
    ----------
    sweep : swingsim.study.variants.Sweep
        The sweep (title, varied keys, objective and ranking rule, base scene, variant table).
    results : swingsim.study.compare.Results
        The variants' summaries by column.
    ranking : swingsim.study.compare.Ranking
        The ranking (entries, ranks, spreads, notes, order).
    sensitivity : dict, optional
        ``curves`` {profile: [(error, residual_deg), ...]}, ``design_length_m``, ``design_period_s``, ``move``.
    max_rows : int
        Rows of each ranking table shown; every variant is in the CSV files.

    Returns
    -------
    str
        The page.
    """
    e = html.escape
    obj = sweep.minimize
    t = sweep.table
    parts = [
        "<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
        f"<title>{e(sweep.title)} - swingsim comparison</title>",
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<style>{_CSS}</style></head><body>",
        f"<h1>{e(sweep.title)}</h1>",
        f'<p class="meta">Sweep file: {e(sweep.file.split("/")[-1])} &middot; base scene: '
        f"{e(sweep.base.name)}.toml &middot; {t.n:,} variants &middot; compared: "
        + ", ".join(f"<code>{e(k)}</code>" for k in sweep.keys) + "</p>",
        f'<p class="caution" id="caution">{e(cautions.CAUTION)}</p>',
        f'<p class="rule" id="rule"><b>Objective:</b> smallest <code>{e(obj)}</code>. <b>Rule:</b> '
        f"{e(ranking.rule)}.</p>",
    ]
    if t.ignored:
        said = "; ".join(f"<code>{e(k)}</code> with profile {e(p)} ({n:,} variants)"
                         for (k, p), n in sorted(t.ignored.items()))
        parts.append(f'<p class="meta" id="ignored">Keys a profile does not use were left out of those '
                     f"variants: {said}.</p>")
    parts.append('<h2 id="ranking-title">Ranking</h2>')
    n_groups = int(ranking.group.max()) + 1 if len(ranking.group) else 0
    for g in range(n_groups):
        entries = [int(x) for x in ranking.order if ranking.group[x] == g]
        if sweep.group_by:
            i = int(ranking.first[entries[0]])
            label = ", ".join(f"{k} = {format_number(t.value(i, k), k)}" for k in sweep.group_by)
            parts.append(f"<h3>{e(label)}</h3>")
        table = _robust_table(sweep, ranking, entries, max_rows) if sweep.robust_over else \
            _variant_table(sweep, results, ranking, entries, max_rows)
        if g == 0:
            table[0] = table[0].replace("<table>", "<table id=\"ranking\">")
        parts.extend(table)
        if len(entries) > max_rows:
            parts.append(f'<p class="meta">The first {max_rows} of {len(entries):,} rows; every variant is in '
                         "comparison.csv and ranking.csv.</p>")
    parts.append("<p class=\"meta\">Grey rows are not ranked: outside the objective's limits, without a "
                 f"value of {e(obj)} (e.g. the load does not settle within the simulated time), or the run "
                 "stopped early. Move time is when the last move ends; settled at is when the swing stays "
                 "below the scene's settle angle. Angles below 0.01 deg print as &lt; 0.01.</p>")
    parts.append(f"<p class=\"meta\">{e(cautions.TONNE_FORCE_NOTE)}</p>")

    # the plots (swingsim.report.raster) draw user text (names, keys) as it is: no maths markup
    pair = heatmap_keys(t, sweep.keys)
    if pair:
        img = heatmap_figure(t, results, *pair)
        parts.append("<h2>Residual swing and move time over two varied quantities</h2>")
        parts.append(f'<figure class="plot"><img alt="heat maps over {e(pair[0])} and {e(pair[1])}" '
                     f'src="data:image/png;base64,{img}"><figcaption>Each cell: the worst case over every '
                     "other compared value. Left: largest rope angle after the last move ends; right: when "
                     "the last move ends.</figcaption></figure>")
    parts.append('<h2>Residual swing and move time against each varied quantity</h2>')
    for k in sweep.keys:
        if len(t.codes([k])[1]) < 2:
            continue  # one value only: nothing to draw against
        img = quantity_figure(t, results, k, sweep.keys)
        parts.append(f'<figure class="plot"><img alt="residual swing and move time against {e(k)}" '
                     f'src="data:image/png;base64,{img}"><figcaption>Left: largest rope angle after the last '
                     f"move ends; right: when the last move ends; against <code>{e(k)}</code>.</figcaption>"
                     "</figure>")
    if sensitivity:
        img = sensitivity_figure(sensitivity)
        parts.append('<h2>Input shaping: sensitivity to the rope length</h2>')
        parts.append(f'<figure class="plot"><img alt="sensitivity of the residual swing to rope length" '
                     f'src="data:image/png;base64,{img}"><figcaption>{e(sensitivity["move"])}: every profile '
                     f"tuned to the base scene's rope of {sensitivity['design_length_m']:g} m, simulated "
                     "(nonlinear model) with the rope from 30% shorter to 30% longer. A real rope length "
                     "differs from the plan by the hook block, slings and rigging; shapers that are "
                     "flat here tolerate that best.</figcaption></figure>")
    parts.append(f'<p class="caution">{e(cautions.CAUTION)}</p>')
    parts.append("</body></html>")
    return "\n".join(parts)
