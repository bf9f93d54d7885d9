"""Discrete gusts, the models in a varying wind, the outputs, and turbulence realisations.

Sources named beside each check: the "1 - cosine" gust shape of gust-load practice
(common practice); the Duhamel (convolution) integral of the damped linear oscillator
(textbook, e.g. Thomson & Dahleh, *Theory of Vibration with Applications*, ch. 4),
evaluated with scipy.integrate.quad; the drag equation (Hoerner 1965); numpy's
mean and percentile for the statistics of single runs.
"""

import dataclasses
import json
import math

import numpy as np
import pytest
from scipy.integrate import quad

from swingsim.batch.engine import run_batch
from swingsim.dynamics.hook_load import HookLoadModel
from swingsim.dynamics.pendulum import PointMassModel
from swingsim.dynamics.wind import WindField
from swingsim.metrics.single import summarize
from swingsim.report.tables import timeseries_columns
from swingsim.simulation import simulate
from swingsim.study.realisations import gust_statistics, realisation_scenes, run_scene

from conftest import make_scene


def test_one_minus_cosine_shape():
    # common practice (gust-load practice): peak/2 (1 - cos(2 pi (t - t0) / tau)) inside, zero outside
    sc = make_scene({"wind": {"gusts": [{"start_s": 2.0, "peak_m_s": 6.0, "duration_s": 4.0,
                                         "direction_deg": 90.0}]}})
    f = WindField(sc.wind, 20.0)
    for t, expected in ((1.9, 0.0), (2.0, 0.0), (3.0, 3.0), (4.0, 6.0), (5.0, 3.0), (6.0, 0.0), (7.0, 0.0)):
        wx, wy = f.velocity_at(t, 10.0)
        assert wx == pytest.approx(0.0, abs=1e-12)
        assert wy == pytest.approx(expected, abs=1e-12)
    assert f.breakpoints == (2.0, 6.0)


@pytest.mark.parametrize("duration_s", (3.0, 0.3))
def test_small_pendulum_response_to_a_gust_is_the_duhamel_integral(duration_s):
    # Linear equation of the small swing (point mass, damping ratio zeta, no mean wind):
    #   x'' + 2 zeta w0 x' + w0^2 x = f(t),  f = k g(t)^2,  k = rho Cd A / (2 m)  (drag equation),
    # x the load's horizontal offset from the plumb line, w0 = sqrt(g / L).  Its response from
    # rest is the Duhamel integral x(t) = int_0^t f(s) h(t - s) ds with
    # h(t) = exp(-zeta w0 t) sin(wd t) / wd (textbook).  The load's own speed (< 1 mm/s) next to
    # the gust (1 m/s) changes the drag by 2 v / g_max < 0.2 % and the angle (< 0.01 deg) the
    # geometry by far less: 1 % of the peak covers both.  The 0.3 s gust is shorter than
    # the solver's free step: it is found only because its start and end are breakpoints.
    L, m, A, cd, zeta, peak, t0 = 10.0, 1000.0, 2.0, 1.2, 0.02, 1.0, 1.0
    sc = make_scene({"rope": {"length_m": L}, "load": {"mass_kg": m, "wind_area_m2": A, "drag_coefficient": cd},
                     "damping": {"ratio": zeta}, "wind": {"onset": "step", "gusts": [
                         {"start_s": t0, "peak_m_s": peak, "duration_s": duration_s, "direction_deg": 0.0}]}},
                    duration_s=25.0)
    g = sc.gravity_m_s2
    k = 0.5 * sc.wind.air_density_kg_m3 * cd * A / m
    w0 = math.sqrt(g / L)
    wd = w0 * math.sqrt(1.0 - zeta**2)

    def force(s):
        if not t0 < s < t0 + duration_s:
            return 0.0
        gust = 0.5 * peak * (1.0 - math.cos(2.0 * math.pi * (s - t0) / duration_s))
        return k * gust * gust

    def duhamel(t):
        b = min(t, t0 + duration_s)
        if b <= t0:
            return 0.0
        return quad(lambda s: force(s) * math.exp(-zeta * w0 * (t - s)) * math.sin(wd * (t - s)) / wd,
                    t0, b, limit=200, epsabs=1e-14)[0]

    traj = simulate(sc)
    assert traj.valid
    ts = np.linspace(0.0, 25.0, 251)
    s = traj.sample(ts)
    x = s["load"][:, 0] - s["suspension"][:, 0]
    ref = np.array([duhamel(t) for t in ts])
    assert np.max(np.abs(ref)) > 1e-5  # the gust does move the load
    assert np.max(np.abs(x - ref)) < 0.01 * np.max(np.abs(ref))


