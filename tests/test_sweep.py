"""Studies: every point of a sweep equals the single plan, stores resume, bad files exit 2."""

from __future__ import annotations

import os
import re
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("dask")
pytest.importorskip("zarr")
xr = pytest.importorskip("xarray")

from cruiseplan.cli import main  # noqa: E402
from cruiseplan.io.airframe_file import find_airframe, read_airframe  # noqa: E402
from cruiseplan.io.mission_file import apply_overrides, load_mission, read_mission  # noqa: E402
from cruiseplan.io.study_file import read_study  # noqa: E402
from cruiseplan.model.study import GO, NO_GO, NOT_RUN  # noqa: E402
from cruiseplan.physics.winds import WindProfile  # noqa: E402
from cruiseplan.planning.mission import plan_mission  # noqa: E402
from cruiseplan.planning.optimise import best_cruise  # noqa: E402
from cruiseplan.studies import run_study  # noqa: E402

# The 200 kg payload is over the maximum take-off mass: a NO-GO the plans state themselves.
pytestmark = pytest.mark.filterwarnings("ignore::cruiseplan.errors.CruiseplanWarning")

MISSION_STUDY = """
[study]
name = "small"
mission = "demo-cross-country"
chunk = 2

[axes]
isa_dev = ["0 K", "25 K"]
payload = ["120 kg", "200 kg"]
fuel = ["60 %", "100 %"]
wind_direction = [40]
wind_speed = ["0 kt", "25 kt"]
"""

RECORDS = ("verdict", "used", "remaining", "reserve_required", "reserve_margin", "time",
           "leg_altitude", "leg_tas")


def write(tmp_path, text, name="study.toml"):
    path = tmp_path / name
    path.write_text(text)
    return path


def single_plan(isa_dev, payload, fuel, wind_dir, wind_speed):
    """The plan `cruiseplan plan demo-cross-country --isa-dev ... --wind ...` makes."""
    wind = WindProfile(altitudes=(0.0,), directions=(wind_dir,), speeds=(wind_speed,))
    mission = apply_overrides(load_mission("demo-cross-country"), isa_dev=isa_dev,
                              payload=payload, fuel=f"{fuel!r} %", wind=wind)
    return plan_mission(mission)


def assert_points_equal_single_plans(ds):
    assert ds.attrs["complete"]
    for idx in np.ndindex(*ds["verdict"].shape):
        sel = dict(zip(ds["verdict"].dims, idx))
        point = {d: float(ds[d].values[i]) for d, i in sel.items()}
        plan = single_plan(point["isa_dev"], point["payload"], point["fuel"],
                           point["wind_direction"], point["wind_speed"])
        got = {name: ds[name].isel(sel).values for name in RECORDS}
        assert got["verdict"] == (GO if plan.go else NO_GO)
        # Bit for bit: == on floats, not approx.
        assert got["used"] == plan.used and got["remaining"] == plan.remaining
        assert got["reserve_required"] == plan.reserve_required
        assert got["reserve_margin"] == plan.remaining - plan.reserve_required
        assert got["time"] == plan.time
        assert list(got["leg_altitude"]) == list(plan.leg_altitudes)
        assert list(got["leg_tas"]) == list(plan.leg_speeds)


def test_sweep_points_equal_single_plans_on_local_processes(tmp_path):
    study = read_study(write(tmp_path, MISSION_STUDY))
    assert study.shape == (2, 2, 2, 1, 2) and study.block_shape() == (1, 1, 1, 1, 2)
    ds = run_study(study, tmp_path / "out.zarr", workers=2)
    verdicts = set(np.unique(ds["verdict"].values))
    assert verdicts == {GO, NO_GO}, "the sweep should hold both verdicts"
    assert_points_equal_single_plans(ds.load())
    # The store reads back as the same Dataset with units on every record.
    again = xr.open_zarr(tmp_path / "out.zarr", consolidated=False)
    for name in RECORDS:
        assert "units" in again[name].attrs and "long_name" in again[name].attrs
    assert again["verdict"].attrs["flag_meanings"].split() == [
        "not-run", "NO-GO", "GO", "not-planned:bad-input"]


