"""Commands that print tables: ``airframes``, ``atmosphere``, ``table`` and ``best``."""

from __future__ import annotations

import json
import sys

import numpy as np

from cruiseplan.cli import options
from cruiseplan.cli.progress import monte_carlo_progress
from cruiseplan.errors import CruiseplanError, UnitError
from cruiseplan.io.airframe_file import (
    bundled_airframes,
    find_airframe,
    load_airframe,
    read_airframe,
)
from cruiseplan.physics.atmosphere import air_state, check_altitude
from cruiseplan.planning.optimise import best_cruise
from cruiseplan.planning.performance import cruise_grid, power_setting_table
from cruiseplan.planning.uncertainty import cruise_uncertainty
from cruiseplan.ranges import check_range, check_work
from cruiseplan.report.tables import atmosphere_report, best_report, cruise_report
from cruiseplan.units import parse_quantity, parse_range


def register(sub):
    """Add the table commands to the subcommand parsers ``sub``.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The main parser's subcommand parsers.
    """
    p = sub.add_parser("airframes", help="list the bundled airframes")
    p.add_argument("--format", choices=("text", "json"), default="text")
    p.set_defaults(run=cmd_airframes)

    p = sub.add_parser("atmosphere", help="ISA or non-standard day at pressure altitudes")
    p.add_argument("--altitudes", default="0:10000ft:1000ft",
                   help="pressure altitudes: 'start:stop:step' or 'a,b,c' with units "
                        "(default 0:10000ft:1000ft)")
    day = p.add_mutually_exclusive_group()
    day.add_argument("--isa-dev", default="0", help="ISA temperature deviation, e.g. '+10 K'")
    day.add_argument("--oat", help="outside air temperature at every altitude, e.g. '25 degC'")
    options.add_output(p)
    p.set_defaults(run=cmd_atmosphere)

    p = sub.add_parser("table", help="cruise table over altitude x speed or power setting")
    p.add_argument("airframe", help=options.AIRFRAME_HELP)
    p.add_argument("--altitudes", help="pressure altitudes, e.g. '0:8000ft:2000ft' "
                                       "(default 0:10000ft:2000ft; drones 0:400m:100m)")
    how = p.add_mutually_exclusive_group()
    how.add_argument("--speeds", help="true airspeeds, e.g. '90:130kt:10kt' or '20,25 m/s'")
    how.add_argument("--power", help="power settings in %% of rated power, e.g. '55,65,75'")
    options.add_loading(p)
    p.add_argument("--headwind", default="0",
                   help="headwind component, e.g. '20 kt' (negative: tailwind)")
    options.add_pack_temperature(p)
    options.add_output(p)
    p.set_defaults(run=cmd_table)

    p = sub.add_parser("best", help="best speed at each altitude and the best altitude")
    p.add_argument("airframe", help=options.AIRFRAME_HELP)
    p.add_argument("--altitudes", help="candidate pressure altitudes (default "
                                       "0:12000ft:1000ft; drones 0:500m:25m)")
    p.add_argument("--objective", choices=("range", "endurance", "economy"), default="range")
    options.add_wind(p)
    p.add_argument("--floor", help="lowest altitude allowed, e.g. '3000ft'")
    p.add_argument("--ceiling", help="highest altitude allowed, e.g. '9500ft'")
    p.add_argument("--max-agl", help="maximum height above ground, e.g. '120m' (drones)")
    p.add_argument("--elevation", default="0", help="highest ground elevation under the "
                                                    "route, e.g. '450m' (with --max-agl)")
    p.add_argument("--climb-reserve", default="0",
                   help="climb rate that must remain at cruise, e.g. '300ft/min'")
    options.add_loading(p)
    options.add_pack_temperature(p)
    options.add_monte_carlo(p)
    options.add_output(p, formats=("text", "json", "csv", "markdown"))
    p.set_defaults(run=cmd_best)


def cmd_airframes(args):
    """List the bundled airframes, one line each.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``airframes`` options: format (text or json; masses in kg).
    """
    rows = []
    for name, path in bundled_airframes().items():
        af = read_airframe(path)
        power = "piston" if af.propulsion.store.burns_mass else "electric"
        rows.append({"name": name, "kind": f"{af.kind} {power}", "description": af.description,
                     "max_takeoff_kg": af.max_takeoff_mass, "file": str(path)})
    if args.format == "json":
        sys.stdout.write(json.dumps(rows, indent=1) + "\n")
        return
    width = max((len(r["name"]) for r in rows), default=4)
    for r in rows:
        sys.stdout.write(f"{r['name']:<{width}}  {r['kind']:<19}  "
                         f"MTOM {r['max_takeoff_kg']:7.1f} kg  {r['description']}\n")


def cmd_atmosphere(args):
    """Print the atmosphere at pressure altitudes.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``atmosphere`` options: altitudes [ft when bare], ISA deviation [K] or OAT
        [degC when bare], and the output options.

    Raises
    ------
    CruiseplanError
        For altitudes outside the atmosphere model, a value that cannot be read, or a
        temperature that is not physical.
    """
    options.guard_outputs(args)
    h = check_altitude(options.read_altitudes(args.altitudes), "--altitudes")
    if args.oat is not None:
        oat = check_range(parse_quantity(args.oat, "K", default_unit="degC", what="--oat"),
                          "oat", "--oat")
        air = air_state(h, oat=oat)
    else:
        air = air_state(h, options.read_isa_dev(args))
    rep = atmosphere_report(air, options.read_units(args))
    options.emit_report(rep, args)


