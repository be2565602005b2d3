"""What a user waits for at the command line: whole ``latchbook`` processes, start to exit.

Each command runs ``--repeat`` times (default 15) as a fresh process with output to a pipe;
prints the fastest and the median wall time and the median CPU time (user + system) of the
process, which a busy shared machine disturbs less than wall time. For scale, the same for a
bare interpreter and for ``import numpy`` (the floor any numpy program pays).

An installed program runs from compiled bytecode (``__pycache__``); so the children run with
``PYTHONDONTWRITEBYTECODE`` removed from their environment after one warm-up run that writes
the caches. ``--no-bytecode`` keeps the caller's setting and skips the warm-up (where no cache
was ever written, every run then compiles every module from source).

``--against DIR`` also runs every command in DIR (another checkout, e.g. ``git archive main |
tar -x -C DIR``: ``-m reviewer.cli`` then imports that checkout's code), alternating the two
run by run so both see the same machine load, and prints the ratio of the medians.

``--only TEXT`` times only the commands whose label contains TEXT. The load average is printed
before and after: on a shared machine trust the CPU column and the ratios.

    python -m benchmarks.cli [--repeat N] [--no-bytecode] [--against DIR] [--only TEXT]
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
    ("check charger-12v", [*LB, "check", "projects/charger-12v.toml"]),
    ("check motor-dc", [*LB, "check", "projects/motor-dc.toml"]),
    ("check kiln-230 --monte-carlo 100000",
     [*LB, "check", "projects/kiln-230.toml", "--monte-carlo", "100000", "--seed", "1"]),
    ("check motor-dc --monte-carlo 100000",
     [*LB, "check", "projects/motor-dc.toml", "--monte-carlo", "100000", "--seed", "1"]),
    ("check flasher-dc --monte-carlo 100000",
     [*LB, "check", "projects/flasher-dc.toml", "--monte-carlo", "100000", "--seed", "1"]),
    ("status --matrix kiln-line", [*LB, "status", "--matrix", "projects/kiln-line"]),
]


def _once(cmd: list[str], cwd: Path, env: dict[str, str]) -> tuple[float, float]:
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    subprocess.run(cmd, cwd=cwd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env,
                   check=False)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime


def run(cmd: list[str], repeat: int, bytecode: bool = True,
        roots: tuple[Path, ...] = (ROOT,)) -> list[tuple[float, float, float]]:
    """Per root: (fastest wall, median wall, median CPU) over ``repeat`` runs [s]."""
    env = dict(os.environ, COLUMNS="100")
    if bytecode:
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        for root in roots:
            subprocess.run(cmd, cwd=root, capture_output=True, env=env, check=False)
    walls: list[list[float]] = [[] for _ in roots]
    cpus: list[list[float]] = [[] for _ in roots]
    for _ in range(repeat):
        for i, root in enumerate(roots):
            w, c = _once(cmd, root, env)
            walls[i].append(w)
            cpus[i].append(c)
    return [(min(w), statistics.median(w), statistics.median(c))
            for w, c in zip(walls, cpus, strict=True)]


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--repeat", type=int, default=15)
    ap.add_argument("--no-bytecode", action="store_true",
                    help="keep PYTHONDONTWRITEBYTECODE as set (compile every run)")
    ap.add_argument("--against", type=Path, metavar="DIR",
                    help="another checkout to time the same commands in, alternately")
    ap.add_argument("--only", metavar="TEXT", help="only the commands whose label has TEXT")
    args = ap.parse_args()
    print("load average (1, 5, 15 min): " + ", ".join(f"{x:.2f}" for x in os.getloadavg()))
    if not args.no_bytecode:
        print("children run from compiled bytecode (caches written by a warm-up run)")
    roots = (ROOT,) if args.against is None else (ROOT, args.against.resolve())
    head = f"{'command':40} {'fastest':>9} {'median':>9} {'CPU':>9}"
    if args.against:
        head += f"   | against: {'fastest':>9} {'median':>9} {'CPU':>9}  ratio (median, CPU)"
    print(head + "   (wall, wall, user+sys)")
    for label, cmd in COMMANDS:
        if args.only and args.only not in label:
            continue
        res = run(cmd, args.repeat, not args.no_bytecode, roots)
        line = f"{label:40} " + " ".join(f"{x * 1e3:7.0f} ms" for x in res[0])
        if args.against:
            line += "   |          " + " ".join(f"{x * 1e3:7.0f} ms" for x in res[1])
            line += f"  {res[1][1] / res[0][1]:5.2f}× {res[1][2] / res[0][2]:5.2f}×"
        print(line)
    print("load average (1, 5, 15 min): " + ", ".join(f"{x:.2f}" for x in os.getloadavg()))


if __name__ == "__main__":
    main()
