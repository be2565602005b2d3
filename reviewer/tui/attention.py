"""The attention filter the overview and a stage's checklist share (no Textual here).

One key cycles through the filters; each is a rule over a check's computed result and its
review word (:meth:`reviewer.tui.session.Session.review`, the words of reviewer.states). A
check whose result is not in yet matches only "all": a filter shows what is known to need a
look, never a guess.
"""

from __future__ import annotations

from dataclasses import dataclass

from reviewer import states


@dataclass(frozen=True)
class Filter:
    """One filter: its key, the word the banner shows, and the rule the help states."""

    key: str
    label: str
    rule: str


FILTERS: tuple[Filter, ...] = (
    Filter("all", "all checks", "every stage and every check"),
    Filter("attention", "attention",
           "checks whose result needs a look (fail, error, blocked, incomplete, marginal), "
           "and checks whose review is unverified, stale, waived or missing (unsigned)"),
    Filter("fails", "fails only",
           "checks whose result stops a build (fail, error, blocked, incomplete); waived "
           "ones stay in (a waiver does not make a check pass)"),
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
    """Whether a check with result ``status`` ("" while computing) and review word ``sign``
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
        return states.needs_attention(status) or sign in (
            "unverified", "stale", "waived", "unsigned")
    if key == "fails":
        return status in states.FAILING
    if key == "stale":
        return sign == "stale"
    raise ValueError(f"unknown filter {key!r}")
