"""Summary numbers of the hook-and-load models: legs, tilt, bounce, measured modes.

Kept apart from ``metrics.py`` (which measures what every model has): this
module reads the extra outputs of :class:`~swingsim.dynamics.hook_load.HookLoadModel`
and returns the extra ``summary.json`` keys, the extra cautions and the extra
lines of ``summary.txt``.  A model without these outputs adds nothing.

Definitions
-----------
leg dynamic factor
    Peak tension of a leg over its tension with the system hanging at rest
    (static equilibrium of the same model, which for a symmetric rig is the
    rigging rule :math:`W / (n \\cos\\theta)`, common practice).
measured mode periods
    After the last move, the motion about rest is split into the modal
    coordinates of the linear swing modes (mass-normalised, so each mode's
    energy is :math:`(\\dot\\eta^2 + \\omega^2 \\eta^2)/2`).  A mode is measured
    only when it holds at least :data:`MODE_ENERGY_SHARE` of the swing's
    energy over the record (a relative threshold: rounding noise and modes the
    motion does not excite are not reported); its period is the spectral peak
    of its own modal coordinate (Hann window, zero-padded FFT, parabolic peak
    interpolation) within :data:`MODE_BAND` of its linear frequency (its own
    coordinate, so close modes do not blur each other).  The record must last
    :data:`MODE_RECORD_PERIODS` periods of the longest mode.  Where a mode is not
    measured, ``mode_measurement_notes`` says why.
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from swingsim.metrics.cautions import force_text
from swingsim.metrics.contact import CONTACT_FRACTION, contact_text

#: Leg angle from vertical above which a caution is raised [deg].  Common practice: slings
#: at less than 30 deg from horizontal (60 deg from vertical) are not to be used, and legs
#: beyond 45 deg from vertical carry markedly more than their share (rule of thumb).
LEG_ANGLE_CAUTION_DEG = 45.0
LEG_ANGLE_LIMIT_DEG = 60.0
#: Tilt of the hanging load from level above which a caution is raised [deg] (rule of thumb).
REST_TILT_CAUTION_DEG = 5.0
#: Share of the swing's energy a mode must hold to be measured [-] (module Definitions).
MODE_ENERGY_SHARE = 1e-4
#: Record after the last move needed to measure the modes [periods of the longest mode].
MODE_RECORD_PERIODS = 3.0
#: Half-width of the band searched around each linear mode frequency [fraction of it].
MODE_BAND = 0.15


def _peak(t, x):
    i = int(np.argmax(x))
    return float(x[i]), float(t[i])


class MeasuredModes(NamedTuple):
    """Measured mode periods: one entry per small-amplitude mode period."""

    #: Measured period [s], or None where it cannot be measured.
    periods_s: list
    #: Why a mode was not measured (None where it was).
    reasons: list


def measured_mode_periods(t, q, qd, rest, modes, periods, t_from) -> MeasuredModes:
    """Periods of the swing modes measured after the last move (module Definitions).

    Parameters
    ----------
    t : ndarray
        Sample times (N,) [s].
    q, qd : ndarray
        Swing coordinates and their rates at those times (N, n) [chart units, per s].
    rest : ndarray
        The swing coordinates at rest (n,) [chart units].
    modes : tuple
        ``(omega_sq, shapes, mass)`` of the model's linear swing modes
        (:meth:`~swingsim.dynamics.hook_load.HookLoadModel.swing_modes`).
    periods : list of float
        The model's small-amplitude mode periods [s] (a degenerate pair once).
    t_from : float
        Start of the record to analyse (the end of the last move) [s].

    Returns
    -------
    MeasuredModes
        One measured period [s] per entry of ``periods``, or None and the reason.

    References
    ----------
    .. [1] F. J. Harris, "On the use of windows for harmonic analysis with the
       discrete Fourier transform", *Proc. IEEE* 66(1), 51-83, 1978 (Hann window).
    .. [2] L. Meirovitch, *Fundamentals of Vibrations*, McGraw-Hill, 2001 (modal
       coordinates of mass-normalised modes, the energy of each mode).
    """
    n_modes = len(periods)
    sel = t >= t_from
    if not periods:
        return MeasuredModes([], [])
    ts = t[sel]
    span = float(ts[-1] - ts[0]) if ts.size > 1 else 0.0
    if ts.size < 64 or span < MODE_RECORD_PERIODS * max(periods):
        why = (f"the record after the last move ({span:.1f} s) is shorter than {MODE_RECORD_PERIODS:g} "
               f"periods of the longest mode")
        return MeasuredModes([None] * n_modes, [why] * n_modes)
    omega_sq, shapes, mass = modes
    # modal coordinates about rest (mass-normalised modes: eta = Phi^T M (q - q_rest))
    projector = shapes.T @ mass
    eta = (q[sel] - rest[None, :]) @ projector.T
    eta_rate = qd[sel] @ projector.T
    # each mode's mean energy per unit modal mass over the record, (eta'^2 + w^2 eta^2) / 2
    energy = 0.5 * np.mean(eta_rate**2 + np.clip(omega_sq, 0.0, None)[None, :] * eta**2, axis=0)
    total = float(np.sum(energy))
    dt = float(np.median(np.diff(ts)))
    tu = np.arange(ts[0], ts[-1], dt)
    window = np.hanning(len(tu))
    nfft = 1 << int(math.ceil(math.log2(len(tu) * 8)))
    f = np.fft.rfftfreq(nfft, dt)
    resolution = 1.0 / span  # modes closer than that cannot be told apart
    fs = [1.0 / T for T in periods]
    out, reasons = [None] * n_modes, [None] * n_modes
    for k, f0 in enumerate(fs):
        # the modes behind this period (both of a degenerate pair)
        members = [j for j in range(len(omega_sq))
                   if omega_sq[j] > 0 and abs(2 * math.pi / math.sqrt(omega_sq[j]) - periods[k])
                   <= 1e-6 * periods[k]]
        share = float(np.sum(energy[members])) / total if total > 0 else 0.0
        if share < MODE_ENERGY_SHARE:
            reasons[k] = (f"no real energy in this mode after the last move ({100 * share:.2g}% of the "
                          f"swing's energy; the threshold is {100 * MODE_ENERGY_SHARE:g}%)")
            continue
        # each mode has a coordinate of its own, so a neighbouring mode does not narrow the band
        band = np.nonzero((f > (1.0 - MODE_BAND) * f0) & (f < (1.0 + MODE_BAND) * f0))[0]
        if 2.0 * MODE_BAND * f0 < 2.0 * resolution or band.size < 3:
            reasons[k] = "the record after the last move is too short to resolve this mode"
            continue
        # the power spectra of the mode's own coordinates (one unit: no normalisation needed)
        power = np.zeros(f.size)
        for j in members:
            series = np.interp(tu, ts, eta[:, j])
            power += np.abs(np.fft.rfft(series * window, nfft)) ** 2
        spec = np.sqrt(power)
        i = band[int(np.argmax(spec[band]))]
        if i in (band[0], band[-1]):
            reasons[k] = "its spectral peak lies outside the band around the linear period"
            continue
        y0, y1, y2 = spec[i - 1], spec[i], spec[i + 1]
        den = y0 - 2 * y1 + y2
        shift = 0.5 * (y0 - y2) / den if den != 0 else 0.0
        fp = f[i] + shift * (f[1] - f[0])
        if fp > 0:
            out[k] = float(1.0 / fp)
        else:
            reasons[k] = "no spectral peak"
    return MeasuredModes(out, reasons)


def _hanging(model, s) -> np.ndarray:
    """Samples where the load hangs (not pressed on the ground): the rigging's tensions count only there."""
    if "ground_normal_N" not in s:
        return np.ones(len(s["rope_tension_N"]), dtype=bool)
    return s["ground_normal_N"] <= CONTACT_FRACTION * model.load_mass_kg * model.gravity_m_s2


