"""Winds aloft: a wind profile interpolated in altitude, and its components on a course.

A profile is a list of (altitude, direction from, speed). Between altitudes the wind's
north and east components are interpolated linearly (so a veer of 350 to 010 degrees passes
through north, not south); beyond the ends the nearest wind holds.

The text form ``"270/25@3000ft,250/40@8000ft"`` is read by :mod:`cruiseplan.io.text`.

References
----------
.. [1] FAA, *Pilot's Handbook of Aeronautical Knowledge*, FAA-H-8083-25, ch. 16
   (winds aloft and the wind triangle).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cruiseplan.errors import CruiseplanError
from cruiseplan.physics.airspeed import wind_components

#: Altitude arrays a profile keeps its winds for (:meth:`WindProfile.at`), of at most
#: _AT_SIZE altitudes each (a plan's candidates and climb steps).
_AT_KEPT, _AT_SIZE = 64, 256


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
    .. [1] WMO-No. 306, *Manual on Codes*: wind direction is where it blows from,
       direction = atan2(-u, -v) for eastward u and northward v.
    """
    u, v = np.asarray(u, dtype=float), np.asarray(v, dtype=float)
    return np.mod(np.degrees(np.arctan2(-u, -v)), 360.0), np.hypot(u, v)


@dataclass(frozen=True)
class WindProfile:
    """Winds at several altitudes (SI).

    Parameters
    ----------
    altitudes : tuple of float
        Pressure altitudes [m], increasing.
    directions : tuple of float
        Direction the wind blows from [deg true].
    speeds : tuple of float
        Wind speed [m/s].
    """

    altitudes: tuple
    directions: tuple
    speeds: tuple

    def __post_init__(self):
        h = np.asarray(self.altitudes, dtype=float)
        if h.size == 0 or not (len(self.directions) == len(self.speeds) == h.size):
            raise CruiseplanError("a wind profile needs matching altitudes, directions and speeds")
        if np.any(np.diff(h) <= 0):
            raise CruiseplanError("wind profile altitudes must increase")
        if np.any(np.asarray(self.speeds) < 0):
            raise CruiseplanError("wind speeds must not be negative")
        # Directions and speeds already found, by the altitudes asked for (read-only): a
        # plan asks for the wind at the same candidate altitudes on every leg.
        object.__setattr__(self, "_at", {})

    def __getstate__(self):
        # A copy or a pickle starts without the winds already found.
        return {**self.__dict__, "_at": {}}

    @classmethod
    def calm(cls) -> WindProfile:
        """No wind at any altitude."""
        return cls((0.0,), (0.0,), (0.0,))

    def vector(self, altitude):
        """North and east components of the velocity the air moves with [m/s].

        Interpolated linearly in altitude; beyond the profile's ends the end wind holds.

        Parameters
        ----------
        altitude : array_like
            Pressure altitude [m].

        Returns
        -------
        north : numpy.ndarray
            Northward component of the air's velocity [m/s].
        east : numpy.ndarray
            Eastward component of the air's velocity [m/s].
        """
        d = np.radians(np.asarray(self.directions, dtype=float))
        s = np.asarray(self.speeds, dtype=float)
        # Wind *from* d moves the air towards d + 180 deg.
        north, east = -s * np.cos(d), -s * np.sin(d)
        h = np.asarray(altitude, dtype=float)
        return (np.interp(h, self.altitudes, north), np.interp(h, self.altitudes, east))

    def at(self, altitude):
        """Direction from [deg] and speed [m/s] at pressure altitudes [m].

        Parameters
        ----------
        altitude : array_like
            Pressure altitude [m].

        Returns
        -------
        direction : numpy.ndarray
            Direction the wind blows from [deg true], in [0, 360).
        speed : numpy.ndarray
            Wind speed [m/s].

        Notes
        -----
        For up to 256 altitudes the arrays are kept, by the altitudes' values, and
        returned read-only (copy them to change them): a plan asks again and again.
        """
        h = np.asarray(altitude, dtype=float)
        if h.size > _AT_SIZE:
            north, east = self.vector(h)
            return wind_from(east, north)
        key = (h.shape, h.tobytes())
        found = self._at.get(key)
        if found is None:
            north, east = self.vector(h)
            found = wind_from(east, north)
            for a in found:
                if isinstance(a, np.ndarray):
                    a.flags.writeable = False
            if len(self._at) >= _AT_KEPT:
                self._at.clear()
            self._at[key] = found
        return found

    def components(self, course_deg, altitude):
        """Headwind and crosswind from the right [m/s] on a true course at altitudes [m].

        Parameters
        ----------
        course_deg : array_like
            True course over the ground [deg].
        altitude : array_like
            Pressure altitude [m].

        Returns
        -------
        headwind : numpy.ndarray
            Component against the course [m/s] (negative: tailwind).
        crosswind : numpy.ndarray
            Component from the right of the course [m/s].

        References
        ----------
        .. [1] FAA, *Pilot's Handbook of Aeronautical Knowledge*, ch. 16 (the wind
           triangle).
        """
        direction, speed = self.at(altitude)
        return wind_components(course_deg, direction, speed)
