"""Safe files: atomic writes, the sidecar lock, the on-disk hash check, and the edit journal.

Every file Latchbook writes goes through :func:`atomic_write`: the new text goes to a temp file in
the same folder, is flushed to disk, gets the old file's permissions, replaces the old file in one
``os.replace`` and the folder is flushed too, so a crash leaves either the old or the new file.

A project and its review record are guarded by one sidecar lock, ``NAME.lock`` beside
``NAME.toml`` (the data files are never locked themselves: replacing a file would drop a lock held
on it). The lock names its holder (login from the password database, host, pid, start time);
a command waits (bounded) for another command's short save and names whom it waits for; a
workbook session is not waited for. A lock left by a dead process on this host is broken after
checking that its pid is gone; a lock from another host, or one whose pid was reused, is broken
only when the user asks (``--break-lock``). Temp files left by killed writers are removed the
next time the lock is taken.

Unsaved edits are kept in ``NAME.journal`` (JSON lines: a header, then one ``{path, text}`` per
pending edit), written by the caller on a timer and on SIGHUP/SIGTERM, so that a dropped SSH
session loses nothing; :func:`pending_journal` offers them back on the next open.
"""

from __future__ import annotations

import contextlib
import errno
import fcntl
import hashlib
import json
import os
import pwd
import signal
import socket
import stat
import tempfile
import time
from collections.abc import Callable, Iterable, Iterator, Mapping
from dataclasses import dataclass, field
from datetime import UTC, datetime
from pathlib import Path
from types import FrameType
from typing import Any

from reviewer.errors import RecordError, UnsafeFileError, Where
from reviewer.safeio import kind_of, read_regular

JOURNAL_FORMAT = "latchbook.journal/1"
LOCK_FORMAT = "latchbook.lock/1"
RECORD_MAX_BYTES = 64 << 20  # a record of thousands of entries stays far below this
LOCK_MAX_BYTES = 4096  # a lock is one JSON line of a few hundred bytes


# --------------------------------------------------------------------------------------------
# Who and where
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Person:
    """The operating-system account running this process: login, display name, host."""

    login: str
    name: str
    host: str

    def as_dict(self) -> dict[str, str]:
        """The ``by = {login, name, host}`` table of a record entry."""
        return {"login": self.login, "name": self.name, "host": self.host}


def current_person() -> Person:
    """The account from the password database (never ``$USER``/``$LOGNAME``, which anyone sets)."""
    uid = os.getuid()
    try:
        pw = pwd.getpwuid(uid)
    except KeyError:
        login, gecos = f"uid{uid}", ""
    else:
        login, gecos = pw.pw_name, pw.pw_gecos
    name = gecos.split(",")[0].strip() or login
    return Person(login, name, socket.gethostname())


def utc_now() -> datetime:
    """The current time in UTC, to the second (records and locks show it)."""
    return datetime.now(UTC).replace(microsecond=0)


def stamp(t: datetime | None = None) -> str:
    """A compact UTC time stamp for file names: ``20261201T174500Z``."""
    return (t or utc_now()).strftime("%Y%m%dT%H%M%SZ")


# --------------------------------------------------------------------------------------------
# Hashes and atomic writes
# --------------------------------------------------------------------------------------------

def sha256_bytes(data: bytes) -> str:
    """Hex SHA-256 of ``data``."""
    return hashlib.sha256(data).hexdigest()


def file_sha256(path: str | Path) -> str | None:
    """Hex SHA-256 of the file's bytes, or None when there is no such file."""
    try:
        return sha256_bytes(read_regular(path, RECORD_MAX_BYTES, UnsafeFileError))
    except FileNotFoundError:
        return None


def read_with_hash(path: str | Path) -> tuple[str | None, str | None]:
    """The file's text and the hash of its bytes, read once (None, None when it does not exist).

    Pass the hash back to :func:`save_checked` so that a change made by someone else in between
    is noticed instead of overwritten.
    """
    p = Path(path)
    try:
        data = read_regular(p, RECORD_MAX_BYTES, UnsafeFileError)
    except FileNotFoundError:
        return None, None
    except OSError as exc:
        raise RecordError(f"cannot read the file: {exc.strerror}", Where(str(p))) from None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise RecordError("not UTF-8 text; restore it from version control",
                          Where(str(p))) from None
    return text, sha256_bytes(data)


def _umask() -> int:
    """The process umask, read without changing it where the system allows."""
    with contextlib.suppress(OSError, ValueError):
        for line in Path("/proc/self/status").read_text().splitlines():
            if line.startswith("Umask:"):
                return int(line.split()[1], 8)
    old = os.umask(0o022)
    os.umask(old)
    return old


