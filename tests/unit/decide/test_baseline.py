"""Baseline round trip and matching on Finding.key (common practice, no source)."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import pytest
import sample_report as sample

from auditor.decide.baseline import Baseline, apply_baseline, dumps, load_baseline
from auditor.decide.records import DecidedFinding
from auditor.errors import ConfigError
from auditor.rules.finding import Severity


def test_round_trip_accepts_everything_it_recorded(tmp_path: Path) -> None:
    report = sample.sample_report()
    assert report.exit_code == 1
    path = tmp_path / "baseline.json"
    path.write_text(dumps(Baseline.of(report.findings)), encoding="utf-8")
    again = apply_baseline(report, load_baseline(path))
    assert again.exit_code == 0
    waived = [d for d in again.findings if d.waived]
    assert waived and not any(d.in_baseline for d in waived)
    assert again.stale_baseline == ()


def test_file_is_byte_stable_and_holds_no_coordinates(tmp_path: Path) -> None:
    report = sample.sample_report()
    shuffled = dataclasses.replace(report, findings=tuple(reversed(report.findings)))
    assert dumps(Baseline.of(report.findings)) == dumps(Baseline.of(shuffled.findings))
    text = dumps(Baseline.of(report.findings))
    assert "124.8" not in text and "x_mm" not in text and "message" not in text


def _moved(d: DecidedFinding) -> DecidedFinding:
    """The same finding after a re-save: coordinates and wording drift."""
    f = d.finding
    return dataclasses.replace(d, finding=dataclasses.replace(
        f, x_mm=(f.x_mm or 0) + 1e-7, message=f.message + " (re-saved)",
        measured=tuple((k, v * 1.0001) for k, v in f.measured)))


def test_resaved_board_still_matches(tmp_path: Path) -> None:
    report = sample.sample_report()
    baseline = Baseline.of(report.findings)
    resaved = dataclasses.replace(report, findings=tuple(_moved(d) for d in report.findings))
    assert apply_baseline(resaved, baseline).exit_code == 0


def test_a_second_finding_with_the_same_key_is_new_and_fixed_ones_go_stale() -> None:
    report = sample.sample_report()
    baseline = Baseline.of(report.findings)
    gap = report.findings[0]
    twice = dataclasses.replace(report, findings=(gap, gap, *report.findings[2:]))
    marked = apply_baseline(twice, baseline)
    assert [d.in_baseline for d in marked.findings[:2]] == [True, False]
    assert marked.exit_code == 1 and len(marked.failing) == 1
    assert marked.stale_baseline == (
        "noisy-part-near on SLD_1 (nets TOUCH_SLD1; refs E3, L2)",)


def test_new_nets_or_refs_make_a_new_finding() -> None:
    report = sample.sample_report()
    baseline = Baseline.of(report.findings)
    gap = report.findings[0]
    other = dataclasses.replace(gap, finding=dataclasses.replace(gap.finding, refs=("E99",)))
    marked = apply_baseline(dataclasses.replace(report, findings=(other,)), baseline)
    assert not marked.findings[0].in_baseline and marked.exit_code == 1


@pytest.mark.parametrize(("text", "message"), [
    ("{", "not JSON"),
    ('{"entries": []}', "not a padaudit baseline"),
    ('{"padaudit_baseline": 1}', "no 'entries' list"),
    ('{"padaudit_baseline": 1, "entries": [{"sensor": "A"}]}', "rule_id"),
    ('{"padaudit_baseline": 1, "entries": [{"rule_id": "r", "count": 0}]}', "positive"),
    ('{"padaudit_baseline": 1, "entries": [{"rule_id": "r", "nets": "GND"}]}', "list of strings"),
])
def test_bad_baseline_files_are_config_errors(tmp_path: Path, text: str, message: str) -> None:
    path = tmp_path / "b.json"
    path.write_text(text)
    with pytest.raises(ConfigError, match=message) as exc:
        load_baseline(path)
    assert str(exc.value).startswith(str(path))


def test_json_syntax_error_has_line_and_column(tmp_path: Path) -> None:
    path = tmp_path / "b.json"
    path.write_text('{\n  "padaudit_baseline": 1,\n  oops\n}')
    with pytest.raises(ConfigError) as exc:
        load_baseline(path)
    assert (exc.value.line, exc.value.column) == (3, 3)


def test_missing_file(tmp_path: Path) -> None:
    with pytest.raises(ConfigError, match="cannot read baseline"):
        load_baseline(tmp_path / "none.json")


def test_baselined_finding_is_shown_not_dropped() -> None:
    report = sample.sample_report()
    marked = apply_baseline(report, Baseline.of(report.findings))
    assert len(marked.findings) == len(report.findings)
    assert all(d.severity in Severity for d in marked.findings)


def test_stale_entry_says_how_many_were_not_found() -> None:
    report = sample.sample_report()
    gap = report.findings[0]
    baseline = Baseline(((gap.finding.key, 3),))
    marked = apply_baseline(dataclasses.replace(report, findings=(gap,)), baseline)
    assert marked.findings[0].in_baseline
    assert marked.stale_baseline == (
        "ground-gap-tight on SW_MODE (nets GND, TOUCH_MODE; refs E2) (x2 not found)",)


def test_a_baselined_finding_waived_later_is_neither_new_nor_stale() -> None:
    # The usual order in a project: baseline first, then a waiver with a
    # reason for one of the accepted findings (common practice, no source).
    report = sample.sample_report()
    unwaived = dataclasses.replace(report, findings=tuple(
        dataclasses.replace(d, waived="") for d in report.findings))
    baseline = Baseline.of(unwaived.findings)
    first = unwaived.findings[0]
    later = dataclasses.replace(unwaived, findings=(
        dataclasses.replace(first, waived="checked on the bench"),
        *unwaived.findings[1:]))
    marked = apply_baseline(later, baseline)
    assert marked.stale_baseline == ()
    assert marked.findings[0].waived and not marked.findings[0].in_baseline
    assert marked.exit_code == 0
