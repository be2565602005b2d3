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

# symbol, word, style: the symbol carries the meaning when NO_COLOR strips the colour. Every
# result word of reviewer.states has one; an unknown word still shows, as itself.
STATUS = {
    "pass": ("✓", "pass", "green"),
    "marginal": ("~", "marginal", "yellow"),
    "fail": ("✗", "FAIL", "bold red"),
    "error": ("!", "ERROR", "bold magenta"),
    "blocked": ("⊘", "BLOCKED", "bold yellow"),
    "incomplete": ("◌", "INCOMPLETE", "bold yellow"),
    "not-applicable": ("·", "n/a", "dim"),
    "": ("…", "pending", "dim italic"),
}

# Review words of reviewer.states (what the record says), never merged with a result word.
REVIEW = {
    "unverified": ("UNVERIFIED", "bold red"), "stale": ("STALE", "bold yellow"),
    "unsigned": ("unsigned", "dim"), "waived": ("waived", "magenta"),
    "signed": ("signed", "green"), "approved": ("approved", "bold green"),
    "revoked": ("revoked", "dim"), "": ("—", "dim"),
}


def path_text(path: str) -> str:
    """A value's path as people read it: the engine's markers after ``#`` never show
    (``parts.Q1.cold.at#assumed`` → ``parts.Q1.cold.at (assumed)``)."""
    bare, _, mark = path.partition("#")
    return f"{bare} (assumed)" if mark == "assumed" else bare


def shown_path(path: str) -> bool:
    """Whether an input is a value at all (``#none``: the key was not given, nothing read)."""
    return "#none" not in path


def status_text(status: str) -> Text:
    """``✓ pass``, ``✗ FAIL``… styled (a result word only)."""
    sym, word, style = STATUS.get(status, ("?", status, ""))
    return Text(f"{sym} {word}", style=style)


def review_text(review: str) -> Text:
    """A review word styled (``—`` when there is no record)."""
    word, style = REVIEW.get(review, (review, ""))
    return Text(word, style=style)


def state_text(status: str, review: str) -> Text:
    """A result and its review state side by side: ``✗ FAIL | waived``."""
    out = status_text(status)
    if review:
        out.append(" | ", style="dim")
        out.append_text(review_text(review))
    return out


def margin_text(margin: float | None, *, compact: bool = False, status: str = "") -> Text:
    """The margin as people read it: a signed percentage below ten times the limit
    (``+96 %``, ``−12 %``), a multiple of the limit from there (``9028×``; ``compact``, the
    checklist's narrow column, writes ``>10k×`` past 9999×, the detail ``more than 10 000×``).

    The engine's margin is metric/limit − 1 (checks.core.grade): the multiple is 1 + margin.
    A negative margin is red, except on an advisory check graded marginal (``status``), which
    past its level reads marginal, never fail: yellow, like its result.

    >>> [margin_text(m, compact=True).plain for m in (0.05, -0.5, 9026.9, 2e5)]
    ['+5 %', '−50 %', '9028×', '>10k×']
    """
    if margin is None or not math.isfinite(margin):
        return Text("—", style="dim")
    style = ("yellow" if status == "marginal" else "bold red") if margin < 0 else ""
    ratio = 1 + margin
    if ratio >= 10:
        if ratio < 9999.5:
            text = f"{ratio:.0f}×" if compact else f"{ratio:.0f}× the limit"
        else:
            text = ">10k×" if compact else "more than 10 000× the limit"
        return Text(text, style=style)
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
    text = f"{ratio:.3g} {op} {k:.3g}".replace("e+0", "e").replace("e+", "e")
    return Text(text, style="bold red" if ratio < k else "")


def sign_text(review: str, available: bool) -> Text:
    """A review word in a table ("—" while this version cannot sign)."""
    if not available:
        return Text("—", style="dim")
    return review_text(review)


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
    """The fail fraction of a Monte Carlo run in percent, with its 95 % interval: ``39.1±0.7``;
    ``none`` when no sample failed, ``all`` when every one did (the detail gives the bound)."""
    if y is None:
        return Text("—", style="dim")
    p, (lo, hi) = y.fail_fraction, y.fail_interval
    if p == 0:
        return Text("none", style="green")
    if p == 1:
        return Text("all", style="bold red")
    half = max(hi - p, p - lo) * 100
    decimals = max(0, min(3, -math.floor(math.log10(half)))) if half > 0 else 1
    return Text(f"{_pct(p, decimals)}±{half:.{decimals}f}", style="bold red")


def _share(p: float, iv: tuple[float, float], n: int, what: str) -> str:
    if p == 0:
        return f"no sample {what} (fewer than {iv[1] * 100:.2g} % at 95 % confidence)"
    if p == 1:
        return (f"every sample {what} (at least {iv[0] * 100:.4g} % at 95 % confidence)")
    return f"{p * 100:.2f} % {what} ({iv[0] * 100:.2f}–{iv[1] * 100:.2f})"


def yield_line(y: Yield) -> str:
    """One line for the detail: samples, fail and marginal fractions in words.

    A fraction of 0 or 100 % is said in words with its 95 % bound; an "every sample
    marginal" is explained by :func:`yield_caveat`."""
    return (f"{y.samples} samples: {_share(y.fail_fraction, y.fail_interval, y.samples, 'failed')}"
            f"; {_share(y.marginal_fraction, y.marginal_interval, y.samples, 'marginal')}")


def yield_caveat(y: Yield, status: str) -> str:
    """Why every sample came out the same when it did ("" otherwise): the conditions are held
    at the worst corner, so a check that is marginal or fails there because of them stays so
    whatever the parts do."""
    for frac, word in ((y.fail_fraction, "fail"), (y.marginal_fraction, "marginal")):
        if frac == 1:
            return (f"Every sample is {word} because the operating conditions (supply, "
                    f"temperature) are held at the worst corner, where this check is "
                    f"{states_word(status)}; the spread of the parts does not change that. It "
                    "says nothing about how many built units would be affected.")
    return ""


def states_word(status: str) -> str:
    """The result word as a sentence uses it."""
    return "n/a" if status == "not-applicable" else status
