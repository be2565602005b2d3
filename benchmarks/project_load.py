"""Loading a project as it grows: generated projects of 25 to 400 stages (the kiln demo's
stage chain repeated), best of 5 loads each, and the time per stage, which stays flat when
loading is linear in the file's size.

    python -m benchmarks.project_load
"""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

from benchmarks.workbook import big_project
from reviewer.project import _line_index, load_project

ROOT = Path(__file__).resolve().parents[1]


def main() -> None:
    print(f"{'stages':>7} {'lines':>7} {'load':>9} {'per stage':>10}")
    with tempfile.TemporaryDirectory() as tmp:
        for n in (25, 50, 100, 200, 400):
            path = big_project(ROOT / "projects" / "kiln-230.toml", n, Path(tmp))
            lines = path.read_text().count("\n")
            times = []
            for _ in range(5):
                _line_index.cache_clear()
                t0 = time.perf_counter()
                p = load_project(path)
                times.append(time.perf_counter() - t0)
            t, k = min(times), len(p.stages)
            print(f"{k:7d} {lines:7d} {t * 1e3:6.1f} ms {t / k * 1e3:7.3f} ms")


if __name__ == "__main__":
    main()
