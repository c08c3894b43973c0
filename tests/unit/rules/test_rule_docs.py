"""docs/rules.md is generated from the registry and must be current."""

from __future__ import annotations

from pathlib import Path

from auditor.report.rules_md import rules_markdown
from auditor.rules.registry import all_rules

DOC = Path(__file__).resolve().parents[3] / "docs" / "rules.md"


def test_rules_doc_is_current() -> None:
    assert DOC.read_text(encoding="utf-8") == rules_markdown(), (
        "regenerate: python -m auditor.cli.rules_doc > docs/rules.md")


def test_rules_doc_mentions_every_rule() -> None:
    text = rules_markdown()
    assert all(f"## {spec.rule_id}" in text for spec in all_rules())
