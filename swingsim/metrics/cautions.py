"""The safety caution and the scenario warnings, in one place.

Every text output, plot, report and video carries :data:`CAUTION` (or
:data:`CAUTION_SHORT` where space is short).  Scenario warnings are built by
:func:`scenario_warnings` from a summary; their thresholds are rules of thumb
that a scene can override (see ``constants.py``).
"""

from __future__ import annotations

from swingsim.constants import STANDARD_GRAVITY_M_S2, newton_to_tonnes_force

#: How the text outputs state the tonne once (summary.txt, the briefing).
TONNE_FORCE_NOTE = (f"Forces are given in kN and in tonnes-force (t): 1 t = {STANDARD_GRAVITY_M_S2:g} kN, "
                    "the weight of 1000 kg under standard gravity (CGPM 1901).")


def force_text(force_kN: float | None, decimals: int = 1) -> str:
    """A force as the text outputs write it: kilonewtons, then tonnes-force in brackets.

    Parameters
    ----------
    force_kN : float or None
        The force [kN]; None gives ``"n/a"``.
    decimals : int
        Decimals of the kN figure [-]; the tonnes get one more (0.1 kN is about 0.01 t).

    Returns
    -------
    str
        E.g. ``"31.7 kN (3.23 t)"``.
    """
    if force_kN is None:
        return "n/a"
    return f"{force_kN:.{decimals}f} kN ({newton_to_tonnes_force(force_kN * 1e3):.{decimals + 1}f} t)"

CAUTION = (
    "CAUTION: planning and training preview only. These results do not replace the lift plan, "
    "the crane manufacturer's load charts and wind limits, or the judgement of the competent "
    "person supervising the lift; local regulations govern."
)

CAUTION_SHORT = ("Preview only - does not replace the lift plan, the manufacturer's charts "
                 "or the competent person; local regulations govern.")


#: Said when a rigid (inextensible) rope hoists: what it leaves out, and how to put it in.
RIGID_ROPE_CAUTION = (
    "The hoist rope is modelled as rigid (the default): hoist snatch and the load's bounce on the "
    "stretching rope are not modelled, and they can raise the hook load and the sling loads well "
    "above the figures here when the load lifts off or the hoist starts or stops. To include them, "
    "make the rope elastic: set [rope] stiffness_kN_per_m, or modulus_GPa with diameter_m, from the "
    "rope maker's data (and [start] rope_preload = \"lift-off\" for a lift from the ground)."
)


def rigid_rope_hides_snatch(scene) -> bool:
    """Whether the run hoists on a rigid rope, which leaves hoist snatch and bounce out.

    Parameters
    ----------
    scene : Scene
        The scene (its rope and moves).

    Returns
    -------
    bool
        True when the rope is inextensible and a move hoists.
    """
    return (not scene.rope.elastic and getattr(scene, "ground", None) is None
            and any(m.axis == "hoist" for m in scene.moves))


def model_limits(scene) -> list[str]:
    """What the model leaves out that a lift planner could trip over, each said once.

    Parameters
    ----------
    scene : Scene
        The scene (rope, load, rigging, wind, start).

    Returns
    -------
    list of str
        One sentence per limit, for the "What the model leaves out" heading of summary.txt.
    """
    out = []
    if not scene.rope.elastic:
        out.append("The hoist rope does not stretch: no hoist snatch or bounce"
                   + (" (see the cautions)." if rigid_rope_hides_snatch(scene) else "."))
    if scene.rigid_load and scene.swivel.kind == "locked" and not scene.swivel.torsion_stiffness_N_m_per_rad:
        out.append("The load's yaw (turning about the vertical) is held fixed: spin is not simulated.")
    elif scene.rigid_load:
        out.append("The load turns on a frictionless swivel (or the reeving's torsion spring): no twist of "
                   "the rope itself, and the wind's moment only from its drag at load.wind_center_m.")
    else:
        out.append("The load is a point mass: it neither turns nor tilts.")
    if scene.rigging is not None:
        out.append("Slings do not stretch (rigid rigging); a leg going slack is reported, and the "
                   "results do not hold beyond it.")
    w = scene.wind
    if w.turbulence_intensity > 0.0:
        out.append("The turbulence is one random realisation of the named spectrum at one point, the "
                   "same over the whole rope and load; another seed gives another answer (run "
                   "wind.realisations for the spread).")
    elif w.gusts:
        out.append("The wind is steady apart from the discrete gusts given; real wind is turbulent.")
    else:
        out.append("The wind is steady: no gusts or turbulence"
                   + ("" if w.profile != "uniform" else ", and one speed at every height")
                   + "; on a real site it varies with height and time ([wind] turbulence_intensity, "
                   "[[wind.gusts]] and profile model that).")
    out.append("The crane structure is rigid: no boom, jib or mast deflection, no slew or travel "
               "drive flexibility; the crane moves exactly as the moves prescribe.")
    if getattr(scene, "ground", None) is not None:
        out.append("The ground is a flat plane at ground.z_m touched by the load's box corners (not its "
                   "edges or faces, not the hook block or the rigging), with a compliant support and "
                   "regularised Coulomb friction: a load pulled below the friction limit creeps slowly "
                   "instead of sticking (see docs/models.md). Zones are checked for clearance, not "
                   "collided with.")
    elif scene.start.rope_preload == "lift-off":
        out.append("Before lift-off the load rests plumb on its support; after lift-off there is no "
                   "ground contact: a load that comes down again passes through the ground.")
    else:
        out.append("There is no ground contact (a [ground] table adds lift-off and landing) and no obstacle "
                   "contact: zones are checked for clearance, not "
                   "collided with.")
    out.append("The rope's own mass is neglected (its drag is not, when rope.diameter_m is set).")
    return out


