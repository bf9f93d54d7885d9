"""Zones as people and structures see them: exact distances, entries over exclusion zones, touches.

Sources: the distance between a point and an axis-aligned box (clamping each
coordinate, textbook geometry: Ericson, Real-Time Collision Detection, 5.1.3),
checked against brute-force sampling of the segment; a box's plan footprint and
vertical lines through it (geometry).
"""

import numpy as np
import pytest

from conftest import make_scene
from swingsim import simulate
from swingsim.metrics.zones import (CLEAR, ENTERED, NEAR, box_box_distance, segment_box_distance,
                                    suspended_bodies, verdict, zone_clearances, zone_summaries,
                                    zone_verdicts_at)


def _point_box(points, lo, hi):
    # clamp each coordinate to the box (Ericson 5.1.3)
    return np.linalg.norm(points - np.clip(points, lo, hi), axis=-1)


@pytest.mark.parametrize("dim", [2, 3])
def test_segment_box_distance_against_brute_force(dim):
    rng = np.random.default_rng(7)
    lo = rng.uniform(-2, 0, dim)
    hi = lo + rng.uniform(0.2, 3, dim)
    a = rng.uniform(-6, 6, (400, dim))
    b = rng.uniform(-6, 6, (400, dim))
    b[:20] = a[:20]  # points
    b[20:40, 0] = a[20:40, 0]  # segments parallel to faces
    exact, along = segment_box_distance(a, b, lo, hi)
    s = np.linspace(0.0, 1.0, 20001)
    pts = a[:, None, :] + s[None, :, None] * (b - a)[:, None, :]
    brute = _point_box(pts, lo, hi).min(axis=1)
    # never above the sampled minimum, and within the sampling step's reach below it
    step = np.linalg.norm(b - a, axis=-1) / 20000
    assert np.all(exact <= brute + 1e-12)
    assert np.all(brute - exact <= step + 1e-12)
    # the reported closest point has the reported distance
    at = a + along[:, None] * (b - a)
    np.testing.assert_allclose(_point_box(at, lo, hi), exact, atol=1e-12)
    # a segment through the box touches it
    through, _ = segment_box_distance(lo - 1.0, hi + 1.0, lo, hi)
    assert through == 0.0


def test_box_box_distance_against_brute_force():
    from scipy.spatial.transform import Rotation

    rng = np.random.default_rng(3)
    lo, hi = np.array([0.0, 0.0, 0.0]), np.array([2.0, 1.0, 1.5])
    half = np.array([1.2, 0.4, 0.7])
    centre = rng.uniform(-3, 5, (150, 3))
    rot = Rotation.random(150, random_state=5).as_matrix()
    exact = box_box_distance(centre, rot, half, lo, hi)
    # brute force: a dense grid over the turned box's surface, point to box (Ericson 5.1.3)
    g = np.linspace(-1, 1, 41)
    u, v = np.meshgrid(g, g)
    faces = []
    for axis in range(3):
        for sign in (-1.0, 1.0):
            p = np.zeros((u.size, 3))
            others = [i for i in range(3) if i != axis]
            p[:, axis] = sign
            p[:, others[0]], p[:, others[1]] = u.ravel(), v.ravel()
            faces.append(p)
    surface = np.concatenate(faces) * half
    pts = centre[:, None, :] + np.einsum("nij,kj->nki", rot, surface)
    brute = _point_box(pts, lo, hi).min(axis=1)
    inside = np.all((pts >= lo) & (pts <= hi), axis=-1).any(axis=1)
    assert np.all(exact <= brute + 1e-9)
    assert np.all(brute - exact <= 2 * 0.05 * half.max() + 1e-9)
    assert np.all(exact[inside] == 0.0)


def test_verdict_words():
    assert verdict(0.0, 1.0) == ENTERED
    assert verdict(0.5, 1.0) == NEAR
    assert verdict(1.5, 1.0) == CLEAR


FOOTPATH = {"name": "footpath", "kind": "exclusion", "min_m": [3.0, -1.0, 0.0], "max_m": [5.0, 1.0, 2.2],
            "margin_m": 1.0}


def _over_footpath(zone=FOOTPATH, **extra):
    # the load, 2 m box, travels 8 m along x; its bottom flies 3 m above the footpath's 2.2 m top
    upd = {"crane": {"suspension_m": [0.0, 0.0, 16.2]}, "rope": {"length_m": 10.0},
           "load": {"mass_kg": 1000.0, "size_m": [2.0, 2.0, 2.0]}, "damping": {"ratio": 0.05},
           "moves": [{"axis": "x", "profile": "trapezoid", "distance_m": 8.0, "speed_m_s": 1.0,
                      "accel_m_s2": 0.4}], "zones": [zone]}
    upd.update(extra)
    return simulate(make_scene(upd, duration_s=14.0))


