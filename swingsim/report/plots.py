"""Plots of one run (PNG or SVG): swing over time, speeds, plan view of the load path, sling legs, the chart.

Each function draws and returns the figure; :func:`write_plots` saves them
atomically.  Every figure carries the caution line.
"""

from __future__ import annotations

import io

import numpy as np

from swingsim.io.files import atomic_write_bytes
from swingsim.report.plots_chart import chart_figure
from swingsim.report.plots_contact import contact_figure
from swingsim.report.plots_response import response_figure
from swingsim.report.plots_rigging import rigging_figure
from swingsim.report.style import (ENVELOPE, GREY, INK, LIMIT, LOAD, ROPE, label_axes, literal_text, new_figure,
                                   shade_moves, title_and_caution)
from swingsim.report.tables import timeseries_columns

#: Colour of the wind on the time plots (apart from the rope's blue).
WIND = "#4d8f2a"
from swingsim.scene.site import wind_words


def _time_plot(traj, cols):
    """A figure with one time axis, and the run's columns (sampled here when ``cols`` is None)."""
    columns = timeseries_columns(traj) if cols is None else cols
    _plt, fig = new_figure()
    ax = fig.add_axes([0.08, 0.14, 0.88, 0.70])  # the legend goes above the axes, off the curves
    return fig, ax, columns


def _legend_above(ax, twin=None) -> None:
    """The legend in rows above the axes (never over a curve), with a twin axis's lines too."""
    handles, labels = ax.get_legend_handles_labels()
    if twin is not None:
        more = twin.get_legend_handles_labels()
        handles, labels = handles + more[0], labels + more[1]
    ax.legend(handles, labels, loc="lower left", bbox_to_anchor=(0.0, 1.01), ncol=min(3, len(labels)),
              fontsize=8, frameon=False, borderaxespad=0.0, columnspacing=1.5)


def _swing_figure(traj, summary, cols=None):
    """swing.png: the rope angle over time (a figure function of :data:`FIGURES`).

    The angle from vertical and its projections on x-z and y-z, the caution
    angle, the peak, when it settles, and the moves shaded.
    """
    scene = traj.scene
    fig, ax, c = _time_plot(traj, cols)
    t = c["t_s"]
    ax.plot(t, c["rope_angle_deg"], color=ROPE, lw=1.8, label="rope angle from vertical")
    ax.plot(t, c["rope_angle_xz_deg"], color=GREY, lw=0.9, ls="--", label="projected on x-z")
    ax.plot(t, c["rope_angle_yz_deg"], color=GREY, lw=0.9, ls=":", label="projected on y-z")
    d = summary.data
    lim = scene.limits
    ax.axhline(lim.swing_caution_deg, color=LIMIT, lw=1, ls="-.", label=f"caution angle {lim.swing_caution_deg:g} deg")
    ax.axhline(-lim.swing_caution_deg, color=LIMIT, lw=1, ls="-.")
    ax.set_ylim(min(ax.get_ylim()[0], -1.0), max(ax.get_ylim()[1], 1.0) * 1.15)
    shade_moves(ax, scene, traj.motion)
    ax.plot([d["peak_rope_angle_time_s"]], [d["peak_rope_angle_deg"]], "v", color=LOAD, ms=8,
            label=f"peak {d['peak_rope_angle_deg']:.1f} deg")
    if d["settled_at_s"] is not None and d["moves"]:
        ax.axvline(d["settled_at_s"], color=INK, lw=1, ls=":")
        ax.text(d["settled_at_s"], ax.get_ylim()[0], f" settled < {lim.settle_deg:g} deg", fontsize=8,
                va="bottom", color=INK)
    label_axes(ax, "time [s]", "angle [deg]", "lower right")
    _legend_above(ax, _wind_axis(ax, c, d))
    title_and_caution(fig, f"{scene.title}: swing angle (shaded: moves)", summary)
    return fig


def _wind_axis(ax, c, d):
    """The wind speed at the load on a right-hand axis, with the in-service limit, when the wind varies.

    Returns the right-hand axes (None in a steady wind).
    """
    if not d.get("wind_varies"):
        return None
    fig = ax.figure
    pos = ax.get_position()
    ax.set_position([pos.x0, pos.y0, pos.width - 0.04, pos.height])
    wax = ax.twinx()
    wax.plot(c["t_s"], c["wind_speed_m_s"], color=WIND, lw=0.9, alpha=0.85, label="wind speed at the load")
    wax.axhline(d["wind_limit_m_s"], color=WIND, lw=1, ls="--")
    top = max(float(np.max(c["wind_speed_m_s"])), d["wind_limit_m_s"]) * 1.1
    wax.set_ylim(0.0, top)
    wax.text(c["t_s"][0], d["wind_limit_m_s"], f" in-service wind limit {d['wind_limit_m_s']:g} m/s",
             color=WIND, fontsize=8, va="bottom")
    wax.set_ylabel("wind speed at the load [m/s]", color=WIND)
    wax.tick_params(axis="y", colors=WIND)
    fig.sca(ax)
    return wax


