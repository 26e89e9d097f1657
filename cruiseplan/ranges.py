"""Physical ranges of the inputs, stated once for the command line, the files and the API.

Every number that comes in (an option, a file field, an API argument) is finite and lies in
the range its quantity can physically take; a value outside it is bad input
(:class:`~cruiseplan.errors.CruiseplanError`, naming the option or field and the range),
never a confident wrong answer. :func:`check_range` does the check; :data:`RANGES` holds
the limits in SI.

Also here: the work budget (:data:`MAX_WORK`), checked before computing.
"""

from __future__ import annotations

import math

import numpy as np

from cruiseplan.errors import CruiseplanError

#: Quantity -> (lowest, highest, unit of the message, factor from SI to that unit,
#: whether the ends are allowed). SI values.
RANGES = {
    "isa_dev": (-60.0, 60.0, "K", 1.0, True),
    "stall_margin": (1.0, 3.0, "", 1.0, True),
    "course": (0.0, 360.0, "deg", 1.0, True),
    "mass": (0.0, 1.0e5, "kg", 1.0, False),          # a small aircraft or drone
    "payload": (0.0, 1.0e5, "kg", 1.0, True),
    "headwind": (-150.0, 150.0, "m/s", 1.0, True),   # about 290 kt either way
    "speed": (0.0, 300.0, "m/s", 1.0, True),         # about 580 kt, far past any propeller
    "altitude": (-5000.0, 80000.0, "m", 1.0, True),  # the atmosphere model
    "oat": (183.15, 333.15, "degC", 1.0, True),      # -90 to 60 degC
    "climb_reserve": (0.0, 50.0, "m/s", 1.0, True),
    "seed": (0, 2**32 - 1, "", 1.0, True),
    "monte_carlo": (1, 1_000_000, "samples", 1.0, True),
}

#: Most points x samples one command computes (a grid, a Monte Carlo, a card): about 1 GB
#: of working arrays; checked before computing.
MAX_WORK = 20_000_000


def _fmt(x, unit):
    if unit == "degC":
        return f"{x - 273.15:g} degC"
    text = f"{int(x)}" if float(x).is_integer() and abs(x) < 1e15 else f"{x:g}"
    return f"{text} {unit}".rstrip()


def check_range(value, quantity: str, what: str):
    """``value`` if it is finite and in the physical range of ``quantity``.

    Parameters
    ----------
    value : float or array_like
        The value(s) in SI.
    quantity : str
        A key of :data:`RANGES`.
    what : str
        The option or field, for the message (``"--isa-dev"``).

    Returns
    -------
    float or array_like
        ``value`` unchanged.

    Raises
    ------
    CruiseplanError
        For a non-finite value or one outside the range, naming ``what`` and the range.
    """
    lo, hi, unit, _, closed = RANGES[quantity]
    if type(value) is float and (lo <= value if closed else lo < value) and value <= hi:
        return value  # the common case, without building arrays (NaN fails both tests)
    arr = np.asarray(value, dtype=float)
    if not np.all(np.isfinite(arr)):
        raise CruiseplanError(f"{what}: {value!r} is not a finite number")
    ok = (arr >= lo) & (arr <= hi) if closed else (arr > lo) & (arr <= hi)
    if not np.all(ok):
        bad = float(arr.ravel()[int(np.argmin(ok.ravel()))])
        ends = "" if closed else " (exclusive of the lower end)"
        raise CruiseplanError(f"{what}: {_fmt(bad, unit)} is out of range "
                              f"({_fmt(lo, unit)} to {_fmt(hi, unit)}{ends})")
    return value


def check_work(points: float, what: str, samples: float = 1.0):
    """Raise before computing when ``points`` x ``samples`` is over :data:`MAX_WORK`.

    Parameters
    ----------
    points : float
        Points to compute (e.g. altitudes x speeds) [-].
    what : str
        What is asked, for the message (``"--altitudes x --speeds"``).
    samples : float, optional
        Samples per point (a Monte Carlo) [-].

    Raises
    ------
    CruiseplanError
        With the figure and the limit.
    """
    work = float(points) * float(samples)
    if not math.isfinite(work) or work > MAX_WORK:
        extra = f" x {samples:g} samples" if samples != 1 else ""
        raise CruiseplanError(f"{what}: {points:g} points{extra} = {work:.3g} evaluations; "
                              f"at most {MAX_WORK:.3g} allowed (use coarser steps or fewer "
                              "samples)")
