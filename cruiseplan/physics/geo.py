r"""Great-circle navigation on a spherical Earth.

Distance by the haversine formula and initial true course by the spherical forward-azimuth
formula, on the IUGG mean Earth radius (6 371 008.8 m). Over the legs of small aircraft and
drones the sphere is within about 0.5 % of the ellipsoid in distance and a few tenths of a
degree in course; routes are flown on that accuracy anyway.

References
----------
.. [1] R. W. Sinnott, "Virtues of the Haversine", *Sky and Telescope* 68(2), 1984, p. 159.
.. [2] E. Williams, *Aviation Formulary* (great-circle distance and course formulas).
"""

from __future__ import annotations

import numpy as np

from cruiseplan.constants import R_EARTH_MEAN


def great_circle(lat1, lon1, lat2, lon2, radius=R_EARTH_MEAN):
    r"""Great-circle distance and initial true course between points.

    .. math::

        d = 2R \arcsin\sqrt{\sin^2\frac{\Delta\phi}{2}
            + \cos\phi_1\cos\phi_2\sin^2\frac{\Delta\lambda}{2}}, \qquad
        \theta = \operatorname{atan2}(\sin\Delta\lambda\cos\phi_2,\;
            \cos\phi_1\sin\phi_2 - \sin\phi_1\cos\phi_2\cos\Delta\lambda)

    Parameters
    ----------
    lat1, lon1, lat2, lon2 : array_like
        Latitudes and longitudes [deg], north and east positive.
    radius : float, optional
        Sphere radius [m].

    Returns
    -------
    distance : numpy.ndarray
        Great-circle distance [m].
    course : numpy.ndarray
        Initial true course [deg], 0-360.

    References
    ----------
    .. [1] Sinnott (1984) for the haversine distance; Williams, *Aviation Formulary*, for
       the course.
    """
    p1, p2 = np.radians(lat1), np.radians(lat2)
    dl = np.radians(np.asarray(lon2, dtype=float) - np.asarray(lon1, dtype=float))
    h = np.sin((p2 - p1) / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin(dl / 2) ** 2
    distance = 2 * radius * np.arcsin(np.sqrt(np.clip(h, 0.0, 1.0)))
    course = np.degrees(np.arctan2(np.sin(dl) * np.cos(p2),
                                   np.cos(p1) * np.sin(p2) - np.sin(p1) * np.cos(p2) * np.cos(dl)))
    return distance, np.mod(course, 360.0)
