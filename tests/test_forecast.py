"""Winds and temperatures from a gridded forecast (CF netCDF): reading, sampling, planning.

Every forecast file is built here with xarray and written with h5netcdf into tmp_path.
"""

from __future__ import annotations

import dataclasses
import json
import re
import subprocess
import sys
import textwrap
import warnings
from dataclasses import replace

import numpy as np
import pytest

xr = pytest.importorskip("xarray")
pytest.importorskip("h5netcdf")

from cruiseplan.cautions import FORECAST_CAUTION  # noqa: E402
from cruiseplan.cli import main  # noqa: E402
from cruiseplan.errors import CruiseplanError, CruiseplanWarning, ForecastFileError  # noqa: E402
from cruiseplan.io import forecast_file  # noqa: E402
from cruiseplan.io.forecast_file import read_forecast  # noqa: E402
from cruiseplan.io.mission_file import read_mission  # noqa: E402
from cruiseplan.io.text import parse_utc_time  # noqa: E402
from cruiseplan.model.mission import Leg, place_legs  # noqa: E402
from cruiseplan.physics.atmosphere import (  # noqa: E402
    isa_temperature_pressure,
    pressure_altitude_from_pressure,
)
from cruiseplan.physics.forecast import GriddedWeather, wind_from  # noqa: E402
from cruiseplan.physics.geo import destination_point  # noqa: E402
from cruiseplan.physics.winds import WindProfile  # noqa: E402
from cruiseplan.planning.forecast import (  # noqa: E402
    leg_midpoint,
    leg_times,
    leg_winds,
    plan_with_forecast,
)
from cruiseplan.planning.mission import plan_mission  # noqa: E402

T0 = parse_utc_time("2026-12-03T00:00Z")
DEPARTURE = "2026-12-03T06:00Z"
HOURS = np.array([0.0, 6.0, 12.0])
LEVELS = np.array([0.0, 1000.0, 2000.0, 3000.0, 4000.0])
LATS = np.array([44.0, 45.0, 46.0, 47.0])
LONS = np.array([6.0, 7.0, 8.0, 9.0])

MISSION = """\
[mission]
airframe = "demo-trainer"
fuel = "100 %"
payload = "165 kg"

[day]
isa_dev = "0 K"
{day}

[profile]
departure_elevation = "500 ft"
arrival_elevation = "500 ft"

[reserve]
time = "45 min"

[reserve.alternate]
name = "divert"
distance = "15 nm"
course = 270
altitude = "3000 ft"

[[legs]]
name = "out"
from = [45.0, 7.0]
to = [45.6, 7.8]
elevation = "1000 ft"
altitude = "4500 ft"
{speed}

[[legs]]
name = "on"
distance = "30 nm"
course = 200
elevation = "1000 ft"
altitude = "{alt2}"
power = "65 %"
"""


def mission_file(tmp_path, day="", speed='speed = "best"', alt2="best"):
    path = tmp_path / "mission.toml"
    path.write_text(MISSION.format(day=day, speed=speed, alt2=alt2))
    return path


def grid(hours=HOURS, levels=LEVELS, lats=LATS, lons=LONS):
    """(hours since T0, level, lat, lon) broadcast to the 4-D grid."""
    return np.meshgrid(hours, levels, lats, lons, indexing="ij")


