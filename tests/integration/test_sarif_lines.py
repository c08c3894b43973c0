"""SARIF results point at the line of the item they concern in the board file."""

from __future__ import annotations

import json
from collections import defaultdict
from pathlib import Path

from auditor.cli.main import main
from auditor.demo import demo_board_path

#: Rules whose findings are about one stretch of the sense trace
#: (tests/integration/test_trace_finding_lines.py checks which track).
STRETCH_RULES = ("trace-too-wide", "trace-parallel-run", "trace-near-noisy-net",
                 "trace-crossings", "trace-under-electrode", "trace-too-long")
SARIF_SCHEMA = Path(__file__).resolve().parents[1] / "data" / "sarif-schema-2.1.0.json"


def test_demo_results_sit_on_their_items_lines(tmp_path: Path) -> None:
    import jsonschema

    target = tmp_path / "demo.sarif"
    assert main(["demo", "--format", "sarif", "--output", str(target), "-q"]) == 0
    doc = json.loads(target.read_text(encoding="utf-8"))
    # The official SARIF 2.1.0 schema (OASIS), shipped in tests/data.
    jsonschema.Draft4Validator(json.loads(SARIF_SCHEMA.read_text())).validate(doc)
    board_lines = demo_board_path().read_text(encoding="utf-8").splitlines()
    lines_by_sensor: dict[str, set[int]] = defaultdict(set)
    for result in doc["runs"][0]["results"]:
        region = result["locations"][0]["physicalLocation"]["region"]
        sensor = result["properties"]["sensor"]
        if not sensor:
            continue
        line, column = region["startLine"], region["startColumn"]
        opened = board_lines[line - 1][column - 1:]
        assert result["properties"]["layer"] and result["properties"]["x_mm"] is not None
        if result["ruleId"] in STRETCH_RULES:
            # a finding about a stretch of trace opens that track
            assert opened.startswith(("(segment", "(arc")), result
            continue
        # The line opens the electrode's first item (a pad, or a zone).
        assert opened.startswith(("(pad", "(zone")), result
        lines_by_sensor[sensor].add(line)
    assert len(lines_by_sensor) >= 5
    # Findings on distinct electrodes land on distinct lines, one per electrode.
    assert all(len(lines) == 1 for lines in lines_by_sensor.values())
    firsts = [next(iter(lines)) for lines in lines_by_sensor.values()]
    assert len(set(firsts)) == len(firsts)
