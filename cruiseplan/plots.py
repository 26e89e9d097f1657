"""Figures for crews: specific-range map, power curves, altitude profile, cruise-card page.

The only module of cruiseplan that imports matplotlib. Nothing imports it at package import;
the CLI imports it only in its ``plot`` and ``card`` commands. Figures are drawn on the Agg
backend into :class:`matplotlib.figure.Figure` objects (no pyplot state) and turned into
PNG or PDF bytes by :func:`figure_bytes`, so a failed drawing never leaves a partial file.

Made to be printed: lines use the Okabe-Ito colour-blind-safe palette [1]_ and filled
contours the cividis colour map [2]_; each series also differs in line style and marker so a
grey print reads the same; every axis names its unit; every figure carries a caution footer.

References
----------
.. [1] M. Okabe and K. Ito, "Color Universal Design (CUD): how to make figures and
   presentations that are friendly to colorblind people", J*Fly, 2008.
.. [2] J. R. Nunez, C. R. Anderton and R. S. Renslow, "Optimizing colormaps with
   consideration for color vision deficiency to enable accurate interpretation of
   scientific data", *PLoS ONE* 13(7), 2018, e0199239 (cividis).
.. [3] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, secs. 5.4
   (power required and available), 5.7 (range and endurance).
"""

from __future__ import annotations

import functools
import io
import textwrap
from datetime import date

import matplotlib
import numpy as np
from matplotlib import patheffects
from matplotlib.figure import Figure
from matplotlib.font_manager import FontProperties
from matplotlib.lines import Line2D
from matplotlib.patches import Patch, Rectangle
from matplotlib.textpath import TextPath
from matplotlib.ticker import MaxNLocator

from .atmosphere import air_state, check_altitude
from .card import CAUTION_LINE
from .errors import CruiseplanError
from .optimise import OBJECTIVES, describe
from .performance import (
    DEFAULT_STALL_MARGIN,
    LIMIT_CODE,
    LIMIT_TEXT,
    MACH_LIMIT,
    CruisePoints,
    Limit,
    cruise_grid,
    cruise_points,
    power_setting_table,
    resolve_loading,
    speed_for_min_drag,
    speed_for_min_power,
)
from .reports import display
from .tables import store_text
from .units import temperature_difference, to_si

#: Okabe-Ito palette [1]_ (yellow left out: it does not show on white paper).
OKABE_ITO = {
    "black": "#000000", "orange": "#E69F00", "sky_blue": "#56B4E9", "green": "#009E73",
    "blue": "#0072B2", "vermillion": "#D55E00", "purple": "#CC79A7",
}
#: Colour, line style and marker of successive series (altitudes), distinct in grey print.
SERIES_STYLES = (
    (OKABE_ITO["blue"], "-", "o"),
    (OKABE_ITO["vermillion"], "--", "s"),
    (OKABE_ITO["green"], "-.", "^"),
    (OKABE_ITO["purple"], ":", "D"),
    (OKABE_ITO["orange"], (0, (7, 2, 1, 2, 1, 2)), "v"),
    (OKABE_ITO["sky_blue"], (0, (1, 1)), "P"),
    (OKABE_ITO["black"], (0, (10, 3)), "X"),
)
#: Colour and marker of each best-speed objective.
OBJECTIVE_STYLES = {
    "range": (OKABE_ITO["blue"], "o"),
    "endurance": (OKABE_ITO["vermillion"], "s"),
    "economy": (OKABE_ITO["green"], "^"),
}
#: Hatch pattern of each limit reason on the specific-range map.
LIMIT_HATCHES = {
    Limit.STALL: "///", Limit.POWER: "\\\\\\", Limit.ATMOSPHERE: "xx",
    Limit.COMPRESSIBILITY: "..", Limit.POLAR_RANGE: "|||", Limit.LAPSE_RANGE: "---",
    Limit.NO_SOLUTION: "++", Limit.WIND: "oo", Limit.ROTOR_RANGE: "**",
    Limit.REYNOLDS_RANGE: "OO",
}
#: Output formats of :func:`figure_bytes`.
FORMATS = ("png", "pdf")
#: Size of the plots [in]: A5 landscape.
PLOT_SIZE = (8.27, 5.83)
#: Smallest font on any figure [pt] (kneeboard-legible).
MIN_FONT = 7.0
#: Card pages tried in turn, portrait [in].
CARD_PAGES = {"A5": (5.83, 8.27), "A4": (8.27, 11.69)}

_HALO = [patheffects.withStroke(linewidth=3.5, foreground="white")]


# --- output -------------------------------------------------------------------------------

