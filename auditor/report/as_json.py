"""The JSON report: a versioned, documented document (docs/report-json.md).

The document is a pure function of the report: keys sorted, floats rounded to
six significant digits (so solver noise below that cannot change the bytes),
no timestamps, the board path exactly as the user gave it. The JSON Schema
ships beside this module (``schema/report.schema.json``).
"""

from __future__ import annotations

import json
from collections.abc import Iterable
from importlib import resources
from typing import TYPE_CHECKING, Any, TextIO

from auditor.decide.records import DecidedFinding, Report, SensorResult
from auditor.decide.summary import count_findings
from auditor.model.results import PadMetrics
from auditor.report.rounding import significant
from auditor.report.suggestion_view import suggestion_record
from auditor.report.verdicts import electrode_verdicts
from auditor.sensors.model import SensePath, Surroundings

if TYPE_CHECKING:
    from auditor.model.results import CouplingTable, PreciseExtras, SegmentScan

#: Bumped when a field is removed or changes meaning; additions keep it.
SCHEMA_VERSION = 2


def _metrics(m: PadMetrics | None) -> dict[str, Any] | None:
    if m is None:
        return None
    return {
        "cp_pad_pf": significant(m.cp_pad_pf), "cp_trace_pf": significant(m.cp_trace_pf),
        "cp_total_pf": significant(m.cp_total_pf), "delta_c_pf": significant(m.delta_c_pf),
        "delta_ratio": significant(m.delta_ratio), "method": m.method,
        "method_reason": m.method_reason, "notes": list(m.notes),
        "cp_pin_pf": significant(m.cp_pin_pf), "cp_parts_pf": significant(m.cp_parts_pf),
        "parts": [{"ref": p.ref, "value": p.value, "pf": significant(p.pf),
                   "connection": p.connection, "net": p.net} for p in m.parts],
        **_quick(m),
    }


def _quick(m: PadMetrics) -> dict[str, Any]:
    """The quick estimate beside a precise result, or why there is none
    (both absent for quick metrics)."""
    if m.quick_cp_total_pf is None and m.quick_delta_c_pf is None:
        return {"quick_missing": m.quick_missing} if m.quick_missing else {}
    return {"quick": {"cp_pad_pf": significant(m.quick_cp_pad_pf),
                      "cp_total_pf": significant(m.quick_cp_total_pf),
                      "delta_c_pf": significant(m.quick_delta_c_pf)}}


def _series(values: Iterable[float]) -> list[float | None]:
    return [significant(v) for v in values]


def _coupling(table: CouplingTable | None) -> dict[str, Any] | None:
    if table is None:
        return None
    return {"names": list(table.names), "cell_mm": significant(table.cell_mm),
            "crosstalk_pf": [_series(row) for row in table.crosstalk_pf],
            "fraction_of_cp": [_series(row) for row in table.fraction_of_cp]}


def _scan(scan: SegmentScan) -> dict[str, Any]:
    segments = [{"name": name, "centre_mm": significant(centre),
                 "delta_pf": _series(row[i] for row in scan.delta_pf)}
                for i, (name, centre) in enumerate(zip(scan.segment_names,
                                                       scan.segment_centres_mm, strict=True))]
    return {
        "group": scan.group, "kind": scan.kind, "segments": segments,
        "positions_mm": _series(scan.positions_mm), "estimated_mm": _series(scan.estimated_mm),
        "linearity_mm": significant(scan.linearity_mm),
        "dead_zones_mm": [_series(zone) for zone in scan.dead_zones_mm],
        "reversals_mm": _series(scan.reversals_mm), "monotonic": scan.monotonic,
        "step_mm": significant(scan.step_mm), "cell_mm": significant(scan.cell_mm),
        "x_mm": significant(scan.x_mm), "y_mm": significant(scan.y_mm),
    }


def _precise(extras: PreciseExtras | None) -> dict[str, Any]:
    """``{"precise": ...}`` for a ``--precise`` run, else nothing (key absent)."""
    if extras is None:
        return {}
    return {"precise": {"coupling": _coupling(extras.coupling),
                        "scans": [_scan(scan) for scan in extras.scans],
                        "notes": list(extras.notes)}}


def _path(p: SensePath | None) -> dict[str, Any] | None:
    if p is None:
        return None
    return {
        "length_mm": significant(p.length_mm), "vias": p.vias, "layers": list(p.layers),
        "controller_ref": p.controller_ref, "controller_pin": p.controller_pin,
        "series_ref": p.series_ref, "series_to_pin_mm": significant(p.series_to_pin_mm),
        "complete": p.complete,
    }


