"""Sweeps: every point of a study planned, in chunks, on dask, into a zarr store.

Each point is planned exactly as one ``cruiseplan plan`` (mission studies) or ``best``
(airframe studies) with the point's values: the mission file read (again, with the
airframe fields replaced when the study sweeps them), :func:`apply_overrides` with the
point's ISA deviation or OAT, payload, fuel and wind, then :func:`plan_mission`. So a point
equals the single plan bit for bit, wherever it runs. The points of a chunk that differ only
in ISA deviation, payload, fuel and wind are planned together (:func:`plan_missions`), which
gives each the plan it would get alone.

Points are grouped in chunks (:meth:`Study.block_shape`), the unit of work. Chunks run as
dask tasks: on the local machine's processes by default, or on a dask.distributed cluster
(a ``Client`` or a scheduler address). A chunk run with a store writes its values into the
store and then marks itself done, so a crash or Ctrl-C loses only unfinished chunks and a
resumed run computes just those.

The store is a zarr group laid out as an xarray Dataset: one dimension per axis (plus
``leg`` for per-leg records), CF-style ``units`` and ``long_name`` attributes, ``verdict``
a flag variable, and ``chunk_done`` (one flag per chunk) with the ``complete`` attribute
saying whether every chunk is in.
"""

from __future__ import annotations

import contextlib
import functools
import itertools
import os
import signal
import warnings
from pathlib import Path

import numpy as np

from cruiseplan._allocator import hold_freed_heap
from cruiseplan.amounts import parse_amount
from cruiseplan.errors import CruiseplanError, CruiseplanWarning
from cruiseplan.io.airframe_file import read_airframe
from cruiseplan.io.forecast_file import read_forecast
from cruiseplan.io.mission_file import apply_overrides, read_mission
from cruiseplan.model.study import (
    AIRFRAME_FIELD,
    AIRFRAME_RECORDS,
    BAD_INPUT,
    GO,
    MISSION_RECORDS,
    NO_GO,
    NOT_RUN,
    VERDICT_MEANINGS,
    Study,
)
from cruiseplan.physics.winds import WindProfile
from cruiseplan.planning.forecast import plan_with_forecast
from cruiseplan.planning.mission import plan_mission, plan_missions
from cruiseplan.planning.optimise import best_cruise
from cruiseplan.planning.uncertainty import plan_uncertainty

#: Version of the store layout, written in its attributes.
STORE_VERSION = 1

_LONG_NAMES = {
    "verdict": "plan verdict", "used": "fuel or energy used to landing",
    "remaining": "fuel or energy on board at landing",
    "reserve_required": "reserve required", "reserve_margin": "on board at landing less "
    "the reserve required (negative: short)", "time": "time from take-off to landing",
    "leg_altitude": "cruise pressure altitude of the leg", "leg_tas": "cruise TAS at the "
    "start of the leg", "reserve_probability": "share of Monte Carlo samples landing with "
    "the reserve", "best_altitude": "best pressure altitude", "best_tas": "best TAS at the "
    "best altitude", "best_value": "objective at the best altitude (range [m] or endurance "
    "[s])", "range": "ground range at the best altitude", "endurance": "endurance at the "
    "best altitude",
    "isa_dev": "ISA temperature deviation", "oat": "outside air temperature at the departure "
    "field", "payload": "crew and payload mass", "fuel": "fuel or battery on board",
    "wind_speed": "wind speed on every leg", "wind_direction": "wind direction (from, true) "
    "on every leg", "headwind": "headwind component",
}


# --- one point -------------------------------------------------------------------------

def _airframe_overrides(study: Study, values: dict) -> tuple:
    """The point's airframe-field overrides as (dotted field, value as the file holds it)."""
    out = []
    for axis in study.axes:
        if axis.name.startswith(AIRFRAME_FIELD) and axis.name in values:
            v = values[axis.name]
            out.append((axis.name[len(AIRFRAME_FIELD):],
                        v if axis.unit == "1" else f"{v!r} {axis.unit}"))
    return tuple(out)


