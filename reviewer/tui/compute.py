"""Computing in the background: the engine, Monte Carlo and the design aids run in thread
workers.

The screen stays responsive while they run; the results of one run reach the session on the
UI thread in one delivery (one repaint, not one per stage), and results of a state the user
has already left are dropped (the session's generation counter; yields and aids are kept with
the inputs hash they sampled).
"""

from __future__ import annotations

import gc
import time
from typing import Any

from textual.app import App
from textual.worker import Worker, WorkerState, get_current_worker

from reviewer.aids import Aid, passing_range
from reviewer.engine import Result
from reviewer.tolerance import Yield, monte_carlo_all
from reviewer.tui.analysis import DISTRIBUTION, SAMPLES, SEED
from reviewer.tui.messages import AnalysisChanged, ResultsChanged
from reviewer.tui.session import Session


class Computer:
    """Starts the engine for a session and delivers what it finds to the app's top screen.

    A small recomputation (an edit's dependents, expected under :attr:`INLINE` seconds from
    the measured cost per check) runs on the UI thread and the caller repaints: the screen
    then repaints once, with the new results, instead of once for the edit and again when a
    worker hands them over. The cost per check is the computing thread's own CPU time, so a
    first run that shared the processor with the first paint (or a busy machine) does not
    make every later edit look too big to run inline.
    Anything larger runs in a worker and the screen stays responsive; a run of the whole
    project (opening it) hands over what it has every :attr:`PARTIAL` seconds, so a large
    project's table fills stage by stage instead of all at the end. The first run starts
    after the first paint: the table is on the screen before the engine competes with it.
    """

    GROUP = "compute"
    INLINE = 0.06
    PARTIAL = 0.25

    def __init__(self, app: App[Any], session: Session) -> None:
        self.app = app
        self.session = session
        self.last_seconds = 0.0
        self.started = 0.0
        self.per_check: float | None = None  # seconds per check, from the last run
        self.frozen = False

    def start(self, paths: list[str] | None) -> Worker[None] | None:
        """Recompute the checks that depend on ``paths`` (None: every check)."""
        gen, project, groups = self.session.plan(paths)
        self.started = time.perf_counter()
        keys = [k for g in groups for k in g]
        session = self.session
        if paths is not None and self.per_check is not None and \
                len(keys) * self.per_check < self.INLINE:
            cpu = time.thread_time()
            results = session.compute(project, keys) if keys else []
            self._measure(len(keys), time.thread_time() - cpu)
            # The caller (an edit, undo or redo) repaints right after: no message, so the
            # screen is not refreshed a second time for the same results.
            self._deliver(gen, results, True, tell=False)
            return None

        def work() -> None:
            cpu = time.thread_time()
            batch: list[Result] = []
            last = time.perf_counter()

            def arrived(r: Result) -> None:
                nonlocal last
                batch.append(r)
                if paths is None and time.perf_counter() - last >= self.PARTIAL:
                    self.app.call_from_thread(self._deliver, gen, batch.copy(), False)
                    batch.clear()
                    last = time.perf_counter()

            results = session.compute(project, keys, arrived) if keys else []
            self._measure(len(keys), time.thread_time() - cpu)
            self.app.call_from_thread(self._deliver, gen, results, True)

        return self.app.run_worker(work, name="engine", group=self.GROUP, thread=True,
                                   exit_on_error=False, exclusive=True,
                                   description="recompute the checks")

    def _measure(self, n: int, cpu: float) -> None:
        if n:
            self.per_check = cpu / n

    def _deliver(self, gen: int, results: list[Any], done: bool, *, tell: bool = True) -> None:
        changed = self.session.accept(gen, results, done=done)
        if changed is None:
            return
        if done:
            self.last_seconds = time.perf_counter() - self.started
            if not self.frozen:
                self.frozen = True
                self.app.call_after_refresh(self._freeze)
        if tell:
            self.app.screen.post_message(ResultsChanged(done))

    @staticmethod
    def _freeze() -> None:
        """Once the first results are shown: what is alive now (modules, the screens, the
        results) lives as long as the workbook, so the garbage collector stops scanning it.
        A full collection over it took 40–60 ms and came in the middle of an edit."""
        gc.freeze()

    def on_state(self, event: Worker.StateChanged) -> None:
        """Report a failed computation instead of ending the app (exit_on_error=False)."""
        if event.worker.group != self.GROUP or event.state != WorkerState.ERROR:
            return
        err = event.worker.error
        self.app.notify(f"the computation failed: {type(err).__name__}: {err}",
                        title="engine", severity="error", timeout=15, markup=False)
        self.session.computed = True


