"""Tag lines and the ground: pulls, lift-off, touch-down and the cautions they call for.

Definitions
-----------
On the ground
    Some contact point of the load presses on the ground: the ground's reaction
    (the sum of the contact points' normal forces) is above
    :data:`CONTACT_FRACTION` of the load's weight.  A reaction below it is the
    support's spring letting go, not a load standing on it.
Lift-off
    ``liftoff_time_s``: for a load that starts on the ground, the first sample from
    which it stays off the ground for at least :data:`AIRBORNE_MIN_S`; the drag
    distance is how far its centre of gravity moved in plan before it; the peak
    swing after lift-off is the largest rope angle from its rest direction (the
    summary's swing) from then until touch-down or the end.
Touch-down
    ``touchdown_time_s``: the first sample on the ground after the load has hung
    free (after lift-off, or from a start in the air); the touch-down speed is the
    CG's speed there (its vertical and horizontal parts), the swing at touch-down
    the rope's angle from its rest direction, and the drift the plan distance the CG
    moves along the ground from touch-down to the end of the run.
Tag line pull
    The line's tension; over ``max_pull_N`` the person holding it must let go.  A
    person "under the load" stands inside the load's plan outline widened by
    :data:`UNDER_LOAD_MARGIN_M` while the load is above the hand; the line runs under it
    when a point along it (a quarter, half or three quarters of the way to the hand) is
    inside that outline and below the load's centre of gravity.
"""

from __future__ import annotations

import math

import numpy as np

#: Ground reaction, as a fraction of the load's weight, above which the load counts as on the ground [-].
CONTACT_FRACTION = 0.01
#: Time the load must stay off the ground for lift-off to count [s] (a bounce is not a lift-off).
AIRBORNE_MIN_S = 0.2
#: Margin around the load's plan outline within which a person counts as under the load [m] (our rule).
UNDER_LOAD_MARGIN_M = 0.5
#: Drag along the ground before lift-off that earns a caution [m] (our rule).
DRAG_CAUTION_M = 0.05
#: Plan offset of the hook from the CG at the start that earns a caution [m] (our rule).
OFFSET_CAUTION_M = 0.05


def _first_run(mask, t, min_s):
    """Index of the first sample from which ``mask`` holds for at least ``min_s`` (or to the end)."""
    idx = np.flatnonzero(mask)
    for i in idx:
        stop = np.flatnonzero(~mask[i:])
        end_t = t[i + stop[0]] if len(stop) else math.inf
        if end_t - t[i] >= min_s or not len(stop):
            return int(i)
    return None


