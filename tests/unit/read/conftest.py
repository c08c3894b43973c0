"""Shared boards for the reader tests: the generated format and zone-fill fixtures."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

from auditor.model.board import Board
from auditor.read import read_board

ROOT = Path(__file__).resolve().parents[3]
FORMATS = ROOT / "fixtures" / "formats"
FILLS = ROOT / "fixtures" / "fills"
sys.path.insert(0, str(ROOT / "fixtures"))

import make_fill_boards as fills_gen  # noqa: E402
import make_format_boards as gen  # noqa: E402

VERSION_KEYS = tuple(gen.VERSIONS)
FILL_KEYS = tuple(fills_gen.VERSIONS)


@pytest.fixture(scope="session")
def boards() -> dict[str, Board]:
    return {key: read_board(FORMATS / f"{key}.kicad_pcb") for key in VERSION_KEYS}
