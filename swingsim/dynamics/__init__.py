"""Equations of motion: one model per module, pure functions of state and time.

Nothing here imports I/O, plotting, the renderer or the command line.  The models
are listed in :mod:`swingsim.dynamics.registry`; their common interface is
:class:`swingsim.dynamics.base.SwingModel`.
"""
