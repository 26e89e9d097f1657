"""Legs as crews fly them: a power setting, a CAS, a hover and a loiter orbit, and the
reserve flown at the plan's cruise power.

Each check is an exact identity of the model (constant power gives constant fuel flow;
a hover at constant mass draws its power for its time; a banked orbit's load factor
n = 1/cos(bank) multiplies the induced drag by n^2), so tolerances are the integrator's or
the root finder's (stated beside each).
"""

from __future__ import annotations

import math
import re
from dataclasses import replace

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.io.mission_file import read_mission
from cruiseplan.physics.aerodynamics import min_power_speed
from cruiseplan.physics.airspeed import tas_from_cas
from cruiseplan.physics.propulsion import PropellerEfficiency
from cruiseplan.planning.mission import speed_mode
from cruiseplan.report.card import card_content

NM = 1852.0


def constant_propeller(af):
    """The airframe with a constant propeller efficiency (so closed forms hold)."""
    prop = replace(af.propulsion, propeller=PropellerEfficiency((0.0,), (0.8,)))
    if hasattr(prop, "diameter"):
        prop = replace(prop, diameter=None)
    return replace(af, propulsion=prop)


@pytest.fixture(scope="module")
def tourer():
    return constant_propeller(cp.load_airframe("demo-tourer"))


@pytest.fixture(scope="module")
def quad():
    return cp.load_airframe("demo-mapping-quad")


def mission(af, legs, *, reserve=cp.Reserve("fraction", 0.0), **kw):
    prof = cp.Profile(climb_speed=None, altitude_step=500.0, top=4000.0, min_clearance=0.0)
    return cp.Mission("m", af, tuple(legs), reserve, prof, allowance=0.0, **kw)


def segments(plan, kind):
    return [s for s in plan.segments if s.kind == kind]


def test_a_leg_at_a_power_setting_burns_the_setting_s_fuel_flow(tourer):
    leg = cp.Leg("at 65 %", 150 * NM, altitude=1500.0, power=0.65)
    plan = cp.plan_mission(mission(tourer, [leg]))
    (cruise,) = segments(plan, "cruise")
    prop = tourer.propulsion
    flow = prop.bsfc * 0.65 * prop.rated_power
    # Constant power is constant fuel flow: used = flow x time. The speed is re-solved by
    # three Newton steps at each Runge-Kutta stage: 1e-9 measured 1e-12.
    assert cruise.used == pytest.approx(flow * cruise.time, rel=1e-9)
    assert cruise.power_fraction == pytest.approx(0.65, rel=1e-9)
    # The speed is that power's, on the fast side of the power curve.
    pts = cp.power_setting_table(tourer, [1500.0], [0.65], mass=plan.takeoff_mass
                                 - plan.segments[1].used)
    assert cruise.tas == pytest.approx(float(pts.tas[0, 0]), rel=1e-6)
    assert "65 % power set" in cruise.note


def test_a_mission_power_is_the_default_of_its_legs(tourer):
    legs = [cp.Leg("default", 80 * NM, altitude=1500.0),
            cp.Leg("best range", 80 * NM, altitude=1500.0, objective="range")]
    m = mission(tourer, legs, cruise_power=0.55)
    assert speed_mode(m, legs[0]) == ("power", 0.55)
    assert speed_mode(m, legs[1]) == ("best", "range")
    plan = cp.plan_mission(m)
    first, second = segments(plan, "cruise")
    assert first.power_fraction == pytest.approx(0.55, rel=1e-9)
    assert second.power_fraction < 0.55  # best range is slower than 55 % on the tourer


def test_reserve_at_65_percent_cruise_is_three_quarters_of_an_hour_of_its_flow(tourer):
    # A plan flown at 65 % keeps 45 min at 65 %: 0.75 h x the 65 % fuel flow, exactly,
    # and the card keeps the same by default (normal cruise power 65 %).
    m = mission(tourer, [cp.Leg("out", 150 * NM, altitude=1500.0, power=0.65)],
                reserve=cp.Reserve("time", 45 * 60.0))
    plan = cp.plan_mission(m)
    prop = tourer.propulsion
    flow = prop.bsfc * 0.65 * prop.rated_power
    assert plan.reserve.power_fraction == pytest.approx(0.65, rel=1e-9)
    assert plan.reserve_required == pytest.approx(0.75 * 3600 * flow, rel=1e-9)
    assert card_content(tourer).reserve == pytest.approx(0.75 * 3600 * flow, rel=1e-15)
    assert plan.reserve.describe(prop, "aviation") == \
        "45 min at 65 % power (the plan's cruise power)"


