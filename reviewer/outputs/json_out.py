"""The results document written one project at a time (the run never holds every project).

The text is exactly what :func:`reviewer.textsafe.json_text` gives for the whole document
(indented, control and bidi characters escaped), so a reader cannot tell it was streamed.
"""

from __future__ import annotations

import json
from collections.abc import Mapping
from typing import Any, TextIO

from reviewer.textsafe import json_text


def _dump(value: Any, indent: int) -> str:
    text = json_text(value)  # control and bidi characters escaped, as in every JSON we write
    return text.replace("\n", "\n" + " " * indent)  # strings never hold a raw newline


class JsonStream:
    """``{head..., "projects": [each project as it comes], tail...}`` on a text stream."""

    def __init__(self, out: TextIO, head: Mapping[str, Any]) -> None:
        self.out = out
        self.count = 0
        out.write("{")
        for k, v in head.items():
            out.write(f"\n  {json.dumps(k)}: {_dump(v, 2)},")
        out.write('\n  "projects": [')

    def add(self, project: Mapping[str, Any]) -> None:
        """Write one project's entry."""
        sep = "," if self.count else ""
        self.out.write(f"{sep}\n    {_dump(project, 4)}")
        self.count += 1

    def close(self, tail: Mapping[str, Any]) -> None:
        """Close the list and write the keys known only at the end."""
        self.out.write("\n  ]" if self.count else "]")
        for k, v in tail.items():
            self.out.write(f",\n  {json.dumps(k)}: {_dump(v, 2)}")
        self.out.write("\n}\n")
        self.out.flush()


__all__ = ["JsonStream"]
