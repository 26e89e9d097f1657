r"""Survey areas: parallel lines over an area, flown back and forth, split into packs.

**Lines.** The area is laid flat on the azimuthal equidistant projection of the sphere
around the centre of its vertices (:func:`cruiseplan.physics.geo.local_xy`; scale good to
:math:`(r/R)^2/6`, 4e-8 at 3 km, for an area reaching :math:`r` from its centre). For a
line direction :math:`\theta` (true), the area's width :math:`W` across the lines is
covered by

.. math::  N = \lceil W / s \rceil

lines a spacing :math:`s` apart, the block centred on the area: the outer lines lie
:math:`(W - (N - 1)s)/2` (more than 0, at most :math:`s/2`) inside the outer vertices, so
the :math:`N` strips of width :math:`s` centred on the lines cover the whole width (the
common convention of laying survey lines; :math:`W/s` within 1e-6 of a whole number
counts as whole). Each line is cut where it crosses the area's edges; where a line crosses
a concave area more than once, each piece inside is a line of its own, flown in turn. The
spacing is given or the sensor's footprint width :math:`w` times one minus the side
overlap :math:`q`: :math:`s = w (1 - q)`.

**Order.** Boustrophedon: rows from the side nearer the take-off point, the first row
from its end nearer the take-off point, then each row the other way. Between rows a turn
(the great circle from one line's end to the next one's start, plus the turn allowance).

**Physics.** Every line, turn and transit is a :class:`~cruiseplan.model.mission.Leg`
(the survey's altitude, speed, wind, ground and caps; its own distance and course) planned
by :func:`cruiseplan.planning.mission.plan_mission`. A pack's flight: climb over the
take-off point (a hold of :data:`HOLD_TIME`: hovering airframes climb in place, wings
circle up), transit to its first line, the lines and turns, the turn-time allowance as one
hold (a hover, or a level turn at :data:`TURN_BANK` for a wing), transit back, descent
over the take-off point. By default the lines and turns of a pack on one course (to
:data:`COURSE_GROUP`) are planned as one leg of their summed length: at a set speed and a
constant wind at the survey's altitude a leg's use is its length over the ground speed
times the rate, so this is the line-by-line plan in a handful of legs (exactly, for a
battery with no state-of-charge effects; a test holds this); ``grouped=False`` plans every
line as its own leg.

**Packs.** Greedy: each pack flies as many whole lines, in order, as leave the mission's
reserve on landing at the take-off point (the reserve policy applies to every pack, each
starting with the mission's fuel or energy). The largest count is found by a search on the
planner: a guess from the energy per metre on each course (one planner call on short
probe legs) and the pack before it, then plans of the count guessed, corrected, until a
count plans GO and one more line plans NO-GO (or no line is left).

**Direction.** Given, or the one using least energy: every ``direction_step`` from 0 to
180 degrees the lines are laid and their energy summed from the planned energy per metre
on each course (lines, turns and one transit out and back; the extra transits of the
swaps are not counted in the choice). With a wind along one axis of a square field, lines
across the wind win: at airspeed :math:`V` in a wind :math:`w` a line there and back along
the wind takes :math:`2LV/(V^2 - w^2)`, across it :math:`2L/\sqrt{V^2 - w^2}`, less.

References
----------
.. [1] J. P. Snyder, *Map Projections: A Working Manual*, USGS Professional Paper 1395,
   1987, ch. 25 (azimuthal equidistant projection).
.. [2] FAA, *Pilot's Handbook of Aeronautical Knowledge*, FAA-H-8083-25, ch. 16 (the wind
   triangle: ground speed along and across the wind).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from cruiseplan.errors import CruiseplanError
from cruiseplan.model.mission import Leg, Mission
from cruiseplan.model.survey import area_centre
from cruiseplan.physics.geo import great_circle, local_latlon, local_xy
from cruiseplan.planning.mission import Plan, plan_mission

#: Time of the holds over the take-off point in which the aircraft climbs to and descends
#: from the survey altitude [s].
HOLD_TIME = 1.0
#: Bank angle of a wing's turn-time allowance [deg] (as a mission file's loiter).
TURN_BANK = 20.0
#: Lines and turns whose courses agree to this are planned as one leg [deg].
COURSE_GROUP = 1.0
#: Pieces of a line shorter than this are not flown [m].
MIN_LINE = 1.0
#: Most lines a survey may have.
MAX_LINES = 2000
#: Most packs searched for.
MAX_PACKS = 100
#: Length of each probe leg that measures the energy per metre on a course [m].
PROBE_LEG = 50.0
#: Course step of the probe when the direction is given [deg].
PROBE_STEP = 30.0
#: Planner calls per pack guided by the energy estimate, before plain bisection.
GUIDED_CALLS = 3


@dataclass(frozen=True)
class SurveyLine:
    """One survey line, in flight order (SI).

    Attributes
    ----------
    number : int
        Position in flight order, from 1.
    row : int
        Row across the area, in flight order from 0 (pieces of one row share it).
    start, end : tuple of float
        Latitude and longitude where it is entered and left [deg].
    start_xy, end_xy : tuple of float
        The same in the area's plane, east and north of its centre [m].
    length : float
        Great-circle length [m].
    course : float
        Initial true course [deg].
    """

    number: int
    row: int
    start: tuple
    end: tuple
    start_xy: tuple
    end_xy: tuple
    length: float
    course: float


@dataclass(frozen=True)
class Layout:
    """Survey lines laid over an area in one direction (SI).

    Attributes
    ----------
    direction : float
        Line direction [deg true], 0 to 180 (the lines are flown both ways).
    spacing : float
        Distance between rows [m].
    width : float
        The area's width across the lines [m].
    rows : int
        Rows of lines, ``ceil(width / spacing)``.
    lines : tuple of SurveyLine
        In flight order.
    centre : tuple of float
        The plane's centre [deg].
    area_xy : numpy.ndarray
        The area's vertices in the plane [m], shape (n, 2).
    takeoff_xy : tuple of float
        The take-off point in the plane [m].
    """

    direction: float
    spacing: float
    width: float
    rows: int
    lines: tuple
    centre: tuple
    area_xy: np.ndarray
    takeoff_xy: tuple

    @property
    def length(self) -> float:
        """Summed great-circle length of the lines [m]."""
        return float(sum(ln.length for ln in self.lines))

    @property
    def turns(self) -> int:
        """Turns between rows."""
        return sum(1 for a, b in zip(self.lines, self.lines[1:]) if a.row != b.row)


def lay_lines(area, spacing: float, direction: float, takeoff, centre=None) -> Layout:
    """Lay survey lines over an area, in boustrophedon flight order.

    Parameters
    ----------
    area : array_like
        Latitude and longitude of the polygon's vertices [deg], shape (n, 2), in order
        around it (a :class:`~cruiseplan.model.survey.Survey` checks them).
    spacing : float
        Distance between rows [m].
    direction : float
        Line direction [deg true].
    takeoff : tuple of float
        Take-off point, latitude and longitude [deg]: the rows start from its side.
    centre : tuple of float, optional
        Centre of the plane [deg]; the survey's (the normalised mean of the vertices) by
        default.

    Returns
    -------
    Layout
        ``ceil(width / spacing)`` rows, each cut to the area; their pieces are the lines.

    Raises
    ------
    CruiseplanError
        When the lines would be more than :data:`MAX_LINES`.
    """
    pts = np.asarray(area, dtype=float)
    lat0, lon0 = area_centre(pts) if centre is None else centre
    x, y = local_xy(pts[:, 0], pts[:, 1], lat0, lon0)
    tx, ty = (float(v) for v in local_xy(takeoff[0], takeoff[1], lat0, lon0))
    th = math.radians(direction % 180.0)
    u = np.array([math.sin(th), math.cos(th)])      # along the lines
    n = np.array([math.cos(th), -math.sin(th)])     # across them, to the right
    across, along = x * n[0] + y * n[1], x * u[0] + y * u[1]
    lo, hi = float(across.min()), float(across.max())
    width = hi - lo
    rows = max(1, math.ceil(width / spacing - 1e-6))
    if rows > MAX_LINES:
        raise CruiseplanError(f"{rows} rows of survey lines at {spacing:g} m spacing over "
                              f"{width:.0f} m: more than {MAX_LINES}; widen the spacing")
    offsets = lo + (width - (rows - 1) * spacing) / 2.0 + spacing * np.arange(rows)
    # Where each row crosses each edge (half-open in `across`, so a vertex counts once).
    a0, a1 = across[None, :], np.roll(across, -1)[None, :]
    b0, b1 = along[None, :], np.roll(along, -1)[None, :]
    o = offsets[:, None]
    hit = ((a0 <= o) & (o < a1)) | ((a1 <= o) & (o < a0))
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (o - a0) / (a1 - a0)
    cut = np.sort(np.where(hit, b0 + t * (b1 - b0), np.nan), axis=1)
    if cut.shape[1] % 2:
        cut = np.hstack([cut, np.full((rows, 1), np.nan)])
    enter, leave = cut[:, 0::2], cut[:, 1::2]
    # Rows from the take-off side; the first row from its end nearer the take-off point.
    t_across, t_along = tx * n[0] + ty * n[1], tx * u[0] + ty * u[1]
    order = range(rows) if abs(t_across - offsets[0]) <= abs(t_across - offsets[-1]) \
        else range(rows - 1, -1, -1)
    first = next(iter(order))
    ends = cut[first][np.isfinite(cut[first])]
    forward = abs(t_along - ends.min()) <= abs(t_along - ends.max())
    starts, stops, row_of = [], [], []
    for k, r in enumerate(order):
        ok = np.isfinite(enter[r]) & np.isfinite(leave[r]) & (leave[r] - enter[r] >= MIN_LINE)
        pieces = list(zip(enter[r][ok], leave[r][ok]))
        if (k % 2 == 0) != forward:
            pieces = [(b, a) for a, b in reversed(pieces)]
        for a, b in pieces:
            starts.append(offsets[r] * n + a * u)
            stops.append(offsets[r] * n + b * u)
            row_of.append(k)
    if len(starts) > MAX_LINES:
        raise CruiseplanError(f"{len(starts)} survey lines: more than {MAX_LINES}; widen the "
                              "spacing")
    s, e = np.array(starts).reshape(-1, 2), np.array(stops).reshape(-1, 2)
    s_lat, s_lon = local_latlon(s[:, 0], s[:, 1], lat0, lon0)
    e_lat, e_lon = local_latlon(e[:, 0], e[:, 1], lat0, lon0)
    length, course = great_circle(s_lat, s_lon, e_lat, e_lon)
    lines = tuple(SurveyLine(i + 1, row_of[i], (float(s_lat[i]), float(s_lon[i])),
                             (float(e_lat[i]), float(e_lon[i])), tuple(map(float, s[i])),
                             tuple(map(float, e[i])), float(length[i]), float(course[i]))
                  for i in range(len(row_of)))
    return Layout(direction % 180.0, float(spacing), width, rows, lines, (lat0, lon0),
                  np.stack([x, y], axis=1), (tx, ty))


# --- legs of a pack -------------------------------------------------------------------------

def _hold(mission: Mission, name: str, duration: float) -> Leg:
    """A hold at the survey's altitude: a hover, or a level turn for a wing."""
    t = mission.survey.leg
    if mission.airframe.hovers:
        return replace(t, name=name, distance=0.0, course=0.0, kind="hover",
                       duration=duration, tas=None, cas=None, power=None, objective=None)
    return replace(t, name=name, distance=0.0, course=0.0, kind="loiter", duration=duration,
                   bank=TURN_BANK)


