"""A small raster plotter for the comparison report: axes, lines, bands, heat maps, colour bars (PNG).

The comparison report (:mod:`swingsim.report.plots_compare`) draws a few
aggregated plots whatever the number of variants.  Drawn with matplotlib they
cost more than a fifth of a 10,000-variant comparison: importing
``matplotlib.figure`` takes about 0.5 s of CPU and drawing four figures
another 0.6 s (every tick, label and line is a Python object with its own
properties and transforms).  These plots need only a handful of primitives,
so they are drawn here directly on a Pillow image: in the same font
(DejaVu Sans, which matplotlib installs; Pillow's own font when it is not
found), palette and layout as the project's other figures.

The picture is drawn at :data:`SUPERSAMPLE` times the resolution and reduced
(box filter), which smooths the edges of lines, markers and bands.  Text is
drawn literally (no maths markup), so user text prints as it is.

Sizes follow matplotlib's conventions: figure size in inches at :data:`DPI`,
font sizes, line widths and marker sizes in points, layout in figure
fractions.
"""

from __future__ import annotations

import base64
import importlib.util
import io
import math
import os

import numpy as np
from PIL import Image, ImageDraw, ImageFont

#: Output resolution [pixels per inch].
DPI = 100
#: Drawing resolution over the output resolution (antialiasing by reduction).
SUPERSAMPLE = 2
#: Viridis (a perceptually uniform colour map, CC0; van der Walt & Smith, 2015) at 17 equal steps.
VIRIDIS = ("#440154", "#48186a", "#472d7b", "#424086", "#3b528b", "#33638d", "#2c728e", "#26828e", "#21918c",
           "#1fa088", "#28ae80", "#3fbc73", "#5ec962", "#84d44b", "#addc30", "#d8e219", "#fde725")
#: Colour of the axes' frame, ticks and tick labels.
FRAME = "#000000"

_FONTS: dict = {}
_K = DPI / 72.0 * SUPERSAMPLE  # drawing pixels per point


def _rgb(colour) -> tuple:
    c = colour.lstrip("#")
    return tuple(int(c[i:i + 2], 16) for i in (0, 2, 4))


def _lut() -> np.ndarray:
    """Viridis as a 256-entry table (linear between the anchors) [0..255]."""
    anchors = np.array([_rgb(c) for c in VIRIDIS], dtype=float)
    x = np.linspace(0.0, 1.0, len(anchors))
    s = np.linspace(0.0, 1.0, 256)
    return np.stack([np.interp(s, x, anchors[:, i]) for i in range(3)], axis=1).round().astype(np.uint8)


def _font_file():
    """DejaVu Sans from matplotlib's data folder (found, not imported), or None."""
    spec = importlib.util.find_spec("matplotlib")
    for folder in (spec.submodule_search_locations or []) if spec else []:
        path = os.path.join(folder, "mpl-data", "fonts", "ttf", "DejaVuSans.ttf")
        if os.path.exists(path):
            return path
    return None


def font(size_pt: float):
    """The plots' font at a size.

    Parameters
    ----------
    size_pt : float
        Font size [pt].

    Returns
    -------
    PIL.ImageFont.FreeTypeFont
        DejaVu Sans (Pillow's default font when it is not installed), sized for the drawing resolution.
    """
    px = max(1, int(round(size_pt * _K)))
    got = _FONTS.get(px)
    if got is None:
        path = _font_file() if "path" not in _FONTS else _FONTS["path"]
        _FONTS["path"] = path
        try:
            got = ImageFont.truetype(path, px) if path else ImageFont.load_default(px)
        except OSError:
            got = ImageFont.load_default(px)
        _FONTS[px] = got
    return got


def nice_ticks(lo: float, hi: float, max_ticks: int) -> np.ndarray:
    """Round tick values inside ``[lo, hi]``: steps of 1, 2, 2.5 or 5 times a power of ten.

    The step is the smallest of them not below ``(hi - lo) / max_ticks``, or a finer
    one while fewer than two ticks fall inside (the rule of matplotlib's
    ``MaxNLocator`` with ``steps=[1, 2, 2.5, 5, 10]``).

    Parameters
    ----------
    lo, hi : float
        The axis limits.
    max_ticks : int
        At most this many intervals.

    Returns
    -------
    ndarray
        The tick values, ascending.
    """
    span = hi - lo
    if not span > 0:
        return np.array([lo])
    raw = span / max(max_ticks, 1)
    mag = 10.0 ** math.floor(math.log10(raw))
    steps = [m * mag for m in (1.0, 2.0, 2.5, 5.0, 10.0)]
    k = next(i for i, st in enumerate(steps) if st >= raw * (1 - 1e-9))
    while True:
        # the smallest round step of at least span / max_ticks; a finer one while fewer than two ticks fit
        step = steps[k]
        first = math.ceil(lo / step - 1e-9)
        last = math.floor(hi / step + 1e-9)
        if last - first >= 1 or k == 0:
            return np.arange(first, last + 1) * step
        k -= 1


