"""Review records: sign-off rules, waivers, staleness, the history chain and tampering."""

from __future__ import annotations

import hashlib
import json
import math
import os
import pwd
import re
import shutil
import stat
import subprocess
import sys
import textwrap
import tomllib
from datetime import UTC, datetime
from pathlib import Path

import pytest
import tomli_w

from reviewer import review, store
from reviewer.checklist import load_checklist
from reviewer.engine import evaluate
from reviewer.errors import ProjectError, RecordError
from reviewer.project import load_project
from reviewer.records import actions, canon
from reviewer.review import (
    add_note,
    check_states,
    load_record,
    record_path,
    record_results,
    revoke,
    sign,
    verify,
    waive,
)
from reviewer.store import Edit, ProjectLock, write_journal

REPO = Path(__file__).resolve().parents[2]

# An invented free-running UJT oscillator: osc.window passes with R_T 10–100 kΩ.
OSC = """\
# A free-running test oscillator (invented values).
[project]
name = "Test oscillator"
revision = "A"
{checklist}
[conditions]
ambient = {{ min = "0 degC", max = "40 degC" }}

[supply]
kind = "dc"
voltage = "24 V ±5%"

[parts.U1]
type = "ujt"
eta = {{ min = 0.6, max = 0.7 }}
rbb = {{ min = "5 kohm", max = "8 kohm" }}
ip = "5 uA"
iv = "4 mA"
vv = "2 V"
vd = "0.6 V"
pd = "300 mW"
ie_peak = "1 A"

[stages.trigger]
kind = "ujt-oscillator"
ujt = "U1"
supply = "20 V"
sync = "free"
timing_r = {{ min = "10 kohm", max = "{rmax}" }}
timing_c = "100 nF ±10%"
base1_r = "47 ohm"
base2_r = "470 ohm"
"""
WINDOW = ["osc.window"]


def make(tmp_path: Path, *, rmax: str = "100 kohm", checklist: str = "",
         name: str = "osc.toml") -> Path:
    p = tmp_path / name
    line = f'checklist = "{checklist}"\n' if checklist else ""
    p.write_text(OSC.format(rmax=rmax, checklist=line), "utf-8")
    return p


def edit(p: Path, old: str, new: str) -> None:
    text = p.read_text("utf-8")
    assert old in text, old
    p.write_text(text.replace(old, new, 1), "utf-8")


def run_of(p: Path):
    project = load_project(p)
    return evaluate(project, load_checklist(project.checklist, p.parent))


def state(p: Path, check: str = "osc.window", stage: str = "trigger"):
    return check_states(load_record(p), run_of(p))[(stage, check)]


def me() -> str:
    return pwd.getpwuid(os.getuid()).pw_name


# --- signing and the record ------------------------------------------------------------------

