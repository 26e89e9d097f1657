"""Mission files: TOML with units, validated on load, into a :class:`~cruiseplan.Mission`.

Layout (our own; every dimensional value is a string with its unit)::

    [mission]       airframe, takeoff_mass or fuel (or battery), payload, stall_margin
    [day]           isa_dev or oat (at the departure field), altimeter (QNH, optional),
                    forecast (a CF netCDF file, relative to this file) and departure
                    (ISO 8601 UTC)
    [profile]       field elevations, climb speed/power/rate, descent rate, clearance ...
    [allowances]    start_taxi_takeoff
    [reserve]       time, fraction or quantity; altitude; [reserve.alternate] a leg
    [[legs]]        distance or from/to waypoints, course, elevation, altitude, speed,
                    objective, wind, max_agl, max_altitude
    [levels]        sectors: a cruising-level rule by magnetic course (optional)
    [route]         file (GPX or GeoJSON, relative to this file), name, and the leg fields
                    its legs share; its legs come before any [[legs]]
    [survey]        area or area_file, takeoff, spacing or footprint + side_overlap,
                    direction, direction_step, turn, and the leg fields of its lines
                    (altitude required); instead of [route] and [[legs]]

``variation`` (magnetic, ``"5 E"``, ``"3 W"`` or ``"-3 deg"``, east positive) may be given
in ``[mission]`` for every leg and in a leg, which then overrides it.

With an altimeter setting, elevations and altitudes are read as altitudes above mean sea
level (what the altimeter shows on QNH) and converted to pressure altitude; without one,
they are taken as pressure altitudes. Errors are one line naming the file, the leg and the
field. Defaults are planning values, stated in the plan; local rules decide the reserve.
"""

from __future__ import annotations

import functools
import math
import re
import warnings
from dataclasses import replace
from pathlib import Path

from cruiseplan.amounts import format_amount, parse_amount
from cruiseplan.constants import DEFAULT_STALL_MARGIN, FT, T_ZERO_C
from cruiseplan.errors import (
    AirframeFileError,
    CruiseplanError,
    CruiseplanWarning,
    MissionFileError,
    UnitError,
)
from cruiseplan.io.airframe_file import find_airframe, read_airframe
from cruiseplan.io.bundled import bundled_files, find_file
from cruiseplan.io.routes import read_area, read_route, route_legs
from cruiseplan.io.schema import Field, SchemaReader, read_toml
from cruiseplan.io.text import (
    format_altimeter,
    parse_altimeter,
    parse_utc_time,
    parse_wind_profile,
)
from cruiseplan.model.levels import LevelSector, check_sectors
from cruiseplan.model.mission import (
    LEG_KINDS,
    Leg,
    Mission,
    Profile,
    Reserve,
    default_reserve,
    place_legs,
)
from cruiseplan.model.survey import Survey
from cruiseplan.model.tolerance import WindTolerance
from cruiseplan.physics.atmosphere import isa_temperature_pressure, pressure_altitude_from_altimeter
from cruiseplan.physics.geo import great_circle
from cruiseplan.physics.winds import WindProfile
from cruiseplan.ranges import RANGES, check_range
from cruiseplan.units import parse_quantity, temperature_difference, to_si

#: Highest ground elevation of a mission file [m] (above the highest mountain).
ELEVATION_MAX = 9000.0

_SECTIONS = {"mission", "day", "profile", "allowances", "reserve", "legs", "uncertainty",
             "levels", "route", "survey"}
_MISSION_FIELDS = {"pack_temperature",
                   "name", "description", "airframe", "takeoff_mass", "fuel", "battery", "power",
                   "payload", "stall_margin", "variation"}
_DAY_FIELDS = {"isa_dev", "oat", "altimeter", "forecast", "departure"}
_PROFILE_FIELDS = {"departure_elevation", "arrival_elevation", "climb_speed", "climb_power",
                   "climb_rate", "descent_rate", "min_clearance", "altitude_step", "top"}
_LEG_FIELDS = {"name", "kind", "duration", "bank", "power", "cas",
               "distance", "from", "to", "course", "elevation", "altitude", "speed",
               "objective", "wind", "winds", "max_agl", "max_altitude", "variation"}
_RESERVE_FIELDS = {"time", "fraction", "quantity", "alternate", "power"}
#: Bank angle of a loiter orbit when the file gives none [deg] (common practice, no source).
DEFAULT_LOITER_BANK = 20.0

#: Planning defaults by propulsion kind (stated in every plan).
DEFAULTS = {
    "fuel": dict(allowance_fraction=0.03, descent_rate=500 * FT / 60, climb_rate=None,
                 min_clearance=1000 * FT, altitude_step=500 * FT, top=12000 * FT),
    "energy": dict(allowance_fraction=0.02, descent_rate=2.0, climb_rate=3.0,
                   min_clearance=30.0, altitude_step=10.0, top=1000.0),
}


class _Reader(SchemaReader):
    """The schema reader with the mission file's shorthand: optional tables and fields."""

    #: A winds-aloft profile that replaces every leg's (a what-if), or None.
    wind = None

    def table(self, data, name, allowed, where=None):
        """An optional table whose fields must be among ``allowed`` ({} when absent)."""
        return self.section(name, allowed, required=False, where=where, data=data)

    def quantity(self, sec, key, unit, where, *, lo=None, hi=None, default_unit=None,
                 required=False, example=""):
        """A field in ``unit`` [SI] within [lo, hi]; None when absent and not required."""
        spec = Field(unit, -math.inf if lo is None else lo, math.inf if hi is None else hi,
                     required, example, lo_open=False, default_unit=default_unit)
        return self.value(where, sec, key, spec)


