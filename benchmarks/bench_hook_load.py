"""Time the 60 s hook-and-load demo scenes: simulation alone, then with the metrics.

Goal (issue: hook block, rigid loads, rope stretch): simulate well under 1 s per
60 s scene on a 2-core machine.
Run: python benchmarks/bench_hook_load.py
"""

import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from swingsim import load_scene, simulate, summarize  # noqa: E402

SCENES = ["panel_bridle_hook_block", "compact_load_short_sling", "springy_multifall_rope"]
GOAL_S = 1.0


def main(repeats: int = 3) -> None:
    for name in SCENES:
        scene = load_scene(ROOT / "scenes" / f"{name}.toml")
        simulate(scene)  # warm up
        sim, tot = [], []
        for _ in range(repeats):
            t0 = time.perf_counter()
            traj = simulate(scene)
            t1 = time.perf_counter()
            summarize(traj)
            t2 = time.perf_counter()
            sim.append(t1 - t0)
            tot.append(t2 - t0)
        ms = statistics.median(sim) / scene.duration_s * 60.0  # per 60 s of simulated time
        print(f"{name}: {traj.model.name}, {scene.duration_s:g} s simulated, {traj.nfev} rhs calls; "
              f"simulate median {statistics.median(sim):.2f} s ({ms:.2f} s per 60 s), "
              f"with summarize {statistics.median(tot):.2f} s; goal simulate < {GOAL_S:g} s per 60 s: "
              f"{'met' if ms < GOAL_S else 'NOT met'}")


if __name__ == "__main__":
    main()
