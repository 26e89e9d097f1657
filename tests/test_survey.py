"""Survey areas: lines laid over an area, the least-energy direction, packs; files and output.

Sources named beside each check:

* line count and length: the strip convention of cruiseplan.planning.survey (N = ceil(W/s)
  strips of width s centred on the area; common practice in laying survey lines), checked
  on rectangles whose answer is arithmetic;
* lengths: geographiclib (C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87,
  2013), independent of our haversine and projection: on the sphere of the IUGG mean
  radius the flat projection must give the geodesic lengths to its accuracy, (r/R)^2/6 =
  4e-8 at r = 3 km (Snyder, Map Projections: A Working Manual, USGS PP 1395, ch. 25);
  on WGS84 the sphere's 0.6 % (see tests/test_routes.py);
* least-energy direction: the wind triangle (FAA-H-8083-25 ch. 16): at airspeed V in a
  wind w a line flown there and back along the wind takes 2LV/(V^2 - w^2), across it
  2L/sqrt(V^2 - w^2), less; so at a set airspeed lines across the wind cost less;
* packs: the greedy rule itself (each pack as many whole lines as keep the reserve),
  checked by re-planning each pack with one more line.
"""

from __future__ import annotations

import json
import math
from dataclasses import replace

import numpy as np
import pytest
from geographiclib.geodesic import Geodesic
from hypothesis import given
from hypothesis import strategies as st

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.constants import R_EARTH_MEAN
from cruiseplan.errors import CruiseplanError, MissionFileError
from cruiseplan.io.mission_file import load_mission, read_mission
from cruiseplan.io.text import parse_wind_profile
from cruiseplan.model.mission import Leg, Mission, Profile, Reserve
from cruiseplan.model.survey import Survey, area_centre
from cruiseplan.physics.geo import local_latlon, local_xy
from cruiseplan.planning.mission import plan_mission
from cruiseplan.planning.survey import (
    best_direction,
    lay_lines,
    pack_mission,
    plan_survey,
)
from cruiseplan.report.tables import survey_report

SPHERE = Geodesic(R_EARTH_MEAN, 0.0)
#: Invented centre of the test fields, in open country.
CENTRE = (44.30, -101.20)


def rectangle(width, height, angle=0.0, centre=CENTRE):
    """Corners [deg] of a width (east) x height (north) rectangle turned by ``angle`` [deg]
    clockwise, laid out exactly in the plane around ``centre``."""
    x = np.array([-1, 1, 1, -1]) * width / 2
    y = np.array([-1, -1, 1, 1]) * height / 2
    a = math.radians(angle)
    xr, yr = x * math.cos(a) + y * math.sin(a), -x * math.sin(a) + y * math.cos(a)
    lat, lon = local_latlon(xr, yr, *centre)
    return tuple(zip(lat.tolist(), lon.tolist()))


def takeoff_at(x, y, centre=CENTRE):
    lat, lon = local_latlon(x, y, *centre)
    return float(lat), float(lon)


# --- geometry: count and length on rectangles --------------------------------------------

@pytest.mark.parametrize("width, spacing, count", [
    (1000.0, 100.0, 10),     # W/s whole: 10 strips, the outer lines s/2 inside the edges
    (1000.0, 120.0, 9),      # ceil(8.33) = 9
    (1000.0, 1500.0, 1),     # narrower than one strip: one line
    (999.0, 100.0, 10),      # ceil(9.99) = 10
])
def test_rectangle_line_count_and_length(width, spacing, count):
    # Convention of planning.survey: N = ceil(W / s) lines, centred, each the rectangle's
    # full length; arithmetic, no source needed beyond the convention.
    area = rectangle(width, 600.0)
    lay = lay_lines(area, spacing, 0.0, takeoff_at(-width, -400.0), centre=CENTRE)
    assert lay.rows == count and len(lay.lines) == count
    assert lay.width == pytest.approx(width, rel=1e-9)
    xs = np.array([ln.start_xy[0] for ln in lay.lines])
    gap = (width - (count - 1) * spacing) / 2
    # Rows from the take-off side (west), each the next one east, s apart.
    np.testing.assert_allclose(xs, -width / 2 + gap + spacing * np.arange(count), atol=1e-6)
    flat = [math.dist(ln.start_xy, ln.end_xy) for ln in lay.lines]
    np.testing.assert_allclose(flat, 600.0, atol=1e-6)        # exact within the plane
    assert lay.length == pytest.approx(600.0 * count, rel=1e-7)   # great circles
    # Boustrophedon: alternate courses 000 / 180, the first from the take-off (south)
    # end.
    courses = np.array([ln.course for ln in lay.lines])
    assert np.all(np.abs(((courses[::2] + 180) % 360) - 180) < 0.1)
    assert np.all(np.abs(courses[1::2] - 180.0) < 0.1)
    assert lay.turns == count - 1


