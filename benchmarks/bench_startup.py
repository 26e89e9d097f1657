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

import sys
from pathlib import Path

from figures import byte_compile_package, command, figure, interleaved

#: Runs of each command (interleaved); the median of each side is reported.
RUNS = 15
#: (label, arguments after `cruiseplan`, target ratio to `import numpy`) of issue 13.
COMMANDS = [
    ("table", ["table", "demo-trainer"], 2.0),
    ("plan", ["plan", "demo-cross-country"], 2.5),
    ("best", ["best", "demo-trainer"], 2.5),
]


def main():
    byte_compile_package()
    exe = str(Path(sys.executable).parent / "cruiseplan")
    sides = {label: command([exe, *args]) for label, args, _ in COMMANDS}
    sides["numpy"] = command([sys.executable, "-c", "import numpy"])
    med = interleaved(sides, RUNS)
    base = med["numpy"]
    print(f"`python -c 'import numpy'` {base * 1e3:.0f} ms (median of {RUNS}, interleaved)")
    for label, args, target in COMMANDS:
        figure(f"`cruiseplan {' '.join(args)}` / `import numpy`", med[label] / base, target,
               detail=f"{med[label] * 1e3:.0f} ms")


if __name__ == "__main__":
    main()
