"""Survey plan view: the area, its lines coloured by pack, the swaps and the take-off point."""

from __future__ import annotations

import math
import textwrap
import warnings

import numpy as np
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Circle, Patch
from mpl_toolkits.axes_grid1.anchored_artists import AnchoredSizeBar

from cruiseplan.errors import CruiseplanWarning
from cruiseplan.plots.style import (
    HALO,
    MIN_FONT,
    OKABE_ITO,
    PLOT_SIZE,
    SERIES_STYLES,
    figure_context,
    footer,
)
from cruiseplan.units import display

#: Packs named one by one in the legend (and their swaps labelled); more are summed up.
LEGEND_PACKS = 7


def _scale_length(span: float) -> float:
    """A round length [m] near a fifth of ``span`` [m]: 1, 2 or 5 times a power of ten."""
    target = max(span / 5.0, 1.0)
    base = 10.0 ** math.floor(math.log10(target))
    return max(m * base for m in (1.0, 2.0, 5.0) if m * base <= target)


def _number(value: float) -> str:
    """A length as printed: one decimal below 100, whole above."""
    return f"{value:.1f}" if abs(value) < 100 else f"{value:.0f}"


def _path(points):
    """Coordinates of segments (pairs of points) joined by NaN breaks, for one plot."""
    xy = [c for a, b in points for c in (a, b, (np.nan, np.nan))]
    arr = np.array(xy, dtype=float).reshape(-1, 2)
    return arr[:, 0], arr[:, 1]


def _wind_arrow(fig, direction, speed, shown, label, altitude, alt_label):
    """A small panel with an arrow the way the wind blows, beside the plan view."""
    ax = fig.add_axes((0.70, 0.19, 0.12, 0.17))
    ax.set_xlim(-1.3, 1.3)
    ax.set_ylim(-1.3, 1.3)
    ax.set_aspect("equal")
    ax.axis("off")
    ax.add_patch(Circle((0, 0), 1.0, fill=False, edgecolor="0.6", linewidth=0.8))
    if speed > 0:
        th = np.radians(direction)
        # From the side the wind comes from, through the centre, to where it goes.
        tail = np.array([np.sin(th), np.cos(th)]) * 0.95
        ax.annotate("", xy=-tail, xytext=tail,
                    arrowprops=dict(arrowstyle="-|>", color=OKABE_ITO["blue"],
                                    linewidth=2.0, mutation_scale=14))
        text = f"wind from {direction:03.0f} deg\n{shown:.0f} {label} at {altitude:.0f} {alt_label}"
    else:
        text = f"calm at {altitude:.0f} {alt_label}"
    ax.text(0, 1.12, "N", ha="center", va="bottom", fontsize=MIN_FONT)
    fig.text(0.76, 0.175, text, ha="center", va="top", fontsize=MIN_FONT + 0.5)


