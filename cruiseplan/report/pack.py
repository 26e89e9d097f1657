"""What tables, cards and plans say about a battery pack given as an equivalent circuit.

Drone crews read the pack: the current it draws, the voltage under load when the reserve
is reached, and the minutes to that reserve. Every function here returns nothing (an
empty list, or None) for an airframe without a circuit, so the outputs of other airframes
do not change.
"""

from __future__ import annotations

import numpy as np

from cruiseplan.limits import UNFLYABLE
from cruiseplan.model.mission import default_reserve
from cruiseplan.planning.reserve import reserve_required
from cruiseplan.report.output import Column


def circuit_of(airframe):
    """The airframe's pack circuit, or None.

    Parameters
    ----------
    airframe : Airframe
        Any airframe.

    Returns
    -------
    EquivalentCircuit or None
        :class:`~cruiseplan.physics.battery.EquivalentCircuit` of its propulsion.
    """
    return getattr(airframe.propulsion, "circuit", None)


def pack_line(airframe) -> str | None:
    """A header line naming the pack, its temperature and its limits.

    Parameters
    ----------
    airframe : Airframe
        The airframe, its pack at the temperature planned for.

    Returns
    -------
    str or None
        E.g. ``"Pack: 6S4P Rint circuit at 0 degC (...): 23.0 Ah, 34 mOhm, cut-off 19.2 V
        under load, at most 100 A"``; None without a circuit.
    """
    c = circuit_of(airframe)
    if c is None:
        return None
    amps = "no current limit" if c.max_current is None else f"at most {c.max_current:.0f} A"
    return (f"Pack: {c.cells_series}S{c.cells_parallel}P internal-resistance circuit at "
            f"{c.celsius:.0f} degC ({c.temperature_table.source}): "
            f"{float(np.mean(c.capacity)) / 3600:.1f} Ah, "
            f"{c.resistance * 1000:.0f} mOhm, cut-off {c.cutoff:.1f} V under load, {amps}")


def default_reserve_amount(airframe, mass) -> float:
    """The default reserve of the airframe's store [J] (25 % of a pack's usable energy).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    mass : float
        Mass [kg].

    Returns
    -------
    float
        Store kept [J].
    """
    return reserve_required(airframe, default_reserve(airframe.propulsion), mass=mass).amount


def to_reserve(airframe, shaft, store, reserve):
    """A constant-power discharge of ``store`` down to ``reserve`` or the loaded cut-off.

    Parameters
    ----------
    airframe : Airframe
        An airframe with a circuit.
    shaft : array_like
        Shaft power [W].
    store : float
        Store on board [J].
    reserve : float
        Store kept [J].

    Returns
    -------
    time : numpy.ndarray
        Time to the reserve [s]; NaN where the loaded cut-off comes first (the reserve
        cannot be flown down to at this power).
    voltage : numpy.ndarray
        Pack voltage under load at the reserve [V] (NaN as ``time``).
    current : numpy.ndarray
        Current drawn at the start [A].
    """
    prop = airframe.propulsion
    c = prop.circuit
    d = c.discharge(prop.source_power(shaft), store, keep=reserve)
    # The end is the reserve unless the cut-off (or the current limit) came first; at the
    # reserve itself the two meet, which still reaches it.
    reached = ~d.cut_off | (d.soc_end <= c.soc_of_store(reserve) + 1e-12)
    current = prop.pack_load(shaft, store).current
    return (np.where(reached, d.time, np.nan), np.where(reached, d.voltage_end, np.nan),
            current)


def pack_columns(airframe, pts, flat, reserve=None) -> list:
    """Columns of the current drawn, the voltage at the reserve and the minutes to it.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    pts : CruisePoints
        The points (their mass, store and shaft power).
    flat : callable
        Lays an array out as the table's rows.
    reserve : float, optional
        Store kept [J]; the default reserve (25 % of the usable energy) when not given.

    Returns
    -------
    list of Column
        ``amps`` [A], ``V res`` [V] and ``to res.`` [min]; empty without a circuit. Points
        beyond an unflyable limit have none.
    """
    if circuit_of(airframe) is None:
        return []
    keep = default_reserve_amount(airframe, pts.mass) if reserve is None else reserve
    t, v, i = to_reserve(airframe, pts.shaft_power, pts.store, keep)
    bad = (np.asarray(pts.limits) & int(UNFLYABLE)) != 0
    t, v = np.where(bad, np.nan, t), np.where(bad, np.nan, v)
    return [Column("amps", "A", flat(i), "{:.1f}"),
            Column("V res", "V", flat(v), "{:.1f}"),
            Column("to res.", "min", flat(t / 60.0), "{:.0f}")]


def pack_notes(airframe, reserve_text: str = "the default reserve, 25 % of the usable "
                                            "energy") -> list:
    """Notes on the pack columns (empty without a circuit).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    reserve_text : str, optional
        The reserve in words.

    Returns
    -------
    list of str
        One note line.
    """
    if circuit_of(airframe) is None:
        return []
    return [f"amps: pack current at the start; V res: pack voltage under load when only "
            f"{reserve_text} is left; to res.: minutes until then at this power ('-' where "
            "the pack reaches its cut-off voltage or current limit first)"]


def plan_columns(plan) -> list:
    """A plan's columns of the lowest pack voltage and highest current of each segment.

    Parameters
    ----------
    plan : Plan
        The planned mission (its segments' ``pack_voltage`` [V] and ``pack_current`` [A]).

    Returns
    -------
    list of Column
        ``V min`` [V] and ``A max`` [A]; empty without a circuit. Segments not flown, and
        the departure allowance, have none.
    """
    if circuit_of(plan.mission.airframe) is None:
        return []

    def values(attr):
        return [getattr(s, attr) if s.flown and np.isfinite(getattr(s, attr)) else None
                for s in plan.segments]

    return [Column("V min", "V", values("pack_voltage"), "{:.1f}"),
            Column("A max", "A", values("pack_current"), "{:.0f}")]


def mission_pack_line(mission) -> list:
    """The header line of a mission's pack, and where its temperature comes from.

    Parameters
    ----------
    mission : Mission
        The mission, its airframe's pack at the temperature planned for.

    Returns
    -------
    list of str
        One line, or none without a circuit.
    """
    line = pack_line(mission.airframe)
    if line is None:
        return []
    why = ("the mission's pack temperature" if mission.pack_temperature is not None
           else "the outside air temperature at the departure field")
    return [f"{line}; {why}; V min / A max: lowest pack voltage under load and highest "
            "current of each segment"]
