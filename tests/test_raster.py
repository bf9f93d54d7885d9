"""The comparison report's raster plotter (swingsim.report.raster) against matplotlib, the reference it stands in for.

Sources: matplotlib's viridis colour map (``matplotlib.colormaps["viridis"]``, van der
Walt & Smith 2015), matplotlib's ``MaxNLocator`` with ``steps=[1, 2, 2.5, 5, 10]``
(the 1-2-2.5-5 rule of round tick steps), and where a drawn pixel must fall by the
linear map from data to the axes' box.
"""

import base64
import io

import numpy as np
import pytest
from PIL import Image

from swingsim.report import raster


def _decode(b64):
    return np.asarray(Image.open(io.BytesIO(base64.b64decode(b64))).convert("RGB"), dtype=int)


@pytest.mark.parametrize("lo, hi, n", [(0.0, 1.0, 5), (4.1, 36.2, 8), (0.095, 1.045, 6), (-3.0, 7.5, 4),
                                       (19.4, 30.4, 6), (0.4925, 2.0075, 9)])
def test_ticks_are_round_steps_inside_the_limits(lo, hi, n):
    # the step is the smallest of 1, 2, 2.5, 5 x 10^k not below (hi - lo) / n (two ticks at least
    # fit in these ranges): MaxNLocator's rule with steps=[1, 2, 2.5, 5, 10]; the ticks are the
    # multiples of it inside [lo, hi]
    t = raster.nice_ticks(lo, hi, n)
    step = t[1] - t[0]
    mant = step / 10.0 ** np.floor(np.log10(step))
    near = min((1.0, 2.0, 2.5, 5.0, 10.0), key=lambda m: abs(m - mant))
    assert abs(near - mant) < 1e-9
    assert t[0] >= lo - 1e-9 and t[-1] <= hi + 1e-9
    assert t[0] - step < lo and t[-1] + step > hi  # none missing at the ends
    assert np.allclose(t / step, np.round(t / step))
    assert step >= (hi - lo) / n * (1 - 1e-9)
    finer = {1.0: 0.5, 2.0: 1.0, 2.5: 2.0, 5.0: 2.5, 10.0: 5.0}[near] * step / mant
    assert finer < (hi - lo) / n  # the next finer step would give more than n intervals


def test_ticks_agree_with_matplotlib_maxnlocator():
    from matplotlib.ticker import MaxNLocator

    rng = np.random.default_rng(7)
    for _ in range(300):
        span = float(10.0 ** rng.uniform(-3, 3))
        # limits within a few spans of zero (MaxNLocator moves a far offset out of the ticks first)
        lo = span * float(rng.uniform(-3, 3))
        hi = lo + span
        n = int(rng.integers(3, 10))
        ref = MaxNLocator(nbins=n, steps=[1, 2, 2.5, 5, 10]).tick_values(lo, hi)
        tol = 1e-9 * (hi - lo)
        ref = ref[(ref >= lo - tol) & (ref <= hi + tol)]
        got = raster.nice_ticks(lo, hi, n)
        assert len(got) == len(ref) and np.allclose(got, ref, rtol=0, atol=tol), (lo, hi, n)


def test_tick_labels_share_their_decimals():
    # matplotlib's ScalarFormatter prints 0.25-steps as 0.50, 0.75, 1.00 (common decimals)
    assert raster.tick_labels(np.array([0.5, 0.75, 1.0])) == ["0.50", "0.75", "1.00"]
    assert raster.tick_labels(np.array([10.0, 20.0, 30.0])) == ["10", "20", "30"]
    assert raster.tick_labels(np.array([-0.2, 0.0, 0.2])) == ["-0.2", "0.0", "0.2"]


def test_heat_map_cells_take_viridis_colours():
    from matplotlib import colormaps

    fig = raster.Figure(4.0, 4.0)
    ax = fig.add_axes(0.1, 0.1, 0.9, 0.9)
    values = np.array([[0.0, 1.0], [2.0, 4.0]])  # row j = y cell, column i = x cell
    ax.mesh([0.0, 1.0, 2.0], [0.0, 1.0, 2.0], values)
    img = _decode(fig.png_base64())
    h, w, _ = img.shape
    for (j, i), v in np.ndenumerate(values):
        # cell centre in the output picture: x from the left, y from the bottom of the axes box
        px = int(round((0.1 + 0.8 * (i + 0.5) / 2) * w))
        py = int(round((1 - (0.1 + 0.8 * (j + 0.5) / 2)) * h))
        ref = np.round(np.array(colormaps["viridis"](v / 4.0)[:3]) * 255)
        assert np.max(np.abs(img[py, px] - ref)) <= 4, (j, i)  # 17 anchors, linear between: a few levels


def test_a_line_is_drawn_where_its_data_maps():
    fig = raster.Figure(4.0, 3.0)
    ax = fig.add_axes(0.2, 0.2, 0.9, 0.9)
    ax.xlim, ax.ylim = (0.0, 10.0), (0.0, 4.0)
    ax.plot([0.0, 10.0], [1.0, 1.0], "#c8553d", lw=2.0)
    img = _decode(fig.png_base64())
    h, w, _ = img.shape
    row = int(round((1 - (0.2 + 0.7 * 1.0 / 4.0)) * h))
    col = int(round(0.55 * w))
    assert np.max(np.abs(img[row, col] - [0xc8, 0x55, 0x3d])) <= 40  # the line's colour (edges smoothed)
    assert np.all(img[row - 15, col] > 240) and np.all(img[row + 15, col] > 240)  # white above and below


def test_log_axis_labels_decades():
    fig = raster.Figure(4.0, 3.0)
    ax = fig.add_axes(0.2, 0.2, 0.9, 0.9)
    major, labels, minor = ax._ticks((1e-4, 20.0), True, 400.0, False)
    assert labels == ["0.0001", "0.001", "0.01", "0.1", "1", "10"]
    assert np.allclose(sorted(minor)[:2], [2e-4, 5e-4])
