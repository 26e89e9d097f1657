"""Units at the edges: one pint registry, parsing of quantity strings, SI conversion.

The numeric core of cruiseplan works in SI floats. This module is where text such as
``"7777 ft"`` or ``"180 hp"`` and pint Quantities from the public API become SI floats,
and where SI results become display units. The units the tool itself reads and prints
(those of the command line, the bundled files and the display systems) are converted with
a small table of SI factors (:data:`FAST_UNITS`, :data:`FAST_OFFSET_UNITS`) without building
pint's registry; pint reads every other unit and converts every Quantity. It is imported
lazily, the first time it is needed, so that start-up stays cheap; the registry is built
once per process and its parsed definitions are cached on disk.

Aviation conventions handled here: ``nm``/``NM`` in a length or speed means the nautical
mile (never the nanometre), ``kts`` means knots, and a temperature *difference* may be
written in degC or degF (an ISA deviation of ``"+10 degC"`` is 10 K).
"""

from __future__ import annotations

import functools
import re

import numpy as np

from cruiseplan.errors import UnitError, lookup

#: SI unit of each physical kind used by cruiseplan (the core's units).
SI_UNITS = {
    "length": "m",
    "altitude": "m",
    "distance": "m",
    "speed": "m/s",
    "mass": "kg",
    "area": "m^2",
    "power": "W",
    "energy": "J",
    "charge": "A*s",
    "voltage": "V",
    "current": "A",
    "time": "s",
    "temperature": "K",
    "temperature_difference": "K",
    "angle": "deg",
    "volume": "m^3",
    "density": "kg/m^3",
    "bsfc": "kg/J",
    "mass_flow": "kg/s",
    "volume_flow": "m^3/s",
    "pressure": "Pa",
    "rate": "m/s",
    "dimensionless": "",
}

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
# Aviation spellings pint does not read the way pilots mean them.
_ALIASES = [
    (re.compile(r"(?<![A-Za-z_])(nm|NM|NMI)(?![A-Za-z_])"), "nmi"),
    (re.compile(r"(?<![A-Za-z_])(kts|KTS|KT|kn)(?![A-Za-z_])"), "kt"),
    (re.compile(r"(?<![A-Za-z_])(FT)(?![A-Za-z_])"), "ft"),
    (re.compile(r"(?<![A-Za-z_])(US ?gal|USG|gal)(?![A-Za-z_])"), "gallon"),
    (re.compile(r"(?<![A-Za-z_])(fpm)(?![A-Za-z_])"), "ft/min"),
    (re.compile(r"%"), "percent"),
]


# --- The fast table: the tool's own unit spellings without pint's registry -----------
#
# Each unit is an SI factor and a dimension (exponents of length, mass, time, current,
# temperature). ``value_si = value * factor`` for all of them; the absolute temperatures
# degC and degF also carry an offset in kelvin, ``value_si = value * factor + offset``. Compound
# expressions of these units (``"lb/(hp*h)"``, ``"kg/m^3"``) are read by :func:`_fast_unit`;
# anything else goes to pint. tests/test_fast_units.py checks the whole table against pint.

_FT = 0.3048  # international foot [m]
_LB = 0.45359237  # avoirdupois pound [kg]
_G0 = 9.80665  # standard gravity [m/s^2]
_GALLON = 231 * 0.0254**3  # US liquid gallon [m^3]
_HP = 550 * _FT * _LB * _G0  # mechanical horsepower [W]
_REV = 2.0 * np.pi  # one revolution [rad], dimensionless


def _dim(length=0, mass=0, time=0, current=0, temperature=0) -> tuple:
    return (length, mass, time, current, temperature)


_NONE = _dim()
_LENGTH, _MASS, _TIME = _dim(length=1), _dim(mass=1), _dim(time=1)
_CURRENT, _TEMPERATURE = _dim(current=1), _dim(temperature=1)
_VOLUME, _POWER = _dim(length=3), _dim(mass=1, length=2, time=-3)
_ENERGY, _PRESSURE = _dim(mass=1, length=2, time=-2), _dim(mass=1, length=-1, time=-2)
_VOLTAGE = _dim(mass=1, length=2, time=-3, current=-1)

