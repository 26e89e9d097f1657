"""What a mission is: legs, profile, reserve policy and loading (SI data, no planning).

The planner (:mod:`cruiseplan.planning.mission`) flies these; the mission-file reader
(:mod:`cruiseplan.io.mission_file`) builds them.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from cruiseplan.constants import DEFAULT_STALL_MARGIN, FT
from cruiseplan.errors import CruiseplanError
from cruiseplan.physics.winds import WindProfile


@dataclass(frozen=True)
class Leg:
    """One leg of a route (SI).

    Parameters
    ----------
    name : str
        Name used in plans and errors.
    distance : float
        Leg length [m].
    course : float
        True course [deg] (needed with winds; 0 in calm air is fine).
    wind : WindProfile
        Winds aloft along the leg.
    altitude : float or None
        Cruise pressure altitude [m]; None for the best one.
    tas : float or None
        Cruise TAS [m/s]; None for the objective's best speed.
    objective : str
        ``"range"``, ``"endurance"`` or ``"economy"`` for a best speed.
    elevation : float or None
        Highest ground under the leg [m]; the higher of the departure and arrival
        elevations when None.
    max_agl : float or None
        Maximum height above that ground [m] (e.g. a drone's legal cap).
    max_altitude : float or None
        Highest altitude allowed (airspace) [m].
    """

    name: str
    distance: float
    course: float = 0.0
    wind: WindProfile = field(default_factory=WindProfile.calm)
    altitude: float | None = None
    tas: float | None = None
    objective: str = "range"
    elevation: float | None = None
    max_agl: float | None = None
    max_altitude: float | None = None


@dataclass(frozen=True)
class Reserve:
    """Reserve policy: what must remain at landing.

    :func:`cruiseplan.planning.reserve.reserve_required` computes the amount.

    Parameters
    ----------
    kind : {"time", "fraction", "amount"}
        Time at best-endurance power, a fraction of the usable capacity (full tanks or a
        full pack), or a fixed amount.
    amount : float
        Seconds, a fraction [-], or kg of fuel / J of usable energy.
    altitude : float or None
        Pressure altitude a time reserve is flown at [m]; the plan's last cruise altitude
        (the card's lowest altitude) when None.
    alternate : Leg or None
        A diversion leg flown at best range, added to the reserve.
    text : str
        As the crew wrote it; empty for a default.
    """

    kind: str
    amount: float
    altitude: float | None = None
    alternate: Leg | None = None
    text: str = ""

    def __post_init__(self):
        if self.kind not in RESERVE_KINDS:
            raise CruiseplanError(f"reserve kind {self.kind!r} is not one of "
                                  f"{', '.join(RESERVE_KINDS)}")

    @property
    def is_default(self) -> bool:
        """True for a default reserve (no text as written)."""
        return self.text == ""


#: The kinds of reserve policy.
RESERVE_KINDS = ("time", "fraction", "amount")


def default_reserve(propulsion) -> Reserve:
    """The default reserve: 45 min at best-endurance power for fuel, 25 % for batteries.

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


@dataclass(frozen=True)
class Mission:
    """A mission: airframe, loading, day, legs, allowance, reserve and profile (SI)."""

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
    source: str = ""
    description: str = ""
    wind_tolerance: object = None
