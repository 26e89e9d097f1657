"""Run every benchmark script in this folder, one after the other (`make bench`).

Each script runs in a process of its own, so that no benchmark inherits another's caches
or memory (a child process started from a large one reports the large one's peak resident
memory as its own). Each reports its figures through ``figures.figure``, which marks a
missed target ``MISSES TARGET``; at the end those lines are listed again and the run exits
1 if there are any.
"""

import subprocess
import sys
from pathlib import Path

from figures import MISS_MARK

here = Path(__file__).resolve().parent
misses = []
for script in sorted(here.glob("bench_*.py")):
    if len(sys.argv) > 1 and not any(name in script.name for name in sys.argv[1:]):
        continue
    print(f"== {script.name}", flush=True)
    with subprocess.Popen([sys.executable, str(script)], cwd=here, stdout=subprocess.PIPE,
                          text=True) as proc:
        for line in proc.stdout:
            print(line, end="", flush=True)
            if line.rstrip().endswith(MISS_MARK):
                misses.append(line.rstrip()[: -len(MISS_MARK)].rstrip())
    if proc.returncode:
        misses.append(f"{script.name} stopped with exit status {proc.returncode}")

if misses:
    print(f"\n{len(misses)} figure(s) missed their targets:")
    for text in misses:
        print(f"  {text}")
    sys.exit(1)
print("\nevery figure met its target")