def _gusty(update=None, **top):
    base = {"rope": {"length_m": 12.0, "diameter_m": 0.02},
            "load": {"mass_kg": 900.0, "wind_area_m2": 3.0},
            "damping": {"ratio": 0.01},
            "wind": {"speed_m_s": 8.0, "direction_deg": 30.0, "profile": "power", "turbulence_intensity": 0.18,
                     "seed": 4, "gusts": [{"start_s": 4.0, "peak_m_s": 5.0, "duration_s": 3.0}]},
            "moves": [{"axis": "x", "profile": "trapezoid", "start_s": 1.0, "distance_m": 6.0,
                       "speed_m_s": 1.0, "accel_m_s2": 0.5}]}
    if update:
        for k_, v_ in update.items():
            base.setdefault(k_, {}).update(v_) if isinstance(v_, dict) else base.__setitem__(k_, v_)
    return make_scene(base, **top)


def test_hook_load_model_reads_the_same_wind_as_the_point_mass():
    # The point-mass limit (as tests/test_hook_load_reference.py holds in steady wind): with no
    # hook block and a point load the hook-load model's equations are the point mass's, so
    # the two must agree in turbulence, gusts and a profile too.
    sc = _gusty(duration_s=12.0)
    a = simulate(sc, model=PointMassModel(sc))
    b = simulate(sc, model=HookLoadModel(sc))
    ts = np.linspace(0.0, 12.0, 121)
    assert np.max(np.abs(a.sample(ts)["load"] - b.sample(ts)["load"])) < 1e-6


def test_timeseries_wind_columns_at_the_load():
    # wind_speed_m_s is the field at the load's own height (power law) at each sample; the
    # bearing is the meteorological one (from which it comes): a wind toward +x (east with
    # north at +y) comes from 270 deg (common practice).
    sc = make_scene({"wind": {"speed_m_s": 6.0, "direction_deg": 0.0, "profile": "power",
                              "gusts": [{"start_s": 2.0, "peak_m_s": 4.0, "duration_s": 2.0}]}}, duration_s=6.0)
    traj = simulate(sc)
    cols = timeseries_columns(traj)
    z = cols["load_z_m"]
    t = cols["t_s"]
    gust = np.where((t > 2.0) & (t <= 4.0), 2.0 * (1.0 - np.cos(np.pi * (t - 2.0))), 0.0)
    expected = (6.0 + gust) * (np.maximum(z, 2.0) / 10.0) ** (1.0 / 7.0)
    assert np.allclose(cols["wind_speed_m_s"], expected, rtol=1e-9)
    assert np.allclose(cols["wind_from_bearing_deg"], 270.0)
    summary = summarize(traj)
    assert summary["peak_gust_m_s"] == pytest.approx(float(np.max(expected)), rel=1e-3)


def test_gust_above_the_in_service_limit_is_cautioned():
    # The in-service limit applies to the gust speed (common practice): a mean below the
    # limit with a gust above it must be cautioned, and the same mean without it must not.
    gusty = make_scene({"crane": {"wind_limit_m_s": 15.0},
                        "wind": {"speed_m_s": 10.0, "gusts": [{"start_s": 2.0, "peak_m_s": 8.0, "duration_s": 3.0}]}})
    calm = make_scene({"crane": {"wind_limit_m_s": 15.0}, "wind": {"speed_m_s": 10.0}})
    assert any("Peak gust" in c and "in-service wind limit" in c for c in summarize(simulate(gusty)).cautions)
    assert not any("Peak gust" in c for c in summarize(simulate(calm)).cautions)


