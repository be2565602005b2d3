"""The same per-project work on a Dask cluster (the ``cluster`` extra), on the loopback address:
the output is the serial run's, byte for byte."""

from __future__ import annotations

import contextlib
import io
from pathlib import Path

import pytest

from reviewer.cli import main

distributed = pytest.importorskip(
    "distributed", reason="the cluster extra (dask.distributed) is not installed: "
    "pip install 'latchbook[cluster]'")

LINE = Path(__file__).resolve().parents[2] / "projects" / "kiln-line"


def _run(*args: str) -> tuple[int, str]:
    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        code = main(list(args))
    return code, buf.getvalue()


@pytest.fixture(scope="module")
def cluster():
    """One worker process with one thread, scheduler and worker on 127.0.0.1 only."""
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=True,
                                  host="127.0.0.1", dashboard_address=None,
                                  protocol="tcp") as c:
        yield c


def test_check_on_a_local_cluster_matches_serial(cluster, tmp_path):
    """check --json and --junit through --scheduler give the serial run's bytes."""
    files = sorted(str(p) for p in LINE.glob("*.toml"))
    a, b = tmp_path / "serial.xml", tmp_path / "cluster.xml"
    serial = _run("check", *files, "--json", "--jobs", "1", "--junit", str(a))
    on_cluster = _run("check", *files, "--json", "--scheduler", cluster.scheduler_address,
                      "--junit", str(b))
    assert cluster.scheduler_address.startswith("tcp://127.0.0.1:")
    assert on_cluster == serial and serial[0] == 1
    assert a.read_bytes() == b.read_bytes()


def test_status_matrix_on_a_local_cluster(cluster):
    """The product-line matrix computed on the cluster is the serial one."""
    args = ("status", "--matrix", str(LINE), "--json")
    assert _run(*args, "--scheduler", cluster.scheduler_address) == _run(*args, "--jobs", "1")
