"""How results look in the workbook: status words with a symbol (readable without colour),
margins, the worst value against its limit, and sign-off states. Rich ``Text`` only, so no
markup is ever parsed out of a designator such as ``R[1]``.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

from rich.text import Text

from reviewer.engine import Result

# symbol, word, style: the symbol carries the meaning when NO_COLOR strips the colour.
STATUS = {
    "pass": ("✓", "pass", "green"),
    "marginal": ("~", "marginal", "yellow"),
    "fail": ("✗", "FAIL", "bold red"),
    "fail (waived)": ("w", "fail (waived)", "magenta"),
    "error": ("!", "ERROR", "bold magenta"),
    "not-applicable": ("·", "n/a", "dim"),
    "": ("…", "pending", "dim italic"),
}

SIGN = {
    "signed": ("signed", "green"), "reviewed": ("reviewed", "green"),
    "approved": ("approved", "bold green"), "current": ("signed", "green"),
    "waived": ("waived", "magenta"), "stale": ("STALE", "bold yellow"),
    "unsigned": ("unsigned", "dim"), "none": ("unsigned", "dim"), "revoked": ("revoked", "dim"),
    "": ("—", "dim"),
}


def status_text(status: str) -> Text:
    """``✓ pass``, ``✗ FAIL``… styled."""
    sym, word, style = STATUS.get(status, ("?", status, ""))
    return Text(f"{sym} {word}", style=style)


def margin_text(margin: float | None) -> Text:
    """The margin as a signed percentage, right-aligned by the table."""
    if margin is None or not math.isfinite(margin):
        return Text("—", style="dim")
    style = "bold red" if margin < 0 else ""
    return Text(f"{margin * 100:+.0f} %".replace("-", "−"), style=style)


def worst_vs_limit(result: Result, limits: Mapping[str, float]) -> Text:
    """The checked ratio at the worst corner against the limit it must meet: ``1.96 ≥ 1.20``.

    The engine's margin is ratio/limit − 1 (checks.core.grade), so the ratio is
    (1 + margin)·limit; checks with other limits show the margin only.
    """
    k = limits.get("fail_below")
    if result.margin is None or k is None or not math.isfinite(result.margin):
        return Text("—", style="dim")
    ratio = (1 + result.margin) * k
    op = "≥" if ratio >= k else "<"
    return Text(f"{ratio:.3g} {op} {k:.3g}", style="bold red" if ratio < k else "")


def sign_text(state: str, available: bool) -> Text:
    """A sign-off state in the table ("—" while this version cannot sign)."""
    if not available:
        return Text("—", style="dim")
    word, style = SIGN.get(state, (state or "—", ""))
    return Text(word, style=style)


def count_text(n: int | None, style: str = "") -> Text:
    """A count cell: blank for zero, a dash when unknown."""
    if n is None:
        return Text("—", style="dim")
    return Text(str(n) if n else "·", style=style if n else "dim")


def short_hash(h: str) -> str:
    """The first 12 hex digits of a hash, as shown in dialogs."""
    return h[:12] if h else "—"