def test_realisation_statistics_are_those_of_single_runs_of_the_same_seeds():
    # gust_statistics against numpy's mean, 95th percentile and max of single runs
    # (swingsim.simulation.simulate, DOP853) of seeds seed .. seed + N - 1.  The batch
    # engine agrees with the single-run solver to about 1e-4 (tests/test_batch.py); 1e-3 here.
    sc = _gusty({"wind": {"realisations": 4}}, duration_s=15.0)
    stats = gust_statistics(sc)
    assert stats["seeds"] == [4, 5, 6, 7]
    assert stats["engine"] == ["batch"]
    singles = [summarize(simulate(s)).data for s in realisation_scenes(sc)]
    for key in ("peak_rope_angle_deg", "peak_excursion_m", "peak_hook_load_kN"):
        vals = np.array([d[key] for d in singles])
        assert np.allclose(stats[key]["values"], vals, rtol=1e-3)
        assert stats[key]["mean"] == pytest.approx(np.mean(vals), rel=1e-3)
        assert stats[key]["p95"] == pytest.approx(np.percentile(vals, 95.0), rel=1e-3)
        assert stats[key]["max"] == pytest.approx(np.max(vals), rel=1e-3)
    assert len(set(np.round(stats["peak_rope_angle_deg"]["values"], 6))) == 4  # the seeds differ
    worst = int(np.argmax([d["peak_rope_angle_deg"] for d in singles]))
    assert stats["worst_seed"] == 4 + worst
    traj, summary = run_scene(sc)
    assert traj.scene.wind.seed == stats["worst_seed"]
    assert summary["peak_rope_angle_deg"] == pytest.approx(stats["peak_rope_angle_deg"]["max"], rel=1e-3)
    json.dumps(summary.data["gust_statistics"])  # summary.json can hold it


def test_zone_clearances_over_realisations():
    # with zones every realisation runs on the single-run path, which measures clearances;
    # the statistics are numpy's mean, 5th percentile and min of those runs
    sc = _gusty({"wind": {"realisations": 3}}, duration_s=10.0,
                zones=[{"name": "hut", "kind": "obstacle", "min_m": [8.0, 2.0, 0.0], "max_m": [10.0, 4.0, 3.0]}])
    stats = gust_statistics(sc)
    vals = [next(z["min_distance_m"] for z in summarize(simulate(s)).data["zones"] if z["name"] == "hut")
            for s in realisation_scenes(sc)]
    z = stats["zone_clearance_m"]["hut"]
    assert z["min"] == pytest.approx(min(vals), rel=1e-9)
    assert z["p5"] == pytest.approx(np.percentile(vals, 5.0), rel=1e-9)
    assert z["mean"] == pytest.approx(np.mean(vals), rel=1e-9)


def test_batch_engine_in_gusts_and_turbulence_matches_the_single_run():
    # the batch engine (vectorised RK8) against DOP853 (swingsim.simulation.simulate), each
    # variant its own wind: seeds, a log profile, gusts; rtol as above
    base = _gusty(duration_s=15.0)
    scenes = [dataclasses.replace(base, wind=dataclasses.replace(base.wind, seed=s, profile=p))
              for s, p in ((1, "power"), (2, "log"), (3, "uniform"))]
    out = run_batch(scenes)
    for s, o in zip(scenes, out):
        assert o["engine"] == "batch"
        d = summarize(simulate(s)).data
        for key in ("peak_rope_angle_deg", "peak_excursion_m", "peak_rope_tension_kN"):
            assert o[key] == pytest.approx(d[key], rel=1e-3), key
