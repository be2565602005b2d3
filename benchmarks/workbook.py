"""How fast the workbook is, as a reviewer feels it: start to first full screen, and an
accepted edit (Enter in the edit dialog) to the updated checklist table, timed two ways:

- **through a real terminal**: the workbook runs as its own process (``latchbook open``) in a
  tmux pane of 80×24; the script types into the pane and polls ``tmux capture-pane`` for what
  a person would see (every result in, or the table with the edit's results). This is what
  the user waits for: process start, imports, the engine, the repaint, the terminal.
- **in-process** (Textual's pilot): the same steps without the terminal, to show where the
  time goes.

Also a whole-project Monte Carlo run (y) with the longest the UI's event loop waited meanwhile.
Targets: first full screen < 1 s (50 stages too), edit → table < 50 ms median. Prints figures;
asserts nothing. Without tmux (``apt-get install -y tmux``) the terminal part says so and is
skipped.

    python -m benchmarks.workbook [--stages 50] [--edits 15] [--no-yield] [--only TEXT]
                                  [--no-tmux]

Works on copies in a temp folder (never writes into projects/). ``--stages N`` also times a
generated project of N stages (copies of the kiln's stages).
"""

from __future__ import annotations

import argparse
import asyncio
import os
import re
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


#: The edits the earlier figures were measured with; any other project gets one chosen by
#: :func:`choose_edit`.
KNOWN_EDITS = {
    "kiln-230.toml": ("snubber", "stages.snubber.r",
                      ["56 ohm ±5%", "68 ohm ±5%", "82 ohm ±5%", "39 ohm ±5%"]),
    "kiln-120.toml": ("snubber", "stages.snubber.r",
                      ["56 ohm ±5%", "68 ohm ±5%", "82 ohm ±5%", "39 ohm ±5%"]),
    "flasher-dc.toml": ("blink", "stages.blink.timing_c",
                        ["0.82 uF ±10%", "0.68 uF ±10%", "1.2 uF ±10%", "0.56 uF ±10%"]),
}
_UNIT = {"resistance": ("ohm", 1.0), "capacitance": ("uF", 1e-6)}


def choose_edit(path: Path) -> tuple[str, str, list[str]]:
    """A value a designer chooses, for timing edits: the first resistor (else capacitor) of a
    stage that varies, with four values around it (each differs from the one before).

    Returns (stage, path of the value, values to type). Works on any project: the stage and
    key come from the loaded file, not from names a demo happens to use.
    """
    from reviewer.model import Value
    from reviewer.project import load_project

    if path.name in KNOWN_EDITS:
        return KNOWN_EDITS[path.name]
    if path.name.startswith("big-"):  # copies of the kiln: its first snubber, as before
        return ("snubber0", "stages.snubber0.r", KNOWN_EDITS["kiln-230.toml"][2])
    project = load_project(path)
    for dim in _UNIT:
        for sid, stage in project.stages.items():
            todo = [(f"stages.{sid}.{k}", v) for k, v in stage.params.items()]
            while todo:
                key, v = todo.pop(0)
                if isinstance(v, dict) and key.count(".") == 2:  # one level, as the picker
                    todo += [(f"{key}.{k}", x) for k, x in v.items()]
                elif isinstance(v, Value) and v.dim == dim and v.nom > 0 and not v.is_range:
                    unit, scale = _UNIT[dim]
                    tol = re.search(r"±\s*[\d.]+\s*%", v.text or "")
                    tail = f" {tol.group(0)}" if tol else ""
                    vals = [f"{v.nom * f / scale:.3g} {unit}{tail}"
                            for f in (0.82, 0.68, 1.2, 0.56)]
                    return sid, key, vals
    raise SystemExit(f"{path.name}: no resistor or capacitor value to edit in any stage")


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


# -- through a real terminal (tmux) ----------------------------------------------------------

#: tmux on a server of this script's own (not the default socket other tmux users share: a
#: session ending there, or a server restarted by someone else, must not disturb a timing).
TMUX = ["tmux", "-L", f"latchbook-bench-{os.getpid()}"]