def write_forecast(path, u, v, ta, *, hours=HOURS, levels=LEVELS, lats=LATS, lons=LONS,
                   level_attrs=None, units=None, drop=(), time_units="hours since "
                   "2026-12-03 00:00:00"):
    """A CF netCDF-4 file of u, v [m/s] and T [K] on (time, level, lat, lon)."""
    units = {"u": "m s-1", "v": "m s-1", "ta": "K", **(units or {})}
    dims = ("time", "level", "lat", "lon")
    names = {"u": "eastward_wind", "v": "northward_wind", "ta": "air_temperature"}
    data = {}
    for key, values in (("u", u), ("v", v), ("ta", ta)):
        if key in drop:
            continue
        attrs = {"standard_name": names[key]}
        if units[key] is not None:
            attrs["units"] = units[key]
        data[key] = (dims, np.asarray(values, dtype=float), attrs)
    coords = {
        "time": ("time", np.asarray(hours, dtype=float),
                 {"standard_name": "time", "units": time_units}),
        "level": ("level", np.asarray(levels, dtype=float),
                  level_attrs or {"standard_name": "altitude", "units": "m",
                                  "positive": "up"}),
        "lat": ("lat", np.asarray(lats, dtype=float),
                {"standard_name": "latitude", "units": "degrees_north"}),
        "lon": ("lon", np.asarray(lons, dtype=float),
                {"standard_name": "longitude", "units": "degrees_east"}),
    }
    ds = xr.Dataset(data, coords=coords, attrs={"Conventions": "CF-1.10"})
    ds.to_netcdf(path, engine="h5netcdf")
    return path


def isa_plus(dev, levels=LEVELS, shape_from=None):
    _, z, _, _ = grid(levels=levels) if shape_from is None else shape_from
    return isa_temperature_pressure(z)[0] + dev


def uniform(tmp_path, direction=270.0, speed=20.0, dev=0.0):
    d = np.radians(direction)
    t, z, la, lo = grid()
    u = np.full(t.shape, -speed * np.sin(d)) if direction != 270.0 else np.full(t.shape,
                                                                                 speed)
    v = np.full(t.shape, -speed * np.cos(d)) if direction != 270.0 else np.zeros(t.shape)
    return write_forecast(tmp_path / "uniform.nc", u, v, isa_plus(dev))


def fields_equal(a, b, rtol=0.0):
    """Two sequences of dataclasses equal field by field (NaN equal to NaN)."""
    assert len(a) == len(b)
    for x, y in zip(a, b):
        for f in dataclasses.fields(x):
            p, q = getattr(x, f.name), getattr(y, f.name)
            if isinstance(p, float):
                if rtol:
                    np.testing.assert_allclose(p, q, rtol=rtol, atol=1e-12, err_msg=f.name)
                else:
                    assert p == q or (np.isnan(p) and np.isnan(q)), (f.name, p, q)
            else:
                assert p == q, (f.name, p, q)


def same_plan(a, b, rtol=0.0):
    fields_equal(a.segments, b.segments, rtol)
    np.testing.assert_allclose(a.leg_altitudes, b.leg_altitudes, rtol=rtol)
    np.testing.assert_allclose(a.leg_speeds, b.leg_speeds, rtol=rtol)
    np.testing.assert_allclose(a.reserve.amount, b.reserve.amount, rtol=rtol)
    assert a.reasons == b.reasons


def test_wind_from_is_the_meteorological_convention():
    # u eastward, v northward; a wind from the west blows east (WMO-No. 306).
    d, s = wind_from([20.0, 0.0, -3.0, 0.0], [0.0, 20.0, 0.0, -4.0])
    np.testing.assert_array_equal(d, [270.0, 180.0, 90.0, 0.0])
    np.testing.assert_array_equal(s, [20.0, 20.0, 3.0, 4.0])


# --- legs placed on the map ---------------------------------------------------------------

def test_legs_get_positions_from_waypoints_and_dead_reckoning(tmp_path):
    m = read_mission(mission_file(tmp_path))
    out, on = m.legs
    assert out.start == (45.0, 7.0) and out.end == (45.6, 7.8)
    assert on.start == out.end
    lat, lon = destination_point(45.6, 7.8, 200.0, 30 * 1852.0)
    assert on.end == (float(lat), float(lon))
    # A hover holds its point; legs before any position stay unplaced.
    hover = Leg("hold", 0.0, kind="hover", duration=60.0)
    first = Leg("first", 1000.0, course=90.0)
    legs = place_legs([first, replace(out, start=(45.0, 7.0), end=None), hover])
    assert legs[0].start is None and legs[0].end is None
    assert legs[2].start == legs[2].end == legs[1].end


