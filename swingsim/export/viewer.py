"""viewer.html: one self-contained page that plays the exported lift in any browser.

The page works from ``file://`` with no server and no network: the viewer
script (three.js and the project's viewer code, bundled ahead of time into
``viewer/dist/viewer.bundle.js``), the binary glTF (base64) and a compact
JSON of the run's time series, events and named views are all inlined.
Sources of the script are in ``viewer/src/``; ``npm run build`` in
``viewer/`` rebuilds the bundle (see DEVELOPERS.md).

The URL fragment picks the moment and the view: ``viewer.html#t=12.5&view=plan``
opens paused at 12.5 s in the plan view.
"""

from __future__ import annotations

import base64
import html
import json
import math
from importlib import resources

import numpy as np

from swingsim._version import __version__
from swingsim.metrics.cautions import CAUTION
from swingsim.render import facts, views
from swingsim.render.palette import PALETTE, TAG_LINE_NEAR_SHARE
from swingsim.report.tables import timeseries_columns
from swingsim.scene3d import build

#: Where the built viewer script lives inside the package.
BUNDLE_PATH = ("viewer", "dist", "viewer.bundle.js")
#: Rate of the time series embedded for the readouts and the swing plot [Hz].
SERIES_RATE_HZ = 20.0
#: Most rows of the embedded time series (long runs are sampled more coarsely).
SERIES_MAX_ROWS = 4000
#: Columns of timeseries.csv the page shows, and the decimals kept of each.
SERIES_COLUMNS = {
    "t_s": 3, "rope_angle_deg": 2, "swing_deg": 2, "rope_tension_kN": 2, "load_speed_m_s": 3,
    "load_x_m": 3, "load_y_m": 3, "load_z_m": 3,
}
#: Picture aspect the named views are fitted at; the page widens the fit for narrower windows [-].
FIT_ASPECT = 16.0 / 9.0
#: Palette colours the page's panels and plot use.
PAGE_COLOURS = ("sky", "text", "panel", "banner", "load", "hook", "crane", "crane_dark", "warn",
                "envelope", "sling", "exclusion", "grid_major", "tag_line", "near", "contact")
#: Decimals kept of each tag line's pull (``tag_line_<j>_N``) and of the ground's reaction (kN).
TAG_LINE_DECIMALS, GROUND_DECIMALS = 1, 3
#: Summary keys shown in the page's facts panel, with their labels and units.
SUMMARY_FACTS = (
    ("peak_rope_angle_deg", "Peak rope angle", "deg", 1),
    ("peak_rope_angle_time_s", "Peak at", "s", 1),
    ("swing_at_move_end_deg", "Swing when the moves end", "deg", 1),
    ("settled_at_s", "Settled at", "s", 1),
    ("liftoff_time_s", "Lift-off at", "s", 1),
    ("touchdown_time_s", "Touch-down at", "s", 1),
    ("peak_rope_tension_kN", "Peak hook load", "kN", 1),
    ("peak_load_speed_m_s", "Peak load speed", "m/s", 2),
)


def scene_to_gltf_axes(points) -> np.ndarray:
    """Scene coordinates (Z up) in glTF's axes (+Y up, right-handed): (x, y, z) -> (x, z, -y).

    Parameters
    ----------
    points : array_like, shape (..., 3)
        Points or directions in the scene's axes [m].

    Returns
    -------
    numpy.ndarray
        The same points in glTF's axes [m].

    References
    ----------
    Khronos Group, *glTF 2.0 Specification*, section 3.4 "Coordinate System and Units".
    """
    p = np.asarray(points, dtype=float)
    return np.stack([p[..., 0], p[..., 2], -p[..., 1]], axis=-1)


def _round_list(values, decimals: int) -> list:
    return [None if not math.isfinite(v) else round(v, decimals) for v in np.asarray(values, dtype=float).tolist()]


def _series(traj) -> dict:
    t0, t1 = 0.0, float(traj.t_end_s)
    rows = int(min(SERIES_MAX_ROWS, max(2, math.floor((t1 - t0) * SERIES_RATE_HZ) + 1)))
    t = np.linspace(t0, t1, rows)
    cols = timeseries_columns(traj, t)
    out = {name: _round_list(cols[name], nd) for name, nd in SERIES_COLUMNS.items() if name in cols}
    for j in range(len(getattr(traj.scene, "tag_lines", ()))):
        name = f"tag_line_{j + 1}_N"
        if name in cols:
            out[name] = _round_list(cols[name], TAG_LINE_DECIMALS)
    if "ground_reaction_kN" in cols:
        out["ground_reaction_kN"] = _round_list(cols["ground_reaction_kN"], GROUND_DECIMALS)
    return out


def _tag_lines(traj) -> list:
    """Each tag line's name, limit and where the page finds it (series column, glTF nodes)."""
    return [{"name": line.name(j), "max_pull_N": float(line.max_pull_N), "column": f"tag_line_{j + 1}_N",
             "node": f"tag_line_{j + 1}", "person": f"tag_person_{j + 1}"}
            for j, line in enumerate(getattr(traj.scene, "tag_lines", ()))]


def _camera_json(cam: views.Camera) -> dict:
    return {
        "position": _round_list(scene_to_gltf_axes(cam.position), 3),
        "target": _round_list(scene_to_gltf_axes(cam.focus), 3),
        "up": _round_list(scene_to_gltf_axes(cam.up), 4),
        "fov_deg": float(cam.view_angle_deg),
        "ortho_half_height_m": None if cam.parallel_scale is None else round(float(cam.parallel_scale), 3),
    }


