"""The rated capacity chart: reading it, the rule (linear between radii, never beyond) and the lift against it.

Each check names its source: hand computation of the stated rule, scipy's own
linear interpolation, the textbook pendulum (tension from energy conservation),
or plain vector geometry.  The charts here are invented numbers.
"""

import math

import numpy as np
import pytest
from scipy.interpolate import interp1d
from scipy.optimize import minimize_scalar

from swingsim import simulate, summarize
from swingsim.errors import SceneError
from swingsim.metrics.chart import tip_pull_N
from swingsim.scene import scene_from_dict
from swingsim.scene.model import RatedChart
from swingsim.scene.read import read_chart

G = 9.80665
#: An invented chart: 8000 kg to 10 m, then falling.
CHART_CSV = "# invented test chart\nradius_m,capacity_kg\n2,8000\n10,8000\n20,4000\n30,2500\n"


def _scene(tmp_path, mass_kg=2000.0, radius_m=20.0, swing_deg=(0.0, 0.0), moves=(), crane=None,
           extra=None, duration_s=12.0):
    (tmp_path / "chart.csv").write_text(CHART_CSV)
    data = {
        "title": "chart test", "duration_s": duration_s,
        "crane": {"suspension_m": [radius_m, 0.0, 40.0], "chart_file": "chart.csv",
                  "chart_includes": ["rigging"], **(crane or {})},
        "rope": {"length_m": 20.0},
        "load": {"mass_kg": mass_kg},
        "start": {"swing_deg": list(swing_deg)},
        "moves": list(moves),
        **(extra or {}),
    }
    return scene_from_dict(data, file="chart_test.toml", base_dir=tmp_path)


def test_interpolation_against_hand_values(tmp_path):
    # rule: linear between listed radii, never extrapolated (hand computation of the rule)
    (tmp_path / "c.csv").write_text(CHART_CSV)
    chart = read_chart("c.csv", tmp_path)
    assert chart.radius_m == (2.0, 10.0, 20.0, 30.0)
    got = chart.capacity_at([2.0, 6.0, 10.0, 15.0, 20.0, 25.0, 27.0, 30.0])
    # 15 m: halfway from 8000 to 4000; 25 m: halfway from 4000 to 2500; 27 m: 4000 - 0.7 * 1500
    assert got == pytest.approx([8000.0, 8000.0, 8000.0, 6000.0, 4000.0, 3250.0, 2950.0, 2500.0], rel=1e-12)
    # beyond the chart on either side: no capacity (never extrapolated)
    assert np.isnan(chart.capacity_at([1.999, 30.001, 45.0])).all()


def test_interpolation_against_scipy():
    # reference: scipy.interpolate.interp1d(kind="linear"), NaN outside (bounds_error=False)
    chart = RatedChart((3.0, 7.5, 12.0, 25.0, 41.0), (9000.0, 7200.0, 6100.0, 3300.0, 1900.0))
    ref = interp1d(chart.radius_m, chart.capacity_kg, kind="linear", bounds_error=False, fill_value=np.nan)
    r = np.random.default_rng(3).uniform(0.0, 45.0, 500)
    np.testing.assert_allclose(chart.capacity_at(r), ref(r), rtol=1e-12, equal_nan=True)


def test_path_beyond_chart_refused(tmp_path):
    # the rule: a planned path off the chart is bad input at check time, naming the move and the radius
    move = {"label": "trolley out", "axis": "radius", "profile": "trapezoid", "distance_m": 12.0,
            "speed_m_s": 1.0, "accel_m_s2": 0.5}
    with pytest.raises(SceneError) as ei:
        _scene(tmp_path, radius_m=20.0, moves=[move], duration_s=30.0)
    msg = ei.value.one_line()
    assert "moves[0]" in msg and "trolley out" in msg and "radius 32.00 m" in msg
    assert "never extrapolated" in msg
    # the same move that stays on the chart is fine (20 + 10 = 30 m, the chart's last radius)
    _scene(tmp_path, radius_m=20.0, moves=[dict(move, distance_m=10.0)], duration_s=30.0)


