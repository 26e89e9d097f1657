"""The commands that draw: ``plot`` (map, power curves, altitude profile) and ``card``.

They alone import matplotlib (through :mod:`cruiseplan.plots`), when they run.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

from cruiseplan.cli import options
from cruiseplan.cli.progress import monte_carlo_progress
from cruiseplan.errors import CruiseplanError, UnitError
from cruiseplan.io.airframe_file import find_airframe, load_airframe
from cruiseplan.io.text import parse_reserve
from cruiseplan.planning.optimise import best_cruise
from cruiseplan.planning.performance import cruise_grid
from cruiseplan.ranges import check_range, check_work
from cruiseplan.report.output import write_bytes_atomic, write_files_atomic
from cruiseplan.units import parse_range


def register(sub):
    """Add ``plot`` and ``card`` to the subcommand parsers ``sub``.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The main parser's subcommand parsers.
    """
    def common(p, what):
        p.add_argument("airframe", help=options.AIRFRAME_HELP)
        p.add_argument("--output", "-o", metavar="FILE", required=True, help=what)
        options.add_loading(p)
        options.add_units(p)

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
    options.add_wind(p)
    options.add_pack_temperature(p)
    p.set_defaults(run=cmd_plot)

    p = sub.add_parser("card", help="kneeboard cruise card FILE.pdf (A5, more pages when "
                                    "the tables need them) and its markdown twin FILE.md")
    common(p, "FILE.pdf; the markdown twin FILE.md is written beside it")
    p.add_argument("--altitudes", help="pressure altitudes (default 0:8000ft:2000ft; drones "
                                       "0:400m:100m)")
    p.add_argument("--power", help="power settings in %% of rated power (default 55,65,75; "
                                   "drones 20,30,40)")
    p.add_argument("--reserve", help="reserve to keep: '30min' (flown at normal cruise "
                                     "power, 65%% for engines, 30%% for electric motors), "
                                     "'25%%' of the usable capacity, or '10L', '7kg', "
                                     "'120Wh' (default: piston 45min, electric 25%%; local "
                                     "rules decide)")
    p.add_argument("--page", choices=("A5", "A4"), default="A5", type=str.upper,
                   help="paper size of the card (default A5, a kneeboard page)")
    options.add_pack_temperature(p)
    options.add_monte_carlo(p)
    p.set_defaults(run=cmd_card)


def cmd_plot(args):
    """Draw a specific-range map, power curves or altitude profile to .png or .pdf.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``plot`` options: airframe, output, kind, altitudes [ft when bare], speeds
        [kt or km/h when bare], loading, wind and units.

    Raises
    ------
    CruiseplanError
        For options that do not go together (``--speeds`` with the altitude profile,
        wind with power curves), speeds that are not at least two increasing positive
        values (a :class:`~cruiseplan.errors.UnitError`), or any error of the airframe,
        the loading or the figure.
    """
    out = options.figure_path(args.output, (".png", ".pdf"))
    options.guard_outputs(args, [find_airframe(args.airframe)])
    af = load_airframe(args.airframe)
    batteries = not af.propulsion.store.burns_mass
    units = options.read_units(args, af)
    defaults = {"power": "0,200,400m" if batteries else "0,4000,8000,12000ft"}
    h = options.read_altitudes(args.altitudes or defaults.get(
        args.kind, "0:500m:25m" if batteries else "0:12000ft:500ft"))
    dev = options.read_isa_dev(args)
    af, _ = options.at_pack_temperature(af, args, float(np.min(h)), dev)
    loading = options.read_loading(af, args)
    profile, headwind, wind_text = options.read_wind(args)
    windy = profile is not None or headwind is not None
    if args.speeds and args.kind == "altitude":
        raise CruiseplanError("--speeds goes with --kind map or power; the altitude profile "
                              "finds its own best speeds")
    if windy and args.kind == "power":
        raise CruiseplanError("wind does not change power curves: --wind and --headwind go "
                              "with --kind map or altitude")
    v = None
    if args.speeds:
        v = parse_range(args.speeds, "m/s", default_unit="kt" if units.startswith("aviation")
                        else "km/h", what="--speeds")
        slowest = 0.0 if af.hovers else np.nextafter(0.0, 1.0)
        if v.size < 2 or (v < slowest).any() or (v[1:] <= v[:-1]).any():
            raise UnitError(f"--speeds: {args.speeds!r} must be at least two increasing "
                            "speeds, positive (0, the hover, only for a kind that hovers)")
        check_range(v, "speed", "--speeds")
        check_work(h.size * v.size, "--altitudes x --speeds")

    from cruiseplan import plots  # matplotlib, only for the figure

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
        grid = cruise_grid(af, h, v, isa_dev=dev, stall_margin=args.stall_margin,
                           wind=profile, course=args.course if profile else None,
                           headwind=headwind or 0.0, **loading)
        best = best_cruise(af, h, isa_dev=dev, stall_margin=args.stall_margin, **wind_kw,
                           **loading)
        fig = plots.specific_range_map(af, grid, best, units=units, ground=windy,
                                       wind_text=wind_text, stall_margin=args.stall_margin)
    write_bytes_atomic(out, plots.figure_bytes(fig, out))
    sys.stdout.write(f"wrote {out}\n")


def cmd_card(args):
    """Write the cruise card FILE.pdf (A5 pages unless asked) and its markdown twin FILE.md.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``card`` options: airframe, output, altitudes [ft when bare], power
        [percent when bare], reserve, page size, loading, units and Monte Carlo.

    Raises
    ------
    CruiseplanError
        For an output not ending in .pdf, or any error of the airframe, the options or
        the card; neither file is left behind then.
    """
    out = Path(options.figure_path(args.output, (".pdf",)))
    twin = out.with_suffix(".md")
    options.guard_outputs(args, [find_airframe(args.airframe)], output_markdown_twin=twin)
    af = load_airframe(args.airframe)
    h = options.read_altitudes(args.altitudes) if args.altitudes else None
    frac = options.power_settings(args.power) if args.power else None
    dev = options.read_isa_dev(args)
    af, _ = options.at_pack_temperature(af, args, 0.0 if h is None else float(np.min(h)), dev)
    reserve = parse_reserve(args.reserve, af.propulsion) if args.reserve else None

    from cruiseplan import plots  # matplotlib's fonts, only for the card

    n = options.monte_carlo_n(args)
    with monte_carlo_progress(n) as progress:
        markdown, pages = plots.cruise_card(af, altitudes=h, power_settings=frac,
                                            isa_dev=dev, reserve=reserve,
                                            units=options.read_units(args, af),
                                            stall_margin=args.stall_margin,
                                            monte_carlo=n, seed=args.seed,
                                            progress=progress, page=args.page,
                                            **options.read_loading(af, args))
    pdf = plots.card_pdf(pages)
    write_files_atomic({out: pdf, twin: markdown})  # the pair whole or not at all
    sys.stdout.write(f"wrote {out} and {twin}\n")
