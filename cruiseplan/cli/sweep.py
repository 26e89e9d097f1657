"""The ``sweep`` command: every point of a study file planned, into a zarr store."""

from __future__ import annotations

import sys
import time
from datetime import datetime, timezone

import numpy as np

from cruiseplan.amounts import format_amount
from cruiseplan.cautions import CAUTIONS
from cruiseplan.cli.options import default_units
from cruiseplan.cli.progress import progress_bar
from cruiseplan.constants import T_ZERO_C
from cruiseplan.errors import CruiseplanError
from cruiseplan.io.bundled import shown_path
from cruiseplan.io.study_file import load_study
from cruiseplan.model.study import BAD_INPUT, GO, NO_GO, NOT_RUN
from cruiseplan.studies.sweep import base_airframe, run_study
from cruiseplan.units import display

#: Exit status after Ctrl-C (as the main command's).
EXIT_INTERRUPTED = 130


def register(sub):
    """Add ``sweep`` to the subcommand parsers ``sub``.

    Parameters
    ----------
    sub : argparse._SubParsersAction
        The main parser's subcommand parsers.
    """
    p = sub.add_parser("sweep", help="plan every point of a study file (axes of ISA "
                                     "deviation, payload, fuel, wind, airframe fields) into "
                                     "a zarr store")
    p.add_argument("study", help="study TOML file, or a bundled study name")
    p.add_argument("-o", "--output", required=True, metavar="OUT.zarr",
                   help="zarr store to write, chunk by chunk (never overwritten)")
    p.add_argument("--resume", action="store_true",
                   help="complete an interrupted store of the same study")
    where = p.add_mutually_exclusive_group()
    where.add_argument("--scheduler", metavar="ADDRESS",
                       help="run on a dask.distributed cluster, e.g. tcp://10.0.0.5:8786 "
                            "(the store's folder must be reachable from every worker)")
    where.add_argument("--workers", type=int, metavar="N",
                       help="local worker processes (default: all cores)")
    p.set_defaults(run=cmd_sweep)


def cmd_sweep(args):
    """Run a study into a zarr store and print a summary.

    Parameters
    ----------
    args : argparse.Namespace
        ``study``, ``output``, ``resume``, ``scheduler`` and ``workers``.

    Raises
    ------
    CruiseplanError
        For a bad study file, an output that exists (without ``--resume``) or is not a
        store of this study, a bad worker count, or a scheduler that cannot be reached.
    """
    if not args.output.endswith(".zarr"):
        raise CruiseplanError(f"--output {args.output}: a study store ends in .zarr")
    if args.workers is not None and not 1 <= args.workers <= 256:
        raise CruiseplanError(f"--workers {args.workers}: expected 1 to 256")
    study = load_study(args.study)
    t0 = time.perf_counter()
    chunks = len(study.all_blocks())
    try:
        with progress_bar(chunks, f"sweep {study.name}", " chunks") as progress:
            ds = run_study(study, args.output, resume=args.resume, scheduler=args.scheduler,
                           workers=args.workers, progress=progress)
    except KeyboardInterrupt:
        sys.stderr.write(f"cruiseplan: interrupted; the chunks finished are in {args.output} "
                         f"and `cruiseplan sweep {args.study} -o {args.output} --resume` "
                         "completes it\n")
        raise SystemExit(EXIT_INTERRUPTED) from None
    sys.stdout.write(summary(study, ds, args.output, time.perf_counter() - t0))


#: Axes shown in the base airframe's display units (the others as they are held).
_DISPLAY_KIND = {"payload": "mass", "wind_speed": "speed", "headwind": "speed"}


def _value_text(axis, value, units: str) -> str:
    if axis.name == "departure":
        return datetime.fromtimestamp(value, timezone.utc).strftime("%Y-%m-%dT%H:%MZ")
    if axis.name == "oat":
        return f"{value - T_ZERO_C:.4g} degC"
    if axis.name in _DISPLAY_KIND:
        factor, label = display(_DISPLAY_KIND[axis.name], units)
        return f"{value * factor:.4g} {label}"
    unit = "" if axis.unit in ("1", "amount") else f" {axis.unit}"
    return f"{value:.4g}{unit}" if isinstance(value, float) else f"{value}{unit}"


def summary(study, ds, output: str, seconds: float) -> str:
    """A text summary of a finished study store.

    Parameters
    ----------
    study : Study
        The study.
    ds : xarray.Dataset
        Its results.
    output : str
        Where they are.
    seconds : float
        Run time [s].

    Returns
    -------
    str
        Axes, points, verdict counts, how to read the store, and the cautions.
    """
    verdict = ds["verdict"].values
    airframe = base_airframe(study)
    units = default_units(airframe)
    lines = [f"Study {study.name}: {study.description}".rstrip(": "),
             f"Base {study.kind}: {shown_path(study.base)}"
             + (f"; forecast {study.forecast}" if study.forecast else ""),
             f"{study.size} points in {len(study.all_blocks())} chunks, "
             f"{seconds:.1f} s; written to {output}", "", "Axes:"]
    for axis in study.axes:
        vals = ", ".join(_value_text(axis, v, units) for v in axis.values[:6])
        more = f", ... ({len(axis)} values)" if len(axis) > 6 else ""
        lines.append(f"  {axis.dim}: {vals}{more}")
    lines += ["", "Verdicts:"]
    for code, word in ((GO, "GO"), (NO_GO, "NO-GO"), (BAD_INPUT, "not planned (bad input)"),
                       (NOT_RUN, "not run")):
        count = int((verdict == code).sum())
        if count or code in (GO, NO_GO):
            lines.append(f"  {word:24s} {count}")
    if "used" in ds and (verdict == GO).any():
        used = np.where(verdict == GO, ds["used"].values, np.inf)
        at = np.unravel_index(int(np.argmin(used)), used.shape)
        where = ", ".join(f"{a.dim} {_value_text(a, a.values[i], units)}"
                          for a, i in zip(study.axes, at))
        amount = format_amount(float(used[at]), airframe.propulsion, units)
        lines += ["", f"Least used among GO points: {amount} at {where}"]
    lines += ["", f"Read it with xarray.open_zarr({output!r}); SI units in each "
                  "variable's attributes.", "", "CAUTION:"]
    lines += [f"  * {c}" for c in CAUTIONS]
    return "\n".join(lines) + "\n"
