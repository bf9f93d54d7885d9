"""`swingsim compare` end to end against a hand-written solve_ivp loop; and a 100,000-variant sweep's memory.

The study: a point-mass load under a tower-crane trolley making one trapezoid
move of 15 m (an invented scene), 60 s simulated, swept over rope length (25
values, 5-35 m) x acceleration (20 values, 0.1-1.0 m/s^2) x speed (20 values,
0.5-2.0 m/s): 10,000 variants.

* **compare**: ``python -m swingsim compare SWEEP --out DIR --no-sensitivity
  --quiet`` in a fresh interpreter (imports, sweep loading, the batch engine,
  comparison.csv, ranking.csv and report.html included), timed by wall clock
  and by the child process's CPU time (``resource.getrusage``).
* **loop**: the script a practitioner writes: the planar pendulum
  ``theta'' = -(g sin(theta) + a(t) cos(theta)) / L`` by hand, the trolley's
  trapezoid acceleration ``a(t)`` by hand, one ``scipy.integrate.solve_ivp``
  (DOP853, rtol 1e-8, atol 1e-10) per variant over 0-60 s with ``t_eval`` at
  100 Hz (a sample every 0.01 s: the peak read off the samples is within about 1e-3 deg of
  the true one for these periods), then the peak and the residual rope angle (largest after the move
  ends) from the samples.  Timed on a seeded random subsample (``--loop``,
  default 300 variants) and extrapolated linearly to all variants (said in
  the output); the loop's cost per variant does not depend on the others.

Prints both timings (wall and CPU), the ratios (target >= 50, aim 100), the
largest differences of the peak and residual rope angles between the
comparison's table and the loop (target <= 0.01 deg), the CPU time of each
phase (imports, loading, engine with the CSV, report, and the report's figure
drawing on its own), a cProfile top-15 of the command and the remaining
limit.  ``--memory`` also runs a 100,000-variant sweep (``--allow-implausible``)
in a fresh interpreter and prints its peak resident memory (target < 2 GB)
and the table's size.

Usage::

    python benchmarks/bench_compare.py                # 10,000 variants, loop on 300 of them
    python benchmarks/bench_compare.py --memory       # and the 100,000-variant sweep
"""

from __future__ import annotations

import argparse
import cProfile
import csv
import io
import math
import os
import pstats
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from scipy.integrate import solve_ivp

ROOT = Path(__file__).resolve().parent.parent
G = 9.80665  # standard gravity [m/s^2], the scene's default (ISO 80000-3)

BASE = """# Invented benchmark scene: a trolley move under a tower crane.
title = "Benchmark: trolley move under a tower crane (invented)"
duration_s = 60.0
[crane]
suspension_m = [25.0, 0.0, 40.0]
[rope]
length_m = 15.0
[load]
mass_kg = 3000.0
[[moves]]
axis = "radius"
profile = "trapezoid"
start_s = 1.0
distance_m = 15.0
speed_m_s = 1.0
accel_m_s2 = 0.4
"""

SWEEP = """base = "base.toml"
title = "Benchmark sweep: rope length x acceleration x speed (invented)"
sensitivity = false
[vary]
"rope.length_m" = {{ from = 5.0, to = 35.0, count = {n_l} }}
"moves.0.accel_m_s2" = {{ from = 0.1, to = 1.0, count = {n_a} }}
"moves.0.speed_m_s" = {{ from = 0.5, to = 2.0, count = {n_v} }}
"""


REMAINING_LIMIT = """remaining limit (what 100x would need): about 3.1-3.8 s CPU end to end, of which the batch
engine is some 70 %.  Fixed: the interpreter and imports (numpy and swingsim: about 0.3 s; neither
scipy nor matplotlib is imported: the report's figures are drawn by swingsim.report.raster on Pillow,
about 0.2 s for the four), loading the sweep (one validated scene per group and per move
combination, 425 here: about 0.2 s).  Variable: the engine's fixed-step DOP853 (about 1.2 s: 13
right-hand sides per step, each some 60 numpy operations on the arrays of one chunk; compute-bound,
since halving or doubling the chunk changes little; no work on padding: a chunk runs longest runs
first and a step integrates only the variants still running), the dense samples and the measuring
(about 0.8 s), comparison.csv (about 0.2 s: repr of 230,000 floats and a CRC-32 per row).  100x
needs roughly 2.8 s here: the right-hand side and the stage sums compiled into one loop per
variant (a few operations per step instead of ~800 array calls), or fewer steps per period, which
the 60 deg swings of tests/test_batch.py do not allow (no accuracy margin at 12 steps)."""