def _fsync_dir(folder: Path) -> None:
    """Flush a folder's entry table so a rename survives a power cut."""
    try:
        fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return
    try:
        with contextlib.suppress(OSError):  # some file systems refuse fsync on a folder
            os.fsync(fd)
    finally:
        os.close(fd)


def atomic_write(path: str | Path, text: str, *, expected_sha256: str | None = None,
                 check: bool = False) -> Path:
    """Replace the file at ``path`` with ``text`` so that readers see the old or the new file.

    Temp file in the same folder → write → fsync → the old file's permissions (a temp file is
    created owner-only; a new file gets the usual ``0666 & ~umask``) → ``os.replace`` → fsync the
    folder. A symlink is never written through (it could point at another project's file, or
    create one elsewhere), and a file without write permission is not replaced (see
    :func:`_refuse_unsafe_target`): both are a :class:`RecordError`. With ``check=True`` the
    file on disk must still hash to ``expected_sha256`` (None: must not exist yet), else
    :class:`RecordError` and nothing is written (see :func:`save_checked` to keep the text).
    Returns the real path written.
    """
    target = _refuse_unsafe_target(Path(path))
    if check:
        on_disk = file_sha256(target)
        if on_disk != expected_sha256:
            raise RecordError("the file was changed on disk since it was read; nothing was "
                              "written. Reload it and apply your change again",
                              Where(str(target)))
    data = text.encode("utf-8")
    with _replacing(target, binary=True) as fh:
        fh.write(data)
    _clean_orphans(target)
    return target


@contextlib.contextmanager
def _replacing(target: Path, *, binary: bool) -> Iterator[Any]:
    """The one way a file is replaced: what the block writes to the yielded temp file (in
    ``target``'s folder) becomes ``target`` whole, with the old file's permissions (and owner
    and group where allowed), or — if the block or a step raises — the temp file is removed
    and the old file stays as it was. An OS error is a :class:`RecordError` naming the file."""
    folder = target.parent
    try:
        old: os.stat_result | None = target.stat()
    except FileNotFoundError:
        old = None
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise RecordError(f"cannot write in {folder}: {exc.strerror}; check the folder's "
                          "permissions", Where(str(target))) from None
    try:
        with (os.fdopen(fd, "wb") if binary else
              os.fdopen(fd, "w", encoding="utf-8", newline="")) as fh:
            yield fh
            fh.flush()
            os.fsync(fh.fileno())
        if old is not None:
            os.chmod(tmp, stat.S_IMODE(old.st_mode))
            with contextlib.suppress(OSError):  # keep owner and group where we are allowed to
                now = os.stat(tmp)
                if (old.st_uid, old.st_gid) != (now.st_uid, now.st_gid):
                    os.chown(tmp, old.st_uid if os.geteuid() == 0 else -1, old.st_gid)
        else:
            os.chmod(tmp, 0o666 & ~_umask())
        os.replace(tmp, target)
    except BaseException as exc:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        if isinstance(exc, OSError):
            raise RecordError(f"cannot write the file: {exc.strerror}",
                              Where(str(target))) from None
        raise
    _fsync_dir(folder)


def _refuse_unsafe_target(path: Path) -> Path:
    """The file to replace, after refusing a symlink and a file we may not write.

    The folder is resolved (a linked folder is an ordinary place to work), the file itself is
    not. Write permission is the file's own: ``os.access`` for a normal account; for root,
    who may write anything, a file with no write bit at all is taken as the owner's "read-only".
    """
    target = Path(os.path.realpath(path.parent)) / path.name
    if os.path.islink(target):
        try:
            dest = os.readlink(target)
        except OSError:
            dest = "?"
        raise UnsafeFileError(f"this is a symbolic link to {dest}; Latchbook does not write "
                              "through a link (it could replace another file or create one "
                              "elsewhere). Nothing was written: replace the link by a copy "
                              "of the file, or open the file it points to", Where(str(path)))
    try:
        st = target.stat()
    except FileNotFoundError:
        return target
    except OSError as exc:
        raise RecordError(f"cannot write the file: {exc.strerror}", Where(str(path))) from None
    no_bits = not st.st_mode & (stat.S_IWUSR | stat.S_IWGRP | stat.S_IWOTH)
    if not os.access(target, os.W_OK) or (os.geteuid() == 0 and no_bits):
        raise UnsafeFileError(f"the file is read-only (mode {stat.S_IMODE(st.st_mode):03o}); "
                              "nothing was written. Ask its owner, or make it writable "
                              "(chmod u+w) if it is yours and the change is meant",
                              Where(str(path)))
    return target


