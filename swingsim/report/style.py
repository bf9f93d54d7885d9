"""The plots' shared look: the project's own plain palette (legible on a projector), figures and captions.

Every figure carries the caution line; a run that stopped early says so in its corner.
"""

from __future__ import annotations

from swingsim.metrics import cautions

INK = "#1d2731"
ROPE = "#0b6e99"
LOAD = "#c8553d"
MOVE_BAND = "#f2d0a4"
LIMIT = "#8a1c1c"
GREY = "#8c959f"
ENVELOPE = "#d6e6ef"


def literal_text():
    """A matplotlib rc context in which text is drawn literally (``$`` is not read as maths).

    Titles, move labels and zone names are user text: ``$x^$`` must print as it
    is, not crash the maths parser.  Every figure of the project is created and
    saved inside this context.

    Returns
    -------
    contextlib.AbstractContextManager
        ``matplotlib.rc_context`` with ``text.parse_math`` off.
    """
    import matplotlib

    return matplotlib.rc_context({"text.parse_math": False})


def new_figure(width_in: float = 10.0, height_in: float = 5.6):
    """A matplotlib figure on the Agg backend (no display needed); saved at :data:`swingsim.report.plots.PNG_DPI`.

    Parameters
    ----------
    width_in, height_in : float
        Figure size [in].

    Returns
    -------
    tuple
        ``(pyplot, figure)``.
    """
    import matplotlib

    matplotlib.use("Agg", force=True)
    import matplotlib.pyplot as plt

    fig = plt.figure(figsize=(width_in, height_in), dpi=110)
    return plt, fig


def title_and_caution(fig, title: str, summary=None) -> None:
    """Write the title at the top left, the caution at the bottom, and a flag when the result is invalid.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure.
    title : str
        Its title.
    summary : swingsim.metrics.Summary or dict, optional
        The run's measures: when ``valid`` is false, the top right says where the run stopped.
    """
    fig.text(0.01, 0.985, title, ha="left", va="top", fontsize=11, weight="bold", color=INK)
    if summary is not None and not summary.get("valid", True):
        fig.text(0.99, 0.985, f"RESULT INVALID: the run stopped at t = {summary['simulated_until_s']:.2f} s",
                 ha="right", va="top", fontsize=10, weight="bold", color="white",
                 bbox={"facecolor": LIMIT, "edgecolor": LIMIT, "pad": 3})
    fig.text(0.5, 0.008, cautions.CAUTION_SHORT, ha="center", va="bottom", fontsize=7.5, color=LIMIT)


def label_axes(ax, xlabel: str, ylabel: str, legend_loc: str) -> None:
    """Name both axes, draw the light grid and the legend, as every plot does.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes with their data drawn (the legend lists their labelled artists).
    xlabel, ylabel : str
        Axis names, units in brackets, e.g. ``"time [s]"``.
    legend_loc : str
        Where matplotlib puts the legend, e.g. ``"upper right"`` or ``"best"``.
    """
    ax.set_xlabel(xlabel)
    ax.set_ylabel(ylabel)
    ax.grid(alpha=0.3)
    ax.legend(fontsize=8, loc=legend_loc, framealpha=0.9)


def shade_moves(ax, scene, motion) -> None:
    """Shade each move's time span on a time axis and name it at the top.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        Axes with time [s] along x (draw the data first: the names go at its top).
    scene : swingsim.scene.Scene
        The scene (the moves' names).
    motion : swingsim.motion.Motion
        The motion (each move's start and end [s]).
    """
    ymin, ymax = ax.get_ylim()
    x0, x1 = ax.get_xlim()
    starts = []  # label starts so far, one per text row: a name that would run into one goes a row lower
    rows = []
    for (_axis, prof), _move in zip(motion.moves, scene.moves):
        row = next((i for i, s in enumerate(starts) if prof.start_s - s > 0.2 * (x1 - x0)), len(starts))
        starts[row:row + 1] = [prof.start_s]
        rows.append(row)
    if rows:  # room above the data for the rows of names (in points of the axes' height), so no
        # name sits on a curve or on the axes' top edge
        fig = ax.figure
        height_pt = ax.get_position().height * fig.get_size_inches()[1] * 72.0
        share = min(0.45, (MOVE_ROW_PT * (max(rows) + 1) + 2 * MOVE_PAD_PT) / height_pt)
        ymax = ymin + (ymax - ymin) / (1.0 - share)
        ax.set_ylim(ymin, ymax)
    for ((_axis, prof), m), row in zip(zip(motion.moves, scene.moves), rows):
        ax.axvspan(prof.start_s, prof.end_s, color=MOVE_BAND, alpha=0.45, lw=0, zorder=0)
        ax.annotate(m.name, (prof.start_s, ymax), xytext=(2, -MOVE_PAD_PT - MOVE_ROW_PT * row),
                    textcoords="offset points", fontsize=7.5, va="top", ha="left", color=INK,
                    annotation_clip=True)


#: A row of move names [pt] (7.5 pt text with its leading) and the gap under the axes' top edge [pt].
MOVE_ROW_PT, MOVE_PAD_PT = 10.0, 3.0
