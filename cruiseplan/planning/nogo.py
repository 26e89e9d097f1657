"""What would make a NO-GO plan GO: each answer found by a search on the planner.

For a plan that fails, four questions a crew asks, each answered by re-planning the
mission with one thing changed and bisecting on it, so every answer is a plan the planner
itself would call good (for the fuel or energy) and can be checked by planning it:

* the distance along the route that can be flown with the reserve still on board;
* the extra fuel or energy that would do (within the tanks or the pack);
* the largest payload that would do, with the same fuel;
* the strongest headwind component, added on every leg, that would still do (negative:
  a tailwind is needed).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from cruiseplan.amounts import format_amount
from cruiseplan.model.mission import Mission
from cruiseplan.planning.mission import Plan, plan_mission
from cruiseplan.units import display

#: Bisection steps of each search: the answer to 1/4096 of the interval searched.
STEPS = 12
#: Widest added headwind component searched [m/s] (about 78 kt either way).
HEADWIND_SPAN = 40.0


@dataclass(frozen=True)
class Remedies:
    """What would make a NO-GO plan GO (SI; None where the change alone would not do).

    Attributes
    ----------
    reachable : float or None
        Distance along the route flown with the reserve intact [m].
    route : float
        The route's whole distance [m].
    extra_store : float or None
        Fuel [kg] or energy [J] to add to what is on board.
    short_when_full : float or None
        With full tanks or a full pack, how much is still missing [kg or J].
    max_payload : float or None
        Largest crew and payload [kg] with the same fuel or energy.
    max_headwind : float or None
        Largest headwind component added on every leg [m/s]; negative: a tailwind.
    """

    reachable: float | None
    route: float
    extra_store: float | None
    short_when_full: float | None
    max_payload: float | None
    max_headwind: float | None

    def lines(self, propulsion, units: str) -> list:
        """The answers in words and display units, one line each.

        Parameters
        ----------
        propulsion : object
            The propulsion kind (what the store is).
        units : {"aviation", "si"}
            Display unit system.

        Returns
        -------
        list of str
            One line per question.
        """
        fd, ld = display("distance", units)
        fs, ls = display("speed", units)
        fm, lm = display("mass", units)
        store = propulsion.store.name
        out = []
        if self.reachable is not None:
            out.append(f"distance reachable with the reserve kept: {self.reachable * fd:.1f} "
                       f"of {self.route * fd:.1f} {ld}")
        if self.extra_store is not None:
            out.append(f"{store} needed: {format_amount(self.extra_store, propulsion, units)} "
                       "more on board")
        elif self.short_when_full is not None:
            out.append(f"{store} needed: even full, "
                       f"{format_amount(self.short_when_full, propulsion, units)} short")
        out.append(f"largest payload with this {store}: {self.max_payload * fm:.1f} {lm}"
                   if self.max_payload is not None else
                   f"no payload alone makes it GO with this {store}")
        if self.max_headwind is None:
            out.append("no wind alone makes it GO")
        elif self.max_headwind >= 0:
            out.append(f"strongest headwind component tolerated: {self.max_headwind * fs:.0f} "
                       f"{ls} more on every leg")
        else:
            out.append(f"it needs a tailwind component of {-self.max_headwind * fs:.0f} {ls} "
                       "more on every leg")
        return out


def margin(plan: Plan) -> float:
    """Store left at landing over the reserve [kg or J] (negative: short).

    Parameters
    ----------
    plan : Plan
        A plan.

    Returns
    -------
    float
        Remaining minus the reserve required.
    """
    return float(plan.remaining - plan.reserve_required)


def _bisect(good, lo, hi, steps=STEPS):
    """The boundary between ``good(lo)`` and ``not good(hi)`` (or the reverse), bisected.

    Returns the last point on ``lo``'s side and the first on ``hi``'s.
    """
    side = good(lo)
    for _ in range(steps):
        mid = 0.5 * (lo + hi)
        if good(mid) == side:
            lo = mid
        else:
            hi = mid
    return lo, hi


def truncated(mission: Mission, distance: float) -> Mission:
    """The mission flown only to ``distance`` [m] along its route (the last leg cut).

    Parameters
    ----------
    mission : Mission
        The mission.
    distance : float
        Distance along the route [m]; hovers and loiters before it are kept.

    Returns
    -------
    Mission
        With the legs up to that point.
    """
    legs, done = [], 0.0
    for leg in mission.legs:
        if leg.kind != "cruise":
            legs.append(leg)
            continue
        if done + leg.distance >= distance:
            legs.append(replace(leg, distance=max(distance - done, 1.0)))
            break
        legs.append(leg)
        done += leg.distance
    return replace(mission, legs=tuple(legs))


def what_would_make_it_go(plan: Plan) -> Remedies:
    """Search the planner for what would make a NO-GO plan GO.

    Parameters
    ----------
    plan : Plan
        A plan (its mission is re-planned with one change at a time).

    Returns
    -------
    Remedies
        The distance reachable, the extra fuel or energy, the largest payload and the
        strongest added headwind, each from a bisection of :data:`STEPS` steps.
    """
    mission = plan.mission
    af = mission.airframe
    cap = af.propulsion.store_capacity
    route = float(sum(leg.distance for leg in mission.legs))
    load = af.loading(mass=mission.mass, store=mission.store, payload=mission.payload)
    payload = mission.payload if mission.payload is not None else (
        af.payload if mission.mass is None else load.mass - af.empty_mass
        - (load.store if af.propulsion.store.burns_mass else 0.0))
    fixed = replace(mission, mass=None, store=load.store, payload=payload)

    def fuel_ok(m, **kw):
        return margin(plan_mission(m, **kw)) >= 0.0

    short_of_store = margin(plan) < 0
    reachable = route
    if short_of_store and route > 0:
        reachable, _ = _bisect(lambda d: fuel_ok(truncated(mission, d)), 0.0, route)
    extra = short = None
    if short_of_store:
        full = replace(fixed, store=cap)
        if cap > load.store * (1 + 1e-12) and fuel_ok(full):
            # The first amount found good, so that adding it makes the plan good.
            _, enough = _bisect(lambda s: fuel_ok(replace(fixed, store=s)), load.store, cap)
            extra = enough - load.store
        else:
            short = -margin(plan_mission(full))
    max_payload = None
    if plan_mission(replace(fixed, payload=0.0)).go:
        max_payload, _ = _bisect(lambda p: plan_mission(replace(fixed, payload=p)).go, 0.0,
                                 max(payload, 1.0))
    max_headwind = None
    if plan_mission(mission, headwind_offset=-HEADWIND_SPAN).go:
        max_headwind, _ = _bisect(lambda w: plan_mission(mission, headwind_offset=w).go,
                                  -HEADWIND_SPAN, HEADWIND_SPAN)
    return Remedies(reachable, route, extra, short, max_payload, max_headwind)
