"""Tampering and forgery: every view shows what the one verification found.

Each case starts from a good, SSH-signed history (real ``ssh-keygen -Y`` signatures, keys made
in a temp folder), changes it the way someone who wants a design to look reviewed would, and
asserts what ``status``, the matrix, ``check --json``, ``verify``, the report and the workbook's
session show for the covered check. None may show it signed, approved or waived.
"""

from __future__ import annotations

import json
import os
import re
import shutil
import socket
import subprocess
import tomllib
from pathlib import Path
from typing import Any

import pytest
import tomli_w

from reviewer import store
from reviewer.cli import main
from reviewer.records import actions, load_record, record_path, sign, verify
from reviewer.records.canon import entry_hash
from reviewer.records.policy import ssh_sign
from reviewer.report import gather
from reviewer.tui.session import Session

from .test_review import WINDOW, make, me

pytestmark = pytest.mark.skipif(shutil.which("ssh-keygen") is None,
                                reason="ssh-keygen (OpenSSH) is not installed")
KEY = ("trigger", "osc.window")
LEAD = "kiln-lead"


def _key(folder: Path, name: str) -> Path:
    key = folder / name
    subprocess.run(["ssh-keygen", "-q", "-t", "ed25519", "-N", "", "-C", name, "-f", str(key)],
                   check=True)
    return key


def _pub(key: Path) -> str:
    return key.with_suffix(".pub").read_text().strip()


@pytest.fixture
def signed(tmp_path):
    """A signed line: the engineer (this login) and the lead are signers; the lead approves."""
    keys = tmp_path / "keys"
    keys.mkdir()
    eng, lead, other = _key(keys, "eng"), _key(keys, "lead"), _key(keys, "other")
    (tmp_path / "signers").write_text(f"{me()} {_pub(eng)}\n{LEAD} {_pub(lead)}\n")
    (tmp_path / "line.checklist.toml").write_text(
        '[checklist]\nname = "signed-line"\nversion = "1"\nsign_with_ssh = true\n'
        f'allowed_signers = "signers"\napprovers = ["{LEAD}"]\n')
    p = make(tmp_path, checklist="line.checklist.toml")
    e = sign(p, stage="trigger", checks=WINDOW, note="window checked", ssh_key=eng)
    assert e.signature
    return {"p": p, "eng": eng, "lead": lead, "other": other, "dir": tmp_path}


def as_person(monkeypatch, login: str) -> None:
    person = store.Person(login, login, socket.gethostname())
    monkeypatch.setattr(actions, "current_person", lambda: person)


def _json(argv: list[str], capsys) -> tuple[int, Any]:
    capsys.readouterr()
    code = main(argv)
    return code, json.loads(capsys.readouterr().out)


def _doc_check(doc: dict[str, Any], p: Path) -> tuple[dict[str, Any], dict[str, Any]]:
    """The project and the osc.window check of a results document."""
    [proj] = [x for x in doc["projects"] if Path(x["file"]).name == p.name]
    [chk] = [c for c in proj["checks"] if (c["stage"], c["check"]) == KEY]
    return proj, chk


def views(p: Path, capsys) -> dict[str, Any]:
    """What every view shows for trigger/osc.window, and each command's exit code."""
    out: dict[str, Any] = {}
    code, doc = _json(["status", str(p), "--json"], capsys)
    proj, _ = _doc_check(doc, p)
    out["status"] = (code, proj["record"]["history_ok"], proj["record"]["head_sha256"])
    code, doc = _json(["status", "--matrix", str(p.parent), "--json"], capsys)
    _, chk = _doc_check(doc, p)
    out["matrix"] = (code, chk["review"], f"{chk['result']} | {chk['review']}")
    code, doc = _json(["check", str(p), "--json"], capsys)
    proj, chk = _doc_check(doc, p)
    out["check"] = (code, chk["result"], chk["review"], proj["record"]["history_ok"])
    code, rep = _json(["verify", str(p), "--json"], capsys)
    out["verify"] = (code, rep["ok"], rep["history_ok"])
    data = gather(p, plots=False)
    [trig] = [s for s in data.stages if s.id == "trigger"]
    [row_] = [r for r in trig.checks if r.check == "osc.window"]
    out["report"] = (row_.label, data.history_ok, data.outstanding)
    s = Session(p, read_only=True, lock=False)
    s.compute_all()
    s.refresh_review()
    out["session"] = s.review(*KEY)
    return out


