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


def test_only_the_chosen_command_is_imported() -> None:
    # Start-up time (common practice, no source): running one command must
    # not import the others' modules; --help and usage errors load them all.
    import subprocess
    import sys

    code = ("import sys; from auditor.cli.main import main; main(['rules']); "
            "print(sorted(m for m in sys.modules if m.startswith('auditor.cli.cmd_')))")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=True)
    assert done.stdout.strip().splitlines()[-1] == "['auditor.cli.cmd_rules']"


def test_options_before_the_command_still_parse(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["--debug", "rules", "ground-gap-tight"]) == 0
    assert "ground-gap-tight" in capsys.readouterr().out


def test_unknown_command_lists_every_command(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as exc:
        main(["no-such-command"])
    assert exc.value.code == EXIT_BAD_INPUT
    err = capsys.readouterr().err
    assert all(name in err for name in ("audit", "demo", "estimate", "rules"))
