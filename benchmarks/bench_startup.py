"""Issue 13 benchmark: start-up of `cruiseplan table demo-trainer` without pint's registry.

Reports one ratio measured in one run (no timed assertions):

    ratio = median wall time of `cruiseplan table demo-trainer` (end to end, a new
            process each time, output captured)
          / median wall time of `python -c "import numpy"` (same interpreter, new process)

The baseline is the bare interpreter importing numpy, the least any numpy command line
pays. The two commands are run interleaved (table, numpy, table, numpy, ...) so that a
change of machine load during the run affects both sides alike; the medians of the runs
are compared. Target: ratio <= 2.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import time
from pathlib import Path

#: Runs of each command (interleaved); the median of each side is reported.
RUNS = 9
#: Target of issue 13: `cruiseplan table` at most this many times `import numpy`.
TARGET = 2.0


def wall_time(cmd) -> float:
    """Wall time of one run of ``cmd`` [s], output captured, failing on a non-zero exit."""
    t0 = time.perf_counter()
    subprocess.run(cmd, check=True, capture_output=True)
    return time.perf_counter() - t0


def main():
    exe = Path(sys.executable).parent / "cruiseplan"
    cmd_table = [str(exe), "table", "demo-trainer"]
    cmd_numpy = [sys.executable, "-c", "import numpy"]
    wall_time(cmd_table)  # warm the file system (and any on-disk caches)
    wall_time(cmd_numpy)
    t_table, t_numpy = [], []
    for _ in range(RUNS):
        t_table.append(wall_time(cmd_table))
        t_numpy.append(wall_time(cmd_numpy))
    m_table, m_numpy = statistics.median(t_table), statistics.median(t_numpy)
    print(f"`cruiseplan table demo-trainer` {m_table * 1e3:.0f} ms, "
          f"`python -c 'import numpy'` {m_numpy * 1e3:.0f} ms (medians of {RUNS}, "
          f"interleaved), ratio {m_table / m_numpy:.2f} (target <= {TARGET:g})")


if __name__ == "__main__":
    main()
