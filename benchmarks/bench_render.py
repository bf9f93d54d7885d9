"""Render speed: the PyVista renderer against a matplotlib 3D baseline, same clip, one run.

Goal: a 1280x720, 30 fps MP4 at the default quality renders at least twice as
fast as real time on a 2-core machine with no GPU (frames per second >= 2 x the
clip's fps), so re-rendering during a briefing is painless.  Each line prints
the real-time factor (frames per second over the clip's fps) from wall time,
and the factor two idle cores would reach from the CPU time a frame takes
(``cores x 1000 / CPU ms a frame / fps``; one process already keeps two cores
busy: the renderer with its rasteriser threads, and the encoder), since a busy shared machine
distorts wall time; the load average is printed too.
The baseline draws the same clip frame by frame with matplotlib's 3D axes
(artists updated in place, not re-created) and writes it with imageio.  Both
print frames per second, the ratio, and CPU seconds per frame (this process
plus its children: the encoders and render workers), which a busy shared
machine does not distort the way wall-clock time is distorted.

On a shared machine, ``--repeat N`` draws each side N times, alternating, and
keeps each side's fastest run by wall time and its least CPU a frame (others'
jobs only ever slow a run down).

Run: python benchmarks/bench_render.py [--seconds 30] [--size 1280x720] [--fps 30] [--quality standard] [--repeat 1]
"""

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from swingsim import load_scene, simulate, summarize  # noqa: E402
from swingsim.render.api import frame_times, render_scene  # noqa: E402

SCENE = Path(__file__).resolve().parent.parent / "swingsim" / "data" / "demo.toml"


def _cpu():
    t = os.times()
    return t.user + t.system + t.children_user + t.children_system


