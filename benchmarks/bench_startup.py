"""Issue 13 benchmark: start-up of the command line against the bare interpreter with numpy.

Reports one ratio per command, measured in one run (no timed assertions):

    ratio = median wall time of `cruiseplan COMMAND ...` (end to end, a new process each
            time, output captured)
          / median wall time of `python -c "import numpy"` (same interpreter, new process)

Commands and targets: `table demo-trainer` <= 2; `plan demo-cross-country` and
`best demo-trainer` <= 2.5.

The baseline is the bare interpreter importing numpy, the least any numpy command line
pays. All commands are run interleaved (table, plan, best, numpy, table, ...) so that a
change of machine load during the run affects every side alike; the medians are compared.

The package is byte-compiled first (``python -m compileall``), as ``pip install`` does for
an installed copy and as numpy in site-packages already is. Without it an editable checkout
run with PYTHONDONTWRITEBYTECODE set would compile every module from source at every start,
a cost no installed user pays and the baseline does not pay either.
"""

from __future__ import annotations

import compileall
import statistics
import subprocess
import sys
import time
from pathlib import Path

from figures import figure

#: Runs of each command (interleaved); the median of each side is reported.
RUNS = 15
#: (label, arguments after `cruiseplan`, target ratio to `import numpy`) of issue 13.
COMMANDS = [
    ("table", ["table", "demo-trainer"], 2.0),
    ("plan", ["plan", "demo-cross-country"], 2.5),
    ("best", ["best", "demo-trainer"], 2.5),
]


def wall_time(cmd) -> float:
    """Wall time of one run of ``cmd`` [s], output captured, failing on a non-zero exit."""
    t0 = time.perf_counter()
    subprocess.run(cmd, check=True, capture_output=True)
    return time.perf_counter() - t0


def main():
    package = Path(__file__).resolve().parent.parent / "cruiseplan"
    compileall.compile_dir(package, quiet=1)
    exe = str(Path(sys.executable).parent / "cruiseplan")
    cmds = {label: [exe, *args] for label, args, _ in COMMANDS}
    cmds["numpy"] = [sys.executable, "-c", "import numpy"]
    times = {label: [] for label in cmds}
    for cmd in cmds.values():
        wall_time(cmd)  # warm the file system (and any on-disk caches)
    for _ in range(RUNS):
        for label, cmd in cmds.items():
            times[label].append(wall_time(cmd))
    base = statistics.median(times["numpy"])
    print(f"`python -c 'import numpy'` {base * 1e3:.0f} ms (median of {RUNS}, interleaved)")
    for label, args, target in COMMANDS:
        m = statistics.median(times[label])
        figure(f"`cruiseplan {' '.join(args)}` / `import numpy`", m / base, target,
               detail=f"{m * 1e3:.0f} ms")


if __name__ == "__main__":
    main()
