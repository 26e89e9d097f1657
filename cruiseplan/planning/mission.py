r"""Mission planning: legs with climb, cruise and descent, burn-off, reserves, go/no-go.

A mission is flown leg after leg without landing. At the start of each leg the aircraft
climbs or descends to the leg's altitude; after the last leg it descends to the arrival
elevation. Each segment is integrated along its path:

* **climb** at a constant equivalent airspeed (as pilots hold an indicated speed), at the
  set fraction of full-throttle power; rate of climb from excess power,
  :math:`\dot h = \eta_p (P - P_{req}) / W`, in altitude steps;
* **cruise** by a fourth-order Runge-Kutta integration over distance of
  :math:`dm/dx = -\dot m / V_g` (fuel burns off, so the weight and the power required fall).
  A ``best`` speed is found by the optimiser at the start of the cruise and then flown at
  constant lift coefficient, i.e. slowed as :math:`\sqrt{m}` as fuel burns (exactly the
  best-range schedule in calm air with constant efficiencies; the Breguet condition);
* **descent** at a set rate and the cruise equivalent airspeed, at the power that gives
  that rate (never below idle).

Battery aircraft keep their mass and use energy; with a Peukert exponent each segment uses
its share :math:`\Delta t / t(I)` of the pack. A pack given as an equivalent circuit
(:mod:`cruiseplan.physics.battery`) is followed through its state of charge: the energy
used within a segment is a state of its integration, the rate is :math:`U(s) I = P + I^2 R`
at each state, and a segment beyond the pack's current or cut-off voltage is a NO-GO
reason.

A ``best`` altitude is chosen per leg among candidate altitudes by the store the whole
leg uses, **climb and descent included**, so a short leg is not flown high just because
cruise is cheaper up there.

Legs are flown as crews fly them: at a power setting, a TAS or CAS held, or an
objective's best speed; a hover holds position and a loiter orbits, each for a time.

The reserve (a time flown at the plan's cruise power unless the policy names a power, a
fraction of capacity, or a fixed quantity, plus an optional alternate leg;
:mod:`cruiseplan.planning.reserve`) is what must remain at landing. The verdict is GO, or
NO-GO with every reason found; a NO-GO plan stops at the segment where it fails (the rest
is not flown) and :mod:`cruiseplan.planning.nogo` says what would make it GO. Local rules
decide the reserve; the defaults are planning values and the output says how the reserve
was computed.

References
----------
.. [1] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, secs. 5.10
   (climb), 5.13 (range: the Breguet equation), 5.14 (endurance).
.. [2] L. W. Traub, "Range and Endurance Estimates for Battery-Powered Aircraft",
   *J. Aircraft* 48(2), 2011 (battery range, Peukert's law).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from cruiseplan._numerics import ONE, TWO, ZERO, all_true, illinois_root
from cruiseplan.amounts import format_amount
from cruiseplan.constants import FT_PER_MIN, G0, MACH_LIMIT
from cruiseplan.errors import CruiseplanError
from cruiseplan.limits import LIMIT_DTYPE, Limit
from cruiseplan.model.mission import Mission
from cruiseplan.physics.airspeed import (
    eas_from_tas,
    ground_speed,
    tas_from_cas,
    tas_from_eas,
    wind_components,
    wind_correction_angle,
)
from cruiseplan.physics.atmosphere import AirState, air_state
from cruiseplan.physics.winds import wind_from
from cruiseplan.planning.levels import leg_candidates
from cruiseplan.planning.optimise import max_climb_rate, objective_speed
from cruiseplan.planning.performance import shaft_power_required, speed_for_min_power
from cruiseplan.planning.reserve import ReserveAmount, reserve_required
from cruiseplan.units import display, quantity_of

#: SI unit of each :class:`Segment` field :meth:`Segment.quantity` hands back
#: (``"store"``: kg of fuel or J of usable energy; ``""``: dimensionless).
SEGMENT_UNITS = {
    "altitude_start": "m", "altitude_end": "m", "tas": "m/s", "ground_speed": "m/s",
    "heading": "deg", "time": "s", "distance": "m", "used": "store", "remaining": "store",
    "mass_end": "kg", "power_fraction": "", "pack_voltage": "V", "pack_current": "A",
}
#: SI unit of each :class:`Plan` field :meth:`Plan.quantity` hands back (``"store"``: kg
#: of fuel or J of usable energy).
PLAN_UNITS = {
    "initial": "store", "reserve_required": "store", "used": "store",
    "remaining": "store", "time": "s", "distance": "m", "takeoff_mass": "kg",
    "climb_speed": "m/s", "leg_altitudes": "m", "leg_speeds": "m/s",
}

#: Altitude steps in a climb or descent.
CLIMB_STEPS = 8
#: Most points on which a climb or descent's steps are worked out together, in passes,
#: rather than one after the other (the same figures; see _vertical).
CLIMB_PASS_POINTS = 64
#: Most legs of a run worked out together in one pass (see _in_passes); 1: every leg on
#: its own (the same plans).
PASS_LEGS = 20
#: RK4 steps in a cruise or hold with a pack given as a circuit (the rate follows the
#: state of charge).
CRUISE_STEPS = 4
#: RK4 steps in a cruise or hold whose fuel flow follows the mass (one for a plain pack,
#: whose rate does not change): the mass changes slowly, and two steps are within 1e-10 of
#: 64 on the bundled missions and within 2e-8 on a 700 nm leg burning 7 % of the mass
#: (the error goes as the 4th power of the fraction burned; tests/test_mission.py).
CRUISE_STEPS_STEADY = 2
#: Lowest climb rate accepted as "still climbing" [m/s] (about 20 ft/min).
MIN_CLIMB_RATE = 0.1
#: Ground speed floor [m/s] where the wind is as strong as the airspeed (see _cruise).
GS_FLOOR = 0.5
# The same as 0-d arrays: the integrations' ufuncs take them quicker.
_MIN_CLIMB_RATE, _GS_FLOOR = np.array(MIN_CLIMB_RATE), np.array(GS_FLOOR)


@dataclass(frozen=True)
class Segment:
    """One segment of the plan (SI): start and end altitude, speeds, time, distance, store.

    ``flown`` is False from the segment where a NO-GO plan fails on: such a segment's
    figures are what it would take, not what happens; reports print "not flown" and no
    figures for it.
    """

    leg: str
    kind: str
    altitude_start: float
    altitude_end: float
    tas: float
    ground_speed: float
    heading: float
    time: float
    distance: float
    used: float
    remaining: float
    mass_end: float
    power_fraction: float
    note: str = ""
    flown: bool = True
    #: Lowest pack voltage under load [V] and highest current [A] in the segment (a pack
    #: given as a circuit; NaN otherwise).
    pack_voltage: float = float("nan")
    pack_current: float = float("nan")

    def quantity(self, name: str, store_name: str | None = None):
        """A field as a pint Quantity in SI units (see :data:`SEGMENT_UNITS`).

        Parameters
        ----------
        name : str
            A key of :data:`SEGMENT_UNITS`, e.g. ``"time"`` [s] or ``"used"``.
        store_name : {"fuel", "energy"}, optional
            The store (``airframe.propulsion.store_name``): ``used`` and ``remaining``
            are kg of fuel or J of energy; needed for them.

        Returns
        -------
        pint.Quantity
            The value [its SI unit].

        Raises
        ------
        CruiseplanError
            For a name without a unit, or a store amount without ``store_name``.
        """
        unit = None if store_name is None else {"fuel": "kg", "energy": "J"}.get(store_name)
        return quantity_of(self, name, SEGMENT_UNITS, store_unit=unit)


@dataclass(frozen=True)
class Plan:
    """A planned mission: segments, totals, reserve and the verdict (SI).

    Attributes
    ----------
    mission : Mission
        What was planned.
    segments : tuple of Segment
        In flight order; the first is the start-up/taxi/take-off allowance.
    initial : float
        Store at engine start [kg or J].
    reserve : ReserveAmount
        Store that must remain at landing [kg or J], and how it was computed.
    reasons : tuple of str
        NO-GO reasons; empty for GO.
    leg_altitudes : tuple of float
        Cruise altitude chosen per leg [m].
    takeoff_mass : float
        Mass at engine start [kg].
    leg_speeds : tuple of float
        Cruise TAS at the start of each leg's cruise [m/s] (held, or its lift coefficient
        held for a best speed).
    climb_speed : float
        Climb EAS [m/s].
    """

    mission: Mission
    segments: tuple
    initial: float
    reserve: ReserveAmount
    reasons: tuple
    leg_altitudes: tuple
    takeoff_mass: float = 0.0
    leg_speeds: tuple = ()
    climb_speed: float = 0.0

    @property
    def reserve_required(self) -> float:
        """Store that must remain at landing [kg or J]."""
        return self.reserve.amount

    @property
    def go(self) -> bool:
        """True when no reason forbids the flight."""
        return not self.reasons

    @property
    def verdict(self) -> str:
        """``"GO"`` or ``"NO-GO"``."""
        return "GO" if self.go else "NO-GO"

    @property
    def used(self) -> float:
        """Store used, all segments [kg or J]."""
        return float(sum(s.used for s in self.segments))

    @property
    def remaining(self) -> float:
        """Store remaining at landing [kg or J]."""
        return self.segments[-1].remaining if self.segments else self.initial

    @property
    def time(self) -> float:
        """Total time [s]."""
        return float(sum(s.time for s in self.segments))

    @property
    def distance(self) -> float:
        """Total ground distance [m]."""
        return float(sum(s.distance for s in self.segments))

    def quantity(self, name: str):
        """A field as a pint Quantity in SI units (see :data:`PLAN_UNITS`).

        A segment's figures are ``plan.segments[i].quantity(name, store_name)``.

        Parameters
        ----------
        name : str
            A key of :data:`PLAN_UNITS`, e.g. ``"reserve_required"`` (kg of fuel or J of
            energy, by the airframe's store) or ``"time"`` [s].

        Returns
        -------
        pint.Quantity
            The value [its SI unit].

        Raises
        ------
        CruiseplanError
            For a name without a unit, listing the known ones.
        """
        store = self.mission.airframe.propulsion.store.unit
        return quantity_of(self, name, PLAN_UNITS, store_unit=store)

    def to_xarray(self):
        """The segments as an xarray Dataset with dim ``segment`` (``frames`` extra).

        Returns
        -------
        xarray.Dataset
            Per segment: altitudes [m], speeds [m/s], heading [deg], time [s], distance
            [m], store used and remaining [kg or J], mass [kg], ...; the verdict and
            reasons as attributes. See :func:`cruiseplan.frames.plan_to_xarray`.
        """
        from cruiseplan.frames import plan_to_xarray

        return plan_to_xarray(self)

    def to_dataframe(self):
        """The segments as a pandas DataFrame, one row per segment (``frames`` extra).

        Returns
        -------
        pandas.DataFrame
            The variables of :meth:`to_xarray` as columns (SI); units in
            ``df.attrs["units"]``.
        """
        from cruiseplan.frames import plan_to_dataframe

        return plan_to_dataframe(self)


# --- the flight model used by the planner ---------------------------------------------

class Flight:
    """Lean SI model of the airframe on the day, shared by all segments.

    For a Monte Carlo run the airframe's parameters may be arrays over samples, and
    ``wind_error`` (speed [m/s], direction [deg] offsets, arrays over samples) shifts every
    wind; ``sample_shape`` is then the shape of those arrays, () otherwise.
    """

    def __init__(self, mission: Mission, airframe=None, wind_error=None, sample_shape=(),
                 headwind_offset=0.0):
        self.af = mission.airframe if airframe is None else airframe
        self.prop = self.af.propulsion
        self.dev = mission.isa_dev
        self.margin = mission.stall_margin
        self.burns_mass = self.prop.store.burns_mass
        # A pack given as an equivalent circuit: segments follow its state of charge.
        self.circuit = getattr(self.prop, "circuit", None)
        self.wind_error = wind_error
        self.headwind_offset = headwind_offset
        self.sample_shape = sample_shape
        load = mission.airframe.loading(mass=mission.mass, store=mission.store,
                                        payload=mission.payload)
        # Past an empty tank the plan goes on counting the fuel it would need (to say by
        # how much it falls short), but the mass stops at the zero-fuel mass.
        self.zero_fuel_mass = load.mass - load.store if self.burns_mass else load.mass
        # The air at each distinct set of altitudes, computed once per plan: the candidate
        # altitudes of most legs are the same, and so are many of the climbs between them.
        self._air = {}
        self._air_rows = {}
        # Winds that differ between missions planned together, by the leg's id (see
        # :meth:`together`); other legs use their own profile.
        self._winds = {}

    @classmethod
    def together(cls, missions, loads, headwind_offset=0.0):
        """The flight model of missions that differ only in the day and the loading.

        The ISA deviation [K] and the zero-fuel mass [kg] are arrays of shape (missions,
        1): every array of a plan then has the missions along its first axis.

        Parameters
        ----------
        missions : list of Mission
            Missions sharing all but :data:`TOGETHER_FIELDS`.
        loads : list of Loading
            Each mission's loading (mass [kg], store [kg or J]).
        headwind_offset : float, optional
            Headwind added on every leg [m/s].

        Returns
        -------
        Flight
        """
        fl = cls(missions[0], headwind_offset=headwind_offset)
        fl.dev = np.array([x.isa_dev for x in missions], dtype=float)[:, None]
        fl.zero_fuel_mass = np.array([load.mass - load.store if fl.burns_mass else load.mass
                                      for load in loads])[:, None]
        first = missions[0]
        alternates = [x.reserve.alternate for x in missions]
        for n, leg in enumerate(first.legs):
            fl._spread_winds(leg, [x.legs[n].wind for x in missions])
        if alternates[0] is not None:
            fl._spread_winds(alternates[0], [a.wind for a in alternates])
        return fl

    def _spread_winds(self, leg, winds):
        """Give ``leg`` (the first mission's) one uniform wind per mission, if they differ.

        Kept as the north and east components of the air's velocity, shape (missions, 1),
        computed as :meth:`WindProfile.vector` computes them.
        """
        if all(w == winds[0] for w in winds):
            return
        d = np.radians(np.array([w.directions[0] for w in winds], dtype=float))
        s = np.array([w.speeds[0] for w in winds], dtype=float)
        self._winds[id(leg)] = ((-s * np.cos(d))[:, None], (-s * np.sin(d))[:, None])

    def _wind_at(self, leg, h):
        """Direction from [deg] and speed [m/s] of the leg's wind at altitudes ``h``."""
        spread = self._winds.get(id(leg))
        if spread is None:
            return leg.wind.at(h)
        north, east = spread
        shape = np.broadcast_shapes(np.shape(h), north.shape)
        return wind_from(np.broadcast_to(east, shape), np.broadcast_to(north, shape))

    def air(self, h):
        """Air at pressure altitudes ``h`` [m] on the day.

        The standard atmosphere is evaluated once per distinct array of altitudes this
        flight model is asked for; the same array again returns the same (read-only)
        state, so the figures are those of a fresh evaluation.

        Parameters
        ----------
        h : array_like
            Pressure altitude [m].

        Returns
        -------
        AirState
            Air at ``h`` with the mission's ISA deviation [K].
        """
        h = np.asarray(h, dtype=float)
        key = (h.shape, h.tobytes())
        air = self._air.get(key)
        if air is None:
            air = air_state(h, self.dev)
            for f in AirState.__dataclass_fields__:
                value = getattr(air, f)
                if isinstance(value, np.ndarray) and value.flags.writeable:
                    value.flags.writeable = False
            self._air[key] = air
        return air

    def air_rows(self, h):
        """The states of :meth:`air` at ``h``, one per index of its first axis (cached)."""
        h = np.asarray(h, dtype=float)
        key = (h.shape, h.tobytes())
        rows = self._air_rows.get(key)
        if rows is None:
            air = self.air(h)
            rows = self._air_rows[key] = [air.row(j) for j in range(h.shape[0])]
        return rows

    def shaft(self, m, air, v):
        """Shaft power [W] in level flight at mass ``m``, TAS ``v``.

        Parameters
        ----------
        m : array_like
            Mass [kg].
        air : AirState
            Air at the points.
        v : array_like
            True airspeed [m/s].

        Returns
        -------
        numpy.ndarray
            Shaft power required [W].
        """
        return shaft_power_required(self.af, m, air, v)

    def rate(self, shaft, soc=None):
        """Rate the store is used [kg/s or W] at shaft power ``shaft`` [W].

        Parameters
        ----------
        shaft : array_like
            Shaft power [W].
        soc : array_like, optional
            State of charge [-] of a pack given as a circuit (:meth:`soc`): its rate there,
            U I = P + I^2 R; None: the store rate without a state.

        Returns
        -------
        numpy.ndarray
            Fuel flow [kg/s] or rate of use of usable energy [W].
        """
        if soc is None:
            return self.prop.store_rate(shaft)
        return self.prop.store_rate(shaft, soc=soc)

    def soc(self, store):
        """State of charge [-] with ``store`` [J] on board; None without a circuit.

        Parameters
        ----------
        store : array_like or None
            Store on board [J] (None: not followed).

        Returns
        -------
        numpy.ndarray or None
            State of charge [-] of the pack's circuit.
        """
        if self.circuit is None or store is None:
            return None
        return self.circuit.soc_of_store(store)

    def wind(self, leg, h):
        """Headwind and crosswind [m/s] on the leg's course at altitudes ``h``.

        With ``wind_error`` set, the speed [m/s] and direction [deg] offsets are added to
        the leg's winds first (speed floored at zero).

        Parameters
        ----------
        leg : Leg
            The leg; its ``course`` [deg true] and ``wind`` profile are used.
        h : array_like
            Pressure altitude [m].

        Returns
        -------
        headwind : numpy.ndarray
            Component against the course [m/s] (negative: tailwind).
        crosswind : numpy.ndarray
            Component from the right of the course [m/s].
        """
        if self.wind_error is None and id(leg) not in self._winds:
            head, cross = leg.wind.components(leg.course, h)
        elif self.wind_error is None:
            head, cross = wind_components(leg.course, *self._wind_at(leg, h))
        else:
            direction, speed = leg.wind.at(h)
            d_speed, d_dir = self.wind_error
            head, cross = wind_components(leg.course, direction + d_dir,
                                          np.maximum(speed + d_speed, 0))
        return head + self.headwind_offset, cross

    @staticmethod
    def steady_wind(head, cross):
        """Headwind, crosswind, |crosswind|, -headwind [m/s] and crosswind^2 [m^2/s^2].

        For :meth:`ground`: integrations that ask for ground speeds again and again in
        the same wind find the last three once.
        """
        return head, cross, np.abs(cross), -head, cross * cross

    def wind_speed(self, leg, h):
        """Wind speed [m/s] on the leg at altitudes ``h`` (with the samples' errors)."""
        direction, speed = self._wind_at(leg, h)
        if self.wind_error is not None:
            speed = np.maximum(speed + self.wind_error[0], 0)
        return speed

    @staticmethod
    def ground(v, leg, wind, gamma_rate=0.0, heading=True):
        """Ground speed and heading for TAS ``v`` (horizontal part when climbing).

        With ``heading`` false the heading is not worked out (None), for the
        integrations' inner steps.

        Parameters
        ----------
        v : array_like
            True airspeed along the path [m/s].
        leg : Leg
            The leg; its ``course`` [deg true] is used.
        wind : tuple of array_like
            :meth:`steady_wind` of the headwind and crosswind [m/s] where the aircraft
            flies.
        gamma_rate : array_like, optional
            Vertical speed [m/s]; the horizontal TAS is sqrt(v^2 - gamma_rate^2).
        heading : bool, optional
            Whether to work out the heading.

        Returns
        -------
        gs : numpy.ndarray
            Ground speed along the course [m/s]; where the course cannot be held, minus
            the headwind.
        heading : numpy.ndarray or None
            True heading [deg], in [0, 360) (None unless asked for).
        held : numpy.ndarray of bool
            Where the crosswind is weaker than the horizontal TAS [-].

        See Also
        --------
        cruiseplan.physics.airspeed.ground_speed : The wind-triangle formula used.
        """
        head, cross, abs_cross, tail, cross_squared = wind
        if type(gamma_rate) is float and gamma_rate == 0.0:
            vh = np.sqrt(v * v)  # minus 0 and floored at 0: the same figure
        else:
            vh = np.sqrt(np.maximum(v * v - gamma_rate * gamma_rate, ZERO))
        held = abs_cross < vh
        # Where the course cannot be held the aircraft points into the crosswind: it
        # makes no way across it and drifts with the headwind component.
        gs = np.where(held, ground_speed(vh, head, cross, crosswind_squared=cross_squared),
                      tail)
        if not heading:
            return gs, None, held
        wca = np.where(held, wind_correction_angle(vh, cross), 90.0 * np.sign(cross))
        return gs, np.mod(leg.course + wca, 360.0), held


class _PackWatch:
    """Lowest voltage, highest current and the pack limits met along a segment."""

    def __init__(self, fl: Flight):
        self.fl = fl
        self.voltage, self.current, self.limits = np.inf, 0.0, LIMIT_DTYPE(0)

    def see(self, shaft, soc, where=True):
        """Take the pack's load at shaft power [W] and state of charge [-] into account."""
        if soc is not None:
            self.see_steps(np.asarray(shaft)[None], np.asarray(soc)[None], where)

    def see_steps(self, shaft, soc, where):
        """:meth:`see` of every step at once (arrays with the steps on the first axis)."""
        load = self.fl.prop.pack_load(shaft, soc=soc)
        self.voltage = np.minimum(self.voltage, np.where(where, load.voltage, np.inf).min(0))
        self.current = np.maximum(self.current, np.where(where, load.current, 0.0).max(0))
        self.limits = self.limits | np.bitwise_or.reduce(
            np.where(where, load.limits, 0).astype(LIMIT_DTYPE), axis=0)

    def out(self, shape) -> dict:
        """The watch's figures as arrays of ``shape`` (NaN and 0 without a circuit)."""
        if self.fl.circuit is None:
            nan = np.full(shape, np.nan)
            return dict(pack_voltage=nan, pack_current=nan,
                        pack_limits=np.zeros(shape, dtype=LIMIT_DTYPE))
        return dict(pack_voltage=np.broadcast_to(self.voltage, shape) + 0.0,
                    pack_current=np.broadcast_to(self.current, shape) + 0.0,
                    pack_limits=np.broadcast_to(self.limits, shape).astype(LIMIT_DTYPE))


def _vertical(fl: Flight, leg, h0, h1, m0, v_climb, v_descent, profile, store0=None):
    """Climb or descend from h0 to h1 (arrays over candidates), integrated in steps.

    Each candidate climbs (h1 > h0) at the climb EAS ``v_climb`` and climb power, or
    descends at the set rate and the EAS ``v_descent``; both kinds in one pass. With
    ``store0`` [J], the store at the start, a pack given as a circuit is followed through
    its state of charge.

    The :data:`CLIMB_STEPS` altitude steps are flown one after the other: each starts
    with the store used before it (the mass burnt, the state of charge). On up to
    :data:`CLIMB_PASS_POINTS` points, where an array operation costs its call and not its
    points, the steps are worked out together instead, in passes: the first at the
    starting mass and store, each next one at what the last left before each step,
    until that no longer changes. Each pass makes at least one more step exact and the
    others close in fast (a climb burns a small part of the mass), so a few passes take
    the place of eight steps; the figures are those of the steps one after the other,
    to the last bit (the sums are added in step order both ways).

    Returns a dict of arrays: time, distance, used, mass_end, ok (the climb rate held),
    fail_at (altitude where it did not), tas, gs and power (time means), heading, and the
    pack's lowest voltage, highest current and limits (:class:`_PackWatch`).
    """
    # Altitudes keep their own shape (candidates, or one altitude); masses and sampled
    # parameters broadcast against them.
    h0, h1 = np.broadcast_arrays(np.asarray(h0, float), np.asarray(h1, float))
    shape = np.broadcast_shapes(h0.shape, np.shape(m0), np.shape(v_descent),
                                fl.sample_shape)
    # The steps go on a new first axis: the altitudes take every axis of the result (the
    # day's deviation may vary along the first, over missions planned together).
    lead = (1,) * (len(shape) - h0.ndim)
    h0, h1 = h0.reshape(lead + h0.shape), h1.reshape(lead + h1.shape)
    dh = (h1 - h0) / CLIMB_STEPS
    moving = np.broadcast_to(np.abs(dh) > 0, shape)
    if not np.any(moving):
        return _staying(fl, shape, m0)
    m_start = np.broadcast_to(np.asarray(m0, float), shape)
    watch = _PackWatch(fl)
    climbing = dh > 0
    v_eas = np.where(climbing, v_climb, v_descent)
    # The atmosphere, the wind, the TAS and the climb power for every step at once. The
    # TAS is read-only: the propeller's efficiency at a TAS array is then found once.
    steps = (np.arange(CLIMB_STEPS) + 0.5).reshape((-1,) + (1,) * h0.ndim)
    h_steps = h0 + steps * dh
    air_steps = fl.air(h_steps)
    wind_steps = fl.steady_wind(*fl.wind(leg, h_steps))
    v_steps = tas_from_eas(v_eas, air_steps.density)
    v_steps.flags.writeable = False
    v_cap_steps = 0.9 * v_steps
    p_up_steps = profile.climb_power * fl.prop.shaft_power_available(air_steps.sigma)
    # Constants as 0-d arrays: a ufunc takes them quicker than Python floats.
    idle = np.array(profile.idle_power * fl.prop.rated_power)
    descent, g0 = np.array(profile.descent_rate), np.array(G0)
    rated = np.array(fl.prop.rated_power)
    prop = fl.prop.propeller
    checked = moving & climbing
    step_dh = np.abs(dh)
    circuit = fl.circuit is not None
    burns = bool(fl.burns_mass)
    # Whether a step depends on the ones before it.
    state = burns or (circuit and store0 is not None)

    def at(before):
        """Mass [kg] and state of charge [-] at a step's start, ``before`` used before it."""
        m = np.maximum(m_start - before, fl.zero_fuel_mass) if burns else m_start
        return m, fl.soc(None if store0 is None else store0 - before)

    def flown(m, soc, air, v, v_cap, p_up, wind):
        """Climb-rate check, vertical speed, power, time, store used and ground speed."""
        level = fl.af.level_flight(m, air, v)
        p_level, drag = level.shaft, level.drag
        weight = m * g0
        # Climb: set power, rate from the excess thrust power (capped by a set rate, and
        # kept below 0.9 x TAS where the shallow-climb formula holds). With a propeller
        # diameter the thrust comes from momentum theory and is finite at low speed.
        roc = prop.excess_thrust_power(v, air.density, p_up, p_level, drag) / weight
        if profile.climb_rate is not None:
            capped = roc > profile.climb_rate
            roc = np.where(capped, profile.climb_rate, roc)
            p_up = np.where(capped, prop.shaft_with_extra(p_level, drag, v, air.density,
                                                          weight * roc), p_up)
        roc = np.minimum(roc, v_cap)
        bad = checked & (roc < _MIN_CLIMB_RATE)
        # Descent: the set rate, at the power that gives it, never below idle.
        p_down = np.maximum(prop.shaft_with_extra(p_level, drag, v, air.density,
                                                  -weight * descent), idle)
        vz = np.where(climbing, np.where(bad, _MIN_CLIMB_RATE, roc), descent)
        p = np.where(climbing, p_up, p_down)
        dt = np.where(moving, step_dh / vz, ZERO)
        # Candidates that do not move use nothing (not NaN x 0).
        burn = np.where(moving, fl.rate(p, soc) * dt, ZERO)
        gs, _, _ = fl.ground(v, leg, wind, vz, heading=False)
        return bad, vz, p, dt, burn, gs, soc

    if int(np.prod(shape)) <= CLIMB_PASS_POINTS:
        before = ZERO
        m, soc = at(before)
        for _ in range(CLIMB_STEPS if state else 1):
            bad, vz, p, dt, burn, gs, soc = flown(m, soc, air_steps, v_steps, v_cap_steps,
                                                  p_up_steps, wind_steps)
            if not state:
                break
            # What each step leaves to the next, added in step order; once the masses and
            # states of charge it gives are those this pass started from, it is done.
            before = np.concatenate((np.zeros_like(burn[:1]), np.cumsum(burn[:-1], axis=0)))
            m_next, soc_next = at(before)
            if all_true(m_next == m) and (soc is None or all_true(soc_next == soc)):
                break
            m, soc = m_next, soc_next
        if circuit:
            watch.see_steps(p, soc, moving)
        # The sums (added in step order) and the last step's heading.
        sums = [np.cumsum(a, axis=0)[-1] for a in (dt, burn, gs * dt, v_steps * dt,
                                                   p / rated * dt)]
        bads = bad
        last = vz[-1]
    else:
        air_rows = fl.air_rows(h_steps)
        before, sums, bads = ZERO, None, []
        for j in range(CLIMB_STEPS):
            m, soc = at(before)
            v = v_steps[j]
            bad, vz, p, dt, burn, gs, soc = flown(
                m, soc, air_rows[j], v, v_cap_steps[j], p_up_steps[j],
                tuple(w[j] for w in wind_steps))
            if circuit:
                watch.see(p, soc, moving)
            before = before + burn
            terms = (dt, burn, gs * dt, v * dt, p / rated * dt)
            if sums is None:
                sums = list(terms)   # new arrays, added to in place below
            else:
                for a, b in zip(sums, terms):
                    a += b
            bads.append(bad)
        bads, last = np.array(bads), vz
    t, used, x, tas_sum, pw_sum = sums
    _, heading, _ = fl.ground(v_steps[-1], leg, tuple(w[-1] for w in wind_steps), last)
    m_end = np.maximum(m_start - used, fl.zero_fuel_mass) if burns else m_start.copy()
    # Where the climb rate was first lost.
    ok = ~np.any(bads, axis=0)
    if all_true(ok):
        fail_at = np.full(shape, np.nan)
    else:
        first = np.argmax(bads, axis=0)
        fail_at = np.where(ok, np.nan, np.take_along_axis(
            np.broadcast_to(h_steps, (CLIMB_STEPS,) + shape), first[None], axis=0)[0])
    with np.errstate(invalid="ignore", divide="ignore"):
        mean = lambda s: np.where(t > 0, s / t, np.nan)  # noqa: E731
        # Candidates that do not move have no distance (not NaN x 0).
        return dict(time=t, distance=np.where(moving, x, 0.0), used=used, mass_end=m_end,
                    ok=ok, fail_at=fail_at, tas=mean(tas_sum), gs=mean(x),
                    heading=np.broadcast_to(heading, shape) + 0.0, power=mean(pw_sum),
                    **watch.out(shape))


def _staying(fl: Flight, shape, m0) -> dict:
    """:func:`_vertical`'s figures where no candidate climbs or descends."""
    zero = np.zeros(shape)
    fail_at = np.full(shape, np.nan)
    return dict(time=zero, distance=zero, used=zero,
                mass_end=np.broadcast_to(np.asarray(m0, float), shape).copy(),
                ok=np.ones(shape, dtype=bool), fail_at=fail_at, tas=fail_at, gs=fail_at,
                heading=zero, power=fail_at, **_PackWatch(fl).out(shape))


def _rk4_steps(fl: Flight) -> int:
    """RK4 steps of a cruise or hold (with a circuit :data:`CRUISE_STEPS`).

    A plain pack's mass and rate do not change along a segment: one step is exact.
    """
    if fl.circuit is not None:
        return CRUISE_STEPS
    return CRUISE_STEPS_STEADY if np.any(fl.burns_mass) else 1


def _speed_rule(fl: Flight, mode, target, v_ref, m_ref, air, n=1.0):
    """TAS as a function of mass for a speed mode (see :func:`speed_mode`).

    A best speed holds the lift coefficient of ``v_ref`` at ``m_ref`` (TAS as sqrt(mass));
    a power setting holds shaft power ``target`` [W] (Newton steps from ``v_ref``, on the
    fast side of the power curve); a TAS or CAS holds ``v_ref``.
    """
    if mode == "best":
        return lambda m: v_ref * np.sqrt(m / m_ref)
    if mode != "power" or not fl.burns_mass:
        return lambda m: v_ref

    def speed(m):
        v = np.asarray(v_ref, dtype=float)
        for _ in range(3):
            p = fl.shaft(m * n, air, v)
            dv = 1e-4 * v
            slope = (fl.shaft(m * n, air, v + dv) - p) / dv
            v = v - (p - target) / slope
        return v

    return speed


def _cruise(fl: Flight, leg, h, m0, distance, v_ref, m_ref, air=None, mode=None,
            target=None, store0=None):
    """Cruise at altitudes ``h`` over ``distance`` (arrays over candidates) by RK4.

    The speed follows the leg's speed mode (:func:`speed_mode`): a best speed holds the
    lift coefficient of TAS ``v_ref`` at mass ``m_ref`` (TAS goes as sqrt(mass)); a power
    setting holds shaft power ``target`` [W]; a TAS or CAS is held. The cruise starts at
    mass ``m0``. ``air`` may carry the air at ``h``. With ``store0`` [J], the store at the
    start, a pack given as a circuit is followed through its state of charge: the energy
    used is integrated with the mass, and the rate is the circuit's at each state.
    """
    air = fl.air(h) if air is None else air
    wind = fl.wind(leg, h)
    m0 = np.asarray(m0, dtype=float)
    if mode is None:
        mode = "best" if leg.tas is None else "tas"
    speed = _speed_rule(fl, mode, target, v_ref, m_ref, air)
    v0 = speed(m0)

    watch = _PackWatch(fl)
    circuit = fl.circuit is not None
    n = _rk4_steps(fl)
    dx = np.asarray(distance, dtype=float) / n
    steady = fl.steady_wind(*wind)
    burns, zfm = fl.burns_mass, fl.zero_fuel_mass
    first = []  # the shaft power of the first stage: the start's, as at m0 and v0
    last = []   # the last masses met and their derivatives (without a circuit)

    def deriv(m, e=0.0):
        # Without a circuit the derivatives depend on the mass alone: a stage at the same
        # masses as the last (nothing burns: a plain pack, or past an empty tank) has the
        # same ones, to the bit, and they are not worked out again.
        if last and m.shape == last[0].shape and all_true(m == last[0]):
            return last[1]
        v = speed(m)
        gs, _, _ = fl.ground(v, leg, steady, heading=False)
        # Into a wind as strong as the airspeed the leg cannot be made good (reported as a
        # reason); crawling at GS_FLOOR keeps the bookkeeping finite and the fuel honest
        # (fmax takes the floor where gs is NaN).
        gs = np.fmax(gs, _GS_FLOOR)
        shaft = fl.shaft(m, air, v)
        if not first:
            first.append(shaft)
        if circuit:
            soc = fl.soc(None if store0 is None else store0 - e)
            watch.see(shaft, soc, dx > 0)
        else:
            soc = None
        r = fl.rate(shaft, soc)
        burning = (m > zfm) if burns is True else burns & (m > zfm)
        per_metre = r / gs
        out = np.where(burning, -per_metre, ZERO), per_metre, ONE / gs
        if not circuit:
            last[:] = (m, out)
        return out

    shape = np.broadcast_shapes(dx.shape, m0.shape, np.shape(h), np.shape(v_ref),
                                fl.sample_shape)
    m = np.broadcast_to(m0, shape).copy()
    used = np.zeros(shape)
    t = np.zeros(shape)
    half, sixth = 0.5 * dx, dx / 6.0
    for _ in range(n):
        # The store used is a state of the integration too (the circuit's rate depends on
        # the state of charge); for fuel and plain packs its stages change nothing (and
        # are not worked out).
        k1 = deriv(m, used)
        k2 = deriv(np.maximum(m + half * k1[0], zfm),
                   used + half * k1[1] if circuit else None)
        k3 = deriv(np.maximum(m + half * k2[0], zfm),
                   used + half * k2[1] if circuit else None)
        k4 = deriv(np.maximum(m + dx * k3[0], zfm), used + dx * k3[1] if circuit else None)
        for i, acc in ((1, used), (2, t)):
            acc += sixth * (k1[i] + TWO * k2[i] + TWO * k3[i] + k4[i])
        m = np.maximum(m + sixth * (k1[0] + TWO * k2[0] + TWO * k3[0] + k4[0]), zfm)
    gs0, heading, held = fl.ground(v0, leg, steady)
    p0 = first[0]
    if all_true(m == m0):
        # Nothing burnt (a plain pack, past an empty tank): the end is the start.
        v_end, p1 = v0 + 0 * t, p0
    else:
        v_end = speed(m)
        p1 = fl.shaft(m, air, v_end)
    v_stall = fl.af.stall_speed(m0, air.density)
    zero = 0 * t
    return dict(time=t, distance=np.asarray(distance, float) + zero, used=used, mass_end=m,
                tas=v0 + zero, gs=gs0 + zero, heading=heading + zero,
                power=p0 / fl.prop.rated_power + zero,
                power_ok=np.maximum(p0, p1) <= fl.prop.shaft_power_available(air.sigma)
                * (1 + 1e-9),
                stall_ok=v0 >= fl.margin * v_stall * (1 - 1e-9),
                wind_ok=held & (gs0 > 0), v_end=v_end, **watch.out(shape))


def speed_mode(mission: Mission, leg) -> tuple:
    """How a leg's speed is set, as crews set it.

    Parameters
    ----------
    mission : Mission
        The mission (its default cruise power).
    leg : Leg
        The leg.

    Returns
    -------
    mode : {"tas", "cas", "power", "best", "hover"}
        A TAS held, a CAS held, a power setting held, an objective's best speed, or a hover
        (holding position: the airspeed is the wind's).
    value : float or str
        The TAS or CAS [m/s], the power [-], or the objective's name.
    """
    if leg.kind == "hover":
        return "hover", 0.0
    if leg.tas is not None:
        return "tas", leg.tas
    if leg.cas is not None:
        return "cas", leg.cas
    if leg.power is not None:
        return "power", leg.power
    if leg.objective is not None:
        return "best", leg.objective
    if leg.kind == "loiter":
        return "best", "endurance"
    if mission.cruise_power is not None:
        return "power", mission.cruise_power
    return "best", "range"


def _speed_at_power(fl: Flight, m, air, target):
    """TAS [m/s] at which shaft power ``target`` [W] holds level flight, fast side.

    Returns the speed (NaN where none) and where full throttle gives that power and the
    power holds level flight.
    """
    af = fl.af
    v_mp = speed_for_min_power(af, m, air)
    v_hi = MACH_LIMIT * air.speed_of_sound
    p_min = fl.shaft(m, air, v_mp)
    p_hi = fl.shaft(m, air, v_hi)
    ok = ((target <= fl.prop.shaft_power_available(air.sigma) * (1 + 1e-12))
          & (target >= p_min) & (target <= p_hi))
    shape = np.broadcast_shapes(np.shape(v_mp), np.shape(target))
    v = illinois_root(lambda x: fl.shaft(m, air, x) - target, np.broadcast_to(v_mp, shape),
                      np.broadcast_to(v_hi, shape), xtol_rel=1e-10)
    return np.where(ok, v, np.nan), np.broadcast_to(ok, shape)


def _start_speed(fl: Flight, mission: Mission, leg, h, m, store, air=None):
    """TAS to start a cruise or hold at, whether it can be flown, the mode and its target.

    Returns (TAS [m/s], flyable, mode, target shaft power [W] or None), arrays over the
    altitudes ``h``.
    """
    h = np.atleast_1d(np.asarray(h, dtype=float))
    air = fl.air(h) if air is None else air
    mode, value = speed_mode(mission, leg)
    n = _load_factor(leg)
    ones = np.ones(h.shape, dtype=bool)
    if mode == "hover":
        # Holding position over the ground, the airspeed is the wind speed.
        v = fl.wind_speed(leg, h)
        return np.broadcast_to(v, np.broadcast_shapes(np.shape(v), h.shape)).copy(), ones, \
            mode, None
    if mode == "tas":
        return np.full(h.shape, value), ones, mode, None
    if mode == "cas":
        return tas_from_cas(value, air.pressure, air.speed_of_sound) + 0.0 * h, ones, mode, None
    if mode == "power":
        target = value * fl.prop.rated_power
        v, ok = _speed_at_power(fl, m * n, air, target)
        return v, ok, mode, target
    head, cross = fl.wind(leg, h)
    if leg.kind != "cruise":
        head, cross = 0.0 * head, 0.0 * cross   # an orbit or hold: no course to make good
    # Past an empty store a failed plan goes on, to say by how much it falls short; its
    # speeds are those of a nearly empty store, as a negative one would turn the objective
    # (range or time per unit of store) upside down.
    store = np.maximum(store, 1e-9 * fl.prop.store_capacity)
    # A planner needs the speed to 1e-4 (0.02 kt at 100 kt, far finer than it is flown;
    # the fuel is flat there, ~1e-8), not to the last digit. In a turn the best speeds
    # are those of level flight at the mass times the load factor (the same CL).
    v, ok = objective_speed(fl.af, m * n, air, store, value, headwind=head,
                            crosswind=cross, stall_margin=fl.margin, xtol=1e-4)
    return v, ok, mode, None


def _load_factor(leg) -> float:
    """Load factor of the leg's flight: 1/cos(bank) in a loiter orbit, else 1 [-]."""
    return 1.0 / np.cos(np.radians(leg.bank)) if leg.kind == "loiter" else 1.0


def _hold(fl: Flight, leg, h, m0, duration, v_ref, m_ref, air, mode, target, store0=None):
    """A hover or loiter at altitudes ``h`` for ``duration`` [s], by RK4 in time.

    In a loiter orbit at bank angle phi the lift is n = 1/cos(phi) times the weight, so the
    induced drag is n^2 = 1/cos^2(phi) times that of straight flight at the same speed;
    the kind's level flight at n times the mass gives exactly that. With ``store0`` [J] a
    pack given as a circuit is followed through its state of charge, as in
    :func:`_cruise`.
    """
    n = _load_factor(leg)
    m0 = np.asarray(m0, dtype=float)
    speed = _speed_rule(fl, mode, target, v_ref, m_ref, air, n)
    v0 = speed(m0)
    watch = _PackWatch(fl)

    def rate(m, e=0.0):
        shaft = fl.shaft(m * n, air, speed(m))
        soc = fl.soc(None if store0 is None else store0 - e)
        watch.see(shaft, soc)
        r = fl.rate(shaft, soc)
        burning = fl.burns_mass & (m > fl.zero_fuel_mass)
        return np.where(burning, -r, 0.0), r

    shape = np.broadcast_shapes(m0.shape, np.shape(h), np.shape(v_ref), fl.sample_shape)
    m = np.broadcast_to(m0, shape).copy()
    used = np.zeros(shape)
    n_steps = _rk4_steps(fl)
    dt = float(duration) / n_steps
    for _ in range(n_steps):
        k1 = rate(m, used)
        k2 = rate(np.maximum(m + 0.5 * dt * k1[0], fl.zero_fuel_mass), used + 0.5 * dt * k1[1])
        k3 = rate(np.maximum(m + 0.5 * dt * k2[0], fl.zero_fuel_mass), used + 0.5 * dt * k2[1])
        k4 = rate(np.maximum(m + dt * k3[0], fl.zero_fuel_mass), used + dt * k3[1])
        used += dt / 6.0 * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1])
        m = np.maximum(m + dt / 6.0 * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]),
                       fl.zero_fuel_mass)
    p0 = fl.shaft(m0 * n, air, v0)
    p1 = fl.shaft(m * n, air, speed(m))
    v_stall = fl.af.stall_speed(m0 * n, air.density)
    zero = np.zeros(shape)
    # An orbit or a hover keeps no course: no ground speed or heading to fly.
    return dict(time=zero + float(duration), distance=zero, used=used, mass_end=m,
                tas=v0 + zero, gs=zero + np.nan, heading=zero + np.nan,
                power=p0 / fl.prop.rated_power + zero,
                power_ok=np.maximum(p0, p1) <= fl.prop.shaft_power_available(air.sigma)
                * (1 + 1e-9),
                stall_ok=v0 >= fl.margin * v_stall * (1 - 1e-9),
                wind_ok=np.ones(shape, dtype=bool), v_end=speed(m), **watch.out(shape))


