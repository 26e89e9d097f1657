"""Best cruise: optimiser identities, wind, ceilings and every constraint where it binds."""

from dataclasses import replace

import numpy as np
import pytest
from conftest import constant_propeller
from scipy.optimize import brentq, minimize_scalar

import cruiseplan as cp
from cruiseplan.io.text import parse_wind_profile
from cruiseplan.limits import Limit
from cruiseplan.physics.aerodynamics import min_drag_speed, min_power_speed
from cruiseplan.physics.atmosphere import air_state
from cruiseplan.physics.propulsion import PropellerEfficiency
from cruiseplan.physics.winds import WindProfile
from cruiseplan.planning.optimise import (
    SERVICE_CEILING_RATE,
    best_cruise,
    ceilings,
    max_climb_rate,
    speed_schedule,
)

ALTITUDES = np.linspace(0.0, 4000.0, 9)
FT = 0.3048


@pytest.fixture(scope="module")
def trainer():
    # Constant propeller efficiency, as the closed forms checked here assume.
    return constant_propeller(cp.load_airframe("demo-trainer"))


@pytest.fixture(scope="module")
def trainer_searched(trainer):
    """The trainer with a two-point (but constant) efficiency table: the optimiser cannot
    use the closed form and must search."""
    e = trainer.propulsion.propeller.efficiency[0]
    prop = replace(trainer.propulsion, propeller=PropellerEfficiency((5.0, 150.0), (e, e)))
    return replace(trainer, propulsion=prop)


@pytest.mark.parametrize("which", ["trainer", "trainer_searched"])
def test_calm_air_best_speeds_are_the_polar_identities(which, request):
    # Textbook identities (Anderson, Aircraft Performance and Design, secs. 5.4 and 5.7):
    # with constant propeller efficiency and BSFC, best range is flown at (L/D)max, i.e.
    # V_md, and best endurance at minimum power, V_mp = 3^(-1/4) V_md.
    af = request.getfixturevalue(which)
    load = af.loading()
    air = air_state(ALTITUDES)
    s = speed_schedule(af, load.mass, air, load.store, stall_margin=1.0)
    pol = af.polar
    v_md = min_drag_speed(load.mass, air.density, af.wing_area, pol.cd0, pol.k)
    v_mp = min_power_speed(load.mass, air.density, af.wing_area, pol.cd0, pol.k)
    # Closed form (trainer): exact; searched (trainer_searched): the argmax of a flat
    # optimum to ~sqrt(eps), measured 1.5e-8.
    np.testing.assert_allclose(s.tas_unconstrained["range"], v_md, rtol=1.5e-7)
    np.testing.assert_allclose(s.tas_unconstrained["endurance"], v_mp, rtol=1.5e-7)
    np.testing.assert_allclose(v_mp / v_md, 3 ** -0.25, rtol=1e-12)
    # No constraint binds at these altitudes with a margin of 1.0, so the answer is the same.
    assert not np.any(s.binding["range"])
    np.testing.assert_allclose(s.tas["range"], v_md, rtol=1.5e-7)


def tangent_construction(h, headwind, af, mass):
    """Best-range TAS by the classical tangent construction.

    Fuel flow against TAS is drawn from the polar by hand here (not through cruiseplan);
    the best-range speed in a headwind touches the tangent from (headwind, 0), i.e. it
    maximises (V - headwind) / fuel flow (Anderson, Aircraft Performance and Design, sec.
    5.7; FAA-H-8083-25 ch. 11 for the wind effect). The tangent point is found with
    scipy's bounded scalar search, a different implementation from the product's.
    """
    rho = float(air_state(h).density)

    def ground_per_fuel(v):
        cl = 2 * mass * 9.80665 / (rho * v**2 * af.wing_area)
        drag = 0.5 * rho * v**2 * af.wing_area * (af.polar.cd0 + af.polar.k * cl**2)
        flow = af.propulsion.bsfc * drag * v / af.propulsion.propeller.efficiency[0]
        return (v - headwind) / flow

    res = minimize_scalar(lambda v: -ground_per_fuel(v), bounds=(20.0, 90.0),
                          method="bounded", options={"xatol": 1e-10})
    return res.x


@pytest.mark.parametrize("headwind", [-10.0, 10.0, 20.0])
def test_wind_moves_best_range_speed_like_the_tangent_construction(trainer, headwind):
    load = trainer.loading()
    h = 1000.0
    calm = best_cruise(trainer, [h], stall_margin=1.0).schedule.tas_unconstrained["range"][0]
    windy = best_cruise(trainer, [h], headwind=headwind, stall_margin=1.0)
    v = windy.schedule.tas_unconstrained["range"][0]
    assert (v > calm) if headwind > 0 else (v < calm)
    ref = tangent_construction(h, headwind, trainer, load.mass)
    # Two searches of a flat optimum agree to ~sqrt(eps): measured at most 8.2e-9.
    assert v == pytest.approx(ref, rel=1e-7)


