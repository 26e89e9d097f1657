"""Legs flown in passes equal legs flown one at a time, and the start grid is harmless.

The planner works out a run of alike cruise legs together, in passes, from guesses of
where each starts (``planning.mission._in_passes``): that is only honest if every plan is,
to the last bit, the one the planner makes leg by leg. Each leg is worked out from its
start mass and store on a grid (``StartGrid``), which is what lets a guess be right to the
bit; the grid must move a plan's figures by far less than the integration's own error.
"""

from __future__ import annotations

import tempfile
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from cruiseplan.io.mission_file import load_mission, read_mission
from cruiseplan.planning import mission as planner
from cruiseplan.planning.mission import plan_mission, plan_missions


def _everything(plan) -> str:
    """Every figure and word of a plan (repr prints floats to the last bit)."""
    return repr((plan.segments, plan.reasons, plan.leg_altitudes, plan.leg_speeds,
                 plan.initial, plan.takeoff_mass, plan.climb_speed, plan.reserve, plan.go))


def _route(tmp_path, airframe, n, seed, *, scale=1.0, unit="nm", legs_extra="",
           profile="", fuel="", middle=None,
           wind="250/15kt@2000ft,260/30kt@6000ft,270/40kt@10000ft"):
    """An invented route of ``n`` legs (random distances and courses), as a mission."""
    rng = np.random.default_rng(seed)
    dist, course = rng.uniform(5, 60, n) * scale, rng.uniform(0, 360, n)
    lines = ["[mission]", f'airframe = "{airframe}"', fuel, "[day]", 'isa_dev = "+10 K"',
             "[profile]", profile, "[reserve]", 'time = "30 min"']
    for i in range(n):
        if middle is not None and i == n // 2:
            lines += ["[[legs]]", middle]
        lines += ["[[legs]]", f'name = "leg {i}"', f'distance = "{dist[i]:.3f} {unit}"',
                  f"course = {course[i]:.2f}", f'wind = "{wind}"', legs_extra]
    path = tmp_path / f"{airframe}-{n}-{seed}.toml"
    path.write_text("\n".join(lines) + "\n")
    return read_mission(path)


DRONE = dict(scale=0.05, unit="km", wind="250/5m/s@100m,270/9m/s@600m",
             profile='departure_elevation = "100 m"\narrival_elevation = "120 m"\n'
                     'altitude_step = "50 m"\nmin_clearance = "60 m"')
QUAD = dict(scale=0.03, unit="km", wind="250/3m/s@100m,270/6m/s@400m",
            profile='departure_elevation = "100 m"\narrival_elevation = "100 m"\n'
                    'altitude_step = "20 m"\nmin_clearance = "30 m"')


def _missions(tmp_path):
    """Routes that go in passes: fuel (burning out, and with fuel to spare), set
    altitudes, power settings and objectives, battery wings and a rotorcraft, and a
    route broken by a loiter."""
    return [
        _route(tmp_path, "demo-tourer", 24, 1),                  # the tank runs dry
        _route(tmp_path, "demo-tourer", 9, 2, fuel='fuel = "50 %"'),
        _route(tmp_path, "demo-trainer", 12, 3, scale=0.3, legs_extra='altitude = "4500 ft"'),
        _route(tmp_path, "demo-trainer", 10, 4, scale=0.4, legs_extra='power = "60 %"'),
        _route(tmp_path, "demo-tourer", 10, 5, scale=0.5,
               legs_extra='speed = "best"\nobjective = "economy"'),
        _route(tmp_path, "demo-tourer", 11, 6, scale=0.5,
               middle='name = "hold"\nkind = "loiter"\nduration = "15 min"\nbank = 20'),
        _route(tmp_path, "demo-survey-drone", 14, 7, **DRONE),
        _route(tmp_path, "demo-survey-drone-6s", 14, 8, **DRONE),   # a circuit pack
        _route(tmp_path, "demo-mapping-quad", 12, 9, **QUAD),
    ] + [load_mission(name) for name in ("demo-cross-country", "demo-ridge-patrol",
                                         "demo-quad-inspection")]


def test_passes_give_the_plan_of_legs_flown_one_at_a_time(tmp_path, monkeypatch):
    missions = _missions(tmp_path)
    passes = [_everything(plan_mission(m)) for m in missions]
    monkeypatch.setattr(planner, "PASS_LEGS", 1)
    alone = [_everything(plan_mission(m)) for m in missions]
    assert passes == alone
    # And every pass width gives the same plans.
    monkeypatch.setattr(planner, "PASS_LEGS", 3)
    assert [_everything(plan_mission(m)) for m in missions] == alone


