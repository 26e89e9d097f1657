"""Text forms shared by files and the command line: winds aloft written as text.

``"270/25@3000ft,250/40@8000ft"`` (direction from, speed, altitude) is read here, once, for
mission files and the ``--wind`` option alike.
"""

from __future__ import annotations

import re

from cruiseplan.errors import UnitError
from cruiseplan.physics.winds import WindProfile
from cruiseplan.units import parse_quantity

_WIND = re.compile(r"^\s*(\d+(?:\.\d+)?)\s*/\s*([^@]+?)\s*@\s*(.+?)\s*$")


def parse_wind_profile(text: str) -> WindProfile:
    """Read ``"270/25@3000ft,250/40@8000ft"`` into a :class:`WindProfile`.

    Parameters
    ----------
    text : str
        Comma-separated ``DIR/SPEED@ALTITUDE`` entries; speed in knots and altitude in feet
        unless units are written (``"250/12m/s@300m"``).

    Returns
    -------
    WindProfile
        Sorted by altitude.

    Raises
    ------
    UnitError
        Naming the entry that cannot be read.
    """
    entries = []
    for item in text.split(","):
        m = _WIND.match(item)
        if not m:
            raise UnitError(f"wind {item.strip()!r}: expected DIR/SPEED@ALTITUDE, "
                            "e.g. '270/25@3000ft'")
        direction = float(m.group(1))
        if not 0.0 <= direction <= 360.0:
            raise UnitError(f"wind {item.strip()!r}: direction {direction:g} is not 0-360 deg")
        speed = parse_quantity(m.group(2), "m/s", default_unit="kt", what="wind speed")
        if speed < 0:
            raise UnitError(f"wind {item.strip()!r}: speed must not be negative")
        alt = parse_quantity(m.group(3), "m", default_unit="ft", what="wind altitude")
        entries.append((alt, direction, speed))
    entries.sort()
    alts = [e[0] for e in entries]
    if len(set(alts)) != len(alts):
        raise UnitError(f"wind {text!r}: two winds at the same altitude")
    return WindProfile(tuple(alts), tuple(e[1] for e in entries), tuple(e[2] for e in entries))
