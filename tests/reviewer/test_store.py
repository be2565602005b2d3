"""Safe files: atomic writes under SIGKILL, permissions, the lock, the hash check, the journal."""

from __future__ import annotations

import hashlib
import json
import os
import pwd
import random
import signal
import socket
import stat
import subprocess
import sys
import textwrap
import time
import tomllib
from pathlib import Path

import pytest

from reviewer.errors import RecordError, UnsafeFileError
from reviewer.store import (
    Edit,
    LockedError,
    LockTimeout,
    ProjectLock,
    atomic_write,
    break_lock,
    clear_journal,
    current_person,
    journal_path,
    lock_path,
    pending_journal,
    read_lock,
    read_with_hash,
    save_checked,
    write_journal,
)

REPO = Path(__file__).resolve().parents[2]


def _py(code: str, *args: str, **kw) -> subprocess.Popen:
    """A child Python with the repository on its path."""
    env = dict(os.environ, PYTHONPATH=str(REPO))
    return subprocess.Popen([sys.executable, "-c", textwrap.dedent(code), *args], env=env,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, **kw)


def _dead_pid() -> int:
    """The pid of a process that has ended (and been reaped)."""
    p = subprocess.Popen([sys.executable, "-c", "pass"])
    p.wait()
    return p.pid


# --- atomic writes ---------------------------------------------------------------------------

# A fork server: imports the store once, then per request forks a writer that saves in a loop
# until it is killed, so that hundreds of kills fit in seconds.
FORK_SERVER = """
import hashlib, os, sys
from reviewer.store import atomic_write
path = sys.argv[1]
for line in sys.stdin:
    i = int(line)
    pid = os.fork()
    if pid == 0:
        os.write(1, f"{os.getpid()}\\n".encode())
        first = True
        while True:
            payload = f"{i}-" + "x" * (50_000 + (i * 7919) % 150_000)
            digest = hashlib.sha256(payload.encode()).hexdigest()
            atomic_write(path, f'n = {i}\\npayload = "{payload}"\\ndigest = "{digest}"\\n')
            if first:  # the parent's random delay starts after one whole save, however loaded
                os.write(1, b"saved\\n")
                first = False
            i += 1
    os.waitpid(pid, 0)
    os.write(1, b"reaped\\n")
"""


def test_sigkill_during_saves_leaves_old_or_new_file_never_a_mix(tmp_path):
    """A writer killed with SIGKILL at random points leaves a whole, valid file every time.

    200 kills of a process saving 50–200 kB files in a loop; after each kill the file must parse
    as TOML, its payload must match its own digest (no mix of two versions), and its counter
    must never go back.
    """
    target = tmp_path / "rec.review.toml"
    zero = hashlib.sha256(b"0-").hexdigest()
    atomic_write(target, f'n = 0\npayload = "0-"\ndigest = "{zero}"\n')
    rng = random.Random(20261201)
    last, kills, changed = 0, 0, 0
    server = _py(FORK_SERVER, str(target), stdin=subprocess.PIPE)
    started = time.monotonic()
    try:
        while kills < 200 and time.monotonic() - started < 300:
            server.stdin.write(f"{last + 1}\n")
            server.stdin.flush()
            pid = int(server.stdout.readline())
            assert server.stdout.readline().strip() == "saved"
            time.sleep(rng.uniform(0.0, 0.012))
            os.kill(pid, signal.SIGKILL)
            assert server.stdout.readline().strip() == "reaped"
            kills += 1
            doc = tomllib.loads(target.read_text("utf-8"))
            assert hashlib.sha256(doc["payload"].encode()).hexdigest() == doc["digest"]
            assert doc["payload"].startswith(f"{doc['n']}-")
            assert doc["n"] >= last
            changed += doc["n"] > last
            last = doc["n"]
    finally:
        server.stdin.close()
        server.wait(10)
        server.stdout.close()
        server.stderr.close()
    leftovers = list(tmp_path.glob(".rec.review.toml.*.tmp"))
    print(f"\nfault injection: {kills} SIGKILLs in {time.monotonic() - started:.1f} s, {last} "
          f"saves completed, file changed between kills {changed} times, {len(leftovers)} "
          "orphan temp files, every read valid")
    assert kills == 200, "too few kills in the time allowed"
    # Each writer saved once before its delay began, so every kill follows at least one save.
    assert changed == kills, "a writer's finished save was not on disk after its kill"
    # An orphan temp file is a kill that landed inside a save: the case this test is about.
    assert leftovers, "no kill landed during a save: the test proves little"


