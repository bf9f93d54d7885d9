"""Write every output file of one run into a folder (each file atomically)."""

from __future__ import annotations

from pathlib import Path

from swingsim.io.files import atomic_write_text
from swingsim.metrics.modes import mode_names
from swingsim.report.plots import write_plots
from swingsim.report.plots_response import response_csv
from swingsim.report.tables import summary_json, summary_text, timeseries_columns, timeseries_csv


def write_run_outputs(traj, summary, out_dir, *, plots: bool = True, plot_formats=("png",)) -> list[Path]:
    """Write every output file of one run into a folder, each file atomically.

    Everything that can fail is computed before the first file appears.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run.
    summary : swingsim.metrics.Summary
        Its measures.
    out_dir : str or pathlib.Path
        The folder.
    plots : bool
        Also write the plots.
    plot_formats : tuple of str
        The plots' formats: ``"png"``, ``"svg"`` or both.

    Returns
    -------
    list of pathlib.Path
        summary.json, timeseries.csv, summary.txt, response.csv, then the plots.
    """
    out = Path(out_dir)
    # compute everything that can fail before the first file appears
    cols = timeseries_columns(traj)  # sampled once, for the CSV and every plot
    texts = {
        "summary.json": summary_json(summary),
        "timeseries.csv": timeseries_csv(traj, cols),
        "summary.txt": summary_text(summary, traj.scene, mode_names(traj.model)),
        "response.csv": response_csv(traj),
    }
    written = [atomic_write_text(out / name, text) for name, text in texts.items()]
    if plots:
        written += write_plots(traj, summary, out, cols, formats=plot_formats)
    return written