def test_lines_along_the_other_axis_and_from_the_takeoff_corner():
    # Lines east-west (090) over a 800 m (east) x 500 m (north) field: 500 / 50 = 10 rows
    # of 800 m; take-off at the north-east corner: rows from the north, first line west.
    area = rectangle(800.0, 500.0)
    lay = lay_lines(area, 50.0, 90.0, takeoff_at(450.0, 300.0), centre=CENTRE)
    assert len(lay.lines) == 10
    ys = [ln.start_xy[1] for ln in lay.lines]
    np.testing.assert_allclose(ys, 225.0 - 50.0 * np.arange(10), atol=1e-6)
    assert lay.lines[0].start_xy[0] == pytest.approx(400.0, abs=1e-6)
    assert lay.lines[0].course == pytest.approx(270.0, abs=0.1)
    assert lay.length == pytest.approx(8000.0, rel=1e-7)


def _on_boundary_or_inside(p, poly, tol=1e-6):
    """Ray casting (inside) or distance to the nearest edge within tol [m]."""
    x, y = p
    a, b = poly, np.roll(poly, -1, axis=0)
    ab = b - a
    t = np.clip(((x - a[:, 0]) * ab[:, 0] + (y - a[:, 1]) * ab[:, 1])
                / np.sum(ab * ab, axis=1), 0, 1)
    d = np.hypot(a[:, 0] + t * ab[:, 0] - x, a[:, 1] + t * ab[:, 1] - y)
    if d.min() <= tol:
        return True
    crosses = ((a[:, 1] > y) != (b[:, 1] > y)) & (
        x < a[:, 0] + (y - a[:, 1]) * ab[:, 0] / np.where(ab[:, 1] == 0, 1, ab[:, 1]))
    return bool(np.count_nonzero(crosses) % 2)


@given(width=st.floats(200, 3000), height=st.floats(200, 3000), angle=st.floats(0, 180),
       direction=st.floats(0, 360), spacing=st.floats(20, 400))
def test_lines_lie_inside_and_cover_the_width(width, height, angle, direction, spacing):
    # Property: every end within 1e-6 m of the boundary or inside, every midpoint inside;
    # rows s apart, as many as ceil(W / s) with W the turned rectangle's width across the
    # lines (|w cos| + |h sin| of the angle between them: its extent on the normal).
    area = rectangle(width, height, angle)
    lay = lay_lines(area, spacing, direction, takeoff_at(0.0, -height), centre=CENTRE)
    poly = lay.area_xy
    rel = math.radians(direction - angle)
    across = abs(width * math.cos(rel)) + abs(height * math.sin(rel))
    assert lay.width == pytest.approx(across, rel=1e-9, abs=1e-6)
    assert lay.rows == max(1, math.ceil(across / spacing - 1e-6))
    for ln in lay.lines:
        for p in (ln.start_xy, ln.end_xy):
            assert _on_boundary_or_inside(p, poly)
        mid = np.add(ln.start_xy, ln.end_xy) / 2
        assert _on_boundary_or_inside(mid, poly, tol=0.0)
        # The ends as latitude and longitude are the plane's points.
        x, y = local_xy(*ln.start, *CENTRE)
        assert math.hypot(x - ln.start_xy[0], y - ln.start_xy[1]) < 1e-6
    rows = sorted({ln.row for ln in lay.lines})
    assert len(rows) <= lay.rows