def test_save_keeps_the_old_files_permissions(tmp_path):
    """A replaced file keeps its mode bits (a temp file starts owner-only)."""
    p = tmp_path / "kiln.review.toml"
    p.write_text("a = 1\n")
    os.chmod(p, 0o640)
    atomic_write(p, "a = 2\n")
    assert stat.S_IMODE(p.stat().st_mode) == 0o640
    os.chmod(p, 0o664)
    atomic_write(p, "a = 3\n")
    assert stat.S_IMODE(p.stat().st_mode) == 0o664
    assert p.read_text() == "a = 3\n"


def test_new_file_gets_umask_mode_not_owner_only(tmp_path):
    """A new file is created as open() would (0666 & ~umask), not with mkstemp's 0600."""
    old = os.umask(0o022)
    try:
        p = atomic_write(tmp_path / "new.toml", "x = 1\n")
    finally:
        os.umask(old)
    assert stat.S_IMODE(p.stat().st_mode) == 0o644


def test_a_symlink_is_never_written_through(tmp_path):
    """Saving to a symlink is refused, naming the link's target; neither file changes."""
    real = tmp_path / "real.toml"
    real.write_text("a = 1\n")
    link = tmp_path / "link.toml"
    link.symlink_to(real)
    with pytest.raises(RecordError, match=r"symbolic link to .*real\.toml.*Nothing was written"):
        atomic_write(link, "a = 2\n")
    assert link.is_symlink() and real.read_text() == "a = 1\n"
    dangling = tmp_path / "dangling.toml"
    dangling.symlink_to(tmp_path / "elsewhere" / "made.toml")
    with pytest.raises(RecordError, match="symbolic link"):
        atomic_write(dangling, "a = 3\n")
    assert not (tmp_path / "elsewhere").exists()


def test_a_read_only_file_is_not_replaced(tmp_path):
    """A file without write permission (0444) keeps its content and its mode."""
    p = tmp_path / "kept.review.toml"
    p.write_text("a = 1\n")
    os.chmod(p, 0o444)
    with pytest.raises(RecordError, match=r"read-only \(mode 444\)"):
        atomic_write(p, "a = 2\n")
    assert p.read_text() == "a = 1\n" and stat.S_IMODE(p.stat().st_mode) == 0o444


def test_file_changed_between_read_and_write_is_not_overwritten(tmp_path):
    """If someone else saved meanwhile, nothing is overwritten and our text is kept beside it."""
    p = tmp_path / "kiln.toml"
    p.write_text("a = 1\n")
    _, sha = read_with_hash(p)
    p.write_text("a = 'theirs'\n")
    with pytest.raises(RecordError, match=r"changed by someone else.*kiln\.mine-\d{8}T\d{6}Z"):
        save_checked(p, "a = 'mine'\n", sha)
    assert p.read_text() == "a = 'theirs'\n"
    [mine] = tmp_path.glob("kiln.mine-*.toml")
    assert mine.read_text() == "a = 'mine'\n"


def test_file_deleted_between_read_and_write_is_not_recreated(tmp_path):
    """A file removed meanwhile is reported (our text is kept beside), not silently recreated."""
    p = tmp_path / "kiln.toml"
    p.write_text("a = 1\n")
    _, sha = read_with_hash(p)
    p.unlink()
    with pytest.raises(RecordError, match="deleted"):
        save_checked(p, "a = 2\n", sha)
    assert not p.exists()
    assert len(list(tmp_path.glob("kiln.mine-*.toml"))) == 1


def test_unchanged_file_is_saved(tmp_path):
    """The normal path: the hash still matches, the file is replaced."""
    p = tmp_path / "kiln.toml"
    p.write_text("a = 1\n")
    _, sha = read_with_hash(p)
    save_checked(p, "a = 2\n", sha)
    assert p.read_text() == "a = 2\n"
    assert not list(tmp_path.glob("*.mine-*"))


# --- the lock --------------------------------------------------------------------------------

def test_login_comes_from_password_database_not_user_env(monkeypatch):
    """Setting $USER or $LOGNAME changes nothing: the login is the account's."""
    monkeypatch.setenv("USER", "mallory")
    monkeypatch.setenv("LOGNAME", "mallory")
    assert current_person().login == pwd.getpwuid(os.getuid()).pw_name


