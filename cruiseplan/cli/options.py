"""Options shared by the commands, and reading them into SI.

Each option is read once here: the loading (``--weight | --fuel``, ``--payload``,
``--isa-dev``, ``--stall-margin``), the output (``--format``, ``--output``, ``--units``),
the Monte Carlo (``--monte-carlo``, ``--seed``), the wind (``--wind``/``--course`` or
``--headwind``), the forecast (``--forecast``, ``--departure``) and ``--power``.
"""

from __future__ import annotations

import argparse
import re
import sys
from pathlib import Path

import numpy as np

from cruiseplan.amounts import parse_amount
from cruiseplan.constants import DEFAULT_STALL_MARGIN, T_ZERO_C
from cruiseplan.errors import CruiseplanError, UnitError
from cruiseplan.io.settings import read_settings
from cruiseplan.io.text import parse_utc_time, parse_wind_profile
from cruiseplan.physics.atmosphere import isa_temperature_pressure
from cruiseplan.ranges import RANGES, check_range
from cruiseplan.report.output import (
    check_outputs,
    is_special,
    sidecar_path,
    write_atomic,
    write_files_atomic,
)
from cruiseplan.units import (
    UNIT_SYSTEMS,
    check_override,
    parse_quantity,
    parse_range,
    unit_choice,
)

AIRFRAME_HELP = "bundled airframe name or path to an airframe TOML file"


#: A word that is a negative number, with or without a unit (``-20kt``, ``-500,0ft``,
#: ``-.5``): a value, never an option.
_NEGATIVE = re.compile(r"^-(\d|\.\d)")


class Parser(argparse.ArgumentParser):
    """argparse with one-line errors (a :class:`CruiseplanError`, exit status 2).

    A word starting with a minus sign and a digit is a value (``--headwind -20kt``,
    ``--oat -10degC``, ``--altitudes -500,0ft``), never an option.
    """

    def _parse_optional(self, arg_string):
        if _NEGATIVE.match(arg_string):
            return None
        return super()._parse_optional(arg_string)

    def error(self, message):
        """Raise the message as a :class:`CruiseplanError` naming the subcommand once.

        Parameters
        ----------
        message : str
            argparse's message.

        Raises
        ------
        CruiseplanError
            Always: ``"SUBCOMMAND: message"`` (the CLI prints it and exits 2).
        """
        sub = self.prog.removeprefix("cruiseplan").strip()
        raise CruiseplanError(f"{sub}: {message}" if sub else message)


def number(quantity: str, *, integer: bool = False):
    """An argparse ``type``: a finite number in the physical range of ``quantity``.

    Parameters
    ----------
    quantity : str
        A key of :data:`cruiseplan.ranges.RANGES` (the number is in its SI unit).
    integer : bool, optional
        Read a whole number.

    Returns
    -------
    callable
        Text -> float (or int); raises :class:`argparse.ArgumentTypeError` with a one-line
        message (argparse names the option) for text that is not a number, a non-finite
        number or one out of range.
    """
    def read(text):
        try:
            value = int(text, 10) if integer else float(text)
        except (TypeError, ValueError):
            kind = "a whole number" if integer else "a number"
            raise argparse.ArgumentTypeError(f"{text!r} is not {kind}") from None
        try:
            check_range(value, quantity, repr(text))
        except CruiseplanError as exc:
            raise argparse.ArgumentTypeError(str(exc).removeprefix(f"{text!r}: ")) from None
        return value

    read.__name__ = quantity
    return read


