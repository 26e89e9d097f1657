"""Cruise and atmosphere tables: CruisePoints and AirState laid out as Reports.

Rows run altitude by altitude; every column carries its unit; the status column names the
limit each point breaches, and the notes spell out each code used.
"""

from __future__ import annotations

from dataclasses import replace
from datetime import date

import numpy as np

from cruiseplan.amounts import amount_unit, format_amount
from cruiseplan.cautions import CAUTIONS
from cruiseplan.constants import DEFAULT_STALL_MARGIN, T_ZERO_C
from cruiseplan.io.bundled import shown_path
from cruiseplan.io.text import format_altimeter
from cruiseplan.limits import LIMIT_CODE, LIMIT_TEXT, PACK_LIMITS, UNFLYABLE, Limit, explain
from cruiseplan.model.tolerance import tolerances_text
from cruiseplan.physics.atmosphere import indicated_altitude, isa_temperature_pressure
from cruiseplan.planning.levels import leg_variation, magnetic
from cruiseplan.planning.mission import ground_elevation
from cruiseplan.planning.optimise import pick_rule
from cruiseplan.planning.performance import UNFLYABLE_FIELDS, CruisePoints
from cruiseplan.planning.uncertainty import quantiles
from cruiseplan.report.output import Column, Report, hours_minutes, hours_minutes_list
from cruiseplan.report.pack import (
    mission_pack_line,
    pack_columns,
    pack_line,
    pack_notes,
    plan_columns,
)
from cruiseplan.units import display


def airframe_lines(airframe) -> list:
    """Header lines naming the airframe and its file with a checksum.

    Parameters
    ----------
    airframe : Airframe
        The airframe; its name, description, source file and checksum are shown.

    Returns
    -------
    list of str
        Two lines: name and description, then file and the first 16 hex digits of its
        SHA-256.
    """
    return [f"Airframe: {airframe.name} - {airframe.description}",
            f"File: {shown_path(airframe.source)} (sha256 {airframe.checksum[:16]})"]


def store_text(airframe, store: float, units: str) -> str:
    """Fuel or energy on board, in display units.

    Parameters
    ----------
    airframe : Airframe
        The airframe; its propulsion sets the kind of store and its capacity.
    store : float
        Fuel on board [kg] or usable energy [J].
    units : {"aviation", "si"}
        Display unit system.

    Returns
    -------
    str
        E.g. ``"fuel on board ... avgas)"`` or ``"usable energy on board ... (80 % of
        usable)"``.
    """
    prop = airframe.propulsion
    amount = format_amount(store, prop, units, with_mass=False)
    if prop.store.burns_mass:
        fm, lm = display("mass", units)
        return f"fuel on board {amount} ({store * fm:.1f} {lm} {prop.fuel})"
    share = store / prop.store_capacity * 100.0
    return f"usable energy on board {amount} ({share:.0f} % of usable)"


def power_chart_columns(prop, pts: CruisePoints, units: str, flat) -> list:
    """RPM and manifold pressure of each point's power, when the engine has a power chart.

    Parameters
    ----------
    prop : object
        The propulsion kind (its ``power_chart``, if any).
    pts : CruisePoints
        The points.
    units : {"aviation", "si"}
        Display units.
    flat : callable
        Lays an array out as the table's rows.

    Returns
    -------
    list of Column
        ``RPM`` [rpm] and ``MP`` [inHg or hPa]; empty without a chart. A point that needs
        full throttle at every cruise RPM shows "-".
    """
    chart = getattr(prop, "power_chart", None)
    if chart is None:
        return []
    air = pts.air
    rpm, mp = chart.setting(pts.power_fraction, air.pressure, air.temperature,
                            air.temperature - air.isa_dev)
    f, label = display("manifold_pressure", units)
    return [Column("RPM", "rpm", flat(rpm), "{:.0f}"),
            Column("MP", label, flat(mp * f), "{:.1f}")]


def store_columns(prop, pts: CruisePoints, units: str, flat, *, ground: bool = False) -> list:
    """The flow and specific-range columns of a store: fuel flow or battery power.

    Parameters
    ----------
    prop : object
        The propulsion kind.
    pts : CruisePoints
        The points.
    units : {"aviation", "si"}
        Display units.
    flat : callable
        Lays an array out as the table's rows.
    ground : bool
        Specific range over the ground (with the wind) instead of through the air.

    Returns
    -------
    list of Column
        Flow, then specific range (distance per volume of fuel or per kWh).
    """
    sr = pts.specific_range_ground if ground else pts.specific_range_air
    name = "gnd SR" if ground else "SR"
    if prop.store.burns_mass:
        fv, lv = display("volume_flow", units)
        fsr, lsr = display("sr_fuel", units)
        return [Column("fuel flow", lv, flat(pts.fuel_volume_flow * fv), "{:.1f}"),
                Column(name, lsr, flat(sr * prop.fuel_density * fsr), "{:.2f}")]
    fw, lw = display("electric_power", units)
    fsr, lsr = display("sr_energy", units)
    return [Column("battery", lw, flat(pts.source_power * fw), "{:.0f}"),
            Column(name, lsr, flat(sr * fsr), "{:.1f}")]