def model_metrics(traj, t, s) -> dict:
    """Extra summary keys for a hook-and-load trajectory (empty for the point-mass model).

    Parameters
    ----------
    traj : Trajectory
        The solved run; its model is a :class:`~swingsim.dynamics.hook_load.HookLoadModel`
        when the samples hold ``leg_tension_N``.
    t : ndarray
        Metric sample times (N,) [s].
    s : dict
        The model's outputs at ``t`` (``Trajectory.sample``).

    Returns
    -------
    dict
        Summary keys: leg tensions and dynamic factors [kN, -], tilt [deg], hook
        excursion [m], elastic rope stiffness [kN/m], bounce period [s], stretch [m],
        lift-off instant [s] and measured mode periods [s] (see module Definitions).
    """
    if "leg_tension_N" not in s:
        return {}
    model, scene = traj.model, traj.scene
    d: dict = {}
    d["hook_mass_kg"] = model.hook_mass_kg if model.has_hook_block else None
    d["load_modelled_as"] = "rigid body" if model.rigid_load else "point mass"
    d["rigging_kind"] = model.rigging_kind if scene.rigging is not None else None
    d["yaw_held_fixed"] = bool(model.rigid_load and model.yaw_index is None)
    legs = s["leg_tension_N"]
    static = model.static_leg_tension_N()
    hanging = model.hanging_leg_tension_N()
    wll = model.leg_wll_N
    rows = []
    leg_dirs = model.leg_angles_at_rest_deg()
    hangs = _hanging(model, s)
    for j in range(legs.shape[1]):
        pk, pk_t = _peak(t, legs[:, j])
        # slack legs over a load resting on the ground are normal: the minimum counts while it hangs
        mn_i = int(np.argmin(np.where(hangs, legs[:, j], np.inf))) if hangs.any() else int(np.argmin(legs[:, j]))
        rows.append({
            "leg": j + 1,
            "peak_kN": pk / 1e3, "peak_time_s": pk_t,
            "min_kN": float(legs[mn_i, j]) / 1e3, "min_time_s": float(t[mn_i]),
            "static_rule_kN": float(static[j]) / 1e3,
            "hanging_kN": float(hanging[j]) / 1e3,
            "dynamic_factor": pk / float(hanging[j]) if hanging[j] > 0 else None,
            "wll_kN": None if wll is None else float(wll[j]) / 1e3,
            "peak_over_wll": None if wll is None else pk / float(wll[j]),
            "angle_from_vertical_deg": None if leg_dirs is None else leg_dirs[j],
        })
    d["leg_tensions"] = rows
    d["peak_leg_tension_kN"] = max(r["peak_kN"] for r in rows)
    d["leg_peak_tensions_kN"] = [r["peak_kN"] for r in rows]
    d["leg_dynamic_factors"] = [r["dynamic_factor"] for r in rows]
    dfs = [r["dynamic_factor"] for r in rows if r["dynamic_factor"] is not None]
    d["leg_dynamic_factor"] = max(dfs) if dfs else None
    if "top_sling_tension_N" in s:
        top = s["top_sling_tension_N"]
        d["top_sling_peak_tension_kN"] = [float(np.max(top[:, j])) / 1e3 for j in range(2)]
        d["top_sling_wll_kN"] = scene.rigging.top_wll_kN
    if model.rigid_load:
        tilt = s["extra_columns"]["load_tilt_deg"]
        R0 = model.rest_rotation()
        d["rest_tilt_deg"] = float(np.degrees(np.arccos(np.clip(R0[2, 2], -1, 1))))
        pk, pk_t = _peak(t, tilt)
        d["peak_tilt_deg"], d["peak_tilt_time_s"] = pk, pk_t
        # tilt relative to the hanging attitude (what the swing adds)
        rz = s["load_rotation"][:, :, 2]
        dev = np.degrees(np.arccos(np.clip(rz @ R0[:, 2], -1.0, 1.0)))
        d["peak_tilt_from_rest_deg"] = float(np.max(dev))
        post = t >= traj.motion.last_move_end_s - 1e-12
        d["residual_tilt_from_rest_deg"] = float(np.max(dev[post])) if post.any() else None
        d.update(turn_metrics(t, s, model))
    if model.has_hook_block:
        hor = s["hook"][:, :2] - s["suspension"][:, :2]
        d["peak_hook_excursion_m"] = float(np.max(np.hypot(hor[:, 0], hor[:, 1])))
    if model.rope_is_elastic:
        rp = model.elastic_rope
        d["rope_elastic"] = True
        # at the hanging length (for a lift-off, as it hangs once lifted, not slack at t = 0)
        k_hanging = model.hanging_stiffness_N_per_m()
        d["rope_stiffness_kN_per_m"] = k_hanging / 1e3
        d["rope_stiffness_from"] = rp.source
        d["bounce_period_s"] = model.bounce_period_s()
        d["peak_rope_stretch_m"] = float(np.max(s["rope_stretch_m"]))
        d["static_rope_stretch_m"] = model.hanging_mass_kg * model.gravity_m_s2 / k_hanging
        if model.starts_resting:
            d["lift_off_s"] = model.lift_off_time_s if math.isfinite(model.lift_off_time_s) else None
    else:
        d["rope_elastic"] = False
    # measured periods of the swing modes after the last move, about the rest at the final length
    Y = traj.state(t)
    cols = model.swing_coordinate_indices()
    nq = model.n_coordinates
    L_end = float(traj.motion.evaluate(np.array([t[-1]]))["L"][0])
    rest = model.wind_rest_state(L_end)[:nq]
    measured = measured_mode_periods(t, Y[:, cols], Y[:, [nq + c for c in cols]], rest[cols],
                                     model.swing_modes(L_end), list(model.mode_periods_s(L_end)),
                                     traj.motion.last_move_end_s)
    d["measured_mode_periods_s"] = measured.periods_s
    d["mode_measurement_notes"] = measured.reasons
    return d