def tick_labels(values) -> list:
    """Labels of linear ticks with the decimals they need in common (``0.25, 0.50, 0.75``).

    Parameters
    ----------
    values : ndarray
        Tick values.

    Returns
    -------
    list of str
        The labels.
    """
    scale = max((abs(v) for v in values), default=1.0) or 1.0
    for d in range(0, 8):
        if all(abs(round(v, d) - v) <= 1e-9 * scale for v in values):
            break
    return [f"{(0.0 if abs(v) < 1e-12 * scale else v):.{d}f}" for v in values]


class Figure:
    """A white picture of ``width_in`` x ``height_in`` inches with axes, text and a PNG export.

    Parameters
    ----------
    width_in, height_in : float
        Size [in] at :data:`DPI`.
    """

    def __init__(self, width_in: float, height_in: float):
        self.width = int(round(width_in * DPI)) * SUPERSAMPLE
        self.height = int(round(height_in * DPI)) * SUPERSAMPLE
        self.image = Image.new("RGB", (self.width, self.height), "white")
        self.draw = ImageDraw.Draw(self.image, "RGBA")
        self.axes = []

    def box(self, left, bottom, right, top) -> tuple:
        """A rectangle given in figure fractions (from the bottom left), in drawing pixels.

        Parameters
        ----------
        left, bottom, right, top : float
            Edges as fractions of the figure's width and height, from its bottom left [-].

        Returns
        -------
        tuple of float
            ``(x0, y0, x1, y1)`` [drawing px], y downwards.
        """
        return (left * self.width, (1.0 - top) * self.height, right * self.width, (1.0 - bottom) * self.height)

    def add_axes(self, left, bottom, right, top) -> "Axes":
        """New axes over a rectangle in figure fractions.

        Parameters
        ----------
        left, bottom, right, top : float
            Edges of the plotting area [-].

        Returns
        -------
        Axes
            The axes (drawn by :meth:`png_base64`).
        """
        ax = Axes(self, self.box(left, bottom, right, top))
        self.axes.append(ax)
        return ax

    def text(self, x, y, s, size_pt, colour=FRAME, anchor="la", angle=0.0):
        """Text at a point of the picture, drawn literally.

        Parameters
        ----------
        x, y : float
            The anchor point [drawing px], y downwards.
        s : str
            The text.
        size_pt : float
            Font size [pt].
        colour : str, optional
            ``#rrggbb``.
        anchor : str, optional
            Pillow's two-letter anchor (``la``, ``mm``, ``rt`` ...); with an angle it
            applies to the rotated text's bounding box.
        angle : float, optional
            Rotation, anticlockwise [deg].
        """
        f = font(size_pt)
        if not angle:
            self.draw.text((x, y), s, font=f, fill=colour, anchor=anchor)
            return
        x0, y0, x1, y1 = f.getbbox(s, anchor="lt")
        tile = Image.new("L", (int(x1 - x0) + 4, int(y1 - y0) + 4), 0)
        ImageDraw.Draw(tile).text((2 - x0, 2 - y0), s, font=f, fill=255, anchor="lt")
        tile = tile.rotate(angle, expand=True, resample=Image.BICUBIC)
        w, h = tile.size
        ox = {"l": 0, "m": w / 2, "r": w}[anchor[0]]
        oy = {"t": 0, "a": 0, "m": h / 2, "b": h, "d": h}[anchor[1]]
        solid = Image.new("RGB", tile.size, colour)
        self.image.paste(solid, (int(round(x - ox)), int(round(y - oy))), tile)

    def png_base64(self) -> str:
        """Draw the axes and encode the picture.

        Returns
        -------
        str
            The picture at :data:`DPI` as a PNG, base64-encoded.
        """
        for ax in self.axes:
            ax.render()
        out = self.image.reduce(SUPERSAMPLE) if SUPERSAMPLE > 1 else self.image
        buf = io.BytesIO()
        out.save(buf, format="PNG", compress_level=6)
        return base64.b64encode(buf.getvalue()).decode("ascii")


