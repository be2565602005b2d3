"""Latchbook: design reviews of thyristor control circuits (I/O, engine, UI)."""

import os

__version__ = "0.1.0"
TOOL = f"latchbook {__version__}"

# The checks are elementwise array work: no matrix product is large enough for a BLAS thread
# pool to help, and starting one costs every command about 50 ms when numpy is imported
# (benchmarks/cli.py). Set before any import of numpy; a value the user set is kept.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")