def pack_celsius(pack_temperature, departure_elevation, isa_dev) -> float:
    """The pack temperature of a mission [degC]: stated, or the day's at the departure field.

    Parameters
    ----------
    pack_temperature : float or None
        Pack temperature stated by the mission file or an override [degC].
    departure_elevation : float
        Pressure altitude of the departure field [m].
    isa_dev : float
        The day's ISA deviation [K].

    Returns
    -------
    float
        Pack temperature [degC].
    """
    if pack_temperature is not None:
        return float(pack_temperature)
    oat = float(isa_temperature_pressure(departure_elevation)[0]) + isa_dev
    return oat - T_ZERO_C


def _repack(mission, pack_temperature, isa_dev, names, words):
    """The mission with its pack at a new temperature; the store keeps its state of charge."""
    old = mission.airframe.propulsion
    if getattr(old, "circuit", None) is None:
        if pack_temperature is not None:
            raise CruiseplanError(f"{names['pack_temperature']}: {mission.airframe.name} has "
                                  "no battery circuit ([battery] in its file) to warm or cool")
        return mission
    if pack_temperature is not None:
        t = parse_quantity(pack_temperature, "K", default_unit="degC",
                           what=names["pack_temperature"]) - T_ZERO_C
        if not -90.0 <= t <= 85.0:
            raise UnitError(f"{names['pack_temperature']}: {pack_temperature!r} is out of "
                            "range (-90 to 85 degC)")
        words.append(f"pack {t:g} degC")
    else:
        t = mission.pack_temperature
    try:
        af = mission.airframe.at_pack_temperature(
            pack_celsius(t, mission.profile.departure_elevation, isa_dev))
    except CruiseplanError as exc:
        where = names["pack_temperature"] if pack_temperature is not None else "pack"
        raise CruiseplanError(f"{where}: {exc}") from None
    k = af.propulsion.store_capacity / old.store_capacity
    store = None if mission.store is None else mission.store * k
    return replace(mission, airframe=af, store=store, allowance=mission.allowance * k,
                   pack_temperature=t)


def _store_amount(r, raw, key, where, prop):
    """Fuel or energy to SI (kg or J): a volume, mass, energy or a percentage of capacity."""
    try:
        amount = parse_amount(raw, prop, what=key)
    except UnitError as exc:
        r.fail(f"{where} {key}", str(exc).split(": ", 1)[-1])
    if key == "start_taxi_takeoff" and not 0.0 <= amount <= prop.store_capacity * (1 + 1e-9):
        r.fail(f"{where} {key}", f"{raw!r} is out of range (0 to the capacity of "
                                 f"{format_amount(prop.store_capacity, prop, 'si')})")
    return amount


@functools.lru_cache(maxsize=64)
def _wind_profile(text: str) -> WindProfile:
    """:func:`parse_wind_profile` of a text, read once (long routes repeat one wind)."""
    return parse_wind_profile(text)


def _wind(r, leg, where):
    if "wind" in leg and "winds" in leg:
        r.fail(f"{where} wind", "give either wind (text) or [[legs.winds]] tables, not both")
    if "wind" in leg:
        if not isinstance(leg["wind"], str):
            r.fail(f"{where} wind", f"{leg['wind']!r} should read like '270/25@3000ft'")
        try:
            return _wind_profile(leg["wind"])
        except (UnitError, ValueError) as exc:
            r.fail(f"{where} wind", str(exc))
    if "winds" in leg:
        rows = leg["winds"]
        if not isinstance(rows, list) or not rows:
            r.fail(f"{where} winds", "expected a list of {altitude, direction, speed} tables")
        alts, dirs, speeds = [], [], []
        for k, row in enumerate(rows, 1):
            w = f"{where} winds[{k}]"
            if not isinstance(row, dict):
                r.fail(w, "expected a table with altitude, direction and speed")
            row = r.table({"x": row}, "x", {"altitude", "direction", "speed"}, where=w)
            alts.append(r.quantity(row, "altitude", "m", w, required=True,
                                   example="'3000 ft'"))
            dirs.append(r.quantity(row, "direction", "", w, lo=0.0, hi=360.0, required=True,
                                   default_unit="", example="270"))
            speeds.append(r.quantity(row, "speed", "m/s", w, lo=0.0, hi=RANGES["headwind"][1],
                                     required=True,
                                     example="'25 kt'"))
        order = sorted(range(len(alts)), key=alts.__getitem__)
        try:
            return WindProfile(tuple(alts[i] for i in order), tuple(dirs[i] for i in order),
                               tuple(speeds[i] for i in order))
        except ValueError as exc:
            r.fail(f"{where} winds", str(exc))
    return WindProfile.calm()


