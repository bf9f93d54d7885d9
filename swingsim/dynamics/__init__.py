"""Equations of motion: one model per module, pure functions of state and time.

Nothing here imports I/O, plotting, the renderer or the command line.
"""
