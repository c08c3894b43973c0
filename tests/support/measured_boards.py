"""A generated rule board written, read and measured as the audit does,
for the solve-stage tests that need real sensor records."""

from __future__ import annotations

from pathlib import Path

from auditor.audit import AuditOptions, measuring_selection, resolve_setup
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
