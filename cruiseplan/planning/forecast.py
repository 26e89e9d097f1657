"""Plan a mission with the winds and temperatures of a gridded forecast at a departure time.

Each leg takes the forecast's winds over every level (a
:class:`~cruiseplan.physics.winds.WindProfile`, so a ``best`` altitude still sees the wind
at each candidate) at the leg's **midpoint** (half its great-circle length from its start)
at the leg's **planned mid-time** (halfway between its start and its end, climb or descent
to it included). The day's ISA deviation, which the planner takes as one number, is the
**time-weighted mean** of the forecast's deviation at each leg's midpoint, mid-time and
planned cruise altitude, weighted by the leg's planned time.

The times depend on the winds and the winds on the times, so the mission is planned again
with the times of the plan before, until no leg's start or end moves by
:data:`TIME_TOLERANCE` or more and no leg changes altitude, at most
:data:`MAX_ITERATIONS` plans. The first plan takes every leg at the departure time and the
deviation at the first leg's start at the departure field's pressure altitude. The plan's
header (``Mission.weather``) says where the weather came from and whether the times
settled.

The reserve's alternate leg, placed from the route's end unless it has waypoints of its
own, takes the winds at its midpoint at the planned arrival time (when the diversion would
begin).

The forecast wins over what the mission file types: the legs' and the alternate's winds and
the ``[day]`` temperature are replaced, and the header says so. A battery pack given as a
circuit keeps the temperature the mission file set (its ``pack_temperature`` or the
``[day]``'s at the departure field).

A forecast is a forecast: the plan is no better than it, and official weather briefings and
the flight manual come first.
"""

from __future__ import annotations

import warnings
from dataclasses import replace
from pathlib import Path

import numpy as np

from cruiseplan.cautions import FORECAST_CAUTION
from cruiseplan.errors import CruiseplanError, CruiseplanWarning, ForecastFileError
from cruiseplan.model.mission import Mission, place_legs
from cruiseplan.physics.forecast import iso_time
from cruiseplan.physics.geo import destination_point, great_circle
from cruiseplan.planning.mission import Plan, plan_mission

#: Most plans flown to settle the legs' times (the first included).
MAX_ITERATIONS = 5
#: A leg's start and end times that move less than this between plans are settled [s].
TIME_TOLERANCE = 1.0
#: Segment kinds that are a leg's own flight (the others climb or descend to it).
_LEG_KINDS = ("cruise", "hover", "loiter")


def leg_midpoint(leg) -> tuple:
    """Latitude and longitude [deg] halfway along a placed leg's great circle.

    Parameters
    ----------
    leg : Leg
        A leg with its ``start`` and ``end`` [deg] (a hover or loiter: its point).

    Returns
    -------
    tuple of float
        (latitude, longitude) [deg].
    """
    (la0, lo0), (la1, lo1) = leg.start, leg.end
    d, course = great_circle(la0, lo0, la1, lo1)
    if d == 0:
        return (la0, lo0)
    lat, lon = destination_point(la0, lo0, course, d / 2)
    return (float(lat), float(lon))


def leg_times(plan: Plan, departure: float) -> np.ndarray:
    """Start and end time of each leg of a plan [s since the Unix epoch].

    A leg runs from the end of the leg before (or the start, taxi and take-off
    allowance) through its climb or descent and its own segment; the last leg includes
    the descent to arrival.

    Parameters
    ----------
    plan : Plan
        The plan.
    departure : float
        Engine start [s since the Unix epoch].

    Returns
    -------
    numpy.ndarray
        Shape (n_legs, 2): start and end [s].
    """
    n = len(plan.mission.legs)
    edges = [departure + plan.segments[0].time]
    t = edges[0]
    for seg in plan.segments[1:]:
        t += seg.time
        if seg.kind in _LEG_KINDS:
            edges.append(t)
    if len(edges) != n + 1:
        raise CruiseplanError(f"plan of {plan.mission.name!r}: {len(edges) - 1} leg segments "
                              f"for {n} legs; cannot time the legs for the forecast")
    edges[-1] = t  # the descent to arrival belongs to the last leg
    e = np.asarray(edges)
    return np.column_stack([e[:-1], e[1:]])


def leg_winds(legs, weather, times) -> tuple:
    """Each placed leg's forecast winds at its midpoint at a time.

    Parameters
    ----------
    legs : sequence of Leg
        Legs with ``start`` and ``end`` [deg].
    weather : GriddedWeather
        The forecast.
    times : array_like
        A time per leg [s since the Unix epoch] (the planner gives each leg's mid-time).

    Returns
    -------
    tuple of WindProfile
        One per leg, over the forecast's levels [m].
    """
    out = []
    for leg, t in zip(legs, times):
        try:
            out.append(weather.wind_profile(*leg_midpoint(leg), t))
        except ForecastFileError as exc:
            raise ForecastFileError(f"{exc}; at the midpoint of leg {leg.name!r} at its "
                                    "planned mid-time") from None
    return tuple(out)


def _placed(mission: Mission) -> tuple:
    legs = place_legs(mission.legs)
    for leg in legs:
        if leg.start is None or leg.end is None:
            raise CruiseplanError(
                f"{mission.source or mission.name}: leg {leg.name!r} has no position: a "
                "forecast is sampled along the route, so the first leg needs from/to "
                "waypoints (or the route a [route] file); later legs given by distance and "
                "course are placed by dead reckoning")
    return legs


