"""move<N>-plan.png: plan-move's chosen profile against the unshaped move, and their residual swing.

Left, stacked: position, speed and acceleration against time from the move's
start (the speed reference as written, and the unshaped move for comparison).
Right: the residual swing across the rope range for both, with the bound; a log
axis when the values span more than a decade.
"""

from __future__ import annotations

import io
import math
from typing import NamedTuple

import numpy as np

from swingsim.report.style import GREY, INK, LIMIT, LOAD, ROPE, label_axes, literal_text, new_figure, \
    title_and_caution

__all__ = ["PlanCurves", "plan_figure", "plan_figure_png", "LOG_FLOOR_DEG"]

#: Residual swings below this are drawn at it on a log axis [deg] (numerically zero).
LOG_FLOOR_DEG = 1e-4


class PlanCurves(NamedTuple):
    """What the plan figure draws (units as the speed reference: m or deg, and s)."""

    #: Planned move: times from the move's start [s], position [m or deg], speed [/s], acceleration [/s^2].
    t_s: np.ndarray
    position: np.ndarray
    speed: np.ndarray
    accel: np.ndarray
    #: The unshaped move, the same columns.
    unshaped_t_s: np.ndarray
    unshaped_position: np.ndarray
    unshaped_speed: np.ndarray
    unshaped_accel: np.ndarray
    #: ``"m"``, or ``"deg"`` for slew.
    unit: str
    #: Rope lengths at the move's start [m].
    rope_lengths_m: list
    #: Residual swing of the plan at each length [deg] (None where not measured).
    residual_deg: list
    #: Residual swing of the unshaped move at each length [deg].
    unshaped_residual_deg: list
    #: The bound [deg].
    bound_deg: float


def _values(xs):
    return np.array([math.nan if x is None else float(x) for x in xs])


def plan_figure(c: PlanCurves, title: str, subtitle: str):
    """The plan figure (see the module docstring).

    Parameters
    ----------
    c : PlanCurves
        The curves.
    title : str
        Figure title.
    subtitle : str
        The plan in words, under the title.

    Returns
    -------
    matplotlib.figure.Figure
        The figure (Agg backend).
    """
    from matplotlib.ticker import FuncFormatter

    plt, fig = new_figure(12.0, 6.8)
    grid = fig.add_gridspec(3, 2, left=0.07, right=0.98, top=0.86, bottom=0.1, hspace=0.12, wspace=0.3,
                            width_ratios=(1.2, 1.0))
    u = c.unit
    rows = (("position", f"position [{u}]", c.position, c.unshaped_position),
            ("speed", f"speed [{u}/s]", c.speed, c.unshaped_speed),
            ("accel", f"acceleration [{u}/s^2]", c.accel, c.unshaped_accel))
    first = None
    for i, (_key, label, planned, plain) in enumerate(rows):
        ax = fig.add_subplot(grid[i, 0], sharex=first)
        first = first or ax
        ax.plot(c.unshaped_t_s, plain, color=GREY, lw=1.2, ls="--", label="unshaped move")
        ax.plot(c.t_s, planned, color=ROPE, lw=1.6, label="planned move")
        if i < 2:
            ax.tick_params(labelbottom=False)
        label_axes(ax, "time from the move's start [s]" if i == 2 else "", label,
                   "lower right" if i == 0 else "upper right")
    ax = fig.add_subplot(grid[:, 1])
    L = np.asarray(c.rope_lengths_m, dtype=float)
    r_plan, r_plain = _values(c.residual_deg), _values(c.unshaped_residual_deg)
    both = np.concatenate([r_plan, r_plain, [c.bound_deg]])
    both = both[np.isfinite(both) & (both > 0)]
    log = both.size > 0 and np.max(both) / max(np.min(both), LOG_FLOOR_DEG) > 10.0
    if log:
        r_plan, r_plain = np.maximum(r_plan, LOG_FLOOR_DEG), np.maximum(r_plain, LOG_FLOOR_DEG)
        ax.set_yscale("log")
        # plain numbers (0.01, 0.1, 1): the figures draw text literally, without maths
        ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _pos: f"{v:g}"))
    ax.plot(L, r_plain, color=GREY, lw=1.2, ls="--", marker="o", ms=3, label="unshaped move")
    ax.plot(L, r_plan, color=ROPE, lw=1.6, marker="o", ms=3, label="planned move")
    ax.axhline(c.bound_deg, color=LIMIT, lw=1.0, ls=":", label=f"bound {c.bound_deg:g} deg")
    label_axes(ax, "rope length at the move's start [m]", "residual swing after the move [deg]"
               + (" (log scale)" if log else ""), "best")
    ax.set_title("residual swing across the rope range", fontsize=9, color=INK)
    title_and_caution(fig, title)
    fig.text(0.01, 0.945, subtitle, ha="left", va="top", fontsize=8.5, color=LOAD, wrap=True)
    return fig


def plan_figure_png(c: PlanCurves, title: str, subtitle: str) -> bytes:
    """The plan figure as PNG bytes (text drawn literally, no timestamp in the file).

    Parameters
    ----------
    c : PlanCurves
        The curves.
    title : str
        Figure title.
    subtitle : str
        The plan in words.

    Returns
    -------
    bytes
        The PNG.
    """
    with literal_text():
        fig = plan_figure(c, title, subtitle)
        buf = io.BytesIO()
        fig.savefig(buf, format="png", metadata={"Software": None})
        import matplotlib.pyplot as plt

        plt.close(fig)
    return buf.getvalue()
