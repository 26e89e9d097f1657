"""The ``plan`` command: a mission file planned to GO or NO-GO."""

from __future__ import annotations

from cruiseplan.cli import options
from cruiseplan.io.mission_file import load_mission
from cruiseplan.planning.mission import plan_mission
from cruiseplan.planning.uncertainty import plan_uncertainty
from cruiseplan.report.output import write_bytes_atomic
from cruiseplan.report.tables import plan_report


def register(sub):
    """Add ``plan`` to the subcommand parsers ``sub``.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The main parser's subcommand parsers.
    """
    p = sub.add_parser("plan", help="plan a mission file: segments, reserve, GO / NO-GO")
    p.add_argument("mission", help="mission TOML file, or a bundled mission name")
    p.add_argument("--plot", metavar="FILE", help="also draw the profile (.png or .pdf)")
    options.add_monte_carlo(p)
    options.add_output(p, formats=("text", "json", "csv", "markdown"))
    p.set_defaults(run=cmd_plan)


def cmd_plan(args):
    """Plan a mission; a NO-GO is a result (exit 0), not an error.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``plan`` options: mission, plot, Monte Carlo, format, output and units.

    Raises
    ------
    CruiseplanError
        For a plot file not ending in .png or .pdf, a Monte Carlo count out of range, or
        any error of the mission file.
    """
    if args.plot:
        options.figure_path(args.plot, (".png", ".pdf"), "--plot")
    n = options.monte_carlo_n(args)
    plan = plan_mission(load_mission(args.mission))
    spread = plan_uncertainty(plan, n, args.seed) if n else None
    text = plan_report(plan, args.units, spread).render(args.format)
    if args.plot:
        from cruiseplan import plots  # matplotlib, only for the figure

        data = plots.figure_bytes(plots.mission_profile(plan, units=args.units), args.plot)
        write_bytes_atomic(args.plot, data)
    options.emit(text, args.output)
