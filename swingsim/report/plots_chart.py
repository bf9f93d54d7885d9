"""chart.png: the lift against the crane's rated capacity chart.

Drawn only when the scene gives ``crane.chart_file`` (the ``chart_*`` columns of
:func:`swingsim.report.tables.timeseries_columns`).
"""

from __future__ import annotations

import numpy as np

from swingsim.report.style import GREY, INK, LIMIT, LOAD, ROPE, label_axes, new_figure, shade_moves, title_and_caution
from swingsim.report.tables import timeseries_columns


def chart_figure(traj, summary, cols=None):
    """chart.png: utilisation over time (left) and the lift's path on the chart (right).

    Left: the dynamic utilisation (hook load that counts against the chart over the
    capacity at the radius that gives the lowest one) and the static one (the load
    hanging plumb), with the review, close-to-chart and 100% lines and the moves
    shaded.  Right: the chart (capacity against radius, its listed points marked,
    its review and close-to-chart fractions dashed) and the lift's path: the
    counted hook load, as a mass, against the governing radius.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run.
    summary : swingsim.metrics.Summary
        Its measures (the chart keys of :func:`swingsim.metrics.chart.chart_metrics`).
    cols : dict, optional
        The run's time-series columns, sampled once for all plots; sampled here when None.

    Returns
    -------
    matplotlib.figure.Figure or None
        The figure, or None when the scene has no chart.
    """
    c = timeseries_columns(traj) if cols is None else cols
    if "chart_utilisation_pct" not in c:
        return None
    scene = traj.scene
    chart = scene.crane.chart
    d = summary.data
    lim = scene.limits
    t = c["t_s"]
    _plt, fig = new_figure(11.0, 5.8)
    ax1 = fig.add_axes([0.06, 0.12, 0.44, 0.76])
    ax2 = fig.add_axes([0.57, 0.12, 0.40, 0.76])
    ax1.plot(t, c["chart_utilisation_pct"], color=LOAD, lw=1.6, label="swinging (hook load at the governing radius)")
    ax1.plot(t, c["chart_static_utilisation_pct"], color=INK, lw=1.0, ls="--", label="load hanging plumb")
    for pct, style, name in ((lim.chart_review_pct, ":", "extra review"), (lim.chart_limit_pct, "-.", "close to chart"),
                             (100.0, "-", "chart")):
        ax1.axhline(pct, color=LIMIT, lw=1.0, ls=style, label=f"{pct:g}% {name}")
    ax1.set_ylim(0.0, max(110.0, 1.08 * float(np.nanmax(c["chart_utilisation_pct"]))))
    shade_moves(ax1, scene, traj.motion)
    ax1.plot([d["peak_utilisation_time_s"]], [d["peak_utilisation_pct"]], "v", color=LOAD, ms=8,
             label=f"peak {d['peak_utilisation_pct']:.1f}%")
    label_axes(ax1, "time [s]", "utilisation of the chart [%]", "lower right")
    ax1.set_title("utilisation over the lift", fontsize=9)

    radius = np.linspace(chart.radius_m[0], chart.radius_m[-1], 400)
    capacity = chart.capacity_at(radius)
    ax2.plot(radius, capacity, color=ROPE, lw=1.8, label="rated capacity (chart)")
    ax2.plot(chart.radius_m, chart.capacity_kg, "o", color=ROPE, ms=3.5)
    ax2.plot(radius, capacity * lim.chart_limit_pct / 100.0, color=LIMIT, lw=0.9, ls="-.",
             label=f"{lim.chart_limit_pct:g}% of the chart")
    ax2.plot(radius, capacity * lim.chart_review_pct / 100.0, color=LIMIT, lw=0.9, ls=":",
             label=f"{lim.chart_review_pct:g}% of the chart")
    as_mass = c["chart_capacity_kg"] * c["chart_utilisation_pct"] / 100.0
    on_chart = np.isfinite(c["chart_capacity_kg"])
    ax2.plot(c["chart_radius_m"][on_chart], as_mass[on_chart], color=LOAD, lw=1.0,
             label="the lift (hook load as mass)")
    ax2.plot([d["chart_radius_at_peak_m"]], [d["chart_capacity_at_peak_kg"] - d["chart_margin_kg"]], "v",
             color=LOAD, ms=8, label=f"peak {d['peak_utilisation_pct']:.1f}%")
    ax2.set_ylim(0.0, 1.1 * max(chart.capacity_kg))
    ax2.text(0.01, 0.01, f"chart: {d['chart_file']}", transform=ax2.transAxes, ha="left", va="bottom",
             fontsize=7.5, color=GREY)
    label_axes(ax2, "radius from the slew axis [m]", "capacity [kg]", "upper right")
    ax2.set_title("the lift on the chart (linear between listed radii, never beyond)", fontsize=9)
    title_and_caution(fig, f"{scene.title}: against the rated capacity chart", summary)
    return fig
