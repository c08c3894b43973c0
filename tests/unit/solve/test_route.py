"""The automatic mode's choice per electrode on the field fixtures
(fixtures/make_field_boards.py; manifest.json names the expected model)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from auditor.audit import AuditOptions, _measured, measuring_selection, resolve_setup
from auditor.read import read_board
from auditor.sensors import find_sensors
from auditor.solve.route import Route, forced, route_for
from auditor.solve.setup import pad_setup_for

FIELD = Path(__file__).resolve().parents[3] / "fixtures" / "field"
MANIFEST = json.loads((FIELD / "manifest.json").read_text(encoding="utf-8"))


def routes_of(board_name: str) -> dict[str, Route]:
    path = FIELD / board_name
    options = AuditOptions(solve=False)
    setup = resolve_setup(path, options)
    board = read_board(path)
    found, _ = find_sensors(board, measuring_selection(setup))
    sensors, _ = _measured(board, found, measuring_selection(setup), setup, options)
    return {s.name: route_for(s, pad_setup_for(s, board, setup.config, setup.thresholds))
            for s in sensors}


@pytest.mark.parametrize("case", sorted(MANIFEST["cases"]))
def test_automatic_mode_routes_as_the_manifest_says(case: str) -> None:
    entry = MANIFEST["cases"][case]
    routes = routes_of(entry["board"])
    assert {name: r.method for name, r in routes.items()} == entry["routes"]
    assert all(r.reason for r in routes.values())


def test_reasons_name_what_the_disk_cannot_hold() -> None:
    assert "between the finger and the electrode" in routes_of("front-pour.kicad_pcb")[
        "TOUCH1"].reason
    assert "uneven shadow" in routes_of("shadow-corner.kicad_pcb")["TOUCH1"].reason
    assert "0.60 mm away" in routes_of("slider.kicad_pcb")["SLIDER_2"].reason


def test_forcing_keeps_the_automatic_reason_in_view() -> None:
    route = Route("precise", "3-D: elongated (4.0:1)")
    assert forced(route, "quick") == Route(
        "quick", "forced (--quick); the automatic mode would use 3-D: elongated (4.0:1)")
    assert forced(Route("quick", "disk model"), "precise").method == "precise"
