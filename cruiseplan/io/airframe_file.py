"""Airframe files: TOML with units, validated on load; the bundled airframes.

Read with the one schema reader (:mod:`cruiseplan.io.schema`). Each model choice is a
registry entry with its fields and its builder: the airframe kinds (:data:`KIND_READERS`,
named as :data:`cruiseplan.kinds.KINDS`), the drag polars (:data:`POLAR_READERS`, named as
:data:`cruiseplan.physics.aerodynamics.POLAR_KINDS`) and the propulsion kinds
(:data:`PROPULSION_READERS`, named as :data:`cruiseplan.physics.propulsion.PROPULSION_KINDS`);
the reader asks the registry, never an ``if/elif`` over names. See DEVELOPERS.md for the
layout of a file.
"""

from __future__ import annotations

import copy
import hashlib
import math
from dataclasses import dataclass, replace
from pathlib import Path

from cruiseplan.errors import AirframeFileError, CruiseplanError, UnitError
from cruiseplan.io.bundled import bundled_files, find_file
from cruiseplan.io.schema import SchemaReader, parse_toml, read_toml
from cruiseplan.io.schema import number as _num
from cruiseplan.io.schema import quantity as _dim
from cruiseplan.kinds import KINDS, Airframe, FixedWing, Multirotor
from cruiseplan.model.tolerance import Tolerance, ToleranceCorrelation, correlation_problem
from cruiseplan.physics.aerodynamics import (
    POLAR_KINDS,
    ParabolicPolar,
    TabulatedPolar,
    induced_drag_factor,
)
from cruiseplan.physics.battery import (
    DEFAULT_TEMPERATURE,
    REFERENCE_CELSIUS,
    EquivalentCircuit,
    PackTemperature,
)
from cruiseplan.physics.dragbuildup import (
    BODY_SHAPES,
    DEFAULT_BODY_CORRELATION,
    FRICTION_LAWS,
    AttachedBody,
    BodyDrag,
    BuildUpPolar,
    Component,
    body_correlations,
    body_form_factor,
    wing_form_factor,
)
from cruiseplan.physics.propulsion import (
    FUELS,
    INTAKE_LOSS,
    POWER_LAPSE_LAWS,
    PROPULSION_KINDS,
    ActuatorDiskPropeller,
    ElectricPropeller,
    PistonPropeller,
    PowerChart,
    PropellerEfficiency,
)
from cruiseplan.physics.rotor import Rotors
from cruiseplan.ranges import RANGES
from cruiseplan.units import parse_quantity

#: Largest mass in an airframe file [kg] (:data:`cruiseplan.ranges.RANGES`).
MASS_MAX = RANGES["mass"][1]

_SCHEMA = {
    "airframe": {"name": None, "description": None, "kind": None},
    "masses": {
        "empty": _dim("kg", hi=MASS_MAX, example="'520 kg'"),
        "max_takeoff": _dim("kg", hi=MASS_MAX, example="'760 kg'"),
        "payload": _dim("kg", hi=MASS_MAX, lo_open=False, example="'170 kg'"),
    },
    "wing": {
        "area": _dim("m^2", hi=1000.0, example="'11.2 m^2'"),
        "span": _dim("m", hi=200.0, required=False, example="'9.6 m'"),
        "aspect_ratio": _num(2.0, 40.0, required=False, example="8.2"),
        "cl_max": _num(0.3, 4.0, example="1.45"),
    },
}

_EFFICIENCY = _num(0.05, 1.0, example="0.8", lo_open=True)
# Optional: with it the propeller follows actuator-disk momentum theory.
_PROPELLER_DIAMETER = _dim("m", hi=6.0, required=False, example="'1.8 m'")