def writable_target(path: str | Path) -> Path:
    """The real path :func:`atomic_write` would replace, or its refusal (a symlink, a file
    without write permission) raised now: for a writer that makes other files first."""
    return _refuse_unsafe_target(Path(path))


@contextlib.contextmanager
def atomic_stream(path: str | Path) -> Iterator[Any]:
    """A text file to write piece by piece that appears at ``path`` whole, or not at all.

    The same steps and refusals as :func:`atomic_write` (temp file in the same folder, fsync,
    permissions, ``os.replace``, fsync the folder; no symlink, no read-only file) for output
    too large to hold as one string; if the block raises, the temp file is removed and any
    old file at ``path`` is left as it was.
    """
    target = Path(path)
    folder = Path(os.path.realpath(target.parent))
    if not folder.is_dir():
        raise RecordError(f"the folder {folder} does not exist; create it or give another path",
                          Where(str(target)))
    target = _refuse_unsafe_target(target)  # never through a link, never over a read-only file
    with _replacing(target, binary=False) as fh:
        yield fh


ORPHAN_AGE = 600.0  # s: no save takes this long, so an older temp file is a killed writer's


def _clean_orphans(target: Path) -> None:
    """Remove temp files that writers killed mid-save left beside ``target``."""
    now = time.time()
    for tmp in target.parent.glob(f".{glob_escape(target.name)}.*.tmp"):
        with contextlib.suppress(OSError):
            if now - tmp.stat().st_mtime > ORPHAN_AGE:
                tmp.unlink()


def glob_escape(name: str) -> str:
    """``name`` with glob metacharacters made literal."""
    return "".join(f"[{c}]" if c in "*?[" else c for c in name)


def mine_path(path: str | Path, t: datetime | None = None) -> Path:
    """Where the user's version is kept when the file changed underneath: NAME.mine-<ts>.toml."""
    p = Path(path)
    stem = p.name[:-5] if p.name.endswith(".toml") else p.name
    candidate = p.with_name(f"{stem}.mine-{stamp(t)}.toml")
    n = 1
    while candidate.exists():
        n += 1
        candidate = p.with_name(f"{stem}.mine-{stamp(t)}-{n}.toml")
    return candidate


def save_checked(path: str | Path, text: str, read_sha256: str | None) -> Path:
    """Write ``text`` only if the file on disk is still the one read (hash ``read_sha256``).

    When it is not, nothing is overwritten: ``text`` is saved beside it as
    ``NAME.mine-<timestamp>.toml`` and a :class:`RecordError` says so and what to do.
    """
    target = _refuse_unsafe_target(Path(path))
    on_disk = file_sha256(target)
    if on_disk != read_sha256:
        mine = mine_path(target)
        atomic_write(mine, text)
        what = "deleted" if on_disk is None else "changed by someone else"
        raise RecordError(f"the file was {what} since it was read, so it was not overwritten; "
                          f"your version is saved as {mine.name}. Reload the file and apply "
                          "your changes again (compare the two files)", Where(str(target)))
    return atomic_write(target, text, expected_sha256=read_sha256, check=True)


# --------------------------------------------------------------------------------------------
# The sidecar lock
# --------------------------------------------------------------------------------------------

def base_name(project_path: str | Path) -> Path:
    """``/dir/NAME`` for ``/dir/NAME.toml`` (also for ``NAME.review.toml``)."""
    p = Path(project_path)
    name = p.name
    for suffix in (".review.toml", ".toml"):
        if name.endswith(suffix):
            name = name[: -len(suffix)]
            break
    return p.with_name(name)


def lock_path(project_path: str | Path) -> Path:
    """The sidecar lock of a project (and of its review record): ``NAME.lock``."""
    return base_name(project_path).with_name(base_name(project_path).name + ".lock")


@dataclass(frozen=True)
class LockInfo:
    """Who holds a lock: the content of ``NAME.lock``.

    ``what`` is what the holder is doing: ``session`` (the workbook, for as long as it is
    open), or a short write such as ``sign``, ``waive``, ``record`` (worth waiting for).
    """

    login: str
    host: str
    pid: int
    started: str
    token: str = ""
    what: str = "session"

    def text(self) -> str:
        """``alice on buildhost since 2026-12-01 17:40 UTC (pid 4242)``."""
        if self.pid == 0:
            return "an unknown holder (the lock file was damaged or not Latchbook's)"
        return f"{self.login} on {self.host} since {self.started} (pid {self.pid})"

    def doing(self) -> str:
        """``kiln-lead's sign, pid 4242 on buildhost``, or their open workbook."""
        if self.what == "session":
            return f"{self.login}'s workbook session, pid {self.pid} on {self.host}"
        return f"{self.login}'s {self.what}, pid {self.pid} on {self.host}"