def test_concave_area_lines_cut_into_pieces():
    # A U-shaped field (invented): a row across both arms is cut in two pieces, flown in
    # turn as two lines of that row.
    xy = np.array([[-300, -200], [300, -200], [300, 200], [100, 200], [100, 0],
                   [-100, 0], [-100, 200], [-300, 200]], dtype=float)
    lat, lon = local_latlon(xy[:, 0], xy[:, 1], *CENTRE)
    lay = lay_lines(list(zip(lat, lon)), 50.0, 90.0, takeoff_at(-350.0, -250.0),
                    centre=CENTRE)
    assert lay.rows == 8
    by_row = {}
    for ln in lay.lines:
        by_row.setdefault(ln.row, []).append(ln)
    pieces = sorted(len(v) for v in by_row.values())
    assert pieces == [1, 1, 1, 1, 2, 2, 2, 2]
    for ln in lay.lines:
        assert _on_boundary_or_inside(np.add(ln.start_xy, ln.end_xy) / 2, xy, tol=0.0)
    # Rows from the south (take-off side): 4 full rows of 600 m, then 4 of 2 x 200 m.
    assert lay.length == pytest.approx(4 * 600.0 + 4 * 400.0, rel=1e-7)


@pytest.mark.parametrize("direction", [0.0, 37.0, 90.0, 151.0])
def test_line_lengths_against_geographiclib(direction):
    # A 3 km x 2 km field: the great-circle length of each line (our haversine between
    # its ends) is the sphere's geodesic to rounding; the flat length the projection's
    # accuracy, (r/R)^2/6 with r < 1.9 km: 1.5e-8, checked at 5e-8; on WGS84 the sphere's
    # 0.6 %.
    area = rectangle(3000.0, 2000.0, 20.0)
    lay = lay_lines(area, 150.0, direction, takeoff_at(0.0, -1500.0))
    for ln in lay.lines:
        exact = SPHERE.Inverse(*ln.start, *ln.end)
        assert ln.length == pytest.approx(exact["s12"], rel=1e-9)
        assert ln.course == pytest.approx(exact["azi1"] % 360.0, abs=1e-6)
        flat = math.dist(ln.start_xy, ln.end_xy)
        assert flat == pytest.approx(exact["s12"], rel=5e-8)
        wgs = Geodesic.WGS84.Inverse(*ln.start, *ln.end)
        assert ln.length == pytest.approx(wgs["s12"], rel=6e-3)


def test_area_centre_across_the_antimeridian():
    # The normalised mean of unit vectors: a field straddling 180 deg is centred on it.
    lat, lon = area_centre([(10.0, 179.99), (10.0, -179.99), (10.01, -179.99),
                            (10.01, 179.99)])
    assert lat == pytest.approx(10.005, abs=1e-6)
    assert abs(abs(lon) - 180.0) < 1e-6


# --- the survey model's checks ----------------------------------------------------------

LEG = Leg("survey", 1.0, altitude=195.0, tas=18.0, elevation=95.0, max_agl=120.0)


@pytest.mark.parametrize("change, message", [
    (dict(area=((44.0, -101.0), (44.001, -101.0))), r"2 distinct vertices; it needs at "
                                                    r"least three"),
    (dict(area=((44.0, -101.0), (44.001, -101.001), (44.002, -101.002))),
     r"the area is empty"),
    (dict(area=((44.0, -101.0), (44.01, -101.01), (44.0, -101.01), (44.01, -101.0))),
     r"edges 1 and 3 cross: give the vertices in order"),
    (dict(area=rectangle(50000.0, 1000.0)), r"reaches 25\.0 km from its centre"),
    (dict(takeoff=(46.0, -101.2)), r"take-off is \d+ km from the area's centre"),
    (dict(spacing=0.0), r"line spacing 0 m must be positive"),
    (dict(direction_step=45.0), r"direction step 45 deg is not in 1\.\.30"),
    (dict(leg=replace(LEG, altitude=None)), r"a survey is flown at one altitude"),
])
def test_survey_checks(change, message):
    base = dict(area=rectangle(1000.0, 600.0), takeoff=takeoff_at(0, -400.0), spacing=50.0,
                leg=LEG)
    with pytest.raises(CruiseplanError, match=message):
        Survey(**{**base, **change})


