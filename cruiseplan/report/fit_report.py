"""The report of a drag-polar fit: fitted values, their uncertainty and the reduced points."""

from __future__ import annotations

import math
from datetime import date

import numpy as np

from cruiseplan.cautions import CAUTIONS
from cruiseplan.io.flightlog import FlightLog
from cruiseplan.planning.fit import POWER_SOURCES
from cruiseplan.report.output import Column, Report
from cruiseplan.report.tables import airframe_lines
from cruiseplan.units import display


def fit_report(fit, log: FlightLog, airframe, *, units: str | None = None):
    """Lay a polar fit out as a Report: the values, their uncertainty, the reduced points.

    Parameters
    ----------
    fit : cruiseplan.planning.fit.FitResult
        The fit of ``log``.
    log : FlightLog
        The log it was made from.
    airframe : Airframe
        The airframe whose propulsion chain converted the power source.
    units : {"aviation", "si"}
        Display units.

    Returns
    -------
    Report
        Header lines with the fitted values (standard errors, 95 % intervals, correlation,
        R^2, RMS residual, points dropped), one row per log point, notes and cautions; its
        ``summary`` holds the fitted values in SI for JSON.

    References
    ----------
    .. [1] Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, ch. 9 (PIW-VIW).
    """
    units = units or airframe.propulsion.store.default_units
    fa, la = display("altitude", units)
    fs, ls = display("speed", units)
    fm, lm = display("mass", units)
    fp, lp = display(airframe.propulsion.store.power_kind, units)
    pol = airframe.polar
    file_e = 1.0 / (math.pi * airframe.aspect_ratio * pol.k) if hasattr(pol, "k") else None
    file_cd0 = getattr(pol, "cd0", None)

    def value_line(name, value, se, ci, digits, old):
        was = f"; file {old:.{digits}f}" if old is not None else ""
        if not math.isfinite(se):
            return f"{name} = {value:.{digits}f} (held, not fitted){was}"
        return (f"{name} = {value:.{digits}f} \u00b1 {se:.{digits}f} (1 standard error); "
                f"95 % interval {ci[0]:.{digits}f} to {ci[1]:.{digits}f}{was}")

    n_all = fit.lines.size + len(log.not_level)
    meta = airframe_lines(airframe) + [
        f"Log: {log.source} (sha256 {log.checksum[:16]}), {n_all} rows, "
        f"{len(log.not_level)} not level",
        f"Thrust power from {POWER_SOURCES[log.power_source].describe(airframe.propulsion)}",
        f"Reduced by PIW-VIW to reference mass {fit.reference_mass * fm:.1f} {lm} and "
        "sea-level standard density; fitted PIW = A VIW^3 + B / VIW by weighted nonlinear "
        "least squares (relative residuals)",
        value_line("CD0", fit.cd0, fit.se_cd0, fit.ci95["cd0"], 5, file_cd0),
        value_line("oswald_e", fit.oswald_e, fit.se_oswald_e, fit.ci95["oswald_e"], 4,
                   file_e),
        value_line("k", fit.k, fit.se_k, fit.ci95["k"], 5, getattr(pol, "k", None)),
        f"Correlation of CD0 and oswald_e {fit.correlation:+.3f}; R^2 {fit.r_squared:.4f}; "
        f"RMS residual {fit.rms_residual * fp:.3g} {lp} ({fit.rms_relative * 100:.2f} % of "
        f"PIW); residual degrees of freedom {fit.dof}",
        f"Points used {fit.n_used} of {fit.lines.size} level points; "
        + ("outliers dropped (|studentised residual| > "
           f"{fit.outlier_limit:.2f}, Bonferroni for {fit.lines.size} points): "
           + ", ".join(f"line {n} ({t:+.1f} in the fit of all points)"
                       for n, t in fit.dropped)
           if fit.dropped else "no outliers (|studentised residual| > "
           f"{fit.outlier_limit:.2f}, Bonferroni for {fit.lines.size} points)"),
    ]
    if log.not_level:
        meta.append("Not level, dropped before the fit (|vertical speed| > 100 ft/min): "
                    + ", ".join(f"line {n}" for n in log.not_level))
    meta.append(f"Propeller efficiency: {fit.efficiency_note}")
    meta += [f"Note: {w}" for w in fit.warnings]
    meta.append(f"Made {date.today().isoformat()} by cruiseplan")

    curve = fit.curve(fit.viw)
    rel = (fit.piw - curve) / curve * 100.0
    status = np.where(fit.used, "used", "outlier")
    thrust = fit.thrust_power
    columns = [
        Column("line", "", fit.lines.tolist(), "{:d}"),
        Column("PA", la, (log.pressure_altitude * fa).tolist(), "{:.0f}"),
        Column("OAT", "degC", (log.temperature - 273.15).tolist(), "{:.1f}"),
        Column("TAS", ls, (log.tas * fs).tolist(), "{:.1f}"),
        Column("mass", lm, (log.mass * fm).tolist(), "{:.1f}"),
        Column("thrust power", lp, (thrust * fp).tolist(), "{:.2f}" if fp * np.max(thrust)
               < 100 else "{:.1f}"),
        Column("VIW", ls, (fit.viw * fs).tolist(), "{:.1f}"),
        Column("PIW", lp, (fit.piw * fp).tolist(), "{:.2f}" if fp * np.max(fit.piw) < 100
               else "{:.1f}"),
        Column("PIW fit", lp, (curve * fp).tolist(), "{:.2f}" if fp * np.max(curve) < 100
               else "{:.1f}"),
        Column("residual", "%", rel.tolist(), "{:+.2f}"),
        Column("stud. res.", "", fit.studentised.tolist(), "{:+.2f}"),
        Column("status", "", status.tolist(), "{}"),
    ]
    notes = [
        "PIW = P sqrt(sigma) (W_ref/W)^1.5 and VIW = V_E (W_ref/W)^0.5 (power and "
        "equivalent airspeed independent of weight; Kimberlin, Flight Testing of "
        "Fixed-Wing Aircraft, ch. 9)",
        "residual: measured PIW over the fitted curve, minus 1; stud. res.: residual over "
        "its standard error with the point left out of the fit (externally studentised); "
        "outliers were found by the same test in the fit of all level points",
    ]
    summary = {
        "cd0": fit.cd0, "cd0_se": fit.se_cd0, "cd0_ci95_low": fit.ci95["cd0"][0],
        "cd0_ci95_high": fit.ci95["cd0"][1], "oswald_e": fit.oswald_e,
        "oswald_e_se": fit.se_oswald_e, "oswald_e_ci95_low": fit.ci95["oswald_e"][0],
        "oswald_e_ci95_high": fit.ci95["oswald_e"][1], "k": fit.k, "k_se": fit.se_k,
        "correlation_cd0_oswald_e": fit.correlation, "r_squared": fit.r_squared,
        "rms_residual_W": fit.rms_residual, "rms_residual_relative": fit.rms_relative,
        "points_used": fit.n_used, "points_level": int(fit.lines.size),
        "outlier_lines": ",".join(str(n) for n, _ in fit.dropped),
        "not_level_lines": ",".join(str(n) for n in log.not_level),
        "reference_mass_kg": fit.reference_mass, "efficiency_scale": fit.efficiency_scale,
        "efficiency_fitted": fit.efficiency_fitted,
    }
    return Report(title=f"Drag polar fitted from a flight log: {airframe.name}", meta=meta,
                  columns=columns, notes=notes,
                  cautions=tuple(CAUTIONS) + (
                      "A fitted polar is only as good as the log (stabilised points, "
                      "calibrated instruments, the propeller efficiency assumed): compare "
                      "it with the flight manual before planning with it.",),
                  summary=summary,
                  quantities={"reference_mass": (float(fit.reference_mass), "kg"),
                              "cd0": (float(fit.cd0), ""),
                              "oswald_e": (float(fit.oswald_e), ""), "k": (float(fit.k), ""),
                              "rms_residual": (float(fit.rms_residual), "W")})
