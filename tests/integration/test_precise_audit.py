"""``padaudit audit --precise`` end to end on a small generated board.

The board (fixtures/make_rule_boards.py) is one three-segment slider, 12 x 6
mm segments at 6.6 mm pitch, so the run stays short (a few 3-D solves). The
physics of the numbers is checked in tests/unit/solve/test_precise.py
against published values; here the CLI is: every format carries the precise
results, JSON validates against the shipped schema and is byte-identical
across runs, the picture has the slider plot (common practice, no source).
"""

from __future__ import annotations

import dataclasses
import io
import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from auditor.audit import AuditOptions, run_audit
from auditor.cli.main import main
from auditor.decide.records import Report
from auditor.report.render import render
from fixtures.make_rule_boards import Design, board_text

#: Every test here runs 3-D solves (seconds each): not in the quick loop.
pytestmark = pytest.mark.slow

NS = "{http://www.w3.org/2000/svg}"


@pytest.fixture(scope="module")
def slider_run(tmp_path_factory: pytest.TempPathFactory) -> tuple[Path, int, str]:
    folder = tmp_path_factory.mktemp("precise_audit")
    board = folder / "slider.kicad_pcb"
    board.write_text(board_text(Design(buttons=(), slider=(6.0, 6.0, 6.0)), "slider"),
                     encoding="utf-8")
    code = main(["audit", str(board), "--precise", "--format", "json", "--quiet", "--jobs", "1",
                 "--output", str(folder / "first.json"), "--svg", str(folder / "board.svg")])
    return folder, code, (folder / "first.json").read_text(encoding="utf-8")


def test_json_carries_precise_results_and_validates(slider_run: tuple[Path, int, str]) -> None:
    import jsonschema

    from auditor.report.as_json import load_schema

    _folder, code, text = slider_run
    doc = json.loads(text)
    jsonschema.Draft202012Validator(load_schema()).validate(doc)
    assert code == doc["summary"]["exit_code"]
    metrics = [s["metrics"] for s in doc["sensors"]]
    assert all(m["method"] == "precise" for m in metrics)
    # the quick estimate beside each precise result, in the same range
    for m in metrics:
        assert m["quick"]["cp_pad_pf"] == pytest.approx(m["cp_pad_pf"], rel=0.25)
    precise = doc["precise"]
    assert precise["coupling"]["names"] == ["SLIDER_1", "SLIDER_2", "SLIDER_3"]
    xt = precise["coupling"]["crosstalk_pf"]
    assert xt[0][1] == pytest.approx(xt[1][0], rel=1e-5) and xt[0][0] == 0.0
    (scan,) = precise["scans"]
    assert [s["name"] for s in scan["segments"]] == ["SLIDER_1", "SLIDER_2", "SLIDER_3"]
    assert all(len(s["delta_pf"]) == len(scan["positions_mm"]) for s in scan["segments"])
    assert scan["monotonic"] is True and scan["linearity_mm"] < 3.3


@pytest.fixture(scope="module")
def second_report(slider_run: tuple[Path, int, str]) -> Report:
    """The same audit again, through the library (a second, independent
    solve), its 3-D jobs shared with a forked helper process this time."""
    folder, _code, _ = slider_run
    return run_audit(folder / "slider.kicad_pcb", AuditOptions(precise=True, workers=2))


def test_json_is_byte_identical_across_runs(slider_run: tuple[Path, int, str],
                                            second_report: Report) -> None:
    """The same bytes from one process and from two (the jobs are
    independent and each result is kept under its own job)."""
    folder, _code, first = slider_run
    out = io.StringIO()
    render(dataclasses.replace(second_report, info=dataclasses.replace(
        second_report.info, board_path=str(folder / "slider.kicad_pcb"))), "json", out)
    assert out.getvalue() == first


def test_text_and_markdown_show_coupling_and_the_slider(second_report: Report) -> None:
    out = io.StringIO()
    render(second_report, "text", out)
    text = out.getvalue()
    assert "Pad-to-pad coupling (3 pairs" in text
    assert "Slider SLIDER: finger response (3 segments" in text
    assert "3 of 3 solved electrodes precise" in text
    out = io.StringIO()
    render(second_report, "markdown", out)
    assert "| slider/wheel | linearity mm |" in out.getvalue()


def test_picture_has_the_slider_plot(slider_run: tuple[Path, int, str]) -> None:
    folder, _code, _ = slider_run
    root = ET.parse(folder / "board.svg").getroot()
    ids = {g.get("id") for g in root.iter(f"{NS}g")}
    assert {"outline", "electrodes", "legend", "scan-plots"} <= ids
