"""Time one 60 s scene with a trapezoid move: simulation plus metrics, no plots.

Goal (issue: core engine): well under 0.3 s on a 2-core machine.
Run: python benchmarks/bench_single.py
"""

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from swingsim import scene_from_dict, simulate, summarize  # noqa: E402

SCENE = {
    "title": "benchmark: 60 s trolley move",
    "duration_s": 60.0,
    "crane": {"suspension_m": [20.0, 0.0, 40.0]},
    "rope": {"length_m": 15.0},
    "load": {"mass_kg": 2000.0, "wind_area_m2": 3.0},
    "damping": {"ratio": 0.01},
    "wind": {"speed_m_s": 8.0},
    "moves": [{"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 20.0,
               "speed_m_s": 1.0, "accel_m_s2": 0.3}],
}


def time_runs(scene, repeats: int):
    """Median wall times [s] of simulate and of simulate + summarize, after one warm-up run."""
    simulate(scene)  # warm up imports and caches
    sim, tot = [], []
    for _ in range(repeats):
        t0 = time.perf_counter()
        traj = simulate(scene)
        t1 = time.perf_counter()
        summarize(traj)
        t2 = time.perf_counter()
        sim.append(t1 - t0)
        tot.append(t2 - t0)
    return statistics.median(sim), statistics.median(tot), min(tot), traj


def main(repeats: int = 15) -> None:
    sim, med, best, traj = time_runs(scene_from_dict(SCENE), repeats)
    print(f"simulate: median {sim * 1e3:.1f} ms; simulate + summarize: median "
          f"{med * 1e3:.1f} ms, best {best * 1e3:.1f} ms over {repeats} runs "
          f"({traj.nfev} right-hand-side calls)")
    print(f"goal < 300 ms: {'met' if med < 0.3 else 'NOT met'} ({0.3 / med:.1f}x margin)")


if __name__ == "__main__":
    main()