def write_study(folder: Path, n_l=25, n_a=20, n_v=20) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    (folder / "base.toml").write_text(BASE)
    p = folder / "sweep.toml"
    p.write_text(SWEEP.format(n_l=n_l, n_a=n_a, n_v=n_v))
    return p


def trapezoid(start, distance, speed, accel):
    """Times of a symmetric trapezoid (triangle when the speed is not reached): start, end of accel, start of decel, end."""
    t_acc = speed / accel
    if speed * t_acc > distance:  # never reaches the speed: a triangle
        t_acc = math.sqrt(distance / accel)
        cruise = 0.0
    else:
        cruise = (distance - speed * t_acc) / speed
    return start, start + t_acc, start + t_acc + cruise, start + 2 * t_acc + cruise


def loop_one(L, accel, speed, distance=15.0, start=1.0, duration=60.0):
    """The hand-written script: peak and residual rope angle [deg] of one variant."""
    t0, t1, t2, t3 = trapezoid(start, distance, speed, accel)

    def a(t):
        if t0 <= t < t1:
            return accel
        if t2 <= t < t3:
            return -accel
        return 0.0

    def rhs(t, y):
        th, w = y
        return (w, -(G * math.sin(th) + a(t) * math.cos(th)) / L)

    t = np.linspace(0.0, duration, int(duration * 100) + 1)
    sol = solve_ivp(rhs, (0.0, duration), (0.0, 0.0), method="DOP853", rtol=1e-8, atol=1e-10, t_eval=t)
    ang = np.degrees(np.abs(sol.y[0]))
    return float(ang.max()), float(ang[t >= t3].max())


def run_compare(sweep: Path, out: Path, extra=()):
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    r = subprocess.run([sys.executable, "-m", "swingsim", "compare", str(sweep), "--out", str(out), "--force",
                        "--no-sensitivity", "--quiet", *extra], env=env, capture_output=True, text=True)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if r.returncode != 0:
        raise SystemExit(f"swingsim compare failed ({r.returncode}): {r.stderr.strip()}")
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu, after.ru_maxrss / 1024.0  # ru_maxrss is in KiB on Linux


def phases(sweep: Path, out: Path):
    """CPU time of each phase of the comparison in this process (no profiler: it would distort them)."""
    sys.path.insert(0, str(ROOT))
    c = time.process_time
    t0 = c()
    from swingsim.report import html
    from swingsim.study import compare as cmp
    from swingsim.study.variants import load_sweep

    spent = {"imports (swingsim, numpy, Pillow for the figures; neither scipy nor matplotlib is needed)": c() - t0}

    def timed(name, fn):
        def run(*a, **kw):
            t = c()
            try:
                return fn(*a, **kw)
            finally:
                spent[name] = spent.get(name, 0.0) + c() - t
        return run

    real_run, real_html, real_rank = cmp.run_chunks, html.comparison_html, cmp.rank
    real_heat, real_qty = html.heatmap_figure, html.quantity_figure
    cmp.run_chunks = timed("batch engine (prepare, integrate, measure) + streamed CSV rows", real_run)
    html.comparison_html = timed("report.html (figures and tables)", real_html)
    html.heatmap_figure = timed("  of which drawing the figures (heat map + one per varied key, PNG)", real_heat)
    html.quantity_figure = timed("  of which drawing the figures (heat map + one per varied key, PNG)", real_qty)
    cmp.rank = timed("ranking", real_rank)
    try:
        t = c()
        sw = load_sweep(sweep)
        spent["load and validate the sweep (columnar)"] = c() - t
        t = c()
        cmp.compare(sw, out, force=True, sensitivity=False)
        total = c() - t
    finally:
        cmp.run_chunks, html.comparison_html, cmp.rank = real_run, real_html, real_rank
        html.heatmap_figure, html.quantity_figure = real_heat, real_qty
    inner = sum(v for k, v in spent.items() if not k.startswith(("imports", "load", "  ")))
    spent["the rest (ranking.csv, folder handling)"] = total - inner
    return spent