def _pid_alive(pid: int) -> bool:
    """True unless the system says there is no such process (EPERM means it exists)."""
    if pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except OSError as exc:
        return exc.errno != errno.ESRCH
    return True


def _not_a_lock(lp: Path, project: str | Path, what: str) -> UnsafeFileError:
    return UnsafeFileError(
        f"the lock file {lp} is {what}, not a lock Latchbook wrote (a lock is a small regular "
        "file); nothing was changed. If no session has this project open, run the command "
        f"again with --break-lock, which removes the name {lp.name} only (never what it "
        "points to), or move it aside by hand", Where(str(project)))


def _lock_text(lp: Path, project: str | Path) -> str | None:
    """The lock file's text, read without following a link, opening a pipe or device, or
    reading more than :data:`LOCK_MAX_BYTES`; None when there is no lock. Something else at the
    lock's name is an :class:`UnsafeFileError` naming it; an unreadable file gives ``""``."""
    kind = kind_of(lp)
    if kind is not None:
        raise _not_a_lock(lp, project, kind)
    try:
        size = os.lstat(lp).st_size
    except FileNotFoundError:
        return None
    except OSError:
        return ""
    if size > LOCK_MAX_BYTES:
        raise _not_a_lock(lp, project, f"a file of {size} bytes")
    try:
        data = read_regular(lp, LOCK_MAX_BYTES, UnsafeFileError, "lock file", follow=False)
    except FileNotFoundError:
        return None
    except (IsADirectoryError, UnsafeFileError):
        kind = kind_of(lp)  # swapped for something else since we looked
        if kind is not None:
            raise _not_a_lock(lp, project, kind) from None
        return ""
    return data.decode("utf-8", "replace")


def read_lock(project_path: str | Path) -> LockInfo | None:
    """The holder of the project's lock, or None when it is not locked.

    An unreadable or damaged lock file is reported with an unknown holder (pid 0) rather than
    ignored; something that is not a file at all (a pipe, a device, a link, a folder, a huge
    file) is an :class:`UnsafeFileError` naming the lock and ``--break-lock``.
    """
    raw = _lock_text(lock_path(project_path), project_path)
    return None if raw is None else _parse_lock(raw)


def _open_lock(path: Path, project: str | Path) -> int | None:
    """A descriptor on the lock file at ``path`` (None when there is none), opened without
    following a link or blocking on a pipe, and checked to be a regular file of at most
    :data:`LOCK_MAX_BYTES`; else :class:`UnsafeFileError` (see :func:`_not_a_lock`)."""
    kind = kind_of(path)
    if kind is not None:
        raise _not_a_lock(path, project, kind)
    flags = (os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOFOLLOW", 0)
             | getattr(os, "O_NOCTTY", 0))
    try:
        fd = os.open(path, flags)
    except FileNotFoundError:
        return None
    except OSError as exc:
        raise _not_a_lock(path, project, kind_of(path) or f"unreadable ({exc.strerror})") \
            from None
    st = os.fstat(fd)
    if not stat.S_ISREG(st.st_mode) or st.st_size > LOCK_MAX_BYTES:
        os.close(fd)
        raise _not_a_lock(path, project, kind_of(path) or f"a file of {st.st_size} bytes")
    return fd


def _lock_of(fd: int) -> LockInfo:
    """The holder written in an open lock file (at most :data:`LOCK_MAX_BYTES` read)."""
    return _parse_lock(os.read(fd, LOCK_MAX_BYTES).decode("utf-8", "replace"))


def _parse_lock(raw: str) -> LockInfo:
    try:
        d = json.loads(raw)
        return LockInfo(str(d["login"]), str(d["host"]), int(d["pid"]), str(d["started"]),
                        str(d.get("token", "")), str(d.get("what", "session")))
    except (ValueError, KeyError, TypeError, RecursionError):  # damaged: an unknown holder
        return LockInfo("?", "?", 0, "?")


class LockedError(RecordError):
    """The project is locked by another session; ``holder`` says by whom."""

    def __init__(self, message: str, where: Where | None, holder: LockInfo) -> None:
        super().__init__(message, where)
        self.holder = holder


class LockTimeout(LockedError):
    """Waited for the lock as long as allowed; ``waited`` is how long (s)."""

    def __init__(self, message: str, where: Where | None, holder: LockInfo,
                 waited: float) -> None:
        super().__init__(message, where, holder)
        self.waited = waited


