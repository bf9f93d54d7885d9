"""The lift in 3D with numpy only: crane layout, body meshes in their own frames, poses at any time.

The video renderer (``render/``) and the glTF export draw from it; nothing here imports VTK.
"""