def endurance_column(prop, seconds) -> Column:
    """Endurance in h:mm for fuel, in minutes for batteries (drone crews count minutes).

    Parameters
    ----------
    prop : object
        The propulsion kind; whether its store burns mass picks the format.
    seconds : sequence of float or None
        Endurance per row [s]; None or NaN for a missing value.

    Returns
    -------
    Column
        ``"endurance"`` in ``h:mm`` or ``min``; a missing value is None (``"-"`` in text,
        empty in CSV, null in JSON). CSV and JSON give it in minutes [min] either way.
    """
    if prop.store.burns_mass:
        return Column("endurance", "h:mm", hours_minutes_list(seconds), "{}",
                      data=[None if t is None else t / 60.0 for t in seconds],
                      data_unit="min")
    return Column("endurance", "min", [None if t is None else t / 60.0 for t in seconds],
                  "{:.0f}")


def cruise_report(airframe, pts: CruisePoints, *, isa_dev: float, units: str | None = None,
                  title: str = "Cruise table", stall_margin: float = DEFAULT_STALL_MARGIN,
                  show_ground: bool = False) -> Report:
    """Lay out cruise points (any 2-D shape, rows by altitude) as a Report.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    pts : CruisePoints
        Points of shape (n_alt, n).
    isa_dev : float
        ISA deviation [K] the points hold for.
    units : {"aviation", "si"}
        Display unit system.
    title : str
        Report title.
    stall_margin : float
        Stall margin used, minimum TAS over stall speed [-], for the notes.
    show_ground : bool
        Add ground speed and ground range columns.

    Returns
    -------
    Report
        The table with header, notes and cautions.
    """
    units = units or airframe.propulsion.store.default_units
    shape = np.broadcast_shapes(pts.shaft_power.shape, np.shape(pts.tas))

    def flat(a):
        return np.broadcast_to(a, shape).ravel().tolist()

    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fd, ld = display("distance", units)
    prop = airframe.propulsion
    # Drones' shaft power reads better in watts than in kW or hp.
    fp, lp = display(prop.store.power_kind, units)
    cols = [
        Column("PA", la, flat(pts.air.pressure_altitude * fa), "{:.0f}"),
        Column("OAT", "degC", flat(pts.air.temperature - T_ZERO_C), "{:.0f}"),
        Column("DA", la, flat(pts.air.density_altitude * fa), "{:.0f}"),
        Column("TAS", ls, flat(pts.tas * fs), "{:.1f}"),
        Column("CAS", ls, flat(pts.cas() * fs), "{:.1f}"),
    ]
    if show_ground:
        cols.append(Column("GS", ls, flat(pts.ground_speed * fs), "{:.1f}"))
    cols += [
        Column("power", "% rated", flat(pts.power_fraction * 100.0), "{:.0f}"),
        *power_chart_columns(prop, pts, units, flat),
        Column("max", "% rated", flat(pts.power_available / pts.rated_power * 100.0),
               "{:.0f}"),
        Column("shaft", lp, flat(pts.shaft_power * fp),
               "{:.1f}" if prop.store.burns_mass else "{:.0f}"),
    ]
    cols += store_columns(prop, pts, units, flat)
    cols += [
        endurance_column(prop, flat(pts.endurance)),
        Column("range", ld, flat(pts.range_air * fd), "{:.0f}"),
    ]
    if show_ground:
        cols.append(Column("gnd range", ld, flat(pts.range_ground * fd), "{:.0f}"))
    cols += pack_columns(airframe, pts, flat)  # a pack given as a circuit
    if airframe.has_wing:  # CL, L/D and stall exist only for a wing
        cols += [
            Column("L/D", "", flat(pts.lift_to_drag), "{:.1f}"),
            Column("CL", "", flat(pts.cl), "{:.2f}"),
            Column("V/Vs", "", flat(pts.stall_speed_ratio), "{:.2f}"),
        ]
    codes = np.broadcast_to(pts.limits, shape).ravel()
    cols.append(Column("status", "", status_words(codes), "{}"))
    fm, lm = display("mass", units)
    meta = airframe_lines(airframe) + [
        f"Mass {pts.mass * fm:.1f} {lm}; {store_text(airframe, pts.store, units)}",
        f"Day: ISA {isa_dev:+.0f} K; altitudes are pressure altitudes (PA); "
        f"DA = density altitude",
        f"Range and endurance: all usable {prop.store_name} at this mass, calm air, "
        f"NO reserve" + ("; ground columns with the given wind" if show_ground else ""),
        f"Made {date.today().isoformat()} by cruiseplan",
    ]
    used = int(np.bitwise_or.reduce(codes)) if codes.size else 0
    if not np.all(np.isfinite(np.asarray(cols[2].values, dtype=float))):
        used_da = True
    else:
        used_da = False
    meta[3:3] = [line for line in (pack_line(airframe),) if line]
    notes = ["max: full-throttle (maximum continuous) shaft power at the altitude"]
    notes += pack_notes(airframe)
    notes += [f"{code}: {LIMIT_TEXT[flag]}" + (
        f" (V < {stall_margin:g} x stall speed)" if flag == Limit.STALL else
        " (V < stall speed)" if flag == Limit.BEYOND_CLMAX else "")
        for flag, code in LIMIT_CODE.items() if used & flag]
    if used & UNFLYABLE:
        pack = getattr(prop, "circuit", None) is not None
        codes_out = "/".join(code for flag, code in LIMIT_CODE.items()
                             if flag & UNFLYABLE and (pack or not flag & PACK_LIMITS))
        notes.append(f"-: not flyable ({codes_out}): no {prop.store_name} flow, specific "
                     "range, endurance or range")
    if used_da:
        notes.append("DA -: " + DA_NOTE.removeprefix("ATMOS: "))
    if airframe.hovers and np.any(np.asarray(pts.tas) == 0):
        notes.append("TAS 0: the hover (ground speed 0, range 0; endurance in the hover)")
    quantities = {"mass": (float(pts.mass), "kg"),
                  "store": (float(pts.store), prop.store.unit),
                  "isa_dev": (float(isa_dev), "K"), "reserve": (0.0, prop.store.unit)}
    return Report(title, meta, cols, notes, CAUTIONS, quantities=quantities)


