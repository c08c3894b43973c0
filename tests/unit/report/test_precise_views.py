"""Precise-mode extras in every view: text blocks, JSON, Markdown, SVG plot.

The data are the invented sample in tests/support/sample_report.py; these
checks are about layout and faithfulness to the records (common practice, no
source), not physics.
"""

from __future__ import annotations

import dataclasses
import io
import json
import math
import xml.etree.ElementTree as ET

import sample_report as sample

from auditor.model.results import PadMetrics, PreciseExtras
from auditor.report.as_json import dumps, to_document
from auditor.report.markdown import render_markdown
from auditor.report.svg import to_svg
from auditor.report.text import render_text
from auditor.report.text_precise import MAX_PAIRS, binned, sparkline, strongest_pairs

NS = "{http://www.w3.org/2000/svg}"


def _text(report: object) -> str:
    out = io.StringIO()
    render_text(report, out, False, width=100)  # type: ignore[arg-type]
    return out.getvalue()


def test_sparkline_scales_to_the_top_value() -> None:
    assert sparkline([0.0, 0.5, 1.0, 2.0, -1.0], 1.0) == "▁▅██▁"
    assert sparkline([0.3, 0.3], 0.0) == "▁▁"


def test_bins_cover_every_position_once() -> None:
    for count in (1, 7, 60, 61, 200):
        bins = binned(count)
        assert len(bins) == min(count, 60)
        assert [n for b in bins for n in b] == list(range(count))


def test_coupling_table_is_capped_and_sorted_by_share() -> None:
    extras = sample.sample_extras()
    pairs = strongest_pairs(extras)
    assert len(pairs) == 15
    shares = [p.worst_fraction for p in pairs]
    assert shares == sorted(shares, reverse=True)
    text = _text(sample.precise_report())
    assert f"… {15 - MAX_PAIRS} more pairs" in text
    listed = [line for line in text.splitlines() if " – " in line and "%" in line]
    assert len(listed) == MAX_PAIRS
    assert listed[0].startswith("SLD_1 – SLD_2") and "9.20 %" in listed[0]


def test_slider_block_shows_linearity_dead_zone_and_reversal() -> None:
    text = _text(sample.precise_report())
    assert "linearity (worst position error) 2.85 mm" in text
    assert "dead zones 18.0–21.0 mm" in text and "reversals 12.0 mm" in text
    marks = next(line for line in text.splitlines() if line.startswith("  marks"))
    # positions 0..27 mm in 3 mm steps: reversal at index 4, dead zone 18-21 at 6 and 7
    assert marks.split()[1] == "····!·××··"
    assert "SLD_1  ▄▇█" in text


def test_method_table_gives_the_quick_estimate_and_the_change() -> None:
    text = _text(sample.precise_report())
    row = next(line for line in text.splitlines() if line.startswith("SW_POWER precise"))
    # 10.10 pF precise against 8.0 + 1.9 pF quick: +2.0 %; 0.62 against 0.60 pF: +3.3 %
    assert row.split() == ["SW_POWER", "precise", "10.10", "9.90", "+2.0", "%", "0.620",
                           "0.600", "+3.3", "%"]
    quick_text = _text(sample.sample_report())
    assert "Solve method" not in quick_text and "Pad-to-pad" not in quick_text


def test_a_precise_result_without_its_quick_estimate_says_why() -> None:
    """Text and JSON say the estimate was not computed, and show no number for it."""
    reason = "not computed, the automatic mode sent the pair to 3-D"
    report = sample.precise_report()
    sensors = tuple(dataclasses.replace(r, metrics=dataclasses.replace(
        r.metrics, quick_cp_pad_pf=None, quick_cp_total_pf=None, quick_delta_c_pf=None,
        quick_missing=reason)) if r.sensor.name == "SW_POWER" and r.metrics else r
        for r in report.sensors)
    report = dataclasses.replace(report, sensors=sensors)
    text = " ".join(_text(report).split())
    assert f"SW_POWER: quick estimate {reason}" in text
    assert "SW_POWER precise 10.10 0.620" in text
    metrics = {s["name"]: s["metrics"] for s in json.loads(dumps(to_document(report)))["sensors"]}
    assert "quick" not in metrics["SW_POWER"]
    assert metrics["SW_POWER"]["quick_missing"] == reason
    assert "quick_missing" not in metrics["PROX"]


