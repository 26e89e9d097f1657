"""Battery packs as an internal-resistance (Rint) equivalent circuit (issue 12).

Sources of the checks: the circuit's own closed forms (V = U - I R; the quadratic for the
current at constant power; the maximum power U^2/(4R) at V = U/2), as in He, Xiong and Fan
(2011) and Shepherd (1965), both from memory; each is checked against an independent
numerical solution (a scipy root, scipy quadrature, scipy ODE integration), not re-typed.
Temperature tables, limits and file handling: the files written here (common practice, no
source).
"""

from __future__ import annotations

import re
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.integrate import quad, solve_ivp
from scipy.optimize import brentq

import cruiseplan as cp
from cruiseplan.cli import main
from cruiseplan.errors import CruiseplanError
from cruiseplan.io.mission_file import apply_overrides, read_mission
from cruiseplan.limits import UNFLYABLE, Limit
from cruiseplan.physics.atmosphere import air_state
from cruiseplan.physics.battery import (
    DEFAULT_TEMPERATURE,
    EquivalentCircuit,
    PackTemperature,
)
from cruiseplan.planning.mission import plan_mission
from cruiseplan.planning.optimise import best_cruise
from cruiseplan.planning.performance import cruise_grid, cruise_points

SOC = (0.0, 0.05, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1.0)
#: The demo pack's file, edited by the tests that need another pack.
AIRFRAME = (cp.bundled_airframes()["demo-survey-drone-6s"]).read_text(encoding="utf-8")
VOLTS = (3.00, 3.30, 3.45, 3.56, 3.63, 3.68, 3.73, 3.80, 3.88, 3.97, 4.07, 4.18)


@pytest.fixture(scope="module")
def pack():
    """A 6S4P pack of invented 7 Ah, 12 mOhm cells, cut-off 3.2 V, at most 100 A."""
    return EquivalentCircuit(SOC, VOLTS, 6, 4, 7 * 3600.0, 0.012, 3.2, 100.0)


@pytest.fixture(scope="module")
def wing6s():
    return cp.load_airframe("demo-survey-drone-6s")


# --- the circuit's closed forms ------------------------------------------------------------

def test_terminal_voltage_is_ocv_minus_current_times_resistance(pack):
    p = np.array([50.0, 400.0, 1500.0, 3000.0])
    s = np.array([0.95, 0.6, 0.3, 0.15])
    i = pack.current(p, s)
    v = pack.terminal_voltage(p, s)
    u = pack.ocv(s)
    np.testing.assert_allclose(v, u - i * pack.resistance, rtol=1e-15)
    # ... and it delivers the power asked for: V I = P.
    np.testing.assert_allclose(v * i, p, rtol=1e-12)


def test_current_at_constant_power_solves_the_quadratic_as_a_root_finder_does(pack):
    # The working branch of R I^2 - U I + P = 0 is the root of V(I) I - P below the
    # maximum-power current U / (2R); brentq finds it independently.
    r = pack.resistance
    for p, s in ((100.0, 1.0), (800.0, 0.5), (2500.0, 0.2), (5000.0, 0.7)):
        u = float(pack.ocv(s))
        root = brentq(lambda i, u=u, p=p: (u - i * r) * i - p, 0.0, u / (2 * r), xtol=1e-14)
        assert float(pack.current(p, s)) == pytest.approx(root, rel=1e-12)
        # The textbook form (U - sqrt(U^2 - 4RP)) / (2R), which cancels, agrees to its
        # own precision.
        textbook = (u - np.sqrt(u * u - 4 * r * p)) / (2 * r)
        assert float(pack.current(p, s)) == pytest.approx(textbook, rel=1e-9)


def test_power_beyond_the_maximum_is_flagged_not_nan(pack):
    s = 0.5
    p_max = float(pack.max_power(s))
    u = float(pack.ocv(s))
    assert p_max == pytest.approx(u * u / (4 * pack.resistance), rel=1e-15)
    load = pack.load(np.array([0.5 * p_max, 1.01 * p_max, 3 * p_max]), s)
    assert int(load.limits[0]) & int(Limit.PACK_POWER) == 0
    assert all(int(b) == int(Limit.PACK_POWER) for b in load.limits[1:])
    assert np.all(np.isfinite(load.current)) and np.all(np.isfinite(load.voltage))
    # At and beyond the maximum the current is that of the maximum power, U / (2R).
    assert float(load.current[2]) == pytest.approx(u / (2 * pack.resistance), rel=1e-12)


