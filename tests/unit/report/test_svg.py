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
    assert places[0].caption() == "SW_MODE: ground-gap-tight\u00a0×2, noisy-part-near"
    root = ET.fromstring(to_svg(dataclasses.replace(report, findings=(gap, same_place))))
    assert len(list(root.iter(f"{NS}circle"))) == 1
    assert [t for _, t in legend_lines(places)][-1] == "–  board: noisy-part-near"
    many = spots(tuple(dataclasses.replace(gap, finding=dataclasses.replace(
        gap.finding, x_mm=float(i))) for i in range(40)))
    assert legend_lines(many)[-1][1].startswith("… and 10 more places")


def test_verdict_is_in_the_title_and_the_legend() -> None:
    root = ET.fromstring(to_svg(sample.sample_report(with_board=True)))
    title = root.find(f"{NS}title")
    assert title is not None and "FAIL: 3 findings at or above error" in (title.text or "")
    texts = [t.text for t in root.iter(f"{NS}text")]
    assert "FAIL: 3 findings at or above error" in texts
    clean = ET.fromstring(to_svg(sample.clean_report()))
    assert "PASS: nothing at or above error" in [t.text for t in clean.iter(f"{NS}text")]


def test_coordinates_have_at_most_two_decimals() -> None:
    import re

    text = to_svg(sample.precise_report(with_board=True))
    assert not re.search(r"\d\.\d{3}", text)


def test_legend_is_whole_and_inside_the_picture() -> None:
    from auditor.report.svg_labels import EM_WIDTH

    root = ET.fromstring(to_svg(sample.sample_report(with_board=True)))
    vx, _, vw, _ = (float(v) for v in (root.get("viewBox") or "").split())
    legend = next(g for g in root.iter(f"{NS}g") if g.get("id") == "legend")
    for t in legend.iter(f"{NS}text"):
        assert "…" not in (t.text or "")
        if t.get("text-anchor") != "end":
            right = float(t.get("x") or 0) + len(t.text or "") * EM_WIDTH * float(
                t.get("font-size") or 0)
            assert right <= vx + vw, t.text


def test_labels_clear_of_markers_and_of_each_other() -> None:
    """Two pads side by side with markers at their centres: the greedy
    placement puts no label box over a marker or over another label."""
    from shapely.geometry import box

    from auditor.report.svg_labels import Label, place_labels

    pads = [box(0, 0, 6, 6), box(6.5, 0, 12.5, 6)]
    markers = [(2, 2, 4, 4), (8.5, 2, 10.5, 4)]
    labels = [Label(("SLIDER_LEFT", "9.89 %"), pads[0], 1.5),
              Label(("SLIDER_RIGHT", "10.67 %"), pads[1], 1.5)]
    placed = place_labels(labels, markers, 1.0, (-20, -20, 40, 40))

    def overlap(a: tuple[float, ...], b: tuple[float, ...]) -> bool:
        return min(a[2], b[2]) > max(a[0], b[0]) and min(a[3], b[3]) > max(a[1], b[1])

    boxes = [p.box for p in placed]
    assert not overlap(boxes[0], boxes[1])
    assert not any(overlap(b, m) for b in boxes for m in markers)


def test_focus_draws_the_copper_at_fault() -> None:
    """A finding naming another net gets that net's copper near its point,
    outlined and dashed, and the sense trace in the severity's colour."""
    root = ET.fromstring(to_svg(sample.sample_report(with_board=True)))
    focus = next((g for g in root.iter(f"{NS}g") if g.get("id") == "focus"), None)
    assert focus is not None
    paths = list(focus.iter(f"{NS}path"))
    assert any(p.get("stroke-dasharray") for p in paths), "no other net drawn"
