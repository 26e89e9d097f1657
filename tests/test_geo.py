"""Great-circle navigation: the destination point (dead reckoning on the sphere)."""

from __future__ import annotations

import numpy as np
import pytest

from cruiseplan.physics.geo import destination_point, great_circle, local_latlon, local_xy


def test_destination_point_is_the_inverse_of_great_circle():
    rng = np.random.default_rng(3)
    lat = rng.uniform(-70, 70, 50)
    lon = rng.uniform(-180, 180, 50)
    course = rng.uniform(0, 360, 50)
    dist = rng.uniform(1.0, 500e3, 50)
    lat2, lon2 = destination_point(lat, lon, course, dist)
    d, c = great_circle(lat, lon, lat2, lon2)
    np.testing.assert_allclose(d, dist, rtol=1e-9)
    np.testing.assert_allclose(np.mod(c - course + 180, 360) - 180, 0.0, atol=1e-7)
    # One degree of latitude due north on the sphere of mean radius 6 371 008.8 m.
    la, lo = destination_point(45.0, 7.0, 0.0, 6371008.8 * np.pi / 180)
    assert la == pytest.approx(46.0, abs=1e-12) and lo == pytest.approx(7.0, abs=1e-12)


def test_local_plane_still_round_trips():
    # local_latlon shares the destination formula; the projection and its inverse agree.
    lat, lon = local_latlon(np.array([1200.0, -800.0]), np.array([-300.0, 2500.0]), 45.0, 7.0)
    x, y = local_xy(lat, lon, 45.0, 7.0)
    np.testing.assert_allclose(x, [1200.0, -800.0], atol=1e-6)
    np.testing.assert_allclose(y, [-300.0, 2500.0], atol=1e-6)
