"""Drag-polar fit figure: the PIW-VIW curve with its points, and the residuals."""

from __future__ import annotations

import textwrap
from datetime import date

import numpy as np
from matplotlib.figure import Figure

from cruiseplan.constants import RHO0
from cruiseplan.planning.fit import piw_coefficients
from cruiseplan.plots.style import (
    HALO,
    MIN_FONT,
    OKABE_ITO,
    PLOT_SIZE,
    SERIES_STYLES,
    footer,
    power_display,
)
from cruiseplan.units import display

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
    fit_result : cruiseplan.planning.fit.FitResult
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
    fit = fit_result
    units = units or airframe.propulsion.store.default_units
    fs, ls = display("speed", units)
    fp, lp = power_display(airframe, units)
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
                        path_effects=HALO, zorder=6)
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
    footer(fig, " \u00b7 ".join(parts))
    return fig
