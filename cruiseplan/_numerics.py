"""Vectorised bracketed searches: every element of an array is solved at once.

These replace per-point calls to scalar optimisers: each iteration evaluates the model once
on the whole array, so the cost is a few dozen array evaluations whatever the array size.
"""

from __future__ import annotations

import numpy as np

#: Arrays at least this large are worked on in place (large grids: each new array of a
#: million points costs as much as the arithmetic on it); smaller ones by plain
#: expressions, whose per-call cost is lower.
IN_PLACE_SIZE = 4096


def _constant(x):
    a = np.array(x, dtype=float)
    a.flags.writeable = False
    return a


#: 0, 1, 2 and NaN as read-only 0-d arrays: a ufunc takes them quicker than Python floats
#: (the same figures), which counts in the planner's loops over small arrays.
ZERO, ONE, TWO, NAN = (_constant(x) for x in (0.0, 1.0, 2.0, np.nan))


def owned(a, shape) -> bool:
    """True if an expression's result may overwrite ``a``.

    That is, ``a`` is a writable float array of ``shape``, at least :data:`IN_PLACE_SIZE`
    long.
    """
    return (type(a) is np.ndarray and a.size >= IN_PLACE_SIZE and a.shape == shape
            and a.dtype == np.float64 and a.flags.writeable)


def fits(a, shape) -> bool:
    """True if ``a`` broadcasts to ``shape`` without growing it (an in-place operand)."""
    sa = np.shape(a)
    return len(sa) <= len(shape) and all(
        x == 1 or x == y for x, y in zip(sa[::-1], shape[::-1]))


def set_flag(bits, condition, flag):
    """``bits |= flag`` where ``condition`` holds, in place.

    No array of the bits' size is made on the way (a large grid keeps few bytes per point).

    Parameters
    ----------
    bits : numpy.ndarray
        Unsigned integer bit sets, changed in place.
    condition : array_like of bool
        Where to set the flag, broadcastable to ``bits``.
    flag : numpy.unsignedinteger
        The bit(s), of ``bits``' dtype.

    Returns
    -------
    numpy.ndarray
        ``bits``.
    """
    if not any_true(condition):
        return bits  # counted first (a count is cheap): no pass over the bits
    return np.bitwise_or(bits, flag, out=bits, where=condition)


def any_true(a) -> bool:
    """``np.any(a)``, reading a broadcast view of one value once, not at every element.

    Counted by ``np.count_nonzero``, which takes a fraction of the time of a reduction
    (``a.any()``) on the small arrays of a best-cruise call.
    """
    a = np.asarray(a)
    if a.size and not any(a.strides):
        return bool(a.flat[0])
    return bool(np.count_nonzero(a))


def all_true(a) -> bool:
    """``np.all(a)`` (NaN counts as true), by ``np.count_nonzero`` as :func:`any_true`."""
    a = np.asarray(a)
    return bool(np.count_nonzero(a) == a.size)


def grid_minimise(f, lo, hi, *, xtol_rel=1e-10, points=17, max_iter=100):
    """Minimise a unimodal ``f`` on [lo, hi] element-wise by successive uniform grids.

    Each step evaluates ``f`` at ``points`` equally spaced abscissae of every element's
    bracket in one call and keeps the two grid intervals around the least value, so the
    bracket shrinks by (points - 1) / 2 per call: 8 for 17 points, against 1.6 for
    golden-section search. For a modest tolerance that takes a few calls on larger arrays instead of
    thirty on small ones. NaN values count as worse. An element's bracket stops changing
    once it meets the tolerance, so its result does not depend on the other elements.

    Parameters
    ----------
    f : callable
        Maps abscissae of shape ``(points,) + shape`` (``shape`` the broadcast shape of
        ``lo`` and ``hi``) to values of the same shape.
    lo, hi : array_like
        Bracket ends.
    xtol_rel : float, optional
        Relative width of the final bracket [-]: it ends within
        ``xtol_rel * (|lo| + |hi|)`` of the bracket's ends.
    points : int, optional
        Abscissae per step, at least 3.
    max_iter : int, optional
        Most steps.

    Returns
    -------
    numpy.ndarray
        The middle of the final bracket, of shape ``shape``.
    """
    a, b = np.broadcast_arrays(np.asarray(lo, dtype=float), np.asarray(hi, dtype=float))
    a, b = a.copy(), b.copy()
    t = np.linspace(0.0, 1.0, points).reshape((points,) + (1,) * a.ndim)
    last = points - 1
    # The grid intervals kept around the least value i: from i - 1 to i + 1, within the
    # grid (the same integers as max(i - 1, 0) and min(i + 1, last), read by index).
    below = np.maximum(np.arange(points) - 1, 0)
    above = np.minimum(np.arange(points) + 1, last)
    for _ in range(max_iter):
        width = b - a
        done = np.abs(width) <= xtol_rel * np.maximum(np.abs(a) + np.abs(b), 1e-300)
        n_done = np.count_nonzero(done)
        if n_done == done.size:
            break
        i = np.argmin(_finite(f(a + t * width)), axis=0)
        step = width / last
        a_new, b_new = a + below[i] * step, a + above[i] * step
        if n_done:  # finished elements keep their bracket
            a_new, b_new = np.where(done, a, a_new), np.where(done, b, b_new)
        a, b = a_new, b_new
    return 0.5 * (a + b)


