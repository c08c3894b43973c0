"""Findings about a stretch of sense trace point at that trace in the board
file: the SARIF region and the JSON ``source_line``/``source_column`` open
the offending track (a ``segment`` or ``arc`` of the sense path at the place
the finding marks), not the electrode's pad. Annotations in a code review
then sit on the line to change.

Boards: the invented rule fixtures (fixtures/make_rule_boards.py). What
counts as "the offending track" is the project's own reading of each rule
(common practice for linters: point at the thing to change, no source).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from shapely.geometry import Point

from auditor.cli.main import main
from auditor.model.items import Track
from auditor.read import read_board

FIXTURES = Path(__file__).resolve().parents[2] / "fixtures" / "rules"
#: Rules whose finding is about one stretch of the sense trace.
STRETCH_RULES = ("trace-too-wide", "trace-parallel-run", "trace-near-noisy-net",
                 "trace-crossings", "trace-under-electrode", "trace-too-long")

#: Rules whose finding also sits (x, y) where the other net is closest or crosses.
PLACED_RULES = ("trace-parallel-run", "trace-near-noisy-net", "trace-crossings")


def run(capsys: pytest.CaptureFixture[str], board: Path, fmt: str) -> dict[str, object]:
    main(["audit", str(board), "--no-solve", "--format", fmt, "-q"])
    doc: dict[str, object] = json.loads(capsys.readouterr().out)
    return doc


def tracks_by_place(board: Path) -> dict[tuple[int | None, int | None], Track]:
    return {(t.source_line, t.source_column): t for t in read_board(board).tracks}


@pytest.mark.parametrize("rule_id", STRETCH_RULES)
def test_stretch_findings_open_their_track(capsys: pytest.CaptureFixture[str],
                                           rule_id: str) -> None:
    board = FIXTURES / f"{rule_id}--bad.kicad_pcb"
    findings = [f for f in run(capsys, board, "json")["findings"]  # type: ignore[attr-defined]
                if f["rule_id"] == rule_id]
    sarif = run(capsys, board, "sarif")["runs"][0]["results"]  # type: ignore[index]
    regions = [r["locations"][0]["physicalLocation"]["region"] for r in sarif
               if r["ruleId"] == rule_id]
    assert findings and len(regions) == len(findings)
    tracks = tracks_by_place(board)
    pad_lines = {p.source_line for p in read_board(board).pads}
    for finding, region in zip(findings, regions, strict=True):
        place = (finding["source_line"], finding["source_column"])
        assert (region["startLine"], region.get("startColumn")) == place  # the same numbers
        assert place[0] not in pad_lines
        track = tracks[place]  # KeyError: the line opens no track
        assert track.net in finding["nets"] or rule_id == "trace-too-long"
        if rule_id in PLACED_RULES:
            # the track is the one at the place the finding marks (half a width)
            spot = Point(finding["x_mm"], finding["y_mm"])
            assert track.geometry.distance(spot) <= track.width_mm / 2 + 1e-3, finding


def test_too_wide_points_at_a_wide_track(capsys: pytest.CaptureFixture[str]) -> None:
    board = FIXTURES / "trace-too-wide--bad.kicad_pcb"
    finding = next(f for f in run(capsys, board, "json")["findings"]  # type: ignore[attr-defined]
                   if f["rule_id"] == "trace-too-wide")
    track = tracks_by_place(board)[(finding["source_line"], finding["source_column"])]
    assert track.width_mm > finding["measured"]["max_mm"]
    assert track.width_mm == pytest.approx(finding["measured"]["width_mm"])


def test_electrode_findings_keep_the_pad(capsys: pytest.CaptureFixture[str]) -> None:
    """A finding about the electrode itself still opens its pad."""
    board = FIXTURES / "ground-gap-tight--bad.kicad_pcb"
    finding = next(f for f in run(capsys, board, "json")["findings"]  # type: ignore[attr-defined]
                   if f["rule_id"] == "ground-gap-tight")
    assert finding["source_line"] in {p.source_line for p in read_board(board).pads}
