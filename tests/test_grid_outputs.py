"""A cruise grid computes its core arrays at the call and derives the rest when read.

The core (CL, CD, drag, shaft power, store rate, limit bits) comes from the level-flight
model; every other field is a plain function of it, derived on first read and kept. The
values are those of the plain expressions, whether the arrays are large enough to be worked
on in place or not, and an element does not depend on the others. These are identities of
the code, no outside source.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan._numerics import IN_PLACE_SIZE
from cruiseplan.limits import LIMIT_DTYPE, UNFLYABLE, Limit
from cruiseplan.physics.atmosphere import air_state
from cruiseplan.planning.performance import UNFLYABLE_FIELDS, cruise_points

DERIVED = ("lift_to_drag", "thrust_power", "source_power", "power_available", "power_margin",
           "fuel_volume_flow", "ground_speed", "specific_range_air", "specific_range_ground",
           "endurance", "range_air", "range_ground", "stall_speed_ratio")


@pytest.fixture(scope="module")
def trainer():
    return cp.load_airframe("demo-trainer")


def _grid(af, n=120):
    # Slow enough to stall, fast enough to run short of power; one row past the model.
    h = np.append(np.linspace(0.0, 6000.0, n - 1), 90000.0)
    v = np.linspace(20.0, 90.0, n)
    return cp.cruise_grid(af, h, v, headwind=4.0)


def test_derived_fields_wait_for_their_first_read(trainer):
    pts = _grid(trainer)
    assert not any(name in pts.__dict__ for name in DERIVED)
    first = pts.endurance
    assert pts.endurance is first  # kept, not derived again
    assert "range_air" not in pts.__dict__


def test_derived_fields_are_their_formulas_with_the_reasons(trainer):
    pts = _grid(trainer)
    prop = trainer.propulsion
    unflyable = (pts.limits & LIMIT_DTYPE(UNFLYABLE)) != 0
    atmosphere = (pts.limits & LIMIT_DTYPE(Limit.ATMOSPHERE)) != 0
    assert unflyable.any() and atmosphere.any()
    rate = np.where(unflyable, np.nan, prop.store_rate(pts.shaft_power))
    np.testing.assert_array_equal(pts.store_rate, rate)
    np.testing.assert_array_equal(pts.endurance, pts.store / rate)
    np.testing.assert_array_equal(pts.range_air, pts.tas * (pts.store / rate))
    np.testing.assert_array_equal(pts.thrust_power, pts.drag * pts.tas)
    np.testing.assert_array_equal(pts.lift_to_drag, pts.cl / pts.cd)
    np.testing.assert_array_equal(
        pts.source_power, np.where(unflyable, np.nan, prop.source_power(pts.shaft_power)))
    gs = np.broadcast_to(np.where(atmosphere[:, :1], np.nan, pts.tas - 4.0), pts.shape)
    np.testing.assert_array_equal(pts.ground_speed, gs)
    for name in UNFLYABLE_FIELDS:
        value = getattr(pts, name)
        if value is not None:
            assert np.isnan(value[unflyable | atmosphere]).all(), name


def test_a_replaced_copy_carries_every_field(trainer):
    pts = _grid(trainer, 30)
    copy = dataclasses.replace(pts, limits=pts.limits.copy())
    for f in dataclasses.fields(pts):
        a, b = getattr(pts, f.name), getattr(copy, f.name)
        if isinstance(a, np.ndarray):
            np.testing.assert_array_equal(a, b, err_msg=f.name)


def test_in_place_arithmetic_gives_the_values_of_single_points(trainer):
    # A grid past IN_PLACE_SIZE is worked on in place; each point alone is not.
    load = trainer.loading()
    h = np.linspace(0.0, 4000.0, 80)
    v = np.linspace(25.0, 85.0, 80)
    assert h.size * v.size >= IN_PLACE_SIZE
    air = air_state(h).column()
    big = cruise_points(trainer, load.mass, air, v[None, :], load.store)
    for i, j in ((0, 0), (3, 71), (40, 12), (79, 79)):
        one = cruise_points(trainer, load.mass, air_state(h[i]), v[j], load.store)
        for name in ("cl", "cd", "drag", "shaft_power", "store_rate", "limits",
                     "endurance"):
            np.testing.assert_array_equal(getattr(big, name)[i, j], getattr(one, name),
                                          err_msg=name)


def test_beyond_clmax_is_below_the_stall_speed(trainer):
    pts = _grid(trainer)
    beyond = (pts.limits & LIMIT_DTYPE(Limit.BEYOND_CLMAX)) != 0
    np.testing.assert_array_equal(beyond, pts.stall_speed_ratio < 1)
    assert ((pts.limits[beyond] & LIMIT_DTYPE(Limit.STALL)) != 0).all()


def test_the_air_of_an_altitude_set_is_kept_read_only_and_unchanged():
    h = np.array([0.0, 1234.5, 3000.0])
    first = air_state(h, 7.0)
    h[1] = 2000.0  # the caller's array changes after the call: the kept air does not
    again = air_state(np.array([0.0, 1234.5, 3000.0]), 7.0)
    assert again is first
    np.testing.assert_array_equal(first.pressure_altitude, [0.0, 1234.5, 3000.0])
    with pytest.raises(ValueError, match="read-only"):
        first.density[0] = 1.0
    other = air_state(np.array([0.0, 1234.5, 3000.0]), 8.0)
    assert other is not first
    np.testing.assert_allclose(other.temperature, first.temperature + 1.0, rtol=1e-14)