class Pane:
    """A tmux session of 80×24 running the workbook on one project."""

    def __init__(self, project: Path, name: str, width: int = 80, height: int = 24) -> None:
        self.name = name
        cmd = (f"cd {project.parent} && exec {sys.executable} -c "
               "'import sys; from reviewer.cli import main; sys.exit(main())' "
               f"open {project.name}")
        env = {**os.environ, "PYTHONPATH": str(ROOT), "TERM": "xterm-256color"}
        subprocess.run([*TMUX, "kill-session", "-t", name], capture_output=True)
        for _ in range(5):  # the last session's end stops the server: it may be exiting
            self.started = time.perf_counter()
            done = subprocess.run([*TMUX, "new-session", "-d", "-s", name, "-x", str(width),
                                   "-y", str(height), cmd], env=env, capture_output=True)
            if done.returncode == 0:
                break
            time.sleep(0.2)
        else:
            raise RuntimeError(f"tmux could not start: {done.stderr.decode().strip()}")

    def text(self) -> str:
        out = subprocess.run([*TMUX, "capture-pane", "-p", "-t", self.name],
                             capture_output=True, text=True)
        return out.stdout

    def keys(self, *keys: str, literal: bool = False) -> None:
        subprocess.run([*TMUX, "send-keys", "-t", self.name, *(["-l"] if literal else []),
                        *keys], check=True)

    def type_into(self, text: str, tries: int = 5) -> None:
        """Type ``text`` into the focused input, again if it did not show (a key sent while
        a dialog is still mounting goes nowhere); waits until it shows."""
        for _ in range(tries):
            self.keys("C-u")
            self.keys(text, literal=True)
            try:
                self.wait(lambda t: f"▊  {text}" in t, timeout=5.0)  # in the input box
            except TimeoutError:
                continue
            time.sleep(0.1)  # settled (untimed): the next key acts on what is shown
            return
        raise TimeoutError(f"could not type {text!r}:\n{self.text()}")

    def wait(self, ok, timeout: float = 30.0) -> float:
        """Poll the pane until ``ok(text)``; returns the seconds waited (from now)."""
        t0 = time.perf_counter()
        while time.perf_counter() - t0 < timeout:
            if ok(self.text()):
                return time.perf_counter() - t0
            time.sleep(0.002)
        raise TimeoutError(f"the pane never showed what was waited for:\n{self.text()}")

    def close(self) -> None:
        subprocess.run([*TMUX, "kill-session", "-t", self.name], capture_output=True)


#: A row of the pick dialog's list: "▊ • path" or "▊   path" (the filter's input line is
#: "▊  typed", one space fewer, and is not matched).
_LISTED = re.compile(r"▊ [• ] ((?:stages|parts|supply|conditions)\.[\w.-]+)")


def first_listed(text: str) -> str | None:
    """The first value path listed in the pick dialog."""
    for line in text.splitlines():
        m = _LISTED.search(line)
        if m:
            return m.group(1)
    return None


def full_screen(text: str) -> bool:
    """Every result in: the totals line is there and nothing says computing/pending."""
    return re.search(r"\d+ stages, \d+ checks:", text) is not None and \
        "computing" not in text and "pending" not in text


def tmux_open(path: Path) -> float:
    """Seconds from starting the process to the first screen with every result."""
    pane = Pane(path, f"lb-open-{os.getpid()}")
    try:
        pane.wait(full_screen)
        return time.perf_counter() - pane.started
    finally:
        pane.close()


def tmux_edits(path: Path, stage: str, key: str, values: list[str], n: int) -> list[float]:
    """Seconds from Enter in the edit dialog to the checklist showing that edit's results.

    The stage's checklist is opened through the palette; each edit goes e → type the path →
    Enter → type the value → Enter (the timed key). The table is updated when the dialog is
    gone and a changed row (Δ) shows: the edit itself clears the Δ marks, so a Δ after the
    dialog closed is drawn from this edit's results (every value differs from the last).
    """
    pane = Pane(path, f"lb-edit-{os.getpid()}")
    out: list[float] = []
    try:
        pane.wait(full_screen)
        pane.keys("C-p")
        pane.wait(lambda t: "Find" in t or "Search" in t or "Stage" in t)
        pane.keys(f"Stage {stage} (", literal=True)
        time.sleep(0.4)
        pane.keys("Enter")
        pane.wait(lambda t: f"› {stage}" in t)
        for i in range(n):
            value = values[i % len(values)]
            pane.keys("e")
            pane.wait(lambda t: "type to narrow" in t)
            pane.type_into(key)
            # untimed: Enter takes the first of the list, so wait until the list has narrowed
            # to the typed path (a path typed in full comes first)
            pane.wait(lambda t: first_listed(t) == key, timeout=10.0)
            pane.keys("Enter")
            pane.wait(lambda t: f"Change {key}" in t)
            for _ in range(5):
                pane.type_into(value)
                t0 = time.perf_counter()
                pane.keys("Enter")
                pane.wait(lambda t: ("Δ" in t and "Change " not in t) or "✗ empty" in t)
                took = time.perf_counter() - t0
                if "✗ empty" not in pane.text():
                    break
                # The typed text was lost before Enter (a tmux/terminal race, not the
                # workbook): type it again; this try is not counted.
            out.append(took)
            time.sleep(0.2)
    finally:
        pane.close()
    return out


