"""Corrupt baseline files (issue 16): every one is a one-line configuration
error naming the file, never an internal error; entries naming a rule
padaudit does not have are reported as unknown, not only as stale.

The corrupt contents are those a reliability trial produced; the contract is
the project's own (bad input: exit 2, file named; common practice, no
source)."""

from __future__ import annotations

from pathlib import Path

import pytest
import sample_report as sample

from auditor.decide.baseline import Baseline, apply_baseline, load_baseline
from auditor.errors import ConfigError

_ENTRY = '{"rule_id": "ground-gap-tight", "sensor": "SW_MODE", "nets": [], "refs": []'


@pytest.mark.parametrize(("content", "says"), [
    (b'{"padaudit_baseline": 1, "entries": [\xff\xfe]}', "not UTF-8"),
    (b'{"padaudit_baseline": 1, "entries": [' + _ENTRY.encode() + b', "count": '
     + b"9" * 5000 + b"}]}", "count"),
    (b'{"padaudit_baseline": 1, "entries": ' + b"[" * 100_000 + b"]" * 100_000 + b"}",
     "nested"),
    (b'{"padaudit_baseline": 1, "entries": [' + _ENTRY.encode() + b', "count": 1e400}]}',
     "count"),
    (b'{"padaudit_baseline": 1e999, "entries": []}', "not a padaudit baseline"),
    (b'{"padaudit_baseline": 1, "entries": [{"rule_id": ["x"], "sensor": ""}]}', "rule_id"),
    (b'{"padaudit_baseline": 1, "entries": [' + _ENTRY.encode() + b', "count": NaN}]}',
     "count"),
])
def test_corrupt_content_is_a_config_error(tmp_path: Path, content: bytes, says: str) -> None:
    file = tmp_path / "baseline.json"
    file.write_bytes(content)
    with pytest.raises(ConfigError) as caught:
        load_baseline(file)
    message = str(caught.value)
    assert message.startswith(str(file)) and says in message
    assert "\n" not in message and len(message) < 300


def test_unknown_rule_ids_are_named_as_such() -> None:
    report = sample.sample_report()
    baseline = Baseline(((("ground-gap-tigth", "SW_MODE", (), ()), 1),))
    marked = apply_baseline(report, baseline)
    assert len(marked.stale_baseline) == 1
    assert "unknown rule id 'ground-gap-tigth'" in marked.stale_baseline[0]