#: Unit spellings read without pint: name -> (SI factor, dimension).
FAST_UNITS = {
    "m": (1.0, _LENGTH), "km": (1000.0, _LENGTH), "cm": (0.01, _LENGTH),
    "mm": (0.001, _LENGTH), "ft": (_FT, _LENGTH), "in": (0.0254, _LENGTH),
    "nmi": (1852.0, _LENGTH), "mi": (1609.344, _LENGTH),
    "kt": (1852.0 / 3600.0, _dim(length=1, time=-1)),
    "kg": (1.0, _MASS), "g": (0.001, _MASS), "lb": (_LB, _MASS),
    "L": (0.001, _VOLUME), "l": (0.001, _VOLUME), "gallon": (_GALLON, _VOLUME),
    "s": (1.0, _TIME), "min": (60.0, _TIME), "h": (3600.0, _TIME),
    "second": (1.0, _TIME), "minute": (60.0, _TIME), "hour": (3600.0, _TIME),
    "W": (1.0, _POWER), "kW": (1000.0, _POWER), "hp": (_HP, _POWER),
    "J": (1.0, _ENERGY), "kJ": (1000.0, _ENERGY), "MJ": (1e6, _ENERGY),
    "Wh": (3600.0, _ENERGY), "kWh": (3.6e6, _ENERGY),
    "V": (1.0, _VOLTAGE), "A": (1.0, _CURRENT), "mA": (0.001, _CURRENT),
    "Ah": (3600.0, _dim(current=1, time=1)), "mAh": (3.6, _dim(current=1, time=1)),
    "ohm": (1.0, _dim(mass=1, length=2, time=-3, current=-2)),
    "mohm": (0.001, _dim(mass=1, length=2, time=-3, current=-2)),
    "K": (1.0, _TEMPERATURE), "delta_degC": (1.0, _TEMPERATURE),
    "delta_degF": (5.0 / 9.0, _TEMPERATURE),
    "Pa": (1.0, _PRESSURE), "hPa": (100.0, _PRESSURE), "kPa": (1000.0, _PRESSURE),
    "inHg": (0.0254 * 13595.1 * _G0, _PRESSURE),
    "percent": (0.01, _NONE), "deg": (np.pi / 180.0, _NONE), "rad": (1.0, _NONE),
    "revolution": (_REV, _NONE), "rpm": (_REV / 60.0, _dim(time=-1)),
}
#: Absolute temperatures: name -> (SI factor, dimension, offset [K]);
#: K = value * factor + offset.
FAST_OFFSET_UNITS = {
    "degC": (1.0, _TEMPERATURE, 273.15),
    "degF": (5.0 / 9.0, _TEMPERATURE, 233.15 + 200.0 / 9.0),
}
# pint's wording of the dimension of the SI units the code converts to (for messages);
# a target not listed here goes to pint when the dimensions differ.
_DIMENSION_TEXT = {
    "": "dimensionless", "m": "[length]", "m/s": "[length] / [time]", "kg": "[mass]", "s": "[time]",
    "K": "[temperature]", "A": "[current]", "m^2": "[length] ** 2",
    "m^3": "[length] ** 3", "kg/m^3": "[mass] / [length] ** 3",
    "W": "[mass] * [length] ** 2 / [time] ** 3",
    "J": "[mass] * [length] ** 2 / [time] ** 2", "A*s": "[current] * [time]",
    "V": "[mass] * [length] ** 2 / [time] ** 3 / [current]",
    "Pa": "[mass] / [length] / [time] ** 2", "kg/J": "[time] ** 2 / [length] ** 2",
    "1/s": "1 / [time]", "revolution/minute": "1 / [time]",
    "ohm": "[mass] * [length] ** 2 / [time] ** 3 / [current] ** 2",
}
_TOKEN = re.compile(r"\s*(\*\*|[*/^()]|[A-Za-z_]+|\d+)\s*")


