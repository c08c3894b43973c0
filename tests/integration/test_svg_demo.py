"""The demo's picture end to end: small, marks where the user must act.

Size goal (issue 14): under 300 KB (it was 1.15 MB with shapely's own SVG at
16 digits); common practice, no source. The demo's planted problems are listed
in fixtures/demo/planted.json (invented scenario).
"""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from auditor.cli.main import main
from auditor.report.svg_marks import SEVERITY_COLOURS
from auditor.rules.finding import Severity

NS = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def demo_svg(tmp_path_factory: pytest.TempPathFactory) -> Path:
    folder = tmp_path_factory.mktemp("svg")
    svg = folder / "demo.svg"
    code = main(["demo", "--svg", str(svg), "--format", "json",
                 "--output", str(folder / "demo.json"), "-q"])
    assert code == 0
    return svg


def test_demo_picture_is_under_300_kb(demo_svg: Path) -> None:
    assert demo_svg.stat().st_size < 300_000


def test_demo_picture_marks_the_trace_and_the_gap(demo_svg: Path) -> None:
    root = ET.parse(demo_svg).getroot()
    focus = next(g for g in root.iter(f"{NS}g") if g.get("id") == "focus")
    colours = [p.get("fill") for p in focus.iter(f"{NS}path")]
    # BTN3's trace beside the noisy LED nets (error) and BTN5's tight gap (warning).
    assert SEVERITY_COLOURS[Severity.ERROR] in colours
    assert SEVERITY_COLOURS[Severity.WARNING] in colours
    assert any(p.get("stroke-dasharray") for p in focus.iter(f"{NS}path"))
    title = root.find(f"{NS}title")
    assert title is not None and "FAIL: 2 findings at or above error" in (title.text or "")
