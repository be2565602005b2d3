"""`latchbook report`: content of the Markdown and HTML reports on the demo product line."""

from __future__ import annotations

import html
import re
from pathlib import Path

import pytest

from reviewer import TOOL
from reviewer.cli import main
from reviewer.report import render
from reviewer.safety import CAUTIONS, FOOTER

LINE = Path(__file__).resolve().parents[2] / "projects" / "kiln-line"


@pytest.fixture(scope="module")
def base_html() -> str:
    return render(LINE / "kiln-base.toml", "html")


@pytest.fixture(scope="module")
def failing_html() -> str:
    return render(LINE / "kiln-120-2k.toml", "html")


@pytest.fixture(scope="module")
def stale_md() -> str:
    return render(LINE / "kiln-120-1k.toml", "md")


def _text(doc: str) -> str:
    """The visible text of an HTML report (tags dropped, entities decoded)."""
    return html.unescape(re.sub(r"<[^>]+>", " ", doc))


def test_html_is_self_contained(base_html):
    """No external reference: no http(s) src/href, no <link>, no <script>, no @import."""
    assert not re.search(r"""(?:src|href)\s*=\s*["']?\s*(?:https?:)?//""", base_html, re.I)
    assert not re.search(r"<link\b", base_html, re.I)
    assert not re.search(r"<script\b", base_html, re.I)
    assert "@import" not in base_html
    assert not re.search(r"url\(\s*(?!#)", base_html)  # only the SVG's own clip paths
    assert "http://" not in base_html and "https://" not in base_html
    assert "@media print" in base_html


def test_html_has_plots_as_inline_svg(base_html):
    """The oscillator's and the snubber's waveforms are drawn as inline SVG."""
    assert base_html.count("<svg") >= 2
    assert "timing capacitor voltage" in base_html
    assert "<?xml" not in base_html and "<!DOCTYPE svg" not in base_html


def test_identity_cautions_and_footer(base_html):
    """Identity, checklist version, every caution, and the footer's disclaimer are present."""
    text = _text(base_html)
    assert "Studio kiln controller, 230 V 1 kW" in text and "Revision" in text
    assert "kiln-line version 2" in text and TOOL in text
    for title, _ in CAUTIONS:
        assert title in text
    assert FOOTER in text
    assert "compliant" not in FOOTER.lower() or "do not show compliance" in FOOTER


def test_waiver_justification_and_history(base_html):
    """The base's waiver reason, its sign-off history with names, times and meanings."""
    text = _text(base_html)
    assert "interlocked with the lid switch" in text
    assert "Waiver:" in text and "marginal | waived" in text
    assert "Sign-off history" in text
    for word in ("waiver", "signoff", "reviewed", "waived", "UTC"):
        assert word in text
    assert "cannot show that entries were cut off" in text and "verify --head" in text


def test_manual_questions_per_stage(base_html):
    """Manual questions appear in the stages of their kind, answered or "not answered"."""
    stages = re.split(r'<section class="stage"[^>]*>', base_html)[1:]
    by_id = {re.search(r"<h2>Stage (\S+)", s).group(1): s for s in stages}
    power, snub, comm = by_id["power"], by_id["snubber"], by_id["commutation"]
    assert "fuse-class" in power and "thermal-cutout" in power and "heatsink-guard" in power
    assert "snubber-resistor" in snub and "fuse-class" not in snub
    assert "Manual questions" not in comm
    fuse_row = re.search(r"<tr><td>[^<]*<code>fuse-class</code></td><td>([^<]*)</td>", power)
    assert fuse_row.group(1) == "yes"
    cut_row = re.search(r"<tr><td>[^<]*<code>thermal-cutout</code></td><td>([^<]*)</td>", power)
    assert cut_row.group(1) == "not answered"


def test_values_limits_and_worst_corner(failing_html):
    """Per check: named values with nominal/min/max/unit, the limits in force, the worst corner."""
    text = _text(failing_html)
    assert "junction_temperature" in text and "°C" in text
    # The line's tightened limits, as words (not the checklist's keys).
    assert "fails closer than 10 K below tj_max; marginal closer than 30 K below it" in text
    assert "headroom_fail" not in text and "fail_below" not in text
    assert "Worst corner:" in text


