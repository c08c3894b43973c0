"""The pin and parts lines under the terminal's electrode table (layout
checks, common practice, no source; the sample report is invented)."""

from __future__ import annotations

import dataclasses
import io

import sample_report as sample

from auditor.model.results import LumpedPart
from auditor.report.text import render_text

PARTS = (LumpedPart("C11", "22pF", 22.0, "to-ground", "GND"),
         LumpedPart("C12", "10n", 1e4, "between-pins", "SNS_B"),
         LumpedPart("R11", "560", None, "series-resistor"))


def _with_parts() -> object:
    report = sample.sample_report()
    results = []
    for r in report.sensors:
        m = r.metrics
        if m is not None:
            parts = PARTS if r.sensor.name == "SW_POWER" else ()
            extra = 22.0 if parts else 0.0
            m = dataclasses.replace(m, cp_pin_pf=5.0, cp_parts_pf=extra, parts=parts,
                                    cp_total_pf=m.cp_total_pf + 5.0 + extra)
        results.append(dataclasses.replace(r, metrics=m))
    return dataclasses.replace(report, sensors=tuple(results))


def _render(report: object, width: int) -> list[str]:
    out = io.StringIO()
    render_text(report, out, False, width=width)  # type: ignore[arg-type]
    return out.getvalue().splitlines()


def test_pin_and_parts_lines_within_80_columns() -> None:
    lines = _render(_with_parts(), 80)
    pin = [line for line in lines if "controller pin (5 pF, pin_pf)" in line]
    assert len(pin) == 1 and "parts below" in pin[0]
    (row,) = [line for line in lines if line.lstrip().startswith("SW_POWER +22.00 pF")]
    assert "C11 22pF to GND" in row
    block = "\n".join(lines)
    assert "C12 10n to SNS_B, a controller pin: not added" in " ".join(block.split())
    assert "R11" not in block  # resistors stay in the JSON notes
    start = lines.index(pin[0])
    assert all(len(line) <= 80 for line in lines[start:start + 4])


def test_nothing_added_when_no_pin_or_parts_are_counted() -> None:
    lines = _render(sample.sample_report(), 100)
    assert not any("pin_pf" in line for line in lines)
