r"""Flight logs for the drag-polar fit: CSV in, and the fitted airframe file's text.

This is the file edge of :mod:`cruiseplan.planning.fit` (pint is used here, never in the
fit). A log
is a CSV file whose header names each column from a fixed set, with its unit in brackets
(``cas [kt]``, ``oat [degC]``, ``fuel_flow [L/h]``); any unit pint reads for the column's
dimension is accepted. Lines starting with ``#`` are comments. One row is one stabilised
level-flight point:

========================  ==========================  =====================================
column                    dimension                   notes
========================  ==========================  =====================================
``pressure_altitude``     length                      required
``oat`` | ``isa_dev``     temperature | difference    exactly one
``cas`` | ``tas``         speed                       exactly one (CAS is corrected to TAS)
``mass`` | ``weight``     mass (weight: mass/force)   exactly one
``electric_power``        power                       battery power; or ``voltage`` and
                                                      ``current`` (their product)
``shaft_power``           power                       or
``fuel_flow``             volume/time or mass/time    exactly one power source
``vertical_speed``        speed                       optional: rows beyond 100 ft/min are
                                                      dropped (not level flight)
``time``                  time                        optional, kept for reference
========================  ==========================  =====================================

:func:`read_flight_log` returns a :class:`FlightLog` of SI arrays; :func:`fitted_airframe_text`
rewrites an airframe file's ``[polar]`` values, keeping every other byte. The report of a
fit is :func:`cruiseplan.report.fit_report.fit_report`.

References
----------
.. [1] R. D. Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, AIAA Education Series,
   2003, ch. 9 (level-flight performance tests: stabilised points, PIW-VIW reduction).
.. [2] J. D. Anderson, *Introduction to Flight*, 8th ed., McGraw-Hill, 2016, sec. 4.12
   (calibrated to true airspeed).
"""

from __future__ import annotations

import csv
import hashlib
import math
import re
import warnings
from dataclasses import dataclass
from datetime import date
from pathlib import Path

import numpy as np

from cruiseplan.constants import FT_PER_MIN, G0
from cruiseplan.errors import AirframeFileError, CruiseplanError, CruiseplanWarning, LogFileError
from cruiseplan.io.airframe_file import read_airframe_text
from cruiseplan.io.schema import read_regular_file
from cruiseplan.physics.airspeed import tas_from_cas
from cruiseplan.physics.atmosphere import ALTITUDE_MAX, ALTITUDE_MIN, air_state
from cruiseplan.units import normalise_unit, registry

#: Largest vertical speed of a level-flight point [m/s]: 100 ft/min (common practice for
#: stabilised level points, no source).
LEVEL_LIMIT = 100.0 * FT_PER_MIN
#: Fewest level-flight points a log must hold for the fit.
MIN_POINTS = 5


@dataclass(frozen=True)
class LogColumn:
    """One column of the log format: SI units it may convert to, words for messages."""

    si_units: tuple
    what: str
    example: str
    positive: bool = True


#: The documented columns, by name.
#: Physical span of each log column in SI (beyond it a cell is a misread, never data):
#: temperatures -90 to 60 degC, speeds, masses and powers of a small aircraft or drone.
LOG_SPANS = {
    "oat": (183.15, 333.15), "isa_dev": (-60.0, 60.0), "cas": (0.0, 300.0),
    "tas": (0.0, 300.0), "mass": (0.0, 1.0e5), "weight": (0.0, 1.0e6),
    "electric_power": (0.0, 1.0e7), "voltage": (0.0, 1.0e4), "current": (0.0, 1.0e4),
    "shaft_power": (0.0, 1.0e7), "fuel_flow": (0.0, 1.0), "vertical_speed": (-100.0, 100.0),
    "time": (-1.0e9, 1.0e10),
}

