"""The SVG picture: well-formed, has every layer of the drawing, stable.
Viridis end colours #440154 / #fde725 are matplotlib's published values."""

from __future__ import annotations

import dataclasses
import xml.etree.ElementTree as ET
from pathlib import Path

import sample_report as sample

from auditor.report.svg import sensitivity_colour, to_svg, write_svg

NS = "{http://www.w3.org/2000/svg}"


def test_picture_with_board_has_every_group(tmp_path: Path) -> None:
    path = tmp_path / "board.svg"
    write_svg(sample.sample_report(with_board=True), path)
    root = ET.parse(path).getroot()
    groups = {g.get("id") for g in root.iter(f"{NS}g")}
    assert {"copper", "outline", "electrodes", "ground-gaps", "labels", "findings",
            "legend"} <= groups
    texts = [t.text for t in root.iter(f"{NS}text")]
    assert "SW_POWER" in texts and "6.14 %" in texts and "unsolved" in texts
    assert "1  SW_MODE: ground-gap-tight" in texts
    markers = [c for c in root.iter(f"{NS}circle")]
    assert len(markers) == 6


def test_picture_without_board_still_draws_electrodes() -> None:
    root = ET.fromstring(to_svg(sample.sample_report()))
    groups = {g.get("id") for g in root.iter(f"{NS}g")}
    assert "electrodes" in groups and "copper" not in groups


def test_picture_is_deterministic() -> None:
    assert to_svg(sample.sample_report(with_board=True)) == to_svg(
        sample.sample_report(with_board=True))


def test_sensitivity_colours() -> None:
    assert sensitivity_colour(0.0) == "#440154"
    assert sensitivity_colour(1.0) == "#fde725"
    assert sensitivity_colour(0.5) == "#21918c"
    assert sensitivity_colour(-3) == "#440154" and sensitivity_colour(7) == "#fde725"


def test_findings_at_one_place_share_one_marker() -> None:
    from auditor.report.svg_marks import legend_lines, spots

    report = sample.sample_report()
    gap, noisy = report.findings[0], report.findings[1]
    same_place = dataclasses.replace(noisy, finding=dataclasses.replace(
        noisy.finding, x_mm=gap.finding.x_mm, y_mm=gap.finding.y_mm, sensor="SW_MODE"))
    unplaced = dataclasses.replace(noisy, finding=dataclasses.replace(
        noisy.finding, x_mm=None, y_mm=None, sensor=""))
    places = spots((gap, same_place, gap, unplaced))
    assert [(s.number, len(s.findings)) for s in places] == [(1, 3), (0, 1)]
    assert places[0].caption() == "SW_MODE: ground-gap-tight ×2, noisy-part-near"
    root = ET.fromstring(to_svg(dataclasses.replace(report, findings=(gap, same_place))))
    assert len(list(root.iter(f"{NS}circle"))) == 1
    assert [t for _, t in legend_lines(places)][-1] == "–  board: noisy-part-near"
    many = spots(tuple(dataclasses.replace(gap, finding=dataclasses.replace(
        gap.finding, x_mm=float(i))) for i in range(40)))
    assert legend_lines(many)[-1][1].startswith("… and 10 more places")
