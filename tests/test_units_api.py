"""The public API gives the same answers for SI floats and for pint Quantities in other units.

Each case states its inputs twice: as SI floats, converted here from the exact unit
definitions (international foot 0.3048 m, knot 1852/3600 m/s, pound 0.45359237 kg,
1 delta_degF = 5/9 K, 1 Wh = 3600 J), and as Quantities in the units a crew writes (ft, kt,
lb, km/h, g, Wh, ft/min, delta_degF) made with the package's one pint registry. The two runs
must agree to rounding: the conversions differ only in the last bits, so rel 1e-12.

One exception, in best_cruise: a best speed is the argmax of a smooth, flat optimum, which
any search can place only to about sqrt(machine epsilon) ~ 1.5e-8 relative; a one-ulp
change of an input (100 lb of fuel is 45.359237 kg from the float, 45.35923700000001 kg
through pint) moves the piston case's best-range TAS by 1.5e-8 (measured). The objective
at that speed (ground range, endurance) is flat there and still agrees to rel 1e-12; the
speeds and what follows from them are held to SEARCH_RTOL.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.units import registry

FT = 0.3048                 # international foot [m], exact
KT = 1852.0 / 3600.0        # knot [m/s], exact
LB = 0.45359237             # pound [kg], exact
WH = 3600.0                 # watt-hour [J], exact
RTOL = 1e-12                # unit conversions in the last bits only
SEARCH_RTOL = 1e-7          # argmax of a flat optimum: measured 1.5e-8 for a 1-ulp input change

Q = registry().Quantity

# name: (airframe, SI keyword values, the same values as Quantities)
CASES = {
    "piston": ("demo-trainer",
               dict(altitudes=np.array([0.0, 4000.0, 8000.0]) * FT,
                    tas=np.array([80.0, 100.0, 120.0]) * KT,
                    fuel=100.0 * LB, payload=300.0 * LB, isa_dev=10.0, headwind=15.0 * KT,
                    floor=1000.0 * FT, elevation=500.0 * FT, climb_reserve=100.0 * FT / 60.0),
               dict(altitudes=Q(np.array([0.0, 4000.0, 8000.0]), "ft"),
                    tas=Q(np.array([80.0, 100.0, 120.0]), "kt"),
                    fuel=Q(100.0, "lb"), payload=Q(300.0, "lb"), isa_dev=Q(18.0, "delta_degF"),
                    headwind=Q(15.0, "kt"), floor=Q(1000.0, "ft"), elevation=Q(500.0, "ft"),
                    climb_reserve=Q(100.0, "ft/min"))),
    "electric": ("demo-survey-drone",
                 dict(altitudes=np.array([0.0, 300.0, 600.0]) * FT,
                      tas=np.array([54.0, 72.0, 90.0]) / 3.6,
                      mass=13.2, fuel=500.0 * WH, isa_dev=-5.0, headwind=-3.0,
                      floor=100.0 * FT, elevation=50.0 * FT, climb_reserve=0.5),
                 dict(altitudes=Q(np.array([0.0, 300.0, 600.0]), "ft"),
                      tas=Q(np.array([54.0, 72.0, 90.0]), "km/h"),
                      mass=Q(13200.0, "g"), fuel=Q(500.0, "Wh"), isa_dev=Q(-5.0, "K"),
                      headwind=Q(-10.8, "km/h"), floor=Q(100.0, "ft"), elevation=Q(50.0, "ft"),
                      climb_reserve=Q(30.0, "m/min"))),
}
LOAD_KEYS = ("mass", "fuel", "payload", "isa_dev")


def _pick(values, *keys):
    return {k: values[k] for k in keys if k in values}


def _assert_same_points(a, b, rtol=RTOL):
    """Every array field of two CruisePoints equal to rtol (NaN where NaN); limits exact."""
    for field in dataclasses.fields(a):
        x, y = getattr(a, field.name), getattr(b, field.name)
        if field.name == "air":
            for f in dataclasses.fields(x):
                np.testing.assert_allclose(getattr(x, f.name), getattr(y, f.name), rtol=RTOL,
                                           err_msg=f"air.{f.name}")
        elif field.name == "limits":
            np.testing.assert_array_equal(x, y)
        elif isinstance(x, str) or x is None:
            assert x == y, field.name
        else:
            np.testing.assert_allclose(x, y, rtol=rtol, err_msg=field.name)


@pytest.fixture(scope="module", params=sorted(CASES))
def case(request):
    name, si, qty = CASES[request.param]
    return cp.load_airframe(name), si, qty


def test_cruise_grid_same_for_floats_and_quantities(case):
    af, si, qty = case
    keys = LOAD_KEYS + ("headwind",)
    a = cp.cruise_grid(af, si["altitudes"], si["tas"], **_pick(si, *keys))
    b = cp.cruise_grid(af, qty["altitudes"], qty["tas"], **_pick(qty, *keys))
    # The cases are built so that the grid holds flyable and flagged points alike.
    assert (a.limits == 0).any()
    _assert_same_points(a, b)


def test_power_setting_table_same_for_floats_and_quantities(case):
    af, si, qty = case
    keys = LOAD_KEYS + ("headwind",)
    settings = [0.45, 0.6, 0.75]
    a = cp.power_setting_table(af, si["altitudes"], settings, **_pick(si, *keys))
    b = cp.power_setting_table(af, qty["altitudes"], settings, **_pick(qty, *keys))
    assert (a.limits == 0).any()
    _assert_same_points(a, b)


@pytest.mark.parametrize("objective", ["range", "endurance", "economy"])
def test_best_cruise_same_for_floats_and_quantities(case, objective):
    af, si, qty = case
    keys = LOAD_KEYS + ("headwind", "floor", "elevation", "climb_reserve")
    a = cp.best_cruise(af, si["altitudes"], objective=objective, **_pick(si, *keys))
    b = cp.best_cruise(af, qty["altitudes"], objective=objective, **_pick(qty, *keys))
    assert a.best_index >= 0 and a.best_index == b.best_index
    assert a.binding == b.binding
    np.testing.assert_array_equal(a.out_of_band, b.out_of_band)
    # The floor (1000 ft, resp. 100 ft) keeps the lowest altitude out of the band.
    assert a.out_of_band[0] & cp.Limit.FLOOR
    # The objective at the best speed: flat there, so rounding only.
    np.testing.assert_allclose(a.value, b.value, rtol=RTOL)
    assert b.best()["value"] == pytest.approx(a.best()["value"], rel=RTOL)
    # The best speeds themselves: to the search's sqrt(eps) (see the module docstring).
    for name in ("range", "endurance", "economy"):
        np.testing.assert_allclose(a.schedule.tas[name], b.schedule.tas[name],
                                   rtol=SEARCH_RTOL, err_msg=name)
    _assert_same_points(a.points, b.points, rtol=SEARCH_RTOL)
    best_a, best_b = a.best(), b.best()
    assert best_a.keys() == best_b.keys()
    for key, value in best_a.items():
        if isinstance(value, float):
            assert best_b[key] == pytest.approx(value, rel=SEARCH_RTOL), key
        else:
            assert best_b[key] == value, key


def test_ceilings_same_for_floats_and_quantities(case):
    af, si, qty = case
    a = cp.ceilings(af, **_pick(si, *LOAD_KEYS))
    b = cp.ceilings(af, **_pick(qty, *LOAD_KEYS))
    assert a.note == b.note
    np.testing.assert_allclose([a.absolute, a.service], [b.absolute, b.service], rtol=RTOL)
    # The piston trainer has both ceilings inside the search; the drone none below 20 km.
    if af.name == "demo-trainer":
        assert np.isfinite([a.absolute, a.service]).all() and a.service < a.absolute
    else:
        assert np.isnan(a.absolute) and "above 20000 m" in a.note


def test_fuel_as_a_volume_uses_the_airframes_density(trainer):
    # The API's fuel is a mass (kg) for a piston airframe: a volume is converted with the
    # airframe's own fuel density, never some other; a wrong dimension is refused.
    a = cp.best_cruise(trainer, [0.0, 1000.0], fuel=Q(80, "L"))
    b = cp.best_cruise(trainer, [0.0, 1000.0], fuel=0.08 * trainer.propulsion.fuel_density)
    assert a.points.store == pytest.approx(b.points.store, rel=RTOL)
    with pytest.raises(cp.UnitError, match=r"^fuel: 80 second is not a volume or mass"):
        cp.best_cruise(trainer, [0.0, 1000.0], fuel=Q(80, "s"))