LOG_COLUMNS = {
    "pressure_altitude": LogColumn(("m",), "a length (altitude)", "ft", positive=False),
    "oat": LogColumn(("K",), "a temperature", "degC"),
    "isa_dev": LogColumn(("K",), "a temperature difference", "K", positive=False),
    "cas": LogColumn(("m/s",), "a speed", "kt"),
    "tas": LogColumn(("m/s",), "a speed", "m/s"),
    "mass": LogColumn(("kg",), "a mass", "kg"),
    "weight": LogColumn(("kg", "N"), "a mass or a force", "lb"),
    "electric_power": LogColumn(("W",), "a power", "W"),
    "voltage": LogColumn(("V",), "a voltage", "V"),
    "current": LogColumn(("A",), "a current", "A"),
    "shaft_power": LogColumn(("W",), "a power", "hp"),
    "fuel_flow": LogColumn(("m^3/s", "kg/s"), "a volume or mass flow", "L/h"),
    "vertical_speed": LogColumn(("m/s",), "a speed", "ft/min", positive=False),
    "time": LogColumn(("s",), "a time", "s", positive=False),
}

#: What a log must give, one alternative from each group.
_GROUPS = (
    ("pressure altitude", (("pressure_altitude",),)),
    ("temperature", (("oat",), ("isa_dev",))),
    ("airspeed", (("cas",), ("tas",))),
    ("mass", (("mass",), ("weight",))),
    ("power source", (("electric_power",), ("voltage", "current"), ("shaft_power",),
                      ("fuel_flow",))),
)
_OPTIONAL = ("vertical_speed", "time")

_EXPECTED = ("expected columns: pressure_altitude [ft]; oat [degC] or isa_dev [K]; "
             "cas [kt] or tas [m/s]; mass [kg] or weight [lb]; one power source: "
             "electric_power [W], voltage [V] with current [A], shaft_power [hp] or "
             "fuel_flow [L/h] (or [kg/h]); optional vertical_speed [ft/min] and time [s] "
             "(any unit of the right dimension)")

_HEADER = re.compile(r"^\s*([A-Za-z_][A-Za-z0-9_]*)\s*(?:\[(.*)\])?\s*$")


@dataclass(frozen=True)
class FlightLog:
    """Level-flight points of a log in SI units.

    Attributes
    ----------
    source : str
        The file read.
    checksum : str
        SHA-256 of its bytes.
    lines : numpy.ndarray
        Line number of each point in the file (1-based, comments included).
    pressure_altitude : numpy.ndarray
        Pressure altitude [m].
    temperature : numpy.ndarray
        Outside air temperature [K].
    density : numpy.ndarray
        Air density [kg/m^3].
    tas : numpy.ndarray
        True airspeed [m/s].
    mass : numpy.ndarray
        Aircraft mass [kg].
    power_source : str
        A key of :data:`cruiseplan.planning.fit.POWER_SOURCES`: ``electric_power``, ``shaft_power``,
        ``fuel_mass_flow`` or ``fuel_volume_flow``.
    power : numpy.ndarray
        That quantity [W, W, kg/s or m^3/s].
    vertical_speed : numpy.ndarray or None
        Vertical speed [m/s], when logged.
    time : numpy.ndarray or None
        Time [s], when logged.
    not_level : tuple of int
        Lines dropped because the vertical speed exceeded :data:`LEVEL_LIMIT`.
    airspeed_column : str
        ``"cas"`` or ``"tas"``: what the log gave.
    """

    source: str
    checksum: str
    lines: np.ndarray
    pressure_altitude: np.ndarray
    temperature: np.ndarray
    density: np.ndarray
    tas: np.ndarray
    mass: np.ndarray
    power_source: str
    power: np.ndarray
    vertical_speed: np.ndarray | None
    time: np.ndarray | None
    not_level: tuple
    airspeed_column: str

    @property
    def n_points(self) -> int:
        """Number of level-flight points."""
        return int(self.lines.size)


# --- reading ---------------------------------------------------------------------------------

def _rows(path: Path, text: str):
    """Header cells and (line number, cells) of the data rows; comments and blanks skipped."""
    header, rows = None, []
    for number, line in enumerate(text.splitlines(), start=1):
        if not line.strip() or line.lstrip().startswith("#"):
            continue
        cells = [c.strip() for c in next(csv.reader([line]))]
        if header is None:
            header = (number, cells)
        else:
            rows.append((number, cells))
    if header is None:
        raise LogFileError(f"{path}: no header line; {_EXPECTED}")
    return header, rows