def add_output(p, formats=("text", "csv", "json", "markdown")):
    """Add ``--format``, ``--output`` and ``--units`` to a command.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The command's parser.
    formats : tuple of str, optional
        Choices of ``--format``.
    """
    p.add_argument("--format", choices=formats, default="text", help="output format")
    p.add_argument("--output", "-o", metavar="FILE", help="write to FILE instead of stdout")
    if "csv" in formats:
        p.add_argument("--csv-header", action="store_true",
                       help="CSV: put the title, header lines, notes and cautions ahead of "
                            "the table as '#' lines (by default the CSV is a plain table "
                            "and they go to FILE.meta.txt beside --output FILE.csv)")
    add_units(p, "display units: aviation (ft, kt, lb, US gal, nm, hp) or si (m, km/h, kg, "
                 "L, km, kW); default aviation for piston airframes, si for electric ones")


def add_units(p, text="display units (default aviation for piston airframes, si for "
                      "electric ones)"):
    """Add ``--units`` to a command.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The command's parser.
    text : str, optional
        Help text of the option.
    """
    p.add_argument("--units", choices=("aviation", "si"), default=None, help=text)
    p.add_argument("--unit", action="append", default=[], metavar="KIND=UNIT",
                   help="display one kind of quantity in another unit, on top of --units "
                        "(repeatable), e.g. --unit volume=L --unit mass=kg; kinds: "
                        + ", ".join(sorted(UNIT_SYSTEMS["si"])) + "; defaults from "
                        "cruiseplan.toml or ~/.config/cruiseplan/settings.toml [units]")


def read_units(args, airframe=None) -> str:
    """The display units of a command: ``--units``/``--unit`` over the settings file.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options: ``units`` (``"aviation"``, ``"si"`` or None) and ``unit`` (a list
        of ``KIND=UNIT`` texts); either may be missing.
    airframe : Airframe, optional
        Its crews' units are the default system (else aviation).

    Returns
    -------
    str
        The value :func:`cruiseplan.units.display` reads, e.g. ``"aviation;volume=L"``.

    Raises
    ------
    CruiseplanError
        For a ``--unit`` that is not ``KIND=UNIT``, an unknown kind (listing the valid
        ones), a unit of the wrong dimension, or a bad settings file (naming it and the
        field).
    """
    settings = read_settings()
    system = (getattr(args, "units", None) or settings.system
              or (default_units(airframe) if airframe is not None else "aviation"))
    overrides = dict(settings.overrides)
    for text in getattr(args, "unit", None) or []:
        kind, sep, unit = text.partition("=")
        if not sep:
            raise UnitError(f"--unit {text}: expected KIND=UNIT, e.g. volume=L; valid "
                            f"kinds: {', '.join(sorted(UNIT_SYSTEMS['si']))}")
        overrides[kind.strip()] = check_override(kind.strip(), unit.strip())
    return unit_choice(system, overrides)


def add_loading(p):
    """Add ``--weight | --fuel``, ``--payload``, ``--isa-dev`` and ``--stall-margin``.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The command's parser.
    """
    load = p.add_mutually_exclusive_group()
    load.add_argument("--weight", help="aircraft mass, e.g. '1600 lb'")
    load.add_argument("--fuel", help="fuel or energy on board: '80 L', '20 gal', '55 kg', "
                                     "'450 Wh' or '80%%' of capacity (default full)")
    p.add_argument("--payload", help="crew and payload, e.g. '170 kg' (default from file)")
    p.add_argument("--isa-dev", default="0", help="ISA temperature deviation, e.g. '+15 K'")
    lo, hi = RANGES["stall_margin"][:2]
    p.add_argument("--stall-margin", type=number("stall_margin"), default=DEFAULT_STALL_MARGIN,
                   help=f"minimum TAS over stall speed, {lo:g} to {hi:g} "
                        f"(default {DEFAULT_STALL_MARGIN:g})")


#: Help of ``--pack-temperature`` on the table commands and the card.
PACK_TEMPERATURE_HELP = ("battery pack temperature, e.g. '5 degC' (a pack given as a circuit "
                         "in its airframe file; default the outside air temperature at the "
                         "lowest altitude)")