def figure_bytes(fig: Figure, fmt: str, *, dpi: float = 150.0) -> bytes:
    """Render a figure to PNG or PDF bytes.

    PDF text is embedded as TrueType (font type 42) so that it can be searched and copied.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
        The figure.
    fmt : str
        ``"png"`` or ``"pdf"``, or a file name whose extension (.png, .pdf) decides.
    dpi : float, optional
        Resolution of PNG output [dots per inch].

    Returns
    -------
    bytes
        The whole file.

    Raises
    ------
    CruiseplanError
        For any other format or extension.
    """
    text = str(fmt)
    kind = text.rsplit(".", 1)[-1].lower() if "." in text else text.lower()
    if kind not in FORMATS:
        raise CruiseplanError(f"cannot draw {text!r}: the format must be "
                              f"{' or '.join(FORMATS)} (a file ending in .png or .pdf)")
    buf = io.BytesIO()
    meta = {"Creator": "cruiseplan"} if kind == "pdf" else {"Software": "cruiseplan"}
    with matplotlib.rc_context({"pdf.fonttype": 42}):
        fig.savefig(buf, format=kind, dpi=dpi, metadata=meta)
    return buf.getvalue()


# --- shared pieces ------------------------------------------------------------------------

def _footer(fig: Figure, context: str) -> None:
    """Caution line, and the context above it, at the bottom of a plot."""
    fig.text(0.012, 0.012, CAUTION_LINE, fontsize=MIN_FONT + 0.5, ha="left", va="bottom",
             style="italic")
    width = fig.get_size_inches()[0]
    lines = textwrap.wrap(context, int(width * 17.5))  # ~17.5 characters per inch at 7 pt
    fig.text(0.012, 0.042, "\n".join(lines), fontsize=MIN_FONT, ha="left", va="bottom",
             color="0.25", linespacing=1.25)


def _context(airframe, mass: float, store: float, isa_dev: float, units: str,
             extra: str = "") -> str:
    fm, lm = display("mass", units)
    parts = [f"{airframe.name} (file sha256 {airframe.checksum[:16]})",
             f"mass {mass * fm:.1f} {lm}", store_text(airframe, store, units),
             f"ISA {isa_dev:+.0f} K"]
    if extra:
        parts.append(extra)
    parts.append(f"made {date.today().isoformat()} by cruiseplan")
    return " \u00b7 ".join(parts)


def _sr_display(airframe, units: str):
    """Factor from SI specific range (m/kg or m/J) to display units, and the label."""
    prop = airframe.propulsion
    if prop.store_name == "fuel":
        f, label = display("sr_fuel", units)
        return f * prop.fuel_density, label
    return display("sr_energy", units)


def _power_display(airframe, units: str):
    kind = "power" if airframe.propulsion.store_name == "fuel" else "electric_power"
    return display(kind, units)


def _every(n: int, marks: int = 8):
    """Marker spacing that puts about ``marks`` markers on a line of ``n`` points."""
    return max(1, int(round(n / marks)))


def _isa_dev(air) -> float:
    return float(np.ravel(air.isa_dev)[0])


def speed_span(airframe, altitudes, *, mass=None, fuel=None, payload=None, isa_dev=0.0,
               n: int = 60) -> np.ndarray:
    """True airspeeds that span a plot: from below the stall to beyond full throttle.

    Parameters
    ----------
    airframe : Airframe
        The airframe.
    altitudes : array_like or pint.Quantity
        Pressure altitudes [m] the plot shows.
    mass, fuel, payload : float or pint.Quantity, optional
        Loading [kg, kg or J, kg], as in :func:`cruiseplan.cruise_grid`.
    isa_dev : float or pint.Quantity, optional
        ISA deviation [K].
    n : int, optional
        Number of speeds.

    Returns
    -------
    numpy.ndarray
        ``n`` increasing TAS [m/s], from 0.85 x the lowest stall speed to 1.12 x the highest
        full-throttle level speed (capped at the Mach model limit).
    """
    h = check_altitude(np.atleast_1d(to_si(altitudes, "m", what="altitudes")))
    isa_dev = temperature_difference(isa_dev)
    loading = resolve_loading(airframe, mass, fuel, payload)
    air = air_state(h, isa_dev)
    v_stall = airframe.stall_speed(loading.mass, air.density)
    top = power_setting_table(airframe, h, [1.0], mass=loading.mass, fuel=loading.store,
                              isa_dev=isa_dev, stall_margin=1.0).tas
    v_hi = np.nanmax(top) if np.any(np.isfinite(top)) else 2.5 * np.max(v_stall)
    v_hi = min(1.12 * v_hi, MACH_LIMIT * float(np.min(air.speed_of_sound)))
    if airframe.kind == "multirotor":
        # Stay near the advance ratio the rotor model is trusted to.
        from .rotorcraft import MAX_ADVANCE_RATIO

        v_hi = min(v_hi, 1.15 * MAX_ADVANCE_RATIO * airframe.rotors.hover_tip_speed)
    # A multirotor has no stall speed: start just above the hover.
    return np.linspace(max(0.85 * float(np.min(v_stall)), 1.0), v_hi, n)


# --- (a) specific-range map ---------------------------------------------------------------