def climb_speed(mission: Mission) -> float:
    """Climb EAS [m/s]: the profile's, or the best-rate speed at departure, mass at start.

    The best-rate speed is searched only at or above the mission's stall margin times the
    stall speed (:func:`~cruiseplan.planning.optimise.best_rate_climb`).

    Parameters
    ----------
    mission : Mission
        The mission; its profile, day, loading and stall margin are used.

    Returns
    -------
    float
        Equivalent airspeed held in the climb [m/s].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.10 (climb).
    """
    load = mission.airframe.loading(mass=mission.mass, store=mission.store,
                                    payload=mission.payload)
    return float(_climb_speeds([mission], [load])[0])


def _climb_speeds(missions, loads):
    """:func:`climb_speed` of missions differing only in the day and loading, at once [m/s]."""
    mission = missions[0]
    if mission.profile.climb_speed is not None:
        return np.full(len(missions), mission.profile.climb_speed)
    dev = np.array([x.isa_dev for x in missions], dtype=float)
    air = air_state(np.full(dev.shape, mission.profile.departure_elevation), dev)
    mass = np.array([load.mass for load in loads])
    # Never slower than the stall margin; held as EAS through the climb.
    _, v = max_climb_rate(mission.airframe, mass, air, stall_margin=mission.stall_margin)
    return eas_from_tas(v, air.density)