def test_power_beyond_the_maximum_is_a_grid_bit(wing6s):
    # A weak pack (1 ohm cells) cannot give a cruise's power at all: PACK, never NaN bits.
    prop = wing6s.propulsion
    weak = replace(wing6s, propulsion=replace(prop, circuit=replace(prop.circuit,
                                                                    cell_resistance=1.0)))
    g = cruise_grid(weak, [100.0], [20.0, 30.0])
    assert np.all((g.limits & int(Limit.PACK_POWER)) != 0)
    assert np.all(np.isnan(g.endurance))   # unflyable: no figures, with the reason
    assert "battery power beyond the pack's maximum" in g.reasons[0, 0]


@given(p=st.floats(1.0, 2000.0), s=st.floats(0.05, 1.0))
def test_rate_is_the_power_plus_the_heat_and_the_voltage_sags(pack, p, s):
    i = float(pack.current(p, s))
    assert float(pack.rate(p, s)) == pytest.approx(p + i * i * pack.resistance, rel=1e-12)
    assert float(pack.rate(p, s)) >= p
    assert float(pack.terminal_voltage(p, s)) <= float(pack.ocv(s))


def test_ocv_table_is_reproduced_at_its_points_and_stays_monotone(pack):
    np.testing.assert_allclose(pack.ocv(np.array(SOC)), 6 * np.array(VOLTS), rtol=1e-12)
    fine = pack.ocv(np.linspace(0, 1, 5001))
    assert np.all(np.diff(fine) >= 0)


def test_store_is_the_energy_at_ocv_from_the_no_load_cutoff_to_full(pack):
    # E = Q int U ds from the state where U = cut-off to 1, by scipy quadrature of the
    # same interpolant.
    floor = brentq(lambda s: float(pack.ocv(s)) - pack.cutoff, 0.0, 1.0, xtol=1e-14)
    assert pack.soc_floor == pytest.approx(floor, abs=1e-6)
    exact = pack.capacity * quad(lambda s: float(pack.ocv(s)), floor, 1.0, limit=400,
                                 epsabs=1e-9)[0]
    assert pack.store_capacity == pytest.approx(exact, rel=1e-6)
    # soc_of_store inverts store_at.
    s = np.array([0.1, 0.45, 0.99])
    np.testing.assert_allclose(pack.soc_of_store(pack.store_at(s)), s, atol=1e-9)


def test_discharge_time_against_quadrature_of_the_charge(pack):
    # t = int Q ds / I(P, s) from the start to the loaded cut-off, where U = V_cut + R P /
    # V_cut (the current at the cut-off, P / V_cut, is below the 100 A limit here).
    for p in (300.0, 900.0, 1800.0):
        d = pack.discharge(p, pack.store_capacity)
        v_end = max(pack.cutoff, p / pack.max_current)
        s_end = brentq(lambda s, p=p, v=v_end: float(pack.ocv(s)) - v - pack.resistance * p / v,
                       0.0, 1.0, xtol=1e-14)
        assert float(d.soc_end) == pytest.approx(s_end, abs=1e-6)
        t = quad(lambda s, p=p: pack.capacity / float(pack.current(p, s)), s_end, 1.0,
                 limit=400, epsrel=1e-8)[0]
        # 3-point Gauss-Legendre on the resistive loss: within 3e-5 measured.
        assert float(d.time) == pytest.approx(t, rel=5e-5)
        assert float(d.voltage_end) == pytest.approx(v_end, rel=1e-5)
        # The mean rate is the store over that time.
        assert float(pack.mean_rate(p)) == pytest.approx(pack.store_capacity / t, rel=5e-5)


def test_discharge_ends_at_the_current_limit_when_it_comes_first(pack):
    # At 2000 W the current reaches 100 A when the voltage is 20 V, above the 19.2 V cut-off.
    d = pack.discharge(2000.0, pack.store_capacity)
    assert float(d.current_end) == pytest.approx(100.0, rel=1e-5)
    assert float(d.voltage_end) == pytest.approx(20.0, rel=1e-5)


