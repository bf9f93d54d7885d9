"""rigging.png: sling leg tensions against their limits, and the load's tilt or the hook's whip.

Drawn only for the hook-and-load models (``leg_tension_N`` in the outputs).
"""

from __future__ import annotations

import numpy as np

from swingsim.constants import STANDARD_GRAVITY_M_S2, newton_to_tonnes_force
from swingsim.report.style import GREY, INK, LIMIT, LOAD, ROPE, new_figure, shade_moves, title_and_caution
from swingsim.report.tables import timeseries_columns

LEG_COLOURS = ["#0b6e99", "#c8553d", "#4f7d3a", "#7a4f9a", "#b8860b", "#2f4f4f"]


def _kN_to_t(force_kN):
    """The tonnes axis of a kN axis (tonnes-force, standard gravity)."""
    return newton_to_tonnes_force(1e3 * np.asarray(force_kN, dtype=float))


def _t_to_kN(force_t):
    """The kN axis of a tonnes axis."""
    return np.asarray(force_t, dtype=float) * STANDARD_GRAVITY_M_S2


def rigging_figure(traj, summary, cols=None):
    """rigging.png: leg tensions (top) and the load's tilt, or the leg's angle to the rope (bottom).

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run.
    summary : swingsim.metrics.Summary
        Its measures (hanging leg tensions, declared limits).
    cols : dict, optional
        The run's time-series columns (:func:`swingsim.report.tables.timeseries_columns`),
        sampled once for all plots; sampled here when None.

    Returns
    -------
    matplotlib.figure.Figure or None
        The figure, or None when the model has no sling legs.
    """
    c = timeseries_columns(traj) if cols is None else cols
    legs = [k for k in c if k.startswith("leg_") and k.endswith("_tension_kN")]
    if not legs:
        return None
    d = summary.data
    t = c["t_s"]
    plt, fig = new_figure(10.0, 7.0)
    # legends in a column of their own at the right, beyond the tonnes axis (anchored to their axes,
    # so they move with them): they never cover a curve
    ax = fig.add_axes([0.08, 0.47, 0.64, 0.43])
    for j, k in enumerate(legs):
        ax.plot(t, c[k], color=LEG_COLOURS[j % len(LEG_COLOURS)], lw=1.4, label=f"leg {j + 1}")
    for j, k in enumerate(x for x in c if x.startswith("top_sling_")):
        ax.plot(t, c[k], color=GREY, lw=1.1, ls="--" if j == 0 else ":", label=f"top sling {j + 1}")
    rows = d.get("leg_tensions") or []
    hang = sorted({round(r["hanging_kN"], 6) for r in rows})
    for h in hang:
        ax.axhline(h, color=INK, lw=0.8, ls=":", zorder=1)
    if hang:
        ax.plot([], [], color=INK, lw=0.8, ls=":", label="hanging at rest")
    wlls = sorted({r["wll_kN"] for r in rows if r["wll_kN"] is not None})
    for w in wlls:
        ax.axhline(w, color=LIMIT, lw=1.2, ls="-.", zorder=1)
    if wlls:
        ax.plot([], [], color=LIMIT, lw=1.2, ls="-.", label="declared leg WLL")
    if d.get("top_sling_wll_kN") and d.get("top_sling_peak_tension_kN"):
        ax.axhline(d["top_sling_wll_kN"], color=GREY, lw=1.2, ls="-.", zorder=1)
        ax.plot([], [], color=GREY, lw=1.2, ls="-.", label="declared top sling WLL")
    ax.set_ylabel("tension [kN]")
    lo, hi = ax.get_ylim()
    lo = min(lo, 0.0) if np.min([c[k].min() for k in legs]) < 0 else lo
    ax.set_ylim(lo, hi)  # shade_moves adds the headroom for the move names
    tonnes = ax.secondary_yaxis("right", functions=(_kN_to_t, _t_to_kN))
    tonnes.set_ylabel("tension [t]")
    shade_moves(ax, traj.scene, traj.motion)
    ax.legend(loc="upper left", bbox_to_anchor=(1.14, 1.0), fontsize=8, framealpha=0.9, borderaxespad=0.0)
    ax.grid(alpha=0.3)
    ax.tick_params(labelbottom=False)
    ax2 = fig.add_axes([0.08, 0.10, 0.64, 0.33], sharex=ax)
    if "load_tilt_deg" in c:
        ax2.plot(t, c["load_tilt_x_deg"], color=ROPE, lw=1.3, label="tilt about x")
        ax2.plot(t, c["load_tilt_y_deg"], color=LOAD, lw=1.3, label="tilt about y")
        ax2.plot(t, c["load_tilt_deg"], color=INK, lw=0.9, ls=":", label="out of level")
        ax2.set_ylabel("tilt [deg]")
    else:
        s = traj.sample(t)
        if s.get("hook") is not None:
            n1 = s["rope_dir"]
            leg = s["load"] - s["hook"]
            leg = leg / np.linalg.norm(leg, axis=1)[:, None]
            ang = np.degrees(np.arctan2(np.linalg.norm(np.cross(n1, leg), axis=1), np.sum(n1 * leg, axis=1)))
            ax2.plot(t, ang, color=LOAD, lw=1.5, label="sling leg to hoist rope (whip)")
            ax2.set_ylabel("angle [deg]")
        elif "rope_stretch_m" in c:
            ax2.plot(t, 1000 * c["rope_stretch_m"], color=ROPE, lw=1.5, label="rope stretch")
            ax2.set_ylabel("stretch [mm]")
    ax2.set_xlabel("time [s]")
    ax2.grid(alpha=0.3)
    if ax2.lines:
        ax2.legend(loc="upper left", bbox_to_anchor=(1.14, 1.0), fontsize=8, framealpha=0.9, borderaxespad=0.0)
    title_and_caution(fig, f"{traj.scene.title}: sling legs and load attitude", summary)
    return fig
