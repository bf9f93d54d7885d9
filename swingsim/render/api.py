"""render_scene: a run -> a video (MP4, GIF or PNG frames) and stills, headless.

Frames are drawn at their true simulated times (the trajectory's dense output),
posed on a stage that is built once, and streamed to the encoder.  A long MP4
is split into frame ranges drawn by worker processes, whose segments are
joined without re-encoding.
"""

from __future__ import annotations

import math
import os
from pathlib import Path

import numpy as np

from swingsim.errors import InputError
from swingsim.render import facts as run_facts
from swingsim.render import writers
from swingsim.render.frames import build_stage, draw_frames, progress_bar, read_load_mesh, rows
from swingsim.render.views import VIEWS

FORMATS = ("mp4", "gif", "png")
#: ``standard``: drawn at the frame size (fast, for checking and re-rendering during a briefing);
#: ``high``: supersampled twice along each side and averaged (smooth edges, for the final cut).
QUALITIES = ("standard", "high")
#: GIF stores frame delays in hundredths of a second and common players slow any delay
#: under 2/100 s to about 1/10 s (common practice), so GIFs are kept to 50 frames a second.
GIF_MAX_FPS = 50
#: Below this many frames one process draws everything: starting a worker costs about
#: a second of CPU.
PARALLEL_MIN_FRAMES = 450
#: Workers are started on their own only with at least this many CPUs (and PARALLEL_MIN_FRAMES
#: frames).  Measured on an idle 2-core machine (benchmarks/bench_render.py, 30 s clip at
#: 1280x720, 30 fps): one process 51.9 frames/s, two workers 62.4 frames/s; on a busy shared
#: machine one process did better (52-58 against 32-48 frames/s on a 20 s clip), so a user
#: sharing cores can pass ``workers=1``.
PARALLEL_MIN_CPUS = 2


def frame_times(t0: float, t1: float, fps: float, speed: float) -> np.ndarray:
    """Simulated times of the frames of the window [t0, t1] [s].

    ``round((t1 - t0) * fps / speed)`` frames (at least one), ``speed / fps``
    simulated seconds apart, the first at ``t0``.

    Parameters
    ----------
    t0, t1 : float
        The simulated time window [s].
    fps : float
        Frames per second of the video [1/s].
    speed : float
        Playback speed: simulated seconds per second of video [-].

    Returns
    -------
    numpy.ndarray
        The frames' simulated times [s].
    """
    n = max(1, int(round((t1 - t0) * fps / speed)))
    return t0 + np.arange(n) * (speed / fps)


def output_names(scene, out_dir, fmt, stills=True) -> dict:
    """The files a render writes, named after the scene.

    Parameters
    ----------
    scene : swingsim.scene.Scene
        The scene (its ``name``).
    out_dir : str or pathlib.Path
        The output folder.
    fmt : {"mp4", "gif", "png"}
        The video format; "png" writes a folder ``<scene>_frames``.
    stills : bool
        Whether stills are written.

    Returns
    -------
    dict
        ``{"video": path, "stills": {kind: path}}`` (no stills when ``stills`` is false).
    """
    out = Path(out_dir)
    stem = scene.name
    video = out / (f"{stem}.{fmt}" if fmt != "png" else f"{stem}_frames")
    st = {k: out / f"{stem}_{k}.png" for k in ("peak_swing", "end_of_moves", "settled", "stopped")}
    return {"video": video, "stills": st if stills else {}}