def matplotlib_clip(traj, path, size, fps, seconds):
    """The baseline: the same frames drawn with matplotlib's 3D axes, written with imageio."""
    import imageio.v2 as imageio
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    times = frame_times(0.0, seconds, fps, 1.0)
    w, h = size
    fig = plt.figure(figsize=(w / 100, h / 100), dpi=100)
    ax = fig.add_subplot(projection="3d")
    s = traj.sample(times)
    p, load = s["suspension"], s["load"]
    allp = np.concatenate([p, load, [[0, 0, 0]]])
    lo, hi = allp.min(axis=0) - 3, allp.max(axis=0) + 3
    ax.set_xlim(lo[0], hi[0])
    ax.set_ylim(lo[1], hi[1])
    ax.set_zlim(0, hi[2])
    ax.set_box_aspect(hi - np.array([lo[0], lo[1], 0]))
    ax.view_init(elev=25, azim=-58)
    from mpl_toolkits.mplot3d.art3d import Poly3DCollection

    scene = traj.scene
    # a comparable picture: ground grid, zones, crane, rope, load box, trail, the same words
    for x in np.arange(np.floor(lo[0] / 5) * 5, hi[0], 5.0):
        ax.plot([x, x], [lo[1], hi[1]], [0, 0], color="#8f8672", lw=0.6)
    for y in np.arange(np.floor(lo[1] / 5) * 5, hi[1], 5.0):
        ax.plot([lo[0], hi[0]], [y, y], [0, 0], color="#8f8672", lw=0.6)
    faces = [[0, 1, 3, 2], [4, 5, 7, 6], [0, 1, 5, 4], [2, 3, 7, 6], [0, 2, 6, 4], [1, 3, 7, 5]]

    def box(a, b):
        c = np.array([[x, y, z] for x in (a[0], b[0]) for y in (a[1], b[1]) for z in (a[2], b[2])])
        return [c[f] for f in faces]

    for z in scene.zones:
        ax.add_collection3d(Poly3DCollection(box(z.min_m, z.max_m), alpha=0.3, facecolor="#6c757d"))
    half = np.asarray(scene.load.size_m or (1.0, 1.0, 1.0)) / 2
    body = Poly3DCollection(box(-half, half), facecolor="#f26b1d", edgecolor="k", lw=0.3)
    ax.add_collection3d(body)
    (mast,) = ax.plot([0, 0], [0, 0], [0, hi[2]], color="#3f5d7d", lw=6)
    (jib,) = ax.plot([], [], [], color="#3f5d7d", lw=4)
    (rope,) = ax.plot([], [], [], color="k", lw=1.5)
    (trail,) = ax.plot([], [], [], color="#7b2cbf", lw=2)
    ax.set_title(scene.title, loc="left", fontsize=16)
    label = ax.text2D(0.02, 0.95, "", transform=ax.transAxes, fontsize=14, family="monospace")
    readout = ax.text2D(0.98, 0.95, "", transform=ax.transAxes, fontsize=12, family="monospace",
                        ha="right", va="top")
    ax.text2D(0.5, 0.02, "Preview only - the lift plan and the competent person decide.",
              transform=ax.transAxes, ha="center")
    ang = np.degrees(np.arccos(np.clip(-s["rope_dir"][:, 2], -1, 1)))
    spd = np.linalg.norm(s["load_vel"], axis=1)
    ten = s["rope_tension_N"] / 1000
    box0 = np.array(box(-half, half))
    writer = imageio.get_writer(path, fps=fps, codec="libx264", quality=None, macro_block_size=8,
                                ffmpeg_log_level="error", output_params=["-preset", "veryfast", "-crf", "20"])
    try:
        for i, t in enumerate(times):
            jib.set_data_3d([0, p[i, 0] * 1.15], [0, p[i, 1] * 1.15], [p[i, 2], p[i, 2]])
            rope.set_data_3d([p[i, 0], load[i, 0]], [p[i, 1], load[i, 1]], [p[i, 2], load[i, 2]])
            body.set_verts(box0 + load[i])
            k0 = max(0, i - int(6 * fps))
            trail.set_data_3d(load[k0:i + 1, 0], load[k0:i + 1, 1], load[k0:i + 1, 2])
            label.set_text(f"t = {t:6.2f} s")
            readout.set_text(f"rope angle {ang[i]:5.1f} deg\nload speed {spd[i]:5.2f} m/s\n"
                             f"tension {ten[i]:6.1f} kN")
            fig.canvas.draw()
            frame = np.asarray(fig.canvas.buffer_rgba())[..., :3]
            writer.append_data(frame)
    finally:
        writer.close()
        plt.close(fig)
    return len(times)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--seconds", type=float, default=30.0, help="length of the clip [s] (default 30: a briefing clip; a 10 s clip is bound by about 1.6 s of start-up)")
    ap.add_argument("--size", default="1280x720")
    ap.add_argument("--fps", type=float, default=30.0)
    ap.add_argument("--scene", default=str(SCENE))
    ap.add_argument("--quality", default="standard", choices=("standard", "high"))
    ap.add_argument("--repeat", type=int, default=1, help="runs of each side, alternating; the best is kept")
    a = ap.parse_args()
    size = tuple(int(x) for x in a.size.split("x"))
    traj = simulate(load_scene(a.scene))
    summary = summarize(traj)
    n = len(frame_times(0.0, a.seconds, a.fps, 1.0))
    cores = os.cpu_count() or 1
    print(f"clip: {a.seconds:g} s of {Path(a.scene).name} at {size[0]}x{size[1]}, {a.fps:g} fps = {n} frames, "
          f"quality {a.quality}; {cores} CPUs; load average {os.getloadavg()[0]:.1f} before")
    res = {}
    sides = [("pyvista, 1 process", 1), ("pyvista, 2 workers", 2), ("matplotlib 3D baseline", None)]
    with tempfile.TemporaryDirectory() as tmp:
        for rep in range(a.repeat):
            for name, workers in sides:
                out = Path(tmp) / f"{name.split(',')[0].split()[0]}_{workers}_{rep}"
                c0, t0 = _cpu(), time.perf_counter()
                if workers is None:
                    matplotlib_clip(traj, str(out) + ".mp4", size, a.fps, a.seconds)
                else:
                    render_scene(traj, summary, out, size=size, fps=a.fps, window=(0.0, a.seconds), quiet=True,
                                 stills=False, workers=workers, quality=a.quality)
                wall, cpu = time.perf_counter() - t0, _cpu() - c0
                fps_now, cpu_now = n / wall, cpu / n
                old = res.get(name)
                res[name] = (fps_now, cpu_now) if old is None else (max(old[0], fps_now), min(old[1], cpu_now))
                extra = ("" if workers is None else
                         f"  real-time factor {fps_now / a.fps:4.2f}x wall, "
                         f"{cores / cpu_now / a.fps:4.2f}x on {cores} idle cores by CPU")
                print(f"{name:>22}: {fps_now:6.1f} frames/s  ({wall:5.1f} s wall, {1000 * cpu_now:5.1f} ms CPU a frame)"
                      f"{extra}  [run {rep + 1}, load {os.getloadavg()[0]:.1f}]", flush=True)
    res["matplotlib"] = res.pop("matplotlib 3D baseline")
    best = max(res[k][0] for k in res if k.startswith("pyvista"))
    best_cpu = min(res[k][1] for k in res if k.startswith("pyvista"))
    if a.repeat > 1:
        print(f"best of {a.repeat} runs each:")
    print(f"real-time factor (goal 2x at 1280x720, 30 fps, standard): {best / a.fps:.2f}x by wall time, "
          f"{cores / best_cpu / a.fps:.2f}x on {cores} idle cores by CPU time; "
          f"load average {os.getloadavg()[0]:.1f} after")
    print(f"ratio pyvista (best) / matplotlib: {best / res['matplotlib'][0]:.1f}x in frames/s, "
          f"{res['matplotlib'][1] / min(res[k][1] for k in res if k.startswith('pyvista')):.1f}x in CPU a frame")


if __name__ == "__main__":
    main()