def test_missions_planned_together_equal_the_plans_made_in_passes(tmp_path):
    base = _route(tmp_path, "demo-tourer", 9, 2, fuel='fuel = "50 %"')
    from dataclasses import replace
    group = [replace(base, isa_dev=d) for d in (-15.0, 0.0, 10.0, 30.0)]
    together = plan_missions(group)  # missions side by side, the legs one at a time
    assert [_everything(p) for p in together] == [_everything(plan_mission(m))
                                                 for m in group]


def test_the_start_grid_moves_a_plan_by_far_less_than_the_integration(tmp_path,
                                                                      monkeypatch):
    # A grid finer than a float's last bit leaves every start as it is.
    missions = _missions(tmp_path)[:8]
    on_grid = [plan_mission(m) for m in missions]
    monkeypatch.setattr(planner.StartGrid, "BITS", 80)
    monkeypatch.setattr(planner, "PASS_LEGS", 1)
    off_grid = [plan_mission(m) for m in missions]
    for a, b in zip(on_grid, off_grid):
        assert a.leg_altitudes == b.leg_altitudes
        assert [s.kind for s in a.segments] == [s.kind for s in b.segments]
        # The RK4 cruise is within about 1e-8 of the exact fuel (tests/test_mission.py);
        # the grid's spacing is 2**-30 (about 1e-9) of the maximum take-off mass.
        scale = a.initial
        for s, t in zip(a.segments, b.segments):
            assert s.used == pytest.approx(t.used, rel=1e-8, abs=1e-9 * scale)
            assert s.mass_end == pytest.approx(t.mass_end, rel=2e-9)
        assert a.remaining == pytest.approx(b.remaining, abs=1e-9 * scale)


def test_a_long_route_takes_few_passes(tmp_path, monkeypatch):
    """Each pass makes exact at least its first leg; good guesses make most of a run
    exact in a few passes (a guard on the guesses, not a timing)."""
    mission = _route(tmp_path, "demo-tourer", 60, 11, scale=0.3, fuel='fuel = "100 %"')
    rows = []
    real = planner.leg_options

    def counting(fl, mission, leg, *args, **kw):
        rows.append(leg.course.shape[0] if isinstance(leg, planner._Legs) else 1)
        return real(fl, mission, leg, *args, **kw)

    monkeypatch.setattr(planner, "leg_options", counting)
    plan = plan_mission(mission)
    assert plan.go  # every leg flown, burning fuel (about 83 of 130 kg)
    # 60 legs one at a time take 60 calls; in passes of 20 legs, 11 (167 legs worked out).
    assert len(rows) <= 16
    assert sum(rows) <= 4 * 60


_WINDS = ("250/15kt@2000ft,270/35kt@8000ft", "090/10kt@2000ft", "360/45kt@3000ft")


@settings(max_examples=20, deadline=None)
@given(runs=st.lists(st.tuples(st.integers(1, 6), st.sampled_from(_WINDS),
                               st.sampled_from(("best", "95 kt"))), min_size=1, max_size=3),
       legs=st.lists(st.tuples(st.floats(0.3, 60.0), st.floats(0.0, 359.0)),
                     min_size=18, max_size=18),
       fixed=st.booleans(), fuel=st.sampled_from(("100 %", "40 %", "8 %")))
def test_random_routes_in_passes_equal_the_legs_one_at_a_time(runs, legs, fixed, fuel):
    """Runs broken by a change of wind or speed, legs too short for a climb, tanks that
    run dry on the way: the passes still give the plan of the legs one at a time."""
    lines = ["[mission]", 'airframe = "demo-trainer"', f'fuel = "{fuel}"', "[day]",
             'isa_dev = "+5 K"', "[profile]", 'departure_elevation = "600 ft"',
             'arrival_elevation = "1200 ft"', "[reserve]", 'time = "30 min"']
    each = [(wind, speed) for n, wind, speed in runs for _ in range(n)] + [runs[-1][1:]]
    for i, ((d, course), (wind, speed)) in enumerate(zip(legs, each)):
        lines += ["[[legs]]", f'name = "leg {i}"', f'distance = "{d:.3f} nm"',
                  f"course = {course:.1f}", f'wind = "{wind}"', f'speed = "{speed}"']
        if fixed:
            lines.append(f'altitude = "{3500 + 1000 * (i % 3)} ft"')
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "route.toml"
        path.write_text("\n".join(lines) + "\n")
        mission = read_mission(path)
    passes = _everything(plan_mission(mission))
    width = planner.PASS_LEGS
    try:
        planner.PASS_LEGS = 1
        alone = _everything(plan_mission(mission))
    finally:
        planner.PASS_LEGS = width
    assert passes == alone