def status_words(codes) -> list:
    """The short status word of each limit code (``"ok"``, ``"POWER+NOSOL"``).

    Parameters
    ----------
    codes : array_like of int
        Limit bit sets, one per row.

    Returns
    -------
    list of str
        :func:`~cruiseplan.limits.explain` of each, worked out once per distinct code.
    """
    codes = np.asarray(codes).ravel()
    unique, inverse = np.unique(codes, return_inverse=True)
    words = np.array([explain(c, short=True) for c in unique], dtype=object)
    return words[inverse.ravel()].tolist()


def atmosphere_report(air, units: str = "aviation") -> Report:
    """Lay out air states (1-D) as a Report.

    Parameters
    ----------
    air : AirState
        One-dimensional air states.
    units : {"aviation", "si"}
        Display unit system.

    Returns
    -------
    Report
        Pressure altitude, temperature, pressure, density, density ratio, density
        altitude, speed of sound and viscosity.
    """
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fpr, lpr = display("pressure", units)

    def flat(a):
        return np.ravel(a).tolist()

    cols = [
        Column("PA", la, flat(air.pressure_altitude * fa), "{:.0f}"),
        Column("OAT", "degC", flat(air.temperature - T_ZERO_C), "{:.2f}"),
        Column("ISA dev", "K", flat(air.isa_dev), "{:+.1f}"),
        Column("pressure", lpr, flat(air.pressure * fpr), "{:.2f}"),
        Column("density", "kg/m^3", flat(air.density), "{:.5f}"),
        Column("sigma", "", flat(air.sigma), "{:.4f}"),
        Column("DA", la, flat(air.density_altitude * fa), "{:.0f}"),
        Column("a", ls, flat(air.speed_of_sound * fs), "{:.1f}"),
        Column("mu", "Pa s", flat(air.viscosity), "{:.4e}"),
    ]
    meta = ["ISA (ICAO Doc 7488/3) evaluated by ambiance at pressure altitude; temperature "
            "ISA + deviation, pressure unchanged, density from the gas law"]
    notes = []
    outside = ~np.isfinite(np.ravel(air.density_altitude))
    if np.any(outside):
        cols.append(Column("status", "", ["ATMOS" if o else "ok" for o in outside], "{}"))
        notes.append(DA_NOTE)
    return Report("Atmosphere", meta, cols, notes, CAUTIONS)


#: Note of a row whose density altitude the model cannot give.
DA_NOTE = ("ATMOS: density outside the ISA densities at -5 km and 20 km; no density "
           "altitude (DA -) for that row")


def _spread_text(name, values, factor, unit, fmt="{:.0f}") -> str:

    p10, p50, p90 = (fmt.format(q * factor) for q in quantiles(values))
    return f"{name} P10 / P50 / P90 = {p10} / {p50} / {p90} {unit}"


def _spread_summary(u) -> dict:
    """Monte Carlo quantiles as flat JSON keys: mc_remaining_p10, ..."""
    out = {}
    for k, v in u.summary().items():
        if isinstance(v, tuple):
            out.update({f"mc_{k}_{q}": x for q, x in zip(("p10", "p50", "p90"), v)})
        else:
            out[f"mc_{k}"] = v
    return out


def _tolerance_note(airframe, n, seed, extra="") -> str:
    keys = tolerances_text(airframe.tolerances, airframe.tolerance_correlation)
    return (f"Uncertainty: Monte Carlo, {n} samples, seed {seed}; tolerances from the "
            f"airframe file ({keys}){extra}. P10 / P50 / P90: 10 %, 50 % and 90 % of the "
            "samples lie below.")