def test_load_over_a_low_exclusion_zone_is_an_entry():
    from swingsim.metrics.single import summarize

    traj = _over_footpath()
    z = summarize(traj).data["zones"][0]
    # the load's box (and the rope) pass over the footpath's plan area: an entry at any height
    assert z["entered"] and z["inside"]
    assert {"load", "rope"} <= set(z["entered_by"])
    assert z["min_distance_m"] == 0.0
    # the load's bottom is 16.2 - 10 - 1 = 5.2 m high over a 2.2 m top: about 3 m above it,
    # less the little the swing lifts or lowers it (geometry: a 10 m pendulum at a few degrees)
    assert z["min_height_above_zone_m"] == pytest.approx(3.0, abs=0.05)
    # it is over the area while its 2 m box overlaps x in [3, 5]: from about x = 2 to x = 6
    assert 3.0 < z["time_entered_s"] < 7.0
    assert z["entries"][0]["start_s"] == z["first_entry_s"]


def test_load_beside_an_exclusion_zone_is_not_an_entry():
    from swingsim.metrics.single import summarize

    beside = dict(FOOTPATH, min_m=[3.0, 2.5, 0.0], max_m=[5.0, 4.0, 2.2])
    z = summarize(_over_footpath(beside)).data["zones"][0]
    assert not z["entered"] and z["entered_by"] == []
    # in plan: the box's side at y = 1 against the area's edge at y = 2.5 (swing across is nil)
    assert z["min_distance_m"] == pytest.approx(1.5, abs=1e-6)
    assert z["within_margin"] is False and z["min_height_above_zone_m"] is None


def test_rope_through_an_obstacle_is_a_touch():
    # a beam at the height of the rope's middle, in the rope's path but far above the load
    beam = {"name": "beam", "kind": "obstacle", "min_m": [3.8, -3.0, 10.0], "max_m": [4.2, 3.0, 11.0],
            "margin_m": 0.5}
    traj = _over_footpath(beam)
    t = traj.sample_times(50.0)
    z = zone_summaries(t, traj.sample(t), traj.scene)[0]
    assert z["entered"] and z["entered_by"] == ["rope"]
    # the load's box alone never comes near: its top is at 16.2 - 10 + 1 = 7.2 m, 2.8 m below
    bodies = suspended_bodies(traj.sample(t), traj.scene)
    d, _ = zone_clearances(bodies, traj.scene.zones[0])
    assert d["load"].min() == pytest.approx(2.8, abs=0.05)


def test_slings_and_hook_count():
    # a hook block and a two-leg bridle: the slings are bodies of their own
    zone = {"name": "hut", "kind": "exclusion", "min_m": [-20.0, -20.0, 0.0], "max_m": [20.0, 20.0, 1.0]}
    traj = simulate(make_scene({"hook": {"mass_kg": 200.0, "size_m": [0.4, 0.3, 0.6]},
                                "load": {"mass_kg": 1000.0, "size_m": [3.0, 1.0, 1.0]},
                                "rigging": {"kind": "bridle", "leg_length_m": 2.5,
                                            "attach_m": [[-1.2, 0.0, 0.5], [1.2, 0.0, 0.5]]},
                                "zones": [zone]}, duration_s=1.0))
    z = zone_summaries(np.array([0.0, 1.0]), traj.sample([0.0, 1.0]), traj.scene)[0]
    assert z["entered_by"] == ["load", "hook", "rope", "sling_1", "sling_2"]
    # hanging plumb: the load's bottom is the lowest point over the zone (geometry of the bridle)
    s = traj.sample([0.0])
    bottom = s["load"][0][2] - 0.5
    assert z["min_height_above_zone_m"] == pytest.approx(bottom - 1.0, abs=1e-9)


def test_video_state_equals_summary_verdict():
    traj = _over_footpath()
    t = traj.sample_times(10.0)
    z = zone_summaries(t, traj.sample(t), traj.scene)[0]
    entered_at = set()
    for e in z["entries"]:
        entered_at |= {float(x) for x in t if e["start_s"] <= x < e["end_s"]}
    for x in t:
        row = {k: (v[0] if isinstance(v, np.ndarray) and v.ndim and len(v) == 1 else v)
               for k, v in traj.sample([x]).items()}
        state, _ = zone_verdicts_at(row, traj.scene)[0]
        assert (state == ENTERED) == (float(x) in entered_at), x


def test_rendered_zone_state_equals_summary_verdict():
    # the video's own stage, not only the shared function: the frame's words and colour follow
    # the summary's verdict at the same instants
    pytest.importorskip("pyvista")
    from swingsim.render.gl import RenderUnavailableError

    from swingsim.metrics.single import summarize
    from swingsim.render.facts import collect
    from swingsim.render.frames import draw_frames
    from swingsim.render.stage import Stage

    traj = _over_footpath()
    z = summarize(traj).data["zones"][0]
    e = z["entries"][0]
    try:
        stage = Stage(traj, collect(traj), size=(160, 120), views=("side",))
    except RenderUnavailableError:
        pytest.skip("no OpenGL")
    try:
        for t, entered in ((0.5, False), (e["start_s"] + 0.5 * e["duration_s"], True)):
            next(draw_frames(stage, traj, np.array([t])))
            states = {name: state for name, state, _ in stage.zone_states}
            assert (states.get("footpath") == ENTERED) == entered
            assert ("IN zone: footpath" in stage.last_text.zone) == entered
    finally:
        stage.close()