def test_lock_records_holder_and_is_a_sidecar(tmp_path, monkeypatch):
    """NAME.lock beside NAME.toml holds login (password database), host, pid and start time."""
    monkeypatch.setenv("USER", "mallory")
    proj = tmp_path / "kiln.toml"
    proj.write_text("x = 1\n")
    with ProjectLock(proj):
        assert lock_path(proj) == tmp_path / "kiln.lock"
        info = read_lock(proj)
        assert info is not None
        assert info.login == pwd.getpwuid(os.getuid()).pw_name
        assert info.host == socket.gethostname() and info.pid == os.getpid()
        assert "UTC" in info.started
        assert proj.read_text() == "x = 1\n"  # the data file is untouched
    assert read_lock(proj) is None


HOLDER = """
import sys, time
from reviewer.store import ProjectLock
with ProjectLock(sys.argv[1]):
    print("held", flush=True)
    sys.stdin.readline()
"""


def test_second_process_is_told_who_holds_the_lock(tmp_path):
    """Another process holding the lock: we get 'locked by … on … since …' and no lock."""
    proj = tmp_path / "kiln.toml"
    proj.write_text("x = 1\n")
    child = _py(HOLDER, str(proj), stdin=subprocess.PIPE)
    try:
        assert child.stdout.readline().strip() == "held"
        with pytest.raises(LockedError) as err:
            ProjectLock(proj).acquire()
        msg = str(err.value)
        me = pwd.getpwuid(os.getuid()).pw_name
        assert f"locked by {me} on {socket.gethostname()} since " in msg
        assert f"pid {child.pid}" in msg and "close it" in msg
        assert "read-only" not in msg  # the workbook says so itself; a command never does
        assert err.value.holder.pid == child.pid
    finally:
        child.stdin.write("\n")
        child.stdin.close()
        child.wait(10)
    with ProjectLock(proj) as lock:  # released by the holder: ours now
        assert lock.held


def test_lock_is_reentrant_within_a_process(tmp_path):
    """The workbook holds the lock for its session and still calls code that takes it."""
    proj = tmp_path / "kiln.toml"
    outer = ProjectLock(proj).acquire()
    with ProjectLock(proj):
        assert read_lock(proj).pid == os.getpid()
    assert lock_path(proj).exists()  # the inner release keeps the outer lock
    outer.release()
    assert not lock_path(proj).exists()


def test_stale_lock_of_dead_process_on_this_host_is_broken(tmp_path):
    """A lock whose pid is gone on this host is removed and taken over."""
    proj = tmp_path / "kiln.toml"
    pid = _dead_pid()
    lock_path(proj).write_text(json.dumps({"login": "someone", "host": socket.gethostname(),
                                           "pid": pid, "started": "2020-01-01 00:00:00 UTC"}))
    with ProjectLock(proj):
        assert read_lock(proj).pid == os.getpid()


def test_lock_from_another_host_is_never_broken(tmp_path):
    """A pid means nothing on another host: the lock stands and the message says where."""
    proj = tmp_path / "kiln.toml"
    body = json.dumps({"login": "alice", "host": "other-host.invalid", "pid": _dead_pid(),
                       "started": "2026-12-01 17:40:00 UTC"})
    lock_path(proj).write_text(body)
    with pytest.raises(LockedError, match=r"locked by alice on other-host\.invalid since "
                                          r"2026-12-01 17:40:00 UTC.*check on other-host"):
        ProjectLock(proj).acquire()
    assert lock_path(proj).read_text() == body


def test_live_lock_on_this_host_is_not_broken(tmp_path):
    """A lock held by a live process (here: pid 1) is left alone."""
    proj = tmp_path / "kiln.toml"
    lock_path(proj).write_text(json.dumps({"login": "bob", "host": socket.gethostname(),
                                           "pid": 1, "started": "x"}))
    with pytest.raises(LockedError, match="locked by bob"):
        ProjectLock(proj).acquire()


def test_damaged_lock_file_is_reported_not_ignored(tmp_path):
    """A lock file we cannot read blocks writing and says to delete it if nobody is working."""
    proj = tmp_path / "kiln.toml"
    lock_path(proj).write_text("garbage")
    with pytest.raises(LockedError, match="damaged"):
        ProjectLock(proj).acquire()
    lock_path(proj).write_text("[" * 4000)  # within the size limit, too deep for json
    with pytest.raises(LockedError, match="damaged"):
        ProjectLock(proj).acquire()
    assert read_lock(proj).pid == 0