def test_wind_profile_interpolates_components(trainer):
    w = parse_wind_profile("270/20@0ft,090/20@2000ft")
    # Halfway between opposite winds of equal speed the air is still.
    d, s = w.at(1000 * FT)
    assert s == pytest.approx(0.0, abs=1e-13)   # rounding of the components (1.9e-15)
    # On course 270, a wind from 270 is a pure headwind; beyond the ends it holds.
    # 20 kt = 20 x 1852/3600 m/s exactly; rounding only (measured 0 and 1.3e-15).
    kt = 1852.0 / 3600.0
    head, cross = w.components(270.0, np.array([-500.0, 0.0, 2000 * FT, 5000.0]))
    np.testing.assert_allclose(head, [20 * kt, 20 * kt, -20 * kt, -20 * kt], rtol=1e-14)
    np.testing.assert_allclose(cross, 0.0, atol=1e-13)
    # A veer through north interpolates through north.
    d, s = WindProfile((0.0, 1000.0), (350.0, 10.0), (10.0, 10.0)).at(500.0)
    assert d == pytest.approx(0.0, abs=1e-9) or d == pytest.approx(360.0, abs=1e-9)
    assert s == pytest.approx(10 * np.cos(np.radians(10.0)), rel=1e-12)


@pytest.mark.parametrize("text, match", [
    ("270-25@3000ft", "DIR/SPEED@ALTITUDE"),
    ("400/25@3000ft", "not 0-360"),
    ("270/25kg@3000ft", "wind speed"),
    ("270/25@3000ft,250/40@3000ft", "same altitude"),
])
def test_bad_wind_text(text, match):
    with pytest.raises(cp.CruiseplanError, match=match):
        parse_wind_profile(text)


def _cp1(tmp_path):
    """J. D. Anderson's CP-1 light single (Introduction to Flight, ch. 6 examples):
    W = 2950 lb, S = 174 ft^2, b = 35.8 ft, CD0 = 0.025, e = 0.8, 230 hp, eta_p = 0.8,
    power proportional to density (the book's assumption)."""
    path = tmp_path / "cp1.toml"
    path.write_text("""
[masses]
empty = "2000 lb"
max_takeoff = "2950 lb"
payload = "583.4 lb"
[wing]
area = "174 ft^2"
span = "35.8 ft"
cl_max = 1.6
[polar]
cd0 = 0.025
oswald_e = 0.8
[propulsion]
kind = "piston-propeller"
rated_power = "230 hp"
power_lapse = "density-ratio"
bsfc = "0.45 lb/(hp*h)"
propeller_efficiency = 0.8
fuel = "avgas"
fuel_capacity = "65 gallon"
fuel_density = "5.64 lb/gallon"
""")
    return cp.read_airframe(path), 2950 * 0.45359237


def test_ceilings_of_the_textbook_example(tmp_path):
    af, mass = _cp1(tmp_path)
    # The textbook searches every speed above the stall (no margin), as its own answer does.
    c = ceilings(af, mass=mass, stall_margin=1.0)
    # Independent closed form (Anderson, Aircraft Performance and Design, secs. 5.10-5.11):
    # with P_av = eta P0 sigma and constant eta the best climb is at minimum power, where
    # P_R,min(sigma) = P_R,min,0 / sqrt(sigma); so eta P0 sigma - P_R,min,0 / sqrt(sigma)
    # = W x rate gives the ceiling's density ratio.
    W = mass * 9.80665
    S, k, cd0 = af.wing_area, af.polar.k, af.polar.cd0
    cl = np.sqrt(3 * cd0 / k)
    p_min0 = np.sqrt(2 * W**3 * (4 * cd0) ** 2 / (1.225 * S * cl**3))
    eta_p0 = 0.8 * 230 * 745.69987158227022   # 230 hp, 1 hp = 550 ft lbf/s exactly

    def sigma_for(rate):
        return brentq(lambda s: eta_p0 * s - p_min0 / np.sqrt(s) - W * rate, 0.05, 1.0)

    def altitude(sigma):
        # ISA troposphere from the ICAO Doc 7488/3 defining constants, exact:
        # H = (T0 / L) [1 - sigma^(1 / (g0 / (R L) - 1))].
        t0, lapse, g0, r = 288.15, 0.0065, 9.80665, 287.05287
        return t0 / lapse * (1 - sigma ** (1 / (g0 / (r * lapse) - 1)))

    # The product's ceiling root (1e-9 relative) on its own climb-rate search: measured
    # 1.5e-8 and 1.7e-8 against this closed form.
    assert c.absolute == pytest.approx(altitude(sigma_for(0.0)), rel=2e-7)
    assert c.service == pytest.approx(altitude(sigma_for(SERVICE_CEILING_RATE)), rel=2e-7)
    # Anderson, Introduction to Flight, sec. 6.10, CP-1 absolute ceiling about 27,000 ft
    # (from memory): within 3 %.
    assert c.absolute / FT == pytest.approx(27000, rel=0.03)
    assert c.service < c.absolute
    # Hot day lowers both ceilings (pressure altitude).
    hot = ceilings(af, mass=mass, isa_dev=20, stall_margin=1.0)
    assert hot.absolute < c.absolute and hot.service < c.service