def _between(a, b):
    """Great-circle distance [m] and course [deg] from point a to point b (lat, lon)."""
    d, c = great_circle(a[0], a[1], b[0], b[1])
    return float(d), float(c)


def _circular_mean(courses, weights) -> float:
    th = np.radians(np.asarray(courses, dtype=float))
    w = np.asarray(weights, dtype=float)
    return float(np.mod(np.degrees(np.arctan2(np.sum(w * np.sin(th)),
                                              np.sum(w * np.cos(th)))), 360.0))


def pack_legs(mission: Mission, layout: Layout, first: int, last: int, *,
              grouped: bool = True) -> tuple:
    """The legs of one pack's flight: lines ``first`` to ``last`` from and back to take-off.

    Parameters
    ----------
    mission : Mission
        A survey mission (its ``survey`` gives the leg template, the take-off point and
        the turn allowances; its airframe whether holds hover).
    layout : Layout
        The lines.
    first, last : int
        Numbers of the pack's first and last lines, from 1, inclusive.
    grouped : bool, optional
        Plan the lines and turns on one course (to :data:`COURSE_GROUP`) as one leg of
        their summed length (default), or each as its own leg.

    Returns
    -------
    tuple of Leg
        Climb over take-off, transit out, lines and turns, the turn-time hold, transit
        back, descent over take-off.
    """
    survey = mission.survey
    t = survey.leg
    lines = layout.lines[first - 1:last]
    legs = [_hold(mission, "climb over take-off", HOLD_TIME)]
    d, c = _between(survey.takeoff, lines[0].start)
    if d >= MIN_LINE:
        legs.append(replace(t, name=f"transit to line {first}", distance=d, course=c))
    pieces = []     # (what, name, distance, course)
    turns = 0
    for a, b in zip(lines, lines[1:] + (None,)):
        pieces.append(("lines", f"line {a.number}", a.length, a.course))
        if b is None:
            continue
        d, c = _between(a.end, b.start)
        turn = a.row != b.row
        turns += turn
        d += survey.turn_distance if turn else 0.0
        if d >= MIN_LINE:
            pieces.append(("turns" if turn else "gaps",
                           f"{'turn' if turn else 'gap'} {a.number}-{b.number}", d, c))
    if grouped:
        groups = {}
        for what, _, d, c in pieces:
            key = (what, int(round(c / COURSE_GROUP)) % int(round(360 / COURSE_GROUP)))
            groups.setdefault(key, []).append((d, c))
        for (what, _), members in groups.items():
            ds, cs = zip(*members)
            course = _circular_mean(cs, ds)
            legs.append(replace(t, name=f"{what} on {course:03.0f} ({len(ds)})",
                                distance=float(sum(ds)), course=course))
    else:
        legs += [replace(t, name=name, distance=d, course=c) for _, name, d, c in pieces]
    if turns and survey.turn_time > 0:
        legs.append(_hold(mission, f"turns ({turns} x {survey.turn_time:g} s)",
                          turns * survey.turn_time))
    d, c = _between(lines[-1].end, survey.takeoff)
    if d >= MIN_LINE:
        legs.append(replace(t, name=f"transit from line {last}", distance=d, course=c))
    legs.append(_hold(mission, "descent over take-off", HOLD_TIME))
    return tuple(legs)


