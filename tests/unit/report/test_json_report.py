"""The JSON report: valid against the shipped schema (checked with the
jsonschema reference library), byte-identical for equal input, rounded."""

from __future__ import annotations

import dataclasses
import io
import json

import jsonschema
import pytest
import sample_report as sample

from auditor.model.results import PadMetrics
from auditor.report.as_json import SCHEMA_VERSION, load_schema, render_json, to_document
from auditor.report.rounding import significant


def _text(report: object) -> str:
    out = io.StringIO()
    render_json(report, out)  # type: ignore[arg-type]
    return out.getvalue()


def test_shipped_schema_is_itself_a_valid_draft_2020_12_schema() -> None:
    jsonschema.Draft202012Validator.check_schema(load_schema())


@pytest.mark.parametrize("report", [sample.sample_report(), sample.clean_report(),
                                    sample.sample_report(sensors=(), findings=(),
                                                         rule_errors=(("x", "boom"),))])
def test_document_validates_against_the_schema(report: object) -> None:
    doc = json.loads(_text(report))
    jsonschema.Draft202012Validator(load_schema()).validate(doc)
    assert doc["schema_version"] == SCHEMA_VERSION


def test_schema_rejects_a_document_with_an_unknown_top_level_key() -> None:
    doc = to_document(sample.sample_report())
    doc["surprise"] = 1
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate(doc, load_schema(), cls=jsonschema.Draft202012Validator)


def test_same_report_gives_identical_bytes_and_sorted_keys() -> None:
    first, second = _text(sample.sample_report()), _text(sample.sample_report())
    assert first == second
    doc = json.loads(first)
    assert list(doc) == sorted(doc)


def test_float_noise_below_six_digits_does_not_change_the_bytes() -> None:
    report = sample.sample_report()
    first = report.sensors[0]
    m = first.metrics
    assert m is not None
    noisy = dataclasses.replace(first, metrics=dataclasses.replace(
        m, cp_pad_pf=m.cp_pad_pf * (1 + 1e-9), delta_ratio=m.delta_ratio * (1 - 1e-9)))
    other = dataclasses.replace(report, sensors=(noisy, *report.sensors[1:]))
    assert _text(other) == _text(report)


def test_every_sensor_and_finding_is_in_the_document() -> None:
    report = sample.sample_report()
    doc = to_document(report)
    assert [s["name"] for s in doc["sensors"]] == [r.sensor.name for r in report.sensors]
    assert len(doc["findings"]) == len(report.findings)
    unsolved = next(s for s in doc["sensors"] if s["name"] == "SW_AUX")
    assert unsolved["metrics"] is None and unsolved["verdict"] == "unsolved"
    failing = [f["rule_id"] for f in doc["findings"] if f["failing"]]
    assert failing == [d.finding.rule_id for d in report.failing]
    assert doc["summary"]["exit_code"] == 1
    assert doc["summary"]["findings"] == {"error": 3, "warning": 2, "info": 1}


def test_metrics_are_copied_not_recomputed() -> None:
    doc = to_document(sample.sample_report())
    power = next(s for s in doc["sensors"] if s["name"] == "SW_POWER")
    # 8.2 + 1.9 = 10.1 pF; 0.62 / 10.1 = 0.0613861... (hand arithmetic)
    assert power["metrics"]["cp_total_pf"] == pytest.approx(10.1)
    assert power["metrics"]["delta_ratio"] == 0.0613861


@pytest.mark.parametrize(("value", "expected"), [
    (0.1 + 0.2, 0.3), (123456789.0, 123457000.0), (-0.0, 0.0), (float("nan"), None),
    (float("inf"), None), (None, None), (1.23456789e-5, 1.23457e-5),
])
def test_rounding_to_six_significant_digits(value: float | None, expected: float | None) -> None:
    assert significant(value) == expected


def test_nan_metrics_become_null_not_invalid_json() -> None:
    report = sample.sample_report()
    broken = dataclasses.replace(report.sensors[0], metrics=PadMetrics(
        float("nan"), 1.0, float("nan"), 0.1, float("nan")))
    text = _text(dataclasses.replace(report, sensors=(broken,)))
    assert "NaN" not in text
    assert json.loads(text)["sensors"][0]["metrics"]["cp_pad_pf"] is None


def test_verdict_is_the_worst_finding_and_strength_has_its_own_field() -> None:
    """SLD_1 has a strong signal and an error finding: verdict error, strength
    ok (issue 14); SW_POWER's only warning is waived."""
    doc = to_document(sample.sample_report())
    by_name = {s["name"]: s for s in doc["sensors"]}
    assert (by_name["SLD_1"]["verdict"], by_name["SLD_1"]["strength"]) == ("error", "ok")
    assert (by_name["SW_POWER"]["verdict"], by_name["SW_POWER"]["strength"]) == ("waived", "ok")
    assert (by_name["SLD_2"]["verdict"], by_name["SLD_2"]["strength"]) == ("ok", "weak")
    assert by_name["SW_AUX"]["verdict"] == "unsolved"