@functools.lru_cache(maxsize=32)
def _base(kind: str, path: str, overrides: tuple):
    """The study's base airframe and mission (None for an airframe study), read once."""
    if kind == "airframe":
        return read_airframe(path, dict(overrides) if overrides else None), None
    if overrides:
        head = read_mission(path)
        af_path = head.airframe.source
        af = read_airframe(af_path, dict(overrides))
        mission = read_mission(path, airframe=af)
    else:
        mission = read_mission(path)
    return mission.airframe, mission


@functools.lru_cache(maxsize=4)
def _weather(path: str):
    """A study's forecast, read once per process."""
    return read_forecast(path)


def plan_point(study: Study, values: dict):
    """The plan of one point of a mission study, as ``cruiseplan plan`` would make it.

    Parameters
    ----------
    study : Study
        A mission study.
    values : dict
        Axis name to value [the axis's unit].

    Returns
    -------
    Plan
        ``plan_mission`` of :func:`point_mission`, or with a forecast
        ``plan_with_forecast`` at the point's departure (the mission file's when the study
        has no departure axis).
    """
    mission = point_mission(study, values)
    if study.forecast is None:
        return plan_mission(mission)
    departure = values.get("departure")
    return plan_with_forecast(mission, _weather(study.forecast),
                              None if departure is None else float(departure))


def base_airframe(study: Study):
    """The study's airframe as its base file gives it (no axis applied).

    Parameters
    ----------
    study : Study
        The study.

    Returns
    -------
    Airframe
        The airframe file's (airframe study) or the mission's airframe.
    """
    return _base(study.kind, study.base, ())[0]


def _fuel_text(study: Study, value):
    axis = next(a for a in study.axes if a.name == "fuel")
    return f"{value!r} %" if axis.unit == "%" else value


def point_mission(study: Study, values: dict):
    """The mission of one point of a mission study, as ``cruiseplan plan`` would fly it.

    Parameters
    ----------
    study : Study
        A mission study.
    values : dict
        Axis name to value [the axis's unit] (:meth:`Study.point`).

    Returns
    -------
    Mission
        The base mission with the point's airframe fields and what-if overrides.
    """
    _, mission = _base("mission", study.base, _airframe_overrides(study, values))
    kw = {}
    if "isa_dev" in values:
        kw["isa_dev"] = float(values["isa_dev"])
    if "oat" in values:
        kw["oat"] = float(values["oat"])
    if "payload" in values:
        kw["payload"] = float(values["payload"])
    if "fuel" in values:
        kw["fuel"] = _fuel_text(study, values["fuel"])
    if "wind_speed" in values:
        kw["wind"] = WindProfile(altitudes=(0.0,), directions=(float(values["wind_direction"]),),
                                 speeds=(float(values["wind_speed"]),))
    return apply_overrides(mission, **kw) if kw else mission


def evaluate_point(study: Study, values: dict) -> dict:
    """Plan (or search the best cruise of) one point and return its records.

    Parameters
    ----------
    study : Study
        The study.
    values : dict
        Axis name to value [the axis's unit].

    Returns
    -------
    dict
        Record name to value (SI; per-leg records as 1-D arrays). A point whose
        combination of values is bad input (e.g. more fuel than the tanks hold) has verdict
        ``BAD_INPUT`` and NaN elsewhere.
    """
    try:
        with warnings.catch_warnings():
            # The plan states what a warning would (e.g. over the maximum take-off mass).
            warnings.simplefilter("ignore", CruiseplanWarning)
            if study.kind == "mission":
                return _plan_records(study, plan_point(study, values))
            return _best_records(study, values)
    except CruiseplanError:
        return {"verdict": BAD_INPUT}