def best_report(airframe, best, *, isa_dev: float, units: str | None = None,
                wind_text: str = "calm", uncertainty=None) -> Report:
    """Lay out a :class:`~cruiseplan.planning.optimise.BestCruise` by altitude, best altitude first.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    best : BestCruise
        The optimiser's answer.
    isa_dev : float
        ISA deviation [K].
    units : {"aviation", "si"}
        Display unit system.
    wind_text : str
        How the wind was given, for the header.
    uncertainty : CruiseUncertainty, optional
        Monte Carlo range [m] and endurance [s] at the best altitude and speed; adds
        their spread to the header and the summary.

    Returns
    -------
    Report
        One row per altitude; the header states the best altitude and what binds.
    """
    units = units or airframe.propulsion.store.default_units
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fd, ld = display("distance", units)
    prop = airframe.propulsion
    sched, pts = best.schedule, best.points
    obj = best.objective
    n = np.size(best.altitudes)
    feasible = best.feasible
    # No flow, specific range, endurance or range where no speed is flyable (the status
    # says why): the optimiser keeps them in its points for its own search.
    pts = replace(pts, **{k: np.where(feasible, getattr(pts, k), np.nan)
                          for k in UNFLYABLE_FIELDS if getattr(pts, k) is not None})

    def flat(a):
        return np.broadcast_to(a, (n,)).tolist()

    cols = [
        Column("PA", la, flat(best.altitudes * fa), "{:.0f}"),
        Column("OAT", "degC", flat(sched.air.temperature - T_ZERO_C), "{:.0f}"),
        Column("headwind", ls, flat(sched.headwind * fs), "{:.0f}"),
        Column("V range", ls, flat(sched.tas["range"] * fs), "{:.0f}"),
        Column("V endur", ls, flat(sched.tas["endurance"] * fs), "{:.0f}"),
        Column("V econ", ls, flat(sched.tas["economy"] * fs), "{:.0f}"),
        Column("TAS", ls, flat(pts.tas * fs), "{:.1f}"),
        Column("CAS", ls, flat(pts.cas() * fs), "{:.1f}"),
        Column("GS", ls, flat(pts.ground_speed * fs), "{:.1f}"),
        Column("power", "% rated", flat(pts.power_fraction * 100.0), "{:.0f}"),
    ]
    cols += store_columns(prop, pts, units, flat, ground=True)
    cols += [
        endurance_column(prop, [t if ok else None for t, ok in
                                zip(flat(pts.endurance), feasible)]),
        Column("gnd range", ld, [r if ok else None for r, ok in
                                 zip(flat(pts.range_ground * fd), feasible)], "{:.0f}"),
        *pack_columns(airframe, replace(pts, limits=np.where(feasible, pts.limits,
                                                              int(Limit.NO_SOLUTION))), flat),
        Column("status", "", [("BEST " if i == best.best_index else "") + best.reason(i)
                              for i in range(n)], "{}"),
    ]
    b = best.best()
    fm, lm = display("mass", units)
    if b["feasible"]:
        i = best.best_index
        band = best.altitudes[best.equally_good()] * fa
        alike = (f" ({pick_rule(best.objective)}: {band.min():.0f}-{band.max():.0f} {la})"
                 if band.size > 1 else "")
        head = (f"Best altitude for {obj}: {b['altitude'] * fa:.0f} {la}{alike} at "
                f"{b['tas'] * fs:.0f} {ls} TAS ({pts.cas()[i] * fs:.0f} {ls} CAS), "
                f"ground speed {b['ground_speed'] * fs:.0f} {ls}, "
                f"{b['power_fraction'] * 100:.0f} % power; binding: {b['binding']}")
    else:
        head = f"No flyable altitude for {obj}: {b['binding']}"
    meta = airframe_lines(airframe) + [
        head,
        f"Mass {pts.mass * fm:.1f} {lm}; {store_text(airframe, pts.store, units)}",
        f"Day: ISA {isa_dev:+.0f} K; wind: {wind_text}; altitudes are pressure altitudes",
        f"Endurance and range: all usable {prop.store_name} at this speed, NO reserve, "
        "no climb or descent",
        f"Made {date.today().isoformat()} by cruiseplan",
    ]
    meta[3:3] = [line for line in (pack_line(airframe),) if line]
    notes = pack_notes(airframe) + [
        "V range / V endur / V econ: best-range, best-endurance and economy (99 % of best "
        "specific range) TAS at each altitude, within the speed constraints"]
    summary = {f"best_{k}": v for k, v in b.items()}
    summary["units"] = "SI (m, m/s, s, and m for ranges)"
    if uncertainty is not None:
        u = uncertainty
        meta.insert(3, _tolerance_note(airframe, u.range_ground.size, u.seed))
        meta.insert(4, "At the best altitude and speed: "
                    + _spread_text("ground range", u.range_ground, fd, ld) + "; "
                    + (_spread_text("endurance", u.endurance, 1 / 3600.0, "h", "{:.1f}")
                       if airframe.propulsion.store.burns_mass
                       else _spread_text("endurance", u.endurance, 1 / 60.0, "min")))
        summary.update(_spread_summary(u))
    quantities = {"mass": (float(pts.mass), "kg"),
                  "store": (float(pts.store), prop.store.unit),
                  "isa_dev": (float(isa_dev), "K"), "reserve": (0.0, prop.store.unit)}
    return Report(f"Best cruise ({obj})", meta, cols, notes, CAUTIONS, summary, quantities)


def _totals_line(plan, n_legs, fd, ld, fq, lq, qfmt) -> str:
    """The plan's totals; for a plan that fails, those of what is flown before it does."""
    flown = [s for s in plan.segments if s.flown]
    time, dist = sum(s.time for s in flown), sum(s.distance for s in flown)
    used = sum(s.used for s in flown)
    q = qfmt[2:-1]
    if len(flown) == len(plan.segments):
        return (f"Totals: {n_legs} legs, {hours_minutes(time)} h:mm, {dist * fd:.1f} {ld}, "
                f"used {used * fq:{q}} {lq}, remaining at landing "
                f"{plan.remaining * fq:{q}} {lq}")
    stop = plan.segments[len(flown)]
    return (f"Flown before the plan fails (leg {stop.leg!r}, {stop.kind}): "
            f"{hours_minutes(time)} h:mm, {dist * fd:.1f} {ld}, used {used * fq:{q}} {lq}, "
            f"left {(plan.initial - used) * fq:{q}} {lq}; the rest is not flown")


def _only_flown(column: Column, segments) -> Column:
    """The column with no values on segments that are not flown."""
    column.values = [v if s.flown else None for v, s in zip(column.values, segments)]
    return column


