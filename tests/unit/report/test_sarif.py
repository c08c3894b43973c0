"""SARIF 2.1.0 output validated against the official OASIS schema
(sarif-schema-2.1.0.json, copied into tests/data from the reference folder)
with the jsonschema library."""

from __future__ import annotations

import io
import json
import os
from pathlib import Path

import jsonschema
import pytest
import sample_report as sample

from auditor.report.sarif import artifact_uri, render_sarif, rule_name, to_sarif

SCHEMA = json.loads((Path(__file__).resolve().parents[2] / "data" /
                     "sarif-schema-2.1.0.json").read_text(encoding="utf-8"))


def _validate(doc: object) -> None:
    jsonschema.Draft4Validator(SCHEMA).validate(doc)


@pytest.mark.parametrize("report", [sample.sample_report(), sample.clean_report(),
                                    sample.sample_report(findings=(), rules=()),
                                    sample.sample_report(rule_errors=(("ratio-low", "boom"),))])
def test_valid_against_the_official_schema(report: object) -> None:
    out = io.StringIO()
    render_sarif(report, out)  # type: ignore[arg-type]
    _validate(json.loads(out.getvalue()))


def test_the_schema_check_can_fail() -> None:
    doc = to_sarif(sample.sample_report())
    doc["runs"][0]["results"][0]["level"] = "fatal"
    with pytest.raises(jsonschema.ValidationError):
        _validate(doc)


def test_levels_rules_and_locations() -> None:
    doc = to_sarif(sample.sample_report())
    run = doc["runs"][0]
    levels = [r["level"] for r in run["results"]]
    assert levels == ["error", "error", "error", "warning", "warning", "note"]
    rules = run["tool"]["driver"]["rules"]
    gap = next(r for r in rules if r["id"] == "ground-gap-tight")
    assert gap["name"] == "GroundGapTight"
    assert gap["fullDescription"]["text"].startswith("A narrow gap")
    assert gap["help"]["text"].startswith("Widen")
    for result in run["results"]:
        assert rules[result["ruleIndex"]]["id"] == result["ruleId"]
        loc = result["locations"][0]["physicalLocation"]["artifactLocation"]
        assert loc["uri"] == "boards/sample_panel.kicad_pcb"
    first = run["results"][0]["properties"]
    assert (first["x_mm"], first["y_mm"], first["layer"]) == (124.8, 114.0, "F.Cu")
    assert first["nets"] == ["GND", "TOUCH_MODE"]


def test_waiver_and_baseline_are_expressed_in_sarif_terms() -> None:
    results = to_sarif(sample.sample_report())["runs"][0]["results"]
    waived = next(r for r in results if r["ruleId"] == "copper-under-electrode")
    assert waived["suppressions"][0]["justification"].startswith("plane needed")
    baselined = next(r for r in results if r["ruleId"] == "series-resistor-missing")
    assert baselined["baselineState"] == "unchanged"


def test_finding_without_rule_metadata_still_gets_a_descriptor() -> None:
    doc = to_sarif(sample.sample_report(rules=()))
    _validate(doc)
    ids = [r["id"] for r in doc["runs"][0]["tool"]["driver"]["rules"]]
    assert "ratio-low" in ids


def test_fingerprint_ignores_position_and_message() -> None:
    import dataclasses

    report = sample.sample_report()
    d = report.findings[0]
    moved = dataclasses.replace(d, finding=dataclasses.replace(
        d.finding, x_mm=1.0, y_mm=2.0, message="other words"))
    a = to_sarif(report)["runs"][0]["results"][0]["partialFingerprints"]
    b = to_sarif(dataclasses.replace(report, findings=(moved,)))["runs"][0]["results"][0]
    assert a == b["partialFingerprints"]


def test_uri_is_relative_to_the_working_folder(tmp_path: Path,
                                               monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    assert artifact_uri(str(tmp_path / "hw" / "a.kicad_pcb")) == "hw/a.kicad_pcb"
    outside = Path(os.path.dirname(tmp_path)) / "b.kicad_pcb"
    assert artifact_uri(str(outside)).startswith("file:///")
    assert artifact_uri("hw\\..\\x.kicad_pcb".replace("\\", "/")) == "hw/../x.kicad_pcb"


def test_rule_name_is_an_identifier() -> None:
    assert rule_name("ground-gap-tight") == "GroundGapTight"
    assert rule_name("x") == "X"