#: How long a command waits for another writer's short save before it gives up (s).
DEFAULT_WAIT = 30.0

_NO_SPACE = {errno.ENOSPC: "the disk is full (no space left on the device)",
             errno.EDQUOT: "the disk quota is used up",
             errno.EFBIG: "the file size limit was reached (ulimit -f)",
             errno.EROFS: "the file system is read-only",
             errno.EACCES: "permission denied", errno.EPERM: "permission denied"}


def os_fault(exc: OSError) -> str:
    """An OS error in words a user can act on (disk full, quota, size limit, permissions)."""
    what = _NO_SPACE.get(exc.errno or 0)
    if what is None:
        return exc.strerror or str(exc)
    fix = ("check the folder's permissions" if exc.errno in (errno.EACCES, errno.EPERM)
           else "free some space (or raise the limit) and try again")
    return f"{what}; {fix}"


# Locks this process holds, by lock path: (lock, depth). Re-entrant so that the workbook, which
# holds the lock for its whole session, can call the same functions the command line uses.
_HELD: dict[str, list[Any]] = {}


class ProjectLock:
    """An exclusive, re-entrant (within this process) lock on a project and its review record.

    Use as a context manager, or :meth:`acquire` / :meth:`release`. ``wait`` is how long to
    wait for another writer's short save (0: refuse at once); ``on_wait`` is told once, in
    words, whom it waits for. A workbook session is not waited for: it holds the lock until
    it is closed. ``waited`` says how long the wait took.
    """

    def __init__(self, project_path: str | Path, *, what: str = "session", wait: float = 0.0,
                 on_wait: Callable[[str], object] | None = None) -> None:
        self.path = lock_path(project_path)
        self.project = Path(project_path)
        self.info: LockInfo | None = None
        self.what = what
        self.wait = wait
        self.on_wait = on_wait
        self.waited = 0.0

    @property
    def held(self) -> bool:
        """True while this object holds the lock."""
        return self.info is not None

    def acquire(self) -> ProjectLock:
        """Take the lock, waiting up to ``wait`` s for a short holder; else
        :class:`LockedError` (:class:`LockTimeout` after waiting) naming the holder."""
        started = time.monotonic()
        pause = 0.005
        told = False
        while True:
            try:
                self._acquire_once()
            except LockedError as exc:
                holder = exc.holder
                waited = time.monotonic() - started
                if holder.pid == 0 or holder.what == "session" or self.wait <= 0:
                    raise
                if waited >= self.wait:
                    raise LockTimeout(
                        f"gave up after {waited:.0f} s waiting for {holder.doing()} (holding "
                        f"it since {holder.started}). If that process is stopped or its pid "
                        "now belongs to something else, run the command again with "
                        "--break-lock", Where(str(self.project)), holder, waited) from None
                if not told:
                    if self.on_wait is not None:
                        self.on_wait(f"waiting for {holder.doing()}…")
                    told = True
                time.sleep(min(pause, max(0.0, self.wait - waited)) *
                           (0.5 + int.from_bytes(os.urandom(1), "big") / 255))
                pause = min(pause * 1.6, 0.1)
                continue
            # Only time spent refused counts as waiting (not a slow first try).
            self.waited = time.monotonic() - started if told or pause > 0.005 else 0.0
            return self

    def _acquire_once(self) -> None:
        key = str(self.path.absolute())
        held = _HELD.get(key)
        if held is not None and held[0].info is not None and held[0].info.pid == os.getpid():
            held[1] += 1
            self.info = held[0].info
            return
        me = current_person()
        info = LockInfo(me.login, me.host, os.getpid(),
                        utc_now().strftime("%Y-%m-%d %H:%M:%S UTC"), os.urandom(8).hex(),
                        self.what)
        body = json.dumps({"format": LOCK_FORMAT, "login": info.login, "host": info.host,
                           "pid": info.pid, "started": info.started, "token": info.token,
                           "what": info.what})
        for _ in range(5):
            # Write the content to a private file, then hard-link it into place: the lock
            # appears complete or not at all, and link() fails if the name exists. The temp
            # name carries the pid, so that one left by a killed process can be cleaned.
            try:
                fd, tmp = tempfile.mkstemp(prefix=f".{self.path.name}.{os.getpid()}.",
                                           suffix=".tmp", dir=self.path.parent)
            except OSError as exc:
                raise self._cannot_create(exc) from None
            try:
                try:
                    with os.fdopen(fd, "w", encoding="utf-8") as fh:
                        fh.write(body + "\n")
                        fh.flush()
                        os.fsync(fh.fileno())
                    os.chmod(tmp, 0o644)
                except OSError as exc:
                    raise self._cannot_create(exc) from None
                try:
                    os.link(tmp, self.path)
                except FileExistsError:
                    holder = self._break_if_stale()
                    if holder is None:
                        continue  # broken, or gone meanwhile: try again
                    raise self._locked(holder) from None
                except OSError as exc:
                    if exc.errno not in (errno.EPERM, errno.ENOTSUP, errno.EOPNOTSUPP):
                        raise self._cannot_create(exc) from None
                    if not self._create_exclusive(body):  # no hard links on this file system
                        holder = self._break_if_stale()
                        if holder is None:
                            continue
                        raise self._locked(holder) from None
            finally:
                with contextlib.suppress(OSError):
                    os.unlink(tmp)
            _fsync_dir(self.path.parent)
            self.info = info
            _HELD[key] = [self, 1]
            clean_leftovers(self.project)
            return
        holder = read_lock(self.project) or LockInfo("?", "?", 0, "?")
        raise self._locked(holder)

    def _cannot_create(self, exc: OSError) -> RecordError:
        return RecordError(f"cannot create the lock file {self.path.name}: {os_fault(exc)}",
                           Where(str(self.project)))

    def _create_exclusive(self, body: str) -> bool:
        """Create the lock with O_EXCL (for file systems without hard links)."""
        try:
            fd = os.open(self.path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o644)
        except FileExistsError:
            return False
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(body + "\n")
            fh.flush()
            os.fsync(fh.fileno())
        return True

    def _locked(self, holder: LockInfo) -> LockedError:
        me = current_person()
        if holder.pid == 0:
            return LockedError(f"the lock file {self.path} is damaged or not ours: if no "
                               "session has this project open, run again with --break-lock "
                               "(or delete it by hand)", Where(str(self.project)), holder)
        if holder.host != me.host:
            hint = (f"close it there; if that session is gone, check on {holder.host} and then "
                    "run again with --break-lock")
        elif holder.what == "session":
            hint = "it is open in the workbook there: close it, then try again"
        else:
            hint = "try again when it is done"
        return LockedError(f"locked by {holder.login} on {holder.host} since {holder.started} "
                           f"(pid {holder.pid}, {holder.what}): {hint}",
                           Where(str(self.project)), holder)

    def _break_if_stale(self) -> LockInfo | None:
        """Remove the lock if its process is dead on this host; return the live holder if not.

        The break is serialised with ``flock`` on the lock file and re-checks that the path still
        names the inode it judged, so two breakers cannot remove a fresh lock.
        """
        return _break(self.path, self.project, force=False)

    def release(self) -> None:
        """Give the lock up (the outermost release removes the file, if it is still ours)."""
        if self.info is None:
            return
        key = str(self.path.absolute())
        held = _HELD.get(key)
        self_info, self.info = self.info, None
        if held is not None:
            held[1] -= 1
            if held[1] > 0:
                return
            del _HELD[key]
        try:
            fd = _open_lock(self.path, self.project)
        except UnsafeFileError:
            return  # something else took the lock's name: not ours to remove
        if fd is None:
            return
        try:
            fcntl.flock(fd, fcntl.LOCK_EX)
            with contextlib.suppress(FileNotFoundError):
                same = os.stat(self.path).st_ino == os.fstat(fd).st_ino
                if same and _lock_of(fd).token == self_info.token:
                    os.unlink(self.path)
        finally:
            os.close(fd)

    def __enter__(self) -> ProjectLock:
        return self.acquire()

    def __exit__(self, *exc: object) -> None:
        self.release()


