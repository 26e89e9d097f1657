"""Routes and areas from open formats: GPX routes and tracks, GeoJSON lines and polygons.

Read with the standard library only: GPX with :mod:`xml.etree.ElementTree` (expat), GeoJSON
with :mod:`json`. Both are guarded against hostile files: a size cap
(:data:`MAX_FILE_BYTES`), a cap on points (:data:`MAX_POINTS`), and for XML no document
type declaration at all, so no entity can be declared, expanded or fetched (GPX needs none;
expat never fetches external entities anyway). Every problem is one
:class:`~cruiseplan.errors.MissionFileError` line naming the file.

* **GPX** (the GPS Exchange Format, versions 1.0 and 1.1): one route (``<rte>`` of
  ``<rtept lat= lon=>``) or one track (``<trk>`` of ``<trkseg>`` of ``<trkpt>``; its
  segments are joined in order). Standalone waypoints (``<wpt>``) are not a route and are
  ignored; elevations (``<ele>``) too, as GPX does not say whether they are the ground or
  the aircraft.
* **GeoJSON** (RFC 7946): a ``LineString`` for a route, a ``Polygon`` (outer ring, no
  holes) for an area; bare, in a ``Feature``, or as the one such geometry of a
  ``FeatureCollection``. Positions are ``[longitude, latitude]``, as the RFC says.

Consecutive points become legs (:func:`route_legs`) with the great-circle distance and
initial course of :func:`cruiseplan.physics.geo.great_circle`; points within
:data:`MIN_LEG` of the one before are merged (tracks repeat points while standing still).

References
----------
.. [1] TopoGrafix, "GPX 1.1 Schema Documentation", 2004 (the ``gpx``, ``rte``, ``trk``,
   ``trkseg``, ``rtept`` and ``trkpt`` elements; ``lat`` and ``lon`` in decimal degrees,
   WGS84).
.. [2] H. Butler et al., "The GeoJSON Format", IETF RFC 7946, 2016, secs. 3.1.4
   (LineString), 3.1.6 (Polygon: closed rings, the first the exterior) and 4 (positions
   are longitude, latitude).
"""

from __future__ import annotations

import json
import math
import xml.etree.ElementTree as ET
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from cruiseplan.errors import MissionFileError
from cruiseplan.physics.geo import great_circle

#: Largest route or area file read [bytes] (a long track at one point a second is ~5 MB).
MAX_FILE_BYTES = 16 * 2**20
#: Most points a route or area may have after merging repeats; thin longer tracks first.
MAX_POINTS = 2000
#: Points closer than this to the one before are merged [m].
MIN_LEG = 1.0
#: File suffixes and the format each is read as.
FORMATS = {".gpx": "GPX", ".geojson": "GeoJSON", ".json": "GeoJSON"}


@dataclass(frozen=True)
class Route:
    """Points of a route, in flight order.

    Attributes
    ----------
    points : numpy.ndarray
        Latitude and longitude of each point [deg], shape (n, 2), n >= 2, no two
        consecutive points within :data:`MIN_LEG` of each other.
    names : tuple of str
        Each point's name ('' when it has none).
    kind : str
        What the file held, for messages: ``"GPX route"``, ``"GPX track"`` or
        ``"GeoJSON LineString"``.
    source : str
        The file.
    """

    points: np.ndarray
    names: tuple
    kind: str
    source: str


def _fail(path, message):
    raise MissionFileError(f"{path}: {message}")


def _read_bytes(path) -> bytes:
    """The file's bytes, at most :data:`MAX_FILE_BYTES`."""
    path = Path(path)
    if not path.exists():
        _fail(path, "no such file")
    if not path.is_file():
        _fail(path, "not a file")
    try:
        with path.open("rb") as fh:
            raw = fh.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        _fail(path, f"cannot read the file ({exc.strerror})")
    if len(raw) > MAX_FILE_BYTES:
        _fail(path, f"larger than {MAX_FILE_BYTES // 2**20} MB; a route or area file is far "
                    "smaller (thin the track first)")
    if not raw.strip():
        _fail(path, "the file is empty")
    return raw


