"""response.csv and response.png: the lift's frequency response and the moves' rhythms.

The curves come from :func:`swingsim.metrics.resonance.lift_response` (the model's
linearised swing at the starting configuration, with the scene's damping); the modes'
numbers and the rhythms from the summary's ``response_modes`` and ``move_rhythms``.
"""

from __future__ import annotations

import io
import math

import numpy as np

from swingsim.metrics.resonance import column_name, lift_response
from swingsim.report.style import GREY, INK, LIMIT, LOAD, MOVE_BAND, ROPE, label_axes, new_figure, title_and_caution

#: Line colour and style of each direction's curve.
_DIRECTION_STYLE = {"x": (ROPE, "-"), "y": (INK, "--"), "tangential": (LOAD, "-"), "radial": (GREY, "-.")}
_DIRECTION_WORDS = {"x": "travel along x", "y": "travel along y", "tangential": "slewing (tangential)",
                    "radial": "radius moves (radial)"}
_AXIS_WORDS = {"x": "x travel", "y": "y travel", "slew": "slew", "radius": "radius"}


def _plain_log_ticks(ax) -> None:
    """Tick labels of log axes as plain numbers (1, 2, 5, 10 ...): the figures draw text literally."""
    from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter

    fmt = FuncFormatter(lambda v, _pos: f"{v:g}")
    for axis, (lo, hi) in ((ax.xaxis, ax.get_xlim()), (ax.yaxis, ax.get_ylim())):
        decades = math.log10(hi / lo) if lo > 0 and hi > lo else 1.0
        axis.set_major_locator(LogLocator(base=10.0, subs=(1.0, 2.0, 5.0) if decades <= 3.5 else (1.0,),
                                          numticks=30))
        axis.set_major_formatter(fmt)
        axis.set_minor_formatter(NullFormatter())


def response_csv(traj) -> str:
    """response.csv: the swing per unit suspension-point acceleration against forcing period.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run (its model, scene and motion).

    Returns
    -------
    str
        The CSV text, header first (as timeseries.csv; the caution is in the summary
        and on response.png): ``period_s``,
        ``swing_deg_per_m_s2`` (the hoist rope's angle from vertical, largest over the
        cycle, per m/s^2 of acceleration amplitude along x) and the further columns
        (other directions, sling leg, load tilt [deg per m/s^2]; horizontal offsets
        of hook block and load from the suspension point [m per m/s^2]), one row per
        period, ascending.
    """
    cols = lift_response(traj.model, traj.scene, traj.motion).columns
    names = list(cols)
    buf = io.StringIO()
    buf.write(",".join(names) + "\n")
    np.savetxt(buf, np.column_stack([cols[n] for n in names]), delimiter=",", fmt="%.9g")
    return buf.getvalue()


def _room_above_curves(ax, box, peak) -> None:
    """Raise a log y-axis's top so the curves' peak (and its mode number) stays below the text box."""
    renderer = ax.figure.canvas.get_renderer()
    share = box.get_window_extent(renderer).height / ax.get_window_extent(renderer).height
    low, high = ax.get_ylim()
    room = 1.0 - 0.02 - share - 0.1  # the box's top margin, the box, the mode numbers above the peak
    if room > 0.2 and peak > low:
        top = math.exp(math.log(low) + (math.log(peak) - math.log(low)) / room)
        ax.set_ylim(low, max(high, top))