_COMPONENT_SCHEMA = {
    "name": None, "friction": None,
    "wetted_area": _dim("m^2", hi=1000.0, example="'2.1 m^2'"),
    "length": _dim("m", hi=100.0, example="'0.35 m'"),
    "form_factor": _num(1.0, 3.0, required=False, example="1.2"),
    "thickness_ratio": _num(0.02, 0.3, required=False, example="0.12"),
    "fineness": _num(1.0, 50.0, required=False, example="6"),
}
_BODY_SCHEMA = {
    "name": None, "shape": None, "correlation": None,
    "diameter": _dim("m", hi=20.0, example="'0.12 m'"),
    "length": _dim("m", hi=100.0, required=False, example="'0.25 m'"),
    "count": _num(1.0, 64.0, required=False, example="2"),
}
_ROTOR_SCHEMA = {
    "count": _num(1.0, 16.0, example="4"),
    "radius": _dim("m", hi=5.0, example="'0.19 m'"),
    "blades": _num(2.0, 8.0, example="2"),
    "chord": _dim("m", hi=5.0, example="'0.025 m'"),
    "blade_cd0": _num(0.005, 0.05, example="0.012"),
    "hover_tip_speed": _dim("m/s", hi=250.0, required=False, example="'110 m/s'"),
    "hover_rpm": _dim("1/s", required=False, example="'5500 rpm'"),
    "induced_factor": _num(1.0, 1.6, required=False, example="1.15"),
}
_BODY_DRAG_SCHEMA = {
    "drag_area": _dim("m^2", lo=0.0, hi=100.0, lo_open=False, example="'0.02 m^2'"),
    "bodies": None,
}

def _propeller(r: SchemaReader, sec: dict, diameter=None):
    """A constant propeller efficiency, or a table against TAS.

    With a propeller diameter [m] that efficiency is the profile efficiency of an
    actuator-disk propeller.
    """
    if diameter is not None:
        return ActuatorDiskPropeller(diameter, _propeller(r, sec))
    raw = sec.get("propeller_efficiency")
    where = "[propulsion] propeller_efficiency"
    if isinstance(raw, dict):
        unknown = sorted(set(raw) - {"tas", "efficiency"})
        if unknown:
            r.fail(f"{where}.{unknown[0]}", "unknown field; expected tas, efficiency")
        tas = r.number_list("propulsion.propeller_efficiency", raw, "tas", 0.0, unit="m/s")
        eff = r.number_list("propulsion.propeller_efficiency", raw, "efficiency", 0.0, 1.0)
        if len(tas) != len(eff) or len(tas) < 2:
            r.fail(where, "tas and efficiency need the same length, at least 2")
        if any(b <= a for a, b in zip(tas, tas[1:])):
            r.fail(where + ".tas", "speeds must increase")
        return PropellerEfficiency(tas, eff)
    value = r.value("propulsion", sec, "propeller_efficiency", _EFFICIENCY)
    return PropellerEfficiency((0.0,), (value,))


def _components(r: SchemaReader, sec: dict):
    out = []
    for c in r.table_list(sec, "components", "polar", _COMPONENT_SCHEMA):
        given = [k for k in ("form_factor", "thickness_ratio", "fineness") if c[k] is not None]
        if len(given) > 1:
            r.fail(f"[{c['_where']}] {given[1]}", "give one of form_factor, thickness_ratio "
                                                   "(wings) or fineness (bodies)")
        ff = (c["form_factor"] if c["form_factor"] is not None
              else wing_form_factor(c["thickness_ratio"]) if c["thickness_ratio"] is not None
              else body_form_factor(c["fineness"]) if c["fineness"] is not None else 1.0)
        friction = c.get("friction", "turbulent")
        if friction not in FRICTION_LAWS:
            r.fail(f"[{c['_where']}] friction",
                   f"{friction!r} is not one of {', '.join(FRICTION_LAWS)}")
        out.append(Component(str(c.get("name", c["_where"])), c["wetted_area"], c["length"],
                             ff, friction))
    return tuple(out)


def _bodies(r: SchemaReader, sec: dict, where: str):
    out = []
    for b in r.table_list(sec, "bodies", where, _BODY_SCHEMA):
        shape = b.get("shape")
        if shape not in BODY_SHAPES:
            r.fail(f"[{b['_where']}] shape", f"{shape!r} is not one of {', '.join(BODY_SHAPES)}")
        if shape == "cylinder" and b["length"] is None:
            r.fail(f"[{b['_where']}] length", "a cylinder needs its length across the flow")
        count = b["count"] or 1.0
        if count != int(count):
            r.fail(f"[{b['_where']}] count", f"{count:g} is not a whole number")
        law = r.choice(f"[{b['_where']}]", b, "correlation", body_correlations(shape),
                       default=DEFAULT_BODY_CORRELATION[shape])
        out.append(AttachedBody(str(b.get("name", b["_where"])), shape, b["diameter"],
                                b["length"] or 0.0, int(count), law))
    return tuple(out)


