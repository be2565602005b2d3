"""JUnit XML for a build server: one test case per project × stage × check.

A test suite per project (its file, name and revision as properties), a test case per check
(``classname`` = project file stem and stage, ``name`` = check id):

- ``fail``, ``blocked``, ``incomplete`` without a current waiver → ``<failure>`` whose message
  is the result and the summary, and whose text adds the fix and the worst corner;
- ``error`` (the check itself raised) → ``<error>``;
- a current waiver → ``<skipped>`` with the waiver's reason;
- ``n/a`` → ``<skipped>`` with the reason it does not apply;
- a stale or unverified sign-off, approval or waiver → ``<failure type="stale">`` (or
  ``unverified``) naming what changed, whatever the result;
- ``marginal`` and ``pass`` pass; a marginal one says so in ``<system-out>``.

A project that cannot be read is one test case, ``load``, with an ``<error>``. No times are
written, so a run on many cores gives the same bytes as a serial one. The suites are spooled to
a temporary file as they come (the totals go on ``<testsuites>``, which comes first), then
copied into the output file, which appears atomically.
"""

from __future__ import annotations

import re
import shutil
import tempfile
from pathlib import Path
from typing import Any, TextIO
from xml.sax.saxutils import escape, quoteattr

from reviewer.batch import ProjectResult
from reviewer.outputs.document import changed, covered, fix_of, review_of, waiver_reason
from reviewer.states import FAILING, result_word

_BAD_XML = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ufffe\uffff]")


def _clean(text: str) -> str:
    return _BAD_XML.sub("?", text)


def _attr(text: Any) -> str:
    return quoteattr(_clean(str(text)))


def _text(text: str) -> str:
    return escape(_clean(text))


def _case(pr: ProjectResult, r: Any) -> tuple[str, str]:
    """The XML of one test case and its outcome: pass, failure, error or skipped."""
    key = (r.stage, r.check)
    review = review_of(pr, key)
    classname = f"{Path(pr.file).stem}.{r.stage}"
    opening = f"    <testcase classname={_attr(classname)} name={_attr(r.check)}"
    body: list[str] = []
    outcome = "pass"
    detail = [r.summary]
    fix = fix_of(r.check)
    if fix:
        detail.append(f"fix: {fix}")
    if r.worst:
        detail.append("worst corner: " + ", ".join(f"{k} = {v}" for k, v in r.worst.items()))
    detail += [f"note: {n}" for n in r.notes]
    if r.status == "error":
        outcome = "error"
        body.append(f'      <error type="error" message={_attr(r.summary)}>'
                    f"{_text(chr(10).join(detail))}</error>")
    elif covered(r.status, review):
        outcome = "skipped"
        reason = waiver_reason(pr, key) or "(no reason recorded)"
        body.append(f"      <skipped message={_attr(f'{r.status} | waived: {reason}')}/>")
    elif r.status in FAILING:
        outcome = "failure"
        body.append(f"      <failure type={_attr(r.status)} "
                    f"message={_attr(f'{r.status}: {r.summary}')}>"
                    f"{_text(chr(10).join(detail))}</failure>")
    elif r.status == "not-applicable" and review not in ("stale", "unverified"):
        outcome = "skipped"
        body.append(f"      <skipped message={_attr(f'n/a: {r.summary}')}/>")
    if review in ("stale", "unverified") and outcome != "error":
        what = "; ".join(changed(pr, key)) or "the entry does not verify"
        msg = f"{result_word(r.status)} | {review}: {what}"
        if outcome == "failure":
            body.append(f"      <system-out>{_text(msg)}</system-out>")
        else:
            body = [f"      <failure type={_attr(review)} message={_attr(msg)}>"
                    f"{_text(chr(10).join(detail))}</failure>"]
            outcome = "failure"
    elif r.status == "marginal" and outcome == "pass":
        body.append(f"      <system-out>{_text('marginal: ' + chr(10).join(detail))}"
                    "</system-out>")
    if not body:
        return opening + "/>\n", outcome
    return opening + ">\n" + "\n".join(body) + "\n    </testcase>\n", outcome


def suite(pr: ProjectResult) -> tuple[str, dict[str, int]]:
    """One project's ``<testsuite>`` and its counts (tests, failures, errors, skipped)."""
    n = {"tests": 0, "failures": 0, "errors": 0, "skipped": 0}
    cases: list[str] = []
    if pr.error:
        cases.append(f"    <testcase classname={_attr(Path(pr.file).stem)} name=\"load\">\n"
                     f"      <error type=\"error\" message={_attr(pr.error)}/>\n"
                     "    </testcase>\n")
        n["tests"], n["errors"] = 1, 1
        name, props = pr.file, {"file": pr.file}
    else:
        p = pr.run.project
        for r in pr.run.results:
            text, outcome = _case(pr, r)
            cases.append(text)
            n["tests"] += 1
            if outcome == "failure":
                n["failures"] += 1
            elif outcome == "error":
                n["errors"] += 1
            elif outcome == "skipped":
                n["skipped"] += 1
        name = f"{pr.file}: {p.name} (revision {p.revision})"
        props = {"file": pr.file, "project": p.name, "revision": p.revision}
        if p.variant_of:
            props["variant_of"] = str(p.variant_of)
        if pr.record_file:
            props["record"] = pr.record_file
        props |= {f"warning {i}": w for i, w in enumerate(pr.warnings, 1)}
    head = (f"  <testsuite name={_attr(name)} tests=\"{n['tests']}\" "
            f"failures=\"{n['failures']}\" errors=\"{n['errors']}\" "
            f"skipped=\"{n['skipped']}\">\n    <properties>\n"
            + "".join(f"      <property name={_attr(k)} value={_attr(v)}/>\n"
                      for k, v in props.items())
            + "    </properties>\n")
    return head + "".join(cases) + "  </testsuite>\n", n


class JunitWriter:
    """Collects suites as projects come; :meth:`close` writes the file (atomically)."""

    def __init__(self, path: str | Path) -> None:
        self.path = Path(path)
        self.spool: TextIO = tempfile.TemporaryFile("w+", encoding="utf-8")  # noqa: SIM115
        self.totals = {"tests": 0, "failures": 0, "errors": 0, "skipped": 0}

    def add(self, pr: ProjectResult) -> None:
        """Add one project's suite."""
        text, n = suite(pr)
        self.spool.write(text)
        for k, v in n.items():
            self.totals[k] += v

    def close(self) -> Path:
        """Write ``<testsuites>`` with the totals, then every suite; returns the path."""
        from reviewer.store import atomic_stream

        t = self.totals
        try:
            with atomic_stream(self.path) as out:
                out.write('<?xml version="1.0" encoding="UTF-8"?>\n'
                          f'<testsuites name="latchbook" tests="{t["tests"]}" '
                          f'failures="{t["failures"]}" errors="{t["errors"]}" '
                          f'skipped="{t["skipped"]}">\n')
                self.spool.seek(0)
                shutil.copyfileobj(self.spool, out)
                out.write("</testsuites>\n")
        finally:
            self.spool.close()
        return self.path


__all__ = ["JunitWriter", "suite"]
