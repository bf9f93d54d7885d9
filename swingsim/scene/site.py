"""Site bearings: compass bearings on site against the scene's x-y axes.

The scene's geometry is in x, y, z (z up) and its mathematical angles run from
+x toward +y.  People on site give directions as compass bearings, clockwise
from north, and give wind as the bearing it comes *from* (the meteorological
convention).  ``[site] north_deg`` is the direction of site north as a
mathematical angle (default 90: +y is north, +x is east).

A bearing ``b`` points along the mathematical angle ``north_deg - b``; a wind
from bearing ``b`` blows toward bearing ``b + 180``.  One conversion each way,
used by the reader (a scene's wind is stored as the direction it blows toward)
and by every output that shows the wind (summary, plots, video).
"""

from __future__ import annotations

import math

#: The 16 points of the compass, clockwise from north, 22.5 deg apart.
COMPASS_POINTS = ("N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE",
                  "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW")


def bearing_to_direction_deg(bearing_deg: float, north_deg: float) -> float:
    """Mathematical angle (from +x toward +y) of the direction a compass bearing points to.

    Parameters
    ----------
    bearing_deg : float
        Compass bearing, clockwise from site north [deg].
    north_deg : float
        Direction of site north, from +x toward +y [deg].

    Returns
    -------
    float
        The same direction from +x toward +y, in [0, 360) [deg].
    """
    return (north_deg - bearing_deg) % 360.0


def direction_to_bearing_deg(direction_deg: float, north_deg: float) -> float:
    """Compass bearing of a direction given from +x toward +y (the inverse of :func:`bearing_to_direction_deg`).

    Parameters
    ----------
    direction_deg : float
        Direction, from +x toward +y [deg].
    north_deg : float
        Direction of site north, from +x toward +y [deg].

    Returns
    -------
    float
        Compass bearing clockwise from site north, in [0, 360) [deg].
    """
    return (north_deg - direction_deg) % 360.0


def wind_toward_deg(from_bearing_deg: float, north_deg: float) -> float:
    """Direction a wind blows toward, from +x toward +y, given the bearing it comes from.

    Parameters
    ----------
    from_bearing_deg : float
        Compass bearing the wind comes from, clockwise from site north [deg]
        (meteorological convention).
    north_deg : float
        Direction of site north, from +x toward +y [deg].

    Returns
    -------
    float
        Direction the wind blows toward, from +x toward +y, in [0, 360) [deg].
    """
    return bearing_to_direction_deg(from_bearing_deg + 180.0, north_deg)


def wind_from_bearing_deg(toward_deg: float, north_deg: float) -> float:
    """Compass bearing a wind comes from, given the direction it blows toward (inverse of :func:`wind_toward_deg`).

    Parameters
    ----------
    toward_deg : float
        Direction the wind blows toward, from +x toward +y [deg].
    north_deg : float
        Direction of site north, from +x toward +y [deg].

    Returns
    -------
    float
        Compass bearing the wind comes from, clockwise from site north, in [0, 360) [deg].
    """
    return (direction_to_bearing_deg(toward_deg, north_deg) + 180.0) % 360.0


def compass_point(bearing_deg: float) -> str:
    """The nearest of the 16 compass points to a bearing.

    Parameters
    ----------
    bearing_deg : float
        Compass bearing, clockwise from north [deg].

    Returns
    -------
    str
        ``"N"``, ``"NNE"``, ... ``"NNW"``.
    """
    return COMPASS_POINTS[int(math.floor((bearing_deg % 360.0) / 22.5 + 0.5)) % 16]


def wind_words(scene) -> str:
    """The wind as site people say it: ``"from 225 deg (SW)"``.

    Parameters
    ----------
    scene : Scene
        The validated scene (its wind and site north).

    Returns
    -------
    str
        The bearing the wind comes from, rounded to a whole degree, and its compass point.
    """
    bearing = scene_wind_from_bearing_deg(scene)
    return f"from {round(bearing) % 360:d} deg ({compass_point(bearing)})"


def scene_wind_from_bearing_deg(scene) -> float:
    """The compass bearing a scene's wind comes from.

    Parameters
    ----------
    scene : Scene
        The validated scene (``wind.direction_deg`` is where it blows toward,
        ``site.north_deg`` where north is).

    Returns
    -------
    float
        Bearing clockwise from site north, in [0, 360) [deg].
    """
    return wind_from_bearing_deg(scene.wind.direction_deg, scene.site.north_deg)
