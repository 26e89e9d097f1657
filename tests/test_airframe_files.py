"""Airframe files: the bundled ones load; malformed ones fail with a precise message."""

from __future__ import annotations

import hashlib
import re

import pytest

import cruiseplan as cp
from cruiseplan.io.airframe_file import bundled_airframes, find_airframe
from cruiseplan.units import parse_quantity

KT = 1852.0 / 3600.0  # knot [m/s], exact
NMI = 1852.0  # nautical mile [m], exact
US_GAL = 3.785411784e-3  # US gallon [m^3], exact
LB = 0.45359237  # pound [kg], exact
HP = 550 * 0.3048 * LB * 9.80665  # mechanical horsepower [W], exact

PISTON = """\
[airframe]
name = "test-piston"
description = "test airframe"

[masses]
empty = "520 kg"
max_takeoff = "760 kg"
payload = "160 kg"

[wing]
area = "11.2 m^2"
span = "9.6 m"
cl_max = 1.45

[polar]
kind = "parabolic"
cd0 = 0.036
oswald_e = 0.76

[propulsion]
kind = "piston-propeller"
rated_power = "80 kW"
power_lapse = "gagg-ferrar"
bsfc = "0.46 lb/(hp*h)"
propeller_efficiency = 0.78
fuel = "avgas"
fuel_capacity = "100 L"
"""

ELECTRIC = """\
[masses]
empty = "11.5 kg"
max_takeoff = "14 kg"
payload = "2.0 kg"

[wing]
area = "0.95 m^2"
span = "3.0 m"
cl_max = 1.3

[polar]
cd0 = 0.040
k = 0.05

[propulsion]
kind = "electric-propeller"
battery_energy = "600 Wh"
pack_voltage = "44.4 V"
capacity = "16 Ah"
motor_efficiency = 0.85
controller_efficiency = 0.95
propeller_efficiency = 0.70
max_power = "1.5 kW"
"""

TABLE_PROP = """\
[propulsion.propeller_efficiency]
tas = ["50 kt", "80 kt", "110 kt"]
efficiency = [0.62, 0.76, 0.82]
"""


def _edit(base: str, *changes) -> str:
    """Apply (old, new) text replacements, each of which must match exactly once."""
    text = base
    for old, new in changes:
        assert text.count(old) == 1, f"test set-up: {old!r} not found once"
        text = text.replace(old, new)
    return text


PISTON_TABLE = _edit(PISTON, ("propeller_efficiency = 0.78\n", "")) + "\n" + TABLE_PROP