def test_sign_records_fresh_results_and_a_chained_entry(tmp_path):
    """A sign-off stores the results, and an entry holding who, when, what and its hashes."""
    p = make(tmp_path)
    e = sign(p, stage="trigger", checks=WINDOW, note="window checked by hand")
    doc = tomllib.loads(record_path(p).read_text("utf-8"))
    assert doc["review"]["project"] == "osc.toml"
    [entry] = doc["entry"]
    assert entry["seq"] == e.seq == 1 and entry["kind"] == "signoff"
    assert entry["meaning"] == "reviewed" and entry["checks"] == WINDOW
    assert entry["by"]["login"] == me() and entry["prev_sha256"] == ""
    assert entry["at"].tzinfo is not None
    assert entry["tool"].startswith("latchbook ")
    res = run_of(p).by_key()[("trigger", "osc.window")]
    [item] = entry["signed"]
    assert item["status"] == "pass" and item["inputs_sha256"] == res.inputs_sha256
    # Entry hash: SHA-256 of the canonical JSON of the entry without its own hash.
    body = {k: v for k, v in entry.items() if k != "entry_sha256"}
    body["at"] = {"$datetime": entry["at"].astimezone(UTC).strftime("%Y-%m-%dT%H:%M:%SZ")}
    canon = json.dumps(body, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    assert hashlib.sha256(canon.encode()).hexdigest() == entry["entry_sha256"]
    # Inputs hash: over the sorted (stage, check, inputs hash) of the covered checks.
    triples = json.dumps([["trigger", "osc.window", res.inputs_sha256]], separators=(",", ":"))
    assert hashlib.sha256(triples.encode()).hexdigest() == entry["inputs_sha256"]
    # Results are stored in project order.
    assert [r["check"] for r in doc["result"]] == [r.check for r in run_of(p).results]
    assert state(p).state == "signed"


def test_results_refresh_keeps_history_byte_for_byte(tmp_path):
    """Recording new results rewrites the results part only; every entry's bytes stay."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW)
    add_note(p, note="second entry, to have a history of two")
    before = record_path(p).read_text("utf-8")
    hist = before[before.index("[[entry]]"):]
    edit(p, '"100 nF ±10%"', '"220 nF ±10%"')
    record_results(run_of(p), p)
    after = record_path(p).read_text("utf-8")
    assert after != before
    assert after.endswith(hist)
    assert verify(p).ok


def test_record_is_written_in_a_stable_order(tmp_path):
    """Two writes of the same results differ at most in the time stamp (clean diffs)."""
    p = make(tmp_path)
    record_results(run_of(p), p)
    a = record_path(p).read_text("utf-8")
    record_results(run_of(p), p)
    b = record_path(p).read_text("utf-8")
    strip = re.compile(r"^computed_at = .*$", re.MULTILINE)
    assert strip.sub("", a) == strip.sub("", b)


def test_sign_refused_while_a_covered_check_fails(tmp_path):
    """A failing check without a current waiver cannot be signed."""
    p = make(tmp_path, rmax="10 Mohm")  # R_T max far beyond r_max: never fires
    assert run_of(p).by_key()[("trigger", "osc.window")].status == "fail"
    with pytest.raises(RecordError, match=r"not signed: trigger/osc\.window fails.*waive"):
        sign(p, stage="trigger", checks=WINDOW)
    assert not record_path(p).exists()


@pytest.mark.parametrize("note", ["", "   ", "ok", "n/a", "waived", "fine, accepted",
                                  "ok ok ok ok ok ok ok ok ok", "n/a n/a n/a n/a n/a n/a",
                                  "waived as discussed, see above"])
def test_waiver_without_a_reason_of_substance_is_refused(tmp_path, note):
    """Empty, short (< 20 characters) or placeholder reasons are refused."""
    p = make(tmp_path, rmax="10 Mohm")
    with pytest.raises(RecordError, match="not waived"):
        waive(p, stage="trigger", check="osc.window", note=note)


def test_waiver_reads_fail_waived_then_sign_is_allowed(tmp_path):
    """A waived failure is 'fail — waived', never a pass; with it in force, signing works."""
    p = make(tmp_path, rmax="10 Mohm")
    waive(p, stage="trigger", check="osc.window",
          note="pot is end-stopped at 90 kohm by the knob; measured on the bench, rev A")
    st = state(p)
    assert (st.status, st.waiver, st.state) == ("fail", "waived", "waived")
    assert st.label == "fail | waived"
    assert "pass" not in st.label
    sign(p, stage="trigger", checks=WINDOW)
    st = state(p)
    assert st.signoff == "signed" and st.status == "fail" and st.state == "waived"


def test_waiver_goes_stale_when_its_inputs_change_and_blocks_signing_again(tmp_path):
    """Changing what the waived check reads makes the waiver stale: the failure is back."""
    p = make(tmp_path, rmax="10 Mohm")
    waive(p, stage="trigger", check="osc.window",
          note="pot is end-stopped at 90 kohm by the knob; measured on the bench")
    edit(p, '"10 Mohm"', '"12 Mohm"')
    st = state(p)
    assert st.waiver == "stale" and st.state == "stale"
    assert [c.path for c in st.changed] == ["stages.trigger.timing_r"]
    with pytest.raises(RecordError, match="not signed"):
        sign(p, stage="trigger", checks=WINDOW)


def test_passing_check_cannot_be_waived(tmp_path):
    """There is nothing to waive on a pass."""
    p = make(tmp_path)
    with pytest.raises(RecordError, match="nothing to waive"):
        waive(p, stage="trigger", check="osc.window",
              note="a long enough reason that says nothing in particular here")


def test_sign_refused_with_unsaved_edits(tmp_path):
    """Signing covers the file on disk: refused while edits are unsaved (flag or journal)."""
    p = make(tmp_path)
    with pytest.raises(RecordError, match="unsaved edits"):
        sign(p, stage="trigger", checks=WINDOW, unsaved=True)
    write_journal(p, [Edit("stages.trigger.timing_r", "12k")])
    with pytest.raises(RecordError, match=r"unsaved edit.*osc\.journal"):
        sign(p, stage="trigger", checks=WINDOW)
    assert not record_path(p).exists()


def test_unknown_stage_or_check_is_a_clear_error(tmp_path):
    """A typo names the known stages or checks."""
    p = make(tmp_path)
    with pytest.raises(ProjectError, match="no stage `trigerr`; the stages are trigger"):
        sign(p, stage="trigerr")
    with pytest.raises(ProjectError, match=r"no check osc\.windw.*osc\.window"):
        sign(p, stage="trigger", checks=["osc.windw"])


def test_recorded_login_ignores_user_environment(tmp_path, monkeypatch):
    """$USER / $LOGNAME do not change who signed."""
    monkeypatch.setenv("USER", "mallory")
    monkeypatch.setenv("LOGNAME", "mallory")
    p = make(tmp_path)
    e = sign(p, stage="trigger", checks=WINDOW)
    assert e.by["login"] == me()


def test_record_permissions_survive_a_save(tmp_path):
    """A group-readable record stays so after the next entry is written."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW)
    os.chmod(record_path(p), 0o640)
    add_note(p, note="checked the permissions")
    assert stat.S_IMODE(record_path(p).stat().st_mode) == 0o640


def test_record_changed_on_disk_between_read_and_write_is_not_overwritten(tmp_path, monkeypatch):
    """Another program saving the record meanwhile: no overwrite, ours kept beside it."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW)
    real = review.load_record

    def load_then_someone_edits(path, checklist=None):
        rec = real(path, checklist)
        with record_path(p).open("a", encoding="utf-8") as fh:
            fh.write("# edited elsewhere\n")
        return rec

    monkeypatch.setattr(actions, "load_record", load_then_someone_edits)
    with pytest.raises(RecordError, match=r"changed by someone else.*osc\.review\.mine-"):
        add_note(p, note="this one must not overwrite")
    monkeypatch.undo()
    text = record_path(p).read_text("utf-8")
    assert text.endswith("# edited elsewhere\n") and "must not overwrite" not in text
    [mine] = tmp_path.glob("osc.review.mine-*.toml")
    assert "this one must not overwrite" in mine.read_text("utf-8")


# --- staleness -------------------------------------------------------------------------------

def test_editing_an_input_the_check_reads_makes_it_stale_and_names_it(tmp_path):
    """timing_r is read by osc.window: its sign-off goes stale, showing old → new SI values."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW)
    edit(p, '"100 kohm"', '"120 kohm"')
    st = state(p)
    assert st.signoff == "stale" and st.state == "stale" and st.status == "pass"
    [ch] = st.changed
    assert ch.path == "stages.trigger.timing_r"
    assert ch.old == [55000.0, 10000.0, 100000.0] and ch.new == [65000.0, 10000.0, 120000.0]
    assert ch.text() == ("stages.trigger.timing_r: 55 kΩ (10 kΩ … 100 kΩ) → "
                         "65 kΩ (10 kΩ … 120 kΩ)")


def test_editing_an_input_the_check_does_not_read_keeps_it_current(tmp_path):
    """timing_c is not read by osc.window: its sign-off stays current."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW)
    edit(p, '"100 nF ±10%"', '"220 nF ±5%"')
    assert state(p).signoff == "signed"


def test_reformatting_or_reordering_the_project_keeps_it_current(tmp_path):
    """Comments, spacing, key order and an equal value spelled differently change nothing."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW)
    text = p.read_text("utf-8")
    head, _, stage = text.partition("[stages.trigger]\n")
    lines = [ln for ln in stage.splitlines() if ln.strip()]
    new = ("# reformatted by hand\n" + head.replace(" = ", "   =   ") + "[stages.trigger]\n"
           + "\n".join(reversed(lines)) + "\n")
    new = new.replace('"47 ohm"', '"47R"').replace('min = "10 kohm"', 'min = "10k"')
    p.write_text(new, "utf-8")
    assert load_project(p).stages["trigger"].params["timing_r"].lo == 10_000.0
    st = state(p)
    assert st.signoff == "signed", [c.text() for c in st.changed]


def test_changed_checklist_makes_sign_off_stale(tmp_path):
    """Same inputs, different checklist limits: the sign-off no longer holds."""
    cl = tmp_path / "line.checklist.toml"
    cl.write_text('[checklist]\nname = "line"\nversion = "1"\n', "utf-8")
    p = make(tmp_path, checklist="line.checklist.toml")
    sign(p, stage="trigger", checks=WINDOW)
    assert state(p).signoff == "signed"
    cl.write_text('[checklist]\nname = "line"\nversion = "1"\n\n[limits."osc.window"]\n'
                  "fail_below = 1.3\nmarginal_below = 2.0\n", "utf-8")
    st = state(p)
    assert st.signoff == "stale" and [c.path for c in st.changed] == ["checklist"]


def test_stage_sign_off_covers_all_its_checks(tmp_path):
    """Signing a stage without --check covers every check of the stage."""
    p = make(tmp_path)
    run = run_of(p)
    failing = [r.check for r in run.results if r.status in ("fail", "error")]
    if failing:
        pytest.skip(f"the test oscillator fails {failing} in this build; covered elsewhere")
    e = sign(p, stage="trigger")
    assert e.checks == [r.check for r in run.results if r.stage == "trigger"]
    states = check_states(load_record(p), run)
    assert all(s.signoff == "signed" for s in states.values())


# --- revoke, approve, notes ------------------------------------------------------------------

def test_revoke_withdraws_and_the_earlier_sign_off_is_in_force_again(tmp_path):
    """Revoking the newest sign-off leaves the one before it; revoking that leaves none."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW, note="first look")
    sign(p, stage="trigger", checks=WINDOW, note="second look")
    revoke(p, seq=2, note="signed the wrong revision of the schematic by mistake")
    st = state(p)
    assert st.signoff == "signed" and st.signoff_seq == 1
    revoke(p, seq=1, note="the first review missed the cold-start case entirely")
    assert state(p).signoff == "unsigned" and state(p).state == "unsigned"
    again = revoke(p, seq=1, note="the first review missed the cold-start case entirely")
    assert again.existing and again.seq == 4  # a retry reports the entry it had written
    with pytest.raises(RecordError, match=r"already revoked \(by entry #4\)"):
        revoke(p, seq=1, note="someone else withdrawing the same review again")
    with pytest.raises(RecordError, match="only sign-offs, approvals and waivers"):
        revoke(p, seq=3, note="a revocation cannot itself be revoked here")
    with pytest.raises(RecordError, match="not revoked: the reason is too short"):
        revoke(p, seq=2, note="wrong")
    with pytest.raises(RecordError, match="no entry #9"):
        revoke(p, seq=9, note="there is no such entry in this history")
    with pytest.raises(RecordError, match=r"no entry #9\. None of the 4 entries can be "
                       "revoked") as err:
        revoke(p, seq=9, note="x")  # the entry is judged before the note
    assert "reason" not in str(err.value)
    sign(p, stage="trigger", checks=WINDOW, note="third look")
    with pytest.raises(RecordError, match=r"no entry #9\. Entries that can be revoked: #5 "
                       "signoff of stage trigger by [^;]*$"):
        revoke(p, seq=9, note="x")
    assert verify(p).ok


def test_approval_only_by_listed_approvers_and_after_review(tmp_path):
    """approved: refused for someone not listed, and before a current reviewed sign-off."""
    cl = tmp_path / "line.checklist.toml"
    cl.write_text('[checklist]\nname = "line"\nversion = "1"\napprovers = ["lead-x"]\n')
    p = make(tmp_path, checklist="line.checklist.toml")
    sign(p, stage="trigger", checks=WINDOW)
    with pytest.raises(RecordError, match=f"{me()} is not an approver.*lead-x"):
        sign(p, stage="trigger", checks=WINDOW, meaning="approved")
    cl.write_text(f'[checklist]\nname = "line"\nversion = "1"\napprovers = ["{me()}"]\n'
                  'self_approval = true\n')
    # The checklist changed, so the reviewed sign-off is stale: approval must wait for review.
    with pytest.raises(RecordError, match="no current reviewed sign-off"):
        sign(p, stage="trigger", checks=WINDOW, meaning="approved")
    sign(p, stage="trigger", checks=WINDOW)
    e = sign(p, stage="trigger", checks=WINDOW, meaning="approved", note="final")
    assert e.kind == "approval" and e.meaning == "approved"
    st = state(p)
    assert st.approval == "approved" and st.label == "pass | approved"


def test_note_changes_no_state(tmp_path):
    """A note is history only."""
    p = make(tmp_path)
    add_note(p, note="design meeting: pot value under discussion")
    assert state(p).state == "unsigned"
    with pytest.raises(RecordError, match="needs some text"):
        add_note(p, note="  ")


# --- tampering -------------------------------------------------------------------------------

def _history(p: Path) -> tuple[str, list[str]]:
    """The record's text before the history, and each entry's block of text."""
    text = record_path(p).read_text("utf-8")
    i = text.index("[[entry]]")
    blocks = re.split(r"(?m)^(?=\[\[entry\]\]$)", text[i:])
    return text[:i], [b for b in blocks if b]


def _put(p: Path, head: str, blocks: list[str]) -> None:
    record_path(p).write_text(head + "".join(blocks), "utf-8")


@pytest.fixture
def four(tmp_path):
    """A project with four history entries: sign-off, note, sign-off, note."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW, note="first")
    add_note(p, note="second")
    sign(p, stage="trigger", checks=WINDOW, note="third")
    add_note(p, note="fourth")
    assert verify(p).ok
    return p


def test_changed_value_in_an_old_entry_names_that_entry(four):
    """Editing entry 2's note breaks entry 2's own hash."""
    head, b = _history(four)
    b[1] = b[1].replace('note = "second"', 'note = "2nd"')
    _put(four, head, b)
    rep = verify(four)
    assert not rep.ok and rep.first_bad == 2
    assert "entry 2" in rep.messages[0] and "edited" in rep.messages[0]


def test_deleted_entry_names_where_it_was(four):
    """Removing entry 2 shows at position 2 (entry 3 now sits there)."""
    head, b = _history(four)
    _put(four, head, [b[0], b[2], b[3]])
    rep = verify(four)
    assert not rep.ok and rep.first_bad == 2


def test_deleted_last_entry_is_caught_by_the_header(four):
    """Cutting off the newest entry: the header still names four."""
    head, b = _history(four)
    _put(four, head, b[:3])
    rep = verify(four)
    assert not rep.ok and rep.first_bad == 4 and "removed" in rep.messages[0]


def test_entry_appended_outside_latchbook_is_named(four):
    """A well-hashed entry added by hand after the head is not in the header: named."""
    doc = tomllib.loads(record_path(four).read_text("utf-8"))
    last = doc["entry"][-1]
    extra = dict(last, seq=5, note="slipped in", prev_sha256=last["entry_sha256"])
    extra["entry_sha256"] = review.entry_hash(extra)
    with record_path(four).open("a", encoding="utf-8") as fh:
        fh.write("\n" + tomli_w.dumps({"entry": [extra]}))
    rep = verify(four)
    assert not rep.ok and rep.first_bad == 5 and "outside Latchbook" in rep.messages[0]


def test_reordered_entries_name_the_first_moved(four):
    """Swapping entries 2 and 3."""
    head, b = _history(four)
    _put(four, head, [b[0], b[2] + "\n", b[1].rstrip("\n") + "\n", b[3]])
    rep = verify(four)
    assert not rep.ok and rep.first_bad == 2


def test_edited_result_inside_an_entry_names_it(four):
    """Turning a signed 'pass' into something else in entry 1 breaks entry 1."""
    head, b = _history(four)
    assert 'status = "pass"' in b[0]
    b[0] = b[0].replace('status = "pass"', 'status = "marginal"', 1)
    _put(four, head, b)
    rep = verify(four)
    assert not rep.ok and rep.first_bad == 1


def test_edited_stored_result_is_reported(four):
    """A hand edit of a [[result]] table breaks the results seal."""
    head, b = _history(four)
    head = head.replace('status = "pass"', 'status = "fail"', 1)
    _put(four, head, b)
    rep = verify(four)
    assert not rep.ok and rep.first_bad is None
    assert any("[[result]]" in m for m in rep.messages)


def test_broken_history_refuses_new_entries(four):
    """Nothing is appended over a broken chain."""
    head, b = _history(four)
    b[1] = b[1].replace('note = "second"', 'note = "2nd"')
    _put(four, head, b)
    before = record_path(four).read_text("utf-8")
    with pytest.raises(RecordError, match="history does not verify at entry 2"):
        add_note(four, note="more")
    assert record_path(four).read_text("utf-8") == before


def _rehash(p: Path, mutate) -> None:
    """Forge: change entry 1 with ``mutate`` and re-hash the whole chain and header."""
    text = record_path(p).read_text("utf-8")
    doc = tomllib.loads(text)
    mutate(doc["entry"][0])
    prev = ""
    for e in doc["entry"]:
        e["prev_sha256"] = prev
        e["entry_sha256"] = review.entry_hash(e)
        prev = e["entry_sha256"]
    doc["review"]["head_sha256"] = prev
    record_path(p).write_text(tomli_w.dumps(doc), "utf-8")


def test_rehashed_forgery_without_signatures_is_not_detectable_and_verify_says_so(four):
    """Without SSH signatures a re-hashed chain passes; verify states that limit plainly."""
    _rehash(four, lambda e: e.__setitem__("note", "forged"))
    rep = verify(four)
    assert rep.ok  # the chain alone cannot tell: that is the documented limit
    assert any("re-hash" in m for m in rep.notes)
    assert any("cannot show" in m and "--head" in m for m in rep.notes)


# --- SSH signatures --------------------------------------------------------------------------

@pytest.fixture
def ssh_project(tmp_path):
    """A project whose checklist requires SSH-signed entries, with a throwaway ed25519 key."""
    if shutil.which("ssh-keygen") is None:
        pytest.skip("ssh-keygen (OpenSSH) is not installed: SSH signing cannot be tested")
    key = tmp_path / "id_test"
    subprocess.run(["ssh-keygen", "-q", "-t", "ed25519", "-N", "", "-C", "test", "-f",
                    str(key)], check=True)
    pub = key.with_suffix(".pub").read_text().strip()
    (tmp_path / "allowed_signers").write_text(f"{me()} {pub}\n")
    (tmp_path / "line.checklist.toml").write_text(
        '[checklist]\nname = "signed-line"\nversion = "1"\nsign_with_ssh = true\n'
        'allowed_signers = "allowed_signers"\n')
    p = make(tmp_path, checklist="line.checklist.toml")
    return p, key


def test_ssh_signed_entries_verify(ssh_project):
    """Each entry carries a good signature over its canonical bytes."""
    p, key = ssh_project
    e = sign(p, stage="trigger", checks=WINDOW, ssh_key=key)
    add_note(p, note="signed note", ssh_key=key)
    assert "BEGIN SSH SIGNATURE" in e.signature
    rep = verify(p)
    assert rep.ok and rep.signed == 2, rep.messages


def test_ssh_signing_refused_without_a_key(ssh_project, tmp_path):
    """The checklist asks for signatures; no key, no entry."""
    p, _ = ssh_project
    with pytest.raises(RecordError, match="asks for SSH-signed entries and there is no key"):
        sign(p, stage="trigger", checks=WINDOW, ssh_key=tmp_path / "missing")


def test_ssh_key_not_in_allowed_signers_is_refused(ssh_project, tmp_path):
    """A key the checklist's allowed-signers file does not list cannot sign."""
    p, _ = ssh_project
    other = tmp_path / "id_other"
    subprocess.run(["ssh-keygen", "-q", "-t", "ed25519", "-N", "", "-f", str(other)],
                   check=True)
    with pytest.raises(RecordError, match="is not in .*allowed_signers"):
        sign(p, stage="trigger", checks=WINDOW, ssh_key=other)
    assert not record_path(p).exists()


def test_ssh_rehashed_forgery_is_caught(ssh_project):
    """Re-hashing the chain after an edit no longer passes: entry 1's signature is bad."""
    p, key = ssh_project
    sign(p, stage="trigger", checks=WINDOW, note="original", ssh_key=key)
    add_note(p, note="later", ssh_key=key)
    _rehash(p, lambda e: e.__setitem__("note", "forged"))
    rep = verify(p)
    assert not rep.ok and rep.first_bad == 1
    assert any("not a good signature" in m for m in rep.messages)


def test_ssh_stripped_signature_is_caught(ssh_project):
    """Removing the newest entry's signature (and re-hashing) is caught."""
    p, key = ssh_project
    sign(p, stage="trigger", checks=WINDOW, ssh_key=key)
    add_note(p, note="later", ssh_key=key)
    doc = tomllib.loads(record_path(p).read_text("utf-8"))
    del doc["entry"][1]["signature"]
    record_path(p).write_text(tomli_w.dumps(doc), "utf-8")
    rep = verify(p)
    assert not rep.ok and rep.first_bad == 2


# --- variants --------------------------------------------------------------------------------

def test_base_change_makes_stale_exactly_the_variants_that_read_it(tmp_path):
    """Change IV in the base: the variant inheriting it goes stale, the one overriding it not."""
    base = make(tmp_path, name="osc-base.toml")
    inherit = tmp_path / "osc-a.toml"
    inherit.write_text('[project]\nname = "A"\nrevision = "A"\nvariant_of = "osc-base.toml"\n'
                       '\n[stages.trigger]\nbase2_r = "390 ohm"\n')
    override = tmp_path / "osc-b.toml"
    override.write_text('[project]\nname = "B"\nrevision = "A"\nvariant_of = "osc-base.toml"\n'
                        '\n[parts.U1]\niv = "3 mA"\n')
    for v in (inherit, override):
        sign(v, stage="trigger", checks=WINDOW)
        assert state(v).signoff == "signed"
    edit(base, 'iv = "4 mA"', 'iv = "5 mA"')
    a, b = state(inherit), state(override)
    assert a.signoff == "stale" and [c.path for c in a.changed] == ["parts.U1.iv"]
    assert b.signoff == "signed"


# --- contention ------------------------------------------------------------------------------

HOLD = """
import sys
from reviewer.store import ProjectLock
with ProjectLock(sys.argv[1]):
    print("held", flush=True)
    sys.stdin.readline()
"""

def _child(code: str, *args: str, **kw) -> subprocess.Popen:
    env = dict(os.environ, PYTHONPATH=str(REPO))
    return subprocess.Popen([sys.executable, "-c", textwrap.dedent(code), *args], env=env,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, **kw)


def test_second_writer_is_told_who_holds_the_project(tmp_path):
    """While another process holds the project, sign is refused naming the holder; no loss."""
    p = make(tmp_path)
    sign(p, stage="trigger", checks=WINDOW)
    holder = _child(HOLD, str(p), stdin=subprocess.PIPE)
    try:
        assert holder.stdout.readline().strip() == "held"
        with pytest.raises(RecordError, match=rf"locked by {me()} on .* since .*pid "
                                              rf"{holder.pid}"):
            add_note(p, note="must wait")
    finally:
        holder.stdin.write("\n")
        holder.stdin.close()
        holder.wait(10)
    add_note(p, note="after the holder left")
    notes = [e.note for e in load_record(p).entries]
    assert notes == ["", "after the holder left"]


def _noting(proj: str, me: str, out) -> None:
    """A forked writer: two notes, waiting for the lock; sends back what it heard."""
    heard: list[str] = []
    try:
        for n in range(2):
            add_note(proj, note=f"{me} note {n}", wait=600, on_wait=heard.append)
        out.put((me, "ok", heard))
    except Exception as exc:  # a refusal is the failure this test looks for
        out.put((me, f"{type(exc).__name__}: {exc}", heard))


def test_sixteen_waiting_writers_lose_no_entry_and_none_is_refused(tmp_path):
    """Sixteen processes adding notes at once wait for each other: all 32 entries land, in
    order per writer, the chain verifies, none is refused, and the waits are reported."""
    import multiprocessing
    import time

    p = make(tmp_path)
    record_results(run_of(p), p)
    ctx = multiprocessing.get_context("fork")
    out = ctx.Queue()
    started = time.monotonic()
    kids = [ctx.Process(target=_noting, args=(str(p), f"w{i}", out)) for i in range(16)]
    for k in kids:
        k.start()
    got = [out.get(timeout=900) for _ in kids]  # a loaded machine is slow, never wrong
    for k in kids:
        k.join(30)
    wall = time.monotonic() - started
    assert all(status == "ok" for _, status, _ in got), [g for g in got if g[1] != "ok"]
    rec = load_record(p)
    assert rec.trust.ok and len(rec.entries) == 32
    for i in range(16):
        assert [e.note for e in rec.entries if e.note.startswith(f"w{i} ")] == \
            [f"w{i} note {n}" for n in range(2)]
    assert [e.seq for e in rec.entries] == list(range(1, 33))
    waits = sorted(float(m.split()[1]) for _, _, heard in got for m in heard
                   if m.startswith("waited "))
    assert waits, "nobody waited: the test proves nothing about waiting"
    assert all(any(m.startswith("waiting for ") for m in heard) for _, _, heard in got
               if any(m.startswith("waited ") for m in heard))
    print(f"\n16 waiting writers: 32 entries in {wall:.1f} s, 0 refused; {len(waits)} waits "
          f"reported, longest {waits[-1]:.1f} s")


def test_lock_is_held_during_sign_in_this_process(tmp_path):
    """The workbook holds the lock for its session and can still sign (re-entrant)."""
    p = make(tmp_path)
    with ProjectLock(p):
        sign(p, stage="trigger", checks=WINDOW)
    assert state(p).signoff == "signed"


# --- helpers of the format -------------------------------------------------------------------

def test_snapshot_nulls_survive_toml_and_hash_as_the_engine_does():
    """NaN inputs are null in the engine's snapshot, nan in TOML, and hash the same back."""
    from reviewer.engine import inputs_hash

    snap = {"scheme": "latchbook.inputs/1", "stage": "s", "check": "c",
            "inputs": {"parts.U1.iv#none": [None, None, None], "x": [1.5, 1.0, 2.0]},
            "options": {"device": "ujt", "absent": None}}
    stored = tomllib.loads(tomli_w.dumps({"s": canon.snap_to_toml(snap)}))["s"]
    assert math.isnan(stored["inputs"]["parts.U1.iv#none"][0])
    assert inputs_hash(canon.snap_from_toml(stored)) == inputs_hash(snap)


def test_reason_rules():
    """What counts as a reason of substance."""
    assert review.reason_problem("measured 2.1 V at -10 degC on three boards") is None
    assert "too short" in review.reason_problem("see the test log")
    assert "placeholder" in review.reason_problem("ok, accepted, as discussed, agreed, done")


def test_entry_times_are_utc():
    """Entry times are written in UTC."""
    now = datetime.now(UTC)
    assert store.utc_now().tzinfo is not None
    assert abs((store.utc_now() - now).total_seconds()) < 5
