"""Issue 14 benchmark: plan evaluations per second in a sweep, and the sweep's memory.

Reports, measured in one run (no timed assertions):

1. **Rate.** A 10-leg mission (the demo tourer, best altitudes and speeds on every leg)
   swept over ISA deviation x payload, 40 x 31 = 1240 points, chunked as a study file
   without a ``chunk`` is (:func:`cruiseplan.io.study_file.auto_chunk`: 10 chunks of
   124, an even share for each of 2 workers). Baseline: a Python loop planning every
   11th point of the same study (113 points, spread over both axes),
   each ``plan_mission(apply_overrides(mission, isa_dev=..., payload=...))`` on the
   mission read once (what a script does without the sweep). Rates are points per second
   of each side's own points. Sides:

       loop      the Python loop in this process
       sweep 1   run_study(study, workers=1) (in this process, no cluster)
       sweep 2   run_study(study, client=client) on the local cluster of 2 worker
                 processes ``cruiseplan sweep --workers 2`` starts (``local_cluster``),
                 started once before the timing (its start-up, about 1 s, is reported on
                 its own: a study of minutes pays it once)

   run interleaved (loop, sweep 1, sweep 2, loop, ...) 5 times; the medians give
   ``sweep 1 / loop`` and ``sweep 2 / loop`` in points per second, and ``sweep 2 / sweep 1``.
   Targets (issue 14): sweep >= 20x the loop; 2 workers >= 1.6x 1 worker.

2. **Memory.** Peak resident memory (VmHWM) of a sweep process (workers=1, so every byte
   is in that one process) that resumes a store of 1e4 and of 1e6 points of the
   demo-quad-inspection mission, in chunks of 100 points, of which all chunks but the last
   4 are marked done: the store's layout, the chunk list and the writes scale with the
   study, the 4 chunks computed do not (a chunk's points are planned together, so its
   memory is set by the chunk size, the same on both sides). Target: flat (the 1e6 figure
   within 10 % of the 1e4 one). Each side runs in a new process; the stores are made
   (filled with "not run") outside the measured process.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import textwrap
import time
from pathlib import Path

import numpy as np
from figures import figure

#: Interleaved repetitions of the rate comparison.
RUNS = 5
RATE_TARGET, SCALE_TARGET = 20.0, 1.6
#: Points per chunk of the memory studies (both sizes).
MEMORY_CHUNK = 100


def ten_leg_mission(folder: Path) -> Path:
    """A 10-leg mission file for the demo tourer (invented legs)."""
    rng = np.random.default_rng(7)
    legs = "".join(textwrap.dedent(f"""
        [[legs]]
        name = "leg {i + 1}"
        distance = "{d:.1f} nm"
        course = {c:.0f}
        wind = "250/15kt@2000ft,260/30kt@6000ft,270/40kt@10000ft"
        """) for i, (d, c) in enumerate(zip(rng.uniform(8, 30, 10), rng.uniform(0, 360, 10))))
    path = folder / "ten-legs.toml"
    path.write_text(textwrap.dedent("""
        [mission]
        name = "ten-legs"
        airframe = "demo-tourer"
        fuel = "100 %"
        payload = "200 kg"
        [day]
        isa_dev = "+10 K"
        [profile]
        departure_elevation = "500 ft"
        arrival_elevation = "500 ft"
        [reserve]
        time = "45 min"
        """) + legs)
    return path


def rate(folder: Path):
    from cruiseplan.io.mission_file import apply_overrides, read_mission
    from cruiseplan.io.study_file import read_study
    from cruiseplan.planning.mission import plan_mission
    from cruiseplan.studies import run_study

    mission_file = ten_leg_mission(folder)
    study_file = folder / "rate.toml"
    study_file.write_text(textwrap.dedent(f"""
        [study]
        mission = "{mission_file}"
        record = ["verdict", "used", "time"]
        [axes]
        isa_dev = "-10:29:1 K"
        payload = "100:250:5 kg"
        """))
    study = read_study(study_file)
    n = study.size
    sample = [study.point(ix) for ix in list(np.ndindex(*study.shape))[::11]]
    sizes = {"loop": len(sample), "sweep 1": n, "sweep 2": n}

    def loop():
        mission = read_mission(mission_file)
        for values in sample:
            plan_mission(apply_overrides(mission, isa_dev=values["isa_dev"],
                                         payload=values["payload"]))

    from distributed import Client

    from cruiseplan.studies.sweep import local_cluster

    t0 = time.perf_counter()
    with local_cluster(2) as cluster, Client(cluster) as client:
        client.run(lambda: __import__("cruiseplan.studies"))
        print(f"LocalCluster of 2 workers started in {time.perf_counter() - t0:.1f} s")
        sides = {"loop": loop, "sweep 1": lambda: run_study(study, workers=1),
                 "sweep 2": lambda: run_study(study, client=client)}
        times = {k: [] for k in sides}
        for _ in range(RUNS):
            for name, fn in sides.items():
                t0 = time.perf_counter()
                fn()
                times[name].append(time.perf_counter() - t0)
    med = {k: statistics.median(v) for k, v in times.items()}
    rates = {k: sizes[k] / t for k, t in med.items()}
    for k, t in med.items():
        print(f"{k:8s} {rates[k]:7.1f} points/s ({t:.2f} s for {sizes[k]} points of a "
              f"10-leg mission; chunks of {study.chunk})")
    r1, r2 = rates["sweep 1"] / rates["loop"], rates["sweep 2"] / rates["loop"]
    scale = rates["sweep 2"] / rates["sweep 1"]
    figure("sweep 2 workers / loop", r2, RATE_TARGET, at_most=False,
           detail=f"sweep 1 worker / loop {r1:.2f}")
    figure("sweep 2 workers / 1 worker", scale, SCALE_TARGET, at_most=False)


#: The measured process. Its peak is read from /proc (VmHWM, the peak of this process's
#: own memory since it started): getrusage's maxrss would also count the memory of the
#: process that started it, held at the fork before this program was loaded.
MEMORY_CHILD = """
import re, sys
from cruiseplan.io.study_file import read_study
from cruiseplan.studies import run_study
run_study(read_study(sys.argv[1]), sys.argv[2], resume=True, workers=1)
with open("/proc/self/status") as f:
    print(re.search(r"VmHWM:\\s*(\\d+) kB", f.read()).group(1))
