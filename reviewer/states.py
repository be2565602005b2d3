"""The two vocabularies every view uses: a check's *result* and its *review state*.

A result is what the computation says about the design; a review state is what the review
record says about that result. They are shown side by side ("fail | waived"), never merged
into one word, in the workbook, the command line, the JSON and the reports.
"""

from __future__ import annotations

from typing import Any

#: Result words, worst first. ``blocked``: a check this one depends on failed, so its own
#: number means nothing; ``incomplete``: a key it needs was not given; ``error``: the check
#: itself raised (a defect to report); ``not-applicable``: the circuit does not have the thing.
RESULTS: tuple[str, ...] = (
    "error", "fail", "blocked", "incomplete", "marginal", "pass", "not-applicable",
)

#: Results that stop a build (exit 1) unless a current waiver covers them.
FAILING: frozenset[str] = frozenset({"error", "fail", "blocked", "incomplete"})

#: Results that need a person to look (everything but pass and n/a).
ATTENTION: frozenset[str] = FAILING | {"marginal"}

#: Results a written waiver may accept (an error is a defect to fix, never waived).
WAIVABLE: frozenset[str] = ATTENTION - {"error"}

#: Review words, worst first. ``unverified``: the entry that would cover the check does not
#: verify (chain, signature or approver rule), so it counts for nothing.
REVIEWS: tuple[str, ...] = ("unverified", "stale", "unsigned", "waived", "signed", "approved")


def result_word(status: str) -> str:
    """The short word a table shows for a result (``n/a`` for not-applicable)."""
    return "n/a" if status == "not-applicable" else status


def needs_attention(status: str) -> bool:
    """True for a result a reviewer must look at (not pass, not n/a)."""
    return status in ATTENTION


def review_word(state: Any) -> str:
    """The one review word for a check's record state (a ``CheckState``-like object).

    Precedence: unverified, stale, waived (a current waiver on a failing or marginal result),
    approved, signed, unsigned.
    """
    signoff = getattr(state, "signoff", "unsigned")
    approval = getattr(state, "approval", "")
    waiver = getattr(state, "waiver", "")
    status = getattr(state, "status", "")
    if "unverified" in (signoff, approval, waiver):
        return "unverified"
    if "stale" in (signoff, approval, waiver):
        return "stale"
    if waiver == "waived" and status in ATTENTION:
        return "waived"
    if approval == "approved" and signoff == "signed":
        return "approved"
    if signoff == "signed":
        return "signed"
    return "unsigned"
