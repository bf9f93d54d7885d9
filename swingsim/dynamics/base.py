"""What a swing model must provide: the :class:`SwingModel` protocol and its defaults.

The solver (:func:`swingsim.simulation.simulate`), the metrics and the tables call a
model only through the members listed here, the way scipy's ``OdeSolver`` documents
what a solver subclass must implement.  A new model:

1. subclasses :class:`ModelDefaults` (the optional members, with neutral defaults);
2. implements the required members of :class:`SwingModel` below;
3. is listed in :data:`swingsim.dynamics.registry.MODELS`.

``isinstance(model, SwingModel)`` checks that every member is present (not their
signatures); ``tests/test_swing_model.py`` runs it on every registered model.
"""

from __future__ import annotations

from typing import Protocol, runtime_checkable

import numpy as np

#: Output keys every model's :meth:`SwingModel.outputs` returns.
REQUIRED_OUTPUTS = ("suspension", "suspension_vel", "rope_length", "load", "load_vel", "hook",
                    "rope_dir", "rope_tension_N", "energy_J", "static_rope_load_N")


@runtime_checkable
class SwingModel(Protocol):
    """The contract between a swing model and the rest of swingsim.

    Attributes
    ----------
    name : str
        The model's key in :data:`swingsim.dynamics.registry.MODELS` (written to the
        summary as ``model``).
    state_names : tuple of str
        Names of the state vector's entries: the generalised coordinates, then their
        rates (``"d" + name``).  Its length is the state's length.
    extra_breakpoints : tuple of float
        Instants [s] where the equations change (besides the motion's own
        breakpoints); the solver stops and restarts there.  Known after
        :meth:`initial_state`.

    Notes
    -----
    The solver calls :meth:`initial_state`, then for every piece between breakpoints
    :meth:`make_rhs` and :meth:`make_events`; metrics and tables call
    :meth:`outputs`, :meth:`mode_periods_s`, :meth:`rest_direction` and
    :meth:`bounce_period_s`.  :meth:`rest_direction`, :meth:`event_message`,
    :meth:`bounce_period_s` and ``extra_breakpoints`` are optional: a model that
    subclasses :class:`ModelDefaults` gets neutral defaults for them.
    """

    name: str
    state_names: tuple
    extra_breakpoints: tuple

    def initial_state(self, motion) -> np.ndarray:
        """The state at t = 0.

        Parameters
        ----------
        motion : Motion
            The prescribed crane motion (:class:`~swingsim.motion.kinematics.Motion`).

        Returns
        -------
        ndarray
            State vector, ordered as :attr:`state_names` [chart units].
        """

    def make_rhs(self, kin):
        """The right-hand side of the equations of motion on one piece between breakpoints.

        Parameters
        ----------
        kin : callable
            ``kin(t)`` gives the :class:`~swingsim.motion.kinematics.SuspensionState`
            at any ``t`` [s] of the piece (``Motion.local``).

        Returns
        -------
        callable
            ``f(t, y) -> dy/dt`` for scipy's ``solve_ivp``.
        """

    def make_events(self, kin) -> dict:
        """Terminal events of one piece: the run stops where one crosses zero downwards.

        Parameters
        ----------
        kin : callable
            As for :meth:`make_rhs`.

        Returns
        -------
        dict
            Event name -> scipy ``solve_ivp`` event function ``g(t, y)`` with
            ``terminal`` and ``direction`` set.
        """

    def outputs(self, t, Y, motion) -> dict:
        """Derived quantities at sample times.

        Parameters
        ----------
        t : ndarray
            Sample times (N,) [s].
        Y : ndarray
            States (N, n) at those times.
        motion : Motion
            The prescribed crane motion.

        Returns
        -------
        dict
            Always the keys of :data:`REQUIRED_OUTPUTS`: ``suspension``,
            ``suspension_vel``, ``load``, ``load_vel`` (N, 3) [m, m/s];
            ``rope_dir`` (N, 3) unit vectors down the rope [-]; ``hook`` (N, 3) [m] or
            None without a hook block; ``rope_length`` (N,) [m]; ``rope_tension_N``
            (N,) [N]; ``energy_J`` (N,) [J]; ``static_rope_load_N`` [N] (the weight
            the rope carries at rest).  Optional: ``extra_columns``, a dict of
            further time-series columns (name -> (N,) array) for the CSV.
        """

    def mode_periods_s(self, rope_length_m: float | None = None) -> list:
        """Small-amplitude swing periods about hanging rest, longest first.

        Parameters
        ----------
        rope_length_m : float, optional
            Rope length [m]; the scene's initial length by default.

        Returns
        -------
        list of float
            Periods [s]; the first is the one input shaping is tuned to.
        """

    def rest_direction(self, rope_length_m: float) -> np.ndarray:
        """Unit direction of the hoist rope with the load hanging at rest (optional).

        Parameters
        ----------
        rope_length_m : float
            Rope length [m].

        Returns
        -------
        ndarray
            Unit vector (3,) from the suspension point down the rope [-].
        """

    def event_message(self, name: str, t: float) -> str | None:
        """The model's own explanation of a terminal event (optional).

        Parameters
        ----------
        name : str
            The event's key in :meth:`make_events`.
        t : float
            The instant of the event [s].

        Returns
        -------
        str or None
            A sentence for the run's status message, or None for the solver's
            generic one.
        """

    def bounce_period_s(self, rope_length_m: float | None = None) -> float | None:
        """Period of the vertical bounce on an elastic rope (optional).

        Parameters
        ----------
        rope_length_m : float, optional
            As for :meth:`mode_periods_s` [m].

        Returns
        -------
        float or None
            The period [s], or None for an inextensible rope.
        """


class ModelDefaults:
    """Neutral defaults of the optional members of :class:`SwingModel`.

    A model overrides what applies to it; callers then call every member without
    probing for it.
    """

    #: No instants where the equations change besides the motion's breakpoints.
    extra_breakpoints: tuple = ()
    #: No bound on the solver's step besides its error control [s] (a turbulent wind sets one).
    max_step_s: float = float("inf")

    def rest_direction(self, rope_length_m: float) -> np.ndarray:
        """Default of :meth:`SwingModel.rest_direction`: the rope hangs plumb.

        Parameters
        ----------
        rope_length_m : float
            Rope length [m]; unused, a plumb rope does not lean with it.

        Returns
        -------
        ndarray
            ``(0, 0, -1)`` [-].
        """
        return np.array([0.0, 0.0, -1.0])

    def event_message(self, name: str, t: float) -> str | None:
        """Default of :meth:`SwingModel.event_message`: no message of the model's own.

        Parameters
        ----------
        name, t : str, float
            Event key and instant [s]; unused.

        Returns
        -------
        None
            The solver then writes its generic message.
        """
        return None

    def bounce_period_s(self, rope_length_m: float | None = None) -> float | None:
        """Default of :meth:`SwingModel.bounce_period_s`: no bounce (inextensible rope).

        Parameters
        ----------
        rope_length_m : float, optional
            Rope length [m]; unused.

        Returns
        -------
        None
            No vertical bounce period.
        """
        return None
