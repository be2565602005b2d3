"""Machine outputs: the versioned JSON against its schema, JUnit XML read back by a JUnit
reader, CSV read back by the csv module, and the same bytes from one core, two, or a cache."""

from __future__ import annotations

import csv
import json
import shutil
from pathlib import Path

import jsonschema
import pytest
from junitparser import Error, Failure, JUnitXml, Skipped

from reviewer.batch import compute
from reviewer.cli import main
from reviewer.outputs import document
from reviewer.outputs.junit import suite
from reviewer.states import RESULTS, REVIEWS

ROOT = Path(__file__).resolve().parents[2]
LINE = ROOT / "projects" / "kiln-line"

VARIANT = """[project]
name = "Kiln controller, generated variant {i}"
revision = "A"
variant_of = "kiln-base.toml"

[supply]
voltage = "{volts}"

[stages.snubber]
c = "{c}"
"""


def validate(doc: dict) -> None:
    jsonschema.validate(doc, document.schema(), cls=jsonschema.Draft202012Validator)


@pytest.fixture(scope="module")
def line(tmp_path_factory) -> Path:
    """The demo line (records, a waiver, a stale sign-off, a failing variant) plus six
    generated variants, several of them identical in what some checks read."""
    dest = tmp_path_factory.mktemp("line") / "kiln-line"
    shutil.copytree(LINE, dest)
    for i, (volts, c) in enumerate([("230 V +10% -10%", "100 nF ±10%"),
                                    ("230 V +10% -10%", "68 nF ±10%"),
                                    ("240 V +6% -10%", "100 nF ±10%")] * 2):
        (dest / f"gen-{i}.toml").write_text(VARIANT.format(i=i, volts=volts, c=c), "utf-8")
    return dest


def _json(capsys, *args: str) -> tuple[int, dict]:
    code = main(list(args))
    return code, json.loads(capsys.readouterr().out)


def test_every_json_output_has_one_shape(line, capsys):
    """check --json, status --json and status --matrix --json validate against the shipped
    schema, carry the format version and list the projects (a list even for one)."""
    files = sorted(str(p) for p in line.glob("*.toml"))  # review and checklist files too
    shapes = {
        "check": _json(capsys, "check", *files, "--json", "--jobs", "1"),
        "status": _json(capsys, "status", str(line), "--json", "--jobs", "1"),
        "status --matrix": _json(capsys, "status", "--matrix", str(line), "--json",
                                 "--jobs", "1"),
        "one": _json(capsys, "check", str(ROOT / "projects" / "flasher-dc.toml"), "--json"),
        "mc": _json(capsys, "check", str(LINE / "kiln-base.toml"), "--json",
                    "--monte-carlo", "200"),
    }
    for name, (code, doc) in shapes.items():
        validate(doc)
        assert doc["format"] == "latchbook.results/1", name
        assert isinstance(doc["projects"], list) and doc["projects"], name
        assert doc["exit_code"] == code, name
    assert len(shapes["one"][1]["projects"]) == 1
    assert shapes["mc"][1]["monte_carlo"]["samples"] == 200
    assert all("yield" in c for c in shapes["mc"][1]["projects"][0]["checks"]
               if c["result"] not in ("not-applicable", "error"))
    # The three commands describe the same projects with the same checks.
    per = {k: {Path(p["file"]).name: p["checks"] for p in shapes[k][1]["projects"]}
           for k in ("check", "status", "status --matrix")}
    assert per["check"] == per["status"] == per["status --matrix"]
    skipped = {Path(s["file"]).name for s in shapes["check"][1]["skipped"]}
    assert skipped == {"kiln-base.review.toml", "kiln-120-1k.review.toml",
                       "kiln-line.checklist.toml"}


