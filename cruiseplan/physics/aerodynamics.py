r"""Lift and drag: the drag polar and its classical identities.

A drag polar gives the drag coefficient :math:`C_D` at a lift coefficient :math:`C_L`
(and, for polars that depend on Reynolds number, at the airspeed and air state). Polar
kinds live in :data:`POLAR_KINDS`, a registry keyed by the name used in airframe files,
each entry with its fields and its validity; there is no ``if/elif`` over kinds.

In steady level flight lift equals weight, so

.. math:: C_L = \frac{2 m g}{\rho V^2 S}, \qquad D = \tfrac12 \rho V^2 S\, C_D(C_L).

References
----------
.. [1] J. D. Anderson, *Aircraft Performance and Design*, McGraw-Hill, 1999, ch. 2 and 5.
.. [2] D. P. Raymer, *Aircraft Design: A Conceptual Approach*, 6th ed., AIAA, 2018, ch. 12.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import ClassVar

import numpy as np

from cruiseplan._numerics import IN_PLACE_SIZE, owned
from cruiseplan.constants import G0
from cruiseplan.physics.dragbuildup import BuildUpPolar


def _scalar(x) -> bool:
    """True for a single number (the common case tested first, without a numpy call)."""
    return type(x) is float or np.ndim(x) == 0


def lift_coefficient(mass, density, tas, wing_area, load_factor=1.0):
    r"""Lift coefficient for lift = ``load_factor`` x weight.

    .. math:: C_L = \frac{2 n m g}{\rho V^2 S}

    Parameters
    ----------
    mass : array_like
        Aircraft mass [kg].
    density : array_like
        Air density [kg/m^3].
    tas : array_like
        True airspeed [m/s].
    wing_area : float
        Reference wing area [m^2].
    load_factor : array_like, optional
        Lift over weight [-]; 1 in level flight.

    Returns
    -------
    numpy.ndarray
        Lift coefficient [-].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eq. 5.2.
    """
    tas = np.asarray(tas, dtype=float)
    den = density * tas
    if den.size >= IN_PLACE_SIZE and _scalar(wing_area) and owned(den, den.shape):
        # A large grid: the same operations in the same order, in place.
        den *= tas
        den *= wing_area
        num = 2.0 * load_factor * mass * G0
        if np.ndim(num) == 0:
            return np.divide(num, den, out=den)
        return num / den
    return 2.0 * load_factor * mass * G0 / (den * tas * wing_area)


def induced_drag_factor(oswald_e, aspect_ratio):
    r"""Induced-drag factor :math:`k = 1 / (\pi e A)` [-].

    Parameters
    ----------
    oswald_e : float
        Oswald span efficiency [-].
    aspect_ratio : float
        Wing aspect ratio b^2/S [-].

    Returns
    -------
    float
        k [-].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eq. 2.47.
    """
    return 1.0 / (np.pi * oswald_e * aspect_ratio)


@dataclass(frozen=True)
class ParabolicPolar:
    r"""Parabolic drag polar :math:`C_D = C_{D0} + k (C_L - C_{L,md})^2`.

    Parameters
    ----------
    cd0 : float
        Drag coefficient at the minimum-drag lift coefficient [-].
    k : float
        Induced-drag factor [-].
    cl_min_drag : float
        Lift coefficient of minimum drag [-] (0 for a symmetric polar).

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 2.9.
    """

    cd0: float
    k: float
    cl_min_drag: float = 0.0
    kind: str = field(default="parabolic", init=False)
    #: A parabola holds at every CL: no POLAR_RANGE limit.
    bounded: ClassVar[bool] = False

    def drag_coefficient(self, cl, tas=None, air=None):
        """Drag coefficient [-] at lift coefficient ``cl`` [-].

        Parameters
        ----------
        cl : array_like
            Lift coefficient [-].
        tas : array_like, optional
            True airspeed [m/s]; unused (kept for the polar interface).
        air : AirState, optional
            Air state; unused (kept for the polar interface).

        Returns
        -------
        numpy.ndarray
            Drag coefficient [-].

        References
        ----------
        .. [1] Anderson, *Aircraft Performance and Design*, sec. 2.9.
        """
        cl = np.asarray(cl, dtype=float)
        if (cl.size >= IN_PLACE_SIZE and self.cl_min_drag == 0 and _scalar(self.k)
                and _scalar(self.cd0) and owned(cl, cl.shape)):
            # A large grid: cd0 + k cl cl in one new array (cl - 0 is cl).
            cd = self.k * cl
            cd *= cl
            cd += self.cd0
            return cd
        # (cl - 0 is cl, bit for bit: the subtraction is skipped for a symmetric polar)
        d = cl if type(self.cl_min_drag) is float and self.cl_min_drag == 0.0 \
            else cl - self.cl_min_drag
        return self.cd0 + self.k * d * d

    def outside(self, cl):
        """Mask of points outside the polar's validity (none for a parabola).

        Parameters
        ----------
        cl : array_like
            Lift coefficient [-].

        Returns
        -------
        numpy.ndarray of bool
            All False, shape of ``cl`` [-] (a read-only view of one False).
        """
        return np.broadcast_to(False, np.shape(cl))

    def reference_cd0(self):
        """Zero-lift-like parasite drag coefficient used in summaries [-]."""
        return self.cd0

    def scaled(self, cd0_factor, oswald_factor):
        """The polar with CD0 and Oswald e multiplied by factors (arrays for samples).

        Parameters
        ----------
        cd0_factor, oswald_factor : array_like
            Factors on CD0 and on e [-]; k = 1/(pi e A) divides by the second.

        Returns
        -------
        ParabolicPolar
            The scaled polar.
        """
        return replace(self, cd0=self.cd0 * cd0_factor, k=self.k / oswald_factor)


@dataclass(frozen=True)
class TabulatedPolar:
    """Tabulated drag polar, interpolated linearly in C_L.

    Beyond the table's C_L range the drag coefficient comes from a least-squares parabola
    through the table, and the point is flagged (``Limit.POLAR_RANGE``).

    Parameters
    ----------
    cl : tuple of float
        Lift coefficients [-], strictly increasing, at least 3.
    cd : tuple of float
        Drag coefficients [-], positive.
    """

    cl: tuple
    cd: tuple
    kind: str = field(default="tabulated", init=False)
    #: Beyond the table's CL range the point is flagged POLAR_RANGE.
    bounded: ClassVar[bool] = True

    def __post_init__(self):
        cl = np.asarray(self.cl, dtype=float)
        cd = np.asarray(self.cd, dtype=float)
        # Parabola for extrapolation only: cd ~ a + b cl + c cl^2.
        coeffs = np.polyfit(cl, cd, 2)
        object.__setattr__(self, "_cl", cl)
        object.__setattr__(self, "_cd", cd)
        object.__setattr__(self, "_fit", coeffs)

    def drag_coefficient(self, cl, tas=None, air=None):
        """Drag coefficient [-] at lift coefficient ``cl`` [-].

        Linear interpolation in the table; beyond it, the fitted parabola.

        Parameters
        ----------
        cl : array_like
            Lift coefficient [-].
        tas : array_like, optional
            True airspeed [m/s]; unused (kept for the polar interface).
        air : AirState, optional
            Air state; unused (kept for the polar interface).

        Returns
        -------
        numpy.ndarray
            Drag coefficient [-].
        """
        cl = np.asarray(cl, dtype=float)
        inside = np.interp(cl, self._cl, self._cd)
        return np.where(self.outside(cl), np.polyval(self._fit, cl), inside)

    def outside(self, cl):
        """Mask of lift coefficients beyond the table.

        Parameters
        ----------
        cl : array_like
            Lift coefficient [-].

        Returns
        -------
        numpy.ndarray of bool
            True below the first or above the last tabulated C_L [-].
        """
        cl = np.asarray(cl, dtype=float)
        return (cl < self._cl[0]) | (cl > self._cl[-1])

    def reference_cd0(self):
        """Smallest tabulated drag coefficient [-]."""
        return float(np.min(self._cd))


@dataclass(frozen=True)
class PolarKind:
    """Registry entry: a polar class, its file fields and what it is valid for."""

    cls: type
    fields: tuple
    validity: str


#: Drag-polar kinds by the name used in airframe files.
POLAR_KINDS = {
    "parabolic": PolarKind(
        ParabolicPolar, ("cd0", "k | oswald_e", "cl_min_drag"),
        "attached flow below CLmax, incompressible (Mach below about 0.5)"),
    "tabulated": PolarKind(
        TabulatedPolar, ("cl", "cd"),
        "the tabulated CL range; extrapolated by a fitted parabola and flagged beyond it"),
    "build-up": PolarKind(
        BuildUpPolar, ("components", "bodies", "k | oswald_e", "cl_min_drag", "excrescence"),
        "each part's drag correlation within its Reynolds range (flagged beyond it); "
        "attached flow, incompressible"),
}


# --- Classical identities of the symmetric parabolic polar -------------------------

def max_lift_to_drag(cd0, k):
    r"""Maximum lift-to-drag ratio :math:`(L/D)_{max} = 1 / (2\sqrt{k C_{D0}})` [-].

    Parameters
    ----------
    cd0 : array_like
        Parasite drag coefficient [-].
    k : array_like
        Induced-drag factor [-].

    Returns
    -------
    numpy.ndarray
        (L/D)max [-].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eq. 5.30.
    """
    return 1.0 / (2.0 * np.sqrt(np.asarray(k) * cd0))


def min_drag_lift_coefficient(cd0, k):
    r"""Lift coefficient of maximum L/D, :math:`C_L = \sqrt{C_{D0}/k}` [-].

    Parameters
    ----------
    cd0, k : array_like
        Polar coefficients [-].

    Returns
    -------
    numpy.ndarray
        C_L at (L/D)max [-].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eq. 5.28.
    """
    return np.sqrt(np.asarray(cd0) / k)


def min_power_lift_coefficient(cd0, k):
    r"""Lift coefficient of minimum power required, :math:`C_L = \sqrt{3 C_{D0}/k}` [-].

    Parameters
    ----------
    cd0, k : array_like
        Polar coefficients [-].

    Returns
    -------
    numpy.ndarray
        C_L at (C_L^1.5/C_D)max [-].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eq. 5.54.
    """
    return np.sqrt(3.0 * np.asarray(cd0) / k)


def max_endurance_parameter(cd0, k):
    r"""Maximum of :math:`C_L^{3/2}/C_D = \tfrac14 (3 / (k C_{D0}^{1/3}))^{3/4}` [-].

    Parameters
    ----------
    cd0, k : array_like
        Polar coefficients [-].

    Returns
    -------
    numpy.ndarray
        (C_L^1.5 / C_D)max [-].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eq. 5.56.
    """
    return 0.25 * (3.0 / (np.asarray(k) * np.asarray(cd0) ** (1.0 / 3.0))) ** 0.75


def speed_for_lift_coefficient(mass, density, wing_area, cl):
    r"""True airspeed for level flight at a lift coefficient, :math:`\sqrt{2mg/(\rho S C_L)}`.

    Parameters
    ----------
    mass : array_like
        Mass [kg].
    density : array_like
        Air density [kg/m^3].
    wing_area : float
        Wing area [m^2].
    cl : array_like
        Lift coefficient [-].

    Returns
    -------
    numpy.ndarray
        TAS [m/s].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eq. 5.21.
    """
    if type(mass) is not float:
        mass = np.asarray(mass)
    return np.sqrt(2.0 * mass * G0 / (np.asarray(density) * wing_area * cl))


def min_drag_speed(mass, density, wing_area, cd0, k):
    """TAS of minimum drag, i.e. of (L/D)max [m/s] (symmetric parabolic polar).

    Parameters
    ----------
    mass : array_like
        Mass [kg].
    density : array_like
        Air density [kg/m^3].
    wing_area : float
        Wing area [m^2].
    cd0, k : float
        Polar coefficients [-].

    Returns
    -------
    numpy.ndarray
        V_md [m/s].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, eq. 5.34.
    """
    return speed_for_lift_coefficient(mass, density, wing_area, min_drag_lift_coefficient(cd0, k))


def min_power_speed(mass, density, wing_area, cd0, k):
    """TAS of minimum power required [m/s]; equals 3^(-1/4) V_md (symmetric polar).

    Parameters
    ----------
    mass : array_like
        Mass [kg].
    density : array_like
        Air density [kg/m^3].
    wing_area : float
        Wing area [m^2].
    cd0, k : float
        Polar coefficients [-].

    Returns
    -------
    numpy.ndarray
        V_mp [m/s].

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, sec. 5.4.
    """
    return speed_for_lift_coefficient(mass, density, wing_area,
                                      min_power_lift_coefficient(cd0, k))


def level_drag_terms(mass, density, wing_area, cd0, k):
    r"""Level-flight drag of a symmetric parabolic polar as :math:`D = a V^2 + b / V^2`.

    Lift equals weight, so :math:`a = \tfrac12 \rho S C_{D0}` (parasite drag) and
    :math:`b = 2 k W^2 / (\rho S)` (induced drag).

    Parameters
    ----------
    mass : array_like
        Mass [kg].
    density : array_like
        Air density [kg/m^3].
    wing_area : float
        Wing area [m^2].
    cd0, k : float
        Polar coefficients [-].

    Returns
    -------
    a : numpy.ndarray
        Parasite-drag term [kg/m] (drag over TAS squared).
    b : numpy.ndarray
        Induced-drag term [N m^2/s^2] (drag times TAS squared).

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.3-5.4 (drag of a parabolic
       polar in level flight).
    """
    weight = np.asarray(mass, dtype=float) * G0
    return 0.5 * density * wing_area * cd0, 2.0 * k * weight * weight / (density * wing_area)


def speeds_at_drag(mass, density, wing_area, cd0, k, drag, *, slow=True, terms=None):
    r"""The slow and fast TAS at which level-flight drag equals ``drag`` [m/s].

    With a symmetric parabolic polar, :math:`D = a V^2 + b / V^2`,
    :math:`a = \tfrac12 \rho S C_{D0}`, :math:`b = 2 k W^2 / (\rho S)`, a quadratic in
    :math:`V^2`: :math:`V^2 = (D \pm \sqrt{D^2 - 4ab}) / (2a)`; the slow root is taken
    from the product of the roots, :math:`b / a`, so that it keeps its digits.

    Parameters
    ----------
    mass : array_like
        Mass [kg].
    density : array_like
        Air density [kg/m^3].
    wing_area : float
        Wing area [m^2].
    cd0, k : float
        Polar coefficients [-].
    drag : array_like
        Drag [N], at least the minimum drag :math:`2 W \sqrt{k C_{D0}}`.
    slow : bool, optional
        False: only the fast root is wanted, and the slow one is not computed (None).
    terms : tuple, optional
        :func:`level_drag_terms` of these arguments, if already computed.

    Returns
    -------
    slow, fast : numpy.ndarray
        TAS [m/s]; NaN where ``drag`` is below the minimum drag.

    References
    ----------
    .. [1] Anderson, *Aircraft Performance and Design*, secs. 5.3-5.4 (drag of a parabolic
       polar in level flight, its minimum).
    """
    a, b = level_drag_terms(mass, density, wing_area, cd0, k) if terms is None else terms
    with np.errstate(invalid="ignore"):
        fast2 = (drag + np.sqrt(drag * drag - 4.0 * a * b)) / (2.0 * a)
    return np.sqrt(b / (a * fast2)) if slow else None, np.sqrt(fast2)


def speeds_at_thrust_power(mass, density, wing_area, cd0, k, thrust_power, *, terms=None):
    r"""The slow and fast TAS at which the drag power :math:`D V` equals ``thrust_power``.

    With a symmetric parabolic polar, :math:`D V = a V^3 + b / V`
    (:math:`a = \tfrac12 \rho S C_{D0}`, :math:`b = 2 k W^2 / (\rho S)`), so the speeds
    are the positive roots of the quartic :math:`V^4 + p V + q = 0`, :math:`p = -P / a`,
    :math:`q = b / a`. Ferrari's method: with :math:`m` the largest real root of the
    resolvent cubic :math:`m^3 - q m - p^2 / 8 = 0` and :math:`s = \sqrt{2 m}`, the
    quartic factors as :math:`(V^2 - s V + m + p / (2 s))(V^2 + s V + m - p / (2 s))`,
    whose first factor holds the two positive roots. The slow root is taken from their
    product, and two Newton steps on the quartic polish both to rounding (the closed form
    alone may lose digits to cancellation, to about 1e-6 relative).

    Parameters
    ----------
    mass : array_like
        Mass [kg].
    density : array_like
        Air density [kg/m^3].
    wing_area : float
        Wing area [m^2].
    cd0, k : float
        Polar coefficients [-].
    thrust_power : array_like
        Thrust power [W] (efficiency x shaft power available, less any power kept for a
        climb).
    terms : tuple, optional
        :func:`level_drag_terms` of these arguments, if already computed.

    Returns
    -------
    slow, fast : numpy.ndarray
        TAS [m/s]; NaN where the thrust power is below the least drag power (no speed).

    References
    ----------
    .. [1] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*, 1964,
       3.8.2 (cubic) and 3.8.3 (quartic, resolvent cubic).
    .. [2] Anderson, *Aircraft Performance and Design*, sec. 5.4 (power required and
       available; maximum speed where they meet).
    """
    a, b = level_drag_terms(mass, density, wing_area, cd0, k) if terms is None else terms
    p = -np.asarray(thrust_power, dtype=float) / a
    q = b / a
    # Largest real root of m^3 - q m - p^2 / 8 = 0 (q > 0): trigonometric form for three
    # real roots, Cardano's otherwise.
    half = p * p / 16.0
    disc = half * half - q * q * q / 27.0
    one_real = disc >= 0
    n_real = np.count_nonzero(one_real)   # (quicker than .any() and .all())
    with np.errstate(invalid="ignore", divide="ignore"):
        # Each form computed only if some element needs it (one_real decides which).
        if n_real:
            r = np.sqrt(np.maximum(disc, 0.0))
            cardano = np.cbrt(half + r) + np.cbrt(half - r)
        if n_real < one_real.size:
            scale = 2.0 * np.sqrt(q / 3.0)
            # np.clip by its two ufuncs (the same values, without the wrapper's cost).
            angle = np.arccos(np.minimum(np.maximum(half / (q / 3.0) ** 1.5, -1.0), 1.0)
                              ) / 3.0
            trig = scale * np.cos(angle)
            m = np.where(one_real, cardano, trig) if n_real else trig
        else:
            m = cardano
        s = np.sqrt(2.0 * m)
        twice_fast = s + np.sqrt(-2.0 * m - 2.0 * p / s)   # of every input's shape
        # Both roots at once, slow then fast, each written where it is kept.
        v = np.empty((2,) + np.shape(twice_fast))
        fast = np.multiply(0.5, twice_fast, out=v[1, ...])   # (a view even of one root)
        np.divide(m + p / (2.0 * s), fast, out=v[0, ...])
        # Newton's step (v^4 + p v + q) / (4 v^3 + p), in buffers reused by both steps:
        # the same operations as the plain expression, on a working set that stays in
        # cache. At a double root (the thrust power just meets the least drag power) the
        # slope vanishes: keep the value there.
        v3, step, slope = np.empty_like(v), np.empty_like(v), np.empty_like(v)
        for _ in range(2):
            np.multiply(v, v, out=v3)
            v3 *= v
            np.multiply(v3, v, out=step)
            step += np.multiply(p, v, out=slope)
            step += q
            np.multiply(4.0, v3, out=slope)
            slope += p
            step /= slope
            np.subtract(v, step, out=v, where=np.isfinite(step))
    return v[0], v[1]