def _surroundings(s: Surroundings | None) -> dict[str, Any] | None:
    if s is None:
        return None
    return {
        "ground_net": s.ground_net, "min_gap_mm": significant(s.min_gap_mm),
        "typical_gap_mm": significant(s.typical_gap_mm),
        "ground_fill_ratio": significant(s.ground_fill_ratio),
        "nearest_sensor": s.nearest_sensor,
        "nearest_sensor_mm": significant(s.nearest_sensor_mm),
        "ground_area_mm2": significant(s.ground_area_mm2),
    }


def _sensor(r: SensorResult, verdict: str) -> dict[str, Any]:
    s = r.sensor
    return {
        "name": s.name, "kind": s.kind, "nets": list(s.nets), "refs": list(s.refs),
        "layer": s.layer, "area_mm2": significant(s.area_mm2), "x_mm": significant(s.x_mm),
        "y_mm": significant(s.y_mm), "reason": s.reason, "group": s.group, "index": s.index,
        "exposed": s.exposed, "pasted": s.pasted, "rank": r.rank, "verdict": verdict,
        "strength": r.strength,
        "metrics": _metrics(r.metrics), "path": _path(s.path),
        "surroundings": _surroundings(s.surroundings),
    }


def _finding(d: DecidedFinding, failing: bool) -> dict[str, Any]:
    f = d.finding
    suggested = ({"suggestions": [suggestion_record(s) for s in d.suggestions]}
                 if d.suggestions else {})
    return {**suggested,
        "rule_id": f.rule_id, "severity": d.severity.label,
        "default_severity": f.severity.label, "message": f.message,
        "x_mm": significant(f.x_mm), "y_mm": significant(f.y_mm), "layer": f.layer,
        "source_line": f.source_line, "source_column": f.source_column,
        "nets": list(f.nets), "refs": list(f.refs), "sensor": f.sensor,
        "measured": {name: significant(value) for name, value in f.measured},
        "waived": d.waived, "in_baseline": d.in_baseline, "failing": failing,
    }


def _count_by_severity(findings: Iterable[DecidedFinding]) -> dict[str, int]:
    counts = {"error": 0, "warning": 0, "info": 0}
    for d in findings:
        counts[d.severity.label] += 1
    return counts


def _accepted(report: Report) -> dict[str, int]:
    """The counts the verdict line shows beside the severities."""
    counts = count_findings(report.findings,
                            len(report.stale_waivers) + len(report.stale_baseline))
    return {"waived": counts.waived, "baselined": counts.baselined, "stale": counts.stale}


def to_document(report: Report) -> dict[str, Any]:
    """The report as plain JSON-ready data (schema version :data:`SCHEMA_VERSION`)."""
    info = report.info
    failing_ids = {id(d) for d in report.failing}
    verdicts = electrode_verdicts(report)
    return {
        "schema_version": SCHEMA_VERSION,
        "tool": {"name": "padaudit", "version": info.tool_version},
        "board": {"path": info.board_path, "format_version": info.board_version},
        "run": {
            "config_path": info.config_path or None,
            "profile": info.profile, "overlay": info.overlay, "touch_side": info.touch_side,
            "power": info.power, "fail_on": info.fail_on.label,
            "max_ratio_loss": significant(info.max_ratio_loss),
        },
        "summary": {
            "exit_code": report.exit_code, "sensors": len(report.sensors),
            "findings": _count_by_severity(report.findings),
            "failing": len(failing_ids), **_accepted(report),
        },
        "sensors": [_sensor(r, verdicts[r.sensor.name]) for r in report.sensors],
        "findings": [_finding(d, id(d) in failing_ids) for d in report.findings],
        "rules": [
            {"rule_id": r.rule_id, "title": r.title, "rationale": r.rationale, "fix": r.fix,
             "default_severity": r.default_severity.label}
            for r in report.rules
        ],
        "read_warnings": list(report.read_warnings),
        "stale_waivers": list(report.stale_waivers),
        "stale_baseline": list(report.stale_baseline),
        "rule_errors": [{"rule_id": rid, "error": err} for rid, err in report.rule_errors],
        "cautions": list(report.cautions),
        "notes": list(report.notes),
        **_precise(report.precise),
    }


def dumps(document: Any) -> str:
    """Serialise canonically: sorted keys, two-space indent, final newline."""
    return json.dumps(document, sort_keys=True, indent=2, ensure_ascii=False,
                      allow_nan=False) + "\n"


def render_json(report: Report, stream: TextIO) -> None:
    """Write the JSON report to ``stream``."""
    stream.write(dumps(to_document(report)))


def load_schema() -> dict[str, Any]:
    """The shipped JSON Schema of the report document."""
    text = resources.files("auditor.report").joinpath("schema/report.schema.json").read_text(
        encoding="utf-8")
    schema: dict[str, Any] = json.loads(text)
    return schema
