"""Progress of long runs on the terminal: a tqdm bar on stderr, nothing when piped.

The planning layer knows no UI: it calls a ``progress(done, total)`` callback after each
chunk of work. :func:`progress_bar` hands the command line such a callback, drawing a bar
only when stderr is a terminal; :func:`monte_carlo_progress` does so for a Monte Carlo of
more than one chunk. tqdm is imported only when a bar is drawn.
"""

from __future__ import annotations

import sys
from contextlib import contextmanager

from cruiseplan.planning import uncertainty


@contextmanager
def progress_bar(total: int, desc: str, unit: str):
    """A progress callback drawing a bar on a terminal's stderr, or None when piped.

    Parameters
    ----------
    total : int
        Units of work in all [-].
    desc : str
        Label before the bar.
    unit : str
        Name of a unit of work (with a leading space, e.g. ``" chunks"``).

    Yields
    ------
    callable or None
        ``progress(done, total)`` [-, -], or None when stderr is not a terminal.
    """
    if not total or not sys.stderr.isatty():
        yield None
        return
    from tqdm import tqdm  # only when a bar is drawn

    with tqdm(total=total, desc=desc, unit=unit, unit_scale=True, file=sys.stderr,
              leave=False, dynamic_ncols=True) as bar:

        def update(done, n):
            bar.update(done - bar.n)

        yield update


@contextmanager
def monte_carlo_progress(total: int | None, chunk: int | None = None):
    """A progress callback for a Monte Carlo of ``total`` samples, or None.

    Parameters
    ----------
    total : int or None
        Samples to run [-]; None or 0 when no Monte Carlo is asked for.
    chunk : int, optional
        Samples per chunk [-]; the planning layer's :data:`CHUNK` when None.

    Yields
    ------
    callable or None
        ``progress(done, total)`` [-, -] updating a bar on stderr, or None when stderr is
        not a terminal or the run fits in one chunk (nothing is shown then).
    """
    if not total or total <= (chunk or uncertainty.CHUNK):
        yield None
        return
    with progress_bar(total, "Monte Carlo", " samples") as update:
        yield update
