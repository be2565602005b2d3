"""Checklists: the standard is complete, user checklists extend it, every error names its key."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from reviewer.checklist import load_checklist, lower_is_stricter, standard
from reviewer.errors import ProjectError
from reviewer.line import run_project
from reviewer.schema import CATALOGUE

LINE = Path(__file__).resolve().parents[2] / "projects" / "kiln-line"
REASON = "the line's element supplier tests every batch at this level before shipping"


def write(tmp_path: Path, body: str, name: str = "t.checklist.toml") -> Path:
    head = '[checklist]\nname = "t"\nversion = "1"\nextends = "standard"\n'
    p = tmp_path / name
    p.write_text(head + body, encoding="utf-8")
    return p


def load(p: Path):
    return load_checklist(p.name, p.parent)


def test_standard_names_every_catalogue_check():
    """The built-in checklist has limits, or later defaults, for exactly the checks of the
    catalogue, never both."""
    from reviewer.checklist import later_defaults

    s = standard()
    later = later_defaults()
    assert not set(s.limits) & set(later)
    assert set(s.limits) | set(later) == {cid for cid, _ in CATALOGUE}
    for check in {cid for cid, _ in CATALOGUE}:
        lim = s.limits_for(check)
        assert lim, check
        assert all(isinstance(v, float | int) for v in lim.values()), check


def test_a_later_check_keeps_the_standard_identity_and_takes_limits():
    """power.harmonics' defaults leave the standard's hash as version 1 had it, and a product
    line can choose the class (looser, so with a reason) or make it fail instead of warn."""
    from reviewer.checklist import later_defaults

    s = standard()
    assert "power.harmonics" not in s.limits
    assert s.limits_for("power.harmonics")["class_factor"] == 1.0
    assert later_defaults()["power.harmonics"]["advisory"] == 1.0


def test_lower_is_stricter_keys_exist():
    """The keys marked lower-is-stricter are real limit keys of the standard."""
    s = standard()
    assert lower_is_stricter("snubber.leakage", "touch_current")
    assert lower_is_stricter("osc.temp-comp", "high")
    assert not lower_is_stricter("power.blocking", "fail_below")
    assert "touch_current" in s.limits["snubber.leakage"] and "high" in s.limits["osc.temp-comp"]


def test_kiln_line_checklist_loads():
    """The demo line's checklist: identity, approvers, tightened limits, off, manual questions."""
    c = load_checklist("kiln-line.checklist.toml", LINE)
    assert (c.name, c.version, c.approvers) == ("kiln-line", "2", ["kiln-lead"])
    assert c.limits_for("power.blocking") == {"fail_below": 1.8, "marginal_below": 2.2}
    # Untouched checks keep the standard's limits.
    assert c.limits_for("osc.window") == standard().limits_for("osc.window")
    assert "thermocouple" in c.disabled["osc.temp-comp"]
    assert [m["id"] for m in c.manual_for("phase-control")] == \
        ["fuse-class", "thermal-cutout", "heatsink-guard"]
    assert [m["id"] for m in c.manual_for("rc-snubber")] == ["snubber-resistor"]
    assert c.manual_for("line-commutation") == []
    assert c.tightened()["power.junction"]["headroom_fail"] == (0.0, 10.0)


