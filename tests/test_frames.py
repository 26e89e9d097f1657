"""Labelled arrays: results as xarray Datasets and pandas DataFrames (the frames extra)."""

from __future__ import annotations

import numpy as np
import pytest

import cruiseplan as cp
from cruiseplan.limits import LIMITS, Limit, explain
from cruiseplan.planning.uncertainty import cruise_uncertainty, plan_uncertainty

xr = pytest.importorskip("xarray")
pd = pytest.importorskip("pandas")


def _engine():
    try:
        import h5netcdf  # noqa: F401
        return "h5netcdf"
    except ImportError:  # pragma: no cover - the frames extra brings h5netcdf
        return None


@pytest.fixture(scope="module")
def grid():
    af = cp.load_airframe("demo-trainer")
    # From below the stall speed to beyond full power.
    h = np.array([0.0, 1500.0, 3000.0])
    v = np.linspace(15.0, 95.0, 9)
    return cp.cruise_grid(af, h, v), h, v


def decode(value, masks, meanings) -> str:
    """The status text of a flag value, read from the CF attributes alone."""
    words = [w for m, w in zip(masks, meanings.split()) if int(value) & int(m)]
    return "+".join(words) if words else "ok"


def test_grid_dataset_has_dims_units_and_flags(grid):
    g, h, v = grid
    ds = g.to_xarray()
    assert ds["drag"].dims == ("altitude", "airspeed")
    assert ds.sizes == {"altitude": 3, "airspeed": 9}
    np.testing.assert_array_equal(ds["altitude"].values, h)
    np.testing.assert_array_equal(ds["airspeed"].values, v)
    assert ds["altitude"].attrs["units"] == "m"
    assert ds["airspeed"].attrs["units"] == "m/s"
    assert ds["drag"].attrs["units"] == "N"
    assert ds["store_rate"].attrs["units"] == "kg/s"
    assert ds["specific_range_air"].attrs["units"] == "m/kg"
    for name in ds.variables:
        assert "long_name" in ds[name].attrs, name
    np.testing.assert_array_equal(ds["range_ground"].values, g.range_ground)
    np.testing.assert_array_equal(ds["limits"].values, g.limits)
    masks = ds["limits"].attrs["flag_masks"]
    assert list(masks) == [int(f) for f in Limit]
    assert ds["limits"].attrs["flag_meanings"].split() == [t.code for t in LIMITS.values()]


def test_grid_netcdf_round_trip_equals_the_grid(grid, tmp_path):
    g, _, _ = grid
    ds = g.to_xarray()
    # The grid hides figures (NaN) somewhere, and shows them elsewhere: both survive.
    assert np.isnan(ds["range_ground"].values).any()
    assert np.isfinite(ds["range_ground"].values).any()
    path = tmp_path / "grid.nc"
    ds.to_netcdf(path, engine=_engine())
    with xr.open_dataset(path, engine=_engine()) as back:
        back.load()
    xr.testing.assert_identical(back, ds)
    for name in ("drag", "range_ground", "endurance", "limits"):
        np.testing.assert_array_equal(back[name].values, getattr(g, name))
        assert back[name].attrs["units"] == ds[name].attrs["units"]
    np.testing.assert_array_equal(np.isnan(back["endurance"].values), np.isnan(g.endurance))
    assert back["limits"].dtype == g.limits.dtype


def test_flag_meanings_decode_to_the_table_status(grid, tmp_path):
    g, _, _ = grid
    path = tmp_path / "grid.nc"
    g.to_xarray().to_netcdf(path, engine=_engine())
    with xr.open_dataset(path, engine=_engine()) as back:
        flags = back["limits"]
        masks, meanings = flags.attrs["flag_masks"], flags.attrs["flag_meanings"]
        decoded = [decode(c, masks, meanings) for c in flags.values.ravel()]
    table = [explain(c, short=True) for c in g.limits.ravel()]
    assert decoded == table
    assert len(set(table)) >= 3  # ok and at least two kinds of limit are exercised


def test_grid_dataframe_one_row_per_point_with_status(grid):
    g, h, v = grid
    df = g.to_dataframe()
    assert len(df) == g.limits.size
    assert {"altitude", "airspeed", "drag", "limits", "status"} <= set(df.columns)
    # Rows run altitude by altitude, as the text table.
    np.testing.assert_array_equal(df["altitude"], np.repeat(h, v.size))
    np.testing.assert_array_equal(df["airspeed"], np.tile(v, 3))
    assert list(df["status"]) == [explain(c, short=True) for c in g.limits.ravel()]
    np.testing.assert_array_equal(df["shaft_power"], g.shaft_power.ravel())
    assert df.attrs["units"]["shaft_power"] == "W"


