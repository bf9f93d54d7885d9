"""Export speed and size: the demo's 60 s lift as an animated glTF 2.0 scene.

Goal (issue: glTF export): a 60 s lift at 30 keys a second exports well under
2 s on a 2-core machine, and the ``.glb`` stays under 2 MB.  The run is
simulated and measured once (not timed); then the export -- the 3D scene, the
keys sampled from the dense solution, the ``.glb`` bytes, and the viewer page
when the viewer is installed -- is timed with ``time.perf_counter`` (best of
``--repeat``) and with CPU time, which a busy shared machine distorts less.

Run: python benchmarks/bench_export.py [--fps 30] [--repeat 3] [--scene FILE]
"""

from __future__ import annotations

import argparse
import os
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from swingsim import load_scene, simulate, summarize  # noqa: E402
from swingsim.export.gltf import build_gltf  # noqa: E402
from swingsim.export.write import write_export  # noqa: E402

SCENE = Path(__file__).resolve().parent.parent / "swingsim" / "data" / "demo.toml"


def _cpu() -> float:
    t = os.times()
    return t.user + t.system


def main() -> None:
    """Time the export of one scene and print the times and the sizes."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--scene", default=str(SCENE), help="scene file (default: the demo)")
    ap.add_argument("--fps", type=float, default=30.0, help="animation keys a second (default 30)")
    ap.add_argument("--repeat", type=int, default=3, help="timed repetitions (default 3)")
    args = ap.parse_args()

    scene = load_scene(args.scene)
    traj = simulate(scene)
    summary = summarize(traj)
    print(f"scene: {scene.title} ({traj.t_end_s:g} s), keys every 1/{args.fps:g} s")

    best_glb, best_all, cpu_all = float("inf"), float("inf"), float("inf")
    with tempfile.TemporaryDirectory() as tmp:
        for _ in range(args.repeat):
            t0 = time.perf_counter()
            glb = build_gltf(traj, summary, fps=args.fps).to_glb()
            best_glb = min(best_glb, time.perf_counter() - t0)
            c0, t0 = _cpu(), time.perf_counter()
            paths = write_export(traj, summary, tmp, fps=args.fps)
            best_all = min(best_all, time.perf_counter() - t0)
            cpu_all = min(cpu_all, _cpu() - c0)
        sizes = {p.name: p.stat().st_size for p in paths}
    print(f"lift.glb in memory:        {best_glb:6.3f} s wall (best of {args.repeat})")
    print(f"write_export (all files):  {best_all:6.3f} s wall, {cpu_all:6.3f} s CPU (best of {args.repeat})")
    for name, size in sizes.items():
        print(f"{name:26s} {size / 1e6:6.3f} MB")
    print(f"lift.glb bytes: {len(glb)}; targets: export well under 2 s, lift.glb under 2 MB")


if __name__ == "__main__":
    main()
