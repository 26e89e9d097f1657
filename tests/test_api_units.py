"""Units in, units out: the public API reads Quantities in any unit and hands Quantities back.

Each case gives its inputs as SI floats (converted here from the exact unit definitions:
international foot 0.3048 m, knot 1852/3600 m/s, nautical mile 1852 m, pound 0.45359237
kg, litre 0.001 m^3 through the airframe's fuel density) and as Quantities in the units a
crew writes; the answers agree to rel 1e-12 (conversions differ in the last bits only).
A search's argmax (best speeds, the planner's speeds and altitudes) moves by up to about
sqrt(machine epsilon) for a one-ulp change of an input, so its figures are held to
SEARCH_RTOL, as in tests/test_units_api.py.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.units import registry

FT = 0.3048                 # international foot [m], exact
KT = 1852.0 / 3600.0        # knot [m/s], exact
NMI = 1852.0                # nautical mile [m], exact
LB = 0.45359237             # pound [kg], exact
RTOL = 1e-12
SEARCH_RTOL = 1e-7

u = registry()
Q = u.Quantity


@pytest.fixture(scope="module")
def trainer():
    return cp.load_airframe("demo-trainer")


@pytest.fixture(scope="module")
def drone():
    return cp.load_airframe("demo-survey-drone")


def _same_points(a, b, rtol=RTOL):
    for f in dataclasses.fields(a):
        x, y = getattr(a, f.name), getattr(b, f.name)
        if f.name == "air" or isinstance(x, str) or x is None:
            continue
        np.testing.assert_allclose(x, y, rtol=rtol, err_msg=f.name)


def test_fuel_by_volume_gives_the_mass_through_the_fuel_density(trainer):
    density = trainer.propulsion.fuel_density
    alt, tas = np.array([0.0, 4000.0]) * FT, np.array([80.0, 100.0]) * KT
    a = cp.cruise_grid(trainer, alt, tas, fuel=0.05 * density)
    b = cp.cruise_grid(trainer, Q([0.0, 4000.0], "ft"), Q([80.0, 100.0], "kt"),
                       fuel=50 * u.L)
    assert b.store == pytest.approx(0.05 * density, rel=RTOL)
    _same_points(a, b)
    c = cp.cruise_grid(trainer, alt, tas, fuel=Q(0.05 * density / LB, "lb"))
    _same_points(a, c)


def test_power_settings_as_percent(trainer):
    a = cp.power_setting_table(trainer, [0.0, 1219.2], [0.55, 0.65])
    b = cp.power_setting_table(trainer, Q([0.0, 4000.0], "ft"), [55, 65] * u.percent)
    assert (a.limits == 0).any()
    _same_points(a, b)


def test_best_cruise_and_ceilings_with_litres(trainer):
    density = trainer.propulsion.fuel_density
    a = cp.best_cruise(trainer, np.array([2000.0, 4000.0, 6000.0]) * FT, fuel=0.06 * density,
                       course=90.0, wind=cp.WindProfile.calm())
    b = cp.best_cruise(trainer, Q([2000.0, 4000.0, 6000.0], "ft"), fuel=60 * u.L,
                       course=Q(np.pi / 2, "rad"), wind=cp.WindProfile.calm())
    assert a.best_index == b.best_index >= 0
    np.testing.assert_allclose(a.value, b.value, rtol=RTOL)
    _same_points(a.points, b.points, rtol=SEARCH_RTOL)
    c1 = cp.ceilings(trainer, fuel=0.06 * density, service_rate=100 * FT / 60)
    c2 = cp.ceilings(trainer, fuel=60 * u.L, service_rate=Q(100, "ft/min"))
    np.testing.assert_allclose([c1.absolute, c1.service], [c2.absolute, c2.service],
                               rtol=RTOL)


def test_dataclasses_convert_quantities_and_keep_floats():
    leg = cp.Leg("a", 100 * u.nautical_mile, course=Q(90, "deg"), altitude=Q(4500, "ft"),
                 power=65 * u.percent, max_altitude=Q(2, "km"))
    assert leg.distance == pytest.approx(100 * NMI, rel=RTOL)
    assert leg.altitude == pytest.approx(4500 * FT, rel=RTOL)
    assert leg.power == pytest.approx(0.65, rel=RTOL) and leg.max_altitude == 2000.0
    assert isinstance(leg.distance, float)
    x = 185200.00000000003
    assert cp.Leg("b", x).distance is x  # an SI float is kept, bit for bit
    res = cp.Reserve("time", 45 * u.min, power=Q(65, "percent"))
    assert res.amount == 2700.0 and res.power == pytest.approx(0.65, rel=RTOL)
    assert cp.Reserve("fraction", 25 * u.percent).amount == 0.25
    assert cp.Reserve("amount", Q(450, "Wh")).amount == pytest.approx(1.62e6, rel=RTOL)
    assert cp.Reserve("amount", Q(20, "lb")).amount == pytest.approx(20 * LB, rel=RTOL)
    prof = cp.Profile(departure_elevation=Q(500, "ft"), descent_rate=Q(500, "ft/min"),
                      climb_power=90 * u.percent)
    assert prof.departure_elevation == pytest.approx(500 * FT, rel=RTOL)
    assert prof.descent_rate == pytest.approx(500 * FT / 60, rel=RTOL)
    assert prof.climb_power == pytest.approx(0.9, rel=RTOL)


@pytest.mark.parametrize("make, field", [
    (lambda: cp.Leg("a", 100 * u.kg), "leg 'a' distance"),
    (lambda: cp.Leg("a", 1000.0, tas=Q(100, "ft")), "leg 'a' tas"),
    (lambda: cp.Leg("a", 1000.0, power=Q(65, "W")), "leg 'a' power"),
    (lambda: cp.Reserve("time", Q(45, "m")), "reserve amount"),
    (lambda: cp.Reserve("amount", Q(20, "L")), "reserve amount"),
    (lambda: cp.Profile(top=Q(3, "s")), "profile top"),
])
def test_wrong_dimension_in_a_dataclass_names_the_field(make, field):
    with pytest.raises(cp.CruiseplanError) as err:
        make()
    assert str(err.value).startswith(field) and "\n" not in str(err.value)


@pytest.mark.parametrize("call, name", [
    (lambda af: cp.cruise_grid(af, [0.0], [50.0], fuel=Q(3, "m")), "fuel"),
    (lambda af: cp.cruise_grid(af, Q([0.0], "s"), [50.0]), "altitudes"),
    (lambda af: cp.power_setting_table(af, [0.0], Q([65], "kW")), "power_settings"),
    (lambda af: cp.best_cruise(af, [0.0, 500.0], headwind=Q(3, "kg")), "headwind"),
    (lambda af: cp.ceilings(af, service_rate=Q(1, "ft")), "service_rate"),
])
def test_wrong_dimension_in_a_function_names_the_argument(trainer, call, name):
    with pytest.raises(cp.CruiseplanError) as err:
        call(trainer)
    assert str(err.value).startswith(name) and "\n" not in str(err.value)


def test_energy_fuel_for_a_battery_and_no_volume(drone):
    a = cp.cruise_grid(drone, [0.0], [20.0], fuel=500 * 3600.0)
    b = cp.cruise_grid(drone, [0.0], [20.0], fuel=Q(0.5, "kWh"))
    _same_points(a, b)
    with pytest.raises(cp.CruiseplanError, match="^fuel: .* is not an energy"):
        cp.cruise_grid(drone, [0.0], [20.0], fuel=Q(2, "L"))


def test_mission_and_plan_same_for_floats_and_quantities():
    m = cp.load_mission("demo-cross-country")
    legs = tuple(dataclasses.replace(leg, distance=Q(leg.distance / NMI, "nmi"))
                 for leg in m.legs)
    density = m.airframe.propulsion.fuel_density
    store = m.store if m.store is not None else m.airframe.propulsion.store_capacity
    mq = dataclasses.replace(m, legs=legs, store=Q(store / density * 1000.0, "L"),
                             mass=None if m.mass is None else Q(m.mass / LB, "lb"))
    assert mq.store == pytest.approx(store, rel=RTOL)
    for a, b in zip(m.legs, mq.legs):
        assert b.distance == pytest.approx(a.distance, rel=RTOL)
    pa, pb = cp.plan_mission(m), cp.plan_mission(mq)
    assert pa.verdict == pb.verdict and len(pa.segments) == len(pb.segments)
    for name in ("used", "remaining", "time", "distance", "reserve_required"):
        assert getattr(pb, name) == pytest.approx(getattr(pa, name), rel=SEARCH_RTOL), name
    with pytest.raises(cp.CruiseplanError, match="^mission store"):
        dataclasses.replace(m, store=Q(3, "m"))


def test_reserve_required_with_quantities(trainer):
    res = cp.Reserve("time", 2700.0)
    a = cp.reserve_required(trainer, res, mass=700.0, cruise_power=0.65)
    b = cp.reserve_required(trainer, res, mass=Q(700 / LB, "lb"), cruise_power=65 * u.percent)
    assert b.amount == pytest.approx(a.amount, rel=RTOL)
    with pytest.raises(cp.CruiseplanError, match="^cruise_power"):
        cp.reserve_required(trainer, res, mass=700.0, cruise_power=Q(1, "W"))


def test_quantity_hands_back_si_quantities(trainer, drone):
    g = cp.cruise_grid(trainer, [0.0, 1000.0], [50.0, 55.0])
    q = g.quantity("drag")
    assert q.units == u.newton and np.array_equal(q.magnitude, g.drag)
    assert g.quantity("specific_range_air").units == u.m / u.kg
    assert g.quantity("cas").to("kt").magnitude == pytest.approx(g.cas() / KT, rel=RTOL)
    assert g.quantity("power_fraction").dimensionless
    assert cp.cruise_grid(drone, [0.0], [20.0]).quantity("store").units == u.J
    assert g.reasons.shape == (2, 2) and g.reasons[0, 0] == "ok"
    with pytest.raises(cp.CruiseplanError, match="not one of"):
        g.quantity("nonsense")
    best = cp.best_cruise(trainer, [0.0, 1000.0], objective="endurance")
    assert best.quantity("value").units == u.s
    assert np.array_equal(best.quantity("altitudes").magnitude, best.altitudes)
    plan = cp.plan_mission(cp.load_mission("demo-cross-country"))
    assert plan.quantity("reserve_required").to("kg").magnitude == plan.reserve_required
    assert plan.quantity("time").units == u.s
    seg = plan.segments[-1]
    assert seg.quantity("distance").magnitude == seg.distance
    assert seg.quantity("used", "fuel").units == u.kg
    with pytest.raises(cp.CruiseplanError, match="store_unit"):
        seg.quantity("used")


def test_monte_carlo_results_hand_back_quantities():
    from cruiseplan.planning.uncertainty import CruiseUncertainty, plan_uncertainty

    plan = cp.plan_mission(cp.load_mission("demo-survey-run"))
    mc = plan_uncertainty(plan, n=16, seed=1)
    q = mc.quantity("remaining", "energy")
    assert q.units == u.J and np.array_equal(q.magnitude, mc.remaining)
    assert mc.quantity("time").units == u.s
    with pytest.raises(cp.CruiseplanError, match="store_unit"):
        mc.quantity("used")
    cu = CruiseUncertainty(np.array([1.0, 2.0]), np.array([3.0, 4.0]), 0)
    assert cu.quantity("range_ground").to("km").magnitude.tolist() == [0.001, 0.002]


def test_ceilings_hand_back_quantities(trainer):
    c = cp.ceilings(trainer)
    assert c.quantity("service").to("ft").magnitude == pytest.approx(c.service / FT, rel=RTOL)
