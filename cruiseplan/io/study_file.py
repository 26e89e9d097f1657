"""Study files: a base mission or airframe, the axes it is swept over, what to record.

A study file is TOML, with units written as strings, like the airframe and mission files::

    [study]
    name = "hot-day-loads"
    mission = "demo-cross-country"     # or: airframe = "demo-trainer" (best cruise)
    record = ["verdict", "used", "reserve_margin", "time", "leg_altitude"]
    chunk = 128                        # points per chunk (default: about 1000 chunks)

    [axes]                             # in this order: the Dataset's dimensions
    isa_dev = "-10:30:10 K"            # a range start:stop:step, or a list
    payload = ["120 kg", "165 kg", "200 kg"]
    fuel = ["70 %", "100 %"]
    wind_speed = "0:30:10 kt"
    wind_direction = [270]             # degrees true, the direction it blows from
    "airframe.polar.cd0" = [0.034, 0.036, 0.040]

A mission study may take ``[study] forecast = "winds.nc"`` (a CF netCDF forecast, relative
to the study file): its points are planned with the forecast's winds and temperatures, and
``departure = { from = "2026-12-03T00:00Z", to = "2026-12-04T00:00Z", step = "1 h" }`` (or
a list of times) is then an axis; the wind and temperature axes are not.

An airframe study also has ``[best] altitudes = "0:10000:1000 ft"`` and ``objective``.
Every value is checked here, before anything is run: errors name the file, the field and
what was expected.
"""

from __future__ import annotations

import math
from pathlib import Path

from cruiseplan.errors import CruiseplanError, StudyFileError
from cruiseplan.io.bundled import find_file
from cruiseplan.io.schema import SchemaReader, read_toml
from cruiseplan.io.text import parse_utc_time
from cruiseplan.model.study import (
    AIRFRAME_AXES,
    AIRFRAME_FIELD,
    AIRFRAME_RECORDS,
    FORECAST_REPLACES,
    MISSION_AXES,
    MISSION_RECORDS,
    Axis,
    Study,
)
from cruiseplan.ranges import check_range
from cruiseplan.units import parse_quantity, parse_range, temperature_difference

#: Most points a study may have (each is a plan; a store holds a few variables per point).
MAX_POINTS = 10_000_000
#: Most values on one axis.
MAX_AXIS = 100_000
#: Each axis's physical range (a key of :data:`cruiseplan.ranges.RANGES`).
AXIS_RANGES = {"isa_dev": "isa_dev", "oat": "oat", "payload": "payload",
               "wind_speed": "speed", "headwind": "headwind", "wind_direction": "course"}
#: Records of each study kind when the file names none.
DEFAULT_RECORDS = {
    "mission": ("verdict", "used", "remaining", "reserve_required", "reserve_margin", "time",
                "leg_altitude", "leg_tas"),
    "airframe": ("verdict", "best_altitude", "best_tas", "best_value", "range", "endurance"),
}
_STUDY_FIELDS = ("name", "description", "mission", "airframe", "record", "chunk",
                 "monte_carlo", "seed", "forecast")
#: Most departure times on one axis.
MAX_DEPARTURES = 10_000
_SECTIONS = {"study", "axes", "best"}


def _values(r: SchemaReader, name: str, raw, si_unit: str, *, temperature=False,
            default_unit=None) -> tuple:
    """An axis's values [si_unit] from a list or a range string."""
    where = f"[axes] {name}"
    if isinstance(raw, str):
        items = [raw]
    elif isinstance(raw, list) and raw:
        items = raw
    else:
        r.fail(where, "expected a range 'start:stop:step unit' or a non-empty list of values")
    out = []
    for item in items:
        if isinstance(item, bool) or not isinstance(item, (str, int, float)):
            r.fail(where, f"{item!r} is not a value (a number or a string with a unit)")
        try:
            if temperature and not (isinstance(item, str) and ":" in item):
                out.append(temperature_difference(item if isinstance(item, str)
                                                  else float(item), what=where))
            else:
                text = item if isinstance(item, str) else repr(float(item))
                out.extend(float(v) for v in parse_range(text, si_unit,
                                                         default_unit=default_unit,
                                                         what=where))
        except CruiseplanError as exc:
            r.fail(where, str(exc).removeprefix(f"{where}: "))
    if not all(math.isfinite(v) for v in out):
        r.fail(where, "values must be finite")
    if len(out) > MAX_AXIS:
        r.fail(where, f"{len(out)} values; at most {MAX_AXIS} on one axis")
    if len(set(out)) != len(out):
        r.fail(where, "values repeat; each value once")
    return tuple(out)


