"""The vectorised searches of cruiseplan._numerics and the planner's atmosphere per plan."""

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan._numerics import grid_minimise
from cruiseplan.physics.atmosphere import air_state
from cruiseplan.planning.mission import Flight


def test_grid_minimise_finds_each_elements_minimum_to_the_tolerance():
    # x + c^2 / x has its minimum at x = c (calculus). The final bracket is within
    # 1e-7 (|lo| + |hi|) of its ends, so its middle lies within 1e-7 x of the minimum.
    c = np.array([3.0, 10.0, 47.5, 120.0])
    x = grid_minimise(lambda x: x + c * c / x, 0.1 * c, 3.0 * c, xtol_rel=1e-7)
    assert np.allclose(x, c, rtol=1e-7, atol=0)


def test_grid_minimise_walks_away_from_nan():
    # NaN (no value, as beyond a model's range) counts as worse than any number.
    x = grid_minimise(lambda x: np.where(x > 8.0, np.nan, (x - 5.0) ** 2), 0.0, 20.0,
                      xtol_rel=1e-8)
    assert x == pytest.approx(5.0, rel=2e-8)


def test_grid_minimise_result_does_not_depend_on_the_batch():
    # An element's answer is the same alone or among others that converge later: bit
    # for bit, as the sweep engine's checks of single plans need.
    c = np.array([7.0, 30.0, 55.0])
    lo, hi = np.array([1.0, 1.0, 1e-3]), np.array([40.0, 40.0, 1e4])
    together = grid_minimise(lambda x: (x - c) ** 2, lo, hi, xtol_rel=1e-7)
    for i in range(c.size):
        alone = grid_minimise(lambda x, i=i: (x - c[i]) ** 2, lo[i], hi[i], xtol_rel=1e-7)
        assert alone == together[i]


def test_flight_air_is_the_standard_atmosphere_once_per_set_of_altitudes():
    mission = cp.load_mission("demo-cross-country")
    fl = Flight(mission)
    h = np.array([300.0, 1200.0, 2500.0])
    first = fl.air(h)
    again = fl.air(h.copy())
    assert again is first          # the same set again: not evaluated again
    fresh = air_state(h, mission.isa_dev)
    for name in ("temperature", "pressure", "density", "speed_of_sound", "viscosity"):
        assert np.array_equal(getattr(first, name), getattr(fresh, name))
    with pytest.raises(ValueError, match="read-only"):
        first.density[0] = 1.0     # shared within the plan, so nobody may change it
