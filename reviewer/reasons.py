"""Whether a written reason (a waiver's, a revocation's, a looser limit's) has substance.

A leaf module: the checklist and the review records both use it, and it imports neither.
"""

from __future__ import annotations

import re

MIN_REASON = 20
PLACEHOLDERS = {"ok", "okay", "n", "a", "na", "n/a", "none", "waived", "waive", "waiver",
                "accepted", "accept", "fine", "good", "yes", "no", "tbd", "todo", "see",
                "above", "below", "as", "discussed", "per", "agreed", "approved", "x", "test",
                "fixme", "later", "known", "issue", "same", "ditto", "ignore", "ignored",
                "not", "applicable", "it", "is", "the", "this", "and", "to", "be", "will",
                "we", "done", "lgtm", "reviewed", "signed", "nothing", "of", "for", "all"}


def reason_problem(note: str) -> str | None:
    """Why ``note`` is not a reason of substance (None when it is).

    Refused: empty, shorter than 20 characters, fewer than three different words, or made only
    of placeholder words ("ok", "n/a", "waived", "see above" ...).
    """
    text = note.strip()
    if not text:
        return "a reason is required"
    if len(text) < MIN_REASON:
        return f"the reason is too short ({len(text)} characters; at least {MIN_REASON})"
    words = [w.lower() for w in re.findall(r"[A-Za-z0-9]+(?:/[A-Za-z0-9]+)?", text)]
    if len(set(words)) < 3:
        return "the reason needs at least three different words"
    if all(w in PLACEHOLDERS or w.isdigit() for w in words):
        return "the reason is only placeholder words; say why the result is acceptable"
    return None


__all__ = ["MIN_REASON", "PLACEHOLDERS", "reason_problem"]
