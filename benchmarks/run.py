"""Run every benchmark script in this folder, one after the other (`make bench`).

Each script reports its figures through ``figures.figure``; at the end the figures that
missed their targets are listed again and the run exits 1 if there are any.
"""

import runpy
import sys
from pathlib import Path

here = Path(__file__).resolve().parent
sys.path.insert(0, str(here))
import figures  # noqa: E402 - the folder goes on the path first

for script in sorted(here.glob("bench_*.py")):
    if len(sys.argv) > 1 and not any(name in script.name for name in sys.argv[1:]):
        continue
    print(f"== {script.name}")
    runpy.run_path(str(script), run_name="__main__")

if figures.MISSES:
    print(f"\n{len(figures.MISSES)} figure(s) missed their targets:")
    for _, text in figures.MISSES:
        print(f"  {text}")
    sys.exit(1)
print("\nevery figure met its target")
