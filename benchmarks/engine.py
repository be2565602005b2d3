"""The vectorised engine against a straightforward per-corner Python loop.

For every computed check of each demo project, the engine's single array call over all corners
is timed against calling the same check function once per corner (one-element arrays), which
does the same arithmetic. Prints per project: corners, both times and the ratio.

    python -m benchmarks.engine
"""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np

from reviewer.engine import evaluate
from reviewer.project import load_project
from reviewer.registry import CHECKS

ROOT = Path(__file__).resolve().parents[1]


def best(fn, repeat: int = 5) -> float:
    """Best wall time of ``repeat`` runs [s]."""
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times)


def main() -> None:
    print(f"{'project':28} {'checks':>6} {'rows':>8} {'full check':>11} {'vector':>9} "
          f"{'loop':>9} {'ratio':>7}")
    for path in sorted((ROOT / "projects").glob("*.toml")):
        project = load_project(path)
        full = best(lambda project=project: evaluate(project), 3)
        run = evaluate(project)
        items = [(CHECKS[r.check], r.evaluation) for r in run.results if r.evaluation]
        rows = sum(len(ev.inputs[ev.names[0]]) for _, ev in items if ev.names)

        def vector(items=items) -> None:
            for defn, ev in items:
                ev.call(defn, ev.inputs)

        def loop(items=items) -> None:
            for defn, ev in items:
                n = len(ev.inputs[ev.names[0]]) if ev.names else 1
                for i in range(n):
                    ev.call(defn, {k: np.asarray(v[i:i + 1]) for k, v in ev.inputs.items()})

        tv = best(vector)
        tl = best(loop, 1)
        print(f"{path.name:28} {len(items):6d} {rows:8d} {full * 1e3:9.1f} ms "
              f"{tv * 1e3:6.1f} ms {tl * 1e3:6.0f} ms {tl / tv:6.0f}×")


if __name__ == "__main__":
    main()