# --- the physics: direction and packs ------------------------------------------------------

PROFILE = Profile(departure_elevation=85.0, arrival_elevation=85.0, climb_rate=3.0,
                  descent_rate=2.0, min_clearance=30.0, altitude_step=10.0, top=1000.0)


def survey_mission(airframe, area, takeoff, spacing, wind="calm", tas=None, direction=None,
                   **kw):
    af = cp.load_airframe(airframe)
    tas = tas or (18.0 if airframe == "demo-survey-drone" else 10.0)
    profile = (cp.WindProfile.calm() if wind == "calm" else parse_wind_profile(wind))
    leg = replace(LEG, tas=tas, wind=profile)
    survey = Survey(area, takeoff, spacing, leg, direction=direction, **kw)
    return Mission("test survey", af, (), Reserve("fraction", 0.25), PROFILE, survey=survey)


@pytest.mark.parametrize("airframe, wind, across", [
    ("demo-survey-drone", "270/8m/s@0m", 0.0),     # wind from the west: lines north-south
    ("demo-survey-drone", "000/8m/s@0m", 90.0),    # wind from the north: lines east-west
    ("demo-mapping-quad", "270/4m/s@0m", 0.0),
])
def test_least_energy_direction_is_across_the_wind(airframe, wind, across):
    # A square field (same line count both ways), take-off at its centre, a set airspeed:
    # by the wind triangle (FAA-H-8083-25 ch. 16) the lines across the wind cost least, so
    # the search (every 10 deg) lands on them.
    area = rectangle(1200.0, 1200.0)
    m = survey_mission(airframe, area, takeoff_at(0.0, 0.0), 100.0, wind=wind)
    direction, cands = best_direction(m)
    assert direction == pytest.approx(across)
    use = dict(zip(cands[:, 0], cands[:, 1]))
    along = (across + 90.0) % 180.0
    # Along the wind costs more, by less than the closed-form ratio of the line times,
    # V / sqrt(V^2 - w^2) (turns and transits dilute it). Oblique directions cost more
    # turns (more, shorter rows across a square), so they are not compared.
    v, w = (18.0, 8.0) if airframe == "demo-survey-drone" else (10.0, 4.0)
    assert 1.0 < use[along] / use[across] < v / math.sqrt(v * v - w * w)


def test_calm_direction_follows_the_long_axis():
    # In calm air every course costs the same per metre: the fewest turns win, lines along
    # the field's long (east-west) axis. Arithmetic, no source needed.
    m = survey_mission("demo-survey-drone", rectangle(2400.0, 600.0), takeoff_at(0, -400.0),
                       100.0)
    assert best_direction(m)[0] == pytest.approx(90.0)


@pytest.fixture(scope="module")
def drone_survey():
    """A 4 km x 1.2 km field for the survey drone at 40 m spacing: three packs."""
    area = rectangle(4000.0, 1200.0, 10.0)
    m = survey_mission("demo-survey-drone", area, takeoff_at(-2200.0, -700.0), 40.0,
                       wind="250/5m/s@0m,235/9m/s@100m", direction=100.0,
                       turn_distance=60.0)
    return m, plan_survey(m)


