"""Shared boards for the reader tests: the generated format fixtures."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

from auditor.model.board import Board
from auditor.read import read_board

ROOT = Path(__file__).resolve().parents[3]
FORMATS = ROOT / "fixtures" / "formats"
sys.path.insert(0, str(ROOT / "fixtures"))

import make_format_boards as gen  # noqa: E402

VERSION_KEYS = tuple(gen.VERSIONS)


@pytest.fixture(scope="session")
def boards() -> dict[str, Board]:
    return {key: read_board(FORMATS / f"{key}.kicad_pcb") for key in VERSION_KEYS}