# (id, file text, regex for the message after the file name)
MALFORMED = [
    ("missing-section", _edit(PISTON, ('[wing]\narea = "11.2 m^2"\nspan = "9.6 m"\n'
                                       'cl_max = 1.45\n', "")),
     r"\[wing\]: section missing"),
    ("missing-field", _edit(PISTON, ('empty = "520 kg"\n', "")),
     r"\[masses\] empty: missing; expected e\.g\. empty = '520 kg'"),
    ("no-unit", _edit(PISTON, ('area = "11.2 m^2"', "area = 11.2")),
     r"\[wing\] area: 11\.2 needs a unit, written as a string"),
    ("wrong-dimension", _edit(PISTON, ('area = "11.2 m^2"', 'area = "12 kg"')),
     r"\[wing\] area: '12 kg' is not a quantity in units compatible with m\^2"),
    ("not-a-number", _edit(PISTON, ('area = "11.2 m^2"', 'area = "large"')),
     r"\[wing\] area: 'large' is not a quantity"),
    ("negative-mass", _edit(PISTON, ('empty = "520 kg"', 'empty = "-520 kg"')),
     r"\[masses\] empty: '-520 kg' is out of range; expected > 0 kg"),
    ("typo-cdo", _edit(PISTON, ("cd0 = 0.036", "cdo = 0.036")),
     r"\[polar\] cdo: unknown field; expected one of cd0, cl_min_drag, k, kind, oswald_e"),
    ("both-k-and-e", _edit(PISTON, ("oswald_e = 0.76", "oswald_e = 0.76\nk = 0.05")),
     r"\[polar\] k: give exactly one of k or oswald_e"),
    ("neither-k-nor-e", _edit(PISTON, ("oswald_e = 0.76\n", "")),
     r"\[polar\] k: give exactly one of k or oswald_e"),
    ("cd0-as-string", _edit(PISTON, ("cd0 = 0.036", 'cd0 = "0.036"')),
     r"\[polar\] cd0: '0\.036' should be a plain number"),
    ("unknown-propulsion", _edit(PISTON, ('kind = "piston-propeller"', 'kind = "turbofan"')),
     r"\[propulsion\] kind: 'turbofan' is not one of electric-propeller, electric-rotor, "
     r"piston-propeller"),
    ("unknown-fuel", _edit(PISTON, ('fuel = "avgas"', 'fuel = "kerosene"')),
     r"\[propulsion\] fuel: 'kerosene' is not one of avgas, diesel, jet-a1, mogas"),
    ("unknown-lapse", _edit(PISTON, ('power_lapse = "gagg-ferrar"', 'power_lapse = "linear"')),
     r"\[propulsion\] power_lapse: 'linear' is not one of density-ratio, gagg-ferrar, none"),
    ("efficiency-above-1", _edit(PISTON, ("propeller_efficiency = 0.78",
                                          "propeller_efficiency = 1.2")),
     r"\[propulsion\] propeller_efficiency: 1\.2 is out of range; expected > 0\.05 and <= 1"),
    ("bsfc-implausible", _edit(PISTON, ('bsfc = "0.46 lb/(hp*h)"', 'bsfc = "4.6 lb/(hp*h)"')),
     r"\[propulsion\] bsfc: '4\.6 lb/\(hp\*h\)' is out of range"),
    ("battery-above-nominal", _edit(ELECTRIC, ('battery_energy = "600 Wh"',
                                               'battery_energy = "900 Wh"')),
     r"\[propulsion\] battery_energy: '900 Wh' exceeds the pack's nominal energy 710 Wh "
     r"\(pack_voltage x capacity\)"),
    ("motor-efficiency-zero", _edit(ELECTRIC, ("motor_efficiency = 0.85",
                                               "motor_efficiency = 0")),
     r"\[propulsion\] motor_efficiency: 0 is out of range"),
    ("peukert-too-high", _edit(ELECTRIC, ("max_power", "peukert_exponent = 2.0\nmax_power")),
     r"\[propulsion\] peukert_exponent: 2\.0 is out of range; expected >= 1 and <= 1\.6"),
    ("propeller-speeds-not-increasing", _edit(PISTON_TABLE, ('"80 kt", "110 kt"',
                                                             '"110 kt", "80 kt"')),
     r"\[propulsion\] propeller_efficiency\.tas: speeds must increase"),
    ("propeller-table-lengths", _edit(PISTON_TABLE, ("0.62, 0.76, 0.82", "0.62, 0.76")),
     r"\[propulsion\] propeller_efficiency: tas and efficiency need the same length"),
    ("propeller-table-typo", _edit(PISTON_TABLE, ("efficiency = [", "eff = [")),
     r"\[propulsion\] propeller_efficiency\.eff: unknown field; expected tas, efficiency"),
    ("tabulated-polar-cl-not-increasing",
     _edit(PISTON, ('kind = "parabolic"\ncd0 = 0.036\noswald_e = 0.76',
                    'kind = "tabulated"\ncl = [0.1, 0.6, 0.3]\ncd = [0.03, 0.04, 0.05]')),
     r"\[polar\] cl: lift coefficients must increase"),
    ("unknown-polar-kind", _edit(PISTON, ('kind = "parabolic"', 'kind = "elliptic"')),
     r"\[polar\] kind: 'elliptic' is not one of build-up, parabolic, tabulated"),
    ("bad-toml", _edit(PISTON, ("cl_max = 1.45", "cl_max == 1.45")),
     r"not valid TOML \(.*line 13"),
    ("max-takeoff-below-empty", _edit(PISTON, ('max_takeoff = "760 kg"',
                                               'max_takeoff = "500 kg"')),
     r"\[masses\] max_takeoff: is below the empty mass"),
    ("span-and-aspect-ratio", _edit(PISTON, ('span = "9.6 m"', 'span = "9.6 m"\n'
                                                               'aspect_ratio = 8.2')),
     r"\[wing\] span: give exactly one of span or aspect_ratio"),
    ("aspect-ratio-absurd", _edit(PISTON, ('span = "9.6 m"', 'span = "96 m"')),
     r"\[wing\] span: gives aspect ratio 822\.9; expected 2 to 40"),
    ("unknown-section", PISTON + '\n[engine]\nrpm = 2500\n',
     r"\[engine\]: unknown section for a fixed-wing airframe; expected airframe, masses, "
     r"wing, polar, propulsion"),
    ("cl-max-implausible", _edit(PISTON, ("cl_max = 1.45", "cl_max = 14.5")),
     r"\[wing\] cl_max: 14\.5 is out of range; expected >= 0\.3 and <= 4"),
]


