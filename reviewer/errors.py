"""The one error family: every message says where the problem is and what to type instead."""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Where:
    """A place in a user's file: the file, the TOML table, the key and (if known) the line."""

    file: str = ""
    table: str = ""
    key: str = ""
    line: int | None = None

    def text(self) -> str:
        """Render as ``file:line: [table] key``, leaving out what is unknown."""
        head = self.file or "<input>"
        if self.line:
            head += f":{self.line}"
        parts = [head]
        if self.table:
            parts.append(f"[{self.table}]")
        if self.key:
            parts.append(f"key `{self.key}`")
        return " ".join(parts)

    def child(self, key: str, *, table: str | None = None) -> Where:
        """A place one key further down."""
        return Where(self.file, self.table if table is None else table, key, self.line)


class LatchbookError(Exception):
    """A problem the user can fix; the message names the place and what to do."""

    def __init__(self, message: str, where: Where | None = None) -> None:
        self.where = where
        self.bare = message
        super().__init__(f"{where.text()}: {message}" if where else message)


class ProjectError(LatchbookError):
    """A project, checklist or review file that cannot be loaded as it is."""


class ValueGrammarError(ProjectError):
    """A value string or table that does not follow the value grammar."""


class RecordError(LatchbookError):
    """A review record that is broken, locked or changed underneath us."""


class UnsafeFileError(RecordError):
    """A file Latchbook will not read or write as it is: not a regular file, a symbolic link to
    write through, read-only, too large. Bad input (exit 2), unlike a refusal such as a lock."""


#: Exit codes of every command: 0 nothing wrong, 1 a check fails or the record does not hold
#: (refused by a rule, stale, does not verify), 2 input or environment the user must fix (a
#: bad file, a full disk, a size limit, permissions), 3 busy (another session holds the
#: project, or the wait for its lock ran out: try again later).
EXIT_OK, EXIT_WRONG, EXIT_INPUT, EXIT_BUSY = 0, 1, 2, 3

_FAULT_ERRNOS = {28, 122, 27, 30, 13, 1}  # ENOSPC, EDQUOT, EFBIG, EROFS, EACCES, EPERM


def environment_fault(exc: BaseException) -> OSError | None:
    """The OS error behind ``exc`` when it is one the user must fix (disk full, limits)."""
    seen = exc
    for _ in range(4):
        if isinstance(seen, OSError) and seen.errno in _FAULT_ERRNOS:
            return seen
        nxt = seen.__cause__ or seen.__context__
        if nxt is None:
            return None
        seen = nxt
    return None


def exit_code(exc: BaseException) -> int:
    """The exit code for an error that ended a command (see the codes above)."""
    if isinstance(exc, RecordError) and getattr(exc, "holder", None) is not None:
        return EXIT_BUSY  # a store.LockedError: someone holds the project
    if isinstance(exc, (ProjectError, UnsafeFileError)) or environment_fault(exc) is not None:
        return EXIT_INPUT
    return EXIT_WRONG
