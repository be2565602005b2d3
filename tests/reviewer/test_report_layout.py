"""Report layout: schematics, plots beside their checks, axis labels, units written one way,
limits as words, absent inputs left out, print rules, Markdown figures and the line index."""

from __future__ import annotations

import html
import re
import shutil
import subprocess
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from reviewer.line import status_matrix
from reviewer.report import gather, render, write_line_index, write_report
from reviewer.reports.html import to_html

ROOT = Path(__file__).resolve().parents[2] / "projects"
LINE = ROOT / "kiln-line"


@pytest.fixture(scope="module")
def kiln() -> str:
    return render(ROOT / "kiln-230.toml", "html")


def _text(doc: str) -> str:
    doc = re.sub(r"<style>.*?</style>", " ", doc, flags=re.S)
    doc = re.sub(r"<svg.*?</svg>", " ", doc, flags=re.S)
    return html.unescape(re.sub(r"<[^>]+>", " ", doc))


def _sections(doc: str) -> dict[str, str]:
    parts = re.split(r'<section class="stage" id="stage-', doc)[1:]
    return {p.split('"', 1)[0]: p for p in parts}


def test_each_stage_opens_with_its_schematic(kiln):
    """Every stage's section starts with an inline SVG schematic (before its first table),
    naming its parts by designator and its components by key with their values."""
    secs = _sections(kiln)
    assert set(secs) == {"trigger", "gate", "power", "snubber", "commutation"}
    for sid, sec in secs.items():
        fig = sec.find('<figure class="schematic"><svg')
        assert 0 <= fig < sec.find("<table"), sid
    trig = html.unescape(secs["trigger"].split("</figure>")[0])
    for label in ("U1 (UJT)", "timing_r 5.6 kΩ – 156 kΩ", "timing_c 100 nF ±10%",
                  "base1_r 47 Ω", "zener 20 V ±5%"):
        assert label in trig, label
    snub = html.unescape(secs["snubber"].split("</figure>")[0])
    assert "r 33 Ω ±5%" in snub and "c 100 nF ±10%" in snub and "Q1 (SCR)" in snub


def test_schematic_svg_is_inline_and_parses():
    """A schematic is an <svg> element with no external reference that an XML parser reads."""
    from reviewer.project import load_project
    from reviewer.reports.figures import standalone_svg
    from reviewer.reports.schematic import stage_svg

    p = load_project(ROOT / "flasher-dc.toml")
    for st in p.stages.values():
        svg, why = stage_svg(st, p)
        assert svg.startswith("<svg") and not why, st.id
        assert "http" not in svg and "href" not in svg
        ET.fromstring(standalone_svg(svg).split("\n", 1)[1])


def test_plots_stand_beside_the_checks_they_explain(kiln):
    """The capacitor voltage is drawn inside osc.timing's block, the step across the SCR inside
    snubber.dvdt's, the load waveform inside power.output's; not at the stage's end."""
    for block, title in (("trigger-osc.timing", "timing capacitor voltage"),
                         ("snubber-snubber.dvdt", "voltage across the SCR after the step"),
                         ("power-power.output", "load voltage over one cycle")):
        start = kiln.index(f'<div class="check" id="{block}">')
        end = kiln.index('<div class="check"', start + 10)
        part = kiln[start:end]
        assert '<figure class="plot"><svg' in part and title in part, block


def test_axes_name_quantity_and_unit(kiln):
    """Axis labels say what is plotted and its unit, not the unit alone."""
    assert "capacitor voltage [V]" in kiln and "time [ms]" in kiln
    assert "voltage across the SCR [V]" in kiln and "load current [A]" in kiln
    assert ">[V]<" not in kiln and ">t [" not in kiln


def test_units_written_one_way(kiln):
    """No engine or input-file unit spellings reach the reader (A²s, Ω, °C, V·s, µ)."""
    text = _text(kiln) + render(ROOT / "kiln-230.toml", "md")
    for raw in ("A^2*s", "V*s", "V*us", "degC", "kohm", " ohm", "+/-"):
        assert raw not in text, raw
    assert "A²s" in text and "°C" in text and "V·s" in text


def test_limits_are_words(kiln):
    """Limits read as sentences, never as checklist keys."""
    text = _text(kiln)
    assert "fails when VDRM/VRRM is below 1.5 × the peak voltage; marginal below 2 × the " \
           "peak voltage" in text
    assert "fails when the RMS rating is below the RMS current" in text
    for key in ("fail_below", "marginal_below", "headroom_fail", "touch_current"):
        assert key not in text, key


