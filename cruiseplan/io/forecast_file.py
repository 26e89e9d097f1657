"""Gridded forecast files: CF-convention netCDF winds and temperatures, read with xarray.

A forecast file (netCDF-4 read through h5netcdf, or netCDF-3 through scipy) holds the
eastward wind, the northward wind and the air temperature on levels over latitude,
longitude and time. Everything is found by its CF ``standard_name`` [1]_, not by a
variable's name:

* variables ``eastward_wind`` and ``northward_wind`` (units ``m s-1``, ``m/s``,
  ``m s**-1``, ``knots`` or ``kt``) and ``air_temperature`` (``K``, ``degC``,
  ``celsius`` or ``degree_Celsius``), each on the same four dimensions (size-one extra
  dimensions, such as a reference time, are dropped);
* coordinates ``latitude`` and ``longitude`` [deg] (or ``axis`` Y and X, or units
  ``degrees_north`` and ``degrees_east``), ``time`` (or
  ``axis`` T) with CF time units (``hours since 2026-12-03 00:00``, UTC unless stated),
  decoded by xarray, and a vertical coordinate: ``air_pressure`` (``Pa`` or ``hPa``),
  converted exactly to pressure altitude, or ``altitude`` (height above mean sea level,
  ``m`` or ``ft``), taken as pressure altitude (see :mod:`cruiseplan.physics.forecast`
  for the size of that approximation). CF ``height`` is height above the *surface* and is
  refused: over high ground it is not an altitude.

Longitudes may run 0..360 or -180..180 (a grid across the 180th meridian in -180..180
is unwrapped). Coordinates may decrease (latitudes from north to south, pressures from the
ground up); they are put in increasing order. Every problem is one
:class:`~cruiseplan.errors.ForecastFileError` line naming the file, the variable and what
was expected; files above :data:`MAX_FILE_BYTES` are refused before they are opened.

xarray and h5netcdf are optional (the ``forecast`` extra): the rest of cruiseplan imports
and plans without them.

References
----------
.. [1] B. Eaton et al., *NetCDF Climate and Forecast (CF) Metadata Conventions*,
   version 1.10, 2022: secs. 4.1-4.4 (latitude, longitude, vertical and time
   coordinates, ``axis``, ``positive``), 3.3 (standard names), and the standard name
   table (``eastward_wind``, ``northward_wind``, ``air_temperature``, ``air_pressure``,
   ``altitude``, ``height``).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from cruiseplan.constants import FT, T_ZERO_C
from cruiseplan.errors import ForecastFileError
from cruiseplan.physics.atmosphere import pressure_altitude_from_pressure
from cruiseplan.physics.forecast import GriddedWeather

#: Largest forecast file read [bytes]; cut a larger one to the route's area and day first.
MAX_FILE_BYTES = 256 * 2**20
#: Knot [m/s].
KNOT = 1852.0 / 3600.0
#: Accepted ``units`` of each kind of variable: (scale, offset) to SI, ``si = x * a + b``.
UNITS = {
    "wind": {"m s-1": (1.0, 0.0), "m/s": (1.0, 0.0), "m s**-1": (1.0, 0.0),
             "knots": (KNOT, 0.0), "kt": (KNOT, 0.0)},
    "temperature": {"K": (1.0, 0.0), "degC": (1.0, T_ZERO_C), "celsius": (1.0, T_ZERO_C),
                    "degree_Celsius": (1.0, T_ZERO_C)},
    "pressure": {"Pa": (1.0, 0.0), "hPa": (100.0, 0.0)},
    "altitude": {"m": (1.0, 0.0), "ft": (FT, 0.0)},
    "angle": {"degrees_north": (1.0, 0.0), "degree_north": (1.0, 0.0),
              "degree_N": (1.0, 0.0), "degrees_N": (1.0, 0.0), "degreeN": (1.0, 0.0),
              "degreesN": (1.0, 0.0), "degrees_east": (1.0, 0.0), "degree_east": (1.0, 0.0),
              "degree_E": (1.0, 0.0), "degrees_E": (1.0, 0.0), "degreeE": (1.0, 0.0),
              "degreesE": (1.0, 0.0), "degrees": (1.0, 0.0), "degree": (1.0, 0.0)},
}
#: Units that make a coordinate a latitude or a longitude without a standard name (CF 4.1,
#: 4.2).
_LAT_UNITS = ("degrees_north", "degree_north", "degree_N", "degrees_N", "degreeN", "degreesN")
_LON_UNITS = ("degrees_east", "degree_east", "degree_E", "degrees_E", "degreeE", "degreesE")
#: The variables read: (standard_name, kind of units, what it is for messages).
VARIABLES = (("eastward_wind", "wind", "the eastward wind (u)"),
             ("northward_wind", "wind", "the northward wind (v)"),
             ("air_temperature", "temperature", "the air temperature"))


def _fail(path, message):
    raise ForecastFileError(f"{path}: {message}")


def _units_list(kind) -> str:
    return ", ".join(repr(u) for u in UNITS[kind])


def _convert(path, name, values, attrs, kind):
    """``values`` in SI from the ``units`` attribute, checked against :data:`UNITS`."""
    units = attrs.get("units")
    if units is None:
        _fail(path, f"{name}: no units attribute; expected one of {_units_list(kind)}")
    units = str(units).strip()
    if units not in UNITS[kind]:
        _fail(path, f"{name}: units {units!r} not accepted; expected one of "
                    f"{_units_list(kind)}")
    a, b = UNITS[kind][units]
    out = np.asarray(values, dtype=float) * a + b
    if not np.all(np.isfinite(out)):
        bad = int(np.sum(~np.isfinite(out)))
        _fail(path, f"{name}: {bad} of {out.size} values are missing or not finite; "
                    "expected a complete field over the route")
    return out


def _open(path):
    """The dataset, lazily opened; xarray imported here (the ``forecast`` extra)."""
    try:
        import xarray as xr
    except ImportError:
        _fail(path, "reading a forecast needs xarray and h5netcdf: pip install "
                    "'cruiseplan[forecast]'")
    p = Path(path)
    if not p.exists():
        _fail(path, "no such file")
    if not p.is_file():
        _fail(path, "not a file")
    size = p.stat().st_size
    if size > MAX_FILE_BYTES:
        _fail(path, f"{size / 2**20:.0f} MB, larger than the {MAX_FILE_BYTES // 2**20} MB "
                    "read; cut the forecast to the route's area, levels and day first")
    try:
        return xr.open_dataset(p, decode_times=True, mask_and_scale=True)
    except Exception as exc:  # any backend's failure to open it: not a readable file
        reason = str(exc).splitlines()[0] if str(exc) else type(exc).__name__
        _fail(path, f"cannot read it as netCDF (CF conventions, netCDF-4 or netCDF-3): "
                    f"{reason[:160]}")


def _by_standard_name(path, ds, standard, what):
    """The one data variable with ``standard_name``."""
    found = [k for k, v in ds.data_vars.items() if v.attrs.get("standard_name") == standard]
    if not found:
        _fail(path, f"no variable with standard_name {standard!r}; expected {what}")
    if len(found) > 1:
        _fail(path, f"{len(found)} variables with standard_name {standard!r} "
                    f"({', '.join(map(str, found))}); expected one")
    return found[0]


def _role(coord) -> str | None:
    """What a dimension's coordinate is: lat, lon, time, pressure, altitude, height."""
    sn = coord.attrs.get("standard_name")
    axis = str(coord.attrs.get("axis", "")).upper()
    table = {"latitude": "lat", "longitude": "lon", "time": "time",
             "air_pressure": "pressure", "altitude": "altitude", "height": "height"}
    if sn in table:
        return table[sn]
    if axis in ("Y", "X", "T"):
        return {"Y": "lat", "X": "lon", "T": "time"}[axis]
    units = str(coord.attrs.get("units", "")).strip()
    if units in _LAT_UNITS:
        return "lat"
    if units in _LON_UNITS:
        return "lon"
    if axis == "Z":
        if units in UNITS["pressure"]:
            return "pressure"
        if units in UNITS["altitude"]:
            return "altitude"
        return "vertical"
    if np.issubdtype(coord.dtype, np.datetime64):
        return "time"
    return None