def _format(path) -> str:
    suffix = Path(path).suffix.lower()
    if suffix not in FORMATS:
        _fail(path, f"unknown format {suffix or '(no suffix)'!r}: give a .gpx (route or "
                    "track) or a .geojson file")
    return FORMATS[suffix]


def _check_point(path, lat, lon, where, geojson=False):
    """Latitude and longitude [deg] as floats, checked to be finite and in range."""
    order = " (GeoJSON positions are [longitude, latitude])" if geojson else ""
    for value, name in ((lat, "latitude"), (lon, "longitude")):
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            _fail(path, f"{where}: {name} {value!r} is not a number{order}")
        if not math.isfinite(value):
            _fail(path, f"{where}: {name} {value!r} is not a finite number")
    if not -90.0 <= lat <= 90.0:
        _fail(path, f"{where}: latitude {lat!r} is not in -90..90 degrees{order}")
    if not -180.0 <= lon <= 180.0:
        _fail(path, f"{where}: longitude {lon!r} is not in -180..180 degrees{order}")
    return float(lat), float(lon)


def _merged(path, points, names, what):
    """Points with near repeats merged; at least two and at most MAX_POINTS of them."""
    if not points:
        _fail(path, f"no points in the {what}")
    if len(points) > 20 * MAX_POINTS:
        _fail(path, f"{len(points)} points in the {what}, more than {MAX_POINTS}: thin the "
                    "track first (one point every few hundred metres is plenty to plan on)")
    pts = np.asarray(points, dtype=float)
    keep = [0]
    for i in range(1, len(pts)):
        d, _ = great_circle(*pts[keep[-1]], *pts[i])
        if d >= MIN_LEG:
            keep.append(i)
    if len(keep) < 2:
        _fail(path, f"only one point in the {what}"
              + (f" ({len(pts)} within {MIN_LEG:g} m of each other)" if len(pts) > 1 else "")
              + ": a route needs at least two")
    if len(keep) > MAX_POINTS:
        _fail(path, f"{len(keep)} points in the {what}, more than {MAX_POINTS}: thin the "
                    "track first (one point every few hundred metres is plenty to plan on)")
    return pts[keep], tuple(names[i] for i in keep)


# --- GPX ------------------------------------------------------------------------------------

def _local(tag) -> str:
    """An element's name without its namespace."""
    return tag.rsplit("}", 1)[-1] if isinstance(tag, str) else ""


def _parse_xml(path, raw: bytes):
    """The root element of a GPX file, refusing document type declarations."""
    if b"\x00" in raw:
        _fail(path, "not UTF-8 text (NUL bytes: a binary or UTF-16 file); GPX is UTF-8")
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        _fail(path, f"not UTF-8 text (byte {exc.start}); GPX is UTF-8")
    if "<!DOCTYPE" in text.upper() or "<!ENTITY" in text.upper():
        _fail(path, "has a document type declaration (<!DOCTYPE or <!ENTITY>); GPX needs "
                    "none, and entities are not expanded here: remove it")
    # expat, with no entity other than XML's five predefined ones (there is no DTD to
    # declare any) and no external entity ever fetched.
    parser = ET.XMLParser()
    try:
        parser.feed(text.encode("utf-8"))
        return parser.close()
    except ET.ParseError as exc:
        line, column = exc.position
        reason = str(exc).split(":", 1)[0]
        _fail(path, f"not valid XML ({reason}, line {line}, column {column + 1})")