def test_absent_inputs_are_left_out(tmp_path):
    """A project without a product line has no "Product line" row; a worst corner lists no
    input the project does not give (no "= —")."""
    src = (ROOT / "kiln-230.toml").read_text("utf-8").replace('line = "kiln"\n', "")
    p = tmp_path / "noline.toml"
    p.write_text(src, encoding="utf-8")
    doc = render(p, "html")
    assert "Product line" not in doc
    assert "= —" not in _text(doc)
    assert "— " not in _text(doc).split("Cautions")[0]


def test_print_rules(tmp_path):
    """@page size and margins with a running header (project, revision, page n of m); table
    headers in <thead> repeated on each page; the hash paragraphs kept with what precedes them;
    a hostile project name cannot end the CSS string or the style element."""
    src = (ROOT / "kiln-230.toml").read_text("utf-8").replace(
        'name = "Bench kiln element controller"', 'name = "kiln \\"x\\" </style><b>y</b>"')
    p = tmp_path / "odd.toml"
    p.write_text(src, encoding="utf-8")
    doc = render(p, "html")
    style = doc.split("<style>", 1)[1].split("</style>", 1)[0]
    head = doc.split("</head>", 1)[0]
    assert head.count("</style>") == 1 and "<b>y</b>" not in doc
    assert re.search(r"@page \{ size: A4; margin: [\d.]+mm", style)
    assert 'counter(page) " of " counter(pages)' in style
    assert "@top-left { content: \"kiln \\22 x\\22  \\3C /style>" in style
    assert "thead { display: table-header-group; }" in style
    assert ".head, footer { break-inside: avoid; break-before: avoid; }" in style
    assert doc.count("<thead>") >= doc.count("<table") - 1  # all but the meta table


def test_markdown_writes_and_links_its_figures(tmp_path):
    """`report --format md -o R.md` writes every schematic and plot into R.figures/, links
    each, leaves no stale figure behind; each file is an SVG an XML parser reads."""
    out = tmp_path / "r.md"
    folder = tmp_path / "r.figures"
    folder.mkdir()
    (folder / "stale.svg").write_text("<svg/>", encoding="utf-8")
    write_report(ROOT / "kiln-230.toml", "md", out)
    md = out.read_text("utf-8")
    links = re.findall(r"!\[[^\]]*\]\((r\.figures/[^)]+\.svg)\)", md)
    assert len(links) >= 8
    files = sorted(p.name for p in folder.iterdir())
    assert "stale.svg" not in files
    assert sorted(Path(x).name for x in set(links)) == files
    for f in folder.iterdir():
        root = ET.parse(f).getroot()
        assert root.tag.endswith("svg")
    assert "trigger-schematic.svg" in files and "trigger-osc-timing-1.svg" in files


def test_line_index_links_every_report(tmp_path):
    """The index holds the matrix of the kiln line, each project linked (relative link) to its
    report and each cell to the stage's section; the state words are the matrix's."""
    m = status_matrix([LINE])
    reports = {}
    for r in m.rows:
        dest = tmp_path / "reports" / (Path(r.path).stem + ".html")
        dest.parent.mkdir(exist_ok=True)
        dest.write_text("<html></html>", encoding="utf-8")
        reports[r.path] = dest
    page = write_line_index(m, reports, tmp_path / "index.html", base_dir=LINE)
    doc = page.read_text("utf-8")
    hrefs = re.findall(r'href="([^"#]+)"', doc)
    assert {Path(h).name for h in hrefs} == {f"{Path(r.path).stem}.html" for r in m.rows}
    for h in hrefs:
        assert not h.startswith("/") and (tmp_path / h).is_file()
    for r in m.rows:
        for sid, c in r.cells.items():
            assert f'#stage-{sid}">{c.state}</a>' in doc
    assert "<script" not in doc and "http" not in doc


def _tools() -> tuple[str | None, str | None]:
    return (shutil.which("chromium") or shutil.which("chromium-browser"),
            shutil.which("pdftotext"))


@pytest.mark.skipif(None in _tools(), reason="needs chromium and pdftotext "
                    "(apt-get install chromium poppler-utils) to print the report")
