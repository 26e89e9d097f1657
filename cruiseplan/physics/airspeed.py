r"""Airspeeds and the wind triangle.

Conversions between calibrated (CAS), equivalent (EAS) and true airspeed (TAS) and Mach
number use the subsonic compressible pitot relations (isentropic flow, :math:`\gamma = 1.4`):

.. math::

    q_c = p_0 \left[\left(1 + 0.2 (V_c / a_0)^2\right)^{3.5} - 1\right], \qquad
    M = \sqrt{5\left[(q_c/p + 1)^{2/7} - 1\right]}, \qquad V_t = M a

with :math:`V_e = V_t \sqrt{\sigma}`. All functions take SI floats (m/s, Pa, K, rad or
degrees as stated) and broadcast numpy arrays.

References
----------
.. [1] J. D. Anderson, *Introduction to Flight*, 8th ed., McGraw-Hill, 2016, sec. 4.12
   (measurement of airspeed, subsonic compressible flow).
.. [2] ICAO Doc 7488/3 (1993) for :math:`p_0` and :math:`a_0`.
"""

from __future__ import annotations

import numpy as np

from cruiseplan._numerics import NAN, ZERO
from cruiseplan.constants import A0, P0, RHO0


def mach_from_tas(tas, speed_of_sound):
    """Mach number [-] from TAS [m/s] and the local speed of sound [m/s].

    Parameters
    ----------
    tas : array_like
        True airspeed [m/s].
    speed_of_sound : array_like
        Local speed of sound [m/s].

    Returns
    -------
    numpy.ndarray
        Mach number [-].
    """
    return np.asarray(tas, dtype=float) / speed_of_sound


def tas_from_cas(cas, pressure, speed_of_sound):
    """True airspeed from calibrated airspeed (subsonic, compressible).

    Parameters
    ----------
    cas : array_like
        Calibrated airspeed [m/s].
    pressure : array_like
        Static pressure [Pa].
    speed_of_sound : array_like
        Local speed of sound [m/s].

    Returns
    -------
    numpy.ndarray
        True airspeed [m/s].

    References
    ----------
    .. [1] Anderson, *Introduction to Flight*, eqs. 4.72-4.77 (subsonic pitot relations).
    """
    cas = np.asarray(cas, dtype=float)
    qc = P0 * ((1.0 + 0.2 * (cas / A0) ** 2) ** 3.5 - 1.0)
    mach = np.sqrt(5.0 * ((qc / pressure + 1.0) ** (2.0 / 7.0) - 1.0))
    return mach * speed_of_sound


def cas_from_tas(tas, pressure, speed_of_sound):
    """Calibrated airspeed from true airspeed (subsonic, compressible).

    Parameters
    ----------
    tas : array_like
        True airspeed [m/s].
    pressure : array_like
        Static pressure [Pa].
    speed_of_sound : array_like
        Local speed of sound [m/s].

    Returns
    -------
    numpy.ndarray
        Calibrated airspeed [m/s].

    References
    ----------
    .. [1] Anderson, *Introduction to Flight*, eqs. 4.72-4.77 (inverted).
    """
    mach = mach_from_tas(tas, speed_of_sound)
    qc = pressure * ((1.0 + 0.2 * mach**2) ** 3.5 - 1.0)
    return A0 * np.sqrt(5.0 * ((qc / P0 + 1.0) ** (2.0 / 7.0) - 1.0))


def eas_from_tas(tas, density):
    """Equivalent airspeed [m/s] from TAS [m/s] and density [kg/m^3]: EAS = TAS sqrt(sigma).

    Parameters
    ----------
    tas : array_like
        True airspeed [m/s].
    density : array_like
        Air density [kg/m^3].

    Returns
    -------
    numpy.ndarray
        Equivalent airspeed [m/s].

    References
    ----------
    .. [1] Anderson, *Introduction to Flight*, sec. 4.12 (measurement of airspeed).
    """
    return np.asarray(tas, dtype=float) * np.sqrt(np.asarray(density) / RHO0)


def tas_from_eas(eas, density):
    """True airspeed [m/s] from EAS [m/s] and density [kg/m^3]: TAS = EAS / sqrt(sigma).

    Parameters
    ----------
    eas : array_like
        Equivalent airspeed [m/s].
    density : array_like
        Air density [kg/m^3].

    Returns
    -------
    numpy.ndarray
        True airspeed [m/s].

    References
    ----------
    .. [1] Anderson, *Introduction to Flight*, sec. 4.12 (measurement of airspeed).
    """
    return np.asarray(eas, dtype=float) / np.sqrt(np.asarray(density) / RHO0)


