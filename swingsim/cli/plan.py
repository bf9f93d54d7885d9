"""``swingsim plan-move SCENE --move N --max-residual-deg X --rope-range LOW:HIGH``.

Finds the shortest move (see :mod:`swingsim.study.plan`) whose residual swing
stays under X degrees for every rope length from LOW to HIGH metres, writes it
as a ``table`` profile the scene can use, verifies that table by simulating it
with the single-run solver at rope lengths between and at the search lengths,
and compares it with the move as the scene has it.

Writes into ``--out`` (default ``<scene>-plan``):

``move<N>-plan.csv``
    The profile: header ``t_s,position_m`` (``t_s,angle_deg`` for slew), time
    from the move's start, displacement from its start.
``move<N>-plan.toml``
    A ``[[moves]]`` snippet to paste into the scene in place of move N.
``plan.txt``, ``plan.json``
    The comparison with the scene's own move, the verification, the caution.
"""

from __future__ import annotations

import json
import math
import os
from pathlib import Path

from swingsim.metrics import cautions
from swingsim.errors import InputError
from swingsim.scene import load_scene, scene_from_dict

#: The search keeps this share of the bound in hand, for rope lengths between its samples.
SEARCH_MARGIN = 0.9


def _parse_range(text: str):
    try:
        lo, hi = (float(x) for x in text.split(":"))
    except ValueError:
        raise InputError("--rope-range", "value", "expected LOW:HIGH in metres, e.g. 8:20", text) from None
    return lo, hi


def add_arguments(p):
    p.add_argument("scene", help="scene file (TOML)")
    p.add_argument("--move", type=int, required=True, metavar="N", help="index of the move to plan (from 0)")
    p.add_argument("--max-residual-deg", type=float, required=True, metavar="X",
                   help="largest residual swing allowed after the move [deg]")
    p.add_argument("--rope-range", required=True, metavar="LOW:HIGH",
                   help="rope lengths the plan must cover [m], e.g. 8:20")
    p.add_argument("--out", metavar="DIR", help="output folder (default: <scene name>-plan)")
    p.add_argument("--force", action="store_true",
                   help="write into a non-empty output folder, replacing only this command's files")
    p.add_argument("--quiet", action="store_true", help="print nothing but errors")


def _verify(scene, index, table_name, out_dir, lengths, snippet_move):
    """Simulate the scene with the written table at each rope length.

    Every length with the batch engine; the two ends and the worst length
    once more with the single-run solver (scipy DOP853 at tight tolerance),
    whose result is then the one reported for that length.
    """
    from swingsim.batch import engine as batch
    from swingsim.metrics.single import summarize
    from swingsim.simulation import simulate

    g = scene.gravity_m_s2
    extra = 2.5 * 2 * math.pi * math.sqrt(max(lengths) / g)
    scenes = []
    for L in lengths:
        d = dict(scene.raw)
        d["moves"] = list(scene.raw["moves"])
        d["moves"][index] = dict(snippet_move, table_file=table_name)
        d["rope"] = dict(scene.raw["rope"], length_m=float(L))
        d["duration_s"] = scene.duration_s + extra
        scenes.append(scene_from_dict(d, file=scene.file, base_dir=out_dir))
    res = []
    for L, s in zip(lengths, batch.run_batch(scenes)):
        res.append({"rope_length_m": L, "residual_swing_deg": s["residual_swing_deg"],
                    "peak_rope_angle_deg": s["peak_rope_angle_deg"], "valid": s["valid"],
                    "solver": s["engine"]})
    worst = max(range(len(res)), key=lambda k: -1.0 if res[k]["residual_swing_deg"] is None
                else res[k]["residual_swing_deg"])
    for k in sorted({0, len(res) - 1, worst}):
        s = summarize(simulate(scenes[k])).data
        res[k].update({"residual_swing_deg": s["residual_swing_deg"], "valid": s["valid"],
                       "peak_rope_angle_deg": s["peak_rope_angle_deg"], "solver": "single"})
    return res


def table_limits(t, x):
    """Peak speed and acceleration of a table profile as the scene will interpolate it."""
    import numpy as np

    from swingsim.motion.profiles import from_table

    p = from_table(0.0, t, x)
    tt = np.linspace(0.0, float(t[-1]), 20 * len(t) + 1)
    _, v, a = p.evaluate(tt)
    return float(np.max(np.abs(v))), float(np.max(np.abs(a)))


