"""report.html of a comparison: one self-contained page (no external files or scripts).

The page holds the caution, the ranking table, plots of residual swing and move
time against each varied quantity, the shaper sensitivity to rope-length
error, and how to read them.  Plots are PNG images embedded as base64 data
URIs, drawn with matplotlib (Agg backend).
"""

from __future__ import annotations

import base64
import html
import io
import math

from swingsim.constants import newton_to_tonnes_force
from swingsim.metrics import cautions
from swingsim.report.style import GREY, INK, LIMIT, LOAD, ROPE, literal_text

# one colour per category, our own palette
_COLOURS = [ROPE, LOAD, "#4f7d3a", "#7a4fa0", "#b08a1e", "#2d8f8f", INK, "#a0507a"]

_CSS = """
body{font-family:system-ui,-apple-system,'Segoe UI',sans-serif;margin:1.5rem auto;max-width:72rem;
color:#1d2731;padding:0 1rem;line-height:1.4}
h1{font-size:1.5rem;margin-bottom:.2rem}h2{font-size:1.15rem;margin-top:2rem;border-bottom:1px solid #ccd;}
.caution{border:2px solid #8a1c1c;background:#fbeeee;padding:.6rem .9rem;color:#5a1010;font-weight:600}
.wide{overflow-x:auto}table{border-collapse:collapse;font-size:.8rem;margin:.5rem 0}
th,td{border:1px solid #ccd3da;padding:.25rem .5rem;text-align:right}
th{background:#eef2f5}td.l,th.l{text-align:left}
tr.out td{color:#8c959f}
.meta{color:#555;font-size:.9rem}
figure{margin:1rem 0}figcaption{font-size:.85rem;color:#444}
img{max-width:100%;height:auto;border:1px solid #e0e4e8}
"""


def _fig():
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    return plt, plt.figure(figsize=(9.0, 4.2), dpi=100)


def _png(plt, fig) -> str:
    buf = io.BytesIO()
    fig.savefig(buf, format="png")
    plt.close(fig)
    return base64.b64encode(buf.getvalue()).decode("ascii")


def _is_num(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x)


def _fmt(x, nd=3) -> str:
    if x is None or x == "":
        return "&ndash;"
    if isinstance(x, bool):
        return "yes" if x else "no"
    if isinstance(x, float):
        return f"{x:.{nd}g}" if abs(x) >= 1e4 or (x != 0 and abs(x) < 1e-3) else f"{x:.{nd}f}".rstrip("0").rstrip(".")
    return html.escape(str(x))


def _tonnes_column(key: str) -> str:
    """The header of the tonnes-force column beside a ``..._kN`` column, e.g. ``peak_rope_tension_t``."""
    return key[: -len("_kN")] + "_t"


def _tonnes(force_kN):
    """A force [kN] in tonnes-force [t] (None stays None)."""
    return None if not _is_num(force_kN) else newton_to_tonnes_force(1e3 * force_kN)


def _quantity_figure(rows, key, others=()):
    """Residual swing and move time of every variant against one varied key (PNG, base64).

    One line per combination of the ``others`` keys' values (markers only when
    there are many).
    """
    plt, fig = _fig()
    ax1 = fig.add_subplot(1, 2, 1)
    ax2 = fig.add_subplot(1, 2, 2)
    xs = [r["values"].get(key) for r in rows]
    numeric = all(_is_num(x) for x in xs if x is not None)
    cats = []
    if not numeric:
        for x in xs:
            if repr(x) not in cats:
                cats.append(repr(x))
    groups = {}
    for r, x in zip(rows, xs):
        if x is None:
            continue
        g = ", ".join(f"{k.split('.')[-1]} = {r['values'].get(k)!r}" for k in others)
        groups.setdefault(g, []).append((x, r))
    lines = numeric and len(groups) <= 12
    for gi, (g, items) in enumerate(groups.items()):
        col = _COLOURS[gi % len(_COLOURS)]
        items.sort(key=lambda p: (p[0] if numeric else cats.index(repr(p[0]))))
        X = [p[0] if numeric else cats.index(repr(p[0])) for p in items]
        res = [p[1]["summary"].get("residual_rope_angle_deg") for p in items]
        mt = [p[1]["summary"].get("last_move_end_s") for p in items]
        label = g or None
        style = dict(color=col, marker="o", ms=4, lw=1.2 if lines else 0)
        ax1.plot(X, [math.nan if v is None else v for v in res], label=label, **style)
        ax2.plot(X, [math.nan if v is None else v for v in mt], label=label, **style)
    for ax, what in ((ax1, "residual rope angle [deg]"), (ax2, "move time: last move ends at [s]")):
        ax.set_xlabel(key)
        ax.set_ylabel(what)
        ax.grid(True, color="#e3e7ea")
        if not numeric:
            ax.set_xticks(range(len(cats)))
            ax.set_xticklabels([c.strip("'") for c in cats], rotation=20, fontsize=8)
    if others and 1 < len(groups) <= 12:
        ax2.legend(fontsize=6.5, loc="best")
    fig.suptitle(f"Residual swing and move time against {key}", fontsize=10, color=INK)
    fig.text(0.5, 0.005, cautions.CAUTION_SHORT, ha="center", va="bottom", fontsize=7, color=LIMIT)
    fig.tight_layout(rect=(0, 0.04, 1, 0.95))
    return _png(plt, fig)