def _tokens(unit: str):
    pos, out = 0, []
    while pos < len(unit):
        m = _TOKEN.match(unit, pos)
        if not m:
            return None
        out.append(m.group(1))
        pos = m.end()
    return out


@functools.lru_cache(maxsize=512)
def _fast_unit(unit: str):
    """SI factor, dimension and offset of a unit expression from the fast table.

    Parameters
    ----------
    unit : str
        A unit expression as normalised by :func:`normalise_unit`: a unit of
        :data:`FAST_UNITS`, or products (``*``), quotients (``/``), integer powers (``^``
        or ``**``) and parentheses of them; or one of :data:`FAST_OFFSET_UNITS` alone.

    Returns
    -------
    tuple or None
        ``(factor, dimension, offset)`` with ``value_si = value * factor + offset``;
        None when the expression is not all from the table (pint then reads it).
    """
    unit = unit.strip()
    if unit in FAST_OFFSET_UNITS:
        return FAST_OFFSET_UNITS[unit]
    if not unit:
        return 1.0, _NONE, 0.0
    tokens = _tokens(unit)
    if not tokens:
        return None
    pos = 0

    def atom():
        nonlocal pos
        if pos >= len(tokens):
            raise ValueError(unit)
        tok = tokens[pos]
        pos += 1
        if tok == "(":
            value = product()
            if pos >= len(tokens) or tokens[pos] != ")":
                raise ValueError(unit)
            pos += 1
        elif tok == "1":
            value = (1.0, _NONE)
        elif tok in FAST_UNITS:
            value = FAST_UNITS[tok]
        else:
            raise ValueError(unit)
        if pos < len(tokens) and tokens[pos] in ("^", "**"):
            if pos + 1 >= len(tokens) or not tokens[pos + 1].isdigit():
                raise ValueError(unit)
            n = int(tokens[pos + 1])
            pos += 2
            value = (value[0] ** n, tuple(d * n for d in value[1]))
        return value

    def product():
        nonlocal pos
        factor, dim = atom()
        while pos < len(tokens) and tokens[pos] in ("*", "/"):
            op = tokens[pos]
            pos += 1
            f, d = atom()
            sign = 1 if op == "*" else -1
            factor = factor * f if sign > 0 else factor / f
            dim = tuple(a + sign * b for a, b in zip(dim, d))
        return factor, dim

    try:
        factor, dim = product()
    except ValueError:
        return None
    if pos != len(tokens):
        return None
    return factor, dim, 0.0


def _fast_convert(number: float, from_unit: str, to_unit: str):
    """``number`` in ``from_unit`` expressed in ``to_unit`` from the fast table.

    Returns
    -------
    float or None or bool
        The converted value; None when either unit is not in the table; False when both
        are but their dimensions differ.
    """
    a, b = _fast_unit(from_unit), _fast_unit(to_unit)
    if a is None or b is None:
        return None
    if a[1] != b[1]:
        return False
    if a[2] == 0.0 and b[2] == 0.0:
        return number * (a[0] / b[0])
    return (number * a[0] + a[2] - b[2]) / b[0]


@functools.lru_cache(maxsize=1)
def registry():
    """Return the package's single pint ``UnitRegistry``.

    Returns
    -------
    pint.UnitRegistry
        Built on first use, with its parsed definitions cached on disk so that later
        processes start faster.
    """
    import pint

    try:
        ureg = pint.UnitRegistry(cache_folder=":auto:")
    except Exception:  # pragma: no cover - read-only home or no cache support
        ureg = pint.UnitRegistry()
    return ureg


def normalise_unit(unit: str) -> str:
    """Unit text with the aviation spellings pint misreads replaced (``nm`` -> ``nmi``).

    Parameters
    ----------
    unit : str
        A unit expression as written.

    Returns
    -------
    str
        The expression pint reads as meant.
    """
    for pattern, repl in _ALIASES:
        unit = pattern.sub(repl, unit)
    return unit.strip()


