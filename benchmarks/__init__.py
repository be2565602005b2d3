"""Benchmarks: plain scripts that print their figures (run with ``python -m benchmarks.X``)."""