#: Continuous fields, positive inside a limit's region, that give its edge without the
#: staircase of the grid: STALL (stall margin minus V/Vs), POWER (required minus available
#: over rated) and MACH (Mach minus the model limit). Other reasons use their 0/1 mask.
LIMIT_FIELDS = {
    Limit.STALL: lambda grid, margin: margin - grid.stall_speed_ratio,
    Limit.POWER: lambda grid, margin: -grid.power_margin / grid.rated_power,
    Limit.COMPRESSIBILITY: lambda grid, margin: grid.mach() - MACH_LIMIT,
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
        ax.text(fx, fy, textwrap.fill(f"{LIMIT_CODE[flag]}: {LIMIT_TEXT[flag]}", 22),
                transform=ax.transAxes, fontsize=MIN_FONT + 0.5, ha="center", va="center",
                zorder=6,
                bbox=dict(boxstyle="round,pad=0.25", fc="white", ec="0.3", alpha=0.92))
        taken |= np.hypot(ii - ii[i, j], jj - jj[i, j]) < 0.22
        handles.append(Patch(facecolor="0.88", edgecolor="0.2", hatch=hatch,
                             label=f"{LIMIT_CODE[flag]}: {LIMIT_TEXT[flag]}"))
    return handles


def _held_by(best, objective: str) -> str:
    """Constraint text when one constraint holds the objective's speed at every altitude."""
    codes = best.schedule.binding[objective][best.schedule.feasible]
    texts = {describe(c) for c in np.ravel(codes)}
    return f" (held by {texts.pop()})" if len(texts) == 1 and "none" not in texts else ""


def _best_lines(ax, best, units: str) -> None:
    fa, la = display("altitude", units)
    fs, _ = display("speed", units)
    h = best.altitudes * fa
    every = _every(h.size)
    styles = (("range", OKABE_ITO["black"], "-", "o", (0, every)),
              ("endurance", OKABE_ITO["vermillion"], "--", "s", (every // 2, every)))
    for objective, colour, style, marker, marks in styles:
        ax.plot(best.schedule.tas[objective] * fs, h, color=colour, linestyle=style,
                marker=marker, markevery=marks, markersize=5, linewidth=1.8,
                path_effects=_HALO, zorder=7,
                label=f"best-{objective} TAS{_held_by(best, objective)}")
    i = best.best_index
    if i >= 0:
        ax.plot(best.points.tas[i] * fs, h[i], marker="*", markersize=16, linestyle="none",
                markerfacecolor=OKABE_ITO["orange"], markeredgecolor="black", zorder=8,
                clip_on=False, label=f"best altitude for {best.objective}: {h[i]:.0f} {la}")


def specific_range_map(airframe, grid: CruisePoints, best=None, *, units: str = "aviation",
                       ground: bool = False, wind_text: str = "calm",
                       stall_margin: float = DEFAULT_STALL_MARGIN) -> Figure:
    r"""Filled contours of specific range over pressure altitude and TAS.

    Specific range is distance per unit of fuel or energy, :math:`V/\dot s` (air) or
    :math:`V_g/\dot s` (ground) [3]_. Regions that breach a limit are greyed out, hatched
    with one pattern per :class:`~cruiseplan.performance.Limit` reason, outlined, and
    labelled with the reason's text inside the region.

    Parameters
    ----------
    airframe : Airframe
        The airframe the grid was computed for.
    grid : CruisePoints
        Cruise points of shape (n_alt, n_tas) from :func:`cruiseplan.cruise_grid`, with
        increasing altitudes and speeds (at least 2 of each).
    best : BestCruise, optional
        Optimiser answer (:func:`cruiseplan.optimise.best_cruise`) whose best-range and
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

    References
    ----------
    .. [3] Anderson, *Aircraft Performance and Design*, sec. 5.7 (specific range).
    """
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
    factor, sr_label = _sr_display(airframe, units)
    sr = np.broadcast_to((grid.specific_range_ground if ground else grid.specific_range_air)
                         * factor, shape)
    limits = np.broadcast_to(grid.limits, shape).astype(int)
    x, y = np.meshgrid(v * fs, h * fa)
    ok = (limits == 0) & np.isfinite(sr)

    fig = Figure(figsize=PLOT_SIZE)
    ax = fig.add_axes((0.085, 0.33, 0.70, 0.59))
    cax = fig.add_axes((0.80, 0.33, 0.022, 0.59))
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
    ax.set_title(textwrap.fill(f"{kind.capitalize()} specific range \u2014 {airframe.name} "
                               f"({'wind ' + wind_text if ground else 'calm air'})", 80),
                 fontsize=11, pad=12)
    line_handles, _ = ax.get_legend_handles_labels()
    if line_handles or handles:
        ax.legend(handles=line_handles + handles, loc="upper center",
                  bbox_to_anchor=(0.5, -0.1), ncol=2, fontsize=MIN_FONT + 0.5,
                  frameon=False)
    _footer(fig, _context(airframe, grid.mass, grid.store, _isa_dev(grid.air), units,
                          f"wind {wind_text}"))
    return fig


# --- (b) power curves ---------------------------------------------------------------------

def power_curves(airframe, altitudes, *, tas=None, mass=None, fuel=None, payload=None,
                 isa_dev=0.0, units: str = "aviation",
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
        Loading, as in :func:`cruiseplan.cruise_grid`.
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

    References
    ----------
    .. [3] Anderson, *Aircraft Performance and Design*, secs. 5.4-5.5.
    """
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
    fp, lp = _power_display(airframe, units)
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
    rotor = airframe.kind == "multirotor"
    if rotor:
        # No stall and no (L/D)max for a multirotor: its drag is least in the hover.
        marks = {"min": marks["min"]}
    below_stall = np.broadcast_to(grid.tas, grid.shape) < v_stall[:, None] * (1 - 1e-9)
    required = np.where(below_stall, np.nan, grid.shaft_power) * fp
    available = grid.power_available[:, 0] * fp

    fig = Figure(figsize=PLOT_SIZE)
    ax = fig.add_axes((0.085, 0.2, 0.60, 0.7))
    one_available = np.allclose(available, available[0])
    for i, (colour, style, marker) in enumerate(SERIES_STYLES[:h.size]):
        ax.plot(v, required[i], color=colour, linestyle=style, marker=marker, markersize=4.5,
                markevery=_every(v.size), linewidth=1.8,
                label=f"required at {h[i] * fa:.0f} {la}")
        if not one_available:
            ax.plot(v, np.full(v.shape, available[i]), color=colour, linestyle=style,
                    linewidth=1.0)
            ax.text(v[-1], available[i], f"full throttle {h[i] * fa:.0f} {la}",
                    fontsize=MIN_FONT, ha="right", va="bottom", color=colour,
                    path_effects=_HALO)
        for key, style_kw in marks.items():
            ax.plot(special[key][i] * fs, special_power[key][i] * fp, linestyle="none",
                    markerfacecolor=colour, zorder=5, **style_kw)
    if one_available:
        ax.axhline(available[0], color="black", linewidth=1.2)
        ax.text(v[-1], available[0], "maximum continuous shaft power (all altitudes)",
                fontsize=MIN_FONT + 0.5, ha="right", va="bottom", path_effects=_HALO)
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
    if airframe.kind == "multirotor":
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
    fig.text(0.71, 0.2, textwrap.fill(note, 40), fontsize=MIN_FONT + 0.5, va="bottom",
             ha="left")
    _footer(fig, _context(airframe, grid.mass, grid.store, dev, units))
    return fig


# --- (c) altitude profile -----------------------------------------------------------------

def altitude_profile(airframe, calm, wind=None, *, units: str = "aviation",
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
        Optimiser answer in calm air (:func:`cruiseplan.optimise.best_cruise`).
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
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    factor, sr_label = _sr_display(airframe, units)
    fig = Figure(figsize=PLOT_SIZE)
    ax_v = fig.add_axes((0.085, 0.34, 0.42, 0.54))
    ax_sr = fig.add_axes((0.56, 0.34, 0.42, 0.54), sharey=ax_v)
    cases = [("calm air", calm, "-", True)]
    if wind is not None:
        cases.append(("wind", wind, "--", False))
    best_lines = []
    for case, best, style, filled in cases:
        h = best.altitudes * fa
        every = _every(h.size, 10)
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
            best_lines.append(f"{case}: {h[i]:.0f} {la}, {sr[i]:.3g} {sr_label} at "
                              f"{best.points.tas[i] * fs:.0f} {ls} TAS")
        else:
            best_lines.append(f"{case}: no flyable altitude")
    objective = calm.objective
    fig.text(0.62, 0.235, f"Best altitude for {objective}:\n" + "\n".join(best_lines),
             fontsize=MIN_FONT + 1, va="top", ha="left",
             bbox=dict(boxstyle="round,pad=0.4", fc="white", ec="0.4"))
    ax_v.set_xlabel(f"best true airspeed, TAS [{ls}]", fontsize=9.5)
    ax_v.set_ylabel(f"pressure altitude [{la}]", fontsize=9.5)
    ax_sr.set_xlabel(f"ground specific range at best-{objective} TAS [{sr_label}]",
                     fontsize=9.5)
    ax_sr.tick_params(labelleft=False)
    for ax in (ax_v, ax_sr):
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
                       label="best altitude")]
    if wind is None:
        handles = handles[:-2] + handles[-1:]
    fig.legend(handles=handles, loc="upper left", bbox_to_anchor=(0.06, 0.245), ncol=2,
               fontsize=MIN_FONT + 0.5, frameon=False)
    fig.suptitle(f"Best speeds and specific range by altitude \u2014 {airframe.name}",
                 fontsize=11, y=0.975)
    fig.text(0.5, 0.905, ("wind: " + wind_text if wind is not None else "calm air only")
             + "; speeds within the stall margin and the power available",
             fontsize=MIN_FONT + 1, ha="center")
    _footer(fig, _context(airframe, calm.points.mass, calm.points.store,
                          _isa_dev(calm.schedule.air), units))
    return fig


# --- cruise-card page ---------------------------------------------------------------------

#: Font sizes of the card [pt]: all at least MIN_FONT.
CARD_FONTS = {"title": 12.0, "meta": 7.5, "heading": 9.0, "table": 8.0, "text": 7.5,
              "caution": 7.5, "footer": 7.0}
_CARD_MARGIN = 0.3  # [in]
_LEADING = 1.18  # line pitch over font size, text
_ROW_LEADING = 1.3  # line pitch over font size, table rows


@functools.lru_cache(maxsize=4096)
def _text_width(text: str, size: float, bold: bool) -> float:
    prop = FontProperties(size=size, weight="bold" if bold else "normal")
    return TextPath((0, 0), text, size=size, prop=prop).get_extents().x1 / 72.0


class _Page:
    """Top-down text layout on a figure, in inches; remembers whether everything fitted."""

    def __init__(self, fig: Figure):
        self.fig = fig
        self.width, self.height = fig.get_size_inches()
        self.left = _CARD_MARGIN
        self.text_width = self.width - 2 * _CARD_MARGIN
        self.y = self.height - _CARD_MARGIN

    @staticmethod
    def measure(text: str, size: float, bold: bool = False) -> float:
        """Advance width of ``text`` [in], from the unhinted glyph outlines (as in PDF)."""
        return _text_width(text, size, bold)

    def wrap(self, text: str, size: float, width: float) -> list:
        space = _text_width("a a", size, False) - 2 * _text_width("a", size, False)
        lines, line, used = [], [], 0.0
        for word in text.split():
            w = _text_width(word, size, False)
            if line and used + space + w > width:
                lines.append(" ".join(line))
                line, used = [word], w
            else:
                used += (space if line else 0.0) + w
                line.append(word)
        return lines + ([" ".join(line)] if line else [])

    def text(self, x: float, text: str, size: float, *, bold=False, ha="left", **kw):
        self.fig.text(x, self.y, text, fontsize=size, ha=ha, va="baseline",
                      weight="bold" if bold else "normal",
                      transform=self.fig.dpi_scale_trans, **kw)

    def down(self, size: float, lines: float = 1.0, leading: float = _LEADING):
        self.y -= lines * size * leading / 72.0

    def paragraph(self, text: str, size: float, *, indent: float = 0.0, bullet: str = ""):
        for k, line in enumerate(self.wrap(text, size, self.text_width - indent)):
            self.down(size)
            if bullet and k == 0:
                self.fig.text(self.left, self.y, bullet, fontsize=size,
                              transform=self.fig.dpi_scale_trans)
            self.fig.text(self.left + indent, self.y, line, fontsize=size,
                          transform=self.fig.dpi_scale_trans)

    def table(self, table) -> bool:
        size = CARD_FONTS["table"]
        pad = 0.05
        cells = [[c for c in row] for row in table.rows]
        names = [name.split("\n") for name, _, _ in table.columns]
        widths = []
        for j, (_, unit, _) in enumerate(table.columns):
            w = max([self.measure(n, size, bold=True) for n in names[j]]
                    + [self.measure(f"[{unit}]", size)]
                    + [self.measure(r[j], size) for r in cells])
            widths.append(w + 2 * pad)
        total = sum(widths)
        if total > self.text_width:
            return False
        widths = [w + (self.text_width - total) / len(widths) for w in widths]
        edges = np.concatenate([[self.left], self.left + np.cumsum(widths)])
        row_h = size * _ROW_LEADING / 72.0

        def put(j, text, bold=False):
            align = table.columns[j][2]
            x = edges[j] + pad if align == "left" else edges[j + 1] - pad
            self.text(x, text, size, bold=bold, ha="left" if align == "left" else "right")

        depth = max(len(n) for n in names)
        for k in range(depth):
            self.down(size)
            for j, lines in enumerate(names):
                # Names sit on the line just above the units.
                line = k - (depth - len(lines))
                if line >= 0:
                    put(j, lines[line], bold=True)
        self.down(size)
        for j, (_, unit, _) in enumerate(table.columns):
            put(j, f"[{unit}]" if unit else "")
        rule = self.y - 0.3 * row_h
        self.fig.add_artist(Line2D([self.left, self.left + self.text_width], [rule, rule],
                                   color="black", linewidth=0.8,
                                   transform=self.fig.dpi_scale_trans))
        self.y -= 0.25 * row_h
        for row, group in zip(cells, table.groups):
            self.down(size, leading=_ROW_LEADING)
            if group % 2:
                self.fig.add_artist(Rectangle(
                    (self.left, self.y - 0.3 * row_h), self.text_width, row_h,
                    facecolor="0.88", edgecolor="none", zorder=0,
                    transform=self.fig.dpi_scale_trans))
            for j, text in enumerate(row):
                put(j, text)
        self.y -= 0.3 * row_h
        self.fig.add_artist(Line2D([self.left, self.left + self.text_width],
                                   [self.y, self.y], color="black", linewidth=0.8,
                                   transform=self.fig.dpi_scale_trans))
        return True


def _draw_card(fig: Figure, content) -> bool:
    """Draw the card on ``fig``; False when it does not fit the page."""
    page = _Page(fig)
    f = CARD_FONTS
    page.down(f["title"], 0.8)
    page.text(page.left, content.title, f["title"], bold=True)
    page.y -= 0.04
    for line in content.meta:
        page.paragraph(line, f["meta"])
    for block in content.blocks:
        page.y -= 0.06
        page.down(f["heading"])
        page.text(page.left, block.heading, f["heading"], bold=True)
        if hasattr(block, "columns"):
            if not page.table(block):
                return False
            for note in block.notes:
                page.paragraph(note, f["text"])
        else:
            for line in block.lines:
                page.paragraph(line, f["text"])
    page.y -= 0.06
    page.down(f["heading"])
    page.text(page.left, "Cautions", f["heading"], bold=True)
    for caution in content.cautions:
        page.paragraph(caution, f["caution"], indent=0.12, bullet="\u2022")
    footer_y = 0.14
    fig.text(page.left, footer_y, content.footer, fontsize=f["footer"], style="italic",
             transform=fig.dpi_scale_trans)
    return page.y > footer_y + 0.16


def card_figure(content) -> Figure:
    """Draw a cruise card on one portrait page (A5, or A4 when A5 is too small).

    Parameters
    ----------
    content : cruiseplan.card.CardContent
        Title, header lines, tables and text blocks, cautions and footer.

    Returns
    -------
    matplotlib.figure.Figure
        One page; no font is smaller than :data:`MIN_FONT`.

    Raises
    ------
    CruiseplanError
        When the content does not fit one A4 page at legible size.
    """
    for size in CARD_PAGES.values():
        fig = Figure(figsize=size)
        if _draw_card(fig, content):
            return fig
    rows = sum(len(getattr(b, "rows", ())) for b in content.blocks)
    raise CruiseplanError(f"the cruise card's {rows} table rows do not fit one A4 page at a "
                          f"legible size: give fewer altitudes or power settings")


# --- mission profile ------------------------------------------------------------------------

def mission_profile(plan, *, units: str | None = None) -> Figure:
    """Altitude and fuel or energy remaining against distance along a planned mission.

    Parameters
    ----------
    plan : Plan
        A planned mission (:func:`cruiseplan.mission.plan_mission`).
    units : {"aviation", "si"}, optional
        Display units; aviation for piston airframes, SI for electric ones by default.

    Returns
    -------
    matplotlib.figure.Figure
        Two panels sharing the distance axis: the vertical profile with each leg's highest
        ground, and the store remaining with the reserve line; the verdict in the title.
    """
    mission = plan.mission
    af = mission.airframe
    prop = af.propulsion
    units = units or ("aviation" if prop.store_name == "fuel" else "si")
    fa, la = display("altitude", units)
    fd, ld = display("distance", units)
    if prop.store_name == "fuel":
        fq, lq = display("volume", units)
        fq /= prop.fuel_density
        what = "fuel remaining"
    else:
        fq, lq = display("energy", units)
        what = "usable energy remaining"
    # Points at every segment boundary: altitude and remaining vary linearly within one.
    x, h, q = [0.0], [plan.segments[0].altitude_start], [plan.initial]
    for seg in plan.segments:
        x.append(x[-1] + seg.distance)
        h.append(seg.altitude_end)
        q.append(seg.remaining)
    x, h, q = np.array(x) * fd, np.array(h) * fa, np.array(q) * fq
    fig = Figure(figsize=PLOT_SIZE)
    ax_h = fig.add_axes((0.09, 0.55, 0.86, 0.33))
    ax_q = fig.add_axes((0.09, 0.17, 0.86, 0.33), sharex=ax_h)
    ax_h.plot(x, h, color=OKABE_ITO["blue"], linewidth=2.0, marker="o", markersize=3.5,
              label="pressure altitude flown")
    from .mission import ground_elevation

    start = 0.0
    for k, leg in enumerate(mission.legs):
        end = start + leg.distance * fd
        g = ground_elevation(mission, leg) * fa
        ax_h.fill_between([start, end], 0, g, color="0.75", hatch="...", edgecolor="0.45",
                          linewidth=0.0, label="highest ground (leg)" if k == 0 else None)
        if leg.max_agl is not None:
            cap = (ground_elevation(mission, leg) + leg.max_agl) * fa
            ax_h.plot([start, end], [cap, cap], color=OKABE_ITO["vermillion"],
                      linestyle="--", linewidth=1.4,
                      label="height cap above ground" if k == 0 else None)
        ax_h.axvline(end, color="0.6", linewidth=0.8, linestyle=":")
        ax_h.text(0.5 * (start + end), 1.01, leg.name, transform=ax_h.get_xaxis_transform(),
                  ha="center", va="bottom", fontsize=MIN_FONT, rotation=0, clip_on=False)
        start = end
    ax_q.plot(x, q, color=OKABE_ITO["green"], linewidth=2.0, marker="s", markersize=3.5,
              label=what)
    reserve = plan.reserve_required * fq
    ax_q.axhline(reserve, color=OKABE_ITO["vermillion"], linestyle="--", linewidth=1.5,
                 label=f"reserve required ({plan.reserve_text})")
    ax_q.fill_between(x, 0, reserve, color=OKABE_ITO["vermillion"], alpha=0.12,
                      hatch="///", edgecolor=OKABE_ITO["vermillion"], linewidth=0.0)
    ax_h.set_ylabel(f"pressure altitude [{la}]", fontsize=9.5)
    ax_q.set_ylabel(f"{what} [{lq}]", fontsize=9.5)
    ax_q.set_xlabel(f"distance along the route [{ld}]", fontsize=9.5)
    ax_h.tick_params(labelbottom=False, labelsize=8.5)
    ax_q.tick_params(labelsize=8.5)
    ax_q.set_ylim(bottom=min(0.0, float(np.min(q)) * 1.05))
    ax_h.set_ylim(bottom=0.0)
    for ax in (ax_h, ax_q):
        ax.grid(True, color="0.85", linewidth=0.6)
        ax.legend(loc="best", fontsize=MIN_FONT + 0.5, framealpha=0.9)
    verdict = plan.verdict if plan.go else "NO-GO: " + "; ".join(plan.reasons)
    fig.suptitle(f"Mission profile \u2014 {mission.name} ({af.name})", fontsize=11,
                 y=0.985)
    fig.text(0.5, 0.925, textwrap.shorten(f"VERDICT {verdict}", 150), ha="center",
             fontsize=MIN_FONT + 1.5, weight="bold",
             color="black" if plan.go else OKABE_ITO["vermillion"])
    _footer(fig, _context(af, plan.takeoff_mass, plan.initial, mission.isa_dev, units))
    return fig


# --- drag-polar fit ---------------------------------------------------------------------------

def _blocks(fit) -> np.ndarray:
    """Block number of each point: points flown at like density and mass.

    Density ratio and mass are each split where their sorted values jump by more than 2 %,
    so a slow drift (fuel burn within a block) stays in one block.
    """
    def clusters(x):
        order = np.argsort(x)
        xs = x[order]
        labels = np.empty(x.size, dtype=int)
        labels[order] = np.concatenate([[0], np.cumsum(np.diff(xs) > 0.02 * xs[1:])])
        return labels

    pairs = np.stack([clusters(fit.density), clusters(fit.mass)], axis=1)
    return np.unique(pairs, axis=0, return_inverse=True)[1].ravel()


def fit_residuals(fit_result, airframe, *, units: str | None = None,
                  log_name: str = "") -> Figure:
    r"""The PIW-VIW points with the fitted curve, and the residuals against VIW.

    Top: power independent of weight against velocity independent of weight, the fitted
    curve :math:`A\,\mathrm{VIW}^3 + B/\mathrm{VIW}` and its parasite and induced parts;
    points flown in one block (like density and mass) share a colour and marker, so their
    collapse onto one curve shows. Bottom: residuals in % of the curve with a band of
    twice the RMS residual. Outliers dropped by the fit are crossed out and named by line.

    Parameters
    ----------
    fit_result : cruiseplan.fit.FitResult
        The fit.
    airframe : Airframe
        The airframe fitted, for the footer and the default units.
    units : {"aviation", "si"}, optional
        Display units; aviation for piston airframes, SI for electric ones by default.
    log_name : str, optional
        The log's file name, for the footer.

    Returns
    -------
    matplotlib.figure.Figure
        Two panels sharing the VIW axis [kt or km/h]; power in hp, kW or W.

    References
    ----------
    .. [1] R. D. Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, AIAA, 2003, ch. 9.
    """
    from .constants import RHO0
    from .fit import piw_coefficients

    fit = fit_result
    units = units or ("aviation" if airframe.propulsion.store_name == "fuel" else "si")
    fs, ls = display("speed", units)
    fp, lp = _power_display(airframe, units)
    fm, lm = display("mass", units)
    fig = Figure(figsize=PLOT_SIZE)
    ax_p = fig.add_axes((0.085, 0.47, 0.58, 0.41))
    ax_r = fig.add_axes((0.085, 0.155, 0.58, 0.26), sharex=ax_p)

    curve = fit.curve(fit.viw)
    rel = (fit.piw / curve - 1.0) * 100.0
    lo, hi = float(np.min(fit.viw)), float(np.max(fit.viw))
    v = np.linspace(0.92 * lo, 1.05 * hi, 200)
    a = piw_coefficients(fit.cd0, fit.k, fit.wing_area, fit.reference_mass)[0]
    a = a / fit.efficiency_scale
    ax_p.plot(v * fs, fit.curve(v) * fp, color="black", linewidth=1.8,
              label="fitted curve A VIW\u00b3 + B/VIW")
    ax_p.plot(v * fs, a * v**3 * fp, color="0.35", linestyle="--", linewidth=1.2,
              label="parasite part A VIW\u00b3")
    ax_p.plot(v * fs, (fit.curve(v) - a * v**3) * fp, color="0.35", linestyle=":",
              linewidth=1.4, label="induced part B/VIW")
    blocks = _blocks(fit)
    n_blocks = int(blocks.max()) + 1
    styles = SERIES_STYLES if n_blocks <= len(SERIES_STYLES) else SERIES_STYLES[:1]
    for b in range(n_blocks if styles is SERIES_STYLES else 1):
        sel = blocks == b if styles is SERIES_STYLES else np.ones(fit.viw.size, bool)
        colour, _, marker = styles[b]
        label = (f"\u03c3 {np.mean(fit.density[sel]) / RHO0:.2f}, "
                 f"{np.mean(fit.mass[sel]) * fm:.0f} {lm}") if styles is SERIES_STYLES \
            else "level-flight points"
        for ax, y in ((ax_p, fit.piw * fp), (ax_r, rel)):
            ax.plot(fit.viw[sel] * fs, y[sel], linestyle="none", marker=marker, markersize=6,
                    markerfacecolor=colour, markeredgecolor="black", markeredgewidth=0.5,
                    color=colour, label=label if ax is ax_p else None, zorder=4)
    out = ~fit.used
    for ax, y in ((ax_p, fit.piw * fp), (ax_r, rel)):
        ax.plot(fit.viw[out] * fs, y[out], linestyle="none", marker="X", markersize=13,
                markerfacecolor="none", markeredgecolor=OKABE_ITO["vermillion"],
                markeredgewidth=1.6, zorder=5,
                label="outlier, dropped" if ax is ax_p and out.any() else None)
        for x, yy, n in zip(fit.viw[out] * fs, y[out], fit.lines[out]):
            ax.annotate(f"line {n}", (x, yy), xytext=(7, 4), textcoords="offset points",
                        fontsize=MIN_FONT + 0.5, color=OKABE_ITO["vermillion"],
                        path_effects=_HALO, zorder=6)
    band = 2.0 * fit.rms_relative * 100.0
    ax_r.axhline(0.0, color="black", linewidth=1.0)
    ax_r.axhspan(-band, band, color="0.88", zorder=0,
                 label=f"\u00b12 \u00d7 RMS residual ({band:.1f} %)")
    ax_r.legend(loc="upper left", fontsize=MIN_FONT + 0.5, frameon=False)
    span = max(np.max(np.abs(rel)) * 1.25, 2.5 * band)
    ax_r.set_ylim(-span, span)
    ax_p.set_ylim(bottom=0.0)
    ax_p.set_xlim(v[0] * fs, v[-1] * fs)
    ax_p.set_ylabel(f"power independent of weight,\nPIW [{lp}]", fontsize=9.5)
    ax_r.set_ylabel("residual [% of curve]", fontsize=9.5)
    ax_r.set_xlabel(f"velocity independent of weight, VIW (equivalent airspeed) [{ls}]",
                    fontsize=9.5)
    ax_p.tick_params(labelbottom=False, labelsize=8.5)
    ax_r.tick_params(labelsize=8.5)
    for ax in (ax_p, ax_r):
        ax.grid(True, color="0.85", linewidth=0.6)
    ax_p.legend(loc="upper left", bbox_to_anchor=(1.02, 1.0), fontsize=MIN_FONT + 0.5,
                frameon=False, labelspacing=0.7)

    def value(name, digits):
        val, se = getattr(fit, name), getattr(fit, f"se_{name}")
        if not np.isfinite(se):
            return f"{name} {val:.{digits}f} (held)"
        lo95, hi95 = fit.ci95[name]
        return (f"{name} {val:.{digits}f} \u00b1 {se:.{digits}f}\n"
                f"   95 %: {lo95:.{digits}f} to {hi95:.{digits}f}")

    dropped = ", ".join(str(n) for n, _ in fit.dropped) or "none"
    text = "\n".join([
        "Fitted (\u00b1 1 standard error)", value("cd0", 4), value("oswald_e", 3),
        f"correlation {fit.correlation:+.2f}", f"R\u00b2 {fit.r_squared:.4f}",
        f"RMS residual {fit.rms_residual * fp:.3g} {lp} ({fit.rms_relative * 100:.1f} %)",
        f"points used {fit.n_used} of {fit.lines.size}", f"outlier lines: {dropped}",
        f"reference mass {fit.reference_mass * fm:.0f} {lm}",
        textwrap.fill("propeller efficiency " + ("fitted" if fit.efficiency_fitted else
                                                 "held at the airframe's value"), 34),
    ])
    fig.text(0.715, 0.155, text, fontsize=MIN_FONT + 0.5, va="bottom", ha="left",
             linespacing=1.3, bbox=dict(boxstyle="round,pad=0.4", fc="white", ec="0.4"))
    fig.suptitle(f"Drag polar fitted by PIW\u2013VIW reduction \u2014 {airframe.name}",
                 fontsize=11, y=0.975)
    fig.text(0.5, 0.915, "PIW = P \u221a\u03c3 (W_ref/W)^1.5, VIW = V_E (W_ref/W)^0.5 "
             "(Kimberlin, Flight Testing of Fixed-Wing Aircraft, ch. 9)",
             fontsize=MIN_FONT + 1, ha="center")
    parts = [f"{airframe.name} (file sha256 {airframe.checksum[:16]})"]
    if log_name:
        parts.append(f"log {log_name}")
    parts.append(f"made {date.today().isoformat()} by cruiseplan")
    _footer(fig, " \u00b7 ".join(parts))
    return fig