def check_options(scene, *, size, fps, fmt, view, speed, window, split, source="render", quality="standard"):
    """Validate render options before anything is drawn or written.

    Parameters
    ----------
    scene : swingsim.scene.Scene
        The scene (its duration and its ``[view]`` table).
    size : (int, int)
        Frame width and height [px]: 64 to 7680 by 64 to 4320, even for MP4.
    fps : float
        Frames per second, 1 to 120 [1/s].
    fmt : str
        "mp4", "gif" or "png".
    view : str
        One of :data:`swingsim.render.views.VIEWS`.
    speed : float
        Playback speed, 0.01 to 100 [-].
    window : (float, float) or None
        Simulated time window [s]: 0 <= from < to, from before the run's end.
    split : sequence of str or None
        Two views side by side.
    source : str
        What to name as the source of an error.
    quality : str
        One of :data:`QUALITIES`.

    Returns
    -------
    list of str
        The views to draw (one, or two for a split picture).

    Raises
    ------
    InputError
        One line naming the option and what is allowed.
    """
    def bad(key, value, what):
        return InputError(source, key, what, value)

    w, h = size
    if not (isinstance(w, int) and isinstance(h, int)) or w < 64 or h < 64 or w > 7680 or h > 4320:
        raise bad("--size", f"{w}x{h}", "expected WIDTHxHEIGHT in pixels, each 64 to 7680 (height to 4320)")
    if fmt == "mp4" and (w % 2 or h % 2):
        raise bad("--size", f"{w}x{h}", "width and height must be even for H.264 (yuv420p) video")
    if not (isinstance(fps, (int, float)) and math.isfinite(fps) and 1 <= fps <= 120):
        raise bad("--fps", fps, "expected a frame rate from 1 to 120")
    if fmt not in FORMATS:
        raise bad("--format", fmt, "expected one of " + ", ".join(FORMATS))
    if fmt == "gif" and fps > GIF_MAX_FPS:
        raise bad("--fps", fps, f"a GIF plays at most {GIF_MAX_FPS} frames a second (players slow shorter "
                  "frames); use a lower --fps or --format mp4")
    if quality not in QUALITIES:
        raise bad("--quality", quality, "expected one of " + ", ".join(QUALITIES))
    if not (isinstance(speed, (int, float)) and math.isfinite(speed) and 0.01 <= speed <= 100):
        raise bad("--speed", speed, "expected a playback speed from 0.01 (slow motion) to 100 (time-lapse)")
    views = list(split) if split else [view]
    if split and len(views) != 2:
        raise bad("--split", ",".join(views), "expected two views separated by a comma, e.g. side,plan")
    for v in views:
        if v not in VIEWS:
            raise bad("--split" if split else "--view", v, "expected one of " + ", ".join(VIEWS))
        if v == "custom" and scene.view is None:
            raise InputError(scene.file, "[view]", "the custom view needs a [view] table with "
                             "position_m and focus_m in the scene")
    if window is not None:
        t0, t1 = window
        if not (math.isfinite(t0) and math.isfinite(t1)) or t0 < 0 or t1 <= t0:
            raise bad("--from/--to", f"{t0:g}..{t1:g}", "expected 0 <= from < to (seconds)")
        if t0 >= scene.duration_s:
            raise bad("--from", t0, f"must be before the end of the run (duration_s = {scene.duration_s:g})")
    return views


