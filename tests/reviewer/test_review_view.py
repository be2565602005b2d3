"""The one-call view of a record (states and history) and what reports make of it."""

from __future__ import annotations

import socket
from pathlib import Path

from reviewer import store
from reviewer.cli import main
from reviewer.records import actions, record_path, review_view, sign
from reviewer.report import gather, verdict

from .test_review import make, me, run_of

REPO = Path(__file__).resolve().parents[2]


def _line(tmp_path: Path) -> Path:
    (tmp_path / "line.checklist.toml").write_text(
        '[checklist]\nname = "line"\nversion = "1"\napprovers = ["kiln-lead"]\n')
    return make(tmp_path, checklist="line.checklist.toml")


def test_history_items_say_who_when_what_why_and_whether_they_verify(tmp_path):
    """Each history item carries who, when, what, why, its standing and verification."""
    p = _line(tmp_path)
    sign(p, stage="trigger", checks=["osc.window"], note="window checked by hand")
    actions.revoke(p, seq=1, note="the wrong revision of the schematic was checked")
    sign(p, stage="trigger", checks=["osc.window"], note="window checked again")
    view = review_view(p, run_of(p))
    first, rev, second = view.history
    assert (first.kind, first.login, first.note, first.verification) == \
        ("signoff", me(), "window checked by hand", "verified")
    assert first.standing == "revoked by #2" and rev.revokes == 1
    assert second.standing == "in force" and second.at is not None
    assert view.review_word("trigger", "osc.window") == "signed"
    assert [h.seq for h in view.for_check("trigger", "osc.window")] == [1, 2, 3]
    text = record_path(p).read_text().replace("window checked again", "window checked twice")
    record_path(p).write_text(text)
    view = review_view(p, run_of(p))
    assert view.history[2].verification == "unverified" and view.history[2].problems
    assert view.review_word("trigger", "osc.window") == "unverified" and not view.verified


def test_report_never_says_complete_while_approval_or_answers_are_missing(tmp_path,
                                                                           monkeypatch):
    """Signed but not approved: the summary says what is outstanding; approved by the lead:
    complete. The demo base (manual questions unanswered) is not complete either."""
    p = _line(tmp_path)
    sign(p, stage="*", note="reviewed against the line checklist")
    d = gather(p, plots=False)
    assert verdict(d).startswith("Review not complete")
    assert any(o.startswith("approval missing") and "kiln-lead" in o for o in d.outstanding)
    person = store.Person("kiln-lead", "kiln-lead", socket.gethostname())
    monkeypatch.setattr(actions, "current_person", lambda: person)
    sign(p, stage="*", meaning="approved", note="approved for the pilot run")
    monkeypatch.undo()
    d = gather(p, plots=False)
    assert d.outstanding == [] and verdict(d).startswith("Review complete")
    base = gather(REPO / "projects" / "kiln-line" / "kiln-base.toml", plots=False)
    assert verdict(base).startswith("Review not complete")
    assert any("manual question" in o for o in base.outstanding)
    assert any(o.startswith("approval missing") for o in base.outstanding)


def test_check_record_refuses_to_rewrite_the_header_of_a_cut_history(tmp_path, capsys):
    """A history cut at the end (header still names more entries): check --record must not
    rewrite the header into agreement; it refuses and says how to recover."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=["osc.window"], note="first")
    sign(p, stage="trigger", checks=["osc.window"], note="second")
    text = record_path(p).read_text("utf-8")
    cut = text[: text.rindex("[[entry]]")]
    record_path(p).write_text(cut, "utf-8")
    capsys.readouterr()
    # The record is input the user must restore: exit 2, the reason named.
    assert main(["check", str(p), "--record"]) == 2
    said = capsys.readouterr()
    assert "does not verify" in said.out + said.err
    assert record_path(p).read_text("utf-8") == cut
