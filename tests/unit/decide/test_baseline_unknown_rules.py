"""A baseline entry whose rule id no padaudit rule has (misspelt, or from
another version) is reported as an unknown rule id, not only as stale
(issue 16, item 3)."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import sample_report as sample

from auditor.decide.baseline import apply_baseline, load_baseline

ENTRY = '{{"rule_id": "{rule}", "sensor": "SW_MODE", "nets": ["GND"], "refs": [], "count": 1}}'


def baseline_file(tmp_path: Path, *rule_ids: str) -> Path:
    entries = ", ".join(ENTRY.format(rule=r) for r in rule_ids)
    path = tmp_path / "baseline.json"
    path.write_text(f'{{"padaudit_baseline": 1, "entries": [{entries}]}}\n', encoding="utf-8")
    return path


def test_unknown_rule_ids_are_named_as_such(tmp_path: Path) -> None:
    report = sample.sample_report()
    path = baseline_file(tmp_path, "ground-gap-tite", "trace-too-long", "no-such-rule")
    marked = apply_baseline(report, load_baseline(path))
    unknown = [line for line in marked.stale_baseline if "unknown rule id" in line]
    assert len(unknown) == 2
    assert any("'ground-gap-tite'" in line for line in unknown)
    assert any("'no-such-rule'" in line for line in unknown)
    # A real rule that is simply no longer found stays an ordinary stale entry.
    known = [line for line in marked.stale_baseline if line.startswith("trace-too-long")]
    assert known and "unknown rule id" not in known[0]


def test_known_rule_ids_get_no_unknown_note(tmp_path: Path) -> None:
    report = sample.sample_report()
    only_gap = dataclasses.replace(report, findings=())
    marked = apply_baseline(only_gap, load_baseline(baseline_file(tmp_path, "ground-gap-tight")))
    assert marked.stale_baseline and not any("unknown" in s for s in marked.stale_baseline)
