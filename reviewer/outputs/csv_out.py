"""One CSV row per check of every project, for the spreadsheet people will still open.

Columns: file, project, revision, variant_of, stage, check, result, review (empty without a
review record), margin (a fraction: 0.25 is 25 % of headroom), the value judged at the worst
corner with its name and unit, and the summary. Numbers are written in full precision with a
dot, so a spreadsheet in any locale can read them with its CSV import.
"""

from __future__ import annotations

import csv
import shutil
import tempfile
from pathlib import Path
from typing import Any

from reviewer.batch import ProjectResult
from reviewer.outputs.document import review_of

COLUMNS = ("file", "project", "revision", "variant_of", "stage", "check", "result", "review",
           "margin", "worst_value", "value_name", "unit", "summary")


def _num(x: float | None) -> str:
    return "" if x is None else repr(float(x))


def rows(pr: ProjectResult) -> list[list[str]]:
    """The rows of one project (one row with the error when it could not be read)."""
    if pr.error:
        return [[pr.file, "", "", "", "", "", "error", "", "", "", "", "", pr.error]]
    from reviewer.registry import CHECKS

    p = pr.run.project
    out = []
    for r in pr.run.results:
        key = (r.stage, r.check)
        at = pr.at_worst.get(key, {})
        name = next(iter(at), "")
        defn = CHECKS.get(r.check)
        unit = defn.units.get(name, "") if defn is not None and name else ""
        out.append([pr.file, p.name, p.revision, str(p.variant_of or ""), r.stage, r.check,
                    r.status, review_of(pr, key) or "", _num(r.margin),
                    _num(at.get(name)) if name else "", name, unit, r.summary])
    return out


class CsvWriter:
    """Spools rows as projects come; :meth:`close` writes the file (atomically)."""

    def __init__(self, path: str | Path) -> None:
        self.path = Path(path)
        self.spool: Any = tempfile.TemporaryFile("w+", encoding="utf-8", newline="")  # noqa: SIM115
        self._w = csv.writer(self.spool)
        self._w.writerow(COLUMNS)

    def add(self, pr: ProjectResult) -> None:
        """Add one project's rows."""
        self._w.writerows(rows(pr))

    def close(self) -> Path:
        """Write the file; any old one is replaced only now."""
        from reviewer.store import atomic_stream

        try:
            with atomic_stream(self.path) as out:
                self.spool.seek(0)
                shutil.copyfileobj(self.spool, out)
        finally:
            self.spool.close()
        return self.path


__all__ = ["COLUMNS", "CsvWriter", "rows"]