def leg_options(fl, mission, leg, h_now, m, store, v_climb, last, candidates,
                 v_cruise=None):
    """Evaluate a leg at candidate altitudes: transition, cruise, final descent.

    ``v_cruise`` fixes the cruise TAS at the leg's start (a plan being re-flown); by
    default it is the leg's set speed or the objective's best at each candidate.

    Parameters
    ----------
    fl : Flight
        The flight model on the day.
    mission : Mission
        The mission; its profile is used.
    leg : Leg
        The leg flown.
    h_now : float or array_like
        Pressure altitude at the leg's start [m].
    m : float or array_like
        Mass at the leg's start [kg] (arrays over samples in a Monte Carlo).
    store : float or array_like
        Fuel [kg] or usable energy [J] on board at the leg's start, for best speeds.
    v_climb : float
        Equivalent airspeed held in climbs [m/s].
    last : bool
        The last leg: a final descent to the arrival elevation follows the cruise.
    candidates : array_like
        Candidate cruise pressure altitudes [m].
    v_cruise : float or array_like, optional
        Cruise TAS at the leg's start [m/s], held instead of a best or set speed.

    Returns
    -------
    dict
        ``H`` the candidates [m]; ``trans``, ``cruise`` and ``final`` the segments'
        dicts of arrays (time [s], distance [m], used [kg or J], mass_end [kg], ...);
        ``fits`` where the climb and descent leave a cruise [-]; ``speed_ok`` where a
        speed was found [-]; ``total`` the store used [kg or J]; ``time`` [s];
        ``v_cruise`` the cruise TAS at the start [m/s].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.10 (climb) and 5.13
       (range: the Breguet equation).
    """
    prof = mission.profile
    H = np.asarray(candidates, dtype=float)
    air_H = fl.air(H)
    # Best (or set) speed at each candidate, at the leg's starting mass; a best speed is
    # then flown at that lift coefficient, a power setting at that power.
    if v_cruise is None:
        v_cr, speed_ok, mode, target = _start_speed(fl, mission, leg, H, m, store, air_H)
    else:
        # A plan re-flown (Monte Carlo): its start speed, in the leg's own speed mode.
        mode, value = speed_mode(mission, leg)
        target = value * fl.prop.rated_power if mode == "power" else None
        v_cr, speed_ok = v_cruise + 0.0 * H, np.ones(H.shape, dtype=bool)
    # Candidates without a cruise speed (speed_ok False, never chosen) still run through
    # the arithmetic below: give them the climb speed, not zero, so nothing divides by 0.
    v_eas_cruise = np.where(np.isfinite(v_cr), eas_from_tas(v_cr, air_H.density), v_climb)
    trans = _vertical(fl, leg, h_now, H, m, v_climb, v_eas_cruise, prof, store)
    m_cr = trans["mass_end"]
    store_cr = store - trans["used"]  # a pack's state of charge is followed from it
    # The final descent's distance is flown within the last leg: estimate it from the mass
    # at the start of the cruise, then integrate it after the cruise.
    if leg.kind != "cruise":
        # A hover or loiter holds its point for its time; no distance of its own.
        fits = np.ones(H.shape, dtype=bool)
        cr = _hold(fl, leg, H, m_cr, leg.duration, v_cr, m, air_H, mode, target, store_cr)
    else:
        if last:
            fin0 = _vertical(fl, leg, H, prof.arrival_elevation, m_cr, v_climb,
                             v_eas_cruise, prof, store_cr)
            d_final = fin0["distance"]
        else:
            d_final = 0.0
        d_cruise = leg.distance - trans["distance"] - d_final
        fits = d_cruise >= 0
        cr = _cruise(fl, leg, H, m_cr, np.maximum(d_cruise, 0.0), v_cr, m, air_H, mode,
                     target, store_cr)
    if last:
        # Same descent speed as the estimate, so that the leg's distances add up exactly.
        fin = _vertical(fl, leg, H, prof.arrival_elevation, cr["mass_end"], v_climb,
                        v_eas_cruise, prof, store_cr - cr["used"])
    else:
        # The next leg starts where this one cruised: no final descent.
        fin = _staying(fl, np.broadcast_shapes(H.shape, np.shape(cr["mass_end"]),
                                               np.shape(v_eas_cruise), fl.sample_shape),
                       cr["mass_end"])
    total = trans["used"] + cr["used"] + fin["used"]
    return dict(H=H, trans=trans, cruise=cr, final=fin, fits=fits, speed_ok=speed_ok,
                total=total, time=trans["time"] + cr["time"] + fin["time"], v_cruise=v_cr,
                mode=np.full(H.shape, mode))


