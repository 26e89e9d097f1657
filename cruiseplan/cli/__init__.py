"""Command line: ``cruiseplan airframes | atmosphere | table ...``.

A thin layer: parse text with units into SI, call the public API, render a Report. Bad
input gives one line on stderr and exit status 2; output files are written only whole.
Heavy modules (scipy, matplotlib) are imported only by the commands that need them.
"""

from __future__ import annotations

import argparse
import sys
import warnings

from cruiseplan.errors import CruiseplanError, UnitError

EXIT_BAD_INPUT = 2


class _Parser(argparse.ArgumentParser):
    """argparse with one-line errors."""

    def error(self, message):
        # "cruiseplan: error: table: ..." names the subcommand once, not the program twice.
        sub = self.prog.removeprefix("cruiseplan").strip()
        raise CruiseplanError(f"{sub}: {message}" if sub else message)


def _add_output(p, formats=("text", "csv", "json", "markdown")):
    p.add_argument("--format", choices=formats, default="text", help="output format")
    p.add_argument("--output", "-o", metavar="FILE", help="write to FILE instead of stdout")
    p.add_argument("--units", choices=("aviation", "si"), default=None,
                   help="display units: aviation (ft, kt, lb, US gal, nm, hp) or si "
                        "(m, km/h, kg, L, km, kW); default aviation for piston airframes, "
                        "si for electric ones")


def _add_loading(p):
    """Add --weight | --fuel, --payload, --isa-dev and --stall-margin to a command."""
    load = p.add_mutually_exclusive_group()
    load.add_argument("--weight", help="aircraft mass, e.g. '1600 lb'")
    load.add_argument("--fuel", help="fuel or energy on board: '80 L', '20 gal', '55 kg', "
                                     "'450 Wh' or '80%%' of capacity (default full)")
    p.add_argument("--payload", help="crew and payload, e.g. '170 kg' (default from file)")
    p.add_argument("--isa-dev", default="0", help="ISA temperature deviation, e.g. '+15 K'")
    p.add_argument("--stall-margin", type=float, default=1.3,
                   help="minimum TAS over stall speed (default 1.3)")


def _add_monte_carlo(p):
    """Add --monte-carlo N and --seed to a command."""
    p.add_argument("--monte-carlo", type=int, metavar="N",
                   help="also report P10/P50/P90 over N samples of the tolerances in the "
                        "airframe (and mission) files, e.g. 10000")
    p.add_argument("--seed", type=int, default=0, help="seed of the Monte Carlo (default 0)")


