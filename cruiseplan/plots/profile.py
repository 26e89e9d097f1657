"""Mission profile: altitude and fuel or energy remaining along the route."""

from __future__ import annotations

import textwrap

import numpy as np
from matplotlib.figure import Figure

from cruiseplan.amounts import amount_unit
from cruiseplan.planning.mission import ground_elevation
from cruiseplan.plots.style import (
    MIN_FONT,
    OKABE_ITO,
    PLOT_SIZE,
    figure_context,
    footer,
)
from cruiseplan.units import display

# --- mission profile ------------------------------------------------------------------------

def mission_profile(plan, *, units: str | None = None) -> Figure:
    """Altitude and fuel or energy remaining against distance along a planned mission.

    Parameters
    ----------
    plan : Plan
        A planned mission (:func:`cruiseplan.planning.mission.plan_mission`).
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
    units = units or prop.store.default_units
    fa, la = display("altitude", units)
    fd, ld = display("distance", units)
    fq, lq, _ = amount_unit(prop, units)
    what = "fuel remaining" if prop.store.burns_mass else "usable energy remaining"
    # Points at every segment boundary: altitude and remaining vary linearly within one.
    # Only what is flown: a NO-GO plan's line stops where it fails.
    x, h, q = [0.0], [plan.segments[0].altitude_start], [plan.initial]
    holds = []
    for seg in plan.segments:
        if not seg.flown:
            break
        if seg.kind in ("hover", "loiter"):
            holds.append((x[-1], seg))
        x.append(x[-1] + seg.distance)
        h.append(seg.altitude_end)
        q.append(seg.remaining)
    x, h, q = np.array(x) * fd, np.array(h) * fa, np.array(q) * fq
    fig = Figure(figsize=PLOT_SIZE)
    ax_h = fig.add_axes((0.09, 0.55, 0.86, 0.33))
    ax_q = fig.add_axes((0.09, 0.17, 0.86, 0.33), sharex=ax_h)
    ax_h.plot(x, h, color=OKABE_ITO["blue"], linewidth=2.0, marker="o", markersize=3.5,
              label="pressure altitude flown")

    # The altitude axis spans the flying and the highest ground, not down to sea level, so
    # that the ground does not dwarf the flight; its ground is a band under that height.
    ground = np.array([ground_elevation(mission, leg) for leg in mission.legs]) * fa
    caps = [(ground_elevation(mission, leg) + leg.max_agl) * fa for leg in mission.legs
            if leg.max_agl is not None]
    lo = float(min(np.min(h), np.min(ground)))
    hi = float(max([np.max(h), np.max(ground)] + caps))
    bottom = max(0.0, lo - 0.25 * max(hi - lo, 1e-3 * max(abs(hi), 1.0)))
    start = 0.0
    for k, leg in enumerate(mission.legs):
        end = start + leg.distance * fd
        g = ground[k]
        # Where the path climbs from lower ground (departure) it is not yet over the leg's
        # highest ground, which lies somewhere along the leg: the band starts where the
        # path is above it, so the climb line never seems to cut through terrain.
        xs = np.linspace(start, end, 200)
        over = np.interp(xs, x, h) >= g - 1e-9
        ax_h.fill_between(xs, bottom, g, where=over, color="0.75", hatch="...",
                          edgecolor="0.45", linewidth=0.0,
                          label="highest ground (leg)" if k == 0 else None)
        if leg.max_agl is not None:
            cap = (ground_elevation(mission, leg) + leg.max_agl) * fa
            ax_h.plot([start, end], [cap, cap], color=OKABE_ITO["vermillion"],
                      linestyle="--", linewidth=1.4,
                      label="height cap above ground" if k == 0 else None)
        ax_h.axvline(end, color="0.6", linewidth=0.8, linestyle=":")
        if end > start:  # a hover or loiter holds a point: it is marked below instead
            ax_h.text(0.5 * (start + end), 1.01, leg.name,
                      transform=ax_h.get_xaxis_transform(), ha="center", va="bottom",
                      fontsize=MIN_FONT, rotation=0, clip_on=False)
        start = end
    for at, seg in holds:
        what_hold = "orbit" if seg.kind == "loiter" else "hover"
        ax_h.annotate(f"{what_hold} {seg.time / 60:.0f} min", (at * fd, seg.altitude_end * fa),
                      xytext=(0, 8), textcoords="offset points", ha="center", va="bottom",
                      fontsize=MIN_FONT, color=OKABE_ITO["blue"],
                      bbox=dict(boxstyle="round,pad=0.2", fc="white", ec="none", alpha=0.85))
    if not all(seg.flown for seg in plan.segments):
        ax_h.plot(x[-1:], h[-1:], marker="X", markersize=10, color=OKABE_ITO["vermillion"],
                  linestyle="none", label="the plan fails here: the rest is not flown")
        ax_q.plot(x[-1:], q[-1:], marker="X", markersize=10, color=OKABE_ITO["vermillion"],
                  linestyle="none")
    ax_q.plot(x, q, color=OKABE_ITO["green"], linewidth=2.0, marker="s", markersize=3.5,
              label=what)
    reserve = plan.reserve_required * fq
    ax_q.axhline(reserve, color=OKABE_ITO["vermillion"], linestyle="--", linewidth=1.5,
                 label=f"reserve required ({plan.reserve.describe(prop, units)})")
    ax_q.fill_between(x, 0, reserve, color=OKABE_ITO["vermillion"], alpha=0.12,
                      hatch="///", edgecolor=OKABE_ITO["vermillion"], linewidth=0.0)
    ax_h.set_ylabel(f"pressure altitude [{la}]", fontsize=9.5)
    ax_q.set_ylabel(f"{what} [{lq}]", fontsize=9.5)
    ax_q.set_xlabel(f"distance along the route [{ld}]", fontsize=9.5)
    ax_h.tick_params(labelbottom=False, labelsize=8.5)
    ax_q.tick_params(labelsize=8.5)
    ax_q.set_ylim(bottom=min(0.0, float(np.min(q)) * 1.05))
    ax_h.set_ylim(bottom, hi + 0.35 * (hi - bottom))  # room for the legend above the path
    for ax in (ax_h, ax_q):
        ax.grid(True, color="0.85", linewidth=0.6)
        ax.legend(loc="best", fontsize=MIN_FONT + 0.5, framealpha=0.9)
    verdict = plan.verdict if plan.go else "NO-GO: " + "; ".join(plan.reasons)
    fig.suptitle(f"Mission profile \u2014 {mission.name} ({af.name})", fontsize=11,
                 y=0.985)
    fig.text(0.5, 0.925, textwrap.shorten(f"VERDICT {verdict}", 150), ha="center",
             fontsize=MIN_FONT + 1.5, weight="bold",
             color="black" if plan.go else OKABE_ITO["vermillion"])
    footer(fig, figure_context(af, plan.takeoff_mass, plan.initial, mission.isa_dev, units))
    return fig


