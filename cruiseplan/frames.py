"""Labelled arrays: results as xarray Datasets and pandas DataFrames (the ``frames`` extra).

The core computes on plain numpy arrays; this module only lifts finished results into
labelled containers. pandas and xarray are imported inside the functions, so the package
works without them (``pip install cruiseplan[frames]`` brings them).

* a cruise grid (:class:`~cruiseplan.planning.performance.CruisePoints`): dims
  ``altitude`` x ``airspeed`` (a grid at TAS values shared by every altitude), or
  ``altitude`` x ``setting`` (a power-setting table, TAS a variable), or ``altitude`` alone;
* a best-cruise answer: dim ``altitude``;
* a plan: dim ``segment``;
* Monte Carlo samples: dim ``sample``.

Every coordinate and variable carries ``units`` (UDUNITS spelling, SI) and ``long_name``
attributes. Limit bit sets are integer variables with CF ``flag_masks`` and
``flag_meanings`` built from :data:`~cruiseplan.limits.LIMITS` (the short codes of the
printed tables' status column), so another tool can decode them. The functions read the
result objects by their attributes only; this module sits in the base layer and imports
nothing above it.
"""

from __future__ import annotations

import numpy as np

from cruiseplan.limits import LIMIT_DTYPE, LIMITS, explain

#: Store units by the result's ``store_name``.
STORE_UNITS = {"fuel": "kg", "energy": "J"}

#: (name, units, long name) of the cruise-grid fields; "{store}" is the store's unit.
GRID_FIELDS = (
    ("drag", "N", "drag (thrust required)"),
    ("thrust_power", "W", "thrust power (drag x TAS)"),
    ("shaft_power", "W", "shaft power required"),
    ("source_power", "W", "fuel heat release or battery power"),
    ("power_available", "W", "full-throttle shaft power available"),
    ("power_margin", "W", "shaft power available minus required"),
    ("store_rate", "{store}/s", "rate the store is used"),
    ("fuel_volume_flow", "m3/s", "fuel volume flow"),
    ("ground_speed", "m/s", "ground speed"),
    ("specific_range_air", "m/{store}", "specific range through the air"),
    ("specific_range_ground", "m/{store}", "specific range over the ground"),
    ("endurance", "s", "endurance on the store on board"),
    ("range_air", "m", "range through the air"),
    ("range_ground", "m", "range over the ground"),
    ("stall_speed_ratio", "1", "TAS over stall speed"),
    ("cl", "1", "lift coefficient"),
    ("cd", "1", "drag coefficient"),
    ("lift_to_drag", "1", "lift-to-drag ratio"),
)
#: (name, units, long name) of the air along the altitude dim.
AIR_FIELDS = (
    ("temperature", "K", "air temperature"),
    ("pressure", "Pa", "static pressure"),
    ("density", "kg/m3", "air density"),
    ("speed_of_sound", "m/s", "speed of sound"),
)


def flag_attributes() -> dict:
    """CF attributes of a limit bit-set variable.

    Returns
    -------
    dict
        ``flag_masks`` (the :class:`~cruiseplan.limits.Limit` bits, uint32 [-]),
        ``flag_meanings`` (their short codes, space separated), ``long_name``, ``units``.
    """
    return {"long_name": "limit flags (0: ok)", "units": "1",
            "flag_masks": np.array([int(f) for f in LIMITS], dtype=LIMIT_DTYPE),
            "flag_meanings": " ".join(t.code for t in LIMITS.values())}


def statuses(codes) -> np.ndarray:
    """Status text per bit set, as the printed tables' status column.

    Parameters
    ----------
    codes : array_like of int
        :class:`~cruiseplan.limits.Limit` bit sets [-].

    Returns
    -------
    numpy.ndarray
        Object array of the same shape: ``"ok"`` or short codes joined by ``+``.
    """
    codes = np.asarray(codes)
    unique, inverse = np.unique(codes.ravel(), return_inverse=True)
    texts = np.array([explain(int(c), short=True) for c in unique], dtype=object)
    return texts[inverse].reshape(codes.shape)


def _var(dims, values, units, long_name, **attrs):
    attrs = {"units": units, "long_name": long_name, **attrs}
    return dims, values, attrs


def _units(template: str, store_name: str | None) -> str | None:
    if "{store}" not in template:
        return template
    unit = STORE_UNITS.get(store_name or "")
    return template.format(store=unit) if unit else None


def _dataset(data_vars: dict, coords: dict, attrs: dict):
    import xarray as xr

    # Drop a units attribute that is unknown (store unit not given) rather than guess one.
    for v in list(data_vars.values()) + list(coords.values()):
        if "units" in v[2] and v[2]["units"] is None:
            del v[2]["units"]
    return xr.Dataset(data_vars, coords=coords, attrs=attrs)


