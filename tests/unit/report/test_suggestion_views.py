"""Suggested fixes in every back-end: text under the finding, Markdown, JSON
``findings[].suggestions[]`` valid against the shipped schema, SARIF in the
result's properties and still valid against the official OASIS SARIF 2.1.0
schema (tests/data/sarif-schema-2.1.0.json; ``fixes[]`` would need
``artifactChanges``, an edit of the board, which padaudit never makes)."""

from __future__ import annotations

import dataclasses
import io
import json
from pathlib import Path

import jsonschema
import sample_report as sample

from auditor.decide.records import Report
from auditor.model.suggestions import Predicted, Suggestion
from auditor.report.as_json import load_schema, render_json
from auditor.report.markdown import render_markdown
from auditor.report.sarif import to_sarif
from auditor.report.text import render_text

SARIF_SCHEMA = json.loads((Path(__file__).resolve().parents[2] / "data" /
                           "sarif-schema-2.1.0.json").read_text(encoding="utf-8"))
GROW = Suggestion("grow the pad to 7.2 mm across (41 mm²)", "pad_diameter_mm", 6.0, 7.2,
                  Predicted(5.432, 0.1826, 0.03362), Predicted(5.865, 0.2717, 0.04633))
NOT_ENOUGH = Suggestion("not enough on its own: thin the cover to 0.5 mm", "overlay_mm", 2.0,
                        0.5, Predicted(5.432, 0.1826, 0.03362), Predicted(5.1, 0.25, 0.049),
                        clears=False)


def suggested_report() -> Report:
    report = sample.sample_report()
    first = dataclasses.replace(report.findings[0], suggestions=(GROW, NOT_ENOUGH))
    return dataclasses.replace(report, findings=(first, *report.findings[1:]))


def test_text_shows_the_change_and_before_after() -> None:
    out = io.StringIO()
    render_text(suggested_report(), out, False)
    text = out.getvalue()
    assert "try grow the pad to 7.2 mm across (41 mm²)" in text
    assert "Cp 5.43 → 5.87 pF · ΔC 0.183 → 0.272 pF · ΔC/Cp 3.36 → 4.63 %" in text
    assert "not enough on its own: thin the cover to 0.5 mm" in text


def test_markdown_lists_them_under_the_finding() -> None:
    out = io.StringIO()
    render_markdown(suggested_report(), out)
    assert ("try: grow the pad to 7.2 mm across (41 mm²): Cp 5.43 → 5.87 pF, "
            "ΔC 0.183 → 0.272 pF, ΔC/Cp 3.36 → 4.63 %") in out.getvalue()


def test_json_suggestions_validate_and_carry_the_numbers() -> None:
    out = io.StringIO()
    render_json(suggested_report(), out)
    doc = json.loads(out.getvalue())
    jsonschema.Draft202012Validator(load_schema()).validate(doc)
    first = doc["findings"][0]["suggestions"][0]
    assert first == {"change": GROW.change, "parameter": "pad_diameter_mm", "from": 6.0,
                     "to": 7.2, "clears": True,
                     "before": {"cp_total_pf": 5.432, "delta_c_pf": 0.1826,
                                "delta_ratio": 0.03362},
                     "predicted": {"cp_total_pf": 5.865, "delta_c_pf": 0.2717,
                                   "delta_ratio": 0.04633}}
    assert doc["findings"][0]["suggestions"][1]["clears"] is False
    assert "suggestions" not in doc["findings"][1]


def test_json_schema_rejects_a_suggestion_without_its_prediction() -> None:
    out = io.StringIO()
    render_json(suggested_report(), out)
    doc = json.loads(out.getvalue())
    del doc["findings"][0]["suggestions"][0]["predicted"]
    try:
        jsonschema.Draft202012Validator(load_schema()).validate(doc)
    except jsonschema.ValidationError:
        return
    raise AssertionError("the schema accepted a suggestion without 'predicted'")


def test_sarif_carries_them_in_properties_and_stays_valid() -> None:
    doc = to_sarif(suggested_report())
    jsonschema.Draft4Validator(SARIF_SCHEMA).validate(doc)
    result = doc["runs"][0]["results"][0]
    assert result["properties"]["suggestions"][0]["to"] == 7.2
    assert "fixes" not in result
