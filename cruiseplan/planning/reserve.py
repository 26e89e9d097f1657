"""The reserve: how much fuel or energy must remain at landing, computed once.

A :class:`~cruiseplan.model.mission.Reserve` states the policy as a crew writes it: a time
(flown at best-endurance power at a stated altitude), a fraction of the usable capacity, or
a fixed amount, plus an optional alternate. :func:`reserve_required` turns it into kilograms
of fuel or joules of usable energy for a mass and a day; the mission planner, the cruise
card and the Monte Carlo all call it, so they keep the same reserve.

Local rules decide the minimum reserve; the defaults
(:func:`~cruiseplan.model.mission.default_reserve`) are planning values only.

References
----------
.. [1] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, sec. 5.14
   (endurance: least fuel flow at minimum power).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cruiseplan.amounts import format_amount
from cruiseplan.constants import DEFAULT_STALL_MARGIN
from cruiseplan.model.mission import Reserve
from cruiseplan.physics.atmosphere import air_state
from cruiseplan.planning.optimise import speed_schedule
from cruiseplan.planning.performance import shaft_power_required
from cruiseplan.units import display


@dataclass(frozen=True)
class ReserveAmount:
    """A reserve in SI and how it was computed.

    Attributes
    ----------
    reserve : Reserve
        The policy.
    amount : float or numpy.ndarray
        Fuel [kg] or usable energy [J] that must remain at landing (arrays over samples in
        a Monte Carlo), the alternate included.
    alternate_used : float or numpy.ndarray
        Of which the alternate leg [kg or J].
    altitude : float or None
        Pressure altitude a time reserve is flown at [m].
    tas : float or None
        TAS it is flown at [m/s].
    power_fraction : float or None
        Its shaft power over rated power [-].
    flyable : bool
        False when no speed at that altitude is within the limits (the minimum-power speed
        is then used, and the text says so).
    """

    reserve: Reserve
    amount: object
    alternate_used: object = 0.0
    altitude: float | None = None
    tas: float | None = None
    power_fraction: float | None = None
    flyable: bool = True

    def describe(self, propulsion, units: str) -> str:
        """How the reserve was computed, in words and display units.

        Parameters
        ----------
        propulsion : object
            The propulsion kind (what the store is).
        units : {"aviation", "si"}
            Display unit system.

        Returns
        -------
        str
            E.g. ``"45 min at best-endurance power (33 % rated, 61 kt TAS) at 3500 ft"``.
        """
        res = self.reserve
        if res.kind == "time":
            fa, la = display("altitude", units)
            fs, ls = display("speed", units)
            text = (f"{res.amount / 60:.0f} min at best-endurance power "
                    f"({_first(self.power_fraction) * 100:.0f} % rated, "
                    f"{_first(self.tas) * fs:.0f} {ls} TAS) at {self.altitude * fa:.0f} {la}")
            if not self.flyable:
                text += " (no speed within the limits there: minimum-power speed)"
        elif res.kind == "fraction":
            text = f"{res.amount * 100:.0f} % of the usable {propulsion.store.name} capacity"
        else:
            text = f"a fixed {format_amount(res.amount, propulsion, units)}"
        alt = res.alternate
        if alt is not None:
            fd, ld = display("distance", units)
            text += f" + alternate {alt.name!r} {alt.distance * fd:.1f} {ld}"
        return text


def _first(value) -> float:
    return float(np.ravel(value)[0])


def reserve_required(airframe, reserve: Reserve, *, mass, isa_dev=0.0, altitude=0.0,
                     stall_margin=DEFAULT_STALL_MARGIN, alternate_used=0.0) -> ReserveAmount:
    """Fuel or energy that must remain at landing under a reserve policy.

    A time reserve is flown at the best-endurance (minimum-power) speed within the limits
    at ``altitude``, at mass ``mass``: it needs the store rate there times the time. A
    fraction is of the usable capacity (full tanks or a full pack). An alternate's use,
    found by the planner's flight model, is added.

    Parameters
    ----------
    airframe : Airframe
        The airframe (any kind; arrays of parameters over samples are allowed).
    reserve : Reserve
        The policy.
    mass : float or array_like
        Mass at landing [kg] (arrays over samples allowed).
    isa_dev : float, optional
        ISA deviation [K].
    altitude : float, optional
        Pressure altitude of a time reserve [m], when the policy names none.
    stall_margin : float, optional
        Minimum TAS over stall speed [-].
    alternate_used : float or array_like, optional
        Store the alternate leg uses [kg or J].

    Returns
    -------
    ReserveAmount
        The amount [kg or J] and how it was computed.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.14.
    """
    prop = airframe.propulsion
    scalar = np.ndim(mass) == 0
    m = np.atleast_1d(np.asarray(mass, dtype=float))
    extra = {}
    if reserve.kind == "time":
        h = reserve.altitude if reserve.altitude is not None else float(altitude)
        air = air_state(np.array([h]), isa_dev)
        s = speed_schedule(airframe, m, air, prop.store_capacity, stall_margin=stall_margin)
        flyable = bool(np.all(s.feasible))
        v = np.where(s.feasible, s.tas["endurance"], s.tas_unconstrained["endurance"])
        shaft = shaft_power_required(airframe, m, air, v)
        base = prop.store_rate(shaft) * reserve.amount
        extra = dict(altitude=h, tas=v if v.size > 1 else float(v[0]),
                     power_fraction=float(np.ravel(shaft)[0] / prop.rated_power),
                     flyable=flyable)
    elif reserve.kind == "fraction":
        base = reserve.amount * prop.store_capacity + 0.0 * m
    else:
        base = reserve.amount + 0.0 * m
    amount = np.broadcast_to(base + alternate_used, m.shape)
    if scalar:
        amount = float(amount[0])
        alternate_used = float(np.ravel(alternate_used)[0])
    return ReserveAmount(reserve, amount, alternate_used, **extra)
