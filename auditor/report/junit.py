"""JUnit XML: one test case per electrode and one per rule.

CI services show these as test results. A test case fails (one ``failure``
element listing every failing finding) when findings at or above
``--fail-on`` concern it and are neither waived nor baselined; a crashed
rule is an ``error``; a rule that did not run (switched off, or judging 3-D
results in a quick run) is ``skipped`` with the reason. Other findings are
listed in ``system-out``.
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from typing import TextIO

from auditor.decide.records import DecidedFinding, Report, SensorResult
from auditor.report.verdicts import electrode_verdicts


def _describe(d: DecidedFinding) -> str:
    f = d.finding
    where = f"x {f.x_mm:.2f} mm, y {f.y_mm:.2f} mm" if f.x_mm is not None and f.y_mm is not None else "board"
    extra = f" [waived: {d.waived}]" if d.waived else " [in baseline]" if d.in_baseline else ""
    return f"{d.severity.label} {f.rule_id}: {f.message} ({where}, {f.layer or 'no layer'}){extra}"


def _case(suite: ET.Element, classname: str, name: str, failing: list[DecidedFinding],
          others: list[DecidedFinding], error: str = "", note: str = "",
          skipped: str = "") -> None:
    case = ET.SubElement(suite, "testcase", {"classname": classname, "name": name, "time": "0"})
    if skipped and not failing and not error:
        ET.SubElement(case, "skipped", {"message": skipped})
    if failing:
        first = failing[0].finding
        message = first.message if len(failing) == 1 else f"{len(failing)} failing findings"
        failure = ET.SubElement(case, "failure", {"message": message,
                                                  "type": failing[0].severity.label})
        failure.text = "\n".join(_describe(d) for d in failing)
    if error:
        err = ET.SubElement(case, "error", {"message": error, "type": "rule-crashed"})
        err.text = error
    lines = ([note] if note else []) + [_describe(d) for d in others]
    if lines:
        ET.SubElement(case, "system-out").text = "\n".join(lines)


def _sensor_out(result: SensorResult, verdict: str) -> str:
    m = result.metrics
    if m is None:
        return f"verdict {verdict}, signal {result.strength}: no field solve"
    return (f"verdict {verdict}, signal {result.strength}, rank {result.rank}: "
            f"Cp {m.cp_total_pf:.3f} pF "
            f"(pad {m.cp_pad_pf:.3f}, trace {m.cp_trace_pf:.3f}, pin {m.cp_pin_pf:.3f}, "
            f"parts {m.cp_parts_pf:.3f}), dC {m.delta_c_pf:.4f} pF, "
            f"ratio {m.delta_ratio * 100:.2f} %")


def _suite(root: ET.Element, name: str) -> ET.Element:
    return ET.SubElement(root, "testsuite", {"name": name})


def _finish(suite: ET.Element) -> tuple[int, int, int, int]:
    cases = suite.findall("testcase")
    failures = sum(1 for c in cases if c.find("failure") is not None)
    errors = sum(1 for c in cases if c.find("error") is not None)
    skipped = sum(1 for c in cases if c.find("skipped") is not None)
    suite.set("tests", str(len(cases)))
    suite.set("failures", str(failures))
    suite.set("errors", str(errors))
    suite.set("skipped", str(skipped))
    suite.set("time", "0")
    return len(cases), failures, errors, skipped


def to_junit(report: Report) -> ET.Element:
    """The report as a ``testsuites`` element."""
    failing_ids = {id(d) for d in report.failing}
    root = ET.Element("testsuites", {"name": f"padaudit {report.info.board_path}"})
    sensors = _suite(root, "padaudit.electrodes")
    verdicts = electrode_verdicts(report)
    for r in report.sensors:
        mine = [d for d in report.findings if d.finding.sensor == r.sensor.name]
        _case(sensors, "padaudit.electrode", r.sensor.name,
              [d for d in mine if id(d) in failing_ids],
              [d for d in mine if id(d) not in failing_ids], note=_sensor_out(r, verdicts[r.sensor.name]))
    rules = _suite(root, "padaudit.rules")
    crashed, skipped = dict(report.rule_errors), dict(report.skipped_rules)
    rule_ids = sorted({r.rule_id for r in report.rules}
                      | {d.finding.rule_id for d in report.findings} | set(crashed)
                      | set(skipped))
    for rid in rule_ids:
        mine = [d for d in report.findings if d.finding.rule_id == rid]
        _case(rules, "padaudit.rule", rid, [d for d in mine if id(d) in failing_ids],
              [d for d in mine if id(d) not in failing_ids], crashed.get(rid, ""),
              skipped=skipped.get(rid, ""))
    totals = [_finish(s) for s in (sensors, rules)]
    said = [f"CAUTION: {c}" for c in report.cautions] + [f"NOTE: {n}" for n in report.notes]
    if said:
        # Suite-level output comes after the test cases in the JUnit layout.
        ET.SubElement(sensors, "system-out").text = "\n".join(said)
    root.set("tests", str(sum(t[0] for t in totals)))
    root.set("failures", str(sum(t[1] for t in totals)))
    root.set("errors", str(sum(t[2] for t in totals)))
    root.set("skipped", str(sum(t[3] for t in totals)))
    return root


def render_junit(report: Report, stream: TextIO) -> None:
    """Write JUnit XML to ``stream``."""
    root = to_junit(report)
    ET.indent(root)
    stream.write('<?xml version="1.0" encoding="UTF-8"?>\n')
    stream.write(ET.tostring(root, encoding="unicode"))
    stream.write("\n")