def _columns(path: Path, cells: list) -> dict:
    """Column name -> (index, unit text) from the header, checked against the format."""
    found = {}
    for i, cell in enumerate(cells):
        m = _HEADER.match(cell)
        name = m.group(1) if m else cell
        if not m or name not in LOG_COLUMNS:
            raise LogFileError(f"{path}: unknown column {cell!r}; {_EXPECTED}")
        if m.group(2) is None or not m.group(2).strip():
            raise LogFileError(f"{path}: column {name!r} has no unit; write it as "
                               f"'{name} [{LOG_COLUMNS[name].example}]'")
        if name in found:
            raise LogFileError(f"{path}: column {name!r} appears twice")
        found[name] = (i, m.group(2).strip())
    for what, options in _GROUPS:
        given = [opt for opt in options if any(c in found for c in opt)]
        names = " or ".join(" with ".join(f"{c} [{LOG_COLUMNS[c].example}]" for c in opt)
                            for opt in options)
        if not given:
            raise LogFileError(f"{path}: no {what} column (give {names}); {_EXPECTED}")
        if len(given) > 1:
            both = " and ".join("+".join(opt) for opt in given)
            raise LogFileError(f"{path}: columns {both} both give the {what}; keep one")
        missing = [c for c in given[0] if c not in found]
        if missing:
            raise LogFileError(f"{path}: column {given[0][0]!r} needs "
                               f"'{missing[0]} [{LOG_COLUMNS[missing[0]].example}]' too; "
                               f"{_EXPECTED}")
    return found


def _convert(path: Path, name: str, unit: str, values: np.ndarray):
    """Values of a column in SI; returns (array, SI unit chosen)."""
    spec = LOG_COLUMNS[name]
    ureg = registry()
    text = normalise_unit(unit)
    if name == "isa_dev":
        text = {"degC": "delta_degC", "°C": "delta_degC", "degF": "delta_degF",
                "°F": "delta_degF"}.get(text, text)
    try:
        units = ureg.parse_units(text)
    except Exception:
        raise LogFileError(f"{path}: column '{name} [{unit}]': unit {unit!r} is not known; "
                           f"give {spec.what} in units such as {spec.example}") from None
    for si in spec.si_units:
        try:
            return np.asarray(ureg.Quantity(values, units).to(si).magnitude, dtype=float), si
        except Exception:
            continue
    raise LogFileError(f"{path}: column '{name} [{unit}]': {unit} is not {spec.what} "
                       f"(dimension {ureg.get_dimensionality(spec.si_units[0])}); use "
                       f"units such as {spec.example}")


def _number_table(path: Path, header_cells, rows, columns: dict):
    """Raw numbers of the used columns, shape (n_rows, n_columns), with line numbers."""
    width = len(header_cells)
    lines = np.array([n for n, _ in rows], dtype=int)
    table = np.empty((len(rows), width))
    for r, (number, cells) in enumerate(rows):
        if len(cells) != width:
            raise LogFileError(f"{path}: line {number} has {len(cells)} values; the header "
                               f"has {width} columns")
        for j, cell in enumerate(cells):
            try:
                value = float(cell)
            except ValueError:
                value = math.nan
            if not math.isfinite(value):
                raise LogFileError(f"{path}: line {number}, column {header_cells[j]!r}: "
                                   f"{cell!r} is not a finite number")
            table[r, j] = value
    return lines, table


#: Largest flight log read [bytes] (about a million rows).
MAX_LOG_BYTES = 64 * 2**20


