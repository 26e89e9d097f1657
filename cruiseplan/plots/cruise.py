"""Cruise figures: specific-range map, power curves, best speeds by altitude."""

from __future__ import annotations

import textwrap

import matplotlib
import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Patch
from matplotlib.ticker import MaxNLocator

from cruiseplan.constants import DEFAULT_STALL_MARGIN, MACH_LIMIT
from cruiseplan.errors import CruiseplanError
from cruiseplan.limits import LIMIT_CODE, LIMIT_DTYPE, LIMIT_TEXT, UNFLYABLE, Limit, describe
from cruiseplan.physics.atmosphere import air_state, check_altitude
from cruiseplan.planning.optimise import EQUAL_TOLERANCE, OBJECTIVES, pick_rule
from cruiseplan.planning.performance import (
    CruisePoints,
    cruise_grid,
    cruise_points,
    speed_for_min_drag,
    speed_for_min_power,
)
from cruiseplan.plots.style import (
    HALO,
    LIMIT_HATCHES,
    MIN_FONT,
    OBJECTIVE_STYLES,
    OKABE_ITO,
    PLOT_SIZE,
    SERIES_STYLES,
    figure_context,
    footer,
    isa_dev_of,
    marker_every,
    power_display,
    speed_span,
    sr_display,
)
from cruiseplan.units import display, temperature_difference, to_si

# --- (a) specific-range map ---------------------------------------------------------------

#: Continuous fields, positive inside a limit's region, that give its edge without the
#: staircase of the grid: STALL (stall margin minus V/Vs), POWER (required minus available
#: over rated) and MACH (Mach minus the model limit). Other reasons use their 0/1 mask.
LIMIT_FIELDS = {
    Limit.STALL: lambda grid, margin: margin - grid.stall_speed_ratio,
    Limit.POWER: lambda grid, margin: -grid.power_margin / grid.rated_power,
    Limit.MACH: lambda grid, margin: grid.mach() - MACH_LIMIT,
}


def _label_point(mask: np.ndarray, taken: np.ndarray):
    """Grid index deep inside ``mask`` and near its middle, avoiding ``taken``."""
    from scipy.ndimage import distance_transform_edt

    free = mask & ~taken
    use = free if free.any() else mask
    n0, n1 = mask.shape
    step = (1.0 / max(n0 - 1, 1), 1.0 / max(n1 - 1, 1))
    depth = distance_transform_edt(np.pad(use, 1), sampling=step)[1:-1, 1:-1]
    # Among the deepest points (a band has a whole line of them), the one nearest their
    # centre, so a label sits mid-band rather than at an edge of the plot.
    deep = np.argwhere(depth >= 0.9 * depth.max()) * step
    k = np.argmin(np.hypot(*(deep - deep.mean(axis=0)).T))
    return tuple(np.rint(deep[k] / step).astype(int))


def _limit_regions(grid, limits: np.ndarray, stall_margin: float) -> list:
    """(flag, mask, field) for each limit reason present; field > 0 inside the region."""
    regions = []
    shape = limits.shape
    for flag in LIMIT_HATCHES:
        mask = (limits & int(flag)) != 0
        if not mask.any():
            continue
        field = mask.astype(float) - 0.5
        if flag in LIMIT_FIELDS:
            smooth = np.broadcast_to(LIMIT_FIELDS[flag](grid, stall_margin), shape)
            finite = np.isfinite(smooth)
            # Use the smooth edge only where it says exactly what the limit bits say.
            if finite.all() and np.array_equal(smooth > 0, mask):
                field = smooth
        regions.append((flag, mask, field))
    return regions