def pack_mission(mission: Mission, layout: Layout, first: int, last: int, *,
                 grouped: bool = True) -> Mission:
    """The mission of one pack: lines ``first`` to ``last`` (from 1) as a route of legs.

    Parameters
    ----------
    mission : Mission
        The survey mission.
    layout : Layout
        The lines.
    first, last : int
        The pack's first and last line numbers, inclusive.
    grouped : bool, optional
        See :func:`pack_legs`.

    Returns
    -------
    Mission
        The same airframe, loading, day, profile and reserve, with the pack's legs and no
        survey: plan it with :func:`~cruiseplan.planning.mission.plan_mission`.
    """
    return replace(mission, legs=pack_legs(mission, layout, first, last, grouped=grouped),
                   survey=None, name=f"{mission.name} lines {first}-{last}")


# --- energy per metre on each course (the guesses of the searches) ------------------------

@dataclass(frozen=True)
class _Rates:
    """Planned use per metre on a ring of courses, and of holds per second (SI)."""

    courses: np.ndarray     # [deg]
    per_metre: np.ndarray   # [kg/m or J/m]
    hold_rate: float        # [kg/s or J/s]
    overhead: float         # allowance, climb and descent of a flight [kg or J]
    budget: float           # store at engine start minus the reserve [kg or J]

    def at(self, course):
        """Use per metre [kg/m or J/m] on ``course`` [deg], interpolated around the ring."""
        return np.interp(np.mod(course, 360.0), self.courses, self.per_metre, period=360.0)


