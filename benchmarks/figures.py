"""Shared by the benchmark scripts: interleaved medians, and figures checked on targets.

Every figure a script reports goes through :func:`figure`, which prints it with its target
and marks it ``MISSES TARGET`` when it misses; ``run.py`` runs each script in a process of
its own, lists the misses at the end and exits 1 if there are any. No benchmark softens a
target or a baseline to pass.
"""

from __future__ import annotations

import compileall
import statistics
import subprocess
import time
from pathlib import Path

#: Figures that missed their targets in this process: (label, text) pairs.
MISSES = []
#: What ends the printed line of a figure that misses its target (``run.py`` looks for it).
MISS_MARK = "MISSES TARGET"


def interleaved(sides: dict, runs: int, warm: int = 1) -> dict:
    """Median wall time [s] of each side, the sides run in turn (a, b, a, b, ...).

    Running the sides in turn within one run lets a change of machine load touch every
    side alike; each side is called ``warm`` times first (imports, caches).
    """
    times = {name: [] for name in sides}
    for fn in sides.values():
        for _ in range(warm):
            fn()
    for _ in range(runs):
        for name, fn in sides.items():
            t0 = time.perf_counter()
            fn()
            times[name].append(time.perf_counter() - t0)
    return {name: statistics.median(t) for name, t in times.items()}


def byte_compile_package():
    """Byte-compile the package, as ``pip install`` does for an installed copy.

    Whole-command timings need it: with PYTHONDONTWRITEBYTECODE set (as on this machine)
    an editable checkout would compile every module from source at every start, a cost no
    installed user pays and a numpy baseline in site-packages does not pay either.
    """
    compileall.compile_dir(Path(__file__).resolve().parent.parent / "cruiseplan", quiet=1)


def command(cmd) -> callable:
    """A side for :func:`interleaved`: run ``cmd`` as a new process, output captured.

    The run fails (``CalledProcessError``) on a non-zero exit status.
    """
    return lambda: subprocess.run(cmd, check=True, capture_output=True)


def figure(label: str, value: float, target: float, *, at_most: bool = True,
           fmt: str = ".2f", unit: str = "", detail: str = "") -> bool:
    """Print one figure with its target; record and flag it when it misses.

    ``at_most`` is true for a figure that must not exceed the target (times, ratios of
    the API to a baseline), false for one that must reach it (speed-ups). Returns whether
    the target is met.
    """
    ok = value <= target if at_most else value >= target
    sign = "<=" if at_most else ">="
    text = (f"{label}: {value:{fmt}}{unit} (target {sign} {target:{fmt}}{unit})"
            + (f"; {detail}" if detail else ""))
    if not ok:
        MISSES.append((label, text))
    print(text + ("" if ok else "  " + MISS_MARK), flush=True)
    return ok


def full_grid(airframe, h, v):
    """``cruise_grid`` with every output read, as a table reads them (SI arrays).

    ``cruise_grid`` derives most of its outputs (range, endurance, CAS, ...) when first
    read; benchmarks that compare whole grids of two airframe kinds or store models read
    them all, so that each side does the work a table of it takes.
    """
    import dataclasses

    import cruiseplan as cp

    points = cp.cruise_grid(airframe, h, v)
    for field in dataclasses.fields(points):
        getattr(points, field.name)
    return points
