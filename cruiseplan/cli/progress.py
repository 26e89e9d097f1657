"""Progress of long runs on the terminal: a tqdm bar on stderr, nothing when piped.

The planning layer knows no UI: it calls a ``progress(done, total)`` callback after each
chunk of work. :func:`monte_carlo_progress` hands the command line such a callback, drawing
a bar only when stderr is a terminal and the run has more than one chunk. tqdm is imported
only then.
"""

from __future__ import annotations

import sys
from contextlib import contextmanager

from cruiseplan.planning import uncertainty


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
    if not total or total <= (chunk or uncertainty.CHUNK) or not sys.stderr.isatty():
        yield None
        return
    from tqdm import tqdm  # only when a bar is drawn

    with tqdm(total=total, desc="Monte Carlo", unit=" samples", unit_scale=True,
              file=sys.stderr, leave=False, dynamic_ncols=True) as bar:

        def update(done, n):
            bar.update(done - bar.n)

        yield update