def test_static_utilisation_hand_computation(tmp_path):
    # hand computation: counted mass / chart capacity at the radius; 2000 kg at 15 m: 2000 / 6000
    traj = simulate(_scene(tmp_path, radius_m=15.0))
    d = summarize(traj).data
    assert d["static_utilisation_pct"] == pytest.approx(100.0 * 2000.0 / 6000.0, rel=1e-12)
    assert d["static_utilisation_radius_m"] == pytest.approx(15.0, abs=1e-12)
    # hanging still in calm air, the hook load is the weight (m g): dynamic = static
    assert d["peak_utilisation_pct"] == pytest.approx(d["static_utilisation_pct"], rel=1e-9)
    assert d["chart_capacity_at_peak_kg"] == pytest.approx(6000.0, rel=1e-12)
    assert d["chart_margin_kg"] == pytest.approx(4000.0, rel=1e-9)
    assert d["peak_side_load_kN"] == pytest.approx(0.0, abs=1e-9)


def test_hook_block_counted_as_the_chart_says(tmp_path):
    # hand computation: (load + hook block) / capacity when the chart counts the hook; load only when not
    hook = {"hook": {"mass_kg": 250.0}, "rigging": {"leg_length_m": 2.0}}
    counted = summarize(simulate(_scene(tmp_path, radius_m=25.0, crane={"chart_includes": ["hook", "rigging"]},
                                        extra=hook, duration_s=2.0))).data
    assert counted["static_utilisation_pct"] == pytest.approx(100.0 * 2250.0 / 3250.0, rel=1e-12)
    net = summarize(simulate(_scene(tmp_path, radius_m=25.0, extra=hook, duration_s=2.0))).data
    assert net["static_utilisation_pct"] == pytest.approx(100.0 * 2000.0 / 3250.0, rel=1e-12)
    # hanging still: the counted hook load is (counted mass) g, to the solver's accuracy
    assert net["peak_counted_hook_load_kN"] == pytest.approx(2000.0 * G / 1e3, rel=1e-6)


def test_utilisation_rises_with_the_out_swing(tmp_path):
    # a load swinging out to a larger radius meets a lower capacity (the chart falls with radius) and,
    # at the bottom of its swing, a higher tension: the textbook pendulum T = m g (3 cos th - 2 cos th0)
    th0 = math.radians(12.0)
    plumb = summarize(simulate(_scene(tmp_path, radius_m=20.0))).data
    swing = summarize(simulate(_scene(tmp_path, radius_m=20.0, swing_deg=(12.0, 0.0)))).data
    assert swing["peak_utilisation_pct"] > plumb["peak_utilisation_pct"] + 5.0
    assert swing["chart_radius_at_peak_of"] == "load"
    assert swing["chart_radius_at_peak_m"] > 20.0 + 1.0
    assert swing["largest_load_radius_m"] == pytest.approx(20.0 + 20.0 * math.sin(th0), rel=1e-6)
    # the peak is at least each textbook end point: the bottom (plumb radius, 3 - 2 cos th0)
    # and the out-swing's end (T = m g cos th0 at radius 20 + L sin th0, capacity by the rule)
    bottom = 100.0 * 2000.0 * (3.0 - 2.0 * math.cos(th0)) / 4000.0
    edge_cap = 4000.0 - (20.0 * math.sin(th0)) * 150.0
    edge = 100.0 * 2000.0 * math.cos(th0) / edge_cap
    assert swing["peak_utilisation_pct"] >= max(bottom, edge) * (1.0 - 1e-4)
    # and no more than the largest tension over the lowest capacity the swing reaches
    assert swing["peak_utilisation_pct"] <= 100.0 * 2000.0 * (3.0 - 2.0 * math.cos(th0)) / edge_cap