def _fuel(r: SchemaReader, raw) -> Axis:
    """Fuel or battery amounts: all percentages (kept in %), or all with a unit (text)."""
    where = "[axes] fuel"
    items = raw if isinstance(raw, list) else None
    if not items or not all(isinstance(v, str) for v in items):
        r.fail(where, "expected a list of amounts such as [\"60 %\", \"100 %\"] or "
                      "[\"80 L\", \"100 L\"]")
    if all(v.strip().endswith("%") for v in items):
        try:
            values = tuple(float(v.strip()[:-1]) for v in items)
        except ValueError:
            r.fail(where, f"cannot read {items!r} as percentages")
        if not all(0.0 <= v <= 100.0 for v in values):
            r.fail(where, "percentages must be between 0 and 100")
        if len(set(values)) != len(values):
            r.fail(where, "values repeat; each value once")
        return Axis("fuel", values, "%")
    if any(v.strip().endswith("%") for v in items):
        r.fail(where, "give all amounts as percentages, or all with a unit, not both")
    if len(set(items)) != len(items):
        r.fail(where, "values repeat; each value once")
    # Amounts with a unit are read against the airframe (a volume needs its fuel's
    # density), so they are checked when the study's base is read.
    return Axis("fuel", tuple(v.strip() for v in items), "amount")


def _departures(r: SchemaReader, raw) -> Axis:
    """Departure times: a list of ISO 8601 UTC times, or {from, to, step}."""
    where = "[axes] departure"
    try:
        if isinstance(raw, dict):
            r.check_fields(raw, ("from", "to", "step"), where)
            if set(raw) != {"from", "to", "step"}:
                r.fail(where, "expected { from = TIME, to = TIME, step = \"1 h\" }")
            t0 = parse_utc_time(raw["from"], what=f"{where} from")
            t1 = parse_utc_time(raw["to"], what=f"{where} to")
            step = parse_quantity(raw["step"], "s", what=f"{where} step")
            if not (step > 0 and t1 >= t0):
                r.fail(where, "expected to >= from and a positive step")
            n = int((t1 - t0) / step + 1e-9) + 1
            if n > MAX_DEPARTURES:
                r.fail(where, f"{n} times; at most {MAX_DEPARTURES}")
            values = tuple(t0 + k * step for k in range(n))
        elif isinstance(raw, list) and raw:
            values = tuple(parse_utc_time(v, what=where) for v in raw)
        else:
            r.fail(where, "expected a list of ISO 8601 UTC times or { from, to, step }")
    except CruiseplanError as exc:
        r.fail(where, str(exc).removeprefix(f"{where}: "))
    if len(set(values)) != len(values):
        r.fail(where, "times repeat; each time once")
    return Axis("departure", values, "s")


def _airframe_field(r: SchemaReader, name: str, raw) -> Axis:
    """An airframe field's values: numbers, or strings with one common unit."""
    where = f"[axes] {name}"
    items = raw if isinstance(raw, list) else None
    if not items:
        r.fail(where, "expected a non-empty list of the field's values")
    if all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in items):
        values, unit = tuple(float(v) for v in items), "1"
    elif all(isinstance(v, str) for v in items):
        parts = [v.strip().split(None, 1) for v in items]
        try:
            values = tuple(float(p[0]) for p in parts)
        except ValueError:
            r.fail(where, f"cannot read {items!r}: expected strings 'NUMBER UNIT'")
        units = {p[1] if len(p) > 1 else "" for p in parts}
        if len(units) != 1:
            r.fail(where, f"values must share one unit, got {', '.join(sorted(units))}")
        unit = units.pop() or "1"
    else:
        r.fail(where, "expected all numbers, or all strings with a unit")
    if not all(math.isfinite(v) for v in values):
        r.fail(where, "values must be finite")
    if len(set(values)) != len(values):
        r.fail(where, "values repeat; each value once")
    if len(name.split(".")) < 3:
        r.fail(where, "expected airframe.TABLE.FIELD, e.g. airframe.polar.cd0")
    return Axis(name, values, unit)


