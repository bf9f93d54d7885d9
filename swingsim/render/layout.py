"""Where every part of a video frame goes, computed from the frame size alone.

Pure Python: no pyvista, so the layout is checked without rendering.  The frame
is cut into bands that never overlap, and the 3D views get only what is left:

- the **title bar** across the top: the scene's title on the left, the clock on
  the right;
- in a split picture, a **tag strip** under it naming each view above its half;
- the **side panel** on the right: the readout (numbers), the notes (events,
  zone states, an early stop) and the legend of what the colours mean;
- the **caution band** across the bottom, below the views (never over them);
- the **views**, side by side in what remains, with the divider between them
  running only from the tag strip down to the caution band.

Text sizes are shares of the frame height with a floor in pixels, so a
640x360 frame projected on a cabin wall is still readable and a 1920x1080 one
is not cluttered.  Line capacities come from a conservative estimate of the
fonts' average character widths (VTK's built-in Arial and Courier).
"""

from __future__ import annotations

import textwrap
from dataclasses import dataclass, field

#: Average advance of a character over the font size (VTK's built-in fonts): Courier is
#: monospaced at 0.6 em; 0.56 em bounds Arial on mixed-case English text (measured on
#: the caution and zone lines with ``vtkTextRenderer``; ordinary text averages nearer 0.5),
#: and 0.62 em bold Arial.
CHAR_EM = {"sans": 0.56, "bold": 0.62, "mono": 0.6}
#: Line height over the font size.
LINE_EM = 1.25

#: Text sizes: share of the frame height, and the floor [px] that keeps it readable
#: on a projector at 640x360 (a rule of our own: about 12 px lines at 360 rows).
FONTS = {
    "title": (0.046, 14), "clock": (0.040, 13), "tag": (0.034, 12), "panel": (0.030, 12),
    "notes": (0.030, 12), "legend": (0.028, 11), "caution": (0.031, 12), "label": (0.026, 11),
}

#: The smallest frame whose words keep their floor sizes [px].
MIN_LEGIBLE = (640, 360)

#: Characters a readout row holds: label (11), value (7), a space and the unit (3).
READOUT_CHARS = 22


@dataclass(frozen=True)
class Box:
    """A rectangle of the frame in pixels: columns x0..x1, rows y0..y1 from the top (ends exclusive)."""

    x0: float
    y0: float
    x1: float
    y1: float

    @property
    def width(self) -> float:
        """Width [px]."""
        return self.x1 - self.x0

    @property
    def height(self) -> float:
        """Height [px]."""
        return self.y1 - self.y0

    def intersects(self, other: "Box") -> bool:
        """Whether the two rectangles share any area (touching edges do not count).

        Parameters
        ----------
        other : Box
            The other rectangle [px].

        Returns
        -------
        bool
            True when their interiors overlap.
        """
        return self.x0 < other.x1 and other.x0 < self.x1 and self.y0 < other.y1 and other.y0 < self.y1

    def contains(self, col: float, row: float) -> bool:
        """Whether a pixel position lies inside.

        Parameters
        ----------
        col, row : float
            Column and row from the top [px].

        Returns
        -------
        bool
            True inside or on the edge.
        """
        return self.x0 <= col <= self.x1 and self.y0 <= row <= self.y1

    def inside(self, other: "Box") -> bool:
        """Whether this rectangle lies wholly within ``other``.

        Parameters
        ----------
        other : Box
            The enclosing rectangle [px].

        Returns
        -------
        bool
            True when no part sticks out.
        """
        return (self.x0 >= other.x0 and self.x1 <= other.x1 and self.y0 >= other.y0
                and self.y1 <= other.y1)

    def viewport(self, size) -> tuple:
        """The rectangle as a VTK viewport (x and y from 0 to 1, y up).

        Parameters
        ----------
        size : (int, int)
            Frame width and height [px].

        Returns
        -------
        tuple of float
            (xmin, ymin, xmax, ymax).
        """
        w, h = size
        return (self.x0 / w, 1.0 - self.y1 / h, self.x1 / w, 1.0 - self.y0 / h)


