"""Draw an MP4 in frame ranges on worker processes and join the segments.

Each worker is a fresh interpreter (``python -m swingsim.render.parallel JOB``;
no OpenGL state is ever copied from the caller, and the caller's ``__main__``
is never re-imported).  It builds its own stage (~0.5 s), draws a contiguous
range of frames at their true times into an H.264 segment, and reports its
progress on stdout; the segments are then joined by ffmpeg's concat demuxer
without re-encoding.  Each worker's software OpenGL (Mesa llvmpipe) and encoder
use one thread, so the workers share the cores instead of fighting over them.
"""

from __future__ import annotations

import os
import pickle
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import numpy as np

from swingsim.io.files import TMP_PREFIX
from swingsim.render import facts as run_facts
from swingsim.render import writers
from swingsim.render.frames import build_stage, draw_frames, progress_bar, read_load_mesh


def _draw_range(job: dict) -> None:
    """Worker: draw the frames of ``job["times"]`` into ``job["segment"]``."""
    from swingsim.render.gl import require_opengl

    require_opengl()
    traj = job["traj"]
    facts = run_facts.collect(traj, job["summary"])
    stage = build_stage(traj, facts, job["size"], job["views"], read_load_mesh(traj.scene), job["speed"],
                        job["video_len"], job.get("quality", "standard"))
    sink = writers.Mp4Writer(job["segment"], job["size"], job["fps"], threads=1)
    try:
        n = 0
        for frame in draw_frames(stage, traj, job["times"], video_t0_index=job["k0"], fps=job["fps"]):
            sink.write(frame)
            n += 1
            if n % 4 == 0:
                print(4, flush=True)
        print(n % 4, flush=True)
        sink.close()
    except BaseException:
        sink.abort()
        raise
    finally:
        stage.close()


def render_parallel(traj, summary, target, times, *, size, fps, views, speed, video_len, workers, quiet,
                    quality="standard"):
    """Render ``times`` into the MP4 ``target`` with worker processes and join their segments.

    Parameters
    ----------
    traj : swingsim.simulation.Trajectory
        The run (pickled to each worker).
    summary : swingsim.metrics.Summary or dict or None
        Its measures.
    target : str or pathlib.Path
        The MP4 to write.
    times : numpy.ndarray
        Simulated times of all frames [s], split into contiguous ranges.
    size : (int, int)
        Frame width and height [px].
    fps : float
        Frames per second [1/s].
    views : sequence of str
        One view, or two side by side.
    speed : float
        Playback speed [-].
    video_len : float
        Length of the whole video [s].
    workers : int
        Worker processes (at most one a frame).
    quiet : bool
        No progress bar.
    quality : {"standard", "high"}
        Supersampled (``high``) or not.

    Returns
    -------
    pathlib.Path
        ``target``, joined from the workers' segments by :func:`swingsim.render.writers.concat_mp4`.

    Raises
    ------
    RuntimeError
        A worker failed (its last error line is named), or joining the segments failed.
    """
    import selectors


    target = Path(target)
    workers = max(1, min(workers, len(times)))
    bounds = np.linspace(0, len(times), workers + 1).round().astype(int)
    tmpdir = Path(tempfile.mkdtemp(prefix=TMP_PREFIX + target.name + "-parts-", dir=target.parent))
    env = dict(os.environ, LP_NUM_THREADS="1", OMP_NUM_THREADS="1", PYTHONUNBUFFERED="1")
    pkg_root = str(Path(__file__).resolve().parents[2])
    env["PYTHONPATH"] = pkg_root + (os.pathsep + env["PYTHONPATH"] if env.get("PYTHONPATH") else "")
    procs, parts = [], []
    bar = progress_bar(len(times), quiet, target.name)
    sel = selectors.DefaultSelector()
    try:
        for i in range(workers):
            seg = tmpdir / f"part{i:03d}.mp4"
            job = dict(traj=traj, summary=summary, segment=seg, times=times[bounds[i]:bounds[i + 1]],
                       k0=int(bounds[i]), size=size, fps=fps, views=views, speed=speed, video_len=video_len,
                       quality=quality)
            jf = tmpdir / f"job{i:03d}.pickle"
            jf.write_bytes(pickle.dumps(job))
            p = subprocess.Popen([sys.executable, "-m", "swingsim.render.parallel", str(jf)], env=env,
                                 stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
            sel.register(p.stdout, selectors.EVENT_READ)
            procs.append(p)
            parts.append(seg)
        open_streams = len(procs)
        while open_streams:
            for key, _ in sel.select(timeout=1.0):
                line = key.fileobj.readline()
                if not line:
                    sel.unregister(key.fileobj)
                    open_streams -= 1
                elif line.strip().isdigit():
                    bar.update(int(line))
        for p in procs:
            err = p.stderr.read()
            if p.wait() != 0:
                last = [ln for ln in err.strip().splitlines() if ln.strip()]
                raise RuntimeError("a render worker failed: " + (last[-1] if last else f"exit {p.returncode}"))
        return writers.concat_mp4(parts, target)
    finally:
        for p in procs:
            if p.poll() is None:
                p.kill()
                p.wait()
            for s in (p.stdout, p.stderr):
                s.close()
        sel.close()
        bar.close()
        shutil.rmtree(tmpdir, ignore_errors=True)


if __name__ == "__main__":  # worker entry point
    _draw_range(pickle.loads(Path(sys.argv[1]).read_bytes()))
