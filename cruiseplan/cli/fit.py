"""The ``fit`` command: the drag polar from a level-flight log, by PIW-VIW reduction."""

from __future__ import annotations

import sys
from pathlib import Path

from cruiseplan.cli import options
from cruiseplan.errors import CruiseplanError, UnitError
from cruiseplan.io.airframe_file import find_airframe, read_airframe
from cruiseplan.io.flightlog import check_airframe_text, fitted_airframe_text, read_flight_log
from cruiseplan.planning.fit import fit_flight_log
from cruiseplan.ranges import check_range
from cruiseplan.report.fit_report import fit_report
from cruiseplan.report.output import write_files_atomic
from cruiseplan.units import parse_quantity


def register(sub):
    """Add ``fit`` (drag polar from a level-flight log) to the subcommand parsers.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The main parser's subcommand parsers.
    """
    p = sub.add_parser("fit", help="fit the drag polar (CD0, Oswald e) to a level-flight log "
                                   "by PIW-VIW reduction")
    p.add_argument("log", help="flight log CSV whose header names each column with its unit, "
                               "e.g. 'cas [kt]' (see DEVELOPERS.md, Flight logs)")
    p.add_argument("--airframe", required=True,
                   help="bundled airframe name or path to an airframe TOML file")
    p.add_argument("--output", "-o", metavar="NEW.toml",
                   help="write a copy of the airframe file with the fitted cd0 and oswald_e "
                        "(or k), and their standard errors and correlation as the "
                        "[uncertainty] tolerances of cd0 and oswald_e; everything else is "
                        "kept")
    p.add_argument("--plot", metavar="RESIDUALS.png",
                   help="draw the reduced points, the fitted curve and the residuals "
                        "(.png or .pdf)")
    p.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    p.add_argument("--reference-mass", help="mass the points are reduced to, e.g. '1600 lb' "
                                            "(default the maximum take-off mass)")
    options.add_units(p)
    p.set_defaults(run=cmd_fit)


def cmd_fit(args):
    """Fit the drag polar to a flight log; print it, optionally write the airframe and plot.

    Parameters
    ----------
    args : argparse.Namespace
        Parsed ``fit`` options: log, airframe, output, plot, format, reference mass
        [kg when bare] and units.

    Raises
    ------
    CruiseplanError
        For an output that is not a new .toml file or is the plot's file, a reference
        mass that is not positive (a :class:`~cruiseplan.errors.UnitError`), an
        ``--output`` for a polar that is not parabolic, or any error of the log or the
        fit; no partial output is left behind.

    References
    ----------
    .. [1] Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, ch. 9 (PIW-VIW
       reduction), as implemented in :mod:`cruiseplan.planning.fit`.
    """
    if args.plot:
        options.figure_path(args.plot, (".png", ".pdf"), "--plot")
    path = find_airframe(args.airframe)
    if args.output:
        if Path(args.output).suffix.lower() != ".toml":
            raise CruiseplanError(f"--output {args.output}: the airframe file must end in .toml")
        if Path(args.output).resolve() == path.resolve():
            raise CruiseplanError(f"--output {args.output} is the airframe file itself: write "
                                  "the fitted polar to a new file and compare")
    options.guard_outputs(args, [path, options.input_file(args.log)], plot=args.plot)
    af = read_airframe(path)
    mass = (parse_quantity(args.reference_mass, "kg", default_unit="kg",
                           what="--reference-mass") if args.reference_mass else None)
    if mass is not None and mass <= 0:
        raise UnitError(f"--reference-mass {args.reference_mass!r} must be positive")
    if mass is not None:
        check_range(mass, "mass", "--reference-mass")
    log = read_flight_log(args.log)
    fit = fit_flight_log(af, log, reference_mass=mass)
    if args.output and getattr(af.polar, "kind", None) != "parabolic":
        raise CruiseplanError(f"--output: {af.name} has a {getattr(af.polar, 'kind', 'no')} "
                              "polar; the fit writes cd0 and oswald_e of a parabolic one")
    units = options.read_units(args, af)
    text = fit_report(fit, log, af, units=units).render(args.format)
    toml = None
    if args.output:
        toml = fitted_airframe_text(path.read_bytes().decode("utf-8"), fit,
                                    log_name=Path(args.log).name)
        check_airframe_text(toml)
    figure = None
    if args.plot:
        from cruiseplan import plots  # matplotlib, only for the figure

        figure = plots.figure_bytes(plots.fit_residuals(fit, af, units=units,
                                                        log_name=Path(args.log).name),
                                    args.plot)
    files = {}
    if toml is not None:
        files[args.output] = toml
    if figure is not None:
        files[args.plot] = figure
    write_files_atomic(files)  # whole or not at all; a previous file stays until then
    sys.stdout.write(text)