def response_figure(traj, summary, cols=None):
    """response.png: resonance curves of the hoist rope's swing, modes and the moves' rhythms marked.

    A log period axis; the hoist rope's swing per m/s^2 of suspension-point
    acceleration amplitude for each direction (log scale); the static swing of a
    steady push; each mode's period marked and named, its half-power band shaded
    dark and our resonance band light; each rhythm of the scene's repeated moves and
    recorded inputs as a vertical line.  With a sling leg or a rigid load, a lower
    panel gives their angles' response to travel along x.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run.
    summary : swingsim.metrics.Summary
        Its measures (``response_modes``, ``move_rhythms``).
    cols : dict, optional
        The run's time-series columns; unused (the curves are not time series).

    Returns
    -------
    matplotlib.figure.Figure
        The figure.
    """
    lr = lift_response(traj.model, traj.scene, traj.motion)
    d = summary.data if hasattr(summary, "data") else summary
    T = lr.period_s
    others = [b for b in lr.linear.angles if b != "hoist rope"]
    _plt, fig = new_figure(10.0, 6.4 if others else 5.6)
    ax = fig.add_axes([0.08, 0.38 if others else 0.14, 0.88, 0.52 if others else 0.74])
    curves = {dn: lr.columns[column_name("hoist rope", dn)] for dn in lr.directions}
    first = next(iter(curves.values()))
    if all(np.allclose(c, first, rtol=1e-9, atol=0.0) for c in curves.values()):
        # a lift that swings alike in every direction (a symmetric load): one curve
        ax.plot(T, first, color=ROPE, lw=1.6, label="hoist rope, travel in any horizontal direction")
    else:
        for direction, curve in curves.items():
            colour, ls = _DIRECTION_STYLE[direction]
            ax.plot(T, curve, color=colour, ls=ls, lw=1.6, label=f"hoist rope, {_DIRECTION_WORDS[direction]}")
    g = traj.scene.gravity_m_s2
    ax.axhline(math.degrees(1.0 / g), color=GREY, lw=0.9, ls=":",
               label=f"steady push: {math.degrees(1.0 / g):.2f} deg per m/s2 (atan(a/g), small a)")
    ax.set_xscale("log")
    ax.set_yscale("log")
    lines = []
    for m in d.get("response_modes", []):
        lo, hi = m["resonance_band_s"]
        ax.axvspan(lo, min(hi, T[-1]), color=MOVE_BAND, alpha=0.35, lw=0, zorder=0)
        short, long_ = m["half_power_periods_s"]
        if short is not None and long_ is not None:
            ax.axvspan(short, long_, color=MOVE_BAND, alpha=0.9, lw=0, zorder=0)
        ax.axvline(m["period_s"], color=INK, lw=0.8, ls="--")
        at = max(float(np.interp(m["period_s"], T, c)) for c in curves.values())  # the mode's peak
        ax.annotate(f"{m['mode']}", (m["period_s"], at), xytext=(3, 2 + 9 * ((m["mode"] - 1) % 2)),
                    textcoords="offset points", fontsize=8, va="bottom", ha="left", color=INK, weight="bold")
        amp = ("no damping: unbounded" if m["peak_amplification"] is None
               else f"peak x{m['peak_amplification']:.0f} the static swing")
        lines.append(f"{m['mode']}: {m['label']}, {m['period_s']:.2f} s, {amp}")
    for r in d.get("move_rhythms", []):
        hit = " - RESONANCE" if r["resonant_modes"] else ""
        ax.axvline(r["rhythm_s"], color=LIMIT if hit else LOAD, lw=1.6,
                   label=f"{_AXIS_WORDS[r['axis']]} moves repeat every {r['rhythm_s']:.2f} s{hit}")
    ax.set_xlim(T[0], T[-1])
    _plain_log_ticks(ax)
    label_axes(ax, "forcing period [s]", "swing amplitude [deg per m/s2]", "lower right")
    band = 100 * d.get("resonance_band_fraction", 0.15)
    lines.append(f"shaded: half-power band (dark), resonance band (light: at least +-{band:.0f}%, our rule)")
    box = ax.text(0.01, 0.98, "Swing modes\n" + "\n".join(lines), transform=ax.transAxes, fontsize=7.5,
                  va="top", ha="left", color=INK, bbox={"facecolor": "white", "edgecolor": GREY, "alpha": 0.9,
                                                        "pad": 3})
    _room_above_curves(ax, box, max(float(np.max(c)) for c in curves.values()))
    if others:
        ax.set_xlabel("")
        ax2 = fig.add_axes([0.08, 0.1, 0.88, 0.2], sharex=ax)
        for body, colour in zip(others, (LOAD, INK)):
            ax2.plot(T, lr.columns[column_name(body, "x")], color=colour, lw=1.3, label=f"{body}, travel along x")
        ax2.set_yscale("log")
        peak = max(float(np.max(lr.columns[column_name(b, "x")])) for b in others)
        ax2.set_ylim(peak * 1e-4, peak * 2.0)
        _plain_log_ticks(ax2)
        for m in d.get("response_modes", []):
            ax2.axvline(m["period_s"], color=INK, lw=0.8, ls="--")
        label_axes(ax2, "forcing period [s]", "[deg per m/s2]", "upper left")
    title_and_caution(fig, f"{traj.scene.title}: frequency response", summary)
    return fig
