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


def simulate(scene, **kw):
    """Integrate a scene's full nonlinear equations of motion (scipy DOP853).

    Parameters
    ----------
    scene : Scene
        A validated scene (:func:`load_scene`).
    **kw
        Solver options of :func:`swingsim.simulation.simulate` (``rtol``, ``atol``, ``model``).

    Returns
    -------
    Trajectory
        The dense solution, its status and the scene.
    """
    from swingsim.simulation import simulate as _simulate

    return _simulate(scene, **kw)


def summarize(traj):
    """Measure a trajectory: peak and residual swing, excursion, tension, periods, settling, cautions.

    Parameters
    ----------
    traj : Trajectory
        The result of :func:`simulate`.

    Returns
    -------
    Summary
        The summary numbers (definitions in :mod:`swingsim.metrics.single`).
    """
    from swingsim.metrics.single import summarize as _summarize

    return _summarize(traj)


def __getattr__(name):
    if name == "Trajectory":
        from swingsim.simulation import Trajectory

        return Trajectory
    if name == "Summary":
        from swingsim.metrics.single import Summary

        return Summary
    raise AttributeError(name)


__all__ = ["load_scene", "scene_from_dict", "simulate", "summarize", "Scene", "Trajectory",
           "Summary", "InputError", "SceneError", "SimulationError", "__version__"]
