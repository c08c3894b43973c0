"""Comparing two reports; percentages checked by hand arithmetic."""

from __future__ import annotations

import dataclasses
import io
import json

import pytest
import sample_report as sample

from auditor.decide.diff import PadChange, compare_reports, percent_change
from auditor.decide.records import Report
from auditor.model.results import PadMetrics
from auditor.report.diff_render import render_diff


def _with_pad(report: Report, name: str, metrics: PadMetrics | None) -> Report:
    sensors = tuple(dataclasses.replace(r, metrics=metrics) if r.sensor.name == name else r
                    for r in report.sensors)
    return dataclasses.replace(report, sensors=sensors)


def test_percent_change_by_hand() -> None:
    assert percent_change(10.0, 12.0) == pytest.approx(20.0)   # +2 / 10
    assert percent_change(0.05, 0.035) == pytest.approx(-30.0)  # -0.015 / 0.05
    assert percent_change(0.0, 1.0) is None


def test_pad_change_percentages_by_hand() -> None:
    old = PadMetrics(8.0, 2.0, 10.0, 0.5, 0.05)
    new = PadMetrics(8.0, 4.0, 12.0, 0.42, 0.035)
    change = PadChange("A", old, new)
    assert change.change_pct("cp_total_pf") == pytest.approx(20.0)    # 10 -> 12
    assert change.change_pct("cp_trace_pf") == pytest.approx(100.0)   # 2 -> 4
    assert change.change_pct("delta_c_pf") == pytest.approx(-16.0)    # 0.5 -> 0.42
    assert change.change_pct("delta_ratio") == pytest.approx(-30.0)   # 0.05 -> 0.035
    assert change.ratio_loss == pytest.approx(0.30)


def test_loss_over_the_limit_fails_and_at_the_limit_passes() -> None:
    old = sample.sample_report()
    m = old.sensors[0].metrics
    assert m is not None
    worse = dataclasses.replace(m, delta_ratio=m.delta_ratio * 0.7)  # 30 % lost
    diff = compare_reports(old, _with_pad(old, "SW_POWER", worse))
    assert [p.name for p in diff.losing] == ["SW_POWER"] and diff.exit_code == 1
    assert compare_reports(old, _with_pad(old, "SW_POWER", worse), 0.35).exit_code == 0
    # exactly 20 % lost against the 20 % default: not more than the limit
    edge = dataclasses.replace(m, delta_ratio=0.05 * 0.8)
    base = _with_pad(old, "SW_POWER", dataclasses.replace(m, delta_ratio=0.05))
    assert compare_reports(base, _with_pad(old, "SW_POWER", edge)).exit_code == 0


def test_gain_never_fails() -> None:
    old = sample.sample_report()
    m = old.sensors[0].metrics
    assert m is not None
    better = dataclasses.replace(m, delta_ratio=m.delta_ratio * 2)
    assert compare_reports(old, _with_pad(old, "SW_POWER", better)).exit_code == 0


def test_new_and_fixed_findings() -> None:
    old = sample.sample_report()
    gap, noisy = old.findings[0], old.findings[1]
    new = dataclasses.replace(old, findings=(noisy, noisy, *old.findings[2:]))
    diff = compare_reports(old, new)
    assert [d.finding.rule_id for d in diff.fixed_findings] == [gap.finding.rule_id]
    assert [d.finding.rule_id for d in diff.new_findings] == ["noisy-part-near"]
    assert diff.exit_code == 1  # the second noisy-part-near is new and failing
    only_fixed = compare_reports(old, dataclasses.replace(old, findings=old.findings[1:]))
    assert only_fixed.exit_code == 0


def test_added_removed_and_unsolved_pads() -> None:
    old = sample.sample_report()
    new = dataclasses.replace(old, sensors=old.sensors[1:])
    diff = compare_reports(old, new)
    statuses = {p.name: p.status for p in diff.pads}
    assert statuses["SW_POWER"] == "removed" and statuses["SW_AUX"] == "unsolved"
    assert compare_reports(new, old).pads[-1].status in ("added", "compared", "unsolved")
    assert {p.name: p.status for p in compare_reports(new, old).pads}["SW_POWER"] == "added"


def test_renderers() -> None:
    old = sample.sample_report()
    m = old.sensors[0].metrics
    assert m is not None
    new = _with_pad(old, "SW_POWER", dataclasses.replace(m, delta_ratio=m.delta_ratio * 0.7))
    diff = compare_reports(old, new)
    text, doc, md = io.StringIO(), io.StringIO(), io.StringIO()
    render_diff(diff, "text", text)
    render_diff(diff, "json", doc)
    render_diff(diff, "markdown", md)
    assert "lost 30.0 % (> 20 %)" in text.getvalue() and "-30.0 %" in text.getvalue()
    data = json.loads(doc.getvalue())
    power = data["pads"][0]
    assert power["delta_ratio"]["change_pct"] == pytest.approx(-30.0)
    assert data["losing"] == ["SW_POWER"] and data["exit_code"] == 1
    assert md.getvalue().startswith("### padaudit diff: **fail**")
    with pytest.raises(ValueError, match="text, json, markdown"):
        render_diff(diff, "sarif", io.StringIO())