def points_to_xarray(points, dim: str = "altitude"):
    """A cruise grid (or a column of cruise points) as an xarray Dataset.

    Parameters
    ----------
    points : CruisePoints
        The grid: altitude along axis 0, TAS along axis 1 when it is 2-D.
    dim : str
        Name of the first dim (``"altitude"``).

    Returns
    -------
    xarray.Dataset
        Coordinates ``altitude`` (pressure altitude [m]) and, for a grid at shared TAS
        values, ``airspeed`` (TAS [m/s]); the fields of :class:`CruisePoints` in SI with
        ``units`` and ``long_name``; ``limits`` as a CF flag variable. NaN stays where the
        grid has no figure (the flag says why).
    """
    shape = points.shape
    alt = np.asarray(points.air.pressure_altitude, dtype=float).reshape(-1)
    tas = np.asarray(points.tas, dtype=float)
    store = points.store_name
    coords = {dim: _var((dim,), alt, "m", "pressure altitude", standard_name="altitude")}
    if len(shape) == 2 and (tas.ndim < 2 or tas.shape[0] == 1):
        dims = (dim, "airspeed")
        coords["airspeed"] = _var(("airspeed",), np.broadcast_to(tas, shape)[0].copy(),
                                  "m/s", "true airspeed")
    elif len(shape) == 2:
        dims = (dim, "setting")
    else:
        dims = (dim,)
    data = {}
    if "airspeed" not in coords:
        data["tas"] = _var(dims, np.broadcast_to(tas, shape), "m/s", "true airspeed")
    for name, unit, long_name in GRID_FIELDS:
        value = getattr(points, name)
        if value is None:
            continue
        data[name] = _var(dims, np.broadcast_to(value, shape), _units(unit, store), long_name)
    data["power_fraction"] = _var(dims, np.broadcast_to(points.power_fraction, shape), "1",
                                  "shaft power required over rated power")
    limits = np.broadcast_to(np.asarray(points.limits, dtype=LIMIT_DTYPE), shape)
    data["limits"] = (dims, limits, flag_attributes())
    for name, unit, long_name in AIR_FIELDS:
        value = np.broadcast_to(getattr(points.air, name), alt.shape + (1,) * (len(shape) - 1))
        data[name] = _var((dim,), np.asarray(value, dtype=float).reshape(alt.shape),
                          unit, long_name)
    attrs = {"mass": float(points.mass), "mass_units": "kg", "store": float(points.store),
             "store_name": store, "store_units": STORE_UNITS.get(store, ""),
             "rated_power": float(points.rated_power), "rated_power_units": "W"}
    return _dataset(data, coords, attrs)


def _frame(ds, status):
    """A flat DataFrame of a Dataset: one row per point, dims as columns, units in attrs."""
    df = ds.to_dataframe().reset_index()
    df["status"] = np.asarray(status, dtype=object).ravel()
    df.attrs["units"] = {n: ds[n].attrs.get("units", "") for n in list(ds.variables)}
    return df


def points_to_dataframe(points):
    """A cruise grid as a pandas DataFrame: one row per point, the status as a column.

    Parameters
    ----------
    points : CruisePoints
        The grid.

    Returns
    -------
    pandas.DataFrame
        Columns ``altitude`` [m], ``airspeed`` [m/s] (or ``tas``), the grid's fields (SI),
        ``limits`` (the bit set) and ``status`` (as the text table's status column);
        ``df.attrs["units"]`` maps each column to its unit.
    """
    ds = points_to_xarray(points)
    return _frame(ds, statuses(ds["limits"].values))


def best_to_xarray(best):
    """A best-cruise answer as an xarray Dataset with dim ``altitude``.

    Parameters
    ----------
    best : BestCruise
        The answer.

    Returns
    -------
    xarray.Dataset
        The cruise points at the objective's speed per altitude, ``value`` (the objective:
        ground range [m] or endurance [s]), ``out_of_band`` and ``binding`` (CF flag
        variables), ``best`` (True at the chosen altitude); attributes ``objective`` and
        ``best_altitude`` [m] (NaN when nothing is flyable).
    """
    ds = points_to_xarray(best.points)
    unit = "s" if best.objective == "endurance" else "m"
    ds["value"] = _var(("altitude",), np.asarray(best.value, dtype=float), unit,
                       f"objective ({best.objective})")
    flags = flag_attributes()
    for name, code in (("out_of_band", best.out_of_band),
                       ("infeasible", best.schedule.infeasible),
                       ("binding", best.schedule.binding[best.objective])):
        ds[name] = (("altitude",), np.asarray(code, dtype=LIMIT_DTYPE),
                    {**flags, "long_name": f"{name.replace('_', ' ')} limit flags"})
    chosen = np.zeros(ds.sizes["altitude"], dtype=bool)
    if best.best_index >= 0:
        chosen[best.best_index] = True
    ds["best"] = _var(("altitude",), chosen, "1", "the chosen altitude")
    ds.attrs.update(objective=best.objective, best_index=int(best.best_index),
                    best_altitude=float(best.altitudes[best.best_index])
                    if best.best_index >= 0 else float("nan"),
                    binding=int(best.binding))
    return ds


def best_to_dataframe(best):
    """A best-cruise answer as a DataFrame: one row per altitude, ``status`` its reason.

    Parameters
    ----------
    best : BestCruise
        The answer.

    Returns
    -------
    pandas.DataFrame
        The columns of :func:`best_to_xarray`; ``status`` is :meth:`BestCruise.reason`.
    """
    ds = best_to_xarray(best)
    return _frame(ds, [best.reason(i) for i in range(ds.sizes["altitude"])])