def evaluate_points(study: Study, points: list) -> list:
    """Records of many points; a mission study's points planned together.

    The points' missions (:func:`point_mission`) that differ only in ISA deviation,
    loading and wind are planned in one pass by :func:`~cruiseplan.planning.mission.plan_missions`,
    whose every plan is the one :func:`plan_mission` makes of that mission alone; the
    records are then those of :func:`evaluate_point`, point by point.

    Parameters
    ----------
    study : Study
        The study.
    points : list of dict
        Each point's axis values, by axis name [the axis's unit].

    Returns
    -------
    list of dict
        Each point's records (see :func:`evaluate_point`).
    """
    if study.kind != "mission" or study.forecast is not None:
        return [evaluate_point(study, values) for values in points]
    with warnings.catch_warnings():
        # The plan states what a warning would (e.g. over the maximum take-off mass).
        warnings.simplefilter("ignore", CruiseplanWarning)
        missions = []
        for values in points:
            try:
                missions.append(point_mission(study, values))
            except CruiseplanError:
                missions.append(None)
        try:
            plans = iter(plan_missions([m for m in missions if m is not None]))
        except CruiseplanError:
            # Bad input found only in planning: each point on its own says which.
            return [evaluate_point(study, values) for values in points]
        out = []
        for values, mission in zip(points, missions):
            if mission is None:
                out.append({"verdict": BAD_INPUT})
                continue
            try:
                out.append(_plan_records(study, next(plans)))
            except CruiseplanError:
                out.append({"verdict": BAD_INPUT})
        return out


def _plan_records(study: Study, plan) -> dict:
    rec = {"verdict": GO if plan.go else NO_GO, "used": plan.used,
           "remaining": plan.remaining, "reserve_required": plan.reserve_required,
           "reserve_margin": plan.remaining - plan.reserve_required, "time": plan.time,
           "leg_altitude": np.array(plan.leg_altitudes, dtype=float),
           "leg_tas": np.array(plan.leg_speeds, dtype=float)}
    if "reserve_probability" in study.records:
        rec["reserve_probability"] = plan_uncertainty(
            plan, n=study.monte_carlo, seed=study.seed).reserve_probability
    return rec


def _best_records(study: Study, values: dict) -> dict:
    af, _ = _base("airframe", study.base, _airframe_overrides(study, values))
    fuel = values.get("fuel")
    if fuel is not None:
        fuel = parse_amount(_fuel_text(study, fuel), af.propulsion, what="[axes] fuel")
    best = best_cruise(af, np.asarray(study.altitudes), objective=study.objective,
                       fuel=fuel, payload=values.get("payload"),
                       isa_dev=values.get("isa_dev", 0.0), headwind=values.get("headwind"))
    b = best.best()
    if not b["feasible"]:
        return {"verdict": NO_GO}
    return {"verdict": GO, "best_altitude": b["altitude"], "best_tas": b["tas"],
            "best_value": b["value"], "range": b["range_ground"], "endurance": b["endurance"]}


def check_axes(study: Study):
    """Check each axis value on its own against the base, before anything is run.

    Each airframe-field value is read into the airframe file; without airframe axes, each
    other value is applied to the base mission (or airframe) alone. A value bad only in
    combination (95 L of fuel with a 90 L tank on another axis) is found at its point and
    marked not planned there.

    Parameters
    ----------
    study : Study
        The study.

    Raises
    ------
    CruiseplanError
        ``STUDY: [axes] NAME: VALUE: what is wrong``.
    """
    af, mission = _base(study.kind, study.base, ())
    if mission is not None and getattr(mission, "survey", None) is not None:
        raise CruiseplanError(f"{study.source}: [study] mission: {study.base} is a survey, "
                              "planned in packs; a study plans route missions")
    if study.forecast is not None:
        _weather(study.forecast)  # a bad forecast file is one error, before anything runs
    field_axes = [a for a in study.axes if a.name.startswith(AIRFRAME_FIELD)]
    for axis in study.axes:
        for value in axis.values:
            try:
                with warnings.catch_warnings():
                    warnings.simplefilter("ignore", CruiseplanWarning)
                    if axis.name == "departure":
                        # Planning is slow next to reading: the first and last times
                        # stand for the span (a time outside the forecast fails there).
                        if value in (axis.values[0], axis.values[-1]) and not field_axes:
                            values = {a.name: a.values[0] for a in study.axes}
                            values["departure"] = value
                            plan_point(study, values)
                    elif axis in field_axes:
                        _base(study.kind, study.base, _airframe_overrides(
                            study, {axis.name: value}))
                    elif field_axes:
                        continue
                    elif study.kind == "mission":
                        values = {a.name: a.values[0] for a in study.axes}
                        values[axis.name] = value
                        point_mission(study, values)
                    elif axis.name == "fuel":
                        parse_amount(_fuel_text(study, value), af.propulsion,
                                     what="[axes] fuel")
            except CruiseplanError as exc:
                raise CruiseplanError(f"{study.source}: [axes] {axis.name}: {value!r}: "
                                      f"{exc}") from None