def test_printed_report_pages(tmp_path):
    """Printed by headless Chromium: every page carries the running header with the project,
    revision and "page n of m"; a table continued on a new page repeats its header row; the
    last page holds more than a hash."""
    chromium, pdftotext = _tools()
    doc = tmp_path / "r.html"
    doc.write_text(to_html(gather(LINE / "kiln-base.toml")), encoding="utf-8")
    pdf = tmp_path / "r.pdf"
    subprocess.run([chromium, "--headless", "--no-sandbox", "--disable-gpu",
                    "--disable-background-networking", "--no-first-run", "--disable-sync",
                    "--disable-component-update", f"--user-data-dir={tmp_path / 'profile'}",
                    "--no-pdf-header-footer", f"--print-to-pdf={pdf}", doc.as_uri()],
                   capture_output=True, timeout=180, check=False)
    assert pdf.is_file() and pdf.stat().st_size > 10_000
    text = subprocess.run([pdftotext, "-layout", str(pdf), "-"], capture_output=True,
                          text=True, check=True).stdout
    pages = [pg for pg in text.split("\f") if pg.strip()]
    n = len(pages)
    assert n > 3
    for k, pg in enumerate(pages, 1):
        assert "Studio kiln controller, 230 V 1 kW, revision B" in pg, k
        assert f"page {k} of {n}" in pg, k
    # The inputs table runs over several pages: its header row starts each of them.
    starts = [k for k, pg in enumerate(pages) if re.search(r"^\s*input\s+value\s+from\s*$",
                                                          pg, re.M)]
    assert len(starts) >= 2, "the inputs table's header is not repeated on a following page"
    last = re.sub(r"[0-9a-f]{64}", "", pages[-1])
    assert len(re.sub(r"\s+", " ", last)) > 300


def test_schematic_escapes_user_text(tmp_path):
    """A designator with markup characters is drawn as text, never as markup, and the
    schematic is still drawn."""
    src = (ROOT / "kiln-230.toml").read_text("utf-8").replace(
        "[parts.Q1]", '[parts."Q<b>&1"]').replace('scr = "Q1"', 'scr = "Q<b>&1"')
    p = tmp_path / "odd.toml"
    p.write_text(src, encoding="utf-8")
    doc = render(p, "html")
    assert "<b>&1" not in doc
    power = _sections(doc)["power"].split("</figure>")[0]
    assert '<figure class="schematic"><svg' in power and "Q&lt;b&gt;&amp;1 (SCR)" in power


def test_index_for_written_reports(tmp_path):
    """write_index_for computes the matrix of the projects whose reports were written and
    links each from the page; a broken project is a row that says so."""
    from reviewer.reports.index import write_index_for

    bad = tmp_path / "broken.toml"
    bad.write_text('[project]\nname = "x"\n', encoding="utf-8")
    reports = {}
    for src in (LINE / "kiln-base.toml", LINE / "kiln-120-2k.toml"):
        dest = tmp_path / f"{src.stem}.html"
        write_report(src, "html", dest)
        reports[src] = dest
    reports[bad] = tmp_path / "broken.html"
    doc = write_index_for(reports, tmp_path / "index.html").read_text("utf-8")
    assert 'href="kiln-base.html"' in doc and 'href="kiln-120-2k.html#stage-power">fail</a>' in doc
    assert '<td class="st fail">error</td>' in doc


@pytest.mark.parametrize("module", ["reviewer.reports.text", "reviewer.reports.figures",
                                    "reviewer.reports.html", "reviewer.spice"])
def test_module_examples(module):
    """The examples in these modules' docstrings hold (the suite collects tests/ and checks/
    only, so they are run here)."""
    import doctest
    import importlib

    res = doctest.testmod(importlib.import_module(module),
                          optionflags=doctest.NORMALIZE_WHITESPACE)
    assert res.attempted > 0 and res.failed == 0


@pytest.mark.parametrize("topology, extra, words", [
    ("bridge", "", "four SCRs"),
    ("half-wave", "\nfreewheel = true", "freewheeling diode"),
])
def test_power_stage_schematics(tmp_path, topology, extra, words):
    """A bridge is drawn as its four SCRs, a freewheeling diode across the load."""
    from reviewer.project import load_project
    from reviewer.reports.schematic import stage_svg

    src = (ROOT / "kiln-230.toml").read_text("utf-8").replace(
        'topology = "ac-switch"', f'topology = "{topology}"{extra}')
    p = tmp_path / "v.toml"
    p.write_text(src, encoding="utf-8")
    proj = load_project(p)
    svg, why = stage_svg(proj.stages["power"], proj)
    assert not why and words in svg and "load.r 26.5 Ω ±5%" in html.unescape(svg)


def test_cli_report_folder_writes_index(tmp_path, capsys):
    """`latchbook report DIR --out-dir OUT` writes one report per project and an index.html
    whose links reach each of them."""
    from reviewer.cli import main

    out = tmp_path / "out"
    assert main(["report", str(LINE), "--format", "html", "--out-dir", str(out),
                 "--jobs", "1"]) == 0
    doc = (out / "index.html").read_text("utf-8")
    hrefs = set(re.findall(r'href="([^"#]+)"', doc))
    assert len(hrefs) == 4 and all((out / h).is_file() for h in hrefs)
    assert "index written to" in capsys.readouterr().err