def _order(path, name, values):
    """Index order that makes ``values`` increase; error if they are not monotonic."""
    d = np.diff(values)
    if values.size < 2 or np.all(d > 0):
        return slice(None)
    if np.all(d < 0):
        return slice(None, None, -1)
    _fail(path, f"{name}: coordinate values are not strictly monotonic")


def _times(path, name, coord) -> np.ndarray:
    """Times [s since the Unix epoch] from a coordinate xarray decoded."""
    values = coord.values
    if not np.issubdtype(values.dtype, np.datetime64):
        _fail(path, f"{name}: times not decoded; expected CF time units such as "
                    "'hours since 2026-12-03 00:00' on the standard calendar")
    if np.any(np.isnat(values)):
        _fail(path, f"{name}: missing times")
    ns = values.astype("datetime64[ns]").astype(np.int64)
    return ns / 1e9


def _longitudes(path, name, values) -> np.ndarray:
    """Longitudes [deg], unwrapped across the 180th meridian when given in -180..180."""
    lon = np.asarray(values, dtype=float)
    if np.any(np.diff(lon) <= 0) and lon.size > 1 and np.all(np.isfinite(lon)):
        lon0 = lon[0]
        unwrapped = lon0 + np.mod(lon - lon0, 360.0)
        if np.all(np.diff(unwrapped) > 0):
            return unwrapped
        unwrapped = lon0 - np.mod(lon0 - lon, 360.0)
        if np.all(np.diff(unwrapped) < 0):
            return unwrapped
    return lon


