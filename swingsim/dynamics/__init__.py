"""Equations of motion: one model per module, pure functions of state and time.

Nothing here imports I/O, plotting, the renderer or the command line.

Importing this package registers the hook-and-load models (``hook_load.py``)
in :data:`swingsim.simulation.MODELS` / :data:`swingsim.simulation.MODEL_SELECTORS`;
``swingsim.simulation`` imports it, so ``simulate`` always sees them.
"""


def _register() -> None:
    from swingsim import simulation as solve
    from swingsim.dynamics.hook_load import MODEL_NAMES, HookLoadModel, model_name

    for name in MODEL_NAMES:
        solve.MODELS.setdefault(name, HookLoadModel)
    if model_name not in solve.MODEL_SELECTORS:
        solve.MODEL_SELECTORS.append(model_name)


_register()
