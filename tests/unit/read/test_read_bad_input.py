"""Bad input: always one located BoardFileError, never another exception,
never a write to the board."""

from __future__ import annotations

import os
from pathlib import Path

import pytest
from conftest import FORMATS
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from auditor.errors import BoardFileError
from auditor.read import read_board, read_board_text

V8 = (FORMATS / "v8.kicad_pcb").read_text(encoding="utf-8")
V5 = (FORMATS / "v5.kicad_pcb").read_text(encoding="utf-8")


def _error(text: str) -> BoardFileError:
    with pytest.raises(BoardFileError) as info:
        read_board_text(text, "bad.kicad_pcb")
    return info.value


def test_missing_file_and_directory(tmp_path: Path) -> None:
    with pytest.raises(BoardFileError, match="no such file"):
        read_board(tmp_path / "absent.kicad_pcb")
    with pytest.raises(BoardFileError, match="is a directory"):
        read_board(tmp_path)


def test_wrong_encoding_and_binary(tmp_path: Path) -> None:
    latin = tmp_path / "latin1.kicad_pcb"
    latin.write_bytes('(kicad_pcb (version 4)\n (title_block (comment 1 "Größe")))'
                      .encode("latin-1"))
    with pytest.raises(BoardFileError) as info:
        read_board(latin)
    assert "not UTF-8" in info.value.message and info.value.line == 2
    junk = tmp_path / "junk.kicad_pcb"
    junk.write_bytes(bytes(range(256)) * 4)
    with pytest.raises(BoardFileError):
        read_board(junk)
    utf16 = tmp_path / "utf16.kicad_pcb"
    utf16.write_bytes(V8[:200].encode("utf-16"))
    with pytest.raises(BoardFileError):
        read_board(utf16)


def test_not_a_board() -> None:
    err = _error("(kicad_sch (version 20231120))")
    assert "not a KiCad board" in err.message and (err.line, err.column) == (1, 1)


def test_truncated_board() -> None:
    err = _error(V8[: len(V8) // 2])
    assert "truncated" in err.message


@pytest.mark.parametrize(("needle", "replacement", "fragment"), [
    ("(at 20 20)", "(at 20 nan)", "out of range"),
    ("(at 20 20)", "(at 20 inf)", "out of range"),
    ("(at 20 20)", "(at 20 1e300)", "out of range"),
    ("(at 20 20)", "(at 20 twenty)", "expected a number"),
    ("(at 20 20)", "(at 20)", "missing a number"),
    ("(version 20240108)", "(version 2024x)", "format version"),
])
def test_bad_numbers_are_located(needle: str, replacement: str, fragment: str) -> None:
    assert needle in V8
    err = _error(V8.replace(needle, replacement, 1))
    assert fragment in err.message
    line = V8[: V8.index(needle)].count("\n") + 1
    column = V8.index(needle) - V8.rfind("\n", 0, V8.index(needle))
    assert (err.line, err.column) == (line, column)


def test_deep_nesting_in_a_board() -> None:
    text = V8.replace("(paper", "(x " + "(" * 1_000_000 + ")" * 1_000_000 + ") (paper", 1)
    err = _error(text)
    assert "nesting deeper" in err.message


def test_reader_never_writes(tmp_path: Path) -> None:
    board = tmp_path / "b.kicad_pcb"
    board.write_text(V8, encoding="utf-8")
    os.chmod(board, 0o444)
    before = board.stat().st_mtime_ns
    read_board(board)
    assert board.stat().st_mtime_ns == before and board.read_text(encoding="utf-8") == V8


_TOKEN_CHARS = st.sampled_from(["(", ")", '"', " ", "x", "-1", "1e9", "nan", "\\", "\n",
                                "(at)", "(layer)", "(net 99)", "(pts)", "(xy 1)", "é"])


@st.composite
def mutated(draw: st.DrawFn) -> str:
    base = draw(st.sampled_from([V8, V5]))
    edits = draw(st.lists(st.tuples(st.integers(0, len(base) - 1), st.integers(0, 12),
                                    _TOKEN_CHARS), min_size=1, max_size=4))
    text = base
    for at, cut, insert in edits:
        at = min(at, len(text))
        text = text[:at] + insert + text[at + cut:]
    return text


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated())
def test_mutated_boards_read_or_fail_cleanly(text: str) -> None:
    """Property (hypothesis): any edit of a valid board either reads or raises
    the tool's own error with the file name."""
    try:
        read_board_text(text, "m.kicad_pcb")
    except BoardFileError as exc:
        assert str(exc).startswith("m.kicad_pcb")