# --- layout ---------------------------------------------------------------------------

def _legs(study: Study) -> int:
    """Legs of a mission study's base mission (0 for an airframe study)."""
    if study.kind != "mission":
        return 0
    return len(_base("mission", study.base, ())[1].legs)


def _record_table(study: Study) -> dict:
    return MISSION_RECORDS if study.kind == "mission" else AIRFRAME_RECORDS


def _store_unit(study: Study) -> str:
    af, _ = _base(study.kind, study.base, ())
    return "kg" if af.propulsion.store.burns_mass else "J"


def record_layout(study: Study) -> dict:
    """Each record's dtype, extra dimensions and attributes.

    Parameters
    ----------
    study : Study
        The study.

    Returns
    -------
    dict
        Record name to ``(dtype, extra_shape, attrs)``.
    """
    table, legs, store_unit = _record_table(study), _legs(study), _store_unit(study)
    out = {}
    for name in study.records:
        if name == "verdict":
            continue
        unit, per_leg = table[name]
        if name == "best_value":
            unit = "s" if study.objective == "endurance" else "m"
        attrs = {"units": unit or store_unit, "long_name": _LONG_NAMES[name]}
        out[name] = (np.float64, (legs,) if per_leg else (), attrs)
    # The verdict is always kept: it tells which points ran, and how.
    codes = sorted(VERDICT_MEANINGS)
    out["verdict"] = (np.int8, (), {
        "units": "1", "long_name": _LONG_NAMES["verdict"], "flag_values": codes,
        "flag_meanings": " ".join(VERDICT_MEANINGS[c] for c in codes)})
    return out


def run_block(study: Study, index: tuple, store: str | None = None):
    """Evaluate one chunk; write it into ``store`` and mark it done, or return it.

    The process that runs it keeps up to 64 MiB of freed heap from then on
    (:func:`cruiseplan._allocator.hold_freed_heap`, glibc only).

    Parameters
    ----------
    study : Study
        The study.
    index : tuple of int
        The chunk's position along each axis [-].
    store : str, optional
        Path of the zarr store made by :func:`run_study`.

    Returns
    -------
    tuple
        ``(index, arrays)``: arrays by record name (None when written to ``store``).
    """
    # A chunk's arrays are made and freed thousands of times: keep the freed heap so that
    # they reuse pages instead of faulting new ones in (see cruiseplan._allocator).
    hold_freed_heap()
    layout = record_layout(study)
    slices = study.block_slices(index)
    shape = tuple(s.stop - s.start for s in slices)
    arrays = {name: np.full(shape + extra, NOT_RUN if name == "verdict" else np.nan,
                            dtype=dtype) for name, (dtype, extra, _) in layout.items()}
    local = list(np.ndindex(*shape))
    points = [study.point(tuple(s.start + i for s, i in zip(slices, ix))) for ix in local]
    for ix, rec in zip(local, evaluate_points(study, points)):
        for name, value in rec.items():
            if name in arrays:
                arrays[name][ix] = value
    if store is None:
        return index, arrays
    import zarr

    with _ctrl_c_held():
        group = zarr.open_group(store, mode="r+")
        for name, arr in arrays.items():
            group[name][slices] = arr
        # Marked done only once every value is in: a chunk cut short is simply run again.
        group["chunk_done"][index] = True
    return index, None


