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

import numpy as np

from cruiseplan.constants import G0
from cruiseplan.physics.dragbuildup import BuildUpPolar


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
    return 2.0 * load_factor * mass * G0 / (density * tas * tas * wing_area)


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
        d = np.asarray(cl, dtype=float) - self.cl_min_drag
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
            All False, shape of ``cl`` [-].
        """
        return np.zeros(np.shape(cl), dtype=bool)

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
    return np.sqrt(2.0 * np.asarray(mass) * G0 / (np.asarray(density) * wing_area * cl))


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
