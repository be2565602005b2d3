"""Reading a user's file without trusting it: regular files only, at most a limit of bytes.

A named pipe would block a reader forever, ``/dev/zero`` never ends, a symlink loop raises
inside ``pathlib``. :func:`read_regular` looks at what the path is *before* opening it, opens
without blocking, checks again on the open descriptor (the path may have been swapped in
between), and reads at most ``limit + 1`` bytes.
"""

from __future__ import annotations

import errno
import os
import stat
from pathlib import Path

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
