"""plan-move, the earlier search and verification against the present one, timed in one run.

Request: ``scenes/yard_gantry_travel.toml``, move 0, residual swing at most 0.2 deg for rope
lengths 5 to 40 m (the case that took over two minutes).

* Earlier path (rebuilt here from the package's public functions, as plan-move did it before):
  every candidate of :func:`swingsim.study.plan.candidate_moves` at each of 9 rope lengths,
  each variant validated as a whole scene and its move end found by building its motion once
  more, all simulated on the batch engine for 4.5 swing periods of the longest rope after the
  scene's duration; the quickest within 90 % of the bound written as a 0.02 s position table
  and that table simulated by the single-run solver (scipy DOP853) at both ends and the worst
  of 33 lengths.  The earlier refinement round (about 20 more candidates) is left out, so the
  earlier time is if anything too short.
* Present path: :func:`swingsim.study.plan.write_plan` end to end (best-first search with the
  linear screen, verification at 33 lengths, speed reference, plot, text files).

Prints both timings, their ratio, a profile summary of the present path (where its time goes)
and the largest residual swing each path reports for its winner.

With ``--rigged`` it times instead a rigged scene (``scenes/compact_load_short_sling.toml``,
move 0, 0.5 deg over 3-8 m: a hook block and a box tilting on a short sling):

* Earlier path: the best-first search on the scene's full model (the batch engine's hook
  model, some 1,800 steps a run for the box's 0.46 s tilt), the winner and the unshaped move
  verified at 33 lengths (batch engine, the single-run solver at both ends and the worst for the
  winner, measured with the present light rope-angle check; candidate motions built without
  their model, as now: so the earlier time is if anything too short).
* Present path: :func:`swingsim.study.plan.write_plan` end to end (the search on the equivalent
  pendulum, the full model verifying the best in turn).

Usage::

    python benchmarks/bench_plan.py            # both paths (the earlier one takes minutes)
    python benchmarks/bench_plan.py --new-only # the present path and its profile only
    python benchmarks/bench_plan.py --rigged   # the rigged scene, both paths (about two minutes)
"""

from __future__ import annotations

import argparse
import cProfile
import io
import math
import os
import pstats
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
sys.path.insert(0, ROOT)

from swingsim.batch import engine as batch  # noqa: E402
from swingsim.errors import InputError  # noqa: E402
from swingsim.metrics.single import summarize  # noqa: E402
from swingsim.scene import load_scene  # noqa: E402
from swingsim.scene.edit import with_move  # noqa: E402
from swingsim.simulation import prepare, simulate  # noqa: E402
from swingsim.study import plan  # noqa: E402

SCENE = os.path.join(ROOT, "scenes", "yard_gantry_travel.toml")
BOUND, LOW, HIGH = 0.2, 5.0, 40.0
RIGGED_SCENE = os.path.join(ROOT, "scenes", "compact_load_short_sling.toml")
RIGGED_BOUND, RIGGED_LOW, RIGGED_HIGH = 0.5, 3.0, 8.0


def earlier_rigged_path(scene):
    """The earlier plan-move of a rigged scene: best-first search and verification on the full model."""
    search = plan.plan_move(scene, 0, plan.SEARCH_MARGIN * RIGGED_BOUND, RIGGED_LOW, RIGGED_HIGH)
    fine = plan.rope_lengths(RIGGED_LOW, RIGGED_HIGH, 4 * len(search.rope_lengths_m) - 3)
    # the unshaped move at the same lengths, as plan.txt and the plot compare against it
    plan.verify(scene, 0, plan.unshaped_candidate(scene, 0), RIGGED_LOW, RIGGED_HIGH, fine, single=False)
    for c in search.passed[:5]:
        ver = plan.verify(scene, 0, c, RIGGED_LOW, RIGGED_HIGH, fine)
        worst = max(math.inf if v["residual_swing_deg"] is None else v["residual_swing_deg"] for v in ver)
        if worst <= RIGGED_BOUND:
            return c.duration_s, worst
    return math.nan, math.nan


def rigged(args) -> None:
    """Time both rigged-scene paths on the same request and print the ratio."""
    import json

    scene = load_scene(RIGGED_SCENE)
    with tempfile.TemporaryDirectory() as tmp:
        t0, c0 = time.perf_counter(), time.process_time()
        plan.write_plan(scene, 0, RIGGED_BOUND, RIGGED_LOW, RIGGED_HIGH, Path(tmp))
        t_new, c_new = time.perf_counter() - t0, time.process_time() - c0
        res = json.loads((Path(tmp) / "plan.json").read_text())
    p = res["plan"]
    worst = max(v["residual_swing_deg"] for v in p["verified"]) if p else math.nan
    print(f"present path: {t_new:7.2f} s wall, {c_new:7.2f} s CPU  (move {p['duration_s'] if p else math.nan:.2f} s, "
          f"worst verified residual {worst:.3f} deg, {res['full_model_runs']} full-model runs)")
    if args.new_only:
        return
    t0, c0 = time.perf_counter(), time.process_time()
    old_dur, old_res = earlier_rigged_path(scene)
    t_old, c_old = time.perf_counter() - t0, time.process_time() - c0
    print(f"earlier path: {t_old:7.2f} s wall, {c_old:7.2f} s CPU  (move {old_dur:.2f} s, worst verified "
          f"residual {old_res:.3f} deg)")
    print(f"ratio earlier / present: {t_old / t_new:.1f}x wall, {c_old / c_new:.1f}x CPU")


