"""Pure engineering computation for Latchbook.

Every function here takes SI magnitudes as numpy arrays (or floats that broadcast) and returns
numpy arrays. Nothing in this package imports pint, textual, tomlkit or does any I/O, so the
same functions serve the corner engine, Monte Carlo sampling and the benchmarks.
"""
