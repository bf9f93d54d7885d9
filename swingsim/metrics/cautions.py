"""The safety caution and the scenario warnings, in one place.

Every text output, plot, report and video carries :data:`CAUTION` (or
:data:`CAUTION_SHORT` where space is short).  Scenario warnings are built by
:func:`scenario_warnings` from a summary; their thresholds are rules of thumb
that a scene can override (see ``constants.py``).
"""

from __future__ import annotations

CAUTION = (
    "CAUTION: planning and training preview only. These results do not replace the lift plan, "
    "the crane manufacturer's load charts and wind limits, or the judgement of the competent "
    "person supervising the lift; local regulations govern."
)

CAUTION_SHORT = ("Preview only - does not replace the lift plan, the manufacturer's charts "
                 "or the competent person; local regulations govern.")


def _f(x, nd=1):
    return f"{x:.{nd}f}"


def scenario_warnings(s: dict, scene) -> list[str]:
    """Warnings a lift planner expects, from a run's summary.

    Parameters
    ----------
    s : dict
        The summary's data (peak rope angle [deg], settling [s], tensions [kN] ...).
    scene : Scene
        Its scene (limits, wind, rope).

    Returns
    -------
    list of str
        One sentence per warning, in the order of the checks.
    """
    out = []
    lim = scene.limits
    if not s.get("valid", True):
        out.append("RESULT INVALID: " + s.get("invalid_reason", "the run stopped early") +
                   " Do not use the numbers below that instant.")
    pk = s.get("peak_rope_angle_deg")
    if pk is not None and pk > lim.swing_caution_deg:
        src = ("set in the scene" if "swing_caution_deg" in scene.raw.get("limits", {})
               else "a rule-of-thumb default")
        out.append(f"Peak rope angle {_f(pk)} deg exceeds the caution angle of "
                   f"{lim.swing_caution_deg:g} deg ({src}; the permitted off-vertical "
                   "and side-load angles come from the crane manufacturer).")
    w = scene.wind.speed_m_s
    wl = scene.crane.wind_limit_m_s
    if w > wl:
        out.append(f"Wind {w:g} m/s exceeds the in-service limit of {wl:g} m/s assumed for this crane"
                   + (" (a rule-of-thumb default: set crane.wind_limit_m_s from the manufacturer's data)"
                      if "wind_limit_m_s" not in scene.raw.get("crane", {}) else "")
                   + ": lifting should not go ahead.")
    elif w > 0.8 * wl:
        out.append(f"Wind {w:g} m/s is within 20% of the in-service limit of {wl:g} m/s: gusts may "
                   "exceed it; follow the lift plan's wind procedure.")
    if s.get("moves", 0):
        at_end = s.get("swing_at_move_end_deg")
        st = s.get("settle_time_s")
        if at_end is not None and at_end > lim.settle_deg:
            if st is None:
                out.append(f"The load is still swinging {_f(at_end)} deg when the last move ends and does "
                           f"not settle below {lim.settle_deg:g} deg within the simulated time: do not "
                           "land it until the swing has been brought under control.")
            else:
                out.append(f"The load is still swinging {_f(at_end)} deg when the last move ends; it "
                           f"takes {_f(st)} s to settle below {lim.settle_deg:g} deg.")
    ex = s.get("peak_excursion_m")
    if lim.clearance_m is not None and ex is not None and ex > lim.clearance_m:
        out.append(f"The load strays {ex:.3f} m from the plumb line, beyond the declared clearance "
                   f"of {lim.clearance_m:.3f} m.")
    for z in s.get("zones", []):
        if z["inside"]:
            who = ", ".join(z.get("entered_by") or ["load"])
            out.append(f"Parts of the suspended system ({who}) {'pass over' if z['kind'] == 'exclusion' else 'touch'} "
                       f"{z['kind']} '{z['name']}' (from t = {z.get('first_entry_s') or z['first_within_margin_s']:.1f} s).")
        elif z["within_margin"]:
            out.append(f"The load comes within {z['min_distance_m']:.2f} m of {z['kind']} '{z['name']}', "
                       f"inside its {z['margin_m']:g} m margin (from t = {z['first_within_margin_s']:.1f} s).")
    wll = scene.rope.wll_kN
    pt = s.get("peak_rope_tension_kN")
    if wll is not None and pt is not None and pt > wll:
        out.append(f"Peak hoist rope tension {_f(pt, 2)} kN exceeds the declared working load limit of "
                   f"{wll:g} kN: check the lift plan and the reeving.")
    df = s.get("dynamic_factor")
    if df is not None and df > 1.15:
        out.append(f"Swing and motion raise the rope tension to {df:.2f} times the static load.")
    if scene.damping_ratio == 0.0 and s.get("moves", 0):
        out.append("No damping is modelled (damping.ratio = 0): the simulated swing does not die "
                   "away; a real one decays slowly.")
    return out