def add_pack_temperature(p, text=PACK_TEMPERATURE_HELP):
    """Add ``--pack-temperature`` to a command.

    Parameters
    ----------
    p : argparse.ArgumentParser or argparse._ArgumentGroup
        The command's parser (or an option group of it).
    text : str, optional
        Help text of the option.
    """
    p.add_argument("--pack-temperature", help=text)


def at_pack_temperature(af, args, altitude: float, isa_dev: float):
    """The airframe with its pack at ``--pack-temperature``, or at the day's temperature.

    Parameters
    ----------
    af : Airframe
        The airframe (a pack given as a circuit is what changes).
    args : argparse.Namespace
        Parsed options; ``pack_temperature`` is text such as ``"5 degC"`` [degC when
        bare], or None.
    altitude : float
        Pressure altitude whose outside air temperature is the default [m].
    isa_dev : float
        ISA deviation of the day [K].

    Returns
    -------
    airframe : Airframe
        The airframe with its pack at that temperature.
    celsius : float or None
        The pack temperature [degC]; None for an airframe without a circuit.

    Raises
    ------
    CruiseplanError
        For a temperature that cannot be read or is out of range, ``--pack-temperature``
        for an airframe without a circuit, or a temperature below the pack's table.
    """
    text = getattr(args, "pack_temperature", None)
    circuit = getattr(af.propulsion, "circuit", None)
    if circuit is None:
        if text is not None:
            raise CruiseplanError(f"--pack-temperature: {af.name} has no battery circuit "
                                  "([battery] in its file) to warm or cool")
        return af, None
    if text is None:
        celsius = float(isa_temperature_pressure(altitude)[0]) + isa_dev - T_ZERO_C
        where = f"pack at the outside air temperature {celsius:.0f} degC"
    else:
        celsius = parse_quantity(text, "K", default_unit="degC",
                                 what="--pack-temperature") - T_ZERO_C
        if not -90.0 <= celsius <= 85.0:
            raise UnitError(f"--pack-temperature: {text!r} is out of range (-90 to 85 degC)")
        where = "--pack-temperature"
    try:
        return af.at_pack_temperature(celsius), celsius
    except CruiseplanError as exc:
        raise CruiseplanError(f"{where}: {exc}") from None


def add_monte_carlo(p):
    """Add ``--monte-carlo N`` and ``--seed`` to a command.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The command's parser.
    """
    p.add_argument("--monte-carlo", type=number("monte_carlo", integer=True), metavar="N",
                   help="also report P10/P50/P90 over N samples of the tolerances in the "
                        "airframe (and mission) files, e.g. 10000")
    p.add_argument("--seed", type=number("seed", integer=True), default=0,
                   help="seed of the Monte Carlo, 0 to 4294967295 (default 0)")


def add_wind(p):
    """Add ``--wind | --headwind`` and ``--course`` to a command.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The command's parser.
    """
    wind = p.add_mutually_exclusive_group()
    wind.add_argument("--wind", help="winds aloft DIR/SPEED@ALT, e.g. "
                                     "'270/25@3000ft,250/40@8000ft' (needs --course)")
    wind.add_argument("--headwind", help="headwind component at every altitude, e.g. '20kt' "
                                         "(negative: tailwind)")
    p.add_argument("--course", type=number("course"),
                   help="true course [deg], 0 to 360, for --wind")


def add_forecast(p):
    """Add ``--forecast FILE`` and ``--departure TIME`` to a command.

    Parameters
    ----------
    p : argparse.ArgumentParser
        The command's parser.
    """
    g = p.add_argument_group("forecast", "winds and temperatures from a gridded forecast "
                                         "(CF netCDF), sampled along the route at the legs' "
                                         "planned times; they replace the file's winds and "
                                         "day temperature")
    g.add_argument("--forecast", metavar="FILE", help="CF-convention netCDF file of "
                                                      "eastward_wind, northward_wind and "
                                                      "air_temperature (default: the "
                                                      "mission file's [day] forecast)")
    g.add_argument("--departure", metavar="TIME", help="engine start, ISO 8601 UTC, e.g. "
                                                       "'2026-12-03T06:00Z' (default: the "
                                                       "mission file's)")