def _tabulated(r: SchemaReader, sec: dict, wing: dict):
    cl = r.number_list("polar", sec, "cl", -1.0, 4.0)
    cd = r.number_list("polar", sec, "cd", 0.0, 1.0)
    if len(cl) != len(cd) or len(cl) < 3:
        r.fail("[polar] cd", "cl and cd need the same length, at least 3")
    if any(b <= a for a, b in zip(cl, cl[1:])):
        r.fail("[polar] cl", "lift coefficients must increase")
    return TabulatedPolar(cl, cd)


def _induced_factor(r: SchemaReader, vals: dict, wing: dict) -> float:
    """k, given or from Oswald's e and the aspect ratio (exactly one of them)."""
    if (vals["k"] is None) == (vals["oswald_e"] is None):
        r.fail("[polar] k", "give exactly one of k or oswald_e")
    return vals["k"] or induced_drag_factor(vals["oswald_e"], wing["aspect_ratio"])


def _parabolic(r: SchemaReader, sec: dict, wing: dict):
    vals = r.values("polar", POLAR_READERS["parabolic"].fields)
    return ParabolicPolar(vals["cd0"], _induced_factor(r, vals, wing),
                          vals["cl_min_drag"] or 0.0)


def _build_up(r: SchemaReader, sec: dict, wing: dict):
    vals = r.values("polar", POLAR_READERS["build-up"].fields)
    k = _induced_factor(r, vals, wing)
    components, bodies = _components(r, sec), _bodies(r, sec, "polar")
    if not components and not bodies:
        r.fail("[polar] components", "a build-up needs [[polar.components]] or "
                                     "[[polar.bodies]] entries")
    return BuildUpPolar(components, bodies, k, wing["area"], vals["cl_min_drag"] or 0.0,
                        vals["excrescence"] or 0.0)


def _piston(r: SchemaReader, sec: dict, vals: dict):
    fuel = r.choice("propulsion", sec, "fuel", FUELS)
    lapse = r.choice("propulsion", sec, "power_lapse", POWER_LAPSE_LAWS,
                     default="gagg-ferrar")
    density = vals["fuel_density"] or FUELS[fuel].density
    return PistonPropeller(rated_power=vals["rated_power"], bsfc=vals["bsfc"],
                           propeller=_propeller(r, sec, vals["propeller_diameter"]),
                           fuel=fuel, fuel_density=density,
                           fuel_capacity=vals["fuel_capacity"], power_lapse=lapse,
                           power_chart=_power_chart(r, sec))


_POWER_CHART_FIELDS = {
    "rated_rpm": _dim("revolution/minute", 500.0, 10000.0, example="'2700 rpm'"),
    "rated_manifold_pressure": _dim("Pa", 50000.0, 150000.0,
                                    example="'28.5 inHg'"),
    "cruise_rpm": None,
    "intake_loss": _dim("Pa", 0.0, 20000.0, required=False, lo_open=False,
                        example="'1 inHg'"),
}


def _power_chart(r: SchemaReader, sec: dict):
    """``[propulsion.power_chart]``: RPM and manifold pressure for a power setting."""
    where = "[propulsion.power_chart]"
    chart = r.section("power_chart", _POWER_CHART_FIELDS, required=False, where=where,
                      data=sec)
    if not chart:
        return None
    vals = {k: r.value(where, chart, k, spec) for k, spec in _POWER_CHART_FIELDS.items()
            if spec is not None}
    rpms = r.number_list("propulsion.power_chart", chart, "cruise_rpm", 500.0, 10000.0,
                         unit="revolution/minute")
    if any(b <= a for a, b in zip(rpms, rpms[1:])):
        r.fail(f"{where} cruise_rpm", "RPMs must increase")
    if rpms[-1] > vals["rated_rpm"]:
        r.fail(f"{where} cruise_rpm", "a cruise RPM above the rated RPM")
    return PowerChart(vals["rated_rpm"], vals["rated_manifold_pressure"], rpms,
                      INTAKE_LOSS if vals["intake_loss"] is None else vals["intake_loss"])


#: The fields of a ``[battery]`` circuit (``[battery.ocv]`` and ``[battery.temperature]``
#: are tables read by :func:`_circuit`).
_CIRCUIT_FIELDS = {
    "cells_series": _num(1.0, 400.0, example="6"),
    "cells_parallel": _num(1.0, 100.0, required=False, example="2"),
    "cell_capacity": _dim("A*s", example="'8 Ah'"),
    "cell_resistance": _dim("ohm", 0.0, 1.0, lo_open=False, example="'4 mohm'"),
    "cutoff_voltage": _dim("V", hi=5.0, example="'3.3 V'"),
    "max_current": _dim("A", required=False, example="'80 A'"),
    "max_c_rate": _num(0.0, 200.0, required=False, lo_open=True, example="10"),
    "ocv": None,
    "temperature": None,
}
#: [propulsion] fields a [battery] circuit replaces: it gives the pack's energy, voltage
#: and capacity, and its resistance replaces Peukert's law.
_PACK_FIELDS = ("battery_energy", "pack_voltage", "capacity", "peukert_exponent",
                "rating_time")