class Axes:
    """A plotting area: lines, bands, bars, a heat map; linear or log axes; grid, labels, a legend.

    Artists are collected first and drawn by :meth:`render`, once the limits are known
    (the data's extent with a 5 % margin, as matplotlib's default, unless set).
    """

    def __init__(self, fig: Figure, box):
        self.fig = fig
        self.x0, self.y0, self.x1, self.y1 = box
        self.items = []
        self.xlim = self.ylim = None
        self.xlog = self.ylog = False
        self.xlabel = self.ylabel = ""
        self.xlabel_pt = self.ylabel_pt = 10.0
        self.grid_colour = None
        self.xticks = None           # (positions, labels, rotation, size) of category ticks
        self.legend_pt = None
        self.colourbar = None
        self.tick_pt = 10.0

    # -- collecting ------------------------------------------------------

    def plot(self, x, y, colour, lw=1.5, marker=None, ms=4.0, label=None):
        """A line through the points (broken at NaN), with round markers when ``marker`` is given.

        Parameters
        ----------
        x, y : array_like
            The points [data units].
        colour : str
            ``#rrggbb``.
        lw : float, optional
            Line width [pt]; 0 for markers only.
        marker : str, optional
            Any value draws a round marker at each point.
        ms : float, optional
            Marker diameter [pt].
        label : str, optional
            Its legend entry.
        """
        self.items.append(("line", np.asarray(x, float), np.asarray(y, float), colour, lw, marker, ms, label))

    def fill_between(self, x, lo, hi, colour, alpha):
        """A band between two curves (broken at NaN).

        Parameters
        ----------
        x, lo, hi : array_like
            Abscissae and the band's lower and upper edges [data units].
        colour : str
            ``#rrggbb``.
        alpha : float
            Opacity [-].
        """
        self.items.append(("band", np.asarray(x, float), np.asarray(lo, float), np.asarray(hi, float),
                           colour, alpha))

    def vlines(self, x, lo, hi, colour, lw, alpha):
        """Vertical bars from ``lo`` to ``hi`` at each x.

        Parameters
        ----------
        x, lo, hi : array_like
            Positions and the bars' ends [data units].
        colour : str
            ``#rrggbb``.
        lw : float
            Bar width [pt].
        alpha : float
            Opacity [-].
        """
        self.items.append(("vlines", np.asarray(x, float), np.asarray(lo, float), np.asarray(hi, float),
                           colour, lw, alpha))

    def axvline(self, x, colour, lw):
        """A vertical line across the axes.

        Parameters
        ----------
        x : float
            Its position [data units].
        colour : str
            ``#rrggbb``.
        lw : float
            Line width [pt].
        """
        self.items.append(("axvline", float(x), colour, lw))

    def mesh(self, x_edges, y_edges, values, log=False):
        """A heat map in viridis; the axes' limits become the outer edges.

        Parameters
        ----------
        x_edges, y_edges : array_like
            Cell edges along x and y, ascending [data units].
        values : ndarray (len(y_edges) - 1, len(x_edges) - 1)
            ``values[j, i]`` fills the cell between ``x_edges[i:i+2]`` and
            ``y_edges[j:j+2]``; NaN leaves it empty.
        log : bool, optional
            Colours on a log scale (positive values).

        Returns
        -------
        tuple
            ``(vmin, vmax, log)``: the colour scale, for :meth:`colour_bar`.
        """
        v = np.asarray(values, float)
        fin = v[np.isfinite(v)]
        vmin, vmax = (float(fin.min()), float(fin.max())) if fin.size else (0.0, 1.0)
        self.items.append(("mesh", np.asarray(x_edges, float), np.asarray(y_edges, float), v, vmin, vmax, log))
        self.xlim = (float(x_edges[0]), float(x_edges[-1]))
        self.ylim = (float(y_edges[0]), float(y_edges[-1]))
        return vmin, vmax, log

    def colour_bar(self, scale, label, label_pt=8.0):
        """A colour bar right of the axes for a :meth:`mesh` (the axes give up 20 % of their width).

        Parameters
        ----------
        scale : tuple
            What :meth:`mesh` returned.
        label : str
            The bar's label (drawn upwards beside it).
        label_pt : float, optional
            Its font size [pt].
        """
        w = self.x1 - self.x0
        self.colourbar = (scale, label, label_pt, self.x0 + 0.85 * w)
        self.x1 = self.x0 + 0.80 * w

    # -- drawing ---------------------------------------------------------

    def _limits(self, which):
        vals = []
        for it in self.items:
            if which == "x" and it[0] in ("line", "band", "vlines"):
                vals.append(it[1])
            elif which == "y" and it[0] == "line":
                vals.append(it[2])
            elif which == "y" and it[0] in ("band", "vlines"):
                vals.extend([it[2], it[3]])
        v = np.concatenate(vals) if vals else np.array([0.0, 1.0])
        log = self.xlog if which == "x" else self.ylog
        v = v[np.isfinite(v) & (v > 0)] if log else v[np.isfinite(v)]
        if v.size == 0:
            return (1.0, 10.0) if log else (0.0, 1.0)
        lo, hi = float(v.min()), float(v.max())
        if log:
            a, b = math.log10(lo), math.log10(hi)
            if b - a < 1e-12:
                a, b = a - 0.5, b + 0.5
            m = 0.05 * (b - a)
            return 10.0 ** (a - m), 10.0 ** (b + m)
        if hi - lo < 1e-12 * max(abs(lo), abs(hi), 1.0):
            d = 0.05 * abs(lo) or 0.05
            return lo - d, hi + d
        m = 0.05 * (hi - lo)
        return lo - m, hi + m

    def _mapper(self, lim, log, p0, p1):
        a, b = (math.log10(lim[0]), math.log10(lim[1])) if log else lim

        def f(v):
            v = np.asarray(v, float)
            if log:
                with np.errstate(divide="ignore", invalid="ignore"):
                    v = np.log10(v)
            return p0 + (v - a) / (b - a) * (p1 - p0)
        return f

    def _ticks(self, lim, log, length_px, along_x):
        """Major ticks, their labels and minor ticks of one axis."""
        if log:
            a, b = math.log10(lim[0]), math.log10(lim[1])
            decades = np.arange(math.ceil(a - 1e-9), math.floor(b + 1e-9) + 1)
            stride = max(1, math.ceil(len(decades) / 8))
            major = 10.0 ** decades[::stride]
            minor = [m * 10.0 ** d for d in range(math.floor(a), math.ceil(b) + 1) for m in (2.0, 5.0)]
            minor = [m for m in minor if lim[0] <= m <= lim[1]]
            if len(major) < 2:  # less than two decades labelled: label the 2s and 5s too
                major = np.array(sorted(list(major) + minor))
                minor = []
            return major, [f"{v:g}" for v in major], np.array(minor)
        space = length_px / _K / (self.tick_pt * (3.0 if along_x else 2.0))
        major = nice_ticks(lim[0], lim[1], int(max(1, min(space, 9))))
        return major, tick_labels(major), np.array([])

    def render(self):
        """Draw everything collected (grid first, then the data, the frame, ticks, labels, legend)."""
        d = self.fig.draw
        x0, y0, x1, y1 = self.x0, self.y0, self.x1, self.y1
        xlim = self.xlim or self._limits("x")
        ylim = self.ylim or self._limits("y")
        X = self._mapper(xlim, self.xlog, x0, x1)
        Y = self._mapper(ylim, self.ylog, y1, y0)
        if self.xticks is not None:
            xmaj, xlab = np.asarray(self.xticks[0], float), self.xticks[1]
            xmin = np.array([])
        else:
            xmaj, xlab, xmin = self._ticks(xlim, self.xlog, x1 - x0, True)
        ymaj, ylab, ymin = self._ticks(ylim, self.ylog, y1 - y0, False)
        lw_frame = max(1, int(round(0.8 * _K)))
        if self.grid_colour:
            for px in X(xmaj):
                d.line([(px, y0), (px, y1)], fill=self.grid_colour, width=lw_frame)
            for py in Y(ymaj):
                d.line([(x0, py), (x1, py)], fill=self.grid_colour, width=lw_frame)
        legend = []
        for it in self.items:
            kind = it[0]
            if kind == "mesh":
                self._draw_mesh(it, X, Y)
            elif kind == "band":
                _, x, lo, hi, colour, alpha = it
                fill = _rgb(colour) + (int(round(255 * alpha)),)
                for s in _runs(np.isfinite(x) & np.isfinite(Y(lo)) & np.isfinite(Y(hi))):
                    xs = X(x[s])
                    pts = list(zip(xs, Y(hi[s]))) + list(zip(xs[::-1], Y(lo[s])[::-1]))
                    if len(pts) >= 3:
                        d.polygon(pts, fill=fill)
            elif kind == "vlines":
                _, x, lo, hi, colour, lw, alpha = it
                fill = _rgb(colour) + (int(round(255 * alpha)),)
                for px, a, b in zip(X(x), Y(lo), Y(hi)):
                    if np.isfinite(a) and np.isfinite(b):
                        d.line([(px, a), (px, b)], fill=fill, width=max(1, int(round(lw * _K))))
            elif kind == "axvline":
                _, x, colour, lw = it
                px = float(X(x))
                d.line([(px, y0), (px, y1)], fill=colour, width=max(1, int(round(lw * _K))))
        for it in self.items:
            if it[0] != "line":
                continue
            _, x, y, colour, lw, marker, ms, label = it
            px, py = X(x), Y(y)
            ok = np.isfinite(px) & np.isfinite(py)
            w = int(round(lw * _K))
            if w > 0:
                for s in _runs(ok):
                    if s.stop - s.start >= 2:
                        d.line(list(zip(px[s], py[s])), fill=colour, width=w, joint="curve")
            if marker:
                r = ms * _K / 2.0
                for a, b in zip(px[ok], py[ok]):
                    d.ellipse([a - r, b - r, a + r, b + r], fill=colour)
            if label:
                legend.append((label, colour, w, marker, ms))
        d.rectangle([x0, y0, x1, y1], outline=FRAME, width=lw_frame)
        tick = 3.5 * _K
        fig = self.fig
        pad = 3.5 * _K
        for px, lab in zip(X(xmaj), xlab):
            d.line([(px, y1), (px, y1 + tick)], fill=FRAME, width=lw_frame)
            if self.xticks is not None and self.xticks[2]:
                fig.text(px, y1 + tick + pad, lab, self.xticks[3], anchor="rt", angle=self.xticks[2])
            else:
                fig.text(px, y1 + tick + pad, lab, self.xticks[3] if self.xticks else self.tick_pt, anchor="mt")
        for px in X(xmin):
            d.line([(px, y1), (px, y1 + tick * 0.57)], fill=FRAME, width=lw_frame)
        widest = 0.0
        for py, lab in zip(Y(ymaj), ylab):
            d.line([(x0 - tick, py), (x0, py)], fill=FRAME, width=lw_frame)
            fig.text(x0 - tick - pad, py, lab, self.tick_pt, anchor="rm")
            widest = max(widest, font(self.tick_pt).getlength(lab))
        for py in Y(ymin):
            d.line([(x0 - tick * 0.57, py), (x0, py)], fill=FRAME, width=lw_frame)
        if self.xlabel:
            below = y1 + tick + pad + font(self.tick_pt).size * 1.2 + pad
            if self.xticks is not None and self.xticks[2]:
                below += font(self.xticks[3]).size * 1.5
            fig.text((x0 + x1) / 2, below, self.xlabel, self.xlabel_pt, anchor="mt")
        if self.ylabel:
            fig.text(x0 - tick - pad - widest - pad, (y0 + y1) / 2, self.ylabel, self.ylabel_pt, anchor="rm",
                     angle=90)
        if self.colourbar:
            self._draw_colour_bar()
        if legend and self.legend_pt:
            drawn = [(X(it[1]), Y(it[2])) for it in self.items if it[0] == "line"]
            drawn += [(X(it[1]), Y(it[k])) for it in self.items if it[0] == "band" for k in (2, 3)]
            self._draw_legend(legend, drawn)

    def _draw_mesh(self, it, X, Y):
        _, xe, ye, v, vmin, vmax, log = it
        ix0, iy0, ix1, iy1 = (int(round(c)) for c in (self.x0, self.y0, self.x1, self.y1))
        w, h = ix1 - ix0, iy1 - iy0
        # the cell under each pixel centre
        px = ix0 + np.arange(w) + 0.5
        py = iy0 + np.arange(h) + 0.5
        ci = np.searchsorted(X(xe), px) - 1
        yp = Y(ye)  # descending in pixels
        cj = len(ye) - 1 - np.searchsorted(yp[::-1], py)
        ci = np.clip(ci, 0, v.shape[1] - 1)
        cj = np.clip(cj, 0, v.shape[0] - 1)
        cells = v[cj[:, None], ci[None, :]]
        idx = _normalise(cells, vmin, vmax, log)
        rgb = _lut()[np.clip((idx * 255).round(), 0, 255).astype(np.intp)]
        rgb[~np.isfinite(cells)] = 255
        self.fig.image.paste(Image.fromarray(rgb.astype(np.uint8), "RGB"), (ix0, iy0))

    def _draw_colour_bar(self):
        (vmin, vmax, log), label, label_pt, left = self.colourbar
        d, fig = self.fig.draw, self.fig
        y0, y1 = self.y0, self.y1
        width = (y1 - y0) / 20.0
        x0, x1 = left, left + width
        h = int(round(y1 - y0))
        s = np.linspace(1.0, 0.0, h)[:, None]
        rgb = _lut()[np.clip((s * 255).round(), 0, 255).astype(np.intp)]
        strip = np.repeat(rgb, max(1, int(round(width))), axis=1)
        fig.image.paste(Image.fromarray(strip.astype(np.uint8), "RGB"), (int(round(x0)), int(round(y0))))
        lw_frame = max(1, int(round(0.8 * _K)))
        d.rectangle([x0, y0, x1, y1], outline=FRAME, width=lw_frame)
        lim = (vmin, vmax) if vmax > vmin else (vmin - 0.5, vmax + 0.5)
        if log and vmin > 0:
            major, labels, minor = self._ticks(lim, True, y1 - y0, False)
        else:
            log = False
            major, labels, minor = self._ticks(lim, False, y1 - y0, False)
        Y = self._mapper(lim, log, y1, y0)
        tick = 3.5 * _K
        pad = 3.5 * _K
        widest = 0.0
        for py, lab in zip(Y(major), labels):
            d.line([(x1, py), (x1 + tick, py)], fill=FRAME, width=lw_frame)
            fig.text(x1 + tick + pad, py, lab, self.tick_pt, anchor="lm")
            widest = max(widest, font(self.tick_pt).getlength(lab))
        for py in Y(minor):
            d.line([(x1, py), (x1 + tick * 0.57, py)], fill=FRAME, width=lw_frame)
        fig.text(x1 + tick + pad + widest + pad, (y0 + y1) / 2, label, label_pt, anchor="lm", angle=90)

    def _draw_legend(self, entries, lines):
        d, fig = self.fig.draw, self.fig
        f = font(self.legend_pt)
        pad = 0.5 * f.size
        handle = 2.0 * f.size
        row = 1.3 * f.size
        width = handle + 3 * pad + max(f.getlength(e[0]) for e in entries)
        height = len(entries) * row + pad
        inset = 0.5 * f.size
        corners = [(self.x1 - inset - width, self.y0 + inset), (self.x0 + inset, self.y0 + inset),
                   (self.x0 + inset, self.y1 - inset - height), (self.x1 - inset - width, self.y1 - inset - height)]

        def covered(c):  # line and band vertices under the legend: the emptiest corner wins
            n = 0
            for px, py in lines:
                n += int(np.count_nonzero((px >= c[0]) & (px <= c[0] + width) & (py >= c[1]) & (py <= c[1] + height)))
            return n

        lx, ly = min(corners, key=covered)
        d.rectangle([lx, ly, lx + width, ly + height], fill=(255, 255, 255, 204), outline="#cccccc",
                    width=max(1, int(round(0.8 * _K))))
        for k, (label, colour, w, marker, ms) in enumerate(entries):
            cy = ly + pad / 2 + (k + 0.5) * row
            if w > 0:
                d.line([(lx + pad, cy), (lx + pad + handle, cy)], fill=colour, width=w)
            if marker:
                r = ms * _K / 2.0
                cx = lx + pad + handle / 2
                d.ellipse([cx - r, cy - r, cx + r, cy + r], fill=colour)
            fig.text(lx + 2 * pad + handle, cy, label, self.legend_pt, anchor="lm")


def _normalise(v, vmin, vmax, log):
    with np.errstate(divide="ignore", invalid="ignore"):
        if log and vmin > 0:
            a, b = math.log10(vmin), math.log10(vmax)
            return (np.log10(v) - a) / (b - a) if b > a else np.zeros_like(v)
        return (v - vmin) / (vmax - vmin) if vmax > vmin else np.zeros_like(v)


def _runs(ok):
    """Slices of consecutive True values."""
    ok = np.asarray(ok, bool)
    edges = np.flatnonzero(np.diff(np.r_[False, ok, False].astype(np.int8)))
    return [slice(a, b) for a, b in zip(edges[::2], edges[1::2])]
