"""Plausibility limits: values that are valid but almost certainly a mistake.

A scene beyond a limit is refused with one clear line unless the user passes
``--allow-implausible``.  The limits are generous bounds on real lifts, not
engineering limits.
"""

from __future__ import annotations

from swingsim.errors import SceneError

#: key path -> (limit, unit, why)
LIMITS = {
    "duration_s": (3600.0, "s", "a single lift simulated for more than an hour"),
    "rope.length_m": (600.0, "m", "longer than any crane's hoist rope"),
    "load.mass_kg": (3.0e6, "kg", "heavier than 3000 t"),
    "wind.speed_m_s": (60.0, "m/s", "beyond hurricane force"),
    "samples": (2.0e6, "rows", "timeseries.csv with more than two million rows"),
    # -- hook block, rigging, elastic rope (hook-and-load models) --
    "hook.mass_kg": (2.0e5, "kg", "a hook block heavier than 200 t"),
    "rigging.leg_length_m": (100.0, "m", "a sling leg longer than 100 m"),
    "bounce frequency": (200.0, "Hz", "a rope so stiff that its bounce needs tiny time steps (a run "
                         "of minutes or hours); leave the rope inextensible instead"),
}


def check_plausible(scene, allow: bool = False) -> list[str]:
    """Refuse (or, with ``allow``, list) values beyond the plausibility limits."""
    values = {
        "duration_s": scene.duration_s,
        "rope.length_m": scene.rope.length_m,
        "load.mass_kg": scene.load.mass_kg,
        "wind.speed_m_s": scene.wind.speed_m_s,
        "samples": scene.duration_s * scene.sample_hz,
    }
    values.update(_model_values(scene))
    notes = []
    for key, val in values.items():
        lim, unit, why = LIMITS[key]
        if val > lim:
            what = f"beyond the plausibility limit of {lim:g} {unit} ({why})"
            shown = val
            if key == "bounce frequency":  # name the key the user wrote, and show its value
                what = f"the load would bounce at {val:.0f} Hz, " + what
                key = "rope.stiffness_kN_per_m" if scene.rope.stiffness_kN_per_m else "rope.modulus_GPa"
                shown = scene.rope.stiffness_kN_per_m or scene.rope.modulus_GPa
            if not allow:
                k = "duration_s * output.sample_hz" if key == "samples" else key
                raise SceneError(scene.file, k, what + "; pass --allow-implausible to run it anyway", shown)
            notes.append(f"{key} = {shown:g}: {what}")
    return notes


def _model_values(scene) -> dict:
    """Values of the hook-and-load keys that the limits above bound."""
    import math

    out = {}
    if getattr(scene, "hook", None) is not None:
        out["hook.mass_kg"] = scene.hook.mass_kg
    if getattr(scene, "rigging", None) is not None:
        out["rigging.leg_length_m"] = max(scene.rigging.leg_length_m)
    if scene.rope.elastic:
        from swingsim.dynamics.rope import elastic_rope

        m = scene.load.mass_kg + (scene.hook.mass_kg if scene.hook else 0.0)
        rope = elastic_rope(scene.rope, m * scene.gravity_m_s2, m)
        k = rope.stiffness(rope.lambda0_m)
        out["bounce frequency"] = math.sqrt(k / m) / (2 * math.pi)
    return out


#: Most video frames a render makes without ``--allow-implausible`` (an hour at 30 fps).
MAX_FRAMES = 108_000


def check_frames(scene, fps: float, speed: float, window=None, allow: bool = False) -> int:
    """Frame count of a render; refuse more than :data:`MAX_FRAMES` unless ``allow``."""
    t0, t1 = window if window is not None else (0.0, scene.duration_s)
    t1 = min(t1, scene.duration_s)
    frames = int(round((t1 - t0) * fps / speed))
    if frames > MAX_FRAMES and not allow:
        raise SceneError("render", "--fps/--speed", f"the video would have {frames} frames, beyond the "
                         f"plausibility limit of {MAX_FRAMES} (an hour at 30 fps); pass --allow-implausible "
                         "to render it anyway", f"{fps:g} fps at speed {speed:g}")
    return frames
