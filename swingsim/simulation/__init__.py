"""One scene integrated: the model chosen first, the motion built with its period, DOP853 restarted
at every breakpoint, a dense :class:`Trajectory` as the result."""

from swingsim.simulation.integrate import prepare, simulate
from swingsim.simulation.trajectory import Trajectory

__all__ = ["prepare", "simulate", "Trajectory"]
