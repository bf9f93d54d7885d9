"""Editing scenes: the one place where a study changes a scene document and validates it again.

A :class:`~swingsim.scene.model.Scene` is frozen; an edited scene is a new one,
built from its ``raw`` document with the change applied.  Dotted keys
(``rope.length_m``, ``moves.0.accel_m_s2``) address a document as sweep files do.
"""

from __future__ import annotations

import copy
from pathlib import Path
from typing import Any

from swingsim.scene.model import Scene
from swingsim.scene.validate import scene_from_dict

__all__ = ["list_index", "get_dotted", "set_dotted", "with_move"]


def list_index(part: str) -> int | None:
    """A dotted key's part read as a list index: ASCII digits only (``"0"``, ``"12"``).

    Other characters that Python counts as digits (Arabic-Indic, superscript,
    full-width) are not indices: a key means what it shows.

    Parameters
    ----------
    part : str
        One part of a dotted key, e.g. ``"0"`` in ``moves.0.accel_m_s2``.

    Returns
    -------
    int or None
        The index, or None when ``part`` is not made of ASCII digits.
    """
    if part.isascii() and part.isdigit():
        return int(part)
    return None


def get_dotted(data: dict, dotted: str, default=None):
    """Value at a dotted key of a scene document, or ``default``.

    Parameters
    ----------
    data : dict
        A scene document (e.g. :attr:`Scene.raw`).
    dotted : str
        The key: table and key names and list indices joined by dots, e.g.
        ``moves.0.accel_m_s2``.
    default : object, optional
        What to return when the document has no such key.

    Returns
    -------
    object
        The value as the document holds it, or ``default``.
    """
    cur = data
    for part in dotted.split("."):
        if isinstance(cur, list):
            index = list_index(part)
            if index is None or index >= len(cur):
                return default
            cur = cur[index]
        elif isinstance(cur, dict):
            if part not in cur:
                return default
            cur = cur[part]
        else:
            return default
    return cur


def set_dotted(data: dict, dotted: str, value: Any) -> dict:
    """A deep copy of a scene document with one dotted key set.

    Parameters
    ----------
    data : dict
        A scene document; it is not changed.
    dotted : str
        The key, e.g. ``moves.0.accel_m_s2``; missing tables on the way are created.
    value : object
        The new value, as a scene file would hold it.

    Returns
    -------
    dict
        The edited copy (not validated).

    Raises
    ------
    KeyError
        When a part that indexes a list is not an index (see :func:`list_index`).
    """
    out = copy.deepcopy(data)
    parts = dotted.split(".")
    cur: Any = out
    for part in parts[:-1]:
        if isinstance(cur, list):
            cur = cur[_index_of(part, dotted)]
        else:
            if part not in cur:
                cur[part] = {}
            cur = cur[part]
    last = parts[-1]
    if isinstance(cur, list):
        cur[_index_of(last, dotted)] = value
    else:
        cur[last] = value
    return out


def _index_of(part: str, dotted: str) -> int:
    index = list_index(part)
    if index is None:
        raise KeyError(f"{dotted}: '{part}' is not a list index (ASCII digits only)")
    return index


def with_move(scene: Scene, index: int, move: dict, *, rope_length_m: float | None = None,
              duration_s: float | None = None, base_dir: Path | str | None = None,
              validate_motion: bool = True) -> Scene:
    """The scene with move ``index`` replaced, and optionally another rope length and duration.

    Parameters
    ----------
    scene : Scene
        The scene to start from; it is not changed.
    index : int
        Index of the move to replace (from 0).
    move : dict
        The new move's table, as a ``[[moves]]`` entry of a scene file holds it.
    rope_length_m : float, optional
        New rope length [m] (``rope.length_m``); the scene's when None.
    duration_s : float, optional
        New simulated time [s] (``duration_s``); the scene's when None.
    base_dir : Path or str, optional
        Folder relative paths are relative to (e.g. where a new table file was
        written); the scene's when None.
    validate_motion : bool, optional
        Also build the motion to validate it (see
        :func:`~swingsim.scene.validate.scene_from_dict`).

    Returns
    -------
    Scene
        The edited scene, validated again; its ``file`` is the original scene's.

    Raises
    ------
    SceneError
        When the edited document is not a valid scene.
    """
    data = dict(scene.raw)
    data["moves"] = list(scene.raw["moves"])
    data["moves"][index] = move
    if rope_length_m is not None:
        data["rope"] = dict(scene.raw["rope"], length_m=float(rope_length_m))
    if duration_s is not None:
        data["duration_s"] = duration_s
    return scene_from_dict(data, file=scene.file, base_dir=scene.base_dir if base_dir is None else base_dir,
                           validate_motion=validate_motion)
