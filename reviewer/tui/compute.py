"""Recomputing in the background: the engine runs in a thread worker, stage by stage.

The screen stays responsive while it runs; each stage's results are handed to the session on
the UI thread as they come, and results of a state the user has already left are dropped (the
session's generation counter).
"""

from __future__ import annotations

import time
from typing import Any

from textual.app import App
from textual.worker import Worker, WorkerState

from reviewer.tui.messages import ResultsChanged
from reviewer.tui.session import Session


class Computer:
    """Starts the engine for a session and delivers what it finds to the app's top screen."""

    GROUP = "compute"

    def __init__(self, app: App[Any], session: Session) -> None:
        self.app = app
        self.session = session
        self.last_seconds = 0.0
        self.started = 0.0

    def start(self, paths: list[str] | None) -> Worker[None]:
        """Recompute the checks that depend on ``paths`` (None: every check)."""
        gen, project, groups = self.session.plan(paths)
        self.started = time.perf_counter()

        def work() -> None:
            for keys in groups:
                results = self.session.compute(project, keys)
                self.app.call_from_thread(self._deliver, gen, results, False)
            self.app.call_from_thread(self._deliver, gen, [], True)

        return self.app.run_worker(work, name="engine", group=self.GROUP, thread=True,
                                   exit_on_error=False, exclusive=True,
                                   description="recompute the checks")

    def _deliver(self, gen: int, results: list[Any], done: bool) -> None:
        changed = self.session.accept(gen, results, done=done)
        if changed is None:
            return
        if done:
            self.last_seconds = time.perf_counter() - self.started
        self.app.screen.post_message(ResultsChanged(done))

    def on_state(self, event: Worker.StateChanged) -> None:
        """Report a failed computation instead of ending the app (exit_on_error=False)."""
        if event.worker.group != self.GROUP or event.state != WorkerState.ERROR:
            return
        err = event.worker.error
        self.app.notify(f"the computation failed: {type(err).__name__}: {err}",
                        title="engine", severity="error", timeout=15, markup=False)
        self.session.computed = True
