"""The lift in 3D with numpy only: crane layout, body meshes in their own frames, poses at any time.

:func:`build` makes a :class:`Scene3D` of a run: ``.bodies`` (name -> mesh,
material, parent), ``.poses(t)`` (name -> 4x4 transforms) and ``.segments(t)``
(the rope and slings as end-point pairs).  The video renderer (``render/``)
draws from it, and a file exporter can write the same meshes and poses;
nothing here imports VTK.

Modules: :mod:`.layout` (crane kind and sizes), :mod:`.meshes` (bodies in
their own frames), :mod:`.ground` (grid, arrows, envelope), :mod:`.poses`
(where the bodies are), :mod:`.transforms` (the matrices), :mod:`.scene`
(the assembly).
"""

from swingsim.scene3d.meshes import Mesh
from swingsim.scene3d.scene import Body, Scene3D, build

__all__ = ["Body", "Mesh", "Scene3D", "build"]
