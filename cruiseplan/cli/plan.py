"""The ``plan`` command: a mission file planned to GO or NO-GO, with what-if overrides."""

from __future__ import annotations

from cruiseplan.cli import options
from cruiseplan.cli.progress import monte_carlo_progress
from cruiseplan.errors import CruiseplanError
from cruiseplan.io.forecast_file import read_forecast
from cruiseplan.io.mission_file import apply_overrides, load_mission
from cruiseplan.planning.forecast import plan_with_forecast
from cruiseplan.planning.mission import plan_mission
from cruiseplan.planning.nogo import what_would_make_it_go
from cruiseplan.planning.survey import plan_survey
from cruiseplan.planning.uncertainty import plan_uncertainty
from cruiseplan.report.output import is_special, write_bytes_atomic, write_files_atomic
from cruiseplan.report.tables import plan_report, survey_report


def register(sub):
    """Add ``plan`` to the subcommand parsers ``sub``.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The main parser's subcommand parsers.
    """
    p = sub.add_parser("plan", help="plan a mission file: segments, reserve, GO / NO-GO")
    p.add_argument("mission", help="mission TOML file, or a bundled mission name")
    p.add_argument("--plot", metavar="FILE", help="also draw the profile, or a survey's plan "
                                                  "view (.png or .pdf)")
    options.add_monte_carlo(p)
    options.add_output(p, formats=("text", "json", "csv", "markdown"))
    _add_what_if(p)
    options.add_forecast(p)
    p.set_defaults(run=cmd_plan)


#: The what-if options, by the keyword of :func:`~cruiseplan.io.mission_file.apply_overrides`.
WHAT_IF_OPTIONS = {"altimeter": "--altimeter", "isa_dev": "--isa-dev", "oat": "--oat",
                   "wind": "--wind", "fuel": "--fuel", "payload": "--payload",
                   "pack_temperature": "--pack-temperature"}


def _add_what_if(p):
    """Add the what-if overrides of the mission file to ``plan``."""
    g = p.add_argument_group("what-if", "overrides of the mission file, echoed in the plan's "
                                        "header")
    day = g.add_mutually_exclusive_group()
    day.add_argument("--isa-dev", help="ISA temperature deviation, e.g. '+15 K'")
    day.add_argument("--oat", help="outside air temperature at the departure field, e.g. "
                                   "'32 degC'")
    g.add_argument("--wind", help="winds aloft for every leg, DIR/SPEED@ALT, e.g. "
                                  "'270/25@3000ft,250/40@8000ft' (the legs keep their courses)")
    g.add_argument("--fuel", help="fuel or energy on board: '40 L', '450 Wh' or '60%%' of "
                                  "capacity (the take-off mass follows)")
    g.add_argument("--payload", help="crew and payload, e.g. '80 kg' (the fuel stays)")
    g.add_argument("--altimeter", help="QNH, e.g. '1009 hPa' or '29.80 inHg': the file's "
                                       "elevations and altitudes are read on it")
    options.add_pack_temperature(g, "battery pack temperature, e.g. '5 degC' (a pack given "
                                    "as a circuit; default the mission file's, else the "
                                    "day's at the departure field)")


def cmd_plan(args):
    """Plan a mission, or a survey in packs; a NO-GO is a result (exit 0), not an error.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``plan`` options: mission, plot, Monte Carlo, format, output, units, the
        what-if overrides and the forecast.

    Raises
    ------
    CruiseplanError
        For a plot file not ending in .png or .pdf, a Monte Carlo count out of range, a
        what-if value that cannot be read or is out of range, a forecast file that cannot
        be read or does not cover the route, or any error of the mission file.
    """
    if args.plot:
        options.figure_path(args.plot, (".png", ".pdf"), "--plot")
    options.guard_outputs(args, [options.input_file(args.mission)], plot=args.plot)
    n = options.monte_carlo_n(args)
    what_if = {k: getattr(args, k) for k in WHAT_IF_OPTIONS}
    mission = apply_overrides(load_mission(args.mission), **what_if, names=WHAT_IF_OPTIONS)
    forecast, departure = options.read_forecast_request(
        args, mission, [(WHAT_IF_OPTIONS[k], getattr(args, k)) for k in ("wind", "isa_dev",
                                                                         "oat")])
    args.units = options.read_units(args, mission.airframe)
    if mission.survey is not None:
        if forecast is not None:
            raise CruiseplanError("--forecast: a survey mission is planned without a "
                                  "forecast (not available for surveys yet)")
        _plan_survey(args, mission, n)
        return
    if forecast is None:
        plan = plan_mission(mission)
    else:
        plan = plan_with_forecast(mission, read_forecast(forecast), departure)
    with monte_carlo_progress(n) as progress:
        spread = plan_uncertainty(plan, n, args.seed, progress=progress) if n else None
    remedies = None if plan.go else what_would_make_it_go(plan)
    rep = plan_report(plan, args.units, spread, remedies)
    if args.plot:
        from cruiseplan import plots  # matplotlib, only for the figure

        data = plots.figure_bytes(plots.mission_profile(plan, units=args.units), args.plot)
        _emit_with_plot(rep, args, data)
        return
    options.emit_report(rep, args)


def _plan_survey(args, mission, n):
    """Plan a survey mission in packs; print the packs, draw the plan view with --plot."""
    if n:
        raise CruiseplanError("--monte-carlo: a survey mission is planned in packs without "
                              "a Monte Carlo (not available for surveys yet)")
    splan = plan_survey(mission)
    rep = survey_report(splan, args.units)
    if args.plot:
        from cruiseplan import plots  # matplotlib, only for the figure

        data = plots.figure_bytes(plots.survey_plan_view(splan, units=args.units), args.plot)
        _emit_with_plot(rep, args, data)
        return
    options.emit_report(rep, args)


def _emit_with_plot(rep, args, data: bytes):
    """Write the report and the plot whole or not at all (the plot alone when printing)."""
    if not args.output or is_special(args.output):
        write_bytes_atomic(args.plot, data)
        options.emit_report(rep, args)
        return
    files = rep.files(args.format, args.output, csv_header=bool(args.csv_header))
    files[args.plot] = data
    write_files_atomic(files)