def test_max_climb_rate_is_zero_at_the_absolute_ceiling(trainer):
    c = ceilings(trainer)
    rate, _ = max_climb_rate(trainer, trainer.loading().mass, air_state([c.absolute,
                                                                         c.service]))
    # Root to 1e-9 relative in altitude (~1e-5 m) times dRate/dH (~1e-3 /s): ~1e-8 m/s;
    # measured 2.6e-15.
    np.testing.assert_allclose(rate, [0.0, SERVICE_CEILING_RATE], atol=1e-8)


def test_drone_ceiling_note_when_above_search(request):
    drone = cp.load_airframe("demo-survey-drone")
    c = ceilings(drone)
    assert np.isnan(c.absolute) and "above 20000 m" in c.note


# --- each constraint where it binds, with its reason ----------------------------------

def test_ceiling_binds(trainer):
    b = best_cruise(trainer, np.arange(0, 4001, 500.0), ceiling=2000.0)
    assert b.best()["altitude"] == 2000.0
    assert b.binding & Limit.CEILING
    assert "ceiling" in b.best()["binding"]
    assert "altitude band ceiling" in b.reason(6)


def test_floor_binds():
    # A headwind that grows fast with height: the best range would be lower than the
    # floor, and the altitudes above it are worse by more than 0.5 %.
    drone = cp.load_airframe("demo-survey-drone")
    wind = cp.parse_wind_profile("090/0@0m,090/40kt@450m")
    b = best_cruise(drone, np.arange(0, 451, 50.0), floor=100.0, wind=wind, course=90.0)
    assert b.best()["altitude"] == 100.0 and b.peak_index == b.best_index
    assert b.binding & Limit.FLOOR
    assert "floor" in b.best()["binding"]


def test_height_above_ground_binds(trainer):
    b = best_cruise(trainer, np.arange(0, 4001, 500.0), max_agl=1000.0, elevation=500.0)
    assert b.best()["altitude"] == 1500.0
    assert b.binding == Limit.HEIGHT_AGL
    assert "maximum height above ground" in b.best()["binding"]
    assert "not flyable: maximum height above ground" == b.reason(4)


def test_stall_margin_binds():
    # The demo drone's (L/D)max lift coefficient (0.98) is above CLmax / 1.3^2 (0.77).
    drone = cp.load_airframe("demo-survey-drone")
    b = best_cruise(drone, [0.0, 100.0])
    assert b.binding == Limit.STALL
    s = b.schedule
    np.testing.assert_allclose(s.tas["range"], 1.3 * s.stall_speed, rtol=1e-12)
    assert np.all(s.tas_unconstrained["range"] < s.tas["range"])
    assert b.best()["binding"] == "stall margin"


def test_power_binds_at_the_performance_ceiling(trainer):
    b = best_cruise(trainer, np.arange(0, 8001, 500.0), isa_dev=10)
    top = b.best()["altitude"]
    assert b.binding & Limit.POWER
    # One step higher the power available either cannot hold level flight or pushes the
    # speed off best range; both are reported.
    above = int(np.flatnonzero(b.altitudes > top)[0])
    assert "power available" in b.reason(above)
    assert not b.feasible[-1] and b.reason(len(b.altitudes) - 1) == (
        "not flyable: power available")


def test_climb_reserve_binds(trainer):
    free = best_cruise(trainer, np.arange(0, 5001, 500.0))
    held = best_cruise(trainer, np.arange(0, 5001, 500.0), climb_reserve=2.0)
    assert held.best()["altitude"] < free.best()["altitude"]
    assert held.binding & Limit.CLIMB_RESERVE
    assert "climb-rate reserve" in held.best()["binding"]
    # Where it is flown, the climb reserve really is there.
    i = held.best_index
    p = held.points
    rate = trainer.propulsion.propeller.efficiency[0] * p.power_margin[i] / (p.mass * 9.80665)
    assert rate >= 2.0 - 1e-9


def test_nothing_flyable_is_reported(trainer):
    b = best_cruise(trainer, [9000.0, 10000.0])
    assert b.best_index == -1 and b.best()["feasible"] is False
    assert "power available" in b.best()["binding"]


