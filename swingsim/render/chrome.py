"""The frame's 2D layer drawn with numpy: bands, words and labels composited onto the 3D picture.

VTK draws only the 3D views.  Everything around them (title bar, tag strip,
side panel, legend, caution band) is one picture made once per render; a
changing text (clock, readout, notes, caution) is rasterised once per distinct
string by VTK's FreeType text renderer and kept as its whole box, ready to
copy; labels are small RGBA images blended where the camera puts them.  Per
frame this is a few array copies instead of re-drawing text actors in OpenGL,
which cost software rendering more than the 3D scene itself.
"""

from __future__ import annotations

import numpy as np
# the few VTK modules used, not the whole ``vtk`` package (importing it costs ~0.5 s a render)
import vtkmodules.vtkRenderingFreeType  # noqa: F401  (registers the FreeType text renderer)
from vtkmodules.util.numpy_support import vtk_to_numpy
from vtkmodules.vtkCommonDataModel import vtkImageData
from vtkmodules.vtkRenderingCore import vtkTextProperty, vtkTextRenderer

from swingsim.render import layout as layout_mod
from swingsim.render.palette import rgb

#: Distinct strings kept per changing text (the clock changes every frame).
CACHE_PER_KEY = 48


def rasterise(text: str, font_px: int, colour: str, *, bold=False, mono=False, align="left",
              background: str | None = None, background_opacity: float = 0.0) -> np.ndarray:
    """A text as an RGBA image (rows from the top), as VTK's FreeType renderer draws it.

    Parameters
    ----------
    text : str
        One or more lines.
    font_px : int
        Font size [px] (72 dpi: points are pixels).
    colour : str
        ``#rrggbb``.
    bold, mono : bool
        Bold; Courier instead of Arial.
    align : {"left", "center", "right"}
        Alignment of the lines.
    background : str, optional
        A panel behind the text, ``#rrggbb``.
    background_opacity : float
        Its opacity [0-1].

    Returns
    -------
    numpy.ndarray
        (rows, columns, 4) uint8; (0, 0, 4) for an empty text.
    """
    if not text:
        return np.zeros((0, 0, 4), dtype=np.uint8)
    tp = vtkTextProperty()
    tp.SetFontSize(int(font_px))
    tp.SetColor(*rgb(colour))
    tp.SetBold(bool(bold))
    tp.SetFontFamilyToCourier() if mono else tp.SetFontFamilyToArial()
    tp.SetLineSpacing(1.0)
    {"left": tp.SetJustificationToLeft, "center": tp.SetJustificationToCentered,
     "right": tp.SetJustificationToRight}[align]()
    if background is not None:
        tp.SetBackgroundColor(*rgb(background))
        tp.SetBackgroundOpacity(float(background_opacity))
    img = vtkImageData()
    dims = [0, 0]
    vtkTextRenderer.GetInstance().RenderString(tp, text, img, dims, 72)
    nx, ny, _ = img.GetDimensions()
    a = vtk_to_numpy(img.GetPointData().GetScalars()).reshape(ny, nx, -1)
    return np.ascontiguousarray(a[:dims[1], :dims[0]][::-1])


def blend(target: np.ndarray, rgba: np.ndarray, col: int, row: int) -> tuple:
    """Blend an RGBA image onto ``target`` with its top-left corner at (col, row), clipped to ``target``.

    Parameters
    ----------
    target : numpy.ndarray
        (rows, columns, 3) uint8, changed in place.
    rgba : numpy.ndarray
        (rows, columns, 4) uint8.
    col, row : int
        Where its top-left corner goes [px].

    Returns
    -------
    tuple of int
        The rectangle drawn: (x0, y0, x1, y1) [px], empty when outside.
    """
    h, w = target.shape[:2]
    x0, y0 = max(0, col), max(0, row)
    x1, y1 = min(w, col + rgba.shape[1]), min(h, row + rgba.shape[0])
    if x1 <= x0 or y1 <= y0:
        return (x0, y0, x0, y0)
    src = rgba[y0 - row:y1 - row, x0 - col:x1 - col]
    a = src[..., 3:4].astype(np.uint16)
    region = target[y0:y1, x0:x1]
    # integer "over": (s a + d (255 - a)) / 255, rounded (x / 255 as (x + 128 + (x + 128) / 256) / 256)
    x = src[..., :3] * a + region * (255 - a) + 128
    region[:] = (x + (x >> 8)) >> 8
    return (x0, y0, x1, y1)