def _probe(mission: Mission, courses) -> _Rates:
    """One planner call: a short leg on each course and a hold, at the survey's settings."""
    t = mission.survey.leg
    courses = np.mod(np.asarray(courses, dtype=float), 360.0)
    legs = [_hold(mission, "climb over take-off", HOLD_TIME)]
    legs += [replace(t, name=f"course {k}", distance=PROBE_LEG, course=float(c))
             for k, c in enumerate(courses)]
    hold = 30.0
    legs += [_hold(mission, "turn hold", hold), _hold(mission, "descent over take-off",
                                                      HOLD_TIME)]
    plan = plan_mission(replace(mission, legs=tuple(legs), survey=None))
    per_metre = np.full(courses.shape, np.nan)
    hold_used, cruise_used = 0.0, 0.0
    for seg in plan.segments:
        if seg.leg.startswith("course ") and seg.kind == "cruise" and seg.distance > 0:
            per_metre[int(seg.leg.split()[1])] = seg.used / seg.distance
            cruise_used += seg.used
        elif seg.leg == "turn hold" and seg.kind in ("hover", "loiter"):
            hold_used = seg.used
    finite = np.isfinite(per_metre)
    if not np.any(finite):
        per_metre[:] = 0.0
    else:
        per_metre[~finite] = np.max(per_metre[finite])
    order = np.argsort(courses)
    return _Rates(courses[order], per_metre[order], hold_used / hold,
                  plan.used - cruise_used - hold_used, plan.initial - plan.reserve_required)


