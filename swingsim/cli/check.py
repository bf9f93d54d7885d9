"""``swingsim check SCENE``: validate a scene and say what a run of it would do, without simulating.

It prints the model the run will use and why, the swing periods, the moves with
their start and end times, and the warnings that can be seen before any
simulation (the wind against the crane's limit, a rigid rope that hoists, no
damping, the static hook load against the ratings, little time left to settle,
values beyond the plausibility limits), then ``ok``.  A bad scene is one line
on stderr and exit code 2, as for every command.
"""

from __future__ import annotations

import argparse
import math
import textwrap

from swingsim.cli.options import add_quiet_argument, add_scene_argument
from swingsim.dynamics.registry import model_name_for
from swingsim.metrics import cautions
from swingsim.metrics.definitions import line_pull
from swingsim.scene import load_scene
from swingsim.scene.plausibility import check_plausible
from swingsim.simulation import prepare

#: Width the warnings are wrapped to.
WIDTH = 100


def add_arguments(p: argparse.ArgumentParser) -> None:
    """Options of ``swingsim check``: the scene and ``-q/--quiet`` (it writes no file).

    Parameters
    ----------
    p : argparse.ArgumentParser
        The ``check`` parser; the scene and ``-q`` are added to it.
    """
    add_scene_argument(p)
    add_quiet_argument(p, "print only the final 'ok' line (errors still go to stderr)")


def _size(v) -> str:
    return " x ".join(f"{x:g}" for x in v) + " m"


def model_lines(scene, model) -> list[str]:
    """What the run will simulate and why: the model, its bodies and rope, and what chose them.

    Parameters
    ----------
    scene : swingsim.scene.Scene
        A validated scene.
    model : swingsim.dynamics.base.SwingModel
        The model the scene selects (for its swing periods).

    Returns
    -------
    list of str
        Lines, the first ``model: <name> (<what it is>)``.
    """
    parts, why = [], []
    if scene.hook is not None:
        parts.append(f"hook block {scene.hook.mass_kg:g} kg")
        why.append("[hook] makes the hook block a body of its own")
    load = ("rigid load" if scene.rigid_load else "point-mass load") + f" {scene.load.mass_kg:g} kg"
    if scene.rigid_load and scene.load.size_m is not None:
        load += f" ({scene.load.shape} {_size(scene.load.size_m)})"
    if scene.rigid_load:
        why.append("load.inertia_kg_m2 is given" if scene.load.inertia_kg_m2 is not None
                   else "load.size_m with a hook block or rigging makes the load a rigid body")
    if scene.rigging is not None:
        rig = scene.rigging
        legs = {"single": "a single leg", "bridle": f"a {rig.legs}-leg bridle",
                "spreader": f"a spreader beam with {rig.legs} drop legs"}[rig.kind]
        load += f" on {legs}"
        why.append(f'[rigging] kind = "{rig.kind}"')
    parts.append(load)
    rope = scene.rope
    ground = getattr(scene, "ground", None)
    assumed = getattr(model, "rope_stiffness_assumed", False)
    text = (f"{'elastic' if rope.elastic or assumed else 'rigid (inextensible)'} rope {rope.length_m:g} m"
            + (" (stiffness assumed)" if assumed else "")
            + (f", {rope.falls} falls" if rope.falls > 1 else ""))
    if rope.elastic:
        why.append("rope.stiffness_kN_per_m is given" if rope.stiffness_kN_per_m is not None
                   else "rope.modulus_GPa is given")
    if ground is not None:
        parts.append(f"ground at z = {ground.z_m:g} m" + (", the load resting on it" if scene.start.on_ground else ""))
        why.append("[ground] makes the rope elastic (it goes slack over a landed load)" if assumed
                   else "[ground]: the load's corners touch the ground")
    lines_ = getattr(scene, "tag_lines", ())
    if lines_:
        parts.append(f"{len(lines_)} tag line(s)")
        why.append("[[tag_lines]] pull on the load")
    name = model_name_for(scene)
    lines = [f"model: {name}: " + " + ".join(parts) + f", {text}",
             "  why: " + ("; ".join(why) if why else "no hook block, rigging, rigid load or elastic rope: "
                          "the point-mass pendulum")]
    periods = [p for p in model.mode_periods_s() if p]
    if periods:
        lines.append("  swing periods at the start: " + ", ".join(f"{p:.2f} s" for p in periods))
    bounce = model.bounce_period_s() if hasattr(model, "bounce_period_s") else None
    if bounce:
        lines[-1] += f"; bounce on the rope {bounce:.3f} s"
    return lines