def _odd_lock(kind: str, lp: Path) -> None:
    if kind == "fifo":
        os.mkfifo(lp)
    elif kind == "zero":
        lp.symlink_to("/dev/zero")
    elif kind == "link":
        (lp.parent / "other.txt").write_text('{"login": "x"}')
        lp.symlink_to("other.txt")
    elif kind == "dangling":
        lp.symlink_to("nowhere")
    elif kind == "huge":
        lp.write_text("{" + " " * (1 << 20) + "}")


ODD_LOCKS = ("fifo", "zero", "link", "dangling", "huge")


@pytest.mark.parametrize("kind", ODD_LOCKS)
def test_a_lock_that_is_not_a_lock_file_is_named_never_opened_or_read_whole(
        tmp_path: Path, kind: str, monkeypatch: pytest.MonkeyPatch):
    """A pipe would block the open, /dev/zero never ends, a link is someone else's: the lock's
    name is looked at first, opened without following or blocking, and read only so far."""
    proj = tmp_path / "kiln.toml"
    lp = lock_path(proj)
    _odd_lock(kind, lp)
    reads: list[int] = []
    real = os.read
    monkeypatch.setattr(os, "read", lambda fd, n: (reads.append(n), real(fd, n))[1])
    with pytest.raises(UnsafeFileError, match="--break-lock") as err:
        read_lock(proj)
    assert str(lp) in str(err.value) and "not a lock Latchbook wrote" in str(err.value)
    with pytest.raises(UnsafeFileError, match=str(lp)):
        ProjectLock(proj).acquire()
    assert sum(reads) <= 4097
    assert os.path.lexists(lp)


@pytest.mark.parametrize("kind", ODD_LOCKS)
def test_break_lock_removes_only_the_name(tmp_path: Path, kind: str):
    proj = tmp_path / "kiln.toml"
    lp = lock_path(proj)
    _odd_lock(kind, lp)
    holder = break_lock(proj)
    assert holder is not None and holder.pid == 0
    assert not os.path.lexists(lp)
    if kind == "link":
        assert (tmp_path / "other.txt").read_text() == '{"login": "x"}'
    with ProjectLock(proj):
        assert read_lock(proj).pid == os.getpid()


def test_release_leaves_alone_what_took_the_locks_name(tmp_path: Path):
    proj = tmp_path / "kiln.toml"
    lock = ProjectLock(proj).acquire()
    lp = lock_path(proj)
    lp.unlink()
    os.mkfifo(lp)
    lock.release()  # must neither hang on the pipe nor remove it
    assert stat.S_ISFIFO(os.lstat(lp).st_mode)


CONTENDER = """
import sys, time
from reviewer.errors import RecordError
from reviewer.store import ProjectLock, read_with_hash, save_checked
path, me = sys.argv[1], sys.argv[2]
proj = path.replace(".review.toml", ".toml")
done = refused = 0
deadline = time.time() + 3
while done < 20 and time.time() < deadline:
    try:
        with ProjectLock(proj):
            text, sha = read_with_hash(path)
            save_checked(path, (text or "") + f"# {me} {done}\\n", sha)
            done += 1
    except RecordError as exc:
        assert "locked by" in str(exc), exc
        refused += 1
        time.sleep(0.001)
print(done, refused)
"""


def test_contending_processes_lose_no_write(tmp_path):
    """Four processes appending under the lock: every append survives, refusals name the holder."""
    rec = tmp_path / "kiln.review.toml"
    rec.write_text("")
    kids = [_py(CONTENDER, str(rec), f"w{i}") for i in range(4)]
    outs = [k.communicate(timeout=20) for k in kids]
    for (_out, err), k in zip(outs, kids, strict=True):
        assert k.returncode == 0, err
    done = [int(o.split()[0]) for o, _ in outs]
    refused = sum(int(o.split()[1]) for o, _ in outs)
    lines = rec.read_text().splitlines()
    assert len(lines) == sum(done) == 80
    for i in range(4):
        assert [ln for ln in lines if ln.startswith(f"# w{i} ")] == \
            [f"# w{i} {n}" for n in range(20)]
    print(f"\ncontention: 80 appends from 4 processes, {refused} refusals naming the holder")


# --- the journal -----------------------------------------------------------------------------