def ground_elevation(mission, leg) -> float:
    """Highest ground under a leg [m]: given, or the higher of the two fields.

    Parameters
    ----------
    mission : Mission
        The mission; its departure and arrival elevations [m] are the fallback.
    leg : Leg
        The leg; its ``elevation`` [m] when given.

    Returns
    -------
    float
        Elevation of the highest ground under the leg [m].
    """
    if leg.elevation is not None:
        return leg.elevation
    return max(mission.profile.departure_elevation, mission.profile.arrival_elevation)


def _caps(mission, leg):
    """Lowest and highest altitude allowed on a leg [m], with the name of the top cap."""
    prof = mission.profile
    ground = ground_elevation(mission, leg)
    lo = ground + prof.min_clearance
    top, why = prof.top, "the highest altitude searched"
    if leg.max_altitude is not None and leg.max_altitude < top:
        top, why = leg.max_altitude, "the leg's maximum altitude"
    if leg.max_agl is not None and ground + leg.max_agl < top:
        top, why = ground + leg.max_agl, "the height cap above ground"
    return lo, top, why


def _choose(options, lo, top):
    """Each mission's candidate using the least store (ties: the quicker), or -1.

    ``options`` holds arrays over (missions, candidates); returns an index per mission.
    """
    H = options["H"]
    ok = (options["fits"] & options["trans"]["ok"] & options["speed_ok"]
          & options["cruise"]["power_ok"] & options["cruise"]["wind_ok"]
          & _pack_ok(options) & (H >= lo - 1e-6) & (H <= top + 1e-6))
    ok = np.broadcast_to(ok, np.shape(options["total"]))
    cost = np.where(ok, options["total"], np.inf)
    best = cost.min(axis=-1, keepdims=True)
    near = cost <= best * (1 + 1e-9) + 1e-12
    # The first of the quickest among the near-cheapest (argmin takes the first).
    pick = np.where(near, options["time"], np.inf).argmin(axis=-1)
    return np.where(ok.any(axis=-1), pick, -1)