# --- zero resistance and a flat OCV: today's energy model exactly ----------------------------

def _ideal(af):
    """The airframe with a flat-OCV, zero-resistance pack and today's twin without it."""
    prop = af.propulsion
    flat = EquivalentCircuit((0.0, 1.0), (3.7, 3.7), 6, 4, 7 * 3600.0, 0.0, 3.0, None,
                             PackTemperature((-40.0, 60.0), (1.0, 1.0), (1.0, 1.0), "flat"))
    ideal = replace(af, propulsion=replace(prop, circuit=flat))
    today = replace(af, propulsion=replace(prop, circuit=None, peukert_exponent=1.0,
                                           battery_energy=flat.store_capacity))
    return ideal, today


def test_flat_zero_resistance_pack_is_todays_model_in_grids(wing6s):
    ideal, today = _ideal(wing6s)
    assert ideal.propulsion.store_capacity == pytest.approx(6 * 3.7 * 28 * 3600, rel=1e-12)
    h, v = [0.0, 150.0, 300.0], [16.0, 20.0, 26.0, 33.0, 40.0]
    for fuel in (None, 0.4 * today.propulsion.store_capacity):
        a = cruise_grid(ideal, h, v, fuel=fuel)
        b = cruise_grid(today, h, v, fuel=fuel)
        for f in ("store_rate", "endurance", "range_air", "specific_range_air", "limits"):
            np.testing.assert_array_equal(getattr(a, f), getattr(b, f), err_msg=f)
    for objective in ("range", "endurance"):
        a = best_cruise(ideal, [100.0, 200.0], objective=objective)
        b = best_cruise(today, [100.0, 200.0], objective=objective)
        assert a.best() == b.best()


def test_flat_zero_resistance_pack_is_todays_model_in_plans(wing6s, write_toml):
    ideal, today = _ideal(wing6s)
    path = write_toml(MISSION.format(airframe="demo-survey-drone-6s", extra=""), "m.toml")
    mission = read_mission(path)
    a = plan_mission(replace(mission, airframe=ideal))
    b = plan_mission(replace(mission, airframe=today))
    assert a.verdict == b.verdict == "GO"
    assert [(s.time, s.used, s.remaining, s.tas) for s in a.segments] == \
           [(s.time, s.used, s.remaining, s.tas) for s in b.segments]
    assert a.reserve_required == b.reserve_required


# --- state of charge through the plan ------------------------------------------------------

def test_a_hold_follows_the_state_of_charge_as_an_ode_solver_does(wing6s, write_toml):
    # A 40-minute loiter at a set power: the store used is E(s0) - E(s1) with s1 from
    # ds/dt = -I(P, s) / Q integrated by scipy (independent of the planner's RK4).
    text = MISSION.format(airframe="demo-survey-drone-6s", extra="pack_temperature = '25 degC'")
    text = text.replace('distance = "3 km"', 'kind = "loiter"\nduration = "40 min"\n'
                                             'power = "25 %"').replace('speed = "20 m/s"', "")
    mission = read_mission(write_toml(text, "hold.toml"))
    plan = plan_mission(mission)
    hold = next(s for s in plan.segments if s.kind == "loiter")
    prop = mission.airframe.propulsion
    c = prop.circuit
    p_batt = float(prop.source_power(0.25 * prop.rated_power))
    start = hold.remaining + hold.used
    s0 = float(c.soc_of_store(start))
    sol = solve_ivp(lambda t, s: [-float(c.current(p_batt, s[0])) / c.capacity],
                    (0.0, hold.time), [s0], rtol=1e-11, atol=1e-12)
    used = start - float(c.store_at(sol.y[0, -1]))
    assert hold.used == pytest.approx(used, rel=1e-6)
    # More than the battery power alone: the heat in the resistance.
    assert hold.used > p_batt * hold.time


# --- temperature --------------------------------------------------------------------------

