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
from cruiseplan.io.mission_file import apply_overrides, load_mission, read_mission
from cruiseplan.physics.rotor import glauert_induced_velocity
from cruiseplan.physics.winds import WindProfile
from cruiseplan.planning import optimise
from cruiseplan.planning.mission import _together_key, plan_mission, plan_missions

MISSIONS = ("demo-cross-country", "demo-quad-inspection", "demo-quad-mast-check",
            "demo-ridge-patrol", "demo-survey-run")


def _everything(plan) -> str:
    """Every figure and word of a plan (repr prints floats to the last bit)."""
    return repr((plan.segments, plan.reasons, plan.leg_altitudes, plan.leg_speeds,
                 plan.initial, plan.takeoff_mass, plan.climb_speed, plan.reserve, plan.go))


#: A route under a cruising-level rule, with a loiter on the way (invented).
RULED = """
[mission]
airframe = "demo-trainer"
fuel = "80 L"
payload = "165 kg"
[day]
isa_dev = "+10 K"
[profile]
departure_elevation = "1150 ft"
arrival_elevation = "620 ft"
[levels]
sectors = [
  { from = 0, to = 179, levels = "3500 ft + 2000 ft" },
  { from = 180, to = 359, levels = "4500 ft + 2000 ft" },
]
[[legs]]
name = "out"
distance = "60 nm"
course = 40
elevation = "2300 ft"
wind = "040/18kt@2000ft,030/28kt@6000ft"
[[legs]]
name = "watch"
kind = "loiter"
duration = "20 min"
bank = 20
[[legs]]
name = "back"
distance = "40 nm"
course = 220
elevation = "1400 ft"
wind = "040/18kt@2000ft,030/28kt@6000ft"
"""


def _variants(base, winds=(None,)):
    """What-if variants of a mission: days, payloads, fuel and uniform winds."""
    out = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CruiseplanWarning)
        for dev, payload, fuel, wind in itertools.product(
                (-20, 0, 35), (None, 150.0), (None, "50 %", "15 %"), winds):
            try:
                out.append(apply_overrides(base, isa_dev=dev, payload=payload, fuel=fuel,
                                           wind=wind))
            except CruiseplanError:
                pass   # e.g. more payload than the airframe takes with that fuel
    return out


def _check_together(missions):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", CruiseplanWarning)
        together = plan_missions(missions)
        alone = [plan_mission(m) for m in missions]
    for t, a, m in zip(together, alone, missions):
        assert t.mission is m
        assert _everything(t) == _everything(a)
    return alone


@pytest.mark.parametrize("name", MISSIONS)
def test_missions_planned_together_equal_each_planned_alone(name):
    missions = _variants(load_mission(name))
    assert len(missions) >= 12
    assert len({_together_key(m) for m in missions}) == 1   # one pass
    alone = _check_together(missions)
    # The variants cover both verdicts (a hot, heavy day on a small reserve fails).
    assert {p.go for p in alone} == {True, False}


@pytest.mark.parametrize("name", ["demo-cross-country", "demo-quad-mast-check"])
def test_uniform_winds_are_planned_together_too(name):
    """A what-if wind per mission (uniform, as a sweep's wind axes give), on a route with
    an alternate (cross-country) and one with hovers (the mast check)."""
    winds = [WindProfile((0.0,), (d,), (v,)) for d, v in ((270.0, 6.0), (95.0, 11.0),
                                                           (10.0, 0.0))]
    missions = _variants(load_mission(name), winds)
    assert len({_together_key(m) for m in missions}) == 1
    _check_together(missions)


def test_cruising_levels_and_a_loiter_planned_together(tmp_path):
    path = tmp_path / "ruled.toml"
    path.write_text(RULED)
    missions = _variants(read_mission(path), (None, WindProfile((0.0,), (200.0,), (9.0,))))
    assert len({_together_key(m) for m in missions}) == 2   # the file's winds, and one
    alone = _check_together(missions)
    assert any(s.kind == "loiter" for s in alone[0].segments)


def test_missions_that_differ_in_more_are_planned_in_groups_in_their_order():
    a = _variants(load_mission("demo-cross-country"))[:3]
    b = _variants(load_mission("demo-ridge-patrol"))[:3]
    mixed = [a[0], b[0], a[1], b[1], a[2], b[2]]
    assert len({_together_key(m) for m in mixed}) == 2
    _check_together(mixed)


def test_objective_speed_is_the_same_searched_with_or_without_the_minimum_power_speed(
        monkeypatch):
    """Small arrays search the minimum-power speed in the same pass; large ones only where
    short of power. The speeds are the same either way."""
    missions = _variants(load_mission("demo-quad-inspection"))
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