def test_schema_words_are_the_shared_vocabulary():
    """The schema's result and review words are reviewer.states', not a copy that drifts."""
    from reviewer.line import STATES

    s = document.schema()["$defs"]["check"]["properties"]
    assert tuple(s["result"]["enum"]) == RESULTS
    assert tuple(s["review"]["enum"]) == REVIEWS
    stage = document.schema()["$defs"]["project"]["properties"]["stages"]["items"]
    assert tuple(stage["properties"]["state"]["enum"]) == STATES


def test_json_review_states_and_verdicts(line, capsys):
    """Each check has a result and (with a record) a review word; verdicts per project and for
    the run follow the worst: fail beats stale beats marginal."""
    code, doc = _json(capsys, "status", str(line), "--json", "--jobs", "1")
    assert code == 1 and doc["verdict"] == "fail"
    by = {Path(p["file"]).name: p for p in doc["projects"]}
    base = {c["check"]: c for c in by["kiln-base.toml"]["checks"]}
    assert base["snubber.leakage"]["result"] == "marginal"
    assert base["snubber.leakage"]["review"] == "waived" and base["snubber.leakage"]["waiver"]
    # The waived marginal one no longer counts; power.harmonics, added after the record was
    # signed, is an unsigned marginal estimate, so the base's verdict is marginal.
    assert base["power.harmonics"]["result"] == "marginal"
    assert by["kiln-base.toml"]["verdict"] == "marginal"
    stale = {c["check"]: c for c in by["kiln-120-1k.toml"]["checks"]}["snubber.dvdt"]
    assert stale["review"] == "stale" and stale["changed"][0].startswith("stages.snubber.c")
    assert by["kiln-120-1k.toml"]["verdict"] == "stale"
    assert by["kiln-120-2k.toml"]["verdict"] == "fail"
    junction = {c["check"]: c for c in by["kiln-120-2k.toml"]["checks"]}["power.junction"]
    assert junction["result"] == "fail" and junction["fix"]
    assert by["gen-0.toml"]["record"] is None
    assert all("review" not in c for c in by["gen-0.toml"]["checks"])
    assert by["gen-0.toml"]["verdict"] == "marginal"  # snubber.leakage, nobody waived it


def test_a_project_that_does_not_load_is_an_entry_with_its_error(tmp_path, capsys):
    """A broken project does not stop the others; the run exits 2 and says why."""
    good = tmp_path / "flasher-dc.toml"
    shutil.copy(ROOT / "projects" / "flasher-dc.toml", good)
    bad = tmp_path / "broken.toml"
    bad.write_text('[project]\nname = "x"\n', "utf-8")
    code, doc = _json(capsys, "check", str(bad), str(good), "--json", "--jobs", "1")
    validate(doc)
    assert code == 2 and doc["exit_code"] == 2 and doc["verdict"] == "error"
    assert doc["projects"][0]["verdict"] == "error" and "broken.toml" in doc["projects"][0]["error"]
    assert doc["projects"][1]["verdict"] in ("pass", "marginal")


def test_junit_reads_back(line, tmp_path, capsys):
    """One test case per project × stage × check; failures carry the summary and the fix,
    waived checks are skipped with the reason, stale sign-offs fail naming the change."""
    out = tmp_path / "results.xml"
    code, doc = _json(capsys, "status", str(line), "--json", "--junit", str(out), "--jobs", "1")
    xml = JUnitXml.fromfile(str(out))
    suites = list(xml)
    assert len(suites) == len(doc["projects"])
    cases = {(s.name.split(":")[0], c.classname, c.name): c for s in suites for c in s}
    assert len(cases) == sum(len(p["checks"]) for p in doc["projects"])
    assert xml.tests == len(cases)

    def case(project, stage, check):
        return cases[(str(line / project), f"{Path(project).stem}.{stage}", check)]

    [fail] = case("kiln-120-2k.toml", "power", "power.junction").result
    assert isinstance(fail, Failure) and fail.type == "fail"
    assert "fix:" in fail.text and fail.message.startswith("fail: ")
    [waived] = case("kiln-base.toml", "snubber", "snubber.leakage").result
    assert isinstance(waived, Skipped) and "waived:" in waived.message
    base = next(p for p in doc["projects"] if p["file"].endswith("kiln-base.toml"))
    reason = next(c["waiver"] for c in base["checks"] if c["check"] == "snubber.leakage")
    assert reason in waived.message
    [stale] = case("kiln-120-1k.toml", "snubber", "snubber.dvdt").result
    assert isinstance(stale, Failure) and stale.type == "stale"
    assert "stages.snubber.c" in stale.message
    assert case("kiln-base.toml", "trigger", "osc.window").result == []  # a pass
    failures = sum(1 for c in cases.values() for r in c.result if isinstance(r, Failure))
    assert failures == xml.failures and failures >= 7


