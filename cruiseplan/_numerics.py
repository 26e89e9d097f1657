"""Vectorised bracketed searches: every element of an array is solved at once.

These replace per-point calls to scalar optimisers: each iteration evaluates the model once
on the whole array, so the cost is a few dozen array evaluations whatever the array size.
"""

from __future__ import annotations

import numpy as np

_INV_PHI = (np.sqrt(5.0) - 1.0) / 2.0


def golden_minimise(f, lo, hi, *, xtol_rel=1e-10, max_iter=200):
    """Minimise a unimodal ``f`` on [lo, hi] element-wise by golden-section search.

    ``f`` maps an array of abscissae (the broadcast shape of ``lo`` and ``hi``) to an array
    of the same shape. Returns the abscissa of the minimum, to ``xtol_rel`` relative.
    """
    a, b = np.broadcast_arrays(np.asarray(lo, dtype=float), np.asarray(hi, dtype=float))
    a, b = a.copy(), b.copy()
    c = b - _INV_PHI * (b - a)
    d = a + _INV_PHI * (b - a)
    fc, fd = f(c), f(d)
    for _ in range(max_iter):
        if np.all(np.abs(b - a) <= xtol_rel * np.maximum(np.abs(a) + np.abs(b), 1e-300)):
            break
        # Treat NaN on either side as "worse", so the search walks away from it.
        left = (fc < fd) | np.isnan(fd)
        b = np.where(left, d, b)
        a = np.where(left, a, c)
        new = np.where(left, b - _INV_PHI * (b - a), a + _INV_PHI * (b - a))
        fnew = f(new)
        c, d, fc, fd = (np.where(left, new, d), np.where(left, c, new),
                        np.where(left, fnew, fd), np.where(left, fc, fnew))
    return 0.5 * (a + b)


def bisect_increasing(f, lo, hi, *, xtol_rel=1e-12, max_iter=200):
    """Root of ``f`` on [lo, hi] element-wise, for ``f(lo) <= 0 <= f(hi)``.

    Elements without a sign change converge to the nearer end; callers check the bracket.
    """
    a, b = np.broadcast_arrays(np.asarray(lo, dtype=float), np.asarray(hi, dtype=float))
    a, b = a.copy(), b.copy()
    for _ in range(max_iter):
        if np.all(np.abs(b - a) <= xtol_rel * np.maximum(np.abs(a) + np.abs(b), 1e-300)):
            break
        m = 0.5 * (a + b)
        below = f(m) < 0.0
        a = np.where(below, m, a)
        b = np.where(below, b, m)
    return 0.5 * (a + b)