def model_warnings(s: dict, scene) -> list[str]:
    """Cautions about the rigging and the hook-and-load results.

    Parameters
    ----------
    s : dict
        The summary (with the keys of :func:`model_metrics`).
    scene : Scene
        Its scene.

    Returns
    -------
    list of str
        One sentence per caution; thresholds in the module constants [deg].
    """
    out = []
    rows = s.get("leg_tensions") or []
    many = len(rows) > 1
    for r in rows:
        name = f"Sling leg {r['leg']}" if many else "The sling leg"
        if r["wll_kN"] is not None and r["peak_kN"] > r["wll_kN"]:
            out.append(f"{name}: peak dynamic tension {force_text(r['peak_kN'], 2)} at t = {r['peak_time_s']:.1f} s "
                       f"exceeds its declared working load limit of {force_text(r['wll_kN'], 2)}: the rigging "
                       "plan, the sling selection and the competent person decide; do not lift on "
                       "these numbers.")
        elif r["wll_kN"] is not None and r["peak_kN"] > 0.9 * r["wll_kN"]:
            out.append(f"{name}: peak dynamic tension {force_text(r['peak_kN'], 2)} is within 10% of its declared "
                       f"working load limit of {force_text(r['wll_kN'], 2)}: little margin; check the rigging plan.")
        if r["min_kN"] < 0.0:
            out.append(f"{name} would go slack (its tension falls below zero at t = {r['min_time_s']:.1f} s): "
                       "the load would shift in the rigging and snatch it; the rigid-rigging model "
                       "does not hold there.")
        a = r.get("angle_from_vertical_deg")
        if a is not None and a > LEG_ANGLE_LIMIT_DEG:
            out.append(f"{name} hangs {a:.0f} deg from vertical (less than 30 deg from horizontal): "
                       "common practice is not to use slings at such angles.")
        elif a is not None and a > LEG_ANGLE_CAUTION_DEG:
            out.append(f"{name} hangs {a:.0f} deg from vertical: the leg carries "
                       f"{1 / math.cos(math.radians(a)):.2f} times its share of the weight "
                       "(rule of thumb caution angle 45 deg).")
    if len(rows) >= 4 and scene.rigging is not None and scene.rigging.kind == "bridle":
        out.append("A bridle of four or more legs on a rigid load is statically indeterminate: the "
                   "leg tensions shown share the load evenly (minimum norm), but small differences in "
                   "leg length can put it on two legs; common practice rates such a bridle as if "
                   "only two legs carried the load (from memory): follow the rigging plan.")
    if s.get("top_sling_peak_tension_kN") and s.get("top_sling_wll_kN"):
        for j, pk in enumerate(s["top_sling_peak_tension_kN"]):
            if pk > s["top_sling_wll_kN"]:
                out.append(f"Spreader top sling {j + 1}: peak tension {force_text(pk, 2)} exceeds its declared "
                           f"working load limit of {force_text(s['top_sling_wll_kN'], 2)}: check the rigging plan.")
            elif pk > 0.9 * s["top_sling_wll_kN"]:
                out.append(f"Spreader top sling {j + 1}: peak tension {force_text(pk, 2)} is within 10% of its "
                           f"declared working load limit of {force_text(s['top_sling_wll_kN'], 2)}: little margin; "
                           "check the rigging plan.")
    rt = s.get("rest_tilt_deg")
    if rt is not None and rt > REST_TILT_CAUTION_DEG:
        out.append(f"The load hangs {rt:.1f} deg out of level at rest: its centre of gravity is not "
                   "under the hook point; check the CG and the rigging geometry.")
    if s.get("yaw_held_fixed"):
        out.append("The rigid load's yaw (turning about the vertical) is held fixed in this model: "
                   "spinning of the load is not simulated; use tag lines as the lift plan says.")
    if "lift_off_s" in s and s["lift_off_s"] is None:
        out.append("The load never lifts off in the simulated time: the hoist does not pull its weight "
                   "into the rope.")
    ldf = s.get("leg_dynamic_factor")
    if ldf is not None and ldf > 1.15 and many:
        out.append(f"Motion raises the sling leg tensions to {ldf:.2f} times their hanging values.")
    return out


