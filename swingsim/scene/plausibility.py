"""Plausibility limits: values that are valid but almost certainly a mistake.

A scene beyond a limit is refused with one clear line unless the user passes
``--allow-implausible``.  The limits are generous bounds on real lifts, not
engineering limits.
"""

from __future__ import annotations

import math
import unicodedata
from typing import NamedTuple

from swingsim.dynamics.rope import elastic_rope
from swingsim.errors import SceneError


class Limit(NamedTuple):
    """A plausibility limit: the largest plausible value, its unit, and what lies beyond it."""

    #: Largest plausible value, in ``unit``.
    value: float
    #: Unit of the value, as shown in the message.
    unit: str
    #: What a larger value would mean, as shown in the message.
    why: str


#: The limits, by the key path (or quantity) they bound.
LIMITS = {
    "duration_s": Limit(3600.0, "s", "a single lift simulated for more than an hour"),
    "rope.length_m": Limit(600.0, "m", "longer than any crane's hoist rope"),
    "load.mass_kg": Limit(3.0e6, "kg", "heavier than 3000 t"),
    "wind.speed_m_s": Limit(60.0, "m/s", "beyond hurricane force"),
    "samples": Limit(2.0e6, "rows", "timeseries.csv with more than two million rows"),
    # -- hook block, rigging, elastic rope (hook-and-load models) --
    "hook.mass_kg": Limit(2.0e5, "kg", "a hook block heavier than 200 t"),
    "rigging.leg_length_m": Limit(100.0, "m", "a sling leg longer than 100 m"),
    "bounce frequency": Limit(200.0, "Hz", "a rope so stiff that its bounce needs tiny time steps (a run "
                              "of minutes or hours); leave the rope inextensible instead"),
}


def check_plausible(scene, allow: bool = False) -> list[str]:
    """Refuse (or, with ``allow``, list) values beyond the plausibility limits (:data:`LIMITS`).

    Parameters
    ----------
    scene : Scene
        A validated scene.
    allow : bool, optional
        List the values beyond a limit instead of refusing the scene
        (``--allow-implausible``; ``swingsim check`` shows them as notes).

    Returns
    -------
    list of str
        One note per value beyond its limit (empty when there is none).

    Raises
    ------
    SceneError
        Without ``allow``, for the first value beyond its limit.
    """
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
        limit = LIMITS[key]
        if val > limit.value:
            what = f"beyond the plausibility limit of {limit.value:g} {limit.unit} ({limit.why})"
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


def check_limit(source: str, key: str, value: float, allow: bool = False) -> str:
    """Refuse (or, with ``allow``, describe) one value beyond its limit in :data:`LIMITS`.

    For values that reach a scene from elsewhere than the scene file (e.g. the
    rope lengths of ``plan-move --rope-range``), held to the same limits.

    Parameters
    ----------
    source : str
        What gave the value (a file or an option), named in the message.
    key : str
        The limit's key in :data:`LIMITS`, e.g. ``"rope.length_m"``.
    value : float
        The value, in the limit's unit [unit of the limit].
    allow : bool, optional
        Describe the value instead of refusing it (``--allow-implausible``).

    Returns
    -------
    str
        A note when the value is beyond its limit and ``allow`` is set; "" otherwise.

    Raises
    ------
    SceneError
        Without ``allow``, when the value is beyond its limit.
    """
    limit = LIMITS[key]
    if not value > limit.value:
        return ""
    what = f"{key} beyond the plausibility limit of {limit.value:g} {limit.unit} ({limit.why})"
    if not allow:
        raise SceneError(source, "value", what + "; pass --allow-implausible to use it anyway", value)
    return f"{value:g}: {what}"


def _model_values(scene) -> dict:
    """Values of the hook-and-load keys that the limits above bound."""
    out = {}
    if getattr(scene, "hook", None) is not None:
        out["hook.mass_kg"] = scene.hook.mass_kg
    if getattr(scene, "rigging", None) is not None:
        out["rigging.leg_length_m"] = max(scene.rigging.leg_length_m)
    if scene.rope.elastic:
        m = scene.load.mass_kg + (scene.hook.mass_kg if scene.hook else 0.0)
        rope = elastic_rope(scene.rope, m * scene.gravity_m_s2, m)
        k = rope.stiffness(rope.lambda0_m)
        out["bounce frequency"] = math.sqrt(k / m) / (2 * math.pi)
    return out


#: Most video frames a render makes without ``--allow-implausible`` (an hour at 30 fps).
MAX_FRAMES = 108_000


def check_frames(scene, fps: float, speed: float, window=None, allow: bool = False) -> int:
    """Frame count of a render; refuse more than :data:`MAX_FRAMES` unless ``allow``.

    Parameters
    ----------
    scene : Scene
        The scene to render.
    fps : float
        Frames per second of the video [1/s].
    speed : float
        Playback speed [-] (2 is a time-lapse at twice real time).
    window : tuple of float, optional
        Start and end of the time shown [s]; the whole run when None.
    allow : bool, optional
        Accept more than :data:`MAX_FRAMES` frames (``--allow-implausible``).

    Returns
    -------
    int
        Number of frames the video will have.

    Raises
    ------
    SceneError
        Without ``allow``, when the video would have more than :data:`MAX_FRAMES` frames.
    """
    t0, t1 = window if window is not None else (0.0, scene.duration_s)
    t1 = min(t1, scene.duration_s)
    frames = int(round((t1 - t0) * fps / speed))
    if frames > MAX_FRAMES and not allow:
        raise SceneError("render", "--fps/--speed", f"the video would have {frames} frames, beyond the "
                         f"plausibility limit of {MAX_FRAMES} (an hour at 30 fps); pass --allow-implausible "
                         "to render it anyway", f"{fps:g} fps at speed {speed:g}")
    return frames


#: Longest title, move name, zone name or other text a scene may hold [characters].
MAX_TEXT_CHARS = 200
#: Longest free-text ``notes`` [characters] (newlines and tabs allowed there).
MAX_NOTES_CHARS = 20_000
#: Most data rows of a recorded-move table or a capacity chart.
MAX_TABLE_ROWS = 200_000
#: Largest table file read [bytes] (the rows above, with room for comments).
MAX_TABLE_BYTES = 20_000_000


def check_text(text: str, limit: int = MAX_TEXT_CHARS, allow: str = "") -> str:
    """Why a piece of user text (a title, a label, a name) cannot be shown as given, or "".

    Text is drawn on plots, printed to the terminal and written to ``summary.txt``:
    control characters (Unicode category Cc, e.g. escape sequences, newlines) and
    format characters (category Cf, e.g. bidirectional overrides that reorder what
    is shown) are refused, as is text longer than ``limit``.

    Parameters
    ----------
    text : str
        The text as the file gives it.
    limit : int, optional
        Most characters allowed [characters].
    allow : str, optional
        Control characters allowed all the same [characters] (newline and tab in notes).

    Returns
    -------
    str
        The problem in words, or "" when the text is fine.
    """
    if len(text) > limit:
        return f"{len(text)} characters, longer than the limit of {limit} characters"
    for ch in text:
        if unicodedata.category(ch) in ("Cc", "Cf") and ch not in allow:
            return (f"holds the control character U+{ord(ch):04X}; titles, labels and names may not hold "
                    "control or bidirectional-override characters")
    return ""
