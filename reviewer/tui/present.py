"""How results look in the workbook: status words with a symbol (readable without colour),
margins, the worst value against its limit, and sign-off states. Rich ``Text`` only, so no
markup is ever parsed out of a designator such as ``R[1]``.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

from rich.text import Text

from reviewer.engine import Result
from reviewer.tolerance import Yield

# symbol, word, style: the symbol carries the meaning when NO_COLOR strips the colour.
STATUS = {
    "pass": ("✓", "pass", "green"),
    "marginal": ("~", "marginal", "yellow"),
    "fail": ("✗", "FAIL", "bold red"),
    "fail (waived)": ("w", "fail (waived)", "magenta"),
    "error": ("!", "ERROR", "bold magenta"),
    "blocked": ("⊘", "BLOCKED", "bold yellow"),
    "incomplete": ("◌", "INCOMPLETE", "bold yellow"),
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


def margin_text(margin: float | None, *, compact: bool = False) -> Text:
    """The margin as a signed percentage; ``compact`` (the checklist's narrow column) writes
    ten times the limit and more as a power of ten, ``+7e5 %``."""
    if margin is None or not math.isfinite(margin):
        return Text("—", style="dim")
    style = "bold red" if margin < 0 else ""
    pc = margin * 100
    text = f"{pc:+.0e} %".replace("e+0", "e") if compact and abs(pc) >= 999.5 else \
        f"{pc:+.0f} %"
    return Text(text.replace("-", "−"), style=style)


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
    text = f"{ratio:.3g} {op} {k:.3g}".replace("e+0", "e").replace("e+", "e")
    return Text(text, style="bold red" if ratio < k else "")


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


def _pct(x: float, decimals: int) -> str:
    return f"{x * 100:.{decimals}f}"


def yield_cell(y: Yield | None) -> Text:
    """The fail fraction of a Monte Carlo run in percent, with its 95 % interval: ``39.1±0.7``,
    ``<0.02`` when no sample failed (the interval's top), ``>99.98`` when all did."""
    if y is None:
        return Text("—", style="dim")
    p, (lo, hi) = y.fail_fraction, y.fail_interval
    if p == 0:
        return Text(f"<{hi * 100:.2g}", style="green")
    if p == 1:
        return Text(f">{lo * 100:.4g}", style="bold red")
    half = max(hi - p, p - lo) * 100
    decimals = max(0, min(3, -math.floor(math.log10(half)))) if half > 0 else 1
    return Text(f"{_pct(p, decimals)}±{half:.{decimals}f}", style="bold red")


def yield_line(y: Yield) -> str:
    """One line for the detail: samples, fail and marginal fractions with their intervals."""
    def frac(p: float, iv: tuple[float, float]) -> str:
        return f"{p * 100:.2f} % ({iv[0] * 100:.2f}–{iv[1] * 100:.2f})"

    return (f"{y.samples} samples: fail {frac(y.fail_fraction, y.fail_interval)}, "
            f"marginal {frac(y.marginal_fraction, y.marginal_interval)}")