def _leg(r, raw, where, to_pa):
    if not isinstance(raw, dict):
        r.fail(where, "expected a table of leg fields")
    leg = r.table({"x": raw}, "x", _LEG_FIELDS, where=where)
    name = str(leg.get("name", where.strip("[]")))
    kind = r.choice(where, leg, "kind", LEG_KINDS, default="cruise")
    has_points = "from" in leg or "to" in leg
    start = end = None
    course = r.quantity(leg, "course", "", where, lo=0.0, hi=360.0, default_unit="",
                        example="45")
    if has_points:
        if "distance" in leg:
            r.fail(f"{where} distance", "give either distance or from/to waypoints, not both")
        pts = []
        for key in ("from", "to"):
            p = leg.get(key)
            if (not isinstance(p, list) or len(p) != 2
                    or not all(isinstance(v, (int, float)) and not isinstance(v, bool)
                               for v in p)):
                r.fail(f"{where} {key}", f"{p!r} should be [latitude, longitude] in degrees")
            lat, lon = float(p[0]), float(p[1])
            if not (-90 <= lat <= 90 and -180 <= lon <= 180):
                r.fail(f"{where} {key}", f"{p!r} is not a latitude in -90..90 and a longitude "
                                         "in -180..180 degrees")
            pts.append((lat, lon))
        distance, gc_course = great_circle(*pts[0], *pts[1])
        distance = float(distance)
        if distance <= 0:
            r.fail(f"{where} to", "the waypoints are the same point")
        course = float(gc_course) if course is None else course
        start, end = pts
    elif kind != "cruise":
        if "distance" in leg:
            r.fail(f"{where} distance", f"a {kind} leg holds its point: give its duration, "
                                        "not a distance")
        distance = 0.0
    else:
        distance = r.quantity(leg, "distance", "m", where, lo=1.0, required=True,
                              example="'62 nm'")
    duration = r.quantity(leg, "duration", "s", where, lo=1.0, hi=86400.0,
                          required=kind != "cruise", example="'10 min'")
    if kind == "cruise" and duration is not None:
        r.fail(f"{where} duration", "a cruise leg has a distance; give kind = 'hover' or "
                                    "'loiter' for a time at a point")
    bank = r.quantity(leg, "bank", "deg", where, lo=0.0, hi=60.0, default_unit="deg",
                      example="'30 deg'")
    if bank is not None and kind != "loiter":
        r.fail(f"{where} bank", "only a loiter leg is flown at a bank angle")
    wind = _wind(r, leg, where)
    if r.wind is not None:
        wind = r.wind
    if course is None:
        if kind == "cruise" and any(s > 0 for s in wind.speeds):
            r.fail(f"{where} course", "missing; a leg with wind needs its true course (or "
                                      "from/to waypoints)")
        course = 0.0

    def best_or(key, unit, example, hi):
        raw_v = leg.get(key, "best")
        if raw_v == "best":
            return None
        return r.quantity(leg, key, unit, where, lo=0.0, hi=hi, example=example)

    # The physical ranges of cruiseplan.ranges: the atmosphere model's altitudes and the
    # speeds a propeller aircraft can fly.
    altitude = best_or("altitude", "m", "'5500 ft' or 'best'", RANGES["altitude"][1])
    speed = best_or("speed", "m/s", "'105 kt' or 'best'", RANGES["speed"][1])
    if speed is not None and speed <= 0:
        r.fail(f"{where} speed", "must be positive")
    objective = leg.get("objective")
    if objective is not None and objective not in ("range", "endurance", "economy"):
        r.fail(f"{where} objective", f"{objective!r} is not one of range, endurance, economy")
    if objective is None and leg.get("speed") == "best":
        objective = "range"
    power = r.quantity(leg, "power", "", where, lo=0.01, hi=1.0, example="'65 %'")
    cas = r.quantity(leg, "cas", "m/s", where, lo=0.1, hi=RANGES["speed"][1],
                     example="'95 kt'")
    given = [k for k in ("speed", "cas", "power") if k in leg and leg[k] != "best"]
    if len(given) > 1:
        r.fail(f"{where} {given[1]}", f"give one of speed, cas or power, not {given[0]} and "
                                      f"{given[1]}")
    elevation = r.quantity(leg, "elevation", "m", where, lo=-500.0, hi=ELEVATION_MAX,
                           example="'1500 ft'")
    max_agl = r.quantity(leg, "max_agl", "m", where, lo=0.0, hi=ELEVATION_MAX,
                         example="'120 m'")
    max_alt = r.quantity(leg, "max_altitude", "m", where, hi=RANGES["altitude"][1],
                         example="'9500 ft'")
    variation = _variation(r, leg, where)
    try:
        return Leg(name=name, distance=distance, course=course, wind=wind,
                   altitude=None if altitude is None else to_pa(altitude), tas=speed,
                   objective=objective, power=power, cas=cas, kind=kind, duration=duration,
                   bank=DEFAULT_LOITER_BANK if bank is None and kind == "loiter" else bank or 0,
                   elevation=None if elevation is None else to_pa(elevation),
                   max_agl=max_agl, max_altitude=None if max_alt is None else to_pa(max_alt),
                   variation=variation, start=start, end=end)
    except CruiseplanError as exc:
        r.fail(where, str(exc))


#: How a variation is written, for messages.
_VARIATION_EXAMPLE = "'5 E', '3 W' or '-3 deg' (east positive)"
_EAST_WEST = re.compile(r"^\s*(.*?)\s*([EW])\s*$", re.IGNORECASE)


def _variation(r, table, where):
    """Magnetic variation [deg], east positive: '5 E', '3 W', '-3 deg' or -3; None if absent."""
    raw = table.get("variation")
    if raw is None:
        return None
    side = _EAST_WEST.match(raw) if isinstance(raw, str) else None
    if side:
        size = r.quantity({"variation": side.group(1)}, "variation", "deg", where, lo=0.0,
                          hi=180.0, default_unit="deg", example=_VARIATION_EXAMPLE)
        return size if side.group(2) in "Ee" else -size
    return r.quantity(table, "variation", "deg", where, lo=-180.0, hi=180.0,
                      default_unit="deg", example=_VARIATION_EXAMPLE)


#: How a level sector is written, for messages.
_SECTOR_EXAMPLE = "{ from = 0, to = 179, levels = '3500 ft + 2000 ft' }"
_BASE_STEP = re.compile(r"^\s*(.+?)\s*\+\s*(.+?)\s*$")
_WITH_UNIT = re.compile(r"\d\s*[A-Za-z]")