@pytest.mark.parametrize("section", ["airframe", "masses", "wing", "polar", "propulsion"])
def test_every_section_refuses_an_unknown_field(write_toml, section):
    # Not only the sections MALFORMED happens to cover: a typo anywhere is named, with its
    # section, rather than silently falling back to a default.
    path = write_toml(_edit(PISTON, (f"[{section}]\n", f"[{section}]\nbogus_field = 1\n")))
    with pytest.raises(cp.AirframeFileError,
                       match=re.escape(str(path)) + rf": \[{section}\] bogus_field: unknown "
                             r"field; expected one of "):
        cp.read_airframe(path)


@pytest.mark.parametrize("text, message", [(t, m) for _, t, m in MALFORMED],
                         ids=[i for i, _, _ in MALFORMED])
def test_malformed_airframe_file(write_toml, text, message):
    path = write_toml(text, "bad-airframe.toml")
    with pytest.raises(cp.AirframeFileError, match=re.escape(str(path)) + r": " + message) \
            as info:
        cp.read_airframe(path)
    assert "\n" not in str(info.value)  # one line


def test_payload_above_max_takeoff_message_gives_empty_plus_payload(write_toml):
    # empty 520 + payload 300 = 820 kg > max_takeoff 760 kg: the message must state the
    # 820 kg it talks about (not a sum that also includes the 72 kg of full tanks).
    path = write_toml(_edit(PISTON, ('payload = "160 kg"', 'payload = "300 kg"')))
    with pytest.raises(cp.AirframeFileError,
                       match=re.escape(str(path)) + r": \[masses\] payload: empty \+ payload "
                             r"= 820\.0 kg exceeds max_takeoff"):
        cp.read_airframe(path)


def test_missing_file(tmp_path):
    path = tmp_path / "nowhere.toml"
    with pytest.raises(cp.AirframeFileError,
                       match=re.escape(str(path)) + r": cannot read the file"):
        cp.read_airframe(path)


def test_unknown_bundled_name_lists_the_bundled_ones():
    with pytest.raises(cp.AirframeFileError,
                       # Issue 12 added the two demo airframes with circuit packs.
                       match=r"^no-such-plane: no such airframe file, nor a bundled airframe "
                             r"\(bundled: demo-mapping-quad-4s, demo-mapping-quad, "
                             r"demo-sensor-wing, demo-survey-drone-6s, demo-survey-drone, "
                             r"demo-tourer, demo-trainer\)"):
        find_airframe("no-such-plane")


# --- valid files -------------------------------------------------------------------------------

def test_all_bundled_airframes_load():
    bundled = bundled_airframes()
    assert {"demo-trainer", "demo-tourer", "demo-survey-drone"} <= set(bundled)
    for name, path in bundled.items():
        af = cp.load_airframe(name)
        assert af.name == name
        assert af.source == str(path)
        assert af.checksum == hashlib.sha256(path.read_bytes()).hexdigest()
        assert 0 < af.empty_mass + af.payload <= af.max_takeoff_mass
        assert af.description and "invented" in af.description
        assert af.kind == "multirotor" or 2.0 <= af.aspect_ratio <= 40.0
        assert af.propulsion.store_capacity > 0