def main(args) -> int:
    from swingsim.study import plan as planning
    from swingsim.io.files import atomic_write_text, check_out_dir

    scene = load_scene(args.scene)
    lo, hi = _parse_range(args.rope_range)
    X = float(args.max_residual_deg)
    planning.check_request(scene, args.move, X, lo, hi)
    out = Path(args.out) if args.out else Path(Path(args.scene).stem + "-plan")
    check_out_dir(out, args.force)
    idx = args.move
    best, cands, lengths = planning.plan_move(scene, idx, X * SEARCH_MARGIN, lo, hi)
    fine = planning.rope_lengths(lo, hi, 4 * len(lengths) - 3)
    raw = scene.raw["moves"][idx]
    slew = raw["axis"] == "slew"
    unit = "deg" if slew else "m"
    # the scene's own move, for comparison
    own = planning.Candidate("the scene's move as given", dict(raw))
    planning.evaluate(scene, idx, [own], fine)
    table_name = f"move{idx}-plan.csv"
    snippet = {k: raw[k] for k in ("label", "axis", "start_s") if k in raw}
    snippet["profile"] = "table"
    verified, chosen = None, None
    tried = [c for c in cands if c.worst_residual_deg <= X * SEARCH_MARGIN][:5]
    for c in tried:
        t, x = planning.sample_profile(scene, idx, c.move)
        head = "t_s,angle_deg" if slew else "t_s,position_m"
        text = head + "\n" + "".join(f"{a!r},{b!r}\n" for a, b in zip(t.tolist(), x.tolist()))
        atomic_write_text(out / table_name, text)
        ver = _verify(scene, idx, table_name, out, fine, snippet)
        peaks = table_limits(t, x)
        if all(v["valid"] and v["residual_swing_deg"] is not None and v["residual_swing_deg"] <= X for v in ver):
            verified, chosen = ver, c
            break
    lines = [cautions.CAUTION, "",
             f"Plan for move {idx} ({scene.moves[idx].name}) of {scene.name}: residual swing at most {X:g} deg "
             f"for rope lengths {lo:g} to {hi:g} m.", ""]
    result = {"scene": scene.name, "move": idx, "max_residual_deg": X, "rope_range_m": [lo, hi],
              "caution": cautions.CAUTION}
    own_d = own.end_s - float(raw.get("start_s", 0.0))
    lines.append(f"Scene's move as given ({raw['profile']}): {own_d:.2f} s, residual swing "
                 f"{min(own.residuals_deg):.3f} to {max(own.residuals_deg):.3f} deg over the range.")
    result["given"] = {"profile": raw["profile"], "duration_s": own_d,
                       "residual_swing_deg": dict(zip(fine, own.residuals_deg))}
    if chosen is None:
        if (out / table_name).exists():
            (out / table_name).unlink()
        lines.append("")
        lines.append(f"No profile in the search meets {X:g} deg over the whole range within the move's "
                     "limits. Narrow the rope range, allow more residual swing, or plan the move in stages.")
        result["plan"] = None
        code = 1
    else:
        dur = chosen.end_s - float(raw.get("start_s", 0.0))
        speed_key = "speed_deg_s" if slew else "speed_m_s"
        acc_key = "accel_deg_s2" if slew else "accel_m_s2"
        lines += [f"Planned: {chosen.label}: {dur:.2f} s ({dur - own_d:+.2f} s against the given move).",
                  f"Verified by simulating the written table (nonlinear model) at {len(verified)} rope "
                  "lengths: batch engine at all, single-run solver (*) at both ends and the worst:"]
        for v in verified:
            star = "*" if v["solver"] == "single" else " "
            lines.append(f"  rope {v['rope_length_m']:7.2f} m{star} residual swing "
                         f"{v['residual_swing_deg']:.3f} deg, peak rope angle {v['peak_rope_angle_deg']:.2f} deg")
        lines.append(f"The table as the scene interpolates it: peak speed {peaks[0]:.6g} {unit}/s (limit "
                     f"{raw[speed_key]:g}), peak acceleration {peaks[1]:.4g} {unit}/s^2 (limit {raw[acc_key]:g}).")
        toml = [f"# Planned by swingsim plan-move: {chosen.label}.",
                f"# Residual swing <= {X:g} deg for rope lengths {lo:g} to {hi:g} m (verified by simulation).",
                "# " + cautions.CAUTION_SHORT,
                "# Replace move " + str(idx) + " of the scene with this table (table_file is relative to "
                "the scene file: copy the CSV beside it, or adjust the path).",
                "[[moves]]"]
        for k, v in snippet.items():
            toml.append(f"{k} = {json.dumps(v)}")
        rel = os.path.relpath(out / table_name, Path(args.scene).parent)
        toml.append(f"table_file = {json.dumps(Path(rel).as_posix())}")
        atomic_write_text(out / f"move{idx}-plan.toml", "\n".join(toml) + "\n")
        result["plan"] = {"label": chosen.label, "duration_s": dur, "move": chosen.move,
                          "table_file": table_name, "verified": verified,
                          "table_peak_speed": peaks[0], "table_peak_accel": peaks[1]}
        code = 0
    lines += ["", cautions.CAUTION]
    atomic_write_text(out / "plan.txt", "\n".join(lines) + "\n")
    atomic_write_text(out / "plan.json", json.dumps(result, indent=2, default=float) + "\n")
    if not args.quiet:
        print("\n".join(lines[2:]))
        print(f"-> {out}/")
    return code
