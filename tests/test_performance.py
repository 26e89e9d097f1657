"""Cruise grids and power-setting tables: shapes, limits, flows, Peukert, Quantities."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.optimize import minimize_scalar

import cruiseplan as cp
from cruiseplan.physics import aerodynamics as aero
from cruiseplan.physics.propulsion import ElectricPropeller, PropellerEfficiency
from cruiseplan.planning.performance import Limit, cruise_points
from cruiseplan.planning.performance import speed_for_min_power as engine_min_power_speed
from cruiseplan.units import registry

G0 = 9.80665
FT = 0.3048
KT = 1852.0 / 3600.0

ARRAY_FIELDS = ("cl", "cd", "lift_to_drag", "drag", "thrust_power", "shaft_power",
                "source_power", "power_available", "power_margin", "store_rate",
                "ground_speed", "specific_range_air", "specific_range_ground", "endurance",
                "range_air", "range_ground", "stall_speed_ratio")


def _gagg_ferrar(sigma):
    # Gagg and Ferrar's empirical piston power lapse, P/P0 = 1.132 sigma - 0.132, from
    # memory (widely quoted; the law is published as this formula, so the formula is the
    # check value).
    return 1.132 * np.asarray(sigma) - 0.132


# --- grids: shapes, NaN only with a reason, limits ------------------------------------------------

def test_cruise_grid_shapes(trainer):
    h = np.array([0.0, 1000.0, 2000.0])
    v = np.array([30.0, 40.0, 50.0, 60.0, 70.0])
    pts = cp.cruise_grid(trainer, h, v)
    assert pts.shape == (3, 5)
    for name in ARRAY_FIELDS + ("limits", "fuel_volume_flow"):
        assert np.shape(getattr(pts, name)) == (3, 5), name
    assert np.broadcast_shapes(np.shape(pts.tas), pts.shape) == (3, 5)
    assert pts.cas().shape == (3, 5) and pts.mach().shape == (3, 5)
    assert pts.reasons.shape == (3, 5)


def _assert_nan_only_with_reason(pts):
    reasons = np.broadcast_to(pts.limits, pts.shape) != 0
    for name in ARRAY_FIELDS + ("tas",):
        values = np.broadcast_to(getattr(pts, name), pts.shape)
        bad = np.isnan(values) & ~reasons
        assert not bad.any(), f"{name} is NaN without a reason at {np.argwhere(bad).tolist()}"


def test_cruise_grid_nan_only_with_a_reason(trainer):
    # Stall at low speed, Mach and power limits at high speed, a row outside the model.
    h = np.array([-6000.0, 0.0, 3000.0, 12000.0, 100000.0])
    v = np.array([15.0, 30.0, 45.0, 60.0, 90.0, 250.0])
    pts = cp.cruise_grid(trainer, h, v)
    _assert_nan_only_with_reason(pts)
    assert (pts.limits != 0).any() and (pts.limits == 0).any()


def test_out_of_atmosphere_rows(trainer):
    h = np.array([0.0, 100000.0, -6000.0])
    pts = cp.cruise_grid(trainer, h, np.array([40.0, 50.0]))
    for row in (1, 2):
        np.testing.assert_array_equal(pts.limits[row], [Limit.ATMOSPHERE] * 2)
        for name in ARRAY_FIELDS:
            assert np.isnan(np.broadcast_to(getattr(pts, name), pts.shape)[row]).all(), name
    assert np.isfinite(pts.shaft_power[0]).all()


def test_out_of_atmosphere_rows_keep_their_altitude(trainer):
    # A row must not be labelled with an altitude other than the one asked for: the air
    # state of a 100 km row must not claim 80000 m (nor -5000 m for -6000 m), or a table
    # built from the points prints a wrong altitude beside the ATMOSPHERE flag.
    pts = cp.cruise_grid(trainer, np.array([0.0, 100000.0, -6000.0]), np.array([40.0, 50.0]))
    pa = np.broadcast_to(pts.air.pressure_altitude, pts.shape)[:, 0]
    np.testing.assert_array_equal(pa, [0.0, 100000.0, -6000.0])


def test_power_setting_table_refuses_out_of_atmosphere(trainer):
    with pytest.raises(cp.AtmosphereRangeError, match=r"altitude 100000 m .*-5000 to 80000 m"):
        cp.power_setting_table(trainer, [0.0, 100000.0], [0.6])


@pytest.mark.parametrize("stall_margin", [1.3, 1.2])
def test_stall_flag_exactly_where_cl_exceeds_the_margin(trainer, stall_margin):
    # Common practice, no source: cruise at or above 1.3 x stall speed, i.e.
    # CL <= CLmax / 1.3^2.
    h = np.array([0.0, 2000.0, 4000.0])
    v = np.linspace(20.0, 60.0, 41)
    pts = cp.cruise_grid(trainer, h, v, mass=700.0, stall_margin=stall_margin)
    rho = cp.air_state(h).density[:, None]
    # Level flight: lift CL q S equals the weight (rounding only, measured 2.2e-16).
    lift = pts.cl * 0.5 * rho * v[None, :] ** 2 * trainer.wing_area
    np.testing.assert_allclose(lift, 700.0 * G0, rtol=1e-14)
    cl = pts.cl
    expected = cl > trainer.cl_max / stall_margin**2
    assert expected.any() and (~expected).any()
    np.testing.assert_array_equal((pts.limits & Limit.STALL) != 0, expected)
    np.testing.assert_allclose(pts.stall_speed_ratio, np.sqrt(trainer.cl_max / cl), rtol=1e-13)


def test_power_flag_exactly_where_required_exceeds_available(trainer):
    h = np.array([0.0, 2000.0, 4000.0, 6000.0])
    v = np.linspace(40.0, 80.0, 41)
    pts = cp.cruise_grid(trainer, h, v, mass=740.0)
    air = cp.air_state(h)
    # Full throttle by Gagg-Ferrar (from memory, see _gagg_ferrar); rounding only.
    available = trainer.propulsion.rated_power * _gagg_ferrar(air.sigma)[:, None]
    np.testing.assert_allclose(np.broadcast_to(pts.power_available, pts.shape),
                               np.broadcast_to(available, pts.shape), rtol=1e-13)
    # Level flight, thrust = drag, lift = weight: D (L/D) = m g; thrust power D V; shaft
    # power thrust power over the file's constant propeller efficiency, 0.72 in
    # airframes/demo-trainer.toml (identities, rounding only: measured 2.2e-16).
    np.testing.assert_allclose(pts.drag * pts.lift_to_drag, 740.0 * G0, rtol=1e-14)
    np.testing.assert_allclose(pts.thrust_power, pts.drag * v[None, :], rtol=1e-14)
    np.testing.assert_allclose(pts.shaft_power, pts.thrust_power / 0.72, rtol=1e-14)
    shaft = pts.shaft_power
    expected = shaft > available
    assert expected.any() and (~expected).any()
    np.testing.assert_array_equal((pts.limits & Limit.POWER) != 0, expected)
    np.testing.assert_allclose(pts.power_margin, available - shaft, rtol=1e-12, atol=1e-6)


def test_other_limits(trainer):
    # Gagg-Ferrar is quoted for sigma 0.25 to 1.2 (from memory):
    # 13 km has sigma 0.217. Mach 0.6 bounds the incompressible polar. A headwind above
    # TAS leaves no ground speed.
    pts = cp.cruise_grid(trainer, [0.0, 13000.0], [60.0, 220.0], headwind=[0.0, 70.0])
    assert not pts.limits[0, 0] & Limit.LAPSE_RANGE
    assert pts.limits[1, 0] & Limit.LAPSE_RANGE
    assert pts.limits[0, 1] & Limit.MACH  # 220 m/s = Mach 0.65 at sea level
    assert pts.limits[1, 0] & Limit.WIND
    assert not pts.limits[1, 1] & Limit.WIND
    assert pts.ground_speed[1, 0] == -10.0   # 60 - 70, exact
    assert cp.explain(int(Limit.STALL | Limit.POWER), short=True) == "STALL+POWER"
    assert cp.explain(0) == "ok"


# --- flows, range, endurance ---------------------------------------------------------------------

def test_fuel_flow_is_bsfc_times_shaft_power(trainer):
    pts = cp.cruise_grid(trainer, [0.0, 1500.0], [45.0, 55.0, 65.0])
    prop = trainer.propulsion
    # The file's 0.46 lb/(hp h), converted here without pint from the exact definitions of
    # the pound and the mechanical horsepower: 0.46 x 0.45359237 kg / (745.69987 W x 3600 s)
    # = 7.7724e-8 kg/J, at every point (rounding only, measured 2.2e-16).
    lb, hp = 0.45359237, 550 * FT * 0.45359237 * G0
    # 65 m/s needs more than full throttle: no fuel flow there (NaN with the POWER bit).
    ok = pts.limits & Limit.POWER == 0
    assert ok.sum() == 4 and np.all(np.isnan(pts.store_rate[~ok]))
    np.testing.assert_allclose((pts.store_rate / pts.shaft_power)[ok],
                               0.46 * lb / (hp * 3600.0), rtol=1e-14)
    # Avgas 0.72 kg/L, about 6.0 lb/US gal (common practice, no source; the demo file
    # keeps the default).
    np.testing.assert_allclose(pts.fuel_volume_flow * 720.0, pts.store_rate, rtol=1e-15)
    # By hand: 0.46 lb/(hp h) at 60 hp is 27.6 lb/h.
    flow = float(prop.store_rate(60 * hp)) * 3600
    assert flow == pytest.approx(27.6 * lb, rel=1e-14)


def test_tabulated_propeller_efficiency(tourer):
    # At the table's points the efficiency is the table's; between them the monotone cubic
    # (Fritsch & Carlson, SIAM J. Numer. Anal. 17(2), 1980) matches scipy's PCHIP (a
    # second implementation) and stays within its neighbours. Rounding only (measured
    # 1.1e-16 at most).
    from scipy.interpolate import PchipInterpolator

    v = np.array([50.0, 80.0, 110.0, 125.0, 140.0, 200.0]) * KT
    pts = cp.cruise_grid(tourer, [0.0], v)
    eta = pts.thrust_power[0] / pts.shaft_power[0]
    np.testing.assert_allclose(eta[:3], [0.62, 0.76, 0.82], atol=1e-14)
    table_v = np.array([50.0, 80.0, 110.0, 140.0, 170.0]) * KT
    pchip = PchipInterpolator(table_v, [0.62, 0.76, 0.82, 0.83, 0.80])
    assert eta[3] == pytest.approx(float(pchip(125 * KT)), abs=1e-14)
    assert 0.82 < eta[3] < 0.83
    assert eta[5] == pytest.approx(0.80, abs=1e-12)  # beyond the table the end value holds


def test_headwind_per_altitude(trainer):
    pts = cp.cruise_grid(trainer, [0.0, 1000.0], [50.0, 60.0], headwind=[5.0, -5.0])
    # GS = TAS - headwind, exact in floating point for these values.
    np.testing.assert_array_equal(pts.ground_speed, [[45.0, 55.0], [55.0, 65.0]])
    np.testing.assert_allclose(pts.range_ground, pts.ground_speed * pts.endurance,
                               rtol=1e-15)
    # The wind moves the ground range only: air range and endurance are those of calm air.
    calm = cp.cruise_grid(trainer, [0.0, 1000.0], [50.0, 60.0])
    np.testing.assert_array_equal(pts.range_air, calm.range_air)
    np.testing.assert_array_equal(pts.endurance, calm.endurance)
    with pytest.raises(ValueError, match=r"headwind must be a scalar or one value per altitude"):
        cp.cruise_grid(trainer, [0.0, 1000.0], [50.0], headwind=[1.0, 2.0, 3.0])


def _ideal_drone(drone, n=1.0):
    return dataclasses.replace(drone, propulsion=dataclasses.replace(drone.propulsion,
                                                                     peukert_exponent=n))


def test_electric_endurance_without_peukert_is_energy_over_power(drone):
    af = _ideal_drone(drone)
    prop = af.propulsion
    pts = cp.cruise_grid(af, [0.0, 300.0], [16.0, 20.0, 24.0])
    battery_power = pts.shaft_power / (0.85 * 0.95)
    np.testing.assert_allclose(pts.source_power, battery_power, rtol=1e-14)
    np.testing.assert_allclose(pts.endurance, 600 * 3600.0 / battery_power, rtol=1e-14)
    np.testing.assert_allclose(pts.range_air, pts.tas * pts.endurance, rtol=1e-14)
    assert pts.fuel_volume_flow is None
    # Electric motors keep their power with altitude.
    np.testing.assert_array_equal(pts.power_available, prop.max_power)
    # Battery-aircraft range R = E eta (L/D) / (m g) (Traub, J. Aircraft 48(2), 2011, with
    # Peukert exponent 1), eta = propeller x motor x controller efficiency; measured 2e-16.
    eta = 0.70 * 0.85 * 0.95
    np.testing.assert_allclose(pts.range_air, 600 * 3600.0 * eta * pts.lift_to_drag
                               / (pts.mass * G0), rtol=1e-12)


def test_peukert_reference_example():
    # Source: Peukert's law in Peukert's own form t = C / I^k (W. Peukert,
    # Elektrotechnische Zeitschrift 18, 1897); worked example C = 100 (A^k h), k = 1.2,
    # I = 5 A -> t = 100 / 5^1.2 = 100 / 6.8986 = 14.496 h, quoted as 14.5 h.
    # propulsion.py uses Hart's form t = Rt (C_rated / (I Rt))^n = C_rated^n Rt^(1-n) / I^n,
    # i.e. Peukert's constant C_p = C_rated^n Rt^(1-n). With Rt = 1 h: C_rated = 100^(1/1.2)
    # = 46.416 Ah. Pack at 12 V, all of it usable (fraction 1), battery current 5 A.
    n, volts, rt = 1.2, 12.0, 3600.0
    c_rated = 100.0 ** (1 / n)  # [Ah]
    prop = ElectricPropeller(
        battery_energy=volts * c_rated * 3600.0, pack_voltage=volts,
        capacity=c_rated * 3600.0, motor_efficiency=0.9, controller_efficiency=0.95,
        propeller=PropellerEfficiency((0.0,), (0.7,)), max_power=500.0,
        peukert_exponent=n, rating_time=rt)
    shaft = 5.0 * volts * 0.9 * 0.95  # 5 A of battery current
    hours = float(prop.endurance(prop.battery_energy, shaft)) / 3600.0
    # Peukert's form against the product's Hart form: rounding only (measured 4e-16).
    assert hours == pytest.approx(100.0 / 5.0**1.2, rel=1e-14)
    assert hours == pytest.approx(14.5, abs=0.05)   # as quoted, to 0.1 h
    # Hart's form: at the rated current C/Rt the pack lasts exactly Rt.
    rated_shaft = c_rated * volts * 0.9 * 0.95
    assert float(prop.endurance(prop.battery_energy, rated_shaft)) == pytest.approx(rt,
                                                                                      rel=1e-12)
    # Half the energy on board: half the time at the same current.
    assert float(prop.endurance(prop.battery_energy / 2, shaft)) / 3600.0 == pytest.approx(
        hours / 2, rel=1e-12)


def test_peukert_shortens_endurance_at_high_current(drone):
    # Hart's form of Peukert's law (Traub, J. Aircraft 48(2), 2011): with n > 1 a pack
    # lasts longer than energy / power below its rated current (capacity / rating time)
    # and shorter above it. The bundled drone (n = 1.03, 16 Ah rated over 1 h) draws
    # about 6 A at 16 m/s and over 16 A at 28 m/s.
    ideal, real = _ideal_drone(drone), drone
    prop = real.propulsion
    rated_current = prop.capacity / prop.rating_time
    v = np.array([16.0, 22.0, 28.0])
    a, b = cp.cruise_grid(ideal, [0.0], v), cp.cruise_grid(real, [0.0], v)
    current = b.source_power / prop.pack_voltage
    longer = b.endurance > a.endurance
    assert longer.any() and (~longer).any()
    np.testing.assert_array_equal(longer, current < rated_current)


# --- power-setting table --------------------------------------------------------------------------

def test_power_setting_table_hits_the_setting_on_the_fast_branch(trainer):
    h = np.array([0.0, 1000.0, 2000.0, 3000.0])
    fractions = np.array([0.45, 0.55, 0.65, 0.75])
    pts = cp.power_setting_table(trainer, h, fractions, mass=740.0)
    assert pts.shape == (4, 4)
    air = cp.air_state(h)
    ok = pts.limits == 0
    # At 3000 m, 45 % is slower than 1.3 x stall speed and 75 % beyond full throttle; all
    # else is flyable.
    assert pts.limits[3, 0] == Limit.STALL and pts.limits[3, 3] == Limit.POWER
    assert ok.sum() == 14
    # A second method: the grid evaluator at the speeds the root finder returned gives
    # back the setting (Illinois root to the product's tolerance: measured 3.4e-12).
    check = cruise_points(trainer, 740.0, air.column(), pts.tas, 1.0)
    target = np.broadcast_to(fractions[None, :], pts.shape)[ok] * trainer.propulsion.rated_power
    np.testing.assert_allclose(check.shaft_power[ok], target, rtol=3e-11)
    np.testing.assert_allclose(pts.power_fraction[ok],
                               np.broadcast_to(fractions, pts.shape)[ok], rtol=3e-11)
    rho = np.broadcast_to(air.density[:, None], pts.shape)
    # High-speed branch: above the speed of minimum power (Anderson, Aircraft Performance
    # and Design, sec. 5.4; constant propeller efficiency, so the closed form applies).
    v_mp = aero.min_power_speed(740.0, rho, trainer.wing_area, trainer.polar.cd0,
                                trainer.polar.k)
    assert np.all(pts.tas[ok] > v_mp[ok])
    # Brent's search against the closed form: measured 1.5e-8.
    np.testing.assert_allclose(engine_min_power_speed(trainer, 740.0, air), v_mp[:, 0],
                               rtol=1.5e-7)


def test_power_setting_flags_power_where_the_lapse_falls_short(trainer):
    # Gagg-Ferrar lapse (from memory, see _gagg_ferrar): full throttle gives
    # 1.132 sigma - 0.132 of rated power; 10000 ft ISA: sigma 0.7385 -> 70.4 % (by hand,
    # printed to 0.1 %: half a unit; measured 70.396 %).
    h = np.arange(0.0, 12001.0, 1000.0) * FT
    fractions = np.array([0.55, 0.65, 0.75, 0.85, 1.0])
    pts = cp.power_setting_table(trainer, h, fractions, mass=740.0)
    assert pts.power_available[10, 0] / trainer.propulsion.rated_power == pytest.approx(
        0.704, abs=5e-4)
    # Sea level, ISA: all of the rated power. The ISA's rho0 = 1.225 kg/m^3 is rounded
    # against p0 / (R T0) = 1.2250000181, so sigma there is 1 + 1.48e-8 and Gagg-Ferrar
    # gives 1 + 1.68e-8 (measured).
    assert pts.power_available[0, 0] == pytest.approx(trainer.propulsion.rated_power,
                                                      rel=5e-8)
    lapse = _gagg_ferrar(cp.air_state(h).sigma)
    expected = fractions[None, :] > lapse[:, None]
    assert expected.any() and (~expected).any()
    np.testing.assert_array_equal((pts.limits & Limit.POWER) != 0, expected)
    assert np.isnan(pts.tas[expected]).all()
    _assert_nan_only_with_reason(pts)


def test_power_setting_below_minimum_power_has_no_solution(trainer):
    pts = cp.power_setting_table(trainer, [0.0, 3000.0], [0.05, 0.6], mass=740.0)
    assert (pts.limits[:, 0] & Limit.NO_SOLUTION).all()
    assert np.isnan(pts.tas[:, 0]).all()
    assert (pts.limits[:, 1] == 0).all()
    _assert_nan_only_with_reason(pts)


@pytest.mark.parametrize("settings, message", [
    ([0.0, 0.5], r"power settings must be fractions of rated power in \(0, 1\]"),
    ([1.2], r"power settings must be fractions of rated power in \(0, 1\]"),
])
def test_power_setting_table_bad_settings(trainer, settings, message):
    with pytest.raises(ValueError, match=message):
        cp.power_setting_table(trainer, [0.0], settings)


# --- loading --------------------------------------------------------------------------------------

def test_loading_defaults_and_errors(trainer):
    full = trainer.loading()
    assert full.mass == pytest.approx(520 + 160 + 72.0) and full.store == pytest.approx(72.0)
    assert trainer.loading(mass=700.0).store == pytest.approx(20.0)
    with pytest.raises(cp.CruiseplanError,
                       match=r"fuel on board 100 kg is outside 0 to the capacity of demo-trainer"):
        trainer.loading(store=100.0)
    with pytest.raises(cp.CruiseplanError, match=r"mass 600\.0 kg is below empty mass 520\.0 kg "
                                                 r"plus payload 160\.0 kg"):
        cp.cruise_grid(trainer, [0.0], [50.0], mass=600.0)
    with pytest.warns(cp.CruiseplanWarning, match=r"mass 800\.0 kg exceeds the maximum "
                                                  r"take-off mass 760\.0 kg"):
        trainer.loading(mass=800.0)


# --- property tests -------------------------------------------------------------------------------

@given(H=st.floats(-1000.0, 6000.0), dev=st.floats(-30.0, 30.0),
       tas=st.floats(20.0, 90.0), mass=st.floats(600.0, 760.0))
def test_piston_properties(trainer, H, dev, tas, mass):
    air = cp.air_state(H, dev)
    fuel = mass - 680.0 if mass > 680.0 else 30.0
    # The identities hold for the model's own figures, also where they are NaN by default
    # (below the stall speed, short of power; see test_limit_rows.py).
    p = cruise_points(trainer, mass, air, np.array(tas), fuel, keep_unflyable=True)
    # No speed beats the minimum drag W / (L/D)max (Anderson, Aircraft Performance and
    # Design, sec. 5.4), nor the minimum power of the engine's own search.
    ld_max = float(aero.max_lift_to_drag(trainer.polar.cd0, trainer.polar.k))
    assert float(p.drag) >= mass * G0 / ld_max * (1 - 1e-12)
    v_mp = engine_min_power_speed(trainer, mass, air)
    p_min = float(cruise_points(trainer, mass, air, v_mp, fuel).shaft_power)
    assert float(p.shaft_power) >= p_min * (1 - 1e-12)
    assert float(p.specific_range_air) == pytest.approx(tas / float(p.store_rate), rel=1e-14)
    assert float(p.endurance) * float(p.store_rate) == pytest.approx(fuel, rel=1e-13)
    assert float(p.range_air) == pytest.approx(tas * float(p.endurance), rel=1e-14)
    # Heavier at the same speed needs more lift, hence more induced drag and power.
    heavier = cruise_points(trainer, mass * 1.05, air, np.array(tas), fuel)
    assert float(heavier.shaft_power) > float(p.shaft_power)
    assert float(heavier.drag) > float(p.drag)


@given(H=st.floats(0.0, 3000.0), tas=st.floats(10.0, 35.0), share=st.floats(0.05, 1.0))
def test_electric_properties(drone, H, tas, share):
    af = _ideal_drone(drone)
    store = share * af.propulsion.battery_energy
    # The model's own figures, also where they are NaN by default (see test_limit_rows.py).
    p = cruise_points(af, 13.5, cp.air_state(H), np.array(tas), store, keep_unflyable=True)
    # No speed beats the minimum drag W / (L/D)max (Anderson, sec. 5.4).
    ld_max = float(aero.max_lift_to_drag(af.polar.cd0, af.polar.k))
    assert float(p.drag) >= 13.5 * G0 / ld_max * (1 - 1e-12)
    assert float(p.specific_range_air) == pytest.approx(tas / float(p.store_rate), rel=1e-14)
    assert float(p.endurance) * float(p.store_rate) == pytest.approx(store, rel=1e-13)


# --- Quantities at the public API -----------------------------------------------------------------

def test_cruise_grid_accepts_quantities(trainer):
    Q = registry().Quantity
    with_units = cp.cruise_grid(trainer, Q(np.array([0.0, 4000.0, 8000.0]), "ft"),
                                Q(np.array([80.0, 100.0, 120.0]), "kt"),
                                mass=Q(1600.0, "lb"), isa_dev=Q(10.0, "K"),
                                headwind=Q(15.0, "kt"))
    si = cp.cruise_grid(trainer, np.array([0.0, 4000.0, 8000.0]) * FT,
                        np.array([80.0, 100.0, 120.0]) * KT, mass=1600.0 * 0.45359237,
                        isa_dev=10.0, headwind=15.0 * KT)
    for name in ARRAY_FIELDS:
        np.testing.assert_allclose(getattr(with_units, name), getattr(si, name), rtol=1e-13,
                                   err_msg=name)
    np.testing.assert_array_equal(with_units.limits, si.limits)
    assert with_units.mass == pytest.approx(si.mass, rel=1e-15)
    # Fuel of the wrong dimension is refused with the argument named (a volume is read
    # through the fuel density: tests/test_api_units.py).
    with pytest.raises(cp.UnitError, match=r"^fuel: 20\.0 meter is not a volume or mass"):
        cp.cruise_grid(trainer, [0.0], [50.0], fuel=Q(20.0, "m"))


def test_power_setting_table_accepts_quantities(trainer):
    Q = registry().Quantity
    a = cp.power_setting_table(trainer, Q([0.0, 5000.0], "ft"), [0.6, 0.7],
                               mass=Q(700.0, "kg"), fuel=Q(20.0, "kg"))
    b = cp.power_setting_table(trainer, [0.0, 5000.0 * FT], [0.6, 0.7], mass=700.0, fuel=20.0)
    np.testing.assert_allclose(a.tas, b.tas, rtol=1e-13)
    np.testing.assert_allclose(a.endurance, b.endurance, rtol=1e-13)


@pytest.mark.parametrize("dev", ["delta_degC", "degC", "delta_degF", "degF", "text"])
def test_isa_deviation_in_degrees_celsius_is_a_difference(trainer, dev):
    # An ISA deviation is a temperature difference: "ISA +10 degC" is a 10 K deviation
    # (common practice), never an absolute 10 degC = 283.15 K (silently flying in 570 K
    # air would be wrong); 18 degF of difference is 10 K (exact: 1 degF = 5/9 K).
    Q = registry().Quantity
    value = {"delta_degC": Q(10.0, "delta_degC"), "degC": Q(10.0, "degC"),
             "delta_degF": Q(18.0, "delta_degF"), "degF": Q(18.0, "degF"),
             "text": "10 degC"}[dev]
    pts = cp.cruise_grid(trainer, [0.0], [50.0], isa_dev=value)
    # Sea level ISA 288.15 K + 10 K; exact but for the 5/9 of degF (rounding).
    assert float(np.ravel(pts.air.isa_dev)[0]) == pytest.approx(10.0, abs=1e-13)
    assert float(np.ravel(pts.air.temperature)[0]) == pytest.approx(298.15, abs=1e-12)


def test_cruise_grid_rejects_bad_speeds(trainer):
    with pytest.raises(ValueError, match=r"tas must be a one-dimensional array of positive"):
        cp.cruise_grid(trainer, [0.0], [0.0, 50.0])
    with pytest.raises(ValueError, match=r"altitudes must be one-dimensional"):
        cp.cruise_grid(trainer, [[0.0], [100.0]], [50.0])


def test_min_power_speed_with_tabulated_propeller(tourer):
    # No closed form with eta(V): check the engine's vectorised Brent search against
    # scipy's bounded scalar minimiser (a second implementation) on the same power curve.
    air = cp.air_state(1000.0)
    mass = 1100.0
    res = minimize_scalar(
        lambda v: float(cruise_points(tourer, mass, air, np.array(v), 1.0).shaft_power),
        bounds=(20.0, 80.0), method="bounded", options={"xatol": 1e-10})
    assert res.success and 30.0 < res.x < 45.0
    # Two searches of a flat minimum agree to ~sqrt(eps): measured 5.0e-10.
    assert float(engine_min_power_speed(tourer, mass, air)) == pytest.approx(res.x, rel=5e-9)