def _pack_ok(options):
    """Candidates whose segments keep within the battery pack's limits (all without one)."""
    return ((options["trans"]["pack_limits"] | options["cruise"]["pack_limits"]
             | options["final"]["pack_limits"]) == 0)


def _pack_reasons(fl, leg, kind, seg) -> list:
    """NO-GO reasons of a segment beyond the battery pack's limits (circuit only)."""
    bits = int(seg["pack_limits"])
    if not bits:
        return []
    c = fl.circuit
    out = []
    if bits & (Limit.CUTOFF | Limit.PACK_POWER):
        out.append(f"pack voltage: leg {leg.name!r} ({kind}) takes the pack to "
                   f"{float(seg['pack_voltage']):.1f} V under load, below its cut-off "
                   f"{c.cutoff:.1f} V at {c.celsius:.0f} degC (the controller would cut "
                   "the power): fly slower, climb less steeply or take a warmer or "
                   "fuller pack")
    if bits & Limit.CURRENT:
        out.append(f"pack current above its maximum: leg {leg.name!r} ({kind}) draws "
                   f"{float(seg['pack_current']):.0f} A, above the pack's "
                   f"{c.max_current:.0f} A continuous: set less climb power or a slower "
                   "speed")
    return out


def _chart_text(fl: Flight, fraction: float, h: float, isa_dev: float) -> str:
    """`` (2400 rpm, 22.1 inHg)``: the engine's setting for a power, when it has a chart.

    ``h`` is the pressure altitude [m], ``isa_dev`` the day's ISA deviation [K].
    """
    chart = getattr(fl.prop, "power_chart", None)
    if chart is None:
        return ""
    air = air_state(h, isa_dev)
    rpm, mp = chart.setting(fraction, air.pressure, air.temperature,
                            air.temperature - air.isa_dev)
    if not np.isfinite(rpm):
        return " (full throttle)"
    f, label = display("manifold_pressure", fl.prop.store.default_units)
    return f" ({float(rpm):.0f} rpm, {float(mp) * f:.1f} {label})"


