"""Time the 60 s hook-and-load demo scenes: simulation alone, then with the metrics.

Goal (issue: hook block, rigid loads, rope stretch): simulate well under 1 s per
60 s scene on a 2-core machine.
Run: python benchmarks/bench_hook_load.py
"""

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "benchmarks"))

from bench_single import time_runs  # noqa: E402

from swingsim import load_scene  # noqa: E402

SCENES = ["panel_bridle_hook_block", "compact_load_short_sling", "springy_multifall_rope"]
GOAL_S = 1.0


def main(repeats: int = 3) -> None:
    for name in SCENES:
        scene = load_scene(ROOT / "scenes" / f"{name}.toml")
        sim, tot, _, traj = time_runs(scene, repeats)
        ms = sim / scene.duration_s * 60.0  # per 60 s of simulated time
        print(f"{name}: {traj.model.name}, {scene.duration_s:g} s simulated, {traj.nfev} rhs calls; "
              f"simulate median {sim:.2f} s ({ms:.2f} s per 60 s), "
              f"({1e6 * sim / traj.nfev:.0f} us per rhs call, solver included), "
              f"with summarize {tot:.2f} s; goal simulate < {GOAL_S:g} s per 60 s: "
              f"{'met' if ms < GOAL_S else 'NOT met'}")


if __name__ == "__main__":
    main()
