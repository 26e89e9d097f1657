"""Mission files: TOML with units, validated on load, into a :class:`~cruiseplan.Mission`.

Layout (our own; every dimensional value is a string with its unit)::

    [mission]       airframe, takeoff_mass or fuel (or battery), payload, stall_margin
    [day]           isa_dev or oat (at the departure field), altimeter (QNH, optional)
    [profile]       field elevations, climb speed/power/rate, descent rate, clearance ...
    [allowances]    start_taxi_takeoff
    [reserve]       time, fraction or quantity; altitude; [reserve.alternate] a leg
    [[legs]]        distance or from/to waypoints, course, elevation, altitude, speed,
                    objective, wind, max_agl, max_altitude

With an altimeter setting, elevations and altitudes are read as altitudes above mean sea
level (what the altimeter shows on QNH) and converted to pressure altitude; without one,
they are taken as pressure altitudes. Errors are one line naming the file, the leg and the
field. Defaults are conservative and stated in the plan; local rules decide the reserve.
"""

from __future__ import annotations

import math
from pathlib import Path

from cruiseplan.amounts import parse_amount
from cruiseplan.constants import FT
from cruiseplan.errors import AirframeFileError, CruiseplanError, MissionFileError, UnitError
from cruiseplan.io.airframe_file import find_airframe, read_airframe
from cruiseplan.io.bundled import bundled_files, find_file
from cruiseplan.io.schema import Field, SchemaReader, read_toml
from cruiseplan.io.text import parse_wind_profile
from cruiseplan.model.mission import Leg, Mission, Profile, Reserve, default_reserve
from cruiseplan.model.tolerance import WindTolerance
from cruiseplan.physics.atmosphere import isa_temperature_pressure, pressure_altitude_from_altimeter
from cruiseplan.physics.geo import great_circle
from cruiseplan.physics.winds import WindProfile
from cruiseplan.units import temperature_difference

_SECTIONS = {"mission", "day", "profile", "allowances", "reserve", "legs", "uncertainty"}
_MISSION_FIELDS = {"name", "description", "airframe", "takeoff_mass", "fuel", "battery",
                   "payload", "stall_margin"}
_DAY_FIELDS = {"isa_dev", "oat", "altimeter"}
_PROFILE_FIELDS = {"departure_elevation", "arrival_elevation", "climb_speed", "climb_power",
                   "climb_rate", "descent_rate", "min_clearance", "altitude_step", "top"}
_LEG_FIELDS = {"name", "distance", "from", "to", "course", "elevation", "altitude", "speed",
               "objective", "wind", "winds", "max_agl", "max_altitude"}
_RESERVE_FIELDS = {"time", "fraction", "quantity", "altitude", "alternate"}

#: Conservative defaults by propulsion kind (stated in every plan).
DEFAULTS = {
    "fuel": dict(allowance_fraction=0.03, descent_rate=500 * FT / 60, climb_rate=None,
                 min_clearance=1000 * FT, altitude_step=500 * FT, top=12000 * FT),
    "energy": dict(allowance_fraction=0.02, descent_rate=2.0, climb_rate=3.0,
                   min_clearance=30.0, altitude_step=10.0, top=1000.0),
}


class _Reader(SchemaReader):
    """The schema reader with the mission file's shorthand: optional tables and fields."""

    def table(self, data, name, allowed, where=None):
        """An optional table whose fields must be among ``allowed`` ({} when absent)."""
        return self.section(name, allowed, required=False, where=where, data=data)

    def quantity(self, sec, key, unit, where, *, lo=None, hi=None, default_unit=None,
                 required=False, example=""):
        """A field in ``unit`` [SI] within [lo, hi]; None when absent and not required."""
        spec = Field(unit, -math.inf if lo is None else lo, math.inf if hi is None else hi,
                     required, example, lo_open=False, default_unit=default_unit)
        return self.value(where, sec, key, spec)


def _store_amount(r, raw, key, where, prop):
    """Fuel or energy to SI (kg or J): a volume, mass, energy or a percentage of capacity."""
    try:
        return parse_amount(raw, prop, what=key)
    except UnitError as exc:
        r.fail(f"{where} {key}", str(exc).split(": ", 1)[-1])


