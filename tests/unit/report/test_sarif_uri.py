"""SARIF artifact URIs are percent-encoded (issue 16): checked against the
official OASIS SARIF 2.1.0 schema (tests/data) *with format checking*, so the
schema's ``uri`` / ``uri-reference`` formats are enforced (RFC 3986, through
jsonschema's FormatChecker and the rfc3986-validator package)."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema
import pytest
import sample_report as sample

from auditor.report.sarif import artifact_uri, to_sarif

SCHEMA = json.loads((Path(__file__).resolve().parents[2] / "data" /
                     "sarif-schema-2.1.0.json").read_text(encoding="utf-8"))
#: Every format jsonschema knows, not only draft 4's: the schema is draft 4 but
#: uses uri-reference (a later draft's name), which must be checked too.
CHECKER = jsonschema.FormatChecker()


def _validate(doc: object) -> None:
    jsonschema.Draft4Validator(SCHEMA, format_checker=CHECKER).validate(doc)


def test_the_format_check_is_active() -> None:
    """Without a uri-reference checker (rfc3986-validator missing) the
    checks below would pass vacuously."""
    assert "uri-reference" in CHECKER.checkers
    assert not CHECKER.conforms("hw/my board#2.kicad_pcb", "uri-reference")


@pytest.mark.parametrize("name", ["my board.kicad_pcb", "rev#2.kicad_pcb", "100%.kicad_pcb",
                                  "plan [A]/pcb.kicad_pcb", "ünïcode.kicad_pcb"])
def test_board_paths_become_valid_uri_references(name: str, tmp_path: Path,
                                                 monkeypatch: pytest.MonkeyPatch) -> None:
    for path in (name, str(tmp_path / "outside" / name)):
        monkeypatch.chdir(tmp_path)
        report = sample.sample_report(info=sample.sample_info(board_path=path))
        _validate(to_sarif(report))


def test_encoding_round_trips() -> None:
    from urllib.parse import unquote

    assert artifact_uri("hw/a b#%.kicad_pcb") == "hw/a%20b%23%25.kicad_pcb"
    assert unquote(artifact_uri("hw/a b#%.kicad_pcb")) == "hw/a b#%.kicad_pcb"