class Sticker:
    """An RGBA image prepared for fast repeated blending (alpha and premultiplied colour kept as float32).

    Parameters
    ----------
    rgba : numpy.ndarray
        (rows, columns, 4) uint8.
    """

    def __init__(self, rgba: np.ndarray):
        self.shape = rgba.shape
        self.alpha = rgba[..., 3:4].astype(np.float32) * (1.0 / 255.0)
        self.keep = 1.0 - self.alpha
        self.colour = rgba[..., :3].astype(np.float32) * self.alpha + 0.5

    def put(self, target: np.ndarray, col: int, row: int) -> None:
        """Blend onto ``target`` (in place) with the top-left corner at (col, row), clipped.

        Parameters
        ----------
        target : numpy.ndarray
            (rows, columns, 3) uint8.
        col, row : int
            Top-left corner [px].
        """
        h, w = target.shape[:2]
        x0, y0 = max(0, col), max(0, row)
        x1, y1 = min(w, col + self.shape[1]), min(h, row + self.shape[0])
        if x1 <= x0 or y1 <= y0:
            return
        sl = (slice(y0 - row, y1 - row), slice(x0 - col, x1 - col))
        region = target[y0:y1, x0:x1]
        region[:] = (region * self.keep[sl] + self.colour[sl]).astype(np.uint8)


def fill(target: np.ndarray, box, colour: str, k: int = 1) -> None:
    """Fill a layout box (output pixels, scaled by ``k``) with a colour.

    Parameters
    ----------
    target : numpy.ndarray
        (rows, columns, 3) uint8, changed in place.
    box : swingsim.render.layout.Box
        The rectangle [output px].
    colour : str
        ``#rrggbb``.
    k : int
        Drawn pixels per output pixel.
    """
    x0, y0, x1, y1 = (int(round(v * k)) for v in (box.x0, box.y0, box.x1, box.y1))
    target[y0:y1, x0:x1] = np.round(np.asarray(rgb(colour)) * 255).astype(np.uint8)


