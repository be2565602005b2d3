"""What the workbook does with a defect it did not expect: keep the unsaved edits, keep the
traceback in a file, and say in plain words that it is a defect and where to report it.
``run_app`` then exits with :data:`CRASHED` (0 ok, 1 a check fails, 2 bad input, 3 busy)."""

from __future__ import annotations

import tempfile
import traceback
from pathlib import Path
from typing import Any

CRASHED = 4
REPORT_TO = "the Latchbook maintainers (attach the crash file; it holds no project data)"


def keep_and_explain(session: Any, error: BaseException, tag: str) -> str:
    """Write the journal and the traceback file; return the message for stderr. Never raises
    (reporting a crash must not crash)."""
    try:
        session.write_journal()
        kept = "your unsaved edits are kept; the next open offers them back" \
            if session.dirty else "there were no unsaved edits"
    except Exception as exc:  # noqa: BLE001
        kept = f"the unsaved edits could not be kept ({exc})"
    crash = Path(tempfile.gettempdir()) / f"latchbook-crash-{tag}.txt"
    try:
        crash.write_text("".join(traceback.format_exception(error)), encoding="utf-8")
        where = f"the traceback is in {crash}"
    except OSError:
        where = "the traceback is printed above"
    return (f"latchbook: the workbook stopped on an internal error ({type(error).__name__}: "
            f"{error}); {kept}; {where}. This is a defect, not your mistake: please report "
            f"it to {REPORT_TO}.")