def assert_not_trusted(v: dict[str, Any], word: str = "unverified") -> None:
    """No view shows the check signed; every command that judges the record exits 1."""
    assert v["status"][0] == 1 and v["status"][1] is False
    assert v["matrix"][0] == 1 and v["matrix"][1] == word
    assert v["matrix"][2] == f"pass | {word}"
    assert v["check"] == (0, "pass", word, False)  # check judges results: osc.window passes
    assert v["verify"] == (1, False, False)
    assert v["report"][0] == f"pass | {word}" and v["report"][1] is False
    assert any("does not verify" in o for o in v["report"][2])
    assert v["session"] == word


def test_good_history_shows_signed_everywhere(signed, capsys):
    """The baseline: a signed, verified sign-off reads signed in every view."""
    v = views(signed["p"], capsys)
    assert v["status"][:2] == (0, True) and v["matrix"][:2] == (0, "signed")
    assert v["check"] == (0, "pass", "signed", True)
    assert v["verify"] == (0, True, True)
    assert v["report"][0] == "pass | signed" and v["report"][1] is True
    assert v["session"] == "signed"


def _blocks(p: Path) -> tuple[str, list[str]]:
    text = record_path(p).read_text("utf-8")
    i = text.index("[[entry]]")
    blocks = re.split(r"(?m)^(?=\[\[entry\]\]$)", text[i:])
    return text[:i], [b for b in blocks if b]


def _put(p: Path, head: str, blocks: list[str]) -> None:
    record_path(p).write_text(head + "".join(blocks), "utf-8")


def _two(signed: dict) -> Path:
    """Add a second signed entry (a note by the engineer) so that there is an order."""
    p = signed["p"]
    actions.add_note(p, note="bench check done", ssh_key=signed["eng"])
    return p


@pytest.mark.parametrize("how", ["edit", "delete", "reorder", "duplicate"])
def test_edited_deleted_reordered_duplicated_entries(signed, capsys, how):
    """Any hand change to the history makes the covered check unverified in every view, and
    nothing can be appended on top of it."""
    p = _two(signed)
    head, b = _blocks(p)
    if how == "edit":
        b[0] = b[0].replace('note = "window checked"', 'note = "window checked twice"')
    elif how == "delete":
        b = b[1:]
    elif how == "reorder":
        b = [b[1], b[0]]
    else:
        b = [b[0], b[0], b[1]]
    _put(p, head, b)
    # With the sign-off deleted, nothing covers the check: it reads unsigned.
    assert_not_trusted(views(p, capsys), "unsigned" if how == "delete" else "unverified")
    with pytest.raises(store.RecordError, match="does not verify.*nothing was added.*Restore"):
        sign(p, stage="trigger", checks=WINDOW, ssh_key=signed["eng"])


def _rewrite(p: Path, change, *, key: Path | None = None, login: str = "") -> None:
    """Re-hash the whole chain after ``change(raw_entries)``; sign with ``key`` if given."""
    doc = tomllib.loads(record_path(p).read_text("utf-8"))
    entries = doc["entry"]
    change(entries)
    prev = ""
    for e in entries:
        e.pop("signature", None)
        e["prev_sha256"] = prev
        e["entry_sha256"] = entry_hash(e)
        if key is not None:
            from reviewer.records.canon import entry_bytes

            e["signature"] = ssh_sign(entry_bytes(e), key)
        prev = e["entry_sha256"]
    doc["review"]["entries"] = len(entries)
    doc["review"]["head_sha256"] = prev
    if key is not None:
        from reviewer.records.policy import sign_head

        doc["review"]["head_signature"] = sign_head(p.name, len(entries), prev, key)
        doc["review"]["head_by"] = login
    record_path(p).write_text(tomli_w.dumps(doc), "utf-8")


def test_rehashed_chain_without_keys(signed, capsys):
    """Re-hashing every entry after an edit keeps the chain whole but breaks the signatures."""
    p = signed["p"]
    _rewrite(p, lambda es: es[0].update(note="reviewed by the whole team"))
    assert_not_trusted(views(p, capsys))


def test_signed_with_a_key_not_in_the_signers(signed, capsys):
    """Entries and head re-signed with a key that allowed_signers does not list."""
    p = signed["p"]
    _rewrite(p, lambda es: es[0].update(note="x" * 30), key=signed["other"], login=me())
    assert_not_trusted(views(p, capsys))


