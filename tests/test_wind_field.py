"""The wind field: turbulence spectra, the synthesised process, the profile with height.

Sources named beside each check: IEC 61400-1 ed. 3 Annex B (Kaimal), the von Karman
spectrum in its IEC 61400-1 ed. 2 / ESDU form, Davenport (1961), Shinozuka & Deodatis
(1991, spectral representation), the power law and the logarithmic law of the
atmospheric boundary layer (EN 1991-1-4 4.3 for the log law); scipy.integrate.quad and
scipy.signal.welch as independent numerical references.
"""

import math

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.signal import welch

from swingsim.dynamics import wind as W
from swingsim.errors import SceneError

from conftest import make_scene

SPECTRA = ("kaimal", "von-karman", "davenport")


def _turbulent(spectrum="kaimal", duration_s=20.0, seed=3, **wind):
    w = {"speed_m_s": 10.0, "turbulence_intensity": 0.2, "spectrum": spectrum, "seed": seed, **wind}
    return make_scene({"wind": w}, duration_s=duration_s)


@pytest.mark.parametrize("spectrum", SPECTRA)
@pytest.mark.parametrize("component", ("along", "across"))
def test_each_spectrum_integrates_to_the_variance(spectrum, component):
    # Each published form is normalised so that its integral over 0 < f < inf is sigma^2
    # (Kaimal: IEC 61400-1 ed. 3 B.2; von Karman: the constants 70.8 / 283.2 / 755.2 are
    # chosen for it; Davenport 1961).  scipy.integrate.quad over the whole axis.
    sigma, U, L = 1.7, 12.0, 150.0
    total = sum(quad(lambda f: float(W.spectral_density(spectrum, component, f, sigma, U, L)), a, b,
                     limit=400)[0]
                for a, b in ((0.0, 1e-3), (1e-3, 1.0), (1.0, 100.0), (100.0, np.inf)))
    # quad's own error is far below; the von Karman constants are rounded to 3-4 digits (0.1 %)
    assert total == pytest.approx(sigma**2, rel=2e-3)


def test_default_length_scales_are_the_published_ones():
    # IEC 61400-1 ed. 3 (from memory): Lambda = 0.7 z below 60 m, 42 m above; Kaimal
    # L_u = 8.1 Lambda, L_v = 2.7 Lambda; von Karman L = 3.5 Lambda (ed. 2); Davenport 1200 m.
    assert W.length_scales_m("kaimal", 10.0) == pytest.approx((8.1 * 7.0, 2.7 * 7.0))
    assert W.length_scales_m("kaimal", 100.0) == pytest.approx((8.1 * 42.0, 2.7 * 42.0))
    assert W.length_scales_m("von-karman", 30.0) == pytest.approx((3.5 * 21.0, 3.5 * 21.0))
    assert W.length_scales_m("davenport", 30.0) == pytest.approx((1200.0, 1200.0))
    # an override replaces the along-wind scale and keeps the across/along ratio
    assert W.length_scales_m("kaimal", 10.0, 100.0) == pytest.approx((100.0, 100.0 / 3.0))


def _record(field, duration_s):
    """The field's along- and across-wind fluctuations at the synthesis samples (exact: the spline's knots)."""
    t = np.arange(int(round(duration_s / W.SAMPLE_INTERVAL_S))) * W.SAMPLE_INTERVAL_S
    v = field.velocities(t, np.full(t.shape, 10.0))
    e1 = np.array([field._ex, field._ey])
    e2 = np.array([-field._ey, field._ex])
    return t, v @ e1 - field.mean_speed_m_s, v @ e2


