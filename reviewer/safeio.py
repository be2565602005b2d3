"""Reading a user's file without trusting it: regular files only, at most a limit of bytes,
TOML nested no deeper than a limit.

A named pipe would block a reader forever, ``/dev/zero`` never ends, a symlink loop raises
inside ``pathlib``. :func:`read_regular` looks at what the path is *before* opening it, opens
without blocking, checks again on the open descriptor (the path may have been swapped in
between), and reads at most ``limit + 1`` bytes. :func:`load_toml` refuses thousands of nested
arrays or inline tables (the parser would exhaust the stack) with the file and the line.
"""

from __future__ import annotations

import errno
import os
import stat
import tomllib
from pathlib import Path
from typing import Any

from reviewer.errors import LatchbookError, ProjectError, Where


def _kind(mode: int) -> str:
    if stat.S_ISFIFO(mode):
        return "a named pipe (FIFO)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def _link_text(path: str | Path) -> str:
    try:
        return f"a symbolic link (to {os.readlink(path)})"
    except OSError:
        return "a symbolic link"


def read_regular(path: str | Path, limit: int,
                 error: type[LatchbookError] = ProjectError, what: str = "file", *,
                 follow: bool = True) -> bytes:
    """The bytes of the regular file at ``path``; ``error`` for anything else or a too-big file.

    With ``follow=False`` a symbolic link is refused too (for files only Latchbook writes, such
    as its lock: a link there was put by someone else). FileNotFoundError and
    IsADirectoryError pass through for the caller's own wording.
    """
    where = Where(str(path))
    try:
        st = os.stat(path) if follow else os.lstat(path)
    except FileNotFoundError:
        raise
    except OSError as exc:
        if exc.errno == errno.ELOOP:
            raise error("the path is a symbolic link that loops (or is nested too deep); "
                        "point it at a real file", where) from None
        raise error(f"cannot read the file: {exc.strerror}", where) from None
    if stat.S_ISDIR(st.st_mode):
        raise IsADirectoryError(str(path))
    if stat.S_ISLNK(st.st_mode):
        raise error(f"this is {_link_text(path)}, not a file; give a regular file", where)
    if not stat.S_ISREG(st.st_mode):
        raise error(f"this is {_kind(st.st_mode)}, not a file; give a regular file", where)
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)
    if not follow:
        flags |= getattr(os, "O_NOFOLLOW", 0)
    try:
        fd = os.open(path, flags)
    except OSError as exc:
        if exc.errno == errno.ELOOP:  # swapped for a link since the lstat
            raise error(f"this is {_link_text(path)}, not a file; give a regular file",
                        where) from None
        raise error(f"cannot read the file: {exc.strerror}", where) from None
    try:
        st = os.fstat(fd)
        if not stat.S_ISREG(st.st_mode):
            raise error(f"this is {_kind(st.st_mode)}, not a file; give a regular file", where)
        chunks: list[bytes] = []
        left = limit + 1
        while left > 0:
            chunk = os.read(fd, min(left, 1 << 16))
            if not chunk:
                break
            chunks.append(chunk)
            left -= len(chunk)
    except OSError as exc:
        raise error(f"cannot read the file: {exc.strerror}", where) from None
    finally:
        os.close(fd)
    data = b"".join(chunks)
    if len(data) > limit:
        most = f"{limit // 1024} KiB" if limit >= 1024 else f"{limit} bytes"
        raise error(f"the file is larger than {most}; a {what} is at most {most} (is this the "
                    "right file?)", where)
    return data


def kind_of(path: str | Path) -> str | None:
    """What ``path`` itself is when it is not a regular file (a link is not followed), in words
    such as "a named pipe (FIFO)"; None for a regular file or nothing at all. Never opens it."""
    try:
        st = os.lstat(path)
    except FileNotFoundError:
        return None
    except OSError as exc:
        return f"unreadable ({exc.strerror})"
    if stat.S_ISREG(st.st_mode):
        return None
    if stat.S_ISLNK(st.st_mode):
        return _link_text(path)
    if stat.S_ISDIR(st.st_mode):
        return "a folder"
    return _kind(st.st_mode)


def refusal(path: str | Path) -> str | None:
    """Why ``path`` is not a readable regular file, in words; None when it is one."""
    try:
        st = os.stat(path)
    except FileNotFoundError:
        return "no such file; check the path" if not os.path.islink(path) else \
            "a symbolic link to a file that does not exist"
    except OSError as exc:
        if exc.errno == errno.ELOOP:
            return "the path is a symbolic link that loops; point it at a real file"
        return f"cannot read the file: {exc.strerror}"
    if stat.S_ISDIR(st.st_mode):
        return "this is a folder, not a file"
    if not stat.S_ISREG(st.st_mode):
        return f"this is {_kind(st.st_mode)}, not a file; give a regular file"
    return None


def nesting(doc: Any, stop: int) -> int:
    """How deep tables and arrays nest in ``doc``, counted up to ``stop`` (iterative: a parsed
    document of any depth is measured without recursion)."""
    deepest, stack = 0, [(doc, 1)]
    while stack:
        node, d = stack.pop()
        deepest = max(deepest, d)
        if d > stop:
            break
        items = node.values() if isinstance(node, dict) else node
        stack.extend((v, d + 1) for v in items if isinstance(v, (dict, list)))
    return deepest


def deep_line(text: str, limit: int) -> int | None:
    """The line where brackets and braces in ``text`` first nest deeper than ``limit`` (strings
    and comments skipped), or None. For the message only: the parser has already refused."""
    depth, line, quote, i, n = 0, 1, "", 0, len(text)
    while i < n:
        c = text[i]
        if c == "\n":
            line += 1
        elif quote:
            if c == "\\" and quote == '"':
                i += 1
            elif c == quote:
                quote = ""
        elif c in "\"'":
            quote = c
        elif c == "#":
            j = text.find("\n", i)
            i = n if j < 0 else j
            continue
        elif c in "[{":
            depth += 1
            if depth > limit:
                return line
        elif c in "]}":
            depth = max(0, depth - 1)
        i += 1
    return None


def load_toml(text: str, path: str | Path, *, limit: int, error: type[LatchbookError],
              what: str, fix: str) -> dict[str, Any]:
    """``text`` parsed as TOML, with tables and arrays nested at most ``limit`` deep.

    Nesting too deep for the parser (thousands of levels) or deeper than ``limit`` is
    ``error`` naming the file and, where it can be found, the line, saying that ``what`` needs
    at most ``limit`` levels, then ``fix``. A syntax error passes through as
    :class:`tomllib.TOMLDecodeError` for the caller's own wording.
    """
    try:
        doc = tomllib.loads(text)
    except RecursionError:
        doc = None
    if doc is None or nesting(doc, limit) > limit:
        how = "too deep to read" if doc is None else f"more than {limit} levels deep"
        raise error(f"tables or arrays are nested {how}; {what} needs at most {limit} levels: "
                    f"{fix}", Where(str(path), line=deep_line(text, limit)))
    return doc