def cmd_table(args):
    """Print a cruise table by speed or by power setting.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``table`` options: airframe, altitudes [ft when bare], speeds [kt or km/h
        when bare] or power [percent when bare], loading, headwind [kt when bare] and
        the output options.

    Raises
    ------
    CruiseplanError
        For speeds that are not positive, or negative for a kind that hovers (a
        :class:`~cruiseplan.errors.UnitError`), or any error of the airframe, the options
        or the table.
    """
    options.guard_outputs(args, [find_airframe(args.airframe)])
    af = load_airframe(args.airframe)
    units = options.read_units(args, af)
    batteries = not af.propulsion.store.burns_mass
    alt_text = args.altitudes or ("0:400m:100m" if batteries else "0:10000ft:2000ft")
    h = check_altitude(options.read_altitudes(alt_text), "--altitudes")
    dev = options.read_isa_dev(args)
    af, _ = options.at_pack_temperature(af, args, float(np.min(h)), dev)
    wind = options.read_headwind(args.headwind)
    common = dict(isa_dev=dev, headwind=wind, stall_margin=args.stall_margin,
                  **options.read_loading(af, args))
    if args.speeds or (batteries and not args.power):
        if args.speeds:
            v = parse_range(args.speeds, "m/s", default_unit="kt" if units.startswith("aviation")
                            else "km/h", what="--speeds")
        elif af.hovers:
            v = np.arange(0.0, 22.01, 2.0)  # from the hover
        else:
            v = np.arange(14.0, 30.01, 2.0)
        if np.any(v < 0) or (not af.hovers and np.any(v == 0)):
            raise UnitError("--speeds: speeds must be positive" + (
                "" if af.hovers else f" (0, the hover, only for a kind that hovers; "
                                     f"{af.name} is a {af.kind})"))
        check_range(v, "speed", "--speeds")
        check_work(h.size * v.size, "--altitudes x --speeds")
        pts = cruise_grid(af, h, v, **common)
        title = "Cruise table by true airspeed"
    else:
        frac = options.power_settings(args.power or "55,65,75")
        check_work(h.size * frac.size, "--altitudes x --power")
        pts = power_setting_table(af, h, frac, **common)
        title = "Cruise table by power setting"
    rep = cruise_report(af, pts, isa_dev=dev, units=units, title=title,
                        stall_margin=args.stall_margin, show_ground=wind != 0.0)
    options.emit_report(rep, args)


def cmd_best(args):
    """Print the best speeds by altitude and the best altitude.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``best`` options: airframe, altitudes, floor, ceiling, max AGL and
        elevation [ft when bare], objective, wind, climb reserve [ft/min when bare],
        loading, Monte Carlo and the output options.

    Raises
    ------
    CruiseplanError
        For ``--elevation`` without ``--max-agl``, or any error of the airframe, the
        options or the optimiser.
    """
    options.guard_outputs(args, [find_airframe(args.airframe)])
    af = load_airframe(args.airframe)
    units = options.read_units(args, af)
    batteries = not af.propulsion.store.burns_mass
    h = options.read_altitudes(args.altitudes or ("0:500m:25m" if batteries
                                             else "0:12000ft:1000ft"))
    dev = options.read_isa_dev(args)
    af, _ = options.at_pack_temperature(af, args, float(np.min(h)), dev)
    profile, headwind, wind_text = options.read_wind(args)

    def opt(text, what):
        return None if text is None else check_range(
            parse_quantity(text, "m", default_unit="ft", what=what), "altitude", what)

    if args.max_agl is None and args.elevation not in (None, "0"):
        raise CruiseplanError("--elevation goes with --max-agl")
    max_agl = opt(args.max_agl, "--max-agl")
    if max_agl is not None and max_agl <= 0:
        raise CruiseplanError(f"--max-agl {args.max_agl}: a height above ground must be "
                              "positive")
    best = best_cruise(
        af, h, objective=args.objective, isa_dev=dev, wind=profile, course=args.course,
        headwind=headwind, floor=opt(args.floor, "--floor"),
        ceiling=opt(args.ceiling, "--ceiling"), max_agl=max_agl,
        elevation=opt(args.elevation, "--elevation"),
        climb_reserve=check_range(parse_quantity(args.climb_reserve, "m/s",
                                                 default_unit="ft/min",
                                                 what="--climb-reserve"),
                                  "climb_reserve", "--climb-reserve"),
        stall_margin=args.stall_margin, **options.read_loading(af, args))
    spread = None
    n = options.monte_carlo_n(args)
    if n:
        check_work(1, "--monte-carlo", n)
    if n and best.best_index >= 0:
        i = best.best_index
        p = best.points
        with monte_carlo_progress(n) as progress:
            spread = cruise_uncertainty(af, p.mass, p.store, best.schedule.air.row(i),
                                        float(p.tas[i]), float(p.ground_speed[i]), n,
                                        args.seed, progress=progress)
    rep = best_report(af, best, isa_dev=dev, units=units, wind_text=wind_text,
                      uncertainty=spread)
    options.emit_report(rep, args)