def _deviation(weather, lat, lon, times, altitudes, weights, where) -> float:
    """The forecast's ISA deviation [K], weighted by ``weights`` (None: one point)."""
    try:
        devs = weather.isa_deviation(lat, lon, times, altitudes)
    except ForecastFileError as exc:
        raise ForecastFileError(f"{exc}; {where}") from None
    if weights is None:
        return float(devs)
    return float(np.sum(devs * weights) / np.sum(weights))


def plan_with_forecast(mission: Mission, weather, departure: float | None = None, *,
                       max_iterations: int = MAX_ITERATIONS,
                       tolerance: float = TIME_TOLERANCE) -> Plan:
    """Plan a mission with a forecast's winds and temperatures at a departure time.

    Parameters
    ----------
    mission : Mission
        A route mission whose legs can be placed (the first from waypoints or a route
        file); its typed winds and ``isa_dev`` are replaced.
    weather : GriddedWeather
        The forecast (:func:`cruiseplan.io.forecast_file.read_forecast`).
    departure : float, optional
        Engine start [s since 1970-01-01T00:00Z]; the mission's ``departure`` when None.
    max_iterations : int, optional
        Most plans flown to settle the legs' times [-].
    tolerance : float, optional
        Largest change of any leg's start or end time between the last two plans for
        them to count as settled [s].

    Returns
    -------
    Plan
        The last plan. Its mission carries the sampled winds on each leg, the day's ISA
        deviation, and in ``weather`` the forecast file, the departure time and whether
        the times settled (a :class:`~cruiseplan.errors.CruiseplanWarning` too when not).

    Raises
    ------
    CruiseplanError
        For a survey mission, no departure time, a leg that cannot be placed, or a leg's
        (or the alternate's) midpoint outside the forecast's area or time span (naming the
        point, the leg and the coverage).
    """
    if mission.survey is not None:
        raise CruiseplanError(f"mission {mission.name!r}: a forecast plans route missions; "
                              "a survey is not planned with one yet")
    dep = mission.departure if departure is None else float(departure)
    if dep is None or not np.isfinite(dep):
        raise CruiseplanError(f"mission {mission.name!r}: a forecast needs the departure "
                              "time ([day] departure or --departure, ISO 8601 UTC)")
    if max_iterations < 1:
        raise CruiseplanError(f"max_iterations {max_iterations} must be at least 1")
    legs = _placed(mission)
    mid = np.array([leg_midpoint(leg) for leg in legs])
    lat, lon = mid[:, 0], mid[:, 1]
    times = np.full(len(legs), dep)
    alternate = mission.reserve.alternate
    if alternate is not None:
        # The diversion starts where the route ends, unless its file places it.
        start = alternate.start if alternate.start is not None else legs[-1].end
        alternate = place_legs([replace(alternate, start=start)])[0]
    arrival = dep
    dev = _deviation(weather, legs[0].start[0], legs[0].start[1], dep,
                     mission.profile.departure_elevation, None,
                     f"at the start of leg {legs[0].name!r} at departure")
    before, plan, moved = None, None, np.inf
    for k in range(1, max_iterations + 1):
        winds = leg_winds(legs, weather, times)
        reserve = mission.reserve
        if alternate is not None:
            wind, = leg_winds([alternate], weather, [arrival])
            reserve = replace(reserve, alternate=replace(alternate, wind=wind))
        flown = replace(mission, legs=tuple(replace(leg, wind=w) for leg, w in zip(legs, winds)),
                        isa_dev=dev, reserve=reserve)
        plan = plan_mission(flown)
        edges = leg_times(plan, dep)
        if before is not None:
            moved = float(np.max(np.abs(edges - before[0])))
            if moved < tolerance and plan.leg_altitudes == before[1]:
                break
        before = (edges, plan.leg_altitudes)
        times = edges.mean(axis=1)
        arrival = edges[-1, 1]
        weights = edges[:, 1] - edges[:, 0]
        dev = _deviation(weather, lat, lon, times, np.asarray(plan.leg_altitudes), weights,
                         "at the legs' midpoints at their planned mid-times")
    settled = moved < tolerance
    name = Path(weather.source).name
    words = (f"winds aloft and ISA {plan.mission.isa_dev:+.1f} K from forecast {name} for "
             f"departure {iso_time(dep)}, replacing the mission file's winds and day "
             "temperature (winds at each leg's midpoint and mid-time"
             + (", the alternate's at arrival" if alternate is not None else "")
             + ", ISA deviation time-weighted over the legs at their altitudes)")
    if settled:
        timing = f"leg times settled within {tolerance:g} s after {k} plans"
    else:
        timing = (f"leg times NOT settled: still moving {moved:.0f} s after {k} plans; "
                  "check the winds along the route")
        warnings.warn(f"mission {mission.name!r}: forecast {timing}", CruiseplanWarning,
                      stacklevel=2)
    return replace(plan, mission=replace(plan.mission, weather=(words, timing,
                                                                 FORECAST_CAUTION)))