def test_journal_round_trip_and_clear(tmp_path):
    """Pending edits come back as typed; clearing removes the journal."""
    proj = tmp_path / "kiln.toml"
    proj.write_text("x = 1\n")
    write_journal(proj, [Edit("stages.trigger.timing_r", "4k7 ±5%"),
                         {"path": "parts.U1.eta", "text": "{ min = 0.5, max = 0.8 }"}],
                  base_sha256="abc")
    assert journal_path(proj) == tmp_path / "kiln.journal"
    j = pending_journal(proj)
    assert j is not None
    assert j.edits == [Edit("stages.trigger.timing_r", "4k7 ±5%"),
                       Edit("parts.U1.eta", "{ min = 0.5, max = 0.8 }")]
    assert j.base_sha256 == "abc" and j.base_changed(proj)
    assert j.by["login"] == pwd.getpwuid(os.getuid()).pw_name
    clear_journal(proj)
    assert pending_journal(proj) is None
    write_journal(proj, [Edit("a", "1")])
    write_journal(proj, [])  # nothing pending any more
    assert not journal_path(proj).exists()


def test_damaged_journal_is_an_error_naming_it(tmp_path):
    """A journal we cannot read is never silently dropped."""
    proj = tmp_path / "kiln.toml"
    journal_path(proj).write_text("{not json\n")
    with pytest.raises(RecordError, match=r"kiln\.journal.*damaged"):
        pending_journal(proj)
    journal_path(proj).write_text('{"format": "latchbook.journal/1"}\n' + "[" * 100_000 + "\n")
    with pytest.raises(RecordError, match=r"kiln\.journal.*nested too deep.*move it aside"):
        pending_journal(proj)


HANGUP = """
import sys, time
from reviewer.store import Edit, install_hangup_handler, write_journal
proj = sys.argv[1]
install_hangup_handler(lambda: write_journal(proj, [Edit("supply.voltage", "240 V ±10%")]))
print("ready", flush=True)
time.sleep(600)  # only the handler ends it in time
"""


@pytest.mark.parametrize("sig", [signal.SIGHUP, signal.SIGTERM])
def test_hangup_saves_unsaved_edits_then_ends(tmp_path, sig):
    """A dropped session (SIGHUP) or SIGTERM writes the journal, then the process ends."""
    proj = tmp_path / "kiln.toml"
    child = _py(HANGUP, str(proj))
    assert child.stdout.readline().strip() == "ready"
    child.send_signal(sig)
    child.communicate(timeout=120)  # generous for a loaded machine; far below the sleep
    assert child.returncode == -sig
    j = pending_journal(proj)
    assert j is not None and j.edits == [Edit("supply.voltage", "240 V ±10%")]


def test_old_orphan_temp_files_are_cleaned_recent_ones_kept(tmp_path):
    """Temp files left by a killed writer go at the next save once old; a fresh one may be live."""
    p = tmp_path / "kiln.review.toml"
    old = tmp_path / ".kiln.review.toml.abc123.tmp"
    new = tmp_path / ".kiln.review.toml.def456.tmp"
    for f in (old, new):
        f.write_text("partial")
    os.utime(old, (time.time() - 3600, time.time() - 3600))
    atomic_write(p, "a = 1\n")
    assert not old.exists() and new.exists()


WAITER = """
import sys, time
from reviewer.store import ProjectLock, read_with_hash, save_checked
path, me = sys.argv[1], sys.argv[2]
proj = path.replace(".review.toml", ".toml")
waits = []
for n in range(5):
    lock = ProjectLock(proj, what="save", wait=600)
    with lock:
        text, sha = read_with_hash(path)
        save_checked(path, (text or "") + f"# {me} {n}\\n", sha)
    waits.append(lock.waited)
print(" ".join(f"{w:.4f}" for w in waits))
"""


def test_sixteen_waiting_writers_all_land_none_refused(tmp_path):
    """Sixteen processes, five appends each, waiting for the lock: all 80 land in order per
    writer, none is refused, and each knows how long it waited."""
    rec = tmp_path / "kiln.review.toml"
    rec.write_text("")
    started = time.monotonic()
    kids = [_py(WAITER, str(rec), f"w{i}") for i in range(16)]
    outs = [k.communicate(timeout=900) for k in kids]
    wall = time.monotonic() - started
    for (_out, err), k in zip(outs, kids, strict=True):
        assert k.returncode == 0, err  # a refusal would raise LockedError and exit 1
    waits = [float(w) for o, _ in outs for w in o.split()]
    lines = rec.read_text().splitlines()
    assert len(lines) == len(waits) == 80
    for i in range(16):
        assert [ln for ln in lines if ln.startswith(f"# w{i} ")] == \
            [f"# w{i} {n}" for n in range(5)]
    assert any(w > 0 for w in waits), "nobody waited: the test proves nothing about waiting"
    waits.sort()
    print(f"\n16 waiting writers: 80 appends in {wall:.1f} s, 0 refused; lock wait median "
          f"{waits[40] * 1000:.0f} ms, max {waits[-1] * 1000:.0f} ms")