@pytest.mark.parametrize(("body", "key", "words"), [
    ('[limitz."power.blocking"]\nfail_below = 2.0\n', "limitz", "did you mean `limits`"),
    ('[limits."power.blockng"]\nfail_below = 2.0\n', "power.blockng",
     "did you mean `power.blocking`"),
    ('[limits."power.blocking"]\nfail_bellow = 2.0\n', "fail_bellow",
     "did you mean `fail_below`"),
    ('[limits."power.blocking"]\nfail_below = "2"\n', "fail_below", "finite number"),
    ('[limits."power.blocking"]\nfail_below = 1.2\n', "fail_below", "looser than the standard"),
    ('[limits."snubber.leakage"]\ntouch_current = 1e-3\n', "touch_current", "looser"),
    ('[limits."power.blocking"]\nfail_below = 2.5\nmarginal_below = 2.2\n', "marginal_below",
     "must not be above"),
    ('[off]\n"power.surj" = "' + REASON + '"\n', "power.surj", "did you mean `power.surge`"),
    ('[off]\n"power.surge" = "n/a"\n', "power.surge", "reason"),
    ('[[manual]]\nid = "a"\nstage_kind = "phase-contrl"\nquestion = "Q?"\n', "stage_kind",
     'did you mean `phase-control`'),
    ('[[manual]]\nid = "a"\nstage_kind = "gate-drive"\nquestion = "Q?"\n'
     '[[manual]]\nid = "a"\nstage_kind = "rc-snubber"\nquestion = "R?"\n', "id", "duplicate"),
    ('[[manual]]\nid = "a"\nstage_kind = "gate-drive"\nquestoin = "Q?"\n', "questoin",
     "did you mean `question`"),
])
def test_errors_name_the_key(tmp_path, body, key, words):
    """Each validation error is a ProjectError naming the file, the key and what to do."""
    p = write(tmp_path, body)
    with pytest.raises(ProjectError) as info:
        load(p)
    err = info.value
    assert err.where is not None and err.where.key == key
    assert str(p) in str(err) and f"`{key}`" in str(err)
    assert words in str(err)


def test_unknown_head_key_and_missing_version(tmp_path):
    """Unknown [checklist] keys and a missing version are errors naming the key."""
    p = write(tmp_path, 'aprovers = ["x"]\n')
    with pytest.raises(ProjectError, match="unknown key `aprovers`.*did you mean `approvers`"):
        load(p)
    q = tmp_path / "v.checklist.toml"
    q.write_text('[checklist]\nname = "v"\n', encoding="utf-8")
    with pytest.raises(ProjectError, match="needs `version`"):
        load(q)


def test_error_line_points_at_the_key(tmp_path):
    """The error carries the line of the offending key in the file."""
    p = write(tmp_path, '\n[limits."power.blocking"]\nmarginal_below = 2.5\nfail_bellow = 2\n')
    with pytest.raises(ProjectError) as info:
        load(p)
    assert info.value.where.line == 8


def test_looser_limit_with_reason_is_kept(tmp_path):
    """A limit below the standard's is accepted with a reason, which is recorded and hashed."""
    p = write(tmp_path, f'[limits."power.blocking"]\nfail_below = 1.3\nreason = "{REASON}"\n')
    c = load(p)
    assert c.limits_for("power.blocking")["fail_below"] == 1.3
    assert c.reasons["power.blocking"] == REASON
    assert "reason" not in c.limits_for("power.blocking")  # never handed to the checks


def test_extends_another_checklist_and_circles(tmp_path):
    """A checklist may extend another file; a circle of extends is an error."""
    write(tmp_path, '[limits."turnoff.time"]\nfail_below = 1.4\nmarginal_below = 1.8\n',
          "a.checklist.toml")
    b = tmp_path / "b.checklist.toml"
    b.write_text('[checklist]\nname = "b"\nversion = "1"\nextends = "a.checklist.toml"\n'
                 '[limits."power.blocking"]\nfail_below = 1.6\n', encoding="utf-8")
    c = load(b)
    assert c.limits_for("turnoff.time")["fail_below"] == 1.4
    assert c.limits_for("power.blocking") == {"fail_below": 1.6, "marginal_below": 2.0}
    loop = tmp_path / "c.checklist.toml"
    loop.write_text('[checklist]\nname = "c"\nversion = "1"\nextends = "c.checklist.toml"\n',
                    encoding="utf-8")
    with pytest.raises(ProjectError, match="circle"):
        load(loop)


