"""The swing models by name, and the rule that picks one for a scene.

The registry is written out here, not filled by import side effects: a new model is
one entry in :data:`MODELS` and, if a scene should pick it by itself, one selector in
:data:`SELECTORS` (see DEVELOPERS.md).
"""

from __future__ import annotations

from swingsim.dynamics.hook_load import MODEL_NAMES, HookLoadModel, model_name
from swingsim.dynamics.pendulum import PointMassModel

#: Model classes by name; each follows :class:`swingsim.dynamics.base.SwingModel`.
MODELS: dict = {"point-mass": PointMassModel, **{name: HookLoadModel for name in MODEL_NAMES}}

#: Functions ``scene -> model name or None``, tried in order; the first name wins and
#: the point-mass model is used when none claims the scene.
SELECTORS: tuple = (model_name,)


def model_name_for(scene) -> str:
    """The name of the model that fits a scene.

    Parameters
    ----------
    scene : Scene
        A scene whose keys are valid; each selector of :data:`SELECTORS` reads it.

    Returns
    -------
    str
        A key of :data:`MODELS`.
    """
    for select in SELECTORS:
        name = select(scene)
        if name:
            return name
    return "point-mass"


def select_model(scene):
    """The model that fits the scene, built for it (point mass unless a selector claims it).

    Parameters
    ----------
    scene : Scene
        As for :func:`model_name_for`; the model is built for it.

    Returns
    -------
    SwingModel
    """
    return MODELS[model_name_for(scene)](scene)
