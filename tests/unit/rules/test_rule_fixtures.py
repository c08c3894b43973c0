"""Every rule against generated boards (fixtures/make_rule_boards.py): the
board that should trigger it does, its clean twin does not.

The boards are small invented layouts written with fixtures/kicad_writer.py;
fixtures/rules/manifest.json lists, per board, the rule ids it must and must
not produce under the default profile (limits: rules/default.toml, physics.md
§4.1, common practice, no source).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.audit import AuditOptions, run_audit

#: The layout rules are under test here, not the solver (tested in tests/unit/field).
LAYOUT_ONLY = AuditOptions(solve=False)

FIXTURES = Path(__file__).resolve().parents[3] / "fixtures" / "rules"
MANIFEST = json.loads((FIXTURES / "manifest.json").read_text(encoding="utf-8"))


@pytest.mark.slow
@pytest.mark.parametrize("name", sorted(MANIFEST["cases"]))
def test_fixture_board_gives_expected_rules(name: str) -> None:
    case = MANIFEST["cases"][name]
    report = run_audit(FIXTURES / case["board"], LAYOUT_ONLY)
    found = {d.finding.rule_id for d in report.findings}
    assert not report.rule_errors
    assert set(case["expect"]) <= found, f"missing {set(case['expect']) - found}"
    assert not set(case["absent"]) & found, f"unexpected {set(case['absent']) & found}"


@pytest.mark.slow
def test_generator_output_still_behaves_as_committed(tmp_path: Path) -> None:
    """Fresh output of the generator (the writer's zone filling may change the
    bytes) gives the manifest's result too, so the committed boards are not
    the only thing keeping the test green."""
    from fixtures.make_rule_boards import cases, write_case

    pick = {c.name: c for c in cases()}
    for name in ("copper-under-electrode--bad", "read-incomplete--bad"):
        report = run_audit(write_case(pick[name], tmp_path), LAYOUT_ONLY)
        found = {d.finding.rule_id for d in report.findings}
        assert set(MANIFEST["cases"][name]["expect"]) <= found


def test_manifest_matches_the_generator() -> None:
    from fixtures.make_rule_boards import cases, manifest

    assert json.loads(json.dumps(manifest(cases()))) == MANIFEST


def test_fixture_folder_has_its_own_configuration() -> None:
    from auditor.config import find_config
    from fixtures.make_rule_boards import HERMETIC_CONFIG

    assert find_config(FIXTURES / "electrode-paste--bad.kicad_pcb") == FIXTURES / "padaudit.toml"
    assert (FIXTURES / "padaudit.toml").read_text(encoding="utf-8") == HERMETIC_CONFIG
