"""`status --matrix` over a generated 200-variant product line.

Writes the kiln base project (with its checklist and review record) and ``N`` variants of it
(``variant_of``, each changing the line voltage, the timing capacitor, the element and the
snubber capacitor) into a temporary folder, then times the product-line matrix twice in this
process (:func:`reviewer.line.status_matrix`: every project loaded and computed once) and once
through the command line in a fresh interpreter (``latchbook status --matrix``, imports and
rendering included). Prints seconds in total and milliseconds per project.

    python -m benchmarks.status_line [N]
"""

from __future__ import annotations

import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
LINE = ROOT / "projects" / "kiln-line"
BASE_FILES = ("kiln-base.toml", "kiln-base.review.toml", "kiln-line.checklist.toml")

VOLTS = ("230 V +10% -10%", "220 V +10% -10%", "240 V +6% -10%")
TIMING_C = ("180 nF ±10%", "220 nF ±10%", "220 nF ±5%", "270 nF ±10%")
ELEMENT = (("48 ohm ±5%", "44 ohm"), ("36 ohm ±5%", "33 ohm"), ("24 ohm ±5%", "22 ohm"),
           ("60 ohm ±5%", "55 ohm"))
SNUB_C = ("100 nF ±10%", "68 nF ±10%", "150 nF ±10%")


def variant_text(i: int, rng: np.random.Generator) -> str:
    """One variant of kiln-base.toml: a few values changed, everything else inherited."""
    r, r_cold = ELEMENT[int(rng.integers(len(ELEMENT)))]
    return "\n".join([
        f"# Generated variant {i} of the kiln line (benchmark data).",
        "[project]",
        f'name = "Kiln controller, variant {i:03d}"',
        'revision = "A"',
        'variant_of = "kiln-base.toml"',
        "",
        "[supply]",
        f'voltage = "{VOLTS[int(rng.integers(len(VOLTS)))]}"',
        "",
        "[stages.trigger]",
        f'timing_c = "{TIMING_C[int(rng.integers(len(TIMING_C)))]}"',
        "",
        "[stages.power]",
        f'load = {{ r = "{r}", cold_r = "{r_cold}" }}',
        "",
        "[stages.snubber]",
        f'c = "{SNUB_C[int(rng.integers(len(SNUB_C)))]}"',
        "",
    ])


def write_line(folder: Path, n: int) -> int:
    """The base and ``n`` variants in ``folder``; returns how many project files there are."""
    for name in BASE_FILES:
        shutil.copy(LINE / name, folder / name)
    rng = np.random.default_rng(7)
    for i in range(n):
        (folder / f"variant-{i:03d}.toml").write_text(variant_text(i, rng), encoding="utf-8")
    return n + 1


def cli() -> list[str]:
    """The ``latchbook`` command of this interpreter's environment."""
    exe = Path(sys.executable).with_name("latchbook")
    if exe.exists():
        return [str(exe)]
    return [sys.executable, "-c", "import sys; from reviewer.cli import main; sys.exit(main())"]


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 200
    from reviewer.line import status_matrix

    with tempfile.TemporaryDirectory(prefix="latchbook-line-") as tmp:
        folder = Path(tmp)
        count = write_line(folder, n)
        print(f"product line: kiln-base.toml and {n} variants ({count} projects) in a temp "
              "folder")
        for label in ("in-process status_matrix (first)", "in-process status_matrix (again)"):
            t0 = time.perf_counter()
            m = status_matrix([folder])
            dt = time.perf_counter() - t0
            states: dict[str, int] = {}
            for r in m.rows:
                states[r.state] = states.get(r.state, 0) + 1
            print(f"{label:38} {dt:7.2f} s  {dt / len(m.rows) * 1e3:7.1f} ms/project  "
                  f"rows {len(m.rows)}  states {dict(sorted(states.items()))}")
        t0 = time.perf_counter()
        proc = subprocess.run([*cli(), "status", "--matrix", str(folder)], capture_output=True,
                              text=True, cwd=ROOT)
        dt = time.perf_counter() - t0
        lines = proc.stdout.count("\n")
        print(f"{'CLI: latchbook status --matrix':38} {dt:7.2f} s  {dt / count * 1e3:7.1f} "
              f"ms/project  exit {proc.returncode}, {lines} lines of output")
        if proc.returncode not in (0, 1):
            print(proc.stderr[-2000:])


if __name__ == "__main__":
    main()
