"""The terminal report at 80, 100 and 160 columns: golden files, and every
line within the width with no number or name cut (rich marks a cut with
"…"; the report itself never writes one in a table).

The fitting order (bar first, then short headers, then one block per
electrode) is the project's own choice (issue 14); common practice, no
source. Regenerate the goldens with ``PADAUDIT_UPDATE_GOLDEN=1``.
"""

from __future__ import annotations

import dataclasses
import io
import os
import re
import sys
from pathlib import Path

import pytest
from rich.cells import cell_len

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "support"))
import sample_report as sample  # noqa: E402

from auditor import __version__  # noqa: E402
from auditor.decide.diff import compare_reports  # noqa: E402
from auditor.decide.records import Report  # noqa: E402
from auditor.model.results import PadMetrics  # noqa: E402
from auditor.report.diff_render import render_diff_text  # noqa: E402
from auditor.report.text import render_text  # noqa: E402

GOLDEN = Path(__file__).resolve().parents[1] / "golden"
WIDTHS = (80, 100, 160)


def _check(name: str, text: str) -> None:
    path = GOLDEN / name
    text = text.replace(__version__, "@VERSION@")
    if os.environ.get("PADAUDIT_UPDATE_GOLDEN") == "1":
        path.write_text(text, encoding="utf-8")
    assert path.is_file(), f"{path} missing: run with PADAUDIT_UPDATE_GOLDEN=1"
    assert text == path.read_text(encoding="utf-8")


def _fits(text: str, width: int) -> None:
    for line in text.splitlines():
        assert cell_len(line) <= width, line
    assert "…" not in text.replace("… and", "").replace("  … ", "")


def _table_numbers(text: str) -> set[str]:
    """Every number in the electrode section (table or blocks)."""
    section = text.split("Electrodes", 1)[1].split("\n\n", 1)[0]
    return set(re.findall(r"\d+\.\d+", section))


def _text(report: Report, width: int) -> str:
    out = io.StringIO()
    render_text(report, out, False, width=width)
    return out.getvalue()


@pytest.mark.parametrize("width", WIDTHS)
def test_audit_text_at_width(width: int) -> None:
    text = _text(sample.sample_report(), width)
    _fits(text, width)
    _check("sample.txt" if width == 100 else f"sample.{width}.txt", text)


@pytest.mark.parametrize("width", WIDTHS)
def test_precise_text_at_width(width: int) -> None:
    text = _text(sample.precise_report(), width)
    _fits(text, width)
    _check("precise.txt" if width == 100 else f"precise.{width}.txt", text)


def test_no_number_lost_when_narrow() -> None:
    wide = _table_numbers(_text(sample.sample_report(), 160))
    for width in (100, 80, 60):
        assert _table_numbers(_text(sample.sample_report(), width)) == wide, width


def test_bar_goes_first_then_headers_then_blocks() -> None:
    assert "█" in _text(sample.sample_report(), 160)
    at_100 = _text(sample.sample_report(), 100)
    assert "█" not in at_100 and "Cp total" in at_100
    at_80 = _text(sample.sample_report(), 80)
    assert "Cp total" not in at_80.split("Findings")[0] and " trace " in at_80
    at_60 = _text(sample.sample_report(), 60)
    _fits(at_60, 60)
    assert "\nSW_POWER  E1  button\n" in at_60 and "verdict waived" in at_60


def _diff() -> tuple[Report, Report]:
    old = sample.sample_report()
    # SLD_3 loses a third of its ratio; SW_MODE gains a little.
    changes = {"SLD_3": PadMetrics(5.2, 5.9, 11.1, 0.09, 0.09 / 11.1),
               "SW_MODE": PadMetrics(7.9, 3.1, 11.0, 0.43, 0.43 / 11.0)}
    sensors = tuple(dataclasses.replace(r, metrics=changes.get(r.sensor.name, r.metrics))
                    for r in old.sensors)
    return old, dataclasses.replace(old, sensors=sensors)


@pytest.mark.parametrize("width", WIDTHS)
def test_diff_text_at_width(width: int) -> None:
    old, new = _diff()
    out = io.StringIO()
    render_diff_text(compare_reports(old, new), out, False, width=width)
    _fits(out.getvalue(), width)
    assert "11.10" in out.getvalue() and "0.090" in out.getvalue()
    _check(f"diff.{width}.txt", out.getvalue())