def read_forecast_request(args, mission, conflicts=()):
    """The forecast file and departure time to plan with, or (None, None).

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options with ``forecast`` and ``departure`` (text or None).
    mission : Mission
        The mission; its ``forecast`` [path] and ``departure`` [s] are the defaults.
    conflicts : iterable of (str, object)
        Options that cannot go with a forecast, as (option, value); a value not None is
        an error (``("--wind", args.wind)``).

    Returns
    -------
    path : str or None
        The forecast file.
    departure : float or None
        Engine start [s since the Unix epoch].

    Raises
    ------
    CruiseplanError
        For a departure without a forecast, a forecast without a departure, or a
        conflicting option.
    """
    path = args.forecast or mission.forecast
    departure = mission.departure
    if args.departure is not None:
        departure = parse_utc_time(args.departure, what="--departure")
    if path is None:
        if args.departure is not None:
            raise CruiseplanError("--departure: goes with a forecast (--forecast FILE or "
                                  "[day] forecast in the mission file)")
        return None, None
    which = "--forecast" if args.forecast else "[day] forecast"
    for option, value in conflicts:
        if value is not None:
            raise CruiseplanError(f"{option}: a forecast ({which}) gives the winds and "
                                  "temperatures; give one or the other")
    if departure is None:
        raise CruiseplanError(f"{which}: needs the departure time, --departure "
                              "'2026-12-03T06:00Z' (ISO 8601 UTC)")
    return path, departure


def monte_carlo_n(args):
    """The ``--monte-carlo`` sample count, checked (None when not asked).

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options; ``monte_carlo`` may be missing.

    Returns
    -------
    int or None
        Number of samples [-], 1 to 1 000 000.

    Raises
    ------
    CruiseplanError
        For a count outside 1 to 1 000 000.
    """
    n = getattr(args, "monte_carlo", None)
    if n is not None and not 1 <= n <= 1_000_000:
        raise CruiseplanError(f"--monte-carlo {n}: give 1 to 1000000 samples")
    return n


def default_units(airframe) -> str:
    """The display units the airframe's crews use: aviation for fuel, SI for batteries.

    Parameters
    ----------
    airframe : Airframe
        The airframe; its propulsion's store decides.

    Returns
    -------
    str
        ``"aviation"`` or ``"si"``.
    """
    return airframe.propulsion.store.default_units


def read_isa_dev(args) -> float:
    """``--isa-dev`` [K].

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options; ``isa_dev`` is text such as ``"+15 K"`` or ``"-5 degC"`` (a
        difference), kelvin when bare.

    Returns
    -------
    float
        Temperature deviation from ISA [K].

    Raises
    ------
    UnitError
        When the text is not a temperature difference.
    """
    return check_range(parse_quantity(args.isa_dev, "K", what="--isa-dev",
                                      delta_temperature=True), "isa_dev", "--isa-dev")


def read_altitudes(text: str) -> np.ndarray:
    """Pressure altitudes [m] from a range or list, feet by default.

    Parameters
    ----------
    text : str
        ``"start:stop:step"`` or ``"a,b,c"`` with optional units [ft when bare].

    Returns
    -------
    numpy.ndarray
        Pressure altitudes [m].

    Raises
    ------
    UnitError
        When the text is not a valid range or list of lengths.
    """
    return parse_range(text, "m", default_unit="ft", what="--altitudes")


