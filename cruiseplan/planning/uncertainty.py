r"""How sure is a plan: Monte Carlo over the airframe's and the winds' tolerances.

An airframe file may give tolerances on its drag (CD0), Oswald efficiency, propeller
efficiency, BSFC and usable battery energy; a mission file on the wind speed and
direction. Each tolerance is a relative standard deviation (normal) or a relative range
(uniform); the airframe's may be correlated (a fitted polar's CD0 and e are), sampled
through a Gaussian copula over the Latin hypercube
(:class:`~cruiseplan.model.tolerance.ToleranceCorrelation`, :func:`draw_factors`).
:func:`sample_airframe` draws ``n`` airframes at once: the same airframe object whose
parameters are arrays over the samples, so the whole physics runs on them in one
vectorised pass.

:func:`plan_uncertainty` re-flies a planned mission (its altitudes, speeds and climb speed,
as the crew would fly them) with every sample and reports the distribution of fuel or energy
at landing, flight time and the reserve, and the probability that the reserve holds.
:func:`cruise_uncertainty` does the same for cruise at one altitude and speed (range and
endurance). Runs are seeded and reproducible; with all tolerances zero they give the
deterministic answer exactly.

References
----------
.. [1] N. Metropolis and S. Ulam, "The Monte Carlo Method", *J. Am. Stat. Assoc.* 44(247),
   1949, pp. 335-341.
.. [2] JCGM 101:2008, *Evaluation of measurement data - Propagation of distributions
   using a Monte Carlo method* (coverage intervals from sample quantiles).
.. [3] McKay, Beckman and Conover (1979): Latin hypercube sampling.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from cruiseplan.errors import CruiseplanError
from cruiseplan.model.tolerance import normal_ppf
from cruiseplan.planning.mission import Flight, StartGrid, leg_options, mission_reserve
from cruiseplan.planning.performance import cruise_points
from cruiseplan.units import quantity_of

#: SI unit of each :class:`PlanUncertainty` field :meth:`PlanUncertainty.quantity` hands
#: back (``"store"``: kg of fuel or J of usable energy).
PLAN_UNCERTAINTY_UNITS = {"remaining": "store", "used": "store", "time": "s",
                          "reserve_required": "store"}
#: SI unit of each :class:`CruiseUncertainty` field :meth:`CruiseUncertainty.quantity`
#: hands back.
CRUISE_UNCERTAINTY_UNITS = {"range_ground": "m", "endurance": "s"}


def _store_unit(store_name):
    return None if store_name is None else {"fuel": "kg", "energy": "J"}.get(store_name)

#: Quantiles reported (P10, P50, P90).
QUANTILES = (0.10, 0.50, 0.90)
#: Samples re-flown at once by default [-]: bounds the memory of a large run and lets a
#: caller show progress between chunks.
CHUNK = 20_000


def chunk_slices(n: int, chunk: int | None = CHUNK, progress=None):
    """Slices of ``range(n)`` in order, ``chunk`` long (the last may be shorter).

    Parameters
    ----------
    n : int
        Number of samples [-].
    chunk : int, optional
        Samples per slice [-]; None or a value of at least ``n`` gives one slice.
    progress : callable, optional
        Called as ``progress(done, total)`` [-, -] after each slice has been used by the
        caller (so the last call is ``progress(n, n)``).

    Yields
    ------
    slice
        The next slice of samples.

    Raises
    ------
    CruiseplanError
        If ``chunk`` is below 1.
    """
    if chunk is None:
        chunk = max(n, 1)
    if chunk < 1:
        raise CruiseplanError(f"Monte Carlo chunks need at least one sample, got {chunk}")
    for start in range(0, n, chunk):
        stop = min(start + chunk, n)
        yield slice(start, stop)
        if progress is not None:
            progress(stop, n)


def unit_samples(n: int, dims: int, seed: int):
    """``n`` Latin-hypercube points in [0, 1)^dims, seeded.

    Each margin is stratified, so quantiles settle with far fewer samples than plain
    random draws.

    Parameters
    ----------
    n : int
        Number of samples [-].
    dims : int
        Number of toleranced parameters [-]; 0 gives an (n, 0) array.
    seed : int
        Seed of the random generator [-].

    Returns
    -------
    numpy.ndarray
        Points in [0, 1), shape (n, dims) [-].

    References
    ----------
    .. [1] M. D. McKay, R. J. Beckman and W. J. Conover, "A Comparison of Three Methods for
       Selecting Values of Input Variables in the Analysis of Output from a Computer Code",
       *Technometrics* 21(2), 1979, pp. 239-245.
    """
    if dims == 0:
        return np.zeros((n, 0))
    # McKay's construction as scipy.stats.qmc.LatinHypercube(d, seed=default_rng(seed))
    # .random(n) draws it (the same points, bit for bit; a test compares them), a column at
    # a time: its own way holds three n x dims arrays at once, and scipy.stats costs
    # ~45 MB of memory to import.
    # scipy's engine draws from the first child of the seed's sequence.
    rng = np.random.default_rng(np.random.SeedSequence(seed, spawn_key=(0,)))
    u = rng.uniform(size=(n, dims))
    for j in range(dims):
        strata = np.arange(1, n + 1)
        rng.shuffle(strata)
        u[:, j] = (strata - u[:, j]) / n
    return u


def draw_factors(tolerances: dict, u, correlation=None) -> dict:
    """Factors for each toleranced parameter from unit samples ``u`` (n, >= len).

    Parameters take the columns in the sorted order of their names (reproducible). With a
    correlation, the correlated parameters' columns become normal scores, are mixed by
    the Cholesky factor of their score correlation (a Gaussian copula over the Latin
    hypercube, NORTA: the first parameter named keeps its stratified margin) and are mapped to
    each parameter's distribution; without one, or with every correlation zero, the
    factors are those of the independent draw, bit for bit.

    Parameters
    ----------
    tolerances : dict
        Parameter name to its :class:`~cruiseplan.model.tolerance.Tolerance`.
    u : numpy.ndarray
        Unit samples in [0, 1), shape (n, >= len(tolerances)) [-].
    correlation : ToleranceCorrelation, optional
        Correlation of some of the parameters' factors [-].

    Returns
    -------
    dict
        Parameter name to an array of n multiplying factors [-].

    References
    ----------
    .. [1] M. C. Cario and B. L. Nelson, "Modeling and generating random vectors with
       arbitrary marginal distributions and correlation matrix", technical report,
       Northwestern University, 1997 (NORTA: normal scores correlated through a
       Cholesky factor, then mapped to each margin).
    """
    keys = sorted(tolerances)
    factors = {key: tolerances[key].factors(u[:, j]) for j, key in enumerate(keys)}
    if correlation is None or correlation.is_zero:
        return factors
    cols = [keys.index(p) for p in correlation.parameters]
    z = normal_ppf(u[:, cols]) @ correlation.score_cholesky(tolerances).T
    for i, p in enumerate(correlation.parameters):
        factors[p] = tolerances[p].factors_of_scores(z[:, i])
    return factors


def sample_airframe(airframe, factors: dict):
    """The airframe with its toleranced parameters as arrays over samples.

    Parameters
    ----------
    airframe : Airframe
        The nominal airframe, of any kind.
    factors : dict
        Parameter name to an array of multiplying factors [-] (see the kind's
        ``tolerance_keys``).

    Returns
    -------
    Airframe
        Same kind; every model function broadcasts over the sample axis.
    """
    return airframe.sampled(factors) if factors else airframe


def quantiles(values) -> tuple:
    """P10, P50 and P90 of samples.

    Parameters
    ----------
    values : array_like
        Samples, in any unit [unit of the samples].

    Returns
    -------
    tuple of float
        The quantiles :data:`QUANTILES`, in the samples' unit.

    References
    ----------
    .. [1] JCGM 101:2008 (coverage intervals from sample quantiles).
    """
    return tuple(float(q) for q in np.quantile(np.asarray(values, dtype=float), QUANTILES))


class _Samples:
    """Labelled arrays of a Monte Carlo's samples, shared by its result classes."""

    def to_xarray(self, store_name: str | None = None):
        """The samples as an xarray Dataset with dim ``sample`` (``frames`` extra).

        Parameters
        ----------
        store_name : str, optional
            ``"fuel"`` (amounts in kg) or ``"energy"`` (J): sets the ``units`` of store
            amounts, which carry none without it. Times [s] and distances [m] always do.

        Returns
        -------
        xarray.Dataset
            One variable per sampled field (SI); attribute ``seed``.
        """
        from cruiseplan.frames import samples_to_xarray

        return samples_to_xarray(self, store_name)

    def to_dataframe(self, store_name: str | None = None):
        """The samples as a pandas DataFrame, one row per sample (``frames`` extra).

        Parameters
        ----------
        store_name : str, optional
            As for :meth:`to_xarray`.

        Returns
        -------
        pandas.DataFrame
            One column per sampled field (SI); units in ``df.attrs["units"]``.
        """
        from cruiseplan.frames import samples_to_dataframe

        return samples_to_dataframe(self, store_name)


