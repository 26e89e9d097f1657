"""The fast unit table (issue 13): the tool's own units without pint's registry."""

import subprocess
import sys

import pytest

from cruiseplan import units
from cruiseplan.cli import main
from cruiseplan.errors import UnitError

# Compound spellings of the bundled files, the command line and the display systems.
COMPOUNDS = ["m/s", "km/h", "ft/min", "m^2", "m^3", "kg/m^3", "kg/L", "lb/(hp*h)",
             "kg/J", "kg/s", "kg/h", "lb/h", "m^3/s", "L/h", "gallon/h", "m/m^3",
             "km/L", "nmi/gallon", "m/J", "km/kWh", "nmi/kWh", "A*s", "1/s",
             "revolution/minute", "kg/(kW*h)", "m**2", "ft/s"]
SI_TARGETS = sorted(units._DIMENSION_TEXT)


def pint_factor(unit):
    """SI factor of ``unit`` by pint."""
    q = units.registry().Quantity(1.0, unit)
    return float(q.to_base_units().magnitude)


@pytest.mark.parametrize("name", sorted(units.FAST_UNITS))
def test_table_factor_agrees_with_pint(name):
    factor, dim, offset = units._fast_unit(name)
    assert offset == 0.0
    assert factor == pytest.approx(pint_factor(name), rel=1e-12)
    # Same dimension: converting to the table's SI expression of that dimension works.
    ureg = units.registry()
    dims = dict(ureg.Quantity(1.0, name).dimensionality)
    names = ("[length]", "[mass]", "[time]", "[current]", "[temperature]")
    assert dim == tuple(int(dims.get(n, 0)) for n in names)


@pytest.mark.parametrize("name", sorted(units.FAST_OFFSET_UNITS))
@pytest.mark.parametrize("value", [-40.0, 0.0, 15.0, 100.0])
def test_offset_temperatures_agree_with_pint(name, value):
    expected = units.registry().Quantity(value, name).to("K").magnitude
    assert units.parse_quantity(f"{value} {name}", "K") == pytest.approx(expected, rel=1e-12)
    assert units._fast_convert(expected, "K", name) == pytest.approx(value, rel=1e-12,
                                                                     abs=1e-12)


@pytest.mark.parametrize("name, delta", [("degC", "delta_degC"), ("degF", "delta_degF")])
def test_temperature_differences_agree_with_pint(name, delta):
    expected = units.registry().Quantity(10.0, delta).to("K").magnitude
    got = units.parse_quantity(f"+10 {name}", "K", delta_temperature=True)
    assert got == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("unit", COMPOUNDS)
def test_compound_spellings_agree_with_pint(unit):
    fast = units._fast_unit(unit)
    assert fast is not None, unit
    assert fast[0] == pytest.approx(pint_factor(unit), rel=1e-12)


@pytest.mark.parametrize("si_unit", SI_TARGETS)
def test_dimension_words_are_pints(si_unit):
    expected = str(units.registry().Quantity(1.0, si_unit).dimensionality)
    assert units._DIMENSION_TEXT[si_unit] == expected


@pytest.mark.parametrize("text, si_unit", [
    ("7777 ft", "m"), ("120 kt", "m/s"), ("120 kts", "m/s"), ("500 fpm", "m/s"),
    ("20 US gal", "m^3"), ("45 nm", "m"), ("0.46 lb/(hp*h)", "kg/J"), ("29.92 inHg", "Pa"),
    ("1013.25 hPa", "Pa"), ("2700 rpm", "revolution/minute"), ("55 %", ""),
    ("5 deg", ""), ("4 mohm", "ohm"), ("5000 mAh", "A*s"), ("0.72 kg/L", "kg/m^3"),
])
def test_parse_agrees_with_pint(text, si_unit):
    number, unit = text.split(" ", 1)
    expected = units.registry().Quantity(float(number), units.normalise_unit(unit)) \
        .to(si_unit).magnitude
    assert units.parse_quantity(text, si_unit) == pytest.approx(expected, rel=1e-12)


def test_display_factors_agree_with_pint():
    ureg = units.registry()
    for system in units.UNIT_SYSTEMS.values():
        for kind, (unit, _label) in system.items():
            si = units._SI_OF_KIND[kind]
            expected = ureg.Quantity(1.0, si).to(unit).magnitude
            assert units.conversion_factor(si, unit) == pytest.approx(expected, rel=1e-12)


def test_unit_outside_table_goes_through_pint():
    assert units._fast_unit("furlong") is None
    assert units._fast_unit("mph") is None
    assert units.parse_quantity("100 mph", "m/s") == pytest.approx(44.704, rel=1e-12)
    assert units._fast_unit("yd") is None
    assert units.parse_quantity("1 yd", "m") == pytest.approx(0.9144, rel=1e-12)
    assert units.conversion_factor("mile/hour", "m/s") == pytest.approx(0.44704, rel=1e-12)


def test_wrong_dimension_message_without_pint():
    with pytest.raises(UnitError, match=r"^--headwind: '10 kg' is not a quantity of "
                                        r"dimension \[length\] / \[time\] \(expected a "
                                        r"value in units such as m/s\)$"):
        units.parse_quantity("10 kg", "m/s", what="--headwind")


def test_malformed_expressions_are_not_fast():
    for unit in ("m/", "(m", "m^", "m^x", "m s", "2/s", "m)"):
        assert units._fast_unit(unit) is None, unit


def test_table_command_does_not_import_pint():
    code = ("import io, sys, contextlib\n"
            "from cruiseplan.cli import main\n"
            "with contextlib.redirect_stdout(io.StringIO()):\n"
            "    rc = main(['table', 'demo-trainer', '--isa-dev', '0'])\n"
            "print(rc, 'pint' in sys.modules)\n")
    out = subprocess.run([sys.executable, "-c", code], check=True, capture_output=True,
                         text=True).stdout.split()
    assert out == ["0", "False"]


def test_version(capsys):
    with pytest.raises(SystemExit) as exc:
        main(["--version"])
    assert exc.value.code == 0
    assert capsys.readouterr().out == "cruiseplan 0.1.0\n"


def test_a_bare_number_in_an_offset_default_unit_is_a_temperature():
    # 15 degC is 288.15 K (ISO 80000-5 offset); a plain factor would give 4112 K.
    from cruiseplan.units import parse_quantity

    assert parse_quantity(15, "K", default_unit="degC") == pytest.approx(288.15, rel=1e-15)
    assert parse_quantity(59, "K", default_unit="degF") == pytest.approx(288.15, rel=1e-15)
