"""Does the P10-P90 range of a fitted polar's Monte Carlo cover the truth 80 % of the time?

Each trial makes a synthetic level-flight log from a known polar (the demo trainer's wing,
cd0 0.036, oswald_e 0.76: two weights x two altitudes x 5 speeds, thrust power with 2 %
relative noise, written out from the level-flight power equation independently of the
fit), fits CD0 and e (``fit_polar``), puts the fitted polar, its relative standard errors
and, unless ``correlated=False``, their correlation into the airframe's tolerances, and
runs the Monte Carlo of the still-air range at 2000 ft and 52 m/s TAS. The truth is the
same figure with the true polar. An 80 % interval should hold it in 80 % of the trials
(± 5 % is about 2.5 binomial standard errors at 400 trials).

Run from the repository root: ``.venv/bin/python benchmarks/fit_coverage.py [TRIALS]``.
It prints the coverage with and without the fitted correlation.
"""

from __future__ import annotations

import math
import sys
from dataclasses import replace

import numpy as np

import cruiseplan as cp
from cruiseplan.model.tolerance import Tolerance, ToleranceCorrelation
from cruiseplan.physics.aerodynamics import ParabolicPolar
from cruiseplan.planning.fit import fit_polar
from cruiseplan.planning.uncertainty import cruise_uncertainty, quantiles

G0, RHO0, FT = 9.80665, 1.225, 0.3048
CD0, E = 0.036, 0.76
MASSES = (740.0, 640.0)
ALTITUDES = (2000.0 * FT, 7000.0 * FT)
NOISE = 0.02
CRUISE_ALTITUDE, CRUISE_TAS = 2000.0 * FT, 52.0


def level_power(tas, density, mass, wing_area, k):
    """Thrust power of level flight [W]: 0.5 rho V^3 S CD0 + 2 k W^2 / (rho V S)."""
    w = mass * G0
    return (0.5 * density * tas**3 * wing_area * CD0
            + 2.0 * k * w * w / (density * tas * wing_area))


def coverage(trials: int = 400, samples: int = 4000, seed: int = 2026,
             correlated: bool = True) -> tuple:
    """Share of trials whose P10-P90 range of the range figure holds the true one.

    Parameters
    ----------
    trials : int
        Synthetic logs [-].
    samples : int
        Monte Carlo samples per trial [-].
    seed : int
        Seed of the logs' noise [-]; trial i's Monte Carlo takes seed i.
    correlated : bool
        Write the fitted CD0-e correlation into the tolerances (False: independent).

    Returns
    -------
    share : float
        Coverage [-].
    widths : numpy.ndarray
        P90 - P10 over the true range, per trial [-].
    """
    af = cp.load_airframe("demo-trainer")
    k_true = 1.0 / (math.pi * E * af.aspect_ratio)
    rho = cp.air_state(np.array(ALTITUDES), 8.0).density
    m, r, ve = np.meshgrid(MASSES, rho, np.linspace(31.0, 52.0, 5), indexing="ij")
    m, r = m.ravel(), r.ravel()
    tas = ve.ravel() / np.sqrt(r / RHO0)
    exact = level_power(tas, r, m, af.wing_area, k_true)
    rng = np.random.default_rng(seed)
    noisy = exact * (1.0 + NOISE * rng.standard_normal((trials, exact.size)))
    load = af.loading()
    air = cp.air_state(np.array([CRUISE_ALTITUDE]))
    true_af = replace(af, polar=ParabolicPolar(CD0, k_true), tolerances=())
    truth = float(cp.cruise_points(true_af, load.mass, air, CRUISE_TAS,
                                   load.store).range_ground[0])
    hits, widths = np.zeros(trials, dtype=bool), np.zeros(trials)
    for i, power in enumerate(noisy):
        fit = fit_polar(power, tas, r, m, wing_area=af.wing_area,
                        aspect_ratio=af.aspect_ratio, reference_mass=af.max_takeoff_mass)
        tol = (("cd0", Tolerance("normal", fit.se_cd0 / fit.cd0)),
               ("oswald_e", Tolerance("normal", fit.se_oswald_e / fit.oswald_e)))
        corr = ToleranceCorrelation(("cd0", "oswald_e"), ((1.0, fit.correlation),
                                                          (fit.correlation, 1.0)))
        fitted = replace(af, polar=ParabolicPolar(fit.cd0, fit.k), tolerances=tol,
                         tolerance_correlation=corr if correlated else None)
        u = cruise_uncertainty(fitted, load.mass, load.store, air, CRUISE_TAS, CRUISE_TAS,
                               n=samples, seed=i)
        p10, _, p90 = quantiles(u.range_ground)
        hits[i] = p10 <= truth <= p90
        widths[i] = (p90 - p10) / truth
    return float(hits.mean()), widths


if __name__ == "__main__":
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 400
    for flag in (True, False):
        share, widths = coverage(n, correlated=flag)
        label = "with the fitted correlation" if flag else "independent (correlation 0)"
        print(f"{n} logs, {label}: P10-P90 covers the true range in {share:.1%} "
              f"(median width {np.median(widths):.2%} of the range)")