class Analyst:
    """Monte Carlo yield and design aids in thread workers, delivered to the top screen.

    Monte Carlo samples every check together through :func:`reviewer.tolerance.monte_carlo_all`
    (as ``latchbook check --monte-carlo`` does: each part's draws and the firing angle shared
    among the checks, chunk by chunk); the banner counts the samples, and the yields arrive in
    one delivery. A new run replaces a running one (exclusive). A design aid is computed once
    per (check, inputs hash, input).
    """

    YIELD = "yield"
    AID = "aid"

    def __init__(self, app: App[Any], session: Session) -> None:
        self.app = app
        self.session = session
        self.samples = SAMPLES
        self.seed = SEED
        self.distribution = DISTRIBUTION

    def _tell(self) -> None:
        self.app.screen.post_message(AnalysisChanged())

    def start_yield(self, stage: str | None) -> Worker[None] | None:
        """Run Monte Carlo on the checks of ``stage`` (None: the whole project)."""
        s = self.session
        if not s.computed:
            self.app.notify("the checks are still being computed: try again when they are "
                            "done", severity="warning", markup=False)
            return None
        results = [r for r in s.run.results if r.evaluation is not None
                   and (stage is None or r.stage == stage)]
        if not results:
            self.app.notify("no computed check to sample here", markup=False)
            return None
        n, seed, dist = self.samples, self.seed, self.distribution
        s.yield_progress = (0, n)
        self._tell()

        def work() -> None:
            me = get_current_worker()

            def progress(done: int) -> bool:
                if me.is_cancelled:
                    return False
                if done < n:
                    self.app.call_from_thread(self._yield_progress, done, n)
                return True

            yields = monte_carlo_all(results, n, seed=seed, distribution=dist,
                                     keep_values=True, progress=progress)
            if not me.is_cancelled:
                self.app.call_from_thread(self._yields_done, results, yields)

        where = f"stage {stage}" if stage else "the whole project"
        self.app.notify(f"Monte Carlo on {where}: {len(results)} checks × {n} samples "
                        f"(seed {seed}, {dist})", markup=False)
        return self.app.run_worker(work, name="Monte Carlo", group=self.YIELD, thread=True,
                                   exit_on_error=False, exclusive=True,
                                   description=f"Monte Carlo on {where}")

    def _yield_progress(self, done: int, total: int) -> None:
        if self.session.yield_progress is not None:  # not after the yields arrived
            self.session.yield_progress = (done, total)
            self._tell()

    def _yields_done(self, results: list[Result], yields: dict[tuple[str, str], Yield]) -> None:
        for r in results:
            self.session.store_yield(r, yields.get((r.stage, r.check)))
        self.session.yield_progress = None
        self._tell()

    def start_aid(self, result: Result, name: str) -> None:
        """Compute the passing range of input ``name`` for ``result`` (once)."""
        s = self.session
        key = s.aid_key(result, name)
        if key in s.aids or key in s.aid_pending:
            return
        s.aid_pending.add(key)

        def work() -> None:
            try:
                aid = passing_range(result, name)
            except Exception:
                self.app.call_from_thread(s.aid_pending.discard, key)
                raise
            self.app.call_from_thread(self._aid_done, key, aid)

        self.app.run_worker(work, name="design aid", group=self.AID, thread=True,
                            exit_on_error=False, description=f"passing range of {name}")

    def _aid_done(self, key: tuple[str, str, str, str], aid: Aid | None) -> None:
        self.session.aid_pending.discard(key)
        self.session.aids[key] = aid
        self._tell()

    def on_state(self, event: Worker.StateChanged) -> None:
        """A failed run is reported and its progress cleared (exit_on_error=False)."""
        if event.state != WorkerState.ERROR:
            return
        if event.worker.group == self.YIELD:
            self.session.yield_progress = None
        err = event.worker.error
        self.app.notify(f"{event.worker.name} failed: {type(err).__name__}: {err}",
                        severity="error", timeout=15, markup=False)
        self._tell()
