"""The scene of a lift: frozen dataclasses, the key schema, reading, validation and editing.

``load_scene`` reads and validates a TOML file; ``scene_from_dict`` does the same for a
parsed document.  Nothing here simulates.
"""

from swingsim.scene.read import Scene, load_scene, scene_from_dict

__all__ = ["Scene", "load_scene", "scene_from_dict"]
