"""The exit-code contract of the entry point (common practice, no source:
0 clean / 1 findings / 2 bad input / 3 internal, as documented in README)."""

from __future__ import annotations

import pytest

from auditor.cli.main import EXIT_BAD_INPUT, main


def test_no_command_is_usage_error(capsys: pytest.CaptureFixture[str]) -> None:
    assert main([]) == EXIT_BAD_INPUT


def test_unknown_option_is_one_line_exit_2(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as exc:
        main(["--no-such-option"])
    assert exc.value.code == EXIT_BAD_INPUT
    err = capsys.readouterr().err
    assert err.startswith("padaudit: ")
    assert err.count("\n") == 1
