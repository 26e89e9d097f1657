r"""Best cruise: speeds for range, endurance and economy; best altitude; ceilings.

At each altitude (all altitudes at once, vectorised):

* **best range** maximises the distance flown on the store, ground speed x endurance
  (air distance in calm air). For a propeller aircraft with constant efficiency and BSFC
  this is the speed of :math:`(L/D)_{max}`; with a headwind it is faster, with a tailwind
  slower; Peukert's law moves it slower.
* **best endurance** minimises shaft power: the speed of :math:`(C_L^{3/2}/C_D)_{max}`.
* **economy** is the faster speed that keeps 99 % of the best specific range (common
  practice): a few percent of range buys noticeably more speed.

Closed forms are used where the model allows them (symmetric parabolic polar, constant
propeller efficiency, calm air, no Peukert effect); otherwise vectorised searches
(Brent's method, successive grids and Illinois root finding run on all altitudes at once),
never a per-altitude scalar optimiser.

Constraints, each reported when it binds:

* stall margin: :math:`V \ge m V_s` (:math:`m` = 1.3 by default, common practice), i.e.
  :math:`C_L \le C_{L,max}/m^2`;
* power: shaft power required within full-throttle power at the altitude (power lapse);
* climb reserve: at the cruise speed the excess power must still give a climb rate of at
  least the reserve, :math:`\eta_p (P_{av} - P_{req}) / W \ge \dot h_{min}`;
* the altitude band (floor, ceiling) and, for drones, the maximum height above ground.

Altitudes are pressure altitudes. A height-above-ground cap is converted as
``elevation + max_agl`` on the same scale (pressure altitude taken as altitude above mean
sea level, i.e. standard sea-level pressure); on a low-pressure day check the cap yourself.

References
----------
.. [1] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, secs. 5.7
   (range and endurance, propeller aircraft), 5.10 (rate of climb), 5.11 (ceilings).
.. [2] FAA, *Pilot's Handbook of Aeronautical Knowledge*, FAA-H-8083-25, ch. 11
   (best range in wind: add about half the headwind; common practice).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import cached_property

import numpy as np

from cruiseplan._numerics import (
    all_true,
    any_true,
    brent_minimise,
    grid_minimise,
    illinois_root,
)
from cruiseplan.constants import DEFAULT_STALL_MARGIN, FT_PER_MIN, G0, MACH_LIMIT
from cruiseplan.errors import CruiseplanError
from cruiseplan.limits import LIMIT_DTYPE, Limit, describe
from cruiseplan.physics.aerodynamics import (
    ParabolicPolar,
    level_drag_terms,
    min_drag_speed,
    min_power_speed,
    speeds_at_drag,
    speeds_at_thrust_power,
)
from cruiseplan.physics.airspeed import ground_speed
from cruiseplan.physics.atmosphere import AirState, air_state, check_altitude
from cruiseplan.planning.performance import (
    CruisePoints,
    cruise_points,
    resolve_loading,
    shaft_power_required,
)
from cruiseplan.ranges import check_range
from cruiseplan.units import quantity_of, temperature_difference, to_si

#: Fraction of the best specific range kept by the economy speed (common practice).
ECONOMY_FRACTION = 0.99
#: Climb rate that defines the service ceiling: 100 ft/min [m/s] (common definition).
SERVICE_CEILING_RATE = 100 * FT_PER_MIN
#: Objectives of the altitude and speed choice.
OBJECTIVES = ("range", "endurance", "economy")
#: Relative difference below which two altitudes' objectives count as equal.
TIE_TOLERANCE = 1e-9
#: Relative difference within which altitudes count as equally good to a crew [-]: 0.5 %,
#: finer than the model's inputs (BSFC, polar, winds) are known (common practice, no
#: source). Figures and tables show this band beside the chosen altitude.
EQUAL_TOLERANCE = 0.005
#: Altitude searched for ceilings [m].
CEILING_SEARCH_TOP = 20000.0
#: Relative tolerance of the speeds found as roots (window edges, economy) [-]: finer
#: than anything printed or tested.
ROOT_XTOL = 1e-8
#: Most points [-] on which :func:`objective_speed` searches the minimum-power speed in the
#: same pass as the objective's speed, whether needed or not (on more, only where needed).
STACKED_SEARCH_POINTS = 64


@dataclass(frozen=True)
class SpeedSchedule:
    """Best speeds per altitude and the window of flyable speeds (SI arrays, shape (n,)).

    Attributes
    ----------
    air : AirState
        Air at each altitude.
    headwind, crosswind : numpy.ndarray
        Wind components on the course [m/s].
    stall_speed : numpy.ndarray
        Stall speed at CLmax [m/s] (TAS).
    window_lo, window_hi : numpy.ndarray
        Slowest and fastest flyable TAS within all speed constraints [m/s]; NaN where
        no speed is flyable.
    infeasible : numpy.ndarray
        :class:`~cruiseplan.limits.Limit` bits explaining why no speed is flyable (0 where one is).
    tas : dict
        Objective name to constrained best TAS [m/s].
    tas_unconstrained : dict
        Objective name to best TAS before the speed constraints [m/s].
    binding : dict
        Objective name to :class:`~cruiseplan.limits.Limit` bits binding the speed.
    """

    air: AirState
    headwind: np.ndarray
    crosswind: np.ndarray
    stall_speed: np.ndarray
    window_lo: np.ndarray
    window_hi: np.ndarray
    infeasible: np.ndarray
    tas: dict
    tas_unconstrained: dict
    binding: dict

    @cached_property
    def feasible(self) -> np.ndarray:
        """True where some speed is flyable (computed on first read, then kept)."""
        return self.infeasible == 0


_BIT_POWER = LIMIT_DTYPE(Limit.POWER)
_BIT_CLIMB_RESERVE = LIMIT_DTYPE(Limit.CLIMB_RESERVE)
_BIT_WIND = LIMIT_DTYPE(Limit.WIND)
_BIT_STALL = LIMIT_DTYPE(Limit.STALL)
_BIT_MACH = LIMIT_DTYPE(Limit.MACH)


def _calm(wind) -> bool:
    """True if a wind component is zero everywhere (a float told without numpy)."""
    return wind == 0.0 if type(wind) is float else not any_true(wind)


def _closed_form_ok(airframe, headwind, crosswind) -> bool:
    polar = getattr(airframe, "polar", None)
    prop = airframe.propulsion
    return (isinstance(polar, ParabolicPolar) and polar.cl_min_drag == 0.0
            and prop.propeller.is_constant and _calm(headwind) and _calm(crosswind))


def _points_shape(density, mass) -> tuple:
    """Broadcast shape of the air's and the mass's (no numpy call for a float mass)."""
    if type(mass) is float:
        return density.shape if type(density) is np.ndarray else np.shape(density)
    return np.broadcast_shapes(np.shape(density), np.shape(mass))


def _over(values, shape):
    """``values`` as floats of ``shape``: the array itself if it is one, else a view."""
    if type(values) is np.ndarray and values.shape == shape and values.dtype == np.float64:
        return values
    return np.broadcast_to(np.asarray(values, dtype=float), shape)


def climb_rate(airframe, mass, air: AirState, tas):
    r"""Steady climb rate at full throttle from the excess power, :math:`(T_{av} - D) V / W`.

    With a constant or tabulated propeller efficiency this is
    :math:`\eta_p(V) (P_{av} - P_{req}(V)) / W`; with a propeller diameter the thrust
    available is the momentum-theory thrust at full power, which falls with speed and is
    finite at low speed (:meth:`~cruiseplan.physics.propulsion.PistonPropeller.thrust_available`).
    Small climb angle: lift is taken equal to weight, so drag and power required are those
    of level flight at the same speed, and the rate is :math:`V \sin\gamma` with
    :math:`\sin\gamma = (T - D) / W`.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : array_like
        Mass [kg].
    air : AirState
        Air states, broadcastable against ``tas``.
    tas : array_like
        True airspeed [m/s].

    Returns
    -------
    numpy.ndarray
        Climb rate [m/s] (negative: cannot hold altitude at this speed).

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.10, eq. 5.77.
    .. [2] McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, ch. 6 (propeller
       momentum theory: thrust at a given power).
    """
    prop = airframe.propulsion
    flight = airframe.level_flight(mass, air, tas)
    excess = prop.excess_thrust_power(tas, air.density, prop.shaft_power_available(air.sigma),
                                      flight.shaft, flight.drag)
    return excess / (mass * G0)


def _window(airframe, mass, air, lo, hi, reserve_rate, terms=None):
    """Speeds in [lo, hi] where the climb rate is at least ``reserve_rate``; NaN where none.

    With a symmetric parabolic polar and a constant propeller efficiency the edges are the
    roots of a quartic, in closed form (:func:`speeds_at_thrust_power`, given the drag
    ``terms`` if they are computed already); otherwise both edges are found in one pass
    of root finding, bracketed by the speed of the greatest excess power.
    """
    if _closed_form_ok(airframe, 0.0, 0.0):
        prop, polar = airframe.propulsion, airframe.polar
        thrust_power = prop.propeller(lo) * prop.shaft_power_available(air.sigma)
        if not (type(reserve_rate) is float and reserve_rate == 0.0):
            # (Without a reserve the difference is the thrust power itself.)
            thrust_power = thrust_power - np.asarray(mass, dtype=float) * G0 * reserve_rate
        slow, fast = speeds_at_thrust_power(mass, air.density, airframe.wing_area,
                                            polar.cd0, polar.k, thrust_power, terms=terms)
        ok = (slow <= hi) & (fast >= lo)   # False where NaN: no speed at all
        if all_true(ok):
            return np.maximum(slow, lo), np.minimum(fast, hi), ok
        return (np.where(ok, np.maximum(slow, lo), np.nan),
                np.where(ok, np.minimum(fast, hi), np.nan), ok)

    def excess(v):
        return climb_rate(airframe, mass, air, v) - reserve_rate

    # v_x only splits the bracket for the two roots: modest precision is enough.
    v_x = brent_minimise(lambda v: -excess(v), lo, hi, xtol_rel=1e-6)
    ok = excess(v_x) >= 0.0
    v_lo, v_hi = _two_roots(excess, lo, v_x, hi)
    return np.where(ok, v_lo, np.nan), np.where(ok, v_hi, np.nan), ok


def _two_roots(f, lo, mid, hi):
    """The edges of the band around ``mid`` where ``f`` >= 0, within [lo, hi].

    ``f`` >= 0 at ``mid``; an end where ``f`` >= 0 is its own edge. Both roots are found in
    one call of the root finder on the two brackets stacked (each element stops on its
    own, so the result is that of two calls).
    """
    shape = np.broadcast_shapes(np.shape(lo), np.shape(mid), np.shape(hi))
    a = np.stack([np.broadcast_to(lo, shape), np.broadcast_to(mid, shape)])
    b = np.stack([np.broadcast_to(mid, shape), np.broadcast_to(hi, shape)])
    sign = np.array([1.0, -1.0]).reshape((2,) + (1,) * len(shape))
    root = illinois_root(lambda v: sign * f(v), a, b, xtol_rel=ROOT_XTOL)
    ends = f(np.stack([a[0], b[1]])) >= 0
    return np.where(ends[0], a[0], root[0]), np.where(ends[1], b[1], root[1])


def _planner_grid(f, lo, hi, *, xtol_rel):
    """:func:`grid_minimise` in five steps, with the fewest points that reach ``xtol_rel``.

    A grid of ``2 s + 1`` points shrinks the bracket ``s``-fold a step. The tolerance is
    relative to ``|a| + |b|`` of the final bracket, about twice the speed sought, and a
    speed bracket (half the stall speed to the Mach limit) is at most about twice as wide
    as that, so five steps reach ``xtol_rel`` when ``s**5 >= 2 / xtol_rel``; an element
    that needs more goes on, as :func:`grid_minimise` stops each by the tolerance. The
    planner's 1e-4 takes 17 points: 85 evaluations in five array calls (15 points took
    a sixth call on the bundled routes, 90 evaluations). The calls are what a single plan
    pays for, the evaluations what many missions planned together pay for.
    """
    steps = 5
    s = max(2, int(np.ceil((2.0 / xtol_rel) ** (1.0 / steps))))
    return grid_minimise(f, lo, hi, xtol_rel=xtol_rel, points=2 * s + 1)


def _free_speeds(airframe, mass, air, store, hw, cw, objectives, xtol=1e-10,
                 terms=None) -> dict:
    """Best speeds before any constraint, for the objectives asked (economy needs range).

    ``terms``: the polar's :func:`level_drag_terms` at these points, if computed already.

    Where both the best-range and the best-endurance speed need a search, both are found
    in one pass: the two problems are stacked along a new first axis, so that each step
    evaluates the level flight once for both.
    """
    prop = airframe.propulsion
    polar = getattr(airframe, "polar", None)
    out = {}

    def bounds():
        # The searches' bracket (the closed forms need none).
        return 0.5 * airframe.stall_speed(mass, air.density), MACH_LIMIT * air.speed_of_sound

    def shaft(v):
        return shaft_power_required(airframe, mass, air, v)

    # Crosswind squared once: the same crosswind at every step of a search.
    cw2 = np.asarray(cw, dtype=float) * np.asarray(cw, dtype=float)

    def ground_range(v):
        return ground_speed(v, hw, cw, crosswind_squared=cw2) * prop.endurance(store,
                                                                             shaft(v))

    # Brent's method needs the fewest evaluations; for a planner's modest tolerance on a
    # few dozen altitudes, a few calls of successive grids on larger arrays are quicker
    # than Brent's many array operations per step.
    search = _planner_grid if xtol >= 1e-7 else brent_minimise
    exponent = getattr(prop, "peukert_exponent", 1.0)
    peukert = exponent != 1.0 if type(exponent) is float else np.any(exponent != 1.0)
    range_closed = _closed_form_ok(airframe, hw, cw) and not peukert
    endurance_closed = _closed_form_ok(airframe, 0.0, 0.0)
    want_range = "range" in objectives or "economy" in objectives
    if want_range and "endurance" in objectives and not range_closed \
            and not endurance_closed:
        lo, hi = bounds()
        shape = np.broadcast_shapes(np.shape(lo), np.shape(hi))

        def both(v):
            # The pair's axis comes before the points' shape (a search may add its own);
            # the two halves are read and written as views along it.
            axis = v.ndim - len(shape) - 1
            first, second = (slice(None),) * axis + (0,), (slice(None),) * axis + (1,)
            p = shaft(v)
            out = np.empty(p.shape)
            np.negative(ground_speed(v[first], hw, cw, crosswind_squared=cw2)
                        * prop.endurance(store, p[first]), out=out[first])
            out[second] = p[second]
            return out

        pair = search(both, np.broadcast_to(lo, (2,) + shape),
                      np.broadcast_to(hi, (2,) + shape), xtol_rel=xtol)
        out["range"], out["endurance"] = pair[0], pair[1]
    if want_range and "range" not in out:
        if range_closed:
            out["range"] = min_drag_speed(mass, air.density, airframe.wing_area, polar.cd0,
                                          polar.k)
        else:
            out["range"] = search(lambda v: -ground_range(v), *bounds(), xtol_rel=xtol)
    if "endurance" in objectives and "endurance" not in out:
        if endurance_closed:
            out["endurance"] = min_power_speed(mass, air.density, airframe.wing_area,
                                               polar.cd0, polar.k)
        else:
            out["endurance"] = search(shaft, *bounds(), xtol_rel=xtol)
    if "economy" in objectives:
        if range_closed and getattr(prop, "circuit", None) is None:
            # Range goes as 1 / drag when the store rate is proportional to shaft power:
            # economy is the fast speed of drag = minimum drag / ECONOMY_FRACTION.
            d_min = 2.0 * np.asarray(mass, dtype=float) * G0 * np.sqrt(polar.k * polar.cd0)
            out["economy"] = speeds_at_drag(mass, air.density, airframe.wing_area, polar.cd0,
                                            polar.k, d_min / ECONOMY_FRACTION, slow=False,
                                            terms=terms)[1]
        else:
            best = ground_range(out["range"])
            out["economy"] = illinois_root(
                lambda v: ECONOMY_FRACTION * best - ground_range(v), out["range"],
                bounds()[1], xtol_rel=max(0.1 * xtol, ROOT_XTOL))
    return out


def objective_speed(airframe, mass, air: AirState, store, objective, *, headwind=0.0,
                    crosswind=0.0, stall_margin=DEFAULT_STALL_MARGIN, xtol=1e-10):
    """Best TAS for one objective within the speed constraints, and whether it is flyable.

    The quick path of :func:`speed_schedule` for planners: the free optimum is raised to
    the stall-margin speed, and only where that needs more power than full throttle gives
    is the full schedule (with its power window) computed.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float or array_like
        Mass [kg].
    air : AirState
        One-dimensional air states.
    store : float
        Fuel [kg] or usable energy [J] on board.
    objective : {"range", "endurance", "economy"}
        What the speed is best for.
    headwind, crosswind : array_like, optional
        Wind components [m/s].
    stall_margin : float, optional
        Minimum TAS over stall speed [-].
    xtol : float, optional
        Relative tolerance of the speed searches [-].

    Returns
    -------
    tas : numpy.ndarray
        TAS [m/s] (the free optimum where nothing is flyable).
    feasible : numpy.ndarray
        True where that speed is flyable.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.7.
    """
    shape = np.broadcast_shapes(np.shape(air.density), np.shape(mass))
    hw = np.broadcast_to(np.asarray(headwind, dtype=float), shape)
    cw = np.broadcast_to(np.asarray(crosswind, dtype=float), shape)
    # The minimum-power speed bounds the search of the short-of-power branch below. On a
    # few points it is found in the same pass as the objective's (one search: the cost is
    # per call); on many (missions planned together) only where it is needed, as the cost
    # is then per point. Each element's search is its own, so both give the same speeds.
    stacked = int(np.prod(shape)) <= STACKED_SEARCH_POINTS
    speeds = _free_speeds(airframe, mass, air, store, hw, cw,
                          (objective, "endurance") if stacked else (objective,), xtol)
    free = speeds[objective]
    v_s = airframe.stall_speed(mass, air.density)
    v = np.maximum(free, stall_margin * v_s)
    prop = airframe.propulsion
    # Full throttle, or less where the battery pack allows less (its cap at this store).
    cap = np.minimum(prop.shaft_power_available(air.sigma), prop.pack_shaft_limit(store)[0])
    enough = shaft_power_required(airframe, mass, air, v) <= cap
    feasible = np.ones(shape, dtype=bool)
    if all_true(enough):
        return v, feasible
    # Short of power: above the minimum-power speed, power required rises with speed, so
    # the best flyable speed is where it meets full throttle (if the minimum-power speed
    # itself is flyable and above the stall margin).
    short = ~enough
    sub = AirState(*(np.broadcast_to(getattr(air, f), shape)[short] for f in
                     AirState.__dataclass_fields__))
    m_sub = np.broadcast_to(np.asarray(mass, dtype=float), shape)[short]
    avail = np.minimum(prop.shaft_power_available(sub.sigma), prop.pack_shaft_limit(store)[0])

    def deficit(x):
        return shaft_power_required(airframe, m_sub, sub, x) - avail

    if stacked:
        v_mp = np.broadcast_to(speeds["endurance"], shape)[short]
    else:
        v_mp = _free_speeds(airframe, m_sub, sub, np.broadcast_to(store, shape)[short],
                            hw[short], cw[short], ("endurance",), xtol)["endurance"]
    v_lo = np.maximum(v_mp, stall_margin * v_s[short] if np.ndim(v_s) else stall_margin * v_s)
    ok = deficit(v_lo) <= 0
    v_fit = illinois_root(deficit, v_lo, np.maximum(v[short], v_lo), xtol_rel=xtol)
    v = v.copy()
    v[short] = np.where(ok, v_fit, free[short])
    feasible[short] = ok
    return v, feasible


def speed_schedule(airframe, mass, air: AirState, store, *, headwind=0.0, crosswind=0.0,
                   stall_margin=DEFAULT_STALL_MARGIN, climb_reserve=0.0) -> SpeedSchedule:
    """Best-range, best-endurance and economy TAS at each altitude (SI core).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float
        Mass [kg].
    air : AirState
        One-dimensional air states (one per altitude).
    store : float
        Fuel [kg] or usable energy [J] on board.
    headwind, crosswind : array_like, optional
        Wind components on the course [m/s], scalar or one per altitude.
    stall_margin : float, optional
        Minimum TAS over stall speed [-].
    climb_reserve : float, optional
        Minimum climb rate that must remain available at the cruise speed [m/s].

    Returns
    -------
    SpeedSchedule
        Constrained and unconstrained speeds and the binding constraints.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eqs. 5.34, 5.54 (closed forms) and
       sec. 5.7 (range and endurance).
    """
    shape = _points_shape(air.density, mass)
    hw, cw = _over(headwind, shape), _over(crosswind, shape)
    v_s = airframe.stall_speed(mass, air.density)
    lo, hi = 0.5 * v_s, MACH_LIMIT * air.speed_of_sound
    # The polar's drag terms, computed once for the closed forms of the economy speed and
    # of the windows' edges.
    terms = (level_drag_terms(mass, air.density, airframe.wing_area, airframe.polar.cd0,
                              airframe.polar.k)
             if _closed_form_ok(airframe, 0.0, 0.0) else None)
    free = _free_speeds(airframe, mass, air, store, hw, cw, OBJECTIVES, terms=terms)
    v_range, v_end, v_econ = free["range"], free["endurance"], free["economy"]

    # Windows: with and without the climb reserve, to tell which one binds.
    p_lo, p_hi, p_ok = _window(airframe, mass, air, lo, hi, 0.0, terms)
    if climb_reserve > 0:
        c_lo, c_hi, c_ok = _window(airframe, mass, air, lo, hi, climb_reserve, terms)
    else:
        c_lo, c_hi, c_ok = p_lo, p_hi, p_ok
    v_margin = stall_margin * v_s
    win_lo = np.maximum(c_lo, v_margin)
    win_hi = c_hi
    # Bits as bool x bit (each condition a bool array of the altitudes' shape).
    if all_true(p_ok) and p_ok.shape == shape:
        infeasible = np.zeros(shape, dtype=LIMIT_DTYPE)
    else:
        infeasible = np.broadcast_to(~p_ok, shape) * _BIT_POWER
    if c_ok is not p_ok:
        infeasible |= (p_ok & ~c_ok) * _BIT_CLIMB_RESERVE
    squeezed = c_ok & (v_margin > c_hi)
    if any_true(squeezed):
        infeasible |= squeezed * LIMIT_DTYPE(Limit.STALL | (
            Limit.CLIMB_RESERVE if climb_reserve > 0 else Limit.POWER))
    # A battery pack given as a circuit caps the power at the store's state of charge
    # (its maximum power, cut-off voltage or maximum current): a speed beyond it is not
    # flyable, and where the cap binds a best speed its bit is named.
    k_lo, k_hi, cap_bit = _pack_window(airframe, mass, air, store, lo, hi, v_end)
    if cap_bit:
        no_cap = ~np.isfinite(k_lo) | (k_lo > win_hi) | (k_hi < win_lo)
        infeasible |= np.where(no_cap, cap_bit, 0).astype(LIMIT_DTYPE)
        win_lo, win_hi = np.fmax(win_lo, k_lo), np.fmin(win_hi, k_hi)
    all_ok = not any_true(infeasible)
    if not all_ok:
        ok = infeasible == 0
        win_lo = np.where(ok, win_lo, np.nan)
        win_hi = np.where(ok, win_hi, np.nan)

    def clamp(v_unc):
        # Where nothing is flyable the window is NaN: no comparison with it holds, so no
        # bit is set there.
        below = v_unc < win_lo
        above = v_unc > win_hi
        if not (any_true(below) or any_true(above)):
            # Inside the window everywhere (or no window): the speed is its own clipped
            # value and nothing binds (the same as the general case below).
            if all_ok and v_unc.shape == shape:
                return v_unc.copy(), np.zeros(shape, dtype=LIMIT_DTYPE)
            return (np.where(infeasible == 0, v_unc, np.nan),
                    np.zeros(shape, dtype=LIMIT_DTYPE))
        v = np.minimum(np.maximum(v_unc, win_lo), win_hi)  # np.clip, by its ufuncs
        stall_bound = below & (v_margin >= c_lo)
        code = stall_bound * _BIT_STALL
        power_side = (below & ~stall_bound) | above
        if any_true(power_side):   # (the Mach limit is on the power side too)
            at_mach = above & (win_hi >= hi * (1 - 1e-9))
            outside_p = (v_unc < p_lo) | (v_unc > p_hi)
            held = power_side & ~at_mach
            code |= (held & outside_p) * _BIT_POWER
            code |= (held & ~outside_p) * _BIT_CLIMB_RESERVE
            code |= at_mach * _BIT_MACH
        if cap_bit:
            # Where the pack's side of the window is the one that holds the speed, it
            # alone binds there.
            by_pack = (below & (k_lo >= win_lo)) | (above & (k_hi <= win_hi))
            code = np.where(by_pack, LIMIT_DTYPE(cap_bit), code)
        return (v if all_ok else np.where(ok, v, np.nan)), code

    tas, binding = {}, {}
    tas["range"], binding["range"] = clamp(v_range)
    tas["endurance"], binding["endurance"] = clamp(v_end)
    econ_unc = np.maximum(v_econ, tas["range"])
    tas["economy"], binding["economy"] = clamp(econ_unc)
    if any_true(binding["range"]):
        binding["economy"] |= np.where(v_econ < tas["range"], binding["range"], 0
                                       ).astype(LIMIT_DTYPE)
    return SpeedSchedule(air=air, headwind=hw, crosswind=cw, stall_speed=v_s,
                         window_lo=win_lo, window_hi=win_hi, infeasible=infeasible,
                         tas=tas, binding=binding,
                         tas_unconstrained={"range": v_range, "endurance": v_end,
                                            "economy": v_econ})


def _pack_window(airframe, mass, air, store, lo, hi, v_mp):
    """Speeds whose shaft power the battery pack allows with ``store`` on board.

    Returns the slowest and fastest such TAS [m/s] (NaN where none) and the pack's limit
    bit that binds (0, and no window, for an airframe without a circuit).
    """
    cap, bit = airframe.propulsion.pack_shaft_limit(store)
    if not bit:
        return None, None, 0

    def over(v):
        return shaft_power_required(airframe, mass, air, v) - cap

    ok = over(v_mp) <= 0
    v_lo, v_hi = _two_roots(lambda v: -over(v), lo, v_mp, hi)
    return np.where(ok, v_lo, np.nan), np.where(ok, v_hi, np.nan), bit


@dataclass(frozen=True)
class BestCruise:
    """Best cruise by altitude for one objective, and the best altitude.

    Attributes
    ----------
    objective : str
        ``"range"``, ``"endurance"`` or ``"economy"``.
    schedule : SpeedSchedule
        Speeds and constraints at every altitude.
    points : CruisePoints
        Cruise performance at the objective's speed at each altitude (shape (n,)).
    value : numpy.ndarray
        The objective at each altitude: ground range [m] for range and economy, endurance
        [s] for endurance; NaN where infeasible or out of band.
    out_of_band : numpy.ndarray
        :class:`~cruiseplan.limits.Limit` bits (CEILING, FLOOR, HEIGHT_AGL) for altitudes
        outside the band.
    best_index : int
        Index of the chosen altitude, -1 when no altitude is flyable: among the altitudes
        within :data:`EQUAL_TOLERANCE` of the largest value, the quickest (highest ground
        speed) for range and economy, the lowest for endurance (:func:`choose_altitude`).
    binding : int
        :class:`~cruiseplan.limits.Limit` bits binding the chosen answer (0: unconstrained optimum).
    peak_index : int
        Index of the largest value (exact ties: the highest), -1 when none is flyable.
    """

    objective: str
    schedule: SpeedSchedule
    points: CruisePoints
    value: np.ndarray
    out_of_band: np.ndarray
    best_index: int
    binding: int
    peak_index: int = -1

    @property
    def altitudes(self) -> np.ndarray:
        """Pressure altitudes [m]."""
        return self.schedule.air.pressure_altitude

    @property
    def feasible(self) -> np.ndarray:
        """Altitudes with a flyable speed inside the band."""
        return self.schedule.feasible & (self.out_of_band == 0)

    def equally_good(self, tolerance: float = EQUAL_TOLERANCE) -> np.ndarray:
        """Flyable in-band altitudes whose objective is within ``tolerance`` of the best's.

        The band the chosen altitude (:attr:`best_index`) is picked from by the secondary
        rule, and a crew may pick from for other reasons (terrain, cloud, traffic) at no
        practical cost.

        Parameters
        ----------
        tolerance : float, optional
            Relative shortfall from the best value still counted equal [-];
            :data:`EQUAL_TOLERANCE` (0.5 %) by default.

        Returns
        -------
        numpy.ndarray
            Boolean by altitude; all False when no altitude is flyable.
        """
        if self.best_index < 0:
            return np.zeros(self.value.shape, dtype=bool)
        ok = self.feasible & np.isfinite(self.value)
        best = self.value[self.peak_index if self.peak_index >= 0 else self.best_index]
        return ok & (np.where(ok, self.value, -np.inf) >= best * (1.0 - tolerance))

    def reason(self, i: int) -> str:
        """Why altitude ``i`` is not flyable, or what binds its speed.

        Parameters
        ----------
        i : int
            Index into :attr:`altitudes` [-].

        Returns
        -------
        str
            ``"not flyable: ..."``, ``"ok"`` or ``"speed limited by ..."``.
        """
        code = int(self.schedule.infeasible[i]) | int(self.out_of_band[i])
        if code:
            return "not flyable: " + describe(code)
        b = int(self.schedule.binding[self.objective][i])
        return "ok" if b == 0 else "speed limited by " + describe(b)

    def to_xarray(self):
        """The answer by altitude as an xarray Dataset (needs the ``frames`` extra).

        Returns
        -------
        xarray.Dataset
            Dim ``altitude`` [m]: the cruise points at the objective's speed (SI), the
            objective ``value`` [m or s], flag variables ``out_of_band``, ``infeasible``
            and ``binding``, and ``best``. See :func:`cruiseplan.frames.best_to_xarray`.
        """
        from cruiseplan.frames import best_to_xarray

        return best_to_xarray(self)

    def to_dataframe(self):
        """The answer as a pandas DataFrame, one row per altitude, ``status`` its reason.

        Returns
        -------
        pandas.DataFrame
            The variables of :meth:`to_xarray` as columns (SI); units in
            ``df.attrs["units"]``.
        """
        from cruiseplan.frames import best_to_dataframe

        return best_to_dataframe(self)

    def best(self) -> dict:
        """The answer in SI: altitude, TAS, ground speed, value and binding constraint."""
        i = self.best_index
        if i < 0:
            return {"altitude": None, "tas": None, "objective": self.objective,
                    "binding": describe(self.binding), "feasible": False}
        p = self.points
        return {
            "altitude": float(self.altitudes[i]), "tas": float(p.tas[i]),
            "ground_speed": float(p.ground_speed[i]), "objective": self.objective,
            "value": float(self.value[i]), "endurance": float(p.endurance[i]),
            "range_ground": float(p.range_ground[i]),
            "specific_range_ground": float(p.specific_range_ground[i]),
            "power_fraction": float(p.power_fraction[i]), "binding": describe(self.binding),
            "feasible": True,
        }

    def quantity(self, name: str):
        """A field as a pint Quantity in SI units (see :data:`BEST_CRUISE_UNITS`).

        Parameters
        ----------
        name : str
            A key of :data:`BEST_CRUISE_UNITS`: ``"altitudes"`` [m] or ``"value"`` (ground
            range [m], or endurance [s] for the endurance objective). The figures at each
            altitude's speed are ``best.points.quantity(name)``.

        Returns
        -------
        pint.Quantity
            The field's values per altitude [its SI unit].

        Raises
        ------
        CruiseplanError
            For a name without a unit, listing the known ones.
        """
        table = dict(BEST_CRUISE_UNITS)
        if self.objective == "endurance":
            table["value"] = "s"
        return quantity_of(self, name, table)


#: SI unit of each :class:`BestCruise` field :meth:`BestCruise.quantity` hands back
#: (``"value"`` is in seconds for the endurance objective).
BEST_CRUISE_UNITS = {"altitudes": "m", "value": "m"}


def _band(altitudes, floor, ceiling, max_agl, elevation):
    code = np.zeros(np.shape(altitudes), dtype=LIMIT_DTYPE)
    if floor is not None:
        code |= np.where(altitudes < floor, Limit.FLOOR, 0).astype(LIMIT_DTYPE)
    top = np.inf if ceiling is None else ceiling
    if max_agl is not None:
        cap = elevation + max_agl
        code |= np.where((altitudes > cap) & (cap <= top), Limit.HEIGHT_AGL, 0
                         ).astype(LIMIT_DTYPE)
        top = min(top, cap)
    if ceiling is not None:
        code |= np.where((altitudes > ceiling) & (ceiling <= top), Limit.CEILING, 0
                         ).astype(LIMIT_DTYPE)
    return code


def _pick(score) -> int:
    """Index of the best score; among equal scores the last (highest, fastest) one.

    A piston aircraft's best specific range does not change with altitude when BSFC and
    propeller efficiency are constant, so ties are real: the higher altitude is faster.
    """
    # np.flatnonzero(score >= np.max(score) * ...)[-1] by array methods, whose cost is
    # less than the wrappers' and a reduction's on an array of altitudes (the maximum read
    # at its argmax: NaN there too if there is one).
    score = score.ravel()
    best = score[score.argmax()]
    return int((score >= best * (1 - TIE_TOLERANCE)).nonzero()[0][-1])


def pick_rule(objective: str) -> str:
    """The secondary rule that picks among equally good altitudes, in words.

    Parameters
    ----------
    objective : {"range", "endurance", "economy"}
        The objective.

    Returns
    -------
    str
        E.g. ``"the quickest within 0.5 % of the best"``.
    """
    which = "the lowest" if objective == "endurance" else "the quickest"
    return f"{which} within {EQUAL_TOLERANCE * 100:g} % of the best"


def choose_altitude(schedule: SpeedSchedule, objective: str, value, value_free,
                    out_of_band, ground_speed=None) -> tuple:
    """Pick the best flyable in-band altitude and the constraints that bind the choice.

    The altitude of the largest value is the peak. Altitudes within
    :data:`EQUAL_TOLERANCE` (0.5 %) of it are equally good to a crew, and the pick among
    them follows a secondary rule: for range and economy the quickest (highest ground
    speed; ties: the highest), as the planner breaks its ties; for endurance the lowest
    (least climb).

    A constraint binds when relaxing it would give a better answer: the best altitude
    *without* any constraint (``value_free``, the objective at the unconstrained speed) is
    compared with the peak, and what stops us there is reported, together with what
    limits the chosen altitude's speed.

    Parameters
    ----------
    schedule : SpeedSchedule
        Speeds and feasibility per altitude.
    objective : str
        Objective name (key of ``schedule.binding``).
    value : numpy.ndarray
        Objective per altitude at the constrained speed: ground range [m] for range and
        economy, endurance [s] for endurance (larger is better; NaN where not flyable).
    value_free : numpy.ndarray
        Objective per altitude at the unconstrained speed, flyable or not [as ``value``].
    out_of_band : numpy.ndarray
        Band constraint bits per altitude [-].
    ground_speed : numpy.ndarray, optional
        Ground speed at the objective's speed per altitude [m/s]; None: the peak is
        chosen (range and economy).

    Returns
    -------
    best_index : int
        The chosen altitude; -1 when nothing is flyable.
    binding : int
        :class:`~cruiseplan.limits.Limit` bits.
    peak_index : int
        The altitude of the largest value; -1 when nothing is flyable.
    """
    speed_binding = schedule.binding[objective]
    # Flyable, in the band and with a value (each mask applied only if it masks something).
    usable = np.isfinite(value)
    if any_true(schedule.infeasible):
        usable &= schedule.feasible
    if any_true(out_of_band):
        usable &= out_of_band == 0
    if not any_true(usable):
        codes = np.bitwise_or.reduce(schedule.infeasible | out_of_band) if value.size else 0
        return -1, int(codes), -1
    score = np.where(usable, value, -np.inf)
    i = _pick(score)
    equal = usable & (score >= value[i] * (1.0 - EQUAL_TOLERANCE))
    if objective == "endurance":
        pick = int(equal.ravel().nonzero()[0][0])   # np.flatnonzero(equal)[0]
    elif ground_speed is not None:
        pick = _pick(np.where(equal, ground_speed, -np.inf))
    else:
        pick = i
    if pick != i:
        # Picked by the secondary rule, not held back by a limit: only what limits its
        # speed binds.
        return pick, int(speed_binding[pick]), i
    binding = int(speed_binding[i])
    free = np.where(np.isfinite(value_free), value_free, -np.inf)
    k = _pick(free)
    threshold = value[i] * (1 - TIE_TOLERANCE)
    if k != i and free[k] >= threshold:
        # The nearest altitude towards the free optimum that would be as good: what stops
        # us there is what binds (not constraints further away).
        between = np.arange(i + 1, k + 1) if k > i else np.arange(k, i)[::-1]
        j = int(between[np.argmax(free[between] >= threshold)])
        binding |= int(out_of_band[j]) | int(schedule.infeasible[j]) | int(speed_binding[j])
    if i == value.size - 1 and i > 0 and value[i] >= value[i - 1] * (1 - TIE_TOLERANCE):
        binding |= int(Limit.CEILING)  # the top of the altitudes searched
    return i, binding, i


def best_cruise(airframe, altitudes, *, objective="range", mass=None, fuel=None, payload=None,
                isa_dev=0.0, wind=None, course=None, headwind=None, floor=None, ceiling=None,
                max_agl=None, elevation=0.0, stall_margin=DEFAULT_STALL_MARGIN,
                climb_reserve=0.0) -> BestCruise:
    """Best speed at each altitude and the best altitude (public API).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    altitudes : array_like or pint.Quantity
        Candidate pressure altitudes [m], increasing.
    objective : {"range", "endurance", "economy"}
        What to maximise.
    mass, fuel, payload : float or pint.Quantity, optional
        Loading, as in :func:`cruiseplan.cruise_grid`: mass [kg], fuel [kg] or usable
        energy [J], payload [kg].
    isa_dev : float or pint.Quantity, optional
        ISA deviation [K].
    wind : WindProfile, optional
        Winds aloft; needs ``course``.
    course : float or pint.Quantity, optional
        True course [deg].
    headwind : float or pint.Quantity, optional
        Plain headwind component [m/s] at every altitude (negative: tailwind); not with
        ``wind``.
    floor, ceiling : float or pint.Quantity, optional
        Altitude band [m].
    max_agl : float or pint.Quantity, optional
        Maximum height above ground [m] (drones), with ``elevation`` [m] of the ground.
    elevation : float or pint.Quantity, optional
        Highest ground elevation under the route [m].
    stall_margin : float, optional
        Minimum TAS over stall speed [-] (1.3, common practice).
    climb_reserve : float or pint.Quantity, optional
        Climb rate that must remain available at cruise [m/s].

    Returns
    -------
    BestCruise
        Speeds, values and constraints per altitude, and the best altitude.

    Raises
    ------
    CruiseplanError
        For an unknown objective, altitudes that are not one-dimensional and increasing
        or lie outside the atmosphere model, both a wind profile and a headwind, or a
        wind profile without a course.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.7.
    """
    if objective not in OBJECTIVES:
        raise CruiseplanError(f"objective {objective!r} is not one of {', '.join(OBJECTIVES)}")
    h = to_si(altitudes, "m", what="altitudes")
    if type(h) is not np.ndarray or h.ndim == 0:
        h = np.atleast_1d(h)   # (an array of altitudes is its own np.atleast_1d)
    h = check_altitude(h)
    if h.ndim != 1 or any_true(h[1:] <= h[:-1]):  # finite altitudes: as np.diff(h) <= 0
        raise CruiseplanError("altitudes must be one-dimensional and increasing")
    if wind is not None and headwind is not None:
        raise CruiseplanError("give either a wind profile (with a course) or a headwind")
    if wind is not None and course is None:
        raise CruiseplanError("a wind profile needs the true course to fly")
    check_range(stall_margin, "stall_margin", "stall_margin")
    loading = resolve_loading(airframe, mass, fuel, payload)
    air = air_state(h, check_range(temperature_difference(isa_dev), "isa_dev", "isa_dev"))
    if wind is not None:
        hw, cw = wind.components(check_range(float(to_si(course, "deg", what="course")),
                                             "course", "course"), h)
    else:
        hw = np.zeros(h.shape) if headwind is None else np.full(
            h.shape, check_range(to_si(headwind, "m/s", what="headwind"), "headwind",
                                 "headwind"))
        cw = np.zeros(h.shape)
    sched = speed_schedule(airframe, loading.mass, air, loading.store, headwind=hw,
                           crosswind=cw, stall_margin=stall_margin,
                           climb_reserve=to_si(climb_reserve, "m/s", what="climb_reserve"))
    v = sched.tas[objective]
    gs = ground_speed(v, hw, cw)
    # The schedule decides feasibility (a speed at the edge of its window may carry a
    # roundoff POWER bit); the value is masked by it below, so keep the figures here.
    pts = cruise_points(airframe, loading.mass, air, v, loading.store, ground_speed=gs,
                        stall_margin=stall_margin, keep_unflyable=True)
    headway = gs > 0
    if not all_true(headway):
        wind_bad = sched.feasible & ~headway
        if any_true(wind_bad):
            sched = replace(sched, infeasible=sched.infeasible | wind_bad * _BIT_WIND)
    value = pts.endurance if objective == "endurance" else pts.range_ground
    # (A copy where every altitude is flyable: the points keep their own array.)
    value = np.where(sched.feasible, value, np.nan) if any_true(sched.infeasible) \
        else value.copy()
    v_free = sched.tas_unconstrained[objective]
    if v_free.shape == v.shape and all_true(v_free == v):  # np.array_equal, NaN unequal
        free = pts   # no constraint binds anywhere: the same points (values kept above)
    else:
        gs_free = ground_speed(v_free, hw, cw)
        free = cruise_points(airframe, loading.mass, air, v_free, loading.store,
                             ground_speed=gs_free, keep_unflyable=True)  # flyable or not
    value_free = free.endurance if objective == "endurance" else free.range_ground
    band = _band(h, *(None if x is None else to_si(x, "m", what=name) for x, name in
                      ((floor, "floor"), (ceiling, "ceiling"), (max_agl, "max_agl"))),
                 to_si(elevation, "m", what="elevation"))
    i, binding, peak = choose_altitude(sched, objective, value, value_free, band, gs)
    if any_true(band):
        value = np.where(band == 0, value, np.nan)
    return BestCruise(objective, sched, pts, value, band, i, binding, peak)


# --- Climb and ceilings ----------------------------------------------------------------

@dataclass(frozen=True)
class Climb:
    """Best climb at each air state, at full power (SI arrays of the air states' shape).

    Attributes
    ----------
    rate : numpy.ndarray
        Climb rate at :attr:`tas` [m/s] (negative: cannot hold altitude).
    tas : numpy.ndarray
        TAS of the best climb [m/s], never below the stall margin x stall speed.
    gradient : numpy.ndarray
        Climb gradient (T - D) / W = rate / TAS at :attr:`tas` [-] (NaN at TAS 0).
    stall_bound : numpy.ndarray
        True where the best speed is the stall-margin speed: the unconstrained optimum
        lies slower.
    """

    rate: np.ndarray
    tas: np.ndarray
    gradient: np.ndarray
    stall_bound: np.ndarray


def _best_climb(airframe, mass, air, stall_margin, score) -> Climb:
    """Maximise ``score(v, rate)`` over TAS from the stall margin to the Mach limit."""
    v_s = airframe.stall_speed(mass, air.density)
    lo = stall_margin * v_s
    hi = MACH_LIMIT * air.speed_of_sound

    def value(v):
        return score(v, climb_rate(airframe, mass, air, v))

    v = brent_minimise(lambda x: -value(x), lo, hi)
    # Optimum at (or below) the bound: the bound scores at least as well as the search's
    # answer, which then lies within its tolerance of the bound.
    at_lo = (value(lo) >= value(v)) & (lo > 0)
    v = np.where(at_lo, lo, v)
    rate = climb_rate(airframe, mass, air, v)
    with np.errstate(divide="ignore", invalid="ignore"):
        gradient = np.where(v > 0, rate / v, np.nan)
    return Climb(rate=rate, tas=v, gradient=gradient, stall_bound=at_lo)


def best_rate_climb(airframe, mass, air: AirState, *,
                    stall_margin=DEFAULT_STALL_MARGIN) -> Climb:
    r"""Best rate of climb (Vy) at each air state, not slower than the stall margin.

    .. math:: \dot h_{max} = \max_{V \ge m V_s} \frac{[T_{av}(V) - D(V)]\,V}{W}

    (small climb angle: drag of level flight at the same speed; :func:`climb_rate`).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float or array_like
        Mass [kg].
    air : AirState
        Air states (any shape).
    stall_margin : float, optional
        Slowest TAS searched over stall speed [-] (1.3, common practice).

    Returns
    -------
    Climb
        Rate [m/s], TAS [m/s], gradient [-] and whether the stall margin bound the speed.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.10 (rate of climb).
    """
    return _best_climb(airframe, mass, air, stall_margin, lambda v, rate: rate)


def best_angle_climb(airframe, mass, air: AirState, *,
                     stall_margin=DEFAULT_STALL_MARGIN) -> Climb:
    r"""Best angle of climb (Vx) at each air state, not slower than the stall margin.

    .. math:: \sin\gamma_{max} = \max_{V \ge m V_s} \frac{T_{av}(V) - D(V)}{W}

    (small climb angle: drag of level flight at the same speed). With a constant
    propeller efficiency the thrust :math:`\eta_p P / V` grows without bound as the speed
    falls, so the answer is the stall-margin speed; with a propeller diameter the
    momentum-theory thrust is finite and Vx lies between it and Vy.

    Parameters
    ----------
    airframe : Airframe
        A winged airframe.
    mass : float or array_like
        Mass [kg].
    air : AirState
        Air states (any shape).
    stall_margin : float, optional
        Slowest TAS searched over stall speed [-] (1.3, common practice).

    Returns
    -------
    Climb
        Rate [m/s], TAS [m/s], gradient [-] and whether the stall margin bound the speed.

    Raises
    ------
    CruiseplanError
        For an airframe that hovers: it climbs vertically, there is no best angle.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.10 (maximum climb angle).
    """
    if airframe.hovers:
        raise CruiseplanError(f"{airframe.name} hovers and can climb vertically: a best "
                              "climb angle is for winged airframes")
    return _best_climb(airframe, mass, air, stall_margin, lambda v, rate: rate / v)


def max_climb_rate(airframe, mass, air: AirState, stall_margin=DEFAULT_STALL_MARGIN):
    r"""Maximum steady climb rate and its speed at each air state (:func:`best_rate_climb`).

    .. math:: \dot h_{max} = \max_{V \ge m V_s} \frac{[T_{av}(V) - D(V)]\,V}{W}

    (small climb angle: the power-required curve of level flight).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float
        Mass [kg].
    air : AirState
        Air states (any shape).
    stall_margin : float, optional
        Slowest TAS searched over stall speed [-] (1.3, common practice).

    Returns
    -------
    rate : numpy.ndarray
        Maximum climb rate [m/s] (negative: cannot hold altitude).
    tas : numpy.ndarray
        TAS of best climb rate [m/s].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.10, eq. 5.77.
    """
    best = best_rate_climb(airframe, mass, air, stall_margin=stall_margin)
    return best.rate, best.tas


@dataclass(frozen=True)
class Ceilings:
    """Absolute and service ceilings (pressure altitude [m]; NaN with a note if not found)."""

    absolute: float
    service: float
    note: str = ""

    def quantity(self, name: str):
        """``"absolute"`` or ``"service"`` as a pint Quantity [m].

        Parameters
        ----------
        name : str
            ``"absolute"`` or ``"service"``.

        Returns
        -------
        pint.Quantity
            The ceiling's pressure altitude [m].

        Raises
        ------
        CruiseplanError
            For another name.
        """
        return quantity_of(self, name, {"absolute": "m", "service": "m"})


def ceilings(airframe, *, mass=None, fuel=None, payload=None, isa_dev=0.0,
             service_rate=SERVICE_CEILING_RATE,
             stall_margin=DEFAULT_STALL_MARGIN) -> Ceilings:
    """Absolute (zero climb rate) and service (100 ft/min) ceilings (public API).

    The climb rate is the best rate at speeds not slower than the stall margin
    (:func:`best_rate_climb`).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass, fuel, payload : float or pint.Quantity, optional
        Loading, as in :func:`cruiseplan.cruise_grid`: mass [kg], fuel [kg] or usable
        energy [J], payload [kg].
    isa_dev : float or pint.Quantity, optional
        ISA deviation [K].
    service_rate : float or pint.Quantity, optional
        Climb rate defining the service ceiling [m/s]; 100 ft/min by default.
    stall_margin : float, optional
        Slowest TAS of the climb over stall speed [-] (1.3, common practice).

    Returns
    -------
    Ceilings
        Pressure altitudes [m], searched from 0 to 20 000 m.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.11 (absolute and service
       ceilings).
    """
    loading = resolve_loading(airframe, mass, fuel, payload)
    dev = temperature_difference(isa_dev)
    targets = np.array([0.0, float(to_si(service_rate, "m/s", what="service_rate"))])

    def deficit(h):
        return targets - best_rate_climb(airframe, loading.mass, air_state(h, dev),
                                         stall_margin=stall_margin).rate

    ends = np.array([0.0, CEILING_SEARCH_TOP])
    at_ends = deficit(ends[:, None])  # rows: sea level, top; columns: targets
    found = illinois_root(deficit, np.zeros(2), np.full(2, CEILING_SEARCH_TOP),
                              xtol_rel=1e-9)
    notes = []
    out = []
    for k, name in enumerate(("absolute", "service")):
        if at_ends[0, k] > 0:
            out.append(np.nan)
            notes.append(f"{name} ceiling below sea level at this mass and day")
        elif at_ends[1, k] <= 0:
            out.append(np.nan)
            notes.append(f"{name} ceiling above {CEILING_SEARCH_TOP:.0f} m")
        else:
            out.append(float(found[k]))
    return Ceilings(out[0], out[1], "; ".join(notes))