"""


def memory(folder: Path):
    import zarr

    from cruiseplan.io.study_file import read_study
    from cruiseplan.studies.sweep import create_store

    peaks = {}
    for points, isa_dev in ((10_000, "-50:49:1 K"), (1_000_000, "-50:49.99:0.01 K")):
        study_file = folder / f"mem{points}.toml"
        study_file.write_text(textwrap.dedent(f"""
            [study]
            mission = "demo-quad-inspection"
            record = ["verdict", "used", "time"]
            chunk = {MEMORY_CHUNK}
            [axes]
            isa_dev = "{isa_dev}"
            payload = "0:0.99:0.01 kg"
            """))
        study = read_study(study_file)
        store = folder / f"mem{points}.zarr"
        # Made, then marked done but for 4 chunks, outside the measured process.
        create_store(study, store)
        done = zarr.open_group(str(store), mode="r+")["chunk_done"]
        marks = np.ones(done.shape, dtype=bool)
        marks.reshape(-1)[-4:] = False
        done[...] = marks
        out = subprocess.run([sys.executable, "-c", MEMORY_CHILD, str(study_file), str(store)],
                             capture_output=True, text=True, check=True)
        peaks[points] = int(out.stdout.split()[-1]) / 1024
        print(f"{points:>9d} points ({study.size} in the study, 4 chunks of "
              f"{study.chunk} computed): peak RSS {peaks[points]:.0f} MB")
    growth = peaks[1_000_000] / peaks[10_000]
    figure("sweep peak memory 1e6 / 1e4 points (flat)", growth, 1.10)


def main():
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        rate(folder)
        memory(folder)


if __name__ == "__main__":
    main()
