r"""Gridded weather: winds and temperatures of a forecast on (time, level, lat, lon), sampled.

A :class:`GriddedWeather` holds the eastward and northward wind and the air temperature of
a gridded forecast in SI on a regular-or-not rectilinear grid: times [s since the Unix
epoch, UTC], levels as pressure altitudes [m], latitudes and longitudes [deg]. The file
reader (:mod:`cruiseplan.io.forecast_file`) builds it from a CF-convention netCDF file; this
module is numpy only.

Interpolation (:meth:`GriddedWeather.sample`) is linear in time and in pressure altitude
and bilinear in latitude and longitude, every step written :math:`a + (b - a)\,t`, so a
uniform field gives back exactly its value and a field linear in each coordinate is
reproduced to rounding. Points outside the grid's area or time span are an error naming
the point and the coverage; vertically, beyond the lowest and highest level the end values
hold (as typed winds do, :class:`~cruiseplan.physics.winds.WindProfile`).

Temperature is carried as its deviation from ISA at each level, :math:`\Delta T = T -
T_{ISA}(H)`, interpolated like the winds and added back to :math:`T_{ISA}` at the point's
pressure altitude. Within a layer of constant lapse rate (the troposphere) that equals
linear interpolation of :math:`T`; beyond the levels it holds the deviation, not the
temperature.

Levels given as pressures are converted exactly
(:func:`~cruiseplan.physics.atmosphere.pressure_altitude_from_pressure`). Levels given as
heights above mean sea level are **taken as pressure altitudes**: the true pressure
altitude of a height :math:`z` differs by about :math:`z\,(T - T_{ISA})/T_{ISA}` plus the
sea-level pressure's departure from 1013.25 hPa (about 8 m per hPa), e.g. 35 m at 1000 m
on an ISA+10 K day; winds change little over such a distance.

References
----------
.. [1] B. Eaton et al., *NetCDF Climate and Forecast (CF) Metadata Conventions*,
   version 1.10, 2022 (the ``eastward_wind``, ``northward_wind`` and ``air_temperature``
   standard names; ``u`` positive towards east, ``v`` towards north).
.. [2] WMO, *Manual on Codes*, WMO-No. 306 (wind direction: where the wind blows from,
   degrees true).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime, timezone

import numpy as np

from cruiseplan.errors import ForecastFileError
from cruiseplan.physics.atmosphere import check_altitude, isa_temperature_pressure
from cruiseplan.physics.winds import WindProfile

#: Slack on the grid's edges [deg, s]: a point this close outside is taken as on the edge.
EDGE_SLACK = 1e-9


def iso_time(seconds) -> str:
    """A time as ISO 8601 UTC to the minute, ``2026-12-03T06:00Z``.

    Parameters
    ----------
    seconds : float
        Seconds since the Unix epoch [s].

    Returns
    -------
    str
        The time, to the minute (seconds shown when not whole minutes).
    """
    t = datetime.fromtimestamp(float(seconds), tz=timezone.utc)
    return t.strftime("%Y-%m-%dT%H:%M:%SZ" if t.second else "%Y-%m-%dT%H:%MZ")


def point_text(lat, lon) -> str:
    """A position in words, ``45.1234 N 7.0000 E`` (longitude shown in -180..180).

    Parameters
    ----------
    lat, lon : float
        Latitude and longitude [deg].

    Returns
    -------
    str
        Degrees to four decimals with their hemispheres.
    """
    lat, lon = float(lat), float(lon)
    if np.isfinite(lon):
        lon = (lon + 180.0) % 360.0 - 180.0
    return (f"{abs(lat):.4f} {'S' if lat < 0 else 'N'} "
            f"{abs(lon):.4f} {'W' if lon < 0 else 'E'}")


def wind_from(u, v):
    """Direction the wind blows from [deg true] and its speed, from its components.

    Parameters
    ----------
    u : array_like
        Eastward wind [m/s].
    v : array_like
        Northward wind [m/s].

    Returns
    -------
    direction : numpy.ndarray
        Direction the wind blows from [deg true], in [0, 360).
    speed : numpy.ndarray
        Wind speed [m/s].

    References
    ----------
    .. [2] WMO-No. 306: direction = atan2(-u, -v), the meteorological convention.
    """
    u, v = np.asarray(u, dtype=float), np.asarray(v, dtype=float)
    return np.mod(np.degrees(np.arctan2(-u, -v)), 360.0), np.hypot(u, v)


def _axis(name, values, source) -> np.ndarray:
    """A coordinate as a float vector, finite and strictly increasing."""
    a = np.asarray(values, dtype=float)
    if a.ndim != 1 or a.size == 0:
        raise ForecastFileError(f"{source}: {name}: expected a non-empty 1-D coordinate")
    if not np.all(np.isfinite(a)):
        raise ForecastFileError(f"{source}: {name}: values must be finite numbers")
    if np.any(np.diff(a) <= 0):
        raise ForecastFileError(f"{source}: {name}: values must increase strictly")
    return a


def _bracket(axis, x, hold):
    """Lower and upper indices and the fraction of ``x`` between them (vectorised).

    Outside the axis the fraction is clipped to [0, 1] when ``hold``; the caller checks
    the range otherwise. A one-point axis gives (0, 0, 0).
    """
    n = axis.size
    if n == 1:
        z = np.zeros(np.shape(x), dtype=int)
        return z, z, np.zeros(np.shape(x))
    i = np.clip(np.searchsorted(axis, x, side="right") - 1, 0, n - 2)
    t = (x - axis[i]) / (axis[i + 1] - axis[i])
    if hold:
        t = np.clip(t, 0.0, 1.0)
    return i, i + 1, t


def _lerp(a, b, t):
    return a + (b - a) * t


@dataclass(frozen=True)
class GriddedWeather:
    """Winds and temperatures of a gridded forecast (SI).

    Parameters
    ----------
    times : array_like
        Valid times [s since 1970-01-01T00:00Z], strictly increasing, shape (nt,).
    levels : array_like
        Pressure altitudes of the levels [m], strictly increasing, shape (nz,).
    latitudes : array_like
        Latitudes [deg], strictly increasing, -90..90, shape (ny,), at least 2.
    longitudes : array_like
        Longitudes [deg], strictly increasing, spanning less than 360 deg, shape (nx,), at
        least 2; shifted by whole turns so that the first lies in -180..180. A global grid
        whose last longitude is one spacing short of 360 deg from the first is closed by
        repeating the first column.
    u, v : array_like
        Eastward and northward wind [m/s], shape (nt, nz, ny, nx).
    temperature : array_like
        Air temperature [K], shape (nt, nz, ny, nx).
    source : str
        Where the data came from (a file name), for messages.
    level_kind : str
        How the file gave its levels, for messages (``"pressure"`` or ``"height"``).
    """

    times: np.ndarray
    levels: np.ndarray
    latitudes: np.ndarray
    longitudes: np.ndarray
    u: np.ndarray
    v: np.ndarray
    temperature: np.ndarray
    source: str = "forecast"
    level_kind: str = "pressure"
    #: Deviation from ISA at each grid point [K], computed from ``temperature``.
    isa_dev: np.ndarray = field(init=False, repr=False)

    def __post_init__(self):
        src = self.source
        t = _axis("time", self.times, src)
        z = _axis("level", self.levels, src)
        lat = _axis("latitude", self.latitudes, src)
        lon = _axis("longitude", self.longitudes, src)
        if lat.size < 2 or lon.size < 2:
            raise ForecastFileError(f"{src}: latitude and longitude need at least 2 points "
                                    "each to interpolate between")
        if lat[0] < -90 or lat[-1] > 90:
            raise ForecastFileError(f"{src}: latitude: values must lie in -90..90 deg")
        if lon[-1] - lon[0] >= 360:
            raise ForecastFileError(f"{src}: longitude: values must span less than 360 deg")
        # The first longitude in [-180, 180); the others follow it (east of 180 allowed).
        lon = lon - 360.0 * np.floor((lon[0] + 180.0) / 360.0)
        try:
            check_altitude(z, "level")
        except ValueError as exc:
            raise ForecastFileError(f"{src}: {exc}") from None
        shape = (t.size, z.size, lat.size, lon.size)
        arrays = {}
        for name in ("u", "v", "temperature"):
            a = np.asarray(getattr(self, name), dtype=float)
            if a.shape != shape:
                raise ForecastFileError(f"{src}: {name}: shape {a.shape}, expected {shape} "
                                        "(time, level, latitude, longitude)")
            if not np.all(np.isfinite(a)):
                raise ForecastFileError(f"{src}: {name}: {int(np.sum(~np.isfinite(a)))} "
                                        "values are not finite (missing data over the "
                                        "route cannot be planned on)")
            arrays[name] = a
        if np.any(arrays["temperature"] <= 0):
            raise ForecastFileError(f"{src}: temperature: values must be above 0 K")
        spacing = lon[-1] - lon[-2]
        if abs(lon[-1] + spacing - (lon[0] + 360.0)) < 1e-6 * spacing:
            # A global grid: close it with the first column one turn on.
            lon = np.append(lon, lon[0] + 360.0)
            arrays = {k: np.concatenate([a, a[..., :1]], axis=-1) for k, a in arrays.items()}
        for name, value in (("times", t), ("levels", z), ("latitudes", lat),
                            ("longitudes", lon), *arrays.items()):
            object.__setattr__(self, name, value)
        t_isa = isa_temperature_pressure(z)[0]
        object.__setattr__(self, "isa_dev", arrays["temperature"] - t_isa[None, :, None, None])

    # --- coverage -------------------------------------------------------------------

    def coverage(self) -> str:
        """The grid's area, time span and levels in words, for messages.

        Returns
        -------
        str
            E.g. ``"45..55 N, 0..20 E, 2026-12-03T00:00Z to 2026-12-03T12:00Z, levels
            111 to 5574 m"``.
        """
        return (f"latitude {self.latitudes[0]:g}..{self.latitudes[-1]:g} deg, longitude "
                f"{self.longitudes[0]:g}..{self.longitudes[-1]:g} deg, "
                f"{iso_time(self.times[0])} to {iso_time(self.times[-1])}, levels "
                f"{self.levels[0]:.0f} to {self.levels[-1]:.0f} m pressure altitude")

    def _lon_in_grid(self, lon):
        """Longitudes [deg] brought into the grid's turn, ``lon0 <= x < lon0 + 360``."""
        lon0 = self.longitudes[0]
        return lon0 + np.mod(np.asarray(lon, dtype=float) - lon0, 360.0)

    def _check(self, lat, lon, time):
        """Raise for the first point outside the grid's area or time span."""
        x = self._lon_in_grid(lon)
        s = EDGE_SLACK
        out_lat = (lat < self.latitudes[0] - s) | (lat > self.latitudes[-1] + s)
        out_lon = x > self.longitudes[-1] + s
        out_t = (time < self.times[0] - s) | (time > self.times[-1] + s)
        bad = ~np.isfinite(lat) | ~np.isfinite(lon) | ~np.isfinite(time)
        for mask, what in ((bad, "not finite"), (out_lat | out_lon, "outside the area"),
                           (out_t, "outside the time span")):
            if np.any(mask):
                k = np.flatnonzero(mask.ravel())[0]
                la, lo, ti = (np.ravel(a)[k] for a in (lat, lon, time))
                when = iso_time(ti) if np.isfinite(ti) else repr(float(ti))
                raise ForecastFileError(
                    f"{self.source}: point {point_text(la, lo)} at {when} is {what} of "
                    f"the forecast ({self.coverage()})")
        return x

    # --- sampling -------------------------------------------------------------------

    def _interp(self, fields, lat, lon, time, pressure_altitude):
        lat, lon, time, h = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in
                                                  (lat, lon, time, pressure_altitude)))
        x = self._check(lat, lon, time)
        it0, it1, tt = _bracket(self.times, time, True)
        iz0, iz1, tz = _bracket(self.levels, h, True)
        iy0, iy1, ty = _bracket(self.latitudes, lat, True)
        ix0, ix1, tx = _bracket(self.longitudes, x, True)
        out = []
        for f in fields:
            def at(it, iz):
                lo = _lerp(f[it, iz, iy0, ix0], f[it, iz, iy0, ix1], tx)
                hi = _lerp(f[it, iz, iy1, ix0], f[it, iz, iy1, ix1], tx)
                return _lerp(lo, hi, ty)

            out.append(_lerp(_lerp(at(it0, iz0), at(it0, iz1), tz),
                             _lerp(at(it1, iz0), at(it1, iz1), tz), tt))
        return out, h

    def sample(self, lat, lon, time, pressure_altitude):
        """Wind components and temperature at points (vectorised, broadcast).

        Parameters
        ----------
        lat, lon : array_like
            Latitude and longitude [deg] (any longitude convention).
        time : array_like
            Time [s since the Unix epoch].
        pressure_altitude : array_like
            Pressure altitude [m]; beyond the levels the end values hold (the ISA
            deviation, for temperature).

        Returns
        -------
        u : numpy.ndarray
            Eastward wind [m/s].
        v : numpy.ndarray
            Northward wind [m/s].
        temperature : numpy.ndarray
            Air temperature [K].

        Raises
        ------
        ForecastFileError
            For a point outside the grid's area or time span, naming the point and the
            coverage.
        """
        (u, v, dev), h = self._interp((self.u, self.v, self.isa_dev), lat, lon, time,
                                      pressure_altitude)
        return u, v, isa_temperature_pressure(h)[0] + dev

    def isa_deviation(self, lat, lon, time, pressure_altitude):
        """Temperature deviation from ISA at points [K] (vectorised, broadcast).

        Parameters
        ----------
        lat, lon : array_like
            Latitude and longitude [deg].
        time : array_like
            Time [s since the Unix epoch].
        pressure_altitude : array_like
            Pressure altitude [m].

        Returns
        -------
        numpy.ndarray
            :math:`T - T_{ISA}` [K], held beyond the levels.
        """
        (dev,), _ = self._interp((self.isa_dev,), lat, lon, time, pressure_altitude)
        return dev

    def wind_profile(self, lat, lon, time) -> WindProfile:
        """Winds over every level at one point and time, as a typed wind profile.

        Parameters
        ----------
        lat, lon : float
            Latitude and longitude [deg].
        time : float
            Time [s since the Unix epoch].

        Returns
        -------
        WindProfile
            At the levels' pressure altitudes [m]: direction the wind blows from [deg true],
            ``atan2(-u, -v)`` mod 360, and speed ``hypot(u, v)`` [m/s]; held beyond the
            ends as every profile is.
        """
        n = self.levels.size
        (u, v), _ = self._interp((self.u, self.v), np.full(n, float(lat)),
                                 np.full(n, float(lon)), np.full(n, float(time)), self.levels)
        direction, speed = wind_from(u, v)
        return WindProfile(tuple(float(h) for h in self.levels),
                           tuple(float(d) for d in direction), tuple(float(s) for s in speed))
