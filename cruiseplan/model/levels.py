"""A cruising-level rule as data: sectors of magnetic course, each with its levels.

The crew writes the rule in the mission file (``[levels]``); cruiseplan has no built-in
country rule. A sector covers the whole degrees of magnetic course from ``start`` to
``end`` inclusive, clockwise (``end < start`` wraps through north), and flies the levels
``base + k step`` for k = 0, 1, 2, ... The levels are indicated altitudes on the day's
altimeter setting when the mission has one, else pressure altitudes. Which levels a leg may
fly is worked out by :mod:`cruiseplan.planning.levels`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from cruiseplan.errors import CruiseplanError


@dataclass(frozen=True)
class LevelSector:
    """One sector of a cruising-level rule (SI).

    Parameters
    ----------
    start, end : int
        First and last whole degree of magnetic course in the sector [deg], 0 to 359;
        clockwise from ``start`` to ``end``, through north when ``end < start``.
    base : float
        Lowest level [m] (indicated on QNH when the mission has one, else pressure
        altitude).
    step : float
        Spacing of the levels above it [m], positive.
    text : str
        The levels as written, e.g. ``"3500 ft + 2000 ft"``.

    Raises
    ------
    CruiseplanError
        For a degree outside 0 to 359 or not whole, a step that is not positive, or a base
        that is not finite.
    """

    start: int
    end: int
    base: float
    step: float
    text: str = ""

    def __post_init__(self):
        for name in ("start", "end"):
            v = getattr(self, name)
            if isinstance(v, bool) or not isinstance(v, int) or not 0 <= v <= 359:
                raise CruiseplanError(f"level sector {name} {v!r} is not a whole degree "
                                      "from 0 to 359")
        if not math.isfinite(self.base):
            raise CruiseplanError(f"level sector base {self.base!r} m is not finite")
        if not (math.isfinite(self.step) and self.step > 0):
            raise CruiseplanError(f"level sector step {self.step!r} m must be positive")

    @property
    def degrees(self) -> tuple:
        """The whole degrees of magnetic course in the sector [deg], clockwise."""
        span = (self.end - self.start) % 360
        return tuple((self.start + k) % 360 for k in range(span + 1))

    @property
    def label(self) -> str:
        """The sector as crews write it, e.g. ``"000-179"``."""
        return f"{self.start:03d}-{self.end:03d}"


def check_sectors(sectors) -> None:
    """Check that the sectors cover every whole degree 0 to 359 exactly once.

    Parameters
    ----------
    sectors : sequence of LevelSector
        The rule, in the order written.

    Raises
    ------
    CruiseplanError
        Naming the first degree in no sector, or in two (with their numbers, from 1).
    """
    owner = {}
    for n, sector in enumerate(sectors, 1):
        for deg in sector.degrees:
            if deg in owner:
                raise CruiseplanError(
                    f"magnetic course {deg:03d} is in sectors {owner[deg]} and {n}; the "
                    "sectors must cover 000 to 359 without overlap")
            owner[deg] = n
    missing = [d for d in range(360) if d not in owner]
    if missing:
        raise CruiseplanError(f"magnetic course {missing[0]:03d} is in no sector; the sectors "
                              "must cover 000 to 359 without overlap")