@dataclass(frozen=True)
class PlanUncertainty(_Samples):
    """Distribution of a re-flown plan over ``n`` samples (SI arrays, one value each).

    Attributes
    ----------
    remaining : numpy.ndarray
        Fuel [kg] or usable energy [J] at landing.
    used : numpy.ndarray
        Fuel or energy used.
    time : numpy.ndarray
        Flight time [s].
    reserve_required : numpy.ndarray
        Reserve needed at landing by the mission's policy, per sample.
    seed : int
        Seed of the random generator.
    """

    remaining: np.ndarray
    used: np.ndarray
    time: np.ndarray
    reserve_required: np.ndarray
    seed: int

    @property
    def n(self) -> int:
        """Number of samples."""
        return int(np.size(self.remaining))

    @property
    def reserve_probability(self) -> float:
        """Share of samples landing with at least the reserve."""
        return float(np.mean(self.remaining >= self.reserve_required * (1 - 1e-12)))

    def summary(self) -> dict:
        """P10/P50/P90 of remaining, used and time, and the probability the reserve holds."""
        return {"remaining": quantiles(self.remaining), "used": quantiles(self.used),
                "time": quantiles(self.time),
                "reserve_required": quantiles(self.reserve_required),
                "reserve_probability": self.reserve_probability, "n": self.n,
                "seed": self.seed}

    def quantity(self, name: str, store_name: str | None = None):
        """A sampled field as a pint Quantity in SI units (:data:`PLAN_UNCERTAINTY_UNITS`).

        Parameters
        ----------
        name : str
            ``"remaining"``, ``"used"``, ``"reserve_required"`` [kg or J] or ``"time"``
            [s].
        store_name : {"fuel", "energy"}, optional
            The store (``airframe.propulsion.store_name``): kg of fuel or J of energy;
            needed for the store amounts.

        Returns
        -------
        pint.Quantity
            The samples [the field's SI unit].

        Raises
        ------
        CruiseplanError
            For a name without a unit, or a store amount without ``store_name``.
        """
        return quantity_of(self, name, PLAN_UNCERTAINTY_UNITS,
                           store_unit=_store_unit(store_name))


