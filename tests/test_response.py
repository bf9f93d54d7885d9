"""Frequency response and resonance cautions: checks against results from outside the project.

Each check names its source beside it; expected values are computed here from the
published formula, not copied from a run of the code.
"""

import csv
import io
import math
from pathlib import Path

import numpy as np
import pytest

from swingsim import constants
from swingsim.dynamics import response
from swingsim.dynamics.hook_load import HookLoadModel
from swingsim.dynamics.pendulum import PointMassModel
from swingsim.metrics import resonance
from swingsim.metrics.single import summarize
from swingsim.report.plots_response import response_csv
from swingsim.scene.validate import load_scene
from swingsim.simulation import prepare, simulate

from conftest import make_scene

G = constants.STANDARD_GRAVITY
ROOT = Path(__file__).resolve().parent.parent
X_ONLY = {"x": np.array([1.0, 0.0, 0.0])}


def support_excited(r, zeta):
    """Steady amplitude of a damped pendulum per unit support acceleration [rad per m/s^2].

    Thomson & Dahleh, Theory of Vibration with Applications, 5th ed., ch. 3 (harmonically
    excited support): L u'' + 2 zeta w L u' + g u = -a  ->  |u| = (1/g) / sqrt((1-r^2)^2 + (2 zeta r)^2).
    """
    return (1.0 / G) / np.sqrt((1.0 - r**2) ** 2 + (2.0 * zeta * r) ** 2)


def _point_mass(L=10.0, zeta=0.03):
    return PointMassModel(make_scene({"rope": {"length_m": L}, "damping": {"ratio": zeta}}))


# -- the point mass against the textbook oscillator --------------------------------------------

@pytest.mark.parametrize("zeta", [0.0, 0.01, 0.05, 0.3])
def test_point_mass_curve_is_the_support_excited_oscillator(zeta):
    L = 8.0
    model = _point_mass(L, zeta)
    lin = model.linear_swing()
    Tn = 2 * math.pi * math.sqrt(L / G)  # small-angle pendulum period (textbook)
    T = np.geomspace(0.2 * Tn, 5 * Tn, 301)
    T = T[np.abs(T / Tn - 1.0) > 1e-6]  # undamped: the formula is infinite at r = 1
    got = response.response_columns(lin, T, X_ONLY)[("hoist rope", "x")]
    expected = np.degrees(support_excited(Tn / T, zeta))
    assert got == pytest.approx(expected, rel=1e-6)
    # the same in any horizontal direction (a point mass has no preferred plane)
    diag = {"d": np.array([math.cos(0.7), math.sin(0.7), 0.0])}
    assert response.response_columns(lin, T, diag)[("hoist rope", "d")] == pytest.approx(expected, rel=1e-6)


@pytest.mark.parametrize("zeta", [0.01, 0.05, 0.2])
def test_point_mass_peak_amplification_and_half_power_band(zeta):
    L = 8.0
    modes = response.swing_modes(_point_mass(L, zeta).linear_swing())
    assert len(modes) == 1 and modes[0].degenerate
    m = modes[0]
    Tn = 2 * math.pi * math.sqrt(L / G)
    assert m.period_s == pytest.approx(Tn, rel=1e-9)
    assert m.damping_ratio == pytest.approx(zeta, rel=1e-6)
    # Thomson & Dahleh ch. 3: the peak of 1/sqrt((1-r^2)^2 + (2 zeta r)^2) lies at r^2 = 1 - 2 zeta^2
    r_peak = math.sqrt(1 - 2 * zeta**2)
    peak = support_excited(r_peak, zeta)
    static = support_excited(0.0, zeta)
    assert m.peak_amplification == pytest.approx(peak / static, rel=1e-9)
    # half-power points: the textbook curve is peak / sqrt(2) at both returned periods
    short, long_ = m.half_power_periods_s
    assert support_excited(Tn / short, zeta) == pytest.approx(peak / math.sqrt(2), rel=1e-9)
    assert support_excited(Tn / long_, zeta) == pytest.approx(peak / math.sqrt(2), rel=1e-9)
    # bandwidth (w2 - w1) / wn ~ 2 zeta for light damping (textbook, Q = 1 / (2 zeta)); O(zeta^2) apart
    assert m.half_power_fraction == pytest.approx(2 * zeta, rel=zeta + 1e-3)