def test_route_file_legs_carry_their_points(tmp_path):
    (tmp_path / "r.geojson").write_text(
        '{"type": "LineString", "coordinates": [[7.0, 45.0], [7.5, 45.3], [8.0, 45.2]]}')
    path = tmp_path / "route.toml"
    text = MISSION.format(day="", speed='speed = "best"', alt2="best")
    head = text.split("[[legs]]")[0]
    path.write_text(head + '[route]\nfile = "r.geojson"\naltitude = "4500 ft"\n'
                           'elevation = "1000 ft"\n')
    legs = read_mission(path).legs
    assert [leg.start for leg in legs] == [(45.0, 7.0), (45.3, 7.5)]
    assert [leg.end for leg in legs] == [(45.3, 7.5), (45.2, 8.0)]


def test_a_leg_position_must_be_a_latitude_and_longitude():
    with pytest.raises(CruiseplanError, match=r"leg 'a': start \(95.0, 7.0\) is not"):
        Leg("a", 1000.0, start=(95.0, 7.0))


# --- sampling -------------------------------------------------------------------------------

def linear_fields():
    """u, v [m/s] and the ISA deviation [K], linear in hours, level, lat and lon."""
    def u(h, z, la, lo):
        return 3.0 + 0.5 * h + 0.004 * z - 1.5 * (la - 45.0) + 2.0 * (lo - 7.0)

    def v(h, z, la, lo):
        return -2.0 - 0.25 * h + 0.002 * z + 0.75 * (la - 45.0) - 0.5 * (lo - 7.0)

    def dev(h, z, la, lo):
        return 4.0 + 0.1 * h - 0.001 * z + 0.2 * (la - 45.0) + 0.3 * (lo - 7.0)

    return u, v, dev


def test_a_linear_field_is_reproduced(tmp_path):
    u, v, dev = linear_fields()
    g = grid()
    w = read_forecast(write_forecast(tmp_path / "lin.nc", u(*g), v(*g),
                                     isa_temperature_pressure(g[1])[0] + dev(*g)))
    rng = np.random.default_rng(7)
    n = 200
    h = rng.uniform(0, 12, n)
    z = rng.uniform(0, 4000, n)
    la = rng.uniform(44, 47, n)
    lo = rng.uniform(6, 9, n)
    t = T0 + h * 3600.0
    h = (t - T0) / 3600.0   # the hours as the epoch seconds hold them (2.4e-7 s apart)
    su, sv, st = w.sample(la, lo, t, z)
    np.testing.assert_allclose(su, u(h, z, la, lo), rtol=1e-12, atol=1e-12)
    np.testing.assert_allclose(sv, v(h, z, la, lo), rtol=1e-12, atol=1e-12)
    # Below 11 km the ISA is linear in pressure altitude, so T is linear too.
    np.testing.assert_allclose(st, isa_temperature_pressure(z)[0] + dev(h, z, la, lo),
                               rtol=1e-12)
    # Beyond the levels the winds and the deviation hold their end values.
    top = w.sample(45.5, 7.5, T0 + 3600.0, [4000.0, 6000.0])
    np.testing.assert_array_equal(top[0][0], top[0][1])
    assert w.isa_deviation(45.5, 7.5, T0, 6000.0) == w.isa_deviation(45.5, 7.5, T0, 4000.0)


