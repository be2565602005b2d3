"""The attention filter the overview and a stage's checklist share (no Textual here).

One key cycles through the filters; each is a rule over a check's computed result and its
sign-off word (:meth:`reviewer.tui.session.Session.sign_state`). A check whose result is not
in yet matches only "all": a filter shows what is known to need a look, never a guess.
"""

from __future__ import annotations

from dataclasses import dataclass

from reviewer.states import FAILING, needs_attention


@dataclass(frozen=True)
class Filter:
    """One filter: its key, the word the banner shows, and the rule the help states."""

    key: str
    label: str
    rule: str


FILTERS: tuple[Filter, ...] = (
    Filter("all", "all checks", "every stage and every check"),
    Filter("attention", "attention",
           "checks that fail, error, are blocked, incomplete or marginal, and checks whose "
           "sign-off is waived, "
           "stale or missing (unsigned)"),
    Filter("fails", "fails only",
           "checks that fail, error, are blocked or incomplete; waived failures stay in (a "
           "waiver does not make a "
           "check pass)"),
    Filter("stale", "stale only",
           "checks covered by a sign-off, approval or waiver whose inputs, result or "
           "checklist changed since it was given"),
)
BY_KEY = {f.key: f for f in FILTERS}


def next_filter(key: str) -> str:
    """The filter after ``key`` in the cycle (all → attention → fails → stale → all)."""
    keys = [f.key for f in FILTERS]
    return keys[(keys.index(key) + 1) % len(keys)] if key in keys else keys[0]


def matches(key: str, status: str, sign: str) -> bool:
    """Whether a check with result ``status`` ("" while computing) and sign-off word ``sign``
    passes filter ``key``.

    >>> matches("attention", "pass", "signed"), matches("attention", "pass", "stale")
    (False, True)
    >>> matches("fails", "fail", "waived"), matches("stale", "", "")
    (True, False)
    """
    if key == "all":
        return True
    if not status:
        return False
    if key == "attention":
        return needs_attention(status) or sign in ("stale", "waived", "unsigned")
    if key == "fails":
        return status in FAILING
    if key == "stale":
        return sign == "stale"
    raise ValueError(f"unknown filter {key!r}")
