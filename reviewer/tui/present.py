"""How results look in the workbook: status words with a symbol (readable without colour),
margins, the worst value against its limit, and sign-off states. Rich ``Text`` only, so no
markup is ever parsed out of a designator such as ``R[1]``.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

from rich.text import Text

from reviewer import fmt
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


def margin_text(margin: float | None, *, status: str = "") -> Text:
    """The margin as :func:`reviewer.fmt.margin` writes it everywhere (``+4.1 %``, ``12×``,
    ``> 100×``, ``needs 3.6×``); ``—`` when there is none.

    A negative margin is red, except on an advisory check graded marginal (``status``), which
    past its level reads marginal, never fail: yellow, like its result.

    >>> [margin_text(m).plain for m in (0.05, -0.4, 9026.9, -0.715, None)]
    ['+5.0 %', '−40 %', '> 100×', 'needs 3.6×', '—']
    """
    text = fmt.margin(margin)
    if not text:
        return Text("—", style="dim")
    style = ("yellow" if status == "marginal" else "bold red") if margin is not None and \
        margin < 0 else ""
    return Text(text, style=style)


def worst_vs_limit(result: Result, limits: Mapping[str, float]) -> Text:
    """The checked ratio at the worst corner against the limit it must meet: ``1.96 ≥ 1.2``.

    The engine's margin is ratio/limit − 1 (checks.core.grade), so the ratio is
    (1 + margin)·limit; checks with other limits show the margin only. The ratio is rounded
    down (never shown better than it is), the limit as the checklist gives it.
    """
    k = limits.get("fail_below")
    if result.margin is None or k is None or not math.isfinite(result.margin):
        return Text("—", style="dim")
    ratio = (1 + result.margin) * k
    op = "≥" if ratio >= k else "<"
    text = f"{fmt.number(ratio, rounding='down')} {op} {fmt.number(k)}"
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


def yield_cell(y: Yield | None) -> Text:
    """The fail fraction of a Monte Carlo run as :func:`reviewer.fmt.share` writes it (the
    command line's ``MC fail`` column too): ``39 %``; ``< 0.004 %`` when no sample failed (the
    95 % bound), ``> 99.99 %`` when every one did. Red once any sample failed."""
    if y is None:
        return Text("—", style="dim")
    text = fmt.share(y.fail_fraction, y.fail_interval)
    return Text(text, style="green" if y.fail_fraction == 0 else "bold red")


def _share(p: float, iv: tuple[float, float], what: str) -> str:
    if p == 0:
        return f"no sample {what} ({fmt.share(p, iv)} at 95 % confidence)"
    if p == 1:
        return f"every sample {what} ({fmt.share(p, iv)} at 95 % confidence)"
    return f"{fmt.share(p)} {what} (95 % interval {fmt.share(iv[0])} – {fmt.share(iv[1])})"


def yield_line(y: Yield) -> str:
    """One line for the detail: samples, fail and marginal fractions in words.

    A fraction of 0 or 100 % is said in words with its 95 % bound; an "every sample
    marginal" is explained by :func:`yield_caveat`."""
    return (f"{y.samples} samples: {_share(y.fail_fraction, y.fail_interval, 'failed')}"
            f"; {_share(y.marginal_fraction, y.marginal_interval, 'marginal')}")


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