def test_winds_along_a_route_equal_the_analytic_field(tmp_path):
    u, v, dev = linear_fields()
    g = grid()
    w = read_forecast(write_forecast(tmp_path / "lin.nc", u(*g), v(*g),
                                     isa_temperature_pressure(g[1])[0] + dev(*g)))
    dep = parse_utc_time(DEPARTURE)
    plan = plan_with_forecast(read_mission(mission_file(tmp_path)), w, dep)
    times = leg_times(plan, dep).mean(axis=1)
    legs = plan.mission.legs
    for leg, t, wind in zip(legs, times, leg_winds(legs, w, times)):
        la, lo = leg_midpoint(leg)
        h = (t - T0) / 3600.0
        north, east = wind.vector(LEVELS)
        np.testing.assert_allclose(east, u(h, LEVELS, la, lo), rtol=1e-12, atol=1e-12)
        np.testing.assert_allclose(north, v(h, LEVELS, la, lo), rtol=1e-12, atol=1e-12)
        # The plan flew the winds of the times of the plan before it, within 1 s of
        # these: u and v change by at most 0.5 m/s an hour, 1.4e-4 m/s a second.
        np.testing.assert_allclose(np.column_stack(leg.wind.vector(LEVELS)),
                                   np.column_stack([north, east]), rtol=0, atol=1.4e-4)
    # The alternate starts at the route's end and takes the winds at the arrival time.
    alt = plan.mission.reserve.alternate
    assert alt.start == legs[-1].end
    la, lo = leg_midpoint(alt)
    h = (leg_times(plan, dep)[-1, 1] - T0) / 3600.0
    north, east = alt.wind.vector(LEVELS)
    np.testing.assert_allclose(east, u(h, LEVELS, la, lo), rtol=0, atol=1.4e-4)
    np.testing.assert_allclose(north, v(h, LEVELS, la, lo), rtol=0, atol=1.4e-4)
    # The day: the deviation at each leg's midpoint, mid-time and altitude, time-weighted.
    edges = leg_times(plan, dep)
    weights = edges[:, 1] - edges[:, 0]
    mids = np.array([leg_midpoint(leg) for leg in plan.mission.legs])
    devs = dev((edges.mean(axis=1) - T0) / 3600.0, np.array(plan.leg_altitudes), mids[:, 0],
               mids[:, 1])
    # The plan's deviation came from the times of the plan before it, within 1 s of these.
    assert plan.mission.isa_dev == pytest.approx(np.sum(devs * weights) / np.sum(weights),
                                                 abs=1e-3)
    assert "leg times settled within 1 s" in plan.mission.weather[1]


def test_pressure_levels_and_decreasing_coordinates(tmp_path):
    # Pressures from the ground up and latitudes from north to south, as many files have
    # them; the reader orders both and converts the pressures exactly.
    hpa = np.array([1000.0, 900.0, 800.0, 700.0])
    lats = LATS[::-1]
    t, z, la, lo = np.meshgrid(HOURS, hpa, lats, LONS, indexing="ij")
    u = 1000.0 - z + la        # tags each level and latitude
    path = write_forecast(tmp_path / "p.nc", u, np.zeros(u.shape), np.full(u.shape, 270.0),
                          levels=hpa, lats=lats,
                          level_attrs={"standard_name": "air_pressure", "units": "hPa",
                                       "positive": "down"})
    w = read_forecast(path)
    np.testing.assert_array_equal(w.levels, pressure_altitude_from_pressure(hpa * 100.0))
    np.testing.assert_array_equal(w.latitudes, LATS)
    su, _, st = w.sample(46.0, 7.0, T0, w.levels[2])
    assert su == 1000.0 - 800.0 + 46.0
    assert st == pytest.approx(270.0, abs=1e-9)


def test_dimensions_in_any_order_and_coordinates_by_axis_or_units(tmp_path):
    u, v, dev = linear_fields()
    g = grid()
    ref = read_forecast(write_forecast(tmp_path / "ref.nc", u(*g), v(*g),
                                       isa_temperature_pressure(g[1])[0] + dev(*g)))
    ds = xr.open_dataset(tmp_path / "ref.nc").load()
    ds = ds.transpose("lat", "lon", "level", "time")
    ds["lat"].attrs = {"units": "degrees_north"}            # by its units (CF 4.1)
    ds["lon"].attrs = {"axis": "X", "units": "degrees_east"}  # by its axis
    ds = ds.assign_coords(level=ds["level"] / 0.3048)
    ds["level"].attrs = {"axis": "Z", "units": "ft"}          # by axis and units: feet
    ds.to_netcdf(tmp_path / "other.nc", engine="h5netcdf")
    w = read_forecast(tmp_path / "other.nc")
    np.testing.assert_allclose(w.levels, LEVELS, rtol=1e-15, atol=1e-12)
    np.testing.assert_array_equal(w.u, ref.u)
    np.testing.assert_array_equal(w.temperature, ref.temperature)