def plan_uncertainty(plan, n: int = 10000, seed: int = 0, chunk: int | None = CHUNK,
                     progress=None) -> PlanUncertainty:
    """Re-fly a planned mission with ``n`` sampled airframes and winds.

    The crew flies the plan: its altitudes, its cruise speeds at each leg's start and its
    climb speed; what the samples change is how much that costs.

    Parameters
    ----------
    plan : Plan
        A plan from :func:`cruiseplan.planning.mission.plan_mission`.
    n : int
        Number of samples [-].
    seed : int
        Seed of numpy's default generator [-].
    chunk : int, optional
        Samples re-flown at once [-] (default :data:`CHUNK`); None re-flies all at once.
        The samples are drawn whole first, so every chunk size gives the same results, bit
        for bit.
    progress : callable, optional
        Called as ``progress(done, total)`` [-, -] after each chunk (see
        :func:`chunk_slices`).

    Returns
    -------
    PlanUncertainty
        Per-sample fuel or energy at landing, used, time and reserve.

    Raises
    ------
    CruiseplanError
        If ``n`` is below 1.

    References
    ----------
    .. [1] JCGM 101:2008, secs. 7-8 (Monte Carlo propagation, coverage intervals).
    """
    if n < 1:
        raise CruiseplanError(f"Monte Carlo needs at least one sample, got {n}")
    mission = plan.mission
    af = mission.airframe
    tol = dict(af.tolerances)
    wt = mission.wind_tolerance
    windy = wt is not None and bool(wt.speed_sd or wt.direction_sd)
    u = unit_samples(n, len(tol) + 2 * windy, seed)
    k = len(tol)
    # Factors and wind errors are worked out chunk by chunk from the points (row by row,
    # so the same as at once): the points and the results are the only arrays of n kept.
    out = np.empty((4, n))
    for sl in chunk_slices(n, chunk, progress):
        factors = draw_factors(tol, u[sl], af.tolerance_correlation)
        we = None if not windy else (wt.speed_sd * normal_ppf(u[sl, k]),
                                     wt.direction_sd * normal_ppf(u[sl, k + 1]))
        out[:, sl] = _refly_plan(plan, factors, we, sl.stop - sl.start)
    store, used, time, required = out
    return PlanUncertainty(store, used, time, required, seed)