def move_lines(scene, motion) -> list[str]:
    """One line per move: index, axis, profile, start and end times, travel, label.

    Parameters
    ----------
    scene : swingsim.scene.Scene
        A validated scene (the moves as written).
    motion : swingsim.motion.kinematics.Motion
        The motion built from them (exact start and end times).

    Returns
    -------
    list of str
        ``moves:`` and one indented line per move, or ``moves: none``.
    """
    if not scene.moves:
        return ["moves: none (the load hangs; only the start swing and the wind move it)"]
    lines = ["moves:"]
    for move, (axis, prof) in zip(scene.moves, motion.moves):
        unit = "deg" if axis == "slew" else "m"
        distance = math.degrees(prof.distance) if axis == "slew" else prof.distance  # slew profiles run in rad
        travel = f"{distance:+.2f} {unit}"
        label = f'  "{move.label}"' if move.label else ""
        lines.append(f"  {move.index}: {axis:<6} {move.profile:<12} {prof.start_s:6.1f} s -> {prof.end_s:6.1f} s"
                     f"  {travel}{label}")
    return lines


def static_warnings(scene, model, motion) -> list[str]:
    """Warnings that can be seen before simulating, from the one set of caution texts.

    Parameters
    ----------
    scene : swingsim.scene.Scene
        A validated scene.
    model : swingsim.dynamics.base.SwingModel
        Its model (the first swing period).
    motion : swingsim.motion.kinematics.Motion
        Its motion (when the last move ends).

    Returns
    -------
    list of str
        One sentence per warning: the scenario warnings that need no run (wind,
        rigid rope that hoists, no damping), the ratings against the hook load at
        rest, and little time left after the last move to see the swing settle.
    """
    out = cautions.scenario_warnings({"moves": len(scene.moves)}, scene)
    hook_kg = scene.load.mass_kg + (scene.hook.mass_kg if scene.hook is not None else 0.0)
    at_rest_kN = hook_kg * scene.gravity_m_s2 / 1e3
    pull = float(line_pull(at_rest_kN, scene.rope.falls, scene.rope.reeving_efficiency))
    for w in cautions.hook_load_warnings({"peak_hook_load_kN": at_rest_kN, "peak_line_pull_kN": pull}, scene):
        out.append("Even hanging at rest, before any swing: " + w)
    if motion.moves:
        last_end = max(prof.end_s for _axis, prof in motion.moves)
        periods = [p for p in model.mode_periods_s() if p]
        left = scene.duration_s - last_end
        if periods and left < 2.0 * periods[0]:
            out.append(f"The run ends {left:.1f} s after the last move, less than two swing periods "
                       f"({2 * periods[0]:.1f} s): the residual swing and the settling time may not be seen; "
                       "consider a longer duration_s.")
    return out


def check(args: argparse.Namespace) -> int:
    """Run ``swingsim check``: validate the scene, print the model, the moves, the warnings, ``ok``.

    Parameters
    ----------
    args : argparse.Namespace
        The parsed options (``scene``, ``quiet``).

    Returns
    -------
    int
        The exit code: 0 (a bad scene raises :class:`~swingsim.errors.SceneError` instead).
    """
    scene = load_scene(args.scene)
    notes = check_plausible(scene, allow=True)
    model, motion = prepare(scene)
    if not args.quiet:
        print(f"{args.scene}: {scene.title}")
        print(f"crane: {scene.crane.kind}; run {scene.duration_s:g} s; "
              f"wind {scene.wind.speed_m_s:g} m/s" + ("" if scene.wind.speed_m_s else " (none)"))
        for line in model_lines(scene, model) + move_lines(scene, motion):
            indent = " " * (len(line) - len(line.lstrip()) + 2)
            print(textwrap.fill(line, WIDTH, subsequent_indent=indent, break_on_hyphens=False))
        warnings = static_warnings(scene, model, motion)
        if warnings or notes:
            print("seen before simulating:")
        for w in warnings:
            print(textwrap.fill(w, WIDTH, initial_indent="  ! ", subsequent_indent="    "))
        for n in notes:
            print(textwrap.fill(f"beyond a plausibility limit (a run needs --allow-implausible): {n}", WIDTH,
                                initial_indent="  note: ", subsequent_indent="    "))
        print(cautions.CAUTION_SHORT)
    n = len(scene.moves)
    print(f"{args.scene}: ok ({n} move{'' if n == 1 else 's'}, {scene.duration_s:g} s)")
    return 0
