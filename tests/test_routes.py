"""Routes from open formats: GPX routes and tracks, GeoJSON lines, into legs; bad files.

Check values come from geographiclib (C. F. F. Karney, "Algorithms for geodesics",
J. Geodesy 87, 2013), an implementation independent of ours: on a sphere of the IUGG mean
radius (flattening 0) it gives the great-circle distance and course our haversine legs
must match; on WGS84 it shows what the sphere costs (within 0.6 %: the ellipsoid's radius
of curvature runs from 6335 km, north-south at the equator, to 6400 km at the poles,
against the sphere's 6371 km).
"""

from __future__ import annotations

import json
import textwrap

import numpy as np
import pytest
from geographiclib.geodesic import Geodesic

from cruiseplan.cli import main
from cruiseplan.constants import R_EARTH_MEAN
from cruiseplan.errors import MissionFileError
from cruiseplan.io import routes
from cruiseplan.io.mission_file import read_mission
from cruiseplan.io.routes import read_route, route_legs
from cruiseplan.model.mission import Leg

SPHERE = Geodesic(R_EARTH_MEAN, 0.0)
#: Invented points in open country.
POINTS = [(44.4012, -101.6120), (44.4190, -101.5801), (44.4305, -101.6066)]

GPX_ROUTE = """<?xml version="1.0" encoding="UTF-8"?>
<gpx version="1.1" creator="test" xmlns="http://www.topografix.com/GPX/1/1">
  <wpt lat="44.0" lon="-101.0"><name>not part of the route</name></wpt>
  <rte>
    <name>fence line</name>
    <rtept lat="44.4012" lon="-101.6120"><name>gate</name></rtept>
    <rtept lat="44.4190" lon="-101.5801"><name>corner</name></rtept>
    <rtept lat="44.4305" lon="-101.6066"><name>pond</name></rtept>
  </rte>
</gpx>
"""

GPX_TRACK = """<?xml version="1.0"?>
<gpx version="1.0" xmlns="http://www.topografix.com/GPX/1/0">
  <trk><name>walked</name>
    <trkseg>
      <trkpt lat="44.4012" lon="-101.6120"><ele>610</ele></trkpt>
      <trkpt lat="44.4012" lon="-101.6120"/>
      <trkpt lat="44.4190" lon="-101.5801"/>
    </trkseg>
    <trkseg>
      <trkpt lat="44.4305" lon="-101.6066"/>
    </trkseg>
  </trk>
</gpx>
"""


def geojson_line(points=POINTS, wrap="bare"):
    line = {"type": "LineString", "coordinates": [[lon, lat] for lat, lon in points]}
    if wrap == "feature":
        return {"type": "Feature", "properties": {}, "geometry": line}
    if wrap == "collection":
        return {"type": "FeatureCollection",
                "features": [{"type": "Feature", "properties": {}, "geometry": line}]}
    return line


def write(tmp_path, name, text):
    p = tmp_path / name
    p.write_text(text if isinstance(text, str) else json.dumps(text), encoding="utf-8")
    return p


TEMPLATE = Leg("t", 1.0, altitude=150.0, tas=16.0)


@pytest.mark.parametrize("name, text", [
    ("route.gpx", GPX_ROUTE), ("track.gpx", GPX_TRACK),
    ("line.geojson", geojson_line()), ("feature.geojson", geojson_line(wrap="feature")),
    ("collection.json", geojson_line(wrap="collection")),
])
def test_route_points_and_legs_against_geographiclib(tmp_path, name, text):
    route = read_route(write(tmp_path, name, text))
    # The track's repeated point is merged; the two track segments are joined in order.
    np.testing.assert_array_equal(route.points, np.array(POINTS))
    legs = route_legs(route, TEMPLATE)
    assert len(legs) == 2
    for leg, (a, b) in zip(legs, zip(POINTS, POINTS[1:])):
        exact = SPHERE.Inverse(a[0], a[1], b[0], b[1])
        # Haversine against the geodesic on the same sphere: to rounding.
        assert leg.distance == pytest.approx(exact["s12"], rel=1e-9)
        assert leg.course == pytest.approx(exact["azi1"] % 360.0, abs=1e-7)
        # Against the WGS84 ellipsoid: the sphere's accuracy (0.6 %).
        wgs = Geodesic.WGS84.Inverse(a[0], a[1], b[0], b[1])
        assert leg.distance == pytest.approx(wgs["s12"], rel=6e-3)
        # Everything else comes from the template.
        assert leg.altitude == 150.0 and leg.tas == 16.0
    if name == "route.gpx":
        assert [leg.name for leg in legs] == ["gate to corner", "corner to pond"]
        assert route.kind == "GPX route"
    else:
        stem = name.split(".")[0]
        assert [leg.name for leg in legs] == [f"{stem} 1", f"{stem} 2"]


