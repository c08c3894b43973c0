"""Plain listings wrapped at words to the terminal (issue 14: nothing cut at
80 columns; common practice, no source)."""

from __future__ import annotations

import io

import pytest

from auditor.cli.wrap import hanging_indent, wrap_line, write_lines
from auditor.config.profiles import load_profile
from auditor.report.rules_md import rule_text
from auditor.rules.registry import all_rules


def _catalogue() -> list[str]:
    specs = all_rules()
    width = max(len(s.rule_id) for s in specs)
    return [f"{s.rule_id:<{width}}  {s.severity.label:<7}  {s.title}" for s in specs]


@pytest.mark.parametrize("width", [80, 100, 160])
def test_every_word_kept_and_every_line_fits(width: int) -> None:
    spec = next(s for s in all_rules() if s.rule_id == "trace-near-noisy-net")
    lines = _catalogue() + rule_text(spec, load_profile("default")).splitlines()
    out = io.StringIO()
    write_lines(out, lines, width)
    assert out.getvalue().split() == "\n".join(lines).split()  # no word cut or lost
    assert all(len(line) <= width for line in out.getvalue().splitlines())


def test_continuation_sits_under_the_title_column() -> None:
    line = "segments-unequal-trace   warning  Slider or wheel segment traces differ in length"
    first, second = wrap_line(line, 72)
    assert second.startswith(" " * 34) and second.strip() == "in length"
    assert first.endswith("traces differ")
    assert hanging_indent("  - a model note", 80) == 4


def test_a_file_gets_the_lines_unchanged() -> None:
    out = io.StringIO()
    long_line = "word " * 40
    write_lines(out, [long_line])
    assert out.getvalue() == long_line + "\n"