def font_px(role: str, height: int, width: int | None = None) -> int:
    """The text size of a role at a frame size.

    The floor holds from 640x360 up; a smaller frame (a thumbnail) scales it down
    with the frame, so the bands still leave room for the picture.

    Parameters
    ----------
    role : str
        A key of :data:`FONTS`.
    height : int
        Frame height [px].
    width : int, optional
        Frame width [px] (the height's 16:9 width when not given).

    Returns
    -------
    int
        Font size [px] (at least 4).
    """
    share, floor = FONTS[role]
    w = 16 * height / 9 if width is None else width
    small = min(1.0, height / MIN_LEGIBLE[1], w / MIN_LEGIBLE[0])
    return max(4, int(round(floor * small)), int(round(share * height)))


def chars_per_line(width_px: float, font: int, family: str = "sans") -> int:
    """How many characters a line of ``width_px`` holds at a font size.

    Parameters
    ----------
    width_px : float
        Width available [px].
    font : int
        Font size [px].
    family : {"sans", "bold", "mono"}
        The font.

    Returns
    -------
    int
        Characters (at least 8).
    """
    return max(8, int(width_px / (CHAR_EM[family] * font)))


def text_width_px(text: str, font: int, family: str = "sans") -> float:
    """Estimated width of the longest line of ``text`` [px].

    Parameters
    ----------
    text : str
        One or more lines.
    font : int
        Font size [px].
    family : {"sans", "bold", "mono"}
        The font.

    Returns
    -------
    float
        Width [px].
    """
    return max((len(line) for line in text.split("\n")), default=0) * CHAR_EM[family] * font


def wrap(text: str, chars: int) -> str:
    """``text`` wrapped to lines of at most ``chars`` characters.

    Parameters
    ----------
    text : str
        The text.
    chars : int
        Longest line [characters].

    Returns
    -------
    str
        The lines joined by newlines.
    """
    return "\n".join(textwrap.wrap(text, chars, break_long_words=True))


def fit_lines(text: str, chars: int, max_lines: int) -> str:
    """Each line of ``text`` wrapped to ``chars``; whole entries kept from the first while they fit.

    The first entries are the most important (the caller orders them: an early stop,
    then zones, then events); an entry that does not fit whole is left out.

    Parameters
    ----------
    text : str
        Entries, one a line.
    chars : int
        Longest line [characters].
    max_lines : int
        Most lines kept.

    Returns
    -------
    str
        The wrapped entries that fit.
    """
    lines = []
    for entry in text.split("\n"):
        if not entry:
            continue
        wrapped = textwrap.wrap(entry, chars, subsequent_indent="  ", break_long_words=True)
        if len(lines) + len(wrapped) > max_lines:
            continue
        lines += wrapped
    return "\n".join(lines)


@dataclass(frozen=True)
class Layout:
    """The frame's boxes [px] and text sizes.

    ``views`` are the 3D viewports; every other box carries 2D words or marks and
    lies outside all of them.
    """

    size: tuple
    fonts: dict
    title: Box
    clock: Box
    views: tuple
    tags: tuple
    dividers: tuple
    panel: Box
    notes: Box
    legend: Box
    caution: Box
    caution_lines: int
    notes_lines: int
    text_boxes: dict = field(default_factory=dict)

    def overlay_boxes(self) -> dict:
        """Every box that carries 2D words or marks, by name.

        Returns
        -------
        dict
            Name -> :class:`Box`: title, clock, tag_1..., divider_1..., panel, notes, legend, caution.
        """
        out = {"title": self.title, "clock": self.clock, "panel": self.panel, "notes": self.notes,
               "legend": self.legend, "caution": self.caution}
        out.update({f"tag_{i + 1}": b for i, b in enumerate(self.tags)})
        out.update({f"divider_{i + 1}": b for i, b in enumerate(self.dividers)})
        return out