@contextlib.contextmanager
def _ctrl_c_held():
    """Hold Ctrl-C (SIGINT) until the block is done, then raise KeyboardInterrupt.

    For the store's reads and writes in this process's main thread: zarr does its IO on
    threads of its own, and an interrupt landing while the main thread holds one of
    their locks left the process hung at exit (seen: one Ctrl-C in about 12). Elsewhere
    (a worker's thread, where signals are not ours to set) the block runs as it is.
    """
    caught = []
    with _sigint(lambda signum, frame: caught.append(signum)):
        yield
    if caught:
        raise KeyboardInterrupt


@contextlib.contextmanager
def _sigint(handler):
    """SIGINT handled by ``handler`` within the block, then as before.

    Only the main thread may set a handler: elsewhere the block runs as it is.
    """
    try:
        previous = signal.signal(signal.SIGINT, handler)
    except ValueError:  # not the main thread: signals are not ours to set
        yield
        return
    try:
        yield
    finally:
        signal.signal(signal.SIGINT, previous)


# --- the store ------------------------------------------------------------------------

def _coords(study: Study) -> dict:
    coords = {}
    for axis in study.axes:
        field = axis.name.removeprefix(AIRFRAME_FIELD)
        attrs = {"units": axis.unit if axis.unit != "amount" else "",
                 "long_name": _LONG_NAMES.get(axis.name, f"airframe field {field}")}
        values = np.asarray(axis.values)
        if axis.name == "departure":
            values = (values * 1e9).astype("datetime64[ns]")
            attrs = {"long_name": "departure time (UTC)"}
        coords[axis.dim] = (axis.dim, values, attrs)
    if study.kind == "mission":
        legs = _base("mission", study.base, ())[1].legs
        coords["leg"] = ("leg", np.arange(1, len(legs) + 1),
                         {"long_name": "leg number (see leg_names)"})
    return coords


def template(study: Study, in_memory: bool = False):
    """The study's Dataset with every value not yet run.

    Parameters
    ----------
    study : Study
        The study.
    in_memory : bool
        Hold numpy arrays to fill in place; by default dask arrays (nothing allocated),
        chunked as the study's chunks, which become the store's chunks.

    Returns
    -------
    xarray.Dataset
        Dims: one per axis (plus ``leg``); records NaN and ``verdict`` not run;
        ``chunk_done`` over the chunk grid, all False.
    """
    import xarray as xr

    if in_memory:
        def full(shape, fill, dtype, chunks):
            return np.full(shape, fill, dtype=dtype)
    else:
        import dask.array as da

        def full(shape, fill, dtype, chunks):
            return da.full(shape, fill, dtype=dtype, chunks=chunks)

    dims = tuple(a.dim for a in study.axes)
    block = study.block_shape()
    data = {}
    for name, (dtype, extra, attrs) in record_layout(study).items():
        fill = NOT_RUN if name == "verdict" else np.nan
        arr = full(study.shape + extra, fill, dtype, block + extra)
        data[name] = (dims + (("leg",) if extra else ()), arr, attrs)
    chunk_dims = tuple(f"chunk_{d}" for d in dims)
    data["chunk_done"] = (chunk_dims, full(study.blocks(), False, bool, 1),
                          {"long_name": "chunk written completely", "units": "1",
                           "chunk_shape": list(block)})
    ds = xr.Dataset(data, coords=_coords(study))
    legs = _base("mission", study.base, ())[1].legs if study.kind == "mission" else ()
    ds.attrs = {
        "title": f"cruiseplan study {study.name}", "study": study.name,
        "description": study.description, "study_file": study.source,
        "study_sha256": study.checksum, "kind": study.kind, "base": study.base,
        "records": list(study.records), "leg_names": [leg.name for leg in legs],
        "store_version": STORE_VERSION, "complete": False,
        "Conventions": "CF-1.10",
        "caution": "Planning aid only: the approved flight manual, licensed flight planning "
                   "and local rules come first. Each point is a model's plan; verify "
                   "against the flight manual and add margins.",
    }
    return ds