def plan_report(plan, units: str | None = None, uncertainty=None, remedies=None) -> Report:
    """Lay out a mission plan: one row per segment, totals and the verdict.

    Parameters
    ----------
    plan : Plan
        The planned mission.
    units : {"aviation", "si"}, optional
        Display units; aviation for piston airframes, SI for electric ones by default.
    uncertainty : PlanUncertainty, optional
        Monte Carlo re-flight of the plan: store at landing [kg or J], reserve required,
        flight time [s]; adds their spread and the reserve probability to the header.
    remedies : Remedies, optional
        What would make a NO-GO plan GO (:func:`cruiseplan.planning.nogo.what_would_make_it_go`);
        listed under the reserve.

    Returns
    -------
    Report
        Segments with altitude, TAS, ground speed, heading, time, distance, store used
        and remaining and the reserve margin; the verdict and its reasons in the header.
    """
    mission = plan.mission
    af = mission.airframe
    prop = af.propulsion
    units = units or prop.store.default_units
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fd, ld = display("distance", units)
    fq, lq, qfmt = amount_unit(prop, units)
    segs = plan.segments
    margin = [s.remaining - plan.reserve_required for s in segs]

    def flown(value):
        # Segments a NO-GO plan does not fly show no figures: what they would take is not
        # a plan.
        return [value(s) if s.flown else None for s in segs]

    cols = [
        Column("leg", "", [s.leg for s in segs], "{}"),
        Column("segment", "", [s.kind for s in segs], "{}"),
        Column("PA from", la, [s.altitude_start * fa for s in segs], "{:.0f}"),
        Column("PA to", la, [s.altitude_end * fa for s in segs], "{:.0f}"),
        *_as_flown_columns(plan, fa, la),
        Column("TAS", ls, flown(lambda s: s.tas * fs if s.time else None), "{:.0f}"),
        Column("GS", ls, flown(lambda s: s.ground_speed * fs if s.time else None), "{:.0f}"),
        _only_flown(_heading_column(plan), segs),
        Column("power", "% rated", flown(lambda s: s.power_fraction * 100 if s.time else None),
               "{:.0f}"),
        # Drones' segments last minutes: h:mm would print most of them as 0:00.
        Column("time", "h:mm", [hours_minutes(s.time) if s.flown else "-" for s in segs],
               "{}", data=flown(lambda s: s.time / 60.0), data_unit="min")
        if prop.store.burns_mass else
        Column("time", "min", flown(lambda s: s.time / 60.0), "{:.1f}"),
        Column("dist", ld, flown(lambda s: s.distance * fd), "{:.1f}"),
        Column("used", lq, flown(lambda s: s.used * fq), qfmt),
        Column("remaining", lq, flown(lambda s: s.remaining * fq), qfmt),
        Column("over reserve", lq, [m * fq if s.flown else None for s, m in zip(segs, margin)],
               qfmt),
        *plan_columns(plan),  # a pack given as a circuit
        Column("note", "", [s.note for s in segs], "{}"),
    ]
    verdict = plan.verdict if plan.go else "NO-GO: " + "; ".join(plan.reasons)
    fm, lm = display("mass", units)
    n_legs = len(mission.legs)
    meta = [f"VERDICT: {verdict}",
            f"Mission: {mission.name} - {mission.description}",
            f"File: {shown_path(mission.source)}"] + airframe_lines(af) + [
        f"Take-off mass {plan.takeoff_mass * fm:.1f} {lm}; "
        f"{store_text(af, plan.initial, units)}",
        f"Day: ISA {mission.isa_dev:+.1f} K; " + (
            "altitudes: pressure altitude (PA) and indicated on QNH "
            f"{format_altimeter(mission.altimeter)}" if mission.altimeter
            else "altitudes are pressure altitudes (PA)"),
        *_as_flown_lines(mission),
        _totals_line(plan, n_legs, fd, ld, fq, lq, qfmt),
        f"Reserve required {plan.reserve_required * fq:{qfmt[2:-1]}} {lq}: "
        f"{plan.reserve.describe(prop, units)}"
        " (local rules decide the minimum reserve)",
        f"Made {date.today().isoformat()} by cruiseplan",
    ]
    notes = ["over reserve: remaining minus the reserve required at landing",
             "Climbs at full power (or the set climb rate) and the climb speed held as "
             "indicated; descents at the set rate and the cruise indicated speed",
             *_as_flown_notes(mission)]
    summary = {"verdict": plan.verdict, "reasons": "; ".join(plan.reasons),
               "time_s": plan.time, "distance_m": plan.distance,
               f"used_{prop.store.unit}": plan.used,
               f"remaining_{prop.store.unit}": plan.remaining,
               f"reserve_required_{prop.store.unit}":
                   plan.reserve_required}
    if remedies is not None:
        at = next(k for k, line in enumerate(meta) if line.startswith("Reserve required"))
        meta[at + 1:at + 1] = ["What would make it GO (each found by re-planning with that "
                               "change alone):"] + [f"  - {line}" for line in
                                                    remedies.lines(prop, units)]
        summary.update({f"go_if_{k}": v for k, v in (
            ("reachable_m", remedies.reachable),
            (f"extra_{prop.store.unit}", remedies.extra_store),
            (f"short_when_full_{prop.store.unit}", remedies.short_when_full),
            ("max_payload_kg", remedies.max_payload),
            ("max_added_headwind_m_s", remedies.max_headwind))})
    if uncertainty is not None:
        u = uncertainty
        extra = " and the mission file (winds)" if mission.wind_tolerance else ""
        landing = _spread_text(f"{prop.store_name} at landing", u.remaining, fq, lq, qfmt)
        meta.insert(1, _tolerance_note(af, u.n, u.seed, extra))
        meta.insert(2, f"Spread: {landing}; "
                    f"{_spread_text('reserve required', u.reserve_required, fq, lq, qfmt)}; "
                    f"{_spread_text('flight time', u.time, 1 / 60.0, 'min')}; "
                    f"probability the reserve holds {u.reserve_probability * 100:.1f} %")
        summary.update(_spread_summary(u))
    st = prop.store.unit
    quantities = {"mass": (float(plan.takeoff_mass), "kg"), "store": (float(plan.initial), st),
                  "isa_dev": (float(mission.isa_dev), "K"),
                  "reserve": (float(plan.reserve_required), st),
                  "time": (float(plan.time), "s"), "distance": (float(plan.distance), "m"),
                  "used": (float(plan.used), st), "remaining": (float(plan.remaining), st)}
    if mission.altimeter:
        quantities["altimeter"] = (float(mission.altimeter), "Pa")
    return Report(f"Mission plan: {mission.name}", meta, cols, notes, CAUTIONS, summary,
                  quantities)


