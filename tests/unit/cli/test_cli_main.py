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
    # not import the others' modules; --help and usage errors load none.
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


@pytest.mark.parametrize("words", [["--version"], ["--help"], ["-h"], [], ["--debug"]])
def test_version_and_help_import_no_numeric_library(words: list[str]) -> None:
    """``--version`` and ``--help`` answer without numpy, scipy, shapely or
    any command module (issue 14: start-up time; common practice, no source)."""
    import subprocess
    import sys

    code = ("import sys\nfrom auditor.cli.main import main\n"
            f"try:\n    main({words!r})\nexcept SystemExit:\n    pass\n"
            "heavy = ('numpy', 'scipy', 'shapely', 'auditor.cli.cmd_')\n"
            "print(sorted(m for m in sys.modules if m.startswith(heavy)))")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=True)
    assert done.stdout.strip().splitlines()[-1] == "[]"


def test_overview_help_matches_the_commands_own_summaries() -> None:
    """The light ``--help`` (summaries kept in main) says exactly what the full
    parser, built from every command module's ``register``, says."""
    from auditor.cli.main import _load_commands, build_parser

    assert build_parser(None).format_help() == build_parser(_load_commands()).format_help()


def test_version_prints_the_version(capsys: pytest.CaptureFixture[str]) -> None:
    from auditor import __version__

    with pytest.raises(SystemExit) as exc:
        main(["--version"])
    assert exc.value.code == 0
    assert capsys.readouterr().out == f"padaudit {__version__}\n"
