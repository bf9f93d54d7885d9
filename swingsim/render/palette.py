"""The video's look: the project's own plain palette and how each material is drawn.

Light sky, sand ground, slate crane, signal-orange load; the hook block and a
spreader beam share the hook's yellow.  Pure numpy: the texture images are
coloured here from the class images of :mod:`swingsim.scene3d.ground`.
"""

from __future__ import annotations

import numpy as np

from swingsim.scene3d import ground

PALETTE = {
    "sky": "#dfe7ec",
    "ground": "#d8d2c2", "grid_minor": "#c3bba6", "grid_major": "#8f8672",
    "crane": "#3f5d7d", "crane_dark": "#2a3f56", "trolley": "#1f2d3d",
    "rope": "#202020", "hook": "#f2c14e", "sling": "#2e7d32",
    "load": "#f26b1d", "shadow": "#3b3528", "envelope": "#5fa8d3", "trail": "#7b2cbf",
    "obstacle": "#6c757d", "exclusion": "#c1121f", "warn": "#d62828", "near": "#f4a100",
    # -- no-go (exclusion) zones: red and white stripes, as site barriers are marked --
    "nogo_red": "#d00000", "nogo_white": "#ffffff",
    "axis_x": "#9d0208", "axis_y": "#1b4332", "text": "#111111", "panel": "#ffffff",
    "banner": "#ffd23f",
    # -- the bands around the views: title bar, side panel, caution band; labels on a light panel --
    "bar": "#1f2d3d", "bar_light": "#c9d3dc", "bar_text": "#ffffff", "rule": "#8a97a5",
    "caution_band": "#fff3b0", "label_bg": "#ffffff",
    "label_grid": "#3d372b", "label_obstacle": "#2b3035", "label_exclusion": "#9b0000",
    # -- site bearings: the north arrow and the wind arrow on the ground --
    "north": "#111111", "wind": "#0b6e99",
    # -- tag lines (and the person holding each) while the pull is well within what one can hold;
    #    near the limit they turn "near", over it "warn" -- and the load's corners bearing on the ground --
    "tag_line": "#0f8b8d", "contact": "#c2185b",
}

#: How each material of :class:`swingsim.scene3d.Body` is drawn: its palette colour, opacity,
#: lighting (ambient and diffuse shares, or unlit) and the width of its lines [px].
_PLAIN = dict(opacity=1.0, ambient=0.25, diffuse=0.8, lighting=True, line_width=2)
STYLE = {
    "crane": dict(_PLAIN, colour="crane"),
    "crane_dark": dict(_PLAIN, colour="crane_dark"),
    "trolley": dict(_PLAIN, colour="trolley"),
    "axis_x": dict(_PLAIN, colour="axis_x", lighting=False),
    "axis_y": dict(_PLAIN, colour="axis_y", lighting=False),
    "obstacle": dict(_PLAIN, colour="obstacle", opacity=0.5),
    "exclusion": dict(_PLAIN, colour="exclusion", opacity=0.25, line_width=3),
    "rope": dict(_PLAIN, colour="rope", ambient=0.4),
    "sling": dict(_PLAIN, colour="sling", ambient=0.4),
    "hook": dict(_PLAIN, colour="hook", ambient=0.4),
    "spreader": dict(_PLAIN, colour="hook", ambient=0.4, line_width=3),
    "load": dict(_PLAIN, colour="load", ambient=0.45, diffuse=0.7),
    "shadow": dict(_PLAIN, colour="shadow", opacity=0.35, lighting=False),
    "tag_line": dict(_PLAIN, colour="tag_line", ambient=0.5),
    "person": dict(_PLAIN, colour="tag_line", ambient=0.5),
    "contact": dict(_PLAIN, colour="contact", lighting=False),
}
#: Share of a tag line's ``max_pull_N`` from which its pull shows amber (our own rule: a warning
#: before the pull is more than the person can hold) [-].
TAG_LINE_NEAR_SHARE = 0.8
#: Palette colour of a tag line (and its person) by the state of its pull.
TAG_LINE_COLOUR = {"slack": "tag_line", "held": "tag_line", "near": "near", "over": "warn"}


def tag_line_state(pull_N, max_pull_N: float):
    """How a tag line's pull stands against what one person can hold.

    Parameters
    ----------
    pull_N : float or array_like
        The line's tension [N].
    max_pull_N : float
        What one person can hold (``[[tag_lines]] max_pull_N``) [N].

    Returns
    -------
    str or numpy.ndarray of str
        "slack" (no pull), "held" (below :data:`TAG_LINE_NEAR_SHARE` of the limit),
        "near" (from there up to the limit) or "over" (above the limit: the person
        must let go); an array for an array of pulls.
    """
    p = np.asarray(pull_N, dtype=float)
    out = np.select([p > max_pull_N, p >= TAG_LINE_NEAR_SHARE * max_pull_N, p > 0.0],
                    ["over", "near", "held"], "slack")
    return str(out) if out.ndim == 0 else out