def contact_metrics(traj, t, s, swing_deg) -> dict:
    """Summary keys of tag lines and ground contact (empty without either).

    Parameters
    ----------
    traj : Trajectory
        The solved run.
    t : ndarray
        Metric sample times (N,) [s].
    s : dict
        The model's outputs at ``t``.
    swing_deg : ndarray
        The swing (rope angle from its rest direction) at ``t`` [deg].

    Returns
    -------
    dict
        ``tag_lines`` (one row per line), ``peak_tag_line_pull_N``; with ground
        ``liftoff_time_s``, ``drag_distance_m``, ``peak_swing_after_liftoff_deg``,
        ``touchdown_time_s``, ``touchdown_speed_m_s`` and its parts,
        ``touchdown_swing_deg``, ``ground_drift_m``, ``on_ground_at_end`` (module Definitions).
    """
    scene, model = traj.scene, traj.model
    d: dict = {}
    lines = getattr(scene, "tag_lines", ())
    if lines and "tag_line_tension_N" in s:
        pulls = s["tag_line_tension_N"]
        rows = []
        for j, line in enumerate(lines):
            i = int(np.argmax(pulls[:, j]))
            over = np.flatnonzero(pulls[:, j] > line.max_pull_N)
            attach = s["tag_line_attach"][:, j] if "tag_line_attach" in s else None
            under = _under_load(s, np.asarray(line.anchor_m, float), model, attach)
            ui = np.flatnonzero(under)
            rows.append({
                "line": j + 1, "name": line.name(j),
                "peak_pull_N": float(pulls[i, j]), "peak_time_s": float(t[i]),
                "max_pull_N": line.max_pull_N,
                "over_max_pull_from_s": float(t[over[0]]) if len(over) else None,
                "over_max_pull_for_s": float(len(over) / max(len(t) - 1, 1) * (t[-1] - t[0])) if len(over) else 0.0,
                "taut_fraction": float(np.mean(pulls[:, j] > 0.0)),
                "person_under_load_from_s": float(t[ui[0]]) if len(ui) else None,
            })
        d["tag_lines"] = rows
        d["peak_tag_line_pull_N"] = max(r["peak_pull_N"] for r in rows)
    if getattr(scene, "ground", None) is None or "ground_normal_N" not in s:
        return d
    W = model.load_mass_kg * model.gravity_m_s2
    on = s["ground_normal_N"] > CONTACT_FRACTION * W
    G = s["load"]
    d["ground_z_m"] = scene.ground.z_m
    d["starts_on_ground"] = bool(scene.start.on_ground)
    d["load_offset_m"] = list(scene.start.load_offset_m) if scene.start.on_ground else None
    d["rope_stiffness_assumed"] = bool(getattr(model, "rope_stiffness_assumed", False))
    lift = None
    if on[0]:
        lift = _first_run(~on, t, AIRBORNE_MIN_S)
    d["liftoff_time_s"] = None if lift is None else float(t[lift])
    d["drag_distance_m"] = (float(np.max(np.hypot(*(G[:lift + 1, :2] - G[0, :2]).T))) if lift is not None
                            else (float(np.max(np.hypot(*(G[:, :2] - G[0, :2]).T))) if on[0] else None))
    start_air = lift if lift is not None else (0 if not on[0] else None)
    touch = None
    if start_air is not None:
        after = np.flatnonzero(on[start_air:])
        touch = int(start_air + after[0]) if len(after) else None
    d["touchdown_time_s"] = None if touch is None else float(t[touch])
    d["on_ground_at_end"] = bool(on[-1])
    if lift is not None:
        end = touch if touch is not None else len(t)
        k = lift + int(np.argmax(swing_deg[lift:end]))
        d["peak_swing_after_liftoff_deg"] = float(swing_deg[k])
        d["peak_swing_after_liftoff_time_s"] = float(t[k])
        hor = G[lift:end, :2] - s["suspension"][lift:end, :2]
        d["peak_excursion_after_liftoff_m"] = float(np.max(np.hypot(hor[:, 0], hor[:, 1])))
    else:
        d["peak_swing_after_liftoff_deg"] = None
    if touch is not None:
        # just before the contact took hold: the speed it lands with
        i = max(touch - 1, 0)
        v = s["load_vel"][i]
        d["touchdown_speed_m_s"] = float(np.linalg.norm(v))
        d["touchdown_vertical_speed_m_s"] = float(-v[2])
        d["touchdown_horizontal_speed_m_s"] = float(math.hypot(v[0], v[1]))
        d["touchdown_swing_deg"] = float(swing_deg[touch])
        d["ground_drift_m"] = float(np.max(np.hypot(*(G[touch:, :2] - G[touch, :2]).T)))
    return d


def _under_load(s, anchor, model, attach=None) -> np.ndarray:
    """Samples where the hand at ``anchor``, or the line to it, is under the load (module Definitions).

    The hand and three points along the line (a quarter, half and three quarters of the way
    from the attachment) are tested against the load's plan outline widened by
    :data:`UNDER_LOAD_MARGIN_M`, below the load's centre of gravity.
    """
    G = s["load"]
    R = s.get("load_rotation")
    points = [np.broadcast_to(anchor, G.shape)]
    if attach is not None:
        points += [attach + f * (anchor[None, :] - attach) for f in (0.25, 0.5, 0.75)]
    under = np.zeros(len(G), dtype=bool)
    boxed = R is not None and model.rigid_load and model.scene.load.size_m is not None
    for p in points:
        rel = p - G
        if boxed:
            local = np.einsum("nji,nj->ni", R, rel)  # R^T (p - G)
            half = 0.5 * np.asarray(model.scene.load.size_m, float)
            inside = (np.abs(local[:, 0]) < half[0] + UNDER_LOAD_MARGIN_M) & \
                     (np.abs(local[:, 1]) < half[1] + UNDER_LOAD_MARGIN_M)
        else:
            size = model.scene.load.size_m
            r = 0.5 * max(size[:2]) if size else 0.0
            inside = np.hypot(rel[:, 0], rel[:, 1]) < r + UNDER_LOAD_MARGIN_M
        under |= inside & (G[:, 2] > p[:, 2])
    return under


