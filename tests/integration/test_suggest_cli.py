"""``padaudit audit`` with and without suggestions, end to end: the JSON
carries ``findings[].suggestions[]`` by default, none with ``--no-suggest``,
and stays byte-identical run to run (the project's determinism contract,
README "Guarantees"). Board: a generated rule fixture with a 0.25 mm pour
clearance (fixtures/rules/, invented layout)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.cli.main import main

pytestmark = pytest.mark.slow

BOARD = Path(__file__).resolve().parents[2] / "fixtures" / "rules" / "ground-gap-tight--bad.kicad_pcb"


def audit_json(capsys: pytest.CaptureFixture[str], *extra: str) -> str:
    main(["audit", str(BOARD), "--format", "json", "--quiet", *extra])
    return capsys.readouterr().out


def test_suggestions_by_default_none_with_no_suggest(capsys: pytest.CaptureFixture[str]) -> None:
    first = audit_json(capsys)
    assert first == audit_json(capsys), "JSON with suggestions is not byte-identical"
    gaps = [f for f in json.loads(first)["findings"] if f["rule_id"] == "ground-gap-tight"]
    assert gaps and all(f["suggestions"][0]["parameter"] == "ground_gap_mm" for f in gaps)
    bare = json.loads(audit_json(capsys, "--no-suggest"))
    assert not any("suggestions" in f for f in bare["findings"])