def test_valid_signature_over_other_content(signed, capsys):
    """A good signature lifted from another entry does not vouch for this one."""
    p = _two(signed)
    doc = tomllib.loads(record_path(p).read_text("utf-8"))
    doc["entry"][0]["signature"] = doc["entry"][1]["signature"]
    record_path(p).write_text(tomli_w.dumps(doc), "utf-8")
    assert_not_trusted(views(p, capsys))


def test_changed_signers_file_makes_every_sign_off_stale(signed, capsys):
    """Adding one's own key as another principal changes the bound policy: stale, with why."""
    p = signed["p"]
    signers = signed["dir"] / "signers"
    signers.write_text(signers.read_text() + f"root {_pub(signed['other'])}\n")
    v = views(p, capsys)
    assert v["status"][0] == 1 and v["matrix"][1] == "stale" and v["check"][2] == "stale"
    assert v["verify"][0] == 1 and v["report"][0] == "pass | stale" and v["session"] == "stale"
    rep = verify(p)
    assert any("signing policy changed" in s for s in rep.stale)


def test_signing_switched_off_and_rehashed_is_stale(signed, capsys):
    """Turning sign_with_ssh off is a policy change: the old sign-off reads stale."""
    p = signed["p"]
    cl = signed["dir"] / "line.checklist.toml"
    cl.write_text(cl.read_text().replace("sign_with_ssh = true", "sign_with_ssh = false"))
    _rewrite(p, lambda es: None)  # signatures stripped, chain re-hashed
    v = views(p, capsys)
    assert v["matrix"][1] == "stale" and v["check"][2] == "stale" and v["session"] == "stale"
    assert v["verify"][0] == 1
    assert "signing policy changed" in " ".join(verify(p).stale)


def _script_append(p: Path, monkeypatch, *, login: str, key: Path, kind: str = "approval",
                   ) -> None:
    """What a script would write: a well-formed, signed entry, bypassing the rules."""
    as_person(monkeypatch, login)
    run, _ = actions.fresh_run(p)
    rec = load_record(p, run.checklist)
    chosen = [r for r in run.results if (r.stage, r.check) == KEY]
    entry = actions._new_entry(rec, kind=kind, stage="trigger", checks=WINDOW,
                               items=[actions.covered_item(r) for r in chosen], note="final",
                               ident=run.checklist.identity())
    entry = actions.sign_entry(entry, run.checklist, key, p)
    actions._write(rec, new_entry=entry, key=key, **actions._refresh(run))
    monkeypatch.undo()


def test_approval_by_a_non_approver_is_unverified(signed, capsys, monkeypatch):
    """A signer who is not an approver writes a well-signed approval: it does not count."""
    p = signed["p"]
    old = signed["dir"].with_name(signed["dir"].name + "-old")
    old.mkdir()
    shutil.copy(record_path(p), old / "osc.review.toml")
    shutil.copy(p, old / "osc.toml")
    # The engineer is a listed signer but not an approver.
    _script_append(p, monkeypatch, login=me(), key=signed["eng"])
    assert_not_trusted(views(p, capsys))
    assert any("not an approver" in m for m in verify(p).messages)
    from reviewer.diff import diff_records

    d = diff_records(old / "osc.review.toml", record_path(p))
    [added] = [e for e in d.entries if e.kind == "approval"]
    assert "UNVERIFIED" in added.detail
    assert any("NEW does not verify" in str(i) for i in d.info)


def test_self_approval_refused_and_unverified(signed, capsys, monkeypatch):
    """The lead reviews and approves the same check: refused when written, unverified when
    a script writes it anyway; with self_approval = true it counts."""
    p = signed["p"]
    actions.revoke(p, seq=1, note="the engineer's review is withdrawn for a second look",
                   ssh_key=signed["eng"])
    as_person(monkeypatch, LEAD)
    sign(p, stage="trigger", checks=WINDOW, note="lead reviewed", ssh_key=signed["lead"])
    with pytest.raises(store.RecordError, match="cannot also approve"):
        sign(p, stage="trigger", checks=WINDOW, meaning="approved", ssh_key=signed["lead"])
    monkeypatch.undo()
    _script_append(p, monkeypatch, login=LEAD, key=signed["lead"])
    assert_not_trusted(views(p, capsys))
    assert any("self-approval" in m for m in verify(p).messages)
    cl = signed["dir"] / "line.checklist.toml"
    cl.write_text(cl.read_text() + "self_approval = true\n")
    # A policy change: everything is stale until signed again under it.
    assert views(p, capsys)["check"][2] == "stale"