def _levels(r, data) -> tuple:
    """The cruising-level rule of ``[levels] sectors`` as LevelSectors; () when absent."""
    if "levels" not in data:
        return ()
    sec = r.table(data, "levels", {"sectors"})
    raw = sec.get("sectors")
    if not isinstance(raw, list) or not raw or not all(isinstance(t, dict) for t in raw):
        r.fail("[levels] sectors", f"expected a list of sectors, e.g. sectors = "
                                   f"[{_SECTOR_EXAMPLE}, ...]")
    out = []
    for n, t in enumerate(raw, 1):
        w = f"[levels] sectors[{n}]"
        r.check_fields(t, {"from", "to", "levels"}, w)
        ends = []
        for key in ("from", "to"):
            v = t.get(key)
            whole = (isinstance(v, (int, float)) and not isinstance(v, bool)
                     and float(v).is_integer() and 0 <= v <= 359)
            if not whole:
                r.fail(f"{w} {key}", ("missing; expected" if v is None else f"{v!r} is not")
                       + " a whole degree of magnetic course from 0 to 359, e.g. "
                       + _SECTOR_EXAMPLE)
            ends.append(int(v))
        text = t.get("levels")
        parts = _BASE_STEP.match(text) if isinstance(text, str) else None
        if not parts or not all(_WITH_UNIT.search(g) for g in parts.groups()):
            r.fail(f"{w} levels", f"{text!r} should read BASE + STEP with their units, e.g. "
                                  "'3500 ft + 2000 ft' (3500, 5500, 7500 ft ...)")
        base = r.quantity({"levels": parts.group(1)}, "levels", "m", w, lo=-500.0,
                          hi=20000.0, example="'3500 ft + 2000 ft'")
        step = r.quantity({"levels": parts.group(2)}, "levels", "m", w, lo=1.0, hi=10000.0,
                          example="'3500 ft + 2000 ft'")
        out.append(LevelSector(ends[0], ends[1], base, step, text.strip()))
    try:
        check_sectors(out)
    except CruiseplanError as exc:
        r.fail("[levels] sectors", str(exc))
    return tuple(out)


# --- [route] and [survey] ------------------------------------------------------------------

#: A leg's fields a route or a survey gives for all its legs.
_SHARED_LEG_FIELDS = {"altitude", "speed", "cas", "power", "objective", "wind", "winds",
                      "elevation", "max_agl", "max_altitude", "variation"}
_ROUTE_FIELDS = {"file", "name"} | _SHARED_LEG_FIELDS
_SURVEY_FIELDS = {"area", "area_file", "takeoff", "spacing", "footprint", "side_overlap",
                  "direction", "direction_step", "turn"} | _SHARED_LEG_FIELDS


def _file_near(r, sec, key, where, example):
    """The path of ``key`` (a file named relative to the mission file)."""
    name = sec.get(key)
    if not isinstance(name, str) or not name.strip():
        r.fail(f"{where} {key}", f"expected a file name, e.g. {key} = {example!r} (relative "
                                 "to this mission file)")
    return Path(r.source).parent / name


def _route(r, data, to_pa) -> tuple:
    """The legs of ``[route]``: a GPX or GeoJSON file's points, with the route's fields."""
    if "route" not in data:
        return ()
    sec = r.table(data, "route", _ROUTE_FIELDS)
    try:
        route = read_route(_file_near(r, sec, "file", "[route]", "ridge.gpx"))
    except CruiseplanError as exc:
        r.fail("[route] file", str(exc))
    name = sec.get("name", "")
    if not isinstance(name, str):
        r.fail("[route] name", f"{name!r} should be text: the legs are named 'NAME 1', ...")
    (lat0, lon0), (lat1, lon1) = route.points[:2]
    shared = {k: v for k, v in sec.items() if k in _SHARED_LEG_FIELDS}
    template = _leg(r, {**shared, "from": [float(lat0), float(lon0)],
                        "to": [float(lat1), float(lon1)]}, "[route]", to_pa)
    return route_legs(route, template, name)


def _lat_lon(r, p, where):
    """A ``[latitude, longitude]`` pair [deg], checked."""
    if (not isinstance(p, list) or len(p) != 2
            or not all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in p)
            or not (-90 <= p[0] <= 90 and -180 <= p[1] <= 180)):
        r.fail(where, f"{p!r} should be [latitude, longitude] in degrees (-90..90, "
                      "-180..180)")
    return float(p[0]), float(p[1])


def _turn(r, sec):
    """``[survey] turn``: a distance [m] or a time [s] added at each turn (0, 0 absent)."""
    raw = sec.get("turn")
    if raw is None:
        return 0.0, 0.0
    for unit, hi in (("m", 5000.0), ("s", 600.0)):
        try:
            parse_quantity(raw, unit, what="turn")
        except UnitError:
            continue
        value = r.quantity(sec, "turn", unit, "[survey]", lo=0.0, hi=hi,
                           example="'40 m' or '15 s'")
        return (value, 0.0) if unit == "m" else (0.0, value)
    r.fail("[survey] turn", f"{raw!r} should be a distance ('40 m') or a time ('15 s') "
                            "added at each turn")