def test_tip_pull_split_by_geometry():
    # vector geometry: at (0, 10) the jib points along +y; a rope leaning toward +x pulls the tip
    # clockwise seen from above (negative side load) with no out-load
    a = math.radians(3.0)
    pull = tip_pull_N(np.array([[0.0, 10.0, 30.0], [10.0, 0.0, 30.0]]),
                      np.array([[math.sin(a), 0.0, -math.cos(a)]] * 2), np.array([1000.0, 1000.0]), [0.0, 0.0])
    np.testing.assert_allclose(pull["side_N"], [-1000.0 * math.sin(a), 0.0], atol=1e-9)
    np.testing.assert_allclose(pull["out_N"], [0.0, 1000.0 * math.sin(a)], atol=1e-9)
    np.testing.assert_allclose(pull["vertical_N"], [1000.0 * math.cos(a)] * 2, rtol=1e-12)


def test_out_load_of_a_radial_swing_against_the_pendulum(tmp_path):
    # textbook pendulum released from rest at th0: T(th) = m g (3 cos th - 2 cos th0); the horizontal
    # pull on the tip is T sin th, its largest value found by scipy's bounded scalar search
    th0 = math.radians(10.0)
    m = 2000.0
    d = summarize(simulate(_scene(tmp_path, mass_kg=m, radius_m=20.0, swing_deg=(10.0, 0.0)))).data
    best = minimize_scalar(lambda th: -m * G * (3 * math.cos(th) - 2 * math.cos(th0)) * math.sin(th),
                           bounds=(0.0, th0), method="bounded", options={"xatol": 1e-12})
    assert d["peak_out_load_kN"] == pytest.approx(-best.fun / 1e3, rel=1e-3)
    assert d["peak_in_load_kN"] == pytest.approx(-best.fun / 1e3, rel=1e-3)
    assert d["peak_side_load_kN"] == pytest.approx(0.0, abs=1e-6)
    assert d["peak_out_angle_deg"] == pytest.approx(10.0, rel=1e-4)


def test_thresholds_raise_cautions(tmp_path):
    # common practice: above 75% extra review, above 90% close to the chart (overridable)
    def cautions(mass, limits=None):
        extra = {"limits": limits} if limits else None
        return " ".join(summarize(simulate(_scene(tmp_path, mass_kg=mass, extra=extra, duration_s=2.0))).cautions)
    assert "of the rated capacity chart" not in cautions(2000.0)  # 50%
    assert "commonly need extra review (varies" in cautions(3200.0)  # 80%
    assert "sign-off" in cautions(3800.0)  # 95%
    assert "over the chart" in cautions(4200.0)  # 105%
    assert "set in the scene" in cautions(2000.0, {"chart_review_pct": 40.0})
    for text in (cautions(3200.0), cautions(4200.0)):
        assert "manufacturer's chart" in text and "lift plan" in text and "competent person" in text


def test_demo_states_its_invented_chart():
    # the bundled chart is marked invented in its header comment and its name
    from pathlib import Path
    data = Path(__file__).resolve().parent.parent / "swingsim" / "data"
    head = (data / "demo_chart.csv").read_text().splitlines()[0]
    assert head.startswith("#") and "INVENTED" in head
    assert "INVENTED" in (data / "demo.toml").read_text()


def test_video_readout_gives_the_summary_utilisation(tmp_path):
    """The video's per-frame chart figure is the time series' own (one definition, metrics.chart)."""
    from swingsim.metrics.chart import chart_series
    from swingsim.render.overlay import frame_text

    traj = simulate(_scene(tmp_path, swing_deg=(8.0, 0.0)))
    t = np.linspace(0.0, traj.t_end_s, 7)
    s = traj.sample(t)
    whole = chart_series(traj, t, s)["utilisation_pct"]
    for i, ti in enumerate(t):
        one = {k: np.asarray(s[k])[i][None] for k in ("suspension", "load", "rope_dir", "rope_tension_N")}
        one["hook"] = None
        pct = chart_series(traj, np.array([ti]), one)["utilisation_pct"][0]
        assert pct == pytest.approx(whole[i], rel=1e-12)
        row = {k: np.asarray(s[k])[i] for k in ("rope_dir", "load_vel", "rope_tension_N", "rope_length")}
        text = frame_text(ti, None, 10.0, 1.0, row, (), (), chart_pct=pct).readout
        assert "of chart" in text and f"{pct:6.1f}" in text
