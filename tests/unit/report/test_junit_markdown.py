"""JUnit XML (structure as read by CI services; common practice, no source)
and the Markdown summary."""

from __future__ import annotations

import io
import xml.etree.ElementTree as ET

import sample_report as sample

from auditor.report.junit import render_junit
from auditor.report.markdown import cell, render_markdown


def _junit(report: object) -> ET.Element:
    out = io.StringIO()
    render_junit(report, out)  # type: ignore[arg-type]
    text = out.getvalue()
    assert text.startswith('<?xml version="1.0" encoding="UTF-8"?>')
    return ET.fromstring(text)


def test_one_case_per_sensor_and_per_rule() -> None:
    report = sample.sample_report()
    root = _junit(report)
    sensors, rules = root.findall("testsuite")
    cases = sensors.findall("testcase")  # the suite may also hold a system-out (cautions)
    assert [c.get("name") for c in cases] == [r.sensor.name for r in report.sensors]
    assert sorted(c.get("name") for c in rules) == sorted(
        [r.rule_id for r in report.rules] + [rid for rid, _ in report.skipped_rules])
    ran_or_not = {r.rule_id for r in report.rules} | {rid for rid, _ in report.skipped_rules}
    assert root.get("tests") == str(len(report.sensors) + len(ran_or_not))
    assert root.get("skipped") == str(len(report.skipped_rules))


def test_failures_only_for_failing_findings() -> None:
    root = _junit(sample.sample_report())
    sensors, rules = root.findall("testsuite")
    failed_sensors = sorted(c.get("name") for c in sensors if c.find("failure") is not None)
    failed_rules = sorted(c.get("name") for c in rules if c.find("failure") is not None)
    assert failed_sensors == ["PROX", "SLD_1", "SW_MODE"]
    assert failed_rules == ["ground-gap-tight", "noisy-part-near", "ratio-low"]
    assert sensors.get("failures") == "3" and root.get("failures") == "6"
    waived = next(c for c in rules if c.get("name") == "copper-under-electrode")
    assert waived.find("failure") is None
    assert "waived" in (waived.findtext("system-out") or "")


def test_clean_report_has_no_failures_and_crashed_rule_is_an_error() -> None:
    root = _junit(sample.clean_report())
    assert root.get("failures") == "0"
    crashed = _junit(sample.sample_report(rule_errors=(("ratio-low", "boom"),)))
    case = next(c for c in crashed.iter("testcase") if c.get("name") == "ratio-low")
    assert case.find("error") is not None and crashed.get("errors") == "1"


def test_markdown_summary_for_a_pull_request() -> None:
    out = io.StringIO()
    render_markdown(sample.sample_report(), out)
    text = out.getvalue()
    assert text.startswith("### padaudit: **fail**: 3 findings at or above error")
    assert "| rank | sensor | kind | Cp total pF | ΔC pF | ΔC/Cp | signal | verdict |" in text
    assert "| 1 | SW_POWER | button | 10.10 | 0.620 | 6.14 % | ok |" in text
    assert "#### Failing (3)" in text and "Other findings (3)" in text
    assert "> **Caution:**" in text


def test_markdown_cells_escape_pipes() -> None:
    assert cell("a|b\nc") == "a\\|b c"


def test_markdown_caps_long_lists() -> None:
    from auditor.report.markdown import MAX_LISTED

    report = sample.sample_report()
    many = tuple(report.findings[0] for _ in range(MAX_LISTED + 5))
    out = io.StringIO()
    render_markdown(sample.sample_report(findings=many), out)
    text = out.getvalue()
    assert text.count("`ground-gap-tight`") == MAX_LISTED
    assert "… and 5 more (see the full report)" in text


def test_junit_case_of_a_failing_electrode_never_says_ok() -> None:
    """A case with a failure element carries the error verdict in its output."""
    root = _junit(sample.sample_report())
    for case in root.iter("testcase"):
        if case.get("classname") == "padaudit.electrode" and case.find("failure") is not None:
            out = case.findtext("system-out") or ""
            assert out.startswith("verdict error, signal "), out