def _break(path: Path, project: Path, *, force: bool) -> LockInfo | None:
    """Remove the lock at ``path`` when its holder is a dead process here (or ``force``).

    Returns the holder that was kept (None when the lock is gone or was removed). Something
    at the lock's name that is not a lock file is refused (:func:`_not_a_lock`), or with
    ``force`` its name removed.
    """
    try:
        fd = _open_lock(path, project)
    except UnsafeFileError:
        if not force:
            raise
        _remove_name(path, project)
        return None
    if fd is None:
        return None
    try:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:  # someone else is breaking or releasing it right now
            time.sleep(0.05)
            return read_lock(project) if path.exists() else None
        try:
            if os.stat(path).st_ino != os.fstat(fd).st_ino:
                return None  # replaced meanwhile: look again
        except FileNotFoundError:
            return None
        holder = _lock_of(fd)
        if not force and (holder.host != socket.gethostname() or _pid_alive(holder.pid)):
            return holder
        os.unlink(path)
        return None
    finally:
        os.close(fd)


def _remove_name(path: Path, project: str | Path) -> None:
    """Remove whatever is at the lock's name: a link itself, never its target."""
    try:
        os.unlink(path)
    except FileNotFoundError:
        pass
    except OSError as exc:
        raise UnsafeFileError(f"the lock file {path} is {kind_of(path) or 'not a file'} and "
                              f"cannot be removed ({exc.strerror}); move it aside by hand",
                              Where(str(project))) from None