def test_temperature_table_is_reproduced_at_its_points(wing6s):
    c = wing6s.propulsion.circuit
    table = c.temperature_table
    assert table.celsius == (-10.0, 0.0, 10.0, 25.0, 40.0)
    for t, kq, kr in zip(table.celsius, table.capacity, table.resistance):
        cold = c.at_temperature(t)
        assert cold.capacity == pytest.approx(4 * 7 * 3600 * kq, rel=1e-15)
        assert cold.resistance == pytest.approx(6 * 0.012 / 4 * kr, rel=1e-15)
        assert cold.store_capacity == pytest.approx(c.store_capacity * kq, rel=1e-12)


def test_default_table_when_the_file_gives_none():
    c = cp.load_airframe("demo-mapping-quad-4s").propulsion.circuit
    assert c.temperature_table is DEFAULT_TEMPERATURE
    assert "common practice, no source" in DEFAULT_TEMPERATURE.source
    assert DEFAULT_TEMPERATURE.factors(25.0) == (1.0, 1.0)


def test_below_the_tables_range_is_an_error_above_it_the_warmest_holds(pack):
    with pytest.raises(CruiseplanError, match=r"pack temperature -25\.0 degC is below the "
                                              r"battery temperature table \(-20 to 40 degC"):
        pack.at_temperature(-25.0)
    assert pack.at_temperature(55.0).resistance == pytest.approx(0.018 * 0.85, rel=1e-15)


def test_a_cold_pack_holds_less_and_sags_more(wing6s):
    warm, cold = wing6s.at_pack_temperature(25.0), wing6s.at_pack_temperature(0.0)
    assert cold.propulsion.store_capacity < 0.85 * warm.propulsion.store_capacity
    bw = best_cruise(warm, [100.0], objective="endurance").best()
    bc = best_cruise(cold, [100.0], objective="endurance").best()
    assert bc["endurance"] < 0.85 * bw["endurance"]


# --- limits: current and cut-off ------------------------------------------------------------

def test_current_and_cutoff_are_grid_bits_without_figures(wing6s):
    af = wing6s.at_pack_temperature(25.0)
    load = af.loading()
    air = air_state(np.array([[100.0]]))
    v = np.array([[20.0, 44.0]])
    pts = cruise_points(af, load.mass, air, v, load.store)
    amps = (pts.limits & int(Limit.CURRENT)) != 0
    np.testing.assert_array_equal(amps, [[False, True]])
    assert np.isnan(pts.endurance[0, 1]) and np.isfinite(pts.endurance[0, 0])
    # A nearly empty pack at a modest power: below cut-off under load at once.
    low = af.propulsion.circuit.store_at(0.04)
    pts = cruise_points(af, load.mass, air, np.array([[30.0]]), low)
    assert int(pts.limits[0, 0]) & int(Limit.CUTOFF)
    assert int(pts.limits[0, 0]) & int(UNFLYABLE)
    assert "pack voltage under load below its cut-off voltage" in pts.reasons[0, 0]


def test_best_cruise_keeps_within_the_current_limit(wing6s):
    # Into a strong headwind best range is fast; a pack rated for 60 A binds it (the demo
    # pack's 100 A is more than its 1.5 kW motor draws).
    prop = wing6s.propulsion
    af = replace(wing6s, propulsion=replace(prop, circuit=replace(prop.circuit,
                                                                  max_current=60.0)))
    best = best_cruise(af, [100.0], objective="range", headwind=25.0)
    b = best.best()
    assert b["feasible"] and "maximum continuous current" in b["binding"]
    load = af.propulsion.pack_load(best.points.shaft_power, best.points.store)
    assert float(load.current[0]) == pytest.approx(60.0, rel=1e-6)
    # Faster is not flyable: the grid says why.
    pts = cruise_grid(af, [100.0], [b["tas"] * 1.05])
    assert int(pts.limits[0, 0]) == int(Limit.CURRENT)


MISSION = """
[mission]
airframe = "{airframe}"
battery = "100 %"
{extra}

[day]
isa_dev = "0 K"

[profile]
departure_elevation = "100 m"
arrival_elevation = "100 m"
climb_rate = "3 m/s"
descent_rate = "2 m/s"
min_clearance = "30 m"

[reserve]
fraction = "25 %"

[[legs]]
name = "out"
distance = "3 km"
course = 90
altitude = "150 m"
speed = "20 m/s"
"""


