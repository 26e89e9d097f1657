"""Missions planned together (``plan_missions``) equal each mission planned alone.

A sweep plans the points of a chunk in one pass; that is only honest if every plan is, to
the last bit, the one ``plan_mission`` makes of the same mission. These tests compare the
two on the bundled missions (fuel and battery, fixed and free altitudes, power settings,
hover and loiter, cruising levels, GO and NO-GO points) and check that every search a plan
uses solves each element on its own.
"""

from __future__ import annotations

import itertools
import warnings

import numpy as np
import pytest

from cruiseplan.errors import CruiseplanError, CruiseplanWarning
from cruiseplan.io.mission_file import apply_overrides, load_mission
from cruiseplan.physics.rotor import glauert_induced_velocity
from cruiseplan.planning import optimise
from cruiseplan.planning.mission import _together_key, plan_mission, plan_missions

MISSIONS = ("demo-cross-country", "demo-quad-inspection", "demo-quad-mast-check",
            "demo-ridge-patrol", "demo-survey-run")


def _everything(plan) -> str:
    """Every figure and word of a plan (repr prints floats to the last bit)."""
    return repr((plan.segments, plan.reasons, plan.leg_altitudes, plan.leg_speeds,
                 plan.initial, plan.takeoff_mass, plan.climb_speed, plan.reserve, plan.go))


def _variants(name):
    base = load_mission(name)
    out = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CruiseplanWarning)
        for dev, payload, fuel in itertools.product((-20, 0, 35), (None, 150.0),
                                                     (None, "50 %", "15 %")):
            try:
                out.append(apply_overrides(base, isa_dev=dev, payload=payload, fuel=fuel))
            except CruiseplanError:
                pass   # e.g. more payload than the airframe takes with that fuel
    return out


@pytest.mark.parametrize("name", MISSIONS)
def test_missions_planned_together_equal_each_planned_alone(name):
    missions = _variants(name)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CruiseplanWarning)
        together = plan_missions(missions)
        alone = [plan_mission(m) for m in missions]
    assert len(together) == len(missions) >= 12
    # The variants cover both verdicts where the mission allows (a hot, heavy day on a
    # small reserve fails).
    assert {p.go for p in alone} == {True, False}
    for t, a in zip(together, alone):
        assert _everything(t) == _everything(a)


def test_missions_that_differ_in_more_are_planned_in_groups_in_their_order():
    a = _variants("demo-cross-country")[:3]
    b = _variants("demo-ridge-patrol")[:3]
    mixed = [a[0], b[0], a[1], b[1], a[2], b[2]]
    assert len({_together_key(m) for m in mixed}) == 2
    together = plan_missions(mixed)
    for t, m in zip(together, mixed):
        assert t.mission is m
        assert _everything(t) == _everything(plan_mission(m))


def test_objective_speed_is_the_same_searched_with_or_without_the_minimum_power_speed(
        monkeypatch):
    """Small arrays search the minimum-power speed in the same pass; large ones only where
    short of power. The speeds are the same either way."""
    missions = _variants("demo-quad-inspection")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CruiseplanWarning)
        default = [_everything(p) for p in plan_missions(missions)]
        monkeypatch.setattr(optimise, "STACKED_SEARCH_POINTS", 10**9)
        stacked = [_everything(p) for p in plan_missions(missions)]
        monkeypatch.setattr(optimise, "STACKED_SEARCH_POINTS", 0)
        split = [_everything(p) for p in plan_missions(missions)]
    assert default == stacked == split


def test_glauert_inflow_of_each_element_does_not_depend_on_the_others():
    rng = np.random.default_rng(3)
    vh = rng.uniform(3, 12, 200)
    vp = rng.uniform(0, 25, 200)
    vn = rng.uniform(-2, 6, 200)
    together = glauert_induced_velocity(vh, vp, vn)
    alone = np.array([glauert_induced_velocity(*x) for x in zip(vh, vp, vn)])
    np.testing.assert_array_equal(together, alone)
