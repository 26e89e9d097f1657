"""What a mission is: legs, profile, reserve policy and loading (SI data, no planning).

The planner (:mod:`cruiseplan.planning.mission`) flies these; the mission-file reader
(:mod:`cruiseplan.io.mission_file`) builds them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from cruiseplan.constants import DEFAULT_STALL_MARGIN, FT
from cruiseplan.errors import CruiseplanError, UnitError
from cruiseplan.physics.geo import destination_point
from cruiseplan.physics.winds import WindProfile
from cruiseplan.units import is_quantity, temperature_difference, to_si, to_store


def _convert(obj, units: dict, prefix: str) -> None:
    """Set each pint Quantity field of a frozen dataclass to its SI value.

    Fields that are not Quantities are left as they are (SI floats stay bit for bit).

    Parameters
    ----------
    obj : object
        The dataclass instance (frozen: fields are set with ``object.__setattr__``).
    units : dict
        Field name -> SI unit (``""`` for a fraction, which accepts percent).
    prefix : str
        Start of error messages, e.g. ``"leg 'a' "``.

    Raises
    ------
    UnitError
        For a Quantity of the wrong dimension, naming the field.
    """
    for name, unit in units.items():
        value = getattr(obj, name)
        if is_quantity(value):
            object.__setattr__(obj, name, to_si(value, unit, what=prefix + name))


#: SI unit of each dimensional field of a :class:`Leg` ("": a fraction [-]).
LEG_UNITS = {
    "distance": "m", "course": "deg", "altitude": "m", "tas": "m/s", "power": "",
    "cas": "m/s", "duration": "s", "bank": "deg", "elevation": "m", "max_agl": "m",
    "max_altitude": "m", "variation": "deg",
}
#: SI unit of each dimensional field of a :class:`Profile`.
PROFILE_UNITS = {
    "departure_elevation": "m", "arrival_elevation": "m", "climb_speed": "m/s",
    "climb_power": "", "climb_rate": "m/s", "descent_rate": "m/s", "min_clearance": "m",
    "altitude_step": "m", "top": "m", "idle_power": "",
}
#: SI unit of the dimensional fields of a :class:`Mission` (``store`` and ``allowance``
#: are kg of fuel or J of energy, by the airframe's store; ``isa_dev`` a difference [K]).
MISSION_UNITS = {
    "mass": "kg", "payload": "kg", "stall_margin": "", "cruise_power": "",
    "altimeter": "Pa", "variation": "deg", "pack_temperature": "degC",
}


@dataclass(frozen=True)
class Leg:
    """One leg of a route (SI).

    Parameters
    ----------
    name : str
        Name used in plans and errors.
    distance : float or pint.Quantity
        Leg length [m]. Each dimensional field also takes a pint Quantity of its
        dimension (any length unit, kt, percent for ``power``), converted to SI
        (:data:`LEG_UNITS`).
    course : float
        True course [deg] (needed with winds; 0 in calm air is fine).
    wind : WindProfile
        Winds aloft along the leg.
    altitude : float or None
        Cruise pressure altitude [m]; None for the best one.
    tas : float or None
        Cruise TAS [m/s] held; None for a power setting, a CAS or the objective's best.
    objective : str
        ``"range"``, ``"endurance"`` or ``"economy"`` for a best speed.
    power : float or None
        Power setting [-], a fraction of rated power, held in the cruise (the speed is
        what that power gives); None for a speed.
    cas : float or None
        Calibrated airspeed held [m/s] (the TAS follows from the altitude).
    kind : {"cruise", "hover", "loiter"}
        A route leg; a hover at a point (hovering kinds only); or a loiter (an orbit for
        a wing at ``bank``), each for ``duration``.
    duration : float or None
        Time of a hover or loiter [s].
    bank : float
        Bank angle of a fixed-wing loiter orbit [deg]; its load factor 1/cos(bank) raises
        the induced drag by 1/cos^2(bank).
    elevation : float or None
        Highest ground under the leg [m]; the higher of the departure and arrival
        elevations when None.
    max_agl : float or None
        Maximum height above that ground [m] (e.g. a drone's legal cap).
    max_altitude : float or None
        Highest altitude allowed (airspace) [m].
    variation : float or None
        Magnetic variation on the leg [deg], east positive (magnetic = true - variation);
        the mission's when None.
    start, end : tuple of float or None
        Latitude and longitude [deg] where the leg starts and ends (a hover or loiter:
        both its point); None where the file gives no position. Filled by the mission
        reader from waypoints and route files, and by :func:`place_legs` by dead
        reckoning; used to sample a gridded forecast along the route.
    """

    name: str
    distance: float
    course: float = 0.0
    wind: WindProfile = field(default_factory=WindProfile.calm)
    altitude: float | None = None
    tas: float | None = None
    objective: str | None = None
    power: float | None = None
    cas: float | None = None
    kind: str = "cruise"
    duration: float | None = None
    bank: float = 0.0
    elevation: float | None = None
    max_agl: float | None = None
    max_altitude: float | None = None
    variation: float | None = None
    start: tuple | None = None
    end: tuple | None = None

    def __post_init__(self):
        _convert(self, LEG_UNITS, f"leg {self.name!r} ")
        for key in ("start", "end"):
            p = getattr(self, key)
            if p is None:
                continue
            ok = (len(p) == 2 and all(isinstance(x, (int, float)) and math.isfinite(x)
                                      for x in p)
                  and -90.0 <= p[0] <= 90.0 and -180.0 <= p[1] <= 360.0)
            if not ok:
                raise CruiseplanError(f"leg {self.name!r}: {key} {p!r} is not (latitude, "
                                      "longitude) in degrees")
            object.__setattr__(self, key, (float(p[0]), float(p[1])))
        if self.kind not in LEG_KINDS:
            raise CruiseplanError(f"leg {self.name!r}: kind {self.kind!r} is not one of "
                                  f"{', '.join(LEG_KINDS)}")
        if (self.kind == "cruise") == (self.duration is not None):
            raise CruiseplanError(f"leg {self.name!r}: a {self.kind} leg "
                                  + ("has a distance, not a duration" if self.kind == "cruise"
                                     else "needs a duration"))
        if self.duration is not None and not 0.0 < self.duration < float("inf"):
            raise CruiseplanError(f"leg {self.name!r}: duration {self.duration:g} s must be "
                                  "positive")
        if self.power is not None and not 0.0 < self.power <= 1.0:
            raise CruiseplanError(f"leg {self.name!r}: power {self.power:g} is not a "
                                  "fraction of rated power in (0, 1]")
        if not 0.0 <= self.bank <= 60.0:
            raise CruiseplanError(f"leg {self.name!r}: bank {self.bank:g} deg is outside 0 "
                                  "to 60 deg")
        given = [k for k, v in (("speed", self.tas), ("cas", self.cas), ("power", self.power))
                 if v is not None]
        if len(given) > 1:
            raise CruiseplanError(f"leg {self.name!r}: give one of speed, cas or power, not "
                                  f"{' and '.join(given)}")


@dataclass(frozen=True)
class Reserve:
    """Reserve policy: what must remain at landing.

    :func:`cruiseplan.planning.reserve.reserve_required` computes the amount.

    Parameters
    ----------
    kind : {"time", "fraction", "amount"}
        Time at best-endurance power, a fraction of the usable capacity (full tanks or a
        full pack), or a fixed amount.
    amount : float or pint.Quantity
        Seconds, a fraction [-], or kg of fuel / J of usable energy. A Quantity is
        converted: a time, a dimensionless value (``25 * u.percent``), or a mass of fuel
        or an energy.
    alternate : Leg or None
        A diversion leg flown at best range, added to the reserve.
    text : str
        As the crew wrote it; empty for a default.
    power : float or pint.Quantity or None
        Power a time reserve is flown at [-], a fraction of rated power (or a percent
        Quantity); None: the normal
        cruise power (the plan's cruise power; on a card the airframe's).
    """

    kind: str
    amount: float
    alternate: Leg | None = None
    text: str = ""
    power: float | None = None

    def __post_init__(self):
        _convert(self, {"power": ""}, "reserve ")
        if is_quantity(self.amount):
            unit = {"time": "s", "fraction": ""}.get(self.kind)
            if unit is None:  # a fixed amount: a mass of fuel or an energy
                unit = "J" if self.amount.check("[energy]") else "kg"
                if not self.amount.check(f"[{'energy' if unit == 'J' else 'mass'}]"):
                    raise UnitError(f"reserve amount: {self.amount!s} is neither a mass of "
                                    "fuel nor an energy (a volume needs the fuel density: "
                                    "give kg)")
            object.__setattr__(self, "amount", to_si(self.amount, unit,
                                                     what="reserve amount"))
        if self.power is not None and not 0.0 < self.power <= 1.0:
            raise CruiseplanError(f"reserve power {self.power:g} is not a fraction of rated "
                                  "power in (0, 1]")
        if self.kind not in RESERVE_KINDS:
            raise CruiseplanError(f"reserve kind {self.kind!r} is not one of "
                                  f"{', '.join(RESERVE_KINDS)}")

    @property
    def is_default(self) -> bool:
        """True for a default reserve (no text as written)."""
        return self.text == ""


#: The kinds of reserve policy.
RESERVE_KINDS = ("time", "fraction", "amount")
#: The kinds of leg.
LEG_KINDS = ("cruise", "hover", "loiter")


def place_legs(legs) -> tuple:
    """Legs with their start and end positions filled in by dead reckoning.

    A leg without a start starts where the one before ended. A cruise leg with a start
    and no end ends at the great-circle destination of its true course and distance
    (:func:`~cruiseplan.physics.geo.destination_point`); a hover or loiter ends where it
    starts. Legs before the first known position keep None.

    Parameters
    ----------
    legs : sequence of Leg
        In flight order.

    Returns
    -------
    tuple of Leg
        The legs, with positions [deg] where they can be placed.
    """
    out, here = [], None
    for leg in legs:
        start = leg.start if leg.start is not None else here
        end = leg.end
        if end is None and start is not None:
            if leg.kind == "cruise":
                lat, lon = destination_point(start[0], start[1], leg.course, leg.distance)
                end = (float(lat), float(lon))
            else:
                end = start
        if (start, end) != (leg.start, leg.end):
            leg = replace(leg, start=start, end=end)
        out.append(leg)
        here = end
    return tuple(out)


def default_reserve(propulsion) -> Reserve:
    """The default reserve: 45 min at normal cruise power for fuel, 25 % for batteries.

    Planning values only (common practice, no source); local rules decide the minimum.

    Parameters
    ----------
    propulsion : object
        The propulsion kind (its store decides).

    Returns
    -------
    Reserve
        The default policy.
    """
    if propulsion.store.burns_mass:
        return Reserve("time", 45 * 60.0)
    return Reserve("fraction", 0.25)


@dataclass(frozen=True)
class Profile:
    """How the aircraft climbs and descends between legs (SI).

    Parameters
    ----------
    departure_elevation, arrival_elevation : float
        Field pressure altitudes [m].
    climb_speed : float or None
        Climb equivalent airspeed [m/s]; the best-rate speed at departure when None.
    climb_power : float
        Fraction of full-throttle power in the climb [-].
    climb_rate : float or None
        Cap on the climb rate [m/s] (drones usually climb at a set rate).
    descent_rate : float
        Descent rate [m/s].
    min_clearance : float
        Minimum height above each leg's highest ground for a ``best`` altitude [m].
    altitude_step : float
        Spacing of candidate altitudes for ``best`` [m].
    top : float
        Highest candidate altitude for ``best`` [m].
    idle_power : float
        Fraction of rated power at idle in descents [-].

    Each field also takes a pint Quantity of its dimension (fractions as percent), which
    is converted to SI (:data:`PROFILE_UNITS`).
    """

    departure_elevation: float = 0.0
    arrival_elevation: float = 0.0
    climb_speed: float | None = None
    climb_power: float = 1.0
    climb_rate: float | None = None
    descent_rate: float = 500 * FT / 60.0
    min_clearance: float = 1000 * FT
    altitude_step: float = 500 * FT
    top: float = 12000 * FT
    idle_power: float = 0.05

    def __post_init__(self):
        _convert(self, PROFILE_UNITS, "profile ")


@dataclass(frozen=True)
class Mission:
    """A mission: airframe, loading, day, legs, allowance, reserve and profile (SI).

    ``cruise_power`` [-] is the power setting (a fraction of rated power) of the legs that
    give no speed, power or objective of their own; None: their best speed. A survey
    mission has a ``survey`` and no legs of its own: each pack's legs are laid from it.

    The dimensional fields also take pint Quantities (:data:`MISSION_UNITS`; ``store`` and
    ``allowance`` as a volume or mass of fuel or an energy, ``isa_dev`` as a temperature
    difference), converted to SI.
    """

    name: str
    airframe: object
    legs: tuple
    reserve: Reserve
    profile: Profile = field(default_factory=Profile)
    isa_dev: float = 0.0
    mass: float | None = None
    store: float | None = None
    payload: float | None = None
    allowance: float = 0.0
    stall_margin: float = DEFAULT_STALL_MARGIN
    cruise_power: float | None = None
    source: str = ""
    description: str = ""
    wind_tolerance: object = None
    #: QNH the file's elevations and altitudes were read with [Pa]; None: read as
    #: pressure altitudes.
    altimeter: float | None = None
    #: Magnetic variation of the legs that give none [deg], east positive.
    variation: float = 0.0
    #: Pack temperature [degC] the mission file or an override states; None: the day's
    #: outside air temperature at the departure field (used by a battery circuit only).
    pack_temperature: float | None = None
    #: Cruising-level rule: :class:`~cruiseplan.model.levels.LevelSector` s covering every
    #: magnetic course; empty for none.
    levels: tuple = ()
    #: What-if overrides applied to the file, in words, for the plan's header.
    overrides: tuple = ()
    #: A survey area (:class:`~cruiseplan.model.survey.Survey`) flown in packs by
    #: :func:`cruiseplan.planning.survey.plan_survey`; None for a route of legs.
    survey: object = None
    #: A gridded forecast file (CF netCDF) the winds and temperatures are taken from
    #: (:func:`cruiseplan.planning.forecast.plan_with_forecast`); None: the typed ones.
    forecast: str | None = None
    #: Departure time [s since 1970-01-01T00:00Z], UTC; None when not given.
    departure: float | None = None
    #: Where the winds and temperatures came from, in words, for the plan's header (a
    #: forecast file; empty: typed in the mission file).
    weather: tuple = ()

    def __post_init__(self):
        _convert(self, MISSION_UNITS, "mission ")
        if is_quantity(self.isa_dev):
            object.__setattr__(self, "isa_dev",
                               temperature_difference(self.isa_dev, what="mission isa_dev"))
        for name in ("store", "allowance"):
            value = getattr(self, name)
            if is_quantity(value):
                object.__setattr__(self, name, to_store(value, self.airframe.propulsion,
                                                        what="mission " + name))
