r"""The wind as the site delivers it: mean, profile with height, turbulence, discrete gusts.

One :class:`WindField` per run gives the wind velocity (x and y components) at any
instant and height; every model reads the wind through :meth:`WindField.velocity_at`
(the batch engine through :class:`BatchWind`, the same numbers on arrays).

Notes
-----
**Separable field.**  The wind is given at the reference height :math:`z_r`
(``reference_height_m``) and the whole of it -- mean, turbulence and gusts --
scales with height by the profile factor :math:`f(z)`:

.. math:: \mathbf w(t, z) = f(z)\,\big[(U + u'(t))\,\mathbf e_1 + v'(t)\,\mathbf e_2
          + \textstyle\sum_k g_k(t)\,\mathbf e_k\big],

with :math:`\mathbf e_1` the mean direction, :math:`\mathbf e_2` across it and
:math:`\mathbf e_k` the direction of gust ``k``.

**Profile.**  ``uniform``: :math:`f = 1`.  ``power``: :math:`f = (z / z_r)^\alpha`
(the power law; default :math:`\alpha = 1/7`, the classic open-terrain exponent,
from memory).  ``log``: :math:`f = \ln(z / z_0) / \ln(z_r / z_0)` (the logarithmic
law; default :math:`z_0 = 0.05` m, EN 1991-1-4 terrain category II, from memory).
Below :data:`MIN_HEIGHT_M` the wind is taken as at that height (EN 1991-1-4's
:math:`z_\min` of category II, from memory).

**Turbulence.**  A stationary Gaussian process by spectral synthesis (Shinozuka &
Deodatis 1991): lines at :math:`f_k = k / T_r` with amplitudes
:math:`\sqrt{2 S(f_k) \Delta f}` and independent uniform random phases, summed by
one inverse real FFT on a record of :math:`T_r` = the longer of the run and 600 s
(the 10-minute period over which turbulence intensity is defined, common practice),
up to :data:`HIGHEST_FREQUENCY_HZ`; a periodic cubic spline through the samples
gives the wind between them.  The one-sided spectra, with :math:`\sigma` the
standard deviation (``turbulence_intensity`` times :math:`U`), :math:`n = f L / U`:

- ``kaimal`` (IEC 61400-1 ed. 3, Annex B, from memory):
  :math:`S = 4\sigma^2 (L/U) / (1 + 6 n)^{5/3}`; :math:`L_u = 8.1\Lambda`,
  :math:`L_v = 2.7\Lambda`, :math:`\Lambda = 0.7 z_r` up to 60 m and 42 m above;
- ``von-karman`` (IEC 61400-1 ed. 2 / ESDU 85020 form, from memory):
  :math:`S_u = 4\sigma^2 (L/U) / (1 + 70.8 n^2)^{5/6}`,
  :math:`S_v = 4\sigma^2 (L/U)(1 + 755.2 n^2) / (1 + 283.2 n^2)^{11/6}`, :math:`L = 3.5\Lambda`;
- ``davenport`` (Davenport 1961): :math:`S = \tfrac23 \sigma^2 n^2 / (f (1 + n^2)^{4/3})`,
  :math:`L = 1200` m at every height (used across the wind too).

Each integrates to :math:`\sigma^2` over :math:`0 < f < \infty`.  ``length_scale_m``
replaces the along-wind :math:`L` (the across-wind one keeps its ratio to it).
The across-wind standard deviation is ``lateral_intensity_ratio`` times the along-wind
one (0.8, IEC 61400-1 ed. 3 Kaimal model, from memory).

**Gusts.**  The "1 - cosine" shape of gust-load practice: added speed
:math:`g(t) = \tfrac12 g_\max (1 - \cos(2\pi (t - t_0) / \tau))` for
:math:`t_0 \le t \le t_0 + \tau`, zero outside.  Its start and end are breakpoints
of the solver (the second derivative jumps there).

References
----------
.. [1] M. Shinozuka and G. Deodatis, "Simulation of stochastic processes by spectral
   representation", *Appl. Mech. Rev.* 44(4), 191-204, 1991.
.. [2] IEC 61400-1, *Wind turbines - Part 1: Design requirements*, ed. 3, 2005, Annex B.
.. [3] A. G. Davenport, "The spectrum of horizontal gustiness near the ground in high
   winds", *Q. J. R. Meteorol. Soc.* 87, 194-211, 1961.
.. [4] EN 1991-1-4, *Eurocode 1: Actions on structures - Wind actions*, 2005, 4.3.
"""

