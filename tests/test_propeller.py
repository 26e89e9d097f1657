"""Actuator-disk propeller, thrust available, and the best-rate and best-angle climbs.

Sources: momentum (actuator-disk) theory of the propeller as in any propeller textbook,
e.g. McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, ch. 6 (ideal
efficiency, static thrust); Anderson, *Aircraft Performance and Design*, sec. 5.10 (climb
from excess power, small climb angle). Values derived here from those relations are
marked "derived"; others say "common practice, no source".
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import brentq

import cruiseplan as cp
from cruiseplan.constants import DEFAULT_STALL_MARGIN, G0
from cruiseplan.physics.atmosphere import air_state
from cruiseplan.physics.propulsion import (
    ActuatorDiskPropeller,
    PropellerEfficiency,
    ideal_efficiency,
    momentum_power,
    momentum_thrust,
)
from cruiseplan.planning.mission import climb_speed
from cruiseplan.planning.optimise import (
    best_angle_climb,
    best_rate_climb,
    ceilings,
    climb_rate,
    max_climb_rate,
)

FT = 0.3048
BUNDLED = ("demo-trainer", "demo-tourer", "demo-survey-drone", "demo-sensor-wing",
           "demo-mapping-quad")
#: Invented, plausible diameters of the two piston demos (a two-seat trainer about 1.8 m,
#: a four-seat tourer about 1.9 m; common practice, no source).
DIAMETERS = {"demo-trainer": "1.78 m", "demo-tourer": "1.90 m"}
#: The bundled files without a diameter (the trainer's file gives one).
NO_DIAMETER = tuple(n for n in BUNDLED if n != "demo-trainer")

speeds = st.floats(1.0, 150.0)
thrusts = st.floats(1.0, 2e4)
densities = st.floats(0.3, 1.4)
areas = st.floats(0.01, 30.0)
powers = st.floats(100.0, 2e6)


def with_diameter(name, tmp_path):
    """The bundled file with ``propeller_diameter`` in [propulsion] (unless it has one)."""
    text = open(cp.load_airframe(name).source, encoding="utf-8").read()
    if "propeller_diameter" not in text:
        assert text.count("[propulsion]\n") == 1
        text = text.replace("[propulsion]\n",
                            f'[propulsion]\npropeller_diameter = "{DIAMETERS[name]}"\n')
    path = tmp_path / f"{name}.toml"
    path.write_text(text, encoding="utf-8")
    return cp.read_airframe(path)


@pytest.fixture(scope="module")
def piston_disks(tmp_path_factory):
    """The two piston demos with their actuator-disk propellers."""
    tmp = tmp_path_factory.mktemp("disk")
    return {name: with_diameter(name, tmp) for name in DIAMETERS}


# --- ideal efficiency -------------------------------------------------------------------

@given(thrusts, speeds, densities, areas)
def test_ideal_efficiency_is_the_froude_closed_form(thrust, v, rho, area):
    # Momentum theory (McCormick, ch. 6): eta_i = 2 / (1 + sqrt(1 + T / (q A))). The
    # product evaluates the equivalent 2V / (V + sqrt(V^2 + 2T/(rho A))); rounding only.
    q = 0.5 * rho * v**2
    expected = 2 / (1 + np.sqrt(1 + thrust / (q * area)))
    assert ideal_efficiency(thrust, v, rho, area) == pytest.approx(expected, rel=1e-13)


def test_ideal_efficiency_limits():
    rho, v, area = 1.225, 50.0, 2.5
    qa = 0.5 * rho * v**2 * area
    # Momentum theory (McCormick, ch. 6): T / (q A) = 3 gives 2 / (1 + 2) = 2/3 and
    # T / (q A) = 8 gives 2 / (1 + 3) = 1/2; exact values, rounding only.
    assert ideal_efficiency(3 * qa, v, rho, area) == pytest.approx(2 / 3, rel=1e-15)
    assert ideal_efficiency(8 * qa, v, rho, area) == pytest.approx(0.5, rel=1e-15)
    # No thrust: no induced velocity, efficiency 1; small thrust: 1 - eta_i ~ (T/qA)/4
    # (first-order expansion of the closed form, derived).
    assert ideal_efficiency(0.0, v, rho, area) == pytest.approx(1.0, rel=1e-15)
    x = np.array([1e-3, 1e-4, 1e-5])
    loss = 1 - ideal_efficiency(x * qa, v, rho, area)
    np.testing.assert_allclose(loss / x, 0.25, rtol=1e-3)
    # Standing still with thrust: all the power goes into the slipstream.
    assert ideal_efficiency(1000.0, 0.0, rho, area) == 0.0


# --- thrust at a power --------------------------------------------------------------------

@given(powers, densities, areas)
def test_static_thrust_is_the_momentum_theory_value(power, rho, area):
    # Momentum theory (McCormick, ch. 6), exact: P = T v_i, T = 2 rho A v_i^2, so
    # T0 = (2 rho A P^2)^(1/3); with a profile efficiency P -> eta_p P.
    assert momentum_thrust(power, 0.0, rho, area) == pytest.approx(
        np.cbrt(2 * rho * area * power**2), rel=1e-14)
    prop = ActuatorDiskPropeller(np.sqrt(4 * area / np.pi), PropellerEfficiency((0.0,), (1.0,)))
    assert prop.thrust_available(0.0, rho, power) == pytest.approx(
        np.cbrt(2 * rho * area * power**2), rel=1e-13)
    profile = ActuatorDiskPropeller(prop.diameter, PropellerEfficiency((0.0,), (0.8,)))
    assert profile.thrust_available(0.0, rho, power) == pytest.approx(
        np.cbrt(2 * rho * area * (0.8 * power) ** 2), rel=1e-13)


@given(powers, speeds, densities, areas)
def test_thrust_and_shaft_power_are_inverses(power, v, rho, area):
    # shaft_for_thrust(thrust_available(P)) = P: the level-flight and climb sides use one
    # model. Rounding only (measured 7e-16 over 1e5 random points).
    prop = ActuatorDiskPropeller(np.sqrt(4 * area / np.pi), PropellerEfficiency((0.0,), (0.83,)))
    thrust = prop.thrust_available(v, rho, power)
    assert prop.shaft_for_thrust(thrust, v, rho) == pytest.approx(power, rel=1e-12)
    assert momentum_power(thrust, v, rho, area) == pytest.approx(0.83 * power, rel=1e-12)
    # Against a second implementation: bracketed root of eta_p P = T (V + v_i), with
    # v_i = (sqrt(V^2 + 2T/(rho A)) - V) / 2 (momentum theory), by scipy.
    root = brentq(lambda t: t * (v + np.sqrt(v**2 + 2 * t / (rho * area))) / 2 - 0.83 * power,
                  0.0, 0.83 * power / v, xtol=1e-300, rtol=1e-14)
    assert thrust == pytest.approx(root, rel=1e-12)


@given(powers, densities, areas)
def test_thrust_speed_curve_is_continuous_and_decreasing(power, rho, area):
    v = np.linspace(0.0, 200.0, 4001)
    t = momentum_thrust(power, v, rho, area)
    assert np.all(np.isfinite(t)) and np.all(t > 0)
    assert np.all(np.diff(t) < 0)
    # Continuity: with w = V + v_i and P = T w fixed, dT/dV = -(T/w) dw/dV and
    # 0 < dw/dV <= 1 (derived), so |dT/dV| <= T0 / w0 = T0^2 / P, a Lipschitz bound that
    # a jump anywhere on this grid would break.
    t0 = np.cbrt(2 * rho * area * power**2)
    assert np.max(-np.diff(t)) <= t0**2 / power * (v[1] - v[0]) * (1 + 1e-9)
    # Never more than thrust power P / V (ideal efficiency <= 1), and tends to it.
    assert np.all(t[1:] * v[1:] < power)


# --- airframes with and without a diameter ----------------------------------------------

@pytest.mark.parametrize("name", NO_DIAMETER)
def test_airframes_without_a_diameter_are_unchanged(name):
    # The formulas before the actuator disk, written here: shaft = D V / eta(V) and
    # climb rate = eta(V) (P_av - P_req) / W; bit for bit.
    af = cp.load_airframe(name)
    prop = af.propulsion
    assert isinstance(prop.propeller, PropellerEfficiency)
    mass = af.loading().mass
    air = air_state(np.array([[0.0], [2000.0]]))
    v = np.array([[15.0, 30.0, 45.0, 60.0]])
    flight = af.level_flight(mass, air, v)
    if af.has_wing:
        np.testing.assert_array_equal(flight.shaft, flight.drag * v / prop.propeller(v))
    expected = prop.propeller(v) * (prop.shaft_power_available(air.sigma) - flight.shaft) / (
        mass * G0)
    np.testing.assert_array_equal(climb_rate(af, mass, air, v), expected)


@pytest.mark.parametrize("name", DIAMETERS)
def test_file_diameter_gives_the_momentum_theory_propeller(name, piston_disks):
    af = piston_disks[name]
    prop = af.propulsion.propeller
    # The same airframe with only the profile efficiency (no actuator disk).
    plain = replace(af, propulsion=replace(af.propulsion, propeller=prop.profile))
    assert isinstance(prop, ActuatorDiskPropeller) and not prop.is_constant
    # The diameter is read in metres.
    assert prop.diameter == pytest.approx(float(DIAMETERS[name].split()[0]), rel=1e-15)
    # Level flight: thrust = drag, shaft = D V / (eta_i eta_p), closed form (McCormick ch. 6).
    mass = af.loading().mass
    air = air_state(np.array([0.0, 1500.0, 3000.0]))
    v = np.array([35.0, 50.0, 65.0])
    flight = af.level_flight(mass, air, v)
    area = np.pi * prop.diameter**2 / 4
    eta_i = 2 / (1 + np.sqrt(1 + flight.drag / (0.5 * air.density * v**2 * area)))
    np.testing.assert_allclose(flight.shaft, flight.drag * v / (eta_i * prop.profile(v)),
                               rtol=1e-13)
    # The drag is the airframe's, unchanged by the propeller.
    np.testing.assert_array_equal(flight.drag, plain.level_flight(mass, air, v).drag)
    assert np.all(flight.shaft > plain.level_flight(mass, air, v).shaft)


def test_climb_rate_with_a_diameter_is_excess_thrust_power(piston_disks):
    # Anderson sec. 5.10, small angle: rate = (T_av - D) V / W, with T_av the root of
    # eta_p P_av = T (V + v_i) found here by scipy (a second implementation).
    af = piston_disks["demo-tourer"]
    prop = af.propulsion
    mass = af.max_takeoff_mass
    air = air_state(np.array([0.0, 1500.0]))
    v = np.array([32.0, 45.0])
    area = np.pi * prop.propeller.diameter**2 / 4
    drag = af.level_flight(mass, air, v).drag
    for i in range(2):
        rho, p = air.density[i], prop.shaft_power_available(air.sigma[i])
        tp = prop.propeller.profile(v[i]) * p
        t_av = brentq(lambda t: t * (v[i] + np.sqrt(v[i] ** 2 + 2 * t / (rho * area))) / 2
                      - tp, 0.0, tp / v[i], xtol=1e-300, rtol=1e-14)
        row = air_state(np.array([air.pressure_altitude[i]]))
        rate = climb_rate(af, mass, row, np.array([v[i]]))[0]
        assert rate == pytest.approx((t_av - drag[i]) * v[i] / (mass * G0), rel=1e-11)


def test_bad_diameters_are_rejected(tmp_path):
    text = open(cp.load_airframe("demo-tourer").source, encoding="utf-8").read()
    for value, match in (('"1.8 kg"', "propeller_diameter"),
                         ('"-1.8 m"', "propeller_diameter"),
                         ('"9 m"', "propeller_diameter")):
        path = tmp_path / "bad.toml"
        path.write_text(text.replace("[propulsion]\n",
                                     f"[propulsion]\npropeller_diameter = {value}\n"),
                        encoding="utf-8")
        with pytest.raises(cp.AirframeFileError, match=match):
            cp.read_airframe(path)
    quad = open(cp.load_airframe("demo-mapping-quad").source, encoding="utf-8").read()
    path = tmp_path / "quad.toml"
    path.write_text(quad.replace("[propulsion]\n", '[propulsion]\npropeller_diameter = "0.4 m"\n'),
                    encoding="utf-8")
    with pytest.raises(cp.AirframeFileError, match="propeller_diameter"):
        cp.read_airframe(path)


def test_tolerance_on_efficiency_scales_the_profile(piston_disks):
    af = piston_disks["demo-trainer"]
    factors = np.array([[0.9], [1.0], [1.1]])
    sampled = af.propulsion.sampled(af.name, {"propeller_efficiency": factors})
    assert isinstance(sampled.propeller, ActuatorDiskPropeller)
    np.testing.assert_allclose(sampled.propeller(50.0),
                               af.propulsion.propeller.profile(50.0) * factors, rtol=1e-15)
    shaft = sampled.shaft_for_thrust(1000.0, 50.0, 1.2)
    # Shaft power goes as 1 / profile efficiency at a given thrust (exact, rounding only).
    np.testing.assert_allclose(shaft * factors, shaft[1] * np.ones((3, 1)), rtol=1e-14)


# --- best rate and best angle -----------------------------------------------------------

def all_airframes(piston_disks):
    return [cp.load_airframe(n) for n in BUNDLED] + list(piston_disks.values())


@pytest.mark.parametrize("h_ft", [0.0, 5000.0, 10000.0])
def test_best_climb_speeds_never_below_the_stall_margin(h_ft, piston_disks):
    air = air_state(np.full(1, h_ft * FT))
    for af in all_airframes(piston_disks):
        for mass in (af.empty_mass + 0.5 * (af.max_takeoff_mass - af.empty_mass),
                     af.max_takeoff_mass):
            floor = DEFAULT_STALL_MARGIN * af.stall_speed(mass, air.density)
            kinds = [best_rate_climb(af, mass, air)]
            if af.has_wing:
                kinds.append(best_angle_climb(af, mass, air))
            for best in kinds:
                assert np.all(best.tas >= floor), af.name
                # Where the margin binds the speed is the margin's speed exactly.
                np.testing.assert_array_equal(best.tas[best.stall_bound],
                                              floor[best.stall_bound])
            rate, tas = max_climb_rate(af, mass, air)
            np.testing.assert_array_equal(tas, kinds[0].tas)


@pytest.mark.parametrize("name", DIAMETERS)
def test_best_rate_and_angle_are_the_optima_above_the_margin(name, piston_disks):
    # A dense grid (a second method) finds no better rate nor gradient above the margin;
    # the optima are flat, so the grid's step bounds the difference (common practice).
    af = piston_disks[name]
    mass = af.max_takeoff_mass
    air = air_state(np.array([0.0, 1500.0]))
    vy, vx = best_rate_climb(af, mass, air), best_angle_climb(af, mass, air)
    floor = DEFAULT_STALL_MARGIN * af.stall_speed(mass, air.density)
    grid = floor[:, None] * np.linspace(1.0, 3.0, 4001)[None, :]
    rates = climb_rate(af, mass, air_state(np.array([[0.0], [1500.0]])), grid)
    assert np.all(vy.rate >= rates.max(axis=1) - 1e-9)
    assert np.all(vx.gradient >= (rates / grid).max(axis=1) - 1e-12)
    np.testing.assert_allclose(vx.gradient, vx.rate / vx.tas, rtol=1e-15)


@pytest.mark.parametrize("name", DIAMETERS)
def test_best_angle_is_slower_than_best_rate(name, piston_disks):
    # Common practice, no source: Vx < Vy for a propeller aircraft. With thrust falling
    # with speed the free optima are ordered; at the 1.3 margin both may be held at it.
    af = piston_disks[name]
    air = air_state(np.array([0.0, 5000.0 * FT, 10000.0 * FT]))
    for mass in (af.max_takeoff_mass, af.empty_mass + af.payload):
        vx = best_angle_climb(af, mass, air, stall_margin=1.0)
        vy = best_rate_climb(af, mass, air, stall_margin=1.0)
        assert np.all(vx.tas < vy.tas)
        vx, vy = best_angle_climb(af, mass, air), best_rate_climb(af, mass, air)
        assert np.all(vx.tas <= vy.tas)
        assert np.all(vx.tas[~vy.stall_bound] < vy.tas[~vy.stall_bound])
        assert np.all(vx.gradient >= vy.gradient)


def test_constant_efficiency_best_angle_is_held_at_the_margin():
    # Thrust eta P / V grows without bound as V falls, so the best gradient is at the
    # slowest speed allowed (derived).
    af = cp.load_airframe("demo-trainer")
    air = air_state(np.array([0.0, 2000.0]))
    vx = best_angle_climb(af, af.max_takeoff_mass, air)
    assert np.all(vx.stall_bound)


def test_multirotor_has_no_best_angle():
    quad = cp.load_airframe("demo-mapping-quad")
    with pytest.raises(cp.CruiseplanError, match="climb vertically"):
        best_angle_climb(quad, quad.max_takeoff_mass, air_state(np.zeros(1)))


def test_ceilings_use_the_stall_margin(piston_disks):
    for af in (cp.load_airframe("demo-trainer"), piston_disks["demo-tourer"]):
        c = ceilings(af)
        free = ceilings(af, stall_margin=1.0)
        assert c.service < c.absolute
        assert c.absolute <= free.absolute and c.service <= free.service
        # At the ceilings the best rate above the margin is 0 and 100 ft/min (root to
        # 1e-9 relative in altitude, times dRate/dH ~1e-3 /s: ~1e-8 m/s).
        best = best_rate_climb(af, af.loading().mass, air_state(np.array([c.absolute,
                                                                          c.service])))
        np.testing.assert_allclose(best.rate, [0.0, 100 * FT / 60], atol=1e-8)


def test_planner_climb_speed_is_the_best_rate_speed(piston_disks):
    mission = replace(cp.load_mission("demo-cross-country"),
                      airframe=piston_disks["demo-tourer"], mass=None, store=None,
                      payload=None)
    af = mission.airframe
    load = af.loading()
    air = air_state(mission.profile.departure_elevation, mission.isa_dev)
    best = best_rate_climb(af, load.mass, air, stall_margin=mission.stall_margin)
    eas = climb_speed(mission)
    assert eas == pytest.approx(float(best.tas * np.sqrt(air.density / 1.225)), rel=1e-12)
    assert eas >= float(mission.stall_margin * af.stall_speed(load.mass, air.density)
                        * np.sqrt(air.density / 1.225)) * (1 - 1e-12)