def _survey(r, data, to_pa):
    """The ``[survey]`` of a mission file as a Survey, or None."""
    if "survey" not in data:
        return None
    w = "[survey]"
    sec = r.table(data, "survey", _SURVEY_FIELDS)
    if ("area" in sec) == ("area_file" in sec):
        r.fail(f"{w} area", "give either area = [[lat, lon], ...] (three or more vertices) "
                            "or area_file = 'field.geojson' (a GeoJSON Polygon)")
    if "area" in sec:
        raw = sec["area"]
        if not isinstance(raw, list) or len(raw) < 3:
            r.fail(f"{w} area", "expected a list of three or more [latitude, longitude] "
                                "vertices in order around the area")
        area = tuple(_lat_lon(r, p, f"{w} area vertex {k}") for k, p in enumerate(raw, 1))
        source = ""
    else:
        path = _file_near(r, sec, "area_file", w, "field.geojson")
        try:
            area = tuple(map(tuple, read_area(path).tolist()))
        except CruiseplanError as exc:
            r.fail(f"{w} area_file", str(exc))
        source = str(path)
    if "takeoff" not in sec:
        r.fail(f"{w} takeoff", "missing; expected the take-off point, takeoff = [latitude, "
                               "longitude]")
    takeoff = _lat_lon(r, sec["takeoff"], f"{w} takeoff")
    footprint = r.quantity(sec, "footprint", "m", w, lo=0.1, example="'80 m'")
    overlap = r.quantity(sec, "side_overlap", "", w, lo=0.0, hi=0.95, example="'30 %'")
    spacing = r.quantity(sec, "spacing", "m", w, lo=0.1, example="'55 m'")
    if spacing is not None and (footprint is not None or overlap is not None):
        r.fail(f"{w} spacing", "give either spacing or footprint with side_overlap, not both")
    if spacing is None:
        if footprint is None or overlap is None:
            r.fail(f"{w} spacing", "missing; give spacing = '55 m', or footprint = '80 m' "
                                   "with side_overlap = '30 %' (spacing = footprint x (1 - "
                                   "overlap))")
        spacing = footprint * (1.0 - overlap)
    direction = sec.get("direction", "best")
    if direction != "best":
        direction = r.quantity(sec, "direction", "deg", w, lo=0.0, hi=360.0,
                               default_unit="deg", example="35 (deg true) or 'best'")
    step = r.quantity(sec, "direction_step", "deg", w, lo=1.0, hi=30.0, default_unit="deg",
                      example="'10 deg'")
    turn_distance, turn_time = _turn(r, sec)
    if sec.get("altitude", "best") == "best":
        r.fail(f"{w} altitude", "missing; a survey is flown at one altitude (its ground "
                                "resolution), e.g. altitude = '195 m'")
    shared = {k: v for k, v in sec.items() if k in _SHARED_LEG_FIELDS}
    template = _leg(r, {**shared, "name": "survey", "distance": "1 km", "course": 0}, w,
                    to_pa)
    try:
        return Survey(area, takeoff, spacing, template,
                      direction=None if direction == "best" else direction,
                      direction_step=10.0 if step is None else step,
                      turn_distance=turn_distance, turn_time=turn_time, footprint=footprint,
                      side_overlap=overlap, area_source=source)
    except CruiseplanError as exc:
        r.fail(w, str(exc))


def _wind_words(profile) -> str:
    """A winds-aloft profile as written: ``"270/25kt@3000ft,250/40kt@8000ft"``."""
    kt = 1852.0 / 3600.0
    return ",".join(f"{d:03.0f}/{v / kt:.0f}kt@{h / FT:.0f}ft"
                    for h, d, v in zip(profile.altitudes, profile.directions, profile.speeds))


