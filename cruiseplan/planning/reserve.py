"""The reserve: how much fuel or energy must remain at landing, computed once.

A :class:`~cruiseplan.model.mission.Reserve` states the policy as a crew writes it: a time
flown at a stated power, a fraction of the usable capacity, or a fixed amount, plus an
optional alternate. Reserve rules state a time at normal cruising power, so a time reserve
is flown at the power the policy names, else at the plan's cruise power (on a card, the
airframe's normal cruise power), never silently at best-endurance power.
:func:`reserve_required` turns the policy into kilograms of fuel or joules of usable energy;
the mission planner, the cruise card and the Monte Carlo all call it, so they keep the same
reserve.

Local rules decide the minimum reserve; the defaults
(:func:`~cruiseplan.model.mission.default_reserve`) are planning values only.

References
----------
.. [1] T. R. Yechout et al., *Introduction to Aircraft Flight Mechanics*, AIAA, 2003, ch. 2
   (fuel flow of a piston engine at a power setting, BSFC x power).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cruiseplan.amounts import format_amount
from cruiseplan.model.mission import Reserve
from cruiseplan.units import display, fraction, is_quantity, to_si, to_store

#: Where the power of a time reserve came from, in words.
POWER_SOURCES = {
    "reserve": "as the reserve states",
    "plan": "the plan's cruise power",
    "mission": "the mission's cruise power setting",
    "card": "normal cruise power",
    "beyond": "normal cruise power; the plan's cruise power is beyond the rated power",
}


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
    power_fraction : float or None
        Shaft power a time reserve is flown at, over rated power [-].
    power_source : str
        Where that power came from, a key of :data:`POWER_SOURCES`.
    """

    reserve: Reserve
    amount: object
    alternate_used: object = 0.0
    power_fraction: float | None = None
    power_source: str = ""

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
            E.g. ``"45 min at 65 % power (the plan's cruise power)"``.
        """
        res = self.reserve
        if res.kind == "time":
            text = (f"{res.amount / 60:.0f} min at {self.power_fraction * 100:.0f} % power "
                    f"({POWER_SOURCES[self.power_source]})")
        elif res.kind == "fraction":
            text = f"{res.amount * 100:.0f} % of the usable {propulsion.store.name} capacity"
        else:
            text = f"a fixed {format_amount(res.amount, propulsion, units)}"
        alt = res.alternate
        if alt is not None:
            fd, ld = display("distance", units)
            text += f" + alternate {alt.name!r} {alt.distance * fd:.1f} {ld}"
        return text


def reserve_required(airframe, reserve: Reserve, *, mass, cruise_power=None,
                     power_source: str = "card", alternate_used=0.0) -> ReserveAmount:
    """Fuel or energy that must remain at landing under a reserve policy.

    A time reserve uses the store at the rate of its power (BSFC x power for an engine; the
    battery draw, Peukert's law included, for a pack) for its time: the power the policy
    names, else ``cruise_power``, else the airframe's normal cruise power. A fraction is of
    the usable capacity (full tanks or a full pack). An alternate's use, found by the
    planner's flight model, is added.

    Parameters
    ----------
    airframe : Airframe
        The airframe (any kind; arrays of parameters over samples are allowed).
    reserve : Reserve
        The policy.
    mass : float or array_like or pint.Quantity
        Mass at landing [kg] (arrays over samples set the result's shape).
    cruise_power : float or pint.Quantity, optional
        Power a time reserve is flown at when the policy names none [-], a fraction of
        rated power (or a percent Quantity).
    power_source : str, optional
        What ``cruise_power`` is: ``"plan"`` (the plan's cruise power), ``"mission"`` (the
        mission file's power setting) or ``"card"`` (the airframe's normal cruise power).
    alternate_used : float or array_like or pint.Quantity, optional
        Store the alternate leg uses [kg or J]; a Quantity may be a volume or mass of fuel
        or an energy.

    Returns
    -------
    ReserveAmount
        The amount [kg or J] and how it was computed.

    References
    ----------
    .. [1] Yechout et al. (2003), ch. 2.
    """
    prop = airframe.propulsion
    if is_quantity(mass):
        mass = to_si(mass, "kg", what="mass")
    if is_quantity(alternate_used):
        alternate_used = to_store(alternate_used, prop, what="alternate_used")
    if cruise_power is not None:
        cruise_power = fraction(cruise_power, what="cruise_power")
    scalar = np.ndim(mass) == 0
    m = np.atleast_1d(np.asarray(mass, dtype=float))
    extra = {}
    if reserve.kind == "time":
        if reserve.power is not None:
            power, source = reserve.power, "reserve"
        elif cruise_power is not None and not 0.0 < float(cruise_power) <= 1.0:
            # A plan past physics (a leg beyond full power) gives no reserve power: the
            # reserve is flown at normal cruise power, and says so.
            power, source = prop.store.normal_cruise_power, "beyond"
        elif cruise_power is not None:
            power, source = float(cruise_power), power_source
        else:
            power, source = prop.store.normal_cruise_power, "card"
        base = prop.store_rate(power * prop.rated_power) * reserve.amount + 0.0 * m
        extra = dict(power_fraction=power, power_source=source)
    elif reserve.kind == "fraction":
        base = reserve.amount * prop.store_capacity + 0.0 * m
    else:
        base = reserve.amount + 0.0 * m
    amount = np.broadcast_to(base + alternate_used, m.shape)
    if scalar:
        amount = float(amount[0])
        alternate_used = float(np.ravel(alternate_used)[0])
    return ReserveAmount(reserve, amount, alternate_used, **extra)