def wind_components(course_deg, wind_from_deg, wind_speed):
    """Headwind and crosswind components on a course.

    Parameters
    ----------
    course_deg : array_like
        True course over the ground [deg].
    wind_from_deg : array_like
        Direction the wind blows *from* [deg true], as forecast.
    wind_speed : array_like
        Wind speed [m/s].

    Returns
    -------
    headwind : numpy.ndarray
        Component against the course [m/s] (negative: tailwind).
    crosswind : numpy.ndarray
        Component from the right of the course [m/s].
    """
    rel = np.radians(np.asarray(wind_from_deg, dtype=float) - np.asarray(course_deg))
    w = np.asarray(wind_speed, dtype=float)
    return w * np.cos(rel), w * np.sin(rel)


def ground_speed(tas, headwind, crosswind, *, crosswind_squared=None):
    r"""Ground speed along a course held against the wind: the one wind-triangle formula.

    .. math:: GS = V\cos\delta - W_h = \sqrt{V^2 - W_x^2} - W_h,
              \qquad \sin\delta = W_x / V

    Parameters
    ----------
    tas : array_like
        True airspeed (its horizontal part when climbing) [m/s].
    headwind : array_like
        Wind component against the course [m/s] (negative: tailwind).
    crosswind : array_like
        Wind component across the course [m/s].
    crosswind_squared : array_like, optional
        ``crosswind * crosswind`` [m^2/s^2], when already known (integrations that ask
        again and again in the same wind).

    Returns
    -------
    numpy.ndarray
        Ground speed [m/s]; NaN where the crosswind exceeds the airspeed (the course
        cannot be held). It may be zero or negative where the headwind is as strong.

    References
    ----------
    .. [1] FAA, *Pilot's Handbook of Aeronautical Knowledge*, FAA-H-8083-25, ch. 16
       (wind triangle).
    """
    tas = np.asarray(tas, dtype=float)
    if crosswind_squared is None:
        cross = np.asarray(crosswind, dtype=float)
        crosswind_squared = cross * cross
    square = tas * tas - crosswind_squared
    # NaN where the course is lost, set before the root (no warning to silence).
    return np.sqrt(np.where(square >= ZERO, square, NAN)) - headwind


def wind_correction_angle(tas, crosswind):
    """Wind correction angle [deg], positive to the right; NaN where the course is lost.

    Parameters
    ----------
    tas : array_like
        True airspeed [m/s].
    crosswind : array_like
        Crosswind component from the right [m/s].

    Returns
    -------
    numpy.ndarray
        arcsin(W_x / V) [deg].

    References
    ----------
    .. [1] FAA-H-8083-25, ch. 16.
    """
    with np.errstate(invalid="ignore", divide="ignore"):
        ratio = np.asarray(crosswind, dtype=float) / np.asarray(tas, dtype=float)
        return np.degrees(np.arcsin(np.where(np.abs(ratio) <= 1.0, ratio, np.nan)))


def wind_triangle(tas, course_deg, wind_from_deg, wind_speed):
    r"""Solve the wind triangle: heading and ground speed that hold a course.

    The wind correction angle is :math:`\delta = \arcsin(W_x / V)` with :math:`W_x` the
    crosswind from the right, and :math:`GS = V\cos\delta - W_h` with :math:`W_h` the
    headwind. Where the crosswind exceeds TAS the course cannot be held and the ground
    speed is NaN (callers report it).

    Parameters
    ----------
    tas : array_like
        True airspeed [m/s].
    course_deg : array_like
        True course [deg].
    wind_from_deg : array_like
        Wind direction, from [deg true].
    wind_speed : array_like
        Wind speed [m/s].

    Returns
    -------
    ground_speed : numpy.ndarray
        Ground speed [m/s].
    heading_deg : numpy.ndarray
        True heading to fly [deg], 0-360.
    wca_deg : numpy.ndarray
        Wind correction angle [deg], positive to the right.

    References
    ----------
    .. [1] FAA, *Pilot's Handbook of Aeronautical Knowledge*, FAA-H-8083-25, ch. 16
       (wind triangle).
    """
    head, cross = wind_components(course_deg, wind_from_deg, wind_speed)
    wca = wind_correction_angle(tas, cross)
    gs = np.where(np.isfinite(wca), ground_speed(tas, head, cross), np.nan)
    heading = np.mod(np.asarray(course_deg, dtype=float) + wca, 360.0)
    return gs, heading, wca