def is_quantity(value) -> bool:
    """Tell whether ``value`` is a pint Quantity, without importing pint.

    Parameters
    ----------
    value : object
        Anything.

    Returns
    -------
    bool
        True for a pint Quantity (of any unit).
    """
    return type(value).__module__.startswith("pint") and hasattr(value, "magnitude")


@functools.lru_cache(maxsize=256)
def _factor(from_unit: str, to_unit: str) -> float:
    a, b = _fast_unit(from_unit), _fast_unit(to_unit)
    if a is not None and b is not None and a[1] == b[1] and a[2] == b[2] == 0.0:
        return a[0] / b[0]
    ureg = registry()
    return float(ureg.Quantity(1.0, from_unit).to(to_unit).magnitude)


def conversion_factor(from_unit: str, to_unit: str) -> float:
    """Return the factor that multiplies a value in ``from_unit`` to give ``to_unit``.

    Parameters
    ----------
    from_unit, to_unit : str
        pint unit expressions of the same dimension (not offset units such as degC).

    Returns
    -------
    float
        The multiplicative conversion factor.
    """
    return _factor(normalise_unit(from_unit), normalise_unit(to_unit))


def parse_quantity(text, si_unit: str, *, default_unit: str | None = None,
                   what: str = "value", delta_temperature: bool = False) -> float:
    """Parse a number with a unit (``"7777 ft"``, ``"120 kt"``) into an SI float.

    Parameters
    ----------
    text : str or float or int
        The text to parse [any unit of the dimension of ``si_unit``]. A bare number is
        taken in ``default_unit`` (or in ``si_unit`` when no default is given).
    si_unit : str
        The SI unit to convert to, e.g. ``"m"``; it also fixes the expected dimension.
    default_unit : str, optional
        Unit assumed for a bare number.
    what : str
        Name of the field, used in error messages.
    delta_temperature : bool
        Read degC/degF as temperature differences (for an ISA deviation).

    Returns
    -------
    float
        The value in ``si_unit``.

    Raises
    ------
    UnitError
        When the text is not a number with a unit of the expected dimension.
    """
    if isinstance(text, bool):
        raise UnitError(f"{what}: expected a quantity in units of {si_unit}, got {text!r}")
    if isinstance(text, (int, float)):
        if not default_unit:
            return float(text)
        # An offset unit (degC, degF) converts with its offset, not as a factor.
        fast = _fast_convert(float(text), normalise_unit(default_unit), si_unit)
        if fast is not None and fast is not False:
            return float(fast)
        return float(text) * conversion_factor(default_unit, si_unit)
    if is_quantity(text):
        return float(to_si(text, si_unit, what=what))
    if not isinstance(text, str):
        raise UnitError(f"{what}: expected a quantity such as '12 {si_unit}', got {text!r}")
    match = _NUMBER.match(text)
    if not match:
        raise UnitError(f"{what}: cannot read {text!r} as a number with a unit "
                        f"(expected e.g. '12 {si_unit or 'units'}')")
    number = float(match.group(1))
    if not np.isfinite(number):
        raise UnitError(f"{what}: {text!r} is not a finite number")
    unit = normalise_unit(match.group(2))
    if not unit:
        unit = default_unit or si_unit
    if delta_temperature:
        unit = {"degC": "delta_degC", "°C": "delta_degC", "C": "delta_degC",
                "degF": "delta_degF", "°F": "delta_degF", "F": "delta_degF"}.get(unit, unit)
    fast = _fast_convert(number, unit, si_unit)
    if fast is not None and fast is not False:
        return float(fast)
    if fast is False and si_unit in _DIMENSION_TEXT:
        raise UnitError(f"{what}: {text!r} is not a quantity of dimension "
                        f"{_DIMENSION_TEXT[si_unit]} "
                        f"(expected a value in units such as {si_unit or 'a plain number'})")
    ureg = registry()
    try:
        q = ureg.Quantity(number, unit)
        return float(q.to(si_unit).magnitude)
    except Exception:
        expected = ureg.Quantity(1.0, si_unit).dimensionality if si_unit else "dimensionless"
        raise UnitError(f"{what}: {text!r} is not a quantity of dimension {expected} "
                        f"(expected a value in units such as {si_unit or 'a plain number'})"
                        ) from None