def _gpx(path, raw: bytes) -> Route:
    root = _parse_xml(path, raw)
    if _local(root.tag) != "gpx":
        _fail(path, f"not a GPX file: the root element is <{_local(root.tag)}>, not <gpx>")
    routes = [e for e in root if _local(e.tag) == "rte"]
    tracks = [e for e in root if _local(e.tag) == "trk"]
    if routes and tracks:
        _fail(path, f"mixed geometry: {len(routes)} route(s) <rte> and {len(tracks)} "
                    "track(s) <trk>; keep one route or one track")
    if len(routes) > 1 or len(tracks) > 1:
        n, what = (len(routes), "routes <rte>") if routes else (len(tracks), "tracks <trk>")
        _fail(path, f"{n} {what}; keep the one to fly")
    if routes:
        kind, elements = "GPX route", [e for e in routes[0] if _local(e.tag) == "rtept"]
    elif tracks:
        kind = "GPX track"
        elements = [p for seg in tracks[0] if _local(seg.tag) == "trkseg"
                    for p in seg if _local(p.tag) == "trkpt"]
    else:
        waypoints = sum(1 for e in root if _local(e.tag) == "wpt")
        _fail(path, "no route or track points (<rte> of <rtept>, or <trk> of <trkseg> of "
                    "<trkpt>)" + (f"; its {waypoints} waypoint(s) <wpt> are not a route"
                                  if waypoints else ""))
    points, names = [], []
    for k, e in enumerate(elements, 1):
        where = f"<{_local(e.tag)}> {k}"
        values = []
        for attr in ("lat", "lon"):
            text = e.get(attr)
            if text is None:
                _fail(path, f"{where}: no {attr} attribute")
            try:
                values.append(float(text))
            except ValueError:
                _fail(path, f"{where}: {attr} {text!r} is not a number")
        points.append(_check_point(path, *values, where))
        name = next((c.text for c in e if _local(c.tag) == "name"), None)
        names.append((name or "").strip())
    pts, kept = _merged(path, points, names, kind)
    return Route(pts, kept, kind, str(path))


# --- GeoJSON --------------------------------------------------------------------------------

def _reject_constant(name):
    raise ValueError(f"{name} is not a JSON number")


def _parse_json(path, raw: bytes):
    try:
        return json.loads(raw.decode("utf-8-sig"), parse_constant=_reject_constant)
    except UnicodeDecodeError as exc:
        _fail(path, f"not UTF-8 text (byte {exc.start}); GeoJSON is UTF-8")
    except json.JSONDecodeError as exc:
        _fail(path, f"not valid JSON ({exc.msg}, line {exc.lineno}, column {exc.colno})")
    except ValueError as exc:
        _fail(path, f"not valid JSON ({exc})")
    except RecursionError:
        _fail(path, "not valid JSON (nested too deeply)")


def _geometries(path, doc) -> list:
    """The geometries a GeoJSON document holds (a Feature's, a collection's or itself)."""
    if not isinstance(doc, dict) or not isinstance(doc.get("type"), str):
        _fail(path, "not a GeoJSON object (no \"type\")")
    kind = doc["type"]
    if kind == "FeatureCollection":
        features = doc.get("features")
        if not isinstance(features, list):
            _fail(path, "a FeatureCollection without a list of \"features\"")
        out = []
        for f in features:
            out += _geometries(path, f) if isinstance(f, dict) else [f]
        return out
    if kind == "Feature":
        geometry = doc.get("geometry")
        return [] if geometry is None else _geometries(path, geometry)
    if kind == "GeometryCollection":
        parts = doc.get("geometries")
        if not isinstance(parts, list):
            _fail(path, "a GeometryCollection without a list of \"geometries\"")
        return [g for p in parts for g in _geometries(path, p)]
    return [doc]


def _one(path, doc, want: str) -> dict:
    """The one geometry of type ``want``; mixed or repeated geometry is an error."""
    geoms = _geometries(path, doc)
    kinds = [g.get("type") if isinstance(g, dict) else type(g).__name__ for g in geoms]
    found = [g for g, k in zip(geoms, kinds) if k == want]
    others = sorted({str(k) for k in kinds if k != want})
    if found and others:
        _fail(path, f"mixed geometry: {len(found)} {want} and {', '.join(others)}; give "
                    f"exactly one {want}")
    if not found:
        _fail(path, f"no {want}" + (f" (found {', '.join(others)})" if others else
                                     " (no geometry at all)"))
    if len(found) > 1:
        _fail(path, f"{len(found)} {want}s; give exactly one")
    return found[0]


def _positions(path, coords, where) -> list:
    """[[lon, lat, ...], ...] as (lat, lon) tuples, checked."""
    if not isinstance(coords, list):
        _fail(path, f"{where}: \"coordinates\" should be a list of [longitude, latitude]")
    out = []
    for k, pos in enumerate(coords, 1):
        if not isinstance(pos, list) or len(pos) < 2:
            _fail(path, f"{where} position {k}: {pos!r} should be [longitude, latitude]")
        out.append(_check_point(path, pos[1], pos[0], f"{where} position {k}", geojson=True))
    return out