class Chrome:
    """The 2D layer of a frame: a static picture of the bands, and boxes of changing text over it.

    Parameters
    ----------
    layout : swingsim.render.layout.Layout
        The frame's boxes [output px].
    k : int
        Drawn pixels per output pixel (2 when supersampled).
    """

    def __init__(self, layout, k: int = 1):
        self.layout, self.k = layout, int(k)
        w, h = layout.size
        self.picture = np.zeros((h * self.k, w * self.k, 3), dtype=np.uint8)
        self._static = []  # (y0, y1, x0, x1) slices of the picture copied onto every frame
        self._boxes = {}  # changing text key -> (slice, anchor, font, colour, bold, mono, fill)
        self._cache = {}
        self._current = {}  # key -> the box image shown now
        self.extents = {}  # what was drawn: name -> layout.Box of the text [output px]

    def px(self, box) -> tuple:
        """A layout box in drawn pixels: (y0, y1, x0, x1).

        Parameters
        ----------
        box : swingsim.render.layout.Box
            The rectangle [output px].

        Returns
        -------
        tuple of int
            Row and column bounds [drawn px].
        """
        k = self.k
        return (int(round(box.y0 * k)), int(round(box.y1 * k)), int(round(box.x0 * k)), int(round(box.x1 * k)))

    def keep(self, box) -> None:
        """Copy this box of the static picture onto every frame.

        Parameters
        ----------
        box : swingsim.render.layout.Box
            A band's rectangle [output px].
        """
        self._static.append(self.px(box))

    def text(self, name: str, text: str, box, anchor: str, font: int, colour: str, *, bold=False,
             mono=False, pad: float = 0.0, target=None) -> None:
        """Draw a text into a box of the static picture (or of ``target``).

        Parameters
        ----------
        name : str
            Its name in :attr:`extents`.
        text : str
            The words.
        box : swingsim.render.layout.Box
            Its box [output px].
        anchor : {"l", "r", "c", "tl"}
            Left or right and centred vertically, centred, or from the top-left corner.
        font : int
            Font size [output px].
        colour : str
            ``#rrggbb``.
        bold, mono : bool
            Bold; monospaced.
        pad : float
            Inset from the box's sides [output px].
        target : numpy.ndarray, optional
            The picture to draw on (the box's own image, for changing texts).
        """
        k = self.k
        align = {"l": "left", "tl": "left", "r": "right", "c": "center"}[anchor]
        img = rasterise(text, font * k, colour, bold=bold, mono=mono, align=align)
        y0, y1, x0, x1 = self.px(box)
        if target is None:
            target, oy, ox = self.picture, 0, 0
        else:
            oy, ox = y0, x0
        th, tw = img.shape[:2]
        p = int(round(pad * k))
        if anchor == "tl":
            col, row = x0 + p, y0 + p
        else:
            row = (y0 + y1 - th) // 2
            col = {"l": x0 + p, "r": x1 - p - tw, "c": (x0 + x1 - tw) // 2}[anchor]
        # never outside the box: clip to it
        sub = target[y0 - oy:y1 - oy, x0 - ox:x1 - ox]
        d = blend(sub, img, col - x0, row - y0)
        self.extents[name] = layout_mod.Box((d[0] + x0) / k, (d[1] + y0) / k, (d[2] + x0) / k, (d[3] + y0) / k)
        if img.size and (d[2] - d[0] < tw or d[3] - d[1] < th):
            self.extents[name + ":cut"] = layout_mod.Box(col / k, row / k, (col + tw) / k, (row + th) / k)

    def changing(self, key: str, box, anchor: str, font: int, colour: str, *, bold=False, mono=False,
                 pad: float = 0.0) -> None:
        """Declare a box whose text changes from frame to frame (set with :meth:`set`).

        Parameters
        ----------
        key : str
            Its name.
        box : swingsim.render.layout.Box
            Its box [output px]; the box is redrawn whole.
        anchor, font, colour, bold, mono, pad
            As for :meth:`text`.
        """
        self._boxes[key] = (box, anchor, font, colour, bold, mono, pad)
        self._cache[key] = {}
        self.set(key, "")

    def set(self, key: str, text: str, background=None) -> None:
        """Show ``text`` in a changing box (rasterised once per distinct string and background).

        Parameters
        ----------
        key : str
            The box (:meth:`changing`).
        text : str
            Its words.
        background : str, optional
            Fill the box with this colour first (``#rrggbb``); else the static picture shows through.
        """
        cache = self._cache[key]
        entry = cache.get((text, background))
        if entry is None:
            box, anchor, font, colour, bold, mono, pad = self._boxes[key]
            y0, y1, x0, x1 = self.px(box)
            img = self.picture[y0:y1, x0:x1].copy()
            if background is not None:
                img[:] = np.round(np.asarray(rgb(background)) * 255).astype(np.uint8)
            self.text(key, text, box, anchor, font, colour, bold=bold, mono=mono, pad=pad, target=img)
            if len(cache) >= CACHE_PER_KEY:
                cache.clear()
            entry = (img, self.extents.get(key), self.extents.pop(key + ":cut", None))
            cache[(text, background)] = entry
        self._current[key] = entry[0]
        if text:
            self.extents[key] = entry[1]
        else:
            self.extents.pop(key, None)
        if entry[2] is not None:
            self.extents[key + ":cut"] = entry[2]
        else:
            self.extents.pop(key + ":cut", None)

    def frame_with(self, rendered: np.ndarray, rect: tuple) -> np.ndarray:
        """A new frame: the static picture with a rendered rectangle put in and the current texts on.

        The same pixels as :meth:`apply` on a whole rendered frame whose pixels outside
        ``rect`` all lie under the static bands (what :meth:`uncovered` checks), with
        only ``rect`` read back from OpenGL.

        Parameters
        ----------
        rendered : numpy.ndarray
            (rows, columns, 3) uint8 of the rectangle, rows from the top (may be a view).
        rect : tuple of int
            (y0, y1, x0, x1) of the rectangle in the frame [drawn px].

        Returns
        -------
        numpy.ndarray
            (rows, columns, 3) uint8 at the drawn size, a new array.
        """
        frame = self.picture.copy()
        ry0, ry1, rx0, rx1 = rect
        frame[ry0:ry1, rx0:rx1] = rendered
        for y0, y1, x0, x1 in self._static:  # the bands inside the rectangle (a split's divider)
            if y0 < ry1 and ry0 < y1 and x0 < rx1 and rx0 < x1:
                frame[y0:y1, x0:x1] = self.picture[y0:y1, x0:x1]
        for key, img in self._current.items():
            y0, y1, x0, x1 = self.px(self._boxes[key][0])
            frame[y0:y1, x0:x1] = img
        return frame

    def uncovered(self) -> np.ndarray:
        """Where the static bands do not cover the frame (there the 3D views show).

        Returns
        -------
        numpy.ndarray
            (rows, columns) bool at the drawn size.
        """
        mask = np.ones(self.picture.shape[:2], dtype=bool)
        for y0, y1, x0, x1 in self._static:
            mask[y0:y1, x0:x1] = False
        return mask

    def apply(self, frame: np.ndarray) -> np.ndarray:
        """Put the bands and the current texts onto a rendered frame (in place).

        Parameters
        ----------
        frame : numpy.ndarray
            (rows, columns, 3) uint8 at the drawn size, rows from the top.

        Returns
        -------
        numpy.ndarray
            ``frame``.
        """
        for y0, y1, x0, x1 in self._static:
            frame[y0:y1, x0:x1] = self.picture[y0:y1, x0:x1]
        for key, img in self._current.items():
            y0, y1, x0, x1 = self.px(self._boxes[key][0])
            frame[y0:y1, x0:x1] = img
        return frame
