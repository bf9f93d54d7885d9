"""Batch engine vs the single-run solver on a hook block with a rigid load: speed and accuracy.

Scene: ``scenes/panel_bridle_hook_block.toml`` (an invented precast panel on a two-leg
bridle under a heavy hook block, trolley out then slew, wind, 60 s simulated).  The
variants differ in rope length (15-35 m), the trolley's acceleration (0.15-0.6 m/s^2)
and the panel's mass (6-14 t), a seeded random draw.

* Loop: for each variant of a subsample (``--loop``, default 40), the single-run
  solver: :func:`swingsim.simulation.simulate` (scipy ``solve_ivp``, DOP853, rtol 1e-10,
  atol 1e-12, restarted at every breakpoint, with its events), timed alone and with
  :func:`swingsim.metrics.summarize` (the whole summary, what ``compare`` computes per
  variant without the batch engine).  Its time is extrapolated to all variants and
  printed as such.
* Batch: :func:`swingsim.batch.run_batch` on all variants (the whole summary of each).

Both run in this one process, one after the other, timed with ``time.perf_counter``.
Prints both timings, the ratios (the target is 30 or more), the largest differences of
the peak and residual rope angles on the subsample (the target is 0.01 deg) and a
cProfile summary of the batch run (where the time goes).

Usage::

    python benchmarks/bench_batch_hook.py                  # 1,000 variants, loop on 40
    python benchmarks/bench_batch_hook.py --n 200 --loop 10
"""

from __future__ import annotations

import argparse
import cProfile
import io
import os
import pstats
import sys
import time

import numpy as np

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
sys.path.insert(0, ROOT)

from swingsim import load_scene, summarize  # noqa: E402
from swingsim.batch import engine as batch  # noqa: E402
from swingsim.scene import scene_from_dict  # noqa: E402
from swingsim.scene.edit import set_dotted  # noqa: E402
from swingsim.simulation import simulate  # noqa: E402

SCENE = os.path.join(ROOT, "scenes", "panel_bridle_hook_block.toml")
GOAL_RATIO = 30.0
GOAL_DEG = 0.01


def variants(n: int, seed: int = 12):
    """``n`` variants of the panel scene (rope length, trolley acceleration, panel mass)."""
    base = load_scene(SCENE)
    rng = np.random.default_rng(seed)
    out = []
    for _ in range(n):
        d = set_dotted(base.raw, "rope.length_m", float(rng.uniform(15.0, 35.0)))
        d = set_dotted(d, "moves.0.accel_m_s2", float(rng.uniform(0.15, 0.6)))
        d = set_dotted(d, "load.mass_kg", float(rng.uniform(6000.0, 14000.0)))
        out.append(scene_from_dict(d, base_dir=os.path.dirname(SCENE)))
    return out


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--n", type=int, default=1000, help="variants (default 1000)")
    ap.add_argument("--loop", type=int, default=40, help="variants the single-run loop is timed on (default 40)")
    args = ap.parse_args()
    scenes = variants(args.n)
    sub = scenes[:args.loop]

    # the single-run solver, looped over the subsample
    t_sim = t_sum = 0.0
    ref = []
    for sc in sub:
        t0 = time.perf_counter()
        traj = simulate(sc)
        t1 = time.perf_counter()
        ref.append(summarize(traj).data)
        t2 = time.perf_counter()
        t_sim += t1 - t0
        t_sum += t2 - t0
    scale = len(scenes) / len(sub)

    # the batch engine on all variants, profiled
    prof = cProfile.Profile()
    t0 = time.perf_counter()
    prof.enable()
    got = batch.run_batch(scenes)
    prof.disable()
    t_batch = time.perf_counter() - t0

    engines = {g["engine"] for g in got}
    d_pk = max(abs(g["peak_rope_angle_deg"] - s["peak_rope_angle_deg"]) for g, s in zip(got, ref))
    d_res = max(abs(g["residual_rope_angle_deg"] - s["residual_rope_angle_deg"]) for g, s in zip(got, ref))
    d_T = max(abs(g["peak_hook_load_kN"] / s["peak_hook_load_kN"] - 1.0) for g, s in zip(got, ref))
    loop_sim, loop_all = t_sim * scale, t_sum * scale
    print(f"scene: {os.path.basename(SCENE)}, {scenes[0].duration_s:g} s simulated, {len(scenes)} variants "
          f"(rope 15-35 m, trolley acceleration 0.15-0.6 m/s^2, panel 6-14 t)")
    print(f"single-run loop on {len(sub)} variants: simulate {t_sim:.1f} s, with summarize {t_sum:.1f} s "
          f"({t_sum / len(sub):.2f} s a variant)")
    print(f"  extrapolated to {len(scenes)} variants: simulate {loop_sim:.0f} s, with summarize {loop_all:.0f} s")
    print(f"batch engine, {len(scenes)} variants, whole summary: {t_batch:.1f} s "
          f"({1e3 * t_batch / len(scenes):.1f} ms a variant; engines used: {sorted(engines)})")
    print(f"ratio against the loop with summarize (same numbers): {loop_all / t_batch:.0f}x; "
          f"against simulate alone: {loop_sim / t_batch:.0f}x; goal {GOAL_RATIO:g}x: "
          f"{'met' if loop_all / t_batch >= GOAL_RATIO else 'NOT met'}")
    print(f"accuracy on the {len(sub)} looped variants: peak rope angle {d_pk:.2e} deg, residual {d_res:.2e} deg "
          f"(goal {GOAL_DEG} deg: {'met' if max(d_pk, d_res) <= GOAL_DEG else 'NOT met'}); "
          f"peak hook load {100 * d_T:.3f} %")
    stats = pstats.Stats(prof)
    phase = {}
    for (path, _, name), (_, _, _, cum, _) in stats.stats.items():
        if path.endswith("hook_engine.py") and name in ("_prepare", "_integrate", "_measure"):
            phase[name] = phase.get(name, 0.0) + cum
    print(f"phases: preparing the variants {phase.get('_prepare', 0.0):.1f} s (motion, swing modes, rest "
          f"in the wind, one variant at a time), integrating {phase.get('_integrate', 0.0):.1f} s "
          f"(the equations on arrays of variants), measuring {phase.get('_measure', 0.0):.1f} s; "
          "the remaining limit is Python's cost per array operation (a few hundred per right-hand "
          "side, whatever the number of variants) and the per-variant preparation")
    out = io.StringIO()
    pstats.Stats(prof, stream=out).sort_stats("tottime").print_stats(12)
    lines = [ln for ln in out.getvalue().splitlines() if ln.strip()]
    print("where the batch time goes (cProfile, by own time):")
    print("\n".join(lines[2:]))


if __name__ == "__main__":
    main()