def test_economy_keeps_99_percent_of_best_specific_range(trainer):
    load = trainer.loading()
    air = air_state(ALTITUDES)
    s = speed_schedule(trainer, load.mass, air, load.store, stall_margin=1.0)
    pts_r = cp.cruise_points(trainer, load.mass, air, s.tas["range"], load.store)
    pts_e = cp.cruise_points(trainer, load.mass, air, s.tas["economy"], load.store)
    # Common practice, no source: the economy speed keeps 99 % of the best specific range.
    # Solved by a root finder on a steep flank: measured 1.5e-14.
    np.testing.assert_allclose(pts_e.specific_range_air / pts_r.specific_range_air, 0.99,
                               rtol=2e-13)
    assert np.all(s.tas["economy"] > s.tas["range"] * 1.05)


def test_best_cruise_rejects_bad_input(trainer):
    with pytest.raises(cp.CruiseplanError, match="objective 'speed' is not one of"):
        best_cruise(trainer, [0.0], objective="speed")
    with pytest.raises(cp.CruiseplanError, match="needs the true course"):
        best_cruise(trainer, [0.0], wind=WindProfile.calm())
    with pytest.raises(cp.CruiseplanError, match="increasing"):
        best_cruise(trainer, [1000.0, 0.0])


def test_equally_good_altitudes_band_the_best(trainer):
    """Constant BSFC and propeller efficiency: best range does not change with altitude
    (Breguet, Anderson sec. 5.7), so every flyable altitude is in the 0.5 % band; the
    chosen one is the quickest of them, the highest (TAS grows with height at the best
    lift coefficient)."""
    h = np.arange(0.0, 8001.0, 2000.0) * 0.3048
    best = cp.best_cruise(trainer, h)
    band = best.equally_good()
    assert band.dtype == bool and band.all()
    assert best.best_index == h.size - 1
    # The band is the values within the tolerance of the largest, and nothing else; the
    # pick lies in it.
    drone = cp.load_airframe("demo-survey-drone")
    answer = cp.best_cruise(drone, [0.0, 1000.0, 2000.0, 3000.0])
    v = answer.value
    assert v[answer.peak_index] == np.nanmax(v)
    for tolerance in (0.0, 0.005, 0.05):
        expected = v >= v[answer.peak_index] * (1.0 - tolerance)
        assert np.array_equal(answer.equally_good(tolerance), expected)
    assert answer.equally_good(0.0)[answer.peak_index]
    assert answer.equally_good()[answer.best_index]


def test_the_pick_within_the_band_is_the_quickest_for_range_and_the_lowest_for_endurance(
        trainer):
    """The secondary rule among equally good altitudes (within 0.5 % of the largest
    value): range and economy take the highest ground speed, endurance the lowest
    altitude."""
    h = np.arange(0.0, 12001.0, 1000.0) * 0.3048
    for objective in ("range", "economy"):
        best = cp.best_cruise(trainer, h, objective=objective)
        band = best.equally_good()
        gs = best.points.ground_speed
        assert band[best.best_index]
        assert gs[best.best_index] == np.max(gs[band])
    best = cp.best_cruise(trainer, h, objective="endurance")
    band = best.equally_good()
    assert best.best_index == np.flatnonzero(band)[0]
    # With a strong headwind aloft the quickest of the band is a low one.
    wind = cp.parse_wind_profile("270/0kt@0ft,270/60kt@12000ft")
    best = cp.best_cruise(trainer, h, wind=wind, course=270.0)
    gs = best.points.ground_speed
    band = best.equally_good()
    assert gs[best.best_index] == np.max(gs[band]) and best.best_index < h.size - 1


def test_nothing_flyable_has_no_equally_good_band(trainer):
    best = cp.best_cruise(trainer, [9000.0, 10000.0])  # above the ceiling
    assert best.best_index == -1
    assert not best.equally_good().any()


def test_closed_form_window_and_economy_equal_the_searched_ones(trainer):
    # The same constant efficiency as a flat table takes the searching path: its window
    # edges (roots to 1e-8 relative) and economy speed must agree with the closed forms.
    flat = replace(trainer, propulsion=replace(trainer.propulsion, propeller=PropellerEfficiency(
        (0.0, 100.0), (0.72, 0.72))))
    h = np.linspace(0.0, 4500.0, 10)
    closed = cp.best_cruise(trainer, h, climb_reserve=1.0).schedule
    searched = cp.best_cruise(flat, h, climb_reserve=1.0).schedule
    # Up high the 1 m/s climb reserve leaves no window: both paths must say so alike.
    assert 0 < np.isnan(closed.window_hi).sum() < h.size
    for name in ("window_lo", "window_hi"):
        assert np.allclose(getattr(closed, name), getattr(searched, name), rtol=3e-8, atol=0,
                           equal_nan=True)
    assert np.allclose(closed.tas_unconstrained["economy"],
                       searched.tas_unconstrained["economy"], rtol=3e-8, atol=0)