_SQRT_EPS = np.sqrt(np.finfo(float).eps)
_GOLDEN_MEAN = 0.5 * (3.0 - np.sqrt(5.0))


def brent_minimise(f, lo, hi, *, xtol_rel=1e-10, max_iter=500):
    """Minimise ``f`` on [lo, hi] element-wise by Brent's method, all elements at once.

    Golden-section search with parabolic interpolation. The steps follow Brent's bounded
    minimiser (as in ``scipy.optimize.fminbound``), every branch taken per element through
    masks. A smooth optimum takes about ten
    evaluations of ``f``; a kink falls back to golden-section steps, so it never does worse
    than golden section by more than a small factor. NaN values count as worse.

    References
    ----------
    .. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall,
       1973, ch. 5.
    """
    a, b = np.broadcast_arrays(np.asarray(lo, dtype=float), np.asarray(hi, dtype=float))
    a, b = a.copy(), b.copy()
    xatol = xtol_rel * np.maximum(np.abs(a) + np.abs(b), 1e-300)
    xf = a + _GOLDEN_MEAN * (b - a)
    nfc, fulc = xf.copy(), xf.copy()
    fx = _finite(f(xf))
    fnfc, ffulc = fx.copy(), fx.copy()
    rat = np.zeros_like(a)
    e = np.zeros_like(a)
    for _ in range(max_iter):
        xm = 0.5 * (a + b)
        tol1 = _SQRT_EPS * np.abs(xf) + xatol / 3.0
        tol2 = 2.0 * tol1
        active = np.abs(xf - xm) > (tol2 - 0.5 * (b - a))
        if not np.any(active):
            break
        # Parabola through the three best points.
        r = (xf - nfc) * (fx - ffulc)
        q = (xf - fulc) * (fx - fnfc)
        p = (xf - fulc) * q - (xf - nfc) * r
        q = 2.0 * (q - r)
        p = np.where(q > 0.0, -p, p)
        q = np.abs(q)
        try_parabola = np.abs(e) > tol1
        e_old = e
        e = np.where(try_parabola, rat, e)
        with np.errstate(divide="ignore", invalid="ignore"):
            accept = (try_parabola & (np.abs(p) < np.abs(0.5 * q * e_old))
                      & (p > q * (a - xf)) & (p < q * (b - xf)))
            rat_par = p / q
        x_par = xf + rat_par
        near_end = ((x_par - a) < tol2) | ((b - x_par) < tol2)
        sign_m = np.sign(xm - xf) + ((xm - xf) == 0)
        rat_par = np.where(near_end, tol1 * sign_m, rat_par)
        e_gold = np.where(xf >= xm, a - xf, b - xf)
        e = np.where(accept, e, e_gold)
        rat = np.where(accept, rat_par, _GOLDEN_MEAN * e_gold)
        si = np.sign(rat) + (rat == 0)
        x = xf + si * np.maximum(np.abs(rat), tol1)
        x = np.where(active, x, xf)
        fu = _finite(f(x))
        better = (fu <= fx) & active
        worse = ~better & active
        # Bracket update.
        a = np.where(better & (x >= xf), xf, np.where(worse & (x < xf), x, a))
        b = np.where(better & (x < xf), xf, np.where(worse & (x >= xf), x, b))
        # Best-point bookkeeping.
        w1 = worse & ((fu <= fnfc) | (nfc == xf))
        w2 = worse & ~w1 & ((fu <= ffulc) | (fulc == xf) | (fulc == nfc))
        fulc, ffulc = (np.where(better | w1, nfc, np.where(w2, x, fulc)),
                       np.where(better | w1, fnfc, np.where(w2, fu, ffulc)))
        nfc, fnfc = (np.where(better, xf, np.where(w1, x, nfc)),
                     np.where(better, fx, np.where(w1, fu, fnfc)))
        xf, fx = np.where(better, x, xf), np.where(better, fu, fx)
    return xf