def _views(traj, scene3d) -> dict:
    points = scene3d.interest_points()
    fitted = {name: _camera_json(views.fit(name, points, FIT_ASPECT)) for name in views.PRESETS if name != "follow"}
    # follow: the video's framing, aimed a little above the load (see render/stage.py)
    longest = float(np.max(traj.sample(np.linspace(0.0, traj.t_end_s, 50))["rope_length"]))
    cam = views.follow((0.0, 0.0, 0.0), views.follow_span(longest, scene3d.layout.load_size_m), FIT_ASPECT)
    fitted["follow"] = dict(_camera_json(cam), focus_load_share=0.7, focus_rise_share=0.3)
    return fitted


def _events(traj, summary) -> list:
    return [{"t_s": round(e.t_s, 3), "label": e.label, "kind": e.kind} for e in facts.collect(traj, summary).events]


def _summary_facts(summary) -> list:
    data = getattr(summary, "data", summary) or {}
    out = []
    for key, label, unit, nd in SUMMARY_FACTS:
        value = data.get(key)
        if isinstance(value, (int, float)) and math.isfinite(value):
            out.append({"key": key, "label": label, "value": round(float(value), nd), "unit": unit})
    return out


def page_data(traj, summary, scene3d=None) -> dict:
    """Everything the page shows besides the 3D scene, as plain JSON-ready values.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The solved run.
    summary : swingsim.metrics.Summary or dict
        Its measures (peak swing, settling ...), as ``summary.json`` holds them.
    scene3d : swingsim.scene3d.Scene3D, optional
        The run's 3D scene, when the caller has built it already (it is built here otherwise).

    Returns
    -------
    dict
        ``title``, ``caution``, ``version``, ``colours`` (palette name -> ``#rrggbb``),
        ``series`` (column of timeseries.csv -> values, :data:`SERIES_COLUMNS`), ``events``
        (``t_s`` [s], ``label``, ``kind``), ``facts`` (summary numbers), ``views`` (named view ->
        camera in glTF axes [m]), ``settle_deg`` [deg], ``fit_aspect`` [-], ``tag_lines`` (per
        line: ``name``, ``max_pull_N`` [N], its series ``column`` and glTF ``node`` and ``person``),
        ``tag_near_share`` (the share of ``max_pull_N`` from which a pull shows amber [-]) and
        ``ground`` (whether the scene has a ``[ground]``: the series then has ``ground_reaction_kN``).
    """
    scene3d = build(traj) if scene3d is None else scene3d
    return {
        "title": traj.scene.title,
        "caution": CAUTION,
        "version": __version__,
        "colours": {name: PALETTE[name] for name in PAGE_COLOURS},
        "series": _series(traj),
        "events": _events(traj, summary),
        "facts": _summary_facts(summary),
        "views": _views(traj, scene3d),
        "settle_deg": float(traj.scene.limits.settle_deg),
        "fit_aspect": FIT_ASPECT,
        "tag_lines": _tag_lines(traj),
        "tag_near_share": TAG_LINE_NEAR_SHARE,
        "ground": getattr(traj.scene, "ground", None) is not None,
    }


def bundle_text() -> str:
    """The built viewer script (three.js and the project's viewer code, minified).

    Returns
    -------
    str
        The script; its first line is a comment with the sha256 of the sources it was built from.
    """
    return resources.files("swingsim.export").joinpath(*BUNDLE_PATH).read_text(encoding="utf-8")


def _script_json(value) -> str:
    # safe inside <script>: no "</script", "<!--" or "&" can appear in the text
    text = json.dumps(value, ensure_ascii=False, separators=(",", ":"), allow_nan=False)
    return text.replace("<", "\\u003c").replace(">", "\\u003e").replace("&", "\\u0026")


def viewer_html(glb_bytes: bytes, traj, summary, scene3d=None) -> str:
    """viewer.html: the lift in an interactive, self-contained page.

    Parameters
    ----------
    glb_bytes : bytes
        The binary glTF of the lift (``lift.glb``), embedded as base64.
    traj : swingsim.simulation.Trajectory
        The solved run the glTF was made from.
    summary : swingsim.metrics.Summary or dict
        Its measures, for the events and the facts panel.
    scene3d : swingsim.scene3d.Scene3D, optional
        The run's 3D scene, when already built (saves building it again).

    Returns
    -------
    str
        The page's HTML (UTF-8 text): open it from disk in any current browser.
    """
    data = page_data(traj, summary, scene3d)
    title = html.escape(data["title"])
    script = bundle_text().replace("</script", "<\\/script")
    glb = base64.b64encode(bytes(glb_bytes)).decode("ascii")
    return (
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
        f"<meta name=\"generator\" content=\"swingsim {html.escape(__version__)}\">\n"
        f"<title>{title} - swingsim 3D viewer</title>\n</head>\n<body>\n"
        f"<div id=\"swingsim-caution\" role=\"note\">{html.escape(CAUTION)}</div>\n"
        "<noscript>This viewer needs JavaScript; lift.glb opens in any glTF 2.0 viewer.</noscript>\n"
        f"<script type=\"application/json\" id=\"swingsim-data\">{_script_json(data)}</script>\n"
        f"<script type=\"application/octet-stream\" id=\"swingsim-glb\">{glb}</script>\n"
        f"<script>{script}</script>\n</body>\n</html>\n"
    )
