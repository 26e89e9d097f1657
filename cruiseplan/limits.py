"""Limit flags: why a point is not flyable, or what holds a best-cruise answer; defined once.

One bit set serves every level of the model. A cruise point carries the limits it breaches
(:func:`explain` gives their text, or ``"ok"``); a best-cruise answer carries the limits that
bind it (:func:`describe` names them as constraints, or ``"none"``).
"""

from __future__ import annotations

import enum
from dataclasses import dataclass

import numpy as np

from cruiseplan.constants import MACH_LIMIT


class Limit(enum.IntFlag):
    """Reasons a cruise point is not flyable or not trusted, and constraints that bind."""

    STALL = 1
    POWER = 2
    ATMOSPHERE = 4
    MACH = 8
    POLAR_RANGE = 16
    LAPSE_RANGE = 32
    NO_SOLUTION = 64
    WIND = 128
    ROTOR_RANGE = 256
    REYNOLDS_RANGE = 512
    CLIMB_RESERVE = 1024
    CEILING = 2048
    FLOOR = 4096
    HEIGHT_AGL = 8192
    BEYOND_CLMAX = 16384
    PACK_POWER = 32768
    CURRENT = 65536
    CUTOFF = 131072


@dataclass(frozen=True)
class LimitText:
    """How a limit reads: a short code, the reason a point breaches it, its name as a constraint."""

    code: str
    reason: str
    constraint: str


#: The words of every limit, in bit order.
LIMITS = {
    Limit.STALL: LimitText("STALL", "below the stall margin", "stall margin"),
    Limit.POWER: LimitText("POWER", "power required exceeds power available",
                           "power available"),
    Limit.ATMOSPHERE: LimitText("ATMOS", "outside the atmosphere model", "atmosphere model"),
    Limit.MACH: LimitText("MACH", f"Mach above {MACH_LIMIT}, outside the incompressible polar",
                          f"Mach {MACH_LIMIT} model limit"),
    Limit.POLAR_RANGE: LimitText("POLAR", "CL outside the tabulated polar (extrapolated)",
                                 "tabulated polar range"),
    Limit.LAPSE_RANGE: LimitText("LAPSE", "density outside the power-lapse law's range",
                                 "power-lapse law range"),
    Limit.NO_SOLUTION: LimitText("NOSOL", "power setting cannot hold level flight",
                                 "no level-flight solution"),
    Limit.WIND: LimitText("WIND", "wind too strong to hold the course",
                          "wind (ground speed not positive or course cannot be held)"),
    Limit.ROTOR_RANGE: LimitText(
        "ROTOR", "beyond the rotor model's range (advance ratio 0.35, tilt 35 deg)",
        "rotor model range"),
    Limit.REYNOLDS_RANGE: LimitText(
        "RE", "a Reynolds number outside its drag correlation's range",
        "drag correlation Reynolds range"),
    Limit.CLIMB_RESERVE: LimitText("CLIMB", "climb-rate reserve not available",
                                   "climb-rate reserve"),
    Limit.CEILING: LimitText("CEIL", "above the altitude band",
                             "altitude band ceiling or top of the altitudes searched"),
    Limit.FLOOR: LimitText("FLOOR", "below the altitude band", "altitude band floor"),
    Limit.HEIGHT_AGL: LimitText("AGL", "above the maximum height above ground",
                                "maximum height above ground"),
    Limit.BEYOND_CLMAX: LimitText("CLMAX", "CL above CLmax: slower than the stall speed, "
                                  "the wing cannot fly there", "CLmax (stall speed)"),
    Limit.PACK_POWER: LimitText(
        "PACK", "battery power beyond the pack's maximum OCV^2/(4R): no current gives it",
        "pack's maximum power"),
    Limit.CURRENT: LimitText("AMPS", "pack current above its maximum continuous current",
                             "pack's maximum continuous current (C-rate)"),
    Limit.CUTOFF: LimitText("VOLTS", "pack voltage under load below its cut-off voltage",
                            "pack's cut-off voltage under load"),
}

#: The integer type of limit bit sets (the bits above no longer fit 16 bits).
LIMIT_DTYPE = np.uint32

#: Limits beyond which a point cannot be flown at all (as opposed to a margin or a model
#: range): its range, endurance, specific range and flows are NaN, the bit says why.
#: STALL alone (below the stall margin, above the stall speed) is not among them; a point
#: beyond CLmax carries BEYOND_CLMAX as well as STALL.
UNFLYABLE = (Limit.BEYOND_CLMAX | Limit.POWER | Limit.WIND | Limit.NO_SOLUTION
             | Limit.PACK_POWER | Limit.CURRENT | Limit.CUTOFF)
#: The limits of a battery pack given as an equivalent circuit (none without one).
PACK_LIMITS = Limit.PACK_POWER | Limit.CURRENT | Limit.CUTOFF

#: Short codes for the status column of printed tables.
LIMIT_CODE = {flag: t.code for flag, t in LIMITS.items()}
#: One line per reason, for tables and errors.
LIMIT_TEXT = {flag: t.reason for flag, t in LIMITS.items()}


def explain(code: int, short: bool = False) -> str:
    """Text for the limits a point breaches.

    Parameters
    ----------
    code : int
        :class:`Limit` bit set [-].
    short : bool
        Short codes joined by ``+`` (``"STALL+POWER"``) instead of the reasons.

    Returns
    -------
    str
        ``"ok"`` when no bit is set.
    """
    code = int(code)
    if code == 0:
        return "ok"
    if short:
        return "+".join(t.code for flag, t in LIMITS.items() if code & flag)
    return "; ".join(t.reason for flag, t in LIMITS.items() if code & flag)


def describe(code: int) -> str:
    """Names of the constraints in a bit set, as they bind a best-cruise answer.

    Parameters
    ----------
    code : int
        :class:`Limit` bit set [-].

    Returns
    -------
    str
        ``"none"`` when no bit is set.
    """
    code = int(code)
    if code == 0:
        return "none"
    return "; ".join(t.constraint for flag, t in LIMITS.items() if code & flag)


def flag_if(condition, flag: Limit):
    """``flag`` where ``condition`` holds, 0 elsewhere, as a :data:`LIMIT_DTYPE` array.

    Parameters
    ----------
    condition : array_like of bool
        Where the limit applies [-].
    flag : Limit
        The bit.

    Returns
    -------
    numpy.ndarray
        :data:`LIMIT_DTYPE` bits of the condition's shape.
    """
    return np.where(condition, LIMIT_DTYPE(flag), LIMIT_DTYPE(0)).astype(LIMIT_DTYPE)