@dataclass(frozen=True)
class _Estimate:
    """Estimated use of every pack of a layout: out[a] + lines/turns a..b + home[b]."""

    out: np.ndarray
    home: np.ndarray
    cum_lines: np.ndarray
    cum_links: np.ndarray

    def use(self, a: int, b):
        """Estimated use of lines a..b (indices from 0, inclusive; b may be an array)."""
        b = np.asarray(b)
        return (self.out[a] + self.cum_lines[b + 1] - self.cum_lines[a]
                + self.cum_links[b] - self.cum_links[a] + self.home[b])


def _estimate(mission: Mission, layout: Layout, rates: _Rates) -> _Estimate:
    survey = mission.survey
    lines = layout.lines
    start = np.array([ln.start for ln in lines])
    end = np.array([ln.end for ln in lines])
    tk = survey.takeoff
    d_out, c_out = great_circle(tk[0], tk[1], start[:, 0], start[:, 1])
    d_home, c_home = great_circle(end[:, 0], end[:, 1], tk[0], tk[1])
    length = np.array([ln.length for ln in lines])
    course = np.array([ln.course for ln in lines])
    d_link, c_link = great_circle(end[:-1, 0], end[:-1, 1], start[1:, 0], start[1:, 1])
    turn = np.array([a.row != b.row for a, b in zip(lines, lines[1:])], dtype=float)
    links = (rates.at(c_link) * (d_link + turn * survey.turn_distance)
             + turn * survey.turn_time * rates.hold_rate)
    return _Estimate(rates.at(c_out) * d_out, rates.at(c_home) * d_home,
                     np.concatenate([[0.0], np.cumsum(rates.at(course) * length)]),
                     np.concatenate([[0.0], np.cumsum(links)]))


def _layout_use(mission: Mission, layout: Layout, rates: _Rates) -> float:
    """Estimated use of flying every line of a layout in one flight [kg or J]."""
    return float(_estimate(mission, layout, rates).use(0, len(layout.lines) - 1))


def best_direction(mission: Mission) -> tuple:
    """The line direction using least energy, and every candidate's estimated use.

    Parameters
    ----------
    mission : Mission
        A survey mission.

    Returns
    -------
    direction : float
        Line direction [deg true], 0 to 180.
    candidates : numpy.ndarray
        Shape (k, 2): each direction tried [deg] and the use of its lines, turns and one
        transit out and back [kg or J], from the planned use per metre on each course.
    """
    direction, candidates, _ = _best_direction(mission)
    return direction, candidates


def _best_direction(mission: Mission) -> tuple:
    """The best direction, the candidates, and the probe's rates (one planner call)."""
    survey = mission.survey
    step = survey.direction_step
    rates = _probe(mission, np.arange(0.0, 360.0 - 1e-9, step))
    dirs = np.arange(0.0, 180.0 - 1e-9, step)
    use = np.array([_layout_use(mission, lay_lines(survey.area, survey.spacing, d,
                                                   survey.takeoff), rates) for d in dirs])
    return float(dirs[int(np.argmin(use))]), np.stack([dirs, use], axis=1), rates


# --- the plan -------------------------------------------------------------------------------

@dataclass(frozen=True)
class Pack:
    """One pack's flight: its lines and its plan (SI).

    Attributes
    ----------
    number : int
        From 1.
    first, last : int
        Its first and last line numbers, inclusive.
    plan : Plan
        The planner's plan of the flight (GO).
    """

    number: int
    first: int
    last: int
    plan: Plan

    @property
    def lines(self) -> int:
        """Lines flown."""
        return self.last - self.first + 1

    @property
    def over_reserve(self) -> float:
        """Store left at landing beyond the reserve [kg or J]."""
        return self.plan.remaining - self.plan.reserve_required