def _temperature_table(r: SchemaReader, sec: dict) -> PackTemperature:
    """``[battery.temperature]``: factors against pack temperature, or the default."""
    if "temperature" not in sec:
        return DEFAULT_TEMPERATURE
    where = "battery.temperature"
    t = r.section("temperature", {"celsius", "capacity", "resistance"}, where=f"[{where}]",
                  data=sec)
    celsius = r.number_list(where, t, "celsius", -80.0, 100.0)
    cap = r.number_list(where, t, "capacity", 0.0, 1.5)
    res = r.number_list(where, t, "resistance", 0.0, 50.0)
    if not len(celsius) == len(cap) == len(res) or len(celsius) < 2:
        r.fail(f"[{where}] capacity", "celsius, capacity and resistance need the same "
                                      "length, at least 2")
    if any(b <= a for a, b in zip(celsius, celsius[1:])):
        r.fail(f"[{where}] celsius", f"{list(celsius)}: temperatures must increase")
    if celsius[0] > REFERENCE_CELSIUS:
        r.fail(f"[{where}] celsius", f"{list(celsius)}: the table must reach "
                                     f"{REFERENCE_CELSIUS:g} degC, the reference temperature")
    return PackTemperature(celsius, cap, res, source="the airframe file's table")


def _circuit(r: SchemaReader) -> EquivalentCircuit:
    """``[battery]``: the pack as an internal-resistance equivalent circuit."""
    sec = r.section("battery", _CIRCUIT_FIELDS)
    vals = r.values("battery", _CIRCUIT_FIELDS)
    for key in ("cells_series", "cells_parallel"):
        if vals[key] is not None and vals[key] != int(vals[key]):
            r.fail(f"[battery] {key}", f"{vals[key]:g} is not a whole number")
    ns, npar = int(vals["cells_series"]), int(vals["cells_parallel"] or 1)
    ocv = r.section("ocv", {"soc", "volts"}, where="[battery.ocv]", data=sec)
    soc = r.number_list("battery.ocv", ocv, "soc", -1e-12, 1.0)
    volts = r.number_list("battery.ocv", ocv, "volts", 0.0, 5.0)
    if len(soc) != len(volts) or len(soc) < 2:
        r.fail("[battery.ocv] volts", "soc and volts need the same length, at least 2")
    if soc[0] != 0.0 or soc[-1] != 1.0 or any(b <= a for a, b in zip(soc, soc[1:])):
        r.fail("[battery.ocv] soc", f"{list(soc)}: states of charge must increase from 0 "
                                    "to 1")
    if any(b < a for a, b in zip(volts, volts[1:])):
        r.fail("[battery.ocv] volts", f"{list(volts)}: cell voltages [V] must not fall as "
                                      "the state of charge rises")
    if vals["cutoff_voltage"] >= volts[-1]:
        r.fail("[battery] cutoff_voltage", f"{sec['cutoff_voltage']!r} must be below the "
                                           f"full cell's open-circuit voltage {volts[-1]:g} V")
    if vals["max_current"] is not None and vals["max_c_rate"] is not None:
        r.fail("[battery] max_c_rate", "give max_current or max_c_rate, not both")
    pack_ah = npar * vals["cell_capacity"] / 3600.0
    max_current = (vals["max_current"] if vals["max_c_rate"] is None
                   else vals["max_c_rate"] * pack_ah)
    table = _temperature_table(r, sec)
    try:
        return EquivalentCircuit(soc, volts, ns, npar, vals["cell_capacity"],
                                 vals["cell_resistance"], vals["cutoff_voltage"], max_current,
                                 table)
    except CruiseplanError as exc:
        r.fail("[battery]", str(exc))