def turn_metrics(t, s, model) -> dict:
    """The rigid load's turn about the vertical and the reach of its ends (module Definitions).

    Parameters
    ----------
    t : ndarray
        Sample times (N,) [s].
    s : dict
        The model's outputs at ``t``: ``load_yaw_deg`` (N,) [deg], ``load_corners``
        (N, 8, 3) or None [m], ``hook`` or ``rope_end`` (N, 3) [m].
    model : HookLoadModel
        The model (its swivel).

    Returns
    -------
    dict
        ``swivel``; ``peak_load_yaw_deg`` and its time [deg, s]: the largest turn from the
        start heading; ``load_end_sweep_radius_m`` [m]: the largest horizontal distance of
        the box's corners from the hook's vertical (None without ``load.size_m``).
    """
    yaw = np.abs(s["load_yaw_deg"])
    i = int(np.argmax(yaw))
    d = {"swivel": model.swivel if model.yaw_index is not None or model.swivel == "free" else "locked (held)",
         "peak_load_yaw_deg": float(yaw[i]), "peak_load_yaw_time_s": float(t[i]),
         "load_end_sweep_radius_m": None}
    corners = s.get("load_corners")
    if corners is not None:
        hook = s["hook"] if s.get("hook") is not None else s["rope_end"]
        reach = np.hypot(corners[:, :, 0] - hook[:, None, 0], corners[:, :, 1] - hook[:, None, 1])
        d["load_end_sweep_radius_m"] = float(np.max(reach))
    return d


