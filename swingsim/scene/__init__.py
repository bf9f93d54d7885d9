"""The scene of a lift: frozen dataclasses, the key schema, reading, validation and editing.

``load_scene`` reads and validates a TOML file; ``scene_from_dict`` does the same for a
parsed document.  Nothing here simulates.  The modules, lowest first:

``schema``
    Every scene key: type, unit, default, range, meaning.
``model``
    The frozen dataclasses (``Scene``, ``Rope``, ``Move`` ...); no I/O, no checks.
``read``
    The TOML document, the CSV tables of recorded moves, one key at a time.
``validate``
    Checks between keys, and the assembly of a ``Scene`` (``load_scene``, ``scene_from_dict``).
``edit``
    Changing a scene (dotted keys, another move or rope length), validated again.
``plausibility``
    Valid values that are almost certainly a mistake.
"""

from swingsim.scene.model import Scene
from swingsim.scene.validate import load_scene, scene_from_dict

__all__ = ["Scene", "load_scene", "scene_from_dict"]
