r"""Tolerances of airframe and mission parameters, as files state them (data only).

A tolerance is relative: a standard deviation (normal) or a range (uniform). Tolerances may
be correlated (:class:`ToleranceCorrelation`): a correlation matrix naming the parameters,
e.g. the correlation of CD0 and Oswald e that a drag-polar fit finds. Sampling them is
:mod:`cruiseplan.planning.uncertainty`'s work; this module holds what they are and the
checks a file's correlation must pass, so the file readers can build them without
importing the planner.

A written correlation is the (Pearson) correlation of the multiplying factors. Samples are
drawn through a Gaussian copula: normal scores z, correlated by a Cholesky factor of the
*score* correlation, mapped to each parameter's own distribution. For two normal
tolerances the score correlation is the written one; a uniform tolerance is a monotone
map of its score, which lowers the correlation, so the score correlation is raised to
give the written one back [1]_:

.. math::

    \rho_{z} = 2 \sin(\pi r / 6) \quad \text{(uniform, uniform)}, \qquad
    \rho_{z} = r \sqrt{\pi / 3} \quad \text{(normal, uniform)}.

References
----------
.. [1] K. Pearson, "On further methods of determining correlation", *Drapers' Company
   Research Memoirs, Biometric Series* IV, 1907 (correlation of the uniform transforms
   of two correlated normals, 6/pi arcsin(rho/2)); the normal-uniform factor
   sqrt(3/pi) is Cov(Z, Phi(Z)) = 1/(2 sqrt(pi)) over the two standard deviations
   (computed).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Tolerance:
    """A relative tolerance: normal (``sd``) or uniform on [``low``, ``high``].

    All are fractions, e.g. 0.05 for 5 %.
    """

    kind: str
    sd: float = 0.0
    low: float = 0.0
    high: float = 0.0

    def factors(self, u):
        """Multiplying factors 1 + delta from uniform [0, 1) numbers ``u``.

        Never below 5 % of nominal.

        Parameters
        ----------
        u : array_like
            Uniform random numbers in [0, 1) [-], one per sample.

        Returns
        -------
        numpy.ndarray
            Factors on the nominal value [-], at least 0.05, shape of ``u``.
        """
        if self.kind == "normal":
            delta = self.sd * normal_ppf(u) if self.sd else np.zeros(np.shape(u))
        else:
            delta = self.low + (self.high - self.low) * np.asarray(u)
        return np.maximum(1.0 + delta, 0.05)

    def factors_of_scores(self, z):
        """Multiplying factors 1 + delta from standard normal scores ``z``.

        The same distribution as :meth:`factors`: a normal tolerance takes the score as
        it is, a uniform one its probability Phi(z). Never below 5 % of nominal.

        Parameters
        ----------
        z : array_like
            Standard normal scores [-], one per sample.

        Returns
        -------
        numpy.ndarray
            Factors on the nominal value [-], at least 0.05, shape of ``z``.
        """
        if self.kind == "normal":
            delta = self.sd * np.asarray(z, dtype=float)
        else:
            delta = self.low + (self.high - self.low) * normal_cdf(z)
        return np.maximum(1.0 + delta, 0.05)


#: Factor from a written correlation r to the normal-score correlation, by the pair's
#: kinds (see the module's notes; a uniform tolerance is Phi of its score).
SCORE_CORRELATION = {
    ("normal", "normal"): lambda r: r,
    ("normal", "uniform"): lambda r: r * np.sqrt(np.pi / 3.0),
    ("uniform", "normal"): lambda r: r * np.sqrt(np.pi / 3.0),
    ("uniform", "uniform"): lambda r: 2.0 * np.sin(np.pi * r / 6.0),
}


@dataclass(frozen=True)
class ToleranceCorrelation:
    """Correlation of toleranced parameters, as a file writes it.

    Parameters
    ----------
    parameters : tuple of str
        Names of the toleranced parameters, in the order of the matrix's rows.
    matrix : tuple of tuple of float
        Correlation of their multiplying factors [-]: symmetric, ones on the diagonal,
        positive definite (see :func:`correlation_problem`).
    """

    parameters: tuple
    matrix: tuple

    @property
    def is_zero(self) -> bool:
        """True when every correlation off the diagonal is zero (independent parameters)."""
        m = np.asarray(self.matrix, dtype=float)
        return bool(np.all(m == np.eye(len(m))))

    def score_cholesky(self, tolerances: dict):
        """Lower Cholesky factor of the normal-score correlation [-].

        Parameters
        ----------
        tolerances : dict
            Parameter name to its :class:`Tolerance` (each of :attr:`parameters` in it).

        Returns
        -------
        numpy.ndarray
            L with L L^T the score correlation, shape (p, p) [-].

        Raises
        ------
        numpy.linalg.LinAlgError
            When the score correlation is not positive definite (the readers check this
            with :func:`correlation_problem` first).
        """
        return np.linalg.cholesky(score_correlation(self.parameters, self.matrix,
                                                    tolerances))


def tolerances_text(tolerances, correlation=None) -> str:
    """The toleranced parameters and their correlations, in words for reports.

    Parameters
    ----------
    tolerances : sequence of (str, Tolerance)
        The airframe's tolerances.
    correlation : ToleranceCorrelation, optional
        Their correlation.

    Returns
    -------
    str
        E.g. ``"cd0, oswald_e, bsfc; cd0 and oswald_e correlated +0.830"``, or
        ``"none given"``.
    """
    text = ", ".join(k for k, _ in tolerances) or "none given"
    if correlation is None:
        return text
    names, m = correlation.parameters, correlation.matrix
    pairs = [f"{names[i]} and {names[j]} correlated {m[i][j]:+.3f}"
             for i in range(len(names)) for j in range(i + 1, len(names)) if m[i][j]]
    return "; ".join([text] + pairs)


def score_correlation(parameters, matrix, tolerances: dict):
    """The normal-score correlation that gives factors the written ``matrix`` [-].

    Parameters
    ----------
    parameters : sequence of str
        Names of the rows of ``matrix``.
    matrix : array_like
        Written correlation of the factors, shape (p, p) [-].
    tolerances : dict
        Parameter name to its :class:`Tolerance`.

    Returns
    -------
    numpy.ndarray
        Score correlation, shape (p, p) [-].
    """
    m = np.array(matrix, dtype=float)
    kinds = [tolerances[p].kind for p in parameters]
    for i, ki in enumerate(kinds):
        for j, kj in enumerate(kinds):
            if i != j:
                m[i, j] = SCORE_CORRELATION[ki, kj](m[i, j])
    return m


def correlation_problem(parameters, matrix, tolerances: dict) -> tuple | None:
    """What is wrong with a written correlation, in words, or None if it is good.

    Parameters
    ----------
    parameters : sequence of str
        Names of the matrix's rows; each must have a tolerance, and appear once.
    matrix : array_like
        The correlation matrix [-].
    tolerances : dict
        Parameter name to its :class:`Tolerance` (those the file gives).

    Returns
    -------
    tuple of str or None
        (field, problem): the first problem found, ``"parameters"`` or ``"matrix"`` and
        what is wrong with the values formatted in; None when the matrix is a square,
        symmetric correlation in [-1, 1] with ones on the diagonal whose score correlation
        is positive definite.
    """
    names = list(parameters)
    dup = sorted({p for p in names if names.count(p) > 1})
    if dup:
        return "parameters", f"{dup[0]!r} is named twice"
    missing = [p for p in names if p not in tolerances]
    if missing:
        return "parameters", (f"{missing[0]!r} has no tolerance; toleranced parameters are "
                f"{', '.join(sorted(tolerances)) or 'none'}")
    if len(names) < 2:
        return "parameters", "name at least two parameters"
    try:
        m = np.array(matrix, dtype=float)
    except (TypeError, ValueError):
        return "matrix", f"{matrix!r} is not a matrix of numbers"
    p = len(names)
    if m.shape != (p, p):
        return "matrix", f"a {p} x {p} matrix is expected for {p} parameters, got shape {m.shape}"
    if not np.all(np.isfinite(m)):
        return "matrix", "every entry must be a finite number"
    bad = np.argwhere(np.abs(m) > 1.0)
    if bad.size:
        i, j = bad[0]
        return "matrix", f"entry ({names[i]}, {names[j]}) = {m[i, j]:g} is outside [-1, 1]"
    if not np.all(np.diag(m) == 1.0):
        i = int(np.argmax(np.diag(m) != 1.0))
        return "matrix", f"the diagonal must be 1, entry ({names[i]}, {names[i]}) is {m[i, i]:g}"
    asym = np.argwhere(m != m.T)
    if asym.size:
        i, j = asym[0]
        return "matrix", (f"not symmetric: ({names[i]}, {names[j]}) = {m[i, j]:g} but "
                f"({names[j]}, {names[i]}) = {m[j, i]:g}")
    if not _positive_definite(m):
        return "matrix", ("not positive definite: no set of parameters can be correlated like "
                "this (lower the largest correlations)")
    if not _positive_definite(score_correlation(names, m, tolerances)):
        return "matrix", ("positive definite, but not once the uniform tolerances' correlations "
                "are raised to their normal scores' (lower the largest correlations)")
    return None


def _positive_definite(m) -> bool:
    try:
        np.linalg.cholesky(m)
    except np.linalg.LinAlgError:
        return False
    return True


@dataclass(frozen=True)
class WindTolerance:
    """Standard deviations of the wind speed [m/s] and direction [deg], every leg."""

    speed_sd: float = 0.0
    direction_sd: float = 0.0


def normal_ppf(u):
    """Inverse of the standard normal distribution function at ``u`` in (0, 1).

    Parameters
    ----------
    u : array_like
        Probabilities in (0, 1) [-].

    Returns
    -------
    numpy.ndarray or float
        Standard normal quantiles [-] (-inf at 0, +inf at 1).
    """
    from scipy.special import ndtri

    return ndtri(u)


def normal_cdf(z):
    """Standard normal distribution function Phi at ``z``.

    Parameters
    ----------
    z : array_like
        Standard normal scores [-].

    Returns
    -------
    numpy.ndarray or float
        Probabilities in [0, 1] [-].
    """
    from scipy.special import ndtr

    return ndtr(z)