def model_summary_lines(d: dict) -> list[str]:
    """Extra lines of summary.txt (empty for the point-mass model).

    Parameters
    ----------
    d : dict
        The summary (with the keys of :func:`model_metrics`).

    Returns
    -------
    list of str
        Lines of text, units written out.
    """
    if "leg_tensions" not in d:
        return []
    w = ["", "Hook block and rigging"]
    if d.get("hook_mass_kg"):
        w.append(f"  Hook block {d['hook_mass_kg']:g} kg; peak hook excursion "
                 f"{d.get('peak_hook_excursion_m', 0.0):.2f} m")
    w.append(f"  Load as a {d['load_modelled_as']}"
             + (f" on a {d['rigging_kind']} rig" if d.get("rigging_kind") else ""))
    for r in d["leg_tensions"]:
        line = (f"  Leg {r['leg']}: peak {force_text(r['peak_kN'])} at t = {r['peak_time_s']:.1f} s; "
                f"hanging {force_text(r['hanging_kN'])} (rule {force_text(r['static_rule_kN'])})")
        if r["dynamic_factor"] is not None:
            line += f"; dynamic factor {r['dynamic_factor']:.2f}"
        if r["wll_kN"] is not None:
            line += f"; WLL {force_text(r['wll_kN'])} ({100 * r['peak_over_wll']:.1f}%)"
        w.append(line)
    if d.get("top_sling_peak_tension_kN"):
        w.append("  Spreader top slings: peak " + ", ".join(force_text(x) for x in d["top_sling_peak_tension_kN"]))
    if d.get("peak_tilt_deg") is not None:
        w.append(f"  Load tilt: {d['rest_tilt_deg']:.1f} deg at rest; peak {d['peak_tilt_deg']:.1f} deg "
                 f"from level, {d['peak_tilt_from_rest_deg']:.1f} deg from its hanging attitude"
                 + (" (yaw held fixed)" if d.get("yaw_held_fixed") else ""))
    if d.get("peak_load_yaw_deg") is not None:
        w.append(f"  Load turn (swivel {d['swivel']}): peak {d['peak_load_yaw_deg']:.1f} deg from its start "
                 f"heading at t = {d['peak_load_yaw_time_s']:.1f} s"
                 + ("" if d.get("load_end_sweep_radius_m") is None else
                    f"; its ends reach {d['load_end_sweep_radius_m']:.2f} m from the hook's vertical"))
    if d.get("rope_elastic"):
        w.append(f"  Elastic rope: {d['rope_stiffness_kN_per_m']:.0f} kN/m ({d['rope_stiffness_from']}); "
                 f"bounce period {d['bounce_period_s']:.3f} s; peak stretch {1000 * d['peak_rope_stretch_m']:.1f} mm "
                 f"(static {1000 * d['static_rope_stretch_m']:.1f} mm)")
    w.extend(contact_text(d))
    if "lift_off_s" in d:
        w.append("  Lift-off: " + ("the hoist never pulls the weight into the rope" if d["lift_off_s"] is None
                                   else f"at t = {d['lift_off_s']:.2f} s"))
    mm = d.get("measured_mode_periods_s")
    if mm and any(x is not None for x in mm):
        w.append("  Measured mode periods after the moves: "
                 + ", ".join("n/a" if x is None else f"{x:.3f} s" for x in mm))
        for period, x, why in zip(d["mode_periods_s"], mm, d.get("mode_measurement_notes") or []):
            if x is None and why:
                w.append(f"    mode {period:.3f} s not measured: {why}")
    elif mm:
        why = next((x for x in d.get("mode_measurement_notes") or [] if x), None)
        w.append("  Measured mode periods after the moves: n/a" + (f" ({why})" if why else ""))
    return w