MISSION = """\
[mission]
airframe = "demo-survey-drone"
battery = "100 %"

[profile]
departure_elevation = "85 m"
arrival_elevation = "85 m"
min_clearance = "40 m"

[route]
file = "{file}"
altitude = "195 m"
speed = "18 m/s"
elevation = "95 m"
max_agl = "120 m"
wind = "250/5m/s@0m,235/9m/s@100m"
"""


def test_mission_route_then_legs(tmp_path):
    write(tmp_path, "fence.gpx", GPX_ROUTE)
    text = MISSION.format(file="fence.gpx") + textwrap.dedent("""
        [[legs]]
        name = "look at the pond"
        kind = "loiter"
        duration = "3 min"
        """)
    m = read_mission(write(tmp_path, "m.toml", text))
    assert [leg.name for leg in m.legs] == ["gate to corner", "corner to pond",
                                            "look at the pond"]
    first = m.legs[0]
    assert first.distance == pytest.approx(SPHERE.Inverse(*POINTS[0], *POINTS[1])["s12"],
                                           rel=1e-9)
    assert first.altitude == pytest.approx(195.0) and first.tas == pytest.approx(18.0)
    assert first.max_agl == pytest.approx(120.0) and first.elevation == pytest.approx(95.0)
    assert first.wind.speeds == (5.0, 9.0)
    assert m.legs[2].kind == "loiter"


def test_route_mission_plans_on_the_command_line(tmp_path, capsys):
    write(tmp_path, "line.geojson", geojson_line())
    path = write(tmp_path, "m.toml", MISSION.format(file="line.geojson"))
    out = tmp_path / "plan.json"
    assert main(["plan", str(path), "--format", "json", "--output", str(out)]) == 0
    doc = json.loads(out.read_text())
    assert doc["summary"]["verdict"] == "GO"
    legs = {row[0] for row in doc["rows"]}
    assert {"line 1", "line 2"} <= legs


# --- malformed files: one clear line naming the file, exit 2, nothing written ---------------

BILLION_LAUGHS = """<?xml version="1.0"?>
<!DOCTYPE gpx [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">]>
<gpx><rte><rtept lat="44.4" lon="-101.6"><name>&b;</name></rtept></rte></gpx>
"""
EXTERNAL = """<?xml version="1.0"?>
<!DOCTYPE gpx [<!ENTITY secret SYSTEM "file:///etc/hostname">]>
<gpx><rte><rtept lat="44.4" lon="-101.6"><name>&secret;</name></rtept></rte></gpx>
"""

BAD = [
    ("bad.gpx", "<gpx><rte><rtept lat='44' lon='-101'></rte></gpx>",
     r"bad\.gpx: not valid XML \(mismatched tag, line 1"),
    ("empty.gpx", "", r"empty\.gpx: the file is empty"),
    ("nopoints.gpx", "<gpx><rte><name>x</name></rte></gpx>",
     r"nopoints\.gpx: no points in the GPX route"),
    ("waypoints.gpx", "<gpx><wpt lat='44' lon='-101'/></gpx>",
     r"waypoints\.gpx: no route or track points .*1 waypoint\(s\) <wpt> are not a route"),
    ("one.gpx", "<gpx><trk><trkseg><trkpt lat='44' lon='-101'/><trkpt lat='44' "
                "lon='-101'/></trkseg></trk></gpx>",
     r"one\.gpx: only one point in the GPX track \(2 within 1 m of each other\)"),
    ("mixed.gpx", "<gpx><rte><rtept lat='44' lon='-101'/></rte><trk/></gpx>",
     r"mixed\.gpx: mixed geometry: 1 route\(s\) <rte> and 1 track\(s\) <trk>"),
    ("two.gpx", "<gpx><rte/><rte/></gpx>", r"two\.gpx: 2 routes <rte>; keep the one to fly"),
    ("root.gpx", "<kml><rte/></kml>", r"root\.gpx: not a GPX file: the root element is <kml>"),
    ("range.gpx", "<gpx><rte><rtept lat='95' lon='-101'/><rtept lat='44' lon='-101'/></rte>"
                  "</gpx>", r"range\.gpx: <rtept> 1: latitude 95\.0 is not in -90\.\.90"),
    ("nolon.gpx", "<gpx><rte><rtept lat='44'/></rte></gpx>",
     r"nolon\.gpx: <rtept> 1: no lon attribute"),
    ("word.gpx", "<gpx><rte><rtept lat='north' lon='-101'/></rte></gpx>",
     r"word\.gpx: <rtept> 1: lat 'north' is not a number"),
    ("laughs.gpx", BILLION_LAUGHS, r"laughs\.gpx: has a document type declaration"),
    ("external.gpx", EXTERNAL, r"external\.gpx: has a document type declaration"),
    ("bad.geojson", '{"type": "LineString", "coordinates": [[1, 2],', r"bad\.geojson: not "
                                                                       r"valid JSON"),
    ("nan.geojson", '{"type": "LineString", "coordinates": [[NaN, 44], [-101, 44.1]]}',
     r"nan\.geojson: not valid JSON \(NaN is not a JSON number\)"),
    ("mixed.geojson", {"type": "FeatureCollection", "features": [
        {"type": "Feature", "geometry": geojson_line()},
        {"type": "Feature", "geometry": {"type": "Point", "coordinates": [-101.6, 44.4]}}]},
     r"mixed\.geojson: mixed geometry: 1 LineString and Point; give exactly one LineString"),
    ("twolines.geojson", {"type": "GeometryCollection",
                          "geometries": [geojson_line(), geojson_line()]},
     r"twolines\.geojson: 2 LineStrings; give exactly one"),
    ("polygon.geojson", {"type": "Polygon", "coordinates": [[[-101, 44], [-101, 44.1],
                                                            [-101.1, 44], [-101, 44]]]},
     r"polygon\.geojson: no LineString \(found Polygon\)"),
    ("nothing.geojson", {"type": "FeatureCollection", "features": []},
     r"nothing\.geojson: no LineString \(no geometry at all\)"),
    ("swapped.geojson", {"type": "LineString", "coordinates": [[44.4, -101.6], [44.5, -101.5]]},
     r"swapped\.geojson: LineString position 1: latitude -101\.6 is not in -90\.\.90 degrees "
     r"\(GeoJSON positions are \[longitude, latitude\]\)"),
    ("onepoint.geojson", {"type": "LineString", "coordinates": [[-101.6, 44.4]]},
     r"onepoint\.geojson: only one point in the LineString: a route needs at least two"),
    ("route.txt", "44.4 -101.6", r"route\.txt: unknown format '\.txt'"),
]