def _open_existing(study: Study, store: Path):
    import zarr

    try:
        group = zarr.open_group(str(store), mode="r+")
        attrs = dict(group.attrs)
        done = np.asarray(group["chunk_done"][...])
    except Exception as exc:  # zarr's own errors differ by version and backend
        raise CruiseplanError(f"{store}: not a study store that --resume can complete "
                              f"({type(exc).__name__})") from None
    if attrs.get("study_sha256") != study.checksum or done.shape != study.blocks():
        raise CruiseplanError(f"{store}: made from another study (or another version of "
                              f"{study.source}); --resume completes only its own study's "
                              "store")
    return group, done


def create_store(study: Study, store: Path):
    """Make a new store for ``study``: every point not run, every chunk not done.

    Parameters
    ----------
    study : Study
        The study.
    store : pathlib.Path
        The zarr store to make; it must not exist.

    Returns
    -------
    zarr.Group
        The store, open for writing.
    numpy.ndarray
        Chunks done (all False), over the chunk grid.

    Raises
    ------
    CruiseplanError
        If ``store`` exists or its folder does not.
    """
    if store.exists():
        raise CruiseplanError(f"{store} exists: --resume completes it, or choose another "
                              "path (nothing is overwritten)")
    if not store.parent.is_dir():
        raise CruiseplanError(f"cannot write {store}: folder {store.parent} does not exist")
    # Every value is written as not run (NaN, verdict -1), so a store read before it is
    # complete shows exactly which points are missing.
    template(study).to_zarr(str(store), mode="w-", consolidated=False, zarr_format=2)
    import zarr

    group = zarr.open_group(str(store), mode="r+")
    return group, np.zeros(study.blocks(), dtype=bool)


# --- running --------------------------------------------------------------------------

def run_study(study: Study, store=None, *, resume: bool = False, client=None,
              scheduler: str | None = None, workers: int | None = None, progress=None):
    """Run every point of a study, chunk by chunk, on dask.

    Parameters
    ----------
    study : Study
        The study (:func:`cruiseplan.io.study_file.read_study`).
    store : str or pathlib.Path, optional
        A zarr store to write, chunk by chunk (``OUT.zarr``); None keeps the results in
        memory only.
    resume : bool
        Complete an existing ``store`` of the same study: only chunks not marked done run.
    client : distributed.Client, optional
        Run on this dask.distributed cluster.
    scheduler : str, optional
        Address of a dask.distributed scheduler (``"tcp://host:8786"``) to connect to.
    workers : int, optional
        Local worker processes (default: all cores; 1 runs in this process).
    progress : callable, optional
        Called as ``progress(done, total)`` [chunks] after each chunk.

    Returns
    -------
    xarray.Dataset
        One dimension per axis (and ``leg``): the records, ``verdict`` and
        ``chunk_done``. Read lazily from ``store`` when one is given.

    Raises
    ------
    CruiseplanError
        An axis value that is bad input on its own (:func:`check_axes`), a store that
        exists (without ``resume``), or one that is not this study's.
    """
    import xarray as xr

    path = None if store is None else Path(store)
    check_axes(study)
    if resume and path is None:
        raise CruiseplanError("--resume needs the store to complete (-o OUT.zarr)")
    with _ctrl_c_held():
        if path is not None and resume:
            group, done = _open_existing(study, path)
        elif path is not None:
            group, done = create_store(study, path)
        else:
            group, done = None, np.zeros(study.blocks(), dtype=bool)
    todo = [ix for ix in study.all_blocks() if not done[ix]]
    results = _execute(study, todo, None if path is None else str(path), client, scheduler,
                       workers, progress, len(todo))
    if path is not None:
        with _ctrl_c_held():
            group.attrs["complete"] = True
            return xr.open_zarr(str(path), consolidated=False)
    ds = template(study, in_memory=True)
    for index, arrays in results:
        slices = study.block_slices(index)
        for name, arr in arrays.items():
            ds[name].values[slices] = arr
        ds["chunk_done"].values[index] = True
    ds.attrs["complete"] = True
    return ds