def test_quasi_static_limit_is_the_steady_push_angle():
    # Slow forcing: the rope leans at atan(a/g) ~ a/g (quasi-static, textbook), 1/g rad per m/s^2
    lin = _point_mass(10.0, 0.02).linear_swing()
    Tn = 2 * math.pi * math.sqrt(10.0 / G)
    got = response.response_columns(lin, [1e4 * Tn], X_ONLY)[("hoist rope", "x")][0]
    assert got == pytest.approx(math.degrees(1.0 / G), rel=1e-6)


# -- two bodies: hook block and load -----------------------------------------------------------

def test_double_pendulum_resonances_at_the_closed_form_periods():
    # Linear double pendulum, closed form (textbook; e.g. Goldstein, Classical Mechanics, ch. 6):
    # omega^2 = (g/2) [ (1+R) S -/+ sqrt((1+R)^2 S^2 - 4 (1+R)/(L1 L2)) ], R = m2/m1, S = 1/L1 + 1/L2
    m1, m2, L1, L2 = 200.0, 1500.0, 9.0, 2.5
    sc = make_scene({"hook": {"mass_kg": m1}, "rigging": {"leg_length_m": L2}, "load": {"mass_kg": m2},
                     "rope": {"length_m": L1}, "damping": {"ratio": 0.002}})
    R, S = m2 / m1, 1 / L1 + 1 / L2
    disc = math.sqrt((1 + R) ** 2 * S * S - 4 * (1 + R) / (L1 * L2))
    periods = sorted(2 * math.pi / math.sqrt(G / 2 * ((1 + R) * S + s * disc)) for s in (-1, 1))
    lin = HookLoadModel(sc).linear_swing()
    modes = response.swing_modes(lin)
    assert sorted(m.period_s for m in modes) == pytest.approx(periods, rel=1e-8)
    # the curves' peaks sit at those periods (light damping shifts a peak by O(zeta^2))
    for body in ("hoist rope", "sling leg"):
        for Tk in periods:
            T = Tk * np.linspace(0.97, 1.03, 6001)
            curve = response.response_columns(lin, T, X_ONLY)[(body, "x")]
            assert T[np.argmax(curve)] == pytest.approx(Tk, rel=1e-4)
    # the lower mode swings hook and load together, the upper one against (textbook mode shapes)
    lr = resonance.lift_response(HookLoadModel(sc), sc, prepare(sc)[1])
    assert "together" in lr.labels[0] and "against" in lr.labels[1]


# -- the full nonlinear model driven to steady state ------------------------------------------

