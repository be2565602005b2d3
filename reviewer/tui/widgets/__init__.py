"""Widgets of the workbook; each posts messages and never reaches into a sibling."""