def _tonnes(force_kN: float) -> str:
    """A force in tonnes-force, two decimals, e.g. ``"1.20 t"``."""
    return f"{newton_to_tonnes_force(force_kN * 1e3):.2f} t"


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
        out.append(f"The load strays {ex:.2f} m from the plumb line, beyond the declared clearance "
                   f"of {lim.clearance_m:.2f} m.")
    for z in s.get("zones", []):
        if z["inside"]:
            who = ", ".join(z.get("entered_by") or ["load"])
            out.append(f"Parts of the suspended system ({who}) {'pass over' if z['kind'] == 'exclusion' else 'touch'} "
                       f"{z['kind']} '{z['name']}' (from t = {z.get('first_entry_s') or z['first_within_margin_s']:.1f} s).")
        elif z["within_margin"]:
            out.append(f"The load comes within {z['min_distance_m']:.2f} m of {z['kind']} '{z['name']}', "
                       f"inside its {z['margin_m']:g} m margin (from t = {z['first_within_margin_s']:.1f} s).")
    out.extend(hook_load_warnings(s, scene))
    df = s.get("dynamic_factor")
    if df is not None and df > 1.15:
        out.append(f"Swing and motion raise the hook load to {df:.2f} times the static load.")
    if rigid_rope_hides_snatch(scene):
        out.append(RIGID_ROPE_CAUTION)
    if scene.damping_ratio == 0.0 and s.get("moves", 0):
        out.append("No damping is modelled (damping.ratio = 0): the simulated swing does not die "
                   "away; a real one decays slowly.")
    return out


def hook_load_warnings(s: dict, scene) -> list[str]:
    """The line pull against the line's WLL, the hook load against the hook block's rating.

    Parameters
    ----------
    s : dict
        The summary's data (``peak_line_pull_kN``, ``peak_hook_load_kN`` [kN]).
    scene : Scene
        Its scene (``rope.wll_kN``, ``hook.wll_kN``, falls, reeving efficiency).

    Returns
    -------
    list of str
        One sentence per limit exceeded.
    """
    out = []
    line_wll = scene.rope.wll_kN
    pull = s.get("peak_line_pull_kN")
    if line_wll is not None and pull is not None and pull > line_wll:
        out.append(f"Peak line pull {_f(pull, 2)} kN (hook load over {scene.rope.falls} fall(s)"
                   + (f" at reeving efficiency {scene.rope.reeving_efficiency:.3f}"
                      if scene.rope.reeving_efficiency != 1.0 else "")
                   + f") exceeds the line's declared working load limit of {line_wll:g} kN "
                   f"({_tonnes(pull)} against {_tonnes(line_wll)}): the lift "
                   "plan, the crane manufacturer's reeving data and the competent person decide; do "
                   "not lift on these numbers.")
    hook_wll = scene.hook.wll_kN if scene.hook is not None else None
    load = s.get("peak_hook_load_kN")
    if hook_wll is not None and load is not None and load > hook_wll:
        out.append(f"Peak hook load {_f(load, 2)} kN exceeds the hook block's declared rating of "
                   f"{hook_wll:g} kN ({_tonnes(load)} against {_tonnes(hook_wll)}): the lift plan, "
                   "the manufacturer's rating and the competent "
                   "person decide; do not lift on these numbers.")
    return out


#: What the crane axes' moves are called in the resonance caution.
_AXIS_WORDS = {"x": "x travel", "y": "y travel", "slew": "slewing",
               "radius": "radius (trolley or luffing)"}


def resonance_warnings(s: dict) -> list[str]:
    """A caution for every repeated move or recorded input whose rhythm meets a swing mode.

    The band is swingsim's rule (:mod:`swingsim.metrics.resonance`): the mode's
    half-power band widened to at least +-15 % of its period.

    Parameters
    ----------
    s : dict
        The summary (``move_rhythms``, ``response_modes`` and
        ``resonance_band_fraction`` of :func:`swingsim.metrics.resonance.resonance_metrics`).

    Returns
    -------
    list of str
        One sentence per rhythm in resonance; each contains the word "resonance".
    """
    out = []
    modes = {m["mode"]: m for m in s.get("response_modes", [])}
    band = 100 * s.get("resonance_band_fraction", 0.15)
    for r in s.get("move_rhythms", []):
        if not r.get("resonant_modes"):
            continue
        names = " and ".join(f"mode {k}: {modes[k]['label']}, period {modes[k]['period_s']:.2f} s"
                             for k in r["resonant_modes"])
        axis = _AXIS_WORDS.get(r["axis"], r["axis"])
        if r["source"] == "recorded input":
            what = f"the recorded operator input ({axis}, {r['from_s']:.1f} to {r['to_s']:.1f} s) has"
        else:
            what = (f"the {len(r['moves'])} {axis} moves ({r['from_s']:.1f} to {r['to_s']:.1f} s) "
                    "repeat with")
        amp = r.get("amplification_at_rhythm")
        steady = (f"; kept up, the swing would grow to about {amp:.0f} times the angle the same "
                  "acceleration gives when held steady" if amp is not None and amp >= 2.0 else "")
        lo = min(modes[k]["resonance_band_s"][0] for k in r["resonant_modes"])
        hi = max(modes[k]["resonance_band_s"][1] for k in r["resonant_modes"])
        out.append(f"Swing resonance: {what} a rhythm of {r['rhythm_s']:.2f} s, in resonance with the "
                   f"swing ({names}; our band {lo:.2f} to {hi:.2f} s, the half-power band widened to "
                   f"+-{band:.0f}% of the period): each repetition adds swing{steady}. Break the rhythm: "
                   "pause and let the swing settle, or make the move in one go.")
    return out