def _sensitivity_figure(sens):
    """Residual swing against rope-length error for each profile (PNG, base64)."""
    plt, fig = _fig()
    ax = fig.add_subplot(1, 1, 1)
    for i, (name, pts) in enumerate(sens["curves"].items()):
        ax.plot([100 * e for e, _ in pts], [r for _, r in pts], marker="o", ms=3,
                color=_COLOURS[i % len(_COLOURS)], label=name)
    ax.axvline(0.0, color=GREY, lw=0.8)
    ax.set_xlabel("rope length error: actual / design - 1 [%]")
    ax.set_ylabel("residual rope angle [deg]")
    ax.grid(True, color="#e3e7ea")
    ax.legend(fontsize=8)
    fig.suptitle(f"Sensitivity to rope length (design {sens['design_length_m']:g} m, "
                 f"period {sens['design_period_s']:.2f} s)", fontsize=10, color=INK)
    fig.text(0.5, 0.005, cautions.CAUTION_SHORT, ha="center", va="bottom", fontsize=7, color=LIMIT)
    fig.tight_layout(rect=(0, 0.04, 1, 0.95))
    return _png(plt, fig)


def comparison_html(sweep, rows, ranking, sensitivity=None, max_rows=100) -> str:
    """The comparison's report page: one self-contained HTML file (plots embedded, no scripts).

    Parameters
    ----------
    sweep : swingsim.study.variants.Sweep
        The sweep (title, varied keys, objective, limits, base scene).
    rows : list of dict
        Per variant: ``index``, ``name``, ``values`` (dotted key -> value), ``summary``.
    ranking : list of dict
        Rows in rank order with ``rank`` (None when outside the limits or without a value).
    sensitivity : dict, optional
        ``curves`` {profile: [(error, residual_deg), ...]}, ``design_length_m``, ``design_period_s``, ``move``.
    max_rows : int
        Rows of the ranking table shown; every variant is in the CSV files.

    Returns
    -------
    str
        The page.
    """
    e = html.escape
    obj = sweep.minimize
    parts = [
        "<!DOCTYPE html>", '<html lang="en"><head><meta charset="utf-8">',
        f"<title>{e(sweep.title)} - swingsim comparison</title>",
        '<meta name="viewport" content="width=device-width, initial-scale=1">',
        f"<style>{_CSS}</style></head><body>",
        f"<h1>{e(sweep.title)}</h1>",
        f'<p class="meta">Sweep file: {e(sweep.file.split("/")[-1])} &middot; base scene: '
        f"{e(sweep.base.name)}.toml &middot; {len(rows)} variants &middot; ranked by the smallest "
        f"<code>{e(obj)}</code>"
        + ("".join(f" &middot; only with <code>{e(k)}</code> &le; {v:g}" for k, v in sweep.limits.items()))
        + "</p>",
        f'<p class="caution" id="caution">{e(cautions.CAUTION)}</p>',
        '<h2 id="ranking-title">Ranking</h2>',
    ]
    cols = list(sweep.keys)
    show = ["last_move_end_s", "peak_rope_angle_deg", "residual_rope_angle_deg", "settled_at_s",
            "peak_rope_tension_kN", "dynamic_factor"]
    if obj not in show:
        show.insert(0, obj)
    parts.append('<div class="wide"><table id="ranking"><thead><tr><th>rank</th><th>variant</th><th class="l">name</th>'
                 + "".join(f"<th>{e(c)}</th>" for c in cols)
                 + "".join(f"<th>{e(c)}</th>" + (f"<th>{e(_tonnes_column(c))}</th>" if c.endswith("_kN") else "")
                           for c in show)
                 + "<th class=\"l\">not ranked because</th></tr></thead><tbody>")
    for r in ranking[:max_rows]:
        s = r["summary"]
        cls = "" if r["rank"] is not None else ' class="out"'
        parts.append(f"<tr{cls}><td>{r['rank'] if r['rank'] is not None else '&ndash;'}</td>"
                     f"<td>{r['index']}</td><td class=\"l\">{e(r['name'])}</td>"
                     + "".join(f"<td>{_fmt(r['values'].get(c, r['base_values'].get(c)))}</td>" for c in cols)
                     + "".join(f"<td>{_fmt(s.get(c))}</td>" + (f"<td>{_fmt(_tonnes(s.get(c)), 2)}</td>"
                                                               if c.endswith("_kN") else "") for c in show)
                     + f"<td class=\"l\">{e(r.get('note', ''))}</td></tr>")
    parts.append("</tbody></table></div>")
    if len(ranking) > max_rows:
        parts.append(f"<p class=\"meta\">The first {max_rows} of {len(ranking)} rows; every variant is in "
                     "comparison.csv and ranking.csv.</p>")
    parts.append(f"<p class=\"meta\">{e(cautions.TONNE_FORCE_NOTE)}</p>")
    parts.append("<p class=\"meta\">Grey rows are not ranked: outside the objective's limits, without a "
                 f"value of {e(obj)} (e.g. the load does not settle within the simulated time), or the run "
                 "stopped early. Move time is when the last move ends; settled at is when the swing stays "
                 "below the scene's settle angle.</p>")

    parts.append('<h2>Residual swing and move time against each varied quantity</h2>')
    for k in cols:
        others = [c for c in cols if c != k]
        with literal_text():  # user text (names, keys) drawn as it is
            img = _quantity_figure(rows, k, others)
        parts.append(f'<figure class="plot"><img alt="residual swing and move time against {e(k)}" '
                     f'src="data:image/png;base64,{img}"><figcaption>Left: largest rope angle after the last '
                     f"move ends; right: when the last move ends; against <code>{e(k)}</code>"
                     + (", one colour per combination of the other compared values" if others else "")
                     + ".</figcaption></figure>")
    if sensitivity:
        with literal_text():
            img = _sensitivity_figure(sensitivity)
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