def to_si(value, si_unit: str, *, what: str = "value"):
    """Convert a pint Quantity (any compatible unit) or an SI number to SI floats.

    Parameters
    ----------
    value : pint.Quantity or float or array_like or str
        A Quantity [any unit of the dimension of ``si_unit``] is converted to
        ``si_unit``; a plain number or array is taken to be in SI already [``si_unit``]
        and returned as a float array (or float); text is read by
        :func:`parse_quantity`.
    si_unit : str
        Target SI unit.
    what : str
        Name used in error messages.

    Returns
    -------
    float or numpy.ndarray
        The value in ``si_unit``.

    Raises
    ------
    UnitError
        When a Quantity or text has a dimension other than that of ``si_unit``, or text
        cannot be read as a number with a unit.
    """
    if is_quantity(value):
        try:
            mag = value.to(si_unit).magnitude
        except Exception:
            raise UnitError(f"{what}: {value!s} cannot be converted to {si_unit} "
                            f"(wrong dimension)") from None
        return np.asarray(mag, dtype=float) if np.ndim(mag) else float(mag)
    if isinstance(value, str):
        return parse_quantity(value, si_unit, what=what)
    arr = np.asarray(value, dtype=float)
    return arr if arr.ndim else float(arr)


def fraction(value, *, what: str = "value"):
    """A fraction [-] from a plain number (0.65) or a dimensionless Quantity (65 %).

    Parameters
    ----------
    value : float or array_like or pint.Quantity
        A fraction as a plain number or array [-], kept as it is (bit for bit), or a
        dimensionless Quantity such as ``65 * u.percent`` [percent, or any dimensionless
        unit].
    what : str, optional
        Name of the argument, for messages.

    Returns
    -------
    float or numpy.ndarray
        The fraction [-].

    Raises
    ------
    UnitError
        When a Quantity is not dimensionless.
    """
    if is_quantity(value) or isinstance(value, str):
        return to_si(value, "", what=what)
    return value


def to_store(value, propulsion, *, what: str = "fuel"):
    """An amount of fuel or energy in the store's SI unit (kg of fuel or J).

    Parameters
    ----------
    value : float or array_like or pint.Quantity
        A plain number [kg of fuel or J of usable energy], returned as :func:`to_si`
        returns it; or a Quantity: a volume of fuel [any volume unit] (converted through
        the airframe's fuel density), a mass of fuel [any mass unit] or an energy [any
        energy unit] for a battery.
    propulsion : object
        The propulsion kind: its ``store`` (``unit``, ``burns_mass``) and, for fuel, its
        ``fuel_density`` [kg/m^3].
    what : str, optional
        Name of the argument, for messages.

    Returns
    -------
    float or numpy.ndarray
        The amount [kg or J].

    Raises
    ------
    UnitError
        When a Quantity is of none of the accepted dimensions.
    """
    store = propulsion.store
    if not is_quantity(value):
        return to_si(value, store.unit, what=what)
    if store.burns_mass and value.check("[length] ** 3"):
        return to_si(value, "m^3", what=what) * propulsion.fuel_density
    if not value.check(store.unit):
        kinds = "a volume or mass of fuel" if store.burns_mass else "an energy"
        raise UnitError(f"{what}: {value!s} is not {kinds} (expected e.g. "
                        + ("'50 L' or '36 kg')" if store.burns_mass else "'450 Wh')"))
    return to_si(value, store.unit, what=what)


