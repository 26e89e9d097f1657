"""Tolerances of airframe and mission parameters, as files state them (data only).

A tolerance is relative: a standard deviation (normal) or a range (uniform). Sampling them
is :mod:`cruiseplan.planning.uncertainty`'s work; this module holds what they are, so the
file readers can build them without importing the planner.
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


