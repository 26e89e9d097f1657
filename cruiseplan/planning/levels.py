r"""Cruising levels: which pressure altitudes a leg may cruise at under the mission's rule.

The rule is the crew's (``[levels]`` in the mission file, :mod:`cruiseplan.model.levels`):
sectors of **magnetic** course, each with levels ``base + k step``. A leg's magnetic course
is its true course minus the variation (east positive), rounded to the whole degree
(half up, 360 read as 000) to find its sector. The levels are indicated altitudes on the
day's altimeter setting when the mission has one, else pressure altitudes; the planner
flies pressure altitudes, so each level is converted with
:func:`~cruiseplan.physics.atmosphere.pressure_altitude_from_altimeter`.

A ``best`` altitude is then chosen among the levels between the leg's lowest and highest
allowed altitude; a fixed altitude that is not on a level for the course is a NO-GO
reason (it is not rounded: the crew decides the level).

Pure functions on SI floats and numpy arrays; no country's rule is built in, and the rule
written is checked only for its form. Local rules and air traffic control decide the level
flown.
"""

from __future__ import annotations

import math

import numpy as np

from cruiseplan.constants import FT
from cruiseplan.physics.atmosphere import indicated_altitude, pressure_altitude_from_altimeter

#: How far a fixed altitude may lie from a level and still be on it [m] (about 3 ft: a
#: file may give a level in other units than the rule, e.g. "1676 m" for 5500 ft).
ON_LEVEL_TOLERANCE = 1.0


def leg_variation(mission, leg) -> float:
    """Magnetic variation on a leg [deg], east positive: the leg's, else the mission's.

    Parameters
    ----------
    mission : Mission
        Its ``variation`` [deg] is the default.
    leg : Leg or None
        Its ``variation`` [deg] when given; None for the mission's.

    Returns
    -------
    float
        Variation [deg], east positive.
    """
    if leg is not None and leg.variation is not None:
        return leg.variation
    return mission.variation


def magnetic(true_direction, variation):
    """Magnetic direction from a true one: true minus variation (east is least).

    Parameters
    ----------
    true_direction : array_like
        True course or heading [deg].
    variation : array_like
        Magnetic variation [deg], east positive.

    Returns
    -------
    numpy.ndarray
        Magnetic direction [deg], in [0, 360).
    """
    return np.mod(np.asarray(true_direction, dtype=float) - np.asarray(variation, float),
                  360.0)


def whole_degree(direction) -> int:
    """A direction rounded to the whole degree, half up, in 0 to 359 (360 reads 000).

    Parameters
    ----------
    direction : float
        Direction [deg].

    Returns
    -------
    int
        Whole degree [deg], 0 to 359.
    """
    return int(math.floor(float(direction) % 360.0 + 0.5)) % 360


def sector_for(sectors, magnetic_course):
    """The sector of the rule holding a magnetic course.

    Parameters
    ----------
    sectors : sequence of LevelSector
        The rule (covering every whole degree once, as the mission reader checks).
    magnetic_course : float
        Magnetic course [deg].

    Returns
    -------
    LevelSector or None
        The sector; None when no sector holds the course (a rule not checked).
    """
    deg = whole_degree(magnetic_course)
    for sector in sectors:
        if deg in sector.degrees:
            return sector
    return None


def _as_read(pressure_altitude, altimeter):
    """Pressure altitudes [m] as the rule's levels are written: indicated on QNH, or PA."""
    h = np.asarray(pressure_altitude, dtype=float)
    return indicated_altitude(h, altimeter) if altimeter else h


def _to_pressure(level, altimeter):
    """Levels [m] as written (indicated on QNH, or PA) to pressure altitude [m]."""
    a = np.asarray(level, dtype=float)
    return pressure_altitude_from_altimeter(a, altimeter) if altimeter else a


def cruising_levels(sector, lo, top, altimeter=None) -> np.ndarray:
    r"""Pressure altitudes of a sector's levels between ``lo`` and ``top``.

    The levels are :math:`A_k = A_0 + k\,\Delta A`, k = 0, 1, 2, ..., written as indicated
    altitude on QNH ``altimeter`` (or as pressure altitude without one); those whose
    pressure altitude lies in [lo, top] (1e-6 m allowed) are returned.

    Parameters
    ----------
    sector : LevelSector
        The sector (``base`` and ``step`` [m]).
    lo, top : float
        Lowest and highest pressure altitude allowed on the leg [m].
    altimeter : float, optional
        QNH [Pa]; None: the levels are pressure altitudes.

    Returns
    -------
    numpy.ndarray
        Pressure altitudes of the levels [m], increasing; empty when none fits.
    """
    if not top >= lo:
        return np.empty(0)
    a_lo, a_top = (float(v) for v in _as_read([lo, top], altimeter))
    k0 = max(0, math.ceil((a_lo - sector.base) / sector.step - 1e-9))
    k1 = math.floor((a_top - sector.base) / sector.step + 1e-9)
    if k1 < k0:
        return np.empty(0)
    H = _to_pressure(sector.base + sector.step * np.arange(k0, k1 + 1), altimeter)
    return H[(H >= lo - 1e-6) & (H <= top + 1e-6)]