@pytest.mark.parametrize("lons, point", [([350.0, 355.0, 0.0, 5.0], -2.5),
                                         ([-10.0, -5.0, 0.0, 5.0], 357.5),
                                         ([170.0, 175.0, -180.0, -175.0], 177.5)])
def test_longitude_conventions(tmp_path, lons, point):
    t, z, la, lo = np.meshgrid(HOURS, LEVELS, LATS, np.arange(4.0), indexing="ij")
    w = read_forecast(write_forecast(tmp_path / "lon.nc", 10.0 * lo, np.zeros(lo.shape),
                                     isa_plus(0.0), lons=lons))
    # Halfway between the second and third columns (tagged 10 and 20).
    assert w.sample(45.0, point, T0, 0.0)[0] == pytest.approx(15.0, abs=1e-9)


def test_a_global_grid_wraps_around(tmp_path):
    lons = np.arange(0.0, 360.0, 10.0)
    t, z, la, lo = np.meshgrid(HOURS, LEVELS, LATS, lons, indexing="ij")
    w = read_forecast(write_forecast(tmp_path / "g.nc", lo, np.zeros(lo.shape),
                                     isa_temperature_pressure(z)[0], lons=lons))
    # Between 350 (u = 350) and 360, the first column again (u = 0).
    assert w.sample(45.0, 355.0, T0, 0.0)[0] == pytest.approx(175.0, abs=1e-9)
    assert w.sample(45.0, -5.0, T0, 0.0)[0] == pytest.approx(175.0, abs=1e-9)


def test_a_point_outside_says_where_the_forecast_is(tmp_path):
    w = read_forecast(uniform(tmp_path))
    with pytest.raises(ForecastFileError, match=r"point 50.0000 N 7.0000 E at "
                       r"2026-12-03T01:00Z is outside the area .*latitude 44..47 deg, "
                       r"longitude 6..9 deg, 2026-12-03T00:00Z to 2026-12-03T12:00Z"):
        w.sample([45.0, 50.0], 7.0, T0 + 3600.0, 0.0)
    with pytest.raises(ForecastFileError, match=r"point 33.5000 S 172.2500 W at "):
        w.sample(-33.5, 187.75, T0, 0.0)
    with pytest.raises(ForecastFileError, match=r"at 2026-12-03T13:00Z is outside the time"):
        w.sample(45.0, 7.0, T0 + 13 * 3600.0, 0.0)


def test_a_leg_outside_is_named(tmp_path):
    # The area holds the first leg's start and midpoint but not the second leg's midpoint.
    lats, lons = [44.9, 45.45], [6.9, 7.5]
    t, z, la, lo = grid(lats=lats, lons=lons)
    path = write_forecast(tmp_path / "small.nc", np.zeros(t.shape), np.zeros(t.shape),
                          isa_temperature_pressure(z)[0], lats=lats, lons=lons)
    with pytest.raises(ForecastFileError, match=r"small.nc: point 45.3\d+ N 7.6\d+ E at "
                       r"2026-12-03T06:00Z is outside the area .*; at the midpoint of leg "
                       r"'on' at its planned mid-time$"):
        plan_with_forecast(read_mission(mission_file(tmp_path)), read_forecast(path),
                           parse_utc_time(DEPARTURE))


def test_gridded_weather_needs_finite_values():
    t, z, la, lo = grid()
    u = np.zeros(t.shape)
    u[1, 2, 1, 1] = np.inf
    with pytest.raises(ForecastFileError, match=r"here: u: 1 values are not finite"):
        GriddedWeather(T0 + HOURS * 3600, LEVELS, LATS, LONS, u, np.zeros(t.shape),
                       np.full(t.shape, 280.0), source="here")


# --- planning -------------------------------------------------------------------------------

def typed(mission, wind, isa_dev=0.0):
    alternate = replace(mission.reserve.alternate, wind=wind)
    return replace(mission, legs=tuple(replace(leg, wind=wind) for leg in mission.legs),
                   isa_dev=isa_dev, reserve=replace(mission.reserve, alternate=alternate))


