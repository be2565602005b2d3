"""reviewer.edits: a value set by path keeps the file's comments and layout, and the re-read
file equals exactly what was intended."""

from __future__ import annotations

import tomllib

import pytest

from reviewer.edits import apply_edit, check_intent, get_raw, parse_typed, set_value
from reviewer.errors import LatchbookError, ProjectError
from tests.tui.conftest import comment_of


def test_comment_after_the_value_is_kept(kiln):
    """Changing a value keeps the comment on its line and every other line as it was."""
    text = kiln.read_text()
    comment = comment_of(kiln, "timing_r")
    new = set_value(text, "stages.trigger.timing_r", {"min": "4.7 kohm", "max": "104.7 kohm"})
    assert f'{{ min = "4.7 kohm", max = "104.7 kohm" }}   {comment}' in new
    changed = [(a, b) for a, b in zip(text.splitlines(), new.splitlines(), strict=True)
               if a != b]
    assert len(changed) == 1


def test_reparse_equals_intent(kiln):
    """After an edit, tomllib reads the new value at the path and nothing else differs."""
    text = kiln.read_text()
    new, project = apply_edit(text, "supply.inductance", "80 uH", kiln)
    assert get_raw(new, "supply.inductance") == "80 uH"
    old_doc, new_doc = tomllib.loads(text), tomllib.loads(new)
    new_doc["supply"]["inductance"] = old_doc["supply"]["inductance"]
    assert old_doc == new_doc
    assert project.supply["inductance"].nom == pytest.approx(80e-6)


def test_inline_table_member(kiln):
    """A key inside an inline table (load.r) is set in place, its neighbours untouched."""
    new, project = apply_edit(kiln.read_text(), "stages.power.load.r", "30 ohm ±5%", kiln)
    assert 'load = { r = "30 ohm ±5%", cold_r = "24 ohm" }' in new
    assert project.stages["power"].params["load"]["r"].hi == pytest.approx(31.5)


def test_variant_gets_its_own_table(workdir):
    """Editing an inherited value of a variant writes an override into the variant file."""
    path = workdir / "kiln-120.toml"
    new, project = apply_edit(path.read_text(), "stages.snubber.r", "33 ohm", path)
    assert "[stages.snubber]" in new and 'r = "33 ohm"' in new
    assert "# The 120 V / 60 Hz variant" in new
    assert project.stages["snubber"].params["r"].nom == pytest.approx(33.0)


def test_wrong_dimension_is_refused_with_the_grammar_message(kiln):
    """The same parser as the files: a voltage for a resistance says what to type."""
    with pytest.raises(LatchbookError, match="needs a resistance"):
        apply_edit(kiln.read_text(), "stages.snubber.r", "10 V", kiln)


def test_bare_number_for_a_dimensional_key_is_refused(kiln):
    """A bare number where a unit is needed is the file grammar's error, not accepted."""
    with pytest.raises(LatchbookError, match="has no unit"):
        apply_edit(kiln.read_text(), "stages.snubber.r", "47", kiln)


@pytest.mark.parametrize(("typed", "raw"), [
    ("4k7", "4k7"), ("47 kohm ±5%", "47 kohm ±5%"), ("0.65", 0.65),
    ('{ min = "1 V", max = "2 V" }', {"min": "1 V", "max": "2 V"}), ('"2 V"', "2 V")])
def test_typed_forms(typed, raw):
    """What a user types is a TOML literal when it is one, else a bare string."""
    assert parse_typed(typed) == raw


def test_nan_and_empty_are_refused():
    """NaN (which TOML allows) and an empty field are errors."""
    with pytest.raises(LatchbookError, match="NaN"):
        parse_typed("nan")
    with pytest.raises(LatchbookError, match="empty"):
        parse_typed("   ")


def test_intent_check_notices_a_second_change(kiln):
    """check_intent fails when anything besides the edited value moved."""
    text = kiln.read_text()
    new = set_value(set_value(text, "supply.inductance", "1 uH"), "stages.snubber.r", "1 ohm")
    with pytest.raises(ProjectError, match="changed other values"):
        check_intent(text, new, "supply.inductance", "1 uH")


def test_an_edit_keeps_a_byte_order_mark(workdir):
    """A project saved with a UTF-8 byte-order mark loads, and an edit keeps the mark and
    changes exactly the value typed."""
    path = workdir / "flasher-dc.toml"
    text = "\ufeff" + path.read_text(encoding="utf-8")
    new, project = apply_edit(text, "stages.lamp.duty", "0.4", path)
    assert new.startswith("\ufeff# Beacon flasher") and project.stages["lamp"].params[
        "duty"].nom == 0.4
    assert new.replace("duty = 0.4", "duty = 0.5") == text
