"""A bounded, seeded fuzzer (issue 16): a few hundred mutants of real-format
boards, each read to a board or refused with one located BoardFileError, and
a sample audited end to end through the command line (exit 0, 1 or 2, never
3). The longer run is ``bench/bench_fuzz.py``. The contract is the project's
own (bad input: one line, exit 2, never a traceback; common practice for
parsers, e.g. tomli's fuzzing, no source)."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[3]
sys.path.insert(0, str(ROOT))

from auditor.cli.main import main  # noqa: E402
from auditor.errors import BoardFileError  # noqa: E402
from auditor.read import read_board_text  # noqa: E402
from fixtures.mutants import mutants  # noqa: E402

SOURCES = [ROOT / "fixtures" / "formats" / f"v{n}.kicad_pcb" for n in (5, 8, 10)]


@pytest.mark.parametrize("source", SOURCES, ids=lambda p: p.stem)
def test_every_mutant_is_read_or_refused(source: Path) -> None:
    text = source.read_text(encoding="utf-8")
    outcomes = {"read": 0, "refused": 0}
    for k, mutant in enumerate(mutants(text, 100, seed=16)):
        try:
            read_board_text(mutant, "mutant.kicad_pcb")
        except BoardFileError as exc:
            message = str(exc)
            assert message.startswith("mutant.kicad_pcb") and "\n" not in message, (k, message)
            outcomes["refused"] += 1
        else:
            outcomes["read"] += 1
    # the mutants are neither all harmless nor all fatal: the test exercises both paths
    assert outcomes["read"] > 10 and outcomes["refused"] > 10, outcomes


def test_mutants_through_the_command_line(tmp_path: Path,
                                          capsys: pytest.CaptureFixture[str]) -> None:
    text = SOURCES[1].read_text(encoding="utf-8")
    board = tmp_path / "mutant.kicad_pcb"
    for k, mutant in enumerate(mutants(text, 12, seed=1616)):
        board.write_text(mutant, encoding="utf-8", errors="surrogatepass")
        code = main(["audit", str(board), "--no-solve", "--format", "json",
                     "--output", str(tmp_path / "out.json"), "--quiet"])
        err = capsys.readouterr().err
        assert code in (0, 1, 2), (k, err)
        assert code != 2 or err.count("\n") == 1, (k, err)