def test_junit_blocked_incomplete_and_error(tmp_path):
    """blocked and incomplete are failures with their reason; error is a JUnit error."""
    pr = compute(ROOT / "projects" / "flasher-dc.toml")
    words = ["blocked", "incomplete", "error"]
    for r, word in zip(pr.run.results, words, strict=False):
        r.status, r.summary = word, f"{word}: needs something (test)"
    text, counts = suite(pr)
    f = tmp_path / "x.xml"
    f.write_text(f"<testsuites>{text}</testsuites>", "utf-8")
    cases = list(next(iter(JUnitXml.fromfile(str(f)))))
    got = [(type(c.result[0]).__name__, c.result[0].type) for c in cases[:3]]
    assert got == [("Failure", "blocked"), ("Failure", "incomplete"), ("Error", "error")]
    assert "needs something" in cases[1].result[0].message
    assert counts["failures"] >= 2 and counts["errors"] == 1
    assert isinstance(cases[2].result[0], Error)


def test_csv_rows(line, tmp_path, capsys):
    """One row per check with result, review, margin and the value at the worst corner."""
    out = tmp_path / "results.csv"
    code, doc = _json(capsys, "check", str(line / "kiln-base.toml"), str(line / "gen-0.toml"),
                      "--json", "--csv", str(out))
    with out.open(newline="", encoding="utf-8") as fh:
        rows = list(csv.DictReader(fh))
    checks = [(p, c) for p in doc["projects"] for c in p["checks"]]
    assert len(rows) == len(checks)
    for row, (p, c) in zip(rows, checks, strict=True):
        assert (row["file"], row["stage"], row["check"]) == (p["file"], c["stage"], c["check"])
        assert row["result"] == c["result"] and row["review"] == c.get("review", "")
        if c["margin"] is not None:
            assert float(row["margin"]) == c["margin"]
        if row["value_name"]:
            assert float(row["worst_value"]) == c["at_worst"][row["value_name"]]
            assert row["unit"] == c["values"][row["value_name"]]["unit"]
    assert rows[0]["project"] == "Studio kiln controller, 230 V 1 kW"


def _outputs(tmp_path, line, jobs: str) -> tuple[str, bytes, bytes]:
    junit, table = tmp_path / f"j{jobs}.xml", tmp_path / f"c{jobs}.csv"
    import contextlib
    import io

    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        main(["check", *sorted(str(p) for p in line.glob("*.toml")), "--json", "--jobs", jobs,
              "--junit", str(junit), "--csv", str(table)])
    return buf.getvalue(), junit.read_bytes(), table.read_bytes()


def test_parallel_output_is_byte_identical(line, tmp_path):
    """--jobs 2 writes exactly the bytes of a serial run (JSON, JUnit and CSV)."""
    assert _outputs(tmp_path, line, "1") == _outputs(tmp_path, line, "2")