def _battery(r: SchemaReader, sec: dict, vals: dict, propeller):
    if "battery" in r.data:
        given = [k for k in _PACK_FIELDS if vals[k] is not None]
        if given:
            r.fail(f"[propulsion] {given[0]}", "not with a [battery] circuit, which gives the "
                                               "pack's energy, voltage and capacity (and its "
                                               "resistance replaces Peukert's law)")
        c = _circuit(r)
        return ElectricPropeller(
            battery_energy=c.store_capacity, pack_voltage=c.nominal_voltage,
            capacity=c.capacity, motor_efficiency=vals["motor_efficiency"],
            controller_efficiency=vals["controller_efficiency"], propeller=propeller,
            max_power=vals["max_power"], circuit=c)
    nominal = vals["pack_voltage"] * vals["capacity"]
    if vals["battery_energy"] > 1.02 * nominal:
        r.fail("[propulsion] battery_energy",
               f"{sec['battery_energy']!r} exceeds the pack's nominal energy "
               f"{nominal / 3600:.0f} Wh (pack_voltage x capacity)")
    return ElectricPropeller(
        battery_energy=vals["battery_energy"], pack_voltage=vals["pack_voltage"],
        capacity=vals["capacity"], motor_efficiency=vals["motor_efficiency"],
        controller_efficiency=vals["controller_efficiency"], propeller=propeller,
        max_power=vals["max_power"], peukert_exponent=vals["peukert_exponent"] or 1.0,
        rating_time=vals["rating_time"] or 3600.0)


def _electric_propeller(r: SchemaReader, sec: dict, vals: dict):
    return _battery(r, sec, vals, _propeller(r, sec, vals["propeller_diameter"]))


def _electric_rotor(r: SchemaReader, sec: dict, vals: dict):
    # A rotor's efficiency is in the momentum-theory power model itself.
    return _battery(r, sec, vals, PropellerEfficiency((0.0,), (1.0,)))


@dataclass(frozen=True)
class Reader:
    """Registry entry: the fields of one model choice in a file, and its builder.

    Attributes
    ----------
    fields : dict
        Field name to :class:`~cruiseplan.io.schema.Field` (None: read by ``build``).
    build : callable
        Makes the model object from the reader and its table.
    """

    fields: dict
    build: object


_BATTERY_FIELDS = {
    "kind": None,
    "battery_energy": _dim("J", hi=3.6e9, example="'640 Wh'"),
    "pack_voltage": _dim("V", example="'44.4 V'"),
    "capacity": _dim("A*s", example="'16 Ah'"),
    "peukert_exponent": _num(1.0, 1.6, required=False, example="1.05"),
    "rating_time": _dim("s", required=False, example="'1 h'"),
    "motor_efficiency": _EFFICIENCY,
    "controller_efficiency": _EFFICIENCY,
    "max_power": _dim("W", example="'1.2 kW'"),
}

#: Drag-polar readers by the names of :data:`cruiseplan.physics.aerodynamics.POLAR_KINDS`.
POLAR_READERS = {
    "parabolic": Reader({
        "kind": None,
        "cd0": _num(0.005, 0.3, example="0.031"),
        "k": _num(0.005, 0.5, required=False, example="0.05"),
        "oswald_e": _num(0.3, 1.0, required=False, example="0.78"),
        "cl_min_drag": _num(-0.5, 1.0, required=False, example="0.0"),
    }, _parabolic),
    "tabulated": Reader({"kind": None, "cl": None, "cd": None}, _tabulated),
    "build-up": Reader({
        "kind": None, "components": None, "bodies": None,
        "k": _num(0.005, 0.5, required=False, example="0.05"),
        "oswald_e": _num(0.3, 1.0, required=False, example="0.78"),
        "cl_min_drag": _num(-0.5, 1.0, required=False, example="0.0"),
        "excrescence": _num(0.0, 0.5, required=False, example="0.05"),
    }, _build_up),
}

#: Propulsion readers by the names of
#: :data:`cruiseplan.physics.propulsion.PROPULSION_KINDS`.
PROPULSION_READERS = {
    "piston-propeller": Reader({
        "kind": None,
        "rated_power": _dim("W", example="'80 kW' or '108 hp'"),
        "power_lapse": None,
        "bsfc": _dim("kg/J", 3e-8, 2e-7, lo_open=False, example="'0.45 lb/(hp*h)'"),
        "propeller_efficiency": None,
        "propeller_diameter": _PROPELLER_DIAMETER,
        "fuel": None,
        "fuel_capacity": _dim("m^3", hi=20.0, example="'100 L'"),
        "fuel_density": _dim("kg/m^3", 500.0, 1000.0, required=False, example="'0.72 kg/L'"),
        "power_chart": None,
    }, _piston),
    "electric-propeller": Reader({**_BATTERY_FIELDS, "propeller_efficiency": None,
                                  "propeller_diameter": _PROPELLER_DIAMETER},
                                 _electric_propeller),
    "electric-rotor": Reader(_BATTERY_FIELDS, _electric_rotor),
}

