"""Drag polars and their classical identities, alone and inside the cruise engine."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

import cruiseplan as cp
from cruiseplan.kinds import FixedWing
from cruiseplan.physics import aerodynamics as aero
from cruiseplan.physics.propulsion import PistonPropeller, PropellerEfficiency
from cruiseplan.planning.performance import Limit, cruise_points
from cruiseplan.planning.performance import speed_for_min_power as engine_min_power_speed

G0 = 9.80665
MPH = 0.44704  # statute mile per hour [m/s], exact

POLARS = [(0.025, 0.054), (0.036, 0.0436), (0.018, 0.03), (0.06, 0.08)]


def _maximise(f, lo, hi):
    res = minimize_scalar(lambda x: -f(x), bounds=(lo, hi), method="bounded",
                          options={"xatol": 1e-12})
    return res.x, -res.fun


@pytest.mark.parametrize("cd0, k", POLARS)
def test_max_lift_to_drag_is_the_maximum_of_cl_over_cd(cd0, k):
    # Source: Anderson, Aircraft Performance and Design, ch. 5, sec. 5.4:
    # (L/D)max = 1 / (2 sqrt(k CD0)) at CL = sqrt(CD0 / k). Checked by maximising CL/CD of
    # the ParabolicPolar numerically (a second method, not the closed form again).
    polar = aero.ParabolicPolar(cd0, k)
    cl_best, ld_best = _maximise(lambda cl: cl / float(polar.drag_coefficient(cl)), 0.01, 3.0)
    # The value at a flat maximum is exact to rounding (measured 2.2e-16).
    assert float(aero.max_lift_to_drag(cd0, k)) == pytest.approx(ld_best, rel=1e-13)
    # The argmax of a flat maximum is good to ~sqrt(eps) only (measured 2.2e-8).
    assert float(aero.min_drag_lift_coefficient(cd0, k)) == pytest.approx(cl_best, rel=2e-7)
    # Analytic derivative of CL/CD, (CD - CL dCD/dCL) / CD^2, vanishes there exactly.
    cl = float(aero.min_drag_lift_coefficient(cd0, k))
    assert float(polar.drag_coefficient(cl)) - cl * 2 * k * cl == pytest.approx(0.0, abs=1e-15)
    # At (L/D)max the induced drag equals the parasite drag, CD = 2 CD0.
    assert float(polar.drag_coefficient(cl)) == pytest.approx(2 * cd0, rel=1e-14)


@pytest.mark.parametrize("cd0, k", POLARS)
def test_max_endurance_parameter_is_the_maximum_of_cl15_over_cd(cd0, k):
    # Source: Anderson, Aircraft Performance and Design, ch. 5, sec. 5.4:
    # (CL^1.5/CD)max = (1/4) (3 / (k CD0^(1/3)))^(3/4) at CL = sqrt(3 CD0 / k), CD = 4 CD0.
    polar = aero.ParabolicPolar(cd0, k)
    _, best = _maximise(lambda cl: cl**1.5 / float(polar.drag_coefficient(cl)), 0.01, 4.0)
    # Value at a flat maximum: exact to rounding (measured 2.2e-16).
    assert float(aero.max_endurance_parameter(cd0, k)) == pytest.approx(best, rel=1e-13)
    cl = float(aero.min_power_lift_coefficient(cd0, k))
    assert float(polar.drag_coefficient(cl)) == pytest.approx(4 * cd0, rel=1e-14)
    assert cl**1.5 / (4 * cd0) == pytest.approx(float(aero.max_endurance_parameter(cd0, k)),
                                                rel=1e-12)


@pytest.mark.parametrize("cd0, k", POLARS)
@pytest.mark.parametrize("mass, rho, S", [(760.0, 1.225, 11.2), (14.0, 1.0, 0.95),
                                          (1338.1, 0.7, 16.2)])
def test_min_drag_and_min_power_speeds(cd0, k, mass, rho, S):
    # Source: Anderson, Aircraft Performance and Design, ch. 5, sec. 5.4:
    # V_md at CL = sqrt(CD0/k); V_mp = 3^(-1/4) V_md.
    polar = aero.ParabolicPolar(cd0, k)
    W = mass * G0

    def drag(v):
        qs = 0.5 * rho * v * v * S  # dynamic pressure x wing area [N]
        return qs * float(polar.drag_coefficient(W / qs))

    v_md = float(aero.min_drag_speed(mass, rho, S, cd0, k))
    v_mp = float(aero.min_power_speed(mass, rho, S, cd0, k))
    assert v_mp == pytest.approx(3 ** -0.25 * v_md, rel=1e-12)
    # Numerical minima of drag and of power D V (a second method; the argmin of a flat
    # minimum is good to ~sqrt(eps): measured 3.0e-10 for V_md and 1.2e-8 for V_mp).
    v_num, _ = _maximise(lambda v: -drag(v), 0.2 * v_md, 3 * v_md)
    assert v_md == pytest.approx(v_num, rel=3e-9)
    v_num, _ = _maximise(lambda v: -drag(v) * v, 0.2 * v_md, 3 * v_md)
    assert v_mp == pytest.approx(v_num, rel=1e-7)
    # Drag at V_md is W / (L/D)max; at V_mp induced drag is 3 x parasite drag.
    assert drag(v_md) == pytest.approx(W / float(aero.max_lift_to_drag(cd0, k)), rel=1e-12)
    q = 0.5 * rho * v_mp**2
    assert k * (W / (q * S)) ** 2 == pytest.approx(3 * cd0, rel=1e-12)


def test_induced_drag_factor():
    # Source: Anderson, Aircraft Performance and Design, eq. 2.47: k = 1 / (pi e AR),
    # evaluated by hand and printed to 6 decimals (tolerance: half a unit of the 6th):
    # e 0.8, AR 8 -> 1 / (3.14159 x 6.4) = 0.049736;
    # e 0.8, AR 35.8^2 / 174 = 7.36575 (Anderson's CP-1, Introduction to Flight, ch. 6)
    # -> 1 / (3.14159 x 5.89260) = 0.054019.
    assert float(aero.induced_drag_factor(0.8, 8.0)) == pytest.approx(0.049736, abs=5e-7)
    assert float(aero.induced_drag_factor(0.8, 35.8**2 / 174)) == pytest.approx(0.054019,
                                                                               abs=5e-7)


def test_airframe_file_k_comes_from_oswald_e_and_span(trainer):
    # demo-trainer: span 9.6 m, area 11.2 m^2, e = 0.76. By hand: AR = 92.16 / 11.2
    # = 8.228571 (exact ratio 288/35); k = 1 / (pi e AR) = 1 / (3.14159 x 6.253714)
    # = 0.0508993 (Anderson, eq. 2.47). Printed to 7 digits: half a unit of the last.
    assert trainer.aspect_ratio == pytest.approx(288 / 35, rel=1e-15)
    assert trainer.polar.k == pytest.approx(0.0508993, abs=5e-8)


def test_lift_coefficient():
    # Level flight, lift = weight: CL = 2 m g / (rho V^2 S) (Anderson, eq. 5.2), by hand:
    # 2 x 760 x 9.80665 / (1.225 x 2500 x 11.2) = 14906.108 / 34300 = 0.4345804
    # (printed to 7 digits: half a unit of the last).
    cl = float(aero.lift_coefficient(760.0, 1.225, 50.0, 11.2))
    assert cl == pytest.approx(0.4345804, abs=5e-8)
    # Lift = weight: CL q S gives back m g to rounding.
    assert cl * 0.5 * 1.225 * 50.0**2 * 11.2 == pytest.approx(760.0 * G0, rel=1e-15)
    # A load factor n asks n times the lift (any flight-mechanics text: L = n W), exactly.
    assert float(aero.lift_coefficient(760.0, 1.225, 50.0, 11.2, load_factor=2.0)) == \
        pytest.approx(2 * cl, rel=1e-15)


def test_cambered_parabolic_polar():
    polar = aero.ParabolicPolar(0.03, 0.05, cl_min_drag=0.2)
    # CD = CD0 + k (CL - CL_min_drag)^2: minimum CD0 at CL 0.2; at 0.7, 0.03 + 0.05 x 0.5^2
    # = 0.0425, and the same at 0.2 - 0.5 = -0.3 (symmetric about CL_min_drag).
    assert float(polar.drag_coefficient(0.2)) == pytest.approx(0.03, rel=1e-15)
    assert float(polar.drag_coefficient(0.7)) == pytest.approx(0.0425, rel=1e-14)
    assert float(polar.drag_coefficient(-0.3)) == pytest.approx(0.0425, rel=1e-14)


# --- tabulated polar -----------------------------------------------------------------------------

TAB_CL = (0.1, 0.3, 0.6, 0.9, 1.2)
TAB_CD = (0.032, 0.034, 0.045, 0.066, 0.1)


def test_tabulated_polar_exact_at_points_linear_between():
    polar = aero.TabulatedPolar(TAB_CL, TAB_CD)
    np.testing.assert_array_equal(polar.drag_coefficient(np.array(TAB_CL)), np.array(TAB_CD))
    # Halfway between 0.3 and 0.6: halfway between 0.034 and 0.045, 0.0395.
    assert float(polar.drag_coefficient(0.45)) == pytest.approx(0.0395, rel=1e-14)
    assert not polar.outside(np.array(TAB_CL)).any()
    np.testing.assert_array_equal(polar.outside(np.array([0.05, 0.1, 1.2, 1.25])),
                                  [True, False, False, True])
    assert polar.reference_cd0() == 0.032


def test_tabulated_polar_points_outside_are_flagged_in_cruise(trainer):
    polar = aero.TabulatedPolar(TAB_CL, TAB_CD)
    af = FixedWing(**{**trainer.__dict__, "polar": polar})
    air = cp.air_state(np.array([0.0])).column()
    # CL = m g / (0.5 rho V^2 S): 760 kg at sea level, CL from 1.76 (30 m/s) to 0.07 (85 m/s).
    tas = np.array([[30.0, 40.0, 60.0, 85.0]])
    pts = cruise_points(af, 760.0, air, tas, 50.0)
    outside = (pts.cl < 0.1) | (pts.cl > 1.2)
    assert outside.any() and (~outside).any()
    flagged = (pts.limits & Limit.POLAR_RANGE) != 0
    np.testing.assert_array_equal(flagged, outside)
    # Extrapolated values stay finite (what the point would take), with the reason.
    assert np.all(np.isfinite(pts.drag))


# --- the identities inside the cruise engine -----------------------------------------------------

def _constant_eta_airframe(trainer, cd0=0.036, k=0.05, eta=0.8):
    return FixedWing(**{**trainer.__dict__, "polar": aero.ParabolicPolar(cd0, k),
                       "propulsion": PistonPropeller(
                           rated_power=200e3, bsfc=7.6e-8,
                           propeller=PropellerEfficiency((0.0,), (eta,)), fuel="avgas",
                           fuel_density=720.0, fuel_capacity=0.1, power_lapse="none")})


@pytest.mark.parametrize("H, dev", [(0.0, 0.0), (2500.0, 15.0), (4000.0, -10.0)])
def test_cruise_engine_optimum_speeds_match_closed_forms(trainer, H, dev):
    # Anderson, Aircraft Performance and Design, ch. 5: with constant propeller efficiency
    # minimum drag (best range: max TAS per fuel flow) is at V_md, where L/D is maximal, and
    # minimum shaft power (best endurance) at V_mp.
    af = _constant_eta_airframe(trainer)
    mass, cd0, k = 700.0, af.polar.cd0, af.polar.k
    air = cp.air_state(H, dev)

    # The polar's V_mp lies below the stall speed here (CL above CLmax), where the
    # endurance is NaN by default: the closed form is checked on the polar's own figures.
    def point(v):
        return cruise_points(af, mass, air, np.array(v), 50.0, keep_unflyable=True)

    v_md = float(aero.min_drag_speed(mass, air.density, af.wing_area, cd0, k))
    v_mp = float(aero.min_power_speed(mass, air.density, af.wing_area, cd0, k))
    # Argmax of a flat optimum by scipy's bounded search: measured at most 1.4e-8.
    v, _ = _maximise(lambda v: -float(point(v).drag), 10.0, 150.0)
    assert v == pytest.approx(v_md, rel=1e-7)
    v, _ = _maximise(lambda v: float(point(v).specific_range_air), 10.0, 150.0)
    assert v == pytest.approx(v_md, rel=1e-7)
    v, _ = _maximise(lambda v: float(point(v).endurance), 10.0, 150.0)
    assert v == pytest.approx(v_mp, rel=1e-7)
    assert float(point(v_md).lift_to_drag) == pytest.approx(
        float(aero.max_lift_to_drag(cd0, k)), rel=1e-12)
    assert float(point(v_md).drag) == pytest.approx(
        mass * G0 / float(aero.max_lift_to_drag(cd0, k)), rel=1e-12)
    # The engine's own vectorised search for minimum power agrees with the closed form
    # (Brent's method on a flat minimum: measured at most 3.7e-9).
    assert float(engine_min_power_speed(af, mass, air)) == pytest.approx(v_mp, rel=4e-8)


def test_parasite_dominated_drag_falls_with_speed_squared(trainer):
    # Common practice, no source: slowing about 10 % saves nearly 20 % of drag and of
    # fuel per distance when parasite drag dominates; (55/60)^2 = 0.840 (16 % less).
    # Tolerance: the k = 1e-5 left in the polar moves the ratio by 2.7e-4 (measured).
    af = _constant_eta_airframe(trainer, cd0=0.03, k=1e-5)
    air = cp.air_state(np.array([0.0])).column()
    # 55 mph is below this wing's stall speed (CL 1.66 > CLmax 1.45), where the figures
    # are NaN by default: the drag law is checked on the polar's own figures.
    pts = cruise_points(af, 700.0, air, np.array([[60.0, 55.0]]) * MPH, 50.0,
                        keep_unflyable=True)
    drag_ratio = float(pts.drag[0, 1] / pts.drag[0, 0])
    assert drag_ratio == pytest.approx((55 / 60) ** 2, rel=1e-3)
    fuel_per_distance = 1.0 / pts.specific_range_air
    assert float(fuel_per_distance[0, 1] / fuel_per_distance[0, 0]) == \
        pytest.approx((55 / 60) ** 2, rel=1e-3)


def test_speeds_at_thrust_power_meet_the_drag_power():
    # D V = a V^3 + b / V for a symmetric parabolic polar; both roots of the quartic must
    # give back the thrust power, and below the least drag power there is no speed.
    mass, rho, area, cd0, k = 740.0, np.array([1.225, 1.0, 0.8]), 11.2, 0.032, 0.05
    a = 0.5 * rho * area * cd0
    b = 2 * k * (mass * 9.80665) ** 2 / (rho * area)
    power = np.array([45e3, 40e3, 35e3])
    slow, fast = aero.speeds_at_thrust_power(mass, rho, area, cd0, k, power)
    for v in (slow, fast):
        assert np.allclose(a * v**3 + b / v, power, rtol=1e-13, atol=0)
    assert np.all(slow < aero.min_power_speed(mass, rho, area, cd0, k)) and np.all(fast > slow)
    least = (a * (v := aero.min_power_speed(mass, rho, area, cd0, k)) ** 3 + b / v)
    none = aero.speeds_at_thrust_power(mass, rho, area, cd0, k, 0.99 * least)
    assert np.all(np.isnan(none[0])) and np.all(np.isnan(none[1]))


def test_speeds_at_drag_meet_the_drag():
    mass, rho, area, cd0, k = 740.0, 1.1, 11.2, 0.032, 0.05
    d_min = 2 * mass * 9.80665 * np.sqrt(k * cd0)     # Anderson eq. 5.31 (common form)
    slow, fast = aero.speeds_at_drag(mass, rho, area, cd0, k, d_min / 0.99)
    for v in (slow, fast):
        drag = 0.5 * rho * v**2 * area * cd0 + 2 * k * (mass * 9.80665) ** 2 / (rho * v**2 * area)
        assert drag == pytest.approx(d_min / 0.99, rel=1e-13)
    v_md = aero.min_drag_speed(mass, rho, area, cd0, k)
    assert slow < v_md < fast
    # Only the fast root asked for: the same fast root, no slow one.
    none, alone = aero.speeds_at_drag(mass, rho, area, cd0, k, d_min / 0.99, slow=False)
    assert none is None and alone == fast


def test_level_drag_terms_give_the_drag_and_the_same_speeds_when_passed_in():
    # D = a V^2 + b / V^2 with lift = weight (Anderson, Aircraft Performance and Design,
    # sec. 5.3): the drag of CL = 2 W / (rho V^2 S) on the parabola CD0 + k CL^2.
    mass, rho, area, cd0, k = 740.0, np.array([1.225, 0.9]), 11.2, 0.032, 0.05
    v = np.array([45.0, 60.0])
    a, b = aero.level_drag_terms(mass, rho, area, cd0, k)
    cl = 2 * mass * 9.80665 / (rho * v**2 * area)
    np.testing.assert_allclose(a * v**2 + b / v**2, 0.5 * rho * v**2 * area * (cd0 + k * cl**2),
                               rtol=1e-13)
    power = np.array([45e3, 40e3])
    for with_terms, alone in ((aero.speeds_at_thrust_power(mass, rho, area, cd0, k, power,
                                                           terms=(a, b)),
                               aero.speeds_at_thrust_power(mass, rho, area, cd0, k, power)),
                              (aero.speeds_at_drag(mass, rho, area, cd0, k, 1500.0,
                                                   terms=(a, b)),
                               aero.speeds_at_drag(mass, rho, area, cd0, k, 1500.0))):
        for x, y in zip(with_terms, alone):
            np.testing.assert_array_equal(x, y)