def break_lock(project_path: str | Path) -> LockInfo | None:
    """Remove the project's lock whoever holds it (a deliberate act: the user asked for it).

    For a holder that is stopped, or whose pid now belongs to another program, or a lock file
    that is damaged or not a lock at all (only its name is removed). Returns the holder that
    was removed (pid 0 when unknown; None when there was no lock).
    """
    try:
        holder = read_lock(project_path)
    except UnsafeFileError:
        holder = LockInfo("?", "?", 0, "?")
    if holder is None:
        return None
    _break(lock_path(project_path), Path(project_path), force=True)
    _fsync_dir(lock_path(project_path).parent)
    return holder


def clean_leftovers(project_path: str | Path) -> list[Path]:
    """Remove the temp files killed writers left beside a project (call holding its lock).

    Every write of the project, its record and its journal happens under the lock, so while
    we hold it their temp files are orphans. A lock's own temp file is removed when the pid
    in its name is gone (or it is older than :data:`ORPHAN_AGE`). Returns what was removed.
    """
    b = base_name(project_path)
    folder, name = b.parent, glob_escape(b.name)
    gone: list[Path] = []
    for pattern in (f".{name}.toml.*.tmp", f".{name}.review.toml.*.tmp",
                    f".{name}.journal.*.tmp"):
        for tmp in folder.glob(pattern):
            with contextlib.suppress(OSError):
                tmp.unlink()
                gone.append(tmp)
    now = time.time()
    for tmp in folder.glob(f".{name}.lock.*.tmp"):
        parts = tmp.name[len(b.name) + 7:].split(".")
        pid = int(parts[0]) if parts and parts[0].isdigit() else 0
        with contextlib.suppress(OSError):
            if (pid and not _pid_alive(pid)) or now - tmp.stat().st_mtime > ORPHAN_AGE:
                tmp.unlink()
                gone.append(tmp)
    return gone


def lock_project(project_path: str | Path) -> ProjectLock:
    """Take the project's lock for a workbook session (raises :class:`LockedError` naming the
    holder; waits a little for another command's short save)."""
    return ProjectLock(project_path, wait=5.0).acquire()


# --------------------------------------------------------------------------------------------
# The journal of unsaved edits
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class Edit:
    """One pending edit: the dotted key and the value as the user typed it."""

    path: str
    text: str


@dataclass
class Journal:
    """Unsaved edits found beside a project, to offer on the next open."""

    path: Path
    edits: list[Edit]
    saved_at: str = ""
    base_sha256: str = ""
    by: dict[str, str] = field(default_factory=dict)

    def base_changed(self, project_path: str | Path) -> bool:
        """True when the project file is no longer the one the edits were made on."""
        return bool(self.base_sha256) and file_sha256(project_path) != self.base_sha256


def journal_path(project_path: str | Path) -> Path:
    """``NAME.journal`` beside ``NAME.toml``."""
    b = base_name(project_path)
    return b.with_name(b.name + ".journal")


def write_journal(project_path: str | Path, edits: Iterable[Edit | Mapping[str, str]], *,
                  base_sha256: str = "") -> Path | None:
    """Save the pending edits (all of them, atomically); with no edits, remove the journal.

    ``base_sha256`` is the hash of the project file the edits apply to (so recovery can warn
    when the file changed meanwhile). Returns the journal's path, or None when cleared.
    """
    items = [e if isinstance(e, Edit) else Edit(str(e["path"]), str(e["text"])) for e in edits]
    if not items:
        clear_journal(project_path)
        return None
    _journal_like_project(project_path)
    head = {"format": JOURNAL_FORMAT, "project": Path(project_path).name,
            "saved_at": utc_now().isoformat().replace("+00:00", "Z"),
            "base_sha256": base_sha256, "by": current_person().as_dict()}
    lines = [json.dumps(head, ensure_ascii=False)]
    lines += [json.dumps({"path": e.path, "text": e.text}, ensure_ascii=False) for e in items]
    return atomic_write(journal_path(project_path), "\n".join(lines) + "\n")