def has_tmux() -> bool:
    return shutil.which("tmux") is not None


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--stages", type=int, default=50)
    parser.add_argument("--edits", type=int, default=15, help="edits timed per project")
    parser.add_argument("--samples", type=int, default=20_000,
                        help="Monte Carlo samples per check (the workbook's default)")
    parser.add_argument("--no-yield", action="store_true", help="skip the Monte Carlo part")
    parser.add_argument("--only", metavar="TEXT", help="only the projects whose file name has TEXT")
    parser.add_argument("--no-tmux", action="store_true", help="skip the terminal part")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="latchbook-bench-", ignore_cleanup_errors=True) as tmp:
        work = Path(tmp)
        for p in (ROOT / "projects").glob("*.toml"):
            shutil.copyfile(p, work / p.name)
        paths = sorted(work.glob("*.toml"))
        if args.stages:
            paths.append(big_project(work / "kiln-230.toml", args.stages, work))
        if args.only:
            paths = [p for p in paths if args.only in p.name]
        edits = {p.name: choose_edit(p) for p in paths}
        print("load average (1, 5, 15 min): " + ", ".join(f"{x:.2f}" for x in os.getloadavg()))
        for p in paths:
            stage, key, vals = edits[p.name]
            print(f"  {p.name}: edits {key} ({', '.join(vals)})")
        print("through a real terminal (tmux, 80×24, the workbook as its own process)")
        if args.no_tmux:
            print("  skipped (--no-tmux)")
        elif not has_tmux():
            print("  tmux is not installed (apt-get install -y tmux): skipped")
        else:
            print(f"{'project':<18} {'first full screen':>17} {'edit→table median':>18} "
                  f"{'min':>6} {'max':>6}  (n)")
            for path in paths:
                stage, key, vals = edits[path.name]
                opened = statistics.median(tmux_open(path) for _ in range(3))
                # Each run edits a fresh copy, so every edit is a new unsaved one.
                copy = path.with_name(f"t-{path.name}")
                shutil.copyfile(path, copy)
                try:
                    took = [t * 1000 for t in tmux_edits(copy, stage, key, vals, args.edits)]
                except TimeoutError as exc:
                    print(f"{path.name:<18} could not drive the pane: {str(exc)[-1500:]}")
                    continue
                copy.unlink()
                for side in copy.parent.glob(f"{copy.stem}.*"):
                    side.unlink()
                print(f"{path.name:<18} {opened:>15.3f} s {statistics.median(took):>15.0f} ms "
                      f"{min(took):>4.0f}ms {max(took):>4.0f}ms  ({len(took)})")
        print("\nin-process (Textual pilot, no terminal)")
        print(f"{'project':<18} {'first screen':>12} {'all results':>12} {'edit→table':>11} "
              f"{'rerun':>6}")
        for path in paths:
            first, full = asyncio.run(time_open(path))
            stage, key, vals = edits[path.name]
            took, rerun = asyncio.run(time_edit(path, (key, vals[0])))
            print(f"{path.name:<18} {first:>10.3f} s {full:>10.3f} s {took * 1000:>8.0f} ms "
                  f"{rerun:>6}")
        print("targets: first full screen < 1 s; accepted edit to updated table < 50 ms")
        if args.no_yield:
            return
        print(f"\n{'Monte Carlo':<18} {'all checks':>12} {'sampled':>8} {'max UI gap':>11}"
              f"   ({args.samples} samples per check)")
        for path in paths:
            took, n, gap = asyncio.run(time_yield(path, args.samples))
            print(f"{path.name:<18} {took:>10.2f} s {n:>8} {gap:>8.0f} ms")


if __name__ == "__main__":
    main()