if set(POLAR_READERS) != set(POLAR_KINDS) or set(PROPULSION_READERS) != set(PROPULSION_KINDS):
    raise ImportError("the file readers and the model registries name different kinds")


def _polar(r: SchemaReader, wing: dict):
    sec = r.section("polar", None)
    kind = r.choice("polar", sec, "kind", POLAR_READERS, default="parabolic")
    r.check_fields(sec, POLAR_READERS[kind].fields, "[polar]")
    return POLAR_READERS[kind].build(r, sec, wing)


def _propulsion(r: SchemaReader, airframe_kind: str):
    sec = r.section("propulsion", None)
    kind = r.choice("propulsion", sec, "kind", PROPULSION_READERS)
    allowed = KIND_READERS[airframe_kind].propulsion
    if kind not in allowed:
        r.fail("[propulsion] kind", f"{kind!r}: a {airframe_kind} airframe takes "
                                    f"{' or '.join(allowed)}")
    reader = PROPULSION_READERS[kind]
    r.check_fields(sec, reader.fields, "[propulsion]")
    fields = reader.fields
    if "battery" in r.data:
        if not set(_PACK_FIELDS) <= set(fields):
            r.fail("[battery]", f"a {kind} engine has no battery pack")
        # A [battery] circuit gives the pack's figures: the fields it replaces are then
        # optional here, and _battery rejects them.
        fields = {k: (replace(v, required=False) if k in _PACK_FIELDS else v)
                  for k, v in fields.items()}
    return reader.build(r, sec, r.values("propulsion", fields))


def read_airframe(path, overrides=None) -> Airframe:
    """Read and validate an airframe file, optionally with some of its fields replaced.

    Parameters
    ----------
    path : str or pathlib.Path
        A TOML airframe file.
    overrides : dict, optional
        Fields replaced before the file is validated, by dotted path to a field of an
        existing table (``{"polar.cd0": 0.031, "propulsion.fuel_capacity": "90 L"}``);
        values as the file would hold them (numbers, or strings with units). A study's
        airframe axes use this, so an override is read exactly as the file would be.

    Returns
    -------
    Airframe
        The airframe in SI units, with the file path and its SHA-256 (of the file as
        written; ``overrides`` are then listed in its ``source``).

    Raises
    ------
    AirframeFileError
        Naming the file, the field, the value and what was expected.
    """
    path = Path(path)
    data, checksum = read_toml(path, AirframeFileError)
    source = path
    if overrides:
        data = _with_overrides(path, data, overrides)
        source = Path(f"{path} with " + ", ".join(f"{k} = {v!r}" for k, v in
                                                   overrides.items()))
    return _airframe(SchemaReader(source, data, AirframeFileError), path, checksum)


def _with_overrides(path, data: dict, overrides: dict) -> dict:
    """A copy of the file's tables with fields replaced by dotted path."""
    data = copy.deepcopy(data)
    for dotted, value in overrides.items():
        *tables, key = str(dotted).split(".")
        table = data
        for name in tables:
            table = table.get(name) if isinstance(table, dict) else None
        if not tables or not isinstance(table, dict) or not key:
            raise AirframeFileError(f"{path}: override {dotted!r}: expected TABLE.FIELD of a "
                                    f"table in the file ({', '.join(sorted(data))})")
        table[key] = value
    return data


def read_airframe_text(text: str, source: str = "airframe text") -> Airframe:
    """Read and validate an airframe file's text (e.g. one about to be written).

    Parameters
    ----------
    text : str
        The TOML text.
    source : str
        How errors name it.

    Returns
    -------
    Airframe
        The airframe it describes.

    Raises
    ------
    AirframeFileError
        Naming the field, the value and what was expected.
    """
    raw = text.encode("utf-8")
    data = parse_toml(raw, source, AirframeFileError)
    return _airframe(SchemaReader(source, data, AirframeFileError), Path(source),
                     hashlib.sha256(raw).hexdigest())