def test_power_setting_table_has_tas_as_a_variable():
    af = cp.load_airframe("demo-trainer")
    t = cp.power_setting_table(af, [0.0, 1000.0], [0.55, 0.75])
    ds = t.to_xarray()
    assert ds["tas"].dims == ("altitude", "setting")
    assert ds["tas"].attrs["units"] == "m/s"


def test_best_cruise_converts_by_altitude():
    af = cp.load_airframe("demo-trainer")
    h = np.array([0.0, 1000.0, 2000.0, 3000.0])
    best = cp.best_cruise(af, h, ceiling=2500.0)
    ds = best.to_xarray()
    assert set(ds.dims) == {"altitude"}
    np.testing.assert_array_equal(ds["altitude"].values, h)
    np.testing.assert_array_equal(ds["value"].values, best.value)
    assert ds["value"].attrs["units"] == "m"
    assert int(ds["best"].values.argmax()) == best.best_index
    assert ds.attrs["best_altitude"] == best.altitudes[best.best_index]
    assert int(ds["out_of_band"].values[-1]) & Limit.CEILING
    df = best.to_dataframe()
    assert list(df["status"]) == [best.reason(i) for i in range(h.size)]


@pytest.fixture(scope="module")
def plan():
    return cp.plan_mission(cp.load_mission("demo-cross-country"))


def test_plan_converts_by_segment(plan):
    ds = plan.to_xarray()
    assert set(ds.dims) == {"segment"}
    assert ds.sizes["segment"] == len(plan.segments)
    assert list(ds["leg"].values) == [s.leg for s in plan.segments]
    np.testing.assert_array_equal(ds["remaining"].values,
                                  [s.remaining for s in plan.segments])
    assert ds["remaining"].attrs["units"] == "kg"
    assert ds["time"].attrs["units"] == "s"
    assert ds.attrs["verdict"] == plan.verdict
    df = plan.to_dataframe()
    assert len(df) == len(plan.segments)
    assert df["time"].sum() == pytest.approx(plan.time)


def test_plan_netcdf_round_trip(plan, tmp_path):
    ds = plan.to_xarray()
    path = tmp_path / "plan.nc"
    ds.to_netcdf(path, engine=_engine())
    with xr.open_dataset(path, engine=_engine()) as back:
        back.load()
    xr.testing.assert_identical(back, ds)


def test_monte_carlo_samples_convert_by_sample(plan):
    u = plan_uncertainty(plan, n=40, seed=3)
    ds = u.to_xarray("fuel")
    assert set(ds.dims) == {"sample"} and ds.sizes["sample"] == 40
    np.testing.assert_array_equal(ds["remaining"].values, u.remaining)
    assert ds["remaining"].attrs["units"] == "kg"
    assert "units" not in u.to_xarray()["remaining"].attrs  # no store named: no guess
    assert ds.attrs["seed"] == 3
    df = u.to_dataframe()
    assert len(df) == 40
    np.testing.assert_array_equal(df["time"], u.time)

    af = cp.load_airframe("demo-trainer")
    load = af.loading()
    air = cp.air_state(1000.0)
    c = cruise_uncertainty(af, load.mass, load.store, air, 50.0, 50.0, n=25, seed=1)
    cds = c.to_xarray()
    assert cds.sizes["sample"] == 25
    assert cds["range_ground"].attrs["units"] == "m"
    np.testing.assert_array_equal(cds["endurance"].values, c.endurance)


def test_the_core_does_not_load_pandas_or_xarray():
    import subprocess
    import sys

    code = ("import sys, cruiseplan as cp\n"
            "g = cp.cruise_grid(cp.load_airframe('demo-trainer'), [0.0, 1000.0], [40.0, 50.0])\n"
            "import cruiseplan.frames\n"
            "print(sorted(m for m in ('pandas', 'xarray', 'h5netcdf') if m in sys.modules))\n")
    out = subprocess.run([sys.executable, "-c", code], check=True, capture_output=True,
                         text=True).stdout
    assert out.strip() == "[]"