def _speed_figure(traj, summary, cols=None):
    """speed.png: the suspension point's horizontal speed, the load's speed and the hoist speed over time.

    A figure function of :data:`FIGURES`.
    """
    scene = traj.scene
    fig, ax, c = _time_plot(traj, cols)
    t = c["t_s"]
    ax.plot(t, c["suspension_speed_m_s"], color=INK, lw=1.8, label="suspension point, horizontal")
    ax.plot(t, c["load_speed_m_s"], color=LOAD, lw=1.2, label="load")
    if np.any(np.abs(c["hoist_speed_m_s"]) > 1e-9):
        ax.plot(t, c["hoist_speed_m_s"], color=ROPE, lw=1.2, ls="--", label="hoist (+ raising)")
    shade_moves(ax, scene, traj.motion)
    label_axes(ax, "time [s]", "speed [m/s]", "upper right")
    _legend_above(ax)
    title_and_caution(fig, f"{scene.title}: speeds", summary)
    return fig


def _plan_figure(traj, summary, cols=None):
    """plan.png: the load's path in plan, and its offset from the plumb line (a figure function of :data:`FIGURES`).

    Left: the suspension point's and the load's paths, the swing envelope, the
    zones with their margins, and a slewing crane's slew axis and radius limits;
    right: the load relative to the point below the
    suspension point, with the peak excursion and the clearance limit.
    """
    from matplotlib.patches import Circle, Rectangle

    scene = traj.scene
    c = timeseries_columns(traj) if cols is None else cols
    _plt, fig = new_figure(11.0, 5.8)
    ax1 = fig.add_axes([0.06, 0.12, 0.42, 0.76])
    ax2 = fig.add_axes([0.56, 0.12, 0.40, 0.76])
    sx, sy = c["suspension_x_m"], c["suspension_y_m"]
    lx, ly = c["load_x_m"], c["load_y_m"]
    ex = summary["peak_excursion_m"]
    ax1.plot(sx, sy, color=INK, lw=2.0, label="suspension point")
    ax1.plot(lx, ly, color=LOAD, lw=1.0, label="load")
    # swing envelope: the band the load can occupy around the suspension path
    step = max(1, len(sx) // 150)
    for x, y in zip(sx[::step], sy[::step]):
        ax1.add_patch(Circle((x, y), ex, facecolor=ENVELOPE, edgecolor="none", lw=0, zorder=0))
    ax1.plot(lx[0], ly[0], "o", color=LOAD, ms=6)
    labels = []  # (zone label, its dashed margin box): placed once the plan's scale is set
    ax1.plot(lx[-1], ly[-1], "s", color=LOAD, ms=6)
    for z, verdict in zip(scene.zones, summary["zones"]):
        col = LIMIT if z.kind == "exclusion" else GREY
        entered = verdict["entered"]
        ax1.add_patch(Rectangle(z.min_m[:2], z.max_m[0] - z.min_m[0], z.max_m[1] - z.min_m[1],
                                facecolor=col, alpha=0.45 if entered else 0.25, edgecolor=col,
                                hatch="xx" if entered else None, lw=1.6 if entered else 1.0))
        ax1.add_patch(Rectangle((z.min_m[0] - z.margin_m, z.min_m[1] - z.margin_m),
                                z.max_m[0] - z.min_m[0] + 2 * z.margin_m,
                                z.max_m[1] - z.min_m[1] + 2 * z.margin_m,
                                fill=False, edgecolor=col, ls="--", lw=0.8))
        # the summary's own verdict, word for word
        state = ("ENTERED by " + ", ".join(verdict["entered_by"]) if entered
                 else "inside margin" if verdict["within_margin"] else "clear")
        margin_box = (z.min_m[0] - z.margin_m, z.min_m[1] - z.margin_m, z.max_m[0] + z.margin_m,
                      z.max_m[1] + z.margin_m)
        labels.append((ax1.text(0.0, 0.0, f"{z.name} [{state}]", fontsize=7.5, color=col,
                                fontweight="bold" if entered else "normal"), margin_box))
    _crane_reach(ax1, scene.crane)
    ax1.set_aspect("equal", adjustable="datalim")
    label_axes(ax1, "x [m]", "y [m]", "best")
    place_box_labels(ax1, labels)
    ax1.set_title("plan view (blue band: swing envelope)", fontsize=9)
    _site_arrows(fig, scene)
    dx, dy = lx - sx, ly - sy
    ax2.plot(dx, dy, color=LOAD, lw=0.9)
    ax2.add_patch(Circle((0, 0), ex, fill=False, color=ROPE, lw=1.5, label=f"peak excursion {ex:.2f} m"))
    if scene.limits.clearance_m is not None:
        ax2.add_patch(Circle((0, 0), scene.limits.clearance_m, fill=False, color=LIMIT, lw=1.2, ls="--",
                             label=f"clearance {scene.limits.clearance_m:g} m"))
    ax2.plot([0], [0], "+", color=INK, ms=10)
    r = max(ex, scene.limits.clearance_m or 0.0, 0.05) * 1.2
    ax2.set_xlim(-r, r)
    ax2.set_ylim(-r, r)
    ax2.set_aspect("equal")
    label_axes(ax2, "x offset from plumb line [m]", "y offset [m]", "upper right")
    ax2.set_title("load relative to the point below the suspension point", fontsize=9)
    title_and_caution(fig, f"{scene.title}: load path", summary)
    return fig


def place_box_labels(ax, labels, pad_pt: float = 3.0) -> None:
    """Put each label beside its box, clear of the box's outline, the axes' edges and the other labels.

    Tries above the box (left-aligned, then right-aligned), then below it, then the same
    on two lines (the name, then the bracketed state); the first place that lies wholly
    inside the axes and apart from the labels placed so far is kept, else the last is.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes with their limits and aspect set.
    labels : list of tuple
        ``(text artist, (x0, y0, x1, y1))``: the label and the box it names [data units].
    pad_pt : float
        Gap between the box's outline and the label [pt].
    """
    from matplotlib.transforms import ScaledTranslation

    fig = ax.figure
    renderer = fig.canvas.get_renderer()
    ax.apply_aspect()
    frame = ax.get_window_extent(renderer)
    placed = []
    for text, (x0, y0, x1, y1) in labels:
        words = text.get_text()
        name, _, state = words.rpartition(" [")
        variants = [words] + ([f"{name}\n[{state}"] if name else [])
        chosen = None
        for content in variants:
            for x, y, ha, va, dy in ((x0, y1, "left", "bottom", pad_pt), (x1, y1, "right", "bottom", pad_pt),
                                     (x0, y0, "left", "top", -pad_pt), (x1, y0, "right", "top", -pad_pt)):
                text.set_text(content)
                text.set_position((x, y))
                text.set_ha(ha)
                text.set_va(va)
                text.set_transform(ax.transData + ScaledTranslation(0.0, dy / 72.0, fig.dpi_scale_trans))
                box = text.get_window_extent(renderer)
                if chosen is None:
                    chosen = (content, x, y, ha, va, dy)
                gap = 2.0 * pad_pt * fig.dpi / 72.0  # kept well off the axes' edges too
                inside = (box.x0 >= frame.x0 + gap and box.x1 <= frame.x1 - gap and box.y0 >= frame.y0 + gap
                          and box.y1 <= frame.y1 - gap)
                if inside and not any(box.overlaps(other) for other in placed):
                    chosen = (content, x, y, ha, va, dy)
                    break
            else:
                continue
            break
        content, x, y, ha, va, dy = chosen
        text.set_text(content)
        text.set_position((x, y))
        text.set_ha(ha)
        text.set_va(va)
        text.set_transform(ax.transData + ScaledTranslation(0.0, dy / 72.0, fig.dpi_scale_trans))
        text.set_clip_on(True)
        placed.append(text.get_window_extent(renderer))


def _site_arrows(fig, scene) -> None:
    """A north arrow and, with wind, an arrow the way the wind blows, in the figure's top right corner.

    Drawn with equal scales in plan like the plan view, so the arrows point as on
    site: north at ``site.north_deg`` from +x, the wind toward ``wind.direction_deg``.
    """
    strip = fig.add_axes([0.62, 0.915, 0.37, 0.08])
    strip.set_xlim(0.0, 8.0)
    strip.set_ylim(-0.55, 0.55)
    strip.set_aspect("equal", adjustable="box", anchor="E")
    strip.axis("off")

    def arrow(x, angle_deg, colour, width):
        a = np.radians(angle_deg)
        dx, dy = 0.45 * np.cos(a), 0.45 * np.sin(a)
        strip.annotate("", xy=(x + dx, dy), xytext=(x - dx, -dy),
                       arrowprops={"arrowstyle": "-|>", "color": colour, "lw": width, "mutation_scale": 10})

    if scene.wind.speed_m_s > 0.0:
        strip.text(1.9, 0.0, f"wind {scene.wind.speed_m_s:g} m/s {wind_words(scene)}", ha="right",
                   va="center", fontsize=8, color=ROPE)
        arrow(2.5, scene.wind.direction_deg, ROPE, 2.2)
    arrow(7.2, scene.site.north_deg, INK, 1.6)
    strip.text(6.6, 0.0, "site north", ha="right", va="center", fontsize=8, color=INK)


def _crane_reach(ax, crane):
    """A slewing crane's slew axis and its radius limits (circles about the slew centre).

    The circles are added as plain artists, which do not count toward the data limits,
    so the plan keeps its scale on the lift itself; where a circle crosses the view it is
    labelled with its radius.
    """
    from matplotlib.patches import Circle

    if not crane.slewing:
        return
    cx, cy = crane.slew_center_m
    ax.plot([cx], [cy], "+", color=GREY, ms=12, mew=1.5, label="slew axis")
    for radius, name in ((crane.min_radius_m, "min"), (crane.max_radius_m, "max")):
        if radius:
            ax.add_artist(Circle((cx, cy), radius, fill=False, edgecolor=GREY, ls=":", lw=1.0,
                                 transform=ax.transData, clip_on=True))
            ax.annotate(f"{name} radius {radius:g} m", (cx, cy + radius), fontsize=7, color=GREY,
                        ha="center", va="bottom", annotation_clip=True)


#: File name -> figure function ``fn(traj, summary, cols=None)``: given the run
#: (:class:`swingsim.simulation.Trajectory`), its measures (:class:`swingsim.metrics.Summary`)
#: and its time-series columns (:func:`swingsim.report.tables.timeseries_columns`, sampled
#: once for all plots; by the function itself when None), it returns the matplotlib figure
#: with its title and the caution line, or None when the run's model has nothing to show
#: (rigging.png, :func:`swingsim.report.plots_rigging.rigging_figure`, needs sling legs;
#: chart.png, :func:`swingsim.report.plots_chart.chart_figure`, needs ``crane.chart_file``;
#: contact.png, :func:`swingsim.report.plots_contact.contact_figure`, needs tag lines or ``[ground]``).
FIGURES = {"swing.png": _swing_figure, "speed.png": _speed_figure, "plan.png": _plan_figure,
           "rigging.png": rigging_figure, "chart.png": chart_figure, "response.png": response_figure,
           "contact.png": contact_figure}


#: The plot formats ``--plots`` offers: raster for screens and slides, vector for print.
PLOT_FORMATS = ("png", "svg")

#: Resolution of the PNG plots [dots per inch]: sharp on a projector and in print.
PNG_DPI = 150


def draw_figures(traj, summary, cols=None) -> dict:
    """Draw every figure of :data:`FIGURES` the run's model has (titles and names as literal text).

    Parameters
    ----------
    traj, summary
        The run and its measures, as for :func:`write_plots`.
    cols : dict, optional
        The run's time-series columns, sampled once for all plots.

    Returns
    -------
    dict
        Base name (``"swing"``, ``"plan"``, ...) -> matplotlib figure; the caller closes them.
    """
    figures = {}
    for name, fn in FIGURES.items():
        with literal_text():  # titles, move and zone names are user text: no maths parsing
            fig = fn(traj, summary, cols)
        if fig is not None:  # None: a figure the run's model has nothing for
            figures[name.rsplit(".", 1)[0]] = fig
    return figures


def figure_bytes(fig, fmt: str) -> bytes:
    """A figure as PNG or SVG bytes, with no time stamp or software tag (same run, same bytes).

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure.
    fmt : {"png", "svg"}
        The format; PNG at :data:`PNG_DPI`, SVG with text kept as text.

    Returns
    -------
    bytes
        The file's content.
    """
    buf = io.BytesIO()
    with literal_text():
        if fmt == "svg":
            import matplotlib

            with matplotlib.rc_context({"svg.fonttype": "none", "svg.hashsalt": "swingsim"}):
                fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None})
        else:
            fig.savefig(buf, format="png", dpi=PNG_DPI, metadata={"Software": None})
    return buf.getvalue()


def write_plots(traj, summary, out_dir, cols=None, formats=("png",)) -> list:
    """Draw every figure of :data:`FIGURES` that the run's model has, and save each atomically.

    Parameters
    ----------
    traj, summary, out_dir
        The run, its measures and the folder, as for
        :func:`swingsim.report.outputs.write_run_outputs`, which calls this.
    cols : dict, optional
        The run's time-series columns, sampled once for all plots.
    formats : tuple of str
        Formats of :data:`PLOT_FORMATS` to write (``("png",)``, ``("svg",)`` or both).

    Returns
    -------
    list of pathlib.Path
        The files written.
    """
    from pathlib import Path

    import matplotlib.pyplot as plt

    paths = []
    for stem, fig in draw_figures(traj, summary, cols).items():
        try:
            contents = {fmt: figure_bytes(fig, fmt) for fmt in formats}
        finally:
            plt.close(fig)
        for fmt, data in contents.items():
            paths.append(atomic_write_bytes(Path(out_dir) / f"{stem}.{fmt}", data))
    return paths
