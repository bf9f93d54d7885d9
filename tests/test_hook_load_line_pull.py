"""Hook load and line pull; the rigid rope's caution and the model's limits said aloud."""

import math

import numpy as np
import pytest

from swingsim import constants
from swingsim.dynamics.rope import reeving_efficiency
from swingsim.metrics import cautions
from swingsim.metrics.single import summarize
from swingsim.report.tables import summary_text, timeseries_columns
from swingsim.simulation import simulate

from conftest import make_scene

G = constants.STANDARD_GRAVITY
HOOK = {"hook": {"mass_kg": 200.0}, "rigging": {"kind": "single", "leg_length_m": 2.0}}
HOIST = {"axis": "hoist", "profile": "trapezoid", "distance_m": 3.0, "speed_m_s": 0.5, "accel_m_s2": 0.3}


def _hook_with(rope, hook=None):
    """The hook block scene's update with these rope keys (and hook keys)."""
    return {"hook": {**HOOK["hook"], **(hook or {})}, "rigging": HOOK["rigging"], "rope": rope}


def test_line_pull_is_hook_load_over_falls():
    # common practice: n parts of line share the hook load, line pull = hook load / n
    scene = make_scene(_hook_with({"falls": 4}), duration_s=4.0)
    s = summarize(simulate(scene))
    assert s["peak_hook_load_kN"] == s["peak_rope_tension_kN"]
    # hanging at rest: the hook load is the weight of hook block and load (statics)
    assert s["peak_hook_load_kN"] == pytest.approx(1200.0 * G / 1e3, rel=1e-9)
    assert s["peak_line_pull_kN"] == pytest.approx(s["peak_hook_load_kN"] / 4, rel=1e-12)


def test_reeving_efficiency_formula():
    # from memory: the parts of line carry P, P e, ... P e^(n-1) (friction at each sheave), so
    # the hook load is P * sum(e^k) and eta = sum(e^k) / n; here summed term by term
    for e, n in [(0.98, 4), (0.96, 6), (0.98, 1), (1.0, 8)]:
        direct = sum(e**k for k in range(n)) / n
        assert reeving_efficiency(e, n) == pytest.approx(direct, rel=1e-12)
    # hand value: 4 parts on 0.98 sheaves, (1 - 0.98^4) / (4 * 0.02) = 0.07763184 / 0.08
    assert reeving_efficiency(0.98, 4) == pytest.approx(0.970398, abs=1e-6)


def test_sheave_efficiency_gives_the_line_pull():
    scene = make_scene(_hook_with({"falls": 4, "sheave_efficiency": 0.98}), duration_s=2.0)
    assert scene.rope.reeving_efficiency == pytest.approx(0.970398, abs=1e-6)
    s = summarize(simulate(scene))
    # line pull = hook load / (n eta) (common practice, eta from memory as above)
    assert s["peak_line_pull_kN"] == pytest.approx(s["peak_hook_load_kN"] / (4 * 0.97039800), rel=1e-6)


def test_line_wll_is_compared_with_line_pull_and_hook_rating_with_hook_load():
    # 1200 kg on 4 falls: hook load 11.77 kN, line pull 2.94 kN
    scene = make_scene(_hook_with({"falls": 4, "wll_kN": 3.5}, {"wll_kN": 10.0}),
                       duration_s=2.0)
    s = summarize(simulate(scene))
    text = " ".join(s.cautions)
    assert "exceeds the line's declared" not in text  # 2.94 kN line pull < 3.5 kN
    assert "Peak hook load 11.77 kN exceeds the hook block's declared rating of 10 kN" in text
    scene = make_scene(_hook_with({"falls": 4, "wll_kN": 2.5}), duration_s=2.0)
    text = " ".join(summarize(simulate(scene)).cautions)
    assert "Peak line pull 2.94 kN" in text and "exceeds the line's declared working load limit" in text
    assert "competent person" in text


def test_csv_columns_and_hoist_speed():
    # the hoist's own speed on an elastic rope: the prescribed length's rate, not the stretch
    scene = make_scene(_hook_with({"falls": 2, "stiffness_kN_per_m": 300.0}),
                       moves=[HOIST], duration_s=12.0)
    traj = simulate(scene)
    t = traj.sample_times()
    cols = timeseries_columns(traj, t)
    assert np.array_equal(cols["hook_load_kN"], cols["rope_tension_kN"])
    assert np.allclose(cols["line_pull_kN"], cols["hook_load_kN"] / 2, rtol=1e-12, atol=0)
    # trapezoid: 0.5 m/s cruise (the scene's own speed limit)
    assert np.max(cols["hoist_speed_m_s"]) == pytest.approx(0.5, rel=1e-9)
    assert np.all(cols["hoist_speed_m_s"] >= -1e-12)


def test_rigid_rope_hoisting_says_snatch_is_not_modelled():
    scene = make_scene(moves=[HOIST], duration_s=12.0)
    s = summarize(simulate(scene))
    assert cautions.RIGID_ROPE_CAUTION in s.cautions
    text = summary_text(s, scene)
    assert "stiffness_kN_per_m" in text and "modulus_GPa" in text
    assert text.count("What the model leaves out") == 1
    for limit in ("yaw" if scene.rigid_load else "point mass", "gusts", "crane structure is rigid",
                  "does not stretch"):
        assert limit in text
    # an elastic rope does not get the caution
    elastic = make_scene({"rope": {"stiffness_kN_per_m": 300.0}}, moves=[HOIST], duration_s=12.0)
    assert cautions.RIGID_ROPE_CAUTION not in summarize(simulate(elastic)).cautions


def test_summary_text_says_how_the_wind_starts():
    wind = {"wind": {"speed_m_s": 10.0}, "load": {"wind_area_m2": 4.0}}
    for onset, words in (("steady", "starts hanging at that lean"), ("step", "sudden step")):
        scene = make_scene({**wind, "wind": {**wind["wind"], "onset": onset}}, duration_s=2.0)
        text = summary_text(summarize(simulate(scene)), scene)
        assert words in text
        assert "rope tension" not in text.lower().replace("rope_tension", "")


def test_lift_off_summary_uses_the_hanging_length():
    # Hooke's law on the lifted load: the given stiffness holds at the scene's (loaded) rope
    # length, static stretch W / k, bounce period 2 pi sqrt(m / k) (textbook mass on a spring);
    # not the slack starting length of the lift-off
    m, k = 2000.0, 400.0e3
    scene = make_scene({"rope": {"stiffness_kN_per_m": k / 1e3}, "load": {"mass_kg": m},
                        "start": {"rope_preload": "lift-off", "rope_slack_m": 0.05},
                        "moves": [{"axis": "hoist", "profile": "trapezoid", "distance_m": 0.5,
                                   "speed_m_s": 0.05, "accel_m_s2": 0.2}]}, duration_s=12.0)
    s = summarize(simulate(scene))
    assert s["rope_stiffness_kN_per_m"] == pytest.approx(k / 1e3, rel=1e-12)
    assert s["static_rope_stretch_m"] == pytest.approx(m * G / k, rel=1e-12)
    assert s["bounce_period_s"] == pytest.approx(2 * math.pi * math.sqrt(m / k), rel=1e-12)
    # the swing period at the hanging length: 2 pi sqrt(L / g) of the 10 m rope (textbook)
    assert s["natural_period_s"] == pytest.approx(2 * math.pi * math.sqrt(10.0 / G), rel=1e-9)