def test_sweep_points_equal_single_plans_on_a_distributed_cluster(tmp_path):
    distributed = pytest.importorskip("distributed")
    study = read_study(write(tmp_path, MISSION_STUDY))
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  host="127.0.0.1", dashboard_address="127.0.0.1:0") as cluster, \
            distributed.Client(cluster) as client:
        assert len(client.scheduler_info()["workers"]) == 2
        ds = run_study(study, tmp_path / "out.zarr", client=client)
        assert_points_equal_single_plans(ds.load())
        # In memory, without a store, on the same cluster.
        mem = run_study(study, client=client)
        # The command line, given the cluster's scheduler address.
        assert main(["sweep", str(tmp_path / "study.toml"), "-o", str(tmp_path / "cli.zarr"),
                     "--scheduler", cluster.scheduler_address]) == 0
    assert_points_equal_single_plans(mem)
    assert_points_equal_single_plans(xr.open_zarr(tmp_path / "cli.zarr",
                                                  consolidated=False).load())


def test_in_memory_run_equals_the_store(tmp_path):
    study = read_study(write(tmp_path, MISSION_STUDY))
    mem = run_study(study, workers=1)
    stored = run_study(study, tmp_path / "out.zarr", workers=1).load()
    for name in RECORDS:
        np.testing.assert_array_equal(mem[name].values, stored[name].values)


def test_airframe_field_axis_equals_the_edited_airframe_file(tmp_path):
    study = read_study(write(tmp_path, """
[study]
mission = "demo-cross-country"
record = ["verdict", "used"]
[axes]
"airframe.polar.cd0" = [0.030, 0.042]
"airframe.propulsion.fuel_capacity" = ["90 L", "110 L"]
"""))
    ds = run_study(study, workers=1)
    text = find_airframe("demo-trainer").read_text()
    for i, cd0 in enumerate((0.030, 0.042)):
        for j, cap in enumerate(("90 L", "110 L")):
            edited = text.replace("cd0 = 0.036", f"cd0 = {cd0!r}").replace(
                'fuel_capacity = "100 L"', f'fuel_capacity = "{cap}"')
            assert edited != text
            af_file = write(tmp_path, edited, "af.toml")
            mission = read_mission(load_mission("demo-cross-country").source,
                                   airframe=read_airframe(af_file))
            assert ds["used"].values[i, j] == plan_mission(mission).used
    # The fuel "100 %" of the mission follows the capacity: more fuel, more used.
    assert ds["used"].values[0, 1] > ds["used"].values[0, 0]


def test_airframe_study_equals_best_cruise(tmp_path):
    study = read_study(write(tmp_path, """
[study]
airframe = "demo-trainer"
[axes]
isa_dev = ["0 K", "20 K"]
payload = ["100 kg", "160 kg"]
[best]
altitudes = "0:10000:2000 ft"
objective = "range"
"""))
    ds = run_study(study, workers=1)
    af = read_airframe(find_airframe("demo-trainer"))
    for i, dev in enumerate((0.0, 20.0)):
        for j, payload in enumerate((100.0, 160.0)):
            b = best_cruise(af, np.asarray(study.altitudes), isa_dev=dev,
                            payload=payload).best()
            assert ds["best_altitude"].values[i, j] == b["altitude"]
            assert ds["best_tas"].values[i, j] == b["tas"]
            assert ds["range"].values[i, j] == b["range_ground"]
            assert ds["best_value"].attrs["units"] == "m"


def test_a_point_that_is_bad_input_is_marked_not_planned(tmp_path):
    # 95 L fits the 110 L tank but not the 90 L one: bad input only in combination.
    study = read_study(write(tmp_path, """
[study]
mission = "demo-cross-country"
record = ["verdict", "used"]
[axes]
"airframe.propulsion.fuel_capacity" = ["90 L", "110 L"]
fuel = ["95 L"]
"""))
    ds = run_study(study, workers=1)
    assert ds["verdict"].values[0, 0] == 2 and np.isnan(ds["used"].values[0, 0])
    assert ds["verdict"].values[1, 0] in (GO, NO_GO) and ds["used"].values[1, 0] > 0


