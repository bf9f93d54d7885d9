"""The solved motion of a scene: dense output valid at any instant."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from swingsim.dynamics.base import SwingModel
from swingsim.motion.kinematics import Motion


@dataclass
class Trajectory:
    """The solved motion of a scene.

    Attributes
    ----------
    scene : Scene
        What was solved.
    model : SwingModel
        Its model.
    motion : Motion
        Its prescribed crane motion.
    pieces : list
        ``(t0, t1, OdeSolution)`` of each integrated piece between breakpoints.
    t_end_s : float
        Last instant with a valid state (the scene's duration unless the run stopped early).
    status : str
        ``"ok"``, or why the run stopped early: ``"slack"`` (the rope would go
        slack), ``"overswing"`` (the swing reached the model's limit),
        ``"nonfinite"`` or ``"solver"`` (the integrator failed).
    message : str
        Explanation for a status other than ``"ok"``.
    nfev : int
        Right-hand-side evaluations of the whole run.
    """

    scene: object
    model: SwingModel
    motion: Motion
    pieces: list = field(default_factory=list)
    t_end_s: float = 0.0
    status: str = "ok"
    message: str = ""
    nfev: int = 0

    @property
    def valid(self) -> bool:
        return self.status == "ok"

    def state(self, t) -> np.ndarray:
        """State(s) from the dense interpolant.

        Parameters
        ----------
        t : float or array_like
            Time(s) [s], clipped to the piece each falls in.

        Returns
        -------
        ndarray
            Shape ``t.shape + (n,)``, ordered as the model's ``state_names``.
        """
        t = np.atleast_1d(np.asarray(t, dtype=float))
        out = np.empty(t.shape + (len(self.model.state_names),))
        starts = np.array([p[0] for p in self.pieces])
        idx = np.clip(np.searchsorted(starts, t, side="right") - 1, 0, len(self.pieces) - 1)
        for k in np.unique(idx):
            sel = idx == k
            t0, t1, sol = self.pieces[k]
            out[sel] = sol(np.clip(t[sel], t0, t1)).T
        return out

    def sample(self, t) -> dict:
        """All derived quantities of the model at the given times.

        Parameters
        ----------
        t : float or array_like
            Time(s) within the run, 0 to :attr:`t_end_s` [s].

        Returns
        -------
        dict
            The model's ``outputs`` (:meth:`swingsim.dynamics.base.SwingModel.outputs`)
            and ``t``.
        """
        t = np.atleast_1d(np.asarray(t, dtype=float))
        d = self.model.outputs(t, self.state(t), self.motion)
        d["t"] = t
        return d

    def sample_times(self, rate_hz: float | None = None) -> np.ndarray:
        """Uniform sample times from 0 to ``t_end_s`` (the end included).

        Parameters
        ----------
        rate_hz : float, optional
            Sample rate [Hz]; the scene's ``sample_hz`` by default.

        Returns
        -------
        ndarray
            Times [s].
        """
        rate = self.scene.sample_hz if rate_hz is None else rate_hz
        n = int(math.floor(self.t_end_s * rate + 1e-9))
        t = np.arange(n + 1) / rate
        if t[-1] < self.t_end_s - 1e-9:
            t = np.append(t, self.t_end_s)
        return t