@pytest.mark.parametrize("spectrum", SPECTRA)
def test_synthesised_mean_and_standard_deviation(spectrum):
    # Spectral representation (Shinozuka & Deodatis 1991): lines at k / T with amplitude
    # sqrt(2 S(f_k) df) and random phases.  Over the whole record the mean of the
    # fluctuation is exactly zero (no line at f = 0) and its variance is exactly
    # sum S(f_k) df (deterministic amplitudes); that sum is the integral of the named
    # spectrum over the resolved band [1/T, f_max], to the Riemann sum's error.
    T = 1200.0
    sc = _turbulent(spectrum, duration_s=T)
    field = W.WindField(sc.wind, T)
    t, u, v = _record(field, T)
    sigma = 0.2 * 10.0
    Lu, Lv = field.length_scales_m
    band = (1.0 / T, W.HIGHEST_FREQUENCY_HZ)

    def resolved(component, s, L):
        return quad(lambda f: float(W.spectral_density(spectrum, component, f, s, 10.0, L)), *band,
                    limit=400, points=[0.01, 0.1])[0]

    assert abs(np.mean(u)) < 1e-9 * sigma
    # Riemann sum against the integral: the spectra are smooth on the 1/T grid; 3 % covers
    # the left-endpoint sum's error at the lowest lines of the steepest (Davenport) case
    assert np.var(u) == pytest.approx(resolved("along", sigma, Lu), rel=0.03)
    assert np.var(v) == pytest.approx(resolved("across", 0.8 * sigma, Lv), rel=0.03)
    # and the resolved band holds most of the stated intensity: the standard deviation is
    # the stated one less what lies below 1/T (10-minute statistics, common practice)
    full = quad(lambda f: float(W.spectral_density(spectrum, "along", f, sigma, 10.0, Lu)), 0.0, np.inf,
                limit=400)[0]
    assert np.std(u) <= math.sqrt(full) * 1.01
    assert np.std(u) >= 0.6 * sigma


@pytest.mark.parametrize("spectrum", SPECTRA)
def test_synthesised_spectrum_against_the_named_one(spectrum):
    # Welch's estimate (scipy.signal.welch, Hann, 50 % overlap) of a 3600 s record at 16 Hz
    # against the named spectrum, averaged over log-spaced bands between 0.1 and 1.5 Hz.
    # Tolerance from the record length: N = 57600 samples, nperseg = 2048 gives
    # K = 2 N / nperseg - 1 = 55 segments, a relative standard error near 1 / sqrt(K) = 0.135
    # per Welch bin; each band averages at least 9 bins, 0.135 / 3 = 0.045; 20 % is over four
    # standard errors (leakage of the Hann window on these -5/3 slopes is far smaller).
    T = 3600.0
    sc = _turbulent(spectrum, duration_s=T, seed=11)
    field = W.WindField(sc.wind, T)
    t, u, v = _record(field, T)
    fs = 1.0 / W.SAMPLE_INTERVAL_S
    sigma = 2.0
    Lu, Lv = field.length_scales_m
    for x, comp, s, L in ((u, "along", sigma, Lu), (v, "across", 0.8 * sigma, Lv)):
        f, P = welch(x, fs=fs, nperseg=2048)
        edges = np.geomspace(0.1, 1.5, 6)
        for a, b in zip(edges[:-1], edges[1:]):
            sel = (f >= a) & (f < b)
            assert sel.sum() >= 9
            expected = np.mean(W.spectral_density(spectrum, comp, f[sel], s, 10.0, L))
            assert np.mean(P[sel]) == pytest.approx(expected, rel=0.20), (comp, a, b)


def test_a_seed_reproduces_the_wind_and_another_seed_does_not():
    # Reproducibility with a seed (numpy.random.default_rng is deterministic per seed).
    t = np.linspace(0.0, 20.0, 401)
    a = W.WindField(_turbulent(seed=5).wind, 20.0).velocities(t, 10.0)
    b = W.WindField(_turbulent(seed=5).wind, 20.0).velocities(t, 10.0)
    c = W.WindField(_turbulent(seed=6).wind, 20.0).velocities(t, 10.0)
    assert np.array_equal(a, b)
    assert np.max(np.abs(a - c)) > 0.1


