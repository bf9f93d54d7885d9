"""contact.png: tag line pulls against what one person can hold, and the ground's reaction.

A figure function of :data:`swingsim.report.plots.FIGURES`: two time panels, the pull
of each tag line [N] with its ``max_pull_N``, and the load's weight on the ground
[kN, with tonnes-force on the right] with lift-off and touch-down marked.  None for a
run without tag lines or ground.
"""

from __future__ import annotations

from swingsim.constants import STANDARD_GRAVITY_M_S2, newton_to_tonnes_force
from swingsim.report.style import GREY, INK, LIMIT, LOAD, ROPE, label_axes, new_figure, shade_moves, title_and_caution
from swingsim.report.tables import timeseries_columns

#: Colours of successive tag lines.
LINE_COLOURS = (ROPE, LOAD, "#4d8f2a", "#7a4fa3")


def contact_figure(traj, summary, cols=None):
    """The tag lines' pulls and the ground's reaction over time (None without either).

    Parameters
    ----------
    traj : Trajectory
        The run.
    summary : Summary
        Its measures (lift-off, touch-down, each line's limit).
    cols : dict, optional
        The run's time-series columns (sampled here when None).

    Returns
    -------
    matplotlib.figure.Figure or None
        The figure with its title and the caution line.
    """
    scene = traj.scene
    lines = getattr(scene, "tag_lines", ())
    ground = getattr(scene, "ground", None)
    if not lines and ground is None:
        return None
    c = timeseries_columns(traj) if cols is None else cols
    d = summary.data
    t = c["t_s"]
    panels = [p for p in ("lines", "ground") if (p == "lines" and lines) or (p == "ground" and ground is not None)]
    _plt, fig = new_figure(10.0, 3.2 + 2.4 * len(panels))
    height = 0.72 / len(panels)
    axes = {}
    for k, name in enumerate(panels):
        axes[name] = fig.add_axes([0.08, 0.12 + (len(panels) - 1 - k) * (height + 0.04), 0.80, height - 0.04])
    if "lines" in axes:
        ax = axes["lines"]
        for j, line in enumerate(lines):
            col = LINE_COLOURS[j % len(LINE_COLOURS)]
            key = f"tag_line_{j + 1}_N"
            if key in c:
                ax.plot(t, c[key], color=col, lw=1.5, label=f"{line.name(j)}")
            ax.axhline(line.max_pull_N, color=col, lw=1.0, ls="-.",
                       label=f"one person holds {line.max_pull_N:.0f} N" if j == 0 or
                       line.max_pull_N != lines[0].max_pull_N else None)
        shade_moves(ax, scene, traj.motion)
        label_axes(ax, "time [s]" if "ground" not in axes else "", "tag line pull [N]", "upper right")
    if "ground" in axes:
        ax = axes["ground"]
        if "ground_reaction_kN" in c:
            ax.plot(t, c["ground_reaction_kN"], color=INK, lw=1.5, label="load's weight on the ground")
        if "ground_friction_kN" in c:
            ax.plot(t, c["ground_friction_kN"], color=GREY, lw=1.0, ls="--", label="friction")
        for key, word in (("liftoff_time_s", "lift-off"), ("touchdown_time_s", "touch-down")):
            if d.get(key) is not None:
                ax.axvline(d[key], color=LIMIT, lw=1.0, ls=":")
                ax.text(d[key], 0.5 * ax.get_ylim()[1], f" {word} {d[key]:.1f} s", color=LIMIT, fontsize=8,
                        va="center", ha="right" if key == "touchdown_time_s" else "left")
        shade_moves(ax, scene, traj.motion)
        label_axes(ax, "time [s]", "force [kN]", "center")
        right = ax.secondary_yaxis("right", functions=(lambda kN: newton_to_tonnes_force(kN * 1e3),
                                                       lambda tf: tf * STANDARD_GRAVITY_M_S2))
        right.set_ylabel("[t]")
    title_and_caution(fig, f"{scene.title}: tag lines and the ground (shaded: moves)", summary)
    return fig
