"""The two tables of the workbook: stages with their counts, and one stage's checklist.

Both update their cells in place when results change, so the cursor stays on the row it was on;
they are rebuilt only when the set of rows changes. They post what the user picked; the screen
decides what happens.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass

from rich.cells import cell_len
from rich.text import Text
from textual.message import Message
from textual.widgets import DataTable

from reviewer.engine import Result
from reviewer.textsafe import visible
from reviewer.tolerance import Yield
from reviewer.tui import present
from reviewer.tui.session import StageCounts


@dataclass
class Row:
    """One row to show: its key and its cells."""

    key: str
    cells: tuple[Text, ...]


def nearest(current: str | None, keys: list[str], order: list[str]) -> str | None:
    """The key of ``keys`` the cursor should stand on when it stood on ``current``.

    ``current`` itself if it is still shown; else the first shown key after it in ``order``;
    else the last shown key before it; None when there is nothing to stand on.

    >>> nearest("b", ["a", "c"], ["a", "b", "c"]), nearest("c", ["a", "b"], ["a", "b", "c"])
    ('c', 'b')
    """
    if current is None or not keys:
        return None
    if current in keys:
        return current
    if current not in order:
        return None
    at = order.index(current)
    rank = {k: order.index(k) for k in keys if k in order}
    after = [k for k in keys if rank.get(k, -1) > at]
    before = [k for k in keys if -1 < rank.get(k, -1) < at]
    if after:
        return min(after, key=rank.__getitem__)
    if before:
        return max(before, key=rank.__getitem__)
    return None


class KeyedTable(DataTable[Text]):
    """A row-cursor DataTable whose rows are replaced in place by key."""

    COLUMNS: tuple[tuple[str, str, int | None], ...] = ()
    #: Rows as tall as their cells. The height is worked out here from the columns' widths
    #: (a cell whose lines all fit is as tall as its lines; only a longer one is wrapped)
    #: instead of by the DataTable, which renders every cell of every new row to measure it.
    AUTO_HEIGHT = False

    def __init__(self, **kw: object) -> None:
        super().__init__(cursor_type="row", zebra_stripes=False, **kw)  # type: ignore[arg-type]
        self._keys: list[str] = []
        self._last: str | None = None  # where the cursor stood before a filter emptied the table

    def on_mount(self) -> None:
        for label, key, width in self.COLUMNS:
            self.add_column(Text(label, style="bold"), key=key, width=width)

    def show_rows(self, rows: Iterable[Row], *, order: list[str] | None = None) -> None:
        """Put ``rows`` in the table: cell updates when the keys are unchanged, else a rebuild.

        On a rebuild the cursor stays on its row; when a filter took that row away it goes to
        the next row shown after it in ``order`` (every key, unfiltered), else the last before.
        Through a filter that shows nothing, the row it stood on is remembered.
        """
        rows = list(rows)
        keys = [r.key for r in rows]
        cols = [key for _, key, _ in self.COLUMNS]
        heights = [self.row_height(r.cells) for r in rows]
        if keys == self._keys and all(self.rows[r.key].height == h
                                      for r, h in zip(rows, heights, strict=True)):
            for r in rows:
                for col, cell in zip(cols, r.cells, strict=True):
                    if self.get_cell(r.key, col) != cell:
                        self.update_cell(r.key, col, cell)
            return
        current = self.current_key or self._last
        self.clear()
        for r, h in zip(rows, heights, strict=True):
            self.add_row(*r.cells, key=r.key, height=h)
        target = nearest(current, keys, order or [*self._keys, *keys])
        self._keys = keys
        self._last = current if not keys else None
        if target is not None:
            self.move_cursor(row=keys.index(target), animate=False)

    def row_height(self, cells: tuple[Text, ...]) -> int:
        """The lines a row of ``cells`` needs (1 unless :attr:`AUTO_HEIGHT`)."""
        if not self.AUTO_HEIGHT:
            return 1
        tallest = 1
        for (_, _, width), cell in zip(self.COLUMNS, cells, strict=True):
            lines = cell.plain.split("\n")
            if width is None or all(cell_len(line) <= width for line in lines):
                tallest = max(tallest, len(lines))
            else:
                tallest = max(tallest, len(cell.wrap(self.app.console, width)))
        return tallest

    @property
    def current_key(self) -> str | None:
        """The key of the row under the cursor."""
        if not self._keys or self.cursor_row < 0 or self.cursor_row >= len(self._keys):
            return None
        return self._keys[self.cursor_row]

    def select_key(self, key: str) -> None:
        """Put the cursor on the row ``key`` (if it is there)."""
        if key in self._keys:
            self.move_cursor(row=self._keys.index(key), animate=False)


def fold(word: str, width: int) -> Text:
    """``word`` on as many lines of ``width`` as it needs, broken after a hyphen (a stage kind
    such as ``capacitor-commutation`` is never cut)."""
    lines, line = [], ""
    for part in word.replace("-", "-\0").split("\0"):
        if line and len(line) + len(part) > width:
            lines.append(line)
            line = ""
        line += part
    lines.append(line)
    return Text("\n".join(lines))


class StageTable(KeyedTable):
    """Every stage with its result and review counts; Enter opens it. The result counts and
    the review counts are separate columns: a waived failure is in ``fail`` and in ``waiv``."""

    AUTO_HEIGHT = True  # a stage kind folds over two lines at 80 columns
    COLUMNS = (("stage", "stage", 11), ("kind", "kind", 13), ("worst", "state", 12),
               ("pass", "pass", 4), ("marg", "marginal", 4), ("fail", "fail", 4),
               ("waiv", "waived", 4), ("stale", "stale", 5), ("unsg", "unsigned", 4))

    class StageChosen(Message):
        """The user opened a stage."""

        def __init__(self, stage: str) -> None:
            super().__init__()
            self.stage = stage

    def show(self, rows: list[StageCounts], computing: bool, *,
             order: list[str] | None = None) -> None:
        """Show the counts of the stages in ``rows`` (``order``: every stage, unfiltered)."""
        def row(c: StageCounts) -> Row:
            state = present.status_text("" if computing and not c.counts else c.state)
            kind = fold(visible(c.kind), 13)
            kind.stylize("dim")
            return Row(c.stage, (
                Text(visible(c.stage)), kind, state,
                present.count_text(c.counts.get("pass", 0), "green"),
                present.count_text(c.counts.get("marginal", 0), "yellow"),
                present.count_text(c.attention, "bold red"),
                present.count_text(c.waived, "magenta"),
                present.count_text(c.stale, "bold yellow"),
                present.count_text(c.unsigned)))
        self.show_rows((row(c) for c in rows), order=order)

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        event.stop()
        if event.row_key.value is not None:
            self.post_message(self.StageChosen(str(event.row_key.value)))


class ChecklistTable(KeyedTable):
    """One stage's checks: result, worst against limit, margin, Monte Carlo fail fraction,
    and the review state in a column of its own; a check whose result changed with the last
    edit is marked Δ."""

    # The margin column is wide enough for every form reviewer.fmt.margin writes ("needs
    # > 100×"); the worst ratio against its limit is in the detail and the stage's summary.
    COLUMNS = (("check", "check", 25), ("result", "result", 12), ("margin", "margin", 12),
               ("MC fail", "yield", 9), ("review", "sign", 10))

    class CheckHighlighted(Message):
        """The cursor moved to a check."""

        def __init__(self, check: str) -> None:
            super().__init__()
            self.check = check

    class CheckChosen(Message):
        """The user opened a check's detail."""

        def __init__(self, check: str) -> None:
            super().__init__()
            self.check = check

    def show(self, checks: list[str], results: Mapping[str, Result], *,
             review: Callable[[str], str], changed: set[str],
             signing: bool,
             yields: Callable[[str], Yield | None] = lambda c: None,
             order: list[str] | None = None) -> None:
        """Show the checks of a stage (a check without a result yet shows "computing");
        ``order``: every check of the stage, when ``checks`` is filtered."""
        rows = []
        for cid in checks:
            r = results.get(cid)
            st = review(cid)
            status = "" if r is None else r.status
            name = Text(visible(cid))
            if cid in changed:
                name.append("Δ", style="bold yellow")
            rows.append(Row(cid, (
                name, present.status_text(status),
                present.margin_text(r.margin if r else None, status=r.status if r else ""),
                present.yield_cell(yields(cid)),
                present.sign_text(st, signing))))
        self.show_rows(rows, order=order)

    def on_data_table_row_highlighted(self, event: DataTable.RowHighlighted) -> None:
        event.stop()
        if event.row_key.value is not None:
            self.post_message(self.CheckHighlighted(str(event.row_key.value)))

    def on_data_table_row_selected(self, event: DataTable.RowSelected) -> None:
        event.stop()
        if event.row_key.value is not None:
            self.post_message(self.CheckChosen(str(event.row_key.value)))