def read_mission(path, *, altimeter=None, wind=None, airframe=None) -> Mission:
    """Read and validate a mission file.

    Parameters
    ----------
    path : str or pathlib.Path
        A TOML mission file.
    altimeter : str or float, optional
        QNH that replaces ``[day] altimeter`` (``"1009 hPa"``, ``"29.80 inHg"`` or [Pa]):
        the file's elevations and altitudes are read on it.
    wind : WindProfile, optional
        Winds aloft that replace every leg's (and the alternate's); the legs' courses are
        still required.
    airframe : Airframe, optional
        The airframe flown instead of the one the file names (e.g. read with overrides):
        the file's fuel or battery amounts are read against it.

    Returns
    -------
    Mission
        The mission in SI, with its airframe loaded.

    Raises
    ------
    MissionFileError
        Naming the file, the leg and the field.
    """
    path = Path(path)
    data, _ = read_toml(path, MissionFileError)
    r = _Reader(path, data, MissionFileError)
    unknown = sorted(set(data) - _SECTIONS)
    if unknown:
        r.fail(f"[{unknown[0]}]", f"unknown section; expected {', '.join(sorted(_SECTIONS))}")
    head = r.table(data, "mission", _MISSION_FIELDS)
    if "airframe" not in head:
        r.fail("[mission] airframe", "missing; expected a bundled name or a file path")
    name_or_path = str(head["airframe"])
    local = path.parent / name_or_path
    try:
        af = airframe or read_airframe(local if local.is_file() else find_airframe(name_or_path))
    except AirframeFileError as exc:
        r.fail("[mission] airframe", str(exc))
    prop = af.propulsion
    defaults = DEFAULTS[prop.store_name]

    day = r.table(data, "day", _DAY_FIELDS)
    qnh = r.quantity(day, "altimeter", "Pa", "[day]", lo=85000.0, hi=108000.0,
                     example="'1013 hPa'")
    if altimeter is not None:
        qnh = parse_altimeter(altimeter)
    r.wind = wind

    def to_pa(alt):
        return float(pressure_altitude_from_altimeter(alt, qnh)) if qnh else alt

    prof_raw = r.table(data, "profile", _PROFILE_FIELDS)
    w = "[profile]"
    dep = r.quantity(prof_raw, "departure_elevation", "m", w, lo=-500.0, hi=ELEVATION_MAX,
                     example="'450 ft'")
    arr = r.quantity(prof_raw, "arrival_elevation", "m", w, lo=-500.0, hi=ELEVATION_MAX,
                     example="'300 ft'")
    dep = to_pa(dep or 0.0)
    arr = to_pa(arr or 0.0)
    if "isa_dev" in day and "oat" in day:
        r.fail("[day] oat", "give either isa_dev or oat, not both")
    if "oat" in day:
        oat = r.quantity(day, "oat", "K", "[day]", default_unit="degC", lo=180.0, hi=340.0,
                         example="'32 degC'")
        isa_dev = oat - float(isa_temperature_pressure(dep)[0])
    else:
        try:
            isa_dev = temperature_difference(day.get("isa_dev", 0.0), what="isa_dev")
        except (UnitError, TypeError, ValueError):
            r.fail("[day] isa_dev", f"{day.get('isa_dev')!r} is not a temperature difference, "
                                    "e.g. '+15 K' or '+15 degC'")
        if not (isinstance(isa_dev, (int, float)) and -60 <= isa_dev <= 60):
            r.fail("[day] isa_dev", f"{day['isa_dev']!r} is out of range (-60 to 60 K)")
    forecast = departure = None
    if "forecast" in day:
        forecast = str(_file_near(r, day, "forecast", "[day]", "winds.nc"))
    if "departure" in day:
        try:
            departure = parse_utc_time(day["departure"], what="departure")
        except UnitError as exc:
            r.fail("[day] departure", str(exc).split(": ", 1)[-1])
    if forecast is not None and departure is None:
        r.fail("[day] departure", "missing; a forecast is sampled at the legs' planned "
                                  "times: give departure = '2026-12-03T06:00Z' (UTC)")
    # A pack given as a circuit holds less and sags more when cold: it is set to the stated
    # pack temperature, or the day's at the departure field, before any amount is read.
    pack_t = r.quantity(head, "pack_temperature", "K", "[mission]", default_unit="degC",
                        lo=180.0, hi=360.0, example="'15 degC'")
    pack_t = None if pack_t is None else pack_t - T_ZERO_C
    if pack_t is not None and getattr(prop, "circuit", None) is None:
        r.fail("[mission] pack_temperature", f"{af.name} has no battery circuit ([battery] "
                                             "in its file) to warm or cool")
    try:
        af = af.at_pack_temperature(pack_celsius(pack_t, dep, isa_dev))
    except CruiseplanError as exc:
        r.fail("[mission] pack_temperature" if pack_t is not None else "[day]", str(exc))
    prop = af.propulsion

    def opt(key, unit, lo, example, default=None, hi=None):
        v = r.quantity(prof_raw, key, unit, w, lo=lo, hi=hi, example=example)
        return default if v is None else v

    profile = Profile(
        departure_elevation=dep, arrival_elevation=arr,
        climb_speed=opt("climb_speed", "m/s", 1.0, "'75 kt'", hi=RANGES["speed"][1]),
        climb_power=opt("climb_power", "", 0.05, "'100 %'", 1.0, hi=1.0),
        climb_rate=opt("climb_rate", "m/s", 0.1, "'3 m/s'", defaults["climb_rate"], hi=50.0),
        descent_rate=opt("descent_rate", "m/s", 0.1, "'500 ft/min'",
                         defaults["descent_rate"], hi=50.0),
        min_clearance=opt("min_clearance", "m", 0.0, "'1000 ft'", defaults["min_clearance"],
                          hi=5000.0),
        altitude_step=opt("altitude_step", "m", 1.0, "'500 ft'", defaults["altitude_step"],
                          hi=5000.0),
        top=to_pa(opt("top", "m", 0.0, "'10000 ft'", defaults["top"], hi=ELEVATION_MAX * 3)))

    mass = r.quantity(head, "takeoff_mass", "kg", "[mission]", lo=0.0, hi=RANGES["mass"][1],
                      example="'735 kg'")
    payload = r.quantity(head, "payload", "kg", "[mission]", lo=0.0, hi=RANGES["mass"][1],
                         example="'170 kg'")
    store_key = "fuel" if prop.store.burns_mass else "battery"
    wrong = "battery" if store_key == "fuel" else "fuel"
    if wrong in head:
        r.fail(f"[mission] {wrong}", f"{af.name} is {prop.kind}: give {store_key} instead")
    store = None
    if store_key in head:
        store = _store_amount(r, head[store_key], store_key, "[mission]", prop)
    margin = r.quantity(head, "stall_margin", "", "[mission]", lo=1.0, hi=2.0,
                        default_unit="", example="1.3")

    allow_raw = r.table(data, "allowances", {"start_taxi_takeoff"})
    if "start_taxi_takeoff" in allow_raw:
        allowance = _store_amount(r, allow_raw["start_taxi_takeoff"], "start_taxi_takeoff",
                                  "[allowances]", prop)
    else:
        allowance = defaults["allowance_fraction"] * prop.store_capacity

    res_raw = r.table(data, "reserve", _RESERVE_FIELDS)
    kinds = [k for k in ("time", "fraction", "quantity") if k in res_raw]
    if len(kinds) > 1:
        r.fail(f"[reserve] {kinds[1]}", "give one of time, fraction or quantity")
    if not kinds:
        default = default_reserve(prop)
        kind, amount = default.kind, default.amount
    elif kinds[0] == "time":
        kind, amount = "time", r.quantity(res_raw, "time", "s", "[reserve]", lo=0.0,
                                          example="'45 min'")
    elif kinds[0] == "fraction":
        kind, amount = "fraction", r.quantity(res_raw, "fraction", "", "[reserve]", lo=0.0,
                                              hi=1.0, example="'20 %'")
    else:
        kind, amount = "amount", _store_amount(r, res_raw["quantity"], "quantity", "[reserve]",
                                              prop)
    res_power = r.quantity(res_raw, "power", "", "[reserve]", lo=0.01, hi=1.0,
                           example="'65 %'")
    if res_power is not None and kind != "time":
        r.fail("[reserve] power", "goes with a time reserve (the power it is flown at)")
    alternate = None
    if "alternate" in res_raw:
        alternate = _leg(r, res_raw["alternate"], "[reserve.alternate]", to_pa)
    written = {"time": res_raw.get("time"), "fraction": res_raw.get("fraction"),
               "quantity": res_raw.get("quantity")}
    reserve = Reserve(kind, amount, alternate, text=str(written[kinds[0]]) if kinds else "",
                      power=res_power)

    route, survey = _route(r, data, to_pa), _survey(r, data, to_pa)
    legs_raw = data.get("legs", [])
    if survey is not None and (route or legs_raw):
        r.fail("[survey]", "a survey mission lays its own legs from its area: give [survey] "
                           "or [route] and [[legs]], not both")
    if not isinstance(legs_raw, list) or not (legs_raw or route or survey):
        r.fail("[[legs]]", "missing; a mission needs at least one leg, a [route] file or a "
                           "[survey] area")
    legs = route + tuple(_leg(r, leg, f"leg {k}" + (f" {leg.get('name')!r}"
                                                   if isinstance(leg, dict) and "name" in leg
                                                   else ""), to_pa)
                         for k, leg in enumerate(legs_raw, 1))
    legs = place_legs(legs)
    variation = _variation(r, head, "[mission]")
    if variation is not None:
        legs = tuple(leg if leg.variation is not None else replace(leg, variation=variation)
                     for leg in legs)
    levels = _levels(r, data)
    what_if = tuple(([f"altimeter {format_altimeter(qnh)}"] if altimeter is not None else [])
                    + ([f"wind {_wind_words(wind)} on every leg"] if wind is not None else []))
    unc = r.table(data, "uncertainty", {"wind_speed", "wind_direction"})
    wind_tolerance = None
    if unc:
        wind_tolerance = WindTolerance(
            r.quantity(unc, "wind_speed", "m/s", "[uncertainty]", lo=0.0, hi=30.0,
                       example="'4 kt'") or 0.0,
            r.quantity(unc, "wind_direction", "deg", "[uncertainty]", lo=0.0, hi=90.0,
                       example="'15 deg'") or 0.0)
    for k, leg in enumerate(legs, 1):
        if leg.kind == "hover" and not af.hovers:
            r.fail(f"leg {k} {leg.name!r} kind", f"{af.name} is a {af.kind}: it cannot hover; "
                                                 "give kind = 'loiter' for an orbit")
    mission = Mission(
        name=str(head.get("name", path.stem)), airframe=af, legs=legs, reserve=reserve,
        profile=profile, isa_dev=isa_dev, mass=mass, store=store, payload=payload,
        allowance=allowance, stall_margin=margin or DEFAULT_STALL_MARGIN,
        cruise_power=r.quantity(head, "power", "", "[mission]", lo=0.01, hi=1.0,
                                example="'65 %'"),
        source=str(path),
        description=str(head.get("description", "")), wind_tolerance=wind_tolerance,
        pack_temperature=pack_t,
        altimeter=qnh, variation=variation or 0.0, levels=levels, overrides=what_if,
        survey=survey, forecast=forecast, departure=departure)
    try:
        af.loading(mass=mass, store=store, payload=payload)
    except CruiseplanError as exc:
        r.fail("[mission] takeoff_mass", str(exc))
    return mission