# --- survey plan -----------------------------------------------------------------------

def _survey_speed_text(leg, units) -> str:
    """How a survey's lines are flown, in words: a TAS, a CAS, a power or a best speed."""
    fs, ls = display("speed", units)
    if leg.tas is not None:
        return f"{leg.tas * fs:.0f} {ls} TAS"
    if leg.cas is not None:
        return f"{leg.cas * fs:.0f} {ls} CAS"
    if leg.power is not None:
        return f"{leg.power * 100:.0f} % power"
    return f"best {leg.objective or 'range'} speed"


def _point_text(p) -> str:
    return f"{p[0]:.5f}, {p[1]:.5f}"


def survey_report(splan, units: str | None = None) -> Report:
    """Lay out a survey planned in packs: one row per pack, the lines and the verdict.

    Parameters
    ----------
    splan : SurveyPlan
        The planned survey (:func:`cruiseplan.planning.survey.plan_survey`).
    units : {"aviation", "si"}, optional
        Display units; aviation for piston airframes, SI for electric ones by default.

    Returns
    -------
    Report
        Per pack: its lines, line length, flight time, store used, remaining, the reserve
        and what is left over it, and where the swap falls; the area, lines, direction
        and verdict in the header.
    """
    mission = splan.mission
    survey = mission.survey
    layout = splan.layout
    af = mission.airframe
    prop = af.propulsion
    units = units or prop.store.default_units
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fd, ld = display("distance", units)
    fq, lq, qfmt = amount_unit(prop, units)
    q = qfmt[2:-1]
    packs = splan.packs
    line_length = [sum(ln.length for ln in layout.lines[p.first - 1:p.last]) for p in packs]
    time_col = (Column("time", "h:mm", [hours_minutes(p.plan.time) for p in packs], "{}",
                       data=[p.plan.time / 60.0 for p in packs], data_unit="min")
                if prop.store.burns_mass else
                Column("time", "min", [p.plan.time / 60.0 for p in packs], "{:.1f}"))
    swap = [f"swap after line {p.last} at {_point_text(layout.lines[p.last - 1].end)}"
            if k < len(packs) - 1 or not splan.go else "last pack" for k, p in
            enumerate(packs)]
    cols = [
        Column("pack", "", [p.number for p in packs], "{:d}"),
        Column("lines", "", [f"{p.first}-{p.last}" for p in packs], "{}"),
        Column("count", "", [p.lines for p in packs], "{:d}"),
        Column("on lines", ld, [x * fd for x in line_length], "{:.2f}"),
        Column("flown", ld, [p.plan.distance * fd for p in packs], "{:.2f}"),
        time_col,
        Column("used", lq, [p.plan.used * fq for p in packs], qfmt),
        Column("remaining", lq, [p.plan.remaining * fq for p in packs], qfmt),
        Column("reserve", lq, [p.plan.reserve_required * fq for p in packs], qfmt),
        Column("over reserve", lq, [p.over_reserve * fq for p in packs], qfmt),
        Column("note", "", swap, "{}"),
    ]
    if splan.go:
        verdict = (f"GO: {len(packs)} pack{'s' if len(packs) != 1 else ''}"
                   + (f", swaps after line{'s' if len(packs) > 2 else ''} "
                      + ", ".join(str(n) for n in splan.swaps) if splan.swaps else ""))
    else:
        verdict = "NO-GO: " + "; ".join(splan.reasons)
    area_m2 = float(abs(np.dot(layout.area_xy[:, 0], np.roll(layout.area_xy[:, 1], -1))
                        - np.dot(layout.area_xy[:, 1], np.roll(layout.area_xy[:, 0], -1)))
                    / 2.0)
    spacing = f"spacing {survey.spacing * fa:.1f} {la}"
    if survey.footprint is not None:
        spacing += (f" (footprint {survey.footprint * fa:.1f} {la} x (1 - "
                    f"{survey.side_overlap * 100:.0f} % side overlap))")
    if splan.candidates is None:
        how = "given"
    else:
        use = splan.candidates[:, 1]
        how = (f"least energy of {len(use)} directions every {survey.direction_step:g} deg "
               f"(estimated {use.min() * fq:{q}} {lq} for the lines in one flight; the "
               f"costliest {use.max() * fq:{q}} {lq})")
    turn = ("no allowance" if not (survey.turn_distance or survey.turn_time) else
            f"{survey.turn_distance * fa:.0f} {la} added to each" if survey.turn_distance
            else f"{survey.turn_time:g} s added at each")
    leg = survey.leg
    w_dir, w_speed = (float(np.ravel(v)[0]) for v in leg.wind.at(leg.altitude))
    wind = ("calm" if w_speed == 0 else
            f"from {w_dir:03.0f} deg true at {w_speed * fs:.0f} {ls}")
    first = packs[0].plan if packs else None
    fm, lm = display("mass", units)
    meta = [
        f"VERDICT: {verdict}",
        f"Mission: {mission.name} - {mission.description}",
        f"File: {shown_path(mission.source)}",
        *airframe_lines(af),
        f"Area: {len(layout.area_xy)} vertices"
        + (f" from {shown_path(survey.area_source)}" if survey.area_source else "")
        + f", {area_m2 / 1e4:.1f} ha, centre {_point_text(layout.centre)}; take-off and "
          f"landing at {_point_text(survey.takeoff)}",
        f"Lines: {len(layout.lines)} in {layout.rows} rows across "
        f"{layout.width * fa:.0f} {la}, {layout.length * fd:.2f} {ld} in all; {spacing}; "
        f"direction {layout.direction:03.0f}/{layout.direction + 180:03.0f} deg true ({how})",
        f"Flown at {leg.altitude * fa:.0f} {la} pressure altitude, "
        f"{_survey_speed_text(leg, units)}; wind there {wind}; {layout.turns} turns between "
        f"rows, {turn}",
    ]
    if first is not None:
        meta.append(f"Each pack: take-off mass {first.takeoff_mass * fm:.1f} {lm}; "
                    f"{store_text(af, first.initial, units)}")
        meta.append(f"Reserve kept on every pack: {first.reserve.describe(prop, units)} "
                    "(local rules decide the minimum reserve)")
    meta += mission_pack_line(mission)
    meta += [
        f"Day: ISA {mission.isa_dev:+.1f} K; altitudes are pressure altitudes",
        *([f"What-if: {', '.join(mission.overrides)} (overrides of the mission file)"]
          if mission.overrides else []),
        f"Totals: {len(packs)} pack{'s' if len(packs) != 1 else ''}, flight time "
        f"{hours_minutes(splan.time)} h:mm (swaps on the ground not counted), used "
        f"{splan.used * fq:{q}} {lq}",
        f"Made {date.today().isoformat()} by cruiseplan",
    ]
    notes = [
        "Each pack takes off from the take-off point with the loading above, climbs over "
        "it, flies its lines in order and lands back there; the next pack resumes at the "
        "next line. Swap time on the ground is not planned.",
        "on lines: length of the pack's survey lines; flown: its whole ground track, "
        "transits and turns included",
        "over reserve: remaining at landing minus the reserve required on that pack",
        "Lines: ceil(width / spacing) rows centred across the area, cut to its edges, laid "
        "on a flat (azimuthal equidistant) projection around the area's centre, good to "
        "1e-7 in length over a few km; every line, turn and transit is a great-circle leg "
        "planned with the wind on its course",
    ]
    if splan.grouped:
        notes.append("A pack's lines and turns on one course are planned as one leg of "
                     "their summed length (the same use at a set speed in the survey "
                     "altitude's wind)")
    summary = {"verdict": splan.verdict, "reasons": "; ".join(splan.reasons),
               "packs": len(packs), "lines": len(layout.lines), "rows": layout.rows,
               "direction_deg": layout.direction,
               "direction_searched": splan.candidates is not None,
               "spacing_m": survey.spacing, "line_length_m": layout.length,
               "swaps_after_lines": list(splan.swaps), "time_s": splan.time,
               f"used_{prop.store.unit}": splan.used}
    st = prop.store.unit
    quantities = {"isa_dev": (float(mission.isa_dev), "K"), "time": (float(splan.time), "s"),
                  "used": (float(splan.used), st), "spacing": (float(survey.spacing), "m"),
                  "line_length": (float(layout.length), "m"), "area": (area_m2, "m^2"),
                  "altitude": (float(leg.altitude), "m")}
    if first is not None:
        quantities.update({"mass": (float(first.takeoff_mass), "kg"),
                           "store": (float(first.initial), st),
                           "reserve": (float(first.reserve_required), st)})
    return Report(f"Survey plan: {mission.name}", meta, cols, notes, CAUTIONS, summary,
                  quantities)