def nearest_levels(sector, pressure_altitude, altimeter=None) -> tuple:
    """The levels of a sector just below and above an altitude, as written [m].

    Parameters
    ----------
    sector : LevelSector
        The sector.
    pressure_altitude : float
        Pressure altitude [m].
    altimeter : float, optional
        QNH [Pa]; None: levels and altitude as pressure altitudes.

    Returns
    -------
    below : float or None
        Highest level at or below the altitude [m], as written; None below the base.
    above : float
        Lowest level at or above it [m], as written.
    """
    a = float(_as_read(pressure_altitude, altimeter))
    k = (a - sector.base) / sector.step
    below = sector.base + math.floor(k) * sector.step if k >= 0 else None
    above = sector.base + max(0, math.ceil(k)) * sector.step
    return below, above


def on_level(sector, pressure_altitude, altimeter=None) -> bool:
    """Whether an altitude is one of the sector's levels (within 1 m).

    Parameters
    ----------
    sector : LevelSector
        The sector.
    pressure_altitude : float
        Pressure altitude [m].
    altimeter : float, optional
        QNH [Pa]; None: levels and altitude as pressure altitudes.

    Returns
    -------
    bool
        True within :data:`ON_LEVEL_TOLERANCE` of a level.
    """
    a = float(_as_read(pressure_altitude, altimeter))
    below, above = nearest_levels(sector, pressure_altitude, altimeter)
    return any(v is not None and abs(a - v) <= ON_LEVEL_TOLERANCE for v in (below, above))


def _words(value, mission) -> str:
    """A level or altitude as written [m], in m and ft, with its reference."""
    ref = "indicated" if mission.altimeter else "PA"
    return f"{value:.0f} m ({value / FT:.0f} ft) {ref}"


def leg_candidates(mission, leg, lo, top) -> tuple:
    """Candidate cruise pressure altitudes of a leg under the mission's level rule.

    For a ``best`` altitude, the rule's levels for the leg's magnetic course between
    ``lo`` and ``top``; for a fixed altitude, that altitude, with a reason when it is not a
    level for the course. The planner calls this only when the mission has a rule.

    Parameters
    ----------
    mission : Mission
        Its ``levels`` (the rule), ``altimeter`` [Pa or None] and ``variation`` [deg].
    leg : Leg
        Its ``course`` [deg true], ``variation`` [deg] and ``altitude`` [m or None].
    lo, top : float
        Lowest and highest pressure altitude allowed on the leg [m].

    Returns
    -------
    candidates : numpy.ndarray
        Pressure altitudes [m]; for a ``best`` altitude with no level between ``lo`` and
        ``top``, ``[lo]`` (with a reason).
    reasons : list of str
        NO-GO reasons: a fixed altitude off the levels, or no level in the allowed band.
    """
    mag = float(magnetic(leg.course, leg_variation(mission, leg)))
    course = f"magnetic course {whole_degree(mag):03d}"
    sector = sector_for(mission.levels, mag)
    if sector is None:
        fixed = leg.altitude is not None
        return (np.array([leg.altitude if fixed else lo]),
                [f"leg {leg.name!r}: {course} is in no sector of the level rule"])
    rule = f"sector {sector.label}: {sector.text}"
    if leg.altitude is not None:
        if on_level(sector, leg.altitude, mission.altimeter):
            return np.array([leg.altitude]), []
        below, above = nearest_levels(sector, leg.altitude, mission.altimeter)
        near = " and ".join(_words(v, mission) for v in (below, above) if v is not None)
        a = float(_as_read(leg.altitude, mission.altimeter))
        return (np.array([leg.altitude]),
                [f"altitude not a cruising level for {course}: leg {leg.name!r} at "
                 f"{_words(a, mission)} ({rule}); nearest levels {near}"])
    cands = cruising_levels(sector, lo, top, mission.altimeter)
    if cands.size:
        return cands, []
    a_lo, a_top = (float(v) for v in _as_read([lo, top], mission.altimeter))
    return (np.array([lo]),
            [f"no cruising level for {course} on leg {leg.name!r} between "
             f"{_words(a_lo, mission)} and {_words(a_top, mission)} ({rule})"])