def read_study(path) -> Study:
    """Read and validate a study file.

    Parameters
    ----------
    path : str or pathlib.Path
        A TOML study file.

    Returns
    -------
    Study
        Its axes in SI (fuel percentages in %, airframe fields as written), records,
        chunk size and base file.

    Raises
    ------
    StudyFileError
        Naming the file, the field and what was expected.
    """
    path = Path(path)
    data, checksum = read_toml(path, StudyFileError)
    r = SchemaReader(path, data, StudyFileError)
    unknown = sorted(set(data) - _SECTIONS)
    if unknown:
        r.fail(f"[{unknown[0]}]", f"unknown section; expected {', '.join(sorted(_SECTIONS))}")
    head = r.section("study", _STUDY_FIELDS)
    if ("mission" in head) == ("airframe" in head):
        r.fail("[study]", "give one of mission = NAME_OR_FILE (plans) or airframe = "
                          "NAME_OR_FILE (best cruise)")
    kind = "mission" if "mission" in head else "airframe"
    base_text = str(head[kind])
    local = path.parent / base_text
    try:
        base = local if local.is_file() else find_file(base_text, kind)
    except CruiseplanError as exc:
        r.fail(f"[study] {kind}", str(exc))
    allowed_axes = MISSION_AXES if kind == "mission" else AIRFRAME_AXES
    allowed_records = MISSION_RECORDS if kind == "mission" else AIRFRAME_RECORDS

    raw_axes = r.section("axes", None)
    if not raw_axes:
        r.fail("[axes]", "no axes; give at least one, e.g. isa_dev = [\"0 K\", \"20 K\"]")
    axes = []
    for name, raw in raw_axes.items():
        if name.startswith(AIRFRAME_FIELD):
            axes.append(_airframe_field(r, name, raw))
        elif name not in allowed_axes:
            r.fail(f"[axes] {name}", f"unknown axis for a {kind} study; expected one of "
                   f"{', '.join(allowed_axes)} or {AIRFRAME_FIELD}TABLE.FIELD")
        elif name == "fuel":
            axes.append(_fuel(r, raw))
        elif name == "departure":
            axes.append(_departures(r, raw))
        elif name == "isa_dev":
            axes.append(Axis(name, _values(r, name, raw, "K", temperature=True), "K"))
        elif name == "oat":
            axes.append(Axis(name, _values(r, name, raw, "K", default_unit="degC"), "K"))
        elif name == "wind_direction":
            values = _values(r, name, raw, "deg", default_unit="deg")
            if not all(0.0 <= v <= 360.0 for v in values):
                r.fail(f"[axes] {name}", "directions must be within 0 to 360 degrees")
            axes.append(Axis(name, values, "deg"))
        else:
            axes.append(Axis(name, _values(r, name, raw, allowed_axes[name]),
                             allowed_axes[name]))
    for a in axes:
        if a.name in AXIS_RANGES:
            try:
                check_range(a.values, AXIS_RANGES[a.name], f"[axes] {a.name}")
            except CruiseplanError as exc:
                r.fail(f"[axes] {a.name}", str(exc).removeprefix(f"[axes] {a.name}: "))
    names = {a.name for a in axes}
    if {"isa_dev", "oat"} <= names:
        r.fail("[axes] oat", "give isa_dev or oat, not both")
    if ("wind_speed" in names) != ("wind_direction" in names):
        r.fail("[axes]", "wind_speed and wind_direction go together (one value is an axis "
                         "of length 1)")
    for a in axes:
        if a.name in ("payload", "wind_speed") and min(a.values) < 0:
            r.fail(f"[axes] {a.name}", "values must not be negative")
    forecast = None
    if "forecast" in head:
        forecast = path.parent / str(head["forecast"])
        if kind != "mission":
            r.fail("[study] forecast", "only a mission study takes a forecast")
        if not forecast.is_file():
            r.fail("[study] forecast", f"no such file {forecast}")
        clash = sorted(names & set(FORECAST_REPLACES))
        if clash:
            r.fail(f"[axes] {clash[0]}", "the forecast gives the winds and the day's "
                                         "temperature; sweep departure instead")
    elif "departure" in names:
        r.fail("[axes] departure", "a departure axis needs [study] forecast = FILE")
    size = math.prod(len(a) for a in axes)
    if size > MAX_POINTS:
        r.fail("[axes]", f"{size} points; at most {MAX_POINTS} in one study")

    records = head.get("record", list(DEFAULT_RECORDS[kind]))
    if not isinstance(records, list) or not records or not all(
            isinstance(x, str) for x in records):
        r.fail("[study] record", f"expected a list of names among "
                                 f"{', '.join(allowed_records)}")
    for rec in records:
        if rec not in allowed_records:
            r.fail("[study] record", f"{rec!r} is not recorded by a {kind} study; expected "
                                     f"one of {', '.join(allowed_records)}")
    if len(set(records)) != len(records):
        r.fail("[study] record", "names repeat")
    monte_carlo = _integer(r, head, "monte_carlo", 0, 0, 1_000_000)
    if "reserve_probability" in records and monte_carlo == 0:
        r.fail("[study] monte_carlo", "reserve_probability needs Monte Carlo samples per "
                                      "point, e.g. monte_carlo = 2000")
    altitudes, objective = (), "range"
    best = r.section("best", ("altitudes", "objective"), required=kind == "airframe")
    if kind == "airframe":
        if "altitudes" not in best:
            r.fail("[best] altitudes", "missing; e.g. altitudes = \"0:10000:1000 ft\"")
        altitudes = _values(r, "altitudes", best["altitudes"], "m", default_unit="ft")
        try:
            check_range(altitudes, "altitude", "[best] altitudes")
        except CruiseplanError as exc:
            r.fail("[best] altitudes", str(exc).removeprefix("[best] altitudes: "))
        objective = r.choice("[best]", best, "objective",
                             {"range": 0, "endurance": 0, "economy": 0}, default="range")
    elif best:
        r.fail("[best]", "only an airframe study has a [best] section")
    return Study(name=str(head.get("name", path.stem)),
                 description=str(head.get("description", "")), kind=kind, base=str(base),
                 axes=tuple(axes), records=tuple(records),
                 chunk=_integer(r, head, "chunk", auto_chunk(size), 1, 1_000_000),
                 monte_carlo=monte_carlo, seed=_integer(r, head, "seed", 0, 0, 2**63 - 1),
                 altitudes=altitudes, objective=objective,
                 forecast=None if forecast is None else str(forecast),
                 source=str(path), checksum=checksum)


