"""Boards read and measured as the audit does (a generated rule board, or
any board file), for the solve-stage tests that need real sensor records."""

from __future__ import annotations

from pathlib import Path

from auditor.audit import AuditOptions, _measured, measuring_selection, resolve_setup
from auditor.read import read_board
from auditor.sensors import find_sensors, measure
from fixtures.make_rule_boards import Design, board_text


def measured(folder: Path, name: str, design: Design):  # type: ignore[no-untyped-def]
    """``(board, sensors sorted by name, config)`` for ``design`` written to ``folder``."""
    path = folder / f"{name}.kicad_pcb"
    path.write_text(board_text(design, name), encoding="utf-8")
    board = read_board(path)
    setup = resolve_setup(path, AuditOptions())
    selection = measuring_selection(setup)
    sensors = tuple(sorted(measure(board, find_sensors(board, selection)[0], selection),
                           key=lambda s: s.name))
    return board, sensors, setup.config


def measured_file(path: Path):  # type: ignore[no-untyped-def]
    """``(board, sensors, setup)`` of a board file, measured as an audit
    without the field step measures it (the field-model tests' starting point)."""
    options = AuditOptions(solve=False)
    setup = resolve_setup(path, options)
    board = read_board(path)
    found, _ = find_sensors(board, measuring_selection(setup))
    sensors, _ = _measured(board, found, measuring_selection(setup), setup, options)
    return board, sensors, setup