def read_flight_log(path, *, level_limit: float = LEVEL_LIMIT) -> FlightLog:
    """Read a level-flight log (CSV with units in the header) into SI arrays.

    Parameters
    ----------
    path : str or pathlib.Path
        The CSV file (see the module docstring for its columns).
    level_limit : float, optional
        Largest vertical speed of a level-flight point [m/s]; 100 ft/min by default
        (common practice).

    Returns
    -------
    FlightLog
        The level points, air density and TAS worked out (CAS through the compressible
        pitot relations [2]_ at the logged pressure altitude and temperature).

    Raises
    ------
    LogFileError
        For a missing, unknown or doubled column, a unit of the wrong dimension, a cell that
        is not a number, an out-of-range value, or fewer than :data:`MIN_POINTS` level points.

    Warns
    -----
    CruiseplanWarning
        Naming the lines dropped as not level (|vertical speed| above ``level_limit``).

    References
    ----------
    .. [1] Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, ch. 9.
    .. [2] Anderson, *Introduction to Flight*, sec. 4.12.
    """
    path = Path(path)
    raw = read_regular_file(path, LogFileError, "flight log", MAX_LOG_BYTES)
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise LogFileError(f"{path}: not a UTF-8 text file") from None
    (_, header_cells), rows = _rows(path, text)
    columns = _columns(path, header_cells)
    if not rows:
        raise LogFileError(f"{path}: no data rows; the fit needs at least {MIN_POINTS} "
                           "level-flight points")
    lines, table = _number_table(path, header_cells, rows, columns)
    si, kinds = {}, {}
    for name, (j, unit) in columns.items():
        si[name], kinds[name] = _convert(path, name, unit, table[:, j])
        bad = ~(si[name] > 0) if LOG_COLUMNS[name].positive else np.zeros(lines.size, bool)
        if np.any(bad):
            i = int(np.argmax(bad))
            raise LogFileError(f"{path}: line {lines[i]}, column '{header_cells[j]}': "
                               f"{table[i, j]:g} must be positive")
        lo, hi = LOG_SPANS.get(name, (-math.inf, math.inf))
        out = ~((si[name] >= lo) & (si[name] <= hi))
        if np.any(out):
            i = int(np.argmax(out))
            raise LogFileError(f"{path}: line {lines[i]}, column '{header_cells[j]}': "
                               f"{table[i, j]:.6g} is out of range ({lo:g} to {hi:g} "
                               f"{kinds[name]})")

    h = si["pressure_altitude"]
    out = ~((h >= ALTITUDE_MIN) & (h <= ALTITUDE_MAX))
    if np.any(out):
        i = int(np.argmax(out))
        raise LogFileError(f"{path}: line {lines[i]}: pressure altitude {h[i]:.6g} m is "
                           f"outside {ALTITUDE_MIN:.0f} to {ALTITUDE_MAX:.0f} m")

    keep = np.ones(lines.size, dtype=bool)
    not_level = ()
    vs = si.get("vertical_speed")
    if vs is not None:
        keep = np.abs(vs) <= level_limit
        not_level = tuple(int(n) for n in lines[~keep])
        if not_level:
            which = "line" if len(not_level) == 1 else "lines"
            warnings.warn(f"{path}: {which} {', '.join(map(str, not_level))} dropped: "
                          f"|vertical speed| above {level_limit / 0.00508:.0f} ft/min, not "
                          "level flight (common practice)", CruiseplanWarning, stacklevel=2)
    n = int(np.count_nonzero(keep))
    if n < MIN_POINTS:
        raise LogFileError(f"{path}: {n} level-flight points; the fit needs at least "
                           f"{MIN_POINTS}, spread over the speed range")
    si = {k: v[keep] for k, v in si.items()}
    lines = lines[keep]
    h = si["pressure_altitude"]

    if "oat" in si:
        air = air_state(h, oat=si["oat"])
    else:
        air = air_state(h, si["isa_dev"])
    if "tas" in si:
        tas, speed = si["tas"], "tas"
    else:
        tas, speed = tas_from_cas(si["cas"], air.pressure, air.speed_of_sound), "cas"
    if "mass" in si:
        mass = si["mass"]
    else:
        mass = si["weight"] / (G0 if kinds["weight"] == "N" else 1.0)
    if "electric_power" in si:
        source, power = "electric_power", si["electric_power"]
    elif "voltage" in si:
        source, power = "electric_power", si["voltage"] * si["current"]
    elif "shaft_power" in si:
        source, power = "shaft_power", si["shaft_power"]
    else:
        source = "fuel_volume_flow" if kinds["fuel_flow"] == "m^3/s" else "fuel_mass_flow"
        power = si["fuel_flow"]
    return FlightLog(
        source=str(path), checksum=hashlib.sha256(raw).hexdigest(), lines=lines,
        pressure_altitude=h, temperature=np.asarray(air.temperature, dtype=float),
        density=np.asarray(air.density, dtype=float), tas=np.asarray(tas, dtype=float),
        mass=mass, power_source=source, power=power, vertical_speed=si.get("vertical_speed"),
        time=si.get("time"), not_level=not_level, airspeed_column=speed)