def test_a_cas_leg_holds_its_calibrated_airspeed(tourer):
    leg = cp.Leg("cas", 100 * NM, altitude=2500.0, cas=55.0)
    plan = cp.plan_mission(mission(tourer, [leg]))
    (cruise,) = segments(plan, "cruise")
    air = cp.air_state(2500.0)
    expected = float(tas_from_cas(55.0, air.pressure, air.speed_of_sound))
    assert cruise.tas == pytest.approx(expected, rel=1e-12)


def test_a_hover_uses_hover_power_for_its_time(quad):
    # At constant mass (a battery) the store used is the store rate at hover power times
    # the time, exactly (rounding only).
    leg = cp.Leg("hold", 0.0, altitude=100.0, kind="hover", duration=300.0)
    plan = cp.plan_mission(mission(quad, [leg]))
    (hover,) = segments(plan, "hover")
    mass = plan.takeoff_mass
    p_hover = float(quad.hover_power(mass, cp.air_state(100.0)))
    assert hover.used == pytest.approx(quad.propulsion.store_rate(p_hover) * 300.0,
                                       rel=1e-13)
    assert (hover.time, hover.distance, hover.tas) == (300.0, 0.0, 0.0)


def test_a_hover_in_wind_flies_at_the_wind_speed(quad):
    wind = cp.parse_wind_profile("270/6m/s@0m")
    leg = cp.Leg("hold", 0.0, course=0.0, wind=wind, altitude=100.0, kind="hover",
                 duration=120.0)
    (hover,) = segments(cp.plan_mission(mission(quad, [leg])), "hover")
    assert hover.tas == pytest.approx(6.0, rel=1e-12)
    assert "holding position in a 6.0 m/s wind" in hover.note


def test_a_loiter_orbit_pays_the_load_factor_in_induced_drag(tourer):
    # Closed form of a level turn: lift n W with n = 1/cos(bank), so CL and the induced
    # drag k CL^2 q S grow by n and n^2 while the parasite drag CD0 q S stays.
    mass, air, v = 1000.0, cp.air_state(1500.0), 55.0
    bank = math.radians(30.0)
    n = 1.0 / math.cos(bank)
    straight = tourer.level_flight(mass, air, v)
    turning = tourer.level_flight(n * mass, air, v)
    parasite = tourer.polar.cd0 * 0.5 * float(air.density) * v * v * tourer.wing_area
    ratio = (float(turning.drag) - parasite) / (float(straight.drag) - parasite)
    assert ratio == pytest.approx(1.0 / math.cos(bank) ** 2, rel=1e-12)


def test_a_loiter_leg_flies_its_time_at_the_turn_s_power(tourer):
    leg = cp.Leg("orbit", 0.0, altitude=1500.0, kind="loiter", duration=1800.0, bank=30.0,
                 tas=50.0)
    plan = cp.plan_mission(mission(tourer, [leg]))
    (loiter,) = segments(plan, "loiter")
    assert (loiter.time, loiter.distance, loiter.tas) == (1800.0, 0.0, 50.0)
    n = 1.0 / math.cos(math.radians(30.0))
    m0 = plan.takeoff_mass - plan.segments[1].used
    shaft = float(tourer.level_flight(n * m0, cp.air_state(1500.0), 50.0).shaft)
    # The planner works a leg out from its start mass on a grid of 2**-30 of the maximum
    # take-off mass (planning.mission.StartGrid): within 5e-10 of it.
    assert loiter.power_fraction == pytest.approx(shaft / tourer.propulsion.rated_power,
                                                  rel=1e-9)
    assert "orbit at 30 deg bank" in loiter.note
    # The fuel falls as the weight does: between the start's and the end's flow (RK4).
    flow0 = tourer.propulsion.store_rate(shaft)
    assert loiter.used < flow0 * 1800.0


