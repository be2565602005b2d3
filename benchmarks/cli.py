"""What a user waits for at the command line: whole ``latchbook`` processes, start to exit.

Each command runs ``--repeat`` times (default 15) as a fresh process with output to a pipe;
prints the fastest and the median wall time and the median CPU time (user + system) of the
process, which a busy shared machine disturbs less than wall time. For scale, the same for a
bare interpreter and for ``import numpy`` (the floor any numpy program pays).

An installed program runs from compiled bytecode (``__pycache__``); so the children run with
``PYTHONDONTWRITEBYTECODE`` removed from their environment after one warm-up run that writes
the caches. ``--no-bytecode`` keeps the caller's setting instead (every run then compiles every
module from source, as in a sandbox that forbids writing the caches).

    python -m benchmarks.cli [--repeat N] [--no-bytecode]
"""

from __future__ import annotations

import argparse
import os
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PY = sys.executable
LB = [PY, "-m", "reviewer.cli"]
COMMANDS = [
    ("python -c pass", [PY, "-c", "pass"]),
    ("python -c 'import numpy'", [PY, "-c", "import numpy"]),
    ("check kiln-230", [*LB, "check", "projects/kiln-230.toml"]),
    ("check flasher-dc", [*LB, "check", "projects/flasher-dc.toml"]),
    ("check all three demos", [*LB, "check", "projects/kiln-230.toml", "projects/kiln-120.toml",
                               "projects/flasher-dc.toml"]),
    ("check kiln-230 --json", [*LB, "check", "projects/kiln-230.toml", "--json"]),
    ("check kiln-230 --monte-carlo 100000",
     [*LB, "check", "projects/kiln-230.toml", "--monte-carlo", "100000", "--seed", "1"]),
    ("check flasher-dc --monte-carlo 100000",
     [*LB, "check", "projects/flasher-dc.toml", "--monte-carlo", "100000", "--seed", "1"]),
    ("status --matrix kiln-line", [*LB, "status", "--matrix", "projects/kiln-line"]),
]


def run(cmd: list[str], repeat: int, bytecode: bool = True) -> tuple[float, float, float]:
    """(fastest wall, median wall, median CPU) over ``repeat`` runs [s]."""
    walls, cpus = [], []
    env = dict(os.environ, COLUMNS="100")
    if bytecode:
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        subprocess.run(cmd, cwd=ROOT, capture_output=True, env=env, check=False)
    for _ in range(repeat):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        t0 = time.perf_counter()
        subprocess.run(cmd, cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                       env=env, check=False)
        walls.append(time.perf_counter() - t0)
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpus.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
    return min(walls), statistics.median(walls), statistics.median(cpus)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=15)
    ap.add_argument("--no-bytecode", action="store_true",
                    help="keep PYTHONDONTWRITEBYTECODE as set (compile every run)")
    args = ap.parse_args()
    if not args.no_bytecode:
        print("children run from compiled bytecode (caches written by a warm-up run)")
    print(f"{'command':40} {'fastest':>9} {'median':>9} {'CPU':>9}   (wall, wall, user+sys)")
    for label, cmd in COMMANDS:
        fast, med, cpu = run(cmd, args.repeat, not args.no_bytecode)
        print(f"{label:40} {fast * 1e3:7.0f} ms {med * 1e3:7.0f} ms {cpu * 1e3:7.0f} ms")


if __name__ == "__main__":
    main()