# --- the fitted airframe file ----------------------------------------------------------------

_SECTION = re.compile(r"^\s*\[\s*([A-Za-z0-9_.\-\"' ]+?)\s*\]\s*(#.*)?$")
_KEY = re.compile(r"^(?P<lead>\s*)(?P<key>[A-Za-z0-9_]+)(?P<eq>\s*=\s*)(?P<value>[^#\r\n]*?)"
                  r"(?P<tail>[ \t]*(?:#[^\r\n]*)?)(?P<eol>\r?\n?)$")


def fitted_airframe_text(text: str, fit, *, log_name: str, when: date | None = None) -> str:
    """An airframe file's text with the fitted polar and what the fit knows of it.

    In ``[polar]`` only the values of ``cd0`` and ``oswald_e`` (or ``k``, whichever the
    file uses) change, and one comment line is added below the header naming the log, the
    date and the standard errors. In ``[uncertainty]`` (added at the end when the file has
    none) ``cd0`` and ``oswald_e`` become the fit's relative standard errors, and the
    ``[uncertainty.correlation]`` block the fitted correlation of the two (replacing any
    block there was), so that Monte Carlo samples the polar as the log pins it down. Every
    other byte, comments and other sections included, is kept.

    Parameters
    ----------
    text : str
        The original airframe file.
    fit : cruiseplan.planning.fit.FitResult
        The fit.
    log_name : str
        The flight log's file name, for the comment.
    when : datetime.date, optional
        Date for the comment (today by default).

    Returns
    -------
    str
        The new file text.

    Raises
    ------
    CruiseplanError
        When the file has no ``[polar]`` section with ``cd0`` and ``oswald_e`` or ``k``
        written one per line.
    """
    lines = text.splitlines(keepends=True)
    start = end = None
    for i, line in enumerate(lines):
        m = _SECTION.match(line)
        if m and start is None and m.group(1) == "polar":
            start = i
        elif (m or line.lstrip().startswith("[")) and start is not None and i > start:
            end = i
            break
    if start is None:
        raise CruiseplanError("the airframe file has no [polar] section to update")
    end = len(lines) if end is None else end
    new = {"cd0": f"{fit.cd0:.5f}", "oswald_e": f"{fit.oswald_e:.4f}", "k": f"{fit.k:.5f}"}
    done = set()
    for i in range(start + 1, end):
        m = _KEY.match(lines[i])
        if m and m.group("key") in new:
            key = m.group("key")
            lines[i] = (m.group("lead") + key + m.group("eq") + new[key] + m.group("tail")
                        + m.group("eol"))
            done.add(key)
    if "cd0" not in done or not done & {"oswald_e", "k"}:
        raise CruiseplanError("the airframe file's [polar] section has no 'cd0 = ...' and "
                              "'oswald_e = ...' (or 'k = ...') lines to update")
    shape = "k" if "k" in done else "oswald_e"
    se_shape = fit.se_k if shape == "k" else fit.se_oswald_e
    when = when or date.today()
    eta = "fitted" if fit.efficiency_fitted else "held"
    note = (f"# cd0 and {shape} fitted from {log_name} on {when.isoformat()} by cruiseplan "
            f"fit (PIW-VIW, {fit.n_used} points; standard errors {fit.se_cd0:.2g} and "
            f"{se_shape:.2g}; propeller efficiency {eta})")
    eol = "\r\n" if lines[start].endswith("\r\n") else "\n"
    if not lines[start].endswith(("\n", "\r")):
        lines[start] += eol
    lines.insert(start + 1, note + eol)
    return _fitted_uncertainty(lines, fit, eol, f"{log_name}, {when.isoformat()}")