def profile_command(sweep: Path, out: Path, top=15):
    """cProfile of ``swingsim compare`` in a fresh interpreter (imports included): the top entries by own time."""
    stats = out.parent / "compare.prof"
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    subprocess.run([sys.executable, "-m", "cProfile", "-o", str(stats), "-m", "swingsim", "compare", str(sweep),
                    "--out", str(out), "--force", "--no-sensitivity", "--quiet"], env=env, check=True,
                   capture_output=True)
    buf = io.StringIO()
    pstats.Stats(str(stats), stream=buf).strip_dirs().sort_stats("tottime").print_stats(top)
    text = buf.getvalue()
    return text[text.index("   ncalls"):] if "   ncalls" in text else text


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--loop", type=int, default=300, help="variants of the loop's random subsample")
    ap.add_argument("--memory", action="store_true", help="also run the 100,000-variant sweep")
    ap.add_argument("--no-profile", action="store_true", help="skip the phases and the profile")
    a = ap.parse_args(argv)
    with tempfile.TemporaryDirectory(prefix="bench-compare-") as tmp:
        tmp = Path(tmp)
        # an installed package has its bytecode compiled (pip does it); a checkout may not (e.g. with
        # PYTHONDONTWRITEBYTECODE set), and compiling ~150 modules would be timed with the command
        subprocess.run([sys.executable, "-m", "compileall", "-q", str(ROOT / "swingsim")], check=True)
        sweep = write_study(tmp / "s10k")
        n = 25 * 20 * 20
        print(f"{n} variants, 60 s each, point-mass load, one trapezoid trolley move "
              f"(rope length x acceleration x speed); swingsim's bytecode compiled first, as installed")
        print("machine load (1, 5, 15 min) at the start: " + ", ".join(f"{x:.2f}" for x in os.getloadavg())
              + f" on {os.cpu_count()} CPUs (CPU-time ratios are steadier than wall-clock ones on a shared machine)")
        wall_c, cpu_c, rss = run_compare(sweep, tmp / "out")
        print(f"swingsim compare (end to end, report included): {wall_c:7.2f} s wall, {cpu_c:7.2f} s CPU, "
              f"peak RSS {rss:.0f} MB")

        rows = list(csv.DictReader(open(tmp / "out" / "comparison.csv", encoding="utf-8")))
        rng = np.random.default_rng(12)
        pick = np.sort(rng.choice(n, size=min(a.loop, n), replace=False))
        c0, t0 = time.process_time(), time.perf_counter()
        ref = []
        for i in pick:
            r = rows[i]
            ref.append(loop_one(float(r["rope.length_m"]), float(r["moves.0.accel_m_s2"]),
                                float(r["moves.0.speed_m_s"])))
        wall_l, cpu_l = time.perf_counter() - t0, time.process_time() - c0
        scale = n / len(pick)
        print(f"solve_ivp loop (hand-written planar pendulum, DOP853 rtol 1e-8): {wall_l:.2f} s wall, "
              f"{cpu_l:.2f} s CPU on a random subsample of {len(pick)} variants; EXTRAPOLATED linearly to "
              f"{n}: {wall_l * scale:.1f} s wall, {cpu_l * scale:.1f} s CPU")
        for what, loop_t, cmp_t in (("wall", wall_l * scale, wall_c), ("CPU", cpu_l * scale, cpu_c)):
            ratio = loop_t / cmp_t
            verdict = "MET" if ratio >= 50 else "NOT MET"
            print(f"speed-up ({what}): {ratio:7.1f} x   (target >= 50: {verdict}; aim 100: "
                  f"{'MET' if ratio >= 100 else 'not yet'})")
        ref = np.array(ref)
        got = np.array([[float(rows[i]["peak_rope_angle_deg"]), float(rows[i]["residual_rope_angle_deg"])]
                        for i in pick])
        d = np.abs(got - ref)
        print(f"largest |difference| against the loop: peak {d[:, 0].max():.2e} deg, residual "
              f"{d[:, 1].max():.2e} deg (target <= 0.01 deg: {'MET' if d.max() <= 0.01 else 'NOT MET'}); "
              f"peak angles {ref[:, 0].min():.2f} .. {ref[:, 0].max():.2f} deg")
        if not a.no_profile:
            print("\nwhere the time goes (CPU seconds of each phase, the comparison run again in this process):")
            for name, sec in phases(sweep, tmp / "prof").items():
                print(f"  {sec:6.2f} s  {name}")
            print("\nswingsim compare under cProfile (fresh interpreter, top 15 by own time; the profiler "
                  "slows small calls most):")
            print(profile_command(sweep, tmp / "prof-cli"))
            print(REMAINING_LIMIT)
        if a.memory:
            big = write_study(tmp / "s100k", n_l=50, n_a=50, n_v=40)
            wall_m, cpu_m, rss_m = run_compare(big, tmp / "out100k", extra=("--allow-implausible",))
            size = (tmp / "out100k" / "comparison.csv").stat().st_size / 1e6
            print(f"100,000 variants: {wall_m:.1f} s wall, {cpu_m:.1f} s CPU, peak RSS {rss_m:.0f} MB "
                  f"(target < 2048 MB: {'MET' if rss_m < 2048 else 'NOT MET'}); comparison.csv {size:.1f} MB "
                  "written chunk by chunk")
        print("machine load (1, 5, 15 min) at the end: " + ", ".join(f"{x:.2f}" for x in os.getloadavg()))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