def _store_text(fl, amount):
    return format_amount(amount, fl.prop, fl.prop.store.default_units, with_mass=False)


def plan_mission(mission: Mission, *, headwind_offset: float = 0.0) -> Plan:
    """Plan a mission: segments, totals, reserve and the GO / NO-GO verdict.

    Parameters
    ----------
    mission : Mission
        The mission (see :func:`cruiseplan.io.mission_file.load_mission`).
    headwind_offset : float, optional
        A headwind component added on every leg [m/s] (negative: tailwind), for what-if
        searches.

    Returns
    -------
    Plan
        A NO-GO is a result with its reasons, not an error.

    See Also
    --------
    plan_missions : Many missions at once; each plan is the one this function makes.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.10-5.14.
    """
    return plan_missions([mission], headwind_offset=headwind_offset)[0]


#: Mission fields in which missions planned in one pass may differ: the day's ISA
#: deviation and the loading. The legs (and the reserve's alternate) may differ in their
#: wind too, where each is uniform (one level, as a what-if wind is). Every other field
#: must be equal.
TOGETHER_FIELDS = frozenset({"isa_dev", "mass", "store", "payload", "overrides"})


#: Mission fields compared by identity for a first grouping (see :func:`plan_missions`).
_OBJECT_FIELDS = tuple(name for name in Mission.__dataclass_fields__
                       if name not in TOGETHER_FIELDS)


def _value_key(value):
    """``value`` itself where it can be a dict key (compared by value), else its id."""
    try:
        hash(value)
    except TypeError:
        return id(value)
    return value


def _leg_key(leg) -> tuple:
    """A leg's fields by value, its wind left out when uniform (planned as an array)."""
    if leg is None:
        return None
    return tuple(_value_key(None if name == "wind" and len(value.altitudes) == 1 else value)
                 for name in leg.__dataclass_fields__ for value in (getattr(leg, name),))


def _together_key(mission: Mission) -> tuple:
    key = []
    for name in Mission.__dataclass_fields__:
        if name in TOGETHER_FIELDS:
            continue
        value = getattr(mission, name)
        if name == "legs":
            key.append(tuple(_leg_key(leg) for leg in value))
        elif name == "reserve":
            key.append((_value_key(replace(value, alternate=None)),
                        _leg_key(value.alternate)))
        else:
            key.append(_value_key(value))
    return tuple(key)


def plan_missions(missions, *, headwind_offset: float = 0.0) -> list:
    """Plan many missions; those that differ only in the day and the loading at once.

    Missions that share everything but their ISA deviation, take-off mass, store,
    payload (:data:`TOGETHER_FIELDS`) and uniform winds (e.g. what
    :func:`~cruiseplan.io.mission_file.apply_overrides` makes of one mission with
    ``isa_dev``, ``fuel``, ``payload`` or ``wind``) are flown in one pass, their
    candidate altitudes as arrays over the missions; the others
    one group at a time. Every array operation acts on each mission's elements alone and
    every search stops each element on its own, so each plan is, to the last bit, the one
    :func:`plan_mission` makes of that mission alone.

    Parameters
    ----------
    missions : iterable of Mission
        The missions.
    headwind_offset : float, optional
        A headwind component added on every leg of every mission [m/s].

    Returns
    -------
    list of Plan
        The plans, in the order of ``missions``.
    """
    missions = list(missions)
    # Missions sharing every object but the fields that may differ are grouped at once;
    # those with equal copies of them (e.g. read again with another wind) by value.
    by_object, groups = {}, {}
    for i, mission in enumerate(missions):
        by_object.setdefault(tuple(id(getattr(mission, name)) for name in _OBJECT_FIELDS),
                             []).append(i)
    for index in by_object.values():
        groups.setdefault(_together_key(missions[index[0]]), []).extend(index)
    plans = [None] * len(missions)
    for index in groups.values():
        group = _plan_together([missions[i] for i in index], headwind_offset)
        for i, plan in zip(index, group):
            plans[i] = plan
    return plans


def _row(options: dict, p: int, shape: tuple) -> dict:
    """Mission ``p``'s candidates of a leg's options (arrays over the candidates)."""
    return {k: (_row(v, p, shape) if isinstance(v, dict) else np.broadcast_to(v, shape)[p])
            for k, v in options.items()}


def _take(options: dict, index, rows, flats=None) -> dict:
    """The candidate ``index[p]`` of each mission ``p`` (arrays over the missions).

    ``rows`` is ``arange(missions)``; an array of the options has the missions' and the
    candidates' axes, or only the candidates' (the same for every mission), or length 1
    along either. Each array is read by one ``take`` of its flat indices, found once per
    shape (``flats``).
    """
    if flats is None:
        flats = {}
    out = {}
    for k, v in options.items():
        if isinstance(v, dict):
            out[k] = _take(v, index, rows, flats)
            continue
        v = np.asarray(v)
        flat = flats.get(v.shape)
        if flat is None:
            n_rows, n_cols = v.shape if v.ndim == 2 else (1,) + v.shape
            flat = ((rows * n_cols if n_rows > 1 else 0) + (index if n_cols > 1 else 0)
                    + np.zeros_like(rows))
            flats[v.shape] = flat
        out[k] = v.take(flat)
    return out


def _at(options: dict, p: int) -> dict:
    """Mission ``p``'s picked option (scalars) of :func:`_take`'s arrays."""
    return {k: (_at(v, p) if isinstance(v, dict) else v[p]) for k, v in options.items()}


def _plan_together(missions: list, headwind_offset: float) -> list:
    """Plans of missions that differ only in the day and the loading, flown in one pass.

    The state along the route (altitude, mass, store) is an array over the missions; a
    leg's candidate altitudes are a second axis; each mission picks its own candidate.
    Each leg is worked out from its start mass and store on a :class:`StartGrid`. A
    mission alone flies its runs of alike cruise legs in passes (:func:`_in_passes`),
    with the figures of the legs flown one at a time.
    """
    mission = missions[0]
    if not mission.legs:
        raise CruiseplanError(f"mission {mission.name!r} has no legs"
                              + (": it is a survey, planned in packs by "
                                 "cruiseplan.planning.survey.plan_survey"
                                 if getattr(mission, "survey", None) is not None else ""))
    af = mission.airframe
    n_points = len(missions)
    loads = [af.loading(mass=x.mass, store=x.store, payload=x.payload) for x in missions]
    fl = Flight.together(missions, loads, headwind_offset)
    prof = mission.profile
    reasons = [[] for _ in missions]
    for r, load in zip(reasons, loads):
        if load.mass > af.max_takeoff_mass * (1 + 1e-9):
            r.append(f"take-off mass {load.mass:.1f} kg exceeds the maximum "
                     f"{af.max_takeoff_mass:.1f} kg")
    initial = np.array([load.store for load in loads])
    mass0 = np.array([load.mass for load in loads])
    allowance = np.minimum(mission.allowance, initial)
    store = initial - allowance
    m = mass0 - allowance if fl.burns_mass else mass0.copy()
    segments = [[Segment("departure", "start, taxi, take-off", prof.departure_elevation,
                         prof.departure_elevation, 0.0, 0.0, 0.0, 0.0, 0.0, float(allowance[p]),
                         float(store[p]), float(m[p]), 0.0)] for p in range(n_points)]
    h = np.full(n_points, prof.departure_elevation)
    v_climb = _climb_speeds(missions, loads)
    leg_altitudes, leg_speeds = [], []
    failed_at = [None] * n_points   # index of the first segment of a leg that cannot be flown
    grid = StartGrid(fl, np.ravel(fl.zero_fuel_mass))

    def fly(leg, last, o, extra, new):
        """Fly each mission's picked option ``o`` of ``leg`` (arrays over the missions).

        ``extra``: the leg's reasons for every mission; ``new``: each mission's own.
        """
        nonlocal h, m, store
        # The leg was worked out from the mass on the grid: its masses move by the offset.
        shift = m - grid.mass(m)
        n_reasons = [len(r) for r in reasons]
        for r, more in zip(reasons, new):
            r.extend(extra)
            r.extend(more)
        H = o["H"]
        leg_altitudes.append(H)
        leg_speeds.append(o["v_cruise"])
        first_of_leg = [len(s) for s in segments]
        for key, kind in (("trans", None), ("cruise", leg.kind),
                          ("final", "descent to arrival")):
            seg = o[key]
            flown, m, store = _after(seg, m, store, grid, shift)
            for p in np.flatnonzero(flown):
                s = _at(seg, p)
                k = kind or ("climb" if H[p] > h[p] else "descent")
                reasons[p].extend(_pack_reasons(fl, leg, k, s))
                segments[p].append(_segment(fl, leg, k, s, o["mode"][p], float(H[p]),
                                            float(h[p]), prof.arrival_elevation,
                                            float(store[p]), float(m[p]), missions[p].isa_dev))
        # A leg that cannot be flown stops the plan there; a broken altitude limit makes
        # it NO-GO but the flight itself could go on.
        for p in range(n_points):
            if failed_at[p] is None and any(not r.startswith(_LIMIT_REASONS)
                                            for r in reasons[p][n_reasons[p]:]):
                failed_at[p] = first_of_leg[p]
        h = H if not last else np.full(n_points, prof.arrival_elevation)

    legs = mission.legs
    n = 0
    while n < len(legs):
        leg = legs[n]
        last = n == len(legs) - 1
        # Legs alike but for their course, distance and wind are flown in passes (one
        # mission alone; see _in_passes); the last one, with its final descent, on its own.
        end = n + 1
        key = (_run_key(mission, leg) if n_points == 1 and not last and PASS_LEGS > 1
               else None)
        if key is not None:
            while end < len(legs) - 1 and _run_key(mission, legs[end]) == key:
                end += 1
        if end - n > 1:
            # (The lambda reads the state fly has left.)
            for leg_k, o, new in _in_passes(fl, mission, legs[n:end], v_climb,
                                            lambda: (h, m, store)):
                fly(leg_k, False, o, [], [new])
            n = end
            continue
        lo, top, why = _caps(mission, leg)
        cands, fixed, extra = _candidates(mission, leg, h, lo, top)
        opts = leg_options(fl, mission, leg, h[:, None], grid.mass(m)[:, None],
                           grid.store(store)[:, None], v_climb[:, None], last, cands)
        o, new = _settle(opts, [leg] * n_points, mission, fixed, lo, top, why)
        fly(leg, last, o, extra, new)
        n += 1
    alternate = _alternate_used(fl, mission, m[:, None], leg_altitudes[-1][:, None])
    alternate = np.broadcast_to(np.ravel(alternate), (n_points,))
    plans = []
    for p, x in enumerate(missions):
        power = x.cruise_power or cruise_power(segments[p])
        reserve = reserve_required(af, x.reserve, mass=float(m[p]), cruise_power=power,
                                   power_source="mission" if x.cruise_power else "plan",
                                   alternate_used=float(alternate[p]))
        segs = _verdict(fl, segments[p], reasons[p], failed_at[p], float(store[p]), reserve)
        plans.append(Plan(x, tuple(segs), float(initial[p]), reserve, tuple(reasons[p]),
                          tuple(float(a[p]) for a in leg_altitudes), float(mass0[p]),
                          tuple(float(v[p]) for v in leg_speeds), float(v_climb[p])))
    return plans


