"""The workbook's screens, one per module, each with its ``.tcss``."""
