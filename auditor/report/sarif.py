"""SARIF 2.1.0 output (OASIS Static Analysis Results Interchange Format).

Every finding is a ``result`` located at the board file, on the line where
the item it concerns starts (the offending track for a finding about a stretch
of trace, else the electrode's first pad or zone; the JSON report's
``source_line``/``source_column`` are the same numbers); SARIF has
no notion of board coordinates, so x/y (mm, Y down as in KiCad), layer, nets
and references go into the result's ``properties``. Waived findings carry a
``suppression``; baselined ones ``baselineState: unchanged``.
"""

from __future__ import annotations

import hashlib
import os
from pathlib import Path
from typing import Any, TextIO
from urllib.parse import quote

from auditor.decide.records import DecidedFinding, Report, RuleInfo
from auditor.report.as_json import dumps
from auditor.report.rounding import significant
from auditor.report.suggestion_view import suggestion_record
from auditor.rules.finding import Finding, Severity

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA_URI = "https://json.schemastore.org/sarif-2.1.0.json"
LEVELS = {Severity.ERROR: "error", Severity.WARNING: "warning", Severity.INFO: "note"}


def artifact_uri(board_path: str) -> str:
    """The board as a URI relative to the working directory (where CI runs,
    normally the repository root); an absolute ``file:`` URI when outside it.
    Percent-encoded as RFC 3986 asks (spaces, ``#``, ``%``, ``:`` and non-ASCII
    in a path would otherwise make an invalid or different reference).

    >>> artifact_uri("hw/my board #2.kicad_pcb")
    'hw/my%20board%20%232.kicad_pcb'
    """
    path = Path(board_path)
    if not path.is_absolute():
        return quote(path.as_posix(), safe="/")
    try:
        rel = os.path.relpath(path, Path.cwd())
    except ValueError:  # another drive on Windows
        return path.as_uri()
    return path.as_uri() if rel.startswith("..") else quote(Path(rel).as_posix(), safe="/")


def rule_name(rule_id: str) -> str:
    """``ground-gap-tight`` -> ``GroundGapTight`` (SARIF names are identifiers)."""
    return "".join(part[:1].upper() + part[1:] for part in rule_id.replace("_", "-").split("-"))


def _descriptor(rule: RuleInfo) -> dict[str, Any]:
    return {
        "id": rule.rule_id,
        "name": rule_name(rule.rule_id),
        "shortDescription": {"text": rule.title or rule.rule_id},
        "fullDescription": {"text": rule.rationale or rule.title or rule.rule_id},
        "help": {"text": rule.fix or "No fix advice recorded for this rule."},
        "defaultConfiguration": {"level": LEVELS[rule.default_severity]},
    }


def _rules(report: Report) -> list[RuleInfo]:
    known = {r.rule_id: r for r in report.rules}
    for d in report.findings:  # a finding from a rule without metadata still gets one
        f = d.finding
        known.setdefault(f.rule_id, RuleInfo(f.rule_id, f.rule_id, "", "", f.severity))
    return [known[rid] for rid in sorted(known)]


def fingerprint(d: DecidedFinding) -> str:
    """Stable hash of the finding's key (rule, sensor, nets, refs)."""
    rule_id, sensor, nets, refs = d.finding.key
    text = "\x1f".join([rule_id, sensor, ",".join(nets), ",".join(refs)])
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:32]


def message_text(d: DecidedFinding) -> str:
    """The finding's message with where it is on the board, since SARIF
    viewers show the message but not our properties."""
    f = d.finding
    where = [f"x {f.x_mm:.2f} mm, y {f.y_mm:.2f} mm"] if f.x_mm is not None and f.y_mm is not None else []
    where += [f.layer] if f.layer else []
    where += [", ".join(f.refs)] if f.refs else []
    return f.message + (f" [{'; '.join(where)}]" if where else "")


def _region(f: Finding) -> dict[str, int]:
    """Where the item concerned starts in the board file. Viewers such as
    code-scanning annotations place results by line; a finding about the
    whole board has no line of its own and is anchored at the file's start."""
    if f.source_line is None:
        return {"startLine": 1}
    region = {"startLine": f.source_line}
    if f.source_column is not None:
        region["startColumn"] = f.source_column
    return region


def _result(d: DecidedFinding, index: int, uri: str, failing: bool) -> dict[str, Any]:
    f = d.finding
    physical = {"artifactLocation": {"uri": uri, "index": 0}, "region": _region(f)}
    result: dict[str, Any] = {
        "ruleId": f.rule_id,
        "ruleIndex": index,
        "level": LEVELS[d.severity],
        "message": {"text": message_text(d)},
        "locations": [{"physicalLocation": physical}],
        "partialFingerprints": {"padauditFindingKey/v1": fingerprint(d)},
        "baselineState": "unchanged" if d.in_baseline else "new",
        "properties": {
            "x_mm": significant(f.x_mm), "y_mm": significant(f.y_mm), "layer": f.layer,
            "nets": list(f.nets), "refs": list(f.refs), "sensor": f.sensor,
            "measured": {name: significant(value) for name, value in f.measured},
            "default_severity": f.severity.label, "failing": failing,
        },
    }
    if d.suggestions:  # a fix description only: SARIF's fixes[] would need artifactChanges
        result["properties"]["suggestions"] = [suggestion_record(s) for s in d.suggestions]
    if f.sensor:
        result["locations"][0]["logicalLocations"] = [{"name": f.sensor, "kind": "object"}]
    if d.waived:
        result["suppressions"] = [{"kind": "external", "status": "accepted",
                                   "justification": d.waived}]
    return result


def _notifications(report: Report) -> list[dict[str, Any]]:
    notes: list[dict[str, Any]] = []
    for rid, err in report.rule_errors:
        notes.append({"level": "error", "message": {"text": f"rule {rid} crashed: {err}"},
                      "descriptor": {"id": "rule-crashed"}})
    for text, level in ([(w, "warning") for w in report.read_warnings]
                        + [(w, "note") for w in report.stale_waivers]
                        + [(b, "note") for b in report.stale_baseline]
                        + [(c, "warning") for c in report.cautions]
                        + [(n, "note") for n in report.notes]):
        notes.append({"level": level, "message": {"text": text}})
    return notes


def to_sarif(report: Report) -> dict[str, Any]:
    """The report as a SARIF 2.1.0 log (one run)."""
    info = report.info
    rules = _rules(report)
    index = {r.rule_id: i for i, r in enumerate(rules)}
    uri = artifact_uri(info.board_path)
    failing = {id(d) for d in report.failing}
    run: dict[str, Any] = {
        "tool": {"driver": {
            "name": "padaudit", "version": info.tool_version,
            "semanticVersion": info.tool_version,
            "rules": [_descriptor(r) for r in rules],
        }},
        "artifacts": [{"location": {"uri": uri}, "roles": ["analysisTarget"]}],
        "invocations": [{
            "executionSuccessful": not report.rule_errors,
            "toolExecutionNotifications": _notifications(report),
        }],
        "results": [_result(d, index[d.finding.rule_id], uri, id(d) in failing)
                    for d in report.findings],
        "properties": {
            "board_format_version": info.board_version, "profile": info.profile,
            "overlay": info.overlay, "touch_side": info.touch_side, "power": info.power,
            "fail_on": info.fail_on.label,
        },
    }
    return {"$schema": SARIF_SCHEMA_URI, "version": SARIF_VERSION, "runs": [run]}


def render_sarif(report: Report, stream: TextIO) -> None:
    """Write the SARIF log to ``stream`` (canonical JSON, byte-stable)."""
    stream.write(dumps(to_sarif(report)))