#: (field, units, long name) of a plan's segments; None: the store's unit.
SEGMENT_FIELDS = (
    ("leg", None, "leg name"),
    ("kind", None, "segment kind"),
    ("altitude_start", "m", "pressure altitude at the start"),
    ("altitude_end", "m", "pressure altitude at the end"),
    ("tas", "m/s", "true airspeed"),
    ("ground_speed", "m/s", "ground speed"),
    ("heading", "degree", "true heading"),
    ("time", "s", "segment time"),
    ("distance", "m", "ground distance"),
    ("used", "{store}", "store used"),
    ("remaining", "{store}", "store remaining at the end"),
    ("mass_end", "kg", "mass at the end"),
    ("power_fraction", "1", "shaft power over rated power"),
    ("note", None, "note"),
    ("flown", "1", "flown (False from where a NO-GO plan fails)"),
    ("pack_voltage", "V", "lowest pack voltage under load"),
    ("pack_current", "A", "highest pack current"),
)


def plan_store_name(plan) -> str:
    """``"fuel"`` or ``"energy"``: what the plan's airframe carries."""
    return "fuel" if plan.mission.airframe.propulsion.store.burns_mass else "energy"


def plan_to_xarray(plan):
    """A plan as an xarray Dataset with dim ``segment``.

    Parameters
    ----------
    plan : Plan
        The plan.

    Returns
    -------
    xarray.Dataset
        One entry per segment (SI, heading in degrees); attributes ``verdict``,
        ``reasons`` (joined by ``"; "``), ``initial`` and ``reserve_required`` (store
        units in ``store_units``) and ``takeoff_mass`` [kg].
    """
    store = plan_store_name(plan)
    segs = plan.segments
    data = {}
    for name, unit, long_name in SEGMENT_FIELDS:
        values = [getattr(s, name) for s in segs]
        if unit is None:
            arr = np.array(values, dtype=str) if values else np.array([], dtype=str)
            data[name] = (("segment",), arr, {"long_name": long_name})
        else:
            dtype = bool if name == "flown" else float
            data[name] = _var(("segment",), np.array(values, dtype=dtype),
                              _units(unit, store), long_name)
    coords = {"segment": (("segment",), np.arange(len(segs)), {"long_name": "segment index",
                                                                "units": "1"})}
    attrs = {"verdict": plan.verdict, "reasons": "; ".join(plan.reasons),
             "initial": float(plan.initial), "reserve_required": float(plan.reserve_required),
             "store_name": store, "store_units": STORE_UNITS[store],
             "takeoff_mass": float(plan.takeoff_mass), "takeoff_mass_units": "kg"}
    return _dataset(data, coords, attrs)


def plan_to_dataframe(plan):
    """A plan as a pandas DataFrame: one row per segment (see :func:`plan_to_xarray`)."""
    ds = plan_to_xarray(plan)
    df = ds.to_dataframe().reset_index()
    df.attrs["units"] = {n: ds[n].attrs.get("units", "") for n in list(ds.variables)}
    return df


#: (field, units, long name) of Monte Carlo results; "{store}": the store's unit.
SAMPLE_FIELDS = {
    "remaining": ("{store}", "store at landing"),
    "used": ("{store}", "store used"),
    "time": ("s", "flight time"),
    "reserve_required": ("{store}", "reserve required at landing"),
    "range_ground": ("m", "range over the ground"),
    "endurance": ("s", "endurance"),
}


def samples_to_xarray(result, store_name: str | None = None):
    """Monte Carlo samples as an xarray Dataset with dim ``sample``.

    Parameters
    ----------
    result : PlanUncertainty or CruiseUncertainty
        The samples.
    store_name : str, optional
        ``"fuel"`` (kg) or ``"energy"`` (J), for the units of store amounts; without it
        those variables carry no ``units`` attribute.

    Returns
    -------
    xarray.Dataset
        One variable per sampled field (SI); attribute ``seed``.
    """
    data = {}
    for name, (unit, long_name) in SAMPLE_FIELDS.items():
        if hasattr(result, name):
            data[name] = _var(("sample",), np.asarray(getattr(result, name), dtype=float),
                              _units(unit, store_name), long_name)
    n = len(next(iter(data.values()))[1])
    coords = {"sample": (("sample",), np.arange(n), {"long_name": "sample index",
                                                      "units": "1"})}
    attrs = {"seed": int(result.seed)}
    if store_name:
        attrs.update(store_name=store_name, store_units=STORE_UNITS[store_name])
    return _dataset(data, coords, attrs)


def samples_to_dataframe(result, store_name: str | None = None):
    """Monte Carlo samples as a pandas DataFrame: one row per sample."""
    ds = samples_to_xarray(result, store_name)
    df = ds.to_dataframe().reset_index()
    df.attrs["units"] = {n: ds[n].attrs.get("units", "") for n in list(ds.variables)}
    return df