from __future__ import annotations

import math

import numpy as np

#: Turbulence spectra by name.
SPECTRA = ("kaimal", "von-karman", "davenport")
#: Wind profiles by name.
PROFILES = ("uniform", "power", "log")
#: Default power-law exponent: the classic one-seventh law of open terrain [-] (from memory).
SHEAR_EXPONENT = 1.0 / 7.0
#: Default roughness length: EN 1991-1-4 terrain category II [m] (from memory).
ROUGHNESS_LENGTH_M = 0.05
#: Default height the wind speed is given at: the 10 m of anemometers and wind codes [m] (common practice).
REFERENCE_HEIGHT_M = 10.0
#: Lowest height of the profile: EN 1991-1-4 z_min of terrain category II [m] (from memory).
MIN_HEIGHT_M = 2.0
#: Across-wind over along-wind standard deviation, IEC 61400-1 ed. 3 Kaimal model [-] (from memory).
LATERAL_INTENSITY_RATIO = 0.8
#: Highest turbulence frequency synthesised [Hz]: above every swing mode of a crane load.
HIGHEST_FREQUENCY_HZ = 2.0
#: Sample interval of the synthesised record [s] (8 samples per shortest period).
SAMPLE_INTERVAL_S = 1.0 / 16.0
#: Shortest synthesised record: the 10-minute period of turbulence statistics [s] (common practice).
RECORD_S = 600.0


def integral_scale_m(height_m):
    """Turbulence scale parameter of IEC 61400-1 ed. 3 (from memory): 0.7 z up to 60 m, 42 m above.

    Parameters
    ----------
    height_m : float
        Height above the ground [m].

    Returns
    -------
    float
        The scale parameter Lambda [m].
    """
    return 0.7 * min(max(float(height_m), MIN_HEIGHT_M), 60.0)


def length_scales_m(spectrum: str, height_m: float, override_m: float | None = None) -> tuple:
    """Along- and across-wind length scales of a spectrum (module Notes).

    Parameters
    ----------
    spectrum : str
        One of :data:`SPECTRA`.
    height_m : float
        Height the turbulence is synthesised for [m].
    override_m : float, optional
        Along-wind length scale to use instead of the spectrum's default [m].

    Returns
    -------
    tuple of float
        ``(L_u, L_v)`` [m].
    """
    lam = integral_scale_m(height_m)
    along, across = {"kaimal": (8.1 * lam, 2.7 * lam), "von-karman": (3.5 * lam, 3.5 * lam),
                     "davenport": (1200.0, 1200.0)}[spectrum]
    if override_m is not None:
        across, along = across * override_m / along, override_m
    return along, across


def spectral_density(spectrum: str, component: str, f, sigma, mean_speed, length_m):
    """One-sided power spectral density of a turbulence component (module Notes).

    Parameters
    ----------
    spectrum : str
        One of :data:`SPECTRA`.
    component : str
        ``"along"`` or ``"across"`` the mean wind.
    f : float or ndarray
        Frequency, above zero [Hz].
    sigma : float
        Standard deviation of the component [m/s].
    mean_speed : float
        Mean wind speed [m/s].
    length_m : float
        Length scale of the component [m].

    Returns
    -------
    float or ndarray
        Spectral density [m^2/s^2/Hz].
    """
    f = np.asarray(f, dtype=float)
    a = length_m / mean_speed
    n = f * a
    if spectrum == "kaimal":
        return 4.0 * sigma**2 * a / (1.0 + 6.0 * n) ** (5.0 / 3.0)
    if spectrum == "von-karman":
        if component == "along":
            return 4.0 * sigma**2 * a / (1.0 + 70.8 * n * n) ** (5.0 / 6.0)
        return 4.0 * sigma**2 * a * (1.0 + 755.2 * n * n) / (1.0 + 283.2 * n * n) ** (11.0 / 6.0)
    if spectrum == "davenport":
        return (2.0 / 3.0) * sigma**2 * n * n / (f * (1.0 + n * n) ** (4.0 / 3.0))
    raise ValueError(f"unknown spectrum {spectrum!r}")


