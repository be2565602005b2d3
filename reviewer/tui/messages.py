"""Messages the app sends to the screen on top when the state of the project changes."""

from __future__ import annotations

from textual.message import Message


class ResultsChanged(Message):
    """New results arrived (``done``: every check of the current state has its result)."""

    def __init__(self, done: bool) -> None:
        super().__init__()
        self.done = done


class ProjectChanged(Message):
    """The project text changed (an edit, undo, redo, a save or a sign-off)."""


class AnalysisChanged(Message):
    """A Monte Carlo run or a design aid made progress or finished."""