def _journal_like_project(project_path: str | Path) -> None:
    """Create the journal, empty, with the project file's permissions before its first write.

    The journal holds the project's values; a new file would get the umask's mode, so a 0600
    project's edits would be world-readable. :func:`atomic_write` keeps an existing file's mode.
    """
    jp = journal_path(project_path)
    try:
        mode = stat.S_IMODE(os.stat(project_path).st_mode) & 0o666
    except OSError:
        return
    with contextlib.suppress(FileExistsError, OSError):
        fd = os.open(jp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, mode)
        os.fchmod(fd, mode)  # not widened by the umask, not narrowed either
        os.close(fd)


def pending_journal(project_path: str | Path) -> Journal | None:
    """The unsaved edits left by an earlier session, or None.

    A journal that is not ours to read is an error naming it (never silently dropped).
    """
    jp = journal_path(project_path)
    try:
        raw = read_regular(jp, RECORD_MAX_BYTES, UnsafeFileError).decode("utf-8")
    except FileNotFoundError:
        return None
    except (OSError, UnicodeDecodeError) as exc:
        raise RecordError(f"cannot read the unsaved-edits journal: {exc}; move it aside to "
                          "open the project without it", Where(str(jp))) from None
    rows = [ln for ln in raw.splitlines() if ln.strip()]
    if not rows:  # created with the project's mode, not yet written: nothing pending
        return None
    try:
        head = json.loads(rows[0]) if rows else {}
        if head.get("format") != JOURNAL_FORMAT:
            raise ValueError("not a Latchbook journal")
        edits = []
        for ln in rows[1:]:
            d = json.loads(ln)
            if not isinstance(d.get("path"), str) or not isinstance(d.get("text"), str):
                raise ValueError("an edit needs `path` and `text` strings")
            edits.append(Edit(d["path"], d["text"]))
    except (ValueError, AttributeError, RecursionError) as exc:
        why = "nested too deep to read" if isinstance(exc, RecursionError) else str(exc)
        raise RecordError(f"the unsaved-edits journal is damaged ({why}); move it aside to "
                          "open the project without it", Where(str(jp))) from None
    if not edits:
        return None
    return Journal(jp, edits, str(head.get("saved_at", "")), str(head.get("base_sha256", "")),
                   dict(head.get("by", {})))


def clear_journal(project_path: str | Path) -> None:
    """Remove the journal (after the edits were saved or discarded)."""
    jp = journal_path(project_path)
    with contextlib.suppress(FileNotFoundError):
        jp.unlink()
        _fsync_dir(jp.parent)


def install_hangup_handler(callback: Callable[[], object]) -> Callable[[], None]:
    """On SIGHUP or SIGTERM call ``callback`` (save the journal), then end as the signal asks.

    A dropped SSH session sends SIGHUP; ``callback`` must be quick and must not raise (an
    exception is reported on stderr, and the process still ends). Call from the main thread.
    Returns a function that puts the previous handlers back.
    """
    sigs = [s for s in (getattr(signal, "SIGHUP", None), signal.SIGTERM) if s is not None]
    previous: dict[int, Any] = {}

    def handler(signum: int, frame: FrameType | None) -> None:
        try:
            callback()
        except Exception as exc:  # the process is ending: say what was lost, and end
            with contextlib.suppress(OSError):
                os.write(2, f"latchbook: could not save unsaved edits: {exc}\n".encode())
        prev = previous.get(signum, signal.SIG_DFL)
        restore()
        if callable(prev):
            prev(signum, frame)
        elif prev != signal.SIG_IGN:
            signal.signal(signum, signal.SIG_DFL)
            os.kill(os.getpid(), signum)

    def restore() -> None:
        for s, h in previous.items():
            with contextlib.suppress(ValueError, TypeError):
                signal.signal(s, h)

    for s in sigs:
        previous[s] = signal.signal(s, handler)
    return restore


@contextlib.contextmanager
def hangup_saves(callback: Callable[[], object]) -> Iterator[None]:
    """Context manager form of :func:`install_hangup_handler`."""
    restore = install_hangup_handler(callback)
    try:
        yield
    finally:
        restore()


__all__ = ["DEFAULT_WAIT", "Edit", "Journal", "LockInfo", "LockTimeout", "LockedError",
           "Person", "ProjectLock", "atomic_stream", "atomic_write", "base_name", "break_lock",
           "clean_leftovers", "clear_journal", "current_person", "file_sha256",
           "hangup_saves", "install_hangup_handler", "journal_path", "lock_path", "lock_project",
           "mine_path", "os_fault", "pending_journal", "read_lock", "read_with_hash",
           "save_checked", "sha256_bytes", "stamp", "utc_now", "writable_target",
           "write_journal"]
