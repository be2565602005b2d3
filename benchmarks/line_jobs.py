"""A product line in one command: serial against ``--jobs 2`` against a local Dask cluster.

Writes the kiln base and ``N`` generated variants (:func:`benchmarks.status_line.write_line`)
into a temporary folder and times whole commands in fresh interpreters, as a build waits for
them: ``check ... --json`` (every project, the versioned JSON on standard output) and
``status --matrix``. The configurations run interleaved, twice each; the faster run is
reported, with the ratio to the serial run, the CPU time of the command and of the worker
processes it started, and the peak resident memory of the command's own process (``wait4``;
worker processes come on top). The load average is printed: on a shared machine the ratios
mean little when it is above the number of cores. The cluster is a
``distributed.LocalCluster`` on 127.0.0.1 with two single-threaded worker processes, started
before the clock runs (its first command includes the workers' first imports). Also prints
the peak memory of ``check --json`` at a quarter of the line, to show it stays flat as the
line grows.

    python -m benchmarks.line_jobs [N]
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from benchmarks.status_line import ROOT, cli, write_line

REPEATS = 2


def run(args: list[str]) -> tuple[float, float, float, int]:
    """Wall seconds, CPU seconds (the command and the worker processes it waited for; not a
    cluster's workers), peak RSS of the command's own process [MiB], exit code."""
    t0 = time.perf_counter()
    proc = subprocess.Popen([*cli(), *args], stdout=subprocess.DEVNULL,
                            stderr=subprocess.DEVNULL, cwd=ROOT)
    _, status, usage = os.wait4(proc.pid, 0)
    dt = time.perf_counter() - t0
    proc.returncode = os.waitstatus_to_exitcode(status)
    return dt, usage.ru_utime + usage.ru_stime, usage.ru_maxrss / 1024, proc.returncode


def load() -> str:
    """The 1-minute load average (other work on the machine shows here)."""
    return f"{os.getloadavg()[0]:.1f}"


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 200
    try:
        from distributed import LocalCluster
    except ImportError:
        LocalCluster = None  # noqa: N806
    with tempfile.TemporaryDirectory(prefix="latchbook-jobs-") as tmp:
        folder = Path(tmp)
        count = write_line(folder, n)
        files = sorted(str(p) for p in folder.glob("*.toml"))
        print(f"product line: kiln-base.toml and {n} variants ({count} projects); "
              f"{os.cpu_count()} cores; best of {REPEATS} interleaved runs per row; "
              f"load average {load()}")
        cluster = None
        if LocalCluster is not None:
            cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                   host="127.0.0.1", dashboard_address=None)
        try:
            for name, args in (("check --json", ["check", *files, "--json"]),
                               ("status --matrix", ["status", "--matrix", str(folder)])):
                configs = [("serial (--jobs 1)", ["--jobs", "1"]), ("--jobs 2", ["--jobs", "2"])]
                if cluster is not None:
                    configs.append(("local cluster, 2 workers",
                                    ["--scheduler", cluster.scheduler_address]))
                runs: dict[str, list[tuple[float, float, float, int]]] = {c: [] for c, _ in configs}
                for _ in range(REPEATS):  # interleaved, so each configuration sees the same load
                    for label, extra in configs:
                        runs[label].append(run(args + extra))
                serial = min(runs[configs[0][0]])[0]
                for label, _ in configs:
                    dt, cpu, rss, code = min(runs[label])
                    shown = ", ".join(f"{r[0]:.2f}" for r in runs[label])
                    print(f"{name:16} {label:26} {dt:6.2f} s  ×{dt / serial:5.2f}  cpu {cpu:6.2f} s"
                          f"  peak RSS {rss:5.0f} MiB  exit {code}  (runs: {shown} s)")
                print(f"{'':16} load average now {load()}")
            if cluster is None:
                print("local cluster: skipped (pip install 'latchbook[cluster]')")
        finally:
            if cluster is not None:
                cluster.close()
        quarter = files[: max(2, len(files) // 4)]
        dt, _, rss, _ = min(run(["check", *quarter, "--json", "--jobs", "1"])
                            for _ in range(REPEATS))
        print(f"check --json over {len(quarter)} projects (serial): {dt:.2f} s, peak RSS "
              f"{rss:.0f} MiB — memory does not grow with the number of projects")


if __name__ == "__main__":
    main()