def bundled_missions() -> dict:
    """Bundled mission files by name (file stem), sorted.

    Returns
    -------
    dict
        Name to :class:`pathlib.Path`.
    """
    return bundled_files("mission")


def load_mission(name_or_path, *, altimeter=None, wind=None, airframe=None) -> Mission:
    """Load a bundled mission by name, or a mission file by path.

    Parameters
    ----------
    name_or_path : str or pathlib.Path
        Bundled name or path to a TOML mission file.
    altimeter : str or float, optional
        QNH that replaces the file's (``"1009 hPa"``, ``"29.80 inHg"`` or [Pa]).
    wind : WindProfile, optional
        Winds aloft that replace every leg's.
    airframe : Airframe, optional
        The airframe flown instead of the one the file names.

    Returns
    -------
    Mission
        The validated mission.
    """
    return read_mission(find_file(name_or_path, "mission"), altimeter=altimeter, wind=wind,
                        airframe=airframe)


#: The what-if overrides of :func:`apply_overrides`, in the order the plan lists them.
OVERRIDES = ("altimeter", "isa_dev", "oat", "wind", "fuel", "payload", "pack_temperature")


def _reread(mission, qnh, profile, names):
    """The mission read again from its file with a new QNH or wind (or the wind replaced)."""
    source = Path(mission.source) if mission.source else None
    if source is not None and source.is_file():
        if mission.overrides:
            key = "altimeter" if qnh is not None else "wind"
            raise CruiseplanError(
                f"{names[key]}: the mission already has what-if overrides "
                f"({', '.join(mission.overrides)}); an altimeter or wind override reads "
                "the mission file again, so give every override in one call")
        return read_mission(source, altimeter=qnh, wind=profile, airframe=mission.airframe)
    if qnh is not None:
        raise CruiseplanError(f"{names['altimeter']}: the mission has no file to read its "
                              "elevations and altitudes again on a new altimeter setting")
    alt = mission.reserve.alternate
    reserve = (mission.reserve if alt is None
               else replace(mission.reserve, alternate=replace(alt, wind=profile)))
    survey = mission.survey
    if survey is not None:
        survey = replace(survey, leg=replace(survey.leg, wind=profile))
    return replace(mission, legs=tuple(replace(leg, wind=profile) for leg in mission.legs),
                   reserve=reserve, survey=survey)


