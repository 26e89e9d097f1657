"""Drag polars and their classical identities, alone and inside the cruise engine."""

from __future__ import annotations

import math

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
    # Source: Anderson, Aircraft Performance and Design, ch. 5 (REFERENCES.md sec. 4):
    # (L/D)max = 1 / (2 sqrt(k CD0)) at CL = sqrt(CD0 / k). Checked by maximising CL/CD of
    # the ParabolicPolar numerically.
    polar = aero.ParabolicPolar(cd0, k)
    cl_best, ld_best = _maximise(lambda cl: cl / float(polar.drag_coefficient(cl)), 0.01, 3.0)
    assert float(aero.max_lift_to_drag(cd0, k)) == pytest.approx(ld_best, rel=1e-9)
    assert float(aero.max_lift_to_drag(cd0, k)) == pytest.approx(1 / (2 * math.sqrt(k * cd0)),
                                                                 rel=1e-14)
    # The optimum CL is flat-topped, so the numerical argmax is only good to ~1e-6.
    assert float(aero.min_drag_lift_coefficient(cd0, k)) == pytest.approx(cl_best, rel=1e-5)
    # Analytic derivative of CL/CD, (CD - CL dCD/dCL) / CD^2, vanishes there exactly.
    cl = float(aero.min_drag_lift_coefficient(cd0, k))
    assert float(polar.drag_coefficient(cl)) - cl * 2 * k * cl == pytest.approx(0.0, abs=1e-15)
    # At (L/D)max the induced drag equals the parasite drag, CD = 2 CD0.
    assert float(polar.drag_coefficient(cl)) == pytest.approx(2 * cd0, rel=1e-14)


@pytest.mark.parametrize("cd0, k", POLARS)
def test_max_endurance_parameter_is_the_maximum_of_cl15_over_cd(cd0, k):
    # Source: Anderson, Aircraft Performance and Design, ch. 5 (REFERENCES.md sec. 4):
    # (CL^1.5/CD)max = (1/4) (3 / (k CD0^(1/3)))^(3/4) at CL = sqrt(3 CD0 / k), CD = 4 CD0.
    polar = aero.ParabolicPolar(cd0, k)
    _, best = _maximise(lambda cl: cl**1.5 / float(polar.drag_coefficient(cl)), 0.01, 4.0)
    assert float(aero.max_endurance_parameter(cd0, k)) == pytest.approx(best, rel=1e-9)
    cl = float(aero.min_power_lift_coefficient(cd0, k))
    assert float(polar.drag_coefficient(cl)) == pytest.approx(4 * cd0, rel=1e-14)
    assert cl**1.5 / (4 * cd0) == pytest.approx(float(aero.max_endurance_parameter(cd0, k)),
                                                rel=1e-12)


@pytest.mark.parametrize("cd0, k", POLARS)
@pytest.mark.parametrize("mass, rho, S", [(760.0, 1.225, 11.2), (14.0, 1.0, 0.95),
                                          (1338.1, 0.7, 16.2)])
def test_min_drag_and_min_power_speeds(cd0, k, mass, rho, S):
    # Source: Anderson, Aircraft Performance and Design, ch. 5 (REFERENCES.md sec. 4):
    # V_md at CL = sqrt(CD0/k); V_mp = 3^(-1/4) V_md.
    polar = aero.ParabolicPolar(cd0, k)
    W = mass * G0

    def drag(v):
        qs = 0.5 * rho * v * v * S  # dynamic pressure x wing area [N]
        return qs * float(polar.drag_coefficient(W / qs))

    v_md = float(aero.min_drag_speed(mass, rho, S, cd0, k))
    v_mp = float(aero.min_power_speed(mass, rho, S, cd0, k))
    assert v_mp == pytest.approx(3 ** -0.25 * v_md, rel=1e-12)
    assert v_md == pytest.approx(math.sqrt(2 * W / (rho * S)) * (k / cd0) ** 0.25, rel=1e-12)
    # Numerical minima of drag and of power D V.
    v_num, _ = _maximise(lambda v: -drag(v), 0.2 * v_md, 3 * v_md)
    assert v_md == pytest.approx(v_num, rel=1e-5)
    v_num, _ = _maximise(lambda v: -drag(v) * v, 0.2 * v_md, 3 * v_md)
    assert v_mp == pytest.approx(v_num, rel=1e-5)
    # Drag at V_md is W / (L/D)max; at V_mp induced drag is 3 x parasite drag.
    assert drag(v_md) == pytest.approx(W / float(aero.max_lift_to_drag(cd0, k)), rel=1e-12)
    q = 0.5 * rho * v_mp**2
    assert k * (W / (q * S)) ** 2 == pytest.approx(3 * cd0, rel=1e-12)