@dataclass(frozen=True)
class SurveyPlan:
    """A survey planned in packs (SI).

    Attributes
    ----------
    mission : Mission
        The survey mission.
    layout : Layout
        The lines, in flight order.
    packs : tuple of Pack
        The packs, each a GO plan; for a NO-GO survey those planned before it failed.
    reasons : tuple of str
        NO-GO reasons; empty for GO.
    candidates : numpy.ndarray or None
        Directions tried [deg] and their estimated use [kg or J], shape (k, 2); None when
        the direction was given.
    planner_calls : int
        Plans made to find the packs (and the probe).
    grouped : bool
        Whether lines on one course were planned as one leg.
    """

    mission: Mission
    layout: Layout
    packs: tuple
    reasons: tuple
    candidates: np.ndarray | None
    planner_calls: int
    grouped: bool = True

    @property
    def go(self) -> bool:
        """True when every line is flown in packs that keep the reserve."""
        return not self.reasons

    @property
    def verdict(self) -> str:
        """``"GO"`` or ``"NO-GO"``."""
        return "GO" if self.go else "NO-GO"

    @property
    def time(self) -> float:
        """Flight time of all packs [s] (swaps on the ground not included)."""
        return float(sum(p.plan.time for p in self.packs))

    @property
    def used(self) -> float:
        """Store used by all packs [kg or J]."""
        return float(sum(p.plan.used for p in self.packs))

    @property
    def swaps(self) -> tuple:
        """Line numbers after which a pack is swapped (all packs but the last)."""
        return tuple(p.last for p in self.packs[:-1])


def _guess(est: _Estimate, a: int, n_left: int, budget: float) -> int:
    """Most lines from index a whose estimated use stays within ``budget``."""
    use = est.use(a, np.arange(a, a + n_left))
    fits = np.flatnonzero(use <= budget)
    return int(fits[-1]) + 1 if fits.size else 1


def plan_survey(mission: Mission, *, grouped: bool = True) -> SurveyPlan:
    """Plan a survey: lay its lines and split them into packs that keep the reserve.

    Parameters
    ----------
    mission : Mission
        A mission with a ``survey`` (:class:`~cruiseplan.model.survey.Survey`).
    grouped : bool, optional
        Plan a pack's lines and turns on one course as one leg (default; the same use,
        far fewer legs), or every line as its own leg.

    Returns
    -------
    SurveyPlan
        GO with its packs, or NO-GO with the reasons (a line no pack can fly, or more
        than :data:`MAX_PACKS` packs).

    Raises
    ------
    CruiseplanError
        For a mission without a survey, or too many lines.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.10-5.14 (the planner).
    """
    survey = mission.survey
    if survey is None:
        raise CruiseplanError(f"mission {mission.name!r} has no survey area; plan its legs "
                              "with plan_mission")
    calls = 1
    candidates = None
    if survey.direction is None:
        direction, candidates, rates = _best_direction(mission)
    else:
        direction = survey.direction
        rates = _probe(mission, direction + np.arange(0.0, 360.0 - 1e-9, PROBE_STEP))
    layout = lay_lines(survey.area, survey.spacing, direction, survey.takeoff)
    est = _estimate(mission, layout, rates)
    n = len(layout.lines)
    packs, reasons = [], []
    a = 0                                  # index of the next pack's first line
    budget = rates.budget - rates.overhead
    while a < n:
        if len(packs) == MAX_PACKS:
            reasons.append(f"more than {MAX_PACKS} packs needed ({n - a} of {n} lines left): "
                           "split the survey")
            break
        left = n - a
        lo, hi = 0, left + 1               # `lo` lines known GO, `hi` known NO-GO
        plans = {}
        count = min(max(_guess(est, a, left, budget), 1), left)
        while hi - lo > 1:
            plan = plan_mission(pack_mission(mission, layout, a + 1, a + count,
                                             grouped=grouped))
            calls += 1
            plans[count] = plan
            if plan.go:
                lo = count
            else:
                hi = count
            if hi - lo <= 1:
                break
            margin = plan.remaining - plan.reserve_required
            guided = len(plans) < GUIDED_CALLS and (plan.go or margin < 0)
            if guided:
                count = _guess(est, a, left, float(est.use(a, a + count - 1)) + margin)
            else:
                count = (lo + hi) // 2
            count = min(max(count, lo + 1), hi - 1)
        if lo == 0:
            why = "; ".join(plans[1].reasons)
            reasons.append(f"line {a + 1} ({layout.lines[a].length:.0f} m) cannot be flown "
                           f"on one pack: {why}")
            break
        plan = plans[lo]
        packs.append(Pack(len(packs) + 1, a + 1, a + lo, plan))
        # The next pack's guess: this one's use beyond the estimate is the flight's
        # overhead (allowance, climb, descent).
        budget = (plan.initial - plan.reserve_required
                  - (plan.used - float(est.use(a, a + lo - 1))))
        a += lo
    return SurveyPlan(mission, layout, tuple(packs), tuple(reasons), candidates, calls,
                      grouped)