def test_loiter_without_a_speed_flies_best_endurance_in_the_turn(tourer):
    leg = cp.Leg("orbit", 0.0, altitude=1500.0, kind="loiter", duration=600.0, bank=20.0)
    m = mission(tourer, [leg])
    assert speed_mode(m, leg) == ("best", "endurance")
    (loiter,) = segments(cp.plan_mission(m), "loiter")
    n = 1.0 / math.cos(math.radians(20.0))
    m0 = loiter.mass_end + loiter.used   # fuel: the mass at the loiter's start
    air = cp.air_state([1500.0])
    # Minimum power in a turn is at the CL of level flight's minimum power: the speed goes
    # as sqrt(n) (closed form, parabolic polar and constant propeller efficiency).
    # The stall speed scales the same way, so the stall margin holds it alike.
    v_level = max(float(min_power_speed(m0, air.density, tourer.wing_area,
                                        tourer.polar.cd0, tourer.polar.k)[0]),
                  1.3 * float(tourer.stall_speed(m0, air.density)[0]))
    assert loiter.tas == pytest.approx(v_level * math.sqrt(n), rel=1e-5)


GOOD = '''
[mission]
airframe = "demo-mapping-quad"
battery = "100 %"
[reserve]
fraction = "25 %"
[[legs]]
name = "out"
distance = "1 km"
altitude = "80 m"
[[legs]]
name = "look"
kind = "hover"
duration = "5 min"
altitude = "80 m"
'''


def test_hover_and_power_legs_read_from_a_file(tmp_path):
    path = tmp_path / "m.toml"
    path.write_text(GOOD.replace('[reserve]', '[reserve]\n') + '\n')
    m = read_mission(path)
    assert m.legs[1].kind == "hover" and m.legs[1].duration == 300.0
    text = GOOD.replace('battery = "100 %"', 'battery = "100 %"\npower = "30 %"')
    path.write_text(text)
    assert read_mission(path).cruise_power == pytest.approx(0.30)


@pytest.mark.parametrize("edit, message", [
    (('airframe = "demo-mapping-quad"', 'airframe = "demo-survey-drone"'),
     r"leg 2 'look' kind: demo-survey-drone is a fixed-wing: it cannot hover"),
    (('duration = "5 min"\n', ''), r"leg 2 'look' duration: missing"),
    (('kind = "hover"', 'kind = "hold"'), r"leg 2 'look' kind: 'hold' is not one of"),
    (('altitude = "80 m"\n[[legs]]', 'altitude = "80 m"\nbank = "30 deg"\n[[legs]]'),
     r"leg 1 'out' bank: only a loiter leg is flown at a bank angle"),
    (('distance = "1 km"', 'distance = "1 km"\nduration = "2 min"'),
     r"leg 1 'out' duration: a cruise leg has a distance"),
    (('distance = "1 km"', 'distance = "1 km"\npower = "150 %"'),
     r"leg 1 'out' power: '150 %' is out of range"),
    (('distance = "1 km"', 'distance = "1 km"\npower = "40 %"\nspeed = "12 m/s"'),
     r"leg 1 'out' (speed|power): give one of speed, cas or power"),
    (('fraction = "25 %"', 'fraction = "25 %"\npower = "60 %"'),
     r"\[reserve\] power: goes with a time reserve"),
    (('kind = "hover"', 'kind = "hover"\ndistance = "1 km"'),
     r"leg 2 'look' distance: a hover leg holds its point"),
])
def test_bad_leg_fields(tmp_path, capsys, edit, message):
    old, new = edit
    assert old in GOOD
    path = tmp_path / "bad.toml"
    path.write_text(GOOD.replace(old, new))
    out = tmp_path / "plan.txt"
    assert main(["plan", str(path), "--output", str(out)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and re.search(message, err), err
    assert not out.exists()


def test_leg_model_checks_its_own_fields():
    with pytest.raises(cp.CruiseplanError, match=r"a hover leg needs a duration"):
        cp.Leg("x", 0.0, kind="hover")
    with pytest.raises(cp.CruiseplanError, match=r"give one of speed, cas or power"):
        cp.Leg("x", 1000.0, tas=30.0, power=0.5)
    with pytest.raises(cp.CruiseplanError, match=r"bank 75 deg is outside 0 to 60 deg"):
        cp.Leg("x", 0.0, kind="loiter", duration=60.0, bank=75.0)
    assert np.isfinite(cp.Leg("x", 0.0, kind="loiter", duration=60.0, bank=30.0).bank)