@pytest.mark.parametrize("with_hook", [False, True], ids=["point-mass", "hook-block"])
def test_simulated_steady_state_agrees_with_the_curve(tmp_path, with_hook):
    # A long small sinusoidal trolley motion x = X (1 - cos w t), simulated with the full
    # nonlinear equations (DOP853) until the start transient has decayed: the swing is the
    # linear steady state (textbook: the steady state plus a free swing decaying as
    # exp(-zeta wn t)), to a few per cent.
    L, zeta = 4.0, 0.15
    extra = {"hook": {"mass_kg": 150.0}, "rigging": {"leg_length_m": 1.0}} if with_hook else {}
    base = {"rope": {"length_m": L}, "damping": {"ratio": zeta}, "load": {"mass_kg": 1000.0}}
    sc0 = make_scene({**base, **extra})
    Tn = prepare(sc0)[0].mode_periods_s()[0]
    Tf = 0.9 * Tn
    w = 2 * math.pi / Tf
    A = 0.03  # acceleration amplitude [m/s^2]: under a degree of swing
    X = A / w**2
    t_end, t_from = 9.2 * Tf, 7 * Tf
    # the free swing has decayed below 0.5 % of the start transient when the measurement starts
    assert math.exp(-zeta * 2 * math.pi / Tn * t_from) < 5e-3
    t = np.arange(0.0, t_end, 0.1)  # a cubic spline through it: error ~ (w h)^4 / 384 < 1e-6
    table = tmp_path / "sine.csv"
    table.write_text("t_s,position_m\n" + "".join(f"{a:.6f},{X * (1 - math.cos(w * a)):.12f}\n" for a in t))
    sc = make_scene({**base, **extra}, duration_s=t_end,
                    moves=[{"axis": "x", "profile": "table", "start_s": 0.0, "table_file": str(table)}])
    traj = simulate(sc)
    assert traj.valid
    tt = np.linspace(t_from, t[-1] - 0.2, 4001)  # clear of the clamped end of the table
    n = traj.sample(tt)["rope_dir"]
    swing_deg = np.degrees(np.arctan2(n[:, 0], -n[:, 2]))
    measured = 0.5 * (swing_deg.max() - swing_deg.min())
    predicted = A * response.response_columns(prepare(sc0)[0].linear_swing(), [Tf], X_ONLY)[("hoist rope", "x")][0]
    assert measured == pytest.approx(predicted, rel=0.02)


# -- rhythms and the resonance caution ---------------------------------------------------------

def test_inching_scene_gets_a_resonance_caution():
    sc = load_scene(ROOT / "scenes" / "inching_resonance.toml")
    s = summarize(simulate(sc))
    found = [c for c in s.cautions if "resonance" in c.lower()]
    assert len(found) == 1
    # the nudges alternate every 2.5 s (scene file): one out-and-back cycle every 5.0 s
    (r,) = s["move_rhythms"]
    assert r["rhythm_s"] == pytest.approx(5.0, rel=0.02)
    assert r["resonant_modes"] == [1]
    Tn = 2 * math.pi * math.sqrt(sc.rope.length_m / sc.gravity_m_s2)  # small-angle period (textbook)
    assert f"{Tn:.2f} s" in found[0] and "5.00 s" in found[0] and "each repetition adds swing" in found[0]
    # and the swing builds up: each cycle's peak above the one before while the nudges go on
    traj = simulate(sc)
    peaks = []
    for k in range(4):
        tt = np.linspace(2.0 + 5.0 * k, 7.0 + 5.0 * k, 2001)
        n = traj.sample(tt)["rope_dir"]
        peaks.append(float(np.max(np.degrees(np.arccos(-n[:, 2])))))
    assert all(b > a * 1.2 for a, b in zip(peaks, peaks[1:])), peaks


def test_single_move_gets_no_resonance_caution():
    sc = make_scene({"moves": [{"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 5.0,
                                "speed_m_s": 0.5, "accel_m_s2": 0.2}]})
    s = summarize(simulate(sc))
    assert s["move_rhythms"] == []
    assert not any("resonance" in c.lower() for c in s.cautions)


def test_repeated_moves_off_resonance_get_no_caution():
    # the same four nudges, but every 12 s against a 6.3 s swing period (L = 10 m, textbook)
    moves = [{"axis": "x", "profile": "trapezoid", "start_s": 1.0 + 12.0 * k, "distance_m": 0.3 * (-1) ** k,
              "speed_m_s": 0.3, "accel_m_s2": 0.3} for k in range(4)]
    s = summarize(simulate(make_scene({"moves": moves}, duration_s=60.0)))
    (r,) = s["move_rhythms"]
    assert r["rhythm_s"] == pytest.approx(24.0, rel=0.03)
    assert r["resonant_modes"] == []
    assert not any("resonance" in c.lower() for c in s.cautions)