@pytest.mark.parametrize("name, text, message", BAD, ids=[b[0] for b in BAD])
def test_malformed_route_files(tmp_path, capsys, name, text, message):
    write(tmp_path, name, text)
    mission = write(tmp_path, "m.toml", MISSION.format(file=name))
    with pytest.raises(MissionFileError, match=r"m\.toml: \[route\] file: .*" + message):
        read_mission(mission)
    out = tmp_path / "plan.txt"
    plot = tmp_path / "plan.png"
    status = main(["plan", str(mission), "--output", str(out), "--plot", str(plot)])
    err = capsys.readouterr().err
    assert status == 2
    assert len(err.strip().splitlines()) == 1 and name in err
    assert not out.exists() and not plot.exists()


def test_not_a_file_and_missing_file(tmp_path):
    (tmp_path / "folder.gpx").mkdir()
    with pytest.raises(MissionFileError, match=r"folder\.gpx: not a file"):
        read_mission(write(tmp_path, "m.toml", MISSION.format(file="folder.gpx")))
    with pytest.raises(MissionFileError, match=r"gone\.gpx: no such file"):
        read_mission(write(tmp_path, "m.toml", MISSION.format(file="gone.gpx")))


def test_size_cap(tmp_path, monkeypatch):
    monkeypatch.setattr(routes, "MAX_FILE_BYTES", 200)
    path = write(tmp_path, "big.gpx", GPX_ROUTE)
    with pytest.raises(MissionFileError, match=r"big\.gpx: larger than 0 MB"):
        read_route(path)


def test_binary_and_utf16_files_are_refused(tmp_path):
    p = tmp_path / "u16.gpx"
    p.write_bytes(GPX_ROUTE.encode("utf-16"))
    with pytest.raises(MissionFileError, match=r"u16\.gpx: not UTF-8 text"):
        read_route(p)


def test_too_many_points(tmp_path, monkeypatch):
    monkeypatch.setattr(routes, "MAX_POINTS", 2)
    with pytest.raises(MissionFileError, match=r"3 points in the GPX route, more than 2: "
                                               r"thin the track"):
        read_route(write(tmp_path, "r.gpx", GPX_ROUTE))


def test_route_section_errors(tmp_path):
    write(tmp_path, "fence.gpx", GPX_ROUTE)
    base = MISSION.format(file="fence.gpx")
    with pytest.raises(MissionFileError, match=r"\[route\] file: expected a file name"):
        read_mission(write(tmp_path, "m.toml", base.replace('file = "fence.gpx"', "")))
    with pytest.raises(MissionFileError, match=r"\[route\] course: unknown field"):
        read_mission(write(tmp_path, "m.toml", base + "course = 40\n"))
    with pytest.raises(MissionFileError, match=r"\[route\] speed: '18 kg' is not a quantity"):
        read_mission(write(tmp_path, "m.toml", base.replace('"18 m/s"', '"18 kg"')))