def test_packs_keep_the_reserve_and_are_greedy(drone_survey):
    m, sp = drone_survey
    assert sp.go and sp.reasons == ()
    assert len(sp.packs) >= 3
    n = len(sp.layout.lines)
    # Contiguous, every line once, in order.
    assert sp.packs[0].first == 1 and sp.packs[-1].last == n
    for a, b in zip(sp.packs, sp.packs[1:]):
        assert b.first == a.last + 1
    assert sp.swaps == tuple(p.last for p in sp.packs[:-1])
    for pack in sp.packs:
        plan = pack.plan
        # Each pack a GO plan keeping the mission's reserve policy (25 % of the pack).
        assert plan.go
        assert plan.reserve_required == pytest.approx(0.25 * m.airframe.propulsion
                                                      .store_capacity)
        assert plan.remaining >= plan.reserve_required
        assert pack.over_reserve == pytest.approx(plan.remaining - plan.reserve_required)
    # Greedy: one more line on any pack but the last would not keep the reserve, so no
    # split into whole lines in order needs fewer packs.
    for pack in sp.packs[:-1]:
        more = plan_mission(pack_mission(m, sp.layout, pack.first, pack.last + 1))
        assert not more.go and any("reserve" in r for r in more.reasons)
    assert sp.time == pytest.approx(sum(p.plan.time for p in sp.packs))


def test_grouped_legs_plan_as_line_by_line():
    # Lines and turns on one course planned as one leg use what they use leg by leg: at a
    # set TAS and a constant wind the use is the rate times length over ground speed
    # (battery: no mass change).
    area = rectangle(1500.0, 900.0)
    m = survey_mission("demo-survey-drone", area, takeoff_at(-900.0, -600.0), 60.0,
                       wind="250/6m/s@0m", direction=0.0, turn_distance=40.0)
    lay = lay_lines(area, 60.0, 0.0, m.survey.takeoff)
    grouped = plan_mission(pack_mission(m, lay, 1, len(lay.lines)))
    single = plan_mission(pack_mission(m, lay, 1, len(lay.lines), grouped=False))
    assert len(grouped.mission.legs) < len(single.mission.legs)
    assert grouped.used == pytest.approx(single.used, rel=1e-9)
    assert grouped.time == pytest.approx(single.time, rel=1e-9)
    assert grouped.distance == pytest.approx(single.distance, rel=1e-9)
    assert grouped.verdict == single.verdict


def test_a_line_no_pack_can_fly_is_no_go():
    # A 40 km line for the quadcopter: more than a pack holds; the survey says which line
    # and why, and plans no pack after it.
    area = rectangle(30.0, 36000.0)
    m = survey_mission("demo-mapping-quad", area, takeoff_at(0.0, -18100.0), 100.0,
                       direction=0.0)
    sp = plan_survey(m)
    assert not sp.go and sp.packs == ()
    assert "line 1 (36000 m) cannot be flown on one pack" in sp.reasons[0]
    text = survey_report(sp).render("text")
    assert "VERDICT: NO-GO: line 1" in text
    from cruiseplan import plots

    fig = plots.survey_plan_view(sp)
    labels = [t.get_text() for t in fig.axes[0].get_legend().get_texts()]
    assert "not planned: lines 1-1" in labels


def test_plan_survey_needs_a_survey():
    with pytest.raises(CruiseplanError, match=r"has no survey area; plan its legs"):
        plan_survey(load_mission("demo-survey-run"))


# --- the bundled survey, the report and the command line ------------------------------

@pytest.fixture(scope="module")
def demo():
    return plan_survey(load_mission("demo-field-survey"))


def test_bundled_survey_needs_two_to_four_packs(demo):
    assert demo.go and 2 <= len(demo.packs) <= 4
    assert demo.candidates is not None          # the direction was searched
    assert demo.mission.survey.spacing == pytest.approx(110.0 * (1 - 0.65))
    assert all(p.over_reserve >= 0 for p in demo.packs)


