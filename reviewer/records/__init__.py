"""Review records: results, the append-only history of sign-offs, its verification, staleness.

``NAME.review.toml`` sits beside ``NAME.toml``. The modules, in import order (each imports only
those before it, and none of them is imported by the engine or the checklist):

* :mod:`~reviewer.records.canon` — canonical bytes and hashes;
* :mod:`~reviewer.records.chain` — entries and the hash chain;
* :mod:`~reviewer.records.policy` — the signing policy and SSH signatures;
* :mod:`~reviewer.records.trust` — the one verification of a history;
* :mod:`~reviewer.records.record` — reading a record (verified on load);
* :mod:`~reviewer.records.staleness` — what changed, and each check's review state;
* :mod:`~reviewer.records.actions` — writing: results, sign-offs, waivers, revocations, notes;
* :mod:`~reviewer.records.verify` — ``latchbook verify`` and anchors;
* :mod:`~reviewer.records.view` — one call for a view: states and history.

Entry kinds and their meaning: ``signoff`` (reviewed), ``approval`` (approved), ``waiver``
(waived: a failing or marginal check accepted with a written reason), ``revoke`` (revoked),
``note`` (noted). A waived check reads "fail | waived", never "pass".
"""

from __future__ import annotations

from reviewer.reasons import MIN_REASON, PLACEHOLDERS, reason_problem
from reviewer.records.actions import (
    RECOVER,
    add_note,
    covered_item,
    fresh_run,
    record_results,
    result_table,
    revoke,
    sign,
    verified_for_write,
    waive,
)
from reviewer.records.canon import (
    canonical_json,
    covered_inputs_hash,
    covered_results_hash,
    entry_bytes,
    entry_hash,
    results_seal,
)
from reviewer.records.chain import COVERING, KINDS, ChainCheck, Entry, check_chain
from reviewer.records.policy import SSH_NAMESPACE, default_key, ssh_sign, ssh_verify
from reviewer.records.record import Record, checklist_of, load_record, record_path
from reviewer.records.staleness import (
    Change,
    CheckState,
    check_states,
    counts,
    item_changes,
    snapshot_diff,
    stale_entries,
)
from reviewer.records.trust import FILE_ALONE, EntryCheck, Trust, verify_history
from reviewer.records.verify import VerifyReport, verify
from reviewer.records.view import HistoryItem, ReviewView, history, review_view

__all__ = ["COVERING", "FILE_ALONE", "KINDS", "MIN_REASON", "PLACEHOLDERS", "RECOVER",
           "SSH_NAMESPACE", "ChainCheck", "Change", "CheckState", "Entry", "EntryCheck",
           "HistoryItem", "Record", "ReviewView", "Trust", "VerifyReport", "add_note",
           "canonical_json", "check_chain", "check_states", "checklist_of", "counts",
           "covered_inputs_hash", "covered_item", "covered_results_hash", "default_key",
           "entry_bytes", "entry_hash", "fresh_run", "history", "item_changes", "load_record",
           "reason_problem", "record_path", "record_results", "result_table", "results_seal",
           "review_view", "revoke", "sign", "snapshot_diff", "ssh_sign", "ssh_verify",
           "stale_entries", "verified_for_write", "verify", "verify_history", "waive"]
