"""Amounts of fuel or energy, read from text and written for people; defined once.

An amount is kept in SI as the store counts it: kilograms of fuel or joules of usable
energy (:class:`cruiseplan.physics.propulsion.Store`). People write fuel as a volume
(``"80 L"``, ``"20 gal"``) or a mass (``"55 kg"``), energy as ``"450 Wh"``, and either as a
share of the usable capacity (``"80 %"``). The command line, the mission files and the card
all read and print amounts through this module.
"""

from __future__ import annotations

import re

from cruiseplan.errors import UnitError
from cruiseplan.units import display, parse_quantity

_BARE_NUMBER = re.compile(r"^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$")


def examples(propulsion) -> str:
    """How an amount of this propulsion's store is written, for messages.

    Parameters
    ----------
    propulsion : object
        A propulsion kind.

    Returns
    -------
    str
        E.g. ``"'80 L', '20 gal' or '55 kg'"``.
    """
    return "'80 L', '20 gal' or '55 kg'" if propulsion.store.burns_mass else "'450 Wh'"


def parse_amount(text, propulsion, *, what: str, share: bool = True) -> float:
    """Read an amount of fuel or energy into SI (kg of fuel or J of usable energy).

    Parameters
    ----------
    text : str
        ``"80 L"``, ``"20 gal"``, ``"55 kg"`` (fuel); ``"450 Wh"`` (energy); ``"80 %"`` of
        the usable capacity when ``share`` is allowed.
    propulsion : object
        The propulsion kind whose store is meant (its fuel density converts volumes).
    what : str
        Name of the option or field, for messages.
    share : bool, optional
        Accept a percentage of the usable capacity.

    Returns
    -------
    float
        The amount [kg or J], not negative.

    Raises
    ------
    UnitError
        When the text has no unit, is of the wrong kind, negative or not finite.
    """
    if not isinstance(text, str):
        raise UnitError(f"{what}: {text!r} needs a unit, e.g. {examples(propulsion)}"
                        + (" or '80 %'" if share else ""))
    t = text.strip()
    store = propulsion.store
    if not t or _BARE_NUMBER.match(t):
        raise UnitError(f"{what}: {text!r} needs a unit, e.g. {examples(propulsion)}"
                        + (" or '80 %'" if share else ""))
    if t.endswith("%"):
        if not share:
            raise UnitError(f"{what}: {text!r}: give an amount such as {examples(propulsion)}")
        value = parse_quantity(t, "", what=what)
        if not 0.0 <= value <= 1.0:
            raise UnitError(f"{what}: {text!r} must be between 0 and 100 %")
        return value * propulsion.store_capacity
    units = (("m^3", propulsion.fuel_density), ("kg", 1.0)) if store.burns_mass \
        else (("J", 1.0),)
    for unit, factor in units:
        try:
            value = parse_quantity(t, unit, what=what) * factor
        except UnitError:
            continue
        if not value >= 0.0 or value == float("inf"):
            raise UnitError(f"{what}: {text!r} must be a finite amount, not negative")
        return value
    kinds = ["a volume", "a mass of fuel"] if store.burns_mass else ["an energy"]
    if share:
        kinds.append("a percentage of capacity")
    listed = kinds[0] if len(kinds) == 1 else "neither " + " nor ".join(kinds)
    raise UnitError(f"{what}: {text!r} is {'not ' if len(kinds) == 1 else ''}{listed}, "
                    f"e.g. {examples(propulsion)}")


def amount_unit(propulsion, units: str) -> tuple:
    """Factor, label and format of amounts of this store in a display unit system.

    Parameters
    ----------
    propulsion : object
        A propulsion kind.
    units : {"aviation", "si"}
        Display unit system.

    Returns
    -------
    factor : float
        Multiplies kg of fuel or J of energy to give the display value (a volume of fuel).
    label : str
        The unit as printed.
    fmt : str
        Format of one value, e.g. ``"{:.1f}"``.
    """
    if propulsion.store.burns_mass:
        factor, label = display("volume", units)
        return factor / propulsion.fuel_density, label, "{:.1f}"
    factor, label = display("energy", units)
    return factor, label, "{:.0f}"


def format_amount(amount: float, propulsion, units: str, *, with_mass: bool = True) -> str:
    """An amount of fuel or energy in display units.

    Parameters
    ----------
    amount : float
        Fuel [kg] or usable energy [J].
    propulsion : object
        A propulsion kind.
    units : {"aviation", "si"}
        Display unit system.
    with_mass : bool, optional
        For fuel, add the mass in brackets: ``"12.3 US gal (73.8 lb)"``.

    Returns
    -------
    str
        The amount with its unit.
    """
    factor, label, fmt = amount_unit(propulsion, units)
    text = f"{fmt.format(amount * factor)} {label}"
    if with_mass and propulsion.store.burns_mass:
        fm, lm = display("mass", units)
        text += f" ({amount * fm:.1f} {lm})"
    return text