# --- altitudes and headings as flown (plan report) -------------------------------------

def _segment_legs(plan) -> list:
    """The leg of each segment, in flight order; None for the departure allowance."""
    legs = plan.mission.legs
    out, i = [], 0
    for n, seg in enumerate(plan.segments):
        j = next((k for k in range(i, len(legs)) if legs[k].name == seg.leg), None)
        if n == 0 or j is None:
            out.append(None)
            continue
        i = j
        out.append(legs[j])
    return out


def _as_read(mission, pressure_altitude) -> float:
    """A pressure altitude [m] as the crew reads it: indicated on QNH, or PA without one."""
    if mission.altimeter:
        return float(indicated_altitude(pressure_altitude, mission.altimeter))
    return float(pressure_altitude)


def _as_flown_columns(plan, fa, la) -> list:
    """IA columns on QNH, when given; heights above take-off and ground, for drones.

    Electric airframes get heights above take-off and above each leg's highest ground; all
    in display units (factor ``fa``, label ``la``).
    """
    mission = plan.mission
    segs = plan.segments
    cols = []
    if mission.altimeter:
        for name, attr in (("IA from", "altitude_start"), ("IA to", "altitude_end")):
            cols.append(Column(name, la, [_as_read(mission, getattr(s, attr)) * fa
                                          for s in segs], "{:.0f}"))
    if not mission.airframe.propulsion.store.burns_mass:
        dep = _as_read(mission, mission.profile.departure_elevation)
        ground = [None if leg is None else _as_read(mission, ground_elevation(mission, leg))
                  for leg in _segment_legs(plan)]
        for name, attr in (("HTO from", "altitude_start"), ("HTO to", "altitude_end")):
            cols.append(Column(name, la, [(_as_read(mission, getattr(s, attr)) - dep) * fa
                                          for s in segs], "{:.0f}"))
        arr = _as_read(mission, mission.profile.arrival_elevation)

        def agl(seg, g, end):
            # Over the fields the ground is the field's: a climb starts from the take-off
            # field and the last descent ends on the arrival field, not over the leg's
            # highest ground.
            a = _as_read(mission, seg.altitude_end if end else seg.altitude_start)
            if not end and seg.kind == "climb" and abs(a - dep) < 1e-6:
                return (a - dep) * fa
            if end and seg.kind == "descent to arrival":
                return (a - arr) * fa
            return None if g is None else (a - g) * fa

        for name, end in (("AGL from", False), ("AGL to", True)):
            cols.append(Column(name, la, [agl(s, g, end) for s, g in zip(segs, ground)],
                               "{:.0f}"))
    return cols