def quantity_of(obj, name: str, table: dict, *, store_unit: str | None = None):
    """Field ``name`` of a result object as a pint Quantity in SI units.

    Parameters
    ----------
    obj : object
        A result object (its fields, properties or methods without arguments).
    name : str
        The field; a key of ``table``.
    table : dict
        Field name -> SI unit (``""`` for dimensionless; ``"store"`` in it stands for the
        store's unit, kg of fuel or J of energy, e.g. ``"m/store"``).
    store_unit : {"kg", "J"}, optional
        The store's unit, for the fields marked ``"store"``.

    Returns
    -------
    pint.Quantity
        The value [the SI unit of ``table[name]``].

    Raises
    ------
    CruiseplanError
        For a name not in the table, listing the known ones, or a store field without
        ``store_unit``.
    """
    unit = lookup(table, name, "field with a unit")
    if "store" in unit:
        if store_unit is None:
            raise UnitError(f"{name}: give store_unit ('kg' of fuel or 'J' of energy)")
        unit = unit.replace("store", store_unit)
    value = getattr(obj, name)
    if callable(value):
        value = value()
    value = np.asarray(value, dtype=float) if np.ndim(value) else float(value)
    return registry().Quantity(value, unit or "dimensionless")


def parse_range(text: str, si_unit: str, *, default_unit: str | None = None,
                what: str = "values") -> np.ndarray:
    """Parse ``"a:b:step"`` or ``"a,b,c"`` (each with optional units) into SI values.

    ``"0:8000ft:2000ft"`` gives 0, 2000, 4000, 6000, 8000 ft in metres; the end point is
    included when the step divides the span. A unit written on any element applies to
    bare numbers in the same expression (``"0:3000:500 ft"``).

    Parameters
    ----------
    text : str
        The range or list.
    si_unit : str
        SI unit to convert to.
    default_unit : str, optional
        Unit of bare numbers when the expression names none.
    what : str
        Name used in error messages.

    Returns
    -------
    numpy.ndarray
        One-dimensional array of SI values [``si_unit``].

    Raises
    ------
    UnitError
        For an empty list or element, a range that is not ``start:stop:step`` with
        stop >= start and a positive step, more than 100000 points, or an element that
        is not a quantity of the expected dimension.
    """
    text = text.strip()
    if not text:
        raise UnitError(f"{what}: empty list")
    sep = ":" if ":" in text else ","
    parts = [p.strip() for p in text.split(sep)]
    if any(not p for p in parts):
        raise UnitError(f"{what}: empty element in {text!r}")
    # A unit on any element is the default for bare numbers in the expression.
    shared = default_unit
    for p in parts:
        m = _NUMBER.match(p)
        if m and m.group(2):
            shared = m.group(2)
    values = [parse_quantity(p, si_unit, default_unit=shared, what=what) for p in parts]
    if sep == ",":
        return np.asarray(values, dtype=float)
    if len(values) != 3:
        raise UnitError(f"{what}: a range is 'start:stop:step', got {text!r}")
    start, stop, step = values
    if step <= 0 or stop < start:
        raise UnitError(f"{what}: range {text!r} needs stop >= start and a positive step")
    count = float(np.floor((stop - start) / step + 1e-9)) + 1.0
    if not count <= 100000:   # also an infinite count (a tiny step over a huge span)
        shown = f"{count:.0f}" if count < 1e15 else f"{count:.3g}"
        raise UnitError(f"{what}: range {text!r} has {shown} points; at most 100000 allowed")
    n = int(count)
    return start + step * np.arange(n)


def temperature_difference(value, *, what: str = "isa_dev") -> float:
    """An ISA deviation (a temperature *difference*) in kelvin.

    Parameters
    ----------
    value : float or str or pint.Quantity
        Kelvin as a plain number [K]; text such as ``"+10 degC"``; or a Quantity in K,
        delta_degC, delta_degF, or degC/degF (whose magnitude is then read as a
        difference, as a pilot writing "ISA +10 degC" means).
    what : str, optional
        Name used in error messages.

    Returns
    -------
    float or numpy.ndarray
        The difference [K].

    Raises
    ------
    UnitError
        When the value is not a temperature difference.
    """
    if isinstance(value, str):
        return parse_quantity(value, "K", what=what, delta_temperature=True)
    if is_quantity(value):
        unit = str(value.units)
        scale = {"degree_Celsius": 1.0, "degree_Fahrenheit": 5.0 / 9.0}.get(unit)
        if scale is not None:
            mag = np.asarray(value.magnitude, dtype=float) * scale
            return mag if mag.ndim else float(mag)
    return to_si(value, "K", what=what)