def test_valid_piston_file_in_si(write_toml):
    af = cp.read_airframe(write_toml(PISTON))
    assert af.name == "test-piston"
    assert af.wing_area == 11.2 and af.span == 9.6
    # k = 1 / (pi e AR) (Anderson, Aircraft Performance and Design, eq. 2.47), by hand:
    # AR = 9.6^2 / 11.2 = 8.228571, k = 1 / (3.14159 x 0.76 x 8.228571) = 0.0508993
    # (half a unit of the 7th digit).
    assert af.polar.k == pytest.approx(0.0508993, abs=5e-8)
    prop = af.propulsion
    assert prop.rated_power == pytest.approx(80e3, rel=1e-14)
    # 0.46 lb/(hp h) = 0.46 x 0.45359237 kg / (745.69987 W x 3600 s) = 7.7722e-8 kg/J
    assert prop.bsfc == pytest.approx(0.46 * LB / (HP * 3600.0), rel=1e-12)
    assert prop.fuel_capacity == pytest.approx(0.1, rel=1e-14)
    # Avgas default 0.72 kg/L, about 6.0 lb/US gal (common practice, no source).
    assert prop.fuel_density == 720.0
    assert prop.store_capacity == pytest.approx(72.0, rel=1e-14)


def test_valid_electric_file_defaults(write_toml):
    af = cp.read_airframe(write_toml(ELECTRIC, "quad.toml"))
    assert af.name == "quad"  # file stem when [airframe] is absent
    prop = af.propulsion
    assert prop.battery_energy == pytest.approx(600 * 3600.0, rel=1e-14)
    assert prop.capacity == pytest.approx(16 * 3600.0, rel=1e-14)
    assert prop.peukert_exponent == 1.0
    assert prop.rating_time == 3600.0
    assert af.polar.k == 0.05


def test_aviation_unit_spellings_in_a_file(write_toml):
    text = _edit(PISTON_TABLE, ('"50 kt", "80 kt", "110 kt"', '"50 kts", "80 KT", "110 kn"'),
                 ('fuel_capacity = "100 L"', 'fuel_capacity = "26 gal"'),
                 ('rated_power = "80 kW"', 'rated_power = "108 hp"'))
    prop = cp.read_airframe(write_toml(text)).propulsion
    assert prop.propeller.tas == pytest.approx((50 * KT, 80 * KT, 110 * KT), rel=1e-14)
    assert prop.fuel_capacity == pytest.approx(26 * US_GAL, rel=1e-12)
    assert prop.rated_power == pytest.approx(108 * HP, rel=1e-12)


@pytest.mark.parametrize("text, si_unit, expected", [
    ("120 kts", "m/s", 120 * KT),
    ("120 KT", "m/s", 120 * KT),
    ("100 nm", "m", 100 * NMI),       # aviation: nautical miles, never nanometres
    ("100 NM", "m", 100 * NMI),
    ("6 gal", "m^3", 6 * US_GAL),     # US gallon
    ("6 US gal", "m^3", 6 * US_GAL),
    ("500 fpm", "m/s", 500 * 0.3048 / 60),
    ("7777 FT", "m", 7777 * 0.3048),
    ("250 nm/h", "m/s", 250 * KT),
    ("12.5 m^2", "m^2", 12.5),
])
def test_aviation_unit_spellings(text, si_unit, expected):
    assert parse_quantity(text, si_unit) == pytest.approx(expected, rel=1e-14)


def test_delta_temperature_spelling():
    assert parse_quantity("+10 degC", "K", delta_temperature=True) == pytest.approx(10.0)
    assert parse_quantity("-18 degF", "K", delta_temperature=True) == pytest.approx(-10.0)


@pytest.mark.parametrize("text, message", [
    ("7777 kg", r"altitude: '7777 kg' is not a quantity of dimension \[length\]"),
    ("fast", r"altitude: cannot read 'fast' as a number with a unit"),
    (True, r"altitude: expected a quantity in units of m, got True"),
])
def test_unit_errors(text, message):
    with pytest.raises(cp.UnitError, match=message):
        parse_quantity(text, "m", what="altitude")
