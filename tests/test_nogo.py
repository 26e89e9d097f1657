"""An honest NO-GO: the plan stops where it fails, and says what would make it GO.

Each answer is found by re-planning; the checks re-plan with the answer (a little more,
a little less: 0.1 %, the resolution asked of the search) and see the verdict change.
"""

from __future__ import annotations

import json
from dataclasses import replace

import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.planning.nogo import margin, truncated, what_would_make_it_go
from cruiseplan.report.tables import plan_report

NM = 1852.0


@pytest.fixture(scope="module")
def short_of_fuel():
    af = cp.load_airframe("demo-trainer")
    leg = cp.Leg("long way", 180 * NM, course=90.0, altitude=1400.0, power=0.65)
    mission = cp.Mission("short", af, (leg,), cp.Reserve("time", 30 * 60.0), cp.Profile(),
                         store=0.25 * af.propulsion.store_capacity, allowance=2.0)
    plan = cp.plan_mission(mission)
    return plan, what_would_make_it_go(plan)


def test_the_plan_stops_where_it_fails(short_of_fuel):
    plan, _ = short_of_fuel
    assert plan.verdict == "NO-GO"
    assert "runs out on leg 'long way' (cruise)" in plan.reasons[0]
    flown = [s.flown for s in plan.segments]
    assert flown == [True, True, False, False]  # allowance, climb | cruise, descent
    assert plan.segments[2].note.startswith("not flown: fuel runs out")
    assert plan.segments[3].note == "not flown"


@pytest.mark.parametrize("fmt", ["text", "json"])
def test_not_flown_rows_show_no_figures(short_of_fuel, fmt):
    plan, remedies = short_of_fuel
    text = plan_report(plan, "aviation", None, remedies).render(fmt)
    if fmt == "json":
        doc = json.loads(text)
        names = [c["name"] for c in doc["columns"]]
        for row in doc["rows"][2:]:
            for col in ("TAS", "GS", "HDG", "power", "dist", "used", "remaining",
                        "over reserve"):
                assert row[names.index(col)] is None, col
        assert doc["summary"]["go_if_extra_kg"] == pytest.approx(remedies.extra_store)
    else:
        assert "What would make it GO" in text and "Flown before the plan fails" in text
        rows = [ln for ln in text.splitlines() if ln.startswith("long way")]
        assert len(rows) == 3 and "not flown" in rows[1] and "-" in rows[1].split()


def test_distance_reachable_is_the_range_to_reserve(short_of_fuel):
    plan, r = short_of_fuel
    mission = plan.mission
    assert 0 < r.reachable < r.route
    # 0.1 % short of it the truncated route lands with the reserve; 0.1 % past it, not.
    assert margin(cp.plan_mission(truncated(mission, 0.999 * r.reachable))) >= 0
    assert margin(cp.plan_mission(truncated(mission, 1.001 * r.reachable))) < 0


def test_adding_the_extra_fuel_makes_it_go(short_of_fuel):
    plan, r = short_of_fuel
    mission = plan.mission
    assert r.extra_store > 0 and r.short_when_full is None
    assert cp.plan_mission(replace(mission, store=mission.store + r.extra_store)).go
    less = cp.plan_mission(replace(mission, store=mission.store + 0.99 * r.extra_store))
    assert not less.go


def test_payload_and_headwind_searches_on_a_tight_drone_plan():
    # A battery drone 90 km out with a 25 % reserve: short, but a lighter payload (less
    # power at the same speed) or a tailwind saves it.
    af = cp.load_airframe("demo-survey-drone")
    leg = cp.Leg("out", 90e3, course=90.0, altitude=100.0)
    base = cp.Mission("tight", af, (leg,), cp.Reserve("fraction", 0.25),
                      cp.Profile(min_clearance=30.0, top=300.0, altitude_step=50.0),
                      allowance=0.0)
    plan = cp.plan_mission(base)
    assert not plan.go
    r = what_would_make_it_go(plan)
    assert 0 < r.max_payload < af.payload
    assert r.max_headwind < 0          # it needs a tailwind
    # 12 bisection steps over the payload (2 kg) and the wind (80 m/s): the boundary to
    # 0.5 g and 0.02 m/s; one step past it the verdict turns.
    assert cp.plan_mission(replace(base, payload=r.max_payload)).go
    assert not cp.plan_mission(replace(base, payload=r.max_payload + 2.0 / 2**11)).go
    assert cp.plan_mission(base, headwind_offset=r.max_headwind).go
    assert not cp.plan_mission(base, headwind_offset=r.max_headwind + 80.0 / 2**11).go


def test_a_wind_too_strong_stops_the_plan_with_no_negative_ground_speed(capsys, tmp_path):
    text = '''
[mission]
airframe = "demo-survey-drone"
battery = "100 %"
[reserve]
fraction = "25 %"
[[legs]]
name = "into the gale"
distance = "4 km"
course = 0
altitude = "100 m"
wind = "000/40m/s@0m"
'''
    path = tmp_path / "gale.toml"
    path.write_text(text)
    assert main(["plan", str(path), "--format", "json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    names = [c["name"] for c in doc["columns"]]
    assert doc["summary"]["verdict"] == "NO-GO"
    for row in doc["rows"]:
        gs = row[names.index("GS")]
        assert gs is None or gs > 0
        rem = row[names.index("remaining")]
        assert rem is None or rem >= 0
