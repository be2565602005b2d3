"""The workbook: a keyboard-driven Textual review of one project (``latchbook open``)."""