def test_changed_checklist_changes_identity(tmp_path):
    """Any change of content (here one limit) changes the sha256 of the identity."""
    fuse = '[limits."power.fuse"]\nfail_below = {}\nmarginal_below = 1.5\n'
    a = load(write(tmp_path, fuse.format(1.2), "a.checklist.toml"))
    b = load(write(tmp_path, fuse.format(1.3), "b.checklist.toml"))
    assert a.identity()["name"] == b.identity()["name"] and a.version == b.version
    assert a.sha256 != b.sha256
    assert load(write(tmp_path, fuse.format(1.2), "c.checklist.toml")).sha256 == a.sha256


@pytest.fixture
def line_copy(tmp_path: Path) -> Path:
    dest = tmp_path / "kiln-line"
    shutil.copytree(LINE, dest)
    return dest


def test_tightened_limit_turns_pass_into_marginal(line_copy):
    """Raising marginal_below above a passing check's ratio makes it marginal, nothing else."""
    base = line_copy / "kiln-base.toml"
    run = run_project(base)
    res = run.by_key()[("power", "power.blocking")]
    assert res.status == "pass"
    ratio = res.values["blocking_ratio"].min
    cl = line_copy / "kiln-line.checklist.toml"
    text = cl.read_text("utf-8").replace("marginal_below = 2.2", f"marginal_below = {ratio * 1.05}",
                                         1)
    cl.write_text(text, encoding="utf-8")
    after = run_project(base).by_key()[("power", "power.blocking")]
    assert after.status == "marginal"
    assert after.margin == pytest.approx(res.margin)  # the margin is to the fail threshold


def test_switched_off_check_reads_its_reason():
    """A check switched off by the checklist is not-applicable, with the checklist's reason."""
    res = run_project(LINE / "kiln-base.toml").by_key()[("trigger", "osc.temp-comp")]
    assert res.status == "not-applicable" and "thermocouple" in res.summary


def test_changed_checklist_makes_signoffs_stale(line_copy):
    """A sign-off binds to the checklist: changing a limit makes it stale, naming the checklist."""
    from reviewer.review import check_states, load_record, sign

    base = line_copy / "kiln-base.toml"
    (line_copy / "kiln-base.review.toml").unlink()
    sign(base, stage="commutation", note="line commutation reviewed for this revision")
    run = run_project(base)
    states = check_states(load_record(base), run)
    assert states[("commutation", "turnoff.time")].signoff == "signed"
    cl = line_copy / "kiln-line.checklist.toml"
    cl.write_text(cl.read_text("utf-8") + '\n[limits."turnoff.time"]\nfail_below = 1.3\n'
                  "marginal_below = 1.6\n", encoding="utf-8")
    run2 = run_project(base)
    st = check_states(load_record(base), run2)[("commutation", "turnoff.time")]
    assert st.signoff == "stale"
    assert any(c.path == "checklist" for c in st.changed)


def test_a_product_line_chooses_the_harmonics_class_or_switches_it_off(tmp_path):
    """Class B (1.5 ×) is looser than the standard's Class A, so it needs a reason;
    advisory = 0 makes an excess fail; [off] switches the check off."""
    import pytest

    from reviewer.errors import ProjectError

    with pytest.raises(ProjectError, match=r"class_factor.*looser"):
        load(write(tmp_path, '[limits."power.harmonics"]\nclass_factor = 1.5\n'))
    c = load(write(tmp_path, '[limits."power.harmonics"]\nclass_factor = 1.5\nreason = "'
                   + REASON + '"\nadvisory = 0\n'))
    assert c.limits_for("power.harmonics") == {"class_factor": 1.5, "fail_below": 1.0,
                                               "marginal_below": 1.0, "advisory": 0.0}
    assert c.tightened()["power.harmonics"]["advisory"] == (1.0, 0.0)
    with pytest.raises(ProjectError, match=r"unknown limit key `klass`"):
        load(write(tmp_path, '[limits."power.harmonics"]\nklass = 1.5\n'))