def _is_magnetic(mission) -> bool:
    """Whether the mission gives a magnetic variation (headings are then magnetic)."""
    return mission.variation != 0 or any(leg.variation is not None for leg in mission.legs)


def _heading_column(plan) -> Column:
    """Headings, magnetic (true minus variation) when the mission gives a variation."""
    mission = plan.mission
    if not _is_magnetic(mission):
        return Column("HDG", "deg T", [s.heading if s.time else None for s in plan.segments],
                      "{:03.0f}")
    values = [float(magnetic(s.heading, leg_variation(mission, leg))) if s.time else None
              for s, leg in zip(plan.segments, _segment_legs(plan))]
    return Column("HDG", "deg M", values, "{:03.0f}")


def _variation_text(variation: float) -> str:
    """A variation [deg] as crews write it: ``"5 E"``, ``"3.5 W"``."""
    if variation == 0:
        return "0"
    return f"{abs(variation):g} {'E' if variation > 0 else 'W'}"


def _as_flown_lines(mission) -> list:
    """Header lines: battery pack, magnetic variation, level rule, weather, what-ifs."""
    lines = mission_pack_line(mission)
    if _is_magnetic(mission):
        per_leg = [leg_variation(mission, leg) for leg in mission.legs]
        if len(set(per_leg)) == 1:
            given = _variation_text(per_leg[0])
        else:
            given = ", ".join(f"{leg.name} {_variation_text(v)}"
                              for leg, v in zip(mission.legs, per_leg))
        lines.append(f"Headings: magnetic (true minus variation, east positive); variation "
                     f"{given}")
    if mission.levels:
        ref = (f"indicated on QNH {format_altimeter(mission.altimeter)}" if mission.altimeter
               else "pressure altitude")
        rule = "; ".join(f"{s.label} {s.text}" for s in mission.levels)
        lines.append(f"Cruising levels by magnetic course (the mission file's rule, {ref}): "
                     f"{rule}")
    if mission.weather:
        lines.append(f"Weather: {'; '.join(mission.weather)}")
    if mission.overrides:
        lines.append(f"What-if: {', '.join(mission.overrides)} (overrides of the mission "
                     "file)")
    return lines


def _as_flown_notes(mission) -> list:
    """Notes on IA, drone heights, magnetic headings and cruising levels, as shown."""
    notes = []
    if mission.altimeter:
        notes.append("IA: indicated altitude, as the altimeter set to QNH reads (ISA "
                     "calibration, no temperature correction: on a day colder than ISA the "
                     "aircraft is lower than it reads); PA: pressure altitude")
    if not mission.airframe.propulsion.store.burns_mass:
        t_isa = float(isa_temperature_pressure(mission.profile.departure_elevation)[0])
        pct = 100.0 * mission.isa_dev / t_isa
        notes.append("HTO: height above take-off (altitude minus the departure elevation); "
                     "AGL: height above the leg's highest ground (negative where a field lies "
                     "below it); both are altimeter differences: on this day the true "
                     f"heights are about {abs(pct):.0f} % {'more' if pct >= 0 else 'less'}, "
                     "so keep height limits with that margin and as local rules require")
    if _is_magnetic(mission):
        notes.append("HDG M: true heading minus the variation given (east positive); no "
                     "compass deviation; check the variation against a current chart")
    if mission.levels:
        notes.append("Cruising levels: a best altitude is chosen among the rule's levels "
                     "for each leg's magnetic course, and a fixed altitude off them is a "
                     "NO-GO reason; local rules and air traffic control decide the level "
                     "flown")
    return notes
