"""The vectorised searches of cruiseplan._numerics and the planner's atmosphere per plan."""

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan._numerics import all_true, any_true, grid_minimise, set_flag
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


@pytest.mark.parametrize("values", [
    np.array([], dtype=bool), np.array([False, False]), np.array([False, True]),
    np.array([True, True]), np.array([0.0, -2.0]), np.array([0.0, 0.0]),
    np.array([np.nan, 1.0]), np.array([[0, 3], [0, 0]], dtype=np.uint32),
    np.broadcast_to(np.array(0.0), (4, 3)), np.broadcast_to(np.array(True), (5,)),
    np.array(True), np.array(0.0), True, 0.0, [0, 1]])
def test_any_true_and_all_true_are_numpys_any_and_all(values):
    # Counting non-zero elements answers as np.any and np.all do, NaN counting as true.
    assert any_true(values) is bool(np.any(values))
    assert all_true(values) is bool(np.all(values))


def test_set_flag_sets_the_bit_only_where_the_condition_holds():
    bits = np.array([0, 1, 4], dtype=np.uint32)
    assert set_flag(bits, np.array([False, False, False]), np.uint32(2)) is bits
    np.testing.assert_array_equal(bits, [0, 1, 4])
    set_flag(bits, np.array([True, False, True]), np.uint32(2))
    np.testing.assert_array_equal(bits, [2, 1, 6])
    set_flag(bits, np.broadcast_to(np.array(True), (3,)), np.uint32(8))
    np.testing.assert_array_equal(bits, [10, 9, 14])