def apply_overrides(mission, *, altimeter=None, isa_dev=None, oat=None, wind=None, fuel=None,
                    payload=None, names=None, pack_temperature=None) -> Mission:
    """A mission with what-if overrides of its file, recorded for the plan's header.

    Each override is text as on the command line or a value in SI; those left None keep
    the mission's. An altimeter setting changes how the file's elevations and altitudes
    are read, and a wind needs every leg's course checked, so both read the mission file
    again (``mission.source``): give every override in one call. A mission without a file
    takes a wind on its legs as they are, and no altimeter setting.

    Parameters
    ----------
    mission : Mission
        The mission, as read from its file.
    altimeter : str or float, optional
        QNH, ``"1009 hPa"`` or ``"29.80 inHg"`` [Pa].
    isa_dev : str or float, optional
        Temperature deviation from ISA, ``"+15 K"`` [K].
    oat : str or float, optional
        Outside air temperature at the departure field, ``"32 degC"`` [K]; not with
        ``isa_dev``.
    wind : str or WindProfile, optional
        Winds aloft for every leg (and the alternate), ``"270/25@3000ft,250/40@8000ft"``.
    fuel : str or float, optional
        Fuel or energy on board, ``"40 L"``, ``"60 %"``, ``"450 Wh"`` [kg or J]; the
        take-off mass then follows from it.
    payload : str or float, optional
        Crew and payload, ``"80 kg"`` [kg]; the fuel on board stays as it was.
    pack_temperature : str or float, optional
        Battery pack temperature, ``"5 degC"`` [degC when bare] (a pack given as a
        circuit). A pack at a new temperature (this, or the day's changed by ``isa_dev``
        or ``oat``) keeps its state of charge: the energy on board scales with its
        capacity.
    names : dict, optional
        How errors name each override, by keyword (the command line passes its options,
        ``{"isa_dev": "--isa-dev", ...}``); the keyword by default.

    Returns
    -------
    Mission
        The mission with the overrides, its ``overrides`` listing them in words (e.g.
        ``("ISA +15 K", "fuel 60 %")``).

    Raises
    ------
    CruiseplanError
        One line naming the override: a value that cannot be read or is out of range,
        ``isa_dev`` with ``oat``, fuel beyond capacity, or an error of the mission file
        read again.
    """
    names = {**{k: k for k in OVERRIDES}, **(names or {})}
    if isa_dev is not None and oat is not None:
        raise CruiseplanError(f"{names['isa_dev']} and {names['oat']}: give one, not both")
    qnh = None if altimeter is None else parse_altimeter(altimeter, what=names["altimeter"])
    profile, wind_text = None, ""
    if isinstance(wind, WindProfile):
        profile, wind_text = wind, _wind_words(wind)
    elif wind is not None:
        try:
            profile = parse_wind_profile(str(wind))
        except (UnitError, ValueError) as exc:
            raise UnitError(f"{names['wind']}: {exc}") from None
        wind_text = str(wind).strip()
    words = list(mission.overrides)
    if qnh is not None or profile is not None:
        mission = _reread(mission, qnh, profile, names)
        words = []
        if qnh is not None:
            words.append(f"altimeter {altimeter.strip()}" if isinstance(altimeter, str)
                         else f"altimeter {format_altimeter(qnh)}")
    changes = {}
    if isa_dev is not None:
        dev = temperature_difference(isa_dev, what=names["isa_dev"])
        if not -60.0 <= dev <= 60.0:
            raise UnitError(f"{names['isa_dev']}: {isa_dev!r} is out of range (-60 to 60 K)")
        changes["isa_dev"] = dev
        words.append(f"ISA {dev:+g} K")
    if oat is not None:
        t = parse_quantity(oat, "K", default_unit="degC", what=names["oat"])
        if not 180.0 <= t <= 340.0:
            raise UnitError(f"{names['oat']}: {oat!r} is out of range (-93 to 67 degC)")
        dev = t - float(isa_temperature_pressure(mission.profile.departure_elevation)[0])
        changes["isa_dev"] = dev
        words.append(f"OAT {t - T_ZERO_C:g} degC at departure (ISA {dev:+.1f} K)")
    if profile is not None:
        words.append(f"wind {wind_text} on every leg")
    if pack_temperature is not None or "isa_dev" in changes:
        mission = _repack(mission, pack_temperature, changes.get("isa_dev", mission.isa_dev),
                          names, words)
    if fuel is not None or payload is not None:
        changes.update(_loading_overrides(mission, fuel, payload, names, words))
    return replace(mission, **changes, overrides=tuple(words))


def _loading_overrides(mission, fuel, payload, names, words) -> dict:
    """Store, payload and mass (None: it follows) for fuel and payload overrides."""
    af = mission.airframe
    prop = af.propulsion
    with warnings.catch_warnings():
        # Over the maximum take-off mass is the planner's NO-GO reason, said once there.
        warnings.simplefilter("ignore", CruiseplanWarning)
        store = af.loading(mass=mission.mass, store=mission.store,
                           payload=mission.payload).store
    pl = mission.payload
    if fuel is not None:
        if isinstance(fuel, str):
            store = parse_amount(fuel, prop, what=names["fuel"])
        else:
            store = to_si(fuel, prop.store.unit, what=names["fuel"])
            if not 0.0 <= store < math.inf:
                raise UnitError(f"{names['fuel']}: {fuel!r} must be a finite amount, not "
                                "negative")
        text = (fuel.strip() if isinstance(fuel, str)
                else format_amount(store, prop, prop.store.default_units))
        words.append(f"{'fuel' if prop.store.burns_mass else 'battery'} {text}")
    if payload is not None:
        pl = parse_quantity(payload, "kg", default_unit="kg", what=names["payload"])
        if not 0.0 <= pl < math.inf:
            raise UnitError(f"{names['payload']}: {payload!r} must be a finite mass, not "
                            "negative")
        check_range(pl, "payload", names["payload"])
        words.append(f"payload {payload.strip() if isinstance(payload, str) else f'{pl:g} kg'}")
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", CruiseplanWarning)
            af.loading(mass=None, store=store, payload=pl)
    except CruiseplanError as exc:
        raise CruiseplanError(f"{names['fuel' if fuel is not None else 'payload']}: "
                              f"{exc}") from None
    return dict(mass=None, store=store, payload=pl)