def _shade_limits(ax, x, y, regions: list) -> list:
    """Grey out, hatch and outline each limit region and write its reason inside it."""
    handles = []
    for _, _, field in regions:  # opaque fills first, so no hatch hides under another fill
        ax.contourf(x, y, field, levels=[0.0, max(float(np.nanmax(field)), 0.0) + 1.0],
                    colors=["0.88"], zorder=3)
    taken = np.zeros(x.shape, dtype=bool)
    fig_w, fig_h = ax.figure.get_size_inches()
    n0, n1 = x.shape
    ii, jj = np.meshgrid(np.arange(n0) / max(n0 - 1, 1), np.arange(n1) / max(n1 - 1, 1),
                         indexing="ij")
    for flag, mask, field in regions:
        hatch = LIMIT_HATCHES[flag]
        top = max(float(np.nanmax(field)), 0.0) + 1.0
        with matplotlib.rc_context({"hatch.color": "0.2", "hatch.linewidth": 0.7}):
            ax.contourf(x, y, field, levels=[0.0, top], colors="none", hatches=[hatch],
                        zorder=3.5)
        if not mask.all():
            ax.contour(x, y, field, levels=[0.0], colors="0.15", linewidths=1.0, zorder=4)
        i, j = _label_point(mask, taken)
        # In axes fractions, kept far enough from the frame for the box to stay inside.
        fx = np.clip((x[i, j] - x.min()) / np.ptp(x), 0.1, 0.9)
        fy = np.clip((y[i, j] - y.min()) / np.ptp(y), 0.08, 0.92)
        text = textwrap.fill(f"{LIMIT_CODE[flag]}: {LIMIT_TEXT[flag]}", 22)
        # The box's half size in axes fractions (DejaVu Sans averages ~0.55 em a
        # character): written only where the region holds it whole, so that it covers
        # no contour label or best-speed line; the legend names the region otherwise.
        width, height = ax.get_position().width * fig_w, ax.get_position().height * fig_h
        size = (MIN_FONT + 0.5) / 72.0
        half_x = (0.55 * size * max(map(len, text.splitlines())) / 2 + 0.06) / width
        half_y = (1.25 * size * (text.count("\n") + 1) / 2 + 0.06) / height
        box = (np.abs(jj - fx) <= half_x) & (np.abs(ii - fy) <= half_y)
        handles.append(Patch(facecolor="0.88", edgecolor="0.2", hatch=hatch,
                             label=f"{LIMIT_CODE[flag]}: {LIMIT_TEXT[flag]}"))
        if not mask[box].all():
            continue
        ax.text(fx, fy, text, transform=ax.transAxes, fontsize=MIN_FONT + 0.5, ha="center",
                va="center", zorder=6,
                bbox=dict(boxstyle="round,pad=0.25", fc="white", ec="0.3", alpha=0.92))
        taken |= np.hypot(ii - ii[i, j], jj - jj[i, j]) < 0.22
    return handles


def _colour_field(airframe, grid, ground: bool) -> np.ndarray:
    """Specific range to colour the map with [m/kg or m/J]: the grid's, continued beneath.

    Points beyond an :data:`~cruiseplan.limits.UNFLYABLE` limit have no specific range
    (NaN, with the bit), and the map covers them with their limit's opaque fill, whose
    smooth edge lies between grid points. So that the colour meets that edge instead of
    stopping a grid cell short of it, the colour underneath such points is continued with
    what their power required would give (speed over the store rate of that shaft power).
    It stays beneath the fill: never labelled, never in the colour bar's range.
    """
    sr = grid.specific_range_ground if ground else grid.specific_range_air
    hidden = (grid.limits & LIMIT_DTYPE(UNFLYABLE)) != 0
    if not np.any(hidden):
        return sr
    speed = grid.ground_speed if ground else np.broadcast_to(grid.tas, grid.shape)
    with np.errstate(divide="ignore", invalid="ignore"):
        beneath = speed / airframe.propulsion.store_rate(grid.shaft_power)
    return np.where(hidden, beneath, sr)


