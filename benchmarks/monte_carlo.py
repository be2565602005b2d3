"""Monte Carlo throughput: samples per second for a demo's whole checklist, and its memory.

Each N runs in a fresh interpreter so the peak resident memory is that run's own (the time
is the sampling of every check, after the corner evaluation; samples are drawn and checked in
chunks of ``reviewer.tolerance.CHUNK`` rows, so memory does not grow with N). The whole
``latchbook check --monte-carlo`` process is timed by ``python -m benchmarks.cli``.

    python -m benchmarks.monte_carlo [PROJECT ...]   (default: the kiln and flasher demos)
"""

from __future__ import annotations

import json
import resource
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
DEFAULT = (ROOT / "projects" / "kiln-230.toml", ROOT / "projects" / "flasher-dc.toml")


def one(path: str, n: int) -> dict[str, float]:
    """Time Monte Carlo over every check of ``path`` at ``n`` samples, in this process."""
    from reviewer.engine import evaluate
    from reviewer.project import load_project
    from reviewer.tolerance import monte_carlo_all

    run = evaluate(load_project(path))
    base = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    t0 = time.perf_counter()
    checks = len(monte_carlo_all(run.results, n, seed=1))  # as `check --monte-carlo` does
    dt = time.perf_counter() - t0
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    return {"n": n, "checks": checks, "seconds": dt, "rss_mib": peak / 1024,
            "growth_mib": (peak - base) / 1024}


def main() -> None:
    if len(sys.argv) > 2 and sys.argv[1] == "--one":
        print(json.dumps(one(sys.argv[2], int(sys.argv[3]))))
        return
    paths = sys.argv[1:] or [str(p) for p in DEFAULT]
    for path in paths:
        print(f"Monte Carlo over every check of {Path(path).name}")
        print(f"{'samples':>9} {'checks':>6} {'time':>9} {'samples/s':>12} {'µs/sample':>10} "
              f"{'peak RSS':>10} {'growth':>9}")
        for n in (10_000, 100_000, 1_000_000):
            out = subprocess.run([sys.executable, "-m", "benchmarks.monte_carlo", "--one", path,
                                  str(n)], capture_output=True, text=True, check=True, cwd=ROOT)
            d = json.loads(out.stdout)
            print(f"{n:9d} {d['checks']:6d} {d['seconds']:7.2f} s {n / d['seconds']:12.3g} "
                  f"{d['seconds'] / n * 1e6:10.2f} {d['rss_mib']:7.0f} MiB "
                  f"{d['growth_mib']:5.0f} MiB")

if __name__ == "__main__":
    main()