def _airframe(r: SchemaReader, path: Path, checksum: str) -> Airframe:
    head = r.section("airframe", _SCHEMA["airframe"], required=False)
    kind = r.choice("airframe", head, "kind", KIND_READERS, default="fixed-wing")
    sections = KIND_READERS[kind].sections
    unknown = sorted(set(r.data) - set(sections))
    if unknown:
        r.fail(f"[{unknown[0]}]", f"unknown section for a {kind} airframe; expected "
                                  f"{', '.join(sections)}")
    masses = r.values("masses", _SCHEMA["masses"])
    if masses["max_takeoff"] < masses["empty"]:
        r.fail("[masses] max_takeoff", "is below the empty mass")
    zero_fuel = masses["empty"] + masses["payload"]
    if zero_fuel > masses["max_takeoff"] * (1 + 1e-9):
        r.fail("[masses] payload", f"empty + payload = {zero_fuel:.1f} kg exceeds max_takeoff "
                                   f"{masses['max_takeoff']:.1f} kg")
    common = dict(name=str(head.get("name", path.stem)),
                  description=_description(r.source, head.get("description", "")),
                  empty_mass=masses["empty"], max_takeoff_mass=masses["max_takeoff"],
                  payload=masses["payload"], propulsion=_propulsion(r, kind),
                  source=str(path), checksum=checksum)
    common["tolerances"], common["tolerance_correlation"] = _tolerances(r, kind)
    return KIND_READERS[kind].read(r, common, masses)


def read_tolerance(raw, where: str, fail):
    """Read a relative tolerance: ``"5 %"`` (normal) or ``["-5 %", "+10 %"]`` (uniform).

    Parameters
    ----------
    raw : str or list of str
        As written in the file.
    where : str
        The field, for messages.
    fail : callable
        ``fail(where, message)`` raises the file's error.

    Returns
    -------
    Tolerance
        Fractions [-].
    """
    def fraction(text):
        try:
            return parse_quantity(text, "", what=where)
        except UnitError:
            fail(where, f"{text!r} is not a percentage such as '5 %'")

    if isinstance(raw, str):
        sd = fraction(raw)
        if not 0.0 <= sd <= 0.5:
            fail(where, f"{raw!r}: a standard deviation from 0 to 50 % is expected")
        return Tolerance("normal", sd=sd)
    if isinstance(raw, list) and len(raw) == 2 and all(isinstance(x, str) for x in raw):
        lo, hi = fraction(raw[0]), fraction(raw[1])
        if not -0.9 < lo <= hi < 1.0:
            fail(where, f"{raw!r}: a range from low to high within -90 % and +100 % is "
                        "expected")
        return Tolerance("uniform", low=lo, high=hi)
    fail(where, f"{raw!r}: expected a standard deviation such as '5 %' or a range such as "
                "['-5 %', '+10 %']")


def _tolerances(r: SchemaReader, kind: str) -> tuple:
    """The tolerances of ``[uncertainty]`` and the correlation of ``[uncertainty.correlation]``."""
    if "uncertainty" not in r.data:
        return (), None
    keys = KINDS[kind].tolerance_keys
    sec = r.section("uncertainty", dict.fromkeys(keys + ("correlation",)))
    if "bsfc" in sec and r.data["propulsion"].get("kind") != "piston-propeller":
        r.fail("[uncertainty] bsfc", "a BSFC tolerance needs a piston-propeller engine")
    if "battery_energy" in sec and r.data["propulsion"].get("kind") == "piston-propeller":
        r.fail("[uncertainty] battery_energy", "a battery-energy tolerance needs a battery")
    tolerances = tuple((k, read_tolerance(sec[k], f"[uncertainty] {k}", r.fail))
                       for k in keys if k in sec)
    return tolerances, _correlation(r, sec, dict(tolerances))


def _correlation(r: SchemaReader, sec: dict, tolerances: dict):
    """``[uncertainty.correlation]``: ``parameters = [...]`` and a ``matrix`` of rows."""
    if "correlation" not in sec:
        return None
    where = "[uncertainty.correlation]"
    table = r.section("correlation", ("parameters", "matrix"), where=where, data=sec)
    names = table.get("parameters")
    if not isinstance(names, list) or not all(isinstance(p, str) for p in names):
        r.fail(f"{where} parameters", f"{names!r}: expected a list of toleranced parameter "
                                      "names, e.g. [\"cd0\", \"oswald_e\"]")
    matrix = table.get("matrix")
    if (not isinstance(matrix, list) or not all(isinstance(row, list) for row in matrix)
            or not all(isinstance(x, (int, float)) and not isinstance(x, bool)
                       for row in matrix for x in row)):
        r.fail(f"{where} matrix", f"{matrix!r}: expected a list of rows of plain numbers, "
                                  "e.g. [[1, 0.8], [0.8, 1]]")
    problem = correlation_problem(names, matrix, tolerances)
    if problem:
        r.fail(f"{where} {problem[0]}", problem[1])
    return ToleranceCorrelation(tuple(names),
                                tuple(tuple(float(x) for x in row) for row in matrix))