def test_a_uniform_field_plans_exactly_as_the_same_typed_wind(tmp_path):
    # From 270 deg at 20 m/s: u = 20, v = 0 round-trips to exactly 270 and 20.
    m = read_mission(mission_file(tmp_path))
    w = read_forecast(uniform(tmp_path))
    plan = plan_with_forecast(m, w, parse_utc_time(DEPARTURE))
    same_plan(plan, plan_mission(typed(m, WindProfile((0.0,), (270.0,), (20.0,)))))
    assert plan.mission.isa_dev == 0.0
    assert plan.mission.weather[0].startswith("winds aloft and ISA +0.0 K from forecast "
                                                "uniform.nc for departure "
                                                "2026-12-03T06:00Z")
    assert "after 2 plans" in plan.mission.weather[1]
    assert plan.mission.weather[2] == FORECAST_CAUTION


def test_a_uniform_field_of_any_direction_plans_as_the_typed_wind(tmp_path):
    # A general direction round-trips through u, v to within rounding, so the plans agree
    # to 1e-12 relative (fixed altitudes and speeds: no search to amplify the rounding).
    m = read_mission(mission_file(tmp_path, speed='speed = "100 kt"', alt2="3500 ft"))
    w = read_forecast(uniform(tmp_path, direction=237.3, speed=17.1))
    plan = plan_with_forecast(m, w, parse_utc_time(DEPARTURE))
    same_plan(plan, plan_mission(typed(m, WindProfile((0.0,), (237.3,), (17.1,)))),
              rtol=1e-12)


def test_a_field_at_isa_plus_10_plans_as_isa_dev_10(tmp_path):
    # T = T_ISA + 10 K at every level: the deviation read back is 10 K to rounding
    # (1e-13 K), so the plans agree to 1e-9 relative.
    m = read_mission(mission_file(tmp_path))
    w = read_forecast(uniform(tmp_path, dev=10.0))
    plan = plan_with_forecast(m, w, parse_utc_time(DEPARTURE))
    assert plan.mission.isa_dev == pytest.approx(10.0, abs=1e-9)
    same_plan(plan, plan_mission(typed(m, WindProfile((0.0,), (270.0,), (20.0,)), 10.0)),
              rtol=1e-9)


def test_unsettled_times_are_said(tmp_path):
    u, v, dev = linear_fields()
    g = grid()
    w = read_forecast(write_forecast(tmp_path / "lin.nc", u(*g), v(*g),
                                     isa_temperature_pressure(g[1])[0] + dev(*g)))
    with pytest.warns(CruiseplanWarning, match="NOT settled"):
        plan = plan_with_forecast(read_mission(mission_file(tmp_path)), w,
                                  parse_utc_time(DEPARTURE), max_iterations=1)
    assert plan.mission.weather[1].startswith("leg times NOT settled")


def test_a_forecast_needs_the_first_leg_placed(tmp_path):
    m = read_mission(mission_file(tmp_path))
    m = replace(m, legs=tuple(replace(leg, start=None, end=None) for leg in m.legs))
    w = read_forecast(uniform(tmp_path))
    with pytest.raises(CruiseplanError, match=r"mission.toml: leg 'out' has no position: "
                                              r"a forecast"):
        plan_with_forecast(m, w, parse_utc_time(DEPARTURE))
    with pytest.raises(CruiseplanError, match=r"needs the departure time"):
        plan_with_forecast(read_mission(mission_file(tmp_path)), w)


def test_the_core_imports_and_plans_without_xarray():
    code = textwrap.dedent("""
        import sys
        sys.modules["xarray"] = None   # as if not installed
        import cruiseplan as cp
        from cruiseplan.planning.mission import plan_mission
        from cruiseplan.planning.forecast import plan_with_forecast
        from cruiseplan.io.forecast_file import read_forecast
        from cruiseplan.errors import ForecastFileError
        assert plan_mission(cp.load_mission("demo-cross-country")).go
        try:
            read_forecast("any.nc")
        except ForecastFileError as exc:
            print(exc)
    """)
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout
    assert out.strip() == ("any.nc: reading a forecast needs xarray and h5netcdf: pip "
                           "install 'cruiseplan[forecast]'")