def test_quick_difference_of_metrics() -> None:
    m = PadMetrics(1.0, 0.5, 1.5, 0.2, 0.2 / 1.5, "precise", (), 1.1, 1.6, 0.25)
    cp_change, delta_change = m.quick_difference or (0.0, 0.0)
    assert math.isclose(cp_change, 1.5 / 1.6 - 1) and math.isclose(delta_change, -0.2)
    assert PadMetrics(1.0, 0.5, 1.5, 0.2, 0.13).quick_difference is None


def test_json_precise_block_is_faithful_and_deterministic() -> None:
    report = sample.precise_report()
    first, second = dumps(to_document(report)), dumps(to_document(sample.precise_report()))
    assert first == second
    doc = json.loads(first)["precise"]
    table = sample.sample_coupling()
    assert doc["coupling"]["names"] == list(table.names)
    assert doc["coupling"]["crosstalk_pf"][1][2] == table.crosstalk_pf[1][2] == 0.46
    assert doc["coupling"]["fraction_of_cp"][1][2] == round(0.46 / 5.1, 7)
    (scan,) = doc["scans"]
    assert [s["name"] for s in scan["segments"]] == ["SLD_1", "SLD_2", "SLD_3"]
    assert scan["segments"][1]["delta_pf"][4] == 0.16
    assert scan["estimated_mm"][6] is None  # NaN in the dead zone
    assert scan["dead_zones_mm"] == [[18.0, 21.0]] and scan["monotonic"] is False
    sensors = {s["name"]: s for s in json.loads(first)["sensors"]}
    assert sensors["SW_POWER"]["metrics"]["quick"] == {"cp_pad_pf": 8.0, "cp_total_pf": 9.9,
                                                       "delta_c_pf": 0.6}
    assert "quick" not in sensors["PROX"]["metrics"]


def test_json_without_coupling_gives_null() -> None:
    extras = PreciseExtras(None, (), ("note",))
    doc = to_document(sample.sample_report(precise=extras))
    assert doc["precise"] == {"coupling": None, "scans": [], "notes": ["note"]}


def test_markdown_summary_names_linearity_and_strongest_pairs() -> None:
    out = io.StringIO()
    render_markdown(sample.precise_report(), out)
    text = out.getvalue()
    assert "| SLD (slider) | 2.85 | 18.0–21.0 mm | 12.0 mm |" in text
    assert "`SLD_1`–`SLD_2` 0.460 pF" in text
    assert "largest ΔC change against the quick estimate +6.2 % (SLD_2)" in text


def test_svg_has_one_plot_with_a_polyline_per_segment() -> None:
    root = ET.fromstring(to_svg(sample.precise_report(with_board=True)))
    (plots,) = [g for g in root.iter(f"{NS}g") if g.get("id") == "scan-plots"]
    (plot,) = [g for g in plots.iter(f"{NS}g") if g.get("class") == "scan"]
    lines = [p for p in plot.iter(f"{NS}polyline") if p.get("fill") == "none"
             and p.get("stroke") != "#333333"]
    assert len(lines) == 3
    assert all(len(p.get("points", "").split()) == 10 for p in lines)
    texts = [t.text for t in plot.iter(f"{NS}text")]
    assert "finger position along the path (mm)" in texts and "ΔC (pF)" in texts
    assert len([r for r in plot.iter(f"{NS}rect") if r.get("fill") == "#e0e0e0"]) == 1


def test_svg_without_precise_has_no_plot_and_same_height() -> None:
    plain = to_svg(sample.sample_report(with_board=True))
    assert "scan-plots" not in plain
    no_scans = dataclasses.replace(sample.sample_report(with_board=True),
                                   precise=PreciseExtras(sample.sample_coupling()))
    assert to_svg(no_scans) == plain