#: Labels: palette colour, height as a share of the frame's height, bold.
LABEL_STYLE = {
    "grid": ("label_grid", 0.026, False),
    "axis_x": ("axis_x", 0.028, True),
    "axis_y": ("axis_y", 0.028, True),
    "obstacle": ("label_obstacle", 0.027, True),
    "exclusion": ("label_exclusion", 0.027, True),
}
#: Period of the no-go stripes along x + y + z [m], as a share of the zone's largest side,
#: kept between these bounds so a stripe reads at site scale.
NOGO_STRIPE_SHARE, NOGO_STRIPE_MIN_M, NOGO_STRIPE_MAX_M = 0.125, 0.6, 3.0
#: Opacity of the no-go stripes: red, white [0-255].
NOGO_ALPHA = (170, 120)


def nogo_image() -> np.ndarray:
    """The no-go stripe texture: one red and one white texel, translucent (repeated along the zone).

    Returns
    -------
    numpy.ndarray
        (1, 2, 4) uint8 RGBA.
    """
    out = np.zeros((1, 2, 4), dtype=np.uint8)
    out[0, 0, :3] = np.asarray(rgb(PALETTE["nogo_red"])) * 255
    out[0, 1, :3] = np.asarray(rgb(PALETTE["nogo_white"])) * 255
    out[0, :, 3] = NOGO_ALPHA
    return out
#: Opacity of the swing envelope's inside and of its rim [0-255].
ENVELOPE_ALPHA, ENVELOPE_EDGE_ALPHA = 120, 230


def rgb(hex_colour: str) -> tuple:
    """Red, green and blue of a ``#rrggbb`` colour, each from 0 to 1.

    Parameters
    ----------
    hex_colour : str
        The colour, e.g. ``"#f26b1d"``.

    Returns
    -------
    tuple of float
        (red, green, blue) in [0, 1].
    """
    return tuple(int(hex_colour[i:i + 2], 16) / 255.0 for i in (1, 3, 5))


def darker(hex_colour: str, factor: float = 0.6) -> str:
    """A darker shade of a colour.

    Parameters
    ----------
    hex_colour : str
        The colour, ``#rrggbb``.
    factor : float
        Share of its brightness kept [-].

    Returns
    -------
    str
        The shade, ``#rrggbb``.
    """
    r, g, b = rgb(hex_colour)
    return "#%02x%02x%02x" % (int(r * factor * 255), int(g * factor * 255), int(b * factor * 255))


def ground_image(classes: np.ndarray) -> np.ndarray:
    """The ground texture in colour: sand, with lighter minor and darker major grid lines.

    Parameters
    ----------
    classes : numpy.ndarray
        (rows, columns) class image of :func:`swingsim.scene3d.ground.ground_texture`.

    Returns
    -------
    numpy.ndarray
        (rows, columns, 3) uint8 RGB, row 0 at the low-y edge.
    """
    table = np.zeros((3, 3), dtype=np.uint8)
    for cls, key in ((ground.GROUND, "ground"), (ground.MINOR_LINE, "grid_minor"), (ground.MAJOR_LINE, "grid_major")):
        table[cls] = np.asarray(rgb(PALETTE[key])) * 255
    return table[classes]


def envelope_image(classes: np.ndarray, colour=None) -> np.ndarray:
    """The swing envelope texture: translucent inside, a darker, nearly opaque rim, clear outside.

    Parameters
    ----------
    classes : numpy.ndarray
        (rows, columns) class image of :func:`swingsim.scene3d.ground.envelope`.
    colour : sequence of 3 float, optional
        RGB in [0, 1]; the palette's envelope colour by default.

    Returns
    -------
    numpy.ndarray
        (rows, columns, 4) uint8 RGBA, row 0 at the low-y edge.
    """
    c = np.asarray(rgb(PALETTE["envelope"]) if colour is None else colour, dtype=float)
    rgba = np.zeros(classes.shape + (4,), dtype=np.uint8)
    rgba[..., :3] = c * 255
    inside = classes != ground.OUTSIDE
    edge = classes == ground.EDGE
    rgba[inside, 3] = ENVELOPE_ALPHA
    rgba[edge, :3] = (c * 0.6 * 255).astype(np.uint8)
    rgba[edge, 3] = ENVELOPE_EDGE_ALPHA
    return rgba