# --- bad files ------------------------------------------------------------------------------

def _bad_files():
    t, z, la, lo = grid()
    zero = np.zeros(t.shape)
    ta = isa_plus(0.0)
    nan_u = zero.copy()
    nan_u[2, 1, 1, 1] = np.nan
    return {
        "missing variable": (dict(u=zero, v=zero, ta=ta, drop=("ta",)),
                             r"no variable with standard_name 'air_temperature'; expected "
                             r"the air temperature"),
        "wrong units": (dict(u=zero, v=zero, ta=ta, units={"u": "furlong/fortnight"}),
                        r"u: units 'furlong/fortnight' not accepted; expected one of "
                        r"'m s-1'"),
        "missing units": (dict(u=zero, v=zero, ta=ta, units={"ta": None}),
                          r"ta: no units attribute; expected one of 'K'"),
        "no overlap in area": (dict(u=zero, v=zero, ta=ta, lats=LATS + 20.0),
                               r"point 45\.\d+ N 7\.\d+ E at 2026-12-03T\S+ is outside the "
                               r"area of the forecast \(latitude 64..67 deg.*\); at the start "
                               r"of leg 'out' at departure$"),
        "no overlap in time": (dict(u=zero, v=zero, ta=ta,
                                    time_units="hours since 2020-01-01 00:00:00"),
                               r"is outside the time span of the forecast \(.*"
                               r"2020-01-01T00:00Z to 2020-01-01T12:00Z.*\); at the start"),
        "NaN in winds": (dict(u=nan_u, v=zero, ta=ta),
                         r"u: 1 of 240 values are missing or not finite"),
        "non-monotonic": (dict(u=zero, v=zero, ta=ta, lats=[44.0, 46.0, 45.0, 47.0]),
                          r"lat: coordinate values are not strictly monotonic"),
        "height above ground": (dict(u=zero, v=zero, ta=ta,
                                     level_attrs={"standard_name": "height", "units": "m"}),
                                r"level: standard_name 'height' is height above the surface"),
    }


BAD = _bad_files()


@pytest.mark.parametrize("case", list(BAD))
def test_a_bad_file_is_one_line_and_exit_2(tmp_path, capsys, case):
    kwargs, message = BAD[case]
    nc = write_forecast(tmp_path / "bad.nc", **kwargs)
    mission = mission_file(tmp_path)
    out = tmp_path / "plan.txt"
    status = main(["plan", str(mission), "--forecast", str(nc), "--departure", DEPARTURE,
                   "--output", str(out)])
    _, err = capsys.readouterr()
    assert status == 2
    assert err.count("\n") == 1 and "Traceback" not in err, err
    assert err.startswith(f"cruiseplan: error: {nc}: ")
    assert re.search(message, err), err
    assert not out.exists()


def test_unreadable_and_oversized_files(tmp_path, monkeypatch):
    junk = tmp_path / "junk.nc"
    junk.write_bytes(b"not a netCDF file at all\n" * 10)
    with pytest.raises(ForecastFileError, match=r"junk.nc: cannot read it as netCDF"):
        read_forecast(junk)
    with pytest.raises(ForecastFileError, match=r"none.nc: no such file"):
        read_forecast(tmp_path / "none.nc")
    monkeypatch.setattr(forecast_file, "MAX_FILE_BYTES", 100)
    with pytest.raises(ForecastFileError, match=r"larger than the 0 MB read; cut the"):
        read_forecast(uniform(tmp_path))