def _finite(values):
    values = np.asarray(values, dtype=float)
    return np.where(np.isnan(values), np.inf, values)


def illinois_root(f, lo, hi, *, xtol_rel=1e-12, max_iter=200):
    """Root of ``f`` on [lo, hi] element-wise by the Illinois method.

    Modified false position, for a sign change between the ends; superlinear.

    Elements without a sign change return the end with the smaller ``|f|``; callers check
    the bracket.

    References
    ----------
    .. [1] M. Dowell and P. Jarratt, "A modified regula falsi method for computing the root
       of an equation", *BIT* 11, 1971, pp. 168-174.
    """
    a, b = np.broadcast_arrays(np.asarray(lo, dtype=float), np.asarray(hi, dtype=float))
    a, b = a.copy(), b.copy()
    fa, fb = np.asarray(f(a), dtype=float), np.asarray(f(b), dtype=float)
    fa, fb = np.broadcast_to(fa, a.shape).copy(), np.broadcast_to(fb, b.shape).copy()
    bracketed = np.sign(fa) * np.sign(fb) <= 0
    fallback = np.where(np.abs(fa) <= np.abs(fb), a, b)
    for _ in range(max_iter):
        with np.errstate(divide="ignore", invalid="ignore"):
            c = b - fb * (b - a) / (fb - fa)
        bad = ~np.isfinite(c) | (c <= np.minimum(a, b)) | (c >= np.maximum(a, b))
        c = np.where(bad, 0.5 * (a + b), c)
        done = (np.abs(b - a) <= xtol_rel * np.maximum(np.abs(a) + np.abs(b), 1e-300)) \
            | (fb == 0) | ~bracketed
        if np.all(done):
            break
        c = np.where(done, b, c)
        fc = np.asarray(f(c), dtype=float)
        # Keep the sign change between a and b; halve the stale end's value (Illinois).
        flip = np.sign(fc) * np.sign(fb) < 0
        a_new = np.where(flip, b, a)
        fa_new = np.where(flip, fb, 0.5 * fa)
        a, fa = np.where(done, a, a_new), np.where(done, fa, fa_new)
        b, fb = np.where(done, b, c), np.where(done, fb, fc)
    return np.where(bracketed, b, fallback)


def monotone_slopes(x, y):
    """Fritsch-Carlson slopes at the points of a monotone piecewise cubic through (x, y).

    Interior slopes are weighted harmonic means of the neighbouring secants where they
    agree in sign (zero otherwise); end slopes by the three-point formula, kept monotone.

    Parameters
    ----------
    x : numpy.ndarray
        Abscissae, strictly increasing, at least 2.
    y : numpy.ndarray
        Ordinates, same length.

    Returns
    -------
    numpy.ndarray
        dy/dx at each point.

    References
    ----------
    .. [1] F. N. Fritsch and R. E. Carlson, "Monotone Piecewise Cubic Interpolation",
       *SIAM J. Numer. Anal.* 17(2), 1980, pp. 238-246.
    """
    h = np.diff(x)
    delta = np.diff(y) / h
    d = np.zeros_like(y)
    if x.size == 2:
        return np.full_like(y, delta[0])
    # Interior: weighted harmonic mean where neighbouring secants agree in sign, else 0.
    w1, w2 = 2 * h[1:] + h[:-1], h[1:] + 2 * h[:-1]
    same = delta[:-1] * delta[1:] > 0
    with np.errstate(divide="ignore", invalid="ignore"):
        d[1:-1] = np.where(same, (w1 + w2) / (w1 / delta[:-1] + w2 / delta[1:]), 0.0)
    # Ends: three-point formula, kept monotone.
    for end, (h0, h1, d0, d1) in ((0, (h[0], h[1], delta[0], delta[1])),
                                  (-1, (h[-1], h[-2], delta[-1], delta[-2]))):
        slope = ((2 * h0 + h1) * d0 - h0 * d1) / (h0 + h1)
        if np.sign(slope) != np.sign(d0):
            slope = 0.0
        elif np.sign(d0) != np.sign(d1) and abs(slope) > abs(3 * d0):
            slope = 3 * d0
        d[end] = slope
    return d