def test_induced_drag_factor():
    # Source: Anderson, Aircraft Performance and Design, eq. 2.47: k = 1 / (pi e AR).
    assert float(aero.induced_drag_factor(0.8, 7.3659)) == pytest.approx(
        1.0 / (math.pi * 0.8 * 7.3659), rel=1e-15)
    # Worked: e 0.8, AR 8 -> 1 / (3.14159 x 6.4) = 0.049736.
    assert float(aero.induced_drag_factor(0.8, 8.0)) == pytest.approx(0.049736, abs=1e-6)


def test_airframe_file_k_comes_from_oswald_e_and_span(trainer):
    # demo-trainer: span 9.6 m, area 11.2 m^2, e = 0.76 -> AR = 8.2286, k = 1/(pi e AR).
    ar = 9.6**2 / 11.2
    assert trainer.aspect_ratio == pytest.approx(ar, rel=1e-14)
    assert trainer.polar.k == pytest.approx(1.0 / (math.pi * 0.76 * ar), rel=1e-14)


def test_lift_coefficient():
    # Level flight, lift = weight: CL = 2 m g / (rho V^2 S) (Anderson, eq. 5.2).
    assert float(aero.lift_coefficient(760.0, 1.225, 50.0, 11.2)) == pytest.approx(
        2 * 760.0 * G0 / (1.225 * 2500.0 * 11.2), rel=1e-15)
    assert float(aero.lift_coefficient(760.0, 1.225, 50.0, 11.2, load_factor=2.0)) == \
        pytest.approx(2 * 2 * 760.0 * G0 / (1.225 * 2500.0 * 11.2), rel=1e-15)


def test_cambered_parabolic_polar():
    polar = aero.ParabolicPolar(0.03, 0.05, cl_min_drag=0.2)
    assert float(polar.drag_coefficient(0.2)) == pytest.approx(0.03, rel=1e-15)
    assert float(polar.drag_coefficient(0.7)) == pytest.approx(0.03 + 0.05 * 0.25, rel=1e-15)


# --- tabulated polar -----------------------------------------------------------------------------

TAB_CL = (0.1, 0.3, 0.6, 0.9, 1.2)
TAB_CD = (0.032, 0.034, 0.045, 0.066, 0.1)


def test_tabulated_polar_exact_at_points_linear_between():
    polar = aero.TabulatedPolar(TAB_CL, TAB_CD)
    np.testing.assert_array_equal(polar.drag_coefficient(np.array(TAB_CL)), np.array(TAB_CD))
    assert float(polar.drag_coefficient(0.45)) == pytest.approx(0.5 * (0.034 + 0.045),
                                                                rel=1e-14)
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

    def point(v):
        return cruise_points(af, mass, air, np.array(v), 50.0)

    v_md = float(aero.min_drag_speed(mass, air.density, af.wing_area, cd0, k))
    v_mp = float(aero.min_power_speed(mass, air.density, af.wing_area, cd0, k))
    v, _ = _maximise(lambda v: -float(point(v).drag), 10.0, 150.0)
    assert v == pytest.approx(v_md, rel=1e-5)
    v, _ = _maximise(lambda v: float(point(v).specific_range_air), 10.0, 150.0)
    assert v == pytest.approx(v_md, rel=1e-5)
    v, _ = _maximise(lambda v: float(point(v).endurance), 10.0, 150.0)
    assert v == pytest.approx(v_mp, rel=1e-5)
    assert float(point(v_md).lift_to_drag) == pytest.approx(
        float(aero.max_lift_to_drag(cd0, k)), rel=1e-12)
    assert float(point(v_md).drag) == pytest.approx(
        mass * G0 / float(aero.max_lift_to_drag(cd0, k)), rel=1e-12)
    # The engine's own vectorised search for minimum power agrees with the closed form.
    assert float(engine_min_power_speed(af, mass, air)) == pytest.approx(v_mp, rel=1e-6)


def test_parasite_dominated_drag_falls_with_speed_squared(trainer):
    # Common practice, no source: slowing about 10 % saves nearly 20 % of drag and of
    # fuel per distance when parasite drag dominates; (55/60)^2 = 0.840 (16 % less).
    af = _constant_eta_airframe(trainer, cd0=0.03, k=1e-5)
    air = cp.air_state(np.array([0.0])).column()
    pts = cruise_points(af, 700.0, air, np.array([[60.0, 55.0]]) * MPH, 50.0)
    drag_ratio = float(pts.drag[0, 1] / pts.drag[0, 0])
    assert drag_ratio == pytest.approx((55 / 60) ** 2, rel=0.01)
    fuel_per_distance = 1.0 / pts.specific_range_air
    assert float(fuel_per_distance[0, 1] / fuel_per_distance[0, 0]) == \
        pytest.approx((55 / 60) ** 2, rel=0.01)
