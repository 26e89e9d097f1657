r"""Parasite drag built up from components, with Reynolds-number effects, and attached bodies.

Small airframes fly at Reynolds numbers where drag coefficients change with altitude and
speed. Here the zero-lift drag is the sum of

* **components** (wing, tail, fuselage, booms): flat-plate skin friction at the component's
  Reynolds number :math:`Re = \rho V \ell / \mu` times a form factor and the wetted area,
  :math:`C_{D0} = \sum_i C_{f,i}(Re_i)\, FF_i\, S_{wet,i} / S_{ref}`, raised by an
  excrescence fraction for leaks and protuberances;
* **attached bodies** (camera domes and sensor balls as spheres, struts and legs as
  cylinders across the flow): :math:`C_D(Re)` on the frontal area, from correlations that
  cover the viscous regime (drag linear in speed), the quadratic regime and the drag
  crisis.

Every correlation is an entry of :data:`CORRELATIONS` with its validity range and the part
it applies to; a body may name its correlation, else its shape's default
(:data:`DEFAULT_BODY_CORRELATION`). All functions are vectorised: components and bodies
along a leading axis, the air and speed broadcast behind it.

The default sphere correlation is Clift and Gauvin's, not Morrison's: over the drone range,
Re 1e3 to 3e5, it follows the standard drag curve (Clift, Grace and Weber's Table 5.2)
within 4.3 % (RMS 2.8 %), where Morrison's runs up to 17 % under it below Re 2e5 and
enters the drag crisis early (65 % under at 3e5). Morrison's remains for Re above 3e5,
where Clift and Gauvin's does not reach.

References
----------
.. [1] H. Schlichting, *Boundary-Layer Theory*, 7th ed., McGraw-Hill, 1979, ch. 7 and 21
   (Blasius laminar and Prandtl-Schlichting turbulent flat-plate friction; mixed flow).
.. [2] D. P. Raymer, *Aircraft Design: A Conceptual Approach*, 6th ed., AIAA, 2018,
   sec. 12.5 (component build-up, form factors, excrescence).
.. [3] F. A. Morrison, *An Introduction to Fluid Mechanics*, Cambridge University Press,
   2013, eq. 8.13 (sphere drag, Re <= 1e6).
.. [4] F. M. White, *Viscous Fluid Flow*, 3rd ed., McGraw-Hill, 2006, eq. 3-225 (cylinder
   in cross-flow, 1 < Re < 2e5).
.. [5] R. Clift, J. R. Grace and M. E. Weber, *Bubbles, Drops, and Particles*, Academic
   Press, 1978, ch. 5 (the standard drag curve, Table 5.2; Clift and Gauvin's
   correlation, Re < 3e5).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import ClassVar

import numpy as np

from cruiseplan.errors import lookup
from cruiseplan.physics.atmosphere import air_state

#: Friction laws of streamlined components (keys of :data:`CORRELATIONS`) and shapes of
#: bluff bodies (each with correlations in :data:`CORRELATIONS`).
FRICTION_LAWS = ("laminar", "mixed", "turbulent")
BODY_SHAPES = ("cylinder", "sphere")

# --- correlations -------------------------------------------------------------------------


def cf_laminar(re):
    """Blasius mean skin friction of a laminar flat plate, 1.328 / sqrt(Re) [-].

    Parameters
    ----------
    re : array_like
        Reynolds number on the plate length [-].

    Returns
    -------
    numpy.ndarray or float
        Mean skin-friction coefficient [-].

    References
    ----------
    .. [1] Schlichting, *Boundary-Layer Theory*, ch. 7 (Blasius laminar flat plate).
    """
    return 1.328 / np.sqrt(re)


def cf_turbulent(re):
    """Prandtl-Schlichting mean skin friction, fully turbulent, 0.455 / (log10 Re)^2.58.

    Parameters
    ----------
    re : array_like
        Reynolds number on the plate length [-].

    Returns
    -------
    numpy.ndarray or float
        Mean skin-friction coefficient [-].

    References
    ----------
    .. [1] Schlichting, *Boundary-Layer Theory*, ch. 21 (Prandtl-Schlichting turbulent
       flat plate).
    """
    return 0.455 / np.log10(re) ** 2.58


def cf_mixed(re, re_transition=5e5):
    r"""Laminar then turbulent flat plate (transition at ``re_transition``).

    Prandtl's correction :math:`C_f = 0.455/(\log_{10} Re)^{2.58} - A/Re`; fully laminar
    below transition. :math:`A` is derived, not quoted: the turbulent plate's friction
    over the laminar run is replaced by the laminar one,
    :math:`A = Re_{tr}\,(C_{f,turb}(Re_{tr}) - C_{f,lam}(Re_{tr}))`, which makes
    :math:`C_f` continuous at transition. With Blasius and Prandtl-Schlichting at 5e5 this
    gives A = 1614. Schlichting's table quotes A = 1700 for 5e5 (from memory; near the
    same construction on the older 0.074 Re^-0.2 law, 1742); with 1700 the friction would
    drop 9 % at transition, below the laminar value. The difference: 86/Re, C_f 3.1 %
    higher here than with 1700 at Re 1e6, 0.9 % at 3e6, 0.3 % at 1e7.

    Parameters
    ----------
    re : array_like
        Reynolds number on the plate length [-].
    re_transition : float, optional
        Transition Reynolds number [-].

    Returns
    -------
    numpy.ndarray
        Mean skin-friction coefficient [-].

    References
    ----------
    .. [1] Schlichting, *Boundary-Layer Theory*, ch. 7 and 21 (laminar and turbulent flat
       plate; Prandtl's mixed-flow correction and its table of A).
    """
    re = np.asarray(re, dtype=float)
    a = re_transition * (cf_turbulent(re_transition) - cf_laminar(re_transition))
    return np.where(re < re_transition, cf_laminar(re), cf_turbulent(re) - a / re)


def cd_sphere_morrison(re):
    r"""Sphere drag coefficient, Morrison's correlation (Re up to 1e6) [-].

    .. math::

        C_D = \frac{24}{Re} + \frac{2.6 (Re/5)}{1 + (Re/5)^{1.52}}
            + \frac{0.411 (Re/263000)^{-7.94}}{1 + (Re/263000)^{-8}}
            + \frac{Re^{0.8}}{461000}

    It tends to Stokes' law (24/Re) at small Re and includes the drag crisis near 3e5.

    Parameters
    ----------
    re : array_like
        Reynolds number on the sphere diameter [-], up to 1e6.

    Returns
    -------
    numpy.ndarray or float
        Drag coefficient on the frontal area [-]; a float for a scalar ``re``.

    References
    ----------
    .. [1] Morrison, *An Introduction to Fluid Mechanics*, eq. 8.13.
    """
    scalar = np.ndim(re) == 0
    re = np.atleast_1d(np.asarray(re, dtype=float))
    # Powers through one logarithm, evaluated in place: on large grids the time goes into
    # allocating temporaries, and this form takes half the time of the written one.
    lr = np.log(re)
    t = np.empty_like(lr)
    out = np.divide(24.0, re)
    np.subtract(lr, np.log(5.0), out=t)          # rising: 2.6 (Re/5) / (1 + (Re/5)^1.52)
    t *= 1.52
    np.exp(t, out=t)
    t += 1.0
    np.divide(re, t, out=t)
    t *= 2.6 / 5.0
    out += t
    b = np.subtract(lr, np.log(263000.0))        # crisis: 0.411 r^-7.94 / (1 + r^-8)
    np.multiply(b, -8.0, out=t)
    np.exp(t, out=t)
    t += 1.0
    b *= -7.94
    np.exp(b, out=b)
    b *= 0.411
    b /= t
    out += b
    lr *= 0.8                                    # Re^0.8 / 461000
    np.exp(lr, out=lr)
    lr /= 461000.0
    out += lr
    return out[0] if scalar else out


def cd_sphere_clift_gauvin(re):
    r"""Sphere drag coefficient, Clift and Gauvin's correlation (Re below 3e5) [-].

    .. math::

        C_D = \frac{24}{Re}\left(1 + 0.15\,Re^{0.687}\right)
            + \frac{0.42}{1 + 4.25\times 10^{4}\,Re^{-1.16}}

    Schiller and Naumann's term below Re 800 with a Newton-regime term added; it follows
    the standard drag curve to the start of the drag crisis, which it does not model.

    Parameters
    ----------
    re : array_like
        Reynolds number on the sphere diameter [-], below 3e5.

    Returns
    -------
    numpy.ndarray or float
        Drag coefficient on the frontal area [-]; a float for a scalar ``re``.

    References
    ----------
    .. [1] R. Clift and W. H. Gauvin, "The motion of particles in turbulent gas streams",
       *Proc. Chemeca '70*, vol. 1, 1970, pp. 14-28.
    .. [2] Clift, Grace and Weber, *Bubbles, Drops, and Particles*, ch. 5 (the form and
       range used here).
    """
    re = np.asarray(re, dtype=float)
    lr = np.log(re)
    return (24.0 / re * (1.0 + 0.15 * np.exp(0.687 * lr))
            + 0.42 / (1.0 + 4.25e4 * np.exp(-1.16 * lr)))


def cd_cylinder(re):
    r"""Circular cylinder across the flow, drag per frontal area [-].

    White's fit :math:`C_D = 1 + 10\,Re^{-2/3}` (1 < Re < 2e5); below Re = 1 Lamb's
    low-Reynolds solution :math:`8\pi / (Re\,(2.002 - \ln Re))`; above 2e5 a drag crisis
    falling log-linearly to 0.35 at 5e5 and held there (an approximation of the measured
    crisis, from memory).

    Parameters
    ----------
    re : array_like
        Reynolds number on the cylinder diameter [-].

    Returns
    -------
    numpy.ndarray
        Drag coefficient on the frontal area (diameter x length) [-].

    References
    ----------
    .. [1] White, *Viscous Fluid Flow*, eq. 3-225 (1 < Re < 2e5).
    """
    re = np.asarray(re, dtype=float)
    lr = np.log(re)
    cd = 1.0 + 10.0 * np.exp(-2.0 / 3.0 * lr)  # White's fit, the usual regime
    low = re < 1.0
    if np.any(low):
        cd = np.where(low, 8.0 * np.pi / (re * (2.002 - np.minimum(lr, 0.0))), cd)
    high = re > 2e5
    if np.any(high):
        c_crit = 1.0 + 10.0 * 2e5 ** (-2.0 / 3.0)
        share = np.clip((lr - np.log(2e5)) / np.log(5e5 / 2e5), 0.0, 1.0)
        cd = np.where(high, c_crit + (0.35 - c_crit) * share, cd)
    return cd


@dataclass(frozen=True)
class Correlation:
    """Registry entry: a correlation of Reynolds number, its part, valid range and source.

    Attributes
    ----------
    function : callable
        Coefficient [-] at Reynolds numbers [-].
    applies_to : str
        ``"flat plate"`` (a friction law) or a body shape of :data:`BODY_SHAPES`.
    re_range : tuple of float
        Reynolds numbers it is valid for, (low, high) [-].
    reference : str
        Its source, for reports.
    """

    function: object
    applies_to: str
    re_range: tuple
    reference: str

    def __call__(self, re):
        """The coefficient [-] at Reynolds numbers ``re``."""
        return self.function(re)


#: Skin-friction laws and body drag correlations by the name used in airframe files.
CORRELATIONS = {
    "laminar": Correlation(cf_laminar, "flat plate", (1e3, 1e6),
                           "Blasius (Schlichting ch. 7)"),
    "turbulent": Correlation(cf_turbulent, "flat plate", (1e5, 1e9),
                             "Prandtl-Schlichting (Schlichting ch. 21)"),
    "mixed": Correlation(cf_mixed, "flat plate", (1e3, 1e9),
                         "Prandtl's laminar-turbulent correction, transition 5e5, A derived "
                         "for continuity (Schlichting ch. 21)"),
    "clift-gauvin": Correlation(cd_sphere_clift_gauvin, "sphere", (1e-6, 3e5),
                                "Clift and Gauvin (1970); Clift, Grace and Weber (1978) ch. 5"),
    "morrison": Correlation(cd_sphere_morrison, "sphere", (1e-6, 1e6),
                            "Morrison (2013) eq. 8.13"),
    "white": Correlation(cd_cylinder, "cylinder", (1e-3, 1e6),
                         "White (2006) eq. 3-225; Lamb below Re 1; crisis from memory"),
}

#: Correlation of each body shape when the file names none. For the sphere, the one
#: nearer the standard drag curve over Re 1e3 to 3e5 (see the module's notes;
#: tests/test_rotorcraft.py holds the choice against the tabulated curve).
DEFAULT_BODY_CORRELATION = {"sphere": "clift-gauvin", "cylinder": "white"}


def body_correlations(shape: str) -> dict:
    """The correlations of :data:`CORRELATIONS` that apply to a body shape.

    Parameters
    ----------
    shape : str
        A body shape of :data:`BODY_SHAPES`.

    Returns
    -------
    dict
        Name to :class:`Correlation`.
    """
    return {k: c for k, c in CORRELATIONS.items() if c.applies_to == shape}


# --- components and bodies ------------------------------------------------------------------

def wing_form_factor(thickness_ratio, max_thickness_at=0.3):
    """Raymer's form factor of a wing or tail, low speed: 1 + 0.6/(x/c) t/c + 100 (t/c)^4.

    Parameters
    ----------
    thickness_ratio : float
        Thickness over chord [-].
    max_thickness_at : float
        Chordwise position of maximum thickness over chord [-].

    Returns
    -------
    float
        Form factor [-].

    References
    ----------
    .. [1] Raymer, *Aircraft Design*, eq. 12.30 (Mach term dropped at low speed).
    """
    t = thickness_ratio
    return 1.0 + 0.6 / max_thickness_at * t + 100.0 * t**4


def body_form_factor(fineness):
    """Raymer's form factor of a fuselage or boom: 1 + 60/f^3 + f/400, f = length/diameter.

    Parameters
    ----------
    fineness : float
        Length over maximum diameter [-].

    Returns
    -------
    float
        Form factor [-].

    References
    ----------
    .. [1] Raymer, *Aircraft Design*, eq. 12.31.
    """
    return 1.0 + 60.0 / fineness**3 + fineness / 400.0


@dataclass(frozen=True)
class Component:
    """A streamlined component: wetted area, reference length, form factor, friction law."""

    name: str
    wetted_area: float
    length: float
    form_factor: float = 1.0
    friction: str = "turbulent"

    def __post_init__(self):
        lookup({k: None for k in FRICTION_LAWS}, self.friction, "friction law")


@dataclass(frozen=True)
class AttachedBody:
    """A bluff body: sphere (dome, ball) or cylinder across the flow (strut, leg).

    ``correlation`` names its drag correlation in :data:`CORRELATIONS` (one for its
    shape); empty: the shape's default of :data:`DEFAULT_BODY_CORRELATION`.
    """

    name: str
    shape: str
    diameter: float
    length: float = 0.0
    count: int = 1
    correlation: str = ""

    def __post_init__(self):
        lookup({k: None for k in BODY_SHAPES}, self.shape, "body shape")
        if not self.correlation:
            object.__setattr__(self, "correlation", DEFAULT_BODY_CORRELATION[self.shape])
        lookup(body_correlations(self.shape), self.correlation,
               f"drag correlation of a {self.shape}")

    @property
    def frontal_area(self) -> float:
        """Area facing the flow [m^2]."""
        if self.shape == "sphere":
            return np.pi * self.diameter**2 / 4.0
        return self.diameter * self.length


def reynolds(tas, air, length):
    """Reynolds number rho V L / mu, with ``length`` on a leading axis [-].

    Floored at 1e-9: at zero speed (a hovering multirotor) the coefficients stay finite
    and the drag, which goes with V^2, is zero.

    Parameters
    ----------
    tas : array_like
        True airspeed [m/s].
    air : AirState
        Air state; its density [kg/m^3] and dynamic viscosity [Pa s] are used.
    length : array_like
        Reference lengths [m], one per part along the leading axis of the result.

    Returns
    -------
    numpy.ndarray
        Reynolds numbers [-], shape ``(len(length),) + shape(tas * air.density)``.
    """
    length = np.asarray(length, dtype=float).reshape((-1,) + (1,) * np.ndim(tas * air.density))
    return np.maximum(air.density * tas * length / air.viscosity, 1e-9)


def outside_correlations(components, bodies, tas, air):
    """True where any part's Reynolds number lies outside its correlation's valid range.

    Parameters
    ----------
    components : sequence of Component
        Streamlined parts (Reynolds number on their ``length``).
    bodies : sequence of AttachedBody
        Bluff parts (Reynolds number on their ``diameter``).
    tas : array_like
        True airspeed [m/s].
    air : AirState
        Air state; density [kg/m^3] and dynamic viscosity [Pa s].

    Returns
    -------
    numpy.ndarray of bool
        Mask [-], broadcast shape of ``tas`` and the air.
    """
    out = np.zeros(np.shape(np.asarray(tas, dtype=float) * air.density), dtype=bool)
    for part, law, length in ([(c, c.friction, c.length) for c in components]
                              + [(b, b.correlation, b.diameter) for b in bodies]):
        lo, hi = CORRELATIONS[law].re_range
        re = reynolds(tas, air, [length])[0]
        out = out | (re < lo) | (re > hi)
    return out


def components_cd0(components, tas, air, reference_area):
    r"""Zero-lift drag coefficient of streamlined components [-] (vectorised).

    .. math:: C_{D0} = \sum_i C_{f,i}(Re_i)\, FF_i\, S_{wet,i} / S_{ref}

    Parameters
    ----------
    components : sequence of Component
        Streamlined parts, each with its friction law from :data:`CORRELATIONS`.
    tas : array_like
        True airspeed [m/s].
    air : AirState
        Air state; density [kg/m^3] and dynamic viscosity [Pa s].
    reference_area : float
        Area the coefficient refers to (wing area) [m^2].

    Returns
    -------
    numpy.ndarray
        Zero-lift drag coefficient [-], without the excrescence fraction.

    References
    ----------
    .. [1] Raymer, *Aircraft Design*, sec. 12.5 (component build-up).
    """
    if not components:
        return 0.0 * (tas * air.density)
    total = 0.0
    for law in {c.friction for c in components}:
        group = [c for c in components if c.friction == law]
        re = reynolds(tas, air, [c.length for c in group])
        weight = np.array([c.form_factor * c.wetted_area for c in group])
        weight = weight.reshape((-1,) + (1,) * (re.ndim - 1))
        total = total + np.sum(CORRELATIONS[law](re) * weight, axis=0)
    return total / reference_area


def bodies_drag_area(bodies, tas, air, with_range=False):
    """Drag area C_D x frontal area of attached bodies [m^2] (vectorised).

    With ``with_range``, also a mask of points where a body's Reynolds number leaves its
    correlation's valid range (found from the same Reynolds numbers).

    Parameters
    ----------
    bodies : sequence of AttachedBody
        Bluff parts, each with its correlation from :data:`CORRELATIONS`.
    tas : array_like
        True airspeed [m/s].
    air : AirState
        Air state; density [kg/m^3] and dynamic viscosity [Pa s].
    with_range : bool, optional
        Also return the out-of-range mask [-].

    Returns
    -------
    drag_area : numpy.ndarray
        Sum of C_D x frontal area x count [m^2].
    outside : numpy.ndarray of bool
        Only with ``with_range``: where a body's Reynolds number is out of range [-].

    References
    ----------
    .. [1] Clift, Grace and Weber, *Bubbles, Drops, and Particles*, ch. 5 (sphere).
    .. [2] Morrison, *An Introduction to Fluid Mechanics*, eq. 8.13 (sphere).
    .. [3] White, *Viscous Fluid Flow*, eq. 3-225 (cylinder in cross-flow).
    """
    zero = 0.0 * (tas * air.density)
    if not bodies:
        return (zero, np.zeros(np.shape(zero), dtype=bool)) if with_range else zero
    total = 0.0
    outside = False
    unit = air.density * tas / air.viscosity  # Reynolds number per metre, once
    for law in {b.correlation for b in bodies}:
        group = [b for b in bodies if b.correlation == law]
        size = np.array([b.diameter for b in group]).reshape((-1,) + (1,) * np.ndim(unit))
        re = np.maximum(unit * size, 1e-9)
        area = np.array([b.frontal_area * b.count for b in group])
        area = area.reshape((-1,) + (1,) * (re.ndim - 1))
        total = total + np.sum(CORRELATIONS[law](re) * area, axis=0)
        if with_range:
            lo, hi = CORRELATIONS[law].re_range
            outside = outside | np.any((re < lo) | (re > hi), axis=0)
    return (total, np.broadcast_to(outside, np.shape(total))) if with_range else total


@dataclass(frozen=True)
class BuildUpPolar:
    r"""Drag polar with a built-up, Reynolds-dependent parasite drag.

    .. math:: C_D = (1 + e_x)\,C_{D0,comp}(V, \rho, \mu) + \frac{\sum C_{D,body} A_{body}}{S}
              + k (C_L - C_{L,md})^2

    Parameters
    ----------
    components : tuple of Component
        Streamlined parts.
    bodies : tuple of AttachedBody
        Bluff parts.
    k : float
        Induced-drag factor [-].
    reference_area : float
        Wing area the coefficients refer to [m^2].
    cl_min_drag : float
        Lift coefficient of minimum drag [-].
    excrescence : float
        Fraction added to the components' drag for leaks and protuberances [-]
        (5-10 %, common practice).

    References
    ----------
    .. [1] Raymer, *Aircraft Design*, sec. 12.5.
    """

    components: tuple
    bodies: tuple
    k: float
    reference_area: float
    cl_min_drag: float = 0.0
    excrescence: float = 0.0
    scale: object = 1.0
    kind: str = field(default="build-up", init=False)
    #: The parabola in CL holds at every CL (the Reynolds range is flagged instead).
    bounded: ClassVar[bool] = False

    def cd0(self, tas, air):
        """Zero-lift drag coefficient [-] at TAS [m/s] in the given air.

        ``scale`` multiplies it (1 as built; arrays of factors for uncertainty samples).

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        air : AirState
            Air state; density [kg/m^3] and dynamic viscosity [Pa s].

        Returns
        -------
        numpy.ndarray
            Zero-lift drag coefficient on the reference area [-].

        References
        ----------
        .. [1] Raymer, *Aircraft Design*, sec. 12.5 (component build-up, excrescence).
        """
        tas = np.asarray(tas, dtype=float)
        return self.scale * ((1.0 + self.excrescence) * components_cd0(
            self.components, tas, air, self.reference_area)
            + bodies_drag_area(self.bodies, tas, air) / self.reference_area)

    def drag_coefficient(self, cl, tas=None, air=None):
        """Drag coefficient [-] at lift coefficient ``cl``, TAS [m/s] and air.

        Parameters
        ----------
        cl : array_like
            Lift coefficient [-].
        tas : array_like
            True airspeed [m/s]; needed, the parasite drag depends on it.
        air : AirState
            Air state; density [kg/m^3] and dynamic viscosity [Pa s]; needed.

        Returns
        -------
        numpy.ndarray
            Drag coefficient [-].
        """
        d = np.asarray(cl, dtype=float) - self.cl_min_drag
        return self.cd0(tas, air) + self.k * d * d

    def outside(self, cl):
        """No lift-coefficient limit of its own (stall is checked separately).

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

    def reynolds_outside(self, tas, air):
        """True where a part's Reynolds number is outside its correlation's range.

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        air : AirState
            Air state; density [kg/m^3] and dynamic viscosity [Pa s].

        Returns
        -------
        numpy.ndarray of bool
            Out-of-range mask [-].
        """
        return outside_correlations(self.components, self.bodies, tas, air)

    def scaled(self, cd0_factor, oswald_factor):
        """The polar with its parasite drag and Oswald e multiplied by factors.

        Parameters
        ----------
        cd0_factor, oswald_factor : array_like
            Factors on the built-up CD0 and on e [-].

        Returns
        -------
        BuildUpPolar
            The scaled polar.
        """
        return replace(self, scale=cd0_factor, k=self.k / oswald_factor)

    def reference_cd0(self):
        """CD0 at sea level ISA and 30 m/s, for summaries [-]."""
        return float(self.cd0(30.0, air_state(0.0)))


@dataclass(frozen=True)
class BodyDrag:
    """Drag of a wingless body (a multirotor's frame): flat-plate area plus bodies.

    Parameters
    ----------
    drag_area : float
        Equivalent flat-plate area of the frame, C_D x A [m^2].
    bodies : tuple of AttachedBody
        Bluff parts with Reynolds-dependent drag (camera domes, legs).
    """

    drag_area: float
    bodies: tuple = ()
    scale: object = 1.0

    def area(self, tas, air):
        """Total drag area [m^2] at TAS [m/s] in the given air (times ``scale``).

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        air : AirState
            Air state; density [kg/m^3] and dynamic viscosity [Pa s].

        Returns
        -------
        numpy.ndarray
            Drag area C_D x A of frame and bodies [m^2].
        """
        tas = np.asarray(tas, dtype=float)
        return self.scale * (self.drag_area + bodies_drag_area(self.bodies, tas, air))

    def area_and_range(self, tas, air):
        """Drag area [m^2] and where a body's Reynolds number leaves its correlation.

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        air : AirState
            Air state; density [kg/m^3] and dynamic viscosity [Pa s].

        Returns
        -------
        area : numpy.ndarray
            Drag area C_D x A of frame and bodies [m^2] (times ``scale``).
        outside : numpy.ndarray of bool
            Where a body's Reynolds number is out of its correlation's range [-].
        """
        tas = np.asarray(tas, dtype=float)
        area, outside = bodies_drag_area(self.bodies, tas, air, with_range=True)
        return self.scale * (self.drag_area + area), outside

    def drag(self, tas, air):
        """Drag of the body, 1/2 rho V^2 (C_D A) [N].

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        air : AirState
            Air state; density [kg/m^3] and dynamic viscosity [Pa s].

        Returns
        -------
        numpy.ndarray
            Drag [N].
        """
        tas = np.asarray(tas, dtype=float)
        return 0.5 * air.density * tas * tas * self.area(tas, air)
