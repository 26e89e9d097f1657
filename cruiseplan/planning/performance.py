r"""Level-flight cruise performance over altitude x airspeed grids.

At each point, lift equals weight and thrust equals drag:

.. math::

    C_L = \frac{2 m g}{\rho V^2 S},\quad D = \tfrac12\rho V^2 S C_D(C_L),\quad
    P_{shaft} = \frac{D V}{\eta_p(V)},\quad \dot s = \text{flow}(P_{shaft})

with :math:`\dot s` the fuel mass flow [kg/s] or battery power [W]. Specific range is
distance per unit of store, :math:`V/\dot s` (air) or :math:`V_g/\dot s` (ground), and
endurance the store on board over its flow (Peukert's law for batteries).

Every point carries a bit set of :class:`Limit` reasons. A point beyond a margin or a
model's range (the stall margin, Mach, polar, lapse, rotor or Reynolds range) keeps its
computed values. A point that cannot be flown at all (:data:`~cruiseplan.limits.UNFLYABLE`:
beyond CLmax, short of power, no headway or course, no level-flight solution) keeps what it
*would* take (drag, power, CL, which say why) but has no range, endurance, specific range
or flows (NaN, with the reason bit). Outside the atmosphere model every value is NaN, with
the reason.

References
----------
.. [1] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, ch. 5
   (steady level flight, power required and available, range and endurance).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from cruiseplan._numerics import all_true, any_true, brent_minimise, illinois_root, set_flag
from cruiseplan.constants import DEFAULT_STALL_MARGIN, MACH_LIMIT
from cruiseplan.errors import CruiseplanError
from cruiseplan.limits import LIMIT_DTYPE, UNFLYABLE, Limit, explain
from cruiseplan.physics import airspeed as _airspeed
from cruiseplan.physics.airspeed import ground_speed
from cruiseplan.physics.atmosphere import (
    ALTITUDE_MAX,
    ALTITUDE_MIN,
    AirState,
    air_state,
    check_altitude,
)
from cruiseplan.ranges import check_range
from cruiseplan.units import fraction, quantity_of, temperature_difference, to_si, to_store

#: Fields of :class:`CruisePoints` that are NaN where a point is beyond an
#: :data:`~cruiseplan.limits.UNFLYABLE` limit: what the store would give there.
UNFLYABLE_FIELDS = ("store_rate", "fuel_volume_flow", "source_power", "specific_range_air",
                    "specific_range_ground", "endurance", "range_air", "range_ground")


class _Derived:
    """A :class:`CruisePoints` field derived from the core arrays on first read, then kept.

    A non-data descriptor: once the value sits in the instance's ``__dict__`` it is read
    from there without calling this again.
    """

    def __init__(self, derive):
        self.derive = derive
        self.__doc__ = derive.__doc__

    def __set_name__(self, owner, name):
        self.name = name

    def __get__(self, points, owner=None):
        if points is None:
            return self
        value = points._finish(self.name, self.derive(points))
        points.__dict__[self.name] = value
        return value


@dataclass(frozen=True)
class _Sources:
    """What the derived fields of a :class:`CruisePoints` are computed from (SI)."""

    airframe: object
    flight: object          # LevelFlight at the points (before the atmosphere mask)
    available: object       # full-throttle shaft power [W], broadcastable
    gs: object              # ground speed [m/s], broadcastable
    store: object           # store on board as given [kg or J]
    rate: object            # store rate [kg/s or W], unflyable points not yet hidden
    bad: object = None      # True where the air is outside the model, or None
    hide: bool = False      # the store's figures NaN where an UNFLYABLE bit is set


@dataclass(frozen=True, init=False)
class CruisePoints:
    """Cruise performance at broadcast (altitude, TAS) points; SI arrays.

    Which figures a limited point keeps, by :class:`~cruiseplan.limits.Limit` bit:

    * ``BEYOND_CLMAX`` (CL above CLmax, TAS below the stall speed; always with ``STALL``),
      ``POWER`` (shaft power required above power available), ``WIND`` (ground speed not
      positive, or a crosswind the TAS cannot hold the course against) and
      ``NO_SOLUTION`` (no level flight at a power setting), and for a pack given as a
      circuit ``PACK_POWER``, ``CURRENT`` and ``CUTOFF`` (beyond its maximum power, its
      maximum continuous current or its cut-off voltage under load, with the store on
      board): NaN for :attr:`store_rate`,
      :attr:`fuel_volume_flow`, :attr:`source_power`, :attr:`specific_range_air`,
      :attr:`specific_range_ground`, :attr:`endurance`, :attr:`range_air` and
      :attr:`range_ground`. The drag, powers, CL, CD and L/D, ground speed and stall speed
      ratio stay: they are what the point would take and show why it cannot be flown.
      (:func:`power_setting_points` has no speed for ``POWER`` or ``NO_SOLUTION`` points,
      so every value but the limits is NaN there.)
    * ``STALL`` alone (between the stall speed and the stall margin), ``MACH``,
      ``POLAR_RANGE``, ``LAPSE_RANGE``, ``ROTOR_RANGE``, ``REYNOLDS_RANGE``: every value
      is kept (flyable, but outside a margin or a model's trusted range).
    * ``ATMOSPHERE``: every value is NaN.

    So a NaN figure always comes with its reason bit; :func:`cruise_points` with
    ``keep_unflyable=True`` keeps the figures for searches that compare them.

    A hovering kind (:attr:`Airframe.hovers`) may have TAS 0: ground speed 0 in calm air
    is then no ``WIND`` limit, the specific range and range are 0 and the endurance is the
    hover endurance.

    Attributes
    ----------
    air : AirState
        Air at each point's altitude (broadcastable).
    tas : numpy.ndarray
        True airspeed [m/s].
    mass : float
        Aircraft mass [kg].
    store : float
        Fuel [kg] or usable energy [J] on board.
    store_name : str
        ``"fuel"`` or ``"energy"``.
    cl, cd, lift_to_drag : numpy.ndarray or None
        Lift and drag coefficients and their ratio [-]; None for a kind without a wing.
    drag : numpy.ndarray
        Drag = thrust required [N].
    thrust_power : numpy.ndarray
        Drag x TAS [W].
    shaft_power : numpy.ndarray
        Shaft power required [W].
    source_power : numpy.ndarray
        Fuel heat release or battery power [W].
    power_available : numpy.ndarray
        Full-throttle shaft power [W].
    power_margin : numpy.ndarray
        Shaft power available minus required [W].
    store_rate : numpy.ndarray
        Rate the store is used: fuel mass flow [kg/s], or usable energy per second [W]
        (the battery power, raised by Peukert's law at high currents). Specific range is
        TAS over it and endurance the store over it, so specific range x store = range.
    fuel_volume_flow : numpy.ndarray or None
        Fuel volume flow [m^3/s] (piston only).
    ground_speed : numpy.ndarray
        Ground speed [m/s].
    specific_range_air, specific_range_ground : numpy.ndarray
        Distance per unit of store [m/kg or m/J].
    endurance : numpy.ndarray
        Time to empty the store at this point [s].
    range_air, range_ground : numpy.ndarray
        Distance flown in that time [m].
    stall_speed_ratio : numpy.ndarray
        TAS over the stall speed at this altitude and mass [-].
    limits : numpy.ndarray
        :class:`Limit` bit set per point (0: flyable).
    rated_power : float
        Rated shaft power [W], for power settings.
    """

    air: AirState
    tas: np.ndarray
    mass: float
    store: float
    store_name: str
    cl: np.ndarray | None
    cd: np.ndarray | None
    lift_to_drag: np.ndarray | None = _Derived(
        lambda p: None if p.cl is None else p.cl / p.cd)
    drag: np.ndarray
    thrust_power: np.ndarray = _Derived(lambda p: p.drag * p.tas)
    shaft_power: np.ndarray
    source_power: np.ndarray = _Derived(
        lambda p: p._sources.airframe.propulsion.source_power(p.shaft_power))
    power_available: np.ndarray = _Derived(
        lambda p: np.broadcast_to(p._sources.available, p.shape))
    power_margin: np.ndarray = _Derived(lambda p: p._sources.available - p.shaft_power)
    store_rate: np.ndarray = _Derived(lambda p: p._sources.rate)
    fuel_volume_flow: np.ndarray | None = _Derived(
        lambda p: (p.store_rate / p._sources.airframe.propulsion.fuel_density
                   if p._sources.airframe.propulsion.store.burns_mass else None))
    ground_speed: np.ndarray = _Derived(lambda p: np.broadcast_to(p._sources.gs, p.shape))
    specific_range_air: np.ndarray = _Derived(lambda p: p.tas / p.store_rate)
    specific_range_ground: np.ndarray = _Derived(lambda p: p._sources.gs / p.store_rate)
    endurance: np.ndarray = _Derived(lambda p: p._sources.store / p.store_rate)
    range_air: np.ndarray = _Derived(lambda p: p.tas * p.endurance)
    range_ground: np.ndarray = _Derived(lambda p: p._sources.gs * p.endurance)
    stall_speed_ratio: np.ndarray = _Derived(
        lambda p: p._sources.airframe.stall_speed_ratio(p._sources.flight))
    limits: np.ndarray
    rated_power: float

    # The core arrays (CL, CD, drag, shaft power, store rate, limits) are computed by
    # cruise_points; the rest (the fields given a _Derived above, and the store rate's
    # NaN at unflyable points) on first read, so a large grid holds only what is read.
    # dataclasses.replace reads every field, so a replaced copy carries plain values.
    def __init__(self, _sources=None, **values):
        fields = self.__dataclass_fields__
        needed = _CORE_FIELDS if _sources is not None else fields.keys()
        if not (values.keys() <= fields.keys() and needed <= values.keys()):
            raise TypeError(f"CruisePoints got the fields {sorted(values)}; it takes "
                            f"{list(fields)}, with at least {sorted(needed)}")
        self.__dict__.update(values)
        self.__dict__["_sources"] = _sources

    def _finish(self, name, value):
        """A derived value, NaN where the air is out of the model or the point unflyable.

        Only the store's figures (:data:`UNFLYABLE_FIELDS`) are hidden at unflyable points.
        """
        src = self._sources
        if value is None:
            return None
        if src.bad is not None:
            value = np.where(src.bad, np.nan, value)
        if src.hide and name in UNFLYABLE_FIELDS:
            unflyable = self.__dict__.get("_unflyable")
            if unflyable is None:
                unflyable = (self.limits & LIMIT_DTYPE(UNFLYABLE)) != 0
                if not unflyable.any():
                    unflyable = False
                self.__dict__["_unflyable"] = unflyable
            if unflyable is not False:
                value = np.where(unflyable, np.nan, value)
        return value

    @property
    def feasible(self) -> np.ndarray:
        """True where no limit is breached."""
        return self.limits == 0

    @property
    def power_fraction(self) -> np.ndarray:
        """Shaft power required over rated power [-]."""
        return self.shaft_power / self.rated_power

    @property
    def shape(self) -> tuple:
        """Broadcast shape of the points."""
        return self.shaft_power.shape

    def cas(self) -> np.ndarray:
        """Calibrated airspeed [m/s]."""
        return _airspeed.cas_from_tas(self.tas, self.air.pressure, self.air.speed_of_sound)

    def mach(self) -> np.ndarray:
        """Mach number [-]."""
        return _airspeed.mach_from_tas(self.tas, self.air.speed_of_sound)

    @property
    def reasons(self) -> np.ndarray:
        """Reason text per point, an object array of the points' shape."""
        flat = self.limits.ravel()
        codes, inverse = np.unique(flat, return_inverse=True)
        texts = np.array([explain(c) for c in codes], dtype=object)
        return texts[inverse].reshape(self.limits.shape)

    def to_xarray(self):
        """The points as an xarray Dataset (needs the ``frames`` extra).

        Returns
        -------
        xarray.Dataset
            Dims ``altitude`` x ``airspeed`` for a grid (pressure altitude [m], TAS [m/s]);
            every field in SI with ``units`` and ``long_name``; ``limits`` a CF flag
            variable. See :func:`cruiseplan.frames.points_to_xarray`.
        """
        from cruiseplan.frames import points_to_xarray

        return points_to_xarray(self)

    def to_dataframe(self):
        """The points as a pandas DataFrame, one row per point (needs the ``frames`` extra).

        Returns
        -------
        pandas.DataFrame
            ``altitude`` [m], ``airspeed`` [m/s], the fields in SI, ``limits`` and
            ``status``; units in ``df.attrs["units"]``.
        """
        from cruiseplan.frames import points_to_dataframe

        return points_to_dataframe(self)

    def quantity(self, name: str):
        """A field as a pint Quantity in SI units (see :data:`CRUISE_POINTS_UNITS`).

        Parameters
        ----------
        name : str
            A key of :data:`CRUISE_POINTS_UNITS`, e.g. ``"drag"`` or ``"endurance"``.

        Returns
        -------
        pint.Quantity
            The field's values [its SI unit; kg of fuel or J of energy for the store].

        Raises
        ------
        CruiseplanError
            For a name without a unit, listing the known ones.
        """
        return quantity_of(self, name, CRUISE_POINTS_UNITS,
                           store_unit="kg" if self.store_name == "fuel" else "J")


#: SI unit of each :class:`CruisePoints` field :meth:`CruisePoints.quantity` hands back
#: (``"store"``: kg of fuel or J of usable energy; ``""``: dimensionless).
CRUISE_POINTS_UNITS = {
    "tas": "m/s", "mass": "kg", "store": "store", "cl": "", "cd": "", "lift_to_drag": "",
    "drag": "N", "thrust_power": "W", "shaft_power": "W", "source_power": "W",
    "power_available": "W", "power_margin": "W", "store_rate": "store/s",
    "fuel_volume_flow": "m^3/s", "ground_speed": "m/s", "specific_range_air": "m/store",
    "specific_range_ground": "m/store", "endurance": "s", "range_air": "m",
    "range_ground": "m", "stall_speed_ratio": "", "rated_power": "W",
    "power_fraction": "", "cas": "m/s", "mach": "",
}


def shaft_power_required(airframe, mass, air, tas):
    """Shaft power to hold level flight [W].

    Parameters
    ----------
    airframe : AirframeKind
        The airframe.
    mass : array_like
        Mass [kg].
    air : AirState
        Air, broadcastable against ``tas``.
    tas : array_like
        True airspeed [m/s].

    Returns
    -------
    numpy.ndarray
        Shaft power required [W].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, ch. 5 (power required in steady
       level flight).
    """
    return airframe.level_flight(mass, air, tas).shaft


def cruise_points(airframe, mass, air: AirState, tas, store, *, headwind=0.0,
                  ground_speed=None, stall_margin=DEFAULT_STALL_MARGIN,
                  valid_air=None, keep_unflyable=False) -> CruisePoints:
    """Cruise performance at points (SI core; no units, no validation of inputs).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float
        Aircraft mass [kg].
    air : AirState
        Air state, broadcastable against ``tas`` (e.g. a column against a row).
    tas : array_like
        True airspeed [m/s].
    store : float
        Fuel [kg] or usable energy [J] on board.
    headwind : array_like, optional
        Headwind component [m/s] (negative: tailwind), broadcastable; ignored when
        ``ground_speed`` is given.
    ground_speed : array_like, optional
        Ground speed [m/s] from a full wind triangle.
    stall_margin : float, optional
        Minimum ratio of TAS to stall speed [-]; CL may reach CLmax / margin^2.
    valid_air : array_like of bool, optional
        False where the altitude lay outside the atmosphere model (values become NaN)
        [-].
    keep_unflyable : bool, optional
        Keep the range, endurance, specific range and flows of points beyond an
        :data:`~cruiseplan.limits.UNFLYABLE` limit (for searches that compare them, as
        the optimiser's unconstrained optimum); the limit bits are the same. By default
        they are NaN (see :class:`CruisePoints`).

    Returns
    -------
    CruisePoints
        All outputs with their limit reasons.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.3-5.5 and 5.13.
    """
    prop = airframe.propulsion
    tas = np.asarray(tas, dtype=float)
    flight = airframe.level_flight(mass, air, tas)
    cl, cd, drag, shaft = flight.cl, flight.cd, flight.drag, flight.shaft
    sigma = air.sigma
    available = prop.shaft_power_available(sigma)
    # One store rate for every output: endurance and specific range both divide by it.
    # A pack given as a circuit: the mean rate of a discharge of this store to the loaded
    # cut-off (physics.battery), so that store / rate is that discharge's time.
    rate = prop.store_rate(shaft, store=store)
    gs = tas - headwind if ground_speed is None else np.asarray(ground_speed, dtype=float)
    shape = np.shape(shaft)

    # The kind's own bits (stall margin, beyond CLmax, model ranges), then the shared ones.
    # Each condition is ORed in place (set_flag): no array of bits per condition (a grid of
    # a million points stays within a few bytes per point).
    limits = airframe.model_limits(flight, tas, stall_margin, air)
    if (not isinstance(limits, np.ndarray) or limits.shape != shape
            or limits.dtype != LIMIT_DTYPE or not limits.flags.writeable):
        limits = np.array(np.broadcast_to(limits, shape), dtype=LIMIT_DTYPE)
    set_flag(limits, np.greater(shaft, available), _BIT[Limit.POWER])
    mach = MACH_LIMIT * air.speed_of_sound
    # On a grid, checked on the (small) inputs first: no point can be past Mach when the
    # fastest TAS is below the least limit (NaN sets no flag either way). Speeds of the
    # points' own shape are compared at once.
    if tas.shape == shape or not np.fmax.reduce(tas, axis=None, initial=-np.inf) <= \
            np.fmin.reduce(mach, axis=None, initial=np.inf):
        set_flag(limits, np.greater(tas, mach), _BIT[Limit.MACH])
    set_flag(limits, prop.lapse_outside(sigma), _BIT[Limit.LAPSE_RANGE])
    # A hover (TAS 0, ground speed 0: calm air) holds its position, so no WIND limit.
    headway = gs > 0
    if not all_true(headway):
        set_flag(limits, ~headway & ~((tas == 0) & (gs == 0)), _BIT[Limit.WIND])
    # Battery pack: its maximum power, maximum continuous current and cut-off voltage
    # under load, with this store on board (none without a circuit).
    pack = prop.pack_limits(shaft, store)
    if any_true(pack):
        limits |= pack

    bad = None
    if valid_air is not None and not np.asarray(valid_air).all():
        bad = np.broadcast_to(~np.asarray(valid_air, dtype=bool), shape)
        cl, cd, drag, shaft, rate = (None if v is None else np.where(bad, np.nan, v)
                                     for v in (cl, cd, drag, shaft, rate))
        limits = np.where(bad, LIMIT_DTYPE(Limit.ATMOSPHERE), limits).astype(LIMIT_DTYPE)
    return CruisePoints(air=air, tas=tas,
                        mass=mass if type(mass) is float or np.ndim(mass) else float(mass),
                        store=store if type(store) is float or np.ndim(store)
                        else float(store),
                        store_name=prop.store_name, cl=cl, cd=cd, drag=drag,
                        shaft_power=shaft, limits=limits,
                        rated_power=float(prop.rated_power),
                        _sources=_Sources(airframe, flight, available, gs, store, rate, bad,
                                          not keep_unflyable))


#: The fields cruise_points computes; the others are derived from them when read.
_CORE_FIELDS = frozenset(n for n, f in CruisePoints.__dataclass_fields__.items()
                         if not isinstance(f.default, _Derived))

#: Each Limit as a LIMIT_DTYPE scalar.
_BIT = {flag: LIMIT_DTYPE(flag) for flag in Limit}


def _hide_unflyable(points: CruisePoints) -> CruisePoints:
    """The points with NaN in :data:`UNFLYABLE_FIELDS` where an UNFLYABLE bit is set."""
    unflyable = (points.limits & LIMIT_DTYPE(UNFLYABLE)) != 0
    if not np.any(unflyable):
        return points
    return replace(points, **{k: np.where(unflyable, np.nan, getattr(points, k))
                              for k in UNFLYABLE_FIELDS if getattr(points, k) is not None})


def _air_column(altitudes, isa_dev):
    """Air state as a column over an altitude vector, clipping out-of-model altitudes."""
    h = np.atleast_1d(np.asarray(altitudes, dtype=float))
    if h.ndim != 1:
        raise CruiseplanError("altitudes must be one-dimensional")
    valid = (h >= ALTITUDE_MIN) & (h <= ALTITUDE_MAX)
    clipped = np.minimum(np.maximum(h, ALTITUDE_MIN), ALTITUDE_MAX)  # np.clip, by ufuncs
    if np.ndim(isa_dev) == 0:
        air = air_state(clipped[:, None], isa_dev)  # a column from the start
    else:
        air = air_state(clipped, isa_dev).column()
    valid = valid[:, None]
    if not valid.all():
        # Rows outside the model keep the altitude asked for, and no air values.
        air = AirState(h[:, None], *(np.where(valid, getattr(air, f), np.nan) for f in
                                     ("isa_dev", "temperature", "pressure", "density",
                                      "speed_of_sound", "viscosity")))
    return air, valid


def _grid_inputs(airframe, altitudes, mass, fuel, payload, isa_dev, headwind):
    """Public-API inputs of a grid in SI: loading, air column, valid rows, headwind column."""
    h = np.atleast_1d(to_si(altitudes, "m", what="altitudes"))
    loading = resolve_loading(airframe, mass, fuel, payload)
    air, valid = _air_column(h, check_range(temperature_difference(isa_dev), "isa_dev",
                                            "isa_dev"))
    wind = _column(check_range(to_si(headwind, "m/s", what="headwind"), "headwind",
                               "headwind"), h.size, "headwind")
    return loading, air, valid, wind


def _column(value, n, what):
    arr = np.asarray(value, dtype=float)
    if arr.ndim == 0:
        return arr
    if arr.shape != (n,):
        raise CruiseplanError(f"{what} must be a scalar or one value per altitude ({n})")
    return arr[:, None]


def cruise_grid(airframe, altitudes, tas, *, mass=None, fuel=None, payload=None,
                isa_dev=0.0, headwind=0.0, wind=None, course=None,
                stall_margin=DEFAULT_STALL_MARGIN) -> CruisePoints:
    """Cruise table over an altitude x TAS grid (public API; Quantities or SI floats).

    Parameters
    ----------
    airframe : Airframe
        The airframe (see :func:`cruiseplan.load_airframe`).
    altitudes : array_like or pint.Quantity
        Pressure altitudes [m], one-dimensional (rows of the grid).
    tas : array_like or pint.Quantity
        True airspeeds [m/s], one-dimensional (columns of the grid); positive, or 0 (the
        hover) and above for a kind that hovers.
    mass : float or pint.Quantity, optional
        Aircraft mass [kg]; from the loading when not given.
    fuel : float or pint.Quantity, optional
        Fuel on board [kg] or usable energy [J]; full when neither is given.
    payload : float or pint.Quantity, optional
        Crew and payload [kg].
    isa_dev : float or pint.Quantity, optional
        ISA temperature deviation [K].
    headwind : float or array_like or pint.Quantity, optional
        Headwind component [m/s], scalar or one per altitude (negative: tailwind).
    wind : WindProfile, optional
        Winds aloft, instead of ``headwind``: the ground speed then comes from the full
        wind triangle at each altitude. Needs ``course``.
    course : float, optional
        True course [deg] for ``wind``.
    stall_margin : float, optional
        Minimum TAS over stall speed [-] (1.3 by default, common practice).

    Returns
    -------
    CruisePoints
        Arrays of shape (len(altitudes), len(tas)).

    Raises
    ------
    CruiseplanError
        For speeds that are not positive (negative for a kind that hovers), a wind
        profile without a course, or both a profile and a headwind.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, ch. 5.
    """
    v = np.atleast_1d(to_si(tas, "m/s", what="tas"))
    if airframe.hovers:
        if v.ndim != 1 or (v < 0).any():
            raise CruiseplanError(f"tas must be a one-dimensional array of speeds of 0 (the "
                                  f"hover) or more for the {airframe.kind} {airframe.name}")
    elif v.ndim != 1 or (v <= 0).any():
        raise CruiseplanError("tas must be a one-dimensional array of positive speeds")
    if wind is not None and np.any(np.asarray(headwind) != 0):
        raise CruiseplanError("give either a wind profile (with a course) or a headwind")
    if (wind is None) != (course is None):
        raise CruiseplanError("a wind profile and a course go together")
    check_range(stall_margin, "stall_margin", "stall_margin")
    if course is not None:
        course = check_range(to_si(course, "deg", what="course"), "course", "course")
    loading, air, valid, head = _grid_inputs(airframe, altitudes, mass, fuel, payload,
                                             isa_dev, headwind)
    gs = None
    if wind is not None:
        hw, cw = wind.components(float(course), air.pressure_altitude[:, 0])
        gs = ground_speed(v[None, :], hw[:, None], cw[:, None])
    return cruise_points(airframe, loading.mass, air, v[None, :], loading.store,
                         headwind=head, ground_speed=gs, stall_margin=stall_margin,
                         valid_air=valid)


def resolve_loading(airframe, mass=None, fuel=None, payload=None):
    """Mass and fuel or energy on board from Quantities or SI floats (public API).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float or pint.Quantity, optional
        Aircraft mass [kg].
    fuel : float or pint.Quantity, optional
        Fuel [kg] or usable energy [J] on board; full when neither is given. A Quantity
        may be a volume of fuel (through the fuel density), a mass of fuel or an energy.
    payload : float or pint.Quantity, optional
        Crew and payload [kg].

    Returns
    -------
    Loading
        See :meth:`cruiseplan.Airframe.loading`.
    """
    return airframe.loading(
        mass=None if mass is None else to_si(mass, "kg", what="mass"),
        store=None if fuel is None else to_store(fuel, airframe.propulsion, what="fuel"),
        payload=None if payload is None else to_si(payload, "kg", what="payload"))


def speed_for_min_drag(airframe, mass, air: AirState):
    """TAS of minimum drag, i.e. of (L/D)max at this weight [m/s] (vectorised search).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float
        Mass [kg].
    air : AirState
        Air states (any shape).

    Returns
    -------
    numpy.ndarray
        Speed of maximum lift-to-drag ratio [m/s], searched between 0.5 x stall speed and
        the Mach model limit.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.4 (minimum drag and
       (L/D)max).
    """
    v_stall = airframe.stall_speed(mass, air.density)

    def drag(v):
        return airframe.level_flight(mass, air, v).drag

    return brent_minimise(drag, 0.5 * v_stall, MACH_LIMIT * air.speed_of_sound)


def speed_for_min_power(airframe, mass, air: AirState, *, v_hi=None):
    """TAS of minimum shaft power at each air state [m/s] (vectorised search).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float
        Mass [kg].
    air : AirState
        Air states (any shape).
    v_hi : array_like, optional
        Upper end of the search [m/s]; 0.6 x speed of sound by default.

    Returns
    -------
    numpy.ndarray
        V for minimum shaft power [m/s], searched between 0.5 x stall speed and ``v_hi``.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.4 (minimum power required).
    """
    v_stall = airframe.stall_speed(mass, air.density)
    v_hi = MACH_LIMIT * air.speed_of_sound if v_hi is None else v_hi
    return brent_minimise(lambda v: shaft_power_required(airframe, mass, air, v),
                          0.5 * v_stall, v_hi)


def power_setting_points(airframe, mass, air: AirState, power_fraction, store, *,
                         stall_margin=DEFAULT_STALL_MARGIN, headwind=0.0) -> CruisePoints:
    """Cruise at set fractions of rated power, on the high-speed branch (SI core).

    At each air state, finds the TAS above the minimum-power speed at which shaft power
    required equals ``power_fraction`` x rated power. Where full throttle cannot give that
    power at the altitude, the point is flagged ``POWER``; where the setting is below the
    minimum power to hold level flight, ``NO_SOLUTION``; such points have NaN speeds and
    figures. A setting within 1e-12 of full throttle counts as available (a 100 % setting
    is not flagged ``POWER`` by the root's last digits).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float
        Mass [kg].
    air : AirState
        Air states, broadcastable against ``power_fraction`` (column against row).
    power_fraction : array_like
        Shaft power over rated power [-].
    store : float
        Fuel [kg] or energy [J] on board.
    stall_margin : float, optional
        Minimum TAS over stall speed [-].
    headwind : array_like, optional
        Headwind [m/s].

    Returns
    -------
    CruisePoints
        Points of the broadcast shape.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.5 (power required and
       available; maximum velocity at a power setting).
    """
    prop = airframe.propulsion
    frac = np.asarray(power_fraction, dtype=float)
    target = frac * prop.rated_power
    available = prop.shaft_power_available(air.sigma)
    v_mp = speed_for_min_power(airframe, mass, air)
    v_hi = MACH_LIMIT * air.speed_of_sound
    p_min = shaft_power_required(airframe, mass, air, v_mp)
    p_hi = shaft_power_required(airframe, mass, air, v_hi)
    shape = np.broadcast_shapes(np.shape(target), np.shape(v_mp))
    v = illinois_root(lambda x: shaft_power_required(airframe, mass, air, x) - target,
                          np.broadcast_to(v_mp, shape), np.broadcast_to(v_hi, shape))
    too_much = target > available * (1 + 1e-12)
    too_little = target < p_min
    beyond = target > p_hi
    unsolved = too_much | too_little | beyond
    pts = cruise_points(airframe, mass, air, np.where(unsolved, np.nan, v), store,
                        headwind=headwind, stall_margin=stall_margin, keep_unflyable=True)
    extra = (np.broadcast_to(too_much, shape).astype(LIMIT_DTYPE) * LIMIT_DTYPE(Limit.POWER)
             | np.broadcast_to(too_little | beyond, shape).astype(LIMIT_DTYPE)
             * LIMIT_DTYPE(Limit.NO_SOLUTION))
    # NaN comparisons set no flags, so unsolved points carry only the reasons found here.
    # Whether a setting has the power is decided above (within 1e-12 of full throttle):
    # the root's last digits must not flag a 100 % setting POWER.
    solved = pts.limits & LIMIT_DTYPE(~int(Limit.POWER) & 0xFFFFFFFF)
    limits = np.where(np.broadcast_to(unsolved, shape), extra, solved | extra)
    return _hide_unflyable(_replace(pts, limits=limits.astype(LIMIT_DTYPE)))


def _replace(points: CruisePoints, **changes) -> CruisePoints:

    return replace(points, **changes)


def power_setting_table(airframe, altitudes, power_settings, *, mass=None, fuel=None,
                        payload=None, isa_dev=0.0, headwind=0.0,
                        stall_margin=DEFAULT_STALL_MARGIN) -> CruisePoints:
    """Cruise table by power setting: TAS and flows at % of rated power (public API).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    altitudes : array_like or pint.Quantity
        Pressure altitudes [m], one-dimensional.
    power_settings : array_like or pint.Quantity
        Fractions of rated power [-] (0.75 for 75 %), or a dimensionless Quantity
        (``[65, 75] * u.percent``), one-dimensional.
    mass : float or pint.Quantity, optional
        Aircraft mass [kg]; from the loading when not given.
    fuel : float or pint.Quantity, optional
        Fuel on board [kg] or usable energy [J]; full when neither is given.
    payload : float or pint.Quantity, optional
        Crew and payload [kg].
    isa_dev : float or pint.Quantity, optional
        ISA temperature deviation [K].
    headwind : float or array_like or pint.Quantity, optional
        Headwind component [m/s], scalar or one per altitude (negative: tailwind).
    stall_margin : float, optional
        Minimum TAS over stall speed [-] (1.3 by default, common practice).

    Returns
    -------
    CruisePoints
        Arrays of shape (len(altitudes), len(power_settings)).

    Raises
    ------
    CruiseplanError
        For power settings outside (0, 1] or not one-dimensional, or altitudes outside
        the atmosphere model.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.5.
    """
    frac = np.atleast_1d(np.asarray(fraction(power_settings, what="power_settings"),
                                    dtype=float))
    if frac.ndim != 1 or np.any(frac <= 0) or np.any(frac > 1.0 + 1e-9):
        raise CruiseplanError("power settings must be fractions of rated power in (0, 1]")
    # The speed searches need real air: altitudes outside the model are an error here.
    check_altitude(np.atleast_1d(to_si(altitudes, "m", what="altitudes")))
    check_range(stall_margin, "stall_margin", "stall_margin")
    loading, air, _, wind = _grid_inputs(airframe, altitudes, mass, fuel, payload, isa_dev,
                                         headwind)
    return power_setting_points(airframe, loading.mass, air, frac[None, :], loading.store,
                                stall_margin=stall_margin, headwind=wind)