def test_failing_variant_reported_failing(failing_html):
    """The 120 V 2 kW variant: its power stage fails, with the fix in numbers, and its chain."""
    stages = re.split(r'<section class="stage"[^>]*>', failing_html)[1:]
    power = next(s for s in stages if s.startswith("<h2>Stage power"))
    assert re.search(r'<span class="fail">fail</span>', power)
    assert re.search(r"<td>power\.junction</td><td[^>]*>fail", power)
    assert "needs Rth(s-a)" in html.unescape(power)
    assert "kiln-120-2k.toml, based on kiln-120-1k.toml, based on kiln-base.toml" in failing_html


def test_inputs_show_where_they_came_from(failing_html):
    """Each resolved input names the file it came from (variant or base)."""
    rows = dict(re.findall(r"<tr><td><code>([^<]+)</code></td><td>[^<]*</td><td>([^<]+)</td>",
                           failing_html))
    assert rows["stages.power.load.r"] == "kiln-120-2k.toml"
    assert rows["stages.trigger.timing_c"] == "kiln-120-1k.toml"
    assert rows["parts.Q1.vdrm"] == "kiln-base.toml"


def test_stale_variant_markdown(stale_md):
    """The 120 V 1 kW record's sign-off is stale at export: the history row and the stage say so."""
    assert "## Stage `snubber` (rc-snubber): marginal \\| stale" in stale_md
    row = next(ln for ln in stale_md.splitlines() if ln.startswith("| 1 | signoff"))
    assert "STALE" in row and "stages.snubber.c" in row
    assert "Changed since signed:" in stale_md
    assert "Waveforms: drawn when the report is written to a file (-o FILE)." in stale_md
    assert FOOTER in stale_md


def test_markdown_escapes_table_breaks(tmp_path):
    """A project name with | and < cannot break a Markdown table or inject HTML."""
    p = tmp_path / "odd.toml"
    base = (LINE / "kiln-base.toml").read_text("utf-8")
    p.write_text(base.replace('name = "Studio kiln controller, 230 V 1 kW"',
                              'name = "kiln | <b>x</b>"').replace(
        'checklist = "kiln-line.checklist.toml"', 'checklist = "standard"'), encoding="utf-8")
    md = render(p, "md")
    assert "kiln \\| &lt;b&gt;x&lt;/b&gt;" in md and "<b>" not in md
    doc = render(p, "html")
    assert "kiln | &lt;b&gt;x&lt;/b&gt;" in doc and "<b>x</b>" not in doc


def test_cli_writes_file(tmp_path, capsys):
    """`latchbook report -o FILE` writes the HTML file and exits 0."""
    out = tmp_path / "r.html"
    code = main(["report", str(LINE / "kiln-230-2k.toml"), "--format", "html", "-o", str(out)])
    assert code == 0
    text = out.read_text("utf-8")
    assert text.startswith("<!DOCTYPE html>") and text.rstrip().endswith("</html>")
    assert "No sign-offs yet." in text
    assert main(["report", str(tmp_path / "none.toml"), "--format", "md"]) == 2


def test_margins_read_as_in_the_workbook_and_the_command_line(tmp_path, capsys):
    """One formatting of margins: each check's margin in the Markdown and HTML reports is the
    one `latchbook check` prints (reviewer.fmt.margin: "12×", "> 100×", "needs 2×"), never
    a percentage in the tens of thousands."""
    import json

    from reviewer.fmt import margin

    project = Path(__file__).resolve().parents[2] / "projects" / "kiln-120.toml"
    assert main(["check", str(project), "--json"]) in (0, 1)
    checks = json.loads(capsys.readouterr().out)["projects"][0]["checks"]
    md, page = render(project, "md"), render(project, "html")
    shown = [margin(c["margin"]) for c in checks if c["margin"] is not None]
    assert any("×" in s for s in shown) and all("%" not in s or len(s) <= 7 for s in shown)
    for c in checks:
        if c["margin"] is None:
            continue
        text = margin(c["margin"])
        assert re.search(rf"\| {re.escape(c['check'])} \| [^|]* \| {re.escape(text)} \|", md), \
            (c["check"], text)
        assert f'<td class="num">{html.escape(text)}</td>' in page, (c["check"], text)