def _section_span(lines, name):
    """(header index, index of the next header or the end) of ``[name]``, or None."""
    start = None
    for i, line in enumerate(lines):
        m = _SECTION.match(line)
        header = m or line.lstrip().startswith("[")
        if start is None and m and m.group(1) == name:
            start = i
        elif start is not None and header:
            return start, i
    return None if start is None else (start, len(lines))


def _fitted_uncertainty(lines, fit, eol, provenance) -> str:
    """Write the fit's relative standard errors and correlation into ``[uncertainty]``."""
    sd = {key: se / value for key, se, value in (("cd0", fit.se_cd0, fit.cd0),
                                                 ("oswald_e", fit.se_oswald_e, fit.oswald_e))
          if math.isfinite(se)}
    if not sd:
        return "".join(lines)
    new = {key: f'"{100.0 * v:.2f} %"' for key, v in sd.items()}
    note = (f"# {' and '.join(sd)}: the fit's relative standard errors"
            + (" and correlation" if math.isfinite(fit.correlation) else "")
            + f" ({provenance})")
    block = []
    if math.isfinite(fit.correlation) and len(sd) == 2:
        r = f"{fit.correlation:.3f}"
        block = ["[uncertainty.correlation]", 'parameters = ["cd0", "oswald_e"]',
                 f"matrix = [[1.0, {r}], [{r}, 1.0]]"]
    old = _section_span(lines, "uncertainty.correlation")
    if old is not None:
        # The whole block is the fit's now; a correlation of other parameters with the
        # polar's is not something the log can tell.
        a, b = old
        tail = [ln for ln in lines[a:b] if not ln.strip()][-1:]
        lines[a:b] = [ln + eol for ln in block] + tail
    span = _section_span(lines, "uncertainty")
    if span is None:
        if lines and not lines[-1].endswith(("\n", "\r")):
            lines[-1] += eol
        lines += [eol, note + eol, "[uncertainty]" + eol]
        lines += [f"{k} = {v}{eol}" for k, v in new.items()]
        if block:
            lines += [eol] + [ln + eol for ln in block]
        return "".join(lines)
    a, b = span
    done = set()
    for i in range(a + 1, b):
        m = _KEY.match(lines[i])
        if m and m.group("key") in new:
            key = m.group("key")
            lines[i] = (m.group("lead") + key + m.group("eq") + new[key] + m.group("tail")
                        + (m.group("eol") or eol))
            done.add(key)
    if block and old is None:
        last = max(i for i in range(a, b) if lines[i].strip())
        if not lines[last].endswith(("\n", "\r")):
            lines[last] += eol
        lines[last + 1:last + 1] = [eol] + [ln + eol for ln in block]
    if not lines[a].endswith(("\n", "\r")):
        lines[a] += eol
    lines[a + 1:a + 1] = [note + eol] + [f"{k} = {v}{eol}" for k, v in new.items()
                                         if k not in done]
    return "".join(lines)


def check_airframe_text(text: str):
    """Read an airframe file's text as :func:`cruiseplan.read_airframe` would.

    Parameters
    ----------
    text : str
        The file text, e.g. from :func:`fitted_airframe_text`.

    Returns
    -------
    Airframe
        The airframe it describes.

    Raises
    ------
    CruiseplanError
        When the text is not a valid airframe file (e.g. a fitted value out of range).
    """
    try:
        return read_airframe_text(text, "fitted airframe")
    except AirframeFileError as exc:
        reason = str(exc).split(": ", 1)[-1]
        raise CruiseplanError(f"the fitted polar does not make a valid airframe file: "
                              f"{reason}; check the log's power source and masses and the "
                              "propeller efficiency assumed") from None