def auto_chunk(size: int) -> int:
    """Points per chunk when the file gives none: about a thousand chunks, 128 to 4096 each.

    A chunk is the unit of work, of progress and of ``--resume``; a thousand of them keep
    a store's files few and each chunk's loss on a crash small. A chunk's points are
    planned together (:func:`~cruiseplan.planning.mission.plan_missions`), whose cost per
    point falls as the chunk grows (a 10-leg mission: 2.4 ms a point in chunks of 64,
    2.0 in chunks of 256); at least 128 keep a worker busy for a good share of a second
    per task, so that the scheduler's round trips stay small beside the work.

    Parameters
    ----------
    size : int
        Points in the study [-].

    Returns
    -------
    int
        Points per chunk [-].
    """
    return max(128, min(4096, -(-size // 1000)))


def _integer(r: SchemaReader, table: dict, key: str, default: int, lo: int, hi: int) -> int:
    value = table.get(key, default)
    if isinstance(value, bool) or not isinstance(value, int) or not lo <= value <= hi:
        r.fail(f"[study] {key}", f"expected a whole number from {lo} to {hi}, got {value!r}")
    return value


def load_study(name_or_path) -> Study:
    """Load a bundled study by name, or a study file by path.

    Parameters
    ----------
    name_or_path : str or pathlib.Path
        Bundled name or path to a TOML study file.

    Returns
    -------
    Study
        The validated study.
    """
    return read_study(find_file(name_or_path, "study"))