def test_current_limit_in_a_plan_is_a_nogo_reason(write_toml):
    # A full-power climb draws more than a 60 A pack gives: NO-GO, and it says so.
    af = write_toml(AIRFRAME.replace('max_current = "100 A"', 'max_current = "60 A"'),
                    "amps60.toml")
    text = MISSION.format(airframe=af, extra="").replace(
        'climb_rate = "3 m/s"', 'climb_power = "100 %"\nclimb_rate = "30 m/s"')
    text = text.replace('altitude = "150 m"', 'altitude = "400 m"').replace(
        '"3 km"', '"8 km"')
    plan = plan_mission(read_mission(write_toml(text, "amps.toml")))
    assert plan.verdict == "NO-GO"
    assert any(re.match(r"pack current above its maximum: leg 'out' \(climb\) draws \d\d A, "
                        r"above the pack's 60 A continuous", r) for r in plan.reasons)
    climb = next(s for s in plan.segments if s.kind == "climb")
    assert climb.pack_current > 60.0 and climb.flown  # a limit, the flight goes on


def test_cutoff_in_a_plan_is_a_nogo_reason_and_stops_it(write_toml):
    # A cold pack flown fast down to a low state of charge sags below its cut-off.
    text = MISSION.format(airframe="demo-survey-drone-6s", extra="pack_temperature = "
                          "'-10 degC'").replace('"3 km"', '"60 km"').replace(
        '"20 m/s"', '"36 m/s"').replace('fraction = "25 %"', 'fraction = "1 %"')
    plan = plan_mission(read_mission(write_toml(text, "volts.toml")))
    assert plan.verdict == "NO-GO"
    reason = next(r for r in plan.reasons if r.startswith("pack voltage"))
    assert re.match(r"pack voltage: leg 'out' \(cruise\) takes the pack to \d+\.\d V under "
                    r"load, below its cut-off 19\.2 V at -10 degC", reason)
    cruise = next(s for s in plan.segments if s.kind == "cruise")
    assert not cruise.flown and cruise.pack_voltage < 19.2


def test_pack_temperature_from_the_day_file_and_override(write_toml):
    path = write_toml(MISSION.format(airframe="demo-survey-drone-6s", extra=""), "t.toml")
    m = read_mission(path)
    # The day's outside air temperature at the 100 m field, ISA: 14.35 degC.
    assert m.airframe.propulsion.circuit.celsius == pytest.approx(15.0 - 0.65, abs=1e-9)
    cold = apply_overrides(m, pack_temperature="0 degC")
    assert cold.airframe.propulsion.circuit.celsius == 0.0
    assert cold.overrides == ("pack 0 degC",)
    assert cold.store is not None and cold.store < m.store  # the same state of charge
    warm = apply_overrides(m, isa_dev="+10 K")
    assert warm.airframe.propulsion.circuit.celsius == pytest.approx(24.35, abs=1e-9)
    # Colder: more heat in the resistance for the same flight (the allowance, a share of
    # the capacity, left out).
    def flown(plan):
        return sum(s.used for s in plan.segments[1:])

    assert flown(plan_mission(cold)) > flown(plan_mission(m))


# --- files and options: bad input ---------------------------------------------------------


