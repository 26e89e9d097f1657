r"""Drag polar from level-flight power data: PIW-VIW reduction and a least-squares fit.

Numeric core in SI floats (no pint, no matplotlib). In steady level flight the thrust power
equals the drag power of a symmetric parabolic polar,

.. math:: P = \tfrac12 \rho V^3 S C_{D0} + \frac{2 k W^2}{\rho V S}.

With :math:`\sigma = \rho/\rho_0`, the equivalent airspeed :math:`V_E = V\sqrt\sigma` and a
reference weight :math:`W_{ref}`, the power and velocity independent of weight [1]_

.. math::

    \mathrm{PIW} = P \sqrt\sigma\,(W_{ref}/W)^{3/2}, \qquad
    \mathrm{VIW} = V_E\,(W_{ref}/W)^{1/2}

put points flown at any weight and altitude on one curve,

.. math::

    \mathrm{PIW} = A\,\mathrm{VIW}^3 + B/\mathrm{VIW}, \qquad
    A = \tfrac12\rho_0 S C_{D0}, \qquad B = \frac{2 W_{ref}^2 k}{\rho_0 S},

whose two coefficients give :math:`C_{D0}` and :math:`k = 1/(\pi e A\!R)`.

Thrust power comes from the logged power source through the airframe's chain
(:data:`POWER_SOURCES`): battery power x motor x controller x propeller efficiency; shaft
power x propeller efficiency; fuel flow / BSFC x propeller efficiency.

The fit (:func:`fit_polar`) finds :math:`C_{D0}` and :math:`e` by nonlinear least squares
(``scipy.optimize.least_squares``) on *relative* residuals, PIW_fit/PIW - 1, since power
meters and fuel-flow sensors err in proportion to the reading (common practice, no source).
Standard errors come from the Jacobian and the residual variance,
:math:`\mathrm{cov} = s^2 (J^T J)^{-1}`, :math:`s^2 = \sum r_i^2 / (n - p)`, and 95 %
intervals from Student's t with n - p degrees of freedom [2]_. Points whose externally
studentised residual exceeds 3 in magnitude are flagged as outliers and the fit is redone
without them (common practice, no source) [2]_.

Propeller efficiency. A single efficiency factor :math:`c` multiplying the thrust power
multiplies both terms of the curve, so :math:`(C_{D0}, k, c)` and
:math:`(\lambda C_{D0}, \lambda k, \lambda c)` fit the data equally well: the three are
confounded, whatever the speeds flown or the shape of a tabulated efficiency. The fit finds
this from the rank of the sensitivity matrix and holds the efficiency at the airframe's
value; it fits a scale on the efficiency only when asked *and* independent information
fixes one polar coefficient (e.g. a CD0 or e known from glide tests).

References
----------
.. [1] R. D. Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, AIAA Education Series,
   2003, ch. 9 (PIW-VIW reduction of level-flight performance).
.. [2] N. R. Draper and H. Smith, *Applied Regression Analysis*, 3rd ed., Wiley, 1998,
   chs. 8 and 24 (residuals, leverage, studentised residuals; nonlinear least squares and
   its linearised standard errors; chapter numbers from memory).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from cruiseplan.constants import G0, RHO0
from cruiseplan.errors import CruiseplanError, lookup
from cruiseplan.ranges import check_range

#: Largest |externally studentised residual| of a point kept in the fit: None for the
#: Bonferroni threshold of the log's size (:func:`outlier_threshold`). A fixed 3 dropped a
#: genuine point in ~15 % of clean 32-point logs, and the 95 % intervals covered only
#: ~94 %; the Bonferroni threshold keeps them at 95 % (benchmarks/fit_coverage.py).
OUTLIER_LIMIT = None
#: Chance that the outlier rule drops any genuine point of a clean log [-].
OUTLIER_ALPHA = 0.05
#: Relative residual below which no point is called an outlier: an exact fit leaves
#: residuals at rounding level, whose studentised values are noise.
RESIDUAL_FLOOR = 1e-9
#: Fewest points a fit needs.
MIN_POINTS = 5
#: Fitted parameters, in the order of the parameter vector.
PARAMETERS = ("cd0", "oswald_e", "efficiency_scale")
#: |correlation| of CD0 and e above which the log cannot separate them well.
CORRELATION_WARNING = 0.95
#: 1 lb/(hp h) in kg/J.
_LB_PER_HP_H = 0.45359237 / (745.69987158227022 * 3600.0)


# --- power source to thrust power -------------------------------------------------------------

@dataclass(frozen=True)
class PowerSource:
    """Registry entry: how a logged quantity becomes shaft power, and for which propulsion.

    Attributes
    ----------
    label : str
        What the log gave, in words.
    kinds : tuple of str
        Propulsion kinds it applies to.
    to_shaft : callable
        ``to_shaft(propulsion, values)``: shaft power [W] from the logged values (SI).
    chain : callable
        ``chain(propulsion)``: the conversion in words, for reports.
    """

    label: str
    kinds: tuple
    to_shaft: object
    chain: object

    def describe(self, propulsion) -> str:
        """The whole chain to thrust power, in words with the airframe's values.

        Parameters
        ----------
        propulsion : PistonPropeller or ElectricPropeller
            The airframe's propulsion, whose efficiencies [-] and BSFC are quoted.

        Returns
        -------
        str
            E.g. ``"battery power x motor efficiency 0.85 x ... x propeller efficiency
            0.7"``.
        """
        return f"{self.label}{self.chain(propulsion)} x {efficiency_text(propulsion)}"


def efficiency_text(propulsion) -> str:
    """The propeller efficiency of a propulsion, in words.

    Parameters
    ----------
    propulsion : PistonPropeller or ElectricPropeller
        A propulsion with a ``propeller`` efficiency (constant or tabulated) [-].

    Returns
    -------
    str
        The constant efficiency, or the range of the tabulated one.
    """
    eta = propulsion.propeller
    if eta.is_constant:
        return f"propeller efficiency {eta.efficiency[0]:g}"
    return (f"propeller efficiency tabulated against TAS ({min(eta.efficiency):g} to "
            f"{max(eta.efficiency):g})")


#: Power sources of a flight log by name (see :mod:`cruiseplan.io.flightlog`).
POWER_SOURCES = {
    "electric_power": PowerSource(
        "battery power", ("electric-propeller",),
        lambda p, x: x * p.motor_efficiency * p.controller_efficiency,
        lambda p: f" x motor efficiency {p.motor_efficiency:g} x controller efficiency "
                  f"{p.controller_efficiency:g}"),
    "shaft_power": PowerSource(
        "shaft power", ("piston-propeller", "electric-propeller"),
        lambda p, x: x, lambda p: ""),
    "fuel_mass_flow": PowerSource(
        "fuel flow", ("piston-propeller",),
        lambda p, x: x / p.bsfc,
        lambda p: f" / BSFC {p.bsfc / _LB_PER_HP_H:.3g} lb/(hp h)"),
    "fuel_volume_flow": PowerSource(
        "fuel flow", ("piston-propeller",),
        lambda p, x: x * p.fuel_density / p.bsfc,
        lambda p: f" x fuel density {p.fuel_density:g} kg/m^3 / BSFC "
                  f"{p.bsfc / _LB_PER_HP_H:.3g} lb/(hp h)"),
}


def thrust_power(propulsion, source: str, values, tas, density=None):
    r"""Thrust power [W] from a logged power source through the propulsion chain.

    Parameters
    ----------
    propulsion : PistonPropeller or ElectricPropeller
        The airframe's propulsion.
    source : str
        A key of :data:`POWER_SOURCES`.
    values : array_like
        The logged quantity in SI [W, kg/s or m^3/s].
    tas : array_like
        True airspeed [m/s], for the propeller efficiency.
    density : array_like, optional
        Air density [kg/m^3]; needed when the propeller has a diameter (momentum theory).

    Returns
    -------
    numpy.ndarray
        Thrust power :math:`P_{shaft}\,\eta_p(V)` [W], or with a propeller diameter the
        momentum-theory thrust at that shaft power times TAS.

    Raises
    ------
    CruiseplanError
        When the source does not apply to the propulsion (fuel flow of an electric one).
    """
    entry = lookup(POWER_SOURCES, source, "power source")
    if propulsion.kind not in entry.kinds:
        fits = [k for k, e in POWER_SOURCES.items() if propulsion.kind in e.kinds]
        raise CruiseplanError(f"the log gives {entry.label} but the airframe is "
                              f"{propulsion.kind}: log {' or '.join(sorted(set(fits)))}")
    tas = np.asarray(tas, dtype=float)
    shaft = entry.to_shaft(propulsion, np.asarray(values, dtype=float))
    if density is None:
        if not hasattr(propulsion.propeller, "diameter"):
            return shaft * propulsion.propeller(tas)
        raise CruiseplanError("a propeller with a diameter needs the air density for its "
                              "thrust")
    return propulsion.thrust_available(tas, density, shaft) * tas


# --- PIW-VIW ---------------------------------------------------------------------------------

def piw_viw(thrust_power, tas, density, mass, reference_mass):
    r"""Power and velocity independent of weight.

    .. math::

        \mathrm{PIW} = P\sqrt\sigma\,(W_{ref}/W)^{3/2}, \qquad
        \mathrm{VIW} = V\sqrt\sigma\,(W_{ref}/W)^{1/2}

    Parameters
    ----------
    thrust_power : array_like
        Thrust (drag) power [W].
    tas : array_like
        True airspeed [m/s].
    density : array_like
        Air density [kg/m^3].
    mass : array_like
        Aircraft mass [kg].
    reference_mass : float
        Mass the points are reduced to [kg].

    Returns
    -------
    piw : numpy.ndarray
        Power independent of weight [W].
    viw : numpy.ndarray
        Velocity independent of weight [m/s] (an equivalent airspeed).

    References
    ----------
    .. [1] Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, ch. 9.
    """
    root_sigma = np.sqrt(np.asarray(density, dtype=float) / RHO0)
    ratio = reference_mass / np.asarray(mass, dtype=float)
    piw = np.asarray(thrust_power, dtype=float) * root_sigma * ratio**1.5
    viw = np.asarray(tas, dtype=float) * root_sigma * np.sqrt(ratio)
    return piw, viw


def piw_coefficients(cd0, k, wing_area, reference_mass):
    r"""Coefficients of :math:`\mathrm{PIW} = A\,\mathrm{VIW}^3 + B/\mathrm{VIW}`.

    Parameters
    ----------
    cd0 : array_like
        Parasite drag coefficient [-].
    k : array_like
        Induced-drag factor [-].
    wing_area : float
        Wing area [m^2].
    reference_mass : float
        Reference mass [kg].

    Returns
    -------
    a : numpy.ndarray
        :math:`A = \tfrac12\rho_0 S C_{D0}` [kg/m].
    b : numpy.ndarray
        :math:`B = 2 W_{ref}^2 k / (\rho_0 S)` [N^2 m^2/kg].

    References
    ----------
    .. [1] Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, ch. 9.
    """
    w = reference_mass * G0
    return (0.5 * RHO0 * wing_area * np.asarray(cd0, dtype=float),
            2.0 * w * w * np.asarray(k, dtype=float) / (RHO0 * wing_area))


def _model(theta, viw, wing_area, aspect_ratio, reference_mass):
    """PIW of the model at ``viw`` and its derivatives by (cd0, e, c), shape (n, 3)."""
    cd0, e, c = theta
    a, b = piw_coefficients(cd0, 1.0 / (math.pi * aspect_ratio * e), wing_area,
                            reference_mass)
    v3 = viw**3
    m = (a * v3 + b / viw) / c
    jac = np.stack([0.5 * RHO0 * wing_area * v3 / c, -b / (e * viw * c), -m / c], axis=1)
    return m, jac


def sensitivity_rank(jacobian, values, rtol: float = 1e-8) -> int:
    r"""Numerical rank of a sensitivity matrix, columns scaled by their parameter values.

    A rank below the number of columns means the parameters are confounded: a combination
    of them changes nothing the data can see. With :math:`C_{D0}`, :math:`e` and an
    efficiency scale :math:`c` the scaled columns satisfy
    :math:`C_{D0}\partial_{C_{D0}} - e\,\partial_e + c\,\partial_c = 0` exactly.

    Parameters
    ----------
    jacobian : array_like
        Derivatives of the residuals, shape (n, p) [residual unit per parameter unit].
    values : array_like
        Parameter values, shape (p,) [each parameter's unit].
    rtol : float, optional
        Singular values below ``rtol`` times the largest count as zero [-].

    Returns
    -------
    int
        The rank [-].
    """
    s = np.linalg.svd(np.asarray(jacobian) * np.asarray(values), compute_uv=False)
    return int(np.count_nonzero(s > rtol * s[0]))


def outlier_threshold(n: int, p: int, alpha: float = OUTLIER_ALPHA) -> float:
    """Bonferroni threshold of |externally studentised residual| for ``n`` points.

    Each of the ``n`` residuals of a clean log follows Student's t with ``n - p - 1``
    degrees of freedom; the threshold at two-sided level ``alpha / n`` makes the chance
    of dropping any genuine point at most ``alpha`` (Draper and Smith, ch. 8).

    Parameters
    ----------
    n : int
        Points in the fit [-].
    p : int
        Parameters fitted [-].
    alpha : float, optional
        Family-wise false-alarm rate [-].

    Returns
    -------
    float
        The threshold [-] (about 3.6 for 32 points and 2 parameters).
    """
    return _student_t(max(n - p - 1, 1), 1.0 - alpha / (2.0 * max(n, 1)))


def _student_t(dof: int, p: float = 0.975) -> float:
    from scipy.special import stdtrit

    return float(stdtrit(dof, p))


# --- the fit -----------------------------------------------------------------------------------

@dataclass(frozen=True)
class FitResult:
    """A drag polar fitted to level-flight power data (SI).

    Attributes
    ----------
    cd0, oswald_e, k : float
        Fitted parasite drag coefficient, Oswald efficiency and k = 1/(pi e AR) [-].
    efficiency_scale : float
        Fitted propeller efficiency over the airframe's (1 when held) [-].
    se_cd0, se_oswald_e, se_k, se_efficiency_scale : float
        Standard errors [-] (NaN for a value held, not fitted).
    ci95 : dict
        95 % confidence interval (low, high) per name: cd0, oswald_e, k, efficiency_scale.
    correlation : float
        Correlation of the CD0 and e estimates [-] (NaN unless both fitted).
    covariance : numpy.ndarray
        Covariance of the fitted parameters, in the order of ``parameters``.
    parameters : tuple of str
        Names of the fitted parameters.
    r_squared : float
        1 - sum of squared PIW residuals / total sum of squares about the mean PIW [-].
    rms_residual : float
        Root-mean-square PIW residual [W].
    rms_relative : float
        Root-mean-square relative residual [-] (the fit's own measure).
    dof : int
        Residual degrees of freedom, points used minus parameters fitted.
    reference_mass, wing_area, aspect_ratio : float
        [kg], [m^2], [-].
    lines : numpy.ndarray
        Label of each point (the log's line numbers).
    thrust_power, tas, density, mass : numpy.ndarray
        Inputs per point [W, m/s, kg/m^3, kg].
    piw, viw : numpy.ndarray
        Reduced points [W, m/s].
    used : numpy.ndarray
        True for points in the final fit.
    studentised : numpy.ndarray
        Residuals of the final fit over their standard error with the point left out
        (externally studentised; for outliers, the prediction residual) [-].
    dropped : tuple
        (line, externally studentised residual in the fit of all points) of each outlier
        dropped: the test that dropped it.
    outlier_limit : float
        The |studentised residual| limit used [-].
    efficiency_fitted : bool
        Whether the efficiency scale was fitted.
    efficiency_note : str
        Why the efficiency was, or was not, fitted.
    warnings : tuple of str
        Things the reader should know (strong correlation, too few points to drop outliers).
    """

    cd0: float
    oswald_e: float
    k: float
    efficiency_scale: float
    se_cd0: float
    se_oswald_e: float
    se_k: float
    se_efficiency_scale: float
    ci95: dict
    correlation: float
    covariance: np.ndarray
    parameters: tuple
    r_squared: float
    rms_residual: float
    rms_relative: float
    dof: int
    reference_mass: float
    wing_area: float
    aspect_ratio: float
    lines: np.ndarray
    thrust_power: np.ndarray
    tas: np.ndarray
    density: np.ndarray
    mass: np.ndarray
    piw: np.ndarray
    viw: np.ndarray
    used: np.ndarray
    studentised: np.ndarray
    dropped: tuple
    outlier_limit: float
    efficiency_fitted: bool
    efficiency_note: str
    warnings: tuple = field(default=())

    @property
    def n_used(self) -> int:
        """Number of points in the final fit."""
        return int(np.count_nonzero(self.used))

    def curve(self, viw):
        """Fitted PIW [W] at VIW [m/s] (as the log's power, at the airframe's efficiency).

        Parameters
        ----------
        viw : array_like
            Velocity independent of weight [m/s].

        Returns
        -------
        numpy.ndarray
            PIW on the fitted curve, A VIW^3 + B / VIW over the efficiency scale [W].

        References
        ----------
        .. [1] Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, ch. 9 (PIW-VIW
           reduction of level-flight performance).
        """
        a, b = piw_coefficients(self.cd0, self.k, self.wing_area, self.reference_mass)
        viw = np.asarray(viw, dtype=float)
        return (a * viw**3 + b / viw) / self.efficiency_scale

    def summary(self) -> str:
        """The fit in a few lines of text, SI units."""
        def row(name, value, se, digits):
            lo, hi = self.ci95[name]
            if not math.isfinite(se):
                return f"  {name:<16} = {value:.{digits}f}  (held)"
            return (f"  {name:<16} = {value:.{digits}f} +/- {se:.{digits}f}  "
                    f"(95 %: {lo:.{digits}f} to {hi:.{digits}f})")

        out = [f"Drag polar by PIW-VIW reduction, reference mass {self.reference_mass:.2f} kg, "
               f"{self.n_used} of {self.lines.size} points",
               row("cd0", self.cd0, self.se_cd0, 5),
               row("oswald_e", self.oswald_e, self.se_oswald_e, 4),
               row("k", self.k, self.se_k, 5),
               row("efficiency_scale", self.efficiency_scale, self.se_efficiency_scale, 4),
               f"  correlation(cd0, oswald_e) = {self.correlation:+.3f}",
               f"  R^2 = {self.r_squared:.5f}; RMS residual {self.rms_residual:.4g} W "
               f"({self.rms_relative * 100:.2f} %); {self.dof} degrees of freedom",
               "  outliers dropped: " + (", ".join(f"{n} ({t:+.2f})" for n, t in self.dropped)
                                         or "none"),
               f"  propeller efficiency: {self.efficiency_note}"]
        out += [f"  note: {w}" for w in self.warnings]
        return "\n".join(out)


def _solve(theta0, free, piw, viw, shape):
    """Least squares over the free parameters; returns the full parameter vector."""
    from scipy.optimize import least_squares

    theta = np.array(theta0, dtype=float)
    idx = np.flatnonzero(free)

    def residuals(x):
        theta[idx] = x
        m, _ = _model(theta, viw, *shape)
        return m / piw - 1.0

    def jacobian(x):
        theta[idx] = x
        _, jac = _model(theta, viw, *shape)
        return jac[:, idx] / piw[:, None]

    sol = least_squares(residuals, theta[idx], jac=jacobian, bounds=(0.0, np.inf),
                        x_scale="jac", method="trf", xtol=1e-12, ftol=1e-12, gtol=1e-12)
    theta[idx] = sol.x
    return theta


def _statistics(theta, free, piw, viw, shape):
    """Residuals, covariance and externally studentised residuals at a solution."""
    m, jac = _model(theta, viw, *shape)
    r = m / piw - 1.0
    j = jac[:, free] / piw[:, None]
    n, p = j.shape
    dof = n - p
    s2 = float(r @ r) / dof
    inv = np.linalg.pinv(j.T @ j)
    lev = np.clip(np.einsum("ij,jk,ik->i", j, inv, j), 0.0, 1.0 - 1e-12)
    # Residual variance with each point left out (Draper and Smith, ch. 8).
    s2_out = np.maximum((dof * s2 - r * r / (1.0 - lev)) / max(dof - 1, 1), 1e-300)
    # Sign: observed above the curve is positive.
    t = -r / np.sqrt(s2_out * (1.0 - lev))
    return m, r, s2 * inv, t, dof


def fit_polar(thrust_power, tas, density, mass, *, wing_area, aspect_ratio, reference_mass,
              lines=None, fit_efficiency=False, known_cd0=None, known_oswald_e=None,
              outlier_limit=OUTLIER_LIMIT,
              efficiency_label="the propeller efficiency assumed") -> FitResult:
    r"""Fit CD0 and Oswald e to level-flight thrust power by PIW-VIW reduction.

    Parameters
    ----------
    thrust_power : array_like
        Thrust power of each point, from the power source at the assumed efficiency [W].
    tas : array_like
        True airspeed [m/s].
    density : array_like
        Air density [kg/m^3].
    mass : array_like
        Aircraft mass [kg].
    wing_area : float
        Reference wing area [m^2].
    aspect_ratio : float
        Wing aspect ratio [-].
    reference_mass : float
        Mass the points are reduced to [kg].
    lines : array_like of int, optional
        Labels of the points (the log's line numbers) [-]; 1, 2, ... by default.
    fit_efficiency : bool, optional
        Also fit a scale on the propeller efficiency, when the data can tell it apart
        (it can only with ``known_cd0`` or ``known_oswald_e``).
    known_cd0, known_oswald_e : float, optional
        A polar coefficient known independently (e.g. from glide tests), held fixed [-].
    outlier_limit : float, optional
        Points whose |externally studentised residual| exceeds this are dropped and the
        fit redone [-]; by default the Bonferroni threshold of the log's size
        (:func:`outlier_threshold`), so the 95 % intervals cover 95 % on clean logs.
    efficiency_label : str, optional
        How to name the efficiency held, in the note.

    Returns
    -------
    FitResult
        Values, standard errors, 95 % intervals, correlation, R^2, RMS residual, the
        reduced points and the outliers dropped.

    Raises
    ------
    CruiseplanError
        For fewer than :data:`MIN_POINTS` points, non-positive inputs, or data that do not
        show the power rising at both ends of the speed range.

    References
    ----------
    .. [1] Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, ch. 9.
    .. [2] Draper and Smith, *Applied Regression Analysis*, chs. 8 and 24.
    """
    arrays = np.broadcast_arrays(*(np.atleast_1d(np.asarray(x, dtype=float))
                                   for x in (thrust_power, tas, density, mass)))
    power, v, rho, m = (np.array(a, dtype=float).ravel() for a in arrays)
    n = power.size
    labels = np.arange(1, n + 1) if lines is None else np.asarray(lines).ravel()
    if n < MIN_POINTS:
        raise CruiseplanError(f"{n} level-flight points; the fit needs at least {MIN_POINTS}")
    for name, arr in (("thrust power", power), ("TAS", v), ("density", rho), ("mass", m)):
        bad = ~(arr > 0) | ~np.isfinite(arr)
        if np.any(bad):
            i = int(np.argmax(bad))
            raise CruiseplanError(f"point {labels[i]}: {name} {arr[i]:.4g} must be positive "
                                  "and finite")
    for name, known in (("CD0", known_cd0), ("e", known_oswald_e)):
        if known is not None and not (known > 0 and math.isfinite(known)):
            raise CruiseplanError(f"known {name} {known!r} must be a positive number")
    if not (reference_mass > 0 and math.isfinite(reference_mass)):
        raise CruiseplanError(f"reference mass {reference_mass!r} kg must be positive")
    check_range(reference_mass, "mass", "reference mass")
    piw, viw = piw_viw(power, v, rho, m, reference_mass)
    if float(np.ptp(viw)) <= 1e-6 * float(np.max(viw)):
        raise CruiseplanError(f"all {n} level-flight points are at one speed (VIW "
                              f"{viw[0]:.4g} m/s): the fit needs points over a range of "
                              "speeds")
    shape = (wing_area, aspect_ratio, reference_mass)

    # Start from the linear solution in (A, B), weighted like the fit.
    design = np.stack([viw**3, 1.0 / viw], axis=1) / piw[:, None]
    (a0, b0), *_ = np.linalg.lstsq(design, np.ones(n), rcond=None)
    w_ref = reference_mass * G0
    cd0_0 = a0 / (0.5 * RHO0 * wing_area)
    k0 = b0 * RHO0 * wing_area / (2.0 * w_ref * w_ref)
    if known_cd0 is None and known_oswald_e is None and not (cd0_0 > 0 and k0 > 0):
        raise CruiseplanError(
            f"the power does not rise at both ends of the speed range (linear estimate CD0 "
            f"{cd0_0:.3g}, k {k0:.3g}): log points from near the minimum-power speed to near "
            "full power")
    e0 = 1.0 / (math.pi * aspect_ratio * k0) if k0 > 0 else 0.8
    theta0 = np.array([known_cd0 if known_cd0 is not None else (cd0_0 if cd0_0 > 0 else 0.03),
                       known_oswald_e if known_oswald_e is not None else e0, 1.0])
    free = np.array([known_cd0 is None, known_oswald_e is None, False])
    if not free.any() and not fit_efficiency:
        raise CruiseplanError("nothing to fit: both CD0 and e are given as known")

    note = (f"held at {efficiency_label}, not fitted: level-flight power gives drag power "
            "over propeller efficiency, so the fitted CD0 and k scale with the efficiency "
            "assumed")
    fitted_eta = False
    if fit_efficiency:
        trial = free.copy()
        trial[2] = True
        _, jac = _model(theta0, viw, *shape)
        rank = sensitivity_rank(jac[:, trial] / piw[:, None], theta0[trial])
        if rank < int(trial.sum()):
            note = (f"held at {efficiency_label}: asked to fit it, but one efficiency factor "
                    "scales both terms of the power curve, so efficiency, CD0 and k are "
                    f"confounded (sensitivity rank {rank} of {int(trial.sum())}); give an "
                    "independently known CD0 or e to fit it")
        else:
            free = trial
            fitted_eta = True
            known = "CD0" if known_cd0 is not None else "e"
            note = (f"fitted as a scale on {efficiency_label}, with {known} held at the "
                    "known value given")

    p = int(free.sum())
    if outlier_limit is None:
        outlier_limit = outlier_threshold(n, p)
    warn = []
    theta = _solve(theta0, free, piw, viw, shape)
    _, r_all, _, t_all, _ = _statistics(theta, free, piw, viw, shape)
    used = np.ones(n, dtype=bool)
    flagged = (np.abs(t_all) > outlier_limit) & (np.abs(r_all) > RESIDUAL_FLOOR)
    if np.any(flagged):
        if n - int(flagged.sum()) >= max(MIN_POINTS, p + 3):
            used = ~flagged
            theta = _solve(theta, free, piw[used], viw[used], shape)
        else:
            warn.append(f"{int(flagged.sum())} points have |studentised residual| > "
                        f"{outlier_limit:g} but too few would remain to drop them")
    model, r, cov, t_used, dof = _statistics(theta, free, piw[used], viw[used], shape)
    studentised = np.empty(n)
    studentised[used] = t_used
    if not used.all():
        # Points left out: prediction residual over its standard error (Draper and Smith,
        # ch. 8), so the column reads the same for every point.
        m_out, jac_out = _model(theta, viw[~used], *shape)
        j_out = jac_out[:, free] / piw[~used, None]
        s2 = float(r @ r) / dof
        lev_out = np.einsum("ij,jk,ik->i", j_out, cov / s2, j_out)
        studentised[~used] = -(m_out / piw[~used] - 1.0) / np.sqrt(s2 * (1.0 + lev_out))

    t95 = _student_t(dof)
    se_full = np.full(3, np.nan)
    se_full[free] = np.sqrt(np.diag(cov))
    cd0, e, c = theta
    k = 1.0 / (math.pi * aspect_ratio * e)
    se_k = se_full[1] * k / e
    ci = {name: (float(val - t95 * s), float(val + t95 * s)) if math.isfinite(s)
          else (float(val), float(val))
          for name, val, s in zip(PARAMETERS + ("k",), (cd0, e, c, k),
                                  (*se_full, se_k))}
    corr = math.nan
    if free[0] and free[1]:
        corr = float(cov[0, 1] / math.sqrt(cov[0, 0] * cov[1, 1]))
        if abs(corr) > CORRELATION_WARNING:
            warn.append(f"CD0 and e are strongly correlated ({corr:+.2f}): the speeds flown "
                        "span too little of the curve to separate them well")
    y = piw[used]
    resid = y - model
    r2 = 1.0 - float(resid @ resid) / float(np.sum((y - y.mean()) ** 2))
    return FitResult(
        cd0=float(cd0), oswald_e=float(e), k=float(k), efficiency_scale=float(c),
        se_cd0=float(se_full[0]), se_oswald_e=float(se_full[1]), se_k=float(se_k),
        se_efficiency_scale=float(se_full[2]), ci95=ci, correlation=corr,
        covariance=cov, parameters=tuple(np.array(PARAMETERS)[free]), r_squared=r2,
        rms_residual=float(np.sqrt(np.mean(resid * resid))),
        rms_relative=float(np.sqrt(np.mean(r * r))), dof=int(dof),
        reference_mass=float(reference_mass), wing_area=float(wing_area),
        aspect_ratio=float(aspect_ratio), lines=labels, thrust_power=power, tas=v,
        density=rho, mass=m, piw=piw, viw=viw, used=used, studentised=studentised,
        dropped=tuple((int(labels[i]), float(t_all[i])) for i in np.flatnonzero(~used)),
        outlier_limit=float(outlier_limit), efficiency_fitted=fitted_eta,
        efficiency_note=note, warnings=tuple(warn))


def fit_flight_log(airframe, log, *, reference_mass=None, fit_efficiency=False,
                   known_cd0=None, known_oswald_e=None,
                   outlier_limit=OUTLIER_LIMIT) -> FitResult:
    """Fit the airframe's drag polar to a flight log (see :func:`fit_polar`).

    Parameters
    ----------
    airframe : Airframe
        Wing area, span and the propulsion chain that turns the logged power into thrust
        power.
    log : cruiseplan.io.flightlog.FlightLog
        Level-flight points in SI.
    reference_mass : float, optional
        Mass to reduce to [kg]; the maximum take-off mass by default (the usual standard
        weight of flight tests).
    fit_efficiency : bool, optional
        Also fit a scale on the propeller efficiency (only with a known CD0 or e).
    known_cd0, known_oswald_e : float, optional
        A polar coefficient known independently, held fixed [-].
    outlier_limit : float, optional
        |Externally studentised residual| above which a point is dropped [-].

    Returns
    -------
    FitResult
        The fit.

    Raises
    ------
    CruiseplanError
        If the airframe is not fixed-wing, the log's power source does not fit its
        propulsion, or the data cannot be fitted (see :func:`fit_polar`).

    References
    ----------
    .. [1] Kimberlin, *Flight Testing of Fixed-Wing Aircraft*, ch. 9.
    """
    if getattr(airframe, "kind", "fixed-wing") != "fixed-wing":
        raise CruiseplanError(f"{airframe.name} is a {airframe.kind}: the PIW-VIW drag-polar "
                              "fit is for fixed-wing airframes")
    prop = airframe.propulsion
    power = thrust_power(prop, log.power_source, log.power, log.tas, log.density)
    result = fit_polar(
        power, log.tas, log.density, log.mass, wing_area=airframe.wing_area,
        aspect_ratio=airframe.aspect_ratio,
        reference_mass=airframe.max_takeoff_mass if reference_mass is None
        else float(reference_mass),
        lines=log.lines, fit_efficiency=fit_efficiency, known_cd0=known_cd0,
        known_oswald_e=known_oswald_e, outlier_limit=outlier_limit,
        efficiency_label=f"the airframe's value ({efficiency_text(prop)})")
    cl_md = getattr(airframe.polar, "cl_min_drag", 0.0)
    if cl_md:
        return _with_warning(result, f"the airframe's polar has cl_min_drag {cl_md:g}; the "
                                     "fit assumes minimum drag at CL = 0")
    return result


def _with_warning(result: FitResult, text: str) -> FitResult:

    return replace(result, warnings=result.warnings + (text,))