def _execute(study, todo, store, client, scheduler, workers, progress, total):
    """Run chunks ``todo``; return [(index, arrays or None)] as they finish."""
    if not todo:
        return []
    if client is not None:
        return _on_cluster(client, study, todo, store, progress, total)
    from distributed import Client

    if scheduler is not None:
        try:
            client = Client(scheduler, timeout="10s")
        except (OSError, TimeoutError) as exc:
            raise CruiseplanError(f"--scheduler {scheduler}: cannot connect ({exc})") from None
        with client:
            return _on_cluster(client, study, todo, store, progress, total)
    workers = (os.cpu_count() or 1) if workers is None else workers
    if workers <= 1 or len(todo) == 1:
        # One process: no cluster to start; the same run_block, in order.
        out = []
        for k, index in enumerate(todo, 1):
            out.append(run_block(study, index, store))
            if progress is not None:
                progress(k, total)
        return out
    with _workers_ignore_ctrl_c():
        cluster = local_cluster(min(workers, len(todo)))
    with cluster, Client(cluster) as client:
        return _on_cluster(client, study, todo, store, progress, total)


def local_cluster(workers: int):
    """The local dask cluster a sweep starts: ``workers`` single-threaded processes.

    Planning is Python-bound, so threads would share one core: one process per core, on
    loopback only. dask starts its worker processes with ``MALLOC_TRIM_THRESHOLD_`` set
    low (to hand freed memory back to the system at once), which makes glibc unmap and
    map again the many short-lived arrays of a plan: measured 1.5x slower per chunk. A
    chunk's memory is bounded, so the workers keep the allocator's own (adaptive)
    threshold.

    Parameters
    ----------
    workers : int
        Worker processes [-].

    Returns
    -------
    distributed.LocalCluster
    """
    import dask
    from distributed import LocalCluster

    environ = {k: v for k, v in dask.config.get("distributed.nanny.pre-spawn-environ",
                                                {}).items()
               if k != "MALLOC_TRIM_THRESHOLD_"}
    # dask's statistical profiler samples each worker's stack every 10 ms, and its
    # monitors poll the processes every 20-500 ms, for a dashboard a sweep does not show;
    # on 2 cores that polling took CPU from the workers (this process idle: 6 % of a core,
    # 1 % with the checks below).
    with dask.config.set({"distributed.nanny.pre-spawn-environ": environ,
                          "distributed.worker.profile.enabled": False,
                          "distributed.admin.tick.interval": "1s",
                          "distributed.admin.system-monitor.interval": "2s",
                          "distributed.worker.memory.monitor-interval": "1s"}):
        return LocalCluster(n_workers=workers, threads_per_worker=1, processes=True,
                            host="127.0.0.1", dashboard_address="127.0.0.1:0",
                            silence_logs=40)


def _workers_ignore_ctrl_c():
    """Start processes with SIGINT ignored, so that Ctrl-C stops only this one.

    Ctrl-C reaches the terminal's whole process group; the workers leave it to this
    process, which stops them cleanly (Python keeps an inherited SIG_IGN instead of
    raising KeyboardInterrupt).
    """
    return _sigint(signal.SIG_IGN)


#: Chunks in flight per worker: enough to keep each busy, few enough that the driver's
#: memory does not grow with the number of chunks in the study.
IN_FLIGHT_PER_WORKER = 2


def _on_cluster(client, study, todo, store, progress, total):
    """Run chunks on a dask.distributed cluster, a bounded number in flight at a time."""
    from distributed import as_completed

    n_workers = max(1, len(client.scheduler_info().get("workers", {})))
    window = IN_FLIGHT_PER_WORKER * n_workers
    pending = iter(todo)
    study_future = client.scatter(study, broadcast=True)
    futures = [client.submit(run_block, study_future, ix, store, pure=False)
               for ix in itertools.islice(pending, window)]
    queue = as_completed(futures)
    out = []
    try:
        for k, future in enumerate(queue, 1):
            out.append(future.result())
            future.release()
            if progress is not None:
                progress(k, total)
            nxt = next(pending, None)
            if nxt is not None:
                queue.add(client.submit(run_block, study_future, nxt, store, pure=False))
    except BaseException:
        client.cancel(list(queue.futures))
        raise
    return out
