"""What a survey is: an area to cover in parallel lines, and how to fly them (SI data).

:mod:`cruiseplan.planning.survey` lays the lines and splits them into packs; the
mission-file reader (:mod:`cruiseplan.io.mission_file`, ``[survey]``) builds a
:class:`Survey`. The area is checked here, once, so that a bad polygon is an error of the
file that gives it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from cruiseplan.errors import CruiseplanError
from cruiseplan.model.mission import Leg
from cruiseplan.physics.geo import local_xy

#: Largest distance of an area's vertex from its centre [m]: the flat projection the lines
#: are laid on is good to 2e-6 in scale there (see :func:`cruiseplan.physics.geo.local_xy`).
MAX_AREA_RADIUS = 20_000.0
#: Largest distance of the take-off point from the area's centre [m].
MAX_TAKEOFF_DISTANCE = 50_000.0
#: Most vertices an area may have.
MAX_AREA_VERTICES = 500
#: Smallest area [m^2].
MIN_AREA = 1.0


def area_centre(area) -> tuple:
    """Centre of a polygon's vertices [deg]: the normalised mean of their unit vectors.

    The mean of the vertices as points on the sphere, so that an area across the 180th
    meridian is centred on it, not on the other side of the Earth.

    Parameters
    ----------
    area : array_like
        Latitude and longitude of the vertices [deg], shape (n, 2).

    Returns
    -------
    tuple of float
        Latitude and longitude of the centre [deg].
    """
    a = np.radians(np.asarray(area, dtype=float))
    v = np.stack([np.cos(a[:, 0]) * np.cos(a[:, 1]), np.cos(a[:, 0]) * np.sin(a[:, 1]),
                  np.sin(a[:, 0])]).mean(axis=1)
    return (float(np.degrees(np.arctan2(v[2], math.hypot(v[0], v[1])))),
            float(np.degrees(np.arctan2(v[1], v[0]))))


def polygon_area(x, y) -> float:
    """Area of a simple polygon [m^2] by the shoelace formula (either orientation).

    Parameters
    ----------
    x, y : array_like
        Vertices in a plane [m], the ring open.

    Returns
    -------
    float
        Its area [m^2], positive.
    """
    x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    return float(abs(np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1))) / 2.0)


def crossing_edges(x, y):
    """The first two edges of a polygon that cross, or None for a simple polygon.

    Edges k (vertex k to k + 1) and m cross when each one's ends lie strictly on
    opposite sides of the other (orientation tests); edges sharing a vertex are not
    compared, and touching without crossing is not counted. All pairs at once.

    Parameters
    ----------
    x, y : array_like
        Vertices in a plane [m], the ring open.

    Returns
    -------
    tuple of int or None
        Edge numbers (from 1) of the first crossing pair.
    """
    p = np.stack([np.asarray(x, float), np.asarray(y, float)], axis=1)
    a, b = p, np.roll(p, -1, axis=0)
    n = len(p)

    def orient(o, q, r):
        return np.sign((q[..., 0] - o[..., 0]) * (r[..., 1] - o[..., 1])
                       - (q[..., 1] - o[..., 1]) * (r[..., 0] - o[..., 0]))

    A, B = a[:, None, :], b[:, None, :]
    C, D = a[None, :, :], b[None, :, :]
    cross = ((orient(A, B, C) * orient(A, B, D) < 0) & (orient(C, D, A) * orient(C, D, B) < 0))
    k = np.arange(n)
    gap = np.abs(k[:, None] - k[None, :])
    cross &= (gap > 1) & (gap < n - 1)
    hits = np.argwhere(np.triu(cross))
    return None if hits.size == 0 else (int(hits[0][0]) + 1, int(hits[0][1]) + 1)


@dataclass(frozen=True)
class Survey:
    """An area to survey in parallel lines, and how the lines are flown (SI).

    Parameters
    ----------
    area : tuple of (float, float)
        Latitude and longitude of the polygon's vertices [deg], in order around it, the
        ring open; at least three, within :data:`MAX_AREA_RADIUS` of their centre, edges
        not crossing.
    takeoff : tuple of float
        Take-off and landing point, latitude and longitude [deg]; every pack starts and
        ends there.
    spacing : float
        Distance between neighbouring lines [m].
    leg : Leg
        How every line, turn and transit is flown: its altitude (required: a survey is
        flown at one altitude), speed, power or CAS, wind, ground elevation and caps. The
        name, distance and course are each line's.
    direction : float or None
        Line direction [deg true] (the lines are flown both ways); None: the one that
        uses least energy in the day's wind, searched every ``direction_step``.
    direction_step : float
        Step of that search [deg], 1 to 30.
    turn_distance : float
        Distance added to each turn between lines [m] (the overshoot and the turn).
    turn_time : float
        Time added at each turn between lines [s], flown as a hover (hovering airframes)
        or a level turn (wings).
    footprint : float or None
        Width of the sensor's footprint across the line [m], when the spacing came
        from it.
    side_overlap : float or None
        Overlap of neighbouring footprints [-], with ``footprint``.
    area_source : str
        The file the area was read from; '' when written in the mission file.
    """

    area: tuple
    takeoff: tuple
    spacing: float
    leg: Leg
    direction: float | None = None
    direction_step: float = 10.0
    turn_distance: float = 0.0
    turn_time: float = 0.0
    footprint: float | None = None
    side_overlap: float | None = None
    area_source: str = ""

    def __post_init__(self):
        pts = np.asarray(self.area, dtype=float)
        if pts.ndim != 2 or pts.shape[1] != 2:
            raise CruiseplanError("the area should be a list of [latitude, longitude] "
                                  "vertices")
        if np.any(~np.isfinite(pts)) or np.any(np.abs(pts[:, 0]) > 90) \
                or np.any(np.abs(pts[:, 1]) > 180):
            raise CruiseplanError("an area vertex is not a latitude in -90..90 and a "
                                  "longitude in -180..180 degrees")
        if len({tuple(p) for p in pts}) < 3:
            raise CruiseplanError(f"the area has {len({tuple(p) for p in pts})} distinct "
                                  "vertices; it needs at least three")
        if len(pts) > MAX_AREA_VERTICES:
            raise CruiseplanError(f"the area has {len(pts)} vertices, more than "
                                  f"{MAX_AREA_VERTICES}; simplify its outline")
        lat0, lon0 = area_centre(pts)
        x, y = local_xy(pts[:, 0], pts[:, 1], lat0, lon0)
        far = float(np.max(np.hypot(x, y)))
        if far > MAX_AREA_RADIUS:
            raise CruiseplanError(f"the area reaches {far / 1000:.1f} km from its centre, "
                                  f"more than {MAX_AREA_RADIUS / 1000:.0f} km: the lines are "
                                  "laid on a flat projection meant for fields a few km "
                                  "across; split the area")
        crossing = crossing_edges(x, y)
        if crossing is not None:
            raise CruiseplanError(f"the area's edges {crossing[0]} and {crossing[1]} cross: "
                                  "give the vertices in order around the area")
        if polygon_area(x, y) < MIN_AREA:
            raise CruiseplanError("the area is empty (its vertices lie on a line)")
        lat, lon = (float(v) for v in self.takeoff)
        if not (-90 <= lat <= 90 and -180 <= lon <= 180):
            raise CruiseplanError(f"take-off {list(self.takeoff)!r} is not a latitude in "
                                  "-90..90 and a longitude in -180..180 degrees")
        tx, ty = local_xy(lat, lon, lat0, lon0)
        if math.hypot(tx, ty) > MAX_TAKEOFF_DISTANCE:
            raise CruiseplanError(f"take-off is {math.hypot(tx, ty) / 1000:.0f} km from the "
                                  f"area's centre, more than {MAX_TAKEOFF_DISTANCE / 1000:.0f} "
                                  "km")
        if not (math.isfinite(self.spacing) and self.spacing > 0):
            raise CruiseplanError(f"line spacing {self.spacing:g} m must be positive")
        if self.direction is not None and not 0.0 <= self.direction <= 360.0:
            raise CruiseplanError(f"line direction {self.direction:g} deg is not in 0..360")
        if not 1.0 <= self.direction_step <= 30.0:
            raise CruiseplanError(f"direction step {self.direction_step:g} deg is not in "
                                  "1..30 deg")
        if self.turn_distance < 0 or self.turn_time < 0:
            raise CruiseplanError("a turn allowance must not be negative")
        if self.leg.kind != "cruise":
            raise CruiseplanError("survey lines are cruise legs")
        if self.leg.altitude is None:
            raise CruiseplanError("a survey is flown at one altitude (for its ground "
                                  "resolution): give its altitude, not 'best'")

    @property
    def centre(self) -> tuple:
        """Centre of the area's vertices [deg] (:func:`area_centre`), the projection's."""
        return area_centre(self.area)
