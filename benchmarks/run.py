"""Run every benchmark script in this folder, one after the other (`make bench`)."""

import runpy
import sys
from pathlib import Path

here = Path(__file__).resolve().parent
for script in sorted(here.glob("bench_*.py")):
    if len(sys.argv) > 1 and not any(name in script.name for name in sys.argv[1:]):
        continue
    print(f"== {script.name}")
    runpy.run_path(str(script), run_name="__main__")
