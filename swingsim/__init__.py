"""swingsim: crane hook and suspended-load swing, for lift planning and site briefings.

Public API::

    from swingsim import load_scene, simulate, summarize
    scene = load_scene("scenes/tower_trolley.toml")
    traj = simulate(scene)          # full nonlinear equations, scipy DOP853
    summary = summarize(traj)       # peak / residual swing, tension, periods, cautions

Results are a planning and training preview: they do not replace the lift
plan, the crane manufacturer's data, local regulations, or the competent person
in charge of the lift.
"""

from swingsim._version import __version__  # noqa: E402

from swingsim.errors import InputError, SceneError, SimulationError  # noqa: E402
from swingsim.scene import Scene, load_scene, scene_from_dict  # noqa: E402


def __getattr__(name):
    """simulate, summarize and their results, imported on first use (``import swingsim`` stays light).

    ``swingsim.simulate`` is :func:`swingsim.simulation.simulate` and
    ``swingsim.summarize`` is :func:`swingsim.metrics.single.summarize`, with
    their own docstrings.
    """
    if name in ("simulate", "Trajectory"):
        from swingsim import simulation

        return getattr(simulation, name)
    if name in ("summarize", "Summary"):
        from swingsim.metrics import single

        return getattr(single, name)
    raise AttributeError(name)


__all__ = ["load_scene", "scene_from_dict", "simulate", "summarize", "Scene", "Trajectory",
           "Summary", "InputError", "SceneError", "SimulationError", "__version__"]
