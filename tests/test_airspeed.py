"""Calibrated, equivalent and true airspeed; the wind triangle."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import cruiseplan as cp
from cruiseplan.physics import airspeed as asp

FT = 0.3048  # international foot [m], exact
KT = 1852.0 / 3600.0  # knot [m/s], exact


def _tas_kt(cas_kt, pa_ft, isa_dev=0.0):
    air = cp.air_state(pa_ft * FT, isa_dev)
    tas = asp.tas_from_cas(cas_kt * KT, air.pressure, air.speed_of_sound)
    return float(tas / KT), float(tas / air.speed_of_sound)


@pytest.mark.parametrize("cas_kt, pa_ft, mach, tas_kt", [
    (100.0, 5000.0, 0.1656, 107.67),
    (150.0, 10000.0, 0.2727, 174.05),
    (250.0, 25000.0, 0.6037, 363.39),
])
def test_cas_to_tas_worked_values(cas_kt, pa_ft, mach, tas_kt):
    # Source: REFERENCES.md sec. 3 [calc], subsonic compressible pitot relations
    # (qc = p0 [(1 + 0.2 (CAS/a0)^2)^3.5 - 1]; M = sqrt(5 [(qc/p + 1)^(2/7) - 1]);
    # TAS = M a), ISA day. TAS printed to 0.01 kt, Mach to 4 decimals.
    tas, m = _tas_kt(cas_kt, pa_ft)
    assert tas == pytest.approx(tas_kt, abs=0.01)
    assert m == pytest.approx(mach, abs=0.00005)


@pytest.mark.parametrize("cas_kt, pa_ft, rule_kt", [
    (100.0, 5000.0, 110.0), (150.0, 10000.0, 180.0), (250.0, 25000.0, 375.0)])
def test_two_percent_per_thousand_feet_rule_is_rough(cas_kt, pa_ft, rule_kt):
    # Common practice, no source: TAS ~ CAS + 2 % per 1000 ft. REFERENCES.md sec. 3 lists
    # the rule's answers 110 / 180 / 375 kt; the exact values are 2-4 % lower.
    assert cas_kt * (1 + 0.02 * pa_ft / 1000.0) == pytest.approx(rule_kt)
    tas, _ = _tas_kt(cas_kt, pa_ft)
    assert tas == pytest.approx(rule_kt, rel=0.04)
    assert rule_kt > tas  # the rule overestimates in all three cases
    assert abs(rule_kt / tas - 1.0) > 0.015  # ... and is not exact: only a rule of thumb


@pytest.mark.parametrize("cas", [5.0, 30.0, 60.0, 120.0, 200.0])
def test_cas_equals_tas_at_sea_level_isa(cas):
    # Definition of CAS (Anderson, Introduction to Flight, sec. 4.12): the airspeed
    # indicator is calibrated to read TAS at sea level on a standard day.
    air = cp.air_state(0.0)
    assert float(asp.tas_from_cas(cas, air.pressure, air.speed_of_sound)) == \
        pytest.approx(cas, rel=1e-12)
    assert float(asp.cas_from_tas(cas, air.pressure, air.speed_of_sound)) == \
        pytest.approx(cas, rel=1e-12)


def test_eas_at_sea_level_and_low_speed_approximation():
    # EAS = TAS sqrt(sigma) (Anderson, Introduction to Flight, sec. 4.12); at low Mach
    # CAS ~ EAS (compressibility correction of order M^2/8).
    air = cp.air_state(3000.0, 10.0)
    tas = 40.0
    eas = float(asp.eas_from_tas(tas, air.density))
    assert eas == pytest.approx(tas * math.sqrt(float(air.density) / 1.225), rel=1e-14)
    cas = float(asp.cas_from_tas(tas, air.pressure, air.speed_of_sound))
    assert cas == pytest.approx(eas, rel=2e-3)


@given(cas=st.floats(1.0, 180.0), H=st.floats(-1000.0, 12000.0), dev=st.floats(-30.0, 30.0))
def test_cas_tas_round_trip(cas, H, dev):
    air = cp.air_state(H, dev)
    tas = asp.tas_from_cas(cas, air.pressure, air.speed_of_sound)
    back = asp.cas_from_tas(tas, air.pressure, air.speed_of_sound)
    assert float(back) == pytest.approx(cas, rel=1e-10)
    # For a fixed CAS, TAS grows with altitude (the air thins).
    hi = cp.air_state(H + 1000.0, dev)
    assert float(asp.tas_from_cas(cas, hi.pressure, hi.speed_of_sound)) > float(tas)


@given(eas=st.floats(0.5, 200.0), H=st.floats(-1000.0, 18000.0), dev=st.floats(-30.0, 30.0))
def test_eas_tas_round_trip(eas, H, dev):
    rho = cp.air_state(H, dev).density
    tas = asp.tas_from_eas(eas, rho)
    assert float(asp.eas_from_tas(tas, rho)) == pytest.approx(eas, rel=1e-13)


# --- wind triangle ------------------------------------------------------------------------------

@pytest.mark.parametrize("course, wind_from, gs, heading, wca", [
    # Hand-computed, common practice (no source needed beyond vector addition):
    (360.0, 360.0, 80.0, 0.0, 0.0),     # pure headwind 20 kt: GS = 100 - 20
    (360.0, 180.0, 120.0, 0.0, 0.0),    # pure tailwind 20 kt: GS = 100 + 20
    (90.0, 270.0, 120.0, 90.0, 0.0),    # tailwind on an easterly course
    # Pure crosswind from the right (course 090, wind from 180): WCA = asin(20/100)
    # = 11.537 deg into the wind, heading 101.537; GS = 100 cos(11.537) = 97.980 kt.
    (90.0, 180.0, 97.97959, 101.53696, 11.53696),
    # From the left (wind from 000): WCA = -11.537, heading 078.463.
    (90.0, 0.0, 97.97959, 78.46304, -11.53696),
])
def test_wind_triangle_pure_cases(course, wind_from, gs, heading, wca):
    g, h, w = asp.wind_triangle(100.0 * KT, course, wind_from, 20.0 * KT)
    assert float(g) / KT == pytest.approx(gs, abs=1e-4)
    assert float(h) == pytest.approx(heading, abs=1e-4)
    assert float(w) == pytest.approx(wca, abs=1e-4)


def test_wind_triangle_classic_worked_value():
    # Worked by hand (FAA Pilot's Handbook of Aeronautical Knowledge ch. 16 method):
    # TAS 100 kt, course 090, wind from 045 at 20 kt.
    #   wind angle off the course = 045 - 090 = -45 deg (from the left front)
    #   headwind  = 20 cos(45) = 14.142 kt, crosswind from the left = 20 sin(45) = 14.142 kt
    #   WCA = asin(14.142 / 100) = 8.130 deg to the left -> heading 090 - 8.130 = 081.870
    #   GS = 100 cos(8.130) - 14.142 = 98.995 - 14.142 = 84.853 kt
    # Check by vectors (east, north): air 100 (sin 81.87, cos 81.87) = (98.995, 14.142);
    # wind toward 225: 20 (sin 225, cos 225) = (-14.142, -14.142); sum (84.853, 0): due
    # east at 84.853 kt.
    wca = -math.degrees(math.asin(20.0 * math.sin(math.radians(45.0)) / 100.0))
    gs = 100.0 * math.cos(math.radians(wca)) - 20.0 * math.cos(math.radians(45.0))
    assert wca == pytest.approx(-8.130, abs=5e-4)
    assert gs == pytest.approx(84.853, abs=5e-4)
    g, h, w = asp.wind_triangle(100.0 * KT, 90.0, 45.0, 20.0 * KT)
    assert float(w) == pytest.approx(wca, abs=1e-9)
    assert float(h) == pytest.approx(90.0 + wca, abs=1e-9)
    assert float(g) / KT == pytest.approx(gs, rel=1e-12)
    # The air vector plus the wind vector point along the course.
    hd = math.radians(float(h))
    wind_to = math.radians(45.0 + 180.0)
    east = 100.0 * math.sin(hd) + 20.0 * math.sin(wind_to)
    north = 100.0 * math.cos(hd) + 20.0 * math.cos(wind_to)
    assert north == pytest.approx(0.0, abs=1e-9)
    assert east == pytest.approx(float(g) / KT, rel=1e-12)


def test_wind_components_signs():
    head, cross = asp.wind_components(90.0, np.array([90.0, 270.0, 180.0, 0.0]), 10.0)
    np.testing.assert_allclose(head, [10.0, -10.0, 0.0, 0.0], atol=1e-12)
    np.testing.assert_allclose(cross, [0.0, 0.0, 10.0, -10.0], atol=1e-12)


def test_wind_stronger_than_tas_across_the_course_has_no_ground_speed():
    g, h, w = asp.wind_triangle(20.0, 0.0, 90.0, 25.0)
    assert np.isnan(g) and np.isnan(w)


@given(tas=st.floats(20.0, 100.0), course=st.floats(0.0, 360.0),
       wind_from=st.floats(0.0, 360.0), ratio=st.floats(0.0, 0.9))
def test_wind_triangle_closes(tas, course, wind_from, ratio):
    # Vector identity: air vector + wind vector = ground vector along the course.
    w = ratio * tas
    g, h, _ = asp.wind_triangle(tas, course, wind_from, w)
    hd, wt, c = map(math.radians, (float(h), wind_from + 180.0, course))
    east = tas * math.sin(hd) + w * math.sin(wt)
    north = tas * math.cos(hd) + w * math.cos(wt)
    assert east == pytest.approx(float(g) * math.sin(c), abs=1e-9 * tas)
    assert north == pytest.approx(float(g) * math.cos(c), abs=1e-9 * tas)
    assert float(g) > 0
