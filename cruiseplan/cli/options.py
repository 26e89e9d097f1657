"""Options shared by the commands, and reading them into SI.

Each option is read once here: the loading (``--weight | --fuel``, ``--payload``,
``--isa-dev``, ``--stall-margin``), the output (``--format``, ``--output``, ``--units``),
the Monte Carlo (``--monte-carlo``, ``--seed``), the wind (``--wind``/``--course`` or
``--headwind``) and ``--power``.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

import numpy as np

from cruiseplan.amounts import parse_amount
from cruiseplan.errors import CruiseplanError, UnitError
from cruiseplan.io.text import parse_wind_profile
from cruiseplan.report.output import write_atomic
from cruiseplan.units import parse_quantity, parse_range

AIRFRAME_HELP = "bundled airframe name or path to an airframe TOML file"


class Parser(argparse.ArgumentParser):
    """argparse with one-line errors (a :class:`CruiseplanError`, exit status 2)."""

    def error(self, message):
        """Raise the message as a :class:`CruiseplanError` naming the subcommand once."""
        sub = self.prog.removeprefix("cruiseplan").strip()
        raise CruiseplanError(f"{sub}: {message}" if sub else message)


def add_output(p, formats=("text", "csv", "json", "markdown")):
    """Add ``--format``, ``--output`` and ``--units`` to a command."""
    p.add_argument("--format", choices=formats, default="text", help="output format")
    p.add_argument("--output", "-o", metavar="FILE", help="write to FILE instead of stdout")
    add_units(p, "display units: aviation (ft, kt, lb, US gal, nm, hp) or si (m, km/h, kg, "
                 "L, km, kW); default aviation for piston airframes, si for electric ones")


def add_units(p, text="display units (default aviation for piston airframes, si for "
                      "electric ones)"):
    """Add ``--units`` to a command."""
    p.add_argument("--units", choices=("aviation", "si"), default=None, help=text)


def add_loading(p):
    """Add ``--weight | --fuel``, ``--payload``, ``--isa-dev`` and ``--stall-margin``."""
    load = p.add_mutually_exclusive_group()
    load.add_argument("--weight", help="aircraft mass, e.g. '1600 lb'")
    load.add_argument("--fuel", help="fuel or energy on board: '80 L', '20 gal', '55 kg', "
                                     "'450 Wh' or '80%%' of capacity (default full)")
    p.add_argument("--payload", help="crew and payload, e.g. '170 kg' (default from file)")
    p.add_argument("--isa-dev", default="0", help="ISA temperature deviation, e.g. '+15 K'")
    p.add_argument("--stall-margin", type=float, default=1.3,
                   help="minimum TAS over stall speed (default 1.3)")


def add_monte_carlo(p):
    """Add ``--monte-carlo N`` and ``--seed`` to a command."""
    p.add_argument("--monte-carlo", type=int, metavar="N",
                   help="also report P10/P50/P90 over N samples of the tolerances in the "
                        "airframe (and mission) files, e.g. 10000")
    p.add_argument("--seed", type=int, default=0, help="seed of the Monte Carlo (default 0)")


def add_wind(p):
    """Add ``--wind | --headwind`` and ``--course`` to a command."""
    wind = p.add_mutually_exclusive_group()
    wind.add_argument("--wind", help="winds aloft DIR/SPEED@ALT, e.g. "
                                     "'270/25@3000ft,250/40@8000ft' (needs --course)")
    wind.add_argument("--headwind", help="headwind component at every altitude, e.g. '20kt' "
                                         "(negative: tailwind)")
    p.add_argument("--course", type=float, help="true course [deg] for --wind")


def monte_carlo_n(args):
    """The ``--monte-carlo`` sample count, checked (None when not asked)."""
    n = getattr(args, "monte_carlo", None)
    if n is not None and not 1 <= n <= 1_000_000:
        raise CruiseplanError(f"--monte-carlo {n}: give 1 to 1000000 samples")
    return n


def default_units(airframe) -> str:
    """The display units the airframe's crews use: aviation for fuel, SI for batteries."""
    return airframe.propulsion.store.default_units


def isa_dev(args) -> float:
    """``--isa-dev`` [K]."""
    return parse_quantity(args.isa_dev, "K", what="--isa-dev", delta_temperature=True)


def altitudes(text: str) -> np.ndarray:
    """Pressure altitudes [m] from a range or list, feet by default."""
    return parse_range(text, "m", default_unit="ft", what="--altitudes")


def loading(af, args) -> dict:
    """``mass``, ``fuel`` and ``payload`` [kg, kg or J, kg] from the loading options."""
    if args.stall_margin < 1.0:
        raise CruiseplanError(f"--stall-margin {args.stall_margin:g} must be at least 1")
    return dict(
        mass=parse_quantity(args.weight, "kg", default_unit="lb", what="--weight")
        if args.weight else None,
        fuel=parse_amount(args.fuel, af.propulsion, what="--fuel") if args.fuel else None,
        payload=parse_quantity(args.payload, "kg", default_unit="kg", what="--payload")
        if args.payload else None)


def power_settings(text: str) -> np.ndarray:
    """``--power 55,65,75`` as fractions of rated power."""
    frac = parse_range(text, "", default_unit="percent", what="--power")
    if np.any(frac <= 0) or np.any(frac > 1.0 + 1e-9):
        raise UnitError(f"--power: {text!r} must be percentages of rated power in (0, 100]")
    return frac


def wind(args):
    """Wind profile, headwind [m/s] and a description from the wind options.

    From ``--wind``/``--course`` or ``--headwind``; None for what is not given.
    """
    if args.wind:
        if args.course is None:
            raise CruiseplanError("--wind needs --course (true course in degrees)")
        return (parse_wind_profile(args.wind), None,
                f"{args.wind} on course {args.course:03.0f}")
    if args.course is not None:
        raise CruiseplanError("--course goes with --wind")
    if args.headwind:
        return (None, parse_quantity(args.headwind, "m/s", default_unit="kt",
                                     what="--headwind"), f"headwind component {args.headwind}")
    return None, None, "calm"


def figure_path(text: str, suffixes, option: str = "--output") -> str:
    """A figure file name, checked to end in one of ``suffixes``."""
    if Path(text).suffix.lower() not in suffixes:
        raise CruiseplanError(f"{option} {text}: the file must end in {' or '.join(suffixes)}")
    return text


def emit(text: str, output: str | None):
    """Write a report to ``output`` (whole or not at all), or to standard output."""
    if output:
        write_atomic(output, text)
    else:
        sys.stdout.write(text)