def test_line_cache_computes_once_with_identical_results(line):
    """Identical (check, inputs hash, limits) across a line are computed once, and every
    result is what computing it afresh gives."""
    from reviewer.engine import line_cache

    files = sorted(line.glob("gen-*.toml")) + [line / "kiln-base.toml"]
    fresh = [document.project_entry(compute(f)) for f in files]
    for compact in (False, True):
        with line_cache(compact=compact) as cache:
            cached = [document.project_entry(compute(f)) for f in files]
        assert cached == fresh
        assert cache.hits > cache.misses  # most of a line repeats


def test_monte_carlo_does_not_use_the_line_cache(line):
    """Sampling needs each project's own corner tables: with --monte-carlo nothing is taken
    from the cache, and the yields are those of a run without it."""
    from reviewer.batch import Options
    from reviewer.engine import line_cache

    opts = Options(monte_carlo=300, seed=3)
    fresh = document.project_entry(compute(line / "gen-1.toml", opts))
    with line_cache(compact=True) as cache:
        compute(line / "gen-0.toml")
        before = cache.hits + cache.misses
        cached = document.project_entry(compute(line / "gen-1.toml", opts))
    assert cache.hits + cache.misses == before
    assert cached == fresh and any("yield" in c for c in cached["checks"])


def test_results_hold_no_corner_tables(line):
    """A project's result keeps no corner arrays (they are most of its memory)."""
    pr = compute(line / "kiln-base.toml")
    assert pr.run.results and all(r.evaluation is None for r in pr.run.results)


def test_check_skips_review_and_checklist_files(capsys):
    """`check DIR/*.toml` runs every project and names what it skipped."""
    files = sorted(str(p) for p in LINE.glob("*.toml"))
    code = main(["check", *files, "--jobs", "1"])
    out, err = capsys.readouterr()
    assert code == 1  # kiln-120-2k fails
    assert "skipped" in err and "kiln-base.review.toml: a review record" in err
    assert "kiln-line.checklist.toml: a checklist" in err
    assert "4 project(s)" in out


def test_only_non_projects_exits_2(capsys):
    """Nothing but records and checklists: exit 2 with a message, no traceback."""
    code = main(["check", str(LINE / "kiln-base.review.toml")])
    assert code == 2 and "no project files" in capsys.readouterr().err


def test_unreachable_scheduler_exits_2(capsys, monkeypatch):
    """A scheduler that does not answer is bad input (exit 2), said in one line."""
    pytest.importorskip("distributed", reason="the cluster extra (dask.distributed) is not "
                        "installed: pip install 'latchbook[cluster]'")
    import reviewer.parallel

    monkeypatch.setattr(reviewer.parallel, "CONNECT_TIMEOUT", 2.0)
    code = main(["check", str(LINE / "kiln-base.toml"), str(LINE / "kiln-230-2k.toml"),
                 "--scheduler", "tcp://127.0.0.1:9", "--json"])
    out, err = capsys.readouterr()
    assert code == 2 and "cannot reach the scheduler" in err and out == ""


def test_sampled_corners_and_warnings_are_carried(tmp_path):
    """A check whose corners were sampled says so (from the engine's own note), and the
    loader's warnings appear per project in the JSON and the JUnit properties."""
    from reviewer.engine import build_corners
    from reviewer.model import Value
    from reviewer.registry import Input

    inputs = {f"x{i}": Input(f"stages.s.x{i}", Value(1.0, 0.9, 1.1, "resistance"))
              for i in range(13)}
    _, _, note = build_corners(inputs)
    assert note  # 13 varying inputs: sampled
    pr = compute(ROOT / "projects" / "flasher-dc.toml")
    pr.run.results[0].notes.append(note)
    pr.warnings = ["parts.Q1.igt: given at 25 °C only (test warning)"]
    entry = document.project_entry(pr)
    assert entry["checks"][0]["sampled_corners"] is True
    assert not any(c["sampled_corners"] for c in entry["checks"][1:])
    assert entry["warnings"] == pr.warnings
    validate({**document.head("check", []), "projects": [entry],
              **document.tail([entry["verdict"]], 0)})
    text, _ = suite(pr)
    assert "test warning" in text