def read_loading(af, args) -> dict:
    """``mass``, ``fuel`` and ``payload`` [kg, kg or J, kg] from the loading options.

    Parameters
    ----------
    af : Airframe
        The airframe; its propulsion reads ``--fuel`` (volume, mass, energy or percent).
    args : argparse.Namespace
        Parsed options: ``weight`` [lb when bare], ``fuel``, ``payload`` [kg when bare]
        and ``stall_margin`` [-].

    Returns
    -------
    dict
        ``mass`` [kg], ``fuel`` [kg or J] and ``payload`` [kg]; None for those not given.

    Raises
    ------
    CruiseplanError
        For a stall margin below 1, or a value that cannot be read (a
        :class:`~cruiseplan.errors.UnitError`).
    """
    check_range(args.stall_margin, "stall_margin", "--stall-margin")
    fuel = parse_amount(args.fuel, af.propulsion, what="--fuel") if args.fuel else None
    if fuel is not None and not (np.isfinite(fuel) and fuel >= 0):
        raise CruiseplanError(f"--fuel: {args.fuel!r} must be a finite amount, 0 or more")
    loading = dict(
        mass=check_range(parse_quantity(args.weight, "kg", default_unit="lb",
                                        what="--weight"), "mass", "--weight")
        if args.weight else None,
        fuel=fuel,
        payload=check_range(parse_quantity(args.payload, "kg", default_unit="kg",
                                           what="--payload"), "payload", "--payload")
        if args.payload else None)
    given = [o for o, k in (("--weight", "mass"), ("--fuel", "fuel"), ("--payload", "payload"))
             if loading[k] is not None]
    if given:
        # The loading is checked against the airframe here, so the message names the
        # options given (a mass below empty plus payload, a fuel beyond the tanks).
        try:
            af.loading(mass=loading["mass"], store=loading["fuel"],
                       payload=loading["payload"])
        except CruiseplanError as exc:
            raise CruiseplanError(f"{' and '.join(given)}: {exc}") from None
    return loading


def power_settings(text: str) -> np.ndarray:
    """``--power 55,65,75`` as fractions of rated power.

    Parameters
    ----------
    text : str
        Range or list of power settings [percent when bare].

    Returns
    -------
    numpy.ndarray
        Fractions of rated power [-], in (0, 1].

    Raises
    ------
    UnitError
        When a setting cannot be read or lies outside (0, 100] %.
    """
    frac = parse_range(text, "", default_unit="percent", what="--power")
    if np.any(frac <= 0) or np.any(frac > 1.0 + 1e-9):
        raise UnitError(f"--power: {text!r} must be percentages of rated power in (0, 100]")
    return frac


def read_wind(args):
    """Wind profile, headwind [m/s] and a description from the wind options.

    From ``--wind``/``--course`` or ``--headwind``; None for what is not given.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed options: ``wind`` (text ``DIR/SPEED@ALT,...``), ``course`` [deg true] and
        ``headwind`` [kt when bare].

    Returns
    -------
    profile : WindProfile or None
        Winds aloft, from ``--wind``.
    headwind : float or None
        Headwind component [m/s], from ``--headwind``.
    text : str
        The wind in words, for headers.

    Raises
    ------
    CruiseplanError
        For ``--wind`` without ``--course``, ``--course`` without ``--wind``, or a wind
        that cannot be read.
    """
    if args.wind:
        if args.course is None:
            raise CruiseplanError("--wind needs --course (true course in degrees)")
        return (parse_wind_profile(args.wind), None,
                f"{args.wind} on course {args.course:03.0f}")
    if args.course is not None:
        raise CruiseplanError("--course goes with --wind")
    if args.headwind:
        return (None, read_headwind(args.headwind), f"headwind component {args.headwind}")
    return None, None, "calm"


def read_headwind(text: str) -> float:
    """``--headwind`` [m/s], kt when bare; negative for a tailwind.

    Parameters
    ----------
    text : str
        E.g. ``"20kt"`` or ``"-20kt"``.

    Returns
    -------
    float
        Headwind component [m/s].

    Raises
    ------
    CruiseplanError
        For text that is not a speed, or a speed outside the physical range.
    """
    return check_range(parse_quantity(text, "m/s", default_unit="kt", what="--headwind"),
                       "headwind", "--headwind")


