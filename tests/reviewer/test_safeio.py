"""reviewer.safeio: only regular files are opened, and never more than the limit is read."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from reviewer import safeio
from reviewer.errors import ProjectError


def test_the_limit_applies_while_reading(monkeypatch: pytest.MonkeyPatch):
    """/proc files are regular files that report size 0 and yet have content: the limit must
    stop the read itself, not a size check before it."""
    path = "/proc/self/maps"
    if not os.path.exists(path):
        pytest.skip("no /proc")
    read: list[int] = []
    real = os.read

    def counting(fd: int, n: int) -> bytes:
        data = real(fd, n)
        read.append(len(data))
        return data

    monkeypatch.setattr(safeio.os, "read", counting)
    with pytest.raises(ProjectError, match="larger than 100 bytes"):
        safeio.read_regular(path, 100)
    assert sum(read) <= 101


def test_what_is_not_a_regular_file_is_never_opened(tmp_path: Path,
                                                    monkeypatch: pytest.MonkeyPatch):
    fifo = tmp_path / "p.toml"
    os.mkfifo(fifo)
    opened: list[str] = []
    monkeypatch.setattr(safeio.os, "open", lambda p, *a: opened.append(str(p)))
    with pytest.raises(ProjectError, match="named pipe"):
        safeio.read_regular(fifo, 1 << 20)
    with pytest.raises(ProjectError, match="device"):
        safeio.read_regular("/dev/zero", 1 << 20)
    assert opened == []
    assert safeio.refusal(fifo) and safeio.refusal("/dev/null") and \
        safeio.refusal(tmp_path) == "this is a folder, not a file"


def test_a_regular_file_is_read_whole(tmp_path: Path):
    p = tmp_path / "a.toml"
    p.write_bytes(b"x" * 5000)
    assert safeio.read_regular(p, 5000) == b"x" * 5000
    with pytest.raises(ProjectError, match="larger than 4 KiB"):
        safeio.read_regular(p, 4999)
    assert safeio.refusal(p) is None
