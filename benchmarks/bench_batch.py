"""Batch engine vs a loop of solve_ivp: speed and accuracy on 10,000 variants.

Scene: a single pendulum (point-mass load on the hoist rope) under a trolley
making one trapezoid move, simulated for 60 s.  The variants differ in rope
length, acceleration, speed and travel (a seeded random draw).

* Loop: for each variant, :func:`swingsim.simulation.simulate` -- scipy ``solve_ivp``
  with DOP853 at rtol 1e-8 (atol 1e-10), restarted at the move's breakpoints --
  then the peak and residual rope angles from its dense output sampled at the
  metric sample times (``swingsim.metrics.single.metric_times``) with a parabola
  through the samples around each maximum.
* Batch: :func:`swingsim.batch.run_batch` (the whole summary of each variant).

Both run in this one process, one after the other, and are timed with
``time.perf_counter``.  Prints both timings, the ratio (the target is 50 or
more) and the largest differences of the peak and residual rope angles (the
target is 0.01 deg).

Usage::

    python benchmarks/bench_batch.py                 # 10,000 variants, full loop (a few minutes)
    python benchmarks/bench_batch.py --loop 1000     # time the loop on the first 1000 only and
                                                     # extrapolate (printed as such)
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import time

import numpy as np
from scipy.optimize import minimize_scalar

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), ".."))

from swingsim.batch import engine as batch  # noqa: E402
from swingsim.metrics.definitions import rope_angle_from_horizontal_sq  # noqa: E402
from swingsim.metrics.single import metric_times  # noqa: E402
from swingsim.scene import scene_from_dict  # noqa: E402
from swingsim.simulation import simulate  # noqa: E402

BASE = {
    "title": "Benchmark: trolley move under a tower crane (invented)",
    "duration_s": 60.0,
    "crane": {"suspension_m": [25.0, 0.0, 40.0]},
    "rope": {"length_m": 15.0},
    "load": {"mass_kg": 3000.0},
    "moves": [{"axis": "radius", "profile": "trapezoid", "start_s": 1.0, "distance_m": 15.0,
               "speed_m_s": 1.0, "accel_m_s2": 0.4}],
}


def variants(n: int, seed: int = 7):
    rng = np.random.default_rng(seed)
    out = []
    for _ in range(n):
        d = {k: (dict(v) if isinstance(v, dict) else v) for k, v in BASE.items()}
        d["rope"] = {"length_m": float(rng.uniform(5.0, 35.0))}
        m = dict(BASE["moves"][0])
        m["accel_m_s2"] = float(rng.uniform(0.1, 1.0))
        m["speed_m_s"] = float(rng.uniform(0.5, 2.0))
        m["distance_m"] = float(rng.uniform(5.0, 25.0))
        d["moves"] = [m]
        out.append(scene_from_dict(d))
    return out


def loop_angles(traj):
    """Peak and residual rope angle [deg] of one solved run.

    Sampled at the metric sample times (``swingsim.metrics.single.metric_times``), then
    refined on the run's dense interpolant by a bounded scalar search between the
    neighbours of the largest sample, as ``swingsim.metrics.single`` does.
    """
    t = metric_times(traj)
    Y = traj.state(t)
    r2 = Y[:, 0] ** 2 + Y[:, 1] ** 2
    ang = rope_angle_from_horizontal_sq(r2)

    def at(x):
        y = traj.state(np.array([x]))[0]
        return float(rope_angle_from_horizontal_sq(y[0] ** 2 + y[1] ** 2))

    post = t >= traj.motion.last_move_end_s - 1e-12
    out = []
    for mask in (np.ones_like(post), post):
        i = int(np.argmax(np.where(mask, ang, -1.0)))
        best = float(ang[i])
        lo, hi = t[max(i - 1, 0)], t[min(i + 1, len(t) - 1)]
        if not mask[max(i - 1, 0)]:
            lo = t[i]
        if hi > lo:
            r = minimize_scalar(lambda x: -at(x), bounds=(lo, hi), method="bounded",
                                options={"xatol": 1e-9})
            best = max(best, -float(r.fun))
        out.append(math.degrees(best))
    return out


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--variants", type=int, default=10_000)
    ap.add_argument("--loop", type=int, default=None,
                    help="time the solve_ivp loop on only the first N variants and extrapolate")
    a = ap.parse_args(argv)
    scenes = variants(a.variants)
    n_loop = a.variants if a.loop is None else min(a.loop, a.variants)
    print(f"{a.variants} variants, 60 s each, point-mass load, one trapezoid trolley move")

    t0 = time.perf_counter()
    res = batch.run_batch(scenes)
    t_batch = time.perf_counter() - t0
    engines = {r["engine"] for r in res}
    print(f"batch engine:           {t_batch:8.2f} s  ({t_batch / a.variants * 1e3:.3f} ms per variant; "
          f"engines used: {', '.join(sorted(engines))})")

    t0 = time.perf_counter()
    ref = []
    for sc in scenes[:n_loop]:
        traj = simulate(sc, rtol=1e-8, atol=1e-10)
        ref.append(loop_angles(traj))
    t_loop = time.perf_counter() - t0
    if n_loop < a.variants:
        t_loop_all = t_loop * a.variants / n_loop
        print(f"solve_ivp loop:         {t_loop:8.2f} s for the first {n_loop} variants only; "
              f"EXTRAPOLATED linearly to {a.variants}: {t_loop_all:.1f} s (the loop's cost per "
              "variant does not depend on the others)")
    else:
        t_loop_all = t_loop
        print(f"solve_ivp loop:         {t_loop:8.2f} s  ({t_loop / n_loop * 1e3:.3f} ms per variant, "
              "DOP853 rtol 1e-8, all variants)")
    ratio = t_loop_all / t_batch
    print(f"speed-up:               {ratio:8.1f} x  (target >= 50: {'MET' if ratio >= 50 else 'NOT MET'})")

    ref = np.array(ref)
    got = np.array([[r["peak_rope_angle_deg"], r["residual_rope_angle_deg"]] for r in res[:n_loop]])
    d = np.abs(got - ref)
    print(f"largest |difference|:   peak {d[:, 0].max():.2e} deg (variant {int(np.argmax(d[:, 0]))}), "
          f"residual {d[:, 1].max():.2e} deg (variant {int(np.argmax(d[:, 1]))}) "
          f"(target <= 0.01 deg: {'MET' if d.max() <= 0.01 else 'NOT MET'}); "
          f"peak angles range {ref[:, 0].min():.2f} .. {ref[:, 0].max():.2f} deg")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
