"""The run as an animated glTF 2.0 scene and a self-contained viewer page; no VTK or OpenGL needed.

>>> from swingsim.export import write_export                           # doctest: +SKIP
>>> write_export(traj, summary, "out", fps=30.0, t_from=None, t_to=None)  # doctest: +SKIP
[PosixPath('out/lift.glb'), PosixPath('out/viewer.html')]

Modules: :mod:`.gltf` (the scene and the file format), :mod:`.write` (the
files of an export).
"""

from swingsim.export.gltf import GltfAsset, build_gltf
from swingsim.export.write import write_export

__all__ = ["GltfAsset", "build_gltf", "write_export"]
