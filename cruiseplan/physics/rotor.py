r"""Rotor sets: power in hover and forward flight from momentum theory.

For ``N`` rotors of radius :math:`R` (disk area :math:`A = \pi R^2` each) carrying weight
:math:`W` against body drag :math:`D = \tfrac12\rho V^2 f`, the rotor plane tilts forward by
:math:`\alpha = \arctan(D/W)` and each rotor gives thrust :math:`T = \sqrt{W^2 + D^2}/N`.

* Induced velocity from Glauert's forward-flight relation, solved by Newton's method on
  all points at once:

  .. math:: v_i = \frac{v_h^2}{\sqrt{(V\cos\alpha)^2 + (V\sin\alpha + v_i)^2}}, \qquad
            v_h = \sqrt{T / (2\rho A)}

* induced power :math:`P_i = \kappa T v_i` per rotor (:math:`\kappa` the induced power
  factor);
* profile power :math:`P_0 = \tfrac{\sigma C_{d0}}{8}\rho A (\Omega R)^3 (1 + 4.65\mu^2)` per
  rotor, with solidity :math:`\sigma = B c / (\pi R)` and advance ratio
  :math:`\mu = V\cos\alpha / (\Omega R)`;
* parasite power :math:`P_p = D V`.

Fixed-pitch rotors change speed to change thrust, at a roughly constant thrust
coefficient; the tip speed given for hover at maximum take-off mass at sea level sets that
coefficient, and the tip speed elsewhere follows :math:`\Omega R = \sqrt{T/(\rho A C_T)}`.
Hover power then rises as :math:`\sigma^{-1/2}` with altitude, induced and profile parts
alike.

References
----------
.. [1] J. G. Leishman, *Principles of Helicopter Aerodynamics*, 2nd ed., Cambridge
   University Press, 2006, ch. 2 (momentum theory, hover and forward flight, Glauert's
   inflow) and ch. 5 (power in forward flight; profile power with 1 + 4.65 mu^2).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: Advance ratio above which the simple profile-power model is not trusted.
MAX_ADVANCE_RATIO = 0.35
#: Forward tilt of the rotor plane beyond which a multirotor is not flown (its flight
#: controller's usual limit; common practice, no source).
MAX_TILT_DEG = 35.0


@dataclass(frozen=True)
class Rotors:
    """The rotor set (SI).

    Parameters
    ----------
    count : int
        Number of rotors.
    radius : float
        Rotor radius [m].
    blades : int
        Blades per rotor.
    chord : float
        Mean blade chord [m].
    blade_cd0 : float
        Blade section profile drag coefficient [-].
    hover_tip_speed : float
        Tip speed in hover at maximum take-off mass, sea-level ISA [m/s].
    induced_factor : float
        Induced power factor kappa [-] (1.1-1.2 typical, common practice).
    """

    count: int
    radius: float
    blades: int
    chord: float
    blade_cd0: float
    hover_tip_speed: float
    induced_factor: float = 1.15

    @property
    def disk_area(self) -> float:
        """Area of one rotor disk [m^2]."""
        return np.pi * self.radius**2

    @property
    def solidity(self) -> float:
        """Blade area over disk area, B c / (pi R) [-]."""
        return self.blades * self.chord / (np.pi * self.radius)


def hover_induced_velocity(thrust, density, disk_area):
    """Momentum-theory hover induced velocity sqrt(T / (2 rho A)) [m/s].

    Parameters
    ----------
    thrust : array_like
        Thrust of one rotor [N].
    density : array_like
        Air density [kg/m^3].
    disk_area : float
        Disk area of one rotor [m^2].

    Returns
    -------
    numpy.ndarray
        Induced velocity at the disk [m/s].

    References
    ----------
    .. [1] Leishman (2006), eq. 2.14.
    """
    return np.sqrt(np.asarray(thrust) / (2.0 * np.asarray(density) * disk_area))


def glauert_induced_velocity(v_hover, v_parallel, v_normal, iterations=30):
    r"""Induced velocity in forward flight from Glauert's relation, vectorised Newton.

    Solves :math:`v = v_h^2/\sqrt{V_\parallel^2 + (V_\perp + v)^2}` for :math:`v \ge 0`,
    where :math:`V_\parallel` is the flow along the disk and :math:`V_\perp` the flow
    through it (positive when it adds to the inflow).

    Parameters
    ----------
    v_hover : array_like
        Hover induced velocity at the same thrust and density [m/s].
    v_parallel, v_normal : array_like
        Free-stream components along and through the disk [m/s].
    iterations : int
        Newton steps [-] (the function is monotone; a few suffice).

    Returns
    -------
    numpy.ndarray
        Induced velocity [m/s].

    References
    ----------
    .. [1] Leishman (2006), eq. 2.118 (Glauert's forward-flight inflow).
    """
    vh2 = np.asarray(v_hover, dtype=float) ** 2
    vp = np.asarray(v_parallel, dtype=float)
    vn = np.asarray(v_normal, dtype=float)
    # Start from the exact answer without through-flow (V_perp = 0), where the relation is
    # a quadratic in v^2: v^2 = (sqrt(V_par^4 + 4 v_h^4) - V_par^2) / 2; Newton then needs
    # only a few steps. (Written as 2 v_h^4 / (sqrt(...) + V_par^2) to avoid cancellation.)
    vp2 = vp * vp
    shape = np.broadcast_shapes(vh2.shape, vp.shape, vn.shape)
    vh2, vp2, vn = (np.broadcast_to(a, shape) for a in (vh2, vp2, vn))
    v = np.array(np.sqrt(2.0 * vh2 * vh2 / (np.sqrt(vp2 * vp2 + 4.0 * vh2 * vh2) + vp2)),
                 dtype=float)
    # Newton steps in place: on large grids the time goes into allocating temporaries.
    u, s2, s, f, g = (np.empty(shape) for _ in range(5))
    active = np.ones(shape, dtype=bool)
    for k in range(iterations):
        np.add(vn, v, out=u)
        np.multiply(u, u, out=s2)
        s2 += vp2
        np.sqrt(s2, out=s)
        np.divide(vh2, s, out=f)             # v_h^2 / s
        np.multiply(f, u, out=g)
        g /= s2
        g += 1.0                             # f'(v) = 1 + v_h^2 u / s^3
        np.subtract(v, f, out=f)             # f(v) = v - v_h^2 / s
        f /= g                               # the Newton step
        np.subtract(v, f, out=g)
        np.maximum(g, 0.5 * v, out=g)
        # An element stops once its own step is at rounding, so that its value does not
        # depend on the other elements solved with it.
        np.copyto(v, g, where=active)
        # From that start four steps reach rounding even at a 35 deg tilt; check from then.
        if k >= 3:
            active &= np.abs(f) / np.maximum(v, 1e-9) > 1e-12
            if not active.any():
                break
    return v


def rotor_power(rotors: Rotors, thrust_coefficient, weight, drag, tas, density):
    """Power terms of a rotor set carrying ``weight`` against ``drag`` at TAS ``tas``.

    Parameters
    ----------
    rotors : Rotors
        The rotor set.
    thrust_coefficient : float
        C_T = T / (rho A (Omega R)^2) held by the rotors [-].
    weight : array_like
        Weight carried [N].
    drag : array_like
        Body drag [N].
    tas : array_like
        True airspeed [m/s].
    density : array_like
        Air density [kg/m^3].

    Returns
    -------
    induced, profile : numpy.ndarray
        Induced and profile power of all rotors [W].
    advance_ratio : numpy.ndarray
        mu = V cos(alpha) / (Omega R) [-].

    References
    ----------
    .. [1] Leishman (2006), eq. 2.118 (Glauert's inflow) and ch. 5 (profile power with
       1 + 4.65 mu^2).
    """
    r = rotors
    total = np.sqrt(weight * weight + drag * drag)
    thrust = total / r.count
    # Tilt alpha = atan(D/W): its cosine and sine without the trigonometry.
    vp, vn = tas * weight / total, tas * drag / total
    vh = hover_induced_velocity(thrust, density, r.disk_area)
    vi = glauert_induced_velocity(vh, vp, vn)
    tip2 = thrust / (density * r.disk_area * thrust_coefficient)
    tip = np.sqrt(tip2)
    profile = (r.solidity * r.blade_cd0 / 8.0 * density * r.disk_area * tip2 * tip
               * (1.0 + 4.65 * vp * vp / tip2))
    induced = r.induced_factor * thrust * vi
    return r.count * induced, r.count * profile, vp / tip

