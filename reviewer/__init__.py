"""Latchbook: design reviews of thyristor control circuits (I/O, engine, UI)."""

__version__ = "0.1.0"
TOOL = f"latchbook {__version__}"