def test_a_value_bad_on_its_own_stops_the_study_before_anything_runs(tmp_path, capsys):
    study_file = write(tmp_path, """
[study]
mission = "demo-cross-country"
[axes]
fuel = ["50 L", "500 L"]
""")
    out = tmp_path / "out.zarr"
    assert main(["sweep", str(study_file), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert "[axes] fuel: '500 L'" in err and not out.exists()
    bad_field = write(tmp_path, """
[study]
mission = "demo-cross-country"
[axes]
"airframe.polar.cd0" = [0.03, -1.0]
""", "field.toml")
    assert main(["sweep", str(bad_field), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert "[axes] airframe.polar.cd0: -1.0" in err and "cd0" in err and not out.exists()


# --- the command line: interrupt, resume, bad input --------------------------------------

#: Points of SLOW_STUDY, one per chunk: enough that a sweep is still running when the test
#: has seen a few chunks done, however quick the planner and however loaded the machine.
SLOW_POINTS = 48

SLOW_STUDY = f"""
[study]
name = "slow"
mission = "demo-cross-country"
record = ["verdict", "used", "time", "leg_altitude"]
chunk = 1

[axes]
isa_dev = "0:{SLOW_POINTS - 1}:1 K"
"""


def _done(store: Path) -> int:
    import zarr

    try:
        return int(np.asarray(zarr.open_group(str(store), mode="r")["chunk_done"][...]).sum())
    except Exception:  # the store is still being made
        return 0


def test_interrupted_sweep_resumes_to_the_same_store(tmp_path):
    study_file = write(tmp_path, SLOW_STUDY)
    whole = tmp_path / "whole.zarr"
    assert main(["sweep", str(study_file), "-o", str(whole), "--workers", "1"]) == 0
    cut = tmp_path / "cut.zarr"
    proc = subprocess.Popen([sys.executable, "-m", "cruiseplan", "sweep", str(study_file),
                             "-o", str(cut), "--workers", "1"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    deadline = time.monotonic() + 60
    while _done(cut) < 3 and proc.poll() is None and time.monotonic() < deadline:
        time.sleep(0.02)
    assert proc.poll() is None, "the sweep finished before it could be interrupted"
    os.kill(proc.pid, signal.SIGKILL)  # as hard as a crash: no clean-up at all
    proc.wait(timeout=30)
    partial = xr.open_zarr(cut, consolidated=False)
    n_done = int(partial["chunk_done"].values.sum())
    assert 3 <= n_done < SLOW_POINTS and not partial.attrs["complete"]
    # One point per chunk here: every chunk marked done holds its point; a chunk killed
    # between writing its values and its mark is simply run again.
    done = partial["chunk_done"].values
    assert (partial["verdict"].values[done] != NOT_RUN).all()
    assert (partial["verdict"].values == NOT_RUN).sum() >= SLOW_POINTS - n_done - 1
    status = subprocess.run([sys.executable, "-m", "cruiseplan", "sweep", str(study_file),
                             "-o", str(cut), "--resume", "--workers", "1"],
                            capture_output=True, text=True, timeout=120)
    assert status.returncode == 0, status.stderr
    a = xr.open_zarr(whole, consolidated=False).load()
    b = xr.open_zarr(cut, consolidated=False).load()
    assert b.attrs["complete"]
    for name in ("verdict", "used", "time", "leg_altitude", "chunk_done"):
        np.testing.assert_array_equal(a[name].values, b[name].values)


#: ``python -m cruiseplan ARGS`` with Ctrl-C handled as in a terminal, whatever the test
#: runner left to its children (a SIGINT ignored or blocked is inherited across exec).
AS_FROM_A_TERMINAL = """
import runpy, signal, sys
signal.pthread_sigmask(signal.SIG_UNBLOCK, [signal.SIGINT])
signal.signal(signal.SIGINT, signal.default_int_handler)
sys.argv = ["cruiseplan"] + sys.argv[1:]
runpy.run_module("cruiseplan", run_name="__main__")
"""


def test_ctrl_c_says_how_to_resume(tmp_path):
    study_file = write(tmp_path, SLOW_STUDY)
    cut = tmp_path / "cut.zarr"
    proc = subprocess.Popen([sys.executable, "-c", AS_FROM_A_TERMINAL, "sweep", str(study_file),
                             "-o", str(cut), "--workers", "1"],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 60
    while _done(cut) < 1 and proc.poll() is None and time.monotonic() < deadline:
        time.sleep(0.02)
    assert proc.poll() is None, "the sweep finished before it could be interrupted"
    proc.send_signal(signal.SIGINT)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode == 130, err
    assert "--resume" in err and "Traceback" not in err


def test_ctrl_c_waits_for_the_store_write_then_interrupts():
    """A Ctrl-C in the middle of a store write: the write finishes, then the sweep stops.

    An interrupt inside zarr's IO once left a lock of its threads held and the process
    hung at exit (about one Ctrl-C in twelve)."""
    from cruiseplan.studies import sweep

    before = signal.getsignal(signal.SIGINT)
    finished = False
    with pytest.raises(KeyboardInterrupt):
        with sweep._ctrl_c_held():
            os.kill(os.getpid(), signal.SIGINT)
            time.sleep(0.05)  # the signal is handled here, and held
            finished = True
    assert finished
    assert signal.getsignal(signal.SIGINT) is before


@pytest.mark.parametrize("text, message", [
    ("[study]\nmission = 'demo-cross-country'\n", r"\[axes\]: section missing"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\naltitude = [1]\n",
     r"\[axes\] altitude: unknown axis for a mission study"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\nisa_dev = ['0 K', 'hot']\n",
     r"\[axes\] isa_dev: .*'hot'"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\nisa_dev = ['nan K']\n",
     r"\[axes\] isa_dev: .*(finite|nan)"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\npayload = ['10 kg', '10 kg']\n",
     r"values repeat"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\nwind_speed = ['10 kt']\n",
     r"wind_speed and wind_direction go together"),
    ("[study]\nmission = 'demo-cross-country'\nrecord = ['best_tas']\n[axes]\n"
     "payload = ['10 kg']\n", r"'best_tas' is not recorded by a mission study"),
    ("[study]\nmission = 'demo-cross-country'\nrecord = ['reserve_probability']\n[axes]\n"
     "payload = ['10 kg']\n", r"needs Monte Carlo samples"),
    ("[study]\nmission = 'no-such-mission'\n[axes]\npayload = ['10 kg']\n",
     r"no such mission file"),
    ("[study]\nairframe = 'demo-trainer'\n[axes]\npayload = ['10 kg']\n",
     r"\[best\]: section missing"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\nisa_dev = '0:1e9:1 K'\n",
     r"isa_dev"),
    ("[study\n", r"study\.toml"),
    ("[study]\nmission = 'demo-field-survey'\n[axes]\npayload = ['0.1 kg']\n",
     r"is a survey, planned in packs"),
    # Physical ranges, as for the command line and the other files.
    ("[study]\nmission = 'demo-cross-country'\n[axes]\nwind_direction = [40]\n"
     "wind_speed = '0:1e308:1e307 kt'\n", r"\[axes\] wind_speed: .* out of range"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\nisa_dev = ['90 K']\n",
     r"\[axes\] isa_dev: 90 K is out of range \(-60 K to 60 K\)"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\noat = ['80 degC']\n",
     r"\[axes\] oat: 80 degC is out of range"),
    ("[study]\nmission = 'demo-cross-country'\n[axes]\npayload = ['-5 kg']\n",
     r"\[axes\] payload: -5 kg is out of range"),
    ("[study]\nairframe = 'demo-trainer'\n[axes]\npayload = ['100 kg']\n[best]\n"
     "altitudes = '0:1e6:1000 m'\n", r"\[best\] altitudes: .* out of range"),
])
def test_bad_study_files_exit_2_and_write_nothing(tmp_path, capsys, text, message):
    import re

    study_file = write(tmp_path, text)
    out = tmp_path / "out.zarr"
    assert main(["sweep", str(study_file), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert re.search(message, err), err
    assert not out.exists()


def test_an_existing_store_is_never_overwritten_and_only_its_own_study_resumes(
        tmp_path, capsys):
    study_file = write(tmp_path, MISSION_STUDY.replace("chunk = 2", "chunk = 16"))
    out = tmp_path / "out.zarr"
    assert main(["sweep", str(study_file), "-o", str(out), "--workers", "1"]) == 0
    # The summary speaks the airframe's units (aviation for the trainer) and cautions.
    summary = capsys.readouterr().out
    assert "wind_speed: 0 kt, 25 kt" in summary and "payload: 264.6 lb, 440.9 lb" in summary
    assert re.search(r"Least used among GO points: [\d.]+ US gal \([\d.]+ lb\)", summary)
    assert "CAUTION:" in summary and "flight manual" in summary
    before = sorted(p.name for p in out.rglob("*"))
    assert main(["sweep", str(study_file), "-o", str(out)]) == 2
    assert "exists: --resume completes it" in capsys.readouterr().err
    other = write(tmp_path, MISSION_STUDY.replace("25 K", "20 K"), "other.toml")
    assert main(["sweep", str(other), "-o", str(out), "--resume"]) == 2
    assert "made from another study" in capsys.readouterr().err
    assert sorted(p.name for p in out.rglob("*")) == before
    not_a_store = tmp_path / "plain.zarr"
    not_a_store.mkdir()
    assert main(["sweep", str(study_file), "-o", str(not_a_store), "--resume"]) == 2
    assert "not a study store" in capsys.readouterr().err
    # A resume of a complete store has nothing to do and succeeds.
    assert main(["sweep", str(study_file), "-o", str(out), "--resume"]) == 0


# --- departure times through a gridded forecast ------------------------------------------

FORECAST_MISSION = """
[mission]
airframe = "demo-trainer"
fuel = "100 %"
payload = "165 kg"
[profile]
departure_elevation = "500 ft"
arrival_elevation = "500 ft"
[reserve]
time = "45 min"
[[legs]]
name = "out"
from = [45.0, 7.0]
to = [45.6, 7.8]
altitude = "best"
speed = "best"
[[legs]]
name = "back"
from = [45.6, 7.8]
to = [45.0, 7.0]
altitude = "best"
speed = "best"
"""


def forecast_file(path):
    """A wind from the south-west strengthening through the day, ISA +5 K (invented)."""
    hours = np.arange(0.0, 25.0, 3.0)
    levels = np.array([0.0, 1500.0, 3000.0, 4500.0])
    lats, lons = np.array([44.0, 46.0]), np.array([6.0, 9.0])
    t, z, _, _ = np.meshgrid(hours, levels, lats, lons, indexing="ij")
    speed = 5.0 + 0.8 * t + 0.004 * z
    u, v = speed * np.sin(np.radians(225.0)) * -1, speed * np.cos(np.radians(225.0)) * -1
    from cruiseplan.physics.atmosphere import isa_temperature_pressure

    ta = isa_temperature_pressure(z)[0] + 5.0
    dims = ("time", "altitude", "lat", "lon")
    ds = xr.Dataset(
        {"u": (dims, u, {"standard_name": "eastward_wind", "units": "m s-1"}),
         "v": (dims, v, {"standard_name": "northward_wind", "units": "m s-1"}),
         "ta": (dims, ta, {"standard_name": "air_temperature", "units": "K"})},
        coords={"time": ("time", hours, {"standard_name": "time",
                                         "units": "hours since 2026-12-03 00:00:00"}),
                "altitude": ("altitude", levels, {"standard_name": "altitude", "units": "m"}),
                "lat": ("lat", lats, {"standard_name": "latitude",
                                      "units": "degrees_north"}),
                "lon": ("lon", lons, {"standard_name": "longitude",
                                      "units": "degrees_east"})})
    ds.to_netcdf(path, engine="h5netcdf")
    return path


def test_departure_axis_equals_single_forecast_plans(tmp_path):
    from cruiseplan.io.forecast_file import read_forecast
    from cruiseplan.io.text import parse_utc_time
    from cruiseplan.planning.forecast import plan_with_forecast

    (tmp_path / "trip.toml").write_text(FORECAST_MISSION)
    forecast_file(tmp_path / "winds.nc")
    study = read_study(write(tmp_path, """
[study]
mission = "trip.toml"
forecast = "winds.nc"
record = ["verdict", "used", "time", "leg_altitude"]
[axes]
departure = { from = "2026-12-03T02:00Z", to = "2026-12-03T20:00Z", step = "6 h" }
payload = ["100 kg", "165 kg"]
"""))
    assert study.shape == (4, 2)
    ds = run_study(study, workers=1)
    assert ds["departure"].dtype.kind == "M"
    weather = read_forecast(tmp_path / "winds.nc")
    mission = read_mission(tmp_path / "trip.toml")
    used = []
    for i, hour in enumerate((2, 8, 14, 20)):
        t = parse_utc_time(f"2026-12-03T{hour:02d}:00Z")
        for j, payload in enumerate((100.0, 165.0)):
            plan = plan_with_forecast(apply_overrides(mission, payload=payload), weather, t)
            assert ds["used"].values[i, j] == plan.used
            assert list(ds["leg_altitude"].values[i, j]) == list(plan.leg_altitudes)
        used.append(ds["used"].values[i, 1])
    # The wind strengthens through the day: the out-and-back burns more later.
    assert used[-1] > used[0]


def test_forecast_study_errors(tmp_path, capsys):
    (tmp_path / "trip.toml").write_text(FORECAST_MISSION)
    forecast_file(tmp_path / "winds.nc")
    cases = [
        ("forecast = 'winds.nc'\n[axes]\nisa_dev = ['0 K']\n",
         "the forecast gives the winds and the day's temperature"),
        ("[axes]\ndeparture = ['2026-12-03T06:00Z']\n", "needs [study] forecast"),
        ("forecast = 'none.nc'\n[axes]\npayload = ['100 kg']\n", "no such file"),
        ("forecast = 'winds.nc'\n[axes]\ndeparture = ['2026-12-05T06:00Z']\n",
         "[axes] departure"),
        ("forecast = 'winds.nc'\n[axes]\ndeparture = ['06:00']\n", "[axes] departure"),
    ]
    for text, message in cases:
        study_file = write(tmp_path, "[study]\nmission = 'trip.toml'\n" + text)
        out = tmp_path / "out.zarr"
        assert main(["sweep", str(study_file), "-o", str(out)]) == 2, text
        err = capsys.readouterr().err
        assert message in err and len(err.strip().splitlines()) == 1, err
        assert not out.exists()


HEAP_PROBE = """
import resource, sys, threading
from cruiseplan.io.study_file import read_study
import cruiseplan.studies.sweep as sweep
if sys.argv[2] == "released":
    sweep.hold_freed_heap = lambda: False
study = read_study(sys.argv[1])
faults = []
def chunks():  # in a thread of its own, as a dask worker plans
    for index in list(study.all_blocks())[:3]:
        before = resource.getrusage(resource.RUSAGE_SELF).ru_minflt
        sweep.run_block(study, index)
        faults.append(resource.getrusage(resource.RUSAGE_SELF).ru_minflt - before)
thread = threading.Thread(target=chunks)
thread.start()
thread.join()
print(faults[-1])
"""


@pytest.mark.skipif(sys.platform != "linux" or os.confstr("CS_GNU_LIBC_VERSION") is None,
                    reason="glibc's allocator only")
def test_chunks_reuse_freed_heap_instead_of_faulting_pages_in(tmp_path):
    """The third 63-point chunk of a 10-leg mission faults few new pages in (it took ~25 000
    page faults, about 40 % of its time, when the allocator gave its heap back)."""
    rng = np.random.default_rng(3)
    legs = "".join(f'[[legs]]\nname = "leg {i}"\ndistance = "{d:.1f} nm"\ncourse = {c:.0f}\n'
                   'wind = "250/15kt@2000ft,260/30kt@6000ft,270/40kt@10000ft"\n'
                   for i, (d, c) in enumerate(zip(rng.uniform(8, 30, 10),
                                                  rng.uniform(0, 360, 10))))
    (tmp_path / "legs.toml").write_text(
        '[mission]\nairframe = "demo-tourer"\nfuel = "100 %"\npayload = "200 kg"\n'
        '[day]\nisa_dev = "+10 K"\n[reserve]\ntime = "45 min"\n' + legs)
    study = write(tmp_path, f'[study]\nmission = "{tmp_path / "legs.toml"}"\nchunk = 63\n'
                            '[axes]\nisa_dev = "-10:52:1 K"\npayload = "100:140:20 kg"\n')

    def faults(mode):
        out = subprocess.run([sys.executable, "-c", HEAP_PROBE, str(study), mode],
                             capture_output=True, text=True, check=True)
        return int(out.stdout.split()[-1])

    held, released = faults("held"), faults("released")
    assert held < 3000 < 10_000 < released, (held, released)