def survey_plan_view(splan, *, units: str | None = None) -> Figure:
    """Plan view of a survey planned in packs.

    Drawn in the area's flat plane (east and north of its centre, metres or kilometres;
    north is up): the area, each pack's lines in its own colour and line style (Okabe-Ito
    with dashes, so a grey print reads the same) and labelled P1, P2, ... on its first
    line, the turns between lines, the transits to and from the take-off point, where
    each pack leaves the survey for a swap, a scale bar, a north arrow and the wind at the
    survey's altitude; the verdict in the title and the caution in the footer.

    Parameters
    ----------
    splan : SurveyPlan
        The planned survey (:func:`cruiseplan.planning.survey.plan_survey`).
    units : {"aviation", "si"}, optional
        Display units of the footer's loading; the map is in metres or kilometres either
        way (a map's scale).

    Returns
    -------
    matplotlib.figure.Figure
        The plan view, A5 landscape.
    """
    mission = splan.mission
    af = mission.airframe
    units = units or af.propulsion.store.default_units
    layout = splan.layout
    lines = layout.lines
    area = layout.area_xy
    tx, ty = layout.takeoff_xy
    xs = np.concatenate([area[:, 0], [tx]])
    ys = np.concatenate([area[:, 1], [ty]])
    span = max(float(np.ptp(xs)), float(np.ptp(ys)), 1.0)
    km = span > 2000.0
    f, unit = (1e-3, "km") if km else (1.0, "m")

    fig = Figure(figsize=PLOT_SIZE)
    ax = fig.add_axes((0.085, 0.17, 0.56, 0.69))
    ring = np.vstack([area, area[:1]]) * f
    ax.fill(ring[:, 0], ring[:, 1], facecolor="0.93", edgecolor="0.35", linewidth=1.2,
            zorder=1)
    handles = [Patch(facecolor="0.93", edgecolor="0.35", label="survey area")]
    packs = splan.packs or ()
    for k, pack in enumerate(packs):
        colour, style, _ = SERIES_STYLES[k % len(SERIES_STYLES)]
        mine = lines[pack.first - 1:pack.last]
        x, y = _path([(ln.start_xy, ln.end_xy) for ln in mine])
        ax.plot(x * f, y * f, color=colour, linestyle=style, linewidth=1.7, zorder=3,
                solid_capstyle="butt")
        x, y = _path([(a.end_xy, b.start_xy) for a, b in zip(mine, mine[1:])])
        if len(mine) > 1:
            ax.plot(x * f, y * f, color=colour, linestyle=":", linewidth=0.8, zorder=2)
        x, y = _path([((tx, ty), mine[0].start_xy), (mine[-1].end_xy, (tx, ty))])
        ax.plot(x * f, y * f, color="0.55", linestyle=(0, (4, 3)), linewidth=0.7, zorder=2)
        (sx, sy), (ex, ey) = mine[0].start_xy, mine[0].end_xy
        ax.text(0.5 * (sx + ex) * f, 0.5 * (sy + ey) * f, f"P{pack.number}", color=colour,
                fontsize=MIN_FONT + 1.5, weight="bold", ha="center", va="center", zorder=6,
                path_effects=HALO)
        if k < LEGEND_PACKS or len(packs) <= LEGEND_PACKS + 1:
            handles.append(Line2D([], [], color=colour, linestyle=style, linewidth=1.7,
                                  label=f"pack {pack.number}: lines {pack.first}-"
                                        f"{pack.last} ({pack.lines})"))
        elif k == LEGEND_PACKS:
            handles.append(Line2D([], [], color="none",
                                  label=f"packs {k + 1}-{len(packs)}: styles repeat, "
                                        "see the P labels"))
    left = lines[packs[-1].last:] if packs else lines
    if left:
        x, y = _path([(ln.start_xy, ln.end_xy) for ln in left])
        ax.plot(x * f, y * f, color="0.45", linestyle=(0, (1, 1.5)), linewidth=1.2,
                zorder=3)
        handles.append(Line2D([], [], color="0.45", linestyle=(0, (1, 1.5)), linewidth=1.2,
                              label=f"not planned: lines {left[0].number}-{left[-1].number}"))
    handles += [Line2D([], [], color="0.3", linestyle=":", linewidth=0.8,
                       label="turns between lines"),
                Line2D([], [], color="0.55", linestyle=(0, (4, 3)), linewidth=0.7,
                       label="transits to and from take-off")]
    for pack in packs[:-1]:
        ex, ey = lines[pack.last - 1].end_xy
        ax.plot(ex * f, ey * f, marker="X", markersize=9, color="black",
                markeredgecolor="white", markeredgewidth=0.8, linestyle="none", zorder=7)
        if len(packs) > LEGEND_PACKS + 1:
            continue    # too many to name: the markers and the P labels say it
        # The label towards the area's centre (the plane's origin): inside the frame.
        away = math.atan2(-ey, -ex)
        ax.annotate(f"swap {pack.number}", (ex * f, ey * f),
                    xytext=(12 * math.cos(away), 12 * math.sin(away)),
                    textcoords="offset points", fontsize=MIN_FONT + 0.5, zorder=7,
                    ha="left" if math.cos(away) >= 0 else "right",
                    va="bottom" if math.sin(away) >= 0 else "top", path_effects=HALO)
    if len(packs) > 1:
        handles.append(Line2D([], [], marker="X", markersize=8, color="black",
                              linestyle="none", label="swap: pack leaves after this line"))
    ax.plot(tx * f, ty * f, marker="*", markersize=15, color=OKABE_ITO["orange"],
            markeredgecolor="black", markeredgewidth=0.9, linestyle="none", zorder=8)
    handles.append(Line2D([], [], marker="*", markersize=12, color=OKABE_ITO["orange"],
                          markeredgecolor="black", linestyle="none",
                          label="take-off and landing"))

    # Equal scales: widen the narrower range so the data fill the axes' box.
    pad = 0.06 * span
    x0, x1 = float(xs.min()) - pad, float(xs.max()) + pad
    y0, y1 = float(ys.min()) - pad, float(ys.max()) + pad
    box = ax.get_position()
    ratio = (box.width * PLOT_SIZE[0]) / (box.height * PLOT_SIZE[1])
    if (x1 - x0) / (y1 - y0) < ratio:
        grow = ((y1 - y0) * ratio - (x1 - x0)) / 2.0
        x0, x1 = x0 - grow, x1 + grow
    else:
        grow = ((x1 - x0) / ratio - (y1 - y0)) / 2.0
        y0, y1 = y0 - grow, y1 + grow
    ax.set_xlim(x0 * f, x1 * f)
    ax.set_ylim(y0 * f, y1 * f)
    ax.set_aspect("equal", adjustable="box")
    ax.set_xlabel(f"east of the area's centre [{unit}]", fontsize=9.5)
    ax.set_ylabel(f"north of the area's centre [{unit}]", fontsize=9.5)
    ax.tick_params(labelsize=8.5)
    ax.grid(True, color="0.88", linewidth=0.5, zorder=0)
    bar = _scale_length(span)
    label = f"{bar / 1000:g} km" if bar >= 1000 else f"{bar:g} m"
    # The scale bar in the lower corner farther from the area and the take-off point.
    data = np.stack([xs, ys], axis=1)
    corner = max((("lower left", (x0, y0)), ("lower right", (x1, y0))),
                 key=lambda c: float(np.min(np.hypot(*(data - c[1]).T))))[0]
    ax.add_artist(AnchoredSizeBar(ax.transData, bar * f, label, corner, pad=0.4,
                                  borderpad=0.6, sep=3, frameon=True, size_vertical=0,
                                  fontproperties={"size": MIN_FONT + 1}))
    ax.annotate("N", xy=(0.95, 0.97), xytext=(0.95, 0.83), xycoords="axes fraction",
                textcoords="axes fraction", ha="center", va="top", fontsize=10,
                weight="bold", path_effects=HALO,
                arrowprops=dict(arrowstyle="-|>", color="black", linewidth=1.4))
    ax.legend(handles=handles, loc="upper left", bbox_to_anchor=(1.03, 1.0),
              fontsize=MIN_FONT + 0.5, framealpha=0.95, borderaxespad=0.0)

    survey = mission.survey
    fd, ld = display("distance", units)
    fa, la = display("altitude", units)
    if splan.go:
        swaps = ", ".join(str(n) for n in splan.swaps)
        verdict = f"GO: {len(packs)} pack(s)" + (f", swaps after line(s) {swaps}"
                                                 if swaps else "")
    else:
        verdict = "NO-GO: " + "; ".join(splan.reasons)
    fig.suptitle(f"Survey plan view \u2014 {mission.name} ({af.name})", fontsize=11,
                 y=0.985)
    fig.text(0.5, 0.925, textwrap.shorten(f"VERDICT {verdict}", 105), ha="center",
             fontsize=MIN_FONT + 1.5, weight="bold",
             color="black" if splan.go else OKABE_ITO["vermillion"])
    how = "least energy in the wind" if splan.candidates is not None else "given"
    fig.text(0.5, 0.895, f"{len(lines)} lines, {layout.length * fd:.1f} {ld}, "
                         f"{_number(survey.spacing * fa)} {la} apart, direction "
                         f"{layout.direction:03.0f}/{layout.direction + 180:03.0f} deg true "
                         f"({how}); flat projection around the area's centre, north up",
             ha="center", fontsize=MIN_FONT + 0.5)
    leg = survey.leg
    w_dir, w_speed = (float(np.ravel(v)[0]) for v in leg.wind.at(leg.altitude))
    fs, ls = display("speed", units)
    wind = "calm" if w_speed == 0 else f"wind {w_dir:03.0f}/{w_speed * fs:.0f} {ls}"
    _wind_arrow(fig, w_dir, w_speed, w_speed * fs, ls, leg.altitude * fa, la)
    with warnings.catch_warnings():
        # Over the maximum take-off mass is the planner's NO-GO reason, said in the title.
        warnings.simplefilter("ignore", CruiseplanWarning)
        load = af.loading(mass=mission.mass, store=mission.store, payload=mission.payload)
    context = figure_context(af, load.mass, load.store, mission.isa_dev, units,
                             extra=f"every pack the same, {wind} at {leg.altitude * fa:.0f} "
                                   f"{la} PA")
    footer(fig, context)
    return fig
