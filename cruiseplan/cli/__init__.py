"""Command line: ``cruiseplan airframes | atmosphere | table | best | plan | plot | card | fit``.

A thin layer: parse text with units into SI, call the public API, render a report. Bad
input (a :class:`~cruiseplan.errors.CruiseplanError`, or a file that cannot be read or
written) gives one line on stderr and exit status 2; anything else is a bug and shows its
traceback. Output files are written whole or not at all. matplotlib is imported only by the
commands that draw.
"""

from __future__ import annotations

import importlib
import os
import sys
import warnings

from cruiseplan.cli import options
from cruiseplan.errors import CruiseplanError
from cruiseplan.version import __version__

#: Each command family (a module of this package with a ``register(sub)``) and the commands
#: it registers, in the order of the help. A command imports only its own family, so that
#: ``cruiseplan table`` does not load the mission planner, the log fit or the card.
FAMILIES = {
    "tables": ("airframes", "atmosphere", "table", "best"),
    "plan": ("plan",),
    "figures": ("plot", "card"),
    "fit": ("fit",),
    "sweep": ("sweep",),
}
FAMILY_OF = {command: family for family, commands in FAMILIES.items() for command in commands}

#: Exit status for bad input.
EXIT_BAD_INPUT = 2
#: Exit status after Ctrl-C (128 + SIGINT, the shells' convention).
EXIT_INTERRUPTED = 130


def build_parser(command: str | None = None) -> options.Parser:
    """The argument parser of the ``cruiseplan`` command.

    Parameters
    ----------
    command : str, optional
        The command about to run: only its family is imported and registered. None (or an
        unknown name, which the parser then reports) registers every family.

    Returns
    -------
    argparse.ArgumentParser
        With the subcommands of each registered family.
    """
    parser = options.Parser(
        prog="cruiseplan",
        description="Cruise tables, best altitude and speed, and mission plans for small "
                    "propeller aircraft and drones. A planning aid: the flight manual, "
                    "licensed planning and local rules come first.")
    parser.add_argument("--version", action="version", version=f"cruiseplan {__version__}",
                        help="print the version and exit")
    sub = parser.add_subparsers(dest="command", required=True, parser_class=options.Parser)
    families = [FAMILY_OF[command]] if command in FAMILY_OF else list(FAMILIES)
    for family in families:
        importlib.import_module(f"cruiseplan.cli.{family}").register(sub)
    return parser


#: Warnings already shown by this run: each is shown once.
_SHOWN = set()


def _show_warning(message, category, filename, lineno, file=None, line=None):
    text = f"cruiseplan: warning: {message}\n"
    if text not in _SHOWN:
        _SHOWN.add(text)
        sys.stderr.write(text)


def main(argv=None) -> int:
    """Run the command line.

    Parameters
    ----------
    argv : list of str, optional
        Arguments after the program name; ``sys.argv[1:]`` when None.

    Returns
    -------
    int
        Exit status: 0, 2 for bad input, or 130 when interrupted (Ctrl-C: one line on
        stderr; outputs are written whole at the end, so none is left behind). A bug raises
        (exit status 1, with traceback).
    """
    warnings.showwarning = _show_warning
    _SHOWN.clear()
    # Figures are drawn off-screen; the backend is chosen here, in the command line's own
    # process, not on importing the plotting module (which would change a notebook's).
    os.environ.setdefault("MPLBACKEND", "Agg")
    try:
        argv = sys.argv[1:] if argv is None else list(argv)
        # The top-level options (--help, --version) take no value, so the first word that
        # is not an option names the command.
        command = next((a for a in argv if not a.startswith("-")), None)
        args = build_parser(command).parse_args(argv)
        args.run(args)
    except (CruiseplanError, OSError) as exc:
        if isinstance(exc, BrokenPipeError):  # pragma: no cover - e.g. piped into head
            return 0
        msg = " ".join(str(exc).split())
        sys.stderr.write(f"cruiseplan: error: {msg}\n")
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        sys.stderr.write("cruiseplan: interrupted; nothing written\n")
        return EXIT_INTERRUPTED
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