def earlier_path(scene, out: Path):
    """The earlier plan-move: exhaustive search, then a position table verified by single runs."""
    g = scene.gravity_m_s2
    lengths = plan.rope_lengths(LOW, HIGH, 9)
    period = 2 * math.pi * math.sqrt(HIGH / g)
    cands = plan.candidate_moves(scene, 0, LOW, HIGH)
    scenes, owner, ends = [], [], {}
    for i, c in enumerate(cands):
        for L in lengths:
            try:
                sc = with_move(scene, 0, c.move, rope_length_m=L, duration_s=scene.duration_s + 4.5 * period)
            except InputError:
                break
            scenes.append(sc)
            owner.append(i)
            ends[i] = float(prepare(sc)[1].moves[0][1].end_s)  # the move's end, once per variant as before
    worst = {}
    for i, s in zip(owner, batch.run_batch(scenes)):
        r = s["residual_swing_deg"]
        worst[i] = max(worst.get(i, 0.0), math.inf if r is None else r)
    ok = sorted((ends[i], i) for i in worst if worst[i] <= 0.9 * BOUND)
    best = cands[ok[0][1]]
    # the 0.02 s position table and its verification by the single-run solver
    sc = with_move(scene, 0, best.move, duration_s=scene.duration_s + 1e4, validate_motion=False)
    prof = prepare(sc)[1].moves[0][1]
    t = np.union1d(np.linspace(prof.start_s, prof.end_s, int(math.ceil((prof.end_s - prof.start_s) / 0.02)) + 1),
                   [b for b in prof.breakpoints if prof.start_s <= b <= prof.end_s])
    x = prof.evaluate(t)[0]
    (out / "table.csv").write_text("t_s,position_m\n" + "".join(f"{a!r},{b!r}\n" for a, b in
                                                                 zip((t - t[0]).tolist(), x.tolist())))
    table_move = {"label": "planned", "axis": "x", "start_s": float(scene.raw["moves"][0]["start_s"]),
                  "profile": "table", "table_file": "table.csv"}
    fine = plan.rope_lengths(LOW, HIGH, 33)
    vscenes = [with_move(scene, 0, table_move, rope_length_m=L, duration_s=scene.duration_s + 2.5 * period,
                         base_dir=out) for L in fine]
    res = [s["residual_swing_deg"] for s in batch.run_batch(vscenes)]
    k_worst = int(np.argmax(res))
    for k in sorted({0, len(fine) - 1, k_worst}):
        res[k] = summarize(simulate(vscenes[k])).data["residual_swing_deg"]
    return ends[ok[0][1]] - float(scene.raw["moves"][0]["start_s"]), max(res)


def present_path(scene, out: Path):
    """plan-move as it is now, end to end."""
    report = plan.write_plan(scene, 0, BOUND, LOW, HIGH, out)
    import json

    res = json.loads((out / "plan.json").read_text())["plan"]
    return res["duration_s"], max(v["residual_swing_deg"] for v in res["verified"]), report


def main() -> None:
    """Time both paths on the same request and print the ratio and the profile summary."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--new-only", action="store_true", help="time only the present path")
    ap.add_argument("--rigged", action="store_true", help="the rigged scene (hook block, short sling) instead")
    args = ap.parse_args()
    if args.rigged:
        rigged(args)
        return
    scene = load_scene(SCENE)
    with tempfile.TemporaryDirectory() as tmp:
        new_out = Path(tmp) / "new"
        new_out.mkdir()
        prof = cProfile.Profile()
        t0, c0 = time.perf_counter(), time.process_time()
        prof.enable()
        new_dur, new_res, _ = present_path(scene, new_out)
        prof.disable()
        t_new, c_new = time.perf_counter() - t0, time.process_time() - c0
        print(f"present path: {t_new:7.2f} s wall, {c_new:7.2f} s CPU  (move {new_dur:.2f} s, worst verified "
              f"residual {new_res:.3f} deg; the profile adds some overhead)")
        if not args.new_only:
            old_out = Path(tmp) / "old"
            old_out.mkdir()
            t0, c0 = time.perf_counter(), time.process_time()
            old_dur, old_res = earlier_path(scene, old_out)
            t_old, c_old = time.perf_counter() - t0, time.process_time() - c0
            print(f"earlier path: {t_old:7.2f} s wall, {c_old:7.2f} s CPU  (move {old_dur:.2f} s, worst verified "
                  f"residual {old_res:.3f} deg)")
            print(f"ratio earlier / present: {t_old / t_new:.1f}x wall, {c_old / c_new:.1f}x CPU "
                  "(on a shared machine the CPU ratio is the steadier one)")
        buf = io.StringIO()
        pstats.Stats(prof, stream=buf).sort_stats("cumulative").print_stats(
            r"(plan|engine|plots_plan|integrate|registry)\.py:\d+\((plan_move|write_plan|verify|evaluate|"
            r"build_candidate|_refine|run_batch|_integrate|_prepare|_chunk_batch|plan_figure_png|simulate|"
            r"build_motion)\)")
        print("\nwhere the present path's time goes (cumulative, seconds):")
        for line in buf.getvalue().splitlines():
            if ".py:" in line and not line.lstrip().startswith("<") and line.split()[0][0].isdigit():
                parts = line.split()
                print(f"  {float(parts[3]):7.2f}  {parts[-1].split('/')[-1]}")


if __name__ == "__main__":
    main()