# --- Display units ---------------------------------------------------------------------

#: Display units by physical kind: (pint unit, label) per unit system.
UNIT_SYSTEMS = {
    "si": {
        "altitude": ("m", "m"), "speed": ("km/h", "km/h"), "mass": ("kg", "kg"),
        "volume": ("L", "L"), "distance": ("km", "km"), "power": ("kW", "kW"),
        "volume_flow": ("L/h", "L/h"), "mass_flow": ("kg/h", "kg/h"),
        "energy": ("Wh", "Wh"), "electric_power": ("W", "W"),
        "sr_fuel": ("km/L", "km/L"), "sr_energy": ("km/kWh", "km/kWh"),
        "rate": ("m/s", "m/s"), "pressure": ("hPa", "hPa"),
        "manifold_pressure": ("hPa", "hPa"),
    },
    "aviation": {
        "altitude": ("ft", "ft"), "speed": ("kt", "kt"), "mass": ("lb", "lb"),
        "volume": ("gallon", "US gal"), "distance": ("nmi", "nm"), "power": ("hp", "hp"),
        "volume_flow": ("gallon/h", "US gal/h"), "mass_flow": ("lb/h", "lb/h"),
        "energy": ("Wh", "Wh"), "electric_power": ("W", "W"),
        "sr_fuel": ("nmi/gallon", "nm/US gal"), "sr_energy": ("nmi/kWh", "nm/kWh"),
        "rate": ("ft/min", "ft/min"), "pressure": ("hPa", "hPa"),
        "manifold_pressure": ("inHg", "inHg"),
    },
}
_SI_OF_KIND = {
    "altitude": "m", "speed": "m/s", "mass": "kg", "volume": "m^3", "distance": "m",
    "power": "W", "volume_flow": "m^3/s", "mass_flow": "kg/s", "energy": "J",
    "electric_power": "W", "sr_fuel": "m/m^3", "sr_energy": "m/J", "rate": "m/s",
    "pressure": "Pa", "manifold_pressure": "Pa",
}


def _override_label(unit: str) -> str:
    """The printed label of an override unit (``gallon`` -> ``US gal``, ``nmi`` -> ``nm``)."""
    for name, text in (("gallon", "US gal"), ("nmi", "nm")):
        unit = re.sub(rf"(?<![A-Za-z_]){name}(?![A-Za-z_])", text, unit)
    return unit


def check_override(kind: str, unit: str, *, what: str = "--unit") -> str:
    """Check one per-quantity override: a known kind and a unit of its dimension.

    Parameters
    ----------
    kind : str
        A kind of :data:`UNIT_SYSTEMS`, e.g. ``"volume"``.
    unit : str
        The display unit wanted for it, e.g. ``"L"`` [any unit of the kind's dimension].
    what : str, optional
        The option or field named in errors.

    Returns
    -------
    str
        The unit, normalised (``kts`` -> ``kt``).

    Raises
    ------
    UnitError
        For an unknown kind (listing the valid ones), or a unit that is empty, contains
        ``;`` or ``=``, or is not of the kind's dimension.
    """
    if kind not in _SI_OF_KIND:
        raise UnitError(f"{what} {kind}={unit}: unknown kind {kind!r}; valid kinds: "
                        f"{', '.join(sorted(_SI_OF_KIND))}")
    norm = normalise_unit(unit) if isinstance(unit, str) else ""
    if not norm or ";" in norm or "=" in norm:
        raise UnitError(f"{what} {kind}={unit}: give a unit, e.g. {kind}="
                        f"{UNIT_SYSTEMS['si'][kind][0]}")
    fast = _fast_convert(1.0, _SI_OF_KIND[kind], norm)
    if fast is False or (fast is not None and not np.isfinite(fast)):
        ok = False
    elif fast is None:
        try:
            ok = np.isfinite(conversion_factor(_SI_OF_KIND[kind], norm))
        except Exception:
            ok = False
    else:
        ok = True
    if not ok:
        raise UnitError(f"{what} {kind}={unit}: {unit!r} is not a unit of {kind} (e.g. "
                        f"{UNIT_SYSTEMS['si'][kind][0]} or {UNIT_SYSTEMS['aviation'][kind][0]})")
    return norm


