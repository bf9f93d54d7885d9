"""Integrate one scene: scipy ``solve_ivp`` (DOP853), restarted at every breakpoint.

A model may name another of scipy's methods in its ``solver_method``: ground contact
is stiff (its regularised friction), and there the hook-and-load model asks for LSODA,
which switches between Adams and BDF steps as the stiffness comes and goes (Petzold,
SIAM J. Sci. Stat. Comput. 4, 1983).

Stopping and restarting exactly at each profile breakpoint keeps the jumps in
acceleration (or jerk) of the crane's motion out of the integrator's error
estimate, so they are not smeared.  The result is a :class:`Trajectory` with a
dense interpolant valid at any time, so that a frame or a sample at any
instant shows the state at exactly that instant.
"""

from __future__ import annotations

import numpy as np

from swingsim import constants
from swingsim.dynamics.registry import select_model
from swingsim.motion.registry import build_motion, needs_swing_period
from swingsim.simulation.trajectory import Trajectory


def prepare(scene, model=None):
    """The model and the motion of a scene: the model is chosen first, so that profiles
    tuned to the swing period (input shaping) are built with the model's own period.

    Parameters
    ----------
    scene : Scene
        A validated scene.
    model : SwingModel, optional
        A model to use instead of the one the scene selects.

    Returns
    -------
    tuple
        ``(model, motion)``: the :class:`~swingsim.dynamics.base.SwingModel` and the
        :class:`~swingsim.motion.kinematics.Motion`.
    """
    model = select_model(scene) if model is None else model
    period = float(model.mode_periods_s()[0]) if needs_swing_period(scene) else None
    return model, build_motion(scene, swing_period_s=period)


def simulate(scene, *, rtol: float = constants.RTOL, atol: float = constants.ATOL, model=None) -> Trajectory:
    """Integrate the full nonlinear equations of motion of a scene.

    Parameters
    ----------
    scene : Scene
        A validated scene.
    rtol, atol : float
        Relative [-] and absolute [state units] tolerances of scipy's DOP853
        (8th-order Dormand-Prince) integrator.
    model : SwingModel, optional
        A model (:class:`~swingsim.dynamics.base.SwingModel`) to use instead of the
        one the scene selects.

    Returns
    -------
    Trajectory
        Check ``status``: a run that the model cannot carry on (slack rope,
        swing at the model's limit, a failing solver) stops early and says why.
    """
    from scipy.integrate import solve_ivp  # lazily: start-up time of every command
    model, motion = prepare(scene, model)
    y = np.asarray(model.initial_state(motion), dtype=float)
    T = scene.duration_s
    cuts = sorted({0.0, T} | {b for b in motion.breakpoints if 0.0 < b < T}
                  | {b for b in model.extra_breakpoints if 0.0 < b < T})
    traj = Trajectory(scene, model, motion)
    for t0, t1 in zip(cuts[:-1], cuts[1:]):
        if t1 - t0 < 1e-12:
            continue
        kin = motion.local(t0, t1)
        rhs = model.make_rhs(kin)
        events = model.make_events(kin)
        names = list(events)
        # an event already past its threshold at the start of a piece (e.g. the
        # tension jumping below zero with the acceleration) has no crossing to find
        for n in names:
            if events[n](t0, y) <= 0.0:
                traj.status = n
                traj.message = model.event_message(n, t0) or _event_message(n, t0)
                if not traj.pieces:  # nothing integrated yet: keep the initial state
                    traj.pieces.append((t0, t0, _Constant(y)))
                    traj.t_end_s = t0
                return traj
        with np.errstate(all="ignore"):
            res = solve_ivp(rhs, (t0, t1), y, method=getattr(model, "solver_method", "DOP853"), rtol=rtol,
                            atol=atol,
                            max_step=model.max_step_s, dense_output=True, events=[events[n] for n in names])
        traj.nfev += res.nfev
        if res.status == -1 or not np.all(np.isfinite(res.y)):
            traj.status = "nonfinite" if not np.all(np.isfinite(res.y)) else "solver"
            traj.message = (f"the integrator failed at t = {res.t[-1]:.3f} s ({res.message}); "
                            "no result after that instant can be trusted")
            good = np.all(np.isfinite(res.y), axis=0)
            last = int(np.argmin(good)) - 1 if not good.all() else len(res.t) - 1
            if last > 0 and res.sol is not None:
                traj.pieces.append((t0, float(res.t[last]), res.sol))
                traj.t_end_s = float(res.t[last])
            return traj
        traj.pieces.append((t0, float(res.t[-1]), res.sol))
        traj.t_end_s = float(res.t[-1])
        if res.status == 1:
            for n, te in zip(names, res.t_events):
                if len(te):
                    traj.status = n
                    traj.message = model.event_message(n, float(te[0])) or _event_message(n, float(te[0]))
                    break
            return traj
        y = res.y[:, -1]
    return traj


class _Constant:
    """Dense-output stand-in holding one state (a run stopped at its first instant)."""

    def __init__(self, y):
        self.y = np.asarray(y, dtype=float)

    def __call__(self, t):
        t = np.atleast_1d(t)
        return np.repeat(self.y[:, None], t.size, axis=1)


def _event_message(name: str, t: float) -> str:
    if name == "slack":
        return (f"the hoist rope would go slack at t = {t:.3f} s (tension falls to zero): "
                "the load would be thrown or fall, the pendulum model no longer holds, and "
                "the results stop there")
    if name == "overswing":
        return (f"the swing reached {constants.MODEL_ANGLE_LIMIT_DEG:g} deg at t = {t:.3f} s, beyond any "
                "crane's working range and the model's limit; the results stop there")
    return f"the run stopped at t = {t:.3f} s ({name})"