def test_approval_by_the_approver_of_someone_elses_review(signed, capsys, monkeypatch):
    """The rule's positive side: the engineer reviews, the lead approves: approved."""
    p = signed["p"]
    as_person(monkeypatch, LEAD)
    e = sign(p, stage="trigger", checks=WINDOW, meaning="approved", ssh_key=signed["lead"])
    monkeypatch.undo()
    assert e.kind == "approval"
    v = views(p, capsys)
    assert v["check"] == (0, "pass", "approved", True) and v["verify"][0] == 0


def test_truncation_with_a_fixed_header(signed, capsys):
    """Cutting the last entry and fixing the header: the signed head no longer matches; a
    header replayed from before (a once-valid state) is caught only by the anchor."""
    p = _two(signed)
    anchor = load_record(p).head
    before = record_path(p).read_text("utf-8")
    head, b = _blocks(p)
    doc = tomllib.loads(record_path(p).read_text("utf-8"))
    first = doc["entry"][0]["entry_sha256"]
    head = head.replace("entries = 2", "entries = 1").replace(anchor, first)
    _put(p, head, b[:1])
    v = views(p, capsys)
    # The entry left is genuine (still signed), but the record does not verify.
    assert v["status"][:2] == (1, False) and v["verify"] == (1, False, False)
    assert v["check"] == (0, "pass", "signed", False) and v["matrix"][0] == 1
    with pytest.raises(store.RecordError, match="does not verify"):
        actions.add_note(p, note="on top of a cut", ssh_key=signed["eng"])
    rep = verify(p, head=anchor)
    assert not rep.history_ok and rep.anchor_found is False
    assert any("signed head does not match" in m for m in rep.messages)
    # Replay: the record exactly as it was after the first entry (kept, say, in git history).
    record_path(p).write_text(before, "utf-8")
    _put(p, *_cut_to_first(p, signed))
    rep = verify(p)
    assert rep.history_ok, rep.messages  # the file alone cannot tell
    assert any("cannot show" in n for n in rep.notes)
    rep = verify(p, head=anchor)
    assert not rep.ok and rep.anchor_found is False
    capsys.readouterr()
    assert main(["verify", str(p), "--head", anchor[:16]]) == 1
    assert "not in this history" in capsys.readouterr().out


def _cut_to_first(p: Path, signed: dict) -> tuple[str, list[str]]:
    """The record as the engineer's first sign-off left it, rebuilt by signing with the
    engineer's key (the same bytes a saved copy would hold)."""
    from reviewer.records.policy import sign_head

    head, b = _blocks(p)
    doc = tomllib.loads(record_path(p).read_text("utf-8"))
    first = doc["entry"][0]["entry_sha256"]
    sig = sign_head(p.name, 1, first, signed["eng"])
    text = tomllib.loads(head)["review"]
    text.update(entries=1, head_sha256=first, head_signature=sig, head_by=me())
    return tomli_w.dumps({"review": text} | {"result": doc["result"]}) + "\n", b[:1]


def test_result_table_edit_shows_in_status_and_verify(signed, capsys):
    """A hand edit of a stored [[result]] table: the record does not verify (status exit 1),
    the check's own review state is unchanged (results are recomputed), check --record
    stores fresh results and clears it."""
    p = signed["p"]
    text = record_path(p).read_text("utf-8")
    record_path(p).write_text(text.replace('status = "pass"', 'status = "fail"', 1), "utf-8")
    v = views(p, capsys)
    assert v["status"][:2] == (1, False) and v["verify"] == (1, False, False)
    assert v["check"] == (0, "pass", "signed", False) and v["matrix"][0] == 1
    capsys.readouterr()
    assert main(["check", str(p), "--record"]) == 0
    assert verify(p).ok


def test_status_prints_the_head_and_the_report_carries_it(signed, capsys):
    """The anchor is offered where a lead will keep it: status and every report."""
    p = signed["p"]
    head = load_record(p).head
    capsys.readouterr()
    main(["status", str(p)])
    assert f"head {head[:16]}" in capsys.readouterr().out
    md = __import__("reviewer.report", fromlist=["render"]).render(p, "md")
    assert head in md and "verify --head" in md
    assert os.path.exists(record_path(p))
