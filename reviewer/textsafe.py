"""Text from a user's file, made safe to show: on a terminal, in Markdown, in JSON.

A project name, a stage id, a note or a file name can carry terminal control sequences (ESC,
OSC titles and links, BEL, a C1 CSI) or Unicode bidirectional overrides that make a line read
differently from what it holds. :func:`visible` shows such characters instead of obeying them:
``\\x1b`` for a control character, ``⟨U+202E⟩`` for a bidi or line-separator control. Every
place that shows text from a file goes through it (the CLI tables and messages, the status
matrix, the diff, the reports, the workbook's widgets).
"""

from __future__ import annotations

import json
import re
from typing import IO, Any

# Bidi embeddings, overrides, isolates and marks; the Arabic letter mark; line/paragraph
# separators (they break a line where the reader sees none).
_FORMAT = "\u061c\u200e\u200f\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069" \
          "\u2028\u2029"
_CONTROL = "".join(chr(c) for c in (*range(0x00, 0x20), *range(0x7F, 0xA0)))
_UNSAFE = re.compile(f"[{re.escape(_CONTROL + _FORMAT)}]")
_UNSAFE_KEEP_LINES = re.compile(f"[{re.escape(_CONTROL.replace(chr(10), '') + _FORMAT)}]")
_LONG_WORD = re.compile(r"[^\s/`'\"\[\]:;]{120,}")  # no key, value or file name part is this long
_MD_SPECIAL = re.compile(r"([\\`*_\[\]|~])")
_MD_LEADING = re.compile(r"^(\s*)([#>+=-]|\d+[.)])")


def _show(m: re.Match[str]) -> str:
    c = m.group(0)
    if c in _FORMAT:
        return f"⟨U+{ord(c):04X}⟩"
    return f"\\x{ord(c):02x}"


def visible(text: Any, *, lines: bool = False) -> str:
    """``text`` with control and bidi characters shown, not obeyed.

    With ``lines=True`` a newline is kept (for multi-line views); a tab is always shown.

    >>> visible("kiln\\x1b]0;owned\\x07")
    'kiln\\\\x1b]0;owned\\\\x07'
    >>> visible("abc\\u202edef")
    'abc⟨U+202E⟩def'
    """
    s = str(text)
    return (_UNSAFE_KEEP_LINES if lines else _UNSAFE).sub(_show, s)


def message(exc: Any, limit: int = 800) -> str:
    """An error message for the terminal: visible, and cut short (a file can put a megabyte
    of text into a key name)."""
    s = _LONG_WORD.sub(lambda m: f"{m.group(0)[:40]}…({len(m.group(0))} characters)",
                       visible(exc))
    return s if len(s) <= limit else s[: limit - 1] + "…"


def is_clean(text: str) -> bool:
    """True when ``text`` holds no control or bidi character (newlines allowed)."""
    return _UNSAFE_KEEP_LINES.search(text) is None


def markdown(text: Any) -> str:
    """User text for a Markdown line or table cell: visible, and no Markdown syntax at all.

    Links, images, emphasis, headings and table breaks are escaped with a backslash; ``<`` and
    ``>`` become entities so that no HTML or autolink (``<javascript:…>``) gets through.

    >>> markdown("[x](javascript:alert(1)) ![i](http://h/p.png) <b>")
    '\\\\[x\\\\](javascript:alert(1)) !\\\\[i\\\\](http://h/p.png) &lt;b&gt;'
    """
    s = visible(text)
    s = _MD_SPECIAL.sub(r"\\\1", s)
    s = _MD_LEADING.sub(lambda m: m.group(1) + "\\" + m.group(2), s)
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _escape_json(m: re.Match[str]) -> str:
    return f"\\u{ord(m.group(0)):04x}"


def json_text(doc: Any) -> str:
    """``doc`` as indented JSON, readable (non-ASCII kept) but with every control and bidi
    character escaped as ``\\uXXXX`` (json escapes C0 itself; C1 and bidi would pass raw).

    >>> json_text({"a": "x\\u202e"})
    '{\\n  "a": "x\\\\u202e"\\n}'
    """
    return _UNSAFE_KEEP_LINES.sub(_escape_json, json.dumps(doc, indent=2, ensure_ascii=False))


def dump_json(doc: Any, stream: IO[str]) -> None:
    """Write :func:`json_text` of ``doc`` and a newline to ``stream``."""
    stream.write(json_text(doc))
    stream.write("\n")


class _Visible:
    """A rich renderable whose text segments pass through :func:`visible` (rich's own control
    segments, which carry no user text, pass as they are)."""

    def __init__(self, inner: Any) -> None:
        self.inner = inner

    def __rich_console__(self, console: Any, options: Any) -> Any:
        from rich.segment import Segment

        for seg in console.render(self.inner, options):
            if seg.control:
                yield seg
            else:
                yield Segment(visible(seg.text, lines=True), seg.style)


class _VisibleHook:
    """A rich render hook wrapping everything printed in :class:`_Visible`."""

    def process_renderables(self, renderables: list[Any]) -> list[Any]:
        return [_Visible(r) for r in renderables]


def safe_console(stream: IO[str], width: int | None = None) -> Any:
    """A rich Console on ``stream`` that never lets a control or bidi character of user text
    through (a last line of defence: callers still pass text through :func:`visible` so that
    table columns keep their widths)."""
    from rich.console import Console

    console = Console(file=stream, highlight=False, soft_wrap=False, width=width)
    console.push_render_hook(_VisibleHook())
    return console