def test_recorded_input_rhythm_from_its_spectrum(tmp_path):
    # an operator's recorded back-and-forth x = X (1 - cos(2 pi t / P)): its speed is a
    # sinusoid of period P, the only peak of its spectrum (definition of the Fourier series)
    P = 6.3
    t = np.arange(0.0, 4 * P + 1e-9, 0.05)
    table = tmp_path / "record.csv"
    table.write_text("t_s,position_m\n" + "".join(f"{a:.4f},{0.2 * (1 - math.cos(2 * math.pi * a / P)):.9f}\n"
                                                 for a in t))
    sc = make_scene(moves=[{"axis": "x", "profile": "table", "start_s": 1.0, "table_file": str(table)}],
                    duration_s=4 * P + 1.5)
    (r,) = resonance.move_rhythms(sc, prepare(sc)[1])
    assert r["source"] == "recorded input"
    assert r["rhythm_s"] == pytest.approx(P, rel=0.01)
    # 10 m of rope: 2 pi sqrt(L/g) = 6.34 s (textbook), inside the band of our rule
    s = summarize(simulate(sc))
    assert s["move_rhythms"][0]["resonant_modes"] == [1]
    assert any("resonance" in c.lower() and "recorded operator input" in c for c in s.cautions)


def test_resonance_band_is_the_stated_rule():
    # our rule (metrics/resonance.py): the half-power band widened to at least +-15 % of the period
    m = response.swing_modes(_point_mass(10.0, 0.01).linear_swing())[0]
    lo, hi = resonance.resonance_band_s(m)
    assert (lo, hi) == pytest.approx((0.85 * m.period_s, 1.15 * m.period_s), rel=1e-12)
    wide = response.swing_modes(_point_mass(10.0, 0.3).linear_swing())[0]
    assert resonance.resonance_band_s(wide) == pytest.approx(wide.half_power_periods_s, rel=1e-12)


# -- response.csv ------------------------------------------------------------------------------

@pytest.mark.parametrize("scene", ["inching_resonance.toml", "compact_load_short_sling.toml",
                                   "panel_bridle_hook_block.toml"])
def test_response_csv_columns_and_values(scene):
    sc = load_scene(ROOT / "scenes" / scene)
    traj = simulate(sc)
    rows = list(csv.reader(io.StringIO(response_csv(traj))))
    header, data = rows[0], np.array(rows[1:], dtype=float)
    assert header[:2] == ["period_s", "swing_deg_per_m_s2"]
    assert len(set(header)) == len(header)
    assert np.all(np.isfinite(data)) and np.all(data[:, 1:] >= 0.0)
    assert np.all(np.diff(data[:, 0]) > 0.0)
    model = traj.model
    if getattr(model, "rigid_load", False):
        assert "load_tilt_x_deg_per_m_s2" in header
    if sc.crane.slewing:
        assert "swing_tangential_deg_per_m_s2" in header and "swing_radial_deg_per_m_s2" in header
    # slow forcing: the rope leans at a/g (quasi-static, textbook) to within the r^2 of the longest period
    T_long, T1 = data[-1, 0], model.mode_periods_s()[0]
    assert data[-1, 1] == pytest.approx(math.degrees(1 / sc.gravity_m_s2), rel=2 * (T1 / T_long) ** 2 + 1e-3)
    # every mode's period is on the grid
    for T in model.mode_periods_s():
        assert np.min(np.abs(data[:, 0] / T - 1.0)) < 1e-8  # the CSV keeps 9 significant digits


def test_undamped_lift_has_a_finite_curve():
    # without damping the steady response is infinite at the natural period (textbook):
    # the grid leaves that one period out and every written value stays finite
    sc = make_scene({"damping": {"ratio": 0.0}})
    traj = simulate(sc)
    rows = list(csv.reader(io.StringIO(response_csv(traj))))
    data = np.array(rows[1:], dtype=float)
    assert np.all(np.isfinite(data))
    s = summarize(traj)
    assert s["response_modes"][0]["peak_amplification"] is None