def test_lock_wait_is_bounded_and_names_the_holder(tmp_path):
    """A writer that cannot get the lock in time gives up with the holder named and a way out;
    a workbook session is not waited for at all."""
    proj = tmp_path / "kiln.toml"
    proj.write_text("x = 1\n")
    holder_code = HOLDER.replace("ProjectLock(sys.argv[1])",
                                 'ProjectLock(sys.argv[1], what="sign")')
    child = _py(holder_code, str(proj), stdin=subprocess.PIPE)
    try:
        assert child.stdout.readline().strip() == "held"
        heard: list[str] = []
        t0 = time.monotonic()
        with pytest.raises(LockTimeout, match=rf"gave up after .* waiting for .*'s sign, pid "
                                              rf"{child.pid}.*--break-lock") as err:
            ProjectLock(proj, what="note", wait=0.3, on_wait=heard.append).acquire()
        assert 0.3 <= time.monotonic() - t0 < 5 and err.value.waited >= 0.3
        assert heard == [f"waiting for {err.value.holder.login}'s sign, pid {child.pid} on "
                         f"{socket.gethostname()}…"]
        # --break-lock: deliberate, names whom it removed; then the lock can be taken.
        holder = break_lock(proj)
        assert holder is not None and holder.pid == child.pid and holder.what == "sign"
        with ProjectLock(proj):
            pass
    finally:
        child.stdin.write("\n")
        child.stdin.close()
        child.wait(10)


def test_session_lock_is_not_waited_for(tmp_path):
    """A workbook session holds the lock until it closes: a command is told at once."""
    proj = tmp_path / "kiln.toml"
    proj.write_text("x = 1\n")
    child = _py(HOLDER, str(proj), stdin=subprocess.PIPE)
    try:
        assert child.stdout.readline().strip() == "held"
        t0 = time.monotonic()
        with pytest.raises(LockedError, match="open in the workbook"):
            ProjectLock(proj, wait=30).acquire()
        assert time.monotonic() - t0 < 5
    finally:
        child.stdin.write("\n")
        child.stdin.close()
        child.wait(10)


def test_leftover_temp_and_lock_temp_files_are_cleaned_on_next_lock(tmp_path):
    """Temp files of killed writers (save and lock) go the next time the lock is taken; a
    lock temp file of a live process stays."""
    proj = tmp_path / "kiln.toml"
    proj.write_text("x = 1\n")
    dead = subprocess.run([sys.executable, "-c", "import os; print(os.getpid())"],
                          capture_output=True, text=True, check=True)
    gone = int(dead.stdout)
    torn = [tmp_path / ".kiln.review.toml.abc123.tmp", tmp_path / ".kiln.toml.x1.tmp",
            tmp_path / ".kiln.journal.q.tmp", tmp_path / f".kiln.lock.{gone}.zz.tmp"]
    live = tmp_path / f".kiln.lock.{os.getpid()}.yy.tmp"
    other = tmp_path / ".kiln-2.toml.x1.tmp"  # another project's: not ours to touch
    for f in [*torn, live, other]:
        f.write_text("partial")
    with ProjectLock(proj):
        pass
    assert not any(f.exists() for f in torn)
    assert live.exists() and other.exists()


def test_journal_of_a_private_project_is_private(tmp_path):
    """The journal holds the project's values: a 0600 project's journal is 0600 too."""
    proj = tmp_path / "kiln.toml"
    proj.write_text("x = 1\n")
    os.chmod(proj, 0o600)
    old = os.umask(0o022)
    try:
        path = write_journal(proj, [Edit("stages.a.b", "1 k")])
    finally:
        os.umask(old)
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o600
    assert pending_journal(proj).edits == [Edit("stages.a.b", "1 k")]


def test_disk_full_while_creating_the_lock_is_named_not_a_traceback(tmp_path, monkeypatch):
    """ENOSPC while writing the lock file: a RecordError that says the disk is full."""
    import errno as errno_mod

    proj = tmp_path / "kiln.toml"
    proj.write_text("x = 1\n")
    real = os.fsync

    def full(fd):
        raise OSError(errno_mod.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    with pytest.raises(RecordError, match="disk is full.*free some space"):
        ProjectLock(proj).acquire()
    monkeypatch.setattr(os, "fsync", real)
    assert not list(tmp_path.glob(".kiln.lock.*.tmp")) and not lock_path(proj).exists()