@pytest.mark.parametrize("old, new, message", [
    ("cells_series = 6", "cells_series = 6.5", r"\[battery\] cells_series: 6\.5 is not a "
                                              r"whole number"),
    ("cells_parallel = 4", "cells_parallel = 0", r"\[battery\] cells_parallel: 0 is out of "
                                                 r"range; expected >= 1"),
    ('cell_capacity = "7 Ah"', "cell_capacity = 7", r"\[battery\] cell_capacity: 7 needs a "
                                                    r"unit"),
    ('cell_resistance = "12 mohm"', 'cell_resistance = "-1 mohm"',
     r"\[battery\] cell_resistance: '-1 mohm' is out of range; expected >= 0 ohm"),
    ('cutoff_voltage = "3.2 V"', 'cutoff_voltage = "4.3 V"',
     r"\[battery\] cutoff_voltage: '4\.3 V' must be below the full cell's open-circuit "
     r"voltage 4\.18 V"),
    ('max_current = "100 A"', 'max_current = "100 A"\nmax_c_rate = 4',
     r"\[battery\] max_c_rate: give max_current or max_c_rate, not both"),
    ('max_current = "100 A"', "max_c_rate = 0", r"\[battery\] max_c_rate: 0 is out of range"),
    ('max_current = "100 A"', 'max_current = "lots"', r"\[battery\] max_current: 'lots' is "
                                                      r"not a quantity"),
    ("soc = [0.0, 0.05", "soc = [0.02, 0.05", r"\[battery\.ocv\] soc: .* must increase from "
                                              r"0 to 1"),
    ("volts = [3.00, 3.30", "volts = [3.40, 3.30", r"\[battery\.ocv\] volts: .* must not fall"),
    ("volts = [3.00, 3.30", "volts = [3.30", r"\[battery\.ocv\] volts: soc and volts need "
                                             r"the same length"),
    ("celsius = [-10, 0, 10, 25, 40]", "celsius = [-10, 0, 10, 5, 40]",
     r"\[battery\.temperature\] celsius: .* temperatures must increase"),
    ("celsius = [-10, 0, 10, 25, 40]", "celsius = [30, 40, 50, 60, 70]",
     r"\[battery\.temperature\] celsius: .* must reach 25 degC"),
    ("capacity = [0.70,", "capacity = [2.0,", r"\[battery\.temperature\] capacity: 2\.0 is "
                                              r"out of range"),
    ("resistance = [2.8, 1.9, 1.35, 1.00, 0.85]", "resistance = [2.8, 1.9]",
     r"\[battery\.temperature\] capacity: celsius, capacity and resistance need the same"),
    ("cells_parallel = 4", "cells_parallel = 4\ncell_count = 24",
     r"\[battery\] cell_count: unknown field"),
    ('max_power = "1.5 kW"', 'max_power = "1.5 kW"\nbattery_energy = "600 Wh"',
     r"\[propulsion\] battery_energy: not with a \[battery\] circuit"),
    ("[battery.ocv]", "[battery.ocv]\nkind = 'x'", r"\[battery\.ocv\] kind: unknown field"),
])
def test_bad_battery_fields_name_the_file_field_and_expectation(write_toml, old, new, message):
    assert old in AIRFRAME
    path = write_toml(AIRFRAME.replace(old, new, 1))
    with pytest.raises(cp.AirframeFileError, match=re.escape(str(path)) + ": " + message):
        cp.read_airframe(path)


def test_a_battery_circuit_needs_an_electric_engine(write_toml):
    text = cp.bundled_airframes()["demo-trainer"].read_text(encoding="utf-8")
    path = write_toml(text + "\n[battery]\ncells_series = 6\n")
    with pytest.raises(cp.AirframeFileError, match=r"\[battery\]: a piston-propeller engine "
                                                   r"has no battery pack"):
        cp.read_airframe(path)