def _wind(r, leg, where):
    if "wind" in leg and "winds" in leg:
        r.fail(f"{where} wind", "give either wind (text) or [[legs.winds]] tables, not both")
    if "wind" in leg:
        if not isinstance(leg["wind"], str):
            r.fail(f"{where} wind", f"{leg['wind']!r} should read like '270/25@3000ft'")
        try:
            return parse_wind_profile(leg["wind"])
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
            speeds.append(r.quantity(row, "speed", "m/s", w, lo=0.0, required=True,
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
    has_points = "from" in leg or "to" in leg
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
    else:
        distance = r.quantity(leg, "distance", "m", where, lo=1.0, required=True,
                              example="'62 nm'")
    wind = _wind(r, leg, where)
    if course is None:
        if any(s > 0 for s in wind.speeds):
            r.fail(f"{where} course", "missing; a leg with wind needs its true course (or "
                                      "from/to waypoints)")
        course = 0.0

    def best_or(key, unit, example):
        raw_v = leg.get(key, "best")
        if raw_v == "best":
            return None
        return r.quantity(leg, key, unit, where, lo=0.0, example=example)

    altitude = best_or("altitude", "m", "'5500 ft' or 'best'")
    speed = best_or("speed", "m/s", "'105 kt' or 'best'")
    if speed is not None and speed <= 0:
        r.fail(f"{where} speed", "must be positive")
    objective = leg.get("objective", "range")
    if objective not in ("range", "endurance", "economy"):
        r.fail(f"{where} objective", f"{objective!r} is not one of range, endurance, economy")
    elevation = r.quantity(leg, "elevation", "m", where, lo=-500.0, example="'1500 ft'")
    max_agl = r.quantity(leg, "max_agl", "m", where, lo=0.0, example="'120 m'")
    max_alt = r.quantity(leg, "max_altitude", "m", where, example="'9500 ft'")
    return Leg(name=name, distance=distance, course=course, wind=wind,
               altitude=None if altitude is None else to_pa(altitude), tas=speed,
               objective=objective, elevation=None if elevation is None else to_pa(elevation),
               max_agl=max_agl, max_altitude=None if max_alt is None else to_pa(max_alt))


def read_mission(path) -> Mission:
    """Read and validate a mission file.

    Parameters
    ----------
    path : str or pathlib.Path
        A TOML mission file.

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
        af = read_airframe(local if local.is_file() else find_airframe(name_or_path))
    except AirframeFileError as exc:
        r.fail("[mission] airframe", str(exc))
    prop = af.propulsion
    defaults = DEFAULTS[prop.store_name]

    day = r.table(data, "day", _DAY_FIELDS)
    qnh = r.quantity(day, "altimeter", "Pa", "[day]", lo=85000.0, hi=108000.0,
                     example="'1013 hPa'")

    def to_pa(alt):
        return float(pressure_altitude_from_altimeter(alt, qnh)) if qnh else alt

    prof_raw = r.table(data, "profile", _PROFILE_FIELDS)
    w = "[profile]"
    dep = r.quantity(prof_raw, "departure_elevation", "m", w, lo=-500.0, example="'450 ft'")
    arr = r.quantity(prof_raw, "arrival_elevation", "m", w, lo=-500.0, example="'300 ft'")
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
        except UnitError:
            r.fail("[day] isa_dev", f"{day.get('isa_dev')!r} is not a temperature difference, "
                                    "e.g. '+15 K' or '+15 degC'")
        if not -60 <= isa_dev <= 60:
            r.fail("[day] isa_dev", f"{day['isa_dev']!r} is out of range (-60 to 60 K)")

    def opt(key, unit, lo, example, default=None, hi=None):
        v = r.quantity(prof_raw, key, unit, w, lo=lo, hi=hi, example=example)
        return default if v is None else v

    profile = Profile(
        departure_elevation=dep, arrival_elevation=arr,
        climb_speed=opt("climb_speed", "m/s", 1.0, "'75 kt'"),
        climb_power=opt("climb_power", "", 0.05, "'100 %'", 1.0, hi=1.0),
        climb_rate=opt("climb_rate", "m/s", 0.1, "'3 m/s'", defaults["climb_rate"]),
        descent_rate=opt("descent_rate", "m/s", 0.1, "'500 ft/min'",
                         defaults["descent_rate"]),
        min_clearance=opt("min_clearance", "m", 0.0, "'1000 ft'", defaults["min_clearance"]),
        altitude_step=opt("altitude_step", "m", 1.0, "'500 ft'", defaults["altitude_step"]),
        top=to_pa(opt("top", "m", 0.0, "'10000 ft'", defaults["top"])))

    mass = r.quantity(head, "takeoff_mass", "kg", "[mission]", lo=0.0, example="'735 kg'")
    payload = r.quantity(head, "payload", "kg", "[mission]", lo=0.0, example="'170 kg'")
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
    res_alt = r.quantity(res_raw, "altitude", "m", "[reserve]", lo=-500.0, example="'3000 ft'")
    alternate = None
    if "alternate" in res_raw:
        alternate = _leg(r, res_raw["alternate"], "[reserve.alternate]", to_pa)
    written = {"time": res_raw.get("time"), "fraction": res_raw.get("fraction"),
               "quantity": res_raw.get("quantity")}
    reserve = Reserve(kind, amount, None if res_alt is None else to_pa(res_alt), alternate,
                      text=str(written[kinds[0]]) if kinds else "")

    legs_raw = data.get("legs")
    if not isinstance(legs_raw, list) or not legs_raw:
        r.fail("[[legs]]", "missing; a mission needs at least one leg")
    legs = tuple(_leg(r, leg, f"leg {k}" + (f" {leg.get('name')!r}" if isinstance(leg, dict)
                                            and "name" in leg else ""), to_pa)
                 for k, leg in enumerate(legs_raw, 1))
    unc = r.table(data, "uncertainty", {"wind_speed", "wind_direction"})
    wind_tolerance = None
    if unc:
        wind_tolerance = WindTolerance(
            r.quantity(unc, "wind_speed", "m/s", "[uncertainty]", lo=0.0, hi=30.0,
                       example="'4 kt'") or 0.0,
            r.quantity(unc, "wind_direction", "deg", "[uncertainty]", lo=0.0, hi=90.0,
                       example="'15 deg'") or 0.0)
    mission = Mission(
        name=str(head.get("name", path.stem)), airframe=af, legs=legs, reserve=reserve,
        profile=profile, isa_dev=isa_dev, mass=mass, store=store, payload=payload,
        allowance=allowance, stall_margin=margin or 1.3, source=str(path),
        description=str(head.get("description", "")), wind_tolerance=wind_tolerance)
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


def load_mission(name_or_path) -> Mission:
    """Load a bundled mission by name, or a mission file by path.

    Parameters
    ----------
    name_or_path : str or pathlib.Path
        Bundled name or path to a TOML mission file.

    Returns
    -------
    Mission
        The validated mission.
    """
    return read_mission(find_file(name_or_path, "mission"))