def synthesise(spectrum_fn, duration_s: float, rng, dt_s: float = SAMPLE_INTERVAL_S,
               f_max_hz: float = HIGHEST_FREQUENCY_HZ) -> tuple:
    """A stationary Gaussian record by spectral synthesis (random phases, inverse FFT).

    Parameters
    ----------
    spectrum_fn : callable
        One-sided spectral density ``S(f)`` [m^2/s^2/Hz] of frequencies above zero [Hz].
    duration_s : float
        Record length [s]; rounded up to a whole number of samples (an even count).
    rng : numpy.random.Generator
        Source of the random phases.
    dt_s : float
        Sample interval [s].
    f_max_hz : float
        Highest frequency synthesised [Hz]; lines above it are left out.

    Returns
    -------
    tuple
        ``(t, x)``: sample times [s] and the zero-mean record [m/s] (periodic: the
        record repeats after its last sample).
    """
    n = 2 * int(math.ceil(duration_s / dt_s / 2.0))
    T = n * dt_s
    k = np.arange(n // 2 + 1)
    f = k / T
    amp = np.zeros(len(k))
    keep = (k > 0) & (f <= f_max_hz) & (k < n // 2)
    amp[keep] = np.sqrt(2.0 * spectrum_fn(f[keep]) / T)
    phase = rng.uniform(0.0, 2.0 * math.pi, len(k))
    X = 0.5 * n * amp * np.exp(1j * phase)
    return np.arange(n) * dt_s, np.fft.irfft(X, n)


class _Record:
    """A periodic cubic spline through a synthesised record, evaluated fast on floats."""

    def __init__(self, t, x, keep_s):
        self.dt = float(t[1] - t[0])
        self.period = len(t) * self.dt
        from scipy.interpolate import CubicSpline  # lazily: start-up time of every command

        s = CubicSpline(np.append(t, self.period), np.append(x, x[0]), bc_type="periodic")
        # the pieces the run reaches (the record is longer, for its low frequencies)
        self.n = min(len(t), int(math.ceil(keep_s / self.dt)) + 2)
        self.c = np.ascontiguousarray(s.c.T[:self.n])  # (n, 4): tau^3, tau^2, tau, 1
        self._rows = self.c.tolist()

    def __call__(self, t: float) -> float:
        t = t % self.period
        i = int(t / self.dt)
        if i >= self.n:
            i = self.n - 1
        tau = t - i * self.dt
        c0, c1, c2, c3 = self._rows[i]
        return ((c0 * tau + c1) * tau + c2) * tau + c3

    def array(self, t):
        t = np.mod(np.asarray(t, dtype=float), self.period)
        i = np.minimum((t / self.dt).astype(np.intp), self.n - 1)
        tau = t - i * self.dt
        c = self.c[i]
        return ((c[..., 0] * tau + c[..., 1]) * tau + c[..., 2]) * tau + c[..., 3]


class WindField:
    """The wind of one run: velocity at any instant and height (module Notes).

    Parameters
    ----------
    wind : Wind
        The scene's ``[wind]`` (``speed_m_s``, ``direction_deg`` toward which it blows,
        and the optional gust, turbulence and profile keys).
    duration_s : float
        Length of the run [s].
    """

    def __init__(self, wind, duration_s: float):
        self.mean_speed_m_s = float(wind.speed_m_s)
        d = math.radians(wind.direction_deg)
        self._ex, self._ey = math.cos(d), math.sin(d)
        self.profile = getattr(wind, "profile", "uniform")
        self.reference_height_m = float(getattr(wind, "reference_height_m", REFERENCE_HEIGHT_M))
        self.shear_exponent = float(getattr(wind, "shear_exponent", SHEAR_EXPONENT))
        self.roughness_length_m = float(getattr(wind, "roughness_length_m", ROUGHNESS_LENGTH_M))
        self.gusts = []
        for g in getattr(wind, "gusts", ()):
            gd = math.radians(wind.direction_deg if g.direction_deg is None else g.direction_deg)
            self.gusts.append((float(g.start_s), float(g.start_s + g.duration_s), float(g.peak_m_s),
                               math.cos(gd), math.sin(gd)))
        intensity = float(getattr(wind, "turbulence_intensity", 0.0))
        self.turbulence_intensity = intensity
        self.spectrum = getattr(wind, "spectrum", "kaimal")
        self.seed = int(getattr(wind, "seed", 0))
        self._along = self._across = None
        if intensity > 0.0 and self.mean_speed_m_s > 0.0:
            sig = intensity * self.mean_speed_m_s
            lat = float(getattr(wind, "lateral_intensity_ratio", LATERAL_INTENSITY_RATIO))
            Lu, Lv = length_scales_m(self.spectrum, self.reference_height_m,
                                     getattr(wind, "length_scale_m", None))
            self.length_scales_m = (Lu, Lv)
            self.sigma_m_s = (sig, lat * sig)
            rng = np.random.default_rng(self.seed)
            rec = max(RECORD_S, float(duration_s))
            U, sp = self.mean_speed_m_s, self.spectrum
            keep = float(duration_s)
            self._along = _Record(*synthesise(lambda f: spectral_density(sp, "along", f, sig, U, Lu), rec, rng),
                                  keep)
            if lat > 0.0:
                self._across = _Record(*synthesise(
                    lambda f: spectral_density(sp, "across", f, lat * sig, U, Lv), rec, rng), keep)
        #: True when the wind changes in time (turbulence or gusts)
        self.varies = self._along is not None or bool(self.gusts)
        #: True when the wind changes with height
        self.sheared = self.profile != "uniform"
        #: instants where the wind's second derivative jumps (gust starts and ends) [s]
        self.breakpoints = tuple(sorted({b for g in self.gusts for b in g[:2]}))
        #: largest solver step that resolves the turbulence (a quarter of its shortest period) [s]
        self.max_step_s = 0.25 / HIGHEST_FREQUENCY_HZ if self._along is not None else math.inf

    # -- profile ---------------------------------------------------------------
    def profile_factor(self, height_m):
        """Wind at a height over the wind at the reference height (module Notes).

        Parameters
        ----------
        height_m : float or ndarray
            Height above the ground [m].

        Returns
        -------
        float or ndarray
            The factor f(z) [-].
        """
        if self.profile == "uniform":
            return 1.0 if np.ndim(height_m) == 0 else np.ones(np.shape(height_m))
        z = np.maximum(height_m, MIN_HEIGHT_M)
        if self.profile == "power":
            f = (z / self.reference_height_m) ** self.shear_exponent
        else:
            z0 = self.roughness_length_m
            f = np.log(z / z0) / math.log(self.reference_height_m / z0)
        return float(f) if np.ndim(f) == 0 else f  # a float for a float (the single run's fast path)

    @property
    def profile_key(self) -> tuple:
        """What :meth:`profile_factor` depends on: fields with equal keys give equal factors."""
        return (self.profile, self.reference_height_m, self.shear_exponent, self.roughness_length_m)

    # -- the wind ----------------------------------------------------------------
    def reference_velocity(self, t: float) -> tuple:
        """Wind velocity at the reference height at one instant.

        Parameters
        ----------
        t : float
            Time [s].

        Returns
        -------
        tuple of float
            ``(wx, wy)`` [m/s].
        """
        s = self.mean_speed_m_s
        c = 0.0
        if self._along is not None:
            s += self._along(t)
            if self._across is not None:
                c = self._across(t)
        wx = s * self._ex - c * self._ey
        wy = s * self._ey + c * self._ex
        for t0, t1, peak, gx, gy in self.gusts:
            if t0 < t <= t1:
                a = 0.5 * peak * (1.0 - math.cos(2.0 * math.pi * (t - t0) / (t1 - t0)))
                wx += a * gx
                wy += a * gy
        return wx, wy

    def velocity_at(self, t: float, height_m: float) -> tuple:
        """Wind velocity at one instant and height: the one place a model reads the wind.

        Parameters
        ----------
        t : float
            Time [s].
        height_m : float
            Height above the ground [m].

        Returns
        -------
        tuple of float
            ``(wx, wy)`` [m/s].
        """
        wx, wy = self.reference_velocity(t)
        if self.sheared:
            f = float(self.profile_factor(height_m))
            return wx * f, wy * f
        return wx, wy

    def terms(self, t: float, load_height_m: float, rope_mid_height_m: float) -> tuple:
        """The wind at a load and the rope above it (what the point-mass equations take).

        Parameters
        ----------
        t : float
            Time [s].
        load_height_m : float
            Height of the load above the ground [m].
        rope_mid_height_m : float
            Height of the rope's mid-point [m].

        Returns
        -------
        tuple of float
            ``(wx, wy, rope_factor)``: the wind velocity at the load [m/s] and the wind at
            the rope's mid-height over the wind at the load [-].
        """
        wx, wy = self.reference_velocity(t)
        if not self.sheared:
            return wx, wy, 1.0
        fl = float(self.profile_factor(load_height_m))
        return wx * fl, wy * fl, float(self.profile_factor(rope_mid_height_m)) / fl

    def velocities(self, t, height_m) -> np.ndarray:
        """Wind velocities at many instants and heights (arrays; the same numbers as :meth:`velocity_at`).

        Parameters
        ----------
        t : array_like
            Times [s].
        height_m : array_like
            Heights above the ground, broadcastable with ``t`` [m].

        Returns
        -------
        ndarray
            ``(..., 2)``: ``wx``, ``wy`` [m/s].
        """
        t = np.asarray(t, dtype=float)
        s = np.full(t.shape, self.mean_speed_m_s)
        c = np.zeros(t.shape)
        if self._along is not None:
            s = s + self._along.array(t)
            if self._across is not None:
                c = self._across.array(t)
        wx = s * self._ex - c * self._ey
        wy = s * self._ey + c * self._ex
        for t0, t1, peak, gx, gy in self.gusts:
            inside = (t > t0) & (t <= t1)
            a = np.where(inside, 0.5 * peak * (1.0 - np.cos(2.0 * np.pi * (t - t0) / (t1 - t0))), 0.0)
            wx = wx + a * gx
            wy = wy + a * gy
        f = self.profile_factor(height_m)
        return np.stack(np.broadcast_arrays(wx * f, wy * f), axis=-1)

    def mean_velocity_at(self, height_m: float) -> tuple:
        """The mean (steady) wind at a height, without turbulence or gusts.

        Parameters
        ----------
        height_m : float
            Height above the ground [m].

        Returns
        -------
        tuple of float
            ``(wx, wy)`` [m/s].
        """
        f = float(self.profile_factor(height_m))
        return self.mean_speed_m_s * self._ex * f, self.mean_speed_m_s * self._ey * f


def wind_field(scene) -> WindField | None:
    """The scene's wind field, or None for a steady wind that is the same at every height.

    Parameters
    ----------
    scene : Scene
        A validated scene.

    Returns
    -------
    WindField or None
        None when the models' steady-wind fast path holds.
    """
    field = WindField(scene.wind, scene.duration_s)
    return field if (field.varies or field.sheared) else None


class BatchWind:
    """The wind fields of a chunk of variants, evaluated together on arrays.

    Parameters
    ----------
    fields : list of WindField
        One field per variant (each made by :class:`WindField`).
    """

    def __init__(self, fields):
        self.fields = list(fields)
        B = len(self.fields)
        self.mean = np.array([f.mean_speed_m_s for f in self.fields])
        self.ex = np.array([f._ex for f in self.fields])
        self.ey = np.array([f._ey for f in self.fields])
        recs = [(f._along, f._across) for f in self.fields]
        n = max([r.n for pair in recs for r in pair if r is not None], default=0)
        self.coef = None
        if n:
            self.coef = np.zeros((2, B, n, 4))
            self.n = np.ones(B, dtype=np.intp)
            self.period = np.ones(B)
            for i, pair in enumerate(recs):
                for j, r in enumerate(pair):
                    if r is not None:
                        self.coef[j, i, :r.n] = r.c
                        self.n[i], self.period[i] = r.n, r.period
            self.dt = SAMPLE_INTERVAL_S
        G = max(len(f.gusts) for f in self.fields)
        self.gusts = np.zeros((G, 5, B))
        for i, f in enumerate(self.fields):
            for k, g in enumerate(f.gusts):
                self.gusts[k, :, i] = g
        self.gusts[:, 1][self.gusts[:, 1] == 0.0] = -1.0  # padding: an empty gust window
        self.sheared = any(f.sheared for f in self.fields)
        # variants sharing a profile (typically all of a chunk): one array call of its profile_factor each
        groups: dict = {}
        for i, f in enumerate(self.fields):
            groups.setdefault(f.profile_key, []).append(i)
        self._profile_groups = [(self.fields[rows[0]], np.array(rows)) for rows in groups.values()]

    def velocities(self, t, height_m) -> tuple:
        """Wind velocities of each variant at its own instant and height.

        Parameters
        ----------
        t : ndarray
            Times, a row per variant: (B,) or (B, M) [s].
        height_m : ndarray
            Heights, broadcastable with ``t`` [m].

        Returns
        -------
        tuple of ndarray
            ``(wx, wy)``, each shaped as ``t`` [m/s].
        """
        B = len(self.fields)
        t = np.asarray(t, dtype=float)
        if t.ndim == 0:
            t = np.broadcast_to(t, (B,))

        def col(a):  # one value per variant, against the shape of t
            return a.reshape((B,) + (1,) * (t.ndim - 1))

        s = np.broadcast_to(col(self.mean), t.shape).copy()
        c = np.zeros(t.shape)
        if self.coef is not None:
            tm = np.mod(t, col(self.period))
            i = np.clip((tm / self.dt).astype(np.intp), 0, col(self.n) - 1)
            tau = tm - i * self.dt
            ar = col(np.arange(B))
            for j, out in ((0, s), (1, c)):
                k = self.coef[j, ar, i]
                out += ((k[..., 0] * tau + k[..., 1]) * tau + k[..., 2]) * tau + k[..., 3]
        ex, ey = col(self.ex), col(self.ey)
        wx = s * ex - c * ey
        wy = s * ey + c * ex
        for g in self.gusts:
            t0, t1, peak, gx, gy = (col(a) for a in g)
            inside = (t > t0) & (t <= t1)
            a = np.where(inside, 0.5 * peak * (1.0 - np.cos(2.0 * np.pi * (t - t0) / np.where(inside, t1 - t0, 1.0))),
                         0.0)
            wx = wx + a * gx
            wy = wy + a * gy
        if self.sheared:
            f = self.profile_factor(np.broadcast_to(np.asarray(height_m, dtype=float), t.shape))
            wx, wy = wx * f, wy * f
        return wx, wy

    def profile_factor(self, height_m):
        """:meth:`WindField.profile_factor` of each variant (rows of ``height_m``) [-].

        Parameters
        ----------
        height_m : ndarray
            Heights (B,) or (B, M) [m].

        Returns
        -------
        ndarray
            The factors, shaped as ``height_m`` [-].
        """
        z = np.asarray(height_m, dtype=float)
        if len(self._profile_groups) == 1:
            return np.broadcast_to(self._profile_groups[0][0].profile_factor(z), z.shape)
        out = np.empty(z.shape)
        for field, rows in self._profile_groups:  # elementwise: a row's factor does not depend on the others
            out[rows] = field.profile_factor(z[rows])
        return out

    def select(self, rows) -> "BatchWind":
        """The same winds for some variants only.

        Parameters
        ----------
        rows : array_like of int
            Indices of the variants kept.

        Returns
        -------
        BatchWind
            The kept variants' winds.
        """
        return BatchWind([self.fields[i] for i in np.atleast_1d(rows)])

    def terms(self, t, load_height_m, rope_mid_height_m) -> tuple:
        """:meth:`WindField.terms` of every variant at once.

        Parameters
        ----------
        t : ndarray
            Times, one per variant (B,) [s].
        load_height_m : ndarray
            Heights of the loads (B,) [m].
        rope_mid_height_m : ndarray
            Heights of the ropes' mid-points (B,) [m].

        Returns
        -------
        tuple of ndarray
            ``(wx, wy, rope_factor)``, each (B,) [m/s, m/s, -].
        """
        wx, wy = self.velocities(t, load_height_m)
        if not self.sheared:
            return wx, wy, 1.0
        shape = np.shape(wx)
        zl = np.broadcast_to(np.asarray(load_height_m, dtype=float), shape)
        zm = np.broadcast_to(np.asarray(rope_mid_height_m, dtype=float), shape)
        return wx, wy, self.profile_factor(zm) / self.profile_factor(zl)


def rope_end_wind(field, t, pz):
    """The wind of the hook-and-load equations at one instant, as a function of the rope end's height.

    What :func:`swingsim.dynamics.hook_load.equations_of_motion` takes as its ``wind``
    argument when the wind varies: the single run passes a :class:`WindField` and
    floats, the batch engine a :class:`BatchWind` and arrays (one row per variant).

    Parameters
    ----------
    field : WindField or BatchWind
        The run's (or the chunk's) wind.
    t : float or ndarray
        Time [s]: a float, or one per variant (B,) or per sample (B, M).
    pz : float or ndarray
        Height of the suspension point above the ground [m] (one per variant,
        shaped to broadcast with ``t``).

    Returns
    -------
    callable
        ``at(hz) -> (wx, wy, rope_factor, load_factor)`` for the rope end's height
        ``hz`` relative to the suspension point [m]: the wind at the rope's end [m/s],
        the wind at the rope's mid-height over it [-] and ``load_factor(gz)``, the wind
        at the height ``gz`` (relative to the suspension point) over the wind at the
        rope's end [-] (None without a profile: 1).
    """
    def at(hz):
        end_z = pz + hz
        wx, wy, rope_factor = field.terms(t, end_z, 0.5 * (pz + end_z))
        if not field.sheared:
            return wx, wy, rope_factor, None
        at_end = field.profile_factor(end_z)
        return wx, wy, rope_factor, lambda gz: field.profile_factor(pz + gz) / at_end

    return at
