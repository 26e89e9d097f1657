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

import sys
import tempfile
from pathlib import Path

from figures import byte_compile_package, command, figure, interleaved

#: Runs of each command (interleaved); the median of each side is reported.
RUNS = 11
#: Target ratio of issue 16.
TARGET = 4.0


def main():
    byte_compile_package()
    exe = str(Path(sys.executable).parent / "cruiseplan")
    with tempfile.TemporaryDirectory() as folder:
        sides = {"card": command([exe, "card", "demo-trainer", "-o",
                                  str(Path(folder) / "card.pdf")]),
                 "table": command([exe, "table", "demo-trainer"])}
        # Warm-up: the file system and matplotlib's font cache.
        med = interleaved(sides, RUNS)
    print(f"`cruiseplan table demo-trainer` {med['table'] * 1e3:.0f} ms, `cruiseplan card "
          f"demo-trainer` {med['card'] * 1e3:.0f} ms (medians of {RUNS}, interleaved)")
    figure("`cruiseplan card demo-trainer` / `cruiseplan table demo-trainer`",
           med["card"] / med["table"], TARGET)


if __name__ == "__main__":
    main()
