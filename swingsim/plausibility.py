"""Plausibility limits: values that are valid but almost certainly a mistake.

A scene beyond a limit is refused with one clear line unless the user passes
``--allow-implausible``.  The limits are generous bounds on real lifts, not
engineering limits.
"""

from __future__ import annotations

from .errors import SceneError

#: key path -> (limit, unit, why)
LIMITS = {
    "duration_s": (3600.0, "s", "a single lift simulated for more than an hour"),
    "rope.length_m": (600.0, "m", "longer than any crane's hoist rope"),
    "load.mass_kg": (3.0e6, "kg", "heavier than 3000 t"),
    "wind.speed_m_s": (60.0, "m/s", "beyond hurricane force"),
    "samples": (2.0e6, "rows", "timeseries.csv with more than two million rows"),
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
    notes = []
    for key, val in values.items():
        lim, unit, why = LIMITS[key]
        if val > lim:
            what = f"beyond the plausibility limit of {lim:g} {unit} ({why})"
            if not allow:
                k = "duration_s * output.sample_hz" if key == "samples" else key
                raise SceneError(scene.file, k, what + "; pass --allow-implausible to run it anyway", val)
            notes.append(f"{key} = {val:g}: {what}")
    return notes