def _monte_carlo_n(args):
    n = getattr(args, "monte_carlo", None)
    if n is not None and not 1 <= n <= 1_000_000:
        raise CruiseplanError(f"--monte-carlo {n}: give 1 to 1000000 samples")
    return n


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of the ``cruiseplan`` command."""
    parser = _Parser(prog="cruiseplan",
                     description="Cruise tables, best altitude and speed, and mission plans "
                                 "for small propeller aircraft and drones. A planning aid: the "
                                 "flight manual, licensed planning and local rules come first.")
    sub = parser.add_subparsers(dest="command", required=True, parser_class=_Parser)

    p = sub.add_parser("airframes", help="list the bundled airframes")
    p.add_argument("--format", choices=("text", "json"), default="text")

    p = sub.add_parser("atmosphere", help="ISA or non-standard day at pressure altitudes")
    p.add_argument("--altitudes", default="0:10000ft:1000ft",
                   help="pressure altitudes: 'start:stop:step' or 'a,b,c' with units "
                        "(default 0:10000ft:1000ft)")
    day = p.add_mutually_exclusive_group()
    day.add_argument("--isa-dev", default="0", help="ISA temperature deviation, e.g. '+10 K'")
    day.add_argument("--oat", help="outside air temperature at every altitude, e.g. '25 degC'")
    _add_output(p)

    p = sub.add_parser("table", help="cruise table over altitude x speed or power setting")
    p.add_argument("airframe", help="bundled airframe name or path to an airframe TOML file")
    p.add_argument("--altitudes", help="pressure altitudes, e.g. '0:8000ft:2000ft' "
                                       "(default 0:10000ft:2000ft; drones 0:400m:100m)")
    how = p.add_mutually_exclusive_group()
    how.add_argument("--speeds", help="true airspeeds, e.g. '90:130kt:10kt' or '20,25 m/s'")
    how.add_argument("--power", help="power settings in %% of rated power, e.g. '55,65,75'")
    _add_loading(p)
    p.add_argument("--headwind", default="0",
                   help="headwind component, e.g. '20 kt' (negative: tailwind)")
    _add_output(p)

    p = sub.add_parser("best", help="best speed at each altitude and the best altitude")
    p.add_argument("airframe", help="bundled airframe name or path to an airframe TOML file")
    p.add_argument("--altitudes", help="candidate pressure altitudes (default "
                                       "0:12000ft:1000ft; drones 0:500m:25m)")
    p.add_argument("--objective", choices=("range", "endurance", "economy"), default="range")
    wind = p.add_mutually_exclusive_group()
    wind.add_argument("--wind", help="winds aloft DIR/SPEED@ALT, e.g. "
                                     "'270/25@3000ft,250/40@8000ft' (needs --course)")
    wind.add_argument("--headwind", help="headwind component at every altitude, e.g. '20kt' "
                                         "(negative: tailwind)")
    p.add_argument("--course", type=float, help="true course [deg] for --wind")
    p.add_argument("--floor", help="lowest altitude allowed, e.g. '3000ft'")
    p.add_argument("--ceiling", help="highest altitude allowed, e.g. '9500ft'")
    p.add_argument("--max-agl", help="maximum height above ground, e.g. '120m' (drones)")
    p.add_argument("--elevation", default="0", help="highest ground elevation under the "
                                                    "route, e.g. '450m' (with --max-agl)")
    p.add_argument("--climb-reserve", default="0",
                   help="climb rate that must remain at cruise, e.g. '300ft/min'")
    _add_loading(p)
    _add_monte_carlo(p)
    _add_output(p, formats=("text", "json", "csv", "markdown"))

    p = sub.add_parser("plan", help="plan a mission file: segments, reserve, GO / NO-GO")
    p.add_argument("mission", help="mission TOML file, or a bundled mission name")
    p.add_argument("--plot", metavar="FILE", help="also draw the profile (.png or .pdf)")
    _add_monte_carlo(p)
    _add_output(p, formats=("text", "json", "csv", "markdown"))
    _add_figure_commands(sub)
    _add_fit_command(sub)
    return parser


# --- helpers ----------------------------------------------------------------------------

def _parse_store(airframe, text: str):
    """Fuel or energy on board from text, in SI (kg of fuel or J)."""
    from cruiseplan.units import parse_quantity

    prop = airframe.propulsion
    t = text.strip()
    if t.endswith("%"):
        share = parse_quantity(t, "", what="--fuel")
        if not 0.0 <= share <= 1.0:
            raise UnitError(f"--fuel: {text!r} must be between 0 and 100 %")
        return share * prop.store_capacity
    if prop.store_name == "energy":
        return parse_quantity(t, "J", what="--fuel (usable energy)")
    for unit, to_mass in (("m^3", prop.fuel_density), ("kg", 1.0)):
        try:
            return parse_quantity(t, unit, what="--fuel") * to_mass
        except UnitError:
            continue
    raise UnitError(f"--fuel: {text!r} is neither a volume ('80 L', '20 gal'), a mass "
                    "('55 kg') nor a percentage ('80%')")


def _power_settings(text: str):
    """``--power 55,65,75`` as fractions of rated power."""
    import numpy as np

    from cruiseplan.units import parse_range

    frac = parse_range(text, "", default_unit="percent", what="--power")
    if np.any(frac <= 0) or np.any(frac > 1.0 + 1e-9):
        raise UnitError(f"--power: {text!r} must be percentages of rated power in (0, 100]")
    return frac


def _emit(text: str, output: str | None):
    if output:
        from cruiseplan.report.output import write_atomic

        write_atomic(output, text)
    else:
        sys.stdout.write(text)


def _default_units(airframe) -> str:
    return "aviation" if airframe.propulsion.store_name == "fuel" else "si"


# --- commands -----------------------------------------------------------------------------

def cmd_airframes(args):
    """List the bundled airframes, one line each."""
    import json

    from cruiseplan.io.airframe_file import bundled_airframes, read_airframe

    rows = []
    for name, path in bundled_airframes().items():
        af = read_airframe(path)
        power = "piston" if af.propulsion.store_name == "fuel" else "electric"
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
    """Print the atmosphere at pressure altitudes."""
    from cruiseplan.physics.atmosphere import air_state, check_altitude
    from cruiseplan.report.tables import atmosphere_report
    from cruiseplan.units import parse_quantity, parse_range

    h = check_altitude(parse_range(args.altitudes, "m", default_unit="ft",
                                   what="--altitudes"), "--altitudes")
    if args.oat is not None:
        oat = parse_quantity(args.oat, "K", default_unit="degC", what="--oat")
        air = air_state(h, oat=oat)
    else:
        dev = parse_quantity(args.isa_dev, "K", what="--isa-dev", delta_temperature=True)
        air = air_state(h, dev)
    rep = atmosphere_report(air, args.units or "aviation")
    _emit(rep.render(args.format), args.output)


def cmd_table(args):
    """Print a cruise table by speed or by power setting."""
    import numpy as np

    from cruiseplan.io.airframe_file import load_airframe
    from cruiseplan.physics.atmosphere import check_altitude
    from cruiseplan.planning.performance import cruise_grid, power_setting_table
    from cruiseplan.report.tables import cruise_report
    from cruiseplan.units import parse_quantity, parse_range

    af = load_airframe(args.airframe)
    electric = af.propulsion.store_name == "energy"
    units = args.units or _default_units(af)
    alt_text = args.altitudes or ("0:400m:100m" if electric else "0:10000ft:2000ft")
    h = check_altitude(parse_range(alt_text, "m", default_unit="ft", what="--altitudes"),
                       "--altitudes")
    dev = parse_quantity(args.isa_dev, "K", what="--isa-dev", delta_temperature=True)
    wind = parse_quantity(args.headwind, "m/s", default_unit="kt", what="--headwind")
    common = dict(isa_dev=dev, headwind=wind, stall_margin=args.stall_margin,
                  **_loading_args(af, args))
    if args.speeds or (electric and not args.power):
        if args.speeds:
            v = parse_range(args.speeds, "m/s", default_unit="kt" if units == "aviation"
                            else "km/h", what="--speeds")
        elif af.hovers:
            v = np.arange(2.0, 22.01, 2.0)
        else:
            v = np.arange(14.0, 30.01, 2.0)
        if np.any(v <= 0):
            raise UnitError("--speeds: speeds must be positive")
        pts = cruise_grid(af, h, v, **common)
        title = "Cruise table by true airspeed"
    else:
        text = args.power or "55,65,75"
        pts = power_setting_table(af, h, _power_settings(text), **common)
        title = "Cruise table by power setting"
    rep = cruise_report(af, pts, isa_dev=dev, units=units, title=title,
                        stall_margin=args.stall_margin, show_ground=wind != 0.0)
    _emit(rep.render(args.format), args.output)


def _loading_args(af, args):
    from cruiseplan.units import parse_quantity

    if args.stall_margin < 1.0:
        raise CruiseplanError(f"--stall-margin {args.stall_margin:g} must be at least 1")
    return dict(
        mass=parse_quantity(args.weight, "kg", default_unit="lb", what="--weight")
        if args.weight else None,
        fuel=_parse_store(af, args.fuel) if args.fuel else None,
        payload=parse_quantity(args.payload, "kg", default_unit="kg", what="--payload")
        if args.payload else None)


def cmd_best(args):
    """Print the best speeds by altitude and the best altitude."""
    from cruiseplan.io.airframe_file import load_airframe
    from cruiseplan.io.text import parse_wind_profile
    from cruiseplan.planning.optimise import best_cruise
    from cruiseplan.report.tables import best_report
    from cruiseplan.units import parse_quantity, parse_range

    af = load_airframe(args.airframe)
    electric = af.propulsion.store_name == "energy"
    units = args.units or _default_units(af)
    alt_text = args.altitudes or ("0:500m:25m" if electric else "0:12000ft:1000ft")
    h = parse_range(alt_text, "m", default_unit="ft", what="--altitudes")
    dev = parse_quantity(args.isa_dev, "K", what="--isa-dev", delta_temperature=True)
    wind, headwind, wind_text = None, None, "calm"
    if args.wind:
        if args.course is None:
            raise CruiseplanError("--wind needs --course (true course in degrees)")
        wind = parse_wind_profile(args.wind)
        wind_text = f"{args.wind} on course {args.course:03.0f}"
    elif args.course is not None:
        raise CruiseplanError("--course goes with --wind")
    if args.headwind:
        headwind = parse_quantity(args.headwind, "m/s", default_unit="kt", what="--headwind")
        wind_text = f"headwind component {args.headwind}"

    def opt(text, what):
        return None if text is None else parse_quantity(text, "m", default_unit="ft",
                                                        what=what)

    if args.max_agl is None and args.elevation not in (None, "0"):
        raise CruiseplanError("--elevation goes with --max-agl")
    best = best_cruise(
        af, h, objective=args.objective, isa_dev=dev, wind=wind, course=args.course,
        headwind=headwind, floor=opt(args.floor, "--floor"),
        ceiling=opt(args.ceiling, "--ceiling"), max_agl=opt(args.max_agl, "--max-agl"),
        elevation=opt(args.elevation, "--elevation"),
        climb_reserve=parse_quantity(args.climb_reserve, "m/s", default_unit="ft/min",
                                     what="--climb-reserve"),
        stall_margin=args.stall_margin, **_loading_args(af, args))
    spread = None
    n = _monte_carlo_n(args)
    if n and best.best_index >= 0:
        from cruiseplan.planning.uncertainty import cruise_uncertainty

        i = best.best_index
        p = best.points
        spread = cruise_uncertainty(af, p.mass, p.store, best.schedule.air.row(i),
                                    float(p.tas[i]), float(p.ground_speed[i]), n, args.seed)
    rep = best_report(af, best, isa_dev=dev, units=units, wind_text=wind_text,
                      uncertainty=spread)
    _emit(rep.render(args.format), args.output)


def cmd_plan(args):
    """Plan a mission; a NO-GO is a result (exit 0), not an error."""
    from cruiseplan.io.mission_file import load_mission
    from cruiseplan.planning.mission import plan_mission
    from cruiseplan.report.tables import plan_report

    if args.plot and not args.plot.lower().endswith((".png", ".pdf")):
        raise CruiseplanError(f"--plot {args.plot}: the file must end in .png or .pdf")
    n = _monte_carlo_n(args)
    plan = plan_mission(load_mission(args.mission))
    spread = None
    if n:
        from cruiseplan.planning.uncertainty import plan_uncertainty

        spread = plan_uncertainty(plan, n, args.seed)
    text = plan_report(plan, args.units, spread).render(args.format)
    if args.plot:
        from cruiseplan.plots import figure_bytes, mission_profile
        from cruiseplan.report.output import write_bytes_atomic

        data = figure_bytes(mission_profile(plan, units=args.units), args.plot)
        write_bytes_atomic(args.plot, data)
    _emit(text, args.output)


# --- figures: plot and card ------------------------------------------------------------------

def _add_figure_commands(sub):
    """The ``plot`` and ``card`` subcommands (they alone import matplotlib, lazily)."""
    def common(p, what):
        p.add_argument("airframe", help="bundled airframe name or path to an airframe TOML file")
        p.add_argument("--output", "-o", metavar="FILE", required=True, help=what)
        _add_loading(p)
        p.add_argument("--units", choices=("aviation", "si"), default=None,
                       help="display units (default aviation for piston airframes, si for "
                            "electric ones)")

    p = sub.add_parser("plot", help="specific-range map, power curves or altitude profile "
                                    "as .png or .pdf")
    common(p, "FILE.png or FILE.pdf: the extension decides the format")
    p.add_argument("--kind", choices=("map", "power", "altitude"), default="map",
                   help="map: specific range over altitude x TAS with limits and best speeds; "
                        "power: power required and available; altitude: best speeds and "
                        "specific range by altitude (default map)")
    p.add_argument("--altitudes", help="pressure altitudes (default map and altitude "
                                       "0:12000ft:500ft, drones 0:500m:25m; power "
                                       "0,4000,8000,12000ft, drones 0,200,400m)")
    p.add_argument("--speeds", help="true airspeeds for map and power, e.g. '50:140kt:2kt' "
                                    "(default from below the stall to beyond full throttle)")
    wind = p.add_mutually_exclusive_group()
    wind.add_argument("--wind", help="winds aloft DIR/SPEED@ALT, e.g. "
                                     "'270/25@3000ft,250/40@8000ft' (needs --course)")
    wind.add_argument("--headwind", help="headwind component at every altitude, e.g. '20kt' "
                                         "(negative: tailwind)")
    p.add_argument("--course", type=float, help="true course [deg] for --wind")

    p = sub.add_parser("card", help="one-page cruise card FILE.pdf and its markdown twin "
                                    "FILE.md")
    common(p, "FILE.pdf; the markdown twin FILE.md is written beside it")
    p.add_argument("--altitudes", help="pressure altitudes (default 0:8000ft:2000ft; drones "
                                       "0:400m:100m)")
    p.add_argument("--power", help="power settings in %% of rated power (default 55,65,75; "
                                   "drones 20,30,40)")
    p.add_argument("--reserve", help="reserve to keep: '30min' (at best-endurance power at "
                                     "the lowest altitude), '25%%' of the fuel or energy on "
                                     "board, or '10L', '7kg', '120Wh' (default: piston 45min, "
                                     "electric 20%%; local rules decide)")
    _add_monte_carlo(p)


def _figure_path(text: str, suffixes) -> str:
    from pathlib import Path

    if Path(text).suffix.lower() not in suffixes:
        raise CruiseplanError(f"--output {text}: the file must end in {' or '.join(suffixes)}")
    return text


def _wind_args(args):
    """Wind profile, headwind [m/s] and text from --wind/--course or --headwind."""
    from cruiseplan.io.text import parse_wind_profile
    from cruiseplan.units import parse_quantity

    if args.wind:
        if args.course is None:
            raise CruiseplanError("--wind needs --course (true course in degrees)")
        return (parse_wind_profile(args.wind), None,
                f"{args.wind} on course {args.course:03.0f}")
    if args.course is not None:
        raise CruiseplanError("--course goes with --wind")
    if args.headwind:
        return (None, parse_quantity(args.headwind, "m/s", default_unit="kt",
                                     what="--headwind"), f"headwind {args.headwind}")
    return None, None, "calm"


def _wind_grid(af, h, v, loading, dev, profile, course, headwind, stall_margin):
    """Cruise grid whose ground speeds come from the full wind triangle at each altitude."""
    import numpy as np

    from cruiseplan.physics.atmosphere import air_state, check_altitude
    from cruiseplan.planning.performance import cruise_points

    h = check_altitude(h, "--altitudes")
    if profile is not None:
        hw, cw = profile.components(course, h)
    else:
        hw, cw = np.full(h.shape, headwind), np.zeros(h.shape)
    res = af.loading(mass=loading["mass"], store=loading["fuel"], payload=loading["payload"])
    tas = np.asarray(v, dtype=float)[None, :]
    with np.errstate(invalid="ignore"):
        gs = np.sqrt(tas * tas - cw[:, None] ** 2) - hw[:, None]
    return cruise_points(af, res.mass, air_state(h, dev).column(), tas, res.store,
                         ground_speed=gs, stall_margin=stall_margin)


def cmd_plot(args):
    """Draw a specific-range map, power curves or altitude profile to .png or .pdf."""
    from cruiseplan.io.airframe_file import load_airframe
    from cruiseplan.planning.optimise import best_cruise
    from cruiseplan.planning.performance import cruise_grid
    from cruiseplan.units import parse_quantity, parse_range

    out = _figure_path(args.output, (".png", ".pdf"))
    af = load_airframe(args.airframe)
    electric = af.propulsion.store_name == "energy"
    units = args.units or _default_units(af)
    defaults = {"power": "0,200,400m" if electric else "0,4000,8000,12000ft"}
    alt_text = args.altitudes or defaults.get(args.kind,
                                              "0:500m:25m" if electric else "0:12000ft:500ft")
    h = parse_range(alt_text, "m", default_unit="ft", what="--altitudes")
    dev = parse_quantity(args.isa_dev, "K", what="--isa-dev", delta_temperature=True)
    loading = _loading_args(af, args)
    profile, headwind, wind_text = _wind_args(args)
    windy = profile is not None or headwind is not None
    if args.speeds and args.kind == "altitude":
        raise CruiseplanError("--speeds goes with --kind map or power; the altitude profile "
                              "finds its own best speeds")
    if windy and args.kind == "power":
        raise CruiseplanError("wind does not change power curves: --wind and --headwind go "
                              "with --kind map or altitude")
    v = None
    if args.speeds:
        v = parse_range(args.speeds, "m/s", default_unit="kt" if units == "aviation"
                        else "km/h", what="--speeds")
        if v.size < 2 or (v <= 0).any() or (v[1:] <= v[:-1]).any():
            raise UnitError(f"--speeds: {args.speeds!r} must be at least two increasing "
                            "positive speeds")

    from cruiseplan import plots

    wind_kw = dict(wind=profile, course=args.course, headwind=headwind)
    if args.kind == "power":
        fig = plots.power_curves(af, h, tas=v, isa_dev=dev, units=units,
                                 stall_margin=args.stall_margin, **loading)
    elif args.kind == "altitude":
        calm = best_cruise(af, h, isa_dev=dev, stall_margin=args.stall_margin, **loading)
        in_wind = best_cruise(af, h, isa_dev=dev, stall_margin=args.stall_margin,
                              **wind_kw, **loading) if windy else None
        fig = plots.altitude_profile(af, calm, in_wind, units=units, wind_text=wind_text)
    else:
        if v is None:
            v = plots.speed_span(af, h, isa_dev=dev, **loading)
        if windy:
            grid = _wind_grid(af, h, v, loading, dev, profile, args.course, headwind,
                              args.stall_margin)
        else:
            grid = cruise_grid(af, h, v, isa_dev=dev, stall_margin=args.stall_margin,
                               **loading)
        best = best_cruise(af, h, isa_dev=dev, stall_margin=args.stall_margin, **wind_kw,
                           **loading)
        fig = plots.specific_range_map(af, grid, best, units=units, ground=windy,
                                       wind_text=wind_text, stall_margin=args.stall_margin)
    data = plots.figure_bytes(fig, out)

    from cruiseplan.report.output import write_bytes_atomic

    write_bytes_atomic(out, data)
    sys.stdout.write(f"wrote {out}\n")


def cmd_card(args):
    """Write the one-page cruise card FILE.pdf and its markdown twin FILE.md."""
    from pathlib import Path

    from cruiseplan.io.airframe_file import load_airframe
    from cruiseplan.units import parse_quantity, parse_range

    out = Path(_figure_path(args.output, (".pdf",)))
    af = load_airframe(args.airframe)
    h = None
    if args.altitudes:
        h = parse_range(args.altitudes, "m", default_unit="ft", what="--altitudes")
    frac = None
    if args.power:
        frac = _power_settings(args.power)
    dev = parse_quantity(args.isa_dev, "K", what="--isa-dev", delta_temperature=True)

    from cruiseplan import plots
    from cruiseplan.io.text import parse_reserve
    from cruiseplan.report.card import cruise_card

    reserve = parse_reserve(args.reserve, af.propulsion) if args.reserve else None
    markdown, fig = cruise_card(af, altitudes=h, power_settings=frac, isa_dev=dev,
                                reserve=reserve, units=args.units,
                                stall_margin=args.stall_margin,
                                monte_carlo=_monte_carlo_n(args), seed=args.seed,
                                **_loading_args(af, args))
    pdf = plots.figure_bytes(fig, "pdf")

    from cruiseplan.report.output import write_atomic, write_bytes_atomic

    twin = out.with_suffix(".md")
    write_bytes_atomic(out, pdf)
    try:
        write_atomic(twin, markdown)
    except BaseException:
        out.unlink(missing_ok=True)  # the pair is written whole or not at all
        raise
    sys.stdout.write(f"wrote {out} and {twin}\n")


# --- fit: drag polar from a flight log ---------------------------------------------------------

def _add_fit_command(sub):
    """The ``fit`` subcommand: drag polar from a level-flight log."""
    p = sub.add_parser("fit", help="fit the drag polar (CD0, Oswald e) to a level-flight log "
                                   "by PIW-VIW reduction")
    p.add_argument("log", help="flight log CSV whose header names each column with its unit, "
                               "e.g. 'cas [kt]' (see DEVELOPERS.md, Flight logs)")
    p.add_argument("--airframe", required=True,
                   help="bundled airframe name or path to an airframe TOML file")
    p.add_argument("--output", "-o", metavar="NEW.toml",
                   help="write a copy of the airframe file with the fitted cd0 and oswald_e "
                        "(or k); everything else is kept")
    p.add_argument("--plot", metavar="RESIDUALS.png",
                   help="draw the reduced points, the fitted curve and the residuals "
                        "(.png or .pdf)")
    p.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    p.add_argument("--reference-mass", help="mass the points are reduced to, e.g. '1600 lb' "
                                            "(default the maximum take-off mass)")
    p.add_argument("--units", choices=("aviation", "si"), default=None,
                   help="display units (default aviation for piston airframes, si for "
                        "electric ones)")


def cmd_fit(args):
    """Fit the drag polar to a flight log; print it, optionally write the airframe and plot."""
    from pathlib import Path

    from cruiseplan.io.airframe_file import find_airframe, read_airframe
    from cruiseplan.io.flightlog import check_airframe_text, fitted_airframe_text, read_flight_log
    from cruiseplan.planning.fit import fit_flight_log
    from cruiseplan.report.fit_report import fit_report
    from cruiseplan.report.output import write_atomic, write_bytes_atomic
    from cruiseplan.units import parse_quantity

    if args.plot and Path(args.plot).suffix.lower() not in (".png", ".pdf"):
        raise CruiseplanError(f"--plot {args.plot}: the file must end in .png or .pdf")
    path = find_airframe(args.airframe)
    if args.output:
        if Path(args.output).suffix.lower() != ".toml":
            raise CruiseplanError(f"--output {args.output}: the airframe file must end in .toml")
        if Path(args.output).resolve() == path.resolve():
            raise CruiseplanError(f"--output {args.output} is the airframe file itself: write "
                                  "the fitted polar to a new file and compare")
        if args.plot and Path(args.plot).resolve() == Path(args.output).resolve():
            raise CruiseplanError("--output and --plot name the same file")
    af = read_airframe(path)
    mass = (parse_quantity(args.reference_mass, "kg", default_unit="kg",
                           what="--reference-mass") if args.reference_mass else None)
    if mass is not None and mass <= 0:
        raise UnitError(f"--reference-mass {args.reference_mass!r} must be positive")
    log = read_flight_log(args.log)
    fit = fit_flight_log(af, log, reference_mass=mass)
    if args.output and getattr(af.polar, "kind", None) != "parabolic":
        raise CruiseplanError(f"--output: {af.name} has a {getattr(af.polar, 'kind', 'no')} "
                              "polar; the fit writes cd0 and oswald_e of a parabolic one")
    units = args.units or _default_units(af)
    text = fit_report(fit, log, af, units=units).render(args.format)
    toml = None
    if args.output:
        toml = fitted_airframe_text(path.read_bytes().decode("utf-8"), fit,
                                    log_name=Path(args.log).name)
        check_airframe_text(toml)
    figure = None
    if args.plot:
        from cruiseplan import plots

        figure = plots.figure_bytes(plots.fit_residuals(fit, af, units=units,
                                                        log_name=Path(args.log).name),
                                    args.plot)
    written = []
    try:
        if toml is not None:
            write_atomic(args.output, toml)
            written.append(Path(args.output))
        if figure is not None:
            write_bytes_atomic(args.plot, figure)
            written.append(Path(args.plot))
    except BaseException:
        for done in written:  # the outputs are written whole or not at all
            done.unlink(missing_ok=True)
        raise
    sys.stdout.write(text)


COMMANDS = {"airframes": cmd_airframes, "atmosphere": cmd_atmosphere, "table": cmd_table,
            "best": cmd_best, "plan": cmd_plan, "plot": cmd_plot, "card": cmd_card,
            "fit": cmd_fit}


def _show_warning(message, category, filename, lineno, file=None, line=None):
    sys.stderr.write(f"cruiseplan: warning: {message}\n")


def main(argv=None) -> int:
    """Run the command line; returns the exit status."""
    warnings.showwarning = _show_warning
    # Figures are drawn off-screen; the backend is chosen here, in the command line's own
    # process, not on importing the plotting module (which would change a notebook's).
    import os

    os.environ.setdefault("MPLBACKEND", "Agg")
    try:
        args = build_parser().parse_args(argv)
        COMMANDS[args.command](args)
    except (CruiseplanError, ValueError, OSError) as exc:
        msg = " ".join(str(exc).split())
        sys.stderr.write(f"cruiseplan: error: {msg}\n")
        return EXIT_BAD_INPUT
    except BrokenPipeError:  # pragma: no cover - e.g. piped into head
        return 0
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