def render_scene(traj, summary, out_dir, *, size=(1280, 720), fps=30, fmt="mp4", view="oblique",
                 speed=1.0, window=None, split=None, quiet=False, stills=True, workers=None,
                 overwrite=True, quality="standard"):
    """Render a run as a 3D video and stills.

    Parameters
    ----------
    traj : Trajectory
        The solved run (``swingsim.simulate``).
    summary : Summary or dict or None
        Its measures (``swingsim.metrics.summarize``); measured from ``traj`` when None.
    out_dir : str or Path
        Folder to write into (made if missing).
    size : (int, int)
        Frame width and height [px].
    fps : float
        Frames per second of the video [1/s].
    fmt : {"mp4", "gif", "png"}
        H.264 MP4, animated GIF, or a folder of numbered PNG frames.
    view : str
        Camera: side, end, plan, oblique, follow, or custom (the scene's ``[view]``).
    speed : float
        Playback speed: 0.5 is slow motion, 2 a time-lapse [-].
    window : (float, float) or None
        Simulated time window [s] to show; the whole run by default.
    split : (str, str) or None
        Two views side by side instead of ``view``.
    quiet : bool
        No progress bar (there is none when stderr is not a terminal either).
    stills : bool
        Also write PNG stills at peak swing, at the end of the last move and when settled.
    workers : int or None
        Worker processes for MP4 (None: one per CPU when the clip is long enough and the
        machine has at least :data:`PARALLEL_MIN_CPUS` CPUs; else one process).
    overwrite : bool
        Replace existing outputs; when False, an existing output is an InputError.
    quality : {"standard", "high"}
        ``high`` supersamples every frame (twice the width and height, averaged):
        smooth edges for the final cut at about four times the drawing time.

    Returns
    -------
    list of Path
        The video (file, or folder of PNG frames) first, then the stills.
    """
    from swingsim.render.gl import require_opengl

    scene = traj.scene
    size = tuple(size)
    views = check_options(scene, size=size, fps=fps, fmt=fmt, view=view, speed=speed, window=window,
                          split=split, quality=quality)
    names = output_names(scene, out_dir, fmt, stills)
    if not overwrite:
        for p in [names["video"], *names["stills"].values()]:
            if p.exists():
                raise InputError(str(p), "", "exists already; use --force to replace it")
    require_opengl()
    mesh = read_load_mesh(scene)
    facts = run_facts.collect(traj, summary)
    t_end = float(traj.t_end_s)
    t0, t1 = (0.0, t_end) if window is None else (float(window[0]), min(float(window[1]), t_end))
    times = frame_times(t0, t1, fps, speed)
    video_len = len(times) / fps
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    cpus = os.cpu_count() or 1
    nproc = workers if workers is not None else (cpus if cpus >= PARALLEL_MIN_CPUS else 1)
    parallel = fmt == "mp4" and nproc > 1 and len(times) >= (PARALLEL_MIN_FRAMES if workers is None else 2)
    written = []
    if parallel:
        from swingsim.render.parallel import render_parallel

        written.append(render_parallel(traj, summary, names["video"], times, size=size, fps=fps,
                                       views=views, speed=speed, video_len=video_len, workers=nproc,
                                       quiet=quiet, quality=quality))
        stage = None
    else:
        stage = build_stage(traj, facts, size, views, mesh, speed, video_len, quality)
        try:
            written.append(_write_video(stage, traj, names["video"], times, size, fps, fmt, quiet))
        except BaseException:
            stage.close()
            raise
    if names["stills"]:
        if stage is None:
            stage = build_stage(traj, facts, size, views, mesh, speed, video_len, quality)
        try:
            written += _write_stills(stage, traj, facts, names["stills"])
        finally:
            stage.close()
    elif stage is not None:
        stage.close()
    return written


def _write_video(stage, traj, target, times, size, fps, fmt, quiet, video_t0_index=0, video_len=None):
    if fmt == "mp4":
        sink = writers.Mp4Writer(target, size, fps)
    elif fmt == "gif":
        k = np.linspace(0, len(times) - 1, min(8, len(times))).round().astype(int)
        sample = list(draw_frames(stage, traj, times[k], fps=fps))
        sink = writers.GifWriter(target, size, fps, sample)
    else:
        sink = writers.PngSequenceWriter(target, size, fps)
    bar = progress_bar(len(times), quiet, Path(target).name)
    try:
        for frame in draw_frames(stage, traj, times, video_t0_index, fps, on_frame=lambda: bar.update()):
            sink.write(frame)
        path = sink.close()
    except BaseException:
        sink.abort()
        raise
    finally:
        bar.close()
    return path


def still_times(facts) -> dict:
    """Times of the stills [s]: peak swing, end of the last move, settled (when it settles).

    A run that stopped early (slack rope, overswing) has a still of its last valid
    instant instead of the moments it never reached.

    Parameters
    ----------
    facts : swingsim.render.facts.Facts
        The run's events.

    Returns
    -------
    dict
        Still kind ("peak_swing", "end_of_moves", "settled", "stopped") -> simulated time [s].
    """
    t = {"peak_swing": facts.peak_time_s}
    if 0 < facts.last_move_end_s <= facts.t_end_s:
        t["end_of_moves"] = facts.last_move_end_s
    if facts.settled_at_s is not None:
        t["settled"] = facts.settled_at_s
    if facts.status != "ok":
        t["stopped"] = facts.t_end_s
    return t


def _write_stills(stage, traj, facts, targets: dict) -> list:
    """PNG stills at the moments of :func:`still_times`, with the caution line (no banner)."""
    out = []
    for kind, t in still_times(facts).items():
        if kind not in targets:
            continue
        ts = np.array([t])
        samples = traj.sample(ts)
        stage.show(t, stage.scene3d.frames_from_samples(samples, traj.motion.pose(ts)), 0,
                   next(rows(samples, 1)), video_t=None)
        out.append(writers.write_png(targets[kind], stage.grab()))
    return out
