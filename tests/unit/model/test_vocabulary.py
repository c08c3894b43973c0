"""The vocabulary against every place that must agree with it.

(common practice, no source: one definition checked against its users, so a
new word cannot reach one place and miss another.)
"""

from __future__ import annotations

import json
import typing
from pathlib import Path

import pytest

from auditor.field.circuit import DEVICE_TO_EARTH
from auditor.model import vocabulary
from auditor.rules.finding import Finding, Severity
from auditor.sensors import model as sensor_model

SCHEMA = Path(vocabulary.__file__).parents[1] / "report" / "schema" / "report.schema.json"


@pytest.mark.parametrize(("literal", "choices"), [
    (vocabulary.PowerPreset, vocabulary.POWER_PRESETS),
    (vocabulary.TouchSide, vocabulary.TOUCH_SIDES),
    (vocabulary.PadSide, vocabulary.PAD_SIDES),
    (vocabulary.SensorKind, vocabulary.SENSOR_KINDS),
    (vocabulary.SeverityName, vocabulary.SEVERITY_NAMES),
])
def test_choices_are_the_literal_values(literal: object, choices: tuple[str, ...]) -> None:
    assert choices == typing.get_args(literal)
    assert len(set(choices)) == len(choices)


def test_severity_names_are_the_scale_worst_first() -> None:
    assert tuple(s.label for s in sorted(Severity, reverse=True)) == vocabulary.SEVERITY_NAMES
    with pytest.raises(ValueError, match="error, warning, info"):
        Severity.parse("fatal")


def test_every_power_preset_has_a_ground_to_earth_value() -> None:
    assert tuple(DEVICE_TO_EARTH) == vocabulary.POWER_PRESETS


def test_sensor_kinds_match_the_records_and_the_json_schema() -> None:
    assert typing.get_args(sensor_model.SensorKind) == vocabulary.SENSOR_KINDS
    schema_text = SCHEMA.read_text(encoding="utf-8")
    kinds = [node["enum"] for node in _nodes(json.loads(schema_text))
             if "enum" in node and "mutual-tx" in node["enum"]]
    assert kinds == [list(vocabulary.SENSOR_KINDS)]
    assert set(vocabulary.SELF_KINDS) < set(vocabulary.SENSOR_KINDS)


def test_finding_key_has_the_documented_parts() -> None:
    finding = Finding("ground-gap-tight", Severity.ERROR, "m", nets=("A",), refs=("E1",),
                      sensor="S1")
    assert finding.key == ("ground-gap-tight", "S1", ("A",), ("E1",))


def _nodes(value: object) -> list[dict[str, typing.Any]]:
    if isinstance(value, dict):
        return [value] + [n for item in value.values() for n in _nodes(item)]
    if isinstance(value, list):
        return [n for item in value for n in _nodes(item)]
    return []
