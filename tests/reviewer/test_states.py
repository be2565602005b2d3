"""The shared result and review vocabularies."""

from types import SimpleNamespace

from reviewer.states import FAILING, needs_attention, result_word, review_word


def test_result_words():
    """n/a is the table word for not-applicable; blocked and incomplete stop a build."""
    assert result_word("not-applicable") == "n/a"
    assert {"blocked", "incomplete", "fail", "error"} <= FAILING
    assert not needs_attention("pass") and not needs_attention("not-applicable")
    assert needs_attention("marginal") and needs_attention("incomplete")


def test_review_word_precedence():
    """Unverified beats stale beats waived beats approved beats signed."""
    def st(**kw):
        return SimpleNamespace(**({"signoff": "unsigned", "approval": "", "waiver": "",
                                    "status": "fail"} | kw))
    assert review_word(st(signoff="unverified", waiver="stale")) == "unverified"
    assert review_word(st(signoff="signed", waiver="stale")) == "stale"
    assert review_word(st(waiver="waived")) == "waived"
    assert review_word(st(waiver="waived", status="pass")) == "unsigned"
    assert review_word(st(signoff="signed", approval="approved", status="pass")) == "approved"
    assert review_word(st(signoff="signed", status="pass")) == "signed"
    assert review_word(st(status="pass")) == "unsigned"