def contact_warnings(s: dict, scene) -> list[str]:
    """Cautions about tag lines, lift-off and landing.

    Parameters
    ----------
    s : dict
        The summary (with the keys of :func:`contact_metrics`).
    scene : Scene
        Its scene.

    Returns
    -------
    list of str
        One sentence per caution.
    """
    out = []
    for r in s.get("tag_lines") or []:
        name = r["name"][0].upper() + r["name"][1:]
        if r["over_max_pull_from_s"] is not None:
            out.append(f"{name} pulls up to {r['peak_pull_N']:.0f} N ({r['peak_pull_N'] / 9.80665:.0f} kgf) at "
                       f"t = {r['peak_time_s']:.1f} s, more than the {r['max_pull_N']:.0f} N one person can hold "
                       f"(from t = {r['over_max_pull_from_s']:.1f} s): the line cannot be held; the person must let "
                       "go, never be pulled along or wrap the line around a hand. Reduce the swing or the wind on "
                       "the load, or plan more hands or a fixed snubbing point as the lift plan says.")
        if r["person_under_load_from_s"] is not None:
            out.append(f"{name} runs under the load, or the person holding it stands there, from t = "
                       f"{r['person_under_load_from_s']:.1f} s: nobody may stand or reach under a suspended load "
                       "(common practice); tie the line where it leads away from the load and keep the person "
                       "out from under its path.")
    if s.get("rope_stiffness_assumed"):
        out.append("Ground contact needs an elastic hoist rope: its stiffness is assumed here (the hanging "
                   "weight stretches it 0.4 %); the lift-off snatch and the bounce depend on it: give "
                   "rope.stiffness_kN_per_m or rope.modulus_GPa from the rope maker's data.")
    if "liftoff_time_s" not in s:
        return out
    off = s.get("load_offset_m")
    if s.get("starts_on_ground"):
        if s["liftoff_time_s"] is None:
            out.append("The load never lifts off in the simulated time: the hoist does not pull its weight "
                       "into the rope.")
        elif off is not None and math.hypot(*off) >= OFFSET_CAUTION_M:
            sw = s.get("peak_swing_after_liftoff_deg") or 0.0
            ex = s.get("peak_excursion_after_liftoff_m")
            out.append(f"The hook is {math.hypot(*off):.2f} m out of plumb over the load's centre of gravity: "
                       f"at lift-off (t = {s['liftoff_time_s']:.1f} s) the load kicks sideways and swings up to "
                       f"{sw:.1f} deg" + ("" if ex is None else f", {ex:.2f} m from the plumb") +
                       ". Plumb the hook over the centre of gravity before lifting (common practice) and keep "
                       "everyone clear of the load's path.")
        drag = s.get("drag_distance_m")
        if drag is not None and drag > DRAG_CAUTION_M:
            out.append(f"The load drags {drag:.2f} m along the ground before it lifts off: it can catch, tip "
                       "or crush; plumb the hook and take the weight slowly.")
    td = s.get("touchdown_time_s")
    if td is not None:
        sw = s.get("touchdown_swing_deg") or 0.0
        if sw > scene.limits.settle_deg:
            out.append(f"The load touches down at t = {td:.1f} s while still swinging {sw:.1f} deg (settle "
                       f"limit {scene.limits.settle_deg:g} deg), moving {s['touchdown_horizontal_speed_m_s']:.2f} "
                       f"m/s sideways: it slides {s['ground_drift_m']:.2f} m and may tip. Let the swing settle "
                       "before landing and keep hands and feet clear of the landing spot.")
        elif s.get("ground_drift_m") and s["ground_drift_m"] > DRAG_CAUTION_M:
            out.append(f"After touch-down at t = {td:.1f} s the load slides {s['ground_drift_m']:.2f} m along the "
                       "ground.")
    return out


def contact_text(d: dict) -> list[str]:
    """Lines of ``summary.txt`` for tag lines and the ground.

    Parameters
    ----------
    d : dict
        The summary.

    Returns
    -------
    list of str
        Indented lines (empty without tag lines or ground).
    """
    w = []
    for r in d.get("tag_lines") or []:
        w.append(f"  {r['name'][0].upper() + r['name'][1:]}: peak pull {r['peak_pull_N']:.0f} N "
                 f"({r['peak_pull_N'] / 9.80665:.0f} kgf) at t = {r['peak_time_s']:.1f} s; one person holds "
                 f"{r['max_pull_N']:.0f} N" + ("  << CANNOT BE HELD" if r["over_max_pull_from_s"] is not None else ""))
    if "liftoff_time_s" in d:
        if d.get("starts_on_ground"):
            lo = d["liftoff_time_s"]
            w.append("  Lift-off: " + ("never, in the simulated time" if lo is None else
                                       f"t = {lo:.2f} s after dragging {1000 * (d['drag_distance_m'] or 0):.0f} mm; "
                                       f"peak swing after it {d['peak_swing_after_liftoff_deg']:.1f} deg"))
        td = d.get("touchdown_time_s")
        if td is not None:
            w.append(f"  Touch-down: t = {td:.2f} s at {d['touchdown_speed_m_s']:.2f} m/s "
                     f"({d['touchdown_vertical_speed_m_s']:.2f} down, {d['touchdown_horizontal_speed_m_s']:.2f} "
                     f"sideways), swinging {d['touchdown_swing_deg']:.1f} deg; drift along the ground "
                     f"{d['ground_drift_m']:.2f} m")
        elif not d.get("starts_on_ground") or d.get("liftoff_time_s") is not None:
            w.append("  Touch-down: none in the simulated time")
    return w

