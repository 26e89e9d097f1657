"""Issue 16 benchmark: the cruise card against the cruise table, end to end.

Reports one ratio, measured in one run (no timed assertions):

    ratio = median wall time of `cruiseplan card demo-trainer -o FILE.pdf` (a new process
            each time: imports, content, layout, PDF with subset fonts, both files written)
          / median wall time of `cruiseplan table demo-trainer` (a new process each time,
            output captured)

Target: <= 4. The baseline is the table command, the same numbers without a page; the
ratio is what the page costs. Both commands run interleaved (card, table, card, ...) so
that a change of machine load during the run affects both sides alike; the medians are
compared. The package is byte-compiled first, as `benchmarks/bench_startup.py` does and as
`pip install` does for an installed copy.
"""

from __future__ import annotations

import compileall
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

#: Runs of each command (interleaved); the median of each side is reported.
RUNS = 11
#: Target ratio of issue 16.
TARGET = 4.0


def wall_time(cmd) -> float:
    """Wall time of one run of ``cmd`` [s], output captured, failing on a non-zero exit."""
    t0 = time.perf_counter()
    subprocess.run(cmd, check=True, capture_output=True)
    return time.perf_counter() - t0


def main():
    package = Path(__file__).resolve().parent.parent / "cruiseplan"
    compileall.compile_dir(package, quiet=1)
    exe = str(Path(sys.executable).parent / "cruiseplan")
    with tempfile.TemporaryDirectory() as folder:
        cmds = {"card": [exe, "card", "demo-trainer", "-o", str(Path(folder) / "card.pdf")],
                "table": [exe, "table", "demo-trainer"]}
        times = {label: [] for label in cmds}
        for cmd in cmds.values():
            wall_time(cmd)  # warm the file system and matplotlib's font cache
        for _ in range(RUNS):
            for label, cmd in cmds.items():
                times[label].append(wall_time(cmd))
    card, table = (statistics.median(times[k]) for k in ("card", "table"))
    ratio = card / table
    flag = "" if ratio <= TARGET else "  MISSES TARGET"
    print(f"`cruiseplan table demo-trainer` {table * 1e3:.0f} ms, `cruiseplan card "
          f"demo-trainer` {card * 1e3:.0f} ms (medians of {RUNS}, interleaved): ratio "
          f"{ratio:.2f} (target <= {TARGET:g}){flag}")


if __name__ == "__main__":
    main()