def _candidates(mission, leg, h, lo, top):
    """A leg's candidate altitudes [m] from the start altitudes ``h`` [m] (over the rows).

    Returns the candidates (one row, or one row per element of ``h``), whether the
    altitude is fixed (nothing to choose) and the level rule's reasons for every row.
    """
    prof = mission.profile
    fixed = leg.altitude is not None
    extra = []
    if leg.kind != "cruise" and leg.altitude is None:
        # A hover or loiter without an altitude is flown where the aircraft is, within
        # the leg's limits.
        cands, fixed = np.minimum(np.maximum(h, lo), top)[:, None], True
    elif mission.levels and leg.kind == "cruise":
        # A cruising-level rule: its levels for the leg's magnetic course.
        cands, extra = leg_candidates(mission, leg, lo, top)
    elif leg.altitude is None:
        cands = np.arange(lo, top + 1e-6, prof.altitude_step)
        if cands.size == 0:
            cands = np.array([lo])
        else:
            # Staying at the altitude the aircraft is at is a candidate too (a last
            # column; where it is already a candidate or outside the limits, the
            # column repeats the first candidate, which then wins any tie).
            level = (lo <= h) & (h <= top) & ~np.any(h[:, None] == cands, axis=1)
            if np.any(level):
                cands = np.column_stack([np.broadcast_to(cands, (h.size, cands.size)),
                                         np.where(level, h, cands[0])])
    else:
        cands = np.array([leg.altitude])
    return cands, fixed, extra


def _settle(opts, legs, mission, fixed, lo, top, why):
    """Each row's picked candidate of a leg's options, and each row's new reasons.

    The rows are missions planned together (``legs`` the same leg for each) or the legs
    of a run flown in passes. Returns the picked options (arrays over the rows, see
    :func:`_take`) and a list of reasons per row.
    """
    rows = np.arange(len(legs))
    new = [[] for _ in legs]
    if fixed:
        pick = np.zeros(len(legs), dtype=int)
    else:
        pick = _choose(opts, lo, top)
        unflown = np.flatnonzero(pick < 0)
        shape = np.shape(opts["total"])
        for p in unflown:
            new[p].append(f"leg {legs[p].name!r}: no altitude between {lo:.0f} and "
                          f"{top:.0f} m ({why}) can be flown: "
                          + _why_not(_row(opts, p, shape), legs[p], lo, top))
        if unflown.size:
            fallback = np.argmin(np.where(opts["fits"], opts["total"], np.inf), axis=-1)
            pick = np.where(pick < 0, fallback, pick)
    o = _take(opts, pick, rows)
    if fixed:
        for p in rows:
            new[p].extend(_leg_reasons(_at(o, p), legs[p], mission, lo, top, why))
    return o, new


def _run_key(mission, leg):
    """What the legs of a run flown in passes share; None for a leg flown on its own.

    Cruise legs with the same limits, speed rule, kind of altitude (best or set) and
    winds aloft differ only in course, distance and set altitude. A level rule's
    candidates depend on the course: such legs are flown on their own.
    """
    if leg.kind != "cruise" or mission.levels:
        return None
    return _caps(mission, leg), speed_mode(mission, leg), leg.altitude is None, leg.wind


class _Legs:
    """The legs of a run as one leg: course [deg] and distance [m] of shape (legs, 1).

    Every other field is the first leg's, the same on every leg of a run
    (:func:`_run_key`).
    """

    def __init__(self, legs):
        self._first = legs[0]
        self.course = np.array([x.course for x in legs], dtype=float)[:, None]
        self.distance = np.array([x.distance for x in legs], dtype=float)[:, None]

    def __getattr__(self, name):
        return getattr(self._first, name)


def _bits(x):
    """The bits of a float64 array: equal bits, the same figures from every operation."""
    return np.ascontiguousarray(x, dtype=float).view(np.int64)


class StartGrid:
    """The grid a leg's start mass and store are put on before the leg is worked out.

    Spacings of 2**-:attr:`BITS` (about 1e-9) of the maximum take-off mass and of the
    store's capacity, powers of two (putting a value on the grid is exact arithmetic).
    A leg's figures then follow from its start to within 1e-9, below the integration's
    own error (about 1e-8), and a guess of the start within a small part of a spacing
    gives the leg's figures to the last bit: the legs of a run can be worked out in
    passes (:func:`_in_passes`). The plan's bookkeeping keeps the masses and stores off
    the grid: a leg's masses move by its start's offset from the grid. A mass that does
    not burn, and a mass at zero fuel, stay as they are.

    Parameters
    ----------
    fl : Flight
        The flight model (its airframe and store).
    zero_fuel_mass : float or numpy.ndarray
        Zero-fuel mass [kg], broadcasting against the masses asked about.
    """

    #: The grid's spacing is 2**-BITS of the quantity's scale, rounded down to a power
    #: of two.
    BITS = 30

    def __init__(self, fl, zero_fuel_mass):
        self._burns = bool(np.any(fl.burns_mass))
        self._zfm = zero_fuel_mass
        self._m = 2.0 ** (np.floor(np.log2(fl.af.max_takeoff_mass)) - self.BITS)
        self._s = 2.0 ** (np.floor(np.log2(fl.prop.store_capacity)) - self.BITS)

    def mass(self, m):
        """The nearest mass on the grid, never below zero fuel.

        Parameters
        ----------
        m : array_like
            Mass [kg].

        Returns
        -------
        numpy.ndarray
            Mass on the grid [kg] (``m`` itself where it does not burn or is at zero
            fuel).
        """
        if not self._burns:
            return m
        return np.where(m > self._zfm, np.maximum(np.rint(m / self._m) * self._m,
                                                  self._zfm), m)

    def store(self, s):
        """The nearest store on the grid.

        Parameters
        ----------
        s : array_like
            Fuel [kg] or usable energy [J] on board (negative past an empty store).

        Returns
        -------
        numpy.ndarray
            Store on the grid [kg or J].
        """
        return np.rint(s / self._s) * self._s

    def shifted(self, m_end, shift):
        """A leg's end mass moved by its start's offset from the grid.

        Parameters
        ----------
        m_end : array_like
            End mass of a segment of a leg worked out from its start on the grid [kg].
        shift : array_like
            The start's mass less its mass on the grid [kg].

        Returns
        -------
        numpy.ndarray
            End mass [kg]; one at zero fuel stays there.
        """
        if not self._burns:
            return m_end
        return np.where(m_end > self._zfm, np.maximum(m_end + shift, self._zfm), m_end)


def _in_passes(fl, mission, legs, v_climb, current):
    """Fly a run of legs (one mission) in passes, yielding each leg's picked options.

    A leg's options depend on where the one before it ended: its altitude, mass and
    store. Each pass works out up to :data:`PASS_LEGS` legs at once, each from a guess
    of its start on the :class:`StartGrid`; the legs whose guesses are their
    starts on the grid, to the bit, from the first on, are exact. They are yielded in
    order (``(leg, options, reasons)``, the options arrays over one row, as
    :func:`_settle` gives them); the caller flies each, and ``current()`` then gives
    (altitude, mass, store) after it (arrays of one element). The next pass starts at
    the first leg not yet exact, its guess its start; the guesses after it follow what
    each leg used at its guess, corrected to first order for the change of its start,
    so that a few passes make the whole run exact (about four per :data:`PASS_LEGS`
    legs burning fuel, one or two where nothing burns). Every array operation acts on
    each element alone and every search stops each element on its own, so each leg's
    figures are those of the leg flown alone, to the last bit.
    """
    first = legs[0]
    lo, top, why = _caps(mission, first)
    fixed = first.altitude is not None
    zfm = float(np.ravel(fl.zero_fuel_mass)[0])
    grid = StartGrid(fl, zfm)
    distance = np.array([x.distance for x in legs], dtype=float)
    # Each leg's last working-out: its start mass on the grid, end mass and store used.
    seen = {}

    def start():
        h, m, s = current()
        return float(h[0]), float(m[0]), float(s[0])

    # ``ahead``: the starts (altitude, mass and store, off the grid) foreseen for the
    # legs from the next one on; ``rate``: the last leg's cruise (TAS [m/s], mass burnt
    # [kg/s] and store used per second), to foresee the legs past them.
    k, ahead, rate = 0, None, None
    while k < len(legs):
        # Nothing to guess from yet (the altitude the first leg picks, what a leg uses):
        # the first leg alone.
        rows = legs[k:k + (PASS_LEGS if rate is not None else 1)]
        w = len(rows)
        known = 0 if ahead is None else min(len(ahead[0]), w)
        h_in, m_in, s_in = (np.empty(w) for _ in range(3))
        if known:
            h_in[:known], m_in[:known], s_in[:known] = (a[:known] for a in ahead)
        h_in[0], m_in[0], s_in[0] = start()
        if known < w and w > 1:
            # Past them, each leg at the last one's altitude, TAS and rates, its time from
            # its own wind.
            h_in[max(known, 1):] = h_in[max(known, 1) - 1]
            head, cross = fl.wind(_Legs(rows), h_in[:, None])
            gs = np.maximum(np.ravel(ground_speed(rate[0], head, cross)), GS_FLOOR)
            gs = np.where(np.isfinite(gs), gs, GS_FLOOR)
            for i in range(max(known, 1), w):
                t = distance[k + i - 1] / gs[i - 1]
                m_in[i] = max(m_in[i - 1] - rate[1] * t, zfm)
                s_in[i] = s_in[i - 1] - rate[2] * t
        mg, sg = grid.mass(m_in), grid.store(s_in)
        if fixed:
            cands = np.array([[x.altitude] for x in rows], dtype=float)
        else:
            cands, _, _ = _candidates(mission, first, h_in, lo, top)
        opts = leg_options(fl, mission, _Legs(rows), h_in[:, None], mg[:, None],
                           sg[:, None], v_climb[:, None], False, cands)
        o, new = _settle(opts, rows, mission, fixed, lo, top, why)
        # Where each leg ends from its guess (on the grid: no offset).
        h_end, m_end, s_end = o["H"], mg, sg
        for key in ("trans", "cruise", "final"):
            _, m_end, s_end = _after(o[key], m_end, s_end, grid, 0.0)
        j = 0
        while j < w:
            h, m, s = start()
            m, s = grid.mass(m), grid.store(s)
            if not (_bits(h_in[j]) == _bits(h) and _bits(mg[j]) == _bits(m)
                    and _bits(sg[j]) == _bits(s)):
                break
            yield rows[j], {key: _one(v, j) for key, v in o.items()}, new[j]
            j += 1
        k += j
        cr = o["cruise"]
        t = float(cr["time"][-1])
        rate = ((float(cr["tas"][-1]), float(o["trans"]["mass_end"][-1] - cr["mass_end"][-1])
                 / t, float(cr["used"][-1]) / t) if t > 0 else (float(cr["tas"][-1]), 0.0, 0.0))
        if j == w:
            ahead, seen = None, {}
            continue
        # From the first leg not exact (its start now known): each leg's end from its
        # guess, moved to first order by its start's change on the grid, then by the
        # start's offset from the grid, as the plan moves it. The slopes are the secants
        # through the leg's last two workings-out, or at first as if the store used went
        # as the mass (the end mass moving by end / start times the change).
        h, m, s = start()
        a_h, a_m, a_s = [h], [m], [s]
        for i in range(j, w - 1):
            used = sg[i] - s_end[i]
            slope_m, slope_u = (m_end[i] / mg[i] if m_end[i] > zfm else 0.0), used / mg[i]
            last = seen.get(k - j + i)
            if last is not None and last[0] != mg[i]:
                slope_m = (last[1] - m_end[i]) / (last[0] - mg[i])
                slope_u = (last[2] - used) / (last[0] - mg[i])
            seen[k - j + i] = (mg[i], m_end[i], used)
            m_on = float(grid.mass(a_m[-1]))
            dm = m_on - mg[i]
            a_h.append(h_end[i])
            a_m.append(float(grid.shifted(m_end[i] + dm * slope_m, a_m[-1] - m_on)))
            a_s.append(a_s[-1] - (used + dm * slope_u))
        ahead = (np.array(a_h), np.array(a_m), np.array(a_s))


