r"""Propulsion: power available, propeller efficiency, fuel flow and battery draw.

Two kinds, registered in :data:`PROPULSION_KINDS` under the names used in airframe files:

* ``piston-propeller``: shaft power available :math:`P_{rated}\,\phi(\sigma)` with a
  power-lapse law :math:`\phi` from :data:`POWER_LAPSE_LAWS`; fuel flow
  :math:`\dot m = \mathrm{BSFC}\; P_{shaft}`.
* ``electric-propeller``: maximum shaft power independent of altitude; battery power
  :math:`P_{batt} = P_{shaft} / (\eta_{motor}\eta_{controller})`; endurance by Peukert's law
  in Hart's form :math:`t = f\,R_t (C/(I R_t))^n`, with :math:`I = P_{batt}/U`,
  :math:`R_t` the rating time, :math:`n` the Peukert exponent and :math:`f` the usable
  fraction of the pack; with :math:`n = 1` this is usable energy over power.

Shaft power required is thrust power over propeller efficiency,
:math:`P_{shaft} = D V / \eta_p(V)`, with :math:`\eta_p` constant or tabulated against TAS
(:class:`PropellerEfficiency`). When the airframe file gives a propeller diameter
(:class:`ActuatorDiskPropeller`) the efficiency is the actuator-disk (Froude) ideal
efficiency, which falls as the disk loading rises, times the file's efficiency taken as the
profile efficiency :math:`\eta_{pr}`:

.. math:: \eta = \eta_{pr}(V)\,\eta_i, \qquad
          \eta_i = \frac{2}{1 + \sqrt{1 + T / (\tfrac12 \rho V^2 A)}},

so shaft power is :math:`T (V + v_i) / \eta_{pr}` and static thrust is finite,
:math:`T_0 = (2 \rho A (\eta_{pr} P)^2)^{1/3}`. The propulsion kinds answer both ways
round: :meth:`PistonPropeller.shaft_for_thrust` (level flight, T = D) and
:meth:`PistonPropeller.thrust_available` (climb, full power).

Each kind's "store" is what it uses up: fuel mass [kg] or usable battery energy [J]
(:class:`Store`). One store rate serves every output: :meth:`store_rate` [kg/s or W] is the
rate the store is used at a shaft power, Peukert's law included, so that endurance is
store / rate and specific range TAS / rate, and specific range x store = range exactly.

References
----------
.. [1] S. Gudmundsson, *General Aviation Aircraft Design*, Elsevier, 2014, ch. 7
   (Gagg-Ferrar lapse; from memory).
.. [2] T. R. Yechout et al., *Introduction to Aircraft Flight Mechanics*, AIAA, 2003, ch. 2
   (BSFC of piston engines).
.. [3] L. W. Traub, "Range and Endurance Estimates for Battery-Powered Aircraft",
   *J. Aircraft* 48(2), 2011, pp. 703-707 (Peukert's law for aircraft).
.. [4] B. W. McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, Wiley, ch. 6
   (momentum theory of the propeller: ideal efficiency, static thrust).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

import numpy as np

from cruiseplan._numerics import IN_PLACE_SIZE, fits, monotone_slopes, owned
from cruiseplan.errors import CruiseplanError, lookup
from cruiseplan.limits import LIMIT_DTYPE
from cruiseplan.physics.battery import EquivalentCircuit, PackLoad


@dataclass(frozen=True)
class Store:
    """What a propulsion kind uses up, and how it is counted.

    Attributes
    ----------
    name : str
        ``"fuel"`` or ``"energy"``.
    unit : str
        SI unit of the amount: ``"kg"`` or ``"J"``.
    unit_text : str
        The unit in words, for messages.
    burns_mass : bool
        The aircraft gets lighter as the store is used.
    default_units : str
        Display unit system its crews use: ``"aviation"`` or ``"si"``.
    power_kind : str
        Display kind of shaft power: ``"power"`` (hp or kW, engines) or
        ``"electric_power"`` (W, motors).
    normal_cruise_power : float
        Normal cruise power [-], a fraction of rated power: what a time reserve is flown
        at when nothing else is said (65 % for engines, 30 % for electric motors; common
        practice, no source).
    """

    name: str
    unit: str
    unit_text: str
    burns_mass: bool
    default_units: str
    power_kind: str
    normal_cruise_power: float


#: Fuel, counted by mass [kg].
FUEL = Store("fuel", "kg", "kg of fuel", True, "aviation", "power", 0.65)
#: Usable battery energy [J].
ENERGY = Store("energy", "J", "J of usable energy", False, "si", "electric_power", 0.30)

# --- Power-lapse laws --------------------------------------------------------------


@dataclass(frozen=True)
class LapseLaw:
    """Registry entry: a power-lapse law phi(sigma) and the density ratios it is valid for."""

    function: object
    sigma_range: tuple
    reference: str

    def __call__(self, sigma):
        """Shaft power available over rated power [-] at density ratio ``sigma``."""
        return self.function(np.asarray(sigma, dtype=float))


#: Power-lapse laws by the name used in airframe files.
POWER_LAPSE_LAWS = {
    "gagg-ferrar": LapseLaw(
        lambda s: np.maximum(1.132 * s - 0.132, 0.0), (0.25, 1.2),
        "Gagg & Ferrar (1934), P/P0 = 1.132 sigma - 0.132, naturally aspirated piston "
        "engines (as quoted by Gudmundsson 2014, ch. 7; from memory)"),
    "density-ratio": LapseLaw(
        lambda s: s, (0.2, 1.2),
        "textbook idealisation P/P0 = sigma (Anderson, Aircraft Performance and Design, "
        "sec. 3.3)"),
    "none": LapseLaw(
        lambda s: np.ones_like(s), (0.0, np.inf),
        "no lapse: electric motors, or a turbo-normalised engine below its critical altitude"),
}


# --- Fuels ---------------------------------------------------------------------------

@dataclass(frozen=True)
class Fuel:
    """Fuel properties: density [kg/m^3] at 15 degC and lower heating value [J/kg]."""

    density: float
    lower_heating_value: float


#: Fuels by name. Avgas 0.72 kg/L (6.0 lb/US gal, common practice); Jet A-1 0.80 kg/L
#: (middle of ASTM D1655's 0.775-0.840 kg/L); heating values 43.5 and 43.2 MJ/kg (from memory).
FUELS = {
    "avgas": Fuel(720.0, 43.5e6),
    "mogas": Fuel(740.0, 43.0e6),
    "jet-a1": Fuel(800.0, 43.2e6),
    "diesel": Fuel(840.0, 42.8e6),
}


# --- Propeller efficiency --------------------------------------------------------------

#: Largest TAS array whose efficiency :class:`PropellerEfficiency` keeps (its memo).
_MEMO_SIZE = 4096


@dataclass(frozen=True)
class PropellerEfficiency:
    """Propeller efficiency, constant or tabulated against TAS.

    A table is interpolated by a monotone cubic (Fritsch-Carlson), so the efficiency and
    its slope are continuous, no overshoot appears between points, and optimum speeds do
    not stick to the table's points as with straight-line interpolation; beyond the ends
    the end values hold.

    Parameters
    ----------
    tas : tuple of float
        True airspeeds [m/s], increasing (one value for a constant efficiency).
    efficiency : tuple of float
        Efficiencies [-], in (0, 1].
    factor : float or numpy.ndarray
        Multiplies the efficiency (1; arrays of factors for uncertainty samples).

    References
    ----------
    .. [1] F. N. Fritsch and R. E. Carlson, "Monotone Piecewise Cubic Interpolation",
       *SIAM J. Numer. Anal.* 17(2), 1980, pp. 238-246.
    """

    tas: tuple
    efficiency: tuple
    factor: object = 1.0

    def __post_init__(self):
        object.__setattr__(self, "_constant", len(self.efficiency) == 1)
        if len(self.efficiency) > 1:
            x = np.asarray(self.tas, dtype=float)
            y = np.asarray(self.efficiency, dtype=float)
            object.__setattr__(self, "_x", x)
            # Interior knots: the count at or below a speed is its interval's index.
            object.__setattr__(self, "_inner", np.ascontiguousarray(x[1:-1]))
            d = monotone_slopes(x, y)
            # Per-interval polynomial in the local coordinate t in [0, 1], evaluated by
            # Horner's rule: this is called thousands of times inside speed searches.
            h = np.diff(x)
            c0, c1 = y[:-1], h * d[:-1]
            c2 = 3 * (y[1:] - y[:-1]) - h * (2 * d[:-1] + d[1:])
            c3 = 2 * (y[:-1] - y[1:]) + h * (d[:-1] + d[1:])
            # One row per coefficient, all gathered by one np.take along the intervals:
            # quicker than a take per coefficient or than gathering a table's rows, on the
            # planner's small arrays and the speed searches' larger ones alike.
            object.__setattr__(self, "_table", np.array((x[:-1], 1.0 / h, c3, c2, c1, c0)))
            # The ends as 0-d arrays: a ufunc takes them quicker than Python floats.
            object.__setattr__(self, "_ends", (np.array(x[0]), np.array(x[-1])))
        # The last read-only TAS array met and its efficiency: a climb step asks for the
        # efficiency at its TAS three or four times (level flight, excess power, descent
        # power), a read-only array (and its base) cannot change in between.
        object.__setattr__(self, "_memo", (None, None))

    def __getstate__(self):
        # A copy or a pickle starts without the memo (it may hold a large array).
        return {**self.__dict__, "_memo": (None, None)}

    @property
    def is_constant(self) -> bool:
        """True for a single efficiency value."""
        return len(self.efficiency) == 1

    def __call__(self, tas):
        """Efficiency [-] at TAS [m/s]."""
        if self._constant:
            return self.efficiency[0] * self.factor
        memo = self._memo
        if memo[0] is tas and not tas.flags.writeable:  # (made writeable again: not kept)
            return memo[1]
        if type(self.factor) is float and self.factor == 1.0:
            eta = self._cubic(tas)  # 1.0 x is the same value: one operation fewer
        else:
            eta = self.factor * self._cubic(tas)
        if (type(tas) is np.ndarray and tas.size <= _MEMO_SIZE and not tas.flags.writeable
                and (tas.base is None or (type(tas.base) is np.ndarray
                                          and not tas.base.flags.writeable))):
            if type(eta) is np.ndarray:
                eta.flags.writeable = False
            object.__setattr__(self, "_memo", (tas, eta))
        return eta

    def _cubic(self, tas):
        lo, hi = self._ends
        # np.clip by its two ufuncs (NaN stays NaN), without the wrapper's per-call cost.
        v = np.minimum(np.maximum(tas, lo), hi)
        i = self._inner.searchsorted(v, side="right")
        x0, inv_h, c3, c2, c1, c0 = self._table.take(i, axis=1)
        t = (v - x0) * inv_h
        return ((c3 * t + c2) * t + c1) * t + c0

    def scaled(self, factor):
        """The same efficiency multiplied by ``factor`` [-] (uncertainty samples)."""
        return replace(self, factor=factor)

    def shaft_for_thrust(self, thrust, tas, density):
        r"""Shaft power [W] giving ``thrust`` at TAS: :math:`T V / \eta_p(V)`.

        Parameters
        ----------
        thrust : array_like
            Thrust [N].
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3] (not used: the efficiency depends on TAS only).

        Returns
        -------
        numpy.ndarray
            Shaft power [W].
        """
        power = thrust * tas
        eta = self(tas)
        if (type(power) is np.ndarray and power.size >= IN_PLACE_SIZE
                and owned(power, power.shape)
                and (type(eta) is float or fits(eta, power.shape))):
            power /= eta  # a large grid: in place
            return power
        return power / eta

    def thrust_available(self, tas, density, power):
        r"""Thrust [N] at shaft power ``power``: :math:`\eta_p(V) P / V` (unbounded as V -> 0).

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s], positive.
        density : array_like
            Air density [kg/m^3] (not used).
        power : array_like
            Shaft power [W].

        Returns
        -------
        numpy.ndarray
            Thrust [N].
        """
        return self(tas) * power / tas

    def excess_thrust_power(self, tas, density, power, shaft, drag):
        r"""Thrust power beyond drag power [W]: :math:`\eta_p(V) (P - P_{req})`.

        Equal to :math:`(T_{av} - D) V` when ``shaft`` is the shaft power for thrust
        ``drag``; written on shaft powers so that kinds whose shaft power is not
        :math:`D V / \eta_p` (lifting rotors, efficiency 1) get their excess power.

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3] (not used).
        power : array_like
            Shaft power available [W].
        shaft : array_like
            Shaft power required in level flight [W].
        drag : array_like
            Drag [N] (not used).

        Returns
        -------
        numpy.ndarray
            Excess thrust power [W] (negative: cannot hold the speed level).
        """
        return self(tas) * (power - shaft)

    def shaft_with_extra(self, shaft, drag, tas, density, extra):
        """Shaft power [W] for thrust power ``extra`` [W] beyond level flight's.

        Parameters
        ----------
        shaft : array_like
            Shaft power in level flight [W].
        drag : array_like
            Drag [N] (not used).
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3] (not used).
        extra : array_like
            Extra thrust power [W], e.g. weight x climb rate (negative in a descent).

        Returns
        -------
        numpy.ndarray
            ``shaft + extra / eta_p(V)`` [W].
        """
        return shaft + extra / self(tas)


# --- Actuator disk (momentum theory) ---------------------------------------------------

def ideal_efficiency(thrust, tas, density, disk_area):
    r"""Actuator-disk (Froude) ideal propulsive efficiency.

    .. math:: \eta_i = \frac{2}{1 + \sqrt{1 + T / (\tfrac12 \rho V^2 A)}}
                     = \frac{2 V}{V + \sqrt{V^2 + 2 T / (\rho A)}} = \frac{V}{V + v_i},

    evaluated in the second form, which holds at V = 0 (efficiency 0) as well.

    Parameters
    ----------
    thrust : array_like
        Thrust [N], >= 0.
    tas : array_like
        True airspeed [m/s], >= 0.
    density : array_like
        Air density [kg/m^3].
    disk_area : array_like
        Propeller disk area [m^2].

    Returns
    -------
    numpy.ndarray
        Ideal efficiency [-] in [0, 1]; 1 at zero thrust in motion.

    References
    ----------
    .. [1] McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, ch. 6 (momentum
       theory of the propeller, ideal efficiency).
    """
    tas = np.asarray(tas, dtype=float)
    return 2 * tas / (tas + np.sqrt(tas**2 + 2 * thrust / (density * disk_area)))


def momentum_power(thrust, tas, density, disk_area):
    r"""Ideal (momentum-theory) power [W] to produce ``thrust`` at TAS.

    .. math:: P_i = T (V + v_i) = \frac{T}{2}\left(V + \sqrt{V^2 + \frac{2T}{\rho A}}\right),

    thrust power :math:`T V` over the ideal efficiency; at V = 0 the hover power
    :math:`T^{3/2} / \sqrt{2 \rho A}`.

    Parameters
    ----------
    thrust : array_like
        Thrust [N], >= 0.
    tas : array_like
        True airspeed [m/s], >= 0.
    density : array_like
        Air density [kg/m^3].
    disk_area : array_like
        Propeller disk area [m^2].

    Returns
    -------
    numpy.ndarray
        Ideal power [W].

    References
    ----------
    .. [1] McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, ch. 6 (momentum
       theory of the propeller).
    """
    tas = np.asarray(tas, dtype=float)
    return 0.5 * thrust * (tas + np.sqrt(tas**2 + 2 * thrust / (density * disk_area)))


def momentum_thrust(power, tas, density, disk_area):
    r"""Thrust [N] that an ideal power ``power`` gives at TAS (inverse of :func:`momentum_power`).

    With :math:`w = V + v_i` the speed through the disk, :math:`T = 2 \rho A w v_i` and
    :math:`P = T w`, so :math:`w^3 - V w^2 = c`, :math:`c = P / (2 \rho A)`. This cubic has
    one real root above V; by Cardano's formula, written without cancellation,

    .. math:: s = \sqrt[3]{\frac{V^3}{27} + \frac{c}{2}
                  + \sqrt{\frac{c V^3}{27} + \frac{c^2}{4}}}, \qquad
              w = \frac{V}{3} + s + \frac{V^2}{9 s}, \qquad T = P / w.

    At V = 0 this is the static thrust :math:`(2 \rho A P^2)^{1/3}`; thrust falls
    continuously as V rises and tends to P / V.

    Parameters
    ----------
    power : array_like
        Ideal (thrust plus induced) power [W], >= 0: shaft power x profile efficiency.
    tas : array_like
        True airspeed [m/s], >= 0.
    density : array_like
        Air density [kg/m^3].
    disk_area : array_like
        Propeller disk area [m^2].

    Returns
    -------
    numpy.ndarray
        Thrust [N]; 0 at zero power.

    References
    ----------
    .. [1] McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, ch. 6 (momentum
       theory of the propeller, static thrust).
    """
    tas = np.asarray(tas, dtype=float)
    power = np.asarray(power, dtype=float)
    c = power / (2 * density * disk_area)
    v3 = tas**3 / 27
    s = np.cbrt(v3 + 0.5 * c + np.sqrt(c * v3 + 0.25 * c**2))
    with np.errstate(divide="ignore", invalid="ignore"):
        w = tas / 3 + s + tas**2 / (9 * s)
        return np.where(power > 0, power / w, 0.0)


@dataclass(frozen=True)
class ActuatorDiskPropeller:
    r"""A propeller of given diameter: actuator-disk ideal efficiency x profile efficiency.

    The efficiency depends on thrust as well as speed,
    :math:`\eta = \eta_{pr}(V)\,\eta_i(T, V, \rho)` (:func:`ideal_efficiency`), so static
    thrust is finite and thrust falls with speed at full power. The disk area is the full
    circle :math:`\pi D^2 / 4` (no deduction for the spinner).

    Parameters
    ----------
    diameter : float
        Propeller diameter [m].
    profile : PropellerEfficiency
        Profile efficiency [-], constant or tabulated against TAS: the losses momentum
        theory leaves out (blade drag, swirl, non-uniform loading). An airframe file's
        ``propeller_efficiency`` is read as this when it gives ``propeller_diameter``.

    References
    ----------
    .. [1] McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, ch. 6.
    """

    diameter: float
    profile: PropellerEfficiency

    #: The efficiency depends on thrust: no closed-form best speeds.
    is_constant = False

    @property
    def disk_area(self) -> float:
        """Disk area pi D^2 / 4 [m^2]."""
        return np.pi * self.diameter**2 / 4

    @property
    def tas(self) -> tuple:
        """TAS points of the profile efficiency [m/s]."""
        return self.profile.tas

    @property
    def efficiency(self) -> tuple:
        """Profile efficiencies [-] at :attr:`tas`."""
        return self.profile.efficiency

    @property
    def factor(self):
        """Factor on the profile efficiency [-]."""
        return self.profile.factor

    def __call__(self, tas):
        """Profile efficiency [-] at TAS [m/s]; the ideal efficiency needs the thrust."""
        return self.profile(tas)

    def scaled(self, factor):
        """The same propeller with its profile efficiency multiplied by ``factor`` [-]."""
        return replace(self, profile=self.profile.scaled(factor))

    def total_efficiency(self, thrust, tas, density):
        """Propulsive efficiency T V / P_shaft [-] at a thrust.

        Parameters
        ----------
        thrust : array_like
            Thrust [N].
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3].

        Returns
        -------
        numpy.ndarray
            Ideal x profile efficiency [-].
        """
        return ideal_efficiency(thrust, tas, density, self.disk_area) * self.profile(tas)

    def shaft_for_thrust(self, thrust, tas, density):
        r"""Shaft power [W] giving ``thrust`` at TAS: :math:`T (V + v_i) / \eta_{pr}(V)`.

        Parameters
        ----------
        thrust : array_like
            Thrust [N].
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3].

        Returns
        -------
        numpy.ndarray
            Shaft power [W].

        References
        ----------
        .. [1] McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, ch. 6.
        """
        return momentum_power(thrust, tas, density, self.disk_area) / self.profile(tas)

    def thrust_available(self, tas, density, power):
        r"""Thrust [N] at shaft power ``power``: the root of :math:`\eta_{pr} P = T (V + v_i)`.

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s], >= 0.
        density : array_like
            Air density [kg/m^3].
        power : array_like
            Shaft power [W].

        Returns
        -------
        numpy.ndarray
            Thrust [N]; :math:`(2 \rho A (\eta_{pr} P)^2)^{1/3}` at V = 0.

        References
        ----------
        .. [1] McCormick, *Aerodynamics, Aeronautics and Flight Mechanics*, ch. 6.
        """
        return momentum_thrust(self.profile(tas) * power, tas, density, self.disk_area)

    def excess_thrust_power(self, tas, density, power, shaft, drag):
        r"""Thrust power beyond drag power [W]: :math:`(T_{av}(V) - D) V`.

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3].
        power : array_like
            Shaft power available [W].
        shaft : array_like
            Shaft power required in level flight [W] (not used).
        drag : array_like
            Drag [N].

        Returns
        -------
        numpy.ndarray
            Excess thrust power [W] (negative: cannot hold the speed level).
        """
        return (self.thrust_available(tas, density, power) - drag) * tas

    def shaft_with_extra(self, shaft, drag, tas, density, extra):
        """Shaft power [W] for thrust power ``extra`` [W] beyond level flight's.

        Parameters
        ----------
        shaft : array_like
            Shaft power in level flight [W] (not used).
        drag : array_like
            Drag [N].
        tas : array_like
            True airspeed [m/s] (positive).
        density : array_like
            Air density [kg/m^3].
        extra : array_like
            Extra thrust power [W], e.g. weight x climb rate (negative in a descent).

        Returns
        -------
        numpy.ndarray
            Shaft power for thrust ``drag + extra / V`` by momentum theory [W] (zero where
            no thrust is needed).
        """
        thrust = np.maximum(drag + extra / tas, 0.0)
        return self.shaft_for_thrust(thrust, tas, density)


class _Propeller:
    """What a propulsion kind with a ``propeller`` answers about thrust and shaft power."""

    def shaft_for_thrust(self, thrust, tas, density):
        r"""Shaft power [W] that gives ``thrust`` [N] at TAS [m/s] in air of ``density``.

        Parameters
        ----------
        thrust : array_like
            Thrust [N] (drag, in level flight).
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3].

        Returns
        -------
        numpy.ndarray
            Shaft power [W]: :math:`T V / \eta_p(V)`, or with a propeller diameter
            :math:`T (V + v_i) / \eta_{pr}(V)` (momentum theory).
        """
        return self.propeller.shaft_for_thrust(thrust, tas, density)

    def thrust_available(self, tas, density, power):
        r"""Thrust [N] at shaft power ``power`` [W] and TAS [m/s].

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3].
        power : array_like
            Shaft power [W], e.g. :meth:`shaft_power_available`.

        Returns
        -------
        numpy.ndarray
            Thrust [N]: :math:`\eta_p P / V` (unbounded as V -> 0), or with a propeller
            diameter the momentum-theory thrust, finite at V = 0.
        """
        return self.propeller.thrust_available(tas, density, power)

    def excess_thrust_power(self, tas, density, power, shaft, drag):
        """Thrust power beyond drag power [W], (T_av - D) V, for the climb rate.

        Parameters
        ----------
        tas : array_like
            True airspeed [m/s].
        density : array_like
            Air density [kg/m^3].
        power : array_like
            Shaft power available [W].
        shaft : array_like
            Shaft power required in level flight [W].
        drag : array_like
            Drag in level flight [N].

        Returns
        -------
        numpy.ndarray
            Excess thrust power [W].
        """
        return self.propeller.excess_thrust_power(tas, density, power, shaft, drag)


# --- Propulsion kinds ------------------------------------------------------------------

#: Manifold pressure lost in the intake at full throttle [Pa] (1 inHg; common practice,
#: no source).
INTAKE_LOSS = 3386.389


@dataclass(frozen=True)
class PowerChart:
    r"""A piston engine's power as manifold pressure times RPM, corrected for temperature.

    .. math:: \frac{P}{P_{rated}} = \frac{MP}{MP_{rated}} \frac{N}{N_{rated}}
              \sqrt{\frac{T_{std}}{T}}

    the common approximation (common practice, no source) that power goes with the charge
    mass per stroke (manifold pressure over the square root of temperature, at the
    standard temperature of the altitude) times the strokes per minute. It maps a power
    setting to the RPM and manifold pressure a pilot sets; the power the engine can give
    stays that of the power-lapse law.

    Parameters
    ----------
    rated_rpm : float
        RPM at rated power [1/min].
    rated_manifold_pressure : float
        Manifold pressure at rated power, sea level ISA [Pa].
    cruise_rpm : tuple of float
        RPMs a crew sets in cruise [1/min], increasing.
    intake_loss : float
        Manifold pressure below ambient at full throttle [Pa].
    """

    rated_rpm: float
    rated_manifold_pressure: float
    cruise_rpm: tuple
    intake_loss: float = INTAKE_LOSS

    def manifold_pressure(self, fraction, rpm, temperature, standard_temperature):
        """Manifold pressure [Pa] for a power setting at an RPM.

        Parameters
        ----------
        fraction : array_like
            Power over rated power [-].
        rpm : array_like
            Engine speed [1/min].
        temperature : array_like
            Outside air temperature [K].
        standard_temperature : array_like
            ISA temperature at the pressure altitude [K].

        Returns
        -------
        numpy.ndarray
            Manifold pressure [Pa].
        """
        return (np.asarray(fraction, dtype=float) * self.rated_manifold_pressure
                * (self.rated_rpm / np.asarray(rpm, dtype=float))
                * np.sqrt(np.asarray(temperature) / np.asarray(standard_temperature)))

    def setting(self, fraction, pressure, temperature, standard_temperature):
        """The RPM and manifold pressure to set for a power.

        The lowest cruise RPM whose manifold pressure the throttle can give (below
        ambient less the intake loss, and not above the rated manifold pressure).

        Parameters
        ----------
        fraction : array_like
            Power over rated power [-].
        pressure : array_like
            Ambient static pressure [Pa].
        temperature : array_like
            Outside air temperature [K].
        standard_temperature : array_like
            ISA temperature at the pressure altitude [K].

        Returns
        -------
        rpm : numpy.ndarray
            Engine speed [1/min]; NaN where no cruise RPM gives the power short of full
            throttle.
        manifold_pressure : numpy.ndarray
            Manifold pressure [Pa]; NaN likewise.
        """
        top = np.minimum(np.asarray(pressure, dtype=float) - self.intake_loss,
                         self.rated_manifold_pressure)
        shape = np.broadcast_shapes(np.shape(fraction), np.shape(top), np.shape(temperature))
        rpm = np.full(shape, np.nan)
        mp = np.full(shape, np.nan)
        # From the highest RPM down: each lower one that fits replaces it.
        for n in sorted(self.cruise_rpm, reverse=True):
            m = self.manifold_pressure(fraction, n, temperature, standard_temperature)
            fits = np.broadcast_to(m <= top * (1 + 1e-12), shape)
            rpm = np.where(fits, n, rpm)
            mp = np.where(fits, np.broadcast_to(m, shape), mp)
        return rpm, mp


#: The pack limits of a propulsion without a battery circuit: none, at every point.
_NO_PACK_LIMITS = LIMIT_DTYPE(0)


@dataclass(frozen=True)
class PistonPropeller(_Propeller):
    """Piston engine driving a propeller.

    Parameters
    ----------
    rated_power : float
        Maximum continuous shaft power at sea level, ISA [W].
    bsfc : float
        Brake-specific fuel consumption [kg/J].
    propeller : PropellerEfficiency or ActuatorDiskPropeller
        Propeller efficiency (with a diameter: momentum theory x profile efficiency).
    fuel : str
        Fuel name, a key of :data:`FUELS`.
    fuel_density : float
        Fuel density [kg/m^3].
    fuel_capacity : float
        Usable fuel volume [m^3].
    power_lapse : str
        Power-lapse law, a key of :data:`POWER_LAPSE_LAWS`.
    power_chart : PowerChart or None
        RPM and manifold pressure for a power setting; None: power settings in % only.
    """

    rated_power: float
    bsfc: float
    propeller: PropellerEfficiency | ActuatorDiskPropeller
    fuel: str
    fuel_density: float
    fuel_capacity: float
    power_lapse: str = "gagg-ferrar"
    power_chart: PowerChart | None = None
    kind: str = field(default="piston-propeller", init=False)
    store: Store = field(default=FUEL, init=False)

    def __post_init__(self):
        # Unknown names fail here, listing the valid ones, not later as a KeyError.
        lookup(POWER_LAPSE_LAWS, self.power_lapse, "power-lapse law")
        lookup(FUELS, self.fuel, "fuel")

    @property
    def store_name(self) -> str:
        """``"fuel"``."""
        return self.store.name

    @property
    def store_capacity(self) -> float:
        """Usable fuel mass when full [kg]."""
        return self.fuel_capacity * self.fuel_density

    def lapse(self, sigma):
        """Full-throttle power over rated power [-] at density ratio ``sigma``.

        Parameters
        ----------
        sigma : array_like
            Density ratio rho / rho0 [-].

        Returns
        -------
        numpy.ndarray
            Power lapse phi(sigma) [-] of the law ``power_lapse``.

        References
        ----------
        .. [1] The law's entry in :data:`POWER_LAPSE_LAWS` names its source (Gagg-Ferrar as
           quoted by Gudmundsson, *General Aviation Aircraft Design*, ch. 7; from memory).
        """
        return POWER_LAPSE_LAWS[self.power_lapse](sigma)

    def lapse_outside(self, sigma):
        """Mask of density ratios outside the lapse law's validity.

        Parameters
        ----------
        sigma : array_like
            Density ratio rho / rho0 [-].

        Returns
        -------
        numpy.ndarray of bool
            True outside the law's ``sigma_range`` [-].
        """
        lo, hi = POWER_LAPSE_LAWS[self.power_lapse].sigma_range
        sigma = np.asarray(sigma)
        return (sigma < lo) | (sigma > hi)

    def shaft_power_available(self, sigma):
        """Full-throttle shaft power [W] at density ratio ``sigma``.

        Parameters
        ----------
        sigma : array_like
            Density ratio rho / rho0 [-].

        Returns
        -------
        numpy.ndarray
            Shaft power available, rated power x lapse [W].
        """
        return self.rated_power * self.lapse(sigma)

    def store_rate(self, shaft_power, soc=None, store=None):
        """Rate the store is used [kg/s] at shaft power [W]: the fuel flow, BSFC x P.

        Parameters
        ----------
        shaft_power : array_like
            Shaft power [W].
        soc, store : optional
            Not used (a battery's state of charge and store on board).

        Returns
        -------
        numpy.ndarray or float
            Fuel mass flow [kg/s].

        References
        ----------
        .. [1] Yechout et al., *Introduction to Aircraft Flight Mechanics*, ch. 2 (BSFC of
           piston engines).
        """
        return self.bsfc * shaft_power

    def source_power(self, shaft_power):
        """Fuel heat release rate [W] (lower heating value) at shaft power [W].

        Parameters
        ----------
        shaft_power : array_like
            Shaft power [W].

        Returns
        -------
        numpy.ndarray or float
            Fuel flow x lower heating value [W].
        """
        return self.store_rate(shaft_power) * FUELS[self.fuel].lower_heating_value

    def pack_limits(self, shaft_power, store=None):
        """No battery pack: no pack limits.

        Parameters
        ----------
        shaft_power : array_like
            Shaft power [W].
        store : optional
            Not used.

        Returns
        -------
        numpy.uint32
            A :data:`~cruiseplan.limits.LIMIT_DTYPE` zero, broadcastable to any shape.
        """
        return _NO_PACK_LIMITS

    def at_pack_temperature(self, celsius):
        """The same engine: a pack temperature [degC] changes nothing without a pack."""
        return self

    def pack_shaft_limit(self, store=None):
        """No pack: no shaft-power limit of one (inf [W], bit 0)."""
        return np.inf, 0

    def endurance(self, store, shaft_power):
        """Time [s] to burn ``store`` kg of fuel at constant shaft power [W].

        Parameters
        ----------
        store : array_like
            Fuel mass [kg].
        shaft_power : array_like
            Shaft power [W].

        Returns
        -------
        numpy.ndarray or float
            Endurance [s].
        """
        return store / self.store_rate(shaft_power)

    def sampled(self, name: str, factors: dict):
        """The engine with toleranced parameters (bsfc, propeller_efficiency) as arrays.

        Parameters
        ----------
        name : str
            Airframe name, for errors.
        factors : dict
            Parameter name to an array of factors [-].

        Returns
        -------
        PistonPropeller
            Same engine, parameters multiplied by the factors.

        Raises
        ------
        CruiseplanError
            If ``factors`` holds a battery-energy tolerance.
        """
        if "battery_energy" in factors:
            raise CruiseplanError(f"{name}: a battery-energy tolerance needs a battery")
        changes = {}
        if "bsfc" in factors:
            changes["bsfc"] = self.bsfc * factors["bsfc"]
        if "propeller_efficiency" in factors:
            changes["propeller"] = self.propeller.scaled(factors["propeller_efficiency"])
        return replace(self, **changes) if changes else self


@dataclass(frozen=True)
class ElectricPropeller(_Propeller):
    """Battery, controller and motor driving a propeller.

    Parameters
    ----------
    battery_energy : float
        Usable battery energy [J].
    pack_voltage : float
        Nominal pack voltage [V].
    capacity : float
        Rated pack capacity [A s].
    motor_efficiency, controller_efficiency : float
        Efficiencies [-].
    propeller : PropellerEfficiency or ActuatorDiskPropeller
        Propeller efficiency (with a diameter: momentum theory x profile efficiency).
    max_power : float
        Maximum continuous motor shaft power [W].
    peukert_exponent : float
        Peukert exponent n [-]; 1 for an ideal pack.
    rating_time : float
        Discharge time at which the capacity is rated [s] (Hart's form).
    circuit : EquivalentCircuit, optional
        The pack as an equivalent circuit (:mod:`cruiseplan.physics.battery`): then the
        store, its rate and the pack limits come from it, at its temperature, and
        ``battery_energy``, ``pack_voltage`` and ``capacity`` are its 25 degC figures,
        for display; without it the fixed energy and Peukert's law, as before.
    """

    battery_energy: float
    pack_voltage: float
    capacity: float
    motor_efficiency: float
    controller_efficiency: float
    propeller: PropellerEfficiency | ActuatorDiskPropeller
    max_power: float
    peukert_exponent: float = 1.0
    rating_time: float = 3600.0
    circuit: EquivalentCircuit | None = None
    kind: str = field(default="electric-propeller", init=False)
    store: Store = field(default=ENERGY, init=False)

    @property
    def store_name(self) -> str:
        """``"energy"``."""
        return self.store.name

    @property
    def rated_power(self) -> float:
        """Maximum continuous shaft power [W] (no altitude lapse)."""
        return self.max_power

    @property
    def store_capacity(self) -> float:
        """Usable battery energy when full [J] (the circuit's at its temperature)."""
        if self.circuit is not None:
            return self.circuit.store_capacity
        return self.battery_energy

    def at_pack_temperature(self, celsius):
        """The same chain with its pack at ``celsius`` [degC] (no change without a circuit).

        Parameters
        ----------
        celsius : float
            Pack temperature [degC].

        Returns
        -------
        ElectricPropeller
            Capacity and resistance derated by the pack's temperature table.

        Raises
        ------
        CruiseplanError
            Below the temperature table's range.
        """
        if self.circuit is None:
            return self
        return replace(self, circuit=self.circuit.at_temperature(celsius))

    def pack_load(self, shaft_power, store=None, soc=None) -> PackLoad:
        """Current, terminal voltage and pack limits at a shaft power (circuit only).

        Parameters
        ----------
        shaft_power : array_like
            Shaft power [W].
        store : array_like, optional
            Store on board [J]; a full pack by default.
        soc : array_like, optional
            State of charge [-], instead of ``store``.

        Returns
        -------
        PackLoad
            See :meth:`cruiseplan.physics.battery.EquivalentCircuit.load`.
        """
        c = self.circuit
        if soc is None:
            soc = 1.0 if store is None else c.soc_of_store(store)
        return c.load(self.source_power(shaft_power), soc)

    def pack_shaft_limit(self, store=None):
        """Largest shaft power the pack allows with ``store`` on board, and its limit bit.

        Parameters
        ----------
        store : float, optional
            Store on board [J]; a full pack by default.

        Returns
        -------
        power : float
            Shaft power [W]: the pack's largest battery power within its limits
            (:meth:`~cruiseplan.physics.battery.EquivalentCircuit.power_limit`) through the
            motor and controller (inf without a circuit).
        bit : int
            :class:`~cruiseplan.limits.Limit` bit that binds (0: none).
        """
        if self.circuit is None:
            return np.inf, 0
        c = self.circuit
        soc = 1.0 if store is None else float(np.max(c.soc_of_store(store)))
        power, bit = c.power_limit(soc)
        return power * self.motor_efficiency * self.controller_efficiency, bit

    def pack_limits(self, shaft_power, store=None):
        """Pack limits at a shaft power with ``store`` on board (zeros without a circuit).

        Parameters
        ----------
        shaft_power : array_like
            Shaft power [W].
        store : array_like, optional
            Store on board [J]; a full pack by default.

        Returns
        -------
        numpy.ndarray
            :class:`~cruiseplan.limits.Limit` bits PACK_POWER, CURRENT and CUTOFF (a
            scalar zero, broadcastable to any shape, without a circuit).
        """
        if self.circuit is None:
            return _NO_PACK_LIMITS
        return self.pack_load(shaft_power, store).limits

    def lapse(self, sigma):
        """Electric motors keep their power with altitude: 1 [-].

        Parameters
        ----------
        sigma : array_like
            Density ratio rho / rho0 [-].

        Returns
        -------
        numpy.ndarray
            Ones, shape of ``sigma`` [-].
        """
        return np.ones_like(np.asarray(sigma, dtype=float))

    def lapse_outside(self, sigma):
        """Electric motors have no lapse-law validity limit.

        Parameters
        ----------
        sigma : array_like
            Density ratio rho / rho0 [-].

        Returns
        -------
        numpy.ndarray of bool
            All False, shape of ``sigma`` [-].
        """
        return np.zeros(np.shape(sigma), dtype=bool)

    def shaft_power_available(self, sigma):
        """Maximum shaft power [W], the same at every altitude.

        Parameters
        ----------
        sigma : array_like
            Density ratio rho / rho0 [-].

        Returns
        -------
        numpy.ndarray
            Maximum continuous shaft power [W], shape of ``sigma``.
        """
        return self.max_power * self.lapse(sigma)

    def source_power(self, shaft_power):
        """Battery power drawn [W] at shaft power [W].

        Parameters
        ----------
        shaft_power : array_like
            Shaft power [W].

        Returns
        -------
        numpy.ndarray or float
            Battery power, shaft power / (motor x controller efficiency) [W].
        """
        return shaft_power / (self.motor_efficiency * self.controller_efficiency)

    def store_rate(self, shaft_power, soc=None, store=None):
        r"""Rate the usable energy is used [W] at shaft power [W], Peukert included.

        With an equivalent circuit (:attr:`circuit`) the rate at state of charge ``soc``
        is :math:`U(s) I(P, s) = P + I^2 R` (the planner, which follows the state of
        charge); without ``soc`` it is the mean rate of a constant-power discharge of
        ``store`` (a full pack by default) to the loaded cut-off, so that store / rate is
        that discharge's time (grids, best speeds, reserves). Without a circuit:

        Peukert's law in Hart's form gives the time a pack lasts at current :math:`I`,
        :math:`t = R_t (C/(I R_t))^n`, for its rated energy :math:`U C`; the usable energy
        is used at that pack's rate,

        .. math:: \dot E = \frac{U C}{t} = \frac{U C}{R_t}\left(\frac{I R_t}{C}\right)^n,
                  \qquad I = P_{batt} / U,

        the battery power when :math:`n = 1`, more at high currents otherwise. Segments
        flown at different powers add their shares of the pack this way (each uses
        :math:`\Delta t / t(I)` of it).

        Parameters
        ----------
        shaft_power : array_like
            Shaft power [W].
        soc : array_like, optional
            State of charge [-] (circuit only).
        store : array_like, optional
            Store on board [J] (circuit only, without ``soc``).

        Returns
        -------
        numpy.ndarray
            Rate of use of the usable energy [W].

        References
        ----------
        .. [1] Traub (2011), eq. 9.
        .. [2] :mod:`cruiseplan.physics.battery` (the Rint circuit).
        """
        p_batt = self.source_power(shaft_power)
        if self.circuit is not None:
            if soc is not None:
                return self.circuit.rate(p_batt, soc)
            return self.circuit.mean_rate(p_batt, store)
        n = self.peukert_exponent
        if np.all(n == 1.0):
            return p_batt
        current = p_batt / self.pack_voltage
        return (self.pack_voltage * self.capacity / self.rating_time
                * (current * self.rating_time / self.capacity) ** n)

    def endurance(self, store, shaft_power):
        """Time [s] to use ``store`` joules of usable energy at shaft power [W].

        Store over :meth:`store_rate`; with Peukert's law in Hart's form the time is
        linear in the share of the pack used, so this equals the law itself.

        Parameters
        ----------
        store : array_like
            Usable energy [J].
        shaft_power : array_like
            Shaft power [W].

        Returns
        -------
        numpy.ndarray
            Endurance [s].

        References
        ----------
        .. [1] Traub (2011), eq. 9.
        """
        return store / self.store_rate(shaft_power, store=store)

    def sampled(self, name: str, factors: dict):
        """The battery chain with toleranced parameters as arrays over samples.

        Parameters
        ----------
        name : str
            Airframe name, for errors.
        factors : dict
            Parameter name (battery_energy, motor_efficiency, propeller_efficiency) to an
            array of factors [-].

        Returns
        -------
        ElectricPropeller
            Same chain, parameters multiplied by the factors.

        Raises
        ------
        CruiseplanError
            If ``factors`` holds a BSFC tolerance.
        """
        if "bsfc" in factors:
            raise CruiseplanError(f"{name}: a BSFC tolerance needs a piston engine")
        changes = {}
        if "battery_energy" in factors:
            changes["battery_energy"] = self.battery_energy * factors["battery_energy"]
            if self.circuit is not None:
                changes["circuit"] = self.circuit.scaled(factors["battery_energy"])
        if "motor_efficiency" in factors:
            changes["motor_efficiency"] = self.motor_efficiency * factors["motor_efficiency"]
        if "propeller_efficiency" in factors:
            changes["propeller"] = self.propeller.scaled(factors["propeller_efficiency"])
        return replace(self, **changes) if changes else self


#: Propulsion kinds by the name used in airframe files.
PROPULSION_KINDS = {
    "piston-propeller": PistonPropeller,
    "electric-propeller": ElectricPropeller,
    # The same battery chain driving lifting rotors; their efficiency is in the rotor model.
    "electric-rotor": ElectricPropeller,
}