def test_the_float_path_equals_the_array_path():
    # one wind, two evaluators (the solver's float path and the outputs' arrays)
    sc = _turbulent(profile="power", gusts=[{"start_s": 3.0, "peak_m_s": 4.0, "duration_s": 2.0}])
    f = W.WindField(sc.wind, 20.0)
    ts = np.linspace(0.0, 19.9, 57)
    arr = f.velocities(ts, np.full(ts.shape, 25.0))
    flt = np.array([f.velocity_at(float(t), 25.0) for t in ts])
    assert np.allclose(arr, flt, rtol=1e-13, atol=1e-12)
    batch = W.BatchWind([f, f])
    wx, wy = batch.velocities(np.array([ts[5], ts[9]]), np.array([25.0, 25.0]))
    assert np.allclose(np.stack([wx, wy], axis=-1), arr[[5, 9]], rtol=1e-13)


@pytest.mark.parametrize("height", (20.0, 40.0, 60.0))
def test_power_law_profile(height):
    # Power law U(z) = U_ref (z / z_ref)^alpha; with alpha = 1/7 at 40 m: 9 * 4^(1/7) = 10.97 m/s.
    sc = make_scene({"wind": {"speed_m_s": 9.0, "profile": "power", "shear_exponent": 1.0 / 7.0}})
    f = W.WindField(sc.wind, 20.0)
    wx, wy = f.velocity_at(0.0, height)
    assert math.hypot(wx, wy) == pytest.approx(9.0 * (height / 10.0) ** (1.0 / 7.0), rel=1e-12)
    if height == 40.0:
        assert math.hypot(wx, wy) == pytest.approx(10.97, abs=0.01)


@pytest.mark.parametrize("height", (5.0, 25.0, 50.0))
def test_log_law_profile(height):
    # Logarithmic law U(z) = U_ref ln(z / z0) / ln(z_ref / z0) (EN 1991-1-4 4.3 form);
    # z0 = 0.05 m (terrain category II, from memory): at 50 m, 9 * ln(1000) / ln(200) = 11.73 m/s.
    sc = make_scene({"wind": {"speed_m_s": 9.0, "profile": "log", "roughness_length_m": 0.05}})
    f = W.WindField(sc.wind, 20.0)
    wx, wy = f.velocity_at(0.0, height)
    assert math.hypot(wx, wy) == pytest.approx(9.0 * math.log(height / 0.05) / math.log(10.0 / 0.05), rel=1e-12)
    if height == 50.0:
        assert math.hypot(wx, wy) == pytest.approx(11.73, abs=0.01)


def test_uniform_profile_and_the_floor_height():
    # uniform: the same speed at every height; below z_min = 2 m (EN 1991-1-4 cat. II, from
    # memory) the profile is held at its value there
    f = W.WindField(make_scene({"wind": {"speed_m_s": 7.0}}).wind, 20.0)
    assert f.velocity_at(0.0, 0.5) == pytest.approx(f.velocity_at(0.0, 80.0))
    g = W.WindField(make_scene({"wind": {"speed_m_s": 7.0, "profile": "power"}}).wind, 20.0)
    assert g.velocity_at(0.0, 0.5) == pytest.approx(g.velocity_at(0.0, 2.0))


@pytest.mark.parametrize("wind, fragment", [
    ({"turbulence_intensity": 0.1}, "wind.turbulence_intensity"),
    ({"speed_m_s": 5.0, "spectrum": "pink"}, "wind.spectrum"),
    ({"speed_m_s": 5.0, "profile": "log", "roughness_length_m": 1.5, "reference_height_m": 1.0},
     "wind.roughness_length_m"),
    ({"speed_m_s": 5.0, "realisations": 5}, "wind.realisations"),
    ({"gusts": [{"start_s": 1.0, "peak_m_s": 3.0}]}, "wind.gusts[0].duration_s"),
    ({"gusts": [{"start_s": 1.0, "peak_m_s": 3.0, "duration_s": 2.0, "size": 1}]}, "wind.gusts[0].size"),
])
def test_bad_wind_keys_give_one_line(wind, fragment):
    # the house rule for bad input: one line naming the key
    with pytest.raises(SceneError) as e:
        make_scene({"wind": wind})
    assert fragment in str(e.value) and "\n" not in str(e.value)