def test_survey_report_columns_add_up(demo):
    doc = json.loads(survey_report(demo).render("json"))
    names = [c["name"] for c in doc["columns"]]
    rows = [dict(zip(names, r)) for r in doc["rows"]]
    assert len(rows) == len(demo.packs)
    for row, pack in zip(rows, demo.packs):
        assert row["lines"] == f"{pack.first}-{pack.last}"
        assert row["over reserve"] == pytest.approx(row["remaining"] - row["reserve"])
        assert row["used"] == pytest.approx(pack.plan.used / 3600.0)
    assert rows[0]["note"].startswith(f"swap after line {demo.packs[0].last}")
    assert rows[-1]["note"] == "last pack"
    s = doc["summary"]
    assert s["packs"] == len(demo.packs) and s["swaps_after_lines"] == list(demo.swaps)
    assert doc["cautions"] == list(cp.CAUTIONS)
    csv = survey_report(demo).render("csv")
    assert csv.count("\n") > len(demo.packs) and "over reserve [Wh]" in csv


def test_cli_survey_text_json_and_plot(tmp_path, capsys):
    png = tmp_path / "field.png"
    assert main(["plan", "demo-field-survey", "--plot", str(png)]) == 0
    out = capsys.readouterr().out
    assert "Survey plan: demo-field-survey" in out and "VERDICT: GO:" in out
    assert "CAUTION:" in out and "swap after line" in out
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert main(["plan", "demo-field-survey", "--format", "json", "--oat", "0 degC"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["summary"]["verdict"] == "GO"
    assert any(line.startswith("What-if: OAT 0 degC") for line in doc["meta_text"])


def test_cli_survey_refuses_monte_carlo(tmp_path, capsys):
    out = tmp_path / "x.txt"
    assert main(["plan", "demo-field-survey", "--monte-carlo", "100", "-o", str(out)]) == 2
    assert "--monte-carlo: a survey mission" in capsys.readouterr().err
    assert not out.exists()


def test_plan_view_figure(demo):
    from cruiseplan import plots

    fig = plots.survey_plan_view(demo)
    ax = fig.axes[0]
    assert ax.get_xlabel() == "east of the area's centre [m]"
    assert ax.get_ylabel() == "north of the area's centre [m]"
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    assert sum(label.startswith("pack ") for label in labels) == len(demo.packs)
    assert "take-off and landing" in labels
    texts = [t.get_text() for t in fig.texts]
    assert any(t.startswith("Planning aid only") for t in texts)
    assert plots.figure_bytes(fig, "png")[:4] == b"\x89PNG"


# --- mission files ---------------------------------------------------------------------

SURVEY_FILE = """\
[mission]
airframe = "demo-mapping-quad"
battery = "100 %"

[profile]
departure_elevation = "402 m"
arrival_elevation = "402 m"

[survey]
{area}
takeoff = [44.30000, -101.20400]
footprint = "100 m"
side_overlap = "60 %"
direction = 30
turn = "{turn}"
altitude = "505 m"
speed = "9 m/s"
elevation = "412 m"
max_agl = "120 m"
wind = "300/4m/s@400m"
"""
AREA = "area = [[44.299, -101.203], [44.299, -101.197], [44.302, -101.197], [44.302, -101.203]]"


def geojson_polygon(ring, holes=()):
    return {"type": "Feature", "properties": {},
            "geometry": {"type": "Polygon",
                         "coordinates": [[[lon, lat] for lat, lon in ring]] + list(holes)}}


def test_survey_file_inline_and_from_geojson(tmp_path):
    m = read_mission(_write(tmp_path, "s.toml", SURVEY_FILE.format(area=AREA, turn="8 s")))
    s = m.survey
    assert m.legs == () and s.direction == 30.0 and s.turn_time == 8.0
    assert s.spacing == pytest.approx(40.0) and s.turn_distance == 0.0
    assert s.leg.altitude == pytest.approx(505.0) and s.leg.tas == pytest.approx(9.0)
    ring = [(44.299, -101.203), (44.299, -101.197), (44.302, -101.197), (44.302, -101.203),
            (44.299, -101.203)]
    _write(tmp_path, "field.geojson", json.dumps(geojson_polygon(ring)))
    m2 = read_mission(_write(tmp_path, "s2.toml", SURVEY_FILE.format(
        area='area_file = "field.geojson"', turn="30 m")))
    assert m2.survey.area == m.survey.area            # the closing vertex dropped
    assert m2.survey.turn_distance == 30.0 and m2.survey.area_source.endswith("field.geojson")


def _write(tmp_path, name, text):
    p = tmp_path / name
    p.write_text(text, encoding="utf-8")
    return p


SURVEY_BAD = [
    (SURVEY_FILE.format(area="", turn="8 s"), r"\[survey\] area: give either area"),
    (SURVEY_FILE.format(area=AREA + '\narea_file = "f.geojson"', turn="8 s"),
     r"\[survey\] area: give either area"),
    (SURVEY_FILE.format(area=AREA, turn="8 kg"), r"\[survey\] turn: '8 kg' should be a "
                                                 r"distance \('40 m'\) or a time"),
    (SURVEY_FILE.format(area=AREA, turn="8 s").replace('footprint = "100 m"\n',
                                                       'spacing = "30 m"\nfootprint = "100 m"\n'),
     r"\[survey\] spacing: give either spacing or footprint"),
    (SURVEY_FILE.format(area=AREA, turn="8 s").replace('side_overlap = "60 %"\n', ""),
     r"\[survey\] spacing: missing; give spacing"),
    (SURVEY_FILE.format(area=AREA, turn="8 s").replace('altitude = "505 m"\n', ""),
     r"\[survey\] altitude: missing; a survey is flown at one altitude"),
    (SURVEY_FILE.format(area=AREA, turn="8 s").replace("takeoff = [44.30000, -101.20400]\n",
                                                       ""), r"\[survey\] takeoff: missing"),
    (SURVEY_FILE.format(area="area = [[44.299, -101.203], [44.302, -101.197], "
                             "[44.299, -101.197], [44.302, -101.203]]", turn="8 s"),
     r"\[survey\]: the area's edges 1 and 3 cross"),
    (SURVEY_FILE.format(area="area = [[44.299, -101.203], [95, -101.197], [44.302, -101.2]]",
                        turn="8 s"), r"\[survey\] area vertex 2: \[95, -101\.197\] should be"),
    (SURVEY_FILE.format(area=AREA, turn="8 s") + '\n[[legs]]\ndistance = "1 km"\n',
     r"\[survey\]: a survey mission lays its own legs"),
    (SURVEY_FILE.format(area='area_file = "hole.geojson"', turn="8 s"),
     r"\[survey\] area_file: .*hole\.geojson: Polygon has 1 hole\(s\)"),
    (SURVEY_FILE.format(area='area_file = "line.geojson"', turn="8 s"),
     r"\[survey\] area_file: .*line\.geojson: no Polygon \(found LineString\)"),
    (SURVEY_FILE.format(area='area_file = "bad.geojson"', turn="8 s"),
     r"\[survey\] area_file: .*bad\.geojson: not valid JSON"),
]


@pytest.mark.parametrize("text, message", SURVEY_BAD)
def test_survey_file_errors(tmp_path, capsys, text, message):
    ring = [(44.299, -101.203), (44.299, -101.197), (44.302, -101.197), (44.299, -101.203)]
    hole = [[[-101.2, 44.3], [-101.199, 44.3], [-101.199, 44.301], [-101.2, 44.3]]]
    _write(tmp_path, "hole.geojson", json.dumps(geojson_polygon(ring, hole)))
    _write(tmp_path, "line.geojson", json.dumps({"type": "LineString",
                                                 "coordinates": [[-101.2, 44.3],
                                                                 [-101.1, 44.3]]}))
    _write(tmp_path, "bad.geojson", '{"type": "Polygon", "coordinates": [[[-101.2, 44.3]')
    path = _write(tmp_path, "s.toml", text)
    with pytest.raises(MissionFileError, match=r"s\.toml: " + message):
        read_mission(path)
    out = tmp_path / "out.txt"
    assert main(["plan", str(path), "-o", str(out)]) == 2
    assert len(capsys.readouterr().err.strip().splitlines()) == 1
    assert not out.exists()