def unit_choice(system: str, overrides=()) -> str:
    """The display-units value of a unit system with per-quantity overrides.

    Parameters
    ----------
    system : {"aviation", "si"}
        The base unit system.
    overrides : dict or iterable of (str, str), optional
        Kind -> display unit, e.g. ``{"volume": "L", "mass": "kg"}``; checked with
        :func:`check_override`.

    Returns
    -------
    str
        ``"aviation"`` when there are no overrides, else e.g. ``"aviation;mass=kg;volume=L"``
        (kinds sorted), the value :func:`display` reads.

    Raises
    ------
    CruiseplanError
        For an unknown system, kind, or a unit of the wrong dimension.
    """
    lookup(UNIT_SYSTEMS, system, "unit system")
    items = dict(overrides.items() if isinstance(overrides, dict) else overrides)
    parts = [f"{k}={check_override(k, v)}" for k, v in sorted(items.items())]
    return ";".join([system, *parts])


@functools.lru_cache(maxsize=64)
def _parse_choice(units: str) -> tuple:
    system, *parts = units.split(";")
    table = dict(lookup(UNIT_SYSTEMS, system.strip(), "unit system"))
    for part in parts:
        kind, sep, unit = part.partition("=")
        if not sep:
            raise UnitError(f"units {units!r}: {part!r} is not KIND=UNIT")
        kind = kind.strip()
        norm = check_override(kind, unit.strip(), what="units")
        table[kind] = (norm, _override_label(norm))
    return system.strip(), table


def display(kind: str, units: str):
    """Factor from SI and label of a physical kind in a display unit system.

    Parameters
    ----------
    kind : str
        A key of the unit systems, e.g. ``"altitude"``, ``"speed"``, ``"volume_flow"``.
    units : str
        The display units: a unit system, ``"aviation"`` or ``"si"``, optionally followed
        by per-quantity overrides ``;KIND=UNIT`` (``"aviation;volume=L;mass=kg"``: feet and
        knots with litres and kilograms). Build it with :func:`unit_choice`; it is parsed
        once per process (cached). An override of ``volume`` also sets ``volume_flow``
        (per hour) and ``sr_fuel`` (distance per volume), ``mass`` sets ``mass_flow`` and
        ``distance`` sets ``sr_fuel`` and ``sr_energy``, unless they are given themselves.

    Returns
    -------
    factor : float
        Multiplies an SI value to give the display value.
    label : str
        The unit as printed.

    Raises
    ------
    CruiseplanError
        For an unknown unit system, listing the known ones, an unknown kind, or an
        override of the wrong dimension.
    """
    system, table = _parse_choice(units)
    pint_unit, label = lookup(table, kind, "kind of quantity")
    if ";" in units:
        pint_unit, label = _derived(kind, units, table) or (pint_unit, label)
    return conversion_factor(_SI_OF_KIND[kind], pint_unit), label


def _derived(kind: str, units: str, table: dict):
    """The unit of a rate or ratio kind from the overridden units it is made of, or None."""
    given = {p.partition("=")[0].strip() for p in units.split(";")[1:]}
    if kind in given:
        return None

    def wrap(u):
        return f"({u})" if any(c in u for c in "/*") else u

    if kind == "volume_flow" and "volume" in given:
        u, lab = table["volume"]
        return f"{wrap(u)}/h", f"{lab}/h"
    if kind == "sr_fuel" and ({"volume", "distance"} & given):
        (d, ld), (v, lv) = table["distance"], table["volume"]
        return f"{wrap(d)}/{wrap(v)}", f"{ld}/{lv}"
    if kind == "mass_flow" and "mass" in given:
        u, lab = table["mass"]
        return f"{wrap(u)}/h", f"{lab}/h"
    if kind == "sr_energy" and "distance" in given:
        d, ld = table["distance"]
        return f"{wrap(d)}/kWh", f"{ld}/kWh"
    return None