def compute_layout(size, n_views: int, caution_text: str, readout_rows: int, legend_rows: int = 4,
                   clock_sample: str = "t = 000.00 s") -> Layout:
    """The layout of a frame of ``size`` with ``n_views`` views side by side.

    Parameters
    ----------
    size : (int, int)
        Frame width and height [px].
    n_views : int
        One view, or two for a split picture.
    caution_text : str
        The longest caution the band must hold (it sets the band's height).
    readout_rows : int
        Rows of the readout panel.
    legend_rows : int
        Entries of the legend.
    clock_sample : str
        The widest clock text of the video (the title gets the rest of the bar; :func:`fit_title`).

    Returns
    -------
    Layout
        Boxes that never overlap, and the text sizes [px].
    """
    w, h = (int(v) for v in size)
    f = {role: font_px(role, h, w) for role in FONTS}
    pad = max(3, int(round(0.008 * h)))
    # title bar
    bar_h = int(round(max(f["title"], f["clock"]) * LINE_EM + 2 * pad))
    clock_w = text_width_px(clock_sample, f["clock"], "mono") + 2 * pad
    clock_w = int(round(min(clock_w, 0.45 * w)))
    title_box = Box(0, 0, w - clock_w, bar_h)
    clock_box = Box(w - clock_w, 0, w, bar_h)
    # caution band: as many lines as the longest caution needs at its size
    cau_chars = chars_per_line(w - 2 * pad, f["caution"])
    cau_lines = max(1, len(textwrap.wrap(caution_text, cau_chars)))
    band_h = int(round(cau_lines * f["caution"] * LINE_EM + 2 * pad))
    caution = Box(0, h - band_h, w, h)
    # side panel: readout rows of READOUT_CHARS monospaced characters
    side_w = int(round(READOUT_CHARS * CHAR_EM["mono"] * f["panel"] + 2 * pad))
    side_w = min(side_w, int(0.4 * w))
    sx0 = w - side_w
    top, bottom = bar_h, h - band_h
    panel_h = int(round(readout_rows * f["panel"] * LINE_EM + 2 * pad))
    legend_h = int(round(legend_rows * f["legend"] * LINE_EM + 2 * pad))
    panel = Box(sx0, top, w, min(bottom, top + panel_h))
    legend = Box(sx0, max(panel.y1, bottom - legend_h), w, bottom)
    notes = Box(sx0, panel.y1, w, legend.y0)
    notes_lines = max(0, int((notes.height - 2 * pad) // (f["notes"] * LINE_EM)))
    # views: what is left on the left, split into columns with a divider between them
    tags = ()
    vtop = top
    if n_views > 1:
        tag_h = int(round(f["tag"] * LINE_EM + 2 * pad))
        vtop = top + tag_h
    div = max(2, int(round(0.004 * w))) if n_views > 1 else 0
    col_w = (sx0 - div * (n_views - 1)) / n_views
    views, dividers, tag_boxes = [], [], []
    for i in range(n_views):
        x0 = i * (col_w + div)
        views.append(Box(round(x0), vtop, round(x0 + col_w), bottom))
        if n_views > 1:
            tag_boxes.append(Box(round(x0), top, round(x0 + col_w), vtop))
        if i < n_views - 1:
            dividers.append(Box(round(x0 + col_w), top, round(x0 + col_w + div), bottom))
    tags = tuple(tag_boxes)
    return Layout(size=(w, h), fonts=f, title=title_box, clock=clock_box, views=tuple(views), tags=tags,
                  dividers=tuple(dividers), panel=panel, notes=notes, legend=legend, caution=caution,
                  caution_lines=cau_lines, notes_lines=notes_lines, text_boxes={"pad": pad})


def fit_title(title: str, layout: Layout) -> str:
    """The title cut to the width of the title bar (with an ellipsis when cut).

    Parameters
    ----------
    title : str
        The scene's title.
    layout : Layout
        The frame's layout.

    Returns
    -------
    str
        One line that fits.
    """
    pad = layout.text_boxes["pad"]
    chars = chars_per_line(layout.title.width - 2 * pad, layout.fonts["title"], "bold")
    one = " ".join(title.split())
    return one if len(one) <= chars else one[:chars - 3].rstrip() + "..."
