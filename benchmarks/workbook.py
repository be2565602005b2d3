"""How fast the workbook is: start to first full screen on each demo project, an accepted
edit to the updated table, and a whole-project Monte Carlo run (y on the first screen) with the
longest the UI's event loop waited meanwhile. Targets: < 1.5 s and < 100 ms. Prints figures;
asserts nothing.

    /tmp/venv/bin/python benchmarks/workbook.py [--stages 50]

Works on copies in a temp folder (never writes into projects/). ``--stages N`` also times a
generated project of N stages (copies of the kiln's stages) for responsiveness.
"""

from __future__ import annotations

import argparse
import asyncio
import re
import shutil
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def big_project(src: Path, n: int, dest: Path) -> Path:
    """The kiln project with its stage chain repeated until it has about ``n`` stages."""
    text = src.read_text()
    head, _, stages = text.partition("[stages.trigger]")
    stages = "[stages.trigger]" + stages
    ids = re.findall(r"^\[stages\.([a-z]+)\]", stages, re.MULTILINE)
    copies = max(1, n // len(ids))
    out = [head]
    for i in range(copies):
        block = stages
        for sid in ids:
            block = re.sub(rf'(\[stages\.){sid}\]', rf"\g<1>{sid}{i}]", block)
            block = re.sub(rf'= "{sid}"', f'= "{sid}{i}"', block)
        out.append(block)
    path = dest / f"big-{copies * len(ids)}.toml"
    path.write_text("\n".join(out))
    return path


async def time_open(path: Path) -> tuple[float, float]:
    """Seconds to the first painted screen and to the screen with every result."""
    from reviewer.tui.app import Workbook
    from reviewer.tui.session import Session

    t0 = time.perf_counter()
    app = Workbook(Session(path))
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        first = time.perf_counter() - t0
        while not app.session.computed:
            await pilot.pause(0.01)
        await pilot.pause()
        full = time.perf_counter() - t0
        app.session.close()
    return first, full


async def time_edit(path: Path, edit: tuple[str, str]) -> tuple[float, int]:
    """Seconds from accepting an edit to the updated checklist table, and the checks rerun."""
    from reviewer.tui.app import Workbook
    from reviewer.tui.session import Session

    app = Workbook(Session(path))
    async with app.run_test(size=(80, 24)) as pilot:
        while not app.session.computed:
            await pilot.pause(0.01)
        stage = edit[0].split(".")[1] if edit[0].startswith("stages.") else \
            next(iter(app.session.project.stages))
        app.open_stage(stage)
        await pilot.pause()
        state = app.session.propose(*edit)
        rerun = len(app.session.dependents([edit[0]]))
        t0 = time.perf_counter()
        app.screen._edited(state)
        while not app.session.computed:
            await pilot.pause(0.002)
        await pilot.pause()
        took = time.perf_counter() - t0
        app.session.close()
    return took, rerun


async def time_yield(path: Path, samples: int) -> tuple[float, int, float]:
    """Seconds for Monte Carlo on every check, the checks sampled, and the longest event-loop
    gap (ms) seen while it ran: the worker must not block the screen."""
    from reviewer.tui.app import Workbook
    from reviewer.tui.session import Session

    app = Workbook(Session(path))
    app.analyst.samples = samples
    async with app.run_test(size=(80, 24)) as pilot:
        while not app.session.computed:
            await pilot.pause(0.01)
        t0 = time.perf_counter()
        app.analyst.start_yield(None)
        gap, last = 0.0, time.perf_counter()
        while app.session.yield_progress is not None:
            await pilot.pause(0.01)
            now = time.perf_counter()
            gap, last = max(gap, now - last - 0.01), now
        took = time.perf_counter() - t0
        n = len(app.session.yields)
        app.session.close()
    return took, n, gap * 1000


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--stages", type=int, default=50)
    parser.add_argument("--samples", type=int, default=20_000,
                        help="Monte Carlo samples per check (the workbook's default)")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="latchbook-bench-") as tmp:
        work = Path(tmp)
        for p in (ROOT / "projects").glob("*.toml"):
            shutil.copyfile(p, work / p.name)
        edits = {"kiln-230.toml": ("stages.snubber.r", "56 ohm ±5%"),
                 "kiln-120.toml": ("stages.trigger.timing_c", "82 nF ±10%"),
                 "flasher-dc.toml": ("stages.blink.timing_c", "0.82 uF ±10%")}
        paths = sorted(work.glob("*.toml"))
        if args.stages:
            paths.append(big_project(work / "kiln-230.toml", args.stages, work))
        print(f"{'project':<18} {'first screen':>12} {'all results':>12} {'edit→table':>11} "
              f"{'rerun':>6}")
        for path in paths:
            first, full = asyncio.run(time_open(path))
            edit = edits.get(path.name, ("stages.snubber0.r", "56 ohm ±5%"))
            took, rerun = asyncio.run(time_edit(path, edit))
            print(f"{path.name:<18} {first:>10.3f} s {full:>10.3f} s {took * 1000:>8.0f} ms "
                  f"{rerun:>6}")
        print("targets: first full screen < 1.5 s; accepted edit to updated table < 100 ms")
        print(f"\n{'Monte Carlo':<18} {'all checks':>12} {'sampled':>8} {'max UI gap':>11}"
              f"   ({args.samples} samples per check)")
        for path in paths:
            took, n, gap = asyncio.run(time_yield(path, args.samples))
            print(f"{path.name:<18} {took:>10.2f} s {n:>8} {gap:>8.0f} ms")


if __name__ == "__main__":
    main()