def test_netcdf3_reads_as_netcdf4(tmp_path):
    u, v, dev = linear_fields()
    g = grid()
    nc4 = write_forecast(tmp_path / "four.nc", u(*g), v(*g),
                         isa_temperature_pressure(g[1])[0] + dev(*g))
    with xr.open_dataset(nc4) as ds:
        ds.load().to_netcdf(tmp_path / "three.nc", engine="scipy")   # netCDF-3 classic
    assert (tmp_path / "three.nc").read_bytes()[:3] == b"CDF"
    a, b = read_forecast(nc4), read_forecast(tmp_path / "three.nc")
    for name in ("times", "levels", "latitudes", "longitudes", "u", "v", "temperature"):
        np.testing.assert_array_equal(getattr(a, name), getattr(b, name), err_msg=name)


def test_knots_and_celsius_are_converted(tmp_path):
    t, z, la, lo = grid()
    path = write_forecast(tmp_path / "kt.nc", np.full(t.shape, 10.0), np.zeros(t.shape),
                          np.full(t.shape, 15.0), units={"u": "knots", "ta": "degC"})
    su, _, st = read_forecast(path).sample(45.0, 7.0, T0, LEVELS[1])
    assert su == pytest.approx(10 * 1852.0 / 3600.0, rel=1e-15)
    assert st == pytest.approx(288.15, abs=1e-9)


# --- mission file and command line --------------------------------------------------------

def test_mission_file_forecast_and_departure(tmp_path, capsys):
    uniform(tmp_path, dev=10.0)
    path = mission_file(tmp_path, day='forecast = "uniform.nc"\n'
                                      'departure = "2026-12-03T06:00Z"')
    m = read_mission(path)
    assert m.forecast == str(tmp_path / "uniform.nc")
    assert m.departure == parse_utc_time(DEPARTURE)
    status = main(["plan", str(path)])
    out, err = capsys.readouterr()
    assert status == 0, err
    assert "Weather: winds aloft and ISA +10.0 K from forecast uniform.nc for departure " \
           "2026-12-03T06:00Z, replacing the mission file's winds" in out
    assert "What-if" not in out
    assert "Day: ISA +10.0 K" in out
    # Cautions stay on the plan, and the forecast's own.
    assert "not a substitute for the approved flight manual" in out
    assert "a forecast is a forecast: official weather briefings and the flight manual " \
           "come first" in out


@pytest.mark.parametrize("day, argv, message", [
    ('forecast = "uniform.nc"', [], r"\[day\] departure: missing; a forecast is sampled"),
    ('departure = "2026-12-03T06:00"', [], r"\[day\] departure: .*has no time zone"),
    ("", ["--departure", DEPARTURE], r"--departure: goes with a forecast"),
    ("", ["--forecast", "uniform.nc"], r"--forecast: needs the departure time"),
    ("", ["--forecast", "uniform.nc", "--departure", DEPARTURE, "--wind", "270/20@3000ft"],
     r"--wind: a forecast \(--forecast\) gives the winds and temperatures"),
    ("", ["--forecast", "uniform.nc", "--departure", "tomorrow"],
     r"--departure: 'tomorrow' is not a date and time"),
])
def test_forecast_options_that_cannot_be_planned(tmp_path, capsys, monkeypatch, day, argv,
                                                 message):
    uniform(tmp_path)
    monkeypatch.chdir(tmp_path)
    status = main(["plan", str(mission_file(tmp_path, day=day)), *argv])
    _, err = capsys.readouterr()
    assert status == 2 and err.count("\n") == 1, err
    assert re.search(message, err), err


def test_cli_forecast_equals_the_api(tmp_path, capsys):
    nc = uniform(tmp_path, direction=250.0, speed=12.0, dev=-5.0)
    path = mission_file(tmp_path)
    status = main(["plan", str(path), "--forecast", str(nc), "--departure", DEPARTURE,
                   "--format", "json"])
    out, err = capsys.readouterr()
    assert status == 0, err
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        plan = plan_with_forecast(read_mission(path), read_forecast(nc),
                                  parse_utc_time(DEPARTURE))
    doc = json.loads(out)
    assert doc["meta"]["isa_dev"]["value"] == plan.mission.isa_dev
    assert doc["meta"]["time"]["value"] == plan.time
    assert "winds aloft and ISA -5.0 K from forecast uniform.nc" in out