def _fixed_wing(r: SchemaReader, common: dict, masses: dict) -> FixedWing:
    wing = r.values("wing", _SCHEMA["wing"])
    if (wing["span"] is None) == (wing["aspect_ratio"] is None):
        r.fail("[wing] span", "give exactly one of span or aspect_ratio")
    span = wing["span"] or math.sqrt(wing["aspect_ratio"] * wing["area"])
    aspect = span**2 / wing["area"]
    if not 2.0 <= aspect <= 40.0:
        r.fail("[wing] span", f"gives aspect ratio {aspect:.1f}; expected 2 to 40")
    polar = _polar(r, dict(wing, aspect_ratio=aspect))
    return FixedWing(wing_area=wing["area"], span=span, cl_max=wing["cl_max"], polar=polar,
                     **common)


def _multirotor(r: SchemaReader, common: dict, masses: dict):
    rot = r.values("rotors", _ROTOR_SCHEMA)
    for key in ("count", "blades"):
        if rot[key] != int(rot[key]):
            r.fail(f"[rotors] {key}", f"{rot[key]:g} is not a whole number")
    if (rot["hover_tip_speed"] is None) == (rot["hover_rpm"] is None):
        r.fail("[rotors] hover_tip_speed", "give exactly one of hover_tip_speed or hover_rpm")
    tip = rot["hover_tip_speed"] or rot["hover_rpm"] * rot["radius"]
    if rot["chord"] >= rot["radius"]:
        r.fail("[rotors] chord", "must be smaller than the radius")
    body_sec = r.section("body", _BODY_DRAG_SCHEMA)
    area = r.value("body", body_sec, "drag_area", _BODY_DRAG_SCHEMA["drag_area"])
    body = BodyDrag(area, _bodies(r, body_sec, "body"))
    return Multirotor(
        rotors=Rotors(int(rot["count"]), rot["radius"], int(rot["blades"]), rot["chord"],
                      rot["blade_cd0"], tip, rot["induced_factor"] or 1.15),
        body=body, **common)


@dataclass(frozen=True)
class KindReader:
    """Registry entry: how the file of one airframe kind is read.

    Attributes
    ----------
    sections : tuple of str
        Sections the file may have.
    propulsion : tuple of str
        Propulsion kinds the airframe kind takes.
    read : callable
        ``read(reader, common, masses)`` builds the airframe from its own sections.
    """

    sections: tuple
    propulsion: tuple
    read: object


#: Readers of the airframe kinds in :data:`cruiseplan.kinds.KINDS`, by the same names.
KIND_READERS = {
    FixedWing.kind: KindReader(
        ("airframe", "masses", "wing", "polar", "propulsion", "battery", "uncertainty"),
        ("piston-propeller", "electric-propeller"), _fixed_wing),
    Multirotor.kind: KindReader(
        ("airframe", "masses", "rotors", "body", "propulsion", "battery", "uncertainty"),
        ("electric-rotor",), _multirotor),
}


def bundled_airframes() -> dict:
    """Bundled airframe files by name (file stem), sorted.

    Returns
    -------
    dict
        Name to :class:`pathlib.Path`.
    """
    return bundled_files("airframe")


def _description(source, value) -> str:
    """The ``[airframe] description``: text, not a number, list or table."""
    if not isinstance(value, str):
        raise AirframeFileError(f"{source}: [airframe] description: {value!r} is not text; "
                                "e.g. description = 'Two-seat trainer'")
    return value


def find_airframe(name_or_path) -> Path:
    """Resolve a bundled airframe name or a file path to a path.

    Parameters
    ----------
    name_or_path : str or pathlib.Path
        ``"demo-trainer"`` or ``"my/plane.toml"``.

    Returns
    -------
    pathlib.Path
        The file.
    """
    return find_file(name_or_path, "airframe")


def load_airframe(name_or_path) -> Airframe:
    """Load a bundled airframe by name, or an airframe file by path.

    Parameters
    ----------
    name_or_path : str or pathlib.Path
        Bundled name (see ``cruiseplan airframes``) or path to a TOML file.

    Returns
    -------
    Airframe
        The validated airframe.
    """
    return read_airframe(find_airframe(name_or_path))