@pytest.mark.parametrize("argv, message", [
    (["table", "demo-survey-drone-6s", "--pack-temperature", "warm"],
     r"--pack-temperature: cannot read 'warm'"),
    (["table", "demo-survey-drone-6s", "--pack-temperature", "200 degC"],
     r"--pack-temperature: '200 degC' is out of range \(-90 to 85 degC\)"),
    (["best", "demo-survey-drone-6s", "--pack-temperature=-30degC"],
     r"--pack-temperature: pack temperature -30\.0 degC is below the battery temperature "
     r"table \(-10 to 40 degC, the airframe file's table\)"),
    (["table", "demo-survey-drone", "--pack-temperature", "5 degC"],
     r"--pack-temperature: demo-survey-drone has no battery circuit"),
    (["table", "demo-mapping-quad-4s", "--isa-dev", "-40 K"],
     r"pack at the outside air temperature -25 degC: pack temperature -25\.0 degC is below"),
])
def test_bad_pack_temperature_options_exit_2_and_write_nothing(argv, message, capsys,
                                                               tmp_path):
    out = tmp_path / "out.txt"
    assert main(argv + ["--output", str(out)]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1
    assert re.search(message, err), err
    assert not out.exists()


def test_bad_pack_temperature_in_card_and_plan_exit_2(capsys, tmp_path, write_toml):
    pdf = tmp_path / "card.pdf"
    assert main(["card", "demo-survey-drone-6s", "-o", str(pdf),
                 "--pack-temperature=-50degC"]) == 2
    assert "below the battery temperature table" in capsys.readouterr().err
    assert not pdf.exists() and not pdf.with_suffix(".md").exists()
    path = write_toml(MISSION.format(airframe="demo-survey-drone-6s", extra=""), "p.toml")
    out = tmp_path / "plan.txt"
    assert main(["plan", str(path), "--pack-temperature", "hot", "-o", str(out)]) == 2
    assert "--pack-temperature: cannot read 'hot'" in capsys.readouterr().err
    assert not out.exists()
    assert main(["plan", str(path), "--pack-temperature=-40degC", "-o", str(out)]) == 2
    assert re.search(r"--pack-temperature: pack temperature -40\.0 degC is below",
                     capsys.readouterr().err)
    assert not out.exists()


@pytest.mark.parametrize("extra, message", [
    ("pack_temperature = 'cold'", r"\[mission\] pack_temperature: 'cold' is not a quantity"),
    ("pack_temperature = '-20 degC'", r"\[mission\] pack_temperature: pack temperature "
                                      r"-20\.0 degC is below the battery temperature table"),
])
def test_bad_pack_temperature_in_a_mission_file(write_toml, extra, message):
    path = write_toml(MISSION.format(airframe="demo-survey-drone-6s", extra=extra), "b.toml")
    with pytest.raises(cp.MissionFileError, match=re.escape(str(path)) + ": " + message):
        read_mission(path)


def test_a_pack_temperature_override_needs_a_circuit(write_toml):
    path = write_toml(MISSION.format(airframe="demo-survey-drone", extra=""), "n.toml")
    with pytest.raises(CruiseplanError, match=r"pack_temperature: demo-survey-drone has no "
                                              r"battery circuit"):
        apply_overrides(read_mission(path), pack_temperature="5 degC")
    path = write_toml(MISSION.format(airframe="demo-survey-drone",
                                     extra="pack_temperature = '5 degC'"), "n2.toml")
    with pytest.raises(cp.MissionFileError, match=re.escape(str(path)) + r": \[mission\] "
                       r"pack_temperature: demo-survey-drone has no battery circuit"):
        read_mission(path)


# --- outputs --------------------------------------------------------------------------------

def test_tables_and_cards_show_current_voltage_and_minutes_to_the_reserve(capsys, tmp_path):
    assert main(["table", "demo-survey-drone-6s", "--speeds", "18,22m/s", "--altitudes",
                 "100m", "--pack-temperature", "0degC", "--format", "csv", "--csv-header"]) == 0
    out = capsys.readouterr().out
    assert "Pack: 6S4P internal-resistance circuit at 0 degC" in out
    heads = next(ln for ln in out.splitlines() if ln.startswith("PA"))
    assert "amps [A]" in heads and "V res [V]" in heads and "to res. [min]" in heads
    from cruiseplan.report.card import card_content

    af = cp.load_airframe("demo-survey-drone-6s").at_pack_temperature(0.0)
    md = card_content(af).markdown()
    assert "| amps [A] | V at res. [V] |" in md
    assert "endur. to res. [min]" in md
    # Minutes to the reserve by the discharge itself, against its own figures.
    card_af = af
    prop = card_af.propulsion
    table = cp.power_setting_table(card_af, [0.0], [0.3])
    keep = 0.25 * prop.store_capacity
    d = prop.circuit.discharge(prop.source_power(table.shaft_power), table.store, keep=keep)
    row = next(ln for ln in md.splitlines() if ln.startswith("| 0 | 30 |"))
    assert row.split("|")[7].strip() == f"{float(d.time[0, 0]) / 60:.0f}"


def test_a_bad_battery_file_on_the_command_line_exits_2_and_writes_nothing(write_toml, capsys,
                                                                           tmp_path):
    path = write_toml(AIRFRAME.replace('cutoff_voltage = "3.2 V"', 'cutoff_voltage = "3.2 kg"'))
    out = tmp_path / "table.txt"
    assert main(["table", str(path), "--output", str(out)]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1
    assert re.search(re.escape(str(path)) + r": \[battery\] cutoff_voltage: '3\.2 kg' is not a "
                     r"quantity in units compatible with V", err), err
    assert not out.exists()