def _after(seg, m, store, grid, shift):
    """Whether a picked segment is flown, and the mass [kg] and store after it.

    ``m`` and ``store`` are those before it; its end mass moves by ``shift``, its leg's
    start offset from the ``grid`` (:meth:`StartGrid.shifted`).
    """
    flown = seg["time"] > 0
    return (flown, np.where(flown, grid.shifted(seg["mass_end"], shift), m),
            np.where(flown, store - seg["used"], store))


def _one(v, j):
    """Row ``j`` of :func:`_take`'s arrays (nested dicts), as arrays of one element."""
    return {k: _one(x, j) for k, x in v.items()} if isinstance(v, dict) else v[j:j + 1]


def _segment(fl, leg, kind, seg, mode, H, h, arrival, store, m, isa_dev) -> Segment:
    """A flown segment of a leg (``seg``: the picked option's figures, scalars)."""
    h_start = H if kind in ("cruise", "hover", "loiter", "descent to arrival") else h
    h_end = arrival if kind == "descent to arrival" else H
    note = ""
    if kind == "climb" and not seg["ok"]:
        note = f"climb rate below {MIN_CLIMB_RATE / FT_PER_MIN:.0f} ft/min " \
               f"from {seg['fail_at']:.0f} m"
    elif kind == "loiter" and leg.bank > 0:
        note = f"orbit at {leg.bank:.0f} deg bank"
    elif kind == "hover" and seg["tas"] > 0:
        note = f"holding position in a {float(seg['tas']):.1f} m/s wind"
    elif kind in ("cruise", "loiter") and mode == "power":
        note = f"{float(seg['power']) * 100:.0f} % power set" + _chart_text(
            fl, float(seg["power"]), H, isa_dev)
    return Segment(leg.name, kind, h_start, h_end, float(seg["tas"]), float(seg["gs"]),
                   float(seg["heading"]), float(seg["time"]), float(seg["distance"]),
                   float(seg["used"]), store, m, float(seg["power"]), note,
                   pack_voltage=float(seg["pack_voltage"]),
                   pack_current=float(seg["pack_current"]))


def _verdict(fl, segments, reasons, failed_at, store, reserve) -> list:
    """A plan's segments with its store reasons added to ``reasons`` (in place)."""
    required = reserve.amount
    lowest = min(s.remaining for s in segments)
    if lowest < 0:
        k = next(i for i, s in enumerate(segments) if s.remaining < 0)
        first = segments[k]
        short = required - store
        reasons.append(f"{fl.prop.store_name} runs out on leg {first.leg!r} ({first.kind}): "
                       f"{_store_text(fl, short)} short of landing with the reserve")
        failed_at = k if failed_at is None else min(failed_at, k)
    elif store < required * (1 - 1e-12):
        reserve_text = reserve.describe(fl.prop, fl.prop.store.default_units)
        reasons.append(f"{fl.prop.store_name} below the reserve: {_store_text(fl, store)} at "
                       f"landing, {_store_text(fl, required)} required ({reserve_text})")
    if failed_at is not None:
        return _not_flown(segments, failed_at, reasons)
    return segments


#: NO-GO reasons that break a limit of the flight, not its physics.
_LIMIT_REASONS = ("altitude above a limit", "altitude below a limit",
                  "pack current above its maximum")


def _not_flown(segments, k, reasons):
    """Mark segment ``k`` (where the plan fails) and every one after it as not flown."""
    out = list(segments[:k])
    why = next((r for r in reasons if segments[k].leg in r), reasons[-1] if reasons else "")
    for i, seg in enumerate(segments[k:]):
        note = f"not flown: {why}" if i == 0 else "not flown"
        out.append(replace(seg, flown=False, note=note))
    return out


def _why_not(opts, leg, lo, top) -> str:
    parts = []
    if not np.any(opts["fits"]):
        parts.append("the leg is too short for the climb and descent")
    if not np.any(opts["trans"]["ok"]):
        parts.append("power insufficient to climb")
    if not np.any(opts["cruise"]["power_ok"]):
        parts.append("power insufficient to cruise")
    if not np.any(opts["speed_ok"]):
        parts.append("no speed within the stall margin and power")
    if not np.any(opts["cruise"]["wind_ok"]):
        parts.append("wind too strong")
    if not np.any(_pack_ok(opts)):
        parts.append("the battery pack's current or cut-off voltage")
    if lo > top:
        parts.append(f"the lowest safe altitude {lo:.0f} m is above the cap {top:.0f} m")
    return "; ".join(parts) or "no candidate satisfies every limit"


def _leg_reasons(o, leg, mission, lo, top, why) -> list:
    """NO-GO reasons for a leg flown at a fixed altitude (``o``: its option, scalars)."""
    out = []
    H = float(o["H"])
    if H > top + 1e-6:
        out.append(f"altitude above a limit: leg {leg.name!r} at {H:.0f} m is above {why} "
                   f"({top:.0f} m)")
    if H < lo - 1e-6:
        out.append(f"altitude below a limit: leg {leg.name!r} at {H:.0f} m is below the "
                   f"{mission.profile.min_clearance:.0f} m clearance over "
                   f"{ground_elevation(mission, leg):.0f} m "
                   f"ground")
    if not o["trans"]["ok"]:
        out.append(f"power insufficient: leg {leg.name!r} cannot climb to {H:.0f} m (climb "
                   f"rate gone at {o['trans']['fail_at']:.0f} m)")
    cr = o["cruise"]
    if o["mode"] == "power" and not o["speed_ok"]:
        pct = speed_mode(mission, leg)[1] * 100
        out.append(f"power setting: leg {leg.name!r} cannot hold level flight at {pct:.0f} % "
                   f"power at {H:.0f} m (beyond full throttle there, or below the least "
                   "power level flight needs)")
    elif not cr["power_ok"] or not o["speed_ok"]:
        out.append(f"power insufficient: leg {leg.name!r} cruise at {cr['tas']:.1f} m/s "
                   f"TAS needs more than full-throttle power at {H:.0f} m")
    if not cr["stall_ok"]:
        out.append(f"stall margin violated: leg {leg.name!r} at {cr['tas']:.1f} m/s TAS is "
                   f"below {mission.stall_margin:g} x stall speed")
    if not cr["wind_ok"]:
        out.append(f"wind: leg {leg.name!r} cannot make good its course at {H:.0f} m")
    if not o["fits"]:
        out.append(f"leg {leg.name!r} is too short to climb to and descend from {H:.0f} m")
    return out


def mission_reserve(fl: Flight, mission: Mission, mass, leg_altitudes,
                    cruise_power=None, power_source="plan") -> ReserveAmount:
    """The mission's reserve at landing mass ``mass`` (arrays over samples allowed).

    A time reserve is flown at the last cruise altitude unless the policy names one; an
    alternate leg is flown at best range with this flight model and added.

    Parameters
    ----------
    fl : Flight
        The flight model of the day.
    mission : Mission
        The mission (its reserve policy).
    mass : float or numpy.ndarray
        Mass at landing [kg].
    leg_altitudes : sequence of float
        Cruise altitudes flown [m].
    cruise_power : float, optional
        The plan's cruise power [-], a fraction of rated power: a time reserve is flown at
        it unless the policy names a power.
    power_source : {"plan", "mission"}
        Whether that power is the plan's own or the mission file's setting.

    Returns
    -------
    ReserveAmount
        See :func:`cruiseplan.planning.reserve.reserve_required`.
    """
    last = leg_altitudes[-1] if leg_altitudes else mission.profile.arrival_elevation
    alternate_used = _alternate_used(fl, mission, np.atleast_1d(np.asarray(mass, float)),
                                     np.array([last], dtype=float))
    if not np.ndim(mass):
        alternate_used = float(np.ravel(alternate_used)[0])
    return reserve_required(fl.af, mission.reserve, mass=mass, cruise_power=cruise_power,
                            power_source=power_source, alternate_used=alternate_used)


def _alternate_used(fl: Flight, mission: Mission, m, last):
    """Store [kg or J] the reserve's alternate leg uses (0 without one), at best range.

    ``m`` is the landing mass [kg] and ``last`` the last cruise altitude [m] (where a policy
    names none), arrays broadcasting against the flight model's (missions or samples).
    """
    alt = mission.reserve.alternate
    if alt is None:
        return 0.0
    h = np.asarray(alt.altitude if alt.altitude is not None else last, dtype=float)
    h = np.broadcast_to(h, np.shape(last))
    v0, _, mode, target = _start_speed(fl, mission, alt, h, m, fl.prop.store_capacity)
    cr = _cruise(fl, alt, h, m, np.array([alt.distance]), v0, m, None, mode, target)
    return cr["used"]


def cruise_power(segments) -> float | None:
    """The plan's cruise power: time-weighted shaft power of its cruise segments [-].

    Parameters
    ----------
    segments : sequence of Segment
        The plan's segments.

    Returns
    -------
    float or None
        Fraction of rated power; None when nothing was flown level.
    """
    level = [s for s in segments if s.kind == "cruise" and s.time > 0 and s.flown]
    if not level:
        return None
    return float(sum(s.power_fraction * s.time for s in level) / sum(s.time for s in level))