def _refly_plan(plan, factors, wind_error, n):
    """Fuel or energy at landing, used, time and reserve of ``n`` samples re-flying a plan."""
    mission = plan.mission
    af = mission.airframe
    af_s = sample_airframe(af, factors)
    fl = Flight(mission, af_s, wind_error, sample_shape=(n,))
    prof = mission.profile
    # A larger or smaller pack holds proportionally more or less usable energy.
    store = plan.initial * factors.get("battery_energy", 1.0) + np.zeros(n)
    m = plan.takeoff_mass + np.zeros(n)
    allowance = np.minimum(mission.allowance, store)
    store = store - allowance
    if fl.burns_mass:
        m = m - allowance
    used = 0.0 + allowance  # summed in the plan's order, so zero spread gives its numbers
    time = np.zeros(n)
    h = prof.departure_elevation
    legs = mission.legs
    # Each leg worked out from its start on the plan's grid, as the plan does.
    grid = StartGrid(fl, fl.zero_fuel_mass)
    for k, leg in enumerate(legs):
        last = k == len(legs) - 1
        H = plan.leg_altitudes[k]
        shift = m - grid.mass(m)
        o = leg_options(fl, mission, leg, h, grid.mass(m), grid.store(store),
                        plan.climb_speed, last, np.array([H]), plan.leg_speeds[k])
        # The same order of subtraction as the plan's bookkeeping, segment by segment.
        for part in ("trans", "cruise", "final"):
            seg = o[part]
            store = store - seg["used"]
            used = used + seg["used"]
            time = time + seg["time"]
            m = np.where(seg["time"] > 0, grid.shifted(seg["mass_end"], shift), m)
        h = H if not last else prof.arrival_elevation
    # The samples fly the plan's power settings: the reserve's power is the plan's.
    required = mission_reserve(fl, mission, m, plan.leg_altitudes,
                               plan.reserve.power_fraction,
                               plan.reserve.power_source or "plan").amount
    required = np.broadcast_to(np.asarray(required, dtype=float), (n,))
    return (store, np.broadcast_to(used, (n,)), time, required)


@dataclass(frozen=True)
class CruiseUncertainty(_Samples):
    """Range [m] and endurance [s] over samples, cruising at one altitude and TAS."""

    range_ground: np.ndarray
    endurance: np.ndarray
    seed: int

    def summary(self) -> dict:
        """P10/P50/P90 of range and endurance."""
        return {"range_ground": quantiles(self.range_ground),
                "endurance": quantiles(self.endurance), "n": int(self.range_ground.size),
                "seed": self.seed}

    def quantity(self, name: str):
        """A sampled field as a pint Quantity in SI units (:data:`CRUISE_UNCERTAINTY_UNITS`).

        Parameters
        ----------
        name : str
            ``"range_ground"`` [m] or ``"endurance"`` [s].

        Returns
        -------
        pint.Quantity
            The samples [m or s].

        Raises
        ------
        CruiseplanError
            For a name without a unit, listing the known ones.
        """
        return quantity_of(self, name, CRUISE_UNCERTAINTY_UNITS)


def cruise_uncertainty(airframe, mass, store, air, tas, ground_speed, n=10000, seed=0,
                       reserve=0.0, chunk: int | None = CHUNK,
                       progress=None) -> CruiseUncertainty:
    """Range and endurance at one cruise point over ``n`` sampled airframes.

    Parameters
    ----------
    airframe : Airframe
        The nominal airframe.
    mass : float
        Mass [kg].
    store : float
        Fuel [kg] or usable energy [J] on board (nominal).
    air : AirState
        Air at the cruise altitude (one state).
    tas, ground_speed : float
        TAS and ground speed [m/s].
    n : int
        Samples [-].
    seed : int
        Seed of numpy's default generator [-].
    reserve : float
        Fuel or energy kept back [kg or J]; range and endurance use the rest.
    chunk : int, optional
        Samples flown at once [-] (default :data:`CHUNK`); None flies all at once. The
        samples are drawn whole first, so every chunk size gives the same results, bit for
        bit.
    progress : callable, optional
        Called as ``progress(done, total)`` [-, -] after each chunk.

    Returns
    -------
    CruiseUncertainty
        Per-sample range and endurance.

    References
    ----------
    .. [1] JCGM 101:2008, secs. 7-8 (Monte Carlo propagation, coverage intervals).
    .. [2] McKay, Beckman and Conover (1979): Latin hypercube sampling.
    """
    tol = dict(airframe.tolerances)
    factors = draw_factors(tol, unit_samples(n, len(tol), seed),
                           airframe.tolerance_correlation)
    ranges, endurances = [], []
    for sl in chunk_slices(n, chunk, progress):
        part = {k: v[sl] for k, v in factors.items()}
        m = sl.stop - sl.start
        af_s = sample_airframe(airframe, part)
        usable = np.maximum(store * part.get("battery_energy", 1.0) - reserve, 0.0)
        # Every sample re-flies the nominal speed and counts, as before the unflyable
        # figures became NaN (a NaN sample would make every quantile NaN).
        pts = cruise_points(af_s, mass, air, tas + np.zeros(m), usable,
                            ground_speed=ground_speed + np.zeros(m), keep_unflyable=True)
        ranges.append(np.broadcast_to(pts.range_ground, (m,)))
        endurances.append(np.broadcast_to(pts.endurance, (m,)))
    return CruiseUncertainty(np.concatenate(ranges), np.concatenate(endurances), seed)
