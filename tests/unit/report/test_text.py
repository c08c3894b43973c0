"""The terminal report (layout checks; common practice, no source)."""

from __future__ import annotations

import io
import re

import pytest
import sample_report as sample

from auditor.report.text import ordered_sensors, ratio_bar, render_text

ESCAPE = re.compile(r"\x1b\[")


def _render(report: object, colour: bool, order: str = "weakest") -> str:
    out = io.StringIO()
    render_text(report, out, colour, order=order, width=100)  # type: ignore[arg-type]
    return out.getvalue()


def test_plain_text_has_no_escape_codes_and_colour_has_some() -> None:
    assert not ESCAPE.search(_render(sample.sample_report(), colour=False))
    assert ESCAPE.search(_render(sample.sample_report(), colour=True))


def test_header_shows_what_was_run() -> None:
    text = _render(sample.sample_report(), False)
    for expected in ("boards/sample_panel.kicad_pcb", "file format 20240108", "default",
                     "2.0 mm acrylic", "touch side", "front", "mains"):
        assert expected in text


def test_every_finding_shows_rule_message_place_and_fix() -> None:
    text = _render(sample.sample_report(), False)
    assert "• SW_MODE: ground gap 0.20 mm is below the 0.50 mm minimum" in text
    assert "at x 124.80 mm, y 114.00 mm · F.Cu · refs E2 · nets GND, TOUCH_MODE" in text
    assert "fix Widen the clearance" in text
    assert "waived: plane needed under the LED" in text
    assert "raised from warning by the" in text
    assert text.index(" ERROR (3)") < text.index(" WARNING (2)") < text.index(" INFO (1)")


def test_stale_entries_read_warnings_cautions_and_result_are_listed() -> None:
    text = _render(sample.sample_report(stale_baseline=("old-rule on SW_X",),
                                        rule_errors=(("ratio-low", "ZeroDivisionError"),)),
                   False)
    assert "CAUTION" in text and "isolation" in text
    assert "no filled polygons" in text
    assert "floating-copper-near on E9" in text
    assert "old-rule on SW_X" in text
    assert "ratio-low: ZeroDivisionError" in text
    assert text.rstrip().endswith("(exit 1)")


def test_clean_report_passes() -> None:
    text = _render(sample.clean_report(), False)
    assert "PASS" in text and "(exit 0)" in text


def test_fix_is_shown_once_per_rule_with_a_count() -> None:
    report = sample.sample_report()
    gap = report.findings[0]
    text = _render(sample.sample_report(findings=(gap, gap, gap)), False)
    assert text.count("fix Widen the clearance") == 1
    assert "ground-gap-tight  ×3" in text
    assert text.count("• SW_MODE: ground gap") == 3


def test_per_rule_counts() -> None:
    text = _render(sample.sample_report(), False)
    counts = text[text.index("Per rule"):]
    assert re.search(r"ground-gap-tight\s+error\s+1\s+1", counts)
    assert re.search(r"copper-under-electrode\s+warning\s+1\s+0", counts)


def test_orders() -> None:
    results = sample.sample_report().sensors
    weakest = [r.sensor.name for r in ordered_sensors(results, "weakest")]
    rank = [r.sensor.name for r in ordered_sensors(results, "rank")]
    assert weakest == ["SW_AUX", "PROX", "SLD_3", "SLD_2", "SLD_1", "SW_MODE", "SW_POWER"]
    assert rank == ["SW_POWER", "SW_MODE", "SLD_1", "SLD_2", "SLD_3", "PROX", "SW_AUX"]
    with pytest.raises(ValueError, match="weakest, rank"):
        ordered_sensors(results, "alphabetical")
    text = _render(sample.sample_report(), False, order="rank")
    assert text.index("SW_POWER ") < text.index("PROX ")


@pytest.mark.parametrize(("ratio", "best", "expected"), [
    (1.0, 1.0, "██████████"), (0.5, 1.0, "█████     "), (0.0, 1.0, " " * 10),
    (0.05, 1.0, "▌         "), (0.0625, 1.0, "▋         "), (2.0, 1.0, "██████████"), (0.3, 0.0, " " * 10),
])
def test_ratio_bar(ratio: float, best: float, expected: str) -> None:
    """U+258C is the left half block, U+258B left five eighths (Unicode block
    elements chart)."""
    assert ratio_bar(ratio, best) == expected


def test_no_sensors_is_said_out_loud() -> None:
    text = _render(sample.sample_report(sensors=()), False)
    assert "no electrodes found" in text


def test_a_partly_read_board_is_never_just_pass() -> None:
    clean = sample.clean_report()
    partial = sample.sample_report(findings=clean.findings, stale_waivers=())
    assert partial.exit_code == 0 and partial.read_warnings
    text = _render(partial, False)
    result = " ".join(text[text.rindex("\nPASS"):].split())
    assert "INCOMPLETE: 1 item(s) skipped or guessed while reading" in result
    empty = _render(sample.sample_report(sensors=(), findings=(), read_warnings=(),
                                         stale_waivers=()), False)
    assert "no electrodes were found" in " ".join(empty[empty.rindex("\nPASS"):].split())