def _held_by(best, objective: str) -> str:
    """Constraint text when one constraint holds the objective's speed at every altitude."""
    codes = best.schedule.binding[objective][best.schedule.feasible]
    texts = {describe(c) for c in np.ravel(codes)}
    return f" (held by {texts.pop()})" if len(texts) == 1 and "none" not in texts else ""


def _best_lines(ax, best, units: str) -> None:
    fa, la = display("altitude", units)
    fs, _ = display("speed", units)
    h = best.altitudes * fa
    every = marker_every(h.size)
    styles = (("range", OKABE_ITO["black"], "-", "o", (0, every)),
              ("endurance", OKABE_ITO["vermillion"], "--", "s", (every // 2, every)))
    for objective, colour, style, marker, marks in styles:
        ax.plot(best.schedule.tas[objective] * fs, h, color=colour, linestyle=style,
                marker=marker, markevery=marks, markersize=5, linewidth=1.8,
                path_effects=HALO, zorder=7,
                label=f"best-{objective} TAS{_held_by(best, objective)}")
    i = best.best_index
    if i >= 0:
        ax.plot(best.points.tas[i] * fs, h[i], marker="*", markersize=16, linestyle="none",
                markerfacecolor=OKABE_ITO["orange"], markeredgecolor="black", zorder=8,
                clip_on=False, label=f"best altitude for {best.objective}: {h[i]:.0f} {la}")


def specific_range_map(airframe, grid: CruisePoints, best=None, *, units: str | None = None,
                       ground: bool = False, wind_text: str = "calm",
                       stall_margin: float = DEFAULT_STALL_MARGIN) -> Figure:
    r"""Filled contours of specific range over pressure altitude and TAS.

    Specific range is distance per unit of fuel or energy, :math:`V/\dot s` (air) or
    :math:`V_g/\dot s` (ground) [3]_. Regions that breach a limit are greyed out, hatched
    with one pattern per :class:`~cruiseplan.limits.Limit` reason, outlined, and
    labelled with the reason's text inside the region.

    Parameters
    ----------
    airframe : Airframe
        The airframe the grid was computed for.
    grid : CruisePoints
        Cruise points of shape (n_alt, n_tas) from :func:`cruiseplan.cruise_grid`, with
        increasing altitudes and speeds (at least 2 of each).
    best : BestCruise, optional
        Optimiser answer (:func:`cruiseplan.planning.optimise.best_cruise`) whose best-range and
        best-endurance TAS lines and best altitude are drawn over the map.
    units : {"aviation", "si"}, optional
        Display units.
    ground : bool, optional
        Contour ground specific range (with the grid's wind) instead of air specific range.
    wind_text : str, optional
        How the wind was given, for the title and footer.
    stall_margin : float, optional
        Stall margin the grid was computed with [-], for a smooth STALL edge.

    Returns
    -------
    matplotlib.figure.Figure
        Altitude [ft or m] up, TAS [kt or km/h] across, specific range [nm/US gal, km/L,
        nm/kWh or km/kWh] in colour.

    Raises
    ------
    CruiseplanError
        If the grid is not at least 2 altitudes x 2 speeds, or its altitudes or speeds do
        not increase.

    References
    ----------
    .. [3] Anderson, *Aircraft Performance and Design*, sec. 5.7 (specific range).
    """
    units = units or airframe.propulsion.store.default_units
    shape = grid.shape
    if len(shape) != 2 or shape[0] < 2 or shape[1] < 2:
        raise CruiseplanError(f"a specific-range map needs a grid of at least 2 altitudes x "
                              f"2 speeds, got shape {shape}")
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    h = np.broadcast_to(grid.air.pressure_altitude, shape)[:, 0]
    v = np.broadcast_to(grid.tas, shape)[0, :]
    if np.any(np.diff(h) <= 0) or np.any(np.diff(v) <= 0):
        raise CruiseplanError("a specific-range map needs increasing altitudes and speeds")
    factor, sr_label = sr_display(airframe, units)
    sr = np.broadcast_to(_colour_field(airframe, grid, ground) * factor, shape)
    limits = np.broadcast_to(grid.limits, shape).astype(int)
    x, y = np.meshgrid(v * fs, h * fa)
    ok = (limits == 0) & np.isfinite(sr)  # levels and labels from flyable points only

    fig = Figure(figsize=PLOT_SIZE)
    ax = fig.add_axes((0.085, 0.33, 0.70, 0.56))
    cax = fig.add_axes((0.80, 0.33, 0.022, 0.56))
    ax.set_facecolor("0.88")
    kind = "ground" if ground else "air"
    if ok.any():
        lo, hi = float(sr[ok].min()), float(sr[ok].max())
        levels = MaxNLocator(nbins=10).tick_values(lo, hi)
        if levels.size < 2:
            levels = np.array([lo, lo * 1.001 + 1e-9])
        # Colours over every computed point (limit regions are covered below), so the
        # colour meets each limit's smooth edge; levels span the flyable points only.
        z = np.ma.masked_invalid(sr)
        filled = ax.contourf(x, y, z, levels=levels, cmap="cividis", extend="both", zorder=1)
        ax.contour(x, y, z, levels=levels, colors="black", linewidths=0.4, zorder=2)
        labelled = ax.contour(x, y, np.ma.masked_where(~ok, sr), levels=levels[1::2],
                              colors="none", linewidths=0)
        for text in ax.clabel(labelled, fontsize=MIN_FONT, fmt="%.3g", colors="black",
                              inline=False):
            text.set_zorder(5)
            text.set_bbox(dict(boxstyle="square,pad=0.05", fc="white", ec="none", alpha=0.7))
        bar = fig.colorbar(filled, cax=cax)
        bar.set_label(f"{kind} specific range [{sr_label}]", fontsize=9)
        bar.ax.tick_params(labelsize=8)
    else:
        cax.set_axis_off()
        ax.text(0.5, 0.5, "no flyable point on this grid", transform=ax.transAxes,
                ha="center", va="center", fontsize=11, zorder=9,
                bbox=dict(fc="white", ec="black"))
    handles = _shade_limits(ax, x, y, _limit_regions(grid, limits, stall_margin))
    if best is not None:
        _best_lines(ax, best, units)
    ax.set_xlim(x.min(), x.max())
    ax.set_ylim(y.min(), y.max())
    ax.set_xlabel(f"true airspeed, TAS [{ls}]", fontsize=9.5)
    ax.set_ylabel(f"pressure altitude [{la}]", fontsize=9.5)
    ax.tick_params(labelsize=8.5)
    # Title and the wind on lines of their own above the axes: a long wind text wraps
    # within the figure's width instead of running off its top.
    fig.text(0.5, 0.985, f"{kind.capitalize()} specific range \u2014 {airframe.name}",
             fontsize=11, ha="center", va="top")
    fig.text(0.5, 0.942, textwrap.fill(f"wind {wind_text}" if ground else "calm air", 110),
             fontsize=MIN_FONT + 1, ha="center", va="top")
    line_handles, _ = ax.get_legend_handles_labels()
    if line_handles or handles:
        ax.legend(handles=line_handles + handles, loc="upper center",
                  bbox_to_anchor=(0.5, -0.1), ncol=2, fontsize=MIN_FONT + 0.5,
                  frameon=False)
    footer(fig, figure_context(airframe, grid.mass, grid.store, isa_dev_of(grid.air), units,
                          f"wind {wind_text}"))
    return fig


# --- (b) power curves ---------------------------------------------------------------------

def power_curves(airframe, altitudes, *, tas=None, mass=None, fuel=None, payload=None,
                 isa_dev=0.0, units: str | None = None,
                 stall_margin: float = DEFAULT_STALL_MARGIN) -> Figure:
    r"""Shaft power required and available against TAS at several altitudes.

    Power required is :math:`P = D V / \eta_p`; power available is full-throttle shaft power
    after the power lapse [3]_. Each altitude has its own colour, line style and marker;
    the minimum-power speed (best endurance; at the stall speed where the polar's minimum
    lies beyond CLmax), the minimum-drag speed ((L/D)max, best range in calm air with
    constant propeller efficiency) and the stall-margin speed (slowest cruise) are marked
    on each curve. Curves start at the stall speed (CLmax).

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    altitudes : array_like or pint.Quantity
        Pressure altitudes [m], at most 7.
    tas : array_like or pint.Quantity, optional
        True airspeeds [m/s]; by default :func:`speed_span`.
    mass, fuel, payload : float or pint.Quantity, optional
        Loading, as in :func:`cruiseplan.cruise_grid`: mass [kg], fuel [kg] or usable
        energy [J], payload [kg].
    isa_dev : float or pint.Quantity, optional
        ISA deviation [K].
    units : {"aviation", "si"}, optional
        Display units.
    stall_margin : float, optional
        Minimum TAS over stall speed [-], for the grid's limits.

    Returns
    -------
    matplotlib.figure.Figure
        Shaft power [hp, kW or W] against TAS [kt or km/h].

    Raises
    ------
    CruiseplanError
        For no altitude or more than the 7 styled series, or altitudes outside the
        atmosphere model.

    References
    ----------
    .. [3] Anderson, *Aircraft Performance and Design*, secs. 5.4-5.5.
    """
    units = units or airframe.propulsion.store.default_units
    h = check_altitude(np.atleast_1d(to_si(altitudes, "m", what="altitudes")))
    if h.ndim != 1 or not 1 <= h.size <= len(SERIES_STYLES):
        raise CruiseplanError(f"a power plot shows 1 to {len(SERIES_STYLES)} altitudes, got "
                              f"{h.size}: give fewer altitudes")
    dev = temperature_difference(isa_dev)
    grid = cruise_grid(airframe, h, speed_span(airframe, h, mass=mass, fuel=fuel,
                                               payload=payload, isa_dev=dev)
                       if tas is None else tas, mass=mass, fuel=fuel, payload=payload,
                       isa_dev=dev, stall_margin=stall_margin)
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fp, lp = power_display(airframe, units)
    v = np.broadcast_to(grid.tas, grid.shape)[0] * fs
    air = air_state(h, dev)
    v_stall = airframe.stall_speed(grid.mass, air.density)
    v_min_power = speed_for_min_power(airframe, grid.mass, air)
    # Where the polar's minimum-power point lies beyond CLmax, the curve's flyable
    # minimum is at the stall speed.
    clipped = v_min_power < v_stall
    special = {"min": np.maximum(v_min_power, v_stall),
               "ld": speed_for_min_drag(airframe, grid.mass, air),
               "margin": stall_margin * v_stall}
    special_power = {k: cruise_points(airframe, grid.mass, air, s, grid.store).shaft_power
                     for k, s in special.items()}
    marks = {"min": dict(marker="*", markersize=13, markeredgecolor="black"),
             "ld": dict(marker="h", markersize=10, markeredgecolor="black"),
             "margin": dict(marker="|", markersize=14, markeredgewidth=2.0,
                            markeredgecolor="black")}
    rotor = not airframe.has_wing
    if rotor:
        # No stall and no (L/D)max for a multirotor: its drag is least in the hover.
        marks = {"min": marks["min"]}
    below_stall = np.broadcast_to(grid.tas, grid.shape) < v_stall[:, None] * (1 - 1e-9)
    required = np.where(below_stall, np.nan, grid.shaft_power) * fp
    available = grid.power_available[:, 0] * fp

    fig = Figure(figsize=PLOT_SIZE)
    ax = fig.add_axes((0.085, 0.2, 0.60, 0.7))
    one_available = np.allclose(available, available[0])
    every = marker_every(v.size)
    for i, (colour, style, marker) in enumerate(SERIES_STYLES[:h.size]):
        # Markers staggered along the curves, so curves that nearly coincide (a drone's
        # few hundred metres) still show each series' marker apart from the others'.
        ax.plot(v, required[i], color=colour, linestyle=style, marker=marker, markersize=4.5,
                markevery=(i * every // h.size, every), linewidth=1.8,
                label=f"required at {h[i] * fa:.0f} {la}")
        if not one_available:
            ax.plot(v, np.full(v.shape, available[i]), color=colour, linestyle=style,
                    linewidth=1.0)
            # At the slow end, where power required lies well below full throttle: no
            # curve crosses the label there.
            ax.text(v[0] + 0.01 * np.ptp(v), available[i], f"full throttle {h[i] * fa:.0f} {la}",
                    fontsize=MIN_FONT, ha="left", va="bottom", color=colour,
                    path_effects=HALO)
        for key, style_kw in marks.items():
            ax.plot(special[key][i] * fs, special_power[key][i] * fp, linestyle="none",
                    markerfacecolor=colour, zorder=5, **style_kw)
    if one_available:
        ax.axhline(available[0], color="black", linewidth=1.2)
        ax.text(v[0] + 0.01 * np.ptp(v), available[0],
                "maximum continuous shaft power (all altitudes)",
                fontsize=MIN_FONT + 0.5, ha="left", va="bottom", path_effects=HALO)
    top = max(np.nanmax(available), np.nanmax(required[np.isfinite(required)], initial=0.0))
    ax.set_ylim(0.0, 1.12 * min(top, 1.6 * np.nanmax(available)))
    ax.set_xlim(v[0], v[-1])
    ax.set_xlabel(f"true airspeed, TAS [{ls}]", fontsize=9.5)
    ax.set_ylabel(f"shaft power [{lp}]", fontsize=9.5)
    ax.tick_params(labelsize=8.5)
    ax.grid(True, color="0.85", linewidth=0.6)
    ax.set_title(f"Shaft power required and available \u2014 {airframe.name}", fontsize=11)
    handles, _ = ax.get_legend_handles_labels()
    handles += [
        Line2D([], [], color="black", linewidth=1.0, label="power available\n(full throttle)"),
        Line2D([], [], linestyle="none", markerfacecolor="white",
               label="minimum power\n(best endurance)", **marks["min"]),
    ]
    if not rotor:
        handles += [
            Line2D([], [], linestyle="none", markerfacecolor="white",
                   label="(L/D)max, minimum drag\n(best range, calm air)", **marks["ld"]),
            Line2D([], [], linestyle="none", label=f"{stall_margin:g} x stall speed\n"
                   "(slowest cruise)", **marks["margin"])]
    ax.legend(handles=handles, loc="upper left", bbox_to_anchor=(1.02, 1.0),
              fontsize=MIN_FONT + 0.5, frameon=False, labelspacing=0.9)
    if not airframe.has_wing:
        note = ("A multirotor needs power to hover; induced power falls and parasite power "
                "rises with speed (momentum theory). Level flight is possible where power "
                "required is below power available.")
    else:
        note = (f"Curves start at the stall speed (CLmax {airframe.cl_max:g}); cruise at "
                f"{stall_margin:g} x stall speed or faster (common practice). Level flight "
                "is possible where power required is below power available.")
    if np.any(clipped):
        note += (" Where the polar's minimum-power point lies beyond CLmax, the star "
                 "sits at the stall speed.")
    if h.size > 1:
        # A drone's few hundred metres barely change its curves: say so, since their
        # lines and marks then lie on top of one another.
        with np.errstate(invalid="ignore", divide="ignore"):
            spread = np.nanmax(np.abs(required / required[:1] - 1.0), initial=np.nan)
        if np.isfinite(spread) and spread < 0.05:
            note += (f" The curves of all {h.size} altitudes lie within "
                     f"{max(spread * 100, 0.1):.1f} % of each other: their marks overlap.")
    fig.text(0.71, 0.2, textwrap.fill(note, 40), fontsize=MIN_FONT + 0.5, va="bottom",
             ha="left")
    footer(fig, figure_context(airframe, grid.mass, grid.store, dev, units))
    return fig


# --- (c) altitude profile -----------------------------------------------------------------

def _runs(mask: np.ndarray) -> list:
    """(first, last) index of each run of True in a boolean vector."""
    edges = np.diff(np.concatenate([[0], mask.astype(int), [0]]))
    return list(zip(np.flatnonzero(edges == 1), np.flatnonzero(edges == -1) - 1))


def altitude_profile(airframe, calm, wind=None, *, units: str | None = None,
                     wind_text: str = "wind") -> Figure:
    """Best TAS and ground specific range against altitude, calm (solid) and in wind (dashed).

    Left: best-range, best-endurance and economy TAS at each altitude (colour and marker by
    objective; filled markers in calm air, hollow in wind). Right: ground specific range at
    the objective's speed of each answer, with each answer's best altitude starred.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    calm : BestCruise
        Optimiser answer in calm air (:func:`cruiseplan.planning.optimise.best_cruise`).
    wind : BestCruise, optional
        The same question with the day's wind.
    units : {"aviation", "si"}, optional
        Display units.
    wind_text : str, optional
        How the wind was given, for the subtitle.

    Returns
    -------
    matplotlib.figure.Figure
        Two panels sharing the altitude axis [ft or m].

    References
    ----------
    .. [3] Anderson, *Aircraft Performance and Design*, sec. 5.7 (best range and endurance
       speeds).
    """
    units = units or airframe.propulsion.store.default_units
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    factor, sr_label = sr_display(airframe, units)
    fig = Figure(figsize=PLOT_SIZE)
    ax_v = fig.add_axes((0.085, 0.34, 0.42, 0.54))
    ax_sr = fig.add_axes((0.56, 0.34, 0.42, 0.54), sharey=ax_v)
    cases = [("calm air", calm, "-", True)]
    if wind is not None:
        cases.append(("wind", wind, "--", False))
    best_lines = []
    for case, best, style, filled in cases:
        h = best.altitudes * fa
        every = marker_every(h.size, 10)
        for k, objective in enumerate(OBJECTIVES):
            colour, marker = OBJECTIVE_STYLES[objective]
            ax_v.plot(best.schedule.tas[objective] * fs, h, color=colour, linestyle=style,
                      marker=marker, markevery=(k * every // 3, every), markersize=5,
                      linewidth=1.6, markerfacecolor=colour if filled else "white")
        sr = np.where(best.feasible, best.points.specific_range_ground, np.nan) * factor
        ax_sr.plot(sr, h, color="black", linestyle=style, marker="o", markevery=every,
                   markersize=5, linewidth=1.6, markerfacecolor="black" if filled else "white")
        i = best.best_index
        if i >= 0:
            ax_sr.plot(sr[i], h[i], marker="*", markersize=16, linestyle="none", zorder=6,
                       markerfacecolor=OKABE_ITO["orange"] if filled else "white",
                       markeredgecolor="black", clip_on=False)
            band = best.equally_good()
            for lo_k, hi_k in _runs(band):  # each run of equally good altitudes
                pad = 0.5 * (np.diff(h).min() if h.size > 1 else 1.0)
                ax_sr.axhspan(h[lo_k] - pad, h[hi_k] + pad, color=OKABE_ITO["orange"],
                              alpha=0.18 if filled else 0.0, hatch=None if filled else "//",
                              linewidth=0, zorder=0)
            tied = h[band]
            within = (f"; within {EQUAL_TOLERANCE * 100:g} %: {tied.min():.0f}-"
                      f"{tied.max():.0f} {la}" if tied.size > 1 else "")
            best_lines.append(f"{case}: {h[i]:.0f} {la}, {sr[i]:.3g} {sr_label} at "
                              f"{best.points.tas[i] * fs:.0f} {ls} TAS{within}")
        else:
            best_lines.append(f"{case}: no flyable altitude")
    objective = calm.objective
    head = f"Best altitude for {objective}, {pick_rule(objective)}:"
    fig.text(0.62, 0.235,
             "\n".join(textwrap.fill(t, 52, subsequent_indent="  ") for t in [head] + best_lines),
             fontsize=MIN_FONT + 1, va="top", ha="left",
             bbox=dict(boxstyle="round,pad=0.4", fc="white", ec="0.4"))
    ax_v.set_xlabel(f"best true airspeed, TAS [{ls}]", fontsize=9.5)
    ax_v.set_ylabel(f"pressure altitude [{la}]", fontsize=9.5)
    ax_sr.set_xlabel(f"ground specific range at best-{objective} TAS [{sr_label}]",
                     fontsize=9.5)
    ax_sr.tick_params(labelleft=False)
    # Where specific range barely changes with altitude (drones over a few hundred metres),
    # autoscaling zooms into noise and crowds offset tick labels: show at least +-5 %.
    # Limits from the data with a margin, so no marker sits on the frame.
    data = np.concatenate([line.get_xdata() for line in ax_sr.get_lines()])
    data = data[np.isfinite(data)]
    if data.size:
        lo, hi = float(data.min()), float(data.max())
        mid, half = (lo + hi) / 2, (hi - lo) / 2
        if mid > 0 and half < 0.05 * mid:
            ax_sr.set_xlim(mid * 0.95, mid * 1.05)
        else:
            ax_sr.set_xlim(lo - 0.08 * (hi - lo), hi + 0.08 * (hi - lo))
    for ax in (ax_v, ax_sr):
        ax.xaxis.get_major_formatter().set_useOffset(False)
        ax.xaxis.set_major_locator(MaxNLocator(nbins=6))
        ax.tick_params(labelsize=8.5)
        ax.grid(True, color="0.85", linewidth=0.6)
    handles = [Line2D([], [], color=OBJECTIVE_STYLES[o][0], marker=OBJECTIVE_STYLES[o][1],
                      linewidth=1.6, markersize=5, label=f"best-{o} TAS" if o != "economy"
                      else "economy TAS (99 % of best specific range)")
               for o in OBJECTIVES]
    handles += [Line2D([], [], color="black", marker="o", linewidth=1.6, markersize=5,
                       label="ground specific range"),
                Line2D([], [], color="0.3", linestyle="-", marker="o", markersize=5,
                       markerfacecolor="0.3", label="calm air: solid, filled"),
                Line2D([], [], color="0.3", linestyle="--", marker="o", markersize=5,
                       markerfacecolor="white", label="wind: dashed, hollow"),
                Line2D([], [], marker="*", markersize=13, linestyle="none",
                       markerfacecolor=OKABE_ITO["orange"], markeredgecolor="black",
                       label="best altitude"),
                Patch(facecolor=OKABE_ITO["orange"], alpha=0.18,
                      label=f"within {EQUAL_TOLERANCE * 100:g} % of best")]
    if wind is None:
        handles = handles[:-3] + handles[-2:]
    fig.legend(handles=handles, loc="upper left", bbox_to_anchor=(0.06, 0.245), ncol=2,
               fontsize=MIN_FONT + 0.5, frameon=False)
    fig.suptitle(f"Best speeds and specific range by altitude \u2014 {airframe.name}",
                 fontsize=11, y=0.975)
    fig.text(0.5, 0.905, ("wind: " + wind_text if wind is not None else "calm air only")
             + "; speeds within the stall margin and the power available",
             fontsize=MIN_FONT + 1, ha="center")
    footer(fig, figure_context(airframe, calm.points.mass, calm.points.store,
                          isa_dev_of(calm.schedule.air), units))
    return fig