def _four(ds, name):
    """The variable without its size-one dimensions that are no coordinate we read."""
    da = ds[name]
    extra = [d for d in da.dims if da.sizes[d] == 1
             and (d not in ds.coords or _role(ds[d]) is None)]
    return da.squeeze(extra) if extra and da.ndim > 4 else da


def read_forecast(path) -> GriddedWeather:
    """Read a CF-convention netCDF forecast into a :class:`GriddedWeather` (SI).

    Parameters
    ----------
    path : str or pathlib.Path
        The netCDF file (at most :data:`MAX_FILE_BYTES`).

    Returns
    -------
    GriddedWeather
        Winds [m/s] and temperature [K] on (time, level, latitude, longitude), levels as
        pressure altitudes [m], all coordinates increasing.

    Raises
    ------
    ForecastFileError
        One line naming the file, the variable and what was expected: unreadable or too
        large, a variable or coordinate missing, units missing or not accepted, values not
        finite, coordinates not monotonic.
    """
    ds = _open(path)
    try:
        return _read(path, ds)
    finally:
        ds.close()


def _read(path, ds) -> GriddedWeather:
    names = [_by_standard_name(path, ds, sn, what) for sn, _, what in VARIABLES]
    dims = None
    for name in names:
        da = _four(ds, name)
        if da.ndim != 4:
            _fail(path, f"{name}: {da.ndim} dimensions {tuple(map(str, da.dims))}; expected "
                        "four: time, a vertical level, latitude and longitude")
        if dims is None:
            dims = da.dims
        elif set(da.dims) != set(dims):
            _fail(path, f"{name}: dimensions {tuple(map(str, da.dims))} differ from "
                        f"{names[0]}'s {tuple(map(str, dims))}")
    roles = {}
    for d in dims:
        if d not in ds.coords:
            _fail(path, f"{d}: dimension of {names[0]} has no coordinate variable; expected "
                        "latitude, longitude, time and a vertical coordinate")
        role = _role(ds[d])
        if role in roles.values() or role is None:
            _fail(path, f"{d}: coordinate not recognised (standard_name "
                        f"{ds[d].attrs.get('standard_name')!r}, axis "
                        f"{ds[d].attrs.get('axis')!r}); expected latitude, longitude, time, "
                        "air_pressure or altitude, each once")
        roles[d] = role
    by_role = {r: d for d, r in roles.items()}
    for role, what in (("lat", "latitude"), ("lon", "longitude"), ("time", "time")):
        if role not in by_role:
            _fail(path, f"{names[0]}: no {what} coordinate (standard_name {what!r})")
    vertical = [d for d, r in roles.items() if r in ("pressure", "altitude", "height",
                                                    "vertical")]
    if not vertical:
        _fail(path, f"{names[0]}: no vertical coordinate; expected air_pressure or altitude")
    z = vertical[0]
    kind = roles[z]
    if kind == "height":
        _fail(path, f"{z}: standard_name 'height' is height above the surface, not an "
                    "altitude; give levels as 'altitude' (above mean sea level) or "
                    "'air_pressure'")
    if kind == "vertical":
        _fail(path, f"{z}: vertical coordinate units {ds[z].attrs.get('units')!r} not "
                    f"accepted; expected one of {_units_list('pressure')} (air_pressure) or "
                    f"{_units_list('altitude')} (altitude)")
    lat_d, lon_d, t_d = by_role["lat"], by_role["lon"], by_role["time"]

    lat = _convert(path, lat_d, ds[lat_d].values, ds[lat_d].attrs, "angle")
    lon = _longitudes(path, lon_d,
                      _convert(path, lon_d, ds[lon_d].values, ds[lon_d].attrs, "angle"))
    times = _times(path, t_d, ds[t_d])
    if kind == "pressure":
        p = _convert(path, z, ds[z].values, ds[z].attrs, "pressure")
        try:
            levels = pressure_altitude_from_pressure(p)
        except ValueError as exc:
            _fail(path, f"{z}: {exc}")
    else:
        levels = _convert(path, z, ds[z].values, ds[z].attrs, "altitude")
    order = {lat_d: _order(path, lat_d, lat), lon_d: _order(path, lon_d, lon),
             t_d: _order(path, t_d, times), z: _order(path, z, levels)}
    axes = (t_d, z, lat_d, lon_d)
    fields = []
    for name, (_, kind_u, _) in zip(names, VARIABLES):
        da = _four(ds, name).transpose(*axes)
        values = _convert(path, name, da.values, da.attrs, kind_u)
        fields.append(values[tuple(order[d] for d in axes)])
    try:
        return GriddedWeather(times[order[t_d]], levels[order[z]], lat[order[lat_d]],
                              lon[order[lon_d]], *fields, source=str(path),
                              level_kind="pressure" if kind == "pressure" else "altitude")
    except ForecastFileError:
        raise
    except ValueError as exc:
        _fail(path, str(exc))