def _geojson_route(path, raw: bytes) -> Route:
    line = _one(path, _parse_json(path, raw), "LineString")
    points = _positions(path, line.get("coordinates"), "LineString")
    pts, names = _merged(path, points, [""] * len(points), "LineString")
    return Route(pts, names, "GeoJSON LineString", str(path))


# --- public ---------------------------------------------------------------------------------

def read_route(path) -> Route:
    """Read a route from a GPX (route or track) or GeoJSON (LineString) file.

    Parameters
    ----------
    path : str or pathlib.Path
        A ``.gpx``, ``.geojson`` or ``.json`` file.

    Returns
    -------
    Route
        Its points [deg] in flight order, with their names.

    Raises
    ------
    MissionFileError
        One line naming the file: not a file, too large, an unknown suffix, not valid XML
        or JSON, a document type declaration, no points, one point, mixed or repeated
        geometry, coordinates that are not numbers or out of range, too many points.
    """
    kind = _format(path)
    raw = _read_bytes(path)
    return _gpx(path, raw) if kind == "GPX" else _geojson_route(path, raw)


def read_area(path) -> np.ndarray:
    """Read an area from a GeoJSON Polygon file: the vertices of its outer ring.

    Parameters
    ----------
    path : str or pathlib.Path
        A ``.geojson`` or ``.json`` file holding one Polygon (bare, in a Feature or in a
        FeatureCollection).

    Returns
    -------
    numpy.ndarray
        Latitude and longitude of the vertices [deg], shape (n, 2), the ring open (the
        closing repeat of the first vertex dropped).

    Raises
    ------
    MissionFileError
        One line naming the file: as :func:`read_route`, and a polygon with holes or fewer
        than three distinct vertices.
    """
    if _format(path) != "GeoJSON":
        _fail(path, "an area is read from a GeoJSON Polygon (.geojson)")
    poly = _one(path, _parse_json(path, _read_bytes(path)), "Polygon")
    rings = poly.get("coordinates")
    if not isinstance(rings, list) or not rings:
        _fail(path, "Polygon: \"coordinates\" should be a list of rings")
    if len(rings) > 1:
        _fail(path, f"Polygon has {len(rings) - 1} hole(s); give the outer ring only (survey "
                    "lines over a hole are flown anyway)")
    points = _positions(path, rings[0], "Polygon ring")
    if len(points) > 1 and points[0] == points[-1]:
        points = points[:-1]
    if len(set(points)) < 3:
        _fail(path, f"Polygon ring has {len(set(points))} distinct vertices; an area needs "
                    "at least three")
    if len(points) > MAX_POINTS:
        _fail(path, f"Polygon ring has {len(points)} vertices, more than {MAX_POINTS}")
    return np.asarray(points, dtype=float)


def route_legs(route: Route, template, prefix: str = "") -> tuple:
    """Legs between consecutive points of a route, each a copy of ``template``.

    Parameters
    ----------
    route : Route
        The points.
    template : Leg
        Everything but the name, distance and course: altitude, speed, wind, ground,
        caps (a cruise leg).
    prefix : str, optional
        Leg names are ``"PREFIX k"`` (k from 1) where the points have no names, else
        ``"NAME to NAME"``; the file's stem when empty.

    Returns
    -------
    tuple of Leg
        One per pair of consecutive points: great-circle distance [m] and initial true
        course [deg] (:func:`~cruiseplan.physics.geo.great_circle`), and the two points
        as its start and end [deg].
    """
    pts = route.points
    distance, course = great_circle(pts[:-1, 0], pts[:-1, 1], pts[1:, 0], pts[1:, 1])
    prefix = prefix or Path(route.source).stem
    names = route.names
    legs = []
    for k in range(len(pts) - 1):
        a, b = names[k], names[k + 1]
        name = f"{a} to {b}" if a and b else f"{prefix} {k + 1}"
        legs.append(replace(template, name=name, distance=float(distance[k]),
                            course=float(course[k]),
                            start=(float(pts[k, 0]), float(pts[k, 1])),
                            end=(float(pts[k + 1, 0]), float(pts[k + 1, 1]))))
    return tuple(legs)