def figure_path(text: str, suffixes, option: str = "--output") -> str:
    """A figure file name, checked to end in one of ``suffixes``.

    Parameters
    ----------
    text : str
        The file name given.
    suffixes : collection of str
        Allowed lower-case suffixes, e.g. ``(".png", ".pdf")``.
    option : str, optional
        The option's name, for the message.

    Returns
    -------
    str
        ``text`` unchanged.

    Raises
    ------
    CruiseplanError
        When the suffix is not one of ``suffixes``.
    """
    if Path(text).suffix.lower() not in suffixes:
        raise CruiseplanError(f"{option} {text}: the file must end in {' or '.join(suffixes)}")
    return text


#: Printed to standard error when a plain CSV goes to standard output.
CSV_CAUTIONS_HINT = "cautions and provenance: use --csv-header or --output"


def guard_outputs(args, inputs=(), **more):
    """Check every output of a command before anything is computed.

    Parameters
    ----------
    args : argparse.Namespace
        ``output`` (and ``format``, ``csv_header``): a report's file and, for a plain
        CSV, its sidecar ``FILE.meta.txt``.
    inputs : iterable of str or pathlib.Path, optional
        The files the command reads; no output may be one of them.
    **more : str or None
        Other outputs by option, e.g. ``plot=args.plot`` (``--plot``).

    Raises
    ------
    CruiseplanError
        For an output that is a folder, in a folder that does not exist, one of the
        inputs, or the same file as another output.
    """
    outputs = {}
    out = getattr(args, "output", None)
    if out is not None:
        outputs["--output"] = out
        if (getattr(args, "format", None) == "csv" and not getattr(args, "csv_header", False)
                and out and not is_special(out)):
            outputs["--output (its sidecar .meta.txt)"] = sidecar_path(out)
    for name, path in more.items():
        outputs["--" + name.replace("_", "-")] = path
    check_outputs(outputs, inputs=[i for i in inputs if i is not None])


def input_file(text):
    """The file a name or path stands for, when it is a path that exists; else None.

    Parameters
    ----------
    text : str or None
        A command's input argument (a bundled name or a path).

    Returns
    -------
    pathlib.Path or None
        The path, when one exists by that name.
    """
    if not text:
        return None
    path = Path(text)
    return path if path.exists() else None


def emit_report(rep, args):
    """Render a report in ``args.format`` and write it whole (with a CSV's sidecar) or print it.

    Parameters
    ----------
    rep : cruiseplan.report.output.Report
        The report.
    args : argparse.Namespace
        ``format``, ``output`` and, for commands offering CSV, ``csv_header``.

    Raises
    ------
    CruiseplanError
        If the output's folder does not exist.

    Notes
    -----
    A plain CSV written to a file takes its provenance and cautions to ``FILE.meta.txt``
    (both files written whole or not at all); printed to standard output, it goes without
    them and one line on standard error says how to get them.
    """
    header = bool(getattr(args, "csv_header", False))
    if args.output and is_special(args.output):
        # A device or pipe gets the report as standard output would (no sidecar).
        write_files_atomic({args.output: rep.files(args.format, None,
                                                   csv_header=header)[None]})
        return
    files = rep.files(args.format, args.output or None, csv_header=header)
    if not args.output:
        sys.stdout.write(files[None])
        if args.format == "csv" and not header:
            sys.stderr.write(CSV_CAUTIONS_HINT + "\n")
        return
    write_files_atomic(files)


def emit(text: str, output: str | None):
    """Write a report to ``output`` (whole or not at all), or to standard output.

    Parameters
    ----------
    text : str
        The rendered report.
    output : str or None
        File to write; standard output when None or empty.

    Raises
    ------
    CruiseplanError
        If the output's folder does not exist.
    """
    if output:
        write_atomic(output, text)
    else:
        sys.stdout.write(text)
