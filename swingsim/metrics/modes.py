"""Names of the swing modes, as a lift planner would say them, read from the modes' shapes.

A model's small-amplitude swing modes (:meth:`~swingsim.dynamics.hook_load.HookLoadModel.swing_modes`,
the eigenvectors of its linearisation about hanging rest) say how each part moves
in the mode.  Along the chain rope -> sling leg (below a hook block) -> load
attitude, a mode is named by where the motion reverses:

* nothing reverses: the parts swing as one ("hook and load swing together",
  or "load swings on the rope" without a hook block);
* the sling leg swings the other way from the hoist rope: "load swings against the hook";
* the load tilts against the line it hangs on: "load rocks on its slings", or,
  when the load's size shows a long side and the tilt is about that axis,
  "load tilts about its long axis" (about the short one: "rocks end to end").

Which chart coordinate is which motion: ``u1, v1`` are the hoist rope's
direction (its x and y components: the rope's angle in the x-z and y-z
planes), ``u2, v2`` the leg's, and ``tilt_a, tilt_b`` the load's rotation
``R = Rx(a) Ry(b)``.  A load hanging rigidly in line with its rope has its up
axis along ``-n``, so at small angles ``b = -u`` and ``a = v``: tilt with the rope
is ``-b`` in the x-z plane and ``+a`` in the y-z plane.  ``yaw`` is the load's
heading about the vertical (a swing coordinate only on a locked swivel with the
reeving's torsion spring): a mode in which nothing else moves is "load turns about
the vertical", otherwise the mode is named by its swing.
"""

from __future__ import annotations

import math

import numpy as np

#: Share of a mode's largest component below which a component counts as not moving [-].
NEGLIGIBLE = 1e-3

#: Chart coordinate -> (plane, part, sign that makes it "with the rope"), module docstring.
_COORDINATES = {
    "u1": ("x", "rope", 1.0), "v1": ("y", "rope", 1.0),
    "u2": ("x", "leg", 1.0), "v2": ("y", "leg", 1.0),
    "tilt_b": ("x", "tilt", -1.0), "tilt_a": ("y", "tilt", 1.0),
}


def mode_names(model, rope_length_m: float | None = None) -> list:
    """One name per small-amplitude mode period of a model, in the order of ``mode_periods_s``.

    Parameters
    ----------
    model : swingsim.dynamics.base.SwingModel
        The run's model; one without ``swing_modes`` (the point-mass model) has the
        one pendulum mode.
    rope_length_m : float, optional
        Loaded rope length [m]; the scene's initial length when omitted (as
        ``summary.json``'s ``mode_periods_s``).

    Returns
    -------
    list of str
        E.g. ``["hook and load swing together", "load swings against the hook"]``.
    """
    return [mode_name(model, period, rope_length_m) for period in model.mode_periods_s(rope_length_m)]


def mode_name(model, period_s: float, rope_length_m: float | None = None) -> str:
    """The name of the model's swing mode whose period is nearest ``period_s``.

    The one naming of swing modes: ``summary.txt``, the briefing and the resonance
    curves (:mod:`swingsim.metrics.resonance`) all call it.

    Parameters
    ----------
    model : swingsim.dynamics.base.SwingModel
        The run's model.
    period_s : float
        A small-amplitude mode period of the model [s].
    rope_length_m : float, optional
        Loaded rope length [m]; the scene's initial length when omitted.

    Returns
    -------
    str
        E.g. ``"hook and load swing together"``.
    """
    if not hasattr(model, "swing_modes"):
        return "load swings on the rope"
    omega_sq, shapes, _mass = model.swing_modes(rope_length_m)
    names = [model.state_names[i] for i in model.swing_coordinate_indices()]
    live = [j for j, w2 in enumerate(omega_sq) if w2 > 0]
    periods = {j: 2.0 * math.pi / math.sqrt(omega_sq[j]) for j in live}
    nearest = min(live, key=lambda j: abs(periods[j] - period_s))
    members = [j for j in live if abs(periods[j] - periods[nearest]) <= 1e-6 * periods[nearest]]
    return _name_of_shape(shapes[:, nearest], names, model, degenerate=len(members) > 1)


def _name_of_shape(shape, coordinate_names, model, degenerate: bool) -> str:
    """The name of one mode shape (module docstring)."""
    planes = {"x": {}, "y": {}}
    values = dict(zip(coordinate_names, np.asarray(shape, dtype=float)))
    turn = abs(values.pop("yaw", 0.0))
    if turn > 0.0 and all(abs(v) <= NEGLIGIBLE * turn for v in values.values()):
        return "load turns about the vertical"
    for name, value in values.items():
        plane, part, sign = _COORDINATES[name]
        planes[plane][part] = sign * float(value)
    size = {p: math.sqrt(sum(v * v for v in parts.values())) for p, parts in planes.items()}
    plane = "x" if size["x"] >= size["y"] else "y"
    parts = planes[plane]
    big = max(abs(v) for v in parts.values())

    def moving(part):
        return part in parts and abs(parts[part]) > NEGLIGIBLE * big

    def opposite(a, b):
        return moving(a) and moving(b) and parts[a] * parts[b] < 0

    line = "leg" if "leg" in parts else "rope"
    against_hook = opposite("rope", "leg")
    if opposite(line, "tilt"):
        name = _rocking(plane, model, degenerate)
        return name + (", against the hook" if against_hook else "")
    if against_hook:
        name = "load swings against the hook"
    elif getattr(model, "has_hook_block", False):
        name = "hook and load swing together"
    else:
        name = "load swings on the rope"
    return name if degenerate else f"{name}, along {plane}"


def _rocking(plane: str, model, degenerate: bool) -> str:
    """The name of a mode in which the load tilts against the line it hangs on."""
    # a swing in the x-z plane turns the load about y, and one in y-z about x
    axis = "y" if plane == "x" else "x"
    size = getattr(getattr(getattr(model, "scene", None), "load", None), "size_m", None)
    if size is not None and not math.isclose(size[0], size[1], rel_tol=0.05):
        long_axis = "x" if size[0] > size[1] else "y"
        return "load tilts about its long axis" if axis == long_axis else "load rocks end to end on its slings"
    return "load rocks on its slings" if degenerate else f"load rocks on its slings, about {axis}"
