"""The printed cruise card for one day: a kneeboard PDF (A5) and its markdown twin.

The card holds, for one airframe file, mass and ISA deviation: a cruise table by altitude
and power setting (TAS, CAS, fuel flow or battery power, endurance, and range with and
without the reserve), the best-range and best-endurance speeds at each altitude, the
absolute and service ceilings, the reserve it keeps and the cautions in full.

:func:`card_content` computes the content once (no matplotlib here); the markdown and the
pages (:func:`cruiseplan.plots.card_pages`, and :func:`cruiseplan.plots.cruise_card` for
both at once) are laid out from it, so they say the same.

Reserves, in the order a crew would write them (``--reserve``, read by
:func:`cruiseplan.io.text.parse_reserve`), computed by
:func:`cruiseplan.planning.reserve.reserve_required` as the mission planner does:

* a time, ``"30min"``: flown at the airframe's normal cruise power (65 % for engines, 30 % for
  electric motors), as reserve rules state a time at normal cruising power;
* a fraction of the usable capacity, ``"25%"``;
* an amount, ``"10L"``, ``"7kg"`` (fuel) or ``"120Wh"`` (energy).

Defaults (:func:`cruiseplan.model.mission.default_reserve`), planning values only (local
rules decide): piston, 45 min at best-endurance power; electric, 25 % of the usable
capacity.

References
----------
.. [1] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, secs. 5.5
   (power settings), 5.7 (range and endurance), 5.11 (ceilings).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import date

import numpy as np

from cruiseplan.amounts import format_amount
from cruiseplan.cautions import CAUTION_LINE, CAUTIONS
from cruiseplan.constants import DEFAULT_STALL_MARGIN, FT, T_ZERO_C
from cruiseplan.errors import CruiseplanError
from cruiseplan.io.text import parse_reserve
from cruiseplan.limits import LIMIT_CODE, LIMIT_TEXT, UNFLYABLE, describe, explain
from cruiseplan.model.mission import default_reserve
from cruiseplan.model.tolerance import tolerances_text
from cruiseplan.physics.airspeed import cas_from_tas
from cruiseplan.planning.optimise import (
    CEILING_SEARCH_TOP,
    SERVICE_CEILING_RATE,
    best_cruise,
    ceilings,
)
from cruiseplan.planning.performance import power_setting_table, resolve_loading
from cruiseplan.planning.reserve import reserve_required
from cruiseplan.planning.uncertainty import cruise_uncertainty, quantiles
from cruiseplan.report.output import hours_minutes
from cruiseplan.report.pack import circuit_of, pack_line, to_reserve
from cruiseplan.report.tables import airframe_lines, store_text
from cruiseplan.units import display, temperature_difference, to_si
from cruiseplan.version import __version__

#: Default power settings [fraction of rated power] by store.
#: Smallest font of the card [pt]: legible on a kneeboard in turbulence.
CARD_MIN_FONT = 9.0
#: Most pages a card may take [-]; more is no longer a card.
CARD_MAX_PAGES = 4
#: Most table rows the card's pages could ever hold: CARD_MAX_PAGES A4 pages of 11.69 in x
#: 72 pt/in over a row pitch of CARD_MIN_FONT x 1.3. A card asking more is refused before
#: any row is computed; the page layout then checks the real fit.
MAX_CARD_ROWS = CARD_MAX_PAGES * int(11.69 * 72 / (CARD_MIN_FONT * 1.3))
DEFAULT_POWER = {"fuel": (0.55, 0.65, 0.75), "energy": (0.20, 0.30, 0.40)}
#: Default card altitudes [m] by store: 0-8000 ft by 2000 ft; 0-400 m by 100 m.
DEFAULT_ALTITUDES = {"fuel": tuple(np.arange(0.0, 8001.0, 2000.0) * FT),
                     "energy": (0.0, 100.0, 200.0, 300.0, 400.0)}


# --- content ------------------------------------------------------------------------------

@dataclass(frozen=True)
class CardTable:
    """A table of the card: columns (name, unit, "left"/"right"), rows of text."""

    heading: str
    columns: tuple
    rows: tuple
    groups: tuple
    notes: tuple = ()


@dataclass(frozen=True)
class CardText:
    """A block of text lines under a heading."""

    heading: str
    lines: tuple


@dataclass(frozen=True)
class CardContent:
    """Everything the card says, laid out both as markdown and as a page.

    Attributes
    ----------
    title : str
        Title line.
    meta : tuple of str
        Airframe, file and checksum, loading and day, date made.
    blocks : tuple
        :class:`CardTable` and :class:`CardText` blocks, in order.
    cautions : tuple of str
        The cautions, in full.
    footer : str
        Footer line.
    reserve : float
        Reserve kept [kg of fuel or J].
    """

    title: str
    meta: tuple
    blocks: tuple
    cautions: tuple
    footer: str
    reserve: float

    def markdown(self) -> str:
        """The card as markdown, with the same words and figures as the page."""
        out = [f"# {self.title}", ""] + [f"- {m}" for m in self.meta]
        for block in self.blocks:
            out += ["", f"## {block.heading}", ""]
            if isinstance(block, CardTable):
                names = [" ".join(n.split("\n")) for n, _, _ in block.columns]
                out.append("| " + " | ".join(f"{n} [{u}]" if u else n for n, (_, u, _)
                                             in zip(names, block.columns)) + " |")
                out.append("|" + "|".join(":---" if a == "left" else "---:"
                                          for _, _, a in block.columns) + "|")
                out += ["| " + " | ".join(row) + " |" for row in block.rows]
                if block.notes:
                    out += [""] + [f"{n}  " for n in block.notes]
            else:
                out += [f"{line}  " for line in block.lines]
        out += ["", "## Cautions", ""] + [f"- {c}" for c in self.cautions]
        out += ["", f"*{self.footer}*"]
        return "\n".join(out) + "\n"


def _cell(value, fmt: str) -> str:
    if value is None or not math.isfinite(value):
        return "-"
    text = fmt.format(value)
    return text[1:] if text.startswith("-") and not text.strip("-0.") else text


def card_content(airframe, *, altitudes=None, power_settings=None, mass=None, fuel=None,
                 payload=None, isa_dev=0.0, reserve=None, units: str | None = None,
                 stall_margin: float = DEFAULT_STALL_MARGIN, monte_carlo: int | None = None,
                 seed: int = 0, progress=None) -> CardContent:
    """Compute what the cruise card says.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    altitudes : array_like or pint.Quantity, optional
        Pressure altitudes [m], increasing; by default 0-8000 ft by 2000 ft (piston) or
        0-400 m by 100 m (electric).
    power_settings : array_like, optional
        Fractions of rated power [-]; by default 0.55, 0.65, 0.75 (piston) or 0.2, 0.3, 0.4
        (electric).
    mass, fuel, payload : float or pint.Quantity, optional
        Loading, as in :func:`cruiseplan.cruise_grid` [kg, kg or J, kg].
    isa_dev : float or pint.Quantity, optional
        ISA deviation [K].
    reserve : Reserve or str, optional
        Reserve to keep; :func:`default_reserve` when not given.
    units : {"aviation", "si"}, optional
        Display units; aviation for piston airframes, SI for electric ones by default.
    stall_margin : float, optional
        Minimum TAS over stall speed [-] (1.3, common practice).
    monte_carlo : int, optional
        Samples of the airframe's tolerances [-]: adds the spread of range and endurance
        to the reserve at the best-range altitude and speed.
    seed : int
        Seed of the Monte Carlo [-].
    progress : callable, optional
        Called as ``progress(done, total)`` [-, -] after each chunk of the Monte Carlo.

    Returns
    -------
    CardContent
        Title, header, tables, ceilings, reserve, notes and cautions.

    Raises
    ------
    CruiseplanError
        When the reserve is not less than the fuel or energy on board, or a time reserve
        cannot be flown at the lowest altitude.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.5, 5.7, 5.11.
    """
    prop = airframe.propulsion
    store_name = prop.store_name
    fuel_kind = prop.store.burns_mass
    units = units or prop.store.default_units
    h = np.atleast_1d(to_si(DEFAULT_ALTITUDES[store_name] if altitudes is None
                            else altitudes, "m", what="altitudes"))
    frac = np.atleast_1d(np.asarray(DEFAULT_POWER[store_name] if power_settings is None
                                    else power_settings, dtype=float))
    rows = h.size * frac.size + h.size
    if rows > MAX_CARD_ROWS:
        # Checked before any row is computed: no page could hold them.
        raise CruiseplanError(f"the cruise card does not fit {CARD_MAX_PAGES} pages at a "
                              f"legible size: {rows} table rows ({h.size} altitudes x "
                              f"{frac.size} power settings, and a row of speeds per "
                              f"altitude), at most {MAX_CARD_ROWS} on A4; give fewer "
                              "altitudes or power settings")
    if isinstance(reserve, str):
        reserve = parse_reserve(reserve, prop, what="reserve")
    reserve = reserve or default_reserve(prop)
    dev = temperature_difference(isa_dev)
    loading = resolve_loading(airframe, mass, fuel, payload)
    load = dict(mass=loading.mass, fuel=loading.store)

    table = power_setting_table(airframe, h, frac, isa_dev=dev, stall_margin=stall_margin,
                                **load)
    best = best_cruise(airframe, h, objective="endurance", isa_dev=dev,
                       stall_margin=stall_margin, **load)
    ceil = ceilings(airframe, isa_dev=dev, **load)
    store = table.store
    if store <= 0:
        raise CruiseplanError(f"no {store_name} on board: a cruise card needs some")

    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fd, ld = display("distance", units)

    # Reserve, in kg of fuel or J. Endurance is linear in the store for both propulsion
    # kinds (Peukert's law in Hart's form too), so a time t at power P needs t/E(P) of it.
    sched = best.schedule
    kept = reserve_required(airframe, reserve, mass=loading.mass)
    amount = kept.amount
    if amount >= store:
        raise CruiseplanError(
            f"reserve {format_amount(amount, prop, units)} is not less than the "
            f"{store_name} on board, {format_amount(store, prop, units)}: take more "
            f"{store_name} or keep a smaller reserve")
    keep = 1.0 - amount / store
    who = ("default for planning; local rules decide the minimum" if reserve.is_default
           else f"as set ({reserve.text}); local rules decide the minimum")
    reserve_line = (f"Reserve kept: {kept.describe(prop, units)} = "
                    f"{format_amount(amount, prop, units)} "
                    f"\u2014 {who}.")

    # Table 1: by altitude and power setting.
    n_alt, n_pow = table.shape
    if fuel_kind:
        fflow, lflow = display("volume_flow", units)
        flow = table.fuel_volume_flow * fflow
        flow_col, flow_fmt = ("fuel\nflow", lflow, "right"), "{:.1f}"
    else:
        fflow, lflow = display("electric_power", units)
        flow = table.source_power * fflow
        flow_col, flow_fmt = ("battery\npower", lflow, "right"), "{:.0f}"
    cas = table.cas()
    # A pack given as a circuit: minutes, the discharge to the reserve itself (not a share
    # of the total: the pack sags as it empties), the current and the voltage there.
    pack = circuit_of(airframe) is not None
    if pack:
        t_res, v_res, amps = to_reserve(airframe, table.shaft_power, store, amount)
        hidden = (table.limits & int(UNFLYABLE)) != 0
        t_res, v_res = np.where(hidden, np.nan, t_res), np.where(hidden, np.nan, v_res)
        r_res = table.tas * t_res
    else:
        t_res, r_res = table.endurance * keep, table.range_air * keep
    # Drone crews count minutes (as the tables and the hover block do); pilots h:mm.
    clock = hours_minutes if fuel_kind else _minutes
    rows, groups = [], []
    for i in range(n_alt):
        for j in range(n_pow):
            code = int(table.limits[i, j])
            rows.append((
                f"{h[i] * fa:.0f}", f"{frac[j] * 100:.0f}",
                _cell(table.tas[i, j] * fs, "{:.0f}"), _cell(cas[i, j] * fs, "{:.0f}"),
                _cell(flow[i, j], flow_fmt),
                clock(table.endurance[i, j]),
                clock(t_res[i, j]),
                _cell(table.range_air[i, j] * fd, "{:.0f}"),
                _cell(r_res[i, j] * fd, "{:.0f}"),
                *((_cell(amps[i, j], "{:.0f}"), _cell(v_res[i, j], "{:.1f}")) if pack else ()),
                explain(code, short=True) if code else ""))  # status only where not ok
            groups.append(i)
    used = int(np.bitwise_or.reduce(table.limits.ravel()))
    fp, lp = display("power" if fuel_kind else "electric_power", units)
    notes = [
        f"power: % of rated power ({table.rated_power * fp:.0f} {lp}). endur.: endurance; "
        f"total: all usable {store_name}, NO reserve; to res.: until only the reserve is "
        "left. Level flight, calm air; no allowance for taxi, climb or descent.",
    ] + [f"{code}: {LIMIT_TEXT[flag]}." for flag, code in LIMIT_CODE.items() if used & flag]
    tu = "h:mm" if fuel_kind else "min"
    columns = (("PA", la, "right"), ("power", "%", "right"), ("TAS", ls, "right"),
               ("CAS", ls, "right"), flow_col, ("endur.\ntotal", tu, "right"),
               ("endur.\nto res.", tu, "right"), ("range\ntotal", ld, "right"),
               ("range\nto res.", ld, "right"),
               *((("amps", "A", "right"), ("V at\nres.", "V", "right")) if pack else ()),
               ("status", "", "left"))
    if pack:
        notes.insert(1, "amps: pack current at the start; V at res.: pack voltage under load "
                        "when only the reserve is left ('-': the pack reaches its cut-off "
                        "voltage or current limit first, before the reserve).")
    if not used:  # every row flyable: no status column
        columns, rows = columns[:-1], [r[:-1] for r in rows]
    cruise = CardTable("Cruise by altitude and power setting", columns, tuple(rows),
                       tuple(groups), tuple(notes))

    # Table 2: best speeds by altitude.
    air = sched.air
    v_r, v_e = sched.tas["range"], sched.tas["endurance"]
    cas_r = cas_from_tas(v_r, air.pressure, air.speed_of_sound)
    cas_e = cas_from_tas(v_e, air.pressure, air.speed_of_sound)
    pts = best.points
    e_flow = (pts.fuel_volume_flow if fuel_kind else pts.source_power) * fflow
    speed_rows = []
    for i in range(n_alt):
        if not sched.feasible[i]:
            held = "not flyable: " + describe(int(sched.infeasible[i]))
        else:
            texts = {"range": describe(int(sched.binding["range"][i])),
                     "endur.": describe(int(sched.binding["endurance"][i]))}
            if texts["range"] == texts["endur."]:
                held = "-" if texts["range"] == "none" else f"both: {texts['range']}"
            else:
                held = "; ".join(f"{k}: {t}" for k, t in texts.items() if t != "none")
        speed_rows.append((
            f"{h[i] * fa:.0f}", f"{air.temperature[i] - T_ZERO_C:.0f}",
            _cell(v_r[i] * fs, "{:.0f}"), _cell(cas_r[i] * fs, "{:.0f}"),
            _cell(v_e[i] * fs, "{:.0f}"), _cell(cas_e[i] * fs, "{:.0f}"),
            _cell(pts.power_fraction[i] * 100 if sched.feasible[i] else math.nan, "{:.0f}"),
            _cell(e_flow[i] if sched.feasible[i] else math.nan, flow_fmt), held))
    speeds = CardTable(
        "Best-range and best-endurance speeds (calm air)",
        (("PA", la, "right"), ("OAT", "degC", "right"), ("best\nrange\nTAS", ls, "right"),
         ("best\nrange\nCAS", ls, "right"), ("best\nendur.\nTAS", ls, "right"),
         ("best\nendur.\nCAS", ls, "right"), ("best\nendur.\npower", "%", "right"),
         ("best\nendur.\n" + (flow_col[0].replace("\n", " ") if fuel_kind
                                else flow_col[0]), lflow, "right"),
         ("held by", "", "left")),
        tuple(speed_rows), tuple(range(n_alt)),
        (f"held by: the constraint that sets the best-range and best-endurance speed (stall "
         f"margin: {stall_margin:g} x stall speed, common practice).",))

    def ceiling_text(value, name):
        if math.isfinite(value):
            return f"{value * fa:.0f} {la}"
        if f"{name} ceiling below sea level" in ceil.note:
            return "below sea level"
        return f"above {CEILING_SEARCH_TOP * fa:.0f} {la} (not searched higher)"

    fr, lr = display("rate", units)
    rate = f"{SERVICE_CEILING_RATE * fr:.{0 if fr * SERVICE_CEILING_RATE >= 10 else 1}f} {lr}"
    day = f"pressure altitude, at this mass and ISA {dev:+.0f} K."
    if fuel_kind:
        ceiling_line = (f"Absolute ceiling {ceiling_text(ceil.absolute, 'absolute')}, "
                        f"service ceiling {ceiling_text(ceil.service, 'service')} ({rate} "
                        f"climb left); {day}")
    else:
        # An electric motor does not lapse with altitude: its ceilings lie far above where
        # a drone flies. Shown only where one comes into the card's altitudes.
        top = float(np.max(h))
        parts = [f"{name} ceiling {value * fa:.0f} {la}" for name, value in
                 (("absolute", ceil.absolute), ("service", ceil.service))
                 if math.isfinite(value) and value <= top]
        text = ", ".join(parts)
        ceiling_line = ((text[:1].upper() + text[1:] + f" ({rate} climb left at the "
                         f"service ceiling); {day}") if parts else
                        f"At least {rate} of climb left at every altitude of this card; "
                        f"{day}")
    fm, lm = display("mass", units)
    meta = tuple(airframe_lines(airframe)) + (
        f"Holds for: mass {table.mass * fm:.1f} {lm}; {store_text(airframe, store, units)}; "
        f"ISA {dev:+.0f} K; altitudes are pressure altitudes (PA); calm air.",
        *(line + "." for line in (pack_line(airframe),) if line),
        f"Made {date.today().isoformat()} by cruiseplan {__version__}.",
    )
    lines = (ceiling_line, reserve_line)
    if monte_carlo:
        lines += (_spread_line(airframe, table, store, amount, dev, h, units, stall_margin,
                               monte_carlo, seed, progress),)
    blocks = (cruise, speeds)
    if airframe.hovers:
        blocks += (_hover_block(airframe, best, store, amount, units, stall_margin),)
    blocks += (CardText("Ceilings and reserve", lines),)
    return CardContent(f"Cruise card \u2014 {airframe.name}", meta, blocks, tuple(CAUTIONS),
                       CAUTION_LINE, float(amount))


def _minutes(seconds) -> str:
    """Whole minutes, or ``"-"`` for a missing value (drone crews count minutes)."""
    return _cell(None if seconds is None else seconds / 60.0, "{:.0f}")


def _hover_block(airframe, best, store, reserve, units, stall_margin) -> CardTable:
    """Hover, best-endurance and best-range figures in minutes, for a kind that hovers.

    Parameters
    ----------
    airframe : Airframe
        A kind that hovers (:attr:`hovers`; :meth:`hover_endurance`).
    best : BestCruise
        :func:`~cruiseplan.planning.optimise.best_cruise` for endurance at the card's
        altitudes, mass and day.
    store : float
        Usable energy on board [J].
    reserve : float
        Energy kept [J].
    units : {"aviation", "si"}
        Display units.
    stall_margin : float
        Minimum TAS over stall speed [-], for the best-range search.

    Returns
    -------
    CardTable
        One row per altitude: hover endurance, best-endurance TAS and endurance, best-range
        TAS and range, each in total and to the reserve.

    References
    ----------
    .. [1] J. G. Leishman, *Principles of Helicopter Aerodynamics*, 2nd ed., Cambridge
       University Press, 2006, ch. 2 (hover power); Anderson, *Aircraft Performance and
       Design*, sec. 5.7 (best range and endurance speeds).
    """
    sched, pts = best.schedule, best.points
    air, h, mass = sched.air, best.altitudes, pts.mass
    rng = best_cruise(airframe, h, objective="range", mass=mass, fuel=store,
                      isa_dev=float(air.isa_dev[0]), stall_margin=stall_margin)
    hover = airframe.hover_endurance(mass, air, store)
    hover_res = airframe.hover_endurance(mass, air, store - reserve)
    if circuit_of(airframe) is not None:
        # A pack given as a circuit: the discharge from full to the reserve itself.
        hover_res = to_reserve(airframe, airframe.hover_power(mass, air), store, reserve)[0]
    keep = 1.0 - reserve / store
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fd, ld = display("distance", units)
    ok_e, ok_r = best.feasible, rng.feasible
    e = np.where(ok_e, pts.endurance, np.nan)
    e_res = e * keep
    if circuit_of(airframe) is not None:
        e_res = np.where(ok_e, to_reserve(airframe, pts.shaft_power, store, reserve)[0], np.nan)
    r = np.where(ok_r, rng.points.range_ground, np.nan)
    rows = tuple((
        f"{h[i] * fa:.0f}", _minutes(hover[i]), _minutes(hover_res[i]),
        _cell(sched.tas["endurance"][i] * fs, "{:.0f}"), _minutes(e[i]),
        _minutes(e_res[i]),
        _cell(rng.schedule.tas["range"][i] * fs, "{:.0f}"),
        _cell(r[i] * fd, "{:.1f}"), _cell(r[i] * keep * fd, "{:.1f}"))
        for i in range(h.size))
    columns = (("PA", la, "right"), ("hover\nendur.\ntotal", "min", "right"),
               ("hover\nendur.\nto res.", "min", "right"),
               ("best\nendur.\nTAS", ls, "right"), ("best\nendur.\ntotal", "min", "right"),
               ("best\nendur.\nto res.", "min", "right"),
               ("best\nrange\nTAS", ls, "right"), ("best\nrange\ntotal", ld, "right"),
               ("best\nrange\nto res.", ld, "right"))
    notes = ("hover: holding position in calm air (TAS 0). best endur. / best range: the "
             "speeds of the table above and the endurance or range flown there. total: all "
             "usable energy, NO reserve; to res.: until only the reserve is left. Level "
             "flight, calm air; no allowance for take-off, climb, descent or landing.",)
    return CardTable("Hover and best endurance, in minutes (calm air)", columns, rows,
                     tuple(range(h.size)), notes)


def _spread_line(airframe, table, store, reserve, dev, h, units, stall_margin, n, seed,
                 progress=None):
    """Monte Carlo spread of range and endurance to the reserve at the best-range point."""
    best = best_cruise(airframe, h, objective="range", mass=table.mass, fuel=store,
                       isa_dev=dev, stall_margin=stall_margin)
    i = best.best_index
    if i < 0:
        return "Spread: no flyable altitude for best range."
    p = best.points
    u = cruise_uncertainty(airframe, p.mass, store, best.schedule.air.row(i),
                           float(p.tas[i]), float(p.ground_speed[i]), n, seed, reserve,
                           progress=progress)
    fa, la = display("altitude", units)
    fd, ld = display("distance", units)
    fs, ls = display("speed", units)
    r = " / ".join(f"{q * fd:.0f}" for q in quantiles(u.range_ground))
    burns = airframe.propulsion.store.burns_mass
    clock, tu = (hours_minutes, "h:mm") if burns else (_minutes, "min")
    e = " / ".join(clock(q) for q in quantiles(u.endurance))
    keys = tolerances_text(airframe.tolerances, airframe.tolerance_correlation)
    return (f"Spread (Monte Carlo, {n} samples, seed {seed}; tolerances: {keys}): at "
            f"best range, {h[i] * fa:.0f} {la} and {p.tas[i] * fs:.0f} {ls} TAS, range to "
            f"reserve P10 / P50 / P90 = {r} {ld}, endurance to reserve {e} {tu}.")
