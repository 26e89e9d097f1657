"""Text forms shared by files and the command line: winds aloft, reserves, altimeter settings.

``"270/25@3000ft,250/40@8000ft"`` (direction from, speed, altitude), ``"45min"``,
``"25%"``, ``"10L"`` (a reserve), ``"1009 hPa"`` or ``"29.80 inHg"`` (an altimeter
setting) and ``"2026-12-03T06:00Z"`` (a time in UTC) are read here, once, for files and
options alike.
"""

from __future__ import annotations

import math
import re
from datetime import datetime, timezone

from cruiseplan.amounts import examples, parse_amount
from cruiseplan.errors import UnitError
from cruiseplan.model.mission import Reserve
from cruiseplan.physics.winds import WindProfile
from cruiseplan.units import parse_quantity

# A letter after the number: the text names a unit.
_HAS_UNIT = re.compile(r"\d\s*[A-Za-z]")

_WIND = re.compile(r"^\s*(\d+(?:\.\d+)?)\s*/\s*([^@]+?)\s*@\s*(.+?)\s*$")


#: Fastest wind accepted [m/s] (:data:`cruiseplan.ranges.RANGES`, headwind).
WIND_MAX = 150.0


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
        if speed > WIND_MAX:
            raise UnitError(f"wind {item.strip()!r}: speed {speed:.0f} m/s is out of range "
                            f"(0 to {WIND_MAX:.0f} m/s, about 290 kt)")
        alt = parse_quantity(m.group(3), "m", default_unit="ft", what="wind altitude")
        if not -5000.0 <= alt <= 80000.0:  # the atmosphere model's pressure altitudes
            raise UnitError(f"wind {item.strip()!r}: altitude {alt:.3g} m is out of range "
                            "(-5000 to 80000 m)")
        entries.append((alt, direction, speed))
    entries.sort()
    alts = [e[0] for e in entries]
    if len(set(alts)) != len(alts):
        raise UnitError(f"wind {text!r}: two winds at the same altitude")
    return WindProfile(tuple(alts), tuple(e[1] for e in entries), tuple(e[2] for e in entries))


def parse_reserve(text: str, propulsion, *, what: str = "--reserve") -> Reserve:
    """Read a reserve as a crew writes it: ``"30min"``, ``"25%"``, ``"10L"`` or ``"120Wh"``.

    Parameters
    ----------
    text : str
        A time, a percentage of the usable capacity, or an amount of fuel or energy, each
        with its unit.
    propulsion : object
        The propulsion kind (decides whether an amount is fuel or energy).
    what : str
        Name of the option or field, for messages.

    Returns
    -------
    Reserve
        Kind ``"time"`` [s], ``"fraction"`` [-] or ``"amount"`` [kg or J], with the text.

    Raises
    ------
    UnitError
        When the text has no unit or is neither a time, a percentage nor an amount.
    """
    t = str(text).strip()
    amounts = examples(propulsion)
    if not _HAS_UNIT.search(t) and not t.endswith("%"):
        raise UnitError(f"{what}: {text!r} needs a unit: a time ('30min'), a share ('25%') "
                        f"or an amount ({amounts})")
    if t.endswith("%"):
        share = parse_quantity(t, "", what=what)
        if not 0.0 < share < 1.0:
            raise UnitError(f"{what}: {text!r} must be a share between 0 and 100 %")
        return Reserve("fraction", share, text=t)
    try:
        seconds = parse_quantity(t, "s", what=what) if _HAS_UNIT.search(t) else None
    except UnitError:
        seconds = None
    if seconds is not None:
        if not 0.0 < seconds < float("inf"):
            raise UnitError(f"{what}: {text!r} must be a positive time")
        return Reserve("time", seconds, text=t)
    try:
        value = parse_amount(t, propulsion, what=what, share=False)
    except UnitError:
        raise UnitError(f"{what}: {text!r} is neither a time ('30min'), a share of the "
                        f"usable capacity ('25%') nor an amount ({amounts})") from None
    if value <= 0:
        raise UnitError(f"{what}: {text!r} must be positive")
    return Reserve("amount", value, text=t)


#: Altimeter settings accepted [Pa]: 850 to 1080 hPa.
ALTIMETER_RANGE = (85000.0, 108000.0)


def parse_altimeter(value, *, what: str = "altimeter") -> float:
    """Read an altimeter setting (QNH): ``"1009 hPa"``, ``"29.80 inHg"``, or Pa.

    Parameters
    ----------
    value : str or float or pint.Quantity
        Text with its unit (a bare number is refused: hPa and inHg differ by 30 times), a
        float [Pa] or a pressure Quantity.
    what : str
        Name of the option or field, for messages.

    Returns
    -------
    float
        The setting [Pa], within :data:`ALTIMETER_RANGE`.

    Raises
    ------
    UnitError
        For text without a unit, a value that is not a pressure, or one outside 850 to
        1080 hPa.
    """
    if isinstance(value, str) and not _HAS_UNIT.search(value):
        raise UnitError(f"{what}: {value!r} needs a unit, e.g. '1009 hPa' or '29.80 inHg'")
    qnh = parse_quantity(value, "Pa", what=what)
    lo, hi = ALTIMETER_RANGE
    if not lo <= qnh <= hi:
        raise UnitError(f"{what}: {value!r} is out of range; expected {lo / 100:.0f} to "
                        f"{hi / 100:.0f} hPa (25.10 to 31.89 inHg)")
    return qnh


def format_altimeter(qnh: float) -> str:
    """An altimeter setting for people: ``"1009 hPa"``, ``"1009.1 hPa"`` off the whole hPa.

    Parameters
    ----------
    qnh : float
        The setting [Pa].

    Returns
    -------
    str
        In hPa, to 0.1 hPa when it is not a whole number of them.
    """
    hpa = qnh / 100.0
    return f"{hpa:.0f} hPa" if abs(hpa - round(hpa)) < 0.05 else f"{hpa:.1f} hPa"


def parse_utc_time(value, *, what: str = "departure") -> float:
    """Read an ISO 8601 date and time in UTC, ``"2026-12-03T06:00Z"``.

    Parameters
    ----------
    value : str or datetime.datetime
        The time with its zone: ``Z`` or ``+00:00`` (another offset is converted to UTC).
        A time without a zone is refused, so local time cannot pass as UTC.
    what : str
        How errors name the value (``"--departure"``).

    Returns
    -------
    float
        Seconds since 1970-01-01T00:00Z [s].

    Raises
    ------
    UnitError
        For text that is not an ISO 8601 date and time with a zone.
    """
    example = "e.g. '2026-12-03T06:00Z' (ISO 8601, UTC)"
    if isinstance(value, datetime):
        t = value
    else:
        text = str(value).strip()
        try:
            t = datetime.fromisoformat(text)
        except ValueError:
            raise UnitError(f"{what}: {value!r} is not a date and time, {example}") from None
        if "T" not in text.upper() and " " not in text:
            raise UnitError(f"{what}: {value!r} has no time of day, {example}")
    if t.tzinfo is None or t.utcoffset() is None:
        raise UnitError(f"{what}: {value!r} has no time zone; write it in UTC, {example}")
    seconds = t.astimezone(timezone.utc).timestamp()
    if not math.isfinite(seconds):
        raise UnitError(f"{what}: {value!r} is not a finite time, {example}")
    return seconds
